"""The one unit registry, and parsing and formatting at the edges.

Text like ``"150 gpm"``, ``"4 in"``, ``"2.5 bar(g)"``, ``"68 degF"`` or ``"12 ft"`` is read
into an SI float for a named *kind* of quantity (``"flow"``, ``"length"``, ``"pressure"``, ...)
with a dimension check; results are formatted back in a display system (``"SI"`` or
``"US"``) or a unit of the caller's choice. Nothing in ``kit.core`` imports this module.

Conventions
-----------
- Pressures are stored **absolute** [Pa]. ``(g)`` or a trailing ``g`` on a pressure unit
  (``bar(g)``, ``barg``, ``psig``, ``kPa(g)``) means gauge: the stated barometric pressure is
  added. ``(a)``/``psia``/``bara`` and a plain unit mean absolute.
- Heads are lengths of the flowing liquid [m]; ``ftH2O``-style units are pressures of water,
  not heads, and are refused for a head field.
- Temperatures: ``degC``/``°C``/``degF``/``°F``/``K`` are absolute temperatures; a temperature
  *difference* is a separate kind (``delta_degC``).
- Added units: ``gpm`` (US gallon per minute, NIST SP 811), ``impgpm``, ``lpm``,
  ``m3/h``-style spellings (``m3`` → ``m**3``).

Example
-------
>>> round(parse("150 gpm", "flow", field="design flow"), 6)
0.009464
>>> fmt(0.009464, "flow", "US")
'150 gpm'
"""

from __future__ import annotations

import math
import re
from functools import lru_cache

import pint

from kit.errors import DimensionError, UnitParseError

__all__ = [
    "ureg", "KINDS", "DISPLAY", "parse", "to_si", "fmt", "fmt_pressure", "display_unit",
    "split_text", "G_STANDARD",
]

#: Standard acceleration of gravity [m/s²] (CGPM 1901, exact).
G_STANDARD = 9.80665

ureg = pint.get_application_registry()
for _definition in (
    "gpm = gallon / minute = USgpm",
    "impgpm = imperial_gallon / minute",
    "lpm = liter / minute",
):
    _name = _definition.split("=")[0].strip()
    if _name not in ureg:
        ureg.define(_definition)

#: kind -> (SI unit string, dimensionality expected, description for messages)
KINDS: dict[str, tuple[str, str]] = {
    "length": ("m", "length"),
    "diameter": ("m", "length"),
    "roughness": ("m", "length"),
    "head": ("m", "length (head of the flowing liquid)"),
    "elevation": ("m", "length"),
    "area": ("m**2", "area"),
    "volume": ("m**3", "volume"),
    "flow": ("m**3/s", "volumetric flow"),
    "velocity": ("m/s", "velocity"),
    "pressure": ("Pa", "pressure"),
    "pressure_difference": ("Pa", "pressure difference"),
    "pressure_per_length": ("Pa/m", "pressure drop per length"),
    "temperature": ("K", "temperature"),
    "temperature_difference": ("delta_degC", "temperature difference"),
    "density": ("kg/m**3", "density"),
    "viscosity": ("Pa*s", "dynamic viscosity"),
    "kinematic_viscosity": ("m**2/s", "kinematic viscosity"),
    "power": ("W", "power"),
    "energy": ("J", "energy"),
    "time": ("s", "time"),
    "speed": ("rpm", "rotational speed"),
    "fraction": ("", "fraction (e.g. 30 % or 0.3)"),
    "dimensionless": ("", "plain number"),
}

#: Display units per system and kind.
DISPLAY: dict[str, dict[str, str]] = {
    "SI": {
        "length": "m", "diameter": "mm", "roughness": "mm", "head": "m", "elevation": "m",
        "area": "m**2", "volume": "m**3", "flow": "m**3/h", "velocity": "m/s",
        "pressure": "kPa", "pressure_difference": "kPa", "pressure_per_length": "kPa/(100 m)",
        "temperature": "degC", "temperature_difference": "delta_degC", "density": "kg/m**3",
        "viscosity": "mPa*s", "kinematic_viscosity": "mm**2/s", "power": "kW", "energy": "kWh",
        "time": "min", "speed": "rpm", "fraction": "%", "dimensionless": "",
    },
    "US": {
        "length": "ft", "diameter": "in", "roughness": "in", "head": "ft", "elevation": "ft",
        "area": "ft**2", "volume": "gallon", "flow": "gpm", "velocity": "ft/s",
        "pressure": "psi", "pressure_difference": "psi", "pressure_per_length": "psi/(100 ft)",
        "temperature": "degF", "temperature_difference": "delta_degF", "density": "lb/ft**3",
        "viscosity": "cP", "kinematic_viscosity": "cSt", "power": "hp", "energy": "kWh",
        "time": "min", "speed": "rpm", "fraction": "%", "dimensionless": "",
    },
}

