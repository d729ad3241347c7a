"""Operating point of a pump on a system curve, NPSH, BEP region, energy and speed control.

The system enters as a callable ``system_head(Q: ndarray) -> ndarray`` [m of the pumped liquid]
over flow [m³/s]; the pump is a :class:`kit.core.pump.PumpCurve` or :class:`PumpSet` (anything
with ``head(Q)``, ``q_end`` and ``shutoff_head``). NPSH inputs are SI floats.

Methods:

- operating point: intersection of pump and system curves, bracketed on a sampled grid and
  solved by Brent's method (Brent 1973, *Algorithms for Minimization without Derivatives*,
  via :func:`scipy.optimize.brentq`);
- NPSH available from its definition (see :func:`npsh_available`), margins against the
  guideline ranges recalled from ANSI/HI 9.6.1 (:data:`NPSH_MARGINS`, from memory);
- operating region relative to BEP recalled from ANSI/HI 9.6.3 (:data:`BEP_REGIONS`, from
  memory; the allowable region is the maker's);
- throttling against speed control, with drive losses from :func:`fluids.VFD_efficiency`.

Example
-------
>>> from kit.core.pump import PumpCurve
>>> p = PumpCurve([0, 0.01, 0.02, 0.03], [40.0, 38.0, 32.0, 22.0], speed_rpm=2900, diameter=0.2,
...               efficiency=[0.0, 0.55, 0.72, 0.68])
>>> op = operating_point(p, lambda Q: 10.0 + 30000.0 * Q**2, rho=998.0)
>>> round(op.Q, 5), round(op.H, 2)
(0.02449, 28.0)
"""

from __future__ import annotations

from collections.abc import Callable, Mapping
from dataclasses import dataclass, field

import fluids
import numpy as np
from scipy.optimize import brentq

from kit.core.findings import CAUTIONS, Finding, Severity
from kit.core.motors import select_motor
from kit.errors import InputError, NoSolutionError, UnknownChoiceError, check_choice, check_range

__all__ = [
    "G", "NPSH_MARGINS", "BEP_REGIONS", "J_PER_KWH", "OperatingPoint", "Condition",
    "operating_point", "operating_points", "npsh_available", "npsh_findings", "bep_findings",
    "annual_energy", "joules_to_kWh", "annual_cost", "ControlCase", "ControlComparison",
    "compare_control",
]

#: Standard gravity [m/s²] (CGPM 1901).
G = 9.80665
J_PER_KWH = 3.6e6

_HI961 = ("ANSI/HI 9.6.1 Rotodynamic Pumps — Guideline for NPSH Margin (Hydraulic Institute), "
          "ranges from memory; the maker's NPSHr (NPSH3) basis and the current edition govern")
_HI963 = ("ANSI/HI 9.6.3 Rotodynamic Pumps — Guideline for Allowable Operating Region "
          "(Hydraulic Institute), from memory")

#: NPSH margin guideline per application: minimum NPSHa/NPSHr ratio and minimum margin [m].
#: Lower ends of the ranges recalled from ANSI/HI 9.6.1 (from memory) and a metre floor
#: (common practice, no source).
NPSH_MARGINS: dict[str, dict] = {
    "general": {"ratio": 1.1, "metres": 1.0, "label": "general industrial",
                "source": _HI961},
    "water_wastewater": {"ratio": 1.3, "metres": 1.0, "label": "water and wastewater",
                         "source": _HI961},
    "petroleum_chemical": {"ratio": 1.1, "metres": 0.6, "label": "petroleum and chemical process",
                           "source": _HI961},
    "cooling_tower": {"ratio": 1.3, "metres": 1.0, "label": "cooling tower circulation",
                      "source": _HI961},
    "boiler_feed": {"ratio": 1.5, "metres": 1.0, "label": "boiler feed / power plant",
                    "source": _HI961},
}

#: Operating regions as fractions of BEP flow. ``por`` from ANSI/HI 9.6.3 (from memory);
#: ``aor`` is a placeholder the maker replaces (common practice, no source).
BEP_REGIONS: dict[str, dict] = {
    "low_specific_speed": {"por": (0.70, 1.20), "aor": (0.50, 1.30),
                           "label": "specific speed below ~4500 (US units)", "source": _HI963},
    "high_specific_speed": {"por": (0.80, 1.15), "aor": (0.60, 1.25),
                            "label": "specific speed ~4500 and above (US units)",
                            "source": _HI963},
}


