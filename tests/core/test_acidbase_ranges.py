"""tidewell.formulas.acidbase: the compensation constants, the reading thresholds and every accepted range.

Written for the survivors of a full mutation run over acidbase.py (docs/testing.md). Each expected value
comes from outside the module: the published slope or formula written here with its ``references.py`` key,
marked *common practice* or *from memory* where that is what it is. The accepted ranges are the project's
own plausibility limits, copied by hand from each function's docstring ("Accepted low-high"), not
published values: a change of a limit must then be a decision, not an accident.
"""

from __future__ import annotations

import pytest

from conftest import assert_accepted_range
from tidewell.formulas import acidbase as ab

# -- compensation slopes: the default and the band of published slopes ---------------------------------------
#
# HCO3 = 24 + slope x (PaCO2 - 40) / 10, 24 mmol/L and 40 mmHg the normal anchors (acid_base_normal_ranges).


def _hco3(paco2, slope):
    return 24.0 + slope * (paco2 - 40.0) / 10.0


def test_respiratory_acidosis_slopes_at_paco2_60():
    e = ab.expected_hco3_respiratory_acidosis(paco2_mmhg=60)
    # acute: 1 mmol/L per 10 mmHg (narins1980; brandis), band up to 2 (brandis, from memory)
    assert (e.acute.value, e.acute.low, e.acute.high) == pytest.approx(
        (_hco3(60, 1), _hco3(60, 1), _hco3(60, 2))
    )
    assert (e.acute.value, e.acute.low, e.acute.high) == pytest.approx((26.0, 26.0, 28.0))
    # chronic: 3.5 (narins1980; berend2014; kidney360_2022), band 3 (older texts, from memory) to 5
    # (martinu2003, stable COPD, from memory)
    assert (e.chronic.value, e.chronic.low, e.chronic.high) == pytest.approx(
        (_hco3(60, 3.5), _hco3(60, 3), _hco3(60, 5))
    )
    assert (e.chronic.value, e.chronic.low, e.chronic.high) == pytest.approx((31.0, 30.0, 34.0))


def test_respiratory_alkalosis_slopes_at_paco2_25():
    e = ab.expected_hco3_respiratory_alkalosis(paco2_mmhg=25)
    # acute: 2 mmol/L per 10 mmHg (narins1980; berend2014), band to 2.5 (brandis, from memory); a fall
    # of 15 mmHg, so the steeper slope gives the lower HCO3
    assert (e.acute.value, e.acute.low, e.acute.high) == pytest.approx(
        (_hco3(25, 2), _hco3(25, 2.5), _hco3(25, 2))
    )
    assert (e.acute.value, e.acute.low, e.acute.high) == pytest.approx((21.0, 20.25, 21.0))
    # chronic: 4 (berend2014; kidney360_2022 0.41), 5 in older tables (narins1980; brandis)
    assert (e.chronic.value, e.chronic.low, e.chronic.high) == pytest.approx(
        (_hco3(25, 4), _hco3(25, 5), _hco3(25, 4))
    )
    assert (e.chronic.value, e.chronic.low, e.chronic.high) == pytest.approx((18.0, 16.5, 18.0))


@pytest.mark.parametrize(
    ("paco2", "hco3", "fraction"),
    [
        # below 40 the alkalosis rules: acute 2 and chronic 4 per 10 mmHg (narins1980; berend2014)
        (25.0, 21.0, 1.0),  # acute: 24 - 2 x 1.5
        (25.0, 18.0, 0.0),  # chronic: 24 - 4 x 1.5
        (25.0, 19.5, 0.5),  # halfway
        # above 40 the acidosis rules: acute 1, chronic 3.5 (narins1980; berend2014)
        (60.0, 26.0, 1.0),
        (60.0, 31.0, 0.0),
        (39.0, 23.8, 1.0),  # 1 mmHg below 40: still the alkalosis rules
        (41.0, 24.1, 1.0),  # 1 mmHg above: the acidosis rules
    ],
)
def test_fraction_acute_uses_the_rules_of_the_side_of_40(paco2, hco3, fraction):
    # fraction acute = (chronic - HCO3) / (chronic - acute) (fraction_acute_bands, common practice)
    assert ab.fraction_acute_hco3(paco2_mmhg=paco2, hco3_mmol_l=hco3) == pytest.approx(fraction, abs=1e-9)


