"""Options of the across-column statistics, embedded in ``ProfileOptions`` as ``relations``.

Each field is the environment variable ``TIDEWAITER_PROFILING__RELATIONS__<FIELD>``.
Each default names its source or says "common practice".
"""

from __future__ import annotations

from pydantic import BaseModel, Field


class RelationsOptions(BaseModel):
    """Bounds and thresholds of pairs, twins, crosstabs, missing-together and duplicate rows.

    Thresholds that also decide a flag live with the flag thresholds
    (``ProfileOptions.thresholds``: ``twin_r``, ``cochran_min_expected``,
    ``cochran_low_share``), so the profile and its flags apply one value.
    """

    rank_sample_rows: int = Field(
        200_000,
        ge=10,
        description="Rows kept in the uniform row sample that Spearman is computed on; "
        "Spearman is exact when the table has at most this many rows, else its pairs state "
        "the sample size (common practice: the standard error of rho on 200,000 rows is "
        "about 0.002, and ranking costs grow with the square of the numeric columns).",
    )
    rank_sample_cells: int = Field(
        4_000_000,
        ge=1000,
        description="Most values (rows × numeric columns, 8 bytes each) the row sample holds; "
        "a wide table gets fewer sample rows so memory stays bounded (common practice).",
    )
    pair_columns: int = Field(
        60,
        ge=2,
        description="At most this many numeric and this many label columns, the first ones, "
        "enter the pairs, whose number grows as the square of the columns (common practice).",
    )
    label_bound: int = Field(
        200,
        ge=2,
        description="A label column with more distinct labels than this is left out of "
        "Cramér's V and eta, which would be meaningless and costly (common practice).",
    )
    unit_tolerance: float = Field(
        0.005,
        gt=0,
        description="Relative tolerance on slope and intercept when matching a twin pair "
        "against a known unit conversion (common practice: rounding of the delivered values).",
    )
    crosstab_max_labels: int = Field(
        12,
        ge=2,
        description="Both columns of a label pair must have at most this many labels for "
        "the pair to get a crosstab in the profile (common practice: a table a person reads).",
    )
    crosstab_limit: int = Field(
        20,
        ge=0,
        description="At most this many crosstabs in the profile, strongest Cramér's V first "
        "(common practice).",
    )
    missing_together_phi: float = Field(
        0.5,
        ge=0,
        le=1,
        description="Phi coefficient of two missing masks at or above which the pair is listed "
        "as tending to be missing together (common practice: a strong association).",
    )
    duplicate_exact_rows: int = Field(
        20_000_000,
        ge=1,
        description="Row hashes kept for exact duplicate-row counting; above it the count "
        "comes from a HyperLogLog distinct-count estimate (common practice; 8 bytes a row).",
    )
    duplicate_examples: int = Field(
        5,
        ge=0,
        description="Groups of repeated rows shown as examples, first occurrence first.",
    )
    duplicate_example_rows: int = Field(
        10, ge=1, description="Row numbers listed per example group."
    )
