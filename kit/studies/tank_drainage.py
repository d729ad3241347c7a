"""Tank drainage study: the time to drain a tank to a target level, through an orifice or a line.

The tank, its outlet and the levels come from a scenario; the drain-down itself is
:func:`kit.core.drain.drain` (quasi-steady energy balance, time by quadrature over volume on
the tank's exact level–volume table). An optional ``[compare]`` section builds the same
drain with a second outlet size (the what-if) and reports both.

Scenario keys of this kind (besides the common ones of :mod:`kit.scenario`: ``[site]`` gives
the atmospheric pressure, ``[liquid]`` the liquid at one ``temperature``)::

    [tank]     name = "T-101"
               shape = "vertical_cylinder"     (| horizontal_cylinder | sphere | strapping_table)
               diameter = "2.2 m"              (inside; cylinders and sphere)
               length = "2.6 m"                (straight shell, tangent to tangent; cylinders)
               bottom = { kind = "torispherical", standard = "ASME F&D" }   (vertical)
               top = "flat"                    (vertical; default flat)
               heads = "ellipsoidal"           (horizontal: both ends; vertical: both, unless
                                                bottom/top are given)
               levels = ["0 m", ...], volumes = ["0 m3", ...]   (strapping_table only)
      a head is a kind ("flat", "conical", "ellipsoidal", "torispherical", "spherical") or a
      table { kind, depth = "300 mm" | ratio = 0.25, f = 1.0, k = 0.06 | standard = "..." }
      (standard: a key of kit.core.tank.TORISPHERICAL_STANDARDS)
    [drain]    start_level = "2.9 m", target_level = "0 m"   (on the tank's level datum: its
                                                lowest inside point)
               levels_of_interest = ["2 m", { level = "450 mm", label = "low-level switch" }]
               surface = "vented"              (| "padded" | "vacuum")
               surface_pressure = "0.2 bar(g)" (padded or vacuum only; gauge or absolute)
               vent = { diameter = "3 in", Cd = 0.61, allowable_vacuum = "0.25 kPa" }
    [outlet]   type = "orifice"
               diameter = "50 mm", Cd = 0.61 | cd_key = "sharp"  (key of kit.core.drain.ORIFICE_CD)
               elevation = "0 m"               (orifice centre above the level datum)
               name = "bottom orifice"
    [outlet]   type = "line"
               name = "dump line", start_station = "tank outlet nozzle"
               inlet_elevation = "0 m"         (line inlet on the level datum; default 0)
               discharge_elevation = "-2.5 m"  (optional; must equal inlet + the line's rise)
               receiver_level = "..."          (optional: a submerged exit into a vessel;
                                                absent: a free jet into air)
               receiver_pressure = "0 kPa(g)"  (optional; default atmospheric)
               [[outlet.segments]]             (as kit.scenario.build_segment reads them)
    [compare]  label = "NPS 3 dump line"        (optional what-if, a second outlet size)
               outlet_diameter = "65 mm", Cd = 0.61      (orifice outlet)
               nominal = "3", schedule = "40S"           (line outlet: every catalogue pipe)

Reported values (keys of :class:`kit.results.Results`; SI)::

    tank.total_volume [volume]   tank.height [length]   liquid.density, liquid.viscosity,
    liquid.vapour_pressure (where modelled)   drain.start_level, drain.target_level,
    drain.end_level [elevation]  drain.volume_drained [volume]   drain.total_time [time]
    drain.time_to.<label> [time] (inf below a level where outflow stops)
    drain.peak_flow, drain.mean_flow [flow]   drain.peak_velocity [velocity]
    drain.lowest_pressure [pressure] (line outlets)
    compare.total_time, compare.time_to.<label>, compare.peak_flow, compare.peak_velocity,
    compare.time_saved, compare.lowest_pressure (line)

Tables: ``times`` (one row per level: start, levels of interest, target) and ``history``
(about 50 rows of time, level, volume, flow, velocity picked from the computed grid), and
``compare_history`` with a ``[compare]``.

Example
-------
>>> from kit import scenario as scn
>>> text = '''
... schema = "headline-scenario/1"
... kind = "tank_drainage"
... title = "doc example"
... [liquid.user]
... name = "test liquid"
... temperature = ["10 degC", "30 degC"]
... density = ["1000 kg/m3", "1000 kg/m3"]
... viscosity = ["1 mPa*s", "1 mPa*s"]
... vapour_pressure = ["2.3 kPa", "2.3 kPa"]
... [liquid]
... temperature = "20 degC"
... [tank]
... shape = "vertical_cylinder"
... diameter = "1 m"
... length = "2 m"
... [drain]
... start_level = "2 m"
... target_level = "0 m"
... [outlet]
... type = "orifice"
... diameter = "25 mm"
... Cd = 0.61
... '''
>>> r = compute(scn.loads(text))
>>> round(r.value("drain.total_time"), 1)
1675.2
"""

from __future__ import annotations

import math
from dataclasses import dataclass, replace

import numpy as np

from kit import scenario as scn
from kit import units
from kit.core.drain import (
    DRAIN_METHOD,
    ORIFICE_CD,
    SUBMERGENCE_RULE,
    DrainResult,
    OrificeOutlet,
    PipedOutlet,
    Vent,
    drain,
)
from kit.core.findings import cautions_for
from kit.core.friction import FRICTION_METHOD
from kit.errors import (
    DimensionError,
    HeadlineError,
    InputError,
    ScenarioError,
    check_choice,
    check_range,
)
from kit.results import Results

