"""Staging and speed control of identical duty pumps in parallel over a range of flows.

For each demanded flow the set must make a required head: either the **system curve** itself
(ideal speed control, no control valve) or a **control curve** the controller holds — a
constant header pressure, or a remote differential-pressure set point:

.. math:: H_c(Q) = H_{set} + (H_{design} - H_{set}) (Q / Q_{design})^2

(the set head at no flow rising with the square of flow to the design head: the friction
between the pumps and the remote sensor is taken as ∝ Q²; common practice, no source). The
system's own valves burn the difference between the control head and the system head.

Strategies (:data:`STRATEGIES`):

- ``"all_vfd"``: every running pump on its own drive, all at one speed ratio r; each passes
  Q/k and r solves r² H(Q / (k r)) = H_c(Q) (affinity laws, Q ∝ n, H ∝ n², P ∝ n³, η kept
  along the affinity parabola; Karassik et al., *Pump Handbook*, 4th ed., 2008, ch. 2, from
  memory);
- ``"one_vfd"``: one pump on a drive, the other running pumps at datasheet speed without one;
  the fixed pumps pass Q₁(H_c) each at the header head and the drive pump the rest;
- ``"fixed"``: every pump at datasheet speed; the pumps run on their curve at Q/k and the
  excess head H(Q/k) − H_c(Q) is throttled away.

Staging (:class:`StagingRule`): ``"pressure"`` stages up when the running pumps at the
drive's maximum speed cannot hold the required head (or would pass their last datasheet
flow); ``"flow"`` stages up at flows the user sets. Both stage down at (1 − hysteresis) × the
stage-up flow; inside that band the count depends on history, so the result carries the
count on rising and on falling demand. A one-drive set cannot stage down below the fixed
pumps' flow at the header head (its drive pump would be dead-headed), so it uses the rising
count only.

Energy: electrical input = shaft power / (η_motor × η_drive), with the drive efficiency from
fluids' generic PWM table (:func:`fluids.VFD_efficiency`, GoHz.com) at load = shaft power /
drive rating, and a constant motor efficiency (part-load fall-off ignored: stated).

Example
-------
>>> from kit.core.pump import PumpCurve
>>> p = PumpCurve([0, 0.01, 0.02, 0.03], [40.0, 38.0, 32.0, 22.0], speed_rpm=2900,
...               diameter=0.2, efficiency=[0.0, 0.55, 0.72, 0.68])
>>> res = staging_sweep(p, 2, [0.01, 0.04], [30.0, 30.0], rho=998.0, motor_efficiency=0.9,
...                     drive_rating=15e3)
>>> res.count[0].tolist(), [round(float(x), 3) for x in res.speed_ratio[0]]
([1, 2], [0.894, 0.975])
"""

from __future__ import annotations

from collections.abc import Callable, Sequence
from dataclasses import dataclass, field

import numpy as np

from kit.core.findings import CAUTIONS, Finding, Severity
from kit.core.pump import AFFINITY_SOURCE, PumpCurve
from kit.errors import HeadlineError, InputError, OutOfRangeError, check_choice, check_range

__all__ = [
    "STRATEGIES", "STAGING_BASES", "SPEED_LIMITS", "SpeedRange", "ControlCurve",
    "constant_pressure", "remote_dp", "StagingRule", "StagingResult", "staging_sweep",
    "load_profile", "EnergyRow", "EnergyComparison", "profile_energy", "compare_strategies",
    "compare_strategies_band",
    "vfd_efficiency", "control_findings", "required_heads",
]

J_PER_KWH = 3.6e6

STRATEGIES: dict[str, str] = {
    "all_vfd": "every running pump on a drive, all at one speed",
    "one_vfd": "one pump on a drive, the other running pumps at datasheet speed",
    "fixed": "every pump at datasheet speed, excess head throttled",
}

STAGING_BASES: dict[str, str] = {
    "pressure": "stage up when the running pumps at maximum speed cannot hold the head "
                "(or would pass their last datasheet flow)",
    "flow": "stage up at the flows the user sets",
}

#: Drive speed range defaults, as ratios to the datasheet speed [-].
SPEED_LIMITS: dict[str, dict] = {
    "min_ratio": {"value": 0.30, "source": "common practice, no source: drives are commonly "
                  "limited to a minimum of 30–40 % of rated speed (motor cooling, bearing "
                  "lubrication, the pump's own minimum)"},
    "max_ratio": {"value": 1.0, "source": "datasheet speed; above it the maker must confirm "
                  "speed, casing pressure and motor power"},
    "accuracy_ratio": {"value": 0.5, "source": "common practice, no source: the affinity laws "
                       "lose accuracy below about 50–60 % of datasheet speed (efficiency "
                       "falls; Reynolds-number and clearance effects)"},
}

_LOAD_MIN = 0.016  # lowest load of fluids' VFD table


@dataclass(frozen=True)
class SpeedRange:
    """Speed range of a variable-speed drive, as ratios to the pump's datasheet speed.

    Parameters
    ----------
    min_ratio : float
        Lowest speed the drive allows, 0.05–1 [-]
    max_ratio : float
        Highest speed the drive allows, above ``min_ratio`` and at most 1.2 [-]
    accuracy_ratio : float
        Below this speed ratio the affinity laws are flagged as approximate [-]

    Examples
    --------
    >>> SpeedRange(0.35).min_ratio
    0.35
    """

    min_ratio: float = SPEED_LIMITS["min_ratio"]["value"]
    max_ratio: float = SPEED_LIMITS["max_ratio"]["value"]
    accuracy_ratio: float = SPEED_LIMITS["accuracy_ratio"]["value"]

    def __post_init__(self):
        check_range("drive minimum speed ratio", self.min_ratio, "-", low=0.05, high=1.0,
                    low_inclusive=True)
        check_range("drive maximum speed ratio", self.max_ratio, "-", low=self.min_ratio,
                    high=1.2)
        check_range("affinity accuracy speed ratio", self.accuracy_ratio, "-", low=0.0,
                    high=1.0, low_inclusive=True)


