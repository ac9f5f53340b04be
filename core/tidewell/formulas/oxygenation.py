"""Oxygenation: inspired and alveolar PO2, gas-exchange indices, the dissociation curve, O2 content.

=========================================  ==========================================================
``inspired_po2``                           PIO2 = FiO2 x (PB - PH2O) [mmHg]
``alveolar_po2_simple``                    PAO2 = PIO2 - PaCO2 / R [mmHg]
``alveolar_po2_full``                      PAO2 = PIO2 - PaCO2 x (FiO2 + (1 - FiO2) / R) [mmHg]
``aa_gradient_upper_by_age``               age/4 + 4 [mmHg], breathing air
``water_vapour_pressure_buck1981``         saturated water vapour pressure at a temperature [mmHg]
``a_over_a_ratio``                         PaO2 / PAO2 [1]
``pf_ratio``                               PaO2 / FiO2 [mmHg]
``pf_ratio_altitude_corrected_berlin``     PaO2 / FiO2 x PB / 760 [mmHg]
``berlin_pf_band``                         Berlin oxygenation band of a P/F ratio
``sf_ratio``                               SpO2 (%) / FiO2
``pf_from_sf_rice2007``                    P/F estimated from S/F: (S/F - 64) / 0.84 [mmHg]
``oxygenation_index``                      FiO2 x mean airway pressure x 100 / PaO2
``expected_pao2_by_age``                   100 - age/3 [mmHg] (air, sea level)
``expected_pao2_sorbini1968``              109 - 0.43 x age [mmHg]
``saturation_severinghaus1979``            SO2 from PO2, standard curve (eq 1) [fraction]
``po2_from_saturation_severinghaus1979``   PO2 from SO2, the published approximate inverse (eq 2) [mmHg]
``po2_from_saturation_exact``              PO2 from SO2, exact numerical inversion of eq 1 [mmHg]
``P50_STANDARD_MMHG``                      P50 of eq 1 (26.857 mmHg)
``virtual_po2_kelman``                     PO2 shifted to standard conditions (T, pH, PCO2)
``virtual_po2_base_excess``                PO2 shifted to standard conditions (T, pH, BE)
``saturation_hill``                        Hill equation, n 2.7, P50 26.8 mmHg (comparison)
``saturation_kelman1966``                  Kelman's rational function (comparison)
``oxygen_content``                         CaO2 = Hufner x Hb x SO2 + 0.0031 x PO2 [mL/dL]
``oxygen_delivery``                        DO2 = CaO2 x cardiac output x 10 [mL/min]
=========================================  ==========================================================

Decisions where the sources leave a choice (each names its references.py key below):

- Water vapour: 47 mmHg by convention at 37 degC (``PH2O_37_MMHG``); at any other stated temperature,
  Buck 1981 eq 3 over liquid water (47.1 mmHg at 37 degC). The calculations use 47 when no
  temperature is given and Buck when one is.
- Hufner factor 1.34 mL/g by default (1.39 only with co-oximetry fractional saturations);
  dissolved O2 0.0031 mL/dL/mmHg.
- Dissociation curve: Severinghaus 1979 eq 1 is the standard curve; its inverse is solved exactly
  (Cardano root of the cubic, polished by one Newton step); eq 2 is kept as the published
  approximation. Hill and Kelman are for comparison only.

``inspired_po2``, ``alveolar_po2_simple``, ``alveolar_po2_full`` and ``aa_gradient_upper_by_age`` also take
numpy arrays (marked ``tidewell.arrays.elementwise``): the batch and uncertainty paths call them once for all
rows or draws, with the same checks and the same formula as a single value. numpy is never imported here.
"""

from __future__ import annotations

import math
from typing import NamedTuple

from ..arrays import elementwise, require
from ..errors import InputError, require_number

#: water vapour pressure at 37 degC used by convention [mmHg]
PH2O_37_MMHG = 47.0


