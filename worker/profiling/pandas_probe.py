"""Keep pyarrow from importing pandas where the engine has no use for it.

The first time pyarrow converts anything (``pa.array``, ``pa.scalar``,
``to_numpy``) it imports pandas, only to learn whether pandas is installed:
0.4-0.6 s of CPU, holding the interpreter lock, in every profiling process
(a quarter of the time a 1,000-row file takes), though the engine never hands
pandas objects to pyarrow. pyarrow asks that question once and remembers the
answer, so ``skip_pandas_probe`` lets the question find no pandas, and, once
something imports pandas after all, tells pyarrow that it is there now, so
pyarrow converts pandas objects as it always does. A process that has
imported pandas already is left as it is.
"""

from __future__ import annotations

import importlib.abc
import sys
from collections.abc import Sequence
from importlib.machinery import ModuleSpec, PathFinder
from types import ModuleType


def skip_pandas_probe() -> None:
    """Let pyarrow's one probe for pandas find none, unless pandas is imported already."""
    if "pandas" in sys.modules:
        return
    import pyarrow as pa

    hidden = _PandasHidden()
    sys.meta_path.insert(0, hidden)
    try:
        pa.scalar(0)  # any conversion makes pyarrow probe, once per process
    finally:
        sys.meta_path.remove(hidden)
    sys.meta_path.insert(0, _PandasWatch())


class _PandasHidden(importlib.abc.MetaPathFinder):
    """An import finder that answers "no such module" for pandas and nothing else."""

    def find_spec(
        self, fullname: str, path: Sequence[str] | None, target: ModuleType | None = None
    ) -> ModuleSpec | None:
        if fullname == "pandas":
            raise ModuleNotFoundError("hidden from pyarrow's first probe", name=fullname)
        return None


class _PandasWatch(importlib.abc.MetaPathFinder):
    """Finds pandas as usual and, once it is imported, has pyarrow look for it again."""

    def find_spec(
        self, fullname: str, path: Sequence[str] | None, target: ModuleType | None = None
    ) -> ModuleSpec | None:
        if fullname != "pandas" or "pandas" in sys.modules:
            return None
        spec = PathFinder.find_spec(fullname, path)
        if spec is not None and isinstance(spec.loader, importlib.abc.Loader):
            spec.loader = _ThenTellPyarrow(spec.loader, self)
        return spec


class _ThenTellPyarrow(importlib.abc.Loader):
    """pandas' own loader, followed by pyarrow's second look for pandas."""

    def __init__(self, loader: importlib.abc.Loader, watch: _PandasWatch) -> None:
        self._loader = loader
        self._watch = watch

    def __getattr__(self, name: str) -> object:
        return getattr(self._loader, name)  # get_source, get_resource_reader and the rest

    def create_module(self, spec: ModuleSpec) -> ModuleType | None:
        return self._loader.create_module(spec)

    def exec_module(self, module: ModuleType) -> None:
        self._loader.exec_module(module)
        if self._watch in sys.meta_path:
            sys.meta_path.remove(self._watch)  # one import to watch
        import pyarrow as pa

        # Reading the shim's ``pd`` makes pyarrow import pandas (found in sys.modules
        # now) and keep it, as it would have at its first probe. The shim is private:
        # should a later pyarrow lack it, pandas imports all the same.
        getattr(getattr(pa.lib, "_pandas_api", None), "pd", None)
