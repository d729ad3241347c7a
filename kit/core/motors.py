"""Motor size selection from pump shaft power, and full-load motor efficiency.

Two rated-output series:

- ``"NEMA"``: horsepower ratings 0.25–500 hp via :func:`fluids.motor_round_size` (watts in,
  watts out; Natural Resources Canada's table of NEMA sizes).
- ``"IEC"``: IEC 60072-1 rated outputs 0.06–400 kW (:data:`IEC_RATED_OUTPUTS_KW`, from memory).

A service margin is applied to the shaft power before rounding up (:data:`SERVICE_MARGINS`).
The default ``"tiered"`` margin — 25 % up to 22 kW, 15 % from 22 to 55 kW, 10 % above — is the
rule recalled from API 610 (from memory; common practice elsewhere). Size the motor for the
largest power on the curve the pump can reach (run-out), not only the duty point.

Example
-------
>>> sel = select_motor(9000.0, series="IEC")
>>> sel.rating / 1000
15.0
"""

from __future__ import annotations

from dataclasses import dataclass

import fluids

from kit.errors import InputError, OutOfRangeError, UnknownChoiceError, check_choice, check_range

__all__ = [
    "IEC_RATED_OUTPUTS_KW", "NEMA_SIZES_W", "MOTOR_SERIES", "SERVICE_MARGINS", "MotorSelection",
    "service_factor", "select_motor", "motor_efficiency", "MOTOR_EFFICIENCY_VALID",
]

#: IEC 60072-1 rated outputs [kW] (from memory).
IEC_RATED_OUTPUTS_KW: tuple[float, ...] = (
    0.06, 0.09, 0.12, 0.18, 0.25, 0.37, 0.55, 0.75, 1.1, 1.5, 2.2, 3, 4, 5.5, 7.5, 11, 15, 18.5,
    22, 30, 37, 45, 55, 75, 90, 110, 132, 160, 200, 250, 315, 355, 400)

#: NEMA ratings as used by fluids [W] (0.25–500 hp).
NEMA_SIZES_W: tuple[float, ...] = tuple(float(x) for x in fluids.pump.nema_sizes)

MOTOR_SERIES: dict[str, dict] = {
    "IEC": {"label": "IEC 60072-1 rated outputs (kW)", "max_W": IEC_RATED_OUTPUTS_KW[-1] * 1e3,
            "source": "IEC 60072-1 rated outputs, from memory"},
    "NEMA": {"label": "NEMA ratings (hp), via fluids.motor_round_size", "max_W": NEMA_SIZES_W[-1],
             "source": "Natural Resources Canada, Electric Motors (1 to 500 HP), via fluids"},
}

#: Service margins on shaft power: either a flat factor or tiers of (upper power [W], factor).
SERVICE_MARGINS: dict[str, dict] = {
    "tiered": {"tiers": ((22e3, 1.25), (55e3, 1.15), (float("inf"), 1.10)),
               "source": "API 610 driver-rating rule, from memory (common practice)"},
    "flat_10": {"tiers": ((float("inf"), 1.10),), "source": "common practice, no source"},
    "flat_15": {"tiers": ((float("inf"), 1.15),), "source": "common practice, no source"},
    "none": {"tiers": ((float("inf"), 1.0),), "source": "no margin (user's choice)"},
}


@dataclass(frozen=True)
class MotorSelection:
    """A chosen motor rating and how it was found (powers in W)."""

    shaft_power: float
    margin_factor: float
    required: float
    rating: float
    series: str
    margin: str
    source: str


def service_factor(shaft_power: float, margin: str = "tiered") -> float:
    """Service-margin factor for a shaft power [W] under a named margin rule [-].

    >>> service_factor(30e3)
    1.15
    """
    check_choice("service margin", margin, SERVICE_MARGINS)
    P = check_range("shaft power", shaft_power, "W", low=0.0)
    for upper, factor in SERVICE_MARGINS[margin]["tiers"]:
        if P <= upper:
            return factor
    raise AssertionError("unreachable: last tier is unbounded")