@dataclass(frozen=True)
class ControlCurve:
    """The head the controller holds at the pumps, over flow.

    Parameters
    ----------
    kind : str
        ``"constant"`` (header pressure) or ``"quadratic"`` (remote differential-pressure
        set point) [-]
    H_set : float
        Head held at zero flow [m of liquid]
    Q_design : float, optional
        Design flow of a quadratic curve [m³/s]
    H_design : float, optional
        Head at the design flow of a quadratic curve, at least ``H_set`` [m]

    Examples
    --------
    >>> round(float(remote_dp(30.0, 0.05, 42.0).head(0.025)), 3)
    33.0
    """

    kind: str
    H_set: float
    Q_design: float | None = None
    H_design: float | None = None

    def __post_init__(self):
        check_choice("control curve kind", self.kind, ("constant", "quadratic"))
        check_range("control set head", self.H_set, "m", low=0.0)
        if self.kind == "quadratic":
            check_range("control design flow", self.Q_design, "m³/s", low=0.0)
            check_range("control design head", self.H_design, "m", low=self.H_set,
                        low_inclusive=True)

    def head(self, Q):
        """Control head at flows ``Q`` [m³/s] -> [m]."""
        Q = np.asarray(Q, dtype=float)
        if self.kind == "constant":
            return np.full(Q.shape, self.H_set)
        return self.H_set + (self.H_design - self.H_set) * (Q / self.Q_design) ** 2


def constant_pressure(H_set: float) -> ControlCurve:
    """A constant header head [m] -> ControlCurve.

    >>> float(constant_pressure(45.0).head(0.02))
    45.0
    """
    return ControlCurve("constant", H_set)


def remote_dp(H_set: float, Q_design: float, H_design: float) -> ControlCurve:
    """Remote differential-pressure control: H = H_set + (H_design − H_set)(Q/Q_design)² [m].

    Common practice, no source. ``H_set`` [m], ``Q_design`` [m³/s], ``H_design`` [m].

    >>> float(remote_dp(30.0, 0.05, 42.0).head(0.05))
    42.0
    """
    return ControlCurve("quadratic", H_set, Q_design, H_design)


@dataclass(frozen=True)
class StagingRule:
    """When pumps are added and dropped.

    Parameters
    ----------
    basis : str
        ``"pressure"`` or ``"flow"`` (:data:`STAGING_BASES`) [-]
    stage_up_flows : sequence of float, optional
        For ``"flow"``: the flow at which pump k+1 starts, one per step, increasing [m³/s]
    hysteresis : float
        Stage down at (1 − hysteresis) × the stage-up flow, 0–0.5 [-]

    Examples
    --------
    >>> StagingRule("flow", (0.02,), 0.1).hysteresis
    0.1
    """

    basis: str = "pressure"
    stage_up_flows: tuple | None = None
    hysteresis: float = 0.10

    def __post_init__(self):
        check_choice("staging basis", self.basis, STAGING_BASES)
        check_range("staging hysteresis", self.hysteresis, "-", low=0.0, high=0.5,
                    low_inclusive=True)
        if self.basis == "flow":
            if self.stage_up_flows is None or len(self.stage_up_flows) == 0:
                raise InputError("stage-up flows", self.stage_up_flows,
                                 "are needed for staging by flow (one per added pump)")
            prev = 0.0
            for i, q in enumerate(self.stage_up_flows):
                prev = check_range(f"stage-up flow {i + 1}", q, "m³/s", low=prev)
        elif self.stage_up_flows is not None:
            raise InputError("stage-up flows", self.stage_up_flows,
                             "are only used with staging by flow (basis 'flow')")


def vfd_efficiency(rating: float, load) -> np.ndarray:
    """Drive efficiency over an array of loads, fluids' generic PWM table vectorised.

    Evaluates the same bivariate spline and rounding as :func:`fluids.VFD_efficiency`
    (GoHz.com, Variable Frequency Drive Efficiency); loads below 0.016 are taken as 0.016
    (as fluids does) and above 1 as 1.

    Parameters
    ----------
    rating : float
        Drive rated power [W]
    load : array_like
        Fraction of the rated power drawn [-]

    Returns
    -------
    efficiency : ndarray
        Drive efficiency [-]

    Examples
    --------
    >>> float(vfd_efficiency(7457.0, [1.0])[0])
    0.96
    """
    import fluids
    from scipy.interpolate import bisplev

    P = check_range("drive rating", rating, "W", low=0.0) / fluids.constants.hp
    P = min(max(P, 3.0), 400.0)
    x = np.clip(np.asarray(load, dtype=float), _LOAD_MIN, 1.0)
    flat = x.reshape(-1)
    if flat.size == 0:
        return x.copy()
    u, inv = np.unique(flat, return_inverse=True)
    vals = np.round(np.asarray(bisplev(u, P, fluids.pump.VFD_efficiency_tck)).reshape(-1), 4)
    return vals[inv].reshape(x.shape)


# ------------------------------------------------------------------ vectorised solvers
def _bisect(fun, lo, hi, shape, n=52):
    """Vectorised bisection of an increasing ``fun`` on [lo, hi] (fun(lo) ≤ 0 ≤ fun(hi))."""
    a = np.broadcast_to(np.asarray(lo, dtype=float), shape).copy()
    b = np.broadcast_to(np.asarray(hi, dtype=float), shape).copy()
    for _ in range(n):
        m = 0.5 * (a + b)
        pos = fun(m) > 0
        b = np.where(pos, m, b)
        a = np.where(pos, a, m)
    return 0.5 * (a + b)


#: Up to this many elements a bisection runs element by element in plain Python floats
#: (the same operations, so the same bits): numpy's per-call cost dominates small arrays.
_FLOAT_BISECT_MAX = 12


