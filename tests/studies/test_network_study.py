"""The network study against independent computations, each with its source named beside it.

- two pipes in parallel: the split solved here by brentq on the common head drop, friction by
  Colebrook (1939) through fluids.friction.Colebrook (not the kit's friction module);
- a tree that reduces to one line: the kit's single-line :class:`kit.core.line.Line`;
- control valves: Kv against ``fluids.control_valve.size_control_valve_l`` (IEC 60534-2-1);
- a balanced closed circuit: the balancing settings re-solved with the pump replaced by two
  fixed heads (a different arrangement of the gradient method) give every design flow;
- mass balance at every node and energy around a loop of the ring main (friction by fluids);
- the pressure rating's shut-off case by hand (p_s + ρg(H0 + Δz));
- a record built from the study re-checks headless with ``kit check``.
"""

from __future__ import annotations

import math
import tomllib
from pathlib import Path

import numpy as np
import pytest
from scipy.optimize import brentq

from kit import scenario as scn
from kit.errors import NoSolutionError

ROOT = Path(__file__).resolve().parents[2]
CHW = ROOT / "scenarios" / "fenwick_yard_chilled_water.toml"
RING = ROOT / "scenarios" / "hollin_reach_ring_main.toml"
EVERY = ROOT / "tests" / "inputs" / "fixtures" / "network_every_key.toml"
G = 9.80665


@pytest.fixture(scope="module", autouse=True)
def _network_kind():
    """'network' among the scenario kinds (kit.inputs.common.KINDS lists the kinds; until it
    names 'network' the loader is told here, for this module only — a no-op once it does)."""
    mp = pytest.MonkeyPatch()
    if "network" not in scn.KINDS:
        mp.setattr(scn, "KINDS", scn.KINDS + ("network",))
    yield
    mp.undo()


@pytest.fixture(scope="module")
def chw():
    from kit.studies.network import study

    sc = scn.load(CHW)
    return sc, study(sc)


@pytest.fixture(scope="module")
def ring():
    from kit.studies.network import study

    sc = scn.load(RING)
    return sc, study(sc)


HEAD = '''
schema = "headline-scenario/1"
kind = "network"
title = "check"
[liquid]
key = "water"
temperature = "20 degC"
[band]
levels = "low"
pipe_condition = "new"
'''


def _study(text):
    from kit.studies.network import study

    sc = scn.loads(HEAD + text)
    return sc, study(sc)


def _colebrook_loss(Q, D, L, eps, rho, mu, K=0.0):
    """Head loss [m]: Darcy–Weisbach with Colebrook (1939) via fluids.friction.Colebrook."""
    from fluids.friction import Colebrook

    A = math.pi * D * D / 4
    V = abs(Q) / A
    Re = rho * V * D / mu
    f = Colebrook(Re, eps / D)
    return math.copysign((f * L / D + K) * V * V / (2 * G), Q)


# ---------------------------------------------------------------- flow split


PARALLEL = '''
[[boundary]]
name = "tank"
level = "40 m"
[[node]]
name = "A"
elevation = "0 m"
[[node]]
name = "B"
elevation = "0 m"
demand = "120 m3/h"
[[link]]
name = "feed"
type = "pipe"
from = "tank"
to = "A"
length = "20 m"
pipe = { bore = "200 mm", roughness = "0.045 mm" }
[[link]]
name = "big"
type = "pipe"
from = "A"
to = "B"
length = "300 m"
pipe = { bore = "150 mm", roughness = "0.045 mm" }
[[link]]
name = "small"
type = "pipe"
from = "A"
to = "B"
length = "180 m"
pipe = { bore = "100 mm", roughness = "0.045 mm" }
'''


