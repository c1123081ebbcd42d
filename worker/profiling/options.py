"""Options of the profiling engine.

The engine is a pure library, so its options are a plain pydantic model; the
service's settings (``server.settings``) embed it, which makes every field an
environment variable ``TIDEWAITER_PROFILING__<FIELD>``. Each default names its
source or says "common practice".
"""

from __future__ import annotations

from pydantic import BaseModel, Field

from worker.profiling.judgement.thresholds import FlagThresholds

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
    thresholds: FlagThresholds = Field(
        default_factory=FlagThresholds,
        description="Thresholds of the flags, scorecard and drift checks; each names its source.",
    )
