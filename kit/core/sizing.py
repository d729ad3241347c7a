"""Line sizing: candidate pipe sizes for a duty, each checked against velocity, pressure-drop,
erosional-velocity and vapour-pressure criteria, with the recommended size and the reason.

A :class:`Route` is a developed length with an elevation profile (named points along it) and
the route's fittings. For each candidate bore the route becomes a
:class:`~kit.core.line.Line` — one segment per leg of the profile — and the head loss is
Darcy–Weisbach (:mod:`kit.core.friction`, Colebrook by Clamond's exact solution) plus the
fittings' K (:mod:`kit.core.fittings`). The route's fittings are lumped in the **first** leg:
losses then appear as early as possible along the route, which is conservative for the
lowest-pressure check at downstream high points.

The pressure at the end of the route is given (a vented receiving tank: atmospheric). The
pressure needed at the start, and the pressure at every station, follow from the energy
equation with the loss term, worked back from the end (one bore throughout, so the velocity
heads cancel):

.. math:: p_i = p_{i+1} + \\rho g (z_{i+1} - z_i) + \\rho g\\, h_{L,i \\to i+1}

With an ``exit`` fitting in the route the end pressure is the receiving vessel's; the start
pressure then carries the outlet velocity head as well (conservative by ρV²/2), and station
pressures downstream of the first leg are exact.

The lowest pressure is searched over the minimum, design and maximum flows: at a high point
downstream, less flow means less friction between it and the end, hence a lower pressure.

Example
-------
>>> r = Route(length=100.0, points=(("crest", 40.0, 6.0), ("end", 100.0, 5.0)))
>>> r.legs()
[('crest', 40.0, 6.0), ('end', 60.0, -1.0)]
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from functools import cached_property, lru_cache

import numpy as np

from kit.core.criteria import DutyClass, erosional_findings
from kit.core.findings import Finding, Severity, worst
from kit.core.fittings import fitting_re_findings, fitting_re_range
from kit.core.friction import darcy_friction, friction_range_findings, transition_findings
from kit.core.line import G, Line, Profile, Segment, Station, vapour_findings
from kit.errors import HeadlineError, InputError, check_range

__all__ = ["Route", "Candidate", "SizingResult", "size_line", "batch_friction",
           "route_profiles", "FLOW_RANGE", "NO_PV_SOURCE"]

#: Allowed flows [m³/s]: (low exclusive, high inclusive).
FLOW_RANGE = (0.0, 100.0)
#: Source text of the finding made when a liquid has no vapour-pressure model.
NO_PV_SOURCE = "kit policy: a vapour pressure is needed for the lowest-pressure check"


@dataclass(frozen=True)
class Route:
    """A pipe route: developed length [m], elevation profile, fittings, start elevation.

    Parameters
    ----------
    length : float
        Developed length from start to end, 0 < L <= 1e6 m [m]
    points : tuple of (name, chainage [m], elevation [m])
        Named points along the route in increasing chainage; the last is the end of the
        route and its chainage must equal ``length``. Elevations are absolute; empty means a
        level route ending at ``start_elevation`` [-]
    fittings : tuple of Fitting
        Every fitting along the route (lumped in the first leg) [-]
    start_elevation : float
        Elevation of the start [m]
    start_name : str
        Name of the start station [-]

    Examples
    --------
    >>> Route(50.0).legs()
    [('end', 50.0, 0.0)]
    """

    length: float
    points: tuple = ()
    fittings: tuple = ()
    start_elevation: float = 0.0
    start_name: str = "start"

    def __post_init__(self):
        check_range("route length", self.length, "m", low=0.0, high=1e6)
        check_range("start elevation", self.start_elevation, "m", low=-1e4, high=1e4)
        object.__setattr__(self, "points", tuple(tuple(p) for p in self.points))
        object.__setattr__(self, "fittings", tuple(self.fittings))
        last = 0.0
        for name, x, z in self.points:
            check_range(f"chainage of '{name}'", x, "m", low=last, high=self.length)
            check_range(f"elevation of '{name}'", z, "m", low=-1e4, high=1e4)
            last = x
        if self.points and abs(self.points[-1][1] - self.length) > 1e-9 * max(1.0, self.length):
            raise InputError("chainage of the last profile point", self.points[-1][1],
                             f"must equal the route length {self.length:g} m", "m")

    def legs(self) -> list[tuple[str, float, float]]:
        """(end name, leg length [m], rise [m]) for each leg of the profile."""
        pts = self.points or (("end", self.length, self.start_elevation),)
        out, x0, z0 = [], 0.0, self.start_elevation
        for name, x, z in pts:
            out.append((name, x - x0, z - z0))
            x0, z0 = x, z
        return out

    def line(self, pipe, name: str = "route") -> Line:
        """The route in one bore: a :class:`~kit.core.line.Line`, one segment per leg."""
        segs = []
        for i, (end, length, rise) in enumerate(self.legs()):
            fits = self.fittings if i == 0 else ()
            segs.append(Segment(end, pipe, length, rise, fits, end_station=end))
        return Line(name, tuple(segs), self.start_name, self.start_elevation)


@dataclass(frozen=True)
class Candidate:
    """One candidate size (SI): the numbers at the design flow and the checks.

    Attributes
    ----------
    pipe : Pipe
    velocity, velocity_min, velocity_max : float
        Mean velocity at the design, minimum and maximum flow [m/s].
    Re, friction : float
        Reynolds number and Darcy friction factor at the design flow [-].
    dp_per_m : float
        Friction pressure drop per length at the design flow [Pa/m].
    head_loss : float
        Total head loss of the route (pipe and fittings) at the design flow [m].
    p_start : float
        Pressure needed at the start at the design flow [Pa abs].
    lowest_station : str
        Station of the lowest pressure over the flow range.
    p_lowest : float
        That pressure [Pa abs].
    Q_lowest : float
        The flow at which it occurs [m³/s].
    findings : tuple of Finding
    error : str
        The kit's message when the candidate could not be computed ('' otherwise).
    """

    pipe: object
    velocity: float
    velocity_min: float
    velocity_max: float
    Re: float
    friction: float
    dp_per_m: float
    head_loss: float
    p_start: float
    lowest_station: str
    p_lowest: float
    Q_lowest: float
    findings: tuple
    error: str = ""

    @cached_property
    def verdict(self) -> str:
        """'pass', 'check' or 'fail' (the worst finding); 'fail' for an error (worked once:
        the candidate is frozen)."""
        if self.error:
            return "fail"
        return worst(self.findings).value

    @property
    def miss(self) -> tuple:
        """How far the candidate is from passing: ``(excess, finding)``.

        ``excess`` is the largest relative exceedance over its FAIL findings with a numeric
        bound — (value − high)/|high| or (low − value)/|low| (per unit of the quantity where
        the bound is 0) — 0.0 with no FAIL, ``inf`` for a candidate that could not be
        computed or whose failing finding has no numeric bound.
        """
        if self.error:
            return math.inf, None
        best, which = 0.0, None
        for f in self.findings:
            if f.severity is not Severity.FAIL:
                continue
            if f.high is not None and f.value > f.high:
                x = (f.value - f.high) / (abs(f.high) or 1.0)
            elif f.low is not None and f.value < f.low:
                x = (f.low - f.value) / (abs(f.low) or 1.0)
            else:
                x = math.inf
            if which is None or x > best:
                best, which = x, f
        return best, which

    @property
    def governing(self) -> str:
        """The rules behind the verdict, in words ('all criteria met' for a pass)."""
        if self.error:
            return self.error
        sev = worst(self.findings)
        if sev is Severity.PASS:
            return "all criteria met"
        rules = []
        for f in self.findings:
            if f.severity is sev and f.rule not in rules:
                rules.append(f.rule)
        return "; ".join(rules)


@dataclass(frozen=True)
class SizingResult:
    """Every candidate, the recommended one and why, and each candidate's design profile.

    ``profiles[i]`` is the :class:`~kit.core.line.Profile` of candidate ``i`` at the design
    flow and ``range_profiles[i]`` its profiles at the minimum, design and maximum flows
    (None where the candidate failed to compute).
    """

    candidates: tuple
    recommended: int | None
    reason: str
    profiles: tuple = ()
    duty: DutyClass | None = None
    range_profiles: tuple = ()

    @property
    def profile(self):
        """The recommended candidate's design-flow profile (or None)."""
        return None if self.recommended is None else self.profiles[self.recommended]

    @property
    def findings(self) -> tuple:
        """The recommended candidate's findings (empty when there is none)."""
        return () if self.recommended is None else self.candidates[self.recommended].findings

    @property
    def counts(self) -> dict:
        """Number of candidates per verdict: ``{'pass': n, 'check': n, 'fail': n}``."""
        out = {"pass": 0, "check": 0, "fail": 0}
        for c in self.candidates:
            out[c.verdict] += 1
        return out

    @property
    def reasons(self) -> tuple:
        """For each candidate: ``{label, verdict, reason}`` (the governing rules in words)."""
        return tuple({"label": _label(c), "verdict": c.verdict, "reason": c.governing}
                     for c in self.candidates)

    @property
    def nearest_miss(self):
        """Where no candidate passes or checks: ``(index, excess, finding)`` of the failing
        candidate closest to passing (smallest :attr:`Candidate.miss`); else None."""
        if self.recommended is not None or not self.candidates:
            return None
        misses = [c.miss for c in self.candidates]
        i = min(range(len(misses)), key=lambda k: misses[k][0])
        return i, misses[i][0], misses[i][1]