def _speed(pump: PumpCurve, q, H, lo: float, hi: float, tol: float = 0.0):
    """Speed ratio r in [lo, hi] with r² H(q/r) = H for each element; returns r and flags
    (below: even ``lo`` makes more head; above: ``hi`` cannot make it).

    Method: affinity laws (H ∝ n², Q ∝ n) and bisection on [lo, hi] (52 halvings: the
    bracket's width over 2⁵², i.e. to the last bits of r); a few elements are solved one
    by one in floats, many at once with numpy — the same operations either way.
    """
    h = pump.fits["head"].value

    def g(r):
        return r * r * h(q / r) - H

    g_lo, g_hi = g(np.full(q.shape, lo)), g(np.full(q.shape, hi))
    below, above = g_lo > tol, g_hi < -tol
    if q.size <= _FLOAT_BISECT_MAX:
        off, scl, c, _ = pump.fits["head"]._horner_coefs
        c0, rest = c[0], c[1:]
        out = []
        for qi, Hi, bi, ai in zip(q.reshape(-1).tolist(), np.broadcast_to(
                H, q.shape).reshape(-1).tolist(), below.reshape(-1).tolist(),
                above.reshape(-1).tolist(), strict=True):
            if bi or ai:  # replaced by the end of the range below
                out.append(lo if bi else hi)
                continue
            a, b = lo, hi
            for _ in range(52):  # _bisect, with g(m) = m·m·h(q/m) − H by Horner inline
                m = 0.5 * (a + b)
                x = off + scl * (qi / m)
                y = c0 + x * 0.0
                for ci in rest:
                    y = ci + y * x
                if m * m * y - Hi > 0:
                    b = m
                else:
                    a = m
            out.append(0.5 * (a + b))
        r = np.array(out, dtype=float).reshape(q.shape)
    else:
        r = _bisect(g, lo, hi, q.shape)
    r = np.where(below, lo, np.where(above, hi, r))
    return r, below, above


def _crossings(Q, F, margin, H, kk, exact=None, tol=0.0, q_top=None):
    """First flow of each row where the capacity margin ``F`` (rows sampled on the grid
    ``Q``) goes from > 0 to ≤ 0; +inf for a row where it never does.

    Inside the bracketing interval the root is found by vectorised bisection on
    ``margin(q, H(q), kk)`` (``kk`` the pumps running, per row) with the required head
    ``H`` interpolated linearly between the grid points (the pump head exact), or by
    Brent's method on ``exact[row]`` when given. Below the first grid flow the head there
    is held constant down to zero flow; beyond the last, a row's root is searched up to
    ``q_top[row]`` only with ``exact`` (else it stays +inf)."""
    nc = F.shape[0]
    neg = F < -tol
    has = neg.any(axis=1)
    k = np.argmax(neg, axis=1)
    rows = np.arange(nc)
    first = k == 0
    q0 = np.where(first, 0.0, Q[np.maximum(k - 1, 0)])
    q1 = Q[k]
    h1 = H[rows, k]
    h0 = np.where(first, h1, H[rows, np.maximum(k - 1, 0)])
    out = np.full(nc, np.inf)
    zero = has & first & (margin(q0, h0, kk) < -tol)
    out[zero] = 0.0
    todo = has & ~zero
    # rows bracketed between two grid flows are solved by Brent's method on ``exact`` when
    # given; bisection is needed only for the others (the same numbers, without the work)
    bis = todo if exact is None else todo & first
    if bis.any():
        a, b, ha, hb, kt = q0[bis], q1[bis], h0[bis], h1[bis], kk[bis]

        def fun(q):  # the margin falls with flow: bisect on its negative
            return -margin(q, ha + (hb - ha) * (q - a) / (b - a), kt)

        out[bis] = _bisect(fun, a, b, a.shape, n=50)
    if exact is not None:
        from scipy.optimize import brentq
        for i in np.flatnonzero(todo & ~first):
            f0, f1 = exact[i](q0[i]), exact[i](q1[i])
            out[i] = (q0[i] if f0 <= 0 else q1[i] if f1 >= 0
                      else brentq(exact[i], q0[i], q1[i], xtol=1e-14))
    if exact is not None and q_top is not None:
        from scipy.optimize import brentq
        for i in np.flatnonzero(~has):
            a, b = float(Q[-1]), float(q_top[i])
            if b <= a or exact[i](b) >= -tol:
                continue
            out[i] = a if exact[i](a) <= 0 else brentq(exact[i], a, b, xtol=1e-14)
    return out


def _margin_fn(margin, k, fn):
    """Scalar capacity margin of k pumps at one flow with an exact head function:
    ``margin(k, q, H)`` in floats, H the first value of ``fn`` at the one-flow array [q]."""
    def f(q):
        hv = float(np.asarray(fn(np.array([q], dtype=float)), dtype=float).reshape(-1)[0])
        return margin(k, float(q), hv)
    return f


# ------------------------------------------------------------------ results
@dataclass(frozen=True)
class StagingResult:
    """A staging sweep: arrays shaped (conditions, flows) unless said otherwise (SI).

    Attributes: ``strategy``, ``rule``, ``speed_range``, ``n_duty``, ``Q`` (flows,) [m³/s],
    ``labels`` (conditions,), ``H_req`` required head [m], ``count`` pumps running on rising
    demand, ``count_falling`` on falling demand, ``speed_ratio`` of the drive pump(s) [-],
    ``head`` pump head made [m] (above ``H_req`` where throttled or held at minimum speed),
    ``flow_drive`` / ``flow_fixed`` per pump [m³/s] (speeds, heads, flows and powers are
    those of the count on rising demand), ``shaft_power`` and ``input_power`` of
    the running set [W], ``throttled_head`` [m], ``motor_efficiency`` [-] and
    ``drive_rating`` [W] used, ``shortfall`` / ``below_min_speed`` /
    ``low_speed`` / ``dead_headed`` / ``beyond_curve`` masks, ``stage_up`` and
    ``stage_down`` (conditions, n_duty − 1) [m³/s], ``speed_ratio_falling`` [-], ``shaft_power_falling`` and
    ``input_power_falling`` [W] with the count on falling demand, ``findings``.
    """

    strategy: str
    rule: StagingRule
    speed_range: SpeedRange
    n_duty: int
    Q: np.ndarray
    labels: tuple
    H_req: np.ndarray
    count: np.ndarray
    count_falling: np.ndarray
    speed_ratio: np.ndarray
    head: np.ndarray
    flow_drive: np.ndarray
    flow_fixed: np.ndarray
    shaft_power: np.ndarray
    input_power: np.ndarray
    throttled_head: np.ndarray
    motor_efficiency: float
    drive_rating: float
    shortfall: np.ndarray
    below_min_speed: np.ndarray
    low_speed: np.ndarray
    dead_headed: np.ndarray
    beyond_curve: np.ndarray
    stage_up: np.ndarray
    stage_down: np.ndarray
    speed_ratio_falling: np.ndarray
    shaft_power_falling: np.ndarray
    input_power_falling: np.ndarray
    findings: tuple = field(default=())


