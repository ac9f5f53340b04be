"""blood_gas: rules the mutation run of the compensation, consistency, decision, temperature and work modules
found unpinned (docs/testing.md).

Each expected value comes from outside the package: the published rule or formula written here with its
``references.py`` key, marked *common practice* where that is what it is, or the contract's documented
behaviour (docs/bridge.md). The helpers are those of test_blood_gas_boundaries.
"""

from __future__ import annotations

import json

import pytest
from test_blood_gas_boundaries import bg, codes, finding_text, fires_on_both_paths, hco3_of, ph_of

from casebook import q
from tidewell.bridge import handle
from tidewell.frontends import batch


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


# -- the primary process at the ends of the pH range (acid_base_normal_ranges: pH 7.35-7.45 inclusive) -----
# borderline_values is for a pH outside its range with PCO2 and HCO3 inside theirs; at pH 7.35 or 7.45 the
# pH is inside, so it never fires there


@pytest.mark.parametrize(
    ("ph", "pco2", "hco3"),
    [
        # HCO3 26.2 above 26 with PaCO2 45 (not above 45): Henderson-Hasselbalch pH 7.378, within the 0.03
        # of the consistency check (consistency_band)
        (7.35, 45.0, 26.2),
        # every value inside its range: Henderson-Hasselbalch pH 7.420, within 0.03
        (7.45, 40.5, 26.0),
    ],
)
def test_a_ph_at_either_end_of_its_range_is_never_a_borderline_reading(ph, pco2, hco3):
    assert abs(ph_of(hco3, pco2) - ph) <= 0.03
    r = bg({"ph": ph, "pco2": q(pco2, "mmHg"), "hco3": q(hco3, "mmol/L")})
    assert r["outputs"]["consistency"] == "consistent"
    assert "borderline_values" not in codes(r)


# -- Winters' band is inclusive (albert1967: expected PaCO2 = 1.5 x HCO3 + 8 +/- 2) -------------------------


@pytest.mark.parametrize(
    ("pco2", "code"),
    [
        (28.0, "compensation_as_expected"),  # 1.5 x 12 + 8 + 2: the upper end
        (28.5, "concurrent_respiratory_acidosis"),
        (24.0, "compensation_as_expected"),  # 1.5 x 12 + 8 - 2: the lower end
        (23.5, "concurrent_respiratory_alkalosis"),
    ],
)
def test_winters_band_includes_both_ends(pco2, code):
    assert 1.5 * 12 + 8 - 2 <= 28.0 and 24.0 <= 1.5 * 12 + 8 + 2
    inputs = {"ph": ph_of(12, pco2), "pco2": q(pco2, "mmHg"), "hco3": q(12, "mmol/L")}
    r = bg(inputs)
    assert order(r)[0] == "metabolic_acidosis"
    assert code in codes(r)
    assert fires_on_both_paths(inputs, code) == (True, True)


def test_the_ph_rule_drift_belongs_to_a_respiratory_primary_only():
    # HCO3 12, PaCO2 71: metabolic acidosis primary (|log10(24/12)| > |log10(71/40)|) with a concurrent
    # respiratory acidosis (above Winters' 26 +/- 2, albert1967); the linear pH rules (berend2014) read a
    # primary respiratory acidosis, so their drift above a rise of 30 is not named here, on either path
    inputs = {"ph": ph_of(12, 71), "pco2": q(71, "mmHg"), "hco3": q(12, "mmol/L")}
    assert order(bg(inputs)) == ["metabolic_acidosis", "respiratory_acidosis"]
    assert fires_on_both_paths(inputs, "ph_rule_drift") == (False, False)
    assert fires_on_both_paths(inputs, "chronicity_rules_disagree") == (False, False)


# -- a concurrent metabolic acidosis beside a respiratory acidosis: more than the margin below the acute
# expectation, the margin 2 mmol/L or a fifth of the acute-chronic spread if larger (fraction_acute_bands,
# narins1980; the margin is the project's documented convention) --------------------------------------------


