"""A file's SHA-256, computed in a thread (hashlib frees the interpreter lock).

Standard library only, so a command can start it before it imports the
profiling engine: the digest then runs on the core those imports leave idle.
"""

from __future__ import annotations

import hashlib
import threading
from pathlib import Path


class FileDigest:
    """The SHA-256 of the file at ``path``, started at once and read with ``result``."""

    def __init__(self, path: Path) -> None:
        self._value: str | None = None
        self._error: OSError | None = None
        self._thread = threading.Thread(target=self._run, args=(path,), daemon=True)
        self._thread.start()

    def _run(self, path: Path) -> None:
        digest = hashlib.sha256()
        try:
            with path.open("rb") as handle:
                while chunk := handle.read(1 << 22):
                    digest.update(chunk)
        except OSError as exc:  # the reader reports an unreadable file in its own words
            self._error = exc
            return
        self._value = digest.hexdigest()

    def result(self) -> str | None:
        """The hex digest, or None when the file could not be read."""
        self._thread.join()
        return self._value
