"""The line-sizing notebook in a real browser: run all, change the profile's size and the
design flow through the DOM, check that the table and the charts change; measure the round
trip (Enter in the design-flow box -> redrawn velocity chart) over ~10 changes.

Latency is written to ``artifacts/latency_line_sizing.json`` and printed. Screenshots go to
``artifacts/line_sizing_*.png``.
"""

import json
import statistics

import pytest

pytestmark = pytest.mark.browser

NOTEBOOK = "notebooks/line_sizing.ipynb"

#: Every trace path of a chart, joined: changes when any drawn line changes.
_PATHS = """(sel) => [...document.querySelectorAll(sel + ' .js-plotly-plot .scatterlayer path.js-line')]
  .map(p => p.getAttribute('d')).join('|')"""
_PATHS_CHANGED = """([sel, old]) => {
  const now = [...document.querySelectorAll(sel + ' .js-plotly-plot .scatterlayer path.js-line')]
    .map(p => p.getAttribute('d')).join('|');
  if (now && now !== old) return performance.now();
  return false;
}"""
_TEXT_CHANGED = """([sel, old]) => {
  const el = document.querySelector(sel);
  return el && el.textContent !== old;
}"""

V_CHART = ".hl-velocity-chart"
PROFILE = ".hl-profile-chart"
TABLE = ".hl-candidates table.hl-results"
FLOW = ".hl-flow-design input"


def _text(page, sel):
    """textContent (JupyterLab skips rendering off-screen cells, so innerText may be '')."""
    return page.evaluate("(sel) => { const e = document.querySelector(sel); "
                         "return e ? e.textContent : ''; }", sel)


def _paths(page, sel):
    return page.evaluate(_PATHS, sel)


def test_line_sizing_notebook_in_the_browser(lab, page, open_and_run, screenshot, artifacts):
    timings = open_and_run(page, NOTEBOOK, timeout=240)
    for sel in (V_CHART, PROFILE):
        page.wait_for_selector(f"{sel} .js-plotly-plot .main-svg")
        page.wait_for_selector(f"{sel} .scatterlayer path.js-line")
    page.wait_for_selector(TABLE)
    assert "◀ recommended" in _text(page, TABLE)
    screenshot(page, "line_sizing_start")

    # 1) the profile's size dropdown: another size redraws the profile and its findings
    old_profile = _paths(page, PROFILE)
    old_heading = page.evaluate("() => { const s = document.querySelector('.hl-profile-size "
                                "select'); return s.options[s.selectedIndex].textContent"
                                ".replace(/\\u00a0/g, ' '); }")
    labels = page.evaluate("() => [...document.querySelectorAll('.hl-profile-size select option')]"
                           ".map(o => o.textContent.replace(/\\u00a0/g, ' '))")
    page.locator(".hl-profile-size select").select_option(
        index=[i for i, lbl in enumerate(labels) if lbl.startswith("NPS 8 ")][0])
    page.wait_for_function(_PATHS_CHANGED, arg=[PROFILE, old_profile], polling="raf")
    assert old_heading.startswith("NPS 5 ") and "recommended" in old_heading
    page.wait_for_function(
        "() => [...document.querySelectorAll('.hl-findings-table td')]"
        ".some(td => td.textContent.includes('NPS 8'))")

    # 2) the design flow: the candidates table and the velocity chart change
    old_table = _text(page, TABLE)
    old_v = _paths(page, V_CHART)
    box = page.locator(FLOW).first
    box.fill("300 gpm")
    box.press("Enter")
    page.wait_for_function(_TEXT_CHANGED, arg=[TABLE, old_table], polling="raf")
    page.wait_for_function(_PATHS_CHANGED, arg=[V_CHART, old_v], polling="raf")
    assert _text(page, TABLE) != old_table
    assert _text(page, ".hl-flow-design .hl-error") == ""

    # 3) round trip, median over 10 changes: Enter -> redrawn velocity chart
    samples = []
    for i in range(10):
        old = _paths(page, V_CHART)
        box.fill(f"{260 + 13 * i} gpm")
        t0 = page.evaluate("performance.now()")
        box.press("Enter")
        t1 = page.wait_for_function(_PATHS_CHANGED, arg=[V_CHART, old], polling="raf",
                                    timeout=30_000).json_value()
        samples.append(t1 - t0)
    echo = _text(page, ".hl-flow-design .hl-echo")
    assert echo.startswith("= 377")  # the last value typed, echoed by the kernel (gpm)

    # 4) bad text keeps the text and shows the kit's message beside the field
    box.fill("377 kg")
    box.press("Enter")
    page.wait_for_function(
        "() => document.querySelector('.hl-flow-design .hl-error').textContent"
        ".includes('needs a volumetric flow')")
    assert box.input_value() == "377 kg"
    page.wait_for_function(
        "() => document.querySelector('.hl-app-message').textContent.includes('last valid')")

    # 5) batch: the prefilled list is sized; a row in error is shown with its reason
    batch = _text(page, ".hl-batch-table")
    assert "HF-107" in batch and "ERROR" in batch and "HF-101" in batch
    page.locator(".hl-batch-run button, button.hl-batch-run").first.click()
    page.wait_for_function(
        "() => document.querySelector('.hl-batch').textContent.includes('8 lines sized')")

    page.locator(".hl-candidates").scroll_into_view_if_needed()
    screenshot(page, "line_sizing_after")
    page.locator(PROFILE).scroll_into_view_if_needed()
    page.screenshot(path=str(artifacts / "line_sizing_profile.png"))
    page.locator(".hl-batch").scroll_into_view_if_needed()
    page.screenshot(path=str(artifacts / "line_sizing_batch.png"))

    median = statistics.median(samples)
    result = {"median_ms": round(median, 1), "min_ms": round(min(samples), 1),
              "max_ms": round(max(samples), 1), "samples_ms": [round(s, 1) for s in samples],
              "change": "design flow typed + Enter -> velocity chart redrawn",
              "lab_start_s": round(lab.start_seconds, 2), "open_s": round(timings["open"], 2),
              "run_all_s": round(timings["run"], 2)}
    (artifacts / "latency_line_sizing.json").write_text(json.dumps(result, indent=2),
                                                         encoding="utf-8")
    print(f"\nline sizing: design flow change -> redrawn velocity chart: median {median:.1f} ms "
          f"over {len(samples)} changes (min {min(samples):.1f}, max {max(samples):.1f}); "
          f"open {timings['open']:.2f} s, run all {timings['run']:.2f} s")
    assert median < 3000, "round trip far slower than expected on this machine kind"
