"""Browser tests: Debian's chromium driven by playwright, and a live Tidewaiter server.

The browser is the system's ``/usr/bin/chromium`` (never a downloaded one). The
``page`` fixture fails its test on any console error or uncaught exception in
the page. ``live_server`` runs ``tidewaiter serve`` in a subprocess on a free
port with its own data folder, migrated first.
"""

from __future__ import annotations

import os
import socket
import subprocess
import sys
import time
from collections.abc import Iterator
from contextlib import contextmanager
from pathlib import Path

import httpx
import pytest
from playwright.sync_api import (
    Browser,
    ConsoleMessage,
    Error,
    Page,
    Response,
    sync_playwright,
)

from server.settings import Settings

CHROMIUM = Path("/usr/bin/chromium")
CHROMIUM_ARGS = [
    "--headless",
    "--no-sandbox",
    "--disable-gpu",
    "--disable-quic",
    "--no-first-run",
    "--disable-background-networking",
    "--disable-component-update",
    "--disable-sync",
]
REPO = Path(__file__).resolve().parents[2]
SCREENSHOTS = Path(os.environ.get("TIDEWAITER_SCREENSHOT_DIR", REPO / "var" / "screenshots"))
WIDTHS = (1280, 800)
"""Window widths every page is checked at."""


def pytest_collection_modifyitems(items: list[pytest.Item]) -> None:
    for item in items:
        if "tests/browser" in str(item.path):
            item.add_marker(pytest.mark.browser)


# Package scope: playwright's sync API keeps an event loop running in the main
# thread while it is open, which would break asyncio.run() in the tests after these.
@pytest.fixture(scope="package")
def browser() -> Iterator[Browser]:
    if not CHROMIUM.exists():
        pytest.fail("chromium is missing: `apt-get install -y chromium` (.ci/run does this)")
    with sync_playwright() as playwright:
        launched = playwright.chromium.launch(executable_path=str(CHROMIUM), args=CHROMIUM_ARGS)
        yield launched
        launched.close()


class PageProblems(list[str]):
    """Console errors and uncaught exceptions seen by a page."""


@pytest.fixture
def page_problems() -> PageProblems:
    return PageProblems()


def watch_page(page: Page, problems: PageProblems) -> Page:
    """Record the page's console errors and uncaught exceptions in ``problems``."""

    def on_console(message: ConsoleMessage) -> None:
        if message.type == "error":
            problems.append(f"console error: {message.text} at {message.location}")

    def on_error(error: Error) -> None:
        problems.append(f"uncaught exception: {error}")

    def on_response(response: Response) -> None:
        if response.status >= 400:
            try:
                body = response.text()[:300]
            except Error:
                body = "(no body)"
            problems.append(f"HTTP {response.status} from {response.url}: {body}")

    page.on("console", on_console)
    page.on("pageerror", on_error)
    page.on("response", on_response)
    return page


@pytest.fixture
def page(browser: Browser, page_problems: PageProblems) -> Iterator[Page]:
    """A fresh 1280 × 900 page; the test fails if the page logs any error."""
    context = browser.new_context(viewport={"width": 1280, "height": 900})
    opened = watch_page(context.new_page(), page_problems)
    yield opened
    context.close()
    assert not page_problems, "the page reported errors:\n" + "\n".join(page_problems)


@pytest.fixture
def new_page(browser: Browser, page_problems: PageProblems) -> Iterator:
    """A factory of further pages in their own contexts (another user's browser)."""
    contexts = []

    def make(width: int = 1280, height: int = 900) -> Page:
        context = browser.new_context(viewport={"width": width, "height": height})
        contexts.append(context)
        return watch_page(context.new_page(), page_problems)

    yield make
    for context in contexts:
        context.close()
    assert not page_problems, "a page reported errors:\n" + "\n".join(page_problems)


@pytest.fixture(scope="session")
def screenshot_dir() -> Path:
    SCREENSHOTS.mkdir(parents=True, exist_ok=True)
    return SCREENSHOTS


