"""Drain-down against closed forms and independent quasi-steady integrations written here."""

from __future__ import annotations

import math
from types import SimpleNamespace as NS

import numpy as np
import pytest
from docsig import documented_params, signature_params
from raising import raises_exactly
from scipy.integrate import quad
from scipy.optimize import brentq

from kit.core.drain import (
    ORIFICE_CD,
    OrificeOutlet,
    PipedOutlet,
    Vent,
    drain,
    orifice_cd,
    piped_flow,
)
from kit.core.findings import CAUTIONS, Severity
from kit.core.line import Line, Segment
from kit.core.tank import horizontal_cylinder, sphere, strapping_table, vertical_cylinder
from kit.errors import InputError, OutOfRangeError, UnknownChoiceError

g = 9.80665                                              # standard gravity (CGPM 1901)
WATER = NS(T=293.15, rho=998.2, mu=1.002e-3, pv=2339.0)  # water at 20 °C (from memory)
OIL = NS(T=293.15, rho=900.0, mu=0.3, pv=None)           # invented heavy oil, 300 cP


def finding(result, quantity):
    hits = [f for f in result.findings if f.quantity == quantity]
    assert hits, [f.quantity for f in result.findings]
    return hits[0]


# ---------- orifice: closed forms and quadrature written here ---------------------------------

def torricelli_time(A_tank, Cd, a, h1, h2):
    """Torricelli (1643) drain time of a vertical prismatic tank, standard result."""
    return A_tank / (Cd * a) * math.sqrt(2 / g) * (math.sqrt(h1) - math.sqrt(h2))


@pytest.mark.parametrize("h1, h2", [(3.0, 0.0), (3.0, 1.2), (0.4, 0.1)])
def test_torricelli_vertical_cylinder(h1, h2):
    D, d, Cd = 1.8, 0.04, 0.61
    r = drain(vertical_cylinder(D, 3.0), OrificeOutlet(d, Cd), WATER, h1, h2)
    expected = torricelli_time(math.pi * D * D / 4, Cd, math.pi * d * d / 4, h1, h2)
    assert r.reached
    assert r.total_time == pytest.approx(expected, rel=1e-4)
    mid = 0.5 * (h1 + h2)
    t_mid = torricelli_time(math.pi * D * D / 4, Cd, math.pi * d * d / 4, h1, mid)
    assert r.time_to([mid])[mid] == pytest.approx(t_mid, rel=1e-4)
    assert np.all(np.diff(r.time) >= 0) and np.all(np.diff(r.level) < 0)
    # flow at the start is Cd a sqrt(2 g h1) (Torricelli)
    assert r.flow[0] == pytest.approx(Cd * math.pi * d * d / 4 * math.sqrt(2 * g * h1), rel=1e-12)


def test_padded_tank_drains_faster_by_the_pad_head():
    # closed form: Torricelli with the head raised by the pad, hp = (ps - pa)/(rho g)
    D, d, Cd, ps = 2.0, 0.05, 0.61, 101325.0 + 30e3
    hp = 30e3 / (WATER.rho * g)
    r = drain(vertical_cylinder(D, 3.0), OrificeOutlet(d, Cd), WATER, 2.5, 0.0, p_surface=ps)
    A, a = math.pi * D * D / 4, math.pi * d * d / 4
    expected = A / (Cd * a) * math.sqrt(2 / g) * (math.sqrt(2.5 + hp) - math.sqrt(hp))
    assert r.total_time == pytest.approx(expected, rel=1e-4)
    f = finding(r, "blanket gas make-up")
    assert f.severity is Severity.CHECK and f.value == pytest.approx(r.peak_flow)


