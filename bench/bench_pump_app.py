"""Panel benchmark (Python side): a pump datasheet edit in the pump-selection app.

One change = the head of the 4th datasheet point of the first candidate typed into the
editor (as the browser tests do): the editor refits the curve, the app runs the study and
redraws the main chart, tables, line-pressure chart, duties views and findings.

The kit: every chart is built as plain dicts (float arrays sent as plotly.js typed arrays)
and shown by a ``PlotView``; the study is kept for the last 16 inputs (a pure function of
the scenario document and the pumps), so a value tried before re-renders without running
it again. Measured: a value not seen before (study + render) and a value seen before
(render only). The naive approach, in the same run: the cache cleared on every change and
every chart built as a plotly ``Figure`` object and shown from it (what the app did before).

Entry point for ``bench/run.py``: :func:`run`.
"""

from __future__ import annotations

from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
SCENARIOS = ("kestrel_ridge_booster.toml", "wrenfield_duty_standby.toml")


def _naive_render(app) -> None:
    """Re-show every chart from a plotly ``Figure`` object (the approach before)."""
    from kit.panels.pump_duties import set_figure, staging_figure, viscous_figure
    from kit.panels.pump_profiles import profile_figure

    s, sysm = app.study, app.display
    app.plot.show(app.figure)
    app.profile_plot.show(profile_figure(s, sysm))
    d = s.duties
    app.duties.plot.show(staging_figure(d, sysm))
    if d is not None:
        app.duties.set_plot.show(set_figure(d, sysm))
        if d.viscous:
            app.duties.viscous_plot.show(viscous_figure(d, sysm))
    app.editor.plot.show(app.editor.figure)


def _one(report, name, repeat):
    import statistics
    import time

    from kit import scenario as scn
    from kit.panels.pump_selection_app import PumpSelectionApp

    app = PumpSelectionApp(scn.load(ROOT / "scenarios" / name))
    assert app.workspace is not None           # as in the notebook: both views built
    cell = app.editor.rows[3].head
    base = float(cell.value)
    count = [0]

    def fresh_value():
        count[0] += 1
        return f"{base + 0.5 + 0.01 * count[0]:.2f}"  # a value not tried before

    def change(value, naive=False):
        t = time.perf_counter()
        if naive:
            app._cache.clear()
        cell.value = value
        if naive:
            _naive_render(app)
        return time.perf_counter() - t

    n = 3 * repeat
    change(fresh_value())                      # warm up (imports, first fits)
    new = statistics.median(change(fresh_value()) for _ in range(n))
    pair = [fresh_value(), fresh_value()]
    change(pair[0])
    change(pair[1])
    seen = statistics.median(change(pair[i % 2]) for i in range(n))
    naive = statistics.median(change(fresh_value(), naive=True) for _ in range(n))
    assert app.message.value == ""             # every change accepted
    short = name.split("_")[0]
    report(f"pump app ({short}): datasheet edit, new value -> study, render", new,
           "≤ 100 ms", naive, "naive: study re-run, charts as plotly Figures")
    report(f"pump app ({short}): datasheet edit, value seen before -> render", seen,
           "≤ 30 ms", naive, f"{app.recomputes} studies run in this app")


def run(report, timeit, repeat):
    """The bench entry: both demo scenarios, each change timed through the app object."""
    for name in SCENARIOS:
        _one(report, name, repeat)
