"""Schema and readers of the tables every scenario kind shares.

Top level (``schema``, ``kind``, ``title``), ``[project]``, ``[site]``, ``[display]``,
``[liquid]`` (a catalogue liquid or ``[liquid.user]``), endpoints, lines of segments, the pipe
of a segment and its fitting rows. Each kind's module (:mod:`kit.inputs.pump_selection`, ...)
composes these into its root :class:`~kit.inputs.schema.Table`.

The ``build_*`` readers turn checked tables into core objects (SI); they run after
:func:`kit.inputs.schema.check` has refused unknown keys and wrong types, so they only map.

Example
-------
>>> from kit.inputs.schema import check
>>> check({"elevation": "240 m"}, SITE)
>>> round(build_site({"site": {"elevation": "240 m"}}), 1)
98472.3
"""

from __future__ import annotations

from dataclasses import dataclass

from kit import units
from kit.errors import DimensionError, HeadlineError, KeyTypeError, ScenarioError
from kit.inputs.schema import Key, Table, Tables

__all__ = [
    "SCHEMA_ID", "KINDS", "TOP_KEYS", "PROJECT", "SITE", "DISPLAY", "LIQUID", "LIQUID_ONE_T",
    "PIPE", "FITTING",
    "FITTINGS", "SEGMENT", "SEGMENTS", "LINE", "INTEGRITY", "endpoint_table", "quantity", "get",
    "IntegrityOptions", "build_integrity",
    "build_site", "build_liquid", "build_temperatures", "build_pipe", "build_fitting",
    "build_segment", "build_line", "build_endpoint",
]

SCHEMA_ID = "headline-scenario/1"
KINDS = ("line_sizing", "pump_selection", "tank_drainage", "network")


def _choices(fn):
    """A lazily evaluated tuple of choices (registries import core modules)."""
    return fn


def _standards():
    from kit.core.pipes import STANDARDS

    return tuple(STANDARDS)


def _materials():
    from kit.core.roughness import ROUGHNESS

    return tuple(ROUGHNESS)


def _liquid_keys():
    from kit.core.liquids import LIQUIDS

    return tuple(LIQUIDS)


def _fitting_kinds():
    from kit.core.fittings import FITTING_KINDS

    return tuple(FITTING_KINDS)


TOP_KEYS = (
    Key("schema", "choice", "scenario format and version", required=True, choices=(SCHEMA_ID,)),
    Key("kind", "choice", "what the scenario computes", required=True, choices=KINDS),
    Key("title", "text", "one line naming the case"),
    Key("note", "text", "free text for the reader"),
)

PROJECT = Table("project", "who and what the calculation is for (copied to the record)", keys=(
    Key("name", "text", "project name"),
    Key("calc_number", "text", "calculation number"),
    Key("revision", "text", "revision"),
    Key("prepared_by", "text", "engineer who prepared it"),
    Key("date", "text", "date prepared"),
    Key("checked_by", "text", "checker (filled by the checker)"),
    Key("checked_date", "text", "date checked"),
    Key("client", "text", "client"),
    Key("note", "text", "free text"),
))

SITE = Table("site", "the site: its barometric pressure, given or from elevation", keys=(
    Key("elevation", "quantity", "site elevation above sea level (US Standard Atmosphere 1976)",
        kind="elevation", default="0 m", low=-500.0, high=6000.0),
    Key("barometric_pressure", "quantity", "barometric pressure, absolute by nature",
        kind="pressure_abs", low=30e3, high=110e3),
    Key("note", "text", "free text"),
), exclusive=((("elevation",), ("barometric_pressure",)),))

DISPLAY = Table("display", "how results are shown", keys=(
    Key("system", "choice", "display units", choices=("SI", "US"), default="SI"),
))

