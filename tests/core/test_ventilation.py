"""Ventilation domain functions: worked cases VN-01..VN-06, the mechanisms decomposition, error paths.

Provenance words beside each check: "published", "derived" (hand-computed from the cited equation),
"common practice", "from memory".
"""

from __future__ import annotations

import itertools
import math

import pytest
from hypothesis import assume, given, settings
from hypothesis import strategies as st

from casebook import close, load_cases
from conftest import assert_accepted_range
from tidewell.errors import InputError
from tidewell.formulas import ventilation as vn

# The alveolar ventilation constant written here from its definition, not imported from the module under
# test: 760 mmHg x (310.15 K / 273.15 K) / 1000 mL/L converts VCO2 at STPD to VA at BTPS (derived;
# alveolar_ventilation, common practice: the textbook 0.863)
K_BTPS = 760.0 * 310.15 / 273.15 / 1000.0

CASES = load_cases()


# -- VN-01: alveolar_ventilation (0.863 derived from STPD -> BTPS; alveolar_ventilation) -------------------
def test_vn01_ve_va_and_predicted_paco2():
    close("VN-01", "ve_L_min", vn.minute_ventilation(vt_ml=500, rr_per_min=12))  # derived
    va = vn.alveolar_ventilation(vt_ml=500, vd_ml=150, rr_per_min=12)
    close("VN-01", "va_L_min", va)  # derived
    close("VN-01", "paco2_predicted_mmHg", vn.paco2_from_alveolar_ventilation(vco2_ml_min=200, va_l_min=va))
    close("VN-01", "k_constant", vn.K_CO2)  # derived: 760 x 310.15 / 273.15 / 1000
    assert vn.K_CO2 == pytest.approx(K_BTPS, rel=1e-12)


def test_k_constant_is_the_textbook_0863():
    # alveolar_ventilation (common practice): the textbook constant 0.863
    assert round(vn.K_CO2, 3) == 0.863


# -- VN-02: tusman2012 (verified), Enghoff/Bohr; alveolar dead space from EtCO2 (from memory) ----------------
def test_vn02_dead_space_fractions():
    close("VN-02", "vd_vt_enghoff", vn.vd_vt_enghoff(paco2_mmhg=50, peco2_mmhg=25))
    close("VN-02", "vd_vt_bohr", vn.vd_vt_bohr(paco2_alveolar_mmhg=40, peco2_mmhg=25))
    close(
        "VN-02", "vdalv_fraction_from_petco2", vn.alveolar_dead_space_fraction(paco2_mmhg=50, etco2_mmhg=35)
    )


def test_vd_vt_from_vco2_matches_forward_equation():
    # derived: VN-01 forward (VE 6, VD/VT 0.3, VCO2 200 -> PaCO2 41.09) inverted gives VD/VT 0.3 back
    paco2 = vn.paco2_from_alveolar_ventilation(vco2_ml_min=200, va_l_min=4.2)
    assert vn.vd_vt_from_vco2(paco2_mmhg=paco2, vco2_ml_min=200, ve_l_min=6.0) == pytest.approx(0.3)


def test_vco2_from_expired_co2_closes_the_enghoff_equation():
    # derived: VCO2 = VE x PECO2 / K and Enghoff VD/VT put back into PaCO2 = K VCO2 / (VE (1 - VD/VT))
    # with K written here (K_BTPS), not the module's constant: VCO2 = 7 x 22 / 0.86296 = 178.45 mL/min
    vco2 = vn.vco2_from_expired_co2(ve_l_min=7.0, peco2_mmhg=22.0)
    assert vco2 == pytest.approx(7.0 * 22.0 / K_BTPS, rel=1e-9)
    assert vco2 == pytest.approx(178.45, abs=0.01)
    d = vn.vd_vt_enghoff(paco2_mmhg=55.0, peco2_mmhg=22.0)
    assert d == pytest.approx(0.6)  # Enghoff (tusman2012): (55 - 22) / 55
    assert K_BTPS * vco2 / (7.0 * (1 - d)) == pytest.approx(55.0)


# -- VN-03: to_target_pco2 (common practice; derived from the alveolar ventilation equation) ----------------
def test_vn03_to_target():
    r = vn.to_target(vt_ml=500, rr_per_min=16, vd_ml=150, paco2_mmhg=60, target_paco2_mmhg=45)
    close("VN-03", "ve_new_L_min", r.ve_l_min)
    close("VN-03", "va_now_L_min", r.va_now_l_min)
    close("VN-03", "va_new_L_min", r.va_new_l_min)
    close("VN-03", "rr_new_fixed_vt_min", r.rr_at_same_vt)
    close("VN-03", "vt_new_fixed_rr_mL", r.vt_at_same_rr_ml)


