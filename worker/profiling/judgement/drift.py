"""Drift: what changed between a baseline intake and a target intake, from their profiles alone.

Raw files may have been purged by the time a later delivery arrives, so
everything here reads the two stored profile documents only:

- schema: columns added, removed, renamed (a removed and an added column of
  the same kind whose distributions match, with the distance as evidence),
  and kinds changed;
- volume: the row counts and their ratio;
- numeric columns: PSI on the baseline's deciles, the Kolmogorov-Smirnov
  distance, the change of mean in baseline standard deviations, the change
  of missing share;
- label columns: PSI over labels, new and vanished labels, the chi-square
  test of homogeneity and the Jensen-Shannon distance.

How the distances are read off stored summaries:

- PSI bins are cut at the baseline's 10th..90th percentiles; each side's share
  per bin comes from its own percentiles (linear between stored points). An
  empty bin's share is raised to ``thresholds.psi_floor`` (0.0001) so the
  logarithm stays finite (common practice; the shares are not renormalised).
- KS: exact when both sides are small (at most 51 values, whose sorted
  values the 101 exact percentiles determine, see
  ``values_from_percentiles``) or when a profile stores ``numeric.values``:
  the largest gap between the two empirical distribution functions, with
  scipy's p-value (exact for small samples). Otherwise the largest gap
  between the two cumulative functions read off the percentiles, off by at
  most about 0.01 per side for large samples, with an approximate p-value.
- Labels: each side's counts of its listed labels plus one bucket for the
  labels it did not list (``other_count``). A label is new (vanished) when it
  is listed in the target (baseline) and absent from the other side's list;
  when that side has unlisted labels, the evidence says the list is partial.
"""

from __future__ import annotations

import warnings
from typing import Any

import numpy as np

from worker.profiling.judgement.distances import (
    decile_psi,
    js_distance,
    ks_exact,
    ks_from_percentiles,
    ks_p_value,
    psi,
    values_from_percentiles,
)
from worker.profiling.judgement.flags import LABEL_KINDS, stability_flags
from worker.profiling.judgement.tables import chi_square
from worker.profiling.judgement.thresholds import FlagThresholds

OTHER = "(other labels)"
"""The bucket of labels a profile counted but did not list."""


def _rows(profile: dict[str, Any]) -> int:
    return int((profile.get("dataset") or {}).get("rows") or 0)


def _missing_share(column: dict[str, Any], rows: int) -> float | None:
    return int(column.get("missing") or 0) / rows if rows else None


def label_counts(column: dict[str, Any]) -> dict[str, int]:
    """A label column's counts: its listed labels plus the bucket of unlisted ones."""
    labels = column.get("labels") or {}
    counts = {str(item["value"]): int(item["count"]) for item in labels.get("top") or []}
    other = int(labels.get("other_count") or 0)
    if other:
        counts[OTHER] = counts.get(OTHER, 0) + other
    return counts


def usable_numeric(column: dict[str, Any]) -> dict[str, Any] | None:
    """The column's numeric section when it holds 101 finite percentiles, else None."""
    numeric = column.get("numeric") or {}
    percentiles = numeric.get("percentiles")
    if not isinstance(percentiles, list) or len(percentiles) != 101:
        return None
    if not all(isinstance(v, int | float) and np.isfinite(v) for v in percentiles):
        return None
    return numeric


def _exact_values(numeric: dict[str, Any], count: int) -> Any:
    """A column's sorted values: stored, or read back from the percentiles of a small sample."""
    if numeric.get("values"):
        return numeric["values"]
    if numeric.get("exact") is False:
        return None
    return values_from_percentiles(numeric["percentiles"], count)


