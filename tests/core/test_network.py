"""Network solver: checked against independent computations written here.

Sources beside each check:
- parallel pipes: the common head drop found by brentq, each pipe's flow by brentq on
  Darcy–Weisbach with Colebrook (1939) solved by brentq (written in this file);
- a two-loop network by Hardy Cross loop corrections (Cross 1936), written in this file;
- a chain of pipes against kit.core.line.Line.head_loss and kit.core.system.System.curve;
- a pump on a single line against kit.core.operating.operating_point (brentq);
- mass balance and loop energy: definitions (continuity; the energy equation round a loop).
"""

import doctest
import importlib
import math
from types import SimpleNamespace as NS

import numpy as np
import pytest
from scipy.optimize import brentq

from kit.core.line import G, Line, Segment
from kit.core.network import (
    BalancingValveLink,
    Boundary,
    CheckValveLink,
    ControlValveLink,
    Network,
    Node,
    PipeLink,
    PumpLink,
)
from kit.core.pump import PumpCurve
from kit.core.valves import KV_HEAD, RHO0

WATER20 = NS(rho=998.21, mu=1.0016e-3, pv=2339.0, T=293.15, name="water")  # 20 °C, from memory
P_ATM = 101325.0


def pipe(Di, eps=4.5e-5, eps_aged=1.5e-4):
    """A bare pipe: anything with Di, area, roughness and with_condition works in a Segment."""
    p = NS(Di=Di, area=math.pi / 4 * Di * Di, roughness=eps)
    aged = NS(Di=Di, area=p.area, roughness=eps_aged)
    p.with_condition = lambda c: p if c == "new" else aged
    aged.with_condition = p.with_condition
    return p


def colebrook(Re, eD):
    """Colebrook 1939 solved by brentq — independent of the kit."""
    return brentq(lambda f: 1 / math.sqrt(f) + 2 * math.log10(eD / 3.7 + 2.51 / (Re * math.sqrt(f))),
                  1e-4, 1.0, xtol=1e-15, rtol=1e-15)


def hand_loss(Q, Di, L, eps, st=WATER20, K=0.0):
    """Darcy–Weisbach by hand, signed with Q; turbulent flows only (checked)."""
    A = math.pi / 4 * Di**2
    V = abs(Q) / A
    Re = st.rho * V * Di / st.mu
    assert Re > 4000, "hand_loss is written for turbulent flow"
    f = colebrook(Re, eps / Di)
    return math.copysign((f * L / Di + K) * V * V / (2 * G), Q)


def flow_for_drop(dh, Di, L, eps):
    """Flow through one pipe for a head drop dh > 0, by brentq on hand_loss."""
    return brentq(lambda q: hand_loss(q, Di, L, eps) - dh, 1e-3, 5.0, xtol=1e-15, rtol=1e-14)


# ------------------------------------------------------------------ parallel pipes

PARALLEL = {
    "two": [(0.1023, 300.0), (0.0779, 200.0)],
    "three": [(0.1023, 300.0), (0.0779, 200.0), (0.1541, 650.0)],
}


@pytest.mark.parametrize("key", list(PARALLEL), ids=["two pipes (brentq)", "three pipes (brentq)"])
def test_parallel_pipes_match_brentq_on_common_head_drop(key):
    pipes = PARALLEL[key]
    demand = 0.06
    links = [PipeLink(f"P{i}", "T", "J", Segment(f"P{i}", pipe(D), L))
             for i, (D, L) in enumerate(pipes)]
    net = Network("parallel", [Node("J", 0.0, demand=demand)], [Boundary("T", 100.0)], links,
                  WATER20)
    res = net.solve()
    # independent: find the common drop dh with sum of flows = demand (brentq, Colebrook brentq)
    dh = brentq(lambda d: sum(flow_for_drop(d, D, L, 4.5e-5) for D, L in pipes) - demand,
                0.5, 99.0, xtol=1e-14, rtol=1e-14)
    assert res.head_at("J") == pytest.approx(100.0 - dh, abs=1e-8)
    for i, (D, L) in enumerate(pipes):
        assert res.flow(f"P{i}") == pytest.approx(flow_for_drop(dh, D, L, 4.5e-5), rel=1e-8)
    assert np.abs(res.continuity_residual).max() < 1e-12


