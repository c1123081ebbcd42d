"""Background jobs: the ``enqueue_profile`` seam, the runners and the sweeper.

``enqueue_profile(intake_id)`` is the only call the service makes; the job
body ``profile_intake(intake_id)`` re-reads the intake, profiles its file and
stores the result, on the in-process thread pool (embedded) or a Celery
worker (team).
"""

from worker.jobs.enqueue import enqueue_profile
from worker.jobs.profile_job import profile_intake

__all__ = ["enqueue_profile", "profile_intake"]
