"""Supplier pages and the comparison page draw their figures and tables."""

from __future__ import annotations

from pathlib import Path

from playwright.sync_api import Page, expect

from tests.browser.conftest import screenshot_widths, sign_in

FISH = "Brannock Bay fishing cooperative"


def test_supplier_page_shows_timeline_column_history_and_deliveries(
    page: Page, live_server: str, screenshot_dir: Path
) -> None:
    sign_in(page, live_server)
    page.goto(f"{live_server}/suppliers")
    page.get_by_role("link", name=FISH).click()
    expect(page.get_by_role("heading", name=FISH)).to_be_visible()
    expect(page.locator("[data-figure=fig-timeline] .main-svg").first).to_be_attached()
    page.get_by_label("Column", exact=True).select_option("weight_kg")
    page.get_by_role("button", name="Show").click()
    figure = page.locator("[data-figure=fig-column-history]")
    figure.scroll_into_view_if_needed()
    expect(figure.locator(".main-svg").first).to_be_attached()
    expect(figure.locator(".legendtext", has_text="mean")).to_have_count(1)
    rows = page.locator("section", has_text="Deliveries").locator("tbody tr")
    expect(rows).to_have_count(2)  # the demo has two deliveries of this supplier
    screenshot_widths(page, screenshot_dir, "supplier")


def test_comparison_page_sets_two_intakes_side_by_side(
    page: Page, live_server: str, screenshot_dir: Path
) -> None:
    sign_in(page, live_server)
    page.goto(f"{live_server}/compare")
    expect(page.locator("#supplier-table tbody tr")).to_have_count(3)  # the demo's suppliers
    first = page.get_by_label("First (compared against)")
    second = page.get_by_label("Second")
    first.select_option(
        label=first.locator("option", has_text="brannock-landings-2031-w10").inner_text()
    )
    second.select_option(
        label=second.locator("option", has_text="brannock-landings-2031-w11").inner_text()
    )
    page.get_by_role("button", name="Compare").click()
    sides = page.locator("#sides .side")
    expect(sides).to_have_count(2)
    expect(sides.nth(0)).to_contain_text("w10")
    expect(sides.nth(1)).to_contain_text("w11")
    # w11 renamed vessel to vessel_code and brought squid: the drift says so.
    expect(page.locator("#pair")).to_contain_text("vessel_code")
    expect(page.locator("#pair")).to_contain_text("squid")
    drift = page.locator("[data-figure=fig-compare-drift]")
    drift.scroll_into_view_if_needed()
    expect(drift.locator(".main-svg").first).to_be_attached()
    screenshot_widths(page, screenshot_dir, "compare")
