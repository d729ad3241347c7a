"""Fittings: one row of a fitting list, and the K it yields at a given Re and bore.

A :class:`Fitting` row is a kind (a key of :data:`FITTING_KINDS`), a count, and the kind's
parameters in SI (angles in degrees, Cv and Kv in their trade units). :func:`fitting_K`
returns the row's total K (count × K) **referred to the bore D of the pipe the row sits in**,
over an array of Reynolds numbers (Re of that same pipe).

Each kind names its method and source (fluids applies them; this module chooses the inputs):

- fixed K, or a tee K that may be negative (converging/diverging junction flows);
- Hooper's 2-K method (Hooper 1981, Chem. Eng.), Di in **inches** — converted here;
- Darby's 3-K method (Silverberg & Darby 1999; Darby 2001, Chem. Eng.), **nominal** inches,
  found from the bore along the Sch 40 table as fluids does — converted here;
- geometry: entrances, exit, bends, mitres, contractions and enlargements
  (Rennels & Hudson 2012 *Pipe Flow* by default; Crane TP-410 (2009), Idel'chik, others);
- valves by type (Crane TP-410 (2009), K = N·fT with fT from ``fluids.fittings.ft_Crane``);
- a valve flow coefficient Cv (US gpm/psi^0.5) or Kv (m³/h/bar^0.5).

Traps of fluids that this module guards (and tests):

- ``Hooper2K`` wants Di in inches; a call with metres is ~8.5× wrong, silently.
- ``Darby3K`` wants nominal inches (or ``Di`` in metres, then interpolated along Sch 40).
- contraction and diffuser K refer to the **smaller** pipe, and a reversed direction returns
  nonsense (−214.6) silently: a contraction's D2 must be smaller than the row's bore, an
  enlargement's larger, and K is converted to the row's bore with ``change_K_basis``.
- ``bend_rounded`` without roughness assumes a smooth pipe, without rc assumes R/D = 5: both
  are always passed.

Friction factors inside geometric methods (bends, conical reducers) follow **one rule with the
pipe**: :func:`kit.core.friction.darcy_friction` (64/Re laminar, the stated blend, Colebrook
turbulent) evaluated at ``max(Re, RE_FD_FLOOR)``, in :func:`fitting_K` and in
:class:`kit.core.line.Line` alike; the floor keeps K finite as flow → 0. Most K methods are
written for turbulent flow; laminar K rises (the Hooper and Darby K1/Re terms model that).
:data:`FITTING_RE_RANGES` states, per method, the lowest Re its source covers;
:func:`fitting_re_findings` reports a row used below it. Valves that have a Darby 3-K row
take ``method="Darby 3-K"`` (Re-dependent, for laminar and transitional flow).

Example
-------
>>> import numpy as np
>>> elbow = Fitting("bend", count=2, params={"angle": 90.0, "R_D": 1.5}, label="elbows")
>>> K = fitting_K(elbow, np.array([1e5]), D=0.1023, roughness=4.5e-5)
>>> round(float(K[0]), 3)
0.487
"""

from __future__ import annotations

import math
from collections.abc import Callable, Iterator, Mapping
from dataclasses import dataclass, field
from functools import lru_cache
from math import pi, sin, sqrt

import fluids.fittings as ff
import numpy as np
from fluids.numerics import interp
from fluids.piping import NPS40, S40i

from kit.core.friction import (
    _ED_REFUSE_HIGH,
    _RE_REFUSE_HIGH,
    _darcy_array,
    _darcy_float,
    darcy_friction,
)
from kit.errors import (
    HeadlineError,
    InputError,
    NoSolutionError,
    OutOfRangeError,
    UnknownChoiceError,
    check_choice,
    check_range,
)

__all__ = [
    "ParamSpec", "FittingKind", "FrozenParams", "Fitting", "FITTING_KINDS", "HOOPER_NAMES",
    "DARBY_NAMES", "RE_FD_FLOOR", "D_RANGE", "fitting_K", "fittings_K_total", "total_K_unchecked",
    "describe", "SOURCES", "FITTING_RE_RANGES", "VALVE_DARBY_ROWS", "fitting_re_range",
    "fitting_re_findings",
]

#: Re below which friction factors inside fitting methods are held at their value here [-].
RE_FD_FLOOR = 10.0
#: Allowed bore of the pipe a row sits in [m]: (low exclusive, high inclusive).
D_RANGE = (0.0, 5.0)
_INCH = 0.0254

#: Full citations, keyed by short name.
SOURCES = {
    "Crane": "Crane Co. Flow of Fluids Through Valves, Fittings, and Pipe. Technical Paper "
             "No. 410 (TP-410), 2009; as implemented in fluids.fittings",
    "Rennels": "Rennels, D. C., and Hudson, H. M. Pipe Flow: A Practical and Comprehensive "
               "Guide. Hoboken, N.J.: Wiley, 2012; as implemented in fluids.fittings",
    "Hooper": "Hooper, W. B. 'The 2-K Method Predicts Head Losses in Pipe Fittings.' Chem. "
              "Eng., Aug. 24, 1981, p. 97; constants from fluids.fittings.Hooper",
    "Darby": "Silverberg, P., and Darby, R. 'Correlate Pressure Drops through Fittings.' Chem. "
             "Eng. 106(7), July 1999, p. 101; Darby, R., Chem. Eng. 108(4), April 2001, "
             "127-130; constants from fluids.fittings.Darby",
    "Idelchik": "Idel'chik, I. E. Handbook of Hydraulic Resistance. 1966 (transl.); as "
                "implemented in fluids.fittings",
    "Miller": "Miller, D. S. Internal Flow Systems. Gulf Publishing, 1990; as implemented in "
              "fluids.fittings",
    "Blevins": "Blevins, R. D. Applied Fluid Dynamics Handbook. Van Nostrand Reinhold, 1984; "
               "as implemented in fluids.fittings",
    "Swamee": "Swamee, P. K., and Sharma, A. K. Design of Water Supply Pipe Networks. Wiley, "
              "2008; as implemented in fluids.fittings",
    "Harris": "Harris, C. W. Elimination of Hydraulic Eddy Current Loss at Intake. University "
              "of Washington, 1930; as implemented in fluids.fittings",
    "Ito": "Ito, H. 'Pressure Losses in Smooth Pipe Bends.' J. Basic Eng. 82(1), 1960, "
           "131-140, doi:10.1115/1.3662501; as implemented in fluids.fittings",
    "ISA": "ISA-75.01.01-2007 (IEC 60534-2-1 mod.), flow-coefficient conversion; as "
           "implemented in fluids.fittings.Cv_to_K / Kv_to_K",
    "given": "K given by the user (its source is the user's)",
}

