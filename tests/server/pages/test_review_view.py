"""The intake page's discussions: earlier threads found in one query, as one by one."""

from __future__ import annotations

from server.pages.review_view import earlier_threads, flag_key
from server.settings import Settings
from server.store import Intake, IntakeStatus, Supplier, session_scope
from server.store.reviews import CommentThread, earlier_thread


def test_earlier_threads_agree_with_the_one_by_one_lookup(app_settings: Settings) -> None:
    with session_scope(app_settings) as session:
        quay, other = Supplier(name="quay"), Supplier(name="other")
        session.add_all([quay, other])
        intakes = []
        for n, supplier in enumerate([quay, quay, other, quay]):
            intake = Intake(
                supplier=supplier,
                original_name=f"d{n}.csv",
                sha256=f"{n:064d}",
                bytes=1,
                status=IntakeStatus.ready,
            )
            session.add(intake)
            intakes.append(intake)
        session.flush()
        planted = [  # (intake index, column, flag code), by construction
            (0, "depth", "validity.outliers"),
            (1, "depth", "validity.outliers"),  # newer: this one is found
            (1, None, "uniqueness.repeated-rows"),
            (2, "depth", "validity.outliers"),  # another supplier: never found
            (3, "depth", "validity.outliers"),  # the intake itself: never found
        ]
        for index, column, code in planted:
            session.add(
                CommentThread(
                    intake_id=intakes[index].id,
                    supplier_id=intakes[index].supplier_id,
                    column=column,
                    flag_code=code,
                    created_by="x",
                )
            )
        session.flush()
        target = intakes[3]
        flags = [
            {"code": "validity.outliers", "columns": ["depth"]},
            {"code": "uniqueness.repeated-rows", "columns": []},
            {"code": "balance.rare-labels", "columns": ["berth"]},
        ]
        keys = {flag_key(f) for f in flags}
        found = earlier_threads(session, target, keys)
        for column, code in keys:
            one = earlier_thread(session, target.supplier_id, target.id, column, code)
            assert found.get((column, code)) == one
        assert found[("depth", "validity.outliers")].intake_id == intakes[1].id
        assert ("berth", "balance.rare-labels") not in found
