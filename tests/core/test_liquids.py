"""Liquids: water against IAPWS-IF97 (iapws), handbook values, CoolProp's own limits, and the traps.

Each reference check names its source beside it. CoolProp's phase blindness (water at
400 K and 1 atm returns vapour density) is guarded and tested here.
"""

import inspect
import json
import math
import subprocess
import sys
from pathlib import Path

import pytest
from docsig import documented_params
from hypothesis import assume, given, settings
from hypothesis import strategies as st
from iapws import IAPWS97

from kit.core import liquids
from kit.core.liquids import (
    ALCOHOL_FLAMMABLE_FRACTION,
    FAMILIES,
    LIQUIDS,
    NO_PV_SOURCE,
    Liquid,
    LiquidState,
    UserLiquid,
    families,
    make_liquid,
    water_saturation_pressure,
)
from kit.errors import InputError, LiquidStateError, OutOfRangeError, UnknownChoiceError

ROOT = Path(__file__).resolve().parents[2]
WATER = make_liquid("water")

# The generic fluids we mean to expose, nothing else (no proprietary product entries).
GENERIC_BACKENDS = {
    "water": "HEOS::Water",
    "ethylene_glycol_aq": "INCOMP::MEG",
    "propylene_glycol_aq": "INCOMP::MPG",
    "nacl_brine": "INCOMP::MNA",
    "cacl2_brine": "INCOMP::MCA",
    "seawater": "INCOMP::MITSW",
    "methanol_aq": "INCOMP::MMA",
    "ethanol_aq": "INCOMP::MEA",
    "glycerol_aq": "INCOMP::MGL",
    "ethanol": "HEOS::Ethanol",
    "methanol": "HEOS::Methanol",
    "toluene": "HEOS::Toluene",
    "n_heptane": "HEOS::n-Heptane",
}


def _cp():
    import CoolProp.CoolProp as CP  # noqa: N813

    return CP


# ----------------------------------------------------------------- water vs IAPWS-IF97

WATER_T = [274.15, 283.15, 293.15, 303.15, 313.15, 333.15, 353.15, 368.15]  # 1 to 95 degC


@pytest.mark.parametrize("T", WATER_T, ids=[f"IAPWS-IF97 via iapws, {T - 273.15:.0f} degC" for T in WATER_T])
def test_water_against_iapws_if97(T):
    s = WATER.state(T, 101325.0)
    ref = IAPWS97(T=T, P=0.101325)          # IAPWS-IF97 via iapws, P in MPa
    sat = IAPWS97(T=T, x=0)                 # IAPWS-IF97 saturation via iapws
    assert s.rho == pytest.approx(ref.rho, rel=5e-4)
    assert s.mu == pytest.approx(ref.mu, rel=5e-4)
    assert s.pv == pytest.approx(sat.P * 1e6, rel=5e-4)
    assert s.nu == pytest.approx(ref.mu / ref.rho, rel=5e-4)


def test_compressed_hot_water_against_iapws_if97():
    # 400 K is liquid at 5 bar (Tsat ~ 425 K): accepted, and matches IAPWS-IF97 via iapws.
    s = WATER.state(400.0, 5e5)
    ref = IAPWS97(T=400.0, P=0.5)
    assert s.rho == pytest.approx(ref.rho, rel=5e-4)
    assert s.mu == pytest.approx(ref.mu, rel=5e-4)


def test_water_handbook_values_20C():
    # Handbook values for water at 20 degC, 1 atm (from memory).
    s = WATER.state(293.15)
    assert s.rho == pytest.approx(998.2, abs=0.1)
    assert s.mu == pytest.approx(1.002e-3, rel=2e-3)
    assert s.pv == pytest.approx(2339.0, rel=2e-3)
    assert "IAPWS-95" in s.sources["rho"] and "IAPWS 2008" in s.sources["mu"]


def test_wagner_pruss_saturation_against_iapws_if97():
    # IAPWS-IF97 via iapws; Wagner & Pruss 1993 agrees with IAPWS-95 to ~0.01 %.
    for T in (280.0, 320.0, 360.0, 373.15, 450.0):
        assert water_saturation_pressure(T) == pytest.approx(IAPWS97(T=T, x=0).P * 1e6, rel=3e-4)


