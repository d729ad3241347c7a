"""Staging and speed control: switch points, speeds, strategies and energy over a profile.

The pump is invented with an exactly quadratic head curve H = 40 − 20000 Q² and a linear
power curve P = 3000 + 300000 Q (both fitted exactly by a degree-2 polynomial), so every
expected value below is a closed form written here by hand from the affinity laws
(Q ∝ n, H ∝ n², P ∝ n³; Karassik et al., Pump Handbook 2008, from memory), or a root found by
the tests' own bisection — never from the code under test.
"""

from __future__ import annotations

import math

import fluids
import numpy as np
import pytest
from bisection import bisect
from docsig import documented_params, signature_params, unit_missing
from raising import raises_exactly

from kit.core import staging as stg
from kit.core.findings import Severity
from kit.core.pump import PumpCurve
from kit.core.staging import (
    SpeedRange,
    StagingRule,
    compare_strategies,
    constant_pressure,
    control_findings,
    load_profile,
    profile_energy,
    remote_dp,
    required_heads,
    staging_sweep,
    vfd_efficiency,
)
from kit.errors import InputError, OutOfRangeError, UnknownChoiceError

H0, B = 40.0, 20000.0       # head = H0 − B Q² [m]
P0, P1 = 3000.0, 300000.0   # shaft power = P0 + P1 Q [W] at 1000 kg/m³
RATING = 15e3               # drive rating [W]
EM = 0.9                    # motor efficiency [-]
Q_PTS = np.array([0.0, 0.01, 0.02, 0.03])


def pump():
    return PumpCurve(Q_PTS, H0 - B * Q_PTS ** 2, speed_rpm=2900.0, diameter=0.2,
                     power=P0 + P1 * Q_PTS, name="T-1")


def kw(**extra):
    out = dict(rho=1000.0, motor_efficiency=EM, drive_rating=RATING)
    out.update(extra)
    return out


def hand_speed(q_each, H):
    """r² (H0 − B (q/r)²) = H  ->  r = √((H + B q²)/H0) (closed form of the affinity law)."""
    return math.sqrt((H + B * q_each ** 2) / H0)


def hand_power(q_each, r):
    """P = r³ P(q/r) at 1000 kg/m³ (affinity law)."""
    return r ** 3 * (P0 + P1 * q_each / r)


# ---------------------------------------------------------------- switch points by hand
def test_stage_up_and_down_constant_pressure_by_hand():
    # one pump at full speed holds 30 m up to 40 − 20000 Q² = 30 -> Q = √(10/20000)
    q_up = math.sqrt(10.0 / B)
    res = staging_sweep(pump(), 2, np.linspace(0.002, 0.04, 20), [30.0] * 20,
                        rule=StagingRule("pressure", hysteresis=0.1), **kw())
    assert res.stage_up[0, 0] == pytest.approx(q_up, rel=1e-10)  # closed form, by hand
    assert res.stage_down[0, 0] == pytest.approx(0.9 * q_up, rel=1e-10)
    assert np.all(res.count[0] == np.where(res.Q > q_up, 2, 1))
    assert np.all(res.count_falling[0] == np.where(res.Q >= 0.9 * q_up, 2, 1))


def test_stage_up_remote_dp_with_speed_limit_by_hand():
    # control curve 20 + 10 (Q/0.04)²; drive max 0.95: 0.9025·40 − B Q² = 20 + 6250 Q²
    ctrl = remote_dp(20.0, 0.04, 30.0)
    q_up = math.sqrt((0.95 ** 2 * H0 - 20.0) / (B + 6250.0))
    Q = np.linspace(0.002, 0.05, 25)
    res = staging_sweep(pump(), 3, Q, ctrl.head(Q), speed=SpeedRange(0.3, 0.95),
                        exact=[ctrl.head], **kw())
    assert res.stage_up[0, 0] == pytest.approx(q_up, rel=1e-12)  # closed form, by hand
    # two pumps: Q/2 each -> 0.9025·40 − B Q²/4 = 20 + 6250 Q²
    assert res.stage_up[0, 1] == pytest.approx(math.sqrt(16.1 / (B / 4 + 6250.0)), rel=1e-12)
    # without the exact curve the control head is interpolated linearly on the 2 mm³/s grid
    grid = staging_sweep(pump(), 3, Q, ctrl.head(Q), speed=SpeedRange(0.3, 0.95), **kw())
    assert grid.stage_up[0, 0] == pytest.approx(q_up, rel=1e-3)


