"""The rules that change care for the patient who retains CO2 (docs/clinical-rules.md), each on worked cases.

Every expected number is computed here from the published formula named beside it, never taken from the
module under test. P(x) = PaCO2 x 10^(pH - x) is the PaCO2 that gives pH x at today's HCO3 (Henderson-
Hasselbalch, references.py henderson1908; the aim as a whole: pco2_aim, common practice). The invented samples
include one of each class of error an independent clinical review found in the earlier reading.
"""

from __future__ import annotations

import math

import pytest

from casebook import q
from tidewell.bridge import handle_obj

KPA = 1000.0 / 133.322387415  # mmHg per kPa (references.py bipm2019)


def bg(inputs: dict, unit: str = "mmHg") -> dict:
    response = handle_obj({"calc": "blood_gas", "inputs": inputs, "options": {"pressure_unit": unit}})
    assert response["ok"], response.get("errors")
    return response


def codes(response: dict) -> set[str]:
    return {f["code"] for f in response["findings"]}


def severity(response: dict, code: str) -> str:
    return next(f["severity"] for f in response["findings"] if f["code"] == code)


def reading(response: dict) -> list[tuple]:
    return [(d["code"], d["role"]) for d in response["outputs"]["disorders"]]


def p_at(pco2: float, ph: float, x: float) -> float:
    return pco2 * 10 ** (ph - x)


def ph_of(hco3: float, pco2: float) -> float:
    """Henderson-Hasselbalch, pK' 6.1, S 0.0307 (references.py henderson1908, nccls1994)."""
    return 6.1 + math.log10(hco3 / (0.0307 * pco2))


RA, MA, MK = "respiratory_acidosis", "metabolic_acidosis", "metabolic_alkalosis"


# -- acidaemic hypercapnia is never "compensated" (BTS/ICS 2016, verified) ---------------------------------


def test_acidaemic_retainer_on_the_chronic_line_is_not_compensated():
    # pH 7.28, PaCO2 11.6 kPa, HCO3 39, at risk: on the chronic 3.5 line, but acidaemic.
    r = bg({"ph": 7.28, "pco2": q(11.6, "kPa"), "hco3": q(39, "mmol/L"), "hypercapnia_risk": True}, "kPa")
    o = r["outputs"]
    assert "compensated as expected" not in o["interpretation"]
    assert "compensation incomplete" in o["interpretation"]
    assert severity(r, "niv_criteria_met") == "urgent"
    assert any(s.startswith("NIV threshold met") for s in r["summary"][:3])
    paco2 = 11.6 * KPA
    aim = o["pco2_target"]["value"] * KPA
    assert aim < paco2  # below the present PaCO2 while pH < 7.35
    assert aim == pytest.approx(min(p_at(paco2, 7.28, 7.35), o["baseline_pco2_estimated"]["value"] * KPA))


@pytest.mark.parametrize("pco2", [55, 60, 70, 80, 90, 100])
def test_every_acidaemic_gas_on_the_chronic_line_keeps_the_niv_threshold_urgent(pco2):
    # A sweep of the chronic 3.5-per-10 line (Narins & Emmett 1980) made acidaemic by 0.02 below 7.35.
    hco3 = 24 + 3.5 * (pco2 - 40) / 10
    ph = min(ph_of(hco3, pco2), 7.33)
    r = bg({"ph": ph, "pco2": q(pco2, "mmHg"), "hco3": q(hco3 * 10 ** (ph - ph_of(hco3, pco2)), "mmol/L")})
    assert "compensated as expected" not in r["outputs"]["interpretation"]
    assert severity(r, "niv_criteria_met") == "urgent"
    assert r["outputs"]["pco2_target"]["value"] < pco2


@pytest.mark.parametrize(("ph", "compensated"), [(7.34, False), (7.35, True)])
def test_compensated_only_from_ph_7_35(ph, compensated):
    # Both sides of 7.35 (BTS/ICS 2016): PaCO2 60, HCO3 from the pH (chronic range 30.0-34.0 mmol/L).
    hco3 = 0.0307 * 60 * 10 ** (ph - 6.1)
    assert 30.0 <= hco3 <= 34.0
    r = bg({"ph": ph, "pco2": q(60, "mmHg"), "hco3": q(round(hco3, 2), "mmol/L")})
    assert ("compensated as expected" in r["outputs"]["interpretation"]) == compensated
    assert ("compensation_incomplete" in codes(r)) == (not compensated)