# ----------------------------------------------------------------- water traps

def test_water_at_400K_1atm_refused_not_vapour_density():
    # CoolProp alone returns vapour density here (~0.55 kg/m3): trap from LIBRARY-NOTES.
    with pytest.raises(LiquidStateError, match=r"'temperature' must be below the saturation temperature "
                       r"373\.124 K of Water at 101325 Pa .* not 400 K"):
        WATER.state(400.0, 101325.0)


def test_water_normal_boiling_point_guard():
    # Normal boiling point of water 99.97 degC on ITS-90 (from memory).
    WATER.state(373.0)
    with pytest.raises(LiquidStateError, match="saturation temperature"):
        WATER.state(373.2)


def test_water_boils_under_vacuum():
    # At 20 kPa abs water boils near 60 degC (IAPWS-IF97 via iapws gives Tsat).
    T_sat = IAPWS97(P=0.02, x=0).T
    WATER.state(T_sat - 0.5, 2e4)
    with pytest.raises(LiquidStateError, match="saturation temperature"):
        WATER.state(T_sat + 0.5, 2e4)


def test_water_below_freezing_refused():
    with pytest.raises(LiquidStateError,
                       match=r"'temperature' must be at or above the triple point 273\.16 K"):
        WATER.state(272.0)
    WATER.state(273.16)


def test_water_below_triple_pressure_refused():
    # Triple-point pressure of water 611.657 Pa (IAPWS, from memory).
    with pytest.raises(LiquidStateError, match=r"'pressure' must be above the triple-point pressure 611\.6"):
        WATER.state(280.0, 500.0)


@pytest.mark.parametrize("T,P,field", [
    (math.nan, 101325.0, "temperature"), (-5.0, 101325.0, "temperature"),
    (293.15, 0.0, "pressure"), (293.15, -1e5, "pressure"), (293.15, 2e8, "pressure"),
])
def test_bad_temperature_or_pressure(T, P, field):
    with pytest.raises(OutOfRangeError, match=f"'{field}'"):
        WATER.state(T, P)


@settings(max_examples=60, deadline=None)
@given(T1=st.floats(277.15, 368.15), dT=st.floats(0.05, 30.0))
def test_water_density_and_viscosity_fall_with_temperature(T1, dT):
    # Water is densest near 4 degC and its viscosity falls with T (common practice, no source).
    T2 = T1 + dT
    assume(T2 <= 368.15)
    a, b = WATER.state(T1), WATER.state(T2)
    assert b.rho < a.rho
    assert b.mu < a.mu


def test_state_is_cached_and_independent():
    liquids._state_values.cache_clear()
    a = WATER.state(300.0)
    hits = liquids._state_values.cache_info().hits
    b = make_liquid("water").state(300.0)
    assert liquids._state_values.cache_info().hits == hits + 1
    assert a == b
    a.sources["rho"] = "tampered"
    assert WATER.state(300.0).sources["rho"] != "tampered"


# ----------------------------------------------------------------- solutions

def test_ethylene_glycol_30pct_density_20C():
    # 30 % by mass ethylene glycol at 20 degC: about 1040 kg/m3 (from memory), loose tolerance.
    s = make_liquid("ethylene_glycol_aq", 0.30).state(293.15)
    assert s.rho == pytest.approx(1040.0, rel=5e-3)
    assert "MEG" in s.sources["rho"] and "Melinder 2010" in s.sources["rho"]


def test_glycol_is_more_viscous_than_water():
    # Ethylene glycol solutions are several times as viscous as water (common practice, no source).
    g = make_liquid("ethylene_glycol_aq", 0.30).state(293.15)
    assert 1.5 * WATER.state(293.15).mu < g.mu < 4 * WATER.state(293.15).mu


