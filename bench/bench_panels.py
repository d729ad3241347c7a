"""Panel benchmarks (Python side): a change in the line-sizing app -> recomputed results.

The kit: the app's input cache, cached catalogue pipes and fitting K, charts updated in place
as plain JSON (:class:`kit.panels.plot_view.PlotView`: one message per figure, only the
traits that changed; velocity and pressure drop are two panels of one figure) and only what
changed written. The naive approach, in the same run: the same change with every cache
cleared and the profile chart's traces rebuilt from nothing.

A second pair compares one bore-chart update as PlotView JSON with the same update made
through plotly's ``FigureWidget`` property setters in one ``batch_update`` (what the kit did
before PlotView; plotly validates every property set).
"""

from __future__ import annotations

from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent


def run(report, timeit, repeat):
    import statistics
    import time

    import numpy as np

    from kit import scenario as scn
    from kit.core import fittings
    from kit.panels.line_sizing_app import LineSizingApp
    from kit.studies import line_sizing as ls

    sc = scn.load(ROOT / "scenarios" / "harlow_flats_diesel_transfer.toml")
    t0 = time.perf_counter()
    app = LineSizingApp.from_scenario(sc)
    build = time.perf_counter() - t0
    report("line-sizing app: first build (2 PlotViews)", build, None, None,
           "includes the plotly and nbformat imports")

    def change(i, naive=False):
        if naive:
            from kit.core import sizing

            ls.candidate_pipes.cache_clear()
            sizing._route_line.cache_clear()
            fittings._call.cache_clear()
            app._cache.clear()
            app.profile_chart.view.data = []
            app._shown_key = None
        t = time.perf_counter()
        app.flow_design.set_text(f"{300 + (i % 97) * 0.9:.1f} gpm")
        return time.perf_counter() - t

    n = 7 * repeat
    kit = statistics.median(change(i) for i in range(n))
    naive = statistics.median(change(1000 + i, naive=True) for i in range(max(5, n // 2)))
    report("line-sizing app: design flow change -> results and charts", kit, "≤ 30 ms", naive,
           "naive: no caches, profile traces rebuilt")

    nominals = [c.pipe.nominal for c in app.study.result.candidates]

    def pick(i):
        t = time.perf_counter()
        app.size.value = nominals[i % len(nominals)]
        return time.perf_counter() - t

    sizes = statistics.median(pick(i) for i in range(n))
    inp = app.read_inputs()
    report("line-sizing app: profile size change (re-render only)", sizes, None, None,
           f"the sizing itself, not re-run here, costs {timeit(lambda: ls.run(inp), repeat) * 1e3:.1f} ms")

    # one bore-chart update: PlotView JSON against plotly FigureWidget property setters
    import plotly.graph_objects as go
    from plotly.subplots import make_subplots

    chart = app.bore_chart
    v_series, dp_series = chart.series
    rng = dict(chart._ranges)
    fig = make_subplots(rows=1, cols=2)
    for col, series in ((1, v_series), (2, dp_series)):
        for _ in series:
            fig.add_trace(go.Scatter(x=[], y=[]), row=1, col=col)
    fw = go.FigureWidget(fig)

    def scaled(series, k):
        return [type(s)(s.name, s.x, np.asarray(s.y) * k, s.mode, s.dash, s.color, s.extra)
                for s in series]

    def plotview(i):
        k = 1.0 + 1e-3 * (i % 50)
        t = time.perf_counter()
        chart.show(scaled(v_series, k), scaled(dp_series, k), rng["x"], rng["v"], rng["dp"])
        return time.perf_counter() - t

    def figurewidget(i):
        k = 1.0 + 1e-3 * (i % 50)
        t = time.perf_counter()
        with fw.batch_update():
            for trace, s in zip(fw.data, scaled(v_series, k) + scaled(dp_series, k),
                                strict=True):
                trace.x = np.asarray(s.x, dtype=float)
                trace.y = np.asarray(s.y, dtype=float)
                trace.name = s.name
                trace.mode = s.mode
                trace.line.dash = s.dash
                trace.line.color = s.color
                if s.extra:
                    trace.update(s.extra)
        return time.perf_counter() - t

    lean = statistics.median(plotview(i) for i in range(n))
    heavy = statistics.median(figurewidget(i) for i in range(n))
    report("bore chart: one update as PlotView JSON", lean, None, heavy,
           "naive: plotly FigureWidget property setters, one batch_update")