@dataclass(frozen=True)
class OperatingPoint:
    """Where a pump meets a system curve (SI).

    Attributes: ``label``, ``Q`` [m³/s], ``H`` [m], ``efficiency`` [-] (NaN if unknown),
    ``npshr`` [m] (NaN if unknown), ``shaft_power`` [W] (NaN without density or efficiency),
    ``bep_fraction`` [-] (Q / BEP flow, NaN if unknown), ``npsha`` [m] (NaN if not given),
    ``findings``, ``members`` ((name, Q, H) per pump of a set).
    """

    label: str
    Q: float
    H: float
    efficiency: float
    npshr: float
    shaft_power: float
    bep_fraction: float
    npsha: float = float("nan")
    findings: tuple[Finding, ...] = ()
    members: tuple[tuple[str, float, float], ...] = ()


@dataclass(frozen=True)
class Condition:
    """One condition of a band: the system curve and, optionally, density and NPSHa.

    ``npsha`` is a float [m] or a callable of flow [m³/s] -> [m] (suction loss depends on flow).
    """

    system_head: Callable
    rho: float | None = None
    npsha: float | Callable | None = None
    npsh_application: str = "general"


def _scalar(fn: Callable, q: float) -> float:
    return float(np.asarray(fn(np.array([q], dtype=float)), dtype=float).reshape(-1)[0])