#: Fitting names of Hooper's 2-K database (fluids.fittings.Hooper), as choices.
HOOPER_NAMES: tuple[str, ...] = tuple(ff.Hooper)
#: Fitting names of Darby's 3-K database (fluids.fittings.Darby), as choices.
DARBY_NAMES: tuple[str, ...] = tuple(ff.Darby)


@dataclass(frozen=True)
class ParamSpec:
    """One parameter of a fitting kind: name, unit, allowed range or choices, default.

    ``default=None`` means the parameter is required. Numeric ranges follow
    :func:`kit.errors.check_range` (either bound may be open).
    """

    name: str
    unit: str
    label: str
    low: float | None = None
    high: float | None = None
    low_inclusive: bool = False
    high_inclusive: bool = True
    choices: tuple | None = None
    default: float | str | None = None

    def check(self, value, row: str):
        """Return the checked value (float or choice) or raise naming the row and parameter."""
        fieldname = f"{self.name} (fitting {row})"
        if self.choices is not None:
            return check_choice(fieldname, value, self.choices)
        if isinstance(value, (bool, str)) or value is None:
            raise OutOfRangeError(fieldname, value, self.unit, self.low, self.high,
                                  self.low_inclusive, self.high_inclusive)
        return check_range(fieldname, value, self.unit, self.low, self.high,
                           self.low_inclusive, self.high_inclusive)


@dataclass(frozen=True)
class FittingKind:
    """One kind of fitting row.

    Attributes
    ----------
    key, label : str
        Our key and the trade words shown for it.
    method : str
        'fixed K', 'Hooper 2-K', 'Darby 3-K', 'geometry', 'Crane valve', 'Cv' or 'Kv'.
    params : tuple of ParamSpec
    source : str
        Full citation of the default method.
    allow_negative : bool
        True only where a negative K is legitimate (tee flows).
    compute : callable
        ``(params: dict, Re: ndarray, D: float, roughness: float) -> K`` for one fitting,
        referred to D.
    """

    key: str
    label: str
    method: str
    params: tuple
    source: str
    compute: Callable = field(repr=False, compare=False)
    allow_negative: bool = False

    def spec(self, name: str) -> ParamSpec:
        for p in self.params:
            if p.name == name:
                return p
        raise UnknownChoiceError(f"parameter of '{self.key}'", name, [p.name for p in self.params])


class FrozenParams(Mapping):
    """A read-only, hashable mapping of parameter name → value (float or str)."""

    __slots__ = ("_items", "_map")

    def __init__(self, items=()):
        data = dict(items.items() if isinstance(items, Mapping) else items)
        object.__setattr__(self, "_items", tuple(sorted(data.items())))
        object.__setattr__(self, "_map", dict(self._items))

    def __getitem__(self, key):
        return self._map[key]

    def __eq__(self, other):
        if isinstance(other, FrozenParams):
            return self._items == other._items  # both sorted by name: same as dict equality
        return Mapping.__eq__(self, other)

    def __iter__(self) -> Iterator:
        return (k for k, _ in self._items)

    def __len__(self) -> int:
        return len(self._items)

    def __hash__(self) -> int:
        return hash(self._items)

    def __setattr__(self, name, value):
        raise AttributeError("FrozenParams is read-only")

    def __repr__(self) -> str:
        return f"FrozenParams({dict(self._items)!r})"


# ---------------------------------------------------------------- helpers

def _fd(Re, D, roughness):
    """Darcy friction factor at max(Re, RE_FD_FLOOR), as an array: the same rule as the pipe
    (:func:`kit.core.friction.darcy_friction`: 64/Re laminar, blend, Colebrook)."""
    return darcy_friction(np.maximum(Re, RE_FD_FLOOR), roughness / D)


@lru_cache(maxsize=8192)
def _call(fname: str, kwargs: tuple) -> float:
    """A cached scalar call of a fluids.fittings function (pure function of its inputs)."""
    return float(getattr(ff, fname)(**dict(kwargs)))


def _scalar(fname: str, **kwargs) -> float:
    return _call(fname, tuple(sorted(kwargs.items())))


def _per_re(fname: str, Re, **kwargs):
    """Evaluate a Re-dependent fluids function element-wise (once per distinct Re)."""
    Re = np.maximum(Re, RE_FD_FLOOR)
    uniq, inv = np.unique(Re, return_inverse=True)
    vals = np.array([_scalar(fname, Re=float(r), **kwargs) for r in uniq])
    return vals[inv].reshape(Re.shape)


def _row(fitting) -> str:
    return fitting.label or fitting.kind


# ---------------------------------------------------------------- computations (one fitting)

def _k_fixed(p, Re, D, eps):
    return p["K"]


def _k_hooper(p, Re, D, eps):
    # Hooper (1981): K = K1/Re + K∞ (1 + 1/Di[in]); Di in INCHES.
    K1, Kinf = ff.Hooper[p["name"]]
    return K1 / Re + Kinf * (1.0 + _INCH / D)


def _darby_nps(D: float) -> float:
    """Nominal size [in] for a bore [m], linear along the Sch 40 table (as fluids.Darby3K)."""
    return float(interp(D * 1e3, S40i, NPS40, extrapolate=True))


def _k_darby(p, Re, D, eps):
    # Darby 3-K: K = K1/Re + Ki (1 + Kd / NPS^0.3); NPS in NOMINAL inches.
    K1, Ki, Kd = ff.Darby[p["name"]]
    nps = _darby_nps(D)
    if nps <= 0.0:
        raise OutOfRangeError("pipe inside diameter (Darby 3-K)", D, "m", low=S40i[0] * 1e-3)
    return K1 / Re + Ki * (1.0 + Kd * nps ** -0.3)


def _k_entrance_sharp(p, Re, D, eps):
    return _scalar("entrance_sharp", method=p["method"])


