"""The profiling engine: a delivered file in, a profile document out.

A pure library: it imports numpy, pandas, pyarrow and scipy, never the
database, the web layer or Celery. ``profile_file`` is its entry point.
"""

from worker.profiling.engine import FORMAT_VERSION, ProgressCallback, profile_file
from worker.profiling.errors import ProfileError
from worker.profiling.options import ProfileOptions

__all__ = ["FORMAT_VERSION", "ProfileError", "ProfileOptions", "ProgressCallback", "profile_file"]
