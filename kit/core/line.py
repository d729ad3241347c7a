"""Segments and lines: head loss over arrays of flow, and the pressure profile along a route.

A :class:`Segment` is one pipe run — a pipe, a length, an elevation change from inlet to
outlet and the fittings in it. A :class:`Line` is segments in order, with a named station at
the start and at the end of every segment. Head loss is Darcy–Weisbach with the friction
factor of :func:`kit.core.friction.darcy_friction` plus the fittings' K, each referred to the
bore of the segment it sits in:

.. math:: h_L = \\left(f\\frac{L}{D} + \\sum K\\right)\\frac{V^2}{2g}

Fitting losses are lumped at the end of their segment in the profile. Put a station at every
high point (end a segment there) so the profile sees it. Each :class:`Station` carries the
absolute pressure ``p`` and the gauge pressure ``p_gauge``; :func:`profile_findings` checks
the lowest against vapour pressure with a margin and flags every sub-atmospheric station
(air valve / vacuum rating); words in findings mark kPa(abs) or kPa(g).

Validity: a segment refuses roughness not smaller than its bore and ε/D beyond
:data:`kit.core.friction.FRICTION_LIMITS`; negative flows are refused by segments and lines.

Example
-------
>>> import numpy as np
>>> from types import SimpleNamespace as NS
>>> pipe = NS(Di=0.1023, area=np.pi / 4 * 0.1023**2, roughness=4.5e-5)
>>> water = NS(rho=998.2, mu=1.002e-3)
>>> line = Line("L1", (Segment("run", pipe, 100.0),))
>>> round(float(line.head_loss(np.array([0.01]), water)[0]), 3)
1.44
"""

from __future__ import annotations

from dataclasses import dataclass, field, replace
from functools import cached_property
from math import isfinite

import numpy as np

from kit.core.findings import Finding, Severity
from kit.core.friction import (
    _RE_REFUSE_HIGH,
    FRICTION_LIMITS,
    _darcy_array,
    _darcy_float,
    darcy_friction,
    friction_range_findings,
    transition_findings,
)
from kit.errors import InputError, OutOfRangeError, check_range

__all__ = ["G", "Segment", "Line", "Profile", "Station", "vapour_findings", "profile_findings",
           "RE_FLOOR"]

#: Standard gravity [m/s²] (CGPM 1901, exact).
from kit.core.constants import G  # noqa: E402  (one gravity constant)

#: Re is floored here so that f·V² → 0 at zero flow rather than inf·0.
RE_FLOOR = 1e-9


#: Up to this many flows, head loss is worked flow by flow in plain floats (no numpy per
#: operation); above it, with numpy arrays. Both apply the same formulas in the same order.
SMALL_N = 8


def _fittings_K(fittings, Re, D, roughness, fd=None):
    if not fittings:
        return np.zeros_like(Re)
    from kit.core.fittings import total_K_unchecked

    return total_K_unchecked(fittings, np.asarray(Re, dtype=float), D, roughness, fd)


def _segment_K_float(plan, Re: float, D: float, eps: float, fd: float) -> float | None:
    """Sum of the rows' K at one float Re from their plan (:mod:`kit.core.fittings`);
    None where the plan cannot answer (the caller then takes the numpy path, row by row,
    which raises any row's error naming the row)."""
    from kit.core.fittings import _Fallback, _plan_K

    if plan is None:
        return None
    try:
        K = _plan_K(plan, Re, fd, D, eps)
    except _Fallback:
        return None
    return float(K) if isfinite(K) else None


