"""Pump curves from datasheet points: least-squares fit, affinity laws, pumps in parallel and series.

A :class:`PumpCurve` stores the maker's datasheet points (flow [m³/s], head [m] of the pumped
liquid, and optionally efficiency [-], NPSHr [m] and shaft power [W] on the same flows), the
speed the points were taken at **in rpm** (``speed_rpm``; rpm, not rad/s — pint converts
``"1450 rpm"`` to ``1/s`` as rad/s, so the edge must ask for ``revolution/minute``), and the
impeller diameter [m]. Each curve is fitted by polynomial least squares
(:data:`FIT_METHODS`); :meth:`PumpCurve.fit_report` shows the degree and the residuals.

Affinity laws (Karassik, Messina, Cooper & Heald, *Pump Handbook*, 4th ed., McGraw-Hill 2008,
ch. 2; Hydraulic Institute) — from memory:

- speed: Q ∝ n, H ∝ n², P ∝ n³, η unchanged along the parabola H ∝ Q²; NPSHr ∝ n²
  (approximate: the exponent found in tests varies, commonly quoted 1.5–2.5);
- impeller trim (the simple law): Q ∝ D, H ∝ D², P ∝ D³; reliable only for small trims.

:func:`parallel` sums flows at equal head, :func:`series` sums heads at equal flow; both return
a :class:`PumpSet` with the same ``head(Q)`` interface, so the operating-point code takes
either.

Example
-------
>>> import numpy as np
>>> p = PumpCurve([0.0, 0.01, 0.02, 0.03], [40.0, 38.0, 32.0, 22.0], speed_rpm=2900.0,
...               diameter=0.2, efficiency=[0.0, 0.55, 0.72, 0.68], name="P-1")
>>> round(float(p.head(0.02)), 2)
32.0
>>> round(float(p.at_speed(1450.0).head(0.01)), 2)
8.0
"""

from __future__ import annotations

from bisect import bisect_right
from dataclasses import dataclass
from functools import cached_property

import numpy as np
from numpy.polynomial import Polynomial
from numpy.polynomial import polynomial as npoly

from kit.core.findings import Finding, Severity
from kit.errors import InputError, OutOfRangeError, UnknownChoiceError, check_range

__all__ = [
    "FIT_METHODS", "AFFINITY_LIMITS", "AFFINITY_SOURCE", "CurveFit", "PumpCurve", "PumpSet",
    "parallel", "series",
]

from kit.core.constants import G  # noqa: E402  (one gravity constant)

#: Curve-fit methods: polynomial least squares (numpy) with default degrees per curve.
#: ``efficiency`` default: 3 with 5 or more points, else 2.
FIT_METHODS: dict[str, dict] = {
    "polynomial": {
        "label": "polynomial least squares (numpy.polynomial.Polynomial.fit)",
        "degrees": {"head": 2, "efficiency": (2, 3), "npshr": 2, "power": 2},
        "max_degree": 4,
        "source": "ordinary least squares, Legendre 1805 / Gauss 1809",
    },
}

#: Validity limits of the affinity laws, as data. Ratios are to the datasheet speed/diameter.
AFFINITY_LIMITS: dict[str, dict] = {
    "speed": {"ratio_check_below": 0.4, "ratio_check_above": 1.0,
              "source": "common practice, no source (accuracy falls at low speed; "
                        "above rated speed the maker must confirm motor, casing and seal)"},
    "trim": {"ratio_check_below": 0.9, "ratio_min": 0.5, "ratio_max": 1.0,
             "source": "common practice, from memory: the simple trim law holds for trims of "
                       "up to ~10 % (some say 20 %) of the full diameter; maker's trim curves "
                       "govern"},
    "head_rise_tolerance": {"fraction_of_shutoff": 0.02,
                            "source": "common practice, no source"},
}

AFFINITY_SOURCE = ("Karassik, I. J., Messina, J. P., Cooper, P., Heald, C. C. (2008). Pump "
                   "Handbook, 4th ed. McGraw-Hill, ch. 2 (affinity laws; from memory); "
                   "Hydraulic Institute")

_CURVE_UNITS = {"head": "m", "efficiency": "-", "npshr": "m", "power": "W"}


_SCALARS = (float, int, np.floating, np.integer)


def _horner(c: tuple, off: float, scl: float, Q):
    """Σ c_k x^k at x = off + scl·Q by Horner's rule, ``c`` highest degree first.

    The operations and their order are those of :func:`numpy.polynomial.polynomial.polyval`
    (``c0 = c[-1] + x*0``, then ``c0 = c[-i] + c0*x``), so results are bit-for-bit the same;
    a scalar ``Q`` stays in Python floats (about 20× faster than numpy on one value) and
    comes back as ``numpy.float64``.
    """
    if isinstance(Q, _SCALARS) and not isinstance(Q, (bool, np.bool_)):
        x = off + scl * float(Q)
        y = c[0] + x * 0.0
        for ci in c[1:]:
            y = ci + y * x
        return np.float64(y)
    x = off + scl * np.asarray(Q, dtype=float)
    y = c[0] + x * 0
    for ci in c[1:]:
        y = ci + y * x
    return y


def _interp_float(x: float, xp: list, fp: list) -> float:
    """:func:`numpy.interp` at one point, in Python floats with numpy's arithmetic.

    ``xp`` non-decreasing; the segment is the one with xp[j] ≤ x < xp[j+1] (so the last of
    equal abscissae), a point on a node gives its ordinate, and outside the table the end
    ordinates — as numpy does, so the result is the same to the last bit.
    """
    if x != x:
        return x
    if x < xp[0]:
        return fp[0]
    if x >= xp[-1]:
        return fp[-1]
    j = bisect_right(xp, x) - 1
    if xp[j] == x:
        return fp[j]
    slope = (fp[j + 1] - fp[j]) / (xp[j + 1] - xp[j])
    y = slope * (x - xp[j]) + fp[j]
    if y != y:
        y = slope * (x - xp[j + 1]) + fp[j + 1]
        if y != y and fp[j] == fp[j + 1]:
            y = fp[j]
    return y


