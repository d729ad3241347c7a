"""Pump selection study: candidate pumps against the system band of a scenario.

For each candidate pump (or set of pumps in parallel or series) and every condition of the
system band — static head (min / max) × liquid temperature (min / max) × pipe (new / aged) —
the operating point is found where the pump curve meets the system curve (Brent 1973, via
:func:`kit.core.operating.operating_point`); at each point NPSH available is compared with
NPSH required (ANSI/HI 9.6.1 margins, from memory), and the flow with the pump's
best-efficiency flow (ANSI/HI 9.6.3 preferred operating region, from memory). The motor is
sized for the largest shaft power over the band (:func:`kit.core.motors.select_motor`) and
checked against the power at the end of the datasheet curve (run-out); annual energy and cost
use the mean input power over the band's conditions (an even spread of time is assumed). For
the recommended pump, throttling and speed control are compared at the required flow on the
band's highest system curve (:func:`kit.core.operating.compare_control`).

Scenario keys of this kind (besides the common ones of :mod:`kit.scenario`)::

    [duty]       flow = "150 m3/h"  (required at every condition)
                 npsh_application = "water_wastewater"   (key of NPSH_MARGINS)
    [operation]  hours_per_year = "4000 h", tariff = 0.16, currency = "EUR",
                 motor_series = "IEC"
    [[pumps]]    name, speed = "1480 rpm", impeller = "315 mm", arrangement = "single",
                 count = 1, flow = [...], head = [...], efficiency = [...], npshr = [...],
                 run_speed = "1400 rpm" (optional), trim = "300 mm" (optional)

Example
-------
>>> from kit.notebook import scenario_path
>>> from kit import scenario as scn
>>> s = study(scn.load(scenario_path("kestrel_ridge_booster.toml")))
>>> len(s.pumps), len(s.band.conditions)
(3, 8)
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from kit.core.findings import Finding, Severity, cautions_for, worst
from kit.core.friction import FRICTION_METHOD
from kit.errors import HeadlineError, InputError, NoSolutionError
from kit.inputs.pump_selection import (
    ARRANGEMENTS,
    PUMP_KEYS,
    PumpInputs,
    build_pump,
    build_pumps,
    read,
)
from kit.results import Alternative, Results
from kit.studies.integrity import METHODS as INTEGRITY_METHODS

__all__ = [
    "ARRANGEMENTS", "PUMP_KEYS", "GRID_POINTS", "POLISH_TOL", "PumpStudy", "build_pumps",
    "build_pump", "study", "preview", "PumpPreview", "pump_key", "compute", "control_condition",
    "findings_summary", "results_of",
]

def control_condition(system, Q_req: float, heads=None):
    """The band condition with the highest system head at the required flow.

    Speed control and throttling are compared on it: the pump must meet the duty there, and
    the saving found on it is the least over the band (conservative). ``heads``: label ->
    the condition's system head callable (default the exact curve).
    """
    conds = system.conditions()
    if heads is None:
        heads = [float(system.curve(np.array([Q_req]), c)[0]) for c in conds]
    else:
        heads = [float(heads[c.label](np.array([Q_req]))[0]) for c in conds]
    return conds[int(np.argmax(heads))]


@dataclass
class PumpStudy:
    """Everything the notebook draws: the band, and per pump its points and summary.

    Dicts are keyed by pump name. ``points[name][i]`` is the
    :class:`kit.core.operating.OperatingPoint` at ``band.conditions[i]`` (None where none).
    ``energy[name]`` is ``(kWh per year, cost per year, mean input power [W])`` or None.
    """

    system: object
    Q: np.ndarray
    band: object
    pumps: list
    points: dict
    errors: dict
    motors: dict
    energy: dict
    control: object
    control_label: str | None
    recommended: str | None
    verdicts: dict
    required_flow: float | None
    findings: dict = field(default_factory=dict)
    npsha: np.ndarray | None = None     # (conditions, flows) NPSH available [m]
    hours: float = 0.0
    tariff: float = 0.0
    currency: str = ""
    application: str = "general"
    #: the recommended pump's suction and discharge profiles at each band condition
    profiles: list = field(default_factory=list)
    #: the discharge line's pressure rating and water-hammer screen (recommended pump)
    integrity: object = None
    #: pump name -> PumpDutyEnergy at the required duty, throttled (same volume for all)
    duty_energy: dict = field(default_factory=dict)
    duty_energy_text: str = ""
    #: the set, staging, load-profile energy, minimum flow and viscosity study
    #: (:class:`kit.studies.pump_duties.DutiesStudy`), None when the scenario asks for none
    duties: object = None

    def pump(self, name: str):
        return next(p for p in self.pumps if p.name == name)

    def good(self, name: str) -> list:
        return [p for p in self.points[name] if p is not None]

    def candidate_rows(self) -> list[dict]:
        """One row per pump for the comparison table (SI values, text where text)."""
        rows = []
        for pump in self.pumps:
            n = pump.name
            good = self.good(n)
            row = {"pump": n, "verdict": self.verdicts[n],
                   "arrangement": getattr(pump, "arrangement", "single")}
            if good:
                qs = [p.Q for p in good]
                hs = [p.H for p in good]
                effs = [p.efficiency for p in good if np.isfinite(p.efficiency)]
                margins = [p.npsha - p.npshr for p in good if np.isfinite(p.npshr)
                           and np.isfinite(p.npsha)]
                bep = [p.bep_fraction for p in good if np.isfinite(p.bep_fraction)]
                powers = [p.shaft_power for p in good if np.isfinite(p.shaft_power)]
                row.update(Q_min=min(qs), Q_max=max(qs), H_min=min(hs), H_max=max(hs),
                           eta_min=min(effs, default=None), eta_max=max(effs, default=None),
                           bep_min=min(bep, default=None), bep_max=max(bep, default=None),
                           npsh_margin=min(margins, default=None),
                           power_max=max(powers, default=None))
            m = self.motors.get(n)
            row["motor"] = m.rating if m else None
            e = self.energy.get(n)
            if e:
                row["energy_kWh"], row["cost"], row["input_power"] = e
                row["cost_text"] = f"{self.currency} {e[1]:,.0f}".strip()
            row["findings"] = findings_summary(self.findings[n])
            rows.append(row)
        return rows

    def point_rows(self) -> list[dict]:
        """One row per pump and band condition (SI values)."""
        rows = []
        for pump in self.pumps:
            for cond, p in zip(self.band.conditions, self.points[pump.name], strict=True):
                row = {"pump": pump.name, "condition": cond.label}
                if p is None:
                    row["note"] = dict(self.errors[pump.name]).get(cond.label, "no point")
                else:
                    row.update(Q=p.Q, H=p.H, eta=p.efficiency, npsha=p.npsha, npshr=p.npshr,
                               margin=p.npsha - p.npshr, power=p.shaft_power,
                               bep=p.bep_fraction,
                               note=worst(p.findings).value)
                rows.append(row)
        return rows


def findings_summary(findings) -> str:
    """Non-passing findings grouped by quantity, worst first: 'FAIL NPSH margin (4 ×); ...'.

    >>> findings_summary([])
    'all checks pass'
    """
    groups: dict[str, list] = {}
    for f in findings:
        if f.severity == Severity.PASS:
            continue
        q = "NPSH margin" if f.quantity.startswith("NPSH margin") else f.quantity
        groups.setdefault(q, []).append(f)
    parts = []
    for q, fs in groups.items():
        sev = worst(fs)
        subjects = {f.subject for f in fs if f.severity == sev}
        parts.append((sev.rank, f"{sev.value.upper()} {q} ({len(subjects)} ×)"))
    parts.sort(key=lambda t: -t[0])
    return "; ".join(p for _, p in parts) or "all checks pass"


#: Flows on which the band is evaluated exactly before interpolation [-].
GRID_POINTS = 241
#: Largest miss of the spline against the exact curve at a point taken without polishing [m].
POLISH_TOL = 1e-9


class _Curves:
    """System head and NPSH available of one band condition, exact on a grid, splined between.

    The system curve is smooth above the laminar/turbulent transition, so a cubic spline
    through exact values on :data:`GRID_POINTS` flows (scipy ``CubicSpline``, not-a-knot;
    de Boor 1978, *A Practical Guide to Splines*) is within ~1e-9 m of the exact curve near an
    operating point. Each point found on the spline is checked against the exact curve and
    polished where it misses (see :func:`_points`), so the reported point is the exact
    intersection to ~1e-9 m of head.
    """

    def __init__(self, Q, H, npsha):
        from scipy.interpolate import CubicSpline

        self.Q = Q
        self.H = H
        self.npsha_grid = npsha
        self._h = CubicSpline(Q, H)
        self._n = CubicSpline(Q, npsha)

    def head(self, q, shift: float = 0.0):
        q = np.asarray(q, dtype=float)
        return self._h(np.clip(q, 0.0, self.Q[-1])) + shift

    def npsha(self, q):
        q = np.asarray(q, dtype=float)
        return self._n(np.clip(q, 0.0, self.Q[-1]))


def _curves(system, band) -> list:
    """One :class:`_Curves` per band condition (the band's exact grid values)."""
    return [_Curves(band.Q, band.H[i], system.npsh_available(band.Q, c))
            for i, c in enumerate(band.conditions)]


class _Heads:
    """The exact system head of one band condition, remembered per flow array.

    Every candidate asks for the head at the same required flow (the duty energy, the
    control comparison, the control condition): the exact curve is evaluated once per
    distinct flow array (its bytes are the key, so the value is exact, never interpolated).
    At most :data:`_HEADS_MEMO` flow arrays are kept; then the memo starts again.
    """

    def __init__(self, system, condition):
        self.system, self.condition, self.memo = system, condition, {}

    def __call__(self, q):
        q = np.asarray(q, dtype=float)
        key = (q.shape, q.tobytes())
        out = self.memo.get(key)
        if out is None:
            if len(self.memo) >= _HEADS_MEMO:
                self.memo.clear()
            out = self.memo[key] = np.asarray(self.system.curve(q, self.condition), dtype=float)
            out.flags.writeable = False
        return out


#: Flow arrays remembered per condition by :class:`_Heads`.
_HEADS_MEMO = 64


class _SystemPart:
    """What a study computes from the system alone, kept for the next study of the same
    system (an edit of a pump datasheet leaves the system as it was): the system object,
    the band and its splines per grid top flow, and each condition's exact heads."""

    def __init__(self, system):
        self.system = system
        self.grids: dict = {}
        self.points: dict = {}     # operating points per pump (see _points)
        self.heads = {c.label: _Heads(system, c) for c in system.conditions()}

    def band(self, q_top: float):
        """(band, curves, npsha grid) on :data:`GRID_POINTS` flows from 0 to ``q_top``."""
        hit = self.grids.get(q_top)
        if hit is None:
            if len(self.grids) >= 4:
                self.grids.clear()
            Q = np.linspace(0.0, q_top, GRID_POINTS)
            band = self.system.band(Q)
            curves = _curves(self.system, band)
            hit = self.grids[q_top] = (band, curves,
                                       np.stack([c.npsha_grid for c in curves]))
        return hit


#: Recent systems: key -> _SystemPart (most recent last), at most _SYSTEM_PARTS_SIZE.
_SYSTEM_PARTS: dict = {}
_SYSTEM_PARTS_SIZE = 8


def _system_part(sc, system) -> _SystemPart:
    """The :class:`_SystemPart` of ``system``, shared with earlier studies of a scenario
    whose document is the same apart from its ``[[pumps]]`` (the system is built from the
    other tables only: site, liquid, temperatures, source, destination, lines, pump
    elevation); a fresh one when the scenario is given as typed inputs."""
    import json

    from kit.scenario import Scenario

    if not isinstance(sc, Scenario):
        return _SystemPart(system)
    doc = {k: v for k, v in sc.doc.items() if k != "pumps"}
    key = (json.dumps(doc, sort_keys=True, default=repr), str(sc.source))
    part = _SYSTEM_PARTS.pop(key, None)
    if part is None:
        part = _SystemPart(system)
        while len(_SYSTEM_PARTS) >= _SYSTEM_PARTS_SIZE:
            _SYSTEM_PARTS.pop(next(iter(_SYSTEM_PARTS)))
    _SYSTEM_PARTS[key] = part
    return part


def pump_key(p):
    """What defines a pump curve or set, as a hashable tuple (None: a kind not keyed here, so
    never taken from a cache): the datasheet arrays, speeds, diameters, test density, head
    tolerance, fit degrees and scaling findings; a set's arrangement and members.

    >>> from kit.core.pump import PumpCurve
    >>> a = PumpCurve([0, 0.01, 0.02], [30.0, 28.0, 22.0], speed_rpm=1450, diameter=0.2)
    >>> b = PumpCurve([0, 0.01, 0.02], [30.0, 28.0, 22.0], speed_rpm=1450, diameter=0.2)
    >>> pump_key(a) == pump_key(b), pump_key(a) == pump_key(a.at_speed(1400))
    (True, False)
    """
    from kit.core.pump import PumpCurve, PumpSet

    members = getattr(p, "pumps", None)
    if isinstance(p, PumpSet):
        keys = tuple(pump_key(m) for m in members)
        return None if None in keys else ("set", p.name, p.arrangement, keys)
    if not isinstance(p, PumpCurve):
        return None
    arrays = tuple(None if a is None else np.asarray(a, dtype=float).tobytes()
                   for a in (p.flow, p.head_points, p.efficiency_points, p.npshr_points,
                             p.power_points))
    return ("curve", p.name, arrays, p.speed_rpm, p.diameter, p.datasheet_speed_rpm,
            p.datasheet_diameter, p.test_density, p.head_rise_tolerance,
            tuple(sorted(p.degrees.items())), repr(p.scaling_findings))


#: Pumps' operating points kept per system part (pump key, grid top, application).
_POINTS_MEMO = 48


def _points(system, pumps, band, curves, application, memo=None) -> tuple[dict, dict]:
    """Operating points of every pump over the band's conditions, and the errors.

    Per condition: every pump's point on the splined curves, then one exact evaluation of the
    system curve and NPSHa at those flows (one vectorized call for all pumps); where the spline
    misses the exact values by more than :data:`POLISH_TOL`, the point is found again on the
    spline shifted by the difference there. ``memo`` (a dict kept with the system's band):
    the points of a pump found before on this band are taken from it (an edit of one
    candidate leaves the others' points as they were).
    """
    from kit.core.operating import operating_point

    points = {p.name: [None] * len(band.conditions) for p in pumps}
    errors = {p.name: [] for p in pumps}
    keys = {}
    todo = list(pumps)
    if memo is not None:
        todo = []
        for p in pumps:
            k = pump_key(p)
            hit = memo.get((k, float(band.Q[-1]), application)) if k is not None else None
            if hit is None:
                todo.append(p)
                keys[p.name] = k
            else:
                points[p.name], errors[p.name] = list(hit[0]), list(hit[1])
    for i, cond in enumerate(band.conditions):
        rho = system.state(cond.T).rho
        cv = curves[i]
        first = {}
        for pump in todo:
            if pump.q_end > band.Q[-1] * (1 + 1e-12):
                raise InputError("band grid", band.Q[-1], "must reach every pump's last "
                                 "datasheet flow", "m³/s")
            try:
                first[pump.name] = operating_point(
                    pump, cv.head, rho=rho, npsha=cv.npsha, label=cond.label,
                    npsh_application=application)
            except NoSolutionError as exc:
                errors[pump.name].append((cond.label, exc.reason))
        if not first:
            continue
        names = list(first)
        q0 = np.array([first[n].Q for n in names])
        exact_h = system.curve(q0, cond)
        exact_n = system.npsh_available(q0, cond)
        for j, name in enumerate(names):
            dh = float(exact_h[j] - cv.head(q0[j]))
            dn = float(exact_n[j] - cv.npsha(q0[j]))
            if abs(dh) <= POLISH_TOL and abs(dn) <= POLISH_TOL:
                points[name][i] = first[name]  # the spline is the exact curve there
                continue
            pump = next(p for p in pumps if p.name == name)
            points[name][i] = operating_point(
                pump, lambda q, _d=dh, _c=cv: _c.head(q, _d), rho=rho,
                npsha=lambda q, _d=dn, _c=cv: _c.npsha(q) + _d, label=cond.label,
                npsh_application=application)
    if memo is not None:
        for p in todo:
            if keys.get(p.name) is not None:
                if len(memo) >= _POINTS_MEMO:
                    memo.clear()
                memo[(keys[p.name], float(band.Q[-1]), application)] = (
                    tuple(points[p.name]), tuple(errors[p.name]))
    return points, errors


@dataclass
class PumpPreview:
    """The first part of a study: the band and every candidate's operating points on it,
    what the pump chart draws (:func:`preview`); :func:`study` finishes it (``preview=``)."""

    system: object
    band: object
    pumps: list
    points: dict
    errors: dict
    required_flow: float | None
    npsha: np.ndarray
    viscous: list
    water: list
    curves: list
    q_top: float

    def good(self, name: str) -> list:
        return [p for p in self.points[name] if p is not None]


def preview(sc, pumps=None) -> PumpPreview:
    """The band and the candidates' operating points on it (the start of :func:`study`,
    same methods): enough to draw the pump chart before the rest of the study is done.

    >>> from kit.notebook import scenario_path
    >>> from kit import scenario as scn
    >>> sc = scn.load(scenario_path("kestrel_ridge_booster.toml"))
    >>> pv = preview(sc)
    >>> s = study(sc, preview=pv)
    >>> all(s.points[n] == pv.points[n] for n in s.points)
    True
    """
    inp = sc if isinstance(sc, PumpInputs) else read(sc)
    part = _system_part(sc, inp.system)
    system = part.system
    pumps = list(pumps) if pumps is not None else list(inp.pumps)
    from kit.studies.pump_duties import viscous_pumps

    pumps, viscous, water = viscous_pumps(system, pumps, inp.duties)
    q_top = max(p.q_end for p in pumps)
    band, curves, npsha_grid = part.band(q_top)
    points, errors = _points(system, pumps, band, curves, inp.npsh_application, part.points)
    return PumpPreview(system, band, pumps, points, errors, inp.required_flow, npsha_grid,
                       viscous, water, curves, q_top)


def study(sc, pumps=None, system=None, preview=None) -> PumpStudy:
    """Operating points of every pump over the system band, NPSH, BEP, motor and energy.

    Parameters
    ----------
    sc : kit.scenario.Scenario or kit.inputs.pump_selection.PumpInputs
        A ``pump_selection`` scenario, or its typed inputs [-]
    pumps : list of PumpCurve or PumpSet, optional
        Candidates; default those of ``[[pumps]]`` [-]
    system : kit.core.system.System, optional
        Default the scenario's [-]
    preview : PumpPreview, optional
        :func:`preview` of the same ``sc`` and ``pumps``: its operating points are used,
        not found again [-]

    Returns
    -------
    PumpStudy
    """
    from kit.core.motors import motor_efficiency, select_motor
    from kit.core.operating import (
        annual_cost,
        annual_energy,
        compare_control,
        joules_to_kWh,
    )

    inp = sc if isinstance(sc, PumpInputs) else read(sc)
    if system is None:
        part = _system_part(sc, inp.system)
        system = part.system
    else:
        part = _SystemPart(system)
    from kit.studies.pump_duties import duties_study, viscous_pumps

    q_req, application = inp.required_flow, inp.npsh_application
    hours, tariff, series = inp.hours, inp.tariff, inp.motor_series
    if preview is not None and preview.system is system:
        pumps, viscous, water = list(preview.pumps), preview.viscous, preview.water
        band, curves, npsha_grid = preview.band, preview.curves, preview.npsha
        points, errors = preview.points, preview.errors
    else:
        pumps = list(pumps) if pumps is not None else list(inp.pumps)
        pumps, viscous, water = viscous_pumps(system, pumps, inp.duties)
        q_top = max(p.q_end for p in pumps)
        band, curves, npsha_grid = part.band(q_top)
        points, errors = _points(system, pumps, band, curves, application, part.points)
    Q = band.Q
    motors, energy, verdicts, findings = {}, {}, {}, {}
    for pump in pumps:
        pts, errs = points[pump.name], errors[pump.name]
        good = [p for p in pts if p is not None]
        fl: list[Finding] = []
        for p in good:
            fl += list(p.findings)
        members = getattr(pump, "pumps", [pump])
        for m in {id(x): x for x in members}.values():
            fl += m.fit_findings()
        for label, reason in errs:
            fl.append(Finding(Severity.FAIL, f"pump '{pump.name}' at {label}", "operating point",
                              float("nan"), "-", "an intersection of pump and system curves",
                              reason, "pump and system curves"))
        pmax = max((p.shaft_power for p in good if np.isfinite(p.shaft_power)), default=None)
        m_sel = None
        if pmax:
            try:
                m_sel = select_motor(pmax, series=series)
            except HeadlineError as exc:
                fl.append(Finding(Severity.FAIL, f"pump '{pump.name}'", "motor", pmax, "W",
                                  "a standard rating", str(exc), "kit.core.motors"))
        motors[pump.name] = m_sel
        if m_sel is not None and getattr(pump, "has_efficiency", False):
            p_end = float(pump.power(pump.q_end, max(system.state(system.T_min).rho,
                                                     system.state(system.T_max).rho)))
            ok = p_end <= m_sel.rating
            fl.append(Finding(
                Severity.PASS if ok else Severity.CHECK, f"pump '{pump.name}'",
                "shaft power at the last datasheet flow", p_end, "W",
                f"<= {m_sel.rating / 1e3:g} kW motor rating",
                "motor carries the pump to the end of its curve (non-overloading)" if ok else
                "the motor would overload if the system lets the pump run out to the end of its "
                "curve (a burst or drained main, a bypass open); size for run-out or protect "
                "the motor", "common practice, no source"))
        energy[pump.name] = None
        if good and m_sel is not None and hours > 0:
            eta_m = _motor_eta(motor_efficiency, m_sel.rating)
            shaft = [p.shaft_power for p in good if np.isfinite(p.shaft_power)]
            if shaft:
                mean_shaft = float(np.mean(shaft))
                e_kwh = joules_to_kWh(annual_energy(mean_shaft, hours, eta_m))
                energy[pump.name] = (e_kwh, annual_cost(e_kwh, tariff), mean_shaft / eta_m)
        if q_req is not None:
            short = [p for p in good if p.Q < q_req * (1 - 1e-9)]
            qmin = min((p.Q for p in good), default=float("nan"))
            fl.append(Finding(
                Severity.FAIL if short or errs else Severity.PASS, f"pump '{pump.name}'",
                "flow, lowest over band", qmin, "m³/s", f">= {q_req:.4g} m³/s",
                "delivers the required flow at every condition of the band" if not short else
                "falls short of the required flow at some condition of the band", "the duty"))
        findings[pump.name] = fl
        verdicts[pump.name] = worst(fl).value
    duty_energy, duty_text = _duty_energy(system, pumps, band, q_req, hours, motors,
                                          part.heads)
    order = {"pass": 0, "check": 1, "fail": 2}

    def _rank(p):
        d = duty_energy.get(p.name)
        per_volume = d.worst_kWh_per_m3 if d is not None and d.meets_every_condition else 1e30
        return (order[verdicts[p.name]], per_volume,
                energy[p.name][0] if energy[p.name] else 1e30)

    ranked = sorted(pumps, key=_rank)
    rec = ranked[0].name if ranked and verdicts[ranked[0].name] != "fail" else None
    control, control_label = None, None
    if rec is not None and q_req is not None and hours > 0:
        pump = next(p for p in pumps if p.name == rec)
        if not hasattr(pump, "members_at"):
            cond = control_condition(system, q_req, part.heads)
            control_label = cond.label
            rating = motors[rec].rating if motors[rec] else None
            try:
                control = compare_control(
                    pump, part.heads[cond.label], q_req,
                    rho=system.state(cond.T).rho, hours=hours,
                    motor_efficiency=_motor_eta(motor_efficiency, rating) if rating else 0.9,
                    drive_rating=rating)
            except HeadlineError:
                control = None
    profiles, screen = [], None
    if rec is not None:
        from kit.core.system import band_profiles

        pts = points[rec]
        profiles = band_profiles(system, [
            (c, p.Q if p is not None and np.isfinite(p.Q) else None)
            for c, p in zip(band.conditions, pts, strict=True)])
        screen = _discharge_integrity(system, next(p for p in pumps if p.name == rec),
                                      profiles, inp.integrity)
    duties = None
    if inp.duties is not None:
        duties = duties_study(system, pumps, band, q_req, rec, inp.duties, viscous, curves,
                              water)
    return PumpStudy(system, Q, band, pumps, points, errors, motors, energy, control,
                     control_label, rec, verdicts, q_req, findings, npsha_grid, hours, tariff,
                     inp.currency, application, profiles, screen, duty_energy, duty_text,
                     duties)


def _duty_energy(system, pumps, band, q_req, hours, motors, heads=None) -> tuple[dict, str]:
    """Each candidate at the required flow, throttled, over every band condition
    (:func:`kit.core.operating.energy_at_duty`): energy per volume on the same duty.
    ``heads``: label -> the condition's exact system head (:class:`_Heads`), default built
    here."""
    from kit.core.motors import motor_efficiency
    from kit.core.operating import energy_at_duty

    if q_req is None:
        return {}, ""
    heads = heads or {c.label: _Heads(system, c) for c in band.conditions}
    conds = {c.label: heads[c.label] for c in band.conditions}
    rho = max(system.state(system.T_min).rho, system.state(system.T_max).rho)
    out, text = {}, ""
    for pump in pumps:
        m = motors.get(pump.name)
        eta = _motor_eta(motor_efficiency, m.rating) if m is not None else 0.9
        try:
            cmp = energy_at_duty([pump], conds, q_req, control="throttle", rho=rho,
                                 hours=hours, motor_efficiency=eta)
        except HeadlineError:
            continue
        out[pump.name] = cmp.pump(pump.name)
        text = cmp.control_text
    return out, text


def _discharge_integrity(system, pump, profiles, opts):
    """Rating and surge screen of the discharge line for the recommended pump: the pump at
    shut-off on the highest suction surface, the standing column from the destination, the
    running pressure and velocity of the band's fastest condition, and the pump-trip
    down-surge at the pump and at the discharge line's highest station."""
    from kit.core.line import G
    from kit.studies.integrity import screen_line

    runs = [b for b in profiles if b.discharge is not None]
    if not runs:
        return None
    fast = max(runs, key=lambda b: b.Q)
    st = fast.discharge.stations
    z_low = min(s.z for s in st)
    top = max(st, key=lambda s: s.z)
    T = system.T_max
    state = system.state(T)
    rho = max(system.state(system.T_min).rho, state.rho)
    src, dst = system.source, system.destination
    z_pump = system.pump_elevation if system.pump_elevation is not None else st[0].z
    H0 = float(pump.head(0.0))
    p_suction = src.pressure + rho * G * (src.level_high - z_pump)
    L = float(sum(seg.length for seg in system.discharge.segments))
    V = max(s.V for s in st)
    trips = [(st[0].name, st[0].p)]
    if top is not st[0]:
        trips.append((top.name, top.p))
    return screen_line(
        "discharge line", system.discharge.segments[0].pipe, system.liquid, T, system.p_baro,
        state.pv, length=L, velocity=V, running_pressure=max(s.p for s in st), opts=opts,
        standing=(dst.level_high - z_low, dst.pressure),
        shutoff=(H0, max(p_suction, 0.0), z_pump - z_low), trip_stations=trips, rho=rho)


def _motor_eta(motor_efficiency, rating: float) -> float:
    """Full-load efficiency of a 4-pole enclosed motor, clamped into the CSA table's range."""
    from kit.core.motors import MOTOR_EFFICIENCY_VALID

    lo, hi = MOTOR_EFFICIENCY_VALID["P_W"]
    return motor_efficiency(min(max(rating, lo), hi))


def compute(sc) -> Results:
    """The pump-selection results of a scenario (values, findings, methods, cautions)."""
    return results_of(sc, study(sc))


def results_of(sc, s: PumpStudy) -> Results:
    """The :class:`Results` of a study already run (the notebook's app re-uses its study)."""
    r = Results("pump_selection")
    temps = (s.system.T_min, s.system.T_max)
    r.add("system.static_head.min", "static head, minimum",
          min(s.system.static_head("min", T) for T in temps), "head")
    r.add("system.static_head.max", "static head, maximum",
          max(s.system.static_head("max", T) for T in temps), "head")
    r.add("site.barometric_pressure", "barometric pressure", s.system.p_baro, "pressure_abs")
    if s.required_flow is not None:
        r.add("duty.flow", "required flow", s.required_flow, "flow")
    for i, pump in enumerate(s.pumps):
        name = pump.name
        k = f"pumps[{i}]"
        rows = [row for row in s.candidate_rows() if row["pump"] == name][0]
        r.add_verdict(f"{k}.verdict", f"{name}: verdict", s.verdicts[name])
        for key, label, kind in (("Q_min", "flow, lowest over band", "flow"),
                                 ("Q_max", "flow, highest over band", "flow"),
                                 ("H_max", "head, highest over band", "head"),
                                 ("eta_min", "efficiency, lowest", "fraction"),
                                 ("npsh_margin", "NPSH margin, least", "head"),
                                 ("power_max", "shaft power, highest", "power"),
                                 ("motor", "motor rating", "power"),
                                 ("energy_kWh", "energy per year", "energy"),
                                 ("cost", f"cost per year [{s.currency or 'currency'}]",
                                  "dimensionless")):
            v = rows.get(key)
            if v is not None and np.isfinite(v):
                r.add(f"{k}.{key}", f"{name}: {label}", v * 3.6e6 if key == "energy_kWh" else v,
                      kind)
        r.findings += list(s.findings[name])
        d = s.duty_energy.get(name)
        if d is not None and d.meets_every_condition:
            r.add(f"{k}.duty_kWh_per_m3", f"{name}: energy per volume at the required flow, "
                  "throttled, worst condition [kWh/m³]", d.worst_kWh_per_m3, "dimensionless")
    r.tables["candidates"] = [{kk: vv for kk, vv in row.items() if kk != "cost_text"}
                              for row in s.candidate_rows()]
    r.tables["operating_points"] = s.point_rows()
    if s.duty_energy:
        r.tables["duty_energy"] = [
            {"pump": d.pump, "condition": row.condition, "feasible": row.feasible,
             "H_system": row.H_system, "H_pump": row.H_pump, "valve_head": row.valve_head,
             "input_power": row.input_power, "kWh_per_m3": row.kWh_per_m3, "note": row.note}
            for d in s.duty_energy.values() for row in d.rows]
        r.method("Energy on the same duty", "every candidate at the required flow under one "
                 f"stated control: {s.duty_energy_text}; ranked by the worst energy per "
                 "volume over the band (kit.core.operating.energy_at_duty)")
    if s.recommended:
        r.tables["recommended"] = [{"pump": s.recommended}]
        r.selected = f"pump '{s.recommended}'"
        for b in s.profiles:
            r.findings += list(b.findings)
        r.tables["line_profiles"] = [
            {"condition": b.condition.label, "Q": b.Q if b.Q is not None else float("nan"),
             "line": prof.line, "station": st.name, "z": st.z, "p": st.p, "p_gauge": st.p_gauge,
             "hgl": st.hgl, "egl": st.egl, "V": st.V}
            for b in s.profiles for prof in (b.suction, b.discharge) if prof is not None
            for st in prof.stations]
        low = [b.lowest for b in s.profiles if b.lowest is not None]
        if low:
            w = min(low, key=lambda st: st.p)
            r.add("lines.lowest_pressure", f"lowest pressure along the lines ({w.name})", w.p,
                  "pressure_abs")
        scr = s.integrity
        if scr is not None:
            r.findings += list(scr.findings)
            r.add("discharge.max_pressure", f"discharge line: highest pressure ({scr.governing})",
                  scr.p_max, "pressure_abs")
            if scr.rating is not None:
                r.add("discharge.rated_pressure", "discharge line: maximum allowable pressure "
                      "(gauge)", scr.rating.P_allow, "pressure_difference")
            if scr.surge_rise is not None:
                r.add("discharge.surge_rise", "discharge line: valve-closure surge rise",
                      scr.surge_rise, "pressure_difference")
            if scr.downsurge is not None:
                r.add("discharge.trip_downsurge", "discharge line: pump-trip down-surge",
                      scr.downsurge, "pressure_difference")
            for name_, text_ in INTEGRITY_METHODS:
                r.method(name_, text_)
    for p in s.pumps:
        if p.name != s.recommended:
            why = ("not recommended: " + s.verdicts[p.name] + " over the band"
                   if s.verdicts[p.name] == "fail" else
                   "meets the duty; ranked below the recommended pump on verdict, then energy "
                   "per volume at the required flow")
            r.alternatives.append(Alternative(f"pump '{p.name}'", why, s.verdicts[p.name]))
    if s.control is not None:
        c = s.control
        r.add("control.throttle.energy", "throttling: energy per year",
              c.throttle.annual_energy, "energy")
        r.add("control.speed.energy", "speed control: energy per year",
              c.speed.annual_energy, "energy")
        r.add("control.speed.rpm", "speed control: speed needed", c.speed.speed_rpm, "speed")
        r.add("control.throttle.valve_head", "throttling: head burned in the valve",
              c.throttle.valve_head, "head")
        r.findings += list(c.findings)
        r.tables["control"] = [
            {"method": cc.method, "speed": cc.speed_rpm, "Q": cc.Q, "H_pump": cc.H_pump,
             "valve_head": cc.valve_head, "eta": cc.efficiency, "shaft_power": cc.shaft_power,
             "input_power": cc.input_power, "energy_kWh": cc.annual_energy_kWh,
             "condition": s.control_label}
            for cc in (c.throttle, c.speed)]
    if s.duties is not None:
        from kit.studies.pump_duties import add_results

        add_results(r, s.duties, s.currency)
    r.method("System curve", "Energy equation with head loss; Darcy–Weisbach. "
             + " ".join(FRICTION_METHOD["references"]))
    r.method("Operating point", "Brent, R. P. (1973). Algorithms for Minimization without "
             "Derivatives, ch. 4 (scipy.optimize.brentq)")
    r.method("Pump curve fit", "polynomial least squares of the datasheet points "
             "(numpy.polynomial.Polynomial.fit)")
    r.method("Affinity laws", "Karassik, Messina, Cooper & Heald (2008), Pump Handbook, 4th ed., "
             "ch. 2 (from memory)")
    r.method("NPSH margin", "ANSI/HI 9.6.1 guideline (from memory)")
    r.method("Operating region", "ANSI/HI 9.6.3 guideline (from memory)")
    r.method("Motor rating", "IEC 60072-1 rated outputs (from memory); API 610 driver margin "
             "(from memory); CSA full-load efficiency via fluids.CSA_motor_efficiency")
    r.method("Drive losses", "fluids.VFD_efficiency (generic PWM drive table)")
    r.method("Barometric pressure", "U.S. Standard Atmosphere 1976")
    r.cautions = cautions_for("pump", "cavitation", "pressure", "water_hammer", "vacuum")
    liquid = s.system.liquid
    flammable = getattr(liquid, "flammable", None)
    if flammable is None:
        flammable = getattr(getattr(liquid, "spec", None), "flammable", False)
    if flammable:
        r.cautions += cautions_for("flammable")[1:]
    return r