@dataclass(frozen=True)
class Segment:
    """One pipe run.

    Parameters
    ----------
    name : str
        A name for the run (also the default name of its end station).
    pipe : Pipe
        Anything with ``Di`` [m], ``area`` [m²] and ``roughness`` [m].
    length : float
        Developed length of pipe [m], > 0.
    rise : float
        Elevation of the outlet minus elevation of the inlet [m]; negative for a fall.
        Its magnitude cannot exceed the length.
    fittings : tuple of Fitting
        The rows of the segment's fitting list.
    end_station : str, optional
        Name of the station at the outlet; defaults to ``name``.
    """

    name: str
    pipe: object
    length: float
    rise: float = 0.0
    fittings: tuple = field(default=())
    end_station: str | None = None

    def __post_init__(self):
        check_range(f"length of segment '{self.name}'", self.length, "m", low=0.0, high=1e6)
        check_range(f"rise of segment '{self.name}'", self.rise, "m",
                    low=-self.length, high=self.length, low_inclusive=True)
        if not isinstance(self.fittings, tuple):
            object.__setattr__(self, "fittings", tuple(self.fittings))
        D, eps = float(self.pipe.Di), float(self.pipe.roughness)
        check_range(f"roughness of the pipe in segment '{self.name}'", eps, "m", low=0.0,
                    high=D, low_inclusive=True, high_inclusive=False)
        hi = FRICTION_LIMITS["rel_roughness"]["refuse"][1]
        check_range(f"relative roughness ε/D of segment '{self.name}' (ε {eps:.4g} m, "
                    f"bore {D:.4g} m)", eps / D, "-", low=0.0, high=hi, low_inclusive=True)

    @property
    def station(self) -> str:
        return self.end_station or self.name

    def velocity(self, Q):
        """Mean velocity [m/s] for flows ``Q`` [m³/s]."""
        return np.asarray(Q, dtype=float) / self.pipe.area

    def reynolds(self, Q, state):
        """Reynolds number [-] for flows ``Q`` [m³/s] (≥ 0) of a liquid state (rho, mu)."""
        return state.rho * self.velocity(_flows(Q)) * self.pipe.Di / state.mu

    def loss_terms(self, Q, state):
        """Friction and fitting heads [m] and the Re array, over flows ``Q`` [m³/s].

        Returns ``(h_friction, h_fittings, Re)`` each shaped like ``Q``. Negative or
        non-finite flows are refused, as in :class:`Line`.
        """
        V = self.velocity(_flows(Q))
        Re = np.maximum(state.rho * V * self.pipe.Di / state.mu, RE_FLOOR)
        eD = self.pipe.roughness / self.pipe.Di
        if V.ndim and 0 < V.size and Re.max() <= _RE_REFUSE_HIGH:
            f = _darcy_array(Re, eD)   # ε/D checked by the constructor, Re just above
        else:
            f = darcy_friction(Re, eD)  # refuses (or answers) as ever
        vh = V * V / (2.0 * G)
        K = _fittings_K(self.fittings, Re, self.pipe.Di, self.pipe.roughness, f)
        return f * (self.length / self.pipe.Di) * vh, K * vh, Re

    def head_loss(self, Q, state):
        """Total head loss of the segment [m] over flows ``Q`` [m³/s]."""
        hf, hk, _ = self.loss_terms(Q, state)
        return hf + hk


def _flows(Q) -> np.ndarray:
    if isinstance(Q, float) and Q >= 0.0 and Q != float("inf"):   # one plain flow: fast
        return np.array(Q)
    Q = np.asarray(Q, dtype=float)
    if Q.size and (not np.all(np.isfinite(Q)) or Q.min() < 0):
        bad = Q[~np.isfinite(Q) | (Q < 0)].flat[0]
        raise OutOfRangeError("flow", float(bad), "m³/s", low=0.0, low_inclusive=True)
    return Q


@dataclass(frozen=True)
class Station:
    """State at one station of a line profile (SI; pressures absolute)."""

    name: str
    x: float
    z: float
    p: float
    p_gauge: float
    V: float
    hgl: float
    egl: float


@dataclass(frozen=True)
class Profile:
    """Pressure, HGL and EGL at every station of a line at one flow.

    HGL = z + (p − p_baro)/(ρg) (gauge basis) and EGL = HGL + V²/2g [m]; ``lowest`` is the
    station with the lowest absolute pressure.
    """

    line: str
    Q: float
    stations: tuple
    p_baro: float
    rho: float

    @property
    def lowest(self) -> Station:
        return min(self.stations, key=lambda s: s.p)

    def column(self, name: str) -> np.ndarray:
        return np.array([getattr(s, name) for s in self.stations])