def test_nacl_brine_20pct_density():
    # 20 % by mass NaCl at 20 degC: 1147.8 kg/m3 (CRC Handbook concentrative properties table, from memory).
    s = make_liquid("nacl_brine", 0.20).state(293.15)
    assert s.rho == pytest.approx(1147.8, rel=3e-3)


def test_seawater_density_and_vapour_pressure():
    # Standard seawater S = 35 g/kg at 20 degC, 1 atm: 1024.8 kg/m3 (UNESCO EOS-80, from memory).
    s = make_liquid("seawater", 0.035).state(293.15)
    assert s.rho == pytest.approx(1024.8, rel=1e-3)
    # Independent computation: ideal-solution (Raoult) lowering with S = 35 g/kg as NaCl in
    # 2 ions, times IAPWS-IF97 saturation pressure via iapws; the real water activity of
    # seawater at S = 35 is about 0.98 (from memory), so 0.5 % tolerance.
    n_w, n_s = (1000 - 35) / 18.015, 2 * 35 / 58.44
    p_w = IAPWS97(T=293.15, x=0).P * 1e6
    assert s.pv == pytest.approx(n_w / (n_w + n_s) * p_w, rel=5e-3)
    assert "Sharqawy" in s.sources["pv"]


def test_glycol_raoult_estimate_by_hand():
    # Independent computation: water mole fraction x IAPWS-IF97 saturation pressure via iapws.
    x, T = 0.30, 333.15
    n_w, n_g = (1 - x) / 18.015e-3, x / 62.07e-3
    expected = n_w / (n_w + n_g) * IAPWS97(T=T, x=0).P * 1e6
    s = make_liquid("ethylene_glycol_aq", x).state(T)
    assert s.pv == pytest.approx(expected, rel=1e-3)
    assert "estimate" in s.sources["pv"] and "Raoult" in s.sources["pv"]


def test_glycol_boiling_refused_under_vacuum():
    # At 20 kPa abs a dilute glycol boils near 60 degC; the estimate must refuse 70 degC.
    with pytest.raises(LiquidStateError,
                       match=r"must be below the boiling point .* vapour pressure estimate"):
        make_liquid("ethylene_glycol_aq", 0.10).state(343.15, 2e4)


def test_glycol_below_freezing_refused():
    # 30 % ethylene glycol freezes near -15 degC (from memory).
    g = make_liquid("ethylene_glycol_aq", 0.30)
    g.state(260.15)
    with pytest.raises(LiquidStateError,
                       match=r"'temperature' must be at or above the freezing point 258\.5"):
        g.state(257.15)


def test_nacl_eutectic_freezing_refused():
    # NaCl brine eutectic: about 23.3 % at -21.1 degC (from memory); 250 K is frozen.
    with pytest.raises(LiquidStateError, match="freezing point"):
        make_liquid("nacl_brine", 0.23).state(250.0)


def test_glycol_temperature_beyond_fit_refused():
    with pytest.raises(OutOfRangeError,
                       match=r"'temperature' must be between 173\.15 and 373\.15 K, not 380 K"):
        make_liquid("ethylene_glycol_aq", 0.30).state(380.0, 5e5)


@pytest.mark.parametrize("x", [0.7, 30.0, -0.1, math.nan])
def test_glycol_concentration_out_of_range_refused(x):
    with pytest.raises(OutOfRangeError, match=r"'concentration' must be between 0 and 0\.6 kg/kg"):
        make_liquid("ethylene_glycol_aq", x)


def test_concentration_required_for_solutions_and_refused_for_pure():
    with pytest.raises(InputError, match=r"'concentration' is required for Propylene glycol, aqueous: "
                       r"give the mass fraction between 0 and 0\.6 kg/kg"):
        make_liquid("propylene_glycol_aq")
    with pytest.raises(InputError, match=r"'concentration' must not be given for Water"):
        make_liquid("water", 0.1)
    with pytest.raises(InputError, match=r"'concentration' must not be given for Toluene"):
        make_liquid("toluene", 0.1)


