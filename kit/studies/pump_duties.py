"""Pumps beyond one duty point: the installed set, staging, energy over a load profile,
minimum flow and recirculation, viscous correction and the drive's speed range.

Run by :func:`kit.studies.pump_selection.study` when a scenario gives any of the tables
``[pump_set]``, ``[drive]``, ``[staging]``, ``[load_profile]``, ``[min_flow]``,
``[recirculation]`` or ``[viscous]`` (:class:`kit.inputs.pump_selection.DutiesInputs`). The
core does the work:

- the set (:mod:`kit.core.pump_sets`): the running duty units in parallel (flows add at
  equal head; an unlike unit's check valve closes above its shut-off head: Karassik et al.,
  *Pump Handbook*, 4th ed., 2008, ch. 2, from memory), each unit at the set's operating point
  on every band condition, the N+1 check with each unit out in turn;
- staging (:mod:`kit.core.staging`): for identical units, the pumps running and their speed
  along every band condition's required head (the system curve, or the control curve of a
  header or remote differential-pressure set point), by affinity laws; the energy over the
  load profile for each strategy (every pump on a drive, one drive, fixed speed throttled),
  with drive losses from fluids' generic PWM table;
- minimum continuous flow (:mod:`kit.core.min_flow`): the maker's value, else an estimate as
  a fraction of BEP flow (common practice, no source), and the restriction orifice of the
  recirculation line by ISO 5167-2 (Reader-Harris/Gallagher);
- the viscosity correction (:mod:`kit.core.viscous`, ANSI/HI 9.6.7, from memory) of each
  candidate's water curve at the lowest liquid temperature (the highest viscosity).

Example
-------
>>> from kit.notebook import scenario_path
>>> from kit import scenario as scn
>>> from kit.studies.pump_selection import study
>>> d = study(scn.load(scenario_path("wrenfield_duty_standby.toml"))).duties
>>> d.n_duty, d.n_standby, sorted(r.strategy for r in d.energy.rows)
(2, 1, ['all_vfd', 'fixed', 'one_vfd'])
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from kit.core.findings import CAUTIONS, Finding, Severity
from kit.errors import HeadlineError, ScenarioError

__all__ = ["DutiesStudy", "viscous_pumps", "duties_study", "add_results", "STAGING_FLOWS",
           "METHODS"]

#: Flows of the staging sweep along each band condition [-].
STAGING_FLOWS = 60

#: Methods and references the duties add to the Results.
METHODS = (
    ("Pumps in parallel", "flows add at equal head; a unit's check valve closes above its "
     "shut-off head (Karassik, Messina, Cooper & Heald 2008, Pump Handbook, 4th ed., ch. 2, "
     "from memory); kit.core.pump_sets"),
    ("Staging and speed control", "affinity laws Q ∝ n, H ∝ n², P ∝ n³ with efficiency kept "
     "along the affinity parabola (Karassik et al. 2008, from memory); speed ratio by "
     "bisection, stage-up flows by Brent's method (kit.core.staging)"),
    ("Control curve", "remote differential-pressure set point: H = H_set + (H_design − H_set)"
     "(Q/Q_design)² (common practice, no source)"),
    ("Energy over a load profile", "E = Σ hours × shaft power / (η_motor η_drive); drive "
     "efficiency from fluids.VFD_efficiency (generic PWM drive table); motor efficiency "
     "constant over load (stated)"),
    ("Minimum continuous flow", "the maker's value governs; else a fraction of BEP flow by "
     "pump class (common practice, no source)"),
    ("Recirculation orifice", "ISO 5167-2:2003 square-edged orifice; discharge coefficient by "
     "Reader-Harris/Gallagher, permanent loss by fluids.flow_meter.dP_orifice (limits from "
     "memory)"),
    ("Viscosity correction", "ANSI/HI 9.6.7-2010/2015, Rotodynamic Pumps — Guideline for "
     "Effects of Liquid Viscosity on Performance (Hydraulic Institute); parameter B and the "
     "flow, head and efficiency factors from memory"),
)


@dataclass
class DutiesStudy:
    """What the duties add to a pump study (SI). See the module docstring.

    ``units`` are the installed units (duty first), ``running`` the duty units as run (one
    PumpCurve or a parallel PumpSet); ``set_points[i]`` the set at band condition ``i``
    (:class:`kit.core.pump_sets.SetDuty`, or None with its reason in ``set_errors``);
    ``staging`` a :class:`kit.core.staging.StagingResult` over every band condition (None for
    unlike units or without efficiency); ``reference`` the index of the band condition the
    energy is priced on; ``energy`` an :class:`~kit.core.staging.EnergyComparison` there;
    ``energy_band`` rows of (strategy, condition, kWh) over the band.
    """

    inputs: object
    units: tuple
    n_duty: int
    n_standby: int
    identical: bool
    running: object
    labels: tuple
    set_points: list
    set_errors: dict
    speed: object
    speed_ratios: tuple | None
    staging: object = None
    control: object = None
    reference: int | None = None
    energy: object = None
    energy_band: list = field(default_factory=list)
    min_flow: object = None
    recirculation: object = None
    bypass_at_duty: float | None = None
    viscous: list = field(default_factory=list)
    #: the water curve of each viscosity correction (same order as ``viscous``)
    viscous_water: list = field(default_factory=list)
    findings: list = field(default_factory=list)
    notes: list = field(default_factory=list)

    @property
    def unit(self):
        """The set's one unit curve (identical units) -> PumpCurve."""
        return self.units[0]

    def composition_rows(self) -> list[dict]:
        """One row per installed unit: role, pump, shut-off head [m], BEP flow [m³/s],
        last datasheet flow [m³/s]."""
        rows = []
        for i, u in enumerate(self.units):
            bep = u.bep[0] if getattr(u, "has_efficiency", False) else float("nan")
            rows.append({"unit": i + 1, "role": "duty" if i < self.n_duty else "standby",
                         "pump": u.name, "speed": u.speed_rpm, "shutoff_head": u.shutoff_head,
                         "bep_flow": bep, "q_end": u.q_end})
        return rows

    def step_rows(self) -> list[dict]:
        """Staging steps per band condition: pumps running, the flow range where they run
        (rising demand), the stage-down flow, and the speed ratio range of the drive(s)."""
        s = self.staging
        if s is None:
            return []
        rows = []
        for c, lab in enumerate(s.labels):
            for k in range(1, s.n_duty + 1):
                on = s.count[c] == k
                lo = 0.0 if k == 1 else float(s.stage_up[c, k - 2])
                hi = float(s.stage_up[c, k - 1]) if k < s.n_duty else float("nan")
                down = float(s.stage_down[c, k - 2]) if k > 1 else float("nan")
                r = s.speed_ratio[c][on]
                r = r[np.isfinite(r)]
                rows.append({"condition": lab, "pumps": k, "from_flow": lo, "stage_up_flow": hi,
                             "stage_down_flow": down,
                             "speed_min": float(r.min()) if r.size else float("nan"),
                             "speed_max": float(r.max()) if r.size else float("nan"),
                             "shortfall": bool(np.any(s.shortfall[c][on]))})
        return rows

    def energy_rows(self) -> list[dict]:
        """Per strategy and load-profile step at the reference condition: pumps running,
        speed ratio, input power [W], energy [kWh]; then the strategy's total."""
        if self.energy is None:
            return []
        rows = []
        for row in self.energy.rows:
            for i in range(row.Q.size):
                rows.append({"strategy": row.strategy, "Q": float(row.Q[i]),
                             "hours": float(row.hours[i]), "pumps": int(row.count[i]),
                             "speed_ratio": float(row.speed_ratio[i]),
                             "input_power": float(row.input_power[i]),
                             "energy_kWh": float(row.energy_kWh[i])})
        return rows

    def strategy_rows(self) -> list[dict]:
        """One row per strategy: total kWh a year at the reference condition, the saving
        against fixed speed, and the least and most total over the band."""
        if self.energy is None:
            return []
        band: dict = {}
        for strat, _lab, kwh in self.energy_band:
            band.setdefault(strat, []).append(kwh)
        out = []
        for row in self.energy.rows:
            b = [x for x in band.get(row.strategy, []) if np.isfinite(x)]
            out.append({"strategy": row.strategy, "total_kWh": row.total_kWh,
                        "saving_kWh": self.energy.saving_kWh.get(row.strategy, float("nan")),
                        "band_min_kWh": min(b) if b else float("nan"),
                        "band_max_kWh": max(b) if b else float("nan")})
        return out


