"""The workspace view of each notebook in a real browser, at 1366×768 and at 1920×1080 (issue 16).

For each notebook: run all, bring the workspace cell to the top of the notebook, then edit the
input the engineer steers — the design flow (line sizing), a datasheet point (pump selection),
the outlet size (tank drainage), a control valve's opening (network) — and check, at each
viewport size:

- the main chart is redrawn (its trace paths change) and the status line shows the new value;
- the edited field and the main chart are both inside the viewport, and neither the notebook
  nor the page scrolled to show them (scroll positions unchanged);
- no horizontal scroll of the page or of the notebook;
- the round trip (input applied -> chart redrawn) is recorded in
  ``artifacts/latency_workspace.json`` (a benchmark, not a pass mark): from the input's own
  event (the Enter key or the select's change, as the browser stamped it) to the animation
  frame that paints the new trace paths (see ``ARM``); also from the test driver's call
  (adds Playwright's time to type and deliver) and to a once-per-frame poll (which may see a
  fast redraw a frame after it was painted); with each change's chart
  timeline (``window.headlinePlotLog``: when each chart's change arrived, was drawn or was
  kept back out of view), so a slow change shows where its time went.

Screenshots: ``artifacts/workspace-<notebook>-<width>.png``; small copies for the README in
``docs/img/<notebook>.png`` (1366 wide, the workspace only).
"""

from __future__ import annotations

import json

import pytest

pytestmark = pytest.mark.browser

SIZES = ((1366, 768), (1920, 1080))
WS = ".hl-workspace"
CHART = f"{WS} .hl-workspace-chart"
STATUS = f"{WS} .hl-workspace-status"

#: The nearest scrolling ancestor of the workspace (JupyterLab's notebook scroller) and its
#: position, the page's scroll position and horizontal overflow of both.
SCROLLS = """(sel) => {
  const ws = document.querySelector(sel);
  let el = ws.parentElement;
  while (el && !(el.scrollHeight > el.clientHeight + 1 &&
                 /(auto|scroll)/.test(getComputedStyle(el).overflowY))) el = el.parentElement;
  const d = document.scrollingElement;
  return {nbTop: el ? el.scrollTop : 0, nbLeft: el ? el.scrollLeft : 0,
          nbWide: el ? el.scrollWidth - el.clientWidth : 0,
          pageTop: d.scrollTop, pageLeft: d.scrollLeft, pageWide: d.scrollWidth - d.clientWidth};
}"""

#: Bring the workspace to the top of the notebook's scroller.
TO_TOP = """(sel) => document.querySelector(sel).scrollIntoView({block: 'start'})"""

#: ``[sel, n]`` -> the bounding box of the n-th element matching ``sel`` and the viewport size.
BOX = """([sel, n]) => { const r = document.querySelectorAll(sel)[n].getBoundingClientRect();
  return {top: r.top, bottom: r.bottom, left: r.left, right: r.right,
          w: window.innerWidth, h: window.innerHeight}; }"""


