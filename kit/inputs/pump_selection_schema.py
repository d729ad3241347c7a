"""Schema of a ``pump_selection`` scenario: the system (source, destination, suction and
discharge lines), the duty, the operation, and the candidate pumps.

>>> [k.name for k in ROOT.keys][:5]
['schema', 'kind', 'title', 'note', 'pump_elevation']
"""

from __future__ import annotations

from kit.errors import ScenarioError
from kit.inputs.common import (
    DISPLAY,
    INTEGRITY,
    LINE,
    LIQUID,
    PROJECT,
    SITE,
    TOP_KEYS,
    endpoint_table,
)
from kit.inputs.schema import Key, Table, Tables

__all__ = ["ROOT", "PUMP", "DUTY", "OPERATION", "ARRANGEMENTS", "PUMP_SET", "DRIVE", "STAGING",
           "LOAD_PROFILE", "MIN_FLOW", "RECIRCULATION", "VISCOUS", "CONTROLS"]

#: Pump arrangements a ``[[pumps]]`` table may name.
ARRANGEMENTS = ("single", "parallel", "series")


def _npsh_keys():
    from kit.core.operating import NPSH_MARGINS

    return tuple(NPSH_MARGINS)


def _motor_series():
    from kit.core.motors import MOTOR_SERIES

    return tuple(MOTOR_SERIES)


def _check_pump(doc, path, ctx):
    n = len(doc.get("flow", ()))
    for what in ("head", "efficiency", "npshr", "power"):
        if what in doc and len(doc[what]) != n:
            raise ScenarioError(f"{path}.{what}", f"must have one value per flow point ({n} "
                                f"flows), not {len(doc[what])}", ctx.source)
    arrangement = doc.get("arrangement", "single")
    count = doc.get("count", 1)
    if arrangement == "single" and count != 1:
        raise ScenarioError(f"{path}.count", f"must be 1 for a single pump, not {count}",
                            ctx.source)
    if arrangement != "single" and count < 2:
        raise ScenarioError(f"{path}.count", f"must be at least 2 pumps in {arrangement}, "
                            f"not {count}", ctx.source)


PUMP = Table("pump", "one candidate pump from its datasheet curve", keys=(
    Key("name", "text", "pump name (names must differ)"),
    Key("speed", "quantity", "datasheet speed", kind="speed", required=True, low=0.0,
        low_inclusive=False),
    Key("impeller", "quantity", "datasheet impeller diameter", kind="diameter", required=True,
        low=0.0, low_inclusive=False),
    Key("arrangement", "choice", "one pump, or identical pumps in parallel or series",
        choices=ARRANGEMENTS, default="single"),
    Key("count", "integer", "number of identical pumps in the arrangement", default=1, low=1,
        high=8),
    Key("flow", "quantities", "datasheet flows, rising", kind="flow", required=True),
    Key("head", "quantities", "datasheet heads at those flows", kind="head", required=True),
    Key("efficiency", "quantities", "pump efficiency at those flows", kind="fraction"),
    Key("npshr", "quantities", "NPSH required at those flows", kind="head"),
    Key("power", "quantities", "shaft power at those flows", kind="power"),
    Key("run_speed", "quantity", "running speed (affinity laws from the datasheet speed)",
        kind="speed", low=0.0, low_inclusive=False),
    Key("trim", "quantity", "trimmed impeller diameter (affinity laws for trim)",
        kind="diameter", low=0.0, low_inclusive=False),
    Key("note", "text", "free text"),
), check=_check_pump)

DUTY = Table("duty", "what the pump must deliver", keys=(
    Key("flow", "quantity", "required flow at every band condition", kind="flow", low=0.0,
        low_inclusive=False),
    Key("npsh_application", "choice", "service class of the NPSH margin guideline",
        choices=_npsh_keys, default="general"),
    Key("note", "text", "free text"),
))

OPERATION = Table("operation", "running hours, energy price and motor series", keys=(
    Key("hours_per_year", "quantity", "running hours per year", kind="time", low=0.0,
        high=8784 * 3600.0),
    Key("tariff", "number", "energy price per kWh, in the currency below", low=0.0,
        default=0.0),
    Key("currency", "text", "currency of the tariff"),
    Key("motor_series", "choice", "motor rating series", choices=_motor_series,
        default="IEC"),
    Key("note", "text", "free text"),
))

def _strategies():
    from kit.core.staging import STRATEGIES

    return tuple(STRATEGIES)


def _bases():
    from kit.core.staging import STAGING_BASES

    return tuple(STAGING_BASES)


