"""The README's settings table is the one generated from the settings classes."""

from __future__ import annotations

from pathlib import Path

from pydantic import BaseModel

from server.settings import Settings
from server.settings_doc import BEGIN, END, setting_rows, settings_table

README = Path(__file__).resolve().parents[2] / "README.md"


def _readme_table() -> str:
    text = README.read_text()
    assert BEGIN in text and END in text, "the README has no generated settings table"
    return text[text.index(BEGIN) : text.index(END) + len(END)]


def test_readme_table_matches_the_settings() -> None:
    assert _readme_table() == settings_table(), (
        "the README's settings table is out of date: replace it with `tidewaiter settings`"
    )


def _leaf_variables(model: type[BaseModel], prefix: str = "TIDEWAITER_") -> set[str]:
    """Independently of the generator: every leaf field as its environment variable."""
    found: set[str] = set()
    for name, field in model.model_fields.items():
        annotation = field.annotation
        if isinstance(annotation, type) and issubclass(annotation, BaseModel):
            found |= _leaf_variables(annotation, f"{prefix}{name.upper()}__")
        else:
            found.add(f"{prefix}{name.upper()}")
    return found


def test_every_field_nested_ones_included_has_a_row() -> None:
    expected = _leaf_variables(Settings)
    assert any("__" in v for v in expected)  # the nested engine options are there
    table = _readme_table()
    missing = sorted(v for v in expected if f"| `{v}` |" not in table)
    assert missing == []


def test_defaults_are_shown_as_they_are_read() -> None:
    rows = {variable: default for variable, default, _ in setting_rows()}
    assert rows["TIDEWAITER_DATABASE_URL"] == "(empty)"
    assert rows["TIDEWAITER_JOB_RUNNER"] == "inprocess"
    assert rows["TIDEWAITER_SWEEPER_ENABLED"] == "true"
