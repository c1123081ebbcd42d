"""Queries of the reviews store: current decision, default baseline, earlier threads."""

from __future__ import annotations

from datetime import UTC, datetime, timedelta

import pytest
from sqlalchemy.orm import Session

from server.store import Intake, Profile, Supplier, dispose_engines, schema
from server.store.database import make_engine
from server.store.reviews import (
    CommentThread,
    Decision,
    earlier_thread,
    last_accepted_intake,
    latest_decision,
    save_rules,
)

T0 = datetime(2031, 3, 1, tzinfo=UTC)


@pytest.fixture
def session(database_url: str):
    schema.upgrade(database_url)
    engine = make_engine(database_url)
    with Session(engine) as session:
        yield session
    engine.dispose()
    dispose_engines()


def _intake(session: Session, supplier: Supplier, day: int, profiled: bool = True) -> Intake:
    intake = Intake(
        supplier=supplier,
        original_name=f"day-{day}.csv",
        file_key=None,
        sha256=f"{day:064d}",
        bytes=10,
        created_at=T0 + timedelta(days=day),
    )
    session.add(intake)
    session.flush()
    if profiled:
        session.add(Profile(intake_id=intake.id, format_version=1, document={}, rows=1, columns=1))
    session.flush()
    return intake


def _decide(session: Session, intake: Intake, verdict: str, minute: int) -> None:
    session.add(
        Decision(
            intake_id=intake.id,
            verdict=verdict,
            decided_by="desk",
            created_at=T0 + timedelta(days=30, minutes=minute),
        )
    )
    session.flush()


def test_the_newest_decision_counts_for_the_baseline(session: Session) -> None:
    supplier = Supplier(name="Brackwater")
    one, two, three = (_intake(session, supplier, d) for d in (1, 2, 3))
    _decide(session, one, "accepted", 1)
    _decide(session, two, "accepted", 2)
    _decide(session, two, "rejected", 3)  # changed its mind: two is rejected now
    assert latest_decision(session, two.id).verdict == "rejected"
    assert last_accepted_intake(session, supplier.id, three) == one
    _decide(session, two, "accepted_with_caveats", 4)
    assert last_accepted_intake(session, supplier.id, three) == two
    # Only intakes delivered before the target count.
    assert last_accepted_intake(session, supplier.id, one) is None


def test_rules_versions_count_up_per_supplier(session: Session) -> None:
    a, b = Supplier(name="A"), Supplier(name="B")
    session.add_all([a, b])
    session.flush()
    assert save_rules(session, a.id, {}, author="desk").version == 1
    assert save_rules(session, a.id, {"rows": {"min": 1}}, author="desk").version == 2
    assert save_rules(session, b.id, {}, author="desk").version == 1


def test_earlier_thread_matches_supplier_column_and_code(session: Session) -> None:
    supplier, other = Supplier(name="Brackwater"), Supplier(name="Saltmarsh")
    one, two = _intake(session, supplier, 1), _intake(session, supplier, 2)
    foreign = _intake(session, other, 1)
    code = "completeness.disguised-missing"
    thread = CommentThread(
        intake_id=one.id, supplier_id=supplier.id, column="weight_kg", flag_code=code,
        created_by="desk",
    )  # fmt: skip
    session.add(thread)
    session.flush()
    assert earlier_thread(session, supplier.id, two.id, "weight_kg", code) == thread
    assert earlier_thread(session, supplier.id, two.id, "grade", code) is None
    assert earlier_thread(session, supplier.id, two.id, "weight_kg", "validity.outliers") is None
    assert earlier_thread(session, other.id, foreign.id, "weight_kg", code) is None
