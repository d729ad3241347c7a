"""Pressure rating: B31.3 wall by hand, SDR ratings, B16.5 flange classes, vacuum buckling,
highest-pressure cases and findings; every reference value names its source beside it."""

from __future__ import annotations

import doctest

import pytest
from docsig import documented_params, signature_params, unit_missing
from raising import raises_exactly

import kit.core.rating as rating_mod
from kit.core.findings import Severity
from kit.core.pipes import catalogue_pipe, custom_pipe
from kit.core.rating import (
    COMPOUNDS,
    ELASTIC,
    FLANGE_RATINGS,
    ElasticMaterial,
    G,
    MetalRating,
    PlasticRating,
    allowable_stress,
    b31_3_pressure,
    b31_3_thickness,
    buckling_pressure,
    derating_factor,
    elastic_material,
    flange_findings,
    flange_rating,
    highest_pressure,
    material_for_pipe,
    metal_pipe_rating,
    pipe_rating,
    plastic_pipe_rating,
    rating_findings,
    sdr_pressure,
    vacuum_findings,
    y_coefficient,
)
from kit.errors import InputError, OutOfRangeError, UnknownChoiceError

PSI = 6894.757          # Pa per psi (exact to 7 digits, NIST SP 811)
KSI = 1000 * PSI
BAR = 1e5


def degC(t):
    return t + 273.15


def degF(t):
    return (t - 32) * 5 / 9 + 273.15


# ---------------------------------------------------------------- B31.3 by hand

def test_schedule_walls_are_those_of_b36_10m():
    # ASME B36.10M (from memory): NPS 4 Sch 40 OD 114.3 mm wall 6.02 mm; NPS 8 Sch 40 OD
    # 219.1 mm wall 8.18 mm
    p4 = catalogue_pipe("asme_b36_10m", "4", "40", "carbon_steel")
    p8 = catalogue_pipe("asme_b36_10m", "8", "40", "carbon_steel")
    assert (p4.Do, p4.wall) == pytest.approx((0.1143, 0.00602), abs=1e-6)
    assert (p8.Do, p8.wall) == pytest.approx((0.2191, 0.00818), abs=1e-6)


def test_b31_3_nps4_sch40_a106b_seamless_by_hand():
    # ASME B31.3 §304.1.2 eq. (3a) by hand: P = 50 bar g, D = 114.3 mm, S = 20.0 ksi
    # (A106 Gr B at 40 °C, B31.3 Table A-1, from memory), E = 1 (seamless), W = 1,
    # Y = 0.4 (Table 304.1.1), c = 1.5 mm, mill under-tolerance 12.5 % (ASTM A106, from memory)
    #   t  = 5e6 x 0.1143 / (2 (137.895e6 + 0.4 x 5e6))         = 2.0426 mm
    #   tm = t + c                                                = 3.5426 mm
    #   nominal needed = tm / 0.875                               = 4.0487 mm  (< 6.02: holds)
    #   wall for pressure = 6.02 x 0.875 - 1.5                    = 3.7675 mm
    #   P_allow = 2 x 137.895e6 x 3.7675e-3 / (0.1143 - 0.8 x 3.7675e-3) = 93.37 bar
    r = metal_pipe_rating(5e6, 0.1143, 0.00602, degC(40), "a106_b", corrosion_allowance=1.5e-3)
    assert isinstance(r, MetalRating)
    assert r.S == pytest.approx(20.0 * KSI, rel=1e-12)
    assert (r.E, r.W, r.Y) == (1.0, 1.0, 0.4)
    assert r.t_pressure == pytest.approx(2.0426e-3, rel=1e-4)
    assert r.t_min == pytest.approx(3.5426e-3, rel=1e-4)
    assert r.t_nominal_min == pytest.approx(4.0487e-3, rel=1e-4)
    assert r.P_allow == pytest.approx(93.37 * BAR, rel=1e-4)
    assert r.holds and r.margin == pytest.approx(r.P_allow - 5e6)
    assert r.special == ""


