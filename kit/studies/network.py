"""The network study: flows and pressures of a branched or looped system over its band, the
balancing-valve settings, control-valve sizing, the network curve, and the integrity screen.

Steps (each a published method or a stated rule):

1. **Balancing** (where balancing valves give a ``design_flow``): with every such valve's
   branch at its design flow and the control valves at their design opening, the index
   valve stays fully open and every other valve is set to take up its branch's excess head
   (:func:`kit.core.network_curve.balance`; common practice, no source). The settings are
   then applied to every case.
2. **Design and band**: the network is solved by the global gradient method (Todini &
   Pilati 1988, :mod:`kit.core.network_solve`) at the design condition and at every member
   of the band (boundary levels × liquid temperatures × pipe age); findings per link and node
   (velocity, vapour and vacuum, minimum residual pressure, reverse flow, valves near their
   limits, pump range and NPSH).
3. **Control valves** (IEC 60534-2-1 through ``fluids``, :func:`kit.core.valves.size_control_valve`):
   normal case = the design solution's flow and end pressures; minimum and maximum cases (where
   the file gives ``flow_min``/``flow_max``) hold the differential across the valve's series
   branch at its design value and scale the rest of the branch's losses with the square of
   the flow (a differential-pressure-controlled pump or stiff headers; common practice, no
   source). Authority = Δp_valve / (Δp_valve + Δp of the rest of the controlled circuit) at
   design (common practice, no source).
4. **Network curve** (:func:`kit.core.network_curve.network_curve`): the head the pump must
   make against the network over a flow range and the band; the **index circuit** is the path
   to the index node (supply networks) or, for a balanced circuit, the flow path through the
   index balancing valve back to the pump.
5. **Integrity** (:func:`kit.studies.integrity.screen_line`) for every pipe link: highest
   pressure with the governing case (the pump at shut-off on the highest suction pressure —
   applied to every pipe, as valves may close anywhere — the standing column, the running
   pressure plus the closure surge), the pipe's rating, and the water-hammer screen; the
   pump-trip down-surge at every pump's discharge node and at the high points of an open
   network (a closed circuit is said not to be screened for it, with the reason).

Example
-------
>>> from kit.notebook import scenario_path
>>> from kit import scenario as scn
>>> s = study(scn.load(scenario_path("fenwick_yard_chilled_water.toml")))
>>> s.balance.index_valve, round(s.design.flow("BV-2") * 3600, 1)
('BV-3', 11.1)
"""

from __future__ import annotations

from collections import deque
from dataclasses import dataclass, field
from dataclasses import replace as dc_replace

import numpy as np

from kit.core.constants import G
from kit.core.findings import Finding, Severity, cautions_for, worst
from kit.core.friction import FRICTION_METHOD
from kit.core.network_model import PipeLink, PumpLink
from kit.core.network_solve import METHOD as SOLVE_METHOD
from kit.core.network_solve import Q_ZERO
from kit.errors import HeadlineError, InputError, NoSolutionError
from kit.inputs.network import NetworkInputs, inputs
from kit.results import Results
from kit.studies.integrity import METHODS as INTEGRITY_METHODS
from kit.studies.integrity import screen_line

__all__ = ["NetworkStudy", "study", "results_of", "compute", "case_label", "series_branch",
           "is_closed_circuit", "column_upstream", "tables", "VALVE_CASES"]

#: Labels of the control-valve sizing cases.
VALVE_CASES = ("minimum", "normal", "maximum")

_RULE = "common practice, no source"


def case_label(level: str, T: float, condition: str) -> str:
    """The label of a band member, as the network curve writes it.

    >>> case_label("low", 279.15, "new")
    'low level / 6 °C / new'
    """
    return f"{level} level / {T - 273.15:.4g} °C / {condition}"


