"""The network schematic: nodes placed from the topology, links coloured by a result.

:func:`layered_positions` places every node of a :class:`kit.core.network.Network` with no
drawing data from the user: a layered layout (Sugiyama, Tagawa & Toda 1981, reduced to its
two first steps) —

1. **layers**: each node's layer is its distance, in links, from the nearest fixed-head node
   (tank or vessel), by a breadth-first search from all of them at once; layer ``k`` is drawn
   at ``x = k``;
2. **order within a layer**: the barycentre heuristic for fewer crossings — each node is
   placed at the mean position of its neighbours in the layer before, then the layers are
   swept back and forth (four sweeps), ties kept in the network's own order.

It is deterministic (no random seed) and depends on the topology only, so a changed input
never moves a node on screen.

:func:`schematic_figure` draws a solved network (a :class:`~kit.core.network.NetworkResult`)
as a plotly figure (plain JSON, as :class:`~kit.panels.plot_view.PlotView` takes it):

- links as lines, coloured by **velocity** or by **friction pressure drop per length**
  (``colour_by``), in fixed classes (:data:`COLOUR_CLASSES`) so a change of flow moves a
  link between classes, not the legend; links with no bore (pumps, valves given without a
  diameter) in grey, links held shut dotted;
- an arrow head on every link pointing along its flow (each head turned along the line from
  a hidden point just upstream of it, so it points right at any aspect of the chart); where
  the flow runs against the drawn direction (from → to) the arrow is drawn in the
  reverse-flow colour and the legend says so;
- pumps, control valves, balancing valves and check valves with markers of their own at the
  middle of their link; fixed-head nodes as squares, junctions as circles;
- the **index circuit** (the links from the pump to the index node) under a wide band;
- hover on a node: head (HGL), gauge and absolute pressure, elevation, demand, its minimum
  residual pressure and the margin above it; on a link's marker: flow, velocity, head loss,
  pressure drop per length, status.

Values are shown in the display system of :mod:`kit.units`; nothing here computes hydraulics
(the pressure drop per length is the link's head loss × ρg ÷ length, a change of unit).

Example
-------
>>> from types import SimpleNamespace as NS
>>> from kit.core.line import Segment
>>> from kit.core.network import Boundary, Network, Node, PipeLink
>>> pipe = NS(Di=0.1023, area=0.0082196, roughness=4.5e-5, with_condition=lambda c: pipe)
>>> water = NS(rho=998.2, mu=1.002e-3, pv=2339.0, T=293.15)
>>> net = Network("demo", [Node("J1", 0.0, demand=0.01), Node("J2", 0.0, demand=0.005)],
...               [Boundary("T1", 20.0)],
...               [PipeLink("P1", "T1", "J1", Segment("P1", pipe, 100.0)),
...                PipeLink("P2", "J1", "J2", Segment("P2", pipe, 50.0))], water)
>>> layered_positions(net)
{'J1': (1.0, 0.0), 'J2': (2.0, 0.0), 'T1': (0.0, 0.0)}
>>> fig = schematic_figure(net, net.solve(), index_circuit=("P1", "P2"))
>>> [t["name"] for t in fig["data"]][:2]
['index circuit', 'velocity < 0.5 m/s']
"""

from __future__ import annotations

import html
from collections import deque

import ipywidgets as widgets
import numpy as np

from kit import units
from kit.core.constants import G
from kit.core.network_solve import still_flow
from kit.panels.base import check_system
from kit.panels.tables import unit_label

__all__ = ["layered_positions", "stress_positions", "schematic_figure", "NetworkSchematic", "COLOUR_CLASSES",
           "COLOUR_BY", "CLASS_COLOURS", "MARKERS", "LABELS_AS_NOTES"]

#: What the links can be coloured by: key -> (label, quantity kind).
COLOUR_BY = {
    "velocity": ("velocity", "velocity"),
    "pressure_drop": ("pressure drop per length", "pressure_per_length"),
}