@pytest.mark.parametrize(("hco3", "named"), [(27.5, False), (26.5, True)])
def test_the_margin_below_the_acute_expectation_widens_with_the_spread(hco3, named):
    # PaCO2 100: acute 24 + 1 x 6 = 30, chronic 24 + 3.5 x 6 = 45 (narins1980); margin max(2, 0.2 x 15) = 3:
    # a HCO3 below 27 names a concurrent metabolic acidosis
    acute, chronic = 24 + 6.0, 24 + 3.5 * 6
    limit = acute - max(2.0, 0.2 * (chronic - acute))
    assert limit == pytest.approx(27.0)
    inputs = {"ph": ph_of(hco3, 100), "pco2": q(100, "mmHg"), "hco3": q(hco3, "mmol/L")}
    assert fires_on_both_paths(inputs, "concurrent_metabolic_acidosis") == (named, named)


# -- the fractions acute need a PaCO2 at least 1 mmHg from 40 (fraction_acute_bands: the divisor is the rise;
# the public fraction functions accept 41 mmHg and more) ----------------------------------------------


def test_a_rise_of_exactly_1_mmhg_shows_both_fractions_acute():
    # pH 7.345, PaCO2 41, HCO3 23.5 (Henderson-Hasselbalch 7.371, within 0.03): a tentative respiratory
    # acidosis (|log10(41/40)| > |log10(24/23.5)|). By HCO3 f = (24.35 - 23.5) / (24.35 - 24.1) = 3.4
    # (narins1980); by pH f = [(7.40 - 7.345) - 0.003] / 0.005 = 10.4 (berend2014)
    r = bg({"ph": 7.345, "pco2": q(41, "mmHg"), "hco3": q(23.5, "mmol/L")})
    assert order(r) == ["respiratory_acidosis"]
    assert r["outputs"]["fraction_acute_hco3"] == pytest.approx((24.35 - 23.5) / (24.35 - 24.1), abs=1e-9)
    assert r["outputs"]["fraction_acute_ph"] == pytest.approx(((7.40 - 7.345) - 0.003) / 0.005, abs=1e-9)


def test_a_rise_below_1_mmhg_shows_no_fraction_acute():
    # pH 7.345, PaCO2 40.8, HCO3 23.55 (Henderson-Hasselbalch 7.374, within 0.03): a tentative respiratory
    # acidosis (|log10(40.8/40)| > |log10(24/23.55)|), rise 0.8 mmHg
    assert abs(ph_of(23.55, 40.8) - 7.345) <= 0.03
    r = bg({"ph": 7.345, "pco2": q(40.8, "mmHg"), "hco3": q(23.55, "mmol/L")})
    assert order(r) == ["respiratory_acidosis"]
    assert "fraction_acute_hco3" not in r["outputs"]
    assert "fraction_acute_ph" not in r["outputs"]


def test_a_rise_of_1_mmhg_above_a_baseline_below_40_reads_fraction_acute_1():
    # f = (PaCO2 - max(baseline, 40)) / (PaCO2 - 40) = (41 - 40) / 1 = 1 (fraction_acute_bands)
    r = bg({"ph": 7.345, "pco2": q(41, "mmHg"), "hco3": q(23.5, "mmol/L"), "baseline_pco2": q(35, "mmHg")})
    assert r["outputs"]["fraction_acute_baseline"] == pytest.approx(1.0, abs=1e-12)


# -- a concurrent metabolic alkalosis beside a respiratory alkalosis: more than 2 above the acute
# expectation (narins1980; margin common practice) ----------------------------------------------------------


@pytest.mark.parametrize(("hco3", "named"), [(24.0, False), (24.1, True)])
def test_a_metabolic_alkalosis_beside_a_respiratory_alkalosis_needs_more_than_2_above_the_acute(hco3, named):
    # PaCO2 30: acute 24 - 2 x 1 = 22; the limit 22 + 2 = 24 itself is not above it
    inputs = {"ph": ph_of(hco3, 30), "pco2": q(30, "mmHg"), "hco3": q(hco3, "mmol/L")}
    assert order(bg(inputs))[0] == "respiratory_alkalosis"
    assert fires_on_both_paths(inputs, "concurrent_metabolic_alkalosis") == (named, named)