def _numeric_drift(
    base: dict[str, Any], target: dict[str, Any], thresholds: FlagThresholds
) -> dict[str, Any]:
    b, t = usable_numeric(base), usable_numeric(target)
    result: dict[str, Any] = {"psi": None, "ks": None, "ks_p_value": None, "ks_exact": False}
    if b and t:
        value, edges, expected, actual = decile_psi(
            b["percentiles"], t["percentiles"], floor=thresholds.psi_floor
        )
        result.update(psi=value, psi_bins={"edges": edges, "baseline": expected, "target": actual})
        n_b, n_t = int(base.get("count") or 0), int(target.get("count") or 0)
        values_b, values_t = _exact_values(b, n_b), _exact_values(t, n_t)
        if values_b is not None and values_t is not None:
            result["ks"] = ks_exact(values_b, values_t)
            with warnings.catch_warnings():  # scipy falls back to asymptotic on ties, saying so
                warnings.simplefilter("ignore", RuntimeWarning)
                from scipy import stats  # loaded when needed (slow to import)

                result["ks_p_value"] = float(stats.ks_2samp(values_b, values_t).pvalue)
            result["ks_exact"] = True
        else:
            result["ks"] = ks_from_percentiles(b["percentiles"], t["percentiles"])
            result["ks_p_value"] = ks_p_value(result["ks"], n_b, n_t)
    b, t = base.get("numeric") or {}, target.get("numeric") or {}
    mean_b, mean_t, std_b = b.get("mean"), t.get("mean"), b.get("std")
    if mean_b is not None and mean_t is not None and std_b:
        result["mean_shift_sd"] = (float(mean_t) - float(mean_b)) / float(std_b)
    else:
        result["mean_shift_sd"] = None
    result["mean_baseline"], result["mean_target"] = mean_b, mean_t
    return result


def _label_drift(
    base: dict[str, Any], target: dict[str, Any], thresholds: FlagThresholds
) -> dict[str, Any]:
    b, t = label_counts(base), label_counts(target)
    names = sorted(set(b) | set(t))
    if not names or not sum(b.values()) or not sum(t.values()):
        return {"psi": None, "js_distance": None, "chi2_p_value": None}
    table = np.array([[b.get(n, 0) for n in names], [t.get(n, 0) for n in names]], dtype=float)
    shares = table / table.sum(axis=1, keepdims=True)
    test = chi_square(table)
    listed_b = {k for k in b if k != OTHER}
    listed_t = {k for k in t if k != OTHER}
    return {
        "psi": psi(shares[0], shares[1], floor=thresholds.psi_floor),
        "js_distance": js_distance(shares[0], shares[1]),
        "chi2": test.statistic,
        "chi2_dof": test.dof,
        "chi2_p_value": test.p_value,
        "new_labels": sorted(listed_t - listed_b),
        "vanished_labels": sorted(listed_b - listed_t),
        "labels_complete": OTHER not in b and OTHER not in t,
    }


def _family(kind: str | None) -> str | None:
    if kind == "numeric":
        return "numeric"
    if kind in LABEL_KINDS:
        return "labels"
    return None


RENAME_PAIRS_MAX = 2_000
"""Most (removed, added) column pairs whose distributions are compared to find renames."""

KS_CRITICAL_5 = 1.358
"""Smirnov's asymptotic 5 % critical value c(0.05) of sqrt(n·m/(n+m))·D (Smirnov 1948)."""


def _rename_bound(base: dict[str, Any], target: dict[str, Any], t: FlagThresholds) -> float:
    """Largest KS distance still taken for the same column: the threshold, or sampling noise.

    Two samples of one distribution differ by up to c(0.05)·sqrt((n+m)/(n·m)) by
    chance (95 % of the time), so small columns get that much room.
    """
    n, m = int(base.get("count") or 0), int(target.get("count") or 0)
    if n == 0 or m == 0:
        return t.rename_max_distance
    return max(t.rename_max_distance, KS_CRITICAL_5 * ((n + m) / (n * m)) ** 0.5)


