"""Friction factor: Colebrook by brentq, Moody-chart readings, laminar, transition policy."""

import math

import numpy as np
import pytest
from hypothesis import given
from hypothesis import strategies as st
from scipy.optimize import brentq

from kit.core.friction import (
    RE_LAMINAR,
    RE_TURBULENT,
    colebrook_clamond,
    darcy_friction,
    regime,
    transition_findings,
)


def colebrook_brentq(Re, eD):
    """Colebrook 1939 solved by brentq, written here independently of the kit."""
    def g(f):
        return 1 / math.sqrt(f) + 2 * math.log10(eD / 3.7 + 2.51 / (Re * math.sqrt(f)))
    return brentq(g, 1e-4, 1.0, xtol=1e-15, rtol=1e-15)


@pytest.mark.parametrize("Re", [4.5e3, 1e4, 5e4, 1e5, 1e6, 1e7, 1e8])
@pytest.mark.parametrize("eD", [0.0, 1e-6, 1e-5, 1e-4, 1e-3, 1e-2, 0.05])
def test_clamond_equals_colebrook_by_brentq(Re, eD):
    # source: Colebrook 1939, solved by brentq
    assert float(colebrook_clamond(Re, eD)) == pytest.approx(colebrook_brentq(Re, eD), rel=1e-10)


@pytest.mark.parametrize("Re,eD,f_chart", [
    (1e5, 0.0, 0.018),     # Moody 1944 chart reading, smooth pipe (from memory)
    (1e6, 0.0, 0.0116),    # Moody 1944 chart reading, smooth pipe (from memory)
    (1e5, 0.001, 0.0222),  # Moody 1944 chart reading (from memory)
    (1e6, 0.01, 0.038),    # Moody 1944 chart, fully rough (from memory)
    (1e4, 0.0, 0.0309),    # Moody 1944 chart reading, smooth pipe (from memory)
])
def test_moody_chart_readings(Re, eD, f_chart):
    assert float(darcy_friction(Re, eD)) == pytest.approx(f_chart, rel=0.02)


def test_fully_rough_limit_von_karman():
    # von Kármán/Nikuradse fully rough law 1/sqrt(f) = -2 log10(eD/3.7) (textbook, from memory)
    eD = 0.01
    f_rough = (-2 * math.log10(eD / 3.7)) ** -2
    assert float(darcy_friction(1e8, eD)) == pytest.approx(f_rough, rel=2e-3)


@pytest.mark.parametrize("Re", [1.0, 100.0, 1000.0, 1999.0])
def test_laminar_hagen_poiseuille(Re):
    # Hagen–Poiseuille: f = 64/Re (exact for laminar flow in a round pipe)
    assert float(darcy_friction(Re, 0.01)) == pytest.approx(64 / Re, rel=1e-14)


def test_transition_is_continuous_and_bounded():
    # policy of this kit: linear blend between 64/2000 and Colebrook(4000)
    eD = 1e-4
    assert float(darcy_friction(RE_LAMINAR, eD)) == pytest.approx(64 / RE_LAMINAR)
    assert float(darcy_friction(RE_TURBULENT, eD)) == pytest.approx(colebrook_brentq(4000, eD))
    mid = float(darcy_friction(3000.0, eD))
    assert mid == pytest.approx(0.5 * (0.032 + colebrook_brentq(4000, eD)), rel=1e-12)
    Re = np.linspace(1500, 4500, 3001)
    f = darcy_friction(Re, eD)
    assert np.max(np.abs(np.diff(f))) < 1e-4  # no step (fluids' own function jumps ×1.57)


@given(st.floats(10.0, 1e7), st.floats(10.0, 1e7), st.floats(0.0, 0.05))
def test_head_loss_rises_with_Re(a, b, eD):
    # f·Re² ∝ head loss at fixed pipe and liquid must rise with flow (property)
    lo, hi = sorted((a, b))
    if hi - lo < 1e-6 * hi:
        return
    assert float(darcy_friction(hi, eD)) * hi**2 > float(darcy_friction(lo, eD)) * lo**2


def test_vectorised_matches_scalar():
    Re = np.geomspace(10, 1e7, 200)
    arr = darcy_friction(Re, 1e-4)
    assert arr.shape == (200,)
    for r, f in zip(Re[::17], arr[::17], strict=False):
        assert float(darcy_friction(float(r), 1e-4)) == f


def test_regimes_and_findings():
    assert list(regime([100.0, 3000.0, 1e5])) == ["laminar", "transition", "turbulent"]
    found = transition_findings("seg A", [1e3, 2500.0, 1e5])
    assert len(found) == 1 and found[0].severity.value == "check"
    assert found[0].value == 2500.0
    assert transition_findings("seg A", [1e3, 1e5]) == []
