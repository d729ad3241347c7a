"""Steady flows and heads in a pipe network by the global gradient method.

Method
------
The gradient method of Todini & Pilati (1988): Newton's method on the energy equation of every
link and the continuity equation of every free node together, written on the node–link
incidence matrix. With link flows ``Q`` (signed along each link's from → to direction), free
heads ``H``, fixed heads ``H0``, incidence ``A12`` (links × free nodes: −1 at the from node,
+1 at the to node) and ``A10`` (the same for fixed-head nodes), each link's head loss ``h(Q)``
(negative for a pump's gain) and its slope ``D = diag(dh/dQ)``, one step is

.. math::

    (A_{12}^T D^{-1} A_{12})\\,H = A_{12}^T Q - q - A_{12}^T D^{-1}(h(Q) + A_{10} H_0)

    Q \\leftarrow Q - D^{-1}(h(Q) + A_{12} H + A_{10} H_0)

with ``q`` the demand drawn at each free node. The matrix is symmetric positive definite when
every free node reaches a fixed head through open links and every slope is positive; it is
assembled and solved with :mod:`scipy.sparse` (SuperLU through ``spsolve``). After every step
continuity holds exactly (to round-off): the iteration moves on the energy equations only.

Details of this implementation
------------------------------
- Pipe loss: Darcy–Weisbach with :func:`kit.core.friction.darcy_friction` (the kit's smooth
  2000–4000 blend) plus the fittings' K, both re-evaluated at every iteration from the current
  Re. The slope is a one-sided difference quotient of the loss over |Q| (relative step 1e-6),
  taken from ``max(|Q|, Q_SLOPE_FLOOR)``, so it stays positive at zero flow (a laminar pipe's
  slope is its own; a valve's K-only slope is floored there).
- Valves: h = KV_HEAD·Q|Q|/Kv² from the Kv definition of IEC 60534-2-1 (density cancels).
- Pumps: h = −H_pump(Q); below zero flow the curve is continued by a falling straight line so
  that Newton can cross zero. Pumps and check valves are non-return: after a converged solve,
  any with reverse flow is closed (taken out of the matrix, flow exactly 0), and any closed one
  that the heads would now drive forward (a check valve with H_from > H_to, a pump asked for
  less than its shut-off head) is opened; the solve repeats. A link that changes state more
  than ``MAX_FLIPS`` times, or more than ``MAX_ROUNDS`` rounds, ends in
  :class:`~kit.errors.NoSolutionError` naming the links.
- Convergence: Σ|ΔQ| / max(Σ|Q|, ``Q_REF``) < ``tol`` (default 1e-10), or Σ|ΔQ| below the
  change that round-off in the heads alone makes (64 ε·max|H|·Σ 1/slope), and the continuity
  residual at every node below ``1e-10 × max(1, Σ|q|)`` m³/s; the iterations are reported.
- Nodes cut off from every fixed head by closed links: with no demand their head is undefined
  (NaN, and a finding says so); with a demand there is no solution and the error names the
  nodes and the closed links (a check valve closed on every path, a pump held shut because it
  was asked for more than its shut-off head).

References
----------
Todini, E., and Pilati, S. (1988). A gradient algorithm for the analysis of pipe networks. In
B. Coulbeck and C.-H. Orr (eds.), *Computer Applications in Water Supply, Vol. 1: Systems
Analysis and Simulation*, pp. 1–20. Research Studies Press, Letchworth, UK.

Example
-------
>>> from types import SimpleNamespace as NS
>>> from kit.core.line import Segment
>>> from kit.core.network_model import Boundary, Network, Node, PipeLink
>>> pipe = NS(Di=0.1023, area=0.0082196, roughness=4.5e-5, with_condition=lambda c: pipe)
>>> water = NS(rho=998.2, mu=1.002e-3, pv=2339.0, T=293.15)
>>> net = Network("demo", [Node("J1", 0.0, demand=0.01)], [Boundary("T1", 20.0)],
...               [PipeLink("P1", "T1", "J1", Segment("P1", pipe, 100.0))], water)
>>> r = net.solve()
>>> round(float(r.head_at("J1")), 3), r.iterations > 0
(18.56, True)
"""

from __future__ import annotations

from dataclasses import dataclass
from functools import cached_property

import numpy as np

from kit.core.findings import Finding, Severity
from kit.core.friction import darcy_friction, transition_findings
from kit.core.line import RE_FLOOR
from kit.core.network_model import (
    KV_HEAD,
    BalancingValveLink,
    ControlValveLink,
    PipeLink,
    PumpLink,
)
from kit.errors import InputError, NoSolutionError, check_range

__all__ = ["solve", "NetworkResult", "network_findings", "still_flow", "METHOD", "MAX_FLIPS",
           "MAX_ROUNDS", "Q_SLOPE_FLOOR", "Q_ZERO", "FINDING_LIMITS"]

from kit.core.constants import G  # noqa: E402  (one gravity constant)

#: Flow [m³/s] below which a link's slope is taken at this flow (keeps the matrix regular).
Q_SLOPE_FLOOR = 1e-7
#: Flow [m³/s] below which Σ|Q| is taken as this in the relative convergence test, so a
#: network with no flow (no demand, equal heads) converges on round-off.
Q_REF = 1e-6
#: A link may change between open and closed at most this many times in one solve.
MAX_FLIPS = 4
#: Flow [m³/s] at or below which a link's flow counts as none in the findings (with 1e-9 of
#: the largest flow): round-off must not read as reverse flow.
Q_ZERO = 1e-12


