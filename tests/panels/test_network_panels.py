"""Network panels built and driven without a kernel: the schematic, the result tables and the
node/link table editors.

Independent checks, each named:
- arrow directions and colour classes against the link flows computed here by hand
  (V = Q / (π D²/4), the class from the stated edges; definitions);
- node pressures in the hover text against p = p_baro + ρ g (H − z) (definition of the head);
- Cv from Kv: Cv = Kv / 0.865 (the usual conversion factor, from memory);
- the layout against its own promises: every node placed, no two on one spot, the same
  topology giving the same picture whatever the flows.
"""

from __future__ import annotations

import math
from types import SimpleNamespace as NS

import numpy as np
import pytest

from kit.core.constants import G
from kit.core.line import Segment
from kit.core.network import (
    BalancingValveLink,
    Boundary,
    ControlValveLink,
    Network,
    Node,
    PipeLink,
    PumpLink,
)
from kit.core.pump import PumpCurve
from kit.panels.network_editor import LinkTable, NodeTable, key_position
from kit.panels.network_schematic import (
    COLOUR_CLASSES,
    layered_positions,
    schematic_figure,
    stress_positions,
)
from kit.panels.network_tables import NetworkTables, balancing_rows, link_rows, valve_rows

WATER = NS(rho=998.21, mu=1.0016e-3, pv=2339.0, T=293.15, name="water")  # 20 °C, from memory
P_ATM = 101325.0


def pipe(Di, eps=4.5e-5):
    p = NS(Di=Di, area=math.pi / 4 * Di * Di, roughness=eps)
    p.with_condition = lambda c: p
    return p


def coils(length=30.0):
    """An invented closed circuit: vessel at the pump suction, three coil branches with a
    control valve and a balancing valve each between a supply and a return header."""
    pump = PumpCurve([0.0, 0.006, 0.012, 0.018], [30.0, 28.0, 23.0, 15.0], speed_rpm=1450,
                     diameter=0.2, name="CHW")
    nodes = [Node("S", 0.0), Node("D", 0.0)]
    links = [PipeLink("vessel line", "vessel", "S", Segment("v", pipe(0.05), 2.0)),
             PumpLink("pump", "S", "D", pump)]
    prev_s, prev_r = "D", "S"
    for i in range(3):
        s, r, m, c = f"S{i}", f"R{i}", f"M{i}", f"C{i}"
        nodes += [Node(s, 3.0 * i), Node(r, 3.0 * i), Node(m, 3.0 * i), Node(c, 3.0 * i)]
        links += [PipeLink(f"sup{i}", prev_s, s, Segment(f"sup{i}", pipe(0.1023), length)),
                  PipeLink(f"ret{i}", r, prev_r, Segment(f"ret{i}", pipe(0.1023), length)),
                  PipeLink(f"coil{i}", s, m, Segment(f"coil{i}", pipe(0.0409), 20.0)),
                  ControlValveLink(f"TV{i}", m, c, kv_rated=25.0, opening=0.7, diameter=0.04),
                  BalancingValveLink(f"BV{i}", c, r, kv=20.0 + 5 * i, kv_max=40.0)]
        prev_s, prev_r = s, r
    return Network("coils", nodes, [Boundary("vessel", 0.0, pressure=P_ATM + 2e5)], links,
                   WATER)


def reversed_feed():
    """Two tanks feeding a junction; link 'back' is drawn J → U but U feeds J."""
    return Network("f", [Node("J", 30.0), Node("K", 0.0, demand=0.03)],
                   [Boundary("T", 55.0), Boundary("U", 56.0)],
                   [PipeLink("up", "T", "J", Segment("up", pipe(0.1023), 40.0)),
                    PipeLink("back", "J", "U", Segment("back", pipe(0.1023), 40.0)),
                    PipeLink("down", "J", "K", Segment("down", pipe(0.1023), 40.0))], WATER)


# ------------------------------------------------------------------ layout

