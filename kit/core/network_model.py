"""Pipe networks: nodes, fixed-head boundaries and links, with the checks made before a solve.

The model (names are ours):

- :class:`Node` — a junction at an elevation, with the flow drawn off there (its demand) and,
  optionally, the lowest absolute pressure it must keep (its minimum residual pressure).
- :class:`Boundary` — a fixed-head node: an open tank or a pressurised vessel, with a level
  range and the absolute pressure on its surface.
- Links, each from one node to another (the drawn direction; flow against it is negative):
  :class:`PipeLink` (an existing :class:`~kit.core.line.Segment`, optionally with a
  non-return valve), :class:`PumpLink` (a :class:`~kit.core.pump.PumpCurve` or
  :class:`~kit.core.pump.PumpSet`, non-return built in), :class:`CheckValveLink`,
  :class:`ControlValveLink` (rated Kv, inherent characteristic, opening),
  :class:`BalancingValveLink` (Kv at its setting) and :class:`EquipmentLink` (a coil, an
  evaporator, a heat exchanger: a fixed Kv).
- :class:`Network` — the nodes, boundaries and links with one liquid state; constructing it
  checks names, link ends and connectivity, and refuses a network that cannot have a solution
  (a node with no path to any fixed head, no fixed head at all).

Conventions (SI, as everywhere in ``kit.core``)
-----------------------------------------------
- Pressures are **absolute** [Pa], including a node's ``min_pressure``; gauge values are
  shown against the network's ``p_baro``.
- Heads are piezometric heads on the gauge basis [m of the flowing liquid]:
  ``H = z + (p − p_baro)/(ρ g)``, the hydraulic grade line. Velocity heads at junctions are
  not carried (the usual network simplification); each link's losses include its fittings.
- Valve flow coefficients are Kv [m³/h at 1 bar and the density of water ρ0]; convert a Cv
  with :func:`kit.core.valves.cv_to_kv`.

Example
-------
>>> from types import SimpleNamespace as NS
>>> from kit.core.line import Segment
>>> pipe = NS(Di=0.1023, area=0.0082196, roughness=4.5e-5, with_condition=lambda c: pipe)
>>> water = NS(rho=998.2, mu=1.002e-3, pv=2339.0, T=293.15)
>>> net = Network("demo", [Node("J1", 0.0, demand=0.01)], [Boundary("T1", 20.0)],
...               [PipeLink("P1", "T1", "J1", Segment("P1", pipe, 100.0))], water)
>>> net.node_names, net.boundary_names
(('J1',), ('T1',))
"""

from __future__ import annotations

from dataclasses import dataclass, replace
from functools import cached_property

import numpy as np

from kit.core.valves import (
    CHARACTERISTICS,
    KV_HEAD,
    RHO0,
    inherent_fraction,
    opening_for_fraction,
)
from kit.errors import InputError, OutOfRangeError, UnknownChoiceError, check_choice, check_range

__all__ = [
    "P_ATM", "RHO0", "KV_HEAD", "Node", "Boundary", "PipeLink", "PumpLink", "CheckValveLink",
    "ControlValveLink", "BalancingValveLink", "EquipmentLink", "Network", "CHARACTERISTICS",
    "inherent_fraction", "opening_for_fraction", "LINK_KINDS",
]

#: Standard atmosphere [Pa].
P_ATM = 101325.0

def _name(kind: str, name) -> str:
    if not isinstance(name, str) or not name.strip():
        raise InputError(f"name of {kind}", name, "must be a non-empty text")
    return name


@dataclass(frozen=True)
class Node:
    """A junction of the network.

    Parameters
    ----------
    name : str
        Unique among nodes and boundaries [-]
    elevation : float
        Elevation of the node (pipe centreline) [m]
    demand : float
        Flow drawn off at the node; negative for a fixed inflow (an injection) [m³/s]
    min_pressure : float or None
        Lowest absolute pressure the node must keep (minimum residual pressure); None where
        there is no requirement [Pa abs]

    Examples
    --------
    >>> Node("J1", 12.0, demand=0.005, min_pressure=101325.0 + 1.5e5).demand
    0.005
    """

    name: str
    elevation: float
    demand: float = 0.0
    min_pressure: float | None = None

    def __post_init__(self):
        _name("node", self.name)
        check_range(f"elevation of node '{self.name}'", self.elevation, "m", low=-1e4, high=1e4)
        check_range(f"demand of node '{self.name}'", self.demand, "m³/s", low=-100.0, high=100.0)
        if self.min_pressure is not None:
            check_range(f"minimum pressure of node '{self.name}'", self.min_pressure, "Pa",
                        low=0.0, high=1e8)


