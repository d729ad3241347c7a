"""Drain-down: the level and flow history of a tank emptying through an orifice or a line.

Method
------
**Quasi-steady energy balance** at each level ``h`` (the flow is taken as steady at the
head of the moment; acceleration of the liquid in the outlet is neglected, which holds while
the drain lasts much longer than the outlet's own response, i.e. almost always):

.. math:: \\Delta H(h) = (h - z_d) + \\frac{p_s - p_d}{\\rho g}

with ``z_d`` the discharge elevation (an orifice's centre, a free jet's outlet, or a
receiving vessel's level) and ``p_d`` the pressure there.

- Orifice: :math:`Q = C_d A \\sqrt{2 g \\Delta H}` (Torricelli 1643, with a discharge
  coefficient).
- Line: :math:`h_L(Q) [+ V_e^2/2g] = \\Delta H` — Darcy–Weisbach losses of the line with
  friction re-evaluated at each flow's Re, plus the exit velocity head for a free jet. A
  submerged exit loses its velocity head through the exit fitting (K = 1), which belongs in
  the last segment's fitting list, as in :mod:`kit.core.system`. Solved over the whole
  level grid at once: H(Q) is tabulated on a flow grid, each level's root is bracketed from
  the table and polished by a vectorised Illinois (safeguarded regula falsi) iteration to a
  relative residual of 1e-12.

**Time by quadrature over volume** (not an ODE in level, whose right side −Q/A(h) is singular
where the surface area → 0 at the bottom of a horizontal cylinder or a sphere):

.. math:: t = \\int_{V(h_2)}^{V(h_1)} \\frac{dV}{Q(h(V))},\\qquad
          \\Delta t_i = \\frac{2\\,\\Delta V_i}{Q_i + Q_{i+1}}

on a level grid of about 600 points (the tank's cached, end-clustered 513-level table plus
129 evenly spaced levels) with exact volumes. The step rule is exact when Q² is linear
in V over the step — Torricelli's case for a vertical cylinder — and stays finite where Q → 0
at a stop level; it is second-order accurate otherwise. ``DrainResult.time_error`` estimates
the error from the same sum on every second grid point (Richardson: |t − t₂|/3); it is
typically below 1e-6 of the total.

Speed (2-core machine, 3-segment line, ~570 levels): one piped drain-down 4–8 ms, a sweep of
100 line sizes 0.4–0.8 s, 100 orifice sizes 0.02–0.05 s.

Findings
--------
Target not reached (FAIL, with the stop level and its cause), vortexing at low submergence
(CHECK, Hydraulic Institute guideline), laminar or transitional flow in the outlet (CHECK —
normal near the end of a gravity drain; friction is re-evaluated at each level), a sharp
orifice at low Re (CHECK), vent capacity against the peak drain rate (PASS / CHECK / FAIL),
padded or vacuum surface (CHECK), the lowest pressure in an outlet line against vapour
pressure and atmosphere over the drain (siphoning legs; :func:`kit.core.line.vapour_findings`),
fitting rows used below the Re range of their K method, and:

- **siphon limit** (:data:`SIPHON_MODEL`): where the full-pipe flow would take a station of
  the line below vapour pressure (+ ``crest_margin``), the flow is held at the value that
  keeps it there (FAIL finding, "level reached" at most CHECK, ``siphon_limited``); where
  even zero flow cannot hold the column the siphon breaks and the drain stops (FAIL,
  ``siphon_broken``). No absolute pressure below vapour pressure is ever reported as a flow.
- **asymptotic stop** (:data:`ASYMPTOTE_RULE`): a laminar approach to a stop level takes
  infinite time; the history ends a stated offset short of it and says so (``asymptotic``,
  ``end_offset``, ``time_note``).

Example
-------
>>> from types import SimpleNamespace as NS
>>> from kit.core.tank import vertical_cylinder
>>> water = NS(T=293.15, rho=998.2, mu=1.0e-3, pv=2339.0)
>>> r = drain(vertical_cylinder(1.0, 2.0), OrificeOutlet(0.025, 0.61), water, 2.0, 0.0)
>>> round(r.total_time, 1)
1675.2
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np

from kit.core.findings import CAUTIONS, Finding, Severity, cautions_for
from kit.core.line import G, Profile, vapour_findings
from kit.errors import InputError, NoSolutionError, check_choice, check_range

__all__ = [
    "P_ATM", "ORIFICE_CD", "DischargeCoefficient", "orifice_cd", "OrificeOutlet",
    "PipedOutlet", "Vent", "DrainResult", "drain", "orifice_flow", "piped_flow",
    "DRAIN_METHOD", "SUBMERGENCE_RULE", "min_submergence", "vent_pressure_drop",
    "SIPHON_MODEL", "ASYMPTOTE_RULE", "T_AIR_DEFAULT", "station_pressures",
]

#: Standard atmosphere [Pa] (ISO 2533).
P_ATM = 101325.0
_R = 8.314462618          # J/(mol K), CODATA 2018
_M_AIR = 0.0289647        # kg/mol, dry air (US Standard Atmosphere 1976)
#: Default air temperature at the vent [K] when none is given (20 °C; common practice, no
#: source — give the site's ambient temperature). Vent air density is taken at the *air*
#: temperature, not the liquid's.
T_AIR_DEFAULT = 293.15

#: The siphon model (stated, and shown in the record).
SIPHON_MODEL = {
    "name": "vapour-limited siphon: the flow is the smaller of the full-pipe flow and the "
            "flow that holds the lowest-pressure station at vapour pressure (plus an optional "
            "margin); the siphon breaks (flow stops) where even zero flow cannot hold it",
    "why": "a liquid column cannot stand below its vapour pressure: where the full-pipe flow "
           "would take a high point below it, a vapour (and air) pocket forms there, the leg "
           "downstream runs part full, and the high point acts as a control — the flow is "
           "set by the energy balance from the tank surface to that point at vapour "
           "pressure. Where the level falls so far that the static column to the high point "
           "alone exceeds (p_surface − p_v)/(ρg), the column parts and the siphon loses prime; "
           "it does not restart by itself. Dissolved gas comes out above vapour pressure, so "
           "a real siphon can break sooner: the margin (default 0 m, the physical limit) is "
           "the user's",
    "source": "energy equation (Bernoulli with losses) and the definition of vapour "
              "pressure; column-separation model: common practice, no source",
}

#: How far short of an asymptotic stop level the time is reported (data): the larger of
#: ``offset_m`` and ``offset_fraction`` × (start − stop). An approach is asymptotic when the
#: flow vanishes at least linearly in the head left (laminar: Q ∝ Δh; turbulent Q ∝ √Δh
#: gives a finite time): the local exponent d ln Q / d ln Δh at the offset is ≥ ``exponent``.
ASYMPTOTE_RULE = {"offset_m": 0.001, "offset_fraction": 0.001, "exponent": 0.75,
                  "source": "∫dh/Q diverges where Q ∝ Δh^n with n ≥ 1 (calculus); the "
                            "offset and the exponent threshold: this kit"}


@dataclass(frozen=True)
class DischargeCoefficient:
    """A discharge coefficient for a tank outlet, with its source."""

    key: str
    label: str
    Cd: float
    source: str


#: Discharge coefficients of tank outlets discharging to air at high Re (Re > 1e4).
ORIFICE_CD: dict[str, DischargeCoefficient] = {
    "sharp": DischargeCoefficient(
        "sharp", "sharp-edged orifice in a thin wall", 0.61,
        "classic value 0.60–0.62 (Weisbach; e.g. Idelchik, Handbook of Hydraulic Resistance, "
        "3rd ed., 1994, ch. 4), from memory"),
    "rounded": DischargeCoefficient(
        "rounded", "rounded (bell-mouth) outlet, r/d = 0.15", 0.97,
        "Cd = 1/sqrt(1 + K) for a rounded outlet running full (no vena contracta), K = 0.067 "
        "of a rounded entrance at r/d = 0.15 by Idel'chik (Handbook of Hydraulic Resistance), "
        "as in fluids.fittings.entrance_rounded. At the same r/d Rennels & Hudson (2012, the "
        "kit's entrance_rounded fitting default) give K 0.149 (Cd 0.93) and Crane TP-410 "
        "K 0.04 (Cd 0.98): for a rounding other than r/d 0.15, use a line with an "
        "entrance_rounded row instead"),
    "short_tube": DischargeCoefficient(
        "short_tube", "square-edged short tube, length 2–3 d, running full", 0.82,
        "classic value ≈ 0.82 (e.g. Idelchik 1994), from memory"),
    "borda": DischargeCoefficient(
        "borda", "re-entrant (Borda) mouthpiece running free", 0.5,
        "contraction 0.5 by the momentum balance of a re-entrant tube (Borda 1766), "
        "standard result"),
}


def orifice_cd(key: str) -> float:
    """The discharge coefficient [-] of a tank-outlet kind in :data:`ORIFICE_CD`.

    >>> orifice_cd("sharp")
    0.61
    """
    check_choice("orifice kind", key, tuple(ORIFICE_CD))
    return ORIFICE_CD[key].Cd


#: Minimum-submergence guideline used for the vortex check.
SUBMERGENCE_RULE = {
    "name": "minimum submergence S = d(1 + 2.3 Fr), Fr = V/sqrt(g d)",
    "source": "ANSI/HI 9.8-1998, Pump Intake Design (Hydraulic Institute), from memory; "
              "written for pump intakes, applied here to tank outlets as a screening guide",
    "coefficients": (1.0, 2.3),
}

#: The integration method statement (shown in findings and the record).
DRAIN_METHOD = {
    "name": "quasi-steady energy balance; time by quadrature over volume, "
            "dt = 2 dV/(Q_i + Q_i+1) on an exact level–volume grid",
    "accuracy": "exact where Q² is linear in V (vertical cylinder, orifice); second order "
                "otherwise; error estimate from the half grid (Richardson)",
    "references": [
        "Torricelli, E. (1644). Opera geometrica (De motu gravium), Florence.",
        "Darcy–Weisbach with Colebrook (1939) friction; see kit.core.friction.",
    ],
}

#: Below this orifice Re a constant Cd is doubtful (from memory: sharp-edged orifice
#: coefficients are near-constant above Re ≈ 1e4).
_RE_ORIFICE_MIN = 1.0e4


@dataclass(frozen=True)
class OrificeOutlet:
    """An orifice (or short nozzle) in the tank wall or bottom, discharging to air.

    Parameters
    ----------
    diameter : float
        Bore of the orifice [m], > 0.
    Cd : float
        Discharge coefficient, 0 < Cd ≤ 1 [-]; see :data:`ORIFICE_CD` (sharp-edged 0.61,
        well-rounded 0.97).
    elevation_offset : float
        Elevation of the orifice centre above the tank's level datum [m], ≥ 0.
    name : str
    """

    diameter: float
    Cd: float = 0.61
    elevation_offset: float = 0.0
    name: str = "orifice"

    def __post_init__(self):
        check_range("orifice diameter", self.diameter, "m", low=0.0, high=10.0)
        check_range("discharge coefficient Cd", self.Cd, "-", low=0.0, high=1.0)
        check_range("orifice elevation offset", self.elevation_offset, "m", low=0.0,
                    high=1e4, low_inclusive=True)

    @property
    def area(self) -> float:
        """Bore area [m²]."""
        return math.pi / 4 * self.diameter ** 2


@dataclass(frozen=True)
class PipedOutlet:
    """An outlet line from the tank bottom or wall to a free jet or a receiving vessel.

    Parameters
    ----------
    line : Line
        The outlet line (:class:`kit.core.line.Line`, or any object with
        ``head_loss(Q, state) -> ndarray [m]``, ``exit_area [m²]`` and ``rise [m]``). Put the
        tank-outlet entrance in the first segment's fittings; for a submerged exit put the
        exit (K = 1) in the last segment's.
    discharge_elevation : float
        Elevation of the line's discharge end on the tank's level datum [m] (negative below
        the tank bottom). The line's inlet is at ``discharge_elevation − line.rise``.
    receiver_level : float, optional
        ``None``: a free jet into air (the exit velocity head is added). Otherwise the
        surface elevation of the receiving vessel on the same datum, at or above the
        discharge (submerged exit), held constant [m].
    receiver_pressure : float, optional
        Pressure at the free jet or on the receiver's surface [Pa abs]; default: the drain's
        atmospheric pressure.
    """

    line: object
    discharge_elevation: float
    receiver_level: float | None = None
    receiver_pressure: float | None = None

    def __post_init__(self):
        for attr in ("head_loss", "exit_area"):
            if not hasattr(self.line, attr):
                raise InputError("outlet line", type(self.line).__name__,
                                 f"must have '{attr}' (a Line)")
        check_range("discharge elevation", self.discharge_elevation, "m", low=-1e4, high=1e4)
        if self.receiver_level is not None:
            check_range("receiver level", self.receiver_level, "m",
                        low=self.discharge_elevation, high=1e4, low_inclusive=True)
        if self.receiver_pressure is not None:
            check_range("receiver pressure", self.receiver_pressure, "Pa", low=0.0, high=1e8)
        check_range("outlet line exit area", self.exit_area, "m²", low=0.0, high=100.0)
        if self.free:
            from kit.core.system import exit_rows

            rows = exit_rows(self.line)
            if rows:
                raise InputError(
                    f"fittings of outlet line '{getattr(self.line, 'name', 'outlet')}'",
                    rows[0], "must not hold an exit fitting (K = 1) on a free discharge: the "
                    "jet already carries away the exit velocity head, so V²/2g would count "
                    "twice; remove the exit row, or give a receiver level (submerged exit)")

    @property
    def name(self) -> str:
        return f"line '{getattr(self.line, 'name', 'outlet')}'"

    @property
    def exit_area(self) -> float:
        return float(self.line.exit_area)

    @property
    def free(self) -> bool:
        """True for a free jet into air, False for a submerged exit."""
        return self.receiver_level is None

    @property
    def inlet_elevation(self) -> float:
        """Elevation of the line's inlet on the tank datum [m]."""
        rise = getattr(self.line, "rise", None)
        if rise is None:
            rise = sum(s.rise for s in self.line.segments)
        return float(self.discharge_elevation - rise)

    @property
    def inlet_diameter(self) -> float:
        segs = getattr(self.line, "segments", None)
        if segs:
            return float(segs[0].pipe.Di)
        return math.sqrt(4 * self.exit_area / math.pi)

    @property
    def exit_diameter(self) -> float:
        segs = getattr(self.line, "segments", None)
        if segs:
            return float(segs[-1].pipe.Di)
        return math.sqrt(4 * self.exit_area / math.pi)


