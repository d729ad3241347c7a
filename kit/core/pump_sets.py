"""Sets of pumps: unlike pumps in parallel or series at a duty, and duty/standby sets.

Unlike pumps in parallel share one head; each passes the flow its own curve gives at that
head, Q_i(H), and none while the head is at or above its shut-off head — its check valve
closes and it runs dead-headed (every parallel pump needs a check valve). The combined curve
is Q(H) = Σ Q_i(H) (flows add at equal head; Karassik et al., *Pump Handbook*, 4th ed.,
McGraw-Hill 2008, ch. 2, from memory). :func:`kit.core.pump.parallel` builds that set; this
module reports each member at a set flow (:func:`set_duty`) with the findings the set needs:
a member dead-headed by the others, a member below its minimum flow, a series member driven
past its zero-head flow (it then acts as a resistance).

A duty/standby set (:class:`DutyStandby`) lists its installed units, duty first; at most
``n_duty`` run at once, so a standby adds no capacity. The N+1 check takes each unit out in
turn and asks whether the best ``n_duty`` of the others still meet the duty.

Example
-------
>>> from kit.core.pump import PumpCurve, parallel
>>> big = PumpCurve([0, 0.01, 0.02], [40.0, 37.0, 30.0], speed_rpm=2900, diameter=0.2,
...                 name="big")
>>> small = PumpCurve([0, 0.01, 0.02], [32.0, 29.0, 22.0], speed_rpm=2900, diameter=0.16,
...                   name="small")
>>> d = set_duty(parallel([big, small]), 0.012)
>>> [m.status for m in d.members]
['running', 'check valve closed']
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from kit.core.findings import CAUTIONS, Finding, Severity
from kit.core.pump import PumpCurve, PumpSet, parallel
from kit.errors import InputError, check_range

__all__ = ["MemberDuty", "SetDuty", "set_duty", "set_operating_point", "member_flows_at_head",
           "closed_in_heads", "DutyStandby"]


@dataclass(frozen=True)
class MemberDuty:
    """One member of a set at a set flow (SI).

    Attributes: ``name``, ``Q`` [m³/s], ``H`` its own head [m], ``efficiency`` [-],
    ``shaft_power`` [W] (NaN without density or efficiency), ``npshr`` [m] (NaN without a
    curve), ``bep_fraction`` [-], ``status`` ("running", "check valve closed", "resistance").
    """

    name: str
    Q: float
    H: float
    efficiency: float
    shaft_power: float
    npshr: float
    bep_fraction: float
    status: str


@dataclass(frozen=True)
class SetDuty:
    """A set at one flow: set flow [m³/s] and head [m], its members and the findings."""

    Q: float
    H: float
    arrangement: str
    members: tuple
    findings: tuple = field(default=())


def member_flows_at_head(pumps, H) -> np.ndarray:
    """Each pump's flow at common heads ``H`` [m], zero at or above its shut-off [m³/s].

    Parameters
    ----------
    pumps : sequence of PumpCurve
        The members [-]
    H : array_like
        Common heads [m]

    Returns
    -------
    flows : ndarray
        Shaped (pumps, heads) [m³/s]; the combined curve is their sum over axis 0.

    Examples
    --------
    >>> p = PumpCurve([0, 0.01, 0.02], [30.0, 28.0, 22.0], speed_rpm=1450, diameter=0.25)
    >>> member_flows_at_head([p, p], [28.0]).sum().round(6)
    np.float64(0.02)
    """
    H = np.atleast_1d(np.asarray(H, dtype=float))
    return np.array([p.flow_at_head(H) for p in pumps])


def closed_in_heads(pset: PumpSet) -> list[tuple[str, float]]:
    """Each parallel member's shut-off head, highest first: above it that member's check
    valve is closed [m].

    Parameters
    ----------
    pset : PumpSet
        A parallel set [-]

    Returns
    -------
    list of (str, float)
        (member name, shut-off head [m]).

    Examples
    --------
    >>> a = PumpCurve([0, 0.01, 0.02], [30.0, 28.0, 22.0], speed_rpm=1450, diameter=0.25,
    ...               name="a")
    >>> closed_in_heads(parallel([a, a.trimmed(0.23)]))[1][0]
    'a'
    """
    if pset.arrangement != "parallel":
        raise InputError("pump set arrangement", pset.arrangement, "must be 'parallel' for "
                         "shut-off heads of members")
    return sorted(((p.name, p.shutoff_head) for p in pset.pumps), key=lambda x: -x[1])


def set_duty(pset: PumpSet, Q: float, *, rho: float | None = None,
             min_flows: dict | None = None) -> SetDuty:
    """Each member of a parallel or series set at one set flow, with the set's findings.

    Parallel: the common head H solves Σ Q_i(H) = Q (:meth:`PumpSet.head`); a member whose
    shut-off head is at or below H passes nothing (FAIL: dead-headed by the others). Series:
    every member passes Q and the heads add; a member with negative head at Q is driven past
    its zero-head flow (FAIL: it acts as a resistance). Karassik et al. 2008, from memory.

    Parameters
    ----------
    pset : PumpSet
        The set [-]
    Q : float
        Set flow, ≥ 0 [m³/s]
    rho : float, optional
        Liquid density for shaft power [kg/m³]
    min_flows : dict, optional
        Minimum continuous flow per member name; a running member below it is a FAIL [m³/s]

    Returns
    -------
    SetDuty
        Set head, members and findings.

    Examples
    --------
    >>> a = PumpCurve([0, 0.01, 0.02], [30.0, 28.0, 22.0], speed_rpm=1450, diameter=0.25,
    ...               name="a")
    >>> round(set_duty(parallel([a, a]), 0.02).members[0].Q, 6)
    0.01
    """
    if not isinstance(pset, PumpSet):
        raise InputError("pump set", type(pset).__name__, "must be a PumpSet (parallel or "
                         "series)")
    q = check_range("set flow", Q, "m³/s", low=0.0, low_inclusive=True)
    if rho is not None:
        rho = check_range("density", rho, "kg/m³", low=0.0)
    names = [p.name for p in pset.pumps]
    for key, v in (min_flows or {}).items():
        if key not in names:
            raise InputError("minimum flow member", key, f"must name a member: {names}")
        check_range(f"minimum flow of '{key}'", v, "m³/s", low=0.0, low_inclusive=True)
    qs, hs = pset.member_flows(q)
    members, findings = [], []
    for p, qi, hi in zip(pset.pumps, qs[:, 0], hs[:, 0], strict=True):
        qi, hi = float(qi), float(hi)
        sub = f"{pset.name}: pump '{p.name}' at set flow {q:.4g} m³/s"
        if pset.arrangement == "parallel" and qi <= 0.0 and q > 0.0:
            status = "check valve closed"
            findings.append(Finding(
                Severity.FAIL, sub, "flow", 0.0, "m³/s", f"head < shut-off {p.shutoff_head:.4g} m",
                f"the common head {hi:.4g} m is at or above this pump's shut-off head "
                f"{p.shutoff_head:.4g} m: its check valve holds it closed and it runs "
                "dead-headed (it heats up). Stop it or stage by head. " + CAUTIONS["pump"],
                "common practice, no source"))
        elif pset.arrangement == "series" and hi < 0.0:
            status = "resistance"
            findings.append(Finding(
                Severity.FAIL, sub, "head", hi, "m", ">= 0 m",
                "driven past its zero-head flow by the other pumps: it acts as a resistance "
                "(and may cavitate). " + CAUTIONS["pump"], "common practice, no source"))
        else:
            status = "running"
        eta = float(p.efficiency(qi)) if p.has_efficiency else float("nan")
        power = (float(p.power(qi, rho)) if (rho is not None and p.has_efficiency)
                 else float("nan"))
        if status == "check valve closed":
            power = float(p.power(0.0, rho)) if (rho is not None and "power" in p.fits) \
                else float("nan")
        npshr = float(p.npshr(qi)) if p.has_npshr and qi > 0 else float("nan")
        bep = qi / p.bep[0] if p.has_efficiency else float("nan")
        q_min = (min_flows or {}).get(p.name)
        if q_min is not None and status == "running" and qi < q_min:
            findings.append(Finding(
                Severity.FAIL, sub, "flow", qi, "m³/s", f">= {q_min:.4g} m³/s (minimum "
                "continuous flow)", "below the minimum continuous flow: overheating, "
                "recirculation and vibration. " + CAUTIONS["pump"], "the maker's minimum flow",
                low=float(q_min)))
        members.append(MemberDuty(p.name, qi, hi, eta, power, npshr, bep, status))
    findings += pset.range_findings(q)
    H = float(pset.head(q))
    return SetDuty(q, H, pset.arrangement, tuple(members), tuple(findings))


def set_operating_point(pset: PumpSet, system_head, *, rho: float | None = None,
                        min_flows: dict | None = None, label: str = "") -> SetDuty:
    """A set's operating point on a system curve, with every member there.

    The point by :func:`kit.core.operating.operating_point` (Brent's method on set head −
    system head), then :func:`set_duty` at its flow; the findings of both are joined.

    Parameters
    ----------
    pset : PumpSet
        The set [-]
    system_head : callable
        System head over flows [m³/s] -> [m] [-]
    rho : float, optional
        Liquid density for shaft power [kg/m³]
    min_flows : dict, optional
        Minimum continuous flow per member name [m³/s]
    label : str
        Condition label [-]

    Returns
    -------
    SetDuty
        Set flow and head at the operating point, members and findings.

    Examples
    --------
    >>> a = PumpCurve([0, 0.01, 0.02], [30.0, 28.0, 22.0], speed_rpm=1450, diameter=0.25,
    ...               name="a")
    >>> round(set_operating_point(parallel([a, a]), lambda Q: 10 + 7500 * Q**2).Q, 4)
    0.04
    """
    from kit.core.operating import operating_point

    op = operating_point(pset, system_head, rho=rho, label=label)
    duty = set_duty(pset, op.Q, rho=rho, min_flows=min_flows)
    seen = {(f.subject, f.quantity, f.severity) for f in duty.findings}
    extra = tuple(f for f in op.findings
                  if not (f.quantity == "flow" and f.severity == Severity.FAIL)
                  and (f.subject, f.quantity, f.severity) not in seen)
    return SetDuty(duty.Q, duty.H, duty.arrangement, duty.members, duty.findings + extra)


class DutyStandby:
    """Installed units of which ``n_duty`` run and the rest stand by.

    Parameters
    ----------
    units : sequence of PumpCurve
        Installed units, duty first (repeat one curve for identical pumps) [-]
    n_duty : int
        Units that may run at once, 1 ≤ n_duty ≤ installed [-]
    name : str, optional
        Tag of the set [-]

    Notes
    -----
    A standby does not add capacity: the running set is at most ``n_duty`` units. The N+1
    check (:meth:`n_plus_1`) takes each unit out in turn (a unit in repair); the best
    ``n_duty`` of the rest, at their flows at the duty head, must still meet the duty flow
    (common practice, no source: the usual spare philosophy for essential services).

    Examples
    --------
    >>> p = PumpCurve([0, 0.01, 0.02], [30.0, 28.0, 22.0], speed_rpm=1450, diameter=0.25)
    >>> ds = DutyStandby.identical(p, 2, 1)
    >>> ds.installed, round(float(ds.capacity(28.0)), 6)
    (3, 0.02)
    """

    def __init__(self, units, n_duty: int, name: str | None = None):
        units = tuple(units)
        if not units:
            raise InputError("installed units", "()", "must hold at least one pump")
        for i, u in enumerate(units):
            if not isinstance(u, PumpCurve):
                raise InputError(f"installed unit {i + 1}", type(u).__name__,
                                 "must be a PumpCurve")
        if isinstance(n_duty, bool) or not isinstance(n_duty, (int, np.integer)):
            raise InputError("number of duty pumps", n_duty, "must be a whole number")
        self.n_duty = int(check_range("number of duty pumps", n_duty, "pumps", low=1,
                                      high=len(units), low_inclusive=True))
        self.units = units
        self.name = name or f"{self.n_duty} duty + {len(units) - self.n_duty} standby"

    @classmethod
    def identical(cls, pump: PumpCurve, n_duty: int, n_standby: int,
                  name: str | None = None) -> DutyStandby:
        """``n_duty`` + ``n_standby`` units of one curve [-] -> DutyStandby.

        >>> p = PumpCurve([0, 0.01, 0.02], [30.0, 28.0, 22.0], speed_rpm=1450, diameter=0.25)
        >>> DutyStandby.identical(p, 1, 1).n_standby
        1
        """
        if isinstance(n_standby, bool) or not isinstance(n_standby, (int, np.integer)):
            raise InputError("number of standby pumps", n_standby, "must be a whole number")
        m = int(check_range("number of standby pumps", n_standby, "pumps", low=0, high=12,
                            low_inclusive=True))
        if isinstance(n_duty, bool) or not isinstance(n_duty, (int, np.integer)):
            raise InputError("number of duty pumps", n_duty, "must be a whole number")
        n = int(check_range("number of duty pumps", n_duty, "pumps", low=1, high=12,
                            low_inclusive=True))
        return cls([pump] * (n + m), n, name)

    @property
    def installed(self) -> int:
        """Installed units [-]."""
        return len(self.units)

    @property
    def n_standby(self) -> int:
        """Standby units [-]."""
        return len(self.units) - self.n_duty

    @property
    def identical_unit(self) -> PumpCurve:
        """The one curve of a set of identical units (for staging studies) -> PumpCurve."""
        first = self.units[0]
        for i, u in enumerate(self.units[1:], start=2):
            same = u is first or (
                np.array_equal(u.flow, first.flow) and np.array_equal(u.head_points,
                                                                      first.head_points)
                and u.speed_rpm == first.speed_rpm and u.diameter == first.diameter)
            if not same:
                raise InputError(f"installed unit {i}", u.name, f"differs from unit 1 "
                                 f"('{first.name}'); staging needs identical units")
        return first

    def running(self):
        """The duty units as run: one PumpCurve, or a parallel PumpSet of ``n_duty``."""
        duty = self.units[:self.n_duty]
        return duty[0] if len(duty) == 1 else parallel(duty, name=f"{self.name} (running)")

    def _best_flow(self, units, H: float) -> float:
        flows = [min(float(u.flow_at_head(H)), u.q_end) for u in units]
        return float(sum(sorted(flows, reverse=True)[:self.n_duty]))

    def capacity(self, H: float) -> float:
        """Flow of the best ``n_duty`` units at head ``H`` [m], each at most its last
        datasheet flow -> [m³/s]; standby units add nothing."""
        H = check_range("duty head", H, "m", low=0.0, low_inclusive=True)
        return self._best_flow(self.units, H)

    def n_plus_1(self, Q_req: float, H_req: float) -> list[Finding]:
        """N+1 check: the duty (Q_req [m³/s] at H_req [m]) with each unit out in turn.

        Returns one finding for the full set and one per unit out (identical units: one):
        PASS when met, FAIL when not.

        >>> p = PumpCurve([0, 0.01, 0.02], [30.0, 28.0, 22.0], speed_rpm=1450, diameter=0.25)
        >>> [f.severity.value for f in DutyStandby.identical(p, 2, 0).n_plus_1(0.02, 28.0)]
        ['pass', 'fail']
        """
        q = check_range("duty flow", Q_req, "m³/s", low=0.0)
        H = check_range("duty head", H_req, "m", low=0.0, low_inclusive=True)
        out = []
        full = self._best_flow(self.units, H)
        out.append(Finding(
            Severity.PASS if full >= q * (1 - 1e-9) else Severity.FAIL,
            f"{self.name}, all units available", "flow at duty head", full, "m³/s",
            f">= {q:.4g} m³/s", f"{self.n_duty} running unit(s) must deliver the duty flow at "
            f"{H:.4g} m; standby units add no capacity", "common practice, no source",
            low=q))
        seen = set()
        for i in range(len(self.units)):
            rest = self.units[:i] + self.units[i + 1:]
            key = tuple(id(u) for u in sorted(rest, key=id))
            if key in seen:
                continue
            seen.add(key)
            got = self._best_flow(rest, H)
            ok = got >= q * (1 - 1e-9)
            out.append(Finding(
                Severity.PASS if ok else Severity.FAIL,
                f"{self.name}, unit {i + 1} ('{self.units[i].name}') out", "flow at duty head",
                got, "m³/s", f">= {q:.4g} m³/s", "N+1: with any one unit out of service the "
                "remaining units must still meet the duty" + ("" if ok else
                                                              " — add a standby unit"),
                "common practice, no source", low=q))
        return out

    def __repr__(self) -> str:
        return f"DutyStandby({self.name!r}, units={[u.name for u in self.units]})"
