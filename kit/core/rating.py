"""Pressure rating of pipe and flanges: highest pressure, wall, SDR class, flange class, vacuum.

Everything here is SI: pressures in Pa (design and rated pressures are **gauge**, internal
minus external; station pressures are **absolute**, as elsewhere in the kit), lengths in m,
temperatures in K, moduli and stresses in Pa.

What it checks
--------------
- **Highest pressure at a station** (:func:`highest_pressure`): the pump at shut-off on the
  highest suction pressure plus the static column down to the station, the standing column
  with the pump stopped, and a surge rise on top; the governing case is named.
- **Metal pipe** (:func:`metal_pipe_rating`): the pressure-design wall of straight pipe under
  internal pressure by ASME B31.3 §304.1.2, ``t = P D / (2 (S E W + P Y))``, plus the
  corrosion allowance and the mill under-tolerance, against the wall the pipe has; and the
  maximum allowable pressure at that wall.
- **Plastic pipe** (:func:`plastic_pipe_rating`): the pressure rating from the hydrostatic
  design stress and the SDR by the ISO equation ``P = 2 HDS / (SDR - 1)`` (ISO 161-1; the
  form ASTM D2241 and D1785 use), times a temperature derating factor.
- **Flanges** (:func:`flange_rating`): ASME B16.5 pressure-temperature ratings, material
  group 1.1 (carbon steel), classes 150/300/600, interpolated linearly in temperature.
- **Vacuum** (:func:`buckling_pressure`, :func:`vacuum_findings`): the elastic buckling
  pressure of a long unsupported tube (Timoshenko & Gere 1961) against the net external
  pressure where a station is below atmospheric.

The tables are **from memory** unless a value says otherwise, and every one is plain data a
user can replace (``S=``, ``HDS=``, ``derating=``, ``table=``, :class:`ElasticMaterial`).
They are design aids: the edition of the code in force, the maker's data and licensed
professional practice govern (:data:`kit.core.findings.CAUTIONS` ``"pressure"``).

Example
-------
>>> r = metal_pipe_rating(20e5, 0.1143, 0.00602, 313.15, "a106_b")
>>> round(r.t_pressure * 1e3, 3), round(r.P_allow / 1e5, 1)
(0.824, 132.0)
"""

from __future__ import annotations

import math
from dataclasses import dataclass, replace

from kit.core.findings import Finding, Severity
from kit.core.liquids import P_ATM
from kit.errors import InputError, check_choice, check_range

__all__ = [
    "G", "VALIDITY", "ElasticMaterial", "ELASTIC", "ELASTIC_FOR_ROUGHNESS", "elastic_material",
    "material_for_pipe",
    "PressureCases", "highest_pressure",
    "Grade", "GRADES", "JOINT_FACTORS", "Y_TABLE", "allowable_stress", "y_coefficient",
    "b31_3_thickness", "b31_3_pressure", "MetalRating", "metal_pipe_rating",
    "PlasticCompound", "COMPOUNDS", "derating_factor", "sdr_pressure", "PlasticRating",
    "plastic_pipe_rating", "pipe_rating", "GivenRating",
    "FLANGE_RATINGS", "FLANGE_SOURCE", "flange_rating", "flange_findings",
    "VACUUM_SAFETY_FACTOR", "buckling_pressure", "vacuum_findings",
    "RATING_MARGIN_CHECK", "rating_findings",
]

#: Standard gravity [m/s²] (CGPM 1901).
from kit.core.constants import G  # noqa: E402  (one gravity constant)

#: Where each formula holds without special consideration, as data.
VALIDITY: dict[str, dict] = {
    "ASME B31.3 304.1.2(a)": {"t/D max": 1.0 / 6.0, "P/(S E) max": 0.385},
}

#: Utilisation above which a passing rating is marked CHECK (within 10 % of the rating):
#: common practice, no source.
RATING_MARGIN_CHECK = 0.10


def _c_to_k(t_c: float) -> float:
    return t_c + 273.15


def _f_to_k(t_f: float) -> float:
    return (t_f - 32.0) * 5.0 / 9.0 + 273.15


_KSI = 6.894757e6  # Pa per ksi


def _interp(table, x: float) -> float:
    """Linear interpolation in a ((x, y), ...) table sorted by x; x within the table."""
    xs = [p[0] for p in table]
    if x <= xs[0]:
        return table[0][1]
    for (x0, y0), (x1, y1) in zip(table, table[1:], strict=False):
        if x <= x1:
            return y0 + (y1 - y0) * (x - x0) / (x1 - x0)
    return table[-1][1]


def _check_table(field_name: str, table, unit: str) -> tuple:
    """A user table of (T [K], value) pairs: at least two, T strictly increasing, values > 0."""
    rows = tuple(table)
    if len(rows) < 2:
        raise InputError(field_name, len(rows), "must have at least two (temperature, value) rows")
    out = []
    for i, row in enumerate(rows):
        if len(row) != 2:
            raise InputError(f"{field_name}[{i}]", row, "must be a (temperature [K], value) pair")
        T = check_range(f"{field_name}[{i}] temperature", row[0], "K", low=0.0)
        v = check_range(f"{field_name}[{i}] value", row[1], unit, low=0.0)
        if out and T <= out[-1][0]:
            raise InputError(f"{field_name}[{i}] temperature", T,
                             f"must be greater than the row before, {out[-1][0]:g} K", "K")
        out.append((T, v))
    return tuple(out)


# --------------------------------------------------------------------------- pipe materials

@dataclass(frozen=True)
class ElasticMaterial:
    """Elastic constants of a pipe material, with their source.

    Parameters
    ----------
    display : str
        Display name [-]
    E : float
        Young's modulus (short-term for plastics, the one a pressure wave sees), 1e8 to 5e11 Pa [Pa]
    nu : float
        Poisson's ratio, 0 < nu < 0.5 [-]
    source : str
        Where the values come from [-]
    creeps : bool
        True for plastics and composites, whose modulus under a sustained load (vacuum) is far
        below ``E`` [-]

    Examples
    --------
    >>> ElasticMaterial("my steel", 2.0e11, 0.3, "maker's data").E
    200000000000.0
    """

    display: str
    E: float
    nu: float
    source: str
    creeps: bool = False

    def __post_init__(self):
        object.__setattr__(self, "E", check_range("elastic modulus", self.E, "Pa", 1e8, 5e11))
        object.__setattr__(self, "nu", check_range("Poisson's ratio", self.nu, "-", 0.0, 0.5,
                                                   high_inclusive=False))


_WS = "Wylie & Streeter (1993), Fluid Transients in Systems, table of pipe properties"

