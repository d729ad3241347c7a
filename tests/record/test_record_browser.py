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


# ------------------------------------------------------------------ printing on A4 and Letter

_BROKEN_WORDS_JS = """
() => {
  const bad = [];
  const walker = document.createTreeWalker(document.body, NodeFilter.SHOW_TEXT);
  let n;
  while ((n = walker.nextNode())) {
    const el = n.parentElement;
    if (!el || el.closest('script, style, .hash, pre, .js-plotly-plot, details')) continue;
    if (!el.getClientRects().length) continue;
    const re = /[A-Za-z]{2,}/g;
    let m;
    while ((m = re.exec(n.data))) {
      const r = document.createRange();
      r.setStart(n, m.index);
      r.setEnd(n, m.index + m[0].length);
      const lines = new Set(Array.from(r.getClientRects()).filter(x => x.width > 0)
                                 .map(x => Math.round(x.top)));
      if (lines.size > 1) bad.push(m[0]);
    }
  }
  return bad.slice(0, 20);
}
"""

_WIDEST_JS = """
() => {
  let worst = null, right = 0;
  for (const el of document.body.querySelectorAll('*')) {
    if (el.closest('details')) continue;
    const r = el.getBoundingClientRect();
    if (r.width && r.right > right) { right = r.right; worst = el.tagName + '.' + el.className; }
  }
  return [right, String(worst)];
}
"""


@pytest.fixture(scope="module")
def heavy_record_html(tmp_path_factory):
    """A record with the shapes that used to overflow: long subjects and key paths, a wide
    table, many findings with alternatives, and a figure laid out 1200 px wide with its legend
    beside the plot."""
    go = pytest.importorskip("plotly.graph_objects")
    from kit.core.findings import Finding, Severity
    from kit.record import build_record, write_record
    from kit.results import Alternative
    from kit.scenario import Scenario

    sc = fake.scenario()
    doc = dict(sc.doc)
    doc["route"] = dict(doc["route"], note=" ".join(["interconnecting"] * 40))
    doc["discharge_extra"] = {"segments": [{"fittings": [
        {"kind": "bend", "angle_of_the_bend_in_degrees": "90", "label": "long radius elbow"}]}]}
    res = fake.compute(sc)
    for pump in ("KR-A end-suction 1480 rpm", "KR-B split-case 2960 rpm, 365 mm impeller"):
        for cond in ("max static / 28 °C / aged", "min static / 4 °C / new"):
            for q in ("NPSH margin ratio", "flow / BEP flow", "shaft power at the last datasheet flow"):
                sev = Severity.FAIL if pump.startswith("KR-B") else Severity.PASS
                res.findings.append(Finding(sev, f"pump '{pump}' at {cond}", q, 1.234, "-",
                                            "POR 0.7–1.2, AOR 0.5–1.3", "preferred operating "
                                            "region of a rotodynamic pump", "guideline (from memory)"))
    res.selected = "pump 'KR-A end-suction 1480 rpm'"
    res.alternatives.append(Alternative("pump 'KR-B split-case 2960 rpm, 365 mm impeller'",
                                        "NPSH margin below the guideline at high temperature",
                                        "fail"))
    res.tables["operating_points"] = [
        {f"column_number_{i}_with_a_long_name": 1000.123456 * (i + 1) for i in range(14)}
        for _ in range(5)]
    fig = go.Figure([go.Scatter(x=[0, 100, 200, 300], y=[80, 76, 66, 50],
                                name=f"pump curve number {i} with a long legend entry")
                     for i in range(3)])
    fig.update_layout(width=1200, height=500, legend={"x": 1.02}, title_text="pump curves")
    rec = build_record(Scenario(doc, sc.source), res, figures=[fig])
    return write_record(rec, tmp_path_factory.mktemp("heavy"), "heavy")[0]


@pytest.mark.parametrize("paper", ["A4", "Letter"])
def test_record_prints_on_paper_without_overflow_or_broken_words(heavy_record_html, tmp_path,
                                                                 playwright_driver, paper):
    ctx = playwright_driver.chromium.launch_persistent_context(
        str(tmp_path / "profile"), executable_path=CHROMIUM, headless=True, args=ARGS,
        offline=True, viewport={"width": 1100, "height": 900})
    try:
        page = ctx.new_page()
        page.goto(heavy_record_html.as_uri(), wait_until="load")
        page.wait_for_selector(".figure .js-plotly-plot .main-svg", state="visible")
        page.emulate_media(media="print")
        width = PRINT_WIDTH_PX[paper]
        page.set_viewport_size({"width": width, "height": 1000})
        page.evaluate("window.dispatchEvent(new Event('beforeprint'))")
        page.wait_for_timeout(200)
        over = page.evaluate(
            "document.documentElement.scrollWidth - document.documentElement.clientWidth")
        right, widest = page.evaluate(_WIDEST_JS)
        assert over <= 1 and right <= width + 1, (
            f"{paper}: content reaches {right:.0f}px of {width}px ({widest})")
        svg = page.locator(".figure .js-plotly-plot .main-svg").first.bounding_box()
        assert svg["x"] >= 0 and svg["x"] + svg["width"] <= width + 1, svg
        broken = page.evaluate(_BROKEN_WORDS_JS)
        assert broken == [], f"{paper}: words broken across lines: {broken}"
        pdf = page.pdf(format=paper, print_background=True)
        assert pdf.startswith(b"%PDF") and pdf.count(b"/Type /Page") >= 3
        # the summary page stands alone: the findings start on a later page
        assert page.locator("section.summary-page").evaluate(
            "e => getComputedStyle(e).breakAfter") == "page"
        out = ROOT / "artifacts"
        out.mkdir(exist_ok=True)
        page.screenshot(path=str(out / f"record-print-{paper}.png"), full_page=True)
    finally:
        ctx.close()
