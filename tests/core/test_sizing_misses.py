"""Line sizing when every size fails (reasons and the nearest miss), and the erosional
velocity as a limit only where the service calls for it."""

from __future__ import annotations

import math
from dataclasses import replace
from types import SimpleNamespace as NS

import numpy as np
import pytest
from raising import raises_exactly

from kit.core.criteria import DUTY_CLASSES, erosional_findings, erosional_velocity
from kit.core.findings import Severity
from kit.core.sizing import Route, size_line
from kit.errors import InputError

WATER = NS(rho=998.2, mu=1.002e-3, pv=2339.0)     # water at 20 °C (from memory)


def pipe(D):
    return NS(Di=D, area=math.pi / 4 * D * D, roughness=4.5e-5, label=f"{D * 1e3:.0f} mm")


def test_every_size_fails_gives_reasons_and_the_nearest_miss():
    duty = DUTY_CLASSES["pump_discharge"]          # v_max 3.0 m/s (common practice, no source)
    Q = 0.05
    sizes = [pipe(0.08), pipe(0.1), pipe(0.125)]
    res = size_line(Route(100.0), WATER, Q, sizes, duty, p_end=3e5)
    assert res.recommended is None
    assert res.counts == {"pass": 0, "check": 0, "fail": 3}
    assert [r["verdict"] for r in res.reasons] == ["fail"] * 3
    assert all(r["reason"] for r in res.reasons)
    # nearest miss by hand: relative excess of velocity V = Q/A over v_max, or of the
    # friction drop over dp_max, whichever is larger, smallest over the sizes
    i, excess, f = res.nearest_miss
    cands = res.candidates
    def worst(c):
        ex = [(x.value - x.high) / x.high for x in c.findings
              if x.severity is Severity.FAIL and x.high is not None and x.value > x.high]
        return max(ex)
    expect = min(range(3), key=lambda k: worst(cands[k]))
    assert i == expect and excess == pytest.approx(worst(cands[i]), rel=1e-12)
    assert cands[2].velocity == pytest.approx(Q / (math.pi / 4 * 0.125**2), rel=1e-12)
    assert f"nearest miss {cands[i].pipe.label}" in res.reason
    for c in cands:
        assert c.pipe.label in res.reason


def test_empty_candidate_list_is_refused():
    with raises_exactly(InputError, r"'candidate pipes' must hold at least 1 pipe, not 0"):
        size_line(Route(100.0), WATER, 0.01, [], DUTY_CLASSES["pump_discharge"])


def test_erosional_velocity_is_informational_for_clean_liquid():
    Ve = erosional_velocity(998.2)
    # API RP 14E: Ve = C / sqrt(rho [lb/ft³]) ft/s (C = 100) — converted here
    assert Ve == pytest.approx(100 / math.sqrt(998.2 / 16.01846337396014) * 0.3048, rel=1e-12)
    info = erosional_findings("L", 1.5 * Ve, 998.2, applies=False)[0]
    assert info.severity is Severity.PASS and "information" in info.rule
    assert erosional_findings("L", 1.5 * Ve, 998.2, applies=True)[0].severity is Severity.FAIL
    assert all(not d.erosional_applies for d in DUTY_CLASSES.values())
    # a sizing at a clean-liquid duty never fails on erosion; with the flag it can
    fast = replace(DUTY_CLASSES["general_transfer"], v_max=20.0, dp_max=1e6)
    Q = 5.0 * math.pi / 4 * 0.05**2                                   # 5 m/s > Ve ≈ 3.86
    res = size_line(Route(10.0), WATER, Q, [pipe(0.05)], fast, p_end=5e5)
    ero = [f for f in res.candidates[0].findings if "erosional" in f.rule]
    assert ero and ero[0].severity is Severity.PASS
    res2 = size_line(Route(10.0), WATER, Q, [pipe(0.05)], replace(fast, erosional_applies=True),
                     p_end=5e5)
    ero2 = [f for f in res2.candidates[0].findings if "erosional" in f.rule]
    assert ero2[0].severity is Severity.FAIL
    with raises_exactly(InputError, r"'erosional_applies of 'general_transfer'' must be true or "
                                    r"false, not 'yes'"):
        replace(fast, erosional_applies="yes")
    assert np.isfinite(Ve)