@dataclass(frozen=True)
class Boundary:
    """A fixed-head node: an open tank or a pressurised vessel.

    Parameters
    ----------
    name : str
        Unique among nodes and boundaries [-]
    level_low : float
        Lowest elevation of the liquid surface [m]
    level_high : float or None
        Highest elevation of the liquid surface; defaults to ``level_low`` [m]
    pressure : float
        Absolute pressure on the surface (atmospheric for an open tank) [Pa]

    Examples
    --------
    >>> Boundary("T1", 20.0, 24.0).level("high")
    24.0
    """

    name: str
    level_low: float
    level_high: float | None = None
    pressure: float = P_ATM

    def __post_init__(self):
        _name("boundary", self.name)
        check_range(f"low level of '{self.name}'", self.level_low, "m", low=-1e4, high=1e4)
        if self.level_high is None:
            object.__setattr__(self, "level_high", float(self.level_low))
        check_range(f"high level of '{self.name}'", self.level_high, "m", low=self.level_low,
                    high=1e4, low_inclusive=True)
        check_range(f"surface pressure of '{self.name}'", self.pressure, "Pa", low=0.0, high=1e8)

    @property
    def elevation(self) -> float:
        return float(self.level_low)

    def level(self, which) -> float:
        """Surface elevation for ``which`` = 'low', 'high' or a number in the range [m]."""
        if isinstance(which, str):
            check_choice(f"level of '{self.name}'", which, ("low", "high"))
            return float(self.level_low if which == "low" else self.level_high)
        return check_range(f"level of '{self.name}'", which, "m", low=self.level_low,
                           high=self.level_high, low_inclusive=True)


@dataclass(frozen=True)
class _Link:
    name: str
    from_node: str
    to_node: str

    kind = "link"
    check = False

    def _check_ends(self):
        _name(self.kind, self.name)
        for end in ("from_node", "to_node"):
            _name(f"{end.replace('_', ' ')} of link '{self.name}'", getattr(self, end))
        if self.from_node == self.to_node:
            raise InputError(f"to node of link '{self.name}'", self.to_node,
                             "must differ from its from node")

    @property
    def diameter(self) -> float | None:
        return None


@dataclass(frozen=True)
class PipeLink(_Link):
    """A pipe run between two nodes: a :class:`~kit.core.line.Segment` with its fittings.

    Parameters
    ----------
    name, from_node, to_node : str
        The link's name and its ends; positive flow runs from → to [-]
    segment : Segment
        Pipe, length and fittings. Node elevations govern the profile; a non-zero
        ``segment.rise`` must agree with them within 1 mm [-]
    check : bool
        True where the run has a non-return valve (flow from → to only) [-]
    """

    segment: object = None
    check: bool = False

    kind = "pipe"

    def __post_init__(self):
        self._check_ends()
        if self.segment is None or not hasattr(self.segment, "pipe"):
            raise InputError(f"segment of link '{self.name}'", type(self.segment).__name__,
                             "must be a Segment (pipe, length, fittings)")
        if not isinstance(self.check, bool):
            raise InputError(f"check of link '{self.name}'", self.check, "must be True or False")

    @property
    def diameter(self) -> float:
        return float(self.segment.pipe.Di)

    def with_condition(self, condition: str) -> PipeLink:
        seg = self.segment
        return replace(self, segment=replace(seg, pipe=seg.pipe.with_condition(condition)))


@dataclass(frozen=True)
class PumpLink(_Link):
    """A pump (or a set of pumps) from its suction node to its discharge node.

    Parameters
    ----------
    name, from_node, to_node : str
        The link's name, suction node and discharge node [-]
    pump : PumpCurve or PumpSet
        The curve; head gain from → to at a flow [m]
    speed_rpm : float or None
        Running speed for a variable-speed :class:`~kit.core.pump.PumpCurve` (affinity laws);
        None runs it at the curve's own speed [rpm]

    Notes
    -----
    The pump has a non-return valve: it never passes flow to → from. Where the head asked
    across it is above its shut-off head it is held shut (zero flow).
    """

    pump: object = None
    speed_rpm: float | None = None

    kind = "pump"
    check = True

    def __post_init__(self):
        self._check_ends()
        if self.pump is None or not hasattr(self.pump, "head") or not hasattr(self.pump,
                                                                               "shutoff_head"):
            raise InputError(f"pump of link '{self.name}'", type(self.pump).__name__,
                             "must be a PumpCurve or PumpSet")
        if self.speed_rpm is not None and not hasattr(self.pump, "at_speed"):
            raise InputError(f"speed of link '{self.name}'", self.speed_rpm,
                             "can be set for a single PumpCurve only; scale each pump of the "
                             "set with at_speed()", "rpm")

    @cached_property
    def curve(self):
        """The pump curve at the link's running speed."""
        if self.speed_rpm is None:
            return self.pump
        return self.pump.at_speed(self.speed_rpm)