#: Elastic constants by our material key. Values from memory; each names where it is usually
#: found. Plastics: short-term modulus at about 23 °C.
ELASTIC: dict[str, ElasticMaterial] = {
    "carbon_steel": ElasticMaterial(
        "Carbon steel", 207e9, 0.30, f"{_WS}: steel 200-212 GPa, nu 0.30 (from memory)"),
    "stainless_steel": ElasticMaterial(
        "Austenitic stainless steel", 193e9, 0.30,
        "common handbook value for types 304/316, 193 GPa, nu 0.30 (from memory)"),
    "ductile_iron": ElasticMaterial(
        "Ductile iron", 165e9, 0.28,
        "ductile-iron pipe design value 24e6 psi = 165 GPa, nu 0.28 (from memory)"),
    "cast_iron": ElasticMaterial(
        "Grey cast iron", 100e9, 0.25, f"{_WS}: cast iron 80-170 GPa, nu 0.25 (from memory)"),
    "copper": ElasticMaterial(
        "Copper", 117e9, 0.34, "common handbook value 117 GPa, nu 0.34 (from memory)"),
    "pvc": ElasticMaterial(
        "PVC (rigid, unplasticised)", 2.76e9, 0.45,
        "AWWA C900 surge basis E = 400,000 psi = 2.76 GPa; nu 0.45 (from memory)", creeps=True),
    "cpvc": ElasticMaterial(
        "CPVC", 2.9e9, 0.45, "common maker value 423,000 psi = 2.9 GPa; nu 0.45 (from memory)",
        creeps=True),
    "hdpe": ElasticMaterial(
        "HDPE (PE4710)", 0.9e9, 0.45,
        "PPI Handbook of PE Pipe, short-term modulus of PE4710 at 23 °C about 130,000 psi = "
        "0.9 GPa; nu 0.45 (from memory)", creeps=True),
    "grp": ElasticMaterial(
        "GRP (glass-reinforced plastic), hoop", 20e9, 0.30,
        "typical filament-wound hoop modulus 10-25 GPa; varies with the lay-up: use the "
        "maker's hoop modulus (from memory)", creeps=True),
}

#: Roughness-table material key → elastic material key; None where the kit has no value
#: (give an :class:`ElasticMaterial`).
ELASTIC_FOR_ROUGHNESS: dict[str, str | None] = {
    "carbon_steel": "carbon_steel", "galvanised_steel": "carbon_steel",
    "stainless_steel": "stainless_steel", "cast_iron": "cast_iron",
    "cast_iron_asphalted": "cast_iron", "ductile_iron_lined": "ductile_iron",
    "pvc": "pvc", "hdpe": "hdpe", "copper": "copper", "concrete": None, "drawn_tubing": None,
}


def elastic_material(material) -> ElasticMaterial:
    """The elastic constants for a key of :data:`ELASTIC`, or the object itself.

    Parameters
    ----------
    material : str or ElasticMaterial
        A key of :data:`ELASTIC` or the user's own constants [-]

    Returns
    -------
    material : ElasticMaterial
        Modulus [Pa], Poisson's ratio [-] and source

    Examples
    --------
    >>> elastic_material("pvc").E
    2760000000.0
    """
    if isinstance(material, ElasticMaterial):
        return material
    check_choice("pipe elastic material", material, tuple(ELASTIC))
    return ELASTIC[material]


def material_for_pipe(pipe) -> ElasticMaterial:
    """The elastic constants the kit assumes for a :class:`~kit.core.pipes.Pipe`.

    CPVC pipe (ASTM F441) shares the roughness key ``"pvc"`` and is told apart by its standard.

    Parameters
    ----------
    pipe : Pipe
        The pipe [-]

    Returns
    -------
    material : ElasticMaterial
        From :data:`ELASTIC` via :data:`ELASTIC_FOR_ROUGHNESS` [-]

    Examples
    --------
    >>> from kit.core.pipes import catalogue_pipe
    >>> material_for_pipe(catalogue_pipe("astm_f441", "2", "80", "pvc")).display
    'CPVC'
    """
    if pipe.standard == "astm_f441":
        return ELASTIC["cpvc"]
    key = ELASTIC_FOR_ROUGHNESS.get(pipe.material)
    if key is None:
        raise InputError(
            "pipe elastic material", pipe.material,
            "has no elastic constants in the kit: give an ElasticMaterial (modulus and "
            "Poisson's ratio from the maker)")
    return ELASTIC[key]


def _pipe_dims(pipe) -> tuple[float, float]:
    """(Do, wall) [m] of a pipe, refusing a pipe without them."""
    if pipe.Do is None or pipe.wall is None:
        raise InputError("pipe wall thickness", None,
                         f"is needed for a rating of {pipe.label}: give the outside diameter")
    return float(pipe.Do), float(pipe.wall)


# --------------------------------------------------------------------------- highest pressure

@dataclass(frozen=True)
class PressureCases:
    """The pressure cases at one station and the one that governs.

    Attributes
    ----------
    cases : dict
        Case name → absolute pressure [Pa].
    governing : str
        The name of the highest case.
    p_max : float
        The highest absolute pressure [Pa].
    """

    cases: dict
    governing: str
    p_max: float

    def gauge(self, p_atm: float = P_ATM) -> float:
        """The highest pressure as gauge, ``p_max - p_atm`` [Pa]."""
        return self.p_max - p_atm


def highest_pressure(rho: float, shutoff_head: float, suction_pressure_max: float,
                     drop_to_station: float, standing_head: float | None = None,
                     standing_surface_pressure: float = P_ATM, surge_rise: float = 0.0,
                     running_pressure: float | None = None,
                     other_cases: dict | None = None) -> PressureCases:
    """Highest pressure at a station from the no-flow and surge cases; the governing one named.

    Hydrostatics (``p = p0 + rho g h``) applied to each case, common practice, no source:

    - *pump at shut-off*: ``p_s,max + rho g (H0 + dz)``, the pump's zero-flow head ``H0`` on the
      highest suction pressure, plus the static column ``dz`` from the pump down to the station;
    - *standing column, pump stopped* (when ``standing_head`` is given):
      ``p_surface + rho g h_standing``, the highest liquid surface that can stand on the station;
    - *surge*: ``running_pressure + surge_rise``; with no running pressure given, the rise is
      added to the shut-off case (a cautious bound, named so);
    - any *other cases* the caller names (a relief-valve set pressure, a line's inlet
      pressure where there is no pump: give ``shutoff_head=0``).

    Parameters
    ----------
    rho : float
        Liquid density, the highest of the band [kg/m³]
    shutoff_head : float
        Pump head at zero flow (largest impeller, highest speed), >= 0 [m]
    suction_pressure_max : float
        Highest absolute pressure at the pump inlet with no flow [Pa]
    drop_to_station : float
        Pump elevation minus station elevation (positive when the station is lower) [m]
    standing_head : float, optional
        Height of the highest liquid surface that can stand on the station with the pump
        stopped, above the station [m]
    standing_surface_pressure : float
        Absolute pressure on that surface [Pa]
    surge_rise : float
        Surge pressure rise to add, >= 0 [Pa]
    running_pressure : float, optional
        Absolute running pressure at the station, on which the surge acts [Pa]
    other_cases : dict, optional
        More cases, name → absolute pressure [Pa]

    Returns
    -------
    cases : PressureCases
        Each case's absolute pressure [Pa], the governing case and the highest pressure [Pa]

    Examples
    --------
    >>> c = highest_pressure(998.2, 60.0, 1.5e5, 2.0)
    >>> c.governing, round(c.p_max)
    ('pump at shut-off', 756918)
    """
    rho = check_range("density", rho, "kg/m³", low=0.0)
    H0 = check_range("pump shut-off head", shutoff_head, "m", low=0.0, low_inclusive=True)
    ps = check_range("highest suction pressure", suction_pressure_max, "Pa", low=0.0)
    dz = check_range("static column to station", drop_to_station, "m", -1e4, 1e4)
    dp_s = check_range("surge rise", surge_rise, "Pa", low=0.0, low_inclusive=True)
    cases = {"pump at shut-off": ps + rho * G * (H0 + dz)}
    if standing_head is not None:
        h = check_range("standing head", standing_head, "m", -1e4, 1e4)
        p0 = check_range("standing surface pressure", standing_surface_pressure, "Pa", low=0.0)
        cases["standing column, pump stopped"] = p0 + rho * G * h
    if dp_s > 0.0:
        if running_pressure is not None:
            pr = check_range("running pressure", running_pressure, "Pa", low=0.0)
            cases["surge on running pressure"] = pr + dp_s
        else:
            cases["surge on shut-off pressure (no running pressure given)"] = (
                cases["pump at shut-off"] + dp_s)
    for name, p in (other_cases or {}).items():
        if not isinstance(name, str) or not name.strip() or name in cases:
            raise InputError("pressure case name", name,
                             f"must be a new non-empty text (taken: {', '.join(cases)})")
        cases[name] = check_range(f"pressure of case '{name}'", p, "Pa", low=0.0)
    governing = max(cases, key=cases.__getitem__)
    return PressureCases(cases=cases, governing=governing, p_max=cases[governing])


