"""The fast paths of kit.core.pump against independent computations.

Scalar evaluation (Horner in floats), a pump's flow at a head (table + Newton in floats) and
a parallel set's head at a flow (Newton over the members) are checked on many random
invented curves, hostile ones included (nearly flat curves, a member whose shut-off head is
below the set's head so its check valve closes, flows past the end of the curves), against:

- numpy's own polynomial evaluation (``numpy.polynomial.Polynomial.__call__``);
- :func:`numpy.interp` for the table look-up;
- scipy's ``brentq`` on the exact scalar polynomial for the flow at a head and, nested, on
  Σ Q_i(H) − Q for the set's head (flows add at equal head; Karassik et al., Pump Handbook,
  4th ed., 2008, ch. 2, from memory).

Tolerance: relative 1e-9 on heads and flows (the kit polishes to machine precision; brentq
here to 1e-15 m³/s or m), or the head residual where a nearly flat curve makes the flow
itself ill-conditioned. The scalar and the array paths must agree to the last bit (they run
the same operations), so a chart drawn from arrays and a table from scalars never disagree.
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from scipy.optimize import brentq

from kit.core.pump import PumpCurve, PumpSet, _interp_float, parallel, series

RNG_SEEDS = range(40)


def random_curve(rng, kind: str, name: str = "p") -> PumpCurve:
    """An invented falling curve of one of several shapes (demo data, no source)."""
    q_end = float(rng.uniform(0.003, 0.3))
    n = int(rng.integers(3, 8))
    Q = np.linspace(0.0, q_end, n)
    h0 = float(rng.uniform(5.0, 200.0))
    x = Q / q_end
    if kind == "steep":
        H = h0 * (1 - rng.uniform(0.3, 0.95) * x ** rng.uniform(1.2, 3.0))
    elif kind == "flat":  # hostile: a 0.1 % drop over the whole curve
        H = h0 * (1 - 1e-3 * x ** 2)
    elif kind == "linear":
        H = h0 * (1 - rng.uniform(0.05, 0.6) * x)
    else:  # "quartic": a degree-4 fit of a steep curve
        H = h0 * (1 - 0.7 * x ** 2 - 0.2 * x ** 4)
    deg = {"quartic": {"head": min(4, n - 1)}, "linear": {"head": 1}}.get(kind)
    eta = np.clip(0.8 * (1 - ((x - 0.7) / 0.7) ** 2), 0.0, 0.85)
    eta[0] = 0.0
    return PumpCurve(Q, H, speed_rpm=1450.0, diameter=0.25, efficiency=eta, name=name,
                     degrees=deg, npshr=1.0 + 4.0 * x ** 2)


KINDS = ("steep", "flat", "linear", "quartic")


def ref_flow(p: PumpCurve, H: float) -> float:
    """Flow at head H by brentq on the fitted polynomial, with the kit's stated limits:
    zero at or above the shut-off head, 1.5 × the last datasheet flow below the curve's
    head there (monotone falling curves only)."""
    poly = p.fits["head"].polynomial
    q_hi = 1.5 * p.q_end
    if H >= float(poly(0.0)):
        return 0.0
    if H <= float(poly(q_hi)):
        return q_hi
    return brentq(lambda q: float(poly(q)) - H, 0.0, q_hi, xtol=1e-16, rtol=1e-15)


def ref_set_head(pumps, Q: float) -> float:
    """Parallel set head at set flow Q: brentq on Σ Q_i(H) − Q, held between the highest
    shut-off head and the highest member head at 1.5 × its last datasheet flow."""
    h_top = max(float(p.fits["head"].polynomial(0.0)) for p in pumps)
    h_low = max(float(p.fits["head"].polynomial(1.5 * p.q_end)) for p in pumps)

    def excess(H):
        return sum(ref_flow(p, H) for p in pumps) - Q

    if excess(h_top) >= 0:
        return h_top
    if excess(h_low) <= 0:
        return h_low
    return brentq(excess, h_low, h_top, xtol=1e-15, rtol=1e-15)


@pytest.mark.parametrize("seed", RNG_SEEDS)
def test_scalar_evaluation_is_numpys_polynomial(seed):
    """Horner in floats = numpy.polynomial.Polynomial at every flow, to the last bit for
    value (same operations) and to 1e-12 for the slope (numpy's derivative object)."""
    rng = np.random.default_rng(seed)
    p = random_curve(rng, KINDS[seed % 4])
    fit = p.fits["head"]
    qs = rng.uniform(-0.5 * p.q_end, 2.5 * p.q_end, 50)
    ref = fit.polynomial(qs)
    dref = fit.polynomial.deriv()(qs)
    for q, r, dr in zip(qs, ref, dref, strict=True):
        assert float(p.head(float(q))) == pytest.approx(float(r), rel=1e-13, abs=1e-12)
        assert float(p.head_slope(float(q))) == pytest.approx(float(dr), rel=1e-12,
                                                              abs=1e-9 * abs(p.shutoff_head))
        assert fit.value_float(float(q)) == float(p.head(np.array([q]))[0])  # same bits
    assert np.array_equal(p.head(qs), np.array([float(p.head(float(q))) for q in qs]))
    assert isinstance(p.head(0.01), np.float64) and p.head(np.asarray(0.01)).shape == ()


@pytest.mark.parametrize("seed", range(20))
def test_table_lookup_is_numpy_interp(seed):
    """One-point interpolation = numpy.interp to the last bit: repeated abscissae, points
    on nodes, outside the table and NaN."""
    rng = np.random.default_rng(seed)
    xp = np.sort(np.round(rng.uniform(-3.0, 3.0, 40), 1))  # many repeated values
    fp = rng.normal(size=40)
    xs = np.concatenate([rng.uniform(-4.0, 4.0, 60), xp, [np.nan, -np.inf, np.inf]])
    for x in xs:
        got = _interp_float(float(x), xp.tolist(), fp.tolist())
        want = float(np.interp(x, xp, fp))
        assert got == want or (math.isnan(got) and math.isnan(want))


@pytest.mark.parametrize("seed", RNG_SEEDS)
def test_flow_at_head_matches_brentq(seed):
    """Flow at a head against brentq on the exact polynomial, heads from above shut-off to
    below the head at 1.5 × the last datasheet flow."""
    rng = np.random.default_rng(1000 + seed)
    kind = KINDS[seed % 4]
    p = random_curve(rng, kind)
    h0 = p.shutoff_head
    h_end = float(p.head(1.5 * p.q_end))
    Hs = np.concatenate([rng.uniform(h_end - 0.2 * abs(h0), 1.1 * h0, 60),
                         [h0, np.nextafter(h0, -np.inf), h_end, 1.2 * h0, -5.0]])
    arr = p.flow_at_head(Hs)
    poly = p.fits["head"].polynomial
    for H, qa in zip(Hs, arr, strict=True):
        q = float(p.flow_at_head(float(H)))
        # one head alone may stop a Newton step earlier than in an array: ulps apart
        assert abs(q - float(qa)) <= 1e-13 * 1.5 * p.q_end
        want = ref_flow(p, float(H))
        if q == pytest.approx(want, rel=1e-9, abs=1e-15):
            continue
        # where the curve is flat (a flat curve, or near shut-off where dH/dQ → 0) the flow
        # is ill-conditioned: a one-ulp change of head moves it far, and Newton's method
        # converges only linearly at such a double root (six steps from the table). Then
        # the kit's flow must still give the head: the fitted head there equals H to 1e-9
        # of the shut-off head, and the flow is within 1e-4 of the last datasheet flow.
        assert 0.0 < want < 1.5 * p.q_end, (kind, H, q, want)
        assert abs(float(poly(q)) - float(H)) <= 1e-9 * abs(h0), (kind, H, q, want)
        assert abs(q - want) <= 1e-4 * p.q_end, (kind, H, q, want)


def _sets(rng, seed):
    """Random parallel sets: identical units, unlike units, and a weak unit whose shut-off
    head is below the others' so its check valve closes at low set flow."""
    mode = seed % 3
    k = int(rng.integers(2, 5))
    if mode == 0:
        p = random_curve(rng, KINDS[seed % 4], "unit")
        return [p] * k
    if mode == 1:
        return [random_curve(rng, "steep", f"u{i}") for i in range(k)]
    strong = random_curve(rng, "steep", "strong")
    weak = PumpCurve(strong.flow * 0.8, strong.head_points * 0.6, speed_rpm=1450.0,
                     diameter=0.2, name="weak", efficiency=strong.efficiency_points)
    return [strong, weak] + [strong] * (k - 2)


@pytest.mark.parametrize("seed", RNG_SEEDS)
def test_parallel_set_head_matches_nested_brentq(seed):
    """Parallel set head at set flows from zero to twice the set's end, scalar and array."""
    rng = np.random.default_rng(2000 + seed)
    pumps = _sets(rng, seed)
    s = parallel(pumps)
    Qs = np.concatenate([[0.0], rng.uniform(0.0, 2.0 * s.q_end, 30), [s.q_end]])
    arr = s.head(Qs)
    flat = any(abs(p.head_points[-1] / p.head_points[0] - 1) < 0.01 for p in pumps)
    for Q, Ha in zip(Qs, arr, strict=True):
        H = float(s.head(float(Q)))
        assert H == pytest.approx(float(Ha), rel=1e-13)
        want = ref_set_head(pumps, float(Q))
        assert H == pytest.approx(want, rel=1e-9 if not flat else 1e-7), (Q, want)
        if flat:  # the set head is insensitive to flow on a flat curve: check the flow
            got_q = sum(ref_flow(p, H) for p in pumps)
            if 0 < got_q < sum(1.5 * p.q_end for p in pumps) * (1 - 1e-9) and Q > 0:
                assert got_q == pytest.approx(float(Q), rel=1e-6)


@pytest.mark.parametrize("seed", range(12))
def test_closed_member_passes_nothing_and_set_power_adds_up(seed):
    """At a set flow where the common head is above the weak unit's shut-off, the weak
    unit passes nothing; set efficiency = ρ g Q H / Σ P_i over the members' own flows."""
    rng = np.random.default_rng(3000 + seed)
    pumps = _sets(rng, 3 * seed + 2)  # strong + weak (+ strong ...)
    s = parallel(pumps)
    weak = pumps[1]
    Q = 0.05 * s.q_end
    H = float(s.head(Q))
    members = s.members_at(Q)
    if H >= weak.shutoff_head:
        assert members[1][1] == 0.0
    rho = 998.0
    flows = [ref_flow(p, H) for p in pumps]
    power = sum(float(p.power(q, rho)) if q > 0 else float("nan") for p, q in zip(
        pumps, flows, strict=True))
    got = float(s.power(Q, rho))
    if math.isnan(power):
        assert math.isnan(got)
    else:
        assert got == pytest.approx(power, rel=1e-9)
        eta = float(s.efficiency(Q))
        ref_eta = s.test_density * 9.80665 * Q * H / float(s.power(Q, s.test_density))
        assert eta == pytest.approx(ref_eta, rel=1e-12)


@pytest.mark.parametrize("seed", range(10))
def test_series_set_adds_heads(seed):
    """Series: heads add at equal flow (past the curve end too)."""
    rng = np.random.default_rng(4000 + seed)
    pumps = [random_curve(rng, "steep", f"s{i}") for i in range(int(rng.integers(2, 4)))]
    s = series(pumps)
    for Q in (0.0, 0.3 * s.q_end, 2.0 * s.q_end):
        want = sum(float(p.fits["head"].polynomial(Q)) for p in pumps)
        assert float(s.head(Q)) == pytest.approx(want, rel=1e-12, abs=1e-9)


def test_one_set_flow_answers_in_the_same_shape():
    """A scalar, a 0-d array and a one-element array keep their shapes."""
    p = PumpCurve([0, 0.01, 0.02], [30.0, 28.0, 22.0], speed_rpm=1450, diameter=0.25)
    s = PumpSet([p, p], "parallel")
    assert np.shape(s.head(0.02)) == () and np.shape(s.head(np.asarray(0.02))) == ()
    assert s.head(np.array([0.02])).shape == (1,)
    assert np.shape(p.flow_at_head(28.0)) == () and p.flow_at_head([28.0]).shape == (1,)
    assert float(s.head(0.02)) == pytest.approx(28.0, rel=1e-12)  # each passes 0.01
