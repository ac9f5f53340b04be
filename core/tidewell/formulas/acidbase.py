"""Acid-base arithmetic: one function per published model.

Henderson-Hasselbalch and consistency

===========================================  =================================================================
``ph_henderson_hasselbalch``                 pH = 6.1 + log10(HCO3 / (0.0307 x PCO2))
``hco3_henderson_hasselbalch``               HCO3 = 0.0307 x PCO2 x 10^(pH - 6.1) [mmol/L]
``hydrogen_ion_from_ph``                     [H+] = 10^(9 - pH) [nmol/L]
``ph_from_hydrogen_ion``                     pH = 9 - log10([H+] nmol/L)
``hydrogen_ion_kassirer_bleich``             [H+] = 24 x PCO2 / HCO3 [nmol/L]
``check_consistency``                        reported pH against the pH from PCO2 and HCO3 (band 0.03)
===========================================  =================================================================

Base excess

===========================================  =================================================================
``standard_base_excess_clsi2009``            SBE = HCO3 - 24.8 + 16.2 (pH - 7.40) (the default)
``standard_base_excess_siggaard_andersen1977``  0.9287 (HCO3 - 24.4 + 14.83 (pH - 7.40))
``base_excess_blood_van_slyke``              (1 - 0.014 Hb)[(HCO3 - 24.8) + (1.43 Hb + 7.7)(pH - 7.40)]
``standard_base_excess_van_slyke_hb5``       the Van Slyke form at Hb 5 g/dL (extracellular-fluid SBE)
``base_excess_lang_zander2002``              the Zander form with its oxygen-saturation term
===========================================  =================================================================

Expected compensation (physiological, "Boston" rules) and fraction acute

===========================================  =================================================================
``expected_pco2_winters``                    1.5 x HCO3 + 8 +/- 2 [mmHg] (metabolic acidosis)
``expected_pco2_metabolic_alkalosis``        40 + 0.7 (HCO3 - 24) +/- 5 [mmHg] (slope settable: 0.6, 0.75)
``expected_hco3_linear``                     24 + slope x (PCO2 - 40) / 10 [mmol/L] (any published slope)
``expected_hco3_respiratory_acidosis``       acute 1 (band 1-2) and chronic 3.5 (band 3-5) per 10 mmHg
``expected_hco3_respiratory_alkalosis``      acute 2 (band 2-2.5) and chronic 4 (band 4-5) per 10 mmHg
``expected_ph_respiratory_acidosis``         7.40 - 0.008 dPCO2 (acute), 7.40 - 0.003 dPCO2 (chronic)
``fraction_acute_hco3``                      (HCO3_chronic - HCO3) / (HCO3_chronic - HCO3_acute)
``fraction_acute_ph``                        ((7.40 - pH) - 0.003 dPCO2) / (0.005 dPCO2)
``chronicity_from_fraction``                 >= 0.8 acute, <= 0.2 chronic, between acute-on-chronic
``baseline_pco2_from_hco3``                  chronic baseline PaCO2 estimated by inverting the two rules
``expected_hco3_with_baseline``              HCO3 expected on top of a known chronic baseline PaCO2
``pco2_for_ph_acute``                        PCO2 at which pH reaches a given value after an acute change
===========================================  =================================================================

Copenhagen (standard base excess) rules, Schlichtig 1998

===========================================  =================================================================
``expected_pco2_sbe_metabolic_acidosis``     PCO2 = 40 + SBE [mmHg]
``expected_pco2_sbe_metabolic_alkalosis``    PCO2 = 40 + 0.6 SBE [mmHg]
``expected_sbe_respiratory``                 acute SBE 0 (+/- 3); chronic SBE = 0.4 (PCO2 - 40) [mmol/L]
===========================================  =================================================================

Gaps

===========================================  =================================================================
``anion_gap``                                Na - (Cl + HCO3)
``anion_gap_with_potassium``                 Na + K - (Cl + HCO3)
``anion_gap_albumin_corrected_figge1998``    AG + 2.5 (normal albumin - albumin) [g/dL]
``delta_ratio``                              (AG - 12) / (24 - HCO3)
``delta_gap``                                (AG - 12) - (24 - HCO3)
``delta_ratio_band_brandis``                 < 0.4, 0.4-0.8, 0.8-2, > 2 as words
``delta_gap_reading``                        < -6, -6..+6, > +6 as words
``osmolality_calculated_si``                 2 Na + glucose + urea [mOsm/kg]
``osmolar_gap``                              measured - calculated [mOsm/kg]
===========================================  =================================================================

Stewart (physicochemical) approach

===========================================  =================================================================
``strong_ion_difference_apparent``           Na + K + 2 Ca + 2 Mg - Cl - lactate [mEq/L]
``albumin_charge_figge``                     albumin g/L x (0.123 pH - 0.631) [mEq/L]
``phosphate_charge_figge``                   phosphate mmol/L x (0.309 pH - 0.469) [mEq/L]
``strong_ion_difference_effective``          HCO3 + albumin charge + phosphate charge [mEq/L]
``strong_ion_gap``                           SIDa - SIDe [mEq/L]
``base_excess_partition_story2016``          Na-Cl (Na - Cl - 35), albumin 0.25 (42 - alb g/L), lactate, rest
``base_excess_partition_story2004``          Na-Cl (Na - Cl - 38), albumin, rest including lactate
===========================================  =================================================================

Conventions (henderson1908; nccls1994): pK' 6.1 with CO2 solubility 0.0307 mmol/L/mmHg; normal
anchors PaCO2 40 mmHg, HCO3 24 mmol/L, pH 7.40, anion gap 12 mmol/L, albumin 4.0 g/dL (user-settable).
Pressures are mmHg. Every rule is an empirical adult rule: none is validated for neonates, pregnancy or
non-steady states. Functions validate their arguments with ``require_number`` (``InputError``) and never
return NaN.

The linear pH rules for respiratory acidosis drift at large rises in PaCO2 (berend2014): for PaCO2
80 mmHg with acute buffering (HCO3 28) Henderson-Hasselbalch gives pH 7.157 where 7.40 - 0.008 x 40 gives
7.08. Above a rise of about 30 mmHg the HCO3 rules (or the pH computed from the expected HCO3) are the ones to
trust; ``fraction_acute_ph`` says so in its Notes and the blood_gas report says so in a finding.
"""

from __future__ import annotations

import math
from typing import NamedTuple

from ..arrays import NAN, div, log10, maximum, minimum, where
from ..errors import InputError, require_number

#: apparent pK of the CO2/HCO3 system in plasma at 37 degC (henderson1908; nccls1994)
PK_PRIME = 6.1
#: CO2 solubility in plasma at 37 degC [mmol/L per mmHg] (NCCLS/Siggaard-Andersen lineage)
CO2_SOLUBILITY = 0.0307
#: Kassirer-Bleich constant [nmol/L x mmol/L per mmHg]; 10^-6.1 x 0.0307 x 1e9 = 24.39, rounded to 24
KASSIRER_BLEICH_K = 24.0
#: normal anchors (acid_base_normal_ranges)
NORMAL_PCO2_MMHG = 40.0
NORMAL_HCO3_MMOL_L = 24.0
NORMAL_PH = 7.40
NORMAL_ANION_GAP_MMOL_L = 12.0
NORMAL_ALBUMIN_G_DL = 4.0
#: band for the consistency check [pH units] (common practice)
CONSISTENCY_BAND_PH = 0.03

# accepted ranges (widened where a derived value may legitimately lie outside)
_PH = (6.5, 8.0)
_PCO2 = (1.0, 300.0)
_HCO3 = (0.5, 80.0)


class Consistency(NamedTuple):
    """Result of :func:`check_consistency`."""

    ph_computed: float  #: pH from PCO2 and HCO3 (Henderson-Hasselbalch)
    ph_difference: float  #: computed minus reported pH
    h_measured_nmol_l: float  #: [H+] from the reported pH
    h_kassirer_nmol_l: float  #: [H+] from 24 x PCO2 / HCO3
    consistent: bool  #: |difference| <= band


class Expected(NamedTuple):
    """An expected value with the band around it (same unit as the value)."""

    value: float
    low: float
    high: float


class RespiratoryExpectation(NamedTuple):
    """Expected HCO3 for a respiratory disorder: acute and chronic, each with its band of published slopes."""

    acute: Expected
    chronic: Expected


class PhRules(NamedTuple):
    """pH expected from the linear rules for respiratory acidosis."""

    acute: float
    chronic: float


class SbeVariants(NamedTuple):
    """The published standard-base-excess variants [mmol/L]; blood and Zander need Hb (None without)."""

    clsi: float
    siggaard_andersen: float
    van_slyke_hb5: float
    blood_van_slyke: float | None
    zander: float | None


class StoryPartition2016(NamedTuple):
    """Story 2016 simplified Fencl-Stewart partition of SBE [mEq/L]."""

    na_cl: float
    albumin: float
    lactate: float
    unmeasured: float


class StoryPartition2004(NamedTuple):
    """Story, Morimatsu & Bellomo 2004 partition [mEq/L]: lactate sits in the unmeasured residual."""

    na_cl: float
    albumin: float
    unmeasured_including_lactate: float


