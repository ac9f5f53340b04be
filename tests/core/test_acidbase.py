"""Domain tests for tidewell.formulas.acidbase against the worked cases and the cited equations.

Provenance words beside each check: *published* (a table or worked example in the source), *derived* (hand
computed here from the cited equation), *common practice*, *from memory* (the source was recalled, not
re-read). The worked cases (tests/cases/reference_cases.json) were computed from the formulas of
docs/methods.md#acid-base; their own ``provenance`` field names the weakest element of each rule.
"""

from __future__ import annotations

import math

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from tidewell.errors import InputError
from tidewell.formulas import acidbase as ab


def approx(case, key):
    """pytest.approx for a worked case's expected number with the case's own absolute tolerance."""
    return pytest.approx(case["expected"][key], abs=case["tolerance"][key])


# -- Henderson-Hasselbalch, Kassirer-Bleich, consistency ----------------------------------------------------


def test_hh01_normal_triple_is_consistent(cases):
    # HH-01: pH = 6.1 + log10(HCO3 / (0.0307 PCO2)) (Henderson 1908; S 0.0307 NCCLS 1994, verified in
    # Vet Med Sci 2018 Table 1); [H+] = 24 x PCO2 / HCO3 (Kassirer & Bleich 1965, verified); band 0.03 is
    # common practice.
    case = cases["HH-01"]
    i = case["inputs"]
    c = ab.check_consistency(ph=i["ph"], pco2_mmhg=i["paco2_mmHg"], hco3_mmol_l=i["hco3_mmol_L"])
    assert c.ph_computed == approx(case, "ph_calc")
    assert c.h_kassirer_nmol_l == approx(case, "h_kb_nmol_L")
    assert c.h_measured_nmol_l == approx(case, "h_measured_nmol_L")
    assert c.consistent is True and case["expected"]["consistency"] == "consistent"


def test_hh02_transcription_error_is_inconsistent(cases):
    # HH-02 (the AB-08 pattern): same equations; difference 0.158 pH is far outside the 0.03 band.
    case = cases["HH-02"]
    i = case["inputs"]
    c = ab.check_consistency(ph=i["ph"], pco2_mmhg=i["paco2_mmHg"], hco3_mmol_l=i["hco3_mmol_L"])
    assert c.ph_computed == approx(case, "ph_calc")
    assert c.ph_difference == approx(case, "ph_difference")
    assert c.h_kassirer_nmol_l == approx(case, "h_kb_nmol_L")
    assert c.h_measured_nmol_l == approx(case, "h_measured_nmol_L")
    assert c.consistent is False and case["expected"]["consistency"] == "inconsistent"


def test_hh03_kassirer_bleich_and_hco3_from_ph(cases):
    # HH-03: Kassirer & Bleich 1965 (verified); HCO3 = 0.0307 x PCO2 x 10^(pH - 6.1).
    case = cases["HH-03"]
    i = case["inputs"]
    h = ab.hydrogen_ion_kassirer_bleich(pco2_mmhg=i["paco2_mmHg"], hco3_mmol_l=i["hco3_mmol_L"])
    assert h == approx(case, "h_kb_nmol_L")
    assert ab.ph_from_hydrogen_ion(h_nmol_l=h) == approx(case, "ph_from_kb")
    assert ab.ph_henderson_hasselbalch(hco3_mmol_l=i["hco3_mmol_L"], pco2_mmhg=i["paco2_mmHg"]) == approx(
        case, "ph_from_hh"
    )
    hco3 = ab.hco3_henderson_hasselbalch(ph=i["ph_for_hco3"], pco2_mmhg=i["paco2_for_hco3_mmHg"])
    assert hco3 == approx(case, "hco3_calc_mmol_L")


def test_kassirer_constant_is_the_rounded_hh_constant():
    # Derived: 10^-6.1 x 0.0307 x 1e9 = 24.39 (kassirer1965 with henderson1908, nccls1994), published rounded
    # to 24.
    assert 10 ** (-ab.PK_PRIME) * ab.CO2_SOLUBILITY * 1e9 == pytest.approx(24.39, abs=0.005)
    assert ab.KASSIRER_BLEICH_K == 24.0


def test_normal_triple_balance_matches_reference_note():
    # Derived (henderson1908, nccls1994; docs/methods.md#henderson-hasselbalch-and-the-consistency-check):
    # with 6.1/0.0307 the HCO3 at pH 7.40, PCO2 40 is 24.50.
    assert ab.hco3_henderson_hasselbalch(ph=7.40, pco2_mmhg=40) == pytest.approx(24.50, abs=0.01)