__all__ = [
    "TANK_SHAPES", "SURFACES", "OUTLET_TYPES", "HOT_LIQUID_T", "DrainInputs", "Case",
    "DrainStudy", "LineRoute", "build_tank", "build_outlet", "inputs", "study", "compute",
    "drain_inputs", "resize_pipe", "results_of", "times_rows", "caution_topics",
]

#: Scenario tank shapes -> (kit.core.tank shape, orientation).
TANK_SHAPES = {
    "vertical_cylinder": ("cylinder", "vertical"),
    "horizontal_cylinder": ("cylinder", "horizontal"),
    "sphere": ("sphere", "vertical"),
    "strapping_table": ("table", "vertical"),
}
#: Surface conditions: vented (atmospheric), padded (blanketed above), vacuum (below).
SURFACES = ("vented", "padded", "vacuum")
#: Outlet types.
OUTLET_TYPES = ("orifice", "line")
#: Above this temperature [K] the study adds a scald caution (45 °C; common practice, no
#: source — hot-water scald guidance commonly starts near 45–50 °C, from memory).
HOT_LIQUID_T = 318.15
#: History rows for the notebook chart.
_HISTORY_ROWS = 50

_ALLOWED = {
    "tank": {"name", "shape", "diameter", "length", "bottom", "top", "heads", "levels",
             "volumes", "note"},
    "drain": {"start_level", "target_level", "levels_of_interest", "surface",
              "surface_pressure", "vent", "note"},
    "orifice": {"type", "name", "diameter", "Cd", "cd_key", "elevation", "note"},
    "line": {"type", "name", "start_station", "inlet_elevation", "discharge_elevation",
             "receiver_level", "receiver_pressure", "segments", "note"},
    "compare": {"label", "outlet_diameter", "Cd", "nominal", "schedule", "note"},
    "head": {"kind", "depth", "ratio", "f", "k", "standard"},
    "vent": {"diameter", "Cd", "allowable_vacuum"},
}


def _section(doc: dict, key: str, required: bool = True) -> dict | None:
    sec = doc.get(key)
    if sec is None:
        if required:
            raise ScenarioError(key, "section is missing")
        return None
    if not isinstance(sec, dict):
        raise ScenarioError(key, "must be a table")
    return sec


def _only(sec: dict, allowed: set, key: str) -> None:
    for name in sec:
        if name not in allowed:
            raise ScenarioError(f"{key}.{name}", "is not a key of this section (choices: "
                                f"{', '.join(sorted(allowed))})")


def _number(sec: dict, name: str, key: str, default=None) -> float | None:
    if name not in sec:
        return default
    v = sec[name]
    if isinstance(v, bool) or not isinstance(v, (int, float)):
        raise ScenarioError(f"{key}.{name}", f"must be a plain number, not {v!r}")
    return float(v)


def _wrap(key: str, fn, *args, **kw):
    """Call ``fn`` and turn a kit error into a ScenarioError naming ``key``."""
    try:
        return fn(*args, **kw)
    except ScenarioError:
        raise
    except (HeadlineError, DimensionError) as exc:
        raise ScenarioError(key, str(exc)) from None


# ------------------------------------------------------------------------------- the tank

def _head(spec, key: str):
    from kit.core.tank import HEAD_KINDS, TORISPHERICAL_STANDARDS, Head

    if isinstance(spec, str):
        if spec not in HEAD_KINDS:
            raise ScenarioError(key, f"must be one of {', '.join(HEAD_KINDS)}, not {spec!r}")
        return spec
    if not isinstance(spec, dict) or "kind" not in spec:
        raise ScenarioError(key, "must be a head kind or a table with a 'kind'")
    _only(spec, _ALLOWED["head"], key)
    kind = spec["kind"]
    if kind not in HEAD_KINDS:
        raise ScenarioError(f"{key}.kind", f"must be one of {', '.join(HEAD_KINDS)}, "
                            f"not {kind!r}")
    depth = (scn.quantity(spec, "depth", "length", prefix=f"{key}.") if "depth" in spec
             else None)
    ratio = _number(spec, "ratio", key)
    f, k = _number(spec, "f", key), _number(spec, "k", key)
    if "standard" in spec:
        std = spec["standard"]
        if std not in TORISPHERICAL_STANDARDS:
            raise ScenarioError(f"{key}.standard", "must be one of "
                                f"{', '.join(TORISPHERICAL_STANDARDS)}, not {std!r}")
        if kind != "torispherical" or f is not None or k is not None:
            raise ScenarioError(f"{key}.standard", "is for a torispherical head given without "
                                "f and k")
        f, k = TORISPHERICAL_STANDARDS[std]
    return _wrap(key, Head, kind, depth, ratio, f, k)