def route_profiles(line: Line, state, Q, p_end: float, p_baro: float = 101325.0):
    """Station pressures, HGL and EGL along a one-bore line for several flows, worked back
    from a given end pressure by the energy equation with the loss term (Bernoulli).

    Parameters
    ----------
    line : Line
        One bore throughout (the velocity heads cancel station to station) [-]
    state : LiquidState
        rho [kg/m³] and mu [Pa·s] [-]
    Q : array_like
        Flows, >= 0 [m³/s]
    p_end : float
        Static pressure at the end station [Pa abs]
    p_baro : float
        Barometric pressure for gauge values and HGL [Pa]

    Returns
    -------
    profiles : list of Profile
        One per flow [-]
    head_loss : ndarray
        Total head loss per flow [m]

    Notes
    -----
    Head loss per segment from :meth:`Line.segment_losses` (Darcy–Weisbach with Colebrook,
    plus fittings), evaluated once for all flows. HGL = z + (p − p_baro)/(ρg);
    EGL = HGL + V²/(2g).

    Examples
    --------
    >>> from types import SimpleNamespace as NS
    >>> pipe = NS(Di=0.1023, area=np.pi / 4 * 0.1023**2, roughness=4.5e-5)
    >>> water = NS(rho=998.2, mu=1.002e-3)
    >>> line = Route(100.0).line(pipe)
    >>> profs, hl = route_profiles(line, water, [0.01], 101325.0)
    >>> round(profs[0].stations[0].hgl, 3)
    1.44
    """
    Q = np.atleast_1d(np.asarray(Q, dtype=float))
    seg = line.segment_losses(Q, state)                   # (n_seg, n_Q) [m]
    segs = line.segments
    rise = [float(s.rise) for s in segs]
    rho = state.rho
    rg = rho * G
    # pressure at each station from the end backwards: p_k = p_end + rho g sum_{j>=k}(rise+hl),
    # summed from the end in the order of a cumulative sum (plain floats: a handful of terms)
    n_seg, n_Q = seg.shape
    seg_l = seg.tolist()
    after = [None] * n_seg                                # from segment k to the end [Pa]
    acc = None
    for k in range(n_seg - 1, -1, -1):
        per = [(rise[k] + h) * rho * G for h in seg_l[k]]
        acc = per if acc is None else [a + b for a, b in zip(acc, per, strict=True)]
        after[k] = acc
    p = [[a + p_end for a in row] for row in after] + [[0.0 + p_end] * n_Q]
    names = [line.start_station] + [s.station for s in segs]
    x, z = [0.0], [0.0]
    for s, r in zip(segs, rise, strict=True):
        x.append(x[-1] + s.length)
        z.append(z[-1] + r)
    z = [line.start_elevation + zk for zk in z]
    x = [float(xk) for xk in x]
    area = segs[0].pipe.area
    out = []
    for j, q in enumerate(Q):
        V = q / area
        v = float(V)
        ev = v * v / (2 * G)
        st = []
        for k, name in enumerate(names):
            pk = p[k][j]
            hgl = z[k] + (pk - p_baro) / rg
            st.append(Station(name, x[k], float(z[k]), pk, pk - p_baro, V, hgl, hgl + ev))
        out.append(Profile(line.name, float(q), tuple(st), p_baro, rho))
    return out, seg.sum(axis=0)


