"""Operating point, NPSH, BEP region, energy, speed control and motor selection.

Datasheets and systems are invented. Expected values come from independent computations
written here (bisection on hand-written curves, closed forms, definitions), never from the
code under test.
"""

from __future__ import annotations

import math

import fluids
import numpy as np
import pytest
from bisection import bisect
from docsig import documented_params, signature_params, unit_missing
from hypothesis import given, settings
from hypothesis import strategies as st

from kit.core.findings import Severity
from kit.core.motors import (
    IEC_RATED_OUTPUTS_KW,
    motor_efficiency,
    select_motor,
    service_factor,
)
from kit.core.operating import (
    Condition,
    annual_cost,
    annual_energy,
    bep_findings,
    compare_control,
    joules_to_kWh,
    npsh_available,
    npsh_findings,
    operating_point,
    operating_points,
)
from kit.core.pump import PumpCurve, parallel
from kit.errors import InputError, NoSolutionError, OutOfRangeError, UnknownChoiceError

G = 9.80665  # standard gravity, CGPM 1901 (from memory)
A, B = 50.0, 2.0e4
Q_PTS = np.linspace(0.0, 0.04, 5)
ETA_MAX, Q_BEP = 0.80, 0.025


def quad_eta(Q):
    return ETA_MAX * (1.0 - ((np.asarray(Q) - Q_BEP) / Q_BEP) ** 2)


def make_pump(name="P-1", a=A, b=B, q_pts=Q_PTS, **kw):
    args = dict(speed_rpm=2900.0, diameter=0.25, efficiency=quad_eta(q_pts * Q_PTS[-1] / q_pts[-1]),
                npshr=2.0 + 2000.0 * q_pts ** 2, name=name)
    args.update(kw)
    return PumpCurve(q_pts, a - b * q_pts ** 2, **args)


# ---------------------------------------------------------------- operating point
def test_closed_form_quadratic_meets_quadratic():
    # H = a − bQ² meets H = c + kQ²  ->  Q = sqrt((a − c)/(b + k))  (algebra)
    c, k = 18.0, 1.5e4
    op = operating_point(make_pump(), lambda Q: c + k * Q ** 2, rho=998.2)
    assert op.Q == pytest.approx(math.sqrt((A - c) / (B + k)), rel=1e-10)
    assert op.H == pytest.approx(c + k * op.Q ** 2, abs=1e-9)
    assert op.efficiency == pytest.approx(float(quad_eta(op.Q)), abs=1e-9)
    assert op.npshr == pytest.approx(2.0 + 2000.0 * op.Q ** 2, abs=1e-9)
    assert op.shaft_power == pytest.approx(998.2 * G * op.Q * op.H / float(quad_eta(op.Q)), rel=1e-9)
    assert op.bep_fraction == pytest.approx(op.Q / Q_BEP, rel=1e-4)


def test_against_bisection_on_cubic_pump_and_mixed_system():
    # invented cubic pump H = 60 − 300Q − 1e4Q² − 2e5Q³ and system 12 + 800Q + 9e3Q^1.9;
    # reference root by bisection on the hand-written curves
    q = np.linspace(0.0, 0.045, 6)
    p = PumpCurve(q, 60 - 300 * q - 1e4 * q ** 2 - 2e5 * q ** 3, speed_rpm=1450, diameter=0.3,
                  degrees={"head": 3})

    def sys_h(Q):
        return 12.0 + 800.0 * Q + 9e3 * np.abs(Q) ** 1.9

    ref = bisect(lambda Q: (60 - 300 * Q - 1e4 * Q ** 2 - 2e5 * Q ** 3) - sys_h(Q), 0.0, 0.045)
    op = operating_point(p, sys_h)
    assert op.Q == pytest.approx(ref, rel=1e-9)
    assert math.isnan(op.efficiency) and math.isnan(op.shaft_power)


def test_parallel_set_operating_point_closed_form():
    # two identical pumps: a − b(Q/2)² = c + kQ²  ->  Q = sqrt((a − c)/(b/4 + k))
    p = make_pump()
    c, k = 30.0, 4e3
    op = operating_point(parallel([p, p]), lambda Q: c + k * Q ** 2, rho=1000.0)
    assert op.Q == pytest.approx(math.sqrt((A - c) / (B / 4 + k)), rel=1e-9)
    assert [m[1] for m in op.members] == pytest.approx([op.Q / 2] * 2, rel=1e-9)
    assert op.shaft_power == pytest.approx(2 * float(p.power(op.Q / 2, 1000.0)), rel=1e-8)


