"""Drain-down limits: siphons held at vapour pressure, broken siphons, asymptotic laminar
stops, impossible geometry, free jets with an exit row, vent air at the air's temperature.

Invented scenarios (our own numbers, no outside problem):

- "Brackenfold dump": a 3 m vertical tank emptied by a siphon over a 8 m wall into a pit
  6 m below the tank bottom (the siphon limit engages part way down);
- "Brackenfold high wall": the same with a 12 m crest (the siphon breaks);
- "Tarn Lane resin": a viscous resin transferred to a receiver by a laminar line (the stop
  level is approached asymptotically).
"""

from __future__ import annotations

import math
from types import SimpleNamespace as NS

import numpy as np
import pytest
from raising import raises_exactly
from scipy.integrate import quad
from scipy.optimize import brentq

from kit.core.drain import (
    ASYMPTOTE_RULE,
    SIPHON_MODEL,
    T_AIR_DEFAULT,
    OrificeOutlet,
    PipedOutlet,
    Vent,
    drain,
    station_pressures,
)
from kit.core.findings import Severity
from kit.core.fittings import Fitting
from kit.core.line import Line, Segment
from kit.core.tank import vertical_cylinder
from kit.errors import InputError, OutOfRangeError

g = 9.80665                                              # standard gravity (CGPM 1901)
P_ATM = 101325.0                                         # ISO 2533 standard atmosphere
WATER = NS(T=293.15, rho=998.2, mu=1.002e-3, pv=2339.0)  # water at 20 °C (from memory)
RESIN = NS(T=293.15, rho=900.0, mu=0.5, pv=None)         # invented resin, 500 cP
EPS = 4.5e-5                                             # commercial steel (from memory)


def bare_pipe(Di, eps=EPS):
    return NS(Di=Di, area=math.pi / 4 * Di**2, roughness=eps)


def colebrook(Re, eD):
    """Colebrook (1939) by fixed-point iteration from Swamee–Jain (1976) — written here."""
    f = 0.25 / math.log10(eD / 3.7 + 5.74 / Re**0.9) ** 2
    for _ in range(40):
        f = (-2 * math.log10(eD / 3.7 + 2.51 / (Re * math.sqrt(f)))) ** -2
    return f


def fric(Q, Di, rho, mu):
    Re = rho * Q / (math.pi / 4 * Di**2) * Di / mu
    return 64 / Re if Re < 2000 else colebrook(Re, EPS / Di)


def finding(result, quantity):
    hits = [f for f in result.findings if f.quantity == quantity]
    assert hits, [f.quantity for f in result.findings]
    return hits[0]


# ---------- fixture: Brackenfold dump, a siphon over a wall -----------------------------

DI = 0.08
UP, DOWN = 9.0, 14.0        # developed lengths of the up and down legs [m]
OUTFALL = -6.0              # free jet 6 m below the tank bottom [m]
TANK_D = 3.0


def wall_siphon(crest, up=UP, down=DOWN):
    line = Line("dump", (Segment("up", bare_pipe(DI), up, rise=crest, end_station="wall crest"),
                         Segment("down", bare_pipe(DI), down, rise=OUTFALL - crest,
                                 end_station="outfall")))
    return PipedOutlet(line, discharge_elevation=OUTFALL)


def hand_siphon_flow(h, crest, st=WATER, up=UP, down=DOWN):
    """Full-pipe flow, the flow that holds the crest at vapour pressure, and the smaller.

    Full pipe, free jet: (f (UP + DOWN)/D + 1) V²/2g = h − OUTFALL (Darcy–Weisbach).
    Crest: p_atm + ρg(h − crest) − ρV²/2 − ρ f (UP/D) V²/2 = p_v (Bernoulli, tank → crest).
    Each solved by brentq on Q, written here.
    """
    A = math.pi / 4 * DI**2

    def full(Q):
        V = Q / A
        return (fric(Q, DI, st.rho, st.mu) * (up + down) / DI + 1.0) * V * V / (2 * g) - (h - OUTFALL)

    def crest_p(Q):
        V = Q / A
        return (P_ATM + st.rho * g * (h - crest) - 0.5 * st.rho * V * V
                - st.rho * fric(Q, DI, st.rho, st.mu) * up / DI * V * V / 2)

    Qf = brentq(full, 1e-9, 1.0, xtol=1e-15, rtol=1e-14)
    if crest_p(Qf) >= st.pv:
        return Qf, False
    if crest_p(1e-12) < st.pv:
        return 0.0, True
    return brentq(lambda q: crest_p(q) - st.pv, 1e-12, Qf, xtol=1e-15, rtol=1e-14), True


