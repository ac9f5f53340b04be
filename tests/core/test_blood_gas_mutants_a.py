"""blood_gas: rules the mutation run of the compensation, consistency, decision, temperature and work modules
found unpinned (docs/testing.md).

Each expected value comes from outside the package: the published rule or formula written here with its
``references.py`` key, marked *common practice* where that is what it is, or the contract's documented
behaviour (docs/bridge.md). The helpers are those of test_blood_gas_boundaries.
"""

from __future__ import annotations

import json

import pytest
from test_blood_gas_boundaries import bg, finding_text, hco3_of, ph_of

from casebook import q
from tidewell.bridge import handle


def order(response: dict) -> list[str]:
    return [d["code"] for d in response["outputs"]["disorders"]]


# -- reference ranges at their ends (acid_base_normal_ranges: pH 7.35-7.45 inclusive) ---------------------


@pytest.mark.parametrize("ph", [7.35, 7.45])
def test_a_ph_of_exactly_7_35_or_7_45_is_normal(ph):
    # pH 7.35-7.45 inclusive (acid_base_normal_ranges); PaCO2 40, HCO3 from Henderson-Hasselbalch
    r = bg({"ph": ph, "pco2": q(40, "mmHg"), "hco3": q(hco3_of(ph, 40), "mmol/L")})
    assert r["outputs"]["ph_status"] == "normal"


# -- display decimals (docs/bridge.md, display; common practice: a pH to 3 decimals where the consistency
# check compares it, a concentration in mmol/L to 1, a fraction to 2) -----------------------------------


def test_display_decimals_of_the_consistency_check_and_the_baseline_expectation():
    r = bg({"ph": 7.30, "pco2": q(65, "mmHg"), "hco3": q(31, "mmol/L"), "baseline_pco2": q(50, "mmHg")})
    display = r["display"]
    assert display["ph_computed"] == 3
    assert display["ph_difference"] == 3
    assert display["hco3"] == 1
    assert display["expected_hco3_on_baseline"] == 1


def gap_beside_hypercapnia(hco3: float) -> dict:
    """PaCO2 60 with an anion gap of 20 (a high-AG acidosis, gabow1980): the HCO3 before the gap is
    HCO3 + (AG - 12) (wrenn1990)."""
    return {
        "ph": ph_of(hco3, 60),
        "pco2": q(60, "mmHg"),
        "hco3": q(hco3, "mmol/L"),
        "na": q(140, "mmol/L"),
        "cl": q(140 - hco3 - 20, "mmol/L"),
    }


def test_display_decimals_of_the_fraction_acute_before_the_gap():
    r = bg(gap_beside_hypercapnia(20.5))
    assert "fraction_acute_before_gap" in r["outputs"]
    assert r["display"]["fraction_acute_before_gap"] == 2


def test_the_fraction_acute_from_the_hco3_before_the_gap_is_limited_to_1():
    # HCO3 17: before the gap 17 + 8 = 25, below the acute 24 + 1 x 2 = 26 (narins1980): f = (31 - 25) /
    # (31 - 26) = 1.2, limited to 0-1 (fraction_acute_bands)
    assert (31 - (17 + 8)) / (31 - 26) > 1.0
    r = bg(gap_beside_hypercapnia(17.0))
    primary = r["outputs"]["disorders"][0]
    assert primary["code"] == "respiratory_acidosis"
    assert primary["fraction_acute"] == pytest.approx(1.0, abs=1e-12)
    assert primary["chronicity"] == "acute"


# -- a respiratory alkalosis is not read with the rules of a respiratory acidosis ---------------------------


def test_a_respiratory_alkalosis_gets_the_alkalosis_rules_and_no_ph_rules():
    # pH 7.50, PaCO2 30: respiratory alkalosis. Acute HCO3 = 24 - 2 x (40 - 30)/10 = 22, chronic 24 - 4 = 20
    # (narins1980, brandis); the pH rules 7.40 - 0.008 x dPaCO2 are those of a respiratory acidosis
    # (berend2014), so no expected pH is shown
    r = bg({"ph": 7.50, "pco2": q(30, "mmHg"), "hco3": q(hco3_of(7.50, 30), "mmol/L")})
    assert order(r) == ["respiratory_alkalosis"]
    centre = r["outputs"]["expected_hco3_centre"]
    assert centre["acute"]["value"] == pytest.approx(22.0, abs=1e-9)
    assert centre["chronic"]["value"] == pytest.approx(20.0, abs=1e-9)
    assert "expected_ph" not in r["outputs"]
    assert "expected_ph_hh" not in r["outputs"]
    formulas = {s["formula"] for s in r["steps"] if s.get("output") == "expected_hco3_centre"}
    assert all("24 - " in f for f in formulas), formulas


