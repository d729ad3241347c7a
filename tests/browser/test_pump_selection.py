"""The pump-selection notebook in a real browser: run all, edit a pump point and the liquid
temperature through the DOM, and see the operating points, NPSH and tables change.

Waits are on DOM state (the chart's trace paths and marker positions, the table text), never
sleeps. Screenshots of each section go to ``artifacts/``.
"""

import urllib.error

import pytest

pytestmark = pytest.mark.browser

NOTEBOOK = "notebooks/pump_selection.ipynb"

_SIG = """(sel) => [...document.querySelectorAll(sel)]
  .map(p => (p.getAttribute('transform') || '') + (p.getAttribute('d') || '')).join('|')"""
_CHANGED = """([sel, old]) => {
  const now = [...document.querySelectorAll(sel)]
    .map(p => (p.getAttribute('transform') || '') + (p.getAttribute('d') || '')).join('|');
  return now !== old && now.length > 0;
}"""
LINES = ".hl-pump-chart .scatterlayer .trace path.js-line"
POINTS = ".hl-pump-chart .scatterlayer .trace path.point"
_TEXT_CHANGED = """([sel, old]) => {
  const e = [...document.querySelectorAll(sel)].at(-1);   // the narrative cell's view
  return e !== null && e.textContent !== old;
}"""


def _shot(page, selector, artifacts, name):
    # the narrative cell's view (last): the workspace shows some of these in hidden tabs
    el = page.locator(selector).last
    el.scroll_into_view_if_needed()
    el.screenshot(path=str(artifacts / f"{name}.png"))


def test_edit_pump_point_and_temperature(page, open_and_run, artifacts):
    console = []
    page.on("console", lambda m: console.append(f"{m.type}: {m.text}"))
    try:
        _run(page, open_and_run, artifacts)
    except Exception:
        page.screenshot(path=str(artifacts / "pump_selection_failure.png"))
        state = page.evaluate("""() => ({
          charts: document.querySelectorAll('.hl-pump-chart').length,
          plots: document.querySelectorAll('.hl-pump-chart .js-plotly-plot').length,
          lines: document.querySelectorAll('.hl-pump-chart .scatterlayer .trace path.js-line').length,
          points: document.querySelectorAll('.hl-pump-chart .scatterlayer .trace path.point').length})""")
        console.append(f"DOM state at failure: {state}")
        (artifacts / "pump_selection_console.txt").write_text("\n".join(console))
        raise


def _open(page, open_and_run):
    """Open and run all, retrying a 500 from the server's kernel list: jupyter_server answers
    500 to GET /api/kernels while a kernel is still starting ('last_activity' not yet set),
    which the shared harness does not retry yet."""
    for attempt in range(3):
        try:
            return open_and_run(page, NOTEBOOK, timeout=240)
        except urllib.error.HTTPError as exc:
            if exc.code != 500 or attempt == 2:
                raise
    return None


def _see(page, selector, which="first"):
    """Scroll a chart's cell into view and wait until its plot is drawn: JupyterLab lays out
    (and so sizes) only the cells near the view, and a chart is drawn once it has a size."""
    loc = getattr(page.locator(selector), which)
    loc.scroll_into_view_if_needed()
    loc.locator(".js-plotly-plot .main-svg").first.wait_for(timeout=60_000)


