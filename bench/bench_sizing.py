"""Line sizing benchmarks: one line over its candidates, and a 1,000-line list.

Each beside a naive approach measured in the same run:
- one line: the kit's :func:`kit.core.sizing.size_line` (segment losses for three flows at
  once) against the same line's ``Line.head_loss`` and ``Line.profile`` called one flow at a
  time per candidate;
- the line list: :func:`kit.studies.line_sizing.size_batch` (cached unit conversions, all
  bores of a schedule at once with numpy) against a row-by-row loop with ``kit.units.parse``
  for every cell and scalar ``fluids.friction.friction_factor`` calls size by size.
"""

from __future__ import annotations

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
    import numpy as np

    from kit import scenario as scn
    from kit.studies import line_sizing as ls

    sc = scn.load(ROOT / "scenarios" / "harlow_flats_diesel_transfer.toml")
    inp = ls.inputs(sc)
    ls.run(inp)

    def naive_line():
        flows = (inp.Q_min, inp.Q_design, inp.Q_max)
        for pipe in inp.sizes:
            line = inp.route.line(pipe)
            for q in flows:
                hl = float(line.head_loss(np.array([q]), inp.state)[0])
                line.profile(q, inp.state, inp.p_end + inp.state.rho * 9.80665 * (
                    line.rise + hl), inp.p_baro)

    report(f"sizing: one line, {len(inp.sizes)} candidates × 3 flows",
           timeit(lambda: ls.run(inp), repeat), None, timeit(naive_line, repeat),
           "naive: Line.head_loss + Line.profile one flow at a time")

    rows = line_list(1000)
    ls.size_batch(rows[:50], inp.liquid, inp.p_baro)  # warm: property libraries loaded
    kit_t = timeit(lambda: ls.size_batch(rows, inp.liquid, inp.p_baro), max(3, repeat // 2),
                   number=1)
    naive_t = timeit(lambda: naive_batch(rows, inp.liquid, inp.p_baro), 3, number=1)
    out = ls.size_batch(rows, inp.liquid, inp.p_baro)
    ref = naive_batch(rows, inp.liquid, inp.p_baro)
    same = sum(1 for a, b in zip(out, ref, strict=True)
               if (a.verdict == "pass" and isinstance(b, tuple) and a.size == b[0]
                   and math.isclose(a.head_loss, b[1], rel_tol=1e-3))
               or (a.verdict == "error" and isinstance(b, str)))
    report("sizing: batch of a 1,000-line list", kit_t, "≤ 1 s", naive_t,
           f"naive: row by row, pint parse + scalar fluids; {same}/1000 rows agree "
           "(the rest: 'check'/'fail' rows the naive loop does not grade)")