@pytest.mark.parametrize("layout", [layered_positions, stress_positions])
def test_layout_places_every_node_apart_and_depends_on_topology_only(layout):
    a = coils(30.0)
    b = coils(80.0)          # same topology, other lengths (and so other flows)
    pa, pb = layout(a), layout(b)
    names = a.node_names + a.boundary_names
    assert set(pa) == set(names) and pa == pb
    pts = np.array([pa[n] for n in names])
    d = np.sqrt(((pts[:, None] - pts[None]) ** 2).sum(-1)) + np.eye(len(names)) * 1e9
    assert d.min() > 0.2                       # no two nodes on one spot
    assert layout(a) == pa                     # deterministic


def test_layered_layout_puts_fixed_heads_first_and_neighbours_one_layer_apart():
    net = coils()
    pos = layered_positions(net)
    assert pos["vessel"][0] == 0.0
    for k in net.links:    # breadth-first layers: a link spans at most one layer
        assert abs(pos[k.from_node][0] - pos[k.to_node][0]) <= 1.0


def test_stress_layout_draws_links_about_one_unit_long():
    net = coils()
    pos = stress_positions(net)
    lengths = [math.dist(pos[k.from_node], pos[k.to_node]) for k in net.links]
    assert 0.5 < np.median(lengths) < 1.5


# ------------------------------------------------------------------ schematic

def _trace(fig, name):
    return next(t for t in fig["data"] if t["name"] == name)


def _arrows(trace):
    """(tail, head) point pairs of an arrow trace: a hidden point, then the head."""
    x, y, size = trace["x"], trace["y"], trace["marker"]["size"]
    assert trace["marker"]["angleref"] == "previous"
    out = []
    for j in range(0, len(x), 2):
        assert size[j] == 0 and size[j + 1] > 0
        out.append(((x[j], y[j]), (x[j + 1], y[j + 1])))
    return out


def _along(a, b, p, q) -> bool:
    """True when the step a → b points the same way as p → q."""
    u = np.subtract(b, a)
    v = np.subtract(q, p)
    return abs(u[0] * v[1] - u[1] * v[0]) < 1e-9 * np.hypot(*u) * np.hypot(*v) + 1e-15 \
        and float(np.dot(u, v)) > 0


def test_arrows_point_along_the_flow_and_reverse_flow_is_marked():
    net = reversed_feed()
    res = net.solve()
    assert res.flow("back") < 0                         # U → J, against the drawn J → U
    pos = layered_positions(net)
    fig = schematic_figure(net, res, positions=pos)
    fwd = _arrows(_trace(fig, "flow direction"))
    rev = _arrows(_trace(fig, "flow against the drawn direction"))
    assert len(rev) == 1 and _trace(fig, "flow against the drawn direction")["showlegend"]
    assert _along(*rev[0], pos["U"], pos["J"])          # points from U to J
    for k in net.links:
        if res.flow(k.name) <= 0:
            continue
        p, q = pos[k.from_node], pos[k.to_node]
        assert any(_along(a, b, p, q) for a, b in fwd), k.name


def test_a_round_off_flow_is_no_flow_not_reverse_flow():
    """The coil circuit's expansion-vessel line carries no flow: its solved flow is round-off
    of either sign. Forced to a tiny negative value (as a solve leaves it, ~1e-15 m³/s), it
    gets no arrow on the schematic and no "reverse flow" note in the link table; a real
    reverse flow (1e-3 of the largest) still does. Independent: the sign rule by hand with
    the solver's tolerance of 1e-9 of the largest flow (kit.core.network_solve.still_flow)."""
    import dataclasses

    net = coils()
    res = net.solve()
    i = net.link_names.index("vessel line")
    qmax = float(np.abs(res.Q).max())
    for q, reverse in ((-1.9e-15, False), (-1e-3 * qmax, True)):
        Q = np.array(res.Q, dtype=float)
        Q[i] = q
        r = dataclasses.replace(res, Q=Q) if dataclasses.is_dataclass(res) else None
        if r is None:
            pytest.skip("NetworkResult is not a dataclass")
        fig = schematic_figure(net, r, positions=stress_positions(net))
        n_rev = len(_trace(fig, "flow against the drawn direction")["x"]) // 2
        assert n_rev == (1 if reverse else 0), (q, n_rev)
        row = link_rows(r)[i]
        assert ("reverse flow" in str(row.get("note", ""))) == reverse, (q, row)