#: Class edges (SI) for the link colours: fixed, so that the legend stays put. Common
#: practice, no source: round steps that bracket the usual velocity and friction-gradient
#: criteria of liquid lines (kit.core.criteria.DUTY_CLASSES gives the duty's own limits).
COLOUR_CLASSES = {
    "velocity": (0.5, 1.0, 1.5, 2.0, 3.0),                       # m/s
    "pressure_drop": (50.0, 100.0, 200.0, 400.0, 800.0),          # Pa/m
}

#: Our own colours, one per class, cool (low) to hot (high).
CLASS_COLOURS = ("#2b5c8a", "#3f8fa6", "#5aa469", "#c9b431", "#e07b2a", "#b8322a")
_NO_BORE = "#8c8c8c"
_CLOSED = "#b0b0b0"
_INDEX = "rgba(245, 190, 40, 0.45)"
_ARROW = "#303030"
_REVERSE = "#c2185b"

#: Markers (plotly symbol, colour, size) per link kind and node kind: our own choice.
MARKERS = {
    "pump": ("circle", "#1f3f7a", 17),
    "control valve": ("bowtie", "#7b3fa0", 15),
    "balancing valve": ("hourglass", "#117a65", 14),
    "check valve": ("triangle-right", "#6d4c41", 13),
    "equipment": ("diamond", "#a04000", 14),
    "junction": ("circle", "#ffffff", 10),
    "fixed head": ("square", "#1f5fa8", 18),
}

_ARROW_AT = 0.72      # arrow head placed this far along each link (from its upstream end)
_MARK_AT = 0.40       # equipment marker placed this far along each link


# ---------------------------------------------------------------- layout

#: Up to this many nodes, node names are fixed labels in the layout (not redrawn with the
#: links); above it, text on the node markers.
LABELS_AS_NOTES = 120


def _adjacency(net) -> tuple[list[str], dict[str, list[str]]]:
    names = list(net.node_names) + list(net.boundary_names)
    adj: dict[str, list[str]] = {n: [] for n in names}
    for k in net.links:
        if k.to_node not in adj[k.from_node]:
            adj[k.from_node].append(k.to_node)
        if k.from_node not in adj[k.to_node]:
            adj[k.to_node].append(k.from_node)
    return names, adj


def layered_positions(net, sweeps: int = 4) -> dict[str, tuple[float, float]]:
    """Deterministic positions (x = layer, y = place in the layer) of every node and boundary.

    Layers by breadth-first search from every fixed-head node at once; order within a
    layer by the barycentre heuristic (Sugiyama, Tagawa & Toda 1981), ``sweeps`` sweeps down
    and up the layers. Each layer is centred on y = 0, one unit between nodes.

    Parameters
    ----------
    net : Network
        The network (its topology only is used) [-]
    sweeps : int
        Barycentre sweeps, alternately down and up the layers [-]

    Returns
    -------
    dict
        Node name -> (x, y) [-]

    References
    ----------
    Sugiyama, K., Tagawa, S., and Toda, M. (1981). Methods for visual understanding of
    hierarchical system structures. IEEE Trans. Systems, Man, and Cybernetics 11(2),
    109–125.

    Examples
    --------
    >>> from types import SimpleNamespace as NS
    >>> from kit.core.line import Segment
    >>> from kit.core.network import Boundary, Network, Node, PipeLink
    >>> p = NS(Di=0.1, area=0.00785, roughness=4.5e-5, with_condition=lambda c: p)
    >>> w = NS(rho=998.0, mu=1e-3, pv=2339.0, T=293.15)
    >>> net = Network("y", [Node("A", 0.0), Node("B", 0.0, demand=0.001),
    ...                     Node("C", 0.0, demand=0.001)], [Boundary("T", 5.0)],
    ...               [PipeLink("1", "T", "A", Segment("1", p, 10.0)),
    ...                PipeLink("2", "A", "B", Segment("2", p, 10.0)),
    ...                PipeLink("3", "A", "C", Segment("3", p, 10.0))], w)
    >>> layered_positions(net)["B"], layered_positions(net)["C"]
    ((2.0, -0.5), (2.0, 0.5))
    """
    names, adj = _adjacency(net)
    order = {n: i for i, n in enumerate(names)}
    layer: dict[str, int] = {}
    queue: deque = deque()
    for b in net.boundary_names:
        layer[b] = 0
        queue.append(b)
    while queue:
        n = queue.popleft()
        for m in adj[n]:
            if m not in layer:
                layer[m] = layer[n] + 1
                queue.append(m)
    for n in names:          # the model refuses orphans; keep any left on a layer of their own
        layer.setdefault(n, max(layer.values(), default=0) + 1)
    n_layers = max(layer.values()) + 1
    layers: list[list[str]] = [[] for _ in range(n_layers)]
    for n in names:
        layers[layer[n]].append(n)
    pos = {n: float(i) for lay in layers for i, n in enumerate(lay)}

    def sweep(rng, ref_step):
        for li in rng:
            lay = layers[li]
            ref = li + ref_step
            if not (0 <= ref < n_layers):
                continue

            def key(n, ref=ref):
                nb = [pos[m] for m in adj[n] if layer[m] == ref]
                return (sum(nb) / len(nb) if nb else pos[n], order[n])

            lay.sort(key=key)
            for i, n in enumerate(lay):
                pos[n] = float(i)

    for s in range(max(0, int(sweeps))):
        if s % 2 == 0:
            sweep(range(1, n_layers), -1)
        else:
            sweep(range(n_layers - 2, -1, -1), +1)
    out = {}
    for li, lay in enumerate(layers):
        mid = (len(lay) - 1) / 2.0
        for i, n in enumerate(lay):
            out[n] = (float(li), float(i - mid))
    return {n: out[n] for n in names}


