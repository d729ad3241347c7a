"""Reader and writer of ``pump_selection`` scenarios: the typed inputs of a pump study.

:func:`read` checks nothing twice: the scenario was checked against
:data:`kit.inputs.pump_selection_schema.ROOT` when it was loaded, so reading maps checked text
to core objects (SI) — the :class:`~kit.core.system.System`, the candidate pumps
(:class:`~kit.core.pump.PumpCurve` / :class:`~kit.core.pump.PumpSet`), the duty and the
operation. The writers (:func:`with_temperatures`, :func:`with_pump`) return a new scenario
with the edited text, checked against the same schema, so an app never edits a document.

Example
-------
>>> from kit.notebook import scenario_path
>>> from kit import scenario as scn
>>> inp = read(scn.load(scenario_path("kestrel_ridge_booster.toml")))
>>> len(inp.pumps), round(inp.required_flow * 3600, 3), inp.npsh_application
(3, 140.0, 'water_wastewater')
"""

from __future__ import annotations

import re
from dataclasses import dataclass

from kit import units
from kit.errors import DimensionError, HeadlineError, InputError, ScenarioError
from kit.inputs.common import (
    IntegrityOptions,
    _err,
    build_endpoint,
    build_integrity,
    build_line,
    build_liquid,
    build_site,
    build_temperatures,
    get,
    quantity,
)
from kit.inputs.pump_selection_schema import ARRANGEMENTS, PUMP, ROOT

__all__ = ["PumpInputs", "read", "build_pump", "build_pumps", "build_system", "PUMP_KEYS",
           "ARRANGEMENTS", "with_temperatures", "with_pump", "with_doc"]

#: Keys a ``[[pumps]]`` table may hold (from the schema).
PUMP_KEYS = PUMP.names


@dataclass(frozen=True)
class PumpInputs:
    """A pump-selection scenario read into core objects (SI).

    ``hours`` is the running time per year [h]; ``tariff`` the energy price per kWh in
    ``currency``; ``required_flow`` [m³/s] or None.
    """

    system: object
    pumps: tuple
    required_flow: float | None
    npsh_application: str
    hours: float
    tariff: float
    currency: str
    motor_series: str
    integrity: IntegrityOptions = IntegrityOptions()


def read(sc) -> PumpInputs:
    """The typed inputs of a ``pump_selection`` scenario (built once, cached on it)."""
    from kit.inputs.schema import check

    if "inputs" in sc._built:
        return sc._built["inputs"]
    doc = sc.doc
    check(doc, ROOT, None, build_site(doc))  # a document edited in memory is checked too
    duty = doc.get("duty", {})
    op = doc.get("operation", {})
    q_req = quantity(duty, "flow", "flow", prefix="duty.") if "flow" in duty else None
    hours = quantity(op, "hours_per_year", "time", default=0.0, prefix="operation.") / 3600.0
    inp = PumpInputs(build_system(sc), tuple(build_pumps(sc)), q_req,
                     duty.get("npsh_application", "general"), hours,
                     float(op.get("tariff", 0.0)), str(op.get("currency", "")),
                     op.get("motor_series", "IEC"), build_integrity(doc))
    sc._built["inputs"] = inp
    return inp


_LIST_KIND = {"flow": "flow", "head": "head", "efficiency": "fraction", "npshr": "head",
              "power": "power"}
#: The first words of a PumpCurve error's field -> the scenario key it came from.
_FIELD_KEY = (("flow of pump", "flow"), ("head of pump", "head"),
              ("efficiency of pump", "efficiency"), ("NPSHr of pump", "npshr"),
              ("power of pump", "power"), ("speed of pump", "speed"),
              ("impeller diameter", "impeller"), ("trimmed impeller", "trim"))


def _list(sec: dict, key: str, prefix: str, required: bool = True):
    vals = sec.get(key)
    if vals is None:
        if required:
            raise ScenarioError(f"{prefix}{key}", "is missing (a list of values with units)")
        return None
    if not isinstance(vals, list):
        raise ScenarioError(f"{prefix}{key}", "must be a list of values with units")
    out = []
    for i, v in enumerate(vals):
        try:
            out.append(units.parse(v, _LIST_KIND[key], f"{prefix}{key}[{i}]"))
        except (HeadlineError, DimensionError) as exc:
            raise ScenarioError(f"{prefix}{key}[{i}]", str(exc)) from None
    return out


def _key_of(exc: InputError, key: str) -> str:
    """The scenario key a PumpCurve error points at: 'pumps[0].head[2]' for 'point 3'."""
    fld = str(getattr(exc, "field", ""))
    for start, sub in _FIELD_KEY:
        if fld.startswith(start):
            m = re.search(r"point (\d+)", fld)
            return f"{key}.{sub}" + (f"[{int(m.group(1)) - 1}]" if m else "")
    return key


