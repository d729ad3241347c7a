"""Tank-drainage study: scenario in, results out, checked against closed forms and quadratures
written here (never by calling the code under test for the expected value)."""

from __future__ import annotations

import math
import time
from pathlib import Path

import numpy as np
import pytest
from raising import raises_exactly
from scipy.integrate import quad
from scipy.optimize import brentq

from kit import scenario as scn
from kit.core.findings import CAUTIONS, Severity
from kit.errors import ScenarioError, UnknownKeyError
from kit.record.stamp import jsonable
from kit.results import compute as compute_any
from kit.studies import tank_drainage as td

ROOT = Path(__file__).resolve().parents[2]
DEMO = ROOT / "scenarios" / "marlow_vale_cip_dump.toml"
g = 9.80665  # standard gravity (CGPM 1901)

#: A user liquid with constant properties (so no property library enters the checks).
RHO, MU = 1000.0, 1.0e-3
LIQUID = f"""
[liquid]
temperature = "20 degC"
[liquid.user]
name = "test water"
temperature = ["5 degC", "40 degC"]
density = ["{RHO} kg/m3", "{RHO} kg/m3"]
viscosity = ["{MU * 1e3} mPa*s", "{MU * 1e3} mPa*s"]
vapour_pressure = ["2.3 kPa", "2.3 kPa"]
"""


def orifice_text(D="1.8 m", L="3 m", start="2.8 m", target="0.2 m", d="40 mm", Cd="0.61",
                 extra_drain="", compare=""):
    return f"""
schema = "headline-scenario/1"
kind = "tank_drainage"
title = "test: flat vertical cylinder, bottom orifice"
[display]
system = "SI"
{LIQUID}
[tank]
name = "test tank"
shape = "vertical_cylinder"
diameter = "{D}"
length = "{L}"
[drain]
start_level = "{start}"
target_level = "{target}"
levels_of_interest = ["2 m", {{ level = "1000 mm", label = "mid switch" }}]
{extra_drain}
[outlet]
type = "orifice"
diameter = "{d}"
Cd = {Cd}
{compare}
"""


def orifice_scenario(**kw):
    return scn.loads(orifice_text(**kw))


def torricelli_time(A_tank, Cd, a, h1, h2, h_extra=0.0):
    """Torricelli 1643, standard result: t = A/(Cd a) sqrt(2/g) (sqrt(h1+hx) - sqrt(h2+hx))."""
    return A_tank / (Cd * a) * math.sqrt(2 / g) * (math.sqrt(h1 + h_extra) - math.sqrt(h2 + h_extra))


# ---------- closed forms ----------------------------------------------------------------------

def test_orifice_scenario_equals_torricelli_closed_form():
    r = td.compute(orifice_scenario())
    A, a = math.pi * 1.8**2 / 4, math.pi * 0.04**2 / 4
    # Torricelli 1643, standard result (flat-bottomed vertical cylinder, constant Cd)
    assert r.value("drain.total_time") == pytest.approx(torricelli_time(A, 0.61, a, 2.8, 0.2),
                                                        rel=1e-6)
    assert r.value("drain.time_to.2 m") == pytest.approx(torricelli_time(A, 0.61, a, 2.8, 2.0),
                                                         rel=1e-5)
    assert r.value("drain.time_to.mid switch") == pytest.approx(
        torricelli_time(A, 0.61, a, 2.8, 1.0), rel=1e-5)
    # peak flow at the start: Q = Cd a sqrt(2 g h) (Torricelli)
    assert r.value("drain.peak_flow") == pytest.approx(0.61 * a * math.sqrt(2 * g * 2.8), rel=1e-12)
    assert r.value("drain.volume_drained") == pytest.approx(A * 2.6, rel=1e-9)   # prism, geometry
    assert r.value("drain.mean_flow") == pytest.approx(A * 2.6 / r.value("drain.total_time"))
    assert r.value("drain.end_level") == pytest.approx(0.2)
    assert r.value("tank.total_volume") == pytest.approx(A * 3.0, rel=1e-9)


def test_padded_tank_by_scenario_equals_torricelli_with_pad_head():
    # 30 kPa(g) pad: head raised by hp = 30e3/(rho g) (Torricelli 1643 with a pad head)
    sc = orifice_scenario(extra_drain='surface = "padded"\nsurface_pressure = "30 kPa(g)"')
    r = td.compute(sc)
    A, a = math.pi * 1.8**2 / 4, math.pi * 0.04**2 / 4
    hp = 30e3 / (RHO * g)
    assert r.value("drain.total_time") == pytest.approx(
        torricelli_time(A, 0.61, a, 2.8, 0.2, hp), rel=1e-6)
    assert any(f.quantity == "blanket gas make-up" and f.severity is Severity.CHECK
               for f in r.findings)