@pytest.mark.parametrize(
    ("ph", "pco2_kpa", "met"), [(7.34, 6.6, True), (7.35, 6.6, False), (7.30, 6.5, False), (7.30, 6.51, True)]
)
def test_niv_threshold_both_sides(ph, pco2_kpa, met):
    # pH < 7.35 and PaCO2 > 6.5 kPa (BTS/ICS 2016, verified)
    r = bg({"ph": ph, "pco2": q(pco2_kpa, "kPa")}, "kPa")
    assert (r["outputs"]["niv_criteria"] == "met") == met
    assert ("niv_criteria_met" in codes(r)) == met


@pytest.mark.parametrize(("ph", "invasive"), [(7.24, True), (7.25, False)])
def test_ph_7_25_calls_for_ready_access_to_invasive_ventilation(ph, invasive):
    # BTS/ICS 2016 (verified): pH < 7.25 calls for a setting with ready access to invasive ventilation
    r = bg({"ph": ph, "pco2": q(75, "mmHg")})
    text = next(f["text"] for f in r["findings"] if f["code"] == "niv_criteria_met")
    assert ("invasive ventilation" in text) == invasive


# -- a second disorder beside a chronic respiratory acidosis ------------------------------------------------


def test_retainer_inside_the_printed_band_has_no_second_disorder():
    # pH 7.36, PaCO2 62, HCO3 34: the chronic band 3-5 per 10 mmHg gives 30.6-35.0 (Narins & Emmett 1980;
    # Martinu 2003, from memory), so no metabolic alkalosis, and the aim holds the present PaCO2.
    r = bg({"ph": 7.36, "pco2": q(62, "mmHg"), "hco3": q(34, "mmol/L"), "hypercapnia_risk": True})
    o = r["outputs"]
    assert reading(r) == [(RA, "primary")]
    assert o["expected_hco3"]["chronic"]["low"]["value"] == pytest.approx(24 + 3 * 2.2)
    assert o["expected_hco3"]["chronic"]["high"]["value"] == pytest.approx(24 + 5 * 2.2)
    assert o["pco2_target"]["value"] == pytest.approx(62.0)
    assert o["pco2_target_basis"] == "present_pco2"


@pytest.mark.parametrize(("lactate", "named"), [(3.9, False), (4.0, True)])
def test_lactate_of_4_names_a_metabolic_acidosis_beside_hypercapnia(lactate, named):
    # Common practice (Cohen & Woods 1976, from memory): lactate >= 4 with pH < 7.35
    r = bg({"ph": 7.25, "pco2": q(70, "mmHg"), "hco3": q(30, "mmol/L"), "lactate": q(lactate, "mmol/L")})
    assert ((MA, "concurrent") in reading(r)) == named


@pytest.mark.parametrize(("gap", "named"), [(16.0, False), (16.1, True)])
def test_anion_gap_above_16_names_a_metabolic_acidosis_beside_hypercapnia(gap, named):
    # AG = Na - (Cl + HCO3) (common practice: > 16); a consistent triple (Henderson-Hasselbalch HCO3)
    hco3 = round(0.0307 * 70 * 10 ** (7.25 - 6.1), 2)
    cl = round(140 - hco3 - gap, 2)
    r = bg(
        {
            "ph": 7.25,
            "pco2": q(70, "mmHg"),
            "hco3": q(hco3, "mmol/L"),
            "na": q(140, "mmol/L"),
            "cl": q(cl, "mmol/L"),
        }
    )
    assert r["outputs"]["anion_gap"]["value"] == pytest.approx(gap)
    assert ((MA, "concurrent") in reading(r)) == named


