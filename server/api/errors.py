"""JSON errors: every error answer is ``{"detail": <one plain sentence>, "code": <word>}``.

``detail`` keeps FastAPI's usual key, so clients that read it keep working;
``code`` is a stable word a program can branch on. Bad input never becomes a
500: validation errors are 422 with the fields named, and only a real fault
of the service answers 500 (logged with its traceback).
"""

from __future__ import annotations

import logging
from http import HTTPStatus
from typing import Any

from fastapi import FastAPI, Request
from fastapi.exceptions import RequestValidationError
from fastapi.responses import JSONResponse
from sqlalchemy.exc import DataError
from starlette.exceptions import HTTPException as StarletteHTTPException

log = logging.getLogger(__name__)


class ApiError(Exception):
    """An answer other than success, with its status, message and code."""

    def __init__(self, status: int, message: str, *, code: str | None = None, **extra: Any):
        super().__init__(message)
        self.status = status
        self.message = message
        self.code = code or _code_for(status)
        self.extra = extra


def _code_for(status: int) -> str:
    try:
        return HTTPStatus(status).phrase.lower().replace(" ", "_").replace("-", "_")
    except ValueError:
        return "error"


def error_response(
    status: int, message: str, code: str, headers: dict[str, str] | None = None, **extra: Any
) -> JSONResponse:
    """The JSON answer for an error."""
    return JSONResponse(
        {"detail": message, "code": code, **extra}, status_code=status, headers=headers
    )


LOCATIONS = ("body", "query", "path", "header", "cookie", "form")


def _problem(error: dict[str, Any]) -> dict[str, str]:
    """One validation error as ``{"field", "message"}``, the field as the client named it.

    Only the first element of pydantic's location says where (body, query…);
    the rest is the field's path, which may itself be called "body".
    """
    location = list(error.get("loc", ()))
    if location and location[0] in LOCATIONS:
        where, location = location[0], location[1:]
    else:
        where = "request"
    if error.get("type") == "json_invalid":  # the location holds the offending position
        at = f" at character {location[0]}" if location else ""
        return {"field": where, "message": f"not valid JSON{at}"}
    return {
        "field": ".".join(str(p) for p in location) or where,
        "message": error.get("msg", "invalid"),
    }


def install_error_handlers(app: FastAPI) -> None:
    """Make every error answer JSON of one shape."""

    @app.exception_handler(ApiError)
    async def _api_error(_request: Request, exc: ApiError) -> JSONResponse:
        return error_response(exc.status, exc.message, exc.code, **exc.extra)

    @app.exception_handler(StarletteHTTPException)
    async def _http_error(_request: Request, exc: StarletteHTTPException) -> JSONResponse:
        message = exc.detail if isinstance(exc.detail, str) else HTTPStatus(exc.status_code).phrase
        return error_response(
            exc.status_code, message, _code_for(exc.status_code), headers=exc.headers
        )

    @app.exception_handler(RequestValidationError)
    async def _invalid(_request: Request, exc: RequestValidationError) -> JSONResponse:
        problems = [_problem(e) for e in exc.errors()]
        summary = "; ".join(f"{p['field']}: {p['message']}" for p in problems)
        return error_response(
            422, f"invalid request ({summary})", "invalid_request", errors=problems
        )

    @app.exception_handler(DataError)
    @app.exception_handler(OverflowError)
    async def _out_of_range(_request: Request, exc: Exception) -> JSONResponse:
        # A number or text in the request that the database cannot hold (an id beyond
        # PostgreSQL's 32-bit integers or SQLite's 64 bits, a NUL character): bad input.
        log.info("request value the database cannot hold: %s", exc)
        return error_response(
            422,
            "a value in the request cannot be stored: a number beyond the range of ids "
            "(below 2147483648) or text with a character the database refuses (NUL)",
            "out_of_range",
        )

    @app.exception_handler(Exception)
    async def _unexpected(_request: Request, exc: Exception) -> JSONResponse:
        log.error("unexpected error", exc_info=exc)
        return error_response(500, "the service hit an unexpected error; it is logged", "internal")