def test_unknown_key_lists_choices():
    with pytest.raises(UnknownChoiceError,
                       match=r"'liquid' must be one of 'water', 'ethylene_glycol_aq'") as e:
        make_liquid("antifreeze")
    assert e.value.choices == list(LIQUIDS)


def test_alcohol_solution_has_no_pv_and_require_pv_names_field():
    s = make_liquid("methanol_aq", 0.30).state(293.15)
    assert s.pv is None
    assert s.sources["pv"] == NO_PV_SOURCE
    assert "pv" not in s.ranges
    with pytest.raises(InputError, match=r"'NPSH available' needs the vapour pressure of Methanol, "
                       r"aqueous, 30 % by mass at 293\.15 K"):
        s.require_pv("NPSH available")
    assert WATER.state(293.15).require_pv("NPSH available") == pytest.approx(2339.3, rel=1e-3)


def test_flammable_marks():
    # Threshold for aqueous alcohols: common practice, no source (see ALCOHOL_FLAMMABLE_FRACTION).
    assert not make_liquid("methanol_aq", 0.02).flammable
    assert make_liquid("methanol_aq", ALCOHOL_FLAMMABLE_FRACTION).flammable
    assert make_liquid("ethanol_aq", 0.4).state(293.15).flammable
    assert not make_liquid("ethylene_glycol_aq", 0.4).flammable
    for key in ("ethanol", "methanol", "toluene", "n_heptane"):
        assert make_liquid(key).flammable and make_liquid(key).state(293.15).flammable
    assert not WATER.flammable


# ----------------------------------------------------------------- pure organic liquids

@pytest.mark.parametrize("key,T,pv,rel", [
    pytest.param("toluene", 298.15, 3.8e3, 0.03, id="toluene 25 degC 3.8 kPa (from memory)"),
    pytest.param("ethanol", 293.15, 5.8e3, 0.03, id="ethanol 20 degC 5.8 kPa (from memory)"),
    pytest.param("methanol", 293.15, 13.0e3, 0.03, id="methanol 20 degC 13.0 kPa (from memory)"),
])
def test_pure_liquid_vapour_pressure(key, T, pv, rel):
    s = make_liquid(key).state(T)
    assert s.pv == pytest.approx(pv, rel=rel)
    assert "saturation" in s.sources["pv"]


@pytest.mark.parametrize("key,rho", [
    pytest.param("ethanol", 789.0, id="ethanol 20 degC 789 kg/m3 (from memory)"),
    pytest.param("toluene", 867.0, id="toluene 20 degC 867 kg/m3 (from memory)"),
    pytest.param("n_heptane", 684.0, id="n-heptane 20 degC 684 kg/m3 (from memory)"),
])
def test_pure_liquid_density(key, rho):
    assert make_liquid(key).state(293.15).rho == pytest.approx(rho, rel=3e-3)


def test_heptane_boiling_point_guard():
    # n-Heptane normal boiling point 98.4 degC = 371.55 K (from memory).
    h = make_liquid("n_heptane")
    h.state(371.0)
    with pytest.raises(LiquidStateError, match="saturation temperature 371.5"):
        h.state(372.0)


def test_toluene_below_triple_point_refused():
    # Toluene triple point 178 K (from memory).
    with pytest.raises(LiquidStateError, match=r"triple point 178 K of Toluene"):
        make_liquid("toluene").state(170.0)


# ----------------------------------------------------------------- registry vs CoolProp

def test_only_generic_fluids_exposed():
    assert {k: s.backend for k, s in LIQUIDS.items()} == GENERIC_BACKENDS
    for key, spec in LIQUIDS.items():
        assert spec.key == key
        assert spec.family in FAMILIES
        if spec.needs_concentration:
            # INCOMP 'M*' fluids are mass-fraction based; volume-based ones must not appear.
            assert spec.backend.startswith("INCOMP::M") and spec.basis == "mass fraction"
        else:
            assert spec.backend.startswith("HEOS::") and spec.basis is None


def test_families():
    fam = families()
    assert list(fam) == list(FAMILIES)
    assert sorted(k for keys in fam.values() for k in keys) == sorted(LIQUIDS)
    assert fam["pure organic"] == ["ethanol", "methanol", "toluene", "n_heptane"]


