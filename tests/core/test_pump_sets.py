"""Unlike pumps in parallel and series at a duty; duty/standby sets and the N+1 check.

Invented pumps with exactly quadratic head curves (a degree-2 fit through points on a
parabola is exact), so each member's flow at a head is the closed form √((H₀ − H)/b) and the
set's head at a set flow is found here by scipy's brentq on Σ Q_i(H) − Q (flows add at equal
head; Karassik et al., Pump Handbook 2008, from memory) — independent of the kit's table and
Newton polish.
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from docsig import documented_params, signature_params, unit_missing
from raising import raises_exactly
from scipy.optimize import brentq

from kit.core import pump_sets as ps
from kit.core.findings import Severity
from kit.core.pump import PumpCurve, parallel, series
from kit.core.pump_sets import (
    DutyStandby,
    closed_in_heads,
    member_flows_at_head,
    set_duty,
    set_operating_point,
)
from kit.errors import InputError, OutOfRangeError

Q_PTS = np.array([0.0, 0.01, 0.02, 0.03])
BIG = (40.0, 25000.0)     # H = 40 − 25000 Q²
SMALL = (32.0, 30000.0)   # H = 32 − 30000 Q²


def quad_pump(name, h0, b, eta_peak=0.75):
    return PumpCurve(Q_PTS, h0 - b * Q_PTS ** 2, speed_rpm=2900.0, diameter=0.2, name=name,
                     efficiency=eta_peak * (1 - ((Q_PTS - 0.02) / 0.02) ** 2) + 0.0 * Q_PTS,
                     npshr=1.5 + 3000.0 * Q_PTS ** 2)


def big():
    return quad_pump("big", *BIG)


def small():
    return quad_pump("small", *SMALL)


def hand_flow(h0, b, H):
    """Member flow at common head H: zero at or above shut-off (check valve closed)."""
    return math.sqrt((h0 - H) / b) if H < h0 else 0.0


def hand_head(Q):
    """Common head of big + small at set flow Q by brentq on the members' closed forms."""
    return brentq(lambda H: hand_flow(*BIG, H) + hand_flow(*SMALL, H) - Q, 0.0, 40.0,
                  xtol=1e-14)


# ---------------------------------------------------------------- unlike pumps in parallel
@pytest.mark.parametrize("Q", [0.005, 0.015, 0.02, 0.03, 0.04])
def test_combined_curve_of_unlike_pumps_by_brentq_on_each_head(Q):
    pset = parallel([big(), small()])
    H = hand_head(Q)   # scipy brentq on the closed-form member flows
    assert float(pset.head(Q)) == pytest.approx(H, rel=1e-10)
    d = set_duty(pset, Q, rho=998.0)
    assert d.H == pytest.approx(H, rel=1e-10)
    assert d.members[0].Q == pytest.approx(hand_flow(*BIG, H), rel=1e-8, abs=1e-12)
    assert d.members[1].Q == pytest.approx(hand_flow(*SMALL, H), rel=1e-8, abs=1e-12)


def test_member_flows_at_head_sum_to_the_combined_curve():
    heads = np.array([35.0, 31.0, 25.0, 20.0])
    flows = member_flows_at_head([big(), small()], heads)
    want = [hand_flow(*BIG, h) + hand_flow(*SMALL, h) for h in heads]
    assert flows.sum(axis=0) == pytest.approx(want, rel=1e-10)
    assert flows[1, 0] == 0.0  # 35 m is above the small pump's 32 m shut-off


def test_weaker_pump_dead_headed_below_the_switch_flow():
    # the big pump alone makes 32 m at √(8/25000): below that set flow the small one is shut
    q_switch = math.sqrt(8.0 / 25000.0)
    d = set_duty(parallel([big(), small()]), 0.9 * q_switch, rho=998.0)
    assert [m.status for m in d.members] == ["running", "check valve closed"]
    f = [f for f in d.findings if f.severity == Severity.FAIL]
    assert len(f) == 1 and "dead-headed" in f[0].rule and "'small'" in f[0].subject
    ok = set_duty(parallel([big(), small()]), 1.1 * q_switch, rho=998.0)
    assert all(m.status == "running" for m in ok.members)
    assert not [f for f in ok.findings if f.severity == Severity.FAIL]


def test_member_efficiency_power_and_npshr_at_their_own_flows():
    d = set_duty(parallel([big(), small()]), 0.03, rho=998.0)
    for m, p in zip(d.members, (big(), small()), strict=True):
        assert m.efficiency == pytest.approx(float(p.efficiency(m.Q)))
        assert m.shaft_power == pytest.approx(998.0 * 9.80665 * m.Q * m.H / m.efficiency)
        assert m.npshr == pytest.approx(1.5 + 3000.0 * m.Q ** 2, rel=1e-9)  # exact quadratic
        assert m.bep_fraction == pytest.approx(m.Q / p.bep[0])


def test_member_below_its_minimum_flow_fails():
    H = hand_head(0.025)
    q_small = hand_flow(*SMALL, H)
    d = set_duty(parallel([big(), small()]), 0.025, min_flows={"small": q_small * 1.5})
    f = [f for f in d.findings if f.severity == Severity.FAIL]
    assert len(f) == 1 and f[0].value == pytest.approx(q_small, rel=1e-8)