@dataclass(frozen=True)
class CurveFit:
    """One fitted curve: its polynomial, degree and residuals at the datasheet points."""

    curve: str
    degree: int
    polynomial: Polynomial
    max_residual: float
    rms_residual: float
    unit: str
    points: int

    @cached_property
    def _mapped(self) -> tuple[float, float, np.ndarray, np.ndarray]:
        off, scl = self.polynomial.mapparms()
        c = self.polynomial.coef
        return float(off), float(scl), c, npoly.polyder(c) * scl

    @cached_property
    def _horner_coefs(self) -> tuple[float, float, tuple, tuple]:
        """The map and both coefficient lists as plain floats, highest degree first."""
        off, scl, c, d = self._mapped
        return (off, scl, tuple(float(x) for x in c[::-1]), tuple(float(x) for x in d[::-1]))

    def value(self, Q):
        """The fitted curve at ``Q`` [m³/s] (Horner on the fit's scaled variable).

        Horner's rule in the same order of operations as :func:`numpy.polynomial.polynomial.
        polyval` (so the same numbers to the last bit); a scalar flow is evaluated in plain
        Python floats, an array with numpy.

        >>> f = _fit("head", np.array([0.0, 0.01, 0.02]), np.array([30.0, 28.0, 22.0]), 2)
        >>> round(float(f.value(0.015)), 6), f.value(np.array([0.0, 0.02])).round(6).tolist()
        (25.5, [30.0, 22.0])
        """
        off, scl, c, _ = self._horner_coefs
        return _horner(c, off, scl, Q)

    def slope(self, Q):
        """d(curve)/dQ at ``Q`` [m³/s] (Horner, as :meth:`value`)."""
        off, scl, _, d = self._horner_coefs
        return _horner(d, off, scl, Q)

    def value_float(self, q: float) -> float:
        """:meth:`value` at one flow ``q`` [m³/s] as a Python float (the same bits)."""
        off, scl, c, _ = self._horner_coefs
        x = off + scl * q
        y = c[0] + x * 0.0
        for ci in c[1:]:
            y = ci + y * x
        return y

    def slope_float(self, q: float) -> float:
        """:meth:`slope` at one flow ``q`` [m³/s] as a Python float (the same bits)."""
        off, scl, _, d = self._horner_coefs
        x = off + scl * q
        y = d[0] + x * 0.0
        for di in d[1:]:
            y = di + y * x
        return y

    def as_dict(self) -> dict:
        return {"curve": self.curve, "degree": self.degree, "max_residual": self.max_residual,
                "rms_residual": self.rms_residual, "unit": self.unit, "points": self.points,
                "coefficients": [float(c) for c in self.polynomial.convert().coef]}


def _as_points(field: str, values, n: int | None, unit: str) -> np.ndarray:
    try:
        arr = np.asarray(values, dtype=float).reshape(-1)
    except (TypeError, ValueError):
        raise InputError(field, values, "must be a list of numbers", unit) from None
    if n is not None and arr.size != n:
        raise InputError(field, arr.size, f"must have one value per flow point ({n} flows)",
                         "values")
    for i, v in enumerate(arr):
        if not np.isfinite(v):
            raise OutOfRangeError(f"{field} point {i + 1}", float(v), unit)
    return arr


def _non_negative_points(field: str, values, n: int, unit: str) -> np.ndarray:
    """:func:`_as_points`, each value also at least 0 (``'<field> point i'`` names a bad one)."""
    arr = _as_points(field, values, n, unit)
    for i, v in enumerate(arr):
        check_range(f"{field} point {i + 1}", v, unit, low=0.0, low_inclusive=True)
    return arr


def _fit(curve: str, Q: np.ndarray, y: np.ndarray, degree: int) -> CurveFit:
    poly = Polynomial.fit(Q, y, degree)
    res = poly(Q) - y
    return CurveFit(curve, degree, poly, float(np.max(np.abs(res))),
                    float(np.sqrt(np.mean(res ** 2))), _CURVE_UNITS[curve], int(Q.size))


