"""Energy compared at the same duty, pump speed range, NPSHr on a trimmed impeller, and
band conditions without an operating point kept in the list."""

from __future__ import annotations

import math

import numpy as np
import pytest
from raising import raises_exactly
from scipy.optimize import brentq

from kit.core.findings import Severity
from kit.core.operating import (
    SPEED_RANGE,
    TRIM_NPSHR_RULE,
    energy_at_duty,
    operating_point,
    operating_points,
)
from kit.core.pump import PumpCurve
from kit.errors import OutOfRangeError, UnknownChoiceError

g = 9.80665          # standard gravity (CGPM 1901)
RHO = 998.2          # water at 20 °C (from memory)


# invented pumps: head and efficiency exactly quadratic in Q, so the fits are exact
def h_a(q):
    return 42.0 - 20000.0 * q * q


def e_a(q):
    return 30.0 * q - 600.0 * q * q       # BEP 0.025 m³/s, 0.375


def h_b(q):
    return 36.0 - 9000.0 * q * q


def e_b(q):
    return 40.0 * q - 800.0 * q * q       # BEP 0.025 m³/s, 0.5


def make(name, h, e, n=2900.0):
    Q = np.array([0.0, 0.01, 0.02, 0.03, 0.04])
    return PumpCurve(Q, h(Q), speed_rpm=n, diameter=0.22, efficiency=e(Q), name=name,
                     degrees={"head": 2, "efficiency": 2})


def system(q):
    return 18.0 + 12000.0 * q * q


def test_energy_per_volume_two_pumps_throttled_by_hand():
    Q, em, hours = 0.02, 0.92, 5000.0
    cmp = energy_at_duty([make("A", h_a, e_a), make("B", h_b, e_b)], {"design": system}, Q,
                         control="throttle", rho=RHO, hours=hours, motor_efficiency=em)
    for name, h, e in (("A", h_a, e_a), ("B", h_b, e_b)):
        row = cmp.pump(name).rows[0]
        # hand: P = ρ g Q H_pump(Q) / η(Q); input P/η_motor; kWh/m³ = P_in / (Q · 3.6e6)
        P = RHO * g * Q * h(Q) / e(Q)
        assert row.H_pump == pytest.approx(h(Q), rel=1e-9)
        assert row.valve_head == pytest.approx(h(Q) - system(Q), rel=1e-9)
        assert row.input_power == pytest.approx(P / em, rel=1e-9)
        assert row.kWh_per_m3 == pytest.approx(P / em / (Q * 3.6e6), rel=1e-9)
        assert row.annual_energy_kWh == pytest.approx(P / em * hours / 1000, rel=1e-9)
    # ranking by energy per volume at the same duty
    kA, kB = (cmp.pump(n).worst_kWh_per_m3 for n in ("A", "B"))
    assert cmp.ranking == (("A", "B") if kA < kB else ("B", "A"))
    assert "control valve" in cmp.control_text


def test_energy_per_volume_two_pumps_speed_controlled_by_hand():
    Q, em, ed = 0.02, 0.92, 0.96
    cmp = energy_at_duty([make("A", h_a, e_a), make("B", h_b, e_b)], {"design": system}, Q,
                         control="speed", rho=RHO, hours=5000.0, motor_efficiency=em,
                         drive_efficiency=ed)
    for name, h, e in (("A", h_a, e_a), ("B", h_b, e_b)):
        row = cmp.pump(name).rows[0]
        # affinity: r² H(Q/r) = H_sys(Q) (brentq, written here); η(Q/r); P = ρ g Q H_sys / η
        r = brentq(lambda x, h=h: x * x * h(Q / x) - system(Q), 0.3, 1.0, xtol=1e-15)
        P = RHO * g * Q * system(Q) / e(Q / r)
        assert row.speed_ratio == pytest.approx(r, rel=1e-9)
        assert row.kWh_per_m3 == pytest.approx(P / (em * ed) / (Q * 3.6e6), rel=1e-8)
        assert row.valve_head == 0.0


