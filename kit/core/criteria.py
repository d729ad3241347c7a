"""Sizing criteria: velocity and pressure-drop ranges per duty class, and erosional velocity.

The duty-class ranges are **common practice, no source**: typical values engineers use as a
first screen, labelled so, and the user's to edit (``replace(DUTY_CLASSES[k], v_max=...)``).
Owner's standards and codes govern where they say otherwise.

Example
-------
>>> c = DUTY_CLASSES["pump_discharge"]
>>> [f.severity.value for f in c.check("line 1", 2.0, 200.0)]
['pass', 'pass']
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from kit.core.findings import Finding, Severity
from kit.errors import InputError, check_range

__all__ = ["DutyClass", "DUTY_CLASSES", "erosional_velocity", "erosional_findings",
           "MARGINAL_FRACTION"]

#: A result within this fraction of a limit is marked CHECK (marginal).
MARGINAL_FRACTION = 0.10
_SRC = "common practice, no source (editable)"


@dataclass(frozen=True)
class DutyClass:
    """Velocity range [m/s] and maximum pressure drop per length [Pa/m] for a duty.

    Below ``v_min`` is a CHECK (oversized line, settling of solids, air not swept); above
    ``v_max`` or ``dp_max`` is a FAIL; within 10 % of an upper limit is a CHECK.

    ``erosional_applies`` says whether the service calls for the API RP 14E erosional
    velocity as a limit (two-phase or sand/solids-laden flow). False for the clean
    single-phase liquid duties here: the erosional velocity is then reported for
    information only (never a FAIL or CHECK).
    """

    key: str
    label: str
    v_min: float
    v_max: float
    dp_max: float
    source: str = _SRC
    erosional_applies: bool = False

    def __post_init__(self):
        check_range(f"minimum velocity of '{self.key}'", self.v_min, "m/s", low=0.0, high=20.0,
                    low_inclusive=True)
        check_range(f"maximum velocity of '{self.key}'", self.v_max, "m/s", low=self.v_min,
                    high=50.0)
        check_range(f"maximum pressure drop of '{self.key}'", self.dp_max, "Pa/m", low=0.0,
                    high=1e6)
        if not isinstance(self.erosional_applies, bool):
            raise InputError(f"erosional_applies of '{self.key}'", self.erosional_applies,
                             "must be true or false")

    def check(self, subject: str, V: float, dp_per_m: float) -> list[Finding]:
        """Findings for one velocity [m/s] and pressure drop per length [Pa/m]."""
        out = []
        if V > self.v_max:
            sev, rule = Severity.FAIL, f"{self.label}: velocity above range"
        elif V > self.v_max * (1 - MARGINAL_FRACTION):
            sev, rule = Severity.CHECK, f"{self.label}: velocity near the top of its range"
        elif V < self.v_min:
            sev, rule = Severity.CHECK, f"{self.label}: velocity below range (oversized)"
        else:
            sev, rule = Severity.PASS, f"{self.label}: velocity within range"
        out.append(Finding(sev, subject, "velocity", V, "m/s",
                           f"{self.v_min:.3g}–{self.v_max:.3g} m/s", rule, self.source,
                           low=self.v_min, high=self.v_max))
        if dp_per_m > self.dp_max:
            sev, rule = Severity.FAIL, f"{self.label}: pressure drop above limit"
        elif dp_per_m > self.dp_max * (1 - MARGINAL_FRACTION):
            sev, rule = Severity.CHECK, f"{self.label}: pressure drop near its limit"
        else:
            sev, rule = Severity.PASS, f"{self.label}: pressure drop within limit"
        out.append(Finding(sev, subject, "pressure drop per length", dp_per_m, "Pa/m",
                           f"<= {self.dp_max * 100 / 1000:.3g} kPa/100 m", rule, self.source,
                           high=self.dp_max))
        return out


DUTY_CLASSES: dict[str, DutyClass] = {
    "pump_suction": DutyClass("pump_suction", "pump suction", 0.5, 1.5, 100.0),
    "pump_discharge": DutyClass("pump_discharge", "pump discharge", 1.0, 3.0, 400.0),
    "gravity_drain": DutyClass("gravity_drain", "gravity drain", 0.3, 1.2, 50.0),
    "general_transfer": DutyClass("general_transfer", "general transfer", 0.9, 2.5, 250.0),
}

_API_14E = ("API RP 14E (5th ed., 1991), sec. 2.5: Ve = C/sqrt(rho_m) in ft/s with rho in "
            "lb/ft³; C = 100 continuous, 125 intermittent (solids-free)")


def erosional_velocity(rho: float, C: float = 100.0) -> float:
    """Erosional velocity by API RP 14E, converted to SI.

    .. math:: V_e = \\frac{C}{\\sqrt{\\rho_m}} \\quad [\\text{ft/s}, \\rho_m \\text{ in lb/ft³}]

    Parameters
    ----------
    rho : float
        Density of the flowing liquid [kg/m³]
    C : float
        Empirical constant: 100 for continuous service, 125 for intermittent [-]

    Returns
    -------
    Ve : float
        Erosional velocity [m/s]

    Notes
    -----
    Written for two-phase production piping; for a clean liquid it is a conservative
    ceiling, and far above usual design velocities.

    Examples
    --------
    >>> round(erosional_velocity(998.2), 2)
    3.86

    References
    ----------
    American Petroleum Institute (1991). RP 14E, Recommended Practice for Design and
    Installation of Offshore Production Platform Piping Systems, 5th ed.
    """
    rho = check_range("density", rho, "kg/m³", low=0.0, high=3e4)
    C = check_range("erosional constant C", C, "-", low=0.0, high=300.0)
    rho_lb_ft3 = rho / 16.01846337396014
    return C / math.sqrt(rho_lb_ft3) * 0.3048


def erosional_findings(subject: str, V: float, rho: float, C: float = 100.0,
                       applies: bool = True) -> list[Finding]:
    """The API RP 14E erosional velocity as a limit, or for information.

    ``applies=True`` (two-phase or solids-laden service): FAIL above it, CHECK within 10 %,
    else PASS. ``applies=False`` (clean single-phase liquid): always PASS, the rule words
    saying it is informational — RP 14E is written for two-phase production piping, and
    applying it as a limit to a clean liquid is not its use.

    >>> erosional_findings("L1", 5.0, 998.2, applies=False)[0].severity.value
    'pass'
    """
    Ve = erosional_velocity(rho, C)
    if not applies:
        above = "above" if V > Ve else "below"
        return [Finding(Severity.PASS, subject, "velocity (erosional, information)", V, "m/s",
                        f"information: RP 14E Ve = {Ve:.2f} m/s (C = {C:g})",
                        f"erosional velocity for information only ({above} Ve): API RP 14E "
                        "applies to two-phase and sand-laden service, not to a clean "
                        "single-phase liquid; the duty's velocity range governs", _API_14E)]
    if V > Ve:
        sev = Severity.FAIL
    elif V > Ve * (1 - MARGINAL_FRACTION):
        sev = Severity.CHECK
    else:
        sev = Severity.PASS
    return [Finding(sev, subject, "velocity", V, "m/s", f"<= {Ve:.2f} m/s (C = {C:g})",
                    "erosional velocity", _API_14E, high=Ve)]
