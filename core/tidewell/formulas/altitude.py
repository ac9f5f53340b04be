"""Barometric pressure and altitude (ICAO standard atmosphere) and the physiology of flight.

=======================================  ===========================================================
``pressure_at_altitude_isa``             PB [mmHg] at a geopotential altitude [m], ICAO/ISA troposphere
``altitude_at_pressure_isa``             the inverse: geopotential altitude [m] for a PB [mmHg]
``inspired_po2_at_altitude``             PIO2 = FiO2 x (PB(h) - 47) [mmHg]
``alveolar_po2_at_altitude``             PAO2 at PB(h), simple or full alveolar gas equation [mmHg]
``fio2_at_altitude_water_corrected``     FiO2 keeping PIO2: FiO2 x (PB0 - 47) / (PB1 - 47)
``fio2_at_altitude_pb_ratio``            the simple PB ratio: FiO2 x PB0 / PB1 (comparison)
``sea_level_fio2_equivalent``            sea-level FiO2 with the PIO2 of a gas at PB (hypoxic challenge)
``sea_level_fio2_equivalent_dry``        the same on dry partial pressures: FiO2 x PB / 760
``altitude_of_sea_level_fio2``           ISA altitude whose air PIO2 equals a sea-level FiO2's
``pao2_at_altitude_gilbert1974``         predicted PaO2 by a constant a/A ratio [mmHg]
``fio2_for_alveolar_po2``                FiO2 giving a wanted PAO2 at a PB (exact, both equations)
``max_altitude_for_target_pao2``         highest ISA altitude at which a target PaO2 still holds (solved)
``trapped_gas_volume_dry``               Boyle's law, dry gas: V1 x P1 / P2 [mL]
``trapped_gas_volume_saturated_37c``     Boyle's law, gas saturated at 37 degC: V1 x (P1 - 47) / (P2 - 47)
=======================================  ===========================================================

Altitude here is **geopotential** altitude above mean sea level, as in the ICAO tables; below
5 km it differs from geometric altitude by under 0.1 %. Aircraft cabin "altitude" is a pressure
altitude, which this model converts exactly. The model covers the ISA troposphere, -500 m to
11,000 m (36,089 ft); above it the temperature no longer falls and this equation does not apply.

Assumptions of the flight physiology (stated in every step that uses them):

- PaCO2 and the respiratory quotient R stay as measured at the origin (no hypoxic hyperventilation),
  which makes the predicted alveolar and arterial PO2 at altitude pessimistic on air.
- Constant a/A ratio (Gilbert & Keighley 1974, from memory): the arterial-to-alveolar PO2 ratio
  measured at the origin holds at altitude. It is a planning estimate: diffusion limitation and
  shunt behave differently when PAO2 falls, so the real PaO2 can be lower.
- Water vapour 47 mmHg (37 degC, by convention), the value the alveolar gas equation uses.

The alveolar gas equation is always that of :mod:`tidewell.formulas.oxygenation` (``inspired_po2``,
``alveolar_po2_simple``, ``alveolar_po2_full``); functions that need one take it as the ``alveolar``
argument (default: the simple form), so the same equation is used at the origin and at altitude.
"""

from __future__ import annotations

from collections.abc import Callable
from typing import NamedTuple

from ..errors import InputError, require_number
from ..units import FT_M, MMHG_PA
from .oxygenation import PH2O_37_MMHG, alveolar_po2_simple, inspired_po2