@dataclass
class NetworkStudy:
    """Everything the network study computed (SI; pressures absolute).

    Attributes
    ----------
    inputs : NetworkInputs
    network : Network
        The core network at the design condition, balancing settings applied
    design : NetworkResult
        Solution at the design condition and design demands
    design_label : str
        Its band label
    cases : dict
        Band label → NetworkResult (every member that has a solution)
    failed : dict
        Band label → why it has no solution
    curve : NetworkCurve or None
        The network curve (None: no pump link, or not applicable — ``curve_note`` says why)
    valves : dict
        Control-valve name → ValveSizing
    balance : Balance or None
        Balancing settings (None: nothing to balance, or not possible — ``balance_note``)
    settings : dict
        Balancing-valve name → Kv applied [m³/h]
    index_circuit : tuple of str
        Link names of the index circuit ('' entries never; empty when undefined)
    index_node : str or None
    pump : str or None
        The pump link the curve and the balance are for
    integrity : dict
        Pipe link name → IntegrityScreen
    findings : list of Finding
    """

    inputs: NetworkInputs
    network: object
    design: object
    design_label: str
    cases: dict
    failed: dict
    curve: object | None
    curve_note: str
    valves: dict
    balance: object | None
    balance_note: str
    settings: dict
    index_circuit: tuple
    index_node: str | None
    pump: str | None
    integrity: dict
    findings: list = field(default_factory=list)
    valve_notes: dict = field(default_factory=dict)

    @property
    def verdict(self) -> str:
        return worst(self.findings).value if self.findings else "pass"


# ---------------------------------------------------------------- helpers


def _pump_name(inp: NetworkInputs) -> str | None:
    if inp.curve.pump is not None:
        return inp.curve.pump
    pumps = [k.name for k in inp.links if isinstance(k, PumpLink)]
    return pumps[0] if len(pumps) == 1 else None


def series_branch(net, name: str) -> tuple[tuple[str, ...], tuple[str, ...]]:
    """The links in series with link ``name``: (upstream, downstream), each in flow order.

    A run continues through free nodes that join exactly two links and draw no demand; it
    stops at a junction, a demand node or a boundary.

    >>> from kit.notebook import scenario_path
    >>> from kit import scenario as scn
    >>> net = inputs(scn.load(scenario_path("fenwick_yard_chilled_water.toml"))).network()
    >>> series_branch(net, "TV-2")
    (('AHU-2 branch', 'AHU-2 coil'), ('BV-2',))
    """
    nf = len(net.nodes)
    idx = net.index
    f, t = net.ends
    touching: dict = {}
    for i in range(len(net.links)):
        touching.setdefault(int(f[i]), []).append(i)
        touching.setdefault(int(t[i]), []).append(i)
    k0 = net.link_names.index(name)

    def walk(node, came):
        out = []
        while node < nf and len(touching.get(node, ())) == 2 and net.nodes[node].demand == 0:
            nxt = [i for i in touching[node] if i != came]
            if not nxt or nxt[0] == k0:
                break
            came = nxt[0]
            out.append(came)
            node = int(f[came]) if int(t[came]) == node else int(t[came])
        return out

    up = walk(idx[net.links[k0].from_node], k0)
    down = walk(idx[net.links[k0].to_node], k0)
    names = net.link_names
    return tuple(names[i] for i in reversed(up)), tuple(names[i] for i in down)


def _flow_loss(res, name: str) -> float:
    """Head lost along the flow in a link [m] (positive for a loss)."""
    i = res.link_names.index(name)
    return float(res.head_loss[i] * np.sign(res.Q[i]))


def _flow_path(res, start: str, goal: str, skip=()) -> tuple[str, ...] | None:
    """Fewest links from node ``start`` to node ``goal`` along the solved flow directions."""
    net = res.net
    adj: dict = {}
    for i, k in enumerate(net.links):
        if not res.active[i] or k.name in skip or res.Q[i] == 0:
            continue
        a, b = (k.from_node, k.to_node) if res.Q[i] > 0 else (k.to_node, k.from_node)
        adj.setdefault(a, []).append((b, k.name))
    prev = {start: None}
    q = deque([start])
    while q:
        u = q.popleft()
        if u == goal:
            break
        for v, name in adj.get(u, ()):
            if v not in prev:
                prev[v] = (u, name)
                q.append(v)
    if goal not in prev:
        return None
    path = []
    u = goal
    while prev[u] is not None:
        u, name = prev[u]
        path.append(name)
    return tuple(reversed(path))


def _at_case(f: Finding, label: str) -> Finding:
    return dc_replace(f, subject=f"{f.subject} at {label}")


# ---------------------------------------------------------------- the study


