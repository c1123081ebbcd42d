"""Text figures of a column: lengths, stray whitespace and character-class shapes.

A shape replaces each run of capitals by "A", of small letters by "a", of
digits by "9" and of spaces by one space, keeping punctuation, so
"AB-1234" and "XY-9" share the shape "A-9". Shapes are counted on up to
``pattern_sample`` values per batch.
"""

from __future__ import annotations

from collections import Counter
from typing import Any

import numpy as np
import pyarrow as pa
import pyarrow.compute as pc
import pyarrow.types as pat

_SHAPES = (
    (r"\p{Lu}+", "A"),
    (r"[\p{Ll}\p{Lo}\p{Lt}\p{Lm}]+", "a"),
    (r"\p{Nd}+", "9"),
    (r"\s+", " "),
)


def shapes(values: pa.Array) -> pa.Array:
    """The character-class shape of each value."""
    out = values
    for pattern, replacement in _SHAPES:
        out = pc.replace_substring_regex(out, pattern, replacement)
    return out


class TextState:
    """Length figures, whitespace counts and shape counts, mergeable."""

    def __init__(self, pattern_sample: int = 1_000) -> None:
        self.pattern_sample = pattern_sample
        self.n = 0
        self.min_length: int | None = None
        self.max_length: int | None = None
        self.total_length = 0
        self.leading = 0
        self.trailing = 0
        self.patterns: Counter[str] = Counter()
        self.sampled = 0

    def update(self, raw: pa.Array, missing: np.ndarray, padded: int | None = None) -> None:
        """Add the raw (untrimmed) text of one batch; ``missing`` marks cells to skip.

        ``padded``, when known, is how many present cells have surrounding whitespace;
        at 0 the trimming for the whitespace counts is skipped.
        """
        any_missing = bool(missing.any())
        present = raw.filter(pa.array(~missing)) if any_missing else raw
        if len(present) == 0:
            return
        byte_lengths = ascii_lengths(present)
        if byte_lengths is not None:
            low, high, total = (
                int(byte_lengths.min()),
                int(byte_lengths.max()),
                int(byte_lengths.sum()),
            )
        else:
            char_lengths = pc.utf8_length(present)
            low, high = (v.as_py() for v in pc.min_max(char_lengths).values())
            total = int(pc.sum(char_lengths).as_py())
        self.n += len(present)
        self.total_length += total
        self.min_length = _fold(min, self.min_length, low)
        self.max_length = _fold(max, self.max_length, high)
        if padded is None or padded:
            lengths = pc.utf8_length(present)
            self.leading += _count_changed(lengths, pc.utf8_ltrim_whitespace(present))
            self.trailing += _count_changed(lengths, pc.utf8_rtrim_whitespace(present))
        room = self.pattern_sample * 10 - self.sampled
        if room <= 0:
            return
        sample = present.slice(0, min(self.pattern_sample, room))
        counted = pc.value_counts(shapes(sample))
        self.patterns.update(
            dict(
                zip(
                    counted.field("values").to_pylist(),
                    counted.field("counts").to_pylist(),
                    strict=True,
                )
            )
        )
        self.sampled += len(sample)

    def merge(self, other: TextState) -> TextState:
        out = TextState(self.pattern_sample)
        out.n = self.n + other.n
        out.min_length = _fold(min, self.min_length, other.min_length)
        out.max_length = _fold(max, self.max_length, other.max_length)
        out.total_length = self.total_length + other.total_length
        out.leading = self.leading + other.leading
        out.trailing = self.trailing + other.trailing
        out.patterns = self.patterns + other.patterns
        out.sampled = self.sampled + other.sampled
        return out

    def finalize(self, top: int = 10) -> dict[str, Any]:
        return {
            "min_length": self.min_length,
            "max_length": self.max_length,
            "mean_length": self.total_length / self.n if self.n else None,
            "leading_whitespace": self.leading,
            "trailing_whitespace": self.trailing,
            "patterns": [
                {"pattern": p, "count": c, "share": c / self.sampled}
                for p, c in sorted(self.patterns.items(), key=lambda kv: (-kv[1], kv[0]))[:top]
            ],
            "patterns_sampled": self.sampled,
        }


def ascii_lengths(array: pa.Array) -> np.ndarray | None:
    """Lengths of the values from the offsets when the text is all ASCII (one byte per
    character), else None; much cheaper than counting characters value by value."""
    if not (pat.is_string(array.type) or pat.is_large_string(array.type)) or array.null_count:
        return None
    _validity, offsets_buffer, data = array.buffers()
    width = np.int32 if pat.is_string(array.type) else np.int64
    offsets = np.frombuffer(offsets_buffer, dtype=width)[
        array.offset : array.offset + len(array) + 1
    ]
    if data is None:
        return np.diff(offsets)
    content = np.frombuffer(data, dtype=np.uint8)[offsets[0] : offsets[-1]]
    if content.size and int(content.max()) >= 0x80:
        return None
    return np.diff(offsets)


def _fold(pick: Any, current: int | None, new: int | None) -> int | None:
    if current is None:
        return new
    if new is None:
        return current
    return pick(current, new)


def _count_changed(lengths: pa.Array, trimmed: pa.Array) -> int:
    return int(pc.sum(pc.not_equal(lengths, pc.utf8_length(trimmed))).as_py() or 0)
