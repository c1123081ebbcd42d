"""Missing cells of one column: null, blank or whitespace, and missing tokens."""

from __future__ import annotations

from collections import Counter
from typing import Any

from worker.profiling.prepared import MissingCounts


class MissingState:
    """Counts of how a column's cells are missing, mergeable across batches."""

    def __init__(self) -> None:
        self.rows = 0
        self.null = 0
        self.blank = 0
        self.tokens: Counter[str] = Counter()

    def update(self, counts: MissingCounts, rows: int) -> None:
        self.rows += rows
        self.null += counts.null
        self.blank += counts.blank
        self.tokens.update(counts.tokens)

    def merge(self, other: MissingState) -> MissingState:
        merged = MissingState()
        merged.rows = self.rows + other.rows
        merged.null = self.null + other.null
        merged.blank = self.blank + other.blank
        merged.tokens = self.tokens + other.tokens
        return merged

    @property
    def missing(self) -> int:
        return self.null + self.blank + sum(self.tokens.values())

    def finalize(self) -> dict[str, Any]:
        return {
            "count": self.rows - self.missing,
            "missing": self.missing,
            "missing_detail": {
                "null": self.null,
                "blank": self.blank,
                "tokens": dict(sorted(self.tokens.items(), key=lambda kv: (-kv[1], kv[0]))),
            },
        }