def _as_heads(Q: np.ndarray, H_req) -> np.ndarray:
    H = np.asarray(H_req, dtype=float)
    if H.ndim == 1:
        H = H[None, :]
    if H.ndim != 2 or H.shape[1] != Q.size:
        raise InputError("required heads", f"shape {np.shape(H_req)}",
                         f"must hold one head per flow ({Q.size}), or one row per condition")
    if not np.all(np.isfinite(H)) or np.any(H <= 0):
        bad = H[~np.isfinite(H) | (H <= 0)].reshape(-1)[0]
        check_range("required head", float(bad), "m", low=0.0)
    return H


def _flows(Q) -> np.ndarray:
    try:
        Q = np.asarray(Q, dtype=float).reshape(-1)
    except (TypeError, ValueError):
        raise InputError("flows", Q, "must be a list of numbers", "m³/s") from None
    if Q.size == 0:
        raise InputError("flows", "[]", "must hold at least one flow", "m³/s")
    for i, q in enumerate(Q):
        check_range(f"flow {i + 1}", q, "m³/s", low=0.0)
    if np.any(np.diff(Q) <= 0):
        i = int(np.argmax(np.diff(Q) <= 0)) + 1
        raise InputError(f"flow {i + 1}", float(Q[i]), "must be greater than the flow before "
                         "it (flows strictly increase)", "m³/s")
    return Q


def _ranges(mask_row, Q) -> str:
    qs = Q[mask_row]
    return f"{qs.min():.4g}–{qs.max():.4g} m³/s" if qs.size > 1 else f"{qs[0]:.4g} m³/s"