# -- the reasons named for a concurrent metabolic acidosis beside a respiratory acidosis -------------------
# lactate 4 mmol/L or more (lactate_beside_hypercapnia, cohen_woods1976; common practice), anion gap above 16


def test_a_lactate_of_exactly_4_names_the_concurrent_metabolic_acidosis_by_its_lactate():
    h = hco3_of(7.25, 70)
    r = bg(
        {
            "ph": 7.25,
            "pco2": q(70, "mmHg"),
            "hco3": q(h, "mmol/L"),
            "lactate": q(4, "mmol/L"),
            "na": q(140, "mmol/L"),
            "cl": q(100, "mmol/L"),  # AG 140 - 100 - 30 = 10: not a reason
        }
    )
    text = finding_text(r, "concurrent_metabolic_acidosis")
    assert "lactate 4.0 mmol/L (4 or more)" in text
    assert "anion gap" not in text


def test_a_lactate_below_4_is_not_named_as_a_reason():
    h = hco3_of(7.25, 70)
    # AG = 140 - 93 - HCO3 (about 30.4) = 16.6: above 16, the only reason
    assert 140 - 93 - h > 16.0
    r = bg(
        {
            "ph": 7.25,
            "pco2": q(70, "mmHg"),
            "hco3": q(h, "mmol/L"),
            "lactate": q(3, "mmol/L"),
            "na": q(140, "mmol/L"),
            "cl": q(93, "mmol/L"),
        }
    )
    text = finding_text(r, "concurrent_metabolic_acidosis")
    assert "anion gap 16.6 mmol/L (above 16)" in text
    assert "lactate" not in text


# -- the pH rules are said to drift only above a rise of 30 mmHg (berend2014, fraction_acute_bands) -------


def test_chronicity_rules_that_disagree_below_a_rise_of_30_do_not_blame_the_drift():
    # PaCO2 60 (rise 20), HCO3 26 = the acute 24 + 1 x 2 (narins1980): f by HCO3 1.0; pH 7.275 (within
    # 0.03 of the Henderson-Hasselbalch 7.25, consistency_band): f by pH
    # [(7.40 - 7.275) - 0.003 x 20] / (0.005 x 20)
    f_ph = ((7.40 - 7.275) - 0.003 * 20) / (0.005 * 20)
    assert f_ph == pytest.approx(0.65)
    r = bg({"ph": 7.275, "pco2": q(60, "mmHg"), "hco3": q(26, "mmol/L")})
    assert r["outputs"]["fraction_acute_ph"] == pytest.approx(f_ph, abs=1e-9)
    text = finding_text(r, "chronicity_rules_disagree")
    assert text.endswith("; the HCO3 reading is used.")
    assert "drift" not in text


# -- the order of the disorders: the primary, those the compensation rules name, then the one the anion gap
# finds (docs/bridge.md, disorders) ------------------------------------------------------------------------


def test_a_respiratory_acidosis_with_a_metabolic_alkalosis_names_the_gap_acidosis_last():
    # PaCO2 75, HCO3 45: pH 7.39 (Henderson-Hasselbalch), acid side with only the PaCO2 acidotic: respiratory
    # acidosis primary. HCO3 45 is above the steepest chronic band 24 + 5 x 3.5 = 41.5 (martinu2003) and the
    # SBE ~ 19 above 0.4 x 35 + 3 = 17 (schlichtig1998): a metabolic alkalosis. AG 140 - 73 - 45 = 22, 20 or
    # more: a high-AG acidosis the gap finds (gabow1980, from memory)
    r = bg(
        {
            "ph": ph_of(45, 75),
            "pco2": q(75, "mmHg"),
            "hco3": q(45, "mmol/L"),
            "na": q(140, "mmol/L"),
            "cl": q(73, "mmol/L"),
        }
    )
    assert order(r) == ["respiratory_acidosis", "metabolic_alkalosis", "metabolic_acidosis"]


def test_a_metabolic_alkalosis_names_its_concurrent_respiratory_acidosis_before_the_gap_acidosis():
    # HCO3 40, PaCO2 60: pH 7.44, alkaline side: metabolic alkalosis primary; expected PaCO2 40 + 0.7 x 16
    # = 51.2 +/- 5 (berend2014): 60 is above, a concurrent respiratory acidosis. AG 140 - 78 - 40 = 22
    # (gabow1980, from memory): the gap acidosis, found last
    r = bg(
        {
            "ph": ph_of(40, 60),
            "pco2": q(60, "mmHg"),
            "hco3": q(40, "mmol/L"),
            "na": q(140, "mmol/L"),
            "cl": q(78, "mmol/L"),
        }
    )
    assert order(r) == ["metabolic_alkalosis", "respiratory_acidosis", "metabolic_acidosis"]