def still_flow(Q) -> float:
    """The flow [m³/s] at or below which a link of a solution with flows ``Q`` has no flow:
    :data:`Q_ZERO`, or 1e-9 of the largest flow (the solver closes the balance to
    round-off; the sign of a flow that small means nothing: a dead leg, an expansion-vessel
    line).

    >>> f"{still_flow([0.02, -1e-15]):.3g}", still_flow([0.0])
    ('2e-11', 1e-12)
    """
    return max(Q_ZERO, 1e-9 * float(np.abs(np.asarray(Q, dtype=float)).max(initial=0.0)))


#: Status rounds (solve, re-test non-return links) at most.
MAX_ROUNDS = 30
_REL_STEP = 1e-6

METHOD = {
    "name": "global gradient method (Newton on link energy and node continuity together)",
    "reference": "Todini, E., and Pilati, S. (1988). A gradient algorithm for the analysis of "
                 "pipe networks. In Coulbeck, B., Orr, C.-H. (eds.), Computer Applications in "
                 "Water Supply, Vol. 1, pp. 1–20. Research Studies Press, Letchworth.",
    "convergence": "sum|dQ| / max(sum|Q|, 1e-6 m³/s) < 1e-10 and continuity residual < "
                   "1e-10 × max(1, sum|q|) "
                   "m³/s at every node",
}

#: Limits of the network findings, as data (common practice, no source; the user's to set).
FINDING_LIMITS = {
    "vapour_margin_head": 2.0,       # m of liquid above vapour pressure
    "valve_open_above": 0.9,         # opening fraction: near fully open
    "valve_closed_below": 0.1,       # opening fraction: near closed
    "source": "common practice, no source",
}


class _Static:
    """Arrays of a network that do not change between solves (links are immutable)."""

    def __init__(self, net):
        self.nf = len(net.nodes)
        self.nb = len(net.boundaries)
        self.f, self.t = net.ends
        links = net.links
        n = len(links)
        self.n = n
        self.check = np.array([k.check for k in links], dtype=bool)
        self.is_pump = np.array([isinstance(k, PumpLink) for k in links], dtype=bool)
        self.pipe_idx = np.array([i for i, k in enumerate(links) if isinstance(k, PipeLink)],
                                 dtype=np.int64)
        self.kv_idx = np.array([i for i, k in enumerate(links) if hasattr(k, "kv_open")],
                               dtype=np.int64)
        segs = [links[i].segment for i in self.pipe_idx]
        self.D = np.array([s.pipe.Di for s in segs], dtype=float)
        self.A = np.array([s.pipe.area for s in segs], dtype=float)
        self.eps = np.array([s.pipe.roughness for s in segs], dtype=float)
        self.L = np.array([s.length for s in segs], dtype=float)
        self.eD = self.eps / self.D if segs else np.zeros(0)
        groups: dict = {}
        for j, s in enumerate(segs):
            if s.fittings:
                groups.setdefault((s.fittings, s.pipe.Di, s.pipe.roughness), []).append(j)
        self.fit_groups = [(np.array(v, dtype=np.int64), key[0], key[1], key[2])
                           for key, v in groups.items()]
        self.kv = np.array([links[i].kv_open for i in self.kv_idx], dtype=float)
        for i, kv in zip(self.kv_idx, self.kv, strict=True):
            if kv <= 0.0:
                raise InputError(f"Kv of link '{links[i].name}'", float(kv),
                                 "gives no flow at this opening; use an opening above 0", "m³/h")
        pumps: dict = {}
        for i, k in enumerate(links):
            if isinstance(k, PumpLink):
                pumps.setdefault(id(k.curve), (k.curve, []))[1].append(i)
        self.pump_groups = [(c, np.array(v, dtype=np.int64)) for c, v in pumps.values()]
        self.shutoff = np.full(n, np.nan)
        self.q_end = np.full(n, np.nan)
        for c, idx in self.pump_groups:
            self.shutoff[idx] = float(c.shutoff_head)
            self.q_end[idx] = float(c.q_end)
        area = np.full(n, np.nan)
        for i, k in enumerate(links):
            d = k.diameter
            if d is not None:
                area[i] = np.pi / 4.0 * d * d
        self.area = area
        self.Q_init = np.where(np.isfinite(area), area * 1.0, 0.0)
        self.Q_init[self.kv_idx] = np.where(np.isfinite(area[self.kv_idx]), area[self.kv_idx],
                                            self.kv / 3600.0)
        self.Q_init[self.is_pump] = 0.5 * self.q_end[self.is_pump]

    # ------------------------------------------------------------------ link losses
    def _pipe_mag(self, qa, rho, mu):
        """Loss magnitude [m] of every pipe link at flows ``qa`` ≥ 0, shaped (pipes,) or
        (pipes, m) for m flows each."""
        col = (slice(None),) + (None,) * (qa.ndim - 1)
        A, D, L = self.A[col], self.D[col], self.L[col]
        V = qa / A
        Re = np.maximum(rho * V * D / mu, RE_FLOOR)
        f = darcy_friction(Re, self.eD[col])
        vh = V * V / (2.0 * G)
        h = f * (L / D) * vh
        if self.fit_groups:
            from kit.core.fittings import total_K_unchecked

            for pos, fittings, Dg, eps in self.fit_groups:
                h[pos] += total_K_unchecked(fittings, Re[pos], Dg, eps, f[pos]) * vh[pos]
        return h, Re

    def losses(self, Q, rho, mu):
        """Signed head loss h(Q) [m] and slope dh/dQ [s/m²] of every link; ``Q`` shaped
        (links,) or (links, m)."""
        Q = np.asarray(Q, dtype=float)
        h = np.zeros(Q.shape)
        s = np.zeros(Q.shape)
        if self.pipe_idx.size:
            q = Q[self.pipe_idx]
            qa = np.abs(q)
            q1 = np.maximum(qa, Q_SLOPE_FLOOR)
            q2 = q1 * (1.0 + _REL_STEP)
            hm, _ = self._pipe_mag(qa, rho, mu)
            h2, _ = self._pipe_mag(q2, rho, mu)
            h[self.pipe_idx] = np.sign(q) * hm
            s[self.pipe_idx] = (h2 - hm) / (q2 - qa)
        if self.kv_idx.size:
            q = Q[self.kv_idx]
            kv = self.kv.reshape((-1,) + (1,) * (Q.ndim - 1))
            r = KV_HEAD / (kv * kv)
            h[self.kv_idx] = r * q * np.abs(q)
            s[self.kv_idx] = 2.0 * r * np.maximum(np.abs(q), Q_SLOPE_FLOOR)
        for curve, idx in self.pump_groups:
            q = Q[idx]
            H0 = float(curve.shutoff_head)
            qe = float(curve.q_end)
            dq = _REL_STEP * qe
            qp = np.maximum(q, 0.0)
            gain = np.asarray(curve.head(qp), dtype=float)
            slope = -(np.asarray(curve.head(qp + dq), dtype=float) - gain) / dq
            floor = 1e-3 * H0 / qe
            back = max(-float(curve.head(dq) - H0) / dq, 0.1 * H0 / qe)
            slope = np.maximum(slope, floor)
            neg = q < 0
            gain = np.where(neg, H0 - back * q, gain)
            slope = np.where(neg, back, slope)
            h[idx] = -gain
            s[idx] = slope
        return h, s

    def reynolds(self, Q, rho, mu):
        Re = np.full(self.n, np.nan)
        if self.pipe_idx.size:
            Re[self.pipe_idx] = rho * np.abs(Q[self.pipe_idx]) / self.A * self.D / mu
        return Re


