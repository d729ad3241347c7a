"""Line sizing benchmarks: one line over its candidates, and a 1,000-line list.

Each beside a naive approach measured in the same run:
- one line: the kit's :func:`kit.core.sizing.size_line` (every candidate with its findings)
  against scalar ``fluids.friction.friction_factor`` and
  :func:`kit.core.fittings.fitting_K` row by row, one flow and one segment at a time, the
  station pressures worked back by hand (no findings);
- the per-call cost of the loss core: ``Line.head_loss`` for one flow (worked in plain
  floats, the fittings' K from a plan cached on the rows' values) against scalar fluids
  calls (``friction_factor``, ``bend_rounded``, ``Hooper2K``) on the 10-segment system of
  ``bench/run.py``; and ``System.curve`` of the pump-study system for one flow and for 241
  flows against the kit's numpy array path (``Line._head_loss_arrays``, the path every call
  took before the float path) for one flow, and one flow at a time;
- the line-sizing app's design-flow edit, end to end (no naive: the figure to hold against
  the ≤ 100 ms edit-to-chart target, of which the browser takes the rest);
- the line list: :func:`kit.studies.line_sizing.size_batch` on
  :func:`kit.inputs.line_list.read_line_list` (strict columns, cached unit conversions, all
  bores of a schedule at once with numpy) against a row-by-row loop with ``kit.units.parse``
  for every cell and scalar ``fluids.friction.friction_factor`` calls size by size.
"""

from __future__ import annotations

import csv
import io
import math
import random
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
DUTIES = ("pump_suction", "pump_discharge", "gravity_drain", "general_transfer")


def line_list(n: int = 1000, seed: int = 3) -> list[dict]:
    """An invented line list of ``n`` rows (about 1 in 25 deliberately bad)."""
    rnd = random.Random(seed)
    rows = []
    for i in range(n):
        L = rnd.uniform(10, 2000)
        rows.append({"tag": f"B-{i:04d}", "flow": f"{rnd.uniform(5, 2500):.4g} gpm",
                     "liquid": rnd.choice(["scenario", "water"]),
                     "temperature": f"{rnd.uniform(40, 90):.3g} degF", "length": f"{L:.1f} ft",
                     "rise": f"{rnd.uniform(-0.2, 0.2) * L:.1f} ft", "duty": rnd.choice(DUTIES),
                     "standard": "asme_b36_10m", "schedule": rnd.choice(["40", "80"]),
                     "material": "carbon_steel", "condition": rnd.choice(["new", "aged"]),
                     "k_total": f"{rnd.uniform(0, 20):.2f}"})
        if i % 25 == 7:
            rows[-1]["flow"] = "lots"
    return rows


def _csv(rows: list[dict]) -> str:
    """The rows as line-list CSV text (what :func:`kit.inputs.line_list.read_line_list` reads)."""
    buf = io.StringIO()
    w = csv.DictWriter(buf, fieldnames=list(rows[0]), lineterminator="\n")
    w.writeheader()
    w.writerows(rows)
    return buf.getvalue()


def naive_batch(rows, default_liquid, p_baro=101325.0):
    """Row by row: pint parse of every cell, scalar fluids friction factor size by size."""
    import fluids

    from kit import units
    from kit.core.criteria import DUTY_CLASSES
    from kit.core.liquids import make_liquid
    from kit.studies.line_sizing import candidate_pipes

    out = []
    for row in rows:
        try:
            Q = units.parse(row["flow"], "flow", "flow")
            L = units.parse(row["length"], "length", "length")
            units.parse(row["rise"], "length", "rise")
            T = units.parse(row["temperature"], "temperature", "temperature")
            duty = DUTY_CLASSES[row["duty"]]
            liq = default_liquid if row["liquid"] == "scenario" else make_liquid(row["liquid"])
            st = liq.state(T, p_baro)
            pick = None
            for p in candidate_pipes.__wrapped__(row["standard"], row["schedule"],
                                                 row["material"], row["condition"]):
                V = Q / p.area
                Re = st.rho * V * p.Di / st.mu
                f = fluids.friction.friction_factor(Re, eD=p.roughness / p.Di)
                dp = f * st.rho * V * V / (2 * p.Di)
                if V <= duty.v_max * 0.9 and dp <= duty.dp_max * 0.9 and V >= duty.v_min:
                    pick = (p.nominal, (f * L / p.Di + float(row["k_total"])) * V * V / 19.6133)
                    break
            out.append(pick)
        except Exception as exc:  # noqa: BLE001 - naive: any error marks the row
            out.append(str(exc))
    return out