# --------------------------------------------------------------------------- metal pipe, B31.3

_B313 = "ASME B31.3 (Process Piping)"
_TABLE_A1 = (f"{_B313} Table A-1, basic allowable stress (from memory; check the edition in "
             "force)")


@dataclass(frozen=True)
class Grade:
    """A pipe material grade with its basic allowable stress over temperature.

    Attributes
    ----------
    display : str
        Display name.
    y_class : str
        Row of :data:`Y_TABLE` ('ferritic', 'austenitic', 'other_ductile', 'cast_iron').
    T_min : float
        Lowest temperature accepted without low-temperature toughness rules [K].
    stress : tuple
        ((T [K], S [Pa]), ...); below the first row the first value holds (Table A-1's
        "min. temp. to 100 °F" column); above the last row the grade is refused.
    mill_tolerance : float
        Permitted under-tolerance on nominal wall, fraction [-].
    source : str
        Where the stresses and the tolerance come from.
    joint : str
        Key of :data:`JOINT_FACTORS` assumed when none is given: the lowest factor the
        specification's usual products carry (A53 Type E is ERW, A312 may be welded).
    """

    display: str
    y_class: str
    T_min: float
    stress: tuple
    mill_tolerance: float
    source: str
    joint: str = "seamless"


def _ksi_rows(rows):
    return tuple((_f_to_k(t_f), s * _KSI) for t_f, s in rows)


_CS_ROWS = _ksi_rows(((100, 20.0), (200, 20.0), (300, 20.0), (400, 20.0), (500, 18.9),
                      (600, 17.3)))
_MILL = "wall under-tolerance 12.5 % of nominal ({spec}, from memory)"

#: Allowable stress table (ksi rows from ASME B31.3 Table A-1, from memory).
GRADES: dict[str, Grade] = {
    "a106_b": Grade("ASTM A106 Grade B seamless carbon steel", "ferritic", _c_to_k(-29.0),
                    _CS_ROWS, 0.125, f"{_TABLE_A1}; {_MILL.format(spec='ASTM A106')}"),
    "a53_b": Grade("ASTM A53 Grade B carbon steel", "ferritic", _c_to_k(-29.0),
                   _CS_ROWS, 0.125, f"{_TABLE_A1}; {_MILL.format(spec='ASTM A53')}", "erw"),
    "a312_tp304": Grade(
        "ASTM A312 TP304 stainless steel", "austenitic", _c_to_k(-196.0),
        _ksi_rows(((100, 20.0), (200, 16.7), (300, 15.0), (400, 13.8), (500, 12.9),
                   (600, 12.3))),
        0.125, f"{_TABLE_A1} (values without the higher-stress note); "
               f"{_MILL.format(spec='ASTM A312')}", "efw_single_butt"),
    "a312_tp316": Grade(
        "ASTM A312 TP316 stainless steel", "austenitic", _c_to_k(-196.0),
        _ksi_rows(((100, 20.0), (200, 17.3), (300, 15.6), (400, 14.3), (500, 13.3),
                   (600, 12.6))),
        0.125, f"{_TABLE_A1} (values without the higher-stress note); "
               f"{_MILL.format(spec='ASTM A312')}", "efw_single_butt"),
}

#: Longitudinal weld joint quality factor E (ASME B31.3 Table 302.3.4 / A-1B, from memory).
JOINT_FACTORS: dict[str, float] = {
    "seamless": 1.00,
    "erw": 0.85,                      # electric resistance welded
    "efw_single_butt": 0.80,          # electric fusion welded, single butt, no radiography
    "efw_double_butt": 0.85,          # electric fusion welded, double butt, no radiography
    "efw_100pct_radiographed": 1.00,  # electric fusion welded, 100 % radiographed
    "furnace_butt": 0.60,             # furnace butt welded (continuous weld)
}

#: Coefficient Y for t < D/6 by temperature (ASME B31.3 Table 304.1.1, from memory):
#: ((T [K], Y), ...), linear between rows, the end values beyond them.
Y_TABLE: dict[str, tuple] = {
    "ferritic": tuple((_c_to_k(t), y) for t, y in ((482, 0.4), (510, 0.5), (538, 0.7))),
    "austenitic": tuple((_c_to_k(t), y) for t, y in ((566, 0.4), (593, 0.5), (621, 0.7))),
    "other_ductile": ((_c_to_k(482), 0.4), (_c_to_k(621), 0.4)),
    "cast_iron": ((_c_to_k(482), 0.0), (_c_to_k(621), 0.0)),
}


def allowable_stress(grade: str, T: float) -> float:
    """Basic allowable stress S of a grade at a design temperature (ASME B31.3 Table A-1).

    Linear interpolation between the tabulated temperatures, which B31.3 permits (from
    memory). The table is :data:`GRADES` (from memory); give your own ``S`` to
    :func:`metal_pipe_rating` where it differs.

    Parameters
    ----------
    grade : str
        A key of :data:`GRADES` [-]
    T : float
        Design metal temperature, from the grade's ``T_min`` to its last tabulated row [K]

    Returns
    -------
    S : float
        Basic allowable stress [Pa]

    Examples
    --------
    >>> round(allowable_stress("a106_b", 293.15) / 1e6, 1)
    137.9
    """
    check_choice("pipe grade", grade, tuple(GRADES))
    g = GRADES[grade]
    T = check_range(f"design temperature ({g.display})", T, "K", g.T_min, g.stress[-1][0],
                    low_inclusive=True)
    return _interp(g.stress, T)


