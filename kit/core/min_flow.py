"""Minimum continuous flow of a pump, and a recirculation orifice that keeps it.

Minimum flow, in order of authority:

1. the maker's minimum continuous stable (or thermal) flow, when given — it governs;
2. a **thermal** estimate: the flow at which the liquid's temperature rise through the pump
   reaches a limit. The power not turned into head heats the flow passing through:
   ρ Q c_p ΔT = P (1 − η) with P = ρ g Q H / η, so

   .. math:: \\Delta T = \\frac{g H (1 - \\eta)}{\\eta c_p}

   (energy balance; Karassik et al., *Pump Handbook*, 4th ed., McGraw-Hill 2008, from
   memory);
3. a **hydraulic** estimate: a fraction of BEP flow by pump class
   (:data:`MIN_FLOW_FRACTIONS`, common practice, no source).

Without the maker's value the larger estimate is used and a CHECK finding says so.

The recirculation line returns flow from the discharge to the suction source through a
restriction orifice. Its bore is sized so that with the discharge closed in the pump runs at
its minimum flow, all of it recirculating: the orifice's permanent pressure loss at that flow
equals ρ g [H_pump(Q_min) − static head − line losses]. The orifice is a square-edged plate
to ISO 5167-2:2003: discharge coefficient by the Reader-Harris/Gallagher equation
(:func:`fluids.flow_meter.C_Reader_Harris_Gallagher`), tap pressure difference from the
orifice equation, permanent loss by :func:`fluids.flow_meter.dP_orifice`; the bore by
Brent's method.

Example
-------
>>> from kit.core.pump import PumpCurve
>>> p = PumpCurve([0, 0.01, 0.02, 0.03], [40.0, 38.0, 32.0, 22.0], speed_rpm=2900,
...               diameter=0.2, efficiency=[0.0, 0.55, 0.72, 0.68])
>>> mf = minimum_flow(p, cp=4180.0, dT_max=8.0)
>>> mf.basis, round(mf.Q_min, 5)
('hydraulic estimate', 0.00675)
"""

from __future__ import annotations

import math
from collections.abc import Callable
from dataclasses import dataclass, field

import numpy as np

from kit.core.findings import CAUTIONS, Finding, Severity
from kit.core.pump import PumpCurve
from kit.errors import InputError, NoSolutionError, check_choice, check_range

__all__ = ["MIN_FLOW_FRACTIONS", "THERMAL_RISE_DEFAULT", "ORIFICE_LIMITS", "temperature_rise",
           "thermal_min_flow", "hydraulic_min_flow", "MinimumFlow", "minimum_flow",
           "RecirculationOrifice", "recirculation_orifice"]

from kit.core.constants import G  # noqa: E402  (one gravity constant)

_NO_SOURCE = "common practice, no source"

#: Minimum continuous flow as a fraction of BEP flow, by pump class (common practice, no
#: source). ``range`` is the spread commonly quoted; ``fraction`` the value used.
MIN_FLOW_FRACTIONS: dict[str, dict] = {
    "low_energy": {"fraction": 0.20, "range": (0.10, 0.30),
                   "label": "small, low-energy end-suction pump", "source": _NO_SOURCE},
    "general": {"fraction": 0.30, "range": (0.25, 0.40), "label": "general process pump",
                "source": _NO_SOURCE},
    "high_energy": {"fraction": 0.50, "range": (0.40, 0.70),
                    "label": "high suction energy, high power or high specific speed pump",
                    "source": _NO_SOURCE},
    "mixed_axial": {"fraction": 0.65, "range": (0.60, 0.80),
                    "label": "mixed-flow or axial-flow pump", "source": _NO_SOURCE},
}

#: Default limit of the temperature rise through the pump at minimum flow [K].
THERMAL_RISE_DEFAULT: dict[str, object] = {
    "value": 8.0,
    "source": "common practice, no source: limits of 5–10 K are quoted; the margin of the "
              "heated liquid to its vapour pressure (NPSH) can set a lower one",
}

#: Validity of the ISO 5167-2 orifice equations (from memory), and the cavitation-index
#: level below which a single plate is flagged (common practice, no source).
ORIFICE_LIMITS: dict[str, object] = {
    "D": (0.05, 1.0), "d_min": 0.0125, "beta": (0.1, 0.75), "Re_D_min": 5000.0,
    "source": "ISO 5167-2:2003 orifice plates, limits from memory",
    "sigma_check": 2.0,
    "sigma_source": "common practice, no source: a single restriction plate with a cavitation "
                    "index (p_down − p_v)/Δp below about 2 is prone to cavitation noise and "
                    "damage; multi-stage plates or a rated valve are used",
}