def screenshot_widths(page: Page, directory: Path, name: str, height: int = 900) -> list[Path]:
    """Full-page screenshots of ``page`` at every width of ``WIDTHS``."""
    paths = []
    for width in WIDTHS:
        page.set_viewport_size({"width": width, "height": height})
        page.wait_for_timeout(300)  # let plotly's responsive figures follow the new width
        path = directory / f"{name}-{width}.png"
        page.screenshot(path=str(path), full_page=True)
        paths.append(path)
    return paths


def _free_port() -> int:
    with socket.socket() as sock:
        sock.bind(("127.0.0.1", 0))
        return int(sock.getsockname()[1])


def server_environment(data_dir: Path) -> dict[str, str]:
    """The environment of a test server: its own data folder and embedded SQLite."""
    env = {k: v for k, v in os.environ.items() if not k.startswith("TIDEWAITER_")}
    env["TIDEWAITER_DATA_DIR"] = str(data_dir)
    env["TIDEWAITER_JOB_RUNNER"] = "inprocess"
    return env


@contextmanager
def start_server(data_dir: Path) -> Iterator[tuple[str, Settings]]:
    """Run ``tidewaiter serve`` on ``data_dir`` (migrated, demo loaded) until the block ends.

    Yields the base URL and settings that reach the same database.
    """
    env = server_environment(data_dir)
    command = [str(Path(sys.executable).with_name("tidewaiter"))]
    subprocess.run([*command, "db", "upgrade"], env=env, cwd=REPO, check=True, capture_output=True)
    # The demo scenario: its suppliers, deliveries and one account per role.
    subprocess.run([*command, "demo", "load"], env=env, cwd=REPO, check=True, capture_output=True)
    port = _free_port()
    log_path = data_dir / "server.log"
    with log_path.open("w") as log:
        process = subprocess.Popen(
            [*command, "serve", "--port", str(port), "--log-level", "warning"],
            env=env,
            cwd=REPO,
            stdout=log,
            stderr=subprocess.STDOUT,
        )
        try:
            base = f"http://127.0.0.1:{port}"
            deadline = time.monotonic() + 30
            while True:
                try:
                    if httpx.get(f"{base}/healthz", timeout=1).status_code < 500:
                        break
                except httpx.HTTPError:
                    pass
                if process.poll() is not None or time.monotonic() > deadline:
                    raise RuntimeError("the test server did not start:\n" + log_path.read_text())
                time.sleep(0.2)
            database = f"sqlite:///{data_dir / 'tidewaiter.sqlite3'}"
            yield base, Settings(data_dir=data_dir, database_url=database)
        finally:
            process.terminate()
            try:
                process.wait(timeout=10)
            except subprocess.TimeoutExpired:
                process.kill()


@pytest.fixture(scope="package")
def live_server(tmp_path_factory: pytest.TempPathFactory) -> Iterator[str]:
    """The base URL of a running ``tidewaiter serve`` loaded with the demo scenario."""
    with start_server(tmp_path_factory.mktemp("live-server")) as (base, _settings):
        yield base


DEMO_PASSWORD = "harbour-demo-only"
"""The demo accounts' published password (server.security.demo_accounts)."""


def sign_in(page: Page, base: str, name: str = "demo-reviewer") -> Page:
    """Sign ``page`` in as the demo account ``name``."""
    page.goto(f"{base}/sign-in")
    page.get_by_label("Name").fill(name)
    page.get_by_label("Password").fill(DEMO_PASSWORD)
    page.get_by_role("button", name="Sign in").click()
    page.wait_for_url(f"{base}/")
    return page


def intake_id(page: Page, base: str, name: str) -> int:
    """The id of the intake whose file is ``name``, read from the intake list."""
    page.goto(f"{base}/?name={name}")
    href = page.get_by_role("link", name=name, exact=True).first.get_attribute("href")
    assert href is not None
    return int(href.rsplit("/", 1)[-1])