@pytest.mark.parametrize(("hco3", "named"), [(38.048, False), (38.148, True)])
def test_a_metabolic_alkalosis_beside_a_respiratory_acidosis_needs_an_sbe_above_the_chronic_limit(
    hco3, named
):
    # pH 7.36, PaCO2 64 (rise 24): HCO3 above the steepest chronic band 24 + 5 x 2.4 = 36 (martinu2003); the
    # SBE HCO3 - 24.8 + 16.2 x (pH - 7.40) (nccls1994) must be above 0.4 x 24 + 3 = 12.6 (schlichtig1998):
    # at HCO3 38.048 it is exactly 12.6
    sbe = hco3 - 24.8 + 16.2 * (7.36 - 7.40)
    assert (sbe > 0.4 * 24 + 3 + 1e-9) is named
    inputs = {"ph": 7.36, "pco2": q(64, "mmHg"), "hco3": q(hco3, "mmol/L")}
    assert abs(ph_of(hco3, 64) - 7.36) <= 0.03
    assert order(bg(inputs))[0] == "respiratory_acidosis"
    assert fires_on_both_paths(inputs, "concurrent_metabolic_alkalosis") == (named, named)


def test_chronicity_rules_that_agree_are_not_named_on_either_path():
    # PaCO2 60, HCO3 31 = the chronic 24 + 3.5 x 2 (narins1980): f by HCO3 0; pH 7.326 by
    # Henderson-Hasselbalch, f by pH [(7.40 - 7.326) - 0.06] / 0.1 ~ 0.14 (berend2014): both chronic
    inputs = {"ph": ph_of(31, 60), "pco2": q(60, "mmHg"), "hco3": q(31, "mmol/L")}
    assert fires_on_both_paths(inputs, "chronicity_rules_disagree") == (False, False)


# -- the chronicity beside a metabolic acidosis: the HCO3 before the gap only for a gap above 12 (wrenn1990)


def test_an_anion_gap_of_exactly_12_leaves_the_chronicity_indeterminate():
    # PaCO2 60, HCO3 20: below the acute 26 - 2 (narins1980), a concurrent metabolic acidosis; AG 140 - 108
    # - 20 = 12, nothing to take back: no fraction acute, the chronicity is indeterminate
    inputs = {"ph": ph_of(20, 60), "pco2": q(60, "mmHg"), "hco3": q(20, "mmol/L")}
    r = bg({**inputs, "na": q(140, "mmol/L"), "cl": q(108, "mmol/L")})
    assert "chronicity_indeterminate" in codes(r)
    assert r["outputs"]["disorders"][0]["fraction_acute"] is None
    assert "fraction_acute_before_gap" not in r["outputs"]


# -- the chronicity of a concurrent respiratory acidosis from a known baseline (fraction_acute_bands) -------


@pytest.mark.parametrize(("pco2", "from_baseline"), [(41.5, True), (41.0, False)])
def test_a_concurrent_respiratory_acidosis_reads_its_baseline_above_a_rise_of_1(pco2, from_baseline):
    # HCO3 20: Winters 38 +/- 2 (albert1967): PaCO2 41 and 41.5 are above it; with a usual PaCO2 of 35,
    # f = (PaCO2 - 40) / (PaCO2 - 40) = 1 needs a rise of more than 1 mmHg to be read
    inputs = {
        "ph": ph_of(20, pco2),
        "pco2": q(pco2, "mmHg"),
        "hco3": q(20, "mmol/L"),
        "baseline_pco2": q(35, "mmHg"),
    }
    r = bg(inputs)
    assert order(r) == ["metabolic_acidosis", "respiratory_acidosis"]
    assert ("respiratory_chronicity_assumed" in codes(r)) is not from_baseline
    if from_baseline:
        assert r["outputs"]["disorders"][1]["fraction_acute"] == pytest.approx(1.0, abs=1e-12)


