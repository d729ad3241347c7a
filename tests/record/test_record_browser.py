"""Open the record sheet in headless Chromium, offline, and look at it."""

from __future__ import annotations

import os
from pathlib import Path

import pytest
import record_fake_study as fake

CHROMIUM = "/usr/bin/chromium"
ROOT = Path(__file__).resolve().parents[2]
ARGS = ["--headless", "--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run",
        "--disable-background-networking", "--disable-component-update", "--disable-sync"]
LOCAL = ("file:", "data:", "blob:", "about:")

pytestmark = [
    pytest.mark.browser,
    pytest.mark.skipif(not os.path.exists(CHROMIUM), reason=f"{CHROMIUM} is missing"),
]

# printable width at 96 px/in with the sheet's 15 mm margins (A4 210 mm, Letter 8.5 in)
PRINT_WIDTH_PX = {"A4": round((210 - 30) / 25.4 * 96), "Letter": round((215.9 - 30) / 25.4 * 96)}


@pytest.fixture(scope="module")
def record_html(tmp_path_factory):
    go = pytest.importorskip("plotly.graph_objects")
    figs = []
    for i in range(2):
        fig = go.Figure(go.Scatter(x=[0, 10, 20, 30], y=[30, 28 - i, 22, 12], name="pump"))
        fig.update_layout(title_text=f"curve {i} </script><script>alert('fig')</script>")
        figs.append(fig)
    return fake.write_fake_record(tmp_path_factory.mktemp("rec"), figures=figs)[0]


def test_record_opens_offline_and_prints(record_html, tmp_path, playwright_driver):
    attempted, dialogs, console = [], [], []
    # one Playwright driver per session (tests/conftest.py)
    ctx = playwright_driver.chromium.launch_persistent_context(
        str(tmp_path / "profile"), executable_path=CHROMIUM, headless=True, args=ARGS,
        offline=True, viewport={"width": 1100, "height": 900})
    try:
        def guard(route):
            url = route.request.url
            if url.startswith(LOCAL):
                route.continue_()
            else:
                attempted.append(url)
                route.abort()

        ctx.route("**/*", guard)
        page = ctx.new_page()
        page.on("dialog", lambda d: (dialogs.append(d.message), d.dismiss()))
        page.on("console", lambda m: console.append(m.text))
        page.on("request", lambda r: None if r.url.startswith(LOCAL)
                else attempted.append(r.url))
        page.goto(record_html.as_uri(), wait_until="load")
        page.wait_for_selector(".figure .js-plotly-plot .main-svg", state="visible")
        assert page.locator(".js-plotly-plot").count() == 2

        inputs = page.locator("table.inputs-table")
        assert inputs.is_visible()
        assert inputs.locator("tbody tr").count() >= 10
        cell = inputs.locator("td", has_text="Cooling water header")
        assert cell.first.inner_text() == "Cooling water header <script>alert(1)</script>"
        assert page.locator("table.results-table").is_visible()

        out = ROOT / "artifacts"
        out.mkdir(exist_ok=True)
        page.screenshot(path=str(out / "record.png"), full_page=True)

        page.emulate_media(media="print")
        for paper, width in PRINT_WIDTH_PX.items():
            page.set_viewport_size({"width": width, "height": 1000})
            page.evaluate("window.dispatchEvent(new Event('beforeprint'))")
            over = page.evaluate(
                "document.documentElement.scrollWidth - document.documentElement.clientWidth")
            assert over <= 1, f"{paper}: content {over}px wider than the printable width"
            pdf = page.pdf(format=paper, print_background=True)
            assert pdf.startswith(b"%PDF") and pdf.count(b"/Type /Page") >= 2
    finally:
        ctx.close()
    assert attempted == [], f"network requests attempted: {attempted}"
    assert dialogs == [], f"script from user text ran: {dialogs}"
    assert not [m for m in console if "Content Security Policy" in m or "Refused" in m], console
    assert (ROOT / "artifacts" / "record.png").stat().st_size > 10_000