def test_lactic_acidosis_under_a_respiratory_acidosis_uses_the_hco3_before_the_gap():
    # pH 7.17, PaCO2 75, HCO3 26.5, Na 138, Cl 96, lactate 5.5: AG 15.5, HCO3 before the gap 30.0
    # (Wrenn 1990); fraction acute (36.25 - 30.0) / (36.25 - 27.5) = 0.714: acute-on-chronic, not acute.
    r = bg(
        {
            "ph": 7.17,
            "pco2": q(75, "mmHg"),
            "hco3": q(26.5, "mmol/L"),
            "na": q(138, "mmol/L"),
            "cl": q(96, "mmol/L"),
            "lactate": q(5.5, "mmol/L"),
            "hypercapnia_risk": True,
        }
    )
    o = r["outputs"]
    assert reading(r) == [(RA, "primary"), (MA, "concurrent")]
    assert o["disorders"][0]["chronicity"] == "acute_on_chronic"
    assert o["fraction_acute_before_gap"] == pytest.approx((36.25 - 30.0) / (36.25 - 27.5))
    # aim: min(P(7.35), usual from HCO3 30) = min(49.6, 50.0), never 45
    usual = 40 + (30.0 - 24 - (75 - 40) / 10) / 0.25
    assert o["pco2_target"]["value"] == pytest.approx(min(p_at(75, 7.17, 7.35), usual))
    assert o["pco2_target"]["value"] > 45


# -- oxygenation ---------------------------------------------------------------------------------------------


def test_hypoxaemia_hidden_by_oxygen_is_type_1():
    # pH 7.41, PaCO2 38, PO2 72 on FiO2 0.5: P/F 144 <= 300 (ARDS Definition Task Force 2012, the bands)
    r = bg({"ph": 7.41, "pco2": q(38, "mmHg"), "po2": q(72, "mmHg"), "fio2": 0.5})
    assert r["outputs"]["respiratory_failure"] == "type_1"
    assert r["outputs"]["pf_ratio"]["value"] == pytest.approx(144.0)
    assert "hypoxaemia_masked_by_oxygen" in codes(r)
    assert any("oxygen" in s for s in r["summary"][:3])


@pytest.mark.parametrize(("po2", "type_1"), [(90.0, False), (89.9, True)])
def test_pf_300_on_oxygen_both_sides(po2, type_1):
    # P/F = PO2 / 0.3: 300 at 90 mmHg is not below the limit ("at or below 300" counts; 300.0 is impaired)
    r = bg({"ph": 7.40, "pco2": q(40, "mmHg"), "po2": q(po2, "mmHg"), "fio2": 0.3})
    pf = po2 / 0.3
    assert (r["outputs"]["respiratory_failure"] == "type_1") == (pf <= 300.0)
    assert type_1 == (pf < 300.0) or pf == pytest.approx(300.0)


def test_air_is_never_assumed_in_silence():
    # PO2 130 with no FiO2: above the alveolar PO2 on air (150 - 40/0.8 = 100, alveolar gas equation):
    # oxygen was probably given; the oxygenation is not read
    r = bg({"ph": 7.40, "pco2": q(40, "mmHg"), "po2": q(130, "mmHg")})
    o = r["outputs"]
    assert o["fio2_source"] == "assumed_air"
    assert "oxygen_probably_given" in codes(r)
    assert "a_a_gradient" not in o and "respiratory_failure" not in o
    # PO2 90 with no FiO2: readable, and it says air was assumed
    r = bg({"ph": 7.40, "pco2": q(40, "mmHg"), "po2": q(90, "mmHg")})
    assert "air_assumed" in codes(r)
    assert r["outputs"]["respiratory_failure"] == "none"


def test_type_2_is_named_from_the_pco2_without_a_po2():
    r = bg({"ph": 7.30, "pco2": q(60, "mmHg")})
    assert r["outputs"]["respiratory_failure"] == "type_2"
    r = bg({"ph": 7.37, "pco2": q(45, "mmHg")})
    assert r["outputs"]["respiratory_failure"] == "none"


# -- venous gases -------------------------------------------------------------------------------------------