def test_to_target_reaches_the_target():
    # derived: the new settings put back into PaCO2 = K VCO2 / VA give the target for any VCO2
    r = vn.to_target(vt_ml=450, rr_per_min=14, vd_ml=180, paco2_mmhg=70, target_paco2_mmhg=50)
    vco2 = 70 * r.va_now_l_min / K_BTPS
    va_rr = (450 - 180) * r.rr_at_same_vt / 1000
    va_vt = (r.vt_at_same_rr_ml - 180) * 14 / 1000
    for va in (va_rr, va_vt, r.va_new_l_min):
        assert vn.paco2_from_alveolar_ventilation(vco2_ml_min=vco2, va_l_min=va) == pytest.approx(50.0)


# -- VN-04: ardsnet2000 PBW (verified formulas), numa1996 2.2 mL/kg (verified) -------------------------------
def test_vn04_predicted_body_weight_and_tidal_volumes():
    male = vn.predicted_body_weight_ardsnet(height_cm=175, sex="male")
    female = vn.predicted_body_weight_ardsnet(height_cm=160, sex="female")
    close("VN-04", "pbw_male_kg", male)
    close("VN-04", "pbw_female_kg", female)
    bm, bf = vn.lung_protective_vt(pbw_kg=male), vn.lung_protective_vt(pbw_kg=female)
    close("VN-04", "vt6_male_mL", bm.target_ml)
    close("VN-04", "vt8_male_mL", bm.high_ml)
    close("VN-04", "vt6_female_mL", bf.target_ml)
    close("VN-04", "vt8_female_mL", bf.high_ml)
    close("VN-04", "anatomic_vd_male_mL", vn.anatomical_dead_space(pbw_kg=male))


def test_pbw_inch_form_agrees():
    # ardsnet2000 inch form 50 + 2.3 (in - 60). docs/methods.md#where-sources-disagree-the-defaults says the
    # forms differ by <= 0.1 kg; derived here: they differ by (0.91 - 2.3 / 2.54) x (cm - 152.4) = 0.0045 kg
    # per cm, so <= 0.1 kg up to about 174 cm and 0.21 kg at 200 cm (the cm form, the recommended default, is
    # used).
    for cm in range(150, 201, 5):
        inch = cm / 2.54
        diff = vn.predicted_body_weight_ardsnet(height_cm=cm, sex="male") - (50 + 2.3 * (inch - 60))
        assert diff == pytest.approx((0.91 - 2.3 / 2.54) * (cm - 152.4), abs=1e-9)
        if cm <= 174:
            assert abs(diff) <= 0.1


# -- VN-05: expiratory_time (common practice) ----------------------------------------------------------------
def test_vn05_expiratory_time():
    t = vn.respiratory_timing(rr_per_min=20, i_part=1, e_part=2)
    close("VN-05", "te_s", t.te_s)
    close("VN-05", "ti_s", t.ti_s)
    close("VN-05", "te2_s", vn.respiratory_timing(rr_per_min=12, i_part=1, e_part=3).te_s)


@pytest.mark.parametrize("text", ["1-2", "1:", "a:b", "1:2:3", "0:2", "1:20", ""])
def test_bad_ie_ratio(text):
    with pytest.raises(InputError, match="ie_ratio"):
        vn.parse_ie_ratio(text)


# -- VN-06: fever_vco2 (verified 10-13 %/degC), linear -------------------------------------------------------
def test_vn06_fever():
    v10 = vn.vco2_with_fever(vco2_ml_min=200, temperature_c=39.5)
    v13 = vn.vco2_with_fever(vco2_ml_min=200, temperature_c=39.5, rate_per_degc=0.13)
    close("VN-06", "vco2_10pct_mL_min", v10)
    close("VN-06", "vco2_13pct_mL_min", v13)
    close(
        "VN-06",
        "paco2_at_fixed_va_10pct_mmHg",
        vn.paco2_from_alveolar_ventilation(vco2_ml_min=v10, va_l_min=4.2),
    )
    close(
        "VN-06",
        "paco2_at_fixed_va_13pct_mmHg",
        vn.paco2_from_alveolar_ventilation(vco2_ml_min=v13, va_l_min=4.2),
    )
    close(
        "VN-06",
        "va_needed_for_40_10pct_L_min",
        vn.alveolar_ventilation_for_paco2(vco2_ml_min=v10, paco2_mmhg=40),
    )