def test_links_coloured_in_the_class_of_their_velocity():
    net = coils()
    res = net.solve()
    pos = stress_positions(net)
    fig = schematic_figure(net, res, positions=pos)
    edges = COLOUR_CLASSES["velocity"]
    lines = [t for t in fig["data"] if t["name"].startswith("velocity")]
    assert len(lines) == len(edges) + 1
    for k in net.links:
        if not isinstance(k, PipeLink):
            continue
        V = abs(res.flow(k.name)) / (math.pi / 4 * k.segment.pipe.Di ** 2)   # by hand
        c = sum(V >= e for e in edges)
        x0, x1 = pos[k.from_node][0], pos[k.to_node][0]
        xs = lines[c]["x"]
        assert any(xs[j] == x0 and xs[j + 1] == x1 for j in range(0, len(xs), 3)), k.name


def test_pressure_drop_colouring_and_index_circuit_band():
    net = coils()
    res = net.solve()
    circuit = ("sup0", "sup1", "sup2", "coil2", "TV2", "BV2", "ret2", "ret1", "ret0")
    fig = schematic_figure(net, res, index_circuit=circuit, index_node="S2",
                           colour_by="pressure_drop", system="US")
    band = _trace(fig, "index circuit")
    assert len(band["x"]) == 3 * len(circuit)       # one segment (and a gap) per link
    names = [t["name"] for t in fig["data"]]
    assert any(n.startswith("pressure drop per length") and "psi/100 ft" in n for n in names)
    assert _trace(fig, "index node")["x"]
    with pytest.raises(KeyError, match="velocity, pressure_drop"):
        schematic_figure(net, res, colour_by="speed")


def test_node_hover_gives_head_and_pressures_in_display_units():
    net = reversed_feed()
    res = net.solve()
    fig = schematic_figure(net, res, system="SI")
    hover = _trace(fig, "junction")["hovertext"][0]          # node 'J'
    i = res.node_names.index("J")
    p = P_ATM + WATER.rho * G * (res.H[i] - 30.0)              # definition of the head
    assert f"{(p - P_ATM) / 1000:.3g} kPa(g)" in hover.replace("−", "-")
    assert "head (HGL)" in hover and "elevation 30.0 m" in hover
    us = schematic_figure(net, res, system="US")
    assert "psig" in _trace(us, "junction")["hovertext"][0]


def test_topology_only_figure_without_a_result():
    fig = schematic_figure(coils(), None)
    assert _trace(fig, "link")["x"]
    # no arrows: the trace holds only its place (one empty point, drawn as nothing)
    assert all(v is None for v in _trace(fig, "flow direction")["x"])


# ------------------------------------------------------------------ tables

def test_link_and_node_tables_in_both_systems():
    net = coils()
    res = net.solve()
    t = NetworkTables()
    t.show(res, index_circuit=("sup0",), index_node="S2")
    q = res.flow("coil0")
    assert f"{q * 3600:.3g}" in t.links.value                 # m³/h
    assert "index circuit" in t.links.value and "index node" in t.nodes.value
    t.set_system("US")
    assert f"{q / 6.30901964e-5:.3g}" in t.links.value       # US gpm (231 in³/min)
    assert "[psig]" in t.nodes.value and "[psia]" in t.nodes.value
    rows = {r["name"]: r for r in link_rows(res)}
    h = res.head_loss[res.link_names.index("coil0")]
    assert rows["coil0"]["dp_per_length"] == pytest.approx(abs(h) * WATER.rho * G / 20.0)
    assert rows["TV0"]["dp_per_length"] is None