def test_b31_3_nps8_sch40_a53b_erw_by_hand():
    # ASME B31.3 §304.1.2 by hand: P = 40 bar g, D = 219.1 mm, S = 20.0 ksi (A53 Gr B,
    # Table A-1, from memory), E = 0.85 (ERW, Table 302.3.4, from memory), Y = 0.4, c = 0
    #   t = 4e6 x 0.2191 / (2 (0.85 x 137.895e6 + 1.6e6))       = 3.6882 mm
    #   nominal needed = 3.6882 / 0.875                          = 4.2151 mm
    #   P_allow = 2 x 0.85 x 137.895e6 x 7.1575e-3 / (0.2191 - 0.8 x 7.1575e-3) = 78.64 bar
    r = metal_pipe_rating(4e6, 0.2191, 0.00818, degC(20), "a53_b", joint="erw")
    assert r.E == 0.85
    assert r.t_pressure == pytest.approx(3.6882e-3, rel=1e-4)
    assert r.t_nominal_min == pytest.approx(4.2151e-3, rel=1e-4)
    assert r.P_allow == pytest.approx(78.64 * BAR, rel=1e-4)


def test_b31_3_formula_and_its_inverse_agree():
    # P(t(P)) = P: the two forms of §304.1.2 eq. (3a), algebra written here
    for P in (1e5, 20e5, 150e5):
        t = b31_3_thickness(P, 0.1683, 120e6, E=0.85, Y=0.4)
        assert b31_3_pressure(t, 0.1683, 120e6, E=0.85, Y=0.4) == pytest.approx(P, rel=1e-12)
        # independent: t (2 S E + 2 P Y) = P D
        assert t * (2 * 120e6 * 0.85 + 2 * P * 0.4) == pytest.approx(P * 0.1683, rel=1e-12)


def test_wall_too_thin_fails_and_user_stress_is_used():
    # NPS 4 Sch 40 at 150 bar g with S = 20 ksi, by hand: t = 1.7145e6 / 287.8e6 = 5.957 mm,
    # nominal needed 5.957 / 0.875 = 6.81 mm > 6.02 mm; with the user's S = 30 ksi,
    # t = 4.03 mm, nominal needed 4.60 mm: it holds
    r = metal_pipe_rating(150 * BAR, 0.1143, 0.00602, degC(20), "a106_b")
    assert r.t_nominal_min == pytest.approx(6.81e-3, rel=1e-3)
    assert not r.holds and r.margin < 0
    r2 = metal_pipe_rating(150 * BAR, 0.1143, 0.00602, degC(20), "a106_b", S=30 * KSI)
    assert r2.t_nominal_min == pytest.approx(4.60e-3, rel=2e-3)
    t = 150 * BAR * 0.1143 / (2 * (30 * KSI + 150 * BAR * 0.4))
    assert r2.t_pressure == pytest.approx(t, rel=1e-12) and r2.holds
    assert "user" in r2.basis and "user S" in r2.source


def test_thick_wall_uses_the_d_over_6_form_and_asks_for_special_consideration():
    # B31.3 Table 304.1.1 note: for t >= D/6, Y = (d + 2c)/(D + d + 2c); §304.1.2(b) then
    # requires special consideration (from memory)
    D, wall = 0.0603, 0.0111       # NPS 2 XXS (ASME B36.10M, from memory)
    r = metal_pipe_rating(600 * BAR, D, wall, degC(20), "a106_b", S=20 * KSI)
    d = D - 2 * wall
    assert r.Y == pytest.approx(d / (D + d), rel=1e-12)
    assert "t >= D/6" in r.special and "P/(S E) > 0.385" in r.special
    c = highest_pressure(1000.0, 0.0, 600 * BAR + 101325.0, 0.0)
    fs = rating_findings("XXS", c, r)
    assert [f.quantity for f in fs] == ["pipe pressure (gauge)", "B31.3 wall formula validity"]
    assert fs[1].severity is Severity.CHECK and "304.1.2(b)" in fs[1].rule


@pytest.mark.parametrize("grade, T, ksi", [
    ("a106_b", degC(-29), 20.0),      # B31.3 Table A-1, min temp to 100 °F (from memory)
    ("a106_b", degF(400), 20.0),      # from memory
    ("a106_b", degF(550), 18.1),      # linear between 18.9 and 17.3 ksi, by hand
    ("a312_tp304", degF(200), 16.7),  # from memory
    ("a312_tp316", degF(300), 15.6),  # from memory
])
def test_allowable_stress_table(grade, T, ksi):
    assert allowable_stress(grade, T) == pytest.approx(ksi * KSI, rel=1e-9)


@pytest.mark.parametrize("cls, T, Y", [
    ("ferritic", degC(400), 0.4),     # ASME B31.3 Table 304.1.1 (from memory)
    ("ferritic", degC(538), 0.7),
    ("ferritic", degC(510), 0.5),
    ("austenitic", degC(538), 0.4),
    ("austenitic", degC(593), 0.5),
    ("cast_iron", degC(20), 0.0),
])
def test_y_coefficient(cls, T, Y):
    assert y_coefficient(cls, T) == pytest.approx(Y, abs=1e-12)