def test_fever_rule_leaves_normothermia_and_hypothermia_alone():
    # decision (module docstring): no change at or below 37 degC
    assert vn.vco2_with_fever(vco2_ml_min=200, temperature_c=37.0) == 200.0
    assert vn.vco2_with_fever(vco2_ml_min=200, temperature_c=34.0) == 200.0


def test_resting_vco2_estimate():
    # jette1990_met (from memory): 3.5 mL O2/kg/min x R 0.8 = 2.8 mL/kg/min; resting_vco2 (from memory) 200
    assert vn.vco2_resting_estimate(weight_kg=70) == pytest.approx(196.0)
    assert vn.vco2_resting_estimate() == 200.0


# -- monotonicity: more VE, lower PaCO2 (alveolar_ventilation, derived) --------------------------------------
def test_more_ventilation_lowers_paco2():
    values = [vn.paco2_from_alveolar_ventilation(vco2_ml_min=200, va_l_min=va / 10) for va in range(10, 200)]
    assert all(b < a for a, b in itertools.pairwise(values))


# -- error paths ---------------------------------------------------------------------------------------------
@pytest.mark.parametrize("vd", [500, 600])
def test_dead_space_not_below_tidal_volume_is_inconsistent(vd):
    with pytest.raises(InputError) as info:
        vn.alveolar_ventilation(vt_ml=500, vd_ml=vd, rr_per_min=12)
    assert info.value.code == "inconsistent" and info.value.field == "vd_ml"


def test_peco2_not_below_paco2_is_inconsistent():
    with pytest.raises(InputError) as info:
        vn.vd_vt_enghoff(paco2_mmhg=40, peco2_mmhg=40)
    assert info.value.code == "inconsistent"


def test_vco2_that_cannot_be_cleared_is_inconsistent():
    # derived: VE 3 L/min at PaCO2 30 clears at most 3 x 30 / 0.863 = 104 mL/min; 200 is impossible
    with pytest.raises(InputError) as info:
        vn.vd_vt_from_vco2(paco2_mmhg=30, vco2_ml_min=200, ve_l_min=3.0)
    assert info.value.code == "inconsistent" and info.value.field == "vco2_ml_min"


@pytest.mark.parametrize("bad", [float("nan"), float("inf"), True, "500", None, 10.0, 5000.0])
def test_tidal_volume_rejects_non_numbers_and_out_of_range(bad):
    with pytest.raises(InputError, match="vt_ml"):
        vn.minute_ventilation(vt_ml=bad, rr_per_min=12)


# -- mechanisms (co2_log_shares: derived here from the alveolar ventilation equation) ------------------------
VCO2_REF = 200.0
VE_REF = K_BTPS * VCO2_REF / (40.0 * 0.7)  # the reference VE that gives 40 mmHg exactly (6.164 L/min)


def model_paco2(ve, d, vco2):
    return K_BTPS * vco2 / (ve * (1 - d))


def mech(ve, d, vco2, paco2=None):
    return vn.co2_mechanisms(
        paco2_mmhg=model_paco2(ve, d, vco2) if paco2 is None else paco2,
        ve_l_min=ve,
        vd_vt=d,
        vco2_ml_min=vco2,
        vco2_reference_ml_min=VCO2_REF,
    )


def test_reference_state_reproduces_40():
    # derived: VE_ref is defined so that the reference values give exactly 40 mmHg (no residual)
    assert model_paco2(VE_REF, 0.3, VCO2_REF) == pytest.approx(40.0)
    assert 5.0 <= VE_REF <= 8.0  # normal_ventilation (common practice): 5-8 L/min
    assert VE_REF == pytest.approx(6.164, abs=0.001)


@pytest.mark.parametrize(
    ("ve", "d", "vco2", "cause"),
    [
        (VE_REF / 2, 0.3, VCO2_REF, "ventilation"),  # hand-built: only VE is off reference (PaCO2 80)
        (VE_REF, 0.65, VCO2_REF, "dead_space"),  # only VD/VT (PaCO2 40 x 0.7 / 0.35 = 80)
        (VE_REF, 0.3, 1.5 * VCO2_REF, "co2_production"),  # only VCO2 (PaCO2 60)
    ],
)
def test_single_cause_gets_the_whole_share(ve, d, vco2, cause):
    m = mech(ve, d, vco2)
    assert m.shares[cause] == pytest.approx(1.0, abs=1e-9)
    assert sum(m.shares.values()) == pytest.approx(1.0)
    assert m.residual_log == pytest.approx(0.0, abs=1e-12)
    assert m.paco2_if_normal_mmhg[cause] == pytest.approx(40.0)