@elementwise
def inspired_po2(*, fio2_fraction: float, pb_mmhg: float = 760.0, ph2o_mmhg: float = PH2O_37_MMHG) -> float:
    """Inspired PO2 of humidified gas at body temperature.

    PIO2 = FiO2 x (PB - PH2O).

    Parameters
    ----------
    fio2_fraction : float
        Inspired oxygen fraction. [1] Accepted 0.05-1.0.
    pb_mmhg : float
        Barometric pressure. [mmHg] Accepted 150-1100.
    ph2o_mmhg : float
        Water vapour pressure. [mmHg] 47 at 37 degC.

    References
    ----------
    alveolar_gas_1946.

    Examples
    --------
    >>> round(inspired_po2(fio2_fraction=0.21), 2)
    149.73
    """
    fio2, pb, ph2o = _inspired_inputs(fio2_fraction, pb_mmhg, ph2o_mmhg)
    return _inspired(fio2, pb, ph2o)


def _inspired_inputs(fio2_fraction, pb_mmhg, ph2o_mmhg):
    fio2 = require("fio2_fraction", fio2_fraction, low=0.05, high=1.0)
    pb = require("pb_mmhg", pb_mmhg, low=150.0, high=1100.0, unit="mmHg")
    ph2o = require("ph2o_mmhg", ph2o_mmhg, low=0.0, high=100.0, unit="mmHg")
    return fio2, pb, ph2o


@elementwise
def alveolar_po2_simple(
    *,
    fio2_fraction: float,
    paco2_mmhg: float,
    pb_mmhg: float = 760.0,
    rq: float = 0.8,
    ph2o_mmhg: float = PH2O_37_MMHG,
) -> float:
    """Alveolar PO2, simplified alveolar gas equation: PAO2 = FiO2 (PB - PH2O) - PaCO2 / R.

    Examples
    --------
    >>> round(alveolar_po2_simple(fio2_fraction=0.21, paco2_mmhg=40.0), 2)
    99.73
    """
    paco2 = require("paco2_mmhg", paco2_mmhg, low=1.0, high=300.0, unit="mmHg")
    r = require("rq", rq, low=0.5, high=1.5)
    fio2, pb, ph2o = _inspired_inputs(fio2_fraction, pb_mmhg, ph2o_mmhg)
    return _alveolar_simple(fio2, paco2, pb, r, ph2o)


@elementwise
def alveolar_po2_full(
    *,
    fio2_fraction: float,
    paco2_mmhg: float,
    pb_mmhg: float = 760.0,
    rq: float = 0.8,
    ph2o_mmhg: float = PH2O_37_MMHG,
) -> float:
    """Alveolar PO2, full alveolar gas equation: PAO2 = PIO2 - PaCO2 x (FiO2 + (1 - FiO2) / R).

    Examples
    --------
    >>> round(alveolar_po2_full(fio2_fraction=0.21, paco2_mmhg=40.0), 2)
    101.83
    """
    paco2 = require("paco2_mmhg", paco2_mmhg, low=1.0, high=300.0, unit="mmHg")
    r = require("rq", rq, low=0.5, high=1.5)
    fio2, pb, ph2o = _inspired_inputs(fio2_fraction, pb_mmhg, ph2o_mmhg)
    return _alveolar_full(fio2, paco2, pb, r, ph2o)


@elementwise
def aa_gradient_upper_by_age(*, age_years: float) -> float:
    """Upper limit of the A-a gradient breathing air at sea level: age / 4 + 4 [mmHg].

    Common practice (also quoted as (age + 10) / 4).

    Examples
    --------
    >>> aa_gradient_upper_by_age(age_years=60)
    19.0
    """
    age = require("age_years", age_years, low=0.0, high=120.0, unit="years")
    return _aa_upper(age)


