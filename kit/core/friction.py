"""Darcy friction factor over arrays of Reynolds number, with a stated transition policy.

Regimes
-------
- ``Re < RE_LAMINAR`` (2000): laminar, Hagen–Poiseuille ``f = 64/Re``.
- ``Re > RE_TURBULENT`` (4000): Colebrook (1939), solved exactly by Clamond's (2009)
  algorithm — two Newton-like iterations on the Lambert-W form, accurate to machine precision.
- In between: **linear blend in Re** between ``64/2000`` and the Colebrook value at
  Re = 4000 for the same relative roughness. The blend is continuous, so head loss stays a
  continuous, increasing function of flow and a root finder on a system curve cannot be
  trapped by a step (fluids' ``friction_factor`` jumps ×1.57 at Re = 2040). Flow in this
  zone is unpredictable in practice (it may be laminar or turbulent); the blend is a
  bookkeeping choice, not physics, and :func:`transition_findings` reports every such flow.

Example
-------
>>> import numpy as np
>>> f = darcy_friction(np.array([1000.0, 1e5]), 1e-4)
>>> [round(float(x), 5) for x in f]
[0.064, 0.01851]
"""

from __future__ import annotations

from math import isfinite, log

import numpy as np

from kit.core.findings import Finding, Severity
from kit.errors import OutOfRangeError

__all__ = [
    "RE_LAMINAR", "RE_TURBULENT", "darcy_friction", "colebrook_clamond", "regime",
    "transition_findings", "FRICTION_METHOD", "FRICTION_LIMITS", "check_friction_inputs",
    "friction_range_findings",
]

RE_LAMINAR = 2000.0
RE_TURBULENT = 4000.0

#: The method statement shown in findings and the record.
FRICTION_METHOD = {
    "name": "Darcy–Weisbach; Colebrook (Clamond 2009 exact solution) for Re > 4000; "
            "64/Re for Re < 2000; linear blend in Re between",
    "references": [
        "Colebrook, C. F. (1939). Turbulent flow in pipes. J. Inst. Civil Eng. 11(4), 133–156.",
        "Clamond, D. (2009). Efficient resolution of the Colebrook equation. Ind. Eng. Chem. "
        "Res. 48(7), 3665–3671. doi:10.1021/ie801626g",
    ],
    "valid": {"Re": (0.0, 1e8), "rel_roughness": (0.0, 0.05)},
}

#: Validity policy of :func:`darcy_friction`, per input, as data. ``valid`` is the range the
#: method is written for; between ``valid`` and ``refuse`` the answer is an extrapolation
#: that is reasonable and is *flagged* (:func:`friction_range_findings`, a CHECK); outside
#: ``refuse`` the input is *refused* (:class:`~kit.errors.OutOfRangeError`). Negative and
#: non-finite values are always refused.
#:
#: - Re above 1e8: Colebrook tends to the Prandtl smooth-pipe law or the fully-rough law,
#:   both independent of how high Re goes, so extrapolation is reasonable; past 1e10 no
#:   liquid line runs and the number is almost surely a unit error — refused.
#: - ε/D above 0.05 (the top of the Moody chart; Nikuradse's sand-grain data reach about
#:   1/30, from memory): the fully-rough law is extrapolated, flagged; past 0.1 the "pipe"
#:   is a channel of obstructions, not a rough pipe — refused. ε ≥ D is refused by
#:   :class:`kit.core.line.Segment` already.
FRICTION_LIMITS = {
    "Re": {"field": "Reynolds number", "unit": "-", "valid": (0.0, 1e8),
           "refuse": (0.0, 1e10), "between": "flag",
           "why": "Colebrook's smooth and fully-rough asymptotes do not depend on Re",
           "source": "Colebrook (1939); Moody (1944) chart to Re 1e8; limits: this kit"},
    "rel_roughness": {"field": "relative roughness ε/D", "unit": "-", "valid": (0.0, 0.05),
                      "refuse": (0.0, 0.1), "between": "flag",
                      "why": "the fully-rough law extrapolated beyond the Moody chart",
                      "source": "Moody (1944) chart to ε/D 0.05; Nikuradse (1933) sand-grain "
                                "data to about 1/30 (from memory); limits: this kit"},
}