def temperature_rise(pump: PumpCurve, Q, cp: float):
    """Temperature rise of the liquid through the pump, ΔT = g H (1 − η) / (η c_p).

    Energy balance (Karassik et al. 2008, from memory): the shaft power not turned into
    head heats the flow passing through.

    Parameters
    ----------
    pump : PumpCurve
        Pump with an efficiency (or power) curve [-]
    Q : array_like
        Flows, > 0 [m³/s]
    cp : float
        Specific heat capacity of the liquid [J/(kg·K)]

    Returns
    -------
    dT : ndarray
        Temperature rise [K] (inf where the fitted efficiency is 0)

    Examples
    --------
    >>> from kit.core.pump import PumpCurve
    >>> p = PumpCurve([0, 0.01, 0.02, 0.03], [40.0, 38.0, 32.0, 22.0], speed_rpm=2900,
    ...               diameter=0.2, efficiency=[0.0, 0.55, 0.72, 0.68])
    >>> round(float(temperature_rise(p, 0.02, 4180.0)), 4)
    0.0256
    """
    c = check_range("specific heat capacity", cp, "J/(kg·K)", low=0.0)
    Q = np.asarray(Q, dtype=float)
    if np.any(~np.isfinite(Q)) or np.any(Q <= 0):
        check_range("flow", float(Q.reshape(-1)[np.argmin(np.where(np.isfinite(Q), Q,
                                                                   -np.inf).reshape(-1))]),
                    "m³/s", low=0.0)
    eta = pump.efficiency(Q)
    with np.errstate(divide="ignore"):
        return np.where(eta > 0, G * pump.head(Q) * (1 - eta) / (np.where(eta > 0, eta, 1.0) * c),
                        np.inf)


def thermal_min_flow(pump: PumpCurve, cp: float, dT_max: float) -> float:
    """Flow at which the temperature rise through the pump reaches ``dT_max``.

    ΔT(Q) = g H (1 − η)/(η c_p) (Karassik et al. 2008, from memory) falls with flow below
    BEP; the root of ΔT(Q) = dT_max on (0, Q_BEP] by Brent's method
    (:func:`scipy.optimize.brentq`) on the largest flow where ΔT still exceeds the limit.

    Parameters
    ----------
    pump : PumpCurve
        Pump with an efficiency (or power) curve [-]
    cp : float
        Specific heat capacity of the liquid [J/(kg·K)]
    dT_max : float
        Allowed temperature rise, 0–100 [K]

    Returns
    -------
    Q_min : float
        Thermal minimum flow [m³/s]

    Examples
    --------
    >>> from kit.core.pump import PumpCurve
    >>> p = PumpCurve([0, 0.01, 0.02, 0.03], [40.0, 38.0, 32.0, 22.0], speed_rpm=2900,
    ...               diameter=0.2, efficiency=[0.0, 0.55, 0.72, 0.68])
    >>> round(thermal_min_flow(p, 4180.0, 0.5), 7)
    0.0023732
    """
    from scipy.optimize import brentq

    if not pump.has_efficiency:
        raise InputError(f"efficiency of pump '{pump.name}'", "none",
                         "is needed for the thermal minimum flow")
    cp = check_range("specific heat capacity", cp, "J/(kg·K)", low=0.0)
    lim = check_range("allowed temperature rise", dT_max, "K", low=0.0, high=100.0)
    q_bep = pump.bep[0]
    qs = np.geomspace(q_bep * 1e-6, q_bep, 400)
    dT = temperature_rise(pump, qs, cp)
    if dT[-1] > lim:
        raise NoSolutionError("thermal minimum flow",
                              f"the temperature rise at BEP ({dT[-1]:.4g} K) already exceeds "
                              f"the limit {lim:.4g} K")
    over = np.flatnonzero(dT > lim)
    if over.size == 0:
        return float(qs[0])
    i = int(over[-1])

    def f(q):
        return float(temperature_rise(pump, q, cp)) - lim

    return float(brentq(f, qs[i], qs[i + 1], xtol=1e-14))


