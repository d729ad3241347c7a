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
from kit.errors import (
    InputError,
    NoSolutionError,
    OutOfRangeError,
    UnknownChoiceError,
    check_choice,
    check_range,
)

__all__ = [
    "G", "NPSH_MARGINS", "BEP_REGIONS", "J_PER_KWH", "OperatingPoint", "Condition",
    "operating_point", "operating_points", "npsh_available", "npsh_findings", "bep_findings",
    "annual_energy", "joules_to_kWh", "annual_cost", "ControlCase", "ControlComparison",
    "compare_control", "SPEED_RANGE", "TRIM_NPSHR_RULE", "check_pump_speed", "DutyEnergy",
    "PumpDutyEnergy", "EnergyComparison", "energy_at_duty", "CONTROLS",
]

#: Standard gravity [m/s²] (CGPM 1901).
from kit.core.constants import G  # noqa: E402  (one gravity constant)

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


#: Pump speeds accepted for an operating point, as fractions of the datasheet speed. Outside
#: it the affinity laws are not a model of the pump (and 1e6 rpm gave a NaN point): refused.
#: The range is this kit's (common practice, no source); AFFINITY_LIMITS in kit.core.pump
#: flag the accuracy inside it.
SPEED_RANGE = {"ratio": (0.1, 1.5),
               "source": "common practice, no source: affinity scaling is not a pump model "
                         "far from the tested speed; above the datasheet speed the maker "
                         "must confirm casing, seal and motor"}

#: Rule for NPSHr of a trimmed impeller (stated; a finding carries it).
TRIM_NPSHR_RULE = {
    "rule": "NPSHr is not reduced by trimming: at each flow the larger of the trimmed curve "
            "(full-diameter NPSHr moved along the flow by the trim law, as kit.core.pump "
            "does) and the full-diameter NPSHr at that flow",
    "source": "common practice, from memory (trimming does not change the impeller eye, "
              "which sets suction performance; a trimmed impeller may need more NPSH at a "
              "given flow); the maker's trimmed-impeller NPSHr governs",
}


def check_pump_speed(pump) -> None:
    """Refuse a pump (or any member of a set) running outside :data:`SPEED_RANGE` of its
    datasheet speed, with :class:`~kit.errors.OutOfRangeError` naming the pump.

    >>> from kit.core.pump import PumpCurve
    >>> p = PumpCurve([0, 0.01, 0.02], [30.0, 28.0, 22.0], speed_rpm=1450, diameter=0.25)
    >>> check_pump_speed(p.at_speed(1e6))  # doctest: +ELLIPSIS
    Traceback (most recent call last):
    ...
    kit.errors.OutOfRangeError: 'speed of pump 'pump' (datasheet 1450 rpm)' must be ...
    """
    lo, hi = SPEED_RANGE["ratio"]
    for p in getattr(pump, "pumps", None) or (pump,):
        n = getattr(p, "speed_rpm", None)
        n0 = getattr(p, "datasheet_speed_rpm", None)
        if n is None or n0 is None:
            continue
        if not (np.isfinite(n) and lo * n0 <= n <= hi * n0):
            raise OutOfRangeError(f"speed of pump '{p.name}' (datasheet {n0:g} rpm)", float(n),
                                  "rpm", low=lo * n0, high=hi * n0, low_inclusive=True)


def _trim_ratio(pump) -> float:
    D, D0 = getattr(pump, "diameter", None), getattr(pump, "datasheet_diameter", None)
    if D is None or D0 is None or not D0:
        return 1.0
    return float(D) / float(D0)


