"""The network scenario kind: its schema refuses hostile input naming the key path, and its
reader maps checked text to core objects in SI (checked against hand computations, each with
its source named)."""

from __future__ import annotations

import math
import re
import tomllib
from pathlib import Path

import pytest

from kit import scenario as scn
from kit.errors import KeyTypeError, ScenarioError, UnknownKeyError

ROOT = Path(__file__).resolve().parents[2]
CHW = ROOT / "scenarios" / "fenwick_yard_chilled_water.toml"
RING = ROOT / "scenarios" / "hollin_reach_ring_main.toml"
EVERY = Path(__file__).parent / "fixtures" / "network_every_key.toml"


@pytest.fixture(autouse=True)
def _network_kind(monkeypatch):
    """'network' among the scenario kinds (kit.inputs.common.KINDS lists the kinds; until it
    names 'network' the loader is told here — a no-op once it does)."""
    if "network" not in scn.KINDS:
        monkeypatch.setattr(scn, "KINDS", scn.KINDS + ("network",))


def _net():
    from kit.inputs.network import inputs

    return inputs


SMALL = '''
schema = "headline-scenario/1"
kind = "network"
title = "small"

[liquid]
key = "water"
temperature = "20 degC"

[[boundary]]
name = "tank"
level = "20 m"

[[node]]
name = "J1"
elevation = "0 m"
demand = "36 m3/h"

[[node]]
name = "J2"
elevation = "0 m"

[[link]]
name = "P1"
type = "pipe"
from = "tank"
to = "J1"
length = "100 m"
pipe = { standard = "asme_b36_10m", nominal = "4", schedule = "40" }

[[link]]
name = "V1"
type = "control_valve"
from = "J1"
to = "J2"
kv = 25.0

[[link]]
name = "P2"
type = "pipe"
from = "J2"
to = "tank"
length = "50 m"
pipe = { standard = "asme_b36_10m", nominal = "4", schedule = "40" }
'''


def _doc(text=SMALL):
    return tomllib.loads(text)


def _dump(doc):
    import tomli_w

    return tomli_w.dumps(doc)


def test_demos_and_fixture_load_as_network_scenarios():
    for p in (CHW, RING, EVERY):
        sc = scn.load(p)
        assert sc.kind == "network"
        inp = _net()(sc)
        assert inp.nodes and inp.boundaries and inp.links


def test_chilled_water_inputs_in_si():
    inp = _net()(scn.load(CHW))
    assert len(inp.nodes) == 27 and len(inp.links) == 32
    assert inp.pumps["CHWP-1"].standby == 1 and inp.pumps["CHWP-1"].count == 1
    assert inp.T_min == pytest.approx(279.15) and inp.T_max == pytest.approx(285.15)
    # min_pressure "40 kPa(g)" is absolute inside the kit: 40 kPa + barometric
    top = [n for n in inp.nodes if n.name == "supply floor 4"][0]
    assert top.min_pressure == pytest.approx(40e3 + inp.p_baro)
    # vessel "150 kPa(g)" likewise
    assert inp.boundaries[0].pressure == pytest.approx(150e3 + inp.p_baro)
    assert inp.balancing["BV-2"] == pytest.approx(11.0 / 3600)
    assert inp.balancing_valves["BV-bypass"].given_as == "cv"
    tv = inp.valves["TV-3"]
    assert (tv.kv_rated, tv.characteristic, tv.opening, tv.FL) == (20.0, "equal_percentage",
                                                                   pytest.approx(0.85), 0.9)
    assert tv.flow_min == pytest.approx(2.2 / 3600) and tv.flow_max == pytest.approx(12.1 / 3600)


def test_equipment_kv_from_its_rated_pressure_drop():
    # Kv = Q[m³/h]·sqrt((ρ/ρ0)/Δp[bar]) — the Kv definition of IEC 60534-2-1 (from memory);
    # ρ0 = 999.1 kg/m³ (fluids' value), ρ water at 6 °C, 1 bar from IAPWS-95 via CoolProp.
    from kit.core.liquids import make_liquid

    inp = _net()(scn.load(CHW))
    coil = inp.network().link("AHU-1 coil")
    rho = make_liquid("water").state(279.15, inp.p_state).rho
    assert coil.kv == pytest.approx(8.0 * math.sqrt(rho / 999.1032907570233 / 0.30), rel=1e-9)