def operating_point(pump, system_head: Callable, Q_max: float | None = None, *,
                    rho: float | None = None, npsha=None, label: str = "",
                    npsh_application: str = "general", bep_region: str = "low_specific_speed",
                    samples: int = 64) -> OperatingPoint:
    """Operating point: the flow where pump head equals system head.

    Solves ``pump.head(Q) − system_head(Q) = 0`` on [0, Q_max]: the difference is sampled on
    ``samples`` flows, the first sign change brackets the root and Brent's method
    (Brent 1973, via :func:`scipy.optimize.brentq`) refines it to machine precision.

    Parameters
    ----------
    pump : PumpCurve or PumpSet
        Pump or set of pumps [-]
    system_head : callable
        System head over an array of flows [m³/s] -> [m]
    Q_max : float, optional
        Upper end of the search; default the last datasheet flow (``pump.q_end``) [m³/s]
    rho : float, optional
        Liquid density for shaft power [kg/m³]
    npsha : float or callable, optional
        NPSH available at the pump (or a function of flow) for NPSH findings [m]
    label : str, optional
        Condition label, e.g. "low level / 40 degC / aged" [-]
    npsh_application : str, optional
        Key of :data:`NPSH_MARGINS` [-]
    bep_region : str, optional
        Key of :data:`BEP_REGIONS` [-]
    samples : int, optional
        Flows sampled to bracket the root [-]

    Returns
    -------
    OperatingPoint
        The point with its findings.

    Notes
    -----
    :class:`NoSolutionError` when the shut-off head is at or below the system head at zero
    flow (the pump cannot lift the liquid), or when the pump head still exceeds the system
    head at ``Q_max`` (run-out beyond the curve). More than one intersection gives a CHECK
    finding (the lowest-flow one is returned).

    Examples
    --------
    >>> from kit.core.pump import PumpCurve
    >>> p = PumpCurve([0, 0.01, 0.02], [30.0, 28.0, 22.0], speed_rpm=1450, diameter=0.25)
    >>> round(operating_point(p, lambda Q: 10.0 + 30000.0 * Q**2).Q, 6)
    0.02
    """
    check_choice("NPSH margin application", npsh_application, NPSH_MARGINS)
    check_choice("BEP region", bep_region, BEP_REGIONS)
    q_top = pump.q_end if Q_max is None else check_range("Q_max", Q_max, "m³/s", low=0.0)
    subject = f"pump '{pump.name}'" + (f" at {label}" if label else "")
    Qs = np.linspace(0.0, q_top, max(int(samples), 2))
    Hp = np.asarray(pump.head(Qs), dtype=float)
    Hs = np.asarray(system_head(Qs), dtype=float)
    if Hs.shape != Qs.shape or not np.all(np.isfinite(Hs)):
        raise InputError("system head", "array", f"must return one finite head per flow ({Qs.size})")
    d = Hp - Hs
    tol = 1e-9 * max(1.0, abs(float(Hp[0])))
    if d[0] <= 0.0:
        raise NoSolutionError(
            "operating point" + (f" at {label}" if label else ""),
            f"shut-off head {Hp[0]:.4g} m of pump '{pump.name}' is at or below the static head "
            f"{Hs[0]:.4g} m (system head at zero flow): the pump cannot deliver; it would run "
            "dead-headed")
    below = d <= tol
    if not below.any():
        where = "the last datasheet flow" if Q_max is None else "Q_max"
        raise NoSolutionError(
            "operating point" + (f" at {label}" if label else ""),
            f"run-out beyond the curve: at {where} {q_top:.4g} m³/s the pump head {Hp[-1]:.4g} m "
            f"still exceeds the system head {Hs[-1]:.4g} m (pass a larger Q_max to search the "
            "extrapolated curve)")
    k = int(np.argmax(below))  # first sample where the pump no longer exceeds the system
    crossings = int(np.count_nonzero(below[1:] != below[:-1]))

    def f(q):
        return float(pump.head(q)) - _scalar(system_head, q)

    if abs(d[k]) <= tol:
        Q = float(Qs[k])
    else:
        Q = float(brentq(f, Qs[k - 1], Qs[k], xtol=1e-14, rtol=4 * np.finfo(float).eps,
                         maxiter=200))
    H = float(pump.head(Q))
    findings: list[Finding] = list(pump.scaling_findings)
    gap = abs(f(Q))
    if gap > 1e-6 * max(1.0, abs(H)):
        findings.append(Finding(Severity.CHECK, subject, "pump − system head at solution", gap, "m",
                                "< 1e-6 m", "the system curve jumps at the operating point "
                                "(e.g. a laminar/turbulent step); the point sits on the jump",
                                "common practice, no source"))
    if crossings > 1:
        findings.append(Finding(Severity.CHECK, subject, "intersections", float(crossings), "-",
                                "1", "pump and system curves cross more than once: operation may "
                                "be unstable; the lowest-flow crossing is reported",
                                "common practice, no source"))
    findings += pump.range_findings(Q, subject=subject)

    eta = float(pump.efficiency(Q)) if pump.has_efficiency else float("nan")
    npshr = float(pump.npshr(Q)) if pump.has_npshr else float("nan")
    power = float(pump.power(Q, rho)) if (rho is not None and pump.has_efficiency) else float("nan")
    members: tuple = ()
    bep_frac = float("nan")
    if hasattr(pump, "members_at"):
        mem = pump.members_at(Q)
        members = tuple((p.name, q, h) for p, q, h in mem)
        for p, q, _h in mem:
            sub = f"{subject}: pump '{p.name}'"
            if q <= 0.0:
                findings.append(Finding(Severity.FAIL, sub, "flow", q, "m³/s", "> 0 m³/s",
                                        "pump delivers nothing: its shut-off head is below the "
                                        "common head, its check valve holds it closed and it runs "
                                        "dead-headed (overheating). " + CAUTIONS["pump"],
                                        "common practice, no source"))
            elif p.has_efficiency:
                findings += bep_findings(q, p.bep[0], subject=sub, region=bep_region)
        if pump.has_efficiency:
            bep_frac = Q / pump.bep[0]
    elif pump.has_efficiency:
        bep_q = pump.bep[0]
        bep_frac = Q / bep_q
        findings += bep_findings(Q, bep_q, subject=subject, region=bep_region)
    npsha_v = float("nan")
    if npsha is not None:
        npsha_v = _scalar(npsha, Q) if callable(npsha) else float(npsha)
        if np.isfinite(npshr):
            findings += npsh_findings(npsha_v, npshr, subject=subject, application=npsh_application)
        else:
            findings.append(Finding(Severity.CHECK, subject, "NPSH available", npsha_v, "m",
                                    "NPSHr needed", "no NPSHr curve: NPSH margin not checked",
                                    "common practice, no source"))
    return OperatingPoint(label, Q, H, eta, npshr, power, bep_frac, npsha_v, tuple(findings), members)