def build_tank(doc: dict):
    """The :class:`~kit.core.tank.Tank` of ``[tank]``."""
    from kit.core.tank import Tank

    sec = _section(doc, "tank")
    _only(sec, _ALLOWED["tank"], "tank")
    shape = sec.get("shape")
    if shape not in TANK_SHAPES:
        raise ScenarioError("tank.shape", f"must be one of {', '.join(TANK_SHAPES)}, "
                            f"not {shape!r}")
    core_shape, orientation = TANK_SHAPES[shape]
    name = str(sec.get("name", "tank"))
    if core_shape == "table":
        for extra in ("diameter", "length", "bottom", "top", "heads"):
            if extra in sec:
                raise ScenarioError(f"tank.{extra}", "is not used by a strapping table")
        levels = _quantities(sec, "levels", "elevation", "tank")
        volumes = _quantities(sec, "volumes", "volume", "tank")
        return _wrap("tank.levels", Tank, "table", levels=tuple(levels),
                     volumes=tuple(volumes), name=name)
    for extra in ("levels", "volumes"):
        if extra in sec:
            raise ScenarioError(f"tank.{extra}", "is only for shape 'strapping_table'")
    D = scn.quantity(sec, "diameter", "diameter", prefix="tank.")
    _wrap("tank.diameter", check_range, "tank diameter", D, "m", low=0.0, high=1000.0)
    if core_shape == "sphere":
        for extra in ("length", "bottom", "top", "heads"):
            if extra in sec:
                raise ScenarioError(f"tank.{extra}", "is not used by a sphere")
        return _wrap("tank", Tank, "sphere", "vertical", D, name=name)
    L = scn.quantity(sec, "length", "length", prefix="tank.")
    _wrap("tank.length", check_range, "tank straight length", L, "m", low=0.0, high=1e4)
    if orientation == "horizontal":
        for extra in ("bottom", "top"):
            if extra in sec:
                raise ScenarioError(f"tank.{extra}", "is for a vertical tank; a horizontal "
                                    "tank takes 'heads' (both ends)")
        h = _head(sec.get("heads", "flat"), "tank.heads")
        return _wrap("tank.heads", Tank, "cylinder", "horizontal", D, L, h, h, name=name)
    both = sec.get("heads", "flat")
    bkey = "tank.bottom" if "bottom" in sec else "tank.heads"
    tkey = "tank.top" if "top" in sec else "tank.heads"
    bottom = _head(sec.get("bottom", both), bkey)
    top = _head(sec.get("top", both), tkey)
    return _wrap(bkey, Tank, "cylinder", "vertical", D, L, bottom, top, name=name)


def _quantities(sec: dict, name: str, kind: str, prefix: str) -> list[float]:
    vals = sec.get(name)
    if not isinstance(vals, list) or not vals:
        raise ScenarioError(f"{prefix}.{name}", "must be a list of values with units")
    return [_parse(v, kind, f"{prefix}.{name}[{i}]") for i, v in enumerate(vals)]


def _parse(value, kind: str, key: str) -> float:
    """One value with its unit, read as ``kind``; a bad one names ``key``."""
    try:
        return units.parse(value, kind, field=key)
    except (HeadlineError, DimensionError) as exc:
        raise ScenarioError(key, str(exc)) from None


# ------------------------------------------------------------------------------ the outlet

def _orifice(sec: dict, diameter: float | None = None, Cd: float | None = None,
             key: str = "outlet", name: str | None = None) -> OrificeOutlet:
    _only(sec, _ALLOWED["orifice"], "outlet")
    d = diameter if diameter is not None else scn.quantity(sec, "diameter", "diameter",
                                                            prefix="outlet.")
    if Cd is None:
        if "Cd" in sec and "cd_key" in sec:
            raise ScenarioError("outlet.Cd", "is given twice: give Cd or cd_key, not both")
        if "cd_key" in sec:
            ck = sec["cd_key"]
            if ck not in ORIFICE_CD:
                raise ScenarioError("outlet.cd_key", f"must be one of {', '.join(ORIFICE_CD)}, "
                                    f"not {ck!r}")
            Cd = ORIFICE_CD[ck].Cd
        else:
            Cd = _number(sec, "Cd", "outlet")
            if Cd is None:
                raise ScenarioError("outlet.Cd", "is missing (give Cd or cd_key)")
    z = scn.quantity(sec, "elevation", "elevation", default=0.0, prefix="outlet.")
    dkey = "compare.outlet_diameter" if key == "compare" else "outlet.diameter"
    ckey = f"{key}.Cd"
    _wrap(dkey, check_range, "orifice diameter", d, "m", low=0.0, high=10.0)
    _wrap(ckey, check_range, "discharge coefficient Cd", Cd, "-", low=0.0, high=1.0)
    _wrap("outlet.elevation", check_range, "orifice elevation", z, "m", low=0.0, high=1e4,
          low_inclusive=True)
    return _wrap(key, OrificeOutlet, d, Cd, z, name or str(sec.get("name", "orifice")))


def _segments(sec: dict, key: str, pipe_change: dict | None = None) -> tuple:
    segs = sec.get("segments")
    if not isinstance(segs, list) or not segs:
        raise ScenarioError(f"{key}.segments", "must list at least one segment")
    out = []
    for i, s in enumerate(segs):
        skey = f"{key}.segments[{i}]"
        if not isinstance(s, dict):
            raise ScenarioError(skey, "must be a table")
        if pipe_change:
            pipe = s.get("pipe")
            if not isinstance(pipe, dict) or "bore" in pipe:
                raise ScenarioError("compare.nominal", f"changes catalogue pipes only; {skey} "
                                    "has a custom bore")
            s = {**s, "pipe": {**pipe, **pipe_change}}
            try:
                out.append(scn.build_segment(s, skey))
            except ScenarioError as exc:
                raise ScenarioError("compare.nominal", f"{skey}: {exc.reason}") from None
        else:
            out.append(scn.build_segment(s, skey))
    return tuple(out)


