"""The fast paths of kit.core.staging against independent computations.

- The speed ratio of a drive pump (affinity laws: r² H(Q/r) = H_req, Karassik et al., Pump
  Handbook, 4th ed., 2008, ch. 2, from memory) against scipy's ``brentq`` on the fitted
  polynomial (numpy's own ``Polynomial``), with speed ratios at and beyond the drive's
  limits; a few flows are solved one by one in floats, many with numpy — both must give
  the same bits.
- Stage-up flows polished on an exact required-head function against ``brentq`` on the
  capacity margin written here from the affinity laws (k pumps at maximum speed hold the
  head while r² H(Q/(k r)) ≥ H_req(Q) and Q/(k r) is within the datasheet flows).
- The study's system-head function remembers one-flow answers: the same numbers as
  without, and a caller cannot change a remembered answer.

Invented pumps and curves (demo data, no source).
"""

from __future__ import annotations

import numpy as np
import pytest
from scipy.optimize import brentq

from kit.core import staging as stg
from kit.core.pump import PumpCurve
from kit.core.staging import remote_dp, staging_sweep


def random_pump(rng) -> PumpCurve:
    q_end = float(rng.uniform(0.005, 0.2))
    Q = np.linspace(0.0, q_end, int(rng.integers(4, 7)))
    x = Q / q_end
    h0 = float(rng.uniform(10.0, 120.0))
    H = h0 * (1 - rng.uniform(0.2, 0.8) * x ** rng.uniform(1.5, 2.5))
    eta = np.clip(0.8 * (1 - ((x - 0.7) / 0.7) ** 2), 0.0, 0.85)
    eta[0] = 0.0
    return PumpCurve(Q, H, speed_rpm=2900.0, diameter=0.2, efficiency=eta)


def ref_speed(p: PumpCurve, q: float, H: float, lo: float, hi: float) -> float:
    """r in [lo, hi] with r² h(q/r) = H by brentq (the ends where there is no root)."""
    poly = p.fits["head"].polynomial

    def g(r):
        return r * r * float(poly(q / r)) - H

    if g(lo) > 0:
        return lo
    if g(hi) < 0:
        return hi
    return brentq(g, lo, hi, xtol=1e-16, rtol=1e-15)


@pytest.mark.parametrize("seed", range(30))
def test_speed_ratio_matches_brentq(seed):
    rng = np.random.default_rng(seed)
    p = random_pump(rng)
    lo = float(rng.choice([0.05, 0.3, rng.uniform(0.05, 0.6)]))
    hi = float(rng.choice([1.0, 1.2, rng.uniform(lo + 0.05, 1.2)]))
    n = int(rng.integers(1, 30))
    q = rng.uniform(0.0, 1.5 * p.q_end, n)
    H = rng.uniform(0.01, 1.5, n) * p.shutoff_head  # some below lo, some above hi
    tol = 1e-9 * p.shutoff_head
    r, below, above = stg._speed(p, q, H, lo, hi, tol)
    for i in range(n):
        want = ref_speed(p, float(q[i]), float(H[i]), lo, hi)
        if below[i]:
            assert r[i] == lo
        elif above[i]:
            assert r[i] == hi
        else:
            assert r[i] == pytest.approx(want, rel=1e-9), (q[i], H[i])
    # the float and the numpy paths give the same bits
    old = stg._FLOAT_BISECT_MAX
    try:
        stg._FLOAT_BISECT_MAX = 0
        r_np, b_np, a_np = stg._speed(p, q, H, lo, hi, tol)
        stg._FLOAT_BISECT_MAX = 10 ** 6
        r_py, b_py, a_py = stg._speed(p, q, H, lo, hi, tol)
    finally:
        stg._FLOAT_BISECT_MAX = old
    assert np.array_equal(r_np, r_py) and np.array_equal(b_np, b_py)
    assert np.array_equal(a_np, a_py)


def ref_stage_up(p: PumpCurve, k: int, r_hi: float, Hc, q_lo: float, q_hi: float) -> float:
    """First flow where k pumps at r_hi no longer hold the control head (brentq)."""
    poly = p.fits["head"].polynomial

    def margin(q):
        qe = q / (k * r_hi)
        return r_hi * r_hi * float(poly(qe)) - float(Hc(q)) if qe <= p.q_end else -1.0

    qs = np.linspace(q_lo, q_hi, 2001)
    m = np.array([margin(q) for q in qs])
    j = int(np.argmax(m <= 0))
    if m[j] > 0:
        return np.inf
    if j == 0:
        return qs[0]
    a, b = qs[j - 1], qs[j]
    if margin(b) == -1.0 and b / (k * r_hi) > p.q_end:  # the datasheet end, not the head
        return min(b, k * r_hi * p.q_end) if margin(min(b, k * r_hi * p.q_end)) > 0 else \
            brentq(margin, a, k * r_hi * p.q_end, xtol=1e-15)
    return brentq(margin, a, b, xtol=1e-15)


