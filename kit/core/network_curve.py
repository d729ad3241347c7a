"""The network curve (the head a pump must make against the network), the index circuit, and
balancing-valve settings.

Load model
----------
At each flow ``Q`` through the chosen pump, every node's demand is scaled by one factor
λ = Q / (Σ demands of the nodes downstream of the pump): all demands rise and fall together,
in proportion to their design values. Where a fixed head lies on the pump's discharge side
(a tank it fills, a closed chilled-water loop with its expansion vessel, a bypass round the
pump) the demands stay at their design values and Q is simply the pump's flow.

Method
------
The pump is replaced by a *flow source*: Q leaves its suction node and enters its discharge
node. The rest of the network is solved by the gradient method
(:func:`kit.core.network_solve.solve`, Todini & Pilati 1988). Then:

- where the pump is the only link between its suction and discharge sides and no fixed head
  lies downstream of it (a supply network), the heads downstream are defined only up to a
  constant — the pump's head. Every node there with a minimum residual pressure asks for
  ``H_needed,i = z_i + (p_min,i − p_baro)/(ρg)``; the discharge head is set so that the most
  demanding node (the **index node**) just keeps its minimum, and every other node has more.
  The pump head is that discharge head minus the suction head. The **index circuit** is the
  path of links from the pump's discharge to the index node;
- otherwise (a closed loop, a discharge into a tank, a bypass around the pump) the heads are
  fixed by the boundaries and the pump head is simply H_discharge − H_suction at that flow;
  minimum pressures are then checks (``shortfall``), not what sets the head.

Speed: where what is left after removing the pump is a forest with one fixed head (real or
reference) per tree, continuity alone sets the link flows, affine in Q, so two solves give the
flow pattern and the heads at every Q follow from the link losses along each tree path,
vectorised over all flows at once (``method='tree'``). Otherwise one solve per
flow, each started from the last (``method='solve'``).

Band: the same members as the single-line system curve — boundary levels (low / high),
liquid temperature (the states given, e.g. at minimum and maximum temperature) and pipe
condition (new / aged roughness, :meth:`Pipe.with_condition`).

Balancing (:func:`balance`): with every balancing valve's branch at its design flow, the
valve on the index circuit fully open and the others taking up the excess head, the Kv each
other valve must be set to; same flow-source method.

References
----------
Todini, E., and Pilati, S. (1988). A gradient algorithm for the analysis of pipe networks. In
Computer Applications in Water Supply, Vol. 1, pp. 1–20. Research Studies Press, Letchworth.
The index-circuit and balancing procedure is common practice, no source.

Example
-------
>>> from types import SimpleNamespace as NS
>>> import numpy as np
>>> from kit.core.line import Segment
>>> from kit.core.network_model import Boundary, Network, Node, PipeLink, PumpLink
>>> from kit.core.pump import PumpCurve
>>> pipe = NS(Di=0.1023, area=0.0082196, roughness=4.5e-5, with_condition=lambda c: pipe)
>>> water = NS(rho=998.2, mu=1.002e-3, pv=2339.0, T=293.15)
>>> pump = PumpCurve([0, 0.01, 0.02], [30.0, 28.0, 22.0], speed_rpm=1450, diameter=0.25)
>>> net = Network("demo", [Node("S", 0.0), Node("D", 0.0),
...                        Node("J1", 10.0, demand=0.01, min_pressure=201325.0)],
...               [Boundary("T1", 2.0)],
...               [PipeLink("suc", "T1", "S", Segment("suc", pipe, 2.0)), PumpLink("P", "S", "D", pump),
...                PipeLink("P1", "D", "J1", Segment("P1", pipe, 100.0))], water)
>>> c = network_curve(net, np.array([0.0, 0.01]), pump="P")
>>> [round(float(h), 2) for h in c.H[0]], c.index_node[0][1]
([18.22, 19.68], 'J1')
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from kit.core.network_model import (
    KV_HEAD,
    BalancingValveLink,
    Boundary,
    Network,
    PumpLink,
)
from kit.core.network_solve import G, _static, solve
from kit.errors import InputError, NoSolutionError, UnknownChoiceError, check_choice

__all__ = ["NetworkCurve", "network_curve", "Balance", "balance", "CURVE_METHODS"]

CURVE_METHODS = ("auto", "tree", "solve")


@dataclass(frozen=True)
class _Case:
    label: str
    level: object
    state: object
    condition: str


@dataclass(frozen=True)
class NetworkCurve:
    """Pump head needed against the network, over flows and the band's members.

    Attributes
    ----------
    Q : ndarray
        Flows through the pump [m³/s], shape (n,)
    labels : tuple of str
        One label per band member ("low level / 20 °C / new")
    H : ndarray
        Pump head needed, shape (members, n) [m]
    index_node : tuple of tuple of str
        The index node per member and flow ('' where no minimum sets the head)
    shortfall : ndarray
        Largest pressure shortfall below a node's minimum that the pump head cannot cure
        (nodes upstream of the pump, or every node where boundaries fix the heads), shape
        (members, n) [Pa]; 0 where every minimum is kept
    suction_head, discharge_head : ndarray
        Heads at the pump's suction and discharge nodes, shape (members, n) [m]
    method : str
        'tree' or 'solve'
    load_factor : ndarray
        λ at each flow [-]
    """

    Q: np.ndarray
    labels: tuple
    H: np.ndarray
    index_node: tuple
    shortfall: np.ndarray
    suction_head: np.ndarray
    discharge_head: np.ndarray
    method: str
    load_factor: np.ndarray
    pump: str
    paths: dict

    @property
    def lower(self) -> np.ndarray:
        return self.H.min(axis=0)

    @property
    def upper(self) -> np.ndarray:
        return self.H.max(axis=0)

    def index_circuit(self, member: int = 0, i: int = -1) -> tuple[str, ...]:
        """Links from the pump's discharge to the index node, for one member and flow index."""
        node = self.index_node[member][i]
        return self.paths.get(node, ())


