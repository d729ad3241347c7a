"""Liquids and their states: density, viscosity and vapour pressure with sources and ranges.

A :class:`Liquid` is a registry key (and a concentration for solutions); its
:meth:`Liquid.state` at a temperature and pressure returns a :class:`LiquidState`
holding ``rho`` [kg/m³], ``mu`` [Pa·s], ``pv`` [Pa] or ``None``, the source of each
figure and the temperature range where it holds. :class:`UserLiquid` takes the
user's own constants or table and has the same ``.state``.

Models
------
- **Water**: IAPWS-95 (Wagner & Pruß 2002) with the IAPWS 2008 viscosity
  (Huber et al. 2009), both through CoolProp's ``HEOS`` backend.
- **Aqueous solutions** (ethylene and propylene glycol, NaCl and CaCl2 brines,
  methanol, ethanol and glycerol solutions): CoolProp's incompressible fits of
  Melinder (2010); **seawater**: CoolProp's fit of Sharqawy, Lienhard & Zubair (2010).
  Only these generic fluids are exposed, never proprietary heat-transfer products.
  Every concentration is a **mass fraction** [kg/kg] (CoolProp's ``M*`` fluids are
  on a mass basis; its volume-basis fluids are not exposed).
- **Pure organic liquids** (ethanol, methanol, toluene, n-heptane): the reference
  equations of state in CoolProp ``HEOS``.

Guards (CoolProp itself does not check phase: water at 400 K and 1 atm returns a
vapour density without complaint)
- Water and pure liquids are refused below the triple point and at or above the
  saturation temperature at the stated pressure (:class:`~kit.errors.LiquidStateError`).
  For water the lower bound is the triple point 273.16 K; ice at 1 atm melts at
  273.15 K, a 0.01 K difference that is not modelled.
- Solutions are refused below their freezing point (``LiquidStateError``), outside the
  fit's temperature range (:class:`~kit.errors.OutOfRangeError` on ``'temperature'``)
  and outside its concentration range (``OutOfRangeError`` on ``'concentration'``).

Vapour pressure
---------------
- Water, pure liquids: saturation pressure from the equation of state.
- Seawater: CoolProp's fit (Sharqawy et al. 2010).
- Glycol, glycerol and brine solutions: an **estimate** by Raoult's law, taking the
  water activity as the water mole fraction (solute non-volatile, salts fully
  dissociated) times the saturation pressure of pure water. It is an approximation,
  marked as such in ``sources['pv']``; real water activity in these solutions is
  usually at or below the ideal value, so the estimate tends to err high, which is the
  cautious side for NPSH and vacuum checks (from memory).
- Methanol and ethanol solutions: **none** (the alcohol is volatile, so Raoult's law on
  water alone would understate the vapour pressure). ``pv`` is ``None`` and
  :meth:`LiquidState.require_pv` makes the caller ask the user for a value. Boiling of
  these solutions is therefore not checked.

Caching: CoolProp states are cached per (liquid, concentration, T, P) with
:func:`functools.lru_cache`; CoolProp is imported on the first property call.

Example
-------
>>> s = make_liquid("water").state(293.15)
>>> round(s.rho, 2), round(s.mu * 1e3, 4), round(s.pv)
(998.21, 1.0016, 2339)

References
----------
- Wagner, W., Pruß, A. (2002). The IAPWS formulation 1995 for the thermodynamic properties
  of ordinary water substance for general and scientific use. J. Phys. Chem. Ref. Data 31(2),
  387–535. doi:10.1063/1.1461829
- Huber, M. L. et al. (2009). New international formulation for the viscosity of H2O.
  J. Phys. Chem. Ref. Data 38(2), 101–125. doi:10.1063/1.3088050
- Wagner, W., Pruß, A. (1993). International equations for the saturation properties of
  ordinary water substance. Revised according to the international temperature scale of 1990.
  J. Phys. Chem. Ref. Data 22(3), 783–787. doi:10.1063/1.555926
- Melinder, Å. (2010). Properties of Secondary Working Fluids for Indirect Systems. IIR.
- Sharqawy, M. H., Lienhard V, J. H., Zubair, S. M. (2010). Thermophysical properties of
  seawater: a review of existing correlations and data. Desalination and Water Treatment 16,
  354–380. doi:10.5004/dwt.2010.1079
- Bell, I. H., Wronski, J., Quoilin, S., Lemort, V. (2014). Pure and pseudo-pure fluid
  thermophysical property evaluation and the open-source thermophysical property library
  CoolProp. Ind. Eng. Chem. Res. 53(6), 2498–2508. doi:10.1021/ie4033999
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from functools import lru_cache

import numpy as np

from kit.errors import InputError, LiquidStateError, OutOfRangeError, check_choice, check_range

__all__ = [
    "P_ATM", "P_MAX", "WATER_T_TRIPLE", "ALCOHOL_FLAMMABLE_FRACTION", "NO_PV_SOURCE", "FAMILIES",
    "LiquidSpec", "LiquidState", "Liquid", "UserLiquid", "LIQUIDS", "families", "make_liquid",
    "water_saturation_pressure", "BulkModulus", "BULK_MODULUS_RANGE", "bulk_modulus",
]

#: Standard atmosphere [Pa].
P_ATM = 101325.0
#: Highest pressure accepted for a liquid state [Pa abs]; far above any piping system.
P_MAX = 1.0e8
#: Triple point of water [K]: the lower bound used for water (ice at 1 atm melts at 273.15 K).
WATER_T_TRIPLE = 273.16
#: Aqueous methanol or ethanol at or above this mass fraction is marked flammable.
#: Common practice, no source: a conservative threshold; ~10 % ethanol in water already
#: has a flash point below 60 °C (from memory).
ALCOHOL_FLAMMABLE_FRACTION = 0.05
#: ``sources['pv']`` where no vapour-pressure model exists.
NO_PV_SOURCE = "no vapour-pressure model: give a value for NPSH or vacuum checks"
#: The families, in display order.
FAMILIES = ("water", "glycol solution", "brine", "alcohol solution", "pure organic")

_M_WATER = 0.018015268  # kg/mol, IAPWS-95
_RAOULT_SOURCE = (
    "estimate: Raoult's law, water activity taken as the water mole fraction (solute "
    "non-volatile{ions}) x saturation pressure of pure water (Wagner & Pruss 1993, extrapolated "
    "below 273.16 K); an approximation")


@dataclass(frozen=True)
class LiquidSpec:
    """One registry entry: what a liquid is, which model gives its properties and where it holds.

    Attributes
    ----------
    key : str
        Registry key ("ethylene_glycol_aq").
    name : str
        Display name in plain trade words ("Ethylene glycol, aqueous").
    family : str
        One of :data:`FAMILIES`.
    backend : str
        Property backend id ("HEOS::Water", "INCOMP::MEG", "user table").
    basis : str or None
        Concentration basis ("mass fraction"), None for a pure liquid.
    concentration_range : tuple of float or None
        Allowed concentration (low, high), both inclusive [kg/kg]; None for a pure liquid.
    T_range : tuple of float
        Model temperature range (low, high) [K]. For water and pure liquids the low end is
        the triple point and the high end the critical temperature; the state must also
        lie below the saturation temperature at its pressure. For solutions it is the
        fit's range; the state must also lie above the freezing point.
    flammable : bool
        True if the liquid is, or at some allowed concentration is, flammable.
    flammable_above : float or None
        For solutions: the mass fraction at or above which it is marked flammable [kg/kg].
    source : str
        The property model in words.
    sources : dict
        Source text per property ("rho", "mu", "pv").
    pv_model : str
        "saturation" (equation of state), "fit" (CoolProp's own), "raoult" (estimate) or "none".
    solute_molar_mass : float or None
        Molar mass of the solute for the Raoult estimate [kg/mol].
    ions : int
        Particles per dissolved formula unit for the Raoult estimate (NaCl 2, CaCl2 3) [-].
    uses_freezing_fit : bool
        Whether CoolProp's freezing-point fit is applied (False for seawater, whose fit in
        CoolProp returns a non-physical value; the fit's low limit 273.15 K lies above the
        freezing point of seawater and governs).
    coolprop_refs : dict
        CoolProp's own reference keys for the model, checked by the tests.
    """

    key: str
    name: str
    family: str
    backend: str
    basis: str | None
    concentration_range: tuple[float, float] | None
    T_range: tuple[float, float]
    flammable: bool
    flammable_above: float | None
    source: str
    sources: dict[str, str]
    pv_model: str
    solute_molar_mass: float | None = None
    ions: int = 1
    uses_freezing_fit: bool = True
    coolprop_refs: dict[str, str] = field(default_factory=dict)

    @property
    def needs_concentration(self) -> bool:
        """True for solutions (a concentration must be given)."""
        return self.concentration_range is not None


@dataclass(frozen=True)
class LiquidState:
    """A liquid at one temperature and pressure, with the source and range of each figure.

    Attributes
    ----------
    name : str
        The liquid's name, with its concentration ("Ethylene glycol, aqueous, 30 % by mass").
    T : float
        Temperature [K]
    P : float
        Absolute pressure [Pa]
    rho : float
        Density [kg/m³]
    mu : float
        Dynamic viscosity [Pa·s]
    pv : float or None
        Vapour pressure [Pa]; None where no model exists (see :meth:`require_pv`).
    sources : dict
        Source text per property ("rho", "mu", "pv").
    ranges : dict
        Temperature range (low, high) [K] per property where it holds at this pressure;
        no "pv" entry when ``pv`` is None.
    flammable : bool
        Whether the liquid is marked flammable.
    """

    name: str
    T: float
    P: float
    rho: float
    mu: float
    pv: float | None
    sources: dict[str, str]
    ranges: dict[str, tuple[float, float]]
    flammable: bool = False

    @property
    def nu(self) -> float:
        """Kinematic viscosity ``mu/rho`` [m²/s]."""
        return self.mu / self.rho

    def require_pv(self, field: str) -> float:
        """Return the vapour pressure [Pa], or raise :class:`~kit.errors.InputError` naming ``field``.

        Parameters
        ----------
        field : str
            The input the caller needs the vapour pressure for ("NPSH available").

        Returns
        -------
        pv : float
            Vapour pressure [Pa]

        Examples
        --------
        >>> s = make_liquid("ethanol_aq", 0.2).state(293.15)
        >>> s.require_pv("vapour pressure")
        Traceback (most recent call last):
        ...
        kit.errors.InputError: 'vapour pressure' needs the vapour pressure of Ethanol, aqueous, \