#: How units are written back for people.
_PRETTY = {
    "m**3/h": "m³/h", "m**3/s": "m³/s", "m**2": "m²", "m**3": "m³", "ft**2": "ft²",
    "kg/m**3": "kg/m³", "lb/ft**3": "lb/ft³", "mPa*s": "mPa·s", "mm**2/s": "mm²/s",
    "degC": "°C", "degF": "°F", "delta_degC": "K", "delta_degF": "°F (difference)",
    "kPa/(100 m)": "kPa/100 m", "psi/(100 ft)": "psi/100 ft", "gallon": "US gal",
    "%": "%", "Pa*s": "Pa·s", "m**2/s": "m²/s",
}

_NUMBER = re.compile(r"^\s*([-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?)\s*(.*?)\s*$")
_GAUGE = re.compile(r"^(Pa|kPa|MPa|bar|mbar|psi)\s*(?:\(g\)|g)$")
_ABS = re.compile(r"^(Pa|kPa|MPa|bar|mbar|psi)\s*(?:\(a\)|a)$")
_SPELLING = [
    (re.compile(r"°F \(difference\)"), "delta_degF"),
    (re.compile(r"°\s*C\b"), "degC"), (re.compile(r"°\s*F\b"), "degF"),
    (re.compile(r"(?<![A-Za-z])(m|ft|in|cm|mm)([23])(?![0-9])"), r"\1**\2"),
    (re.compile("³"), "**3"), (re.compile("²"), "**2"), (re.compile("·"), "*"),
    (re.compile(r"\bmil\b"), "thou"),
    (re.compile(r"\bUS gal\b"), "gallon"),
    (re.compile(r"/\s*100\s*(m|ft)\b"), r"/(100 \1)"),
]


def split_text(text: str, field: str, expected: str) -> tuple[float, str]:
    """Split ``"150 gpm"`` into ``(150.0, "gpm")``; a non-number raises :class:`UnitParseError`.

    >>> split_text(" 2.5e-3 m ", "bore", "length")
    (0.0025, 'm')
    """
    if not isinstance(text, str):
        raise UnitParseError(field, text, expected)
    m = _NUMBER.match(text)
    if not m:
        raise UnitParseError(field, text, expected)
    return float(m.group(1)), m.group(2)


def _normalise(unit: str) -> str:
    for pattern, repl in _SPELLING:
        unit = pattern.sub(repl, unit)
    return unit.strip()


def parse(text, kind: str, field: str = "value", p_baro: float = 101325.0,
          default_unit: str | None = None) -> float:
    """Read ``text`` as a quantity of ``kind`` and return its SI magnitude.

    Parameters
    ----------
    text : str or pint.Quantity or float
        ``"150 gpm"``, ``"2.5 bar(g)"``, a Quantity from any registry, or (for
        ``fraction``/``dimensionless`` kinds, or when ``default_unit`` is given) a bare number.
    kind : str
        A key of :data:`KINDS`.
    field : str
        The field's name, used in error messages.
    p_baro : float
        Barometric pressure added to gauge pressures [Pa].
    default_unit : str, optional
        Unit assumed for a bare number; without it a bare number is refused for
        dimensional kinds.

    Returns
    -------
    value : float
        Magnitude in the kind's SI unit (:data:`KINDS`), pressure absolute [Pa].

    Examples
    --------
    >>> parse("2.5 bar(g)", "pressure", "discharge pressure")
    351325.0
    >>> parse("30 %", "fraction", "glycol")
    0.3
    """
    if kind not in KINDS:
        raise KeyError(f"unknown quantity kind {kind!r}")
    si_unit, expected = KINDS[kind]
    if isinstance(text, pint.Quantity):
        return to_si(text, kind, field)
    if isinstance(text, (int, float)) and not isinstance(text, bool):
        value, unit = float(text), ""
    else:
        value, unit = split_text(text, field, expected)
    if not math.isfinite(value):
        raise UnitParseError(field, text, expected)
    unit = _normalise(unit)
    if kind in ("fraction", "dimensionless"):
        if unit in ("", "-"):
            return value
        if unit == "%":
            return value / 100.0
        if kind == "fraction" and unit in ("wt%", "mass%", "% mass", "%wt"):
            return value / 100.0
        raise UnitParseError(field, text, expected)
    if unit == "":
        if default_unit is None:
            raise UnitParseError(field, text, f"{expected} (a unit is required)")
        unit = _normalise(default_unit)
    per100 = re.match(r"^(.*)/\(100 (m|ft)\)$", unit)
    if per100:  # "kPa/100 m": a pressure per hundred lengths
        value, unit = value / 100.0, f"{per100.group(1)}/{per100.group(2)}"
    gauge = False
    if kind == "pressure":
        g = _GAUGE.match(unit)
        a = _ABS.match(unit)
        if g:
            unit, gauge = g.group(1), True
        elif a:
            unit = a.group(1)
    if kind == "head" and "H2O" in unit:
        raise DimensionError(field, text, "length of the flowing liquid (m or ft)",
                             "pressure of water")
    try:
        if kind == "temperature" or unit in ("degC", "degF", "degR"):
            q = ureg.Quantity(value, unit)
        else:
            q = value * ureg.Quantity(1.0, unit) if unit else ureg.Quantity(value)
    except Exception:  # noqa: BLE001 — any failure to read the user's unit text is a parse error
        raise UnitParseError(field, text, expected) from None
    out = to_si(q, kind, field, text=text)
    return out + p_baro if gauge else out