def test_a_venous_gas_gets_no_paco2_aim():
    # Venous pH 7.31, PCO2 58, HCO3 28.5 (Byrne 2014, from memory: venous PCO2 screens for hypercapnia)
    r = bg({"ph": 7.31, "pco2": q(58, "mmHg"), "hco3": q(28.5, "mmol/L"), "sample": "venous"})
    o = r["outputs"]
    assert "pco2_target" not in o
    assert o["niv_criteria"] == "not_assessable"
    assert o["disorders"][0]["fraction_acute"] is None
    assert "arterial or earlobe" in o["interpretation"]


# -- the SpO2 target (BTS 2017, verified) --------------------------------------------------------------------


def test_at_risk_with_a_normal_pco2_moves_to_94_98():
    # pH 7.43, PaCO2 5.3 kPa, PO2 8.1 kPa on 28 %, SpO2 94, at risk: 94-98 unless NIV/IPPV before
    base = {"ph": 7.43, "pco2": q(5.3, "kPa"), "po2": q(8.1, "kPa"), "fio2": 0.28, "spo2": 94}
    r = bg({**base, "hypercapnia_risk": True}, "kPa")
    assert r["outputs"]["spo2_target"] == {"low": 94, "high": 98}
    assert "spo2_above_target" not in codes(r) and "spo2_target_needs_history" in codes(r)
    r = bg({**base, "hypercapnia_risk": True, "previous_hypercapnic_failure": True}, "kPa")
    assert r["outputs"]["spo2_target"] == {"low": 88, "high": 92}
    assert "spo2_above_target" in codes(r)
    r = bg({**base, "spo2_target_prescribed": {"low": 90, "high": 94}}, "kPa")
    assert r["outputs"]["spo2_target"] == {"low": 90, "high": 94}


def test_oxygen_above_target_in_acidaemic_hypercapnia_leads_the_summary():
    # BTS 2017 (verified) and Austin 2010: excess oxygen in a retainer raises the PaCO2
    r = bg(
        {
            "ph": 7.29,
            "pco2": q(8.5, "kPa"),
            "hco3": q(30, "mmol/L"),
            "po2": q(25, "kPa"),
            "fio2": 0.6,
            "spo2": 99,
        }
    )
    assert severity(r, "spo2_above_target") == "urgent"
    assert any("Reduce the oxygen" in s for s in r["summary"][:4])


# -- the PaCO2 aim ------------------------------------------------------------------------------------------


def test_combined_acidosis_aims_for_winters_not_an_alkalaemia_floor():
    # Respiratory and metabolic acidosis together: never 45 labelled "alkalaemia floor" (Winters 1967)
    ph = ph_of(18, 60)
    r = bg({"ph": ph, "pco2": q(60, "mmHg"), "hco3": q(18, "mmol/L")})
    o = r["outputs"]
    expected = max(min(p_at(60, ph, 7.35), 45.0), 1.5 * 18 + 8)
    assert o["pco2_target"]["value"] == pytest.approx(max(expected, p_at(60, ph, 7.45)))
    assert o["pco2_target_basis"] != "alkalaemia_floor" or o["pco2_target"]["value"] == pytest.approx(
        p_at(60, ph, 7.45)
    )


def test_given_usual_pco2_is_the_aim_when_lower_than_p735():
    # usual 52.5 mmHg (7.0 kPa) below P(7.35) = 67.5 x 10^-0.07 = 57.5
    r = bg(
        {"ph": 7.28, "pco2": q(9.0, "kPa"), "hco3": q(31, "mmol/L"), "baseline_pco2": q(7.0, "kPa")}, "kPa"
    )
    assert r["outputs"]["pco2_target"]["value"] == pytest.approx(7.0)
    assert r["outputs"]["pco2_target_basis"] == "usual_pco2_given"


# -- the summary puts first what changes care --------------------------------------------------------------


def test_an_inconsistent_triple_marks_the_reading_provisional_first():
    r = bg({"ph": 7.40, "pco2": q(60, "mmHg"), "hco3": q(24, "mmol/L")})
    assert r["summary"][0].startswith("PROVISIONAL")


def test_a_unit_mix_up_marks_the_reading_provisional_first():
    r = bg({"ph": 7.30, "pco2": q(9.8, "mmHg")})
    assert r["summary"][0].startswith("PROVISIONAL") and "kPa" in r["summary"][0]