@pytest.mark.parametrize("static, dead", [(20.0, False), (33.0, True)])
def test_operating_point_of_unlike_pumps_on_a_system_curve(static, dead):
    def sysh(Q):
        return static + 8000.0 * np.asarray(Q) ** 2
    pset = parallel([big(), small()])
    d = set_operating_point(pset, sysh, rho=998.0)
    # independent: brentq on flow of (set head by brentq on head) − system head
    Q = brentq(lambda q: hand_head(q) - float(sysh(q)), 1e-6, 0.05, xtol=1e-14)
    assert d.Q == pytest.approx(Q, rel=1e-9)
    assert d.members[1].Q == pytest.approx(hand_flow(*SMALL, hand_head(Q)), abs=1e-10)
    fails = [f for f in d.findings if f.severity == Severity.FAIL]
    assert (len(fails) == 1) == dead   # above 32 m the small pump is held shut


def test_closed_in_heads_highest_first():
    assert closed_in_heads(parallel([small(), big()])) == [
        ("big", pytest.approx(40.0)), ("small", pytest.approx(32.0))]


def test_series_member_past_zero_head_is_a_resistance():
    q = math.sqrt(32.0 / 30000.0) * 1.01   # just past the small pump's zero-head flow
    d = set_duty(series([big(), small()]), q)
    assert d.members[1].status == "resistance" and d.members[1].H < 0
    assert d.H == pytest.approx((40 - 25000 * q * q) + (32 - 30000 * q * q), rel=1e-10)
    assert any(f.quantity == "head" and f.severity == Severity.FAIL for f in d.findings)


# ---------------------------------------------------------------- duty / standby
def test_identical_duty_standby_capacity_and_n_plus_1():
    ds = DutyStandby.identical(big(), 2, 1)
    assert (ds.installed, ds.n_duty, ds.n_standby) == (3, 2, 1)
    assert ds.capacity(30.0) == pytest.approx(2 * math.sqrt(10.0 / 25000.0))  # standby adds 0
    assert [f.severity for f in ds.n_plus_1(0.035, 30.0)] == [Severity.PASS, Severity.PASS]
    bare = DutyStandby.identical(big(), 2, 0)
    sev = [f.severity for f in bare.n_plus_1(0.035, 30.0)]
    assert sev == [Severity.PASS, Severity.FAIL]   # one unit out: 0.02 < 0.035
    assert isinstance(ds.running(), type(parallel([big(), big()])))


def test_listed_units_n_plus_1_takes_the_best_remaining():
    b, s = big(), small()
    ds = DutyStandby([b, b, s], 2)
    out = ds.n_plus_1(0.035, 30.0)
    # big out -> big + small: 0.02 + √(2/30000); small out -> two big: 0.04 (by hand)
    assert [f.severity for f in out] == [Severity.PASS, Severity.FAIL, Severity.PASS]
    assert out[1].value == pytest.approx(0.02 + math.sqrt(2.0 / 30000.0))


def test_identical_unit_for_staging():
    b = big()
    assert DutyStandby.identical(b, 2, 1).identical_unit is b
    assert DutyStandby([b, big()], 1).identical_unit is b   # equal points, separate objects
    with raises_exactly(InputError, "installed unit 2.*staging needs identical units"):
        _ = DutyStandby([b, small()], 1).identical_unit


def test_capacity_counts_each_unit_at_most_to_its_last_datasheet_flow():
    ds = DutyStandby.identical(big(), 1, 1)
    assert ds.capacity(5.0) == pytest.approx(0.03)  # √(35/25000) = 0.0374 is past 0.03


# ---------------------------------------------------------------- bad inputs
@pytest.mark.parametrize("call, cls, match", [
    (lambda: DutyStandby([], 1), InputError, "installed units.*at least one"),
    (lambda: DutyStandby([big()], 2), OutOfRangeError, "number of duty pumps.*between 1 and 1"),
    (lambda: DutyStandby([big(), big()], 0), OutOfRangeError, "number of duty pumps"),
    (lambda: DutyStandby([big(), big()], 1.0), InputError, "whole number"),
    (lambda: DutyStandby([big(), "P-2"], 1), InputError, "unit 2.*PumpCurve"),
    (lambda: DutyStandby.identical(big(), 1, -1), OutOfRangeError, "standby pumps"),
    (lambda: DutyStandby.identical(big(), 1, 1).n_plus_1(-0.01, 30.0), OutOfRangeError,
     "duty flow.*greater than 0"),
    (lambda: set_duty(parallel([big(), small()]), -0.01), OutOfRangeError,
     "set flow.*at least 0"),
    (lambda: set_duty(big(), 0.01), InputError, "pump set.*PumpSet"),
    (lambda: set_duty(parallel([big(), small()]), 0.01, min_flows={"huge": 0.01}), InputError,
     "minimum flow member.*'big', 'small'"),
    (lambda: closed_in_heads(series([big(), small()])), InputError, "must be 'parallel'"),
])
def test_bad_inputs_are_refused(call, cls, match):
    with raises_exactly(cls, match):
        call()


@pytest.mark.parametrize("name", ["set_duty", "set_operating_point", "member_flows_at_head",
                                  "closed_in_heads", "DutyStandby"])
def test_documented_parameters_match_signatures(name):
    obj = getattr(ps, name)
    assert documented_params(obj) == signature_params(obj)
    assert unit_missing(obj) == []