def test_two_causes_split_by_their_logs():
    # hand-built: VE at half (x2) and VCO2 x2: PaCO2 160 = 40 x 2 x 2; equal log terms -> 0.5 / 0.5
    m = mech(VE_REF / 2, 0.3, 2 * VCO2_REF)
    assert m.paco2_model_mmhg == pytest.approx(160.0)
    assert m.shares["ventilation"] == pytest.approx(0.5)
    assert m.shares["co2_production"] == pytest.approx(0.5)
    assert m.shares["dead_space"] == 0.0


def test_lowering_cause_is_reported_separately_not_as_negative_share():
    # hand-built: high VD/VT 0.65 (x2) partly offset by VE x1.25: shares only over the raising cause
    m = mech(VE_REF * 1.25, 0.65, VCO2_REF)
    assert m.shares == {"ventilation": 0.0, "dead_space": pytest.approx(1.0), "co2_production": 0.0}
    assert m.lowering == ("ventilation",)
    assert m.log_terms["ventilation"] == pytest.approx(-math.log(1.25))
    # if ventilation were at reference the PaCO2 would be higher (80 mmHg): derived
    assert m.paco2_if_normal_mmhg["ventilation"] == pytest.approx(80.0)


def test_log_terms_sum_to_the_log_ratio():
    m = mech(4.1, 0.47, 260.0)
    total = sum(m.log_terms.values())
    assert total == pytest.approx(math.log(m.paco2_model_mmhg / 40.0))


def test_residual_when_measured_values_do_not_close():
    # measured PaCO2 10 % above the model of the three measured values: residual ln(1.1), not shared out
    paco2 = model_paco2(VE_REF / 2, 0.3, VCO2_REF) * 1.1
    m = mech(VE_REF / 2, 0.3, VCO2_REF, paco2=paco2)
    assert m.residual_log == pytest.approx(math.log(1.1))
    assert m.shares["ventilation"] == pytest.approx(1.0)


def test_no_raising_cause_gives_no_shares():
    m = mech(VE_REF * 1.2, 0.25, VCO2_REF, paco2=50.0)
    assert m.shares is None and m.raising == ()


@settings(max_examples=400, deadline=None, derandomize=True, database=None)
@given(
    paco2=st.floats(min_value=45.0, max_value=250.0, exclude_min=True, exclude_max=True),
    d=st.floats(min_value=0.05, max_value=0.9),
    factor=st.floats(min_value=0.5, max_value=3.0),
)
def test_shares_sum_to_one_and_are_fractions(paco2, d, factor):
    # the raised PaCO2 is drawn and VE solved from the alveolar ventilation equation (no input rejected):
    # VE = K VCO2 / (PaCO2 (1 - VD/VT)), from 0.36 to 115 L/min over these spans
    vco2 = VCO2_REF * factor
    ve = K_BTPS * vco2 / (paco2 * (1 - d))
    m = mech(ve, d, vco2, paco2=paco2)
    assert sum(m.shares.values()) == pytest.approx(1.0)
    assert all(0.0 <= s <= 1.0 for s in m.shares.values())
    assert all(m.shares[c] == 0.0 for c in m.lowering)


# derandomised: about 60 % of draws are rejected by the assume() below (PaCO2 after the cut above the
# accepted range), so the same examples run on every machine and the health check cannot fail at random
@settings(max_examples=200, deadline=None, derandomize=True, database=None)
@given(
    ve=st.floats(min_value=1.5, max_value=5.0),
    d=st.floats(min_value=0.35, max_value=0.8),
    factor=st.floats(min_value=1.05, max_value=2.0),
    cut=st.floats(min_value=0.5, max_value=0.95),
)
def test_less_ventilation_raises_the_ventilation_share(ve, d, factor, cut):
    # monotonicity: with dead space and VCO2 fixed (both raising), lowering VE raises its share
    vco2 = VCO2_REF * factor
    assume(model_paco2(ve * cut, d, vco2) < 250.0)
    before = mech(ve, d, vco2).shares
    after = mech(ve * cut, d, vco2).shares
    assert after["ventilation"] > before["ventilation"]
    assert after["dead_space"] < before["dead_space"]


