"""Supplier rules: read, save a new version, validate, draft from an intake.

Reading is open to every signed-in user; saving a version is for admins.
A saved version is never changed: saving again makes the next version, and
each intake's judgement records the version it was checked against.
"""

from __future__ import annotations

from datetime import datetime
from typing import Any

import yaml
from fastapi import APIRouter, Query, status
from pydantic import BaseModel, Field
from sqlalchemy import select

from server.api.deps import (
    CurrentUser,
    IntakeDep,
    RequireAdmin,
    SessionDep,
    SettingsDep,
    find_supplier,
)
from server.api.errors import ApiError
from server.store.reviews import SupplierRules, latest_rules, save_rules
from worker.jobs.judging import rejudge_after_rules
from worker.profiling.judgement import RulesError, draft_rules, parse_rules

router = APIRouter(tags=["rules"])


class RulesIn(BaseModel):
    """A rules document, as a JSON object or as JSON / YAML text."""

    document: dict[str, Any] | str = Field(
        description="The rules: columns, rows, other_columns, thresholds (see the README)."
    )
    note: str = Field("", max_length=2000, description="What changed in this version.")


class RulesOut(BaseModel):
    """One saved version of a supplier's rules."""

    supplier_id: int
    version: int
    document: dict[str, Any]
    note: str
    created_by: str
    created_at: datetime


class SavedRules(RulesOut):
    """A newly saved version, with the undecided intakes checked against it."""

    rejudged: list[int] = Field(
        description="Undecided intakes of the supplier judged again with this version."
    )


class Problem(BaseModel):
    """One mistake in a rules document: where it is and what is wrong."""

    path: str
    message: str


class Validation(BaseModel):
    """Whether a rules document is valid, with every mistake."""

    valid: bool
    problems: list[Problem]
    document: dict[str, Any] | None = Field(None, description="The document as it will be saved.")


class Draft(BaseModel):
    """Rules proposed from an intake, for a person to edit and save."""

    intake_id: int
    supplier_id: int
    document: dict[str, Any]
    yaml: str


def _out(rules: SupplierRules) -> RulesOut:
    return RulesOut.model_validate(rules, from_attributes=True)


def _validated(document: dict[str, Any] | str) -> dict[str, Any]:
    """The document as a mapping, validated; a 422 listing every mistake otherwise."""
    try:
        parsed = parse_rules(document)
    except RulesError as exc:
        raise ApiError(
            422, f"the rules have mistakes: {exc}", code="invalid_rules", problems=exc.problems
        ) from None
    return parsed.model_dump(mode="json", exclude_defaults=True)


@router.get("/suppliers/{supplier_id}/rules", response_model=RulesOut)
def current_rules(supplier_id: int, session: SessionDep, user: CurrentUser) -> RulesOut:
    """The supplier's current rules (the newest version)."""
    find_supplier(session, supplier_id)
    rules = latest_rules(session, supplier_id)
    if rules is None:
        raise ApiError(404, f"supplier {supplier_id} has no rules yet", code="no_rules")
    return _out(rules)


@router.get("/suppliers/{supplier_id}/rules/versions", response_model=list[RulesOut])
def rules_versions(supplier_id: int, session: SessionDep, user: CurrentUser) -> list[RulesOut]:
    """Every saved version of the supplier's rules, newest first."""
    find_supplier(session, supplier_id)
    rows = session.scalars(
        select(SupplierRules)
        .where(SupplierRules.supplier_id == supplier_id)
        .order_by(SupplierRules.version.desc())
    )
    return [_out(r) for r in rows]


@router.get("/suppliers/{supplier_id}/rules/versions/{version}", response_model=RulesOut)
def rules_version(
    supplier_id: int, version: int, session: SessionDep, user: CurrentUser
) -> RulesOut:
    """One saved version of the supplier's rules."""
    find_supplier(session, supplier_id)
    rules = session.scalar(
        select(SupplierRules).where(
            SupplierRules.supplier_id == supplier_id, SupplierRules.version == version
        )
    )
    if rules is None:
        raise ApiError(
            404, f"supplier {supplier_id} has no rules version {version}", code="not_found"
        )
    return _out(rules)


@router.put(
    "/suppliers/{supplier_id}/rules",
    response_model=SavedRules,
    status_code=status.HTTP_201_CREATED,
    dependencies=[RequireAdmin],
)
def put_rules(
    supplier_id: int,
    body: RulesIn,
    session: SessionDep,
    settings: SettingsDep,
    user: CurrentUser,
    rejudge: bool = Query(
        True,
        description="Judge the supplier's undecided intakes again with the new version "
        "(decided intakes keep the version their decision was made on).",
    ),
) -> SavedRules:
    """Save the document as the supplier's next rules version (admins)."""
    find_supplier(session, supplier_id)
    rules = save_rules(
        session,
        supplier_id,
        _validated(body.document),
        author=user.name,
        note=body.note,
        rejudge_waiting=rejudge,
    )
    session.flush()
    rejudged = rejudge_after_rules(session, supplier_id, settings) if rejudge else []
    session.commit()
    return SavedRules(**_out(rules).model_dump(), rejudged=rejudged)


@router.post("/rules/validate", response_model=Validation)
def validate_rules(body: RulesIn, user: CurrentUser) -> Validation:
    """Check a rules document without saving it: every mistake with its path."""
    try:
        parsed = parse_rules(body.document)
    except RulesError as exc:
        return Validation(valid=False, problems=[Problem(**p) for p in exc.problems])
    return Validation(
        valid=True, problems=[], document=parsed.model_dump(mode="json", exclude_defaults=True)
    )


@router.get("/intakes/{intake_id}/rules-draft", response_model=Draft)
def rules_draft(intake: IntakeDep, user: CurrentUser) -> Draft:
    """Rules proposed from this intake's profile, to edit and save as the supplier's rules."""
    if intake.profile is None:
        raise ApiError(409, f"intake {intake.id} has no profile yet", code="not_ready")
    document = draft_rules(intake.profile.document)
    return Draft(
        intake_id=intake.id,
        supplier_id=intake.supplier_id,
        document=document,
        yaml=yaml.safe_dump(document, sort_keys=False, allow_unicode=True),
    )
