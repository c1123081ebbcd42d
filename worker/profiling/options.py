"""Options of the profiling engine.

The engine is a pure library, so its options are a plain pydantic model; the
service's settings (``server.settings``) embed it, which makes every field an
environment variable ``TIDEWAITER_PROFILING__<FIELD>``. Each default names its
source or says "common practice".
"""

from __future__ import annotations

from pydantic import BaseModel, Field

from worker.profiling.judgement.thresholds import FlagThresholds
from worker.profiling.relations.options import RelationsOptions

DEFAULT_MISSING_TOKENS: tuple[str, ...] = (
    "NA",
    "N/A",
    "n/a",
    "na",
    "null",
    "NULL",
    "Null",
    "None",
    "none",
    "nan",
    "NaN",
    "NAN",
    "-",
    "--",
    "?",
    "#N/A",
    "#NA",
    "(blank)",
)


class ProfileOptions(BaseModel):
    """Bounds and thresholds that change what the engine computes."""

    exact_bound: int = Field(
        1_000_000,
        description="Non-missing values per column kept exactly; above it quantiles "
        "come from a KLL sketch whose rank error the profile states (common practice).",
    )
    missing_tokens: tuple[str, ...] = Field(
        DEFAULT_MISSING_TOKENS,
        description="Cell texts counted as missing, after trimming whitespace (common practice).",
    )
    parse_error_limit: int = Field(
        100,
        ge=0,
        description="Broken rows kept with their line numbers in the profile; all are counted "
        "(common practice: enough to show a pattern, small enough to read).",
    )
    sniff_sample_bytes: int = Field(
        256 * 1024,
        ge=4096,
        description="Bytes read from the start of a text file to guess its encoding, delimiter, "
        "quoting, header and decimal mark (common practice).",
    )
    csv_block_bytes: int = Field(
        4 * 1024**2,
        ge=64 * 1024,
        description="Block size of the streaming CSV reader. Its read-ahead holds a few dozen "
        "blocks, so larger blocks cost memory without gaining speed (measured here with "
        "tests/perf/bench_profile.py).",
    )
    batch_rows: int = Field(
        65_536,
        ge=1,
        description="Rows per batch for the Excel, JSON Lines and Parquet readers (common practice).",
    )
    decompressed_limit_bytes: int = Field(
        20 * 1024**3,
        ge=1,
        description="Largest decompressed size of a gzip or zip delivery; beyond it the file is "
        "refused as a likely decompression bomb (common practice).",
    )
    decompression_ratio_limit: float = Field(
        200.0,
        gt=1,
        description="Largest ratio of decompressed to compressed size. Text tables rarely "
        "compress beyond 20:1; Apache POI refuses zip entries inflating more than 100:1 by "
        "default (recalled from memory), we allow 200:1.",
    )
    thresholds: FlagThresholds = Field(
        default_factory=FlagThresholds,
        description="Thresholds of the flags, scorecard and drift checks; each names its source.",
    )
    relations: RelationsOptions = Field(
        default_factory=RelationsOptions,
        description="Bounds and thresholds of pairs, twins, crosstabs and duplicate rows.",
    )
