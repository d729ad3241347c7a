"""The one unit registry, and strict parsing and formatting at the edges.

Text like ``"150 gpm"``, ``"4 in"``, ``"2.5 bar(g)"``, ``"68 degF"`` or ``"12 ft"`` is read
into an SI float for a named *kind* of quantity (``"flow"``, ``"length"``, ``"pressure"``, ...)
with a dimension check; results are formatted back in a display system (``"SI"`` or
``"US"``) or a unit of the caller's choice. Nothing in ``kit.core`` imports this module.

What a text may be
------------------
One number (optionally signed, optionally with an exponent: ``-2.5e-3``) and one unit, nothing
else, in at most :data:`MAX_TEXT` characters. A unit is unit names joined by ``*``, ``·`` or
``/``, each name with at most a small whole power (``m**3``, ``m^3``, ``m³``, ``m3``, ``s**-1``,
power 1 to 4); parentheses only in a gauge/absolute tag (``kPa(g)``) or a per-hundred
denominator (``kPa/(100 m)``, ``psi/100 ft``). Nothing is dropped: a character that is not part
of a number or a unit (quotes, commas, ``#``, ...) is refused, as are non-finite numbers and
results (``inf``, ``nan``, ``1e308 km``).

Conventions
-----------
- ``"pressure"`` is a pressure where gauge versus absolute matters (vessel, surface, end
  pressures). It is stored **absolute** [Pa], and its text must say which: ``kPa(g)``,
  ``kPa(a)``, ``bar(g)``/``barg``, ``bar(a)``/``bara``, ``psig``, ``psia``, ``MPa(g)``,
  ``mbar(g)``, ``Pa(a)``, ... Gauge adds the stated barometric pressure. A bare ``kPa`` is refused
  with that hint. Results below absolute zero are refused.
- ``"pressure_abs"`` is a pressure that is absolute by nature (vapour pressure, barometric
  pressure): a bare unit or ``(a)``/``psia``/``bara`` is read as absolute; a gauge unit is refused.
- ``"pressure_difference"`` is neither: bare units only (``kPa``, ``psi``, ``bar``).
- Heads are lengths of the flowing liquid [m]; ``ftH2O``-style units are pressures of water,
  not heads, and are refused for a head field.
- Temperatures: ``degC``/``°C``/``C``/``degF``/``°F``/``F``/``K``/``degR`` are absolute
  temperatures (``C`` and ``F`` only in a temperature field: elsewhere they are coulomb and
  farad), refused below absolute zero. A temperature *difference* is a separate kind
  (``K``, ``delta_degC``, ``Δ°C``, ``delta_degF``, ``Δ°F``); each kind refuses the other's units.
- Rotational speed [rpm]: ``rpm``, ``r/min``, ``rev/min``, ``1/min``; ``rps``, ``r/s``,
  ``rev/s``, ``Hz`` and ``1/s`` are revolutions per second (×60 → rpm, so ``25 Hz`` is
  1500 rpm); ``rad/s`` is converted as an angular speed (×60/2π → rpm). pint itself treats
  ``Hz`` as radians per second against ``rpm``; this module never asks it to.
- Added units: ``gpm`` (US gallon per minute, NIST SP 811) with the spellings ``GPM``,
  ``usgpm``, ``USgpm``, ``USGPM``; ``impgpm``; ``lpm``/``LPM``; ``cfs`` (ft³/s); ``m3/h``-style
  spellings (``m3`` → ``m**3``); ``PSI``/``PSIG``/``PSIA``.

Parsing a unit is cached (:func:`functools.lru_cache` on the unit text and kind); a valid
text costs a regular-expression match, a cache look-up and one multiply.

Example
-------
>>> round(parse("150 gpm", "flow", field="design flow"), 6)
0.009464
>>> fmt(0.009464, "flow", "US")
'150 gpm'
>>> parse("25 Hz", "speed", "pump speed")
1500.0
"""

from __future__ import annotations

import math
import re
from functools import lru_cache
from typing import NamedTuple

import pint

from kit.errors import DimensionError, OutOfRangeError, UnitParseError

__all__ = [
    "ureg", "KINDS", "DISPLAY", "MAX_TEXT", "EXAMPLES", "parse", "to_si", "convert", "fmt",
    "fmt_pressure", "display_unit", "split_text", "G_STANDARD",
]