@settings(max_examples=200, deadline=None)
@given(ph=st.floats(6.9, 7.7), pco2=st.floats(10, 150))
def test_hh_round_trip(ph, pco2):
    # Derived: HCO3 from (pH, PCO2) and back gives the same pH; [H+] and pH invert each other.
    hco3 = ab.hco3_henderson_hasselbalch(ph=ph, pco2_mmhg=pco2)
    if 0.5 <= hco3 <= 80:
        assert ab.ph_henderson_hasselbalch(hco3_mmol_l=hco3, pco2_mmhg=pco2) == pytest.approx(ph, abs=1e-9)
    assert ab.ph_from_hydrogen_ion(h_nmol_l=ab.hydrogen_ion_from_ph(ph=ph)) == pytest.approx(ph, abs=1e-12)


@settings(max_examples=200, deadline=None)
@given(hco3=st.floats(2, 60), pco2=st.floats(10, 150), d=st.floats(0.1, 10))
def test_hh_monotonic(hco3, pco2, d):
    # Physiology (and the equation): more HCO3 raises pH, more CO2 lowers it.
    base = ab.ph_henderson_hasselbalch(hco3_mmol_l=hco3, pco2_mmhg=pco2)
    assert ab.ph_henderson_hasselbalch(hco3_mmol_l=min(hco3 + d, 80), pco2_mmhg=pco2) >= base
    assert ab.ph_henderson_hasselbalch(hco3_mmol_l=hco3, pco2_mmhg=pco2 + d) < base


def test_consistency_band_edges():
    # Common practice band 0.03: derived pH values just inside and just outside.
    ph_true = ab.ph_henderson_hasselbalch(hco3_mmol_l=24, pco2_mmhg=40)
    assert ab.check_consistency(ph=ph_true + 0.0299, pco2_mmhg=40, hco3_mmol_l=24).consistent
    assert not ab.check_consistency(ph=ph_true + 0.0301, pco2_mmhg=40, hco3_mmol_l=24).consistent


# -- base excess --------------------------------------------------------------------------------------------


def test_be01_sbe_variants(cases):
    # BE-01: CLSI C46-A2 cBase(Ecf) (form verified in Vet Med Sci 2018 Table 1); Siggaard-Andersen 0.9287 form
    # and the Van Slyke form (from memory, CLSI); the worked numbers were computed from those equations.
    case = cases["BE-01"]
    i = case["inputs"]
    ph, hco3, hb = i["ph"], i["hco3_mmol_L"], i["hb_g_dL"]
    assert ab.standard_base_excess_clsi2009(ph=ph, hco3_mmol_l=hco3) == approx(case, "sbe_clsi_mmol_L")
    assert ab.standard_base_excess_siggaard_andersen1977(ph=ph, hco3_mmol_l=hco3) == approx(
        case, "sbe_siggaard_andersen_mmol_L"
    )
    assert ab.base_excess_blood_van_slyke(ph=ph, hco3_mmol_l=hco3, hb_g_dl=hb) == approx(
        case, "be_blood_vanslyke_mmol_L"
    )
    assert ab.standard_base_excess_van_slyke_hb5(ph=ph, hco3_mmol_l=hco3) == approx(
        case, "sbe_vanslyke_hb5_mmol_L"
    )


def test_be02_zander(cases):
    # BE-02: Lang W, Zander R. Clin Chem Lab Med 2002 (abstract equation verified).
    case = cases["BE-02"]
    i = case["inputs"]
    value = ab.base_excess_lang_zander2002(
        ph=i["ph"], pco2_mmhg=i["paco2_mmHg"], hb_g_dl=i["hb_g_dL"], so2_fraction=i["so2_fraction"]
    )
    assert value == approx(case, "be_zander_mmol_L")


def test_sbe_alkalosis_examples():
    # nccls1994 and siggaard1971 worked example: pH 7.50, HCO3 34 -> CLSI +10.82, Siggaard-Andersen +10.29
    # (derived from the cited equations).
    assert ab.standard_base_excess_clsi2009(ph=7.50, hco3_mmol_l=34) == pytest.approx(10.82, abs=0.005)
    assert ab.standard_base_excess_siggaard_andersen1977(ph=7.50, hco3_mmol_l=34) == pytest.approx(
        10.29, abs=0.005
    )