# ------------------------------------------------------------------ viscosity


def viscous_pumps(system, pumps, duties):
    """The candidates corrected for viscosity at the lowest liquid temperature (ANSI/HI
    9.6.7, from memory), and the corrections; the candidates unchanged when the scenario
    does not ask (``[viscous] correct = true``).

    A set of identical pumps (``arrangement = "parallel"`` or ``"series"``) is corrected
    member by member and combined again. Returns (pumps, [ViscousCorrection, ...], [the water
    curve of each correction, ...]).
    """
    from kit.core.pump import PumpCurve, parallel, series
    from kit.core.viscous import viscous_curve

    if duties is None or not duties.viscous:
        return list(pumps), [], []
    st = system.state(system.T_min)
    nu, rho = st.mu / st.rho, st.rho
    out, corr, water = [], [], []
    for i, p in enumerate(pumps):
        members = getattr(p, "pumps", None)
        base = p if isinstance(p, PumpCurve) else members[0]
        try:
            vc = viscous_curve(base, nu, rho, stages=duties.stages, name=base.name)
        except HeadlineError as exc:
            raise ScenarioError(f"pumps[{i}]", f"cannot be corrected for viscosity: {exc}") \
                from None
        corr.append(vc)
        water.append(base)
        if isinstance(p, PumpCurve):
            out.append(vc.curve)
        else:
            combine = parallel if p.arrangement == "parallel" else series
            out.append(combine([vc.curve] * len(members), name=p.name))
    return out, corr, water