@dataclass(frozen=True)
class Vent:
    """The tank's atmospheric vent (or vacuum breaker), for the air-inflow check.

    Parameters
    ----------
    diameter : float
        Vent bore [m], > 0.
    Cd : float
        Discharge coefficient of the vent path, 0 < Cd ≤ 1 [-] (0.61 sharp-edged).
    allowable_vacuum : float
        Vacuum the tank may see [Pa] (default 250 Pa = 0.25 kPa, about 1 in. of water: the
        design partial vacuum of API 650 atmospheric tanks, from memory). The tank's own
        rating governs.
    """

    diameter: float
    Cd: float = 0.61
    allowable_vacuum: float = 250.0

    def __post_init__(self):
        check_range("vent diameter", self.diameter, "m", low=0.0, high=10.0)
        check_range("vent discharge coefficient Cd", self.Cd, "-", low=0.0, high=1.0)
        check_range("allowable vacuum", self.allowable_vacuum, "Pa", low=0.0, high=1e5)

    @property
    def area(self) -> float:
        return math.pi / 4 * self.diameter ** 2


def vent_pressure_drop(vent: Vent, Q_air: float, rho_air: float) -> float:
    """Pressure drop [Pa] of air drawn in through a vent: ΔP = ρ_air/2 · (Q/(Cd·A))².

    Incompressible orifice equation (Bernoulli with a discharge coefficient); valid while
    ΔP is a few percent of the absolute pressure at most.

    Parameters
    ----------
    vent : Vent
    Q_air : float
        Volumetric air inflow [m³/s] (equal to the liquid outflow).
    rho_air : float
        Air density [kg/m³].

    Returns
    -------
    dP : float
        Pressure drop across the vent [Pa]

    Examples
    --------
    >>> round(vent_pressure_drop(Vent(0.05), 0.01, 1.2), 1)
    41.8
    """
    Q_air = check_range("air inflow", Q_air, "m³/s", low=0.0, low_inclusive=True)
    return 0.5 * rho_air * (Q_air / (vent.Cd * vent.area)) ** 2


