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

__all__ = ["PumpInputs", "DutiesInputs", "read", "build_pump", "build_pumps", "build_system",
           "build_duties", "PUMP_KEYS", "ARRANGEMENTS", "with_temperatures", "with_pump",
           "with_doc", "with_load_profile"]

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
    #: the set, drive, staging, load profile, minimum flow and viscosity inputs (None when
    #: the scenario gives none of those tables)
    duties: DutiesInputs | None = None


@dataclass(frozen=True)
class DutiesInputs:
    """The ``[pump_set]``, ``[drive]``, ``[staging]``, ``[load_profile]``, ``[min_flow]``,
    ``[recirculation]`` and ``[viscous]`` tables in SI.

    ``units`` are candidate names, duty units first (None: the recommended candidate, one
    duty unit); ``speed_ratio`` is the drive's (min, max) speed as ratios to the datasheet
    speed, or None; ``profile`` is ((flow [m³/s], hours [h]), ...) or None; ``control`` one of
    :data:`kit.inputs.pump_selection_schema.CONTROLS` with ``set_head`` / ``design_flow`` /
    ``design_head`` [m, m³/s, m]; ``min_flow_maker`` [m³/s] or None; ``recirculation`` is
    (bore [m], static head [m], taps) or None.

    >>> DutiesInputs().strategy
    'all_vfd'
    """

    units: tuple | None = None
    unit_index: tuple | None = None   # index of each unit's candidate in [[pumps]]
    duty_count: int = 1
    unlike: bool = False
    speed: tuple | None = None        # (min speed, max speed) [rpm], or None
    frequency: tuple | None = None    # (min, max, rated) [rpm-equivalent], or None
    strategy: str = "all_vfd"
    basis: str = "pressure"
    stage_up_flows: tuple | None = None
    hysteresis: float = 0.10
    control: str = "system_curve"
    set_head: float | None = None
    design_flow: float | None = None
    design_head: float | None = None
    profile: tuple | None = None
    min_flow_given: bool = False
    min_flow_maker: float | None = None
    pump_class: str = "general"
    recirculation: tuple | None = None
    viscous: bool = False
    stages: int = 1
    #: a staging study is asked for ([pump_set], [drive], [staging] or [load_profile] given)
    staging_given: bool = False

    def speed_ratios(self, datasheet_rpm: float) -> tuple[float, float] | None:
        """The drive's (min, max) speed as ratios to ``datasheet_rpm`` [-], or None.

        >>> DutiesInputs(speed=(600.0, 1500.0)).speed_ratios(1500.0)
        (0.4, 1.0)
        """
        if self.speed is not None:
            lo, hi = self.speed
            return (lo / datasheet_rpm if lo is not None else None,
                    hi / datasheet_rpm if hi is not None else None)
        if self.frequency is not None:
            lo, hi, rated = self.frequency
            return (lo / rated if lo is not None else None,
                    hi / rated if hi is not None else None)
        return None


_DUTY_TABLES = ("pump_set", "drive", "staging", "load_profile", "min_flow", "recirculation",
                "viscous")


