"""Result tables of a solved network: links, nodes, control valves and balancing valves.

Rows are built from the core objects (SI) and shown through
:func:`kit.panels.tables.results_table_html` in the display system of :mod:`kit.units`:

- **links** (:func:`link_rows`): from, to, kind, status, flow, velocity, head loss (a pump's
  as its head gain, negative), friction pressure drop per length, Reynolds number, and a note
  (reverse flow against the drawn direction, on the index circuit, held shut);
- **nodes** (:func:`node_rows`): elevation, demand, head (HGL), gauge and absolute pressure,
  the minimum residual pressure and the margin above it; fixed-head nodes say so;
- **control valves** (:func:`valve_rows`): one row per sizing case of each valve (IEC
  60534-2-1 via :func:`kit.core.valves.size_control_valve`): flow, pressure drop, the flow
  coefficient required and rated, the opening on the valve's inherent characteristic, the
  authority on the design case, and the flags (choked, flashing, incipient cavitation,
  laminar, required above rated). Flow coefficients are Kv [m³/h at 1 bar] in SI and Cv
  [US gpm at 1 psi] in US units (:func:`kit.core.valves.kv_to_cv`);
- **balancing valves** (:func:`balancing_rows`): design flow, setting (Kv or Cv) found by
  :func:`kit.core.network.balance`, fully open value, setting as a fraction of fully open, and
  the head the valve takes up; the index valve (left fully open) says so.

Nothing here computes hydraulics: the pressure drop per length is the link's head loss
× ρg ÷ length and the margin a difference, both changes of presentation.

Example
-------
>>> from types import SimpleNamespace as NS
>>> from kit.core.line import Segment
>>> from kit.core.network import Boundary, Network, Node, PipeLink
>>> pipe = NS(Di=0.1023, area=0.0082196, roughness=4.5e-5, with_condition=lambda c: pipe)
>>> water = NS(rho=998.2, mu=1.002e-3, pv=2339.0, T=293.15)
>>> net = Network("demo", [Node("J1", 0.0, demand=0.01)], [Boundary("T1", 20.0)],
...               [PipeLink("P1", "T1", "J1", Segment("P1", pipe, 100.0))], water)
>>> t = NetworkTables()
>>> t.show(net.solve())
>>> "36.0" in t.links.value and "[m³/h]" in t.links.value      # 0.01 m³/s
True
"""

from __future__ import annotations

import html

import ipywidgets as widgets
import numpy as np

from kit.core.constants import G
from kit.core.network_solve import still_flow
from kit.panels.base import check_system
from kit.panels.tables import Column, results_table_html

__all__ = ["LINK_COLUMNS", "NODE_COLUMNS", "valve_columns", "balancing_columns", "link_rows",
           "node_rows", "valve_rows", "balancing_rows", "coefficient_name", "NetworkTables"]

LINK_COLUMNS = (
    Column("name", "link"), Column("kind", "kind"), Column("from", "from"), Column("to", "to"),
    Column("status", "status"), Column("Q", "flow", "flow"),
    Column("V", "velocity", "velocity"), Column("head_loss", "head loss", "head"),
    Column("dp_per_length", "pressure drop", "pressure_per_length"),
    Column("Re", "Re", digits=3), Column("note", "note"),
)
NODE_COLUMNS = (
    Column("name", "node"), Column("kind", "kind"), Column("z", "elevation", "elevation"),
    Column("demand", "demand", "flow"), Column("H", "head (HGL)", "head", digits=4),
    Column("p", "pressure", "pressure", gauge=True), Column("p_abs", "pressure", "pressure"),
    Column("p_min", "minimum", "pressure", gauge=True),
    Column("margin", "margin", "pressure_difference"), Column("note", "note"),
)


def coefficient_name(system: str) -> str:
    """The flow coefficient shown: 'Kv' (SI) or 'Cv' (US).

    >>> coefficient_name("US")
    'Cv'
    """
    return "Cv" if check_system(system) == "US" else "Kv"


def _coef(kv, system: str):
    if kv is None or not np.isfinite(kv):
        return None
    if system == "US":
        from kit.core.valves import kv_to_cv

        return float(kv_to_cv(kv))
    return float(kv)