def test_strapping_table_scenario_equals_torricelli():
    # a prism given as a two-row strapping table: volume linear in level, so Torricelli holds
    A, a = 2.5, math.pi * 0.05**2 / 4
    text = orifice_text(d="50 mm").replace(
        'shape = "vertical_cylinder"\ndiameter = "1.8 m"\nlength = "3 m"',
        f'shape = "strapping_table"\nlevels = ["0 m", "3000 mm"]\nvolumes = ["0 m3", "{3 * A} m3"]')
    r = td.compute(scn.loads(text))
    assert r.value("drain.total_time") == pytest.approx(torricelli_time(A, 0.61, a, 2.8, 0.2),
                                                        rel=1e-6)


def test_horizontal_cylinder_scenario_equals_closed_form():
    # flat-ended horizontal cylinder, bottom orifice, drained from h1 to 0:
    # A(h) = 2 L sqrt(h (D - h)) (chord width, standard geometry), so
    # t = 4 L / (3 Cd a sqrt(2 g)) [D^1.5 - (D - h1)^1.5]  (integral written here)
    D, L, d, Cd, h1 = 2.0, 5.0, 0.05, 0.61, 1.9
    text = orifice_text(start=f"{h1} m", target="0 m", d="50 mm").replace(
        'shape = "vertical_cylinder"\ndiameter = "1.8 m"\nlength = "3 m"',
        f'shape = "horizontal_cylinder"\ndiameter = "{D} m"\nlength = "{L} m"\nheads = "flat"')
    text = text.replace('levels_of_interest = ["2 m", ', 'levels_of_interest = [')
    r = td.compute(scn.loads(text))
    a = math.pi * d * d / 4
    closed = 4 * L / (3 * Cd * a * math.sqrt(2 * g)) * (D**1.5 - (D - h1) ** 1.5)
    assert r.value("drain.total_time") == pytest.approx(closed, rel=1e-4)


def test_line_outlet_equals_colebrook_quadrature_written_here():
    # one straight pipe, free discharge 1.5 m below the tank bottom, no fittings.
    # Independent: Colebrook (1939) solved by brentq at each level, energy balance
    # (h - z_d) = (1 + f L/D) V²/2g, and t = ∫ A dh / Q by scipy quad.
    D_t, Di, L, eps, z_d = 1.2, 0.0525, 6.0, 4.5e-5, -1.5
    text = f"""
schema = "headline-scenario/1"
kind = "tank_drainage"
title = "test: line outlet"
{LIQUID}
[tank]
shape = "vertical_cylinder"
diameter = "{D_t} m"
length = "2 m"
[drain]
start_level = "1.9 m"
target_level = "0.3 m"
[outlet]
type = "line"
name = "drop"
discharge_elevation = "{z_d} m"
[[outlet.segments]]
name = "drop pipe"
length = "{L} m"
rise = "{z_d} m"
pipe = {{ bore = "{Di * 1e3} mm", roughness = "{eps * 1e3} mm", material = "stainless_steel" }}
"""
    r = td.compute(scn.loads(text))

    def colebrook(Re, rr):
        return brentq(lambda f: 1 / math.sqrt(f) + 2 * math.log10(rr / 3.7 + 2.51 / (Re * math.sqrt(f))),
                      1e-4, 1.0, xtol=1e-15)

    def flow(h):
        dH = h - z_d
        V = brentq(lambda v: (1 + colebrook(RHO * v * Di / MU, eps / Di) * L / Di) * v * v / (2 * g)
                   - dH, 1e-3, 50.0, xtol=1e-14)
        assert RHO * V * Di / MU > 4000       # turbulent throughout: Colebrook applies
        return V * math.pi * Di**2 / 4

    A = math.pi * D_t**2 / 4
    expected = quad(lambda h: A / flow(h), 0.3, 1.9, epsrel=1e-10)[0]
    assert r.value("drain.total_time") == pytest.approx(expected, rel=1e-5)
    assert r.value("drain.peak_flow") == pytest.approx(flow(1.9), rel=1e-8)
    assert "drain.lowest_pressure" in [v.key for v in r.values]
    assert CAUTIONS["water_hammer"] in r.cautions


# ---------- the what-if ------------------------------------------------------------------------