# -- Henderson-Hasselbalch ----------------------------------------------------------------------------------


def ph_henderson_hasselbalch(*, hco3_mmol_l: float, pco2_mmhg: float) -> float:
    """pH from HCO3 and PCO2 (Henderson-Hasselbalch).

    pH = 6.1 + log10(HCO3 / (0.0307 x PCO2)).

    Parameters
    ----------
    hco3_mmol_l : float
        Plasma bicarbonate. [mmol/L] Accepted 0.5-80.
    pco2_mmhg : float
        Carbon dioxide tension. [mmHg] Accepted 1-300.

    Returns
    -------
    float
        pH (not range-checked: a value far from 6.5-8.0 means the inputs do not belong together).

    Notes
    -----
    pK' drifts with temperature and at extreme pH; outside pH 6.9-7.7 expect errors of a few hundredths.
    The normal triple 7.40/40/24 gives 7.391 with these constants (henderson1908; nccls1994).

    References
    ----------
    henderson1908 (equation); nccls1994 (S = 0.0307, pK' 6.1 convention).

    Examples
    --------
    >>> round(ph_henderson_hasselbalch(hco3_mmol_l=24, pco2_mmhg=40), 3)
    7.391
    """
    hco3 = require_number("hco3_mmol_l", hco3_mmol_l, low=_HCO3[0], high=_HCO3[1], unit="mmol/L")
    pco2 = require_number("pco2_mmhg", pco2_mmhg, low=_PCO2[0], high=_PCO2[1], unit="mmHg")
    return _ph_hh(hco3, pco2)


def hco3_henderson_hasselbalch(*, ph: float, pco2_mmhg: float) -> float:
    """HCO3 from pH and PCO2 (Henderson-Hasselbalch), as a blood-gas analyser derives it.

    HCO3 = 0.0307 x PCO2 x 10^(pH - 6.1).

    Parameters
    ----------
    ph : float
        pH at 37 degC. Accepted 6.5-8.0.
    pco2_mmhg : float
        Carbon dioxide tension. [mmHg] Accepted 1-300.

    Returns
    -------
    float
        Bicarbonate. [mmol/L]

    References
    ----------
    henderson1908; nccls1994.

    Examples
    --------
    >>> round(hco3_henderson_hasselbalch(ph=7.25, pco2_mmhg=60), 4)
    26.0189
    """
    ph_ = require_number("ph", ph, low=_PH[0], high=_PH[1])
    pco2 = require_number("pco2_mmhg", pco2_mmhg, low=_PCO2[0], high=_PCO2[1], unit="mmHg")
    return _hco3_hh(ph_, pco2)


def hydrogen_ion_from_ph(*, ph: float) -> float:
    """Hydrogen-ion concentration from pH: [H+] = 10^(9 - pH). [nmol/L]

    Parameters
    ----------
    ph : float
        Accepted 6.5-8.0.

    References
    ----------
    kassirer1965.

    Examples
    --------
    >>> round(hydrogen_ion_from_ph(ph=7.40), 4)
    39.8107
    """
    ph_ = require_number("ph", ph, low=_PH[0], high=_PH[1])
    return _h_from_ph(ph_)


def ph_from_hydrogen_ion(*, h_nmol_l: float) -> float:
    """pH from hydrogen-ion concentration: pH = 9 - log10([H+]).

    Parameters
    ----------
    h_nmol_l : float
        [H+]. [nmol/L] Accepted 1-1000.

    References
    ----------
    kassirer1965.

    Examples
    --------
    >>> round(ph_from_hydrogen_ion(h_nmol_l=48.0), 4)
    7.3188
    """
    h = require_number("h_nmol_l", h_nmol_l, low=1.0, high=1000.0, unit="nmol/L")
    return 9.0 - math.log10(h)


def hydrogen_ion_kassirer_bleich(*, pco2_mmhg: float, hco3_mmol_l: float) -> float:
    """Hydrogen-ion concentration by the Kassirer-Bleich relation: [H+] = 24 x PCO2 / HCO3. [nmol/L]

    The 24 is 10^(-6.1) x 0.0307 x 1e9 = 24.39 rounded, as published.

    Parameters
    ----------
    pco2_mmhg : float
        [mmHg] Accepted 1-300.
    hco3_mmol_l : float
        [mmol/L] Accepted 0.5-80.

    References
    ----------
    kassirer1965.

    Examples
    --------
    >>> hydrogen_ion_kassirer_bleich(pco2_mmhg=60, hco3_mmol_l=30)
    48.0
    """
    pco2 = require_number("pco2_mmhg", pco2_mmhg, low=_PCO2[0], high=_PCO2[1], unit="mmHg")
    hco3 = require_number("hco3_mmol_l", hco3_mmol_l, low=_HCO3[0], high=_HCO3[1], unit="mmol/L")
    return _h_kassirer(pco2, hco3)


def check_consistency(
    *, ph: float, pco2_mmhg: float, hco3_mmol_l: float, band_ph: float = CONSISTENCY_BAND_PH
) -> Consistency:
    """Is a reported pH/PCO2/HCO3 triple internally consistent?

    pH_computed = 6.1 + log10(HCO3 / (0.0307 x PCO2)); consistent when |pH_computed - pH| <= 0.03.
    The Kassirer-Bleich [H+] = 24 x PCO2 / HCO3 is returned beside the measured [H+] = 10^(9 - pH).

    Parameters
    ----------
    ph : float
        Reported pH. Accepted 6.5-8.0.
    pco2_mmhg : float
        Reported PCO2. [mmHg] Accepted 1-300.
    hco3_mmol_l : float
        Reported HCO3. [mmol/L] Accepted 0.5-80.
    band_ph : float
        Tolerance. [pH units] Accepted 0.005-0.2; default 0.03 (common practice).

    Returns
    -------
    Consistency

    Notes
    -----
    Analysers derive HCO3 from pH and PCO2, so a failure nearly always means a transcription error, mixed
    samples or a chemistry-panel total CO2 entered as HCO3.

    References
    ----------
    henderson1908; kassirer1965; consistency_band.

    Examples
    --------
    >>> c = check_consistency(ph=7.30, pco2_mmhg=40, hco3_mmol_l=28)
    >>> round(c.ph_computed, 3), round(c.ph_difference, 3), round(c.h_kassirer_nmol_l, 2), c.consistent
    (7.458, 0.158, 34.29, False)
    """
    ph_ = require_number("ph", ph, low=_PH[0], high=_PH[1])
    band = require_number("band_ph", band_ph, low=0.005, high=0.2)
    hco3 = require_number("hco3_mmol_l", hco3_mmol_l, low=_HCO3[0], high=_HCO3[1], unit="mmol/L")
    pco2 = require_number("pco2_mmhg", pco2_mmhg, low=_PCO2[0], high=_PCO2[1], unit="mmHg")
    return _consistency(ph_, pco2, hco3, band)


# -- base excess --------------------------------------------------------------------------------------------


def _ph_hco3(ph: float, hco3_mmol_l: float) -> tuple[float, float]:
    return (
        require_number("ph", ph, low=_PH[0], high=_PH[1]),
        require_number("hco3_mmol_l", hco3_mmol_l, low=_HCO3[0], high=_HCO3[1], unit="mmol/L"),
    )


def standard_base_excess_clsi2009(*, ph: float, hco3_mmol_l: float) -> float:
    """Standard base excess (extracellular fluid, cBase(Ecf)), CLSI form: the default.

    SBE = HCO3 - 24.8 + 16.2 x (pH - 7.40).

    Parameters
    ----------
    ph : float
        Accepted 6.5-8.0.
    hco3_mmol_l : float
        [mmol/L] Accepted 0.5-80.

    Returns
    -------
    float
        [mmol/L]; normal -2 to +2 (some texts -3 to +3).

    References
    ----------
    nccls1994 (form verified in Vet Med Sci 2018 Table 1).

    Examples
    --------
    >>> round(standard_base_excess_clsi2009(ph=7.25, hco3_mmol_l=13), 2)
    -14.23
    """
    ph_, hco3 = _ph_hco3(ph, hco3_mmol_l)
    return _sbe_clsi(ph_, hco3)


def standard_base_excess_siggaard_andersen1977(*, ph: float, hco3_mmol_l: float) -> float:
    """Standard base excess, Siggaard-Andersen's published extracellular-fluid form.

    SBE = 0.9287 x (HCO3 - 24.4 + 14.83 x (pH - 7.40)).

    Parameters
    ----------
    ph : float
        Accepted 6.5-8.0.
    hco3_mmol_l : float
        [mmol/L] Accepted 0.5-80.

    Returns
    -------
    float
        [mmol/L]

    References
    ----------
    siggaard1971.

    Examples
    --------
    >>> round(standard_base_excess_siggaard_andersen1977(ph=7.25, hco3_mmol_l=13), 4)
    -12.6531
    """
    ph_, hco3 = _ph_hco3(ph, hco3_mmol_l)
    return _sbe_siggaard(ph_, hco3)