# ---------------------------------------------------------------- plastic pipe

@pytest.mark.parametrize("sdr, compound, psi", [
    (21.0, "pvc_1120", 200.0),   # ASTM D2241 SDR 21 = PR 200 at 73 °F (from memory)
    (26.0, "pvc_1120", 160.0),   # ASTM D2241 SDR 26 = PR 160 (from memory)
    (17.0, "pvc_1120", 250.0),   # ASTM D2241 SDR 17 = PR 250 (from memory)
    (11.0, "pe4710", 200.0),     # PE4710 DR 11 = 200 psi at 73 °F (PPI, from memory)
    (17.0, "pe4710", 125.0),     # PE4710 DR 17 = 125 psi (PPI, from memory)
])
def test_iso_equation_gives_the_published_classes(sdr, compound, psi):
    assert sdr_pressure(sdr, COMPOUNDS[compound].HDS) == pytest.approx(psi * PSI, rel=1e-6)


def test_catalogue_pvc_pipe_rating_and_derating():
    # ASTM D2241 6 in SDR 21 (fluids' table): SDR = 168.275/8.0264 = 20.965; at 100 °F the
    # PVC derating factor is 0.62 (makers' table, from memory):
    #   P = 2 x 13.79 MPa x 0.62 / 19.965 = 8.565 bar
    p = catalogue_pipe("astm_d2241", "6", "SDR 21", "pvc")
    r = pipe_rating(p, 5 * BAR, degF(100))
    assert isinstance(r, PlasticRating)
    assert r.factor == pytest.approx(0.62, abs=1e-12)
    assert r.P_allow == pytest.approx(2 * 2000 * PSI * 0.62 / (p.Do / p.wall - 1), rel=1e-12)
    assert r.P_allow == pytest.approx(8.565 * BAR, rel=1e-3)
    assert r.basis.startswith("assumed compound pvc_1120")


def test_derating_is_one_below_73F_and_interpolates():
    # PVC derating table (from memory): 1.00 at 73 °F, 0.88 at 80 °F; linear between
    assert derating_factor("pvc_1120", degC(5)) == 1.0
    assert derating_factor("pvc_1120", degF(76.5)) == pytest.approx(0.94, abs=1e-9)
    user = ((290.0, 1.0), (320.0, 0.5))
    assert derating_factor("pvc_1120", 305.0, user) == pytest.approx(0.75, abs=1e-12)


def test_cpvc_on_f441_and_user_hds():
    p = catalogue_pipe("astm_f441", "2", "80", "pvc")
    r = pipe_rating(p, 10 * BAR, degF(140))
    # CPVC derating at 140 °F 0.50 (makers' table, from memory); HDS 2000 psi
    assert r.factor == pytest.approx(0.5) and "cpvc_4120" in r.basis
    r2 = plastic_pipe_rating(10 * BAR, p.Do, p.wall, degF(140), "cpvc_4120", HDS=1500 * PSI)
    assert r2.P_allow == pytest.approx(r.P_allow * 0.75, rel=1e-12)


# ---------------------------------------------------------------- flanges

@pytest.mark.parametrize("cls, T, bar", [
    ("150", degC(38), 19.6),    # ASME B16.5 Table 2-1.1, group 1.1 (from memory)
    ("300", degC(38), 51.1),    # from memory
    ("600", degC(38), 102.1),   # from memory
    ("150", degC(200), 13.8),   # from memory
    ("300", degC(400), 34.7),   # from memory
    ("150", degC(-29), 19.6),   # from memory
    ("150", degC(65), 18.75),   # linear between 19.2 (50 °C) and 17.7 (100 °C), by hand
])
def test_flange_ratings(cls, T, bar):
    assert flange_rating(cls, T) == pytest.approx(bar * BAR, rel=1e-9)


def test_flange_findings_and_user_table():
    c = highest_pressure(998.2, 180.0, 2e5, 0.0)        # 2 bar + 17.6 bar = 19.6 bar abs
    f = flange_findings("F-1", "150", c, degC(100))[0]
    assert f.severity is Severity.FAIL and f.high == pytest.approx(17.7 * BAR)
    table = {"PN16": ((253.15, 16 * BAR), (393.15, 16 * BAR))}
    f2 = flange_findings("F-1", "PN16", c, degC(20), table=table)[0]
    assert f2.severity is Severity.FAIL and f2.source == "user flange table"
    assert flange_findings("F-1", "300", c, degC(100))[0].severity is Severity.PASS