def staging_sweep(pump: PumpCurve, n_duty: int, Q, H_req, *, strategy: str = "all_vfd",
                  rule: StagingRule | None = None, speed: SpeedRange | None = None,
                  rho: float, motor_efficiency: float | None = None,
                  drive_rating: float | None = None, labels: Sequence[str] | None = None,
                  exact: Sequence[Callable] | None = None,
                  _row_starts: list | None = None) -> StagingResult:
    """Pumps running and their speed at each flow, for identical duty pumps in parallel.

    Method: affinity laws (Q ∝ n, H ∝ n², P ∝ n³, efficiency kept along the affinity
    parabola; Karassik et al. 2008, ch. 2, from memory) solved for the speed ratio by
    vectorised bisection; stage-up flows where the running pumps at maximum speed meet the
    required head (first sign change on the flow grid, linear interpolation, or Brent's
    method on ``exact``); drive losses from fluids' generic PWM table
    (:func:`vfd_efficiency`).

    Parameters
    ----------
    pump : PumpCurve
        One duty pump at its datasheet speed (all duty pumps identical) [-]
    n_duty : int
        Number of duty pumps that may run (the standby is not counted), 1–12 [-]
    Q : array_like
        Demanded flows, > 0, strictly increasing [m³/s]
    H_req : array_like
        Required head at each flow: one row, or one row per condition [m]
    strategy : str
        Key of :data:`STRATEGIES` [-]
    rule : StagingRule, optional
        Staging basis and hysteresis; default by pressure with 10 % hysteresis [-]
    speed : SpeedRange, optional
        The drive's speed range; default :data:`SPEED_LIMITS` [-]
    rho : float
        Liquid density [kg/m³]
    motor_efficiency : float, optional
        Motor efficiency, 0–1, constant over load; default the full-load efficiency of the
        motor selected (:func:`kit.core.motors.select_motor`, IEC series, tiered margin) for
        the largest shaft power over the datasheet flows at maximum speed, from the CSA table
        (:func:`kit.core.motors.motor_efficiency`, 4-pole, enclosed) [-]
    drive_rating : float, optional
        Drive rated power; default the rating of that selected motor [W]
    labels : sequence of str, optional
        One label per condition row [-]
    exact : sequence of callable, optional
        Exact required head per condition, flow [m³/s] -> head [m], to polish the stage-up
        flows by Brent's method [-]

    Returns
    -------
    StagingResult
        Arrays over (conditions, flows) and findings.

    Notes
    -----
    Where the running pumps cannot make the head even with every duty pump at maximum speed,
    ``shortfall`` is set (FAIL: the standby does not add capacity). Where the required speed
    is below the drive's minimum, the pumps run at the minimum and make more head than
    required (FAIL: outside the drive's range). Speeds below ``accuracy_ratio`` are CHECK.

    Examples
    --------
    >>> from kit.core.pump import PumpCurve
    >>> p = PumpCurve([0, 0.01, 0.02, 0.03], [40.0, 38.0, 32.0, 22.0], speed_rpm=2900,
    ...               diameter=0.2, efficiency=[0.0, 0.55, 0.72, 0.68])
    >>> r = staging_sweep(p, 2, [0.02, 0.038], [32.0, 32.0], strategy="fixed", rho=998.0,
    ...                   motor_efficiency=0.9, drive_rating=15e3)
    >>> r.count[0].tolist(), round(float(r.throttled_head[0, 1]), 2)
    ([1, 2], 0.78)
    """
    if not isinstance(pump, PumpCurve):
        raise InputError("pump for staging", type(pump).__name__, "must be a PumpCurve "
                         "(identical duty pumps)")
    if not pump.has_efficiency:
        raise InputError(f"efficiency of pump '{pump.name}'", "none",
                         "is needed for the shaft power of a staging study")
    check_choice("staging strategy", strategy, STRATEGIES)
    if isinstance(n_duty, bool) or not isinstance(n_duty, (int, np.integer)):
        raise InputError("number of duty pumps", n_duty, "must be a whole number")
    n = int(check_range("number of duty pumps", n_duty, "pumps", low=1, high=12,
                        low_inclusive=True))
    rule = rule or StagingRule()
    speed = speed or SpeedRange()
    rho = check_range("density", rho, "kg/m³", low=0.0)
    Q = _flows(Q)
    H = _as_heads(Q, H_req)
    nc = H.shape[0]
    labels = tuple(labels) if labels is not None else tuple(f"condition {i + 1}"
                                                            for i in range(nc))
    if len(labels) != nc:
        raise InputError("condition labels", len(labels), f"must be one per row ({nc})",
                         "labels")
    if exact is not None and len(exact) != nc:
        raise InputError("exact head functions", len(exact), f"must be one per row ({nc})",
                         "functions")
    if rule.basis == "flow" and len(rule.stage_up_flows) != n - 1:
        raise InputError("stage-up flows", len(rule.stage_up_flows),
                         f"must be one per added pump ({n - 1} for {n} duty pumps)", "flows")
    r_hi = 1.0 if strategy == "fixed" else speed.max_ratio
    r_lo = speed.min_ratio
    h = pump.fits["head"].value
    hf = pump.fits["head"].value_float
    q_end = pump.q_end
    tol = 1e-9 * pump.shutoff_head  # head tolerance of 'meets the required head' [m]
    if drive_rating is None or motor_efficiency is None:
        from kit.core.motors import motor_efficiency as csa_efficiency
        from kit.core.motors import select_motor

        qs = np.linspace(0.0, q_end, 65)[1:]
        p_max = float(np.nanmax(pump.power(qs, rho)) * speed.max_ratio ** 3)
        motor = select_motor(p_max)
        if drive_rating is None:
            drive_rating = motor.rating
        if motor_efficiency is None:
            motor_efficiency = csa_efficiency(motor.rating)
    em = check_range("motor efficiency", motor_efficiency, "-", low=0.0, high=1.0)
    rating = check_range("drive rating", drive_rating, "W", low=0.0)

    # --- capacity of k running pumps at maximum speed: f_k(Q) > 0 while they can hold H
    def capacity_margin(k, Qv, Hv):
        if strategy == "one_vfd":
            qf = np.where(k > 1, pump.flow_at_head(Hv), 0.0)
            qv = Qv - (k - 1) * qf
            return np.where(qv <= r_hi * q_end, r_hi * r_hi * h(np.maximum(qv, 0) / r_hi) - Hv,
                            -1.0)
        qe = Qv / (k * r_hi)
        return np.where(qe <= q_end, r_hi * r_hi * h(qe) - Hv, -1.0)

    def capacity_margin_float(k, q, Hv):  # the same operations on one flow, in floats
        if strategy == "one_vfd":
            qf = pump.flow_at_head_float(Hv) if k > 1 else 0.0
            qv = q - float(k - 1) * qf
            if qv <= r_hi * q_end:
                return r_hi * r_hi * hf((qv if qv > 0.0 else 0.0) / r_hi) - Hv
            return -1.0
        qe = q / (float(k) * r_hi)
        return r_hi * r_hi * hf(qe) - Hv if qe <= q_end else -1.0

    # every (pumps running, condition) pair as one row: k = 1..n over the conditions
    kk = np.repeat(np.arange(1, n + 1, dtype=float), nc)
    Hk = np.tile(H, (n, 1))
    Fk = capacity_margin(kk[:, None], Q[None, :], Hk)
    ex = None if exact is None else [_margin_fn(capacity_margin_float, int(k), fn)
                                     for k in range(1, n + 1) for fn in exact]
    cap = _crossings(Q, Fk, lambda q, hv, k: capacity_margin(k, q, hv), Hk, kk, ex, tol,
                     q_top=kk * max(r_hi, 1.0) * q_end * 1.001)
    cap = cap.reshape(n, nc).T
    if rule.basis == "pressure":
        up = cap[:, :-1]
    else:
        up = np.broadcast_to(np.asarray(rule.stage_up_flows, dtype=float), (nc, n - 1)).copy()
    down = (1.0 - rule.hysteresis) * up
    Qg = Q[None, :]
    count = 1 + (Qg[:, :, None] > up[:, None, :] * (1 + 1e-9)).sum(axis=2) if n > 1 else \
        np.ones((nc, Q.size), dtype=int)
    if strategy == "one_vfd" or n == 1:
        count_f = count.copy()
    else:
        count_f = 1 + (Qg[:, :, None] >= down[:, None, :]).sum(axis=2)
    k = count.astype(float)

    # --- operating state at each (condition, flow) for a pump count k (float array)
    def state(k):
        zeros = np.zeros_like(H)
        flow_fixed, dead = zeros, np.zeros(H.shape, dtype=bool)
        if strategy == "fixed":
            r = np.ones_like(H)
            qd = Qg / k
            head = h(qd)
            short = head < H - tol
            beyond = qd > q_end * (1 + 1e-12)
            below = np.zeros(H.shape, dtype=bool)
            shaft = k * pump.power(qd, rho)
            inp = shaft / em
        else:
            if strategy == "all_vfd":
                qd = Qg / k
                nd = k
            else:
                flow_fixed = np.where(k > 1, pump.flow_at_head(H), 0.0)
                qd = Qg - (k - 1) * flow_fixed
                dead = qd <= 0
                qd = np.maximum(qd, 0.0)
                nd = np.ones_like(k)
            qd = np.broadcast_to(qd, H.shape).astype(float)
            r, below, short = _speed(pump, qd, H, r_lo, r_hi, tol)
            beyond = qd / r > q_end * (1 + 1e-12)
            head = r * r * h(qd / r)
            Pd = pump.power(qd / r, rho) * r ** 3
            eta_d = vfd_efficiency(rating, Pd / rating)
            shaft = nd * Pd
            inp = nd * Pd / (em * eta_d)
            if strategy == "one_vfd":
                Pf = np.where(k > 1, pump.power(flow_fixed, rho), 0.0)
                shaft = shaft + (k - 1) * Pf
                inp = inp + (k - 1) * Pf / em
        low = (r < speed.accuracy_ratio) & ~below
        return r, qd, head, flow_fixed, shaft, inp, short, below, low, dead, beyond & ~short

    r, qd, head, flow_fixed, shaft, inp, short, below, low, dead, beyond = state(k)
    throttled = np.where(short, 0.0, head - H)
    if np.array_equal(count_f, count):
        r_f, shaft_f, inp_f, below_f = r, shaft, inp, below
    else:
        r_f, _, _, _, shaft_f, inp_f, _, below_f, _, _, _ = state(count_f.astype(float))

    findings: list[Finding] = []
    subj = f"{n} × pump '{pump.name}' ({strategy})"
    for c in range(nc):
        if _row_starts is not None:  # where each condition's findings begin (for a caller
            _row_starts.append(len(findings))  # that splits a batch of conditions)
        where = f"{subj} at {labels[c]}"
        if short[c].any():
            findings.append(Finding(
                Severity.FAIL, where, "flow not met", float(Q[short[c]].min()), "m³/s",
                f"all {n} duty pumps within the speed range and datasheet flows",
                f"the duty pumps cannot make the required head at {_ranges(short[c], Q)} "
                "(the standby does not add capacity). " + CAUTIONS["pump"],
                "common practice, no source"))
        if beyond[c].any():
            findings.append(Finding(
                Severity.CHECK, where, "flow per pump / last datasheet flow at speed",
                float(np.max(np.where(beyond[c], qd[c] / (r[c] * q_end), 0.0))), "-", "<= 1",
                f"a pump runs beyond its last datasheet flow (scaled to its speed) at "
                f"{_ranges(beyond[c], Q)}: the fit is extrapolated and the pump is far right "
                "of BEP; stage up earlier or get the maker's curve to run-out",
                "common practice, no source"))
        if below[c].any():
            findings.append(Finding(
                Severity.FAIL, where, "speed ratio needed", float(speed.min_ratio), "-",
                f">= {speed.min_ratio:g} (drive minimum)",
                f"below the drive's minimum speed at {_ranges(below[c], Q)}: the pumps run at "
                "the minimum and make more head than required; stage down, recirculate or "
                "lower the drive minimum with the maker's agreement",
                SPEED_LIMITS["min_ratio"]["source"]))
        extra = below_f[c] & ~below[c]
        if extra.any():
            findings.append(Finding(
                Severity.FAIL, where, "speed ratio needed (falling demand)",
                float(speed.min_ratio), "-", f">= {speed.min_ratio:g} (drive minimum)",
                f"on falling demand, inside the hysteresis band at {_ranges(extra, Q)}, the "
                "extra pump kept running needs a speed below the drive's minimum: widen the "
                "speed range or narrow the hysteresis", SPEED_LIMITS["min_ratio"]["source"]))
        if low[c].any():
            findings.append(Finding(
                Severity.CHECK, where, "speed ratio", float(r[c][low[c]].min()), "-",
                f">= {speed.accuracy_ratio:g}",
                f"affinity laws used below {speed.accuracy_ratio:g} × datasheet speed at "
                f"{_ranges(low[c], Q)}: head and efficiency are approximate",
                SPEED_LIMITS["accuracy_ratio"]["source"] + "; " + AFFINITY_SOURCE))
        if dead[c].any():
            findings.append(Finding(
                Severity.FAIL, where, "drive pump flow", 0.0, "m³/s", "> 0 m³/s",
                f"the fixed-speed pumps alone pass the demand at {_ranges(dead[c], Q)}: the "
                "drive pump is dead-headed. " + CAUTIONS["pump"], "common practice, no source"))
        if speed.max_ratio > 1.0 and strategy != "fixed" and (r[c] > 1.0 + 1e-12).any():
            findings.append(Finding(
                Severity.CHECK, where, "speed ratio", float(r[c].max()), "-",
                "<= 1 (datasheet speed)", "above the datasheet speed: the maker must confirm "
                "speed, casing pressure and motor power; local codes and licensed professional "
                "practice govern", SPEED_LIMITS["max_ratio"]["source"]))
        if rule.basis == "flow":
            for j in range(n - 1):
                if up[c, j] > cap[c, j] * (1 + 1e-9):
                    findings.append(Finding(
                        Severity.FAIL, where, f"stage-up flow {j + 1}", float(up[c, j]),
                        "m³/s", f"<= {cap[c, j]:.4g} m³/s (capacity of {j + 1} pumps)",
                        "the set stages up only after the running pumps have lost pressure",
                        "common practice, no source"))
    return StagingResult(strategy, rule, speed, n, Q, labels, H, count, count_f, r, head,
                         np.where(short, np.nan, qd), flow_fixed, shaft, inp, throttled,
                         em, rating, short, below, low, dead, beyond, up, down, r_f, shaft_f,
                         inp_f, tuple(findings))


