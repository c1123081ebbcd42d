"""``tidewaiter demo load``: the scenario's deliveries sent through the real upload path.

Each file is posted to the app's own ``POST /api/v1/intakes`` in-process (the
same streaming, storing and queuing as a browser upload). Running it again
adds nothing: a supplier that exists is kept, and a delivery whose bytes the
supplier already sent is skipped.
"""

from __future__ import annotations

import hashlib
import time
import warnings
from dataclasses import dataclass, field

with warnings.catch_warnings():
    # Starlette suggests another HTTP client package for its in-process client; the
    # one installed works, and the notice would only clutter `make run`.
    warnings.filterwarnings("ignore", message="Using `httpx`")
    from fastapi.testclient import TestClient
from sqlalchemy import select

from server.api.deps import User, current_user
from server.demo.reviews import add_reviews
from server.demo.scenario import SUPPLIERS, deliveries
from server.security.demo_accounts import ensure_demo_accounts
from server.settings import Settings
from server.store import Intake, IntakeStatus, Supplier, session_scope

LOADER = User(id=None, name="demo loader", role="admin")


@dataclass
class DemoResult:
    """What a load did."""

    created: list[int] = field(default_factory=list)
    skipped: list[str] = field(default_factory=list)
    statuses: dict[int, str] = field(default_factory=dict)
    accounts: list[str] = field(default_factory=list)


def _already_sent(settings: Settings, supplier: str, sha256: str) -> bool:
    with session_scope(settings) as session:
        return (
            session.scalar(
                select(Intake.id)
                .join(Supplier)
                .where(Supplier.name == supplier, Intake.sha256 == sha256)
            )
            is not None
        )


def load_demo(settings: Settings, *, wait_seconds: float = 120.0) -> DemoResult:
    """Create the demo suppliers and upload their deliveries; wait for profiling.

    Waits (up to ``wait_seconds``) only for the in-process runner; with Celery
    the workers profile the files on their own time.
    """
    from server.app import create_app

    result = DemoResult()
    sent: dict[str, int] = {}
    with session_scope(settings) as session:
        result.accounts = ensure_demo_accounts(session)
    app = create_app(settings)
    # A local command is trusted: it acts as an in-process admin rather than signing in.
    app.dependency_overrides[current_user] = lambda: LOADER
    with TestClient(app, raise_server_exceptions=True) as client:
        for supplier in SUPPLIERS:
            answer = client.post(
                "/api/v1/suppliers", json={"name": supplier.name, "note": supplier.note}
            )
            if answer.status_code not in (201, 409):
                raise RuntimeError(f"could not create supplier {supplier.name}: {answer.text}")
        for delivery in deliveries():
            if _already_sent(
                settings, delivery.supplier, hashlib.sha256(delivery.content).hexdigest()
            ):
                result.skipped.append(delivery.filename)
                continue
            answer = client.post(
                "/api/v1/intakes",
                data={"supplier": delivery.supplier},
                files={"file": (delivery.filename, delivery.content, "text/csv")},
            )
            if answer.status_code != 201:
                raise RuntimeError(f"upload of {delivery.filename} refused: {answer.text}")
            result.created.append(answer.json()["id"])
            sent[delivery.filename] = answer.json()["id"]
        if settings.job_runner == "inprocess":
            deadline = time.monotonic() + wait_seconds
            while time.monotonic() < deadline and _unfinished(settings, result.created):
                time.sleep(0.2)
        if sent and not _unfinished(settings, result.created):
            add_reviews(app, client, settings, sent, deliveries())
        app.dependency_overrides[current_user] = lambda: LOADER
    with session_scope(settings) as session:
        for intake_id in result.created:
            result.statuses[intake_id] = session.get(Intake, intake_id).status
    return result


def _unfinished(settings: Settings, ids: list[int]) -> bool:
    with session_scope(settings) as session:
        return (
            session.scalar(
                select(Intake.id).where(
                    Intake.id.in_(ids),
                    Intake.status.in_((IntakeStatus.queued, IntakeStatus.profiling)),
                )
            )
            is not None
        )
