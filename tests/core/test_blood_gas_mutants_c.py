"""blood_gas targets, summary and oxygenation: the boundaries and words a mutation run found unpinned.

Written for the survivors of the mutation run over blood_gas/targets.py, summary.py and oxygenation.py
(docs/testing.md). Each expected value comes from outside the package: the published rule or formula written
out here beside its ``references.py`` key, marked *common practice* where that is what it is, or the
contract's documented behaviour (docs/bridge.md). Exact boundaries are reached with inputs whose arithmetic
is exact in binary floating point (each such premise is asserted first), so a test checks the rule at the
threshold itself and on both sides of it.

Some rules are checked on both paths of :func:`blood_gas.decide`: the scalar one behind the report and the
array one behind the batch audit and the uncertainty calculation.
"""

from __future__ import annotations

import json

import numpy as np
import pytest
from test_blood_gas_boundaries import (
    bg,
    both_paths,
    codes,
    finding_text,
    fires_on_both_paths,
    gas,
    hco3_of,
    ph_of,
)

from casebook import q
from tidewell.bridge import handle


def step(response: dict, output: str) -> dict:
    """The first step of the response that computes ``output``."""
    return next(s for s in response["steps"] if s.get("output") == output)


def value(response: dict, key: str):
    """An output's number (a pressure or concentration is ``{"value": x, "unit": u}``)."""
    out = response["outputs"][key]
    return out["value"] if isinstance(out, dict) else out


def alveolar(fio2: float, pco2: float, pb: float = 760.0, rq: float = 0.8) -> float:
    """Simplified alveolar gas equation, PAO2 = FiO2 x (PB - 47) - PaCO2 / R (references.py
    alveolar_gas_1946)."""
    return fio2 * (pb - 47.0) - pco2 / rq


def first(x):
    """Element 0 of an array-path value (or the scalar itself)."""
    return np.asarray(x).reshape(-1)[0]


# -- oxygenation (references.py alveolar_gas_1946, aa_age_rule, berlin2012, bts2017_o2) ------------------


@pytest.mark.parametrize(("pb", "pco2"), [(700.0, 40.0), (750.0, 38.0)])
def test_a_pao2_equal_to_the_alveolar_po2_on_air_is_not_oxygen_given(pb, pco2):
    # common practice: on air the PaO2 cannot exceed the alveolar PO2; equal to it is an A-a gradient of 0
    pa = alveolar(0.21, pco2, pb)
    assert float(f"{pa:.9f}") == pa  # the premise: PAO2 is exactly a 9-decimal input
    base = {
        "ph": 7.40,
        "pco2": q(pco2, "mmHg"),
        "hco3": q(hco3_of(7.40, pco2), "mmol/L"),
        "pb": q(pb, "mmHg"),
    }
    at = bg({**base, "po2": q(pa, "mmHg")})
    assert "oxygen_probably_given" not in codes(at)
    assert value(at, "a_a_gradient") == 0.0
    above = bg({**base, "po2": q(pa + 0.5, "mmHg")})
    assert "oxygen_probably_given" in codes(above)


@pytest.mark.parametrize(("aa", "named"), [(-9.5, False), (-10.0, False), (-10.5, True)])
def test_po2_above_the_alveolar_po2_named_beyond_10_mmhg(aa, named):
    # PAO2 = 0.5 x 713 - 40 / 0.8 = 306.5 mmHg exactly (alveolar_gas_1946); a PO2 more than 10 mmHg above it
    # is named (the project's measurement tolerance, common practice)
    pa = alveolar(0.5, 40.0)
    assert pa == 306.5
    r = bg(gas(7.40, 40.0, po2=q(pa - aa, "mmHg"), fio2=0.5))
    assert value(r, "a_a_gradient") == aa
    assert ("po2_above_alveolar" in codes(r)) is named


@pytest.mark.parametrize(("aa", "category"), [(8.5, "normal"), (29.0, "needs_age"), (29.5, "raised")])
def test_a_a_gradient_without_age_at_the_limits_of_18_and_100_years(aa, category):
    # aa_age_rule: upper limit age / 4 + 4, 8.5 mmHg at 18 years and 29 mmHg at 100; without an age a gradient
    # at or below 8.5 is normal for any adult, one above 29 raised for any adult, between needs the age
    pa = alveolar(0.5, 40.0)
    r = bg(gas(7.40, 40.0, po2=q(pa - aa, "mmHg"), fio2=0.5))
    assert value(r, "a_a_gradient") == aa
    assert r["outputs"]["a_a_category"] == category


@pytest.mark.parametrize(("fio2", "named"), [(0.21, False), (0.3, False), (0.31, True)])
def test_the_age_rule_caveat_on_oxygen_above_fio2_0_3(fio2, named):
    # aa_age_rule holds breathing air; above FiO2 0.3 the caveat is shown (common practice)
    r = bg(gas(7.40, 40.0, po2=q(90, "mmHg"), fio2=fio2))
    assert ("a_a_on_oxygen" in codes(r)) is named


def test_the_a_over_a_ratio_is_shown_to_2_decimals():
    # common practice: a ratio to 2 decimals (gilbert1974 quotes 0.75)
    r = bg(gas(7.40, 40.0, po2=q(90, "mmHg"), fio2=0.4))
    assert r["display"]["a_over_A"] == 2