def _line_outlet(sec: dict, tank, p_atm: float, pipe_change: dict | None = None,
                 suffix: str = "") -> PipedOutlet:
    from kit.core.line import Line

    _only(sec, _ALLOWED["line"], "outlet")
    segs = _segments(sec, "outlet", pipe_change)
    rise = float(sum(s.rise for s in segs))
    has_in, has_out = "inlet_elevation" in sec, "discharge_elevation" in sec
    z_in = scn.quantity(sec, "inlet_elevation", "elevation", default=0.0, prefix="outlet.")
    if has_out:
        z_out = scn.quantity(sec, "discharge_elevation", "elevation", prefix="outlet.")
        if not has_in:
            z_in = z_out - rise
        elif abs(z_in + rise - z_out) > 1e-3:
            raise ScenarioError("outlet.discharge_elevation",
                                f"must equal inlet_elevation + the segments' rise = "
                                f"{z_in + rise:.6g} m, not {z_out:.6g} m")
    z_out = z_in + rise
    ikey = "outlet.inlet_elevation" if has_in or not has_out else "outlet.discharge_elevation"
    _wrap(ikey, check_range, "outlet line inlet elevation", z_in, "m",
          low=tank.h_min, high=tank.h_max, low_inclusive=True)
    name = str(sec.get("name", "outlet line")) + suffix
    line = _wrap("outlet", Line, name, segs, str(sec.get("start_station", "tank outlet")), z_in)
    recv = (scn.quantity(sec, "receiver_level", "elevation", prefix="outlet.")
            if "receiver_level" in sec else None)
    p_recv = (scn.quantity(sec, "receiver_pressure", "pressure", p_baro=p_atm, prefix="outlet.")
              if "receiver_pressure" in sec else None)
    if recv is not None:
        _wrap("outlet.receiver_level", check_range, "receiver level", recv, "m", low=z_out,
              high=1e4, low_inclusive=True)
    if p_recv is not None:
        _wrap("outlet.receiver_pressure", check_range, "receiver pressure", p_recv, "Pa",
              low=0.0, high=1e8)
    return _wrap("outlet", PipedOutlet, line, z_out, recv, p_recv)


def build_outlet(doc: dict, tank, p_atm: float, compare: bool = False):
    """The outlet of ``[outlet]`` (an OrificeOutlet or a PipedOutlet); with ``compare`` the
    what-if outlet of ``[compare]`` (None when there is no ``[compare]``)."""
    sec = _section(doc, "outlet")
    kind = sec.get("type")
    if kind not in OUTLET_TYPES:
        raise ScenarioError("outlet.type", f"must be one of {', '.join(OUTLET_TYPES)}, "
                            f"not {kind!r}")
    if not compare:
        if kind == "orifice":
            return _orifice(sec)
        return _line_outlet(sec, tank, p_atm)
    cmp = _section(doc, "compare", required=False)
    if cmp is None:
        return None
    _only(cmp, _ALLOWED["compare"], "compare")
    label = cmp.get("label")
    if kind == "orifice":
        for bad in ("nominal", "schedule"):
            if bad in cmp:
                raise ScenarioError(f"compare.{bad}", "is for a line outlet; an orifice outlet "
                                    "compares 'outlet_diameter'")
        d = scn.quantity(cmp, "outlet_diameter", "diameter", prefix="compare.")
        Cd = _number(cmp, "Cd", "compare")
        base = _orifice(sec)
        label = label or f"orifice {d * 1e3:.4g} mm"
        return _orifice(sec, d, Cd if Cd is not None else base.Cd, "compare",
                        name=f"{base.name} ({label})")
    for bad in ("outlet_diameter", "Cd"):
        if bad in cmp:
            raise ScenarioError(f"compare.{bad}", "is for an orifice outlet; a line outlet "
                                "compares 'nominal' (and 'schedule')")
    if "nominal" not in cmp:
        raise ScenarioError("compare.nominal", "is missing (the line's pipe size for the "
                            "what-if)")
    change = {"nominal": str(cmp["nominal"])}
    if "schedule" in cmp:
        change["schedule"] = str(cmp["schedule"])
    label = label or f"NPS {cmp['nominal']}"
    return _line_outlet(sec, tank, p_atm, change, suffix=f" ({label})")


# ------------------------------------------------------------------------------- the study

@dataclass(frozen=True)
class DrainInputs:
    """A drainage scenario read into core objects (SI)."""

    tank: object
    liquid: object
    state: object
    p_atm: float
    surface: str
    p_surface: float
    vent: Vent | None
    start: float
    target: float
    levels: tuple          # ((label, level [m]), ...)
    outlet: object
    compare_outlet: object | None
    compare_label: str | None


@dataclass(frozen=True)
class Case:
    """One outlet and its drain-down."""

    label: str
    outlet: object
    result: DrainResult


@dataclass(frozen=True)
class DrainStudy:
    """The inputs, the drain-down through the outlet, and the what-if drain-down (or None)."""

    inputs: DrainInputs
    base: Case
    compare: Case | None

    @property
    def tank(self):
        return self.inputs.tank

    @property
    def state(self):
        return self.inputs.state

    @property
    def outlet(self):
        return self.base.outlet

    @property
    def result(self) -> DrainResult:
        return self.base.result


def _level(sec, name, tank, key_prefix="drain.") -> float:
    z = scn.quantity(sec, name, "elevation", prefix=key_prefix)
    _wrap(f"{key_prefix}{name}", check_range, name.replace("_", " "), z,
          "m", low=tank.h_min, high=tank.h_max, low_inclusive=True)
    return z


def _levels_of_interest(sec: dict, tank, start: float, target: float) -> tuple:
    vals = sec.get("levels_of_interest", [])
    if not isinstance(vals, list):
        raise ScenarioError("drain.levels_of_interest", "must be a list of levels with units")
    out, seen = [], set()
    for i, v in enumerate(vals):
        key = f"drain.levels_of_interest[{i}]"
        if isinstance(v, dict):
            _only(v, {"level", "label"}, key)
            z = scn.quantity(v, "level", "elevation", prefix=f"{key}.")
            label = str(v.get("label", v.get("level")))
        else:
            z = _parse(v, "elevation", key)
            label = str(v).strip()
        _wrap(key, check_range, "level of interest", z, "m", low=target, high=start,
              low_inclusive=True)
        if label in seen or label in ("start", "target"):
            raise ScenarioError(key, f"label {label!r} is used twice (or is 'start'/'target')")
        seen.add(label)
        out.append((label, z))
    return tuple(out)


