"""Bad network inputs: each refused with the exact error class and a message naming the cause."""

import math
from types import SimpleNamespace as NS

import numpy as np
import pytest

from kit.core.line import Segment
from kit.core.network import (
    BalancingValveLink,
    Boundary,
    CheckValveLink,
    ControlValveLink,
    Network,
    Node,
    PipeLink,
    PumpLink,
    network_curve,
)
from kit.core.pump import PumpCurve, parallel
from kit.errors import InputError, NoSolutionError, OutOfRangeError, UnknownChoiceError

WATER20 = NS(rho=998.21, mu=1.0016e-3, pv=2339.0, T=293.15)  # 20 °C, from memory


def pipe(Di=0.1023):
    p = NS(Di=Di, area=math.pi / 4 * Di * Di, roughness=4.5e-5)
    p.with_condition = lambda c: p
    return p


def seg(name, L=100.0, rise=0.0):
    return Segment(name, pipe(), L, rise=rise)


def pump(name="P-1", shutoff=30.0):
    return PumpCurve([0.0, 0.01, 0.02], [shutoff, shutoff * 0.93, shutoff * 0.73],
                     speed_rpm=1450, diameter=0.25, name=name)


def simple(nodes=None, boundaries=None, links=None):
    nodes = nodes if nodes is not None else [Node("J", 0.0, demand=0.01)]
    boundaries = boundaries if boundaries is not None else [Boundary("T", 20.0)]
    links = links if links is not None else [PipeLink("P", "T", "J", seg("P"))]
    return Network("n", nodes, boundaries, links, WATER20)


BAD_MODEL = [
    pytest.param(lambda: simple(nodes=[Node("J", 0.0), Node("J", 1.0)]), InputError,
                 r"'node name' is used twice.*not 'J'", id="duplicate node name"),
    pytest.param(lambda: simple(boundaries=[Boundary("J", 5.0)]), InputError,
                 r"'node name' is used twice", id="node and boundary share a name"),
    pytest.param(lambda: simple(links=[PipeLink("P", "T", "J", seg("a")),
                                       PipeLink("P", "T", "J", seg("b"))]), InputError,
                 r"'link name' is used twice.*not 'P'", id="duplicate link name"),
    pytest.param(lambda: simple(links=[PipeLink("P", "T", "X", seg("P"))]), UnknownChoiceError,
                 r"'to node of link 'P'' must be one of 'J', 'T', not 'X'", id="unknown node"),
    pytest.param(lambda: PipeLink("P", "J", "J", seg("P")), InputError,
                 r"'to node of link 'P'' must differ from its from node", id="link to itself"),
    pytest.param(lambda: seg("P", L=-5.0), OutOfRangeError,
                 r"'length of segment 'P'' must be between 0 and 1e\+06 m, not -5 m",
                 id="negative length"),
    pytest.param(lambda: simple(nodes=[Node("J", 0.0), Node("K", 150.0)],
                                links=[PipeLink("P", "T", "J", seg("P")),
                                       PipeLink("Q", "J", "K", seg("Q"))]), OutOfRangeError,
                 r"'length of link 'Q'' must be at least 150 m, not 100 m",
                 id="ends further apart in elevation than the pipe is long"),
    pytest.param(lambda: simple(nodes=[Node("J", 0.0), Node("K", 5.0)],
                                links=[PipeLink("P", "T", "J", seg("P")),
                                       PipeLink("Q", "J", "K", seg("Q", rise=3.0))]), InputError,
                 r"'rise of link 'Q'' must agree with its ends' elevations \(5 m",
                 id="segment rise disagrees with node elevations"),
    pytest.param(lambda: simple(boundaries=[], links=[]), InputError,
                 r"must hold at least one fixed-head node", id="no fixed head"),
    pytest.param(lambda: simple(nodes=[Node("J", 0.0), Node("K", 0.0), Node("L", 0.0)],
                                links=[PipeLink("P", "T", "J", seg("P")),
                                       PipeLink("Q", "K", "L", seg("Q"))]),
                 InputError, r"'nodes 'K', 'L'' have no path to any fixed-head node",
                 id="disconnected nodes named"),
    pytest.param(lambda: Node("J", 0.0, demand=math.nan), OutOfRangeError,
                 r"'demand of node 'J''", id="demand not a number"),
    pytest.param(lambda: Node("J", 0.0, min_pressure=-1.0), OutOfRangeError,
                 r"'minimum pressure of node 'J'' must be between 0 and 1e\+08 Pa",
                 id="negative minimum pressure"),
    pytest.param(lambda: Boundary("T", 10.0, 5.0), OutOfRangeError,
                 r"'high level of 'T'' must be between 10 and 10000 m, not 5 m",
                 id="boundary high level below low"),
    pytest.param(lambda: ControlValveLink("CV", "a", "b", kv_rated=10.0, opening=1.2),
                 OutOfRangeError, r"'opening of control valve 'CV'' must be between 0 and 1",
                 id="opening above 1"),
    pytest.param(lambda: ControlValveLink("CV", "a", "b", kv_rated=10.0,
                                          characteristic="parabolic"), UnknownChoiceError,
                 r"'characteristic of control valve 'CV'' must be one of 'linear'",
                 id="unknown characteristic"),
    pytest.param(lambda: CheckValveLink("NRV", "a", "b", kv=0.0), OutOfRangeError,
                 r"'Kv of check valve 'NRV'' must be between 0 and 1e\+06 m³/h, not 0",
                 id="zero Kv"),
    pytest.param(lambda: BalancingValveLink("BV", "a", "b", kv=10.0, kv_max=5.0),
                 OutOfRangeError, r"'fully open Kv of balancing valve 'BV''", id="kv above kv_max"),
    pytest.param(lambda: PumpLink("P", "a", "b", parallel([pump(), pump()]), speed_rpm=1200.0),
                 InputError, r"'speed of link 'P'' can be set for a single PumpCurve only",
                 id="speed on a pump set"),
    pytest.param(lambda: PipeLink("P", "a", "b", segment="pipe"), InputError,
                 r"'segment of link 'P'' must be a Segment", id="segment not a Segment"),
    pytest.param(lambda: Network("n", [Node("J", 0.0)], [Boundary("T", 1.0)], ["x"], WATER20),
                 InputError, r"'links of network 'n'' must be one of PipeLink", id="not a link"),
]