def _kv(field: str, kv) -> float:
    return check_range(field, kv, "m³/h", low=0.0, high=1e6)


def _bore(field: str, d) -> float | None:
    return None if d is None else check_range(field, d, "m", low=0.0, high=5.0)


@dataclass(frozen=True)
class CheckValveLink(_Link):
    """A non-return valve: flow from → to only.

    Parameters
    ----------
    name, from_node, to_node : str
        The link's name and its ends; it passes flow from → to only [-]
    kv : float
        Flow coefficient when open [m³/h]
    diameter : float or None
        Nominal bore, for the velocity shown [m]
    """

    kv: float = 0.0
    diameter: float | None = None

    kind = "check valve"
    check = True

    def __post_init__(self):
        self._check_ends()
        _kv(f"Kv of check valve '{self.name}'", self.kv)
        _bore(f"diameter of check valve '{self.name}'", self.diameter)

    @property
    def kv_open(self) -> float:
        return float(self.kv)


@dataclass(frozen=True)
class ControlValveLink(_Link):
    """A throttling control valve at a fixed opening.

    Parameters
    ----------
    name, from_node, to_node : str
        The link's name and its ends; positive flow runs from → to [-]
    kv_rated : float
        Rated Kv (Kvs) at full travel [m³/h]
    opening : float
        Travel as a fraction of rated travel, 0 < x ≤ 1 [-]
    characteristic : str
        Inherent characteristic, a key of :data:`CHARACTERISTICS` [-]
    rangeability : float
        R for the equal-percentage characteristic, > 1 [-]
    diameter : float or None
        Nominal bore, for the velocity shown [m]
    """

    kv_rated: float = 0.0
    opening: float = 1.0
    characteristic: str = "equal_percentage"
    rangeability: float = 50.0
    diameter: float | None = None

    kind = "control valve"

    def __post_init__(self):
        self._check_ends()
        _kv(f"rated Kv of control valve '{self.name}'", self.kv_rated)
        check_range(f"opening of control valve '{self.name}'", self.opening, "-", low=0.0,
                    high=1.0)
        check_choice(f"characteristic of control valve '{self.name}'", self.characteristic,
                     tuple(CHARACTERISTICS))
        check_range(f"rangeability of control valve '{self.name}'", self.rangeability, "-",
                    low=1.0, high=1000.0)
        _bore(f"diameter of control valve '{self.name}'", self.diameter)

    @property
    def kv_open(self) -> float:
        """Kv at the set opening [m³/h]."""
        return float(self.kv_rated * inherent_fraction(self.opening, self.characteristic,
                                                       self.rangeability))


@dataclass(frozen=True)
class BalancingValveLink(_Link):
    """A balancing (regulating) valve at a setting given as its Kv there.

    Parameters
    ----------
    name, from_node, to_node : str
        The link's name and its ends; positive flow runs from → to [-]
    kv : float
        Kv at the valve's setting [m³/h]
    kv_max : float or None
        Kv fully open, for balancing and the near-open/closed findings [m³/h]
    diameter : float or None
        Nominal bore, for the velocity shown [m]
    """

    kv: float = 0.0
    kv_max: float | None = None
    diameter: float | None = None

    kind = "balancing valve"

    def __post_init__(self):
        self._check_ends()
        _kv(f"Kv of balancing valve '{self.name}'", self.kv)
        if self.kv_max is not None:
            check_range(f"fully open Kv of balancing valve '{self.name}'", self.kv_max, "m³/h",
                        low=self.kv, high=1e6, low_inclusive=True)
        _bore(f"diameter of balancing valve '{self.name}'", self.diameter)

    @property
    def kv_open(self) -> float:
        return float(self.kv)


