"""Water-hammer screen: Korteweg wave speed, Joukowsky and Michaud rises, pump-trip
down-surge and the findings; every reference value names its source beside it."""

from __future__ import annotations

import doctest
import math

import pytest
from docsig import documented_params, signature_params, unit_missing
from raising import raises_exactly

import kit.core.surge as surge_mod
from kit.core.findings import Severity
from kit.core.liquids import bulk_modulus, make_liquid
from kit.core.pipes import catalogue_pipe, custom_pipe
from kit.core.rating import ELASTIC, ElasticMaterial
from kit.core.surge import (
    SCREEN_CAUTION,
    TRANSIENT_ANALYSIS_REQUIRED,
    closure_surge,
    critical_closure_time,
    equivalent_wave_speed,
    joukowsky_rise,
    michaud_rise,
    pipe_wave_speed,
    pump_trip_downsurge,
    restraint_factor,
    surge_screen,
    wave_speed,
)
from kit.errors import InputError, OutOfRangeError, UnknownChoiceError

g = 9.80665   # standard gravity (CGPM 1901)


@pytest.fixture(scope="module")
def water():
    """Water at 20 °C: K = rho c² from IAPWS-95 via CoolProp."""
    return bulk_modulus(make_liquid("water"), 293.15)


# ---------------------------------------------------------------- liquid sound speed

def test_water_sound_speed_classic_value(water):
    # speed of sound in water at 20 °C ~1482 m/s (IAPWS-95 via CoolProp; the classic
    # handbook value, from memory)
    assert water.c == pytest.approx(1482.35, abs=0.1)


def test_rigid_pipe_wave_speed_tends_to_the_liquid_sound_speed(water):
    # Korteweg 1878: as E grows the wall term vanishes and a -> sqrt(K/rho)
    speeds = [wave_speed(water.K, water.rho, 0.1, 0.05, E, 0.3) for E in (1e9, 1e10, 5e11)]
    assert speeds[0] < speeds[1] < speeds[2] < water.c
    assert speeds[2] == pytest.approx(water.c, rel=1e-2)


# ---------------------------------------------------------------- restraint factor

@pytest.mark.parametrize("anchoring, c1", [
    ("anchored_upstream", 1 - 0.3 / 2),     # Wylie & Streeter 1993, case a (from memory)
    ("anchored_throughout", 1 - 0.3**2),    # case b (from memory)
    ("expansion_joints", 1.0),              # case c (from memory)
])
def test_thin_walled_restraint_factors(anchoring, c1):
    assert restraint_factor(0.3, 0.2, 0.005, anchoring, "thin") == pytest.approx(c1, abs=1e-15)


def lame_c1(nu, D, e, anchoring):
    """c1 from Lamé's thick-cylinder stresses at the bore, written here independently:
    c1 = 2 eps_theta E e / (p D), with the axial stress of each anchoring case
    (common practice of elasticity; Timoshenko, Strength of Materials, from memory)."""
    p, E = 1.0, 1.0
    a, b = D / 2, D / 2 + e
    s_t = p * (b * b + a * a) / (b * b - a * a)
    s_r = -p
    s_z = {"anchored_upstream": p * a * a / (b * b - a * a),       # end cap load on the wall
           "anchored_throughout": nu * (s_r + s_t),                # plane strain
           "expansion_joints": 0.0}[anchoring]
    eps_t = (s_t - nu * (s_r + s_z)) / E
    return 2 * eps_t * E * e / (p * D)


@pytest.mark.parametrize("anchoring", ["anchored_upstream", "anchored_throughout",
                                       "expansion_joints"])
@pytest.mark.parametrize("D, e", [(0.1023, 0.00602), (0.05, 0.01), (0.5, 0.005)])
def test_thick_walled_factor_equals_lame(anchoring, D, e):
    assert restraint_factor(0.3, D, e, anchoring) == pytest.approx(lame_c1(0.3, D, e, anchoring),
                                                                   rel=1e-12)


def test_thick_tends_to_thin_for_thin_walls():
    # the thick form's limit as e/D -> 0 is the thin form (Wylie & Streeter 1993)
    thick = restraint_factor(0.45, 1.0, 1e-5, "anchored_throughout")
    assert thick == pytest.approx(1 - 0.45**2, rel=1e-4)


