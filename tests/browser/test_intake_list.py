"""The intake list: filters narrow it, badges show scores and flags."""

from __future__ import annotations

from pathlib import Path

from playwright.sync_api import Page, expect

from tests.browser.conftest import screenshot_widths, sign_in


def test_filters_narrow_the_list(page: Page, live_server: str, screenshot_dir: Path) -> None:
    sign_in(page, live_server)
    page.goto(live_server)
    rows = page.locator(".intake-list tbody tr")
    assert rows.count() >= 4  # the demo's four deliveries at least
    screenshot_widths(page, screenshot_dir, "intake-list")
    page.get_by_label("Supplier").select_option(label="Brannock Bay fishing cooperative")
    page.get_by_label("Order").select_option("score")
    page.get_by_role("button", name="Show").click()
    expect(rows).to_have_count(2)
    for row in rows.all():
        expect(row).to_contain_text("Brannock Bay fishing cooperative")
        expect(row.locator(".badge.status-ready")).to_have_count(1)
    page.get_by_label("File name contains").fill("w11")
    page.get_by_role("button", name="Show").click()
    expect(rows).to_have_count(1)
    expect(rows.first.locator(".flag-counts .badge").first).to_be_visible()