def test_sbe_variants_bundle_matches_individual_functions():
    v = ab.sbe_variants(ph=7.25, hco3_mmol_l=13, pco2_mmhg=30, hb_g_dl=15, so2_fraction=1.0)
    # BE-01 / BE-02 values again, through the bundle (derived from the same equations).
    assert v.clsi == pytest.approx(-14.23, abs=0.01)
    assert v.blood_van_slyke == pytest.approx(-12.7763, abs=0.01)
    assert v.zander == pytest.approx(-12.9373, abs=0.01)
    assert ab.sbe_variants(ph=7.25, hco3_mmol_l=13, pco2_mmhg=30).zander is None


def test_zander_saturation_term_lowers_be():
    # Derived from Lang & Zander 2002: the -0.2 x Hb x (1 - SO2) term; at SO2 0.5 and Hb 15 it is -1.5.
    full = ab.base_excess_lang_zander2002(ph=7.40, pco2_mmhg=40, hb_g_dl=15, so2_fraction=1.0)
    half = ab.base_excess_lang_zander2002(ph=7.40, pco2_mmhg=40, hb_g_dl=15, so2_fraction=0.5)
    assert full - half == pytest.approx(1.5, abs=1e-9)


@settings(max_examples=200, deadline=None)
@given(ph=st.floats(6.9, 7.7), hco3=st.floats(2, 60), d=st.floats(0.01, 5))
def test_sbe_monotonic(ph, hco3, d):
    # Equation (CLSI): SBE rises with HCO3 and with pH.
    base = ab.standard_base_excess_clsi2009(ph=ph, hco3_mmol_l=hco3)
    assert ab.standard_base_excess_clsi2009(ph=ph, hco3_mmol_l=hco3 + d) > base
    assert ab.standard_base_excess_clsi2009(ph=min(ph + d / 10, 8.0), hco3_mmol_l=hco3) > base


# -- compensation --------------------------------------------------------------------------------------------


def test_cp01_winters(cases):
    # CP-01: Albert, Dell & Winters 1967 (1.5 x HCO3 + 8 +/- 2; verified in teaching texts).
    case = cases["CP-01"]
    e = ab.expected_pco2_winters(hco3_mmol_l=case["inputs"]["hco3_mmol_L"])
    assert e.value == approx(case, "expected_paco2_mmHg")
    assert e.low == approx(case, "range_low_mmHg")
    assert e.high == approx(case, "range_high_mmHg")


def test_cp02_metabolic_alkalosis(cases):
    # CP-02: 0.7 per mmol/L +/- 5 (Berend 2014; Kidney360 2022 Table 3, verified); 0.6 Narins & Emmett 1980.
    case = cases["CP-02"]
    hco3 = case["inputs"]["hco3_mmol_L"]
    e = ab.expected_pco2_metabolic_alkalosis(hco3_mmol_l=hco3)
    assert e.value == approx(case, "expected_paco2_mmHg")
    assert e.low == approx(case, "range_low_mmHg")
    assert e.high == approx(case, "range_high_mmHg")
    assert ab.expected_pco2_metabolic_alkalosis(hco3_mmol_l=hco3, slope=0.6).value == approx(
        case, "alt_slope_0p6_mmHg"
    )


def test_cp03_respiratory_acidosis(cases):
    # CP-03: acute 1/10 (Brandis; Narins & Emmett); chronic 3.5 (Narins & Emmett 1980; Berend 2014), 4
    # (Brandis), 5 (Martinu 2003, from memory); pH 0.008 and 0.003 per mmHg (Berend 2014 summary).
    case = cases["CP-03"]
    p = case["inputs"]["paco2_mmHg"]
    e = ab.expected_hco3_respiratory_acidosis(paco2_mmhg=p)
    assert e.acute.value == approx(case, "hco3_acute_mmol_L")
    assert e.chronic.value == approx(case, "hco3_chronic_3p5_mmol_L")
    assert ab.expected_hco3_linear(paco2_mmhg=p, mmol_per_10_mmhg=4) == approx(case, "hco3_chronic_4_mmol_L")
    assert e.chronic.high == approx(case, "hco3_chronic_5_mmol_L")  # the band's upper edge is the 5 slope
    r = ab.expected_ph_respiratory_acidosis(paco2_mmhg=p)
    assert r.acute == approx(case, "ph_acute_rule")
    assert r.chronic == approx(case, "ph_chronic_rule")


def test_cp04_respiratory_alkalosis(cases):
    # CP-04: acute 2/10; chronic 4/10 (Berend 2014; Kidney360 0.41) or 5/10 (Narins & Emmett; Brandis).
    case = cases["CP-04"]
    e = ab.expected_hco3_respiratory_alkalosis(paco2_mmhg=case["inputs"]["paco2_mmHg"])
    assert e.acute.value == approx(case, "hco3_acute_mmol_L")
    assert e.chronic.value == approx(case, "hco3_chronic_4_mmol_L")
    assert e.chronic.low == approx(case, "hco3_chronic_5_mmol_L")