def _npshr(pump, Q: float) -> tuple[float, list]:
    """NPSHr at Q with :data:`TRIM_NPSHR_RULE` applied to a trimmed impeller."""
    if not pump.has_npshr:
        return float("nan"), []
    v = float(pump.npshr(Q))
    r = _trim_ratio(pump)
    if r >= 1.0 - 1e-12:
        return v, []
    full = float(pump.npshr(Q * r))   # full-diameter NPSHr at Q (trim law moved it to Q/r)
    return max(v, full), [Finding(
        Severity.CHECK, f"pump '{pump.name}' trimmed to {r:.3g} of its datasheet diameter",
        "NPSHr on a trimmed impeller", max(v, full), "m", "maker's trimmed NPSHr",
        TRIM_NPSHR_RULE["rule"], TRIM_NPSHR_RULE["source"])]


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
    check_pump_speed(pump)
    q_top = pump.q_end if Q_max is None else check_range("Q_max", Q_max, "m³/s", low=0.0)
    subject = f"pump '{pump.name}'" + (f" at {label}" if label else "")
    Qs = np.linspace(0.0, q_top, max(int(samples), 2))
    Hp = np.asarray(pump.head(Qs), dtype=float)
    Hs = np.asarray(system_head(Qs), dtype=float)
    if Hs.shape != Qs.shape or not np.all(np.isfinite(Hs)):
        raise InputError("system head", "array", f"must return one finite head per flow ({Qs.size})")
    if not np.all(np.isfinite(Hp)):
        raise NoSolutionError("operating point" + (f" at {label}" if label else ""),
                              f"the head curve of pump '{pump.name}' is not finite on 0 to "
                              f"{q_top:.4g} m³/s")
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
    npshr, trim_f = _npshr(pump, Q)
    findings += trim_f
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
                     *, rho: float | None = None, errors: str = "raise") -> list[OperatingPoint]:
    """Operating points over a band of conditions, in the mapping's order.

    Each value is a system-head callable, or a :class:`Condition` (system head with its own
    density and NPSHa). Method as :func:`operating_point`.

    ``errors="report"`` keeps a condition with no operating point in the list (never
    dropped): an :class:`OperatingPoint` with ``Q`` and ``H`` NaN and a FAIL finding giving
    the reason; ``"raise"`` (default) raises the :class:`~kit.errors.NoSolutionError`.

    >>> from kit.core.pump import PumpCurve
    >>> p = PumpCurve([0, 0.01, 0.02], [30.0, 28.0, 22.0], speed_rpm=1450, diameter=0.25)
    >>> ops = operating_points(p, {"high level": lambda Q: 12 + 30000 * Q**2,
    ...                            "low level": lambda Q: 10 + 30000 * Q**2})
    >>> [round(o.Q, 5) for o in ops]
    [0.01897, 0.02]
    """
    check_choice("errors", errors, ("raise", "report"))
    out = []
    for label, cond in conditions.items():
        try:
            if isinstance(cond, Condition):
                out.append(operating_point(pump, cond.system_head, Q_max, label=str(label),
                                           rho=cond.rho if cond.rho is not None else rho,
                                           npsha=cond.npsha,
                                           npsh_application=cond.npsh_application))
            elif callable(cond):
                out.append(operating_point(pump, cond, Q_max, rho=rho, label=str(label)))
            else:
                raise InputError(f"condition '{label}'", type(cond).__name__,
                                 "must be a system-head callable or a Condition")
        except NoSolutionError as exc:
            if errors == "raise":
                raise
            nan = float("nan")
            out.append(OperatingPoint(str(label), nan, nan, nan, nan, nan, nan, nan, (Finding(
                Severity.FAIL, f"pump '{pump.name}' at {label}", "operating point", nan,
                "m³/s", "an intersection of pump and system curves",
                f"no operating point: {exc.reason}", "energy balance (pump head = system "
                "head)"),)))
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
    check_pump_speed(pump)
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


#: Controls for :func:`energy_at_duty`.
CONTROLS = {
    "throttle": "pump at its curve speed delivers the required flow; a control valve burns "
                "the head it makes above the system head",
    "speed": "pump speed set by the affinity laws so that its head equals the system head "
             "at the required flow (η moved along the affinity parabola); drive losses from "
             "fluids.VFD_efficiency unless a drive efficiency is given",
}


@dataclass(frozen=True)
class DutyEnergy:
    """One pump at one band condition, delivering the required flow under one control (SI).

    ``feasible`` False means the pump cannot meet the duty there (``note`` says why); the
    numbers are then NaN — the row is kept, never dropped.
    """

    pump: str
    condition: str
    control: str
    feasible: bool
    Q: float
    H_system: float
    H_pump: float
    valve_head: float
    speed_rpm: float
    speed_ratio: float
    efficiency: float
    shaft_power: float
    drive_efficiency: float
    input_power: float
    annual_energy_kWh: float
    kWh_per_m3: float
    note: str = ""


@dataclass(frozen=True)
class PumpDutyEnergy:
    """A pump over every band condition at the required duty, and its summary."""

    pump: str
    rows: tuple
    mean_kWh_per_m3: float
    worst_kWh_per_m3: float
    infeasible: tuple

    @property
    def meets_every_condition(self) -> bool:
        return not self.infeasible


@dataclass(frozen=True)
class EnergyComparison:
    """Candidate pumps compared at the same required duty under one stated control.

    ``ranking``: pump names, those meeting every condition first by worst-case energy per
    volume [kWh/m³], then the others (fewest infeasible conditions first).
    """

    Q_req: float
    control: str
    control_text: str
    hours: float
    pumps: tuple
    ranking: tuple
    findings: tuple = ()

    def pump(self, name: str) -> PumpDutyEnergy:
        for p in self.pumps:
            if p.pump == name:
                return p
        raise UnknownChoiceError("pump", name, [p.pump for p in self.pumps])


