"""The team deployment end to end: PostgreSQL, Redis and a real `tidewaiter worker` process.

One worker process is started for the whole module; the app runs in the test
process with ``job_runner=celery``, so uploads travel through Redis to it.
"""

from __future__ import annotations

import os
import signal
import subprocess
import sys
import time
from collections.abc import Iterator
from pathlib import Path

import pytest
from fastapi.testclient import TestClient
from sqlalchemy import func, select

from server.app import create_app
from server.settings import Settings
from server.store import ColumnSummary, Profile, dispose_engines, schema, session_scope
from tests.conftest import make_settings
from tests.support import (
    admin_token,
    empty_redis_database,
    fresh_postgres_database,
    make_supplier,
    upload,
    wait_for_intake,
)
from worker.jobs.celery_app import celery_for
from worker.jobs.summaries import json_safe
from worker.profiling import profile_file

pytestmark = pytest.mark.services

# Invented delivery: landings with a planted missing price.
DELIVERY = (
    b"landing_date,vessel,species,weight_kg,price_per_kg\n"
    b"2031-03-02,BB-004,cod,112.0,6.10\n"
    b"2031-03-02,BB-011,haddock,87.5,\n"
    b"2031-03-03,BB-004,mackerel,240.0,2.95\n"
    b"2031-03-04,BB-017,cod,64.2,6.40\n"
)
TIDEWAITER = Path(sys.executable).with_name("tidewaiter")


@pytest.fixture(scope="module")
def team_settings(tmp_path_factory: pytest.TempPathFactory) -> Iterator[Settings]:
    with fresh_postgres_database() as database_url:
        redis_url = empty_redis_database()
        settings = make_settings(
            tmp_path_factory.mktemp("team"),
            database_url=database_url,
            redis_url=redis_url,
            job_runner="celery",
            upload_limit_bytes=256 * 1024 * 1024,
        )
        schema.upgrade(database_url)
        yield settings
        dispose_engines()


@pytest.fixture(scope="module")
def worker_process(team_settings: Settings) -> Iterator[subprocess.Popen[bytes]]:
    env = {
        **os.environ,
        "TIDEWAITER_DATABASE_URL": team_settings.database_url or "",
        "TIDEWAITER_REDIS_URL": team_settings.redis_url,
        "TIDEWAITER_JOB_RUNNER": "celery",
        "TIDEWAITER_DATA_DIR": str(team_settings.data_dir),
    }
    log = team_settings.data_dir / "worker.log"
    with log.open("wb") as out:
        process = subprocess.Popen(
            [str(TIDEWAITER), "worker", "--concurrency", "1", "--log-level", "info"],
            env=env,
            stdout=out,
            stderr=subprocess.STDOUT,
        )
    try:
        app = celery_for(team_settings)
        deadline = time.monotonic() + 60
        while not app.control.ping(timeout=0.5):
            if process.poll() is not None or time.monotonic() > deadline:
                pytest.fail(f"the worker did not start:\n{log.read_text()[-3000:]}")
        yield process
    finally:
        process.send_signal(signal.SIGTERM)
        try:
            process.wait(timeout=30)
        except subprocess.TimeoutExpired:
            process.kill()
            process.wait()


@pytest.fixture(scope="module")
def team_token(team_settings: Settings) -> str | None:
    return admin_token(team_settings)


@pytest.fixture
def team_client(
    team_settings: Settings, worker_process: object, team_token: str | None
) -> Iterator[TestClient]:
    with TestClient(create_app(team_settings)) as client:
        if team_token:
            client.headers["Authorization"] = f"Bearer {team_token}"
        yield client