class _Pattern:
    """CSC structure of A12ᵀ D⁻¹ A12 for one set of open links, reused every iteration."""

    def __init__(self, nf, f, t):
        ff, tf = f < nf, t < nf
        both = ff & tf
        k = np.arange(f.size)
        rows = np.concatenate([f[ff], t[tf], f[both], t[both]])
        cols = np.concatenate([f[ff], t[tf], t[both], f[both]])
        self.src = np.concatenate([k[ff], k[tf], k[both], k[both]])
        self.sign = np.concatenate([np.ones(ff.sum() + tf.sum()), -np.ones(2 * both.sum())])
        keys = cols.astype(np.int64) * max(nf, 1) + rows
        uniq, self.inv = np.unique(keys, return_inverse=True)
        self.indices = (uniq % max(nf, 1)).astype(np.int32)
        colsu = uniq // max(nf, 1)
        self.indptr = np.searchsorted(colsu, np.arange(nf + 1)).astype(np.int32)
        self.nnz = uniq.size
        self.nf = nf

    def matrix(self, w, extra_diag=None):
        from scipy.sparse import csc_matrix

        data = np.bincount(self.inv, weights=w[self.src] * self.sign, minlength=self.nnz)
        M = csc_matrix((data, self.indices, self.indptr), shape=(self.nf, self.nf))
        if extra_diag is not None:
            M = M + _diag(extra_diag)
        return M


def _diag(v):
    from scipy.sparse import diags

    return diags(v, format="csc")


def _spsolve(M, b):
    from scipy.sparse.linalg import spsolve

    return spsolve(M, b, permc_spec="MMD_AT_PLUS_A")


