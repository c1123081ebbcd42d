"""The demo's review side: dated deliveries, decisions, discussions, baselines."""

from __future__ import annotations

from sqlalchemy import select

from server.demo import load_demo
from server.demo.reviews import DECISIONS, DISCUSSIONS
from server.demo.scenario import deliveries
from server.settings import Settings
from server.store import Intake, session_scope
from server.store.reviews import CommentThread, Decision, Judgement


def test_demo_has_decisions_discussions_and_accepted_baselines(app_settings: Settings) -> None:
    load_demo(app_settings)
    with session_scope(app_settings) as session:
        intakes = {i.original_name: i for i in session.scalars(select(Intake))}
        # Dated back as the scenario says, oldest first.
        dates = [intakes[d.filename].created_at for d in deliveries()]
        assert dates == sorted(dates) and (dates[-1] - dates[0]).days >= 60
        decided = {
            (session.get(Intake, d.intake_id).original_name, d.verdict)
            for d in session.scalars(select(Decision))
        }
        assert decided == {(d.filename, d.verdict) for d in DECISIONS}
        threads = session.scalars(select(CommentThread).order_by(CommentThread.id)).all()
        assert len(threads) == len(DISCUSSIONS)
        # Every discussion is about a flag the intake really has.
        for thread in threads:
            judgement = session.scalar(
                select(Judgement).where(Judgement.intake_id == thread.intake_id)
            )
            raised = {(f["code"], c) for f in judgement.assessment["flags"] for c in f["columns"]}
            assert (thread.flag_code, thread.column) in raised
        later = next(t for t in threads if t.earlier_thread_id is not None)
        assert session.get(Intake, later.intake_id).original_name.endswith("w11.csv")
        # Baselines: the supplier's last accepted delivery (gullwick 04 was rejected).
        may = session.scalar(
            select(Judgement).where(Judgement.intake_id == intakes["gullwick-2031-05.csv"].id)
        )
        assert may.baseline_intake_id == intakes["gullwick-2031-03.csv"].id