# ------------------------------------------------------------------ two loops, Hardy Cross

LOOP_PIPES = {  # name: (from, to, bore [m], length [m])
    "AB": ("A", "B", 0.2, 400.0), "BC": ("B", "C", 0.15, 350.0),
    "AD": ("A", "D", 0.15, 300.0), "BE": ("B", "E", 0.1, 300.0),
    "CF": ("C", "F", 0.1, 300.0), "DE": ("D", "E", 0.1, 400.0),
    "EF": ("E", "F", 0.1, 350.0),
}
LOOP_DEMAND = {"A": 0.0, "B": 0.015, "C": 0.004, "D": 0.012, "E": 0.014, "F": 0.02}
#: Loops as (pipe, +1 if the loop runs along the pipe's from→to, −1 against)
LOOPS = [
    [("AB", 1), ("BE", 1), ("DE", -1), ("AD", -1)],
    [("BC", 1), ("CF", 1), ("EF", -1), ("BE", -1)],
]


def two_loop_network(state=WATER20):
    nodes = [Node(n, 0.0, demand=d) for n, d in LOOP_DEMAND.items()]
    links = [PipeLink(k, a, b, Segment(k, pipe(D), L)) for k, (a, b, D, L) in LOOP_PIPES.items()]
    links.append(PipeLink("feed", "R", "A", Segment("feed", pipe(0.25), 100.0)))
    return Network("two loops", nodes, [Boundary("R", 60.0)], links, state)


def hardy_cross(tol=1e-12):
    """Hardy Cross (Cross 1936) loop corrections, with dh/dQ by central difference."""
    d = LOOP_DEMAND
    Q = {"AB": 0.03, "BC": 0.012, "BE": 0.003}  # a guess; the rest from continuity
    Q["CF"] = Q["BC"] - d["C"]
    Q["AD"] = sum(d.values()) - Q["AB"]
    Q["DE"] = Q["AD"] - d["D"]
    Q["EF"] = Q["BE"] + Q["DE"] - d["E"]
    assert abs(Q["AB"] - Q["BC"] - Q["BE"] - d["B"]) < 1e-15
    assert abs(Q["CF"] + Q["EF"] - d["F"]) < 1e-15
    h = lambda k, q: hand_loss(q, LOOP_PIPES[k][2], LOOP_PIPES[k][3], 4.5e-5)  # noqa: E731
    for _ in range(200):
        biggest = 0.0
        for loop in LOOPS:
            num = sum(s * h(k, Q[k]) for k, s in loop)
            den = sum((h(k, Q[k] + 1e-7) - h(k, Q[k] - 1e-7)) / 2e-7 for k, _ in loop)
            dq = -num / den
            for k, s in loop:
                Q[k] += s * dq
            biggest = max(biggest, abs(dq))
        if biggest < tol:
            return Q
    raise AssertionError("Hardy Cross did not converge")


def test_two_loop_network_matches_hardy_cross():
    res = two_loop_network().solve()
    ref = hardy_cross()
    for k, q in ref.items():
        assert res.flow(k) == pytest.approx(q, rel=1e-8, abs=1e-10), k  # Cross (1936), 1e-8


def test_mass_balance_and_loop_energy():
    res = two_loop_network().solve()
    assert np.abs(res.continuity_residual).max() < 1e-10  # continuity at every node
    for loop in LOOPS:  # energy round every loop (heads cancel): Σ ± h = 0 to tolerance
        s = sum(sgn * res.head_loss[res.link_names.index(k)] for k, sgn in loop)
        assert abs(s) < 1e-9
    assert np.abs(res.energy_residual).max() < 1e-9
    assert 1 < res.iterations < 30


def test_gauge_and_absolute_pressure_from_head():
    res = two_loop_network().solve()
    i = res.node_names.index("E")
    assert res.p_abs[i] == pytest.approx(P_ATM + WATER20.rho * G * res.H[i])  # z = 0
    assert res.p_gauge[i] == pytest.approx(res.p_abs[i] - P_ATM)
    assert res.pressure_at("R") == pytest.approx(P_ATM)