def _gradient(st, active, Q, q, H0, rho, mu, tol, max_iter, dead_nodes, dense=False):
    """Newton iterations for one set of open links. Returns (Q, H_all, iterations, change)."""
    nf = st.nf
    act = np.flatnonzero(active)
    f, t = st.f[act], st.t[act]
    ff, tf = f < nf, t < nf
    pat = None if dense else _Pattern(nf, f, t)
    pad = np.zeros(nf)
    pad[dead_nodes] = 1.0
    # A10 H0 on each open link: +H0 at a fixed to node, −H0 at a fixed from node.
    b = np.zeros(act.size)
    b[~tf] += H0[t[~tf] - nf]
    b[~ff] -= H0[f[~ff] - nf]
    Q = Q.copy()
    Q[~active] = 0.0
    Hall = np.concatenate([np.zeros(nf), H0])
    Hf = np.zeros(nf + H0.size)
    rel = np.inf
    for it in range(1, max_iter + 1):
        h, s = st.losses(Q, rho, mu)
        qa = Q[act]
        w = 1.0 / s[act]
        e0 = h[act] + b
        x = qa - w * e0
        rhs = np.bincount(t[tf], x[tf], minlength=nf) - np.bincount(f[ff], x[ff], minlength=nf)
        rhs = rhs - q
        if nf:
            if dense:
                M = np.zeros((nf, nf))
                np.add.at(M, (f[ff], f[ff]), w[ff])
                np.add.at(M, (t[tf], t[tf]), w[tf])
                bb = ff & tf
                np.add.at(M, (f[bb], t[bb]), -w[bb])
                np.add.at(M, (t[bb], f[bb]), -w[bb])
                M[dead_nodes, dead_nodes] += 1.0
                H = np.linalg.solve(M, rhs)
            else:
                H = _spsolve(pat.matrix(w, pad if dead_nodes.size else None), rhs)
            Hall[:nf] = H
        Hf[:nf] = Hall[:nf]
        e = e0 - Hf[f] + Hf[t]  # e0 holds A10 H0 already; add A12 H only
        Qn = qa - w * e
        dQ = np.abs(Qn - qa).sum()
        tot = np.abs(Qn).sum()
        Q[act] = Qn
        rel = dQ / max(tot, Q_REF)
        # the flow change that round-off in the heads alone produces: below it, converged
        noise = 64.0 * np.finfo(float).eps * max(1.0, float(np.abs(Hall).max(initial=0.0))) \
            * float(w.sum())
        if not np.all(np.isfinite(Qn)):
            raise NoSolutionError("network solution", "the iteration diverged (non-finite "
                                  f"flows at iteration {it}); check pump curves and valve data")
        if rel < tol or dQ <= noise:
            res = np.bincount(t[tf], Qn[tf], minlength=nf) - np.bincount(f[ff], Qn[ff],
                                                                          minlength=nf) - q
            res[dead_nodes] = 0.0
            worst = float(np.abs(res).max(initial=0.0))
            if worst > 1e-10 * max(1.0, float(np.abs(q).sum())):
                raise NoSolutionError("network solution", f"continuity residual {worst:.3g} "
                                      "m³/s after convergence: the linear solve lost accuracy "
                                      "(valves nearly shut beside open pipes?)")
            return Q, Hall, it, rel
    raise NoSolutionError(
        "network solution", f"not converged after {max_iter} iterations (relative flow change "
        f"{rel:.3g}, asked < {tol:.3g}); check for pumps working far off their curves or "
        "valves nearly shut")


def _components(st, active):
    from scipy.sparse import coo_matrix
    from scipy.sparse.csgraph import connected_components

    n = st.nf + st.nb
    f, t = st.f[active], st.t[active]
    g = coo_matrix((np.ones(f.size), (f, t)), shape=(n, n))
    _, labels = connected_components(g, directed=False)
    fed = np.isin(labels, labels[st.nf:])
    return ~fed[:st.nf]


def _fixed_heads(net, levels, rho):
    H0 = np.empty(len(net.boundaries))
    if isinstance(levels, dict):
        unknown = set(levels) - set(net.boundary_names)
        if unknown:
            from kit.errors import UnknownChoiceError

            raise UnknownChoiceError("boundary in levels", sorted(unknown)[0],
                                     net.boundary_names)
    for i, bnd in enumerate(net.boundaries):
        which = levels.get(bnd.name, "low") if isinstance(levels, dict) else levels
        H0[i] = bnd.level(which) + (bnd.pressure - net.p_baro) / (rho * G)
    return H0