#: sea-level standard pressure [Pa] (ICAO Doc 7488; US Standard Atmosphere 1976)
P0_PA = 101_325.0
#: sea-level standard temperature [K]
T0_K = 288.15
#: tropospheric temperature lapse rate [K/m]
LAPSE_K_PER_M = 0.0065
#: standard gravity [m/s2]
G0 = 9.80665
#: specific gas constant of dry air [J/(kg K)], close to R* / M = 8.31432 / 0.0289644 = 287.0531 (kept as
#: first written: the 7e-7 relative difference changes PB by about 1e-4 mmHg at 8,000 ft)
R_AIR = 287.05287
#: exponent g0 / (R_air L) = 5.255880 (5.255876 with the 1976 R*; ussa1976 lineage, 5.255877 also quoted)
ISA_EXPONENT = G0 / (R_AIR * LAPSE_K_PER_M)
#: top of the ISA troposphere [m, geopotential]
TROPOPAUSE_M = 11_000.0
#: lowest altitude accepted [m] (Dead Sea shore is about -430 m)
LOWEST_M = -500.0
#: sea-level standard pressure [mmHg] (760.000 to 3 decimals)
P0_MMHG = P0_PA / MMHG_PA
#: O2 fraction of dry air (US Standard Atmosphere 1976: 20.946 %, from memory), rounded as usual
AIR_O2_FRACTION = 0.2095
#: 8,000 ft in metres: the usual upper limit of a pressurised cabin (AsMA 2008)
CABIN_LIMIT_M = 8000.0 * FT_M
#: FiO2 of the hypoxic challenge test at sea level (Bradi 2009; BTS 2011)
HYPOXIC_CHALLENGE_FIO2 = 0.15

#: PB range of the formula functions [mmHg] (the ISA model spans 169.75-806.15 mmHg)
_PB_LOW, _PB_HIGH = 150.0, 1100.0

Alveolar = Callable[..., float]


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

    h = (288.15 / 0.0065) x (1 - (P / 101325) ^ (1 / 5.255877)): the ISA *pressure altitude*.

    Parameters
    ----------
    pb_mmhg : float
        Barometric pressure. [mmHg] Accepted 169.75-806.15 (the ISA pressures at 11 000 m and -500 m).

    Returns
    -------
    float
        Geopotential altitude. [m]

    References
    ----------
    icao7488, ussa1976.

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


# --------------------------------------------------------------------------------------------------
# inspired and alveolar PO2 at altitude


def inspired_po2_at_altitude(*, fio2_fraction: float, altitude_m: float) -> float:
    """Inspired PO2 (humidified, 37 degC) at an ISA altitude: PIO2 = FiO2 x (PB(h) - 47).

    Parameters
    ----------
    fio2_fraction : float
        Inspired O2 fraction. [1] Accepted 0.05-1.0.
    altitude_m : float
        Geopotential (pressure) altitude. [m] Accepted -500 to 11 000.

    Returns
    -------
    float
        PIO2. [mmHg]

    References
    ----------
    icao7488, alveolar_gas_1946.

    Examples
    --------
    >>> round(inspired_po2_at_altitude(fio2_fraction=0.21, altitude_m=2438.4), 2)
    108.68
    """
    pb = pressure_at_altitude_isa(altitude_m=altitude_m)
    return inspired_po2(fio2_fraction=fio2_fraction, pb_mmhg=pb)


def alveolar_po2_at_altitude(
    *,
    fio2_fraction: float,
    paco2_mmhg: float,
    altitude_m: float,
    rq: float = 0.8,
    alveolar: Alveolar = alveolar_po2_simple,
) -> float:
    """Alveolar PO2 at an ISA altitude, PaCO2 and R unchanged.

    PAO2 = FiO2 x (PB(h) - 47) - PaCO2 / R (simple form, the default), or with
    ``alveolar=alveolar_po2_full``: PIO2 - PaCO2 x (FiO2 + (1 - FiO2) / R).

    Parameters
    ----------
    fio2_fraction : float
        Inspired O2 fraction. [1] Accepted 0.05-1.0.
    paco2_mmhg : float
        Arterial PCO2, assumed unchanged at altitude. [mmHg] Accepted 1-300.
    altitude_m : float
        Geopotential (pressure) altitude. [m] Accepted -500 to 11 000.
    rq : float
        Respiratory quotient. [1] Accepted 0.5-1.5.
    alveolar : callable
        ``tidewell.formulas.oxygenation.alveolar_po2_simple`` (default) or ``alveolar_po2_full``.

    Returns
    -------
    float
        PAO2. [mmHg] Can be zero or negative where the equation leaves no alveolar oxygen.

    References
    ----------
    icao7488, alveolar_gas_1946.

    Examples
    --------
    >>> round(alveolar_po2_at_altitude(fio2_fraction=0.21, paco2_mmhg=40.0, altitude_m=2438.4), 2)
    58.68
    >>> from tidewell.formulas.oxygenation import alveolar_po2_full
    >>> round(alveolar_po2_at_altitude(fio2_fraction=0.21, paco2_mmhg=40.0, altitude_m=2438.4,
    ...                                alveolar=alveolar_po2_full), 2)
    60.78
    """
    pb = pressure_at_altitude_isa(altitude_m=altitude_m)
    return alveolar(fio2_fraction=fio2_fraction, paco2_mmhg=paco2_mmhg, pb_mmhg=pb, rq=rq)