class _Derived:
    """The network with some links replaced by flow sources (and floating parts referenced)."""

    def __init__(self, net: Network, sources: tuple[str, ...], ref_pref: str | None):
        self.net = net
        idx = net.index
        self.sources = sources
        src_set = set(sources)
        for s in sources:
            net.link(s)
        self.source_ends = [(idx[net.link(s).from_node], idx[net.link(s).to_node])
                            for s in sources]
        links = [k for k in net.links if k.name not in src_set]
        self.keep = np.array([k.name not in src_set for k in net.links])
        from scipy.sparse import coo_matrix
        from scipy.sparse.csgraph import connected_components

        n_all = len(idx)
        f, t = net.ends
        f, t = f[self.keep], t[self.keep]
        g = coo_matrix((np.ones(f.size), (f, t)), shape=(n_all, n_all))
        ncomp, labels = connected_components(g, directed=False)
        nf = len(net.nodes)
        fixed_labels = set(labels[nf:].tolist())
        refs = {}
        for i in range(nf):
            lab = labels[i]
            if lab in fixed_labels:
                continue
            if lab not in refs or (ref_pref is not None and net.nodes[i].name == ref_pref):
                refs[lab] = i
        self.labels = labels
        self.ref_nodes = sorted(refs.values())
        self.floating = np.array([labels[i] not in fixed_labels for i in range(nf)])
        ref_set = set(self.ref_nodes)
        nodes = [n for i, n in enumerate(net.nodes) if i not in ref_set]
        self.node_map = np.array([i for i in range(nf) if i not in ref_set], dtype=np.int64)
        bnds = list(net.boundaries) + [
            Boundary(net.nodes[i].name, net.nodes[i].elevation, pressure=net.p_baro)
            for i in self.ref_nodes]
        self.d = Network(net.name + " (sources)", nodes, bnds, links, net.state, net.p_baro)
        # derived order: nodes (node_map), then boundaries, then references
        self.order = np.concatenate([self.node_map, np.arange(nf, nf + len(net.boundaries)),
                                     np.array(self.ref_nodes, dtype=np.int64)]).astype(np.int64)
        self.ncomp = ncomp

    def demands(self, base: np.ndarray, flows) -> np.ndarray:
        """Derived-node demands from original node demands ``base`` and source flows."""
        q = np.zeros(len(self.net.index))
        q[:base.size] = base
        for (a, b), Q in zip(self.source_ends, flows, strict=True):
            q[a] += Q
            q[b] -= Q
        return q[self.node_map]

    def full_heads(self, res) -> np.ndarray:
        """Heads in the original node order [m] (references at their own elevation)."""
        H = np.empty(len(self.net.index))
        H[self.order] = res.H
        return H

    def is_forest(self) -> bool:
        """Every component a tree with exactly one fixed head, and no pumps left (cached)."""
        if "_forest" not in self.__dict__:
            self._forest = self._is_forest()
        return self._forest

    def _is_forest(self) -> bool:
        dn = self.d
        if any(isinstance(k, PumpLink) for k in dn.links):
            return False
        from scipy.sparse import coo_matrix
        from scipy.sparse.csgraph import connected_components

        n = len(dn.index)
        f, t = dn.ends
        g = coo_matrix((np.ones(f.size), (f, t)), shape=(n, n))
        ncomp, labels = connected_components(g, directed=False)
        nf = len(dn.nodes)
        roots = np.bincount(labels[nf:], minlength=ncomp)
        return bool(np.all(roots == 1) and f.size == n - ncomp)

    def paths(self):
        """For each derived node: (links on its path from its tree's root, signs) as a sparse
        matrix P with H = H_root − P @ h (h = H_from − H_to of each link)."""
        from scipy.sparse import csr_matrix

        dn = self.d
        n = len(dn.index)
        nf = len(dn.nodes)
        f, t = dn.ends
        adj = [[] for _ in range(n)]
        for k, (a, b) in enumerate(zip(f, t, strict=True)):
            adj[a].append((b, k, 1.0))   # walking from→to: H_b = H_a − h_k
            adj[b].append((a, k, -1.0))  # walking to→from: H_a = H_b + h_k
        root = np.full(n, -1)
        parent = [None] * n
        order = []
        for r in range(nf, n):
            root[r] = r
            stack = [r]
            while stack:
                u = stack.pop()
                order.append(u)
                for v, k, sgn in adj[u]:
                    if root[v] < 0:
                        root[v] = r
                        parent[v] = (u, k, sgn)
                        stack.append(v)
        rows, cols, vals = [], [], []
        paths = {}
        for u in order:
            if parent[u] is None:
                paths[u] = {}
                continue
            p, k, sgn = parent[u]
            d = dict(paths[p])
            d[k] = sgn
            paths[u] = d
            for kk, ss in d.items():
                rows.append(u)
                cols.append(kk)
                vals.append(ss)
        P = csr_matrix((vals, (rows, cols)), shape=(n, len(dn.links)))
        return P, root, paths