def solve(net, levels="low", demand_factor: float = 1.0, *, state=None, tol: float = 1e-10,
          max_iter: int = 100, dense: bool = False, initial=None,
          demands=None, physical: bool = True) -> NetworkResult:
    """Steady flows and heads of a network by the gradient method (Todini & Pilati 1988).

    Parameters
    ----------
    net : Network
        The network [-]
    levels : str or dict
        'low' or 'high' for every boundary, or {boundary name: 'low' | 'high' | level [m]};
        boundaries not named stay at 'low' [-]
    demand_factor : float
        Factor on every node's demand, ≥ 0 [-]
    state : LiquidState, optional
        Liquid state to use instead of the network's own [-]
    tol : float
        Convergence tolerance on Σ|ΔQ| / Σ|Q|, 1e-14–1e-3 [-]
    max_iter : int
        Newton iterations allowed per status round [-]
    dense : bool
        Solve the linear systems with dense ``numpy.linalg.solve`` (the naive way, for the
        benchmark) [-]
    initial : array_like, optional
        Starting link flows; defaults to 1 m/s in every bore [m³/s]
    demands : array_like, optional
        Demand at every node, replacing ``demand_factor`` × the nodes' own [m³/s]
    physical : bool
        Refuse a solution with a negative absolute pressure at a node (True); False keeps it
        (heads used as references, e.g. by the network curve) [-]

    Returns
    -------
    NetworkResult

    Raises
    ------
    NoSolutionError
        No convergence, status cycling, a pump that cannot meet the demand or the head asked,
        demand nodes cut off by closed non-return links.

    Examples
    --------
    See the module docstring.

    References
    ----------
    Todini, E., and Pilati, S. (1988). A gradient algorithm for the analysis of pipe networks.
    In Computer Applications in Water Supply, Vol. 1, pp. 1–20. Research Studies Press.
    """
    st_l = state if state is not None else net.state
    rho = check_range("liquid density", st_l.rho, "kg/m³", low=0.0)
    mu = check_range("liquid viscosity", st_l.mu, "Pa·s", low=0.0)
    lam = check_range("demand factor", demand_factor, "-", low=0.0, high=1e3, low_inclusive=True)
    tol = check_range("tolerance", tol, "-", low=1e-14, high=1e-3, low_inclusive=True)
    st = _static(net)
    H0 = _fixed_heads(net, levels, rho)
    if demands is None:
        q = np.array([n.demand for n in net.nodes], dtype=float) * lam
    else:
        q = np.array(demands, dtype=float)
        if q.shape != (len(net.nodes),) or not np.all(np.isfinite(q)):
            raise InputError("demands", q.shape, f"must hold one finite demand per node "
                             f"({len(net.nodes)})", "m³/s")
    if isinstance(max_iter, bool) or not isinstance(max_iter, (int, np.integer)):
        raise InputError("iterations allowed", max_iter, "must be a whole number")
    check_range("iterations allowed", max_iter, None, low=1, high=10000, low_inclusive=True)
    Q = st.Q_init.copy() if initial is None else np.array(initial, dtype=float)
    if Q.shape != (st.n,) or not np.all(np.isfinite(Q)):
        raise InputError("initial flows", Q.shape, f"must hold one finite flow per link "
                         f"({st.n})", "m³/s")
    is_open = np.ones(st.n, dtype=bool)
    flips = np.zeros(st.n, dtype=np.int64)
    asked = np.full(st.n, np.nan)
    total_it = 0
    names = net.link_names
    qtol_abs = 1e-12
    rounds = 0
    for _ in range(MAX_ROUNDS):
        rounds += 1
        dead = _components(st, is_open)
        if dead.any():
            _refuse_starved(net, st, dead, q, is_open, asked)
        f_dead = np.flatnonzero(dead)
        active = is_open.copy()
        if f_dead.size:
            touch = np.isin(st.f, f_dead) | np.isin(st.t, f_dead)
            active &= ~touch
        Q, Hall, it, rel = _gradient(st, active, Q, q, H0, rho, mu, tol, max_iter, f_dead,
                                     dense)
        total_it += it
        Hall[f_dead] = np.nan
        dH = Hall[st.f] - Hall[st.t]
        qscale = max(np.abs(Q).max(initial=0.0), 1e-9)
        close = st.check & active & (Q < -max(1e-9 * qscale, qtol_abs))
        reopen_cv = st.check & ~st.is_pump & ~is_open & (dH > 1e-9)
        reopen_p = st.is_pump & ~is_open & (-dH < st.shutoff - 1e-9)
        reopen = (reopen_cv | reopen_p) & np.isfinite(dH)
        change = close | reopen
        asked[close] = -dH[close]
        if not change.any():
            break
        is_open ^= change
        flips += change
        Q[close] = 0.0
        Q[reopen] = np.where(st.is_pump[reopen], 0.5 * st.q_end[reopen], 1e-6)
        if (flips > MAX_FLIPS).any():
            bad = [names[i] for i in np.flatnonzero(flips > MAX_FLIPS)]
            raise NoSolutionError("network solution", "non-return links keep opening and "
                                  "closing: " + ", ".join(f"'{b}'" for b in bad) +
                                  f" changed state more than {MAX_FLIPS} times")
    else:
        raise NoSolutionError("network solution", f"status of non-return links not settled "
                              f"after {MAX_ROUNDS} rounds")
    Q[~active] = 0.0
    _refuse_pump_runout(net, st, Q)
    res = NetworkResult(net, st_l, H0, Q, Hall, is_open, active, total_it, rounds, rel, q,
                        _levels_text(levels), float(lam))
    if physical:
        _refuse_negative_pressure(res, st)
    return res


def _levels_text(levels) -> str:
    if isinstance(levels, dict):
        return ", ".join(f"{k}: {v}" for k, v in levels.items()) or "low"
    return str(levels)


def _static(net) -> _Static:
    st = net.__dict__.get("_solver_static")
    if st is None:
        st = _Static(net)
        net.__dict__["_solver_static"] = st
    return st


def _refuse_starved(net, st, dead, q, is_open, asked):
    starved = dead & (np.abs(q) > 0)
    if not starved.any():
        return
    dead_idx = np.flatnonzero(dead)
    nodes = [net.nodes[i].name for i in np.flatnonzero(starved)]
    shut = np.flatnonzero(~is_open & (np.isin(st.f, dead_idx) | np.isin(st.t, dead_idx)))
    shown = ", ".join(f"'{n}'" for n in nodes[:10]) + (" …" if len(nodes) > 10 else "")
    if shut.size:
        parts = []
        for i in shut:
            name = net.links[i].name
            if st.is_pump[i]:
                parts.append(f"pump '{name}' (asked {asked[i]:.4g} m against its shut-off head "
                             f"{st.shutoff[i]:.4g} m: it cannot meet the head asked)")
            else:
                parts.append(f"'{name}'")
        raise NoSolutionError(
            "network solution", f"check valve closed on every path to nodes {shown}, which "
            f"have demand: {', '.join(parts)} held shut by the heads around them")
    raise NoSolutionError("network solution", f"nodes {shown} have demand and no open path to "
                          "a fixed head")