# ------------------------------------------------------------------ a tree that is one line

def chain(lengths=(120.0, 80.0, 200.0), bores=(0.1541, 0.1023, 0.0779), rises=(2.0, 5.0, -1.0)):
    segs = [Segment(f"S{i}", pipe(D), L, rise=r) for i, (L, D, r) in
            enumerate(zip(lengths, bores, rises, strict=True))]
    return segs


def test_tree_reducing_to_one_line_equals_line_head_loss():
    segs = chain()
    z = np.cumsum([0.0] + [s.rise for s in segs])
    Q = 0.012
    nodes = [Node(f"J{i + 1}", float(z[i + 1]), demand=Q if i == 2 else 0.0) for i in range(3)]
    ends = ["T"] + [n.name for n in nodes]
    links = [PipeLink(s.name, ends[i], ends[i + 1], s) for i, s in enumerate(segs)]
    net = Network("chain", nodes, [Boundary("T", 0.0, pressure=P_ATM + 4e5)], links, WATER20)
    res = net.solve()
    line = Line("chain", tuple(segs))
    H_T = 4e5 / (WATER20.rho * G)
    assert res.head_at("J3") == pytest.approx(H_T - float(line.head_loss(np.array([Q]),
                                                                        WATER20)[0]), abs=1e-9)
    # per segment, against the kit's own Line.segment_losses (one flow)
    seg = line.segment_losses(np.array([Q]), WATER20)[:, 0]
    assert res.head_loss[:3] == pytest.approx(seg, rel=1e-9)


def test_network_curve_of_one_line_equals_system_curve():
    from kit.core.network_curve import network_curve
    from kit.core.system import Condition, Endpoint, System

    segs = chain()
    pump = PumpCurve([0.0, 0.01, 0.02, 0.03], [80.0, 76.0, 66.0, 50.0], speed_rpm=2900,
                     diameter=0.25, name="P-1")
    z = np.cumsum([0.0] + [s.rise for s in segs])
    p_min = P_ATM + 2.0e5
    suction = Segment("suction", pipe(0.1541), 5.0)
    nodes = [Node("S", 0.0), Node("D", 0.0)] + [
        Node(f"J{i + 1}", float(z[i + 1]), demand=1.0 if i == 2 else 0.0,
             min_pressure=p_min if i == 2 else None) for i in range(3)]
    ends = ["D"] + [f"J{i + 1}" for i in range(3)]
    links = [PipeLink("suction", "sump", "S", suction), PumpLink("pump", "S", "D", pump)]
    links += [PipeLink(s.name, ends[i], ends[i + 1], s) for i, s in enumerate(segs)]
    net = Network("pumped chain", nodes, [Boundary("sump", -1.0, 1.5)], links, WATER20)
    Q = np.linspace(0.0, 0.025, 11)
    curve = network_curve(net, Q, pump="pump", levels=("low", "high"))
    # the same system as one line: destination = the last node at its minimum pressure
    system = System("line", Endpoint("sump", -1.0, 1.5), Endpoint("end", z[-1], z[-1], p_min),
                    Line("suction", (suction,)), Line("discharge", tuple(segs)),
                    NS(state=lambda T, P=P_ATM: WATER20), 293.15, 293.15)
    max_static = system.curve(Q, Condition("max", 293.15, "new"))  # source low
    min_static = system.curve(Q, Condition("min", 293.15, "new"))  # source high
    assert curve.H[0] == pytest.approx(max_static, abs=1e-9)
    assert curve.H[1] == pytest.approx(min_static, abs=1e-9)
    assert curve.method == "tree"
    assert set(curve.index_node[0]) == {"J3"}
    assert curve.index_circuit(0, -1) == ("S0", "S1", "S2")