def test_each_summary_statement_once():
    r = bg({"ph": 7.28, "pco2": q(11.6, "kPa"), "hco3": q(39, "mmol/L"), "hypercapnia_risk": True}, "kPa")
    assert len(r["summary"]) == len(set(r["summary"]))
    assert sum("NIV threshold" in s for s in r["summary"]) == 1
    assert not any("Decision support only" in s for s in r["summary"])


# -- second review: contradictions and boundaries ----------------------------------------------------------


def test_an_acidaemic_gas_below_the_usual_pco2_is_not_called_over_corrected():
    # Usual 9 kPa, gas 7.30 / 8.0 kPa / 29: acidaemic, so the aim is P(7.35) and nothing says "do not lower"
    r = bg(
        {"ph": 7.30, "pco2": q(8.0, "kPa"), "hco3": q(29, "mmol/L"), "baseline_pco2": q(9.0, "kPa")}, "kPa"
    )
    assert "pco2_below_baseline" not in codes(r)
    assert r["outputs"]["pco2_target"]["value"] == pytest.approx(min(p_at(8.0, 7.30, 7.35), 9.0))
    assert not any("lower it further" in s for s in r["summary"])
    # the same usual PaCO2 with an alkalaemic gas is over-correction (post-hypercapnic alkalosis)
    r = bg(
        {"ph": 7.50, "pco2": q(6.0, "kPa"), "hco3": q(35, "mmol/L"), "baseline_pco2": q(9.0, "kPa")}, "kPa"
    )
    assert "post-hypercapnic" in next(f["text"] for f in r["findings"] if f["code"] == "pco2_below_baseline")


def test_compensation_is_not_called_incomplete_beside_a_named_metabolic_acidosis():
    r = bg({"ph": 7.25, "pco2": q(70, "mmHg"), "hco3": q(30, "mmol/L"), "lactate": q(6, "mmol/L")})
    assert (MA, "concurrent") in reading(r)
    assert "compensation_incomplete" not in codes(r)


def test_compensating_hypoventilation_is_not_called_pure_hypoventilation():
    # 7.49 / 7.5 kPa / 41 on air: metabolic alkalosis with compensatory hypoventilation (Narins & Emmett 1980)
    inputs = {"ph": 7.49, "pco2": q(7.5, "kPa"), "hco3": q(41, "mmol/L"), "po2": q(9, "kPa"), "fio2": 0.21}
    r = bg({**inputs, "age": 60}, "kPa")
    assert reading(r)[0] == (MK, "primary")
    assert "pure_hypoventilation" not in codes(r) and "gas_exchange_impaired" not in codes(r)


def test_a_negative_a_a_gradient_is_not_called_normal_in_the_summary():
    r = bg({"ph": 7.40, "pco2": q(5.3, "kPa"), "po2": q(20.0, "kPa"), "fio2": 0.21}, "kPa")
    assert "po2_above_alveolar" in codes(r)
    assert not any("(normal)" in s for s in r["summary"])


@pytest.mark.parametrize(("pco2_kpa", "low"), [(6.0, 94), (6.01, 88)])
def test_above_6_kpa_means_above(pco2_kpa, low):
    # BTS 2017 (verified): 88-92 % when the PCO2 is above 6.0 kPa
    r = bg({"ph": 7.38, "pco2": q(pco2_kpa, "kPa")}, "kPa")
    assert r["outputs"]["spo2_target"]["low"] == low


def test_niv_numbers_with_a_primary_metabolic_acidosis_are_not_an_niv_indication():
    # 7.10 / 6.8 kPa / HCO3 15.5: Winters 31.25 mmHg; ventilation failing to compensate
    ph = 7.10
    r = bg({"ph": ph, "pco2": q(6.8, "kPa"), "hco3": q(15.5, "mmol/L")}, "kPa")
    assert reading(r)[0] == (MA, "primary")
    assert r["outputs"]["niv_criteria"] == "not_applicable"
    assert severity(r, "ventilation_failing_to_compensate") == "urgent"
    assert "niv_criteria_met" not in codes(r)