def base_excess_blood_van_slyke(*, ph: float, hco3_mmol_l: float, hb_g_dl: float) -> float:
    """Whole-blood base excess (cBase(B)), Van Slyke equation in its CLSI g/dL form.

    BE(B) = (1 - 0.014 x Hb) x [(HCO3 - 24.8) + (1.43 x Hb + 7.7) x (pH - 7.40)].

    Parameters
    ----------
    ph : float
        Accepted 6.5-8.0.
    hco3_mmol_l : float
        [mmol/L] Accepted 0.5-80.
    hb_g_dl : float
        Haemoglobin. [g/dL] Accepted 1-25.

    Returns
    -------
    float
        [mmol/L]

    Notes
    -----
    1.43 and 0.014 are Siggaard-Andersen's mmol/L coefficients (2.3, 0.023) x 0.6206.

    References
    ----------
    siggaard1971; nccls1994.

    Examples
    --------
    >>> round(base_excess_blood_van_slyke(ph=7.25, hco3_mmol_l=13, hb_g_dl=15), 4)
    -12.7763
    """
    ph_, hco3 = _ph_hco3(ph, hco3_mmol_l)
    hb = require_number("hb_g_dl", hb_g_dl, low=1.0, high=25.0, unit="g/dL")
    return _be_van_slyke(ph_, hco3, hb)


def standard_base_excess_van_slyke_hb5(*, ph: float, hco3_mmol_l: float) -> float:
    """Standard base excess as the Van Slyke equation evaluated at Hb 5 g/dL (the diluted ECF haemoglobin).

    SBE = (1 - 0.014 x 5) x [(HCO3 - 24.8) + (1.43 x 5 + 7.7) x (pH - 7.40)].

    Parameters
    ----------
    ph : float
        Accepted 6.5-8.0.
    hco3_mmol_l : float
        [mmol/L] Accepted 0.5-80.

    References
    ----------
    siggaard1971; nccls1994.

    Examples
    --------
    >>> round(standard_base_excess_van_slyke_hb5(ph=7.25, hco3_mmol_l=13), 4)
    -13.0456
    """
    return base_excess_blood_van_slyke(ph=ph, hco3_mmol_l=hco3_mmol_l, hb_g_dl=5.0)


def base_excess_lang_zander2002(
    *, ph: float, pco2_mmhg: float, hb_g_dl: float, so2_fraction: float = 1.0
) -> float:
    """Base excess, Zander form (with the oxygen-saturation term).

    BE = (1 - 0.0143 Hb) x [(0.0304 x PCO2 x 10^(pH - 6.1) - 24.26) + (9.5 + 1.63 Hb)(pH - 7.4)]
    - 0.2 x Hb x (1 - SO2).

    Parameters
    ----------
    ph : float
        Accepted 6.5-8.0.
    pco2_mmhg : float
        [mmHg] Accepted 1-300.
    hb_g_dl : float
        [g/dL] Accepted 1-25.
    so2_fraction : float
        Oxygen saturation as a fraction. [1] Accepted 0-1; default 1.0.

    Returns
    -------
    float
        [mmol/L]

    References
    ----------
    lang2002 (abstract: the equation, and Zander the most accurate of the published variants, +/- 0.86).

    Examples
    --------
    >>> round(base_excess_lang_zander2002(ph=7.25, pco2_mmhg=30, hb_g_dl=15, so2_fraction=1.0), 4)
    -12.9373
    """
    ph_ = require_number("ph", ph, low=_PH[0], high=_PH[1])
    pco2 = require_number("pco2_mmhg", pco2_mmhg, low=_PCO2[0], high=_PCO2[1], unit="mmHg")
    hb = require_number("hb_g_dl", hb_g_dl, low=1.0, high=25.0, unit="g/dL")
    so2 = require_number("so2_fraction", so2_fraction, low=0.0, high=1.0)
    return _be_zander(ph_, pco2, hb, so2)


def sbe_variants(
    *,
    ph: float,
    hco3_mmol_l: float,
    pco2_mmhg: float,
    hb_g_dl: float | None = None,
    so2_fraction: float = 1.0,
) -> SbeVariants:
    """All base-excess variants side by side (they differ by up to about 1.5 mmol/L at SBE -14).

    Parameters
    ----------
    ph, hco3_mmol_l, pco2_mmhg : float
        As in the individual functions.
    hb_g_dl : float or None
        Haemoglobin [g/dL]; without it the whole-blood and Zander forms are None.
    so2_fraction : float
        For the Zander form. [1]

    References
    ----------
    nccls1994; siggaard1971; lang2002.

    Examples
    --------
    >>> v = sbe_variants(ph=7.25, hco3_mmol_l=13, pco2_mmhg=30)
    >>> round(v.clsi, 2), round(v.siggaard_andersen, 2), v.zander
    (-14.23, -12.65, None)
    """
    blood = zander = None
    if hb_g_dl is not None:
        blood = base_excess_blood_van_slyke(ph=ph, hco3_mmol_l=hco3_mmol_l, hb_g_dl=hb_g_dl)
        zander = base_excess_lang_zander2002(
            ph=ph, pco2_mmhg=pco2_mmhg, hb_g_dl=hb_g_dl, so2_fraction=so2_fraction
        )
    return SbeVariants(
        clsi=standard_base_excess_clsi2009(ph=ph, hco3_mmol_l=hco3_mmol_l),
        siggaard_andersen=standard_base_excess_siggaard_andersen1977(ph=ph, hco3_mmol_l=hco3_mmol_l),
        van_slyke_hb5=standard_base_excess_van_slyke_hb5(ph=ph, hco3_mmol_l=hco3_mmol_l),
        blood_van_slyke=blood,
        zander=zander,
    )


# -- expected compensation -----------------------------------------------------------------------------------


def expected_pco2_winters(*, hco3_mmol_l: float) -> Expected:
    """Expected PaCO2 in metabolic acidosis (Winters' formula).

    expected PaCO2 = 1.5 x HCO3 + 8, band +/- 2 mmHg.

    Parameters
    ----------
    hco3_mmol_l : float
        Plasma bicarbonate. [mmol/L] Accepted 0.5-80 (meaningful for a metabolic acidosis, HCO3 below 24).

    Returns
    -------
    Expected
        value, low, high in [mmHg].

    Notes
    -----
    Derived in adults with metabolic acidosis. A measured PaCO2 above the band names a concurrent
    respiratory acidosis, below it a concurrent respiratory alkalosis. Alternatives in the literature:
    1.54 x HCO3 + 8.36 +/- 2.2 (Kidney360 2022), dPaCO2 = 1.2 x dHCO3; they agree within about 3 mmHg for
    HCO3 8-20.

    References
    ----------
    albert1967.

    Examples
    --------
    >>> expected_pco2_winters(hco3_mmol_l=12)
    Expected(value=26.0, low=24.0, high=28.0)
    """
    hco3 = require_number("hco3_mmol_l", hco3_mmol_l, low=_HCO3[0], high=_HCO3[1], unit="mmol/L")
    return _winters(hco3)


def expected_pco2_metabolic_alkalosis(
    *, hco3_mmol_l: float, slope: float = 0.7, half_width_mmhg: float = 5.0
) -> Expected:
    """Expected PaCO2 in metabolic alkalosis.

    expected PaCO2 = 40 + slope x (HCO3 - 24), band +/- 5 mmHg; slope 0.7 by default.

    Parameters
    ----------
    hco3_mmol_l : float
        [mmol/L] Accepted 0.5-80.
    slope : float
        [mmHg per mmol/L] Accepted 0.4-1.0: 0.7 (Berend 2014; Kidney360 2022), 0.6 (Narins & Emmett 1980),
        0.75.
    half_width_mmhg : float
        Half width of the band. [mmHg] Accepted 0-10; default 5.

    Returns
    -------
    Expected
        [mmHg]

    References
    ----------
    berend2014; kidney360_2022; narins1980 (0.6).

    Examples
    --------
    >>> expected_pco2_metabolic_alkalosis(hco3_mmol_l=34)
    Expected(value=47.0, low=42.0, high=52.0)
    >>> round(expected_pco2_metabolic_alkalosis(hco3_mmol_l=34, slope=0.6).value, 2)
    46.0
    """
    hco3 = require_number("hco3_mmol_l", hco3_mmol_l, low=_HCO3[0], high=_HCO3[1], unit="mmol/L")
    k = require_number("slope", slope, low=0.4, high=1.0, unit="mmHg per mmol/L")
    half = require_number("half_width_mmhg", half_width_mmhg, low=0.0, high=10.0, unit="mmHg")
    return _metabolic_alkalosis_pco2(hco3, k, half)


def expected_hco3_linear(*, paco2_mmhg: float, mmol_per_10_mmhg: float) -> float:
    """Expected HCO3 for a respiratory disorder by a linear rule of the given slope.

    HCO3 = 24 + slope x (PaCO2 - 40) / 10.

    Parameters
    ----------
    paco2_mmhg : float
        [mmHg] Accepted 1-300.
    mmol_per_10_mmhg : float
        HCO3 change per 10 mmHg change in PaCO2. [mmol/L per 10 mmHg] Accepted 0-10.

    References
    ----------
    narins1980; brandis; martinu2003; berend2014.

    Examples
    --------
    >>> expected_hco3_linear(paco2_mmhg=60, mmol_per_10_mmhg=4)
    32.0
    >>> expected_hco3_linear(paco2_mmhg=25, mmol_per_10_mmhg=5)
    16.5
    """
    paco2 = require_number("paco2_mmhg", paco2_mmhg, low=_PCO2[0], high=_PCO2[1], unit="mmHg")
    slope = require_number(
        "mmol_per_10_mmhg", mmol_per_10_mmhg, low=0.0, high=10.0, unit="mmol/L per 10 mmHg"
    )
    return _hco3_linear(paco2, slope)