def _vent(spec) -> Vent | None:
    if spec is None:
        return None
    if not isinstance(spec, dict):
        raise ScenarioError("drain.vent", "must be a table { diameter, Cd, allowable_vacuum }")
    _only(spec, _ALLOWED["vent"], "drain.vent")
    d = scn.quantity(spec, "diameter", "diameter", prefix="drain.vent.")
    Cd = _number(spec, "Cd", "drain.vent", 0.61)
    vac = scn.quantity(spec, "allowable_vacuum", "pressure_difference", default=250.0,
                       prefix="drain.vent.")
    _wrap("drain.vent.diameter", check_range, "vent diameter", d, "m", low=0.0, high=10.0)
    _wrap("drain.vent.Cd", check_range, "vent discharge coefficient Cd", Cd, "-", low=0.0,
          high=1.0)
    return _wrap("drain.vent", Vent, d, Cd, vac)


def _surface(sec: dict, p_atm: float) -> tuple[str, float]:
    surface = sec.get("surface", "vented")
    if surface not in SURFACES:
        raise ScenarioError("drain.surface", f"must be one of {', '.join(SURFACES)}, "
                            f"not {surface!r}")
    if surface == "vented":
        if "surface_pressure" in sec:
            raise ScenarioError("drain.surface_pressure", "is for a padded or vacuum surface; "
                                "a vented surface is at atmospheric pressure")
        return surface, p_atm
    if "surface_pressure" not in sec:
        raise ScenarioError("drain.surface_pressure", f"is missing (a {surface} surface needs "
                            "its pressure)")
    p = scn.quantity(sec, "surface_pressure", "pressure", p_baro=p_atm, prefix="drain.")
    if surface == "padded":
        _wrap("drain.surface_pressure", check_range, "padded surface pressure", p, "Pa",
              low=p_atm, high=1e8)
    else:
        _wrap("drain.surface_pressure", check_range, "vacuum surface pressure", p, "Pa",
              low=0.0, high=p_atm, high_inclusive=False)
    return surface, p


def inputs(sc) -> DrainInputs:
    """Read a tank-drainage scenario into core inputs (SI)."""
    doc = sc.doc
    p_atm = scn.build_site(doc)
    liquid = scn.build_liquid(doc)
    T_lo, T_hi = scn.build_temperatures(doc)
    if T_lo != T_hi:
        raise ScenarioError("liquid.temperature", "a drain-down is computed at one temperature: "
                            "give 'temperature', not a min/max range")
    tank = build_tank(doc)
    sec = _section(doc, "drain")
    _only(sec, _ALLOWED["drain"], "drain")
    surface, p_surface = _surface(sec, p_atm)
    try:
        state = liquid.state(T_hi, max(p_surface, 1.0))
    except HeadlineError as exc:
        key = "drain.surface_pressure" if surface == "vacuum" else "liquid.temperature"
        raise ScenarioError(key, str(exc)) from None
    start = _level(sec, "start_level", tank)
    target = _level(sec, "target_level", tank)
    if target >= start:
        raise ScenarioError("drain.target_level", f"must be below start_level ({start:.6g} m), "
                            f"not {target:.6g} m")
    levels = _levels_of_interest(sec, tank, start, target)
    vent = _vent(sec.get("vent"))
    outlet = build_outlet(doc, tank, p_atm)
    cmp = build_outlet(doc, tank, p_atm, compare=True)
    label = None
    if cmp is not None:
        label = doc["compare"].get("label") or (
            f"NPS {doc['compare']['nominal']}" if isinstance(cmp, PipedOutlet)
            else f"orifice {cmp.diameter * 1e3:.4g} mm")
    return DrainInputs(tank, liquid, state, p_atm, surface, p_surface, vent, start, target,
                       levels, outlet, cmp, label)


def _run(inp: DrainInputs, outlet, key: str) -> DrainResult:
    return _wrap(key, drain, inp.tank, outlet, inp.state, inp.start, inp.target, inp.p_surface,
                 inp.p_atm, inp.vent)


def study(sc, inp: DrainInputs | None = None) -> DrainStudy:
    """The drain-down through the scenario's outlet, and through the what-if outlet."""
    inp = inp or inputs(sc)
    base = Case("outlet", inp.outlet, _run(inp, inp.outlet, "outlet"))
    cmp = None
    if inp.compare_outlet is not None:
        cmp = Case(inp.compare_label, inp.compare_outlet,
                   _run(inp, inp.compare_outlet, "compare"))
    return DrainStudy(inp, base, cmp)


# ------------------------------------------------------- inputs from core objects (the app)

