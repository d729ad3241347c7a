"""Tank geometry: liquid volume, level and surface area against level.

A :class:`Tank` is a vertical or horizontal cylinder with a head at each end, a sphere, or a
user's strapping table (level against volume). Levels are measured from the tank's lowest
interior point (level datum, 0 m) up to ``h_max``; volumes are of the liquid below the level.

Methods applied
---------------
- Cylinders with heads and the sphere: exact partial-volume formulas of Jones (2003), as
  coded in :class:`fluids.geometry.TANK` (``V_from_h``). Horizontal torispherical heads are
  integrated numerically by fluids and are about 100× slower than the other shapes (about
  80 µs a call against 1 µs); they are allowed, and the one-off level table of such a tank
  takes about 0.05 s.
- Level from volume: Brent's method (``scipy.optimize.brentq``) on the exact volume, bracketed
  by a cached table. fluids' default ``h_from_V`` (a 100-point spline) is millimetres wrong
  near the bottom of a horizontal tank and is not used.
- Surface area: the derivative dV/dh by a central difference of the exact volume, one-sided
  at the bottom and top. fluids' ``A_cross_sectional`` returns 0 at h = 0 and at ``h_max``
  even for a flat-bottomed vertical tank, whose true area there is πD²/4; it is not used.
- Strapping table: monotone cubic interpolation of volume on level (Fritsch & Carlson 1980,
  ``scipy.interpolate.PchipInterpolator``); area is the interpolant's derivative.

Refused, because fluids accepts them and returns a wrong answer silently: a 'guppy' head (on
a vertical tank fluids counts its height but not its volume), a spherical head deeper than
the radius (horizontal and vertical tanks then disagree), any level above the tank
(fluids truncates it to ``h_max``), a torispherical head given by its depth (fluids then
leaves the dish and knuckle radii unset).

Example
-------
>>> t = vertical_cylinder(2.0, 3.0, bottom="ellipsoidal")
>>> round(t.h_max, 3), round(t.V_total, 4)
(3.5, 10.472)
>>> round(t.level(t.volume(1.234)), 9)
1.234

References
----------
Jones, D. (2003). Compute fluid volumes in vertical tanks. Chemical Processing, Dec. 18, 2003.
Fritsch, F. N., Carlson, R. E. (1980). Monotone piecewise cubic interpolation. SIAM J. Numer.
Anal. 17(2), 238–246. doi:10.1137/0717021
"""

from __future__ import annotations

from dataclasses import dataclass, field
from functools import cached_property

import numpy as np

from kit.errors import InputError, OutOfRangeError, check_choice, check_range

__all__ = [
    "Head", "Tank", "HEAD_KINDS", "SHAPES", "ORIENTATIONS", "TORISPHERICAL_STANDARDS",
    "vertical_cylinder", "horizontal_cylinder", "sphere", "strapping_table", "TANK_METHODS",
]

#: Tank shapes offered.
SHAPES = ("cylinder", "sphere", "table")
#: Cylinder orientations offered.
ORIENTATIONS = ("vertical", "horizontal")

#: Head kinds: our key -> (fluids' name, default depth ratio a/D or None, what it is).
HEAD_KINDS: dict[str, dict] = {
    "flat": {"fluids": None, "ratio": None, "label": "flat head (plate)"},
    "conical": {"fluids": "conical", "ratio": None, "label": "conical head; give its depth"},
    "ellipsoidal": {"fluids": "ellipsoidal", "ratio": 0.25,
                    "label": "ellipsoidal head; default 2:1 (depth D/4)"},
    "torispherical": {"fluids": "torispherical", "ratio": None,
                      "label": "torispherical (dished) head by dish and knuckle radius ratios; "
                               "default ASME F&D (f = 1, k = 0.06)"},
    "spherical": {"fluids": "spherical", "ratio": 0.5,
                  "label": "spherical cap head; default hemispherical (depth D/2)"},
}

#: Dish (f) and knuckle (k) radius ratios of standard torispherical heads, as tabled in
#: fluids.geometry.TANK (Caleb Bell) — e.g. ASME F&D f = 1, k = 0.06.
TORISPHERICAL_STANDARDS: dict[str, tuple[float, float]] = {
    "ASME F&D": (1.0, 0.06),
    "ASME 80/6": (0.8, 0.06),
    "ASME 80/10 F&D": (0.8, 0.1),
    "DIN 28011": (1.0, 0.1),
    "DIN 28013": (0.8, 0.154),
    "2:1 semi-elliptical": (0.9, 0.17),
}

