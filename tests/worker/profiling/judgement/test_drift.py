"""compare_profiles: the drift document between two stored profiles."""

from __future__ import annotations

import json

import numpy as np
import pytest
from scipy import stats
from scipy.spatial.distance import jensenshannon

from tests.worker.profiling.judgement.planted import label_column, numeric_column, profile_of
from worker.profiling.judgement import FlagThresholds, compare_profiles

T = FlagThresholds()


def _rng() -> np.random.Generator:
    return np.random.default_rng(42)


def _column(drift: dict, name: str) -> dict:
    return next(c for c in drift["columns"] if c["name"] == name)


def test_numeric_drift_against_scipy_on_the_raw_values() -> None:
    rng = _rng()
    old, new = rng.normal(18, 2, 4000), rng.normal(18.8, 2.4, 3000)
    drift = compare_profiles(
        profile_of([numeric_column("weight_kg", old.tolist())]),
        profile_of([numeric_column("weight_kg", new.tolist())]),
        thresholds=T,
    )
    column = _column(drift, "weight_kg")
    # Reference: scipy.stats.ks_2samp on the values the two profiles summarise.
    assert column["ks"] == pytest.approx(stats.ks_2samp(old, new).statistic, abs=0.015)
    assert column["ks_exact"] is False
    # Mean shift in baseline SDs, against numpy on the raw values.
    assert column["mean_shift_sd"] == pytest.approx(
        (new.mean() - old.mean()) / old.std(ddof=1), rel=1e-9
    )
    # PSI against the same decile PSI computed from the raw values with numpy.
    edges = np.percentile(old, np.arange(10, 100, 10))
    e = np.histogram(old, np.concatenate([[-np.inf], edges, [np.inf]]))[0] / len(old)
    a = np.histogram(new, np.concatenate([[-np.inf], edges, [np.inf]]))[0] / len(new)
    assert column["psi"] == pytest.approx(float(np.sum((a - e) * np.log(a / e))), abs=0.01)
    assert column["psi"] > T.psi_warning


def test_exact_ks_for_small_columns_from_their_percentiles() -> None:
    rng = _rng()
    old, new = np.round(rng.normal(5, 1, 40), 2), np.round(rng.normal(5.8, 1, 35), 2)
    base = profile_of([numeric_column("depth_m", old.tolist())])
    target = profile_of([numeric_column("depth_m", new.tolist())])
    column = _column(compare_profiles(base, target, thresholds=T), "depth_m")
    reference = stats.ks_2samp(old, new, method="exact")  # scipy.stats.ks_2samp, exact
    assert column["ks_exact"] is True
    assert column["ks"] == pytest.approx(reference.statistic, abs=1e-12)
    assert column["ks_p_value"] == pytest.approx(reference.pvalue, rel=1e-9)


def test_exact_ks_when_both_profiles_keep_the_values() -> None:
    rng = _rng()
    old, new = np.round(rng.normal(5, 1, 40), 1), np.round(rng.normal(5.6, 1, 35), 1)
    base = profile_of([numeric_column("depth_m", old.tolist())])
    target = profile_of([numeric_column("depth_m", new.tolist())])
    base["columns"][0]["numeric"]["values"] = sorted(old.tolist())
    target["columns"][0]["numeric"]["values"] = sorted(new.tolist())
    column = _column(compare_profiles(base, target, thresholds=T), "depth_m")
    reference = stats.ks_2samp(old, new, method="exact")  # scipy.stats.ks_2samp, exact
    assert column["ks_exact"] is True
    assert column["ks"] == pytest.approx(reference.statistic, abs=1e-12)
    assert column["ks_p_value"] == pytest.approx(reference.pvalue, rel=1e-9)


