"""The engine end to end: planted faults, published missing counts, typed input, merging."""

import json

import numpy as np
import pandas as pd
import pyarrow as pa
import pyarrow.parquet as pq
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from palmerpenguins import load_penguins

from worker.filedigest import FileDigest
from worker.profiling import ProfileError, ProfileOptions, profile_file
from worker.profiling.engine import TableProfiler
from worker.profiling.readers.source import SourceInfo


def _by_name(profile):
    return {column["name"]: column for column in profile["columns"]}


@pytest.fixture
def planted(tmp_path):
    # Invented intake with faults planted by construction.
    rows = []
    for i in range(40):
        rows.append(
            {
                "parcel": f"PX-{1000 + i}",
                "weight": f"{10 + i % 7},5" if i != 3 else "-999",
                "state": ["Active", "active ", "ACTIVE", "Closed"][i % 4],
                "loaded": f"{(i % 28) + 1:02d}/03/2025",
                "checked": f"{(i % 12) + 1:02d}/{(i % 9) + 1:02d}/2025",
                "crew": str(i % 5) if i % 10 else "unknown",
                "remark": ["NA", "", "  ", "n/a", "ok"][i % 5],
                "sealed": ["yes", "no"][i % 2],
                "blank": "",
                "departed": "2025-04-01" if i != 7 else "soon",
            }
        )
    path = tmp_path / "planted.csv"
    pd.DataFrame(rows).to_csv(path, sep=";", index=False)
    return path


def test_planted_faults_are_found(planted):
    profile = profile_file(planted)
    json.dumps(profile, allow_nan=False)  # plain JSON: no numpy types, no NaN
    columns = _by_name(profile)
    assert profile["source"]["decimal"] == ","  # sniffed by the reader
    weight = columns["weight"]
    assert weight["kind"] == "numeric"
    assert weight["kind_evidence"]["numbers_stored_as_text"] is True
    assert weight["numeric"]["max"] == 16.5  # "16,5" with a decimal comma
    assert weight["suspected_sentinels"] == [{"value": -999.0, "count": 1}]
    assert sorted(map(sorted, columns["state"]["labels"]["variants"])) == [
        ["ACTIVE", "Active", "active "]
    ]
    loaded = columns["loaded"]
    assert loaded["kind"] == "datetime"
    assert loaded["datetime"]["format"] == "%d/%m/%Y"  # days up to 28: day-first
    assert loaded["datetime"]["ambiguous"] is False
    checked = columns["checked"]
    assert checked["kind"] == "datetime"
    assert checked["datetime"]["ambiguous"] is True  # no part above 12
    assert "ambiguous_dates" in checked["kind_evidence"]
    crew = columns["crew"]
    assert crew["kind"] == "numeric"
    mixed = crew["kind_evidence"]["mixed_kinds"]
    assert mixed["examples"] == ["unknown"]
    assert mixed["other_share"] == pytest.approx(4 / 40)
    remark = columns["remark"]
    assert remark["missing"] == 32
    assert remark["missing_detail"]["tokens"] == {"NA": 8, "n/a": 8}
    assert remark["missing_detail"]["blank"] + remark["missing_detail"]["null"] == 16
    departed = columns["departed"]
    assert departed["kind"] == "datetime"
    assert departed["kind_evidence"]["mixed_kinds"]["examples"] == ["soon"]
    assert columns["sealed"]["kind"] == "boolean"
    assert columns["blank"]["kind"] == "empty"
    assert columns["parcel"]["kind"] == "identifier"
    assert {"column": "parcel", "exact": True} in profile["dataset"]["candidate_keys"]
    assert profile["dataset"]["rows"] == 40