@dataclass(frozen=True)
class EquipmentLink(_Link):
    """A piece of equipment passing the flow at a fixed resistance, given by its Kv: a coil,
    an evaporator, a heat exchanger, a strainer, a meter.

    Parameters
    ----------
    name, from_node, to_node : str
        The link's name and its ends; positive flow runs from → to [-]
    kv : float
        Flow coefficient [m³/h at 1 bar]; from a rated pressure drop Δp at a rated flow Q,
        Kv = Q[m³/h]·sqrt(ρ/ρ0 / Δp[bar]) (IEC 60534-2-1 definition) [m³/h]
    diameter : float or None
        Connection bore, for the velocity shown [m]

    Examples
    --------
    >>> EquipmentLink("AHU-1", "a", "b", kv=15.0).kv_open
    15.0
    """

    kv: float = 0.0
    diameter: float | None = None

    kind = "equipment"

    def __post_init__(self):
        self._check_ends()
        _kv(f"Kv of equipment '{self.name}'", self.kv)
        _bore(f"diameter of equipment '{self.name}'", self.diameter)

    @property
    def kv_open(self) -> float:
        return float(self.kv)


LINK_KINDS = (PipeLink, PumpLink, CheckValveLink, ControlValveLink, BalancingValveLink,
              EquipmentLink)


