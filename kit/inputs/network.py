"""Reader of ``network`` scenarios: the typed inputs of a network study.

:func:`inputs` maps a checked ``network`` scenario (:data:`kit.inputs.network_schema.ROOT`)
to core objects in SI — the :class:`~kit.core.network_model.Node` and
:class:`~kit.core.network_model.Boundary` objects, the links (pipes as
:class:`~kit.core.line.Segment` runs with their fittings, pumps as
:class:`~kit.core.pump.PumpCurve` / :class:`~kit.core.pump.PumpSet`, valves by their Kv), the
control valves' sizing data, the band of conditions and the options of the curve, the checks
and the integrity screen. :meth:`NetworkInputs.network` gives the core
:class:`~kit.core.network_model.Network` for one band condition (pipe age, liquid
temperature; the boundary levels are chosen when solving, :meth:`NetworkInputs.levels`).

Errors are :class:`~kit.errors.ScenarioError` naming the key path (``link[3].length``,
0-based positions as every kind's paths).

Example
-------
>>> from kit.notebook import scenario_path
>>> from kit import scenario as scn
>>> inp = inputs(scn.load(scenario_path("fenwick_yard_chilled_water.toml")))
>>> len(inp.nodes), len(inp.links), sorted(inp.valves)[:2]
(27, 32, ['TV-1', 'TV-2'])
>>> round(inp.balancing["BV-2"] * 3600, 3)
11.0
"""

from __future__ import annotations

import re
from dataclasses import dataclass, field

from kit.errors import DimensionError, HeadlineError, ScenarioError
from kit.inputs.common import (
    IntegrityOptions,
    build_integrity,
    build_liquid,
    build_segment,
    build_site,
    build_temperatures,
    quantity,
)
from kit.inputs.network_schema import KIND, ROOT

__all__ = ["NetworkInputs", "ValveSpec", "BalancingSpec", "PumpSpec", "BandSpec", "CurveSpec",
           "inputs", "read", "with_doc"]


@dataclass(frozen=True)
class ValveSpec:
    """A control valve's data for sizing (SI; Kv in m³/h).

    ``given_as`` is ``"kv"`` or ``"cv"`` (how the file gave the rated coefficient);
    ``circuit`` the links named as its controlled circuit, or None (then the links in series
    with it are taken).
    """

    name: str
    kv_rated: float
    given_as: str
    characteristic: str
    rangeability: float
    FL: float
    Fd: float
    xFz: float | None
    opening: float
    flow_min: float | None
    flow_max: float | None
    diameter: float | None
    circuit: tuple | None


@dataclass(frozen=True)
class BalancingSpec:
    """A balancing valve: fully open Kv, its setting (Kv) or the design flow to balance to."""

    name: str
    kv_max: float
    kv: float | None
    design_flow: float | None
    given_as: str


@dataclass(frozen=True)
class PumpSpec:
    """A pump link's arrangement: running count, how joined, standby units."""

    name: str
    count: int
    arrangement: str
    standby: int


@dataclass(frozen=True)
class BandSpec:
    """The band of conditions and the design case."""

    levels: tuple
    conditions: tuple
    design_level: str
    design_condition: str
    design_temperature: str


@dataclass(frozen=True)
class CurveSpec:
    """Options of the network curve: the pump link, the highest flow, the number of flows."""

    pump: str | None
    flow_max: float | None
    points: int


