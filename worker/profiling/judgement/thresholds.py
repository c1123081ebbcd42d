"""Every threshold a flag, a score or a drift check compares against.

Each field's description names where its default comes from: a publication,
or "common practice" for a convention of the trade with no single source.
A supplier's rules may override any of them (``thresholds:`` in the rules
document); :func:`with_overrides` applies such an override.
"""

from __future__ import annotations

from typing import Any

from pydantic import BaseModel, ConfigDict, Field


class FlagThresholds(BaseModel):
    """The thresholds of the judgement layer, with their documented defaults."""

    model_config = ConfigDict(extra="forbid")

    # completeness
    missing_share_warning: float = Field(
        0.05,
        ge=0,
        le=1,
        description="Share of a column's cells missing above which it is flagged as a warning "
        "(common practice: 5 %).",
    )
    missing_share_critical: float = Field(
        0.5,
        ge=0,
        le=1,
        description="Share of a column's cells missing above which the flag is critical: the "
        "column is more hole than data (common practice).",
    )
    disguised_missing_share: float = Field(
        0.01,
        ge=0,
        le=1,
        description="Share of a column's rows holding one suspected stand-in value (such as "
        "-999 or 0) or missing tokens (such as 'N/A') above which it is flagged (common practice).",
    )
    # validity
    mixed_kinds_share: float = Field(
        0.001,
        ge=0,
        le=1,
        description="Share of a column's values that do not fit its kind above which it is "
        "flagged (common practice: a handful of stray values in a thousand).",
    )
    tukey_k: float = Field(
        1.5,
        gt=0,
        description="Tukey's inner fences: Q1 - k·IQR and Q3 + k·IQR (Tukey 1977, "
        "Exploratory Data Analysis).",
    )
    tukey_far_k: float = Field(
        3.0,
        gt=0,
        description="Tukey's outer fences, beyond which a value is 'far out' (Tukey 1977).",
    )
    modified_z: float = Field(
        3.5,
        gt=0,
        description="|0.6745·(x - median) / MAD| above which a value is a likely outlier "
        "(Iglewicz & Hoaglin 1993, How to Detect and Handle Outliers).",
    )
    outlier_share_warning: float = Field(
        0.01,
        ge=0,
        le=1,
        description="Share of values beyond Tukey's outer fences that makes the outlier flag a "
        "warning rather than information (common practice).",
    )
    # uniqueness
    repeated_rows_share_warning: float = Field(
        0.01,
        ge=0,
        le=1,
        description="Share of rows repeating an earlier row above which the flag is a warning; "
        "any repeat is reported as information (common practice).",
    )
    # redundancy
    strong_pair_r: float = Field(
        0.98,
        gt=0,
        le=1,
        description="|association| (Pearson, Spearman, Cramér's V or eta) at or above which two "
        "columns say nearly the same thing (common practice).",
    )
    twin_r: float = Field(
        0.999,
        gt=0,
        le=1,
        description="|Pearson r| of an exact linear relation b = slope·a + intercept at or above "
        "which two columns are the same measure, e.g. in two units (common practice).",
    )
    # balance
    dominant_label_share: float = Field(
        0.9,
        gt=0,
        le=1,
        description="Share of one label above which a label column is dominated by it "
        "(common practice).",
    )
    rare_label_share: float = Field(
        0.01,
        ge=0,
        le=1,
        description="Share below which a label is rare (common practice: 1 %).",
    )
    rare_labels_min: int = Field(
        1,
        ge=1,
        description="Number of rare labels a column must have to be flagged (common practice).",
    )
    cochran_min_expected: float = Field(
        5.0,
        ge=0,
        description="Cochran's rule: a chi-square test is trusted when no expected count is "
        "below 1 and at most 20 % are below this value (Cochran 1954, Biometrics 10:417-451).",
    )
    cochran_low_share: float = Field(
        0.2,
        ge=0,
        le=1,
        description="Cochran's rule: largest share of cells allowed an expected count below "
        "cochran_min_expected (Cochran 1954).",
    )
    crosstab_residual: float = Field(
        3.0,
        gt=0,
        description="|Adjusted standardised residual| of a crosstab cell above which the "
        "combination is over- or under-represented (Agresti, Categorical Data Analysis, recalled "
        "from memory: values beyond 2 or 3 indicate lack of fit; 3 is the stricter choice).",
    )
    crosstab_p_value: float = Field(
        0.001,
        gt=0,
        le=1,
        description="p-value of the crosstab's chi-square test below which its skew is reported "
        "(common practice for many simultaneous tests: a strict level).",
    )
    # information
    mostly_unique_share: float = Field(
        0.95,
        gt=0,
        le=1,
        description="Distinct values / non-missing values above which a label or text column is "
        "almost all different values: a key or free text, not a category (common practice).",
    )
    mostly_unique_min_count: int = Field(
        20,
        ge=1,
        description="Fewest non-missing values before 'mostly unique' is judged (common practice).",
    )
    # stability (drift against a baseline)
    psi_warning: float = Field(
        0.1,
        ge=0,
        description="Population stability index above which a column's distribution moved "
        "(common practice in credit scoring: below 0.1 stable).",
    )
    psi_critical: float = Field(
        0.25,
        ge=0,
        description="Population stability index above which the move is major "
        "(common practice in credit scoring: above 0.25 a significant shift).",
    )
    psi_floor: float = Field(
        0.0001,
        gt=0,
        lt=0.1,
        description="Share given to an empty bin so PSI's logarithm stays finite "
        "(common practice; the smallest share a bin can take).",
    )
    ks_statistic: float = Field(
        0.1,
        gt=0,
        le=1,
        description="Kolmogorov-Smirnov distance between baseline and target above which a "
        "numeric column moved, when its p-value is also below ks_p_value (common practice).",
    )
    ks_p_value: float = Field(
        0.01,
        gt=0,
        le=1,
        description="p-value of the two-sample Kolmogorov-Smirnov test below which the move is "
        "not chance (common practice).",
    )
    mean_shift_sd: float = Field(
        0.5,
        gt=0,
        description="Change of mean, in baseline standard deviations, above which a numeric "
        "column moved (common practice: half a standard deviation, a 'medium' effect after "
        "Cohen 1988, recalled from memory).",
    )
    missing_share_change: float = Field(
        0.05,
        ge=0,
        le=1,
        description="Change of a column's missing share (absolute) above which it is reported "
        "(common practice).",
    )
    js_distance: float = Field(
        0.1,
        ge=0,
        le=1,
        description="Jensen-Shannon distance (base 2, 0..1) between label distributions above "
        "which a label column moved (common practice).",
    )
    chi2_p_value: float = Field(
        0.001,
        gt=0,
        le=1,
        description="p-value of the chi-square test of homogeneity below which label shares "
        "differ beyond chance (common practice for many simultaneous tests).",
    )
    volume_change: float = Field(
        0.5,
        gt=0,
        description="Relative change of the row count (|target/baseline - 1|) above which the "
        "delivery's volume changed (common practice).",
    )
    rename_max_distance: float = Field(
        0.05,
        gt=0,
        le=1,
        description="Largest KS (numeric) or Jensen-Shannon (labels) distance at which a "
        "removed and an added column are taken for the same column renamed (common practice).",
    )


def with_overrides(base: FlagThresholds, overrides: dict[str, Any] | None) -> FlagThresholds:
    """``base`` with a supplier's overrides applied and validated.

    Raises ``pydantic.ValidationError`` for an unknown name or a value out of range.
    """
    if not overrides:
        return base
    return FlagThresholds.model_validate({**base.model_dump(), **overrides})