def stress_positions(net, iterations: int = 300, tol: float = 1e-6,
                     max_nodes: int = 400) -> dict[str, tuple[float, float]]:
    """Deterministic positions by stress majorization, started from :func:`layered_positions`.

    Each pair of nodes is pulled towards a distance equal to the number of links between
    them (shortest path, :mod:`scipy.sparse.csgraph`), weighted by 1/d² (Kamada & Kawai's
    energy); the stress is minimised by SMACOF (Gansner, Koren & North 2004), each step
    ``X ← L_w⁺ B(X) X``, until it falls by less than ``tol`` (relative). The drawing is then
    turned so that its widest spread is horizontal, the fixed-head nodes on the left and
    the network's first node above the middle: the same topology always gives the same
    picture. Ladders (headers with branches between them) come out as ladders and rings as
    rings. Above ``max_nodes`` nodes (the pseudo-inverse is n × n) the layered layout is
    returned as it is.

    Parameters
    ----------
    net : Network
        The network (its topology only is used) [-]
    iterations : int
        At most this many SMACOF steps [-]
    tol : float
        Relative fall of the stress below which the steps stop [-]
    max_nodes : int
        Largest network given this layout [-]

    Returns
    -------
    dict
        Node name -> (x, y), about one unit per link [-]

    References
    ----------
    Gansner, E. R., Koren, Y., and North, S. (2004). Graph drawing by stress majorization.
    In Graph Drawing (GD 2004), LNCS 3383, pp. 239–250. Springer.
    Kamada, T., and Kawai, S. (1989). An algorithm for drawing general undirected graphs.
    Information Processing Letters 31(1), 7–15.

    Examples
    --------
    >>> from types import SimpleNamespace as NS
    >>> from kit.core.line import Segment
    >>> from kit.core.network import Boundary, Network, Node, PipeLink
    >>> p = NS(Di=0.1, area=0.00785, roughness=4.5e-5, with_condition=lambda c: p)
    >>> w = NS(rho=998.0, mu=1e-3, pv=2339.0, T=293.15)
    >>> names = ["A", "B", "C", "D"]
    >>> net = Network("ring", [Node(n, 0.0, demand=0.001) for n in names], [Boundary("T", 5.0)],
    ...               [PipeLink("f", "T", "A", Segment("f", p, 10.0))] +
    ...               [PipeLink(f"r{i}", a, names[(i + 1) % 4], Segment("r", p, 10.0))
    ...                for i, a in enumerate(names)], w)
    >>> import math
    >>> xy = stress_positions(net)
    >>> d = [math.dist(xy[a], xy[names[(i + 1) % 4]]) for i, a in enumerate(names)]
    >>> max(d) - min(d) < 0.05 * min(d)      # the ring drawn as a near-square
    True
    """
    from scipy.sparse import coo_matrix
    from scipy.sparse.csgraph import shortest_path

    init = layered_positions(net)
    names = list(init)
    n = len(names)
    if n > max_nodes or n < 3:
        return init
    idx = {nm: i for i, nm in enumerate(names)}
    f = [idx[k.from_node] for k in net.links]
    t = [idx[k.to_node] for k in net.links]
    g = coo_matrix((np.ones(len(f)), (f, t)), shape=(n, n)).tocsr()
    D = shortest_path(g, directed=False, unweighted=True)
    finite = np.isfinite(D)
    D[~finite] = (D[finite].max() if finite.any() else 1.0) + 2.0
    W = np.zeros_like(D)
    off = ~np.eye(n, dtype=bool)
    W[off] = 1.0 / (D[off] ** 2)
    Lw = -W.copy()
    np.fill_diagonal(Lw, W.sum(axis=1))
    Lw_pinv = np.linalg.pinv(Lw)
    X = np.array([init[nm] for nm in names], dtype=float)
    X -= X.mean(axis=0)

    def stress(X):
        dist = np.sqrt(((X[:, None, :] - X[None, :, :]) ** 2).sum(-1))
        return float((W * (dist - D) ** 2)[off].sum()) / 2.0, dist

    s_old, dist = stress(X)
    for _ in range(int(iterations)):
        with np.errstate(divide="ignore", invalid="ignore"):
            B = np.where(dist > 1e-12, -W * D / dist, 0.0)
        np.fill_diagonal(B, 0.0)
        np.fill_diagonal(B, -B.sum(axis=1))
        X = Lw_pinv @ (B @ X)
        s_new, dist = stress(X)
        if s_old - s_new <= tol * max(s_old, 1e-300):
            break
        s_old = s_new
    X -= X.mean(axis=0)
    # widest spread horizontal (principal axes), fixed heads on the left, first node above
    _, vecs = np.linalg.eigh(X.T @ X)
    X = X @ vecs[:, ::-1]
    nb = len(net.boundary_names)
    if nb and X[n - nb:, 0].mean() > X[:, 0].mean() + 1e-9:
        X[:, 0] = -X[:, 0]
    lead = next((i for i in range(n) if abs(X[i, 1]) > 1e-6), None)
    if lead is not None and X[lead, 1] < 0:
        X[:, 1] = -X[:, 1]
    X = np.round(X, 9) + 0.0
    return {nm: (float(X[i, 0]), float(X[i, 1])) for i, nm in enumerate(names)}