def operating_points(pump, conditions: Mapping[str, Callable | Condition], Q_max: float | None = None,
                     *, rho: float | None = None) -> list[OperatingPoint]:
    """Operating points over a band of conditions, in the mapping's order.

    Each value is a system-head callable, or a :class:`Condition` (system head with its own
    density and NPSHa). Method as :func:`operating_point`.

    >>> from kit.core.pump import PumpCurve
    >>> p = PumpCurve([0, 0.01, 0.02], [30.0, 28.0, 22.0], speed_rpm=1450, diameter=0.25)
    >>> ops = operating_points(p, {"high level": lambda Q: 12 + 30000 * Q**2,
    ...                            "low level": lambda Q: 10 + 30000 * Q**2})
    >>> [round(o.Q, 5) for o in ops]
    [0.01897, 0.02]
    """
    out = []
    for label, cond in conditions.items():
        if isinstance(cond, Condition):
            out.append(operating_point(pump, cond.system_head, Q_max, label=str(label),
                                       rho=cond.rho if cond.rho is not None else rho,
                                       npsha=cond.npsha, npsh_application=cond.npsh_application))
        elif callable(cond):
            out.append(operating_point(pump, cond, Q_max, rho=rho, label=str(label)))
        else:
            raise InputError(f"condition '{label}'", type(cond).__name__,
                             "must be a system-head callable or a Condition")
    return out


def npsh_available(p_surface, p_vapour, rho, z_surface, z_pump, suction_loss, g: float = G):
    """Net positive suction head available at the pump, from its definition.

    .. math:: NPSH_a = \\frac{p_{surface} - p_v}{\\rho g} + (z_{surface} - z_{pump}) - h_{L,s}

    Parameters
    ----------
    p_surface : float
        Absolute pressure on the suction liquid surface [Pa]
    p_vapour : float
        Vapour pressure of the liquid at pumping temperature [Pa]
    rho : float
        Liquid density at pumping temperature [kg/m³]
    z_surface : float
        Elevation of the suction liquid surface [m]
    z_pump : float
        Elevation of the pump's NPSH datum (impeller eye / shaft centreline as the maker
        states it) [m]
    suction_loss : float or array_like
        Head loss from the surface to the suction flange, including entrance loss [m]
    g : float, optional
        Acceleration of gravity [m/s²]

    Returns
    -------
    NPSHa : float or ndarray
        NPSH available [m of pumped liquid]

    Notes
    -----
    Convention: NPSHa is the total suction head (pressure + velocity head, absolute) at the
    pump datum less the vapour pressure head (Hydraulic Institute definition; Karassik et al.
    2008, from memory). Written from the suction surface, where the velocity is taken as
    zero, the energy equation gives the form above, so the velocity head at the suction
    flange is included and must not be added or subtracted again; ``suction_loss`` must not
    contain an exit loss. Pressures are absolute.

    Examples
    --------
    >>> round(npsh_available(101325.0, 2339.0, 998.2, 2.0, 0.0, 0.5), 3)
    11.612
    """
    ps = check_range("suction surface pressure", p_surface, "Pa", low=0.0)
    pv = check_range("vapour pressure", p_vapour, "Pa", low=0.0, low_inclusive=True)
    rho = check_range("density", rho, "kg/m³", low=0.0)
    zs = check_range("suction surface elevation", z_surface, "m")
    zp = check_range("pump elevation", z_pump, "m")
    g = check_range("gravity", g, "m/s²", low=0.0)
    h = np.asarray(suction_loss, dtype=float)
    if not np.all(np.isfinite(h)) or np.any(h < 0):
        bad = float(h.reshape(-1)[np.flatnonzero(~np.isfinite(h.reshape(-1)) | (h.reshape(-1) < 0))[0]])
        check_range("suction loss", bad, "m", low=0.0, low_inclusive=True)
    out = (ps - pv) / (rho * g) + (zs - zp) - h
    return float(out) if out.ndim == 0 else out


