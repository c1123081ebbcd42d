"""The profiling engine: a delivered file in, a profile document out.

A pure library: it imports numpy, pyarrow, polars and scipy, never the
database, the web layer or Celery. ``profile_file`` is its entry point.
"""

from worker.profiling.pandas_probe import skip_pandas_probe

skip_pandas_probe()  # before any module below converts an array

from worker.profiling.engine import FORMAT_VERSION, ProgressCallback, profile_file  # noqa: E402
from worker.profiling.errors import ProfileError  # noqa: E402
from worker.profiling.options import ProfileOptions  # noqa: E402

__all__ = ["FORMAT_VERSION", "ProfileError", "ProfileOptions", "ProgressCallback", "profile_file"]
