"""Recording every change and every download in the audit log, in one place.

Rather than asking each route to remember, an ASGI middleware looks at each
finished request: when a signed-in user changed something (a successful POST,
PUT, PATCH or DELETE) or fetched a stored file or an export, one event is
written, named by what the route's path says it touches. Sign-ins and
unmaskings are recorded where they happen, with more detail.
"""

from __future__ import annotations

from collections.abc import Callable
from typing import Any

from starlette.concurrency import run_in_threadpool
from starlette.types import ASGIApp, Message, Receive, Scope, Send

from server.security.csrf import SAFE_METHODS
from server.store import accounts

# Path words → audit action, first match wins (e.g. "/api/v1/intakes/3/decisions").
ACTIONS: tuple[tuple[str, str], ...] = (
    ("/auth/", ""),  # sign-in and sign-out are recorded by the routes themselves
    ("/sign-in", ""),
    ("/sign-out", ""),
    ("unmask", ""),
    ("/password", ""),  # recorded by the route as password-change
    ("/delete", "deletion"),
    ("/validate", ""),  # checks a document, changes nothing
    ("decision", "decision"),
    ("comment", "comment"),
    ("thread", "comment"),
    ("rule", "rule-change"),
    ("token", "token-change"),
    ("user", "user-change"),
    ("supplier", "supplier-change"),
)
DOWNLOAD_WORDS = ("/file", "download", "export", "report", "/rows", "/sample", ".csv")
"""GET routes whose path holds one of these words hand out delivered content."""


def action_for(method: str, route_path: str) -> str | None:
    """The audit action of a finished request, or None when it is not audited."""
    if method in SAFE_METHODS:
        return "download" if any(word in route_path for word in DOWNLOAD_WORDS) else None
    for word, action in ACTIONS:
        if word in route_path:
            return action or None
    if method == "DELETE":
        return "deletion"
    if method == "POST" and route_path.rstrip("/").endswith("/intakes"):
        return "upload"
    return "change"


class AuditMiddleware:
    """Writes one audit event per successful change or download by a signed-in user."""

    def __init__(self, app: ASGIApp, *, session_scope: Callable[[], Any]):
        self.app = app
        self.session_scope = session_scope

    async def __call__(self, scope: Scope, receive: Receive, send: Send) -> None:
        if scope["type"] != "http":
            await self.app(scope, receive, send)
            return
        status: dict[str, int] = {}

        async def watch(message: Message) -> None:
            if message["type"] == "http.response.start":
                status["code"] = message["status"]
            await send(message)

        await self.app(scope, receive, watch)
        user = scope.get("state", {}).get("user")
        route = scope.get("route")
        if user is None or route is None or not 200 <= status.get("code", 500) < 400:
            return
        # The request's own path: routers are included under prefixes, so the matched
        # route's template alone ("/{intake_id}/file") would lose the resource's name.
        route_path = scope.get("path", "")
        action = action_for(scope["method"], route_path)
        if action is None:
            return
        client = scope.get("client")
        await run_in_threadpool(
            self._record,
            action,
            user,
            scope.get("path", ""),
            client[0] if client else None,
            {"method": scope["method"], "status": status["code"]},
        )

    def _record(
        self, action: str, user: Any, target: str, address: str | None, detail: dict
    ) -> None:
        with self.session_scope() as session:
            actor = session.get(accounts.User, user.id) if user.id is not None else None
            accounts.audit(
                session, action, actor=actor, target=target, address=address, detail=detail
            )