# ---------------------------------------------------------------- vacuum

def test_buckling_pressure_by_hand():
    # Timoshenko & Gere (1961) long tube: pc = 2E/(1-nu^2) (t/D)^3
    # HDPE DR 32.5, 24 in (F2619): t = 18.745 mm, Dm = 609.6 - 18.745 = 590.855 mm
    #   pc = 2 x 0.9e9 / 0.7975 x (0.031725)^3 = 72.07 kPa (by hand)
    pc = buckling_pressure(0.9e9, 0.45, 0.0187452, 0.6096 - 0.0187452)
    assert pc == pytest.approx(72.07e3, rel=2e-3)


def test_vacuum_screen_cases():
    # net external pressure = p_atm - p_min against pc / 2.5
    thin = catalogue_pipe("astm_f2619", "24", "DR 32.5", "hdpe")
    f = vacuum_findings("suction", thin, [("inlet", 60e3), ("crest", 10e3)])[0]
    assert f.severity is Severity.FAIL and "crest" in f.rule
    assert f.value == pytest.approx(101325.0 - 10e3)
    thick = catalogue_pipe("astm_f2619", "24", "DR 17", "hdpe")
    f2 = vacuum_findings("suction", thick, [("crest", 10e3)])[0]
    assert f2.severity is Severity.CHECK and "long-term modulus" in f2.rule
    # with the user's long-term modulus (PE4710 50-year ~ 0.2 GPa, from memory):
    # pc = 2 x 0.2e9/0.7975 x (35.865/573.735)^3 = 122.5 kPa; /2.5 = 49 kPa < 91 kPa -> FAIL
    f3 = vacuum_findings("suction", thick, [("crest", 10e3)], E=0.2e9)[0]
    assert f3.severity is Severity.FAIL and f3.high == pytest.approx(49.0e3, rel=5e-3)
    steel = catalogue_pipe("asme_b36_10m", "8", "40", "carbon_steel")
    assert vacuum_findings("s", steel, [("crest", 5e3)])[0].severity is Severity.PASS
    above = vacuum_findings("s", thin, [("a", 2e5)])[0]
    assert above.severity is Severity.PASS and above.value < 0


# ---------------------------------------------------------------- highest pressure

def test_highest_pressure_cases_by_hand():
    # hydrostatics p = p0 + rho g h (common practice, no source):
    #   shut-off: 1.5e5 + 998.2 g (60 + 2)            = 756,918 Pa abs
    #   standing: 101325 + 998.2 g x 70               = 786,563 Pa abs  (governs)
    c = highest_pressure(998.2, 60.0, 1.5e5, 2.0, standing_head=70.0)
    assert c.cases["pump at shut-off"] == pytest.approx(1.5e5 + 998.2 * G * 62.0, rel=1e-12)
    assert c.cases["pump at shut-off"] == pytest.approx(756918.0, abs=1.0)
    assert c.governing == "standing column, pump stopped"
    assert c.p_max == pytest.approx(101325.0 + 998.2 * G * 70.0, rel=1e-12)
    s = highest_pressure(998.2, 60.0, 1.5e5, 2.0, surge_rise=3e5, running_pressure=6e5)
    assert s.governing == "surge on running pressure" and s.p_max == 9e5
    s2 = highest_pressure(998.2, 60.0, 1.5e5, 2.0, surge_rise=3e5)
    assert s2.governing.startswith("surge on shut-off") and s2.p_max == pytest.approx(756918 + 3e5,
                                                                                        abs=1.0)
    assert s2.gauge() == pytest.approx(s2.p_max - 101325.0)
    # a named case of the caller's (relief valve set at 12 bar g, invented) governs
    r = highest_pressure(998.2, 0.0, 3e5, 5.0, other_cases={"relief set": 12e5 + 101325.0})
    assert r.governing == "relief set" and r.p_max == 12e5 + 101325.0
    assert r.cases["pump at shut-off"] == pytest.approx(3e5 + 998.2 * G * 5.0, rel=1e-12)


