"""Pump curves: fit, affinity laws, trim, parallel/series sets, and refused datasheets.

All datasheets here are invented. Reference values are closed forms written in the test:
a quadratic pump H = a − bQ² scaled by the affinity laws stays a quadratic whose
coefficients are computed by hand (Karassik et al., Pump Handbook, 4th ed., 2008, affinity
laws — from memory).
"""

from __future__ import annotations

import math

import numpy as np
import pytest

from kit.core.findings import Severity
from kit.core.pump import PumpCurve, PumpSet, parallel, series
from kit.errors import InputError, OutOfRangeError, UnknownChoiceError

A, B = 50.0, 2.0e4          # invented pump: H = A − B·Q² [m, s²/m⁵]
Q_PTS = np.linspace(0.0, 0.04, 5)
ETA_MAX, Q_BEP = 0.80, 0.025  # invented efficiency: η = ETA_MAX·(1 − ((Q − Q_BEP)/Q_BEP)²)


def quad_head(Q, a=A, b=B):
    return a - b * np.asarray(Q) ** 2


def quad_eta(Q):
    return ETA_MAX * (1.0 - ((np.asarray(Q) - Q_BEP) / Q_BEP) ** 2)


def make_pump(name="P-1", **kw):
    args = dict(speed_rpm=2900.0, diameter=0.25, efficiency=quad_eta(Q_PTS),
                npshr=2.0 + 2000.0 * Q_PTS ** 2, name=name)
    args.update(kw)
    return PumpCurve(Q_PTS, quad_head(Q_PTS), **args)


# ---------------------------------------------------------------- fit and evaluation
def test_quadratic_datasheet_is_reproduced_by_the_fit():
    # exact quadratic data: least squares of degree 2 reproduces it (closed form above)
    p = make_pump()
    Q = np.linspace(0.0, 0.04, 17)
    np.testing.assert_allclose(p.head(Q), quad_head(Q), rtol=0, atol=1e-9)
    np.testing.assert_allclose(p.efficiency(Q), quad_eta(Q), rtol=0, atol=1e-9)
    rep = p.fit_report()
    assert rep["head"]["degree"] == 2 and rep["efficiency"]["degree"] == 3  # 5 points -> cubic η
    assert rep["head"]["max_residual"] < 1e-9 and rep["head"]["rms_residual"] < 1e-9
    assert rep["npshr"]["unit"] == "m"


def test_fit_residuals_match_an_independent_least_squares():
    # noisy invented points; residuals recomputed with numpy.polyfit (independent LS routine)
    H = quad_head(Q_PTS) + np.array([0.3, -0.2, 0.1, 0.25, -0.4])
    p = PumpCurve(Q_PTS, H, speed_rpm=1450.0, diameter=0.3)
    coef = np.polyfit(Q_PTS, H, 2)
    res = np.polyval(coef, Q_PTS) - H
    rep = p.fit_report()["head"]
    assert rep["max_residual"] == pytest.approx(np.max(np.abs(res)), rel=1e-9)
    assert rep["rms_residual"] == pytest.approx(np.sqrt(np.mean(res ** 2)), rel=1e-9)


def test_bep_is_the_peak_of_the_efficiency_curve():
    # closed form: the invented η parabola peaks at Q_BEP with ETA_MAX
    q, h, eta = make_pump().bep
    assert q == pytest.approx(Q_BEP, abs=2e-6)
    assert h == pytest.approx(A - B * Q_BEP ** 2, abs=1e-3)
    assert eta == pytest.approx(ETA_MAX, abs=1e-9)


def test_power_from_rho_g_Q_H_over_eta():
    # definition of hydraulic power, P = ρ g Q H / η (hand computation)
    p = make_pump()
    rho, q = 998.2, 0.03
    expected = rho * 9.80665 * q * (A - B * q ** 2) / float(quad_eta(q))
    assert float(p.power(q, rho)) == pytest.approx(expected, rel=1e-9)


def test_power_curve_is_scaled_by_density():
    pw = 5e3 + 3e5 * Q_PTS - 2.5e6 * Q_PTS ** 2  # invented quadratic, water at 1000 kg/m³
    p = PumpCurve(Q_PTS, quad_head(Q_PTS), speed_rpm=2900, diameter=0.25, power=pw)
    assert float(p.power(0.02, 850.0)) == pytest.approx(10e3 * 0.85, rel=1e-9)


def test_range_findings_beyond_the_last_datasheet_flow():
    p = make_pump()
    assert p.range_findings(0.03) == []
    (f,) = p.range_findings(0.05)
    assert f.severity is Severity.CHECK and "beyond the last datasheet flow" in f.rule
    assert float(p.head(0.05)) == pytest.approx(A - B * 0.05 ** 2)  # still returns a value


