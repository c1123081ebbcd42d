"""The HTTP API: one router per resource under ``/api/v1``, health at the root."""

from fastapi import APIRouter, Depends

from server.api.deps import AdminForChanges, current_user
from server.api.routes import (
    audit,
    auth,
    comments,
    decisions,
    drift,
    health,
    history,
    intakes,
    judgement,
    privacy,
    queries,
    rows,
    rules,
    suppliers,
    tokens,
    users,
)

API_PREFIX = "/api/v1"

# Every router included here sits behind sign-in (``current_user``: writes need a reviewer);
# admin routers add their own ``RequireAdmin``.
api_router = APIRouter(prefix=API_PREFIX, dependencies=[Depends(current_user)])
api_router.include_router(intakes.router)
api_router.include_router(queries.router)
api_router.include_router(suppliers.router, dependencies=[AdminForChanges])
api_router.include_router(judgement.router)
api_router.include_router(drift.router)
api_router.include_router(decisions.router)
api_router.include_router(comments.router)
api_router.include_router(rules.router)
api_router.include_router(history.router)

api_router.include_router(users.router)
api_router.include_router(audit.router)
api_router.include_router(privacy.router)
api_router.include_router(rows.router)

# Sign-in must be open and a viewer may sign out or manage their own tokens: these
# routes take their caller from ``signed_in_user`` themselves.
account_router = APIRouter(prefix=API_PREFIX)
account_router.include_router(auth.router)
account_router.include_router(tokens.router)

health_router = health.router

__all__ = ["API_PREFIX", "account_router", "api_router", "health_router"]
