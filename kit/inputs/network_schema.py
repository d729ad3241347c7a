"""Schema of a ``network`` scenario: nodes, fixed heads and links of a branched or looped
system, solved by the gradient method and checked over a band of conditions.

File shape (every quantity a text with its unit; ``[[x]]`` an array of tables)::

    schema = "headline-scenario/1"
    kind = "network"
    title = "..."
    [project] [site] [display]          as every kind
    [liquid]                            key (or [liquid.user]), temperature or _min/_max band
    [band]                              levels, pipe_condition, design_level,
                                        design_pipe_condition, design_temperature
    [criteria]                          duty (velocity class), vapour_margin
    [curve]                             pump, flow_max, points (the network curve)
    [integrity]                         as every kind (rating and water-hammer screen)
    [[node]]                            name, elevation, demand, min_pressure
    [[boundary]]                        name, level | level_low + level_high, pressure
    [[link]]  type = "pipe"             name, from, to, length, pipe = {...}, fittings = [...],
                                        check, duty
              type = "pump"             name, from, to, speed, impeller, flow, head,
                                        efficiency, npshr, power, run_speed, trim, count,
                                        arrangement, standby
              type = "check_valve"      name, from, to, kv | cv, diameter
              type = "control_valve"    name, from, to, kv | cv (rated), characteristic,
                                        rangeability, FL, Fd, xFz, opening, flow_min,
                                        flow_max, diameter, circuit
              type = "balancing_valve"  name, from, to, kv_max | cv_max (fully open),
                                        kv | cv (a setting) or design_flow (balanced by the
                                        study), diameter
              type = "equipment"        name, from, to, kv | cv | rated_flow + rated_dp,
                                        diameter (a coil, an evaporator, a heat exchanger)

A link's ``from`` and ``to`` name a node or a boundary; positive flow runs from → to. Names of
nodes and boundaries are one name space, links another; each must be unique.

>>> sorted(ROOT.entry("link").table.variants)
['balancing_valve', 'check_valve', 'control_valve', 'equipment', 'pipe', 'pump']
"""

from __future__ import annotations

from dataclasses import replace

from kit.errors import KeyTypeError, ScenarioError
from kit.inputs.common import (
    DISPLAY,
    FITTINGS,
    INTEGRITY,
    KINDS,
    LIQUID,
    PIPE,
    PROJECT,
    SITE,
    TOP_KEYS,
)
from kit.inputs.schema import Key, Table, Tables

__all__ = ["ROOT", "NODE", "BOUNDARY", "LINK", "BAND", "CRITERIA", "CURVE", "LINK_TYPES",
           "KIND"]

KIND = "network"

#: Link types a ``[[link]]`` table may name.
LINK_TYPES = ("pipe", "pump", "check_valve", "control_valve", "balancing_valve", "equipment")


def _characteristics():
    from kit.core.valves import CHARACTERISTICS

    return tuple(CHARACTERISTICS)


def _duties():
    from kit.core.criteria import DUTY_CLASSES

    return tuple(DUTY_CLASSES)


# the top-level keys of every kind, with 'network' among the kinds
_TOP = tuple(replace(k, choices=tuple(dict.fromkeys(KINDS + (KIND,)))) if k.name == "kind"
             else k for k in TOP_KEYS)

NODE = Table("node", "a junction: elevation, the flow drawn off there, its minimum pressure",
             keys=(
    Key("name", "text", "node name (unique among nodes and boundaries)", required=True),
    Key("elevation", "quantity", "elevation of the node (pipe centreline)", kind="elevation",
        required=True, low=-1e4, high=1e4),
    Key("demand", "quantity", "flow drawn off at the node at design (negative: a fixed "
        "inflow)", kind="flow", default="0 m3/h", low=-100.0, high=100.0),
    Key("min_pressure", "quantity", "minimum residual pressure the node must keep, say gauge "
        "or absolute (kPa(g), psia)", kind="pressure", low=0.0, high=1e8),
    Key("note", "text", "free text"),
))