# ---------------------------------------------------------------- affinity laws and trim
@pytest.mark.parametrize("n", [1450.0, 2320.0, 3200.0])
def test_speed_affinity_closed_form(n):
    # Q ∝ n, H ∝ n², P ∝ n³, NPSHr ∝ n² (Karassik et al. 2008, from memory):
    # H_n(Q) = r²·A − B·Q²; η_n(r·Q) = η(Q)
    r = n / 2900.0
    p = make_pump().at_speed(n)
    Q = np.linspace(0.0, 0.04 * r, 9)
    np.testing.assert_allclose(p.head(Q), r * r * A - B * Q ** 2, atol=1e-9)
    np.testing.assert_allclose(p.efficiency(r * Q_PTS), quad_eta(Q_PTS), atol=1e-9)
    np.testing.assert_allclose(p.npshr(r * Q_PTS), r * r * (2.0 + 2000.0 * Q_PTS ** 2), atol=1e-9)
    rho = 1000.0
    assert float(p.power(r * 0.02, rho)) == pytest.approx(
        r ** 3 * float(make_pump().power(0.02, rho)), rel=1e-9)
    assert p.speed_rpm == n and p.datasheet_speed_rpm == 2900.0
    assert any(f.quantity == "NPSHr scaling" for f in p.scaling_findings)
    assert any(f.quantity == "speed ratio" for f in p.scaling_findings) == (n > 2900.0)


def test_power_curve_scales_with_cube_of_speed():
    pw = 5e3 + 3e5 * Q_PTS - 2.5e6 * Q_PTS ** 2  # invented quadratic; 10 kW at 0.02 m³/s
    p = PumpCurve(Q_PTS, quad_head(Q_PTS), speed_rpm=2900, diameter=0.25, power=pw)
    r = 0.5
    assert float(p.at_speed(1450.0).power(0.02 * r, 1000.0)) == pytest.approx(10e3 * r ** 3)


def test_trim_law_closed_form_and_caution():
    # simple trim law Q ∝ D, H ∝ D² (Karassik et al. 2008, from memory): H = d²·A − B·Q²
    p = make_pump()
    t = p.trimmed(0.2375)  # 95 %
    d = 0.95
    Q = np.linspace(0.0, 0.038, 7)
    np.testing.assert_allclose(t.head(Q), d * d * A - B * Q ** 2, atol=1e-9)
    assert t.diameter == 0.2375 and t.datasheet_diameter == 0.25
    assert not any(f.quantity == "trim ratio" for f in t.scaling_findings)
    deep = p.trimmed(0.2)  # 80 %: beyond the usual trim range (common practice, from memory)
    (f,) = [f for f in deep.scaling_findings if f.quantity == "trim ratio"]
    assert f.severity is Severity.CHECK and f.value == pytest.approx(0.8)
    assert "from memory" in f.source


def test_trim_refuses_larger_than_datasheet_diameter():
    with pytest.raises(OutOfRangeError, match=r"'trimmed impeller diameter of pump 'P-1'' "
                                              r"must be between 0.125 and 0.25 m, not 0.26 m"):
        make_pump().trimmed(0.26)


# ---------------------------------------------------------------- sets
def test_parallel_identical_pumps_double_flow_at_equal_head():
    # closed form: two identical pumps a − bQ² in parallel give a − b(Q/2)²
    p = make_pump()
    s = parallel([p, p])
    Q = np.linspace(0.0, 0.08, 11)
    np.testing.assert_allclose(s.head(Q), A - B * (Q / 2) ** 2, atol=1e-8)
    np.testing.assert_allclose(s.head(2 * 0.017), p.head(0.017), atol=1e-8)
    assert s.q_end == pytest.approx(0.08)


def test_series_identical_pumps_double_head():
    p = make_pump()
    s = series([p, p])
    Q = np.linspace(0.0, 0.04, 9)
    np.testing.assert_allclose(s.head(Q), 2 * (A - B * Q ** 2), atol=1e-9)
    np.testing.assert_allclose(s.npshr(0.03), p.npshr(0.03))  # first pump takes suction


