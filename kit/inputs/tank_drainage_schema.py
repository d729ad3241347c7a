"""Schema of a ``tank_drainage`` scenario: the tank, the drain levels and surface, the outlet
(an orifice or a line), an optional what-if outlet size, and the optional ``[integrity]``
table shared with the other kinds (:data:`kit.inputs.common.INTEGRITY`: the outlet line's
pressure rating and water-hammer screen).

>>> sorted(ROOT.entry("outlet").variants)
['line', 'orifice']
"""

from __future__ import annotations

from kit.errors import KeyTypeError, ScenarioError
from kit.inputs.common import DISPLAY, INTEGRITY, LINE, LIQUID_ONE_T, PROJECT, SITE, TOP_KEYS
from kit.inputs.schema import Key, Table, _table

__all__ = ["ROOT", "TANK", "DRAIN", "OUTLET", "COMPARE", "HEAD", "TANK_SHAPE_KEYS",
           "SURFACES", "OUTLET_TYPES"]

#: Tank shapes a scenario may name.
TANK_SHAPE_KEYS = ("vertical_cylinder", "horizontal_cylinder", "sphere", "strapping_table")
SURFACES = ("vented", "padded", "vacuum")
OUTLET_TYPES = ("orifice", "line")


def _head_kinds():
    from kit.core.tank import HEAD_KINDS

    return tuple(HEAD_KINDS)


def _tori_standards():
    from kit.core.tank import TORISPHERICAL_STANDARDS

    return tuple(TORISPHERICAL_STANDARDS)


def _cd_keys():
    from kit.core.drain import ORIFICE_CD

    return tuple(ORIFICE_CD)


HEAD = Table("head", "a tank head: its kind and shape", keys=(
    Key("kind", "choice", "head kind", choices=_head_kinds, required=True),
    Key("depth", "quantity", "head depth", kind="length", low=0.0),
    Key("ratio", "number", "head depth / diameter", low=0.0),
    Key("f", "number", "torispherical crown radius / diameter", low=0.0, low_inclusive=False),
    Key("k", "number", "torispherical knuckle radius / diameter", low=0.0,
        low_inclusive=False),
    Key("standard", "choice", "torispherical head standard (gives f and k)",
        choices=_tori_standards),
))


def _check_head(value, path, ctx):
    if isinstance(value, str):
        kinds = _head_kinds()
        if value not in kinds:
            raise ScenarioError(path, f"must be one of {', '.join(map(repr, kinds))}, "
                                f"not {value!r}", ctx.source)
    elif isinstance(value, dict):
        _table(value, HEAD, path, ctx)
    else:
        raise KeyTypeError(path, value, "a head kind in quotes or a table { kind = ... }",
                           ctx.source)


def _check_tank(doc, path, ctx):
    shape = doc.get("shape")
    need = {"vertical_cylinder": ("diameter", "length"), "horizontal_cylinder":
            ("diameter", "length"), "sphere": ("diameter",),
            "strapping_table": ("levels", "volumes")}.get(shape, ())
    for k in need:
        if k not in doc:
            raise ScenarioError(f"{path}.{k}", f"is missing (a {shape} needs "
                                f"{' and '.join(need)})", ctx.source)
    if shape == "strapping_table" and len(doc["levels"]) != len(doc["volumes"]):
        raise ScenarioError(f"{path}.volumes", f"must have one volume per level "
                            f"({len(doc['levels'])} levels), not {len(doc['volumes'])}",
                            ctx.source)


_SHAPE_KEYS = ("name", "shape", "note")
TANK = Table("tank", "the tank's shape and size (inside dimensions)", required=True, keys=(
    Key("name", "text", "tank name"),
    Key("shape", "choice", "tank shape", choices=TANK_SHAPE_KEYS, required=True),
    Key("diameter", "quantity", "inside diameter", kind="diameter", low=0.0,
        low_inclusive=False),
    Key("length", "quantity", "straight shell, tangent to tangent", kind="length", low=0.0),
    Key("bottom", "any", "bottom head (vertical tank)", check=_check_head),
    Key("top", "any", "top head (vertical tank)", check=_check_head),
    Key("heads", "any", "both heads (horizontal tank; vertical unless bottom/top given)",
        check=_check_head),
    Key("levels", "quantities", "strapping table levels, rising", kind="elevation"),
    Key("volumes", "quantities", "strapping table volumes at those levels", kind="volume"),
    Key("note", "text", "free text"),
), variant="shape", variants={
    "vertical_cylinder": _SHAPE_KEYS + ("diameter", "length", "bottom", "top", "heads"),
    "horizontal_cylinder": _SHAPE_KEYS + ("diameter", "length", "heads"),
    "sphere": _SHAPE_KEYS + ("diameter",),
    "strapping_table": _SHAPE_KEYS + ("levels", "volumes"),
}, check=_check_tank)

LEVEL = Table("level", "a level of interest with its label", keys=(
    Key("level", "quantity", "the level", kind="elevation", required=True),
    Key("label", "text", "what happens there"),
))


def _check_levels(value, path, ctx):
    from kit.inputs.schema import _quantity

    if not isinstance(value, list):
        raise KeyTypeError(path, value, "a list of levels with units or { level, label } "
                           "tables", ctx.source)
    for i, v in enumerate(value):
        if isinstance(v, dict):
            _table(v, LEVEL, f"{path}[{i}]", ctx)
        else:
            _quantity(v, LEVEL.entry("level"), f"{path}[{i}]", ctx)


