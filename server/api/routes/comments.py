"""Comment threads on an intake or on one flagged column of it: post, edit own, resolve, reopen.

A thread about a flag code on a column links to the newest thread about the
same flag code and column in an earlier intake of the same supplier
("discussed before"), so a recurring finding brings its earlier discussion.
"""

from __future__ import annotations

from datetime import datetime

from fastapi import APIRouter, status
from pydantic import BaseModel, Field
from sqlalchemy import select
from sqlalchemy.orm import Session

from server.api.deps import CurrentUser, IntakeDep, SessionDep
from server.api.errors import ApiError
from server.store import Intake
from server.store.models import utcnow
from server.store.reviews import (
    Comment,
    CommentThread,
    Judgement,
    ThreadStatus,
    earlier_thread,
)
from worker.profiling.judgement import PROFILE_FLAGS, STABILITY_FLAGS

router = APIRouter(tags=["comments"])

FLAG_CODES = {*PROFILE_FLAGS, *STABILITY_FLAGS, "validity.rule-broken"}


class CommentIn(BaseModel):
    """The text of a comment."""

    body: str = Field(min_length=1, max_length=20_000)


class ThreadIn(CommentIn):
    """A new thread: about the whole intake, a column, or a flag on a column."""

    column: str | None = Field(None, description="The column discussed; empty for the intake.")
    flag_code: str | None = Field(None, description="The flag discussed, e.g. validity.outliers.")


class CommentOut(BaseModel):
    """One comment."""

    id: int
    author: str
    body: str
    created_at: datetime
    edited_at: datetime | None


class EarlierThread(BaseModel):
    """A thread on the same supplier's column and flag code in an earlier intake."""

    thread_id: int
    intake_id: int
    status: ThreadStatus
    comments: int
    last_comment: str | None


class ThreadOut(BaseModel):
    """A thread with its comments and, when there is one, the earlier discussion."""

    id: int
    intake_id: int
    column: str | None
    flag_code: str | None
    status: ThreadStatus
    created_by: str
    created_at: datetime
    resolved_by: str | None
    resolved_at: datetime | None
    comments: list[CommentOut]
    discussed_before: EarlierThread | None = None


class FlagDiscussion(BaseModel):
    """A flag of this intake that was discussed on an earlier intake of the supplier."""

    flag_code: str
    column: str | None
    earlier: EarlierThread


class ThreadsOut(BaseModel):
    """The intake's threads, and its flags that were discussed before."""

    threads: list[ThreadOut]
    discussed_before: list[FlagDiscussion]


def _earlier(thread: CommentThread | None) -> EarlierThread | None:
    if thread is None:
        return None
    last = thread.comments[-1].body if thread.comments else None
    return EarlierThread(
        thread_id=thread.id,
        intake_id=thread.intake_id,
        status=thread.status,
        comments=len(thread.comments),
        last_comment=last,
    )


def _out(session: Session, thread: CommentThread) -> ThreadOut:
    earlier = (
        session.get(CommentThread, thread.earlier_thread_id) if thread.earlier_thread_id else None
    )
    return ThreadOut(
        id=thread.id,
        intake_id=thread.intake_id,
        column=thread.column,
        flag_code=thread.flag_code,
        status=thread.status,
        created_by=thread.created_by,
        created_at=thread.created_at,
        resolved_by=thread.resolved_by,
        resolved_at=thread.resolved_at,
        comments=[CommentOut.model_validate(c, from_attributes=True) for c in thread.comments],
        discussed_before=_earlier(earlier),
    )


def _thread(session: Session, thread_id: int) -> CommentThread:
    thread = session.get(CommentThread, thread_id)
    if thread is None:
        raise ApiError(404, f"there is no comment thread {thread_id}", code="not_found")
    return thread