def test_parallel_unequal_pumps_weaker_one_held_shut():
    # pump 2 (shut-off 30 m) contributes nothing above 30 m. Reference: bisection on the
    # closed-form inverse flows sqrt((a_i − H)/b_i), written here.
    p1 = make_pump("big")
    p2 = PumpCurve(Q_PTS / 2, quad_head(Q_PTS / 2, 30.0, 4.0e4), speed_rpm=2900, diameter=0.2,
                   name="small")
    s = parallel([p1, p2])

    def flow_sum(H):
        return sum(math.sqrt(max(a - H, 0.0) / b) for a, b in ((A, B), (30.0, 4.0e4)))

    for Qt in (0.01, 0.03, 0.045, 0.055):
        lo, hi = 0.0, A
        for _ in range(200):
            mid = 0.5 * (lo + hi)
            lo, hi = (mid, hi) if flow_sum(mid) > Qt else (lo, mid)
        assert float(s.head(Qt)) == pytest.approx(0.5 * (lo + hi), abs=1e-8)
    members = dict((p.name, q) for p, q, _ in s.members_at(0.01))
    assert members["small"] == 0.0 and members["big"] == pytest.approx(0.01, abs=1e-12)


def test_set_refuses_unknown_arrangement_and_single_pump():
    p = make_pump()
    with pytest.raises(UnknownChoiceError, match=r"'pump arrangement' must be one of 'parallel', "
                                                 r"'series', not 'diagonal'"):
        PumpSet([p, p], "diagonal")
    with pytest.raises(InputError, match=r"'pumps in set' needs at least 2 pumps, not 1 pumps"):
        parallel([p])


# ---------------------------------------------------------------- refused datasheets
def _pc(Q, H, **kw):
    args = dict(speed_rpm=1450.0, diameter=0.25, name="X")
    args.update(kw)
    return PumpCurve(Q, H, **args)


def test_fewer_than_three_points():
    with pytest.raises(InputError, match=r"'flow of pump 'X'' needs at least 3 datasheet points, "
                                         r"not 2 points"):
        _pc([0.0, 0.01], [30.0, 25.0])


def test_duplicate_flows():
    with pytest.raises(InputError, match=r"'flow of pump 'X' point 3' duplicates point 2"):
        _pc([0.0, 0.01, 0.01, 0.02], [30.0, 28.0, 27.0, 22.0])


def test_non_increasing_flows():
    with pytest.raises(InputError, match=r"'flow of pump 'X' point 3' must be greater than point 2 "
                                         r"\(0.02 m³/s\)"):
        _pc([0.0, 0.02, 0.01], [30.0, 28.0, 22.0])


def test_negative_flow_and_head():
    with pytest.raises(OutOfRangeError, match=r"'flow of pump 'X' point 1' must be at least 0 m³/s, "
                                              r"not -0.01 m³/s"):
        _pc([-0.01, 0.01, 0.02], [30.0, 28.0, 22.0])
    with pytest.raises(OutOfRangeError, match=r"'head of pump 'X' point 3' must be at least 0 m, "
                                              r"not -1 m"):
        _pc([0.0, 0.01, 0.02], [30.0, 28.0, -1.0])


def test_rising_head_beyond_tolerance():
    # 2 % of 30 m = 0.6 m allowed (common practice, no source); +1 m refused, +0.5 m accepted
    _pc([0.0, 0.01, 0.02], [30.0, 30.5, 22.0])
    with pytest.raises(InputError, match=r"'head of pump 'X' point 2' rises 1 m above .* allowed "
                                         r"rise is 0.02 × first-point head = 0.6 m"):
        _pc([0.0, 0.01, 0.02], [30.0, 31.0, 22.0])


def test_efficiency_above_one():
    with pytest.raises(OutOfRangeError, match=r"'efficiency of pump 'X' point 3' must be between "
                                              r"0 and 1 -, not 1.2 -"):
        _pc([0.0, 0.01, 0.02], [30.0, 28.0, 22.0], efficiency=[0.0, 0.6, 1.2])


def test_mismatched_lengths():
    with pytest.raises(InputError, match=r"'head of pump 'X'' must have one value per flow point "
                                         r"\(3 flows\), not 2 values"):
        _pc([0.0, 0.01, 0.02], [30.0, 28.0])
    with pytest.raises(InputError, match=r"'NPSHr of pump 'X'' must have one value per flow point"):
        _pc([0.0, 0.01, 0.02], [30.0, 28.0, 22.0], npshr=[1.0, 2.0])


def test_fit_degree_out_of_range():
    with pytest.raises(OutOfRangeError, match=r"'fit degree of head' must be between 1 and 2"):
        _pc([0.0, 0.01, 0.02], [30.0, 28.0, 22.0], degrees={"head": 3})
    with pytest.raises(UnknownChoiceError, match=r"'fit degree curve' must be one of 'head'"):
        _pc([0.0, 0.01, 0.02], [30.0, 28.0, 22.0], degrees={"torque": 2})


def test_missing_curve_is_named():
    p = _pc([0.0, 0.01, 0.02], [30.0, 28.0, 22.0])
    with pytest.raises(InputError, match=r"'NPSHr of pump 'X'' is needed but no datasheet points"):
        p.npshr(0.01)