def study(sc, inp: NetworkInputs | None = None) -> NetworkStudy:
    """Run the network study of a ``network`` scenario (see the module docstring)."""
    from kit.core.network_curve import balance as balance_fn

    inp = inp or inputs(sc)
    band = inp.band
    pump = _pump_name(inp)
    findings: list[Finding] = []
    T_d = inp.design_T
    base = inp.network(band.design_condition, T_d)
    settings = {k: b.kv for k, b in inp.balancing_valves.items() if b.kv is not None}
    bal, bal_note = None, ""
    if inp.balancing:
        if pump is None:
            bal_note = ("not balanced: the network has no single pump link to balance against "
                        "(name it in [curve] pump)")
        else:
            try:
                bal = balance_fn(base, inp.balancing, pump, levels=band.design_level)
                settings.update(bal.kv)
            except (InputError, NoSolutionError) as exc:
                bal_note = f"not balanced: {exc}"
        if bal is None:
            findings.append(Finding(Severity.CHECK, "balancing valves", "setting", float("nan"),
                                    "-", "balanced to the design flows",
                                    f"{bal_note}; the valves to balance are left fully open",
                                    _RULE))
    net = inp.network(band.design_condition, T_d, settings)
    label_d = case_label(band.design_level, T_d, band.design_condition)
    design = net.solve(band.design_level)
    cases, failed = {}, {}
    nets = {}
    for lv in band.levels:
        for T in inp.temperatures:
            for cond in band.conditions:
                lab = case_label(lv, T, cond)
                if lab == label_d:
                    cases[lab] = design
                    continue
                key = (T, cond)
                if key not in nets:
                    nets[key] = inp.network(cond, T, settings)
                try:
                    cases[lab] = nets[key].solve(lv)
                except NoSolutionError as exc:
                    failed[lab] = str(exc)
                    findings.append(Finding(Severity.FAIL, f"network at {lab}", "solution",
                                            float("nan"), "-", "a steady solution",
                                            str(exc), "Todini & Pilati (1988)"))
    if label_d not in cases:
        cases = {label_d: design, **cases}
    # findings of the solutions: the design case in full, the others where not a pass
    duty = {k.name: inp.pipe_duty.get(k.name, inp.duty) for k in net.links
            if isinstance(k, PipeLink)}
    for lab, res in cases.items():
        fs = res.findings(duty=duty, margin_head=inp.vapour_margin)
        if lab == label_d:
            findings += [_at_case(f, lab) for f in fs]
        else:
            findings += [_at_case(f, lab) for f in fs if f.severity != Severity.PASS]
    if bal is not None and pump is not None:
        findings += _pump_excess(design, bal, pump)
    valves, notes = _size_valves(inp, net, design, findings)
    curve, curve_note = _curve(inp, net, design, pump)
    index_node, circuit = _index(inp, net, design, curve, bal, pump, label_d)
    integ = _integrity(inp, net, cases, findings)
    s = NetworkStudy(inp, net, design, label_d, cases, failed, curve, curve_note, valves, bal,
                     bal_note, settings, circuit, index_node, pump, integ, findings, notes)
    return s


def _pump_excess(design, bal, pump) -> list[Finding]:
    """The pump's head at the balanced design flow against the head the balance needs."""
    k = design.net.link(pump)
    H = float(k.curve.head(bal.pump_flow))
    excess = H - bal.pump_head
    lim = max(0.05 * bal.pump_head, 0.5)
    if excess < 0:
        return [Finding(Severity.FAIL, f"pump '{pump}'", "head at the design flow", H, "m",
                        f">= {bal.pump_head:.4g} m (balanced circuit)", "the pump cannot make "
                        "the head the balanced circuit needs at the design flow", _RULE,
                        low=bal.pump_head)]
    sev = Severity.CHECK if excess > lim else Severity.PASS
    return [Finding(sev, f"pump '{pump}'", "excess head at the design flow", excess, "m",
                    f"<= {lim:.3g} m", "head above what the balanced circuit needs: every "
                    "branch then runs above its design flow; trim the impeller or set the "
                    "speed" if sev == Severity.CHECK else "pump head matches the balanced "
                    "circuit", _RULE, high=lim)]


