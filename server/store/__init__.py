"""Persistence: SQLAlchemy models, sessions and the content-addressed file store.

Every table module of this package extends ``Base``; ``load_models`` imports
them all so that ``Base.metadata`` (used by the migrations) holds every table.
"""

from __future__ import annotations

import importlib
import pkgutil

from server.store.database import dispose_engines, get_engine, session_factory, session_scope
from server.store.files import EmptyFile, FileStore, FileTooLarge, StoredFile, file_store
from server.store.models import (
    Base,
    ColumnSummary,
    Intake,
    IntakeStatus,
    Profile,
    Supplier,
)

_NOT_MODELS = {"database", "files", "schema"}


def load_models() -> None:
    """Import every table module of ``server.store`` so their tables join ``Base.metadata``."""
    for module in pkgutil.iter_modules(__path__):
        if module.name not in _NOT_MODELS and not module.name.startswith("_"):
            importlib.import_module(f"{__name__}.{module.name}")


__all__ = [
    "Base",
    "ColumnSummary",
    "EmptyFile",
    "FileStore",
    "FileTooLarge",
    "Intake",
    "IntakeStatus",
    "Profile",
    "StoredFile",
    "Supplier",
    "dispose_engines",
    "file_store",
    "get_engine",
    "load_models",
    "session_factory",
    "session_scope",
]
