"""/api/v1/suppliers: the partners that send files."""

from __future__ import annotations

from fastapi import APIRouter, status
from sqlalchemy import Select, func, select
from sqlalchemy.exc import IntegrityError

from server.api.deps import CurrentUser, SessionDep
from server.api.errors import ApiError
from server.api.schemas import SupplierIn, SupplierOut, supplier_out
from server.store import Intake, Supplier

router = APIRouter(prefix="/suppliers", tags=["suppliers"])


def _with_counts() -> Select:
    """Suppliers with their number of intakes and the time of the last one."""
    counts = (
        select(
            Intake.supplier_id,
            func.count(Intake.id).label("n"),
            func.max(Intake.created_at).label("last"),
        )
        .group_by(Intake.supplier_id)
        .subquery()
    )
    return select(Supplier, counts.c.n, counts.c.last).outerjoin(
        counts, counts.c.supplier_id == Supplier.id
    )


@router.get("", response_model=list[SupplierOut])
def list_suppliers(session: SessionDep, user: CurrentUser) -> list[SupplierOut]:
    """Every supplier, by name, with its number of intakes."""
    rows = session.execute(_with_counts().order_by(Supplier.name)).all()
    return [supplier_out(s, n or 0, last) for s, n, last in rows]


@router.post("", response_model=SupplierOut, status_code=status.HTTP_201_CREATED)
def create_supplier(body: SupplierIn, session: SessionDep, user: CurrentUser) -> SupplierOut:
    """Add a supplier; its name must be new."""
    name = body.name.strip()
    if not name:
        raise ApiError(422, "the supplier's name is blank", code="invalid_request")
    if session.scalar(select(Supplier).where(Supplier.name == name)) is not None:
        raise ApiError(409, f"a supplier named {name!r} already exists", code="conflict")
    supplier = Supplier(name=name, note=body.note)
    session.add(supplier)
    try:
        session.commit()
    except IntegrityError as exc:  # created by someone else in the meantime
        session.rollback()
        raise ApiError(409, f"a supplier named {name!r} already exists", code="conflict") from exc
    return supplier_out(supplier, 0, None)


@router.get("/{supplier_id}", response_model=SupplierOut)
def get_supplier(supplier_id: int, session: SessionDep, user: CurrentUser) -> SupplierOut:
    """One supplier."""
    row = session.execute(_with_counts().where(Supplier.id == supplier_id)).first()
    if row is None:
        raise ApiError(404, f"there is no supplier {supplier_id}", code="not_found")
    supplier, n, last = row
    return supplier_out(supplier, n or 0, last)