def test_compare_larger_orifice_drains_faster_by_the_area_ratio():
    sc = orifice_scenario(compare='[compare]\nlabel = "60 mm"\noutlet_diameter = "60 mm"')
    r = td.compute(sc)
    t1, t2 = r.value("drain.total_time"), r.value("compare.total_time")
    assert t2 < t1
    # Torricelli 1643: time ∝ 1/a, so t2/t1 = (40/60)² (standard result)
    assert t2 / t1 == pytest.approx((40 / 60) ** 2, rel=1e-9)
    assert r.value("compare.time_saved") == pytest.approx(t1 - t2)
    assert r.value("compare.time_to.mid switch") < r.value("drain.time_to.mid switch")
    assert [row["case"] for row in r.tables["outlets"]] == ["as given", "60 mm"]
    assert all("compare_time" in row for row in r.tables["times"])


def test_demo_compare_larger_line_drains_faster():
    r = td.compute(scn.load(DEMO))
    assert r.value("compare.total_time") < r.value("drain.total_time")
    assert r.value("compare.peak_flow") > r.value("drain.peak_flow")
    assert r.value("compare.time_saved") > 0


# ---------- the demo ---------------------------------------------------------------------------

def test_demo_loads_and_computes():
    sc = scn.load(DEMO)
    assert sc.kind == "tank_drainage" and sc.display_system == "SI"
    r = compute_any(sc)                      # through the kit's study registry
    keys = [v.key for v in r.values]
    for k in ("tank.total_volume", "drain.total_time", "drain.peak_flow", "drain.volume_drained",
              "drain.end_level", "drain.lowest_pressure", "compare.total_time"):
        assert k in keys
    assert any(k.startswith("drain.time_to.") for k in keys)
    kinds = {v.kind for v in r.values}
    assert {"time", "flow", "volume", "elevation", "velocity"} <= kinds
    # reaches its target; times rise as levels fall
    reached = [f for f in r.findings if f.quantity == "level reached"]
    assert reached and reached[0].severity is Severity.PASS
    times = [row["time"] for row in r.tables["times"]]
    assert times[0] == 0.0 and np.all(np.diff(times) > 0)
    assert times[-1] == pytest.approx(r.value("drain.total_time"))
    hist = r.tables["history"]
    assert 40 <= len(hist) <= 52
    assert hist[0]["time"] == 0.0 and hist[-1]["time"] == pytest.approx(r.value("drain.total_time"))
    assert np.all(np.diff([h["level"] for h in hist]) < 0)
    # safety: the vent is checked, the standing cautions and the hot-liquid caution are shown
    assert any(f.quantity == "vent pressure drop at peak drain rate" for f in r.findings)
    assert any(f.quantity == "pressure above vapour pressure" for f in r.findings)
    assert r.cautions[0] == CAUTIONS["general"]
    assert CAUTIONS["drain"] in r.cautions and CAUTIONS["vacuum"] in r.cautions
    assert any("scald" in c for c in r.cautions)
    assert len(r.cautions) == len(set(r.cautions))
    names = [m.name for m in r.methods]
    assert {"Tank geometry", "Outlet line losses", "Drain time", "Fitting losses"} <= set(names)
    # volume drained: the tank's exact volume between the levels (consistency)
    drained = r.value("drain.volume_drained")
    t_rows = r.tables["times"]
    assert drained == pytest.approx(t_rows[0]["volume_remaining"] - t_rows[-1]["volume_remaining"])


def test_demo_compute_time():
    sc = scn.load(DEMO)
    td.compute(sc)                           # warm: property library loaded
    t0 = time.perf_counter()
    td.compute(sc)
    elapsed = time.perf_counter() - t0
    print(f"compute(demo) {elapsed * 1e3:.1f} ms")
    assert elapsed < 2.0                     # generous bound for a 2-core CI machine


# ---------- round trip -------------------------------------------------------------------------

@pytest.mark.parametrize("make", [lambda: scn.load(DEMO), lambda: orifice_scenario(
    compare='[compare]\noutlet_diameter = "2.5 in"')], ids=["demo", "orifice"])
def test_round_trip_same_doc_same_results(make):
    sc = make()
    again = scn.loads(scn.dumps(sc))
    assert again.doc == sc.doc
    r1, r2 = td.compute(sc), td.compute(again)
    assert [v.as_dict() for v in r1.values] == [v.as_dict() for v in r2.values]
    # NaN values (an unchecked vent) compare equal through their JSON form
    assert jsonable([f.as_dict() for f in r1.findings]) == jsonable([f.as_dict() for f in r2.findings])
    assert jsonable(r1.tables) == jsonable(r2.tables) and r1.cautions == r2.cautions