def _size_valves(inp, net, design, findings):
    from kit.core.valves import ValveCase, critical_pressure, size_control_valve

    out, notes = {}, {}
    st = design.state
    rho = st.rho
    pv = st.require_pv("control-valve sizing") if hasattr(st, "require_pv") else st.pv
    pc, _ = critical_pressure(inp.liquid)
    for name, v in inp.valves.items():
        i = design.link_names.index(name)
        k = net.links[i]
        qn = float(design.Q[i])
        subj = f"control valve '{name}'"
        if not qn > 0:
            notes[name] = "not sized: no forward flow at design"
            findings.append(Finding(Severity.CHECK, subj, "flow at design", qn, "m³/s", "> 0",
                                    "no forward flow through the valve at design: not sized",
                                    _RULE))
            continue
        p1 = design.pressure_at(k.from_node)
        p2 = design.pressure_at(k.to_node)
        up, down = series_branch(net, name)
        h_up = sum(_flow_loss(design, n) for n in up)
        h_down = sum(_flow_loss(design, n) for n in down)
        rest = v.circuit if v.circuit is not None else up + down
        dp_rest = max(rho * G * sum(_flow_loss(design, n) for n in rest), 0.0)
        cases = []
        for lab, q in (("minimum", v.flow_min), ("normal", qn), ("maximum", v.flow_max)):
            if q is None:
                continue
            r2 = 1.0 - (q / qn) ** 2
            a = p1 + rho * G * h_up * r2
            b = p2 - rho * G * h_down * r2
            if not (a > b > 0):
                findings.append(Finding(Severity.FAIL, f"{subj} at {lab} flow", "pressure drop",
                                        a - b, "Pa", "> 0", "the branch cannot pass this flow at "
                                        "its design differential, even with the valve wide open",
                                        _RULE, low=0.0))
                continue
            cases.append(ValveCase(lab, q, a, b))
        try:
            sz = size_control_valve(cases, rho=rho, mu=st.mu, pv=pv, pc=pc,
                                    kv_rated=v.kv_rated, characteristic=v.characteristic,
                                    rangeability=v.rangeability, FL=v.FL, Fd=v.Fd, xFz=v.xFz,
                                    dp_rest=dp_rest, design="normal", name=subj)
        except HeadlineError as exc:
            notes[name] = f"not sized: {exc}"
            findings.append(Finding(Severity.FAIL, subj, "sizing", float("nan"), "-",
                                    "sized per IEC 60534-2-1", f"not sized: {exc}",
                                    "IEC 60534-2-1"))
            continue
        out[name] = sz
        findings += list(sz.findings)
    return out, notes


def _curve(inp, net, design, pump):
    from kit.core.network_curve import network_curve

    if pump is None:
        pumps = [k.name for k in net.links if isinstance(k, PumpLink)]
        why = "no pump link" if not pumps else (f"{len(pumps)} pump links; name one in "
                                                "[curve] pump")
        return None, f"no network curve: {why}"
    q_d = design.flow(pump)
    q_max = inp.curve.flow_max if inp.curve.flow_max is not None else 1.5 * q_d
    if not q_max > 0:
        return None, f"no network curve: pump '{pump}' passes no flow at design; give [curve] " \
                     "flow_max"
    Q = np.linspace(0.0, q_max, inp.curve.points)
    try:
        c = network_curve(net, Q, pump, levels=inp.band.levels,
                          states=tuple(inp.state(T) for T in inp.temperatures),
                          conditions=inp.band.conditions)
    except (InputError, NoSolutionError) as exc:
        return None, f"no network curve: {exc}"
    return c, ""


def _index(inp, net, design, curve, bal, pump, label_d):
    """(index node or None, index circuit link names)."""
    if curve is not None and curve.paths:
        try:
            m = curve.labels.index(label_d)
        except ValueError:
            m = 0
        j = int(np.argmin(np.abs(curve.Q - design.flow(pump))))
        node = curve.index_node[m][j] or None
        if node:
            return node, tuple(curve.index_circuit(m, j))
    if bal is not None and pump is not None:
        pk = net.link(pump)
        kv = net.link(bal.index_valve)
        a = _flow_path(design, pk.to_node, kv.from_node, skip=(pump,))
        b = _flow_path(design, kv.to_node, pk.from_node, skip=(pump,))
        if a is not None and b is not None:
            return None, a + (bal.index_valve,) + b
    # the node nearest its minimum pressure, reached from the pump (or a boundary) by the flow
    best, margin = None, np.inf
    for i, n in enumerate(net.nodes):
        if n.min_pressure is not None and np.isfinite(design.p_abs[i]):
            mgn = float(design.p_abs[i] - n.min_pressure)
            if mgn < margin:
                best, margin = n.name, mgn
    if best is None:
        return None, ()
    starts = [net.link(pump).to_node] if pump is not None else list(net.boundary_names)
    for s in starts:
        p = _flow_path(design, s, best)
        if p is not None:
            return best, p
    return best, ()