def build_duties(doc: dict, names) -> DutiesInputs | None:
    """The duties inputs of a checked document (None when it gives none of their tables).

    ``names`` are the candidates' names as written (the ``name`` key of each ``[[pumps]]``
    table, or the built name); a unit naming no candidate is a
    :class:`ScenarioError` that lists them, and so are unlike units without ``unlike = true``.
    """
    if not any(t in doc for t in _DUTY_TABLES):
        return None
    names = list(names)
    ps_ = doc.get("pump_set") or {}
    units_ = None
    duty_count = int(ps_.get("duty_count", 1))
    unlike = bool(ps_.get("unlike", False))
    if "units" in ps_:
        units_ = tuple(str(u) for u in ps_.get("units"))
        where = "pump_set.units"
    elif "pump" in ps_:
        units_ = (str(ps_.get("pump")),) * (duty_count + int(ps_.get("standby_count", 0)))
        where = "pump_set.pump"
    index = None
    if units_ is not None:
        for i, u in enumerate(units_):
            if u not in names:
                key = f"{where}[{i}]" if where.endswith("units") else where
                raise ScenarioError(key, f"names no candidate pump: {u!r} (candidates: "
                                    f"{', '.join(repr(n) for n in names)})")
        index = tuple(names.index(u) for u in units_)
        if len(set(units_)) > 1 and not unlike:
            raise ScenarioError("pump_set.unlike", f"must be true for units of different "
                                f"pumps ({', '.join(sorted(set(units_)))}): unlike pumps in "
                                "parallel need their own check valves and a dead-heading check")
    dr = doc.get("drive") or {}
    speed = freq = None
    if "min_speed" in dr or "max_speed" in dr:
        speed = tuple(quantity(dr, k, "speed", prefix="drive.") if k in dr else None
                      for k in ("min_speed", "max_speed"))
        if None not in speed and speed[1] <= speed[0]:
            raise ScenarioError("drive.max_speed", f"must be above min_speed "
                                f"({dr.get('min_speed')}), not {dr.get('max_speed')}")
    elif "rated_frequency" in dr:
        freq = tuple(quantity(dr, k, "speed", prefix="drive.") if k in dr else None
                     for k in ("min_frequency", "max_frequency", "rated_frequency"))
        if None not in freq[:2] and freq[1] <= freq[0]:
            raise ScenarioError("drive.max_frequency", f"must be above min_frequency "
                                f"({dr.get('min_frequency')}), not {dr.get('max_frequency')}")
    st = doc.get("staging") or {}
    up = _list(st, "stage_up_flows", "staging.", required=False)
    if up is not None and any(b <= a for a, b in zip(up, up[1:], strict=False)):
        raise ScenarioError("staging.stage_up_flows", "must rise from one step to the next")
    lp = doc.get("load_profile")
    profile = None
    if lp is not None:
        q = _list(lp, "flow", "load_profile.")
        t = [h / 3600.0 for h in _list(lp, "hours", "load_profile.")]
        if len(set(q)) != len(q):
            raise ScenarioError("load_profile.flow", "must not repeat a flow (merge the hours "
                                "of equal flows)")
        if sum(t) > 8784.0:
            raise ScenarioError("load_profile.hours", f"must total at most 8784 h a year, not "
                                f"{sum(t):.6g} h")
        profile = tuple(zip(q, t, strict=True))
    mf = doc.get("min_flow")
    rc = doc.get("recirculation")
    recirc = None
    if rc is not None:
        recirc = (quantity(rc, "bore", "diameter", prefix="recirculation."),
                  quantity(rc, "static_head", "head", default=0.0, prefix="recirculation."),
                  rc.get("taps", "flange"))
    vs = doc.get("viscous") or {}
    return DutiesInputs(
        units_, index, duty_count, unlike, speed, freq, st.get("strategy", "all_vfd"),
        st.get("basis", "pressure"), None if up is None else tuple(up),
        quantity(st, "hysteresis", "fraction", default=0.10, prefix="staging."),
        st.get("control", "system_curve"),
        quantity(st, "set_head", "head", prefix="staging.") if "set_head" in st else None,
        quantity(st, "design_flow", "flow", prefix="staging.") if "design_flow" in st else None,
        quantity(st, "design_head", "head", prefix="staging.") if "design_head" in st else None,
        profile, mf is not None,
        quantity(mf, "maker", "flow", prefix="min_flow.") if mf and "maker" in mf else None,
        (mf or {}).get("pump_class", "general"), recirc, bool(vs.get("correct", False)),
        int(vs.get("stages", 1)),
        any(t in doc for t in ("pump_set", "drive", "staging", "load_profile")))


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
    pumps = tuple(build_pumps(sc))
    inp = PumpInputs(build_system(sc), pumps, q_req,
                     duty.get("npsh_application", "general"), hours,
                     float(op.get("tariff", 0.0)), str(op.get("currency", "")),
                     op.get("motor_series", "IEC"), build_integrity(doc),
                     build_duties(doc, [str(t.get("name") or p.name) for t, p in
                                        zip(doc.get("pumps"), pumps, strict=True)]))
    sc._built["inputs"] = inp
    return inp


_LIST_KIND = {"flow": "flow", "head": "head", "efficiency": "fraction", "npshr": "head",
              "power": "power", "stage_up_flows": "flow", "hours": "time"}
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


def with_load_profile(sc, flows, hours):
    """The scenario with ``[load_profile]`` set to the texts ``flows`` and ``hours`` (lists of
    strings with units, one per step), checked against the schema.

    >>> from kit.notebook import open_scenario
    >>> sc = with_load_profile(open_scenario("kestrel_ridge_booster.toml"), ["100 m3/h"],
    ...                        ["2000 h"])
    >>> sc.doc["load_profile"]["hours"]
    ['2000 h']
    """
    import copy

    doc = copy.deepcopy(sc.doc)
    lp = doc.setdefault("load_profile", {})
    lp["flow"] = [str(f) for f in flows]
    lp["hours"] = [str(h) for h in hours]
    return with_doc(sc, doc)
