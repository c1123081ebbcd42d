"""Options of the profiling engine.

The engine is a pure library, so its options are a plain pydantic model; the
service's settings (``server.settings``) embed it, which makes every field an
environment variable ``TIDEWAITER_PROFILING__<FIELD>``. Each default names its
source or says "common practice".
"""

from __future__ import annotations

import os

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
        "come from a uniform sample whose rank error the profile states (common practice).",
    )
    missing_tokens: tuple[str, ...] = Field(
        DEFAULT_MISSING_TOKENS,
        description="Cell texts counted as missing, after trimming whitespace (common practice).",
    )
    distinct_exact_bound: int = Field(
        100_000,
        description="Distinct values per column counted exactly; above it a HyperLogLog "
        "(Flajolet et al. 2007) estimates the count (common practice).",
    )
    hll_precision: int = Field(
        16,
        description="HyperLogLog registers = 2^precision; relative error 1.04/sqrt(2^p), "
        "0.41 % at 16 (Flajolet et al. 2007).",
    )
    label_exact_bound: int = Field(
        10_000,
        description="Distinct labels per column counted exactly; above it a Misra–Gries "
        "summary (Misra and Gries 1982) keeps the most frequent ones (common practice).",
    )
    label_summary_size: int = Field(
        1_000, description="Labels kept by the Misra–Gries summary (common practice)."
    )
    top_labels: int = Field(20, description="Most frequent labels listed (common practice).")
    rare_label_share: float = Field(
        0.01, description="A label below this share of a column's values is rare (common practice)."
    )
    label_synonyms: dict[str, str] = Field(
        default_factory=dict,
        description='Declared synonyms folded together as label variants, e.g. {"F": "Female"}.',
    )
    label_candidate_max: int = Field(
        1_000,
        description="A text column with at most this many distinct values in its first batch "
        "(or under half of its values distinct) is counted label by label (common practice).",
    )
    kind_majority_share: float = Field(
        0.5,
        description="Share of a column's values a kind must fit to be the column's kind; the "
        "rest is mixed-kinds evidence (common practice).",
    )
    identifier_distinct_share: float = Field(
        0.95,
        description="A text column with at least this share of distinct values, short and "
        "without spaces, is an identifier (common practice).",
    )
    categorical_max_distinct: int = Field(
        1_000,
        description="A text column with more distinct values than this and more than half "
        "of its values distinct is free text, not labels (common practice).",
    )
    sentinel_values: tuple[float, ...] = Field(
        (-9999.0, -999.0, -99.0, 999.0, 9999.0, 99999.0, 999999.0),
        description="Numeric codes suppliers use for an unknown value, checked as disguised "
        "missing values (common practice).",
    )
    zero_spike_share: float = Field(
        0.05,
        description="Zeros are a suspected spike from this share of a column's values, when "
        "no other values lie near zero (common practice).",
    )
    histogram_max_bins: int = Field(
        100,
        description="Most histogram bins; Freedman–Diaconis bins are capped here "
        "(common practice).",
    )
    sample_size: int = Field(
        262_144,
        ge=1,
        description="Uniform sample per numeric or date column above the exact bound, for "
        "quantiles, counts below a point, MAD, density and sentinels; its rank error is the "
        "DKW bound sqrt(ln(2/0.01) / 2m), about 0.0032 here (Massart 1990).",
    )
    kde_sample_size: int = Field(
        10_000, description="Most values a density curve is estimated from (common practice)."
    )
    kde_points: int = Field(128, description="Grid points of a density curve (common practice).")
    threads: int = Field(
        default_factory=lambda: max(1, min(4, os.cpu_count() or 1)),
        ge=1,
        description="Threads that profile the columns of a batch side by side (the machine's "
        "cores, at most 4; the Arrow and numpy kernels release the GIL).",
    )
    pattern_sample: int = Field(
        1_000,
        description="Text values per batch whose character-class shapes are counted "
        "(common practice).",
    )
    personal_sample: int = Field(
        2_000,
        description="First non-missing values of each text column checked for personal data "
        "(e-mail, phone, IBAN, card, IP): a share to within about two points (common practice).",
    )
    personal_min_share: float = Field(
        0.5,
        description="Share of the checked values that must match one kind of personal data "
        "for the column to be marked (common practice).",
    )
    max_columns: int = Field(
        5_000,
        description="Most columns a file may have; more are refused with a plain error "
        "(common practice; spreadsheets stop at 16,384, recalled from memory).",
    )
    max_cell_chars: int = Field(
        1_000_000,
        description="Longest text cell accepted, in characters; a longer one ends profiling with "
        "a plain error (common practice; spreadsheet cells hold at most 32,767, from memory).",
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
        description="Rows per batch of the Excel, JSON Lines and Parquet readers "
        "(common practice).",
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