# -- vt_per_kg and pco2_from_etco2 ------------------------------------------------------------------------
def test_vt_per_kg_of_predicted_body_weight():
    # ardsnet2000 (verified): PBW male 50 + 0.91 x (170 - 152.4) = 66.016 kg; 450 mL / 66.016 = 6.82 mL/kg
    pbw = 50.0 + 0.91 * (170.0 - 152.4)
    assert vn.vt_per_kg(vt_ml=450, pbw_kg=pbw) == pytest.approx(6.8165, abs=1e-4)
    # 6 mL/kg, the protective target (ardsnet2000), read back
    assert vn.vt_per_kg(vt_ml=6.0 * pbw, pbw_kg=pbw) == pytest.approx(6.0, rel=1e-12)


@pytest.mark.parametrize(("field", "kwargs"), [("pbw_kg", {"pbw_kg": 9.9}), ("pbw_kg", {"pbw_kg": 150.1})])
def test_vt_per_kg_refuses_a_body_weight_out_of_range(field, kwargs):
    with pytest.raises(InputError) as info:
        vn.vt_per_kg(vt_ml=450, **kwargs)
    assert info.value.field == field


def test_pco2_from_etco2_keeps_the_paired_gradient():
    # etco2_gradient (common practice): gradient = PaCO2 - EtCO2 = 62 - 51 = 11; later EtCO2 44 -> 55
    track = vn.pco2_from_etco2(paco2_mmhg=62, etco2_mmhg=51, etco2_now_mmhg=44)
    assert track.gradient_mmhg == pytest.approx(11.0)
    assert track.paco2_now_mmhg == pytest.approx(55.0)
    # an EtCO2 above the PaCO2 (negative gradient) is carried as it is: 40 - 43 = -3; 50 -> 47
    neg = vn.pco2_from_etco2(paco2_mmhg=40, etco2_mmhg=43, etco2_now_mmhg=50)
    assert (neg.gradient_mmhg, neg.paco2_now_mmhg) == (pytest.approx(-3.0), pytest.approx(47.0))


@pytest.mark.parametrize("field", ["etco2_mmhg", "etco2_now_mmhg"])
def test_pco2_from_etco2_refuses_an_etco2_below_1(field):
    kwargs = {"paco2_mmhg": 50.0, "etco2_mmhg": 40.0, "etco2_now_mmhg": 42.0, field: 0.5}
    with pytest.raises(InputError) as info:
        vn.pco2_from_etco2(**kwargs)
    assert info.value.field == field


# -- the accepted ranges, each end on both sides -------------------------------------------------------------
# The project's plausibility limits of each input (no published source), written here by hand from the
# docstrings where they give them (VT 50-2000 mL, RR 4-60/min, height 120-230 cm, PCO2 5-250 mmHg, VCO2
# 10-5000 mL/min, VE 0.2-120 L/min, core temperature 25-43 degC, I and E parts 0.1-10), else as the module has
# had them since written (PBW 10-150 kg, weight 10-350 kg, EtCO2 1-250 mmHg ...): a change is then a decision.

_MECH = {
    "paco2_mmhg": 60.0,
    "ve_l_min": 8.0,
    "vd_vt": 0.3,
    "vco2_ml_min": 200.0,
    "vco2_reference_ml_min": 200.0,
}
_ET = {"paco2_mmhg": 60.0, "etco2_mmhg": 40.0, "etco2_now_mmhg": 40.0}
_TARGET = {"vt_ml": 500.0, "rr_per_min": 16.0, "vd_ml": 150.0, "paco2_mmhg": 60.0, "target_paco2_mmhg": 45.0}


def _without(base: dict, field: str) -> dict:
    return {k: v for k, v in base.items() if k != field}