def min_submergence(d: float, V) -> np.ndarray:
    """Minimum submergence [m] of an outlet of bore ``d`` [m] at inlet velocity ``V`` [m/s].

    ANSI/HI 9.8-1998 (Pump Intake Design): S = d(1 + 2.3 Fr), Fr = V/sqrt(g·d) (from memory).

    >>> round(float(min_submergence(0.1, 1.0)), 4)
    0.3323
    """
    a, b = SUBMERGENCE_RULE["coefficients"]
    V = np.asarray(V, dtype=float)
    return d * (a + b * V / np.sqrt(G * d))


def orifice_flow(outlet: OrificeOutlet, dH) -> np.ndarray:
    """Orifice flow [m³/s] over available heads ``dH`` [m]: Q = Cd·A·sqrt(2 g ΔH).

    Torricelli (1644) with a discharge coefficient; ΔH ≤ 0 gives 0.

    >>> round(float(orifice_flow(OrificeOutlet(0.05, 0.61), 2.0)[0]), 5)
    0.0075
    """
    dH = np.atleast_1d(np.asarray(dH, dtype=float))
    return outlet.Cd * outlet.area * np.sqrt(2.0 * G * np.maximum(dH, 0.0))


def _line_head(outlet: PipedOutlet, Q: np.ndarray, state) -> np.ndarray:
    H = np.asarray(outlet.line.head_loss(Q, state), dtype=float)
    if outlet.free:
        V = Q / outlet.exit_area
        H = H + V * V / (2.0 * G)
    return H


def piped_flow(outlet: PipedOutlet, dH, state, rtol: float = 1e-12) -> np.ndarray:
    """Flow [m³/s] through an outlet line for available heads ``dH`` [m] (vectorised).

    Solves h_L(Q) [+ V_e²/2g for a free jet] = ΔH for every ΔH at once: tabulate the line's
    head on a flow grid, bracket each root from the table (the head rises monotonically with
    flow), and polish by the Illinois method (Dowell & Jarratt 1971) to ``rtol``.

    Parameters
    ----------
    outlet : PipedOutlet
    dH : array_like
        Available head [m]; ≤ 0 gives 0.
    state : LiquidState
        ``rho`` [kg/m³] and ``mu`` [Pa·s].
    rtol : float
        Relative residual in head [-].

    Returns
    -------
    Q : ndarray
        Flow [m³/s]

    References
    ----------
    Dowell, M., Jarratt, P. (1971). A modified regula falsi method for computing the root of
    an equation. BIT 11, 168–174.
    """
    dH = np.atleast_1d(np.asarray(dH, dtype=float))
    Q = np.zeros(dH.shape)
    pos = dH > 0
    if not pos.any():
        return Q
    target = dH[pos]
    H_top = float(target.max())
    q_hi = outlet.exit_area * math.sqrt(2.0 * G * H_top)
    for _ in range(80):
        if float(_line_head(outlet, np.array([q_hi]), state)[0]) >= H_top:
            break
        q_hi *= 2.0
    else:
        raise NoSolutionError("outlet flow", "the line's head loss does not rise with flow")
    Qg = np.linspace(0.0, q_hi, 129)
    Hg = np.maximum.accumulate(_line_head(outlet, Qg, state))
    j = np.clip(np.searchsorted(Hg, target, side="left"), 1, len(Qg) - 1)
    a, b = Qg[j - 1], Qg[j]
    fa, fb = Hg[j - 1] - target, Hg[j] - target
    side = np.zeros(target.shape, dtype=int)
    scale = np.maximum(target, 1e-300)
    r = np.where(fb <= 0, b, a - fa * (b - a) / (fb - fa))
    active = np.ones(target.shape, dtype=bool)
    for _ in range(100):
        k = np.nonzero(active)[0]
        if k.size == 0:
            break
        ak, bk, fak, fbk = a[k], b[k], fa[k], fb[k]
        den = fbk - fak
        with np.errstate(invalid="ignore", divide="ignore"):
            rk = np.where(den != 0, (ak * fbk - bk * fak) / den, 0.5 * (ak + bk))
        rk = np.where((rk >= ak) & (rk <= bk), rk, 0.5 * (ak + bk))
        fr = _line_head(outlet, rk, state) - target[k]
        r[k] = rk
        done = (np.abs(fr) <= rtol * scale[k]) | (bk - ak <= 4e-16 * bk)
        right = fr * fbk > 0          # rk replaces b
        sk = side[k]
        fa[k] = np.where(right & (sk == -1), 0.5 * fak, fak)
        fb[k] = np.where(~right & (sk == 1), 0.5 * fbk, fbk)
        b[k] = np.where(right, rk, bk)
        fb[k] = np.where(right, fr, fb[k])
        a[k] = np.where(right, ak, rk)
        fa[k] = np.where(right, fa[k], fr)
        side[k] = np.where(right, -1, 1)
        active[k[done]] = False
    else:
        raise NoSolutionError("outlet flow", "the flow iteration did not converge")
    Q[pos] = r
    return Q


