"""Liquid bulk modulus and speed of sound, against IAPWS-95 via iapws and handbook values."""

from __future__ import annotations

import math

import pytest
from docsig import documented_params, signature_params, unit_missing
from raising import raises_exactly

from kit.core.liquids import BulkModulus, UserLiquid, bulk_modulus, make_liquid
from kit.errors import InputError, LiquidStateError, OutOfRangeError


@pytest.mark.parametrize("T", [278.15, 293.15, 323.15, 353.15])
def test_water_sound_speed_matches_iapws95_via_iapws(T):
    # IAPWS-95 via iapws (an independent implementation of the same formulation)
    from iapws import IAPWS95
    ref = IAPWS95(T=T, P=0.101325)
    b = bulk_modulus(make_liquid("water"), T)
    assert b.c == pytest.approx(ref.w, rel=1e-5)
    assert b.K == pytest.approx(ref.rho * ref.w**2, rel=1e-5)
    assert b.rho == pytest.approx(ref.rho, rel=1e-6)


def test_water_at_20_degC_classic_values():
    # speed of sound in water at 20 °C ~1482 m/s and bulk modulus ~2.2 GPa
    # (handbook values, from memory; IAPWS-95 gives 1482.35 m/s)
    b = bulk_modulus(make_liquid("water"), 293.15)
    assert 1480.0 < b.c < 1485.0
    assert 2.15e9 < b.K < 2.25e9
    assert "IAPWS-95" in b.source


def test_pressure_raises_the_sound_speed():
    # water stiffens under pressure: c rises about 0.16 m/s per bar near 20 °C (from memory)
    low = bulk_modulus(make_liquid("water"), 293.15, 1e5)
    high = bulk_modulus(make_liquid("water"), 293.15, 1e7)
    assert 10.0 < high.c - low.c < 25.0


def test_toluene_sound_speed_handbook():
    # speed of sound in toluene at 20 °C about 1320-1330 m/s (handbook value, from memory)
    b = bulk_modulus(make_liquid("toluene"), 293.15)
    assert 1300.0 < b.c < 1345.0


def test_user_value_for_any_liquid():
    # c = sqrt(K/rho), computed here
    glycol = make_liquid("ethylene_glycol_aq", 0.3)
    b = bulk_modulus(glycol, 293.15, K_user=2.9e9)
    rho = glycol.state(293.15).rho
    assert isinstance(b, BulkModulus)
    assert b.K == 2.9e9 and b.c == pytest.approx(math.sqrt(2.9e9 / rho), rel=1e-12)
    assert b.source == "user value"


def test_incompressible_fit_needs_a_user_value():
    with raises_exactly(InputError, r"'liquid bulk modulus' is required for Ethylene glycol, "
                        r"aqueous, 30 % by mass: there is no speed-of-sound model"):
        bulk_modulus(make_liquid("ethylene_glycol_aq", 0.3), 293.15)


def test_user_liquid_needs_a_user_value():
    oil = UserLiquid("light oil", T=(280.0, 300.0), rho=870.0, mu=0.01)
    with raises_exactly(InputError, r"'liquid bulk modulus' is required for light oil"):
        bulk_modulus(oil, 290.0)
    assert bulk_modulus(oil, 290.0, K_user=1.5e9).c == pytest.approx(math.sqrt(1.5e9 / 870.0))


@pytest.mark.parametrize("K, match", [
    (0.0, r"'liquid bulk modulus' must be between 1e\+07 and 2e\+10 Pa, not 0 Pa"),
    (-2e9, r"'liquid bulk modulus' must be between 1e\+07 and 2e\+10 Pa, not -2e\+09 Pa"),
    (5e10, r"'liquid bulk modulus' must be between 1e\+07 and 2e\+10 Pa, not 5e\+10 Pa"),
    (float("nan"), r"'liquid bulk modulus' must be between"),
])
def test_bad_user_value_refused(K, match):
    with raises_exactly(OutOfRangeError, match):
        bulk_modulus(make_liquid("water"), 293.15, K_user=K)


def test_boiling_state_refused_before_anything():
    with raises_exactly(LiquidStateError, r"'temperature' must be below the saturation"):
        bulk_modulus(make_liquid("water"), 380.0)


def test_documented_parameters_match_signature():
    # docstring convention of fluids (common practice, no source)
    assert documented_params(bulk_modulus) == signature_params(bulk_modulus)
    assert not unit_missing(bulk_modulus)


def test_docstring_example_runs():
    import doctest

    import kit.core.liquids as liquids
    finder = doctest.DocTestFinder()
    runner = doctest.DocTestRunner()
    for test in finder.find(liquids.bulk_modulus, "bulk_modulus", globs=vars(liquids)):
        runner.run(test)
    assert runner.tries >= 2 and runner.failures == 0
