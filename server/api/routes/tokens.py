"""/api/v1/tokens: a user's own API tokens, for scripts that upload (``Authorization: Bearer``).

A token carries its owner's role. Its text is answered once, at creation;
only its digest is stored, so a lost token is revoked and replaced, never shown again.
"""

from __future__ import annotations

from datetime import datetime

from fastapi import APIRouter, Response
from pydantic import BaseModel, Field

from server.api.deps import SessionDep, SignedInUser
from server.api.errors import ApiError
from server.store import accounts

router = APIRouter(prefix="/tokens", tags=["accounts"])


class TokenIn(BaseModel):
    """A new token's label, to tell tokens apart (e.g. the script that uses it)."""

    name: str = Field("token", min_length=1, max_length=100)


class TokenOut(BaseModel):
    """A token as listed: never its text, only its last four characters."""

    id: int
    name: str
    hint: str
    created_at: datetime
    last_used_at: datetime | None
    revoked_at: datetime | None

    @classmethod
    def of(cls, token: accounts.ApiToken) -> TokenOut:
        return cls(
            id=token.id,
            name=token.name,
            hint=token.hint,
            created_at=token.created_at,
            last_used_at=token.last_used_at,
            revoked_at=token.revoked_at,
        )


class NewTokenOut(TokenOut):
    """A token just created, with its text: shown this once."""

    token: str


@router.get("", response_model=list[TokenOut])
def list_tokens(session: SessionDep, user: SignedInUser) -> list[TokenOut]:
    """The caller's own tokens, newest first."""
    owner = session.get(accounts.User, user.id)
    return [TokenOut.of(t) for t in accounts.tokens_of(session, owner)]


@router.post("", response_model=NewTokenOut, status_code=201)
def create_token(body: TokenIn, session: SessionDep, user: SignedInUser) -> NewTokenOut:
    """A new token for the caller; its text is in this answer only."""
    owner = session.get(accounts.User, user.id)
    token, plaintext = accounts.create_token(session, owner, body.name)
    session.commit()
    return NewTokenOut(**TokenOut.of(token).model_dump(), token=plaintext)


@router.delete("/{token_id}", status_code=204)
def revoke_token(token_id: int, session: SessionDep, user: SignedInUser) -> Response:
    """Revoke one of the caller's own tokens."""
    owner = session.get(accounts.User, user.id)
    if accounts.revoke_token(session, owner, token_id) is None:
        raise ApiError(404, f"you have no token {token_id}", code="not_found")
    session.commit()
    return Response(status_code=204)