_LN10_18574 = 0.1239681863354175460160858261654858382699   # ln(10)/18.574
_LN_LN10_502 = 0.7793974884556819406441139701653776731705  # ln(ln(10)/5.02)
_HALF_LN10_SQ = 1.325474527619599502640416597148504422899  # (ln(10)/2)**2


def colebrook_clamond(Re, rel_roughness):
    """Colebrook (1939) friction factor by Clamond's (2009) exact algorithm.

    .. math:: \\frac{1}{\\sqrt f} = -2\\log_{10}\\left(\\frac{\\epsilon/D}{3.7}
              + \\frac{2.51}{Re\\sqrt f}\\right)

    Parameters
    ----------
    Re : array_like
        Reynolds number, > 0 [-]
    rel_roughness : array_like
        Relative roughness ε/D, ≥ 0 [-]

    Returns
    -------
    f : ndarray
        Darcy friction factor [-]

    Notes
    -----
    Solves the implicit equation to machine precision for all Re > 0; physically
    meaningful for turbulent flow only (Re > 4000).

    Examples
    --------
    >>> round(float(colebrook_clamond(1e5, 1e-4)), 6)
    0.018514

    References
    ----------
    Clamond, D. (2009). Ind. Eng. Chem. Res. 48(7), 3665–3671. doi:10.1021/ie801626g
    """
    Re = np.asarray(Re, dtype=float)
    eD = np.asarray(rel_roughness, dtype=float)
    X1 = eD * Re * _LN10_18574
    X2 = np.log(Re) - _LN_LN10_502
    F = X2 - 0.2
    X1F = X1 + F
    X1F1 = 1.0 + X1F
    E = (np.log(X1F) - 0.2) / X1F1
    F = F - (X1F1 + 0.5 * E) * E * X1F / (X1F1 + E * (1.0 + E / 3.0))
    X1F = X1 + F
    X1F1 = 1.0 + X1F
    E = (np.log(X1F) + F - X2) / X1F1
    F = F - (X1F1 + 0.5 * E) * E * X1F / (X1F1 + E * (1.0 + E / 3.0))
    return _HALF_LN10_SQ / (F * F)


def _clamond_float(Re: float, eD: float) -> float:
    """:func:`colebrook_clamond` for one float Re > 0 and ε/D ≥ 0, with ``math`` (no numpy):
    the same operations in the same order, for the scalar hot paths."""
    X1 = eD * Re * _LN10_18574
    X2 = log(Re) - _LN_LN10_502
    F = X2 - 0.2
    X1F = X1 + F
    X1F1 = 1.0 + X1F
    E = (log(X1F) - 0.2) / X1F1
    F = F - (X1F1 + 0.5 * E) * E * X1F / (X1F1 + E * (1.0 + E / 3.0))
    X1F = X1 + F
    X1F1 = 1.0 + X1F
    E = (log(X1F) + F - X2) / X1F1
    F = F - (X1F1 + 0.5 * E) * E * X1F / (X1F1 + E * (1.0 + E / 3.0))
    return _HALF_LN10_SQ / (F * F)


_F_LAMINAR_EDGE = 64.0 / RE_LAMINAR
#: Up to this many Re in a 1-D array, :func:`darcy_friction` works float by float.
_SMALL_N = 8
_RE_REFUSE_HIGH = FRICTION_LIMITS["Re"]["refuse"][1]
_ED_REFUSE_HIGH = FRICTION_LIMITS["rel_roughness"]["refuse"][1]


