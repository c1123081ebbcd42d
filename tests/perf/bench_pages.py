"""Benchmark of the pages in a real browser: a 300-column intake page, a 10,000-intake list.

Run on demand: ``.venv/bin/python tests/perf/bench_pages.py``. It starts a server on
a fresh data folder with the demo accounts, uploads an invented 300-column file,
plants 10,000 more intakes, and prints, measured in the same run:

- the 300-column intake page: time to its first byte, first paint and
  DOMContentLoaded, and how long a card far down takes to draw once scrolled to
  (cards fetch their figures as they come near);
- the intake list: server time for the first page and for the last page of
  10,000 intakes, and their ratio (offset paging should not make the last page slow).
"""

from __future__ import annotations

import io
import statistics
import sys
import tempfile
import time
from datetime import UTC, datetime, timedelta
from pathlib import Path

import numpy as np
import pandas as pd
from playwright.sync_api import sync_playwright

REPO = Path(__file__).resolve().parents[2]
sys.path.insert(0, str(REPO))

from server.store import Intake, IntakeStatus, Profile, Supplier, session_scope  # noqa: E402
from tests.browser.conftest import (  # noqa: E402
    CHROMIUM,
    CHROMIUM_ARGS,
    DEMO_PASSWORD,
    start_server,
)


def wide_csv(columns: int = 300, rows: int = 2000, seed: int = 5) -> bytes:
    """An invented wide file: numeric, label and date columns in turn."""
    rng = np.random.default_rng(seed)
    data = {}
    for i in range(columns):
        if i % 3 == 0:
            data[f"gauge_{i:03d}"] = rng.normal(10, 3, rows).round(3)
        elif i % 3 == 1:
            data[f"berth_{i:03d}"] = rng.choice(["north", "south", "east", "west", "dock"], rows)
        else:
            data[f"count_{i:03d}"] = rng.poisson(4, rows)
    buffer = io.StringIO()
    pd.DataFrame(data).to_csv(buffer, index=False)
    return buffer.getvalue().encode()


def plant_intakes(settings, count: int = 10_000) -> None:
    with session_scope(settings) as session:
        supplier = Supplier(name="Planted pier office")
        session.add(supplier)
        session.flush()
        start = datetime(2030, 1, 1, tzinfo=UTC)
        for n in range(count):
            intake = Intake(
                supplier_id=supplier.id,
                original_name=f"planted-{n:05d}.csv",
                sha256=f"{n:064d}",
                bytes=1000,
                status=IntakeStatus.ready,
                created_at=start + timedelta(minutes=n),
            )
            session.add(intake)
            if n % 500 == 0:
                session.flush()
        session.flush()
        for intake in session.query(Intake).filter(Intake.supplier_id == supplier.id):
            session.add(
                Profile(
                    intake_id=intake.id,
                    format_version=1,
                    document={"flags": []},
                    rows=100,
                    columns=5,
                    overall_score=float(intake.id % 100),
                )
            )


def main() -> None:
    with tempfile.TemporaryDirectory() as folder, start_server(Path(folder)) as (base, settings):
        plant_intakes(settings)
        with sync_playwright() as playwright:
            browser = playwright.chromium.launch(executable_path=str(CHROMIUM), args=CHROMIUM_ARGS)
            page = browser.new_page(viewport={"width": 1280, "height": 900})
            page.goto(f"{base}/sign-in")
            page.get_by_label("Name").fill("demo-reviewer")
            page.get_by_label("Password").fill(DEMO_PASSWORD)
            page.get_by_role("button", name="Sign in").click()
            page.wait_for_url(f"{base}/")
            csrf = page.locator("meta[name=csrf-token]").get_attribute("content")
            answer = page.request.post(
                f"{base}/api/v1/intakes",
                headers={"X-CSRF-Token": csrf or "", "Origin": base},
                multipart={
                    "supplier": "Planted pier office",
                    "file": {"name": "wide.csv", "mimeType": "text/csv", "buffer": wide_csv()},
                },
            )
            intake = answer.json()["id"]
            deadline = time.monotonic() + 300
            while page.request.get(f"{base}/api/v1/intakes/{intake}").json()["status"] != "ready":
                if time.monotonic() > deadline:
                    raise SystemExit("the wide file was not profiled in 5 minutes")
                time.sleep(0.5)

            served, painted, ready, scrolled = [], [], [], []
            for _ in range(3):
                page.goto(f"{base}/intakes/{intake}", wait_until="load")
                timing = page.evaluate(
                    "() => { const n = performance.getEntriesByType('navigation')[0];"
                    " const p = performance.getEntriesByType('paint');"
                    " return [n.responseStart, p.length ? p[p.length - 1].startTime : NaN,"
                    " n.domContentLoadedEventEnd]; }"
                )
                served.append(timing[0] / 1000)
                painted.append(timing[1] / 1000)
                ready.append(timing[2] / 1000)
                began = time.perf_counter()
                page.locator("#col-150").scroll_into_view_if_needed()
                page.locator("[data-figure=fig-col-150] .main-svg").first.wait_for(state="attached")
                scrolled.append(time.perf_counter() - began)
            cards = page.locator("article.card").count()
            inline = page.locator("script[id^=fig-col-]").count()
            print(f"300-column intake page ({cards} column cards, {inline} figures inline),")
            print("median of 3 loads, seconds from navigation start:")
            print(f"  first byte of the page   {statistics.median(served):6.2f}")
            print(f"  first contentful paint   {statistics.median(painted):6.2f}")
            print(f"  DOMContentLoaded         {statistics.median(ready):6.2f}  (scripts run)")
            print(f"  card 150 drawn after scrolling to it: {statistics.median(scrolled):6.2f}")

            def server_time(url: str) -> float:
                times = []
                for _ in range(5):
                    began = time.perf_counter()
                    assert page.request.get(url).ok
                    times.append(time.perf_counter() - began)
                return statistics.median(times)

            first = server_time(f"{base}/")
            last = server_time(f"{base}/?page=201")
            scored = server_time(f"{base}/?sort=score&page=150")
            print("intake list of 10,004 intakes (median of 5 requests):")
            print(
                f"  first page {first * 1000:6.1f} ms, last page {last * 1000:6.1f} ms,"
                f" by score page 150 {scored * 1000:6.1f} ms; last / first = {last / first:.2f}"
            )
            browser.close()


if __name__ == "__main__":
    main()