def build_pump(sec: dict, key: str):
    """One datasheet pump (and its arrangement) from a ``[[pumps]]`` table.

    Returns a :class:`kit.core.pump.PumpCurve`, or a :class:`kit.core.pump.PumpSet` for
    ``count`` > 1 pumps in parallel or series. Errors are :class:`ScenarioError` naming the
    key (``pumps[1].head[2]``).
    """
    from kit.core.pump import PumpCurve, parallel, series
    from kit.inputs.schema import check

    check(sec, PUMP, path=key)  # the schema's rules: keys, types, counts, list lengths
    name = str(sec.get("name") or key)
    arrangement = sec.get("arrangement", "single")
    count = sec.get("count", 1)
    Q = _list(sec, "flow", f"{key}.")
    H = _list(sec, "head", f"{key}.")
    eta = _list(sec, "efficiency", f"{key}.", required=False)
    npshr = _list(sec, "npshr", f"{key}.", required=False)
    power = _list(sec, "power", f"{key}.", required=False)
    speed = quantity(sec, "speed", "speed", prefix=f"{key}.")
    dia = quantity(sec, "impeller", "diameter", prefix=f"{key}.")
    try:
        pump = PumpCurve(Q, H, speed_rpm=speed, diameter=dia, efficiency=eta, npshr=npshr,
                         power=power, name=name)
        if "run_speed" in sec:
            pump = pump.at_speed(quantity(sec, "run_speed", "speed", prefix=f"{key}."))
        if "trim" in sec:
            pump = pump.trimmed(quantity(sec, "trim", "diameter", prefix=f"{key}."))
        if arrangement == "single":
            return pump
        combine = parallel if arrangement == "parallel" else series
        return combine([pump] * count, name=f"{count} × {name} in {arrangement}")
    except ScenarioError:
        raise
    except InputError as exc:
        raise ScenarioError(_key_of(exc, key), str(exc)) from None
    except HeadlineError as exc:
        raise ScenarioError(key, str(exc)) from None


def build_pumps(sc) -> list:
    """Every candidate of ``[[pumps]]`` (names must differ)."""
    pumps = sc.doc.get("pumps")
    if not pumps or not isinstance(pumps, list):
        raise ScenarioError("pumps", "must list at least one candidate pump ([[pumps]] tables)")
    out = [build_pump(p, f"pumps[{i}]") for i, p in enumerate(pumps)]
    seen = set()
    for i, p in enumerate(out):
        if p.name in seen:
            raise ScenarioError(f"pumps[{i}].name", f"repeats the name {p.name!r}; names must "
                                "differ")
        seen.add(p.name)
    return out


def build_system(sc):
    """The :class:`~kit.core.system.System` of a scenario (cached on the scenario)."""
    from kit.core.system import System

    if "system" in sc._built:
        return sc._built["system"]
    doc = sc.doc
    p_baro = build_site(doc)
    liquid = build_liquid(doc)
    T_min, T_max = build_temperatures(doc)
    src = build_endpoint(doc, "source", p_baro)
    dst = build_endpoint(doc, "destination", p_baro)
    suction = build_line(doc, "suction")
    discharge = build_line(doc, "discharge")
    z_pump = get(doc, "pump_elevation")
    z_pump = None if z_pump is None else quantity(doc, "pump_elevation", "elevation")
    try:
        for T in {T_min, T_max}:
            liquid.state(T, max(src.pressure, p_baro))
        out = System(doc.get("title", "system"), src, dst, suction, discharge, liquid, T_min,
                     T_max, p_baro, z_pump)
    except HeadlineError as exc:
        raise _err("liquid", exc) from None
    sc._built["system"] = out
    return out


# ---------------------------------------------------------------- writers


def with_doc(sc, doc: dict):
    """A new scenario holding ``doc``, checked against the kind's schema (strict)."""
    from kit.inputs.schema import check
    from kit.scenario import Scenario

    p_baro = build_site(doc)
    check(doc, ROOT, sc.source, p_baro)
    return Scenario(doc, sc.source, text=sc.text)


def with_temperatures(sc, t_min: str, t_max: str):
    """The scenario with the liquid's temperature band set to the texts ``t_min``, ``t_max``."""
    import copy

    doc = copy.deepcopy(sc.doc)
    liq = doc.setdefault("liquid", {})
    if t_min == t_max and "temperature" in liq:
        liq["temperature"] = t_min
    else:
        liq.pop("temperature", None)
        liq["temperature_min"] = t_min
        liq["temperature_max"] = t_max
    return with_doc(sc, doc)


def with_pump(sc, index: int, pump_doc: dict):
    """The scenario with candidate ``index`` replaced by the table ``pump_doc``."""
    import copy

    doc = copy.deepcopy(sc.doc)
    doc["pumps"][index] = copy.deepcopy(dict(pump_doc))
    return with_doc(sc, doc)