def y_coefficient(y_class: str, T: float) -> float:
    """Coefficient Y of the B31.3 wall formula for t < D/6 (ASME B31.3 Table 304.1.1).

    Parameters
    ----------
    y_class : str
        'ferritic', 'austenitic', 'other_ductile' or 'cast_iron' [-]
    T : float
        Design temperature [K]

    Returns
    -------
    Y : float
        Coefficient Y [-]

    Examples
    --------
    >>> y_coefficient("ferritic", 769.15)
    0.45
    """
    check_choice("Y coefficient class", y_class, tuple(Y_TABLE))
    T = check_range("design temperature", T, "K", low=0.0)
    return round(_interp(Y_TABLE[y_class], T), 12)


def _check_SEWY(S, E, W, Y):
    S = check_range("allowable stress S", S, "Pa", 1e6, 2e9)
    E = check_range("joint quality factor E", E, "-", 0.0, 1.0)
    W = check_range("weld strength reduction factor W", W, "-", 0.0, 1.0)
    Y = check_range("coefficient Y", Y, "-", 0.0, 1.0, low_inclusive=True)
    return S, E, W, Y


def b31_3_thickness(P: float, D: float, S: float, E: float = 1.0, W: float = 1.0,
                    Y: float = 0.4) -> float:
    """Pressure-design thickness of straight pipe under internal pressure, ASME B31.3 §304.1.2.

    .. math:: t = \\frac{P D}{2 (S E W + P Y)}

    Parameters
    ----------
    P : float
        Internal design gauge pressure, > 0 [Pa]
    D : float
        Outside diameter, > 0 [m]
    S : float
        Basic allowable stress at the design temperature [Pa]
    E : float
        Longitudinal joint quality factor, 0 < E <= 1 [-]
    W : float
        Weld joint strength reduction factor, 0 < W <= 1 [-]
    Y : float
        Coefficient Y, 0 to 1 [-]

    Returns
    -------
    t : float
        Pressure-design thickness, without allowances [m]

    Examples
    --------
    >>> round(b31_3_thickness(20e5, 0.1143, 137.9e6) * 1e3, 4)
    0.8241

    References
    ----------
    .. [1] ASME B31.3, Process Piping, §304.1.2 eq. (3a).
    """
    P = check_range("design pressure", P, "Pa", low=0.0)
    D = check_range("outside diameter", D, "m", low=0.0)
    S, E, W, Y = _check_SEWY(S, E, W, Y)
    return P * D / (2.0 * (S * E * W + P * Y))


def b31_3_pressure(t: float, D: float, S: float, E: float = 1.0, W: float = 1.0,
                   Y: float = 0.4) -> float:
    """Internal gauge pressure a wall holds: ASME B31.3 §304.1.2 solved for P.

    .. math:: P = \\frac{2 S E W t}{D - 2 Y t}

    Parameters
    ----------
    t : float
        Wall available for pressure (after allowances), > 0 [m]
    D : float
        Outside diameter, > 2 Y t [m]
    S : float
        Basic allowable stress [Pa]
    E : float
        Joint quality factor, 0 < E <= 1 [-]
    W : float
        Weld strength reduction factor, 0 < W <= 1 [-]
    Y : float
        Coefficient Y, 0 to 1 [-]

    Returns
    -------
    P : float
        Maximum allowable internal gauge pressure [Pa]

    Examples
    --------
    >>> round(b31_3_pressure(0.0008241, 0.1143, 137.9e6) / 1e5, 2)
    20.0
    """
    t = check_range("wall available for pressure", t, "m", low=0.0)
    D = check_range("outside diameter", D, "m", low=2.0 * t)
    S, E, W, Y = _check_SEWY(S, E, W, Y)
    return 2.0 * S * E * W * t / (D - 2.0 * Y * t)


@dataclass(frozen=True)
class MetalRating:
    """Result of :func:`metal_pipe_rating` (all pressures gauge).

    Attributes
    ----------
    P : float
        Design pressure [Pa].
    D, wall : float
        Outside diameter and nominal wall [m].
    S, E, W, Y : float
        Allowable stress [Pa] and the factors used [-].
    c, mill_tolerance : float
        Corrosion/thread allowance [m] and under-tolerance fraction [-].
    t_pressure : float
        Pressure-design thickness t [m].
    t_min : float
        t + c, the least wall after under-tolerance [m].
    t_nominal_min : float
        t_min / (1 - mill tolerance), the least nominal wall that holds [m].
    P_allow : float
        Maximum allowable pressure at the nominal wall [Pa].
    special : str
        Why B31.3 §304.1.2(b) asks for special consideration ('' when it does not).
    method, basis, source : str
        The rule, the values used in words, and where they come from.
    """

    P: float
    D: float
    wall: float
    S: float
    E: float
    W: float
    Y: float
    c: float
    mill_tolerance: float
    t_pressure: float
    t_min: float
    t_nominal_min: float
    P_allow: float
    special: str
    method: str
    basis: str
    source: str

    @property
    def margin(self) -> float:
        """``P_allow - P`` [Pa]; negative when the wall is too thin."""
        return self.P_allow - self.P

    @property
    def holds(self) -> bool:
        """True when the nominal wall is at least the required nominal wall."""
        return self.wall >= self.t_nominal_min