def _duty_row(pump, label, H_sys, Q, control, rho, hours, em, ed_given, max_ratio):
    nan = float("nan")

    def bad(note, H_pump=nan):
        return DutyEnergy(pump.name, label, control, False, Q, H_sys, H_pump, nan, nan, nan,
                          nan, nan, nan, nan, nan, nan, note)

    if not np.isfinite(H_sys) or H_sys <= 0.0:
        return bad(f"system head {H_sys:.4g} m at the required flow is not positive: no pump "
                   "duty (the flow runs by gravity; a control valve sets it)")
    n0 = pump.speed_rpm
    if control == "throttle":
        if Q > pump.q_end * (1 + 1e-12):
            return bad(f"required flow {Q:.4g} m³/s beyond the pump's last datasheet flow "
                       f"{pump.q_end:.4g} m³/s")
        H_p = float(pump.head(Q))
        if H_p < H_sys:
            return bad(f"the pump makes {H_p:.4g} m at the required flow, below the system "
                       f"head {H_sys:.4g} m: the duty is not met at this condition", H_p)
        eta = float(pump.efficiency(Q))
        P = float(pump.power(Q, rho))
        r, n, ed, valve = 1.0, n0, 1.0, H_p - H_sys
    else:
        def g(r):
            return r * r * float(pump.head(Q / r)) - H_sys

        r_lo = max(Q / pump.q_end, 1e-3)
        if r_lo > max_ratio:
            return bad(f"the required flow needs more than {max_ratio:g} × the curve speed "
                       "(beyond the datasheet flow range)")
        rs = np.linspace(max_ratio, r_lo, 256)
        vals = np.array([g(x) for x in rs])
        if vals[0] < 0:
            return bad(f"at {max_ratio:g} × the curve speed the pump makes "
                       f"{vals[0] + H_sys:.4g} m at the required flow, below the system head "
                       f"{H_sys:.4g} m", vals[0] + H_sys)
        neg = np.flatnonzero(vals <= 0)
        if neg.size == 0:
            return bad("no speed within the datasheet flow range meets the system head "
                       "(the pump would run off the end of its curve)")
        k = int(neg[0])
        r = float(rs[k]) if vals[k] == 0 else float(brentq(g, rs[k], rs[k - 1], xtol=1e-14))
        n = r * n0
        eta = float(pump.efficiency(Q / r))
        P = r ** 3 * float(pump.power(Q / r, rho))
        H_p, valve = H_sys, 0.0
        if ed_given is not None:
            ed = ed_given
        else:
            P_rated = float(pump.power(min(Q, pump.q_end), rho))
            rating = select_motor(max(P_rated, P)).rating
            ed = float(fluids.VFD_efficiency(rating, load=min(P / rating, 1.0)))
    if not np.isfinite(P) or P <= 0:
        return bad("no efficiency or power curve: the shaft power is unknown", H_p)
    P_in = P / (em * ed)
    kwh = P_in * hours / 1000.0
    per_m3 = P_in / (Q * J_PER_KWH)
    return DutyEnergy(pump.name, label, control, True, Q, H_sys, H_p, valve, n, r, eta, P, ed,
                      P_in, kwh, per_m3)


