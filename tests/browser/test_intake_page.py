"""The intake page: comments seen by a colleague, decisions, the crosstab explorer."""

from __future__ import annotations

import csv
import io
from pathlib import Path

import numpy as np
import pandas as pd
from playwright.sync_api import Page, expect

from server.demo.scenario import deliveries
from tests.browser.conftest import intake_id, screenshot_widths, sign_in

LANDINGS = "brannock-landings-2031-w10.csv"
SAMPLES = "saltmere-samples-2031-w10.csv"
TIDE = "gullwick-2031-03.csv"


def demo_frame(name: str) -> pd.DataFrame:
    content = next(d.content for d in deliveries() if d.filename == name)
    return pd.read_csv(io.BytesIO(content), dtype=str)


def test_comment_on_a_flag_is_seen_by_another_user(page: Page, new_page, live_server: str):
    sign_in(page, live_server, "demo-reviewer")
    number = intake_id(page, live_server, SAMPLES)
    page.goto(f"{live_server}/intakes/{number}")
    group = page.locator(".flag-group", has=page.locator("h3 a", has_text="dissolved_oxygen_mg_l"))
    discussion = group.locator(".discussion").first
    discussion.locator("summary").click()
    text = "The lab writes n/a when the oxygen probe was not taken out; ask for blanks."
    discussion.get_by_label("Comment").fill(text)
    discussion.get_by_role("button", name="Post").click()
    page.wait_for_load_state("load")
    expect(group.locator(".comment-body").first).to_have_text(text)

    colleague = sign_in(new_page(), live_server, "demo-admin")
    colleague.goto(f"{live_server}/intakes/{number}")
    comment = colleague.locator(".flag-group .comment-body", has_text=text)
    expect(comment).to_have_count(1)
    expect(colleague.locator(".comment-meta", has_text="demo-reviewer").first).to_be_visible()
    # The colleague resolves the discussion; it stays, marked resolved.
    thread = colleague.locator(".discussion", has=colleague.locator(".comment-body", has_text=text))
    thread.locator("summary").click()
    thread.get_by_role("button", name="Resolve").click()
    expect(thread.locator(".comment-meta").first).to_contain_text("resolved by demo-admin")


def test_decision_is_recorded_with_its_reason(page: Page, live_server: str) -> None:
    sign_in(page, live_server, "demo-reviewer")
    number = intake_id(page, live_server, TIDE)
    page.goto(f"{live_server}/intakes/{number}")
    form = page.locator("#decision-form")
    form.get_by_label("reject").check()
    form.get_by_role("button", name="Record the decision").click()
    expect(page.locator("#decision-message")).to_contain_text(
        "needs a reason"
    )  # said before sending
    form.get_by_label("Reason").fill("Probe dropouts written as -999 in 3 % of readings.")
    form.get_by_role("button", name="Record the decision").click()
    current = page.locator("#current-decision")
    expect(current).to_contain_text("reject")
    expect(current).to_contain_text("Probe dropouts written as -999")
    expect(current).to_contain_text("demo-reviewer")


def test_crosstab_explorer_with_a_filter_matches_pandas(page: Page, live_server: str) -> None:
    sign_in(page, live_server)
    page.goto(f"{live_server}/intakes/{intake_id(page, live_server, LANDINGS)}")
    page.get_by_label("Rows", exact=True).select_option("species")
    page.get_by_label("Columns", exact=True).select_option("grade")
    page.get_by_label("Only rows where").select_option("vessel")
    values = page.get_by_label("is", exact=True)
    expect(values.locator("option[value='BB-003']")).to_have_count(1)
    values.select_option("BB-003")
    page.get_by_role("button", name="Cross").click()
    table = page.locator("#explorer-table")
    expect(table).to_be_visible()
    expect(page.locator("#explorer-figure .main-svg").first).to_be_attached()

    # Reference: pandas crosstab of the same file, rows where vessel is BB-003; rows with
    # a missing grade are left out, as pandas does.
    frame = demo_frame(LANDINGS)
    expected = pd.crosstab(frame.loc[frame.vessel == "BB-003", "species"], frame["grade"])
    shown_columns = table.locator("thead th").all_inner_texts()[1:]
    assert shown_columns == list(expected.columns)
    for body_row in table.locator("tbody tr").all():
        label = body_row.locator("th").inner_text()
        counts = [int(c) for c in body_row.locator("td").all_inner_texts()]
        assert counts == expected.loc[label].tolist(), label
    assert sorted(table.locator("tbody th").all_inner_texts()) == sorted(expected.index)
    expect(page.locator("#explorer-summary")).to_contain_text(f"{int(expected.values.sum())} rows")