# --------------------------------------------------------------------------------------------------
# FiO2 at altitude and the hypoxic-challenge equivalence


def _pb(field: str, value: float) -> float:
    return require_number(field, value, low=_PB_LOW, high=_PB_HIGH, unit="mmHg")


def _fio2(field: str, value: float, low: float = 0.05) -> float:
    return require_number(field, value, low=low, high=1.0)


def fio2_at_altitude_water_corrected(
    *, fio2_fraction: float, pb_origin_mmhg: float, pb_destination_mmhg: float
) -> float:
    """FiO2 that keeps the origin's inspired PO2 (hence, at the same PaCO2 and R, its alveolar PO2).

    FiO2_dest = FiO2_origin x (PB_origin - 47) / (PB_dest - 47).

    Parameters
    ----------
    fio2_fraction : float
        FiO2 at the origin. [1] Accepted 0.05-1.0.
    pb_origin_mmhg, pb_destination_mmhg : float
        Barometric pressure at the origin and at the destination (cabin). [mmHg] Accepted 150-1100.

    Returns
    -------
    float
        FiO2 needed at the destination. [1] Above 1.0 when no inspired fraction can keep the
        origin's PIO2 (the caller must say so); below 0.21 on descent.

    Notes
    -----
    Equal PIO2 keeps the simple-equation PAO2 exactly; with the full equation the PAO2 it gives is
    a little higher (about 1 mmHg at FiO2 0.48), i.e. on the safe side.

    References
    ----------
    alveolar_gas_1946 (PIO2); the water-vapour-corrected ratio is common practice (fio2_altitude_rules:
    the recommended default).

    Examples
    --------
    >>> round(fio2_at_altitude_water_corrected(fio2_fraction=0.35, pb_origin_mmhg=760.0,
    ...                                        pb_destination_mmhg=564.51), 4)
    0.4822
    """
    fio2 = _fio2("fio2_fraction", fio2_fraction)
    pb0 = _pb("pb_origin_mmhg", pb_origin_mmhg)
    pb1 = _pb("pb_destination_mmhg", pb_destination_mmhg)
    return fio2 * (pb0 - PH2O_37_MMHG) / (pb1 - PH2O_37_MMHG)


def fio2_at_altitude_pb_ratio(
    *, fio2_fraction: float, pb_origin_mmhg: float, pb_destination_mmhg: float
) -> float:
    """FiO2 at the destination by the simple barometric-pressure ratio (shown for comparison).

    FiO2_dest = FiO2_origin x PB_origin / PB_dest. It keeps the *dry* inspired PO2 and so
    under-doses slightly (0.471 instead of 0.482 for FiO2 0.35 at 8,000 ft).

    Parameters
    ----------
    fio2_fraction : float
        FiO2 at the origin. [1] Accepted 0.05-1.0.
    pb_origin_mmhg, pb_destination_mmhg : float
        Barometric pressures. [mmHg] Accepted 150-1100.

    Returns
    -------
    float
        FiO2 at the destination. [1]

    References
    ----------
    fio2_altitude_rules (common practice).

    Examples
    --------
    >>> round(fio2_at_altitude_pb_ratio(fio2_fraction=0.35, pb_origin_mmhg=760.0,
    ...                                 pb_destination_mmhg=564.51), 4)
    0.4712
    """
    fio2 = _fio2("fio2_fraction", fio2_fraction)
    pb0 = _pb("pb_origin_mmhg", pb_origin_mmhg)
    pb1 = _pb("pb_destination_mmhg", pb_destination_mmhg)
    return fio2 * pb0 / pb1