def _integrity(inp, net, cases, findings) -> dict:
    """screen_line for every pipe link, over every solved case."""
    out = {}
    T = inp.T_max
    st_hot = inp.state(inp.T_max)
    st_cold = inp.state(inp.T_min)
    rho = max(st_hot.rho, st_cold.rho)
    pv = getattr(st_hot, "pv", None)
    z = {n.name: n.elevation for n in net.nodes}
    names = net.node_names + net.boundary_names
    # the pump whose shut-off gives the highest discharge head, on its highest suction
    shut = None
    for k in net.links:
        if isinstance(k, PumpLink):
            ps = max(r.pressure_at(k.from_node) for r in cases.values())
            H0 = float(k.curve.shutoff_head)
            zs = z.get(k.from_node)
            if zs is None:
                continue
            score = H0 + (ps - inp.p_baro) / (rho * G) + zs
            if shut is None or score > shut[0]:
                shut = (score, H0, ps, zs)
    closed = is_closed_circuit(net)
    trip_nodes = _trip_nodes(net)
    if shut is not None and closed:
        findings.append(Finding(
            Severity.CHECK, "pump trip", "down-surge", float("nan"), "Pa", "screened",
            "not screened: a closed circuit (one fixed head, no draw-off) decelerates with the "
            "pump's run-down against the loop's inertia, which the instantaneous-stop bound "
            "does not model; a transient analysis by a qualified engineer is required where the "
            "loop is long or its valves close fast", "kit.studies.network"))
    top = max(inp.boundaries, key=lambda b: b.level_high + (b.pressure - inp.p_baro) /
              (rho * G))
    columns = [column_upstream(r) for r in cases.values()]
    for i, k in enumerate(net.links):
        if not isinstance(k, PipeLink):
            continue
        ends = [e for e in (k.from_node, k.to_node) if e in z]
        z_low = min(z[e] for e in ends) if ends else top.level_low
        V = [abs(float(r.velocity[i])) for r in cases.values() if np.isfinite(r.velocity[i])]
        # the column a valve at this pipe's downstream end stops: the whole flowing path back
        # to a fixed head or a pump, not this pipe alone (the largest over the band)
        L_col = max([c[k.name][0] for c in columns if k.name in c] or [k.segment.length])
        V_col = max([c[k.name][1] for c in columns if k.name in c] or [0.0])
        P = [r.p_abs[names.index(e)] for r in cases.values()
             for e in (k.from_node, k.to_node)]
        P = [float(p) for p in P if np.isfinite(p)]
        trip = []
        if shut is not None and not closed:
            for e in ends:
                if e not in trip_nodes:
                    continue
                j = names.index(e)
                pj = [float(r.p_abs[j]) for r in cases.values() if np.isfinite(r.p_abs[j])]
                if pj:
                    trip.append((e, min(pj)))
        try:
            scr = screen_line(
                f"link '{k.name}'", k.segment.pipe, inp.liquid, T, inp.p_baro, pv,
                length=L_col, velocity=max(max(V, default=0.0), V_col),
                running_pressure=max(P, default=inp.p_baro), opts=inp.integrity,
                standing=(max(top.level_high - z_low, 0.0), top.pressure),
                shutoff=None if shut is None else (shut[1], shut[2], shut[3] - z_low),
                trip_stations=trip, rho=rho)
        except HeadlineError as exc:
            findings.append(Finding(Severity.CHECK, f"link '{k.name}'", "integrity screen",
                                    float("nan"), "-", "screened", f"not screened: {exc}",
                                    "kit.studies.integrity"))
            continue
        out[k.name] = scr
        findings += list(scr.findings)
    return out


