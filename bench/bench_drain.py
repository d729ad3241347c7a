"""Drain-down benchmarks: the kit's quadrature over volume beside an explicit time march.

Imported by ``bench/run.py`` (``run(report, timeit, repeat)``). The case is the demo's
dump line (``scenarios/marlow_vale_cip_dump.toml``: a 3-segment NPS 2 line with four
fittings, water at 60 °C, torispherical-headed vertical tank).

Naive approach, measured in the same run: an explicit Euler march of dh/dt = −Q/A(h) with a
fixed step, the line flow at each step found by a scalar Brent root (``scipy.optimize.brentq``)
of h_L(Q) + V²/2g = ΔH on the kit's own line head loss called one flow at a time — the
algorithm a spreadsheet or a first script would use. Its difference from the kit's time is
printed beside it (the Euler step's error).
"""

from __future__ import annotations

import math
import time
from pathlib import Path

import numpy as np

ROOT = Path(__file__).resolve().parent.parent
G = 9.80665
_DT = 0.5          # s, the naive march's step (about 1200 steps for the demo)


def _case():
    from kit import scenario as scn
    from kit.studies import tank_drainage as td

    inp = td.inputs(scn.load(ROOT / "scenarios" / "marlow_vale_cip_dump.toml"))
    return inp


def _kit_drain(inp, outlet):
    from kit.core.drain import drain

    return drain(inp.tank, outlet, inp.state, inp.start, inp.target, inp.p_surface,
                 inp.p_atm, inp.vent)


def naive_drain(inp, outlet, dt: float = _DT) -> float:
    """Explicit Euler on dh/dt = −Q/A with a scalar brentq for Q at each step [s]."""
    from scipy.optimize import brentq

    line, state, tank = outlet.line, inp.state, inp.tank
    A_exit = outlet.exit_area
    z_d = outlet.discharge_elevation

    def head(q):
        V = q / A_exit
        return float(line.head_loss(np.array([q]), state)[0]) + V * V / (2 * G)

    h, t = inp.start, 0.0
    q_hi = A_exit * math.sqrt(2 * G * (inp.start - z_d)) * 1.01
    while True:
        dH = h - z_d + (inp.p_surface - inp.p_atm) / (state.rho * G)
        Q = brentq(lambda q, dH=dH: head(q) - dH, 1e-12, q_hi, xtol=1e-12)
        h_new = h - Q / tank.area(h) * dt
        if h_new <= inp.target:
            return t + dt * (h - inp.target) / (h - h_new)
        h, t = h_new, t + dt


def _sweep_outlets(inp, n: int = 100):
    from kit.core.drain import PipedOutlet
    from kit.core.pipes import custom_pipe
    from kit.studies.tank_drainage import LineRoute

    route = LineRoute.of(inp.outlet.line)
    base = inp.outlet
    out = []
    for d in np.linspace(0.030, 0.150, n):
        pipe = custom_pipe(float(d), "stainless_steel")
        line = route.build(pipe, route.fittings, route.length, route.fall,
                           base.inlet_elevation)
        out.append(PipedOutlet(line, base.discharge_elevation))
    return out


def run(report, timeit, repeat):
    inp = _case()
    outlet = inp.outlet
    _kit_drain(inp, outlet)                      # warm: liquid state, tank table

    res = _kit_drain(inp, outlet)
    kit_t = timeit(lambda: _kit_drain(inp, outlet), repeat)
    t0 = time.perf_counter()
    t_naive = naive_drain(inp, outlet)
    naive_t = time.perf_counter() - t0
    rel = abs(t_naive - res.total_time) / res.total_time
    report("drain-down: demo dump line, 3 segments, ~600 levels", kit_t, "≤ 20 ms", naive_t,
           f"naive Euler dt {_DT:g} s + brentq per step; drain times differ {rel:.1e}")

    outlets = _sweep_outlets(inp)
    for o in outlets[:3]:
        _kit_drain(inp, o)

    def sweep():
        return [_kit_drain(inp, o).total_time for o in outlets]

    sweep_t = timeit(sweep, max(1, repeat // 3), number=1)
    times = sweep()
    step = 20 if repeat < 5 else 10             # --quick times the naive march on fewer
    picks = outlets[::step]
    t0 = time.perf_counter()
    naive_times = [naive_drain(inp, o) for o in picks]
    naive_sweep = (time.perf_counter() - t0) * len(outlets) / len(picks)
    rel = max(abs(a - b) / b for a, b in zip(naive_times, times[::step], strict=True))
    report("drain sweep: 100 outlet line bores 30–150 mm", sweep_t, "≤ 1 s", naive_sweep,
           f"naive timed on {len(picks)} of the 100 bores, scaled ×{step}; max time "
           f"difference {rel:.1e}")

    from kit.panels.drain_app import DrainApp
    from kit.scenario import load

    app = DrainApp.from_scenario(load(ROOT / "scenarios" / "marlow_vale_cip_dump.toml"))
    sizes = ["1-1/2", "2"]
    state = {"i": 0}

    def change():
        state["i"] += 1
        app.outlet.pipe.nominal.value = sizes[state["i"] % 2]

    report("drain app: outlet size changed → both drains, table, charts",
           timeit(change, repeat), "≤ 100 ms", None, "widgets in the kernel only, no browser")