def test_two_parallel_pipes_split_as_brentq_on_the_common_head_drop():
    # Independent: Colebrook (1939) via fluids.friction.Colebrook, split found by brentq on
    # the common head drop between A and B (the two flows must add up to the demand).
    sc, s = _study(PARALLEL)
    st = s.design.state
    rho, mu = st.rho, st.mu
    eps = 0.045e-3

    def q_of(dh, D, L):
        return brentq(lambda q: _colebrook_loss(q, D, L, eps, rho, mu) - dh, 1e-9, 1.0,
                      xtol=1e-15)

    Q = 120 / 3600
    dh = brentq(lambda h: q_of(h, 0.15, 300) + q_of(h, 0.10, 180) - Q, 1e-6, 200, xtol=1e-13)
    assert s.design.flow("big") == pytest.approx(q_of(dh, 0.15, 300), rel=1e-7)
    assert s.design.flow("small") == pytest.approx(q_of(dh, 0.10, 180), rel=1e-7)
    assert s.design.head_at("A") - s.design.head_at("B") == pytest.approx(dh, rel=1e-7)


TREE = '''
[[boundary]]
name = "tank"
level = "30 m"
[[node]]
name = "J"
elevation = "0 m"
[[node]]
name = "K"
elevation = "0 m"
demand = "45 m3/h"
min_pressure = "100 kPa(g)"
[[link]]
name = "P1"
type = "pipe"
from = "tank"
to = "J"
length = "250 m"
pipe = { standard = "asme_b36_10m", nominal = "4", schedule = "40" }
fittings = [{ kind = "entrance_sharp" }, { kind = "bend", angle = 90, R_D = 1.5, count = 3 }]
[[link]]
name = "P2"
type = "pipe"
from = "J"
to = "K"
length = "400 m"
pipe = { standard = "asme_b36_10m", nominal = "3", schedule = "40" }
fittings = [{ kind = "valve_gate", beta = 1.0 }]
'''


def test_a_tree_reducing_to_one_line_matches_the_single_line_model():
    # Independent path: the kit's single-line Line (kit.core.line) over the same segments.
    from kit.core.line import Line

    sc, s = _study(TREE)
    net = s.network
    line = Line("same", (net.link("P1").segment, net.link("P2").segment))
    Q = 45 / 3600
    h = float(line.head_loss(np.array([Q]), s.design.state)[0])
    assert s.design.head_at("K") == pytest.approx(30.0 - h, rel=1e-9)
    # and the network reports the residual-pressure check at K against its minimum
    r = next(f for f in s.findings if f.subject.startswith("node 'K'")
             and "minimum residual" in f.rule)
    assert r.value == pytest.approx(s.design.pressure_at("K"))


def test_mass_balance_at_every_node_and_energy_on_every_link(chw, ring):
    # Continuity residual by definition (inflow − outflow − demand), to 1e-10 m³/s; the
    # energy equation of every open link to 1e-7 m.
    for _, s in (chw, ring):
        for lab, res in s.cases.items():
            assert np.abs(res.continuity_residual).max() < 1e-10, lab
            assert np.abs(res.energy_residual).max() < 1e-7, lab


def test_energy_around_a_loop_of_the_ring_main(ring):
    # Independent friction: Colebrook via fluids.friction.Colebrook, fixed-K fittings added by
    # hand (K·V²/2g); the loop A→B→(cross)→E→F→A must close to the solver's tolerance
    # (Kirchhoff's second law as Hardy Cross 1936 iterates it).
    sc, s = ring
    res = s.design
    st = res.state
    loop = (("ring A-B", 1), ("cross-connection B-E", 1), ("ring F-E", -1), ("ring A-F", -1))
    total = 0.0
    for name, sign in loop:
        k = s.network.link(name)
        seg = k.segment
        K = sum(f.params["K"] * f.count for f in seg.fittings)
        total += sign * _colebrook_loss(res.flow(name), seg.pipe.Di, seg.length,
                                        seg.pipe.roughness, st.rho, st.mu, K)
    assert abs(total) < 1e-6


# ---------------------------------------------------------------- balancing and valves