def _cases(net, levels, states, conditions):
    states = (net.state,) if states is None else tuple(states)
    if not states:
        raise InputError("liquid states", 0, "must hold at least one state")
    levels = (levels,) if isinstance(levels, (str, dict)) else tuple(levels)
    conditions = (conditions,) if isinstance(conditions, str) else tuple(conditions)
    for c in conditions:
        check_choice("pipe condition", c, ("new", "aged"))
    out = []
    for lv in levels:
        for stt in states:
            for c in conditions:
                T = getattr(stt, "T", None)
                tl = f"{T - 273.15:.4g} °C" if T is not None else "state"
                ll = lv if isinstance(lv, str) else "levels"
                out.append(_Case(f"{ll} level / {tl} / {c}", lv, stt, c))
    return out


def _pump_link(net, pump):
    pumps = [k for k in net.links if isinstance(k, PumpLink)]
    if pump is None:
        if len(pumps) != 1:
            raise InputError("pump", None, "must be named: the network has "
                             f"{len(pumps)} pump links ({', '.join(k.name for k in pumps)})"
                             if pumps else "must be given: the network has no pump link")
        return pumps[0]
    k = net.link(pump)
    if not isinstance(k, PumpLink):
        raise UnknownChoiceError("pump", pump, [p.name for p in pumps])
    return k


