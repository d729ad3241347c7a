"""Water-hammer screening: wave speed, valve-closure rise, pump-trip down-surge, findings.

A **screen**, not a transient analysis. It bounds the pressure change of one sudden event
with the classic closed forms and says where the bound is a risk; where it is, the findings
say that a transient analysis by a qualified engineer is required. It does not model wave
reflections, friction attenuation, pump inertia, check-valve slam, air valves, column
rejoining or anything else such an analysis covers.

Methods
-------
- **Wave speed**: Korteweg (1878) ``a = sqrt((K/rho) / (1 + c1 K D / (E e)))`` with the
  restraint factor ``c1`` of Wylie & Streeter (1993) for three anchoring cases, in the
  thick-walled form (Lamé) that tends to the thin-walled one as e/D → 0
  (:func:`restraint_factor`, :func:`wave_speed`).
- **Valve closure**: Joukowsky (1898) ``dp = rho a dV`` when the closure takes no longer than
  the reflection time ``2L/a``; for slower closures Michaud's (1878) ``dp = 2 rho L dV / t_c``
  (:func:`closure_surge`).
- **Pump trip**: the Joukowsky drop ``rho a V`` on instantaneous stop, at the pump and carried
  to the high points as an upper bound, against the vapour pressure (column separation) and
  atmospheric pressure (:func:`surge_screen`).

Pressures are absolute [Pa] unless a name says gauge; ratings are gauge as in
:mod:`kit.core.rating`.

Example
-------
>>> a = wave_speed(2.19e9, 998.2, 0.1023, 0.00602, 207e9, 0.30)
>>> s = closure_surge(998.2, a, 800.0, 2.0, 1.0)
>>> round(a), s.regime, round(s.dp / 1e5, 1)
(1362, 'sudden', 27.2)
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from kit.core.findings import Finding, Severity
from kit.core.liquids import P_ATM
from kit.core.rating import ElasticMaterial, G, elastic_material, material_for_pipe
from kit.errors import InputError, check_choice, check_range

__all__ = [
    "ANCHORINGS", "WALL_THEORIES", "VALIDITY", "SCREEN_CAUTION", "TRANSIENT_ANALYSIS_REQUIRED",
    "restraint_factor", "wave_speed", "WaveSpeed", "pipe_wave_speed", "equivalent_wave_speed",
    "joukowsky_rise", "critical_closure_time", "michaud_rise", "ClosureSurge", "closure_surge",
    "pump_trip_downsurge", "SurgeScreen", "surge_screen",
]

#: Anchoring cases of Wylie & Streeter (1993) → (words, thin-walled c1 as a function of nu).
ANCHORINGS: dict[str, tuple] = {
    "anchored_upstream": ("anchored at its upstream end only", lambda nu: 1.0 - nu / 2.0),
    "anchored_throughout": ("anchored throughout against axial movement",
                            lambda nu: 1.0 - nu * nu),
    "expansion_joints": ("with expansion joints throughout", lambda nu: 1.0),
}

#: Wall theories for :func:`restraint_factor`.
WALL_THEORIES = ("thick", "thin")

#: Where each closed form holds, as data (Wylie & Streeter 1993, from memory).
VALIDITY: dict[str, dict] = {
    "korteweg thin-walled c1": {"D/e min": 25.0},
    "korteweg thick-walled c1": {"D/e min": 0.0},
    "joukowsky": {"closure time / (2L/a) max": 1.0},
    "michaud": {"closure time / (2L/a) min": 1.0},
}

#: The sentence every risk finding carries.
TRANSIENT_ANALYSIS_REQUIRED = (
    "a transient (surge) analysis by a qualified engineer is required; this screen is not "
    "that analysis")

#: Standing caution for any output that shows this screen.
SCREEN_CAUTION = (
    "The surge figures are a screen by closed-form bounds (Korteweg wave speed, Joukowsky and "
    "Michaud rises, instantaneous pump stop), not a transient analysis. They ignore wave "
    "reflections, friction, pump inertia, valve characteristics, air valves and column "
    "rejoining, any of which can make real surges higher. Where the screen shows risk, or the "
    "consequence of failure is serious, a qualified engineer must do a transient analysis; "
    "local codes and licensed professional practice govern.")

_WS = ("Wylie, E. B., Streeter, V. L. (1993). Fluid Transients in Systems. Prentice Hall, "
       "ch. 2 (wave speed; restraint factor c1; thick-walled form)")
_KORTEWEG = ("Korteweg, D. J. (1878). Ueber die Fortpflanzungsgeschwindigkeit des Schalles in "
             "elastischen Röhren. Ann. Phys. 241(12), 525-542")
_JOUKOWSKY = ("Joukowsky, N. (1898; transl. Simin 1904). Über den hydraulischen Stoss in "
              "Wasserleitungsröhren. Mém. Acad. Imp. Sci. St.-Pétersbourg")
_MICHAUD = ("Michaud, J. (1878). Coups de bélier dans les conduites. Bull. Soc. Vaudoise "
            "Ing. Archit. 4")


def _check_nu(nu):
    return check_range("Poisson's ratio", nu, "-", 0.0, 0.5, high_inclusive=False)


def restraint_factor(nu: float, D: float, e: float, anchoring: str = "anchored_throughout",
                     wall_theory: str = "thick") -> float:
    """Restraint factor c1 of the Korteweg wave-speed formula (Wylie & Streeter 1993).

    Thin-walled (D/e large): c1 = 1 - nu/2 (anchored upstream only), 1 - nu² (anchored
    throughout), 1 (expansion joints throughout). Thick-walled, from Lamé's solution for the
    bore's strain, with D the inside diameter::

        c1 = 2 e (1 + nu) / D + D c1_thin / (D + e)

    which tends to the thin-walled value as e/D → 0 and is within about 1 % of the wave speed
    of it for D/e > 25 in steel (Wylie & Streeter use the thin form there, from memory). The
    thick form is the default at every D/e so the wave speed has no step.

    Parameters
    ----------
    nu : float
        Poisson's ratio of the pipe wall, 0 < nu < 0.5 [-]
    D : float
        Inside diameter, > 0 [m]
    e : float
        Wall thickness, > 0 [m]
    anchoring : str
        A key of :data:`ANCHORINGS` [-]
    wall_theory : str
        'thick' or 'thin' [-]

    Returns
    -------
    c1 : float
        Restraint factor [-]

    Examples
    --------
    >>> round(restraint_factor(0.30, 0.1023, 0.00602, wall_theory="thin"), 4)
    0.91
    >>> round(restraint_factor(0.30, 0.1023, 0.00602), 4)
    1.0124

    References
    ----------
    .. [1] Wylie, E. B., Streeter, V. L. (1993). Fluid Transients in Systems. Prentice Hall.
    """
    check_choice("anchoring", anchoring, tuple(ANCHORINGS))
    check_choice("wall theory", wall_theory, WALL_THEORIES)
    nu = _check_nu(nu)
    D = check_range("inside diameter", D, "m", low=0.0)
    e = check_range("pipe wall thickness", e, "m", low=0.0)
    thin = ANCHORINGS[anchoring][1](nu)
    if wall_theory == "thin":
        return thin
    return 2.0 * e * (1.0 + nu) / D + D * thin / (D + e)


def wave_speed(K: float, rho: float, D: float, e: float, E: float, nu: float,
               anchoring: str = "anchored_throughout", wall_theory: str = "thick") -> float:
    """Pressure-wave speed in a liquid-filled elastic pipe by the Korteweg formula.

    .. math:: a = \\sqrt{\\frac{K/\\rho}{1 + c_1 \\dfrac{K D}{E e}}}

    (Korteweg 1878; restraint factor c1 of Wylie & Streeter 1993, :func:`restraint_factor`).

    Parameters
    ----------
    K : float
        Liquid bulk modulus, > 0 [Pa]
    rho : float
        Liquid density, > 0 [kg/m³]
    D : float
        Inside diameter, > 0 [m]
    e : float
        Wall thickness, > 0 [m]
    E : float
        Young's modulus of the wall, 1e8 to 5e11 Pa [Pa]
    nu : float
        Poisson's ratio of the wall, 0 < nu < 0.5 [-]
    anchoring : str
        A key of :data:`ANCHORINGS` [-]
    wall_theory : str
        'thick' or 'thin' [-]

    Returns
    -------
    a : float
        Wave speed [m/s]

    Examples
    --------
    >>> round(wave_speed(2.19e9, 998.2, 0.0972, 0.0054, 2.76e9, 0.45))
    395

    References
    ----------
    .. [1] Korteweg, D. J. (1878). Ann. Phys. 241(12), 525-542. doi:10.1002/andp.18782411206
    .. [2] Wylie, E. B., Streeter, V. L. (1993). Fluid Transients in Systems. Prentice Hall.
    """
    K = check_range("liquid bulk modulus", K, "Pa", low=0.0)
    rho = check_range("density", rho, "kg/m³", low=0.0)
    E = check_range("elastic modulus", E, "Pa", 1e8, 5e11)
    c1 = restraint_factor(nu, D, e, anchoring, wall_theory)
    return math.sqrt((K / rho) / (1.0 + c1 * K * D / (E * e)))


@dataclass(frozen=True)
class WaveSpeed:
    """Wave speed in one pipe with the inputs and the method in words.

    Attributes
    ----------
    a : float
        Wave speed [m/s].
    a_liquid : float
        Speed of sound in the unconfined liquid, sqrt(K/rho) [m/s].
    c1 : float
        Restraint factor [-].
    D, e : float
        Inside diameter and wall [m].
    material : ElasticMaterial
    anchoring, wall_theory : str
    method, source : str
    """

    a: float
    a_liquid: float
    c1: float
    D: float
    e: float
    material: ElasticMaterial
    anchoring: str
    wall_theory: str
    method: str
    source: str


def pipe_wave_speed(pipe, K: float, rho: float, material=None,
                    anchoring: str = "anchored_throughout",
                    wall_theory: str = "thick") -> WaveSpeed:
    """Korteweg wave speed in a :class:`~kit.core.pipes.Pipe` (bore and wall from the pipe).

    Parameters
    ----------
    pipe : Pipe
        The pipe, with its wall [-]
    K : float
        Liquid bulk modulus (:func:`kit.core.liquids.bulk_modulus`) [Pa]
    rho : float
        Liquid density [kg/m³]
    material : str or ElasticMaterial, optional
        Default: :func:`kit.core.rating.material_for_pipe` [-]
    anchoring : str
        A key of :data:`ANCHORINGS` [-]
    wall_theory : str
        'thick' or 'thin' [-]

    Returns
    -------
    wave : WaveSpeed
        Wave speed [m/s] with its inputs and method

    Examples
    --------
    >>> from kit.core.pipes import catalogue_pipe
    >>> w = pipe_wave_speed(catalogue_pipe("asme_b36_10m", "8", "40", "carbon_steel"),
    ...                     2.19e9, 998.2)
    >>> round(w.a)
    1321
    """
    if pipe.wall is None:
        raise InputError("pipe wall thickness", None,
                         f"is needed for the wave speed in {pipe.label}: give the outside "
                         "diameter")
    mat = material_for_pipe(pipe) if material is None else elastic_material(material)
    a = wave_speed(K, rho, pipe.Di, pipe.wall, mat.E, mat.nu, anchoring, wall_theory)
    c1 = restraint_factor(mat.nu, pipe.Di, pipe.wall, anchoring, wall_theory)
    method = (f"Korteweg wave speed, {wall_theory}-walled restraint factor c1 = {c1:.4g} "
              f"(pipe {ANCHORINGS[anchoring][0]}); E = {mat.E / 1e9:.4g} GPa, "
              f"nu = {mat.nu:g} ({mat.display})")
    return WaveSpeed(a=a, a_liquid=math.sqrt(K / rho), c1=c1, D=pipe.Di, e=pipe.wall,
                     material=mat, anchoring=anchoring, wall_theory=wall_theory, method=method,
                     source=f"{_KORTEWEG}; {_WS}; pipe material: {mat.source}")


def equivalent_wave_speed(lengths, speeds) -> float:
    """Wave speed of pipes in series with the same total travel time: L / sum(L_i / a_i).

    Common practice for screening a line of several pipes (Wylie & Streeter 1993 use the
    same travel-time equivalence for series pipes, from memory).

    Parameters
    ----------
    lengths : sequence of float
        Lengths of the pipes, each > 0 [m]
    speeds : sequence of float
        Their wave speeds, each > 0 [m/s]

    Returns
    -------
    a : float
        Equivalent wave speed [m/s]

    Examples
    --------
    >>> round(equivalent_wave_speed([600.0, 400.0], [1300.0, 420.0]), 1)
    707.3
    """
    Ls = [check_range(f"length[{i}]", v, "m", low=0.0) for i, v in enumerate(lengths)]
    As = [check_range(f"wave speed[{i}]", v, "m/s", low=0.0) for i, v in enumerate(speeds)]
    if not Ls or len(Ls) != len(As):
        raise InputError("wave speeds", len(As),
                         f"must be one per length ({len(Ls)} lengths), at least one")
    return sum(Ls) / sum(L / a for L, a in zip(Ls, As, strict=True))


def joukowsky_rise(rho: float, a: float, dV: float) -> float:
    """Pressure change of an instantaneous velocity change (Joukowsky 1898): dp = rho a dV.

    Parameters
    ----------
    rho : float
        Liquid density, > 0 [kg/m³]
    a : float
        Wave speed, > 0 [m/s]
    dV : float
        Velocity change (magnitude), >= 0 [m/s]

    Returns
    -------
    dp : float
        Pressure change [Pa]

    Examples
    --------
    >>> round(joukowsky_rise(998.2, 1300.0, 2.0) / 1e5, 2)
    25.95

    References
    ----------
    .. [1] Joukowsky, N. (1898). Über den hydraulischen Stoss in Wasserleitungsröhren.
       Mém. Acad. Imp. Sci. St.-Pétersbourg (1900); transl. O. Simin, Proc. AWWA 24 (1904),
       341-424.
    """
    rho = check_range("density", rho, "kg/m³", low=0.0)
    a = check_range("wave speed", a, "m/s", low=0.0)
    dV = check_range("velocity change", dV, "m/s", low=0.0, low_inclusive=True)
    return rho * a * dV


def critical_closure_time(L: float, a: float) -> float:
    """Reflection time 2L/a: a closure no longer than this gives the full Joukowsky rise.

    Parameters
    ----------
    L : float
        Pipe length from the valve to the reflecting boundary (reservoir), > 0 [m]
    a : float
        Wave speed, > 0 [m/s]

    Returns
    -------
    t : float
        Critical closure time [s]

    Examples
    --------
    >>> critical_closure_time(1300.0, 1300.0)
    2.0
    """
    L = check_range("pipe length", L, "m", low=0.0)
    a = check_range("wave speed", a, "m/s", low=0.0)
    return 2.0 * L / a


def michaud_rise(rho: float, L: float, dV: float, tc: float) -> float:
    """Pressure rise of a slow closure by Michaud's formula (1878): dp = 2 rho L dV / t_c.

    Valid for t_c > 2L/a with the velocity falling linearly in time. Real valves cut most
    of the flow at the end of their stroke, so ``tc`` must be the *effective* closure time
    (the time over which the flow actually falls), often a fraction of the stroke time;
    using the stroke time understates the rise.

    Parameters
    ----------
    rho : float
        Liquid density, > 0 [kg/m³]
    L : float
        Pipe length to the reflecting boundary, > 0 [m]
    dV : float
        Velocity change, >= 0 [m/s]
    tc : float
        Effective closure time, > 0 [s]

    Returns
    -------
    dp : float
        Pressure rise [Pa]

    Examples
    --------
    >>> round(michaud_rise(998.2, 800.0, 2.0, 10.0) / 1e5, 2)
    3.19

    References
    ----------
    .. [1] Michaud, J. (1878). Coups de bélier dans les conduites. Étude des moyens employés
       pour en atténuer les effets. Bull. Soc. Vaudoise Ing. Archit. 4, 56-64, 65-77.
    """
    rho = check_range("density", rho, "kg/m³", low=0.0)
    L = check_range("pipe length", L, "m", low=0.0)
    dV = check_range("velocity change", dV, "m/s", low=0.0, low_inclusive=True)
    tc = check_range("closure time", tc, "s", low=0.0)
    return 2.0 * rho * L * dV / tc


@dataclass(frozen=True)
class ClosureSurge:
    """Result of :func:`closure_surge`.

    Attributes
    ----------
    dp : float
        Pressure rise [Pa].
    dh : float
        The same as head of the flowing liquid, dp / (rho g) [m].
    t_critical : float
        Reflection time 2L/a [s].
    regime : str
        'sudden' (t_c <= 2L/a, Joukowsky) or 'slow' (Michaud).
    method, source : str
    """

    dp: float
    dh: float
    t_critical: float
    regime: str
    method: str
    source: str


def closure_surge(rho: float, a: float, L: float, dV: float, tc: float) -> ClosureSurge:
    """Valve-closure pressure rise: Joukowsky for t_c <= 2L/a, Michaud for slower closures.

    Joukowsky (1898) ``dp = rho a dV`` when the closure is complete before the first
    reflection returns; otherwise Michaud (1878) ``dp = 2 rho L dV / t_c``. The two agree at
    ``t_c = 2L/a``, so the rise has no step.

    Parameters
    ----------
    rho : float
        Liquid density [kg/m³]
    a : float
        Wave speed [m/s]
    L : float
        Pipe length from the valve to the reflecting boundary [m]
    dV : float
        Velocity change at the valve [m/s]
    tc : float
        Effective closure time, > 0 [s]

    Returns
    -------
    surge : ClosureSurge
        Rise [Pa] and [m], critical time [s], regime and method

    Examples
    --------
    >>> s = closure_surge(998.2, 1300.0, 800.0, 2.0, 10.0)
    >>> s.regime, round(s.t_critical, 3), round(s.dh, 1)
    ('slow', 1.231, 32.6)
    """
    tc = check_range("closure time", tc, "s", low=0.0)
    t_crit = critical_closure_time(L, a)
    if tc <= t_crit:
        dp = joukowsky_rise(rho, a, dV)
        regime = "sudden"
        method = f"Joukowsky dp = rho a dV (closure {tc:.4g} s <= 2L/a = {t_crit:.4g} s)"
        source = _JOUKOWSKY
    else:
        dp = michaud_rise(rho, L, dV, tc)
        regime = "slow"
        method = (f"Michaud dp = 2 rho L dV / t_c (closure {tc:.4g} s > 2L/a = {t_crit:.4g} s; "
                  "linear velocity fall, effective closure time)")
        source = _MICHAUD
    return ClosureSurge(dp=dp, dh=dp / (rho * G), t_critical=t_crit, regime=regime,
                        method=method, source=source)


def pump_trip_downsurge(rho: float, a: float, V: float) -> float:
    """Pressure drop at a pump that stops instantly: the Joukowsky drop rho a V (upper bound).

    A screening bound: the pump's and motor's inertia make the real drop at the pump
    smaller, but it is carried along the line, and at high points where the running
    pressure is low it can reach the vapour pressure (column separation). Joukowsky (1898).

    Parameters
    ----------
    rho : float
        Liquid density [kg/m³]
    a : float
        Wave speed [m/s]
    V : float
        Running velocity in the discharge line, >= 0 [m/s]

    Returns
    -------
    dp : float
        Pressure drop [Pa]

    Examples
    --------
    >>> round(pump_trip_downsurge(998.2, 1000.0, 1.5) / 1e5, 2)
    14.97
    """
    return joukowsky_rise(rho, a, V)


@dataclass(frozen=True)
class SurgeScreen:
    """Result of :func:`surge_screen`.

    Attributes
    ----------
    closure : ClosureSurge or None
        The valve-closure rise (None when no closure time was given).
    p_peak : float or None
        Highest absolute pressure on closure, running + rise [Pa].
    downsurge : float
        Pump-trip drop rho a V [Pa].
    p_min : dict
        Station name → running pressure less the down-surge, floored at nothing (it may be
        below the vapour pressure, which is the point of the screen) [Pa]. The findings show
        the vapour pressure where this figure is below it (the column parts there).
    findings : list of Finding
    """

    closure: ClosureSurge | None
    p_peak: float | None
    downsurge: float
    p_min: dict
    findings: list


def surge_screen(subject: str, rho: float, a: float, L: float, V: float,
                 running_pressure: float, rated_pressure: float | None = None,
                 closure_time: float | None = None, trip_stations=(), pv: float | None = None,
                 p_atm: float = P_ATM, event: str = "pump trip") -> SurgeScreen:
    """Water-hammer screen of one line: valve-closure rise and pump-trip down-surge.

    - Closure (when ``closure_time`` is given): :func:`closure_surge` for a full stop from
      ``V``, added to the highest running pressure; FAIL when the peak (gauge) exceeds the
      rating. No occasional-load allowance is taken.
    - Pump trip (for each of ``trip_stations``, the pump discharge and the high points):
      running pressure less ``rho a V`` (:func:`pump_trip_downsurge`); at or below the
      vapour pressure (column separation risk) a CHECK for a pump trip — the instantaneous
      stop only bounds the drop (the set's inertia slows the run-down), so the screen cannot
      clear the line and asks for the transient analysis — and a FAIL for any other sudden
      stop (a valve can shut that fast); CHECK below atmospheric (vacuum: air ingress at air
      valves, collapse of thin walls).

    Every FAIL and CHECK says that a transient analysis by a qualified engineer is required;
    a PASS says it is a screen only.

    Parameters
    ----------
    subject : str
        What the findings are about ("discharge line") [-]
    rho : float
        Liquid density [kg/m³]
    a : float
        Wave speed (for several pipes, :func:`equivalent_wave_speed`) [m/s]
    L : float
        Length from the valve to the reflecting boundary [m]
    V : float
        Running velocity, >= 0 [m/s]
    running_pressure : float
        Highest running absolute pressure where the closure acts [Pa]
    rated_pressure : float, optional
        The line's maximum allowable gauge pressure (e.g. ``rating.P_allow``) [Pa]
    closure_time : float, optional
        Effective valve closure time, > 0 [s]
    trip_stations : sequence of (str, float)
        (station name, running absolute pressure [Pa]) for the pump and the high points [Pa]
    pv : float, optional
        Vapour pressure, needed when ``trip_stations`` is given [Pa]
    p_atm : float
        Atmospheric pressure [Pa]
    event : str
        The sudden stop that makes the down-surge, in words for the findings: "pump trip"
        (default), or e.g. "outlet valve closure upstream of the crest" for a gravity line [-]

    Returns
    -------
    screen : SurgeScreen
        Rise [Pa], peak [Pa], down-surge [Pa], lowest pressures [Pa] and findings

    Examples
    --------
    >>> s = surge_screen("discharge", 998.2, 1300.0, 800.0, 2.0, 6e5, rated_pressure=20e5,
    ...                  closure_time=1.0, trip_stations=[("crest", 2.5e5)], pv=2339.0)
    >>> [f.severity.value for f in s.findings]
    ['fail', 'check']
    """
    rho = check_range("density", rho, "kg/m³", low=0.0)
    a = check_range("wave speed", a, "m/s", low=0.0)
    L = check_range("pipe length", L, "m", low=0.0)
    V = check_range("velocity", V, "m/s", low=0.0, low_inclusive=True)
    p_run = check_range("running pressure", running_pressure, "Pa", low=0.0)
    p_atm = check_range("atmospheric pressure", p_atm, "Pa", low=0.0)
    if not isinstance(event, str) or not event.strip():
        raise InputError("surge event", event, "must be a non-empty text naming the sudden stop")
    findings: list[Finding] = []
    closure = p_peak = None
    if closure_time is not None:
        closure = closure_surge(rho, a, L, V, closure_time)
        p_peak = p_run + closure.dp
        peak_g = p_peak - p_atm
        src = f"{closure.source}; {_KORTEWEG}"
        if rated_pressure is None:
            findings.append(Finding(
                Severity.CHECK, subject, "surge peak pressure (gauge)", peak_g, "Pa",
                "no rating given", f"{closure.method}: peak not compared with a rating; "
                f"{TRANSIENT_ANALYSIS_REQUIRED}", src))
        else:
            rated = check_range("rated pressure", rated_pressure, "Pa", low=0.0)
            limit = f"<= {rated:.6g} Pa gauge (line rating)"
            if peak_g > rated:
                findings.append(Finding(
                    Severity.FAIL, subject, "surge peak pressure (gauge)", peak_g, "Pa", limit,
                    f"{closure.method}: running pressure plus the rise exceeds the rating; "
                    f"{TRANSIENT_ANALYSIS_REQUIRED}", src, high=rated))
            else:
                findings.append(Finding(
                    Severity.PASS, subject, "surge peak pressure (gauge)", peak_g, "Pa", limit,
                    f"{closure.method}: within the rating on this screen only (not a "
                    "transient analysis)", src, high=rated))
    drop = pump_trip_downsurge(rho, a, V)
    p_min: dict[str, float] = {}
    rows = list(trip_stations)
    if rows:
        if pv is None:
            raise InputError("vapour pressure", None,
                             "is needed for the pump-trip column-separation screen: give it")
        pv = check_range("vapour pressure", pv, "Pa", low=0.0)
        src = f"{_JOUKOWSKY} (instantaneous stop, upper bound on the drop)"
        for name, p in rows:
            p = check_range(f"running pressure at '{name}'", p, "Pa", low=0.0)
            low = p - drop
            p_min[name] = low
            shown = low
            if low <= pv:
                # a liquid cannot fall below its vapour pressure: the column parts there, and
                # the finding shows that pressure with the unbounded figure in words
                shown = pv
                # an instantaneous stop bounds the drop from above: for a pump trip (the
                # set's inertia slows the run-down) the bound only fails to clear the line,
                # a CHECK that asks for the transient analysis; a valve can shut that fast
                sev = Severity.CHECK if event == "pump trip" else Severity.FAIL
                sev, rule = sev, (
                    f"{event}: the down-surge rho·a·V = {drop:.4g} Pa takes '{name}' "
                    f"({p:.4g} Pa abs running) to the vapour pressure (the unbounded drop "
                    f"would give {low:.4g} Pa abs, impossible: the column parts; column "
                    f"separation risk, rejoining columns can burst the pipe); "
                    f"{TRANSIENT_ANALYSIS_REQUIRED}")
            elif low < p_atm:
                sev, rule = Severity.CHECK, (
                    f"{event}: the down-surge takes '{name}' below atmospheric (air ingress "
                    f"at air valves, collapse of thin walls); {TRANSIENT_ANALYSIS_REQUIRED}")
            else:
                sev, rule = Severity.PASS, (
                    f"{event}: '{name}' stays above atmospheric on this screen only (not a "
                    "transient analysis)")
            what = (f"pump-trip lowest pressure at '{name}' (absolute)" if event == "pump trip"
                    else f"lowest pressure at '{name}' after the {event} (absolute)")
            findings.append(Finding(sev, subject, what,
                                    shown, "Pa", f"> {pv:.6g} Pa (vapour pressure)", rule, src,
                                    low=pv))
    return SurgeScreen(closure=closure, p_peak=p_peak, downsurge=drop, p_min=p_min,
                       findings=findings)