def test_incompressible_ranges_match_coolprop():
    CP = _cp()
    solutions = CP.get_global_param_string("incompressible_list_solution").split(",")
    for spec in LIQUIDS.values():
        if not spec.backend.startswith("INCOMP::"):
            continue
        fluid = spec.backend.split("::")[1]
        assert fluid in solutions
        st_ = CP.AbstractState("INCOMP", fluid)
        st_.set_mass_fractions([spec.concentration_range[1] / 2])
        assert spec.T_range == pytest.approx((st_.Tmin(), st_.Tmax()))
        assert spec.concentration_range == pytest.approx(
            (st_.trivial_keyed_output(CP.ifraction_min), st_.trivial_keyed_output(CP.ifraction_max)))


def test_heos_ranges_and_references_match_coolprop():
    CP = _cp()
    for spec in LIQUIDS.values():
        if not spec.backend.startswith("HEOS::"):
            continue
        st_ = CP.AbstractState("HEOS", spec.backend.split("::")[1])
        assert spec.T_range[0] == pytest.approx(st_.Ttriple(), abs=0.01)
        assert spec.T_range[1] == pytest.approx(st_.T_critical(), abs=0.01)
        for param, key in spec.coolprop_refs.items():
            assert st_.fluid_param_string(param) == key


def test_state_as_dict_is_json_ready():
    d = make_liquid("propylene_glycol_aq", 0.25).state(283.15).as_dict()
    json.dumps(d)
    assert d["nu"] == pytest.approx(d["mu"] / d["rho"])
    assert set(d["sources"]) == {"rho", "mu", "pv"}
    lo, hi = d["ranges"]["rho"]
    assert lo < 283.15 < hi


def test_liquid_state_type_and_ranges_for_water():
    s = WATER.state(300.0)
    assert isinstance(s, LiquidState)
    assert s.ranges["rho"][0] == 273.16
    assert s.ranges["rho"][1] == pytest.approx(IAPWS97(P=0.101325, x=0).T, abs=0.05)  # IAPWS-IF97 via iapws


# ----------------------------------------------------------------- user liquid

def test_user_liquid_interpolation_by_hand():
    u = UserLiquid("test oil", T=(280.0, 300.0, 320.0), rho=(1000.0, 990.0, 970.0),
                   mu=(2e-3, 1e-3, 0.6e-3), pv=(1000.0, 4000.0, 10000.0))
    s = u.state(290.0)
    assert s.rho == pytest.approx(995.0)                       # hand: linear midpoint
    assert s.mu == pytest.approx(math.sqrt(2e-3 * 1e-3))       # hand: log-linear midpoint
    assert u.state(305.0).mu == pytest.approx(1e-3 * 0.6 ** 0.25)
    assert u.state(310.0).pv == pytest.approx(4000.0 * (10000.0 / 4000.0) ** 0.5)
    assert u.state(320.0).rho == 970.0
    assert "log-linear" in s.sources["mu"] and "linear" in s.sources["rho"]


def test_user_liquid_constants():
    u = UserLiquid("brine X", T=(270.0, 310.0), rho=1100.0, mu=2e-3, flammable=True)
    s = u.state(300.0)
    assert (s.rho, s.mu, s.pv, s.flammable) == (1100.0, 2e-3, None, True)
    assert s.sources["rho"] == "user value, constant" and s.sources["pv"] == NO_PV_SOURCE
    with pytest.raises(InputError, match="'NPSH available' needs the vapour pressure of brine X"):
        s.require_pv("NPSH available")
    assert u.spec.family == "user-defined"