def test_balanced_settings_give_every_design_flow(chw):
    # Independent arrangement: the pump removed and its two ends held at fixed heads 'pump
    # head' apart (Boundary objects), solved by the gradient method; every balancing valve's
    # branch then passes its design flow (the study balanced with flow sources instead).
    from kit.core.network_model import Boundary, Network

    sc, s = chw
    inp = s.inputs
    net = s.network
    H_s = s.design.H0[0]  # the vessel's head: no flow in the vessel line
    keep = [n for n in net.nodes if n.name not in ("pump suction", "pump discharge")]
    bnds = [Boundary("pump suction", H_s, pressure=net.p_baro),
            Boundary("pump discharge", H_s + s.balance.pump_head, pressure=net.p_baro)]
    links = [k for k in net.links if k.name not in ("CHWP-1", "vessel line")]
    fixed = Network("fixed heads", keep, bnds, links, net.state, net.p_baro)
    r = fixed.solve("low")
    for name, q in inp.balancing.items():
        assert r.flow(name) == pytest.approx(q, rel=1e-6), name
    assert s.balance.index_valve in inp.balancing
    assert s.settings[s.balance.index_valve] == inp.balancing_valves[s.balance.index_valve].kv_max


def test_control_valve_kv_matches_fluids_at_every_case(chw):
    # IEC 60534-2-1 via fluids.control_valve.size_control_valve_l, called here directly with
    # the case's pressures; water's critical pressure 22.064 MPa (IAPWS-95, from memory).
    from fluids.control_valve import size_control_valve_l

    sc, s = chw
    st = s.design.state
    for name, v in s.valves.items():
        assert [c.case.label for c in v.cases] == ["minimum", "normal", "maximum"]
        for c in v.cases:
            kv = size_control_valve_l(rho=st.rho, Psat=st.pv, Pc=22.064e6, mu=st.mu,
                                      P1=c.case.p1, P2=c.case.p2, Q=c.case.Q, FL=0.9, Fd=1.0)
            assert c.kv == pytest.approx(kv, rel=1e-4), (name, c.case.label)
        # normal case: the design solution's own flow and end pressures
        k = s.network.link(name)
        n = v.case("normal").case
        assert n.Q == pytest.approx(s.design.flow(name))
        assert n.p1 == pytest.approx(s.design.pressure_at(k.from_node))
        assert n.p2 == pytest.approx(s.design.pressure_at(k.to_node))
        # non-choked, FP = 1: the Kv needed at normal flow is the valve's own Kv at its
        # design opening (Kvs·R^(x−1), equal percentage; ideal characteristic, from memory)
        assert v.case("normal").kv == pytest.approx(20.0 * 50 ** (0.85 - 1) if name != "TV-1"
                                                    else 16.0 * 50 ** (0.85 - 1), rel=1e-6)
        assert v.case("normal").opening == pytest.approx(0.85, abs=1e-6)


def test_valve_cases_hold_the_branch_differential(chw):
    # The stated rule (common practice, no source): at minimum and maximum flow the branch
    # differential stays at its design value and the rest of the branch scales with Q².
    from kit.studies.network import series_branch

    sc, s = chw
    d = s.design
    rho = d.state.rho
    for name, v in s.valves.items():
        up, down = series_branch(s.network, name)
        i = name[-1]
        if i == "4":  # the top floor: the last riser lengths are in series with its branch
            assert up == ("supply riser 4", "AHU-4 branch", "AHU-4 coil")
            assert down == ("BV-4", "return riser 4")
        else:
            assert up == (f"AHU-{i} branch", f"AHU-{i} coil")
            assert down == (f"BV-{i}",)
        rest = sum(d.head_loss[d.link_names.index(n)] for n in up + down) * rho * G
        n = v.case("normal").case
        branch = n.p1 - n.p2 + rest
        for c in v.cases:
            r2 = (c.case.Q / n.Q) ** 2
            assert c.case.p1 - c.case.p2 + rest * r2 == pytest.approx(branch, rel=1e-9)
        assert v.authority == pytest.approx((n.p1 - n.p2) / branch, rel=1e-9)


