"""Line sizing: candidate pipe sizes for a duty, each checked against velocity, pressure-drop,
erosional-velocity and vapour-pressure criteria, with the recommended size and the reason.

A :class:`Route` is a developed length with an elevation profile (named points along it) and
the route's fittings. For each candidate bore the route becomes a
:class:`~kit.core.line.Line` — one segment per leg of the profile — and the head loss is
Darcy–Weisbach (:mod:`kit.core.friction`). The route's fittings are lumped in the **first**
leg: losses then appear as early as possible along the route, which is conservative for the
lowest-pressure check at downstream high points.

The pressure at the end of the route is given (a vented receiving tank: atmospheric); the
pressure needed at the start, and the pressure at every station, follow from the energy
equation with the loss term.

Example
-------
>>> from types import SimpleNamespace as NS
>>> r = Route(length=100.0, points=(("end", 100.0, 5.0),))
>>> r.legs()
[('end', 100.0, 5.0)]
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from kit.core.criteria import DutyClass, erosional_findings
from kit.core.findings import Finding, Severity, worst
from kit.core.friction import darcy_friction
from kit.core.line import G, Line, Segment, vapour_findings
from kit.errors import HeadlineError, InputError, check_range

__all__ = ["Route", "Candidate", "SizingResult", "size_line", "batch_friction"]


@dataclass(frozen=True)
class Route:
    """A pipe route: developed length [m], elevation profile, fittings, start elevation.

    Parameters
    ----------
    length : float
        Developed length from start to end [m].
    points : tuple of (name, chainage [m], elevation [m])
        Named points along the route in order of chainage; the last is the end of the
        route. Elevations are absolute; the start is at ``start_elevation``.
    fittings : tuple of Fitting
    start_elevation : float
        Elevation of the start [m].
    """

    length: float
    points: tuple = ()
    fittings: tuple = ()
    start_elevation: float = 0.0
    start_name: str = "start"

    def __post_init__(self):
        check_range("route length", self.length, "m", low=0.0, high=1e6)
        last = 0.0
        for name, x, _z in self.points:
            check_range(f"chainage of '{name}'", x, "m", low=last, high=self.length)
            last = x
        if self.points and abs(self.points[-1][1] - self.length) > 1e-9:
            raise InputError("chainage of the last profile point", self.points[-1][1],
                             f"must equal the route length {self.length:g} m", "m")

    def legs(self) -> list[tuple[str, float, float]]:
        """(end name, leg length, rise) for each leg of the profile."""
        pts = self.points or (("end", self.length, self.start_elevation),)
        out, x0, z0 = [], 0.0, self.start_elevation
        for name, x, z in pts:
            out.append((name, x - x0, z - z0))
            x0, z0 = x, z
        return out

    def line(self, pipe, name: str = "route") -> Line:
        segs = []
        for i, (end, length, rise) in enumerate(self.legs()):
            fits = tuple(self.fittings) if i == 0 else ()
            segs.append(Segment(f"{self.start_name}→{end}" if i == 0 else end, pipe, length,
                                rise, fits, end_station=end))
        return Line(name, tuple(segs), self.start_name, self.start_elevation)


@dataclass(frozen=True)
class Candidate:
    """One candidate size at the design flow (SI)."""

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
    findings: tuple
    error: str = ""

    @property
    def verdict(self) -> str:
        if self.error:
            return "fail"
        return worst(self.findings).value


@dataclass(frozen=True)
class SizingResult:
    candidates: tuple
    recommended: int | None
    reason: str
    profile: object = None
    findings: tuple = field(default=())


def size_line(route: Route, state, Q_design: float, pipes, duty: DutyClass,
              Q_min: float | None = None, Q_max: float | None = None,
              p_end: float = 101325.0, p_baro: float = 101325.0,
              vapour_margin: float = 2.0, erosional_C: float = 100.0) -> SizingResult:
    """Check every candidate pipe for a duty and recommend the smallest that passes.

    Parameters
    ----------
    route : Route
    state : LiquidState
        rho [kg/m³], mu [Pa·s], pv [Pa] or None (then the vapour check is skipped with a
        CHECK finding asking for a value).
    Q_design : float
        Design flow [m³/s]; ``Q_min``/``Q_max`` the range [m³/s] (velocities reported).
    pipes : sequence of Pipe
        Candidates, smallest first.
    duty : DutyClass
        Velocity and pressure-drop criteria.
    p_end : float
        Pressure at the end of the route [Pa abs].

    Returns
    -------
    SizingResult
        Candidates in the order given, the index of the recommended one (smallest bore with
        no FAIL and no CHECK; else smallest with no FAIL), and the reason in words.

    Notes
    -----
    Methods: Darcy–Weisbach, Colebrook (Clamond 2009), duty-class criteria (common practice),
    API RP 14E erosional velocity, vapour-pressure margin along the route profile.
    """
    Q = check_range("design flow", Q_design, "m³/s", low=0.0, high=100.0)
    Q_min = Q if Q_min is None else check_range("minimum flow", Q_min, "m³/s", low=0.0, high=Q,
                                                low_inclusive=True)
    Q_max = Q if Q_max is None else check_range("maximum flow", Q_max, "m³/s", low=Q, high=100.0,
                                                low_inclusive=True)
    out = []
    profiles = []
    for pipe in pipes:
        try:
            line = route.line(pipe)
            hl = float(line.head_loss(np.array([Q]), state)[0])
            V = Q / pipe.area
            Re = state.rho * V * pipe.Di / state.mu
            f = float(darcy_friction(Re, pipe.roughness / pipe.Di))
            dp_per_m = f * state.rho * V * V / (2 * pipe.Di)
            # energy equation from start to end, one bore throughout (velocity heads cancel)
            p_start = p_end + state.rho * G * (line.rise + hl)
            prof = line.profile(Q, state, p_start, p_baro)
            subject = f"{getattr(pipe, 'label', 'pipe')}"
            found = duty.check(subject, V, dp_per_m)
            found += erosional_findings(subject, V, state.rho, erosional_C)
            if state.pv is None:
                found.append(Finding(Severity.CHECK, subject, "vapour pressure", float("nan"),
                                     "Pa", "a value is required", "no vapour-pressure model for "
                                     "this liquid: lowest-pressure check not made",
                                     "kit policy"))
            else:
                found += vapour_findings(prof, state.pv, vapour_margin, subject)
            low = prof.lowest
            out.append(Candidate(pipe, V, Q_min / pipe.area, Q_max / pipe.area, Re, f, dp_per_m,
                                 hl, p_start, low.name, low.p, tuple(found)))
            profiles.append(prof)
        except HeadlineError as exc:
            out.append(Candidate(pipe, *([float("nan")] * 8), "", float("nan"), (), str(exc)))
            profiles.append(None)
    rec, reason = _recommend(out, duty)
    return SizingResult(tuple(out), rec, reason, profiles[rec] if rec is not None else None,
                        out[rec].findings if rec is not None else ())


def _recommend(cands, duty) -> tuple[int | None, str]:
    for want in ("pass", "check"):
        for i, c in enumerate(cands):
            if c.verdict == want:
                first_fail = [f for f in (cands[i - 1].findings if i else ())
                              if f.severity is Severity.FAIL]
                why = (f"smallest size with every criterion met for {duty.label}" if want == "pass"
                       else f"smallest size with no failed criterion for {duty.label}; "
                            "check the marked items")
                if first_fail:
                    why += f"; the next size down fails on {first_fail[0].rule}"
                return i, why
    return None, f"no candidate meets the {duty.label} criteria: widen the range or change duty"


def batch_friction(Q, D, roughness, rho, mu):
    """Velocity [m/s], Re [-], Darcy f [-] and friction pressure drop per length [Pa/m]
    for arrays of flow and bore (broadcast), by Darcy–Weisbach with
    :func:`~kit.core.friction.darcy_friction`.

    >>> V, Re, f, dp = batch_friction(0.01, 0.1023, 4.5e-5, 998.2, 1.002e-3)
    >>> round(float(dp), 1)
    141.0
    """
    Q, D = np.asarray(Q, dtype=float), np.asarray(D, dtype=float)
    V = Q / (np.pi / 4 * D * D)
    Re = np.maximum(rho * V * D / mu, 1e-9)
    f = darcy_friction(Re, np.asarray(roughness) / D)
    return V, Re, f, f * rho * V * V / (2 * D)
