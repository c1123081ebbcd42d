"""/healthz: is the service able to work? Database, queue and storage, each with its state."""

from __future__ import annotations

import shutil
import uuid
from typing import Any

from fastapi import APIRouter
from fastapi.responses import JSONResponse
from sqlalchemy import text

from server.api.deps import SettingsDep
from server.api.document_schema import Health
from server.settings import Settings
from server.store import get_engine, schema

router = APIRouter(tags=["health"])


def _database(settings: Settings) -> dict[str, Any]:
    try:
        with get_engine(settings).connect() as conn:
            conn.execute(text("SELECT 1"))
            try:
                current = conn.execute(text("SELECT version_num FROM alembic_version")).scalars()
                revisions = sorted(current)
            except Exception:
                revisions = []
    except Exception as exc:
        return {"state": "down", "detail": f"{type(exc).__name__}: {exc}"[:300]}
    heads = sorted(schema.heads())
    if revisions != heads:
        return {
            "state": "outdated",
            "detail": f"schema at {revisions or 'nothing'}, code expects {heads}: "
            "run `tidewaiter db upgrade`",
        }
    return {"state": "ok", "dialect": get_engine(settings).dialect.name, "schema": heads}


def _queue(settings: Settings) -> dict[str, Any]:
    if settings.job_runner == "inprocess":
        return {"state": "ok", "runner": "inprocess", "threads": settings.inprocess_workers}
    import redis

    from worker.jobs.celery_app import QUEUE

    try:
        client = redis.Redis.from_url(
            settings.redis_url, socket_timeout=2, socket_connect_timeout=2
        )
        client.ping()
        waiting = client.llen(QUEUE)
    except Exception as exc:
        return {"state": "down", "runner": "celery", "detail": f"{type(exc).__name__}: {exc}"}
    return {"state": "ok", "runner": "celery", "waiting": waiting}


def _storage(settings: Settings) -> dict[str, Any]:
    probe = settings.data_dir / "tmp" / f".probe-{uuid.uuid4().hex}"
    try:
        probe.parent.mkdir(parents=True, exist_ok=True)
        probe.write_bytes(b"ok")
        probe.unlink()
        usage = shutil.disk_usage(settings.data_dir)
    except OSError as exc:
        return {"state": "down", "detail": f"cannot write to the data folder: {exc.strerror}"}
    return {"state": "ok", "free_bytes": usage.free}


@router.get("/healthz", responses={200: {"model": Health}, 503: {"model": Health}})
def health(settings: SettingsDep) -> JSONResponse:
    """200 when database, queue and storage all work, 503 (with the reason) otherwise."""
    checks = {
        "database": _database(settings),
        "queue": _queue(settings),
        "storage": _storage(settings),
    }
    healthy = all(c["state"] == "ok" for c in checks.values())
    return JSONResponse(
        {"status": "ok" if healthy else "degraded", "checks": checks},
        status_code=200 if healthy else 503,
    )