def test_label_drift_against_scipy() -> None:
    old = ["A"] * 500 + ["B"] * 300 + ["C"] * 200
    new = ["A"] * 300 + ["B"] * 300 + ["D"] * 150  # C vanished, D is new
    drift = compare_profiles(
        profile_of([label_column("grade", old)]),
        profile_of([label_column("grade", new)]),
        thresholds=T,
    )
    column = _column(drift, "grade")
    assert column["new_labels"] == ["D"]
    assert column["vanished_labels"] == ["C"]
    table = np.array([[500, 300, 200, 0], [300, 300, 0, 150]])  # labels A, B, C, D
    # Reference: scipy.stats.chi2_contingency (test of homogeneity of the two deliveries).
    assert column["chi2_p_value"] == pytest.approx(
        stats.chi2_contingency(table, correction=False).pvalue, rel=1e-9, abs=1e-300
    )
    # Reference: scipy.spatial.distance.jensenshannon, base 2.
    assert column["js_distance"] == pytest.approx(
        jensenshannon(table[0], table[1], base=2), abs=1e-12
    )
    flags = [f for f in drift["flags"] if f["code"] == "stability.distribution-shift"]
    assert "new labels 'D'" in flags[0]["message"]


def test_rename_is_found_by_the_distribution() -> None:
    rng = _rng()
    weights = rng.normal(18, 2, 2000).tolist()
    base = profile_of(
        [numeric_column("weight_kg", weights), label_column("dock", ["n", "s"] * 1000)]
    )
    target = profile_of(
        [numeric_column("gross_kg", rng.normal(18, 2, 2000).tolist()),
         label_column("dock", ["n", "s"] * 1000)]
    )  # fmt: skip
    drift = compare_profiles(base, target, thresholds=T)
    assert drift["schema"]["added"] == [] and drift["schema"]["removed"] == []
    (rename,) = drift["schema"]["renamed"]
    assert (rename["from"], rename["to"]) == ("weight_kg", "gross_kg")
    assert rename["evidence"]["ks"] < T.rename_max_distance
    assert _column(drift, "gross_kg")["renamed_from"] == "weight_kg"


def test_different_distributions_are_not_taken_for_a_rename() -> None:
    rng = _rng()
    base = profile_of([numeric_column("weight_kg", rng.normal(18, 2, 2000).tolist())])
    target = profile_of([numeric_column("length_cm", rng.normal(60, 5, 2000).tolist())])
    schema = compare_profiles(base, target, thresholds=T)["schema"]
    assert schema["renamed"] == []
    assert schema["removed"] == ["weight_kg"] and schema["added"] == ["length_cm"]


def test_kind_change_and_missing_share_change() -> None:
    base = profile_of([numeric_column("batch", [float(i % 7) for i in range(100)])])
    target_column = label_column("batch", [f"B{i % 7}" for i in range(80)] + [None] * 20)
    drift = compare_profiles(base, profile_of([target_column]), thresholds=T)
    assert drift["schema"]["kind_changed"] == [
        {"name": "batch", "from": "numeric", "to": "categorical"}
    ]
    assert _column(drift, "batch")["missing_share_change"] == pytest.approx(0.2)
    assert any(
        f["evidence"].get("change") == "kind" and f["severity"] == "critical"
        for f in drift["flags"]
    )


def test_drift_document_has_the_design_fields_and_is_json() -> None:
    base = profile_of([numeric_column("x", [1.0, 2.0, 3.0, 4.0])], name="march.csv")
    target = profile_of([numeric_column("x", [1.0, 2.0, 3.0, 5.0, 6.0, 7.0])], name="april.csv")
    drift = json.loads(json.dumps(compare_profiles(base, target, thresholds=T)))
    assert set(drift) == {"baseline", "target", "schema", "volume", "columns", "flags"}
    assert drift["baseline"]["name"] == "march.csv" and drift["target"]["rows"] == 6
    assert set(drift["schema"]) == {"added", "removed", "renamed", "kind_changed"}
    assert drift["volume"] == {"rows_baseline": 4, "rows_target": 6, "ratio": 1.5}
    expected = {"name", "kind", "psi", "ks", "mean_shift_sd", "missing_share_change",
                "new_labels", "vanished_labels", "chi2_p_value", "js_distance"}  # fmt: skip
    assert expected <= set(drift["columns"][0])