def test_a_measured_barometric_pressure_is_named_measured():
    r = bg(gas(7.40, 40.0, po2=q(80, "mmHg"), pb=q(700, "mmHg")))
    assert step(r, "pb")["label"] == "Barometric pressure (measured)"
    assert step(r, "pb")["formula"] == "PB as given"


def test_type_2_failure_names_the_pao2_when_the_oxygenation_is_read():
    # bts2017_o2: type 2 from the PaCO2 above 6 kPa with a respiratory acidosis; the PaO2 is quoted beside it
    r = bg(gas(7.30, 60.0, po2=q(55, "mmHg"), fio2=0.28))
    assert "PaO2 55 mmHg on FiO2 0.28." in finding_text(r, "respiratory_failure_type_2")
    without = bg(gas(7.30, 60.0))
    assert "PaO2" not in finding_text(without, "respiratory_failure_type_2")


def test_type_1_failure_from_the_pf_ratio_says_so_not_a_low_pao2():
    # berlin2012: P/F 80 / 0.4 = 200 <= 300 mmHg on oxygen although the PaO2 is above 60 mmHg (8 kPa)
    r = bg(gas(7.40, 40.0, po2=q(80, "mmHg"), fio2=0.4))
    text = finding_text(r, "respiratory_failure_type_1")
    assert "P/F ratio is at or below" in text
    assert "is below" not in text
    low = bg(gas(7.40, 40.0, po2=q(50, "mmHg"), fio2=0.4))
    assert "PaO2 50 mmHg is below 60 mmHg" in finding_text(low, "respiratory_failure_type_1")


def test_pure_hypoventilation_and_a_low_inspired_oxygen_on_both_paths():
    # aa_age_rule at 40 years: upper limit 40 / 4 + 4 = 14 mmHg
    # PaCO2 60 on air: PAO2 = 0.21 x 713 - 75 = 74.73; PaO2 70 gives A-a 4.7 (normal): pure hypoventilation
    hypo = gas(7.30, 60.0, po2=q(70, "mmHg"), age=40)
    assert fires_on_both_paths(hypo, "pure_hypoventilation") == (True, True)
    # PB 500 mmHg, PaCO2 40: PAO2 = 0.21 x 453 - 50 = 45.13; PaO2 40 gives A-a 5.1: low inspired PO2
    thin = {**gas(7.40, 40.0), "po2": q(40, "mmHg"), "pb": q(500, "mmHg"), "age": 40}
    assert fires_on_both_paths(thin, "low_inspired_oxygen") == (True, True)


# -- the reading in words and the summary --------------------------------------------------------------------


def test_the_reading_names_the_chronicity_of_a_judged_respiratory_disorder():
    # narins1980: chronic HCO3 24 + 3.5 x 2 = 31 at PaCO2 60, acute 24 + 2 = 26 (fraction_acute_bands)
    chronic = bg(gas(ph_of(31.0, 60.0), 60.0))
    assert chronic["summary"][0].startswith("Chronic respiratory acidosis")
    acute = bg(gas(ph_of(26.0, 60.0), 60.0))
    assert acute["summary"][0].startswith("Acute respiratory acidosis")


def test_a_venous_request_sent_as_json_is_read_as_a_screen():
    request = {"calc": "blood_gas", "inputs": {**gas(7.30, 60.0), "sample": "venous"}}
    response = json.loads(handle(json.dumps(request)))
    assert response["ok"]
    assert response["summary"][0].startswith("Venous gas, a screen only: ")
    assert response["outputs"]["interpretation"].startswith("Venous gas, a screen only: ")


@pytest.mark.parametrize(
    ("age", "cautioned"), [(0.0, True), (17.5, True), (18.0, False), (18.5, False), (40.0, False)]
)
def test_the_adult_rules_caution_below_18_years(age, cautioned):
    # the compensation rules and aa_age_rule were derived in adults (common practice: adult from 18 years)
    r = bg(gas(7.40, 40.0, age=age))
    assert any("under 18" in c for c in r["cautions"]) is cautioned


@pytest.mark.parametrize(("pco2", "raised"), [(45.0, False), (46.0, True)])
def test_the_venous_pco2_screen_above_45_mmhg(pco2, raised):
    # venous_gas: venous PCO2 about 4-6 mmHg above arterial; a venous PCO2 <= 45 mmHg makes arterial
    # hypercapnia unlikely (acid_base_normal_ranges: 45 mmHg upper limit)
    r = bg({**gas(7.38, pco2), "sample": "venous"})
    text = finding_text(r, "venous_sample")
    assert text.startswith(f"Venous PCO2 {pco2:.0f} mmHg is {'above' if raised else 'not above'} 45 mmHg")
    assert "about 4 mmHg to 6 mmHg above arterial" in text


def test_the_summary_opens_with_the_reading_as_a_sentence():
    r = bg(gas(7.40, 40.0))
    assert r["summary"][0] == "No acid-base disorder: pH, PCO2 and HCO3 are within their reference ranges."