#: respiratory acidosis slopes [mmol/L per 10 mmHg]: (default, band low, band high)
RESP_ACIDOSIS_ACUTE = (1.0, 1.0, 2.0)
RESP_ACIDOSIS_CHRONIC = (3.5, 3.0, 5.0)
#: respiratory alkalosis slopes
RESP_ALKALOSIS_ACUTE = (2.0, 2.0, 2.5)
RESP_ALKALOSIS_CHRONIC = (4.0, 4.0, 5.0)


def expected_hco3_respiratory_acidosis(*, paco2_mmhg: float) -> RespiratoryExpectation:
    """Expected HCO3 in respiratory acidosis, acute and chronic, each with its band of published slopes.

    acute: 24 + 1 x (PaCO2 - 40)/10 (band slopes 1-2); chronic: 24 + 3.5 x (PaCO2 - 40)/10 (band 3-5).

    Parameters
    ----------
    paco2_mmhg : float
        [mmHg] Accepted 1-300 (meaningful above 45).

    Returns
    -------
    RespiratoryExpectation
        ``acute`` and ``chronic`` as ``Expected(value, low, high)`` in [mmol/L]; ``value`` uses the default
        slope.

    Notes
    -----
    Tidewell's defaults: acute 1 (Narins & Emmett; Brandis), chronic 3.5 (Narins & Emmett
    1980; Berend 2014; Kidney360 2022). The band shows the disagreement: chronic 3 (some texts), 4 (Brandis),
    about 5 (Martinu 2003, stable COPD).

    References
    ----------
    narins1980; berend2014; kidney360_2022; brandis; martinu2003.

    Examples
    --------
    >>> e = expected_hco3_respiratory_acidosis(paco2_mmhg=60)
    >>> e.acute
    Expected(value=26.0, low=26.0, high=28.0)
    >>> e.chronic
    Expected(value=31.0, low=30.0, high=34.0)
    """
    paco2 = require_number("paco2_mmhg", paco2_mmhg, low=_PCO2[0], high=_PCO2[1], unit="mmHg")
    return _respiratory_acidosis_hco3(paco2)


def expected_hco3_respiratory_alkalosis(*, paco2_mmhg: float) -> RespiratoryExpectation:
    """Expected HCO3 in respiratory alkalosis, acute and chronic, with the band of published slopes.

    acute: 24 - 2 x (40 - PaCO2)/10 (band 2-2.5); chronic: 24 - 4 x (40 - PaCO2)/10 (band 4-5).

    Parameters
    ----------
    paco2_mmhg : float
        [mmHg] Accepted 1-300 (meaningful below 35).

    Returns
    -------
    RespiratoryExpectation
        [mmol/L]

    Notes
    -----
    Chronic 4 (Berend 2014; Kidney360 2022 gives 0.41); 5 in older tables (Narins & Emmett; Brandis).

    References
    ----------
    narins1980; berend2014; kidney360_2022; brandis.

    Examples
    --------
    >>> e = expected_hco3_respiratory_alkalosis(paco2_mmhg=25)
    >>> e.acute.value, e.chronic.value, e.chronic.low
    (21.0, 18.0, 16.5)
    """
    paco2 = require_number("paco2_mmhg", paco2_mmhg, low=_PCO2[0], high=_PCO2[1], unit="mmHg")
    return _respiratory_alkalosis_hco3(paco2)


def expected_ph_respiratory_acidosis(*, paco2_mmhg: float) -> PhRules:
    """pH expected in respiratory acidosis by the linear rules.

    acute: 7.40 - 0.008 x (PaCO2 - 40); chronic: 7.40 - 0.003 x (PaCO2 - 40).

    Parameters
    ----------
    paco2_mmhg : float
        [mmHg] Accepted 1-300.

    Notes
    -----
    The rules drift at large rises: for PaCO2 80 the acute rule gives 7.08, whereas Henderson-Hasselbalch with
    the acute HCO3 (28) gives 7.157. Above a rise of about 30 mmHg prefer the HCO3 rules (berend2014).

    References
    ----------
    berend2014.

    Examples
    --------
    >>> r = expected_ph_respiratory_acidosis(paco2_mmhg=60)
    >>> round(r.acute, 3), round(r.chronic, 3)
    (7.24, 7.34)
    """
    paco2 = require_number("paco2_mmhg", paco2_mmhg, low=_PCO2[0], high=_PCO2[1], unit="mmHg")
    return _respiratory_acidosis_ph(paco2)


def fraction_acute_hco3(*, paco2_mmhg: float, hco3_mmol_l: float) -> float:
    """Fraction of a respiratory disorder that is acute, by interpolating the default HCO3 rules.

    f = (HCO3_chronic_expected - HCO3) / (HCO3_chronic_expected - HCO3_acute_expected), with the default
    slopes (acidosis 1 and 3.5, alkalosis 2 and 4 per 10 mmHg). 1 = fully acute, 0 = fully chronic; outside
    0-1 the HCO3 lies beyond both rules. Not clamped.

    Parameters
    ----------
    paco2_mmhg : float
        [mmHg] Accepted 1-300, at least 1 mmHg away from 40.
    hco3_mmol_l : float
        [mmol/L] Accepted 0.5-80.

    Notes
    -----
    With the two rules linear, f is also the share of the PaCO2 change that is acute:
    PaCO2 = 40 + (1 - f) x dPaCO2 is the chronic part (see :func:`baseline_pco2_from_hco3`).

    References
    ----------
    fraction_acute_bands; narins1980.

    Examples
    --------
    >>> round(fraction_acute_hco3(paco2_mmhg=70, hco3_mmol_l=29.7), 4)
    0.64
    """
    paco2 = require_number("paco2_mmhg", paco2_mmhg, low=_PCO2[0], high=_PCO2[1], unit="mmHg")
    hco3 = require_number("hco3_mmol_l", hco3_mmol_l, low=_HCO3[0], high=_HCO3[1], unit="mmol/L")
    if abs(paco2 - NORMAL_PCO2_MMHG) < 1.0:
        raise InputError("paco2_mmhg", paco2_mmhg, "must differ from 40 mmHg by at least 1 mmHg")
    return _fraction_acute_hco3(paco2, hco3)


def fraction_acute_ph(*, ph: float, paco2_mmhg: float) -> float:
    """Fraction of a respiratory acidosis that is acute, by interpolating the linear pH rules.

    f = [(7.40 - pH) - 0.003 x dPaCO2] / [(0.008 - 0.003) x dPaCO2], dPaCO2 = PaCO2 - 40. Not clamped.

    Parameters
    ----------
    ph : float
        Accepted 6.5-8.0.
    paco2_mmhg : float
        [mmHg] Accepted 41-300 (a rise of at least 1 mmHg).

    Notes
    -----
    The linear pH rules drift at large rises (above about 30 mmHg); there the HCO3 fraction is preferred.

    References
    ----------
    fraction_acute_bands; berend2014.

    Examples
    --------
    >>> round(fraction_acute_ph(ph=7.24, paco2_mmhg=70), 4)
    0.4667
    """
    ph_ = require_number("ph", ph, low=_PH[0], high=_PH[1])
    paco2 = require_number("paco2_mmhg", paco2_mmhg, low=41.0, high=_PCO2[1], unit="mmHg")
    return _fraction_acute_ph(ph_, paco2)


#: fraction-acute bands (common practice)
ACUTE_AT_LEAST = 0.8
CHRONIC_AT_MOST = 0.2


def chronicity_from_fraction(*, fraction_acute: float) -> str:
    """Chronicity word for a fraction acute: >= 0.8 'acute', <= 0.2 'chronic', else 'acute_on_chronic'.

    Parameters
    ----------
    fraction_acute : float
        [1] Any finite number (values beyond 0-1 take the nearer end).

    References
    ----------
    fraction_acute_bands.

    Examples
    --------
    >>> [chronicity_from_fraction(fraction_acute=f) for f in (0.9, 0.5, 0.1)]
    ['acute', 'acute_on_chronic', 'chronic']
    """
    f = require_number("fraction_acute", fraction_acute, low=-1e6, high=1e6)
    return _chronicity(f)