# -- the rules themselves: array-polymorphic cores ----------------------------------------------------------
#
# The validated functions above check their arguments (floats or numpy arrays, tidewell.arrays.require) and
# call these, the only implementation of each formula: operators only, so a Python float and a numpy array
# take the same arithmetic (IEEE double, the same operations in the same order) and the batch and Monte
# Carlo paths give the scalar bridge's numbers exactly. They never validate and never import numpy.


def _inspired(fio2, pb, ph2o=PH2O_37_MMHG):
    """PIO2 = FiO2 x (PB - PH2O) [mmHg]."""
    return fio2 * (pb - ph2o)


def _alveolar_simple(fio2, paco2, pb=760.0, rq=0.8, ph2o=PH2O_37_MMHG):
    """PAO2 = PIO2 - PaCO2 / R [mmHg]."""
    return _inspired(fio2, pb, ph2o) - paco2 / rq


def _alveolar_full(fio2, paco2, pb=760.0, rq=0.8, ph2o=PH2O_37_MMHG):
    """PAO2 = PIO2 - PaCO2 x (FiO2 + (1 - FiO2) / R) [mmHg]."""
    return _inspired(fio2, pb, ph2o) - paco2 * (fio2 + (1.0 - fio2) / rq)


def _aa_upper(age):
    """Upper limit of the A-a gradient breathing air: age / 4 + 4 [mmHg]."""
    return age / 4.0 + 4.0


# --------------------------------------------------------------------------------------------------
# water vapour

_HPA_PER_MMHG = 1.33322387415


def water_vapour_pressure_buck1981(*, temperature_c: float) -> float:
    """Saturated water vapour pressure over liquid water (Buck 1981 eq 3).

    e = 6.1121 x exp(17.502 x T / (240.97 + T)) hPa, returned in mmHg (1 mmHg = 1.33322387415 hPa).
    No enhancement factor: alveolar gas is treated as pure saturated water vapour.

    Parameters
    ----------
    temperature_c : float
        Gas (body) temperature. [degC] Accepted 0-50.

    Returns
    -------
    float
        Water vapour pressure. [mmHg] 47.1 at 37 degC (47 by convention).

    References
    ----------
    buck1981.

    Examples
    --------
    >>> round(water_vapour_pressure_buck1981(temperature_c=37.0), 1)
    47.1
    >>> round(water_vapour_pressure_buck1981(temperature_c=32.0), 1)
    35.7
    """
    t = require_number("temperature_c", temperature_c, low=0.0, high=50.0, unit="degC")
    return 6.1121 * math.exp(17.502 * t / (240.97 + t)) / _HPA_PER_MMHG


# --------------------------------------------------------------------------------------------------
# gas-exchange indices


def a_over_a_ratio(*, pao2_mmhg: float, pao2_alveolar_mmhg: float) -> float:
    """Arterial-to-alveolar PO2 ratio: a/A = PaO2 / PAO2 (normal above 0.75).

    Parameters
    ----------
    pao2_mmhg : float
        Arterial PO2. [mmHg] Accepted 1-800.
    pao2_alveolar_mmhg : float
        Alveolar PO2. [mmHg] Must be above 0 (a PAO2 at or below 0 means no oxygen reaches the alveoli).

    References
    ----------
    gilbert1974.

    Examples
    --------
    >>> round(a_over_a_ratio(pao2_mmhg=70.0, pao2_alveolar_mmhg=99.73), 4)
    0.7019
    """
    pao2 = require_number("pao2_mmhg", pao2_mmhg, low=1.0, high=800.0, unit="mmHg")
    alv = require_number("pao2_alveolar_mmhg", pao2_alveolar_mmhg, low=0.1, high=1100.0, unit="mmHg")
    return pao2 / alv


def pf_ratio(*, pao2_mmhg: float, fio2_fraction: float) -> float:
    """PaO2/FiO2 ratio [mmHg].

    Examples
    --------
    >>> pf_ratio(pao2_mmhg=90.0, fio2_fraction=0.5)
    180.0
    """
    pao2 = require_number("pao2_mmhg", pao2_mmhg, low=1.0, high=800.0, unit="mmHg")
    fio2 = require_number("fio2_fraction", fio2_fraction, low=0.21, high=1.0)
    return pao2 / fio2


