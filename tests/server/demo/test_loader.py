"""The demo scenario goes through the real upload path and loads only once."""

from __future__ import annotations

import hashlib

from sqlalchemy import func, select

from server.demo import load_demo
from server.demo.scenario import SUPPLIERS, deliveries
from server.settings import Settings
from server.store import Intake, Supplier, session_scope


def test_files_are_generated_the_same_every_time() -> None:
    first = [hashlib.sha256(d.content).hexdigest() for d in deliveries()]
    second = [hashlib.sha256(d.content).hexdigest() for d in deliveries()]
    assert first == second
    assert len(set(first)) == len(first) == len(deliveries())


def test_load_profiles_every_delivery_and_a_second_load_adds_nothing(
    app_settings: Settings,
) -> None:
    result = load_demo(app_settings)
    assert len(result.created) == len(deliveries())
    assert set(result.statuses.values()) == {"ready"}
    again = load_demo(app_settings)
    assert again.created == []
    assert len(again.skipped) == len(deliveries())
    with session_scope(app_settings) as session:
        assert session.scalar(select(func.count()).select_from(Supplier)) == len(SUPPLIERS)
        intakes = session.scalars(select(Intake).order_by(Intake.id)).all()
        assert len(intakes) == len(deliveries())
        # The stored names come from the content, the original names are kept as metadata.
        assert [i.original_name for i in intakes] == [d.filename for d in deliveries()]
        assert all(i.file_key.endswith(i.sha256) for i in intakes)
        tide = intakes[0]
        assert tide.profile.rows == 1440  # by construction: ten-minute readings for ten days