def _run(page, open_and_run, artifacts):
    _open(page, open_and_run)
    _see(page, ".hl-pump-chart")
    page.wait_for_selector(".hl-pump-chart .js-plotly-plot .main-svg")
    page.wait_for_selector(POINTS)
    page.wait_for_selector(".hl-candidates table")
    _shot(page, ".hl-pump-chart", artifacts, "pump_selection_chart")
    _shot(page, ".hl-candidates", artifacts, "pump_selection_candidates")
    _shot(page, ".hl-control", artifacts, "pump_selection_control")
    _shot(page, ".hl-pump-inputs", artifacts, "pump_selection_inputs")

    # 1. a datasheet point of the first candidate (KR-A): head at the 4th point 70 -> 75 m
    lines0 = page.evaluate(_SIG, LINES)
    points0 = page.evaluate(_SIG, POINTS)
    table0 = page.locator(".hl-candidates").last.text_content()
    assert "KR-A end-suction 1480 rpm" in table0 and "PASS (recommended)" in table0
    cell = page.locator(".hl-pump-editor .hl-point-row").nth(3).locator(
        ".hl-point-head input")
    assert cell.input_value() == "70"
    cell.fill("75")
    cell.press("Enter")
    page.locator(".hl-pump-chart").first.scroll_into_view_if_needed()
    page.wait_for_function(_CHANGED, arg=[LINES, lines0], polling="raf", timeout=30_000)
    page.wait_for_function(_CHANGED, arg=[POINTS, points0], polling="raf", timeout=30_000)
    page.wait_for_function(_TEXT_CHANGED, arg=[".hl-candidates", table0], timeout=30_000)
    table1 = page.locator(".hl-candidates").last.text_content()
    assert table1 != table0
    assert page.locator(".hl-pump-inputs .hl-error").last.text_content() == ""

    # 2. the liquid's highest temperature 28 -> 60 degC: NPSH available falls
    lines1 = page.evaluate(_SIG, LINES)
    pts_table0 = page.locator(".hl-points").last.text_content()
    assert "60 °C" not in pts_table0
    box = page.locator(".hl-temp-max input").first
    box.fill("60 degC")
    box.press("Enter")
    page.locator(".hl-pump-chart").first.scroll_into_view_if_needed()
    page.wait_for_function(_CHANGED, arg=[LINES, lines1], polling="raf", timeout=30_000)
    page.wait_for_function(
        "() => [...document.querySelectorAll('.hl-points')].at(-1).textContent.includes('60 °C')",
        timeout=30_000)
    # the echo of the box typed into (the later view of the same field is laid out by
    # JupyterLab only when scrolled near)
    page.wait_for_function(
        "() => [...document.querySelectorAll('.hl-temp-max .hl-echo')]"
        ".some(e => e.textContent.includes('= 60.00 °C'))", timeout=30_000)
    _shot(page, ".hl-pump-chart", artifacts, "pump_selection_chart_edited")
    _shot(page, ".hl-pump-inputs", artifacts, "pump_selection_inputs_edited")

    # 3. a refused entry keeps the text and shows the kit's message beside the table
    cell = page.locator(".hl-pump-editor .hl-point-row").nth(2).locator(
        ".hl-point-head input")
    cell.fill("-5")
    cell.press("Enter")
    page.wait_for_function(
        "() => document.querySelector('.hl-pump-editor .hl-point-error').textContent"
        ".includes('must be at least 0 m')", timeout=30_000)
    assert cell.input_value() == "-5"
    _shot(page, ".hl-pump-editor", artifacts, "pump_selection_editor_error")

    # 4. the duty demo's load profile: the hours of the first step 2600 -> 3200 h; the
    #    energy table follows (the staging chart, set and line profile are shot first)
    _see(page, ".hl-line-profile", "last")
    _see(page, ".hl-staging-chart", "last")
    _shot(page, ".hl-line-profile", artifacts, "pump_selection_line_profile")
    _shot(page, ".hl-pump-set", artifacts, "pump_selection_set")
    _shot(page, ".hl-staging-chart", artifacts, "pump_selection_staging")
    energy0 = page.locator(".hl-energy-table").last.text_content()
    assert "every running pump on a drive" in energy0
    box = page.locator(".hl-load-profile-row").last.locator(".hl-load-hours input")
    first = page.locator(".hl-load-profile").last.locator(".hl-load-hours input").first
    assert box.input_value() == "600 h" and first.input_value() == "2600 h"
    first.fill("3200 h")
    first.press("Enter")
    page.wait_for_function(_TEXT_CHANGED, arg=[".hl-energy-table", energy0], timeout=60_000)
    energy1 = page.locator(".hl-energy-table").last.text_content()
    assert energy1 != energy0 and "3,200" in energy1
    assert page.locator(".hl-load-profile .hl-error").last.text_content() == ""
    _shot(page, ".hl-energy-table", artifacts, "pump_selection_energy_edited")
    _shot(page, ".hl-load-profile", artifacts, "pump_selection_load_profile_edited")
