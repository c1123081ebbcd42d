"""What the intake page shows, gathered from the store and the profile document.

The profile is read through ``visible_profile`` so personal values stay
masked; the drift against the baseline is computed from the two stored
profiles with the engine's pure ``compare_profiles``.
"""

from __future__ import annotations

from typing import Any

from sqlalchemy import select
from sqlalchemy.orm import Session

from server.pages import figures
from server.pages.profile_cache import cached_profile
from server.pages.profile_view import (
    column_cards,
    correlation_figures,
    dataset_facts,
    flag_groups,
    score_rows,
)
from server.pages.review_view import VERDICT_WORDS, flag_key, judged_profile, review
from server.settings import Settings
from server.store import Intake, IntakeStatus, Profile
from worker.profiling.judgement import compare_profiles

INLINE_FIGURES = 12
"""Column figures sent with the page; the others are fetched as their cards come near."""

DRIFT_FIGURES = 6
"""Columns whose baseline-against-target figure the page draws, the most shifted first."""


def baseline_candidates(session: Session, intake: Intake) -> list[Intake]:
    """The supplier's other profiled intakes, newest first: what a baseline can be."""
    return list(
        session.scalars(
            select(Intake)
            .join(Profile, Profile.intake_id == Intake.id)
            .where(Intake.supplier_id == intake.supplier_id, Intake.id != intake.id)
            .where(Intake.status == IntakeStatus.ready)
            .order_by(Intake.created_at.desc(), Intake.id.desc())
        )
    )


def default_baseline(candidates: list[Intake], intake: Intake) -> Intake | None:
    """The latest profiled intake of the same supplier received before this one."""
    earlier = [c for c in candidates if (c.created_at, c.id) < (intake.created_at, intake.id)]
    return earlier[0] if earlier else None


def drift_view(
    baseline: dict[str, Any],
    target: dict[str, Any],
    settings: Settings,
    drift: dict[str, Any] | None = None,
) -> dict[str, Any]:
    """The drift document (the stored one, or computed here) and the figures that show it."""
    if drift is None:
        drift = compare_profiles(baseline, target, thresholds=settings.profiling.thresholds)
    base_columns = {c.get("name"): c for c in baseline.get("columns") or []}
    target_columns = {c.get("name"): c for c in target.get("columns") or []}
    shifted = sorted(
        (c for c in drift["columns"] if figures.base.finite(c.get("psi")) is not None),
        key=lambda c: -float(c["psi"]),
    )
    column_figures = []
    for entry in shifted[:DRIFT_FIGURES]:
        before = base_columns.get(entry.get("renamed_from") or entry["name"])
        after = target_columns.get(entry["name"])
        figure = figures.drift_column_figure(before, after) if before and after else None
        if figure is not None:
            column_figures.append({"entry": entry, "figure": figure})
    return {
        "document": drift,
        "overview": figures.drift_overview_figure(drift),
        "columns": column_figures,
    }


def label_columns(profile: dict[str, Any]) -> list[str]:
    """Columns the crosstab explorer offers: label columns (categorical and boolean)."""
    return [
        str(c["name"])
        for c in profile.get("columns") or []
        if c.get("kind") in ("categorical", "boolean")
    ]


def intake_context(session: Session, intake: Intake, settings: Settings) -> dict[str, Any]:
    """Everything the intake page shows for a profiled intake.

    Flags, score, suggested verdict and drift come from the intake's judgement
    (rules and baseline included) when it has one; otherwise from the profile,
    with the drift against the supplier's previous delivery computed here.
    """
    shown = cached_profile(session, intake)
    assert shown is not None
    profile = judged_profile(session, intake, shown)
    flags = list(profile.get("flags") or [])
    reviewed = review(session, intake, flags)
    candidates = baseline_candidates(session, intake)
    judgement = reviewed.judgement
    if judgement is not None:
        baseline_id = judgement.baseline_intake_id
        baseline = session.get(Intake, baseline_id) if baseline_id is not None else None
    else:
        baseline = default_baseline(candidates, intake)
    drift = None
    base_doc = cached_profile(session, baseline) if baseline is not None else None
    if base_doc is not None:
        stored = judgement.drift if judgement is not None and judgement.drift else None
        drift = drift_view(base_doc, profile, settings, stored)
    return {
        "profile": profile,
        "source": profile.get("source") or {},
        "dataset_facts": dataset_facts(profile),
        "score": profile.get("score"),
        "score_rows": score_rows(profile.get("score")),
        "verdict": profile.get("verdict"),
        "verdict_reasons": profile.get("verdict_reasons") or [],
        "flag_groups": flag_groups(profile),
        "flag_count": len(flags),
        "cards": column_cards(profile, inline_figures=INLINE_FIGURES),
        "missing_figure": figures.missing_figure(profile),
        "missing_together_figure": figures.missing_together_figure(
            list(profile.get("missing_together") or [])
        ),
        "correlations": correlation_figures(profile),
        "method_names": figures.relations.METHOD_NAMES,
        "twins": list(profile.get("twins") or []),
        "label_columns": label_columns(profile),
        "baseline": baseline,
        "baseline_chosen": bool(judgement and judgement.baseline_chosen),
        "baseline_candidates": candidates,
        "drift": drift,
        "review": reviewed,
        "flag_key": flag_key,
        "verdict_words": VERDICT_WORDS,
        "has_personal_data": any(str(f.get("code", "")).startswith("privacy.") for f in flags),
    }