def _flow(name: str, value, low, low_inclusive=False) -> float:
    return check_range(name, value, "m³/s", low=low, high=FLOW_RANGE[1],
                       low_inclusive=low_inclusive)


def size_line(route: Route, state, Q_design: float, pipes, duty: DutyClass,
              Q_min: float | None = None, Q_max: float | None = None,
              p_end: float = 101325.0, p_baro: float = 101325.0,
              vapour_margin: float = 2.0, erosional_C: float = 100.0) -> SizingResult:
    """Check every candidate pipe for a duty and recommend the smallest that passes.

    Each candidate: velocity Q/A, Reynolds number, Darcy–Weisbach friction with Colebrook
    (1939) solved by Clamond (2009), fittings K, total head loss, the station pressures over
    the flow range, and findings against the duty class (common practice, no source), the
    API RP 14E (1991) erosional velocity and the vapour pressure with a margin.

    Parameters
    ----------
    route : Route
        Length, elevation profile and fittings [-]
    state : LiquidState
        rho [kg/m³], mu [Pa·s], pv [Pa] or None (then the lowest-pressure check is a CHECK
        asking for a value) [-]
    Q_design : float
        Design flow, 0 < Q <= 100 m³/s [m³/s]
    pipes : sequence of Pipe
        Candidates, smallest first [-]
    duty : DutyClass
        Velocity and pressure-drop criteria [-]
    Q_min, Q_max : float, optional
        Flow range, Q_min <= Q_design <= Q_max (default: the design flow) [m³/s]
    p_end : float
        Pressure at the end of the route [Pa abs]
    p_baro : float
        Barometric pressure [Pa]
    vapour_margin : float
        Required margin of the lowest pressure above vapour pressure [m of liquid]
    erosional_C : float
        API RP 14E constant C (100 continuous, 125 intermittent) [-]

    Returns
    -------
    result : SizingResult
        Candidates in the order given, the index of the recommended one and the reason [-]

    Notes
    -----
    Verdicts: at the design flow, above ``v_max`` or ``dp_max`` fails, within 10 % of either
    or below ``v_min`` is a check (see :class:`~kit.core.criteria.DutyClass`); at the
    maximum flow, above ``v_max`` or ``dp_max`` is a check; above the erosional velocity at
    the maximum flow fails; the lowest pressure over the flow range at or below vapour
    pressure fails, within the margin or below atmospheric is a check; a Reynolds number in
    the transition zone (2000–4000) is a check.
    The recommended size is the smallest whose verdict is *pass*; if none passes, the
    smallest whose verdict is *check*; if all fail, none.

    Examples
    --------
    >>> from types import SimpleNamespace as NS
    >>> from kit.core.criteria import DUTY_CLASSES
    >>> def pipe(D):
    ...     return NS(Di=D, area=np.pi / 4 * D * D, roughness=4.5e-5, label=f"{D * 1e3:.0f} mm")
    >>> water = NS(rho=998.2, mu=1.002e-3, pv=2339.0)
    >>> res = size_line(Route(100.0), water, 0.01, [pipe(0.05), pipe(0.08), pipe(0.1)],
    ...                 DUTY_CLASSES["pump_discharge"], p_end=2e5)
    >>> res.candidates[res.recommended].pipe.label
    '100 mm'

    References
    ----------
    .. [1] Colebrook, C. F. (1939). J. Inst. Civil Eng. 11(4), 133–156.
    .. [2] Clamond, D. (2009). Ind. Eng. Chem. Res. 48(7), 3665–3671.
    .. [3] API RP 14E (1991), 5th ed., sec. 2.5.
    """
    Q = _flow("design flow", Q_design, FLOW_RANGE[0])
    Q_min = Q if Q_min is None else _flow("minimum flow", Q_min, 0.0, True)
    if Q_min > Q:
        raise InputError("minimum flow", Q_min, f"must not exceed the design flow {Q:.6g} m³/s",
                         "m³/s")
    Q_max = Q if Q_max is None else _flow("maximum flow", Q_max, Q, True)
    check_range("end pressure", p_end, "Pa", low=0.0, high=1e8, low_inclusive=True)
    check_range("vapour-pressure margin", vapour_margin, "m", low=0.0, high=1e3,
                low_inclusive=True)
    pipes = list(pipes)
    if not pipes:
        raise InputError("candidate pipes", 0, "must hold at least 1 pipe")
    flows = np.array([Q_min, Q, Q_max])
    labels = ("at minimum flow", "at design flow", "at maximum flow")
    out, profiles = [], []
    for pipe in pipes:
        try:
            c, profs = _candidate(route, state, pipe, duty, flows, labels, p_end, p_baro,
                                  vapour_margin, erosional_C)
        except HeadlineError as exc:
            nan = float("nan")
            c, profs = Candidate(pipe, Q / pipe.area, Q_min / pipe.area, Q_max / pipe.area,
                                 nan, nan, nan, nan, nan, "", nan, nan, (), str(exc)), None
        out.append(c)
        profiles.append(profs)
    rec, reason = _recommend(out, duty)
    return SizingResult(tuple(out), rec, reason, tuple(p and p[1] for p in profiles), duty,
                        tuple(profiles))