def test_palmerpenguins_missing_counts(tmp_path):
    penguins = load_penguins()
    path = tmp_path / "penguins.csv"
    penguins.to_csv(path, index=False)
    columns = _by_name(profile_file(path))
    # palmerpenguins' shipped data: the published counts, and pandas isna().sum().
    published = {
        "bill_length_mm": 2,
        "bill_depth_mm": 2,
        "flipper_length_mm": 2,
        "body_mass_g": 2,
        "sex": 11,
        "species": 0,
        "island": 0,
        "year": 0,
    }
    for name, count in published.items():
        assert columns[name]["missing"] == count
        assert columns[name]["missing"] == int(penguins[name].isna().sum())
    assert columns["species"]["kind"] == "categorical"
    assert columns["species"]["labels"]["top"][0] == {
        "value": "Adelie",
        "count": 152,
        "share": 152 / 344,
    }
    # pandas mean and std on the same column.
    assert columns["body_mass_g"]["numeric"]["mean"] == pytest.approx(
        penguins["body_mass_g"].mean(), rel=1e-12
    )
    assert columns["body_mass_g"]["numeric"]["std"] == pytest.approx(
        penguins["body_mass_g"].std(), rel=1e-12
    )


def test_typed_parquet_columns_skip_text_parsing(tmp_path):
    table = pa.table(
        {
            "n": pa.array([1, 2, None, 4], pa.int64()),
            "x": pa.array([0.5, float("nan"), 2.5, None]),
            "ok": pa.array([True, False, True, None]),
            "at": pa.array([1_699_920_000, 1_700_006_400, None, 1_700_092_800], pa.timestamp("s")),
            "tag": pa.array(["a", "b", "a", None]),
        }
    )
    path = tmp_path / "typed.parquet"
    pq.write_table(table, path)
    columns = _by_name(profile_file(path))
    assert columns["n"]["kind"] == "numeric" and columns["n"]["numeric"]["sum"] == 7.0
    assert columns["x"]["missing"] == 2
    assert columns["ok"]["kind"] == "boolean"
    assert columns["at"]["kind"] == "datetime"
    assert columns["at"]["datetime"]["granularity"] == "day"
    assert columns["tag"]["kind"] == "categorical"


def test_a_column_empty_in_the_first_batch_gets_its_kind_later():
    profiler = TableProfiler(["a", "b"], ProfileOptions(threads=1), SourceInfo(format="csv"))
    profiler.update(
        pa.record_batch({"a": pa.array(["1", "2"]), "b": pa.array([None, None], pa.string())})
    )
    profiler.update(pa.record_batch({"a": pa.array(["3", "4"]), "b": pa.array(["7.5", "8.5"])}))
    columns = _by_name(profiler.finalize())
    assert columns["b"]["kind"] == "numeric"
    assert columns["b"]["missing"] == 2
    assert columns["b"]["numeric"]["mean"] == 8.0


def test_progress_is_reported_and_unreadable_files_refused(tmp_path, planted):
    seen = []
    profile_file(planted, progress=lambda stage, share: seen.append((stage, share)))
    assert seen[0] == ("reading", 0.0)
    shares = [share for stage, share in seen if stage == "reading"]
    assert shares == sorted(shares) and shares[-1] == pytest.approx(1.0)
    assert ("judging", 1.0) in seen
    binary = tmp_path / "noise.bin"
    binary.write_bytes(bytes(range(256)) * 40)
    with pytest.raises(ProfileError):
        profile_file(binary)


numbers = st.one_of(st.none(), st.floats(-1e6, 1e6, allow_nan=False, allow_infinity=False))
labels = st.sampled_from(["north", "south", "South", "east ", None])