def sea_level_fio2_equivalent(*, pb_mmhg: float, fio2_fraction: float = AIR_O2_FRACTION) -> float:
    """The sea-level FiO2 whose inspired PO2 equals that of ``fio2_fraction`` breathed at ``pb_mmhg``.

    FiO2_sea-level = FiO2 x (PB - 47) / (760 - 47) (humidified, 37 degC). For air at a cabin
    altitude of 8,000 ft this is 0.152, which is why the hypoxic challenge test uses FiO2 0.15.

    Parameters
    ----------
    pb_mmhg : float
        Barometric pressure where the gas is breathed. [mmHg] Accepted 150-1100.
    fio2_fraction : float
        FiO2 breathed there. [1] Default 0.2095 (air). Accepted 0.05-1.0.

    Returns
    -------
    float
        Equivalent sea-level FiO2. [1]

    References
    ----------
    aviation_o2_equivalence (8,000 ft ~ 15.1 % O2 at sea level), bradi2009, bts2011_air.

    Examples
    --------
    >>> round(sea_level_fio2_equivalent(pb_mmhg=564.51), 4)
    0.1521
    """
    pb = _pb("pb_mmhg", pb_mmhg)
    fio2 = _fio2("fio2_fraction", fio2_fraction)
    return fio2 * (pb - PH2O_37_MMHG) / (P0_MMHG - PH2O_37_MMHG)


def sea_level_fio2_equivalent_dry(*, pb_mmhg: float, fio2_fraction: float = AIR_O2_FRACTION) -> float:
    """Sea-level FiO2 equivalent on dry partial pressures: FiO2 x PB / 760 (comparison).

    Examples
    --------
    >>> round(sea_level_fio2_equivalent_dry(pb_mmhg=564.51), 4)
    0.1556
    """
    pb = _pb("pb_mmhg", pb_mmhg)
    fio2 = _fio2("fio2_fraction", fio2_fraction)
    return fio2 * pb / P0_MMHG


def altitude_of_sea_level_fio2(*, fio2_sea_level: float, fio2_fraction: float = AIR_O2_FRACTION) -> float:
    """ISA altitude [m] where breathing ``fio2_fraction`` gives the PIO2 of ``fio2_sea_level`` at sea level.

    PB = 47 + FiO2_sea-level x (760 - 47) / FiO2, then the ISA pressure altitude of PB.

    Parameters
    ----------
    fio2_sea_level : float
        The sea-level FiO2 (e.g. 0.15, the hypoxic challenge). [1] Accepted 0.05 to ``fio2_fraction``.
    fio2_fraction : float
        FiO2 breathed at altitude. [1] Default 0.2095 (air).

    Returns
    -------
    float
        Geopotential altitude. [m]

    References
    ----------
    icao7488, bradi2009.

    Examples
    --------
    >>> round(altitude_of_sea_level_fio2(fio2_sea_level=0.15) / 0.3048)
    8327
    """
    fio2 = _fio2("fio2_fraction", fio2_fraction)
    fsl = require_number("fio2_sea_level", fio2_sea_level, low=0.05, high=fio2)
    pb = PH2O_37_MMHG + fsl * (P0_MMHG - PH2O_37_MMHG) / fio2
    return altitude_at_pressure_isa(pb_mmhg=pb)


# --------------------------------------------------------------------------------------------------
# predicted arterial PO2, FiO2 for a target, highest cabin altitude


