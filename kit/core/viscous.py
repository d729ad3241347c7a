"""Correction of a water-performance pump curve for a viscous liquid (ANSI/HI 9.6.7).

Method (Hydraulic Institute, ANSI/HI 9.6.7-2010 and -2015, *Rotodynamic Pumps — Guideline
for Effects of Liquid Viscosity on Performance*; the equations below are **from memory**:
check them against the current edition before relying on a result):

- parameter B, in US customary units (Q_BEP-W [US gpm], H_BEP-W [ft] per stage, ν [cSt],
  N [rpm]), at the water best efficiency point:

  .. math:: B = 16.5 \\frac{\\nu^{0.50} H_{BEP-W}^{0.0625}}{Q_{BEP-W}^{0.375} N^{0.25}}

  (computed here from SI inputs by exact unit conversion, not by a recalled SI constant);
- flow factor :math:`C_Q = \\exp(-0.165 (\\log_{10} B)^{3.15})` (the standard prints the
  base as 2.71, from memory; with e the factor differs by under 0.25 % at B = 40);
- head factor at each flow :math:`C_H = 1 - (1 - C_Q)(Q_W / Q_{BEP-W})^{0.75}`, so
  C_H = C_Q at BEP and 1 at shut-off;
- efficiency factor :math:`C_\\eta = B^{-(0.0547 B^{0.69})}`;
- Q_vis = C_Q Q_W, H_vis = C_H H_W, η_vis = C_η η_W at each datasheet point; shaft power
  from P = ρ g Q H / η with the viscous liquid's density.

Valid for 1 < B < 40 (:data:`HI967_VALIDITY`): at B ≤ 1 no correction is needed; above 40
the method is outside its range (a FAIL finding — test the pump on the liquid). NPSHr is kept
at its water value (the method's NPSH guidance is not applied here; a CHECK finding says so).

Example
-------
>>> from kit.core.pump import PumpCurve
>>> p = PumpCurve([0, 0.01, 0.02, 0.03], [40.0, 38.0, 32.0, 22.0], speed_rpm=2900,
...               diameter=0.2, efficiency=[0.0, 0.55, 0.72, 0.68])
>>> vc = viscous_curve(p, nu=100e-6, rho=900.0)
>>> round(vc.B, 3), round(vc.C_Q, 4), round(vc.C_eta, 4)
(3.306, 0.9793, 0.8613)
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np

from kit.core.findings import Finding, Severity
from kit.core.pump import PumpCurve
from kit.errors import InputError, check_range

__all__ = ["HI967_SOURCE", "HI967_VALIDITY", "US_UNITS", "parameter_B", "correction_factors",
           "ViscousCorrection", "viscous_curve"]

HI967_SOURCE = ("ANSI/HI 9.6.7-2010/2015 Rotodynamic Pumps — Guideline for Effects of Liquid "
                "Viscosity on Performance (Hydraulic Institute); equations from memory")

#: Range of the parameter B where the correction applies, as data.
HI967_VALIDITY: dict[str, object] = {
    "B_no_correction_at_or_below": 1.0,
    "B_max": 40.0,
    "source": HI967_SOURCE,
}

#: Exact unit definitions used to form B in US customary units.
US_UNITS: dict[str, float] = {
    "gpm_m3_per_s": 3.785411784e-3 / 60.0,   # US gallon (exact, 231 in³) per minute
    "ft_m": 0.3048,                           # international foot (exact)
    "cSt_m2_per_s": 1e-6,                     # centistokes
}


def parameter_B(Q_bep: float, H_bep: float, nu: float, speed_rpm: float,
                stages: int = 1) -> float:
    """The HI viscosity parameter B from the water BEP (ANSI/HI 9.6.7, from memory).

    B = 16.5 ν^0.5 H^0.0625 / (Q^0.375 N^0.25) with Q [gpm], H [ft] per stage, ν [cSt],
    N [rpm]; the SI inputs are converted exactly (:data:`US_UNITS`).

    Parameters
    ----------
    Q_bep : float
        Water flow at best efficiency [m³/s]
    H_bep : float
        Water head at best efficiency, all stages [m]
    nu : float
        Kinematic viscosity of the liquid at pumping temperature [m²/s]
    speed_rpm : float
        Pump speed [rpm]
    stages : int
        Number of stages; B uses the head per stage [-]

    Returns
    -------
    B : float
        The parameter B [-]

    Examples
    --------
    >>> round(parameter_B(0.0315450982, 30.48, 100e-6, 1750.0), 4)
    3.3083
    """
    q = check_range("water BEP flow", Q_bep, "m³/s", low=0.0)
    h = check_range("water BEP head", H_bep, "m", low=0.0)
    v = check_range("kinematic viscosity", nu, "m²/s", low=0.0, high=1.0)
    n = check_range("pump speed", speed_rpm, "rpm", low=0.0)
    if isinstance(stages, bool) or not isinstance(stages, (int, np.integer)):
        raise InputError("number of stages", stages, "must be a whole number")
    s = int(check_range("number of stages", stages, "stages", low=1, high=50,
                        low_inclusive=True))
    q_gpm = q / US_UNITS["gpm_m3_per_s"]
    h_ft = h / s / US_UNITS["ft_m"]
    v_cst = v / US_UNITS["cSt_m2_per_s"]
    return 16.5 * v_cst ** 0.5 * h_ft ** 0.0625 / (q_gpm ** 0.375 * n ** 0.25)


def correction_factors(B: float, flow_ratio=1.0):
    """Flow, head and efficiency factors of ANSI/HI 9.6.7 (from memory).

    Parameters
    ----------
    B : float
        The parameter B, > 0 [-]
    flow_ratio : float or array_like
        Water flow / water BEP flow at which C_H is wanted, ≥ 0 [-]

    Returns
    -------
    C_Q, C_H, C_eta : float, ndarray, float
        Flow factor, head factor at each flow ratio and efficiency factor [-]; all 1 at
        B ≤ 1 (no correction).

    Examples
    --------
    >>> [round(float(x), 4) for x in correction_factors(10.0, 1.0)]
    [0.8479, 0.8479, 0.5396]
    """
    b = check_range("parameter B", B, "-", low=0.0)
    x = np.asarray(flow_ratio, dtype=float)
    if not np.all(np.isfinite(x)) or np.any(x < 0):
        check_range("flow ratio", float(x.reshape(-1)[np.argmin(np.where(np.isfinite(x), x,
                                                                           -np.inf))]),
                    "-", low=0.0, low_inclusive=True)
    if b <= HI967_VALIDITY["B_no_correction_at_or_below"]:
        return 1.0, np.ones_like(x), 1.0
    cq = math.exp(-0.165 * math.log10(b) ** 3.15)
    ch = 1.0 - (1.0 - cq) * x ** 0.75
    ceta = b ** -(0.0547 * b ** 0.69)
    return cq, ch, ceta


@dataclass(frozen=True)
class ViscousCorrection:
    """A water curve corrected for viscosity: B, the factors, the corrected curve, findings.

    ``C_H`` holds the head factor at each datasheet point; ``curve`` is a PumpCurve of the
    corrected points (flows [m³/s], heads [m], efficiencies [-], water NPSHr [m]) whose
    ``power(Q, rho)`` gives the viscous shaft power [W].
    """

    B: float
    C_Q: float
    C_H: np.ndarray
    C_eta: float
    nu: float
    rho: float
    curve: PumpCurve
    findings: tuple = field(default=())


def viscous_curve(pump: PumpCurve, nu: float, rho: float, *, stages: int = 1,
                  name: str | None = None) -> ViscousCorrection:
    """Correct a water-performance curve for a viscous liquid by ANSI/HI 9.6.7 (from memory).

    Parameters
    ----------
    pump : PumpCurve
        Water-performance curve with efficiency (or power) points [-]
    nu : float
        Kinematic viscosity of the liquid at pumping temperature [m²/s]
    rho : float
        Density of the liquid, for the corrected power [kg/m³]
    stages : int
        Number of stages (B uses head per stage) [-]
    name : str, optional
        Name of the corrected curve; default the water curve's name with the viscosity [-]

    Returns
    -------
    ViscousCorrection
        B, factors, the corrected curve and findings (method range, NPSHr kept).

    Examples
    --------
    >>> from kit.core.pump import PumpCurve
    >>> p = PumpCurve([0, 0.01, 0.02, 0.03], [40.0, 38.0, 32.0, 22.0], speed_rpm=2900,
    ...               diameter=0.2, efficiency=[0.0, 0.55, 0.72, 0.68])
    >>> round(float(viscous_curve(p, 100e-6, 900.0).curve.head(0.0)), 2)
    40.0
    """
    if not isinstance(pump, PumpCurve):
        raise InputError("pump for viscosity correction", type(pump).__name__,
                         "must be a PumpCurve (a single pump's water curve)")
    if not pump.has_efficiency:
        raise InputError(f"efficiency of pump '{pump.name}'", "none",
                         "is needed for the viscosity correction (water BEP)")
    rho = check_range("density", rho, "kg/m³", low=0.0)
    q_bep, h_bep, _ = pump.bep
    B = parameter_B(q_bep, h_bep, nu, pump.speed_rpm, stages)
    Qw = pump.flow
    cq, ch, ceta = correction_factors(B, Qw / q_bep)
    if pump.efficiency_points is not None:
        eta_w = pump.efficiency_points
    else:
        eta_w = np.where(Qw > 0, pump.efficiency(Qw), 0.0)
    subject = f"pump '{pump.name}' on a liquid of {nu * 1e6:.4g} cSt"
    lo, hi = HI967_VALIDITY["B_no_correction_at_or_below"], HI967_VALIDITY["B_max"]
    findings = []
    if B <= lo:
        findings.append(Finding(Severity.PASS, subject, "parameter B", B, "-", f"<= {lo:g}",
                                "no viscosity correction needed", HI967_SOURCE, high=lo))
    elif B < hi:
        findings.append(Finding(Severity.CHECK, subject, "parameter B", B, "-",
                                f"{lo:g} < B < {hi:g}", "water curve corrected for viscosity: "
                                "an estimate; the maker's viscous performance governs",
                                HI967_SOURCE, low=lo, high=hi))
    else:
        findings.append(Finding(Severity.FAIL, subject, "parameter B", B, "-", f"< {hi:g}",
                                "outside the correction's range: the factors are extrapolated; "
                                "test the pump on the liquid or get the maker's viscous "
                                "performance", HI967_SOURCE, high=hi))
    if pump.npshr_points is not None and B > lo:
        findings.append(Finding(Severity.CHECK, subject, "NPSHr", float("nan"), "m",
                                "water NPSHr kept", "NPSHr is not corrected for viscosity "
                                "here; ask the maker", HI967_SOURCE))
    curve = PumpCurve(
        Qw * cq, pump.head_points * ch, speed_rpm=pump.speed_rpm, diameter=pump.diameter,
        efficiency=np.clip(eta_w * ceta, 0.0, 1.0), npshr=pump.npshr_points,
        name=name if name is not None else f"{pump.name} ({nu * 1e6:.4g} cSt)", degrees=dict(pump.degrees),
        test_density=rho, head_rise_tolerance=pump.head_rise_tolerance,
        _datasheet=(pump.datasheet_speed_rpm, pump.datasheet_diameter),
        _findings=tuple(pump.scaling_findings))
    return ViscousCorrection(B, cq, np.asarray(ch, dtype=float), ceta, float(nu), rho, curve,
                             tuple(findings))