def test_cp05_fraction_acute(cases):
    # CP-05: fraction-acute interpolation (common practice); bands >= 0.8, <= 0.2 (common practice).
    case = cases["CP-05"]
    i = case["inputs"]
    f_ph = ab.fraction_acute_ph(ph=i["ph"], paco2_mmhg=i["paco2_mmHg"])
    f_h = ab.fraction_acute_hco3(paco2_mmhg=i["paco2_mmHg"], hco3_mmol_l=i["hco3_mmol_L"])
    assert f_ph == approx(case, "fraction_acute_ph_rule")
    assert f_h == approx(case, "fraction_acute_hco3_rule_3p5")
    assert case["expected"]["category"] == "acute-on-chronic respiratory acidosis"
    assert ab.chronicity_from_fraction(fraction_acute=f_h) == "acute_on_chronic"
    assert ab.chronicity_from_fraction(fraction_acute=f_ph) == "acute_on_chronic"


def test_cp06_copenhagen_rules(cases):
    # CP-06: Schlichtig, Grogono & Severinghaus 1998 (coefficients from memory); Berend 2018.
    case = cases["CP-06"]
    i = case["inputs"]
    assert ab.expected_pco2_sbe_metabolic_acidosis(sbe_mmol_l=i["sbe_met_acid_mmol_L"]) == approx(
        case, "expected_paco2_met_acid_mmHg"
    )
    assert ab.expected_pco2_sbe_metabolic_alkalosis(sbe_mmol_l=i["sbe_met_alk_mmol_L"]) == approx(
        case, "expected_paco2_met_alk_mmHg"
    )
    acute, chronic = ab.expected_sbe_respiratory(paco2_mmhg=i["paco2_chronic_resp_mmHg"])
    assert chronic == approx(case, "expected_sbe_chronic_resp_mmol_L")
    assert acute == approx(case, "expected_sbe_acute_resp_mmol_L")


def test_copenhagen_chronic_rule_is_steeper_than_boston():
    # schlichtig1998 with nccls1994 (derived; docs/methods.md#copenhagen-cross-check): with the CLSI SBE, dSBE
    # = 0.4 dPaCO2 at PaCO2 60 corresponds to HCO3 33.5 and pH 7.359. Solve SBE(pH(HCO3), HCO3) = 8 for HCO3
    # by bisection.
    def sbe_at(hco3):
        ph = ab.ph_henderson_hasselbalch(hco3_mmol_l=hco3, pco2_mmhg=60)
        return ab.standard_base_excess_clsi2009(ph=ph, hco3_mmol_l=hco3)

    lo, hi = 25.0, 45.0
    for _ in range(60):
        mid = (lo + hi) / 2
        lo, hi = (mid, hi) if sbe_at(mid) < 8.0 else (lo, mid)
    assert lo == pytest.approx(33.5, abs=0.05)
    assert ab.ph_henderson_hasselbalch(hco3_mmol_l=lo, pco2_mmhg=60) == pytest.approx(7.359, abs=0.002)


def test_ph_rule_drift_at_large_rises():
    # berend2014 pH rules against henderson1908 (derived): PaCO2 80, acute HCO3 28: HH 7.157 against the
    # linear 7.08.
    e = ab.expected_hco3_respiratory_acidosis(paco2_mmhg=80)
    assert e.acute.value == pytest.approx(28.0)
    assert ab.ph_henderson_hasselbalch(hco3_mmol_l=28, pco2_mmhg=80) == pytest.approx(7.157, abs=0.001)
    assert ab.expected_ph_respiratory_acidosis(paco2_mmhg=80).acute == pytest.approx(7.08, abs=1e-9)


def test_bands_contain_default_and_order():
    # Bands of published slopes (narins1980, brandis, martinu2003; docs/methods.md#expected-compensation): the
    # default lies inside; chronic beyond acute.
    for p in (46, 60, 90, 140):
        e = ab.expected_hco3_respiratory_acidosis(paco2_mmhg=p)
        for x in e:
            assert x.low <= x.value <= x.high
        assert e.chronic.value > e.acute.value
    for p in (34, 25, 15):
        e = ab.expected_hco3_respiratory_alkalosis(paco2_mmhg=p)
        for x in e:
            assert x.low <= x.value <= x.high
        assert e.chronic.value < e.acute.value