def pf_ratio_altitude_corrected_berlin(*, pao2_mmhg: float, fio2_fraction: float, pb_mmhg: float) -> float:
    """P/F ratio adjusted for barometric pressure: PaO2 / FiO2 x PB / 760 [mmHg].

    The Berlin definition applies this adjustment above 1000 m; its authors note that the exact
    adjustment is unknown (the factor was taken from the ARDSNet trials).

    Parameters
    ----------
    pao2_mmhg : float
        Arterial PO2. [mmHg]
    fio2_fraction : float
        Inspired oxygen fraction. [1] 0.21-1.0.
    pb_mmhg : float
        Barometric pressure. [mmHg] Accepted 150-1100.

    References
    ----------
    berlin2012.

    Examples
    --------
    >>> round(pf_ratio_altitude_corrected_berlin(pao2_mmhg=90.0, fio2_fraction=0.5, pb_mmhg=630.0), 2)
    149.21
    """
    pb = require_number("pb_mmhg", pb_mmhg, low=150.0, high=1100.0, unit="mmHg")
    return pf_ratio(pao2_mmhg=pao2_mmhg, fio2_fraction=fio2_fraction) * pb / 760.0


def berlin_pf_band(*, pf_mmhg: float) -> str:
    """Berlin oxygenation band of a P/F ratio [mmHg].

    ``severe`` <= 100 < ``moderate`` <= 200 < ``mild`` <= 300 < ``above_ards_range``. The band alone
    is not a diagnosis: ARDS also needs PEEP or CPAP >= 5 cmH2O, timing, bilateral opacities and a
    non-cardiac cause.

    References
    ----------
    berlin2012.

    Examples
    --------
    >>> berlin_pf_band(pf_mmhg=149.2), berlin_pf_band(pf_mmhg=300.0), berlin_pf_band(pf_mmhg=301.0)
    ('moderate', 'mild', 'above_ards_range')
    """
    pf = require_number("pf_mmhg", pf_mmhg, low=0.0, high=5000.0, unit="mmHg")
    if pf <= 100.0:
        return "severe"
    if pf <= 200.0:
        return "moderate"
    if pf <= 300.0:
        return "mild"
    return "above_ards_range"


def sf_ratio(*, spo2_percent: float, fio2_fraction: float) -> float:
    """SpO2/FiO2 ratio with SpO2 in percent.

    Examples
    --------
    >>> round(sf_ratio(spo2_percent=92.0, fio2_fraction=0.4), 2)
    230.0
    """
    spo2 = require_number("spo2_percent", spo2_percent, low=1.0, high=100.0, unit="%")
    fio2 = require_number("fio2_fraction", fio2_fraction, low=0.21, high=1.0)
    return spo2 / fio2


#: SpO2 above which the S/F to P/F estimate is not valid (flat part of the curve) [%]
RICE_SPO2_MAX_PERCENT = 97.0


def pf_from_sf_rice2007(*, sf: float) -> float:
    """P/F ratio estimated from the S/F ratio: S/F = 64 + 0.84 x P/F, so P/F = (S/F - 64) / 0.84.

    Valid only for SpO2 <= 97 % (above that the curve is too flat). S/F 235 corresponds to P/F 200
    and S/F 315 to P/F 300.

    References
    ----------
    rice2007.

    Examples
    --------
    >>> round(pf_from_sf_rice2007(sf=230.0), 1)
    197.6
    """
    value = require_number("sf", sf, low=64.0, high=500.0)
    return (value - 64.0) / 0.84