def test_series_branch_stops_at_junctions_and_demand_nodes(ring):
    from kit.studies.network import series_branch

    sc, s = ring
    assert series_branch(s.network, "NRV-101") == (("suction line", "P-101A/B"),
                                                   ("feed main",))
    assert series_branch(s.network, "ring C-D") == ((), ())


# ---------------------------------------------------------------- curve and index


def test_ring_main_network_curve_and_index_circuit(ring):
    sc, s = ring
    c = s.curve
    assert c is not None and len(c.labels) == 8 and c.Q.size == 31
    assert c.Q[-1] == pytest.approx(1.5 * 90 / 3600)
    # at the design flow the head needed keeps the index node exactly at its minimum: the
    # head at the index node = z + (p_min − p_baro)/ρg (definition of the index node)
    inp = s.inputs
    m = c.labels.index(s.design_label)
    j = int(np.argmin(np.abs(c.Q - 90 / 3600)))
    node = c.index_node[m][j]
    assert node == s.index_node == "ring D"
    assert s.index_circuit[-1] == "ring C-D" and s.index_circuit[0] == "NRV-101"
    # the design solution (pump on its curve) has more head than the curve needs
    assert -s.design.head_loss[s.design.link_names.index("P-101A/B")] > c.H[m, j]
    assert inp.band.design_condition == "aged"


def test_closed_circuit_curve_is_the_loop_resistance(chw):
    # For a closed circuit the curve is H_discharge − H_suction at each flow with the
    # valves at their settings: through zero at zero flow (no static head in a closed loop).
    sc, s = chw
    assert s.curve.H[:, 0] == pytest.approx(0.0, abs=1e-9)
    assert np.all(np.diff(s.curve.H, axis=1) > 0)
    assert s.index_circuit[0] == "chiller flow" and "BV-3" in s.index_circuit


# ---------------------------------------------------------------- integrity


def test_shutoff_case_rates_every_pipe_by_hand(chw):
    # Highest pressure ≥ p_suction + ρ g (H0 + z_suction − z_low) (the shut-off case of
    # kit.core.rating.highest_pressure; issue 14's definition).
    sc, s = chw
    pk = s.network.link("CHWP-1")
    H0 = float(pk.curve.shutoff_head)
    ps = max(r.pressure_at("pump suction") for r in s.cases.values())
    rho = max(s.inputs.state(T).rho for T in s.inputs.temperatures)
    z = {n.name: n.elevation for n in s.network.nodes}
    pipes = [k for k in s.network.links if hasattr(k, "segment")]
    assert set(s.integrity) == {k.name for k in pipes}
    for k in pipes:
        z_low = min(z[e] for e in (k.from_node, k.to_node) if e in z)
        hand = ps + rho * G * (H0 + 0.5 - z_low)
        assert s.integrity[k.name].p_max >= hand * (1 - 1e-9), k.name


def test_pump_trip_is_screened_in_an_open_network_and_said_not_screened_in_a_closed_one(
        chw, ring):
    _, s = chw
    assert any(f.subject == "pump trip" and "not screened" in f.rule for f in s.findings)
    assert all(scr.downsurge is None for scr in s.integrity.values())
    _, r = ring
    screened = {n for n, scr in r.integrity.items() if scr.downsurge is not None}
    # at the pump discharge (past its non-return valve, the feed main) and at the ring's high
    # point (ring D)
    assert screened == {"feed main", "ring C-D", "ring E-D"}
    f = next(f for f in r.findings if f.subject == "link 'ring C-D'" and "trip" in f.quantity)
    assert "'ring D'" in f.quantity and "node" not in f.quantity


# ---------------------------------------------------------------- results and record