def metal_pipe_rating(P: float, Do: float, wall: float, T: float, grade: str = "a106_b",
                      joint: str | None = None, corrosion_allowance: float = 0.0,
                      mill_tolerance: float | None = None, S: float | None = None,
                      W: float = 1.0) -> MetalRating:
    """Required wall and allowable pressure of metal pipe by ASME B31.3 §304.1.2.

    ``t = P D / (2 (S E W + P Y))``; the minimum required wall ``t_m = t + c`` (c: corrosion,
    erosion and thread or groove depth); the pipe holds when its nominal wall less the mill
    under-tolerance is at least ``t_m``. The maximum allowable pressure solves the same
    formula for P with ``t = wall (1 - tolerance) - c``. Y comes from Table 304.1.1 for
    t < D/6; at t >= D/6, Y = (d + 2c)/(D + d + 2c) and, like P/(S E) > 0.385, the code asks
    for special consideration (§304.1.2(b)), reported in ``special``.

    Parameters
    ----------
    P : float
        Design gauge pressure, > 0 [Pa]
    Do : float
        Outside diameter [m]
    wall : float
        Nominal wall thickness, 0 < wall < Do/2 [m]
    T : float
        Design temperature [K]
    grade : str
        A key of :data:`GRADES` (Y class, default mill tolerance, table stress) [-]
    joint : str, optional
        A key of :data:`JOINT_FACTORS`; default the grade's assumed joint (A106 seamless,
        A53 ERW, A312 single-butt fusion welded: the lowest factor of each) [-]
    corrosion_allowance : float
        Corrosion, erosion and thread/groove allowance c, >= 0 [m]
    mill_tolerance : float, optional
        Under-tolerance fraction, 0 to 0.5; default the grade's (12.5 %) [-]
    S : float, optional
        The user's allowable stress, replacing the table's [Pa]
    W : float
        Weld joint strength reduction factor (1.0 below the creep range) [-]

    Returns
    -------
    rating : MetalRating
        Required walls [m], allowable pressure [Pa] and the basis

    Examples
    --------
    >>> r = metal_pipe_rating(40e5, 0.2191, 0.00818, 313.15, corrosion_allowance=1.5e-3)
    >>> round(r.t_nominal_min * 1e3, 2), r.holds
    (5.3, True)

    References
    ----------
    .. [1] ASME B31.3, Process Piping, §304.1.2, Tables 302.3.4, 304.1.1 and A-1.
    """
    check_choice("pipe grade", grade, tuple(GRADES))
    g = GRADES[grade]
    joint_text = "" if joint is not None else ", assumed"
    joint = g.joint if joint is None else joint
    check_choice("longitudinal joint", joint, tuple(JOINT_FACTORS))
    P = check_range("design pressure", P, "Pa", low=0.0)
    Do = check_range("outside diameter", Do, "m", 0.0, 6.0)
    wall = check_range("pipe wall thickness", wall, "m", 0.0, Do / 2.0, high_inclusive=False)
    T = check_range("design temperature", T, "K", low=0.0)
    c = check_range("corrosion allowance", corrosion_allowance, "m", 0.0, wall,
                    low_inclusive=True, high_inclusive=False)
    mt = g.mill_tolerance if mill_tolerance is None else check_range(
        "mill tolerance", mill_tolerance, "-", 0.0, 0.5, low_inclusive=True,
        high_inclusive=False)
    if S is None:
        S = allowable_stress(grade, T)
        s_text = f"S from {grade} table"
    else:
        s_text = "S given by the user"
    E = JOINT_FACTORS[joint]
    S, E, W, Y = _check_SEWY(S, E, W, y_coefficient(g.y_class, T))
    t = b31_3_thickness(P, Do, S, E, W, Y)
    special = []
    limits = VALIDITY["ASME B31.3 304.1.2(a)"]
    if t >= Do * limits["t/D max"]:
        d = Do - 2.0 * wall
        Y = (d + 2.0 * c) / (Do + d + 2.0 * c)
        t = b31_3_thickness(P, Do, S, E, W, Y)
        special.append("t >= D/6")
    if P / (S * E) > limits["P/(S E) max"]:
        special.append("P/(S E) > 0.385")
    t_min = t + c
    t_nom_min = t_min / (1.0 - mt)
    t_avail = wall * (1.0 - mt) - c
    P_allow = b31_3_pressure(t_avail, Do, S, E, W, Y) if t_avail > 0.0 else 0.0
    basis = (f"S = {S / 1e6:.4g} MPa ({s_text}), E = {E:g} ({joint}{joint_text}), W = {W:g}, "
             f"Y = {Y:.3g}, c = {c * 1e3:.3g} mm, mill under-tolerance {mt * 100:.3g} %")
    source = f"{_B313} §304.1.2; {g.source if s_text.startswith('S from') else 'user S'}"
    return MetalRating(P=P, D=Do, wall=wall, S=S, E=E, W=W, Y=Y, c=c, mill_tolerance=mt,
                       t_pressure=t, t_min=t_min, t_nominal_min=t_nom_min, P_allow=P_allow,
                       special=" and ".join(special),
                       method="ASME B31.3 §304.1.2 straight pipe under internal pressure",
                       basis=basis, source=source)


# --------------------------------------------------------------------------- plastic pipe

_TR4 = ("hydrostatic design stress at 23 °C as listed by the Plastics Pipe Institute (PPI "
        "TR-4), {psi} psi (from memory)")


@dataclass(frozen=True)
class PlasticCompound:
    """A plastic pipe compound: hydrostatic design stress and temperature derating.

    Attributes
    ----------
    display : str
        Display name.
    HDS : float
        Hydrostatic design stress at 23 °C (the long-term strength with its design factor) [Pa].
    derating : tuple
        ((T [K], factor [-]), ...); below the first row the factor is 1.0 (no up-rating);
        above the last the compound is refused.
    T_min : float
        Lowest temperature accepted [K].
    source_hds, source_derating : str
        Where the values come from.
    """

    display: str
    HDS: float
    derating: tuple
    T_min: float
    source_hds: str
    source_derating: str


def _f_rows(rows):
    return tuple((_f_to_k(t_f), f) for t_f, f in rows)


#: Plastic compounds (values from memory; replace with the maker's where they differ).
COMPOUNDS: dict[str, PlasticCompound] = {
    "pvc_1120": PlasticCompound(
        "PVC 1120 (PVC 12454)", 2000.0 * 6894.757,
        _f_rows(((73, 1.00), (80, 0.88), (90, 0.75), (100, 0.62), (110, 0.50), (120, 0.40),
                 (130, 0.30), (140, 0.22))),
        273.15, _TR4.format(psi="2000"),
        "PVC pipe makers' temperature derating table, 73-140 °F (from memory); linear "
        "between rows; PVC is not for pressure service above 140 °F (60 °C); below 0 °C "
        "refused (brittle), common practice, no source"),
    "cpvc_4120": PlasticCompound(
        "CPVC 4120 (CPVC 23447)", 2000.0 * 6894.757,
        _f_rows(((73, 1.00), (80, 1.00), (90, 0.91), (100, 0.82), (110, 0.72), (120, 0.65),
                 (140, 0.50), (160, 0.40), (180, 0.25), (200, 0.20))),
        273.15, _TR4.format(psi="2000"),
        "CPVC pipe makers' temperature derating table, 73-200 °F (from memory); linear "
        "between rows"),
    "pe4710": PlasticCompound(
        "PE4710 (HDPE)", 1000.0 * 6894.757,
        _f_rows(((73, 1.00), (80, 0.90), (90, 0.80), (100, 0.71), (110, 0.63), (120, 0.56),
                 (130, 0.50), (140, 0.45))),
        233.15, _TR4.format(psi="1000"),
        "PPI Handbook of PE Pipe temperature compensation multipliers, 73-140 °F (from "
        "memory); linear between rows"),
}


def derating_factor(compound: str, T: float, derating=None) -> float:
    """Temperature derating factor for a plastic compound's pressure rating.

    Linear interpolation in the compound's table (:data:`COMPOUNDS`, from memory) or the
    user's table; 1.0 below the first row; refused above the last row and below ``T_min``.

    Parameters
    ----------
    compound : str
        A key of :data:`COMPOUNDS` [-]
    T : float
        Service temperature [K]
    derating : sequence of (T, factor), optional
        The user's table replacing the compound's: (temperature [K], factor [-]) rows [-]

    Returns
    -------
    factor : float
        Multiplier on the 23 °C pressure rating [-]

    Examples
    --------
    >>> round(derating_factor("pvc_1120", 310.93), 3)
    0.62
    """
    check_choice("plastic compound", compound, tuple(COMPOUNDS))
    pc = COMPOUNDS[compound]
    table = pc.derating if derating is None else _check_table("derating table", derating, "-")
    T = check_range(f"service temperature ({pc.display})", T, "K", pc.T_min, table[-1][0],
                    low_inclusive=True)
    return _interp(table, T)