def test_cv_becomes_kv_by_the_trade_factor():
    # Kv = Cv / 1.156 (ISA-75.01.01 / IEC 60534-2-1 conversion; fluids.Cv_to_Kv)
    inp = _net()(scn.load(EVERY))
    assert inp.valves["FCV-1"].kv_rated == pytest.approx(60.0 / 1.156, rel=2e-3)
    assert inp.valves["FCV-1"].given_as == "cv"
    assert inp.network().link("cooler").kv == pytest.approx(80.0 / 1.156, rel=2e-3)


def test_network_for_a_band_condition():
    inp = _net()(scn.load(RING))
    new = inp.network("new", inp.T_min)
    aged = inp.network("aged", inp.T_max)
    e_new = new.link("ring A-B").segment.pipe.roughness
    e_aged = aged.link("ring A-B").segment.pipe.roughness
    assert e_aged > e_new
    assert aged.state.T == pytest.approx(inp.T_max) and new.state.rho > aged.state.rho
    assert inp.levels("high") == "high"
    with pytest.raises(Exception, match="low, high|'low', 'high'"):
        inp.levels("middle")


def test_network_settings_apply_to_balancing_valves_only():
    from kit.errors import UnknownChoiceError

    inp = _net()(scn.load(CHW))
    net = inp.network(settings={"BV-1": 12.5})
    assert net.link("BV-1").kv == 12.5 and net.link("BV-1").kv_max == 40.0
    with pytest.raises(UnknownChoiceError, match="TV-1"):
        inp.network(settings={"TV-1": 3.0})


def test_small_network_reads():
    sc = scn.loads(_dump(_doc()))
    inp = _net()(sc)
    assert [k.name for k in inp.links] == ["P1", "V1", "P2"]
    assert inp.nodes[0].demand == pytest.approx(0.01)
    assert inp.valves["V1"].opening == 1.0  # the default, fully open


# ---------------------------------------------------------------- hostile inputs


def _edit(fn):
    d = _doc()
    fn(d)
    return _dump(d)


def _link(d, name):
    return [k for k in d["link"] if k["name"] == name][0]


