"""The intake list's query: every filter, the sort orders and paging, on planted rows."""

from __future__ import annotations

from datetime import UTC, date, datetime, timedelta

import pytest

from server.pages.listing import ListFilters, intake_page
from server.settings import Settings
from server.store import Intake, IntakeStatus, Profile, Supplier, session_scope
from server.store.reviews import Decision, Judgement

START = datetime(2031, 3, 1, 8, 0, tzinfo=UTC)


@pytest.fixture
def planted(app_settings: Settings) -> Settings:
    """Two suppliers, 12 intakes a day apart; scores 50, 55, …; every third one rejected."""
    with session_scope(app_settings) as session:
        quay, gauge = Supplier(name="North quay"), Supplier(name="Gauge 100%_west")
        session.add_all([quay, gauge])
        for n in range(12):
            intake = Intake(
                supplier=quay if n % 2 == 0 else gauge,
                original_name=f"delivery-{n:02d}.csv",
                file_key=None,
                sha256=f"{n:064d}",
                bytes=100 + n,
                status=IntakeStatus.ready if n < 10 else IntakeStatus.failed,
                created_at=START + timedelta(days=n),
            )
            session.add(intake)
            session.flush()
            if n < 10:
                document = {"flags": [], "verdict": "review"}
                session.add(
                    Profile(
                        intake_id=intake.id,
                        format_version=1,
                        document=document,
                        rows=10 * n,
                        columns=3,
                        overall_score=50 + 5 * n,
                    )
                )
                session.add(
                    Judgement(
                        intake_id=intake.id,
                        assessment={"flags": []},
                        overall_score=50 + 5 * n,
                        suggested_verdict="reject" if n == 0 else "review",
                        critical=1 if n == 0 else 0,
                        warnings=n,
                        infos=0,
                    )
                )
            if n % 3 == 0:
                session.add(Decision(intake_id=intake.id, verdict="accepted", decided_by="a"))
                session.add(
                    Decision(
                        intake_id=intake.id,
                        verdict="rejected",
                        reason="late",
                        decided_by="b",
                        created_at=datetime.now(UTC) + timedelta(minutes=1),
                    )
                )
    return app_settings


def names(settings: Settings, **filters: object) -> list[str]:
    with session_scope(settings) as session:
        page = intake_page(session, ListFilters(**filters), page_size=50)  # type: ignore[arg-type]
        return [row.intake.original_name for row in page.rows]


def test_newest_first_by_default_and_oldest_on_request(planted: Settings) -> None:
    assert names(planted)[:2] == ["delivery-11.csv", "delivery-10.csv"]
    assert names(planted, sort="oldest")[0] == "delivery-00.csv"


def test_filters_by_status_supplier_date_and_name(planted: Settings) -> None:
    assert names(planted, status="failed") == ["delivery-11.csv", "delivery-10.csv"]
    with session_scope(planted) as session:
        gauge = session.query(Supplier).filter_by(name="Gauge 100%_west").one().id
    assert all(int(n[9:11]) % 2 == 1 for n in names(planted, supplier=gauge))
    window = names(planted, since=date(2031, 3, 3), until=date(2031, 3, 4), sort="oldest")
    assert window == ["delivery-02.csv", "delivery-03.csv"]  # both ends of the window kept
    assert names(planted, name="ery-0") == [f"delivery-{n:02d}.csv" for n in range(9, -1, -1)]
    assert names(planted, name="%") == []  # a wildcard typed by the user is a plain character


def test_decision_filter_uses_the_newest_decision(planted: Settings) -> None:
    rejected = names(planted, decision="rejected", sort="oldest")
    assert rejected == ["delivery-00.csv", "delivery-03.csv", "delivery-06.csv", "delivery-09.csv"]
    assert names(planted, decision="accepted") == []  # each accepted one was rejected later
    assert len(names(planted, decision="undecided")) == 8


def test_score_order_puts_unscored_intakes_last(planted: Settings) -> None:
    lowest = names(planted, sort="score")
    assert lowest[0] == "delivery-00.csv" and lowest[-2:] == ["delivery-11.csv", "delivery-10.csv"]
    assert names(planted, sort="-score")[0] == "delivery-09.csv"


def test_rows_carry_badges_and_pages_are_bounded(planted: Settings) -> None:
    with session_scope(planted) as session:
        first = intake_page(session, ListFilters(sort="oldest"), page_size=5)
        last = intake_page(session, ListFilters(sort="oldest", page=99), page_size=5)
        row = first.rows[0]
        assert (first.total, first.pages, last.page) == (12, 3, 3)
        assert row.worst == "critical" and row.verdict == "reject" and row.decision == "rejected"
        assert [r.intake.original_name for r in last.rows] == ["delivery-10.csv", "delivery-11.csv"]
        assert ListFilters(status="ready", page=2).query(page=3) == {"status": "ready", "page": "3"}