def control_findings(control: ControlCurve, Q, system_heads, labels=None) -> list[Finding]:
    """FAIL where the control head is below the system head (the flow cannot be delivered).

    Parameters
    ----------
    control : ControlCurve
        The controlled head [-]
    Q : array_like
        Flows [m³/s]
    system_heads : array_like
        System heads, one row per condition [m]
    labels : sequence of str, optional
        Condition labels [-]

    Returns
    -------
    list of Finding
        One per condition: PASS or FAIL.

    Examples
    --------
    >>> [f.severity.value for f in control_findings(constant_pressure(40.0), [0.01], [35.0])]
    ['pass']
    """
    Q = _flows(Q)
    Hs = _as_heads(Q, system_heads)
    Hc = control.head(Q)
    out = []
    for c in range(Hs.shape[0]):
        lab = labels[c] if labels is not None else f"condition {c + 1}"
        gap = Hc - Hs[c]
        bad = gap < 0
        sev = Severity.FAIL if bad.any() else Severity.PASS
        out.append(Finding(sev, f"control curve at {lab}", "control − system head",
                           float(gap.min()), "m", ">= 0 m",
                           "the controlled head must reach the system head at every flow"
                           + (f"; short at {_ranges(bad, Q)}" if bad.any() else ""),
                           "energy equation (the pump must make the system head)"))
    return out


