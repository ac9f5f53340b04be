"""Ventilation and CO2 elimination: VE, VA, dead space, CO2 output, targets and the causes of hypercapnia.

======================================  ===========================================================
``minute_ventilation``                  VE = VT x RR [L/min]
``alveolar_ventilation``                VA = (VT - VD) x RR [L/min]
``predicted_body_weight_ardsnet``       PBW = 50 (male) or 45.5 (female) + 0.91 (height - 152.4) [kg]
``anatomical_dead_space``               VD = 2.2 mL/kg PBW [mL]
``paco2_from_alveolar_ventilation``     PaCO2 = 0.863 x VCO2 / VA [mmHg]
``alveolar_ventilation_for_paco2``      VA = 0.863 x VCO2 / PaCO2 [L/min]
``vd_vt_enghoff``                       (PaCO2 - PECO2) / PaCO2
``vd_vt_bohr``                          (PACO2 - PECO2) / PACO2
``alveolar_dead_space_fraction``        (PaCO2 - PetCO2) / PaCO2
``vd_vt_from_vco2``                     1 - 0.863 x VCO2 / (PaCO2 x VE) (the alveolar ventilation equation)
``vco2_from_expired_co2``               VCO2 = VE x PECO2 / 0.863 [mL/min]
``vco2_resting_estimate``               2.8 mL/kg/min x weight, or 200 mL/min without a weight
``vco2_with_fever``                     VCO2 x (1 + rate x (T - 37)) above 37 degC (linear)
``vt_per_kg``                           VT / PBW [mL/kg]
``lung_protective_vt``                  4, 6 and 8 mL/kg PBW [mL]
``respiratory_timing``                  Ti and Te from RR and I:E [s]
``parse_ie_ratio``                      "1:2" -> (1.0, 2.0)
``to_target``                           VE, RR at the same VT, VT at the same RR for a target PaCO2
``co2_mechanisms``                      shares of a raised PaCO2 due to ventilation, dead space, CO2 output
``pco2_from_etco2``                     current PaCO2 from a later EtCO2 at a constant gradient [mmHg]
``K_CO2``                               0.863 (760 x 310.15 / 273.15 / 1000)
======================================  ===========================================================

Decisions (each also stated in the calculation's steps, with its references.py key):

- ``K_CO2`` is the exact STPD -> BTPS constant 0.86295 (the textbook 0.863 rounded); it does not
  depend on barometric pressure.
- Resting VCO2 by body size: 2.8 mL/kg/min (1 MET = 3.5 mL O2/kg/min x R 0.8; band 2.5-3) x actual
  weight, else x predicted body weight, else 200 mL/min (standard resting adult).
- Fever: +10 %/degC above 37 degC, linear not compounded (band 10-13 %/degC). No change is applied
  below 37 degC (hypothermia lowers VCO2, about 7-8 %/degC from memory, not modelled).
- Reference state for the mechanisms: PaCO2 40 mmHg, VD/VT 0.30, VCO2 = the resting body-size
  estimate; the reference VE is the VE that gives exactly 40 mmHg with those (6.16 L/min for
  200 mL/min), so the reference values reproduce 40 mmHg with no residual. It lies inside the
  5-8 L/min normal range for reference VCO2 162-260 mL/min (about 58-93 kg).
"""

from __future__ import annotations

import math
from typing import NamedTuple

from ..errors import InputError, require_number

#: PaCO2 [mmHg] = K_CO2 x VCO2 [mL/min STPD] / VA [L/min BTPS]: 760 x (310.15 / 273.15) / 1000
K_CO2 = 760.0 * 310.15 / 273.15 / 1000.0
#: anatomical dead space per kg predicted body weight [mL/kg]
ANATOMICAL_VD_ML_PER_KG = 2.2
#: resting VCO2 per kg [mL/kg/min] = 3.5 mL O2/kg/min (1 MET) x R 0.8
VCO2_ML_PER_KG_MIN = 3.5 * 0.8
#: resting VCO2 band per kg [mL/kg/min]
VCO2_ML_PER_KG_MIN_BAND = (2.5, 3.0)
#: standard resting adult VCO2 when no body size is known [mL/min]
VCO2_RESTING_ADULT_ML_MIN = 200.0
#: fever: rise in VCO2 per degC above 37 [fraction per degC], default and band
FEVER_RATE_PER_DEGC = 0.10
FEVER_RATE_BAND = (0.10, 0.13)
#: reference state of the mechanisms decomposition
PACO2_REFERENCE_MMHG = 40.0
VD_VT_REFERENCE = 0.30
#: upper limit of the normal PaCO2 range [mmHg]
PACO2_NORMAL_HIGH_MMHG = 45.0
#: lung-protective tidal volume [mL/kg PBW]: low, target, high
LUNG_PROTECTIVE_ML_PER_KG = (4.0, 6.0, 8.0)