def _k_entrance_rounded(p, Re, D, eps):
    return _scalar("entrance_rounded", Di=D, rc=p["rc"], method=p["method"])


def _k_entrance_projecting(p, Re, D, eps):
    return _scalar("entrance_distance", Di=D, t=p["t"], method=p["method"])


def _k_exit(p, Re, D, eps):
    return _scalar("exit_normal")


def _k_bend(p, Re, D, eps):
    m = p["method"]
    if m == "Rennels":
        # Rennels & Hudson (2012), vectorized; fluids' bend_rounded(method='Rennels').
        a = p["angle"] * pi / 180.0
        rD = p["R_D"]
        fd = p["_fd"]() if "_fd" in p else _fd(Re, D, eps)
        s = np.sin(0.5 * a)
        return (fd * a * rD + (0.10 + 2.4 * fd) * s
                + 6.6 * fd * (sqrt(s) + s) / rD ** (4.0 * a / pi))
    kw = dict(Di=D, angle=p["angle"], bend_diameters=p["R_D"], method=m)
    if m in ("Ito", "Miller"):
        return _per_re("bend_rounded", Re, roughness=eps, **kw)
    return _scalar("bend_rounded", **kw)


def _k_mitre(p, Re, D, eps):
    m = p["method"]
    if m == "Blevins":
        return _per_re("bend_miter", Re, angle=p["angle"], method=m)
    if m == "Crane":
        return _scalar("bend_miter", angle=p["angle"], Di=D, method=m)
    return _scalar("bend_miter", angle=p["angle"], method=m)


def _reducer_D2(p, D, row, larger: bool) -> float:
    D2 = p["D2"]
    fieldname = f"D2 (fitting {row})"
    if larger and not D2 > D:
        raise OutOfRangeError(fieldname, D2, "m", low=D, high=D_RANGE[1])
    if not larger and not D2 < D:
        raise OutOfRangeError(fieldname, D2, "m", low=0.0, high=D, high_inclusive=False)
    return D2


def _k_contraction(p, Re, D, eps, row=""):
    D2 = _reducer_D2(p, D, row, larger=False)
    Re2 = Re * D / D2  # Re in the smaller bore (same flow)
    if p["style"] == "sudden":
        K_small = _scalar("contraction_sharp", Di1=D, Di2=D2, method=p["method"])
    elif p["method"] == "Rennels":
        # Rennels & Hudson (2012): K = fd (1 - β⁴) / (8 sin(θ/2)) + K_conv; K_conv from fluids
        # (fd = 0), the friction term vectorized with fd in the smaller bore at its Re.
        beta = D2 / D
        s = sin(0.5 * p["angle"] * pi / 180.0)
        K_conv = _scalar("contraction_conical", Di1=D, Di2=D2, angle=p["angle"], fd=0.0,
                         method="Rennels")
        K_small = K_conv + _fd(Re2, D2, eps) * (1.0 - beta ** 4) / (8.0 * s)
    else:
        K_small = _scalar("contraction_conical", Di1=D, Di2=D2, angle=p["angle"], method="Crane")
    # fluids' K refers to the smaller pipe D2; refer it to the row's bore D.
    return ff.change_K_basis(K_small, D2, D)


def _k_enlargement(p, Re, D, eps, row=""):
    D2 = _reducer_D2(p, D, row, larger=True)
    if p["style"] == "sudden":
        if p["method"] == "Rennels":
            K_small = _scalar("diffuser_sharp", Di1=D, Di2=D2, method="Rennels")
        else:
            K_small = _scalar("diffuser_conical", Di1=D, Di2=D2, angle=180.0, method="Crane")
    elif p["method"] == "Rennels":
        # Rennels & Hudson (2012): expansion part from fluids (fd = 0); friction term
        # 0.125 fd (1 - β⁴) / sin(θ/2) for θ <= 60°, vectorized, fd with ε/D2 as fluids does.
        beta = D / D2
        K_small = _scalar("diffuser_conical", Di1=D, Di2=D2, angle=p["angle"], fd=0.0,
                          method="Rennels")
        if p["angle"] <= 60.0:
            s = sin(0.5 * p["angle"] * pi / 180.0)
            K_small = K_small + 0.125 * _fd(Re, D2, eps) * (1.0 - beta ** 4) / s
    else:
        K_small = _scalar("diffuser_conical", Di1=D, Di2=D2, angle=p["angle"], method="Crane")
    # fluids' K refers to the smaller pipe, which here is the row's own bore D.
    return ff.change_K_basis(K_small, D, D)


def _valve(fname: str, *, seat=False, angle=False, style=None, style_arg="style",
           disc=False):
    """Build a compute function for a Crane TP-410 valve (fT from ft_Crane(D))."""

    def compute(p, Re, D, eps):
        if p.get("method") == "Darby 3-K":
            return _k_darby({"name": _darby_valve_name(p)}, Re, D, eps)
        kw = {}
        if seat:
            kw.update(D1=p["beta"] * D, D2=D)
        else:
            kw.update(D=D)
        if angle:
            kw["angle"] = p["angle"]
        if disc:
            kw["angle"] = float(p["disc_angle"].split()[0])
        if style is not None:
            kw[style_arg] = style[p["style"]]
        return _scalar(fname, **kw)

    return compute


#: Valve kinds (and style) that have a row in Darby's 3-K table (fluids.fittings.Darby),
#: full bore (β = 1) only: kind -> {style or None: Darby row name}.
VALVE_DARBY_ROWS: dict[str, dict] = {
    "valve_gate": {None: "Valve, Gate valve, standard, β = 1"},
    "valve_globe": {None: "Valve, Globe valve, standard, β = 1"},
    "valve_ball": {None: "Valve, Ball valve, standard, β = 1"},
    "valve_plug": {"straight-through": "Valve, Plug valve, straight through",
                   "3-way, flow straight through": "Valve, Plug valve, three-way (flow through)",
                   "3-way, flow 90 deg": "Valve, Plug valve, branch flow"},
    "valve_diaphragm": {"weir": "Valve, Diaphragm, dam type"},
    "valve_check_swing": {None: "Valve, Swing check"},
    "valve_check_lift": {None: "Valve, Lift check"},
}


def _darby_valve_name(p) -> str:
    rows = p["_darby_rows"]
    return rows.get(p.get("style"), rows.get(None))