def required_heads(Q, system_heads, control: ControlCurve | None = None, labels=None):
    """The head the set must make at each flow and condition, and the control findings.

    Without a control curve the set follows each system curve (ideal speed control, no
    control valve); with one, every condition gets the control head and
    :func:`control_findings` says where it falls below the system head.

    Parameters
    ----------
    Q : array_like
        Flows, > 0, increasing [m³/s]
    system_heads : array_like
        System heads, one row per condition (e.g. ``System.band(Q).H``) [m]
    control : ControlCurve, optional
        The controlled head [-]
    labels : sequence of str, optional
        Condition labels [-]

    Returns
    -------
    H_req, findings : ndarray, list of Finding
        Required heads shaped like ``system_heads`` [m] and findings.

    Examples
    --------
    >>> H, f = required_heads([0.01, 0.02], [[20.0, 25.0]], constant_pressure(30.0))
    >>> H.tolist(), f[0].severity.value
    ([[30.0, 30.0]], 'pass')
    """
    Qa = _flows(Q)
    Hs = _as_heads(Qa, system_heads)
    if control is None:
        return Hs.copy(), []
    return (np.broadcast_to(control.head(Qa), Hs.shape).copy(),
            control_findings(control, Qa, Hs, labels))


# ------------------------------------------------------------------ energy over a profile
def load_profile(steps) -> tuple[np.ndarray, np.ndarray]:
    """A load profile: a list of (flow [m³/s], hours [h]) -> sorted flow and hours arrays.

    Flows > 0 (give only running periods), hours ≥ 0, a total of at most 8784 h (a leap
    year); flows must be distinct.

    Parameters
    ----------
    steps : sequence of (float, float)
        (flow, hours per year) pairs [m³/s, h]

    Returns
    -------
    flows, hours : ndarray
        In increasing flow [m³/s], [h]

    Examples
    --------
    >>> load_profile([(0.02, 3000.0), (0.01, 5000.0)])[0].tolist()
    [0.01, 0.02]
    """
    try:
        rows = [tuple(s) for s in steps]
    except TypeError:
        raise InputError("load profile", steps, "must be a list of (flow, hours) pairs") from None
    if not rows:
        raise InputError("load profile", "[]", "must hold at least one (flow, hours) step")
    q, t = [], []
    for i, row in enumerate(rows):
        if len(row) != 2:
            raise InputError(f"load profile step {i + 1}", row, "must be a (flow, hours) pair")
        q.append(check_range(f"load profile step {i + 1} flow", row[0], "m³/s", low=0.0))
        t.append(check_range(f"load profile step {i + 1} hours", row[1], "h", low=0.0,
                             low_inclusive=True))
    total = sum(t)
    if total > 8784.0:
        raise OutOfRangeError("load profile total hours", total, "h", low=0.0, high=8784.0)
    order = np.argsort(q)
    qa, ta = np.asarray(q)[order], np.asarray(t)[order]
    if np.any(np.diff(qa) == 0):
        i = int(np.argmax(np.diff(qa) == 0)) + 1
        raise InputError("load profile flows", float(qa[i]), "must be distinct (merge the "
                         "hours of equal flows)", "m³/s")
    return qa, ta


@dataclass(frozen=True)
class EnergyRow:
    """One strategy over a load profile: per-step arrays and the totals (SI; kWh named)."""

    strategy: str
    Q: np.ndarray
    hours: np.ndarray
    count: np.ndarray
    speed_ratio: np.ndarray
    shaft_power: np.ndarray
    input_power: np.ndarray
    energy_kWh: np.ndarray
    total_kWh: float
    findings: tuple = ()


@dataclass(frozen=True)
class EnergyComparison:
    """Strategies over one load profile; ``saving_kWh[s]`` is the saving against the first."""

    rows: tuple
    saving_kWh: dict

    def row(self, strategy: str) -> EnergyRow:
        for r in self.rows:
            if r.strategy == strategy:
                return r
        raise InputError("strategy", strategy, f"is not one of {[r.strategy for r in self.rows]}")


def profile_energy(pump: PumpCurve, n_duty: int, steps, head: Callable, *,
                   strategy: str = "all_vfd", **kw) -> EnergyRow:
    """Electrical energy of one strategy over a load profile.

    E = Σ hours_i × P_in(Q_i), P_in = shaft power / (η_motor η_drive) per running pump, the
    state at each step from :func:`staging_sweep` with the count on rising demand.

    Parameters
    ----------
    pump : PumpCurve
        One duty pump [-]
    n_duty : int
        Duty pumps that may run [-]
    steps : sequence of (float, float)
        Load profile, (flow, hours per year) pairs [m³/s, h]
    head : callable
        Required head (system or control curve) over flows [m³/s] -> [m]
    strategy : str
        Key of :data:`STRATEGIES` [-]
    kw : dict
        Passed to :func:`staging_sweep` (rule, speed, rho, motor_efficiency, drive_rating) [-]

    Returns
    -------
    EnergyRow
        Per-step powers and energy, and the total [kWh].

    Examples
    --------
    >>> from kit.core.pump import PumpCurve
    >>> p = PumpCurve([0, 0.01, 0.02, 0.03], [40.0, 38.0, 32.0, 22.0], speed_rpm=2900,
    ...               diameter=0.2, efficiency=[0.0, 0.55, 0.72, 0.68])
    >>> e = profile_energy(p, 1, [(0.02, 1000.0)], lambda q: 32.0 + 0 * q, strategy="fixed",
    ...                    rho=998.0, motor_efficiency=0.9, drive_rating=15e3)
    >>> round(e.total_kWh)
    9336
    """
    Q, t = load_profile(steps)
    H = np.asarray(head(Q), dtype=float)
    res = staging_sweep(pump, n_duty, Q, H, strategy=strategy, exact=[head], **kw)
    P = res.input_power[0]
    if res.shortfall[0].any():
        E = np.where(res.shortfall[0], np.nan, P * t / 1e3)
    else:
        E = P * t / 1e3
    return EnergyRow(strategy, Q, t, res.count[0], res.speed_ratio[0], res.shaft_power[0],
                     P, E, float(E.sum()), res.findings)