def pao2_at_altitude_gilbert1974(
    *, pao2_origin_mmhg: float, pao2_alveolar_origin_mmhg: float, pao2_alveolar_destination_mmhg: float
) -> float:
    """Predicted PaO2 at altitude, assuming the origin's a/A ratio holds (Gilbert & Keighley 1974).

    PaO2_dest = (PaO2_origin / PAO2_origin) x PAO2_dest; a PAO2_dest at or below 0 gives 0.

    Parameters
    ----------
    pao2_origin_mmhg : float
        Measured arterial PO2 at the origin. [mmHg] Accepted 1-800, not above ``pao2_alveolar_origin_mmhg``.
    pao2_alveolar_origin_mmhg : float
        Alveolar PO2 at the origin. [mmHg] Must be above 0.
    pao2_alveolar_destination_mmhg : float
        Alveolar PO2 at the destination. [mmHg]

    Returns
    -------
    float
        Predicted PaO2 at the destination. [mmHg]

    Raises
    ------
    InputError
        ``inconsistent`` when the arterial PO2 exceeds the alveolar PO2 (a/A above 1 is impossible:
        the FiO2, PCO2 or origin pressure does not match the sample).

    Notes
    -----
    PaCO2 and R are taken as unchanged; the a/A ratio is an index measured over FiO2 changes at
    one pressure (Gilbert & Keighley, from memory), so this is a planning estimate.

    References
    ----------
    gilbert1974.

    Examples
    --------
    >>> round(pao2_at_altitude_gilbert1974(pao2_origin_mmhg=70.0, pao2_alveolar_origin_mmhg=99.73,
    ...                                    pao2_alveolar_destination_mmhg=58.68), 2)
    41.19
    """
    pao2 = require_number("pao2_origin_mmhg", pao2_origin_mmhg, low=1.0, high=800.0, unit="mmHg")
    alv0 = require_number(
        "pao2_alveolar_origin_mmhg", pao2_alveolar_origin_mmhg, low=1e-9, high=1100.0, unit="mmHg"
    )
    alv1 = require_number(
        "pao2_alveolar_destination_mmhg",
        pao2_alveolar_destination_mmhg,
        low=-1100.0,
        high=1100.0,
        unit="mmHg",
    )
    if pao2 > alv0:
        raise InputError(
            "pao2_origin_mmhg",
            pao2,
            f"is higher than the alveolar PO2 at the origin ({alv0:.1f} mmHg): an a/A ratio above 1 "
            "is impossible",
            "Check the FiO2, the PCO2 and the origin's altitude or pressure for this sample.",
            code="inconsistent",
        )
    return (pao2 / alv0) * max(alv1, 0.0)


def fio2_for_alveolar_po2(
    *,
    pao2_alveolar_mmhg: float,
    pb_mmhg: float,
    paco2_mmhg: float,
    rq: float = 0.8,
    alveolar: Alveolar = alveolar_po2_simple,
) -> float:
    """FiO2 that gives a wanted alveolar PO2 at a barometric pressure (PaCO2 and R fixed).

    Both forms of the alveolar gas equation are linear in FiO2, so the equation itself, evaluated
    at FiO2 0.5 and 1.0, gives the exact answer:
    FiO2 = 0.5 + 0.5 x (PAO2_wanted - PAO2(0.5)) / (PAO2(1.0) - PAO2(0.5)).
    For the simple form this is (PAO2 + PaCO2 / R) / (PB - 47) (fio2_altitude_rules).

    Parameters
    ----------
    pao2_alveolar_mmhg : float
        Wanted alveolar PO2. [mmHg] Accepted 0-100 000 (an unreachable want gives an FiO2 above 1).
    pb_mmhg : float
        Barometric pressure. [mmHg] Accepted 150-1100.
    paco2_mmhg : float
        Arterial PCO2. [mmHg] Accepted 1-300.
    rq : float
        Respiratory quotient. [1] Accepted 0.5-1.5.
    alveolar : callable
        The alveolar gas equation (default simple form).

    Returns
    -------
    float
        FiO2. [1] Above 1.0 when no FiO2 reaches the wanted PAO2 at this pressure.

    References
    ----------
    alveolar_gas_1946.

    Examples
    --------
    >>> round(fio2_for_alveolar_po2(pao2_alveolar_mmhg=99.73, pb_mmhg=564.51, paco2_mmhg=40.0), 4)
    0.2893
    """
    want = require_number("pao2_alveolar_mmhg", pao2_alveolar_mmhg, low=0.0, high=1e5, unit="mmHg")
    pb = _pb("pb_mmhg", pb_mmhg)
    p_half = alveolar(fio2_fraction=0.5, paco2_mmhg=paco2_mmhg, pb_mmhg=pb, rq=rq)
    p_one = alveolar(fio2_fraction=1.0, paco2_mmhg=paco2_mmhg, pb_mmhg=pb, rq=rq)
    slope = (p_one - p_half) / 0.5
    if slope <= 0.0:
        raise InputError(
            "pb_mmhg", pb, "leaves no room for oxygen in the alveolar gas equation at this PCO2 and R"
        )
    return 0.5 + (want - p_half) / slope