def test_horizontal_cylinder_closed_form_and_quad():
    D, L, d, Cd = 2.0, 5.0, 0.05, 0.61
    a = math.pi * d * d / 4
    r = drain(horizontal_cylinder(D, L), OrificeOutlet(d, Cd), WATER, 1.9, 0.0)
    # A(h) = 2L sqrt(h(D-h)); t = ∫ A dh /(Cd a sqrt(2 g h)) = 4L/(3 Cd a sqrt(2g)) [(D-h2)^1.5 - (D-h1)^1.5]
    closed = 4 * L / (3 * Cd * a * math.sqrt(2 * g)) * (D**1.5 - (D - 1.9) ** 1.5)
    by_quad = quad(lambda h: 2 * L * math.sqrt(h * (D - h)) / (Cd * a * math.sqrt(2 * g * h)),
                   0.0, 1.9, epsrel=1e-12)[0]
    assert by_quad == pytest.approx(closed, rel=1e-9)
    assert r.total_time == pytest.approx(closed, rel=1e-4)
    assert r.time_error < 1e-4 * r.total_time


def test_horizontal_cylinder_side_outlet_quad():
    # orifice centre 0.3 m above the bottom; quad of A(h)/(Cd a sqrt(2 g (h - z)))
    D, L, d, Cd, z = 2.0, 5.0, 0.05, 0.97, 0.3
    a = math.pi * d * d / 4
    r = drain(horizontal_cylinder(D, L), OrificeOutlet(d, Cd, z), WATER, 1.7, 0.5)
    expected = quad(lambda h: 2 * L * math.sqrt(h * (D - h)) / (Cd * a * math.sqrt(2 * g * (h - z))),
                    0.5, 1.7, epsrel=1e-12)[0]
    assert r.total_time == pytest.approx(expected, rel=1e-4)


def test_sphere_quad():
    D, d, Cd = 3.0, 0.06, 0.61
    R, a = D / 2, math.pi * d * d / 4
    r = drain(sphere(D), OrificeOutlet(d, Cd), WATER, 2.9, 0.0)
    # A(h) = pi (2 R h - h^2) (standard geometry); quad written here
    expected = quad(lambda h: math.pi * (2 * R * h - h * h) / (Cd * a * math.sqrt(2 * g * h)),
                    0.0, 2.9, epsrel=1e-12)[0]
    assert r.total_time == pytest.approx(expected, rel=1e-4)


def test_strapping_table_tank_drains_like_its_cylinder():
    cyl = vertical_cylinder(2.0, 3.0)
    hs = np.linspace(0.0, 3.0, 11)
    tab = strapping_table(hs, cyl.volume(hs))
    out = OrificeOutlet(0.05, 0.61)
    r1, r2 = drain(cyl, out, WATER, 2.8, 0.1), drain(tab, out, WATER, 2.8, 0.1)
    assert r2.total_time == pytest.approx(r1.total_time, rel=1e-9)
    hcyl = horizontal_cylinder(2.0, 4.0)
    hs = np.linspace(0.0, 2.0, 401)
    htab = strapping_table(hs, hcyl.volume(hs))
    r3, r4 = drain(hcyl, out, WATER, 1.8, 0.2), drain(htab, out, WATER, 1.8, 0.2)
    assert r4.total_time == pytest.approx(r3.total_time, rel=1e-4)


# ---------- stops above the target --------------------------------------------------------

def test_outlet_above_target_stops_at_outlet():
    D, d, Cd, z = 2.0, 0.05, 0.61, 0.5
    r = drain(vertical_cylinder(D, 3.0), OrificeOutlet(d, Cd, z), WATER, 3.0, 0.2)
    assert not r.reached and r.stop_level == pytest.approx(z)
    f = finding(r, "level reached")
    assert f.severity is Severity.FAIL
    assert "does not reach target: stops at 0.5 m because the level reaches the orifice centre" in f.rule
    # time to the outlet: Torricelli on the head above the orifice (standard result)
    A, a = math.pi * D * D / 4, math.pi * d * d / 4
    assert r.total_time == pytest.approx(torricelli_time(A, Cd, a, 3.0 - z, 0.0), rel=1e-4)
    assert r.time_to([0.3]) == {0.3: math.inf}
    assert r.flow[-1] == 0.0