#: Lowest Reynolds number (in the row's pipe) each K method's source covers, as data:
#: method -> (Re_low, words, source). Below it a finding says K is used outside its range.
FITTING_RE_RANGES: dict[str, tuple] = {
    "fixed K": (1.0e4, "a given K is taken as a fully turbulent value",
                "common practice, no source"),
    "Crane valve": (1.0e4, "K = N·fT uses the fully turbulent friction factor fT",
                    "Crane TP-410 (2009): K constant in fully turbulent flow (from memory); "
                    "Re bound: common practice, no source"),
    "geometry": (1.0e4, "geometric K correlations are fitted to turbulent data",
                 "Rennels & Hudson (2012), Crane TP-410, Idel'chik: turbulent data (from "
                 "memory); Re bound: common practice, no source"),
    "Cv": (1.0e4, "K from Cv assumes turbulent flow through the valve",
           "ISA-75.01.01 / IEC 60534-2-1 apply a Reynolds-number factor below a valve Re of "
           "about 1e4 (from memory)"),
    "Kv": (1.0e4, "K from Kv assumes turbulent flow through the valve",
           "ISA-75.01.01 / IEC 60534-2-1 apply a Reynolds-number factor below a valve Re of "
           "about 1e4 (from memory)"),
    "Hooper 2-K": (1.0, "2-K: K1/Re carries the laminar rise",
                   "Hooper (1981): laminar and turbulent flow (from memory)"),
    "Darby 3-K": (1.0, "3-K: K1/Re carries the laminar rise",
                  "Darby (2001): laminar and turbulent flow (from memory)"),
}


def fitting_re_range(fitting) -> tuple:
    """``(Re_low, words, source)`` of the method a row uses (:data:`FITTING_RE_RANGES`).

    >>> fitting_re_range(Fitting("valve_gate"))[0]
    10000.0
    """
    kind = FITTING_KINDS[fitting.kind]
    method = kind.method
    if fitting.params.get("method") == "Darby 3-K":
        method = "Darby 3-K"
    return FITTING_RE_RANGES[method]


def fitting_re_findings(fitting, Re, subject: str = "") -> list:
    """A CHECK where a row's K is used at a Re below the range its method's source covers.

    Parameters
    ----------
    fitting : Fitting
    Re : array_like
        Reynolds numbers in the row's pipe, > 0 [-]
    subject : str
        Where the row sits.

    Examples
    --------
    >>> fitting_re_findings(Fitting("valve_gate"), [500.0])[0].severity.value
    'check'
    """
    from kit.core.findings import Finding, Severity

    Re = np.atleast_1d(np.asarray(Re, dtype=float))
    low, words, source = fitting_re_range(fitting)
    if Re.size == 0 or float(Re.min()) >= low:
        return []
    hint = ""
    if fitting.kind in VALVE_DARBY_ROWS and fitting.params.get("method") != "Darby 3-K":
        hint = "; this valve has a Re-dependent Darby 3-K row: set method = 'Darby 3-K'"
    elif FITTING_KINDS[fitting.kind].method in ("fixed K", "geometry", "Cv", "Kv"):
        hint = "; a Hooper 2-K or Darby 3-K row models the laminar rise of K"
    sub = (f"{subject}: " if subject else "") + f"fitting {_row(fitting)}"
    return [Finding(Severity.CHECK, sub, "Reynolds number", float(Re.min()), "-",
                    f">= {low:g} (range of the K method)",
                    f"K used below the Re range its source covers ({words}); the loss is "
                    f"likely understated{hint}", source, low=low)]


# ---------------------------------------------------------------- registry

_NONNEG_K = ParamSpec("K", "-", "loss coefficient K", 0.0, 1e4, low_inclusive=True)
_BETA = ParamSpec("beta", "-", "seat bore / pipe bore", 0.05, 1.0, default=1.0)
_TAPER = ParamSpec("angle", "deg", "included taper angle of the reduced seat", 0.0, 180.0,
                   default=180.0)
_STYLE_RED = ParamSpec("style", "-", "reducer shape", choices=("sudden", "conical"),
                       default="sudden")
_CONE = ParamSpec("angle", "deg", "included cone angle (conical style)", 0.0, 180.0,
                  default=180.0)
_METH_RED = ParamSpec("method", "-", "method", choices=("Rennels", "Crane"), default="Rennels")
_METH_VALVE = ParamSpec("method", "-", "K method: Crane (fully turbulent, constant) or "
                        "Darby 3-K (Re-dependent; full bore β = 1 only)",
                        choices=("Crane", "Darby 3-K"), default="Crane")


def _m(choices, default="Rennels"):
    return ParamSpec("method", "-", "method", choices=tuple(choices), default=default)