# ---------------------------------------------------------------- figure

def _number(x: float) -> str:
    """``x`` to 3 significant figures without trailing zeros ('0.5', '1.5', '800')."""
    text = f"{x:.3g}"
    if "." in text and "e" not in text:
        text = text.rstrip("0").rstrip(".")
    return text


def _fmt(v, kind, system, digits=3) -> str:
    if v is None or not np.isfinite(v):
        return "—"
    return units.fmt(float(v), kind, system, digits=digits)


def _class_labels(colour_by: str, system: str) -> list[str]:
    label, kind = COLOUR_BY[colour_by]
    edges = COLOUR_CLASSES[colour_by]
    unit = unit_label(kind, system)
    shown = [_number(units.convert(e, kind, units.display_unit(kind, system)))
             for e in edges]
    out = [f"{label} < {shown[0]} {unit}"]
    out += [f"{label} {a}–{b} {unit}" for a, b in zip(shown[:-1], shown[1:], strict=True)]
    out.append(f"{label} > {shown[-1]} {unit}")
    return out


def _link_rows(result) -> list[dict]:
    """One dict per link of a solved network: the result's own row
    (:meth:`~kit.core.network.NetworkResult.links_table`) and ``dp_per_length`` [Pa/m] for pipe
    links (head loss × ρg ÷ length; NaN for other links)."""
    rho = result.state.rho
    rows = result.links_table()
    for row, k in zip(rows, result.net.links, strict=True):
        seg = getattr(k, "segment", None)
        h = row["head_loss"]
        row["dp_per_length"] = (abs(h) * rho * G / seg.length
                                if seg is not None and np.isfinite(h) else float("nan"))
    return rows