def test_parallel_weak_pump_dead_headed_is_a_fail():
    p1 = make_pump("big")
    p2 = make_pump("small", a=30.0, b=4e4, q_pts=Q_PTS / 2)
    op = operating_point(parallel([p1, p2]), lambda Q: 35.0 + 1e4 * Q ** 2)
    f = [f for f in op.findings if "pump 'small'" in f.subject and f.quantity == "flow"]
    assert f and f[0].severity is Severity.FAIL and "dead-headed" in f[0].rule


def test_no_solution_shutoff_below_static_head():
    with pytest.raises(NoSolutionError, match=r"no operating point at high level: shut-off head 50 m "
                                              r"of pump 'P-1' is at or below the static head 52 m"):
        operating_point(make_pump(), lambda Q: 52.0 + 1e4 * Q ** 2, label="high level")


def test_no_solution_run_out_beyond_curve():
    with pytest.raises(NoSolutionError, match=r"run-out beyond the curve: at the last datasheet flow "
                                              r"0.04 m³/s the pump head 18 m still exceeds"):
        operating_point(make_pump(), lambda Q: 2.0 + 1e3 * Q ** 2)


def test_extended_search_reports_beyond_datasheet():
    c, k = 2.0, 1e3
    op = operating_point(make_pump(), lambda Q: c + k * Q ** 2, Q_max=0.06)
    assert op.Q == pytest.approx(math.sqrt((A - c) / (B + k)), rel=1e-10)
    assert any("beyond the last datasheet flow" in f.rule for f in op.findings)


def test_system_must_return_one_head_per_flow():
    with pytest.raises(InputError, match=r"'system head' must return one finite head per flow"):
        operating_point(make_pump(), lambda Q: 10.0)


@settings(max_examples=60, deadline=None)
@given(a=st.floats(5.0, 200.0), b=st.floats(1e2, 1e6), cf=st.floats(0.01, 0.95),
       k=st.floats(0.0, 1e6))
def test_property_found_point_is_on_both_curves(a, b, cf, k):
    # random monotone quadratic pump/system with an intersection (closed form for Q*)
    c = cf * a
    q_star = math.sqrt((a - c) / (b + k))
    q_end = q_star + 0.5 * (math.sqrt(a / b) - q_star)
    q = np.linspace(0.0, q_end, 5)
    p = PumpCurve(q, np.maximum(a - b * q ** 2, 0.0), speed_rpm=1450.0, diameter=0.2)
    op = operating_point(p, lambda Q: c + k * Q ** 2)
    assert abs((a - b * op.Q ** 2) - (c + k * op.Q ** 2)) < 1e-6
    assert abs(op.H - (c + k * op.Q ** 2)) < 1e-6


# ---------------------------------------------------------------- NPSH
def test_npsh_available_hand_computation():
    # open tank at sea level, 20 °C water: p = 101325 Pa, pv ≈ 2339 Pa, ρ ≈ 998.2 kg/m³
    # (property values from memory); surface 2 m above the pump, 0.5 m suction loss
    expected = (101325.0 - 2339.0) / (998.2 * 9.80665) + 2.0 - 0.5
    assert npsh_available(101325.0, 2339.0, 998.2, 2.0, 0.0, 0.5) == pytest.approx(expected, rel=1e-12)
    arr = npsh_available(101325.0, 2339.0, 998.2, 2.0, 0.0, np.array([0.0, 0.5, 1.0]))
    np.testing.assert_allclose(arr, expected + 0.5 - np.array([0.0, 0.5, 1.0]), rtol=1e-12)


def test_property_values_from_memory_agree_with_iapws():
    # sanity of the remembered figures used below: IAPWS-IF97 via iapws (saturated liquid)
    from iapws import IAPWS97
    w20, w80 = IAPWS97(T=293.15, x=0), IAPWS97(T=353.15, x=0)
    assert w20.P * 1e6 == pytest.approx(2339.0, rel=5e-3)
    assert w80.P * 1e6 == pytest.approx(47400.0, rel=5e-3)
    assert w80.rho == pytest.approx(971.8, rel=1e-3)


def test_npsh_available_refuses_negative_loss():
    with pytest.raises(OutOfRangeError, match=r"'suction loss' must be at least 0 m, not -0.2 m"):
        npsh_available(101325.0, 2339.0, 998.2, 2.0, 0.0, [0.1, -0.2])


@pytest.mark.parametrize("npsha, sev_ratio, sev_m", [
    (2.9, Severity.FAIL, Severity.FAIL),     # below NPSHr
    (3.5, Severity.PASS, Severity.CHECK),    # ratio 1.17 ≥ 1.1, but margin 0.5 m < 1 m
    (4.2, Severity.PASS, Severity.PASS),     # ratio 1.4, margin 1.2 m
], ids=["fail", "check", "pass"])
def test_npsh_findings_against_guideline(npsha, sev_ratio, sev_m):
    # guideline 'general': ratio 1.1 and 1.0 m (ANSI/HI 9.6.1 ranges, from memory)
    fr, fm = npsh_findings(npsha, 3.0, application="general")
    assert fr.severity is sev_ratio and fm.severity is sev_m
    assert fr.value == pytest.approx(npsha / 3.0) and fm.value == pytest.approx(npsha - 3.0)
    assert "9.6.1" in fm.source and "from memory" in fm.source