def _label_rename_bound(base: dict[str, Any], target: dict[str, Any], t: FlagThresholds) -> float:
    """Largest Jensen-Shannon distance (base 2) still taken for the same label column.

    For two samples of one distribution over k labels, the equal-weight
    Jensen-Shannon divergence in nats is close to X² / (8·n·m/(n+m)), where X²
    is Pearson's homogeneity statistic with k - 1 degrees of freedom (a second
    order expansion of the divergence around the pooled shares; Lin 1991 for
    the divergence, Pearson 1900 for X²). The 95 % point of that chi-square
    gives the room sampling noise alone needs, so modest files are not held to
    a bound only large files can meet.
    """
    n, m = int(base.get("count") or 0), int(target.get("count") or 0)
    labels = {str(i["value"]) for c in (base, target) for i in _top_labels(c)}
    if n == 0 or m == 0 or len(labels) < 2:
        return t.rename_max_distance
    from scipy import stats  # loaded when needed (slow to import)

    critical = stats.chi2.ppf(0.95, len(labels) - 1)
    noise = (critical / (8 * np.log(2) * n * m / (n + m))) ** 0.5
    return max(t.rename_max_distance, float(noise))


def _top_labels(column: dict[str, Any]) -> list[dict[str, Any]]:
    return (column.get("labels") or {}).get("top") or []


def _match_key(column: dict[str, Any]) -> tuple[str, Any] | None:
    """What the cheap rename pre-test compares: quartiles (numeric) or listed labels."""
    family = _family(column.get("kind"))
    if family == "labels":
        return family, {str(i["value"]) for i in _top_labels(column)}
    if family == "numeric" and usable_numeric(column):
        percentiles = column["numeric"]["percentiles"]
        return family, (percentiles[25], percentiles[75])
    return None


def _may_match(base: tuple[str, Any] | None, target: tuple[str, Any] | None) -> bool:
    """Same family, and overlapping middle halves (numeric) or a shared label."""
    if base is None or target is None or base[0] != target[0]:
        return False
    if base[0] == "labels":
        return bool(base[1] & target[1])
    (b1, b3), (g1, g3) = base[1], target[1]
    return b1 <= g3 and g1 <= b3


def _distance(base: dict[str, Any], target: dict[str, Any], t: FlagThresholds) -> float | None:
    """How far apart two columns' distributions are (KS or Jensen-Shannon), for renames."""
    if _family(base.get("kind")) == "numeric":
        b, g = base["numeric"], target["numeric"]
        return ks_from_percentiles(b["percentiles"], g["percentiles"])
    return _label_drift(base, target, t)["js_distance"]


def _renames(
    removed: list[dict[str, Any]], added: list[dict[str, Any]], t: FlagThresholds
) -> list[dict[str, Any]]:
    """Pairs (removed, added) whose distributions match: the same column under a new name.

    A numeric pair matches when its KS distance is within ``_rename_bound``, a
    label pair when its Jensen-Shannon distance is within ``_label_rename_bound``; each
    column is matched at most once, closest pairs first, and only when no
    other column fits nearly as well (a rival within twice the distance makes
    the pair too ambiguous to call). At most RENAME_PAIRS_MAX pairs are
    compared, so a file whose every column was renamed stays quick (the
    evidence says when the search was cut short).
    """
    old_keys = [(old, _match_key(old)) for old in removed]
    new_keys = [(new, _match_key(new)) for new in added]
    pairs = [(o, n) for o, ok in old_keys for n, nk in new_keys if _may_match(ok, nk)]
    truncated = len(pairs) > RENAME_PAIRS_MAX
    candidates = []
    for old, new in pairs[:RENAME_PAIRS_MAX]:
        distance = _distance(old, new, t)
        numeric = _family(old.get("kind")) == "numeric"
        bound = _rename_bound(old, new, t) if numeric else _label_rename_bound(old, new, t)
        if distance is not None and distance <= bound:
            candidates.append((distance, old["name"], new["name"], new.get("kind"), numeric))
    by_column: dict[tuple[str, str], list[float]] = {}
    for distance, old_name, new_name, _kind, _numeric in candidates:
        by_column.setdefault(("from", old_name), []).append(distance)
        by_column.setdefault(("to", new_name), []).append(distance)
    renamed, used = [], set()
    for distance, old_name, new_name, kind, numeric in sorted(candidates, key=lambda c: c[0]):
        if old_name in used or new_name in used:
            continue
        # The pair's own distance is in both lists; any other within twice it is a rival.
        others = [*by_column[("from", old_name)], *by_column[("to", new_name)]]
        others.remove(distance)
        others.remove(distance)
        if others and min(others) < 2 * distance:
            continue  # another column fits about as well: too ambiguous to call a rename
        used |= {old_name, new_name}
        evidence = {"kind": kind, "ks" if numeric else "js_distance": distance}
        if truncated:
            evidence["search_cut_at_pairs"] = RENAME_PAIRS_MAX
        renamed.append({"from": old_name, "to": new_name, "evidence": evidence})
    return renamed


