"""Barometric pressure and altitude: the ICAO standard atmosphere (troposphere).

==============================  =================================================================
``pressure_at_altitude_isa``    PB [mmHg] at a geopotential altitude [m], ICAO/ISA troposphere
``altitude_at_pressure_isa``    the inverse: geopotential altitude [m] for a PB [mmHg]
==============================  =================================================================

Altitude here is **geopotential** altitude above mean sea level, as in the ICAO tables; below
5 km it differs from geometric altitude by under 0.1 %. Aircraft cabin "altitude" is a pressure
altitude, which this model converts exactly.
"""

from __future__ import annotations

from .errors import require_number
from .units import MMHG_PA

#: sea-level standard pressure [Pa] (ICAO Doc 7488; US Standard Atmosphere 1976)
P0_PA = 101_325.0
#: sea-level standard temperature [K]
T0_K = 288.15
#: tropospheric temperature lapse rate [K/m]
LAPSE_K_PER_M = 0.0065
#: standard gravity [m/s2]
G0 = 9.80665
#: specific gas constant of dry air [J/(kg K)] = R* / M = 8.31432 / 0.0289644
R_AIR = 287.05287
#: exponent g0 / (R_air L) = 5.255877
ISA_EXPONENT = G0 / (R_AIR * LAPSE_K_PER_M)
#: top of the ISA troposphere [m, geopotential]
TROPOPAUSE_M = 11_000.0
#: lowest altitude accepted [m] (Dead Sea shore is about -430 m)
LOWEST_M = -500.0


def pressure_at_altitude_isa(*, altitude_m: float) -> float:
    """Barometric pressure at a geopotential altitude in the ICAO standard atmosphere.

    PB = 101325 Pa x (1 - 0.0065 h / 288.15) ^ 5.255877, returned in mmHg.

    Parameters
    ----------
    altitude_m : float
        Geopotential altitude above mean sea level. [m] Accepted -500 to 11 000.

    Returns
    -------
    float
        Barometric pressure. [mmHg]

    References
    ----------
    icao7488, ussa1976 (troposphere equation and constants).

    Examples
    --------
    >>> round(pressure_at_altitude_isa(altitude_m=0.0), 2)
    760.0
    >>> round(pressure_at_altitude_isa(altitude_m=2438.4), 2)
    564.51
    """
    h = require_number("altitude_m", altitude_m, low=LOWEST_M, high=TROPOPAUSE_M, unit="m")
    pa = P0_PA * (1.0 - LAPSE_K_PER_M * h / T0_K) ** ISA_EXPONENT
    return pa / MMHG_PA


def altitude_at_pressure_isa(*, pb_mmhg: float) -> float:
    """Geopotential altitude [m] at which the ICAO standard atmosphere has pressure ``pb_mmhg``.

    h = (288.15 / 0.0065) x (1 - (P / 101325) ^ (1 / 5.255877)).

    Examples
    --------
    >>> round(altitude_at_pressure_isa(pb_mmhg=564.5078), 0)
    2438.0
    """
    low = pressure_at_altitude_isa(altitude_m=TROPOPAUSE_M)
    high = pressure_at_altitude_isa(altitude_m=LOWEST_M)
    pb = require_number("pb_mmhg", pb_mmhg, low=low, high=high, unit="mmHg")
    ratio = pb * MMHG_PA / P0_PA
    return (T0_K / LAPSE_K_PER_M) * (1.0 - ratio ** (1.0 / ISA_EXPONENT))
