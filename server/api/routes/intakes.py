"""/api/v1/intakes: delivered files, their profiling status, profiles and stored files."""

from __future__ import annotations

import logging
import mimetypes
from typing import Literal

from fastapi import APIRouter, Query, Request, Response, status
from fastapi.responses import FileResponse, JSONResponse
from sqlalchemy import func, select
from sqlalchemy.orm import selectinload

from server.api.deps import CurrentUser, FileStoreDep, IntakeDep, SessionDep, SettingsDep
from server.api.document_schema import ProfileDocument
from server.api.errors import ApiError
from server.api.schemas import IntakeOut, IntakePage
from server.api.uploads import receive_upload
from server.security.masking import visible_profile
from server.store import FileStore, Intake, IntakeStatus, Profile, Supplier
from server.store.models import utcnow
from worker.jobs import enqueue_profile

log = logging.getLogger(__name__)

router = APIRouter(prefix="/intakes", tags=["intakes"])

UPLOAD_BODY = {
    "requestBody": {
        "required": True,
        "content": {
            "multipart/form-data": {
                "schema": {
                    "type": "object",
                    "required": ["file", "supplier"],
                    "properties": {
                        "file": {"type": "string", "format": "binary"},
                        "supplier": {
                            "type": "string",
                            "description": "The supplier's id or exact name.",
                        },
                    },
                }
            }
        },
    }
}


def _find_supplier(session: SessionDep, ref: str | None) -> Supplier:
    ref = (ref or "").strip()
    if not ref:
        raise ApiError(
            422,
            "say which supplier sent the file: a 'supplier' field with its id or name",
            code="no_supplier",
        )
    supplier = session.get(Supplier, int(ref)) if ref.isdigit() else None
    supplier = supplier or session.scalar(select(Supplier).where(Supplier.name == ref))
    if supplier is None:
        raise ApiError(
            422,
            f"there is no supplier {ref!r}; add it first (POST /api/v1/suppliers)",
            code="unknown_supplier",
        )
    return supplier


def _discard_if_unused(session: SessionDep, store: FileStore, key: str) -> None:
    """Remove a stored file no intake refers to (an upload that was refused after storing)."""
    if session.scalar(select(func.count()).where(Intake.file_key == key)) == 0:
        store.delete(key)


def _enqueue(intake_id: int, settings: SettingsDep) -> None:
    try:
        enqueue_profile(intake_id, settings)
    except Exception:
        # The intake stays queued in the database; the sweeper enqueues it again.
        log.exception("could not enqueue intake %s; the sweeper will retry", intake_id)


@router.post(
    "",
    response_model=IntakeOut,
    status_code=status.HTTP_201_CREATED,
    openapi_extra=UPLOAD_BODY,
    responses={413: {"description": "Over the upload limit"}, 422: {"description": "Empty file"}},
)
async def create_intake(
    request: Request,
    response: Response,
    session: SessionDep,
    settings: SettingsDep,
    store: FileStoreDep,
    user: CurrentUser,
) -> IntakeOut:
    """Upload a delivered file (multipart: ``file`` and ``supplier``) and queue its profiling.

    The file is streamed to the store; the intake row is committed only once
    the file is durable, and the job is enqueued only after that commit.
    """
    upload = await receive_upload(request, store)
    key = upload.stored.key
    try:
        supplier = _find_supplier(session, upload.fields.get("supplier"))
    except ApiError:
        _discard_if_unused(session, store, key)
        raise
    same = session.scalars(
        select(Intake.id).where(
            Intake.supplier_id == supplier.id, Intake.sha256 == upload.stored.sha256
        )
    ).all()
    intake = Intake(
        supplier=supplier,
        original_name=upload.filename,
        file_key=key,
        sha256=upload.stored.sha256,
        bytes=upload.stored.bytes,
        status=IntakeStatus.queued,
        stage="queued",
    )
    session.add(intake)
    session.commit()
    _enqueue(intake.id, settings)
    response.headers["Location"] = f"/api/v1/intakes/{intake.id}"
    return IntakeOut.of(intake, list(same))