def column_upstream(res) -> dict:
    """For every flowing pipe, the liquid column a valve at its downstream end would stop.

    Returns ``{pipe name: (L [m], V [m/s])}``: ``L`` is the length of the flowing path from a
    fixed head or a pump's discharge to the pipe's downstream end that carries the most
    momentum Σ Lᵢ|Vᵢ|, and ``V`` = Σ Lᵢ|Vᵢ| / L, its length-weighted mean velocity. The
    screen uses ``L`` for the critical time 2L/a and, with the larger of ``V`` and the pipe's
    own velocity, bounds the slow-closure rise 2ρ Σ Lᵢ Vᵢ / t_c (Michaud 1878 summed over a
    series path; Wylie & Streeter 1993, ch. 1) from above. Heads fall along the flow in every
    passive link, so visiting nodes by falling head orders the paths (a pump restarts them).

    >>> from kit.notebook import scenario_path
    >>> from kit import scenario as scn
    >>> s = study(scn.load(scenario_path("fenwick_yard_chilled_water.toml")))
    >>> L, V = column_upstream(s.design)["AHU-4 branch"]
    >>> bool(L > s.network.link("AHU-4 branch").segment.length)
    True
    """
    net = res.net
    names = net.node_names + net.boundary_names
    idx = {n: i for i, n in enumerate(names)}
    L = np.zeros(len(names))
    M = np.zeros(len(names))
    into: dict = {}
    for i, k in enumerate(net.links):
        q = float(res.Q[i])
        if isinstance(k, PumpLink) or not np.isfinite(q) or abs(q) < 1e-12:
            continue
        a, b = (k.from_node, k.to_node) if q > 0 else (k.to_node, k.from_node)
        into.setdefault(b, []).append((a, i))
    H = np.where(np.isfinite(res.H), res.H, -np.inf)
    boundary = set(net.boundary_names)
    out = {}
    for j in np.argsort(-H, kind="stable"):
        node = names[j]
        if node in boundary:
            continue
        best = None
        for a, i in into.get(node, ()):
            k = net.links[i]
            length = k.segment.length if isinstance(k, PipeLink) else 0.0
            v = abs(float(res.velocity[i])) if isinstance(k, PipeLink) else 0.0
            ia = idx[a]
            cand = (M[ia] + length * v, L[ia] + length)
            if isinstance(k, PipeLink):
                out[k.name] = (cand[1], cand[0] / cand[1] if cand[1] > 0 else 0.0)
            if best is None or cand[0] > best[0]:
                best = cand
        if best is not None:
            M[j], L[j] = best
    return out


def is_closed_circuit(net) -> bool:
    """True for a closed circuit: one fixed head (its pressurisation point) and no node
    drawing or injecting flow.

    >>> from kit.notebook import scenario_path
    >>> from kit import scenario as scn
    >>> [is_closed_circuit(inputs(scn.load(scenario_path(f))).network())
    ...  for f in ("fenwick_yard_chilled_water.toml", "hollin_reach_ring_main.toml")]
    [True, False]
    """
    return len(net.boundaries) == 1 and all(n.demand == 0 for n in net.nodes)


def _trip_nodes(net) -> set:
    """Nodes where a pump trip's down-surge is screened: every pump's discharge node (and the
    nodes joined to it through valves and equipment, up to the first pipe) and the high points
    (free nodes at least as high as every neighbour and above one of them)."""
    z = {n.name: n.elevation for n in net.nodes}
    for b in net.boundaries:
        z[b.name] = b.level_low
    nbr: dict = {}
    for k in net.links:
        nbr.setdefault(k.from_node, set()).add(k.to_node)
        nbr.setdefault(k.to_node, set()).add(k.from_node)
    out = {k.to_node for k in net.links if isinstance(k, PumpLink)}
    todo = list(out)
    while todo:  # through valves and equipment (no pipe, no pump) from the discharge
        u = todo.pop()
        for k in net.links:
            if isinstance(k, (PipeLink, PumpLink)) or u not in (k.from_node, k.to_node):
                continue
            v = k.to_node if k.from_node == u else k.from_node
            if v in z and v not in out and v not in net.boundary_names:
                out.add(v)
                todo.append(v)
    for n in net.nodes:
        zs = [z[m] for m in nbr.get(n.name, ())]
        if zs and all(n.elevation >= x for x in zs) and any(n.elevation > x for x in zs):
            out.add(n.name)
    return out


# ---------------------------------------------------------------- results


def compute(sc) -> Results:
    """The study's :class:`~kit.results.Results` for a ``network`` scenario."""
    return results_of(sc, study(sc))


def _finite(x) -> bool:
    return x is not None and np.isfinite(x)