@pytest.mark.parametrize("kwargs,cls,pattern", [
    pytest.param(dict(T=(300.0, 290.0), rho=1000.0, mu=1e-3), InputError,
                 r"'T\[1\]' must be greater than T\[0\] = 300 K", id="non-increasing T"),
    pytest.param(dict(T=(300.0, 300.0), rho=1000.0, mu=1e-3), InputError,
                 r"'T\[1\]' must be greater", id="repeated T"),
    pytest.param(dict(T=(300.0,), rho=1000.0, mu=1e-3), InputError,
                 r"'T' must be at least two increasing temperatures", id="single T"),
    pytest.param(dict(T=300.0, rho=1000.0, mu=1e-3), InputError,
                 r"'T' must be at least two", id="scalar T"),
    pytest.param(dict(T=(280.0, 290.0, 300.0), rho=(1000.0, 990.0), mu=1e-3), InputError,
                 r"'rho' must have 3 values, one per temperature in 'T'", id="length mismatch"),
    pytest.param(dict(T=(280.0, 300.0), rho=(1000.0, -5.0), mu=1e-3), OutOfRangeError,
                 r"'rho\[1\]' must be greater than 0 kg/m³, not -5 kg/m³", id="negative rho"),
    pytest.param(dict(T=(280.0, 300.0), rho=1000.0, mu=0.0), OutOfRangeError,
                 r"'mu' must be greater than 0 Pa·s, not 0 Pa·s", id="zero mu"),
    pytest.param(dict(T=(280.0, 300.0), rho=1000.0, mu=1e-3, pv=(-1.0, 10.0)), OutOfRangeError,
                 r"'pv\[0\]' must be greater than 0 Pa", id="negative pv"),
    pytest.param(dict(T=(280.0, math.nan), rho=1000.0, mu=1e-3), OutOfRangeError,
                 r"'T\[1\]' must be greater than 0 K, not nan K", id="NaN T"),
    pytest.param(dict(T=(-10.0, 300.0), rho=1000.0, mu=1e-3), OutOfRangeError,
                 r"'T\[0\]' must be greater than 0 K", id="negative absolute T"),
    pytest.param(dict(T=(280.0, 300.0), rho=1000.0, mu=(1e-3, 2e-3, 3e-3)), InputError,
                 r"'mu' must have 2 values", id="too many mu"),
    pytest.param(dict(T=(280.0, 300.0), rho=1000.0, mu=1e-3, flammable="yes"), InputError,
                 r"'flammable' must be True or False", id="flammable not bool"),
])
def test_user_liquid_bad_tables_refused(kwargs, cls, pattern):
    with pytest.raises(cls, match=pattern) as e:
        UserLiquid("bad", **kwargs)
    assert type(e.value) is cls


def test_user_liquid_empty_name_refused():
    with pytest.raises(InputError, match="'name' must be a non-empty text"):
        UserLiquid("  ", T=(280.0, 300.0), rho=1000.0, mu=1e-3)


def test_user_liquid_state_outside_table_and_boiling_refused():
    u = UserLiquid("solvent", T=(280.0, 300.0), rho=800.0, mu=1e-3, pv=(5e4, 2e5))
    with pytest.raises(OutOfRangeError, match=r"'temperature' must be between 280 and 300 K, not 310 K"):
        u.state(310.0)
    with pytest.raises(LiquidStateError, match=r"must be below the boiling point of solvent at 101325 Pa"):
        u.state(295.0)
    assert u.state(295.0, 3e5).pv == pytest.approx(5e4 * 4 ** 0.75)   # hand: log-linear


# ----------------------------------------------------------------- structure

def test_import_does_not_load_coolprop_or_ui_libraries():
    code = ("import sys, kit.core.liquids; "
            "print([m for m in ('CoolProp', 'pint', 'ipywidgets', 'plotly') if m in sys.modules])")
    out = subprocess.run([sys.executable, "-c", code], cwd=ROOT, capture_output=True, text=True, check=True)
    assert out.stdout.strip() == "[]"


@pytest.mark.parametrize("obj", [water_saturation_pressure, make_liquid, Liquid, Liquid.state,
                                 UserLiquid, UserLiquid.state, LiquidState.require_pv])
def test_documented_parameters_match_signature(obj):
    # Same idea as fluids' own docstring test: each parameter documented, in order.
    names = [p for p in inspect.signature(obj).parameters if p != "self"]
    assert (documented_params(obj) or []) == names