# ---------- bad inputs name their key ------------------------------------------------------------

def _demo_with(path, value):
    sc = scn.load(DEMO).copy()
    if value is None:
        node = sc.doc
        *head, last = path.split(".")
        for k in head:
            node = node[k]
        del node[last]
    else:
        sc.set(path, value)
    return sc


@pytest.mark.parametrize("make, match", [
    (lambda: orifice_scenario(start="1 m", target="2 m"),
     r"scenario key 'drain.target_level': must be below start_level \(1 m\), not 2 m"),
    (lambda: orifice_scenario(d="0 mm"),
     r"scenario key 'outlet.diameter' in <string>: must be more than 0 m, not 0 mm"),
    (lambda: orifice_scenario(Cd="1.2"),
     r"scenario key 'outlet.Cd' in <string>: must be more than 0 and at most 1, not 1.2"),
    (lambda: orifice_scenario(start="3.5 m"),
     r"scenario key 'drain.start_level': 'start level' must be between 0 and 3 m, not 3.5 m"),
    (lambda: _demo_with("tank.shape", "cone"),
     r"scenario key 'tank.shape': must be one of 'vertical_cylinder', 'horizontal_cylinder', "
     r"'sphere', 'strapping_table', not 'cone'"),
    (lambda: _demo_with("outlet", None), r"scenario key 'outlet': is missing"),
    (lambda: _demo_with("outlet.type", "weir"),
     r"scenario key 'outlet.type': must be one of 'orifice', 'line', not 'weir'"),
    (lambda: _demo_with("tank.bottom", {"kind": "guppy"}),
     r"scenario key 'tank.bottom.kind': must be one of 'flat', 'conical'"),
    (lambda: _demo_with("drain.surface", "pressurised"),
     r"scenario key 'drain.surface': must be one of 'vented', 'padded', 'vacuum'"),
    (lambda: _demo_with("drain.surface_pressure", "10 kPa(g)"),
     r"scenario key 'drain.surface_pressure': is for a padded or vacuum surface"),
    (lambda: _demo_with("drain.levels_of_interest", ["4 m"]),
     r"scenario key 'drain.levels_of_interest\[0\]': 'level of interest' must be between"),
    (lambda: _demo_with("compare.outlet_diameter", "3 in"),
     r"scenario key 'compare.nominal': cannot be given with outlet_diameter"),
    (lambda: _demo_with("compare.nominal", "7"),
     r"scenario key 'compare.nominal': outlet.segments\[0\]"),
    (lambda: _demo_with("outlet.discharge_elevation", "-5 m"),
     r"scenario key 'outlet.discharge_elevation': must equal inlet_elevation \+ the segments' rise"),
    (lambda: _demo_with("tank.bottom_head", "flat"),
     r"scenario key 'tank.bottom_head': is not a key of \[tank\]; did you mean 'bottom'\?"),
    (lambda: orifice_scenario(extra_drain='vent = { diameter = "0 in" }'),
     r"scenario key 'drain.vent.diameter' in <string>: must be more than 0 m, not 0 in"),
], ids=["target above start", "zero outlet diameter", "Cd above 1", "level above the tank",
        "unknown tank shape", "missing outlet", "unknown outlet type", "unknown head kind",
        "unknown surface", "pressure on a vented surface", "level of interest above start",
        "orifice key on a line", "unknown compare size", "inconsistent discharge elevation",
        "unknown tank key", "zero vent"])
def test_bad_scenario_names_the_key(make, match):
    cls = UnknownKeyError if "is not a key of" in match else ScenarioError
    with raises_exactly(cls, match):
        td.compute(make())


def test_vacuum_below_vapour_pressure_names_the_surface_pressure():
    # 60 degC water boils below about 19.9 kPa (IAPWS-IF97 saturation, from memory); 10 kPa(a)
    sc = _demo_with("drain.surface", "vacuum")
    sc.set("drain.surface_pressure", "10 kPa(a)")
    with raises_exactly(ScenarioError, r"scenario key 'drain.surface_pressure': "):
        td.compute(sc)


def test_temperature_range_refused():
    sc = _demo_with("liquid.temperature", None)
    sc.set("liquid.temperature_min", "20 degC")
    sc.set("liquid.temperature_max", "60 degC")
    with raises_exactly(UnknownKeyError, r"scenario key 'liquid.temperature_min': is not a key "
                        r"of \[liquid\]: a drain-down is computed at one temperature"):
        td.compute(sc)