class MaxAltitude(NamedTuple):
    """Result of :func:`max_altitude_for_target_pao2`.

    ``status`` is ``"solved"`` (``altitude_m`` is where the predicted PaO2 equals the target),
    ``"holds_at_ceiling"`` (the target still holds at the top of the model, ``altitude_m`` is
    11 000 m: the true limit is at least that) or ``"not_reachable"`` (the target fails even at the
    model's lowest altitude, -500 m; ``altitude_m`` and ``pb_mmhg`` are None).
    """

    altitude_m: float | None
    pb_mmhg: float | None
    status: str
    iterations: int


def max_altitude_for_target_pao2(
    *,
    target_pao2_mmhg: float,
    a_a_ratio: float,
    fio2_fraction: float,
    paco2_mmhg: float,
    rq: float = 0.8,
    alveolar: Alveolar = alveolar_po2_simple,
    tolerance_m: float = 1e-4,
) -> MaxAltitude:
    """Highest ISA (cabin) altitude at which the predicted PaO2 still reaches a target.

    Solves a/A x PAO2(FiO2, PaCO2, R, PB(h)) = target for h by bisection on the ISA altitude between
    -500 m and 11 000 m (the predicted PaO2 falls monotonically as h rises). Nothing is tabulated.

    Parameters
    ----------
    target_pao2_mmhg : float
        Target arterial PO2. [mmHg] Accepted 20-200.
    a_a_ratio : float
        PaO2 / PAO2 measured at the origin (constant a/A, Gilbert & Keighley 1974). [1] Accepted
        0.01-1.0.
    fio2_fraction : float
        The FiO2 available in flight (e.g. the maximum). [1] Accepted 0.05-1.0.
    paco2_mmhg : float
        Arterial PCO2, assumed unchanged. [mmHg] Accepted 1-300.
    rq : float
        Respiratory quotient. [1] Accepted 0.5-1.5.
    alveolar : callable
        The alveolar gas equation (default simple form).
    tolerance_m : float
        Width of the final bracket. [m] Accepted 1e-6 to 10.

    Returns
    -------
    MaxAltitude
        ``(altitude_m, pb_mmhg, status, iterations)``, see :class:`MaxAltitude`.

    References
    ----------
    icao7488, alveolar_gas_1946, gilbert1974.

    Examples
    --------
    >>> r = max_altitude_for_target_pao2(target_pao2_mmhg=50.0, a_a_ratio=0.7019, fio2_fraction=0.21,
    ...                                  paco2_mmhg=40.0)
    >>> r.status, round(r.altitude_m), round(r.pb_mmhg, 1)
    ('solved', 1628, 624.3)
    """
    target = require_number("target_pao2_mmhg", target_pao2_mmhg, low=20.0, high=200.0, unit="mmHg")
    ratio = require_number("a_a_ratio", a_a_ratio, low=0.01, high=1.0)
    fio2 = _fio2("fio2_fraction", fio2_fraction)
    tol = require_number("tolerance_m", tolerance_m, low=1e-6, high=10.0, unit="m")

    def excess(h: float) -> float:
        pb = pressure_at_altitude_isa(altitude_m=h)
        return ratio * alveolar(fio2_fraction=fio2, paco2_mmhg=paco2_mmhg, pb_mmhg=pb, rq=rq) - target

    low, high = LOWEST_M, TROPOPAUSE_M
    if excess(high) >= 0.0:
        return MaxAltitude(high, pressure_at_altitude_isa(altitude_m=high), "holds_at_ceiling", 0)
    if excess(low) < 0.0:
        return MaxAltitude(None, None, "not_reachable", 0)
    iterations = 0
    while high - low > tol:  # invariant: excess(low) >= 0 > excess(high)
        mid = 0.5 * (low + high)
        if excess(mid) >= 0.0:
            low = mid
        else:
            high = mid
        iterations += 1
    return MaxAltitude(low, pressure_at_altitude_isa(altitude_m=low), "solved", iterations)