@dataclass(frozen=True)
class Line:
    """Segments in order, with a named station at the start and at each segment's end.

    Parameters
    ----------
    name : str
    segments : tuple of Segment
    start_station : str
    start_elevation : float
        Elevation of the start station [m]; the others follow from each segment's rise.
    """

    name: str
    segments: tuple
    start_station: str = "start"
    start_elevation: float = 0.0

    def __post_init__(self):
        if not isinstance(self.segments, tuple):
            object.__setattr__(self, "segments", tuple(self.segments))
        if not self.segments:
            raise InputError(f"segments of line '{self.name}'", 0, "must hold at least 1 segment")
        names = [self.start_station] + [s.station for s in self.segments]
        dupes = sorted({n for n in names if names.count(n) > 1})
        if dupes:
            raise InputError(f"station names of line '{self.name}'", dupes[0],
                             "must be unique along the line")

    @property
    def length(self) -> float:
        return float(sum(s.length for s in self.segments))

    @cached_property
    def _arrays(self):
        """Bore, area, roughness and length of every segment (the pipes are immutable)."""
        segs = self.segments
        return (np.array([s.pipe.Di for s in segs]), np.array([s.pipe.area for s in segs]),
                np.array([s.pipe.roughness for s in segs]), np.array([s.length for s in segs]))

    def with_condition(self, condition: str) -> Line:
        """A copy with every pipe's roughness at ``condition`` ('new' or 'aged')."""
        segs = tuple(replace(s, pipe=s.pipe.with_condition(condition)) for s in self.segments)
        return replace(self, segments=segs)

    @property
    def rise(self) -> float:
        return float(sum(s.rise for s in self.segments))

    @property
    def end_elevation(self) -> float:
        return self.start_elevation + self.rise

    @property
    def exit_area(self) -> float:
        return float(self.segments[-1].pipe.area)

    @cached_property
    def _floats(self):
        """Per segment, as floats: (D, A, eps, L, ε/D, L/D, fittings, plan of the fittings'
        K or None) — pipes and fittings are immutable."""
        from kit.core.fittings import _plan_or_none

        out = []
        for s in self.segments:
            D, A, eps = float(s.pipe.Di), float(s.pipe.area), float(s.pipe.roughness)
            L = float(s.length)
            plan = _plan_or_none(s.fittings, D, eps) if s.fittings else None
            out.append((D, A, eps, L, eps / D, L / D, s.fittings, plan))
        return tuple(out)

    def _small(self, Q: np.ndarray, state):
        """Friction and fitting heads [m] of each segment at each flow, in plain floats:
        the arithmetic of :meth:`head_loss`, term by term, flow by flow. ``[(hf, hk), ...]``
        per flow (``hk[i]`` None for a segment without fittings); None where any Re is
        refused or not finite, or a fitting row needs its own checks — the numpy path then
        answers, or raises the error it always raised."""
        from kit.core.fittings import RE_FD_FLOOR

        try:
            rho, mu = float(state.rho), float(state.mu)
        except (TypeError, ValueError):   # not one number each: the numpy path decides
            return None
        geo = self._floats
        flows = []
        for q in Q.ravel().tolist():                      # all Re first, as the numpy path
            per = []
            for D, A, _eps, _L, eD, _LD, _fits, _plan in geo:
                V = q / A
                Re = rho * V * D / mu
                if not Re > RE_FLOOR:
                    Re = RE_FLOOR if Re <= RE_FLOOR else Re   # NaN stays NaN
                if not Re <= _RE_REFUSE_HIGH:
                    return None
                per.append((V, Re, _darcy_float(Re, eD)))
            flows.append(per)
        out = []
        for per in flows:
            hf, hk = [], []
            for (D, _A, eps, _L, eD, LD, fits, plan), (V, Re, f) in zip(geo, per, strict=True):
                vh = V * V / (2.0 * G)
                hf.append(f * LD * vh)
                if fits:
                    fd = f if Re >= RE_FD_FLOOR else _darcy_float(RE_FD_FLOOR, eD)
                    K = _segment_K_float(plan, Re, D, eps, fd)
                    if K is None:
                        return None
                    hk.append(K * vh)
                else:
                    hk.append(None)
            out.append((hf, hk))
        return out

    def segment_losses(self, Q, state) -> np.ndarray:
        """Head loss of each segment [m], shape ``(n_segments, n_Q)``."""
        Q = np.atleast_1d(_flows(Q))
        if Q.ndim == 1 and 0 < Q.size <= SMALL_N:
            rows = self._small(Q, state)
            if rows is not None:
                return np.array([[hf[i] + (hk[i] or 0.0) for hf, hk in rows]
                                 for i in range(len(self.segments))])
        return np.stack([s.head_loss(Q, state) for s in self.segments])

    def head_loss(self, Q, state) -> np.ndarray:
        """Total head loss [m] over flows ``Q`` [m³/s] (same shape as ``Q``).

        Method: Darcy–Weisbach with :func:`~kit.core.friction.darcy_friction`, plus fittings.
        Up to :data:`SMALL_N` flows are worked one by one in plain floats, more with numpy
        arrays (the same formulas in the same order).
        """
        Q = _flows(Q)
        if 0 < Q.size <= SMALL_N:
            rows = self._small(Q, state)
            if rows is not None:
                out = []
                for hf, hk in rows:
                    total = 0.0
                    for h in hf:
                        total = total + h
                    for h in hk:
                        if h is not None:
                            total = total + h
                    out.append(total)
                return np.array(out).reshape(Q.shape)
        return self._head_loss_arrays(Q, state)

    def _head_loss_arrays(self, Q: np.ndarray, state) -> np.ndarray:
        q = np.atleast_1d(Q).ravel()
        segs = self.segments
        D, A, eps, L = self._arrays
        V = q[None, :] / A[:, None]
        Re = np.maximum(state.rho * V * D[:, None] / state.mu, RE_FLOOR)
        eD = (eps / D)[:, None]
        if Re.size and Re.max() <= _RE_REFUSE_HIGH:
            f = _darcy_array(Re, eD)   # ε/D checked by each segment's constructor
        else:
            f = darcy_friction(Re, eD)  # refuses (or answers) as ever
        vh = V * V / (2.0 * G)
        total = (f * (L / D)[:, None] * vh).sum(axis=0)
        for i, s in enumerate(segs):
            if s.fittings:
                total = total + _fittings_K(s.fittings, Re[i], D[i], eps[i], f[i]) * vh[i]
        return total.reshape(np.shape(Q))

    def profile(self, Q: float, state, p_start: float, p_baro: float = 101325.0) -> Profile:
        """Stations' pressure, HGL and EGL at flow ``Q`` [m³/s].

        Parameters
        ----------
        Q : float
            Flow [m³/s], ≥ 0.
        state : LiquidState
            Density and viscosity of the flowing liquid.
        p_start : float
            Static pressure at the start station, in the first segment's flow [Pa abs].
        p_baro : float
            Barometric pressure for gauge values [Pa].

        Notes
        -----
        Energy balance station to station (Bernoulli with a head-loss term):
        p₂ = p₁ + ρg(z₁ − z₂) + ρ(V₁² − V₂²)/2 − ρg·h_L.
        """
        Q = float(_flows(np.array([Q]))[0])
        rho, g = state.rho, G
        z = self.start_elevation
        V = Q / self.segments[0].pipe.area
        p = float(p_start)
        x = 0.0
        out = [self._station(self.start_station, x, z, p, V, p_baro, rho)]
        losses = self.segment_losses(np.array([Q]), state)[:, 0].tolist()
        for s, hl in zip(self.segments, losses, strict=True):
            V2 = Q / s.pipe.area
            z2 = z + s.rise
            p = p + rho * g * (z - z2) + 0.5 * rho * (V * V - V2 * V2) - rho * g * hl
            x += s.length
            z, V = z2, V2
            out.append(self._station(s.station, x, z, p, V, p_baro, rho))
        return Profile(self.name, Q, tuple(out), p_baro, rho)

    @staticmethod
    def _station(name, x, z, p, V, p_baro, rho) -> Station:
        hgl = z + (p - p_baro) / (rho * G)
        return Station(name, x, z, p, p - p_baro, V, hgl, hgl + V * V / (2 * G))

    def findings(self, Q, state) -> list[Finding]:
        """Transition-zone and friction-range findings for each segment over flows ``Q``,
        and a finding for each fitting row used below the Re range its source covers."""
        out = []
        Q = np.atleast_1d(_flows(Q))
        for s in self.segments:
            sub = f"segment '{s.name}' of line '{self.name}'"
            Re = s.reynolds(Q, state)
            out += transition_findings(sub, Re)
            out += friction_range_findings(sub, Re, s.pipe.roughness / s.pipe.Di)
            if s.fittings:
                from kit.core.fittings import fitting_re_findings

                live = Re[Re > 0]
                if live.size:
                    for f in s.fittings:
                        out += fitting_re_findings(f, live, subject=sub)
        return out