def oxygenation_index(*, fio2_fraction: float, mean_airway_pressure_cmh2o: float, pao2_mmhg: float) -> float:
    """Oxygenation index: OI = FiO2 x mean airway pressure [cmH2O] x 100 / PaO2 [mmHg].

    References
    ----------
    chen2018_oi.

    Examples
    --------
    >>> round(oxygenation_index(fio2_fraction=0.6, mean_airway_pressure_cmh2o=20.0, pao2_mmhg=80.0), 2)
    15.0
    """
    fio2 = require_number("fio2_fraction", fio2_fraction, low=0.21, high=1.0)
    paw = require_number("mean_airway_pressure_cmh2o", mean_airway_pressure_cmh2o, low=1.0, high=60.0)
    pao2 = require_number("pao2_mmhg", pao2_mmhg, low=1.0, high=800.0, unit="mmHg")
    return fio2 * paw * 100.0 / pao2


def expected_pao2_by_age(*, age_years: float) -> float:
    """Expected PaO2 breathing air at sea level: 100 - age / 3 [mmHg] (common practice).

    Cerveri 1995 found a plateau from about 75 years; the rule is not adjusted for that.

    Examples
    --------
    >>> expected_pao2_by_age(age_years=60)
    80.0
    """
    age = require_number("age_years", age_years, low=0.0, high=120.0, unit="years")
    return 100.0 - age / 3.0


def expected_pao2_sorbini1968(*, age_years: float) -> float:
    """Expected PaO2 breathing air at sea level, Sorbini 1968: 109 - 0.43 x age [mmHg].

    References
    ----------
    sorbini1968.

    Examples
    --------
    >>> round(expected_pao2_sorbini1968(age_years=60), 1)
    83.2
    """
    age = require_number("age_years", age_years, low=0.0, high=120.0, unit="years")
    return 109.0 - 0.43 * age


# --------------------------------------------------------------------------------------------------
# dissociation curve

#: highest PO2 accepted by the curve functions [mmHg] (eq 1 was fitted to 1-700 mmHg)
PO2_CURVE_MAX_MMHG = 800.0


def _sev_eq1(po2: float) -> float:
    # S = 1 / (23400 / (P^3 + 150 P) + 1), written as u / (u + 23400) so that P = 0 gives S = 0
    u = po2 * po2 * po2 + 150.0 * po2
    return u / (u + 23400.0)


def saturation_severinghaus1979(*, po2_mmhg: float) -> float:
    """Oxygen saturation of the standard curve (Severinghaus 1979 eq 1).

    S = 1 / (23400 / (PO2^3 + 150 x PO2) + 1), for pH 7.40, 37 degC, BE 0, normal 2,3-DPG.

    Parameters
    ----------
    po2_mmhg : float
        PO2 on the standard curve (a virtual PO2 when shifted). [mmHg] Accepted 0-800 (fitted 1-700).

    Returns
    -------
    float
        Saturation. [fraction 0-1]

    References
    ----------
    severinghaus1979 (eq 1; accuracy about +-0.0055 S).

    Examples
    --------
    >>> round(saturation_severinghaus1979(po2_mmhg=60.0), 5)
    0.9058
    >>> saturation_severinghaus1979(po2_mmhg=0.0)
    0.0
    """
    po2 = require_number("po2_mmhg", po2_mmhg, low=0.0, high=PO2_CURVE_MAX_MMHG, unit="mmHg")
    return _sev_eq1(po2)


def _require_saturation(name: str, value: float) -> float:
    s = require_number(name, value, low=0.0, high=1.0, hint="A saturation fraction is between 0 and 1.")
    if s <= 0.0 or s >= 1.0:
        raise InputError(
            name,
            value,
            "has no finite PO2: the curve reaches 0 and 1 only at PO2 0 and infinity",
            "Use a saturation strictly between 0 and 1.",
            code="out_of_range",
        )
    return s