@pytest.mark.parametrize("build, error, match", BAD_MODEL)
def test_bad_model_refused(build, error, match):
    with pytest.raises(error, match=match):
        build()


def test_unknown_boundary_in_levels():
    with pytest.raises(UnknownChoiceError, match=r"'boundary in levels' must be one of 'T'"):
        simple().solve(levels={"Z": "high"})


def test_bad_level_word():
    with pytest.raises(UnknownChoiceError, match=r"'level of 'T'' must be one of 'low', 'high'"):
        simple().solve(levels="middle")


def test_negative_demand_factor():
    with pytest.raises(OutOfRangeError, match=r"'demand factor' must be between 0 and 1000"):
        simple().solve(demand_factor=-1.0)


def test_check_valve_closed_on_every_path():
    # J draws flow, but its only link lets flow leave J only: the valve is held shut
    net = simple(links=[CheckValveLink("NRV", "J", "T", kv=50.0)])
    with pytest.raises(NoSolutionError, match=r"check valve closed on every path to nodes 'J'.*"
                                              r"'NRV' held shut"):
        net.solve()


def test_pump_cannot_meet_head_asked():
    # a pump (shut-off 30 m) is the only feed of a node 60 m up: no delivery
    net = Network("lift", [Node("S", 0.0), Node("D", 0.0), Node("J", 60.0, demand=0.005)],
                  [Boundary("sump", 0.0)],
                  [PipeLink("suc", "sump", "S", seg("suc", L=5.0)), PumpLink("P", "S", "D", pump()),
                   PipeLink("riser", "D", "J", seg("riser", L=80.0))], WATER20)
    with pytest.raises(NoSolutionError, match=r"pressure at nodes 'J' would fall below zero.*"
                                              r"pump 'P' makes .*shut-off head 30 m.*cannot "
                                              r"meet the head asked"):
        net.solve()


def test_pump_cannot_meet_demand_beyond_zero_head():
    net = Network("runout", [Node("S", 0.0), Node("D", 0.0), Node("J", 0.0, demand=0.2)],
                  [Boundary("sump", 0.0, pressure=101325.0 + 5e6)],
                  [PipeLink("suc", "sump", "S", Segment("suc", pipe(0.3), 5.0)),
                   PumpLink("P", "S", "D", pump()),
                   PipeLink("dis", "D", "J", Segment("dis", pipe(0.3), 5.0))], WATER20)
    with pytest.raises(NoSolutionError, match=r"pump 'P' cannot meet the demand: it would run at "
                                              r"0.2 m³/s, beyond the flow where its curve falls"):
        net.solve()