#: Stamps the next input event the user makes (Enter in a text box, a select's change) into
#: ``window.__hlInputT``, starts the chart timeline ``window.headlinePlotLog`` and arms
#: ``window.__hlPaintT``: the time of the animation frame that paints the chart's new trace
#: paths. A MutationObserver on the chart sees the paths change; a change made inside an
#: animation-frame callback (the fast redraw's) is painted in that frame (its time: now),
#: one made in a task (a full redraw) in the next frame (the clock in that frame's
#: callback). A poll once per
#: frame, as the rest of the test does, may see the first case a frame late.
ARM = """(chart) => {
  window.__hlInputT = null;
  window.__hlPaintT = null;
  window.headlinePlotLog = [];
  if (!window.__hlArmed) {
    window.__hlArmed = true;
    const stamp = (e) => { if (window.__hlInputT === null) window.__hlInputT = e.timeStamp; };
    document.addEventListener('keydown', (e) => { if (e.key === 'Enter') stamp(e); }, true);
    document.addEventListener('change', stamp, true);
    // in a frame's callbacks and rendering: from this page's first frame callback (it
    // re-registers itself first in every frame) to a task posted from it (run after the
    // frame is painted)
    window.__hlInFrame = false;
    const ch = new MessageChannel();
    ch.port1.onmessage = () => { window.__hlInFrame = false; };
    const tick = () => { window.__hlInFrame = true; ch.port2.postMessage(0);
                         requestAnimationFrame(tick); };
    requestAnimationFrame(tick);
  }
  if (window.__hlObserver) window.__hlObserver.disconnect();
  const el = document.querySelector(chart);
  const paths = () => [...el.querySelectorAll('.js-plotly-plot .scatterlayer path.js-line')]
    .map((p) => p.getAttribute('d')).join('|');
  const old = paths();
  window.__hlObserver = new MutationObserver(() => {
    if (window.__hlPaintT !== null || window.__hlInputT === null || paths() === old) return;
    window.__hlObserver.disconnect();
    if (window.__hlInFrame) window.__hlPaintT = performance.now();
    // the clock in the callback, not its time stamp: Chromium stamps a frame when it is
    // begun, which can be before a busy main thread made the change
    else requestAnimationFrame(() => { window.__hlPaintT = performance.now(); });
  });
  window.__hlObserver.observe(el, {subtree: true, childList: true, attributes: true,
                                   attributeFilter: ['d']});
}"""


def inside(box) -> bool:
    return (box["top"] >= 0 and box["left"] >= 0 and box["bottom"] <= box["h"]
            and box["right"] <= box["w"] and box["bottom"] > box["top"])


def _edit_line_sizing(page, i):
    box = page.locator(f"{WS} .hl-flow-design input").first
    box.fill(f"{330 + 9 * i} gpm")             # 330..411 gpm: below the 420 gpm maximum
    box.press("Enter")
    return (f"{WS} .hl-flow-design input", 0), f"{330 + 9 * i} gpm"


def _edit_pump_selection(page, i):
    sel = f"{WS} .hl-pump-editor .hl-point-row .hl-point-head input"
    cell = page.locator(sel).nth(3)            # the 4th datasheet point's head
    cell.fill(f"{71 + 0.7 * i:.1f}")           # 71..77.3 m: below the 78 m of point 3
    cell.press("Enter")
    return (sel, 3), None


def _edit_tank_drainage(page, i):
    sel = f"{WS} .hl-outlet-picker .hl-pipe-picker select"
    select = page.locator(sel).nth(1)          # standard, nominal, schedule, material
    labels = select.evaluate("(s) => [...s.options].map(o => o.textContent"
                             ".replace(/\\u00a0/g, ' '))")
    want = "NPS 1-1/2 " if i % 2 == 0 else "NPS 2 "
    select.select_option(index=[k for k, lbl in enumerate(labels) if lbl.startswith(want)][0])
    return (sel, 1), None


#: The workspace's control valve 'TV-2' row (its fields are built on "edit") and its
#: opening box, tagged with ids.
_TV2 = """() => {
  const row = [...document.querySelectorAll('.hl-workspace .hl-link-row')].find((r) => {
    const s = r.querySelector('.hl-row-summary');
    return s && s.textContent.startsWith('TV-2 control valve');
  });
  if (!row) return false;
  row.id = 'hl-ws-tv2-row';
  const box = row.querySelector('.hl-opening input');
  if (box) box.id = 'hl-ws-tv2-opening';
  return !!box;
}"""


def _edit_network(page, i):
    if not page.evaluate(_TV2):
        page.locator("#hl-ws-tv2-row .hl-row-edit").click()
        page.wait_for_selector("#hl-ws-tv2-row .hl-opening input")
        assert page.evaluate(_TV2)
    box = page.locator("#hl-ws-tv2-opening")
    # between a throttled and an open valve: its branch's links change velocity class (the
    # links are drawn per class, so the drawn paths change)
    box.fill("35 %" if i % 2 == 0 else "75 %")
    box.press("Enter")
    return ("#hl-ws-tv2-opening", 0), None


