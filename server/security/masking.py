"""What a viewer of an intake sees of its personal data: masked, unless an admin unmasked it."""

from __future__ import annotations

from typing import Any

from sqlalchemy.orm import Session

from server.store import accounts
from worker.profiling.personal import mask_profile, personal_columns


def visible_profile(session: Session, intake_id: int, document: dict[str, Any]) -> dict[str, Any]:
    """The profile document as it may be shown: personal columns' values masked by default."""
    if not personal_columns(document) or accounts.is_unmasked(session, intake_id):
        return document
    return mask_profile(document)