def test_pump_on_a_line_matches_operating_point():
    from kit.core.operating import operating_point
    from kit.core.system import Condition, Endpoint, System

    pump = PumpCurve([0.0, 0.01, 0.02, 0.03], [40.0, 38.0, 32.0, 22.0], speed_rpm=2900,
                     diameter=0.2, name="P-1")
    suc, dis = Segment("suc", pipe(0.1023), 6.0), Segment("dis", pipe(0.1023), 250.0)
    net = Network("lift", [Node("S", 0.0), Node("D", 0.0)],
                  [Boundary("low", 0.0), Boundary("high", 15.0)],
                  [PipeLink("suc", "low", "S", suc), PumpLink("pump", "S", "D", pump),
                   PipeLink("dis", "D", "high", dis)], WATER20)
    res = net.solve()
    system = System("lift", Endpoint("low", 0.0, 0.0), Endpoint("high", 15.0, 15.0),
                    Line("s", (suc,)), Line("d", (dis,)), NS(state=lambda T, P=P_ATM: WATER20),
                    293.15, 293.15)
    op = operating_point(pump, lambda q: system.curve(q, Condition("max", 293.15, "new")),
                         rho=WATER20.rho)
    assert res.flow("pump") == pytest.approx(op.Q, rel=1e-7)  # brentq in kit.core.operating


def test_pump_at_reduced_speed_uses_affinity_curve():
    pump = PumpCurve([0.0, 0.01, 0.02, 0.03], [40.0, 38.0, 32.0, 22.0], speed_rpm=2900,
                     diameter=0.2, name="P-1")
    link = PumpLink("pump", "S", "D", pump, speed_rpm=2320.0)
    assert float(link.curve.head(0.0)) == pytest.approx(40.0 * 0.8**2)  # H ∝ n², Karassik


# ------------------------------------------------------------------ valves

def test_control_valve_flow_matches_hand_solution():
    D, L, kvs, x = 0.1023, 150.0, 60.0, 0.6
    net = Network("cv", [Node("J", 0.0)], [Boundary("up", 30.0), Boundary("down", 10.0)],
                  [PipeLink("P", "up", "J", Segment("P", pipe(D), L)),
                   ControlValveLink("CV", "J", "down", kv_rated=kvs, opening=x,
                                    characteristic="equal_percentage", rangeability=50.0)],
                  WATER20)
    res = net.solve()
    kv = kvs * 50.0 ** (x - 1.0)  # equal percentage, R^(x−1) (IEC 60534-1 ideal form)

    def valve_h(q):  # Kv definition: Q[m³/h] = Kv sqrt(Δp[bar] ρ0/ρ) (IEC 60534-2-1)
        dp_bar = (q * 3600.0 / kv) ** 2 * WATER20.rho / RHO0
        return dp_bar * 1e5 / (WATER20.rho * G)

    q = brentq(lambda q: hand_loss(q, D, L, 4.5e-5) + valve_h(q) - 20.0, 1e-3, 1.0,
               xtol=1e-15, rtol=1e-14)
    assert res.flow("CV") == pytest.approx(q, rel=1e-8)
    assert KV_HEAD == pytest.approx(1e5 * 3600.0**2 / (RHO0 * G))


def test_check_valve_holds_against_back_flow():
    net = Network("cv", [Node("J", 0.0)], [Boundary("low", 5.0), Boundary("high", 20.0)],
                  [PipeLink("P1", "low", "J", Segment("P1", pipe(0.1023), 50.0)),
                   CheckValveLink("NRV", "high", "J", kv=80.0),
                   PipeLink("P2", "J", "high", Segment("P2", pipe(0.1023), 50.0), check=True)],
                  WATER20)
    res = net.solve()
    # P2 may pass J -> high only: with 'high' above 'low' it is held shut; NRV passes high -> J
    assert res.status[res.link_names.index("P2")] == "closed"
    assert res.flow("P2") == 0.0
    assert res.flow("NRV") > 0 and res.flow("P1") == pytest.approx(-res.flow("NRV"))
    assert any("held shut" in f.rule for f in res.findings())


