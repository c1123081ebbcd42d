"""Shapes of the intake and supplier answers (pydantic models, shown in /docs)."""

from __future__ import annotations

from datetime import datetime

from pydantic import BaseModel, Field

from server.store import Intake, Supplier


class SupplierIn(BaseModel):
    """A new supplier."""

    name: str = Field(min_length=1, max_length=200, description="Unique name of the partner.")
    note: str = Field("", max_length=5000, description="Free text: contact, contract, cadence.")


class SupplierOut(BaseModel):
    """A supplier with a count of its intakes."""

    id: int
    name: str
    note: str
    created_at: datetime
    intakes: int = 0
    last_intake_at: datetime | None = None


class SupplierRef(BaseModel):
    """The supplier of an intake."""

    id: int
    name: str


class Headline(BaseModel):
    """The figures listings show for a profiled intake."""

    rows: int
    columns: int
    overall_score: float | None


class IntakeOut(BaseModel):
    """An intake: the delivered file, where its profiling stands, its headline figures."""

    id: int
    supplier: SupplierRef
    original_name: str = Field(description="The uploaded file name (metadata only).")
    sha256: str
    bytes: int
    status: str = Field(description="queued, profiling, ready or failed.")
    stage: str = Field(description="What the job is doing, e.g. reading or summarising.")
    progress: float = Field(description="Share of the file's bytes read, 0 to 1.")
    error: str | None = Field(description="Why profiling failed, in plain words.")
    attempts: int
    created_at: datetime
    updated_at: datetime
    started_at: datetime | None
    finished_at: datetime | None
    file_available: bool = Field(description="False once the stored file has been purged.")
    file_purged_at: datetime | None
    headline: Headline | None
    same_content_as: list[int] = Field(
        default_factory=list, description="Earlier intakes of this supplier with identical bytes."
    )

    @classmethod
    def of(cls, intake: Intake, same_content_as: list[int] | None = None) -> IntakeOut:
        """The answer for one intake row."""
        profile = intake.profile
        return cls(
            id=intake.id,
            supplier=SupplierRef(id=intake.supplier.id, name=intake.supplier.name),
            original_name=intake.original_name,
            sha256=intake.sha256,
            bytes=intake.bytes,
            status=intake.status,
            stage=intake.stage,
            progress=intake.progress,
            error=intake.error,
            attempts=intake.attempts,
            created_at=intake.created_at,
            updated_at=intake.updated_at,
            started_at=intake.started_at,
            finished_at=intake.finished_at,
            file_available=intake.file_key is not None,
            file_purged_at=intake.file_purged_at,
            headline=None
            if profile is None
            else Headline(
                rows=profile.rows, columns=profile.columns, overall_score=profile.overall_score
            ),
            same_content_as=same_content_as or [],
        )


class IntakePage(BaseModel):
    """One page of intakes, newest first."""

    items: list[IntakeOut]
    total: int
    limit: int
    offset: int


def supplier_out(supplier: Supplier, intakes: int, last_intake_at: datetime | None) -> SupplierOut:
    """The answer for one supplier row with its intake count."""
    return SupplierOut(
        id=supplier.id,
        name=supplier.name,
        note=supplier.note,
        created_at=supplier.created_at,
        intakes=intakes,
        last_intake_at=last_intake_at,
    )