def compare_strategies(pump: PumpCurve, n_duty: int, steps, head: Callable,
                       strategies=("fixed", "one_vfd", "all_vfd"), **kw) -> EnergyComparison:
    """Energy of several strategies over one load profile, and savings against the first.

    Parameters
    ----------
    pump : PumpCurve
        One duty pump [-]
    n_duty : int
        Duty pumps that may run [-]
    steps : sequence of (float, float)
        Load profile, (flow, hours per year) pairs [m³/s, h]
    head : callable
        Required head over flows [m³/s] -> [m]
    strategies : sequence of str
        Keys of :data:`STRATEGIES`, the first the reference [-]
    kw : dict
        Passed to :func:`staging_sweep` [-]

    Returns
    -------
    EnergyComparison
        One row per strategy and the savings [kWh].

    Examples
    --------
    >>> from kit.core.pump import PumpCurve
    >>> p = PumpCurve([0, 0.01, 0.02, 0.03], [40.0, 38.0, 32.0, 22.0], speed_rpm=2900,
    ...               diameter=0.2, efficiency=[0.0, 0.55, 0.72, 0.68])
    >>> c = compare_strategies(p, 2, [(0.01, 4000.0), (0.03, 2000.0)],
    ...                        lambda q: 20.0 + 10000.0 * q**2, rho=998.0)
    >>> c.saving_kWh["all_vfd"] > 0
    True
    """
    strategies = tuple(strategies)
    if not strategies:
        raise InputError("strategies", "()", f"must name at least one of {list(STRATEGIES)}")
    rows = tuple(profile_energy(pump, n_duty, steps, head, strategy=s, **kw) for s in strategies)
    ref = rows[0].total_kWh
    return EnergyComparison(rows, {r.strategy: ref - r.total_kWh for r in rows})


def compare_strategies_band(pump: PumpCurve, n_duty: int, steps, heads: Sequence[Callable],
                            strategies=("fixed", "one_vfd", "all_vfd"), **kw) -> list:
    """:func:`compare_strategies` for several required-head curves (e.g. every condition of
    a system band), one :func:`staging_sweep` per strategy over all of them.

    The same method and the same numbers as calling :func:`compare_strategies` once per
    curve (each condition is a row of the sweep, solved on its own: speed ratios by
    bisection, stage-up flows by Brent's method on its exact curve) — to rounding: the
    Newton polish of a pump's flow at a head runs until every head of one call has
    settled, so a row may take one more step than alone (last-bit differences). Where
    any curve is refused, every curve is computed on its own so each gets its own answer
    or refusal.

    Parameters
    ----------
    pump : PumpCurve
        One duty pump [-]
    n_duty : int
        Duty pumps that may run [-]
    steps : sequence of (float, float)
        Load profile, (flow, hours per year) pairs [m³/s, h]
    heads : sequence of callable
        Required head over flows [m³/s] -> [m], one per curve [-]
    strategies : sequence of str
        Keys of :data:`STRATEGIES`, the first the reference [-]
    kw : dict
        Passed to :func:`staging_sweep` [-]

    Returns
    -------
    list
        Per curve, its :class:`EnergyComparison`, or the :class:`~kit.errors.HeadlineError`
        that :func:`compare_strategies` raises for it.

    Examples
    --------
    >>> from kit.core.pump import PumpCurve
    >>> p = PumpCurve([0, 0.01, 0.02, 0.03], [40.0, 38.0, 32.0, 22.0], speed_rpm=2900,
    ...               diameter=0.2, efficiency=[0.0, 0.55, 0.72, 0.68])
    >>> steps = [(0.01, 4000.0), (0.03, 2000.0)]
    >>> a, b = compare_strategies_band(p, 2, steps, [lambda q: 20.0 + 10000.0 * q**2,
    ...                                              lambda q: 24.0 + 10000.0 * q**2], rho=998.0)
    >>> a.saving_kWh == compare_strategies(p, 2, steps, lambda q: 20.0 + 10000.0 * q**2,
    ...                                    rho=998.0).saving_kWh
    True
    """
    heads = list(heads)
    try:
        return _compare_batched(pump, n_duty, steps, heads, tuple(strategies), kw)
    except HeadlineError:
        pass
    out: list = []
    for head in heads:
        try:
            out.append(compare_strategies(pump, n_duty, steps, head, strategies, **kw))
        except HeadlineError as exc:
            out.append(exc)
    return out


def _compare_batched(pump, n_duty, steps, heads, strategies, kw) -> list:
    """:func:`compare_strategies_band` in one sweep per strategy (refusals raise)."""
    if not strategies:
        raise InputError("strategies", "()", f"must name at least one of {list(STRATEGIES)}")
    if not heads:
        return []
    if "labels" in kw or "exact" in kw:
        raise InputError("keywords", sorted(kw), "labels and exact are set per curve here")
    Q, t = load_profile(steps)
    rows_H = [np.asarray(h(Q), dtype=float) for h in heads]
    for H in rows_H:
        if H.shape != Q.shape:  # let the curve-by-curve path give its own refusal
            raise InputError("required heads", f"shape {H.shape}", "one head per flow")
    H = np.stack(rows_H)
    nc = len(heads)
    per_curve: list = [[] for _ in range(nc)]
    for strategy in strategies:
        starts: list = []
        res = staging_sweep(pump, n_duty, Q, H, strategy=strategy, exact=heads,
                            labels=("condition 1",) * nc, _row_starts=starts, **kw)
        ends = starts[1:] + [len(res.findings)]
        for c in range(nc):
            P = res.input_power[c]
            if res.shortfall[c].any():
                E = np.where(res.shortfall[c], np.nan, P * t / 1e3)
            else:
                E = P * t / 1e3
            per_curve[c].append(EnergyRow(
                strategy, Q.copy(), t.copy(), res.count[c], res.speed_ratio[c],
                res.shaft_power[c], P, E, float(E.sum()),
                tuple(res.findings[starts[c]:ends[c]])))
    out = []
    for rows in per_curve:
        ref = rows[0].total_kWh
        out.append(EnergyComparison(tuple(rows), {r.strategy: ref - r.total_kWh
                                                  for r in rows}))
    return out