def test_weaker_parallel_pump_is_held_shut():
    strong = PumpCurve([0.0, 0.01, 0.02, 0.03], [50.0, 48.0, 42.0, 32.0], speed_rpm=2900,
                       diameter=0.2, name="strong")
    weak = PumpCurve([0.0, 0.01, 0.02], [30.0, 28.0, 22.0], speed_rpm=2900, diameter=0.15,
                     name="weak")
    net = Network("pair", [Node("S", 0.0), Node("D", 0.0)],
                  [Boundary("low", 0.0), Boundary("high", 35.0)],
                  [PipeLink("suc", "low", "S", Segment("suc", pipe(0.1541), 5.0)),
                   PumpLink("A", "S", "D", strong), PumpLink("B", "S", "D", weak),
                   PipeLink("dis", "D", "high", Segment("dis", pipe(0.1023), 100.0))], WATER20)
    res = net.solve()
    assert res.flow("B") == 0.0 and res.status[res.link_names.index("B")] == "closed"
    assert res.flow("A") > 0
    assert np.all(res.Q[[res.link_names.index("A"), res.link_names.index("B")]] >= 0)


def test_balancing_valves_bring_branches_to_design_flow():
    from kit.core.network_curve import balance

    net = coil_circuit(kv=(40.0, 40.0, 40.0))
    design = {"BV1": 0.004, "BV2": 0.005, "BV3": 0.003}
    bal = balance(net, design, pump="pump")
    assert bal.kv[bal.index_valve] == 40.0
    # set the valves, and put the pump at exactly the balanced duty: a flat-topped curve
    q, h = bal.pump_flow, bal.pump_head
    pump = PumpCurve([0.0, q, 2 * q], [h * 1.25, h, h * 0.25], speed_rpm=1450, diameter=0.2,
                     name="duty")
    set_links = []
    for k in net.links:
        if isinstance(k, BalancingValveLink):
            k = BalancingValveLink(k.name, k.from_node, k.to_node, kv=bal.kv[k.name],
                                   kv_max=k.kv_max)
        if isinstance(k, PumpLink):
            k = PumpLink(k.name, k.from_node, k.to_node, pump)
        set_links.append(k)
    res = net.replace(links=tuple(set_links)).solve()
    for name, qd in design.items():  # independent: a full solve with the computed settings
        assert res.flow(name) == pytest.approx(qd, rel=1e-6)


def coil_circuit(kv=(40.0, 40.0, 40.0)):
    """An invented closed circuit: vessel at the pump suction, three branches with a coil pipe
    and a balancing valve each between a supply and a return header."""
    pump = PumpCurve([0.0, 0.006, 0.012, 0.018], [30.0, 28.0, 23.0, 15.0], speed_rpm=1450,
                     diameter=0.2, name="CHW")
    nodes = [Node("S", 0.0), Node("D", 0.0)]
    links = [PipeLink("vessel line", "vessel", "S", Segment("v", pipe(0.05), 2.0)),
             PumpLink("pump", "S", "D", pump)]
    prev_s, prev_r = "D", "S"
    for i in range(3):
        s, r, m = f"S{i}", f"R{i}", f"M{i}"
        nodes += [Node(s, 3.0 * i), Node(r, 3.0 * i), Node(m, 3.0 * i)]
        links += [PipeLink(f"sup{i}", prev_s, s, Segment(f"sup{i}", pipe(0.1023), 30.0)),
                  PipeLink(f"ret{i}", r, prev_r, Segment(f"ret{i}", pipe(0.1023), 30.0)),
                  PipeLink(f"coil{i}", s, m, Segment(f"coil{i}", pipe(0.0409), 20.0)),
                  BalancingValveLink(f"BV{i + 1}", m, r, kv=kv[i], kv_max=40.0)]
        prev_s, prev_r = s, r
    return Network("coils", nodes, [Boundary("vessel", 0.0, pressure=P_ATM + 2e5)], links,
                   WATER20)


# ------------------------------------------------------------------ findings

def test_findings_cover_velocity_vacuum_reverse_and_valves():
    net = Network("f", [Node("J", 30.0), Node("K", 0.0, demand=0.03)],
                  [Boundary("T", 25.0), Boundary("U", 26.0)],
                  [PipeLink("up", "T", "J", Segment("up", pipe(0.1023), 40.0)),
                   PipeLink("back", "J", "U", Segment("back", pipe(0.1023), 40.0)),
                   PipeLink("down", "J", "K", Segment("down", pipe(0.1023), 40.0)),
                   ControlValveLink("CV", "U", "K", kv_rated=50.0, opening=0.95)], WATER20)
    res = net.solve()
    f = res.findings()
    kinds = {(x.subject, x.quantity, x.severity.value) for x in f}
    assert ("node 'J'", "gauge pressure", "check") in kinds          # J above both tanks
    assert ("link 'back'", "flow", "check") in kinds                  # U feeds J: reversed
    assert ("link 'CV'", "opening", "check") in kinds                 # > 0.9
    assert any(x.quantity == "velocity" and x.subject == "link 'down'" for x in f)