HOSTILE = [
    ("unknown link end", lambda d: _link(d, "P1").update({"to": "J9"}), ScenarioError,
     r"link\[0\]\.to.*'J9', which is no node or boundary"),
    ("duplicate node", lambda d: d["node"][1].update({"name": "J1"}), ScenarioError,
     r"node\[1\]\.name.*repeats the name 'J1'"),
    ("node named as the boundary", lambda d: d["node"][1].update({"name": "tank"}),
     ScenarioError, r"repeats the name 'tank'"),
    ("duplicate link", lambda d: _link(d, "P2").update({"name": "P1"}), ScenarioError,
     r"link\[2\]\.name.*repeats the name 'P1'"),
    ("no fixed head", lambda d: d.pop("boundary"), ScenarioError,
     r"'boundary'.*is missing"),
    ("empty boundary list", lambda d: d.update({"boundary": []}), ScenarioError,
     r"boundary.*1 to 1000 entries, not 0"),
    ("kv and cv together", lambda d: _link(d, "V1").update({"cv": 30.0}), ScenarioError,
     r"link\[1\]\.cv.*cannot be given together with kv"),
    ("control valve without a coefficient", lambda d: _link(d, "V1").pop("kv"),
     ScenarioError, r"link\[1\]\.kv.*is missing"),
    ("a pipe key on a valve", lambda d: _link(d, "V1").update({"length": "3 m"}),
     UnknownKeyError, r"link\[1\]\.length.*does not apply when type = 'control_valve'"),
    ("unknown type", lambda d: _link(d, "V1").update({"type": "gate"}), ScenarioError,
     r"link\[1\]\.type.*must be one of"),
    ("zero opening", lambda d: _link(d, "V1").update({"opening": "0 %"}), ScenarioError,
     r"link\[1\]\.opening.*more than 0"),
    ("opening above full", lambda d: _link(d, "V1").update({"opening": "120 %"}),
     ScenarioError, r"link\[1\]\.opening"),
    ("opening as a bare number", lambda d: _link(d, "V1").update({"opening": 0.5}),
     KeyTypeError, r"link\[1\]\.opening"),
    ("negative length", lambda d: _link(d, "P1").update({"length": "-5 m"}), ScenarioError,
     r"link\[0\]\.length.*more than 0"),
    ("pipe without length", lambda d: _link(d, "P1").pop("length"), ScenarioError,
     r"link\[0\]\.length.*is missing"),
    ("a link to itself", lambda d: _link(d, "V1").update({"to": "J1"}), ScenarioError,
     r"link\[1\]\.to.*must differ from its from"),
    ("min pressure without a unit", lambda d: d["node"][0].update({"min_pressure": 200}),
     KeyTypeError, r"node\[0\]\.min_pressure"),
    ("string for a bool", lambda d: _link(d, "P1").update({"check": "true"}), KeyTypeError,
     r"link\[0\]\.check"),
    ("rangeability 1", lambda d: _link(d, "V1").update({"rangeability": 1.0}), ScenarioError,
     r"link\[1\]\.rangeability"),
    ("FL above 1", lambda d: _link(d, "V1").update({"FL": 1.2}), ScenarioError,
     r"link\[1\]\.FL"),
    ("circuit naming no link", lambda d: _link(d, "V1").update({"circuit": ["P9"]}),
     ScenarioError, r"link\[1\]\.circuit\[0\].*'P9', which is no link"),
    ("circuit naming the valve", lambda d: _link(d, "V1").update({"circuit": ["V1"]}),
     ScenarioError, r"link\[1\]\.circuit\[0\].*the valve itself"),
    ("circuit not a list", lambda d: _link(d, "V1").update({"circuit": "P1"}), KeyTypeError,
     r"link\[1\]\.circuit"),
    ("curve for no pump", lambda d: d.update({"curve": {"pump": "P1"}}), ScenarioError,
     r"curve\.pump.*no pump link"),
    ("boundary without level", lambda d: d["boundary"][0].pop("level"), ScenarioError,
     r"boundary\[0\]\.level.*is missing"),
    ("level with a range", lambda d: d["boundary"][0].update({"level_low": "1 m"}),
     ScenarioError, r"boundary\[0\]\.level_low.*cannot be given together with level"),
    ("flow_max below flow_min", lambda d: _link(d, "V1").update(
        {"flow_min": "10 m3/h", "flow_max": "5 m3/h"}), ScenarioError,
     r"link\[1\]\.flow_max.*above flow_min"),
    ("a node key in a link", lambda d: _link(d, "P1").update({"elevation": "3 m"}),
     UnknownKeyError, r"link\[0\]\.elevation"),
    ("misspelt key", lambda d: d["node"][0].update({"elevaton": "3 m"}), UnknownKeyError,
     r"node\[0\]\.elevaton.*did you mean 'elevation'"),
    ("pipe shorter than its ends' rise", lambda d: (
        d["node"].append({"name": "J3", "elevation": "80 m"}),
        d["link"].append({"name": "P3", "type": "pipe", "from": "J1", "to": "J3",
                          "length": "50 m", "pipe": {"bore": "50 mm"}})), ScenarioError,
     r"link\[3\]\.length.*at least 80 m"),
]


@pytest.mark.parametrize("what,edit,err,match", HOSTILE, ids=[h[0] for h in HOSTILE])
def test_hostile_input_is_refused_naming_the_key(what, edit, err, match):
    text = _edit(edit)
    with pytest.raises(err, match=match):
        _net()(scn.loads(text))


def _pumped(**pump):
    d = _doc()
    d["node"].append({"name": "S", "elevation": "0 m"})
    p = {"name": "PU", "type": "pump", "from": "S", "to": "J2", "speed": "1450 rpm",
         "impeller": "200 mm", "flow": ["0 m3/h", "30 m3/h", "60 m3/h"],
         "head": ["30 m", "28 m", "22 m"]}
    p.update(pump)
    d["link"].append(p)
    d["link"].append({"name": "PS", "type": "pipe", "from": "tank", "to": "S",
                      "length": "5 m", "pipe": {"bore": "100 mm"}})
    return _dump(d)


@pytest.mark.parametrize("pump,err,match", [
    ({"count": 2}, ScenarioError, r"link\[3\]\.arrangement.*is missing"),
    ({"arrangement": "parallel"}, ScenarioError, r"link\[3\]\.arrangement.*applies to 2"),
    ({"head": ["30 m", "28 m"]}, ScenarioError, r"link\[3\]\.head.*one value per flow point"),
    ({"speed": "-5 rpm"}, ScenarioError, r"link\[3\]\.speed"),
    ({"kv": 3.0}, UnknownKeyError, r"link\[3\]\.kv.*does not apply when type = 'pump'"),
    ({"efficiency": ["0 %", "150 %", "50 %"]}, ScenarioError, r"link\[3\]\.efficiency"),
    ({"head": ["30 m", "35 m", "22 m"]}, ScenarioError, r"link\[3\]\.head\[1\].*rises"),
], ids=["count without arrangement", "arrangement for one pump", "short head list",
        "negative speed", "kv on a pump", "efficiency above 100 %", "rising curve"])
