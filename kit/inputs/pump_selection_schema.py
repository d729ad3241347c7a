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

__all__ = ["ROOT", "PUMP", "DUTY", "OPERATION", "ARRANGEMENTS"]

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

ROOT = Table("pump_selection", "A pump_selection scenario: candidate pumps against the system "
             "band of levels, temperatures and pipe age.", keys=TOP_KEYS + (
    Key("pump_elevation", "quantity", "pump centreline elevation (NPSH datum); default the "
        "discharge line's start elevation", kind="elevation"),
    PROJECT, SITE, DISPLAY, LIQUID,
    endpoint_table("source", "the liquid surface the pump draws from"),
    endpoint_table("destination", "the liquid surface the pump delivers to"),
    Table("suction", "the suction line, source to pump", keys=LINE),
    Table("discharge", "the discharge line, pump to destination", keys=LINE, required=True),
    DUTY, OPERATION, INTEGRITY,
    Tables("pumps", PUMP, "candidate pumps ([[pumps]] blocks)", required=True, min_items=1,
           max_items=20),
))