def npsh_findings(npsha: float, npshr: float, *, subject: str = "pump",
                  application: str = "general", ratio: float | None = None,
                  metres: float | None = None) -> list[Finding]:
    """NPSH margin as ratio NPSHa/NPSHr and in metres against a guideline.

    FAIL when NPSHa < NPSHr; CHECK when the ratio is below the guideline ratio or the margin
    below the guideline metres (:data:`NPSH_MARGINS`, ANSI/HI 9.6.1 ranges from memory);
    PASS otherwise. ``ratio`` / ``metres`` override the guideline.

    >>> [f.severity.value for f in npsh_findings(5.0, 3.0)]
    ['pass', 'pass']
    """
    check_choice("NPSH margin application", application, NPSH_MARGINS)
    g = NPSH_MARGINS[application]
    r_min = g["ratio"] if ratio is None else check_range("NPSH margin ratio", ratio, "-", low=1.0,
                                                         low_inclusive=True)
    m_min = g["metres"] if metres is None else check_range("NPSH margin", metres, "m", low=0.0,
                                                           low_inclusive=True)
    a = check_range("NPSH available", npsha, "m")
    r = check_range("NPSH required", npshr, "m", low=0.0)
    margin = a - r
    rat = a / r
    src = g["source"] if (ratio is None and metres is None) else "user-set margin"
    danger = (" Cavitation damages the pump and can stop flow; the maker's NPSHr and licensed "
              "professional practice govern.")
    if a < r:
        sev_r = sev_m = Severity.FAIL
        rule = "NPSH available below NPSH required: the pump will cavitate." + danger
    else:
        sev_r = Severity.PASS if rat >= r_min else Severity.CHECK
        sev_m = Severity.PASS if margin >= m_min else Severity.CHECK
        rule = (f"NPSHa ≥ {r_min:g} × NPSHr and NPSHa − NPSHr ≥ {m_min:g} m "
                f"({g['label']})." + ("" if sev_r == sev_m == Severity.PASS else danger))
    return [
        Finding(sev_r, subject, "NPSH margin ratio", rat, "-", f">= {r_min:g}", rule, src),
        Finding(sev_m, subject, "NPSH margin", margin, "m", f">= {m_min:g} m", rule, src),
    ]


def bep_findings(Q: float, bep_Q: float, *, subject: str = "pump",
                 region: str = "low_specific_speed", por: tuple[float, float] | None = None,
                 aor: tuple[float, float] | None = None) -> list[Finding]:
    """Operating flow against the preferred and allowable operating regions around BEP.

    PASS inside the POR, CHECK inside the AOR, FAIL outside it. Regions as fractions of BEP
    flow from :data:`BEP_REGIONS` (ANSI/HI 9.6.3 POR, from memory; the AOR is the maker's —
    pass ``aor`` from the datasheet).

    >>> bep_findings(0.9, 1.0)[0].severity.value
    'pass'
    """
    check_choice("BEP region", region, BEP_REGIONS)
    reg = BEP_REGIONS[region]
    p_lo, p_hi = reg["por"] if por is None else por
    a_lo, a_hi = reg["aor"] if aor is None else aor
    if not (0 < a_lo <= p_lo < 1 < p_hi <= a_hi):
        raise InputError("operating regions (AOR, POR)", f"{(a_lo, a_hi)}, {(p_lo, p_hi)}",
                         "must nest as 0 < AOR low ≤ POR low < 1 < POR high ≤ AOR high")
    q = check_range("flow", Q, "m³/s", low=0.0, low_inclusive=True)
    b = check_range("BEP flow", bep_Q, "m³/s", low=0.0)
    x = q / b
    if p_lo <= x <= p_hi:
        sev, rule = Severity.PASS, "inside the preferred operating region"
    elif a_lo <= x <= a_hi:
        sev, rule = Severity.CHECK, ("outside the preferred but inside the allowable operating "
                                     "region: higher vibration, wear and recirculation risk")
    else:
        sev, rule = Severity.FAIL, ("outside the allowable operating region: expect damage "
                                    "(recirculation, vibration, overheating at low flow; "
                                    "cavitation and motor overload at run-out). " + CAUTIONS["pump"])
    src = reg["source"] + ("" if aor is not None else
                           "; AOR placeholder, common practice, no source — use the maker's AOR")
    return [Finding(sev, subject, "flow / BEP flow", x, "-",
                    f"POR {p_lo:g}–{p_hi:g}, AOR {a_lo:g}–{a_hi:g}", rule, src)]


