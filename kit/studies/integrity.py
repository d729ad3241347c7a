"""Pressure rating and water-hammer screening of one line, shared by the studies.

For a line (one pipe, or the pipe of its highest-pressure station) the screen takes:

1. the highest pressure it can see — the cases of :func:`kit.core.rating.highest_pressure`
   (a pump at shut-off on the highest suction pressure, the standing column with the flow
   stopped, a running inlet pressure where there is no pump) and the surge rise on the running
   pressure — with the governing case named;
2. the pipe's maximum allowable pressure by the method its material needs
   (:func:`kit.core.rating.pipe_rating`: ASME B31.3 §304.1.2 for steel, the ISO equation with
   a temperature derating for plastics) and, where a flange class is given, ASME B16.5;
3. the wave speed (Korteweg, with Wylie & Streeter's restraint factor,
   :func:`kit.core.surge.pipe_wave_speed`), the closure rise (Joukowsky 1898 at or below the
   critical time 2L/a, Michaud 1878 above it; with no closure time given an instantaneous
   closure is assumed and said so), and for pumped lines the pump-trip down-surge at the pump
   and at the high points against vapour pressure (:func:`kit.core.surge.surge_screen`).

Every FAIL or CHECK of the surge screen says that a transient analysis by a qualified engineer
is required; the screen is never that analysis. Where the liquid's property model has no speed
of sound and no ``[integrity] bulk_modulus`` is given, the surge part is reported as not
screened (CHECK), never silently skipped.

Example
-------
>>> from kit.core.liquids import make_liquid
>>> from kit.core.pipes import catalogue_pipe
>>> from kit.inputs.common import IntegrityOptions
>>> pipe = catalogue_pipe("asme_b36_10m", "4", "40", "carbon_steel")
>>> s = screen_line("route", pipe, make_liquid("water"), 293.15, 101325.0, 2339.0,
...                 length=300.0, velocity=2.0, running_pressure=5e5,
...                 standing=(12.0, 101325.0), opts=IntegrityOptions())
>>> s.governing, round(s.wave_speed), s.rating.holds
('surge on running pressure', 1364, True)
"""

from __future__ import annotations

from dataclasses import dataclass

from kit.core.findings import Finding, Severity
from kit.errors import HeadlineError

__all__ = ["IntegrityScreen", "screen_line", "METHODS"]

#: Method lines the studies add to their results when they run the screen.
METHODS = (
    ("Pressure rating", "ASME B31.3 §304.1.2 straight pipe under internal pressure (steel); "
     "ISO 161-1 / ASTM D2241 pressure-class equation with temperature derating (plastics); "
     "ASME B16.5 group 1.1 flange ratings (from memory: check the edition in force)"),
    ("Water-hammer screen", "Korteweg wave speed with Wylie & Streeter (1993) restraint "
     "factors; Joukowsky (1898) rise at or below 2L/a, Michaud (1878) above; pump-trip "
     "down-surge rho·a·V as an upper bound. A screen, not a transient analysis"),
)


@dataclass(frozen=True)
class IntegrityScreen:
    """What one line's screen found (SI; pressures absolute unless named gauge)."""

    subject: str
    p_max: float
    governing: str
    cases: dict
    rating: object | None
    wave_speed: float | None
    surge_rise: float | None
    surge_regime: str | None
    downsurge: float | None
    findings: tuple

    @property
    def verdict(self) -> str:
        from kit.core.findings import worst

        return worst(self.findings).value if self.findings else "pass"


def _not_screened(subject: str, what: str, why: str) -> Finding:
    return Finding(Severity.CHECK, subject, what, float("nan"), "-", "screened",
                   f"not screened: {why}", "kit.studies.integrity")