def test_initial_flows_of_wrong_length():
    with pytest.raises(InputError, match=r"'initial flows' must hold one finite flow per link "
                                         r"\(1\), not \(3,\) m³/s"):
        simple().solve(initial=np.zeros(3))
    with pytest.raises(InputError, match=r"'iterations allowed' must be a whole number, not 2.5"):
        simple().solve(max_iter=2.5)


def check_valve_pair():
    """'P2' (non-return, J -> high) is held shut once: one status change."""
    return Network("cv", [Node("J", 0.0)], [Boundary("low", 5.0), Boundary("high", 20.0)],
                   [PipeLink("P1", "low", "J", seg("P1", L=50.0)),
                    CheckValveLink("NRV", "high", "J", kv=80.0),
                    PipeLink("P2", "J", "high", seg("P2", L=50.0), check=True)], WATER20)


def test_status_cycling_refused(monkeypatch):
    import kit.core.network_solve as ns

    monkeypatch.setattr(ns, "MAX_FLIPS", 0)
    with pytest.raises(NoSolutionError, match=r"non-return links keep opening and closing: 'P2' "
                                              r"changed state more than 0 times"):
        check_valve_pair().solve()


def test_status_rounds_limited(monkeypatch):
    import kit.core.network_solve as ns

    monkeypatch.setattr(ns, "MAX_ROUNDS", 1)
    with pytest.raises(NoSolutionError, match=r"status of non-return links not settled after 1 "
                                              r"rounds"):
        check_valve_pair().solve()


def test_not_converged_names_the_iterations():
    with pytest.raises(NoSolutionError, match=r"not converged after 1 iterations"):
        check_valve_pair().solve(max_iter=1)


def test_curve_needs_a_minimum_pressure_downstream():
    net = Network("c", [Node("S", 0.0), Node("D", 0.0), Node("J", 0.0, demand=0.01)],
                  [Boundary("T", 0.0)],
                  [PipeLink("s", "T", "S", seg("s", L=5.0)), PumpLink("P", "S", "D", pump()),
                   PipeLink("d", "D", "J", seg("d"))], WATER20)
    with pytest.raises(InputError, match=r"'minimum pressures downstream of pump 'P'' must be "
                                         r"given at one node at least"):
        network_curve(net, [0.0, 0.01], pump="P")
    with pytest.raises(InputError, match=r"'flows of the network curve' must be a non-empty list "
                                         r"of finite flows ≥ 0, not -0.01 m³/s"):
        network_curve(net, [0.0, -0.01], pump="P")
    with pytest.raises(UnknownChoiceError, match=r"'pump' must be one of 'P', not 'd'"):
        network_curve(net, [0.01], pump="d")
    with pytest.raises(UnknownChoiceError, match=r"'network curve method' must be one of"):
        network_curve(net, [0.01], pump="P", method="fast")


def test_curve_without_pump():
    with pytest.raises(InputError, match=r"'pump' must be given: the network has no pump link"):
        network_curve(simple(), [0.01])


def test_balance_refusals():
    from kit.core.network import balance

    net = Network("b", [Node("S", 0.0), Node("D", 0.0), Node("M", 0.0)], [Boundary("v", 0.0)],
                  [PipeLink("vl", "v", "S", seg("vl", L=2.0)), PumpLink("pump", "S", "D", pump()),
                   PipeLink("coil", "D", "M", seg("coil")),
                   BalancingValveLink("BV", "M", "S", kv=10.0),
                   BalancingValveLink("BW", "M", "S", kv=10.0, kv_max=20.0)], WATER20)
    with pytest.raises(InputError, match=r"'fully open Kv of balancing valve 'BV'' is needed to "
                                         r"balance"):
        balance(net, {"BV": 0.002})
    with pytest.raises(InputError, match=r"'design flow link 'coil'' must be a balancing valve, "
                                         r"not 'pipe'"):
        balance(net, {"coil": 0.002})
    with pytest.raises(InputError, match=r"'design flow of 'BW'' must be greater than 0, not -1"):
        balance(net, {"BW": -1.0})
    with pytest.raises(InputError, match=r"'design flows' must name at least one balancing valve"):
        balance(net, {})