def test_results_keys_tables_methods_and_cautions(chw):
    from kit.studies.network import results_of

    sc, s = chw
    r = results_of(sc, s)
    keys = {v.key for v in r.values}
    for k in ("link.TV-1.flow", "link.supply riser 1.velocity", "node.supply floor 4.p_gauge",
              "pump.head", "pump.flow", "pump.CHWP-1.npsha", "valve.TV-1.kv_required.normal",
              "valve.TV-1.kv_required.minimum", "valve.TV-2.opening.maximum",
              "valve.TV-3.authority", "balance.BV-1.kv", "balance.pump_head",
              "integrity.bypass.p_max", "curve.head_at_design.max", "network.verdict"):
        assert k in keys, k
    assert set(r.tables) >= {"links", "nodes", "valves", "balancing", "cases", "integrity",
                             "curve"}
    text = " ".join(m.reference for m in r.methods)
    for ref in ("Todini", "IEC 60534-2-1", "Colebrook", "Joukowsky", "Korteweg"):
        assert ref in text, ref
    assert any("licensed professional practice" in c for c in r.cautions)
    assert any("Water hammer" in c for c in r.cautions)
    assert r.value("link.vessel line.flow") == 0.0  # round-off reported as no flow
    assert r.verdict().word in ("PASS", "CHECK", "FAIL") and r.selected


def test_record_rechecks_headless(chw, tmp_path):
    # kit.record.build.build_record then kit check (check_record) recompute and agree.
    from kit.record import build_record, write_record
    from kit.record.check import check_record
    from kit.studies.network import results_of

    sc, s = chw
    _, path = write_record(build_record(sc, results_of(sc, s)), tmp_path, "chw")
    report = check_record(path)
    assert report.mismatches == 0, [r for r in report.rows if not r.ok][:5]
    assert report.exit_code == 0


def test_every_key_fixture_computes_with_its_named_circuit():
    from kit.studies.network import compute, study

    sc = scn.load(EVERY)
    s = study(sc)
    v = s.valves["FCV-1"]
    d = s.design
    rest = sum(d.head_loss[d.link_names.index(n)] for n in ("cooler", "HV-1", "to tank"))
    n = v.case("normal").case
    dpv = n.p1 - n.p2
    assert v.authority == pytest.approx(dpv / (dpv + rest * d.state.rho * G), rel=1e-9)
    assert compute(sc).value("network.verdict") in (0.0, 1.0, 2.0)


def test_a_pump_that_cannot_meet_the_demand_is_named():
    text = RING.read_text().replace('demand = "20 m3/h"', 'demand = "400 m3/h"')
    from kit.studies.network import study

    with pytest.raises(NoSolutionError, match="P-101A/B"):
        study(scn.loads(text))


def test_demo_texts_parse_as_toml():
    for p in (CHW, RING):
        doc = tomllib.loads(p.read_text())
        assert doc["kind"] == "network"


@pytest.mark.parametrize("name", ["kit.inputs.network", "kit.inputs.network_schema",
                                  "kit.studies.network", "kit.inputs.kinds"])
def test_docstring_examples(name):
    import doctest
    import importlib

    result = doctest.testmod(importlib.import_module(name))
    assert result.attempted > 0 and result.failed == 0


CHOKE = '''
[[boundary]]
name = "high tank"
level = "150 m"
[[boundary]]
name = "low tank"
level = "0 m"
[[node]]
name = "A"
elevation = "0 m"
[[node]]
name = "B"
elevation = "0 m"
[[link]]
name = "down"
type = "pipe"
from = "high tank"
to = "A"
length = "200 m"
pipe = { standard = "asme_b36_10m", nominal = "3", schedule = "40" }
[[link]]
name = "LV-1"
type = "control_valve"
from = "A"
to = "B"
kv = 12.0
FL = 0.6
xFz = 0.3
opening = "70 %"
characteristic = "linear"
[[link]]
name = "out"
type = "pipe"
from = "B"
to = "low tank"
length = "5 m"
pipe = { standard = "asme_b36_10m", nominal = "3", schedule = "40" }
'''


