"""Reader of ``tank_drainage`` scenarios: the typed inputs of a drain-down.

The scenario was checked against :data:`kit.inputs.tank_drainage_schema.ROOT` when it was
loaded (and :func:`inputs` checks a document edited in memory again); reading maps checked text
to core objects (SI): the :class:`~kit.core.tank.Tank`, the outlet
(:class:`~kit.core.drain.OrificeOutlet` or :class:`~kit.core.drain.PipedOutlet`), the vent,
the levels and the surface. The rules that need the tank (levels inside it, an outlet line's
inlet on it) and the core's own range checks are applied here, naming the scenario key.
:func:`drain_inputs` builds the same inputs from core objects (the app's panels).

Example
-------
>>> from kit.notebook import scenario_path
>>> from kit import scenario as scn
>>> inp = inputs(scn.load(scenario_path("marlow_vale_cip_dump.toml")))
>>> inp.surface, round(inp.start, 2), len(inp.levels)
('vented', 2.35, 3)
"""

from __future__ import annotations

from dataclasses import dataclass

from kit import units
from kit.core.drain import ORIFICE_CD, OrificeOutlet, PipedOutlet, Vent
from kit.errors import (
    DimensionError,
    HeadlineError,
    InputError,
    ScenarioError,
    check_choice,
    check_range,
)
from kit.inputs import common as scn
from kit.inputs.tank_drainage_schema import ROOT