def test_vacuum_over_surface_stops_flow():
    # surface 2 m of water below atmospheric: flow stops 2 m above the bottom orifice
    hv = 2.0
    ps = 101325.0 - hv * WATER.rho * g
    r = drain(vertical_cylinder(2.0, 4.0), OrificeOutlet(0.05, 0.61), WATER, 3.5, 0.5, p_surface=ps)
    assert not r.reached and r.stop_level == pytest.approx(hv, rel=1e-12)
    assert "surface vacuum" in finding(r, "level reached").rule
    assert finding(r, "surface gauge pressure").severity is Severity.CHECK
    assert CAUTIONS["vacuum"] in r.cautions
    A, a = math.pi, math.pi * 0.05**2 / 4
    assert r.total_time == pytest.approx(torricelli_time(A, 0.61, a, 3.5 - hv, 0.0), rel=1e-4)
    # vacuum deeper than the start level: no outflow at all
    r0 = drain(vertical_cylinder(2.0, 4.0), OrificeOutlet(0.05, 0.61), WATER, 1.5, 0.5, p_surface=ps)
    assert r0.total_time == 0.0 and len(r0.time) == 1
    assert "no outflow at the start level 1.5 m" in finding(r0, "level reached").rule


# ---------- vortex and vent checks --------------------------------------------------------

def test_vortex_check_at_low_submergence():
    d, Cd = 0.1, 0.61
    r = drain(vertical_cylinder(2.0, 3.0), OrificeOutlet(d, Cd), WATER, 3.0, 0.0)
    f = finding(r, "level where vortexing may begin")
    assert f.severity is Severity.CHECK
    # ANSI/HI 9.8 (from memory): S = d(1 + 2.3 V/sqrt(g d)), V = Cd sqrt(2 g S) — solved here
    S = brentq(lambda s: s - d * (1 + 2.3 * Cd * math.sqrt(2 * g * s) / math.sqrt(g * d)), 1e-6, 3.0)
    assert f.value == pytest.approx(S, abs=1e-4)
    high = drain(vertical_cylinder(2.0, 3.0), OrificeOutlet(d, Cd), WATER, 3.0, 1.5)
    assert finding(high, "submergence at the end").severity is Severity.PASS


@pytest.mark.parametrize("vent_d, severity", [(0.02, Severity.FAIL), (0.2, Severity.PASS)])
def test_vent_pressure_drop(vent_d, severity):
    r = drain(vertical_cylinder(2.0, 3.0), OrificeOutlet(0.08, 0.61), WATER, 3.0, 0.0,
              vent=Vent(vent_d, 0.61))
    f = finding(r, "vent pressure drop at peak drain rate")
    Q = 0.61 * math.pi * 0.08**2 / 4 * math.sqrt(2 * g * 3.0)       # peak: Torricelli at start
    rho_air = 101325.0 * 0.0289647 / (8.314462618 * 293.15)         # ideal gas, dry air
    dP = rho_air / 2 * (Q / (0.61 * math.pi * vent_d**2 / 4)) ** 2  # orifice equation
    assert f.value == pytest.approx(dP, rel=1e-9)
    assert f.severity is severity
    assert CAUTIONS["drain"] in f.rule
    assert CAUTIONS["drain"] in r.cautions


def test_no_vent_given_is_a_check():
    r = drain(vertical_cylinder(2.0, 3.0), OrificeOutlet(0.05), WATER, 3.0, 0.0)
    assert finding(r, "vent pressure drop").severity is Severity.CHECK


# ---------- piped outlet against an independent integration written here -------------------

def bare_pipe(Di, eps=4.5e-5):
    return NS(Di=Di, area=math.pi / 4 * Di**2, roughness=eps)


def colebrook(Re, eD):
    """Colebrook (1939) by fixed-point iteration from Swamee–Jain (1976) — written here."""
    f = 0.25 / math.log10(eD / 3.7 + 5.74 / Re**0.9) ** 2
    for _ in range(30):
        f = (-2 * math.log10(eD / 3.7 + 2.51 / (Re * math.sqrt(f)))) ** -2
    return f