def test_a_concurrent_respiratory_acidosis_below_its_baseline_reads_fraction_acute_0():
    # HCO3 12, PaCO2 50 above Winters' 26 +/- 2 (albert1967); usual PaCO2 60: f = (50 - 60) / (50 - 40) = -1,
    # limited to 0-1 (fraction_acute_bands)
    inputs = {
        "ph": ph_of(12, 50),
        "pco2": q(50, "mmHg"),
        "hco3": q(12, "mmol/L"),
        "baseline_pco2": q(60, "mmHg"),
    }
    r = bg(inputs)
    assert order(r) == ["metabolic_acidosis", "respiratory_acidosis"]
    assert r["outputs"]["disorders"][1]["fraction_acute"] == pytest.approx(0.0, abs=1e-12)


def test_a_metabolic_alkalosis_the_gap_finds_is_named_after_the_concurrent_respiratory_acidosis():
    # HCO3 18, PaCO2 46: metabolic acidosis primary (|log10(24/18)| > |log10(46/40)|), PaCO2 above Winters'
    # 35 +/- 2 (albert1967); AG 140 - 92 - 18 = 30: delta ratio (30 - 12) / (24 - 18) = 3, above 2, a
    # metabolic alkalosis beside the gap acidosis (wrenn1990, rastegar2007), found last
    r = bg(
        {
            "ph": ph_of(18, 46),
            "pco2": q(46, "mmHg"),
            "hco3": q(18, "mmol/L"),
            "na": q(140, "mmol/L"),
            "cl": q(92, "mmol/L"),
        }
    )
    assert order(r) == ["metabolic_acidosis", "respiratory_acidosis", "metabolic_alkalosis"]


# -- the base excess a report gives against the band the formulas span, +/- 2 (nccls1994, siggaard1971) -----


def be_band(ph: float, hco3: float) -> tuple[float, float]:
    clsi = hco3 - 24.8 + 16.2 * (ph - 7.40)  # nccls1994
    siggaard = 0.9287 * (hco3 - 24.4 + 14.83 * (ph - 7.40))  # siggaard1971
    van_slyke = (1 - 0.014 * 5) * ((hco3 - 24.8) + (1.43 * 5 + 7.7) * (ph - 7.40))  # Hb 5 g/dL, siggaard1971
    return min(clsi, siggaard, van_slyke), max(clsi, siggaard, van_slyke)


@pytest.mark.parametrize(
    ("ph", "pco2", "hco3", "be", "differs"),
    [
        # pH 7.40, HCO3 15 (PaCO2 24.5 by Henderson-Hasselbalch): band -9.8 to -8.73
        (7.40, 24.5, 15.0, -11.8, False),  # the lower end - 2 itself
        (7.40, 24.5, 15.0, -12.3, True),
        (7.40, 24.5, 15.0, -6.2, True),
        # pH 7.32, HCO3 32.74 (PaCO2 64): the upper end + 2 is 8.644
        (7.32, 64.0, 32.74, 8.644, False),
        (7.32, 64.0, 32.74, 8.7, True),
    ],
)
def test_a_reported_base_excess_within_2_of_the_computed_band_is_accepted(ph, pco2, hco3, be, differs):
    low, high = be_band(ph, hco3)
    assert (not low - 2.0 - 1e-9 <= be <= high + 2.0 + 1e-9) is differs
    inputs = {"ph": ph, "pco2": q(pco2, "mmHg"), "hco3": q(hco3, "mmol/L"), "base_excess": q(be, "mmol/L")}
    assert abs(ph_of(hco3, pco2) - ph) <= 0.03
    assert fires_on_both_paths(inputs, "base_excess_differs") == (differs, differs)


def test_the_van_slyke_base_excess_at_hb_5():
    # (1 - 0.014 x 5) x [(HCO3 - 24.8) + (1.43 x 5 + 7.7) x (pH - 7.40)] (siggaard1971)
    r = bg({"ph": 7.32, "pco2": q(64, "mmHg"), "hco3": q(32.74, "mmol/L")})
    expected = (1 - 0.014 * 5) * ((32.74 - 24.8) + (1.43 * 5 + 7.7) * (7.32 - 7.40))
    assert r["outputs"]["sbe_variants"]["van_slyke_hb5"]["value"] == pytest.approx(expected, abs=1e-9)