# ---------------------------------------------------------------- Korteweg wave speed

def test_korteweg_by_hand_thin_wall():
    # Korteweg 1878 with the thin-walled c1 = 1 - nu^2, by hand:
    #   K/rho = 2.19e9/1000 = 2.19e6; KD/(Ee) = 2.19e9 x 0.2 / (2.07e11 x 0.008) = 0.26449
    #   a = sqrt(2.19e6 / (1 + 0.91 x 0.26449)) = sqrt(1.76515e6) = 1328.6 m/s
    a = wave_speed(2.19e9, 1000.0, 0.2, 0.008, 207e9, 0.30, wall_theory="thin")
    assert a == pytest.approx(1328.6, abs=0.1)


@pytest.mark.parametrize("nominal", ["4", "8", "12"])
def test_water_in_steel_handbook_range(water, nominal):
    # water in steel pipe: about 1,200-1,400 m/s (handbook values, from memory)
    p = catalogue_pipe("asme_b36_10m", nominal, "40", "carbon_steel")
    w = pipe_wave_speed(p, water.K, water.rho)
    assert 1200.0 < w.a < 1400.0
    assert w.material is ELASTIC["carbon_steel"] and "Korteweg" in w.source


@pytest.mark.parametrize("standard, nominal, cls", [
    ("awwa_c900", "6", "DR 18"), ("astm_d2241", "6", "SDR 21"), ("astm_d2241", "4", "SDR 26"),
])
def test_water_in_pvc_handbook_range(water, standard, nominal, cls):
    # water in PVC pressure pipe: about 300-500 m/s (handbook values, from memory)
    w = pipe_wave_speed(catalogue_pipe(standard, nominal, cls, "pvc"), water.K, water.rho)
    assert 300.0 < w.a < 500.0


def test_hdpe_is_slower_than_pvc_and_anchoring_matters(water):
    # HDPE wave speeds are lower than PVC's, typically 250-450 m/s (from memory)
    p = catalogue_pipe("astm_f2619", "12", "DR 11", "hdpe")
    a = pipe_wave_speed(p, water.K, water.rho).a
    assert 200.0 < a < 450.0
    # c1 grows from anchored-upstream (1 - nu/2) to anchored-throughout (1 - nu^2) to
    # expansion joints (1), so the wave slows in that order (Wylie & Streeter 1993)
    steel = catalogue_pipe("asme_b36_10m", "8", "40", "carbon_steel")
    speeds = [pipe_wave_speed(steel, water.K, water.rho, anchoring=k).a
              for k in ("anchored_upstream", "anchored_throughout", "expansion_joints")]
    assert speeds[0] > speeds[1] > speeds[2]


def test_user_material(water):
    # a user-given material (GRP hoop modulus from a maker, invented 15 GPa) is used as given
    p = custom_pipe(0.3, "carbon_steel", Do=0.32)
    mine = ElasticMaterial("GRP from maker", 15e9, 0.3, "maker's data (invented)")
    w = pipe_wave_speed(p, water.K, water.rho, material=mine)
    assert w.a == pytest.approx(wave_speed(water.K, water.rho, 0.3, 0.01, 15e9, 0.3), rel=1e-12)


def test_equivalent_wave_speed_by_hand():
    # same travel time: 1000 / (600/1300 + 400/420) = 707.3 m/s (by hand)
    assert equivalent_wave_speed([600.0, 400.0], [1300.0, 420.0]) == pytest.approx(707.3,
                                                                                   abs=0.05)


# ---------------------------------------------------------------- Joukowsky and Michaud

def test_joukowsky_by_hand():
    # Joukowsky 1898: dp = rho a dV = 1000 x 1200 x 1.5 = 1.8 MPa; dh = a dV / g = 183.55 m
    assert joukowsky_rise(1000.0, 1200.0, 1.5) == pytest.approx(1.8e6, rel=1e-15)
    s = closure_surge(1000.0, 1200.0, 500.0, 1.5, 0.5)
    assert s.regime == "sudden" and s.dp == pytest.approx(1.8e6)
    assert s.dh == pytest.approx(1200.0 * 1.5 / g, rel=1e-12)
    assert s.dh == pytest.approx(183.55, abs=0.01)