def sdr_pressure(SDR: float, HDS: float, factor: float = 1.0) -> float:
    """Pressure rating of plastic pipe from its SDR: the ISO equation (ISO 161-1).

    .. math:: P = \\frac{2\\,\\mathrm{HDS}\\,f}{\\mathrm{SDR} - 1}

    the form ASTM D2241 and D1785 use ("ISO equation", 2S/P = R - 1), with ``f`` a
    temperature derating factor.

    Parameters
    ----------
    SDR : float
        Standard dimension ratio Do / wall, > 1 [-]
    HDS : float
        Hydrostatic design stress [Pa]
    factor : float
        Temperature derating factor, 0 < f <= 1 [-]

    Returns
    -------
    P : float
        Pressure rating (gauge) [Pa]

    Examples
    --------
    >>> round(sdr_pressure(21.0, 13.79e6) / 6894.757)
    200

    References
    ----------
    .. [1] ISO 161-1, Thermoplastics pipes for the conveyance of fluids — Nominal outside
       diameters and nominal pressures.
    .. [2] ASTM D2241, Poly(Vinyl Chloride) (PVC) Pressure-Rated Pipe (SDR Series).
    """
    SDR = check_range("SDR", SDR, "-", low=1.0)
    HDS = check_range("hydrostatic design stress", HDS, "Pa", 1e5, 1e8)
    f = check_range("derating factor", factor, "-", 0.0, 1.0)
    return 2.0 * HDS * f / (SDR - 1.0)


class _PressureMargin:
    """``margin`` and ``holds`` of a rating judged on pressure (``P`` against ``P_allow``)."""

    @property
    def margin(self) -> float:
        """``P_allow - P`` [Pa]."""
        return self.P_allow - self.P

    @property
    def holds(self) -> bool:
        """True when the design pressure is within the rating."""
        return self.P <= self.P_allow


@dataclass(frozen=True)
class PlasticRating(_PressureMargin):
    """Result of :func:`plastic_pipe_rating` (pressures gauge).

    Attributes
    ----------
    P : float
        Design pressure [Pa].
    SDR : float
        Do / wall [-].
    HDS : float
        Hydrostatic design stress used [Pa].
    factor : float
        Temperature derating factor [-].
    P_allow : float
        Pressure rating at the temperature [Pa].
    method, basis, source : str
    """

    P: float
    SDR: float
    HDS: float
    factor: float
    P_allow: float
    method: str
    basis: str
    source: str


def plastic_pipe_rating(P: float, Do: float, wall: float, T: float, compound: str,
                        HDS: float | None = None, derating=None) -> PlasticRating:
    """Pressure rating of thermoplastic pipe at a temperature by the ISO equation.

    ``P_allow = 2 HDS f / (SDR - 1)``, SDR = Do / wall (ISO 161-1; ASTM D2241), with ``f``
    from :func:`derating_factor`.

    Parameters
    ----------
    P : float
        Design gauge pressure, > 0 [Pa]
    Do : float
        Outside diameter [m]
    wall : float
        Wall thickness (minimum wall of the standard), 0 < wall < Do/2 [m]
    T : float
        Service temperature [K]
    compound : str
        A key of :data:`COMPOUNDS` [-]
    HDS : float, optional
        The user's hydrostatic design stress at 23 °C [Pa]
    derating : sequence of (T, factor), optional
        The user's derating table, (temperature [K], factor [-]) rows [-]

    Returns
    -------
    rating : PlasticRating
        SDR [-], factor [-], rating [Pa] and the basis

    Examples
    --------
    >>> r = plastic_pipe_rating(8e5, 0.1143, 0.1143 / 21, 303.15, "pvc_1120")
    >>> round(r.factor, 3), round(r.P_allow / 1e5, 2)
    (0.802, 11.06)
    """
    check_choice("plastic compound", compound, tuple(COMPOUNDS))
    pc = COMPOUNDS[compound]
    P = check_range("design pressure", P, "Pa", low=0.0)
    Do = check_range("outside diameter", Do, "m", 0.0, 6.0)
    wall = check_range("pipe wall thickness", wall, "m", 0.0, Do / 2.0, high_inclusive=False)
    f = derating_factor(compound, T, derating)
    hds = pc.HDS if HDS is None else check_range("hydrostatic design stress", HDS, "Pa",
                                                  1e5, 1e8)
    sdr = Do / wall
    P_allow = sdr_pressure(sdr, hds, f)
    basis = (f"SDR = {sdr:.4g}, HDS = {hds / 1e6:.4g} MPa "
             f"({'user' if HDS is not None else compound}), derating factor {f:.3g} at "
             f"{T - 273.15:.4g} degC ({'user table' if derating is not None else compound})")
    source = (f"ISO 161-1 / ASTM D2241 ISO equation; HDS: "
              f"{pc.source_hds if HDS is None else 'user value'}; derating: "
              f"{pc.source_derating if derating is None else 'user table'}")
    return PlasticRating(P=P, SDR=sdr, HDS=hds, factor=f, P_allow=P_allow,
                         method="ISO equation P = 2 HDS f / (SDR - 1)", basis=basis,
                         source=source)


#: Default grade or compound the kit assumes for a pipe, by roughness material key.
_DEFAULT_GRADE = {"carbon_steel": "a106_b", "galvanised_steel": "a53_b",
                  "stainless_steel": "a312_tp304"}
_DEFAULT_COMPOUND = {"pvc": "pvc_1120", "hdpe": "pe4710"}


@dataclass(frozen=True)
class GivenRating(_PressureMargin):
    """A pressure rating given by the user from the maker's data (hose, lined or special pipe).

    The kit does not compute it; it compares the highest pressure against it. Pressures gauge.

    Examples
    --------
    >>> r = GivenRating(6e5, 10e5)
    >>> r.holds, r.margin
    (True, 400000.0)
    """

    P: float
    P_allow: float
    method: str = "maker's pressure rating"
    basis: str = "given in [integrity] rated_pressure, at the design temperature"
    source: str = "the maker's datasheet (given by the user; not checked by the kit)"

    def __post_init__(self):
        check_range("[integrity] rated_pressure", self.P_allow, "Pa", low=0.0,
                    low_inclusive=False)


