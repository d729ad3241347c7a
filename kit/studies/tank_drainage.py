"""Tank drainage study: the time to drain a tank to a target level, through an orifice or a line.

The tank, its outlet and the levels come from a scenario; the drain-down itself is
:func:`kit.core.drain.drain` (quasi-steady energy balance, time by quadrature over volume on
the tank's exact level–volume table). An optional ``[compare]`` section builds the same
drain with a second outlet size (the what-if) and reports both.

Scenario keys of this kind (besides the common ones of :mod:`kit.scenario`: ``[site]`` gives
the atmospheric pressure, ``[liquid]`` the liquid at one ``temperature``)::

    [tank]     name = "T-101"
               shape = "vertical_cylinder"     (| horizontal_cylinder | sphere | strapping_table)
               diameter = "2.2 m"              (inside; cylinders and sphere)
               length = "2.6 m"                (straight shell, tangent to tangent; cylinders)
               bottom = { kind = "torispherical", standard = "ASME F&D" }   (vertical)
               top = "flat"                    (vertical; default flat)
               heads = "ellipsoidal"           (horizontal: both ends; vertical: both, unless
                                                bottom/top are given)
               levels = ["0 m", ...], volumes = ["0 m3", ...]   (strapping_table only)
      a head is a kind ("flat", "conical", "ellipsoidal", "torispherical", "spherical") or a
      table { kind, depth = "300 mm" | ratio = 0.25, f = 1.0, k = 0.06 | standard = "..." }
      (standard: a key of kit.core.tank.TORISPHERICAL_STANDARDS)
    [drain]    start_level = "2.9 m", target_level = "0 m"   (on the tank's level datum: its
                                                lowest inside point)
               levels_of_interest = ["2 m", { level = "450 mm", label = "low-level switch" }]
               surface = "vented"              (| "padded" | "vacuum")
               surface_pressure = "0.2 bar(g)" (padded or vacuum only; gauge or absolute)
               vent = { diameter = "3 in", Cd = 0.61, allowable_vacuum = "0.25 kPa" }
    [outlet]   type = "orifice"
               diameter = "50 mm", Cd = 0.61 | cd_key = "sharp"  (key of kit.core.drain.ORIFICE_CD)
               elevation = "0 m"               (orifice centre above the level datum)
               name = "bottom orifice"
    [outlet]   type = "line"
               name = "dump line", start_station = "tank outlet nozzle"
               inlet_elevation = "0 m"         (line inlet on the level datum; default 0)
               discharge_elevation = "-2.5 m"  (optional; must equal inlet + the line's rise)
               receiver_level = "..."          (optional: a submerged exit into a vessel;
                                                absent: a free jet into air)
               receiver_pressure = "0 kPa(g)"  (optional; default atmospheric)
               [[outlet.segments]]             (as kit.scenario.build_segment reads them)
    [compare]  label = "NPS 3 dump line"        (optional what-if, a second outlet size)
               outlet_diameter = "65 mm", Cd = 0.61      (orifice outlet)
               nominal = "3", schedule = "40S"           (line outlet: every catalogue pipe)
    [integrity] closure_time = "0.5 s", grade, compound, joint, corrosion_allowance,
               flange_class, anchoring, bulk_modulus   (optional; the table the other kinds
                                                share, :data:`kit.inputs.common.INTEGRITY`)

Reported values (keys of :class:`kit.results.Results`; SI)::

    tank.total_volume [volume]   tank.height [length]   liquid.density, liquid.viscosity,
    liquid.vapour_pressure (where modelled)   drain.start_level, drain.target_level,
    drain.end_level [elevation]  drain.volume_drained [volume]   drain.total_time [time]
    drain.time_to.<label> [time] (inf below a level where outflow stops)
    drain.peak_flow, drain.mean_flow [flow]   drain.peak_velocity [velocity]
    drain.lowest_pressure [pressure] (line outlets)
    compare.total_time, compare.time_to.<label>, compare.peak_flow, compare.peak_velocity,
    compare.time_saved, compare.lowest_pressure (line)
    integrity.max_pressure [pressure_abs] (its case in the label), integrity.rated_pressure,
    integrity.margin (gauge, the segment of least margin), integrity.wave_speed,
    integrity.surge_rise, integrity.critical_closure_time [s], integrity.crest_lowest_pressure
    (line outlets: :func:`integrity_of`; an orifice outlet gets a method note instead)

Tables: ``times`` (one row per level: start, levels of interest, target) and ``history``
(about 50 rows of time, level, volume, flow, velocity picked from the computed grid),
``compare_history`` with a ``[compare]``, and ``integrity`` for a line outlet (one row per
segment: design pressure and its case, rated pressure, margin, wave speed, Joukowsky rise,
2L/a, closure rise; :func:`integrity_rows`).

Example
-------
>>> from kit import scenario as scn
>>> text = '''
... schema = "headline-scenario/1"
... kind = "tank_drainage"
... title = "doc example"
... [liquid.user]
... name = "test liquid"
... temperature = ["10 degC", "30 degC"]
... density = ["1000 kg/m3", "1000 kg/m3"]
... viscosity = ["1 mPa*s", "1 mPa*s"]
... vapour_pressure = ["2.3 kPa", "2.3 kPa"]
... [liquid]
... temperature = "20 degC"
... [tank]
... shape = "vertical_cylinder"
... diameter = "1 m"
... length = "2 m"
... [drain]
... start_level = "2 m"
... target_level = "0 m"
... [outlet]
... type = "orifice"
... diameter = "25 mm"
... Cd = 0.61
... '''
>>> r = compute(scn.loads(text))
>>> round(r.value("drain.total_time"), 1)
1675.2
"""