def test_falling_demand_keeps_the_extra_pump_inside_the_hysteresis_band():
    q_up = math.sqrt(10.0 / B)
    q = 0.95 * q_up                      # inside the band 0.9–1.0 × the stage-up flow
    flat = [lambda x: 30.0 + 0.0 * np.asarray(x)]   # exact: finds the stage-up past the grid
    res = staging_sweep(pump(), 2, [q], [30.0], exact=flat, **kw())
    assert res.stage_up[0, 0] == pytest.approx(q_up, rel=1e-12)
    assert (res.count[0, 0], res.count_falling[0, 0]) == (1, 2)
    r2 = hand_speed(q / 2, 30.0)         # two pumps at Q/2 each, by hand
    assert res.speed_ratio_falling[0, 0] == pytest.approx(r2, rel=1e-12)
    P = hand_power(q / 2, r2)
    eta_d = fluids.VFD_efficiency(RATING, load=P / RATING)
    assert res.input_power_falling[0, 0] == pytest.approx(2 * P / (EM * eta_d), rel=1e-9)
    # with a drive minimum of 0.9 the rising state (r ≈ 0.99) is fine, the falling one not
    tight = staging_sweep(pump(), 2, [0.0215], [30.0], speed=SpeedRange(0.9), exact=flat,
                          **kw())
    assert hand_speed(0.0215 / 2, 30.0) < 0.9 < hand_speed(0.0215, 30.0)
    assert [f.quantity for f in tight.findings] == ["speed ratio needed (falling demand)"]


def test_exact_polish_matches_grid_interpolation_on_a_curved_requirement():
    # a system curve 10 + 30000 Q² sampled on a coarse grid; the stage-up flow by Brent's
    # method on the exact curve, checked against bisection written here
    def sysh(q):
        return 10.0 + 30000.0 * np.asarray(q) ** 2
    Q = np.linspace(0.001, 0.05, 9)
    res = staging_sweep(pump(), 2, Q, sysh(Q), exact=[sysh], **kw())
    q_hand = bisect(lambda q: (H0 - B * q * q) - (10.0 + 30000.0 * q * q), 0.0, 0.05)
    assert res.stage_up[0, 0] == pytest.approx(q_hand, rel=1e-10)  # bisection, tests' own


def test_staging_by_flow_uses_the_users_flows_and_flags_late_staging():
    Q = np.linspace(0.002, 0.04, 20)
    early = staging_sweep(pump(), 2, Q, [30.0] * 20, rule=StagingRule("flow", (0.015,), 0.2),
                          **kw())
    assert early.stage_up[0, 0] == 0.015 and early.stage_down[0, 0] == pytest.approx(0.012)
    assert np.all(early.count[0] == np.where(Q > 0.015, 2, 1))
    assert not [f for f in early.findings if f.severity == Severity.FAIL]
    late = staging_sweep(pump(), 2, Q, [30.0] * 20, rule=StagingRule("flow", (0.03,), 0.1),
                         **kw())
    fails = {f.quantity for f in late.findings if f.severity == Severity.FAIL}
    assert "stage-up flow 1" in fails and "flow not met" in fails  # 0.0224 < Q ≤ 0.03 short


# ---------------------------------------------------------------- speeds and strategies
def test_all_vfd_speed_and_power_by_hand():
    Q = np.array([0.01, 0.03])
    res = staging_sweep(pump(), 2, Q, [30.0, 30.0], **kw())
    for j, (q, k) in enumerate(((0.01, 1), (0.03, 2))):
        r = hand_speed(q / k, 30.0)
        assert res.count[0, j] == k
        assert res.speed_ratio[0, j] == pytest.approx(r, rel=1e-12)
        Ps = hand_power(q / k, r)
        assert res.shaft_power[0, j] == pytest.approx(k * Ps, rel=1e-9)
        eta_d = fluids.VFD_efficiency(RATING, load=Ps / RATING)  # fluids' own scalar call
        assert res.input_power[0, j] == pytest.approx(k * Ps / (EM * eta_d), rel=1e-9)