@dataclass(frozen=True)
class NetworkInputs:
    """A network scenario read into core objects (SI; pressures absolute).

    ``links`` hold the pipes at the condition each pipe's table gives and balancing valves to
    be balanced at their fully open Kv; :meth:`network` returns the core network for a band
    condition with settings applied.
    """

    title: str
    liquid: object
    T_min: float
    T_max: float
    p_baro: float
    nodes: tuple
    boundaries: tuple
    links: tuple
    valves: dict
    balancing_valves: dict
    pumps: dict
    band: BandSpec
    curve: CurveSpec
    duty: str
    pipe_duty: dict
    vapour_margin: float
    integrity: IntegrityOptions = IntegrityOptions()
    positions: dict = field(default_factory=dict)

    @property
    def balancing(self) -> dict:
        """Balancing valves the study balances: name → design flow [m³/s]."""
        return {k: b.design_flow for k, b in self.balancing_valves.items()
                if b.design_flow is not None}

    def temperature(self, which: str) -> float:
        """'min' or 'max' of the liquid band [K]."""
        if which not in ("min", "max"):
            from kit.errors import UnknownChoiceError

            raise UnknownChoiceError("temperature", which, ("min", "max"))
        return self.T_min if which == "min" else self.T_max

    @property
    def design_T(self) -> float:
        return self.temperature(self.band.design_temperature)

    @property
    def temperatures(self) -> tuple:
        """Temperatures of the band [K] (one where min = max)."""
        return (self.T_min,) if self.T_min == self.T_max else (self.T_min, self.T_max)

    @property
    def p_state(self) -> float:
        """Pressure the liquid's properties are taken at: the highest boundary surface
        pressure, at least barometric [Pa abs]."""
        return max([self.p_baro] + [b.pressure for b in self.boundaries])

    def state(self, T: float | None = None):
        """The liquid state at ``T`` (default the design temperature)."""
        T = self.design_T if T is None else T
        return self.liquid.state(T, self.p_state)

    @staticmethod
    def levels(which: str) -> str:
        """Boundary levels for :meth:`kit.core.network_model.Network.solve` ('low'/'high')."""
        from kit.errors import check_choice

        check_choice("boundary levels", which, ("low", "high"))
        return which

    def network(self, condition: str | None = None, T: float | None = None,
                settings: dict | None = None):
        """The core network at a pipe ``condition`` ('new', 'aged', or None: as each pipe
        table says), liquid temperature ``T`` [K] (default the design one), with balancing
        valve ``settings`` {name: Kv [m³/h]} applied (default: as read).

        >>> from kit.notebook import scenario_path
        >>> from kit import scenario as scn
        >>> inp = inputs(scn.load(scenario_path("hollin_reach_ring_main.toml")))
        >>> net = inp.network("aged", inp.T_max)
        >>> round(net.link("ring A-B").segment.pipe.roughness * 1e3, 3), net.state.T
        (0.4, 298.15)
        """
        from dataclasses import replace as dc_replace

        from kit.core.network_model import BalancingValveLink, Network

        links = self.links
        if settings:
            unknown = set(settings) - set(self.balancing_valves)
            if unknown:
                from kit.errors import UnknownChoiceError

                raise UnknownChoiceError("balancing valve", sorted(unknown)[0],
                                         sorted(self.balancing_valves))
            links = tuple(dc_replace(k, kv=float(settings[k.name]))
                          if isinstance(k, BalancingValveLink) and k.name in settings else k
                          for k in links)
        try:
            net = Network(self.title or "network", self.nodes, self.boundaries, links,
                          self.state(T), self.p_baro)
            return net if condition is None else net.with_condition(condition)
        except HeadlineError as exc:
            raise _located(exc, self.positions) from None


def _located(exc: HeadlineError, positions: dict) -> ScenarioError:
    """A core error on the network, re-raised naming the scenario key it came from."""
    fld = str(getattr(exc, "field", ""))
    text = str(exc)
    m = re.search(r"of (?:link|control valve|balancing valve|check valve|equipment) '([^']+)'", fld)
    if m and m.group(1) in positions.get("link", {}):
        i = positions["link"][m.group(1)]
        sub = {"length": "length", "rise": "length", "to node": "to", "from node": "from",
               "rated Kv": "kv", "Kv": "kv", "opening": "opening"}
        for start, key in sub.items():
            if fld.startswith(start):
                return ScenarioError(f"link[{i}].{key}", text)
        return ScenarioError(f"link[{i}]", text)
    m = re.search(r"nodes? '([^']+)'", fld) or re.search(r"node '([^']+)'", text)
    if m:
        for table in ("node", "boundary"):
            if m.group(1) in positions.get(table, {}):
                return ScenarioError(f"{table}[{positions[table][m.group(1)]}]", text)
    return ScenarioError("link", text)


def _bal_kv(sec: dict, key: str, which: str) -> tuple[float, str]:
    from kit.core.valves import cv_to_kv

    if which in sec:
        return float(sec[which]), "kv"
    cv = sec["cv_max" if which == "kv_max" else "cv"]
    try:
        return float(cv_to_kv(cv)), "cv"
    except HeadlineError as exc:
        raise ScenarioError(f"{key}.{'cv_max' if which == 'kv_max' else 'cv'}", str(exc)) \
            from None


def _pump(sec: dict, key: str):
    from kit.inputs.pump_selection import build_pump

    count = sec.get("count", 1)
    doc = {k: sec[k] for k in ("name", "speed", "impeller", "flow", "head", "efficiency",
                               "npshr", "power", "run_speed", "trim") if k in sec}
    doc["count"] = count
    doc["arrangement"] = "single" if count == 1 else sec.get("arrangement")
    return build_pump(doc, key), PumpSpec(sec["name"], count, doc["arrangement"],
                                          sec.get("standby", 0))