def _refuse_pump_runout(net, st, Q):
    for curve, idx in st.pump_groups:
        for i in idx:
            if Q[i] > 0 and float(curve.head(Q[i])) <= 0.0:
                raise NoSolutionError(
                    "network solution",
                    f"pump '{net.links[i].name}' cannot meet the demand: it would run at "
                    f"{Q[i]:.4g} m³/s, beyond the flow where its curve falls to zero head "
                    f"(last datasheet flow {curve.q_end:.4g} m³/s)")


def _refuse_negative_pressure(res, st):
    p = res.p_abs[:st.nf]
    bad = np.flatnonzero(np.isfinite(p) & (p < 0.0))
    if not bad.size:
        return
    net = res.net
    names = ", ".join(f"'{net.nodes[i].name}'" for i in bad[:10])
    worst = float(p[bad].min())
    pumps = []
    for curve, idx in st.pump_groups:
        for i in idx:
            if res.is_open[i]:
                pumps.append(f"pump '{net.links[i].name}' makes {-res.head_loss[i]:.4g} m at "
                             f"{res.Q[i]:.4g} m³/s (shut-off head {curve.shutoff_head:.4g} m)")
    why = ("; " + "; ".join(pumps) + " — it cannot meet the head asked") if pumps else ""
    raise NoSolutionError(
        "network solution", f"the demand cannot be delivered: the absolute pressure at nodes "
        f"{names} would fall below zero (lowest {worst:.4g} Pa); the supply head is too low for "
        f"the elevations and losses{why}")