def hydraulic_min_flow(pump: PumpCurve, pump_class: str = "general") -> float:
    """Minimum flow as a fraction of BEP flow by pump class (common practice, no source).

    Parameters
    ----------
    pump : PumpCurve
        Pump with an efficiency (or power) curve [-]
    pump_class : str
        Key of :data:`MIN_FLOW_FRACTIONS` [-]

    Returns
    -------
    Q_min : float
        Hydraulic minimum flow estimate [m³/s]

    Examples
    --------
    >>> from kit.core.pump import PumpCurve
    >>> p = PumpCurve([0, 0.01, 0.02, 0.03], [40.0, 38.0, 32.0, 22.0], speed_rpm=2900,
    ...               diameter=0.2, efficiency=[0.0, 0.55, 0.72, 0.68])
    >>> round(hydraulic_min_flow(p, "high_energy"), 5)
    0.01125
    """
    check_choice("pump class for minimum flow", pump_class, MIN_FLOW_FRACTIONS)
    if not pump.has_efficiency:
        raise InputError(f"efficiency of pump '{pump.name}'", "none",
                         "is needed for the BEP flow")
    return MIN_FLOW_FRACTIONS[pump_class]["fraction"] * pump.bep[0]


@dataclass(frozen=True)
class MinimumFlow:
    """The minimum continuous flow used [m³/s], its basis, every estimate, and findings."""

    Q_min: float
    basis: str
    estimates: dict
    findings: tuple = field(default=())


def minimum_flow(pump: PumpCurve, *, maker: float | None = None, cp: float | None = None,
                 dT_max: float | None = None, pump_class: str = "general") -> MinimumFlow:
    """Minimum continuous flow: the maker's value, else the larger of the estimates.

    Parameters
    ----------
    pump : PumpCurve
        Pump with an efficiency (or power) curve [-]
    maker : float, optional
        The maker's minimum continuous flow [m³/s]
    cp : float, optional
        Specific heat capacity, for the thermal estimate [J/(kg·K)]
    dT_max : float, optional
        Allowed temperature rise; default :data:`THERMAL_RISE_DEFAULT` [K]
    pump_class : str
        Key of :data:`MIN_FLOW_FRACTIONS` for the hydraulic estimate [-]

    Returns
    -------
    MinimumFlow
        The value used, its basis and the estimates.

    Examples
    --------
    >>> from kit.core.pump import PumpCurve
    >>> p = PumpCurve([0, 0.01, 0.02, 0.03], [40.0, 38.0, 32.0, 22.0], speed_rpm=2900,
    ...               diameter=0.2, efficiency=[0.0, 0.55, 0.72, 0.68])
    >>> minimum_flow(p, maker=0.004).basis
    "maker's value"
    """
    est = {"hydraulic": hydraulic_min_flow(pump, pump_class)}
    lim = THERMAL_RISE_DEFAULT["value"] if dT_max is None else dT_max
    if cp is not None:
        est["thermal"] = thermal_min_flow(pump, cp, lim)
    subject = f"pump '{pump.name}'"
    findings = []
    if maker is not None:
        q = check_range("maker's minimum flow", maker, "m³/s", low=0.0)
        if q > pump.bep[0]:
            raise InputError("maker's minimum flow", q, f"must not exceed the BEP flow "
                             f"{pump.bep[0]:.6g} m³/s", "m³/s")
        findings.append(Finding(Severity.PASS, subject, "minimum continuous flow", q, "m³/s",
                                "maker's value", "the maker's minimum continuous flow governs",
                                "the maker's datasheet"))
        if "thermal" in est and est["thermal"] > q:
            findings.append(Finding(
                Severity.CHECK, subject, "thermal minimum flow", est["thermal"], "m³/s",
                f"<= {q:.4g} m³/s (maker's value)", f"the liquid heats by more than {lim:g} K "
                "at the maker's minimum flow: confirm the maker's value for this liquid",
                THERMAL_RISE_DEFAULT["source"]))
        return MinimumFlow(q, "maker's value", est, tuple(findings))
    basis = max(est, key=est.get)
    q = est[basis]
    src = (MIN_FLOW_FRACTIONS[pump_class]["source"] if basis == "hydraulic"
           else THERMAL_RISE_DEFAULT["source"] + "; energy balance, Karassik et al. 2008 "
           "(from memory)")
    findings.append(Finding(Severity.CHECK, subject, "minimum continuous flow", q, "m³/s",
                            "an estimate", f"{basis} estimate (larger of {sorted(est)}): get "
                            "the maker's minimum continuous stable flow. " + CAUTIONS["pump"],
                            src))
    return MinimumFlow(q, f"{basis} estimate", est, tuple(findings))