def annual_energy(shaft_power, hours, motor_efficiency, drive_efficiency=1.0):
    """Electrical energy per year: E = P_shaft / (η_motor η_drive) × hours × 3600 [J].

    Parameters
    ----------
    shaft_power : float or array_like
        Pump shaft power [W]
    hours : float
        Running hours per year, 0–8784 [h]
    motor_efficiency : float
        Motor efficiency, 0 < η ≤ 1 [-]
    drive_efficiency : float, optional
        Drive (VFD) efficiency, 0 < η ≤ 1 [-]

    Returns
    -------
    energy : float or ndarray
        Energy drawn from the supply per year [J]

    Examples
    --------
    >>> round(joules_to_kWh(annual_energy(10e3, 8000, 0.92)), 1)
    86956.5
    """
    h = check_range("running hours per year", hours, "h", low=0.0, high=8784.0, low_inclusive=True)
    em = check_range("motor efficiency", motor_efficiency, "-", low=0.0, high=1.0)
    ed = check_range("drive efficiency", drive_efficiency, "-", low=0.0, high=1.0)
    P = np.asarray(shaft_power, dtype=float)
    if np.any(~np.isfinite(P)) or np.any(P < 0):
        check_range("shaft power", float(P.reshape(-1)[0]) if P.size == 1 else float(np.nanmin(P)),
                    "W", low=0.0, low_inclusive=True)
    E = P / (em * ed) * h * 3600.0
    return float(E) if E.ndim == 0 else E


def joules_to_kWh(energy):
    """Energy [J] -> [kWh]. ``>>> joules_to_kWh(3.6e6)`` gives 1.0."""
    return energy / J_PER_KWH


def annual_cost(energy_kWh, tariff_per_kWh):
    """Energy cost per year = energy [kWh] × tariff [currency/kWh] -> [currency].

    >>> annual_cost(1000.0, 0.15)
    150.0
    """
    t = check_range("tariff", tariff_per_kWh, "per kWh", low=0.0, low_inclusive=True)
    return energy_kWh * t


@dataclass(frozen=True)
class ControlCase:
    """One way of meeting the duty: speed, pump point, valve head and powers (SI)."""

    method: str
    speed_rpm: float
    speed_ratio: float
    Q: float
    H_pump: float
    valve_head: float
    efficiency: float
    shaft_power: float
    motor_efficiency: float
    drive_efficiency: float
    input_power: float
    annual_energy: float
    annual_energy_kWh: float


@dataclass(frozen=True)
class ControlComparison:
    """Throttling against speed control for one duty."""

    Q_req: float
    H_req: float
    throttle: ControlCase
    speed: ControlCase
    saving_kWh: float
    findings: tuple[Finding, ...] = field(default=())