BOUNDARY = Table("boundary", "a fixed head: an open tank or a pressurised vessel (expansion "
                 "vessel, pressurisation point) with its level range", keys=(
    Key("name", "text", "boundary name (unique among nodes and boundaries)", required=True),
    Key("level", "quantity", "liquid surface (or connection) elevation, fixed",
        kind="elevation", low=-1e4, high=1e4),
    Key("level_low", "quantity", "lowest liquid surface elevation", kind="elevation",
        low=-1e4, high=1e4),
    Key("level_high", "quantity", "highest liquid surface elevation", kind="elevation",
        low=-1e4, high=1e4),
    Key("pressure", "quantity", "surface pressure, say gauge or absolute (kPa(g), psia)",
        kind="pressure", default="0 kPa(g)", low=0.0, high=1e8),
    Key("note", "text", "free text"),
), exclusive=((("level",), ("level_low", "level_high")),))


def _check_boundary(doc, path, ctx):
    if "level" not in doc and not ("level_low" in doc and "level_high" in doc):
        missing = "level_low" if "level_low" not in doc else "level_high"
        if "level_low" not in doc and "level_high" not in doc:
            missing = "level"
        raise ScenarioError(f"{path}.{missing}", "is missing (give level, or level_low and "
                            "level_high)", ctx.source)


BOUNDARY = replace(BOUNDARY, check=_check_boundary)

_COMMON = ("name", "type", "from", "to", "note")
_PIPE = _COMMON + ("length", "pipe", "fittings", "check", "duty")
_PUMP = _COMMON + ("speed", "impeller", "flow", "head", "efficiency", "npshr", "power",
                   "run_speed", "trim", "count", "arrangement", "standby")
_CHECK = _COMMON + ("kv", "cv", "diameter")
_CONTROL = _COMMON + ("kv", "cv", "characteristic", "rangeability", "FL", "Fd", "xFz",
                      "opening", "flow_min", "flow_max", "diameter", "circuit")
_BALANCING = _COMMON + ("kv_max", "cv_max", "kv", "cv", "design_flow", "diameter")
_EQUIPMENT = _COMMON + ("kv", "cv", "rated_flow", "rated_dp", "diameter")


def _check_link(doc, path, ctx):
    t = doc.get("type")
    src = ctx.source

    def need(*names):
        for n in names:
            if n not in doc:
                raise ScenarioError(f"{path}.{n}", f"is missing (a {t} link needs "
                                    f"{', '.join(names)})", src)

    if t == "pipe":
        need("length", "pipe")
    elif t == "pump":
        need("speed", "impeller", "flow", "head")
        n = len(doc["flow"])
        for what in ("head", "efficiency", "npshr", "power"):
            if what in doc and len(doc[what]) != n:
                raise ScenarioError(f"{path}.{what}", f"must have one value per flow point "
                                    f"({n} flows), not {len(doc[what])}", src)
        count = doc.get("count", 1)
        if count > 1 and "arrangement" not in doc:
            raise ScenarioError(f"{path}.arrangement", f"is missing ({count} pumps running: "
                                "say 'parallel' or 'series')", src)
        if count == 1 and "arrangement" in doc:
            raise ScenarioError(f"{path}.arrangement", "applies to 2 or more running pumps "
                                "(count); one pump running has none", src)
    elif t in ("check_valve", "control_valve"):
        if "kv" not in doc and "cv" not in doc:
            raise ScenarioError(f"{path}.kv", f"is missing (a {t} needs its rated kv or cv)",
                                src)
    elif t == "equipment":
        if not any(k in doc for k in ("kv", "cv", "rated_flow", "rated_dp")):
            raise ScenarioError(f"{path}.kv", "is missing (equipment needs its kv or cv, or "
                                "rated_flow with rated_dp)", src)
        for a, b in (("rated_flow", "rated_dp"), ("rated_dp", "rated_flow")):
            if a in doc and b not in doc:
                raise ScenarioError(f"{path}.{b}", f"is missing ({a} needs {b})", src)
    elif t == "balancing_valve":
        if "kv_max" not in doc and "cv_max" not in doc:
            raise ScenarioError(f"{path}.kv_max", "is missing (a balancing valve needs its "
                                "fully open kv_max or cv_max)", src)
        setting = [k for k in ("kv", "cv") if k in doc]
        if setting and "design_flow" in doc:
            raise ScenarioError(f"{path}.design_flow", f"cannot be given with {setting[0]} "
                                "(give the setting, or the design flow the study balances to, "
                                "not both)", src)
        if not setting and "design_flow" not in doc:
            raise ScenarioError(f"{path}.design_flow", "is missing (give the setting as kv or "
                                "cv, or the design flow the study balances the valve to)", src)
        if "kv_max" in doc and "cv" in doc or "cv_max" in doc and "kv" in doc:
            raise ScenarioError(f"{path}.{setting[0]}", "must use the same coefficient as the "
                                "fully open value (kv with kv_max, cv with cv_max)", src)


