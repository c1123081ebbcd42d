"""Holding back repeated failed sign-ins, per account and per client address.

Pure arithmetic over the times of recent failures; the failures themselves are
rows of ``server.store.accounts``. After ``limit`` failures within ``window``,
further attempts are refused until the oldest of them leaves the window, so a
guesser gets ``limit`` tries per window while the owner waits minutes, not forever.

References: OWASP Authentication Cheat Sheet ("Protect against automated
attacks": account lockout thresholds and observation windows); NIST SP 800-63B
section 5.2.2 (rate limiting of failed authentication attempts).
"""

from __future__ import annotations

from collections.abc import Sequence
from datetime import datetime, timedelta


def retry_after(
    failures: Sequence[datetime], *, now: datetime, limit: int, window: timedelta
) -> float | None:
    """Seconds until another attempt is allowed, or None when one is allowed now.

    ``failures`` are the times of failed attempts (any order); only those
    within ``window`` before ``now`` count.
    """
    recent = sorted(moment for moment in failures if now - moment < window)
    if len(recent) < limit:
        return None
    # The attempt is allowed again when enough old failures have aged out of the window.
    release = recent[len(recent) - limit] + window
    return max((release - now).total_seconds(), 1.0)