@router.get("/intakes/{intake_id}/threads", response_model=ThreadsOut)
def list_threads(intake: IntakeDep, session: SessionDep, user: CurrentUser) -> ThreadsOut:
    """The intake's threads, oldest first, and which of its flags were discussed before."""
    threads = session.scalars(
        select(CommentThread).where(CommentThread.intake_id == intake.id).order_by(CommentThread.id)
    ).all()
    judgement = session.scalar(select(Judgement).where(Judgement.intake_id == intake.id))
    flags = judgement.assessment["flags"] if judgement else []
    if not flags and intake.profile is not None:
        flags = intake.profile.document.get("flags") or []
    seen, discussed = set(), []
    for flag in flags:
        for column in flag["columns"][:1] or [None]:
            key = (flag["code"], column)
            if key in seen:
                continue
            seen.add(key)
            found = earlier_thread(session, intake.supplier_id, intake.id, column, flag["code"])
            if found is not None:
                discussed.append(
                    FlagDiscussion(flag_code=flag["code"], column=column, earlier=_earlier(found))
                )
    return ThreadsOut(threads=[_out(session, t) for t in threads], discussed_before=discussed)


@router.post(
    "/intakes/{intake_id}/threads", response_model=ThreadOut, status_code=status.HTTP_201_CREATED
)
def start_thread(
    body: ThreadIn, intake: IntakeDep, session: SessionDep, user: CurrentUser
) -> ThreadOut:
    """Start a thread with its first comment; links an earlier one on the same finding."""
    _check_target(intake, body.column, body.flag_code)
    earlier = earlier_thread(session, intake.supplier_id, intake.id, body.column, body.flag_code)
    thread = CommentThread(
        intake_id=intake.id,
        supplier_id=intake.supplier_id,
        column=body.column,
        flag_code=body.flag_code,
        earlier_thread_id=earlier.id if earlier else None,
        created_by=user.name,
    )
    thread.comments.append(Comment(author=user.name, author_id=user.id, body=body.body))
    session.add(thread)
    session.commit()
    return _out(session, thread)


def _check_target(intake: Intake, column: str | None, flag_code: str | None) -> None:
    if flag_code is not None and flag_code not in FLAG_CODES:
        raise ApiError(422, f"there is no flag code {flag_code!r}", code="unknown_flag_code")
    if column is None:
        return
    columns = {
        c["name"] for c in (intake.profile.document.get("columns") if intake.profile else [])
    }
    if column not in columns:
        raise ApiError(422, f"intake {intake.id} has no column {column!r}", code="unknown_column")


@router.post(
    "/threads/{thread_id}/comments", response_model=ThreadOut, status_code=status.HTTP_201_CREATED
)
def reply(thread_id: int, body: CommentIn, session: SessionDep, user: CurrentUser) -> ThreadOut:
    """Add a comment to a thread (a resolved thread stays resolved until reopened)."""
    thread = _thread(session, thread_id)
    thread.comments.append(Comment(author=user.name, author_id=user.id, body=body.body))
    session.commit()
    return _out(session, thread)


@router.patch("/comments/{comment_id}", response_model=CommentOut)
def edit_comment(
    comment_id: int, body: CommentIn, session: SessionDep, user: CurrentUser
) -> CommentOut:
    """Change the text of one's own comment."""
    comment = session.get(Comment, comment_id)
    if comment is None:
        raise ApiError(404, f"there is no comment {comment_id}", code="not_found")
    own = (
        comment.author_id == user.id
        if comment.author_id is not None
        else comment.author == user.name
    )
    if not own:
        raise ApiError(403, "only its author may edit a comment", code="forbidden")
    comment.body = body.body
    comment.edited_at = utcnow()
    session.commit()
    return CommentOut.model_validate(comment, from_attributes=True)


@router.post("/threads/{thread_id}/resolve", response_model=ThreadOut)
def resolve(thread_id: int, session: SessionDep, user: CurrentUser) -> ThreadOut:
    """Mark a thread resolved."""
    thread = _thread(session, thread_id)
    thread.status = ThreadStatus.resolved
    thread.resolved_by = user.name
    thread.resolved_at = utcnow()
    session.commit()
    return _out(session, thread)


@router.post("/threads/{thread_id}/reopen", response_model=ThreadOut)
def reopen(thread_id: int, session: SessionDep, user: CurrentUser) -> ThreadOut:
    """Open a resolved thread again."""
    thread = _thread(session, thread_id)
    thread.status = ThreadStatus.open
    thread.resolved_by = None
    thread.resolved_at = None
    session.commit()
    return _out(session, thread)