# ------------------------------------------------------------------ the study


def _head_fn(cv, system, cond):
    """System head over flows: the pump study's spline within its grid (exact to ~1e-9 m),
    the exact curve beyond it (a set can pass more than any one candidate).

    Root finders call it at one flow at a time, often at the same flows (the ends of their
    brackets, one strategy after another): the head at one flow is remembered for the life
    of this function (one study), keyed on the flow's value — the system and condition are
    fixed for that life, so a remembered head is the head."""
    q_top = float(cv.Q[-1])
    memo: dict = {}

    def compute(qa):
        if qa.size and float(np.max(qa)) <= q_top:
            return cv.head(qa)
        return system.curve(qa, cond)

    def head(q):
        qa = np.asarray(q, dtype=float)
        if qa.size != 1:
            return compute(qa)
        key = (qa.shape, float(qa.reshape(-1)[0]))
        hit = memo.get(key)
        if hit is None:
            hit = memo[key] = np.array(compute(qa), dtype=float)
        return hit.copy()

    return head


def _unit_of(p, i, duties):
    """The single pump a unit of the set is: the candidate itself, or the member of a
    candidate of identical pumps in parallel (its datasheet curve)."""
    from kit.core.pump import PumpCurve

    if isinstance(p, PumpCurve):
        return p
    members = getattr(p, "pumps", ())
    if p.arrangement == "parallel" and len({id(m) for m in members}) == 1:
        return members[0]
    key = "pump_set.units" if duties.units is not None else "pump_set.pump"
    raise ScenarioError(key, f"unit {i + 1} ('{p.name}') is a set of pumps in "
                        f"{p.arrangement}; a unit must be one pump (a single candidate, or a "
                        "candidate of identical pumps in parallel)")