def _link_hover(k, row, system, p_baro) -> str:
    parts = [f"<b>{html.escape(k.name)}</b> ({html.escape(k.kind)})",
             f"{html.escape(k.from_node)} → {html.escape(k.to_node)}",
             f"flow {_fmt(row['Q'], 'flow', system)}"]
    if row["Q"] < 0:
        parts[-1] += " (against the drawn direction)"
    if np.isfinite(row["V"]):
        parts.append(f"velocity {_fmt(row['V'], 'velocity', system)}")
    parts.append(("head gain " if k.kind == "pump" else "head loss ")
                 + _fmt(abs(row["head_loss"]) if k.kind == "pump" else row["head_loss"],
                        "head", system))
    if np.isfinite(row.get("dp_per_length", float("nan"))):
        parts.append("pressure drop " + _fmt(row["dp_per_length"], "pressure_per_length", system))
    parts.append(f"status {row['status']}")
    return "<br>".join(parts)


def _node_hover(name, i, result, system, p_baro) -> str:
    net = result.net
    nf = len(net.nodes)
    is_free = i < nf
    H = float(result.H[i])
    p = float(result.p_abs[i])
    parts = [f"<b>{html.escape(name)}</b> ({'junction' if is_free else 'fixed head'})",
             f"head (HGL) {_fmt(H, 'head', system)}",
             "pressure " + (units.fmt_pressure(p, system, True, p_baro) + " = "
                            + units.fmt_pressure(p, system, False, p_baro)
                            if np.isfinite(p) else "— (cut off by closed links)"),
             f"elevation {_fmt(float(result.elevation[i]), 'elevation', system)}"]
    if is_free:
        node = net.nodes[i]
        d = float(result.demand[i])
        if d != 0.0:
            parts.append(f"demand {_fmt(d, 'flow', system)}")
        if node.min_pressure is not None:
            parts.append("minimum " + units.fmt_pressure(node.min_pressure, system, True,
                                                         p_baro))
            if np.isfinite(p):
                parts.append("margin " + _fmt(p - node.min_pressure, "pressure_difference",
                                              system))
    return "<br>".join(parts)