def test_metabolic_alkalosis_default_of_the_interpretation():
    # blood_gas's compensation step calls the rule with its defaults: PaCO2 = 40 + 0.7 x (HCO3 - 24),
    # +/- 5 mmHg (berend2014; kidney360_2022)
    e = ab._metabolic_alkalosis_pco2(34.0)
    assert (e.value, e.low, e.high) == pytest.approx((47.0, 42.0, 52.0))
    p = ab.expected_pco2_metabolic_alkalosis(hco3_mmol_l=34.0)
    assert (p.value, p.low, p.high) == pytest.approx((47.0, 42.0, 52.0))


@pytest.mark.parametrize(
    ("slope", "baseline"),
    [
        # B = 40 + (HCO3 - 24 - 1 x (PaCO2 - 40)/10) / ((c - 1)/10): the acute slope 1 and the chronic
        # slope c (narins1980), at PaCO2 70 and HCO3 29.7: 29.7 - 24 - 3 = 2.7
        (None, 40.0 + 2.7 / 0.25),  # default c = 3.5 (narins1980; berend2014): 50.8
        (3.0, 40.0 + 2.7 / 0.2),  # the band's low slope: 53.5
        (5.0, 40.0 + 2.7 / 0.4),  # the band's high slope (martinu2003, from memory): 46.75
    ],
)
def test_baseline_pco2_default_slope_of_the_interpretation(slope, baseline):
    # blood_gas's targets step calls the estimate with its default chronic slope and with 5 and 3
    args = (70.0, 29.7) if slope is None else (70.0, 29.7, slope)
    assert ab._baseline_pco2(*args) == pytest.approx(baseline, abs=1e-9)
    c = {} if slope is None else {"chronic_mmol_per_10_mmhg": slope}
    assert ab.baseline_pco2_from_hco3(paco2_mmhg=70, hco3_mmol_l=29.7, **c) == pytest.approx(
        baseline, abs=1e-9
    )


# -- the alkalaemia floor: no positive PaCO2 when HCO3 - 0.1 x PaCO2 is not positive ---------------------


@pytest.mark.parametrize(
    ("hco3", "expected"),
    [
        (4.5, None),  # numerator -0.5
        (5.0, None),  # numerator 0: no positive PaCO2
        # numerator 0.5: P = 0.5 / (0.0307 x 10^(7.45 - 6.1) - 0.1) (henderson1908; narins1980 acute rule)
        (5.5, 0.5 / (0.0307 * 10 ** (7.45 - 6.1) - 0.1)),
    ],
)
def test_alkalaemia_floor_needs_a_positive_numerator(hco3, expected):
    got = ab.pco2_for_ph_acute(ph_target=7.45, paco2_mmhg=50.0, hco3_mmol_l=hco3)
    if expected is None:
        assert got is None
    else:
        assert got == pytest.approx(expected, rel=1e-12)


# -- the delta gap reading: +/- 6 mmol/L (brandis; common practice) -----------------------------------------


@pytest.mark.parametrize(
    ("gap", "word"),
    [
        (-10.0, "added_normal_anion_gap_acidosis"),
        (-6.5, "added_normal_anion_gap_acidosis"),
        (-6.0 - 1e-9, "added_normal_anion_gap_acidosis"),
        (-6.0, "pure_high_anion_gap"),
        (0.0, "pure_high_anion_gap"),
        (5.5, "pure_high_anion_gap"),
        (6.0, "pure_high_anion_gap"),
        (6.0 + 1e-9, "added_metabolic_alkalosis"),
        (6.5, "added_metabolic_alkalosis"),
    ],
)
def test_delta_gap_reading_both_sides_of_6(gap, word):
    assert ab.delta_gap_reading(delta_gap_mmol_l=gap) == word


