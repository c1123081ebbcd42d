"""Judging inside the profiling job: rules and baseline applied, and nothing lost on failure."""

from __future__ import annotations

from pathlib import Path

import pytest
from sqlalchemy import select

from server.settings import Settings
from server.store import Intake, Supplier, dispose_engines, file_store, schema, session_scope
from server.store.reviews import Decision, Judgement, save_rules
from tests.conftest import make_settings
from tests.support import stored_intake
from worker.jobs import judging as judging_module
from worker.jobs import profile_intake

# Invented deliveries of crate weights; the second is planted with a weight of 95 kg.
FIRST = b"crate,weight_kg,grade\nC1,18.2,A\nC2,17.9,B\nC3,18.4,A\nC4,18.1,B\n"
SECOND = b"crate,weight_kg,grade\nC5,18.0,A\nC6,95.0,B\nC7,18.3,A\nC8,17.7,B\n"


@pytest.fixture
def settings(database_url: str, tmp_path: Path) -> Settings:
    schema.upgrade(database_url)
    dispose_engines()
    yield make_settings(tmp_path / "data", database_url=database_url)
    dispose_engines()


def _intake(settings: Settings, supplier_id: int | None, content: bytes, name: str) -> int:
    with session_scope(settings) as session:
        supplier = (
            session.get(Supplier, supplier_id) if supplier_id else Supplier(name="Brackwater")
        )
        store = file_store(settings)
        return stored_intake(session, store, content, supplier=supplier, name=name).id


def _judgement(settings: Settings, intake_id: int) -> Judgement | None:
    with session_scope(settings) as session:
        return session.scalar(select(Judgement).where(Judgement.intake_id == intake_id))


def test_the_job_checks_rules_and_compares_with_the_last_accepted(settings: Settings) -> None:
    first = _intake(settings, None, FIRST, "week-1.csv")
    profile_intake(first, settings)
    with session_scope(settings) as session:
        intake = session.get(Intake, first)
        supplier_id = intake.supplier_id
        session.add(Decision(intake_id=first, verdict="accepted", decided_by="desk"))
        save_rules(session, supplier_id, {"columns": {"weight_kg": {"max": 40}}}, author="desk")
    second = _intake(settings, supplier_id, SECOND, "week-2.csv")
    profile_intake(second, settings)
    judgement = _judgement(settings, second)
    assert judgement.rules_version == 1
    assert judgement.baseline_intake_id == first
    broken = [r for r in judgement.assessment["rule_results"] if not r["passed"]]
    assert [r["rule"] for r in broken] == ["columns.weight_kg.max"]
    with session_scope(settings) as session:
        document = session.get(Intake, second).profile.document
    assert "validity.rule-broken" in {f["code"] for f in document["flags"]}


def test_a_failing_judgement_keeps_the_profile(
    settings: Settings, monkeypatch: pytest.MonkeyPatch
) -> None:
    def broken(*args, **kwargs):
        raise RuntimeError("planted failure")

    monkeypatch.setattr(judging_module, "assess", broken)
    intake_id = _intake(settings, None, FIRST, "week-1.csv")
    assert profile_intake(intake_id, settings) == "ready"
    assert _judgement(settings, intake_id) is None
    with session_scope(settings) as session:
        intake = session.get(Intake, intake_id)
        assert intake.profile is not None and intake.profile.rows == 4


def test_new_rules_judge_the_undecided_profiled_intakes(
    settings: Settings, monkeypatch: pytest.MonkeyPatch
) -> None:
    decided = _intake(settings, None, FIRST, "week-1.csv")
    profile_intake(decided, settings)
    with session_scope(settings) as session:
        supplier_id = session.get(Intake, decided).supplier_id
        session.add(Decision(intake_id=decided, verdict="accepted", decided_by="desk"))
    # The second delivery's judging fails in its job: it is profiled but unjudged.
    real_assess = judging_module.assess
    monkeypatch.setattr(judging_module, "assess", lambda *a, **k: 1 / 0)
    unjudged = _intake(settings, supplier_id, SECOND, "week-2.csv")
    profile_intake(unjudged, settings)
    assert _judgement(settings, unjudged) is None
    monkeypatch.setattr(judging_module, "assess", real_assess)
    waiting = _intake(settings, supplier_id, FIRST + b"C9,18.0,A\n", "week-3.csv")  # not profiled
    with session_scope(settings) as session:
        save_rules(session, supplier_id, {"columns": {"weight_kg": {"max": 40}}}, author="desk")
        judged = judging_module.rejudge_after_rules(session, supplier_id, settings)
    assert judged == [unjudged]  # not the decided one, not the one still queued
    assert _judgement(settings, unjudged).rules_version == 1
    assert _judgement(settings, decided).rules_version is None
    assert _judgement(settings, waiting) is None


def test_intakes_past_the_rejudge_cap_catch_up_when_looked_at(
    settings: Settings, monkeypatch: pytest.MonkeyPatch
) -> None:
    monkeypatch.setattr(judging_module, "REJUDGE_MAX", 1)
    older = _intake(settings, None, FIRST, "week-1.csv")
    profile_intake(older, settings)
    with session_scope(settings) as session:
        supplier_id = session.get(Intake, older).supplier_id
    newer = _intake(settings, supplier_id, SECOND, "week-2.csv")
    profile_intake(newer, settings)
    decided = _intake(settings, supplier_id, FIRST + b"C9,18.0,A\n", "week-3.csv")
    profile_intake(decided, settings)
    with session_scope(settings) as session:
        session.add(Decision(intake_id=decided, verdict="accepted", decided_by="desk"))
        save_rules(session, supplier_id, {"columns": {"weight_kg": {"max": 40}}}, author="desk")
        assert judging_module.rejudge_after_rules(session, supplier_id, settings) == [newer]
    assert _judgement(settings, older).rules_version is None  # past the cap: not yet
    for intake_id in (older, decided):
        with session_scope(settings) as session:
            judging_module.judged_by_newest_rules(session, session.get(Intake, intake_id), settings)
    assert _judgement(settings, older).rules_version == 1  # caught up when looked at
    assert _judgement(settings, decided).rules_version is None  # decided: keeps its version