def _required(net, rho):
    """Head each node needs for its minimum pressure [m] (NaN where none)."""
    out = np.full(len(net.index), np.nan)
    for i, n in enumerate(net.nodes):
        if n.min_pressure is not None:
            out[i] = n.elevation + (n.min_pressure - net.p_baro) / (rho * G)
    return out


def network_curve(net: Network, Q, pump: str | None = None, *, levels=("low",), states=None,
                  conditions=("new",), method: str = "auto") -> NetworkCurve:
    """The head the pump must make at each flow so that every node keeps its minimum pressure.

    Parameters
    ----------
    net : Network
        The network, with the pump as a :class:`PumpLink` [-]
    Q : array_like
        Flows through the pump, ≥ 0 [m³/s]
    pump : str, optional
        Name of the pump link; needed when there is more than one [-]
    levels : str, dict or sequence of them
        Boundary levels of each band member ('low', 'high' or a dict per boundary) [-]
    states : sequence of LiquidState, optional
        Liquid states of the band (e.g. at minimum and maximum temperature); defaults to the
        network's own [-]
    conditions : str or sequence of str
        Pipe conditions of the band, 'new' and/or 'aged' [-]
    method : str
        'auto' (tree when the network allows it), 'tree' or 'solve' [-]

    Returns
    -------
    NetworkCurve

    Raises
    ------
    InputError
        Negative flows, no node downstream with a minimum pressure, an unknown pump.
    NoSolutionError
        Flow against a check valve on a tree path; a solve that does not converge.

    Examples
    --------
    See the module docstring.

    References
    ----------
    Todini & Pilati (1988) for each solve; index-circuit procedure common practice, no source.
    """
    Q = np.asarray(Q, dtype=float)
    if Q.ndim != 1 or Q.size == 0 or not np.all(np.isfinite(Q)) or Q.min() < 0:
        bad = Q[~np.isfinite(Q) | (Q < 0)] if Q.size else Q
        raise InputError("flows of the network curve", float(bad.flat[0]) if bad.size else 0,
                         "must be a non-empty list of finite flows ≥ 0", "m³/s")
    check_choice("network curve method", method, CURVE_METHODS)
    pk = _pump_link(net, pump)
    cases = _cases(net, levels, states, conditions)
    nets = {c: _at_condition(net, c) for c in {x.condition for x in cases}}
    H = np.empty((len(cases), Q.size))
    short = np.zeros_like(H)
    hs = np.empty_like(H)
    hd = np.empty_like(H)
    index_nodes = []
    derived = {}
    used = "tree"
    for ci, case in enumerate(cases):
        nc = nets[case.condition]
        if case.condition not in derived:
            derived[case.condition] = _Derived(nc, (pk.name,), pk.to_node)
        dv = derived[case.condition]
        out = _curve_member(nc, dv, pk, Q, case, method)
        H[ci], short[ci], hs[ci], hd[ci], names, m, lam, paths = out
        if m == "solve":
            used = "solve"
        index_nodes.append(tuple(names))
    return NetworkCurve(Q, tuple(c.label for c in cases), H, tuple(index_nodes), short, hs, hd,
                        used, lam, pk.name, paths)


def _at_condition(net, condition):
    """The network with every pipe at ``condition``, cached on the network."""
    cache = net.__dict__.setdefault("_condition_cache", {})
    if condition not in cache:
        cache[condition] = net.with_condition(condition)
    return cache[condition]