def test_an_inconsistent_triple_is_said_once_as_provisional():
    # consistency_band: HCO3 15 with PCO2 40 gives pH 7.19 by Henderson-Hasselbalch, not 7.40
    r = bg({"ph": 7.40, "pco2": q(40, "mmHg"), "hco3": q(15, "mmol/L")})
    assert "inconsistent_triple" in codes(r)
    assert r["summary"][0].startswith("PROVISIONAL")
    text = finding_text(r, "inconsistent_triple")
    assert not any(text in s for s in r["summary"])
    assert any("(reported, inconsistent with pH and PCO2)" in s for s in r["summary"])


def test_the_summary_says_when_the_hco3_was_computed():
    r = bg({"ph": 7.40, "pco2": q(40, "mmHg")})
    assert any("mmol/L (computed)" in s for s in r["summary"])
    measured = bg(gas(7.40, 40.0))
    assert any("mmol/L (reported, consistent)" in s for s in measured["summary"])


def test_the_summary_names_a_wholly_acute_change_as_100_percent_acute():
    # narins1980: at PaCO2 60 the acute HCO3 is 26 and the chronic 31: HCO3 26 is all acute (fraction 1.0)
    r = bg(gas(ph_of(26.0, 60.0), 60.0))
    assert any("about 100 % of the change looks acute" in s for s in r["summary"])


# -- ventilation: the PaCO2 aim (references.py pco2_aim, henderson1908, posthypercapnic_alkalosis) ---------


def test_the_metabolic_expectation_is_winters_on_both_paths():
    # albert1967: expected PaCO2 = 1.5 x HCO3 + 8 +/- 2; HCO3 12 gives 26 (24 to 28)
    scalar, together = both_paths(gas(ph_of(12.0, 26.0), 26.0))
    for decision in (scalar, together):
        assert first(decision.met_expected.value) == pytest.approx(26.0, abs=1e-9)
        assert first(decision.met_expected.low) == pytest.approx(24.0, abs=1e-9)


def test_a_chronic_respiratory_acidosis_estimates_the_usual_paco2_on_both_paths():
    # narins1980: HCO3 31 at PaCO2 60 is chronic; no known baseline, so it is estimated from the HCO3
    scalar, together = both_paths(gas(ph_of(31.0, 60.0), 60.0))
    assert scalar.baseline_pco2_source == "estimated"
    assert first(together.baseline_pco2_source) == "estimated"
    assert fires_on_both_paths(gas(ph_of(31.0, 60.0), 60.0), "compensation_incomplete") == (True, True)


def test_a_metabolic_primary_aims_at_winters_and_is_not_an_niv_case_on_both_paths():
    # albert1967: HCO3 12 gives Winters 26 +/- 2; PaCO2 50 is above it (a concurrent respiratory acidosis),
    # and pH < 7.35 with PaCO2 > 6.5 kPa is the NIV threshold of a primary respiratory acidosis only
    # (bts_ics2016)
    inputs = gas(ph_of(12.0, 50.0), 50.0)
    assert fires_on_both_paths(inputs, "ventilation_failing_to_compensate") == (True, True)
    assert fires_on_both_paths(inputs, "niv_criteria_met") == (False, False)
    scalar, together = both_paths(inputs)
    for decision in (scalar, together):
        assert first(decision.pco2_target_basis) == "metabolic_compensation"
        assert first(decision.pco2_target) == pytest.approx(26.0, abs=1e-9)
        assert first(decision.niv) == "not_applicable"


@pytest.mark.parametrize(
    ("baseline", "basis"), [(45.0, "usual_pco2_given"), (50.0, "present_pco2"), (55.0, "present_pco2")]
)
def test_a_known_usual_paco2_at_or_above_the_present_one_holds_the_present(baseline, basis):
    # pco2_aim: pH >= 7.35: aim = the present PaCO2, or a lower known usual one
    inputs = gas(ph_of(30.0, 50.0), 50.0, baseline_pco2=q(baseline, "mmHg"))
    r = bg(inputs)
    assert r["outputs"]["pco2_target_basis"] == basis
    assert value(r, "pco2_target") == min(50.0, baseline)


def test_an_aim_below_the_alkalaemia_floor_is_lifted_to_it():
    # henderson1908: P(7.45) = 100 x 10^(7.30 - 7.45) = 70.8 mmHg; the known usual 50 is below it, so the aim
    # is lifted (posthypercapnic_alkalosis); pH < 7.35 so P(7.35) is shown too
    r = bg(gas(7.30, 100.0, baseline_pco2=q(50, "mmHg")))
    assert r["outputs"]["pco2_target_basis"] == "alkalaemia_floor"
    assert value(r, "pco2_target") == pytest.approx(100.0 * 10 ** (7.30 - 7.45), rel=1e-12)
    assert value(r, "pco2_for_ph_7_35") == pytest.approx(100.0 * 10 ** (7.30 - 7.35), rel=1e-12)
    assert step(r, "pco2_target")["formula"].startswith("pH < 7.35: aim = min(P(7.35), usual PaCO2)")
    # a known usual PaCO2 above 45 mmHg is a chronic retainer (bts2017_o2)
    assert "Ventilating a chronic retainer below the usual level" in finding_text(r, "pco2_target")
    assert "baseline_pco2_estimated" not in r["outputs"]