def to_si(q, kind: str, field: str = "value", text=None) -> float:
    """Convert a pint Quantity (from any registry) to the SI magnitude for ``kind``.

    A wrong dimension raises :class:`DimensionError` naming the field.

    >>> to_si(ureg.Quantity(4.0, "inch"), "diameter", "bore")
    0.1016
    """
    si_unit, expected = KINDS[kind]
    try:
        if not si_unit:
            return float(q.m_as(""))
        return float(q.m_as(si_unit))
    except pint.errors.DimensionalityError:
        got = str(q.dimensionality)
        raise DimensionError(field, text if text is not None else str(q), expected,
                             f"quantity of dimension {got}") from None
    except pint.errors.OffsetUnitCalculusError:
        raise DimensionError(field, text if text is not None else str(q), expected,
                             "temperature (use delta_degC for a difference)") from None


def display_unit(kind: str, system: str = "SI") -> str:
    """The unit in which ``kind`` is shown in ``system`` ('SI' or 'US').

    >>> display_unit("flow", "US")
    'gpm'
    """
    if system not in DISPLAY:
        raise KeyError(f"unknown display system {system!r}; choose 'SI' or 'US'")
    return DISPLAY[system][kind]


def _round(value: float, digits: int) -> str:
    if value == 0 or not math.isfinite(value):
        return f"{value:g}"
    mag = math.floor(math.log10(abs(value)))
    decimals = max(digits - 1 - mag, 0)
    text = f"{value:.{decimals}f}"
    return text


def convert(value_si: float, kind: str, unit: str) -> float:
    """Convert an SI magnitude of ``kind`` into ``unit``.

    >>> round(convert(6894.757293168361, "pressure", "psi"), 6)
    1.0
    """
    si_unit = KINDS[kind][0]
    if unit == "%":
        return value_si * 100.0
    if not si_unit:
        return value_si
    if kind == "pressure_per_length":
        per = {"kPa/(100 m)": 1e3 / 100.0, "psi/(100 ft)": 6894.757293168361 / 30.48,
               "Pa/m": 1.0, "bar/km": 1e5 / 1000.0}
        if unit in per:
            return value_si / per[unit]
    if si_unit == "K" or unit in ("degC", "degF"):
        scale, offset = _affine(si_unit, unit)
        return value_si * scale + offset
    return value_si * _factor(si_unit, unit)


@lru_cache(maxsize=256)
def _factor(si_unit: str, unit: str) -> float:
    """Multiplier from ``si_unit`` to ``unit`` (pint, once per pair)."""
    return float(ureg.Quantity(1.0, si_unit).m_as(unit))


@lru_cache(maxsize=32)
def _affine(si_unit: str, unit: str) -> tuple[float, float]:
    """(scale, offset) of an offset conversion such as K → °F, from two points by pint."""
    a = float(ureg.Quantity(0.0, si_unit).m_as(unit))
    b = float(ureg.Quantity(1.0, si_unit).m_as(unit))
    return b - a, a


def fmt(value_si: float, kind: str, system: str = "SI", unit: str | None = None,
        digits: int = 3, with_unit: bool = True) -> str:
    """Format an SI value of ``kind`` in a display system or a named unit.

    ``digits`` are significant figures, but never fewer than the integer part.

    >>> fmt(0.1023, "diameter", "SI")
    '102 mm'
    >>> fmt(293.15, "temperature", "US")
    '68.0 °F'
    """
    if value_si is None:
        return "—"
    unit = unit or display_unit(kind, system)
    value = convert(float(value_si), kind, unit)
    text = _round(value, digits)
    if not with_unit or not unit:
        return text
    pretty = _PRETTY.get(unit, unit)
    return f"{text} {pretty}" if pretty != "%" else f"{text} %"


def fmt_pressure(p_abs: float, system: str = "SI", gauge: bool = True,
                 p_baro: float = 101325.0, digits: int = 3) -> str:
    """Format an absolute pressure as gauge or absolute in the display system.

    >>> fmt_pressure(351325.0, "SI")
    '250 kPa(g)'
    >>> fmt_pressure(101325.0 + 6894.757293168361, "US", gauge=False)
    '15.7 psia'
    """
    unit = display_unit("pressure", system)
    value = convert(p_abs - (p_baro if gauge else 0.0), "pressure_difference", unit)
    tag = ("(g)" if unit != "psi" else "g") if gauge else ("(a)" if unit != "psi" else "a")
    return f"{_round(value, digits)} {unit}{tag}"