def drain_inputs(tank, liquid, T: float, outlet, *, start: float, target: float,
                 levels=(), p_atm: float = 101325.0, surface: str = "vented",
                 p_surface: float | None = None, vent: Vent | None = None,
                 compare_outlet=None, compare_label: str | None = None) -> DrainInputs:
    """:class:`DrainInputs` from core objects (SI), checked as :func:`inputs` checks a scenario.

    The notebook's app builds its inputs here from the panels' values; a bad value raises
    the kit's error naming the field (not a ScenarioError).

    Parameters
    ----------
    tank : Tank
    liquid : Liquid or UserLiquid
        Its state is taken at ``T`` and the surface pressure.
    T : float
        Liquid temperature [K].
    outlet : OrificeOutlet or PipedOutlet
    start, target : float
        Start and target levels on the tank's level datum [m], target below start.
    levels : sequence of (str, float)
        Levels of interest: (label, level [m]) between target and start.
    p_atm : float
        Atmospheric pressure [Pa].
    surface : str
        'vented', 'padded' or 'vacuum'.
    p_surface : float, optional
        Absolute surface pressure [Pa] of a padded (above ``p_atm``) or vacuum (below) tank.
    vent : Vent, optional
    compare_outlet : OrificeOutlet or PipedOutlet, optional
        The what-if outlet; ``compare_label`` names it.

    Returns
    -------
    inputs : DrainInputs

    Examples
    --------
    >>> from kit.core.liquids import make_liquid
    >>> from kit.core.tank import vertical_cylinder
    >>> inp = drain_inputs(vertical_cylinder(1.0, 2.0), make_liquid("water"), 293.15,
    ...                    OrificeOutlet(0.025, 0.61), start=2.0, target=0.0)
    >>> round(study(None, inp).result.total_time, 0)
    1675.0
    """
    check_choice("surface", surface, SURFACES)
    p_atm = check_range("atmospheric pressure", p_atm, "Pa", low=3e4, high=1.2e5)
    if surface == "vented":
        p_surface = p_atm
    elif p_surface is None:
        raise InputError("surface pressure", None, f"is needed for a {surface} surface")
    elif surface == "padded":
        p_surface = check_range("padded surface pressure", p_surface, "Pa", low=p_atm,
                                high=1e8)
    else:
        p_surface = check_range("vacuum surface pressure", p_surface, "Pa", low=0.0,
                                high=p_atm, high_inclusive=False)
    start = check_range("start level", start, "m", low=tank.h_min, high=tank.h_max,
                        low_inclusive=True)
    target = check_range("target level", target, "m", low=tank.h_min, high=start,
                         low_inclusive=True, high_inclusive=False)
    seen, out = set(), []
    for label, z in levels:
        label = str(label).strip()
        check_range(f"level of interest '{label}'", z, "m", low=target, high=start,
                    low_inclusive=True)
        if not label or label in seen or label in ("start", "target"):
            raise InputError("level of interest label", label,
                             "must be given once each and not be 'start' or 'target'")
        seen.add(label)
        out.append((label, float(z)))
    state = liquid.state(T, max(p_surface, 1.0))
    if compare_outlet is not None and not compare_label:
        compare_label = "what-if"
    return DrainInputs(tank, liquid, state, p_atm, surface, p_surface, vent, start, target,
                       tuple(out), outlet, compare_outlet, compare_label)


@dataclass(frozen=True)
class LineRoute:
    """The layout of an outlet line: its segments in order, to rebuild it with another pipe,
    fittings, length or fall.

    :meth:`build` keeps the segments' names and stations and scales their lengths and rises
    so that they add up to the new developed length and fall; every segment gets the same
    pipe. A fitting equal to one of the route's own keeps its segment; any other fitting goes
    into the first segment (the losses are then taken at the inlet, which gives the lowest
    pressures downstream: the conservative side for the siphon / vapour-pressure check).

    Parameters
    ----------
    name : str
    start_station : str
    segments : tuple of Segment
        The line as given (the scenario's).
    """

    name: str
    start_station: str
    segments: tuple

    @classmethod
    def of(cls, line) -> LineRoute:
        """The route of a :class:`kit.core.line.Line`."""
        return cls(line.name, line.start_station, tuple(line.segments))

    @property
    def length(self) -> float:
        """Developed length [m]."""
        return float(sum(s.length for s in self.segments))

    @property
    def fall(self) -> float:
        """Drop from the inlet to the discharge end [m] (minus the line's rise)."""
        return float(-sum(s.rise for s in self.segments))

    @property
    def pipe(self):
        """The first segment's pipe."""
        return self.segments[0].pipe

    @property
    def one_pipe(self) -> bool:
        """True when every segment has the same pipe."""
        return all(s.pipe == self.pipe for s in self.segments)

    @property
    def fittings(self) -> tuple:
        """Every segment's fittings, in order."""
        return tuple(f for s in self.segments for f in s.fittings)

    def build(self, pipe, fittings, length: float, fall: float, inlet_elevation: float,
              name: str | None = None):
        """A :class:`kit.core.line.Line` of this route with ``pipe``, ``fittings`` (tuple of
        Fitting), developed ``length`` [m] and ``fall`` [m] (inlet minus discharge
        elevation), starting at ``inlet_elevation`` [m] on the tank datum."""
        from kit.core.line import Line, Segment

        length = check_range("outlet line length", length, "m", low=0.0, high=1e6)
        fall = check_range("outlet line fall", fall, "m", low=-length, high=length,
                           low_inclusive=True)
        L0, F0 = self.length, self.fall
        k_len = 1.0 if abs(length - L0) <= 1e-12 * L0 else length / L0
        n = len(self.segments)
        if abs(fall - F0) <= 1e-12 * max(abs(F0), 1.0):
            rises = [s.rise for s in self.segments]
        elif F0 != 0.0:
            rises = [s.rise * fall / F0 for s in self.segments]
        else:
            rises = [0.0] * (n - 1) + [-fall]
        placed: list[list] = [[] for _ in range(n)]
        pool = [(i, f) for i, s in enumerate(self.segments) for f in s.fittings]
        for fit in fittings:
            for j, (i, f) in enumerate(pool):
                if f == fit:
                    placed[i].append(fit)
                    del pool[j]
                    break
            else:
                placed[0].append(fit)
        segs = tuple(Segment(s.name, pipe, s.length * k_len, rise, tuple(fs), s.end_station)
                     for s, rise, fs in zip(self.segments, rises, placed, strict=True))
        return Line(name or self.name, segs, self.start_station, inlet_elevation)


