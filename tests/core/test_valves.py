"""Control valves: Kv by IEC 60534-2-1 against fluids and hand computations; characteristics,
openings, authority and flags."""

import doctest
import math

import pytest
from fluids.control_valve import size_control_valve_l

from kit.core import valves
from kit.core.valves import (
    ValveCase,
    cv_to_kv,
    inherent_fraction,
    kv_required,
    kv_to_cv,
    opening_for_fraction,
    size_control_valve,
)
from kit.errors import InputError, OutOfRangeError, UnknownChoiceError

WATER20 = dict(rho=998.21, mu=1.0016e-3, pv=2339.0, pc=22.064e6)  # 20 °C, from memory; pc IAPWS
RHO0 = 999.1032907570233  # fluids' ρ0 for IEC 60534-2-1


@pytest.mark.parametrize("Q, p1, p2, extra", [
    pytest.param(0.01, 4e5, 3e5, {}, id="non-choked, no piping"),
    pytest.param(0.05, 8e5, 5e5, dict(D1=0.1, D2=0.1, d=0.08), id="reducers around a smaller valve"),
    pytest.param(0.02, 9e5, 1.2e5, dict(FL=0.6), id="choked"),
    pytest.param(2e-4, 3e5, 2e5, dict(D1=0.05, D2=0.05, d=0.05, Fd=0.5), id="low flow"),
])
def test_kv_matches_fluids_size_control_valve_l(Q, p1, p2, extra):
    args = dict(WATER20)
    got = kv_required(Q, p1, p2, **args, **extra)
    ref = size_control_valve_l(rho=args["rho"], Psat=args["pv"], Pc=args["pc"], mu=args["mu"],
                               P1=p1, P2=p2, Q=Q, D1=extra.get("D1"), D2=extra.get("D2"),
                               d=extra.get("d"), FL=extra.get("FL", 0.9),
                               Fd=extra.get("Fd", 1.0))  # fluids, called directly
    assert got["kv"] == pytest.approx(ref, rel=1e-12)
    assert got["cv"] == pytest.approx(ref * 1.156, rel=1e-3)  # Cv = 1.156 Kv, common practice


def test_kv_hand_computation_of_the_non_choked_equation():
    # IEC 60534-2-1 non-choked turbulent, no fittings: Kv = Q/N1 sqrt((ρ/ρ0)/Δp) with N1 = 1
    # for Q in m³/h and Δp in bar (0.1 with kPa) (from memory); hand-computed here
    Q_h, dp_bar = 36.0, 1.0
    hand = Q_h * math.sqrt(WATER20["rho"] / RHO0 / dp_bar)
    got = kv_required(Q_h / 3600.0, 3e5, 2e5, **WATER20)
    assert not got["choked"]
    assert got["kv"] == pytest.approx(hand, rel=1e-12)


def test_iec_60534_2_1_worked_example_from_memory():
    # IEC 60534-2-1 annex, example 1 (incompressible, non-choked, turbulent, 150 mm valve in
    # 150 mm line): water at 363 K, Q 360 m³/h, P1 680 kPa, P2 220 kPa -> C = 165 (Kv);
    # the figures are from memory (they also appear in fluids' docstring).
    got = kv_required(0.1, 680e3, 220e3, rho=965.4, mu=3.1472e-4, pv=70.1e3, pc=22120e3,
                      FL=0.9, Fd=0.46, D1=0.15, D2=0.15, d=0.15)
    assert got["kv"] == pytest.approx(165.0, rel=2e-3)
    assert not got["choked"]


def test_choked_kv_by_hand():
    # IEC 60534-2-1 choked: Kv = Q/(N1 FL) sqrt((ρ/ρ0)/(P1 − FF pv)), FF = 0.96 − 0.28 sqrt(pv/pc)
    # (both from memory); hand-computed here in bar and m³/h
    Q, p1, p2, FL = 0.02, 9e5, 1.2e5, 0.6
    FF = 0.96 - 0.28 * math.sqrt(WATER20["pv"] / WATER20["pc"])
    hand = Q * 3600.0 / FL * math.sqrt(WATER20["rho"] / RHO0 / ((p1 - FF * WATER20["pv"]) / 1e5))
    got = kv_required(Q, p1, p2, **WATER20, FL=FL)
    assert got["choked"]
    assert got["kv"] == pytest.approx(hand, rel=1e-9)


@pytest.mark.parametrize("char", ["linear", "equal_percentage", "quick_opening"])
@pytest.mark.parametrize("x", [0.05, 0.3, 0.77, 1.0])
def test_characteristic_inverse(char, x):
    phi = inherent_fraction(x, char, 30.0)
    assert float(opening_for_fraction(phi, char, 30.0)) == pytest.approx(x, abs=1e-12)


def test_equal_percentage_steps_by_a_constant_ratio():
    # equal percentage: equal increments of travel give equal ratios of Kv (definition)
    r1 = inherent_fraction(0.5, "equal_percentage", 50) / inherent_fraction(0.4, "equal_percentage", 50)
    r2 = inherent_fraction(0.9, "equal_percentage", 50) / inherent_fraction(0.8, "equal_percentage", 50)
    assert r1 == pytest.approx(r2) == pytest.approx(50 ** 0.1)
    assert float(inherent_fraction(1.0, "equal_percentage", 50)) == 1.0


