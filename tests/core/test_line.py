"""Segments and lines: head loss computed independently in the test, profiles, vacuum checks."""

import math
from types import SimpleNamespace as NS

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from scipy.optimize import brentq

from kit.core.line import G, Line, Segment, vapour_findings
from kit.errors import InputError, OutOfRangeError


def bare_pipe(Di, eps=4.5e-5):
    return NS(Di=Di, area=math.pi / 4 * Di**2, roughness=eps, with_condition=lambda c: None)


def colebrook(Re, eD):
    """Colebrook 1939 solved by brentq — independent of the kit."""
    return brentq(lambda f: 1 / math.sqrt(f) + 2 * math.log10(eD / 3.7 + 2.51 / (Re * math.sqrt(f))),
                  1e-4, 1.0, xtol=1e-14)


def hand_loss(Q, Di, L, eps, rho, mu, K=0.0):
    """Darcy–Weisbach by hand: h = (f L/D + K) V²/2g, f by Colebrook or 64/Re."""
    A = math.pi / 4 * Di**2
    V = Q / A
    Re = rho * V * Di / mu
    f = 64 / Re if Re < 2000 else colebrook(Re, eps / Di)
    return (f * L / Di + K) * V**2 / (2 * G)


WATER20 = NS(rho=998.21, mu=1.0016e-3, pv=2339.0)  # water at 20 °C (from memory)
OIL = NS(rho=880.0, mu=0.1, pv=None)               # invented light oil, 100 cP

# Six head-loss cases; each expected value computed by hand_loss above (Colebrook by brentq).
CASES = [
    pytest.param(0.01, 0.1023, 100.0, 4.5e-5, WATER20, id="water, NPS4 sch40 bore, 100 m"),
    pytest.param(0.0316, 0.1541, 304.8, 4.5e-5, WATER20, id="500 gpm in NPS6 sch40, 1000 ft"),
    pytest.param(0.002, 0.0525, 50.0, 1.5e-6, WATER20, id="smooth drawn tube, 2 in"),
    pytest.param(0.2, 0.3, 2000.0, 1e-3, WATER20, id="rough large main, eps 1 mm"),
    pytest.param(0.0005, 0.05, 30.0, 4.5e-5, OIL, id="laminar oil, Re ~ 110"),
    pytest.param(0.05, 0.2, 500.0, 2.6e-4, NS(rho=1040.0, mu=2.5e-3), id="glycol-like, cast iron"),
]


@pytest.mark.parametrize("Q,Di,L,eps,liq", CASES)
def test_head_loss_against_hand_computation(Q, Di, L, eps, liq):
    seg = Segment("s", bare_pipe(Di, eps), L)
    line = Line("L", (seg,))
    got = float(line.head_loss(np.array([Q]), liq)[0])
    assert got == pytest.approx(hand_loss(Q, Di, L, eps, liq.rho, liq.mu), rel=1e-9)


def test_laminar_hagen_poiseuille_pressure_drop():
    # Hagen–Poiseuille (1839/1840): Δp = 128 μ L Q / (π D⁴)
    Q, D, L = 0.0005, 0.05, 30.0
    dp = 128 * OIL.mu * L * Q / (math.pi * D**4)
    line = Line("L", (Segment("s", bare_pipe(D), L),))
    assert float(line.head_loss(np.array([Q]), OIL)[0]) * OIL.rho * G == pytest.approx(dp, rel=1e-12)


def test_two_segments_add_and_zero_flow_is_zero():
    a = Segment("a", bare_pipe(0.1023), 40.0)
    b = Segment("b", bare_pipe(0.0779), 25.0, rise=3.0)
    line = Line("L", (a, b))
    Q = np.array([0.0, 0.004, 0.012])
    total = line.head_loss(Q, WATER20)
    assert total[0] == 0.0
    for q, h in zip(Q[1:], total[1:], strict=True):
        expect = hand_loss(q, 0.1023, 40, 4.5e-5, WATER20.rho, WATER20.mu) + \
            hand_loss(q, 0.0779, 25, 4.5e-5, WATER20.rho, WATER20.mu)
        assert h == pytest.approx(expect, rel=1e-9)
    assert line.segment_losses(Q, WATER20).shape == (2, 3)