class Network:
    """A pipe network with one liquid state: checked on construction, solved on request.

    Parameters
    ----------
    name : str
        Name of the network [-]
    nodes : sequence of Node
        Junctions (free heads) [-]
    boundaries : sequence of Boundary
        Fixed-head nodes; at least one [-]
    links : sequence of PipeLink, PumpLink, CheckValveLink, ControlValveLink, BalancingValveLink
        The links; every end must name a node or a boundary [-]
    state : LiquidState
        The flowing liquid: ``rho`` [kg/m³], ``mu`` [Pa·s], ``pv`` [Pa] or None, ``T`` [K] [-]
    p_baro : float
        Barometric pressure at the site, for gauge values and the head datum [Pa]

    Raises
    ------
    InputError
        Duplicate names, a link to an unknown node, a pipe whose ends' elevations disagree with
        its length or rise, no fixed-head node, nodes with no path to any fixed head (named).

    Notes
    -----
    Solving is :meth:`solve` (:mod:`kit.core.network_solve`, the gradient method of Todini &
    Pilati 1988); the network curve is :func:`kit.core.network_curve.network_curve`.
    """

    def __init__(self, name: str, nodes, boundaries, links, state, p_baro: float = P_ATM):
        self.name = _name("network", name)
        self.nodes = tuple(nodes)
        self.boundaries = tuple(boundaries)
        self.links = tuple(links)
        self.state = state
        self.p_baro = check_range("barometric pressure", p_baro, "Pa", low=1e4, high=1.2e5)
        for n in self.nodes:
            if not isinstance(n, Node):
                raise InputError(f"nodes of network '{name}'", type(n).__name__, "must be Node")
        for b in self.boundaries:
            if not isinstance(b, Boundary):
                raise InputError(f"boundaries of network '{name}'", type(b).__name__,
                                 "must be Boundary")
        for k in self.links:
            if not isinstance(k, LINK_KINDS):
                raise InputError(f"links of network '{name}'", type(k).__name__,
                                 "must be one of " + ", ".join(c.__name__ for c in LINK_KINDS))
        for attr in ("rho", "mu"):
            check_range(f"liquid {attr}", getattr(state, attr, None),
                        "kg/m³" if attr == "rho" else "Pa·s", low=0.0)
        self._validate()

    # ------------------------------------------------------------------ structure
    @property
    def node_names(self) -> tuple[str, ...]:
        return tuple(n.name for n in self.nodes)

    @property
    def boundary_names(self) -> tuple[str, ...]:
        return tuple(b.name for b in self.boundaries)

    @property
    def link_names(self) -> tuple[str, ...]:
        return tuple(k.name for k in self.links)

    @cached_property
    def index(self) -> dict[str, int]:
        """Node name → index: free nodes first, then boundaries."""
        names = self.node_names + self.boundary_names
        return {n: i for i, n in enumerate(names)}

    @cached_property
    def ends(self) -> tuple[np.ndarray, np.ndarray]:
        """(from index, to index) of every link."""
        idx = self.index
        return (np.array([idx[k.from_node] for k in self.links], dtype=np.int64),
                np.array([idx[k.to_node] for k in self.links], dtype=np.int64))

    def link(self, name: str):
        for k in self.links:
            if k.name == name:
                return k
        raise UnknownChoiceError("link", name, self.link_names)

    def elevation(self) -> np.ndarray:
        """Elevation of every node then boundary (a boundary's low level) [m]."""
        return np.array([n.elevation for n in self.nodes] + [b.level_low for b in self.boundaries])

    def _validate(self):
        all_names = self.node_names + self.boundary_names
        seen = set()
        for n in all_names:
            if n in seen:
                raise InputError("node name", n, "is used twice; node and boundary names must "
                                 "be unique")
            seen.add(n)
        seen = set()
        for n in self.link_names:
            if n in seen:
                raise InputError("link name", n, "is used twice; link names must be unique")
            seen.add(n)
        if not self.boundaries:
            raise InputError(f"boundaries of network '{self.name}'", 0,
                             "must hold at least one fixed-head node (tank or vessel): without "
                             "one no head is defined", "boundaries")
        choices = sorted(all_names)
        known = set(all_names)
        for k in self.links:
            for end in ("from_node", "to_node"):
                if getattr(k, end) not in known:
                    raise UnknownChoiceError(f"{end.replace('_', ' ')} of link '{k.name}'",
                                             getattr(k, end), choices)
        # a boundary's surface level is not where its pipe connects: only node-to-node pipes
        z = {n.name: n.elevation for n in self.nodes}
        for k in self.links:
            if isinstance(k, PipeLink) and k.from_node in z and k.to_node in z:
                dz = z[k.to_node] - z[k.from_node]
                L = k.segment.length
                if abs(dz) > L * (1 + 1e-12):
                    raise OutOfRangeError(f"length of link '{k.name}'", L, "m",
                                          low=abs(dz), low_inclusive=True)
                if k.segment.rise != 0.0 and abs(k.segment.rise - dz) > 1e-3:
                    raise InputError(f"rise of link '{k.name}'", k.segment.rise,
                                     f"must agree with its ends' elevations ({dz:.6g} m from "
                                     f"'{k.from_node}' to '{k.to_node}') or be 0", "m")
        self._check_connected()

    def _check_connected(self):
        from scipy.sparse import coo_matrix
        from scipy.sparse.csgraph import connected_components

        n = len(self.index)
        f, t = self.ends
        g = coo_matrix((np.ones(f.size), (f, t)), shape=(n, n))
        _, labels = connected_components(g, directed=False)
        nf = len(self.nodes)
        fed = set(labels[nf:].tolist())
        orphans = [self.nodes[i].name for i in range(nf) if labels[i] not in fed]
        if orphans:
            shown = ", ".join(f"'{o}'" for o in orphans[:20])
            more = f" (+{len(orphans) - 20} more)" if len(orphans) > 20 else ""
            raise InputError("nodes " + shown + more, len(orphans),
                             "have no path to any fixed-head node (tank or vessel); connect "
                             "them or remove them", "nodes")

    # ------------------------------------------------------------------ variants
    def with_condition(self, condition: str) -> Network:
        """A copy with every pipe at ``condition`` ('new' or 'aged')."""
        check_choice("pipe condition", condition, ("new", "aged"))
        links = tuple(k.with_condition(condition) if isinstance(k, PipeLink) else k
                      for k in self.links)
        return self.replace(links=links)

    def replace(self, **changes) -> Network:
        """A copy with some of ``nodes``, ``boundaries``, ``links``, ``state``, ``p_baro``
        replaced (checked again)."""
        kw = dict(name=self.name, nodes=self.nodes, boundaries=self.boundaries,
                  links=self.links, state=self.state, p_baro=self.p_baro)
        unknown = set(changes) - set(kw)
        if unknown:
            raise UnknownChoiceError("network field", sorted(unknown)[0], sorted(kw))
        kw.update(changes)
        return Network(**kw)

    def solve(self, levels="low", demand_factor: float = 1.0, **options):
        """Steady flows and heads; see :func:`kit.core.network_solve.solve`."""
        from kit.core.network_solve import solve

        return solve(self, levels=levels, demand_factor=demand_factor, **options)

    def __repr__(self) -> str:
        return (f"Network({self.name!r}, nodes={len(self.nodes)}, "
                f"boundaries={len(self.boundaries)}, links={len(self.links)})")
