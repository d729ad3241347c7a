"""Endpoints and systems: the system head curve and its band over conditions.

The system head a pump must supply to move flow Q from the source surface to the
destination surface is the energy equation with a head-loss term:

.. math:: H(Q) = (z_d - z_s) + \\frac{p_d - p_s}{\\rho g} + h_{L,suction}(Q)
          + h_{L,discharge}(Q) \\; [+ V_{exit}^2/2g \\text{ for a free discharge}]

A submerged discharge loses its exit velocity head through the exit fitting (K = 1), which
belongs in the last segment's fitting list. A free discharge carries its exit velocity head
away in the jet (the term above); an exit fitting on a line that also discharges free would
count V²/2g twice, so that combination is **refused** (:class:`~kit.errors.InputError`) —
refusing, not silently dropping one term, because the two inputs contradict each other
about the outlet and only the user knows which is meant. The *band* is the set of curves over static
head (minimum / maximum, from the two endpoints' level ranges), liquid temperature
(minimum / maximum) and pipe condition (new / aged roughness).

:func:`band_profiles` gives, for each band condition at its operating flow, the suction and
discharge pressure profiles (absolute and gauge pressure, HGL, EGL at every station), the
lowest pressure against vapour pressure with a margin, every sub-atmospheric station (air
valve / vacuum rating) and, for a condition without an operating point, a finding saying so.

Example
-------
>>> import numpy as np
>>> from types import SimpleNamespace as NS
>>> src = Endpoint("sump", 0.0, 2.0, 101325.0)
>>> dst = Endpoint("tank", 20.0, 25.0, 101325.0)
>>> st = NS(rho=998.2, mu=1.0e-3, pv=2339.0)
>>> liquid = NS(state=lambda T, P=101325.0: st, name="water")
>>> sysm = System("demo", src, dst, None, None, liquid, 293.15, 293.15)
>>> float(sysm.curve(np.array([0.0]), Condition("max", 293.15, "new"))[0])
25.0
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from kit.core.findings import Finding, Severity
from kit.core.line import G, Line, Profile, profile_findings
from kit.errors import InputError, check_choice, check_range

__all__ = ["Endpoint", "System", "Condition", "SystemBand", "STATIC_CASES", "BandProfile",
           "band_profiles", "exit_rows"]


def exit_rows(line) -> list[str]:
    """Labels of the 'exit' fitting rows in a line (any segment), for the double-count check.

    >>> exit_rows(None)
    []
    """
    out = []
    for seg in getattr(line, "segments", None) or ():
        for f in seg.fittings:
            if getattr(f, "kind", None) == "exit":
                out.append(f"{f.label or f.kind} in segment '{seg.name}'")
    return out

#: static-head cases: name -> (source level, destination level)
STATIC_CASES = {"min": ("high", "low"), "max": ("low", "high")}


@dataclass(frozen=True)
class Endpoint:
    """A vessel or open surface at one end of a system.

    Parameters
    ----------
    name : str
    level_low, level_high : float
        Lowest and highest elevation of the liquid surface [m] (for a free discharge, the
        outlet's elevation, both equal).
    pressure : float
        Absolute pressure on the surface [Pa] (atmospheric for an open tank).
    discharge : str
        ``"submerged"`` (a surface) or ``"free"`` (a jet into air: the exit velocity head
        is added to the system curve).
    """

    name: str
    level_low: float
    level_high: float
    pressure: float = 101325.0
    discharge: str = "submerged"

    def __post_init__(self):
        check_range(f"low level of '{self.name}'", self.level_low, "m", low=-1e4, high=1e4)
        check_range(f"high level of '{self.name}'", self.level_high, "m",
                    low=self.level_low, high=1e4, low_inclusive=True)
        check_range(f"surface pressure of '{self.name}'", self.pressure, "Pa", low=0.0,
                    high=1e8)
        check_choice(f"discharge of '{self.name}'", self.discharge, ("submerged", "free"))

    def level(self, which: str) -> float:
        return self.level_low if which == "low" else self.level_high


@dataclass(frozen=True)
class Condition:
    """One member of the band: static-head case, liquid temperature [K], pipe condition."""

    static: str
    T: float
    roughness: str

    def __post_init__(self):
        check_choice("static head case", self.static, tuple(STATIC_CASES))
        check_choice("pipe condition", self.roughness, ("new", "aged"))

    @property
    def label(self) -> str:
        return f"{self.static} static / {self.T - 273.15:.0f} °C / {self.roughness}"


@dataclass(frozen=True)
class SystemBand:
    """System curves over the band's conditions: ``H[i]`` is the curve of ``conditions[i]``."""

    Q: np.ndarray
    conditions: tuple
    H: np.ndarray

    @property
    def lower(self) -> np.ndarray:
        return self.H.min(axis=0)

    @property
    def upper(self) -> np.ndarray:
        return self.H.max(axis=0)

    def curve(self, condition: Condition) -> np.ndarray:
        return self.H[self.conditions.index(condition)]


@dataclass(frozen=True)
class System:
    """A pumped (or gravity) system: source, destination, suction and discharge lines.

    Parameters
    ----------
    name : str
    source, destination : Endpoint
    suction : Line or None
        Source to pump; ``None`` when the pump draws straight from the source.
    discharge : Line or None
        Pump to destination.
    liquid : Liquid
        Anything with ``state(T, P)`` returning rho, mu, pv.
    T_min, T_max : float
        Liquid temperature range [K].
    p_baro : float
        Barometric pressure at the site [Pa].
    pump_elevation : float, optional
        Elevation of the pump's suction datum (impeller eye / suction flange centreline) [m];
        defaults to the suction line's end elevation.
    """

    name: str
    source: Endpoint
    destination: Endpoint
    suction: Line | None
    discharge: Line | None
    liquid: object
    T_min: float
    T_max: float
    p_baro: float = 101325.0
    pump_elevation: float | None = None
    _cache: dict = field(default_factory=dict, compare=False, repr=False, hash=False)

    def __post_init__(self):
        check_range("minimum liquid temperature", self.T_min, "K", low=0.0, high=1000.0)
        check_range("maximum liquid temperature", self.T_max, "K", low=self.T_min, high=1000.0,
                    low_inclusive=True)
        check_range("barometric pressure", self.p_baro, "Pa", low=1e4, high=1.2e5)
        if self.destination.discharge == "free" and self.discharge is not None:
            rows = exit_rows(self.discharge)
            if rows:
                raise InputError(
                    f"fittings of discharge line '{self.discharge.name}'", rows[0],
                    f"must not hold an exit fitting (K = 1) when '{self.destination.name}' "
                    "discharges free: the free jet already carries away the exit velocity "
                    "head, so V²/2g would count twice; remove the exit row, or make the "
                    "discharge submerged")

    @property
    def lines(self) -> tuple:
        return tuple(x for x in (self.suction, self.discharge) if x is not None)

    @property
    def pump_z(self) -> float:
        if self.pump_elevation is not None:
            return float(self.pump_elevation)
        if self.suction is not None:
            return self.suction.end_elevation
        if self.discharge is not None:
            return self.discharge.start_elevation
        raise InputError("pump elevation", None, "is needed when the system has no lines")

    def state(self, T: float):
        """Liquid state at temperature T [K], at the source surface pressure."""
        return self.liquid.state(T, max(self.source.pressure, self.p_baro))

    def _line(self, which: str, roughness: str) -> Line | None:
        key = (which, roughness)
        if key not in self._cache:
            line = getattr(self, which)
            self._cache[key] = None if line is None else line.with_condition(roughness)
        return self._cache[key]

    def static_head(self, static: str, T: float) -> float:
        """Static head [m]: elevation difference plus surface-pressure difference."""
        s_lvl, d_lvl = STATIC_CASES[static]
        rho = self.state(T).rho
        dz = self.destination.level(d_lvl) - self.source.level(s_lvl)
        return dz + (self.destination.pressure - self.source.pressure) / (rho * G)

    def suction_loss(self, Q, condition: Condition) -> np.ndarray:
        """Suction-line head loss [m] over flows Q [m³/s] (zeros with no suction line)."""
        line = self._line("suction", condition.roughness)
        Q = np.asarray(Q, dtype=float)
        if line is None:
            return np.zeros_like(Q)
        return line.head_loss(Q, self.state(condition.T))

    def curve(self, Q, condition: Condition) -> np.ndarray:
        """System head [m] over flows Q [m³/s] at one condition."""
        Q = np.asarray(Q, dtype=float)
        st = self.state(condition.T)
        H = np.full(Q.shape, self.static_head(condition.static, condition.T))
        for which in ("suction", "discharge"):
            line = self._line(which, condition.roughness)
            if line is not None:
                H = H + line.head_loss(Q, st)
        if self.destination.discharge == "free" and self.discharge is not None:
            V = Q / self.discharge.exit_area
            H = H + V * V / (2.0 * G)
        return H

    def conditions(self) -> tuple:
        """The band: static (min, max) × temperature (min, max) × roughness (new, aged)."""
        temps = (self.T_min,) if self.T_max == self.T_min else (self.T_min, self.T_max)
        return tuple(Condition(s, T, r) for s in ("min", "max") for T in temps
                     for r in ("new", "aged"))

    def band(self, Q) -> SystemBand:
        """System curves over every condition of :meth:`conditions`."""
        Q = np.asarray(Q, dtype=float)
        conds = self.conditions()
        return SystemBand(Q, conds, np.stack([self.curve(Q, c) for c in conds]))

    def npsh_available(self, Q, condition: Condition) -> np.ndarray:
        """NPSH available at the pump suction datum [m] over flows Q [m³/s].

        NPSHa = (p_s − p_v)/(ρg) + (z_s − z_pump) − h_L,suction, with the source surface at
        its level for the condition's static case (lowest source level for "max").
        Definition as in ANSI/HI 9.6.1 (total suction head above vapour pressure at the
        suction datum; from memory).
        """
        st = self.state(condition.T)
        pv = st.require_pv("vapour pressure for NPSH") if hasattr(st, "require_pv") else st.pv
        s_lvl = STATIC_CASES[condition.static][0]
        head = (self.source.pressure - pv) / (st.rho * G) + self.source.level(s_lvl) - self.pump_z
        return head - self.suction_loss(Q, condition)


@dataclass(frozen=True)
class BandProfile:
    """Suction and discharge profiles of one band condition at its operating flow.

    Attributes
    ----------
    condition : Condition
    Q : float or None
        Operating flow [m³/s]; None where the condition has no operating point.
    suction, discharge : Profile or None
        Station pressures (absolute ``p`` and gauge ``p_gauge`` [Pa]), HGL and EGL [m].
    lowest : Station or None
        The lowest-absolute-pressure station over both lines.
    findings : tuple of Finding
        Lowest pressure against vapour pressure with the margin, each sub-atmospheric
        station (air valve / vacuum rating), the lines' transition-zone, friction-range and
        fitting-Re findings at the flow, or the reason there is no profile.
    note : str
        Why there is no profile ('' when there is one).
    """

    condition: Condition
    Q: float | None
    suction: Profile | None
    discharge: Profile | None
    findings: tuple = ()
    note: str = ""

    @property
    def lowest(self):
        cands = [p.lowest for p in (self.suction, self.discharge) if p is not None]
        return min(cands, key=lambda s: s.p) if cands else None


def band_profiles(system: System, points, margin_head: float = 2.0) -> list[BandProfile]:
    """Suction and discharge pressure profiles for each band condition at its operating flow.

    Energy equation with the loss term (Bernoulli), station to station along each line
    (:meth:`kit.core.line.Line.profile`), from the boundary each line is tied to:

    - suction: from the source surface (its level for the condition's static case, its
      surface pressure, velocity zero) to the pump:
      p₁ = p_s + ρg(z_s − z₁) − ρV₁²/2 at the line's start;
    - discharge: from the destination back to the pump, so the profile holds at any flow
      (the pump makes up the rest):
      p₁ = p_d + ρg(z_d − z₁) + ρg·h_L,d(Q) + ρV_e²/2 [free jet only] − ρV₁²/2, with z_d
      the destination level for the static case (the jet's outlet for a free discharge).

    Fitting losses are lumped at the end of their segment; an exit row (K = 1) at a
    submerged end makes the last station's static pressure the receiver's less V²/2g
    (conservative for a low point). Put a station at every high point.

    Parameters
    ----------
    system : System
    points : mapping or sequence
        ``{Condition: Q or None}`` or ``[(Condition, Q or None), ...]``; ``Q`` [m³/s] is the
        operating flow there, ``None`` (or NaN) where the condition has no operating point
        (the result then says so, with a CHECK finding: never dropped).
    margin_head : float
        Required margin of the lowest pressure above vapour pressure [m of liquid].

    Returns
    -------
    list of BandProfile
        In the order given.

    Examples
    --------
    >>> import numpy as np
    >>> from types import SimpleNamespace as NS
    >>> from kit.core.line import Segment
    >>> from kit.core.pipes import custom_pipe
    >>> pipe = custom_pipe(0.1, "carbon_steel")
    >>> st = NS(rho=998.2, mu=1.0e-3, pv=2339.0)
    >>> liquid = NS(state=lambda T, P=101325.0: st)
    >>> dis = Line("rise", (Segment("crest", pipe, 200.0, 30.0), Segment("out", pipe, 50.0,
    ...            -10.0)), "pump", 0.0)
    >>> sysm = System("d", Endpoint("sump", 1.0, 1.0), Endpoint("tank", 20.0, 20.0, 101325.0,
    ...               "free"), None, dis, liquid, 293.15, 293.15)
    >>> bp = band_profiles(sysm, [(sysm.conditions()[0], 0.01)])[0]
    >>> bp.lowest.name, round(bp.lowest.p_gauge / 1000, 1)
    ('crest', -90.0)
    """
    margin_head = check_range("vapour-pressure margin", margin_head, "m", low=0.0, high=1e3,
                              low_inclusive=True)
    items = list(points.items()) if hasattr(points, "items") else list(points)
    out = []
    for cond, Q in items:
        if not isinstance(cond, Condition):
            raise InputError("band condition", type(cond).__name__, "must be a Condition")
        label = cond.label
        if Q is None or not np.isfinite(float(Q)):
            f = Finding(Severity.CHECK, f"system '{system.name}' at {label}",
                        "operating flow", float("nan"), "m³/s", "an operating point",
                        "no operating point at this condition: line pressures not computed "
                        "(the pump cannot deliver here, or runs out beyond its curve)",
                        "common practice, no source")
            out.append(BandProfile(cond, None, None, None, (f,), "no operating point"))
            continue
        Q = check_range(f"operating flow at {label}", Q, "m³/s", low=0.0, high=100.0,
                        low_inclusive=True)
        st = system.state(cond.T)
        rho = st.rho
        pv = getattr(st, "pv", None)
        s_lvl, d_lvl = STATIC_CASES[cond.static]
        suc = dis = None
        found: list[Finding] = []
        line = system._line("suction", cond.roughness)
        if line is not None:
            V1 = Q / line.segments[0].pipe.area
            p1 = (system.source.pressure
                  + rho * G * (system.source.level(s_lvl) - line.start_elevation)
                  - 0.5 * rho * V1 * V1)
            suc = line.profile(Q, st, p1, system.p_baro)
            found += profile_findings(suc, pv, margin_head,
                                      f"suction line '{line.name}' at {label}")
            found += line.findings(np.array([Q]), st) if Q > 0 else []
        line = system._line("discharge", cond.roughness)
        if line is not None:
            V1 = Q / line.segments[0].pipe.area
            dest = system.destination
            if dest.discharge == "free":
                z_d = line.end_elevation
                Ve = Q / line.exit_area
                extra = 0.5 * rho * Ve * Ve
            else:
                z_d, extra = dest.level(d_lvl), 0.0
            hl = float(line.head_loss(np.array([Q]), st)[0])
            p1 = (dest.pressure + rho * G * (z_d - line.start_elevation) + rho * G * hl
                  + extra - 0.5 * rho * V1 * V1)
            dis = line.profile(Q, st, p1, system.p_baro)
            if dest.discharge == "free" and len(dis.stations) > 1:
                # the jet's end station is at the receiver pressure by construction
                dis_chk = Profile(dis.line, dis.Q, dis.stations[:-1], dis.p_baro, dis.rho)
            else:
                dis_chk = dis
            found += profile_findings(dis_chk, pv, margin_head,
                                      f"discharge line '{line.name}' at {label}")
            found += line.findings(np.array([Q]), st) if Q > 0 else []
        out.append(BandProfile(cond, Q, suc, dis, tuple(found)))
    return out
