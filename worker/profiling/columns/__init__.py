"""Per-column states: each batch updates them, states merge, finalize gives the profile's figures.

Every state has ``update(...)``, ``merge(other)`` (returns the combined state)
and ``finalize() -> dict``. Merging two states gives the same result as
updating one state with both inputs, exactly for counts, minimum, maximum,
label counts and moments, and within the stated rank error for quantiles
once a sketch is in use.
"""
