"""Equipment links (a fixed Kv), findings on links without flow, and the liquid critical
pressure the control-valve sizing takes; each check against a hand computation named beside
it."""

import math
from types import SimpleNamespace as NS

import pytest

from kit.core.line import Segment
from kit.core.network import (
    Boundary,
    EquipmentLink,
    Network,
    Node,
    PipeLink,
)
from kit.core.valves import KV_HEAD, RHO0, critical_pressure
from kit.errors import InputError, OutOfRangeError

WATER20 = NS(rho=998.21, mu=1.0016e-3, pv=2339.0, T=293.15, name="water")  # 20 °C, from memory
G = 9.80665


def pipe(Di, eps=4.5e-5):
    p = NS(Di=Di, area=math.pi / 4 * Di * Di, roughness=eps)
    p.with_condition = lambda c: p
    return p


def test_equipment_passes_flow_by_its_kv():
    # Between two tanks with no pipe loss to speak of, Q = Kv·sqrt(Δp[bar]/(ρ/ρ0)) / 3600:
    # the Kv definition of IEC 60534-2-1 (from memory), Δp = ρ g ΔH.
    net = Network("eq", [Node("A", 0.0)], [Boundary("T1", 10.0), Boundary("T2", 5.0)],
                  [PipeLink("in", "T1", "A", Segment("in", pipe(0.5), 0.01)),
                   EquipmentLink("coil", "A", "T2", kv=20.0)], WATER20)
    r = net.solve()
    dh = r.head_at("A") - 5.0
    dp_bar = WATER20.rho * G * dh / 1e5
    assert r.flow("coil") * 3600 == pytest.approx(20.0 * math.sqrt(dp_bar / (WATER20.rho / RHO0)),
                                                  rel=1e-9)
    assert dh == pytest.approx(KV_HEAD * (r.flow("coil") / 20.0) ** 2, rel=1e-9)
    assert r.links_table()[1]["kind"] == "equipment"


def test_equipment_refuses_a_bad_kv():
    with pytest.raises(OutOfRangeError, match="Kv of equipment 'coil'"):
        EquipmentLink("coil", "A", "B", kv=-1.0)
    with pytest.raises(InputError, match="must differ"):
        EquipmentLink("coil", "A", "A", kv=1.0)


def test_a_dead_leg_is_no_flow_not_reverse_flow():
    # An expansion-vessel line: both ends at the same head, no flow. Round-off in its flow must
    # not read as reverse flow, and no velocity class applies (common practice, no source).
    net = Network("dead", [Node("A", 0.0, demand=0.01), Node("B", 0.0)],
                  [Boundary("T", 20.0)],
                  [PipeLink("feed", "T", "A", Segment("feed", pipe(0.1), 50.0)),
                   PipeLink("leg", "B", "A", Segment("leg", pipe(0.05), 5.0))], WATER20)
    r = net.solve()
    assert abs(r.flow("leg")) < 1e-12
    leg = [f for f in r.findings() if f.subject == "link 'leg'"]
    assert [f.quantity for f in leg] == ["flow"]
    assert leg[0].severity.value == "pass" and "no flow" in leg[0].rule


def test_reverse_flow_is_still_found():
    net = Network("rev", [Node("A", 0.0, demand=0.01)], [Boundary("T", 20.0)],
                  [PipeLink("back", "A", "T", Segment("back", pipe(0.1), 50.0))], WATER20)
    r = net.solve()
    assert r.flow("back") < 0
    assert any(f.quantity == "flow" and "against the drawn direction" in f.rule
               for f in r.findings())


def test_critical_pressure_of_the_liquids():
    from kit.core.liquids import make_liquid

    # water 22.064 MPa (IAPWS-95, from memory); toluene about 4.13 MPa (from memory)
    pc, src = critical_pressure(make_liquid("water"))
    assert pc == pytest.approx(22.064e6, rel=1e-6) and "CoolProp" in src
    assert critical_pressure(make_liquid("toluene"))[0] == pytest.approx(4.13e6, rel=0.01)
    # an aqueous solution takes water's, and says so
    pc, src = critical_pressure(make_liquid("ethylene_glycol_aq", 0.3))
    assert pc == 22.064e6 and "water" in src


def test_band_labels_keep_temperatures_apart():
    # two temperatures of a band less than a degree apart must not share a label
    from kit.core.network import network_curve
    from kit.core.network_model import PumpLink
    from kit.core.pump import PumpCurve

    pump = PumpCurve([0, 0.01, 0.02], [30.0, 28.0, 22.0], speed_rpm=1450, diameter=0.25)
    net = Network("lab", [Node("S", 0.0), Node("D", 0.0),
                          Node("J", 5.0, demand=0.01, min_pressure=201325.0)],
                  [Boundary("T", 2.0)],
                  [PipeLink("suc", "T", "S", Segment("suc", pipe(0.1), 2.0)),
                   PumpLink("P", "S", "D", pump),
                   PipeLink("dis", "D", "J", Segment("dis", pipe(0.1), 50.0))], WATER20)
    a = NS(rho=999.9, mu=1.52e-3, pv=880.0, T=278.35)
    b = NS(rho=999.9, mu=1.50e-3, pv=890.0, T=278.85)
    c = network_curve(net, [0.0, 0.01], "P", states=(a, b))
    assert c.labels == ("low level / 5.2 °C / new", "low level / 5.7 °C / new")


def test_documented_parameters_match_signatures():
    from docsig import documented_params, signature_params, unit_missing

    for obj in (EquipmentLink, critical_pressure):
        assert documented_params(obj) == signature_params(obj), obj.__name__
        assert unit_missing(obj) == [], obj.__name__


def test_docstring_examples():
    import doctest

    from kit.core import network_model, valves

    for mod in (network_model, valves):
        result = doctest.testmod(mod)
        assert result.attempted > 0 and result.failed == 0, mod.__name__