def _link(sec: dict, key: str, rho: float):
    """One ``[[link]]`` table as a core link (+ its valve / pump spec)."""
    from kit.core import network_model as nm
    from kit.core.valves import cv_to_kv

    typ = sec.get("type")
    name, a, b = sec.get("name"), sec.get("from"), sec.get("to")
    dia = sec.get("diameter")
    dia = None if dia is None else quantity(sec, "diameter", "diameter", prefix=f"{key}.")
    try:
        if typ == "pipe":
            seg = build_segment(sec, key)
            return nm.PipeLink(name, a, b, seg, bool(sec.get("check", False))), None
        if typ == "pump":
            pump, spec = _pump(sec, key)
            return nm.PumpLink(name, a, b, pump), spec
        if typ == "check_valve":
            kv = float(sec["kv"]) if "kv" in sec else float(cv_to_kv(sec["cv"]))
            return nm.CheckValveLink(name, a, b, kv, dia), None
        if typ == "control_valve":
            given = "kv" if "kv" in sec else "cv"
            kv = float(sec["kv"]) if given == "kv" else float(cv_to_kv(sec["cv"]))
            opening = quantity(sec, "opening", "fraction", default=1.0, prefix=f"{key}.")
            fmin = sec.get("flow_min")
            fmax = sec.get("flow_max")
            fmin = None if fmin is None else quantity(sec, "flow_min", "flow", prefix=f"{key}.")
            fmax = None if fmax is None else quantity(sec, "flow_max", "flow", prefix=f"{key}.")
            if fmin is not None and fmax is not None and fmax <= fmin:
                raise ScenarioError(f"{key}.flow_max", "must be above flow_min")
            char = sec.get("characteristic", "equal_percentage")
            R = float(sec.get("rangeability", 50.0))
            circuit = sec.get("circuit")
            spec = ValveSpec(name, kv, given, char, R, float(sec.get("FL", 0.9)),
                             float(sec.get("Fd", 1.0)),
                             None if sec.get("xFz") is None else float(sec.get("xFz")),
                             opening, fmin, fmax, dia,
                             None if circuit is None else tuple(circuit))
            return nm.ControlValveLink(name, a, b, kv, opening, char, R, dia), spec
        if typ == "balancing_valve":
            kv_max, given = _bal_kv(sec, key, "kv_max")
            setting = None
            if "kv" in sec or "cv" in sec:
                setting, _ = _bal_kv(sec, key, "kv")
                if setting > kv_max:
                    k = "kv" if "kv" in sec else "cv"
                    raise ScenarioError(f"{key}.{k}", f"is above the fully open value "
                                        f"({k}_max); a setting cannot pass more than the valve "
                                        "fully open")
            q = sec.get("design_flow")
            q = None if q is None else quantity(sec, "design_flow", "flow", prefix=f"{key}.")
            spec = BalancingSpec(name, kv_max, setting, q, given)
            link = nm.BalancingValveLink(name, a, b, kv_max if setting is None else setting,
                                         kv_max, dia)
            return link, spec
        if typ == "equipment":
            if "rated_flow" in sec:
                from kit.core.valves import RHO0

                q = quantity(sec, "rated_flow", "flow", prefix=f"{key}.")
                dp = quantity(sec, "rated_dp", "pressure_difference", prefix=f"{key}.")
                kv = q * 3600.0 * (rho / RHO0 / (dp / 1e5)) ** 0.5
            else:
                kv = float(sec["kv"]) if "kv" in sec else float(cv_to_kv(sec["cv"]))
            return nm.EquipmentLink(name, a, b, kv, dia), None
    except ScenarioError:
        raise
    except (HeadlineError, DimensionError) as exc:
        raise ScenarioError(key, str(exc)) from None
    raise ScenarioError(f"{key}.type", f"must be one of pipe, pump, check_valve, "
                        f"control_valve, balancing_valve, equipment, not {typ!r}")


