"""Validity ranges enforced: friction inputs refused or flagged as data says, roughness not
smaller than the bore refused, negative flows refused at the segment level."""

from __future__ import annotations

import math
from types import SimpleNamespace as NS

import numpy as np
import pytest
from raising import raises_exactly

from kit.core.friction import (
    FRICTION_LIMITS,
    darcy_friction,
    friction_range_findings,
)
from kit.core.line import Line, Segment
from kit.errors import OutOfRangeError

WATER = NS(rho=998.2, mu=1.002e-3)     # water at 20 °C (from memory)


def pipe(Di, eps=4.5e-5):
    return NS(Di=Di, area=math.pi / 4 * Di**2, roughness=eps)


@pytest.mark.parametrize("Re, eD, field, shown", [
    (-1.0, 1e-4, "Reynolds number", "-1"),
    (float("nan"), 1e-4, "Reynolds number", "nan"),
    (2e10, 1e-4, "Reynolds number", "2e\\+10"),
    (1e5, 0.5, "relative roughness ε/D", "0.5"),
    (1e5, -1e-3, "relative roughness ε/D", "-0.001"),
], ids=["negative Re", "NaN Re", "Re beyond 1e10", "eD 0.5", "negative eD"])
def test_darcy_friction_refuses_outside_the_refuse_range(Re, eD, field, shown):
    with raises_exactly(OutOfRangeError, rf"'{field}' must be between 0 and .*, not {shown}"):
        darcy_friction(np.array([Re]), eD)


def test_extrapolation_is_answered_and_flagged():
    # Re = 1e9: Colebrook still converges to the fully-rough / smooth asymptote; flagged
    f9 = float(darcy_friction(1e9, 1e-3))
    # fully rough law 1/sqrt(f) = −2 log10(ε/D / 3.7) (von Kármán–Nikuradse, from memory)
    assert f9 == pytest.approx((-2 * math.log10(1e-3 / 3.7)) ** -2, rel=1e-3)
    fs = friction_range_findings("run", [1e5, 1e9], 1e-3)
    assert [f.quantity for f in fs] == ["Reynolds number"] and fs[0].value == 1e9
    fs = friction_range_findings("run", [1e5], 0.07)
    assert fs and fs[0].quantity == "relative roughness ε/D" and fs[0].severity.value == "check"
    assert friction_range_findings("run", [1e5], 0.01) == []
    # the policy is data: valid range inside the refuse range, each bound said
    for lim in FRICTION_LIMITS.values():
        assert lim["refuse"][0] <= lim["valid"][0] < lim["valid"][1] < lim["refuse"][1]
        assert lim["between"] == "flag" and lim["source"]


def test_segment_refuses_roughness_not_smaller_than_the_bore():
    with raises_exactly(OutOfRangeError, r"'roughness of the pipe in segment 'run'' must be "
                                         r"between 0 and 0\.05 m, not 0\.05 m"):
        Segment("run", pipe(0.05, 0.05), 10.0)
    with raises_exactly(OutOfRangeError, r"'relative roughness ε/D of segment 'run' .*' must be "
                                         r"between 0 and 0\.1 -, not 0\.2"):
        Segment("run", pipe(0.05, 0.01), 10.0)


def test_segment_refuses_negative_flow_as_line_does():
    seg = Segment("run", pipe(0.1), 10.0)
    msg = r"'flow' must be at least 0 m³/s, not -0\.01 m³/s"
    with raises_exactly(OutOfRangeError, msg):
        seg.head_loss(np.array([0.01, -0.01]), WATER)
    with raises_exactly(OutOfRangeError, msg):
        seg.reynolds(-0.01, WATER)
    with raises_exactly(OutOfRangeError, msg):
        Line("L", (seg,)).head_loss(np.array([-0.01]), WATER)


def test_line_findings_flag_extrapolated_friction():
    # 2 m/s in a 5 m bore of water: Re ≈ 1e7 (valid); a light oil at 30 m/s: Re ≈ 1.5e8
    line = Line("big", (Segment("run", pipe(5.0, 1e-4), 100.0),))
    lo = NS(rho=800.0, mu=1e-3)
    Q = 30.0 * math.pi / 4 * 25.0
    fs = [f for f in line.findings(np.array([Q]), lo) if f.quantity == "Reynolds number"]
    assert fs and fs[0].value == pytest.approx(800.0 * 30.0 * 5.0 / 1e-3, rel=1e-12)