# -- defaults of the base-excess forms -----------------------------------------------------------------------


def test_van_slyke_standard_form_uses_hb_5():
    # SBE = (1 - 0.014 x 5) x [(HCO3 - 24.8) + (1.43 x 5 + 7.7) x (pH - 7.40)] (siggaard1971; nccls1994)
    expected = (1 - 0.014 * 5) * ((13 - 24.8) + (1.43 * 5 + 7.7) * (7.25 - 7.40))
    assert ab.standard_base_excess_van_slyke_hb5(ph=7.25, hco3_mmol_l=13) == pytest.approx(expected, abs=1e-9)
    assert expected == pytest.approx(-13.045575, abs=1e-9)


def _zander(ph, pco2, hb, so2):
    # BE = (1 - 0.0143 Hb) x [(0.0304 PCO2 10^(pH - 6.1) - 24.26) + (9.5 + 1.63 Hb)(pH - 7.4)]
    #      - 0.2 Hb (1 - SO2) (lang2002)
    bracket = (0.0304 * pco2 * 10 ** (ph - 6.1) - 24.26) + (9.5 + 1.63 * hb) * (ph - 7.4)
    return (1 - 0.0143 * hb) * bracket - 0.2 * hb * (1 - so2)


def test_zander_saturation_defaults_to_fully_saturated():
    full = _zander(7.25, 30, 15, 1.0)
    assert ab.base_excess_lang_zander2002(ph=7.25, pco2_mmhg=30, hb_g_dl=15) == pytest.approx(full, abs=1e-9)
    v = ab.sbe_variants(ph=7.25, hco3_mmol_l=13, pco2_mmhg=30, hb_g_dl=15)
    assert v.zander == pytest.approx(full, abs=1e-9)
    # and the saturation term is there: 0.2 x 15 x (1 - 0.5) = 1.5 lower at SO2 0.5
    half = ab.base_excess_lang_zander2002(ph=7.25, pco2_mmhg=30, hb_g_dl=15, so2_fraction=0.5)
    assert half == pytest.approx(full - 1.5, abs=1e-9)


def test_story2016_lactate_defaults_to_not_measured():
    # lactate effect = -lactate (story2016); not measured = 0, so it stays in the unmeasured residual
    p = ab.base_excess_partition_story2016(sbe_mmol_l=-10, na_mmol_l=140, cl_mmol_l=110, albumin_g_l=30)
    assert p.lactate == 0.0
    # Na-Cl effect 140 - 110 - 35 = -5, albumin effect 0.25 x (42 - 30) = 3, residual -10 - (-5 + 3) = -8
    assert p.unmeasured == pytest.approx(-8.0, abs=1e-9)


# -- the accepted ranges: the project's own limits, from each docstring --------------------------------------
#
# (function, field, low, high, the other arguments); a range of "any finite number" is the code's +/- 1e6.