@dataclass(frozen=True)
class DrainResult:
    """The level and flow history of a drain-down (arrays in time order, SI).

    Attributes
    ----------
    time : ndarray
        Time from the start [s].
    level : ndarray
        Liquid level [m] (falling).
    volume : ndarray
        Liquid volume in the tank [m³].
    flow : ndarray
        Outflow [m³/s].
    velocity : ndarray
        Mean velocity in the outlet bore (orifice bore, or the line's exit pipe) [m/s].
    Re : ndarray
        Reynolds number in the same bore [-].
    head : ndarray
        Available head ΔH [m].
    start, target : float
        Start and target levels [m].
    reached : bool
        Whether the target is reached.
    stop_level : float
        Level at which outflow stops [m] (≤ target when the target is reached).
    stop_reason : str
    total_time : float
        Time to the target, or to the stop level when the target is not reached [s].
    time_error : float
        Estimated quadrature error of ``total_time`` [s].
    lowest_pressure : float
        Lowest absolute pressure in an outlet line over the drain [Pa] (NaN for an orifice).
    lowest_station : str
    findings : list of Finding
    cautions : list of str
    method : dict
    siphon_limited : bool
        True where the flow was held below full-pipe flow by vapour pressure at a high
        point (:data:`SIPHON_MODEL`) somewhere in the drain.
    siphon_broken : bool
        True where the drain stops because the siphon breaks (the stop level is then the
        break level).
    siphon_limit_level : float
        Highest level at which the siphon limit applies [m] (NaN if never).
    asymptotic : bool
        True where the approach to the stop level is asymptotic; the history then ends
        ``end_offset`` short of it (:data:`ASYMPTOTE_RULE`).
    end_offset : float
        How far short of the stop level the history ends [m] (0 unless asymptotic).
    time_note : str
        Words to print next to the time: the siphon limit, the break, the asymptote
        ('' when none applies).
    T_air : float
        Air temperature used for the vent check [K].
    """

    time: np.ndarray
    level: np.ndarray
    volume: np.ndarray
    flow: np.ndarray
    velocity: np.ndarray
    Re: np.ndarray
    head: np.ndarray
    start: float
    target: float
    reached: bool
    stop_level: float
    stop_reason: str
    total_time: float
    time_error: float
    lowest_pressure: float = float("nan")
    lowest_station: str = ""
    findings: list = field(default_factory=list)
    cautions: list = field(default_factory=list)
    method: dict = field(default_factory=lambda: dict(DRAIN_METHOD))
    siphon_limited: bool = False
    siphon_broken: bool = False
    siphon_limit_level: float = float("nan")
    asymptotic: bool = False
    end_offset: float = 0.0
    time_note: str = ""
    T_air: float = T_AIR_DEFAULT

    def time_to(self, levels) -> dict:
        """Time [s] from the start to each of ``levels`` [m] (``inf`` below a stop level).

        Linear interpolation on the drain's level grid.
        """
        out = {}
        lo = float(self.level[-1])
        for x in np.atleast_1d(np.asarray(levels, dtype=float)):
            x = float(x)
            if not self.reached and self.target <= x < lo:
                out[x] = math.inf
                continue
            check_range("level for time_to", x, "m", low=lo, high=self.start,
                        low_inclusive=True)
            out[x] = float(np.interp(x, self.level[::-1], self.time[::-1]))
        return out

    @property
    def peak_flow(self) -> float:
        """Largest outflow over the drain [m³/s]."""
        return float(self.flow.max()) if self.flow.size else 0.0


def _stop(outlet, rho, p_surface, p_atm):
    """Stop level [m] and its reason, for the available-head balance and the outlet height."""
    if isinstance(outlet, OrificeOutlet):
        z_out, z_down, p_down = outlet.elevation_offset, outlet.elevation_offset, p_atm
        where = f"the orifice centre at {z_out:g} m"
        down = where
    else:
        z_out = outlet.inlet_elevation
        p_down = p_atm if outlet.receiver_pressure is None else outlet.receiver_pressure
        where = f"the line inlet at {z_out:g} m"
        if outlet.free:
            z_down = outlet.discharge_elevation
            down = f"the free discharge at {z_down:g} m"
        else:
            z_down = outlet.receiver_level
            down = f"the receiver level at {z_down:g} m"
    h_eq = z_down - (p_surface - p_down) / (rho * G)
    if z_out >= h_eq:
        return z_out, z_down, p_down, (f"the level reaches {where}: liquid below the outlet "
                                       "does not drain through it")
    if not isinstance(outlet, OrificeOutlet) and not outlet.free:
        why = (f"the tank level equalises with {down} (head balance at {h_eq:.4g} m, "
               f"surface pressures {p_surface:.6g} and {p_down:.6g} Pa(abs))")
    elif p_surface < p_down:
        why = (f"the surface vacuum ({p_surface:.6g} Pa(abs) against {p_down:.6g} Pa(abs) at the "
               f"discharge) holds the liquid up: available head falls to 0 at {h_eq:.4g} m")
    else:
        why = f"available head falls to 0 at {h_eq:.4g} m ({down})"
    return h_eq, z_down, p_down, why


def _grid(tank, h_end: float, start: float, cluster: float | None = None):
    hs, Vs = tank.table
    inside = (hs > h_end) & (hs < start)
    extra = np.concatenate([[h_end, start], np.linspace(h_end, start, 129)[1:-1]])
    if cluster is not None and h_end - cluster < 0.25 * (start - h_end):
        # levels clustered geometrically towards a stop level, where Q -> 0
        d0 = max(h_end - cluster, 1e-12)
        d1 = 0.25 * (start - h_end) + d0
        geo = cluster + np.geomspace(d0, d1, 129)[1:]
        extra = np.concatenate([extra, geo[(geo > h_end) & (geo < start)]])
    h = np.concatenate([hs[inside], extra])
    V = np.concatenate([Vs[inside], tank.volume(extra)])
    order = np.argsort(-h, kind="stable")
    h, V = h[order], V[order]
    keep = np.concatenate([[True], np.diff(h) < 0])
    return h[keep], V[keep]


def _times(V: np.ndarray, Q: np.ndarray) -> np.ndarray:
    dV = np.maximum(V[:-1] - V[1:], 0.0)
    qs = Q[:-1] + Q[1:]
    with np.errstate(divide="ignore", invalid="ignore"):
        dt = np.where(dV > 0, 2.0 * dV / qs, 0.0)
    return np.concatenate([[0.0], np.cumsum(dt)])