def test_rating_findings_severity_bands():
    r = metal_pipe_rating(10 * BAR, 0.1143, 0.00602, degC(20))
    ok = highest_pressure(1000.0, 50.0, 101325.0, 0.0)
    f = rating_findings("S1", ok, r)[0]
    assert f.severity is Severity.PASS and "pump at shut-off" in f.rule
    assert f.high == r.P_allow and "B31.3" in f.limit
    near = highest_pressure(1000.0, 0.0, r.P_allow * 0.95 + 101325.0, 0.0)
    assert rating_findings("S1", near, r)[0].severity is Severity.CHECK
    over = highest_pressure(1000.0, 0.0, r.P_allow * 1.01 + 101325.0, 0.0)
    assert rating_findings("S1", over, r)[0].severity is Severity.FAIL


# ---------------------------------------------------------------- materials

def test_material_table_and_pipe_mapping():
    # Young's moduli (from memory): steel ~200-210 GPa, PVC ~2.4-3.3 GPa, HDPE ~0.7-1.1 GPa
    assert 200e9 <= ELASTIC["carbon_steel"].E <= 212e9
    assert 2.4e9 <= ELASTIC["pvc"].E <= 3.3e9
    assert 0.7e9 <= ELASTIC["hdpe"].E <= 1.1e9
    for m in ELASTIC.values():
        assert 0 < m.nu < 0.5 and m.source
    p = catalogue_pipe("astm_d2241", "4", "SDR 21", "pvc")
    assert material_for_pipe(p) is ELASTIC["pvc"]
    assert elastic_material("grp").creeps and not elastic_material("copper").creeps


def test_pipe_rating_dispatch_and_refusals():
    p = catalogue_pipe("asme_b36_10m", "4", "40", "carbon_steel")
    r = pipe_rating(p, 20 * BAR, degC(40))
    assert isinstance(r, MetalRating) and r.basis.startswith("assumed grade a106_b")
    r304 = pipe_rating(catalogue_pipe("asme_b36_19m", "4", "10S", "stainless_steel"),
                       10 * BAR, degC(40))
    assert "a312_tp304" in r304.basis
    # without a joint the grade's lowest usual factor is assumed (B31.3 Table A-1B, from
    # memory): A53 may be ERW (0.85), A312 may be single-butt fusion welded (0.80)
    assert r304.E == 0.80 and "efw_single_butt, assumed" in r304.basis
    galv = pipe_rating(catalogue_pipe("asme_b36_10m", "2", "40", "galvanised_steel"),
                       10 * BAR, degC(20))
    assert galv.E == 0.85 and "assumed grade a53_b" in galv.basis
    assert pipe_rating(p, 20 * BAR, degC(40), joint="erw").E == 0.85
    assert r.E == 1.0
    with raises_exactly(InputError, r"'pipe material' has no rating method in the kit"):
        pipe_rating(custom_pipe(0.3, "concrete", Do=0.36), 5 * BAR, degC(20))
    with raises_exactly(InputError, r"'pipe wall thickness' is needed for a rating of custom"):
        pipe_rating(custom_pipe(0.1, "carbon_steel"), 5 * BAR, degC(20))
    with raises_exactly(InputError, r"'pipe elastic material' has no elastic constants"):
        material_for_pipe(custom_pipe(0.3, "concrete", Do=0.36))


# ---------------------------------------------------------------- bad inputs

