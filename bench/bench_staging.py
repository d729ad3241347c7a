"""Staging benchmark: 3 duty pumps, 50 flows, 8 band conditions, speeds and powers.

Run alone: ``.venv/bin/python bench/bench_staging.py`` (or through ``bench/run.py`` once it is
listed there: ``run(report, timeit, repeat)``).

- The kit's way (:func:`kit.core.staging.staging_sweep`): the affinity-law speed equation
  solved for every (condition, flow) at once by vectorised bisection, stage-up flows from the
  sampled capacity margin, drive losses from the vectorised PWM table.
- The naive way: for each condition and flow, the fewest pumps that make the head at full
  speed, then Brent's method (:func:`scipy.optimize.brentq`) on the scalar speed equation,
  and fluids' scalar :func:`fluids.VFD_efficiency` per point. Target ≤ 50 ms.

The pump is the demo scenario's first pump; the eight system curves are invented
(two static heads × two friction factors × two ageing factors).

Pump sets (:class:`kit.core.pump.PumpSet`), as the duties study calls them:

- the head of two unlike pumps in parallel at 64 flows (an operating point's bracket) and
  at one flow (what Brent's method asks, one flow a call): the kit's table + Newton (one
  flow in plain floats) beside the naive way, scipy's brentq on Σ Q_i(H) − Q with each
  member's flow by brentq on its polynomial;
- a whole pump study per edit of the duty/standby demo (``study`` on a fresh copy of the
  scenario, so no cached input hides work). Target ≤ 100 ms.
"""

from __future__ import annotations

import sys
from pathlib import Path

import numpy as np

ROOT = Path(__file__).resolve().parent.parent
DEMO = ROOT / "scenarios" / "kestrel_ridge_booster.toml"
N_FLOWS, N_DUTY = 50, 3


def _setup():
    from kit import scenario as scn
    from kit.studies import pump_selection as ps

    pump = ps.build_pumps(scn.load(DEMO))[0]
    Q = np.linspace(0.003, 0.115, N_FLOWS)
    band = np.array([hs + k * a * Q ** 2 for hs in (50.0, 56.0) for k in (1000.0, 1100.0)
                     for a in (1.0, 1.2)])
    return pump, Q, band


def _naive(pump, Q, band, rho, em, rating, r_min):
    import fluids
    from scipy.optimize import brentq

    count = np.zeros(band.shape, dtype=int)
    speed = np.full(band.shape, np.nan)
    power = np.full(band.shape, np.nan)
    for c in range(band.shape[0]):
        for j, q in enumerate(Q):
            H = float(band[c, j])
            k = next((k for k in range(1, N_DUTY + 1)
                      if q / k <= pump.q_end and float(pump.head(q / k)) >= H), None)
            if k is None:
                count[c, j] = N_DUTY
                continue

            def g(r, q=q, k=k, H=H):
                return r * r * float(pump.head(q / (k * r))) - H

            r = r_min if g(r_min) > 0 else brentq(g, r_min, 1.0, xtol=1e-14)
            P = float(pump.power(q / (k * r), rho)) * r ** 3
            eta_d = fluids.VFD_efficiency(rating, load=min(P / rating, 1.0))
            count[c, j], speed[c, j], power[c, j] = k, r, k * P / (em * eta_d)
    return count, speed, power


