"""Endpoints and systems: the system head curve and its band over conditions.

The system head a pump must supply to move flow Q from the source surface to the
destination surface is the energy equation with a head-loss term:

.. math:: H(Q) = (z_d - z_s) + \\frac{p_d - p_s}{\\rho g} + h_{L,suction}(Q)
          + h_{L,discharge}(Q) \\; [+ V_{exit}^2/2g \\text{ for a free discharge}]

A submerged discharge loses its exit velocity head through the exit fitting (K = 1), which
belongs in the last segment's fitting list. The *band* is the set of curves over static
head (minimum / maximum, from the two endpoints' level ranges), liquid temperature
(minimum / maximum) and pipe condition (new / aged roughness).

Example
-------
>>> import numpy as np
>>> from types import SimpleNamespace as NS
>>> src = Endpoint("sump", 0.0, 2.0, 101325.0)
>>> dst = Endpoint("tank", 20.0, 25.0, 101325.0)
>>> st = NS(rho=998.2, mu=1.0e-3, pv=2339.0)
>>> liquid = NS(state=lambda T, P=101325.0: st, name="water")
>>> sysm = System("demo", src, dst, None, None, liquid, 293.15, 293.15)
>>> float(sysm.curve(np.array([0.0]), Condition("max", 293.15, "new"))[0])
25.0
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from kit.core.line import G, Line
from kit.errors import InputError, check_choice, check_range

__all__ = ["Endpoint", "System", "Condition", "SystemBand", "STATIC_CASES"]

#: static-head cases: name -> (source level, destination level)
STATIC_CASES = {"min": ("high", "low"), "max": ("low", "high")}


@dataclass(frozen=True)
class Endpoint:
    """A vessel or open surface at one end of a system.

    Parameters
    ----------
    name : str
    level_low, level_high : float
        Lowest and highest elevation of the liquid surface [m] (for a free discharge, the
        outlet's elevation, both equal).
    pressure : float
        Absolute pressure on the surface [Pa] (atmospheric for an open tank).
    discharge : str
        ``"submerged"`` (a surface) or ``"free"`` (a jet into air: the exit velocity head
        is added to the system curve).
    """

    name: str
    level_low: float
    level_high: float
    pressure: float = 101325.0
    discharge: str = "submerged"

    def __post_init__(self):
        check_range(f"low level of '{self.name}'", self.level_low, "m", low=-1e4, high=1e4)
        check_range(f"high level of '{self.name}'", self.level_high, "m",
                    low=self.level_low, high=1e4, low_inclusive=True)
        check_range(f"surface pressure of '{self.name}'", self.pressure, "Pa", low=0.0,
                    high=1e8)
        check_choice(f"discharge of '{self.name}'", self.discharge, ("submerged", "free"))

    def level(self, which: str) -> float:
        return self.level_low if which == "low" else self.level_high


@dataclass(frozen=True)
class Condition:
    """One member of the band: static-head case, liquid temperature [K], pipe condition."""

    static: str
    T: float
    roughness: str

    def __post_init__(self):
        check_choice("static head case", self.static, tuple(STATIC_CASES))
        check_choice("pipe condition", self.roughness, ("new", "aged"))

    @property
    def label(self) -> str:
        return f"{self.static} static / {self.T - 273.15:.0f} °C / {self.roughness}"


@dataclass(frozen=True)
class SystemBand:
    """System curves over the band's conditions: ``H[i]`` is the curve of ``conditions[i]``."""

    Q: np.ndarray
    conditions: tuple
    H: np.ndarray

    @property
    def lower(self) -> np.ndarray:
        return self.H.min(axis=0)

    @property
    def upper(self) -> np.ndarray:
        return self.H.max(axis=0)

    def curve(self, condition: Condition) -> np.ndarray:
        return self.H[self.conditions.index(condition)]


@dataclass(frozen=True)
class System:
    """A pumped (or gravity) system: source, destination, suction and discharge lines.

    Parameters
    ----------
    name : str
    source, destination : Endpoint
    suction : Line or None
        Source to pump; ``None`` when the pump draws straight from the source.
    discharge : Line or None
        Pump to destination.
    liquid : Liquid
        Anything with ``state(T, P)`` returning rho, mu, pv.
    T_min, T_max : float
        Liquid temperature range [K].
    p_baro : float
        Barometric pressure at the site [Pa].
    pump_elevation : float, optional
        Elevation of the pump's suction datum (impeller eye / suction flange centreline) [m];
        defaults to the suction line's end elevation.
    """

    name: str
    source: Endpoint
    destination: Endpoint
    suction: Line | None
    discharge: Line | None
    liquid: object
    T_min: float
    T_max: float
    p_baro: float = 101325.0
    pump_elevation: float | None = None
    _cache: dict = field(default_factory=dict, compare=False, repr=False, hash=False)

    def __post_init__(self):
        check_range("minimum liquid temperature", self.T_min, "K", low=0.0, high=1000.0)
        check_range("maximum liquid temperature", self.T_max, "K", low=self.T_min, high=1000.0,
                    low_inclusive=True)
        check_range("barometric pressure", self.p_baro, "Pa", low=1e4, high=1.2e5)

    @property
    def lines(self) -> tuple:
        return tuple(x for x in (self.suction, self.discharge) if x is not None)

    @property
    def pump_z(self) -> float:
        if self.pump_elevation is not None:
            return float(self.pump_elevation)
        if self.suction is not None:
            return self.suction.end_elevation
        if self.discharge is not None:
            return self.discharge.start_elevation
        raise InputError("pump elevation", None, "is needed when the system has no lines")

    def state(self, T: float):
        """Liquid state at temperature T [K], at the source surface pressure."""
        return self.liquid.state(T, max(self.source.pressure, self.p_baro))

    def _line(self, which: str, roughness: str) -> Line | None:
        key = (which, roughness)
        if key not in self._cache:
            line = getattr(self, which)
            self._cache[key] = None if line is None else line.with_condition(roughness)
        return self._cache[key]

    def static_head(self, static: str, T: float) -> float:
        """Static head [m]: elevation difference plus surface-pressure difference."""
        s_lvl, d_lvl = STATIC_CASES[static]
        rho = self.state(T).rho
        dz = self.destination.level(d_lvl) - self.source.level(s_lvl)
        return dz + (self.destination.pressure - self.source.pressure) / (rho * G)

    def suction_loss(self, Q, condition: Condition) -> np.ndarray:
        """Suction-line head loss [m] over flows Q [m³/s] (zeros with no suction line)."""
        line = self._line("suction", condition.roughness)
        Q = np.asarray(Q, dtype=float)
        if line is None:
            return np.zeros_like(Q)
        return line.head_loss(Q, self.state(condition.T))

    def curve(self, Q, condition: Condition) -> np.ndarray:
        """System head [m] over flows Q [m³/s] at one condition."""
        Q = np.asarray(Q, dtype=float)
        st = self.state(condition.T)
        H = np.full(Q.shape, self.static_head(condition.static, condition.T))
        for which in ("suction", "discharge"):
            line = self._line(which, condition.roughness)
            if line is not None:
                H = H + line.head_loss(Q, st)
        if self.destination.discharge == "free" and self.discharge is not None:
            V = Q / self.discharge.exit_area
            H = H + V * V / (2.0 * G)
        return H

    def conditions(self) -> tuple:
        """The band: static (min, max) × temperature (min, max) × roughness (new, aged)."""
        temps = (self.T_min,) if self.T_max == self.T_min else (self.T_min, self.T_max)
        return tuple(Condition(s, T, r) for s in ("min", "max") for T in temps
                     for r in ("new", "aged"))

    def band(self, Q) -> SystemBand:
        """System curves over every condition of :meth:`conditions`."""
        Q = np.asarray(Q, dtype=float)
        conds = self.conditions()
        return SystemBand(Q, conds, np.stack([self.curve(Q, c) for c in conds]))

    def npsh_available(self, Q, condition: Condition) -> np.ndarray:
        """NPSH available at the pump suction datum [m] over flows Q [m³/s].

        NPSHa = (p_s − p_v)/(ρg) + (z_s − z_pump) − h_L,suction, with the source surface at
        its level for the condition's static case (lowest source level for "max").
        Definition as in ANSI/HI 9.6.1 (total suction head above vapour pressure at the
        suction datum; from memory).
        """
        st = self.state(condition.T)
        pv = st.require_pv("vapour pressure for NPSH") if hasattr(st, "require_pv") else st.pv
        s_lvl = STATIC_CASES[condition.static][0]
        head = (self.source.pressure - pv) / (st.rho * G) + self.source.level(s_lvl) - self.pump_z
        return head - self.suction_loss(Q, condition)