def test_critical_time_and_michaud_by_hand():
    # 2L/a = 2 x 900 / 1200 = 1.5 s; Michaud 1878 for tc = 6 s:
    #   dp = 2 rho L dV / tc = 2 x 1000 x 900 x 2 / 6 = 0.6 MPa
    assert critical_closure_time(900.0, 1200.0) == 1.5
    assert michaud_rise(1000.0, 900.0, 2.0, 6.0) == pytest.approx(6e5, rel=1e-15)
    s = closure_surge(1000.0, 1200.0, 900.0, 2.0, 6.0)
    assert s.regime == "slow" and s.dp == pytest.approx(6e5) and "Michaud" in s.method


def test_michaud_meets_joukowsky_at_the_critical_time():
    # at tc = 2L/a Michaud's 2 rho L dV / tc equals rho a dV (algebra, written here)
    tc = critical_closure_time(900.0, 1200.0)
    assert michaud_rise(1000.0, 900.0, 2.0, tc) == pytest.approx(joukowsky_rise(1000.0, 1200.0,
                                                                                2.0), rel=1e-12)
    assert closure_surge(1000.0, 1200.0, 900.0, 2.0, tc).regime == "sudden"


def test_pump_trip_drop_is_joukowsky():
    assert pump_trip_downsurge(998.2, 1000.0, 1.5) == pytest.approx(998.2 * 1000.0 * 1.5)


# ---------------------------------------------------------------- the screen's findings

def test_screen_fails_above_rating_and_on_column_separation():
    # rise by hand: 1000 x 1200 x 2 = 2.4 MPa; peak 6e5 + 2.4e6 = 3.0 MPa abs
    s = surge_screen("discharge", 1000.0, 1200.0, 900.0, 2.0, 6e5, rated_pressure=20e5,
                     closure_time=1.0, trip_stations=[("pump", 6e5), ("crest", 2e5)],
                     pv=2339.0)
    assert s.p_peak == pytest.approx(3.0e6) and s.closure.regime == "sudden"
    peak, pump, crest = s.findings
    assert peak.severity is Severity.FAIL and peak.value == pytest.approx(3.0e6 - 101325.0)
    assert TRANSIENT_ANALYSIS_REQUIRED in peak.rule
    # pump trip: 6e5 - 2.4e6 < pv -> column separation possible at both stations; the
    # instantaneous stop only bounds the drop, so the screen cannot clear it: CHECK, and the
    # transient analysis is asked for (common practice, no source)
    assert pump.severity is Severity.CHECK and "column separation" in pump.rule
    assert crest.severity is Severity.CHECK and TRANSIENT_ANALYSIS_REQUIRED in crest.rule
    assert s.p_min["crest"] == pytest.approx(2e5 - 2.4e6)


def test_valve_closure_upstream_of_a_crest_to_vapour_pressure_fails():
    # a valve can shut as fast as the bound assumes: rho a V = 1000 x 1200 x 2 = 2.4 MPa by hand
    s = surge_screen("outlet", 1000.0, 1200.0, 900.0, 2.0, 6e5, trip_stations=[("crest", 2e5)],
                     pv=2339.0, event="outlet valve closure upstream of the crest")
    (crest,) = s.findings
    assert crest.severity is Severity.FAIL and crest.value == pytest.approx(2339.0)


def test_screen_passes_say_screen_only_and_check_below_atmospheric():
    # slow closure: Michaud 2 x 1000 x 300 x 0.5 / 20 = 15 kPa; drop rho a V = 0.3e6 Pa
    s = surge_screen("gravity main", 1000.0, 600.0, 300.0, 0.5, 4e5, rated_pressure=10e5,
                     closure_time=20.0, trip_stations=[("pump", 5e5), ("knoll", 3.5e5)],
                     pv=2339.0)
    peak, pump, knoll = s.findings
    assert peak.severity is Severity.PASS and "not a transient analysis" in peak.rule
    assert peak.value == pytest.approx(4e5 + 15e3 - 101325.0)
    assert pump.severity is Severity.PASS and "screen only" in pump.rule
    assert knoll.severity is Severity.CHECK and "below atmospheric" in knoll.rule
    assert TRANSIENT_ANALYSIS_REQUIRED in knoll.rule