@router.get("", response_model=IntakePage)
def list_intakes(
    session: SessionDep,
    user: CurrentUser,
    supplier: int | None = Query(None, description="Only this supplier's intakes (its id)."),
    status_: Literal["queued", "profiling", "ready", "failed"] | None = Query(
        None, alias="status", description="Only intakes in this status."
    ),
    limit: int = Query(50, ge=1, le=500),
    offset: int = Query(0, ge=0),
) -> IntakePage:
    """Intakes, newest first, filtered by supplier and status, a page at a time."""
    where = []
    if supplier is not None:
        where.append(Intake.supplier_id == supplier)
    if status_ is not None:
        where.append(Intake.status == status_)
    total = session.scalar(select(func.count()).select_from(Intake).where(*where)) or 0
    intakes = session.scalars(
        select(Intake)
        .where(*where)
        .options(
            selectinload(Intake.supplier),
            selectinload(Intake.profile).load_only(
                Profile.rows, Profile.columns, Profile.overall_score
            ),
        )
        .order_by(Intake.created_at.desc(), Intake.id.desc())
        .limit(limit)
        .offset(offset)
    ).all()
    return IntakePage(
        items=[IntakeOut.of(i) for i in intakes], total=total, limit=limit, offset=offset
    )


@router.get("/{intake_id}", response_model=IntakeOut)
def get_intake(intake: IntakeDep, user: CurrentUser) -> IntakeOut:
    """One intake: where its profiling stands, and its headline figures once ready."""
    return IntakeOut.of(intake)


@router.get(
    "/{intake_id}/profile", response_class=JSONResponse, responses={200: {"model": ProfileDocument}}
)
def get_profile(intake: IntakeDep, session: SessionDep, user: CurrentUser) -> JSONResponse:
    """The intake's profile document (format_version 1), personal values masked unless unmasked."""
    if intake.profile is None:
        if intake.status == IntakeStatus.failed:
            raise ApiError(
                409, f"profiling of intake {intake.id} failed: {intake.error}", code="failed"
            )
        raise ApiError(
            409,
            f"intake {intake.id} has no profile yet: it is {intake.status} "
            f"({intake.stage}, {intake.progress:.0%} read)",
            code="not_ready",
        )
    # Already plain JSON: sent as it is, without a second pass of validation and encoding.
    return JSONResponse(visible_profile(session, intake.id, intake.profile.document))


@router.post("/{intake_id}/reprofile", response_model=IntakeOut, status_code=202)
def reprofile(
    intake: IntakeDep, session: SessionDep, settings: SettingsDep, user: CurrentUser
) -> IntakeOut:
    """Profile the intake's stored file again (after a failure or an engine upgrade)."""
    if intake.file_key is None:
        raise ApiError(410, f"the file of intake {intake.id} has been purged", code="gone")
    if intake.status in (IntakeStatus.queued, IntakeStatus.profiling):
        raise ApiError(409, f"intake {intake.id} is already {intake.status}", code="conflict")
    intake.status = IntakeStatus.queued
    intake.stage = "queued"
    intake.progress = 0.0
    intake.error = None
    intake.attempts = 0
    session.commit()
    _enqueue(intake.id, settings)
    return IntakeOut.of(intake)


@router.get("/{intake_id}/file", response_class=FileResponse)
def download_file(intake: IntakeDep, store: FileStoreDep, user: CurrentUser) -> FileResponse:
    """The stored file, under its original name."""
    if intake.file_key is None or not store.exists(intake.file_key):
        raise ApiError(410, f"the file of intake {intake.id} has been purged", code="gone")
    media_type = mimetypes.guess_type(intake.original_name)[0] or "application/octet-stream"
    return FileResponse(
        store.path(intake.file_key), media_type=media_type, filename=intake.original_name
    )


@router.delete("/{intake_id}/file", status_code=status.HTTP_204_NO_CONTENT)
def purge_file(
    intake: IntakeDep, session: SessionDep, store: FileStoreDep, user: CurrentUser
) -> Response:
    """Delete the stored file (and its columnar copy); the profile stays.

    Another intake with identical bytes shares the stored file, which is then
    removed only when the last of them purges it.
    """
    if intake.status == IntakeStatus.profiling:
        raise ApiError(
            409, f"intake {intake.id} is being profiled; purge it when that ends", code="conflict"
        )
    key = intake.file_key
    if key is not None:
        intake.file_key = None
        intake.file_purged_at = utcnow()
        session.commit()
        _discard_if_unused(session, store, key)
    return Response(status_code=status.HTTP_204_NO_CONTENT)