__all__ = [
    "TANK_SHAPES", "SURFACES", "OUTLET_TYPES", "DrainInputs", "inputs", "drain_inputs",
    "build_tank", "build_outlet", "head_of", "vent_of", "orifice_of", "wrap_errors",
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


def wrap_errors(key: str, fn, *args, **kw):
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
    return wrap_errors(key, Head, kind, depth, ratio, f, k)


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
        return wrap_errors("tank.levels", Tank, "table", levels=tuple(levels),
                     volumes=tuple(volumes), name=name)
    for extra in ("levels", "volumes"):
        if extra in sec:
            raise ScenarioError(f"tank.{extra}", "is only for shape 'strapping_table'")
    D = scn.quantity(sec, "diameter", "diameter", prefix="tank.")
    wrap_errors("tank.diameter", check_range, "tank diameter", D, "m", low=0.0, high=1000.0)
    if core_shape == "sphere":
        for extra in ("length", "bottom", "top", "heads"):
            if extra in sec:
                raise ScenarioError(f"tank.{extra}", "is not used by a sphere")
        return wrap_errors("tank", Tank, "sphere", "vertical", D, name=name)
    L = scn.quantity(sec, "length", "length", prefix="tank.")
    wrap_errors("tank.length", check_range, "tank straight length", L, "m", low=0.0, high=1e4)
    if orientation == "horizontal":
        for extra in ("bottom", "top"):
            if extra in sec:
                raise ScenarioError(f"tank.{extra}", "is for a vertical tank; a horizontal "
                                    "tank takes 'heads' (both ends)")
        h = _head(sec.get("heads", "flat"), "tank.heads")
        return wrap_errors("tank.heads", Tank, "cylinder", "horizontal", D, L, h, h, name=name)
    both = sec.get("heads", "flat")
    bkey = "tank.bottom" if "bottom" in sec else "tank.heads"
    tkey = "tank.top" if "top" in sec else "tank.heads"
    bottom = _head(sec.get("bottom", both), bkey)
    top = _head(sec.get("top", both), tkey)
    return wrap_errors(bkey, Tank, "cylinder", "vertical", D, L, bottom, top, name=name)


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
    wrap_errors(dkey, check_range, "orifice diameter", d, "m", low=0.0, high=10.0)
    wrap_errors(ckey, check_range, "discharge coefficient Cd", Cd, "-", low=0.0, high=1.0)
    wrap_errors("outlet.elevation", check_range, "orifice elevation", z, "m", low=0.0, high=1e4,
          low_inclusive=True)
    return wrap_errors(key, OrificeOutlet, d, Cd, z, name or str(sec.get("name", "orifice")))


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
    wrap_errors(ikey, check_range, "outlet line inlet elevation", z_in, "m",
          low=tank.h_min, high=tank.h_max, low_inclusive=True)
    name = str(sec.get("name", "outlet line")) + suffix
    line = wrap_errors("outlet", Line, name, segs, str(sec.get("start_station", "tank outlet")), z_in)
    recv = (scn.quantity(sec, "receiver_level", "elevation", prefix="outlet.")
            if "receiver_level" in sec else None)
    p_recv = (scn.quantity(sec, "receiver_pressure", "pressure", p_baro=p_atm, prefix="outlet.")
              if "receiver_pressure" in sec else None)
    if recv is not None:
        wrap_errors("outlet.receiver_level", check_range, "receiver level", recv, "m", low=z_out,
              high=1e4, low_inclusive=True)
    if p_recv is not None:
        wrap_errors("outlet.receiver_pressure", check_range, "receiver pressure", p_recv, "Pa",
              low=0.0, high=1e8)
    return wrap_errors("outlet", PipedOutlet, line, z_out, recv, p_recv)


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
    #: the ``[integrity]`` table (pressure rating and water-hammer screen of an outlet line)
    integrity: scn.IntegrityOptions = scn.IntegrityOptions()


def _level(sec, name, tank, key_prefix="drain.") -> float:
    z = scn.quantity(sec, name, "elevation", prefix=key_prefix)
    wrap_errors(f"{key_prefix}{name}", check_range, name.replace("_", " "), z,
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
        wrap_errors(key, check_range, "level of interest", z, "m", low=target, high=start,
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
    wrap_errors("drain.vent.diameter", check_range, "vent diameter", d, "m", low=0.0, high=10.0)
    wrap_errors("drain.vent.Cd", check_range, "vent discharge coefficient Cd", Cd, "-", low=0.0,
          high=1.0)
    return wrap_errors("drain.vent", Vent, d, Cd, vac)


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
        wrap_errors("drain.surface_pressure", check_range, "padded surface pressure", p, "Pa",
              low=p_atm, high=1e8)
    else:
        wrap_errors("drain.surface_pressure", check_range, "vacuum surface pressure", p, "Pa",
              low=0.0, high=p_atm, high_inclusive=False)
    return surface, p


def inputs(sc) -> DrainInputs:
    """Read a tank-drainage scenario into core inputs (SI), checked against its schema."""
    from kit.inputs.schema import check

    doc = sc.doc
    check(doc, ROOT, None, scn.build_site(doc))
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
    integrity = scn.build_integrity(doc)
    _check_allowance(integrity, outlet)
    return DrainInputs(tank, liquid, state, p_atm, surface, p_surface, vent, start, target,
                       levels, outlet, cmp, label, integrity)


def _check_allowance(opts, outlet) -> None:
    """A corrosion allowance must leave wall in every metal segment of an outlet line."""
    from kit.core.rating import ELASTIC_FOR_ROUGHNESS

    c = opts.corrosion_allowance
    if not c or not isinstance(outlet, PipedOutlet):
        return
    for seg in getattr(outlet.line, "segments", ()):
        pipe = seg.pipe
        metal = ELASTIC_FOR_ROUGHNESS.get(pipe.material) not in (None, "pvc", "hdpe")
        if metal and pipe.wall is not None and c >= pipe.wall:
            raise ScenarioError("integrity.corrosion_allowance",
                                f"must be less than the wall of segment '{seg.name}' "
                                f"({pipe.label}, {pipe.wall * 1e3:.4g} mm), not "
                                f"{c * 1e3:.4g} mm")


def drain_inputs(tank, liquid, T: float, outlet, *, start: float, target: float,
                 levels=(), p_atm: float = 101325.0, surface: str = "vented",
                 p_surface: float | None = None, vent: Vent | None = None,
                 compare_outlet=None, compare_label: str | None = None,
                 integrity: scn.IntegrityOptions | None = None) -> DrainInputs:
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
    integrity : IntegrityOptions, optional
        The ``[integrity]`` options of the outlet line's rating and surge screen
        (:func:`kit.inputs.common.build_integrity`); default: the kit's stated defaults.

    Returns
    -------
    inputs : DrainInputs

    Examples
    --------
    >>> from kit.core.liquids import make_liquid
    >>> from kit.core.tank import vertical_cylinder
    >>> inp = drain_inputs(vertical_cylinder(1.0, 2.0), make_liquid("water"), 293.15,
    ...                    OrificeOutlet(0.025, 0.61), start=2.0, target=0.0)
    >>> inp.target, inp.surface
    (0.0, 'vented')
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
    if integrity is None:
        integrity = scn.IntegrityOptions()
    elif not isinstance(integrity, scn.IntegrityOptions):
        raise InputError("integrity options", type(integrity).__name__,
                         "must be an IntegrityOptions (kit.inputs.common.build_integrity)")
    return DrainInputs(tank, liquid, state, p_atm, surface, p_surface, vent, start, target,
                       tuple(out), outlet, compare_outlet, compare_label, integrity)




#: Public names of the readers the app uses to compare its state with the scenario's text.
head_of = _head
vent_of = _vent
orifice_of = _orifice