#: Validity ranges (data, not prose) of the inputs [SI].
RANGES = {
    "D": (0.0, 1000.0),            # m, open at 0
    "L": (0.0, 10000.0),           # m, open at 0
    "head ratio": (0.0, 10.0),     # a/D, open at 0; spherical at most 0.5
    "f": (0.5, 5.0),               # dish radius / D
    "k": (0.0, 0.5),               # knuckle radius / D, open at 0
}

#: Method statements for findings and the record.
TANK_METHODS = {
    "volume": "exact partial volumes, Jones (2003), via fluids.geometry.TANK.V_from_h",
    "level": "Brent's method on the exact volume (scipy brentq), xtol 1e-12 m",
    "area": "dV/dh by central difference of the exact volume (one-sided at the ends)",
    "table": "monotone cubic interpolation, Fritsch & Carlson (1980), scipy PchipInterpolator",
}

_N_TABLE = 513


@dataclass(frozen=True)
class Head:
    """One end of a cylindrical tank.

    Parameters
    ----------
    kind : str
        One of :data:`HEAD_KINDS` ('flat', 'conical', 'ellipsoidal', 'torispherical',
        'spherical').
    depth : float, optional
        How far the head extends beyond the straight shell [m]. Not for 'flat' or
        'torispherical'.
    ratio : float, optional
        ``depth / D`` instead of ``depth`` [-].
    f : float, optional
        Torispherical dish radius over D [-] (default 1.0, ASME F&D).
    k : float, optional
        Torispherical knuckle radius over D [-] (default 0.06, ASME F&D).
    """

    kind: str = "flat"
    depth: float | None = None
    ratio: float | None = None
    f: float | None = None
    k: float | None = None

    def __post_init__(self):
        if self.kind == "guppy":
            raise InputError("head kind", "guppy", "is not offered: fluids ignores a guppy head "
                             "on a vertical tank (its volume is lost); choose another head")
        check_choice("head kind", self.kind, tuple(HEAD_KINDS))
        if self.kind in ("flat", "torispherical"):
            if self.depth is not None or self.ratio is not None:
                why = ("has no depth" if self.kind == "flat" else
                       "takes its depth from f and k; give f and k, not a depth")
                raise InputError(f"depth of {self.kind} head",
                                 self.depth if self.depth is not None else self.ratio, why)
        elif self.depth is not None and self.ratio is not None:
            raise InputError(f"depth of {self.kind} head", self.depth,
                             "is given twice: give depth or ratio, not both", "m")
        if self.kind != "torispherical" and (self.f is not None or self.k is not None):
            raise InputError(f"dish/knuckle ratio of {self.kind} head",
                             self.f if self.f is not None else self.k,
                             "applies to torispherical heads only")
        if self.kind == "conical" and self.depth is None and self.ratio is None:
            raise InputError("depth of conical head", None, "must be given (depth or ratio)")
        if self.depth is not None:
            check_range(f"depth of {self.kind} head", self.depth, "m", low=0.0, high=1e4)
        if self.ratio is not None:
            lo, hi = RANGES["head ratio"]
            check_range(f"depth ratio of {self.kind} head", self.ratio, "-", low=lo, high=hi)
        if self.kind == "torispherical":
            f = 1.0 if self.f is None else self.f
            k = 0.06 if self.k is None else self.k
            check_range("dish radius ratio f of torispherical head", f, "-", *RANGES["f"],
                        low_inclusive=True)
            check_range("knuckle radius ratio k of torispherical head", k, "-", *RANGES["k"],
                        high_inclusive=False)
            object.__setattr__(self, "f", float(f))
            object.__setattr__(self, "k", float(k))

    def depth_for(self, D: float) -> float:
        """The head's depth [m] on a shell of diameter ``D`` [m]."""
        if self.kind == "flat":
            return 0.0
        if self.kind == "torispherical":
            from fluids.geometry import a_torispherical

            return float(a_torispherical(D, self.f, self.k))
        if self.depth is not None:
            return float(self.depth)
        ratio = self.ratio if self.ratio is not None else HEAD_KINDS[self.kind]["ratio"]
        return float(ratio) * D


def _as_head(value, field_name: str) -> Head:
    if isinstance(value, Head):
        return value
    if isinstance(value, str):
        if value == "guppy":
            raise InputError(field_name, "guppy", "is not offered: fluids ignores a guppy head "
                             "on a vertical tank (its volume is lost); choose another head")
        check_choice(field_name, value, tuple(HEAD_KINDS))
        return Head(value)
    raise InputError(field_name, value, "must be a head kind or a Head")