# --------------------------------------------------------------------------------------------------
# trapped gas (Boyle's law)


def _volume(value: float) -> float:
    return require_number("volume_ml", value, low=0.1, high=20_000.0, unit="mL")


def trapped_gas_volume_dry(*, volume_ml: float, pb_origin_mmhg: float, pb_destination_mmhg: float) -> float:
    """Volume of a dry trapped gas (cuffs, bags, splints) at another pressure: V2 = V1 x P1 / P2.

    Parameters
    ----------
    volume_ml : float
        Volume at the origin. [mL] Accepted 0.1-20 000.
    pb_origin_mmhg, pb_destination_mmhg : float
        Ambient pressures. [mmHg] Accepted 150-1100.

    Returns
    -------
    float
        Volume at the destination if the container were free to expand. [mL]

    Notes
    -----
    Constant temperature; a compliant container. A stiff container (an ETT cuff in the trachea)
    expands less and its *pressure* rises instead.

    References
    ----------
    boyle.

    Examples
    --------
    >>> round(trapped_gas_volume_dry(volume_ml=100.0, pb_origin_mmhg=760.0, pb_destination_mmhg=564.51), 2)
    134.63
    """
    v = _volume(volume_ml)
    p1 = _pb("pb_origin_mmhg", pb_origin_mmhg)
    p2 = _pb("pb_destination_mmhg", pb_destination_mmhg)
    return v * p1 / p2


def trapped_gas_volume_saturated_37c(
    *, volume_ml: float, pb_origin_mmhg: float, pb_destination_mmhg: float
) -> float:
    """Volume of body-cavity gas (saturated with water vapour at 37 degC) at another pressure.

    V2 = V1 x (P1 - 47) / (P2 - 47): the water vapour pressure stays 47 mmHg, so only the dry part
    follows Boyle's law, and wet gas expands more than dry gas.

    Parameters
    ----------
    volume_ml : float
        Volume at the origin. [mL] Accepted 0.1-20 000.
    pb_origin_mmhg, pb_destination_mmhg : float
        Ambient pressures. [mmHg] Accepted 150-1100.

    Returns
    -------
    float
        Volume at the destination (free expansion). [mL]

    References
    ----------
    boyle (the water-vapour correction from aviation physiology texts, from memory).

    Examples
    --------
    >>> round(trapped_gas_volume_saturated_37c(volume_ml=100.0, pb_origin_mmhg=760.0,
    ...                                        pb_destination_mmhg=564.51), 1)
    137.8
    """
    v = _volume(volume_ml)
    p1 = _pb("pb_origin_mmhg", pb_origin_mmhg)
    p2 = _pb("pb_destination_mmhg", pb_destination_mmhg)
    return v * (p1 - PH2O_37_MMHG) / (p2 - PH2O_37_MMHG)