def _speed_range(duties, unit):
    """The drive's SpeedRange for ``unit`` and the findings on it; a ScenarioError naming
    the key when the range is outside what the kit accepts."""
    from kit.core.staging import SPEED_LIMITS, SpeedRange

    ratios = duties.speed_ratios(unit.speed_rpm)
    lo_d = SPEED_LIMITS["min_ratio"]["value"]
    hi_d = SPEED_LIMITS["max_ratio"]["value"]
    if ratios is None:
        return SpeedRange(), None, []
    lo, hi = ratios
    lo = lo_d if lo is None else lo
    hi = hi_d if hi is None else hi
    by_f = duties.frequency is not None
    k_lo, k_hi = ("drive.min_frequency", "drive.max_frequency") if by_f else \
        ("drive.min_speed", "drive.max_speed")
    base = ("the motor's rated frequency" if by_f else
            f"the curve speed {unit.speed_rpm:g} rpm of pump '{unit.name}'")
    if lo < 0.05 or lo >= 1.0:
        raise ScenarioError(k_lo, f"gives a speed ratio {lo:.3g} to {base}; it must be from "
                            "0.05 to below 1 (a drive range outside the pump's speed)")
    if hi <= lo or hi > 1.2:
        raise ScenarioError(k_hi, f"gives a speed ratio {hi:.3g} to {base}; it must be above "
                            f"the minimum ({lo:.3g}) and at most 1.2 (above it the affinity "
                            "laws and the casing rating are not to be trusted)")
    sr = SpeedRange(lo, hi)
    subject = f"drive of pump '{unit.name}'"
    fs = []
    if lo < sr.accuracy_ratio:
        fs.append(Finding(
            Severity.CHECK, subject, "minimum speed ratio", lo, "-",
            f">= {sr.accuracy_ratio:g}", f"the drive allows speeds down to {lo:.0%} of the "
            f"curve speed; below about {sr.accuracy_ratio:.0%} the affinity laws lose accuracy "
            "(efficiency falls; Reynolds-number and clearance effects) — where the staging "
            "runs there, head and power are approximate",
            SPEED_LIMITS["accuracy_ratio"]["source"], low=sr.accuracy_ratio))
    else:
        fs.append(Finding(Severity.PASS, subject, "minimum speed ratio", lo, "-",
                          f">= {sr.accuracy_ratio:g}", "the drive's range stays where the "
                          "affinity laws hold", SPEED_LIMITS["accuracy_ratio"]["source"],
                          low=sr.accuracy_ratio))
    if hi > 1.0 + 1e-12:
        fs.append(Finding(
            Severity.CHECK, subject, "maximum speed ratio", hi, "-", "<= 1 (curve speed)",
            "the drive may run the pump above its curve speed: the maker must confirm speed, "
            "casing pressure and motor power. " + CAUTIONS["pressure"],
            SPEED_LIMITS["max_ratio"]["source"], high=1.0))
    return sr, (lo, hi), fs


def _control(duties):
    from kit.core.staging import constant_pressure, remote_dp

    if duties.control == "header":
        return constant_pressure(duties.set_head)
    if duties.control == "remote_dp":
        if duties.design_head < duties.set_head:
            raise ScenarioError("staging.design_head", f"must be at least set_head "
                                f"({duties.set_head:.4g} m), not {duties.design_head:.4g} m")
        return remote_dp(duties.set_head, duties.design_flow, duties.design_head)
    return None