from __future__ import annotations

import math
from dataclasses import dataclass, replace

import numpy as np

from kit.core.drain import (
    DRAIN_METHOD,
    ORIFICE_CD,
    SUBMERGENCE_RULE,
    DrainResult,
    OrificeOutlet,
    PipedOutlet,
    drain,
)
from kit.core.findings import cautions_for
from kit.core.friction import FRICTION_METHOD
from kit.errors import (
    InputError,
    check_range,
)
from kit.inputs.tank_drainage import (
    OUTLET_TYPES,
    SURFACES,
    TANK_SHAPES,
    DrainInputs,
    build_outlet,
    build_tank,
    drain_inputs,
    inputs,
    wrap_errors,
)
from kit.results import Alternative, Results
from kit.studies.integrity import METHODS as INTEGRITY_METHODS

__all__ = [
    "TANK_SHAPES", "SURFACES", "OUTLET_TYPES", "HOT_LIQUID_T", "DrainInputs", "Case",
    "DrainStudy", "LineRoute", "build_tank", "build_outlet", "inputs", "study", "compute",
    "drain_inputs", "resize_pipe", "results_of", "times_rows", "caution_topics",
    "SegmentScreen", "OutletIntegrity", "integrity_of", "integrity_rows", "ORIFICE_NOTE",
]

#: Above this temperature [K] the study adds a scald caution (45 °C; common practice, no
#: source — hot-water scald guidance commonly starts near 45–50 °C, from memory).
HOT_LIQUID_T = 318.15
#: History rows for the notebook chart.
_HISTORY_ROWS = 50


# ------------------------------------------------------------------------------- the study

@dataclass(frozen=True)
class Case:
    """One outlet and its drain-down."""

    label: str
    outlet: object
    result: DrainResult


@dataclass(frozen=True)
class DrainStudy:
    """The inputs, the drain-down through the outlet, and the what-if drain-down (or None)."""

    inputs: DrainInputs
    base: Case
    compare: Case | None

    @property
    def tank(self):
        return self.inputs.tank

    @property
    def state(self):
        return self.inputs.state

    @property
    def outlet(self):
        return self.base.outlet

    @property
    def result(self) -> DrainResult:
        return self.base.result


def _run(inp: DrainInputs, outlet, key: str) -> DrainResult:
    return wrap_errors(key, drain, inp.tank, outlet, inp.state, inp.start, inp.target, inp.p_surface,
                 inp.p_atm, inp.vent)


def study(sc, inp: DrainInputs | None = None) -> DrainStudy:
    """The drain-down through the scenario's outlet, and through the what-if outlet."""
    inp = inp or inputs(sc)
    base = Case("outlet", inp.outlet, _run(inp, inp.outlet, "outlet"))
    cmp = None
    if inp.compare_outlet is not None:
        cmp = Case(inp.compare_label, inp.compare_outlet,
                   _run(inp, inp.compare_outlet, "compare"))
    return DrainStudy(inp, base, cmp)


# ------------------------------------------------------- inputs from core objects (the app)