def baseline_pco2_from_hco3(
    *, paco2_mmhg: float, hco3_mmol_l: float, chronic_mmol_per_10_mmhg: float = 3.5
) -> float:
    """Estimate the chronic (baseline) PaCO2 of a respiratory acidosis from its HCO3.

    Model: HCO3 = 24 + c x (B - 40)/10 + 1 x (PaCO2 - B)/10, chronic slope c on the baseline rise and the
    acute slope 1 on the rise above it. Inverted: B = 40 + (HCO3 - 24 - (PaCO2 - 40)/10) / ((c - 1)/10),
    clamped to 40 <= B <= PaCO2. With c = 3.5 this is B = 40 + (1 - f) x (PaCO2 - 40), f the HCO3 fraction
    acute.

    Parameters
    ----------
    paco2_mmhg : float
        Current PaCO2. [mmHg] Accepted 41-300.
    hco3_mmol_l : float
        [mmol/L] Accepted 0.5-80.
    chronic_mmol_per_10_mmhg : float
        Chronic slope. [mmol/L per 10 mmHg] Accepted 2-6; 3.5 default, 3-5 for the band.

    Returns
    -------
    float
        Estimated baseline PaCO2 [mmHg]. An estimate: a concurrent metabolic disorder moves the HCO3 it rests
        on (an acidosis makes it too low, an alkalosis too high).

    References
    ----------
    narins1980 (slopes); fraction_acute_bands.

    Examples
    --------
    >>> round(baseline_pco2_from_hco3(paco2_mmhg=70, hco3_mmol_l=29.7), 1)
    50.8
    >>> baseline_pco2_from_hco3(paco2_mmhg=60, hco3_mmol_l=31)
    60.0
    """
    paco2 = require_number("paco2_mmhg", paco2_mmhg, low=41.0, high=_PCO2[1], unit="mmHg")
    hco3 = require_number("hco3_mmol_l", hco3_mmol_l, low=_HCO3[0], high=_HCO3[1], unit="mmol/L")
    c = require_number(
        "chronic_mmol_per_10_mmhg", chronic_mmol_per_10_mmhg, low=2.0, high=6.0, unit="mmol/L per 10 mmHg"
    )
    return _baseline_pco2(paco2, hco3, c)


def expected_hco3_with_baseline(*, paco2_mmhg: float, baseline_pco2_mmhg: float) -> float:
    """HCO3 expected for a PaCO2 on top of a known chronic baseline PaCO2.

    HCO3 = 24 + 3.5 x (B - 40)/10 (chronic compensation of the baseline, B >= 40) plus the acute change from
    the baseline: + 1 x (PaCO2 - B)/10 when PaCO2 is above it, - 2 x (B - PaCO2)/10 when below it.

    Parameters
    ----------
    paco2_mmhg : float
        [mmHg] Accepted 1-300.
    baseline_pco2_mmhg : float
        The patient's usual (chronic) PaCO2. [mmHg] Accepted 1-300 (below 40 counts as 40).

    References
    ----------
    narins1980; berend2014.

    Examples
    --------
    >>> expected_hco3_with_baseline(paco2_mmhg=70, baseline_pco2_mmhg=50)
    29.5
    """
    paco2 = require_number("paco2_mmhg", paco2_mmhg, low=_PCO2[0], high=_PCO2[1], unit="mmHg")
    base = require_number("baseline_pco2_mmhg", baseline_pco2_mmhg, low=_PCO2[0], high=_PCO2[1], unit="mmHg")
    return _hco3_on_baseline(paco2, base)


def pco2_for_ph_acute(*, ph_target: float, paco2_mmhg: float, hco3_mmol_l: float) -> float | None:
    """PaCO2 at which the pH would reach ``ph_target`` after an acute change from the present state.

    An acute fall in PaCO2 lowers HCO3 by 1 mmol/L per 10 mmHg (the acute rule), so the HCO3 at PaCO2 P is
    HCO3_now - 0.1 x (PaCO2_now - P); solving 6.1 + log10(HCO3(P) / (0.0307 P)) = pH_target gives
    P = (HCO3_now - 0.1 x PaCO2_now) / (0.0307 x 10^(pH_target - 6.1) - 0.1).

    Parameters
    ----------
    ph_target : float
        Accepted 7.0-7.8.
    paco2_mmhg : float
        Present PaCO2. [mmHg] Accepted 1-300.
    hco3_mmol_l : float
        Present HCO3. [mmol/L] Accepted 0.5-80.

    Returns
    -------
    float or None
        [mmHg]; None when no positive PaCO2 reaches the target (HCO3 too low for that pH).

    Notes
    -----
    Derived here from the cited equations. Used as the "alkalaemia floor": with ``ph_target`` 7.45 it is the
    PaCO2 below which a quick reduction would leave the blood alkalaemic, because the renal HCO3 gain of
    chronic hypercapnia takes days to unwind (post-hypercapnic metabolic alkalosis).

    References
    ----------
    henderson1908; narins1980 (acute rule).

    Examples
    --------
    >>> round(pco2_for_ph_acute(ph_target=7.45, paco2_mmhg=70, hco3_mmol_l=29.7), 1)
    38.7
    """
    target = require_number("ph_target", ph_target, low=7.0, high=7.8)
    paco2 = require_number("paco2_mmhg", paco2_mmhg, low=_PCO2[0], high=_PCO2[1], unit="mmHg")
    hco3 = require_number("hco3_mmol_l", hco3_mmol_l, low=_HCO3[0], high=_HCO3[1], unit="mmol/L")
    value = _pco2_for_ph_acute(target, paco2, hco3)
    return None if value != value else value


# -- Copenhagen rules ----------------------------------------------------------------------------------------


def expected_pco2_sbe_metabolic_acidosis(*, sbe_mmol_l: float) -> float:
    """Expected PaCO2 in metabolic acidosis by the SBE rule: PaCO2 = 40 + SBE. [mmHg]

    Parameters
    ----------
    sbe_mmol_l : float
        Standard base excess. [mmol/L] Accepted -40 to 40.

    References
    ----------
    schlichtig1998; berend2018.

    Examples
    --------
    >>> expected_pco2_sbe_metabolic_acidosis(sbe_mmol_l=-12)
    28.0
    """
    sbe = require_number("sbe_mmol_l", sbe_mmol_l, low=-40.0, high=40.0, unit="mmol/L")
    return _pco2_sbe_acidosis(sbe)


def expected_pco2_sbe_metabolic_alkalosis(*, sbe_mmol_l: float) -> float:
    """Expected PaCO2 in metabolic alkalosis by the SBE rule: PaCO2 = 40 + 0.6 x SBE. [mmHg]

    Parameters
    ----------
    sbe_mmol_l : float
        [mmol/L] Accepted -40 to 40.

    References
    ----------
    schlichtig1998; berend2018.

    Examples
    --------
    >>> expected_pco2_sbe_metabolic_alkalosis(sbe_mmol_l=10)
    46.0
    """
    sbe = require_number("sbe_mmol_l", sbe_mmol_l, low=-40.0, high=40.0, unit="mmol/L")
    return _pco2_sbe_alkalosis(sbe)


def expected_sbe_respiratory(*, paco2_mmhg: float) -> tuple[float, float]:
    """SBE expected in a respiratory disorder: acute 0 (+/- 3), chronic 0.4 x (PaCO2 - 40). [mmol/L]

    Parameters
    ----------
    paco2_mmhg : float
        [mmHg] Accepted 1-300.

    Returns
    -------
    (acute, chronic) : tuple of float

    Notes
    -----
    With the CLSI SBE the chronic rule corresponds to HCO3 rising about 4.5-5.2 mmol/L per 10 mmHg
    (PaCO2 50-80), nearer the Brandis/Martinu slopes than the Boston 3.5.

    References
    ----------
    schlichtig1998; berend2018.

    Examples
    --------
    >>> expected_sbe_respiratory(paco2_mmhg=60)
    (0.0, 8.0)
    """
    paco2 = require_number("paco2_mmhg", paco2_mmhg, low=_PCO2[0], high=_PCO2[1], unit="mmHg")
    return _sbe_respiratory(paco2)


# -- gaps ----------------------------------------------------------------------------------------------------


def _ion(field: str, value: float, low: float, high: float) -> float:
    return require_number(field, value, low=low, high=high, unit="mmol/L")


def anion_gap(*, na_mmol_l: float, cl_mmol_l: float, hco3_mmol_l: float) -> float:
    """Anion gap without potassium: AG = Na - (Cl + HCO3). [mmol/L]

    Parameters
    ----------
    na_mmol_l : float
        [mmol/L] Accepted 100-190.
    cl_mmol_l : float
        [mmol/L] Accepted 60-150.
    hco3_mmol_l : float
        [mmol/L] Accepted 0.5-80.

    Notes
    -----
    Normal about 12 (8-12; analyser-dependent, some 3-11). Lithium, IgG paraproteins and bromide lower it.

    References
    ----------
    oh1977; kraut2007.

    Examples
    --------
    >>> anion_gap(na_mmol_l=140, cl_mmol_l=100, hco3_mmol_l=12)
    28.0
    """
    na = _ion("na_mmol_l", na_mmol_l, 100.0, 190.0)
    cl = _ion("cl_mmol_l", cl_mmol_l, 60.0, 150.0)
    hco3 = _ion("hco3_mmol_l", hco3_mmol_l, *_HCO3)
    return _anion_gap(na, cl, hco3)


def anion_gap_with_potassium(
    *, na_mmol_l: float, k_mmol_l: float, cl_mmol_l: float, hco3_mmol_l: float
) -> float:
    """Anion gap with potassium: AG_K = Na + K - (Cl + HCO3). [mmol/L] Normal about 16.

    Parameters
    ----------
    na_mmol_l, cl_mmol_l, hco3_mmol_l : float
        As in :func:`anion_gap`.
    k_mmol_l : float
        [mmol/L] Accepted 1-10.

    References
    ----------
    oh1977; kraut2007.

    Examples
    --------
    >>> anion_gap_with_potassium(na_mmol_l=140, k_mmol_l=4, cl_mmol_l=100, hco3_mmol_l=12)
    32.0
    """
    k = _ion("k_mmol_l", k_mmol_l, 1.0, 10.0)
    return anion_gap(na_mmol_l=na_mmol_l, cl_mmol_l=cl_mmol_l, hco3_mmol_l=hco3_mmol_l) + k