def test_one_vfd_splits_flow_between_fixed_and_drive_pump_by_hand():
    res = staging_sweep(pump(), 2, [0.03], [30.0], strategy="one_vfd", **kw())
    q_fixed = math.sqrt(10.0 / B)            # fixed pump at full speed on 30 m
    q_drive = 0.03 - q_fixed
    r = hand_speed(q_drive, 30.0)
    assert res.flow_fixed[0, 0] == pytest.approx(q_fixed, rel=1e-9)
    assert res.flow_drive[0, 0] == pytest.approx(q_drive, rel=1e-7)
    assert res.speed_ratio[0, 0] == pytest.approx(r, rel=1e-9)
    Pd = hand_power(q_drive, r)
    Pf = P0 + P1 * q_fixed
    eta_d = fluids.VFD_efficiency(RATING, load=Pd / RATING)
    assert res.input_power[0, 0] == pytest.approx(Pd / (EM * eta_d) + Pf / EM, rel=1e-7)
    assert np.array_equal(res.count, res.count_falling)  # one drive: no hysteresis band


def test_fixed_speed_throttles_the_excess_head():
    res = staging_sweep(pump(), 2, [0.01, 0.03], [30.0, 30.0], strategy="fixed", **kw())
    assert res.throttled_head[0].tolist() == pytest.approx([38.0 - 30.0, H0 - B * 0.015 ** 2
                                                            - 30.0])
    assert res.input_power[0, 1] == pytest.approx(2 * (P0 + P1 * 0.015) / EM)


def test_sweep_matches_scalar_brent_per_point_over_a_band():
    # independent: for each condition and flow, the fewest pumps that meet the head at full
    # speed within their datasheet flows (≤ 0.03 m³/s each), then the speed by the tests'
    # own bisection on r² H(Q/(k r)) = H_req
    Q = np.linspace(0.002, 0.055, 30)
    band = np.array([s + c * Q ** 2 for s in (12.0, 18.0) for c in (6000.0, 9000.0)])
    res = staging_sweep(pump(), 3, Q, band, **kw())
    for c in range(band.shape[0]):
        for j, q in enumerate(Q):
            k = next((k for k in (1, 2, 3)
                      if H0 - B * (q / k) ** 2 >= band[c, j] and q / k <= 0.03), None)
            assert res.shortfall[c, j] == (k is None)
            if k is None:  # all three short: flagged, the count stays at the duty number
                assert res.count[c, j] == 3
                continue
            r = bisect(lambda r, q=q, k=k, h=band[c, j]: r * r * (H0 - B * (q / (k * r)) ** 2)
                       - h, 0.3, 1.0)
            assert res.count[c, j] == k
            assert res.speed_ratio[c, j] == pytest.approx(r, abs=1e-12)


def test_beyond_the_scaled_datasheet_end_is_a_check():
    # one pump on 12 + 6000 Q² at 0.0276 m³/s needs r ≈ 0.89: Q/r ≈ 0.031 > 0.03 m³/s
    q = 0.0276
    res = staging_sweep(pump(), 3, [q], [12.0 + 6000.0 * q * q], **kw())
    r = hand_speed(q, 12.0 + 6000.0 * q * q)
    assert res.count[0, 0] == 1 and q / r > 0.03 and res.beyond_curve[0, 0]
    assert any(f.quantity.startswith("flow per pump") and f.severity == Severity.CHECK
               for f in res.findings)


def test_default_motor_and_drive_from_the_motor_tables():
    res = staging_sweep(pump(), 2, [0.01], [30.0], rho=1000.0)
    # largest shaft power on the datasheet 3000 + 300000·0.03 = 12 kW; × 1.25 (tiered margin,
    # API 610 from memory) = 15 kW -> IEC 15 kW; CSA efficiency via fluids (4-pole, enclosed)
    assert res.drive_rating == 15e3
    assert res.motor_efficiency == fluids.CSA_motor_efficiency(15e3, closed=True, poles=4)


def test_shortfall_is_a_fail_and_not_met_by_the_standby():
    res = staging_sweep(pump(), 1, [0.01, 0.03], [30.0, 30.0], **kw())
    assert res.shortfall[0].tolist() == [False, True]
    f = [f for f in res.findings if f.quantity == "flow not met"][0]
    assert f.severity == Severity.FAIL and "standby" in f.rule