def _darcy_float(Re: float, eD: float) -> float:
    """:func:`darcy_friction` for one float 0 < Re and ε/D the caller has checked against
    :data:`FRICTION_LIMITS` (no checks, no numpy): the same policy and arithmetic."""
    if Re < RE_LAMINAR:
        return 64.0 / Re
    if Re > RE_TURBULENT:
        return _clamond_float(Re, eD)
    w = (Re - RE_LAMINAR) / (RE_TURBULENT - RE_LAMINAR)
    return (1.0 - w) * _F_LAMINAR_EDGE + w * _clamond_float(RE_TURBULENT, eD)


def _darcy_array(Re: np.ndarray, eD) -> np.ndarray:
    """:func:`darcy_friction` for a float array Re ≥ 0 and ε/D the caller has checked
    (no checks): the same policy and arithmetic, skipping the laminar and transition
    branches when no Re needs them."""
    out = colebrook_clamond(np.maximum(Re, RE_TURBULENT), eD)
    if Re.size == 0:
        return out
    lo = Re.min()
    if lo > RE_TURBULENT:
        return out
    if lo > 0.0:
        lam = 64.0 / Re
    else:
        with np.errstate(divide="ignore"):
            lam = 64.0 / Re
    out = np.where(Re < RE_LAMINAR, lam, out)
    zone = (Re >= RE_LAMINAR) & (Re <= RE_TURBULENT)
    if zone.any():
        eD = np.asarray(eD, dtype=float)
        if eD.size <= _SMALL_N:   # Colebrook at Re 4000 for a few ε/D: float by float
            f4000 = np.array([_clamond_float(RE_TURBULENT, e) for e in eD.ravel().tolist()]
                             ).reshape(eD.shape)
        else:
            f4000 = colebrook_clamond(RE_TURBULENT, eD)
        # w is used only inside the zone, where it lies in [0, 1] already (no clip needed)
        w = (Re - RE_LAMINAR) / (RE_TURBULENT - RE_LAMINAR)
        out = np.where(zone, (1.0 - w) * _F_LAMINAR_EDGE + w * f4000, out)
    return out


def _scalar_ok(Re, eD) -> bool:
    """True for a plain real Re > 0 and ε/D inside the refused limits (NaN fails)."""
    return (isinstance(Re, (float, int)) and isinstance(eD, (float, int))
            and not isinstance(Re, bool) and not isinstance(eD, bool)
            and 0.0 < Re <= _RE_REFUSE_HIGH and 0.0 <= eD <= _ED_REFUSE_HIGH
            and isfinite(Re))


def check_friction_inputs(Re, rel_roughness):
    """Refuse Re or ε/D outside :data:`FRICTION_LIMITS` ``refuse`` (negative, non-finite,
    Re > 1e10, ε/D > 0.1) with :class:`~kit.errors.OutOfRangeError` naming the field.

    >>> check_friction_inputs(-5.0, 0.0)
    Traceback (most recent call last):
    ...
    kit.errors.OutOfRangeError: 'Reynolds number' must be between 0 and 1e+10, not -5
    """
    for key, arr in (("Re", Re), ("rel_roughness", rel_roughness)):
        a = np.asarray(arr, dtype=float)
        lo, hi = FRICTION_LIMITS[key]["refuse"]
        if a.size == 0 or (a.min() >= lo and a.max() <= hi):   # NaN fails both: refused
            continue
        bad = ~np.isfinite(a) | (a < lo) | (a > hi)
        if bad.any():
            lim = FRICTION_LIMITS[key]
            raise OutOfRangeError(lim["field"], float(a[bad].flat[0]), None, low=lo, high=hi,
                                  low_inclusive=True)