def energy_at_duty(pumps, conditions: Mapping[str, Callable | Condition], Q_req: float, *,
                   control: str, rho: float | None = None, hours: float = 0.0,
                   motor_efficiency: float, drive_efficiency: float | None = None,
                   max_speed_ratio: float = 1.0) -> EnergyComparison:
    """Candidate pumps compared at the **same required duty** under a stated control.

    For every pump and every band condition the pump delivers the required flow
    ``Q_req`` (not its uncontrolled operating point), so pumps are compared on the same
    volume:

    - ``control="throttle"``: the pump runs at its curve speed at ``Q_req``; the head it
      makes above the system head, H_pump(Q_req) − H_sys(Q_req), is burned in a control
      valve; shaft power is the pump's at ``Q_req``;
    - ``control="speed"``: speed ratio r from r² H(Q_req / r) = H_sys(Q_req) (affinity laws,
      Brent's method via :func:`scipy.optimize.brentq`), P = r³ P(Q_req / r); r at most
      ``max_speed_ratio`` (default 1: no overspeed); drive efficiency given, or from
      :func:`fluids.VFD_efficiency` at the load on the IEC motor rating.

    Input power P_in = P_shaft / (η_motor η_drive); annual energy P_in × hours as if the year
    were spent at that condition [kWh]; energy per volume P_in / Q_req [kWh/m³] (independent
    of hours). A condition at which a pump cannot meet the duty is kept as an infeasible row
    with the reason, never dropped.

    Parameters
    ----------
    pumps : sequence of PumpCurve
        Candidates at their curve speed [-]
    conditions : mapping
        Band condition label -> system-head callable [m³/s -> m], or a :class:`Condition`
        (its ``rho`` used) [-]
    Q_req : float
        Required flow, > 0 [m³/s]
    control : str
        'throttle' or 'speed' (:data:`CONTROLS`) [-]
    rho : float, optional
        Liquid density where a condition does not carry one [kg/m³]
    hours : float
        Running hours per year, 0–8784 [h]
    motor_efficiency : float
        Motor efficiency, 0 < η ≤ 1 [-]
    drive_efficiency : float, optional
        Drive (VFD) efficiency for speed control, 0 < η ≤ 1 [-]
    max_speed_ratio : float
        Highest speed ratio allowed for speed control, 0.1–1.5 [-]

    Returns
    -------
    EnergyComparison

    Examples
    --------
    >>> from kit.core.pump import PumpCurve
    >>> p = PumpCurve([0, 0.01, 0.02, 0.03], [40.0, 38.0, 32.0, 22.0], speed_rpm=2900,
    ...               diameter=0.2, efficiency=[0.0, 0.55, 0.72, 0.68], name="A")
    >>> c = energy_at_duty([p], {"max": lambda Q: 10 + 30000 * Q**2}, 0.015, control="throttle",
    ...                    rho=998.0, hours=4000, motor_efficiency=0.9)
    >>> round(c.pumps[0].rows[0].kWh_per_m3, 4)
    0.1596
    """
    check_choice("control", control, tuple(CONTROLS))
    Q = check_range("required flow", Q_req, "m³/s", low=0.0, high=100.0)
    hours = check_range("running hours per year", hours, "h", low=0.0, high=8784.0,
                        low_inclusive=True)
    em = check_range("motor efficiency", motor_efficiency, "-", low=0.0, high=1.0)
    ed = None if drive_efficiency is None else check_range("drive efficiency",
                                                           drive_efficiency, "-", low=0.0,
                                                           high=1.0)
    lo, hi = SPEED_RANGE["ratio"]
    max_ratio = check_range("maximum speed ratio", max_speed_ratio, "-", low=lo, high=hi,
                            low_inclusive=True)
    pumps = list(pumps)
    if not pumps:
        raise InputError("candidate pumps", 0, "must hold at least 1 pump")
    if not conditions:
        raise InputError("band conditions", 0, "must hold at least 1 condition")
    out = []
    for pump in pumps:
        if hasattr(pump, "members_at"):
            raise UnknownChoiceError("pump for energy at duty", "PumpSet", ["PumpCurve"])
        check_pump_speed(pump)
        rows = []
        for label, cond in conditions.items():
            fn = cond.system_head if isinstance(cond, Condition) else cond
            if not callable(fn):
                raise InputError(f"condition '{label}'", type(cond).__name__,
                                 "must be a system-head callable or a Condition")
            r_ho = cond.rho if isinstance(cond, Condition) and cond.rho is not None else rho
            r_ho = check_range(f"density at '{label}'", r_ho, "kg/m³", low=0.0)
            rows.append(_duty_row(pump, str(label), _scalar(fn, Q), Q, control, r_ho, hours,
                                  em, ed, max_ratio))
        ok = [x.kWh_per_m3 for x in rows if x.feasible]
        out.append(PumpDutyEnergy(pump.name, tuple(rows),
                                  float(np.mean(ok)) if ok else float("nan"),
                                  float(np.max(ok)) if ok else float("nan"),
                                  tuple(x.condition for x in rows if not x.feasible)))
    full = sorted((p for p in out if p.meets_every_condition), key=lambda p: p.worst_kWh_per_m3)
    part = sorted((p for p in out if not p.meets_every_condition),
                  key=lambda p: (len(p.infeasible), np.nan_to_num(p.worst_kWh_per_m3,
                                                                  nan=np.inf)))
    findings = []
    for p in part:
        findings.append(Finding(Severity.FAIL, f"pump '{p.pump}'", "duty met at every condition",
                                float(len(p.infeasible)), "-", "0 conditions missed",
                                f"cannot deliver {Q:.4g} m³/s under {control} control at: "
                                + "; ".join(f"{x.condition} ({x.note})" for x in p.rows
                                            if not x.feasible),
                                "energy balance (pump head ≥ system head at the required "
                                "flow)"))
    return EnergyComparison(Q, control, CONTROLS[control], hours, tuple(out),
                            tuple(p.pump for p in full + part), tuple(findings))
