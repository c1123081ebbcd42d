"""The drift document's shape for the OpenAPI schema (design notes, "Drift document").

The judgement engine builds the document as plain JSON; these models say what
a client may rely on. Column entries carry further evidence (decile bins,
chi-square statistic, KS p-value…), kept as extra fields.
"""

from __future__ import annotations

from typing import Any, Literal

from pydantic import BaseModel, ConfigDict, Field


class FlagOut(BaseModel):
    """One finding: what, how bad, where, in plain words, and the numbers behind it."""

    code: str = Field(description="dimension.finding, e.g. stability.distribution-shift.")
    severity: Literal["info", "warning", "critical"]
    columns: list[str]
    message: str
    evidence: dict[str, Any]


class DriftSide(BaseModel):
    """One of the two profiles compared."""

    intake_id: int | None = None
    name: str | None = Field(None, description="The delivered file's name (metadata).")
    sha256: str | None = None
    rows: int | None = None


class Renamed(BaseModel):
    """A column found under another name: same distribution, new name."""

    model_config = ConfigDict(populate_by_name=True)

    from_: str = Field(alias="from")
    to: str
    evidence: dict[str, Any]


class KindChange(BaseModel):
    """A column whose kind changed between the deliveries."""

    model_config = ConfigDict(populate_by_name=True)

    name: str
    from_: str | None = Field(alias="from")
    to: str | None


class SchemaChange(BaseModel):
    """Columns added, removed, renamed or of another kind than in the baseline."""

    added: list[str]
    removed: list[str]
    renamed: list[Renamed]
    kind_changed: list[KindChange]


class VolumeChange(BaseModel):
    """Row counts of the two deliveries."""

    rows_baseline: int | None
    rows_target: int | None
    ratio: float | None = Field(description="Target rows over baseline rows.")


class ColumnDrift(BaseModel):
    """How one column present on both sides moved."""

    model_config = ConfigDict(extra="allow")

    name: str
    kind: str | None
    psi: float | None = Field(description="Population stability index (deciles or labels).")
    ks: float | None = Field(description="Kolmogorov–Smirnov statistic (numeric columns).")
    mean_shift_sd: float | None = Field(description="Mean shift in baseline standard deviations.")
    missing_share_change: float | None
    new_labels: list[Any]
    vanished_labels: list[Any]
    chi2_p_value: float | None = Field(description="Chi-square test of homogeneity, p-value.")
    js_distance: float | None = Field(description="Jensen–Shannon distance, base 2.")


class DriftOut(BaseModel):
    """What changed between a baseline intake and a target intake."""

    baseline: DriftSide
    target: DriftSide
    schema_: SchemaChange = Field(alias="schema")
    volume: VolumeChange
    columns: list[ColumnDrift]
    flags: list[FlagOut] = Field(description="stability.* flags raised by the comparison.")

    model_config = ConfigDict(populate_by_name=True)