def valve_columns(system: str = "SI") -> tuple:
    """Columns of the control-valve table (the coefficient named for ``system``)."""
    c = coefficient_name(system)
    unit = "US gpm at 1 psi" if c == "Cv" else "m³/h at 1 bar"
    return (
        Column("name", "valve"), Column("case", "case"), Column("Q", "flow", "flow"),
        Column("dp", "pressure drop", "pressure_difference"),
        Column("required", f"{c} required [{unit}]", digits=3),
        Column("rated", f"{c} rated", digits=3), Column("opening", "opening", "fraction"),
        Column("characteristic", "characteristic"),
        Column("authority", "authority", "fraction"), Column("flags", "flags"),
    )


def balancing_columns(system: str = "SI") -> tuple:
    """Columns of the balancing-valve table."""
    c = coefficient_name(system)
    return (
        Column("name", "valve"), Column("design_flow", "design flow", "flow"),
        Column("setting", f"{c} to set", digits=3), Column("fully_open", f"{c} fully open",
                                                           digits=3),
        Column("fraction", "setting / fully open", "fraction"),
        Column("head", "head taken up", "head"), Column("note", "note"),
    )


def link_rows(result, index_circuit=()) -> list[dict]:
    """One dict per link (SI) of a :class:`~kit.core.network.NetworkResult`."""
    rho = result.state.rho
    index = set(index_circuit or ())
    rows = []
    re = result.reynolds
    q_eps = still_flow(result.Q)    # a round-off flow is no flow, not reverse flow
    for i, (k, row) in enumerate(zip(result.net.links, result.links_table(), strict=True)):
        seg = getattr(k, "segment", None)
        h = row["head_loss"]
        notes = []
        if row["status"] != "open":
            notes.append("held shut")
        elif row["Q"] < -q_eps:
            notes.append("reverse flow")
        if k.name in index:
            notes.append("index circuit")
        rows.append({
            **row,
            "V": row["V"] if np.isfinite(row["V"]) else None,
            "dp_per_length": (abs(h) * rho * G / seg.length if seg is not None and
                              np.isfinite(h) else None),
            "Re": float(re[i]) if np.isfinite(re[i]) else None,
            "note": ", ".join(notes),
        })
    return rows


def node_rows(result, index_node: str | None = None) -> list[dict]:
    """One dict per node then fixed-head node (SI) of a solved network."""
    net = result.net
    nf = len(net.nodes)
    out = []
    for i, row in enumerate(result.nodes_table()):
        free = i < nf
        p = row["p"]
        pmin = net.nodes[i].min_pressure if free else None
        notes = []
        if not np.isfinite(p):
            notes.append("cut off by closed links")
        if row["name"] == index_node:
            notes.append("index node")
        out.append({
            "name": row["name"], "kind": "junction" if free else "fixed head",
            "z": row["z"], "demand": row["demand"] if free else None,
            "H": row["H"], "p": p, "p_abs": p, "p_min": pmin,
            "margin": (p - pmin) if pmin is not None and np.isfinite(p) else None,
            "note": ", ".join(notes),
        })
    return out


def _flags(cs, rated_kv) -> str:
    out = []
    if cs.kv > rated_kv:
        out.append("required above rated")
    if cs.flashing:
        out.append("flashing")
    elif cs.choked:
        out.append("choked")
    if cs.incipient_cavitation:
        out.append("incipient cavitation")
    if cs.laminar:
        out.append("laminar")
    return ", ".join(out) or "—"


def valve_rows(valves, system: str = "SI", design: str = "normal") -> list[dict]:
    """One dict per sizing case of each control valve (``valves``: name -> ValveSizing, or a
    sequence of them); flow coefficients converted for ``system``; the authority on the
    ``design`` case's row."""
    items = valves.values() if isinstance(valves, dict) else valves
    rows = []
    for v in items:
        for cs in v.cases:
            c = cs.case
            rows.append({
                "name": v.name, "case": c.label, "Q": c.Q, "dp": c.p1 - c.p2,
                "required": _coef(cs.kv, system), "rated": _coef(v.kv_rated, system),
                "opening": cs.opening, "characteristic": v.characteristic.replace("_", " "),
                "authority": v.authority if (c.label == design and v.authority is not None)
                else None,
                "flags": _flags(cs, v.kv_rated),
            })
    return rows


