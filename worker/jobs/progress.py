"""Progress of a running job, written to its intake row without flooding the database.

The engine calls ``report(stage, share)`` as often as it likes; a background
thread writes the latest value at most once per ``interval`` and, even when
nothing changed, at least once per ``heartbeat``, so ``intake.updated_at``
shows the job is alive (the sweeper relies on it).
"""

from __future__ import annotations

import logging
import threading
import time
from collections.abc import Callable
from types import TracebackType

log = logging.getLogger(__name__)

Writer = Callable[[str, float], None]


class JobInterrupted(Exception):
    """The process is stopping: the job gives its intake back to the queue."""


class ProgressReporter:
    """Throttled, heartbeat-keeping progress writes for one job."""

    def __init__(
        self,
        write: Writer,
        *,
        interval: float,
        heartbeat: float,
        stop_requested: Callable[[], bool] | None = None,
    ) -> None:
        self._write = write
        self._stop_requested = stop_requested
        self._interval = interval
        self._heartbeat = heartbeat
        self._lock = threading.Lock()
        self._latest: tuple[str, float] = ("starting", 0.0)
        self._written: tuple[str, float] | None = None
        self._stop = threading.Event()
        self._thread = threading.Thread(target=self._loop, name="job-progress", daemon=True)
        self.writes = 0

    def report(self, stage: str, share: float) -> None:
        """Record the job's current stage and share of bytes read (0 to 1).

        Raises JobInterrupted when the process has asked its jobs to stop: the
        engine reports often, so this is where a long job notices.
        """
        if self._stop_requested is not None and self._stop_requested():
            raise JobInterrupted()
        with self._lock:
            self._latest = (stage, min(max(float(share), 0.0), 1.0))

    def _flush(self, force: bool) -> None:
        with self._lock:
            latest = self._latest
        if latest == self._written and not force:
            return
        try:
            self._write(*latest)
            self._written = latest
            self.writes += 1
        except Exception:  # progress is advisory; the job itself must go on
            log.warning("could not record job progress", exc_info=True)

    def _loop(self) -> None:
        last_write = time.monotonic()
        while not self._stop.wait(self._interval):
            now = time.monotonic()
            before = self.writes
            self._flush(force=now - last_write >= self._heartbeat)
            if self.writes != before:
                last_write = now

    def __enter__(self) -> ProgressReporter:
        self._thread.start()
        return self

    def __exit__(
        self,
        exc_type: type[BaseException] | None,
        exc: BaseException | None,
        tb: TracebackType | None,
    ) -> None:
        self._stop.set()
        self._thread.join()