BAD = [
    pytest.param(lambda: metal_pipe_rating(10e5, 0.1143, 0.0, 293.15), OutOfRangeError,
                 r"'pipe wall thickness' must be between 0 and 0.05715 m, not 0 m", id="zero wall"),
    pytest.param(lambda: ElasticMaterial("x", -2e11, 0.3, "s"), OutOfRangeError,
                 r"'elastic modulus' must be between 1e\+08 and 5e\+11 Pa, not -2e\+11 Pa",
                 id="negative modulus"),
    pytest.param(lambda: ElasticMaterial("x", 2e11, 0.5, "s"), OutOfRangeError,
                 r"'Poisson's ratio' must be between 0 and 0.5 -, not 0.5 -", id="nu 0.5"),
    pytest.param(lambda: metal_pipe_rating(10e5, 0.1143, 0.006, 293.15, "a999"),
                 UnknownChoiceError, r"'pipe grade' must be one of 'a106_b'", id="grade"),
    pytest.param(lambda: allowable_stress("a106_b", degC(400)), OutOfRangeError,
                 r"'design temperature \(ASTM A106 Grade B seamless carbon steel\)' must be "
                 r"between 244.15 and 588.706 K, not 673.15 K", id="hot steel"),
    pytest.param(lambda: metal_pipe_rating(10e5, 0.1143, 0.006, 293.15, joint="spiral"),
                 UnknownChoiceError, r"'longitudinal joint' must be one of 'seamless'",
                 id="joint"),
    pytest.param(lambda: metal_pipe_rating(10e5, 0.1143, 0.006, 293.15,
                                           corrosion_allowance=0.006),
                 OutOfRangeError, r"'corrosion allowance' must be between 0 and 0.006 m, "
                 r"not 0.006 m", id="allowance eats wall"),
    pytest.param(lambda: metal_pipe_rating(-1e5, 0.1143, 0.006, 293.15), OutOfRangeError,
                 r"'design pressure' must be greater than 0 Pa, not -100000 Pa", id="neg P"),
    pytest.param(lambda: metal_pipe_rating(10e5, 0.1143, 0.006, 293.15, mill_tolerance=0.5),
                 OutOfRangeError, r"'mill tolerance' must be between 0 and 0.5 -, not 0.5 -",
                 id="mill tol"),
    pytest.param(lambda: sdr_pressure(1.0, 13.79e6), OutOfRangeError,
                 r"'SDR' must be greater than 1 -, not 1 -", id="sdr 1"),
    pytest.param(lambda: derating_factor("pvc_1120", degC(70)), OutOfRangeError,
                 r"'service temperature \(PVC 1120 \(PVC 12454\)\)' must be between 273.15 and "
                 r"333.15 K, not 343.15 K", id="hot pvc"),
    pytest.param(lambda: derating_factor("pvc_1120", 300.0, ((300.0, 1.0),)), InputError,
                 r"'derating table' must have at least two", id="short table"),
    pytest.param(lambda: flange_rating("150", degC(600)), OutOfRangeError,
                 r"'design temperature \(class 150 flange\)' must be between 244.15 and 811.15 "
                 r"K, not 873.15 K", id="hot flange"),
    pytest.param(lambda: flange_rating("900", degC(20)), UnknownChoiceError,
                 r"'flange class' must be one of '150', '300', '600', not '900'", id="class"),
    pytest.param(lambda: buckling_pressure(2e11, 0.3, 0.0, 0.1), OutOfRangeError,
                 r"'pipe wall thickness' must be greater than 0 m, not 0 m", id="buckle wall"),
    pytest.param(lambda: vacuum_findings("s", catalogue_pipe("asme_b36_10m", "4", "40",
                                                             "carbon_steel"),
                                         [("a", 5e4)], safety_factor=0.5),
                 OutOfRangeError, r"'vacuum safety factor' must be at least 1 -, not 0.5 -",
                 id="safety factor"),
    pytest.param(lambda: highest_pressure(-1.0, 10.0, 1e5, 0.0), OutOfRangeError,
                 r"'density' must be greater than 0 kg/m³, not -1 kg/m³", id="neg rho"),
    pytest.param(lambda: highest_pressure(1000.0, 10.0, 1e5, 0.0,
                                          other_cases={"pump at shut-off": 2e5}),
                 InputError, r"'pressure case name' must be a new non-empty text \(taken: "
                 r"pump at shut-off\), not 'pump at shut-off'", id="case clash"),
    pytest.param(lambda: highest_pressure(1000.0, 10.0, 1e5, 0.0, surge_rise=-1.0),
                 OutOfRangeError, r"'surge rise' must be at least 0 Pa, not -1 Pa", id="surge"),
]


@pytest.mark.parametrize("call, cls, match", BAD)
def test_bad_inputs_refused(call, cls, match):
    with raises_exactly(cls, match):
        call()


def test_flange_table_is_monotone_in_temperature():
    # B16.5 ratings fall with temperature (a fact of the standard, from memory)
    for rows in FLANGE_RATINGS.values():
        ps = [p for _, p in rows]
        assert all(b <= a for a, b in zip(ps, ps[1:], strict=False))


# ---------------------------------------------------------------- documentation

def test_docstring_examples_run():
    result = doctest.testmod(rating_mod, optionflags=doctest.ELLIPSIS)
    assert result.attempted >= 20 and result.failed == 0


def test_documented_parameters_match_signatures():
    # docstring convention of fluids: Parameters match the signature, each with a [unit]
    # (common practice, no source)
    checked = 0
    for name in rating_mod.__all__:
        obj = getattr(rating_mod, name)
        if not callable(obj) or documented_params(obj) is None:
            continue
        assert not unit_missing(obj), f"{name}: {unit_missing(obj)} have no [unit]"
        assert documented_params(obj) == signature_params(obj), name
        checked += 1
    assert checked >= 14