def _side(profile: dict[str, Any]) -> dict[str, Any]:
    source = profile.get("source") or {}
    return {
        "name": source.get("name"),
        "sha256": source.get("sha256"),
        "rows": _rows(profile),
        **({"intake_id": profile["intake_id"]} if "intake_id" in profile else {}),
    }


def compare_profiles(
    baseline: dict[str, Any], target: dict[str, Any], *, thresholds: FlagThresholds
) -> dict[str, Any]:
    """The drift document of ``target`` against ``baseline``, with its stability flags."""
    base_columns = {c["name"]: c for c in baseline.get("columns") or []}
    target_columns = {c["name"]: c for c in target.get("columns") or []}
    removed = [c for n, c in base_columns.items() if n not in target_columns]
    added = [c for n, c in target_columns.items() if n not in base_columns]
    renamed = _renames(removed, added, thresholds)
    renamed_from = {r["from"] for r in renamed}
    renamed_to = {r["to"] for r in renamed}
    rows_b, rows_t = _rows(baseline), _rows(target)
    pairs = [(n, base_columns[n], c) for n, c in target_columns.items() if n in base_columns]
    pairs += [(r["to"], base_columns[r["from"]], target_columns[r["to"]]) for r in renamed]
    columns = []
    kind_changed = []
    for name, base, tgt in pairs:
        entry: dict[str, Any] = {
            "name": name,
            "kind": tgt.get("kind"),
            "psi": None,
            "ks": None,
            "mean_shift_sd": None,
            "missing_share_change": None,
            "new_labels": [],
            "vanished_labels": [],
            "chi2_p_value": None,
            "js_distance": None,
        }
        if name in renamed_to:
            entry["renamed_from"] = next(r["from"] for r in renamed if r["to"] == name)
        share_b, share_t = _missing_share(base, rows_b), _missing_share(tgt, rows_t)
        if share_b is not None and share_t is not None:
            entry["missing_share_change"] = share_t - share_b
        if base.get("kind") != tgt.get("kind"):
            kind_changed.append({"name": name, "from": base.get("kind"), "to": tgt.get("kind")})
        elif _family(tgt.get("kind")) == "numeric":
            entry.update(_numeric_drift(base, tgt, thresholds))
        elif _family(tgt.get("kind")) == "labels":
            entry.update(_label_drift(base, tgt, thresholds))
        columns.append(entry)
    drift = {
        "baseline": _side(baseline),
        "target": _side(target),
        "schema": {
            "added": [c["name"] for c in added if c["name"] not in renamed_to],
            "removed": [c["name"] for c in removed if c["name"] not in renamed_from],
            "renamed": renamed,
            "kind_changed": kind_changed,
        },
        "volume": {
            "rows_baseline": rows_b,
            "rows_target": rows_t,
            "ratio": rows_t / rows_b if rows_b else None,
        },
        "columns": columns,
    }
    drift["flags"] = stability_flags(drift, thresholds)
    return drift