_KINDS = (
    FittingKind("fixed_k", "Loss coefficient K given", "fixed K",
                (_NONNEG_K,), SOURCES["given"], _k_fixed),
    FittingKind("tee_k", "Tee, run or branch (K given, may be negative)", "fixed K",
                (ParamSpec("K", "-", "loss coefficient K", -1.0, 100.0, low_inclusive=True),),
                SOURCES["given"] + "; junction K can be negative for converging/diverging "
                "flows (Rennels & Hudson 2012)", _k_fixed, allow_negative=True),
    FittingKind("hooper_2k", "Fitting from Hooper's 2-K list", "Hooper 2-K",
                (ParamSpec("name", "-", "fitting", choices=HOOPER_NAMES),),
                SOURCES["Hooper"], _k_hooper),
    FittingKind("darby_3k", "Fitting from Darby's 3-K list", "Darby 3-K",
                (ParamSpec("name", "-", "fitting", choices=DARBY_NAMES),),
                SOURCES["Darby"], _k_darby),
    FittingKind("entrance_sharp", "Entrance from a tank, square-edged (flush)", "geometry",
                (_m(("Rennels", "Crane", "Idelchik", "Blevins", "Miller", "Swamee")),),
                SOURCES["Rennels"], _k_entrance_sharp),
    FittingKind("entrance_rounded", "Entrance from a tank, rounded (bellmouth)", "geometry",
                (ParamSpec("rc", "m", "radius of rounding", 0.0, 5.0),
                 _m(("Rennels", "Crane", "Idelchik", "Harris", "Miller", "Swamee"))),
                SOURCES["Rennels"], _k_entrance_rounded),
    FittingKind("entrance_projecting", "Entrance from a tank, pipe projecting inward "
                "(re-entrant)", "geometry",
                (ParamSpec("t", "m", "wall thickness of the projecting pipe", 0.0, 0.5),
                 _m(("Rennels", "Crane", "Idelchik", "Harris", "Miller"))),
                SOURCES["Rennels"], _k_entrance_projecting),
    FittingKind("exit", "Exit into a tank or large space (K = 1)", "geometry", (),
                "fluids.fittings.exit_normal: full loss of the velocity head, K = 1 "
                "(Rennels & Hudson 2012)", _k_exit),
    FittingKind("bend", "Bend or elbow, smooth radius", "geometry",
                (ParamSpec("angle", "deg", "bend angle", 0.0, 180.0),
                 ParamSpec("R_D", "-", "bend radius / bore (R/D)", 0.5, 50.0, low_inclusive=True),
                 _m(("Rennels", "Crane", "Crane standard", "Ito", "Miller", "Swamee"))),
                SOURCES["Rennels"], _k_bend),
    FittingKind("mitre", "Mitre bend, single joint", "geometry",
                (ParamSpec("angle", "deg", "deflection angle", 0.0, 150.0),
                 _m(("Rennels", "Crane", "Blevins"))),
                SOURCES["Rennels"], _k_mitre),
    FittingKind("contraction", "Reducer to a smaller bore D2 (contraction)", "geometry",
                (ParamSpec("D2", "m", "downstream (smaller) bore", *D_RANGE), _STYLE_RED, _CONE,
                 _METH_RED),
                SOURCES["Rennels"], _k_contraction),
    FittingKind("enlargement", "Expander to a larger bore D2 (enlargement, diffuser)",
                "geometry",
                (ParamSpec("D2", "m", "downstream (larger) bore", *D_RANGE), _STYLE_RED, _CONE,
                 _METH_RED),
                SOURCES["Rennels"], _k_enlargement),
    FittingKind("valve_gate", "Gate valve, fully open", "Crane valve", (_BETA, _TAPER, _METH_VALVE),
                SOURCES["Crane"], _valve("K_gate_valve_Crane", seat=True, angle=True)),
    FittingKind("valve_globe", "Globe valve, fully open", "Crane valve", (_BETA, _METH_VALVE),
                SOURCES["Crane"], _valve("K_globe_valve_Crane", seat=True)),
    FittingKind("valve_ball", "Ball valve, fully open", "Crane valve", (_BETA, _TAPER, _METH_VALVE),
                SOURCES["Crane"], _valve("K_ball_valve_Crane", seat=True, angle=True)),
    FittingKind("valve_butterfly", "Butterfly valve, fully open", "Crane valve",
                (ParamSpec("style", "-", "disc design",
                           choices=("centric", "double offset", "triple offset"),
                           default="centric"),),
                SOURCES["Crane"],
                _valve("K_butterfly_valve_Crane",
                       style={"centric": 0, "double offset": 1, "triple offset": 2})),
    FittingKind("valve_plug", "Plug valve, fully open", "Crane valve",
                (_BETA, _TAPER,
                 ParamSpec("style", "-", "body", choices=(
                     "straight-through", "3-way, flow straight through", "3-way, flow 90 deg"),
                     default="straight-through"), _METH_VALVE),
                SOURCES["Crane"],
                _valve("K_plug_valve_Crane", seat=True, angle=True,
                       style={"straight-through": 0, "3-way, flow straight through": 1,
                              "3-way, flow 90 deg": 2})),
    FittingKind("valve_check_swing", "Swing check valve", "Crane valve",
                (ParamSpec("style", "-", "body (angled N = 100, straight N = 50)",
                           choices=("angled", "straight"), default="angled"), _METH_VALVE),
                SOURCES["Crane"],
                _valve("K_swing_check_valve_Crane", style={"angled": True, "straight": False},
                       style_arg="angled")),
    FittingKind("valve_check_lift", "Lift check valve", "Crane valve",
                (_BETA, ParamSpec("style", "-", "body (angled N = 55, straight N = 600)",
                                  choices=("angled", "straight"), default="angled"),
                 _METH_VALVE),
                SOURCES["Crane"],
                _valve("K_lift_check_valve_Crane", seat=True,
                       style={"angled": True, "straight": False}, style_arg="angled")),
    FittingKind("valve_check_tilting", "Tilting-disc check valve", "Crane valve",
                (ParamSpec("disc_angle", "-", "disc resting angle",
                           choices=("5 deg", "15 deg"), default="5 deg"),),
                SOURCES["Crane"], _valve("K_tilting_disk_check_valve_Crane", disc=True)),
    FittingKind("valve_diaphragm", "Diaphragm valve, fully open", "Crane valve",
                (ParamSpec("style", "-", "body", choices=("weir", "straight-through"),
                           default="weir"), _METH_VALVE),
                SOURCES["Crane"],
                _valve("K_diaphragm_valve_Crane", style={"weir": 0, "straight-through": 1})),
    FittingKind("valve_foot", "Foot valve with strainer", "Crane valve",
                (ParamSpec("style", "-", "disc", choices=("poppet disc", "hinged disc"),
                           default="poppet disc"),),
                SOURCES["Crane"],
                _valve("K_foot_valve_Crane", style={"poppet disc": 0, "hinged disc": 1})),
    FittingKind("valve_cv", "Valve with a given Cv", "Cv",
                (ParamSpec("Cv", "US gpm/psi^0.5", "flow coefficient Cv", 0.0, 1e6),),
                SOURCES["ISA"], lambda p, Re, D, eps: ff.Cv_to_K(p["Cv"], D)),
    FittingKind("valve_kv", "Valve with a given Kv", "Kv",
                (ParamSpec("Kv", "m3/h/bar^0.5", "flow coefficient Kv", 0.0, 1e6),),
                SOURCES["ISA"], lambda p, Re, D, eps: ff.Kv_to_K(p["Kv"], D)),
)

#: The fitting kinds, keyed by our keys.
FITTING_KINDS: dict[str, FittingKind] = {k.key: k for k in _KINDS}

_NEEDS_ROW = {"contraction", "enlargement"}


# ---------------------------------------------------------------- the row