def po2_from_saturation_severinghaus1979(*, so2_fraction: float) -> float:
    """PO2 from saturation by the published approximate inverse (Severinghaus 1979 eq 2).

    ln PO2 = 0.385 x ln(1 / (1/S - 1)) + 3.32 - 1 / (72 S) - 0.17 S^6.

    Parameters
    ----------
    so2_fraction : float
        Saturation. [fraction] Must be strictly between 0 and 1; the approximation is stated for
        0.01-0.99.

    References
    ----------
    severinghaus1979 (eq 2).

    Examples
    --------
    >>> round(po2_from_saturation_severinghaus1979(so2_fraction=0.90), 2)
    57.98
    """
    s = _require_saturation("so2_fraction", so2_fraction)
    return math.exp(0.385 * math.log(1.0 / (1.0 / s - 1.0)) + 3.32 - 1.0 / (72.0 * s) - 0.17 * s**6)


def po2_from_saturation_exact(*, so2_fraction: float) -> float:
    """PO2 whose eq 1 saturation is ``so2_fraction``: exact numerical inversion of Severinghaus eq 1.

    Eq 1 gives S = u / (u + 23400) with u = PO2^3 + 150 PO2, so u = 23400 S / (1 - S) and PO2 is the
    single real root of PO2^3 + 150 PO2 - u = 0 (u is strictly increasing in PO2), found by Cardano's
    formula for a depressed cubic with positive linear coefficient.

    Parameters
    ----------
    so2_fraction : float
        Saturation. [fraction] Strictly between 0 and 1.

    Returns
    -------
    float
        PO2 on the standard curve. [mmHg]

    References
    ----------
    severinghaus1979 (eq 1, inverted here).

    Examples
    --------
    >>> round(po2_from_saturation_exact(so2_fraction=0.90), 2)
    58.66
    >>> round(po2_from_saturation_exact(so2_fraction=0.5), 3)
    26.857
    """
    s = _require_saturation("so2_fraction", so2_fraction)
    u = 23400.0 * s / (1.0 - s)
    # x^3 + p x - u = 0 with p = 150 > 0: one real root, x = cbrt(u/2 + r) + cbrt(u/2 - r)
    p = 150.0
    r = math.sqrt((u / 2.0) ** 2 + (p / 3.0) ** 3)
    a = u / 2.0 + r
    b = u / 2.0 - r
    x = math.copysign(abs(a) ** (1.0 / 3.0), a) + math.copysign(abs(b) ** (1.0 / 3.0), b)
    # one Newton step polishes the rounding of the cube roots
    x -= (x**3 + p * x - u) / (3.0 * x * x + p)
    return x


#: P50 of the standard curve (eq 1 solved for S = 0.5) [mmHg]
P50_STANDARD_MMHG = po2_from_saturation_exact(so2_fraction=0.5)


class VirtualPO2(NamedTuple):
    """A PO2 moved to standard conditions: ``po2_mmhg = measured PO2 x factor``."""

    factor: float
    po2_mmhg: float


def virtual_po2_kelman(
    *, po2_mmhg: float, temperature_c: float = 37.0, ph: float = 7.40, pco2_mmhg: float = 40.0
) -> VirtualPO2:
    """Virtual (standardised) PO2 for temperature, pH and PCO2 (Kelman 1966 / Severinghaus 1979).

    x = PO2 x 10^[0.024 (37 - T) + 0.40 (pH - 7.40) + 0.06 log10(40 / PCO2)]; then S = S_standard(x).
    pH and PCO2 are the values at the blood's temperature T.

    Parameters
    ----------
    po2_mmhg : float
        PO2 at temperature T. [mmHg] 0-800.
    temperature_c : float
        Blood temperature. [degC] 15-43.
    ph : float
        pH at T. 6.0-8.6 (wide enough for temperature-corrected values).
    pco2_mmhg : float
        PCO2 at T. [mmHg] 1-400.

    References
    ----------
    kelman1966, severinghaus1979.

    Examples
    --------
    >>> v = virtual_po2_kelman(po2_mmhg=60.0, ph=7.20, pco2_mmhg=60.0)
    >>> round(v.factor, 5), round(v.po2_mmhg, 2)
    (0.81177, 48.71)
    """
    po2 = require_number("po2_mmhg", po2_mmhg, low=0.0, high=PO2_CURVE_MAX_MMHG, unit="mmHg")
    t = require_number("temperature_c", temperature_c, low=15.0, high=43.0, unit="degC")
    p_h = require_number("ph", ph, low=6.0, high=8.6)
    pco2 = require_number("pco2_mmhg", pco2_mmhg, low=1.0, high=400.0, unit="mmHg")
    factor = 10.0 ** (0.024 * (37.0 - t) + 0.40 * (p_h - 7.40) + 0.06 * math.log10(40.0 / pco2))
    return VirtualPO2(factor, po2 * factor)