def drain(tank, outlet, state, start: float, target: float, p_surface: float = P_ATM,
          p_atm: float = P_ATM, vent: Vent | None = None, *, T_air: float | None = None,
          crest_margin: float = 0.0) -> DrainResult:
    """Drain a tank from ``start`` to ``target`` level through an orifice or a line.

    Quasi-steady energy balance with the outflow of an orifice (Torricelli 1644, with a
    discharge coefficient) or of a line (Darcy–Weisbach, friction at each Re); time by
    quadrature over volume (module docstring).

    Parameters
    ----------
    tank : Tank
    outlet : OrificeOutlet or PipedOutlet
    state : LiquidState
        ``rho`` [kg/m³], ``mu`` [Pa·s], ``pv`` [Pa] or None, ``T`` [K].
    start : float
        Starting level [m], within the tank.
    target : float
        Target level [m], below ``start`` and not below the tank's lowest level.
    p_surface : float
        Absolute pressure on the liquid surface [Pa]: atmospheric for a vented tank, above
        for a padded (blanketed) one, below for a tank under vacuum.
    p_atm : float
        Atmospheric pressure [Pa]: at an orifice's discharge, and the default receiver
        pressure of a line.
    vent : Vent, optional
        The vent, for the air-inflow check at the peak drain rate.
    T_air : float, optional
        Temperature of the air drawn in through the vent [K]; default
        :data:`T_AIR_DEFAULT` (20 °C). The vent check uses the air's density at this
        temperature, not the liquid's.
    crest_margin : float
        Margin above vapour pressure at which a line's high point is held when the siphon
        limit applies [m of liquid], ≥ 0; default 0 (the physical limit).

    Returns
    -------
    result : DrainResult

    Notes
    -----
    The surface pressure is held constant (a vent that keeps up, a pad regulator that keeps
    up); the vent finding says whether it can. A receiver's level is held constant.

    **Siphons** (:data:`SIPHON_MODEL`): at each level the outflow of a line is the smaller of
    the full-pipe flow and the flow that keeps every station at or above
    p_v + crest_margin·ρg; below the level where even zero flow cannot (the static column to
    the highest station), the siphon breaks and the history stops there (FAIL). The result
    carries ``siphon_limited`` / ``siphon_broken`` and a finding, and ``time_note`` says so
    beside the time.

    **Stop levels**: where flow stops above the target the history ends at the stop level,
    with a FAIL finding. The time there is finite for an orifice or turbulent line
    (Q ∝ √ΔH); where the approach is asymptotic (laminar, Q ∝ ΔH: no finite time) the
    history ends short of the stop level by :data:`ASYMPTOTE_RULE` (``end_offset``), the
    flag ``asymptotic`` is set and the finding and ``time_note`` say so.

    Examples
    --------
    >>> from types import SimpleNamespace as NS
    >>> from kit.core.tank import vertical_cylinder
    >>> oil = NS(T=293.15, rho=870.0, mu=0.05, pv=None)
    >>> r = drain(vertical_cylinder(2.0, 3.0), OrificeOutlet(0.05, 0.61, 0.5), oil, 3.0, 0.2)
    >>> r.reached, round(r.stop_level, 3)
    (False, 0.5)
    """
    if not isinstance(outlet, (OrificeOutlet, PipedOutlet)):
        raise InputError("outlet", type(outlet).__name__,
                         "must be an OrificeOutlet or a PipedOutlet")
    start = check_range(f"start level in '{tank.name}'", start, "m", low=tank.h_min,
                        high=tank.h_max, low_inclusive=True)
    target = check_range("target level", target, "m", low=tank.h_min, high=start,
                         low_inclusive=True, high_inclusive=False)
    p_surface = check_range("surface pressure", p_surface, "Pa", low=0.0, high=1e8)
    p_atm = check_range("atmospheric pressure", p_atm, "Pa", low=3e4, high=1.2e5)
    rho, mu = float(state.rho), float(state.mu)
    crest_margin = check_range("siphon crest margin", crest_margin, "m", low=0.0, high=100.0,
                               low_inclusive=True)
    T_air = T_AIR_DEFAULT if T_air is None else check_range(
        "air temperature at the vent", T_air, "K", low=200.0, high=400.0, low_inclusive=True)
    hs_t, Vs_t = tank.table
    with np.errstate(divide="ignore", invalid="ignore"):
        slopes = np.diff(Vs_t) / np.diff(hs_t)
    A_tank_max = float(np.nanmax(slopes))
    d_tank = math.sqrt(4.0 * A_tank_max / math.pi)
    if isinstance(outlet, OrificeOutlet):
        check_range("orifice elevation offset", outlet.elevation_offset, "m", low=tank.h_min,
                    high=start, low_inclusive=True)
        check_range(f"orifice diameter (tank '{tank.name}' largest section ≈ {d_tank:.4g} m "
                    "equivalent)", outlet.diameter, "m", low=0.0, high=d_tank,
                    high_inclusive=False)
        d_bore = outlet.diameter
        A_bore = outlet.area
    else:
        check_range("outlet line inlet elevation (discharge elevation − line rise)",
                    outlet.inlet_elevation, "m", low=tank.h_min, high=start,
                    low_inclusive=True)
        check_range(f"outlet line inlet bore (tank '{tank.name}' largest section ≈ "
                    f"{d_tank:.4g} m equivalent)", outlet.inlet_diameter, "m", low=0.0,
                    high=d_tank, high_inclusive=False)
        d_bore = outlet.exit_diameter
        A_bore = outlet.exit_area

    stop, z_down, p_down, why = _stop(outlet, rho, p_surface, p_atm)
    stop = max(stop, tank.h_min)
    # the siphon limit (piped outlets with a profile and a vapour pressure)
    pv = getattr(state, "pv", None)
    geo = _line_geometry(outlet) if isinstance(outlet, PipedOutlet) else None
    p_lim = None
    broken = False
    if geo is not None and pv is not None:
        p_lim = float(pv) + crest_margin * rho * G
        z_hi, name_hi = geo["z_top"], geo["name_top"]
        h_break = z_hi + (p_lim - p_surface) / (rho * G)
        if h_break > stop:
            stop = h_break
            broken = True
            why = (f"the siphon breaks: below {h_break:.4g} m the static column up to station "
                   f"'{name_hi}' (elevation {z_hi:.4g} m) cannot stand above vapour pressure"
                   + (f" + {crest_margin:g} m" if crest_margin else "") + f" "
                   f"({_kpa(p_lim)}(abs)) with the surface at {_kpa(p_surface)}(abs): the "
                   "column parts and the siphon loses prime")
    reached = target >= stop - 1e-12
    if reached:
        broken = False
    subject = f"drain of '{tank.name}' through {outlet.name}"

    def flow_at(levels):
        dHx = (levels - z_down) + (p_surface - p_down) / (rho * G)
        if isinstance(outlet, OrificeOutlet):
            return orifice_flow(outlet, dHx), np.zeros(levels.shape, dtype=bool)
        Qx = piped_flow(outlet, dHx, state)
        if p_lim is None:
            return Qx, np.zeros(levels.shape, dtype=bool)
        return _siphon_limit(outlet, geo, state, levels, Qx, p_surface, p_lim)

    # asymptotic approach to the stop level (laminar): end short of it
    span = start - stop
    offset = max(ASYMPTOTE_RULE["offset_m"], ASYMPTOTE_RULE["offset_fraction"] * span)
    asymptotic = False
    if span > 2.0 * offset and (not reached or target - stop < offset):
        q2, _ = flow_at(np.array([stop + offset, stop + 0.1 * offset]))
        if q2[0] > 0.0 and q2[1] > 0.0:
            n_exp = math.log10(q2[0] / q2[1])
            asymptotic = n_exp >= ASYMPTOTE_RULE["exponent"]
    if reached and not (asymptotic and target < stop + offset):
        h_end = target
    elif asymptotic:
        h_end = stop + offset
    else:
        h_end = stop

    if start <= stop:
        # no outflow at all
        h = np.array([start])
        V = np.array([tank.volume(start)])
        zero = np.zeros(1)
        dH0 = np.array([(start - z_down) + (p_surface - p_down) / (rho * G)])
        f = [Finding(Severity.FAIL, subject, "level reached", start, "m", f"<= {target:g} m",
                     f"does not reach target: no outflow at the start level {start:g} m "
                     f"because {why}", "energy balance (Bernoulli)")]
        if broken:
            f.append(Finding(Severity.FAIL, subject, "siphon limit at vapour pressure", stop,
                             "m", "no vapour limit over the drain",
                             f"the siphon cannot run at all: {why}. " + CAUTIONS["vacuum"],
                             SIPHON_MODEL["name"] + "; " + SIPHON_MODEL["source"]))
        return DrainResult(zero, h, V, zero, zero, zero, dH0, start, target, False, stop, why,
                           0.0, 0.0, findings=f,
                           cautions=_cautions(state, p_surface, p_atm,
                                              isinstance(outlet, PipedOutlet)),
                           siphon_broken=bool(broken),
                           time_note="no outflow: siphon cannot run" if broken else
                           "no outflow", T_air=float(T_air))

    h, V = _grid(tank, h_end, start, stop if (asymptotic or broken or not reached) else None)
    dH = (h - z_down) + (p_surface - p_down) / (rho * G)
    Q, limited = flow_at(h)
    if not reached and not asymptotic:
        Q[-1] = 0.0
    if asymptotic and h_end > target:
        reached = False
    t = _times(V, Q)
    idx = np.arange(len(h))
    coarse = np.unique(np.concatenate([idx[::2], [len(h) - 1]]))
    t2 = _times(V[coarse], Q[coarse])[-1]
    t_err = abs(t[-1] - t2) / 3.0
    vel = Q / A_bore
    Re = rho * vel * d_bore / mu

    lim_any = bool(limited.any())
    lim_top = float("nan")
    if lim_any:
        # the level where the limit begins, between grid levels, by bisection
        i = int(np.argmax(limited))
        lim_top = float(h[i])
        if i > 0 and not limited[i - 1]:
            a_, b_ = float(h[i]), float(h[i - 1])      # limited at a_, free at b_
            for _ in range(60):
                m_ = 0.5 * (a_ + b_)
                if flow_at(np.array([m_]))[1][0]:
                    a_ = m_
                else:
                    b_ = m_
            lim_top = 0.5 * (a_ + b_)
    notes = []
    if lim_any:
        notes.append(f"flow limited by the siphon high point at vapour pressure below "
                     f"{lim_top:.4g} m")
    if broken:
        notes.append(f"siphon breaks at {stop:.4g} m")
    if asymptotic:
        notes.append(f"time to {h_end:.4g} m, {offset * 1000:.3g} mm short of the stop level "
                     f"{stop:.4g} m: the approach is asymptotic (flow ∝ head left), no finite "
                     "time to the stop level")
    time_note = "; ".join(notes)

    findings = []
    src_siphon = SIPHON_MODEL["source"]
    if reached:
        sev = Severity.CHECK if lim_any else Severity.PASS
        rule = f"reaches the target in {t[-1]:.0f} s ({t[-1] / 60:.1f} min)"
        if lim_any:
            rule += (" only with the flow limited by the siphon high point at vapour pressure "
                     f"(below {lim_top:.4g} m); a vapour-limited siphon can lose prime")
        findings.append(Finding(sev, subject, "level reached", target, "m",
                                f"<= {target:g} m", rule,
                                "energy balance" + ("; " + src_siphon if lim_any else "")))
    else:
        rule = f"does not reach target: stops at {stop:.4g} m because {why}"
        if asymptotic:
            rule += (f"; the approach is asymptotic, so the time given ({t[-1]:.0f} s) is to "
                     f"{h_end:.4g} m, {offset * 1000:.3g} mm short of it")
        findings.append(Finding(Severity.FAIL, subject, "level reached",
                                h_end if asymptotic else stop, "m", f"<= {target:g} m", rule,
                                "energy balance (Bernoulli)"
                                + (f"; {ASYMPTOTE_RULE['source']}" if asymptotic else "")))
    if lim_any or broken:
        if lim_any:
            words = (f"the full-pipe flow would take the line below vapour pressure below level "
                     f"{lim_top:.4g} m; there the flow is held at the value that keeps the "
                     f"lowest station at {_kpa(p_lim)}(abs) (vapour pressure"
                     + (f" + {crest_margin:g} m" if crest_margin else "") + "): a vapour/air "
                     "pocket forms at the high point and the leg beyond runs part full; the "
                     "drain time includes this limited flow")
            if broken:
                words += f"; the siphon breaks at {stop:.4g} m"
        else:
            words = (f"the siphon breaks at {stop:.4g} m: the static column to the high point "
                     "cannot stand above vapour pressure")
        findings.append(Finding(
            Severity.FAIL, subject, "siphon limit at vapour pressure",
            lim_top if lim_any else stop, "m", "no vapour limit over the drain",
            words + ". Air valves / vacuum breakers and the vacuum rating of the line must be "
            "engineered. " + CAUTIONS["vacuum"], SIPHON_MODEL["name"] + "; " + src_siphon))
    findings += _vortex_findings(subject, outlet, h, Q)
    findings += _regime_findings(subject, outlet, state, h, Q, Re)
    findings += _fitting_findings(subject, outlet, state, Q)
    findings += _surface_findings(subject, state, p_surface, p_atm, float(Q.max()), vent,
                                  T_air)
    low_p, low_st = float("nan"), ""
    if isinstance(outlet, PipedOutlet):
        low_p, low_st, fs = _line_pressure_findings(subject, outlet, state, h, Q, p_surface,
                                                    p_atm, vapour_held=lim_any)
        findings += fs
    return DrainResult(t, h, V, Q, vel, Re, dH, start, target, bool(reached), float(stop),
                       why, float(t[-1]), float(t_err), low_p, low_st, findings,
                       _cautions(state, p_surface, p_atm, isinstance(outlet, PipedOutlet)),
                       siphon_limited=lim_any, siphon_broken=bool(broken),
                       siphon_limit_level=lim_top, asymptotic=bool(asymptotic),
                       end_offset=float(offset) if asymptotic else 0.0,
                       time_note=time_note, T_air=float(T_air))


