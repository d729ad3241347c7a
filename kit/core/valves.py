"""Control valves for liquids: Kv, inherent characteristics, sizing per IEC 60534-2-1.

- The flow coefficient Kv [m³/h] of IEC 60534-2-1: Q[m³/h] = Kv·sqrt(Δp[bar] / (ρ/ρ0)); the
  trade's Cv [US gpm at 1 psi] is 1.156·Kv (:func:`kv_to_cv`, :func:`cv_to_kv`, fluids).
- Ideal inherent characteristics (linear, equal percentage with rangeability R, quick
  opening): the fraction of rated Kv at an opening, and its inverse.
- Sizing for liquids by IEC 60534-2-1 through ``fluids.control_valve.size_control_valve_l``
  (non-choked and choked turbulent flow, piping geometry factor, laminar Reynolds factor):
  the required Kv and Cv at minimum, normal and maximum flow; on the chosen valve (rated Kv
  and characteristic) the opening at each case; valve authority; choked-flow, flashing and
  incipient-cavitation flags from FL and xFz; findings.

Units at the call into fluids (checked there): pressures absolute [Pa], flow [m³/s],
density [kg/m³], viscosity [Pa·s], diameters [m]; it returns Kv [m³/h].

References
----------
- IEC 60534-2-1:2011, Industrial-process control valves — Part 2-1: Flow capacity — Sizing
  equations for fluid flow under installed conditions. As implemented in
  ``fluids.control_valve.size_control_valve_l`` (Bell, C., fluids, MIT licence).
- IEC 60534-8-4, noise / cavitation: xFz, the incipient-cavitation pressure-differential
  ratio (from memory).
- Valve authority: common practice, no source.

Example
-------
>>> round(kv_required(0.1, 680e3, 220e3, rho=965.4, mu=3.1472e-4, pv=70.1e3, pc=22120e3,
...                   FL=0.9, Fd=0.46, D1=0.15, D2=0.15, d=0.15)["kv"], 1)
165.0
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from kit.core.findings import Finding, Severity
from kit.errors import InputError, check_choice, check_range

__all__ = [
    "RHO0", "KV_HEAD", "CHARACTERISTICS", "VALVE_LIMITS", "inherent_fraction",
    "opening_for_fraction", "kv_to_cv", "cv_to_kv", "kv_required", "ValveCase", "CaseSizing",
    "ValveSizing", "size_control_valve", "valve_head_loss", "PC_WATER", "critical_pressure",
]

#: Density of water used by IEC 60534-2-1 for ρ/ρ0 in the Kv equation [kg/m³] (the value
#: fluids.control_valve uses, water at 15.5 °C).
RHO0 = 999.1032907570233
from kit.core.constants import G as _G  # noqa: E402  (one gravity constant)

#: Head [m] across a valve of Kv = 1 m³/h passing 1 m³/s: h = KV_HEAD·(Q/Kv)² with Q [m³/s],
#: from the Kv definition Q[m³/h] = Kv·sqrt(Δp[bar]/(ρ/ρ0)) (IEC 60534-2-1), so the head is
#: independent of the liquid's density.
KV_HEAD = 3600.0 ** 2 * 1e5 / (RHO0 * _G)

#: Inherent characteristics of a control valve: the fraction of rated Kv at an opening.
CHARACTERISTICS = {
    "linear": "Kv/Kvs = x",
    "equal_percentage": "Kv/Kvs = R^(x − 1), R the rangeability",
    "quick_opening": "Kv/Kvs = sqrt(x)",
}
_CHAR_SOURCE = ("inherent characteristics as defined in IEC 60534-1 / ISA-75.11.01 "
                "(ideal forms, from memory); the maker's measured curve governs")


#: Critical pressure of water [Pa]: 22.064 MPa (IAPWS-95; from memory).
PC_WATER = 22.064e6


def critical_pressure(liquid) -> tuple[float, str]:
    """Critical pressure of a liquid for the FF factor of IEC 60534-2-1, and its source.

    FF = 0.96 − 0.28·sqrt(pv/pc) (IEC 60534-2-1) needs the liquid's critical pressure. A pure
    catalogue liquid with an equation of state (backend ``HEOS::…``) gives its own (CoolProp);
    aqueous solutions and user liquids take water's, :data:`PC_WATER` (stated in the source:
    FF moves little with pc where pv ≪ pc).

    Parameters
    ----------
    liquid : Liquid or UserLiquid
        The liquid [-]

    Returns
    -------
    (pc, source) : (float, str)
        Critical pressure [Pa] and where it came from [-]

    Examples
    --------
    >>> from kit.core.liquids import make_liquid
    >>> round(critical_pressure(make_liquid("water"))[0] / 1e6, 3)
    22.064
    """
    spec = getattr(liquid, "spec", None)
    backend = getattr(spec, "backend", "") or ""
    if backend.startswith("HEOS::"):
        from CoolProp.CoolProp import PropsSI

        fluid = backend.split("::", 1)[1]
        pc = float(PropsSI("pcrit", fluid))
        return pc, f"critical pressure of {fluid} (CoolProp HEOS)"
    return PC_WATER, ("critical pressure of water (IAPWS-95, from memory), taken for an aqueous "
                      "or user liquid")


def inherent_fraction(opening, characteristic: str, rangeability: float = 50.0):
    """Fraction of rated Kv passed at ``opening`` on an ideal inherent characteristic.

    Parameters
    ----------
    opening : array_like
        Travel (lift) as a fraction of rated travel, 0–1 [-]
    characteristic : str
        A key of :data:`CHARACTERISTICS` [-]
    rangeability : float
        R = Kvs / smallest controllable Kv, used by the equal-percentage form [-]

    Returns
    -------
    fraction : ndarray
        Kv / Kvs [-]

    Notes
    -----
    Ideal forms (IEC 60534-1 / ISA-75.11.01, from memory): linear x, equal percentage
    R^(x−1), quick opening sqrt(x). fluids' ``Cv_char_*`` are spline fits of one maker's
    data with no rangeability, so the ideal forms are used here; the maker's curve governs.

    Examples
    --------
    >>> round(float(inherent_fraction(0.5, "equal_percentage", 50.0)), 5)
    0.14142
    """
    check_choice("valve characteristic", characteristic, tuple(CHARACTERISTICS))
    x = np.asarray(opening, dtype=float)
    if characteristic == "linear":
        return x * 1.0
    if characteristic == "quick_opening":
        return np.sqrt(x)
    return rangeability ** (x - 1.0)


def opening_for_fraction(fraction, characteristic: str, rangeability: float = 50.0):
    """Opening at which the ideal inherent characteristic passes ``fraction`` of rated Kv.

    The inverse of :func:`inherent_fraction`; fractions above 1 give openings above 1 (the
    valve is too small) and are returned as they are, so the caller can say so.

    Parameters
    ----------
    fraction : array_like
        Kv / Kvs, > 0 [-]
    characteristic : str
        A key of :data:`CHARACTERISTICS` [-]
    rangeability : float
        R of the equal-percentage form [-]

    Returns
    -------
    opening : ndarray
        Travel as a fraction of rated travel [-]

    Examples
    --------
    >>> round(float(opening_for_fraction(0.14142136, "equal_percentage", 50.0)), 4)
    0.5
    """
    check_choice("valve characteristic", characteristic, tuple(CHARACTERISTICS))
    phi = np.asarray(fraction, dtype=float)
    if characteristic == "linear":
        return phi * 1.0
    if characteristic == "quick_opening":
        return phi * phi
    with np.errstate(divide="ignore"):
        return 1.0 + np.log(phi) / math.log(rangeability)


#: Limits of the valve findings, as data (common practice, no source; the user's to edit).
VALVE_LIMITS = {
    "authority_min": 0.25,     # below: poor control (CHECK)
    "open_max": 0.9,           # opening above: little control range left (CHECK)
    "open_min": 0.1,           # opening below: poor control, erosion (CHECK)
    "source": "common practice, no source",
}

IEC_SOURCE = ("IEC 60534-2-1:2011 sizing equations for incompressible fluids, via "
              "fluids.control_valve.size_control_valve_l")


def kv_to_cv(kv):
    """Cv [US gpm/psi^0.5] from Kv [m³/h/bar^0.5] (fluids.fittings.Kv_to_Cv).

    >>> round(kv_to_cv(10.0), 3)
    11.561
    """
    from fluids.fittings import Kv_to_Cv

    return Kv_to_Cv(check_range("Kv", kv, "m³/h", low=0.0, low_inclusive=True))


def cv_to_kv(cv):
    """Kv [m³/h/bar^0.5] from Cv [US gpm/psi^0.5] (fluids.fittings.Cv_to_Kv).

    >>> round(cv_to_kv(10.0), 3)
    8.65
    """
    from fluids.fittings import Cv_to_Kv

    return Cv_to_Kv(check_range("Cv", cv, "US gpm/psi^0.5", low=0.0, low_inclusive=True))


def valve_head_loss(Q, kv):
    """Head lost across a valve at a flow, from its Kv.

    From the Kv definition (IEC 60534-2-1, non-choked turbulent): h = KV_HEAD·(Q/Kv)², the
    density cancelling between Δp and ρ g; signed with Q.

    Parameters
    ----------
    Q : array_like
        Flow [m³/s]
    kv : float
        Flow coefficient, > 0 [m³/h]

    Returns
    -------
    h : ndarray
        Head loss [m of the flowing liquid]

    Examples
    --------
    >>> round(float(valve_head_loss(10.0 / 3600.0, 10.0)), 4)
    10.2063
    """
    kv = check_range("Kv", kv, "m³/h", low=0.0)
    Q = np.asarray(Q, dtype=float)
    return KV_HEAD * Q * np.abs(Q) / (kv * kv)


def kv_required(Q, p1, p2, *, rho, mu, pv, pc, FL=0.9, Fd=1.0, D1=None, D2=None, d=None) -> dict:
    """Required Kv of a control valve for a liquid, by IEC 60534-2-1.

    Parameters
    ----------
    Q : float
        Flow, > 0 [m³/s]
    p1, p2 : float
        Absolute pressures upstream and downstream of the valve, p1 > p2 [Pa]
    rho : float
        Liquid density at the inlet [kg/m³]
    mu : float
        Liquid viscosity [Pa·s]
    pv : float
        Vapour pressure at the inlet temperature [Pa]
    pc : float
        Critical pressure of the liquid (water 22.064e6) [Pa]
    FL : float
        Liquid pressure-recovery factor of the valve, 0 < FL ≤ 1 [-]
    Fd : float
        Valve style modifier, 0 < Fd ≤ 1 [-]
    D1, D2, d : float, optional
        Upstream pipe, downstream pipe and valve bores; give all three or none [m]

    Returns
    -------
    dict
        ``kv`` [m³/h], ``cv`` [US gpm/psi^0.5], ``choked``, ``laminar`` (bool), ``FF`` [-],
        ``Rev`` [-], ``FP``, ``FLP``, ``FR`` [-] (None where not used)

    Examples
    --------
    >>> round(kv_required(0.01, 3e5, 2e5, rho=998.2, mu=1e-3, pv=2339.0, pc=22.064e6)["kv"], 2)
    35.98
    """
    from fluids.control_valve import size_control_valve_l

    Q = check_range("valve flow", Q, "m³/s", low=0.0, high=100.0)
    p1 = check_range("valve inlet pressure", p1, "Pa", low=0.0, high=1e8)
    p2 = check_range("valve outlet pressure", p2, "Pa", low=0.0, high=p1)
    if p2 >= p1:
        raise InputError("valve outlet pressure", p2, f"must be below the inlet pressure "
                         f"{p1:.6g} Pa", "Pa")
    rho = check_range("liquid density", rho, "kg/m³", low=0.0, high=3e4)
    mu = check_range("liquid viscosity", mu, "Pa·s", low=0.0, high=1e3)
    pv = check_range("vapour pressure", pv, "Pa", low=0.0, high=p1, low_inclusive=True)
    pc = check_range("critical pressure", pc, "Pa", low=pv, high=1e9)
    FL = check_range("FL", FL, "-", low=0.0, high=1.0)
    Fd = check_range("Fd", Fd, "-", low=0.0, high=1.0)
    dims = [D1, D2, d]
    if any(x is not None for x in dims) and not all(x is not None for x in dims):
        raise InputError("valve and pipe bores", dims, "must be all given (D1, D2, d) or none")
    if all(x is not None for x in dims):
        D1, D2, d = (check_range(n, v, "m", low=0.0, high=5.0)
                     for n, v in (("D1", D1), ("D2", D2), ("d", d)))
    out = size_control_valve_l(rho=rho, Psat=pv, Pc=pc, mu=mu, P1=p1, P2=p2, Q=Q, D1=D1, D2=D2,
                               d=d, FL=FL, Fd=Fd, full_output=True)
    kv = float(out["Kv"])
    return {"kv": kv, "cv": float(kv_to_cv(kv)), "choked": bool(out["choked"]),
            "laminar": bool(out["laminar"]), "FF": float(out["FF"]), "Rev": out.get("Rev"),
            "FP": out.get("FP"), "FLP": out.get("FLP"), "FR": out.get("FR")}


@dataclass(frozen=True)
class ValveCase:
    """One sizing case: a label ('minimum', 'normal', 'maximum'), flow [m³/s] and the absolute
    pressures upstream and downstream of the valve at that flow [Pa]."""

    label: str
    Q: float
    p1: float
    p2: float

    def __post_init__(self):
        if not isinstance(self.label, str) or not self.label:
            raise InputError("valve case label", self.label, "must be a non-empty text")
        check_range(f"flow of case '{self.label}'", self.Q, "m³/s", low=0.0, high=100.0)
        check_range(f"inlet pressure of case '{self.label}'", self.p1, "Pa", low=0.0, high=1e8)
        check_range(f"outlet pressure of case '{self.label}'", self.p2, "Pa", low=0.0,
                    high=self.p1, high_inclusive=False)


@dataclass(frozen=True)
class CaseSizing:
    """Sizing of one case: required Kv/Cv, opening on the chosen valve, flags."""

    case: ValveCase
    kv: float
    cv: float
    opening: float
    choked: bool
    laminar: bool
    flashing: bool
    xF: float
    incipient_cavitation: bool | None
    FF: float


@dataclass(frozen=True)
class ValveSizing:
    """A control valve sized over its cases, with the chosen valve's openings and findings."""

    name: str
    kv_rated: float
    cv_rated: float
    characteristic: str
    rangeability: float
    cases: tuple
    authority: float | None
    findings: tuple

    @property
    def cautions(self) -> list[str]:
        """Standing cautions for valve sizing (kit.core.findings.CAUTIONS)."""
        from kit.core.findings import cautions_for

        return cautions_for("cavitation", "water_hammer", "pressure")

    def case(self, label: str) -> CaseSizing:
        for c in self.cases:
            if c.case.label == label:
                return c
        from kit.errors import UnknownChoiceError

        raise UnknownChoiceError("valve case", label, [c.case.label for c in self.cases])


