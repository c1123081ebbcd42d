"""The rules page in a browser: draft from an intake, see a mistake, fix it, save; read-only."""

from __future__ import annotations

import re
from pathlib import Path

from playwright.sync_api import Page, expect

from tests.browser.conftest import screenshot_widths, sign_in

LAB = "Saltmere water-quality lab"


def open_rules(page: Page, base: str) -> None:
    page.goto(f"{base}/suppliers")
    page.get_by_role("link", name=LAB).click()
    page.get_by_role("link", name="rules", exact=True).click()
    expect(page.get_by_role("heading", name=f"Rules of {LAB}")).to_be_visible()


def test_admin_drafts_checks_fixes_and_saves(
    page: Page, live_server: str, screenshot_dir: Path
) -> None:
    sign_in(page, live_server, "demo-admin")
    open_rules(page, live_server)
    editor = page.get_by_label("Rules (YAML)")
    # The lab's accepted deliveries come first in the list to draft from.
    expect(page.locator("#draft-intake option").first).to_contain_text("accepted")
    page.get_by_role("button", name="Draft").click()
    expect(page.locator("#rules-message")).to_contain_text("Drafted from intake")
    drafted = editor.input_value()
    assert "columns:" in drafted and "kind: numeric" in drafted
    page.get_by_role("button", name="Save as new version").click()
    page.wait_for_url(re.compile(r"saved=\d+"))
    first = int(re.search(r"saved=(\d+)", page.url).group(1))
    expect(page.get_by_role("heading", name=f"Version {first}")).to_be_visible()

    asked = []
    # Listening before the edit, not just before the click: playwright subscribes to
    # dialogs without waiting, and an unheard dialog is dismissed for us.
    page.once("dialog", lambda dialog: (asked.append(dialog.message), dialog.dismiss()))
    editor.fill(drafted.replace("kind: numeric", "kind: sometimes", 1))
    page.get_by_role("button", name="Draft").click()  # edits are not replaced unasked
    expect(editor).to_have_value(re.compile("kind: sometimes"))
    assert asked and "Replace your edits" in asked[0]
    page.get_by_role("button", name="Check").click()
    problems = page.locator("#problems li")
    expect(problems.first).to_be_visible()
    expect(problems.first).to_contain_text("kind")
    expect(page.locator("#rules-message")).to_contain_text("mistake, each listed under Mistakes")
    page.screenshot(path=str(screenshot_dir / "rules-mistake-1280.png"), full_page=True)
    page.get_by_role("button", name="Save as new version").click()  # refused: still mistakes
    expect(page.locator("#rules-message")).to_contain_text("mistake, each listed under Mistakes")
    assert f"saved={first}" in page.url

    editor.fill(drafted)
    page.get_by_label("What changed (note)").fill("as drafted, checked again")
    page.get_by_role("button", name="Check").click()
    expect(page.locator("#problems-empty")).to_contain_text("No mistakes")
    expect(problems).to_have_count(0)
    page.get_by_role("button", name="Save as new version").click()
    page.wait_for_url(re.compile(rf"saved={first + 1}\b"))
    expect(page.get_by_role("heading", name=f"Version {first + 1}")).to_be_visible()
    expect(page.locator("#rules-saved")).to_contain_text(f"Version {first + 1} saved.")
    expect(page.locator(".rules-versions li")).to_have_count(first + 1)
    expect(page.locator(".rules-versions li").first).to_contain_text("as drafted, checked again")
    screenshot_widths(page, screenshot_dir, "rules")  # rules-1280.png and rules-800.png

    saved_text = editor.input_value()  # as saved: defaults such as required: true dropped
    page.get_by_role("link", name=f"version {first}", exact=True).click()
    expect(page.get_by_role("heading", name=re.compile(f"^Version {first} "))).to_contain_text(
        "an earlier version"
    )
    assert editor.input_value() == saved_text  # both versions hold the same draft


def test_viewer_reads_the_rules_without_a_save_control(page: Page, live_server: str) -> None:
    sign_in(page, live_server, "demo-viewer")
    open_rules(page, live_server)
    expect(page.get_by_label(re.compile("Rules \\(YAML\\)"))).to_have_attribute("readonly", "")
    expect(page.get_by_role("button", name="Save as new version")).to_have_count(0)
    expect(page.get_by_role("button", name="Draft")).to_have_count(0)


def test_on_a_narrow_screen_the_mistakes_come_into_sight(
    new_page, live_server: str, screenshot_dir: Path
) -> None:
    page = new_page(800, 700)
    sign_in(page, live_server, "demo-admin")
    open_rules(page, live_server)
    heading = page.get_by_role("heading", name="Mistakes")
    expect(heading).not_to_be_in_viewport()  # below the editor at this width
    page.get_by_label("Rules (YAML)").fill("columns:\n  salinity_psu:\n    kind: sometimes\n")
    page.get_by_role("button", name="Check").click()
    expect(page.locator("#problems li").first).to_contain_text("kind")
    expect(heading).to_be_in_viewport()
    page.screenshot(path=str(screenshot_dir / "rules-mistake-800.png"))
