"""The embedded deployment's job runner: a thread pool inside the server process."""

from __future__ import annotations

import logging
import threading
from concurrent.futures import Future, ThreadPoolExecutor, wait

from server.settings import Settings
from worker.jobs.profile_job import profile_intake

log = logging.getLogger(__name__)

INTERRUPT_GRACE_SECONDS = 30.0
"""How long a stopping server waits for its running jobs to notice and give their intakes back."""


class InProcessRunner:
    """Runs profiling jobs on a small thread pool.

    The database stays the source of truth: jobs still queued when the process
    stops are picked up again at the next start (``recover`` in
    ``worker.jobs.sweeper``) or by the sweeper.
    """

    def __init__(self, settings: Settings) -> None:
        self.settings = settings
        self._pool = ThreadPoolExecutor(
            max_workers=max(1, settings.inprocess_workers), thread_name_prefix="tidewaiter-job"
        )
        self._lock = threading.Lock()
        self._futures: set[Future[object]] = set()
        self._stopping = threading.Event()

    def submit(self, intake_id: int) -> None:
        """Profile ``intake_id`` on the pool."""
        future = self._pool.submit(self._run, intake_id)
        with self._lock:
            self._futures.add(future)
        future.add_done_callback(self._forget)

    def _forget(self, future: Future[object]) -> None:
        with self._lock:
            self._futures.discard(future)

    def _run(self, intake_id: int) -> object:
        try:
            return profile_intake(intake_id, self.settings, stop_requested=self._stopping.is_set)
        except Exception:
            # A transient error leaves the intake queued/profiling: the sweeper retries it.
            log.exception("job for intake %s failed; the sweeper will enqueue it again", intake_id)
            return None

    def wait_idle(self, timeout: float | None = None) -> bool:
        """Wait until no job is pending or running; False when ``timeout`` passed first."""
        with self._lock:
            pending = set(self._futures)
        _done, not_done = wait(pending, timeout=timeout)
        return not not_done

    def shutdown(self, *, wait_for_jobs: bool = False) -> None:
        """Stop taking jobs; queued ones stay queued in the database.

        Unless ``wait_for_jobs``, running jobs are interrupted at their next
        progress report and put back to queued, so a stopping server does not
        wait for a long file (the next start profiles it again).
        """
        if not wait_for_jobs:
            self._stopping.set()
        self._pool.shutdown(wait=False, cancel_futures=not wait_for_jobs)
        # Either way, let running jobs end (an interrupted one within one progress report)
        # before the interpreter shuts down the thread pools the engine relies on.
        self.wait_idle(timeout=None if wait_for_jobs else INTERRUPT_GRACE_SECONDS)


_runners: dict[int, InProcessRunner] = {}
_runners_lock = threading.Lock()


def runner_for(settings: Settings) -> InProcessRunner:
    """The process's runner for these settings (one per settings object)."""
    with _runners_lock:
        runner = _runners.get(id(settings))
        if runner is None or runner.settings is not settings:
            runner = _runners[id(settings)] = InProcessRunner(settings)
        return runner


def shutdown_runner(settings: Settings, *, wait_for_jobs: bool = False) -> None:
    """Shut down and forget the runner of these settings, if one was started."""
    with _runners_lock:
        runner = _runners.pop(id(settings), None)
    if runner is not None:
        runner.shutdown(wait_for_jobs=wait_for_jobs)
