"""Upload through the page: bytes-sent progress, then the worker's, then the scorecard."""

from __future__ import annotations

from pathlib import Path

from playwright.sync_api import Page, expect

from tests.browser.conftest import intake_id, screenshot_widths, sign_in
from tests.browser.landings import write_landings

TIDE = "Gullwick tide-gauge station"


def test_upload_shows_the_scorecard_without_a_reload(
    page: Page, live_server: str, tmp_path: Path, screenshot_dir: Path
) -> None:
    sign_in(page, live_server)
    page.goto(f"{live_server}/upload")
    page.get_by_label("Supplier that sent the file").select_option(label=TIDE)
    page.locator("#up-file").set_input_files(write_landings(tmp_path / "harbour-day.csv"))
    expect(page.locator("#chosen-file")).to_contain_text("harbour-day.csv")
    page.get_by_role("button", name="Upload and profile").click()
    result = page.locator("#upload-result")
    expect(result).to_be_visible(timeout=120_000)
    assert page.locator("#send-progress").evaluate("bar => bar.value") == 1
    assert page.locator("#profile-progress").is_visible()
    expect(page.locator("#result-rows")).to_have_text("240")  # rows written by construction
    expect(page.locator("#result-columns")).to_have_text("7")
    assert page.locator("#result-score").inner_text().isdigit()
    expect(page.locator("#result-judgement")).to_contain_text("suggested:")
    screenshot_widths(page, screenshot_dir, "upload-done")
    page.locator("#result-link").click()
    expect(page.get_by_role("heading", name="harbour-day.csv")).to_be_visible()


def test_upload_errors_say_what_to_do(page: Page, live_server: str, tmp_path: Path) -> None:
    sign_in(page, live_server)
    page.goto(f"{live_server}/upload")
    button = page.get_by_role("button", name="Upload and profile")
    button.click()
    expect(page.locator("#upload-message")).to_have_text("Choose the supplier that sent the file.")
    page.get_by_label("Supplier that sent the file").select_option(label=TIDE)
    button.click()
    expect(page.locator("#upload-message")).to_have_text("Choose or drop a file first.")
    # Bytes that are no table: stored, then refused by the engine with its reason.
    garbage = tmp_path / "photo.csv"
    garbage.write_bytes(bytes(range(256)) * 40)
    page.locator("#up-file").set_input_files(garbage)
    button.click()
    message = page.locator("#upload-message")
    expect(message).to_contain_text("could not be read", timeout=60_000)
    expect(message).to_contain_text("Check that it is a CSV")
    # Its intake page says the same and offers to profile it again.
    page.goto(f"{live_server}/intakes/{intake_id(page, live_server, 'photo.csv')}")
    expect(page.get_by_role("heading", name="The file could not be profiled")).to_be_visible()
    expect(page.locator("#progress .error").first).to_contain_text("binary")
    expect(page.get_by_role("button", name="Profile it again")).to_be_visible()


def test_the_drop_zone_works_from_the_keyboard(page: Page, live_server: str, tmp_path: Path):
    # Listening from the start turns on the interception of file choosers well before
    # Enter is pressed: the listener of expect_file_chooser alone asks for it without
    # waiting, and a quick press could open the chooser before it was in place.
    page.on("filechooser", lambda chooser: None)
    sign_in(page, live_server)
    page.goto(f"{live_server}/upload")
    for _ in range(25):  # Tab through the page until the drop zone has the focus
        page.keyboard.press("Tab")
        if page.evaluate("document.activeElement.id") == "dropzone":
            break
    assert page.evaluate("document.activeElement.id") == "dropzone"
    outline = page.evaluate("getComputedStyle(document.activeElement).outlineStyle")
    assert outline == "solid"  # the focus is visible
    with page.expect_file_chooser() as chooser:
        page.keyboard.press("Enter")
    chooser.value.set_files(write_landings(tmp_path / "keyboard.csv"))
    expect(page.locator("#chosen-file")).to_contain_text("keyboard.csv")