def duties_study(system, pumps, band, q_req, recommended, duties, viscous=(),
                 curves=None, water=()) -> DutiesStudy:
    """The set, staging, energy, minimum flow and recirculation of a pump study.

    Parameters
    ----------
    system : kit.core.system.System
    pumps : list
        The candidates as studied (corrected for viscosity where asked) [-]
    band : kit.core.system.SystemBand
    q_req : float or None
        Required flow [m³/s]
    recommended : str or None
        The recommended candidate's name: the set's unit when ``[pump_set]`` is absent
    duties : kit.inputs.pump_selection.DutiesInputs
    viscous : sequence of ViscousCorrection
        The corrections made (their findings are joined)
    water : sequence of PumpCurve
        The water curve of each correction (for the charts)
    curves : sequence, optional
        Per band condition, an object whose ``head(q)`` is the system head [m] — the pump
        study's splines through the exact curve (within ~1e-9 m); default the exact
        :meth:`System.curve` (slower)

    Returns
    -------
    DutiesStudy
    """
    from kit.core.operating import operating_point
    from kit.core.pump_sets import DutyStandby, MemberDuty, SetDuty, set_operating_point

    findings: list[Finding] = []
    notes: list[str] = []
    for vc in viscous:
        findings += list(vc.findings)
    if duties.units is not None:
        units = tuple(pumps[i] for i in duties.unit_index)
        n_duty = duties.duty_count
    else:
        name = recommended or pumps[0].name
        units = (next(p for p in pumps if p.name == name),)
        n_duty = 1
        notes.append(f"no [pump_set]: the set is one duty unit of '{name}'"
                     + (" (the recommended pump)" if recommended else ""))
    units = tuple(_unit_of(u, i, duties) for i, u in enumerate(units))
    identical = len({id(u) for u in units}) == 1
    ds = DutyStandby(units, n_duty, name=f"{n_duty} duty + {len(units) - n_duty} standby")
    running = ds.running()
    labels = tuple(c.label for c in band.conditions)
    if curves is None:
        heads = [lambda q, _c=c: system.curve(q, _c) for c in band.conditions]
    else:
        heads = [_head_fn(cv, system, c) for cv, c in zip(curves, band.conditions,
                                                          strict=True)]
    speed, ratios, sfind = _speed_range(duties, units[0])
    findings += sfind

    # --- the running set at each band condition (dead-heading, minimum flow)
    q_min = None
    mf = None
    if duties.min_flow_given or duties.recirculation is not None:
        from kit.core.min_flow import minimum_flow

        try:
            mf = minimum_flow(units[0], maker=duties.min_flow_maker, pump_class=duties.pump_class)
            q_min = mf.Q_min
            findings += list(mf.findings)
            notes.append("thermal minimum-flow estimate not made: the liquid model gives no "
                         "specific heat; the maker's value or the BEP-fraction estimate is used")
        except HeadlineError as exc:
            raise ScenarioError("min_flow.maker", str(exc)) from None
    set_points, set_errors = [], {}
    rho_hi = max(system.state(system.T_min).rho, system.state(system.T_max).rho)
    minf = {u.name: q_min for u in units[:n_duty]} if q_min is not None else None
    for cond, head in zip(band.conditions, heads, strict=True):
        rho = system.state(cond.T).rho
        try:
            if hasattr(running, "pumps"):
                sd = set_operating_point(running, head,
                                         rho=rho, min_flows=minf, label=cond.label)
                findings += [f for f in sd.findings if f.severity != Severity.PASS]
            else:
                op = operating_point(running, head, rho=rho, label=cond.label)
                u = running
                m = MemberDuty(u.name, op.Q, op.H, op.efficiency, op.shaft_power,
                               op.npshr, op.bep_fraction, "running")
                extra = []
                if q_min is not None and op.Q < q_min:
                    extra.append(Finding(
                        Severity.FAIL, f"pump '{u.name}' at {cond.label}", "flow", op.Q,
                        "m³/s", f">= {q_min:.4g} m³/s (minimum continuous flow)",
                        "below the minimum continuous flow. " + CAUTIONS["pump"],
                        mf.basis if mf else "", low=q_min))
                sd = SetDuty(op.Q, op.H, "single", (m,), tuple(extra))
                findings += extra
            set_points.append(sd)
        except HeadlineError as exc:
            set_points.append(None)
            set_errors[cond.label] = str(getattr(exc, "reason", exc))
    if q_req is not None and ds.n_standby > 0:
        H_req = max(float(system.curve(np.array([q_req]), c)[0]) for c in band.conditions)
        try:
            findings += ds.n_plus_1(q_req, H_req)
        except HeadlineError as exc:
            notes.append(f"N+1 check not made: {exc}")
    elif duties.units is not None:
        findings.append(Finding(
            Severity.CHECK, f"pump set '{ds.name}'", "standby units", 0.0, "-", ">= 1",
            "no standby unit: with a duty unit out of service the duty is not met (no N+1)",
            "common practice, no source"))

    d = DutiesStudy(duties, units, n_duty, len(units) - n_duty, identical, running, labels,
                    set_points, set_errors, speed, ratios, findings=findings, notes=notes,
                    min_flow=mf, viscous=list(viscous), viscous_water=list(water))

    # --- staging along each band condition, and energy over the load profile
    unit = units[0]
    if not identical and duties.staging_given:
        findings.append(Finding(
            Severity.CHECK, f"pump set '{ds.name}'", "staging study", float("nan"), "-",
            "identical units", "staging and the strategy energy comparison are made for "
            "identical units only; unlike units are shown at each band condition",
            "common practice, no source"))
    elif not duties.staging_given:
        pass
    elif not unit.has_efficiency:
        notes.append("staging and energy need the unit's efficiency curve")
    else:
        _staging(d, system, band, q_req, unit, rho_hi, heads)
    if duties.recirculation is not None and q_min is not None:
        _recirculation(d, system, unit, q_min, q_req, band)
    elif duties.recirculation is not None:
        notes.append("recirculation line not sized: no minimum flow")
    return d