def test_choked_and_cavitating_valve_is_flagged_and_a_gravity_network_has_no_curve():
    # IEC 60534-2-1: choked when Δp ≥ FL²(p1 − FF·pv), FF = 0.96 − 0.28·sqrt(pv/pc) (from
    # memory); incipient cavitation when xF = Δp/(p1 − pv) ≥ xFz (IEC 60534-8-4, from memory).
    sc, s = _study(CHOKE)
    c = s.valves["LV-1"].case("normal")
    pv = s.design.state.pv
    FF = 0.96 - 0.28 * math.sqrt(pv / 22.064e6)
    dp = c.case.p1 - c.case.p2
    assert dp >= 0.6 ** 2 * (c.case.p1 - FF * pv)  # the case is choked by hand
    assert c.choked
    assert c.xF == pytest.approx(dp / (c.case.p1 - pv))
    sev = {(f.quantity, f.severity.value) for f in s.findings
           if f.subject.startswith("control valve 'LV-1'")}
    assert ("pressure drop", "fail") in sev and ("xF = Δp/(p1 − pv)", "check") in sev
    # no pump: no curve (said why), no balance, integrity from the standing column
    assert s.curve is None and "no pump link" in s.curve_note and s.balance is None
    scr = s.integrity["down"]
    assert scr.p_max >= s.design.net.p_baro + s.design.state.rho * G * 150 * (1 - 1e-9)


def test_a_band_member_without_a_solution_fails_by_name():
    # At the tank's low level the supply head (1 m) is below the draw-off (50 m): the absolute
    # pressure there would be negative — no steady solution; the design (high level) stands.
    text = HEAD.replace('levels = "low"', 'levels = "both"\ndesign_level = "high"') + '''
[[boundary]]
name = "tank"
level_low = "1 m"
level_high = "90 m"
[[node]]
name = "hill"
elevation = "50 m"
demand = "20 m3/h"
[[link]]
name = "main"
type = "pipe"
from = "tank"
to = "hill"
length = "900 m"
pipe = { standard = "asme_b36_10m", nominal = "3", schedule = "40" }
'''
    from kit.studies.network import study

    s = study(scn.loads(text))
    assert s.design_label == "high level / 20 °C / new"
    assert list(s.failed) == ["low level / 20 °C / new"]
    f = [f for f in s.findings if f.subject == "network at low level / 20 °C / new"]
    assert f and f[0].severity.value == "fail" and "'hill'" in f[0].rule


def test_surge_column_is_the_whole_flowing_path_back_to_the_tank():
    # The column a valve at K's end stops is P1 + P2 (250 m + 400 m), not P2 alone; its mean
    # velocity is (L1 V1 + L2 V2)/(L1 + L2), by hand from the bores of ASME B36.10M 4" and 3"
    # Sch 40 (102.3 mm, 77.9 mm; from memory) at 45 m³/h. Michaud (1878) summed over the
    # series path: the slow-closure rise is 2 rho (L1 V1 + L2 V2) / t_c.
    from kit.studies.network import column_upstream

    _, s = _study(TREE + '\n[integrity]\nclosure_time = "30 s"\n')
    Q = 45 / 3600
    V1 = Q / (math.pi / 4 * 0.10226**2)
    V2 = Q / (math.pi / 4 * 0.07793**2)
    col = column_upstream(s.design)
    assert col["P1"] == pytest.approx((250.0, V1), rel=2e-3)
    assert col["P2"][0] == pytest.approx(650.0)
    assert col["P2"][1] == pytest.approx((250 * V1 + 400 * V2) / 650, rel=2e-3)
    rho = max(s.inputs.state(s.inputs.T_min).rho, s.inputs.state(s.inputs.T_max).rho)  # densest
    scr = s.integrity["P2"]
    assert scr.surge_regime == "slow"
    # the screen bounds the rise from above with the larger of the pipe's and the path's speed
    v2 = abs(float(s.design.velocity[s.design.link_names.index("P2")]))
    assert v2 == pytest.approx(V2, rel=2e-3)
    assert scr.surge_rise == pytest.approx(2 * rho * 650.0 * max(v2, col["P2"][1]) / 30.0,
                                           rel=1e-9)
    assert scr.surge_rise >= 2 * rho * (250 * V1 + 400 * V2) / 30.0