def test_upload_is_profiled_by_the_celery_worker(team_client: TestClient) -> None:
    supplier = make_supplier(team_client, "Brannock Bay fishing cooperative")
    created = upload(team_client, DELIVERY, supplier=supplier["id"], name="landings.csv").json()
    intake = wait_for_intake(team_client, created["id"], timeout=90)
    assert intake["status"] == "ready", intake["error"]
    assert intake["headline"]["rows"] == 4

    team_profile = team_client.get(f"/api/v1/intakes/{created['id']}/profile").json()
    # The same bytes profiled in this process by the engine: the embedded result.
    local = Path(team_client.app.state.settings.data_dir) / "local.csv"
    local.write_bytes(DELIVERY)
    embedded = json_safe(profile_file(local, source_name="landings.csv"))
    assert team_profile == embedded
    # And it was the worker process that ran it.
    worker_log = (team_client.app.state.settings.data_dir / "worker.log").read_text()
    assert "tidewaiter.profile_intake" in worker_log


def test_a_duplicated_message_does_not_duplicate_the_profile(
    team_client: TestClient, team_settings: Settings
) -> None:
    from worker.jobs import enqueue_profile

    supplier = make_supplier(team_client, "Gullwick tide-gauge station")
    extra_row = b"2031-03-05,BB-002,cod,50.0,6.0\n"
    created = upload(team_client, DELIVERY + extra_row, supplier=supplier["id"]).json()
    enqueue_profile(created["id"], team_settings)  # the same job sent a second time
    intake = wait_for_intake(team_client, created["id"], timeout=90)
    assert intake["status"] == "ready"
    time.sleep(1.0)  # let the second message run too
    with session_scope(team_settings) as session:
        profiles = session.scalar(
            select(func.count()).select_from(Profile).where(Profile.intake_id == created["id"])
        )
        columns = session.scalar(
            select(func.count())
            .select_from(ColumnSummary)
            .where(ColumnSummary.intake_id == created["id"])
        )
    assert (profiles, columns) == (1, 5)


def test_unreadable_file_fails_in_the_worker_which_keeps_running(
    team_client: TestClient, worker_process: subprocess.Popen[bytes]
) -> None:
    supplier = make_supplier(team_client, "Saltmere pilot station")
    garbage = bytes(range(256)) * 8
    created = upload(team_client, garbage, supplier=supplier["id"], name="broken.csv").json()
    intake = wait_for_intake(team_client, created["id"], timeout=90)
    assert intake["status"] == "failed"
    assert intake["error"]
    assert worker_process.poll() is None  # still alive
    healthy = team_client.get("/healthz").json()
    assert healthy["checks"]["queue"] == {"state": "ok", "runner": "celery", "waiting": 0}


def _children(pid: int) -> list[int]:
    """Process ids whose parent is ``pid`` (the worker's pool processes)."""
    found = []
    for entry in Path("/proc").iterdir():
        if entry.name.isdigit():
            try:
                stat = (entry / "stat").read_text()
            except OSError:
                continue
            if int(stat.rsplit(")", 1)[1].split()[1]) == pid:
                found.append(int(entry.name))
    return found


def test_a_job_whose_worker_process_dies_is_delivered_again(
    team_client: TestClient, worker_process: subprocess.Popen[bytes]
) -> None:
    # Invented readings, large enough that profiling lasts a moment.
    block = b"".join(
        f"{i % 97},{(i * 7919) % 1000 / 10:.1f},{(i * 104729) % 5000 / 100:.2f}\n".encode()
        for i in range(20_000)
    )
    content = b"station,level_cm,temp_c\n" + block * 60
    supplier = make_supplier(team_client, "Saltmere harbour-master's gauge")
    created = upload(team_client, content, supplier=supplier["id"], name="gauge-dump.csv").json()
    deadline = time.monotonic() + 60
    while (status := team_client.get(f"/api/v1/intakes/{created['id']}").json()["status"]) != (
        "profiling"
    ):
        assert status == "queued", f"the job ended ({status}) before it could be interrupted"
        assert time.monotonic() < deadline, "the job never started"
        time.sleep(0.02)
    pool = _children(worker_process.pid)
    assert pool, "the worker has no pool process"
    for pid in pool:  # what the kernel does to a process out of memory
        os.kill(pid, signal.SIGKILL)

    intake = wait_for_intake(team_client, created["id"], timeout=120)
    assert intake["status"] == "ready", intake["error"]
    assert intake["attempts"] == 2  # the first attempt died; the message came back
    assert intake["headline"]["rows"] == 1_200_000
    assert worker_process.poll() is None