def _cautions(state, p_surface, p_atm, piped=False) -> list[str]:
    topics = ["drain"]
    if p_surface < p_atm or piped:
        topics.append("vacuum")
    if getattr(state, "flammable", False):
        topics.append("flammable")
    return cautions_for(*topics)


def _vortex_findings(subject, outlet, h, Q) -> list[Finding]:
    if isinstance(outlet, OrificeOutlet):
        d, z = outlet.diameter, outlet.elevation_offset
    else:
        d, z = outlet.inlet_diameter, outlet.inlet_elevation
    V = Q / (math.pi / 4 * d * d)
    S = h - z
    S_min = min_submergence(d, V)
    low = np.nonzero(S < S_min)[0]
    src = SUBMERGENCE_RULE["source"]
    limit = f">= d(1 + 2.3 Fr), d = {d:g} m"
    if low.size == 0:
        return [Finding(Severity.PASS, subject, "submergence at the end", float(S[-1]), "m",
                        limit, "outlet submergence above the vortex guideline throughout", src)]
    i = int(low[0])
    h_v, s_v = float(h[i]), float(S_min[i])
    if i > 0:   # interpolate the crossing of S = S_min between grid levels
        m0, m1 = S[i - 1] - S_min[i - 1], S[i] - S_min[i]
        w = m0 / (m0 - m1)
        h_v = float(h[i - 1] + w * (h[i] - h[i - 1]))
        s_v = float(S_min[i - 1] + w * (S_min[i] - S_min[i - 1]))
    return [Finding(Severity.CHECK, subject, "level where vortexing may begin", h_v,
                    "m", limit + f" = {s_v:.3g} m above the outlet there",
                    "air-entraining vortices likely below this level: outflow falls below the "
                    "computed value and the drain takes longer; a vortex breaker or lower "
                    "outlet velocity helps", src)]