def test_at_ph_7_45_the_present_paco2_is_not_below_the_floor():
    # pH 7.45 exactly: P(7.45) = PaCO2 x 10^0 = the present PaCO2 (henderson1908). Metabolic alkalosis,
    # HCO3 41.2, with PaCO2 60 above its expected 40 + 0.7 x 17.2 + 5 = 57 (a concurrent respiratory acidosis)
    r = bg(gas(7.45, 60.0))
    assert "respiratory_acidosis" in [d["code"] for d in r["outputs"]["disorders"]]
    assert r["outputs"]["pco2_target_basis"] == "present_pco2"
    assert value(r, "pco2_target") == 60.0
    # a known usual 50 is below the floor (60): lifted to it, which is the present PaCO2, named as the floor
    lifted = bg(gas(7.45, 60.0, baseline_pco2=q(50, "mmHg")))
    assert lifted["outputs"]["pco2_target_basis"] == "alkalaemia_floor"
    assert value(lifted, "pco2_target") == 60.0


def test_an_alkalaemic_aim_is_capped_at_the_present_paco2_on_both_paths():
    # pH 7.50: P(7.45) = PaCO2 x 10^0.05 is above the present PaCO2; the aim never exceeds the present one.
    # HCO3 54 with PaCO2 70, above its expected 40 + 0.7 x 30 + 5 = 66: a concurrent respiratory acidosis
    scalar, together = both_paths(gas(7.50, 70.0))
    for decision in (scalar, together):
        assert first(decision.pco2_target_basis) == "present_pco2"
        assert first(decision.pco2_target) == 70.0


@pytest.mark.parametrize(
    ("ph", "pco2", "baseline", "below"),
    [
        (7.40, 60.0, 50.0, False),  # above the usual: not below it
        (7.40, 35.0, 45.0, False),  # a usual of 45 is normal: not a retainer
        (7.40, 35.0, 44.0, False),
        (7.35, 50.0, 60.0, True),  # pH 7.35 is not acidaemic
        (7.34, 50.0, 60.0, False),
    ],
)
def test_pco2_below_a_raised_usual_paco2_only_when_not_acidaemic(ph, pco2, baseline, below):
    # posthypercapnic_alkalosis: more than 5 mmHg below a usual PaCO2 above 45 (acid_base_normal_ranges) with
    # pH >= 7.35
    r = bg(gas(ph, pco2, baseline_pco2=q(baseline, "mmHg")))
    assert ("pco2_below_baseline" in codes(r)) is below


@pytest.mark.parametrize(("baseline", "retainer"), [(44.0, False), (45.0, False), (50.0, True)])
def test_a_known_usual_paco2_above_45_reads_as_a_chronic_retainer(baseline, retainer):
    # bts2017_o2: a usual PaCO2 above 6 kPa (45 mmHg) marks the patient at risk; the aim text says why it is
    # not lowered below the usual level; with a normal PaCO2 the SpO2 basis says at risk with a normal PCO2
    r = bg(gas(ph_of(33.0, 60.0), 60.0, baseline_pco2=q(baseline, "mmHg")))
    assert ("Ventilating a chronic retainer" in finding_text(r, "pco2_target")) is retainer
    normal = bg(gas(7.40, 40.0, baseline_pco2=q(baseline, "mmHg")))
    assert normal["outputs"]["spo2_target_basis"] == ("at_risk_pco2_normal" if retainer else "default")
    assert ("spo2_target_needs_history" in codes(normal)) is retainer


def test_a_retainer_is_read_only_with_a_raised_paco2():
    # co2_narcosis (common practice): 75 mmHg in previously normal people; PaCO2 44 is not raised, even with a
    # HCO3 of 27 that is above the acute expectation
    r = bg(gas(ph_of(27.0, 44.0), 44.0))
    assert value(r, "pco2_consciousness_threshold") == 75.0


def test_a_fraction_acute_of_0_8_is_acute_not_a_retainer():
    # fraction_acute_bands: f = (31 - 27) / (31 - 26) = 0.8 at PaCO2 60 (narins1980 slopes 3.5 and 1) is acute
    r = bg({"ph": ph_of(27.0, 60.0), "pco2": q(60, "mmHg"), "hco3": q(27, "mmol/L")})
    assert value(r, "fraction_acute_hco3") == 0.8
    assert r["outputs"]["disorders"][0]["chronicity"] == "acute"
    assert value(r, "pco2_consciousness_threshold") == 75.0
    chronic = bg(gas(ph_of(31.0, 60.0), 60.0))
    assert value(chronic, "pco2_consciousness_threshold") == 90.0


def test_the_consciousness_threshold_formula_names_a_known_usual_paco2():
    # co2_narcosis (common practice): max(75, usual + 35) with a known usual PaCO2
    r = bg(gas(7.30, 60.0, baseline_pco2=q(50, "mmHg")))
    assert step(r, "pco2_consciousness_threshold")["formula"] == "max(75 mmHg, baseline PaCO2 + 35 mmHg)"
    assert value(r, "pco2_consciousness_threshold") == 85.0