def test_duty_beyond_a_pump_is_a_row_not_a_drop():
    weak = make("weak", lambda q: 20.0 - 10000.0 * q * q, e_a)
    cmp = energy_at_duty([weak, make("A", h_a, e_a)], {"low": lambda q: 10 + 0 * q,
                                                       "high": system}, 0.02,
                         control="throttle", rho=RHO, hours=100.0, motor_efficiency=0.9)
    w = cmp.pump("weak")
    assert [r.condition for r in w.rows] == ["low", "high"]
    assert w.rows[0].feasible and not w.rows[1].feasible
    assert w.infeasible == ("high",) and cmp.ranking == ("A", "weak")
    assert cmp.findings[0].severity is Severity.FAIL and "high" in cmp.findings[0].rule
    with raises_exactly(OutOfRangeError, r"'required flow' must be between 0 and 100 m³/s, not 0"):
        energy_at_duty([weak], {"low": system}, 0.0, control="throttle", rho=RHO,
                       motor_efficiency=0.9)
    with raises_exactly(UnknownChoiceError, r"'control' must be one of 'throttle', 'speed'"):
        energy_at_duty([weak], {"low": system}, 0.02, control="valve", rho=RHO,
                       motor_efficiency=0.9)


def test_speed_far_from_datasheet_is_refused():
    p = make("A", h_a, e_a)
    lo, hi = SPEED_RANGE["ratio"]
    with raises_exactly(OutOfRangeError, r"'speed of pump 'A' \(datasheet 2900 rpm\)' must be "
                                         rf"between {lo * 2900:g} and {hi * 2900:g} rpm, not 1e\+06 rpm"):
        operating_point(p.at_speed(1e6), system)
    with raises_exactly(OutOfRangeError, r"'speed of pump 'A'"):
        operating_point(p.at_speed(100.0), system)
    # within the range it solves (affinity: r² H(Q/r), by brentq here)
    op = operating_point(p.at_speed(2600.0), system)
    r = 2600.0 / 2900.0
    q = brentq(lambda x: r * r * h_a(x / r) - system(x), 0.0, 0.04)
    assert op.Q == pytest.approx(q, rel=1e-9)


def test_npshr_of_a_trimmed_impeller_is_not_reduced():
    Q = np.array([0.0, 0.01, 0.02, 0.03, 0.04])
    npshr = 1.5 + 3000.0 * Q * Q
    p = PumpCurve(Q, h_a(Q), speed_rpm=2900, diameter=0.22, efficiency=e_a(Q),
                  npshr=npshr, name="T", degrees={"head": 2, "efficiency": 2, "npshr": 2})
    t = p.trimmed(0.20)
    op = operating_point(t, system, npsha=12.0)
    # rule (TRIM_NPSHR_RULE): the larger of the trimmed curve at Q (full NPSHr at Q·D0/D,
    # trim law) and the full-diameter NPSHr at Q — here 1.5 + 3000 (Q·0.22/0.2)²
    r = 0.20 / 0.22
    expect = max(1.5 + 3000 * (op.Q / r) ** 2, 1.5 + 3000 * op.Q**2)
    assert op.npshr == pytest.approx(expect, rel=1e-9)
    f = [x for x in op.findings if x.quantity == "NPSHr on a trimmed impeller"]
    assert f and f[0].rule == TRIM_NPSHR_RULE["rule"]


def test_operating_points_report_keeps_a_condition_without_a_point():
    p = make("A", h_a, e_a)
    ops = operating_points(p, {"ok": system, "too high": lambda q: 50.0 + 0 * q}, rho=RHO,
                           errors="report")
    assert [o.label for o in ops] == ["ok", "too high"]
    assert math.isnan(ops[1].Q) and ops[1].findings[0].severity is Severity.FAIL
    assert "shut-off head" in ops[1].findings[0].rule


def test_zero_duty_flow_is_refused_by_the_control_comparison():
    from kit.core.operating import compare_control

    with raises_exactly(OutOfRangeError, r"'required flow' must be greater than 0 m³/s, not 0 m³/s"):
        compare_control(make("A", h_a, e_a), system, 0.0, rho=RHO, hours=100.0,
                        motor_efficiency=0.9)