def _regime_findings(subject, outlet, state, h, Q, Re_exit) -> list[Finding]:
    from kit.core.friction import RE_LAMINAR, RE_TURBULENT

    live = Q > 0
    if not live.any():
        return []
    if isinstance(outlet, OrificeOutlet):
        Re = Re_exit[live]
        if Re.min() < _RE_ORIFICE_MIN:
            i = int(np.argmax(Re < _RE_ORIFICE_MIN))
            return [Finding(Severity.CHECK, subject, "orifice Reynolds number", float(Re.min()),
                            "-", f">= {_RE_ORIFICE_MIN:.0e}",
                            f"Cd taken as constant; below Re {_RE_ORIFICE_MIN:.0e} (from level "
                            f"{h[live][i]:.4g} m) an orifice's Cd departs from its high-Re value",
                            "orifice coefficients near-constant above Re ≈ 1e4, from memory")]
        return []
    segs = getattr(outlet.line, "segments", None) or ()
    Dis = [float(s.pipe.Di) for s in segs] or [outlet.exit_diameter]
    D_big = max(Dis)       # the widest bore has the lowest Re
    Re = state.rho * Q[live] / (math.pi / 4 * D_big ** 2) * D_big / state.mu
    Re_min = float(Re.min())
    if Re_min >= RE_TURBULENT:
        return [Finding(Severity.PASS, subject, "lowest Reynolds number in the line", Re_min,
                        "-", f"> {RE_TURBULENT:.0f}", "turbulent throughout the drain",
                        "Moody (1944)")]
    hl = h[live]
    lam = Re < RE_LAMINAR
    where = (f"laminar below level {hl[int(np.argmax(lam))]:.4g} m" if lam.any() else
             f"transitional below level {hl[int(np.argmax(Re <= RE_TURBULENT))]:.4g} m")
    return [Finding(Severity.CHECK, subject, "lowest Reynolds number in the line", Re_min, "-",
                    f"> {RE_TURBULENT:.0f} for turbulent flow",
                    f"flow becomes {where}; normal near the end of a gravity drain — friction "
                    "is re-evaluated at each level (64/Re laminar, a stated blend 2000–4000)",
                    "Moody (1944); blend policy: kit.core.friction")]


def _fitting_findings(subject, outlet, state, Q) -> list[Finding]:
    """Fitting rows used below their K method's Re range, and friction extrapolation, over
    the drain's flows (:func:`kit.core.fittings.fitting_re_findings`)."""
    if not isinstance(outlet, PipedOutlet):
        return []
    segs = getattr(outlet.line, "segments", None) or ()
    live = Q[Q > 0]
    if not segs or live.size == 0:
        return []
    from kit.core.fittings import fitting_re_findings
    from kit.core.friction import friction_range_findings

    out = []
    for s in segs:
        Re = state.rho * live / s.pipe.area * s.pipe.Di / state.mu
        sub = f"{subject}, segment '{s.name}'"
        out += friction_range_findings(sub, Re, s.pipe.roughness / s.pipe.Di)
        for f in s.fittings:
            out += fitting_re_findings(f, Re, subject=sub)
    return out


def _surface_findings(subject, state, p_surface, p_atm, Q_max, vent,
                      T_air: float = T_AIR_DEFAULT) -> list[Finding]:
    out = []
    tol = 1e-6 * p_atm
    if p_surface < p_atm - tol:
        out.append(Finding(Severity.CHECK, subject, "surface gauge pressure", p_surface - p_atm,
                           "Pa", ">= 0 Pa(g)",
                           "tank under vacuum: confirm its vacuum rating. " + CAUTIONS["vacuum"],
                           "common practice, no source"))
    if p_surface > p_atm + tol:
        out.append(Finding(Severity.CHECK, subject, "blanket gas make-up", Q_max, "m³/s",
                           f">= {Q_max:.4g} m³/s at the pad pressure",
                           "padded tank: the drain assumes constant surface pressure; the "
                           "blanket supply must make up the peak drain rate or the pad is lost. "
                           + CAUTIONS["drain"], "common practice, no source"))
    if vent is None:
        if abs(p_surface - p_atm) <= tol:
            out.append(Finding(Severity.CHECK, "vent", "vent pressure drop", float("nan"), "Pa",
                               "give the vent size", "vent capacity not checked. "
                               + CAUTIONS["drain"], "common practice, no source"))
        return out
    rho_air = p_atm * _M_AIR / (_R * T_air)   # air at the air's temperature (ideal gas)
    dP = vent_pressure_drop(vent, Q_max, rho_air)
    lim = vent.allowable_vacuum
    if dP > lim:
        sev, rule = Severity.FAIL, "vent too small: the tank goes under vacuum beyond its rating"
    elif dP > 0.5 * lim:
        sev, rule = Severity.CHECK, "vent pressure drop above half the allowable vacuum"
    else:
        sev, rule = Severity.PASS, "vent admits the peak drain rate"
    out.append(Finding(sev, "vent", "vent pressure drop at peak drain rate", dP, "Pa",
                       f"<= {lim:g} Pa vacuum (gauge, below atmospheric)",
                       rule + ". " + CAUTIONS["drain"] + " " + CAUTIONS["vacuum"],
                       f"orifice equation ΔP = ρ_air/2·(Q/(Cd·A))², air inflow = liquid outflow, "
                       f"ρ_air of dry air at {T_air - 273.15:.3g} °C (ideal gas); "
                       "allowable vacuum user-set (default 0.25 kPa, API 650, from memory)"))
    return out


