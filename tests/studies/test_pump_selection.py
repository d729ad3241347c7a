"""Pump-selection study: scenario in, operating points, NPSH, verdicts out.

Reference values are computed here, independently of the code under test: the system curve by
our own Darcy–Weisbach with Colebrook solved by brentq, water properties from IAPWS-IF97 via
``iapws``, the barometric pressure from the U.S. Standard Atmosphere 1976 formula, the pump
curve by ``numpy.polyfit`` on the datasheet points, intersections by bisection.
"""

from __future__ import annotations

import copy
import math
import re
from pathlib import Path

import numpy as np
import pytest
from bisection import bisect
from iapws import IAPWS97
from scipy.optimize import brentq

from kit import scenario as scn
from kit.core.findings import CAUTIONS, Severity
from kit.errors import ScenarioError, UnknownKeyError
from kit.results import compute as compute_any
from kit.studies import pump_selection as ps

ROOT = Path(__file__).resolve().parents[2]
DEMO = ROOT / "scenarios" / "kestrel_ridge_booster.toml"
g = 9.80665  # standard gravity (CGPM 1901)

#: Fixed K per segment for the independent check (invented values, any would do).
FIXED_K = {("suction", 0): 1.4, ("discharge", 0): 2.6, ("discharge", 1): 0.7,
           ("discharge", 2): 1.9}


@pytest.fixture(scope="module")
def demo():
    return scn.load(DEMO)


@pytest.fixture(scope="module")
def demo_study(demo):
    return ps.study(demo)


def fixed_k_copy(sc):
    """The demo with each segment's fittings replaced by one fixed-K row (known K)."""
    c = sc.copy()
    for (line, i), K in FIXED_K.items():
        c.doc[line]["segments"][i]["fittings"] = [{"kind": "fixed_k", "K": K}]
    return c


# ------------------------------------------------------------------ independent computations

def barometric_1976(z):
    """U.S. Standard Atmosphere 1976, troposphere: p = 101325 (1 − 2.25577e-5 z)^5.25588."""
    return 101325.0 * (1.0 - 2.25577e-5 * z) ** 5.25588


def colebrook(Re, eD):
    """Colebrook (1939) solved for 1/√f by brentq."""
    def fn(x):  # x = 1/sqrt(f)
        return x + 2.0 * math.log10(eD / 3.7 + 2.51 * x / Re)
    x = brentq(fn, 0.5, 50.0, xtol=1e-15)
    return 1.0 / (x * x)


def water(T, P):
    """Density [kg/m³] and viscosity [Pa·s] at T, P from IAPWS-IF97 via iapws."""
    w = IAPWS97(T=T, P=P / 1e6)
    return w.rho, w.mu


def pv_water(T):
    """Saturation pressure [Pa] at T, IAPWS-IF97 via iapws."""
    return IAPWS97(T=T, x=0).P * 1e6


def segment_losses(doc, line, Q, rho, mu, roughness=4.5e-5):
    """Σ (f L/D + K) V²/2g over the line's segments; bores from ASME B36.10M (from memory)."""
    bores = {"10": 0.25446, "8": 0.20274}  # Sch 40: 10.020 in, 7.981 in (B36.10M, from memory)
    total = 0.0
    for i, seg in enumerate(doc[line]["segments"]):
        D = bores[seg["pipe"]["nominal"]]
        L = float(seg["length"].split()[0])
        A = math.pi * D * D / 4.0
        V = Q / A
        Re = rho * V * D / mu
        f = colebrook(Re, roughness / D)
        total += (f * L / D + FIXED_K[(line, i)]) * V * V / (2 * g)
    return total


def levels(doc, static):
    src, dst = doc["source"], doc["destination"]
    z = {k: float(v.split()[0]) for k, v in src.items() if k.startswith("level")}
    zd = {k: float(v.split()[0]) for k, v in dst.items() if k.startswith("level")}
    if static == "max":
        return z["level_low"], zd["level_high"]
    return z["level_high"], zd["level_low"]