def pipe_rating(pipe, P: float, T: float, grade: str | None = None,
                compound: str | None = None, joint: str | None = None,
                corrosion_allowance: float = 0.0, S: float | None = None,
                HDS: float | None = None):
    """Rating of a catalogue :class:`~kit.core.pipes.Pipe` by the method its material needs.

    Steel and stainless pipe go to :func:`metal_pipe_rating` (ASME B31.3 §304.1.2), PVC,
    CPVC and HDPE to :func:`plastic_pipe_rating` (ISO equation). Without a grade the kit
    assumes A106 Gr B for carbon steel, A53 Gr B for galvanised, A312 TP304 for stainless;
    without a compound PVC 1120, CPVC 4120 on ASTM F441, PE4710 for HDPE; the basis says so.

    Parameters
    ----------
    pipe : Pipe
        The pipe, with outside diameter and wall [-]
    P : float
        Design gauge pressure [Pa]
    T : float
        Design temperature [K]
    grade : str, optional
        A key of :data:`GRADES` for metal pipe [-]
    compound : str, optional
        A key of :data:`COMPOUNDS` for plastic pipe [-]
    joint : str, optional
        A key of :data:`JOINT_FACTORS` for metal pipe; default the grade's assumed joint [-]
    corrosion_allowance : float
        Metal pipe corrosion and thread allowance [m]
    S : float, optional
        The user's allowable stress for metal pipe [Pa]
    HDS : float, optional
        The user's hydrostatic design stress for plastic pipe [Pa]

    Returns
    -------
    rating : MetalRating or PlasticRating
        With ``P_allow`` [Pa], ``margin`` [Pa] and the basis

    Examples
    --------
    >>> from kit.core.pipes import catalogue_pipe
    >>> r = pipe_rating(catalogue_pipe("astm_d2241", "4", "SDR 21", "pvc"), 8e5, 296.0)
    >>> round(r.P_allow / 6894.757)
    199
    """
    Do, wall = _pipe_dims(pipe)
    if pipe.material in _DEFAULT_GRADE:
        g = grade or _DEFAULT_GRADE[pipe.material]
        r = metal_pipe_rating(P, Do, wall, T, g, joint=joint,
                              corrosion_allowance=corrosion_allowance, S=S)
        if grade is None:
            r = _replace_basis(r, f"assumed grade {g}; ")
        return r
    if pipe.material in _DEFAULT_COMPOUND:
        default = "cpvc_4120" if pipe.standard == "astm_f441" else _DEFAULT_COMPOUND[pipe.material]
        c = compound or default
        r = plastic_pipe_rating(P, Do, wall, T, c, HDS=HDS)
        if compound is None:
            r = _replace_basis(r, f"assumed compound {c}; ")
        return r
    raise InputError("pipe material", pipe.material,
                     "has no rating method in the kit (steel, stainless, PVC, CPVC and HDPE "
                     "have): rate it from the maker's data")


def _replace_basis(r, prefix):
    return replace(r, basis=prefix + r.basis)


# --------------------------------------------------------------------------- flanges

FLANGE_SOURCE = ("ASME B16.5 Table 2-1.1, material group 1.1 (A105, A216 WCB, A515 70, "
                 "A516 70), working pressure by class (from memory; check the edition in force)")

_B165_T = (-29, 38, 50, 100, 150, 200, 250, 300, 325, 350, 375, 400, 425, 450, 475, 500, 538)
_B165_BAR = {
    "150": (19.6, 19.6, 19.2, 17.7, 15.8, 13.8, 12.1, 10.2, 9.3, 8.4, 7.4, 6.5, 5.5, 4.6, 3.7,
            2.8, 1.4),
    "300": (51.1, 51.1, 50.1, 46.6, 45.1, 43.8, 41.9, 39.8, 38.7, 37.6, 36.4, 34.7, 28.8, 23.0,
            17.4, 11.8, 5.9),
    "600": (102.1, 102.1, 100.2, 93.2, 90.2, 87.6, 83.9, 79.6, 77.4, 75.1, 72.7, 69.4, 57.5,
            46.0, 34.9, 23.5, 11.8),
}

#: Flange class → ((T [K], rated gauge pressure [Pa]), ...). Editable: pass ``table=``.
FLANGE_RATINGS: dict[str, tuple] = {
    cls: tuple((_c_to_k(t), b * 1e5) for t, b in zip(_B165_T, bars, strict=True))
    for cls, bars in _B165_BAR.items()
}


def flange_rating(flange_class: str, T: float, table=None) -> float:
    """Rated working pressure of a flange class at a temperature (ASME B16.5, group 1.1).

    Linear interpolation in temperature between the tabulated rows, as B16.5 permits;
    temperatures outside the table are refused.

    Parameters
    ----------
    flange_class : str
        '150', '300' or '600' (a key of :data:`FLANGE_RATINGS`, or of ``table``) [-]
    T : float
        Design temperature [K]
    table : dict, optional
        The user's ratings, class → ((T [K], gauge pressure [Pa]), ...) [-]

    Returns
    -------
    p_rated : float
        Rated gauge pressure [Pa]

    Examples
    --------
    >>> round(flange_rating("150", 338.15) / 1e5, 2)
    18.75
    """
    ratings = FLANGE_RATINGS if table is None else table
    cls = str(flange_class)
    check_choice("flange class", cls, tuple(ratings))
    rows = ratings[cls] if table is None else _check_table(f"class {cls} ratings", ratings[cls],
                                                           "Pa")
    T = check_range(f"design temperature (class {cls} flange)", T, "K", rows[0][0], rows[-1][0],
                    low_inclusive=True)
    return _interp(rows, T)


def flange_findings(subject: str, flange_class: str, pressures: PressureCases, T: float,
                    p_atm: float = P_ATM, table=None) -> list[Finding]:
    """Finding for a flange class against the highest pressure at its station (ASME B16.5).

    Parameters
    ----------
    subject : str
        What the finding is about [-]
    flange_class : str
        '150', '300' or '600' [-]
    pressures : PressureCases
        From :func:`highest_pressure` [Pa]
    T : float
        Design temperature [K]
    p_atm : float
        Atmospheric pressure, to turn the absolute maximum into gauge [Pa]
    table : dict, optional
        The user's ratings, as for :func:`flange_rating` [-]

    Returns
    -------
    findings : list of Finding
        One finding, FAIL above the rating [-]

    Examples
    --------
    >>> c = highest_pressure(998.2, 60.0, 1.5e5, 2.0)
    >>> flange_findings("F-1", "150", c, 313.15)[0].severity.value
    'pass'
    """
    p_rated = flange_rating(flange_class, T, table)
    return [_rating_finding(subject, f"class {flange_class} flange", pressures, p_rated,
                            p_atm, "ASME B16.5 class rating, interpolated in temperature",
                            FLANGE_SOURCE if table is None else "user flange table")]


# --------------------------------------------------------------------------- vacuum

#: Safety factor on the elastic buckling pressure. Common practice for unsupported pipe
#: under vacuum (the PPI Handbook of PE Pipe uses 2.5 for unconstrained collapse, from memory).
VACUUM_SAFETY_FACTOR = 2.5


def buckling_pressure(E: float, nu: float, t: float, D: float) -> float:
    """Elastic buckling (collapse) pressure of a long unsupported tube (Timoshenko & Gere 1961).

    .. math:: p_c = \\frac{2E}{1 - \\nu^2}\\left(\\frac{t}{D}\\right)^3

    with D the mean diameter. Long-tube limit: no end or ring stiffening, perfectly round
    (ovality lowers it), elastic material.

    Parameters
    ----------
    E : float
        Young's modulus (for plastics under sustained vacuum, the long-term modulus) [Pa]
    nu : float
        Poisson's ratio, 0 < nu < 0.5 [-]
    t : float
        Wall thickness, > 0 [m]
    D : float
        Mean diameter, > t [m]

    Returns
    -------
    p_c : float
        Net external pressure at which the tube buckles [Pa]

    Examples
    --------
    >>> round(buckling_pressure(2.76e9, 0.45, 0.00544, 0.1089) / 1e3, 1)
    862.8

    References
    ----------
    .. [1] Timoshenko, S. P., Gere, J. M. (1961). Theory of Elastic Stability, 2nd ed.
       McGraw-Hill, ch. 7 (buckling of a long circular tube under uniform external
       pressure; section from memory).
    """
    E = check_range("elastic modulus", E, "Pa", 1e8, 5e11)
    nu = check_range("Poisson's ratio", nu, "-", 0.0, 0.5, high_inclusive=False)
    t = check_range("pipe wall thickness", t, "m", low=0.0)
    D = check_range("mean diameter", D, "m", low=t)
    return 2.0 * E / (1.0 - nu * nu) * (t / D) ** 3