def _line_pressure_findings(subject, outlet, state, h, Q, p_surface, p_atm,
                            vapour_held: bool = False):
    line = outlet.line
    if not (hasattr(line, "profile") and getattr(line, "segments", None)):
        return float("nan"), "", [Finding(
            Severity.CHECK, subject, "lowest pressure in the line", float("nan"), "Pa",
            "> vapour pressure (absolute)", "line has no pressure profile: siphon / vapour "
            "check not made", "common practice, no source")]
    rho = state.rho
    A1 = float(line.segments[0].pipe.area)
    z_in = outlet.inlet_elevation
    geo = _line_geometry(outlet) if hasattr(line, "segment_losses") else None
    if geo is not None:
        # every level at once (the energy balance of Line.profile, vectorised), then the
        # profile of the level with the lowest station pressure
        P = _pressures(outlet, geo, state, h, Q, p_surface)
        picks = [int(np.argmin(P.min(axis=0)))]
    else:
        n = len(h)
        picks = np.unique(np.round(np.linspace(0, n - 1, min(n, 13))).astype(int))
    best = None
    for i in picks:
        q = float(Q[i])
        V1 = q / A1
        p_start = p_surface + rho * G * (h[i] - z_in) - 0.5 * rho * V1 * V1
        prof = line.profile(q, state, p_start, p_atm)
        if outlet.free and len(prof.stations) > 1:
            # the jet's end station is at the receiver pressure by construction: not a low point
            prof = Profile(prof.line, prof.Q, prof.stations[:-1], prof.p_baro, prof.rho)
        if best is None or prof.lowest.p < best.lowest.p:
            best = prof
    low = best.lowest
    pv = getattr(state, "pv", None)
    if pv is None:
        fs = [Finding(Severity.CHECK, f"station '{low.name}' of {outlet.name}",
                      "lowest pressure in the line", low.p, "Pa",
                      "> vapour pressure (absolute)",
                      f"vapour-pressure check not made: the liquid has no vapour-pressure model; "
                      f"give one (lowest pressure {_kpa(low.p)}(abs) = {_kpa(low.p_gauge)}(g); "
                      "the siphon limit is not applied without it)",
                      "definition of vapour pressure")]
        if low.p < 0.0:
            fs.append(Finding(Severity.FAIL, f"station '{low.name}' of {outlet.name}",
                              "absolute pressure", low.p, "Pa", ">= 0 Pa(abs)",
                              f"the computed absolute pressure {_kpa(low.p)}(abs) is below zero, "
                              "an impossible state: the liquid column parts and the flow cannot "
                              "be as computed; give a vapour pressure so the siphon limit is "
                              "applied. " + CAUTIONS["vacuum"], "definition of absolute pressure"))
    else:
        fs = vapour_findings(best, pv, subject=f"station '{low.name}' of {outlet.name} "
                                               f"during the drain")
        if vapour_held:
            fs = [f if f.quantity != "pressure above vapour pressure" or
                  f.severity is Severity.FAIL else
                  Finding(Severity.FAIL, f.subject, f.quantity, f.value, f.unit, f.limit,
                          "held at vapour pressure by the siphon limit: a vapour/air pocket "
                          "at the high point (" + f.rule.split("(", 1)[-1], f.source)
                  for f in fs]
    return float(low.p), low.name, fs


def _kpa(p: float) -> str:
    return f"{p / 1000:.4g} kPa"


def _line_geometry(outlet):
    """Station elevations on the tank datum, areas and names of an outlet line with
    segments; the free jet's end station is left out (it is at the receiver pressure)."""
    line = outlet.line
    segs = getattr(line, "segments", None)
    if not segs or not hasattr(line, "segment_losses"):
        return None
    z = outlet.inlet_elevation + np.concatenate([[0.0], np.cumsum([s.rise for s in segs])])
    area = np.array([segs[0].pipe.area] + [s.pipe.area for s in segs])
    names = [getattr(line, "start_station", "start")] + [s.station for s in segs]
    n = len(names) - (1 if outlet.free else 0)
    k = int(np.argmax(z[:n]))
    return {"z": z[:n], "area": area[:n], "names": names[:n], "n": n,
            "z_top": float(z[k]), "name_top": names[k]}


def station_pressures(outlet, state, levels, Q, p_surface):
    """Absolute pressure [Pa] at each station of an outlet line, shape (n_stations, n).

    Energy equation from the tank surface (level ``h``, pressure ``p_surface``, velocity
    zero) to station i: p_i = p_s + ρg(h − z_i) − ρV_i²/2 − ρg·Σ h_L(segments up to i),
    with the fitting losses lumped at the end of their segment, as in
    :meth:`kit.core.line.Line.profile`. A free jet's end station is left out (it is at the
    receiver pressure by construction).

    Parameters
    ----------
    outlet : PipedOutlet
        With a :class:`~kit.core.line.Line` (segments).
    state : LiquidState
    levels, Q : array_like
        Tank levels [m] and the flows there [m³/s], same shape.
    p_surface : float
        Absolute pressure on the liquid surface [Pa].
    """
    geo = _line_geometry(outlet)
    if geo is None:
        raise InputError("outlet line", type(outlet.line).__name__,
                         "must be a Line with segments for station pressures")
    levels = np.atleast_1d(np.asarray(levels, dtype=float))
    Q = np.atleast_1d(np.asarray(Q, dtype=float))
    return _pressures(outlet, geo, state, levels, Q, p_surface)


def _pressures(outlet, geo, state, levels, Q, p_surface):
    rho = state.rho
    seg = outlet.line.segment_losses(Q, state)                   # (n_seg, n)
    cum = np.vstack([np.zeros((1, Q.size)), np.cumsum(seg, axis=0)])[: geo["n"]]
    V = Q[None, :] / geo["area"][:, None]
    return (p_surface + rho * G * (levels[None, :] - geo["z"][:, None])
            - 0.5 * rho * V * V - rho * G * cum)


def _siphon_limit(outlet, geo, state, levels, Q_full, p_surface, p_lim):
    """Flows held so that no station falls below ``p_lim``: bisection on Q in [0, Q_full]
    at every level where the full-pipe flow would go below (station pressures fall
    monotonically with flow). Returns ``(Q, limited)``."""
    p_full = _pressures(outlet, geo, state, levels, Q_full, p_surface).min(axis=0)
    limited = (p_full < p_lim) & (Q_full > 0)
    Q = Q_full.copy()
    if not limited.any():
        return Q, limited
    k = np.nonzero(limited)[0]
    lv = levels[k]
    lo = np.zeros(k.size)
    hi = Q_full[k].copy()
    p0 = _pressures(outlet, geo, state, lv, lo, p_surface).min(axis=0)
    dead = p0 < p_lim            # even zero flow cannot hold the column: broken
    for _ in range(200):
        mid = 0.5 * (lo + hi)
        ok = _pressures(outlet, geo, state, lv, mid, p_surface).min(axis=0) >= p_lim
        lo = np.where(ok, mid, lo)
        hi = np.where(ok, hi, mid)
        if np.all(hi - lo <= 1e-13 * np.maximum(hi, 1e-300)):
            break
    Q[k] = np.where(dead, 0.0, lo)
    return Q, limited