def test_siphon_over_a_wall_is_held_at_vapour_pressure_hand_integration():
    crest, h1, h2 = 8.0, 4.0, 0.3
    r = drain(vertical_cylinder(TANK_D, 4.5), wall_siphon(crest), WATER, h1, h2)
    # the level where the limit begins: full-pipe crest pressure = p_v (brentq on level, here)
    onset = brentq(lambda h: (hand_siphon_flow(h, crest)[1] - 0.5), h2, h1, xtol=1e-9)
    assert r.siphon_limited and not r.siphon_broken and r.reached
    assert r.siphon_limit_level == pytest.approx(onset, abs=1e-6)
    # time: t = ∫ A / Q(h) dh with Q the smaller of the two flows (quad, written here)
    A = math.pi * TANK_D**2 / 4
    t_ref = (quad(lambda h: A / hand_siphon_flow(h, crest)[0], onset, h1, epsabs=0, epsrel=1e-11)[0]
             + quad(lambda h: A / hand_siphon_flow(h, crest)[0], h2, onset, epsabs=0,
                    epsrel=1e-11)[0])
    assert r.total_time == pytest.approx(t_ref, rel=2e-5)
    # the flow at the end is the vapour-limited one, and the crest sits at vapour pressure
    assert r.flow[-1] == pytest.approx(hand_siphon_flow(h2, crest)[0], rel=1e-8)
    assert r.lowest_pressure == pytest.approx(WATER.pv, rel=1e-6)
    # the summary words and the findings say so; no PASS beside the limit
    assert "siphon" in r.time_note and f"{onset:.4g}" in r.time_note
    assert finding(r, "level reached").severity is Severity.CHECK
    assert finding(r, "siphon limit at vapour pressure").severity is Severity.FAIL
    assert finding(r, "pressure above vapour pressure").severity is Severity.FAIL
    assert "column" in SIPHON_MODEL["why"]
    # never an absolute pressure below zero (nor below vapour pressure) along the history
    p = station_pressures(r_outlet := wall_siphon(crest), WATER, r.level, r.flow, P_ATM)
    assert p.min() >= WATER.pv * (1 - 1e-9)
    assert r_outlet.free


def test_siphon_over_a_high_wall_breaks_at_the_column_height():
    crest, up, down = 12.0, 13.0, 19.0
    r = drain(vertical_cylinder(TANK_D, 4.5), wall_siphon(crest, up, down), WATER, 4.0, 0.3)
    # break level: p_atm + ρg(h − crest) = p_v at zero flow (hydrostatics, by hand)
    h_break = crest - (P_ATM - WATER.pv) / (WATER.rho * g)
    assert r.siphon_broken and not r.reached
    assert r.stop_level == pytest.approx(h_break, rel=1e-12)
    f = finding(r, "level reached")
    assert f.severity is Severity.FAIL and "siphon breaks" in f.rule
    assert "siphon breaks" in r.time_note
    assert r.lowest_pressure >= WATER.pv * (1 - 1e-9)      # never below vapour pressure
    # the limited flow matches the hand solution part way down
    i = len(r.level) // 3
    assert r.flow[i] == pytest.approx(hand_siphon_flow(r.level[i], crest, up=up, down=down)[0],
                                      rel=1e-8)


def test_crest_margin_holds_the_crest_higher():
    crest = 8.0
    out = wall_siphon(crest)
    r0 = drain(vertical_cylinder(TANK_D, 4.5), out, WATER, 4.0, 0.3)
    r2 = drain(vertical_cylinder(TANK_D, 4.5), out, WATER, 4.0, 0.3, crest_margin=2.0)
    assert r2.total_time > r0.total_time
    assert r2.lowest_pressure == pytest.approx(WATER.pv + 2.0 * WATER.rho * g, rel=1e-6)


# ---------- fixture: Tarn Lane resin, laminar to a receiver --------------------------------

def test_laminar_approach_to_the_receiver_level_is_asymptotic():
    D_t, Di, Lp, z_r = 1.5, 0.05, 30.0, 1.0
    line = Line("resin", (Segment("run", bare_pipe(Di), Lp, rise=-0.5),))
    out = PipedOutlet(line, discharge_elevation=-0.5, receiver_level=z_r)
    h1 = 3.0
    r = drain(vertical_cylinder(D_t, 3.5), out, RESIN, h1, 0.5)
    assert not r.reached and r.asymptotic and r.stop_level == pytest.approx(z_r)
    delta = max(ASYMPTOTE_RULE["offset_m"], ASYMPTOTE_RULE["offset_fraction"] * (h1 - z_r))
    assert r.end_offset == pytest.approx(delta) and r.level[-1] == pytest.approx(z_r + delta)
    # Hagen–Poiseuille: Q = ρ g ΔH π D⁴ / (128 μ L); A dh/dt = −k (h − z_r)
    # ⇒ t = A/k · ln((h1 − z_r)/δ)  (closed form, written here)
    k = RESIN.rho * g * math.pi * Di**4 / (128 * RESIN.mu * Lp)
    t_ref = math.pi * D_t**2 / 4 / k * math.log((h1 - z_r) / delta)
    assert r.total_time == pytest.approx(t_ref, rel=2e-4)
    assert r.flow[-1] > 0.0
    f = finding(r, "level reached")
    assert f.severity is Severity.FAIL and "asymptotic" in f.rule and "mm short" in f.rule
    assert "asymptotic" in r.time_note
    assert r.time_to([z_r + 0.5 * delta]) == {z_r + 0.5 * delta: math.inf}