def test_speed_below_drive_minimum_is_held_at_minimum_and_flagged():
    res = staging_sweep(pump(), 1, [0.005], [30.0], speed=SpeedRange(0.9, 1.0), **kw())
    assert res.below_min_speed[0, 0] and res.speed_ratio[0, 0] == 0.9
    assert res.head[0, 0] == pytest.approx(0.81 * H0 - B * 0.005 ** 2)  # by hand at r = 0.9
    assert any(f.severity == Severity.FAIL and f.quantity == "speed ratio needed"
               for f in res.findings)


def test_low_speed_flags_affinity_accuracy():
    res = staging_sweep(pump(), 1, [0.001], [8.0], **kw())
    r = hand_speed(0.001, 8.0)  # 0.448
    assert res.low_speed[0, 0] and res.speed_ratio[0, 0] == pytest.approx(r)
    f = [f for f in res.findings if f.severity == Severity.CHECK][0]
    assert "50–60 %" in f.source and f.value == pytest.approx(r)


def test_control_curve_below_system_curve_fails():
    Q = np.array([0.01, 0.02, 0.03])
    out = control_findings(constant_pressure(20.0), Q, [[15.0, 18.0, 22.0], [10, 12, 14]])
    assert [f.severity for f in out] == [Severity.FAIL, Severity.PASS]
    assert out[0].value == pytest.approx(-2.0)


def test_required_heads_follow_the_system_or_the_control():
    Q = np.array([0.01, 0.02])
    band = np.array([[20.0, 26.0], [22.0, 31.0]])
    H, f = required_heads(Q, band)
    assert H.tolist() == band.tolist() and f == []
    H, f = required_heads(Q, band, remote_dp(25.0, 0.02, 30.0), labels=["low", "high"])
    assert H.tolist() == [[26.25, 30.0], [26.25, 30.0]]   # 25 + 5 (Q/0.02)², by hand
    assert [x.severity for x in f] == [Severity.PASS, Severity.FAIL]


# ---------------------------------------------------------------- energy over a profile
def test_energy_over_three_step_profile_by_hand():
    steps = [(0.01, 3000.0), (0.03, 2000.0), (0.015, 1500.0)]
    row = profile_energy(pump(), 2, steps, lambda q: 30.0 + 0.0 * q, **kw())
    total = 0.0
    for q, hours in steps:
        k = 1 if q <= math.sqrt(10.0 / B) else 2
        r = hand_speed(q / k, 30.0)
        Ps = hand_power(q / k, r)
        eta_d = fluids.VFD_efficiency(RATING, load=Ps / RATING)
        total += k * Ps / (EM * eta_d) * hours / 1000.0   # W·h -> kWh
    assert row.total_kWh == pytest.approx(total, rel=1e-9)
    assert row.Q.tolist() == [0.01, 0.015, 0.03]  # sorted by flow


def test_compare_strategies_orders_and_saves():
    steps = [(0.008, 4000.0), (0.02, 3000.0), (0.035, 1000.0)]
    c = compare_strategies(pump(), 2, steps, lambda q: 10.0 + 15000.0 * np.asarray(q) ** 2,
                           **kw())
    fixed = c.row("fixed")
    hand = sum((k := (1 if q <= math.sqrt(30.0 / 35000.0) else 2)) * (P0 + P1 * q / k) / EM
               * t / 1000.0 for q, t in steps)   # fixed speed on the pump curve, by hand
    assert fixed.total_kWh == pytest.approx(hand, rel=1e-9)
    assert c.saving_kWh["fixed"] == 0.0
    assert c.saving_kWh["all_vfd"] > c.saving_kWh["one_vfd"] > 0


def test_vfd_efficiency_vectorised_equals_fluids():
    loads = np.array([0.005, 0.05, 0.3, 0.77, 1.0])
    got = vfd_efficiency(22e3, loads)
    want = [fluids.VFD_efficiency(22e3, load=x) for x in loads]   # fluids' scalar function
    assert got.tolist() == want