@dataclass(frozen=True)
class Fitting:
    """One row of a fitting list: kind, count, parameters (SI), label.

    Construction checks the row: the kind is known, the count is a whole number ≥ 1, every
    parameter is known, present (or defaulted) and in range. Errors name the row (its label,
    or its kind) and the parameter. ``params`` is stored complete (defaults filled in) as a
    hashable :class:`FrozenParams`, so ``Fitting(**row.as_dict()) == row``.

    Example
    -------
    >>> Fitting("valve_gate").params["beta"]
    1.0
    """

    kind: str
    count: int = 1
    params: Mapping = field(default_factory=FrozenParams)
    label: str = ""

    def __post_init__(self):
        object.__setattr__(self, "label", str(self.label))
        row = _row(self)
        check_choice(f"fitting kind (fitting {self.label})" if self.label else "fitting kind",
                     self.kind, FITTING_KINDS)
        kind = FITTING_KINDS[self.kind]
        count = self.count
        cfield = f"count (fitting {row})"
        if isinstance(count, bool) or not isinstance(count, (int, float, np.integer)):
            raise InputError(cfield, count, "must be a whole number of at least 1")
        if not float(count).is_integer():
            raise InputError(cfield, count, "must be a whole number of at least 1")
        check_range(cfield, count, None, low=1, low_inclusive=True)
        object.__setattr__(self, "count", int(count))
        given = dict(self.params.items()) if isinstance(self.params, Mapping) else dict(self.params)
        names = [p.name for p in kind.params]
        for name in given:
            if name not in names:
                raise UnknownChoiceError(f"parameter (fitting {row}, kind {self.kind})", name,
                                         names)
        full = {}
        for spec in kind.params:
            if spec.name in given:
                full[spec.name] = spec.check(given[spec.name], row)
            elif spec.default is not None:
                full[spec.name] = spec.default
            else:
                raise InputError(f"{spec.name} (fitting {row})", None,
                                 f"is required for kind '{self.kind}' ({spec.label} "
                                 f"[{spec.unit}])")
        if full.get("method") == "Darby 3-K" and self.kind in VALVE_DARBY_ROWS:
            rows = VALVE_DARBY_ROWS[self.kind]
            if full.get("beta", 1.0) != 1.0:
                raise InputError(f"method (fitting {row})", "Darby 3-K",
                                 f"needs a full-bore valve (beta = 1, not {full['beta']:g}): "
                                 "Darby's table has full-bore valves only")
            if rows.get(full.get("style"), rows.get(None)) is None:
                raise InputError(f"method (fitting {row})", "Darby 3-K",
                                 f"has no Darby row for style {full.get('style')!r}; choices: "
                                 f"{', '.join(repr(k) for k in rows)}")
        object.__setattr__(self, "params", FrozenParams(full))

    def as_dict(self) -> dict:
        """``{kind, count, params, label}`` with plain values; ``Fitting(**d)`` reads it back."""
        return {"kind": self.kind, "count": self.count, "params": dict(self.params),
                "label": self.label}


# ---------------------------------------------------------------- K

def _check_inputs(Re, D, roughness):
    Re = np.asarray(Re, dtype=float)
    bad = ~np.isfinite(Re) | (Re <= 0.0)
    if np.any(bad):
        raise OutOfRangeError("Reynolds number", float(Re[bad].flat[0]), None, low=0.0)
    D = check_range("pipe inside diameter", D, "m", *D_RANGE)
    roughness = check_range("pipe roughness", roughness, "m", 0.0, 0.01, low_inclusive=True)
    return Re, D, roughness


def fitting_K(fitting: Fitting, Re, D: float, roughness: float) -> np.ndarray:
    """Total loss coefficient of a fitting row (count × K), referred to bore ``D``.

    Applies the row kind's published method (see :data:`FITTING_KINDS` and
    :func:`describe`): Hooper (1981) 2-K, Darby (2001) 3-K, Rennels & Hudson (2012) geometry
    by default, Crane TP-410 (2009) valves, Idel'chik and others by choice, or the ISA
    conversion of Cv/Kv. Re-dependent methods are evaluated element-wise (Hooper, Darby and
    the Rennels bend with numpy; the others once per distinct Re); Re-independent K are
    computed once and cached.

    Parameters
    ----------
    fitting : Fitting
        The row [-]
    Re : array_like
        Reynolds number in the pipe of bore ``D``, > 0 [-]
    D : float
        Inside diameter of the pipe the row sits in, 0 < D <= 5 m [m]
    roughness : float
        Absolute roughness of that pipe, 0 to 10 mm [m]

    Returns
    -------
    K : ndarray
        count × K, referred to the velocity head in bore ``D``, shaped like ``Re`` [-]

    Notes
    -----
    Contractions need D2 < D and enlargements D2 > D (the row sits in the upstream pipe);
    fluids' K on the smaller bore is converted with ``change_K_basis``. A negative K is
    refused unless the kind allows it (tee flows).

    Examples
    --------
    >>> round(float(fitting_K(Fitting("exit"), [1e5], 0.1, 4.5e-5)[0]), 3)
    1.0

    References
    ----------
    .. [1] Crane Co. Flow of Fluids Through Valves, Fittings, and Pipe. TP-410, 2009.
    .. [2] Rennels, D. C., and Hudson, H. M. Pipe Flow. Wiley, 2012.
    .. [3] Hooper, W. B. Chem. Eng., Aug. 24, 1981, p. 97.
    .. [4] Darby, R. Chem. Eng. 108(4), 2001, 127-130.
    """
    if not isinstance(fitting, Fitting):
        raise InputError("fitting", type(fitting).__name__, "must be a Fitting row")
    Re, D, roughness = _check_inputs(Re, D, roughness)
    return _row_K(fitting, Re, D, roughness)


def _bad_K(fitting, K, D, kind):
    if not np.isfinite(K).all():
        raise NoSolutionError(f"loss coefficient for fitting {_row(fitting)}",
                              "its method gave a non-finite K")
    raise NoSolutionError(f"loss coefficient for fitting {_row(fitting)}",
                          f"its method gave K = {float(K.min()):.4g} < 0 at bore {D:.4g} m; "
                          "check the parameters")


