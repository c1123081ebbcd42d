"""The standalone report opened in chromium: figures draw, markup from the file stays text."""

from __future__ import annotations

from pathlib import Path

from playwright.sync_api import Page

from server.pages.report import render_report
from tests.browser.conftest import screenshot_widths
from tests.browser.landings import HOSTILE_COLUMN, HOSTILE_LABEL, write_landings
from worker.profiling import profile_file


def test_report_draws_every_figure_offline(page: Page, tmp_path: Path, screenshot_dir: Path):
    profile = profile_file(write_landings(tmp_path / "landings.csv"))
    report = tmp_path / "report.html"
    report.write_text(render_report(profile), encoding="utf-8")
    # Offline: any request that is not the file itself would fail the test.
    requests: list[str] = []
    page.on("request", lambda r: requests.append(r.url))
    page.goto(report.as_uri())
    figures = page.locator("[data-figure]")
    expected = figures.count()
    assert expected >= 8  # 7 column figures, missing values, correlation, crosstab
    # Column cards draw as they come into view: scroll through the whole report.
    for _ in range(40):
        page.mouse.wheel(0, 900)
        page.wait_for_timeout(60)
    visible = page.locator("[data-figure]:visible")
    drawn = page.locator("[data-figure]:visible .main-svg")
    page.wait_for_function(
        "n => document.querySelectorAll('[data-figure][data-state=drawn]').length >= n",
        arg=visible.count(),
    )
    assert drawn.count() >= visible.count()
    assert requests == [report.as_uri()]
    # Values from the file are text: the hostile label is shown literally, never run.
    assert page.get_by_role("heading", name=HOSTILE_COLUMN).count() == 1
    assert page.locator("b", has_text="Pier").count() == 0
    assert page.locator("svg text", has_text=HOSTILE_LABEL).count() >= 1
    assert page.evaluate("typeof window.x") == "undefined"
    page.evaluate("window.scrollTo(0, 0)")
    shots = screenshot_widths(page, screenshot_dir, "report")
    assert all(p.stat().st_size > 10_000 for p in shots)


def test_correlation_method_chooser_switches_heatmaps(page: Page, tmp_path: Path) -> None:
    profile = profile_file(write_landings(tmp_path / "landings.csv"))
    report = tmp_path / "report.html"
    report.write_text(render_report(profile), encoding="utf-8")
    page.goto(report.as_uri())
    chooser = page.get_by_label("Measure")
    methods = chooser.locator("option").evaluate_all("options => options.map(o => o.value)")
    assert "pearson" in methods and len(methods) >= 2
    chooser.scroll_into_view_if_needed()
    for method in methods:
        chooser.select_option(method)
        shown = page.locator(f"[data-choice-group=corr][data-choice={method}]")
        shown.locator(".main-svg").first.wait_for()
        assert page.locator("[data-choice-group=corr]:visible").count() == 1
