"""Site conditions: barometric pressure from elevation.

Example
-------
>>> round(barometric_pressure(0.0))
101325
>>> round(barometric_pressure(1500.0))
84556
"""

from __future__ import annotations

from kit.errors import check_range

__all__ = ["barometric_pressure", "ATMOSPHERE_SOURCE"]

ATMOSPHERE_SOURCE = "U.S. Standard Atmosphere 1976 (NOAA/NASA/USAF), via fluids.atmosphere"


def barometric_pressure(elevation: float) -> float:
    """Standard barometric pressure at a site elevation, by the US Standard Atmosphere 1976.

    Parameters
    ----------
    elevation : float
        Site elevation above mean sea level, −500 to 6000 m [m]

    Returns
    -------
    P : float
        Barometric pressure [Pa]

    Notes
    -----
    A standard day; actual barometric pressure varies with weather by a few percent.

    References
    ----------
    U.S. Standard Atmosphere, 1976. NOAA-S/T 76-1562, Washington DC.
    """
    from fluids.atmosphere import ATMOSPHERE_1976

    z = check_range("site elevation", elevation, "m", low=-500.0, high=6000.0, low_inclusive=True)
    return float(ATMOSPHERE_1976(z).P)