def test_intake_page_at_both_widths(page: Page, live_server: str, screenshot_dir: Path) -> None:
    sign_in(page, live_server)
    page.goto(f"{live_server}/intakes/{intake_id(page, live_server, LANDINGS)}")
    for _ in range(30):
        page.mouse.wheel(0, 900)
        page.wait_for_timeout(50)
    page.wait_for_function(
        "() => [...document.querySelectorAll('[data-figure]')].filter(e => e.offsetParent)"
        ".every(e => e.dataset.state === 'drawn' && e.querySelector('.main-svg'))"
    )
    page.evaluate("window.scrollTo(0, 0)")
    screenshot_widths(page, screenshot_dir, "intake")


def test_downloads_from_the_intake_page(page: Page, live_server: str) -> None:
    sign_in(page, live_server)
    page.goto(f"{live_server}/intakes/{intake_id(page, live_server, LANDINGS)}")
    with page.expect_download() as caught:
        page.get_by_role("link", name="column summary (CSV)").click()
    summary = caught.value
    assert summary.suggested_filename == f"{LANDINGS}.columns.csv"
    rows = list(csv.reader(io.StringIO(Path(summary.path()).read_text(encoding="utf-8-sig"))))
    assert rows[0][:3] == ["position", "name", "kind"]
    assert [r[1] for r in rows[1:]] == list(demo_frame(LANDINGS).columns)
    with page.expect_download() as caught:
        page.get_by_role("link", name="standalone report (HTML)").click()
    report = Path(caught.value.path()).read_text(encoding="utf-8")
    assert "Tidewaiter intake report" in report and "price_per_kg" in report
    profile = page.request.get(
        f"{live_server}/api/v1/intakes/{intake_id(page, live_server, LANDINGS)}/profile"
    )
    assert profile.json()["dataset"]["rows"] == len(demo_frame(LANDINGS))


def test_choosing_another_baseline_compares_against_it(page: Page, live_server: str) -> None:
    sign_in(page, live_server)
    april = intake_id(page, live_server, "gullwick-2031-04.csv")
    page.goto(f"{live_server}/intakes/{intake_id(page, live_server, 'gullwick-2031-05.csv')}")
    changes = page.locator("#changes")
    # By default the baseline is the last accepted delivery: March (April was rejected).
    expect(changes).to_contain_text("gullwick-2031-03.csv")
    page.get_by_label("Compare with").select_option(str(april))
    changes.get_by_role("button", name="Compare").click()
    expect(changes.get_by_role("link", name=f"#{april} gullwick-2031-04.csv")).to_be_visible()
    drift = page.locator("[data-figure=fig-drift]")
    drift.scroll_into_view_if_needed()
    expect(drift.locator(".main-svg").first).to_be_attached()


def test_intake_page_follows_profiling_until_the_result(page: Page, live_server: str) -> None:
    sign_in(page, live_server)
    rng = np.random.default_rng(8)
    # Wide enough that profiling takes a moment: 120 invented gauge columns.
    frame = pd.DataFrame({f"gauge_{i:03d}": rng.normal(5, 1, 8000).round(3) for i in range(120)})
    csrf = page.locator("meta[name=csrf-token]").get_attribute("content") or ""
    answer = page.request.post(
        f"{live_server}/api/v1/intakes",
        headers={"X-CSRF-Token": csrf, "Origin": live_server},
        multipart={
            "supplier": "Saltmere water-quality lab",
            "file": {
                "name": "gauges.csv",
                "mimeType": "text/csv",
                "buffer": frame.to_csv(index=False).encode(),
            },
        },
    )
    assert answer.status == 201, answer.text()
    page.goto(f"{live_server}/intakes/{answer.json()['id']}")
    # Profiling such a file takes seconds; the page, opened at once, shows its progress.
    expect(page.locator("#job-progress")).to_be_visible()
    expect(page.locator("#job-text")).to_contain_text(" %")
    # The page reloads itself when the worker is done: no manual reload.
    expect(page.get_by_role("heading", name="Verdict")).to_be_visible(timeout=120_000)
    expect(page.locator("article.card")).to_have_count(120)
