"""Throttled progress writes with a heartbeat."""

from __future__ import annotations

import time

from worker.jobs.progress import ProgressReporter


def test_many_reports_become_few_writes_and_the_last_one_lands() -> None:
    written: list[tuple[str, float]] = []
    with ProgressReporter(
        lambda stage, share: written.append((stage, share)), interval=0.05, heartbeat=60
    ) as reporter:
        for i in range(10_000):
            reporter.report("reading", i / 10_000)
        reporter.report("summarising", 1.0)
        time.sleep(0.2)
    assert written[-1] == ("summarising", 1.0)
    assert len(written) <= 5  # throttled, not one write per report


def test_heartbeat_writes_even_without_news() -> None:
    written: list[tuple[str, float]] = []
    with ProgressReporter(
        lambda stage, share: written.append((stage, share)), interval=0.02, heartbeat=0.05
    ) as reporter:
        reporter.report("relations", 1.0)
        time.sleep(0.4)
    assert len(written) >= 3
    assert set(written) == {("relations", 1.0)}


def test_share_is_clamped_and_a_failing_writer_does_not_stop_the_job() -> None:
    calls: list[float] = []

    def flaky(stage: str, share: float) -> None:
        calls.append(share)
        raise ConnectionError("database restarting")

    with ProgressReporter(flaky, interval=0.02, heartbeat=60) as reporter:
        reporter.report("reading", 1.7)
        time.sleep(0.1)
    assert calls and all(share == 1.0 for share in calls)