def balancing_rows(net, balance=None, design_flows=None, system: str = "SI") -> list[dict]:
    """One dict per balancing valve of ``net``: its design flow (``design_flows``: name ->
    m³/s), the setting found by ``balance`` (a :class:`kit.core.network.Balance`, else the
    valve's own Kv), its fully open value, the fraction and the head it takes up."""
    from kit.core.network import BalancingValveLink

    design_flows = design_flows or {}
    rows = []
    for k in net.links:
        if not isinstance(k, BalancingValveLink):
            continue
        kv = balance.kv.get(k.name) if balance is not None else None
        kv = k.kv if kv is None else kv
        notes = []
        if balance is not None and k.name == balance.index_valve:
            notes.append("index valve: left fully open")
        elif balance is None or k.name not in balance.kv:
            notes.append("setting as given")
        rows.append({
            "name": k.name, "design_flow": design_flows.get(k.name),
            "setting": _coef(kv, system), "fully_open": _coef(k.kv_max, system),
            "fraction": kv / k.kv_max if k.kv_max else None,
            "head": balance.head_drop.get(k.name) if balance is not None else None,
            "note": ", ".join(notes),
        })
    return rows


class NetworkTables(widgets.VBox):
    """The four result tables of a network, re-rendered on :meth:`set_system`.

    Attributes
    ----------
    links, nodes, valves, balancing : ipywidgets.HTML
        CSS ``hl-network-links``, ``hl-network-nodes``, ``hl-network-valves``,
        ``hl-network-balancing`` (each a ``table.hl-results``).
    """

    def __init__(self, system: str = "SI"):
        self.system = check_system(system)
        self.links = widgets.HTML("")
        self.links.add_class("hl-network-links")
        self.nodes = widgets.HTML("")
        self.nodes.add_class("hl-network-nodes")
        self.valves = widgets.HTML("")
        self.valves.add_class("hl-network-valves")
        self.balancing = widgets.HTML("")
        self.balancing.add_class("hl-network-balancing")
        self._args: tuple | None = None
        super().__init__([widgets.HTML("<b>Links</b>"), self.links,
                          widgets.HTML("<b>Nodes</b>"), self.nodes,
                          widgets.HTML("<b>Control valves</b>"), self.valves,
                          widgets.HTML("<b>Balancing valves</b>"), self.balancing])
        self.add_class("hl-network-tables")

    def show(self, result, valves=None, balance=None, design_flows=None, index_circuit=(),
             index_node: str | None = None, caption: str = "") -> None:
        """Show a solved network and, optionally, its valve sizing and balancing."""
        self._args = (result, valves or {}, balance, design_flows or {},
                      tuple(index_circuit or ()), index_node, caption)
        self._render()

    def _render(self) -> None:
        if self._args is None:
            return
        result, valves, balance, design_flows, circuit, node, caption = self._args
        s = self.system
        p_baro = float(result.net.p_baro)
        self.links.value = results_table_html(link_rows(result, circuit), LINK_COLUMNS, s,
                                              p_baro, caption=caption or None)
        self.nodes.value = results_table_html(node_rows(result, node), NODE_COLUMNS, s, p_baro)
        vr = valve_rows(valves, s)
        self.valves.value = (results_table_html(vr, valve_columns(s), s, p_baro) if vr else
                             "<i>no control valve</i>")
        br = balancing_rows(result.net, balance, design_flows, s)
        self.balancing.value = (results_table_html(br, balancing_columns(s), s, p_baro)
                                if br else "<i>no balancing valve</i>")

    def set_system(self, system: str) -> None:
        """Re-render every table in ``system``."""
        self.system = check_system(system)
        self._render()

    def text(self) -> str:
        """The tables' text (tags stripped), for tests and the status."""
        import re

        return html.unescape(re.sub(r"<[^>]+>", " ", "".join(
            w.value for w in (self.links, self.nodes, self.valves, self.balancing))))
