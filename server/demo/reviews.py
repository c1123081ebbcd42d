"""The review side of the demo: arrival dates, decisions and discussions.

After the deliveries are profiled, they are dated back over the last two
months (so timelines have a shape), some are decided and some flags are
discussed by the demo accounts, all through the real API routes. Then every
intake is judged again, so its baseline is its supplier's last accepted
delivery, as it would be had the decisions come one by one.
"""

from __future__ import annotations

from dataclasses import dataclass
from datetime import timedelta
from typing import TYPE_CHECKING, Any

from fastapi import FastAPI
from sqlalchemy import select

from server.api.deps import User, current_user
from server.demo.scenario import Delivery
from server.settings import Settings
from server.store import Intake, session_scope
from server.store.accounts import User as Account
from server.store.models import utcnow

if TYPE_CHECKING:
    from fastapi.testclient import TestClient


@dataclass(frozen=True)
class DemoDecision:
    filename: str
    person: str
    verdict: str
    reason: str = ""


@dataclass(frozen=True)
class DemoDiscussion:
    filename: str
    column: str
    flag_code: str
    comments: tuple[tuple[str, str], ...]
    """(person, text) in the order they were written."""
    resolved_by: str | None = None


DECISIONS = (
    DemoDecision(
        "gullwick-2031-03.csv",
        "demo-reviewer",
        "accepted_with_caveats",
        "Probe dropouts are written as -999; the loader drops them.",
    ),
    DemoDecision(
        "brannock-landings-2031-w10.csv",
        "demo-reviewer",
        "accepted_with_caveats",
        "A price of 0 means 'not known'; treated as missing downstream.",
    ),
    DemoDecision("saltmere-samples-2031-w10.csv", "demo-admin", "accepted"),
    DemoDecision(
        "gullwick-2031-04.csv",
        "demo-reviewer",
        "rejected",
        "Water 1.8 °C warmer than in March at every tide: the probe needs calibrating.",
    ),
    DemoDecision("saltmere-samples-2031-w11.csv", "demo-admin", "accepted"),
)

DISCUSSIONS = (
    DemoDiscussion(
        "brannock-landings-2031-w10.csv",
        "price_per_kg",
        "validity.outliers",
        (
            (
                "demo-reviewer",
                "The low outliers are prices of 0: the clerk's way of writing 'not known'.",
            ),
            ("demo-admin", "Agreed; we load 0 as missing and asked the clerk to leave it blank."),
        ),
        resolved_by="demo-admin",
    ),
    DemoDiscussion(
        "brannock-landings-2031-w10.csv",
        "weight_kg",
        "validity.outliers",
        (
            ("demo-reviewer", "Are the landings over 300 kg real?"),
            ("demo-admin", "Yes: the two trawlers land that much after a long trip."),
        ),
        resolved_by="demo-reviewer",
    ),
    DemoDiscussion(
        "brannock-landings-2031-w11.csv",
        "weight_kg",
        "validity.outliers",
        (("demo-reviewer", "The same large landings again; see the earlier discussion."),),
    ),
    DemoDiscussion(
        "saltmere-samples-2031-w12.csv",
        "site",
        "balance.dominant-label",
        (
            ("demo-reviewer", "Nine samples in ten from the inner basin again."),
            ("demo-admin", "The lab says the other sites were closed for dredging."),
        ),
    ),
)


def _person(settings: Settings, name: str) -> User:
    with session_scope(settings) as session:
        account = session.scalar(select(Account).where(Account.name == name))
        assert account is not None, f"demo account {name} is missing"
        return User(account.id, account.name, account.role, True)


def _as(app: FastAPI, person: User) -> None:
    app.dependency_overrides[current_user] = lambda: person


def _check(answer: Any, what: str) -> Any:
    if answer.status_code >= 300:
        raise RuntimeError(f"demo: could not {what}: {answer.text}")
    return answer.json() if answer.content else None


def add_reviews(
    app: FastAPI,
    client: TestClient,
    settings: Settings,
    sent: dict[str, int],
    deliveries: list[Delivery],
) -> None:
    """Date the intakes ``sent`` (file name → intake id), decide, discuss, judge again."""
    now = utcnow()
    with session_scope(settings) as session:
        for delivery in deliveries:
            if delivery.filename in sent:
                intake = session.get(Intake, sent[delivery.filename])
                intake.created_at = now - timedelta(days=delivery.days_ago, hours=3)
    people = {n: _person(settings, n) for n in ("demo-admin", "demo-reviewer")}
    for decision in DECISIONS:
        if decision.filename not in sent:
            continue
        _as(app, people[decision.person])
        _check(
            client.post(
                f"/api/v1/intakes/{sent[decision.filename]}/decisions",
                json={"verdict": decision.verdict, "reason": decision.reason},
            ),
            f"decide on {decision.filename}",
        )
    admin = people["demo-admin"]
    for filename in [d.filename for d in deliveries if d.filename in sent]:
        _as(app, admin)
        _check(client.post(f"/api/v1/intakes/{sent[filename]}/judgement"), f"judge {filename}")
    for talk in DISCUSSIONS:
        if talk.filename not in sent:
            continue
        first, *rest = talk.comments
        _as(app, people[first[0]])
        thread = _check(
            client.post(
                f"/api/v1/intakes/{sent[talk.filename]}/threads",
                json={"column": talk.column, "flag_code": talk.flag_code, "body": first[1]},
            ),
            f"start a discussion on {talk.filename}",
        )
        for person, text in rest:
            _as(app, people[person])
            _check(
                client.post(f"/api/v1/threads/{thread['id']}/comments", json={"body": text}),
                "reply",
            )
        if talk.resolved_by:
            _as(app, people[talk.resolved_by])
            _check(client.post(f"/api/v1/threads/{thread['id']}/resolve"), "resolve")