def test_screen_without_rating_is_a_check_and_caution_text():
    s = surge_screen("line", 1000.0, 1000.0, 100.0, 1.0, 3e5, closure_time=0.1)
    assert [f.severity for f in s.findings] == [Severity.CHECK]
    assert "not a transient analysis" in SCREEN_CAUTION and "qualified engineer" in SCREEN_CAUTION


def test_screen_needs_vapour_pressure_for_trip_stations():
    state = make_liquid("ethanol_aq", 0.2).state(293.15)
    with raises_exactly(InputError, r"'vapour pressure' is needed for the pump-trip"):
        surge_screen("l", 1000.0, 1000.0, 100.0, 1.0, 3e5, trip_stations=[("a", 2e5)])
    with raises_exactly(InputError, r"'column separation' needs the vapour pressure"):
        state.require_pv("column separation")


# ---------------------------------------------------------------- bad inputs

STEEL = dict(K=2.19e9, rho=998.2, D=0.1, e=0.006, E=207e9, nu=0.3)


def ws(**kw):
    return wave_speed(**{**STEEL, **kw})


BAD = [
    pytest.param(lambda: ws(e=0.0), OutOfRangeError,
                 r"'pipe wall thickness' must be greater than 0 m, not 0 m", id="zero wall"),
    pytest.param(lambda: ws(E=-2e11), OutOfRangeError,
                 r"'elastic modulus' must be between 1e\+08 and 5e\+11 Pa, not -2e\+11 Pa",
                 id="negative modulus"),
    pytest.param(lambda: ws(nu=0.5), OutOfRangeError,
                 r"'Poisson's ratio' must be between 0 and 0.5 -, not 0.5 -", id="nu 0.5"),
    pytest.param(lambda: ws(nu=-0.1), OutOfRangeError,
                 r"'Poisson's ratio' must be between 0 and 0.5 -, not -0.1 -", id="nu negative"),
    pytest.param(lambda: ws(K=0.0), OutOfRangeError,
                 r"'liquid bulk modulus' must be greater than 0 Pa, not 0 Pa", id="K zero"),
    pytest.param(lambda: ws(rho=-1.0), OutOfRangeError,
                 r"'density' must be greater than 0 kg/m³, not -1 kg/m³", id="rho"),
    pytest.param(lambda: ws(D=0.0), OutOfRangeError,
                 r"'inside diameter' must be greater than 0 m, not 0 m", id="D zero"),
    pytest.param(lambda: ws(anchoring="bolted"), UnknownChoiceError,
                 r"'anchoring' must be one of 'anchored_upstream', 'anchored_throughout', "
                 r"'expansion_joints', not 'bolted'", id="anchoring"),
    pytest.param(lambda: ws(wall_theory="medium"), UnknownChoiceError,
                 r"'wall theory' must be one of 'thick', 'thin', not 'medium'", id="theory"),
    pytest.param(lambda: closure_surge(1000.0, 1200.0, 900.0, 2.0, 0.0), OutOfRangeError,
                 r"'closure time' must be greater than 0 s, not 0 s", id="closure zero"),
    pytest.param(lambda: michaud_rise(1000.0, 900.0, 2.0, -1.0), OutOfRangeError,
                 r"'closure time' must be greater than 0 s, not -1 s", id="closure negative"),
    pytest.param(lambda: critical_closure_time(-5.0, 1200.0), OutOfRangeError,
                 r"'pipe length' must be greater than 0 m, not -5 m", id="negative length"),
    pytest.param(lambda: joukowsky_rise(1000.0, 1200.0, -1.0), OutOfRangeError,
                 r"'velocity change' must be at least 0 m/s, not -1 m/s", id="dV negative"),
    pytest.param(lambda: joukowsky_rise(1000.0, 0.0, 1.0), OutOfRangeError,
                 r"'wave speed' must be greater than 0 m/s, not 0 m/s", id="a zero"),
    pytest.param(lambda: equivalent_wave_speed([100.0, 200.0], [1000.0]), InputError,
                 r"'wave speeds' must be one per length \(2 lengths\), at least one, not 1",
                 id="lengths vs speeds"),
    pytest.param(lambda: pipe_wave_speed(custom_pipe(0.1, "carbon_steel"), 2.19e9, 998.2),
                 InputError, r"'pipe wall thickness' is needed for the wave speed in custom bore",
                 id="no wall"),
    pytest.param(lambda: pipe_wave_speed(custom_pipe(0.3, "concrete", Do=0.36), 2.19e9, 998.2),
                 InputError, r"'pipe elastic material' has no elastic constants", id="concrete"),
    pytest.param(lambda: surge_screen("l", 1000.0, 1000.0, 100.0, -1.0, 3e5), OutOfRangeError,
                 r"'velocity' must be at least 0 m/s, not -1 m/s", id="velocity"),
]