@dataclass(frozen=True)
class LineRoute:
    """The layout of an outlet line: its segments in order, to rebuild it with another pipe,
    fittings, length or fall.

    :meth:`build` keeps the segments' names and stations and scales their lengths and rises
    so that they add up to the new developed length and fall; every segment gets the same
    pipe. A fitting equal to one of the route's own keeps its segment; any other fitting goes
    into the first segment (the losses are then taken at the inlet, which gives the lowest
    pressures downstream: the conservative side for the siphon / vapour-pressure check).

    Parameters
    ----------
    name : str
    start_station : str
    segments : tuple of Segment
        The line as given (the scenario's).
    """

    name: str
    start_station: str
    segments: tuple

    @classmethod
    def of(cls, line) -> LineRoute:
        """The route of a :class:`kit.core.line.Line`."""
        return cls(line.name, line.start_station, tuple(line.segments))

    @property
    def length(self) -> float:
        """Developed length [m]."""
        return float(sum(s.length for s in self.segments))

    @property
    def fall(self) -> float:
        """Drop from the inlet to the discharge end [m] (minus the line's rise)."""
        return float(-sum(s.rise for s in self.segments))

    @property
    def pipe(self):
        """The first segment's pipe."""
        return self.segments[0].pipe

    @property
    def one_pipe(self) -> bool:
        """True when every segment has the same pipe."""
        return all(s.pipe == self.pipe for s in self.segments)

    @property
    def fittings(self) -> tuple:
        """Every segment's fittings, in order."""
        return tuple(f for s in self.segments for f in s.fittings)

    def build(self, pipe, fittings, length: float, fall: float, inlet_elevation: float,
              name: str | None = None):
        """A :class:`kit.core.line.Line` of this route with ``pipe``, ``fittings`` (tuple of
        Fitting), developed ``length`` [m] and ``fall`` [m] (inlet minus discharge
        elevation), starting at ``inlet_elevation`` [m] on the tank datum."""
        from kit.core.line import Line, Segment

        length = check_range("outlet line length", length, "m", low=0.0, high=1e6)
        fall = check_range("outlet line fall", fall, "m", low=-length, high=length,
                           low_inclusive=True)
        L0, F0 = self.length, self.fall
        k_len = 1.0 if abs(length - L0) <= 1e-12 * L0 else length / L0
        n = len(self.segments)
        if abs(fall - F0) <= 1e-12 * max(abs(F0), 1.0):
            rises = [s.rise for s in self.segments]
        elif F0 != 0.0:
            rises = [s.rise * fall / F0 for s in self.segments]
        else:
            rises = [0.0] * (n - 1) + [-fall]
        placed: list[list] = [[] for _ in range(n)]
        pool = [(i, f) for i, s in enumerate(self.segments) for f in s.fittings]
        for fit in fittings:
            for j, (i, f) in enumerate(pool):
                if f == fit:
                    placed[i].append(fit)
                    del pool[j]
                    break
            else:
                placed[0].append(fit)
        segs = tuple(Segment(s.name, pipe, s.length * k_len, rise, tuple(fs), s.end_station)
                     for s, rise, fs in zip(self.segments, rises, placed, strict=True))
        return Line(name or self.name, segs, self.start_station, inlet_elevation)


def resize_pipe(pipe, size):
    """``pipe`` at another size: a nominal size (str) of the same standard and schedule for a
    catalogue pipe, or a bore [m] (float) for a custom one; same material and condition."""
    from kit.core import pipes

    if isinstance(size, str):
        if pipe.standard is None:
            raise InputError("what-if size", size, "is a nominal size; a custom-bore pipe "
                             "takes a bore")
        return pipes.catalogue_pipe(pipe.standard, size, pipe.schedule, pipe.material,
                                    pipe.condition)
    return pipes.custom_pipe(float(size), pipe.material, pipe.condition,
                             roughness=pipe.roughness_override)


# ------------------------------------------------------- rating and water-hammer screen

#: The note reported for an orifice outlet: there is no outlet line to rate or to screen.
ORIFICE_NOTE = ("not applicable: the outlet is an orifice in the tank, with no outlet line to "
                "rate or to screen for water hammer (the tank shell and its nozzle are rated "
                "by the vessel's own code, outside this study); no figures are given")

_RUNNING = "draining, highest flow"
_STANDING = "standing column, tank full to its top, outlet valve closed"
_RECEIVER = "receiver column, outlet valve closed"
_CREST_EVENT = "outlet valve closure upstream of the crest"

#: How the outlet line is screened (the record's method line).
TANK_INTEGRITY_METHOD = (
    "Outlet line, per segment: the highest of (a) the standing column with the tank full to "
    "its top (the level datum's top, h_max) and the outlet valve closed, p_surface + rho g "
    "(h_max - z_low), at the segment's lowest point; (b) a submerged receiver's column on the "
    "closed line; (c) the running pressure at the drain's highest flow (energy equation from "
    "the tank surface); (d) that running pressure plus the closure rise of stopping the "
    "segment's initial velocity (Joukowsky rho a V at or below 2L/a, Michaud 2 rho L V / t_c "
    "above it), the closing valve taken at the segment's downstream end with the whole line "
    "from the tank upstream of it (L = developed length from the tank to that end, a = the "
    "segment's Korteweg wave speed; changes of pipe between segments are not modelled). One "
    "temperature, so one density. Siphon crest (an inner station above the lowest drain "
    "level): running pressure less rho a V over the drain, against vapour pressure (column "
    "separation), for a valve closing upstream of it. Vacuum: long-tube buckling where any "
    "station is below atmospheric at any time of the drain (Timoshenko & Gere 1961).")