@lru_cache(maxsize=256)
def _route_line(route: Route, pipe) -> Line:
    """``route.line(pipe)``, cached on the values of the route and the pipe (both frozen)."""
    return route.line(pipe)


def _line_of(route: Route, pipe) -> Line:
    try:
        return _route_line(route, pipe)
    except TypeError:   # an unhashable pipe-like object: build the line each time
        return route.line(pipe)


def _candidate(route, state, pipe, duty, flows, labels, p_end, p_baro, margin, C):
    line = _line_of(route, pipe)
    Q_min, Q, Q_max = flows
    profs, hl = route_profiles(line, state, flows, p_end, p_baro)
    V = flows / pipe.area
    Re = state.rho * V * pipe.Di / state.mu
    eD = pipe.roughness / pipe.Di
    f = np.asarray(darcy_friction(np.maximum(Re, 1e-9), eD), dtype=float)
    dp = f * state.rho * V * V / (2.0 * pipe.Di)
    subject = str(getattr(pipe, "label", "pipe"))
    found = duty.check(subject, float(V[1]), float(dp[1]))
    if Q_max > Q:
        found += _at_max(duty, subject, float(V[2]), float(dp[2]))
    found += erosional_findings(subject + (f", {labels[2]}" if Q_max > Q else ""),
                                float(V[2]), state.rho, C,
                                applies=getattr(duty, "erosional_applies", False))
    live = Re[flows > 0]
    found += transition_findings(subject, live)
    found += friction_range_findings(subject, live, eD)
    if live.size:
        re_min = float(live.min())
        for fit in route.fittings:
            if re_min < fitting_re_range(fit)[0]:   # else fitting_re_findings finds nothing
                found += fitting_re_findings(fit, live, subject=subject)
    j_low = int(np.argmin([p.lowest.p for p in profs]))
    low = profs[j_low].lowest
    where = f"{subject}, station '{low.name}'"
    if Q_min < Q or Q_max > Q:
        where += f" {labels[j_low]}"
    if state.pv is None:
        found.append(Finding(Severity.CHECK, where, "pressure above vapour pressure",
                             float("nan"), "m", "a vapour pressure is required",
                             "no vapour-pressure model for this liquid: lowest-pressure check "
                             "not made", NO_PV_SOURCE))
    else:
        found += vapour_findings(profs[j_low], state.pv, margin, where)
    cand = Candidate(pipe, float(V[1]), float(V[0]), float(V[2]), float(Re[1]), float(f[1]),
                     float(dp[1]), float(hl[1]), profs[1].stations[0].p, low.name, low.p,
                     float(flows[j_low]), tuple(found))
    return cand, tuple(profs)


