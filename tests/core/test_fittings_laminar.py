"""Fittings in laminar flow: one friction rule for bends in Line and fitting_K, Re-dependent
valve K (Darby 3-K), and findings where a K is used below its source's Re range.

Invented scenario "Holm Bank glycerol transfer": a viscous syrup moved 40 m through a 50 mm
line with two long-radius bends and a gate valve, at Re of a few hundred.
"""

from __future__ import annotations

import math
from types import SimpleNamespace as NS

import fluids.fittings as ff
import numpy as np
import pytest
from raising import raises_exactly

from kit.core.fittings import (
    FITTING_RE_RANGES,
    Fitting,
    fitting_K,
    fitting_re_findings,
)
from kit.core.line import Line, Segment
from kit.errors import InputError

g = 9.80665                                    # standard gravity (CGPM 1901)
SYRUP = NS(rho=1200.0, mu=0.4, pv=None)        # invented syrup, 400 cP
D, EPS = 0.0525, 4.5e-5                        # NPS 2 Sch 40 bore (from memory), steel


def pipe():
    return NS(Di=D, area=math.pi / 4 * D**2, roughness=EPS)


def rennels_bend(fd, angle_deg, rD):
    """Rennels & Hudson (2012) bend K, written here from the published form:
    K = fd·α·(r/D) + (0.10 + 2.4 fd) sin(α/2) + 6.6 fd (√sin(α/2) + sin(α/2)) / (r/D)^(4α/π)."""
    a = math.radians(angle_deg)
    s = math.sin(a / 2)
    return fd * a * rD + (0.10 + 2.4 * fd) * s + 6.6 * fd * (math.sqrt(s) + s) / rD ** (4 * a / math.pi)


BEND = Fitting("bend", count=2, params={"angle": 90.0, "R_D": 1.5}, label="LR bends")


@pytest.mark.parametrize("Re", [50.0, 300.0, 1500.0])
def test_bend_uses_laminar_friction_in_fitting_K(Re):
    # one rule: fd = 64/Re below Re 2000 (Hagen–Poiseuille), as for the pipe itself
    K = float(fitting_K(BEND, [Re], D, EPS)[0])
    assert K == pytest.approx(2 * rennels_bend(64 / Re, 90.0, 1.5), rel=1e-12)


def test_line_and_fitting_K_agree_on_the_bend_in_laminar_flow():
    L = 40.0
    line = Line("transfer", (Segment("run", pipe(), L, fittings=(BEND,)),))
    Q = 0.002
    V = Q / (math.pi / 4 * D**2)
    Re = SYRUP.rho * V * D / SYRUP.mu
    assert Re < 2000
    hl = float(line.head_loss(np.array([Q]), SYRUP)[0])
    vh = V * V / (2 * g)
    # Darcy–Weisbach, laminar f = 64/Re, plus the bend's K from fitting_K at the same Re
    expect = (64 / Re) * L / D * vh + float(fitting_K(BEND, [Re], D, EPS)[0]) * vh
    assert hl == pytest.approx(expect, rel=1e-12)
    assert hl == pytest.approx((64 / Re) * L / D * vh + 2 * rennels_bend(64 / Re, 90, 1.5) * vh,
                               rel=1e-12)


def test_darby_valve_is_re_dependent():
    name = "Valve, Gate valve, standard, β = 1"
    row = Fitting("valve_gate", params={"method": "Darby 3-K"})
    for Re in (100.0, 1e3, 1e5):
        K = float(fitting_K(row, [Re], D, EPS)[0])
        # Darby (2001) 3-K: K = K1/Re + Ki (1 + Kd / NPS^0.3), fluids' table and Sch 40 NPS
        assert K == pytest.approx(ff.Darby3K(Di=D, Re=Re, name=name), rel=1e-12)
    K1, Ki, Kd = ff.Darby[name]
    low, high = (float(fitting_K(row, [r], D, EPS)[0]) for r in (100.0, 1e5))
    assert low - high == pytest.approx(K1 / 100.0 - K1 / 1e5, rel=1e-9)   # the laminar rise
    crane = float(fitting_K(Fitting("valve_gate"), [100.0], D, EPS)[0])
    assert low > crane                  # the constant (turbulent) K understates laminar loss


def test_findings_below_the_source_re_range():
    # Crane valve and geometric bend at Re 300: below their turbulent sources (data)
    fs = fitting_re_findings(Fitting("valve_gate", label="GV-1"), [300.0, 900.0], "run")
    assert len(fs) == 1 and fs[0].severity.value == "check" and fs[0].value == 300.0
    assert "Darby 3-K" in fs[0].rule and fs[0].low == FITTING_RE_RANGES["Crane valve"][0]
    assert fitting_re_findings(BEND, [300.0])[0].low == FITTING_RE_RANGES["geometry"][0]
    # Darby and Hooper rows cover laminar flow: no finding
    assert fitting_re_findings(Fitting("valve_gate", params={"method": "Darby 3-K"}), [300.0]) == []
    hooper = Fitting("hooper_2k", params={"name": next(iter(ff.Hooper))})
    assert fitting_re_findings(hooper, [300.0]) == []
    # turbulent: no finding
    assert fitting_re_findings(Fitting("valve_gate"), [5e4]) == []
    # the line reports them with its other findings
    line = Line("transfer", (Segment("run", pipe(), 40.0,
                                     fittings=(BEND, Fitting("valve_gate", label="GV-1"))),))
    got = [f for f in line.findings(np.array([0.002]), SYRUP) if "fitting" in f.subject]
    assert {f.subject.split("fitting ")[-1] for f in got} == {"LR bends", "GV-1"}


def test_darby_valve_rows_refused_where_the_table_has_none():
    with raises_exactly(InputError, r"'method \(fitting valve_gate\)' needs a full-bore valve"):
        Fitting("valve_gate", params={"beta": 0.8, "method": "Darby 3-K"})
    with raises_exactly(InputError, r"'method \(fitting valve_diaphragm\)' has no Darby row for "
                                    r"style 'straight-through'"):
        Fitting("valve_diaphragm", params={"style": "straight-through", "method": "Darby 3-K"})


def test_drain_and_sizing_report_fittings_below_their_re_range():
    from kit.core.criteria import DUTY_CLASSES
    from kit.core.drain import PipedOutlet, drain
    from kit.core.sizing import Route, size_line
    from kit.core.tank import vertical_cylinder

    gv = Fitting("valve_gate", label="GV-2")
    line = Line("syrup out", (Segment("run", pipe(), 20.0, rise=-1.0, fittings=(gv,)),))
    r = drain(vertical_cylinder(1.5, 2.0), PipedOutlet(line, -1.0), SYRUP, 2.0, 0.5)
    hits = [f for f in r.findings if f.quantity == "Reynolds number" and "GV-2" in f.subject]
    # the lowest Re over the drain, computed here: ρ Q_min / A · D / μ
    Re_min = SYRUP.rho * r.flow[r.flow > 0].min() / (math.pi / 4 * D**2) * D / SYRUP.mu
    assert hits and hits[0].value == pytest.approx(Re_min, rel=1e-9)
    res = size_line(Route(20.0, fittings=(gv,)), SYRUP, 0.002, [pipe()],
                    DUTY_CLASSES["general_transfer"], p_end=2e5)
    assert any(f.quantity == "Reynolds number" and "GV-2" in f.subject
               for f in res.candidates[0].findings)