VT_RANGE_ML = (50.0, 2000.0)
RR_RANGE = (4.0, 60.0)
#: VCO2 accepted by the domain functions [mL/min]; the bridge accepts 50-1000 for a measured VCO2 and
#: lets estimates and values derived from PECO2 through (flagged when implausible)
VCO2_RANGE_ML_MIN = (10.0, 5000.0)
PCO2_RANGE_MMHG = (5.0, 250.0)


def minute_ventilation(*, vt_ml: float, rr_per_min: float) -> float:
    """Minute ventilation VE = VT x RR [L/min].

    Parameters
    ----------
    vt_ml : float
        Tidal volume. [mL] Accepted 50-2000.
    rr_per_min : float
        Respiratory rate. [1/min] Accepted 4-60.

    References
    ----------
    alveolar_ventilation.

    Examples
    --------
    >>> minute_ventilation(vt_ml=500, rr_per_min=12)
    6.0
    """
    vt = require_number("vt_ml", vt_ml, low=VT_RANGE_ML[0], high=VT_RANGE_ML[1], unit="mL")
    rr = require_number("rr_per_min", rr_per_min, low=RR_RANGE[0], high=RR_RANGE[1], unit="/min")
    return vt * rr / 1000.0


def alveolar_ventilation(*, vt_ml: float, vd_ml: float, rr_per_min: float) -> float:
    """Alveolar ventilation VA = (VT - VD) x RR [L/min].

    Parameters
    ----------
    vt_ml : float
        Tidal volume. [mL] 50-2000.
    vd_ml : float
        Dead space volume. [mL] 0 up to (not including) VT.
    rr_per_min : float
        Respiratory rate. [1/min] 4-60.

    Raises
    ------
    InputError
        ``inconsistent`` when VD >= VT (no alveolar ventilation).

    References
    ----------
    alveolar_ventilation.

    Examples
    --------
    >>> round(alveolar_ventilation(vt_ml=500, vd_ml=150, rr_per_min=12), 3)
    4.2
    """
    vt = require_number("vt_ml", vt_ml, low=VT_RANGE_ML[0], high=VT_RANGE_ML[1], unit="mL")
    vd = require_number("vd_ml", vd_ml, low=0.0, high=2000.0, unit="mL")
    rr = require_number("rr_per_min", rr_per_min, low=RR_RANGE[0], high=RR_RANGE[1], unit="/min")
    if vd >= vt:
        raise InputError(
            "vd_ml",
            vd_ml,
            f"dead space must be smaller than the tidal volume ({vt:g} mL)",
            "VD >= VT leaves no alveolar ventilation; check that VD and VT are both in mL.",
            code="inconsistent",
        )
    return (vt - vd) * rr / 1000.0


def predicted_body_weight_ardsnet(*, height_cm: float, sex: str) -> float:
    """Predicted body weight (ARDS Network 2000) [kg].

    male: 50 + 0.91 x (height - 152.4); female: 45.5 + 0.91 x (height - 152.4).

    Parameters
    ----------
    height_cm : float
        Height. [cm] Accepted 120-230 (not validated below about 150 cm or in children).
    sex : str
        ``"female"`` or ``"male"``.

    References
    ----------
    ardsnet2000.

    Examples
    --------
    >>> round(predicted_body_weight_ardsnet(height_cm=175, sex="male"), 3)
    70.566
    >>> round(predicted_body_weight_ardsnet(height_cm=160, sex="female"), 3)
    52.416
    """
    h = require_number("height_cm", height_cm, low=120.0, high=230.0, unit="cm")
    if sex not in ("female", "male"):
        raise InputError("sex", sex, "must be 'female' or 'male'", code="bad_request")
    base = 50.0 if sex == "male" else 45.5
    return base + 0.91 * (h - 152.4)