def test_the_aim_words_follow_the_baseline_source():
    # pco2_aim: a usual PaCO2 estimated from the HCO3 only when acidaemic and chronic (narins1980)
    estimated = bg(gas(ph_of(31.0, 60.0), 60.0))
    assert "The usual PaCO2 estimated from the HCO3 is" in finding_text(estimated, "pco2_target")
    held = bg(gas(ph_of(30.0, 50.0), 50.0))
    assert held["outputs"]["baseline_pco2_source"] == "none"
    assert "estimated" not in finding_text(held, "pco2_target")
    assert step(held, "pco2_target")["formula"].startswith("pH < 7.35: aim = min(P(7.35), usual PaCO2)")


def test_a_metabolic_primary_with_a_known_retainer_baseline_says_winters_not_the_retainer_note():
    # albert1967: Winters' centre 1.5 x 12 + 8 = 26; the post-hypercapnic note belongs to a respiratory aim
    r = bg(gas(ph_of(12.0, 50.0), 50.0, baseline_pco2=q(50, "mmHg")))
    assert r["outputs"]["pco2_target_basis"] == "metabolic_compensation"
    assert step(r, "pco2_target")["formula"].startswith("aim = 1.5 x HCO3 + 8")
    assert "Ventilating a chronic retainer" not in finding_text(r, "pco2_target")


def test_the_niv_finding_names_invasive_ventilation_only_below_ph_7_25():
    # bts_ics2016: pH < 7.25 calls for ready access to invasive ventilation
    assert "invasive ventilation" not in finding_text(bg(gas(7.30, 60.0)), "niv_criteria_met")
    assert "invasive ventilation" in finding_text(bg(gas(7.20, 80.0)), "niv_criteria_met").split("HCO3.")[1]


@pytest.mark.parametrize(
    ("hco3", "ph", "fits"),
    [(26.0, None, False), (24.0, None, False), (None, 7.45, False), (None, 7.46, True)],
)
def test_below_the_usual_paco2_a_post_hypercapnic_alkalosis_needs_hco3_above_26_and_ph_above_7_45(
    hco3, ph, fits
):
    # posthypercapnic_alkalosis; acid_base_normal_ranges: HCO3 above 26 and pH above 7.45
    if hco3 is not None:
        pco2 = 35.0 if hco3 == 26.0 else 30.0
        inputs = {"ph": ph_of(hco3, pco2), "pco2": q(pco2, "mmHg"), "hco3": q(hco3, "mmol/L")}
        assert inputs["ph"] > 7.45
    else:
        inputs = gas(ph, 40.0)
        assert hco3_of(ph, 40.0) > 26.0
    r = bg({**inputs, "baseline_pco2": q(50, "mmHg")})
    assert ("post-hypercapnic metabolic alkalosis" in finding_text(r, "pco2_below_baseline")) is fits


# -- the SpO2 target (references.py bts2017_o2) and severity (ph_severity) -----------------------------------


@pytest.mark.parametrize(
    ("spo2", "below", "above"),
    [(93.0, True, False), (94.0, False, False), (98.0, False, False), (99.0, False, True)],
)
def test_spo2_outside_94_to_98_only_beyond_its_ends(spo2, below, above):
    r = bg(gas(7.40, 40.0, spo2=spo2))
    assert ("spo2_below_target" in codes(r)) is below
    assert ("spo2_above_target" in codes(r)) is above


@pytest.mark.parametrize(("ph", "severity"), [(7.30, "urgent"), (7.35, "notable"), (7.40, "notable")])
def test_oxygen_above_target_is_urgent_only_with_acidaemic_hypercapnia(ph, severity):
    # bts2017_o2: excess oxygen in a hypercapnic patient; with pH < 7.35 it is acidaemic (ph_severity)
    r = bg(gas(ph, 60.0, spo2=96))
    assert next(f["severity"] for f in r["findings"] if f["code"] == "spo2_above_target") == severity


def test_the_spo2_target_is_shown_in_whole_percent():
    assert bg(gas(7.40, 40.0))["display"]["spo2_target"] == 0


def test_a_single_disorder_at_a_normal_ph_flagged_unless_a_chronic_respiratory_alkalosis():
    # narins1980: at PaCO2 30 the acute HCO3 is 24 - 2 = 22, the chronic 24 - 5 = 19; HCO3 20.5 is
    # acute-on-chronic, pH 6.1 + log10(20.5 / (0.0307 x 30)) = 7.447 is normal: a second process is possible
    inputs = gas(ph_of(20.5, 30.0), 30.0)
    r = bg(inputs)
    assert r["outputs"]["disorders"][0]["chronicity"] == "acute_on_chronic"
    assert fires_on_both_paths(inputs, "normal_ph_single_disorder") == (True, True)
    # an acidaemic single disorder is not one at a normal pH: HCO3 12 with PaCO2 26, Winters' centre
    # 1.5 x 12 + 8 (albert1967), pH 6.1 + log10(12 / (0.0307 x 26)) = 7.28
    single = bg({"ph": ph_of(12.0, 26.0), "pco2": q(26, "mmHg"), "hco3": q(12, "mmol/L")})
    assert [d["code"] for d in single["outputs"]["disorders"]] == ["metabolic_acidosis"]
    assert "normal_ph_single_disorder" not in codes(single)


