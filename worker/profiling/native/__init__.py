"""The engine's compiled per-batch passes, with the Python side that hands them Arrow
and numpy buffers.

The passes (``kernels.h``) read a batch once, with the interpreter lock released,
where numpy would read it once per figure while holding the lock between calls:
plain decimals parsed from text, row hashes for duplicate rows and distinct
counts, the sums behind the co-moments, per-label moments and label-pair
counts, label codes, each numeric column's moments and counts, exact sets of distinct numbers,
and HyperLogLog register updates. They are built by pip when the project is installed.
"""

from worker.profiling.native.dictionary import dictionary_encode
from worker.profiling.native.keys import row_keys, sample_below
from worker.profiling.native.numbers import (
    NumberSummary,
    hll_add,
    hll_add_numbers,
    number_summary,
)
from worker.profiling.native.numberset import NumberSet
from worker.profiling.native.parse import (
    bytes_are_ascii,
    number_leads,
    padded_cells,
    parse_decimals,
)
from worker.profiling.native.relations import RelationSums, relation_sums
from worker.profiling.native.rowhash import partition_by_top_bits, row_hashes

__all__ = [
    "NumberSet",
    "NumberSummary",
    "RelationSums",
    "bytes_are_ascii",
    "dictionary_encode",
    "hll_add",
    "hll_add_numbers",
    "number_leads",
    "number_summary",
    "padded_cells",
    "parse_decimals",
    "partition_by_top_bits",
    "relation_sums",
    "row_hashes",
    "row_keys",
    "sample_below",
]
