"""Unit parsing and formatting, checked against exact definitions."""

import pint
import pytest

from kit import units
from kit.errors import DimensionError, UnitParseError

# NIST SP 811 (2008), Appendix B: exact conversion factors.
NIST_EXACT = [
    pytest.param("1 ft", "length", 0.3048, id="foot = 0.3048 m exactly (NIST SP 811)"),
    pytest.param("1 in", "diameter", 0.0254, id="inch = 0.0254 m exactly (NIST SP 811)"),
    pytest.param("1 gpm", "flow", 3.785411784e-3 / 60, id="US gallon = 3.785411784 L (NIST SP 811)"),
    pytest.param("1 psi", "pressure_difference", 6894.757293168361,
                 id="psi = 4.4482216152605 N / (0.0254 m)^2 (NIST SP 811)"),
    pytest.param("1 hp", "power", 745.69987158227022, id="hp = 550 ft·lbf/s (NIST SP 811)"),
    pytest.param("1 bar", "pressure_difference", 1e5, id="bar = 1e5 Pa (NIST SP 811)"),
    pytest.param("1 cP", "viscosity", 1e-3, id="centipoise = 1e-3 Pa·s (NIST SP 811)"),
    pytest.param("1 cSt", "kinematic_viscosity", 1e-6, id="centistokes = 1e-6 m²/s (NIST SP 811)"),
    pytest.param("1 lb/ft**3", "density", 0.45359237 / 0.3048**3,
                 id="pound = 0.45359237 kg exactly (NIST SP 811)"),
    pytest.param("68 degF", "temperature", 293.15, id="t/°C = (t/°F − 32)/1.8 (NIST SP 811)"),
    pytest.param("20 degC", "temperature", 293.15, id="T/K = t/°C + 273.15 (NIST SP 811)"),
    pytest.param("1 impgpm", "flow", 4.54609e-3 / 60, id="imperial gallon = 4.54609 L (NIST SP 811)"),
    pytest.param("10 mil", "roughness", 0.000254, id="mil = 0.001 in (NIST SP 811)"),
    pytest.param("1 m3/h", "flow", 1 / 3600, id="m³/h spelling, definition"),
    pytest.param("1 m³/h", "flow", 1 / 3600, id="m³/h with superscript, definition"),
]


@pytest.mark.parametrize("text,kind,expected", NIST_EXACT)
def test_exact_factors(text, kind, expected):
    assert units.parse(text, kind, "f") == pytest.approx(expected, rel=1e-12)


def test_gauge_pressure_adds_barometric():
    # definition of gauge pressure
    assert units.parse("2.5 bar(g)", "pressure", "p", p_baro=95000.0) == pytest.approx(345000.0)
    assert units.parse("10 psig", "pressure", "p", p_baro=101325.0) == pytest.approx(
        101325.0 + 68947.57293168361)
    assert units.parse("50 kPa(a)", "pressure", "p", p_baro=90000.0) == pytest.approx(50000.0)
    assert units.parse("14.7 psia", "pressure", "p") == pytest.approx(14.7 * 6894.757293168361)


def test_common_practice_us_values():
    # common practice, no source: 2.31 ft of water per psi; water 62.4 lbf/ft³; g = 32.2 ft/s²
    rho = 62.4 * 0.45359237 / 0.3048**3  # kg/m³ from 62.4 lb/ft³
    ft_per_psi = units.parse("1 psi", "pressure_difference", "p") / (rho * 9.80665) / 0.3048
    assert ft_per_psi == pytest.approx(2.31, abs=0.005)
    assert units.G_STANDARD / 0.3048 == pytest.approx(32.2, abs=0.03)


def test_quantity_from_another_registry():
    other = pint.UnitRegistry()
    assert units.parse(other.Quantity(3, "ft"), "length", "L") == pytest.approx(0.9144)
    with pytest.raises(DimensionError, match="'L' needs a length"):
        units.parse(other.Quantity(3, "s"), "length", "L")


@pytest.mark.parametrize("text,kind,cls,match", [
    ("150", "flow", UnitParseError, r"'design flow' must be a number with a unit .*required"),
    ("abc", "flow", UnitParseError, r"'design flow' must be a number"),
    ("150 gpx", "flow", UnitParseError, r"'design flow'.*'150 gpx'"),
    ("4 in", "flow", DimensionError, r"'design flow' needs a volumetric flow"),
    ("10 ftH2O", "head", DimensionError, r"'design flow' needs a length of the flowing liquid"),
    (None, "flow", UnitParseError, r"'design flow'.*None"),
    ("nan m", "length", UnitParseError, r"'design flow'"),
    ("inf m", "length", UnitParseError, r"'design flow'"),
    ("20 degC", "temperature_difference", DimensionError, r"'design flow' needs a temperature diff"),
    ("3 kg", "pressure", DimensionError, r"'design flow' needs a pressure"),
    ("30 apples", "fraction", UnitParseError, r"'design flow' must be a number with a unit of frac"),
    ("", "length", UnitParseError, r"'design flow'"),
    ("1,200 gpm", "flow", UnitParseError, r"'design flow'"),
], ids=lambda v: str(v)[:20])
def test_bad_text_names_the_field(text, kind, cls, match):
    with pytest.raises(cls, match=match):
        units.parse(text, kind, "design flow")


def test_format_round_trip_each_system():
    for system in ("SI", "US"):
        for kind, si in [("flow", 0.0125), ("diameter", 0.1023), ("pressure_difference", 2.5e5),
                         ("head", 32.1), ("velocity", 1.9), ("temperature", 313.15)]:
            text = units.fmt(si, kind, system, digits=6)
            assert units.parse(text.replace("°", "deg").replace("m³", "m**3"), kind, "x") == \
                pytest.approx(si, rel=1e-5)


def test_format_examples():
    assert units.fmt(0.009464, "flow", "US") == "150 gpm"
    assert units.fmt(0.1023, "diameter", "SI") == "102 mm"
    assert units.fmt_pressure(351325.0, "SI") == "250 kPa(g)"
    assert units.fmt(0.3, "fraction") == "30.0 %"
    assert units.fmt(None, "flow") == "—"