@dataclass(frozen=True)
class SegmentScreen:
    """The rating and surge screen of one segment of an outlet line (SI; pressures absolute
    unless named gauge).

    Attributes
    ----------
    segment, pipe : str
        Segment name and pipe label.
    z_low : float
        Lowest elevation of the segment on the tank datum [m].
    length_to_end : float
        Developed length from the tank to the segment's downstream end [m].
    velocity : float
        Velocity in the segment at the drain's highest flow [m/s].
    running : float
        Highest running pressure at the segment's stations at that flow [Pa abs].
    screen : IntegrityScreen
        :func:`kit.studies.integrity.screen_line` of the segment.
    rho : float
        Density the screen used [kg/m³].
    """

    segment: str
    pipe: str
    z_low: float
    length_to_end: float
    velocity: float
    running: float
    screen: object
    rho: float = float("nan")

    @property
    def p_design(self) -> float:
        """Highest pressure [Pa abs] (its case: ``screen.governing``)."""
        return self.screen.p_max

    @property
    def p_rated(self) -> float:
        """Maximum allowable gauge pressure of the pipe [Pa] (NaN: not rated)."""
        r = self.screen.rating
        return float("nan") if r is None else float(r.P_allow)

    @property
    def wave_speed(self) -> float:
        return float("nan") if self.screen.wave_speed is None else float(self.screen.wave_speed)

    @property
    def joukowsky(self) -> float:
        """rho a V of stopping the segment's velocity at once [Pa] (NaN: no wave speed)."""
        return self.rho * self.wave_speed * self.velocity

    @property
    def t_critical(self) -> float:
        """2L/a [s], L from the tank to the segment's end (NaN: no wave speed)."""
        return 2.0 * self.length_to_end / self.wave_speed


@dataclass(frozen=True)
class OutletIntegrity:
    """Pressure rating and water-hammer screen of a drain's outlet line.

    ``applies`` is False for an orifice outlet (``note`` says why; no figures). ``segments``
    holds one :class:`SegmentScreen` per segment; ``crest`` is (station, elevation [m],
    running pressure [Pa abs], lowest pressure after the closure down-surge [Pa abs] or NaN)
    or None; ``vacuum`` lists (station, lowest pressure [Pa abs]) below atmospheric;
    ``level`` and ``flow`` are the drain's highest-flow point the surge is screened at.
    """

    applies: bool
    note: str
    segments: tuple = ()
    crest: tuple | None = None
    vacuum: tuple = ()
    level: float = float("nan")
    flow: float = float("nan")
    findings: tuple = ()
    p_atm: float = 101325.0

    @property
    def governing(self) -> SegmentScreen | None:
        """The segment with the least rating margin (else the highest pressure)."""
        if not self.segments:
            return None
        rated = [g for g in self.segments if math.isfinite(g.p_rated)]
        if rated:
            return min(rated, key=lambda g: g.p_rated - (g.p_design - self.p_atm))
        return max(self.segments, key=lambda g: g.p_design)


def _integrity_subject(seg) -> str:
    return f"outlet segment '{seg.name}' ({seg.pipe.label})"