def test_cv_kv_conversions():
    assert kv_to_cv(cv_to_kv(17.0)) == pytest.approx(17.0)
    assert kv_to_cv(1.0) == pytest.approx(1.156, rel=1e-3)  # common practice, no source


def three_cases():
    return [ValveCase("minimum", 0.003, 5.0e5, 3.2e5), ValveCase("normal", 0.008, 4.6e5, 3.4e5),
            ValveCase("maximum", 0.011, 4.2e5, 3.6e5)]


def test_sizing_openings_rise_with_flow_and_authority_by_hand():
    s = size_control_valve(three_cases(), **WATER20, kv_rated=63.0, dp_rest=2.4e5,
                           name="TCV-1")
    xs = [c.opening for c in s.cases]
    assert xs == sorted(xs) and 0 < xs[0] < xs[-1] <= 1
    for c in s.cases:  # opening inverts the characteristic at Kv_req/Kv_rated
        assert float(inherent_fraction(c.opening, "equal_percentage", 50.0)) * 63.0 == \
            pytest.approx(c.kv)
    assert s.authority == pytest.approx(1.2e5 / (1.2e5 + 2.4e5))  # definition, common practice
    assert s.cv_rated == pytest.approx(kv_to_cv(63.0))


def test_sizing_findings():
    s = size_control_valve(three_cases(), **WATER20, kv_rated=30.0, dp_rest=8e5, xFz=0.2,
                           name="TCV-2")
    sev = {(f.subject, f.quantity): f.severity.value for f in s.findings}
    assert sev[("TCV-2 at maximum flow", "required Kv")] == "fail"       # above rated
    assert sev[("TCV-2 at normal flow", "valve authority")] == "check"   # 0.13 < 0.25
    assert sev[("TCV-2 at minimum flow", "xF = Δp/(p1 − pv)")] == "check"  # 0.36 ≥ xFz
    small = size_control_valve([ValveCase("minimum", 0.0005, 5e5, 3e5)], **WATER20,
                               kv_rated=100.0)
    assert small.findings[0].quantity == "opening" and small.findings[0].severity.value == "check"


def test_flashing_and_choked_flags():
    s = size_control_valve([ValveCase("normal", 0.01, 5e5, 2.0e3)], **WATER20, kv_rated=50.0,
                           name="LV")
    assert s.cases[0].flashing
    assert any(f.quantity == "outlet pressure" and f.severity.value == "fail" for f in s.findings)
    c = size_control_valve([ValveCase("normal", 0.02, 9e5, 1.2e5)], **WATER20, FL=0.6,
                           kv_rated=200.0)
    assert c.cases[0].choked
    assert any("choked" in f.rule and f.severity.value == "fail" for f in c.findings)


BAD = [
    pytest.param(lambda: ValveCase("normal", 0.01, 3e5, 3e5), OutOfRangeError,
                 r"'outlet pressure of case 'normal'' must be between 0 and 300000 Pa",
                 id="p2 not below p1"),
    pytest.param(lambda: kv_required(0.01, 3e5, 2e5, **WATER20, D1=0.1), InputError,
                 r"'valve and pipe bores' must be all given", id="one bore only"),
    pytest.param(lambda: kv_required(0.01, 3e5, 2e5, **WATER20, FL=1.2), OutOfRangeError,
                 r"'FL' must be between 0 and 1", id="FL above 1"),
    pytest.param(lambda: kv_required(-0.01, 3e5, 2e5, **WATER20), OutOfRangeError,
                 r"'valve flow' must be between 0 and 100 m³/s", id="negative flow"),
    pytest.param(lambda: size_control_valve(three_cases(), **WATER20, kv_rated=50.0,
                                            characteristic="butterfly"), UnknownChoiceError,
                 r"'characteristic of 'control valve'' must be one of", id="unknown characteristic"),
    pytest.param(lambda: size_control_valve(three_cases(), **WATER20, kv_rated=50.0,
                                            dp_rest=1e5, design="design"), UnknownChoiceError,
                 r"'design case of 'control valve'' must be one of 'minimum', 'normal'",
                 id="unknown design case"),
    pytest.param(lambda: size_control_valve([], **WATER20, kv_rated=50.0), InputError,
                 r"'cases of 'control valve'' must hold at least one case", id="no cases"),
]


@pytest.mark.parametrize("build, error, match", BAD)
def test_bad_valve_inputs(build, error, match):
    with pytest.raises(error, match=match):
        build()


def test_docstring_examples():
    result = doctest.testmod(valves)
    assert result.attempted > 0 and result.failed == 0


def test_documented_parameters_match_signatures():
    from docsig import documented_params, signature_params, unit_missing

    for fn in (kv_required, size_control_valve, inherent_fraction, opening_for_fraction,
               valves.valve_head_loss):
        assert documented_params(fn) == signature_params(fn), fn.__name__
        assert unit_missing(fn) == [], fn.__name__