NA_CL = {"na_mmol_l": 140.0, "cl_mmol_l": 105.0}
RANGES = [
    (ab.ph_henderson_hasselbalch, "hco3_mmol_l", 0.5, 80.0, {"pco2_mmhg": 40.0}),
    (ab.ph_henderson_hasselbalch, "pco2_mmhg", 1.0, 300.0, {"hco3_mmol_l": 24.0}),
    (ab.hco3_henderson_hasselbalch, "ph", 6.5, 8.0, {"pco2_mmhg": 40.0}),
    (ab.hco3_henderson_hasselbalch, "pco2_mmhg", 1.0, 300.0, {"ph": 7.4}),
    (ab.hydrogen_ion_from_ph, "ph", 6.5, 8.0, {}),
    (ab.ph_from_hydrogen_ion, "h_nmol_l", 1.0, 1000.0, {}),
    (ab.hydrogen_ion_kassirer_bleich, "pco2_mmhg", 1.0, 300.0, {"hco3_mmol_l": 24.0}),
    (ab.hydrogen_ion_kassirer_bleich, "hco3_mmol_l", 0.5, 80.0, {"pco2_mmhg": 40.0}),
    (ab.check_consistency, "band_ph", 0.005, 0.2, {"ph": 7.4, "pco2_mmhg": 40.0, "hco3_mmol_l": 24.0}),
    (ab.check_consistency, "ph", 6.5, 8.0, {"pco2_mmhg": 40.0, "hco3_mmol_l": 24.0}),
    (ab.base_excess_blood_van_slyke, "hb_g_dl", 1.0, 25.0, {"ph": 7.4, "hco3_mmol_l": 24.0}),
    (ab.base_excess_lang_zander2002, "hb_g_dl", 1.0, 25.0, {"ph": 7.4, "pco2_mmhg": 40.0}),
    (
        ab.base_excess_lang_zander2002,
        "so2_fraction",
        0.0,
        1.0,
        {"ph": 7.4, "pco2_mmhg": 40.0, "hb_g_dl": 15.0},
    ),
    (ab.expected_pco2_metabolic_alkalosis, "slope", 0.4, 1.0, {"hco3_mmol_l": 34.0}),
    (ab.expected_pco2_metabolic_alkalosis, "half_width_mmhg", 0.0, 10.0, {"hco3_mmol_l": 34.0}),
    (ab.expected_hco3_linear, "mmol_per_10_mmhg", 0.0, 10.0, {"paco2_mmhg": 60.0}),
    (ab.expected_hco3_linear, "paco2_mmhg", 1.0, 300.0, {"mmol_per_10_mmhg": 4.0}),
    (ab.fraction_acute_ph, "paco2_mmhg", 41.0, 300.0, {"ph": 7.3}),
    (ab.baseline_pco2_from_hco3, "paco2_mmhg", 41.0, 300.0, {"hco3_mmol_l": 30.0}),
    (
        ab.baseline_pco2_from_hco3,
        "chronic_mmol_per_10_mmhg",
        2.0,
        6.0,
        {"paco2_mmhg": 70.0, "hco3_mmol_l": 30.0},
    ),
    (ab.expected_hco3_with_baseline, "baseline_pco2_mmhg", 1.0, 300.0, {"paco2_mmhg": 70.0}),
    (ab.pco2_for_ph_acute, "ph_target", 7.0, 7.8, {"paco2_mmhg": 70.0, "hco3_mmol_l": 30.0}),
    (ab.expected_pco2_sbe_metabolic_acidosis, "sbe_mmol_l", -40.0, 40.0, {}),
    (ab.expected_pco2_sbe_metabolic_alkalosis, "sbe_mmol_l", -40.0, 40.0, {}),
    (ab.anion_gap, "na_mmol_l", 100.0, 190.0, {"cl_mmol_l": 105.0, "hco3_mmol_l": 24.0}),
    (ab.anion_gap, "cl_mmol_l", 60.0, 150.0, {"na_mmol_l": 140.0, "hco3_mmol_l": 24.0}),
    (ab.anion_gap_with_potassium, "k_mmol_l", 1.0, 10.0, {**NA_CL, "hco3_mmol_l": 24.0}),
    (ab.anion_gap_albumin_corrected_figge1998, "anion_gap_mmol_l", -150.0, 200.0, {"albumin_g_dl": 4.0}),
    (ab.anion_gap_albumin_corrected_figge1998, "albumin_g_dl", 0.5, 6.0, {"anion_gap_mmol_l": 12.0}),
    (
        ab.anion_gap_albumin_corrected_figge1998,
        "normal_albumin_g_dl",
        3.0,
        5.5,
        {"anion_gap_mmol_l": 12.0, "albumin_g_dl": 2.0},
    ),
    (ab.delta_ratio, "anion_gap_mmol_l", -150.0, 200.0, {"hco3_mmol_l": 14.0}),
    (ab.delta_gap, "anion_gap_mmol_l", -150.0, 200.0, {"hco3_mmol_l": 14.0}),
    (ab.delta_ratio_band_brandis, "delta_ratio_value", -1e6, 1e6, {}),
    (ab.delta_gap_reading, "delta_gap_mmol_l", -1e6, 1e6, {}),
    (ab.osmolality_calculated_si, "na_mmol_l", 100.0, 190.0, {"glucose_mmol_l": 5.0, "urea_mmol_l": 5.0}),
    (ab.osmolality_calculated_si, "glucose_mmol_l", 0.0, 150.0, {"na_mmol_l": 140.0, "urea_mmol_l": 5.0}),
    (ab.osmolality_calculated_si, "urea_mmol_l", 0.0, 150.0, {"na_mmol_l": 140.0, "glucose_mmol_l": 5.0}),
    (ab.osmolar_gap, "measured_mosm_kg", 100.0, 1000.0, {"calculated_mosm_kg": 290.0}),
    (ab.osmolar_gap, "calculated_mosm_kg", 100.0, 1000.0, {"measured_mosm_kg": 290.0}),
]
SIDA = {
    "na_mmol_l": 140.0,
    "k_mmol_l": 4.0,
    "ca_ionised_mmol_l": 1.2,
    "mg_mmol_l": 0.8,
    "cl_mmol_l": 105.0,
    "lactate_mmol_l": 1.0,
}
for _field, _low, _high in [
    ("na_mmol_l", 100.0, 190.0),
    ("k_mmol_l", 1.0, 10.0),
    ("ca_ionised_mmol_l", 0.2, 3.0),
    ("mg_mmol_l", 0.1, 5.0),
    ("cl_mmol_l", 60.0, 150.0),
    ("lactate_mmol_l", 0.0, 50.0),
]:
    RANGES.append(
        (
            ab.strong_ion_difference_apparent,
            _field,
            _low,
            _high,
            {k: v for k, v in SIDA.items() if k != _field},
        )
    )