def compare_control(pump, system_head: Callable, Q_req: float, *, rho: float, hours: float,
                    motor_efficiency: float, drive_rating: float | None = None) -> ControlComparison:
    """Throttling versus speed control for a required flow on a system curve.

    - Throttling: the pump runs at its curve speed at ``Q_req``; the head it makes above the
      system head, H_pump(Q_req) − H_sys(Q_req), is burned in a control valve; power is the
      pump's at that point.
    - Speed: the speed ratio r solving r² H(Q_req / r) = H_sys(Q_req) (affinity laws;
      Brent's method via :func:`scipy.optimize.brentq`); efficiency is moved along the
      affinity parabola, η(Q_req / r) at curve speed, so P = r³ P(Q_req / r). Drive losses
      from :func:`fluids.VFD_efficiency` (generic PWM drive table) at load = shaft power /
      drive rating.

    Parameters
    ----------
    pump : PumpCurve
        Pump at its full (curve) speed [-]
    system_head : callable
        System head over flows [m³/s] -> [m]
    Q_req : float
        Required flow [m³/s]
    rho : float
        Liquid density [kg/m³]
    hours : float
        Running hours per year [h]
    motor_efficiency : float
        Motor efficiency, the same for both (part-load fall-off ignored) [-]
    drive_rating : float, optional
        Rated power of the drive; default the IEC motor selected for the throttled shaft
        power [W]

    Returns
    -------
    ControlComparison
        Both cases and the energy saved per year by speed control [kWh].

    Notes
    -----
    The throttled case has no drive (drive efficiency 1). Efficiency constant along affinity
    parabolas is an approximation that worsens at low speed ratios and with high static head.

    Examples
    --------
    >>> from kit.core.pump import PumpCurve
    >>> p = PumpCurve([0, 0.01, 0.02, 0.03], [40.0, 38.0, 32.0, 22.0], speed_rpm=2900,
    ...               diameter=0.2, efficiency=[0.0, 0.55, 0.72, 0.68])
    >>> c = compare_control(p, lambda Q: 10 + 30000 * Q**2, 0.015, rho=998.0, hours=6000,
    ...                     motor_efficiency=0.9)
    >>> c.speed.speed_ratio < 1.0, c.saving_kWh > 0
    (True, True)
    """
    if hasattr(pump, "members_at"):
        raise UnknownChoiceError("pump for control comparison", "PumpSet", ["PumpCurve"])
    Q = check_range("required flow", Q_req, "m³/s", low=0.0)
    rho = check_range("density", rho, "kg/m³", low=0.0)
    H_req = _scalar(system_head, Q)
    H_full = float(pump.head(Q))
    if H_full < H_req:
        raise NoSolutionError("control duty", f"at {Q:.4g} m³/s the pump makes {H_full:.4g} m at "
                                              f"full speed, below the system head {H_req:.4g} m")
    if H_req <= 0:
        raise NoSolutionError("control duty", f"system head {H_req:.4g} m at {Q:.4g} m³/s is not "
                                              "positive: no pump speed is defined")
    findings: list[Finding] = []

    def g(r):
        return r * r * float(pump.head(Q / r)) - H_req

    rs = np.linspace(1.0, 0.02, 246)
    vals = rs ** 2 * pump.head(Q / rs) - H_req
    neg = np.flatnonzero(vals <= 0)
    if vals[0] == 0:
        r = 1.0
    elif neg.size == 0:
        raise NoSolutionError("speed for duty", "no speed ratio ≥ 0.02 meets the duty")
    else:
        k = int(neg[0])
        r = float(brentq(g, rs[k], rs[k - 1], xtol=1e-14))
    n = r * pump.speed_rpm
    slow = pump.at_speed(n)
    findings += list(slow.scaling_findings[len(pump.scaling_findings):])
    findings += slow.range_findings(Q, subject=f"pump '{pump.name}' at {n:.0f} rpm")

    P_t = float(pump.power(Q, rho))
    P_s = float(slow.power(Q, rho))
    rating = drive_rating if drive_rating is not None else select_motor(P_t).rating
    rating = check_range("drive rating", rating, "W", low=0.0)
    eta_d = float(fluids.VFD_efficiency(rating, load=min(P_s / rating, 1.0)))
    em = check_range("motor efficiency", motor_efficiency, "-", low=0.0, high=1.0)
    E_t = annual_energy(P_t, hours, em)
    E_s = annual_energy(P_s, hours, em, eta_d)
    thr = ControlCase("throttle", pump.speed_rpm, 1.0, Q, H_full, H_full - H_req,
                      float(pump.efficiency(Q)), P_t, em, 1.0, P_t / em, E_t, joules_to_kWh(E_t))
    spd = ControlCase("speed", n, r, Q, H_req, 0.0, float(slow.efficiency(Q)), P_s, em, eta_d,
                      P_s / (em * eta_d), E_s, joules_to_kWh(E_s))
    findings.append(Finding(Severity.PASS, f"pump '{pump.name}'", "drive efficiency", eta_d, "-",
                            "generic PWM drive table", "VFD losses from fluids.VFD_efficiency",
                            "fluids.VFD_efficiency (GoHz.com generic PWM table)"))
    return ControlComparison(Q, H_req, thr, spd, joules_to_kWh(E_t - E_s), tuple(findings))