@dataclass(frozen=True, eq=False)
class NetworkResult:
    """A solved network: flows, velocities and head losses of links; heads and pressures of nodes.

    Arrays follow the network's order: links as ``net.links``; nodes as ``net.nodes`` then
    ``net.boundaries``. Heads are on the gauge basis H = z + (p − p_baro)/(ρg) [m];
    pressures absolute [Pa] (``p_gauge`` against ``p_baro``).

    Attributes
    ----------
    net : Network
        The network solved
    state : LiquidState
        The liquid state used
    H0 : ndarray
        Fixed head of every boundary at the solved levels [m]
    Q : ndarray
        Flow in every link, signed along its drawn direction [m³/s]
    H : ndarray
        Head at every node then boundary [m]; NaN where cut off by closed links
    is_open : ndarray of bool
        False for non-return links held shut
    active : ndarray of bool
        Links in the final solve (open and not cut off)
    iterations : int
        Newton iterations over all status rounds
    rounds : int
        Status rounds (solve, re-test non-return links)
    rel_change : float
        Σ|ΔQ| / Σ|Q| at the last iteration [-]
    demand : ndarray
        Demand used at every node [m³/s]
    levels : str
        The boundary levels solved for
    demand_factor : float
        Factor applied to the nodes' demands [-]
    """

    net: object
    state: object
    H0: np.ndarray
    Q: np.ndarray
    H: np.ndarray
    is_open: np.ndarray
    active: np.ndarray
    iterations: int
    rounds: int
    rel_change: float
    demand: np.ndarray
    levels: str = "low"
    demand_factor: float = 1.0

    # ------------------------------------------------------------------ links
    @property
    def link_names(self) -> tuple[str, ...]:
        return self.net.link_names

    @property
    def node_names(self) -> tuple[str, ...]:
        return self.net.node_names + self.net.boundary_names

    @cached_property
    def velocity(self) -> np.ndarray:
        """Mean velocity in each link's bore [m/s] (NaN where a link has no bore: pumps,
        valves given without a diameter)."""
        return self.Q / _static(self.net).area

    @cached_property
    def head_loss(self) -> np.ndarray:
        """H_from − H_to of each link [m]: the loss along the drawn direction (negative across
        a running pump: its head gain; NaN where an end has no defined head)."""
        st = _static(self.net)
        return self.H[st.f] - self.H[st.t]

    @cached_property
    def status(self) -> tuple[str, ...]:
        """'open' or 'closed' (a non-return link held shut) for each link."""
        return tuple("open" if o else "closed" for o in self.is_open)

    @cached_property
    def reynolds(self) -> np.ndarray:
        """Reynolds number in each pipe link [-] (NaN for other links)."""
        return _static(self.net).reynolds(self.Q, self.state.rho, self.state.mu)

    # ------------------------------------------------------------------ nodes
    @cached_property
    def elevation(self) -> np.ndarray:
        """Elevation of every node and boundary surface (at the solved level) [m]."""
        z = self.net.elevation()
        nf = len(self.net.nodes)
        rho = self.state.rho
        z[nf:] = [h - (b.pressure - self.net.p_baro) / (rho * G)
                  for b, h in zip(self.net.boundaries, self.H0, strict=True)]
        return z

    @cached_property
    def p_abs(self) -> np.ndarray:
        """Absolute pressure at every node and boundary surface [Pa]."""
        return self.net.p_baro + self.state.rho * G * (self.H - self.elevation)

    @property
    def p_gauge(self) -> np.ndarray:
        """Gauge pressure [Pa] against the network's barometric pressure."""
        return self.p_abs - self.net.p_baro

    # ------------------------------------------------------------------ checks
    @cached_property
    def continuity_residual(self) -> np.ndarray:
        """Inflow − outflow − demand at every free node [m³/s]."""
        st = _static(self.net)
        nf = st.nf
        r = -self.demand.copy()
        tf, ff = st.t < nf, st.f < nf
        r += np.bincount(st.t[tf], self.Q[tf], minlength=nf)
        r -= np.bincount(st.f[ff], self.Q[ff], minlength=nf)
        return r

    @cached_property
    def energy_residual(self) -> np.ndarray:
        """h(Q) − (H_from − H_to) on every open link [m] (0 for closed links)."""
        st = _static(self.net)
        h, _ = st.losses(self.Q, self.state.rho, self.state.mu)
        out = h - self.head_loss
        return np.where(self.active, out, 0.0)

    # ------------------------------------------------------------------ lookups
    def flow(self, link: str) -> float:
        """Flow in a link [m³/s], signed along its drawn direction."""
        return float(self.Q[self._link(link)])

    def head_at(self, node: str) -> float:
        """Head at a node or boundary [m] (gauge basis)."""
        return float(self.H[self._node(node)])

    def pressure_at(self, node: str) -> float:
        """Absolute pressure at a node or boundary surface [Pa]."""
        return float(self.p_abs[self._node(node)])

    def _link(self, name):
        from kit.errors import UnknownChoiceError

        try:
            return self.link_names.index(name)
        except ValueError:
            raise UnknownChoiceError("link", name, self.link_names) from None

    def _node(self, name):
        from kit.errors import UnknownChoiceError

        try:
            return self.node_names.index(name)
        except ValueError:
            raise UnknownChoiceError("node", name, self.node_names) from None

    def links_table(self) -> list[dict]:
        """One dict per link: name, kind, from, to, status, Q [m³/s], V [m/s], h [m]."""
        return [{"name": k.name, "kind": k.kind, "from": k.from_node, "to": k.to_node,
                 "status": s, "Q": float(q), "V": float(v), "head_loss": float(h)}
                for k, s, q, v, h in zip(self.net.links, self.status, self.Q, self.velocity,
                                         self.head_loss, strict=True)]

    def nodes_table(self) -> list[dict]:
        """One dict per node then boundary: name, z [m], demand [m³/s], H [m], p [Pa abs],
        p_gauge [Pa]."""
        dem = list(self.demand) + [np.nan] * len(self.net.boundaries)
        return [{"name": n, "z": float(z), "demand": float(d), "H": float(h), "p": float(p),
                 "p_gauge": float(p - self.net.p_baro)}
                for n, z, d, h, p in zip(self.node_names, self.elevation, dem, self.H,
                                         self.p_abs, strict=True)]

    def npsh_available(self, pump: str) -> float:
        """NPSH available at a pump link's suction node [m]: (p_abs − pv)/(ρg) at the node
        (elevation = the pump's suction datum; the velocity head there is left out, which errs
        low, the cautious side). Definition as ANSI/HI 9.6.1 (from memory). NaN where the
        suction end is a boundary (its connection elevation is not modelled)."""
        i = self._link(pump)
        k = self.net.links[i]
        if not isinstance(k, PumpLink):
            from kit.errors import UnknownChoiceError

            raise UnknownChoiceError("pump", pump, [x.name for x in self.net.links
                                                    if isinstance(x, PumpLink)])
        pv = self.state.require_pv("NPSH available") if hasattr(self.state, "require_pv") \
            else self.state.pv
        j = self._node(k.from_node)
        if j >= len(self.net.nodes):
            return float("nan")
        return float((self.p_abs[j] - pv) / (self.state.rho * G))

    @property
    def cautions(self) -> list[str]:
        """Standing cautions for a network result (kit.core.findings.CAUTIONS): pressure,
        water hammer, vacuum, cavitation, and pumps where there are any."""
        from kit.core.findings import cautions_for

        topics = ["pressure", "water_hammer", "vacuum", "cavitation"]
        if any(isinstance(k, PumpLink) for k in self.net.links):
            topics.append("pump")
        if getattr(self.state, "flammable", False):
            topics.append("flammable")
        return cautions_for(*topics)

    def findings(self, duty="general_transfer", margin_head: float | None = None) -> list[Finding]:
        """Findings on this solution; see :func:`network_findings`."""
        return network_findings(self, duty=duty, margin_head=margin_head)