def anatomical_dead_space(*, pbw_kg: float) -> float:
    """Anatomical dead space estimated as 2.2 mL/kg predicted body weight [mL].

    A population average: individual values correlate poorly with weight (Brewer & Orr).

    References
    ----------
    numa1996.

    Examples
    --------
    >>> round(anatomical_dead_space(pbw_kg=70.566), 1)
    155.2
    """
    pbw = require_number("pbw_kg", pbw_kg, low=10.0, high=150.0, unit="kg")
    return ANATOMICAL_VD_ML_PER_KG * pbw


def paco2_from_alveolar_ventilation(*, vco2_ml_min: float, va_l_min: float) -> float:
    """PaCO2 = 0.863 x VCO2 / VA [mmHg] (alveolar ventilation equation).

    Parameters
    ----------
    vco2_ml_min : float
        CO2 output, STPD. [mL/min] 10-5000.
    va_l_min : float
        Alveolar ventilation, BTPS. [L/min] 0.001-120.

    References
    ----------
    alveolar_ventilation.

    Examples
    --------
    >>> round(paco2_from_alveolar_ventilation(vco2_ml_min=200, va_l_min=4.2), 2)
    41.09
    """
    vco2 = require_number("vco2_ml_min", vco2_ml_min, low=VCO2_RANGE_ML_MIN[0], high=VCO2_RANGE_ML_MIN[1])
    va = require_number("va_l_min", va_l_min, low=0.001, high=120.0, unit="L/min")
    return K_CO2 * vco2 / va


def alveolar_ventilation_for_paco2(*, vco2_ml_min: float, paco2_mmhg: float) -> float:
    """Alveolar ventilation that gives ``paco2_mmhg``: VA = 0.863 x VCO2 / PaCO2 [L/min].

    Examples
    --------
    >>> round(alveolar_ventilation_for_paco2(vco2_ml_min=250, paco2_mmhg=40), 3)
    5.393
    """
    vco2 = require_number("vco2_ml_min", vco2_ml_min, low=VCO2_RANGE_ML_MIN[0], high=VCO2_RANGE_ML_MIN[1])
    paco2 = require_number("paco2_mmhg", paco2_mmhg, low=PCO2_RANGE_MMHG[0], high=PCO2_RANGE_MMHG[1])
    return K_CO2 * vco2 / paco2


def _dead_space_ratio(name_high: str, high: float, name_low: str, low: float) -> float:
    if low >= high:
        raise InputError(
            name_low,
            low,
            f"must be lower than {name_high} ({high:g} mmHg) for a dead-space fraction",
            "Mixed expired PCO2 is always below the alveolar/arterial PCO2; check the values and units.",
            code="inconsistent",
        )
    return (high - low) / high


def vd_vt_enghoff(*, paco2_mmhg: float, peco2_mmhg: float) -> float:
    """Physiological dead-space fraction, Enghoff: VD/VT = (PaCO2 - PECO2) / PaCO2.

    A global index of gas-exchange inefficiency (includes shunt and V/Q effects); normal 0.2-0.35.

    Parameters
    ----------
    paco2_mmhg : float
        Arterial PCO2. [mmHg] 5-250.
    peco2_mmhg : float
        Mixed expired PCO2. [mmHg] 0 up to PaCO2.

    References
    ----------
    enghoff1938, tusman2012.

    Examples
    --------
    >>> vd_vt_enghoff(paco2_mmhg=50, peco2_mmhg=25)
    0.5
    """
    paco2 = require_number("paco2_mmhg", paco2_mmhg, low=PCO2_RANGE_MMHG[0], high=PCO2_RANGE_MMHG[1])
    peco2 = require_number("peco2_mmhg", peco2_mmhg, low=0.0, high=PCO2_RANGE_MMHG[1], unit="mmHg")
    return _dead_space_ratio("paco2_mmhg", paco2, "peco2_mmhg", peco2)