@pytest.mark.parametrize(
    ("func", "field", "low", "high", "base"),
    [
        (vn.minute_ventilation, "vt_ml", 50.0, 2000.0, {"rr_per_min": 12.0}),
        (vn.minute_ventilation, "rr_per_min", 4.0, 60.0, {"vt_ml": 500.0}),
        (vn.alveolar_ventilation, "vt_ml", 50.0, 2000.0, {"vd_ml": 0.0, "rr_per_min": 12.0}),
        (vn.alveolar_ventilation, "rr_per_min", 4.0, 60.0, {"vt_ml": 500.0, "vd_ml": 150.0}),
        (vn.predicted_body_weight_ardsnet, "height_cm", 120.0, 230.0, {"sex": "male"}),
        (vn.anatomical_dead_space, "pbw_kg", 10.0, 150.0, {}),
        (vn.paco2_from_alveolar_ventilation, "vco2_ml_min", 10.0, 5000.0, {"va_l_min": 5.0}),
        (vn.paco2_from_alveolar_ventilation, "va_l_min", 0.001, 120.0, {"vco2_ml_min": 200.0}),
        (vn.alveolar_ventilation_for_paco2, "vco2_ml_min", 10.0, 5000.0, {"paco2_mmhg": 40.0}),
        (vn.alveolar_ventilation_for_paco2, "paco2_mmhg", 5.0, 250.0, {"vco2_ml_min": 200.0}),
        (vn.vd_vt_enghoff, "paco2_mmhg", 5.0, 250.0, {"peco2_mmhg": 0.0}),
        (vn.vd_vt_bohr, "paco2_alveolar_mmhg", 1.0, 250.0, {"peco2_mmhg": 0.0}),
        (vn.alveolar_dead_space_fraction, "paco2_mmhg", 5.0, 250.0, {"etco2_mmhg": 0.0}),
        (vn.vd_vt_from_vco2, "paco2_mmhg", 5.0, 250.0, {"vco2_ml_min": 10.0, "ve_l_min": 120.0}),
        (vn.vd_vt_from_vco2, "vco2_ml_min", 10.0, 5000.0, {"paco2_mmhg": 250.0, "ve_l_min": 120.0}),
        (vn.vd_vt_from_vco2, "ve_l_min", 0.2, 120.0, {"paco2_mmhg": 250.0, "vco2_ml_min": 10.0}),
        (vn.vco2_from_expired_co2, "ve_l_min", 0.2, 120.0, {"peco2_mmhg": 30.0}),
        (vn.vco2_from_expired_co2, "peco2_mmhg", 0.1, 250.0, {"ve_l_min": 8.0}),
        (vn.vco2_resting_estimate, "weight_kg", 10.0, 350.0, {}),
        (vn.vco2_with_fever, "vco2_ml_min", 10.0, 5000.0, {"temperature_c": 38.0}),
        (vn.vco2_with_fever, "temperature_c", 25.0, 43.0, {"vco2_ml_min": 200.0}),
        (vn.vco2_with_fever, "rate_per_degc", 0.0, 0.2, {"vco2_ml_min": 200.0, "temperature_c": 39.0}),
        (vn.vt_per_kg, "vt_ml", 50.0, 2000.0, {"pbw_kg": 70.0}),
        (vn.vt_per_kg, "pbw_kg", 10.0, 150.0, {"vt_ml": 500.0}),
        (vn.lung_protective_vt, "pbw_kg", 10.0, 150.0, {}),
        (vn.respiratory_timing, "rr_per_min", 0.1, 150.0, {}),
        (vn.respiratory_timing, "i_part", 0.1, 10.0, {"rr_per_min": 12.0}),
        (vn.respiratory_timing, "e_part", 0.1, 10.0, {"rr_per_min": 12.0}),
        (vn.to_target, "paco2_mmhg", 5.0, 250.0, _without(_TARGET, "paco2_mmhg")),
        (vn.to_target, "target_paco2_mmhg", 15.0, 120.0, _without(_TARGET, "target_paco2_mmhg")),
        (vn.co2_mechanisms, "paco2_mmhg", 5.0, 250.0, _without(_MECH, "paco2_mmhg")),
        (vn.co2_mechanisms, "ve_l_min", 0.2, 120.0, _without(_MECH, "ve_l_min")),
        (vn.co2_mechanisms, "vco2_ml_min", 10.0, 5000.0, _without(_MECH, "vco2_ml_min")),
        (vn.co2_mechanisms, "vco2_reference_ml_min", 10.0, 5000.0, _without(_MECH, "vco2_reference_ml_min")),
        (vn.co2_mechanisms, "vd_vt_reference", 0.05, 0.6, _MECH),
        (vn.co2_mechanisms, "paco2_reference_mmhg", 20.0, 60.0, _MECH),
        (vn.pco2_from_etco2, "paco2_mmhg", 5.0, 250.0, _without(_ET, "paco2_mmhg")),
        (vn.pco2_from_etco2, "etco2_mmhg", 1.0, 250.0, _without(_ET, "etco2_mmhg")),
        (vn.pco2_from_etco2, "etco2_now_mmhg", 1.0, 250.0, _without(_ET, "etco2_now_mmhg")),
    ],
)
def test_each_input_is_accepted_exactly_over_its_range(func, field, low, high, base):
    assert_accepted_range(func, field, low, high, **base)