def test_profile_energy_balance_and_siphon_crest():
    # siphon over a crest 7 m above the start: Bernoulli with a loss term, by hand
    up = Segment("up", bare_pipe(0.0525), 10.0, rise=7.0, end_station="crest")
    down = Segment("down", bare_pipe(0.0525), 15.0, rise=-12.0, end_station="outlet")
    line = Line("siphon", (up, down), "inlet", 100.0)
    Q, p0 = 0.004, 101325.0 + 998.21 * G * 1.0  # inlet 1 m below a free surface
    prof = line.profile(Q, WATER20, p0)
    h_up = hand_loss(Q, 0.0525, 10, 4.5e-5, WATER20.rho, WATER20.mu)
    p_crest = p0 - WATER20.rho * G * (7.0 + h_up)
    crest = prof.stations[1]
    assert crest.name == "crest" and crest.p == pytest.approx(p_crest, rel=1e-12)
    assert prof.lowest.name == "crest"
    assert crest.z == pytest.approx(107.0)
    assert all(s.hgl <= s.egl for s in prof.stations)
    found = vapour_findings(prof, WATER20.pv)
    assert [f.severity.value for f in found] == ["pass", "check"]  # sub-atmospheric crest


def test_vapour_pressure_reached_fails():
    up = Segment("up", bare_pipe(0.0525), 12.0, rise=11.0, end_station="crest")
    line = Line("siphon", (up,), "inlet")
    prof = line.profile(0.004, WATER20, 101325.0)
    found = vapour_findings(prof, WATER20.pv)
    assert found[0].severity.value == "fail"
    with pytest.raises(InputError, match="'vapour pressure' is needed"):
        vapour_findings(prof, None)


@settings(max_examples=60, deadline=None)
@given(st.floats(1e-5, 0.2), st.floats(1e-5, 0.2), st.floats(0.02, 0.5), st.floats(1.0, 1e4))
def test_loss_rises_with_flow(q1, q2, D, L):
    # property: head loss is increasing in flow
    lo, hi = sorted((q1, q2))
    if hi - lo < 1e-9:
        return
    line = Line("L", (Segment("s", bare_pipe(D), L),))
    h = line.head_loss(np.array([lo, hi]), WATER20)
    assert h[1] > h[0]


@settings(max_examples=40, deadline=None)
@given(st.floats(0.0, 0.05), st.floats(-20.0, 20.0), st.floats(1e5, 5e5))
def test_hgl_never_above_egl(Q, rise, p0):
    line = Line("L", (Segment("a", bare_pipe(0.1), 50.0, rise=rise),
                      Segment("b", bare_pipe(0.08), 30.0)))
    prof = line.profile(Q, WATER20, p0)
    assert all(s.hgl <= s.egl + 1e-12 for s in prof.stations)


@pytest.mark.parametrize("kwargs,cls,match", [
    (dict(length=0.0), OutOfRangeError, r"'length of segment 's'' must be between 0 and"),
    (dict(length=-3.0), OutOfRangeError, r"'length of segment 's''.*not -3 m"),
    (dict(length=10.0, rise=12.0), OutOfRangeError, r"'rise of segment 's'' must be between -10"),
    (dict(length=float("nan")), OutOfRangeError, r"'length of segment 's''"),
])
def test_bad_segments(kwargs, cls, match):
    with pytest.raises(cls, match=match):
        Segment("s", bare_pipe(0.1), **kwargs)


def test_bad_lines_and_flows():
    seg = Segment("s", bare_pipe(0.1), 10.0)
    with pytest.raises(InputError, match="'segments of line 'L'' must hold at least 1"):
        Line("L", ())
    with pytest.raises(InputError, match="'station names of line 'L'' must be unique"):
        Line("L", (seg, seg))
    with pytest.raises(OutOfRangeError, match="'flow' must be at least 0 m³/s, not -0.01"):
        Line("L", (seg,)).head_loss(np.array([-0.01]), WATER20)