def integrity_of(s: DrainStudy) -> OutletIntegrity:
    """Pressure rating and water-hammer screen of the study's outlet line, per segment.

    The method is :data:`TANK_INTEGRITY_METHOD`; each segment goes through
    :func:`kit.studies.integrity.screen_line` (ASME B31.3 / ISO plastic rating, B16.5 flange
    class, Korteweg wave speed, Joukowsky / Michaud closure rise), the siphon crest through
    :func:`kit.core.surge.surge_screen` and every station below atmospheric through
    :func:`kit.core.rating.vacuum_findings`. An orifice outlet gets ``applies=False`` and
    :data:`ORIFICE_NOTE`, no figures.

    Example
    -------
    >>> from kit.notebook import open_scenario
    >>> g = integrity_of(study(open_scenario("marlow_vale_cip_dump.toml")))
    >>> g.applies, len(g.segments), g.segments[0].screen.governing
    (True, 3, 'surge on running pressure')
    >>> round(g.segments[-1].joukowsky / 1e5, 1)   # rho a V of the initial drain [bar]
    55.7
    """
    from kit.core import rating as rt
    from kit.core import surge as sg
    from kit.core.constants import G
    from kit.core.drain import station_pressures
    from kit.core.findings import Finding, Severity
    from kit.errors import HeadlineError
    from kit.studies.integrity import screen_line

    inp, outlet, res = s.inputs, s.outlet, s.result
    if not isinstance(outlet, PipedOutlet):
        return OutletIntegrity(False, ORIFICE_NOTE)
    segs = tuple(getattr(outlet.line, "segments", ()) or ())
    if not segs:
        return OutletIntegrity(False, "not screened: the outlet line has no segments (no pipe "
                                      "to rate)")
    opts, state, p_atm = inp.integrity, inp.state, inp.p_atm
    rho, T, pv = state.rho, state.T, state.pv
    z = outlet.inlet_elevation + np.concatenate([[0.0], np.cumsum([g.rise for g in segs])])
    names = [getattr(outlet.line, "start_station", "start")] + [g.station for g in segs]
    ends = np.cumsum([g.length for g in segs])
    p_end = outlet.receiver_pressure if outlet.receiver_pressure is not None else p_atm
    # the drain's highest-flow point: the velocity the closure stops
    i = int(np.argmax(res.flow)) if res.flow.size else 0
    h_run = float(res.level[i]) if res.level.size else inp.start
    Q_run = float(res.flow[i]) if res.flow.size else 0.0

    def _pressures(levels, flows):
        P = station_pressures(outlet, state, levels, flows, inp.p_surface)
        if outlet.free:  # the jet's end station is at the receiver pressure
            P = np.vstack([P, np.full((1, P.shape[1]), p_end)])
        return P

    P_run = _pressures([h_run], [Q_run])[:, 0]
    P_all = _pressures(res.level, res.flow) if res.level.size else P_run[:, None]
    P_low = P_all.min(axis=1)
    h_full = inp.tank.h_max
    findings: list = []
    rows = []
    # the siphon crest: an inner station above the lowest level of the drain
    inner = list(range(1, len(segs)))
    k_top = max(inner, key=lambda j: z[j]) if inner else None
    crest = None
    if k_top is not None and z[k_top] > float(res.level[-1] if res.level.size else inp.target):
        crest = k_top
    for k, seg in enumerate(segs):
        z_low = float(min(z[k], z[k + 1]))
        other = {}
        if not outlet.free:
            other[_RECEIVER] = p_end + rho * G * (outlet.receiver_level - z_low)
        V = Q_run / seg.pipe.area
        p_run = float(max(P_run[k], P_run[k + 1], 1.0))
        scr = screen_line(
            _integrity_subject(seg), seg.pipe, inp.liquid, T, p_atm, pv,
            length=float(ends[k]), velocity=V, running_pressure=p_run, opts=opts,
            standing=(h_full - z_low, inp.p_surface), rho=rho, other_cases=other,
            running_label=_RUNNING, standing_label=_STANDING, closure_note=(k == len(segs) - 1))
        rows.append(SegmentScreen(seg.name, seg.pipe.label, z_low, float(ends[k]), V, p_run, scr,
                                  rho))
        findings += list(scr.findings)
        # vacuum: any of the segment's stations below atmospheric at any time of the drain
        below = [(names[j], max(float(P_low[j]), 0.0)) for j in (k, k + 1)
                 if P_low[j] < p_atm]
        if below:
            try:
                findings += rt.vacuum_findings(_integrity_subject(seg), seg.pipe, below,
                                               p_atm=p_atm)
            except HeadlineError as exc:
                findings.append(Finding(
                    Severity.CHECK, _integrity_subject(seg), "vacuum (external pressure)",
                    float("nan"), "-", "screened", f"not screened: {exc}",
                    "kit.studies.integrity"))
    vac = tuple((names[j], float(P_low[j])) for j in range(len(names)) if P_low[j] < p_atm)
    crest_row = None
    if crest is not None:
        seg = segs[crest - 1]   # the segment rising to the crest
        a = rows[crest - 1].wave_speed
        name = names[crest]
        if not math.isfinite(a) or pv is None:
            why = ("no wave speed for its pipe (see the segment's findings)" if pv is not None
                   else "the liquid has no vapour-pressure model: give one")
            findings.append(Finding(
                Severity.CHECK, _integrity_subject(seg), f"column separation at '{name}'",
                float("nan"), "-", "screened", f"not screened: {why}",
                "kit.studies.integrity"))
            crest_row = (name, float(z[crest]), float(P_run[crest]), float("nan"))
        else:
            # the worst time of the drain: crest pressure less rho a V at each level
            # (a liquid is never below its vapour pressure: a crest computed lower, as where
            # the siphon cannot run, is taken at it, and any drop then parts the column)
            V_t = res.flow / seg.pipe.area
            p_c = np.maximum(P_all[crest], pv)
            after = p_c - rho * a * V_t
            j = int(np.argmin(after))
            scr = sg.surge_screen(_integrity_subject(seg), rho, a, float(ends[crest - 1]),
                                  float(V_t[j]), max(float(p_c[j]), 1.0),
                                  trip_stations=[(name, max(float(p_c[j]), 1.0))],
                                  pv=pv, p_atm=p_atm, event=_CREST_EVENT)
            findings += list(scr.findings)
            crest_row = (name, float(z[crest]), float(p_c[j]), float(after[j]))
    return OutletIntegrity(True, "", tuple(rows), crest_row, vac, h_run, Q_run,
                           tuple(findings), p_atm)


