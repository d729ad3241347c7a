"""Plain bisection, written for the tests (independent of the code under test)."""

from __future__ import annotations

__all__ = ["bisect"]


def bisect(fun, lo, hi, n=200):
    """A root of ``fun`` between ``lo`` and ``hi`` (opposite signs) by ``n`` halvings."""
    flo = fun(lo)
    for _ in range(n):
        mid = 0.5 * (lo + hi)
        fm = fun(mid)
        if (fm > 0) == (flo > 0):
            lo, flo = mid, fm
        else:
            hi = mid
    return 0.5 * (lo + hi)
