"""Pump benchmarks: operating points over the band, the demo's compute, an editor round trip.

Run through ``bench/run.py`` (imported by name, ``run(report, timeit, repeat)``).

- Operating points, 3 pumps × 8 conditions: the study's way (the band evaluated once on a grid
  for all pumps, splined, each point polished once against the exact curve) beside the naive
  way (Brent's method calling the exact system curve at one flow per iteration, per pump and
  condition). Target ≤ 20 ms.
- ``compute(sc)`` of the demo scenario (everything the record holds).
- In the kernel, an edited pump point → study, chart and tables redrawn (no browser).
"""

from __future__ import annotations

from pathlib import Path

import numpy as np

ROOT = Path(__file__).resolve().parent.parent
DEMO = ROOT / "scenarios" / "kestrel_ridge_booster.toml"


def _naive_points(system, pumps, application):
    from kit.core.operating import operating_point

    out = []
    for pump in pumps:
        for cond in system.conditions():
            st = system.state(cond.T)
            out.append(operating_point(
                pump, lambda q, _c=cond: system.curve(q, _c), rho=st.rho,
                npsha=lambda q, _c=cond: system.npsh_available(q, _c), label=cond.label,
                npsh_application=application))
    return out


def run(report, timeit, repeat):
    from kit import scenario as scn
    from kit.studies import pump_selection as ps

    sc = scn.load(DEMO)
    system = scn.build_system(sc)
    pumps = ps.build_pumps(sc)
    application = sc.doc["duty"]["npsh_application"]
    Q = np.linspace(0.0, max(p.q_end for p in pumps), ps.GRID_POINTS)
    system.band(Q)  # warm the liquid-state and aged-line caches

    def kit_points():
        band = system.band(Q)
        return ps._points(system, pumps, band, ps._curves(system, band), application)

    pts, _ = kit_points()
    naive = _naive_points(system, pumps, application)
    kit_q = np.array([p.Q for name in (x.name for x in pumps) for p in pts[name]])
    diff = float(np.max(np.abs(kit_q - np.array([p.Q for p in naive])) / kit_q))
    report("operating points: 3 pumps × 8 conditions (band, NPSH, BEP)",
           timeit(kit_points, repeat), "≤ 20 ms",
           timeit(lambda: _naive_points(system, pumps, application), max(3, repeat // 2),
                  number=1),
           f"naive: brentq on the exact curve one flow a call; max rel. difference {diff:.1e}")

    def fresh_compute():
        s = scn.load(DEMO)
        return ps.compute(s)

    fresh_compute()
    report("pump selection: compute(sc) of the demo (load, build, study, results)",
           timeit(fresh_compute, repeat, number=1), "≤ 200 ms")

    try:
        from kit.panels.pump_selection_app import PumpSelectionApp
    except ImportError:  # pragma: no cover - panels need ipywidgets/plotly
        return
    app = PumpSelectionApp(sc)
    heads = iter(["71", "70"] * 1000)
    report("pump app: edit a datasheet point → study, chart, tables (kernel side)",
           timeit(lambda: app.editor.set_point(3, head=next(heads)), repeat, number=1),
           "≤ 300 ms")