def datasheet(sc, i):
    p = sc.doc["pumps"][i]
    q = np.array([float(x.split()[0]) / 3600.0 for x in p["flow"]])
    h = np.array([float(x.split()[0]) for x in p["head"]])
    r = np.array([float(x.split()[0]) for x in p["npshr"]])
    return q, h, r


# ------------------------------------------------------------------ operating point and NPSHa

@pytest.mark.parametrize("static", ["max", "min"])
def test_operating_point_matches_independent_darcy_colebrook_polyfit_bisection(demo, static):
    """Darcy–Weisbach + Colebrook 1939 by brentq, IAPWS-IF97 via iapws, numpy.polyfit, bisection."""
    sc = fixed_k_copy(demo)
    s = ps.study(sc)
    T = 301.15  # 28 degC, the scenario's highest temperature
    i_cond = [k for k, c in enumerate(s.band.conditions)
              if c.static == static and c.T == pytest.approx(T) and c.roughness == "new"][0]
    op = s.points[s.pumps[0].name][i_cond]

    p_baro = barometric_1976(240.0)
    rho, mu = water(T, p_baro)
    z_s, z_d = levels(sc.doc, static)
    q, h, _ = datasheet(sc, 0)
    coef = np.polyfit(q, h, 2)

    def system(Q):
        return (z_d - z_s) + segment_losses(sc.doc, "suction", Q, rho, mu) + \
            segment_losses(sc.doc, "discharge", Q, rho, mu)

    Q_ref = bisect(lambda Q: np.polyval(coef, Q) - system(Q), 1e-4, q[-1])
    assert op.Q == pytest.approx(Q_ref, rel=1e-6)
    assert op.H == pytest.approx(system(Q_ref), rel=1e-6)


def test_npsh_available_from_its_definition(demo):
    """NPSHa = (p_baro − p_v)/(ρg) + (z_s − z_pump) − h_L,s; US Std Atmosphere 1976 formula,
    IAPWS-IF97 via iapws, Colebrook 1939 by brentq."""
    sc = fixed_k_copy(demo)
    s = ps.study(sc)
    T = 301.15
    i_cond = [k for k, c in enumerate(s.band.conditions)
              if c.static == "max" and c.T == pytest.approx(T) and c.roughness == "new"][0]
    op = s.points[s.pumps[0].name][i_cond]
    p_baro = barometric_1976(240.0)
    assert s.system.p_baro == pytest.approx(p_baro, rel=2e-5)
    rho, mu = water(T, p_baro)
    pv = pv_water(T)
    z_s = 98.0  # lowest sump level
    z_pump = 100.2
    hL = segment_losses(sc.doc, "suction", op.Q, rho, mu)
    npsha = (p_baro - pv) / (rho * g) + (z_s - z_pump) - hL
    assert op.npsha == pytest.approx(npsha, abs=2e-4)
    assert float(s.system.npsh_available(np.array([op.Q]), s.band.conditions[i_cond])[0]) == \
        pytest.approx(npsha, abs=2e-4)