def vacuum_findings(subject: str, pipe, station_pressures, material=None, p_atm: float = P_ATM,
                    safety_factor: float = VACUUM_SAFETY_FACTOR,
                    E: float | None = None) -> list[Finding]:
    """External-pressure (vacuum) screen of a pipe where any station is below atmospheric.

    The net external pressure ``p_atm - p_min`` is compared with the buckling pressure of a
    long tube (:func:`buckling_pressure`, Timoshenko & Gere 1961) divided by the safety
    factor. Plastic and composite walls creep: with their short-term modulus (the table's)
    a passing screen is reported as CHECK; give ``E`` (long-term modulus) to settle it.

    Parameters
    ----------
    subject : str
        What the finding is about [-]
    pipe : Pipe
        The pipe, with outside diameter and wall [-]
    station_pressures : sequence of (str, float)
        (station name, absolute pressure [Pa]) along the pipe [Pa]
    material : str or ElasticMaterial, optional
        Default: :func:`material_for_pipe` [-]
    p_atm : float
        Atmospheric pressure outside the pipe [Pa]
    safety_factor : float
        Divisor on the buckling pressure, >= 1 [-]
    E : float, optional
        Modulus for a sustained load replacing the material's [Pa]

    Returns
    -------
    findings : list of Finding
        One finding on the lowest station [-]

    Examples
    --------
    >>> from kit.core.pipes import catalogue_pipe
    >>> p = catalogue_pipe("asme_b36_10m", "8", "40", "carbon_steel")
    >>> vacuum_findings("S1", p, [("crest", 30e3)])[0].severity.value
    'pass'
    """
    Do, wall = _pipe_dims(pipe)
    mat = material_for_pipe(pipe) if material is None else elastic_material(material)
    sf = check_range("vacuum safety factor", safety_factor, "-", low=1.0, low_inclusive=True)
    p_atm = check_range("atmospheric pressure", p_atm, "Pa", low=0.0)
    rows = list(station_pressures)
    if not rows:
        raise InputError("station pressures", 0, "must list at least one (name, pressure) pair")
    for name, p in rows:
        check_range(f"pressure at '{name}'", p, "Pa", low=0.0, low_inclusive=True)
    name, p_min = min(rows, key=lambda r: r[1])
    E_used = mat.E if E is None else check_range("elastic modulus", E, "Pa", 1e8, 5e11)
    pc = buckling_pressure(E_used, mat.nu, wall, Do - wall)
    allow = pc / sf
    net = p_atm - p_min
    src = ("Timoshenko & Gere (1961), Theory of Elastic Stability, long-tube buckling; "
           f"safety factor {sf:g} (common practice); modulus: "
           f"{mat.source if E is None else 'user value'}")
    limit = f"<= {allow:.4g} Pa net external (buckling {pc:.4g} Pa / {sf:g})"
    if net <= 0.0:
        return [Finding(Severity.PASS, subject, "net external pressure", net, "Pa", limit,
                        f"lowest station '{name}' is at or above atmospheric: no vacuum",
                        src, high=allow)]
    if net > allow:
        sev, rule = Severity.FAIL, (
            f"vacuum at '{name}' exceeds the buckling screen: stiffen, thicken or vent the "
            "pipe, and have the collapse checked by a qualified engineer")
    elif mat.creeps and E is None:
        sev, rule = Severity.CHECK, (
            f"vacuum at '{name}' within the screen on the short-term modulus; a plastic wall "
            "creeps under sustained vacuum: check with the long-term modulus")
    else:
        sev, rule = Severity.PASS, f"vacuum at '{name}' within the buckling screen"
    return [Finding(sev, subject, "net external pressure", net, "Pa", limit, rule, src,
                    high=allow)]


# --------------------------------------------------------------------------- findings

def _rating_finding(subject, what, pressures: PressureCases, p_rated, p_atm, rule, source):
    p = pressures.gauge(p_atm)
    use = p / p_rated if p_rated > 0 else math.inf
    margin = p_rated - p
    text = (f"highest pressure ({pressures.governing}) against the {what} rating; "
            f"margin {margin / 1e5:.3g} bar")
    if use > 1.0:
        sev = Severity.FAIL
    elif use > 1.0 - RATING_MARGIN_CHECK:
        sev = Severity.CHECK
        text += f" (within {RATING_MARGIN_CHECK:.0%} of the rating: common practice, no source)"
    else:
        sev = Severity.PASS
    return Finding(sev, subject, f"{what} pressure (gauge)", p, "Pa",
                   f"<= {p_rated:.6g} Pa gauge ({rule})", text, source, high=p_rated)


def rating_findings(subject: str, pressures: PressureCases, rating,
                    p_atm: float = P_ATM) -> list[Finding]:
    """Findings of a pipe rating against the highest pressure at its stations.

    The highest pressure (gauge) against the rating's maximum allowable pressure, with the
    governing case named: FAIL above it, CHECK within 10 % of it (common practice, no
    source); for metal pipe a CHECK where B31.3 §304.1.2(b) asks for special consideration.
    No occasional-variation allowance (B31.3 §302.2.4) is taken for surge.

    Parameters
    ----------
    subject : str
        What the findings are about ("segment S1") [-]
    pressures : PressureCases
        From :func:`highest_pressure` [Pa]
    rating : MetalRating or PlasticRating
        From :func:`metal_pipe_rating`, :func:`plastic_pipe_rating` or :func:`pipe_rating` [-]
    p_atm : float
        Atmospheric pressure [Pa]

    Returns
    -------
    findings : list of Finding
        The rating finding, and any special-consideration finding [-]

    Examples
    --------
    >>> c = highest_pressure(998.2, 60.0, 1.5e5, 2.0)
    >>> r = metal_pipe_rating(c.gauge(), 0.1143, 0.00602, 313.15)
    >>> rating_findings("S1", c, r)[0].severity.value
    'pass'
    """
    out = [_rating_finding(subject, "pipe", pressures, rating.P_allow, p_atm,
                           f"{rating.method}; {rating.basis}", rating.source)]
    special = getattr(rating, "special", "")
    if special:
        out.append(Finding(
            Severity.CHECK, subject, "B31.3 wall formula validity", rating.t_pressure / rating.D,
            "-", "t < D/6 and P/(S E) <= 0.385",
            f"{special}: ASME B31.3 §304.1.2(b) requires special consideration (theory of "
            "failure, fatigue, thermal stress)", f"{_B313} §304.1.2(b)"))
    return out