def test_an_aim_equal_to_winters_centre_is_not_named_as_raised_to_it():
    # albert1967: Winters' centre 1.5 x 28 + 8 = 50 mmHg, the present PaCO2; an anion gap of
    # 140 - (92 + 28) = 20 names a metabolic acidosis beside the respiratory acidosis (gabow1980). pH 7.36 is
    # not acidaemic, so the aim holds the present PaCO2 (pco2_aim), which is not below the centre
    r = bg(
        {
            "ph": ph_of(28.0, 50.0),
            "pco2": q(50, "mmHg"),
            "hco3": q(28, "mmol/L"),
            "na": q(140, "mmol/L"),
            "cl": q(92, "mmol/L"),
        }
    )
    assert "metabolic_acidosis" in [d["code"] for d in r["outputs"]["disorders"]]
    assert r["outputs"]["pco2_target_basis"] == "present_pco2"
    assert value(r, "pco2_target") == 50.0


def _p735_equal_to_an_input():
    """(PaCO2, pH, P(7.35)): P(7.35) = PaCO2 x 10^(pH - 7.35) (henderson1908) exactly a 9-decimal input."""
    known = [(72.9, 7.3483), (82.3, 7.2611), (106.3, 7.2734), (119.3, 7.2396)]
    grid = ((k / 10, float(f"7.{j:04d}")) for k in range(460, 1200) for j in range(2000, 3500))
    for p, ph in [*known, *grid]:
        p735 = p * 10.0 ** (ph - 7.35)
        if float(f"{p735:.9f}") == p735:
            return p, ph, p735
    raise AssertionError("no PaCO2 and pH with P(7.35) exactly a 9-decimal number")


def test_a_known_usual_paco2_equal_to_p735_is_named_as_the_ph_7_35_aim():
    # pco2_aim: pH < 7.35: aim = min(P(7.35), usual PaCO2); at a tie the pH 7.35 reason is given
    p, ph, p735 = _p735_equal_to_an_input()
    r = bg(
        {
            "ph": ph,
            "pco2": q(p, "mmHg"),
            "hco3": q(hco3_of(ph, p), "mmol/L"),
            "baseline_pco2": q(p735, "mmHg"),
        }
    )
    assert value(r, "pco2_for_ph_7_35") == p735
    assert r["outputs"]["pco2_target_basis"] == "ph_7_35"
    assert value(r, "pco2_target") == p735


# -- further boundaries (mutants first run late) ---------------------------------------------------------


@pytest.mark.parametrize(("aa", "category"), [(14.0, "normal"), (14.5, "raised")])
def test_a_a_gradient_at_the_upper_limit_for_age_is_normal(aa, category):
    # aa_age_rule: upper limit 40 / 4 + 4 = 14 mmHg at 40 years; PAO2 0.5 x 713 - 40 / 0.8 = 306.5 exactly
    pa = alveolar(0.5, 40.0)
    r = bg({**gas(7.40, 40.0), "po2": q(pa - aa, "mmHg"), "fio2": 0.5, "age": 40})
    assert value(r, "a_a_gradient") == aa
    assert r["outputs"]["a_a_category"] == category


@pytest.mark.parametrize(("po2", "band"), [(45.0, "severe"), (75.0, "moderate"), (125.0, "mild")])
def test_the_masked_hypoxaemia_names_the_pf_band(po2, band):
    # berlin2012: P/F <= 300 mild, <= 200 moderate, <= 100 severe (named by the P/F alone); FiO2 0.5 gives
    # P/F 90, 150 and 250; at PaO2 45 the hypoxaemia is not masked (below 60 mmHg, bts2017_o2)
    r = bg({**gas(7.40, 40.0), "po2": q(po2, "mmHg"), "fio2": 0.5})
    if band == "severe":
        assert "hypoxaemia_masked_by_oxygen" not in codes(r)
        return
    text = finding_text(r, "hypoxaemia_masked_by_oxygen")
    limit = {"moderate": 200, "mild": 300}[band]
    tail = f"at or below {limit} mmHg (impaired oxygenation" + (
        ", moderate)." if band == "moderate" else ")."
    )
    assert text.endswith(tail)


def test_a_low_inspired_oxygen_needs_a_normal_gradient_not_one_that_needs_the_age():
    # PB 500, PaCO2 40: PAO2 = 0.21 x 453 - 50 = 45.13 (alveolar_gas_1946); PaO2 30 gives A-a 15.1, between
    # the limits at 18 and 100 years (aa_age_rule): without an age it is not read as normal
    r = bg({**gas(7.40, 40.0), "po2": q(30, "mmHg"), "pb": q(500, "mmHg")})
    assert r["outputs"]["a_a_category"] == "needs_age"
    assert "low_inspired_oxygen" not in codes(r)
    aged = bg({**gas(7.40, 40.0), "po2": q(30, "mmHg"), "pb": q(500, "mmHg"), "age": 80})
    assert "low_inspired_oxygen" in codes(aged)