@pytest.mark.parametrize(
    ("text", "parts"),
    [("0.1:10", (0.1, 10.0)), ("10:0.1", (10.0, 0.1)), ("1:2", (1.0, 2.0))]
    + [(t, None) for t in ("0.09:2", "10.01:1", "1:0.09", "1:10.01", "1:2:3", "1")],
)
def test_an_ie_ratio_takes_two_parts_of_0_1_to_10(text, parts):
    # the docstring: I:E written with two numbers from 0.1 to 10 (the limits of respiratory_timing's parts)
    if parts is None:
        with pytest.raises(InputError) as refused:
            vn.parse_ie_ratio(text)
        assert (refused.value.field, refused.value.code) == ("ie_ratio", "bad_request")
    else:
        assert vn.parse_ie_ratio(text) == parts


def test_the_breath_is_split_1_to_2_by_default():
    # expiratory_time (common practice): I:E 1:2 unless given; at 20/min a 3 s cycle, Ti 1 s, Te 2 s
    timing = vn.respiratory_timing(rr_per_min=20.0)
    assert timing.cycle_s == pytest.approx(3.0) and timing.ti_s == pytest.approx(1.0)
    assert timing.te_s == pytest.approx(2.0)


def test_the_lung_protective_band_is_4_to_8_ml_per_kg():
    # ardsnet2000: 6 mL/kg predicted body weight, within 4-8 mL/kg; at 70 kg 280, 420 and 560 mL
    band = vn.lung_protective_vt(pbw_kg=70.0)
    assert (band.low_ml, band.target_ml, band.high_ml) == pytest.approx((280.0, 420.0, 560.0), rel=1e-12)


def test_the_resting_vco2_band_per_kg_is_2_5_to_3():
    # jette1990_met (from memory): 1 MET 3.5 mL O2/kg/min x R 0.8 = 2.8 mL CO2/kg/min, within the usual band
    # of 2.5-3 mL/kg/min (resting_vco2, from memory); at 70 kg 196 mL/min
    assert vn.VCO2_ML_PER_KG_MIN_BAND == (2.5, 3.0)
    assert vn.vco2_resting_estimate(weight_kg=70.0) == pytest.approx(3.5 * 0.8 * 70.0, rel=1e-12)


@pytest.mark.parametrize(("factor", "refused"), [(1.0, True), (1.0 + 1e-9, False)])
def test_a_vd_vt_of_exactly_0_is_refused(factor, refused):
    # VD/VT = 1 - K x VCO2 / (PaCO2 x VE) (alveolar_ventilation, K_BTPS above): with VE = K x VCO2 / PaCO2 the
    # whole VE is alveolar and VD/VT is 0, which no lung has (normal VD/VT about 0.2-0.35, common practice):
    # refused; a VE one part in 1e9 higher leaves a dead space just above 0
    ve = K_BTPS * 10.0 / 10.0 * factor
    assert (1.0 - K_BTPS * 10.0 / (10.0 * ve) == 0.0) is refused
    if refused:
        with pytest.raises(InputError) as error:
            vn.vd_vt_from_vco2(paco2_mmhg=10.0, vco2_ml_min=10.0, ve_l_min=ve)
        assert (error.value.field, error.value.code) == ("vco2_ml_min", "inconsistent")
    else:
        assert 0.0 < vn.vd_vt_from_vco2(paco2_mmhg=10.0, vco2_ml_min=10.0, ve_l_min=ve) < 1e-8