def _at_max(duty: DutyClass, subject: str, V: float, dp: float) -> list[Finding]:
    """CHECK findings where the maximum flow takes a size beyond the duty's upper limits."""
    out = []
    if V > duty.v_max:
        out.append(Finding(Severity.CHECK, subject + ", at maximum flow", "velocity", V, "m/s",
                           f"<= {duty.v_max:g} m/s", f"{duty.label}: velocity above range at "
                           "maximum flow", duty.source))
    if dp > duty.dp_max:
        out.append(Finding(Severity.CHECK, subject + ", at maximum flow",
                           "pressure drop per length", dp, "Pa/m",
                           f"<= {duty.dp_max * 100 / 1000:g} kPa/100 m",
                           f"{duty.label}: pressure drop above limit at maximum flow",
                           duty.source))
    return out


def _label(c) -> str:
    return str(getattr(c.pipe, "label", "pipe"))


def _recommend(cands, duty) -> tuple[int | None, str]:
    for want in ("pass", "check"):
        for i, c in enumerate(cands):
            if c.verdict != want:
                continue
            if want == "pass":
                why = f"{_label(c)}: the smallest size with every criterion met for {duty.label}"
            else:
                why = (f"{_label(c)}: no size meets every criterion for {duty.label}; this is "
                       f"the smallest with none failed (check: {c.governing})")
            if i:
                prev = cands[i - 1]
                why += f"; the next size down ({_label(prev)}) is '{prev.verdict}': {prev.governing}"
            else:
                why += "; it is the smallest candidate listed (a smaller size may also do)"
            return i, why
    why = f"no candidate meets the {duty.label} criteria"
    misses = [c.miss for c in cands]
    i = min(range(len(misses)), key=lambda k: misses[k][0])
    x, f = misses[i]
    if f is not None and math.isfinite(x):
        bound = f.high if (f.high is not None and f.value > f.high) else f.low
        why += (f"; nearest miss {_label(cands[i])}: {f.quantity} {f.value:.4g} {f.unit} "
                f"against {f.limit} ({x * 100:.3g} % beyond {bound:.4g} {f.unit})")
    else:
        why += f"; nearest miss {_label(cands[i])}: {cands[i].governing}"
    why += ". Each size: " + "; ".join(f"{_label(c)} — {c.governing}" for c in cands)
    return None, why + ". Add larger sizes, change the duty or its criteria, or split the flow"