def _row_K(fitting: Fitting, Re: np.ndarray, D: float, roughness: float,
           fd_memo=None) -> np.ndarray:
    """:func:`fitting_K` without the input checks (inputs already checked by the caller).

    ``fd_memo`` is a callable returning the pipe's Colebrook friction factor at ``Re``,
    shared by the rows of one :func:`fittings_K_total` call so it is computed once.
    """
    kind = FITTING_KINDS[fitting.kind]
    p = dict(fitting.params)
    if fitting.kind in VALVE_DARBY_ROWS:
        p["_darby_rows"] = VALVE_DARBY_ROWS[fitting.kind]
    if fd_memo is not None:
        p["_fd"] = fd_memo
    if fitting.kind in _NEEDS_ROW:
        K = kind.compute(p, Re, D, roughness, row=_row(fitting))
    else:
        K = kind.compute(p, Re, D, roughness)
    if np.ndim(K) == 0:  # Re-independent: check the one number, let numpy broadcast it
        K = float(K)
        if (K < 0.0 and not kind.allow_negative) or not math.isfinite(K):
            _bad_K(fitting, np.array([K]), D, kind)
        return np.full(Re.shape, fitting.count * K)
    K = np.asarray(K, dtype=float)
    if K.shape != Re.shape:
        K = np.broadcast_to(K, Re.shape)
    if (not kind.allow_negative and K.min(initial=0.0) < 0.0) or not np.isfinite(K).all():
        _bad_K(fitting, K, D, kind)
    return fitting.count * K


def fittings_K_total(fittings, Re, D: float, roughness: float) -> np.ndarray:
    """Sum of :func:`fitting_K` over rows, referred to bore ``D`` [-], shaped like ``Re``.

    >>> rows = (Fitting("entrance_sharp", params={"method": "Crane"}), Fitting("exit"))
    >>> float(fittings_K_total(rows, [1e5], 0.1, 4.5e-5)[0])
    1.5
    """
    Re, D, roughness = _check_inputs(Re, D, roughness)
    return total_K_unchecked(fittings, Re, D, roughness)


def total_K_unchecked(fittings, Re: np.ndarray, D: float, roughness: float,
                      fd: np.ndarray | None = None) -> np.ndarray:
    """:func:`fittings_K_total` for inputs the caller has already checked (a float array
    Re > 0, a valid bore and roughness); ``fd`` is the pipe's Darcy friction factor at
    ``Re`` when the caller has it (the Rennels bend uses it instead of solving Colebrook
    again). Used by :class:`kit.core.line.Line` on its hot path.

    The rows' Re-independent parts come from a plan cached on the rows' values, the bore
    and the roughness (:func:`_plan`); a row the plan cannot take, or any doubt on the
    way (a refused Re or ε/D inside a reducer's friction term, a non-finite K), goes
    through :func:`_total_K_rows`, row by row, which names the row in its error."""
    plan = _plan_or_none(fittings, D, roughness)
    if plan is not None:
        try:
            K = _plan_K(plan, Re, fd, D, roughness)
        except _Fallback:
            pass
        else:
            if np.isfinite(K).all():
                return np.full(Re.shape, K) if np.ndim(K) == 0 else K
    return _total_K_rows(fittings, Re, D, roughness, fd)


def _total_K_rows(fittings, Re: np.ndarray, D: float, roughness: float,
                  fd: np.ndarray | None = None) -> np.ndarray:
    """:func:`total_K_unchecked` row by row with :func:`_row_K` (every row's checks)."""
    total = np.zeros_like(Re)
    if fd is not None and np.any(Re < RE_FD_FLOOR):
        # the same rule as fitting_K: friction inside fitting methods held at the floor
        fd = np.where(Re < RE_FD_FLOOR, _fd(Re, D, roughness), fd)
    memo = [] if fd is None else [fd]

    def fd_at():
        if not memo:
            memo.append(_fd(Re, D, roughness))
        return memo[0]

    for f in fittings:
        if not isinstance(f, Fitting):
            raise InputError("fitting", type(f).__name__, "must be a Fitting row")
        total = total + _row_K(f, Re, D, roughness, fd_at)
    return total


# ---------------------------------------------------------------- the cached plan of a row list
#
# A plan is ``(K_fixed, rows)``: the sum of count × K of the rows whose K does not depend on
# Re, and, for each Re-dependent row, ``(count, evaluate, data)`` with its Re-independent
# numbers worked out once. ``evaluate(data, Re, fd, eps)`` uses arithmetic only, so the same
# code serves a float Re (the scalar paths of kit.core.line) and an array. The formulas and
# their order of operations are those of the _k_* functions above; only the constants are
# hoisted. The cache key is the rows themselves (frozen, compared by value), the bore and
# the roughness: a pure function of immutable values.


class _Fallback(Exception):
    """Internal: the plan cannot answer this call; the row-by-row path decides."""


def _fd_any(Re, eD):
    """Darcy f at max(Re, RE_FD_FLOOR) for a float or an array, with the refusal limits of
    :func:`kit.core.friction.darcy_friction` turned into :class:`_Fallback`."""
    if not 0.0 <= eD <= _ED_REFUSE_HIGH:
        raise _Fallback
    if isinstance(Re, float):
        Re = Re if Re > RE_FD_FLOOR else RE_FD_FLOOR
        if not Re <= _RE_REFUSE_HIGH:
            raise _Fallback
        return _darcy_float(Re, eD)
    Re = np.maximum(Re, RE_FD_FLOOR)
    if not Re.max(initial=0.0) <= _RE_REFUSE_HIGH:
        raise _Fallback
    return _darcy_array(Re, eD)


def _ev_2k3k(data, Re, fd, eps):
    # Hooper (1981) K1/Re + K∞(1 + 1/Di[in]); Darby (2001) K1/Re + Ki(1 + Kd/NPS^0.3)
    K1, tail = data
    return K1 / Re + tail


def _ev_bend_rennels(data, Re, fd, eps):
    # Rennels & Hudson (2012), as _k_bend
    a, rD, s, c, e = data
    return fd * a * rD + (0.10 + 2.4 * fd) * s + 6.6 * fd * c / e


def _ev_contraction_rennels(data, Re, fd, eps):
    # Rennels & Hudson (2012) conical contraction, as _k_contraction
    D, D2, K_conv, n1, d1 = data
    K_small = K_conv + _fd_any(Re * D / D2, eps / D2) * n1 / d1
    return ff.change_K_basis(K_small, D2, D)