def hand_flow(dH, Di, Lp, eps, rho, mu, K=0.0, free=True):
    """Flow by Darcy–Weisbach: (f L/D + K [+ 1 for a free jet]) V²/2g = ΔH, brentq on Q."""
    A = math.pi / 4 * Di**2
    if dH <= 0:
        return 0.0

    def F(Q):
        V = Q / A
        Re = rho * V * Di / mu
        f = 64 / Re if Re < 2000 else colebrook(Re, eps / Di)
        return (f * Lp / Di + K + (1.0 if free else 0.0)) * V * V / (2 * g) - dH

    Q = brentq(F, 1e-12, A * math.sqrt(2 * g * dH) * 50, xtol=1e-15, rtol=1e-13)
    Re = rho * Q / A * Di / mu
    assert Re < 2000 or Re > 4000, Re              # keep the reference out of the transition
    return Q


def rk4_drain_time(area, Q_of_h, h1, h2, n=600):
    """Explicit RK4 in time on dh/dt = -Q(h)/A(h), crossing found by linear interpolation."""
    t_est = area(h1) * (h1 - h2) / Q_of_h(h1) * 2.5
    dt = t_est / n
    t, h = 0.0, h1

    def rate(x):
        return -Q_of_h(x) / area(x)

    while True:
        k1 = rate(h)
        k2 = rate(h + 0.5 * dt * k1)
        k3 = rate(h + 0.5 * dt * k2)
        k4 = rate(h + dt * k3)
        h_new = h + dt / 6 * (k1 + 2 * k2 + 2 * k3 + k4)
        if h_new <= h2:
            return t + dt * (h - h2) / (h - h_new)
        t, h = t + dt, h_new


def test_piped_turbulent_free_jet_against_rk4():
    # tank bottom outlet, 52.5 mm bore, 20 m falling 2 m to a free jet at -2 m
    Di, Lp, eps = 0.0525, 20.0, 4.5e-5
    line = Line("drop", (Segment("run", bare_pipe(Di, eps), Lp, rise=-2.0),))
    out = PipedOutlet(line, discharge_elevation=-2.0)
    D = 2.0
    r = drain(vertical_cylinder(D, 3.0), out, WATER, 3.0, 0.3)
    ref = rk4_drain_time(lambda h: math.pi * D * D / 4,
                         lambda h: hand_flow(h + 2.0, Di, Lp, eps, WATER.rho, WATER.mu), 3.0, 0.3)
    assert r.total_time == pytest.approx(ref, rel=1e-4)
    assert r.flow[0] == pytest.approx(hand_flow(5.0, Di, Lp, eps, WATER.rho, WATER.mu), rel=1e-9)
    assert r.velocity[0] == pytest.approx(r.flow[0] / (math.pi / 4 * Di**2))
    assert r.Re[-1] == pytest.approx(WATER.rho * r.velocity[-1] * Di / WATER.mu)
    assert finding(r, "lowest Reynolds number in the line").severity is Severity.PASS


def test_piped_laminar_against_rk4_and_finding():
    Di, Lp = 0.025, 10.0
    line = Line("oil", (Segment("run", bare_pipe(Di), Lp, rise=-1.0),))
    out = PipedOutlet(line, discharge_elevation=-1.0)
    D = 1.0
    r = drain(vertical_cylinder(D, 3.0), out, OIL, 3.0, 0.5)
    ref = rk4_drain_time(lambda h: math.pi * D * D / 4,
                         lambda h: hand_flow(h + 1.0, Di, Lp, 4.5e-5, OIL.rho, OIL.mu), 3.0, 0.5)
    assert r.total_time == pytest.approx(ref, rel=1e-4)
    assert r.Re.max() < 2000
    f = finding(r, "lowest Reynolds number in the line")
    assert f.severity is Severity.CHECK and "laminar" in f.rule
    # no vapour-pressure model for this oil: the line check says it was not made
    assert finding(r, "lowest pressure in the line").severity is Severity.CHECK