def test_chronicity_bands():
    # Common practice bands (fraction_acute_bands).
    assert ab.chronicity_from_fraction(fraction_acute=0.8) == "acute"
    assert ab.chronicity_from_fraction(fraction_acute=0.2) == "chronic"
    assert ab.chronicity_from_fraction(fraction_acute=0.21) == "acute_on_chronic"
    assert ab.chronicity_from_fraction(fraction_acute=1.5) == "acute"
    assert ab.chronicity_from_fraction(fraction_acute=-0.5) == "chronic"


def test_baseline_estimate_inverts_the_rules():
    # Derived: a patient with usual PaCO2 55 (chronic 3.5/10 -> HCO3 29.25) rising acutely to 70 (+1/10 ->
    # 30.75) is recovered exactly; the estimate equals 40 + (1 - f)(PaCO2 - 40).
    hco3 = ab.expected_hco3_with_baseline(paco2_mmhg=70, baseline_pco2_mmhg=55)
    assert hco3 == pytest.approx(30.75)
    assert ab.baseline_pco2_from_hco3(paco2_mmhg=70, hco3_mmol_l=hco3) == pytest.approx(55.0)
    f = ab.fraction_acute_hco3(paco2_mmhg=70, hco3_mmol_l=hco3)
    assert 40 + (1 - f) * 30 == pytest.approx(55.0)
    # clamps: no chronic part, and no acute part
    assert ab.baseline_pco2_from_hco3(paco2_mmhg=70, hco3_mmol_l=24) == 40.0
    assert ab.baseline_pco2_from_hco3(paco2_mmhg=70, hco3_mmol_l=40) == 70.0


def test_expected_hco3_below_baseline_uses_acute_fall():
    # Derived: baseline 60 (HCO3 31), PaCO2 now 45 -> 31 - 2 x 1.5 = 28.
    assert ab.expected_hco3_with_baseline(paco2_mmhg=45, baseline_pco2_mmhg=60) == pytest.approx(28.0)


def test_alkalaemia_floor_solves_hh():
    # Derived: at the floor the pH computed with the acutely lowered HCO3 is exactly 7.45.
    floor = ab.pco2_for_ph_acute(ph_target=7.45, paco2_mmhg=70, hco3_mmol_l=29.7)
    hco3_then = 29.7 - 0.1 * (70 - floor)
    assert ab.ph_henderson_hasselbalch(hco3_mmol_l=hco3_then, pco2_mmhg=floor) == pytest.approx(
        7.45, abs=1e-9
    )
    assert ab.pco2_for_ph_acute(ph_target=7.45, paco2_mmhg=80, hco3_mmol_l=5) is None


@settings(max_examples=200, deadline=None)
@given(p=st.floats(46, 140), h=st.floats(10, 60), d=st.floats(0.01, 5))
def test_compensation_monotonic(p, h, d):
    # Physiology: with PaCO2 fixed, a higher HCO3 means more renal compensation, i.e. a smaller acute
    # fraction, a higher estimated usual PaCO2 and a higher alkalaemia floor.
    assert ab.fraction_acute_hco3(paco2_mmhg=p, hco3_mmol_l=h + d) < ab.fraction_acute_hco3(
        paco2_mmhg=p, hco3_mmol_l=h
    )
    assert ab.baseline_pco2_from_hco3(paco2_mmhg=p, hco3_mmol_l=h + d) >= ab.baseline_pco2_from_hco3(
        paco2_mmhg=p, hco3_mmol_l=h
    )
    f1 = ab.pco2_for_ph_acute(ph_target=7.45, paco2_mmhg=p, hco3_mmol_l=h)
    f2 = ab.pco2_for_ph_acute(ph_target=7.45, paco2_mmhg=p, hco3_mmol_l=h + d)
    if f1 is not None:
        assert f2 is not None and f2 > f1
    # Winters: more HCO3, higher expected PaCO2
    assert ab.expected_pco2_winters(hco3_mmol_l=h + d).value > ab.expected_pco2_winters(hco3_mmol_l=h).value


# -- gaps ----------------------------------------------------------------------------------------------------