@dataclass(frozen=True)
class RecirculationOrifice:
    """A sized recirculation orifice (SI).

    Attributes: ``Q`` recirculated flow [m³/s], ``D`` line bore [m], ``d`` orifice bore [m],
    ``beta`` [-], ``C`` discharge coefficient [-], ``dp_taps`` flange-tap pressure difference
    [Pa], ``dp_loss`` permanent pressure loss [Pa], ``H_pump`` pump head at ``Q`` [m],
    ``dp_shutoff`` the loss the plate takes at shut-off head (pressure rating) [Pa], ``sigma``
    cavitation index (NaN without pressures) [-], ``findings``, and
    :meth:`flow_at_head` for the bypass flow at another pump head.
    """

    Q: float
    D: float
    d: float
    beta: float
    C: float
    dp_taps: float
    dp_loss: float
    H_pump: float
    dp_shutoff: float
    sigma: float
    rho: float
    mu: float
    static_head: float
    line_loss: Callable | None
    taps: str
    findings: tuple = field(default=())

    def flow_at_head(self, H: float) -> float:
        """Flow through the recirculation line when the pump makes head ``H`` [m] -> [m³/s]
        (e.g. the continuous bypass at the duty point), by Brent's method."""
        from scipy.optimize import brentq

        H = check_range("pump head", H, "m", low=0.0)

        def f(q):
            return _loss_head(self, q) - (H - self.static_head)

        if f(1e-12) >= 0:
            return 0.0
        hi = self.Q
        while f(hi) < 0:
            hi *= 2.0
        return float(brentq(f, 1e-12, hi, xtol=1e-15))


def _orifice(D, d, rho, mu, Q, taps):
    """(C, tap dp [Pa], permanent loss [Pa]) of an ISO 5167-2 plate at flow Q (ε = 1)."""
    from fluids.flow_meter import C_Reader_Harris_Gallagher, dP_orifice

    m = rho * Q
    beta = d / D
    C = C_Reader_Harris_Gallagher(D, d, rho, mu, m, taps=taps)
    dp = (m * math.sqrt(1 - beta ** 4) / (C * math.pi / 4 * d * d)) ** 2 / (2 * rho)
    return C, dp, dP_orifice(D, d, dp + 1e5, 1e5, C)


def _loss_head(r: RecirculationOrifice, q: float) -> float:
    line = 0.0 if r.line_loss is None else float(np.asarray(r.line_loss(np.array([q]))).reshape(-1)[0])
    return _orifice(r.D, r.d, r.rho, r.mu, q, r.taps)[2] / (r.rho * G) + line