def run(report, timeit, repeat):
    from kit.core.staging import staging_sweep

    pump, Q, band = _setup()
    rho, em, rating = 998.0, 0.93, 45e3

    def kit():
        return staging_sweep(pump, N_DUTY, Q, band, rho=rho, motor_efficiency=em,
                             drive_rating=rating)

    res = kit()
    count, speed, power = _naive(pump, Q, band, rho, em, rating, res.speed_range.min_ratio)
    ok = ~res.shortfall
    same = bool(np.array_equal(res.count[ok], count[ok]))
    d_r = float(np.nanmax(np.abs(res.speed_ratio[ok] - speed[ok])))
    d_p = float(np.nanmax(np.abs(res.input_power[ok] / power[ok] - 1.0)))
    report(f"staging: {N_DUTY} pumps × {N_FLOWS} flows × {band.shape[0]} conditions (all VFD)",
           timeit(kit, repeat), "≤ 50 ms",
           timeit(lambda: _naive(pump, Q, band, rho, em, rating, res.speed_range.min_ratio),
                  max(3, repeat // 2), number=1),
           f"naive: brentq + fluids.VFD_efficiency per point; counts equal {same}, "
           f"max |Δr| {d_r:.1e}, max rel. Δpower {d_p:.1e}")
    for strategy in ("one_vfd", "fixed"):
        report(f"staging: same study, strategy {strategy}",
               timeit(lambda s=strategy: staging_sweep(pump, N_DUTY, Q, band, strategy=s,
                                                       rho=rho, motor_efficiency=em,
                                                       drive_rating=rating), repeat),
               "≤ 50 ms")
    _pump_sets(report, timeit, repeat)


def _naive_set_head(pumps, Q: float) -> float:
    """Parallel set head at one flow by nested brentq: each member's flow at a head by
    brentq on its polynomial (zero at or above its shut-off), the head by brentq on
    Σ Q_i(H) − Q between the heads of the kit's table."""
    from scipy.optimize import brentq

    def flow(p, H):
        poly = p.fits["head"].polynomial
        q_hi = 1.5 * p.q_end
        if H >= float(poly(0.0)):
            return 0.0
        if H <= float(poly(q_hi)):
            return q_hi
        return brentq(lambda q: float(poly(q)) - H, 0.0, q_hi, xtol=1e-15)

    h_top = max(float(p.fits["head"].polynomial(0.0)) for p in pumps)
    h_low = max(float(p.fits["head"].polynomial(1.5 * p.q_end)) for p in pumps)

    def excess(H):
        return sum(flow(p, H) for p in pumps) - Q

    if excess(h_top) >= 0:
        return h_top
    if excess(h_low) <= 0:
        return h_low
    return brentq(excess, h_low, h_top, xtol=1e-13)


def _pump_sets(report, timeit, repeat):
    from kit import scenario as scn
    from kit.core.pump import PumpSet
    from kit.studies import pump_selection as ps

    pump = ps.build_pumps(scn.load(DEMO))[0]
    big, small = pump, pump.trimmed(0.92 * pump.diameter)
    pset = PumpSet([big, small], "parallel")
    Qs = np.linspace(0.0, pset.q_end, 64)
    naive = np.array([_naive_set_head([big, small], float(q)) for q in Qs])
    kit_h = pset.head(Qs)
    diff = float(np.max(np.abs(kit_h - naive) / naive))
    report("pump set: 2 unlike pumps in parallel, head at 64 flows",
           timeit(lambda: pset.head(Qs), repeat), "≤ 2 ms",
           timeit(lambda: [_naive_set_head([big, small], float(q)) for q in Qs],
                  max(3, repeat // 2), number=1),
           f"naive: nested brentq per flow; max rel. difference {diff:.1e}")
    q1 = 0.6 * pset.q_end
    report("pump set: the same set, head at one flow (a Brent step)",
           timeit(lambda: pset.head(q1), repeat), "≤ 50 µs",
           timeit(lambda: _naive_set_head([big, small], q1), repeat),
           "naive: nested brentq")

    sc = scn.load(ROOT / "scenarios" / "wrenfield_duty_standby.toml")
    ps.study(sc.copy())
    report("pump study per edit: duty/standby demo (sets, staging, energy)",
           timeit(lambda: ps.study(sc.copy()), repeat, number=1), "≤ 100 ms")


if __name__ == "__main__":
    sys.path.insert(0, str(ROOT))
    sys.path.insert(0, str(Path(__file__).resolve().parent))
    from run import report, timeit

    run(report, timeit, 7)