def _check_names(value, path, ctx):
    if not isinstance(value, list) or not value:
        raise KeyTypeError(path, value, "a list of link names in quotes, e.g. [\"coil 1\"]",
                           ctx.source)
    for i, v in enumerate(value):
        if not isinstance(v, str) or not v.strip():
            raise KeyTypeError(f"{path}[{i}]", v, "a link name in quotes", ctx.source)


def _by_type() -> str:
    common = set(_COMMON)
    parts = [f"{t}: {', '.join(k for k in keys if k not in common)}"
             for t, keys in (("pipe", _PIPE), ("pump", _PUMP), ("check_valve", _CHECK),
                             ("control_valve", _CONTROL), ("balancing_valve", _BALANCING),
                             ("equipment", _EQUIPMENT))]
    return "; ".join(parts)


LINK = Table("link", "a link between two nodes: a pipe, a pump, a check valve, a control "
             "valve, a balancing valve or a piece of equipment (its type). Every link has "
             f"{', '.join(_COMMON)}; by type: {_by_type()}", keys=(
    Key("name", "text", "link name (unique among links)", required=True),
    Key("type", "choice", "what the link is", choices=LINK_TYPES, required=True),
    Key("from", "text", "node or boundary the link starts at (positive flow leaves it)",
        required=True),
    Key("to", "text", "node or boundary the link ends at", required=True),
    # pipe
    Key("length", "quantity", "pipe length (at least the elevation difference of its ends)",
        kind="length", low=0.0, low_inclusive=False, high=1e6),
    PIPE,
    FITTINGS,
    Key("check", "bool", "true where the pipe run holds a non-return valve (flow from → to "
        "only)", default=False),
    Key("duty", "choice", "velocity and pressure-drop class of this pipe (else [criteria] "
        "duty)", choices=_duties),
    # pump
    Key("speed", "quantity", "datasheet speed", kind="speed", low=0.0, low_inclusive=False),
    Key("impeller", "quantity", "datasheet impeller diameter", kind="diameter", low=0.0,
        low_inclusive=False),
    Key("flow", "quantities", "datasheet flows, rising", kind="flow"),
    Key("head", "quantities", "datasheet heads at those flows", kind="head"),
    Key("efficiency", "quantities", "pump efficiency at those flows", kind="fraction"),
    Key("npshr", "quantities", "NPSH required at those flows", kind="head"),
    Key("power", "quantities", "shaft power at those flows", kind="power"),
    Key("run_speed", "quantity", "running speed (affinity laws from the datasheet speed)",
        kind="speed", low=0.0, low_inclusive=False),
    Key("trim", "quantity", "trimmed impeller diameter (affinity laws for trim)",
        kind="diameter", low=0.0, low_inclusive=False),
    Key("count", "integer", "identical pumps running together", default=1, low=1, high=8),
    Key("arrangement", "choice", "how the running pumps are joined (2 or more running)",
        choices=("parallel", "series")),
    Key("standby", "integer", "identical standby pumps installed, not running (duty/standby)",
        default=0, low=0, high=8),
    # valves
    Key("kv", "number", "flow coefficient Kv [m³/h at 1 bar]: rated (Kvs) for a control or "
        "check valve, the setting for a balancing valve, the equipment's own", low=0.0, low_inclusive=False,
        high=1e6),
    Key("cv", "number", "flow coefficient Cv [US gpm at 1 psi], instead of kv", low=0.0,
        low_inclusive=False, high=1e6),
    Key("kv_max", "number", "balancing valve Kv fully open [m³/h at 1 bar]", low=0.0,
        low_inclusive=False, high=1e6),
    Key("cv_max", "number", "balancing valve Cv fully open [US gpm at 1 psi], instead of "
        "kv_max", low=0.0, low_inclusive=False, high=1e6),
    Key("rated_flow", "quantity", "equipment: the flow of its rated pressure drop",
        kind="flow", low=0.0, low_inclusive=False, high=100.0),
    Key("rated_dp", "quantity", "equipment: pressure drop at rated_flow, with the scenario's "
        "liquid (Kv from the IEC 60534-2-1 definition)", kind="pressure_difference", low=0.0,
        low_inclusive=False, high=1e8),
    Key("design_flow", "quantity", "flow the study balances this valve's branch to",
        kind="flow", low=0.0, low_inclusive=False, high=100.0),
    Key("characteristic", "choice", "inherent characteristic of the control valve",
        choices=_characteristics, default="equal_percentage"),
    Key("rangeability", "number", "rangeability R of an equal-percentage characteristic",
        default=50.0, low=1.0, low_inclusive=False, high=1000.0),
    Key("FL", "number", "liquid pressure-recovery factor FL (IEC 60534-2-1; maker's data)",
        default=0.9, low=0.0, low_inclusive=False, high=1.0),
    Key("Fd", "number", "valve style modifier Fd (IEC 60534-2-1; maker's data)", default=1.0,
        low=0.0, low_inclusive=False, high=1.0),
    Key("xFz", "number", "incipient-cavitation pressure-differential ratio xFz (maker's data)",
        low=0.0, low_inclusive=False, high=1.0),
    Key("opening", "quantity", "control valve travel at design, a fraction of rated travel "
        "(\"85 %\")", kind="fraction", default="100 %", low=0.0, low_inclusive=False,
        high=1.0),
    Key("flow_min", "quantity", "lowest flow the control valve must control (sizing case)",
        kind="flow", low=0.0, low_inclusive=False, high=100.0),
    Key("flow_max", "quantity", "highest flow the control valve must pass (sizing case)",
        kind="flow", low=0.0, low_inclusive=False, high=100.0),
    Key("circuit", "any", "names of the links of the controlled circuit besides the valve, "
        "for its authority (else the links in series with it)", check=_check_names),
    Key("diameter", "quantity", "valve nominal bore (velocity; piping geometry factor)",
        kind="diameter", low=0.0, low_inclusive=False, high=5.0),
    Key("note", "text", "free text"),
), variant="type", variants={
    "pipe": _PIPE, "pump": _PUMP, "check_valve": _CHECK, "control_valve": _CONTROL,
    "balancing_valve": _BALANCING, "equipment": _EQUIPMENT,
}, exclusive=((("kv",), ("cv",), ("rated_flow", "rated_dp")), (("kv_max",), ("cv_max",))),
    check=_check_link)