def recirculation_orifice(pump: PumpCurve, Q_min: float, *, D: float, rho: float, mu: float,
                          static_head: float = 0.0, line_loss: Callable | None = None,
                          p_down: float | None = None, p_vapour: float | None = None,
                          taps: str = "flange") -> RecirculationOrifice:
    """Size a restriction orifice so the recirculation line passes the minimum flow.

    With the discharge closed the pump runs at ``Q_min``, all of it through the line:
    ρ g [H_pump(Q_min) − static_head − line_loss(Q_min)] is the orifice's permanent loss.
    Square-edged plate to ISO 5167-2:2003: C by Reader-Harris/Gallagher
    (:func:`fluids.flow_meter.C_Reader_Harris_Gallagher`), permanent loss by
    :func:`fluids.flow_meter.dP_orifice`; the bore by Brent's method over β = 0.1–0.75.

    Parameters
    ----------
    pump : PumpCurve
        The pump [-]
    Q_min : float
        Flow to recirculate (the minimum continuous flow) [m³/s]
    D : float
        Bore of the recirculation line at the orifice [m]
    rho : float
        Liquid density [kg/m³]
    mu : float
        Liquid dynamic viscosity [Pa·s]
    static_head : float
        Head of the return point above the suction source surface, including a free jet's
        velocity head [m]
    line_loss : callable, optional
        Losses of the loop other than the orifice (suction line, recirculation pipe and
        fittings) over flows [m³/s] -> [m] [-]
    p_down : float, optional
        Absolute pressure downstream of the plate, for the cavitation index [Pa]
    p_vapour : float, optional
        Vapour pressure of the liquid [Pa]
    taps : str
        Tap arrangement for C: ``"flange"``, ``"corner"`` or ``"D"`` [-]

    Returns
    -------
    RecirculationOrifice
        The bore, its coefficient and losses, and findings.

    Notes
    -----
    Sizing at the shut-off head instead would give a smaller bore that passes less than
    ``Q_min`` when the pump is closed in; the shut-off loss is reported for the plate's
    pressure rating. :class:`NoSolutionError` when the loop without a plate already passes
    less than ``Q_min`` (enlarge the line), or when the bore would need β < 0.1 (use a
    multi-stage orifice).

    Examples
    --------
    >>> from kit.core.pump import PumpCurve
    >>> p = PumpCurve([0, 0.01, 0.02, 0.03], [40.0, 38.0, 32.0, 22.0], speed_rpm=2900,
    ...               diameter=0.2, efficiency=[0.0, 0.55, 0.72, 0.68])
    >>> ro = recirculation_orifice(p, 0.006, D=0.05, rho=998.0, mu=1.0e-3)
    >>> round(ro.d * 1000, 2), round(ro.beta, 3)
    (20.17, 0.403)
    """
    from scipy.optimize import brentq

    q = check_range("recirculated flow", Q_min, "m³/s", low=0.0)
    D = check_range("recirculation line bore", D, "m", low=0.0, high=2.0)
    rho = check_range("density", rho, "kg/m³", low=0.0)
    mu = check_range("viscosity", mu, "Pa·s", low=0.0)
    zs = check_range("return static head", static_head, "m", low=-1e3, high=1e4)
    check_choice("orifice taps", taps, ("flange", "corner", "D"))
    H = float(pump.head(q))
    line = 0.0 if line_loss is None else float(np.asarray(line_loss(np.array([q]))).reshape(-1)[0])
    avail = rho * G * (H - zs - line)
    if avail <= 0:
        raise NoSolutionError("recirculation orifice",
                              f"at {q:.4g} m³/s the pump head {H:.4g} m does not cover the static "
                              f"head {zs:.4g} m and line losses {line:.4g} m: the line passes "
                              "less than the minimum flow without a plate — enlarge the line")
    lo_b, hi_b = ORIFICE_LIMITS["beta"]

    def f(beta):
        return _orifice(D, beta * D, rho, mu, q, taps)[2] - avail

    if f(lo_b) < 0:
        raise NoSolutionError("recirculation orifice",
                              f"a loss of {avail:.4g} Pa needs a bore below β = {lo_b:g} of "
                              f"the {D:.4g} m line: use a multi-stage orifice or a smaller line")
    if f(hi_b) > 0:
        raise NoSolutionError("recirculation orifice",
                              f"even β = {hi_b:g} loses more than the {avail:.4g} Pa available: "
                              "enlarge the recirculation line")
    beta = float(brentq(f, lo_b, hi_b, xtol=1e-14))
    d = beta * D
    C, dp, loss = _orifice(D, d, rho, mu, q, taps)
    subject = f"recirculation orifice of pump '{pump.name}'"
    findings = []
    lim = ORIFICE_LIMITS
    Re = 4 * rho * q / (math.pi * D * mu)
    if not (lim["D"][0] <= D <= lim["D"][1]) or d < lim["d_min"] or Re < lim["Re_D_min"]:
        findings.append(Finding(
            Severity.CHECK, subject, "ISO 5167-2 range", Re, "-",
            f"D {lim['D'][0]:g}–{lim['D'][1]:g} m, d ≥ {lim['d_min']:g} m, Re_D ≥ "
            f"{lim['Re_D_min']:g}", "outside the orifice standard's range: the discharge "
            "coefficient is extrapolated; the plate maker's sizing governs", lim["source"]))
    H0 = pump.shutoff_head
    dp0 = rho * G * (H0 - zs)
    sigma = float("nan")
    if p_down is not None and p_vapour is not None:
        pd = check_range("downstream pressure", p_down, "Pa", low=0.0)
        pv = check_range("vapour pressure", p_vapour, "Pa", low=0.0, low_inclusive=True)
        sigma = (pd - pv) / loss
        sev = Severity.PASS if sigma >= lim["sigma_check"] else Severity.CHECK
        findings.append(Finding(sev, subject, "cavitation index", sigma, "-",
                                f">= {lim['sigma_check']:g}", "(p_down − p_v)/Δp of the plate. "
                                + CAUTIONS["cavitation"], lim["sigma_source"],
                                low=lim["sigma_check"]))
    findings.append(Finding(Severity.CHECK, subject, "loss at shut-off", dp0, "Pa",
                            "plate and line rated for it", "the plate takes up to the shut-off "
                            "differential if the line's losses vanish; rate it for that. "
                            + CAUTIONS["pressure"], _NO_SOURCE))
    return RecirculationOrifice(q, D, d, beta, C, dp, loss, H, dp0, sigma, rho, mu, zs,
                                line_loss, taps, tuple(findings))