def test_piped_horizontal_tank_against_rk4():
    Di, Lp, eps = 0.08, 30.0, 4.5e-5
    line = Line("drop", (Segment("a", bare_pipe(Di, eps), 10.0, rise=-1.0),
                         Segment("b", bare_pipe(Di, eps), 20.0, rise=0.0)))
    out = PipedOutlet(line, discharge_elevation=-1.0)
    D, L = 2.5, 6.0
    r = drain(horizontal_cylinder(D, L), out, WATER, 2.3, 0.25)
    ref = rk4_drain_time(lambda h: 2 * L * math.sqrt(h * (D - h)),
                         lambda h: hand_flow(h + 1.0, Di, Lp, eps, WATER.rho, WATER.mu), 2.3, 0.25,
                         n=3000)
    assert r.total_time == pytest.approx(ref, rel=1e-4)


def test_piped_with_real_pipe_and_liquid():
    # the project's Pipe and LiquidState, against the same hand calculation
    from kit.core.liquids import make_liquid
    from kit.core.pipes import custom_pipe

    water = make_liquid("water").state(293.15)
    pipe = custom_pipe(0.0525, "carbon_steel", roughness=4.5e-5)
    line = Line("drop", (Segment("run", pipe, 20.0, rise=-2.0),))
    r = drain(vertical_cylinder(2.0, 3.0), PipedOutlet(line, -2.0), water, 3.0, 0.3)
    ref = rk4_drain_time(lambda h: math.pi,
                         lambda h: hand_flow(h + 2.0, 0.0525, 20.0, 4.5e-5, water.rho, water.mu),
                         3.0, 0.3)
    assert r.total_time == pytest.approx(ref, rel=1e-4)


def test_submerged_receiver_equalises():
    Di, Lp = 0.05, 15.0
    line = Line("transfer", (Segment("run", bare_pipe(Di), Lp, rise=-0.5),))
    out = PipedOutlet(line, discharge_elevation=-0.5, receiver_level=1.0)
    r = drain(vertical_cylinder(2.0, 3.0), out, WATER, 3.0, 0.5)
    assert not r.reached and r.stop_level == pytest.approx(1.0)
    assert "equalises with the receiver level at 1 m" in finding(r, "level reached").rule
    # above the receiver level: same as the hand integration with no exit velocity head
    r2 = drain(vertical_cylinder(2.0, 3.0), out, WATER, 3.0, 1.5)
    ref = rk4_drain_time(lambda h: math.pi,
                         lambda h: hand_flow(h - 1.0, Di, Lp, 4.5e-5, WATER.rho, WATER.mu,
                                             free=False), 3.0, 1.5)
    assert r2.reached and r2.total_time == pytest.approx(ref, rel=1e-4)


@pytest.mark.parametrize("crest, severity, quantity", [
    (4.0, Severity.CHECK, "gauge pressure"),
], ids=["crest below atmospheric"])
def test_siphon_leg_lowest_pressure(crest, severity, quantity):
    # inlet at the bottom, up `crest` m, then down to a free jet 6 m below the bottom
    Di, eps = 0.05, 4.5e-5
    up = 15.0
    line = Line("siphon", (Segment("up", bare_pipe(Di, eps), up, rise=crest, end_station="crest"),
                           Segment("down", bare_pipe(Di, eps), 25.0, rise=-(crest + 6.0))))
    out = PipedOutlet(line, discharge_elevation=-6.0)
    r = drain(vertical_cylinder(2.0, 3.0), out, WATER, 3.0, 0.5)
    assert r.lowest_station == "crest"

    # independent: Bernoulli inlet to crest at the end level (lowest flow, lowest crest pressure)
    def crest_p(h):
        Q = hand_flow(h + 6.0, Di, 40.0, eps, WATER.rho, WATER.mu)
        V = Q / (math.pi / 4 * Di**2)
        f = colebrook(WATER.rho * V * Di / WATER.mu, eps / Di)
        return (101325.0 + WATER.rho * g * (h - crest) - 0.5 * WATER.rho * V * V
                - WATER.rho * g * f * up / Di * V * V / (2 * g))

    expected = min(crest_p(3.0), crest_p(0.5))
    assert r.lowest_pressure == pytest.approx(expected, rel=1e-6)
    assert any(f.severity is severity and f.quantity == quantity for f in r.findings)
    assert CAUTIONS["vacuum"] in r.cautions