@pytest.mark.parametrize("seed", range(16))
@pytest.mark.parametrize("strategy", ["all_vfd", "fixed"])
def test_stage_up_flows_on_an_exact_curve_match_brentq(seed, strategy):
    rng = np.random.default_rng(100 + seed)
    p = random_pump(rng)
    n = int(rng.integers(2, 4))
    h_set = float(rng.uniform(0.2, 0.6)) * p.shutoff_head
    q_des = float(rng.uniform(0.5, 1.5)) * n * p.q_end
    ctrl = remote_dp(h_set, q_des, h_set + float(rng.uniform(0.0, 0.35)) * p.shutoff_head)
    Q = np.linspace(0.02, 1.3, int(rng.integers(4, 40))) * n * p.q_end
    res = staging_sweep(p, n, Q, ctrl.head(Q), strategy=strategy, rho=998.0,
                        motor_efficiency=0.9, drive_rating=30e3, exact=[ctrl.head])
    r_hi = 1.0 if strategy == "fixed" else res.speed_range.max_ratio
    for k in range(1, n):
        got = float(res.stage_up[0, k - 1])
        want = ref_stage_up(p, k, r_hi, ctrl.head, 0.0, float(Q[-1]))
        if np.isinf(want) or want > Q[-1]:
            continue  # beyond the sweep: the kit may search past it (exact), not compared
        assert got == pytest.approx(want, rel=1e-9, abs=1e-13), (k, got, want)


def test_head_function_remembers_one_flow_answers_without_sharing_them():
    from kit import scenario as scn
    from kit.notebook import scenario_path
    from kit.studies import pump_duties as pdm
    from kit.studies import pump_selection as ps

    sc = scn.load(scenario_path("wrenfield_duty_standby.toml"))
    inp = ps.read(sc)
    system = inp.system
    Q = np.linspace(0.0, 0.08, ps.GRID_POINTS)
    band = system.band(Q)
    curves = ps._curves(system, band)
    cond = band.conditions[0]
    fn = pdm._head_fn(curves[0], system, cond)
    for q in (0.01, 0.05, 0.2):  # within the grid and beyond it (the exact curve)
        first = fn(np.array([q]))
        want = (curves[0].head(np.array([q])) if q <= Q[-1]
                else system.curve(np.array([q]), cond))
        assert np.array_equal(first, want)
        first[0] = -1.0  # a caller's change stays with the caller
        assert np.array_equal(fn(np.array([q])), want)
    many = np.array([0.01, 0.05])
    assert np.array_equal(fn(many), curves[0].head(many))


def _same_comparison(a, b):
    """Equal to rounding: a row of a batch may take one more Newton step (1e-12)."""
    assert a.saving_kWh.keys() == b.saving_kWh.keys()
    for k, v in a.saving_kWh.items():
        assert v == pytest.approx(b.saving_kWh[k], rel=1e-12, abs=1e-6, nan_ok=True)
    for ra, rb in zip(a.rows, b.rows, strict=True):
        assert ra.strategy == rb.strategy
        assert [(f.severity, f.subject, f.quantity) for f in ra.findings] == \
            [(f.severity, f.subject, f.quantity) for f in rb.findings]
        for fa, fb in zip(ra.findings, rb.findings, strict=True):
            assert fa.value == pytest.approx(fb.value, rel=1e-12, nan_ok=True)
        assert np.array_equal(ra.count, rb.count)
        for name in ("Q", "hours", "speed_ratio", "shaft_power", "input_power", "energy_kWh"):
            np.testing.assert_allclose(getattr(ra, name), getattr(rb, name), rtol=1e-12,
                                       err_msg=name)
        assert ra.total_kWh == pytest.approx(rb.total_kWh, rel=1e-12, nan_ok=True)


@pytest.mark.parametrize("seed", range(8))
def test_band_comparison_is_the_per_curve_comparison(seed):
    """One sweep per strategy over many curves = compare_strategies curve by curve (the
    same bits), a refused curve (head ≤ 0 at some flow) refused alone."""
    from kit.errors import HeadlineError

    rng = np.random.default_rng(500 + seed)
    p = random_pump(rng)
    n = int(rng.integers(1, 4))
    steps = [(float(f) * n * p.q_end, float(h)) for f, h in
             zip(np.sort(rng.uniform(0.05, 1.1, 5)), rng.uniform(100.0, 2000.0, 5),
                 strict=True)]
    h0 = p.shutoff_head
    heads = [lambda q, a=a, b=b: a * h0 + b * h0 * (np.asarray(q) / (n * p.q_end)) ** 2
             for a, b in rng.uniform(0.1, 0.6, (6, 2))]
    if seed % 2:
        heads.insert(2, lambda q: 0.0 * np.asarray(q) - 1.0)  # refused: negative head
    kw = {"rho": 998.0}
    got = stg.compare_strategies_band(p, n, steps, heads, **kw)
    for g, h in zip(got, heads, strict=True):
        try:
            want = stg.compare_strategies(p, n, steps, h, **kw)
        except HeadlineError as exc:
            assert isinstance(g, HeadlineError) and str(g) == str(exc)
            continue
        _same_comparison(g, want)