def integrity_rows(g: OutletIntegrity, p_atm: float) -> list[dict]:
    """One row per segment (SI): design pressure [Pa abs] and its case, rated pressure and
    margin [Pa gauge], wave speed [m/s], Joukowsky rise [Pa], 2L/a [s], closure rise [Pa]
    and its regime, and the segment's verdict."""
    out = []
    for r in g.segments:
        scr = r.screen
        out.append({
            "segment": r.segment, "pipe": r.pipe, "z_low": r.z_low,
            "design_pressure": r.p_design, "design_gauge": r.p_design - p_atm,
            "governing": scr.governing, "rated_pressure": r.p_rated,
            "margin": r.p_rated - (r.p_design - p_atm), "velocity": r.velocity,
            "wave_speed": r.wave_speed, "joukowsky_rise": r.joukowsky,
            "t_critical": r.t_critical,
            "surge_rise": float("nan") if scr.surge_rise is None else scr.surge_rise,
            "regime": scr.surge_regime or "", "verdict": scr.verdict})
    return out


# ---------------------------------------------------------------------------- results

def _bore(outlet) -> float:
    return outlet.diameter if isinstance(outlet, OrificeOutlet) else outlet.exit_diameter


def _history(res: DrainResult) -> list[dict]:
    """About 50 rows of the computed grid, spread evenly in time (first and last kept)."""
    n = len(res.time)
    if n <= _HISTORY_ROWS:
        idx = np.arange(n)
    else:
        want = np.linspace(0.0, float(res.time[-1]), _HISTORY_ROWS)
        idx = np.unique(np.clip(np.searchsorted(res.time, want), 0, n - 1))
        idx = np.unique(np.concatenate([[0], idx, [n - 1]]))
    return [{"time": float(res.time[i]), "level": float(res.level[i]),
             "volume": float(res.volume[i]), "flow": float(res.flow[i]),
             "velocity": float(res.velocity[i])} for i in idx]


def _time_to(res: DrainResult, z: float) -> float:
    return res.time_to([z])[float(z)]


def compute(sc) -> Results:
    """The tank-drainage results of a scenario (values, findings, methods, cautions, tables)."""
    return results_of(study(sc), sc.doc)


def times_rows(s: DrainStudy) -> list[dict]:
    """One row per level (start, levels of interest, target): label, level [m], volume
    remaining [m³], time [s] through the outlet, and ``compare_time`` [s] with a what-if
    (``inf`` below a level where outflow stops)."""
    inp, c = s.inputs, s.compare
    rows = []
    for label, z in [("start", inp.start), *inp.levels, ("target", inp.target)]:
        row = {"label": label, "level": z, "volume_remaining": inp.tank.volume(z),
               "time": _time_to(s.result, z)}
        if c is not None:
            row["compare_time"] = _time_to(c.result, z)
        rows.append(row)
    return rows


def caution_topics(inp: DrainInputs) -> tuple:
    """Keys of :data:`kit.core.findings.CAUTIONS` that apply to these inputs."""
    topics = ["drain", "vacuum"]
    if isinstance(inp.outlet, PipedOutlet):
        topics += ["pressure", "water_hammer"]
    if getattr(inp.state, "flammable", False):
        topics.append("flammable")
    return tuple(topics)