def test_exact_ks_between_small_files_profiled_by_the_engine(tmp_path) -> None:
    from worker.profiling import profile_file

    rng = np.random.default_rng(2)
    old, new = np.round(rng.normal(5, 1, 40), 2), np.round(rng.normal(5.6, 1, 33), 2)
    for name, values in (("old.csv", old), ("new.csv", new)):
        (tmp_path / name).write_text("depth_m\n" + "\n".join(map(str, values)) + "\n")
    drift = compare_profiles(
        profile_file(tmp_path / "old.csv"), profile_file(tmp_path / "new.csv"), thresholds=T
    )
    column = _column(drift, "depth_m")
    reference = stats.ks_2samp(old, new)  # scipy.stats.ks_2samp on the raw values (exact)
    assert column["ks_exact"] is True
    assert column["ks"] == pytest.approx(reference.statistic, abs=1e-12)
    assert column["ks_p_value"] == pytest.approx(reference.pvalue, rel=1e-9)


def test_a_rename_of_a_small_column_is_found_within_sampling_noise() -> None:
    rng = _rng()
    base = profile_of([numeric_column("weight_kg", rng.normal(18, 2, 120).tolist())])
    target = profile_of([numeric_column("gross_kg", rng.normal(18, 2, 120).tolist())])
    (rename,) = compare_profiles(base, target, thresholds=T)["schema"]["renamed"]
    # Two samples of 120 from one distribution may differ by up to 1.358·sqrt(2/120) = 0.175
    # (Smirnov's 5 % critical value), far above the 0.05 kept for large columns.
    assert rename["evidence"]["ks"] <= 1.358 * (2 / 120) ** 0.5


def test_an_ambiguous_rename_is_not_called() -> None:
    rng = _rng()
    base = profile_of([numeric_column("depth_a", rng.normal(0, 1, 3000).tolist())])
    target = profile_of(
        [
            numeric_column("depth_b", rng.normal(0, 1, 3000).tolist()),
            numeric_column("depth_c", rng.normal(0, 1, 3000).tolist()),
        ]
    )
    schema = compare_profiles(base, target, thresholds=T)["schema"]
    assert schema["renamed"] == []
    assert schema["removed"] == ["depth_a"] and schema["added"] == ["depth_b", "depth_c"]


def test_columns_without_usable_percentiles_are_compared_by_what_they_have() -> None:
    base = profile_of([numeric_column("x", [1.0, 2.0, 3.0, 4.0, 5.0])])
    target = profile_of([numeric_column("x", [2.0, 3.0, 4.0, 5.0, 6.0])])
    target["columns"][0]["numeric"]["percentiles"] = [None] * 101  # NaN stored as null
    column = _column(compare_profiles(base, target, thresholds=T), "x")
    assert column["psi"] is None and column["ks"] is None
    assert column["mean_shift_sd"] == pytest.approx(1 / np.std([1, 2, 3, 4, 5], ddof=1))


def test_a_rename_of_a_label_column_is_found_within_sampling_noise() -> None:
    rng = _rng()
    codes = [f"BB-{i:03d}" for i in range(1, 19)]
    base = profile_of([label_column("vessel", rng.choice(codes, 600).tolist())])
    target = profile_of([label_column("vessel_code", rng.choice(codes, 600).tolist())])
    (rename,) = compare_profiles(base, target, thresholds=T)["schema"]["renamed"]
    assert (rename["from"], rename["to"]) == ("vessel", "vessel_code")
    # Sampling noise alone: X² with 17 degrees of freedom (95 % point from scipy.stats.chi2)
    # over 8·ln 2·n·m/(n+m), the second-order expansion of the Jensen-Shannon divergence.
    noise = (stats.chi2.ppf(0.95, 17) / (8 * np.log(2) * 300)) ** 0.5
    assert T.rename_max_distance < rename["evidence"]["js_distance"] <= noise


def test_label_columns_with_other_shares_are_not_taken_for_a_rename() -> None:
    rng = _rng()
    codes = [f"BB-{i:03d}" for i in range(1, 19)]
    skewed = np.r_[np.full(9, 0.1), np.full(9, 0.1 / 9)]
    base = profile_of([label_column("vessel", rng.choice(codes, 600).tolist())])
    target = profile_of([label_column("vessel_code", rng.choice(codes, 600, p=skewed).tolist())])
    assert compare_profiles(base, target, thresholds=T)["schema"]["renamed"] == []
