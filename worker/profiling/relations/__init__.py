"""Statistics across columns: pairs, twins, crosstabs, missing together, duplicate rows.

Every state here is fed prepared batches and merges with a state built over
other rows of the same table, like the per-column states.
"""

from worker.profiling.relations.duplicates import DuplicateState
from worker.profiling.relations.options import RelationsOptions
from worker.profiling.relations.state import RelationsState

__all__ = ["DuplicateState", "RelationsOptions", "RelationsState"]
