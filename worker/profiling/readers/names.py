"""Column names every later step can rely on: present, trimmed and unique."""

from __future__ import annotations

from collections.abc import Sequence


def numbered_names(count: int) -> list[str]:
    """Names for a table without a header: column_1, column_2, ..."""
    return [f"column_{index}" for index in range(1, count + 1)]


def unique_names(raw: Sequence[object]) -> tuple[list[str], list[str]]:
    """The header made usable, and one sentence per fix made to it.

    Blank names become ``column_<position>``; a repeated name gets ``_2``,
    ``_3``... appended, skipping names already taken.
    """
    fixes: list[str] = []
    names: list[str] = []
    taken: set[str] = set()
    stripped = ["" if value is None else str(value).strip() for value in raw]
    reserved = set(stripped)
    for position, name in enumerate(stripped, start=1):
        if not name:
            name = f"column_{position}"
            while name in taken or name in reserved:
                name += "_"
            fixes.append(f"column {position} has no name; it is called {name}")
        elif name in taken:
            suffix = 2
            while f"{name}_{suffix}" in taken or f"{name}_{suffix}" in reserved:
                suffix += 1
            fixes.append(
                f"column {position} repeats the name {name!r}; it is called {name}_{suffix}"
            )
            name = f"{name}_{suffix}"
        taken.add(name)
        names.append(name)
    return names, fixes