LIQUID_USER = Table("user", "a liquid of the user's own: constants, or a table over temperature",
                    keys=(
    Key("name", "text", "its name", default="user liquid"),
    Key("flammable", "bool", "true adds the fire-code cautions", default=False),
    Key("temperature", "quantity_or_list", "temperatures of the table", kind="temperature",
        required=True),
    Key("density", "quantity_or_list", "density at each temperature", kind="density",
        required=True, low=1.0, high=25e3, low_inclusive=False),
    Key("viscosity", "quantity_or_list", "dynamic viscosity at each temperature",
        kind="viscosity", required=True, low=0.0, high=1e4, low_inclusive=False),
    Key("vapour_pressure", "quantity_or_list", "vapour pressure at each temperature (absolute)",
        kind="pressure_abs", low=0.0),
    Key("note", "text", "free text"),
))

LIQUID = Table("liquid", "the liquid and its temperature (one, or a min/max band)", keys=(
    Key("key", "choice", "liquid of the catalogue", choices=_choices(_liquid_keys)),
    Key("concentration", "quantity", "solute fraction of a solution (its basis is the "
        "catalogue's)", kind="fraction", low=0.0, high=1.0),
    Key("temperature", "quantity", "liquid temperature", kind="temperature"),
    Key("temperature_min", "quantity", "lowest liquid temperature of the band",
        kind="temperature"),
    Key("temperature_max", "quantity", "highest liquid temperature of the band",
        kind="temperature"),
    LIQUID_USER,
    Key("note", "text", "free text"),
), exclusive=((("temperature",), ("temperature_min", "temperature_max")),
              (("key", "concentration"), ("user",))))

#: The liquid at one temperature (a drain-down is computed at one temperature).
LIQUID_ONE_T = Table("liquid", "the liquid and its one temperature", keys=tuple(
    k for k in LIQUID.keys if k.name not in ("temperature_min", "temperature_max")),
    exclusive=((("key", "concentration"), ("user",)),),
    hints={k: "a drain-down is computed at one temperature; give 'temperature'"
           for k in ("temperature_min", "temperature_max")})


def _check_pipe(doc, path, ctx):
    if "bore" in doc:
        extra = [k for k in ("standard", "nominal", "schedule") if k in doc]
        if extra:
            raise ScenarioError(f"{path}.{extra[0]}", "cannot be given with bore (a custom bore "
                                "or a catalogue pipe, not both)", ctx.source)
    else:
        for k in ("standard", "nominal", "schedule"):
            if k not in doc:
                raise ScenarioError(f"{path}.{k}", "is missing (a catalogue pipe needs standard, "
                                    "nominal and schedule; a custom pipe needs bore)", ctx.source)


PIPE = Table("pipe", "a catalogue pipe (standard, nominal, schedule) or a custom bore", keys=(
    Key("standard", "choice", "pipe dimension standard", choices=_choices(_standards)),
    Key("nominal", "nominal", "nominal size (NPS or DN, as the standard names them)"),
    Key("schedule", "nominal", "schedule or pressure class"),
    Key("bore", "quantity", "inside diameter of a custom pipe", kind="diameter", low=0.0,
        low_inclusive=False),
    Key("roughness", "quantity", "absolute roughness of a custom pipe (else the material's)",
        kind="roughness", low=0.0),
    Key("material", "choice", "material (roughness table key)", choices=_choices(_materials),
        default="carbon_steel"),
    Key("condition", "choice", "new or aged roughness", choices=("new", "aged"), default="new"),
), check=_check_pipe)


def _check_fitting(doc, path, ctx):
    from kit.core.fittings import FITTING_KINDS

    kind = doc.get("kind")
    if kind is None:
        raise ScenarioError(f"{path}.kind", "is missing (the fitting kind)", ctx.source)
    specs = {p.name: p for p in FITTING_KINDS[kind].params}
    for name, value in doc.items():
        if name in ("kind", "count", "label"):
            continue
        if name not in specs:
            import difflib

            near = difflib.get_close_matches(name, list(specs), n=1, cutoff=0.6)
            hint = f"; did you mean '{near[0]}'?" if near else ""
            from kit.errors import UnknownKeyError

            raise UnknownKeyError(f"{path}.{name}", f"is not a parameter of '{kind}'{hint} "
                                  f"(parameters: {', '.join(specs) or 'none'})", ctx.source,
                                  suggestion=near[0] if near else None)
        spec = specs[name]
        if spec.choices is not None:
            if not isinstance(value, str):
                raise KeyTypeError(f"{path}.{name}", value, "one of "
                                   + ", ".join(map(repr, spec.choices)), ctx.source)
        elif spec.unit in _PARAM_KIND:
            if not isinstance(value, str):
                raise KeyTypeError(f"{path}.{name}", value, f"a number with its unit in quotes, "
                                   f"e.g. \"{value} {spec.unit}\"", ctx.source)
        elif isinstance(value, bool) or not isinstance(value, (int, float)):
            raise KeyTypeError(f"{path}.{name}", value, f"a plain number ({spec.label})",
                               ctx.source)