def _staging(d, system, band, q_req, unit, rho, heads):
    from kit.core.staging import (
        StagingRule,
        compare_strategies_band,
        required_heads,
        staging_sweep,
    )

    duties = d.inputs
    n = d.n_duty
    if duties.basis == "flow" and len(duties.stage_up_flows) != n - 1:
        raise ScenarioError("staging.stage_up_flows", f"must give one flow per added pump: "
                            f"{n - 1} for {n} duty units, not {len(duties.stage_up_flows)}")
    try:
        rule = StagingRule(duties.basis, duties.stage_up_flows, duties.hysteresis)
        control = _control(duties)
    except ScenarioError:
        raise
    except HeadlineError as exc:
        raise ScenarioError("staging", str(exc)) from None
    d.control = control
    want = [q for q in (q_req,) if q is not None]
    if duties.profile is not None:
        want.append(max(q for q, _ in duties.profile))
    cap = n * unit.q_end * d.speed.max_ratio
    top = min(max(want), cap) if want else cap
    bottom = top / STAGING_FLOWS
    if duties.profile is not None:
        bottom = min(min(q for q, _ in duties.profile), top)
    Q = np.linspace(bottom, top, STAGING_FLOWS) if top > bottom else np.array([top])
    conds = band.conditions
    Hs = np.array([h(Q) for h in heads])
    labels = [c.label for c in conds]
    try:
        H, cf = required_heads(Q, np.maximum(Hs, 1e-6), control, labels)
        exact = [control.head] * len(conds) if control is not None else list(heads)
        d.staging = staging_sweep(unit, n, Q, H, strategy=duties.strategy, rule=rule,
                                  speed=d.speed, rho=rho, labels=labels, exact=exact)
    except HeadlineError as exc:
        d.notes.append(f"staging not computed: {exc}")
        d.findings.append(Finding(Severity.CHECK, f"pump set of {n} duty unit(s)",
                                  "staging study", float("nan"), "-", "computed",
                                  f"the staging study could not be made: {exc}",
                                  "kit.core.staging"))
        return
    if np.any(Hs <= 0):
        d.notes.append("the system head is at or below zero at low flow on some condition "
                       "(the liquid runs by gravity there): the staging holds it at ~0")
    d.findings += [f for f in cf if f.severity != Severity.PASS] or cf[:1]
    d.findings += list(d.staging.findings)
    # energy: the reference condition is the band's highest system head at the design flow
    if duties.profile is None:
        d.notes.append("no [load_profile]: energy per strategy not compared")
        return
    q_ref = q_req if q_req is not None else max(q for q, _ in duties.profile)
    at_ref = [float(np.asarray(h(np.array([q_ref]))).reshape(-1)[0]) for h in heads]
    d.reference = int(np.argmax(at_ref))
    fns = [control.head if control is not None else heads[i] for i in range(len(conds))]
    # every condition in one sweep per strategy: the numbers of compare_strategies per
    # condition, each refusal kept with its condition
    compared = compare_strategies_band(unit, n, duties.profile, fns, rule=rule, speed=d.speed,
                                       rho=rho)
    for i, c in enumerate(conds):
        cmp = compared[i]
        if isinstance(cmp, HeadlineError):
            exc = cmp
            if i == d.reference:
                d.notes.append(f"energy not compared: {exc}")
                d.findings.append(Finding(Severity.CHECK, f"load profile at {c.label}",
                                          "energy per strategy", float("nan"), "kWh",
                                          "compared", f"not compared: {exc}",
                                          "kit.core.staging"))
            continue
        for row in cmp.rows:
            d.energy_band.append((row.strategy, c.label, row.total_kWh))
        if i == d.reference:
            d.energy = cmp
            for row in cmp.rows:
                d.findings += [f for f in row.findings if f.severity != Severity.PASS
                               and f not in d.findings]
                if not np.isfinite(row.total_kWh):
                    d.findings.append(Finding(
                        Severity.FAIL, f"load profile, strategy '{row.strategy}'",
                        "energy", float("nan"), "kWh", "every step delivered",
                        "a step of the load profile cannot be delivered by the duty units: "
                        "its energy is not counted", "the load profile"))
    if d.min_flow is not None and d.energy is not None:
        q_lo = d.min_flow.Q_min
        for row in d.energy.rows:
            per_pump = row.Q / np.maximum(row.count, 1)
            if row.strategy == "one_vfd":
                continue  # the drive pump's own flow is in the staging table
            bad = per_pump < q_lo
            if bad.any():
                d.findings.append(Finding(
                    Severity.CHECK if d.inputs.recirculation is not None else Severity.FAIL,
                    f"load profile, strategy '{row.strategy}'", "flow per running pump",
                    float(per_pump.min()), "m³/s", f">= {q_lo:.4g} m³/s (minimum continuous "
                    "flow)", "a step of the load profile runs the pumps below their minimum "
                    "continuous flow" + ("; the recirculation line makes up the difference"
                                         if d.inputs.recirculation is not None else
                                         ": add a recirculation line or a low-flow trip")
                    + ". " + CAUTIONS["pump"], d.min_flow.basis, low=q_lo))