# ---------------------------------------------------------------- bad inputs
@pytest.mark.parametrize("call, cls, match", [
    (lambda: load_profile([]), InputError, "load profile.*at least one"),
    (lambda: load_profile([(0.01, -5.0)]), OutOfRangeError, "step 1 hours.*at least 0 h"),
    (lambda: load_profile([(0.0, 5.0)]), OutOfRangeError, "step 1 flow.*greater than 0"),
    (lambda: load_profile([(0.01, 5000.0), (0.02, 4000.0)]), OutOfRangeError,
     "total hours.*8784"),
    (lambda: load_profile([(0.01, 50.0), (0.01, 40.0)]), InputError, "distinct"),
    (lambda: load_profile([(0.01, 50.0, 3)]), InputError, "pair"),
    (lambda: SpeedRange(0.02), OutOfRangeError, "minimum speed ratio.*between 0.05 and 1"),
    (lambda: SpeedRange(0.5, 0.4), OutOfRangeError, "maximum speed ratio.*between 0.5 and 1.2"),
    (lambda: SpeedRange(0.3, 1.5), OutOfRangeError, "maximum speed ratio"),
    (lambda: StagingRule("volume"), UnknownChoiceError, "staging basis.*'pressure', 'flow'"),
    (lambda: StagingRule("flow"), InputError, "stage-up flows.*needed"),
    (lambda: StagingRule("flow", (0.02, 0.01)), OutOfRangeError, "stage-up flow 2.*0.02"),
    (lambda: StagingRule(hysteresis=0.7), OutOfRangeError, "hysteresis.*between 0 and 0.5"),
    (lambda: StagingRule("pressure", (0.02,)), InputError, "only used with staging by flow"),
    (lambda: remote_dp(30.0, 0.05, 20.0), OutOfRangeError, "design head.*30"),
    (lambda: staging_sweep(pump(), 2, [0.01], [30.0], strategy="two_vfd", **kw()),
     UnknownChoiceError, "staging strategy.*'all_vfd'"),
    (lambda: staging_sweep(pump(), 0, [0.01], [30.0], **kw()), OutOfRangeError,
     "number of duty pumps.*between 1 and 12"),
    (lambda: staging_sweep(pump(), 2.0, [0.01], [30.0], **kw()), InputError, "whole number"),
    (lambda: staging_sweep(pump(), 2, [0.02, 0.01], [30.0, 30.0], **kw()), InputError,
     "flow 2.*strictly increase"),
    (lambda: staging_sweep(pump(), 2, [0.01, 0.02], [30.0], **kw()), InputError,
     "required heads.*one head per flow"),
    (lambda: staging_sweep(pump(), 2, [0.01], [-3.0], **kw()), OutOfRangeError,
     "required head.*greater than 0"),
    (lambda: staging_sweep(pump(), 2, [0.01], [30.0], rule=StagingRule("flow", (0.01, 0.02)),
                           **kw()), InputError, "one per added pump"),
    (lambda: staging_sweep(pump(), 2, [0.01], [30.0], **kw(motor_efficiency=1.2)),
     OutOfRangeError, "motor efficiency"),
    (lambda: staging_sweep(PumpCurve(Q_PTS, H0 - B * Q_PTS ** 2, speed_rpm=2900.0,
                                     diameter=0.2), 2, [0.01], [30.0], **kw()),
     InputError, "efficiency of pump.*needed"),
    (lambda: staging_sweep(pump(), 2, [0.01], [[30.0], [31.0]], labels=["a"], **kw()),
     InputError, "condition labels.*one per row"),
    (lambda: staging_sweep(pump(), 2, [0.01], [30.0], exact=[None, None], **kw()), InputError,
     "exact head functions.*one per row"),
    (lambda: vfd_efficiency(-1.0, [0.5]), OutOfRangeError, "drive rating"),
    (lambda: compare_strategies(pump(), 2, [(0.01, 10.0)], lambda q: 30.0 + 0 * q,
                                strategies=(), **kw()), InputError, "strategies"),
])
def test_bad_inputs_are_refused(call, cls, match):
    with raises_exactly(cls, match):
        call()


@pytest.mark.parametrize("name", ["SpeedRange", "ControlCurve", "StagingRule", "vfd_efficiency",
                                  "staging_sweep", "control_findings", "required_heads",
                                  "load_profile",
                                  "profile_energy", "compare_strategies"])
def test_documented_parameters_match_signatures(name):
    obj = getattr(stg, name)
    assert documented_params(obj) == signature_params(obj)
    assert unit_missing(obj) == []
