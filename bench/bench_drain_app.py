"""Panel benchmark (Python side): an outlet size change in the tank-drainage app.

The kit: the app keeps its last computations (the study is a pure function of its inputs), so
going back to a size tried before re-renders without draining the tank again; the charts'
messages leave first. Measured: a size not seen before (the tank drained through both
outlets, then the charts, sketch, tables and findings re-rendered) and a size seen before
(the re-render only). The naive approach, in the same run: every change recomputed (the
cache cleared).
"""

from __future__ import annotations

from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent


def run(report, timeit, repeat):
    import statistics
    import time

    from kit import scenario as scn
    from kit.panels.drain_app import DrainApp

    sc = scn.load(ROOT / "scenarios" / "marlow_vale_cip_dump.toml")
    app = DrainApp.from_scenario(sc)
    assert app.workspace is not None           # as in the notebook: both views built
    nominal = app.outlet.pipe.nominal
    values = [v for _label, v in nominal.options]
    i0 = values.index(nominal.value)
    pair = [values[max(i0 - 1, 0)], values[i0]]

    def change(i, naive=False):
        if naive:
            app._cache.clear()
        t = time.perf_counter()
        nominal.value = pair[i % 2]
        return time.perf_counter() - t

    n = 6 * repeat
    change(0)
    change(1)
    seen = statistics.median(change(i) for i in range(n))
    fresh = statistics.median(change(i, naive=True) for i in range(n))
    report("tank-drainage app: outlet size seen before -> re-render", seen, "≤ 30 ms", fresh,
           "naive: drained again on every change")
    report("tank-drainage app: outlet size not seen before -> drain and render", fresh, None,
           None, f"{app.recomputes} drains in this run")