class PumpCurve:
    """A pump's performance from datasheet points, fitted by polynomial least squares.

    Parameters
    ----------
    flow : array_like
        Datasheet flows, ≥ 3 points, ≥ 0, strictly increasing [m³/s]
    head : array_like
        Head at each flow, ≥ 0, not rising with flow by more than ``head_rise_tolerance`` ×
        the first-point head [m of pumped liquid]
    speed_rpm : float
        Speed the datasheet was taken at [rpm]
    diameter : float
        Impeller diameter of the datasheet curve [m]
    efficiency : array_like, optional
        Pump efficiency at each flow, 0 < η ≤ 1 (η = 0 allowed at zero flow) [-]
    npshr : array_like, optional
        Net positive suction head required at each flow, ≥ 0 [m]
    power : array_like, optional
        Shaft power at each flow for liquid of density ``test_density``, ≥ 0 [W]
    name : str, optional
        Tag of the pump ("P-1") [-]
    degrees : dict, optional
        Polynomial degree per curve (keys ``head``, ``efficiency``, ``npshr``, ``power``);
        1 ≤ degree ≤ min(points − 1, 4) [-]
    test_density : float, optional
        Density on which a datasheet power curve is based; makers usually state water,
        ~1000 kg/m³ — check the datasheet [kg/m³]
    head_rise_tolerance : float, optional
        Allowed rise of head with flow, as a fraction of the first-point head [-]

    Notes
    -----
    Evaluation beyond the last datasheet flow returns the extrapolated fit;
    :meth:`range_findings` reports it as CHECK. Fitted efficiency is clipped to [0, 1].
    Speed is kept in rpm (ratios only are used); the datasheet speed and diameter are
    remembered through :meth:`at_speed` and :meth:`trimmed`.

    Examples
    --------
    >>> p = PumpCurve([0.0, 0.01, 0.02], [30.0, 28.0, 22.0], speed_rpm=1450.0, diameter=0.25)
    >>> round(float(p.head(0.015)), 3)
    25.5

    References
    ----------
    .. [1] Karassik, I. J. et al. (2008). Pump Handbook, 4th ed. McGraw-Hill.
    """

    def __init__(self, flow, head, *, speed_rpm: float, diameter: float, efficiency=None,
                 npshr=None, power=None, name: str = "pump", degrees: dict | None = None,
                 test_density: float = 1000.0, head_rise_tolerance: float | None = None,
                 _datasheet: tuple[float, float] | None = None,
                 _findings: tuple[Finding, ...] = ()):
        self.name = str(name)
        Q = _as_points(f"flow of pump '{name}'", flow, None, "m³/s")
        if Q.size < 3:
            raise InputError(f"flow of pump '{name}'", int(Q.size),
                             "needs at least 3 datasheet points", "points")
        H = _as_points(f"head of pump '{name}'", head, Q.size, "m")
        for i in range(Q.size):
            check_range(f"flow of pump '{name}' point {i + 1}", Q[i], "m³/s", low=0.0,
                        low_inclusive=True)
            check_range(f"head of pump '{name}' point {i + 1}", H[i], "m", low=0.0,
                        low_inclusive=True)
        for i in range(1, Q.size):
            if Q[i] == Q[i - 1]:
                raise InputError(f"flow of pump '{name}' point {i + 1}", float(Q[i]),
                                 f"duplicates point {i}; datasheet flows must be distinct",
                                 "m³/s")
            if Q[i] < Q[i - 1]:
                raise InputError(f"flow of pump '{name}' point {i + 1}", float(Q[i]),
                                 f"must be greater than point {i} ({Q[i - 1]:.6g} m³/s); "
                                 "datasheet flows must strictly increase", "m³/s")
        check_range(f"head of pump '{name}' point 1", H[0], "m", low=0.0)
        tol = (AFFINITY_LIMITS["head_rise_tolerance"]["fraction_of_shutoff"]
               if head_rise_tolerance is None else
               check_range("head rise tolerance", head_rise_tolerance, "-", low=0.0,
                           low_inclusive=True, high=1.0))
        running_min = H[0]
        for i in range(1, H.size):
            if H[i] - running_min > tol * H[0] * (1 + 1e-12):
                raise InputError(
                    f"head of pump '{name}' point {i + 1}", float(H[i]),
                    f"rises {H[i] - running_min:.4g} m above the lower head of an earlier point; "
                    f"allowed rise is {tol:.3g} × first-point head = {tol * H[0]:.4g} m "
                    "(a rising curve is unstable; enter the stable part only)", "m")
            running_min = min(running_min, H[i])
        self.speed_rpm = check_range(f"speed of pump '{name}'", speed_rpm, "rpm", low=0.0)
        self.diameter = check_range(f"impeller diameter of pump '{name}'", diameter, "m", low=0.0)
        self.test_density = check_range("test density", test_density, "kg/m³", low=0.0)
        self.head_rise_tolerance = tol
        self.datasheet_speed_rpm, self.datasheet_diameter = (
            _datasheet if _datasheet is not None else (self.speed_rpm, self.diameter))
        self.scaling_findings: tuple[Finding, ...] = tuple(_findings)

        self.flow, self.head_points = Q, H
        self.efficiency_points = self.npshr_points = self.power_points = None
        if efficiency is not None:
            eta = _as_points(f"efficiency of pump '{name}'", efficiency, Q.size, "-")
            for i, e in enumerate(eta):
                if Q[i] == 0.0 and e == 0.0:
                    continue  # zero efficiency at shut-off is physical
                check_range(f"efficiency of pump '{name}' point {i + 1}", e, "-", low=0.0, high=1.0)
            self.efficiency_points = eta
        if npshr is not None:
            self.npshr_points = _non_negative_points(f"NPSHr of pump '{name}'", npshr, Q.size, "m")
        if power is not None:
            self.power_points = _non_negative_points(f"power of pump '{name}'", power, Q.size, "W")

        self.degrees = self._degrees(degrees)
        self.fits: dict[str, CurveFit] = {"head": _fit("head", Q, H, self.degrees["head"])}
        for key, pts in (("efficiency", self.efficiency_points), ("npshr", self.npshr_points),
                         ("power", self.power_points)):
            if pts is not None:
                self.fits[key] = _fit(key, Q, pts, self.degrees[key])
        self._table = None  # lazily built inverse table (head -> flow), see _inverse
        self._table_lists = None

    # ------------------------------------------------------------------ construction helpers
    def _degrees(self, degrees: dict | None) -> dict[str, int]:
        method = FIT_METHODS["polynomial"]
        n = self.flow.size
        out = {k: (v if isinstance(v, int) else (v[1] if n >= 5 else v[0]))
               for k, v in method["degrees"].items()}
        for key, deg in (degrees or {}).items():
            if key not in out:
                raise UnknownChoiceError("fit degree curve", key, list(out))
            hi = min(n - 1, method["max_degree"])
            out[key] = int(check_range(f"fit degree of {key}", deg, None, low=1, high=hi,
                                       low_inclusive=True))
        for key in out:
            out[key] = min(out[key], n - 1)
        return out

    def _clone(self, Q, H, eta, npr, pw, speed_rpm, diameter, findings, name=None):
        return PumpCurve(Q, H, speed_rpm=speed_rpm, diameter=diameter, efficiency=eta, npshr=npr,
                         power=pw, name=self.name if name is None else name,
                         degrees=dict(self.degrees), test_density=self.test_density,
                         head_rise_tolerance=self.head_rise_tolerance,
                         _datasheet=(self.datasheet_speed_rpm, self.datasheet_diameter),
                         _findings=tuple(self.scaling_findings) + tuple(findings))

    # ------------------------------------------------------------------ evaluation
    @property
    def q_end(self) -> float:
        """Last datasheet flow [m³/s]."""
        return float(self.flow[-1])

    @property
    def shutoff_head(self) -> float:
        """Fitted head at zero flow [m]."""
        return float(self.fits["head"].value(0.0))

    def head(self, Q):
        """Fitted head at flows ``Q`` [m³/s] -> [m] (extrapolated beyond the datasheet)."""
        return self.fits["head"].value(Q)

    def head_slope(self, Q):
        """dH/dQ of the fitted head curve [m/(m³/s)]."""
        return self.fits["head"].slope(Q)

    def _need(self, key: str, what: str):
        if key not in self.fits:
            raise InputError(f"{what} of pump '{self.name}'", "none",
                             "is needed but no datasheet points were given")
        return self.fits[key].value

    def efficiency(self, Q):
        """Fitted efficiency at ``Q`` [m³/s], clipped to [0, 1] -> [-]."""
        if "efficiency" not in self.fits and "power" in self.fits:
            Q = np.asarray(Q, dtype=float)
            P = self.power(Q, self.test_density)
            with np.errstate(divide="ignore", invalid="ignore"):
                return np.clip(self.test_density * G * Q * self.head(Q) / P, 0.0, 1.0)
        return np.clip(self._need("efficiency", "efficiency")(np.asarray(Q, dtype=float)), 0.0, 1.0)

    def npshr(self, Q):
        """Fitted NPSH required at ``Q`` [m³/s] -> [m]."""
        return np.maximum(self._need("npshr", "NPSHr")(np.asarray(Q, dtype=float)), 0.0)

    @property
    def has_npshr(self) -> bool:
        return "npshr" in self.fits

    @property
    def has_efficiency(self) -> bool:
        return "efficiency" in self.fits or "power" in self.fits

    def power(self, Q, rho: float):
        """Shaft power at ``Q`` [m³/s] for liquid density ``rho`` [kg/m³] -> [W].

        From the datasheet power curve scaled by ``rho / test_density`` when one was given,
        else ρ g Q H / η. NaN where η = 0 and no power curve exists.
        """
        rho = check_range("density", rho, "kg/m³", low=0.0)
        Q = np.asarray(Q, dtype=float)
        if "power" in self.fits:
            return self.fits["power"].value(Q) * rho / self.test_density
        eta = self.efficiency(Q)
        with np.errstate(divide="ignore", invalid="ignore"):
            return np.where(eta > 0, rho * G * Q * self.head(Q) / np.where(eta > 0, eta, 1.0),
                            np.nan)

    @cached_property
    def bep(self) -> tuple[float, float, float]:
        """Best efficiency point (flow [m³/s], head [m], efficiency [-]) on the fitted η curve
        within the datasheet flow range."""
        if not self.has_efficiency:
            raise InputError(f"efficiency of pump '{self.name}'", "none",
                             "is needed for the best efficiency point")
        Qs = np.linspace(self.flow[0], self.flow[-1], 2001)
        eta = self.efficiency(Qs)
        i = int(np.nanargmax(eta))
        lo, hi = Qs[max(i - 1, 0)], Qs[min(i + 1, Qs.size - 1)]
        Qf = np.linspace(lo, hi, 201)
        j = int(np.nanargmax(self.efficiency(Qf)))
        q = float(Qf[j])
        return q, float(self.head(q)), float(self.efficiency(q))

    def _inverse(self) -> tuple:
        """The head → flow table (built once): flows 0 to 1.5 × the last datasheet flow and
        the running minimum of the fitted head there, as arrays and as float lists."""
        if self._table is None:
            Qs = np.linspace(0.0, 1.5 * self.q_end, 1025)
            Hs = np.minimum.accumulate(self.head(Qs))
            self._table = (Qs, Hs)
            self._table_lists = ((-Hs).tolist(), Qs.tolist(), float(Hs[0]), float(Qs[-1]))
        return self._table

    def flow_at_head(self, H):
        """Flow at which the fitted curve gives head ``H`` [m] -> [m³/s].

        Zero where H ≥ shut-off head (a check valve holds the pump closed). Heads below the
        curve's lowest value within 1.5 × the last datasheet flow give that limit flow.

        Method: linear interpolation on a 1025-point table of the curve's running minimum
        (a monotone falling envelope), then Newton's method on the fitted polynomial (at most
        six steps, none where the curve does not fall) to machine precision. One head is
        solved in plain Python floats, with the same operations as the array path.

        >>> p = PumpCurve([0, 0.01, 0.02], [30.0, 28.0, 22.0], speed_rpm=1450, diameter=0.25)
        >>> round(float(p.flow_at_head(25.5)), 9), p.flow_at_head([31.0, 28.0]).round(9).tolist()
        (0.015, [0.0, 0.01])
        """
        if isinstance(H, _SCALARS) and not isinstance(H, (bool, np.bool_)):
            return np.array(self.flow_at_head_float(float(H)))
        Qs, Hs = self._inverse()
        H = np.asarray(H, dtype=float)
        if H.size == 1:
            return np.array(self.flow_at_head_float(float(H.reshape(-1)[0]))).reshape(H.shape)
        q = np.interp(-H, -Hs, Qs)  # Hs non-increasing -> -Hs non-decreasing
        off, scl, c, d = self.fits["head"]._horner_coefs
        q_hi = float(Qs[-1])
        tol = 1e-15 * q_hi
        where, maximum, minimum = np.where, np.maximum, np.minimum
        for _ in range(6):  # Newton polish from the table value; stops at machine precision
            x = off + scl * q  # Horner as CurveFit.value/slope (the same bits), x shared
            slope = d[0] + x * 0
            for di in d[1:]:
                slope = di + slope * x
            y = c[0] + x * 0
            for ci in c[1:]:
                y = ci + y * x
            ok = slope < 0
            step = where(ok, (y - H) / where(ok, slope, -1.0), 0.0)
            q = minimum(maximum(q - step, 0.0), q_hi)  # np.clip, nan kept alike
            if (np.abs(step) <= tol).all():
                break
        return where(H >= Hs[0], 0.0, q)

    def flow_at_head_float(self, H: float) -> float:
        """:meth:`flow_at_head` at one head ``H`` [m] as a Python float [m³/s].

        The same table, interpolation and Newton steps as the array path, in plain floats.
        """
        self._inverse()
        xp, fp, h0, q_hi = self._table_lists
        q = _interp_float(-H, xp, fp)
        off, scl, c, d = self.fits["head"]._horner_coefs
        tol = 1e-15 * q_hi
        for _ in range(6):
            x = off + scl * q
            s = d[0] + x * 0.0
            for di in d[1:]:
                s = di + s * x
            if s < 0:
                y = c[0] + x * 0.0
                for ci in c[1:]:
                    y = ci + y * x
                step = (y - H) / s
            else:
                step = 0.0
            q = q - step
            if q < 0.0:
                q = 0.0
            elif q > q_hi:
                q = q_hi
            if abs(step) <= tol:
                break
        return 0.0 if H >= h0 else q

    def range_findings(self, Q, subject: str | None = None) -> list[Finding]:
        """CHECK findings where ``Q`` lies outside the datasheet flows [m³/s]."""
        out = []
        subject = subject or f"pump '{self.name}'"
        for q in np.atleast_1d(np.asarray(Q, dtype=float)):
            if q > self.q_end * (1 + 1e-9):
                out.append(Finding(Severity.CHECK, subject, "flow", float(q), "m³/s",
                                   f"<= {self.q_end:.6g} m³/s (last datasheet flow)",
                                   "curve used beyond the last datasheet flow: the fit is "
                                   "extrapolated; get the maker's curve to run-out and check "
                                   "motor power and NPSHr there", "common practice, no source"))
            elif q < self.flow[0] * (1 - 1e-9):
                out.append(Finding(Severity.CHECK, subject, "flow", float(q), "m³/s",
                                   f">= {self.flow[0]:.6g} m³/s (first datasheet flow)",
                                   "curve used below the first datasheet flow: the fit is "
                                   "extrapolated", "common practice, no source"))
        return out

    def fit_findings(self, rel_tol: float = 0.02) -> list[Finding]:
        """CHECK where the head fit misses a datasheet point by more than ``rel_tol`` × shut-off."""
        f = self.fits["head"]
        lim = rel_tol * float(self.head_points[0])
        sev = Severity.CHECK if f.max_residual > lim else Severity.PASS
        return [Finding(sev, f"pump '{self.name}'", "head fit max residual", f.max_residual, "m",
                        f"<= {lim:.4g} m", f"degree-{f.degree} polynomial fit of the head points",
                        "common practice, no source")]

    def fit_report(self) -> dict[str, dict]:
        """Degree, max and RMS residual per fitted curve (units in each entry)."""
        return {k: v.as_dict() for k, v in self.fits.items()}

    # ------------------------------------------------------------------ affinity laws
    def at_speed(self, speed_rpm: float) -> PumpCurve:
        """The curve at another speed by the affinity laws [rpm] -> PumpCurve.

        Q ∝ n, H ∝ n², P ∝ n³, η unchanged, NPSHr ∝ n² (approximate) (Karassik et al. 2008,
        from memory). The new curve remembers the datasheet speed; findings say when the
        scaling is approximate.

        >>> p = PumpCurve([0, 0.01, 0.02], [30.0, 28.0, 22.0], speed_rpm=1450, diameter=0.25)
        >>> round(float(p.at_speed(1160).head(0.008)), 3)
        17.92
        """
        n = check_range(f"speed of pump '{self.name}'", speed_rpm, "rpm", low=0.0)
        r = n / self.speed_rpm
        lim = AFFINITY_LIMITS["speed"]
        ratio_ds = n / self.datasheet_speed_rpm
        findings = []
        subject = f"pump '{self.name}' at {n:.0f} rpm"
        if ratio_ds < lim["ratio_check_below"]:
            findings.append(Finding(Severity.CHECK, subject, "speed ratio", ratio_ds, "-",
                                    f">= {lim['ratio_check_below']}", "affinity laws lose accuracy "
                                    "at low speed; efficiency falls", lim["source"]))
        if ratio_ds > lim["ratio_check_above"] * (1 + 1e-12):
            findings.append(Finding(Severity.CHECK, subject, "speed ratio", ratio_ds, "-",
                                    "<= 1 (datasheet speed)", "above the datasheet speed: the "
                                    "maker must confirm speed, casing pressure and motor power; "
                                    "local codes and licensed professional practice govern",
                                    lim["source"]))
        if self.npshr_points is not None and r != 1.0:
            findings.append(Finding(Severity.CHECK, subject, "NPSHr scaling", r, "-",
                                    "NPSHr ∝ n² assumed", "NPSHr scaled by the speed ratio squared "
                                    "is approximate (exponents of ~1.5–2.5 are reported); ask the "
                                    "maker for NPSHr at this speed", AFFINITY_SOURCE))
        return self._clone(
            self.flow * r, self.head_points * r * r, self.efficiency_points,
            None if self.npshr_points is None else self.npshr_points * r * r,
            None if self.power_points is None else self.power_points * r ** 3,
            n, self.diameter, findings)

    def trimmed(self, diameter: float) -> PumpCurve:
        """The curve with a trimmed impeller by the simple trim law [m] -> PumpCurve.

        Q ∝ D, H ∝ D², P ∝ D³, η unchanged (Karassik et al. 2008, from memory). Refused above
        the datasheet diameter or below half of it; a CHECK finding below 90 % of it.

        >>> p = PumpCurve([0, 0.01, 0.02], [30.0, 28.0, 22.0], speed_rpm=1450, diameter=0.25)
        >>> round(float(p.trimmed(0.225).head(0.009)), 3)
        22.68
        """
        lim = AFFINITY_LIMITS["trim"]
        D = check_range(f"trimmed impeller diameter of pump '{self.name}'", diameter, "m",
                        low=lim["ratio_min"] * self.datasheet_diameter,
                        high=lim["ratio_max"] * self.datasheet_diameter, low_inclusive=True)
        r = D / self.diameter
        ratio_ds = D / self.datasheet_diameter
        findings = []
        if ratio_ds < lim["ratio_check_below"]:
            findings.append(Finding(Severity.CHECK, f"pump '{self.name}' trimmed to {D:.4g} m",
                                    "trim ratio", ratio_ds, "-", f">= {lim['ratio_check_below']}",
                                    "simple trim law (Q ∝ D, H ∝ D²) beyond its usual range: it "
                                    "overstates head and efficiency; use the maker's trim curves",
                                    lim["source"]))
        return self._clone(
            self.flow * r, self.head_points * r * r, self.efficiency_points, self.npshr_points,
            None if self.power_points is None else self.power_points * r ** 3,
            self.speed_rpm, D, findings)

    def __repr__(self) -> str:
        return (f"PumpCurve(name={self.name!r}, speed_rpm={self.speed_rpm:g}, "
                f"diameter={self.diameter:g}, points={self.flow.size})")