def test_hostile_pump_links(pump, err, match):
    with pytest.raises(err, match=match):
        _net()(scn.loads(_pumped(**pump)))


def test_pump_pair_reads_as_a_parallel_set():
    inp = _net()(scn.loads(_pumped(count=2, arrangement="parallel", standby=1)))
    pk = inp.network().link("PU")
    assert pk.pump.shutoff_head == pytest.approx(30.0, rel=1e-6)
    # two identical pumps in parallel: twice the flow at the same head (common practice,
    # no source)
    assert float(pk.pump.head(2 * 30 / 3600)) == pytest.approx(28.0, abs=0.3)
    assert inp.pumps["PU"].arrangement == "parallel" and inp.pumps["PU"].standby == 1


@pytest.mark.parametrize("valve,match", [
    ({"kv_max": 20.0}, r"link\[1\]\.design_flow.*is missing"),
    ({"kv_max": 20.0, "kv": 10.0, "design_flow": "5 m3/h"},
     r"link\[1\]\.design_flow.*cannot be given with kv"),
    ({"kv_max": 20.0, "kv": 30.0}, r"link\[1\]\.kv.*above the fully open value"),
    ({"kv_max": 20.0, "cv": 10.0}, r"same coefficient"),
    ({"kv": 10.0}, r"link\[1\]\.kv_max.*is missing"),
    ({"kv_max": 20.0, "cv_max": 23.0, "kv": 3.0}, r"cannot be given together"),
], ids=["neither setting nor design flow", "setting and design flow", "setting above open",
        "mixed kv and cv", "no fully open value", "kv_max and cv_max"])
def test_hostile_balancing_valves(valve, match):
    d = _doc()
    v = {"name": "V1", "type": "balancing_valve", "from": "J1", "to": "J2"}
    v.update(valve)
    d["link"][1] = v
    with pytest.raises(ScenarioError, match=match):
        _net()(scn.loads(_dump(d)))


@pytest.mark.parametrize("eq,match", [
    ({}, r"link\[1\]\.kv.*is missing"),
    ({"rated_flow": "10 m3/h"}, r"link\[1\]\.rated_dp.*is missing"),
    ({"rated_flow": "10 m3/h", "rated_dp": "30 kPa", "kv": 3.0}, r"cannot be given together"),
    ({"rated_flow": "10 m3/h", "rated_dp": "-30 kPa"}, r"link\[1\]\.rated_dp"),
], ids=["nothing", "flow without drop", "rating and kv", "negative drop"])
def test_hostile_equipment(eq, match):
    d = _doc()
    v = {"name": "V1", "type": "equipment", "from": "J1", "to": "J2"}
    v.update(eq)
    d["link"][1] = v
    with pytest.raises(ScenarioError, match=match):
        _net()(scn.loads(_dump(d)))


def test_node_cut_off_from_every_fixed_head_is_named():
    d = _doc()
    d["node"].append({"name": "island", "elevation": "0 m"})
    d["node"].append({"name": "islet", "elevation": "0 m"})
    d["link"].append({"name": "IP", "type": "pipe", "from": "island", "to": "islet",
                      "length": "5 m", "pipe": {"bore": "50 mm"}})
    with pytest.raises(ScenarioError, match=r"node\[2\].*no path to any fixed-head"):
        _net()(scn.loads(_dump(d)))


def test_a_document_edited_in_memory_is_checked_again():
    sc = scn.loads(SMALL)
    sc.doc["link"][0]["lenght"] = "3 m"
    with pytest.raises(UnknownKeyError, match=r"link\[0\]\.lenght.*did you mean 'length'"):
        _net()(sc)


def test_other_kinds_are_refused_by_the_network_reader():
    sc = scn.load(ROOT / "scenarios" / "kestrel_ridge_booster.toml")
    with pytest.raises(ScenarioError, match=r"'kind'.*must be 'network'"):
        _net()(sc)


def test_schema_docstring_names_every_link_type():
    from kit.inputs import network_schema as ns

    for t in ns.LINK_TYPES:
        assert re.search(rf'type = "{t}"', ns.__doc__), t