CASES = {
    "line_sizing": ("notebooks/line_sizing.ipynb", _edit_line_sizing),
    "pump_selection": ("notebooks/pump_selection.ipynb", _edit_pump_selection),
    "tank_drainage": ("notebooks/tank_drainage.ipynb", _edit_tank_drainage),
    "network_systems": ("notebooks/network_systems.ipynb", _edit_network),
}


def _docs_image(page, name: str, artifacts) -> None:
    """A small PNG of the workspace for the README (docs/img/<name>.png, ≤ 150 kB)."""
    from pathlib import Path

    out = Path(__file__).resolve().parents[2] / "docs" / "img"
    out.mkdir(parents=True, exist_ok=True)
    path = out / f"{name}.png"
    page.locator(WS).first.screenshot(path=str(path), scale="css")
    size = path.stat().st_size
    assert size <= 150_000, f"{path} is {size} bytes: keep README images small"


#: The refusal's look: the field marked, its message red beside it, the chart stale.
REFUSED = """() => {
  const f = document.querySelector('.hl-workspace .hl-flow-design');
  const m = f.querySelector('.hl-error-text');
  const chart = document.querySelector('.hl-workspace .hl-bore-chart');
  const banner = document.querySelector('.hl-workspace .hl-stale-banner');
  // the field's mark and the results' stale mark arrive in separate widget messages
  if (!m || !f.classList.contains('hl-field-error') || !chart.classList.contains('hl-stale'))
    return null;
  return {text: m.textContent, color: getComputedStyle(m).color,
          border: getComputedStyle(f.querySelector('input')).borderTopColor,
          stale: chart.classList.contains('hl-stale'), banner: banner.textContent};
}"""


def _refusal_at_the_field(page, artifacts) -> None:
    """Issue 12: a design flow above the maximum is refused at the design-flow field (red,
    beside it), the chart is marked stale under a banner; the next good value clears both."""
    page.set_viewport_size({"width": 1366, "height": 768})
    page.evaluate(TO_TOP, WS)
    box = page.locator(f"{WS} .hl-flow-design input").first
    box.fill("500 gpm")                      # the maximum flow is 420 gpm
    box.press("Enter")
    shown = page.wait_for_function(REFUSED, timeout=30_000).json_value()
    assert "'design flow' must be at most the maximum flow 420 gpm, not 500 gpm" in \
        shown["text"]
    assert shown["color"] == "rgb(179, 38, 30)" and shown["border"] == "rgb(179, 38, 30)"
    assert shown["stale"] and "results are for the last accepted inputs" in shown["banner"]
    assert page.evaluate("() => document.querySelector('.hl-workspace .hl-flow-max')"
                         ".classList.contains('hl-field-error')") is False
    page.screenshot(path=str(artifacts / "workspace-line_sizing-refused-1366.png"))
    box.fill("350 gpm")
    box.press("Enter")
    page.wait_for_function("() => !document.querySelector('.hl-workspace .hl-bore-chart')"
                           ".classList.contains('hl-stale') && !document.querySelector("
                           "'.hl-workspace .hl-flow-design').classList.contains('hl-field-error')",
                           timeout=30_000)