def results_of(s: DrainStudy, doc: dict | None = None) -> Results:
    """The :class:`~kit.results.Results` of a drain study (what :func:`compute` reports).

    ``doc`` is the scenario document, used only to say where the barometric pressure came
    from; the notebook's app passes None for a study built from its panels.
    """
    inp, res = s.inputs, s.result
    tank, state = inp.tank, inp.state
    r = Results("tank_drainage")
    r.add("tank.total_volume", f"'{tank.name}': volume when full", tank.V_total, "volume")
    r.add("tank.height", f"'{tank.name}': height of the level datum to the top", tank.h_max,
          "length")
    r.add("liquid.density", "density", state.rho, "density")
    r.add("liquid.viscosity", "viscosity", state.mu, "viscosity")
    if state.pv is not None:
        r.add("liquid.vapour_pressure", "vapour pressure", state.pv, "pressure_abs")
    r.add("drain.start_level", "start level", inp.start, "elevation")
    r.add("drain.target_level", "target level", inp.target, "elevation")
    end = float(res.level[-1])
    r.add("drain.end_level", "level at the end of the drain" + ("" if res.reached else
          " (outflow stops)"), end, "elevation")
    drained = float(res.volume[0] - res.volume[-1])
    r.add("drain.volume_drained", "volume drained", drained, "volume")
    note = getattr(res, "time_note", "") or ""
    r.add("drain.total_time", ("time to the target level" if res.reached else
          "time to the level where outflow stops") + (f" ({note})" if note else ""),
          res.total_time, "time")
    for label, z in inp.levels:
        r.add(f"drain.time_to.{label}", f"time to level {label}", _time_to(res, z), "time")
    r.add("drain.peak_flow", "peak outflow", res.peak_flow, "flow")
    r.add("drain.mean_flow", "mean outflow", drained / res.total_time if res.total_time > 0
          else 0.0, "flow")
    r.add("drain.peak_velocity", f"peak velocity in the outlet bore ({_bore(s.outlet) * 1e3:.4g} "
          "mm)", float(res.velocity.max()) if res.velocity.size else 0.0, "velocity")
    piped = isinstance(s.outlet, PipedOutlet)
    if piped and math.isfinite(res.lowest_pressure):
        r.add("drain.lowest_pressure", f"lowest pressure in the line ({res.lowest_station})",
              res.lowest_pressure, "pressure_abs")
    r.findings += list(res.findings)

    c = s.compare
    if c is not None:
        cr = c.result
        cnote = getattr(cr, "time_note", "") or ""
        r.add("compare.total_time", (f"{c.label}: time to the target level" if cr.reached else
              f"{c.label}: time to the level where outflow stops")
              + (f" ({cnote})" if cnote else ""), cr.total_time, "time")
        for label, z in inp.levels:
            r.add(f"compare.time_to.{label}", f"{c.label}: time to level {label}",
                  _time_to(cr, z), "time")
        r.add("compare.peak_flow", f"{c.label}: peak outflow", cr.peak_flow, "flow")
        r.add("compare.peak_velocity", f"{c.label}: peak velocity in the outlet bore "
              f"({_bore(c.outlet) * 1e3:.4g} mm)",
              float(cr.velocity.max()) if cr.velocity.size else 0.0, "velocity")
        r.add("compare.time_saved", f"{c.label}: time saved against the outlet as given",
              res.total_time - cr.total_time, "time")
        if piped and math.isfinite(cr.lowest_pressure):
            r.add("compare.lowest_pressure", f"{c.label}: lowest pressure in the line "
                  f"({cr.lowest_station})", cr.lowest_pressure, "pressure_abs")
        # the what-if's findings, each subject naming the what-if (the vent's does not)
        r.findings += [f if c.label in f.subject else replace(f, subject=f"{f.subject} ({c.label})")
                       for f in cr.findings]
        from kit.core.findings import worst

        r.alternatives.append(Alternative(f"what-if: {c.label}", "shown for comparison",
                                          worst(cr.findings).value if cr.findings else None,
                                          subjects=(f"({c.label})", c.label)))
    r.selected = f"outlet: {s.outlet.name}"
    g = integrity_of(s)
    _report_integrity(r, g, inp)

    # tables
    r.tables["times"] = times_rows(s)
    r.tables["history"] = _history(res)
    if c is not None:
        r.tables["compare_history"] = _history(c.result)
    r.tables["outlets"] = [{"case": "as given", "outlet": s.outlet.name,
                            "bore": _bore(s.outlet)}] + (
        [{"case": c.label, "outlet": c.outlet.name, "bore": _bore(c.outlet)}] if c else [])

    # methods
    r.method("Tank geometry", _tank_reference(tank))
    if isinstance(s.outlet, OrificeOutlet):
        r.method("Orifice outflow", "Q = Cd·A·sqrt(2 g ΔH): " + DRAIN_METHOD["references"][0]
                 + f" Cd {s.outlet.Cd:g}; coefficients: {_cd_source(s.outlet.Cd)}")
    else:
        r.method("Outlet line losses", FRICTION_METHOD["name"] + ". "
                 + " ".join(FRICTION_METHOD["references"]))
        r.method("Fitting losses", _fitting_reference(s.outlet, c.outlet if c else None))
    r.method("Drain time", DRAIN_METHOD["name"] + "; " + DRAIN_METHOD["accuracy"]
             + f"; quadrature error estimate {res.time_error:.3g} s")
    r.method("Vortex screening", f"{SUBMERGENCE_RULE['name']}: {SUBMERGENCE_RULE['source']}")
    if inp.vent is not None:
        r.method("Vent capacity", "orifice equation ΔP = ρ_air/2·(Q/(Cd·A))², air inflow equal "
                 "to the peak liquid outflow")
    r.method("Liquid properties", "; ".join(f"{k}: {v}" for k, v in state.sources.items()))
    if doc is not None and "barometric_pressure" not in doc.get("site", {}):
        r.method("Barometric pressure", "U.S. Standard Atmosphere 1976")

    # cautions: the standing ones for drains, then the result's own, without repeats
    cautions = cautions_for(*[t for t in caution_topics(inp) if t != "flammable"])
    for case in (s.base, c):
        if case is not None:
            cautions += [t for t in case.result.cautions if t not in cautions]
    if getattr(state, "flammable", False) and cautions_for("flammable")[1] not in cautions:
        cautions += cautions_for("flammable")[1:]
    if state.T >= HOT_LIQUID_T:
        cautions.append(
            f"The liquid is hot ({state.T - 273.15:.0f} °C): a drain to an open gully or floor "
            "can scald people nearby and give off vapour; guard the discharge point and keep "
            "people clear while the tank drains. Cleaning solutions may also be corrosive. "
            "Local codes and licensed professional practice govern (common practice, no "
            "source).")
    r.cautions = cautions
    return r


