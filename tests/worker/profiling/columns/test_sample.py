"""The bounded uniform sample: every value equally likely to be kept, batch after batch."""

import numpy as np
from scipy import stats

from worker.profiling.columns.sample import SampleState


def _positions_kept(size: int, batches: int, total: int, seed: int = 0) -> np.ndarray:
    state = SampleState(size, seed=seed)
    for chunk in np.array_split(np.arange(total, dtype=np.float64), batches):
        state.update(chunk)
    return state.values


def test_sample_has_its_size_and_distinct_values():
    kept = _positions_kept(5_000, 50, 400_000)
    assert kept.size == 5_000
    assert np.unique(kept).size == 5_000  # without replacement


def test_every_stretch_of_the_stream_is_equally_represented():
    kept = _positions_kept(5_000, 80, 400_000)
    counts, _ = np.histogram(kept, bins=20, range=(0, 400_000))
    # Reference: scipy.stats.chisquare against equal expected counts (250 per stretch);
    # late batches, which enter through the binomial shortcut, must not be favoured.
    assert stats.chisquare(counts).pvalue > 0.001
    assert abs(counts[:10].sum() - 2_500) < 4 * np.sqrt(5_000 * 0.25)


def test_merged_samples_weigh_each_stream_by_its_length():
    first, second = SampleState(4_000, seed=1), SampleState(4_000, seed=2)
    first.update(np.zeros(90_000))
    for chunk in np.array_split(np.ones(30_000), 10):
        second.update(chunk)
    share = first.merge(second).values.mean()
    # Expected share of ones 1/4; binomial standard error sqrt(0.25 * 0.75 / 4,000) = 0.0068.
    assert abs(share - 0.25) < 5 * 0.0068