# derandomize: above the bound the rank error holds with 99 % probability (DKW).
@settings(max_examples=25, deadline=None, derandomize=True)
@given(
    st.lists(st.tuples(numbers, labels), min_size=2, max_size=150),
    st.integers(2, 5),
    st.sampled_from([30, 1_000_000]),
)
def test_k_chunks_merged_equal_one_pass(rows, k, exact_bound):
    # A small exact bound puts the quantiles in uniform samples.
    options = ProfileOptions(threads=1, exact_bound=exact_bound, sample_size=50)
    info = SourceInfo(format="csv")

    def batch(part):
        return pa.record_batch(
            {
                "x": pa.array([None if v is None else repr(v) for v, _ in part], pa.string()),
                "s": pa.array([s for _, s in part], pa.string()),
            }
        )

    one = TableProfiler(["x", "s"], options, info, now=0.0)
    one.update(batch(rows))
    parts = [list(chunk) for chunk in np.array_split(np.array(rows, dtype=object), k) if len(chunk)]
    merged = None
    first_row = 0
    for part in parts:
        profiler = TableProfiler(["x", "s"], options, info, first_row=first_row, now=0.0)
        profiler.follow(one)  # every chunk uses the candidates chosen from the first rows
        profiler.update(batch(part))
        first_row += len(part)
        merged = profiler if merged is None else merged.merge(profiler)
    whole, chunked = one.finalize(), merged.finalize()
    a, b = _by_name(whole), _by_name(chunked)
    a["dataset"], b["dataset"] = whole["dataset"], chunked["dataset"]
    for name in ("x", "s"):
        assert a[name]["count"] == b[name]["count"]
        assert a[name]["missing"] == b[name]["missing"]
    assert a["x"]["kind"] == b["x"]["kind"] and a["s"]["kind"] == b["s"]["kind"]
    if a["x"]["kind"] == "numeric":
        for key in ("min", "max", "sum"):
            assert b["x"]["numeric"][key] == pytest.approx(a["x"]["numeric"][key], rel=1e-9)
        assert b["x"]["numeric"]["mean"] == pytest.approx(
            a["x"]["numeric"]["mean"], rel=1e-9, abs=1e-6
        )
        spread = a["x"]["numeric"]["variance"]
        if spread is not None and spread > 1e-3:
            assert b["x"]["numeric"]["variance"] == pytest.approx(spread, rel=1e-9)
            for key in ("skewness", "kurtosis"):
                if a["x"]["numeric"][key] is not None:
                    assert b["x"]["numeric"][key] == pytest.approx(
                        a["x"]["numeric"][key], rel=1e-6, abs=1e-6
                    )
        present = np.sort([v for v, _ in rows if v is not None])
        error = b["x"]["numeric"]["rank_error"] or 0.0
        for p, estimate in ((0.25, b["x"]["numeric"]["q1"]), (0.5, b["x"]["numeric"]["median"])):
            # The estimate's true rank among the values (numpy's sort) is within the
            # stated rank error, plus one value's step.
            low = np.searchsorted(present, estimate, side="left") / present.size
            high = np.searchsorted(present, estimate, side="right") / present.size
            assert low - error - 1 / present.size <= p <= high + error + 1 / present.size
    if a["s"]["labels"]:
        assert a["s"]["labels"]["top"] == b["s"]["labels"]["top"]
    assert a["dataset"]["duplicate_rows"] == b["dataset"]["duplicate_rows"]


def test_columnar_copy_holds_every_row(tmp_path, planted):
    import pyarrow.parquet as pq

    copy = tmp_path / "copy.parquet"
    profile = profile_file(planted, columnar_copy=copy)
    table = pq.read_table(copy)
    assert table.num_rows == profile["dataset"]["rows"] == 40
    assert table.column_names == [column["name"] for column in profile["columns"]]


def test_numbers_that_start_after_the_first_batch_are_parsed():
    # Invented readings: "pending" until the gauge starts, then numbers (truth by construction).
    profiler = TableProfiler(["gauge"], ProfileOptions(threads=1), SourceInfo(format="csv"))
    profiler.update(pa.record_batch({"gauge": pa.array(["pending"] * 50)}))
    readings = np.round(np.random.default_rng(8).normal(20, 3, 950), 2)
    for chunk in np.array_split(readings, 5):
        profiler.update(pa.record_batch({"gauge": pa.array([str(float(v)) for v in chunk])}))
    gauge = _by_name(profiler.finalize())["gauge"]
    assert gauge["kind"] == "numeric"
    assert gauge["kind_evidence"]["mixed_kinds"]["other_share"] == pytest.approx(50 / 1000)
    assert gauge["count"] == 1000
    # Reference: numpy on the readings themselves.
    assert gauge["numeric"]["mean"] == pytest.approx(readings.mean(), rel=1e-12)
    assert gauge["numeric"]["median"] == pytest.approx(np.median(readings), rel=1e-12)


def test_words_in_later_batches_do_not_make_a_text_column_numeric():
    profiler = TableProfiler(["note"], ProfileOptions(threads=1), SourceInfo(format="csv"))
    profiler.update(pa.record_batch({"note": pa.array(["calm sea", "swell"] * 20)}))
    profiler.update(pa.record_batch({"note": pa.array(["fog", "2 knots", "calm sea"] * 20)}))
    note = _by_name(profiler.finalize())["note"]
    assert note["kind"] == "categorical"
    assert note.get("numeric") is None


