"""The service subcommands, run as the real `tidewaiter` program."""

from __future__ import annotations

import os
import shutil
import socket
import subprocess
import sys
import time
import urllib.request
from pathlib import Path

from sqlalchemy import create_engine, inspect

TIDEWAITER = Path(sys.executable).with_name("tidewaiter")


def _run(*args: str, data_dir: Path) -> subprocess.CompletedProcess[str]:
    env = {k: v for k, v in os.environ.items() if not k.startswith("TIDEWAITER_")}
    env["TIDEWAITER_DATA_DIR"] = str(data_dir)
    return subprocess.run(
        [str(TIDEWAITER), *args], env=env, capture_output=True, text=True, timeout=120
    )


def _tables(data_dir: Path) -> set[str]:
    engine = create_engine(f"sqlite:///{data_dir / 'tidewaiter.sqlite3'}")
    try:
        return set(inspect(engine).get_table_names())
    finally:
        engine.dispose()


def test_db_upgrade_sweep_and_downgrade(tmp_path: Path) -> None:
    up = _run("db", "upgrade", data_dir=tmp_path)
    assert up.returncode == 0, up.stderr
    assert "database schema at head" in up.stdout
    assert {"supplier", "intake", "profile", "column_summary"} <= _tables(tmp_path)
    swept = _run("sweep", data_dir=tmp_path)
    assert swept.returncode == 0, swept.stderr
    assert "requeued none" in swept.stdout
    down = _run("db", "downgrade", "base", data_dir=tmp_path)
    assert down.returncode == 0, down.stderr
    assert _tables(tmp_path) <= {"alembic_version"}


def test_settings_prints_the_table(capsys) -> None:
    from server.cli import main

    assert main(["settings"]) == 0
    assert "| `TIDEWAITER_DATABASE_URL` | `(empty)` |" in capsys.readouterr().out


def _free_port() -> int:
    with socket.socket() as s:
        s.bind(("127.0.0.1", 0))
        return s.getsockname()[1]


def test_serve_answers_health_checks(tmp_path: Path, migrated_sqlite: Path) -> None:
    shutil.copyfile(migrated_sqlite, tmp_path / "tidewaiter.sqlite3")
    port = _free_port()
    env = {k: v for k, v in os.environ.items() if not k.startswith("TIDEWAITER_")}
    env["TIDEWAITER_DATA_DIR"] = str(tmp_path)
    server = subprocess.Popen(
        [str(TIDEWAITER), "serve", "--port", str(port), "--log-level", "warning"],
        env=env,
        stdout=subprocess.PIPE,
        stderr=subprocess.STDOUT,
        text=True,
    )
    try:
        deadline = time.monotonic() + 30
        while True:
            try:
                with urllib.request.urlopen(f"http://127.0.0.1:{port}/healthz", timeout=2) as r:
                    body = r.read().decode()
                    break
            except OSError:
                if server.poll() is not None or time.monotonic() > deadline:
                    raise
                time.sleep(0.2)
        assert '"status":"ok"' in body
    finally:
        server.terminate()
        try:
            output, _ = server.communicate(timeout=30)
        except subprocess.TimeoutExpired:  # it would not stop: kill it, then fail
            server.kill()
            output, _ = server.communicate(timeout=30)
            raise AssertionError(f"tidewaiter serve did not stop on SIGTERM:\n{output}") from None
    assert f"http://127.0.0.1:{port}/" in output