def vd_vt_bohr(*, paco2_alveolar_mmhg: float, peco2_mmhg: float) -> float:
    """Dead-space fraction, Bohr: VD/VT = (PACO2 - PECO2) / PACO2 (alveolar PCO2, e.g. end-tidal).

    References
    ----------
    bohr1891, tusman2012.

    Examples
    --------
    >>> vd_vt_bohr(paco2_alveolar_mmhg=40, peco2_mmhg=25)
    0.375
    """
    pa = require_number("paco2_alveolar_mmhg", paco2_alveolar_mmhg, low=1.0, high=PCO2_RANGE_MMHG[1])
    peco2 = require_number("peco2_mmhg", peco2_mmhg, low=0.0, high=PCO2_RANGE_MMHG[1], unit="mmHg")
    return _dead_space_ratio("paco2_alveolar_mmhg", pa, "peco2_mmhg", peco2)


def alveolar_dead_space_fraction(*, paco2_mmhg: float, etco2_mmhg: float) -> float:
    """Alveolar dead-space fraction estimated from end-tidal CO2: (PaCO2 - PetCO2) / PaCO2.

    Negative when PetCO2 exceeds PaCO2 (it happens, e.g. with large VT and low RR); returned as is.

    References
    ----------
    tusman2012, nunn1960.

    Examples
    --------
    >>> round(alveolar_dead_space_fraction(paco2_mmhg=50, etco2_mmhg=35), 3)
    0.3
    """
    paco2 = require_number("paco2_mmhg", paco2_mmhg, low=PCO2_RANGE_MMHG[0], high=PCO2_RANGE_MMHG[1])
    et = require_number("etco2_mmhg", etco2_mmhg, low=0.0, high=PCO2_RANGE_MMHG[1], unit="mmHg")
    return (paco2 - et) / paco2


def vd_vt_from_vco2(*, paco2_mmhg: float, vco2_ml_min: float, ve_l_min: float) -> float:
    """Dead-space fraction from the alveolar ventilation equation: 1 - 0.863 x VCO2 / (PaCO2 x VE).

    Raises
    ------
    InputError
        ``inconsistent`` (field ``vco2_ml_min``) when the three values imply VD/VT <= 0 or >= 1.

    References
    ----------
    alveolar_ventilation.

    Examples
    --------
    >>> round(vd_vt_from_vco2(paco2_mmhg=41.0927, vco2_ml_min=200, ve_l_min=6.0), 3)
    0.3
    """
    paco2 = require_number("paco2_mmhg", paco2_mmhg, low=PCO2_RANGE_MMHG[0], high=PCO2_RANGE_MMHG[1])
    vco2 = require_number("vco2_ml_min", vco2_ml_min, low=VCO2_RANGE_ML_MIN[0], high=VCO2_RANGE_ML_MIN[1])
    ve = require_number("ve_l_min", ve_l_min, low=0.2, high=120.0, unit="L/min")
    fraction = 1.0 - K_CO2 * vco2 / (paco2 * ve)
    if not 0.0 < fraction < 1.0:
        need = K_CO2 * vco2 / paco2
        raise InputError(
            "vco2_ml_min",
            vco2_ml_min,
            f"cannot be cleared at a PaCO2 of {paco2:g} mmHg by a VE of {ve:.3g} L/min "
            f"(it needs an alveolar ventilation of {need:.3g} L/min, so VD/VT would be {fraction:.2f})",
            "Check VCO2, VT, RR and PaCO2 (units, and that they were measured at the same time).",
            code="inconsistent",
        )
    return fraction


def vco2_from_expired_co2(*, ve_l_min: float, peco2_mmhg: float) -> float:
    """CO2 output from mixed expired PCO2: VCO2 = VE x PECO2 / 0.863 [mL/min STPD].

    VE and PECO2 are taken at BTPS (the same convention as the alveolar ventilation equation).

    References
    ----------
    alveolar_ventilation.

    Examples
    --------
    >>> round(vco2_from_expired_co2(ve_l_min=6.0, peco2_mmhg=28.77), 1)
    200.0
    """
    ve = require_number("ve_l_min", ve_l_min, low=0.2, high=120.0, unit="L/min")
    peco2 = require_number("peco2_mmhg", peco2_mmhg, low=0.1, high=PCO2_RANGE_MMHG[1], unit="mmHg")
    return ve * peco2 / K_CO2