def anion_gap_albumin_corrected_figge1998(
    *, anion_gap_mmol_l: float, albumin_g_dl: float, normal_albumin_g_dl: float = NORMAL_ALBUMIN_G_DL
) -> float:
    """Anion gap corrected for albumin: AG + 2.5 x (normal albumin - albumin) [g/dL] (= 0.25 per g/L).

    Parameters
    ----------
    anion_gap_mmol_l : float
        [mmol/L] Accepted -150 to 200 (a derived value; extreme values mean the inputs need checking).
    albumin_g_dl : float
        [g/dL] Accepted 0.5-6.0.
    normal_albumin_g_dl : float
        [g/dL] Accepted 3.0-5.5; default 4.0 (common ICU practice; 4.4 in the Kraut & Madias table). Use the
        local reference range.

    Notes
    -----
    Figge's correction has been criticised as partly circular (the albumin charge was itself calculated).

    References
    ----------
    figge1998; kraut2007 (4.4 g/dL).

    Examples
    --------
    >>> anion_gap_albumin_corrected_figge1998(anion_gap_mmol_l=10, albumin_g_dl=2.0)
    15.0
    >>> round(anion_gap_albumin_corrected_figge1998(anion_gap_mmol_l=10, albumin_g_dl=2.0,
    ...     normal_albumin_g_dl=4.4), 2)
    16.0
    """
    ag = require_number("anion_gap_mmol_l", anion_gap_mmol_l, low=-150.0, high=200.0, unit="mmol/L")
    alb = require_number("albumin_g_dl", albumin_g_dl, low=0.5, high=6.0, unit="g/dL")
    normal = require_number("normal_albumin_g_dl", normal_albumin_g_dl, low=3.0, high=5.5, unit="g/dL")
    return _anion_gap_corrected(ag, alb, normal)


def delta_ratio(*, anion_gap_mmol_l: float, hco3_mmol_l: float) -> float:
    """Delta ratio: (AG - 12) / (24 - HCO3). Use the albumin-corrected AG when albumin is low.

    Parameters
    ----------
    anion_gap_mmol_l : float
        [mmol/L] Accepted -150 to 200 (a derived value; extreme values mean the inputs need checking).
    hco3_mmol_l : float
        [mmol/L] Accepted 0.5 to 23.5 (undefined at 24; a fall of under 0.5 makes it meaningless).

    Raises
    ------
    InputError
        When HCO3 is above 23.5: the ratio is undefined or meaningless (division by a near-zero fall).

    References
    ----------
    brandis.

    Examples
    --------
    >>> round(delta_ratio(anion_gap_mmol_l=28, hco3_mmol_l=12), 4)
    1.3333
    """
    ag = require_number("anion_gap_mmol_l", anion_gap_mmol_l, low=-150.0, high=200.0, unit="mmol/L")
    hco3 = require_number("hco3_mmol_l", hco3_mmol_l, low=_HCO3[0], high=23.5, unit="mmol/L")
    return _delta_ratio(ag, hco3)


def delta_gap(*, anion_gap_mmol_l: float, hco3_mmol_l: float) -> float:
    """Delta gap: (AG - 12) - (24 - HCO3) [mmol/L]; 24 + delta gap is the 'corrected HCO3'.

    Parameters
    ----------
    anion_gap_mmol_l : float
        [mmol/L] Accepted -150 to 200 (a derived value; extreme values mean the inputs need checking).
    hco3_mmol_l : float
        [mmol/L] Accepted 0.5-80.

    References
    ----------
    brandis.

    Examples
    --------
    >>> delta_gap(anion_gap_mmol_l=32, hco3_mmol_l=20)
    16.0
    """
    ag = require_number("anion_gap_mmol_l", anion_gap_mmol_l, low=-150.0, high=200.0, unit="mmol/L")
    hco3 = require_number("hco3_mmol_l", hco3_mmol_l, low=_HCO3[0], high=_HCO3[1], unit="mmol/L")
    return _delta_gap(ag, hco3)


#: Brandis delta-ratio bands -> reading (words used in the ``delta_ratio_band`` output)
DELTA_RATIO_BANDS = (
    (0.4, "normal_anion_gap_acidosis"),
    (0.8, "high_and_normal_anion_gap_acidosis"),
    (2.0, "high_anion_gap_acidosis"),
)


def delta_ratio_band_brandis(*, delta_ratio_value: float) -> str:
    """Brandis reading of a delta ratio.

    < 0.4 'normal_anion_gap_acidosis' (hyperchloraemic); 0.4 to < 0.8 'high_and_normal_anion_gap_acidosis'
    (combined; also often < 1 in renal failure); 0.8-2.0 'high_anion_gap_acidosis' (uncomplicated; lactic
    acidosis typically about 1.6, DKA nearer 1); > 2 'high_anion_gap_acidosis_with_raised_hco3' (a
    pre-existing raised HCO3: concurrent metabolic alkalosis or compensated chronic respiratory acidosis).

    Parameters
    ----------
    delta_ratio_value : float
        [1] Any finite number.

    References
    ----------
    brandis.

    Examples
    --------
    >>> [delta_ratio_band_brandis(delta_ratio_value=r) for r in (0.3, 0.57, 1.33, 5.0)]
    ['normal_anion_gap_acidosis', 'high_and_normal_anion_gap_acidosis', 'high_anion_gap_acidosis', \
'high_anion_gap_acidosis_with_raised_hco3']
    """
    r = require_number("delta_ratio_value", delta_ratio_value, low=-1e6, high=1e6)
    return _delta_ratio_band(r)


def delta_gap_reading(*, delta_gap_mmol_l: float) -> str:
    """Reading of a delta gap: < -6 'added_normal_anion_gap_acidosis'; -6 to +6 'pure_high_anion_gap';
    > +6 'added_metabolic_alkalosis' (common practice).

    Parameters
    ----------
    delta_gap_mmol_l : float
        [mmol/L] Any finite number.

    References
    ----------
    brandis.

    Examples
    --------
    >>> [delta_gap_reading(delta_gap_mmol_l=g) for g in (-8, 4, 16)]
    ['added_normal_anion_gap_acidosis', 'pure_high_anion_gap', 'added_metabolic_alkalosis']
    """
    g = require_number("delta_gap_mmol_l", delta_gap_mmol_l, low=-1e6, high=1e6)
    return _delta_gap_reading(g)


def osmolality_calculated_si(*, na_mmol_l: float, glucose_mmol_l: float, urea_mmol_l: float) -> float:
    """Calculated osmolality, SI form: 2 Na + glucose + urea (all mmol/L). [mOsm/kg]

    Parameters
    ----------
    na_mmol_l : float
        [mmol/L] Accepted 100-190.
    glucose_mmol_l : float
        [mmol/L] Accepted 0-150.
    urea_mmol_l : float
        [mmol/L] Accepted 0-150.

    Notes
    -----
    The US form 2 Na + glucose/18 + BUN/2.8 (mg/dL) is the same equation with rounded conversion factors;
    convert mg/dL inputs exactly and use this one.

    References
    ----------
    ccjm_osmol.

    Examples
    --------
    >>> osmolality_calculated_si(na_mmol_l=140, glucose_mmol_l=5, urea_mmol_l=5)
    290.0
    """
    na = _ion("na_mmol_l", na_mmol_l, 100.0, 190.0)
    glucose = _ion("glucose_mmol_l", glucose_mmol_l, 0.0, 150.0)
    urea = _ion("urea_mmol_l", urea_mmol_l, 0.0, 150.0)
    return _osmolality_calculated(na, glucose, urea)


def osmolar_gap(*, measured_mosm_kg: float, calculated_mosm_kg: float) -> float:
    """Osmolar gap = measured - calculated osmolality. [mOsm/kg] Normal below 10 (quoted -14 to +10).

    Parameters
    ----------
    measured_mosm_kg : float
        Measured by freezing-point depression. [mOsm/kg] Accepted 100-1000.
    calculated_mosm_kg : float
        [mOsm/kg] Accepted 100-1000.

    References
    ----------
    ccjm_osmol.

    Examples
    --------
    >>> osmolar_gap(measured_mosm_kg=310, calculated_mosm_kg=290)
    20.0
    """
    measured = require_number("measured_mosm_kg", measured_mosm_kg, low=100.0, high=1000.0, unit="mOsm/kg")
    calc = require_number("calculated_mosm_kg", calculated_mosm_kg, low=100.0, high=1000.0, unit="mOsm/kg")
    return _osmolar_gap(measured, calc)


# -- Stewart -------------------------------------------------------------------------------------------------