def results_of(sc, s: NetworkStudy) -> Results:
    """Reported values (stable keys), findings, methods, cautions and tables of a study."""
    r = Results("network")
    inp = s.inputs
    d = s.design
    r.add("site.barometric_pressure", "barometric pressure", inp.p_baro, "pressure_abs")
    r.add("design.temperature", f"design liquid temperature ({s.design_label})", inp.design_T,
          "temperature")
    r.add("design.density", "liquid density at the design temperature", d.state.rho, "density")
    q_eps = max(Q_ZERO, 1e-9 * float(np.abs(d.Q).max(initial=0.0)))
    for i, k in enumerate(d.net.links):
        still = abs(float(d.Q[i])) <= q_eps  # round-off is no flow (as the findings say)
        r.add(f"link.{k.name}.flow", f"{k.name}: flow", 0.0 if still else float(d.Q[i]),
              "flow")
        if _finite(d.velocity[i]):
            r.add(f"link.{k.name}.velocity", f"{k.name}: velocity",
                  0.0 if still else float(d.velocity[i]), "velocity")
        if _finite(d.head_loss[i]) and not isinstance(k, PumpLink):  # a pump: its head below
            h = float(d.head_loss[i])
            r.add(f"link.{k.name}.head_loss", f"{k.name}: head loss from → to",
                  0.0 if still and abs(h) < 1e-9 else h, "head")
    for i, n in enumerate(d.node_names):
        if _finite(d.H[i]):
            r.add(f"node.{n}.head", f"{n}: head (HGL)", float(d.H[i]), "elevation")
            r.add(f"node.{n}.p_gauge", f"{n}: pressure (gauge)", float(d.p_gauge[i]),
                  "pressure_difference")
    for name in inp.pumps:
        i = d.link_names.index(name)
        k = d.net.links[i]
        r.add(f"pump.{name}.flow", f"pump {name}: flow at design", float(d.Q[i]), "flow")
        r.add(f"pump.{name}.head", f"pump {name}: head at design", float(-d.head_loss[i]),
              "head")
        if getattr(d.state, "pv", None) is not None:
            a = d.npsh_available(name)
            if _finite(a):
                r.add(f"pump.{name}.npsha", f"pump {name}: NPSH available at design", a, "head")
    if s.pump is not None:
        i = d.link_names.index(s.pump)
        r.add("pump.flow", f"the network's pump ({s.pump}): flow at design", float(d.Q[i]),
              "flow")
        r.add("pump.head", f"the network's pump ({s.pump}): head at design",
              float(-d.head_loss[i]), "head")
    for name, v in s.valves.items():
        for c in v.cases:
            lab = c.case.label
            r.add(f"valve.{name}.kv_required.{lab}", f"{name}: Kv required, {lab} flow", c.kv,
                  "dimensionless")
            r.add(f"valve.{name}.opening.{lab}", f"{name}: opening, {lab} flow", c.opening,
                  "fraction")
            r.add(f"valve.{name}.dp.{lab}", f"{name}: pressure drop, {lab} flow",
                  c.case.p1 - c.case.p2, "pressure_difference")
        if v.authority is not None:
            r.add(f"valve.{name}.authority", f"{name}: authority at design", v.authority,
                  "fraction")
    if s.balance is not None:
        b = s.balance
        r.add("balance.pump_head", "balanced circuit: pump head needed at design",
              b.pump_head, "head")
        r.add("balance.pump_flow", "balanced circuit: pump flow at design", b.pump_flow, "flow")
        for name, kv in b.kv.items():
            r.add(f"balance.{name}.kv", f"{name}: Kv setting", kv, "dimensionless")
    if s.curve is not None:
        c = s.curve
        j = int(np.argmin(np.abs(c.Q - d.flow(s.pump))))
        r.add("curve.flow_at_design", "network curve: flow nearest the design pump flow",
              float(c.Q[j]), "flow")
        r.add("curve.head_at_design.min", "network curve: head needed there, lowest of the "
              "band", float(c.lower[j]), "head")
        r.add("curve.head_at_design.max", "network curve: head needed there, highest of the "
              "band", float(c.upper[j]), "head")
    p_free = d.p_abs[:len(d.net.nodes)]
    if np.isfinite(p_free).any():
        lo = int(np.nanargmin(p_free))
        r.add("nodes.lowest_pressure", f"lowest node pressure at design ('{d.node_names[lo]}')",
              float(p_free[lo]), "pressure_abs")
    low_all = [(float(np.nanmin(res.p_abs[:len(res.net.nodes)])), lab)
               for lab, res in s.cases.items() if np.isfinite(res.p_abs[:len(res.net.nodes)]).any()]
    if low_all:
        p, lab = min(low_all)
        r.add("band.lowest_pressure", f"lowest node pressure over the band ({lab})", p,
              "pressure_abs")
    for name, scr in s.integrity.items():
        r.add(f"integrity.{name}.p_max", f"{name}: highest pressure ({scr.governing})",
              scr.p_max, "pressure_abs")
        if scr.rating is not None:
            r.add(f"integrity.{name}.rated", f"{name}: maximum allowable pressure (gauge)",
                  scr.rating.P_allow, "pressure_difference")
        if scr.surge_rise is not None:
            r.add(f"integrity.{name}.surge_rise", f"{name}: valve-closure surge rise",
                  scr.surge_rise, "pressure_difference")
    r.findings += list(s.findings)
    r.selected = f"network '{inp.title}'"
    r.add_verdict("network.verdict", "network: verdict", s.verdict)
    r.tables.update(tables(s))
    r.method("Network solution", f"{SOLVE_METHOD['name']}: {SOLVE_METHOD['reference']} "
             f"Convergence: {SOLVE_METHOD['convergence']}")
    r.method("Pipe losses", "Darcy–Weisbach with the Colebrook friction factor; "
             + " ".join(FRICTION_METHOD["references"]))
    r.method("Control valves", "IEC 60534-2-1:2011 sizing equations for liquids (via "
             "fluids.control_valve.size_control_valve_l); ideal inherent characteristics; "
             "authority and the min/max cases at a held branch differential: common practice, "
             "no source")
    r.method("Network curve and index circuit", "demands scaled by one factor (supply "
             "networks) or pump flow as a flow source (closed circuits), each point by the "
             "gradient method; index node and circuit: common practice, no source")
    if s.balance is not None or inp.balancing:
        r.method("Balancing", "branches held at their design flows, the index valve fully open, "
                 "the others set to the excess head: common practice, no source")
    for name_, text_ in INTEGRITY_METHODS:
        r.method(name_, text_)
    topics = ["pressure", "water_hammer", "vacuum", "cavitation"]
    if inp.pumps:
        topics.append("pump")
    if getattr(inp.liquid, "flammable", False):
        topics.append("flammable")
    r.cautions = cautions_for(*topics)
    return r