FITTING = Table("fitting", "one fitting row: kind, count, label and the kind's parameters",
                keys=(
    Key("kind", "choice", "fitting kind (kit.core.fittings.FITTING_KINDS)",
        choices=_choices(_fitting_kinds), required=True),
    Key("count", "integer", "how many", default=1, low=1, high=10000),
    Key("label", "text", "what it is on the drawing"),
), open_keys=True, check=_check_fitting)

FITTINGS = Tables("fittings", FITTING, "the fitting rows of a segment or route")

SEGMENT = Table("segment", "a pipe run with its fittings and elevation change", keys=(
    Key("name", "text", "segment name", required=True),
    Key("station", "text", "name of the station at its end"),
    Key("length", "quantity", "pipe length", kind="length", required=True, low=0.0,
        low_inclusive=False),
    Key("rise", "quantity", "elevation gain inlet to outlet (negative falls)", kind="length",
        default="0 m"),
    PIPE,
    FITTINGS,
    Key("note", "text", "free text"),
))

SEGMENTS = Tables("segments", SEGMENT, "segments in flow order", required=True, min_items=1)

LINE = (
    Key("name", "text", "line name"),
    Key("start_station", "text", "name of the first station"),
    Key("start_elevation", "quantity", "elevation of the first station", kind="elevation",
        default="0 m"),
    SEGMENTS,
    Key("note", "text", "free text"),
)


def endpoint_table(name: str, help_: str, required: bool = True) -> Table:
    """Schema of a source or destination endpoint (a liquid surface)."""
    return Table(name, help_, required=required, keys=_ENDPOINT_KEYS,
                 exclusive=((("level",), ("level_low", "level_high")),))


_ENDPOINT_KEYS = (
        Key("name", "text", "its name"),
        Key("level", "quantity", "liquid surface elevation (fixed)", kind="elevation"),
        Key("level_low", "quantity", "lowest liquid surface elevation", kind="elevation"),
        Key("level_high", "quantity", "highest liquid surface elevation", kind="elevation"),
        Key("pressure", "quantity", "surface pressure, say gauge or absolute (kPa(g), psia)",
            kind="pressure", default="0 kPa(g)"),
        Key("discharge", "choice", "submerged inlet, or free discharge (adds V²/2g)",
            choices=("submerged", "free"), default="submerged"),
        Key("note", "text", "free text"),
)


def _grades():
    from kit.core.rating import GRADES

    return tuple(GRADES)


def _compounds():
    from kit.core.rating import COMPOUNDS

    return tuple(COMPOUNDS)


def _joints():
    from kit.core.rating import JOINT_FACTORS

    return tuple(JOINT_FACTORS)


def _flange_classes():
    from kit.core.rating import FLANGE_RATINGS

    return tuple(FLANGE_RATINGS)


def _anchorings():
    from kit.core.surge import ANCHORINGS

    return tuple(ANCHORINGS)