def friction_range_findings(subject: str, Re, rel_roughness) -> list[Finding]:
    """CHECK findings where Re or ε/D lies between the valid and the refused ranges of
    :data:`FRICTION_LIMITS` (an extrapolation the kit makes, and says so).

    >>> friction_range_findings("run A", [1e9], 1e-4)[0].quantity
    'Reynolds number'
    """
    out = []
    for key, arr in (("Re", Re), ("rel_roughness", rel_roughness)):
        a = np.atleast_1d(np.asarray(arr, dtype=float))
        lim = FRICTION_LIMITS[key]
        lo, hi = lim["valid"]
        over = a > hi
        if over.any():
            out.append(Finding(Severity.CHECK, subject, lim["field"], float(a[over].max()), "-",
                               f"<= {hi:g} (valid range of the friction method)",
                               f"outside the range the friction method is written for: "
                               f"{lim['why']}; the value is extrapolated", lim["source"],
                               high=hi))
    return out


def darcy_friction(Re, rel_roughness):
    """Darcy friction factor for any Re ≥ 0, continuous across the transition zone.

    Parameters
    ----------
    Re : array_like
        Reynolds number, ≥ 0 [-]; Re = 0 returns ``inf`` (the laminar limit; multiply by
        V² = 0 to get a zero loss — callers clip Re to a tiny positive value).
    rel_roughness : array_like
        Relative roughness ε/D, ≥ 0 [-]

    Returns
    -------
    f : ndarray
        Darcy friction factor [-]

    Notes
    -----
    Policy as in the module docstring: 64/Re below Re 2000, Colebrook above 4000, linear in
    Re between. Inputs are checked against :data:`FRICTION_LIMITS`: negative, non-finite,
    Re > 1e10 or ε/D > 0.1 raise :class:`~kit.errors.OutOfRangeError`; Re > 1e8 and
    ε/D > 0.05 are answered (an extrapolation) and reported by
    :func:`friction_range_findings`.

    Examples
    --------
    >>> round(float(darcy_friction(3000.0, 0.0)), 5)
    0.03595

    References
    ----------
    Colebrook (1939); Clamond (2009); Moody, L. F. (1944). Friction factors for pipe flow.
    Trans. ASME 66(8), 671–684.
    """
    if _scalar_ok(Re, rel_roughness):  # one plain number: no numpy on the way
        return np.float64(_darcy_float(float(Re), float(rel_roughness)))
    Re = np.asarray(Re, dtype=float)
    eD = np.asarray(rel_roughness, dtype=float)
    if Re.ndim == 1 and 0 < Re.size <= _SMALL_N and eD.ndim == 0:
        # a few flows: float by float (cheaper than ~25 numpy calls); any doubt, numpy below
        e = float(eD)
        rs = Re.tolist()
        if all(_scalar_ok(r, e) for r in rs):
            return np.array([_darcy_float(r, e) for r in rs])
    check_friction_inputs(Re, eD)
    out = _darcy_array(Re, eD)
    return out if out.ndim else out[()]


def regime(Re):
    """Flow regime names for an array of Re: 'laminar', 'transition' or 'turbulent'.

    >>> [str(r) for r in regime([100.0, 3000.0, 1e5])]
    ['laminar', 'transition', 'turbulent']
    """
    Re = np.asarray(Re, dtype=float)
    return np.where(Re < RE_LAMINAR, "laminar",
                    np.where(Re > RE_TURBULENT, "turbulent", "transition"))


def transition_findings(subject: str, Re) -> list[Finding]:
    """A CHECK finding when any Re lies in the transition zone 2000–4000.

    >>> transition_findings("segment A", [3000.0])[0].severity.value
    'check'
    """
    Re = np.atleast_1d(np.asarray(Re, dtype=float))
    inside = (Re >= RE_LAMINAR) & (Re <= RE_TURBULENT)
    if not inside.any():
        return []
    return [Finding(
        Severity.CHECK, subject, "Reynolds number", float(Re[inside][0]), "-",
        f"outside {RE_LAMINAR:.0f}–{RE_TURBULENT:.0f}",
        "flow in the laminar–turbulent transition; friction is uncertain there "
        "(a linear blend is used)",
        "Moody (1944); blend policy: this kit")]