def resize_pipe(pipe, size):
    """``pipe`` at another size: a nominal size (str) of the same standard and schedule for a
    catalogue pipe, or a bore [m] (float) for a custom one; same material and condition."""
    from kit.core import pipes

    if isinstance(size, str):
        if pipe.standard is None:
            raise InputError("what-if size", size, "is a nominal size; a custom-bore pipe "
                             "takes a bore")
        return pipes.catalogue_pipe(pipe.standard, size, pipe.schedule, pipe.material,
                                    pipe.condition)
    return pipes.custom_pipe(float(size), pipe.material, pipe.condition,
                             roughness=pipe.roughness_override)


# ---------------------------------------------------------------------------- results

def _bore(outlet) -> float:
    return outlet.diameter if isinstance(outlet, OrificeOutlet) else outlet.exit_diameter


def _history(res: DrainResult) -> list[dict]:
    """About 50 rows of the computed grid, spread evenly in time (first and last kept)."""
    n = len(res.time)
    if n <= _HISTORY_ROWS:
        idx = np.arange(n)
    else:
        want = np.linspace(0.0, float(res.time[-1]), _HISTORY_ROWS)
        idx = np.unique(np.clip(np.searchsorted(res.time, want), 0, n - 1))
        idx = np.unique(np.concatenate([[0], idx, [n - 1]]))
    return [{"time": float(res.time[i]), "level": float(res.level[i]),
             "volume": float(res.volume[i]), "flow": float(res.flow[i]),
             "velocity": float(res.velocity[i])} for i in idx]


def _time_to(res: DrainResult, z: float) -> float:
    return res.time_to([z])[float(z)]


def compute(sc) -> Results:
    """The tank-drainage results of a scenario (values, findings, methods, cautions, tables)."""
    return results_of(study(sc), sc.doc)


def times_rows(s: DrainStudy) -> list[dict]:
    """One row per level (start, levels of interest, target): label, level [m], volume
    remaining [m³], time [s] through the outlet, and ``compare_time`` [s] with a what-if
    (``inf`` below a level where outflow stops)."""
    inp, c = s.inputs, s.compare
    rows = []
    for label, z in [("start", inp.start), *inp.levels, ("target", inp.target)]:
        row = {"label": label, "level": z, "volume_remaining": inp.tank.volume(z),
               "time": _time_to(s.result, z)}
        if c is not None:
            row["compare_time"] = _time_to(c.result, z)
        rows.append(row)
    return rows


def caution_topics(inp: DrainInputs) -> tuple:
    """Keys of :data:`kit.core.findings.CAUTIONS` that apply to these inputs."""
    topics = ["drain", "vacuum"]
    if isinstance(inp.outlet, PipedOutlet):
        topics.append("water_hammer")
    if getattr(inp.state, "flammable", False):
        topics.append("flammable")
    return tuple(topics)


