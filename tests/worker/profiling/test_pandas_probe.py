"""pyarrow's probe for pandas: skipped in a profiling process, pandas still at hand.

A profiling process loads neither pandas nor polars (each costs a tenth of a second
or more at start-up, holding the interpreter lock) unless something asks for them.
"""

import json
import subprocess
import sys
import textwrap
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[3]


def _run(script: str, tmp_path: Path) -> dict:
    """Run ``script`` in a fresh interpreter (this one has imported pandas long ago)."""
    done = subprocess.run(
        [sys.executable, "-c", textwrap.dedent(script)],
        cwd=ROOT,
        capture_output=True,
        text=True,
        timeout=120,
        check=True,
        env={"PATH": "/usr/bin:/bin", "TIDEWAITER_DATA_DIR": str(tmp_path)},
    )
    return json.loads(done.stdout.strip().splitlines()[-1])


def test_profiling_a_file_imports_neither_pandas_nor_polars(tmp_path):
    # Invented intake: a number column with a missing token and a word, labels, a date
    # and a blank cell (the word sends the first numbers down the lenient parse).
    csv = tmp_path / "lots.csv"
    weights = {7: "n/a", 9: "about 3"}
    csv.write_text(
        "lot,weight,grade,landed\n"
        + "".join(
            f"L{i},{weights.get(i, i * 1.5)},{'AB'[i % 2]},2025-03-{i % 28 + 1:02d}\n"
            for i in range(200)
        )
        + "L200,,A,\n"
    )
    seen = _run(
        f"""
        import json, sys
        from worker.profiling import profile_file
        profile = profile_file({str(csv)!r})
        during = "pandas" in sys.modules
        polars = "polars" in sys.modules
        import pyarrow as pa
        frame = pa.table({{"a": [1, 2]}}).to_pandas()  # pyarrow imports pandas when needed
        print(json.dumps({{
            "during": during,
            "polars": polars,
            "rows": profile["dataset"]["rows"],
            "kinds": [c["kind"] for c in profile["columns"]],
            "frame": type(frame).__name__,
            "after": "pandas" in sys.modules,
        }}))
        """,
        tmp_path,
    )
    assert seen["during"] is False
    assert seen["polars"] is False
    assert seen["rows"] == 201
    assert seen["kinds"] == ["identifier", "numeric", "categorical", "datetime"]
    assert seen["frame"] == "DataFrame"
    assert seen["after"] is True


@pytest.mark.parametrize("pandas_first", [True, False])
def test_pyarrow_converts_pandas_objects_whichever_is_imported_first(tmp_path, pandas_first):
    imports = (
        "import pandas as pd\nimport worker.profiling"
        if pandas_first
        else "import worker.profiling\nimport pandas as pd"
    )
    seen = _run(
        imports
        + """
import inspect, json, sys
import pyarrow as pa
series = pd.Series(pd.Categorical(["x", "y", "x"]))
print(json.dumps({
    "type": str(pa.array(series).type),
    "source": "def read_csv" in inspect.getsource(pd.io.parsers.readers),
    "finders": [type(f).__name__ for f in sys.meta_path],
}))
""",
        tmp_path,
    )
    # pyarrow turns a pandas categorical into a dictionary array only when it knows pandas.
    assert seen["type"].startswith("dictionary<")
    assert seen["source"] is True
    assert not any(name.startswith("_Pandas") for name in seen["finders"])