def virtual_po2_base_excess(
    *, po2_mmhg: float, temperature_c: float = 37.0, ph: float = 7.40, base_excess_mmol_l: float = 0.0
) -> VirtualPO2:
    """Virtual PO2, base-excess variant (Severinghaus 1966 blood-gas calculator).

    x = PO2 x 10^[0.024 (37 - T) + 0.48 (pH - 7.40) - 0.0013 x BE].

    Parameters
    ----------
    base_excess_mmol_l : float
        Base excess. [mmol/L] -40 to 40.

    References
    ----------
    severinghaus1966.

    Examples
    --------
    >>> v = virtual_po2_base_excess(po2_mmhg=60.0, ph=7.20, base_excess_mmol_l=-5.0)
    >>> round(v.factor, 5), round(v.po2_mmhg, 2)
    (0.81377, 48.83)
    """
    po2 = require_number("po2_mmhg", po2_mmhg, low=0.0, high=PO2_CURVE_MAX_MMHG, unit="mmHg")
    t = require_number("temperature_c", temperature_c, low=15.0, high=43.0, unit="degC")
    p_h = require_number("ph", ph, low=6.0, high=8.6)
    be = require_number("base_excess_mmol_l", base_excess_mmol_l, low=-40.0, high=40.0, unit="mmol/L")
    factor = 10.0 ** (0.024 * (37.0 - t) + 0.48 * (p_h - 7.40) - 0.0013 * be)
    return VirtualPO2(factor, po2 * factor)


def saturation_hill(*, po2_mmhg: float, p50_mmhg: float = 26.8, n: float = 2.7) -> float:
    """Hill equation S = PO2^n / (PO2^n + P50^n), for comparison with eq 1.

    Poor below S 0.2 and above 0.97.

    References
    ----------
    hill1910.

    Examples
    --------
    >>> round(saturation_hill(po2_mmhg=40.0), 5)
    0.74674
    """
    po2 = require_number("po2_mmhg", po2_mmhg, low=0.0, high=PO2_CURVE_MAX_MMHG, unit="mmHg")
    p50 = require_number("p50_mmhg", p50_mmhg, low=5.0, high=80.0, unit="mmHg")
    hill_n = require_number("n", n, low=1.0, high=4.0)
    return po2**hill_n / (po2**hill_n + p50**hill_n)


_KELMAN_A = (-8532.2289, 2121.4010, -67.073989, 935960.87, -31346.258, 2396.1674, -67.104406)


def saturation_kelman1966(*, po2_mmhg: float) -> float:
    """Kelman 1966 rational function of the standard curve, for comparison with eq 1.

    S = (a1 x + a2 x^2 + a3 x^3 + x^4) / (a4 + a5 x + a6 x^2 + a7 x^3 + x^4) for x >= 10 mmHg,
    S = 0.003683 x + 0.000584 x^2 below 10 mmHg. Fitted up to about 150 mmHg.

    References
    ----------
    kelman1966.

    Examples
    --------
    >>> round(saturation_kelman1966(po2_mmhg=40.0), 5)
    0.74116
    """
    x = require_number("po2_mmhg", po2_mmhg, low=0.0, high=PO2_CURVE_MAX_MMHG, unit="mmHg")
    if x < 10.0:
        return 0.003683 * x + 0.000584 * x * x
    a1, a2, a3, a4, a5, a6, a7 = _KELMAN_A
    num = a1 * x + a2 * x**2 + a3 * x**3 + x**4
    den = a4 + a5 * x + a6 * x**2 + a7 * x**3 + x**4
    return num / den