BAND = Table("band", "the conditions the network is solved over, and the design one", keys=(
    Key("levels", "choice", "boundary levels of the band", choices=("both", "low", "high"),
        default="both"),
    Key("pipe_condition", "choice", "pipe roughness of the band", choices=("both", "new",
                                                                          "aged"),
        default="both"),
    Key("design_level", "choice", "boundary level of the design case", choices=("low",
                                                                                "high"),
        default="low"),
    Key("design_pipe_condition", "choice", "pipe roughness of the design case",
        choices=("new", "aged"), default="new"),
    Key("design_temperature", "choice", "liquid temperature of the design case (of the "
        "[liquid] band)", choices=("min", "max"), default="min"),
    Key("note", "text", "free text"),
))

CRITERIA = Table("criteria", "limits of the checks", keys=(
    Key("duty", "choice", "velocity and pressure-drop class of the pipes "
        "(kit.core.criteria.DUTY_CLASSES)", choices=_duties, default="general_transfer"),
    Key("vapour_margin", "quantity", "head above vapour pressure every node must keep",
        kind="head", default="2 m", low=0.0, high=100.0),
    Key("note", "text", "free text"),
))

CURVE = Table("curve", "the network curve: head the pump must make over a flow range", keys=(
    Key("pump", "text", "pump link the curve is drawn for (default: the only pump)"),
    Key("flow_max", "quantity", "highest flow of the curve (default 1.5 × design pump flow)",
        kind="flow", low=0.0, low_inclusive=False, high=100.0),
    Key("points", "integer", "flows on the curve", default=41, low=2, high=400),
    Key("note", "text", "free text"),
))