20 % by mass at 293.15 K, and there is no vapour-pressure model for it: give a value for NPSH \
or vacuum checks, not None
        """
        if self.pv is None:
            raise InputError(
                field, None,
                f"needs the vapour pressure of {self.name} at {self.T:.6g} K, and there is no "
                "vapour-pressure model for it: give a value for NPSH or vacuum checks")
        return self.pv

    def as_dict(self) -> dict:
        """Plain dict (JSON-ready, ranges as lists) of the state."""
        return {
            "name": self.name, "T": self.T, "P": self.P, "rho": self.rho, "mu": self.mu,
            "nu": self.nu, "pv": self.pv, "flammable": self.flammable,
            "sources": dict(self.sources),
            "ranges": {k: [float(v[0]), float(v[1])] for k, v in self.ranges.items()},
        }


# --------------------------------------------------------------------------- registry

def _incomp(key, name, family, fluid, x_max, T_range, reference, *, pv_model="raoult",
            M=None, ions=1, flammable=False, flammable_above=None, freezing_fit=True,
            coolprop_ref="Melinder2010"):
    text = f"CoolProp incompressible {fluid} ({reference})"
    if pv_model == "raoult":
        pv_text = _RAOULT_SOURCE.format(
            ions=f", fully dissociated into {ions} ions" if ions > 1 else "")
    elif pv_model == "fit":
        pv_text = text
    else:
        pv_text = NO_PV_SOURCE
    return LiquidSpec(
        key=key, name=name, family=family, backend=f"INCOMP::{fluid}", basis="mass fraction",
        concentration_range=(0.0, x_max), T_range=T_range, flammable=flammable,
        flammable_above=flammable_above, source=text,
        sources={"rho": text, "mu": text, "pv": pv_text}, pv_model=pv_model,
        solute_molar_mass=M, ions=ions, uses_freezing_fit=freezing_fit,
        coolprop_refs={"reference": coolprop_ref})


def _pure(key, name, fluid, T_range, eos, visc, refs):
    return LiquidSpec(
        key=key, name=name, family="pure organic", backend=f"HEOS::{fluid}", basis=None,
        concentration_range=None, T_range=T_range, flammable=True, flammable_above=None,
        source=f"{eos} via CoolProp HEOS",
        sources={"rho": f"{eos} via CoolProp HEOS", "mu": f"{visc} via CoolProp HEOS",
                 "pv": f"{eos}, saturation pressure via CoolProp HEOS"},
        pv_model="saturation", coolprop_refs=refs)


_MELINDER = "Melinder 2010, Properties of Secondary Working Fluids for Indirect Systems, IIR"
_SW_REF = "Sharqawy, Lienhard & Zubair 2010, Desalination and Water Treatment 16, 354-380"

#: The liquids on offer. Ranges are CoolProp's own limits (the tests check them against it).
LIQUIDS: dict[str, LiquidSpec] = {s.key: s for s in (
    LiquidSpec(
        key="water", name="Water", family="water", backend="HEOS::Water", basis=None,
        concentration_range=None, T_range=(WATER_T_TRIPLE, 647.096), flammable=False,
        flammable_above=None, source="IAPWS-95 via CoolProp HEOS",
        sources={"rho": "IAPWS-95 (Wagner & Pruss 2002) via CoolProp HEOS",
                 "mu": "IAPWS 2008 viscosity (Huber et al. 2009) via CoolProp HEOS",
                 "pv": "IAPWS-95 saturation pressure via CoolProp HEOS"},
        pv_model="saturation",
        coolprop_refs={"BibTeX-EOS": "Wagner-JPCRD-2002", "BibTeX-VISCOSITY": "Huber-JPCRD-2009"}),
    _incomp("ethylene_glycol_aq", "Ethylene glycol, aqueous", "glycol solution", "MEG", 0.6,
            (173.15, 373.15), _MELINDER, M=0.062068),
    _incomp("propylene_glycol_aq", "Propylene glycol, aqueous", "glycol solution", "MPG", 0.6,
            (173.15, 373.15), _MELINDER, M=0.076094),
    _incomp("nacl_brine", "Sodium chloride brine", "brine", "MNA", 0.23,
            (173.15, 313.15), _MELINDER, M=0.058443, ions=2),
    _incomp("cacl2_brine", "Calcium chloride brine", "brine", "MCA", 0.30,
            (173.15, 313.15), _MELINDER, M=0.110984, ions=3),
    _incomp("seawater", "Seawater", "brine", "MITSW", 0.12, (273.15, 393.15), _SW_REF,
            pv_model="fit", freezing_fit=False, coolprop_ref="Sharqawy2010"),
    _incomp("methanol_aq", "Methanol, aqueous", "alcohol solution", "MMA", 0.6,
            (173.15, 313.15), _MELINDER, pv_model="none", flammable=True,
            flammable_above=ALCOHOL_FLAMMABLE_FRACTION),
    _incomp("ethanol_aq", "Ethanol, aqueous", "alcohol solution", "MEA", 0.6,
            (173.15, 313.15), _MELINDER, pv_model="none", flammable=True,
            flammable_above=ALCOHOL_FLAMMABLE_FRACTION),
    _incomp("glycerol_aq", "Glycerol, aqueous", "alcohol solution", "MGL", 0.6,
            (173.15, 313.15), _MELINDER, M=0.092094),
    _pure("ethanol", "Ethanol", "Ethanol", (159.1, 514.71),
          "Schroeder et al. 2014 equation of state", "Kiselev et al. 2005 viscosity",
          {"BibTeX-EOS": "Schroeder-JPCRD-2014", "BibTeX-VISCOSITY": "Kiselev-IECR-2005"}),
    _pure("methanol", "Methanol", "Methanol", (175.61, 513.38),
          "de Reuck & Craven 1993 (IUPAC) equation of state", "Xiang et al. 2006 viscosity",
          {"BibTeX-EOS": "deReuck-BOOK-1993", "BibTeX-VISCOSITY": "Xiang-JPCRD-2006"}),
    _pure("toluene", "Toluene", "Toluene", (178.0, 591.75),
          "Lemmon & Span 2006 equation of state", "Avgeri et al. 2015 viscosity",
          {"BibTeX-EOS": "Lemmon-JCED-2006", "BibTeX-VISCOSITY": "Avgeri-JPCRD-2015-Toluene"}),
    _pure("n_heptane", "n-Heptane", "n-Heptane", (182.55, 541.23),
          "Span & Wagner 2003 equation of state", "Michailidou et al. 2014 viscosity",
          {"BibTeX-EOS": "Span-IJT-2003B", "BibTeX-VISCOSITY": "Michailidou-JPCRD-2014-Heptane"}),
)}


def families() -> dict[str, list[str]]:
    """Registry keys grouped by family, in :data:`FAMILIES` order.

    >>> families()["brine"]
    ['nacl_brine', 'cacl2_brine', 'seawater']
    """
    out: dict[str, list[str]] = {f: [] for f in FAMILIES}
    for key, spec in LIQUIDS.items():
        out.setdefault(spec.family, []).append(key)
    return out


# --------------------------------------------------------------------------- CoolProp, lazily

@lru_cache(maxsize=1)
def _cp():
    import CoolProp.CoolProp as CP  # noqa: N813 (heavy import, ~2 s: kept lazy)

    return CP


@lru_cache(maxsize=64)
def _abstract_state(backend: str, fluid: str, fraction: float | None):
    st = _cp().AbstractState(backend, fluid)
    if fraction is not None:
        st.set_mass_fractions([fraction])
    return st


@lru_cache(maxsize=16)
def _heos_limits(fluid: str) -> tuple[float, float, float]:
    """(T_critical [K], p_critical [Pa], p_triple [Pa]) of a HEOS fluid."""
    st = _abstract_state("HEOS", fluid, None)
    return st.T_critical(), st.p_critical(), st.p_triple()


@lru_cache(maxsize=1024)
def _heos_T_sat(fluid: str, P: float) -> float:
    st = _abstract_state("HEOS", fluid, None)
    st.update(_cp().PQ_INPUTS, P, 0.0)
    return st.T()


@lru_cache(maxsize=4096)
def _heos_p_sat(fluid: str, T: float) -> float:
    st = _abstract_state("HEOS", fluid, None)
    st.update(_cp().QT_INPUTS, 0.0, T)
    return st.p()


@lru_cache(maxsize=256)
def _incomp_T_freeze(fluid: str, x: float) -> float:
    st = _abstract_state("INCOMP", fluid, x)
    return st.trivial_keyed_output(_cp().iT_freeze)


_WP_A = (-7.85951783, 1.84408259, -11.7866497, 22.6807411, -15.9618719, 1.80122502)
_WP_E = (1.0, 1.5, 3.0, 3.5, 4.0, 7.5)


def water_saturation_pressure(T: float) -> float:
    """Saturation pressure of water by Wagner & Pruß (1993), the IAPWS 1992 equation.

    .. math:: \\ln\\frac{p_\\sigma}{p_c} = \\frac{T_c}{T}\\left(a_1\\tau + a_2\\tau^{1.5}
              + a_3\\tau^3 + a_4\\tau^{3.5} + a_5\\tau^4 + a_6\\tau^{7.5}\\right),
              \\quad \\tau = 1 - T/T_c

    Parameters
    ----------
    T : float
        Temperature, 150 K to 647.096 K [K]

    Returns
    -------
    p_sat : float
        Saturation pressure over liquid water [Pa]

    Notes
    -----
    Valid from 273.16 K to the critical point (agrees with IAPWS-95 to about 0.01 %).
    Below 273.16 K it is extrapolated over supercooled liquid; used here only inside the
    Raoult estimate for solutions that stay liquid below 0 °C, where the pressures are a
    few hundred pascals or less.

    Examples
    --------
    >>> round(water_saturation_pressure(373.15))
    101418

    References
    ----------
    Wagner, W., Pruß, A. (1993). J. Phys. Chem. Ref. Data 22(3), 783–787. doi:10.1063/1.555926
    """
    T = check_range("temperature", T, "K", low=150.0, high=647.096, low_inclusive=True)
    tau = 1.0 - T / 647.096
    s = sum(a * tau ** e for a, e in zip(_WP_A, _WP_E, strict=True))
    return 22.064e6 * math.exp(647.096 / T * s)


# --------------------------------------------------------------------------- state values

def _refuse_boiling(name: str, T: float, P: float, T_sat: float) -> None:
    raise LiquidStateError(
        "temperature", T, "K",
        f"must be below the saturation temperature {T_sat:.6g} K of {name} at {P:.6g} Pa "
        "(at or above it the liquid boils or is vapour)")


def _heos_values(spec: LiquidSpec, T: float, P: float):
    fluid = spec.backend.split("::", 1)[1]
    T_low = spec.T_range[0]
    note = "; ice melts at 273.15 K at 1 atm, a 0.01 K difference not modelled" if spec.key == "water" else ""
    if T < T_low:
        raise LiquidStateError(
            "temperature", T, "K",
            f"must be at or above the triple point {T_low:.6g} K of {spec.name} "
            f"(below it the liquid freezes{note})")
    T_c, p_c, p_tr = _heos_limits(fluid)
    if P <= p_tr:
        raise LiquidStateError(
            "pressure", P, "Pa",
            f"must be above the triple-point pressure {p_tr:.6g} Pa of {spec.name} "
            "(no liquid exists below it)")
    if P < p_c:
        T_high = _heos_T_sat(fluid, P)
        if T >= T_high:
            _refuse_boiling(spec.name, T, P, T_high)
    else:
        T_high = T_c
        if T >= T_c:
            raise LiquidStateError(
                "temperature", T, "K",
                f"must be below the critical temperature {T_c:.6g} K of {spec.name} (above it, not a liquid)")
    CP = _cp()
    st = _abstract_state("HEOS", fluid, None)
    st.update(CP.PT_INPUTS, P, T)
    if st.phase() not in (CP.iphase_liquid, CP.iphase_supercritical_liquid):
        # Belt and braces: the saturation check above should already have refused this.
        raise LiquidStateError("temperature", T, "K", f"does not give liquid {spec.name} at {P:.6g} Pa")
    rho, mu = st.rhomass(), st.viscosity()
    pv = _heos_p_sat(fluid, T)
    rng = (T_low, T_high)
    return rho, mu, pv, {"rho": rng, "mu": rng, "pv": (T_low, T_c)}


def _incomp_values(spec: LiquidSpec, x: float, T: float, P: float):
    fluid = spec.backend.split("::", 1)[1]
    T_min, T_max = spec.T_range
    T_low = T_min
    if spec.uses_freezing_fit:
        T_frz = _incomp_T_freeze(fluid, x)
        if T < T_frz:
            raise LiquidStateError(
                "temperature", T, "K",
                f"must be at or above the freezing point {T_frz:.5g} K of {spec.name} at {x:g} kg/kg "
                "(below it the liquid freezes)")
        T_low = max(T_min, T_frz)
    if not T_min <= T <= T_max:
        raise OutOfRangeError("temperature", T, "K", low=T_min, high=T_max)
    CP = _cp()
    st = _abstract_state("INCOMP", fluid, x)
    st.update(CP.PT_INPUTS, P, T)
    rho, mu = st.rhomass(), st.viscosity()
    if spec.pv_model == "fit":
        st.update(CP.QT_INPUTS, 0.0, T)
        pv = st.p()
    elif spec.pv_model == "raoult":
        n_w = (1.0 - x) / _M_WATER
        n_s = spec.ions * x / spec.solute_molar_mass
        pv = n_w / (n_w + n_s) * water_saturation_pressure(T)
    else:
        pv = None
    if pv is not None and pv >= P:
        est = " estimate" if spec.pv_model == "raoult" else ""
        raise LiquidStateError(
            "temperature", T, "K",
            f"must be below the boiling point of {spec.name} at {P:.6g} Pa (its vapour pressure{est} "
            f"there is {pv:.6g} Pa, at or above the pressure: the liquid boils)")
    rng = (T_low, T_max)
    ranges = {"rho": rng, "mu": rng}
    if pv is not None:
        ranges["pv"] = rng
    return rho, mu, pv, ranges


@lru_cache(maxsize=4096)
def _state_values(key: str, concentration: float | None, T: float, P: float):
    """(rho, mu, pv, ranges as a tuple of items), cached per (liquid, concentration, T, P)."""
    spec = LIQUIDS[key]
    if spec.backend.startswith("HEOS::"):
        rho, mu, pv, ranges = _heos_values(spec, T, P)
    else:
        rho, mu, pv, ranges = _incomp_values(spec, concentration, T, P)
    return float(rho), float(mu), (None if pv is None else float(pv)), tuple(ranges.items())


def _check_T_P(T, P) -> tuple[float, float]:
    T = check_range("temperature", T, "K", low=0.0)
    P = check_range("pressure", P, "Pa", low=0.0, high=P_MAX)
    return T, P


# --------------------------------------------------------------------------- liquids

@dataclass(frozen=True)
class Liquid:
    """A liquid from the registry: a key and, for solutions, a mass fraction.

    Parameters
    ----------
    key : str
        One of :data:`LIQUIDS` [-]
    concentration : float or None
        Solute mass fraction for solutions, within the spec's range [kg/kg]; None for
        water and pure liquids.

    Examples
    --------
    >>> g = Liquid("ethylene_glycol_aq", 0.3)
    >>> g.name
    'Ethylene glycol, aqueous, 30 % by mass'
    >>> round(g.state(293.15).rho, 1)
    1038.0
    """

    key: str
    concentration: float | None = None

    def __post_init__(self):
        check_choice("liquid", self.key, tuple(LIQUIDS))
        spec = LIQUIDS[self.key]
        if not spec.needs_concentration:
            if self.concentration is not None:
                raise InputError(
                    "concentration", self.concentration,
                    f"must not be given for {spec.name}, a pure liquid (leave it empty)", "kg/kg")
            return
        if self.concentration is None:
            lo, hi = spec.concentration_range
            raise InputError(
                "concentration", None,
                f"is required for {spec.name}: give the {spec.basis} between {lo:g} and {hi:g} kg/kg")
        lo, hi = spec.concentration_range
        x = check_range("concentration", self.concentration, "kg/kg", low=lo, high=hi,
                        low_inclusive=True)
        object.__setattr__(self, "concentration", x)

    @property
    def spec(self) -> LiquidSpec:
        """The registry entry."""
        return LIQUIDS[self.key]

    @property
    def name(self) -> str:
        """Display name with the concentration."""
        if self.concentration is None:
            return self.spec.name
        return f"{self.spec.name}, {self.concentration * 100:.4g} % by mass"

    @property
    def flammable(self) -> bool:
        """Whether this liquid, at this concentration, is marked flammable."""
        spec = self.spec
        if not spec.flammable:
            return False
        return spec.flammable_above is None or self.concentration >= spec.flammable_above

    def state(self, T: float, P: float = P_ATM) -> LiquidState:
        """Properties at temperature ``T`` and absolute pressure ``P`` (cached).

        Parameters
        ----------
        T : float
            Temperature [K]
        P : float
            Absolute pressure, 0 to 1e8 Pa [Pa]

        Returns
        -------
        state : LiquidState
            Density [kg/m³], viscosity [Pa·s], vapour pressure [Pa] or None, with sources
            and ranges.

        Raises
        ------
        LiquidStateError
            Frozen, boiling, or no liquid at this pressure.
        OutOfRangeError
            Temperature outside the model's range; pressure not in (0, 1e8] Pa.

        Examples
        --------
        >>> round(Liquid("toluene").state(298.15).pv)
        3799
        """
        T, P = _check_T_P(T, P)
        rho, mu, pv, ranges = _state_values(self.key, self.concentration, T, P)
        return LiquidState(name=self.name, T=T, P=P, rho=rho, mu=mu, pv=pv,
                           sources=dict(self.spec.sources), ranges=dict(ranges),
                           flammable=self.flammable)


def make_liquid(key: str, concentration: float | None = None) -> Liquid:
    """A registry liquid; a concentration (mass fraction) is required for solutions only.

    Parameters
    ----------
    key : str
        One of :data:`LIQUIDS` [-]
    concentration : float or None
        Solute mass fraction [kg/kg]

    Returns
    -------
    liquid : Liquid

    Examples
    --------
    >>> make_liquid("seawater", 0.035).name
    'Seawater, 3.5 % by mass'
    """
    return Liquid(key, concentration)


def _as_floats(field_name: str, values, unit: str, n: int | None):
    """A scalar (constant) or an n-long table of positive finite floats."""
    if np.ndim(values) == 0:
        return check_range(field_name, values, unit, low=0.0)
    seq = list(values)
    if n is not None and len(seq) != n:
        raise InputError(field_name, len(seq),
                         f"must have {n} values, one per temperature in 'T' (or be a single value)")
    return tuple(check_range(f"{field_name}[{i}]", v, unit, low=0.0) for i, v in enumerate(seq))


@dataclass(frozen=True)
class UserLiquid:
    """A liquid with the user's own properties: constants, or a table over temperature.

    Parameters
    ----------
    name : str
        Display name [-]
    T : sequence of float
        At least two strictly increasing temperatures: the table's rows, or, for
        constants, the range the constants hold over [K]
    rho : float or sequence of float
        Density, > 0: one value (constant) or one per temperature [kg/m³]
    mu : float or sequence of float
        Dynamic viscosity, > 0: one value or one per temperature [Pa·s]
    pv : float, sequence of float or None
        Vapour pressure, > 0: one value, one per temperature, or None for no model [Pa]
    flammable : bool
        Whether the liquid is flammable [-]

    Notes
    -----
    Between table rows, density is interpolated linearly in T; viscosity and vapour
    pressure log-linearly (ln mu and ln pv linear in T), which follows their near-exponential
    fall and rise with temperature. States outside ``[T[0], T[-1]]`` are refused; nothing is
    extrapolated. States where ``pv >= P`` are refused as boiling.

    Examples
    --------
    >>> oil = UserLiquid("light oil", T=(280.0, 300.0), rho=(880.0, 866.0), mu=(0.02, 0.01))
    >>> s = oil.state(290.0)
    >>> round(s.rho, 1), round(s.mu, 6)
    (873.0, 0.014142)
    """

    name: str
    T: tuple
    rho: float | tuple
    mu: float | tuple
    pv: float | tuple | None = None
    flammable: bool = False

    def __post_init__(self):
        if not isinstance(self.name, str) or not self.name.strip():
            raise InputError("name", self.name, "must be a non-empty text")
        if np.ndim(self.T) != 1 or len(self.T) < 2:
            raise InputError(
                "T", self.T,
                "must be at least two increasing temperatures (the range the values hold over)", "K")
        T = tuple(check_range(f"T[{i}]", v, "K", low=0.0) for i, v in enumerate(self.T))
        for i in range(1, len(T)):
            if T[i] <= T[i - 1]:
                raise InputError(f"T[{i}]", T[i], f"must be greater than T[{i - 1}] = {T[i - 1]:g} K "
                                 "(temperatures strictly increasing)", "K")
        n = len(T)
        object.__setattr__(self, "T", T)
        object.__setattr__(self, "rho", _as_floats("rho", self.rho, "kg/m³", n))
        object.__setattr__(self, "mu", _as_floats("mu", self.mu, "Pa·s", n))
        if self.pv is not None:
            object.__setattr__(self, "pv", _as_floats("pv", self.pv, "Pa", n))
        if not isinstance(self.flammable, bool):
            raise InputError("flammable", self.flammable, "must be True or False")

    key = "user"
    concentration = None

    @property
    def spec(self) -> LiquidSpec:
        """A registry-like description of this user liquid."""
        return LiquidSpec(
            key="user", name=self.name, family="user-defined", backend="user table", basis=None,
            concentration_range=None, T_range=(self.T[0], self.T[-1]), flammable=self.flammable,
            flammable_above=None, source="user values", sources=self._sources(), pv_model=(
                "none" if self.pv is None else "user"))

    def _sources(self) -> dict[str, str]:
        def text(values, how):
            return "user value, constant" if isinstance(values, float) else f"user table, {how}"
        return {
            "rho": text(self.rho, "linear interpolation in T"),
            "mu": text(self.mu, "log-linear interpolation in T (ln mu linear in T)"),
            "pv": NO_PV_SOURCE if self.pv is None
            else text(self.pv, "log-linear interpolation in T (ln pv linear in T)"),
        }

    def _at(self, T: float, values, log: bool) -> float:
        if isinstance(values, float):
            return values
        if log:
            return float(np.exp(np.interp(T, self.T, np.log(values))))
        return float(np.interp(T, self.T, values))

    def state(self, T: float, P: float = P_ATM) -> LiquidState:
        """Properties at ``T`` and ``P`` from the user's values.

        Parameters
        ----------
        T : float
            Temperature within the table [K]
        P : float
            Absolute pressure, 0 to 1e8 Pa [Pa]

        Returns
        -------
        state : LiquidState
        """
        T, P = _check_T_P(T, P)
        T = check_range("temperature", T, "K", low=self.T[0], high=self.T[-1], low_inclusive=True)
        pv = None if self.pv is None else self._at(T, self.pv, log=True)
        if pv is not None and pv >= P:
            raise LiquidStateError(
                "temperature", T, "K",
                f"must be below the boiling point of {self.name} at {P:.6g} Pa (its vapour pressure "
                f"there is {pv:.6g} Pa, at or above the pressure: the liquid boils)")
        rng = (self.T[0], self.T[-1])
        ranges = {"rho": rng, "mu": rng}
        if pv is not None:
            ranges["pv"] = rng
        return LiquidState(name=self.name, T=T, P=P, rho=self._at(T, self.rho, log=False),
                           mu=self._at(T, self.mu, log=True), pv=pv, sources=self._sources(),
                           ranges=ranges, flammable=self.flammable)


# --------------------------------------------------------------------------- bulk modulus

#: Allowed user-given liquid bulk modulus [Pa]: (low exclusive, high inclusive). Liquids in
#: piping lie between ~0.5 GPa (light hydrocarbons near boiling) and ~4 GPa (glycerol); the
#: bounds are wide on purpose (common practice, no source).
BULK_MODULUS_RANGE = (1.0e7, 2.0e10)

_NO_SOUND_SOURCE = (
    "is required for {name}: there is no speed-of-sound model for it, so give the bulk "
    "modulus in Pa (water is about 2.2 GPa at 20 degC by IAPWS-95; the liquid's supplier or a "
    "handbook gives others)")


@dataclass(frozen=True)
class BulkModulus:
    """A liquid's bulk modulus and speed of sound at one state, with the source.

    Attributes
    ----------
    K : float
        Isentropic bulk modulus ``rho c²`` (or the user's value) [Pa]
    c : float
        Speed of sound in the unconfined liquid, ``sqrt(K/rho)`` [m/s]
    rho : float
        Density at the same state [kg/m³]
    source : str
        Where ``K`` comes from.
    """

    K: float
    c: float
    rho: float
    source: str


@lru_cache(maxsize=1024)
def _heos_sound_speed(fluid: str, T: float, P: float) -> float:
    st = _abstract_state("HEOS", fluid, None)
    st.update(_cp().PT_INPUTS, P, T)
    return float(st.speed_sound())


def bulk_modulus(liquid, T: float, P: float = P_ATM, K_user: float | None = None) -> BulkModulus:
    """Isentropic bulk modulus of a liquid, ``K = rho c²``, from the equation of state.

    For water (IAPWS-95, Wagner & Pruß 2002) and the pure organic liquids, the speed of sound
    ``c`` comes from the same CoolProp ``HEOS`` equation of state as the density, and
    ``K = rho c²`` is the isentropic (adiabatic) bulk modulus, the one that governs a pressure
    wave (Wylie & Streeter 1993, ch. 1). For water the isentropic and isothermal moduli differ
    by about 1 % at 20 degC (from memory).

    The incompressible fits (glycol, brine and alcohol solutions, seawater) and user liquids
    carry no speed of sound: for them a **user value is required** (``K_user``); no estimate
    is made, because a low guess would understate a surge. :class:`~kit.errors.InputError`
    names the field when it is missing.

    Parameters
    ----------
    liquid : Liquid or UserLiquid
        The liquid [-]
    T : float
        Temperature [K]
    P : float
        Absolute pressure, 0 to 1e8 Pa [Pa]
    K_user : float, optional
        The user's bulk modulus, 1e7 to 2e10 Pa; used for any liquid when given [Pa]

    Returns
    -------
    result : BulkModulus
        ``K`` [Pa], ``c`` [m/s], ``rho`` [kg/m³] and the source text

    Examples
    --------
    >>> b = bulk_modulus(make_liquid("water"), 293.15)
    >>> round(b.c, 1), round(b.K / 1e9, 3)
    (1482.3, 2.193)

    References
    ----------
    .. [1] Wagner, W., Pruß, A. (2002). J. Phys. Chem. Ref. Data 31(2), 387-535.
       doi:10.1063/1.1461829
    .. [2] Wylie, E. B., Streeter, V. L. (1993). Fluid Transients in Systems. Prentice Hall.
    """
    state = liquid.state(T, P)
    if K_user is not None:
        K = check_range("liquid bulk modulus", K_user, "Pa", *BULK_MODULUS_RANGE)
        return BulkModulus(K=K, c=math.sqrt(K / state.rho), rho=state.rho,
                           source="user value")
    backend = liquid.spec.backend
    if not backend.startswith("HEOS::"):
        raise InputError("liquid bulk modulus", None, _NO_SOUND_SOURCE.format(name=liquid.name))
    fluid = backend.split("::", 1)[1]
    c = _heos_sound_speed(fluid, state.T, state.P)
    eos = liquid.spec.sources["rho"]
    return BulkModulus(K=state.rho * c * c, c=c, rho=state.rho,
                       source=f"rho c^2, speed of sound from {eos}")