def test_valve_rows_convert_kv_to_cv_and_mark_the_flags():
    from kit.core.valves import ValveCase, size_control_valve

    v = size_control_valve([ValveCase("minimum", 0.001, 3e5, 2.9e5),
                            ValveCase("normal", 0.004, 3e5, 2.5e5),
                            ValveCase("maximum", 0.02, 3e5, 1e5)],
                           rho=998.2, mu=1e-3, pv=2339.0, pc=22.064e6, kv_rated=25.0,
                           dp_rest=1e5, name="TV-1")
    si = valve_rows({"TV-1": v}, "SI")
    us = valve_rows({"TV-1": v}, "US")
    assert [r["case"] for r in si] == ["minimum", "normal", "maximum"]
    for a, b in zip(si, us, strict=True):
        assert b["required"] == pytest.approx(a["required"] / 0.865, rel=2e-3)   # from memory
    assert si[1]["authority"] == pytest.approx(0.5e5 / 1.5e5)   # Δp_v / (Δp_v + Δp_rest)
    assert si[0]["authority"] is None
    assert "required above rated" in si[2]["flags"]            # 72 m³/h through Kv 25


def test_balancing_rows_show_the_set_kv_and_the_index_valve():
    from kit.core.network import balance

    net = coils()
    design = {"BV0": 0.004, "BV1": 0.005, "BV2": 0.003}
    bal = balance(net, design, pump="pump")
    rows = {r["name"]: r for r in balancing_rows(net, bal, design)}
    assert rows[bal.index_valve]["fraction"] == pytest.approx(1.0)
    assert "index valve" in rows[bal.index_valve]["note"]
    other = next(n for n in design if n != bal.index_valve)
    assert rows[other]["setting"] == pytest.approx(bal.kv[other])
    assert rows[other]["head"] == pytest.approx(bal.head_drop[other])


# ------------------------------------------------------------------ editors

NODES = [{"name": "J1", "elevation": "12 m", "demand": "5 L/s", "note": "kept"},
         {"name": "J2", "elevation": "40 ft", "min_pressure": "1.5 bar(g)"}]
LINKS = [
    {"name": "main", "type": "pipe", "from": "T", "to": "J1", "length": "120 m",
     "pipe": {"standard": "asme_b36_10m", "nominal": "4", "schedule": "40"},
     "fittings": [{"kind": "fixed_k", "K": 2.0, "label": "strainer"}]},
    {"name": "TV", "type": "control_valve", "from": "J1", "to": "J2", "kv": 16.0,
     "opening": "80 %", "flow_min": "1 m3/h", "flow_max": "9 m3/h"},
    {"name": "BV", "type": "balancing_valve", "from": "J2", "to": "T", "cv_max": 40.0,
     "design_flow": "8 m3/h"},
    {"name": "HX", "type": "heat_exchanger", "from": "J2", "to": "T", "duty": "secret"},
]


def test_unchanged_tables_give_the_document_rows_back():
    assert NodeTable(NODES).value == tuple(NODES)
    lt = LinkTable(LINKS)
    assert lt.value == tuple(LINKS)       # a type it has no fields for is kept as written
    lt.rows[0].open_details()             # building the pipe's picker changes nothing
    assert lt.value == tuple(LINKS)


def test_an_edit_is_written_as_typed_and_a_bad_value_refused_at_its_field():
    lt = LinkTable(LINKS)
    seen = []
    lt.observe(lambda c: seen.append(c["new"]), names="value")
    for r in lt.rows:
        r.expand()
    assert lt.value == tuple(LINKS) and not seen       # opening a row changes nothing
    f = lt.rows[0].fields["length"]
    f.set_text("400 ft")
    assert lt.value[0]["length"] == "400 ft" and len(seen) == 1
    f.set_text("400 kg")
    assert lt.value is None and "length" in lt.error
    assert "hl-field-error" in f._dom_classes and "400 kg" == f.text
    assert "hl-field-error" not in lt.rows[0]._dom_classes       # the box, not the row
    f.set_text("400 ft")
    assert lt.value[0]["length"] == "400 ft"
    lt.rows[1].open_details()
    assert lt.value[1] == LINKS[1]
    lt.rows[1].fields["opening"].set_text("55 %")
    assert lt.value[1]["opening"] == "55 %"
    lt.rows[2].fields["cv"].set_text("12")
    lt.rows[2].fields["design_flow"].set_text("")
    assert lt.value[2]["cv"] == 12.0 and "design_flow" not in lt.value[2]