def tables(s: NetworkStudy) -> dict:
    """The study's tables: links, nodes, valves, balancing, cases, integrity, curve."""
    d = s.design
    out = {}
    rows = []
    for row, Re in zip(d.links_table(), d.reynolds, strict=True):
        row = dict(row)
        row["Re"] = float(Re)
        row["index"] = row["name"] in s.index_circuit
        rows.append(row)
    out["links"] = rows
    nrows = []
    nf = len(d.net.nodes)
    for i, row in enumerate(d.nodes_table()):
        row = dict(row)
        pmin = d.net.nodes[i].min_pressure if i < nf else None
        row["min_pressure"] = float("nan") if pmin is None else float(pmin)
        row["kind"] = "node" if i < nf else "boundary"
        nrows.append(row)
    out["nodes"] = nrows
    out["valves"] = [
        {"valve": name, "case": c.case.label, "Q": c.case.Q, "p1": c.case.p1, "p2": c.case.p2,
         "dp": c.case.p1 - c.case.p2, "kv_required": c.kv, "cv_required": c.cv,
         "kv_rated": v.kv_rated, "opening": c.opening, "choked": c.choked,
         "flashing": c.flashing, "xF": c.xF,
         "authority": float("nan") if v.authority is None else v.authority}
        for name, v in s.valves.items() for c in v.cases]
    if s.balance is not None:
        b = s.balance
        out["balancing"] = [
            {"valve": name, "design_flow": s.inputs.balancing[name], "kv_set": kv,
             "kv_max": s.inputs.balancing_valves[name].kv_max, "head_drop": b.head_drop[name],
             "index": name == b.index_valve}
            for name, kv in b.kv.items()]
    crow = []
    for lab, res in s.cases.items():
        p = res.p_abs[:nf]
        ok = np.isfinite(p)
        lo = int(np.argmin(np.where(ok, p, np.inf))) if ok.any() else None
        row = {"case": lab, "status": "solved", "iterations": res.iterations,
               "lowest_node": "" if lo is None else res.node_names[lo],
               "lowest_pressure": float("nan") if lo is None else float(p[lo])}
        if s.pump is not None:
            row["pump_flow"] = res.flow(s.pump)
            row["pump_head"] = float(-res.head_loss[res.link_names.index(s.pump)])
        crow.append(row)
    for lab, why in s.failed.items():
        crow.append({"case": lab, "status": f"no solution: {why}"})
    out["cases"] = crow
    out["integrity"] = [
        {"link": name, "p_max": scr.p_max, "governing": scr.governing,
         "rated": float("nan") if scr.rating is None else scr.rating.P_allow,
         "wave_speed": float("nan") if scr.wave_speed is None else scr.wave_speed,
         "surge_rise": float("nan") if scr.surge_rise is None else scr.surge_rise,
         "downsurge": float("nan") if scr.downsurge is None else scr.downsurge,
         "verdict": scr.verdict}
        for name, scr in s.integrity.items()]
    if s.curve is not None:
        c = s.curve
        out["curve"] = [{"Q": float(q), "H_min": float(lo), "H_max": float(hi)}
                        for q, lo, hi in zip(c.Q, c.lower, c.upper, strict=True)]
    return out