INTEGRITY = Table("integrity", "pressure rating and water-hammer screening: the pipe's grade, "
                  "allowances, flange class and the valve closure", keys=(
    Key("grade", "choice", "metal pipe grade for the B31.3 allowable stress (default: the "
        "material's usual grade, stated)", choices=_grades),
    Key("compound", "choice", "plastic pipe compound for the pressure rating (default: the "
        "material's usual compound, stated)", choices=_compounds),
    Key("joint", "choice", "longitudinal weld joint of metal pipe (its quality factor E)",
        choices=_joints),
    Key("corrosion_allowance", "quantity", "corrosion and thread allowance of metal pipe",
        kind="length", default="0 mm", low=0.0, high=0.02),
    Key("flange_class", "choice", "ASME B16.5 flange class of the line (group 1.1)",
        choices=_flange_classes),
    Key("closure_time", "quantity", "effective closure time of the fastest valve (absent: "
        "instantaneous, the Joukowsky rise)", kind="time", low=0.0, low_inclusive=False),
    Key("anchoring", "choice", "how the pipe is restrained against axial movement (Korteweg "
        "wave speed)", choices=_anchorings, default="anchored_throughout"),
    Key("bulk_modulus", "quantity", "the liquid's bulk modulus (required for surge where the "
        "property model has no speed of sound)", kind="pressure_difference", low=1e7,
        high=2e10),
    Key("rated_pressure", "quantity", "maker's pressure rating of the line at the design "
        "temperature (hose, lined or special pipe; gauge, e.g. \"10 bar\"): used in place of "
        "the computed wall rating", kind="pressure_difference", low=0.0, low_inclusive=False,
        high=1e9),
    Key("wave_speed", "quantity", "pressure wave speed of the line from the maker or a test "
        "(hose, lined pipe): used in place of the Korteweg estimate", kind="velocity",
        low=10.0, high=2500.0),
    Key("note", "text", "free text"),
), exclusive=((("grade",), ("compound",)), (("rated_pressure",), ("grade",)),
              (("rated_pressure",), ("compound",)), (("rated_pressure",), ("joint",)),
              (("rated_pressure",), ("corrosion_allowance",)),
              (("wave_speed",), ("anchoring",)), (("wave_speed",), ("bulk_modulus",))))


# ---------------------------------------------------------------- readers


def get(doc: dict, path: str, default=None):
    """Read a dotted key from a nested dict, or ``default``."""
    node = doc
    for k in path.split("."):
        if not isinstance(node, dict) or k not in node:
            return default
        node = node[k]
    return node


def quantity(doc: dict, key: str, kind: str, default=None, p_baro: float = 101325.0,
             prefix: str = "") -> float:
    """Parse ``doc[key]`` (a string with unit) as ``kind`` into SI, naming the key on error.

    >>> quantity({"length": "10 ft"}, "length", "length")
    3.048
    """
    full = f"{prefix}{key}"
    if key not in doc:
        if default is not None:
            return default
        raise ScenarioError(full, f"is missing (a {units.KINDS[kind][1]} is required)")
    try:
        return units.parse(doc[key], kind, field=full, p_baro=p_baro)
    except (HeadlineError, DimensionError) as exc:
        raise ScenarioError(full, str(exc)) from None


def _err(key: str, exc: Exception) -> ScenarioError:
    return ScenarioError(key, str(exc))


def build_site(doc: dict) -> float:
    """Barometric pressure [Pa]: given, or from site elevation (US Standard Atmosphere 1976)."""
    from kit.core.site import barometric_pressure

    site = doc.get("site", {})
    if "barometric_pressure" in site:
        return quantity(site, "barometric_pressure", "pressure_abs", prefix="site.")
    z = quantity(site, "elevation", "elevation", default=0.0, prefix="site.")
    try:
        return barometric_pressure(z)
    except HeadlineError as exc:
        raise _err("site.elevation", exc) from None