def test_a_blank_row_is_incomplete_and_left_out():
    nt = NodeTable(NODES)
    assert "12 m" in nt.rows[0].summary.value and not nt.rows[0].built
    nt.add_row()
    assert len(nt.value) == 2 and "hl-row-incomplete" in nt.rows[2]._dom_classes
    assert "left out" in nt.rows[2].message.value
    nt.rows[2].name.value = "J3"
    assert len(nt.value) == 2                       # no elevation yet
    nt.rows[2].fields["elevation"].set_text("3 m")
    assert len(nt.value) == 3 and nt.value[2] == {"name": "J3", "elevation": "3 m"}
    assert "hl-row-incomplete" not in nt.rows[2]._dom_classes
    lt = LinkTable(LINKS)
    lt.add_row()
    assert len(lt.value) == len(LINKS)
    row = lt.rows[-1]
    row.name.value, row.from_.value, row.to.value = "bypass", "J1", "T"
    row.type.value = "check_valve"
    assert len(lt.value) == len(LINKS)              # no Kv yet
    row.fields["kv"].set_text("30")
    assert lt.value[-1] == {"name": "bypass", "type": "check_valve", "from": "J1", "to": "T",
                            "kv": 30.0}
    lt.remove_row(row)
    assert len(lt.value) == len(LINKS)


def test_locate_finds_the_field_a_scenario_key_names():
    from kit.errors import ScenarioError

    lt = LinkTable(LINKS)
    w = lt.locate(ScenarioError("link[1].opening", "must be at most 100 %"))
    assert w is lt.rows[1].fields["opening"]
    mark = lt.locate(ScenarioError("link[0].to", "names 'J9', which is no node"))
    mark.refuse("names 'J9', which is no node")
    assert "hl-field-error" in lt.rows[0].to._dom_classes
    assert "J9" in lt.rows[0].message.value
    mark.unrefuse()
    assert "hl-field-error" not in lt.rows[0].to._dom_classes
    assert lt.locate(ScenarioError("node[0].elevation", "x")) is None
    assert key_position(ScenarioError("title", "x")) is None


@pytest.mark.parametrize("name", ["network_schematic", "network_tables", "network_editor",
                                  "network_app"])
def test_docstring_examples(name):
    import doctest
    import importlib

    module = importlib.import_module(f"kit.panels.{name}")
    result = doctest.testmod(module, optionflags=doctest.ELLIPSIS)
    assert result.attempted > 0 and result.failed == 0


@pytest.mark.parametrize("name", ["network_schematic", "network_tables", "network_editor",
                                  "network_app"])
def test_documented_parameters_match_signatures(name):
    """Every function's numpydoc Parameters list names its arguments (as kit.core's test)."""
    import importlib
    import inspect
    import re

    module = importlib.import_module(f"kit.panels.{name}")
    for fname in module.__all__:
        obj = getattr(module, fname)
        if not inspect.isfunction(obj) or "Parameters\n" not in (obj.__doc__ or ""):
            continue
        block = obj.__doc__.split("Parameters\n", 1)[1].split("\n\n    Returns", 1)[0]
        documented = set()
        for line in block.splitlines():
            m = re.match(r"^    ([a-z_][a-z0-9_, ]*) :", line)
            if m:
                documented |= {p.strip() for p in m.group(1).split(",")}
        params = set(inspect.signature(obj).parameters) - {"self"}
        assert documented <= params, (fname, documented - params)