def test_turbulent_stop_is_finite_not_asymptotic():
    # orifice at 0.5 m: Q ∝ sqrt(Δh), finite time (Torricelli), no offset
    r = drain(vertical_cylinder(2.0, 3.0), OrificeOutlet(0.05, 0.61, 0.5), WATER, 3.0, 0.2)
    assert not r.asymptotic and r.end_offset == 0.0 and r.level[-1] == pytest.approx(0.5)


# ---------- refusals ------------------------------------------------------------------------

def test_impossible_geometry_is_refused():
    t = vertical_cylinder(1.0, 3.0)
    with raises_exactly(OutOfRangeError, r"'orifice diameter \(tank 'tank' largest section ≈ 1 m "
                                         r"equivalent\)' must be between 0 and 1 m, not 1\.2 m"):
        drain(t, OrificeOutlet(1.2, 0.61), WATER, 2.0, 0.0)
    with raises_exactly(OutOfRangeError, r"'orifice elevation offset' must be between 0 and 2 m, "
                                         r"not 2\.5 m"):
        drain(t, OrificeOutlet(0.05, 0.61, 2.5), WATER, 2.0, 0.0)
    with raises_exactly(OutOfRangeError, r"'siphon crest margin' must be between 0 and 100 m"):
        drain(t, OrificeOutlet(0.05), WATER, 2.0, 0.0, crest_margin=-1.0)


def test_exit_row_on_a_free_jet_is_refused():
    line = Line("l", (Segment("run", bare_pipe(0.05), 10.0, rise=-1.0,
                              fittings=(Fitting("exit", label="outlet"),)),))
    with raises_exactly(InputError, r"'fittings of outlet line 'l'' must not hold an exit fitting "
                                    r"\(K = 1\) on a free discharge.*not \"outlet in segment 'run'\""):
        PipedOutlet(line, -1.0)
    # submerged: the exit row is where it belongs
    assert not PipedOutlet(line, -1.0, receiver_level=0.5).free


def test_vent_air_density_at_air_temperature():
    hot = NS(T=353.15, rho=971.8, mu=3.5e-4, pv=47400.0)   # water at 80 °C (from memory)
    Q = 0.61 * math.pi * 0.08**2 / 4 * math.sqrt(2 * g * 3.0)          # Torricelli at start
    for T_air in (None, 308.15):
        r = drain(vertical_cylinder(2.0, 3.0), OrificeOutlet(0.08, 0.61), hot, 3.0, 0.0,
                  vent=Vent(0.05, 0.61), T_air=T_air)
        Ta = T_AIR_DEFAULT if T_air is None else T_air
        rho_air = P_ATM * 0.0289647 / (8.314462618 * Ta)             # ideal gas, dry air
        dP = rho_air / 2 * (Q / (0.61 * math.pi * 0.05**2 / 4)) ** 2    # orifice equation
        assert finding(r, "vent pressure drop at peak drain rate").value == pytest.approx(dP, rel=1e-9)
        assert r.T_air == Ta
    assert T_AIR_DEFAULT == 293.15


def test_limit_flag_defaults_without_vapour_pressure():
    # no vapour-pressure model: the limit is not applied, and the finding says so
    r = drain(vertical_cylinder(TANK_D, 4.5), wall_siphon(8.0), RESIN, 4.0, 3.0)
    assert not r.siphon_limited
    assert "siphon limit is not applied" in finding(r, "lowest pressure in the line").rule
    assert np.isfinite(r.total_time)


def test_siphon_that_cannot_start_is_no_outflow_with_a_fail():
    # crest 12 m and a start level of 1.5 m: p_atm + ρg(1.5 − 12) < p_v at zero flow
    crest, up, down = 12.0, 13.0, 19.0
    r = drain(vertical_cylinder(TANK_D, 4.5), wall_siphon(crest, up, down), WATER, 1.5, 0.3)
    assert r.siphon_broken and not r.reached and r.total_time == 0.0 and r.flow.tolist() == [0.0]
    assert finding(r, "siphon limit at vapour pressure").severity is Severity.FAIL
    assert finding(r, "level reached").severity is Severity.FAIL
    assert r.time_note.startswith("no outflow")


def test_negative_absolute_pressure_without_vapour_model_is_a_fail():
    # the resin has no vapour-pressure model: no siphon limit, but a computed absolute pressure
    # below zero is never shown without a FAIL (definition of absolute pressure)
    crest, up, down = 12.0, 13.0, 19.0
    thin = NS(T=293.15, rho=998.2, mu=1.002e-3, pv=None)      # water-like, no pv model given
    r = drain(vertical_cylinder(TANK_D, 4.5), wall_siphon(crest, up, down), thin, 4.0, 0.3)
    assert r.lowest_pressure < 0
    f = finding(r, "absolute pressure")
    assert f.severity is Severity.FAIL and "impossible" in f.rule and f.value == r.lowest_pressure