def build_liquid(doc: dict):
    """The liquid of ``[liquid]``: a catalogue entry or ``[liquid.user]``."""
    from kit.core import liquids

    sec = doc.get("liquid")
    if not isinstance(sec, dict):
        raise ScenarioError("liquid", "section is missing")
    try:
        if "user" in sec:
            u = sec["user"]

            def column(key, kind, required=True):
                raw = u.get(key)
                if raw is None:
                    if required:
                        raise ScenarioError(f"liquid.user.{key}", "is missing")
                    return None
                vals = tuple(units.parse(t, kind, f"liquid.user.{key}")
                             for t in (raw if isinstance(raw, list) else [raw]))
                return vals if isinstance(raw, list) else vals[0]  # one value: a constant

            T = column("temperature", "temperature")
            return liquids.UserLiquid(
                u.get("name", "user liquid"), T=T if isinstance(T, tuple) else (T,),
                rho=column("density", "density"), mu=column("viscosity", "viscosity"),
                pv=column("vapour_pressure", "pressure_abs", required=False),
                flammable=u.get("flammable", False))
        if "key" not in sec:
            raise ScenarioError("liquid.key", "is missing (a catalogue liquid key, or a "
                                "[liquid.user] table)")
        conc = sec.get("concentration")
        conc = None if conc is None else units.parse(conc, "fraction", "liquid.concentration")
        return liquids.make_liquid(sec.get("key"), conc)
    except ScenarioError:
        raise
    except (HeadlineError, DimensionError) as exc:
        raise _err("liquid", exc) from None


def build_temperatures(doc: dict) -> tuple[float, float]:
    """(T_min, T_max) [K] from ``[liquid]``; one ``temperature`` key serves for both."""
    sec = doc.get("liquid", {})
    if "temperature" in sec:
        T = quantity(sec, "temperature", "temperature", prefix="liquid.")
        return T, T
    lo = quantity(sec, "temperature_min", "temperature", prefix="liquid.")
    hi = quantity(sec, "temperature_max", "temperature", prefix="liquid.")
    if hi < lo:
        raise ScenarioError("liquid.temperature_max", "must not be below temperature_min")
    return lo, hi


def build_pipe(spec: dict, key: str):
    """A catalogue pipe (standard, nominal, schedule) or a custom bore (``bore``)."""
    from kit.core import pipes

    if not isinstance(spec, dict):
        raise ScenarioError(key, "must be a table with standard/nominal/schedule or bore")
    material = spec.get("material", "carbon_steel")
    condition = spec.get("condition", "new")
    try:
        if "bore" in spec:
            Di = quantity(spec, "bore", "diameter", prefix=f"{key}.")
            rough = spec.get("roughness")
            rough = None if rough is None else quantity(spec, "roughness", "roughness",
                                                        prefix=f"{key}.")
            return pipes.custom_pipe(Di, material, condition, roughness=rough)
        return pipes.catalogue_pipe(spec.get("standard"), str(spec.get("nominal")),
                                    str(spec.get("schedule")), material, condition)
    except ScenarioError:
        raise
    except (HeadlineError, DimensionError) as exc:
        raise _err(key, exc) from None


_PARAM_KIND = {"m": "length", "m/s": "velocity", "Pa": "pressure_difference"}


def build_fitting(spec: dict, key: str):
    """One fitting row: ``kind``, ``count``, ``label`` and the kind's parameters."""
    from kit.core import fittings

    if not isinstance(spec, dict) or "kind" not in spec:
        raise ScenarioError(key, "must be a table with a 'kind'")
    kind = spec["kind"]
    if kind not in fittings.FITTING_KINDS:
        raise ScenarioError(f"{key}.kind", f"must be one of {', '.join(fittings.FITTING_KINDS)}, "
                            f"not {kind!r}")
    specs = {p.name: p for p in fittings.FITTING_KINDS[kind].params}
    params = {}
    for name, value in spec.items():
        if name in ("kind", "count", "label"):
            continue
        if name not in specs:
            raise ScenarioError(f"{key}.{name}", f"is not a parameter of '{kind}' (choices: "
                                f"{', '.join(specs) or 'none'})")
        unit = getattr(specs[name], "unit", "-")
        if isinstance(value, str) and unit in _PARAM_KIND:
            params[name] = quantity(spec, name, _PARAM_KIND[unit], prefix=f"{key}.")
        else:
            params[name] = value
    count = spec.get("count", 1)
    if isinstance(count, bool) or not isinstance(count, int):
        raise KeyTypeError(f"{key}.count", count, "a whole number")
    try:
        return fittings.Fitting(kind, count, params, spec.get("label", ""))
    except (HeadlineError, DimensionError, TypeError) as exc:
        raise _err(key, exc) from None