def test_ag01(cases):
    # AG-01: AG = Na - (Cl + HCO3); normal AG 12, HCO3 24; delta-ratio bands (Brandis, verified via notes).
    case = cases["AG-01"]
    i = case["inputs"]
    ag = ab.anion_gap(na_mmol_l=i["na_mmol_L"], cl_mmol_l=i["cl_mmol_L"], hco3_mmol_l=i["hco3_mmol_L"])
    assert ag == approx(case, "ag_mmol_L")
    agk = ab.anion_gap_with_potassium(
        na_mmol_l=i["na_mmol_L"],
        k_mmol_l=i["k_mmol_L"],
        cl_mmol_l=i["cl_mmol_L"],
        hco3_mmol_l=i["hco3_mmol_L"],
    )
    assert agk == approx(case, "ag_with_k_mmol_L")
    dr = ab.delta_ratio(anion_gap_mmol_l=ag, hco3_mmol_l=i["hco3_mmol_L"])
    assert dr == approx(case, "delta_ratio")
    assert ab.delta_gap(anion_gap_mmol_l=ag, hco3_mmol_l=i["hco3_mmol_L"]) == approx(case, "delta_gap_mmol_L")
    # "pure HAGMA" in the case's words is the 0.8-2 band
    assert case["expected"]["delta_ratio_band"] == "pure HAGMA"
    assert ab.delta_ratio_band_brandis(delta_ratio_value=dr) == "high_anion_gap_acidosis"


def test_ag02_albumin_correction(cases):
    # AG-02: Figge et al. 1998 (0.25 per g/L = 2.5 per g/dL, verified); normal 4.0 (common) or 4.4 g/dL
    # (CJASN definitions table, verified).
    case = cases["AG-02"]
    i = case["inputs"]
    assert ab.anion_gap_albumin_corrected_figge1998(
        anion_gap_mmol_l=i["ag_mmol_L"], albumin_g_dl=i["albumin_g_dL"]
    ) == approx(case, "ag_corrected_mmol_L")
    assert ab.anion_gap_albumin_corrected_figge1998(
        anion_gap_mmol_l=i["ag_mmol_L"], albumin_g_dl=i["albumin_g_dL"], normal_albumin_g_dl=4.4
    ) == approx(case, "ag_corrected_normal_alb_4p4_mmol_L")


def test_ag03_mixed(cases):
    # AG-03: Brandis delta-ratio bands (verified): 0.571 is in 0.4-0.8, combined HAGMA + NAGMA.
    case = cases["AG-03"]
    i = case["inputs"]
    ag = ab.anion_gap(na_mmol_l=i["na_mmol_L"], cl_mmol_l=i["cl_mmol_L"], hco3_mmol_l=i["hco3_mmol_L"])
    assert ag == approx(case, "ag_mmol_L")
    dr = ab.delta_ratio(anion_gap_mmol_l=ag, hco3_mmol_l=i["hco3_mmol_L"])
    assert dr == approx(case, "delta_ratio")
    assert ab.delta_gap(anion_gap_mmol_l=ag, hco3_mmol_l=i["hco3_mmol_L"]) == approx(case, "delta_gap_mmol_L")
    assert case["expected"]["delta_ratio_band"] == "mixed HAGMA+NAGMA"
    assert ab.delta_ratio_band_brandis(delta_ratio_value=dr) == "high_and_normal_anion_gap_acidosis"


def test_delta_bands_edges():
    # Brandis bands and the +/- 6 delta-gap reading (common practice), at and around their edges.
    band = ab.delta_ratio_band_brandis
    assert band(delta_ratio_value=0.39) == "normal_anion_gap_acidosis"
    assert band(delta_ratio_value=0.4) == "high_and_normal_anion_gap_acidosis"
    assert band(delta_ratio_value=0.8) == "high_anion_gap_acidosis"
    assert band(delta_ratio_value=2.0) == "high_anion_gap_acidosis"
    assert band(delta_ratio_value=2.01) == "high_anion_gap_acidosis_with_raised_hco3"
    assert ab.delta_gap_reading(delta_gap_mmol_l=-6.0) == "pure_high_anion_gap"
    assert ab.delta_gap_reading(delta_gap_mmol_l=6.01) == "added_metabolic_alkalosis"


def test_ag04_osmolar_gap(cases):
    # AG-04: 2 Na + glucose + urea (Cleve Clin J Med osmol-gap box, verified). The US form with bedside
    # divisors is the same equation; exact mg/dL conversions (iupac_masses) reproduce it within
    # 0.01.
    from tidewell import units

    case = cases["AG-04"]
    i = case["inputs"]
    calc = ab.osmolality_calculated_si(
        na_mmol_l=i["na_mmol_L"], glucose_mmol_l=i["glucose_mmol_L"], urea_mmol_l=i["urea_mmol_L"]
    )
    assert calc == approx(case, "calc_osm_si")
    assert ab.osmolar_gap(measured_mosm_kg=i["measured_osm_mOsm_kg"], calculated_mosm_kg=calc) == approx(
        case, "osm_gap_si"
    )
    glucose = units.convert(i["glucose_mg_dL"], "mg/dL", "mmol/L", substance="glucose")
    urea = units.convert(i["bun_mg_dL"], "mg/dL", "mmol/L", substance="bun")
    calc_us = ab.osmolality_calculated_si(na_mmol_l=i["na_mmol_L"], glucose_mmol_l=glucose, urea_mmol_l=urea)
    assert calc_us == approx(case, "calc_osm_us")
    assert ab.osmolar_gap(
        measured_mosm_kg=i["measured_osm_us_mOsm_kg"], calculated_mosm_kg=calc_us
    ) == approx(case, "osm_gap_us")