def test_npsh_findings_unknown_application():
    with pytest.raises(UnknownChoiceError, match=r"'NPSH margin application' must be one of 'general'"):
        npsh_findings(5.0, 3.0, application="rocket")


def test_hot_low_level_condition_fails_npsh_while_cold_passes():
    # invented suction: tank to pump, suction loss 1500·Q² m; destination surface at 25 m.
    # 20 °C: pv 2339 Pa, ρ 998.2; 80 °C: pv ≈ 47.4 kPa, ρ ≈ 971.8 (from memory, checked above)
    p = make_pump()
    ks, kd = 1500.0, 8500.0

    def cond(z_s, pv, rho):
        return Condition(system_head=lambda Q: (25.0 - z_s) + (ks + kd) * Q ** 2, rho=rho,
                         npsha=lambda Q: npsh_available(101325.0, pv, rho, z_s, 0.0, ks * Q ** 2))

    ops = operating_points(p, {"high level / 20 degC": cond(3.0, 2339.0, 998.2),
                               "low level / 80 degC": cond(-1.0, 47400.0, 971.8)})
    cold, hot = ops
    for op, z_s, pv, rho in ((cold, 3.0, 2339.0, 998.2), (hot, -1.0, 47400.0, 971.8)):
        q = math.sqrt((A - (25.0 - z_s)) / (B + ks + kd))  # closed form
        assert op.Q == pytest.approx(q, rel=1e-10)
        assert op.npsha == pytest.approx((101325.0 - pv) / (rho * G) + z_s - ks * q * q, rel=1e-10)
    npsh = {op.label: [f for f in op.findings if f.quantity.startswith("NPSH margin")] for op in ops}
    assert all(f.severity is Severity.PASS for f in npsh["high level / 20 degC"])
    assert all(f.severity is Severity.FAIL for f in npsh["low level / 80 degC"])
    assert "licensed professional practice" in npsh["low level / 80 degC"][0].rule


# ---------------------------------------------------------------- BEP region
@pytest.mark.parametrize("frac, sev", [(1.0, Severity.PASS), (0.72, Severity.PASS),
                                       (1.25, Severity.CHECK), (0.6, Severity.CHECK),
                                       (0.4, Severity.FAIL), (1.4, Severity.FAIL)])
def test_bep_regions(frac, sev):
    # POR 70–120 % of BEP (ANSI/HI 9.6.3, from memory); AOR placeholder 50–130 %
    (f,) = bep_findings(frac * 0.02, 0.02)
    assert f.severity is sev and f.value == pytest.approx(frac)


def test_bep_regions_must_nest():
    with pytest.raises(InputError, match=r"'operating regions \(AOR, POR\)' must nest"):
        bep_findings(0.02, 0.02, por=(0.7, 1.2), aor=(0.8, 1.3))


# ---------------------------------------------------------------- energy and control
def test_annual_energy_and_cost_hand_computation():
    E = annual_energy(10e3, 8000.0, 0.92, 0.97)
    assert E == pytest.approx(10e3 / (0.92 * 0.97) * 8000.0 * 3600.0, rel=1e-12)
    assert joules_to_kWh(E) == pytest.approx(10.0 / (0.92 * 0.97) * 8000.0, rel=1e-12)
    assert annual_cost(1000.0, 0.15) == pytest.approx(150.0)
    with pytest.raises(OutOfRangeError, match=r"'running hours per year' must be between 0 and 8784 h"):
        annual_energy(10e3, 9000.0, 0.92)


def test_throttle_versus_speed_closed_form():
    # affinity: r²A − BQ² = H_req  ->  r = sqrt((H_req + BQ²)/A); efficiency moved along the
    # parabola: η(Q/r) at full speed; P = ρgQH_req/η(Q/r) (Karassik et al. 2008, from memory)
    p = make_pump()
    c, k, q, rho = 15.0, 1e4, 0.02, 998.2
    cmp = compare_control(p, lambda Q: c + k * Q ** 2, q, rho=rho, hours=6000.0,
                          motor_efficiency=0.93, drive_rating=15e3)
    h_req = c + k * q * q
    r = math.sqrt((h_req + B * q * q) / A)
    assert cmp.speed.speed_ratio == pytest.approx(r, rel=1e-10)
    assert cmp.speed.speed_rpm == pytest.approx(2900.0 * r, rel=1e-10)
    eta_s = float(quad_eta(q / r))
    assert cmp.speed.shaft_power == pytest.approx(rho * G * q * h_req / eta_s, rel=1e-9)
    assert cmp.throttle.valve_head == pytest.approx((A - B * q * q) - h_req, rel=1e-10)
    assert cmp.throttle.shaft_power == pytest.approx(
        rho * G * q * (A - B * q * q) / float(quad_eta(q)), rel=1e-9)
    eta_d = fluids.VFD_efficiency(15e3, load=cmp.speed.shaft_power / 15e3)  # generic PWM table
    assert cmp.speed.drive_efficiency == pytest.approx(eta_d)
    e_t = cmp.throttle.shaft_power / 0.93 * 6000.0 / 1000.0
    e_s = cmp.speed.shaft_power / (0.93 * eta_d) * 6000.0 / 1000.0
    assert cmp.saving_kWh == pytest.approx(e_t - e_s, rel=1e-9)