@dataclass(frozen=True)
class Tank:
    """A tank's liquid volume, level and surface area against level.

    Parameters
    ----------
    shape : str
        'cylinder', 'sphere' or 'table' (a strapping table).
    orientation : str
        'vertical' or 'horizontal' (cylinders only).
    D : float
        Inside diameter of the shell or sphere [m].
    L : float
        Straight shell length (tangent to tangent), without the heads [m].
    head1, head2 : Head or str
        Vertical tank: bottom and top head. Horizontal tank: the two ends.
    levels, volumes : sequence of float
        Strapping table: levels strictly increasing [m], volumes non-decreasing [m³].
    name : str

    Notes
    -----
    Level datum: the lowest interior point (the bottom of the bottom head, the bottom of a
    horizontal shell). A strapping table's levels are on its own datum and may start above 0.

    Examples
    --------
    >>> t = horizontal_cylinder(2.0, 5.0)
    >>> round(t.volume(1.0), 4), round(t.area(1.0), 4)
    (7.854, 10.0)
    """

    shape: str = "cylinder"
    orientation: str = "vertical"
    D: float | None = None
    L: float = 0.0
    head1: Head | str = field(default_factory=Head)
    head2: Head | str = field(default_factory=Head)
    levels: tuple | None = None
    volumes: tuple | None = None
    name: str = "tank"

    def __post_init__(self):
        check_choice("tank shape", self.shape, SHAPES)
        check_choice("tank orientation", self.orientation, ORIENTATIONS)
        h1 = _as_head(self.head1, "first head" if self.orientation == "horizontal" else
                      "bottom head")
        h2 = _as_head(self.head2, "second head" if self.orientation == "horizontal" else
                      "top head")
        object.__setattr__(self, "head1", h1)
        object.__setattr__(self, "head2", h2)
        if self.shape == "table":
            self._check_table()
            return
        if self.levels is not None or self.volumes is not None:
            raise InputError("strapping table", "levels/volumes",
                             f"is only for shape 'table', not '{self.shape}'")
        D = check_range("tank diameter D", self.D, "m", *RANGES["D"])
        object.__setattr__(self, "D", D)
        if self.shape == "sphere":
            if h1.kind != "flat" or h2.kind != "flat":
                raise InputError("heads of a sphere", f"{h1.kind}/{h2.kind}",
                                 "must be left unset: a sphere has no heads")
            if self.L not in (0, 0.0):
                raise InputError("straight length L of a sphere", self.L,
                                 "must be 0: a sphere has no straight shell", "m")
            object.__setattr__(self, "L", 0.0)
            return
        L = check_range("straight length L", self.L, "m", *RANGES["L"])
        object.__setattr__(self, "L", L)
        for which, h in (("head1", h1), ("head2", h2)):
            a = h.depth_for(D)
            if h.kind == "spherical" and a > D / 2 * (1 + 1e-12):
                raise OutOfRangeError(f"depth of spherical {self._head_name(which)}", a, "m",
                                      low=0.0, high=D / 2)

    def _head_name(self, which: str) -> str:
        if self.orientation == "vertical":
            return "bottom head" if which == "head1" else "top head"
        return "first head" if which == "head1" else "second head"

    def _check_table(self):
        if self.levels is None or self.volumes is None:
            raise InputError("strapping table", None, "needs both levels and volumes")
        h = np.asarray(self.levels, dtype=float).ravel()
        V = np.asarray(self.volumes, dtype=float).ravel()
        if h.size != V.size:
            raise InputError("strapping table volumes", V.size,
                             f"must have one volume per level ({h.size} levels)")
        if h.size < 2:
            raise InputError("strapping table levels", h.size, "must hold at least 2 rows")
        if not (np.all(np.isfinite(h)) and np.all(np.isfinite(V))):
            raise InputError("strapping table", "non-finite", "must hold finite numbers")
        if h[0] < 0:
            raise OutOfRangeError("strapping table level", float(h[0]), "m", low=0.0,
                                  low_inclusive=True)
        if V.min() < 0:
            raise OutOfRangeError("strapping table volume", float(V.min()), "m³", low=0.0,
                                  low_inclusive=True)
        dh = np.diff(h)
        if np.any(dh <= 0):
            i = int(np.argmax(dh <= 0)) + 1
            raise InputError("strapping table levels", float(h[i]),
                             f"must increase strictly (row {i} after {h[i - 1]:g} m)", "m")
        dV = np.diff(V)
        if np.any(dV < 0):
            i = int(np.argmax(dV < 0)) + 1
            raise InputError("strapping table volumes", float(V[i]),
                             f"must not decrease (row {i} after {V[i - 1]:g} m³)", "m³")
        if V[-1] <= V[0]:
            raise InputError("strapping table volumes", float(V[-1]),
                             "must rise somewhere between the first and last row", "m³")
        object.__setattr__(self, "levels", tuple(float(x) for x in h))
        object.__setattr__(self, "volumes", tuple(float(x) for x in V))

    # ----- backends -------------------------------------------------------------------------
    @cached_property
    def _fluids(self):
        from fluids.geometry import TANK

        if self.shape == "sphere":
            R = self.D / 2
            return TANK(D=self.D, L=0.0, horizontal=False, sideA="spherical",
                        sideB="spherical", sideA_a=R, sideB_a=R)
        kw = {"D": self.D, "L": self.L, "horizontal": self.orientation == "horizontal"}
        for side, h in (("sideA", self.head1), ("sideB", self.head2)):
            kw[side] = HEAD_KINDS[h.kind]["fluids"]
            if h.kind == "torispherical":
                kw[side + "_f"], kw[side + "_k"] = h.f, h.k
            elif h.kind == "flat":
                kw[side + "_a"] = 0.0
            else:
                kw[side + "_a"] = h.depth_for(self.D)
        return TANK(**kw)

    @cached_property
    def _pchip(self):
        from scipy.interpolate import PchipInterpolator

        return PchipInterpolator(np.array(self.levels), np.array(self.volumes), extrapolate=False)

    @cached_property
    def table(self) -> tuple[np.ndarray, np.ndarray]:
        """A cached level grid [m] (clustered at the ends, with head junctions) and exact volumes
        [m³] on it."""
        lo, hi = self.h_min, self.h_max
        s = np.linspace(0.0, 1.0, _N_TABLE)
        h = lo + (hi - lo) * 0.5 * (1.0 - np.cos(np.pi * s))
        extra = []
        if self.shape == "table":
            extra = list(self.levels)
        elif self.shape == "cylinder" and self.orientation == "vertical":
            a1 = self._fluids.sideA_a or 0.0
            extra = [a1, a1 + self.L]
        h = np.unique(np.clip(np.concatenate([h, extra]), lo, hi))
        return h, self._volume_array(h)

    def _volume_array(self, h: np.ndarray) -> np.ndarray:
        if self.shape == "table":
            return np.asarray(self._pchip(h), dtype=float)
        f = self._fluids.V_from_h
        return np.fromiter((f(float(x)) for x in h.ravel()), float, h.size).reshape(h.shape)

    # ----- public ---------------------------------------------------------------------------
    @property
    def h_min(self) -> float:
        """Lowest level the tank describes [m] (0, or a strapping table's first level)."""
        return self.levels[0] if self.shape == "table" else 0.0

    @cached_property
    def h_max(self) -> float:
        """Height of the tank from the level datum to the top [m]."""
        if self.shape == "table":
            return self.levels[-1]
        return float(self._fluids.h_max)

    @cached_property
    def V_total(self) -> float:
        """Volume of the full tank [m³]."""
        if self.shape == "table":
            return self.volumes[-1]
        return float(self._fluids.V_total)

    def _levels_in(self, h, field_name: str) -> np.ndarray:
        arr = np.asarray(h, dtype=float)
        if arr.size:
            bad = ~np.isfinite(arr) | (arr < self.h_min) | (arr > self.h_max)
            if bad.any():
                raise OutOfRangeError(f"{field_name} in '{self.name}'", float(arr[bad].flat[0]),
                                      "m", low=self.h_min, high=self.h_max)
        return arr

    def volume(self, h):
        """Liquid volume [m³] below level(s) ``h`` [m] (exact; Jones 2003 via fluids).

        Parameters
        ----------
        h : float or array_like
            Level above the datum, ``h_min`` to ``h_max`` [m]

        Returns
        -------
        V : float or ndarray
            Liquid volume [m³]
        """
        arr = self._levels_in(h, "level")
        out = self._volume_array(np.atleast_1d(arr))
        return float(out[0]) if arr.ndim == 0 else out.reshape(arr.shape)

    def level(self, V):
        """Level [m] at which the liquid volume is ``V`` [m³] (Brent's method, exact).

        Parameters
        ----------
        V : float or array_like
            Liquid volume, 0 (or the table's first volume) to ``V_total`` [m³]

        Returns
        -------
        h : float or ndarray
            Level [m]; in a flat stretch of a strapping table, the lowest level of it.
        """
        from scipy.optimize import brentq

        arr = np.asarray(V, dtype=float)
        hs, Vs = self.table
        vmin = float(Vs[0])
        flat = np.atleast_1d(arr)
        bad = ~np.isfinite(flat) | (flat < vmin) | (flat > self.V_total)
        if bad.any():
            raise OutOfRangeError(f"volume in '{self.name}'", float(flat[bad][0]), "m³",
                                  low=vmin, high=self.V_total)
        out = np.empty(flat.shape)
        vf = (lambda x: float(self._pchip(x))) if self.shape == "table" \
            else self._fluids.V_from_h
        for i, v in enumerate(flat):
            j = int(np.searchsorted(Vs, v, side="left"))
            if j < len(Vs) and Vs[j] == v:
                out[i] = hs[j]
                continue
            lo, hi = hs[max(j - 1, 0)], hs[min(j, len(hs) - 1)]
            out[i] = brentq(lambda x, v=v: vf(x) - v, lo, hi, xtol=1e-12, rtol=1e-14)
        return float(out[0]) if arr.ndim == 0 else out.reshape(arr.shape)

    def area(self, h):
        """Liquid surface area [m²] at level(s) ``h`` [m]: dV/dh of the exact volume.

        Central difference with a step of 1e-6·h_max, one-sided within a step of the bottom
        or top; a strapping table uses its interpolant's derivative. At h = 0 a flat-bottomed
        vertical tank gives πD²/4 (fluids' ``A_cross_sectional`` gives 0); a horizontal
        cylinder or a sphere gives a value → 0.

        Parameters
        ----------
        h : float or array_like
            Level [m]

        Returns
        -------
        A : float or ndarray
            Liquid surface area [m²]
        """
        arr = self._levels_in(h, "level")
        x = np.atleast_1d(arr).astype(float)
        if self.shape == "table":
            d = self._pchip.derivative()
            # at the top knot the derivative from below
            out = np.asarray(d(np.minimum(x, self.h_max - 1e-12 * max(self.h_max, 1.0))))
        else:
            step = 1e-6 * (self.h_max - self.h_min)
            lo = np.maximum(x - step, self.h_min)
            hi = np.minimum(x + step, self.h_max)
            out = (self._volume_array(hi) - self._volume_array(lo)) / (hi - lo)
        out = np.maximum(out, 0.0)
        return float(out[0]) if arr.ndim == 0 else out.reshape(arr.shape)

    @property
    def description(self) -> str:
        """A short text description for findings and the record."""
        if self.shape == "table":
            return f"strapping table, {len(self.levels)} rows, to {self.h_max:g} m"
        if self.shape == "sphere":
            return f"sphere D {self.D:g} m"
        return (f"{self.orientation} cylinder D {self.D:g} m × L {self.L:g} m, heads "
                f"{self.head1.kind}/{self.head2.kind}")