def _kpa(p: float, basis: str) -> str:
    return f"{p / 1000:.4g} kPa({basis})"


def vapour_findings(profile: Profile, pv: float | None, margin_head: float = 2.0,
                    subject: str | None = None) -> list[Finding]:
    """Lowest pressure in a line against vapour pressure and atmosphere.

    FAIL where the lowest absolute pressure is at or below the vapour pressure (and, where
    the computed absolute pressure is below zero, the rule says the state is impossible:
    the column breaks and the flow is not as computed); CHECK where it is within
    ``margin_head`` [m of liquid] of it; CHECK where it is below atmospheric (vacuum: air
    comes out of solution and leaks in at joints; a siphon crest). The margin is common
    practice, no source; it is the user's to set. Pressures in the words are marked
    kPa(abs) or kPa(g).

    Parameters
    ----------
    profile : Profile
    pv : float or None
        Vapour pressure [Pa abs]; ``None`` raises (the user must give one).
    margin_head : float
        Required margin above vapour pressure [m of liquid].

    Examples
    --------
    >>> st = Station("crest", 0, 8.0, 5000.0, 5000.0 - 101325.0, 1.0, 0.0, 0.0)
    >>> prof = Profile("L", 0.01, (st,), 101325.0, 998.0)
    >>> vapour_findings(prof, 2339.0)[0].severity.value
    'check'
    """
    if pv is None:
        raise InputError("vapour pressure", None,
                         "is needed for the vacuum check: this liquid has no vapour-pressure "
                         "model, give a value")
    low = profile.lowest
    subject = subject or f"station '{low.name}' of line '{profile.line}'"
    margin = (low.p - pv) / (profile.rho * G)
    src = "common practice, no source (margin user-set)"
    where = (f"lowest pressure {_kpa(low.p, 'abs')} = {_kpa(low.p_gauge, 'g')} at "
             f"'{low.name}', vapour pressure {_kpa(pv, 'abs')}")
    out = []
    if low.p <= pv:
        rule = ("liquid boils (cavitates) where pressure falls to vapour pressure; flow "
                "breaks")
        if low.p < 0.0:
            rule += ("; the computed absolute pressure is below zero, an impossible state: "
                     "the liquid column parts and the flow cannot be as computed")
        out.append(Finding(Severity.FAIL, subject, "pressure above vapour pressure", margin, "m",
                           "> 0 m", f"{rule} ({where})", "definition of vapour pressure",
                           low=margin_head))
    elif margin < margin_head:
        out.append(Finding(Severity.CHECK, subject, "pressure above vapour pressure", margin, "m",
                           f">= {margin_head:.3g} m", f"lowest pressure close to vapour pressure "
                           f"({where})", src, low=margin_head))
    else:
        out.append(Finding(Severity.PASS, subject, "pressure above vapour pressure", margin, "m",
                           f">= {margin_head:.3g} m", f"lowest pressure clear of vapour pressure "
                           f"({where})", src, low=margin_head))
    if low.p < profile.p_baro and low.p > pv:
        out.append(Finding(Severity.CHECK, subject, "gauge pressure", low.p_gauge, "Pa",
                           ">= 0 Pa(g)", f"below atmospheric ({_kpa(low.p_gauge, 'g')}): siphon, "
                           "high point or suction lift; air release and in-leakage — an air "
                           "valve (air release / vacuum break) and the vacuum rating of pipe "
                           "and joints must be considered",
                           "common practice, no source"))
    return out


