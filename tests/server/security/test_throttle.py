"""Failed sign-in throttling: counted within a window, released as failures age out."""

from __future__ import annotations

from datetime import UTC, datetime, timedelta

from hypothesis import given
from hypothesis import strategies as st

from server.security.throttle import retry_after

NOW = datetime(2026, 3, 14, 9, 30, tzinfo=UTC)
WINDOW = timedelta(minutes=15)


def test_below_the_limit_attempts_are_allowed() -> None:
    failures = [NOW - timedelta(minutes=m) for m in (1, 2, 3, 4)]
    assert retry_after(failures, now=NOW, limit=5, window=WINDOW) is None


def test_at_the_limit_the_wait_runs_until_the_oldest_ages_out() -> None:
    failures = [NOW - timedelta(minutes=m) for m in (1, 2, 3, 4, 10)]
    wait = retry_after(failures, now=NOW, limit=5, window=WINDOW)
    assert wait == timedelta(minutes=5).total_seconds()


def test_old_failures_do_not_count() -> None:
    failures = [NOW - timedelta(minutes=m) for m in (1, 2, 20, 30, 40, 50)]
    assert retry_after(failures, now=NOW, limit=5, window=WINDOW) is None


@given(
    st.lists(st.integers(min_value=0, max_value=3600), max_size=30),
    st.integers(min_value=1, max_value=10),
)
def test_waiting_the_given_time_always_allows_an_attempt(ages: list[int], limit: int) -> None:
    failures = [NOW - timedelta(seconds=s) for s in ages]
    wait = retry_after(failures, now=NOW, limit=limit, window=WINDOW)
    if wait is None:
        assert sum(1 for s in ages if s < WINDOW.total_seconds()) < limit
    else:
        later = NOW + timedelta(seconds=wait)
        assert retry_after(failures, now=later, limit=limit, window=WINDOW) is None
