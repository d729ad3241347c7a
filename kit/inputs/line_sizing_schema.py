"""Schema of a ``line_sizing`` scenario: the duty and criteria, the pipe family, the route,
and an optional line list (CSV) sized in one go.

>>> ROOT.entry("sizing").entry("flow_design").required
True
"""

from __future__ import annotations

from kit.errors import KeyTypeError, ScenarioError
from kit.inputs.common import (
    DISPLAY,
    FITTINGS,
    INTEGRITY,
    LIQUID,
    PIPE,
    PROJECT,
    SITE,
    TOP_KEYS,
)
from kit.inputs.schema import Key, Table, Tables

__all__ = ["ROOT", "SIZING", "CRITERIA", "ROUTE", "BATCH", "BATCH_TEXT_MAX"]

#: Largest line list carried inline in a scenario or record [characters].
BATCH_TEXT_MAX = 20_000_000


def _duties():
    from kit.core.criteria import DUTY_CLASSES

    return tuple(DUTY_CLASSES)


def _check_sizes(value, path, ctx):
    if not isinstance(value, list) or not value:
        raise KeyTypeError(path, value, "a list of nominal sizes in quotes, e.g. [\"3\", \"4\"]",
                           ctx.source)
    for i, v in enumerate(value):
        if isinstance(v, bool) or not isinstance(v, (str, int)):
            raise KeyTypeError(f"{path}[{i}]", v, "a nominal size in quotes, e.g. \"4\"",
                               ctx.source)


def _check_flows(doc, path, ctx):
    from kit import units

    def q(k):
        return units.parse(doc[k], "flow", k, ctx.p_baro) if k in doc else None

    qd, qmin, qmax = q("flow_design"), q("flow_min"), q("flow_max")
    if qmin is not None and qd is not None and qmin > qd:
        raise ScenarioError(f"{path}.flow_min", f"must not exceed flow_design "
                            f"({doc['flow_design']}), not {doc['flow_min']}", ctx.source)
    if qmax is not None and qd is not None and qmax < qd:
        raise ScenarioError(f"{path}.flow_max", f"must not be below flow_design "
                            f"({doc['flow_design']}), not {doc['flow_max']}", ctx.source)


SIZING = Table("sizing", "the duty: flows, duty class, pipe family and end conditions", keys=(
    Key("duty", "choice", "duty class of the criteria (kit.core.criteria.DUTY_CLASSES)",
        choices=_duties, default="general_transfer"),
    Key("flow_design", "quantity", "design flow", kind="flow", required=True, low=0.0,
        low_inclusive=False),
    Key("flow_min", "quantity", "lowest flow of the range", kind="flow", low=0.0,
        low_inclusive=False),
    Key("flow_max", "quantity", "highest flow of the range", kind="flow", low=0.0,
        low_inclusive=False),
    PIPE.entry("standard"), PIPE.entry("schedule"), PIPE.entry("material"),
    PIPE.entry("condition"),
    Key("sizes", "any", "candidate nominal sizes (default: the sizes in reach of the criteria)",
        check=_check_sizes),
    Key("end_pressure", "quantity", "pressure at the end of the route, gauge or absolute",
        kind="pressure"),
    Key("vapour_margin", "quantity", "margin above vapour pressure at every station",
        kind="head", default="2 m", low=0.0),
    Key("erosional_C", "number", "API RP 14E empirical constant C", default=100.0, low=0.0,
        high=300.0, low_inclusive=False),
    Key("note", "text", "free text"),
), check=_check_flows)

CRITERIA = Table("criteria", "the duty class's limits, changed for this case", keys=(
    Key("v_min", "quantity", "lowest velocity", kind="velocity", low=0.0),
    Key("v_max", "quantity", "highest velocity", kind="velocity", low=0.0, low_inclusive=False),
    Key("dp_max", "quantity", "highest friction pressure drop per length",
        kind="pressure_per_length", low=0.0, low_inclusive=False),
    Key("note", "text", "free text"),
))

POINT = Table("point", "a named point of the route profile", keys=(
    Key("name", "text", "point name"),
    Key("chainage", "quantity", "distance along the route from its start", kind="length",
        required=True, low=0.0),
    Key("elevation", "quantity", "elevation of the pipe at the point", kind="elevation",
        required=True),
))

ROUTE = Table("route", "the route: length, profile points and fittings", required=True, keys=(
    Key("length", "quantity", "route length", kind="length", required=True, low=0.0,
        low_inclusive=False),
    Key("start_name", "text", "name of the start station", default="start"),
    Key("start_elevation", "quantity", "elevation at the start", kind="elevation",
        default="0 m"),
    Tables("points", POINT, "profile points in order of chainage"),
    FITTINGS,
    Key("note", "text", "free text"),
))


def _check_text(value, path, ctx):
    if not isinstance(value, str):
        raise KeyTypeError(path, value, "the line list's CSV text", ctx.source)
    if len(value) > BATCH_TEXT_MAX:
        raise ScenarioError(path, f"is {len(value)} characters; at most {BATCH_TEXT_MAX}",
                            ctx.source)


BATCH = Table("batch", "a line list sized in one go (CSV beside the scenario, or inline)",
              keys=(
    Key("file", "text", "CSV file name, relative to the scenario file"),
    Key("text", "any", "the CSV text itself (records carry it inline)", check=_check_text),
    Key("source_file", "text", "the CSV file the inline text was read from (records)"),
    Key("note", "text", "free text"),
), exclusive=((("file",), ("text",)),))

ROOT = Table("line_sizing", "A line_sizing scenario: which size of a pipe family meets a "
             "duty's velocity and pressure-drop criteria along a route.", keys=TOP_KEYS + (
    PROJECT, SITE, DISPLAY, LIQUID, SIZING, CRITERIA, ROUTE, BATCH, INTEGRITY,
))
