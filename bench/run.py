"""Headline benchmarks: the kit's time beside the naive approach, measured in one run.

Run: ``.venv/bin/python bench/run.py`` (add ``--quick`` for fewer repeats). Prints one line
per measurement with its target; ratios are the point, absolute times vary by machine.
Nothing here is a test: targets are reported, not asserted.
"""

from __future__ import annotations

import argparse
import importlib
import json
import math
import statistics
import subprocess
import sys
import time
from pathlib import Path

import numpy as np

ROOT = Path(__file__).resolve().parent.parent
sys.path.insert(0, str(ROOT))
sys.path.insert(0, str(Path(__file__).resolve().parent))

RESULTS: list[dict] = []


def timeit(fn, repeat=7, number=None):
    """Median seconds per call of ``fn`` (auto-scaled inner loop)."""
    if number is None:
        t0 = time.perf_counter()
        fn()
        one = time.perf_counter() - t0
        number = max(1, int(0.05 / max(one, 1e-7)))
    runs = []
    for _ in range(repeat):
        t0 = time.perf_counter()
        for _ in range(number):
            fn()
        runs.append((time.perf_counter() - t0) / number)
    return statistics.median(runs)


def report(name, seconds, target=None, naive=None, note=""):
    row = {"name": name, "ms": seconds * 1e3}
    text = f"{name:<58s} {seconds * 1e3:9.3f} ms"
    if naive is not None:
        row["naive_ms"] = naive * 1e3
        row["ratio"] = naive / seconds
        text += f"   naive {naive * 1e3:9.3f} ms   ×{naive / seconds:7.1f}"
    if target:
        text += f"   target {target}"
        row["target"] = target
    if note:
        text += f"   ({note})"
    RESULTS.append(row)
    print(text, flush=True)


# ------------------------------------------------------------------ system curve

def ten_segment_system():
    """10 segments × 3 fittings (30 rows) of mixed methods; water at 20 °C."""
    from kit.core.fittings import Fitting
    from kit.core.line import Line, Segment
    from kit.core.liquids import make_liquid
    from kit.core.pipes import catalogue_pipe

    kinds = [
        Fitting("bend", 2, {"angle": 90.0, "R_D": 1.5}),
        Fitting("hooper_2k", 1, {"name": "Valve, Gate, Full line size, Beta = 1"}),
        Fitting("fixed_k", 1, {"K": 0.5}),
    ]
    segs = []
    for i in range(10):
        pipe = catalogue_pipe("asme_b36_10m", "6" if i % 2 else "8", "40", "carbon_steel")
        segs.append(Segment(f"s{i}", pipe, 50.0 + 10 * i, rise=1.0, fittings=tuple(kinds)))
    state = make_liquid("water").state(293.15)
    return Line("bench", tuple(segs)), state


def naive_curve(line, state, Q):
    """Point by point with scalar fluids calls: friction_factor and the fittings' K."""
    import fluids
    from fluids.fittings import Hooper2K, bend_rounded

    g = 9.80665
    out = []
    for q in Q:
        total = 0.0
        for s in line.segments:
            D = s.pipe.Di
            V = q / (math.pi / 4 * D * D)
            Re = max(state.rho * V * D / state.mu, 1e-9)
            f = fluids.friction.friction_factor(Re, eD=s.pipe.roughness / D)
            K = 0.0
            for fit in s.fittings:
                p = dict(fit.params)
                if fit.kind == "bend":
                    K += fit.count * bend_rounded(Di=D, angle=p["angle"], bend_diameters=p["R_D"],
                                                  Re=Re, roughness=s.pipe.roughness)
                elif fit.kind == "hooper_2k":
                    K += fit.count * Hooper2K(Di=D / 0.0254, Re=Re, name=p["name"])
                else:
                    K += fit.count * p["K"]
            total += (f * s.length / D + K) * V * V / (2 * g)
        out.append(total)
    return np.array(out)


def bench_system_curve(repeat):
    line, state = ten_segment_system()
    Q = np.linspace(2e-3, 0.08, 200)  # turbulent throughout: both use Colebrook there
    kit_t = timeit(lambda: line.head_loss(Q, state), repeat)
    naive_t = timeit(lambda: naive_curve(line, state, Q), max(3, repeat // 2), number=1)
    a, b = line.head_loss(Q, state), naive_curve(line, state, Q)
    rel = float(np.max(np.abs(a - b) / b))
    report("system curve: 200 flows × 10 segments × 30 fittings", kit_t, "≥ 50× and ≤ 2 ms",
           naive_t, f"max rel. difference {rel:.1e}")


def bench_band(repeat):
    from kit import scenario as scn

    sc = scn.load(ROOT / "scenarios" / "kestrel_ridge_booster.toml")
    system = scn.build_system(sc)
    Q = np.linspace(0, 0.08, 200)
    system.band(Q)  # warm the liquid-state and aged-line caches

    def naive():
        for c in system.conditions():
            for q in Q:
                system.curve(np.array([q]), c)

    report("band: 2 levels × 2 temperatures × 2 roughness, 200 flows",
           timeit(lambda: system.band(Q), repeat), None,
           timeit(naive, 3, number=1), "naive: the kit's curve one flow at a time")


def bench_import():
    code = "import time; t=time.perf_counter(); import {m}; print(time.perf_counter()-t)"
    def run(mods):
        ts = []
        for _ in range(3):
            out = subprocess.run([sys.executable, "-c", code.format(m=mods)], capture_output=True,
                                 text=True, cwd=ROOT, check=True)
            ts.append(float(out.stdout.strip()))
        return statistics.median(ts)

    kit_t = run("kit, kit.units, kit.scenario, kit.core.system, kit.core.liquids, "
                "kit.core.fittings, kit.core.pipes, kit.core.pump, kit.core.operating")
    naive_t = run("pint, numpy, scipy.optimize, fluids, CoolProp.CoolProp, plotly.graph_objects")
    report("cold import of kit (units, scenario, core)", kit_t, "≤ 1.0 s", naive_t,
           "naive: importing every library eagerly")


def main(argv=None):
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--quick", action="store_true")
    ap.add_argument("--json", help="also write the figures to this JSON file")
    a = ap.parse_args(argv)
    repeat = 3 if a.quick else 7
    print(f"Headline benchmarks ({'quick' if a.quick else 'full'}), python {sys.version.split()[0]}")
    bench_system_curve(repeat)
    bench_band(repeat)
    bench_import()
    for mod in ("bench_sizing", "bench_pumps", "bench_drain", "bench_record", "bench_panels",
                "bench_units", "bench_line_list", "bench_network", "bench_staging",
                "bench_drain_app", "bench_network_app", "bench_pump_app"):
        if Path(__file__).with_name(f"{mod}.py").exists():
            importlib.import_module(mod).run(report, timeit, repeat)
    if a.json:
        Path(a.json).write_text(json.dumps(RESULTS, indent=2))


if __name__ == "__main__":
    main()