def test_hot_low_level_fails_npsh_while_cold_passes(demo):
    """A copy with a deeper sump draw-down and water up to 70 °C: the hot low-level points of
    pump A cavitate, the cold ones pass. NPSHa checked against the definition with IAPWS-IF97
    via iapws; NPSHr from numpy.polyfit of the datasheet; margin guideline 1.3 × and 1 m
    (ANSI/HI 9.6.1 water and wastewater, from memory)."""
    sc = demo.copy()
    sc.set("source.level_low", "95.0 m")
    sc.set("liquid.temperature_max", "70 degC")
    s = ps.study(sc)
    name = s.pumps[0].name
    q, _, r = datasheet(sc, 0)
    npshr_fit = np.polyfit(q, r, 2)
    p_baro = barometric_1976(240.0)
    seen = set()
    for cond, op in zip(s.band.conditions, s.points[name], strict=True):
        if cond.static != "max":
            continue
        rho, _ = water(cond.T, p_baro)
        hand = (p_baro - pv_water(cond.T)) / (rho * g) + (95.0 - 100.2)
        assert op.npsha == pytest.approx(hand, abs=0.2)  # within the suction loss (< 0.2 m)
        assert op.npsha < hand
        npsh = [f for f in op.findings if f.quantity.startswith("NPSH margin")]
        assert npsh, cond.label
        req = float(np.polyval(npshr_fit, op.Q))
        assert op.npshr == pytest.approx(req, rel=1e-9)
        if cond.T > 340.0:
            assert hand < req  # the independent numbers say it cavitates
            assert all(f.severity is Severity.FAIL for f in npsh), cond.label
            seen.add("hot")
        else:
            assert hand - 0.2 >= 1.3 * req and hand - 0.2 - req >= 1.0
            assert all(f.severity is Severity.PASS for f in npsh), cond.label
            seen.add("cold")
    assert seen == {"hot", "cold"}
    assert s.verdicts[name] == "fail"


# ------------------------------------------------------------------ the demo's story

def test_demo_verdicts(demo_study):
    """One pump passes; one cavitates at low sump level; one is oversized and runs far right of
    its BEP. NPSH rule as above; POR 0.7–1.2, AOR placeholder 0.5–1.3 × Q_BEP (ANSI/HI 9.6.3,
    from memory)."""
    s = demo_study
    a, b, c = (p.name for p in s.pumps)
    assert s.verdicts == {a: "pass", b: "fail", c: "fail"}
    assert s.recommended == a
    fail_b = {op.label for op in s.points[b]
              if any(f.severity is Severity.FAIL and f.quantity.startswith("NPSH")
                     for f in op.findings)}
    assert fail_b == {cd.label for cd in s.band.conditions if cd.static == "max"}
    for op in s.points[b]:  # independent: a cross below its NPSHr is a failure
        assert (op.npsha < op.npshr) == (op.label in fail_b)
    fracs = [op.bep_fraction for op in s.points[c]]
    assert min(fracs) > 1.2 and max(fracs) > 1.3
    assert any(f.severity is Severity.FAIL and f.quantity == "flow / BEP flow"
               for f in s.findings[c])
    for op in s.points[a]:
        assert 0.7 <= op.bep_fraction <= 1.2
        assert op.Q >= s.required_flow


def test_demo_control_comparison_by_affinity_laws(demo_study):
    """Speed ratio r with r² H(Q/r) = H_sys(Q) (affinity laws, Karassik et al. 2008, from
    memory) solved here by bisection on numpy.polyfit of the datasheet."""
    s = demo_study
    c = s.control
    assert c is not None and s.control_label.startswith("max static")
    sc = scn.load(DEMO)
    q, h, _ = datasheet(sc, 0)
    coef = np.polyfit(q, h, 2)
    Q = s.required_flow
    r = bisect(lambda x: x * x * np.polyval(coef, Q / x) - c.H_req, 0.5, 1.0)
    assert c.speed.speed_ratio == pytest.approx(r, rel=1e-9)
    assert c.speed.speed_rpm == pytest.approx(1480.0 * r, rel=1e-9)
    assert c.throttle.valve_head == pytest.approx(np.polyval(coef, Q) - c.H_req, rel=1e-9)
    assert c.saving_kWh > 0


def test_motor_covers_band_power_with_margin(demo_study):
    """IEC 60072-1 ratings (from memory) with the tiered margin (API 610 rule, from memory)."""
    s = demo_study
    iec = (30e3, 37e3, 45e3, 55e3, 75e3, 90e3)
    for p in s.pumps:
        pmax = max(op.shaft_power for op in s.good(p.name))
        m = s.motors[p.name]
        factor = 1.25 if pmax <= 22e3 else 1.15 if pmax <= 55e3 else 1.10
        assert m.rating == min(x for x in iec if x >= pmax * factor)


