"""System curve and band: static head, losses, free discharge, NPSHa by hand."""

import math
from dataclasses import dataclass, replace

import numpy as np
import pytest

from kit.core.line import G, Line, Segment
from kit.core.liquids import make_liquid
from kit.core.system import Condition, Endpoint, System
from kit.errors import OutOfRangeError, UnknownChoiceError


@dataclass(frozen=True)
class BarePipe:
    """A pipe with a bore and a roughness per condition, independent of the catalogue."""

    Di: float
    new: float = 4.5e-5
    aged: float = 5e-4
    condition: str = "new"

    @property
    def area(self):
        return math.pi / 4 * self.Di**2

    @property
    def roughness(self):
        return self.new if self.condition == "new" else self.aged

    def with_condition(self, c):
        return replace(self, condition=c)


def hand_dw(Q, D, L, eps, rho, mu, K=0.0):
    """Darcy–Weisbach with Swamee–Jain (1976) friction — an independent explicit formula."""
    A = math.pi / 4 * D * D
    V = Q / A
    Re = rho * V * D / mu
    f = 0.25 / math.log10(eps / (3.7 * D) + 5.74 / Re**0.9) ** 2
    return (f * L / D + K) * V * V / (2 * G)


WATER = make_liquid("water")


def make_system(discharge="submerged"):
    src = Endpoint("sump", 10.0, 12.0, 101325.0)
    dst = Endpoint("tank", 40.0, 45.0, 101325.0 + 50e3, discharge)
    suction = Line("suction", (Segment("s1", BarePipe(0.2), 10.0, rise=1.0),), "inlet", 9.0)
    discharge_line = Line("discharge", (Segment("d1", BarePipe(0.15), 400.0, rise=31.0),),
                          "pump", 10.0)
    return System("test", src, dst, suction, discharge_line, WATER, 283.15, 323.15)


def test_static_head_cases():
    s = make_system()
    rho = WATER.state(283.15, 101325.0).rho
    assert s.static_head("max", 283.15) == pytest.approx(45.0 - 10.0 + 50e3 / (rho * G))
    assert s.static_head("min", 283.15) == pytest.approx(40.0 - 12.0 + 50e3 / (rho * G))


def test_curve_against_hand_computation():
    # Swamee & Jain (1976) explicit friction agrees with Colebrook to ~1 %: independent check
    s = make_system()
    st = WATER.state(283.15, 101325.0)
    Q = 0.04
    H = float(s.curve(np.array([Q]), Condition("max", 283.15, "new"))[0])
    expect = (45.0 - 10.0 + 50e3 / (st.rho * G)
              + hand_dw(Q, 0.2, 10.0, 4.5e-5, st.rho, st.mu)
              + hand_dw(Q, 0.15, 400.0, 4.5e-5, st.rho, st.mu))
    assert H == pytest.approx(expect, rel=5e-3)


def test_free_discharge_adds_velocity_head():
    a, b = make_system("submerged"), make_system("free")
    Q = np.array([0.03])
    c = Condition("min", 283.15, "new")
    V = 0.03 / (math.pi / 4 * 0.15**2)
    assert float(b.curve(Q, c)[0] - a.curve(Q, c)[0]) == pytest.approx(V * V / (2 * G))


def test_band_has_eight_members_and_aged_is_higher():
    s = make_system()
    Q = np.linspace(0, 0.06, 31)
    band = s.band(Q)
    assert band.H.shape == (8, 31)
    new = band.curve(Condition("max", 283.15, "new"))
    aged = band.curve(Condition("max", 283.15, "aged"))
    assert np.all(aged[1:] > new[1:]) and aged[0] == new[0]
    assert np.all(band.upper >= band.lower)
    assert np.all(np.diff(band.lower) > 0)


def test_npsha_by_definition():
    # NPSHa = (p_s - p_v)/(rho g) + (z_s - z_pump) - h_suction (ANSI/HI 9.6.1 definition, from memory)
    s = make_system()
    T = 323.15
    st = WATER.state(T, 101325.0)
    Q = 0.05
    hs = hand_dw(Q, 0.2, 10.0, 4.5e-5, st.rho, st.mu)
    expect = (101325.0 - st.pv) / (st.rho * G) + (10.0 - 10.0) - hs
    got = float(s.npsh_available(np.array([Q]), Condition("max", T, "new"))[0])
    assert got == pytest.approx(expect, rel=5e-3)


@pytest.mark.parametrize("build,cls,match", [
    (lambda: Endpoint("t", 5.0, 4.0), OutOfRangeError, r"'high level of 't'' must be between 5"),
    (lambda: Endpoint("t", 1.0, 2.0, -5.0), OutOfRangeError, r"'surface pressure of 't''"),
    (lambda: Endpoint("t", 1.0, 2.0, discharge="jet"), UnknownChoiceError,
     r"'discharge of 't'' must be one of 'submerged', 'free', not 'jet'"),
    (lambda: Condition("highest", 293.15, "new"), UnknownChoiceError, r"'static head case'"),
    (lambda: Condition("max", 293.15, "rusty"), UnknownChoiceError, r"'pipe condition'"),
    (lambda: replace(make_system(), T_max=200.0), OutOfRangeError,
     r"'maximum liquid temperature' must be between 283.15 and 1000 K"),
    (lambda: replace(make_system(), p_baro=5.0), OutOfRangeError, r"'barometric pressure'"),
])
def test_bad_system_inputs(build, cls, match):
    with pytest.raises(cls, match=match):
        build()