@pytest.mark.parametrize("call, cls, match", BAD)
def test_bad_inputs_refused(call, cls, match):
    with raises_exactly(cls, match):
        call()


# ---------------------------------------------------------------- documentation

def test_docstring_examples_run():
    result = doctest.testmod(surge_mod, optionflags=doctest.ELLIPSIS)
    assert result.attempted >= 15 and result.failed == 0


def test_documented_parameters_match_signatures():
    # docstring convention of fluids (common practice, no source)
    checked = 0
    for name in surge_mod.__all__:
        obj = getattr(surge_mod, name)
        if not callable(obj) or documented_params(obj) is None:
            continue
        assert not unit_missing(obj), f"{name}: {unit_missing(obj)} have no [unit]"
        assert documented_params(obj) == signature_params(obj), name
        checked += 1
    assert checked >= 10


def test_modules_load_no_pint_widgets_plotly_or_coolprop():
    # kit/core stays free of pint, ipywidgets and plotly; CoolProp loads lazily (DEVELOPERS.md)
    import subprocess
    import sys
    code = ("import sys, kit.core.rating, kit.core.surge; "
            "print(sorted(m for m in ('pint', 'ipywidgets', 'plotly', 'CoolProp') "
            "if m in sys.modules))")
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True,
                         check=True).stdout.strip()
    assert out == "[]"


def test_recipe_for_a_pump_discharge_line():
    # the calls a study makes, on an invented line: NPS 6 Sch 40 A106 B, 1,200 m, water at
    # 20 °C, 2.0 m/s, pump shut-off head 75 m on a 1.3 bar abs suction, valve closing in 3 s;
    # every number is checked against the formulas written out here
    from kit.core.rating import G, highest_pressure, pipe_rating, rating_findings
    pipe = catalogue_pipe("asme_b36_10m", "6", "40", "carbon_steel")
    water = bulk_modulus(make_liquid("water"), 293.15)
    wave = pipe_wave_speed(pipe, water.K, water.rho)
    c1 = 2 * pipe.wall * 1.3 / pipe.Di + pipe.Di * 0.91 / (pipe.Di + pipe.wall)
    a = math.sqrt(water.K / water.rho / (1 + c1 * water.K * pipe.Di / (207e9 * pipe.wall)))
    assert wave.a == pytest.approx(a, rel=1e-12)                      # Korteweg, written here
    rise = closure_surge(water.rho, wave.a, 1200.0, 2.0, 3.0)
    assert rise.regime == "slow"                                      # 2L/a ~ 1.8 s < 3 s
    assert rise.dp == pytest.approx(2 * water.rho * 1200.0 * 2.0 / 3.0)   # Michaud 1878
    cases = highest_pressure(water.rho, 75.0, 1.3e5, 0.0, surge_rise=rise.dp,
                             running_pressure=1.3e5 + water.rho * G * 60.0)
    assert cases.governing == "surge on running pressure"
    rating = pipe_rating(pipe, cases.gauge(), 293.15)
    findings = rating_findings("discharge line", cases, rating)
    assert findings[0].severity is Severity.PASS and "surge on running pressure" in findings[0].rule
    screen = surge_screen("discharge line", water.rho, wave.a, 1200.0, 2.0,
                          1.3e5 + water.rho * G * 60.0, rated_pressure=rating.P_allow,
                          closure_time=3.0, trip_stations=[("pump", 1.3e5 + water.rho * G * 60.0),
                                                           ("ridge", 1.8e5)], pv=2339.0)
    assert [f.severity for f in screen.findings] == [Severity.PASS, Severity.CHECK, Severity.CHECK]