def strong_ion_difference_apparent(
    *,
    na_mmol_l: float,
    k_mmol_l: float,
    ca_ionised_mmol_l: float,
    mg_mmol_l: float,
    cl_mmol_l: float,
    lactate_mmol_l: float,
) -> float:
    """Apparent strong ion difference: SIDa = Na + K + 2 Ca + 2 Mg - Cl - lactate. [mEq/L]

    Divalent cations are entered in mmol/L and doubled to mEq/L (convention: ionised Ca, measured Mg).

    Parameters
    ----------
    na_mmol_l : float
        [mmol/L] Accepted 100-190.
    k_mmol_l : float
        [mmol/L] Accepted 1-10.
    ca_ionised_mmol_l : float
        [mmol/L] Accepted 0.2-3.
    mg_mmol_l : float
        [mmol/L] Accepted 0.1-5.
    cl_mmol_l : float
        [mmol/L] Accepted 60-150.
    lactate_mmol_l : float
        [mmol/L] Accepted 0-50.

    References
    ----------
    stewart1983; figge1992; kellum1995.

    Examples
    --------
    >>> round(strong_ion_difference_apparent(na_mmol_l=140, k_mmol_l=4, ca_ionised_mmol_l=1.1, mg_mmol_l=0.8,
    ...     cl_mmol_l=105, lactate_mmol_l=4), 2)
    38.8
    """
    na = _ion("na_mmol_l", na_mmol_l, 100.0, 190.0)
    k = _ion("k_mmol_l", k_mmol_l, 1.0, 10.0)
    ca = _ion("ca_ionised_mmol_l", ca_ionised_mmol_l, 0.2, 3.0)
    mg = _ion("mg_mmol_l", mg_mmol_l, 0.1, 5.0)
    cl = _ion("cl_mmol_l", cl_mmol_l, 60.0, 150.0)
    lactate = _ion("lactate_mmol_l", lactate_mmol_l, 0.0, 50.0)
    return _sid_apparent(na, k, ca, mg, cl, lactate)


def albumin_charge_figge(*, albumin_g_l: float, ph: float) -> float:
    """Albumin charge (Figge-Mydosh-Fencl linear term): Alb- = albumin g/L x (0.123 pH - 0.631). [mEq/L]

    Parameters
    ----------
    albumin_g_l : float
        [g/L] Accepted 5-60.
    ph : float
        Accepted 6.5-8.0.

    References
    ----------
    figge1992.

    Examples
    --------
    >>> round(albumin_charge_figge(albumin_g_l=30, ph=7.30), 3)
    8.007
    """
    alb = require_number("albumin_g_l", albumin_g_l, low=5.0, high=60.0, unit="g/L")
    ph_ = require_number("ph", ph, low=_PH[0], high=_PH[1])
    return _albumin_charge(alb, ph_)


def phosphate_charge_figge(*, phosphate_mmol_l: float, ph: float) -> float:
    """Phosphate charge (Figge-Mydosh-Fencl term): Pi- = phosphate mmol/L x (0.309 pH - 0.469). [mEq/L]

    Parameters
    ----------
    phosphate_mmol_l : float
        [mmol/L] Accepted 0.1-5.
    ph : float
        Accepted 6.5-8.0.

    References
    ----------
    figge1992.

    Examples
    --------
    >>> round(phosphate_charge_figge(phosphate_mmol_l=1.2, ph=7.30), 3)
    2.144
    """
    phos = require_number("phosphate_mmol_l", phosphate_mmol_l, low=0.1, high=5.0, unit="mmol/L")
    ph_ = require_number("ph", ph, low=_PH[0], high=_PH[1])
    return _phosphate_charge(phos, ph_)


def strong_ion_difference_effective(
    *, hco3_mmol_l: float, albumin_g_l: float, phosphate_mmol_l: float, ph: float
) -> float:
    """Effective strong ion difference: SIDe = HCO3 + Alb- + Pi-. [mEq/L]

    Parameters
    ----------
    hco3_mmol_l : float
        [mmol/L] Accepted 0.5-80.
    albumin_g_l : float
        [g/L] Accepted 5-60.
    phosphate_mmol_l : float
        [mmol/L] Accepted 0.1-5.
    ph : float
        Accepted 6.5-8.0.

    References
    ----------
    figge1992; kellum1995.

    Examples
    --------
    >>> round(strong_ion_difference_effective(hco3_mmol_l=18, albumin_g_l=30, phosphate_mmol_l=1.2,
    ...     ph=7.3), 3)
    28.151
    """
    hco3 = _ion("hco3_mmol_l", hco3_mmol_l, *_HCO3)
    alb = require_number("albumin_g_l", albumin_g_l, low=5.0, high=60.0, unit="g/L")
    ph_ = require_number("ph", ph, low=_PH[0], high=_PH[1])
    phos = require_number("phosphate_mmol_l", phosphate_mmol_l, low=0.1, high=5.0, unit="mmol/L")
    return _sid_effective(hco3, alb, phos, ph_)


def strong_ion_gap(*, sid_apparent_meq_l: float, sid_effective_meq_l: float) -> float:
    """Strong ion gap: SIG = SIDa - SIDe. [mEq/L] About 0-2 normally; above 2-4 suggests unmeasured anions.

    Parameters
    ----------
    sid_apparent_meq_l : float
        [mEq/L] Accepted -300 to 300 (derived values).
    sid_effective_meq_l : float
        [mEq/L] Accepted -300 to 300.

    References
    ----------
    kellum1995; figge1992.

    Examples
    --------
    >>> round(strong_ion_gap(sid_apparent_meq_l=38.8, sid_effective_meq_l=28.151), 3)
    10.649
    """
    a = require_number("sid_apparent_meq_l", sid_apparent_meq_l, low=-300.0, high=300.0, unit="mEq/L")
    e = require_number("sid_effective_meq_l", sid_effective_meq_l, low=-300.0, high=300.0, unit="mEq/L")
    return _strong_ion_gap(a, e)


def _story_inputs(sbe, na, cl, albumin_g_l):
    s = require_number("sbe_mmol_l", sbe, low=-40.0, high=40.0, unit="mmol/L")
    na_ = _ion("na_mmol_l", na, 100.0, 190.0)
    cl_ = _ion("cl_mmol_l", cl, 60.0, 150.0)
    alb = require_number("albumin_g_l", albumin_g_l, low=5.0, high=60.0, unit="g/L")
    return s, na_, cl_, alb


def base_excess_partition_story2016(
    *, sbe_mmol_l: float, na_mmol_l: float, cl_mmol_l: float, albumin_g_l: float, lactate_mmol_l: float = 0.0
) -> StoryPartition2016:
    """Simplified Fencl-Stewart partition of SBE (Story 2016).

    Na-Cl effect = Na - Cl - 35; albumin effect = 0.25 x (42 - albumin g/L); lactate effect = -lactate;
    unmeasured ions = SBE - (Na-Cl + albumin + lactate effects). [mEq/L]; negative = acidifying.

    Parameters
    ----------
    sbe_mmol_l : float
        [mmol/L] Accepted -40 to 40.
    na_mmol_l, cl_mmol_l : float
        [mmol/L] Accepted 100-190 and 60-150.
    albumin_g_l : float
        [g/L] Accepted 5-60.
    lactate_mmol_l : float
        [mmol/L] Accepted 0-50; 0 when not measured (lactate then sits in the unmeasured residual).

    References
    ----------
    story2016 (vignette verified; the 35 constant from memory).

    Examples
    --------
    >>> p = base_excess_partition_story2016(sbe_mmol_l=-13.04, na_mmol_l=133, cl_mmol_l=110, albumin_g_l=22,
    ...     lactate_mmol_l=5)
    >>> p.na_cl, p.albumin, p.lactate, round(p.unmeasured, 2)
    (-12.0, 5.0, -5.0, -1.04)
    """
    s, na, cl, alb = _story_inputs(sbe_mmol_l, na_mmol_l, cl_mmol_l, albumin_g_l)
    lactate = _ion("lactate_mmol_l", lactate_mmol_l, 0.0, 50.0)
    return _story2016(s, na, cl, alb, lactate)


def base_excess_partition_story2004(
    *, sbe_mmol_l: float, na_mmol_l: float, cl_mmol_l: float, albumin_g_l: float
) -> StoryPartition2004:
    """Simplified Fencl-Stewart partition of SBE (Story, Morimatsu & Bellomo 2004).

    Na-Cl effect = Na - Cl - 38; albumin effect = 0.25 x (42 - albumin g/L); unmeasured ions (including
    lactate) = SBE - (Na-Cl + albumin effects). [mEq/L]

    Parameters
    ----------
    sbe_mmol_l : float
        [mmol/L] Accepted -40 to 40.
    na_mmol_l, cl_mmol_l : float
        [mmol/L]
    albumin_g_l : float
        [g/L] Accepted 5-60.

    References
    ----------
    story2004 (constants from memory).

    Examples
    --------
    >>> p = base_excess_partition_story2004(sbe_mmol_l=-13.04, na_mmol_l=133, cl_mmol_l=110, albumin_g_l=22)
    >>> p.na_cl, p.albumin, round(p.unmeasured_including_lactate, 2)
    (-15.0, 5.0, -3.04)
    """
    s, na, cl, alb = _story_inputs(sbe_mmol_l, na_mmol_l, cl_mmol_l, albumin_g_l)
    return _story2004(s, na, cl, alb)