def network_findings(res: NetworkResult, duty="general_transfer",
                     margin_head: float | None = None) -> list[Finding]:
    """Checks on a solved network.

    - velocity and pressure drop per length of every pipe link against a duty class of
      :data:`kit.core.criteria.DUTY_CLASSES` (``duty`` a key, or {link name: key}; common
      practice, no source);
    - every node against vapour pressure (FAIL at or below, CHECK within ``margin_head``) and
      atmospheric (CHECK below: vacuum), via :func:`kit.core.line.vapour_findings`;
    - every node against its minimum residual pressure (FAIL below);
    - reverse flow in a link (CHECK: flow against the drawn direction), non-return links held
      shut (CHECK), nodes whose head is undefined (CHECK);
    - control valves near fully open or closed, balancing valves near fully open
      (:data:`FINDING_LIMITS`), transition-zone Reynolds numbers, pumps beyond their datasheet,
      NPSH margin of running pumps that have an NPSHr curve (kit.core.operating.npsh_findings).
    """
    from kit.core.criteria import DUTY_CLASSES
    from kit.core.line import Profile, Station, vapour_findings

    net = res.net
    lim = FINDING_LIMITS
    margin = lim["vapour_margin_head"] if margin_head is None else check_range(
        "vapour margin", margin_head, "m", low=0.0, high=100.0, low_inclusive=True)
    out: list[Finding] = []
    rho = res.state.rho
    # flows within round-off of zero (a dead leg, an expansion-vessel line) are no flow: no
    # velocity class applies and their sign means nothing (the solver's closing tolerance)
    q_eps = still_flow(res.Q)
    for i, k in enumerate(net.links):
        subj = f"link '{k.name}'"
        Q = float(res.Q[i])
        still = abs(Q) <= q_eps
        if isinstance(k, PipeLink) and still and res.is_open[i]:
            out.append(Finding(Severity.PASS, subj, "flow", Q, "m³/s", "no flow",
                               "no flow through this pipe (a dead leg or a vessel line): no "
                               "velocity class applies", "common practice, no source"))
        elif isinstance(k, PipeLink):
            key = duty.get(k.name, "general_transfer") if isinstance(duty, dict) else duty
            dc = DUTY_CLASSES[key]
            dp = rho * G * abs(float(res.head_loss[i])) / k.segment.length
            out += dc.check(subj, abs(float(res.velocity[i])), dp)
            out += transition_findings(subj, [res.reynolds[i]])
        if not res.is_open[i]:
            what = "pump held shut by its non-return valve" if k.kind == "pump" else \
                "non-return valve held shut by the heads around it"
            out.append(Finding(Severity.CHECK, subj, "flow", 0.0, "m³/s", "> 0 m³/s",
                               what + ("; a pump must not run dead-headed" if k.kind == "pump"
                                       else ""), "common practice, no source"))
        elif Q < -q_eps and not k.check:
            out.append(Finding(Severity.CHECK, subj, "flow", Q, "m³/s", ">= 0 m³/s",
                               f"flow runs against the drawn direction ('{k.to_node}' → "
                               f"'{k.from_node}')", "common practice, no source"))
        if isinstance(k, PumpLink) and res.is_open[i]:
            out += k.curve.range_findings(Q, subject=subj)
            if k.curve.has_npshr and getattr(res.state, "pv", None) is not None:
                a = res.npsh_available(k.name)
                if np.isfinite(a):
                    from kit.core.operating import npsh_findings

                    out += npsh_findings(a, float(k.curve.npshr(Q)), subject=subj)
        if isinstance(k, ControlValveLink):
            x = k.opening
            if x > lim["valve_open_above"]:
                out.append(Finding(Severity.CHECK, subj, "opening", x, "-",
                                   f"<= {lim['valve_open_above']:.2g}", "control valve near "
                                   "fully open: little control range left", lim["source"],
                                   high=lim["valve_open_above"]))
            elif x < lim["valve_closed_below"]:
                out.append(Finding(Severity.CHECK, subj, "opening", x, "-",
                                   f">= {lim['valve_closed_below']:.2g}", "control valve near "
                                   "closed: poor control, erosion and noise", lim["source"],
                                   low=lim["valve_closed_below"]))
        if isinstance(k, BalancingValveLink) and k.kv_max:
            x = k.kv / k.kv_max
            if x > lim["valve_open_above"]:
                out.append(Finding(Severity.CHECK, subj, "Kv / Kv fully open", x, "-",
                                   f"<= {lim['valve_open_above']:.2g}", "balancing valve near "
                                   "fully open: it cannot add resistance here", lim["source"]))
            elif x < lim["valve_closed_below"]:
                out.append(Finding(Severity.CHECK, subj, "Kv / Kv fully open", x, "-",
                                   f">= {lim['valve_closed_below']:.2g}", "balancing valve near "
                                   "closed: poor accuracy, blockage risk", lim["source"]))
    pv = getattr(res.state, "pv", None)
    nf = len(net.nodes)
    for i, name in enumerate(res.node_names[:nf]):
        subj = f"node '{name}'"
        p = float(res.p_abs[i])
        if not np.isfinite(p):
            out.append(Finding(Severity.CHECK, subj, "head", float("nan"), "m", "defined",
                               "node cut off from every fixed head by closed non-return links; "
                               "its pressure is undefined (trapped liquid)",
                               "common practice, no source"))
            continue
        z = float(res.elevation[i])
        stn = Station(name, 0.0, z, p, p - net.p_baro, 0.0, float(res.H[i]), float(res.H[i]))
        prof = Profile(net.name, 0.0, (stn,), net.p_baro, rho)
        if pv is None:
            raise InputError("vapour pressure", None, "is needed for the vacuum check at every "
                             "node: this liquid has no vapour-pressure model, give a value")
        out += vapour_findings(prof, pv, margin, subject=subj)
        pmin = net.nodes[i].min_pressure
        if pmin is not None:
            sev = Severity.FAIL if p < pmin else Severity.PASS
            out.append(Finding(sev, subj, "pressure", p, "Pa", f">= {pmin:.6g} Pa abs",
                               "minimum residual pressure at the node", "user's requirement",
                               low=pmin))
    return out