def test_the_barometric_pressure_step_names_its_source():
    plain = bg({**gas(7.40, 40.0), "po2": q(80, "mmHg")})
    assert step(plain, "pb")["label"] == "Barometric pressure (sea level)"
    both = bg({**gas(7.40, 40.0), "po2": q(80, "mmHg"), "pb": q(700, "mmHg"), "altitude": q(1000, "m")})
    assert step(both, "pb")["label"] == "Barometric pressure (measured)"
    high = bg({**gas(7.40, 40.0), "po2": q(80, "mmHg"), "altitude": q(1000, "m")})
    assert step(high, "pb")["label"].startswith("Barometric pressure at the altitude given")


def test_the_paco2_target_caution_only_with_a_target():
    with_target = bg(gas(7.30, 60.0))
    assert any(c.startswith("The PaCO2 target is an aim") for c in with_target["cautions"])
    without = bg(gas(7.40, 40.0))
    assert not any(c.startswith("The PaCO2 target is an aim") for c in without["cautions"])


def test_the_expected_hco3_line_says_measured_when_the_hco3_was_reported():
    measured = bg({"ph": ph_of(31.0, 60.0), "pco2": q(60, "mmHg"), "hco3": q(31, "mmol/L")})
    assert any(
        s.startswith("Expected HCO3 for this PCO2") and "; measured 31.0" in s for s in measured["summary"]
    )
    computed = bg({"ph": ph_of(31.0, 60.0), "pco2": q(60, "mmHg")})
    assert any(
        s.startswith("Expected HCO3 for this PCO2") and "; computed 31.0" in s for s in computed["summary"]
    )


def test_an_acute_on_chronic_rise_estimates_the_usual_paco2_on_both_paths():
    # narins1980: at PaCO2 60, HCO3 28.5 gives f = (31 - 28.5) / (31 - 26) = 0.5: acute-on-chronic
    # (fraction_acute_bands); pH 7.29 is acidaemic, so the usual PaCO2 is estimated
    inputs = {"ph": ph_of(28.5, 60.0), "pco2": q(60, "mmHg"), "hco3": q(28.5, "mmol/L")}
    scalar, together = both_paths(inputs)
    assert scalar.chronicity == "acute_on_chronic"
    assert scalar.baseline_pco2_source == "estimated"
    assert first(together.baseline_pco2_source) == "estimated"


def test_a_paco2_of_45_is_not_raised_for_the_retainer_threshold():
    # acid_base_normal_ranges: 45 mmHg is the upper limit, not above it; co2_narcosis: 75 mmHg then
    r = bg({"ph": ph_of(27.0, 45.0), "pco2": q(45, "mmHg"), "hco3": q(27, "mmol/L")})
    assert value(r, "pco2_consciousness_threshold") == 75.0
    raised = bg({"ph": ph_of(27.0, 46.0), "pco2": q(46, "mmHg"), "hco3": q(27, "mmol/L")})
    assert value(raised, "pco2_consciousness_threshold") == 90.0


@pytest.mark.parametrize(("low", "at_risk"), [(96.0, False), (92.0, True)])
def test_only_a_prescribed_range_below_94_marks_the_patient_at_risk(low, at_risk):
    # bts2017_o2: 94-98 % is the usual target; a range starting above 94 is not the at-risk one
    r = bg({**gas(7.40, 40.0), "spo2_target_prescribed": {"low": low, "high": 98.0}, "spo2": 99})
    severity = next(f["severity"] for f in r["findings"] if f["code"] == "spo2_above_target")
    assert severity == ("notable" if at_risk else "info")


def test_the_niv_text_in_kpa_does_not_repeat_the_kpa_value():
    # bts_ics2016: PaCO2 > 6.5 kPa; in a kPa report the PaCO2 is not converted a second time
    request = {"calc": "blood_gas", "inputs": gas(7.30, 60.0), "options": {"pressure_unit": "kPa"}}
    for response in (json.loads(handle(json.dumps(request))), bg(gas(7.30, 60.0), unit="kPa")):
        assert response["ok"]
        assert "kPa (above 6.5 kPa): the acidaemia" in finding_text(response, "niv_criteria_met")
        assert "kPa, above 6.5 kPa" not in finding_text(response, "niv_criteria_met")
    in_mmhg = bg(gas(7.30, 60.0))
    assert "PaCO2 60 mmHg (8.0 kPa, above 6.5 kPa)" in finding_text(in_mmhg, "niv_criteria_met")


def test_above_the_consciousness_threshold_for_a_known_usual_paco2():
    # co2_narcosis (common practice): max(75, 50 + 35) = 85 mmHg; PaCO2 90 is above it
    r = bg(gas(7.25, 90.0, baseline_pco2=q(50, "mmHg")))
    assert "for this patient's usual PaCO2" in finding_text(r, "pco2_above_consciousness_threshold")


def test_at_ph_7_35_the_aim_holds_the_present_paco2():
    # pco2_aim: pH 7.35 is not acidaemic (acid_base_normal_ranges): no P(7.35), the PaCO2 need not be lowered
    r = bg(gas(7.35, 60.0))
    assert "pco2_for_ph_7_35" not in r["outputs"]
    assert "the pH is not acidaemic, so the PaCO2 need not be lowered" in finding_text(r, "pco2_target")
    below = bg(gas(7.34, 60.0))
    assert "pco2_for_ph_7_35" in below["outputs"]
    assert "ventilation must bring the PaCO2 down" in finding_text(below, "pco2_target")