def _load(net, dv, pk):
    """Unit demands per unit pump flow, and whether the discharge side floats."""
    idx = net.index
    d_i = idx[pk.to_node]
    dem = np.array([n.demand for n in net.nodes], dtype=float)
    nf = len(net.nodes)
    floating = d_i < nf and bool(dv.floating[d_i])
    if floating:
        comp = dv.labels[:nf] == dv.labels[d_i]
        down = dem[comp].sum()
        if down <= 0:
            raise InputError(f"demands downstream of pump '{pk.name}'", float(down),
                             "must add up to more than 0 for the network curve (the load is "
                             "scaled from them)", "m³/s")
        return dem / down, True, comp, down
    return dem, False, None, 0.0


def _curve_member(net, dv, pk, Q, case, method):
    rho = case.state.rho
    unit, floating, comp, down = _load(net, dv, pk)
    need = _required(net, rho)
    nf = len(net.nodes)
    idx = net.index
    s_i, d_i = idx[pk.from_node], idx[pk.to_node]
    if s_i < nf and dv.floating[s_i] and dv.labels[s_i] != dv.labels[d_i]:
        raise InputError(f"suction side of pump '{pk.name}'", pk.from_node,
                         "has no fixed head (tank or vessel) of its own: the pump is the only "
                         "link to every fixed head, so its suction head is undefined")
    if floating and not np.isfinite(need[:nf][comp]).any():
        raise InputError(f"minimum pressures downstream of pump '{pk.name}'", 0,
                         "must be given at one node at least: the network curve keeps every "
                         "node at its minimum", "nodes")
    use_tree = method == "tree" or (method == "auto" and dv.is_forest())
    if method == "tree" and not dv.is_forest():
        raise InputError("network curve method", "tree", "needs a network that is a tree on "
                         "each side of the pump with one fixed head each; use 'solve'")
    def node_demands(q):
        # floating: demands scale with the pump flow; else they stay at design values
        return dv.demands(unit * q if floating else unit, (q,))

    qref = float(Q.max()) if Q.max() > 0 else 1e-3
    r0 = solve(dv.d, case.level, state=case.state, demands=node_demands(qref), physical=False)
    if use_tree:
        # a forest: continuity alone sets the flows, affine in the pump flow
        F0 = 0.0 if floating else solve(dv.d, case.level, state=case.state,
                                        demands=node_demands(0.0), physical=False).Q
        Hfull = _tree_heads(dv, r0, F0, Q, qref, case)
    else:
        Hfull = np.empty((len(idx), Q.size))
        init = None
        for j, q in enumerate(Q):
            r = solve(dv.d, case.level, state=case.state, initial=init,
                      demands=node_demands(q), physical=False)
            init = r.Q
            Hfull[:, j] = dv.full_heads(r)
    names = [""] * Q.size
    hd = Hfull[d_i].copy()
    shortfall = np.zeros(Q.size)
    nz = np.isfinite(need)
    if floating:
        sel = np.flatnonzero(comp & nz[:nf])
        gap = need[sel][:, None] - Hfull[sel]          # head each node still needs
        k = np.argmax(gap, axis=0)
        shift = gap[k, np.arange(Q.size)]
        hd = hd + shift
        names = [net.nodes[sel[j]].name for j in k]
        other = np.flatnonzero(~comp & nz[:nf])
        Hok = Hfull.copy()
        Hok[np.flatnonzero(comp)] += shift
    else:
        other = np.flatnonzero(nz[:nf])
        Hok = Hfull
    if other.size:
        lack = (need[other][:, None] - Hok[other]) * rho * G
        shortfall = np.maximum(lack.max(axis=0), 0.0)
        if not floating:
            names = [net.nodes[other[j]].name for j in np.argmax(lack, axis=0)]
    hs = Hfull[s_i]
    lam = Q / down if floating else np.zeros(Q.size)
    paths = _paths(net, dv, pk, r0) if floating else {}
    return (hd - hs, shortfall, hs, hd, names, "tree" if use_tree else "solve", lam, paths)