VENT = Table("vent", "the tank's vent, sized against the drain-down's air inflow", keys=(
    Key("diameter", "quantity", "vent bore", kind="diameter", required=True, low=0.0,
        low_inclusive=False),
    Key("Cd", "number", "vent discharge coefficient", default=0.61, low=0.0, high=1.0,
        low_inclusive=False),
    Key("allowable_vacuum", "quantity", "vacuum the tank may see (a pressure difference)",
        kind="pressure_difference", default="0.25 kPa", low=0.0, low_inclusive=False),
))


def _check_surface(doc, path, ctx):
    surface = doc.get("surface", "vented")
    if surface == "vented" and "surface_pressure" in doc:
        raise ScenarioError(f"{path}.surface_pressure", "is for a padded or vacuum surface; a "
                            "vented surface is at atmospheric pressure", ctx.source)
    if surface != "vented" and "surface_pressure" not in doc:
        raise ScenarioError(f"{path}.surface_pressure", f"is missing (a {surface} surface "
                            "needs its pressure)", ctx.source)


DRAIN = Table("drain", "the levels, the surface and the vent", required=True, keys=(
    Key("start_level", "quantity", "level at the start, on the tank's level datum",
        kind="elevation", required=True),
    Key("target_level", "quantity", "level to drain to", kind="elevation", required=True),
    Key("levels_of_interest", "any", "levels to report the time to", check=_check_levels),
    Key("surface", "choice", "vented, padded or under vacuum", choices=SURFACES,
        default="vented"),
    Key("surface_pressure", "quantity", "surface pressure (padded or vacuum), gauge or "
        "absolute", kind="pressure"),
    VENT,
    Key("note", "text", "free text"),
), check=_check_surface)


def _check_orifice(doc, path, ctx):
    if doc.get("type") != "orifice":
        return
    if "diameter" not in doc:
        raise ScenarioError(f"{path}.diameter", "is missing (the orifice bore)", ctx.source)
    if "Cd" in doc and "cd_key" in doc:
        raise ScenarioError(f"{path}.Cd", "is given twice: give Cd or cd_key, not both",
                            ctx.source)
    if "Cd" not in doc and "cd_key" not in doc:
        raise ScenarioError(f"{path}.Cd", "is missing (give Cd or cd_key)", ctx.source)


_ORIFICE = ("type", "name", "diameter", "Cd", "cd_key", "elevation", "note")
OUTLET = Table("outlet", "the outlet: an orifice in the tank, or a line of segments",
               required=True, keys=(
    Key("type", "choice", "orifice or line", choices=OUTLET_TYPES, required=True),
    Key("name", "text", "outlet name"),
    Key("diameter", "quantity", "orifice bore", kind="diameter", low=0.0, low_inclusive=False),
    Key("Cd", "number", "orifice discharge coefficient", low=0.0, high=1.0,
        low_inclusive=False),
    Key("cd_key", "choice", "orifice kind (kit.core.drain.ORIFICE_CD)", choices=_cd_keys),
    Key("elevation", "quantity", "orifice centre above the level datum", kind="elevation",
        default="0 m", low=0.0),
    Key("inlet_elevation", "quantity", "line inlet on the level datum", kind="elevation",
        default="0 m"),
    Key("discharge_elevation", "quantity", "line outlet elevation (must equal inlet + rise)",
        kind="elevation"),
    Key("receiver_level", "quantity", "level of a receiving vessel (a submerged exit); "
        "absent: a free jet into air", kind="elevation"),
    Key("receiver_pressure", "quantity", "receiver surface pressure, gauge or absolute",
        kind="pressure"),
) + tuple(k for k in LINE if k.name not in ("name", "note", "start_elevation")) + (
    Key("note", "text", "free text"),
), variant="type", variants={
    "orifice": _ORIFICE,
    "line": ("type", "name", "start_station", "inlet_elevation", "discharge_elevation",
             "receiver_level", "receiver_pressure", "segments", "note"),
}, check=_check_orifice)


def _check_compare(doc, path, ctx):
    if "outlet_diameter" in doc and "nominal" in doc:
        raise ScenarioError(f"{path}.nominal", "cannot be given with outlet_diameter "
                            "(an orifice what-if or a line what-if, not both)", ctx.source)


COMPARE = Table("compare", "a what-if: the same drain with a second outlet size", keys=(
    Key("label", "text", "name of the what-if"),
    Key("outlet_diameter", "quantity", "orifice bore of the what-if (orifice outlet)",
        kind="diameter", low=0.0, low_inclusive=False),
    Key("Cd", "number", "discharge coefficient of the what-if orifice", low=0.0, high=1.0,
        low_inclusive=False),
    Key("nominal", "nominal", "nominal size of the what-if line (line outlet)"),
    Key("schedule", "nominal", "schedule of the what-if line"),
    Key("note", "text", "free text"),
), check=_check_compare)

ROOT = Table("tank_drainage", "A tank_drainage scenario: the time to drain a tank to a level "
             "through an orifice or an outlet line.", keys=TOP_KEYS + (
    PROJECT, SITE, DISPLAY, LIQUID_ONE_T, TANK, DRAIN, OUTLET, COMPARE, INTEGRITY,
))