def test_two_concurrent_metabolic_disorders_beside_a_respiratory_acidosis_name_the_acidosis_first():
    # pH 7.349, PaCO2 120: HCO3 by Henderson-Hasselbalch ~ 65.4, above the steepest chronic band
    # 24 + 5 x 8 = 64 (martinu2003) with an SBE ~ 37 above 0.4 x 80 + 3 = 35 (schlichtig1998): a metabolic
    # alkalosis; lactate 5 beside the acidaemia (lactate_beside_hypercapnia): a metabolic acidosis. Both are
    # named by the compensation rules, in the documented code order (acidosis, then alkalosis)
    h = hco3_of(7.349, 120)
    assert h > 24 + 5 * 8
    r = bg({"ph": 7.349, "pco2": q(120, "mmHg"), "hco3": q(h, "mmol/L"), "lactate": q(5, "mmol/L")})
    assert order(r) == ["respiratory_acidosis", "metabolic_acidosis", "metabolic_alkalosis"]


# -- the pH-stat view: pH 7.35-7.45 and PCO2 35-45 mmHg (acid_base_normal_ranges) --------------------------


def test_the_ph_stat_view_reads_a_corrected_ph_above_7_45_as_outside():
    # pH 7.50 at 36 degC: 7.50 + (-1) x (-0.0147 + 0.0065 x (7.40 - 7.50)) = 7.5154 (rosenthal1948);
    # PCO2 30 x 10^(0.019 x -1) = 28.8 (bradley1956): both outside
    ph_t = 7.50 - (-0.0147 + 0.0065 * (7.40 - 7.50))
    pco2_t = 30.0 * 10 ** (0.019 * -1.0)
    assert ph_t > 7.45 and pco2_t < 35.0
    r = bg(
        {
            "ph": 7.50,
            "pco2": q(30, "mmHg"),
            "hco3": q(hco3_of(7.50, 30), "mmol/L"),
            "temperature": q(36, "degC"),
        }
    )
    assert r["outputs"]["ph_at_temperature"] == pytest.approx(ph_t, abs=1e-9)
    assert "which are outside the reference ranges" in finding_text(r, "temperature_ph_stat_view")


def test_the_ph_stat_view_reads_a_corrected_pco2_below_35_as_partly_outside():
    # pH 7.42, PCO2 36 at 35 degC: pH 7.42 + (-2) x (-0.0147 + 0.0065 x -0.02) = 7.4497 (inside); PCO2
    # 36 x 10^(0.019 x -2) = 33.0 (below 35) (rosenthal1948, bradley1956)
    ph_t = 7.42 + (-2.0) * (-0.0147 + 0.0065 * (7.40 - 7.42))
    pco2_t = 36.0 * 10 ** (0.019 * -2.0)
    assert 7.35 <= ph_t <= 7.45 and pco2_t < 35.0
    r = bg(
        {
            "ph": 7.42,
            "pco2": q(36, "mmHg"),
            "hco3": q(hco3_of(7.42, 36), "mmol/L"),
            "temperature": q(35, "degC"),
        }
    )
    assert r["outputs"]["pco2_at_temperature"]["value"] == pytest.approx(pco2_t, abs=1e-9)
    assert "partly outside the reference ranges" in finding_text(r, "temperature_ph_stat_view")


# -- a P/F ratio in the user's pressure unit (docs/bridge.md, options.pressure_unit) ------------------------


def test_a_pf_ratio_is_written_in_kpa_when_the_request_sent_as_json_asks_for_kpa():
    # PaO2 80 mmHg on FiO2 0.5: P/F 160 mmHg = 21.3 kPa (berlin2012; 1 kPa = 7.50062 mmHg, bipm2019)
    request = {
        "calc": "blood_gas",
        "inputs": {
            "ph": 7.40,
            "pco2": q(40, "mmHg"),
            "hco3": q(hco3_of(7.40, 40), "mmol/L"),
            "po2": q(80, "mmHg"),
            "fio2": 0.5,
        },
        "options": {"pressure_unit": "kPa"},
    }
    response = json.loads(handle(json.dumps(request)))
    assert response["ok"]
    texts = " ".join(f["text"] for f in response["findings"])
    assert f"P/F ratio {160 * 0.133322387415:.1f} kPa" in texts
    assert "160 mmHg" not in texts
