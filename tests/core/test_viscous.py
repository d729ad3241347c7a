"""Viscosity correction of a water curve (ANSI/HI 9.6.7, equations from memory).

The expected values come from an independent implementation of the same equations written
here: B formed through different unit constants (1 m³/s = 15850.3231 US gpm, 1 m = 3.28084 ft,
both from memory) and the factors written with math.e. No worked example of the standard is
recalled with enough confidence to pin its numbers, so none is used (from memory: the
standard's example gives factors of the order C_Q ≈ 0.9–1, C_η ≈ 0.6–0.9 for B of a few
units, which the qualitative checks below respect).
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from docsig import documented_params, signature_params, unit_missing
from raising import raises_exactly

from kit.core import viscous as vmod
from kit.core.findings import Severity
from kit.core.pump import PumpCurve, parallel
from kit.core.viscous import correction_factors, parameter_B, viscous_curve
from kit.errors import InputError, OutOfRangeError

GPM_PER_M3S = 15850.3231   # from memory
FT_PER_M = 3.28084         # from memory


def hand_B(Q, H, nu, N, stages=1):
    """B = 16.5 √ν H^(1/16) / (Q^(3/8) N^(1/4)), gpm / ft per stage / cSt / rpm."""
    return (16.5 * math.sqrt(nu * 1e6) * (H / stages * FT_PER_M) ** (1 / 16)
            / ((Q * GPM_PER_M3S) ** (3 / 8) * N ** (1 / 4)))


def hand_factors(B, x):
    cq = math.e ** (-0.165 * math.log(B, 10) ** 3.15)
    return cq, 1 - (1 - cq) * x ** 0.75, B ** (-0.0547 * B ** 0.69)


def water_pump(**kw):
    q = np.array([0.0, 0.01, 0.02, 0.03, 0.04])
    args = dict(speed_rpm=1450.0, diameter=0.3, name="W-1",
                efficiency=[0.0, 0.48, 0.70, 0.78, 0.72], npshr=[1.5, 1.7, 2.1, 2.9, 4.0])
    args.update(kw)
    return PumpCurve(q, [45.0, 44.0, 41.0, 36.0, 28.0], **args)


@pytest.mark.parametrize("Q, H, nu, N, stages", [
    (0.0315450982, 30.48, 100e-6, 1750.0, 1),     # 500 gpm, 100 ft, 100 cSt
    (0.005, 60.0, 300e-6, 2950.0, 1),
    (0.2, 80.0, 20e-6, 980.0, 2),
    (0.03, 25.0, 1e-6, 1450.0, 1),                # water: B far below 1
])
def test_parameter_B_against_independent_units(Q, H, nu, N, stages):
    # independent implementation, different unit constants (from memory)
    assert parameter_B(Q, H, nu, N, stages) == pytest.approx(hand_B(Q, H, nu, N, stages),
                                                             rel=2e-6)


@pytest.mark.parametrize("B", [1.2, 3.0, 10.0, 25.0, 39.0])
def test_factors_against_independent_implementation(B):
    x = np.array([0.0, 0.6, 0.8, 1.0, 1.2])
    cq, ch, ce = correction_factors(B, x)
    hq, _, he = hand_factors(B, 1.0)
    assert cq == pytest.approx(hq, rel=1e-13)
    assert ce == pytest.approx(he, rel=1e-13)
    assert ch == pytest.approx([hand_factors(B, xi)[1] for xi in x], rel=1e-13)
    assert ch[0] == 1.0 and ch[3] == pytest.approx(cq)   # shut-off unchanged; C_H = C_Q at BEP


def test_no_correction_at_or_below_B_of_one():
    assert correction_factors(1.0, [0.5, 1.0])[0] == 1.0
    p = water_pump()
    vc = viscous_curve(p, 1.0e-6, 998.0)     # water: B ≈ 0.3
    assert vc.B < 1 and vc.C_Q == 1.0 and vc.C_eta == 1.0
    assert vc.curve.head_points.tolist() == p.head_points.tolist()
    assert [f.severity for f in vc.findings] == [Severity.PASS]


def test_corrected_points_follow_the_factors():
    p = water_pump()
    nu = 200e-6
    vc = viscous_curve(p, nu, 920.0)
    q_bep, h_bep, _ = p.bep
    B = hand_B(q_bep, h_bep, nu, 1450.0)
    cq, _, ce = hand_factors(B, 1.0)
    assert vc.B == pytest.approx(B, rel=2e-6)
    assert vc.curve.flow == pytest.approx(cq * p.flow, rel=1e-5)
    want_h = [h * hand_factors(B, q / q_bep)[1] for q, h in zip(p.flow, p.head_points,
                                                                 strict=True)]
    assert vc.curve.head_points == pytest.approx(want_h, rel=1e-5)
    assert vc.curve.efficiency_points == pytest.approx(ce * p.efficiency_points, rel=1e-5)
    assert vc.curve.npshr_points.tolist() == p.npshr_points.tolist()   # water NPSHr kept
    sev = {f.quantity: f.severity for f in vc.findings}
    assert sev == {"parameter B": Severity.CHECK, "NPSHr": Severity.CHECK}
    # a viscous liquid needs more power for the same flow and head: common practice, no source
    q = 0.8 * vc.curve.bep[0]
    assert float(vc.curve.power(q, 920.0)) > 920.0 * 9.80665 * q * float(vc.curve.head(q)) / \
        float(p.efficiency(q))


def test_factors_fall_with_viscosity():
    p = water_pump()
    out = [viscous_curve(p, nu, 900.0) for nu in (50e-6, 200e-6, 800e-6)]
    assert out[0].C_Q > out[1].C_Q > out[2].C_Q
    assert out[0].C_eta > out[1].C_eta > out[2].C_eta


def test_outside_range_is_a_fail_finding():
    p = water_pump()
    vc = viscous_curve(p, 0.02, 950.0)     # 20000 cSt: B > 40
    assert vc.B > 40
    f = [f for f in vc.findings if f.quantity == "parameter B"][0]
    assert f.severity == Severity.FAIL and f.high == 40.0


def test_stages_use_head_per_stage():
    assert parameter_B(0.02, 120.0, 100e-6, 2950.0, stages=3) == pytest.approx(
        parameter_B(0.02, 40.0, 100e-6, 2950.0))


@pytest.mark.parametrize("call, cls, match", [
    (lambda: parameter_B(0.02, 30.0, 0.0, 1450.0), OutOfRangeError,
     "kinematic viscosity.*between 0 and 1"),
    (lambda: parameter_B(0.02, 30.0, 2.0, 1450.0), OutOfRangeError, "kinematic viscosity"),
    (lambda: parameter_B(-0.02, 30.0, 1e-4, 1450.0), OutOfRangeError, "water BEP flow"),
    (lambda: parameter_B(0.02, 30.0, 1e-4, 0.0), OutOfRangeError, "pump speed.*greater than 0"),
    (lambda: parameter_B(0.02, 30.0, 1e-4, 1450.0, stages=0), OutOfRangeError,
     "number of stages.*between 1 and 50"),
    (lambda: parameter_B(0.02, 30.0, 1e-4, 1450.0, stages=1.5), InputError, "whole number"),
    (lambda: correction_factors(-1.0), OutOfRangeError, "parameter B.*greater than 0"),
    (lambda: correction_factors(3.0, [-0.5, 1.0]), OutOfRangeError, "flow ratio.*at least 0"),
    (lambda: viscous_curve(water_pump(), 1e-4, 0.0), OutOfRangeError, "density"),
    (lambda: viscous_curve(water_pump(efficiency=None), 1e-4, 900.0), InputError,
     "efficiency of pump 'W-1'.*needed"),
    (lambda: viscous_curve(parallel([water_pump(), water_pump()]), 1e-4, 900.0), InputError,
     "single pump"),
])
def test_bad_inputs_are_refused(call, cls, match):
    with raises_exactly(cls, match):
        call()


@pytest.mark.parametrize("name", ["parameter_B", "correction_factors", "viscous_curve"])
def test_documented_parameters_match_signatures(name):
    obj = getattr(vmod, name)
    assert documented_params(obj) == signature_params(obj)
    assert unit_missing(obj) == []