def size_control_valve(cases, *, rho, mu, pv, pc, kv_rated, characteristic="equal_percentage",
                       rangeability=50.0, FL=0.9, Fd=1.0, xFz=None, D1=None, D2=None, d=None,
                       dp_rest=None, design="normal", name="control valve") -> ValveSizing:
    """Size a control valve for a liquid over its cases (IEC 60534-2-1) and check the choice.

    Parameters
    ----------
    cases : sequence of ValveCase
        Typically minimum, normal and maximum flow, each with its own p1 and p2 [-]
    rho, mu, pv, pc : float
        Density [kg/m³], viscosity [Pa·s], vapour pressure [Pa] and critical pressure [Pa]
    kv_rated : float
        Rated Kv (Kvs) of the chosen valve [m³/h]
    characteristic : str
        Inherent characteristic, a key of :data:`CHARACTERISTICS` [-]
    rangeability : float
        R of the equal-percentage characteristic [-]
    FL, Fd : float
        Pressure-recovery factor and valve style modifier of the chosen valve [-]
    xFz : float, optional
        Incipient-cavitation pressure-differential ratio of the valve (maker's data) [-]
    D1, D2, d : float, optional
        Pipe and valve bores (all or none) [m]
    dp_rest : float, optional
        Pressure drop of the rest of the controlled circuit at the design case's flow, for
        the authority Δp_valve / (Δp_valve + dp_rest) (common practice, no source) [Pa]
    design : str
        Label of the design case for the authority [-]
    name : str
        Tag of the valve, for findings [-]

    Returns
    -------
    ValveSizing

    Notes
    -----
    The opening at each case inverts the ideal inherent characteristic at Kv_required/Kv_rated
    (installed characteristic = inherent here, because each case carries its own p1, p2).
    Findings: required Kv above rated (FAIL: the valve cannot pass the flow), opening above
    ``VALVE_LIMITS['open_max']`` or below ``open_min`` (CHECK), authority below
    ``authority_min`` (CHECK), choked flow (FAIL: fully developed cavitation, or flashing where
    p2 ≤ pv), xF = Δp/(p1 − pv) ≥ xFz (CHECK: incipient cavitation), laminar sizing (CHECK).

    Examples
    --------
    >>> s = size_control_valve([ValveCase("normal", 0.01, 3e5, 2e5)], rho=998.2, mu=1e-3,
    ...                        pv=2339.0, pc=22.064e6, kv_rated=63.0)
    >>> round(s.case("normal").opening, 3)
    0.857
    """
    cases = tuple(cases)
    if not cases:
        raise InputError(f"cases of '{name}'", 0, "must hold at least one case")
    for c in cases:
        if not isinstance(c, ValveCase):
            raise InputError(f"cases of '{name}'", type(c).__name__, "must be ValveCase")
    check_choice(f"characteristic of '{name}'", characteristic, tuple(CHARACTERISTICS))
    kv_rated = check_range(f"rated Kv of '{name}'", kv_rated, "m³/h", low=0.0, high=1e6)
    rangeability = check_range(f"rangeability of '{name}'", rangeability, "-", low=1.0,
                               high=1000.0)
    if xFz is not None:
        xFz = check_range(f"xFz of '{name}'", xFz, "-", low=0.0, high=1.0)
    lim = VALVE_LIMITS
    out = []
    findings = []
    for c in cases:
        r = kv_required(c.Q, c.p1, c.p2, rho=rho, mu=mu, pv=pv, pc=pc, FL=FL, Fd=Fd, D1=D1,
                        D2=D2, d=d)
        x = float(opening_for_fraction(r["kv"] / kv_rated, characteristic, rangeability))
        xF = (c.p1 - c.p2) / (c.p1 - pv) if c.p1 > pv else math.inf
        inc = None if xFz is None else bool(xF >= xFz)
        flashing = c.p2 <= pv
        cs = CaseSizing(c, r["kv"], r["cv"], x, r["choked"], r["laminar"], flashing, xF, inc,
                        r["FF"])
        out.append(cs)
        subj = f"{name} at {c.label} flow"
        if r["kv"] > kv_rated:
            findings.append(Finding(Severity.FAIL, subj, "required Kv", r["kv"], "m³/h",
                                    f"<= {kv_rated:.4g} m³/h (rated)", "valve too small: it "
                                    "cannot pass this flow at this pressure drop", IEC_SOURCE,
                                    high=kv_rated))
        elif x > lim["open_max"]:
            findings.append(Finding(Severity.CHECK, subj, "opening", x, "-",
                                    f"<= {lim['open_max']:.2g}", "valve near fully open: little "
                                    "control range left", lim["source"], high=lim["open_max"]))
        elif x < lim["open_min"]:
            findings.append(Finding(Severity.CHECK, subj, "opening", x, "-",
                                    f">= {lim['open_min']:.2g}", "valve near closed: poor "
                                    "control, seat erosion and noise", lim["source"],
                                    low=lim["open_min"]))
        else:
            findings.append(Finding(Severity.PASS, subj, "opening", x, "-",
                                    f"{lim['open_min']:.2g}–{lim['open_max']:.2g}",
                                    "opening within the control range", lim["source"],
                                    low=lim["open_min"], high=lim["open_max"]))
        if flashing:
            findings.append(Finding(Severity.FAIL, subj, "outlet pressure", c.p2, "Pa",
                                    f"> {pv:.6g} Pa (vapour pressure)", "flashing: the liquid "
                                    "leaves the valve partly as vapour; erosion, choked flow",
                                    IEC_SOURCE, low=pv))
        elif r["choked"]:
            findings.append(Finding(Severity.FAIL, subj, "pressure drop", c.p1 - c.p2, "Pa",
                                    f"< FL²(p1 − FF·pv) = {FL * FL * (c.p1 - r['FF'] * pv):.6g} "
                                    "Pa", "choked flow: fully developed cavitation in the "
                                    "valve; damage and noise; use an anti-cavitation trim or "
                                    "share the drop", IEC_SOURCE,
                                    high=FL * FL * (c.p1 - r["FF"] * pv)))
        if inc:
            findings.append(Finding(Severity.CHECK, subj, "xF = Δp/(p1 − pv)", xF, "-",
                                    f"< xFz = {xFz:.3g}", "incipient cavitation: noise and, "
                                    "with time, damage", "IEC 60534-8-4 (xFz; from memory)",
                                    high=xFz))
        if r["laminar"]:
            findings.append(Finding(Severity.CHECK, subj, "valve Reynolds number",
                                    float(r["Rev"] or float("nan")), "-", "> 10000",
                                    "non-turbulent flow: Kv from the laminar Reynolds factor",
                                    IEC_SOURCE, low=10000.0))
    authority = None
    if dp_rest is not None:
        dp_rest = check_range(f"pressure drop of the rest of the circuit ('{name}')", dp_rest,
                              "Pa", low=0.0, high=1e8, low_inclusive=True)
        labels = [c.label for c in cases]
        check_choice(f"design case of '{name}'", design, labels)
        dc = cases[labels.index(design)]
        dpv = dc.p1 - dc.p2
        authority = dpv / (dpv + dp_rest)
        sev = Severity.CHECK if authority < lim["authority_min"] else Severity.PASS
        findings.append(Finding(sev, f"{name} at {design} flow", "valve authority", authority,
                                "-", f">= {lim['authority_min']:.2g}",
                                "share of the controlled circuit's pressure drop taken by the "
                                "valve; low authority distorts the characteristic",
                                lim["source"], low=lim["authority_min"]))
    return ValveSizing(name, kv_rated, float(kv_to_cv(kv_rated)), characteristic, rangeability,
                       tuple(out), authority, tuple(findings))