def run(report, timeit, repeat):
    from kit import scenario as scn
    from kit.studies import line_sizing as ls

    sc = scn.load(ROOT / "scenarios" / "harlow_flats_diesel_transfer.toml")
    inp = ls.inputs(sc)
    ls.run(inp)

    def naive_line():
        """Scalar fluids friction_factor and fitting_K row by row, one flow and one segment
        at a time, station pressures worked back from the end by hand (no findings)."""
        import fluids

        from kit.core.fittings import fitting_K

        st, g = inp.state, 9.80665
        for pipe in inp.sizes:
            line = inp.route.line(pipe)
            for q in (inp.Q_min, inp.Q_design, inp.Q_max):
                hls = []
                for s in line.segments:
                    D, eps = s.pipe.Di, s.pipe.roughness
                    V = q / s.pipe.area
                    Re = st.rho * V * D / st.mu
                    f = fluids.friction.friction_factor(Re, eD=eps / D)
                    K = sum(float(fitting_K(r, [Re], D, eps)[0]) for r in s.fittings)
                    hls.append((f * s.length / D + K) * V * V / (2 * g))
                p = inp.p_end
                for s, hl in zip(reversed(line.segments), reversed(hls), strict=True):
                    p = p + st.rho * g * (s.rise + hl)

    report(f"sizing: one line, {len(inp.sizes)} candidates × 3 flows",
           timeit(lambda: ls.run(inp), repeat), None, timeit(naive_line, repeat),
           "naive: scalar fluids friction + fitting_K row by row, one flow at a time, "
           "no findings")
    per_call(report, timeit, repeat)
    app_edit(report, timeit, repeat)

    rows = line_list(1000)
    text = _csv(rows)

    def kit_batch(text=text):
        return ls.size_batch(ls.read_line_list(text), inp.liquid, inp.p_baro)

    kit_batch(_csv(rows[:50]))  # warm: property libraries loaded
    kit_t = timeit(kit_batch, max(3, repeat // 2), number=1)
    naive_t = timeit(lambda: naive_batch(rows, inp.liquid, inp.p_baro), 3, number=1)
    out = kit_batch()
    ref = naive_batch(rows, inp.liquid, inp.p_baro)
    same = sum(1 for a, b in zip(out, ref, strict=True)
               if (a.verdict == "pass" and isinstance(b, tuple) and a.size == b[0]
                   and math.isclose(a.head_loss, b[1], rel_tol=1e-3))
               or (a.verdict == "error" and isinstance(b, str)))
    report("sizing: batch of a 1,000-line list", kit_t, "≤ 1 s", naive_t,
           f"naive: row by row, pint parse + scalar fluids; {same}/1000 rows agree "
           "(the rest: 'check'/'fail' rows the naive loop does not grade)")


def per_call(report, timeit, repeat):
    """Per-call cost of the loss core: one flow, and a 241-point system curve."""
    import numpy as np
    from run import naive_curve, ten_segment_system

    from kit import scenario as scn

    line, state = ten_segment_system()
    q = 0.03
    kit_t = timeit(lambda: line.head_loss(q, state), repeat)
    naive_t = timeit(lambda: naive_curve(line, state, [q]), repeat)
    a, b = float(line.head_loss(q, state)), float(naive_curve(line, state, [q])[0])
    report("head loss: one flow, 10 segments × 30 fittings", kit_t, None, naive_t,
           f"naive: scalar fluids calls; rel. difference {abs(a - b) / b:.1e}")

    system = scn.build_system(scn.load(ROOT / "scenarios" / "kestrel_ridge_booster.toml"))
    cond = system.conditions()[0]
    st = system.state(cond.T)
    lines = [x for x in (system._line("suction", cond.roughness),
                         system._line("discharge", cond.roughness)) if x is not None]
    static = system.static_head(cond.static, cond.T)

    def numpy_curve(Q):
        H = np.full(np.shape(Q), static)
        for ln in lines:
            H = H + ln._head_loss_arrays(np.asarray(Q, dtype=float), st)
        return H

    q = 0.02
    kit_t = timeit(lambda: system.curve(q, cond), repeat)
    naive_t = timeit(lambda: numpy_curve(q), repeat)
    rel = abs(float(system.curve(q, cond)) / float(numpy_curve(q)) - 1.0)
    report("System.curve, pump-study system, one flow", kit_t, None, naive_t,
           f"naive: the numpy array path for one flow; rel. difference {rel:.1e}")
    Q = np.linspace(0.0, 0.08, 241)
    kit_t = timeit(lambda: system.curve(Q, cond), repeat)
    naive_t = timeit(lambda: [numpy_curve(x) for x in Q], max(3, repeat // 2), number=1)
    a, b = system.curve(Q, cond), np.array([numpy_curve(x) for x in Q])
    rel = float(np.max(np.abs(a - b) / np.abs(b)))
    report("System.curve, pump-study system, 241 flows", kit_t, None, naive_t,
           f"naive: the numpy array path one flow at a time; max rel. difference {rel:.1e}")


def app_edit(report, timeit, repeat):
    """The line-sizing notebook's design-flow edit, end to end in the kernel."""
    import itertools

    from kit import scenario as scn
    from kit.panels.line_sizing_app import LineSizingApp

    app = LineSizingApp.from_scenario(
        scn.load(ROOT / "scenarios" / "harlow_flats_diesel_transfer.toml"))
    # new flows every time, so the app's study cache never answers
    flows = itertools.cycle(f"{300 + 0.01 * i:.2f} gpm" for i in range(12000))
    kit_t = timeit(lambda: app.flow_design.set_text(next(flows)), repeat, number=20)
    report("sizing: design-flow edit, kernel side (LineSizingApp)", kit_t, "≤ 100 ms", None,
           "parse, size every candidate, findings, charts and tables as JSON")