def _report_integrity(r: Results, g: OutletIntegrity, inp: DrainInputs) -> None:
    """Values, table, findings and methods of the outlet line's rating and surge screen."""
    from kit.inputs.common import IntegrityOptions

    name = "Pressure rating and water-hammer screen"
    if not g.applies:
        unused = ("" if inp.integrity == IntegrityOptions() else
                  "; the [integrity] options given are not used")
        r.method(name, g.note + unused)
        return
    p_atm = inp.p_atm
    segs = g.segments
    top = max(segs, key=lambda x: x.p_design)
    r.add("integrity.max_pressure", f"outlet line: highest pressure ({top.screen.governing})",
          top.p_design, "pressure_abs")
    gov = g.governing
    if math.isfinite(gov.p_rated):
        r.add("integrity.rated_pressure", "outlet line: maximum allowable pressure (gauge)",
              gov.p_rated, "pressure_difference")
        r.add("integrity.margin", "outlet line: least rating margin",
              gov.p_rated - (gov.p_design - p_atm), "pressure_difference")
    surged = [x for x in segs if x.screen.surge_rise is not None]
    if surged:
        big = max(surged, key=lambda x: x.screen.surge_rise)
        given = inp.integrity is not None and inp.integrity.wave_speed is not None
        r.add("integrity.wave_speed", "outlet line: wave speed "
              f"({'given' if given else 'Korteweg'})", big.wave_speed, "velocity")
        r.add("integrity.surge_rise", f"outlet line: valve-closure surge rise "
              f"({big.screen.surge_regime})", big.screen.surge_rise, "pressure_difference")
        last = segs[-1]
        if math.isfinite(last.wave_speed):
            r.add("integrity.critical_closure_time", "outlet line: 2L/a, whole line",
                  last.t_critical, "time_short")
    if g.crest is not None and math.isfinite(g.crest[3]):
        pv = inp.state.pv
        r.add("integrity.crest_lowest_pressure", f"siphon crest '{g.crest[0]}': pressure "
              "after closure down-surge", max(g.crest[3], pv), "pressure_abs")
    r.tables["integrity"] = integrity_rows(g, p_atm)
    r.findings += list(g.findings)
    for m, text_ in INTEGRITY_METHODS:
        r.method(m, text_)
    cmp = inp.compare_outlet
    r.method("Outlet line: highest pressure and surge", TANK_INTEGRITY_METHOD + (
        " The what-if line is not screened: screen it by making it the outlet."
        if isinstance(cmp, PipedOutlet) else ""))
    if g.vacuum:
        r.method("Vacuum screen", "elastic buckling of a long unsupported tube, Timoshenko & "
                 "Gere (1961), Theory of Elastic Stability, with a safety factor "
                 "(kit.core.rating.VACUUM_SAFETY_FACTOR), where a station is below "
                 "atmospheric during the drain")


def _tank_reference(tank) -> str:
    from kit.core.tank import TANK_METHODS

    if tank.shape == "table":
        return ("strapping table: " + TANK_METHODS["table"] + "; Fritsch, F. N., Carlson, R. E. "
                "(1980). Monotone piecewise cubic interpolation. SIAM J. Numer. Anal. 17(2), "
                "238–246. doi:10.1137/0717021")
    return (f"{tank.description}: " + TANK_METHODS["volume"] + "; level: " + TANK_METHODS["level"]
            + ". Jones, D. (2003). Compute fluid volumes in vertical tanks. Chemical Processing, "
            "Dec. 18, 2003. Bell, C. and contributors, fluids: fluid dynamics component of the "
            "Chemical Engineering Design Library (ChEDL), fluids.geometry.TANK")


def _cd_source(Cd: float) -> str:
    for entry in ORIFICE_CD.values():
        if abs(entry.Cd - Cd) < 1e-12:
            return f"{entry.label}, {entry.source}"
    return "user-given"


def _fitting_reference(*outlets) -> str:
    kinds = []
    for o in outlets:
        for seg in (o.line.segments if o is not None else ()):
            kinds += [f.kind for f in seg.fittings if f.kind not in kinds]
    if not kinds:
        return "no fittings listed"
    from kit.core.fittings import FITTING_KINDS

    out = []
    for k in kinds:
        src = getattr(FITTING_KINDS.get(k), "source", "")
        out.append(f"{k}: {src}" if src else k)
    return "K-factor method, each K referred to the bore of its segment; " + "; ".join(out)
