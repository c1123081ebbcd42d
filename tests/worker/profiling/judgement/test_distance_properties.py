"""Properties of the distances that hold for any data (hypothesis), checked against scipy."""

from __future__ import annotations

import numpy as np
from hypothesis import given, settings
from hypothesis import strategies as st
from scipy import stats
from scipy.spatial.distance import jensenshannon

from worker.profiling.judgement.distances import (
    decile_psi,
    js_distance,
    ks_exact,
    ks_from_percentiles,
    psi,
    values_from_percentiles,
)

samples = st.lists(
    st.floats(min_value=-1e6, max_value=1e6, allow_nan=False), min_size=2, max_size=200
)
counts = st.lists(st.integers(min_value=0, max_value=1000), min_size=2, max_size=12).filter(
    lambda c: sum(c) > 0
)


def _percentiles(values: list[float]) -> list[float]:
    return np.percentile(np.asarray(values), np.arange(101)).tolist()


@settings(max_examples=60, deadline=None)
@given(samples, samples)
def test_ks_exact_equals_scipy(a: list[float], b: list[float]) -> None:
    # Reference: scipy.stats.ks_2samp on the same samples (the statistic is the same for
    # every method; the asymptotic one avoids its warning on ties).
    assert abs(ks_exact(a, b) - stats.ks_2samp(a, b, method="asymp").statistic) < 1e-9


@settings(max_examples=60, deadline=None)
@given(samples, samples)
def test_ks_from_percentiles_is_a_distance_in_0_1(a: list[float], b: list[float]) -> None:
    pa, pb = _percentiles(a), _percentiles(b)
    d = ks_from_percentiles(pa, pb)
    assert 0.0 <= d <= 1.0
    assert d == ks_from_percentiles(pb, pa)
    assert ks_from_percentiles(pa, pa) == 0.0


@settings(max_examples=60, deadline=None)
@given(samples, samples)
def test_decile_psi_is_never_negative(a: list[float], b: list[float]) -> None:
    value, _edges, expected, actual = decile_psi(_percentiles(a), _percentiles(b))
    assert value >= -1e-12
    assert abs(sum(expected) - 1) < 1e-9 and abs(sum(actual) - 1) < 1e-9


@settings(max_examples=60, deadline=None)
@given(counts)
def test_js_distance_equals_scipy_and_is_symmetric(p: list[int]) -> None:
    q = list(reversed(p))
    # Reference: scipy.spatial.distance.jensenshannon, base 2.
    assert abs(js_distance(p, q) - jensenshannon(p, q, base=2)) < 1e-9
    assert abs(js_distance(p, q) - js_distance(q, p)) < 1e-12
    assert 0.0 <= js_distance(p, q) <= 1.0


@settings(max_examples=60, deadline=None)
@given(counts)
def test_psi_of_shares_is_symmetric_and_non_negative(p: list[int]) -> None:
    e = np.asarray(p, float) / sum(p)
    a = e[::-1]
    assert psi(e, a) >= 0.0
    assert abs(psi(e, a) - psi(a, e)) < 1e-9


@settings(max_examples=60, deadline=None)
@given(st.lists(st.floats(min_value=-1e4, max_value=1e4, allow_nan=False), min_size=2, max_size=51))
def test_small_samples_round_trip_through_their_percentiles(values: list[float]) -> None:
    ordered = np.sort(np.asarray(values))
    back = values_from_percentiles(_percentiles(values), len(values))
    assert back is not None
    assert np.allclose(back, ordered, rtol=0, atol=1e-6)