def vco2_resting_estimate(*, weight_kg: float | None = None) -> float:
    """Resting adult CO2 output by body size [mL/min].

    2.8 mL/kg/min x weight (1 MET = 3.5 mL O2/kg/min times R 0.8; band 2.5-3 mL/kg/min), or
    200 mL/min (standard resting adult) when no weight is known. The per-kg rule overestimates in
    obesity (adipose tissue has a low metabolic rate) and is not for children.

    Parameters
    ----------
    weight_kg : float or None
        Body weight (actual, else predicted). [kg] 10-350 (predicted body weight reaches 16 kg at 120 cm).

    References
    ----------
    jette1990_met, resting_vco2.

    Examples
    --------
    >>> round(vco2_resting_estimate(weight_kg=70), 1)
    196.0
    >>> vco2_resting_estimate()
    200.0
    """
    if weight_kg is None:
        return VCO2_RESTING_ADULT_ML_MIN
    w = require_number("weight_kg", weight_kg, low=10.0, high=350.0, unit="kg")
    return VCO2_ML_PER_KG_MIN * w


def vco2_with_fever(
    *, vco2_ml_min: float, temperature_c: float, rate_per_degc: float = FEVER_RATE_PER_DEGC
) -> float:
    """CO2 output raised for fever: VCO2 x (1 + rate x (T - 37)) above 37 degC, linear.

    At or below 37 degC the value is returned unchanged (hypothermia is not modelled).

    Parameters
    ----------
    vco2_ml_min : float
        Afebrile VCO2. [mL/min] 10-5000.
    temperature_c : float
        Core temperature. [degC] 25-43.
    rate_per_degc : float
        Fractional rise per degC. [1/degC] 0.10 default; band 0.10-0.13.

    References
    ----------
    fever_vco2.

    Examples
    --------
    >>> vco2_with_fever(vco2_ml_min=200, temperature_c=39.5)
    250.0
    >>> round(vco2_with_fever(vco2_ml_min=200, temperature_c=39.5, rate_per_degc=0.13), 1)
    265.0
    """
    vco2 = require_number("vco2_ml_min", vco2_ml_min, low=VCO2_RANGE_ML_MIN[0], high=VCO2_RANGE_ML_MIN[1])
    t = require_number("temperature_c", temperature_c, low=25.0, high=43.0, unit="degC")
    rate = require_number("rate_per_degc", rate_per_degc, low=0.0, high=0.2)
    if t <= 37.0:
        return vco2
    return vco2 * (1.0 + rate * (t - 37.0))


def vt_per_kg(*, vt_ml: float, pbw_kg: float) -> float:
    """Tidal volume per kg predicted body weight [mL/kg].

    Examples
    --------
    >>> round(vt_per_kg(vt_ml=500, pbw_kg=70.566), 2)
    7.09
    """
    vt = require_number("vt_ml", vt_ml, low=VT_RANGE_ML[0], high=VT_RANGE_ML[1], unit="mL")
    pbw = require_number("pbw_kg", pbw_kg, low=10.0, high=150.0, unit="kg")
    return vt / pbw


class VtBand(NamedTuple):
    """Lung-protective tidal volumes [mL]: 4, 6 (target) and 8 mL/kg PBW."""

    low_ml: float
    target_ml: float
    high_ml: float


def lung_protective_vt(*, pbw_kg: float) -> VtBand:
    """Lung-protective tidal volume 6 (4-8) mL/kg predicted body weight [mL].

    References
    ----------
    ardsnet2000.

    Examples
    --------
    >>> [round(v, 1) for v in lung_protective_vt(pbw_kg=70.566)]
    [282.3, 423.4, 564.5]
    """
    pbw = require_number("pbw_kg", pbw_kg, low=10.0, high=150.0, unit="kg")
    low, target, high = LUNG_PROTECTIVE_ML_PER_KG
    return VtBand(low * pbw, target * pbw, high * pbw)