def screen_line(subject: str, pipe, liquid, T: float, p_atm: float, pv: float | None, *,
                length: float, velocity: float, running_pressure: float, opts,
                standing: tuple | None = None, shutoff: tuple | None = None,
                trip_stations=(), rho: float | None = None, other_cases: dict | None = None,
                running_label: str = "running, highest station",
                standing_label: str | None = None, closure_note: bool = True,
                downsurge_event: str = "pump trip") -> IntegrityScreen:
    """Rate one line and screen it for water hammer.

    Parameters
    ----------
    subject : str
        What the findings are about ("NPS 4 route", "discharge line") [-]
    pipe : Pipe
        The line's pipe (the one at its highest-pressure station) [-]
    liquid : Liquid or UserLiquid
        For the bulk modulus (and density where ``rho`` is not given) [-]
    T : float
        Design temperature, the highest of the case [K]
    p_atm : float
        Atmospheric pressure [Pa]
    pv : float or None
        Vapour pressure at ``T`` (for the pump-trip screen) [Pa]
    length : float
        Length from the closing valve to the reflecting boundary [m]
    velocity : float
        Running velocity the closure or the trip stops [m/s]
    running_pressure : float
        Highest running absolute pressure of the line [Pa]
    opts : IntegrityOptions
        The scenario's ``[integrity]`` table [-]
    standing : (float, float), optional
        (height of the highest liquid surface above the line's lowest station [m], that
        surface's absolute pressure [Pa]) for the standing-column case
    shutoff : (float, float, float), optional
        (pump shut-off head [m], highest suction absolute pressure [Pa], pump elevation minus
        the line's lowest station [m]) for the shut-off case of a pumped line
    trip_stations : sequence of (str, float)
        (station, running absolute pressure [Pa]) for the pump-trip down-surge
    rho : float, optional
        Density, the highest of the case [kg/m³]
    other_cases : dict, optional
        More no-flow cases, name → absolute pressure [Pa] (a receiver's column on a gravity
        line, a relief setting) [Pa]
    running_label : str
        Name of the running case ("draining, highest flow" for a gravity line) [-]
    standing_label : str, optional
        Name of the standing-column case in place of "standing column, pump stopped" (a
        gravity line has no pump) [-]
    closure_note : bool
        Add the CHECK that no closure time was given (a study screening several segments of
        one line says it once) [-]
    downsurge_event : str
        The sudden stop behind the down-surge at ``trip_stations``, in words ("pump trip", or
        "outlet valve closure upstream of the crest") [-]

    Returns
    -------
    IntegrityScreen
    """
    from kit.core import rating as rt
    from kit.core import surge as sg

    findings: list[Finding] = []
    state = liquid.state(T, max(running_pressure, p_atm))
    rho = rho if rho is not None else state.rho
    # the maker's (or a measured) wave speed and rating stand in for the Korteweg estimate
    # and the wall formula: hose, lined pipe, materials the kit has no method for
    a = opts.wave_speed
    given_rating = opts.rated_pressure
    if a is None:
        a = _korteweg(subject, pipe, liquid, T, max(running_pressure, p_atm), rho, opts,
                      findings)
    closure = None
    if a is not None:
        tc = opts.closure_time if opts.closure_time is not None else \
            sg.critical_closure_time(length, a)
        closure = sg.closure_surge(rho, a, length, velocity, tc)
    other = {running_label: running_pressure, **(other_cases or {})}
    H0, ps, dz = shutoff if shutoff is not None else (0.0, p_atm, 0.0)
    cases = rt.highest_pressure(
        rho, H0, ps, dz,
        standing_head=None if standing is None else standing[0],
        standing_surface_pressure=p_atm if standing is None else standing[1],
        surge_rise=0.0 if closure is None else closure.dp,
        running_pressure=running_pressure, other_cases=other)
    if standing_label is not None and "standing column, pump stopped" in cases.cases:
        cases = rt.PressureCases({standing_label if k == "standing column, pump stopped" else k:
                                  v for k, v in cases.cases.items()}, "", 0.0)
    if shutoff is None:  # no pump on this line: the shut-off case is meaningless
        cases = rt.PressureCases({k: v for k, v in cases.cases.items() if k != "pump at shut-off"},
                                 "", 0.0)
    if not cases.governing:
        gov = max(cases.cases, key=cases.cases.__getitem__)
        cases = rt.PressureCases(cases.cases, gov, cases.cases[gov])
        gov = max(cases.cases, key=cases.cases.__getitem__)
        cases = rt.PressureCases(cases.cases, gov, cases.cases[gov])
    rating = None
    try:
        # the allowable pressure does not depend on the design pressure: a line never above
        # atmospheric is rated at a nominal 1 Pa (gauge) and passes with its margin shown
        if given_rating is not None:
            rating = rt.GivenRating(max(cases.gauge(p_atm), 1.0), given_rating)
        else:
            rating = rt.pipe_rating(pipe, max(cases.gauge(p_atm), 1.0), T, grade=opts.grade,
                                    compound=opts.compound, joint=opts.joint,
                                    corrosion_allowance=opts.corrosion_allowance)
        findings += rt.rating_findings(subject, cases, rating, p_atm)
    except HeadlineError as exc:
        findings.append(_not_screened(subject, "pressure rating", str(exc)))
    if opts.flange_class is not None:
        try:
            findings += rt.flange_findings(subject, opts.flange_class, cases, T, p_atm)
        except HeadlineError as exc:
            findings.append(_not_screened(subject, "flange rating", str(exc)))
    downsurge = None
    if a is not None:
        screen = sg.surge_screen(
            subject, rho, a, length, velocity, running_pressure,
            rated_pressure=None if rating is None else rating.P_allow,
            closure_time=opts.closure_time if opts.closure_time is not None else
            sg.critical_closure_time(length, a),
            trip_stations=list(trip_stations), pv=pv, p_atm=p_atm, event=downsurge_event)
        findings += list(screen.findings)
        if trip_stations:
            downsurge = screen.downsurge
        if opts.closure_time is None and closure_note:
            findings.append(Finding(
                Severity.CHECK, subject, "valve closure time", 0.0, "s",
                "given in [integrity] closure_time",
                "no closure time given: an instantaneous closure (the full Joukowsky rise) is "
                "assumed — give the effective closure time of the fastest valve",
                "common practice, no source"))
    return IntegrityScreen(subject, cases.p_max, cases.governing, dict(cases.cases), rating, a,
                           None if closure is None else closure.dp,
                           None if closure is None else closure.regime, downsurge,
                           tuple(findings))


def _korteweg(subject, pipe, liquid, T, p, rho, opts, findings):
    """Korteweg wave speed of the line [m/s], or None with a not-screened finding."""
    from kit.core import surge as sg
    from kit.core.liquids import bulk_modulus

    try:
        K = bulk_modulus(liquid, T, p, K_user=opts.bulk_modulus)
    except HeadlineError as exc:
        findings.append(_not_screened(subject, "water-hammer screen",
                                      f"{exc} (give [integrity] bulk_modulus, or the line's "
                                      "wave_speed)"))
        return None
    try:
        return sg.pipe_wave_speed(pipe, K.K, rho, anchoring=opts.anchoring).a
    except HeadlineError as exc:
        findings.append(_not_screened(subject, "water-hammer screen",
                                      f"{exc} (or give [integrity] wave_speed from the maker)"))
        return None