def batch_friction(Q, D, roughness, rho, mu):
    """Velocity [m/s], Re [-], Darcy f [-] and friction pressure drop per length [Pa/m]
    for arrays of flow and bore (broadcast), by Darcy–Weisbach with
    :func:`~kit.core.friction.darcy_friction` (Colebrook by Clamond 2009 above Re 4000).

    Parameters
    ----------
    Q : array_like
        Flow, >= 0 [m³/s]
    D : array_like
        Inside diameter, > 0 [m]
    roughness : array_like
        Absolute roughness [m]
    rho, mu : float or array_like
        Density [kg/m³] and dynamic viscosity [Pa·s]

    Returns
    -------
    V, Re, f, dp_per_m : ndarray
        [m/s], [-], [-], [Pa/m]

    Examples
    --------
    >>> V, Re, f, dp = batch_friction(0.01, 0.1023, 4.5e-5, 998.2, 1.002e-3)
    >>> round(float(dp), 1)
    141.0
    """
    Q, D = np.asarray(Q, dtype=float), np.asarray(D, dtype=float)
    V = Q / (np.pi / 4 * D * D)
    Re = np.maximum(rho * V * D / mu, 1e-9)
    f = darcy_friction(Re, np.asarray(roughness) / D)
    return V, Re, f, f * rho * V * V / (2 * D)