def _check_network(doc, path, ctx):
    """Names unique, link ends known, a circuit naming known links (key paths 0-based)."""
    src = ctx.source
    places = {}
    for table in ("node", "boundary"):
        for i, t in enumerate(doc.get(table, ())):
            name = t["name"]
            if name in places:
                raise ScenarioError(f"{table}[{i}].name", f"repeats the name {name!r} of "
                                    f"{places[name]}; node and boundary names must differ", src)
            places[name] = f"{table}[{i}]"
    links = {}
    for i, t in enumerate(doc.get("link", ())):
        name = t["name"]
        if name in links:
            raise ScenarioError(f"link[{i}].name", f"repeats the name {name!r} of "
                                f"{links[name]}; link names must differ", src)
        links[name] = f"link[{i}]"
        for end in ("from", "to"):
            if t[end] not in places:
                import difflib

                near = difflib.get_close_matches(t[end], list(places), n=1, cutoff=0.6)
                hint = f"; did you mean {near[0]!r}?" if near else ""
                raise ScenarioError(f"link[{i}].{end}", f"names {t[end]!r}, which is no node "
                                    f"or boundary{hint} (nodes and boundaries: "
                                    f"{', '.join(sorted(places)[:30])})", src)
        if t["from"] == t["to"]:
            raise ScenarioError(f"link[{i}].to", f"must differ from its from ({t['from']!r})",
                                src)
    for i, t in enumerate(doc.get("link", ())):
        for j, other in enumerate(t.get("circuit", ())):
            if other not in links:
                raise ScenarioError(f"link[{i}].circuit[{j}]", f"names {other!r}, which is no "
                                    "link", src)
            if other == t["name"]:
                raise ScenarioError(f"link[{i}].circuit[{j}]", "names the valve itself; list "
                                    "the other links of its circuit", src)
    cname = doc.get("curve", {}).get("pump")
    if cname is not None:
        pumps = [t["name"] for t in doc.get("link", ()) if t.get("type") == "pump"]
        if cname not in pumps:
            raise ScenarioError("curve.pump", f"names {cname!r}, which is no pump link "
                                f"(pump links: {', '.join(pumps) or 'none'})", src)


ROOT = Table("network", "A network scenario: nodes, fixed heads and links of a branched or "
             "looped system, solved by the gradient method (Todini & Pilati 1988) over the "
             "band of levels, temperatures and pipe age.", keys=_TOP + (
    PROJECT, SITE, DISPLAY, LIQUID, BAND, CRITERIA, CURVE, INTEGRITY,
    Tables("node", NODE, "junctions ([[node]] blocks)", required=True, min_items=1,
           max_items=20000),
    Tables("boundary", BOUNDARY, "fixed heads ([[boundary]] blocks): at least one",
           required=True, min_items=1, max_items=1000),
    Tables("link", LINK, "links ([[link]] blocks)", required=True, min_items=1,
           max_items=50000),
), check=_check_network)