@settings(max_examples=200, deadline=None)
@given(cl=st.floats(70, 120), alb=st.floats(1, 5.5), d=st.floats(0.01, 5))
def test_gap_monotonic(cl, alb, d):
    # Equations: the anion gap falls as chloride rises; the corrected gap falls as albumin rises.
    ag = ab.anion_gap(na_mmol_l=140, cl_mmol_l=cl, hco3_mmol_l=20)
    assert ab.anion_gap(na_mmol_l=140, cl_mmol_l=cl + d, hco3_mmol_l=20) < ag
    c1 = ab.anion_gap_albumin_corrected_figge1998(anion_gap_mmol_l=ag, albumin_g_dl=alb)
    c2 = ab.anion_gap_albumin_corrected_figge1998(anion_gap_mmol_l=ag, albumin_g_dl=min(alb + d, 6.0))
    assert c2 <= c1


# -- Stewart -------------------------------------------------------------------------------------------------


def test_st01_strong_ion_gap(cases):
    # ST-01: Figge-Mydosh-Fencl albumin and phosphate terms (CJASN definitions table, verified); divalent
    # cations in mmol/L doubled to mEq/L.
    case = cases["ST-01"]
    i = case["inputs"]
    sida = ab.strong_ion_difference_apparent(
        na_mmol_l=i["na_mmol_L"],
        k_mmol_l=i["k_mmol_L"],
        ca_ionised_mmol_l=i["ca_ionized_mmol_L"],
        mg_mmol_l=i["mg_mmol_L"],
        cl_mmol_l=i["cl_mmol_L"],
        lactate_mmol_l=i["lactate_mmol_L"],
    )
    assert sida == approx(case, "sida_mEq_L")
    alb = ab.albumin_charge_figge(albumin_g_l=i["albumin_g_L"], ph=i["ph"])
    assert alb == approx(case, "albumin_charge_mEq_L")
    phos = ab.phosphate_charge_figge(phosphate_mmol_l=i["phosphate_mmol_L"], ph=i["ph"])
    assert phos == approx(case, "phosphate_charge_mEq_L")
    side = ab.strong_ion_difference_effective(
        hco3_mmol_l=i["hco3_mmol_L"],
        albumin_g_l=i["albumin_g_L"],
        phosphate_mmol_l=i["phosphate_mmol_L"],
        ph=i["ph"],
    )
    assert side == approx(case, "side_mEq_L")
    assert ab.strong_ion_gap(sid_apparent_meq_l=sida, sid_effective_meq_l=side) == approx(case, "sig_mEq_L")


def test_st02_story_partition(cases):
    # ST-02: inputs are the worked vignette of Story 2016 (verified); constants 35 (2016) and 38,
    # 0.25 (42 - alb) (Story, Morimatsu & Bellomo 2004) from memory.
    case = cases["ST-02"]
    i = case["inputs"]
    sbe = ab.standard_base_excess_clsi2009(ph=i["ph"], hco3_mmol_l=i["hco3_mmol_L"])
    assert sbe == approx(case, "sbe_clsi_mmol_L")
    p16 = ab.base_excess_partition_story2016(
        sbe_mmol_l=sbe,
        na_mmol_l=i["na_mmol_L"],
        cl_mmol_l=i["cl_mmol_L"],
        albumin_g_l=i["albumin_g_L"],
        lactate_mmol_l=i["lactate_mmol_L"],
    )
    assert p16.na_cl == approx(case, "nacl_effect_2016_mEq_L")
    assert p16.albumin == approx(case, "albumin_effect_mEq_L")
    assert p16.lactate == approx(case, "lactate_effect_mEq_L")
    assert p16.unmeasured == approx(case, "other_ions_2016_mEq_L")
    p04 = ab.base_excess_partition_story2004(
        sbe_mmol_l=sbe, na_mmol_l=i["na_mmol_L"], cl_mmol_l=i["cl_mmol_L"], albumin_g_l=i["albumin_g_L"]
    )
    assert p04.na_cl == approx(case, "nacl_effect_2004_mEq_L")
    assert p04.unmeasured_including_lactate == approx(case, "unmeasured_incl_lactate_2004_mEq_L")