def vertical_cylinder(D: float, L: float, bottom: Head | str = "flat",
                      top: Head | str = "flat", name: str = "tank") -> Tank:
    """A vertical cylinder of diameter ``D`` [m] and straight length ``L`` [m] with heads.

    >>> round(vertical_cylinder(1.0, 2.0).V_total, 6)
    1.570796
    """
    return Tank("cylinder", "vertical", D, L, bottom, top, name=name)


def horizontal_cylinder(D: float, L: float, head1: Head | str = "flat",
                        head2: Head | str | None = None, name: str = "tank") -> Tank:
    """A horizontal cylinder; ``head2`` defaults to the same as ``head1``.

    >>> round(horizontal_cylinder(1.0, 2.0, "spherical").V_total, 6)
    2.094395
    """
    return Tank("cylinder", "horizontal", D, L, head1, head1 if head2 is None else head2,
                name=name)


def sphere(D: float, name: str = "tank") -> Tank:
    """A sphere of inside diameter ``D`` [m].

    >>> round(sphere(2.0).V_total, 6)
    4.18879
    """
    return Tank("sphere", "vertical", D, name=name)


def strapping_table(levels, volumes, name: str = "tank") -> Tank:
    """A tank given by its strapping table (levels [m] strictly increasing, volumes [m³]).

    >>> t = strapping_table([0.0, 1.0, 2.0], [0.0, 3.0, 6.0])
    >>> t.volume(1.5), t.area(0.5)
    (4.5, 3.0)
    """
    return Tank("table", levels=tuple(levels), volumes=tuple(volumes), name=name)
