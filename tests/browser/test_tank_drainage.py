"""The tank-drainage notebook in a real browser: run all, change the outlet line's size and the
start level through the DOM, and check that the times table, the level chart's path and the
tank sketch change; measure the round trip (size chosen -> redrawn level chart).

Latency goes to ``artifacts/latency_tank_drainage.json``; screenshots to
``artifacts/tank_drainage_*.png``.
"""

import json
import statistics

import pytest

pytestmark = pytest.mark.browser

NOTEBOOK = "notebooks/tank_drainage.ipynb"

_ATTR_CHANGED = """([sel, attr, old]) => {
  const el = document.querySelector(sel);
  return el && el.getAttribute(attr) !== old;
}"""

LEVEL = ".hl-level-chart"
FLOW = ".hl-flow-chart"
TIMES = ".hl-drain-times table.hl-results"
SUMMARY = ".hl-drain-summary"
NOMINAL = ".hl-outlet-picker .hl-pipe-picker select"     # standard, nominal, schedule, material
LIQUID = ".hl-tank-sketch .hl-liquid"


def _pick_nominal(page, dom, label_start):
    dom.select_by_label(page.locator(NOMINAL).nth(1), label_start)


def _target_minutes(page) -> float:
    rows = page.evaluate(f"() => [...document.querySelectorAll('{TIMES} tbody tr')]"
                         ".map(r => [...r.cells].map(c => c.textContent))")
    target = [r for r in rows if r[0] == "target"][0]
    return float(target[3])       # 'time, as given [min]'


def test_tank_drainage_notebook_in_the_browser(lab, page, open_and_run, screenshot, artifacts,
                                               dom):
    timings = open_and_run(page, NOTEBOOK, timeout=240)
    dom.wait_charts_drawn(page, LEVEL, FLOW)
    page.wait_for_selector(TIMES)
    page.wait_for_selector(".hl-tank-sketch svg .hl-outlet")
    assert "NPS 3 dump line" in dom.text(page, SUMMARY)
    t_start = _target_minutes(page)
    assert t_start == pytest.approx(9.71, abs=0.01)      # the summary printed by nbval
    screenshot(page, "tank_drainage_start")

    # 1) the outlet size: NPS 2 -> NPS 1-1/2; the table and the level chart change
    old_table = dom.text(page, TIMES)
    old_level = dom.paths(page, LEVEL)
    _pick_nominal(page, dom, "NPS 1-1/2 ")
    dom.wait_text_changed(page, TIMES, old_table)
    dom.wait_paths_changed(page, LEVEL, old_level)
    t_small = _target_minutes(page)
    assert t_small > 1.5 * t_start, (t_start, t_small)
    assert "1-1/2" in dom.text(page, ".hl-outlet-picker .hl-pipe-info")
    assert dom.text(page, ".hl-app-message") == ""
    page.locator(TIMES).last.scroll_into_view_if_needed()
    screenshot(page, "tank_drainage_smaller_line")

    # 2) round trip over 9 changes: size chosen -> redrawn level chart
    samples = []
    for i in range(9):                    # ends on NPS 2, the scenario size
        old = dom.paths(page, LEVEL)
        label = "NPS 2 " if i % 2 == 0 else "NPS 1-1/2 "
        samples.append(dom.timed_change(page, lambda label=label: _pick_nominal(page, dom, label),
                                        dom.PATHS_CHANGED, [LEVEL, old]))
    page.wait_for_function(f"() => document.querySelector('{TIMES}').textContent"
                           f".includes('{t_start:.2f}')")

    # 3) the start level: the sketch's liquid and the times change
    old_y = page.get_attribute(LIQUID, "y")
    old_table = dom.text(page, TIMES)
    box = page.locator(".hl-level-start input").first
    box.fill("1.8 m")
    box.press("Enter")
    page.wait_for_function(_ATTR_CHANGED, arg=[LIQUID, "y", old_y], polling="raf")
    dom.wait_text_changed(page, TIMES, old_table)
    assert _target_minutes(page) < t_start
    assert "start 1.80 m" in dom.text(page, ".hl-tank-sketch")

    # 4) bad text keeps the text and shows the kit's message beside the field
    box.fill("1.8 kg")
    box.press("Enter")
    page.wait_for_function("() => document.querySelector('.hl-level-start .hl-error')"
                           ".textContent.includes('needs a length')")
    assert box.input_value() == "1.8 kg"
    page.wait_for_function("() => document.querySelector('.hl-app-message').textContent"
                           ".includes('last accepted')")

    page.locator(".hl-tank-picker").last.scroll_into_view_if_needed()
    page.screenshot(path=str(artifacts / "tank_drainage_tank.png"))
    page.locator(".hl-outlet-picker").last.scroll_into_view_if_needed()
    page.screenshot(path=str(artifacts / "tank_drainage_outlet.png"))
    page.locator(LEVEL).last.scroll_into_view_if_needed()
    page.screenshot(path=str(artifacts / "tank_drainage_charts.png"))
    page.locator(".hl-drain-findings").last.scroll_into_view_if_needed()
    page.screenshot(path=str(artifacts / "tank_drainage_findings.png"))
    screenshot(page, "tank_drainage_after")

    median = statistics.median(samples)
    result = dom.latency_summary(samples, open_s=round(timings["open"], 2),
                                 run_all_s=round(timings["run"], 2))
    (artifacts / "latency_tank_drainage.json").write_text(json.dumps(result, indent=2),
                                                          encoding="utf-8")
    print(f"\noutlet size -> redrawn level chart: median {median:.1f} ms over {len(samples)} "
          f"changes (min {min(samples):.1f}, max {max(samples):.1f}); open "
          f"{timings['open']:.2f} s, run all {timings['run']:.2f} s")
    assert median < 3000, "round trip far slower than expected on this machine kind"