def build_segment(spec: dict, key: str):
    """One segment: name, pipe, length, rise, fittings, station."""
    from kit.core.line import Segment

    name = spec.get("name")
    if not name:
        raise ScenarioError(f"{key}.name", "is missing")
    pipe = build_pipe(spec.get("pipe"), f"{key}.pipe")
    length = quantity(spec, "length", "length", prefix=f"{key}.")
    rise = quantity(spec, "rise", "length", default=0.0, prefix=f"{key}.")
    fits = tuple(build_fitting(f, f"{key}.fittings[{i}]")
                 for i, f in enumerate(spec.get("fittings", [])))
    try:
        return Segment(name, pipe, length, rise, fits, spec.get("station"))
    except HeadlineError as exc:
        raise _err(key, exc) from None


def build_line(doc: dict, which: str):
    """The line of section ``which`` (``"suction"``/``"discharge"``), or None if absent."""
    from kit.core.line import Line

    sec = doc.get(which)
    if sec is None:
        return None
    segs = sec.get("segments")
    if not segs:
        raise ScenarioError(f"{which}.segments", "must list at least one segment")
    built = tuple(build_segment(s, f"{which}.segments[{i}]") for i, s in enumerate(segs))
    z0 = quantity(sec, "start_elevation", "elevation", default=0.0, prefix=f"{which}.")
    try:
        return Line(sec.get("name", which), built, sec.get("start_station", "start"), z0)
    except HeadlineError as exc:
        raise _err(which, exc) from None


def build_endpoint(doc: dict, which: str, p_baro: float):
    """Source or destination endpoint; pressures say gauge or absolute."""
    from kit.core.system import Endpoint

    sec = doc.get(which)
    if not isinstance(sec, dict):
        raise ScenarioError(which, "section is missing")
    if "level" in sec:
        lo = hi = quantity(sec, "level", "elevation", prefix=f"{which}.")
    else:
        lo = quantity(sec, "level_low", "elevation", prefix=f"{which}.")
        hi = quantity(sec, "level_high", "elevation", prefix=f"{which}.")
    p = quantity(sec, "pressure", "pressure", default=p_baro, p_baro=p_baro, prefix=f"{which}.")
    try:
        return Endpoint(sec.get("name", which), lo, hi, p, sec.get("discharge", "submerged"))
    except HeadlineError as exc:
        raise _err(which, exc) from None


@dataclass(frozen=True)
class IntegrityOptions:
    """The ``[integrity]`` table in SI (None where not given: the kit's stated default)."""

    grade: str | None = None
    compound: str | None = None
    joint: str | None = None
    corrosion_allowance: float = 0.0
    flange_class: str | None = None
    closure_time: float | None = None
    anchoring: str = "anchored_throughout"
    bulk_modulus: float | None = None
    rated_pressure: float | None = None
    wave_speed: float | None = None


def build_integrity(doc: dict) -> IntegrityOptions:
    """The ``[integrity]`` options of a scenario (defaults where the table or a key is absent).

    >>> build_integrity({"integrity": {"closure_time": "4 s"}}).closure_time
    4.0
    """
    sec = doc.get("integrity") or {}
    t = sec.get("closure_time")
    K = sec.get("bulk_modulus")
    return IntegrityOptions(
        sec.get("grade"), sec.get("compound"), sec.get("joint"),
        quantity(sec, "corrosion_allowance", "length", default=0.0, prefix="integrity."),
        sec.get("flange_class"),
        None if t is None else quantity(sec, "closure_time", "time", prefix="integrity."),
        sec.get("anchoring", "anchored_throughout"),
        None if K is None else quantity(sec, "bulk_modulus", "pressure_difference",
                                        prefix="integrity."),
        None if sec.get("rated_pressure") is None else quantity(
            sec, "rated_pressure", "pressure_difference", prefix="integrity."),
        None if sec.get("wave_speed") is None else quantity(
            sec, "wave_speed", "velocity", prefix="integrity."))