def select_motor(shaft_power: float, series: str = "IEC", margin: str = "tiered") -> MotorSelection:
    """Smallest standard motor rating ≥ shaft power × service margin.

    Parameters
    ----------
    shaft_power : float
        Largest pump shaft power the motor must carry [W]
    series : str
        ``"IEC"`` (IEC 60072-1 kW ratings, from memory) or ``"NEMA"`` (via
        :func:`fluids.motor_round_size`) [-]
    margin : str
        Key of :data:`SERVICE_MARGINS` [-]

    Returns
    -------
    MotorSelection
        Rating [W] with the margin applied and its source.

    Notes
    -----
    Beyond the largest rating of the series, :class:`OutOfRangeError` (larger motors exist
    but are built to order).

    Examples
    --------
    >>> round(select_motor(5000.0, series="NEMA").rating)
    7457
    """
    check_choice("motor series", series, MOTOR_SERIES)
    f = service_factor(shaft_power, margin)
    P = float(shaft_power)
    need = P * f
    top = MOTOR_SERIES[series]["max_W"]
    if need > top:
        raise OutOfRangeError(f"motor power needed (shaft power × {f:g} margin, {series} series)",
                              need, "W", high=top)
    if series == "IEC":
        rating = next(kw * 1e3 for kw in IEC_RATED_OUTPUTS_KW if kw * 1e3 >= need * (1 - 1e-12))
    else:
        rating = float(fluids.motor_round_size(need))
    return MotorSelection(P, f, need, rating, series, margin,
                          f"{MOTOR_SERIES[series]['source']}; margin: {SERVICE_MARGINS[margin]['source']}")


#: Validity of the CSA/NEMA full-load efficiency tables in fluids, as data.
MOTOR_EFFICIENCY_VALID = {
    "P_W": (fluids.pump.nema_min_P[0] * fluids.constants.hp,
            fluids.pump.nema_min_P[-1] * fluids.constants.hp),
    "P_W_high_efficiency": (fluids.pump.nema_high_P[0] * fluids.constants.hp,
                            fluids.pump.nema_high_P[-1] * fluids.constants.hp),
    "poles": (2, 4, 6, 8),
    "poles_high_efficiency": (2, 4, 6),
}


def motor_efficiency(rating: float, poles: int = 4, closed: bool = True,
                     high_efficiency: bool = False) -> float:
    """Full-load efficiency of a NEMA induction motor from the CSA tables (via fluids).

    Applies :func:`fluids.CSA_motor_efficiency` (Natural Resources Canada, Electric Motors
    1 to 500 HP, 2015), guarding its gaps.

    Parameters
    ----------
    rating : float
        Motor rated output [W]
    poles : int
        2, 4, 6 or 8; the high-efficiency table has 2, 4 and 6 only [-]
    closed : bool
        Enclosed (TEFC) rather than open (ODP) [-]
    high_efficiency : bool
        Use the high-efficiency table [-]

    Returns
    -------
    efficiency : float
        Full-load efficiency [-]

    Notes
    -----
    fluids raises ``UnboundLocalError`` for ``poles=8, high_efficiency=True`` (and any other
    pole count) and clamps powers outside its table silently; both are refused here with a
    named error. Valid ranges: :data:`MOTOR_EFFICIENCY_VALID`. Part-load efficiency is lower.

    Examples
    --------
    >>> motor_efficiency(7457.0, poles=4, closed=True)
    0.895
    """
    if high_efficiency:
        if poles not in MOTOR_EFFICIENCY_VALID["poles_high_efficiency"]:
            raise UnknownChoiceError("motor poles (high-efficiency table)", poles,
                                     MOTOR_EFFICIENCY_VALID["poles_high_efficiency"])
        lo, hi = MOTOR_EFFICIENCY_VALID["P_W_high_efficiency"]
    else:
        check_choice("motor poles", poles, MOTOR_EFFICIENCY_VALID["poles"])
        lo, hi = MOTOR_EFFICIENCY_VALID["P_W"]
    P = check_range("motor rating", rating, "W", low=lo * (1 - 1e-9), high=hi * (1 + 1e-9),
                    low_inclusive=True)
    if not isinstance(closed, bool):
        raise InputError("motor enclosure 'closed'", closed, "must be True or False")
    return float(fluids.CSA_motor_efficiency(P, closed=closed, poles=int(poles),
                                             high_efficiency=bool(high_efficiency)))