def test_control_duty_beyond_pump():
    with pytest.raises(NoSolutionError, match=r"no control duty: at 0.03 m³/s the pump makes 32 m"):
        compare_control(make_pump(), lambda Q: 30.0 + 1e4 * Q ** 2, 0.03, rho=998.0, hours=100.0,
                        motor_efficiency=0.9)


# ---------------------------------------------------------------- motors
def test_iec_selection_with_tiered_margin():
    # 9 kW × 1.25 (≤ 22 kW tier, API 610 rule from memory) = 11.25 kW -> 15 kW (IEC 60072-1)
    sel = select_motor(9e3, series="IEC")
    assert sel.margin_factor == 1.25 and sel.rating == 15e3
    assert service_factor(40e3) == 1.15 and service_factor(100e3) == 1.10
    # 90.9 kW × 1.10 = 100 kW, not an IEC rating -> 110 kW
    assert select_motor(100e3 / 1.1, series="IEC").rating == pytest.approx(110e3)
    assert 400.0 in IEC_RATED_OUTPUTS_KW


def test_nema_selection_in_watts():
    # 5 kW × 1.25 = 6.25 kW; next NEMA size 10 hp = 7457 W (1 hp = 745.69987 W, from memory)
    sel = select_motor(5e3, series="NEMA")
    assert sel.rating == pytest.approx(10 * 745.69987158227, rel=1e-9)


def test_motor_beyond_largest_size():
    with pytest.raises(OutOfRangeError, match=r"'motor power needed \(shaft power × 1.1 margin, IEC "
                                              r"series\)' must be at most 400000 W"):
        select_motor(380e3, series="IEC")
    with pytest.raises(OutOfRangeError, match=r"'motor power needed .* NEMA series\)' must be at most"):
        select_motor(360e3, series="NEMA")
    with pytest.raises(UnknownChoiceError, match=r"'motor series' must be one of 'IEC', 'NEMA'"):
        select_motor(1e3, series="JIS")


def test_motor_efficiency_values_and_the_8_pole_trap():
    # fluids docstring examples (NRCan CSA table): 100 hp open 2-pole 0.93; closed 6-pole HE 0.95
    hp = 745.69987158227
    assert motor_efficiency(100 * hp, poles=2, closed=False) == pytest.approx(0.93)
    assert motor_efficiency(100 * hp, poles=6, closed=True, high_efficiency=True) == pytest.approx(0.95)
    # fluids.CSA_motor_efficiency(poles=8, high_efficiency=True) raises UnboundLocalError
    with pytest.raises(UnboundLocalError):
        fluids.CSA_motor_efficiency(100 * hp, poles=8, high_efficiency=True)
    with pytest.raises(UnknownChoiceError, match=r"'motor poles \(high-efficiency table\)' must be "
                                                 r"one of 2, 4, 6, not 8"):
        motor_efficiency(100 * hp, poles=8, high_efficiency=True)
    with pytest.raises(UnknownChoiceError, match=r"'motor poles' must be one of 2, 4, 6, 8, not 3"):
        motor_efficiency(100 * hp, poles=3)
    with pytest.raises(OutOfRangeError, match=r"'motor rating' must be between"):
        motor_efficiency(300.0)


# ---------------------------------------------------------------- documentation matches signatures
def test_documented_parameters_match_signatures():
    # the documented Parameters of every public callable that has a Parameters section must
    # name exactly the signature's public parameters, each with a unit in brackets
    # (docstring convention of fluids; common practice, no source)
    import kit.core.motors as mo
    import kit.core.operating as op
    import kit.core.pump as pu
    checked = 0
    for mod in (pu, op, mo):
        for name in mod.__all__:
            obj = getattr(mod, name)
            if not callable(obj):
                continue
            documented = documented_params(obj)
            if documented is None:
                continue
            assert not unit_missing(obj), f"{name}: {unit_missing(obj)} have no [unit]"
            assert documented == signature_params(obj), name
            checked += 1
    assert checked >= 6
