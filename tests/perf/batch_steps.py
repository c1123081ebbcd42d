"""Where one batch's CPU goes, column by column and step by step, in the steady state.

Run on demand; pytest does not collect it. A micro-benchmark of one step on
one batch it has just read measures that step with its data in cache, which
flatters numpy's many passes (and hides the misses that fusing them would
save); the whole profile's timing drifts too much to tell a step's share. This
script reads the file's first ``--warm + --batches`` batches, profiles the
first ``--warm`` on one thread so every state reaches the size it has deep in
a large file (sketches full, samples past their bound), then times each
column's preparation and each state's update over the next ``--batches`` and
prints milliseconds per batch, largest first.

Usage: python tests/perf/batch_steps.py FILE [--warm N] [--batches M]
"""

from __future__ import annotations

import argparse
import collections
import itertools
import time
from collections.abc import Callable
from pathlib import Path
from typing import Any

from worker.profiling import engine
from worker.profiling.columns.column import ColumnState
from worker.profiling.columns.datetime import DatetimeState
from worker.profiling.columns.distinct import DistinctState
from worker.profiling.columns.labels import LabelState
from worker.profiling.columns.numeric import NumericState
from worker.profiling.columns.text import TextState
from worker.profiling.options import ProfileOptions
from worker.profiling.readers import open_table
from worker.profiling.relations.duplicates import DuplicateState
from worker.profiling.relations.state import RelationsState

TIMED = [
    (ColumnState, "update"),
    (NumericState, "update"),
    (DistinctState, "update"),
    (DatetimeState, "update"),
    (LabelState, "update_counts"),
    (TextState, "update"),
    (DuplicateState, "update"),
    (RelationsState, "update"),
]


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.split("\n")[0])
    parser.add_argument("file", type=Path)
    parser.add_argument("--warm", type=int, default=150)
    parser.add_argument("--batches", type=int, default=40)
    args = parser.parse_args()
    options = ProfileOptions(threads=1)
    with open_table(args.file, options=options) as source:
        batches = list(itertools.islice(source.batches(), args.warm + args.batches))
        profiler = engine.TableProfiler(source.column_names, options, source.info)
    for batch in batches[: args.warm]:
        profiler.update(batch)
    owners = _owners(profiler)
    spent: collections.Counter[tuple[str, str]] = collections.Counter()
    for cls, method in TIMED:
        setattr(cls, method, _timed(getattr(cls, method), cls.__name__, method, owners, spent))
    prepare = engine.prepare_column

    def timed_prepare(name: str, column: Any, plan: Any) -> Any:
        start = time.perf_counter()
        try:
            return prepare(name, column, plan)
        finally:
            spent[("prepare_column", name)] += time.perf_counter() - start

    engine.prepare_column = timed_prepare
    measured = batches[args.warm :]
    start = time.perf_counter()
    for batch in measured:
        profiler.update(batch)
    whole = (time.perf_counter() - start) / max(len(measured), 1)
    print(f"{len(measured)} batches of about {measured[0].num_rows:,} rows after {args.warm}")
    print(f"{whole * 1e3:8.2f} ms per batch in all (reading not included)")
    for (step, column), seconds in spent.most_common():
        per_batch = seconds / len(measured) * 1e3
        if per_batch >= 0.05:
            print(f"{per_batch:8.2f} ms  {step:28s} {column}")


def _owners(profiler: engine.TableProfiler) -> dict[int, str]:
    """Which column (or which across-column state) each state object belongs to."""
    owners = {id(profiler.duplicates): "(rows)"}
    if profiler.relations is not None:
        owners[id(profiler.relations)] = "(pairs)"
    for name, state in profiler.columns.items():
        owners[id(state)] = name
        for part in ("numeric", "distinct", "dates", "labels", "text"):
            held = getattr(state, part, None)
            if held is not None:
                owners[id(held)] = name
    return owners


def _timed(
    function: Callable[..., Any],
    cls: str,
    method: str,
    owners: dict[int, str],
    spent: collections.Counter[tuple[str, str]],
) -> Callable[..., Any]:
    def timed(self: Any, *args: Any, **kwargs: Any) -> Any:
        start = time.perf_counter()
        try:
            return function(self, *args, **kwargs)
        finally:
            spent[(f"{cls}.{method}", owners.get(id(self), "?"))] += time.perf_counter() - start

    return timed


if __name__ == "__main__":
    main()
