"""Security in the browser: sign-in, CSRF-carrying changes, and a hostile delivery whose
names and values hold markup and script: it is shown as text and nothing of it runs."""

from __future__ import annotations

import re
from collections.abc import Iterator
from pathlib import Path

import pytest
from playwright.sync_api import Browser, Page, expect

from tests.browser.conftest import DEMO_PASSWORD, sign_in, start_server

# Invented hostile delivery: every header and cell tries to run script in the page.
HOSTILE_CSV = (
    '"<script>window.__ran=1</script>",level_m,"<img src=x onerror=window.__ran=2>"\n'
    '"<svg onload=window.__ran=3>",2.1,"<b onmouseover=window.__ran=4>north</b>"\n'
    '"<svg onload=window.__ran=3>",2.4,"javascript:window.__ran=5"\n'
    '"<iframe src=javascript:window.__ran=6>",2.2,"<b onmouseover=window.__ran=4>north</b>"\n'
)


@pytest.fixture(scope="module")
def live_server(tmp_path_factory: pytest.TempPathFactory) -> Iterator[str]:
    """A server of this module's own: its hostile deliveries stay out of the shared demo."""
    with start_server(tmp_path_factory.mktemp("security-server")) as (base, _settings):
        yield base


def test_an_anonymous_visitor_is_sent_to_sign_in(page: Page, live_server: str) -> None:
    page.goto(f"{live_server}/intakes/1")
    expect(page).to_have_url(re.compile(r"/sign-in\?next=%2Fintakes%2F1$"))
    expect(page.get_by_text("may hold personal data")).to_be_visible()


def test_wrong_password_says_so_and_right_one_comes_back(page: Page, live_server: str) -> None:
    page.goto(f"{live_server}/sign-in?next=/upload")
    page.get_by_label("Name").fill("demo-viewer")
    page.get_by_label("Password").fill("not the password")
    page.get_by_role("button", name="Sign in").click()
    expect(page.get_by_role("alert")).to_have_text("The name or the password is not right.")
    page.get_by_label("Password").fill(DEMO_PASSWORD)
    page.get_by_role("button", name="Sign in").click()
    page.wait_for_url(f"{live_server}/upload")
    cookie = next(c for c in page.context.cookies() if c["name"] == "tidewaiter_session")
    assert cookie["httpOnly"] and cookie["sameSite"] == "Lax"
    assert page.evaluate("document.cookie").find("tidewaiter_session") == -1  # not readable


def test_a_hostile_delivery_runs_no_script(page: Page, live_server: str, tmp_path: Path) -> None:
    # An admin, so the delivery goes to a supplier of its own and leaves the demo's alone.
    sign_in(page, live_server, "demo-admin")
    hostile = tmp_path / "<img src=x onerror=window.__ran=7>.csv"
    hostile.write_text(HOSTILE_CSV, encoding="utf-8")
    page.goto(f"{live_server}/upload")
    page.locator("#up-supplier").select_option("new")
    page.locator("#up-new-supplier").fill('<b onclick="window.__ran=8">Hostile</b> test feed')
    page.locator("#up-file").set_input_files(str(hostile))
    page.get_by_role("button", name="Upload and profile").click()
    link = page.locator("#result-link")
    expect(link).to_be_visible(timeout=60_000)  # the upload carried the CSRF token
    link.click()
    page.wait_for_load_state("networkidle")
    # Hover everything that could carry a handler, then look for any trace of script.
    for element in page.locator("main *").all()[:400]:
        if element.is_visible():
            element.hover(timeout=1000, force=True)
    assert page.evaluate("window.__ran") is None
    assert page.locator("main script:not([src]):not([type='application/json'])").count() == 0
    assert page.locator("main img[src='x'], main svg[onload], main iframe").count() == 0
    expect(page.get_by_text("<script>window.__ran=1</script>").first).to_be_visible()


def test_a_viewer_cannot_upload_and_is_told_why(browser: Browser, live_server: str, tmp_path):
    # Its own page: the refused upload is a 403 in the console, which is the point here.
    page = browser.new_context().new_page()
    sign_in(page, live_server, "demo-viewer")
    delivery = tmp_path / "levels.csv"
    delivery.write_text("station,level_m\nnorth,2.1\n", encoding="utf-8")
    page.goto(f"{live_server}/upload")
    page.locator("#up-supplier").select_option(index=1)
    page.locator("#up-file").set_input_files(str(delivery))
    page.get_by_role("button", name="Upload and profile").click()
    expect(page.locator("#upload-message")).to_contain_text("viewer", timeout=10_000)
    page.context.close()


def test_tokens_are_shown_once_and_sign_out_ends_the_session(page: Page, live_server: str):
    sign_in(page, live_server, "demo-viewer")
    page.goto(f"{live_server}/account")
    page.get_by_label("Label").fill("nightly script")
    page.get_by_role("button", name="Create a token").click()
    token = page.locator("#new-token").inner_text()
    assert token.startswith("tw_")
    page.goto(f"{live_server}/account")
    assert token not in page.content()  # never shown again
    expect(page.get_by_role("cell", name="nightly script")).to_be_visible()
    page.get_by_role("button", name="Sign out").click()
    page.wait_for_url(f"{live_server}/sign-in")
    page.goto(f"{live_server}/")
    expect(page).to_have_url(re.compile(r"/sign-in"))


def test_the_api_description_draws_from_this_host_only(page: Page, live_server: str) -> None:
    sign_in(page, live_server, "demo-reviewer")
    foreign: list[str] = []
    page.on("request", lambda r: None if r.url.startswith(live_server) else foreign.append(r.url))
    page.goto(f"{live_server}/docs")
    expect(page.locator(".swagger-ui .title").first).to_contain_text("Tidewaiter", timeout=15_000)
    expect(page.get_by_text("/api/v1/intakes/{intake_id}/rows").first).to_be_visible()
    assert foreign == []  # no CDN: the Swagger UI files are served locally