class Timing(NamedTuple):
    """One breath's timing [s]."""

    cycle_s: float
    ti_s: float
    te_s: float


def respiratory_timing(*, rr_per_min: float, i_part: float = 1.0, e_part: float = 2.0) -> Timing:
    """Inspiratory and expiratory time: cycle = 60 / RR, Te = cycle x E / (I + E), Ti = cycle - Te.

    Parameters
    ----------
    rr_per_min : float
        Respiratory rate. [1/min] 0.1-150.
    i_part, e_part : float
        The two parts of the I:E ratio (1 and 2 for 1:2). Each 0.1-10.

    References
    ----------
    expiratory_time.

    Examples
    --------
    >>> respiratory_timing(rr_per_min=20, i_part=1, e_part=2)
    Timing(cycle_s=3.0, ti_s=1.0, te_s=2.0)
    >>> respiratory_timing(rr_per_min=12, i_part=1, e_part=3).te_s
    3.75
    """
    rr = require_number("rr_per_min", rr_per_min, low=0.1, high=150.0, unit="/min")
    i = require_number("i_part", i_part, low=0.1, high=10.0)
    e = require_number("e_part", e_part, low=0.1, high=10.0)
    cycle = 60.0 / rr
    te = cycle * e / (i + e)
    return Timing(cycle, cycle - te, te)


def parse_ie_ratio(text: str) -> tuple[float, float]:
    """Parse an I:E ratio written ``"1:2"`` (also ``"1:2.5"``, ``"2:1"``) into its two parts.

    Raises
    ------
    InputError
        ``bad_request`` when the text is not two positive numbers separated by ``:``.

    Examples
    --------
    >>> parse_ie_ratio("1:2.5")
    (1.0, 2.5)
    """
    parts = text.split(":") if isinstance(text, str) else []
    try:
        i, e = (float(p) for p in parts)
    except ValueError:
        i = e = float("nan")
    if len(parts) != 2 or not (0.1 <= i <= 10.0 and 0.1 <= e <= 10.0):
        raise InputError(
            "ie_ratio",
            text,
            "must be written I:E with two numbers from 0.1 to 10",
            "For example '1:2' (expiration twice as long as inspiration).",
            code="bad_request",
        )
    return i, e


class ToTarget(NamedTuple):
    """Ventilation that reaches a target PaCO2 with CO2 output unchanged."""

    ve_l_min: float  # VE scaled, VD/VT assumed constant
    va_now_l_min: float  # (VT - VD) x RR now
    va_new_l_min: float  # VA_now x PaCO2 / target
    rr_at_same_vt: float  # VA_new / (VT - VD)
    vt_at_same_rr_ml: float  # VA_new / RR + VD


def to_target(
    *, vt_ml: float, rr_per_min: float, vd_ml: float, paco2_mmhg: float, target_paco2_mmhg: float
) -> ToTarget:
    """Ventilator change to reach a target PaCO2 (VCO2 constant).

    VE_new = VE x PaCO2 / target (VD/VT constant). Fixed-VD form: VA_now = (VT - VD) x RR,
    VA_new = VA_now x PaCO2 / target; RR_new = VA_new / (VT - VD) at the same VT, or
    VT_new = VA_new / RR + VD at the same RR. The fixed-VD forms are better: raising RR at a fixed VT
    raises dead-space ventilation with it, raising VT lowers VD/VT.

    Parameters
    ----------
    vt_ml, rr_per_min, vd_ml : float
        Current tidal volume [mL], rate [1/min] and dead space [mL] (VD < VT).
    paco2_mmhg : float
        Current PaCO2. [mmHg] 5-250.
    target_paco2_mmhg : float
        Target PaCO2. [mmHg] 15-120.

    References
    ----------
    to_target_pco2, alveolar_ventilation.

    Examples
    --------
    >>> r = to_target(vt_ml=500, rr_per_min=16, vd_ml=150, paco2_mmhg=60, target_paco2_mmhg=45)
    >>> round(r.ve_l_min, 2), round(r.va_new_l_min, 2), round(r.rr_at_same_vt, 1), round(r.vt_at_same_rr_ml)
    (10.67, 7.47, 21.3, 617)
    """
    va_now = alveolar_ventilation(vt_ml=vt_ml, vd_ml=vd_ml, rr_per_min=rr_per_min)
    paco2 = require_number("paco2_mmhg", paco2_mmhg, low=PCO2_RANGE_MMHG[0], high=PCO2_RANGE_MMHG[1])
    target = require_number("target_paco2_mmhg", target_paco2_mmhg, low=15.0, high=120.0, unit="mmHg")
    ratio = paco2 / target
    ve_new = minute_ventilation(vt_ml=vt_ml, rr_per_min=rr_per_min) * ratio
    va_new = va_now * ratio
    rr_new = va_new * 1000.0 / (vt_ml - vd_ml)
    vt_new = va_new * 1000.0 / rr_per_min + vd_ml
    return ToTarget(ve_new, va_now, va_new, rr_new, vt_new)


