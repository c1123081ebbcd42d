"""OpenAPI shapes of the JSON documents the API hands out as they are stored.

The profile and the query answers are built by the engine as plain JSON; these
models name the fields a client may rely on (design notes, "Profile
document") and let the rest through as extra fields, so the schema documents
the contract without a second, stricter copy of the engine's output.
"""

from __future__ import annotations

from typing import Any, Literal

from pydantic import BaseModel, ConfigDict, Field


class _Open(BaseModel):
    model_config = ConfigDict(extra="allow")


class ProfileDocument(_Open):
    """An intake's profile (format_version 1); personal values masked unless unmasked."""

    format_version: int
    source: dict[str, Any] = Field(description="name, bytes, sha256, format, encoding…")
    dataset: dict[str, Any] = Field(description="rows, columns, missing_cells, duplicate_rows…")
    columns: list[dict[str, Any]] = Field(description="One summary per column, in file order.")
    pairs: list[dict[str, Any]] = []
    twins: list[dict[str, Any]] = []
    crosstabs: list[dict[str, Any]] = []
    flags: list[dict[str, Any]] = []
    score: dict[str, Any] | None = None


class Crosstab(_Open):
    """Counts of label column ``a`` (rows) by ``b`` (columns), with the homogeneity test."""

    a: str
    b: str
    n: int = Field(description="Rows counted (both labels present, within the filter).")
    counts: dict[str, Any] = Field(description="a_labels, b_labels and the count matrix.")
    row_shares: list[list[float]] | None
    chi2: float | None
    dof: int | None
    p_value: float | None
    residuals: list[list[float]] | None = Field(description="Adjusted standardised residuals.")
    cochran_ok: bool | None = Field(description="Whether Cochran's rule holds for the table.")
    where: dict[str, str | None]
    folded: list[str] = Field(description="Sides whose rare labels were folded together.")


class LabelCount(_Open):
    """One label of a column with its count and share; value None counts the missing cells."""

    value: str | None
    count: int
    share: float
    other: bool = Field(False, description="True for the row that folds the rarer labels.")


class Check(_Open):
    """One dependency's state."""

    state: Literal["ok", "down", "outdated"]
    detail: str | None = None


class Health(BaseModel):
    """Whether the service can work: database, queue and storage each with its state."""

    status: Literal["ok", "degraded"]
    checks: dict[str, Check]