def test_piped_flow_vectorised_matches_scalar_solves():
    Di = 0.04
    line = Line("l", (Segment("run", bare_pipe(Di), 12.0, rise=-1.0),))
    out = PipedOutlet(line, -1.0)
    dH = np.array([0.0, 1e-6, 0.01, 0.5, 3.0, 8.0])
    Q = piped_flow(out, dH, WATER)
    assert Q[0] == 0.0
    for h, q in zip(dH[2:], Q[2:], strict=True):   # turbulent points only (reference skips transition)
        assert q == pytest.approx(hand_flow(h, Di, 12.0, 4.5e-5, WATER.rho, WATER.mu), rel=1e-9)


# ---------- discharge coefficients and refusals ------------------------------------------

def test_discharge_coefficient_registry():
    assert orifice_cd("sharp") == pytest.approx(0.61, abs=0.01)  # sharp-edged 0.60–0.62 (from memory)
    # rounded outlet r/d = 0.15 running full: Cd = 1/sqrt(1 + K). Basis checked against the
    # published entrance K at r/d = 0.15: Idel'chik K ≈ 0.067 (Hamilton's data; from memory)
    # gives 0.97; Rennels & Hudson (2012) K = 0.0696(1 − 0.569 r/d)λ² + (λ − 1)²,
    # λ = 1 + 0.622(1 − 0.30√(r/d) − 0.70 r/d)⁴, gives the conservative end 0.93
    rd = 0.15
    lam = 1 + 0.622 * (1 - 0.30 * math.sqrt(rd) - 0.70 * rd) ** 4
    K_rennels = 0.0696 * (1 - 0.569 * rd) * lam**2 + (lam - 1) ** 2
    assert orifice_cd("rounded") == pytest.approx(1 / math.sqrt(1 + 0.067), abs=0.005)
    import fluids.fittings as ff  # the same basis as coded in fluids (Idel'chik's table)

    K_idelchik = ff.entrance_rounded(Di=1.0, rc=rd, method="Idelchik")
    assert orifice_cd("rounded") == round(1 / math.sqrt(1 + K_idelchik), 2)
    assert 1 / math.sqrt(1 + K_rennels) < orifice_cd("rounded") <= 0.98
    assert "r/d = 0.15" in ORIFICE_CD["rounded"].source
    assert orifice_cd("borda") == 0.5                             # Borda mouthpiece, momentum balance
    assert all(e.source for e in ORIFICE_CD.values())
    with raises_exactly(UnknownChoiceError, r"'orifice kind' must be one of 'sharp', 'rounded'"):
        orifice_cd("square")


def test_bad_inputs():
    t = vertical_cylinder(2.0, 3.0)
    out = OrificeOutlet(0.05)
    with raises_exactly(OutOfRangeError, r"'target level' must be between 0 and 2 m, not 2\.5 m"):
        drain(t, out, WATER, 2.0, 2.5)
    with raises_exactly(OutOfRangeError, r"'target level' must be between 0 and 2 m, not 2 m"):
        drain(t, out, WATER, 2.0, 2.0)
    with raises_exactly(OutOfRangeError, r"'start level in 'tank'' must be between 0 and 3 m, not 3\.2 m"):
        drain(t, out, WATER, 3.2, 1.0)
    with raises_exactly(OutOfRangeError, r"'orifice diameter' must be between 0 and 10 m, not 0 m"):
        OrificeOutlet(0.0)
    with raises_exactly(OutOfRangeError, r"'discharge coefficient Cd' must be between 0 and 1 -, not -0\.6"):
        OrificeOutlet(0.05, -0.6)
    with raises_exactly(OutOfRangeError, r"'discharge coefficient Cd' must be between 0 and 1 -, not 1\.2"):
        OrificeOutlet(0.05, 1.2)
    with raises_exactly(OutOfRangeError, r"'orifice elevation offset' must be between 0 and 3 m, not 4 m"):
        drain(t, OrificeOutlet(0.05, 0.61, 4.0), WATER, 3.0, 1.0)
    with raises_exactly(OutOfRangeError, r"'vent diameter' must be between 0 and 10 m, not -0\.1 m"):
        Vent(-0.1)
    with raises_exactly(InputError, r"'outlet' must be an OrificeOutlet or a PipedOutlet"):
        drain(t, "orifice", WATER, 2.0, 1.0)
    line = Line("l", (Segment("run", bare_pipe(0.05), 10.0, rise=-1.0),))
    with raises_exactly(OutOfRangeError, r"'receiver level' must be between -1 and 10000 m, not -2 m"):
        PipedOutlet(line, -1.0, receiver_level=-2.0)
    with raises_exactly(InputError, r"'outlet line' must have 'head_loss'"):
        PipedOutlet(object(), -1.0)
    # the inlet must lie between the tank bottom and the start level (2 m here)
    with raises_exactly(OutOfRangeError, r"'outlet line inlet elevation \(discharge elevation − line "
                                         r"rise\)' must be between 0 and 2 m, not -1 m"):
        drain(t, PipedOutlet(line, -2.0), WATER, 2.0, 1.0)