def schematic_figure(net, result, *, index_circuit=(), index_node: str | None = None,
                     colour_by: str = "velocity", system: str = "SI", positions=None,
                     title: str = "", height: int = 520) -> dict:
    """The schematic of a solved network as plotly figure JSON (``{"data", "layout"}``).

    Parameters
    ----------
    net : Network
        The network drawn [-]
    result : NetworkResult or None
        Its solution; None draws the topology only (links grey, no arrows) [-]
    index_circuit : sequence of str
        Link names of the index circuit, highlighted [-]
    index_node : str, optional
        The index node, ringed [-]
    colour_by : str
        'velocity' or 'pressure_drop' (a key of :data:`COLOUR_BY`) [-]
    system : str
        'SI' or 'US' [-]
    positions : dict, optional
        Node name -> (x, y); default :func:`layered_positions` [-]
    title : str
        Figure title [-]
    height : int
        Figure height [px]

    Returns
    -------
    dict
        ``{"data": [...], "layout": {...}}``; trace names say what each shows; a trace
        with nothing to show holds one empty point (``[None]``).

    Examples
    --------
    >>> from types import SimpleNamespace as NS
    >>> from kit.core.line import Segment
    >>> from kit.core.network import Boundary, Network, Node, PipeLink
    >>> p = NS(Di=0.1023, area=0.0082196, roughness=4.5e-5, with_condition=lambda c: p)
    >>> w = NS(rho=998.2, mu=1.002e-3, pv=2339.0, T=293.15)
    >>> net = Network("d", [Node("J", 0.0, demand=0.01)], [Boundary("T", 20.0)],
    ...               [PipeLink("P", "T", "J", Segment("P", p, 100.0))], w)
    >>> fig = schematic_figure(net, net.solve(), system="US")
    >>> [t["name"] for t in fig["data"]                      # the links drawn: 1.22 m/s
    ...  if t["mode"] == "lines" and any(v is not None for v in t["x"])]
    ['velocity 3.28–4.92 ft/s']
    """
    if colour_by not in COLOUR_BY:
        raise KeyError(f"unknown link colouring {colour_by!r}; choose one of "
                       f"{', '.join(COLOUR_BY)}")
    check_system(system)
    pos = positions or stress_positions(net)
    p_baro = float(net.p_baro)
    rows = _link_rows(result) if result is not None else None
    index_set = set(index_circuit or ())
    n_cls = len(COLOUR_CLASSES[colour_by]) + 1
    cls_x: list[list] = [[] for _ in range(n_cls)]
    cls_y: list[list] = [[] for _ in range(n_cls)]
    grey_x, grey_y, shut_x, shut_y, idx_x, idx_y = [], [], [], [], [], []
    arrows = {False: ([], [], [], []), True: ([], [], [], [])}   # reverse? -> x, y, angle, text
    kinds: dict[str, tuple[list, list, list]] = {}
    edges = np.asarray(COLOUR_CLASSES[colour_by])
    # a round-off flow is no flow: no arrow (its sign means nothing)
    q_eps = still_flow(result.Q) if result is not None else 0.0
    for i, k in enumerate(net.links):
        (x0, y0), (x1, y1) = pos[k.from_node], pos[k.to_node]
        seg = ([x0, x1, None], [y0, y1, None])
        if k.name in index_set:
            idx_x += seg[0]
            idx_y += seg[1]
        row = rows[i] if rows is not None else None
        if row is None:
            grey_x += seg[0]
            grey_y += seg[1]
        elif row["status"] != "open":
            shut_x += seg[0]
            shut_y += seg[1]
        else:
            v = abs(row["V"]) if colour_by == "velocity" else row["dp_per_length"]
            if np.isfinite(v):
                c = int(np.searchsorted(edges, v, side="right"))
                cls_x[c] += seg[0]
                cls_y[c] += seg[1]
            else:
                grey_x += seg[0]
                grey_y += seg[1]
        hover = (_link_hover(k, row, system, p_baro) if row is not None
                 else f"<b>{html.escape(k.name)}</b> ({html.escape(k.kind)})")
        mx, my = x0 + _MARK_AT * (x1 - x0), y0 + _MARK_AT * (y1 - y0)
        kind = k.kind if k.kind in MARKERS else "pipe"
        kx, ky, kt = kinds.setdefault(kind, ([], [], []))
        kx.append(mx)
        ky.append(my)
        kt.append(hover)
        if row is not None and row["status"] == "open" and abs(row["Q"]) > q_eps:
            rev = row["Q"] < 0
            sx, sy, ex, ey = (x1, y1, x0, y0) if rev else (x0, y0, x1, y1)
            ax_, ay_, aa, at = arrows[rev]
            # two points per arrow: a hidden one just upstream, then the arrow head, turned
            # along the line from the first (plotly's angleref 'previous'): the head points
            # along the flow on screen whatever the chart's aspect
            for f, size in ((_ARROW_AT - 0.05, 0), (_ARROW_AT, 11 if rev else 9)):
                ax_.append(sx + f * (ex - sx))
                ay_.append(sy + f * (ey - sy))
                aa.append(size)
                at.append(hover)
    labels = _class_labels(colour_by, system)
    data = [dict(type="scatter", name="index circuit", x=idx_x, y=idx_y, mode="lines",
                 line=dict(color=_INDEX, width=14), hoverinfo="skip",
                 showlegend=bool(idx_x))]
    # every class in the legend, with links in it or not: the legend is the colour key, and
    # a link moving from one class to another changes no more than the traces' points
    for c in range(n_cls):
        data.append(dict(type="scatter", name=labels[c], x=cls_x[c], y=cls_y[c], mode="lines",
                         line=dict(color=CLASS_COLOURS[c], width=4), hoverinfo="skip",
                         showlegend=True))
    data.append(dict(type="scatter", name="no bore given (pump, valve, equipment)" if rows
                     is not None
                     else "link", x=grey_x, y=grey_y, mode="lines",
                     line=dict(color=_NO_BORE, width=3), hoverinfo="skip",
                     showlegend=bool(grey_x)))
    data.append(dict(type="scatter", name="held shut (non-return)", x=shut_x, y=shut_y,
                     mode="lines", line=dict(color=_CLOSED, width=3, dash="dot"),
                     hoverinfo="skip", showlegend=bool(shut_x)))
    for rev in (False, True):
        ax_, ay_, sizes, at = arrows[rev]
        data.append(dict(type="scatter", name="flow against the drawn direction" if rev
                         else "flow direction", x=ax_, y=ay_, mode="markers",
                         marker=dict(symbol="triangle-up", size=sizes, angleref="previous",
                                     color=_REVERSE if rev else _ARROW, line=dict(width=0)),
                         text=at, hovertemplate="%{text}<extra></extra>",
                         showlegend=bool(ax_) and rev))
    for kind in ("pump", "control valve", "balancing valve", "check valve", "equipment"):
        kx, ky, kt = kinds.get(kind, ([], [], []))
        sym, col, size = MARKERS[kind]
        data.append(dict(type="scatter", name=kind, x=kx, y=ky, mode="markers",
                         marker=dict(symbol=sym, size=size, color=col,
                                     line=dict(color="white", width=1)),
                         text=kt, hovertemplate="%{text}<extra></extra>",
                         showlegend=bool(kx)))
    px, py, pt = kinds.get("pipe", ([], [], []))
    data.append(dict(type="scatter", name="pipe", x=px, y=py, mode="markers",
                     marker=dict(symbol="circle", size=7, color="rgba(0,0,0,0.05)",
                                 line=dict(color="rgba(60,60,60,0.35)", width=1)),
                     text=pt, hovertemplate="%{text}<extra></extra>", showlegend=False))
    names = list(net.node_names) + list(net.boundary_names)
    nf = len(net.nodes)
    # node names: fixed labels in the layout (positions never move with an edit, so a redraw
    # of the links leaves them as drawn) up to LABELS_AS_NOTES nodes, text on the markers
    # beyond (one text element each is lighter to draw than a layout note)
    as_notes = len(names) <= LABELS_AS_NOTES
    notes = []
    for fixed in (False, True):
        sel = [i for i in range(len(names)) if (i >= nf) == fixed]
        sym, col, size = MARKERS["fixed head" if fixed else "junction"]
        text = [names[i] for i in sel]
        hover = ([_node_hover(names[i], i, result, system, p_baro) for i in sel]
                 if result is not None else [html.escape(names[i]) for i in sel])
        trace = dict(type="scatter", name="tank or vessel (fixed head)" if fixed
                     else "junction", x=[pos[names[i]][0] for i in sel],
                     y=[pos[names[i]][1] for i in sel], mode="markers", hovertext=hover,
                     hovertemplate="%{hovertext}<extra></extra>",
                     marker=dict(symbol=sym, size=size, color=col,
                                 line=dict(color="#1f3f7a", width=1.5)),
                     showlegend=bool(sel))
        if as_notes:
            notes += [dict(x=pos[names[i]][0], y=pos[names[i]][1], text=html.escape(names[i]),
                           showarrow=False, xanchor="center", yanchor="bottom",
                           yshift=size / 2 + 1, font=dict(size=10, color="#333"))
                      for i in sel]
        else:
            trace.update(mode="markers+text", text=text, textposition="top center",
                         textfont=dict(size=10, color="#333"))
        data.append(trace)
    ix = [pos[index_node][0]] if index_node in pos else []
    iy = [pos[index_node][1]] if index_node in pos else []
    data.append(dict(type="scatter", name="index node", x=ix, y=iy, mode="markers",
                     marker=dict(symbol="circle-open", size=24, color="#d4a017",
                                 line=dict(width=3)), hoverinfo="skip", showlegend=bool(ix)))
    xs = [p[0] for p in pos.values()]
    ys = [p[1] for p in pos.values()]
    pad = 0.6
    layout = dict(
        title=dict(text=html.escape(title)), height=int(height), hovermode="closest",
        margin=dict(l=10, r=10, t=50 if title else 20, b=10),
        # the legend under the drawing, so that a narrow column keeps the drawing's width
        legend=dict(orientation="h", x=0.0, xanchor="left", y=0.0, yanchor="top",
                    font=dict(size=11)),
        xaxis=dict(visible=False, range=[min(xs) - pad - 0.4, max(xs) + pad + 0.4],
                   autorange=False),
        yaxis=dict(visible=False, range=[min(ys) - pad - 0.3, max(ys) + pad + 0.3],
                   autorange=False),
        plot_bgcolor="white")
    if notes:
        layout["annotations"] = notes
    for t in data:
        _hold_place(t)
    return {"data": data, "layout": layout}