def test_compute_results_and_cautions(demo):
    r = ps.compute(demo)
    assert r.kind == "pump_selection"
    assert r.value("duty.flow") == pytest.approx(140 / 3600)
    assert r.value("pumps[0].verdict") == 0 and r.value("pumps[1].verdict") == 2
    assert r.value("pumps[1].npsh_margin") < 0
    assert CAUTIONS["general"] in r.cautions and CAUTIONS["water_hammer"] in r.cautions
    assert CAUTIONS["cavitation"] in r.cautions and CAUTIONS["pump"] in r.cautions
    assert {m.name for m in r.methods} >= {"Operating point", "NPSH margin", "Operating region"}
    assert len(r.tables["operating_points"]) == 24
    assert r.tables["recommended"] == [{"pump": "KR-A end-suction 1480 rpm"}]
    assert compute_any(demo).values == r.values


def test_scenario_round_trip(demo):
    """dumps → loads keeps the document, and the results do not change."""
    back = scn.loads(scn.dumps(demo))
    assert back.doc == demo.doc
    a, b = ps.compute(demo), ps.compute(back)
    assert [(v.key, v.value) for v in a.values] == [(v.key, v.value) for v in b.values]


def test_parallel_pumps_from_scenario(demo):
    """Two pumps in parallel: flows add at equal head (Karassik et al. 2008, from memory)."""
    sc = demo.copy()
    p = copy.deepcopy(sc.doc["pumps"][0])
    p.update(name="KR-A pair", arrangement="parallel", count=2)
    sc.doc["pumps"] = [p]
    pump = ps.build_pumps(sc)[0]
    single = ps.build_pump(demo.doc["pumps"][0], "pumps[0]")
    H = 70.0
    assert float(pump.head(2 * single.flow_at_head(np.array([H]))[0])) == pytest.approx(H)


# ------------------------------------------------------------------ bad input

def _bad(mutate):
    sc = scn.load(DEMO)
    mutate(sc.doc["pumps"][0])
    return sc


BAD = [
    ("fewer than 3 points",
     lambda p: p.update(flow=p["flow"][:2], head=p["head"][:2], efficiency=p["efficiency"][:2],
                        npshr=p["npshr"][:2]),
     "pumps[0].flow", "needs at least 3 datasheet points"),
    ("duplicate flows", lambda p: p["flow"].__setitem__(2, "50 m3/h"),
     "pumps[0].flow[2]", "duplicates point 2"),
    ("negative head", lambda p: p["head"].__setitem__(1, "-2 m"),
     "pumps[0].head[1]", "must be at least 0 m"),
    ("efficiency over 100 %", lambda p: p["efficiency"].__setitem__(3, "104 %"),
     "pumps[0].efficiency[3]", "must be between 0 and 1"),
    ("missing head list", lambda p: p.pop("head"), "pumps[0].head", "is missing"),
    ("unknown arrangement", lambda p: p.update(arrangement="tandem"),
     "pumps[0].arrangement", "must be one of 'single', 'parallel', 'series', not 'tandem'"),
    ("head list shorter than flows", lambda p: p["head"].pop(),
     "pumps[0].head", "one value per flow point"),
    ("count for a single pump", lambda p: p.update(count=2), "pumps[0].count", "must be 1"),
    ("unknown key", lambda p: p.update(stages=2), "pumps[0].stages",
     "is not a key of [pumps[0]]"),
    ("speed without unit", lambda p: p.update(speed="1480"), "pumps[0].speed", "unit"),
]


@pytest.mark.parametrize("what,mutate,key,text", BAD, ids=[b[0] for b in BAD])
def test_bad_pump_input_names_the_key(what, mutate, key, text):
    sc = _bad(mutate)
    with pytest.raises(ScenarioError, match=re.escape(f"scenario key '{key}'")) as info:
        ps.study(sc)
    expected = UnknownKeyError if what == "unknown key" else ScenarioError
    assert type(info.value) is expected
    assert info.value.key == key
    assert text in str(info.value)