CAUSES = ("ventilation", "dead_space", "co2_production")


class Mechanisms(NamedTuple):
    """Decomposition of a PaCO2 against a reference state (see :func:`co2_mechanisms`)."""

    shares: dict | None  # cause -> fraction of the rise, over the causes that raise PaCO2; sums to 1
    log_terms: dict  # cause -> ln contribution (positive raises, negative lowers PaCO2)
    raising: tuple  # causes with a positive term
    lowering: tuple  # causes with a negative term
    residual_log: float  # ln(PaCO2 measured / PaCO2 of the model); 0 when VD/VT was derived
    ve_reference_l_min: float
    paco2_model_mmhg: float
    paco2_if_normal_mmhg: dict  # cause -> PaCO2 with that cause alone at its reference value


def co2_mechanisms(
    *,
    paco2_mmhg: float,
    ve_l_min: float,
    vd_vt: float,
    vco2_ml_min: float,
    vco2_reference_ml_min: float,
    vd_vt_reference: float = VD_VT_REFERENCE,
    paco2_reference_mmhg: float = PACO2_REFERENCE_MMHG,
) -> Mechanisms:
    """Shares of a raised PaCO2 due to low ventilation, high dead space and high CO2 production.

    The alveolar ventilation equation is multiplicative, PaCO2 = K x VCO2 / (VE x (1 - VD/VT)), so
    its logarithm splits a ratio to a reference state exactly and independently of order::

        ln(PaCO2_model / PaCO2_ref) = ln(VCO2 / VCO2_ref)              co2_production
                                    + ln(VE_ref / VE)                  ventilation
                                    + ln((1 - VDVT_ref) / (1 - VDVT))  dead_space

    with VE_ref = K x VCO2_ref / (PaCO2_ref x (1 - VDVT_ref)), the ventilation that gives exactly
    PaCO2_ref with the reference VCO2 and VD/VT (so the reference values reproduce PaCO2_ref and no
    residual arises from them). When VD/VT was derived from the same PaCO2, VE and VCO2 the model
    equals the measured PaCO2; when all three were measured independently the mismatch is returned
    as ``residual_log`` = ln(PaCO2 / PaCO2_model) and is not shared out.

    A share is the fraction of the summed positive terms: causes that lower PaCO2 (negative terms)
    are listed in ``lowering`` with share 0 and are not netted against the others. ``shares`` is
    None when no term is positive. ``paco2_if_normal_mmhg`` gives PaCO2 x exp(-term): the PaCO2 if
    that cause alone were at its reference value.

    Parameters
    ----------
    paco2_mmhg : float
        Measured PaCO2. [mmHg] 5-250.
    ve_l_min : float
        Minute ventilation. [L/min] 0.2-120.
    vd_vt : float
        Physiological dead-space fraction. [1] strictly between 0 and 1.
    vco2_ml_min, vco2_reference_ml_min : float
        CO2 output and its reference (resting, afebrile, by body size). [mL/min] 10-5000.
    vd_vt_reference : float
        Reference VD/VT. [1] 0.30 default (normal 0.2-0.35).
    paco2_reference_mmhg : float
        Reference PaCO2. [mmHg] 40 default.

    References
    ----------
    co2_log_shares, alveolar_ventilation, nunn1960, normal_ventilation.

    Examples
    --------
    Ventilation halved, everything else at reference: all of the rise is due to ventilation.

    >>> ve_ref = K_CO2 * 200 / (40 * 0.7)
    >>> m = co2_mechanisms(paco2_mmhg=80, ve_l_min=ve_ref / 2, vd_vt=0.3, vco2_ml_min=200,
    ...                    vco2_reference_ml_min=200)
    >>> {k: round(v, 6) for k, v in m.shares.items()}
    {'ventilation': 1.0, 'dead_space': 0.0, 'co2_production': 0.0}
    """
    paco2 = require_number("paco2_mmhg", paco2_mmhg, low=PCO2_RANGE_MMHG[0], high=PCO2_RANGE_MMHG[1])
    ve = require_number("ve_l_min", ve_l_min, low=0.2, high=120.0, unit="L/min")
    d = require_number("vd_vt", vd_vt, low=0.0, high=1.0)
    if not 0.0 < d < 1.0:
        raise InputError("vd_vt", vd_vt, "must be strictly between 0 and 1", code="out_of_range")
    vco2 = require_number("vco2_ml_min", vco2_ml_min, low=VCO2_RANGE_ML_MIN[0], high=VCO2_RANGE_ML_MIN[1])
    vco2_ref = require_number(
        "vco2_reference_ml_min", vco2_reference_ml_min, low=VCO2_RANGE_ML_MIN[0], high=VCO2_RANGE_ML_MIN[1]
    )
    d_ref = require_number("vd_vt_reference", vd_vt_reference, low=0.05, high=0.6)
    p_ref = require_number("paco2_reference_mmhg", paco2_reference_mmhg, low=20.0, high=60.0, unit="mmHg")

    ve_ref = K_CO2 * vco2_ref / (p_ref * (1.0 - d_ref))
    terms = {
        "ventilation": math.log(ve_ref / ve),
        "dead_space": math.log((1.0 - d_ref) / (1.0 - d)),
        "co2_production": math.log(vco2 / vco2_ref),
    }
    model = K_CO2 * vco2 / (ve * (1.0 - d))
    residual = math.log(paco2 / model)
    eps = 1e-12
    raising = tuple(c for c in CAUSES if terms[c] > eps)
    lowering = tuple(c for c in CAUSES if terms[c] < -eps)
    total = sum(terms[c] for c in raising)
    shares = {c: (terms[c] / total if c in raising else 0.0) for c in CAUSES} if raising else None
    if_normal = {c: paco2 * math.exp(-terms[c]) for c in CAUSES}
    return Mechanisms(shares, terms, raising, lowering, residual, ve_ref, model, if_normal)