# -- the words the report picks from its codes (each branch reached once) ---------------------------------


def test_the_estimated_usual_paco2_is_shown_with_its_range():
    # narins1980, martinu2003: estimated from the HCO3 with the chronic slopes 3.5 (5 to 3 for the range)
    r = bg(gas(ph_of(31.0, 60.0), 60.0))
    assert r["outputs"]["baseline_pco2_source"] == "estimated"
    assert "baseline_pco2_estimated" in r["outputs"]
    assert "baseline_pco2_range" in r["outputs"]


def test_a_known_usual_paco2_below_the_present_one_is_the_aim_and_named():
    # pco2_aim: pH >= 7.35: aim = the lower known usual PaCO2
    r = bg(gas(ph_of(30.0, 50.0), 50.0, baseline_pco2=q(45, "mmHg")))
    text = finding_text(r, "pco2_target")
    assert "the patient's known usual PaCO2: the pH is 7.39, not acidaemic" in text
    assert "The known usual PaCO2 is 45 mmHg." in text


def test_a_metabolic_primary_shows_no_paco2_for_ph_7_35():
    # albert1967: the aim of a metabolic acidosis is Winters' centre, not P(7.35)
    r = bg(gas(ph_of(12.0, 50.0), 50.0))
    assert r["outputs"]["pco2_target_basis"] == "metabolic_compensation"
    assert "pco2_for_ph_7_35" not in r["outputs"]


def test_the_reading_names_the_a_a_gradient_of_hypercapnia():
    # aa_age_rule at 40 years: 14 mmHg; PAO2 74.73 on air at PaCO2 60 (alveolar_gas_1946)
    pure = bg(gas(7.30, 60.0, po2=q(70, "mmHg"), age=40))
    assert "; normal A-a gradient: pure hypoventilation" in pure["outputs"]["interpretation"]
    lung = bg(gas(7.30, 60.0, po2=q(50, "mmHg"), age=40))
    assert (
        "; raised A-a gradient: lung disease as well as hypoventilation" in lung["outputs"]["interpretation"]
    )


def test_a_chronic_respiratory_alkalosis_at_a_normal_ph_is_compensated_as_expected():
    # narins1980: at PaCO2 30 the chronic HCO3 is 24 - 5 x 1 = 19; pH 6.1 + log10(19 / 0.921) = 7.41
    r = bg({"ph": ph_of(19.0, 30.0), "pco2": q(30, "mmHg"), "hco3": q(19, "mmol/L")})
    assert r["summary"][0] == "Chronic respiratory alkalosis, compensated as expected."


def test_a_high_anion_gap_acidosis_is_named_by_its_gap():
    # anion gap 140 - (100 + 12) = 28 mmol/L (gabow1980): high anion gap; Winters 1.5 x 12 + 8 = 26
    r = bg(
        {
            "ph": ph_of(12.0, 26.0),
            "pco2": q(26, "mmHg"),
            "hco3": q(12, "mmol/L"),
            "na": q(140, "mmol/L"),
            "cl": q(100, "mmol/L"),
        }
    )
    assert r["summary"][0].startswith("High anion gap metabolic acidosis with appropriate respiratory")


def test_urgent_findings_and_the_niv_caution_reach_the_summary():
    # bts_ics2016 NIV threshold; ph_severity: pH below 7.20
    r = bg(gas(7.15, 80.0))
    assert any("NIV thresholds" in c for c in r["cautions"])
    assert any(finding_text(r, "severe_acidaemia") in s for s in r["summary"])
    assert any(finding_text(r, "niv_criteria_met") in s for s in r["summary"])


def test_the_usual_paco2_estimate_inverts_the_slopes_from_the_present_paco2_above_41():
    # found by the independent audit of the equivalence claims (2026-12-05). A tentative respiratory
    # acidosis, pH 7.3475 with PaCO2 41.9 and a reported HCO3 24.34 (within 0.03 pH), reads acute-on-chronic;
    # the usual PaCO2 inverts acute 1 and chronic 3.5 per 10 mmHg (narins1980; the range with 5 and 3):
    # usual = 40 + (HCO3 - 24 - (P - 40) / 10) / ((slope - 1) / 10), P = the PaCO2 (at least 41)
    def usual(slope: float) -> float:
        return 40 + (24.34 - 24 - (41.9 - 40) / 10) / ((slope - 1) / 10)

    r = bg({"ph": 7.3475, "pco2": q(41.9, "mmHg"), "hco3": q(24.34, "mmol/L")})
    out = r["outputs"]
    assert out["baseline_pco2_estimated"]["value"] == pytest.approx(usual(3.5), abs=1e-9)  # 40.6
    assert out["baseline_pco2_range"]["low"]["value"] == pytest.approx(usual(5.0), abs=1e-9)  # 40.375
    assert out["baseline_pco2_range"]["high"]["value"] == pytest.approx(usual(3.0), abs=1e-9)  # 40.75