def _hold_place(trace: dict) -> None:
    """A trace with no points gets one empty point (None, drawn as nothing) and its per-point
    lists one entry: every trace keeps a drawn group, so an edit that moves the last link out
    of a class (or the first into it) changes the traces' points only and the browser can
    redraw without a full draw (kit/panels/plot_view.js)."""
    if trace.get("x"):
        return
    trace["x"], trace["y"] = [None], [None]
    for key in ("text", "hovertext"):
        if isinstance(trace.get(key), list):
            trace[key] = [""]
    marker = trace.get("marker")
    if isinstance(marker, dict) and isinstance(marker.get("size"), list):
        trace["marker"] = {**marker, "size": [0]}


class NetworkSchematic(widgets.VBox):
    """The schematic widget: a :class:`~kit.panels.plot_view.PlotView` and a colouring choice.

    Parameters
    ----------
    system : str
        'SI' or 'US'.
    colour_by : str
        'velocity' or 'pressure_drop'.
    title : str
    height : int
        [px]

    Attributes
    ----------
    view : PlotView
        The figure (CSS ``hl-network-schematic`` on the box).
    colour : ipywidgets.ToggleButtons
        Velocity or pressure drop per length (CSS ``hl-schematic-colour``).
    """

    def __init__(self, system: str = "SI", colour_by: str = "velocity", title: str = "",
                 height: int = 520):
        from kit.panels.plot_view import PlotView

        self.system = check_system(system)
        if colour_by not in COLOUR_BY:
            raise KeyError(f"unknown link colouring {colour_by!r}; choose one of "
                           f"{', '.join(COLOUR_BY)}")
        self.title = title
        self.height = int(height)
        self.view = PlotView()
        self.colour = widgets.ToggleButtons(
            options=[("colour by " + lab, key) for key, (lab, _k) in COLOUR_BY.items()],
            value=colour_by, style={"button_width": "auto"})
        self.colour.add_class("hl-schematic-colour")
        self._args: tuple | None = None
        self._positions: dict | None = None
        self._net_key = None
        super().__init__([self.colour, self.view])
        self.add_class("hl-network-schematic")
        self.colour.observe(lambda _c: self._render(), names="value")

    def show(self, net, result, index_circuit=(), index_node: str | None = None) -> None:
        """Draw ``net`` solved as ``result`` (None: topology only)."""
        key = (tuple(net.node_names), tuple(net.boundary_names),
               tuple((k.from_node, k.to_node) for k in net.links))
        if key != self._net_key:
            self._positions = stress_positions(net)
            self._net_key = key
        self._args = (net, result, tuple(index_circuit or ()), index_node)
        self._render()

    def _render(self) -> None:
        if self._args is None:
            return
        net, result, circuit, node = self._args
        self.view.show(schematic_figure(net, result, index_circuit=circuit, index_node=node,
                                        colour_by=self.colour.value, system=self.system,
                                        positions=self._positions, title=self.title,
                                        height=self.height))

    def set_system(self, system: str) -> None:
        """Re-draw the hover texts and the legend in ``system``."""
        self.system = check_system(system)
        self._render()

    def to_figure(self):
        """What is shown, as a static ``plotly.graph_objects.Figure``."""
        return self.view.to_figure()
