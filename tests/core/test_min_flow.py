"""Minimum continuous flow and the recirculation orifice.

The pump is invented with exactly quadratic head and efficiency curves (H = 40 − 20000 Q²,
η = 0.8 (Q/0.02)(2 − Q/0.02); a degree-2/3 fit through points on them is exact), so the
thermal estimate is checked by the tests' own bisection on the closed form. The orifice is
checked through fluids' own ISO 5167-2 solver (mass flow from bore and tap pressures, with
ε = 1 for a liquid) and the permanent-loss ratio written out here from ISO 5167-2:2003
(from memory).
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from bisection import bisect
from docsig import documented_params, signature_params, unit_missing
from fluids.flow_meter import C_Reader_Harris_Gallagher, differential_pressure_meter_solver
from raising import raises_exactly

from kit.core import min_flow as mf
from kit.core.findings import Severity
from kit.core.min_flow import (
    MIN_FLOW_FRACTIONS,
    hydraulic_min_flow,
    minimum_flow,
    recirculation_orifice,
    temperature_rise,
    thermal_min_flow,
)
from kit.core.pump import PumpCurve
from kit.errors import InputError, NoSolutionError, OutOfRangeError, UnknownChoiceError

G = 9.80665
Q_PTS = np.linspace(0.0, 0.03, 5)
RHO, MU, CP = 998.0, 1.0e-3, 4180.0


def head(q):
    return 40.0 - 20000.0 * q * q


def eta(q):
    return 0.8 * (q / 0.02) * (2.0 - q / 0.02)


def pump():
    return PumpCurve(Q_PTS, head(Q_PTS), speed_rpm=2900.0, diameter=0.2, efficiency=eta(Q_PTS),
                     name="M-1")


def hand_dT(q):
    """Energy balance: heat = P − ρgQH with P = ρgQH/η, over ρ Q c_p."""
    P = RHO * G * q * head(q) / eta(q)
    return (P - RHO * G * q * head(q)) / (RHO * q * CP)


def permanent_loss(beta, C, dp):
    """ISO 5167-2:2003 pressure loss of an orifice plate (from memory)."""
    a = math.sqrt(1 - beta ** 4 * (1 - C * C))
    return (a - C * beta ** 2) / (a + C * beta ** 2) * dp


# ---------------------------------------------------------------- minimum flow
def test_temperature_rise_is_the_energy_balance():
    q = np.array([0.001, 0.005, 0.02])
    assert temperature_rise(pump(), q, CP) == pytest.approx([hand_dT(x) for x in q], rel=1e-9)


@pytest.mark.parametrize("limit", [1.0, 5.0, 8.0])
def test_thermal_min_flow_by_bisection_on_the_closed_form(limit):
    want = bisect(lambda q: hand_dT(q) - limit, 1e-9, 0.02)   # the tests' own bisection
    assert thermal_min_flow(pump(), CP, limit) == pytest.approx(want, rel=1e-8)


def test_hydraulic_estimate_is_a_fraction_of_bep():
    p = pump()
    assert p.bep[0] == pytest.approx(0.02, rel=1e-4)   # vertex of the efficiency parabola
    for key, row in MIN_FLOW_FRACTIONS.items():      # common practice, no source
        assert hydraulic_min_flow(p, key) == pytest.approx(row["fraction"] * p.bep[0])


def test_minimum_flow_prefers_the_makers_value():
    out = minimum_flow(pump(), maker=0.005, cp=CP, dT_max=8.0)
    assert out.Q_min == 0.005 and out.basis == "maker's value"
    assert [f.severity for f in out.findings] == [Severity.PASS]


def test_minimum_flow_flags_a_maker_value_below_the_thermal_estimate():
    q_th = thermal_min_flow(pump(), CP, 1.0)
    out = minimum_flow(pump(), maker=0.5 * q_th, cp=CP, dT_max=1.0)
    assert [f.severity for f in out.findings] == [Severity.PASS, Severity.CHECK]


def test_minimum_flow_estimate_is_the_larger_and_a_check():
    out = minimum_flow(pump(), cp=CP, dT_max=8.0, pump_class="low_energy")
    assert out.basis == "hydraulic estimate"
    assert out.Q_min == pytest.approx(max(out.estimates.values()))
    hot = minimum_flow(pump(), cp=CP, dT_max=0.05, pump_class="low_energy")
    assert hot.basis == "thermal estimate"
    assert hot.findings[0].severity == Severity.CHECK


# ---------------------------------------------------------------- recirculation orifice
def test_orifice_bore_passes_the_minimum_flow_through_fluids_solver():
    q, D = 0.006, 0.05
    ro = recirculation_orifice(pump(), q, D=D, rho=RHO, mu=MU)
    # fluids' own ISO 5167 solver: mass flow from the bore and the tap pressures (ε = 1)
    m = differential_pressure_meter_solver(D, RHO, MU, D2=ro.d, P1=1e6, P2=1e6 - ro.dp_taps,
                                           meter_type="ISO 5167 orifice", taps="flange",
                                           epsilon_specified=1.0)
    assert m == pytest.approx(RHO * q, rel=1e-7)
    C = C_Reader_Harris_Gallagher(D, ro.d, RHO, MU, RHO * q, taps="flange")
    loss = permanent_loss(ro.beta, C, ro.dp_taps)
    assert loss == pytest.approx(RHO * G * head(q), rel=1e-9)   # all the head in the plate
    assert ro.dp_shutoff == pytest.approx(RHO * G * 40.0, rel=1e-9)


def test_orifice_with_line_loss_and_static_head():
    def line(q):
        return 3.0e5 * np.asarray(q) ** 2        # an invented loop loss [m]
    q = 0.006
    ro = recirculation_orifice(pump(), q, D=0.05, rho=RHO, mu=MU, static_head=2.0,
                               line_loss=line)
    assert ro.dp_loss == pytest.approx(RHO * G * (head(q) - 2.0 - 3.0e5 * q * q), rel=1e-9)


def test_bypass_flow_at_duty_head():
    ro = recirculation_orifice(pump(), 0.006, D=0.05, rho=RHO, mu=MU)
    q = ro.flow_at_head(32.0)
    C = C_Reader_Harris_Gallagher(0.05, ro.d, RHO, MU, RHO * q, taps="flange")
    beta = ro.beta
    dp = (RHO * q * math.sqrt(1 - beta ** 4) / (C * math.pi / 4 * ro.d ** 2)) ** 2 / (2 * RHO)
    assert permanent_loss(beta, C, dp) == pytest.approx(RHO * G * 32.0, rel=1e-8)
    assert q < 0.006   # lower head at duty than closed in: less bypass


def test_cavitation_index_flags_a_single_plate():
    ro = recirculation_orifice(pump(), 0.006, D=0.05, rho=RHO, mu=MU, p_down=150e3,
                               p_vapour=2339.0)
    assert ro.sigma == pytest.approx((150e3 - 2339.0) / ro.dp_loss)
    f = [f for f in ro.findings if f.quantity == "cavitation index"][0]
    assert f.severity == Severity.CHECK   # σ ≈ 0.38 < 2


def test_small_line_outside_iso_range_is_a_check():
    ro = recirculation_orifice(pump(), 0.002, D=0.025, rho=RHO, mu=MU)
    assert any(f.quantity == "ISO 5167-2 range" for f in ro.findings)


# ---------------------------------------------------------------- bad inputs
@pytest.mark.parametrize("call, cls, match", [
    (lambda: minimum_flow(pump(), maker=0.0), OutOfRangeError,
     "maker's minimum flow.*greater than 0"),
    (lambda: minimum_flow(pump(), maker=0.025), InputError, "must not exceed the BEP flow"),
    (lambda: minimum_flow(pump(), pump_class="huge"), UnknownChoiceError,
     "pump class.*'low_energy'"),
    (lambda: thermal_min_flow(pump(), CP, 0.0), OutOfRangeError,
     "temperature rise.*between 0 and 100"),
    (lambda: thermal_min_flow(pump(), -1.0, 5.0), OutOfRangeError, "specific heat"),
    (lambda: thermal_min_flow(pump(), CP, 1e-4), NoSolutionError, "already exceeds"),
    (lambda: temperature_rise(pump(), [0.01, -0.01], CP), OutOfRangeError, "flow.*greater"),
    (lambda: recirculation_orifice(pump(), 0.0, D=0.05, rho=RHO, mu=MU), OutOfRangeError,
     "recirculated flow"),
    (lambda: recirculation_orifice(pump(), 0.006, D=-0.05, rho=RHO, mu=MU), OutOfRangeError,
     "line bore"),
    (lambda: recirculation_orifice(pump(), 0.006, D=0.05, rho=RHO, mu=MU, taps="pipe"),
     UnknownChoiceError, "orifice taps"),
    (lambda: recirculation_orifice(pump(), 0.006, D=0.05, rho=RHO, mu=MU, static_head=45.0),
     NoSolutionError, "enlarge the line"),
    (lambda: recirculation_orifice(pump(), 0.006, D=0.3, rho=RHO, mu=MU), NoSolutionError,
     "multi-stage orifice"),
    (lambda: recirculation_orifice(pump(), 0.03, D=0.025, rho=RHO, mu=MU), NoSolutionError,
     "enlarge the recirculation line"),
])
def test_bad_inputs_are_refused(call, cls, match):
    with raises_exactly(cls, match):
        call()


@pytest.mark.parametrize("name", ["temperature_rise", "thermal_min_flow", "hydraulic_min_flow",
                                  "minimum_flow", "recirculation_orifice"])
def test_documented_parameters_match_signatures(name):
    obj = getattr(mf, name)
    assert documented_params(obj) == signature_params(obj)
    assert unit_missing(obj) == []
