"""The charts' fast redraw shows what a full draw would show (issue 12, latency).

A chart whose change is only in its traces' per-point arrays (x, y and hover text) and whose
axes have fixed ranges is redrawn by ``Plotly.animate`` without a full redraw
(``kit/panels/plot_view.js``). This checks, in JupyterLab in Chromium, after edits of the
pump, line-sizing and network workspaces, that the chart shows what a fresh chart drawn from
nothing (``Plotly.newPlot``) with the figure the kernel sent (the div's
``headlineFigure()``) shows: the same drawn traces (every path and point of the trace layer,
trace ids aside) and, for every trace that shows a hover label, the same labels at its first,
middle and last points. Independent computation: plotly.js's own full draw. The pump and
line-sizing charts must take the fast path at least once.
"""

from __future__ import annotations

import pytest

from tests.browser.test_workspace import CASES, CHART, TO_TOP, WS

pytestmark = pytest.mark.browser

#: Hover labels of the first, middle and last point of every hoverable trace, on the chart
#: and on a fresh full draw of the model's figure in an off-screen div of the same size.
HOVERS = r"""async (sel) => {
  const gd = document.querySelector(sel + ' .js-plotly-plot');
  const fig = gd.headlineFigure();
  const ref = document.createElement('div');
  ref.style.cssText = `position:fixed;left:0;top:0;width:${gd.clientWidth}px;` +
    `height:${gd.clientHeight}px;z-index:-1`;
  document.body.appendChild(ref);
  await Plotly.newPlot(ref, JSON.parse(JSON.stringify(fig.data)), fig.layout, fig.config);
  const labels = async (div) => {
    const out = [];
    for (let k = 0; k < div._fullData.length; k++) {
      const t = div._fullData[k];
      if (t.hoverinfo === 'skip' || t.hoverinfo === 'none' || !t._length) continue;
      const sub = (t.xaxis || 'x') + (t.yaxis || 'y');
      for (const j of new Set([0, t._length >> 1, t._length - 1])) {
        Plotly.Fx.hover(div, [{curveNumber: k, pointNumber: j}], sub);
        await new Promise((r) => setTimeout(r, 0));
        out.push([k, j, [...div.querySelectorAll('.hoverlayer .hovertext')]
          .map((e) => e.textContent).join(' | ')]);
        Plotly.Fx.unhover(div);
      }
    }
    return out;
  };
  // the trace layers as drawn: every path's d, every point's transform, styles; trace
  // uids (random per draw) removed
  const svg = (div) => [...div.querySelectorAll('.cartesianlayer .scatterlayer')]
    .map((e) => e.outerHTML.replace(/trace[0-9a-f]{6}/g, 'trace'));
  const shown = await labels(gd);
  const full = await labels(ref);
  const svgShown = svg(gd), svgFull = svg(ref);
  Plotly.purge(ref);
  ref.remove();
  return {shown, full, how: gd.dataset.lastDraw, svgSame: JSON.stringify(svgShown) ===
          JSON.stringify(svgFull), svgShown: svgShown.join(''), svgFull: svgFull.join('')};
}"""


def _edit_network(page, i):
    from tests.browser.test_network import ROW, TAG_OPENING

    if i == 0:
        assert page.evaluate(ROW, "hl-test-tv2-row")
        page.locator("#hl-test-tv2-row .hl-row-edit").click()
        page.wait_for_selector("#hl-test-tv2-row .hl-opening input")
        assert page.evaluate(TAG_OPENING, ["hl-test-tv2-row", "hl-test-tv2-opening"])
    box = page.locator("#hl-test-tv2-opening")
    box.fill(f"{40 + 7 * i} %")
    box.press("Enter")


FAST = {**{k: v for k, v in CASES.items() if k in ("pump_selection", "line_sizing")},
        "network": ("notebooks/network_systems.ipynb", _edit_network)}


@pytest.mark.parametrize("name", list(FAST))
def test_fast_redraw_matches_a_full_draw(name, lab, page, open_and_run, artifacts):
    notebook, edit = FAST[name]
    for old in artifacts.glob(f"fast-path-{name}-*"):
        old.unlink()
    page.set_viewport_size({"width": 1366, "height": 768})
    open_and_run(page, notebook, timeout=300)
    page.evaluate(TO_TOP, WS)
    page.wait_for_selector(f"{CHART} .scatterlayer path.js-line")
    ways = set()
    for i in range(3):
        old = page.evaluate("(s) => [...document.querySelectorAll(s + ' path.js-line')]"
                            ".map(p => p.getAttribute('d')).join('|')", CHART)
        edit(page, i)
        page.wait_for_function("([s, old]) => [...document.querySelectorAll(s + "
                               "' path.js-line')].map(p => p.getAttribute('d')).join('|') "
                               "!== old", arg=[CHART, old], timeout=30_000)
        page.wait_for_timeout(500)              # every message of the change applied
        got = page.evaluate(HOVERS, CHART)
        ways.add(got["how"])
        assert got["shown"], "no hover labels read"
        assert any(lbl for _, _, lbl in got["shown"]), got["shown"]
        assert got["shown"] == got["full"], (got["how"], got["shown"], got["full"])
        if not got["svgSame"]:    # both drawings kept for a diff
            for which in ("svgShown", "svgFull"):
                (artifacts / f"fast-path-{name}-{which}.svg.txt").write_text(
                    got[which].replace("><", ">\n<"), encoding="utf-8")
        assert got["svgSame"], (got["how"], f"see artifacts/fast-path-{name}-*.svg.txt")
    if name != "network":
        assert "paths" in ways, f"{name}: the fast path was never taken ({ways})"
    print(f"\n{name}: draws {sorted(ways)}")
