"""Panel benchmarks (Python side): a change in the line-sizing app -> recomputed results.

The kit: the app's input cache, cached catalogue pipes and fitting K, charts updated in place
(one message per figure; velocity and pressure drop are two panels of one figure) and only
what changed written. The naive approach, in the same run: the same change with every cache
cleared and the profile chart's traces rebuilt from nothing.
"""

from __future__ import annotations

from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent


def run(report, timeit, repeat):
    import statistics
    import time

    from kit import scenario as scn
    from kit.core import fittings
    from kit.panels.line_sizing_app import LineSizingApp
    from kit.studies import line_sizing as ls

    sc = scn.load(ROOT / "scenarios" / "harlow_flats_diesel_transfer.toml")
    t0 = time.perf_counter()
    app = LineSizingApp.from_scenario(sc)
    build = time.perf_counter() - t0
    report("line-sizing app: first build (2 FigureWidgets)", build, None, None,
           "includes plotly and nbformat imports")

    def change(i, naive=False):
        if naive:
            ls.candidate_pipes.cache_clear()
            ls._bore_arrays.cache_clear()
            fittings._call.cache_clear()
            app._cache.clear()
            app.profile_chart.figure.data = ()
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