RANGES += [
    (ab.albumin_charge_figge, "albumin_g_l", 5.0, 60.0, {"ph": 7.4}),
    (ab.phosphate_charge_figge, "phosphate_mmol_l", 0.1, 5.0, {"ph": 7.4}),
    (
        ab.strong_ion_difference_effective,
        "albumin_g_l",
        5.0,
        60.0,
        {"hco3_mmol_l": 24.0, "phosphate_mmol_l": 1.0, "ph": 7.4},
    ),
    (
        ab.strong_ion_difference_effective,
        "phosphate_mmol_l",
        0.1,
        5.0,
        {"hco3_mmol_l": 24.0, "albumin_g_l": 40.0, "ph": 7.4},
    ),
    (ab.strong_ion_gap, "sid_apparent_meq_l", -300.0, 300.0, {"sid_effective_meq_l": 38.0}),
    (ab.strong_ion_gap, "sid_effective_meq_l", -300.0, 300.0, {"sid_apparent_meq_l": 40.0}),
]
STORY = {"sbe_mmol_l": -5.0, "na_mmol_l": 140.0, "cl_mmol_l": 105.0, "albumin_g_l": 40.0}
for _func in (ab.base_excess_partition_story2016, ab.base_excess_partition_story2004):
    for _field, _low, _high in [
        ("sbe_mmol_l", -40.0, 40.0),
        ("na_mmol_l", 100.0, 190.0),
        ("cl_mmol_l", 60.0, 150.0),
        ("albumin_g_l", 5.0, 60.0),
    ]:
        RANGES.append((_func, _field, _low, _high, {k: v for k, v in STORY.items() if k != _field}))
RANGES.append((ab.base_excess_partition_story2016, "lactate_mmol_l", 0.0, 50.0, STORY))


@pytest.mark.parametrize(
    ("func", "field", "low", "high", "base"), RANGES, ids=[f"{r[0].__name__}-{r[1]}" for r in RANGES]
)
def test_accepted_range(func, field, low, high, base):
    assert_accepted_range(func, field, low, high, **base)