def _ev_enlargement_rennels(data, Re, fd, eps):
    # Rennels & Hudson (2012) conical enlargement (θ <= 60°), as _k_enlargement
    D, D2, K_exp, n1, s = data
    K_small = K_exp + 0.125 * _fd_any(Re, eps / D2) * n1 / s
    return ff.change_K_basis(K_small, D, D)


_RE_PROBE = np.array([1.0e5])


def _row_plan(f: Fitting, D: float, eps: float):
    """``('fixed', count × K)`` or ``('re', count, evaluate, data)`` for one row; None when
    the row's method is evaluated by fluids per Re (no plan: the row-by-row path)."""
    p = f.params
    kind = f.kind
    method = p.get("method")
    if kind == "hooper_2k":
        K1, Kinf = ff.Hooper[p["name"]]
        return ("re", f.count, _ev_2k3k, (K1, Kinf * (1.0 + _INCH / D)))
    if kind == "darby_3k" or (kind in VALVE_DARBY_ROWS and method == "Darby 3-K"):
        name = p["name"] if kind == "darby_3k" else _darby_valve_name(
            {"style": p.get("style"), "_darby_rows": VALVE_DARBY_ROWS[kind]})
        K1, Ki, Kd = ff.Darby[name]
        nps = _darby_nps(D)
        if nps <= 0.0:
            return None
        return ("re", f.count, _ev_2k3k, (K1, Ki * (1.0 + Kd * nps ** -0.3)))
    if kind == "bend" and method == "Rennels":
        a = p["angle"] * pi / 180.0
        rD = p["R_D"]
        s = float(np.sin(0.5 * a))
        return ("re", f.count, _ev_bend_rennels,
                (a, rD, s, sqrt(s) + s, rD ** (4.0 * a / pi)))
    if kind == "bend" and method in ("Ito", "Miller"):
        return None
    if kind == "mitre" and method == "Blevins":
        return None
    if kind == "contraction" and p["style"] != "sudden" and method == "Rennels":
        D2 = _reducer_D2(p, D, _row(f), larger=False)
        beta = D2 / D
        s = sin(0.5 * p["angle"] * pi / 180.0)
        K_conv = _scalar("contraction_conical", Di1=D, Di2=D2, angle=p["angle"], fd=0.0,
                         method="Rennels")
        if not K_conv >= 0.0:
            return None
        return ("re", f.count, _ev_contraction_rennels, (D, D2, K_conv, 1.0 - beta ** 4, 8.0 * s))
    if (kind == "enlargement" and p["style"] != "sudden" and method == "Rennels"
            and p["angle"] <= 60.0):
        D2 = _reducer_D2(p, D, _row(f), larger=True)
        beta = D / D2
        K_exp = _scalar("diffuser_conical", Di1=D, Di2=D2, angle=p["angle"], fd=0.0,
                        method="Rennels")
        if not K_exp >= 0.0:
            return None
        s = sin(0.5 * p["angle"] * pi / 180.0)
        return ("re", f.count, _ev_enlargement_rennels, (D, D2, K_exp, 1.0 - beta ** 4, s))
    kind_ = FITTING_KINDS[kind]
    q = dict(p)
    if kind in VALVE_DARBY_ROWS:
        q["_darby_rows"] = VALVE_DARBY_ROWS[kind]
    K = (kind_.compute(q, _RE_PROBE, D, eps, row=_row(f)) if kind in _NEEDS_ROW
         else kind_.compute(q, _RE_PROBE, D, eps))
    if np.ndim(K) != 0:
        return None
    K = float(K)
    if (K < 0.0 and not kind_.allow_negative) or not math.isfinite(K):
        return None  # the row-by-row path refuses it, naming the row
    return ("fixed", f.count * K)


@lru_cache(maxsize=4096)
def _plan(fittings: tuple, D: float, eps: float):
    K_fixed, rows = 0.0, []
    for f in fittings:
        if not isinstance(f, Fitting):
            return None
        r = _row_plan(f, D, eps)
        if r is None:
            return None
        if r[0] == "fixed":
            K_fixed = K_fixed + r[1]
        else:
            rows.append(r[1:])
    return K_fixed, tuple(rows)


def _plan_or_none(fittings, D, eps):
    """The cached plan, or None (unhashable rows, a row without a plan, or a row that
    refuses this bore: the row-by-row path then raises its own error, naming the row)."""
    try:
        return _plan(tuple(fittings), float(D), float(eps))
    except (HeadlineError, TypeError, ValueError, KeyError, ZeroDivisionError):
        return None


def _plan_K(plan, Re, fd, D, eps):
    """Total K of a plan at Re (float or array); ``fd`` the pipe's f at Re or None."""
    K, rows = plan
    if not rows:
        return K
    if fd is None:
        fd = _fd_any(Re, eps / D)
    elif isinstance(Re, float):
        if Re < RE_FD_FLOOR:
            fd = _fd_any(Re, eps / D)
    elif Re.min(initial=np.inf) < RE_FD_FLOOR:
        # every Re below the floor is held at the floor: one value, f(RE_FD_FLOOR)
        fd = np.where(Re < RE_FD_FLOOR, _fd_any(RE_FD_FLOOR, eps / D), fd)
    for count, evaluate, data in rows:
        K = K + count * evaluate(data, Re, fd, eps)
    return K


def describe(fitting: Fitting) -> dict:
    """What a row is and how its K is found: label, kind label, method and source.

    >>> describe(Fitting("bend", params={"angle": 90, "R_D": 1.5}))["method"]
    'geometry: Rennels'
    """
    kind = FITTING_KINDS[fitting.kind]
    method = kind.method
    source = kind.source
    chosen = fitting.params.get("method")
    if chosen == "Darby 3-K" and fitting.kind in VALVE_DARBY_ROWS:
        method, source = "Darby 3-K", SOURCES["Darby"]
    elif chosen is not None and not kind.method.startswith(chosen):
        method = f"{kind.method}: {chosen}"
        source = SOURCES.get(chosen.split()[0], source)
    if fitting.kind in ("contraction", "enlargement"):
        method += f" ({fitting.params['style']})"
    return {"label": fitting.label or kind.label, "kind": fitting.kind, "kind_label": kind.label,
            "count": fitting.count, "method": method, "source": source,
            "params": dict(fitting.params)}