def _distinct(pumps) -> tuple[list, list]:
    """The distinct curve objects of a set, and each member's index into them."""
    distinct: list = []
    where: dict = {}
    idx = []
    for p in pumps:
        key = id(p)
        if key not in where:
            where[key] = len(distinct)
            distinct.append(p)
        idx.append(where[key])
    return distinct, idx


def _per_member(pumps, fn) -> list:
    """``[fn(p) for p in pumps]``, with ``fn`` called once per distinct curve object (a set
    of identical units lists one curve several times; the answer is the same)."""
    done: dict = {}
    out = []
    for p in pumps:
        key = id(p)
        if key not in done:
            done[key] = fn(p)
        out.append(done[key])
    return out


class PumpSet:
    """Pumps in parallel (flows add at equal head) or series (heads add at equal flow).

    Parameters
    ----------
    pumps : sequence of PumpCurve
        Two or more pumps [-]
    arrangement : str
        ``"parallel"`` or ``"series"`` [-]
    name : str, optional
        Tag of the set [-]

    Notes
    -----
    Parallel: each pump runs at the common head; a pump whose shut-off head is at or below it
    delivers zero — its check valve holds it closed (each parallel pump needs a check valve).
    Series: the first pump in the list takes suction; the set's NPSHr is that pump's. A series
    pump driven beyond its zero-head flow would act as a resistance (negative head is summed).

    Examples
    --------
    >>> p = PumpCurve([0, 0.01, 0.02], [30.0, 28.0, 22.0], speed_rpm=1450, diameter=0.25)
    >>> round(float(parallel([p, p]).head(0.02)), 3)
    28.0
    """

    ARRANGEMENTS = ("parallel", "series")

    def __init__(self, pumps, arrangement: str, name: str | None = None):
        pumps = list(pumps)
        if arrangement not in self.ARRANGEMENTS:
            raise UnknownChoiceError("pump arrangement", arrangement, self.ARRANGEMENTS)
        if len(pumps) < 2:
            raise InputError("pumps in set", len(pumps), "needs at least 2 pumps", "pumps")
        for i, p in enumerate(pumps):
            if not isinstance(p, PumpCurve):
                raise InputError(f"pump {i + 1} of set", type(p).__name__, "must be a PumpCurve")
        self.pumps = pumps
        self.arrangement = arrangement
        self.name = name or f"{len(pumps)} in {arrangement}"
        self.scaling_findings = tuple(f for p in pumps for f in p.scaling_findings)
        self.test_density = pumps[0].test_density
        if arrangement == "parallel":
            h_top = max(p.shutoff_head for p in pumps)
            h_low = max(float(p.head(1.5 * p.q_end)) for p in pumps)
            Hs = np.linspace(h_top, h_low, 1025)
            Qt = self._members_at_head(Hs).sum(axis=0)
            self._table = (Hs, Qt)
            self._table_lists = (Qt.tolist(), Hs.tolist(), float(Hs[-1]), float(Hs[0]))
            #: flow residual of a settled Newton solve: 1e-9 of the table's largest flow
            self._q_tol = 1e-9 * float(Qt[-1])
            h_end = max(float(p.head(p.q_end)) for p in pumps)
            self._q_end = float(self._members_at_head(np.array([h_end])).sum())
        else:
            self._q_end = min(p.q_end for p in pumps)

    def _members_at_head(self, H) -> np.ndarray:
        """Each member's flow at heads ``H`` [m] -> (members, *H.shape) [m³/s]; a member
        listed more than once (the same curve object) is solved once in this call."""
        H = np.asarray(H, dtype=float)
        if H.size == 1:  # one head: each member in plain floats (the same bits as arrays)
            h = float(H.reshape(-1)[0])
            return np.array(_per_member(self.pumps, lambda p: p.flow_at_head_float(h))).reshape(
                (len(self.pumps),) + H.shape)
        return np.array(_per_member(self.pumps, lambda p: p.flow_at_head(H)))

    def _index_of(self, p) -> int:
        """Position of the first member that is the curve object ``p``."""
        for i, m in enumerate(self.pumps):
            if m is p:
                return i
        raise ValueError(p)

    @property
    def q_end(self) -> float:
        """Set flow at which the first member reaches its last datasheet flow [m³/s]."""
        return self._q_end

    @property
    def shutoff_head(self) -> float:
        if self.arrangement == "parallel":
            return max(p.shutoff_head for p in self.pumps)
        return float(sum(p.shutoff_head for p in self.pumps))

    def head(self, Q):
        """Head of the set at set flows ``Q`` [m³/s] -> [m].

        Series: the members' heads summed at the set flow. Parallel: the head H with
        Σ Q_i(H) = Q (each member's :meth:`PumpCurve.flow_at_head`, zero above its shut-off)
        by Newton's method (dQ_i/dH = 1 / H_i'(Q_i)) from linear interpolation on a
        1025-point table of the combined curve, H held between the table's ends; at most
        eight steps, to a step of 1e-14 × the highest shut-off head. Where Newton has not
        settled, or settled with the flows not adding up to Q (to 1e-9 of the table's
        largest flow) — a member switching on at its shut-off head, where its flow rises
        as a square root — Brent's method on the bracket gives H instead. One flow is
        solved in plain Python floats with the same operations as the array path.

        >>> p = PumpCurve([0, 0.01, 0.02], [30.0, 28.0, 22.0], speed_rpm=1450, diameter=0.25)
        >>> s = parallel([p, p.trimmed(0.23)])
        >>> round(float(s.head(0.02)), 6), s.head([0.0, 0.02]).round(6).tolist()
        (25.032448, [30.0, 25.032448])
        """
        Q = np.asarray(Q, dtype=float)
        if self.arrangement == "series":
            return sum(p.head(Q) for p in self.pumps)
        if Q.size == 1:
            return np.array(self.head_float(float(Q.reshape(-1)[0]))).reshape(Q.shape)
        Hs, Qt = self._table
        H = np.interp(Q, Qt, Hs)  # Qt increases as Hs decreases
        h_lo, h_hi = Hs[-1], Hs[0]
        tol = 1e-14 * h_hi
        where = np.where
        for _ in range(8):  # Newton on sum(Q_i(H)) - Q, dQ_i/dH = 1/H_i'(Q_i)
            qi = self._members_at_head(H)
            F = qi.sum(axis=0) - Q
            dF = np.zeros_like(np.atleast_1d(H), dtype=float)
            slopes = _per_member(self.pumps, lambda p, _q=qi: p.head_slope(
                _q[self._index_of(p)]))
            for q, s in zip(qi, slopes, strict=True):
                on = (q > 0) & (s < 0)
                dF = dF + where(on, 1.0 / where(on, s, -1.0), 0.0)
            ok = dF < 0
            step = where(ok, F / where(ok, dF, -1.0), 0.0)
            H = np.minimum(np.maximum(H - step, h_lo), h_hi)  # np.clip, nan kept alike
            if (np.abs(step) <= tol).all():
                break
        # where Newton has not settled, or settled off the curve (every member shut with
        # no slope to follow), Brent's method on the bracket gives the head
        bad = ~(np.abs(step) <= tol) | (np.abs(F) > self._q_tol)
        if bad.any():
            H = np.array(H, dtype=float, copy=True)
            Qf = np.broadcast_to(Q, H.shape)
            for i in np.flatnonzero(bad.reshape(-1)):
                H.flat[i] = self._head_bracketed(float(Qf.flat[i]))
        return H.reshape(Q.shape) if Q.shape else H.reshape(())

    def head_float(self, Q: float) -> float:
        """:meth:`head` at one set flow ``Q`` [m³/s] as a Python float [m]."""
        if self.arrangement == "series":
            return float(sum(p.head(float(Q)) for p in self.pumps))
        Qt, Hs, h_lo, h_hi = self._table_lists
        H = _interp_float(Q, Qt, Hs)
        pumps = self.pumps
        distinct, idx = _distinct(pumps)
        fits = [p.fits["head"] for p in distinct]
        tol = 1e-14 * h_hi
        many = len(pumps) >= 8
        for _ in range(8):
            qd = [p.flow_at_head_float(H) for p in distinct]
            qs = [qd[j] for j in idx]
            if many:  # numpy's pairwise sum, as the array path takes it
                tot = float(np.add.reduce(np.array(qs)))
            else:
                tot = 0.0
                for q in qs:
                    tot += q
            F = tot - Q
            sd = [f.slope_float(q) if q > 0 else 0.0 for f, q in zip(fits, qd, strict=True)]
            dF = 0.0
            for j in idx:
                if qd[j] > 0 and sd[j] < 0:
                    dF = dF + 1.0 / sd[j]
            step = F / dF if dF < 0 else 0.0
            H = H - step
            if H < h_lo:
                H = h_lo
            elif H > h_hi:
                H = h_hi
            if abs(step) <= tol:
                if abs(F) <= self._q_tol:
                    return H
                break
        return self._head_bracketed(Q)

    def _head_bracketed(self, Q: float) -> float:
        """The parallel set's head at set flow ``Q`` by Brent's method (Brent 1973, via
        :func:`scipy.optimize.brentq`) on Σ Q_i(H) − Q over the table's heads: the safeguard
        where Newton's method has not settled in eight steps (a member switching on at its
        shut-off head, where its flow rises as a square root and Newton oscillates).
        Held at the table's ends as the Newton path is."""
        from scipy.optimize import brentq

        _, _, h_lo, h_hi = self._table_lists
        pumps = self.pumps
        many = len(pumps) >= 8

        def excess(H):
            qs = _per_member(pumps, lambda p: p.flow_at_head_float(H))
            if many:
                return float(np.add.reduce(np.array(qs))) - Q
            tot = 0.0
            for q in qs:
                tot += q
            return tot - Q

        if not excess(h_lo) > 0.0:  # the set cannot pass Q above the table's lowest head
            return h_lo
        if excess(h_hi) >= 0.0:
            return h_hi
        a, b = h_lo, h_hi
        Qt, Hs, _, _ = self._table_lists  # the table's interval holding Q, when it brackets
        j = bisect_right(Qt, Q)
        if 0 < j < len(Qt):
            lo, hi = Hs[j], Hs[j - 1]
            if excess(lo) > 0.0 and excess(hi) < 0.0:
                a, b = lo, hi
        return float(brentq(excess, a, b, xtol=1e-14 * abs(h_hi),
                            rtol=4 * np.finfo(float).eps, maxiter=200))

    def member_flows(self, Q) -> tuple[np.ndarray, np.ndarray]:
        """Members' flows [m³/s] and heads [m] at set flows ``Q``, each shaped (pumps, flows)."""
        Q = np.atleast_1d(np.asarray(Q, dtype=float))
        if self.arrangement == "series":
            return (np.broadcast_to(Q, (len(self.pumps), Q.size)),
                    np.array([p.head(Q) for p in self.pumps]))
        H = np.atleast_1d(self.head(Q))
        return self._members_at_head(H), np.broadcast_to(H, (len(self.pumps), Q.size))

    def members_at(self, Q) -> list[tuple[PumpCurve, float, float]]:
        """(pump, flow [m³/s], head [m]) of each member at one set flow ``Q`` [m³/s]."""
        qs, hs = self.member_flows(float(Q))
        return [(p, float(q[0]), float(h[0])) for p, q, h in zip(self.pumps, qs, hs, strict=True)]

    @property
    def has_npshr(self) -> bool:
        return all(p.has_npshr for p in self.pumps)

    @property
    def has_efficiency(self) -> bool:
        return all(p.has_efficiency for p in self.pumps)

    @staticmethod
    def _idle_power(p: PumpCurve, rho: float) -> float:
        """Power of a member held closed by its check valve: its shut-off power from a power
        curve, else NaN (ρgQH/η is 0/0 at zero flow). It is still running dead-headed."""
        return float(p.power(0.0, rho)) if "power" in p.fits else float("nan")

    def power(self, Q, rho: float):
        """Sum of members' shaft power at set flows ``Q`` [m³/s] -> [W] (NaN while a member
        without a power curve is held shut: its dead-headed power is unknown)."""
        qs, _ = self.member_flows(Q)
        return self._power_at(qs, rho).reshape(np.shape(Q))

    def _power_at(self, qs, rho: float):
        """Σ members' power at member flows ``qs`` (rows in member order) [W]."""
        terms = _per_member(self.pumps, lambda p: np.where(
            qs[self._index_of(p)] > 0, p.power(qs[self._index_of(p)], rho),
            self._idle_power(p, rho)))
        return sum(terms)

    def efficiency(self, Q):
        """Set efficiency ρ g Q H / Σ P_i [-] (one solve of the members for both)."""
        Q = np.asarray(Q, dtype=float)
        rho = self.test_density
        qs, hs = self.member_flows(Q)
        H = hs[0] if self.arrangement == "parallel" else sum(list(hs))
        P = self._power_at(qs, rho).reshape(np.shape(Q))
        with np.errstate(divide="ignore", invalid="ignore"):
            return rho * G * Q * H.reshape(Q.shape) / P

    def npshr(self, Q):
        """NPSHr of the set [m]: parallel, the largest of the members at their own flows;
        series, the first pump's (it takes suction)."""
        if self.arrangement == "series":
            return self.pumps[0].npshr(Q)
        qs, _ = self.member_flows(Q)
        req = np.array([np.where(q > 0, p.npshr(q), 0.0)
                        for p, q in zip(self.pumps, qs, strict=True)])
        return req.max(axis=0).reshape(np.shape(Q))

    @cached_property
    def bep(self) -> tuple[float, float, float]:
        """Best set efficiency within the set's datasheet range (flow, head, efficiency)."""
        Qs = np.linspace(self.q_end * 0.02, self.q_end, 201)
        eta = self.efficiency(Qs)
        i = int(np.nanargmax(eta))
        return float(Qs[i]), float(self.head(Qs[i])), float(eta[i])

    def range_findings(self, Q, subject: str | None = None) -> list[Finding]:
        out = []
        for x in np.atleast_1d(np.asarray(Q, dtype=float)):
            for p, q, _ in self.members_at(x):
                out += p.range_findings(q, subject=f"{self.name}: pump '{p.name}'")
        return out

    def fit_report(self) -> dict[str, dict]:
        return {p.name + f" #{i + 1}": p.fit_report() for i, p in enumerate(self.pumps)}

    def __repr__(self) -> str:
        return f"PumpSet({self.arrangement!r}, {[p.name for p in self.pumps]})"


def parallel(pumps, name: str | None = None) -> PumpSet:
    """Pumps in parallel: flows add at equal head (Karassik et al. 2008, from memory).

    >>> p = PumpCurve([0, 0.01, 0.02], [30.0, 28.0, 22.0], speed_rpm=1450, diameter=0.25)
    >>> round(float(parallel([p, p]).head(0.04)), 3)
    22.0
    """
    return PumpSet(pumps, "parallel", name)


def series(pumps, name: str | None = None) -> PumpSet:
    """Pumps in series: heads add at equal flow (Karassik et al. 2008, from memory).

    >>> p = PumpCurve([0, 0.01, 0.02], [30.0, 28.0, 22.0], speed_rpm=1450, diameter=0.25)
    >>> round(float(series([p, p]).head(0.01)), 3)
    56.0
    """
    return PumpSet(pumps, "series", name)
