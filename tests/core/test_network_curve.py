"""Network curve, index circuit and band: checked by full solves with a pump whose curve passes
through the point found (an independent route to the same answer: the gradient solve with the
pump in place, demands scaled by the same factor)."""

import math
from types import SimpleNamespace as NS

import numpy as np
import pytest

from kit.core.fittings import Fitting
from kit.core.line import G, Segment
from kit.core.network import Boundary, Network, Node, PipeLink, PumpLink, network_curve
from kit.core.pump import PumpCurve

WATER20 = NS(rho=998.21, mu=1.0016e-3, pv=2339.0, T=293.15)   # 20 °C, from memory
WATER5 = NS(rho=999.97, mu=1.5182e-3, pv=872.0, T=278.15)     # 5 °C, from memory
P_ATM = 101325.0


def pipe(Di, eps=4.5e-5, eps_aged=2.0e-4):
    p = NS(Di=Di, area=math.pi / 4 * Di * Di, roughness=eps)
    aged = NS(Di=Di, area=p.area, roughness=eps_aged)
    p.with_condition = aged.with_condition = lambda c: p if c == "new" else aged
    return p


PUMP = PumpCurve([0.0, 0.01, 0.02, 0.03], [60.0, 57.0, 49.0, 36.0], speed_rpm=2900,
                 diameter=0.25, name="BP")


def branched(chord=False):
    """An invented irrigation header: sump, pump, a main with four laterals."""
    nodes = [Node("S", 0.0), Node("D", 0.0)]
    links = [PipeLink("suction", "sump", "S", Segment("suction", pipe(0.1541), 8.0,
                                                      fittings=(Fitting("fixed_k", 1, {"K": 0.5}),))),
             PumpLink("pump", "S", "D", PUMP)]
    prev = "D"
    for i in range(4):
        m, e = f"M{i}", f"E{i}"
        nodes += [Node(m, 1.0 * i), Node(e, 1.0 * i + 4.0, demand=0.002 + 0.001 * i,
                                          min_pressure=P_ATM + (1.5e5 if i != 2 else 2.5e5))]
        links += [PipeLink(f"main{i}", prev, m, Segment(f"main{i}", pipe(0.1023), 60.0)),
                  PipeLink(f"lat{i}", m, e, Segment(f"lat{i}", pipe(0.0525), 25.0 + 10 * i,
                                                    fittings=(Fitting("bend", 2, {
                                                        "angle": 90.0, "R_D": 1.5}),)))]
        prev = m
    if chord:
        links.append(PipeLink("ring", "E1", "E3", Segment("ring", pipe(0.0409), 80.0)))
    return Network("header", nodes, [Boundary("sump", -2.0, 0.5)], links, WATER20)


def duty_pump(q, h):
    """A pump whose fitted quadratic passes exactly through (q, h) (3 points, degree 2)."""
    return PumpCurve([0.0, q, 2 * q], [1.3 * h, h, 0.4 * h], speed_rpm=1450, diameter=0.2,
                     name="duty")


def with_pump(net, pump):
    links = tuple(PumpLink(k.name, k.from_node, k.to_node, pump) if isinstance(k, PumpLink)
                  else k for k in net.links)
    return net.replace(links=links)


@pytest.mark.parametrize("chord", [False, True], ids=["tree", "looped discharge side"])
def test_curve_point_keeps_the_index_node_exactly_at_its_minimum(chord):
    net = branched(chord)
    Q = np.array([0.004, 0.01, 0.016])
    c = network_curve(net, Q, pump="pump")
    assert c.method == ("solve" if chord else "tree")
    total = sum(n.demand for n in net.nodes)
    for j, q in enumerate(Q):
        res = with_pump(net, duty_pump(q, c.H[0, j])).solve(demand_factor=q / total)
        assert res.flow("pump") == pytest.approx(q, rel=1e-9)
        idx = c.index_node[0][j]
        node = next(n for n in net.nodes if n.name == idx)
        assert res.pressure_at(idx) == pytest.approx(node.min_pressure, rel=1e-9)
        for n in net.nodes:  # every other node at or above its minimum
            if n.min_pressure is not None:
                assert res.pressure_at(n.name) >= n.min_pressure * (1 - 1e-12)


def test_tree_and_solve_methods_agree():
    net = branched()
    Q = np.linspace(0.0, 0.02, 9)
    a = network_curve(net, Q, pump="pump", method="tree")
    b = network_curve(net, Q, pump="pump", method="solve")
    assert a.H == pytest.approx(b.H, abs=1e-9)
    assert a.index_node == b.index_node


def test_index_circuit_is_the_path_from_the_pump():
    c = network_curve(branched(), np.array([0.015]), pump="pump")
    node = c.index_node[0][0]
    assert node == "E2"  # highest minimum pressure (common practice, no source: it binds here)
    assert c.index_circuit(0, 0) == ("main0", "main1", "main2", "lat2")