#: Standard acceleration of gravity [m/s²] (CGPM 1901, exact).
from kit.core.constants import G as G_STANDARD  # noqa: E402  (one gravity constant)

#: The longest text :func:`parse` reads [characters].
MAX_TEXT = 64

ureg = pint.get_application_registry()
for _definition in (
    "gpm = gallon / minute = USgpm",
    "impgpm = imperial_gallon / minute",
    "lpm = liter / minute",
    "cfs = foot ** 3 / second",
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
    "pressure_abs": ("Pa", "absolute pressure"),
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
    "time_short": ("s", "time (seconds: closure times, wave travel times)"),
    "speed": ("rpm", "rotational speed"),
    "fraction": ("", "fraction (e.g. 30 % or 0.3)"),
    "dimensionless": ("", "plain number"),
}

#: Display units per system and kind.
DISPLAY: dict[str, dict[str, str]] = {
    "SI": {
        "length": "m", "diameter": "mm", "roughness": "mm", "head": "m", "elevation": "m",
        "area": "m**2", "volume": "m**3", "flow": "m**3/h", "velocity": "m/s",
        "pressure": "kPa", "pressure_abs": "kPa(a)", "pressure_difference": "kPa",
        "pressure_per_length": "kPa/(100 m)",
        "temperature": "degC", "temperature_difference": "delta_degC", "density": "kg/m**3",
        "viscosity": "mPa*s", "kinematic_viscosity": "mm**2/s", "power": "kW", "energy": "kWh",
        "time": "min", "time_short": "s", "speed": "rpm", "fraction": "%",
        "dimensionless": "",
    },
    "US": {
        "length": "ft", "diameter": "in", "roughness": "in", "head": "ft", "elevation": "ft",
        "area": "ft**2", "volume": "gallon", "flow": "gpm", "velocity": "ft/s",
        "pressure": "psi", "pressure_abs": "psia", "pressure_difference": "psi",
        "pressure_per_length": "psi/(100 ft)",
        "temperature": "degF", "temperature_difference": "delta_degF", "density": "lb/ft**3",
        "viscosity": "cP", "kinematic_viscosity": "cSt", "power": "hp", "energy": "kWh",
        "time": "min", "time_short": "s", "speed": "rpm", "fraction": "%",
        "dimensionless": "",
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

#: Spellings named in the message when a unit is unknown: the display units of both systems
#: and the trade's common ones. Every entry here parses (a test checks).
EXAMPLES: dict[str, tuple[str, ...]] = {
    "length": ("m", "mm", "km", "ft", "in", "inch"),
    "diameter": ("mm", "m", "in", "inch"),
    "roughness": ("mm", "µm", "in", "mil"),
    "head": ("m", "ft"),
    "elevation": ("m", "ft"),
    "area": ("m²", "mm²", "ft²", "in²"),
    "volume": ("m³", "L", "US gal", "ft³"),
    "flow": ("m³/h", "m3/h", "l/s", "L/s", "lpm", "m³/s", "gpm", "GPM", "usgpm", "impgpm", "cfs"),
    "velocity": ("m/s", "ft/s"),
    "pressure": ("kPa(g)", "kPa(a)", "bar(g)", "barg", "bar(a)", "bara", "MPa(g)", "psig",
                 "psia"),
    "pressure_abs": ("kPa", "kPa(a)", "bar", "bara", "psi", "psia", "MPa"),
    "pressure_difference": ("kPa", "bar", "MPa", "Pa", "psi"),
    "pressure_per_length": ("kPa/100 m", "Pa/m", "bar/km", "psi/100 ft"),
    "temperature": ("°C", "degC", "C", "°F", "degF", "F", "K"),
    "temperature_difference": ("K", "delta_degC", "Δ°C", "delta_degF", "Δ°F"),
    "density": ("kg/m³", "g/cm³", "lb/ft³"),
    "viscosity": ("mPa·s", "cP", "Pa·s"),
    "kinematic_viscosity": ("mm²/s", "cSt", "m²/s"),
    "power": ("kW", "W", "hp"),
    "energy": ("kWh", "kJ", "MJ", "J"),
    "time": ("s", "min", "h"),
    "time_short": ("s", "ms", "min"),
    "speed": ("rpm", "r/min", "rps", "Hz", "1/s", "rad/s"),
    "fraction": ("%", "wt%", "a plain number such as 0.3"),
    "dimensionless": ("a plain number",),
}

_PLAIN_KINDS = frozenset(("fraction", "dimensionless"))
_PRESSURE_KINDS = frozenset(("pressure", "pressure_abs", "pressure_difference"))

#: Absolute temperature spellings -> (offset added first, then scale) to kelvin.
_TEMPERATURE: dict[str, tuple[float, float]] = {}
for _names, _conv in (
    (("degC", "°C", "° C", "deg C", "C", "celsius", "degree_Celsius"), (273.15, 1.0)),
    (("degF", "°F", "° F", "deg F", "F", "fahrenheit", "degree_Fahrenheit"), (459.67, 5.0 / 9.0)),
    (("K", "kelvin"), (0.0, 1.0)),
    (("degR", "°R", "rankine"), (0.0, 5.0 / 9.0)),
):
    _TEMPERATURE.update(dict.fromkeys(_names, _conv))

#: Temperature-difference spellings -> scale to kelvin (= delta_degC).
_TEMPERATURE_DIFF: dict[str, float] = {}
for _names, _scale in (
    (("K", "kelvin", "delta_degC", "Δ°C", "ΔC", "°C (difference)", "ΔK"), 1.0),
    (("delta_degF", "Δ°F", "ΔF", "°F (difference)", "delta_degR"), 5.0 / 9.0),
):
    _TEMPERATURE_DIFF.update(dict.fromkeys(_names, _scale))

#: Rotational-speed spellings -> rpm per unit. Hz and 1/s are revolutions per second here.
_SPEED: dict[str, float] = {}
for _names, _scale in (
    (("rpm", "RPM", "r/min", "rev/min", "1/min", "min**-1", "min^-1"), 1.0),
    (("rps", "RPS", "r/s", "rev/s", "Hz", "1/s", "s**-1", "s^-1"), 60.0),
    (("rad/s",), 60.0 / (2.0 * math.pi)),
):
    _SPEED.update(dict.fromkeys(_names, _scale))

#: Name spellings pint lacks -> pint's name.
_ALIASES = {
    "GPM": "gpm", "usgpm": "gpm", "USGPM": "gpm", "LPM": "lpm", "CFS": "cfs", "PSI": "psi",
    "mil": "thou",
}

_TEXT = re.compile(
    r"\s*([-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?)\s*([A-Za-z0-9_ */^()%°µμ·²³Δ\-]*?)\s*\Z")
_SPACES = str.maketrans({"\u00a0": " ", "\u202f": " ", "\u2009": " ", "\u2212": "-"})
_NONFINITE = re.compile(r"\s*[-+]?(inf|infinity|nan)\b", re.IGNORECASE)
_TAGGED = re.compile(r"^(.+?)\s*\(\s*([ga])\s*\)$")
_SHORT_TAG = re.compile(r"^(Pa|hPa|kPa|MPa|bar|mbar|psi|PSI)\s*([gaGA])$")
_ABS = re.compile(r"^(Pa|hPa|kPa|MPa|bar|mbar|psi)\s*(?:\(a\)|a)$")
_PER100 = re.compile(r"^(.+?)\s*/\s*(?:\(\s*100\s*(m|ft)\s*\)|100\s*(m|ft))$")
_SPELLING = [
    (re.compile(r"(?<![A-Za-z])(m|ft|in|cm|mm|dm|km)([234])(?![0-9])"), r"\1**\2"),
    (re.compile("³"), "**3"), (re.compile("²"), "**2"), (re.compile("·"), "*"),
    (re.compile(r"\^"), "**"),
    (re.compile(r"\bUS\s+gal(lon)?\b"), "gallon"),
]
_TOKEN = re.compile(r"\s*(?:([A-Za-z_µμ][A-Za-z_0-9µμ]*)|(\*\*|\*|/)|(-?\d+)|(\S))")
_GRAMMAR = ("a unit is unit names joined by *, · or /, each with at most a whole power "
            "from 1 to 4 (m**3, m^3, m³)")


class _Conv(NamedTuple):
    """A resolved unit: SI value = (x + pre) * scale (+ p_baro when gauge)."""
    pre: float
    scale: float
    gauge: bool = False
    floor: str = ""        # "", "temperature" or "pressure": refuse results below zero
    label: str = ""        # the unit as the user wrote it, for messages


class _Bad(NamedTuple):
    """A unit text that is refused: ``dim`` → DimensionError(expected, got), else
    UnitParseError with ``why`` appended to the kind's description."""
    dim: bool
    why: str
    expected: str = ""     # overrides the kind's description in a DimensionError


def _short(text: str) -> str:
    return text if len(text) <= 40 else f"{text[:40]}… ({len(text)} characters)"


def _examples(kind: str) -> str:
    return ", ".join(EXAMPLES[kind])


def _why_not(text: str) -> str:
    """Why ``text`` is not a number followed by a unit (for the message)."""
    if not text.strip():
        return " (the text is empty)"
    if _NONFINITE.match(text):
        return ", as a finite number (inf and nan are not values)"
    for c in text:
        if c in "'\"`‘’“”′″":
            return ("; quotes are not part of a number with a unit (write ft and in, "
                    "not ' and \")")
        if c == ",":
            return "; write the number without a thousands separator or a decimal comma"
        if not (c.isspace() or c in ".+-" or re.match(r"[A-Za-z0-9_*/^()%°µμ·²³Δ]", c)):
            return f"; the character {c!r} is not part of any number or unit"
    if not re.match(r"\s*[-+]?\.?\d", text):
        return "; the text must start with a number"
    return "; the text must be one number followed by its unit, nothing else"


def split_text(text: str, field: str, expected: str) -> tuple[float, str]:
    """Split ``"150 gpm"`` into ``(150.0, "gpm")``, refusing any other shape of text.

    Raises :class:`UnitParseError` naming ``field`` for a non-string, a text longer than
    :data:`MAX_TEXT`, a character that belongs to no number or unit, or a non-finite number.

    >>> split_text(" 2.5e-3 m ", "bore", "length")
    (0.0025, 'm')
    """
    if not isinstance(text, str):
        raise UnitParseError(field, text, expected)
    if len(text) > MAX_TEXT:
        raise UnitParseError(field, _short(text),
                             f"{expected}, written in at most {MAX_TEXT} characters")
    m = _TEXT.match(text)
    if m is None:
        spaced = text.translate(_SPACES)
        m = _TEXT.match(spaced) if spaced != text else None
        if m is None:
            raise UnitParseError(field, text, f"{expected}{_why_not(spaced)}")
    value = float(m.group(1))
    if not math.isfinite(value):
        raise UnitParseError(field, text, f"{expected}, as a finite number")
    return value, m.group(2)


def _normalise(unit: str) -> str:
    for pattern, repl in _SPELLING:
        unit = pattern.sub(repl, unit)
    return unit.strip()


def _pressure_hint(base: str) -> str:
    if base == "psi":
        return "psig for gauge or psia for absolute"
    if base == "bar":
        return "bar(g) or barg for gauge, bar(a) or bara for absolute"
    return f"{base}(g) for gauge or {base}(a) for absolute"


def _generic(unit: str, kind: str) -> _Conv | _Bad:
    """Check ``unit`` against the grammar, then let pint give its factor to the SI unit."""
    si_unit, expected = KINDS[kind]
    norm = _normalise(unit)
    pieces: list[str] = []
    want_name, pos = True, 0
    tokens = list(_TOKEN.finditer(norm))
    i = 0
    while i < len(tokens):
        name, op, number, other = tokens[i].groups()
        if other is not None:
            if other in "()":
                return _Bad(False, "; parentheses belong only in a gauge/absolute tag such as "
                                   "kPa(g) or a denominator such as kPa/(100 m)")
            return _Bad(False, f"; {other!r} has no place in a unit: {_GRAMMAR}")
        if number is not None:
            nxt = tokens[i + 1].group(2) if i + 1 < len(tokens) else None
            if not (pos == 0 and number == "1" and nxt == "/"):
                return _Bad(False, f"; a number inside the unit is not allowed: {_GRAMMAR}")
            pieces.append("1")
            want_name = False
        elif op is not None:
            if want_name or op == "**":
                return _Bad(False, f"; {op!r} must follow a unit name: {_GRAMMAR}")
            pieces.append(op)
            want_name = True
        else:
            if not want_name:
                return _Bad(False, f"; join unit names with * or /: {_GRAMMAR}")
            name = _ALIASES.get(name, name)
            try:
                known = name in ureg
                dims = ureg.get_dimensionality(name) if known else None
            except Exception:  # noqa: BLE001 — pint refuses some odd names by raising
                known, dims = False, None
            if not known:
                return _Bad(False, f"; {name!r} is not a unit the kit knows "
                                   f"(accepted: {_examples(kind)})")
            if not dims:
                return _Bad(False, f"; {name!r} is a plain number, not a unit "
                                   f"(accepted: {_examples(kind)})")
            pieces.append(name)
            want_name = False
            if i + 2 < len(tokens) and tokens[i + 1].group(2) == "**":
                power = tokens[i + 2].group(3)
                if power is None or not 1 <= abs(int(power)) <= 4:
                    return _Bad(False, f"; a power must be a whole number from 1 to 4 "
                                       f"(or -1 to -4): {_GRAMMAR}")
                pieces.append(f"**{int(power)}")
                i += 2
        pos += 1
        i += 1
    if want_name:
        return _Bad(False, f"; the unit is incomplete: {_GRAMMAR}")
    text = " ".join(pieces).replace(" **", "**")
    try:
        q = ureg.Quantity(1.0, text)
        scale = float(q.m_as(si_unit)) if si_unit else float(q.m_as(""))
    except pint.errors.DimensionalityError:
        try:
            got = str(ureg.Quantity(1.0, text).dimensionality)
        except Exception:  # noqa: BLE001
            got = "another dimension"
        return _Bad(True, f"quantity of dimension {got} (accepted: {_examples(kind)})")
    except pint.errors.OffsetUnitCalculusError:
        return _Bad(True, "temperature (an offset unit cannot be combined with others)")
    except Exception:  # noqa: BLE001 — any other failure to read the unit is a parse error
        return _Bad(False, f"; {unit!r} is not a unit the kit knows (accepted: {_examples(kind)})")
    if not math.isfinite(scale) or scale == 0.0:
        return _Bad(False, f"; {unit!r} is not a usable unit")
    return _Conv(0.0, scale, label=unit)


@lru_cache(maxsize=2048)
def _resolve(unit: str, kind: str) -> _Conv | _Bad:
    """The conversion of ``unit`` (as typed) for ``kind``, or why it is refused. Cached."""
    u = unit.strip()
    _si, expected = KINDS[kind]
    if kind in _PLAIN_KINDS:
        if u in ("", "-"):
            return _Conv(0.0, 1.0, label=u)
        if u == "%" or (kind == "fraction" and u in ("wt%", "mass%", "% mass", "%wt")):
            return _Conv(0.0, 0.01, label=u)
        return _Bad(False, f" (accepted: {_examples(kind)})")
    if kind == "temperature":
        if u in _TEMPERATURE:
            pre, scale = _TEMPERATURE[u]
            return _Conv(pre, scale, floor="temperature", label=u)
        if u in _TEMPERATURE_DIFF or u.startswith("delta_"):
            return _Bad(True, "temperature difference (for a temperature say °C, degC, °F, "
                              "degF or K)")
        conv = _generic(u, kind)
        if conv.dim if isinstance(conv, _Bad) else False:
            return conv
        return _Bad(False, f"; {u!r} is not a temperature unit the kit reads "
                           f"(accepted: {_examples(kind)})")
    if kind == "temperature_difference":
        if u in _TEMPERATURE_DIFF:
            return _Conv(0.0, _TEMPERATURE_DIFF[u], label=u)
        if u in _TEMPERATURE:
            return _Bad(True, "temperature, not a temperature difference (for a difference "
                              "say K, delta_degC, Δ°C, delta_degF or Δ°F)")
        return _generic(u, kind)
    if kind == "speed":
        if u in _SPEED:
            return _Conv(0.0, _SPEED[u], label=u)
        conv = _generic(u, kind)
        if conv.dim if isinstance(conv, _Bad) else False:
            return conv
        return _Bad(False, f"; {u!r} is not a speed unit the kit reads "
                           f"(accepted: {_examples(kind)})")
    if u in ("F", "C", "°F", "°C", "degF", "degC"):
        return _Bad(True, f"temperature ({u!r} means degrees only in a temperature field)")
    if kind == "head" and ("H2O" in u or "Hg" in u):
        return _Bad(True, "pressure of water, not a head", "length of the flowing liquid (m or ft)")
    if kind == "pressure_per_length":
        m = _PER100.match(u)
        if m:
            conv = _generic(f"{m.group(1)}/{m.group(2) or m.group(3)}", kind)
            return conv._replace(scale=conv.scale / 100.0, label=u) if isinstance(conv, _Conv) \
                else conv
        return _generic(u, kind)
    tag = None
    if kind in _PRESSURE_KINDS:
        m = _TAGGED.match(u) or _SHORT_TAG.match(u)
        if m:
            u, tag = m.group(1), m.group(2).lower()
    conv = _generic(u, kind)
    if isinstance(conv, _Bad) or kind not in _PRESSURE_KINDS:
        return conv
    base = _ALIASES.get(u, u)
    if kind == "pressure_difference":
        if tag:
            return _Bad(False, "; a pressure difference is neither gauge nor absolute: write "
                               "kPa, bar or psi without (g) or (a)")
        return conv
    if kind == "pressure_abs":
        if tag == "g":
            return _Bad(False, "; this pressure is absolute by nature, so a gauge unit does not "
                               "apply (say kPa(a), psia, bara, or a bare kPa, psi or bar)")
        return conv._replace(floor="pressure", label=unit.strip())
    if tag is None:
        return _Bad(False, f" that says gauge or absolute: say {_pressure_hint(base)}")
    return conv._replace(gauge=tag == "g", floor="pressure", label=unit.strip())


def _raise(bad: _Bad, kind: str, field: str, text) -> None:
    expected = KINDS[kind][1]
    if bad.dim:
        raise DimensionError(field, text, bad.expected or expected, bad.why)
    raise UnitParseError(field, text, f"{expected}{bad.why}")


def _below_zero(field: str, value: float, conv: _Conv, p_baro: float) -> OutOfRangeError:
    if conv.floor == "temperature":
        err = OutOfRangeError(field, value, conv.label, low=-conv.pre or 0.0, low_inclusive=True)
        note = "absolute zero"
    elif conv.gauge:
        err = OutOfRangeError(field, value, conv.label, low=-p_baro / conv.scale,
                              low_inclusive=True)
        m = _TAGGED.match(conv.label) or _SHORT_TAG.match(conv.label)
        base = _ALIASES.get(m.group(1), m.group(1)) if m else conv.label
        absolute = _ABS_TAG.get(base, f"{base}(a)")
        note = (f"absolute zero, with the barometric pressure used: {p_baro:.6g} Pa "
                f"= {p_baro / conv.scale:.6g} {absolute}")
    else:
        err = OutOfRangeError(field, value, conv.label, low=0.0, low_inclusive=True)
        note = "an absolute pressure cannot be below absolute zero"
    err.args = (f"{err.args[0]} ({note})",)
    return err


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
        Magnitude in the kind's SI unit (:data:`KINDS`), pressure absolute [Pa], speed [rpm].

    Raises
    ------
    UnitParseError
        Text that is not one finite number and a unit the kind accepts (see the module notes).
    DimensionError
        A unit of another dimension, or a temperature where a difference is asked (or back).
    OutOfRangeError
        An absolute temperature or pressure below absolute zero.

    Examples
    --------
    >>> parse("2.5 bar(g)", "pressure", "discharge pressure")
    351325.0
    >>> parse("30 %", "fraction", "glycol")
    0.3
    """
    try:
        expected = KINDS[kind][1]
    except KeyError:
        raise KeyError(f"unknown quantity kind {kind!r}") from None
    if isinstance(text, pint.Quantity):
        return _from_quantity(text, kind, field)
    if isinstance(text, (int, float)) and not isinstance(text, bool):
        value, unit = float(text), ""
        if not math.isfinite(value):
            raise UnitParseError(field, text, f"{expected}, as a finite number")
    else:
        value, unit = split_text(text, field, expected)
    if not unit and kind not in _PLAIN_KINDS:
        if default_unit is None:
            raise UnitParseError(field, text, f"{expected} (a unit is required, e.g. "
                                              f"{_examples(kind)})")
        unit = default_unit
    conv = _resolve(unit, kind)
    if type(conv) is _Bad:
        _raise(conv, kind, field, text)
    out = (value + conv.pre) * conv.scale if conv.pre else value * conv.scale
    if conv.gauge:
        if not (math.isfinite(p_baro) and p_baro > 0.0):
            raise OutOfRangeError("barometric pressure", p_baro, "Pa", low=0.0)
        out += p_baro
    if not math.isfinite(out):
        raise UnitParseError(field, text, f"{expected}, giving a finite value in SI units")
    if conv.floor and out < 0.0:
        if conv.gauge and out > -1e-9 * p_baro:  # rounding of a value typed as exactly -p_baro
            return 0.0
        raise _below_zero(field, value, conv, p_baro)
    return out


_TURNS = ("radian", "revolution", "turn", "rpm", "rps", "degree")


def _from_quantity(q, kind: str, field: str) -> float:
    """:func:`to_si` with the checks :func:`parse` applies to text."""
    units_text = str(q.units)
    if kind == "temperature" and "delta_" in units_text:
        raise DimensionError(field, str(q), KINDS[kind][1], "temperature difference (for a "
                             "temperature say °C, degC, °F, degF or K)")
    if kind == "speed" and not any(t in units_text for t in _TURNS):
        # hertz, 1/second, 1/minute: revolutions per unit time, not radians
        try:
            out = float(q.m_as("1/minute"))
        except pint.errors.DimensionalityError:
            raise DimensionError(field, str(q), KINDS[kind][1],
                                 f"quantity of dimension {q.dimensionality}") from None
    else:
        out = to_si(q, kind, field)
    if not math.isfinite(out):
        raise UnitParseError(field, str(q), f"{KINDS[kind][1]}, as a finite value")
    if out < 0.0 and kind in ("temperature", "pressure", "pressure_abs"):
        raise OutOfRangeError(field, out, KINDS[kind][0], low=0.0, low_inclusive=True)
    return out


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
    if mag < -6 or mag > 15:  # keep the text short enough to read back (MAX_TEXT)
        return f"{value:.{max(digits - 1, 0)}e}"
    decimals = max(digits - 1 - mag, 0)
    text = f"{value:.{decimals}f}"
    return text


def convert(value_si: float, kind: str, unit: str) -> float:
    """Convert an SI magnitude of ``kind`` into ``unit``.

    >>> round(convert(6894.757293168361, "pressure", "psi"), 6)
    1.0
    """
    si_unit = KINDS[kind][0]
    if kind in ("pressure", "pressure_abs"):
        a = _ABS.match(unit)
        unit = a.group(1) if a else unit
    if kind == "speed" and unit in _SPEED:
        return value_si / _SPEED[unit]
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
    value_si = float(value_si)
    if abs(value_si) < _ROUND_OFF and digits <= 6 and kind not in _EXACT_KINDS:
        value_si = 0.0  # solver round-off (a flow of 1e-16 m³/s) is shown as the zero it is
    value = convert(value_si, kind, unit)
    text = _round(value, digits)
    if not with_unit or not unit:
        return text
    pretty = _PRETTY.get(unit, unit)
    if kind == "pressure" and unit in _ABS_TAG:  # stored absolute: say so
        pretty = _ABS_TAG[unit]
    return f"{text} {pretty}" if pretty != "%" else f"{text} %"


#: SI magnitudes below this are round-off of a zero: no liquid-piping quantity of any kind is
#: meaningful there (1e-10 m³/s is 0.4 mL/h; 1e-10 Pa, 1e-10 m, 1e-10 W).
_ROUND_OFF = 1e-10
#: Kinds a tiny value of which is still meaningful (plain numbers, ratios, temperatures).
_EXACT_KINDS = frozenset(("temperature", "dimensionless", "fraction"))

#: A bare pressure unit -> its absolute spelling (what :func:`fmt` writes for kind "pressure").
_ABS_TAG = {"Pa": "Pa(a)", "hPa": "hPa(a)", "kPa": "kPa(a)", "MPa": "MPa(a)", "bar": "bara",
            "mbar": "mbar(a)", "psi": "psia"}


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