def test_no_pumps_and_bad_operation_keys():
    sc = scn.load(DEMO)
    sc.doc["pumps"] = []
    with pytest.raises(ScenarioError, match=r"scenario key 'pumps'"):
        ps.study(sc)
    sc = scn.load(DEMO)
    sc.doc["operation"]["motor_series"] = "JIS"
    with pytest.raises(ScenarioError, match=r"'operation.motor_series'.*'IEC', 'NEMA'"):
        ps.study(sc)
    sc = scn.load(DEMO)
    sc.doc["duty"]["npsh_application"] = "sewage"
    with pytest.raises(ScenarioError, match=r"'duty.npsh_application'.*'water_wastewater'"):
        ps.study(sc)


def test_pump_that_cannot_lift_is_a_fail_finding_not_a_crash(demo):
    sc = demo.copy()
    sc.doc["pumps"][0]["head"] = ["50 m", "49 m", "46 m", "41 m", "34 m", "30 m"]
    s = ps.study(sc)
    name = s.pumps[0].name
    assert all(p is None for p in s.points[name])
    assert s.verdicts[name] == "fail"
    assert any("cannot deliver" in f.rule for f in s.findings[name])


def test_findings_summary_groups_worst_first(demo_study):
    text = ps.findings_summary(demo_study.findings[demo_study.pumps[1].name])
    assert text.startswith("FAIL NPSH margin (4 ×)")
    assert ps.findings_summary([]) == "all checks pass"


def test_spline_points_equal_polished_points(demo, monkeypatch):
    """Points taken on the splined band equal those polished against the exact curve."""
    a = ps.study(demo)
    monkeypatch.setattr(ps, "POLISH_TOL", -1.0)  # polish every point
    b = ps.study(demo)
    for name in a.points:
        for p, q in zip(a.points[name], b.points[name], strict=True):
            assert p.Q == pytest.approx(q.Q, rel=1e-10, abs=0)
            assert p.npsha == pytest.approx(q.npsha, abs=1e-9)


def test_docstring_examples():
    import doctest

    result = doctest.testmod(ps, optionflags=doctest.ELLIPSIS)
    assert result.attempted > 0 and result.failed == 0


@pytest.mark.parametrize("name", ["kestrel_ridge_booster.toml", "wrenfield_duty_standby.toml"])
def test_what_a_study_keeps_for_the_next_gives_the_same_results(name):
    """A study keeps its system's band, splines, exact heads and each pump's operating points
    for the next study of the same system (a datasheet edit). Results computed with those
    kept parts equal results computed from nothing (every kept part cleared first), for the
    scenario as filed, after an edit of one pump and back again. Independent: the same study
    with nothing kept."""
    from sameresults import assert_same_results

    from kit.inputs import pump_selection as pi

    root = Path(__file__).resolve().parents[2] / "scenarios"
    sc = scn.load(root / name)
    doc = copy.deepcopy(sc.doc["pumps"][0])
    doc["head"] = list(doc["head"])
    value, unit = doc["head"][1].split()
    doc["head"][1] = f"{float(value) * 1.03:.4g} {unit}"
    edited = pi.with_pump(sc, 0, doc)

    def cold(s):
        ps._SYSTEM_PARTS.clear()
        return ps.compute(s.copy())

    ref_a, ref_b = cold(sc), cold(edited)
    ps._SYSTEM_PARTS.clear()
    warm = [ps.compute(s.copy()) for s in (sc, edited, sc, edited)]
    assert ps._SYSTEM_PARTS                       # something was kept
    for got, ref in zip(warm, (ref_a, ref_b, ref_a, ref_b), strict=True):
        assert_same_results(got, ref)
    # the preview's points are the study's
    pv = ps.preview(edited.copy())
    st = ps.study(edited.copy())
    assert {n: [None if p is None else (p.Q, p.H) for p in v] for n, v in pv.points.items()} \
        == {n: [None if p is None else (p.Q, p.H) for p in v] for n, v in st.points.items()}