def test_band_levels_temperature_and_age():
    net = branched()
    Q = np.linspace(0.0, 0.02, 5)
    c = network_curve(net, Q, pump="pump", levels=("low", "high"), states=(WATER5, WATER20),
                      conditions=("new", "aged"))
    assert len(c.labels) == 8 and c.H.shape == (8, 5)
    lab = {x: i for i, x in enumerate(c.labels)}
    low_new = c.H[lab["low level / 20 °C / new"]]
    high_new = c.H[lab["high level / 20 °C / new"]]
    # suction tank 2.5 m higher: the pump needs 2.5 m less at every flow (energy equation)
    assert low_new - high_new == pytest.approx(np.full(5, 2.5), abs=1e-9)
    aged = c.H[lab["low level / 20 °C / aged"]]
    cold = c.H[lab["low level / 5 °C / new"]]
    assert np.all(aged[1:] > low_new[1:]) and aged[0] == pytest.approx(low_new[0])
    assert np.all(cold[1:] > low_new[1:])  # more viscous: more friction
    assert np.all(c.upper >= c.lower)
    # at zero flow the need is static only: z + (p_min − p_baro)/(ρg) of the index node − level
    static = 2.0 + 4.0 + 2.5e5 / (WATER20.rho * G) + 2.0
    assert low_new[0] == pytest.approx(static, abs=1e-9)


def test_closed_circuit_curve_is_the_loop_loss():
    """A closed loop with a pressurising vessel: no demand; the head at each circulated flow
    is the loop's loss; checked by a solve with a pump through that point."""
    nodes = [Node("S", 0.0), Node("D", 0.0), Node("A", 5.0), Node("B", 5.0)]
    links = [PipeLink("vessel", "exp", "S", Segment("vessel", pipe(0.025), 1.0)),
             PumpLink("pump", "S", "D", PUMP),
             PipeLink("riser", "D", "A", Segment("riser", pipe(0.0779), 40.0)),
             PipeLink("coil", "A", "B", Segment("coil", pipe(0.0409), 30.0)),
             PipeLink("bypass", "A", "B", Segment("bypass", pipe(0.0266), 10.0)),
             PipeLink("return", "B", "S", Segment("return", pipe(0.0779), 40.0))]
    net = Network("loop", nodes, [Boundary("exp", 2.0, pressure=P_ATM + 1.5e5)], links, WATER20)
    Q = np.array([0.003, 0.008])
    c = network_curve(net, Q, pump="pump")
    assert c.method == "solve" and c.load_factor.tolist() == [0.0, 0.0]
    for j, q in enumerate(Q):
        res = with_pump(net, duty_pump(q, c.H[0, j])).solve()
        assert res.flow("pump") == pytest.approx(q, rel=1e-8)


def test_index_circuit_in_a_looped_network_follows_the_flow():
    net = branched(chord=True)
    c = network_curve(net, np.array([0.012]), pump="pump")
    path = c.index_circuit(0, 0)
    res = with_pump(net, duty_pump(0.012, c.H[0, 0])).solve(
        demand_factor=0.012 / sum(n.demand for n in net.nodes))
    # the path is connected from the pump's discharge to the index node, along the flow
    at = "D"
    for name in path:
        k = net.link(name)
        assert res.flow(name) > 0 and k.from_node == at or res.flow(name) < 0 and k.to_node == at
        at = k.to_node if res.flow(name) > 0 else k.from_node
    assert at == c.index_node[0][0]


def test_pump_set_as_one_link():
    from kit.core.pump import parallel

    pair = parallel([PUMP, PUMP], name="duty pair")
    net = with_pump(branched(), pair)
    res = net.solve(demand_factor=2.0)
    total = 2.0 * sum(n.demand for n in net.nodes)
    assert res.flow("pump") == pytest.approx(total, rel=1e-12)  # continuity
    assert -res.head_loss[net.link_names.index("pump")] == pytest.approx(
        float(pair.head(total)), rel=1e-9)


def test_curve_with_a_tank_downstream_is_discharge_minus_suction_head():
    """The pump fills a tank and feeds a node on the way: the boundaries fix every head, so
    the curve is H_discharge − H_suction at each flow, checked by a solve with a pump through
    that point; the node's minimum is a check (shortfall), not what sets the head."""
    nodes = [Node("S", 0.0), Node("D", 0.0), Node("J", 3.0, demand=0.002,
                                                    min_pressure=P_ATM + 4.0e5)]
    links = [PipeLink("suc", "sump", "S", Segment("suc", pipe(0.1023), 5.0)),
             PumpLink("pump", "S", "D", PUMP),
             PipeLink("dis", "D", "J", Segment("dis", pipe(0.0779), 80.0)),
             PipeLink("fill", "J", "tank", Segment("fill", pipe(0.0779), 60.0))]
    net = Network("fill", nodes, [Boundary("sump", 0.0), Boundary("tank", 25.0)], links, WATER20)
    Q = np.array([0.004, 0.012])
    c = network_curve(net, Q, pump="pump")
    assert c.method == "tree"  # each side a tree with one fixed head: flows affine in Q
    assert network_curve(net, Q, pump="pump", method="solve").H == pytest.approx(c.H, abs=1e-9)
    for j, q in enumerate(Q):
        res = with_pump(net, duty_pump(q, c.H[0, j])).solve()  # J at its design demand
        assert res.flow("pump") == pytest.approx(q, rel=1e-7)
        lack = max(net.nodes[2].min_pressure - res.pressure_at("J"), 0.0)
        assert c.shortfall[0, j] == pytest.approx(lack, rel=1e-6, abs=1e-6)
    assert c.shortfall[0, 0] > 0  # ~25 m at J is short of the 40.8 m asked