# -- the rules themselves: array-polymorphic cores -----------------------------------------------------------
#
# Each validated function above checks its arguments and calls one of these. They are the only implementation
# of each formula: the scalar bridge reaches them through the functions above (and through interpret.decide),
# the batch and Monte Carlo paths call them with numpy arrays. Written with operators and the helpers of
# tidewell.arrays only, they never import numpy, never raise and never validate: "not given" is NaN, and a
# result that cannot be computed is NaN (callers keep such values out of every response).


def _ph_hh(hco3, pco2):
    return PK_PRIME + log10(hco3 / (CO2_SOLUBILITY * pco2))


def _hco3_hh(ph, pco2):
    return CO2_SOLUBILITY * pco2 * 10.0 ** (ph - PK_PRIME)


def _h_from_ph(ph):
    return 10.0 ** (9.0 - ph)


def _h_kassirer(pco2, hco3):
    return KASSIRER_BLEICH_K * pco2 / hco3


def _consistency(ph, pco2, hco3, band=CONSISTENCY_BAND_PH) -> Consistency:
    computed = _ph_hh(hco3, pco2)
    difference = computed - ph
    return Consistency(
        ph_computed=computed,
        ph_difference=difference,
        h_measured_nmol_l=_h_from_ph(ph),
        h_kassirer_nmol_l=_h_kassirer(pco2, hco3),
        consistent=abs(difference) <= band + 1e-12,
    )


def _sbe_clsi(ph, hco3):
    return hco3 - 24.8 + 16.2 * (ph - NORMAL_PH)


def _sbe_siggaard(ph, hco3):
    return 0.9287 * (hco3 - 24.4 + 14.83 * (ph - NORMAL_PH))


def _be_van_slyke(ph, hco3, hb):
    return (1.0 - 0.014 * hb) * ((hco3 - 24.8) + (1.43 * hb + 7.7) * (ph - NORMAL_PH))


def _be_zander(ph, pco2, hb, so2):
    bracket = (0.0304 * pco2 * 10.0 ** (ph - PK_PRIME) - 24.26) + (9.5 + 1.63 * hb) * (ph - NORMAL_PH)
    return (1.0 - 0.0143 * hb) * bracket - 0.2 * hb * (1.0 - so2)


def _winters(hco3) -> Expected:
    centre = 1.5 * hco3 + 8.0
    return Expected(centre, centre - 2.0, centre + 2.0)


def _metabolic_alkalosis_pco2(hco3, slope=0.7, half_width=5.0) -> Expected:
    centre = NORMAL_PCO2_MMHG + slope * (hco3 - NORMAL_HCO3_MMOL_L)
    return Expected(centre, centre - half_width, centre + half_width)


def _hco3_linear(paco2, slope):
    return NORMAL_HCO3_MMOL_L + slope * (paco2 - NORMAL_PCO2_MMHG) / 10.0


def _band(paco2, default, alt_low, alt_high) -> Expected:
    a, b, c = (_hco3_linear(paco2, s) for s in (default, alt_low, alt_high))
    return Expected(a, minimum(minimum(a, b), c), maximum(maximum(a, b), c))


def _respiratory_acidosis_hco3(paco2) -> RespiratoryExpectation:
    return RespiratoryExpectation(
        acute=_band(paco2, *RESP_ACIDOSIS_ACUTE), chronic=_band(paco2, *RESP_ACIDOSIS_CHRONIC)
    )


def _respiratory_alkalosis_hco3(paco2) -> RespiratoryExpectation:
    return RespiratoryExpectation(
        acute=_band(paco2, *RESP_ALKALOSIS_ACUTE), chronic=_band(paco2, *RESP_ALKALOSIS_CHRONIC)
    )


def _respiratory_acidosis_ph(paco2) -> PhRules:
    delta = paco2 - NORMAL_PCO2_MMHG
    return PhRules(acute=NORMAL_PH - 0.008 * delta, chronic=NORMAL_PH - 0.003 * delta)


def _fraction_acute_hco3(paco2, hco3):
    up = paco2 > NORMAL_PCO2_MMHG
    acid, alk = _respiratory_acidosis_hco3(paco2), _respiratory_alkalosis_hco3(paco2)
    chronic = where(up, acid.chronic.value, alk.chronic.value)
    acute = where(up, acid.acute.value, alk.acute.value)
    return div(chronic - hco3, chronic - acute)


def _fraction_acute_ph(ph, paco2):
    delta = paco2 - NORMAL_PCO2_MMHG
    return div((NORMAL_PH - ph) - 0.003 * delta, 0.005 * delta)


def _chronicity(fraction):
    """The chronicity word of a fraction acute (NaN reads as acute-on-chronic: callers test for NaN first)."""
    return where(
        fraction >= ACUTE_AT_LEAST, "acute", where(fraction <= CHRONIC_AT_MOST, "chronic", "acute_on_chronic")
    )


def _baseline_pco2(paco2, hco3, chronic_slope=RESP_ACIDOSIS_CHRONIC[0]):
    acute = RESP_ACIDOSIS_ACUTE[0]
    raw = NORMAL_PCO2_MMHG + (hco3 - NORMAL_HCO3_MMOL_L - acute * (paco2 - NORMAL_PCO2_MMHG) / 10.0) / (
        (chronic_slope - acute) / 10.0
    )
    return minimum(maximum(raw, NORMAL_PCO2_MMHG), paco2)


def _hco3_on_baseline(paco2, baseline):
    base = maximum(baseline, NORMAL_PCO2_MMHG)
    chronic = NORMAL_HCO3_MMOL_L + RESP_ACIDOSIS_CHRONIC[0] * (base - NORMAL_PCO2_MMHG) / 10.0
    return where(
        paco2 >= base,
        chronic + RESP_ACIDOSIS_ACUTE[0] * (paco2 - base) / 10.0,
        chronic - RESP_ALKALOSIS_ACUTE[0] * (base - paco2) / 10.0,
    )


def _pco2_for_ph_acute(ph_target, paco2, hco3):
    numerator = hco3 - 0.1 * paco2
    denominator = CO2_SOLUBILITY * 10.0 ** (ph_target - PK_PRIME) - 0.1
    return where(numerator <= 0.0, NAN, numerator / denominator)


def _pco2_sbe_acidosis(sbe):
    return NORMAL_PCO2_MMHG + sbe


def _pco2_sbe_alkalosis(sbe):
    return NORMAL_PCO2_MMHG + 0.6 * sbe


def _sbe_respiratory(paco2):
    return 0.0, 0.4 * (paco2 - NORMAL_PCO2_MMHG)


def _anion_gap(na, cl, hco3):
    return na - (cl + hco3)


def _anion_gap_corrected(anion_gap, albumin_g_dl, normal_albumin_g_dl=NORMAL_ALBUMIN_G_DL):
    return anion_gap + 2.5 * (normal_albumin_g_dl - albumin_g_dl)


def _delta_ratio(anion_gap, hco3):
    return div(anion_gap - NORMAL_ANION_GAP_MMOL_L, NORMAL_HCO3_MMOL_L - hco3)


def _delta_gap(anion_gap, hco3):
    return (anion_gap - NORMAL_ANION_GAP_MMOL_L) - (NORMAL_HCO3_MMOL_L - hco3)


def _delta_ratio_band(ratio):
    (first, first_word), (second, second_word), (third, third_word) = DELTA_RATIO_BANDS
    return where(
        ratio < first,
        first_word,
        where(
            ratio < second,
            second_word,
            where(ratio <= third, third_word, "high_anion_gap_acidosis_with_raised_hco3"),
        ),
    )


def _delta_gap_reading(gap):
    return where(
        gap < -6.0,
        "added_normal_anion_gap_acidosis",
        where(gap > 6.0, "added_metabolic_alkalosis", "pure_high_anion_gap"),
    )


def _osmolality_calculated(na, glucose, urea):
    return 2.0 * na + glucose + urea


def _osmolar_gap(measured, calculated):
    return measured - calculated


def _sid_apparent(na, k, ca_ionised, mg, cl, lactate):
    return na + k + 2.0 * ca_ionised + 2.0 * mg - cl - lactate


def _albumin_charge(albumin_g_l, ph):
    return albumin_g_l * (0.123 * ph - 0.631)


def _phosphate_charge(phosphate, ph):
    return phosphate * (0.309 * ph - 0.469)


def _sid_effective(hco3, albumin_g_l, phosphate, ph):
    return hco3 + _albumin_charge(albumin_g_l, ph) + _phosphate_charge(phosphate, ph)


def _strong_ion_gap(sid_apparent, sid_effective):
    return sid_apparent - sid_effective


def _story2016(sbe, na, cl, albumin_g_l, lactate) -> StoryPartition2016:
    na_cl, albumin = na - cl - 35.0, 0.25 * (42.0 - albumin_g_l)
    lactate_effect = -lactate
    return StoryPartition2016(na_cl, albumin, lactate_effect, sbe - (na_cl + albumin + lactate_effect))


def _story2004(sbe, na, cl, albumin_g_l) -> StoryPartition2004:
    na_cl, albumin = na - cl - 38.0, 0.25 * (42.0 - albumin_g_l)
    return StoryPartition2004(na_cl, albumin, sbe - (na_cl + albumin))
