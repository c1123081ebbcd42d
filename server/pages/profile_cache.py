"""Profile documents as a viewer may see them, kept in memory for the pages.

A profile of a wide file is megabytes of JSON; the intake page and the column
figures it loads as the reader scrolls would otherwise read and parse it on
every request. Documents are immutable once stored (profiling again writes a
new row with a new creation time), so the cache key is the profile row's id
and creation time plus whether personal values are shown.
"""

from __future__ import annotations

import threading
from collections import OrderedDict
from datetime import datetime
from typing import Any

from sqlalchemy import select
from sqlalchemy.orm import Session

from server.security.masking import visible_profile
from server.store import Intake, Profile, accounts

CACHED_DOCUMENTS = 8
"""Documents kept; a handful of intakes open at once covers a team's desk."""

_Key = tuple[int, datetime, bool]
_cache: OrderedDict[_Key, dict[str, Any]] = OrderedDict()
_lock = threading.Lock()


def cached_profile(session: Session, intake: Intake) -> dict[str, Any] | None:
    """The intake's profile as ``visible_profile`` shows it, from memory when possible."""
    head = session.execute(
        select(Profile.id, Profile.created_at).where(Profile.intake_id == intake.id)
    ).first()
    if head is None:
        return None
    key = (head.id, head.created_at, accounts.is_unmasked(session, intake.id))
    with _lock:
        if key in _cache:
            _cache.move_to_end(key)
            return _cache[key]
    document = session.scalar(select(Profile.document).where(Profile.id == head.id))
    shown = visible_profile(session, intake.id, document or {})
    with _lock:
        _cache[key] = shown
        while len(_cache) > CACHED_DOCUMENTS:
            _cache.popitem(last=False)
    return shown