@pytest.mark.parametrize(
    ("func", "paco2_field"), [(vn.vd_vt_enghoff, "paco2_mmhg"), (vn.vd_vt_bohr, "paco2_alveolar_mmhg")]
)
def test_mixed_expired_pco2_from_0_to_below_the_paco2(func, paco2_field):
    # enghoff1938 / bohr1891: VD/VT = (P - PECO2) / P; a PECO2 of 0 gives 1, one at or above P no dead-space
    # fraction (mixed expired gas is always below alveolar): refused as inconsistent, up to the PCO2 limit of
    # 250 mmHg; beyond that range and below 0 as out of range
    assert func(**{paco2_field: 40.0}, peco2_mmhg=0.0) == 1.0
    assert func(**{paco2_field: 40.0}, peco2_mmhg=30.0) == pytest.approx((40.0 - 30.0) / 40.0, rel=1e-12)
    for peco2, code in [(-1e-9, "out_of_range"), (41.0, "inconsistent"), (250.0, "inconsistent")]:
        with pytest.raises(InputError) as refused:
            func(**{paco2_field: 40.0}, peco2_mmhg=peco2)
        assert (refused.value.field, refused.value.code) == ("peco2_mmhg", code), peco2
    with pytest.raises(InputError) as refused:
        func(**{paco2_field: 40.0}, peco2_mmhg=250.0 * (1 + 1e-9))
    assert (refused.value.field, refused.value.code) == ("peco2_mmhg", "out_of_range")


def test_the_end_tidal_pco2_is_accepted_from_0_to_250():
    # etco2_gradient: (PaCO2 - PetCO2) / PaCO2, negative when PetCO2 exceeds PaCO2 (returned as is)
    assert_accepted_range(vn.alveolar_dead_space_fraction, "etco2_mmhg", 0.0, 250.0, paco2_mmhg=40.0)
    assert vn.alveolar_dead_space_fraction(paco2_mmhg=40.0, etco2_mmhg=50.0) == pytest.approx(-0.25)


@pytest.mark.parametrize(("vd_vt", "accepted"), [(0.0, False), (1e-9, True), (1 - 1e-9, True), (1.0, False)])
def test_the_mechanisms_take_a_vd_vt_strictly_between_0_and_1(vd_vt, accepted):
    # alveolar_ventilation: PaCO2 = K x VCO2 / (VE x (1 - VD/VT)) needs some alveolar and some dead-space
    # ventilation for its logarithmic split (co2_log_shares)
    kwargs = {**_MECH, "vd_vt": vd_vt}
    if accepted:
        assert vn.co2_mechanisms(**kwargs).log_terms["dead_space"] == pytest.approx(
            math.log((1 - 0.30) / (1 - vd_vt)), rel=1e-12
        )
    else:
        with pytest.raises(InputError) as refused:
            vn.co2_mechanisms(**kwargs)
        assert (refused.value.field, refused.value.code) == ("vd_vt", "out_of_range")


def test_the_published_bands_the_breathing_calculation_reads():
    # fever_vco2: metabolic rate up 10-13 % per degC of fever; pco2_normal_range: hypercapnia above 45 mmHg
    assert vn.FEVER_RATE_BAND == (0.10, 0.13)
    assert vn.PACO2_NORMAL_HIGH_MMHG == 45.0


def test_the_dead_space_is_accepted_from_0_to_below_the_tidal_volume():
    # alveolar_ventilation: VA = (VT - VD) x RR; VD from 0 mL up to 2000 mL but below VT (VD >= VT leaves no
    # alveolar ventilation: refused as inconsistent); below 0 or above 2000 mL out of range
    assert vn.alveolar_ventilation(vt_ml=500.0, vd_ml=0.0, rr_per_min=12.0) == pytest.approx(6.0, rel=1e-12)
    for vt, vd, code in [(500.0, -1e-9, "out_of_range"), (2000.0, 2000.0, "inconsistent")]:
        with pytest.raises(InputError) as refused:
            vn.alveolar_ventilation(vt_ml=vt, vd_ml=vd, rr_per_min=12.0)
        assert (refused.value.field, refused.value.code) == ("vd_ml", code), vd
    with pytest.raises(InputError) as refused:
        vn.alveolar_ventilation(vt_ml=2000.0, vd_ml=2000.0 * (1 + 1e-9), rr_per_min=12.0)
    assert (refused.value.field, refused.value.code) == ("vd_ml", "out_of_range")


@pytest.mark.parametrize(("t", "vco2"), [(36.5, 200.0), (37.0, 200.0), (37.5, 210.0), (38.0, 220.0)])
def test_fever_raises_the_vco2_from_37_degc(t, vco2):
    # fever_vco2: metabolic rate up about 10 % per degC of fever, above a normal core temperature of 37 degC
    # (common practice); none at or below 37
    assert vn.vco2_with_fever(vco2_ml_min=200.0, temperature_c=t, rate_per_degc=0.10) == pytest.approx(vco2)