@pytest.mark.parametrize(
    ("ph", "pco2", "t"),
    [
        (7.33571783407849, 40.0, 36.0),  # the corrected pH is 7.35 to the last bit
        (7.435072031793344, 40.0, 36.0),  # the corrected pH is 7.45 to the last bit
        (7.40, 36.0, 36.356081241209914),  # the corrected PCO2 is 35 mmHg to the last bit
        (7.40, 41.0, 39.12782405555833),  # the corrected PCO2 is 45 mmHg to the last bit
    ],
)
def test_the_ph_stat_view_counts_the_ends_of_the_reference_ranges_as_inside(ph, pco2, t):
    # pH 7.35-7.45 and PCO2 35-45 mmHg inclusive (acid_base_normal_ranges); pH_T = pH + (T - 37) x (-0.0147
    # + 0.0065 x (7.40 - pH)) (rosenthal1948), PCO2_T = PCO2 x 10^(0.019 x (T - 37)) (bradley1956)
    ph_t = ph + (t - 37.0) * (-0.0147 + 0.0065 * (7.40 - ph))
    pco2_t = pco2 * 10.0 ** (0.019 * (t - 37.0))
    assert 7.35 <= ph_t <= 7.45 and 35.0 <= pco2_t <= 45.0
    assert ph_t in (7.35, 7.45) or pco2_t in (35.0, 45.0)
    r = bg({"ph": ph, "pco2": q(pco2, "mmHg"), "temperature": q(t, "degC")})
    assert "which are near normal" in finding_text(r, "temperature_ph_stat_view")


# -- a known baseline against the HCO3 rules (fraction_acute_bands: acute at 0.8 or more, chronic at 0.2 or
# less, acute-on-chronic between) ---------------------------------------------------------------------------


@pytest.mark.parametrize(
    ("baseline", "disagree"),
    [
        # baseline 50: f = (60 - 50) / (60 - 40) = 0.5, acute-on-chronic
        (50.0, True),
        # baseline 35 (below 40): f = (60 - 40) / 20 = 1, acute
        (35.0, False),
    ],
)
def test_a_baseline_that_reads_otherwise_than_the_hco3_is_named_on_both_paths(baseline, disagree):
    # PaCO2 60, HCO3 26.6: f by HCO3 (31 - 26.6) / (31 - 26) = 0.88, acute (narins1980); HCO3 26.6 is within
    # 2 of the 28.5 expected on a baseline of 50 (24 + 3.5 x 1 + 1 x 1, berend2014): no metabolic disorder
    f_h = (24 + 3.5 * 2 - 26.6) / (3.5 * 2 - 1 * 2)
    assert f_h >= 0.8
    inputs = {
        "ph": ph_of(26.6, 60),
        "pco2": q(60, "mmHg"),
        "hco3": q(26.6, "mmol/L"),
        "baseline_pco2": q(baseline, "mmHg"),
    }
    assert order(bg(inputs)) == ["respiratory_acidosis"]
    assert fires_on_both_paths(inputs, "baseline_and_hco3_disagree") == (disagree, disagree)


def test_the_batch_names_a_lone_primary_respiratory_acidosis():
    # PaCO2 60, HCO3 31 = the chronic 24 + 3.5 x 2 (narins1980): a respiratory acidosis alone
    table = f"ph,pco2[mmHg],hco3[mmol/L]\n{ph_of(31, 60)},60,31\n"
    audit = batch.interpret_table(batch.read_table(table))
    assert audit.value("disorders", 0) == "respiratory_acidosis"


def test_display_decimals_of_the_base_excess_difference():
    # common practice: a concentration in mmol/L to 1 decimal (docs/bridge.md, display)
    r = bg({"ph": 7.40, "pco2": q(24.5, "mmHg"), "hco3": q(15, "mmol/L"), "base_excess": q(-11.8, "mmol/L")})
    assert r["display"]["base_excess_difference"] == 1