def _tree_heads(dv, r0, F0, Q, qref, case):
    """Heads at every original node for flows F0 + (r0.Q − F0)·Q/qref (a forest: flows
    affine in the pump flow, set by continuity alone)."""
    dn = dv.d
    st = _static(dn)
    F0 = np.broadcast_to(np.asarray(F0, dtype=float), r0.Q.shape)
    F = F0[:, None] + (r0.Q - F0)[:, None] * (Q / qref)[None, :]
    for i in np.flatnonzero(st.check):
        if np.any(F[i] < 0):
            raise NoSolutionError("network curve", f"flow would run against the non-return "
                                  f"valve of link '{dn.links[i].name}' on a tree path")
    h, _ = st.losses(F, case.state.rho, case.state.mu)
    if "P" not in dv.__dict__:
        dv.P, dv.root, dv.pathmap = dv.paths()
    Hd = r0.H0  # fixed heads of the derived network
    nfd = len(dn.nodes)
    Hroot = np.concatenate([np.zeros(nfd), Hd])[dv.root]
    Hder = Hroot[:, None] - dv.P @ h
    out = np.empty((len(dv.net.index), Q.size))
    out[dv.order] = Hder
    return out


def _paths(net, dv, pk, r0):
    """Link names on the path from the pump discharge to every node of its floating part."""
    if not dv.is_forest():
        return _bfs_paths(net, dv, pk, r0.Q)
    if "P" not in dv.__dict__:
        dv.P, dv.root, dv.pathmap = dv.paths()
    names = dv.d.link_names
    out = {}
    order_inv = {int(o): j for j, o in enumerate(dv.order)}
    for i, n in enumerate(net.nodes):
        j = order_inv[i]
        out[n.name] = tuple(names[k] for k in dv.pathmap.get(j, {}))
    return out


def _bfs_paths(net, dv, pk, Q):
    """For looped networks: the path from the discharge node with the fewest links among
    those that follow the flow (at the largest flow of the curve); every such path has the
    same head drop (energy round each loop is zero)."""
    from collections import deque

    dn = dv.d
    f, t = dn.ends
    names = dn.link_names
    adj: dict = {}
    for k, (a, b) in enumerate(zip(f, t, strict=True)):
        if Q[k] > 0:
            adj.setdefault(a, []).append((b, k))
        elif Q[k] < 0:
            adj.setdefault(b, []).append((a, k))
    start = dn.index[pk.to_node]
    prev = {start: None}
    dq = deque([start])
    while dq:
        u = dq.popleft()
        for v, k in adj.get(u, []):
            if v not in prev:
                prev[v] = (u, k)
                dq.append(v)
    out = {}
    inv = {v: k for k, v in dn.index.items()}
    for v in prev:
        path = []
        x = v
        while prev[x] is not None:
            x, k = prev[x]
            path.append(names[k])
        out[inv[v]] = tuple(reversed(path))
    return out


@dataclass(frozen=True)
class Balance:
    """Balancing-valve settings that bring every branch to its design flow.

    Attributes
    ----------
    kv : dict
        Valve name → Kv to set [m³/h] (the index valve at its fully open Kv)
    head_drop : dict
        Valve name → head across it at design flow [m]
    index_valve : str
        The valve of the index circuit (left fully open)
    pump_head : float
        Head the pump must make at the design flow [m]
    pump_flow : float
        Flow through the pump [m³/s]
    """

    kv: dict
    head_drop: dict
    index_valve: str
    pump_head: float
    pump_flow: float