def _pump_classes():
    from kit.core.min_flow import MIN_FLOW_FRACTIONS

    return tuple(MIN_FLOW_FRACTIONS)


#: What the controller holds: the system curve itself (ideal speed control), a constant
#: header head, or a remote differential-pressure set point with its control curve.
CONTROLS = ("system_curve", "header", "remote_dp")


def _check_units(value, path, ctx):
    if not isinstance(value, list) or not value:
        raise ScenarioError(path, "must be a list of candidate pump names in quotes, duty "
                            "units first, e.g. [\"P-1\", \"P-1\"]", ctx.source)
    if len(value) > 12:
        raise ScenarioError(path, f"must list at most 12 units, not {len(value)}", ctx.source)
    for i, v in enumerate(value):
        if not isinstance(v, str) or not v.strip():
            raise ScenarioError(f"{path}[{i}]", f"must be a candidate pump's name in quotes, "
                                f"not {v!r}", ctx.source)


def _check_set(doc, path, ctx):
    if "pump" not in doc and "units" not in doc:
        raise ScenarioError(f"{path}.pump", "is missing: name the candidate pump of the set "
                            "(pump = \"...\"), or list its units (units = [...])", ctx.source)
    n = doc.get("duty_count", 1)
    if "units" in doc and isinstance(doc["units"], list) and n > len(doc["units"]):
        raise ScenarioError(f"{path}.duty_count", f"must not exceed the {len(doc['units'])} "
                            f"units listed, not {n}", ctx.source)


def _check_staging(doc, path, ctx):
    control = doc.get("control", "system_curve")
    need = {"system_curve": (), "header": ("set_head",),
            "remote_dp": ("set_head", "design_flow", "design_head")}[control]
    for k in need:
        if k not in doc:
            raise ScenarioError(f"{path}.{k}", f"is missing: control = {control!r} needs "
                                f"{', '.join(need)}", ctx.source)
    for k in ("set_head", "design_flow", "design_head"):
        if k in doc and k not in need:
            raise ScenarioError(f"{path}.{k}", f"does not apply when control = {control!r} "
                                f"(it needs {', '.join(need) or 'no set point'})", ctx.source)
    basis = doc.get("basis", "pressure")
    if basis == "flow" and "stage_up_flows" not in doc:
        raise ScenarioError(f"{path}.stage_up_flows", "is missing: staging by flow needs the "
                            "flow at which each added pump starts", ctx.source)
    if basis != "flow" and "stage_up_flows" in doc:
        raise ScenarioError(f"{path}.stage_up_flows", "applies only to staging by flow (basis "
                            "= \"flow\")", ctx.source)


def _check_drive(doc, path, ctx):
    freq = ("min_frequency", "max_frequency", "rated_frequency")
    if any(k in doc for k in freq) and "rated_frequency" not in doc:
        raise ScenarioError(f"{path}.rated_frequency", "is missing: a frequency range needs "
                            "the motor's rated frequency (the datasheet speed's)", ctx.source)


def _check_profile(doc, path, ctx):
    nq, nt = len(doc.get("flow", ())), len(doc.get("hours", ()))
    if nq != nt:
        raise ScenarioError(f"{path}.hours", f"must have one value per flow ({nq} flows), "
                            f"not {nt}", ctx.source)


PUMP_SET = Table("pump_set", "the installed set: duty and standby units drawn from the "
                 "candidate pumps", keys=(
    Key("pump", "text", "name of the candidate pump every unit is (identical units)"),
    Key("units", "any", "candidate pump names of each installed unit, duty units first (unlike "
        "units allowed with unlike = true)", check=_check_units),
    Key("duty_count", "integer", "units that run at once (the first ones listed)", default=1,
        low=1, high=12),
    Key("standby_count", "integer", "installed standby units (with pump = ...)", default=0,
        low=0, high=8),
    Key("unlike", "bool", "allow units of different curves in parallel (each with its own "
        "check valve)", default=False),
    Key("note", "text", "free text"),
), exclusive=((("pump", "standby_count"), ("units",)),), check=_check_set)

DRIVE = Table("drive", "the variable-speed drive's speed range (by speed, or by frequency "
              "against the motor's rated frequency)", keys=(
    Key("min_speed", "quantity", "lowest speed the drive allows", kind="speed", low=0.0,
        low_inclusive=False),
    Key("max_speed", "quantity", "highest speed the drive allows", kind="speed", low=0.0,
        low_inclusive=False),
    Key("min_frequency", "quantity", "lowest drive output frequency (e.g. \"15 Hz\")",
        kind="speed", low=0.0, low_inclusive=False),
    Key("max_frequency", "quantity", "highest drive output frequency", kind="speed", low=0.0,
        low_inclusive=False),
    Key("rated_frequency", "quantity", "motor rated frequency, at which the pump turns at its "
        "datasheet speed", kind="speed", low=0.0, low_inclusive=False),
    Key("note", "text", "free text"),
), exclusive=((("min_speed", "max_speed"), ("min_frequency", "max_frequency",
                                            "rated_frequency")),), check=_check_drive)