def test_min_pressure_finding_fails_below_requirement():
    net = Network("m", [Node("J", 10.0, demand=0.01, min_pressure=P_ATM + 3e5)],
                  [Boundary("T", 30.0)],
                  [PipeLink("P", "T", "J", Segment("P", pipe(0.1023), 100.0))], WATER20)
    res = net.solve()
    f = [x for x in res.findings() if x.quantity == "pressure"]
    assert f and f[0].severity.value == "fail"  # ~18.6 m of head above J < 30.6 m asked


@pytest.mark.parametrize("name", ["kit.core.network_model", "kit.core.network_solve",
                                  "kit.core.network_curve", "kit.core.network"])
def test_docstring_examples(name):
    result = doctest.testmod(importlib.import_module(name))
    assert result.attempted > 0 and result.failed == 0


def test_documented_parameters_match_signatures():
    from docsig import documented_params, signature_params, unit_missing

    from kit.core import network_curve, network_model, network_solve

    for obj in (network_model.Node, network_model.Boundary, network_model.PipeLink,
                network_model.PumpLink, network_model.CheckValveLink,
                network_model.ControlValveLink, network_model.BalancingValveLink,
                network_model.Network, network_solve.solve, network_curve.network_curve,
                network_curve.balance):
        assert documented_params(obj) == signature_params(obj), obj.__name__
        assert unit_missing(obj) == [], obj.__name__


def test_network_modules_import_no_widgets_units_or_plots():
    import subprocess
    import sys

    code = ("import sys, kit.core.network, kit.core.valves; "
            "print(sorted(m for m in ('pint', 'ipywidgets', 'plotly') if m in sys.modules))")
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True)
    assert out.stdout.strip() == "[]"


def test_levels_by_number_and_cautions():
    from kit.core.findings import CAUTIONS
    from kit.errors import OutOfRangeError

    net = Network("lv", [Node("J", 0.0, demand=0.005)], [Boundary("T", 20.0, 30.0)],
                  [PipeLink("P", "T", "J", Segment("P", pipe(0.1023), 100.0))], WATER20)
    assert net.solve(levels={"T": 25.0}).H0[0] == 25.0
    assert net.solve(levels="high").H0[0] == 30.0
    with pytest.raises(OutOfRangeError, match=r"'level of 'T'' must be between 20 and 30 m"):
        net.solve(levels={"T": 31.0})
    c = net.solve().cautions
    assert c[0] == CAUTIONS["general"] and CAUTIONS["water_hammer"] in c


def test_npsh_available_at_the_pump_suction_node():
    pump = PumpCurve([0.0, 0.01, 0.02, 0.03], [40.0, 38.0, 32.0, 22.0], speed_rpm=2900,
                     diameter=0.2, npshr=[1.5, 2.0, 3.0, 4.5], name="P-1")
    suc = Segment("suc", pipe(0.1023), 6.0)
    net = Network("lift", [Node("S", -1.0), Node("D", -1.0)],
                  [Boundary("low", 0.0), Boundary("high", 15.0)],
                  [PipeLink("suc", "low", "S", suc), PumpLink("pump", "S", "D", pump),
                   PipeLink("dis", "D", "high", Segment("dis", pipe(0.1023), 250.0))], WATER20)
    res = net.solve()
    Q = res.flow("pump")
    # by hand: surface 0 m at 1 atm, pump datum at −1 m, minus the suction loss (energy eq.)
    hl = float(Line("s", (suc,)).head_loss(np.array([Q]), WATER20)[0])
    hand = (P_ATM - WATER20.pv) / (WATER20.rho * G) + 1.0 - hl
    assert res.npsh_available("pump") == pytest.approx(hand, rel=1e-12)
    assert any(f.quantity.startswith("NPSH") for f in res.findings())