# --------------------------------------------------------------------------------------------------
# content and delivery

#: Hufner factor, effective O2 capacity of haemoglobin used clinically [mL O2 / g Hb]
HUFNER_ML_PER_G = 1.34
#: dissolved O2 [mL O2 / dL blood / mmHg]
DISSOLVED_O2_ML_DL_MMHG = 0.0031


class OxygenContent(NamedTuple):
    """Arterial oxygen content and its two parts [mL O2 / dL blood]."""

    total_ml_dl: float
    bound_ml_dl: float
    dissolved_ml_dl: float


def oxygen_content(
    *,
    hb_g_dl: float,
    so2_fraction: float,
    po2_mmhg: float | None = None,
    hufner_ml_per_g: float = HUFNER_ML_PER_G,
    dissolved_ml_dl_mmhg: float = DISSOLVED_O2_ML_DL_MMHG,
) -> OxygenContent:
    """Oxygen content: CaO2 = Hufner x Hb x SO2 + 0.0031 x PO2 [mL/dL].

    Parameters
    ----------
    hb_g_dl : float
        Haemoglobin. [g/dL] Accepted 1-25.
    so2_fraction : float
        Saturation. [fraction 0-1]
    po2_mmhg : float or None
        PO2 for the dissolved part. [mmHg] 0-800. None leaves the dissolved part out (0).
    hufner_ml_per_g : float
        Hufner factor. [mL/g] 1.30-1.40; 1.34 default, 1.39 theoretical (use it only with
        co-oximetry fractional saturation).
    dissolved_ml_dl_mmhg : float
        Dissolved O2 coefficient. [mL/dL/mmHg] 0.0030-0.0032.

    References
    ----------
    o2_content, dijkhuizen1977.

    Examples
    --------
    >>> round(oxygen_content(hb_g_dl=15.0, so2_fraction=0.98, po2_mmhg=100.0).total_ml_dl, 3)
    20.008
    """
    hb = require_number("hb_g_dl", hb_g_dl, low=1.0, high=25.0, unit="g/dL")
    s = require_number("so2_fraction", so2_fraction, low=0.0, high=1.0)
    k = require_number("hufner_ml_per_g", hufner_ml_per_g, low=1.30, high=1.40, unit="mL/g")
    d = require_number("dissolved_ml_dl_mmhg", dissolved_ml_dl_mmhg, low=0.0030, high=0.0032)
    dissolved = 0.0
    if po2_mmhg is not None:
        dissolved = d * require_number("po2_mmhg", po2_mmhg, low=0.0, high=800.0, unit="mmHg")
    bound = k * hb * s
    return OxygenContent(bound + dissolved, bound, dissolved)


def oxygen_delivery(*, cao2_ml_dl: float, cardiac_output_l_min: float) -> float:
    """Oxygen delivery: DO2 = CaO2 [mL/dL] x cardiac output [L/min] x 10 [mL/min].

    Parameters
    ----------
    cao2_ml_dl : float
        Arterial O2 content. [mL/dL] 0-40.
    cardiac_output_l_min : float
        Cardiac output. [L/min] 0.5-30.

    References
    ----------
    o2_content.

    Examples
    --------
    >>> round(oxygen_delivery(cao2_ml_dl=20.008, cardiac_output_l_min=5.0), 1)
    1000.4
    """
    cao2 = require_number("cao2_ml_dl", cao2_ml_dl, low=0.0, high=40.0, unit="mL/dL")
    co = require_number("cardiac_output_l_min", cardiac_output_l_min, low=0.5, high=30.0, unit="L/min")
    return cao2 * co * 10.0