def balance(net: Network, design: dict, pump: str | None = None, *, levels="low",
            state=None) -> Balance:
    """Balancing-valve settings for design branch flows (index valve fully open).

    Parameters
    ----------
    net : Network
        The network, with a pump link and balancing valves [-]
    design : dict
        Balancing-valve link name → design flow through it, > 0 [m³/s]. Each valve needs
        ``kv_max`` (its fully open Kv) [-]
    pump : str, optional
        The pump link's name, when there is more than one [-]
    levels : str or dict
        Boundary levels for the solve [-]
    state : LiquidState, optional
        Liquid state; defaults to the network's [-]

    Returns
    -------
    Balance

    Notes
    -----
    Method (common practice, no source): every valve's branch is held at its design flow (the
    valves become flow sources); the network is solved (Todini & Pilati 1988) with the pump
    as a flow source of the sum that reaches it; the head across each valve position is then
    known up to the pump head. The pump head is the least that leaves every valve at least
    its fully-open loss KV_HEAD·(Q/Kv_max)²; the valve where that binds is the index valve.
    Every other valve is set to Kv = Q·sqrt(KV_HEAD/Δh), Δh its share of head.
    """
    pk = _pump_link(net, pump)
    state = state or net.state
    if not design:
        raise InputError("design flows", 0, "must name at least one balancing valve")
    valves = []
    for name, q in design.items():
        k = net.link(name)
        if not isinstance(k, BalancingValveLink):
            raise InputError(f"design flow link '{name}'", k.kind, "must be a balancing valve")
        if k.kv_max is None:
            raise InputError(f"fully open Kv of balancing valve '{name}'", None,
                             "is needed to balance (the index valve stays fully open)")
        if not (np.isfinite(q) and q > 0):
            raise InputError(f"design flow of '{name}'", q, "must be greater than 0", "m³/s")
        valves.append(k)
    names = tuple(design)
    srcs = names + (pk.name,)
    dv = _Derived(net, srcs, pk.to_node)
    dem = np.array([n.demand for n in net.nodes], dtype=float)
    # pump flow: the sum of design flows that the pump must pass. In a closed loop every valve
    # flow passes the pump; with demands, the load of the floating part.
    nf = len(net.nodes)
    d_i = net.index[pk.to_node]
    q_pump = float(sum(design.values()))
    if d_i < nf and dv.floating[d_i]:
        comp = dv.labels[:nf] == dv.labels[d_i]
        inflow = dem[comp].sum()
        # flows leaving the discharge part through valves, minus those entering it
        for k, q in zip(valves, design.values(), strict=True):
            a, b = net.index[k.from_node], net.index[k.to_node]
            in_a = a < nf and comp[a]
            in_b = b < nf and comp[b]
            inflow += q * (in_a and not in_b) - q * (in_b and not in_a)
        q_pump = float(inflow)
    flows = tuple(design.values()) + (q_pump,)
    r = solve(dv.d, levels, state=state, demands=dv.demands(dem, flows), physical=False)
    H = dv.full_heads(r)
    drop = {}
    open_loss = {}
    for k, q in zip(valves, design.values(), strict=True):
        drop[k.name] = H[net.index[k.from_node]] - H[net.index[k.to_node]]
        open_loss[k.name] = KV_HEAD * (q / k.kv_max) ** 2
    # the pump head shifts the discharge (floating) part; valves leaving it gain the shift
    comp = (dv.labels[:nf] == dv.labels[d_i]) if (d_i < nf and dv.floating[d_i]) else None
    gain = {}
    for k in valves:
        a, b = net.index[k.from_node], net.index[k.to_node]
        ga = 1.0 if (comp is not None and a < nf and comp[a]) else 0.0
        gb = 1.0 if (comp is not None and b < nf and comp[b]) else 0.0
        gain[k.name] = ga - gb
    movable = [n for n in names if gain[n] > 0]
    if comp is None or not movable:
        raise NoSolutionError("balance", f"the pump '{pk.name}' head does not act on the "
                              "balancing valves: each valve must lie between the pump's "
                              "discharge side and its suction side")
    shift = max(open_loss[n] - drop[n] for n in movable)
    index = max(movable, key=lambda n: open_loss[n] - drop[n])
    kv = {}
    head = {}
    for k, q in zip(valves, design.values(), strict=True):
        dh = drop[k.name] + gain[k.name] * shift
        head[k.name] = float(dh)
        if dh <= 0:
            raise NoSolutionError("balance", f"valve '{k.name}' would need a negative head "
                                  f"({dh:.4g} m) to pass its design flow")
        kv[k.name] = float(k.kv_max if k.name == index else q * np.sqrt(KV_HEAD / dh))
    pump_head = float(H[d_i] + shift - H[net.index[pk.from_node]])
    return Balance(kv, head, index, pump_head, q_pump)