def inputs(sc) -> NetworkInputs:
    """The typed inputs of a ``network`` scenario (built once, cached on it).

    The document is checked against the schema again (a document edited in memory is never
    trusted; one that :func:`with_doc` has just checked is not checked twice), then mapped
    to core objects; the design network is built once so that a
    network the core refuses (a pipe shorter than the rise of its ends, nodes with no path to
    a fixed head) is refused here, naming the key.
    """
    from kit.core.network_model import Boundary, Node
    from kit.inputs.schema import check

    if "network_inputs" in sc._built:
        return sc._built["network_inputs"]
    doc = sc.doc
    if doc.get("kind") != KIND:
        raise ScenarioError("kind", f"must be {KIND!r} for a network study, not "
                            f"{doc.get('kind')!r}")
    p_baro = build_site(doc)
    if not sc._built.pop("checked", False):   # with_doc has just checked this document
        check(doc, ROOT, None, p_baro)
    liquid = build_liquid(doc)
    T_min, T_max = build_temperatures(doc)
    positions: dict = {"node": {}, "boundary": {}, "link": {}}
    nodes = []
    for i, n in enumerate(doc.get("node", [])):
        key = f"node[{i}]"
        pmin = n.get("min_pressure")
        pmin = None if pmin is None else quantity(n, "min_pressure", "pressure",
                                                  p_baro=p_baro, prefix=f"{key}.")
        try:
            nodes.append(Node(n["name"], quantity(n, "elevation", "elevation",
                                                  prefix=f"{key}."),
                              quantity(n, "demand", "flow", default=0.0, prefix=f"{key}."),
                              pmin))
        except HeadlineError as exc:
            raise ScenarioError(key, str(exc)) from None
        positions["node"][n["name"]] = i
    bnds = []
    for i, b in enumerate(doc.get("boundary", [])):
        key = f"boundary[{i}]"
        if "level" in b:
            lo = hi = quantity(b, "level", "elevation", prefix=f"{key}.")
        else:
            lo = quantity(b, "level_low", "elevation", prefix=f"{key}.")
            hi = quantity(b, "level_high", "elevation", prefix=f"{key}.")
            if hi < lo:
                raise ScenarioError(f"{key}.level_high", "must not be below level_low")
        p = quantity(b, "pressure", "pressure", default=p_baro, p_baro=p_baro,
                     prefix=f"{key}.")
        try:
            bnds.append(Boundary(b["name"], lo, hi, p))
        except HeadlineError as exc:
            raise ScenarioError(key, str(exc)) from None
        positions["boundary"][b["name"]] = i
    links, valves, bal, pumps, pipe_duty = [], {}, {}, {}, {}
    p_state = max([p_baro] + [b.pressure for b in bnds])
    T_design = T_min if doc.get("band", {}).get("design_temperature", "min") == "min" else T_max
    try:
        rho_d = liquid.state(T_design, p_state).rho
    except HeadlineError as exc:
        raise ScenarioError("liquid", str(exc)) from None
    for i, sec in enumerate(doc.get("link", [])):
        key = f"link[{i}]"
        link, spec = _link(sec, key, rho_d)
        links.append(link)
        positions["link"][link.name] = i
        if isinstance(spec, ValveSpec):
            valves[link.name] = spec
        elif isinstance(spec, BalancingSpec):
            bal[link.name] = spec
        elif isinstance(spec, PumpSpec):
            pumps[link.name] = spec
        if "duty" in sec:
            pipe_duty[link.name] = sec["duty"]
    band = doc.get("band", {})
    both = {"both": ("low", "high"), "low": ("low",), "high": ("high",)}
    bspec = BandSpec(both[band.get("levels", "both")],
                     {"both": ("new", "aged"), "new": ("new",), "aged": ("aged",)}[
                         band.get("pipe_condition", "both")],
                     band.get("design_level", "low"), band.get("design_pipe_condition", "new"),
                     band.get("design_temperature", "min"))
    cur = doc.get("curve", {})
    fmax = cur.get("flow_max")
    cspec = CurveSpec(cur.get("pump"), None if fmax is None else quantity(
        cur, "flow_max", "flow", prefix="curve."), cur.get("points", 41))
    crit = doc.get("criteria", {})
    margin = quantity(crit, "vapour_margin", "head", default=2.0, prefix="criteria.")
    inp = NetworkInputs(doc.get("title", "network"), liquid, T_min, T_max, p_baro,
                        tuple(nodes), tuple(bnds), tuple(links), valves, bal, pumps, bspec,
                        cspec, crit.get("duty", "general_transfer"), pipe_duty, margin,
                        build_integrity(doc), positions)
    for T in inp.temperatures:  # the liquid must hold at every temperature of the band
        try:
            inp.state(T)
        except HeadlineError as exc:
            raise ScenarioError("liquid", str(exc)) from None
    inp.network()  # refuse what the core refuses, naming the key
    for name, v in valves.items():
        if v.circuit is not None:
            i = positions["link"][name]
            for j, other in enumerate(v.circuit):
                if other not in positions["link"]:
                    raise ScenarioError(f"link[{i}].circuit[{j}]", f"names {other!r}, which "
                                        "is no link")
    sc._built["network_inputs"] = inp
    return inp


#: The name the other kinds use for their reader.
read = inputs


def with_doc(sc, doc: dict):
    """A new scenario holding ``doc``, checked against the network schema (strict)."""
    from kit.inputs.schema import check
    from kit.scenario import Scenario

    check(doc, ROOT, sc.source, build_site(doc))
    out = Scenario(doc, sc.source, text=sc.text)
    out._built["checked"] = True     # inputs() need not check it again (the mark is used once)
    return out