def test_time_to_outside_history_is_refused():
    r = drain(vertical_cylinder(2.0, 3.0), OrificeOutlet(0.05), WATER, 2.0, 1.0)
    with raises_exactly(OutOfRangeError, r"'level for time_to' must be between 1 and 2 m, not 2\.5 m"):
        r.time_to([2.5])
    with raises_exactly(OutOfRangeError, r"'level for time_to' must be between 1 and 2 m, not 0\.5 m"):
        r.time_to(0.5)


def test_duck_typed_line_without_profile():
    # any object with head_loss(Q, state), exit_area and rise will do; written here by hand
    Di, Lp = 0.05, 10.0

    class HandLine:
        exit_area = math.pi / 4 * Di**2
        rise = -1.0
        name = "hand"

        def head_loss(self, Q, state):
            return np.array([0.0 if q == 0 else
                             hand_flow_loss(q, Di, Lp, state.rho, state.mu) for q in np.ravel(Q)]
                            ).reshape(np.shape(Q))

    r = drain(vertical_cylinder(2.0, 3.0), PipedOutlet(HandLine(), -1.0), WATER, 3.0, 1.0)
    ref = rk4_drain_time(lambda h: math.pi,
                         lambda h: hand_flow(h + 1.0, Di, Lp, 4.5e-5, WATER.rho, WATER.mu), 3.0, 1.0)
    assert r.total_time == pytest.approx(ref, rel=1e-4)
    f = finding(r, "lowest pressure in the line")
    assert f.severity is Severity.CHECK and "no pressure profile" in f.rule


def hand_flow_loss(Q, Di, Lp, rho, mu, eps=4.5e-5):
    """Darcy–Weisbach friction head (f L/D) V²/2g, Colebrook by iteration (written here)."""
    V = Q / (math.pi / 4 * Di**2)
    Re = rho * V * Di / mu
    f = 64 / Re if Re < 2000 else colebrook(Re, eps / Di)
    return f * Lp / Di * V * V / (2 * g)


def test_flammable_liquid_adds_its_caution():
    fuel = NS(T=293.15, rho=750.0, mu=5e-4, pv=3e4, flammable=True)   # invented light fuel
    r = drain(vertical_cylinder(2.0, 3.0), OrificeOutlet(0.05), fuel, 2.0, 0.0)
    assert CAUTIONS["flammable"] in r.cautions and CAUTIONS["general"] == r.cautions[0]


@pytest.mark.parametrize("func", [drain, piped_flow, OrificeOutlet, PipedOutlet, Vent],
                         ids=lambda f: f.__name__)
def test_documented_parameters_match_signature(func):
    documented = documented_params(func) or []
    for name in signature_params(func, skip=("self", "name")):
        assert name in documented, name


def test_core_modules_do_not_load_pint_or_widgets():
    import subprocess
    import sys

    code = ("import sys, kit.core.tank, kit.core.drain; "
            "print(any(m in sys.modules for m in ('pint', 'ipywidgets', 'plotly', 'CoolProp')))")
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True)
    assert out.stdout.strip() == "False"
