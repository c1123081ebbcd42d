"""docker-compose.yml: no Docker engine runs here, so its wiring is checked as data."""

from __future__ import annotations

from pathlib import Path
from typing import Any

import pytest
import yaml
from pydantic import BaseModel

from server.settings import Settings

ROOT = Path(__file__).resolve().parents[2]
COMPOSE = yaml.safe_load((ROOT / "docker-compose.yml").read_text())
SERVICES: dict[str, dict[str, Any]] = COMPOSE["services"]


def _environment(service: dict[str, Any]) -> dict[str, str]:
    env = service.get("environment") or {}
    if isinstance(env, list):
        env = dict(item.split("=", 1) for item in env)
    return {k: str(v) for k, v in env.items()}


def _is_setting(variable: str) -> bool:
    """Whether ``TIDEWAITER_A__B`` names a field of Settings (nested models included)."""
    model: type[BaseModel] = Settings
    parts = variable.removeprefix("TIDEWAITER_").lower().split("__")
    for i, part in enumerate(parts):
        field = model.model_fields.get(part)
        if field is None:
            return False
        annotation = field.annotation
        if i < len(parts) - 1:
            if not (isinstance(annotation, type) and issubclass(annotation, BaseModel)):
                return False
            model = annotation
    return True


def test_the_four_services_exist() -> None:
    assert {"postgres", "redis", "server", "worker"} <= set(SERVICES)


@pytest.mark.parametrize("name", sorted(SERVICES))
def test_every_tidewaiter_variable_is_a_real_setting(
    name: str, monkeypatch: pytest.MonkeyPatch
) -> None:
    env = {k: v for k, v in _environment(SERVICES[name]).items() if k.startswith("TIDEWAITER_")}
    unknown = [k for k in env if not _is_setting(k)]
    assert unknown == [], f"{name} passes variables that are no setting: {unknown}"
    for key, value in env.items():
        monkeypatch.setenv(key, value)
    Settings()  # and the values are valid for their settings


def test_the_checker_itself_rejects_a_misspelt_variable() -> None:
    assert _is_setting("TIDEWAITER_JOB_RUNNER")
    assert _is_setting("TIDEWAITER_PROFILING__EXACT_BOUND")
    assert not _is_setting("TIDEWAITER_JOB_RUNER")
    assert not _is_setting("TIDEWAITER_PORT__X")


@pytest.mark.parametrize("name", sorted(SERVICES))
def test_every_named_service_and_volume_exists(name: str) -> None:
    service = SERVICES[name]
    depends = service.get("depends_on") or {}
    assert set(depends) <= set(SERVICES), f"{name} depends on a missing service"
    for mount in service.get("volumes") or []:
        source = mount.split(":", 1)[0]
        if not source.startswith((".", "/")):
            assert source in (COMPOSE.get("volumes") or {}), f"{name}: no volume {source}"
    assert "image" in service or "build" in service


def test_server_migrates_before_serving_and_workers_share_the_files() -> None:
    command = " ".join(SERVICES["server"]["command"])
    assert command.index("tidewaiter db upgrade") < command.index("uvicorn")
    assert "server.app:create_app" in command
    assert "tidewaiter" in SERVICES["worker"]["command"]
    assert "worker" in SERVICES["worker"]["command"]
    assert "ports" not in SERVICES["worker"]  # so --scale worker=N cannot clash on a port
    data_dir = _environment(SERVICES["worker"])["TIDEWAITER_DATA_DIR"]
    for name in ("server", "worker"):
        assert f"files:{data_dir}" in SERVICES[name]["volumes"]
        assert _environment(SERVICES[name])["TIDEWAITER_JOB_RUNNER"] == "celery"