class EtCO2Track(NamedTuple):
    """PaCO2 tracked from end-tidal CO2 [mmHg]."""

    gradient_mmhg: float
    paco2_now_mmhg: float


def pco2_from_etco2(*, paco2_mmhg: float, etco2_mmhg: float, etco2_now_mmhg: float) -> EtCO2Track:
    """Current PaCO2 from a later EtCO2, assuming the paired arterial-end-tidal gradient is unchanged.

    gradient = PaCO2 - EtCO2 (paired); PaCO2_now = EtCO2_now + gradient. The gradient changes with
    dead space, cardiac output, position and ventilator settings: confirm with a blood gas.

    References
    ----------
    etco2_gradient.

    Examples
    --------
    >>> pco2_from_etco2(paco2_mmhg=60, etco2_mmhg=50, etco2_now_mmhg=42)
    EtCO2Track(gradient_mmhg=10.0, paco2_now_mmhg=52.0)
    """
    paco2 = require_number("paco2_mmhg", paco2_mmhg, low=PCO2_RANGE_MMHG[0], high=PCO2_RANGE_MMHG[1])
    et = require_number("etco2_mmhg", etco2_mmhg, low=1.0, high=PCO2_RANGE_MMHG[1], unit="mmHg")
    now = require_number("etco2_now_mmhg", etco2_now_mmhg, low=1.0, high=PCO2_RANGE_MMHG[1], unit="mmHg")
    gradient = paco2 - et
    return EtCO2Track(gradient, now + gradient)