def profile_findings(profile: Profile, pv: float | None, margin_head: float = 2.0,
                     subject: str | None = None) -> list[Finding]:
    """Every check of a line profile: :func:`vapour_findings` at the lowest station, and a
    CHECK for each other station below atmospheric pressure (air valve / vacuum rating).

    ``pv=None`` gives a CHECK asking for a vapour pressure instead of raising.

    Parameters
    ----------
    profile : Profile
    pv : float or None
        Vapour pressure [Pa abs].
    margin_head : float
        Required margin above vapour pressure [m of liquid].
    subject : str, optional
        Subject prefix (default: the line's name).

    Examples
    --------
    >>> a = Station("start", 0, 0.0, 150000.0, 48675.0, 1.0, 0.0, 0.0)
    >>> b = Station("crest", 50, 12.0, 60000.0, -41325.0, 1.0, 0.0, 0.0)
    >>> c = Station("knee", 80, 11.0, 80000.0, -21325.0, 1.0, 0.0, 0.0)
    >>> fs = profile_findings(Profile("L", 0.01, (a, b, c), 101325.0, 998.0), 2339.0)
    >>> [f.quantity for f in fs]
    ['pressure above vapour pressure', 'gauge pressure', 'gauge pressure']
    """
    base = subject or f"line '{profile.line}'"
    low = profile.lowest
    if pv is None:
        out = [Finding(Severity.CHECK, f"{base}, station '{low.name}'",
                       "pressure above vapour pressure", float("nan"), "m",
                       "a vapour pressure is required",
                       f"no vapour-pressure model for this liquid: lowest pressure "
                       f"{_kpa(low.p, 'abs')} not checked against it",
                       "definition of vapour pressure")]
        if low.p < 0.0:
            out.append(Finding(Severity.FAIL, f"{base}, station '{low.name}'",
                               "absolute pressure", low.p, "Pa", ">= 0 Pa(abs)",
                               f"the computed absolute pressure {_kpa(low.p, 'abs')} is below "
                               "zero, an impossible state: the liquid column parts and the flow "
                               "cannot be as computed", "definition of absolute pressure"))
        if low.p < profile.p_baro:
            out.append(Finding(Severity.CHECK, f"{base}, station '{low.name}'", "gauge pressure",
                               low.p_gauge, "Pa", ">= 0 Pa(g)",
                               f"below atmospheric ({_kpa(low.p_gauge, 'g')}): air valve and "
                               "vacuum rating to be considered", "common practice, no source"))
    else:
        out = vapour_findings(profile, pv, margin_head, f"{base}, station '{low.name}'")
    for st in profile.stations:
        if st is low or st.p >= profile.p_baro:
            continue
        out.append(Finding(Severity.CHECK, f"{base}, station '{st.name}'", "gauge pressure",
                           st.p_gauge, "Pa", ">= 0 Pa(g)",
                           f"below atmospheric ({_kpa(st.p_gauge, 'g')} = "
                           f"{_kpa(st.p, 'abs')}): an air valve (air release / vacuum break) "
                           "and the vacuum rating of pipe and joints must be considered",
                           "common practice, no source"))
    return out