STAGING = Table("staging", "how pumps are staged and what head the controller holds",
                keys=(
    Key("strategy", "choice", "speed control of the running pumps (the staging chart's)",
        choices=_strategies, default="all_vfd"),
    Key("basis", "choice", "stage up by pressure (pumps at top speed cannot hold the head) or "
        "at set flows", choices=_bases, default="pressure"),
    Key("stage_up_flows", "quantities", "flows at which each added pump starts (basis = "
        "\"flow\")", kind="flow"),
    Key("hysteresis", "quantity", "stage down at (1 − this) × the stage-up flow",
        kind="fraction", default="10 %", low=0.0, high=0.5),
    Key("control", "choice", "the head held: the system curve, a constant header head, or a "
        "remote differential-pressure set point", choices=CONTROLS, default="system_curve"),
    Key("set_head", "quantity", "head held at no flow (header set point as pump head)",
        kind="head", low=0.0, low_inclusive=False),
    Key("design_flow", "quantity", "design flow of the remote set point's control curve",
        kind="flow", low=0.0, low_inclusive=False),
    Key("design_head", "quantity", "pump head at the design flow on the control curve",
        kind="head", low=0.0, low_inclusive=False),
    Key("note", "text", "free text"),
), check=_check_staging)

LOAD_PROFILE = Table("load_profile", "hours a year at each flow (the energy comparison's "
                     "load)", keys=(
    Key("flow", "quantities", "flow of each step", kind="flow", required=True, low=0.0,
        low_inclusive=False),
    Key("hours", "quantities", "hours a year at each step's flow", kind="time", required=True,
        low=0.0, high=8784 * 3600.0),
    Key("note", "text", "free text"),
), check=_check_profile)

MIN_FLOW = Table("min_flow", "minimum continuous flow of the set's pump", keys=(
    Key("maker", "quantity", "the maker's minimum continuous stable flow (governs)",
        kind="flow", low=0.0, low_inclusive=False),
    Key("pump_class", "choice", "class for the estimate as a fraction of BEP flow when the "
        "maker's value is not given", choices=_pump_classes, default="general"),
    Key("note", "text", "free text"),
))

RECIRCULATION = Table("recirculation", "the recirculation line that keeps the minimum flow: "
                      "its bore at the restriction orifice and where it returns", keys=(
    Key("bore", "quantity", "bore of the recirculation line at the orifice", kind="diameter",
        required=True, low=0.0, low_inclusive=False, high=2.0),
    Key("static_head", "quantity", "height of the return point above the source surface",
        kind="head", default="0 m", low=-1000.0, high=10000.0),
    Key("taps", "choice", "orifice pressure taps for the discharge coefficient",
        choices=("flange", "corner", "D"), default="flange"),
    Key("note", "text", "free text"),
))

VISCOUS = Table("viscous", "correct the water-performance curves for the liquid's viscosity "
                "(ANSI/HI 9.6.7)", keys=(
    Key("correct", "bool", "true corrects every candidate's curve at the lowest liquid "
        "temperature (highest viscosity)", default=False),
    Key("stages", "integer", "number of stages of the candidates (B uses head per stage)",
        default=1, low=1, high=50),
    Key("note", "text", "free text"),
))

ROOT = Table("pump_selection", "A pump_selection scenario: candidate pumps against the system "
             "band of levels, temperatures and pipe age.", keys=TOP_KEYS + (
    Key("pump_elevation", "quantity", "pump centreline elevation (NPSH datum); default the "
        "discharge line's start elevation", kind="elevation"),
    PROJECT, SITE, DISPLAY, LIQUID,
    endpoint_table("source", "the liquid surface the pump draws from"),
    endpoint_table("destination", "the liquid surface the pump delivers to"),
    Table("suction", "the suction line, source to pump", keys=LINE),
    Table("discharge", "the discharge line, pump to destination", keys=LINE, required=True),
    DUTY, OPERATION, INTEGRITY, PUMP_SET, DRIVE, STAGING, LOAD_PROFILE, MIN_FLOW,
    RECIRCULATION, VISCOUS,
    Tables("pumps", PUMP, "candidate pumps ([[pumps]] blocks)", required=True, min_items=1,
           max_items=20),
))