def results_of(s: DrainStudy, doc: dict | None = None) -> Results:
    """The :class:`~kit.results.Results` of a drain study (what :func:`compute` reports).

    ``doc`` is the scenario document, used only to say where the barometric pressure came
    from; the notebook's app passes None for a study built from its panels.
    """
    inp, res = s.inputs, s.result
    tank, state = inp.tank, inp.state
    r = Results("tank_drainage")
    r.add("tank.total_volume", f"'{tank.name}': volume when full", tank.V_total, "volume")
    r.add("tank.height", f"'{tank.name}': height of the level datum to the top", tank.h_max,
          "length")
    r.add("liquid.density", "density", state.rho, "density")
    r.add("liquid.viscosity", "viscosity", state.mu, "viscosity")
    if state.pv is not None:
        r.add("liquid.vapour_pressure", "vapour pressure", state.pv, "pressure")
    r.add("drain.start_level", "start level", inp.start, "elevation")
    r.add("drain.target_level", "target level", inp.target, "elevation")
    end = float(res.level[-1])
    r.add("drain.end_level", "level at the end of the drain" + ("" if res.reached else
          " (outflow stops)"), end, "elevation")
    drained = float(res.volume[0] - res.volume[-1])
    r.add("drain.volume_drained", "volume drained", drained, "volume")
    r.add("drain.total_time", "time to the target level" if res.reached else
          "time to the level where outflow stops", res.total_time, "time")
    for label, z in inp.levels:
        r.add(f"drain.time_to.{label}", f"time to level {label}", _time_to(res, z), "time")
    r.add("drain.peak_flow", "peak outflow", res.peak_flow, "flow")
    r.add("drain.mean_flow", "mean outflow", drained / res.total_time if res.total_time > 0
          else 0.0, "flow")
    r.add("drain.peak_velocity", f"peak velocity in the outlet bore ({_bore(s.outlet) * 1e3:.4g} "
          "mm)", float(res.velocity.max()) if res.velocity.size else 0.0, "velocity")
    piped = isinstance(s.outlet, PipedOutlet)
    if piped and math.isfinite(res.lowest_pressure):
        r.add("drain.lowest_pressure", f"lowest pressure in the line ({res.lowest_station})",
              res.lowest_pressure, "pressure")
    r.findings += list(res.findings)

    c = s.compare
    if c is not None:
        cr = c.result
        r.add("compare.total_time", f"{c.label}: time to the target level" if cr.reached else
              f"{c.label}: time to the level where outflow stops", cr.total_time, "time")
        for label, z in inp.levels:
            r.add(f"compare.time_to.{label}", f"{c.label}: time to level {label}",
                  _time_to(cr, z), "time")
        r.add("compare.peak_flow", f"{c.label}: peak outflow", cr.peak_flow, "flow")
        r.add("compare.peak_velocity", f"{c.label}: peak velocity in the outlet bore "
              f"({_bore(c.outlet) * 1e3:.4g} mm)",
              float(cr.velocity.max()) if cr.velocity.size else 0.0, "velocity")
        r.add("compare.time_saved", f"{c.label}: time saved against the outlet as given",
              res.total_time - cr.total_time, "time")
        if piped and math.isfinite(cr.lowest_pressure):
            r.add("compare.lowest_pressure", f"{c.label}: lowest pressure in the line "
                  f"({cr.lowest_station})", cr.lowest_pressure, "pressure")
        # the what-if's findings, each subject naming the what-if (the vent's does not)
        r.findings += [f if c.label in f.subject else replace(f, subject=f"{f.subject} ({c.label})")
                       for f in cr.findings]

    # tables
    r.tables["times"] = times_rows(s)
    r.tables["history"] = _history(res)
    if c is not None:
        r.tables["compare_history"] = _history(c.result)
    r.tables["outlets"] = [{"case": "as given", "outlet": s.outlet.name,
                            "bore": _bore(s.outlet)}] + (
        [{"case": c.label, "outlet": c.outlet.name, "bore": _bore(c.outlet)}] if c else [])

    # methods
    r.method("Tank geometry", _tank_reference(tank))
    if isinstance(s.outlet, OrificeOutlet):
        r.method("Orifice outflow", "Q = Cd·A·sqrt(2 g ΔH): " + DRAIN_METHOD["references"][0]
                 + f" Cd {s.outlet.Cd:g}; coefficients: {_cd_source(s.outlet.Cd)}")
    else:
        r.method("Outlet line losses", FRICTION_METHOD["name"] + ". "
                 + " ".join(FRICTION_METHOD["references"]))
        r.method("Fitting losses", _fitting_reference(s.outlet, c.outlet if c else None))
    r.method("Drain time", DRAIN_METHOD["name"] + "; " + DRAIN_METHOD["accuracy"]
             + f"; quadrature error estimate {res.time_error:.3g} s")
    r.method("Vortex screening", f"{SUBMERGENCE_RULE['name']}: {SUBMERGENCE_RULE['source']}")
    if inp.vent is not None:
        r.method("Vent capacity", "orifice equation ΔP = ρ_air/2·(Q/(Cd·A))², air inflow equal "
                 "to the peak liquid outflow")
    r.method("Liquid properties", "; ".join(f"{k}: {v}" for k, v in state.sources.items()))
    if doc is not None and "barometric_pressure" not in doc.get("site", {}):
        r.method("Barometric pressure", "U.S. Standard Atmosphere 1976")

    # cautions: the standing ones for drains, then the result's own, without repeats
    cautions = cautions_for(*[t for t in caution_topics(inp) if t != "flammable"])
    for case in (s.base, c):
        if case is not None:
            cautions += [t for t in case.result.cautions if t not in cautions]
    if getattr(state, "flammable", False) and cautions_for("flammable")[1] not in cautions:
        cautions += cautions_for("flammable")[1:]
    if state.T >= HOT_LIQUID_T:
        cautions.append(
            f"The liquid is hot ({state.T - 273.15:.0f} °C): a drain to an open gully or floor "
            "can scald people nearby and give off vapour; guard the discharge point and keep "
            "people clear while the tank drains. Cleaning solutions may also be corrosive. "
            "Local codes and licensed professional practice govern (common practice, no "
            "source).")
    r.cautions = cautions
    return r


def _tank_reference(tank) -> str:
    from kit.core.tank import TANK_METHODS

    if tank.shape == "table":
        return ("strapping table: " + TANK_METHODS["table"] + "; Fritsch, F. N., Carlson, R. E. "
                "(1980). Monotone piecewise cubic interpolation. SIAM J. Numer. Anal. 17(2), "
                "238–246. doi:10.1137/0717021")
    return (f"{tank.description}: " + TANK_METHODS["volume"] + "; level: " + TANK_METHODS["level"]
            + ". Jones, D. (2003). Compute fluid volumes in vertical tanks. Chemical Processing, "
            "Dec. 18, 2003. Bell, C. and contributors, fluids: fluid dynamics component of the "
            "Chemical Engineering Design Library (ChEDL), fluids.geometry.TANK")


def _cd_source(Cd: float) -> str:
    for entry in ORIFICE_CD.values():
        if abs(entry.Cd - Cd) < 1e-12:
            return f"{entry.label}, {entry.source}"
    return "user-given"


def _fitting_reference(*outlets) -> str:
    kinds = []
    for o in outlets:
        for seg in (o.line.segments if o is not None else ()):
            kinds += [f.kind for f in seg.fittings if f.kind not in kinds]
    if not kinds:
        return "no fittings listed"
    from kit.core.fittings import FITTING_KINDS

    out = []
    for k in kinds:
        src = getattr(FITTING_KINDS.get(k), "source", "")
        out.append(f"{k}: {src}" if src else k)
    return "K-factor method, each K referred to the bore of its segment; " + "; ".join(out)
