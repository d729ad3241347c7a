"""Shared test helper: two Results report the same values."""

import math


def values(res) -> dict:
    """Reported values of a Results, by key."""
    return {v.key: v.value for v in res.values}


def assert_same_results(a, b):
    """Every reported value of ``a`` equals that of ``b`` (rel 1e-9; inf and nan alike)."""
    va, vb = values(a), values(b)
    assert va.keys() == vb.keys()
    for k, x in va.items():
        y = vb[k]
        assert x == y or math.isclose(x, y, rel_tol=1e-9) or (math.isnan(x) and math.isnan(y)), k