def test_story_partition_each_effect_from_the_published_formula():
    # Derived here from story2016's own formulas (the 35 constant from memory), not from the module:
    # Na-Cl effect = 137 - 108 - 35 = -6; albumin effect = 0.25 x (42 - 31) = 2.75; lactate effect = -3.2;
    # unmeasured = SBE - (effects) = -7.3 - (-6 + 2.75 - 3.2) = -0.85
    p = ab.base_excess_partition_story2016(
        sbe_mmol_l=-7.3, na_mmol_l=137, cl_mmol_l=108, albumin_g_l=31, lactate_mmol_l=3.2
    )
    assert p.na_cl == pytest.approx(-6.0)
    assert p.albumin == pytest.approx(2.75)
    assert p.lactate == pytest.approx(-3.2)
    assert p.unmeasured == pytest.approx(-0.85)
    assert sum(p) == pytest.approx(-7.3)


# -- input validation ----------------------------------------------------------------------------------------


@pytest.mark.parametrize("bad", [float("nan"), float("inf"), True, "7.4", None])
def test_rejects_non_numbers(bad):
    with pytest.raises(InputError, match="ph"):
        ab.hydrogen_ion_from_ph(ph=bad)
    with pytest.raises(InputError, match="hco3_mmol_l"):
        ab.standard_base_excess_clsi2009(ph=7.4, hco3_mmol_l=bad)


@pytest.mark.parametrize(
    ("func", "kwargs", "field"),
    [
        (ab.ph_henderson_hasselbalch, {"hco3_mmol_l": 0.1, "pco2_mmhg": 40}, "hco3_mmol_l"),
        (ab.hco3_henderson_hasselbalch, {"ph": 8.5, "pco2_mmhg": 40}, "ph"),
        (ab.expected_pco2_winters, {"hco3_mmol_l": -1}, "hco3_mmol_l"),
        (ab.fraction_acute_hco3, {"paco2_mmhg": 40.5, "hco3_mmol_l": 24}, "paco2_mmhg"),
        (ab.fraction_acute_ph, {"ph": 7.3, "paco2_mmhg": 40}, "paco2_mmhg"),
        (ab.delta_ratio, {"anion_gap_mmol_l": 20, "hco3_mmol_l": 24}, "hco3_mmol_l"),
        (
            ab.base_excess_lang_zander2002,
            {"ph": 7.4, "pco2_mmhg": 40, "hb_g_dl": 15, "so2_fraction": 92},
            "so2",
        ),
        (
            ab.anion_gap_albumin_corrected_figge1998,
            {"anion_gap_mmol_l": 10, "albumin_g_dl": 30},
            "albumin_g_dl",
        ),
        (ab.expected_pco2_metabolic_alkalosis, {"hco3_mmol_l": 30, "slope": 7}, "slope"),
    ],
)
def test_domain_errors_name_the_parameter(func, kwargs, field):
    with pytest.raises(InputError) as info:
        func(**kwargs)
    assert info.value.field.startswith(field)
    assert str(info.value).startswith(field)


def test_functions_are_keyword_only():
    with pytest.raises(TypeError):
        ab.anion_gap(140, 100, 12)  # type: ignore[misc]


def test_no_function_returns_nan_on_its_accepted_edges():
    # Edges of the accepted ranges give finite numbers (DEVELOPERS.md: a domain function never returns NaN).
    values = [
        ab.ph_henderson_hasselbalch(hco3_mmol_l=0.5, pco2_mmhg=300),
        ab.ph_henderson_hasselbalch(hco3_mmol_l=80, pco2_mmhg=1),
        ab.hco3_henderson_hasselbalch(ph=8.0, pco2_mmhg=300),
        ab.fraction_acute_hco3(paco2_mmhg=41, hco3_mmol_l=80),
        ab.fraction_acute_ph(ph=6.5, paco2_mmhg=41),
        ab.delta_ratio(anion_gap_mmol_l=200, hco3_mmol_l=23.5),
    ]
    assert all(math.isfinite(v) for v in values)


@pytest.mark.parametrize(("fraction", "word"), [(1e6, "acute"), (-1e6, "chronic")])
def test_chronicity_from_fraction_accepts_its_whole_range(fraction, word):
    # the accepted range is -1e6 to 1e6 (a guard against absurd input): its ends read, beyond is refused
    assert ab.chronicity_from_fraction(fraction_acute=fraction) == word
    with pytest.raises(InputError) as info:
        ab.chronicity_from_fraction(fraction_acute=fraction * (1 + 1e-6))
    assert info.value.field == "fraction_acute"