def test_the_digest_is_computed_unless_the_caller_knows_it(tmp_path) -> None:
    import hashlib

    path = tmp_path / "tally.csv"
    path.write_bytes(b"crate,tons\nC1,2.5\nC2,3.0\n")
    # Reference: hashlib's SHA-256 of the same bytes.
    computed = profile_file(path)["source"]["sha256"]
    assert computed == hashlib.sha256(path.read_bytes()).hexdigest()
    given_digest = "ab" * 32  # what the upload computed while streaming
    assert profile_file(path, sha256=given_digest)["source"]["sha256"] == given_digest
    started = FileDigest(path)  # what the command line starts before the engine loads
    assert profile_file(path, sha256=started)["source"]["sha256"] == computed
    assert FileDigest(tmp_path / "gone.csv").result() is None


def test_profiling_does_not_load_scipy_stats(tmp_path) -> None:
    # scipy.stats costs about 0.6 s of imports per process; the engine's density,
    # chi-square and p-values do without it (they are checked against it elsewhere).
    import subprocess
    import sys

    rng = np.random.default_rng(8)
    frame = pd.DataFrame(
        {
            "berth": rng.choice(["north", "south"], 300),
            "cargo": rng.choice(["dry", "reefer", "bulk"], 300),
            "tons": rng.normal(20, 4, 300).round(2),
        }
    )
    path = tmp_path / "berths.csv"
    frame.to_csv(path, index=False)
    script = (
        "import sys\n"
        "from worker.profiling import profile_file\n"
        "profile = profile_file(sys.argv[1])\n"
        "assert profile['crosstabs'] and profile['columns'][2]['numeric']['density']\n"
        "print('scipy.stats' in sys.modules)\n"
    )
    run = subprocess.run(
        [sys.executable, "-c", script, str(path)], capture_output=True, text=True, check=True
    )
    assert run.stdout.strip() == "False"


def test_one_thread_and_several_give_the_same_profile(tmp_path):
    # With threads, Spearman's ranks run beside the column summaries over every numeric
    # candidate; "mostly_words" starts as one (numbers first) and ends as text, so its
    # pairs must be left out as they are on one thread (truth by construction).
    # With threads the columns are pipelined: "swell_m" turns numeric in a later batch
    # (in its own lane) and "late_note" is empty until then; both must come out alike.
    rng = np.random.default_rng(11)
    rows = 12_000
    frame = pd.DataFrame(
        {
            "depth_m": rng.normal(20, 4, rows).round(2),
            "temp_c": rng.normal(12, 2, rows).round(1),
            "mostly_words": [str(v) for v in range(3000)] + ["calm"] * (rows - 3000),
            "gauge": rng.choice(["north", "south", "east"], rows),
            "swell_m": ["pending"] * 4000 + [f"{v:.2f}" for v in rng.gamma(2, 0.6, rows - 4000)],
            "late_note": [None] * 5000 + list(rng.choice(["fog", "rain"], rows - 5000)),
        }
    )
    frame.loc[rng.choice(rows, 150, replace=False), "temp_c"] = np.nan
    path = tmp_path / "soundings.csv"
    frame.to_csv(path, index=False)
    small_batches = {"csv_block_bytes": 64 * 1024}  # the first batches hold numbers only
    one = profile_file(path, ProfileOptions(threads=1, **small_batches), sha256="-")
    several = profile_file(path, ProfileOptions(threads=2, **small_batches), sha256="-")
    assert _by_name(one)["mostly_words"]["kind"] != "numeric"
    assert _by_name(one)["swell_m"]["kind"] == "numeric"
    assert _by_name(one)["late_note"]["kind"] == "categorical"
    spearman = [p for p in several["pairs"] if p["method"] == "spearman"]
    assert [(p["a"], p["b"]) for p in spearman] == [("depth_m", "temp_c")]
    for key in ("dataset", "columns", "pairs", "twins", "crosstabs", "flags", "score"):
        assert json.dumps(one[key], sort_keys=True) == json.dumps(several[key], sort_keys=True)