def _recirculation(d, system, unit, q_min, q_req, band):
    from kit.core.min_flow import recirculation_orifice

    bore, zs, taps = d.inputs.recirculation
    st = system.state(system.T_max)
    try:
        ro = recirculation_orifice(unit, q_min, D=bore, rho=st.rho, mu=st.mu, static_head=zs,
                                   p_down=system.source.pressure, p_vapour=st.pv, taps=taps)
    except HeadlineError as exc:
        raise ScenarioError("recirculation.bore", str(exc)) from None
    d.recirculation = ro
    d.findings += list(ro.findings)
    good = [p for p in d.set_points if p is not None]
    if good:
        H = max(p.H for p in good)
        try:
            d.bypass_at_duty = ro.flow_at_head(H)
        except HeadlineError:
            d.bypass_at_duty = None


# ------------------------------------------------------------------ results


def add_results(r, d: DutiesStudy, currency: str = "") -> None:
    """Write the duties' reported values, tables, findings and methods into Results ``r``."""
    r.add("pump_set.installed", "pump set: units installed", len(d.units), "dimensionless")
    r.add("pump_set.duty", "pump set: duty units", d.n_duty, "dimensionless")
    r.tables["pump_set"] = d.composition_rows()
    rows = []
    for lab, sd in zip(d.labels, d.set_points, strict=True):
        if sd is None:
            rows.append({"condition": lab, "note": d.set_errors.get(lab, "no point")})
            continue
        for m in sd.members:
            rows.append({"condition": lab, "Q_set": sd.Q, "H": sd.H, "pump": m.name,
                         "Q": m.Q, "eta": m.efficiency, "shaft_power": m.shaft_power,
                         "status": m.status})
    r.tables["set_points"] = rows
    if d.speed_ratios is not None:
        r.add("drive.min_speed_ratio", "drive: minimum speed / curve speed", d.speed_ratios[0],
              "dimensionless")
        r.add("drive.max_speed_ratio", "drive: maximum speed / curve speed", d.speed_ratios[1],
              "dimensionless")
    if d.staging is not None:
        r.tables["staging_steps"] = d.step_rows()
        for c, lab in enumerate(d.staging.labels):
            for j in range(d.n_duty - 1):
                v = float(d.staging.stage_up[c, j])
                if np.isfinite(v):
                    r.add(f"staging.stage_up[{c}][{j}]", f"stage-up flow to {j + 2} pumps at "
                          f"{lab}", v, "flow")
    if d.energy is not None:
        r.tables["energy_steps"] = d.energy_rows()
        r.tables["energy_strategies"] = d.strategy_rows()
        ref = d.labels[d.reference]
        for row in d.energy.rows:
            if np.isfinite(row.total_kWh):
                r.add(f"energy.{row.strategy}", f"energy a year over the load profile, "
                      f"{row.strategy} ({ref})", row.total_kWh * 3.6e6, "energy")
    if d.min_flow is not None:
        r.add("min_flow.Q_min", f"minimum continuous flow ({d.min_flow.basis})",
              d.min_flow.Q_min, "flow")
    if d.recirculation is not None:
        ro = d.recirculation
        r.add("recirculation.orifice_bore", "recirculation orifice bore", ro.d, "diameter")
        r.add("recirculation.dp_loss", "recirculation orifice permanent loss at minimum flow",
              ro.dp_loss, "pressure_difference")
        if d.bypass_at_duty is not None:
            r.add("recirculation.bypass_at_duty", "recirculation flow at the highest duty "
                  "head (continuous bypass)", d.bypass_at_duty, "flow")
    for i, vc in enumerate(d.viscous):
        r.add(f"viscous[{i}].B", f"{vc.curve.name}: HI parameter B", vc.B, "dimensionless")
        r.add(f"viscous[{i}].C_Q", f"{vc.curve.name}: flow factor C_Q", vc.C_Q, "dimensionless")
        r.add(f"viscous[{i}].C_eta", f"{vc.curve.name}: efficiency factor C_eta", vc.C_eta,
              "dimensionless")
    if d.viscous:
        r.tables["viscous"] = [{"pump": vc.curve.name, "nu": vc.nu, "B": vc.B, "C_Q": vc.C_Q,
                                "C_H_bep": vc.C_Q, "C_eta": vc.C_eta} for vc in d.viscous]
    seen = {(f.subject, f.quantity, f.severity, f.rule) for f in r.findings}
    for f in d.findings:
        key = (f.subject, f.quantity, f.severity, f.rule)
        if key not in seen:
            seen.add(key)
            r.findings.append(f)
    for name, text in METHODS:
        r.method(name, text)