@pytest.mark.parametrize("name", list(CASES))
def test_workspace_keeps_the_field_and_the_chart_on_one_screen(name, lab, page, open_and_run,
                                                              dom, artifacts):
    notebook, edit = CASES[name]
    page.set_viewport_size({"width": SIZES[0][0], "height": SIZES[0][1]})
    open_and_run(page, notebook, timeout=240)
    page.evaluate(TO_TOP, WS)                 # Run All left the notebook at its last cell
    page.wait_for_selector(f"{CHART} .js-plotly-plot .main-svg")
    page.wait_for_selector(f"{CHART} .scatterlayer path.js-line")
    page.wait_for_function("(s) => document.querySelector(s).textContent.length > 10",
                           arg=STATUS)
    latencies = {}
    for k, (w, h) in enumerate(SIZES):
        page.set_viewport_size({"width": w, "height": h})
        page.evaluate(TO_TOP, WS)
        page.wait_for_timeout(1000)           # the fitted chart redraws at its new height
        samples, from_input, polled, timelines = [], [], [], []
        for i in range(5):
            # the workspace in view (the notebook above it may settle its cell heights after
            # a resize); what is checked is that the edit itself needs no scrolling
            page.evaluate(TO_TOP, WS)
            page.wait_for_timeout(100)
            old_paths = dom.paths(page, CHART)
            old_status = dom.text(page, STATUS)
            before = page.evaluate(SCROLLS, WS)
            page.evaluate(ARM, CHART)
            t0 = page.evaluate("performance.now()")
            field, typed = edit(page, 5 * k + i)
            try:
                t1 = dom.wait_paths_changed(page, CHART, old_paths, timeout=30_000).json_value()
            except Exception as exc:   # say which change and what the page shows
                raise AssertionError(
                    f"{name} {w}: change {5 * k + i}: chart not redrawn; status "
                    f"{dom.text(page, STATUS)!r}, banner "
                    f"{dom.text(page, WS + ' .hl-app-message')!r}") from exc
            samples.append(t1 - t0)
            t_in = page.evaluate("window.__hlInputT")
            page.wait_for_function("() => window.__hlPaintT !== null", timeout=5_000)
            t_paint = page.evaluate("window.__hlPaintT")
            if t_in is not None and t0 <= t_in <= t_paint:
                from_input.append(t_paint - t_in)
                polled.append(t1 - t_in)
                log = page.evaluate("window.headlinePlotLog || []")
                timelines.append([[round(e[0] - t_in, 1), e[1], e[2]] for e in log])
            dom.wait_text_changed(page, STATUS, old_status)
            after = page.evaluate(SCROLLS, WS)
            assert after["nbTop"] == before["nbTop"] and after["pageTop"] == 0, (before, after)
            assert after["pageWide"] <= 0 and after["nbWide"] <= 0, after
            field_box = page.evaluate(BOX, list(field))
            chart_box = page.evaluate(BOX, [CHART, 0])
            assert inside(field_box), (name, w, field_box)
            assert inside(chart_box), (name, w, chart_box)
            if typed is not None:
                assert typed.split()[0] in dom.text(page, STATUS), dom.text(page, STATUS)
        assert dom.text(page, f"{WS} .hl-app-message") == ""
        page.screenshot(path=str(artifacts / f"workspace-{name}-{w}.png"))
        latencies[f"{w}x{h}"] = dom.latency_summary(
            from_input or samples, with_driver=dom.latency_summary(samples),
            seen_by_frame_poll=dom.latency_summary(polled) if polled else None,
            timelines_ms=timelines)
        if w == 1366:
            _docs_image(page, name, artifacts)
    if name == "line_sizing":
        _refusal_at_the_field(page, artifacts)
    path = artifacts / "latency_workspace.json"
    data = json.loads(path.read_text(encoding="utf-8")) if path.exists() else {}
    data[name] = {"change": "input event (Enter, select change) -> the animation frame that "
                            "paints the workspace chart's new trace paths; with_driver: from "
                            "the test driver's call to the poll that sees them; "
                            "seen_by_frame_poll: from the input event to that poll",
                  **latencies}
    path.write_text(json.dumps(data, indent=2), encoding="utf-8")
    print(f"\nworkspace {name}: " + ", ".join(
        f"{k} median {v['median_ms']} ms (with the driver {v['with_driver']['median_ms']} ms)"
        for k, v in latencies.items()))
