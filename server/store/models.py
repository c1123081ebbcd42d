"""The service's tables: suppliers, intakes, their profiles and per-column summaries.

The profile document itself is stored whole as JSON; the figures that listings
and history queries need (rows, columns, overall score, and one row per column)
are copied into plain columns so those queries need no JSON digging.
"""

from __future__ import annotations

import enum
from datetime import UTC, datetime
from typing import Any

from sqlalchemy import (
    JSON,
    BigInteger,
    DateTime,
    Float,
    ForeignKey,
    Integer,
    MetaData,
    String,
    Text,
    TypeDecorator,
    UniqueConstraint,
)
from sqlalchemy.dialects.postgresql import JSONB
from sqlalchemy.orm import DeclarativeBase, Mapped, mapped_column, relationship

# Named constraints, so migrations can drop them on every database (SQLite included).
NAMING_CONVENTION = {
    "ix": "ix_%(column_0_label)s",
    "uq": "uq_%(table_name)s_%(column_0_N_name)s",
    "ck": "ck_%(table_name)s_%(constraint_name)s",
    "fk": "fk_%(table_name)s_%(column_0_name)s_%(referred_table_name)s",
    "pk": "pk_%(table_name)s",
}

JSONDocument = JSON().with_variant(JSONB(), "postgresql")


def utcnow() -> datetime:
    """The current time, timezone-aware in UTC."""
    return datetime.now(UTC)


class UTCDateTime(TypeDecorator[datetime]):
    """A timestamp stored in UTC and read back timezone-aware, on SQLite too."""

    impl = DateTime(timezone=True)
    cache_ok = True

    def process_bind_param(self, value: datetime | None, dialect: Any) -> datetime | None:
        if value is None:
            return None
        if value.tzinfo is None:
            raise ValueError("timestamps must be timezone-aware")
        return value.astimezone(UTC)

    def process_result_value(self, value: datetime | None, dialect: Any) -> datetime | None:
        if value is None:
            return None
        return value.replace(tzinfo=UTC) if value.tzinfo is None else value.astimezone(UTC)


class Base(DeclarativeBase):
    """Declarative base of every table; other modules of ``server.store`` extend it."""

    metadata = MetaData(naming_convention=NAMING_CONVENTION)


class IntakeStatus(enum.StrEnum):
    """Where an intake is in its life: queued → profiling → ready | failed."""

    queued = "queued"
    profiling = "profiling"
    ready = "ready"
    failed = "failed"


class Supplier(Base):
    """A partner that sends files."""

    __tablename__ = "supplier"

    id: Mapped[int] = mapped_column(Integer, primary_key=True)
    name: Mapped[str] = mapped_column(String(200), unique=True)
    note: Mapped[str] = mapped_column(Text, default="")
    created_at: Mapped[datetime] = mapped_column(UTCDateTime, default=utcnow)

    intakes: Mapped[list[Intake]] = relationship(back_populates="supplier")


class Intake(Base):
    """One delivered file and everything learned about it.

    ``file_key`` names the stored file inside the content-addressed store; it is
    derived from the content's sha256, never from the uploaded name, which is
    kept as metadata only (``original_name``). ``file_key`` is None once the
    stored file has been purged; the profile stays.
    """

    __tablename__ = "intake"

    id: Mapped[int] = mapped_column(Integer, primary_key=True)
    supplier_id: Mapped[int] = mapped_column(ForeignKey("supplier.id"), index=True)
    original_name: Mapped[str] = mapped_column(String(500))
    file_key: Mapped[str | None] = mapped_column(String(200), index=True)
    sha256: Mapped[str] = mapped_column(String(64), index=True)
    bytes: Mapped[int] = mapped_column(BigInteger)
    status: Mapped[str] = mapped_column(String(20), default=IntakeStatus.queued, index=True)
    stage: Mapped[str] = mapped_column(String(40), default="queued")
    progress: Mapped[float] = mapped_column(Float, default=0.0)
    error: Mapped[str | None] = mapped_column(Text)
    attempts: Mapped[int] = mapped_column(Integer, default=0)
    created_at: Mapped[datetime] = mapped_column(UTCDateTime, default=utcnow)
    updated_at: Mapped[datetime] = mapped_column(UTCDateTime, default=utcnow, onupdate=utcnow)
    started_at: Mapped[datetime | None] = mapped_column(UTCDateTime)
    finished_at: Mapped[datetime | None] = mapped_column(UTCDateTime)
    file_purged_at: Mapped[datetime | None] = mapped_column(UTCDateTime)

    supplier: Mapped[Supplier] = relationship(back_populates="intakes")
    profile: Mapped[Profile | None] = relationship(
        back_populates="intake", cascade="all, delete-orphan", uselist=False
    )
    column_summaries: Mapped[list[ColumnSummary]] = relationship(
        back_populates="intake",
        cascade="all, delete-orphan",
        order_by="ColumnSummary.position",
    )


class Profile(Base):
    """The computed profile document of an intake, with its headline figures."""

    __tablename__ = "profile"

    id: Mapped[int] = mapped_column(Integer, primary_key=True)
    intake_id: Mapped[int] = mapped_column(ForeignKey("intake.id", ondelete="CASCADE"), unique=True)
    format_version: Mapped[int] = mapped_column(Integer)
    document: Mapped[dict[str, Any]] = mapped_column(JSONDocument)
    rows: Mapped[int] = mapped_column(BigInteger)
    columns: Mapped[int] = mapped_column(Integer)
    overall_score: Mapped[float | None] = mapped_column(Float)
    created_at: Mapped[datetime] = mapped_column(UTCDateTime, default=utcnow)

    intake: Mapped[Intake] = relationship(back_populates="profile")


class ColumnSummary(Base):
    """One column of one intake's profile, flattened for history queries by column."""

    __tablename__ = "column_summary"
    __table_args__ = (UniqueConstraint("intake_id", "position"),)

    id: Mapped[int] = mapped_column(Integer, primary_key=True)
    intake_id: Mapped[int] = mapped_column(ForeignKey("intake.id", ondelete="CASCADE"), index=True)
    name: Mapped[str] = mapped_column(String(500), index=True)
    position: Mapped[int] = mapped_column(Integer)
    kind: Mapped[str | None] = mapped_column(String(20))
    missing_share: Mapped[float | None] = mapped_column(Float)
    distinct: Mapped[int | None] = mapped_column(BigInteger)
    mean: Mapped[float | None] = mapped_column(Float)
    median: Mapped[float | None] = mapped_column(Float)
    std: Mapped[float | None] = mapped_column(Float)
    min: Mapped[float | None] = mapped_column(Float)
    max: Mapped[float | None] = mapped_column(Float)
    top_label: Mapped[str | None] = mapped_column(Text)
    top_label_share: Mapped[float | None] = mapped_column(Float)

    intake: Mapped[Intake] = relationship(back_populates="column_summaries")
