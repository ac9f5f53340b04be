"""blood_gas: the thresholds, accepted ranges, display decimals and wording the other tests left unpinned.

Written for the survivors of a full mutation run over the blood_gas package (docs/testing.md). Each expected
value comes from outside the package: the published rule or formula written here with its ``references.py``
key, marked *common practice* where that is what it is, or the contract's documented behaviour
(docs/bridge.md). The accepted ranges are the project's own plausibility limits, copied by hand from the
field table's documentation (docs/glossary/acidbase.md), not published values: a change of a limit must then
be a decision, not an accident.

Some rules are checked on both paths of :func:`blood_gas.decide`: the scalar one behind the report and the
array one behind the batch audit and the uncertainty calculation (numpy arrays of one sample).
"""

from __future__ import annotations

import json
import math
from types import SimpleNamespace

import numpy as np
import pytest

from casebook import q
from tidewell.bridge import handle, handle_obj
from tidewell.calculations import blood_gas
from tidewell.calculations.blood_gas import reading
from tidewell.fields import Inputs
from tidewell.frontends import batch

KPA = 1000.0 / 133.322387415  # mmHg per kPa (references.py bipm2019)


def bg(inputs: dict, unit: str = "mmHg") -> dict:
    response = handle_obj({"calc": "blood_gas", "inputs": inputs, "options": {"pressure_unit": unit}})
    assert response["ok"], response.get("errors")
    return response


def refused(inputs: dict) -> list[tuple[str, str]]:
    response = handle_obj({"calc": "blood_gas", "inputs": inputs})
    assert not response["ok"]
    return [(e["field"], e["code"]) for e in response["errors"]]


def codes(response: dict) -> set[str]:
    return {f["code"] for f in response["findings"]}


def finding_text(response: dict, code: str) -> str:
    return next(f["text"] for f in response["findings"] if f["code"] == code)


def ph_of(hco3: float, pco2: float) -> float:
    """Henderson-Hasselbalch, pK' 6.1, S 0.0307 (references.py henderson1908, nccls1994)."""
    return 6.1 + math.log10(hco3 / (0.0307 * pco2))


def hco3_of(ph: float, pco2: float) -> float:
    """Henderson-Hasselbalch solved for HCO3 (references.py henderson1908, nccls1994)."""
    return 0.0307 * pco2 * 10 ** (ph - 6.1)


def gas(ph: float, pco2: float, unit: str = "mmHg", **more) -> dict:
    """A consistent arterial triple: the HCO3 from Henderson-Hasselbalch (references.py henderson1908), the
    PCO2 in ``unit`` (1 kPa = 1000 / 133.322387415 mmHg); ``more``: other inputs as the request has them."""
    mmhg = pco2 * 1000 / 133.322387415 if unit == "kPa" else pco2
    return {"ph": ph, "pco2": q(pco2, unit), "hco3": q(hco3_of(ph, mmhg), "mmol/L"), **more}


def both_paths(inputs: dict):
    """blood_gas.decide for one request's sample: (the scalar Decision, the Decision of numpy arrays of one
    sample, element 0 of each array)."""
    values = reading._Sample(Inputs(inputs)).values()
    scalar = blood_gas.decide(values)
    arrays = SimpleNamespace(**{k: np.array([v]) for k, v in vars(values).items()})
    with np.errstate(all="ignore"):
        together = blood_gas.decide(arrays)
    return scalar, together


def fires_on_both_paths(inputs: dict, code: str) -> tuple[bool, bool]:
    scalar, together = both_paths(inputs)
    return bool(scalar.finding[code]), bool(np.asarray(together.finding[code]).reshape(-1)[0])


# -- display decimals (docs/bridge.md, display: a clinical choice made in the core) ------------------------
#
# common practice: a pH and a fraction (fraction acute, delta ratio) to 2 decimals, a concentration in
# mmol/L or mEq/L to 1, the P/F ratio in mmHg whole (docs/cli.md: "no decimals in mmHg").


def test_display_decimals_of_a_respiratory_acidosis_with_a_known_baseline():
    r = bg({"ph": 7.30, "pco2": q(65, "mmHg"), "hco3": q(31, "mmol/L"), "baseline_pco2": q(50, "mmHg")})
    display = r["display"]
    assert display["expected_ph"] == 2
    assert display["fraction_acute_baseline"] == 2


def test_display_decimals_of_a_concurrent_respiratory_acidosis_with_a_known_baseline():
    # metabolic acidosis, HCO3 12: Winters 1.5 x 12 + 8 = 26 +/- 2 (albert1967); PaCO2 50 is above it
    r = bg(
        {"ph": ph_of(12, 50), "pco2": q(50, "mmHg"), "hco3": q(12, "mmol/L"), "baseline_pco2": q(45, "mmHg")}
    )
    assert r["outputs"]["disorders"][1]["code"] == "respiratory_acidosis"
    assert r["display"]["fraction_acute_baseline"] == 2


def test_display_decimals_of_the_gaps_and_the_oxygenation():
    r = bg(
        gas(
            7.25,
            30,
            na=q(140, "mmol/L"),
            cl=q(100, "mmol/L"),
            lactate=q(5, "mmol/L"),
            po2=q(70, "mmHg"),
            fio2=0.4,
        )
    )
    display = r["display"]
    assert display["anion_gap"] == 1
    assert display["delta_ratio"] == 2
    assert display["delta_gap"] == 1
    assert display["lactate_effect"] == 1
    assert display["pf_ratio"] == 0


def test_display_decimals_of_the_stewart_partition_and_the_temperature_view():
    r = bg(
        gas(
            7.25,
            30,
            na=q(140, "mmol/L"),
            cl=q(100, "mmol/L"),
            albumin=q(3.0, "g/dL"),
            lactate=q(5, "mmol/L"),
            temperature=q(33, "degC"),
        )
    )
    display = r["display"]
    assert display["base_excess_partition"] == 1
    assert display["base_excess_partition_2004"] == 1
    assert display["ph_at_temperature"] == 2


# -- accepted ranges (the project's plausibility limits, docs/glossary/acidbase.md; not published values) ---

BASE = {"ph": 7.40, "pco2": q(40, "mmHg"), "hco3": q(24, "mmol/L")}


def reader(unit: str | None = None, **base):
    """A reader of one blood_gas sample for ``assert_accepted_range``: the value is sent bare, or as a
    quantity in ``unit``; a refusal of the value (``out_of_range``, or ``implausible`` when another unit would
    fit: both refuse it, docs/glossary/acidbase.md) comes back as an ``InputError`` ``out_of_range`` naming
    the input key. Any other error is raised as it is."""
    from tidewell.errors import InputError, InputErrors

    def read(**values):
        inputs = {k: v for k, v in {**BASE, **base}.items() if v is not None}  # None: left out
        for key, value in values.items():
            inputs[key] = value if unit is None else q(value, unit)
        try:
            reading._Sample(Inputs(inputs))
        except InputErrors as errors:
            first = errors.errors[0]
            if first.code in ("out_of_range", "implausible") and first.field.startswith("inputs."):
                key = first.field.removeprefix("inputs.")
                raise InputError(key, first.value, str(first), code="out_of_range") from None
            raise

    return read


@pytest.mark.parametrize(
    ("field", "unit", "low", "high", "base"),
    [
        ("ph", None, 6.5, 8.0, {"pco2": q(20, "mmHg"), "hco3": None}),
        ("pco2", "mmHg", 8.0, 250.0, {"ph": 6.9, "hco3": None}),
        ("hco3", "mmol/L", 1.0, 70.0, {}),
        ("po2", "mmHg", 15.0, 800.0, {}),
        ("fio2", None, 0.21, 1.0, {}),
        ("base_excess", "mmol/L", -40.0, 40.0, {}),
        ("na", "mmol/L", 100.0, 190.0, {}),
        ("k", "mmol/L", 1.0, 10.0, {}),
        ("cl", "mmol/L", 60.0, 150.0, {}),
        ("albumin", "g/dL", 0.5, 6.0, {}),
        ("lactate", "mmol/L", 0.0, 50.0, {}),
        ("glucose", "mmol/L", 0.0, 150.0, {}),
        ("urea", "mmol/L", 0.0, 100.0, {}),
        ("bun", "mmol/L", 0.0, 100.0, {}),
        ("phosphate", "mmol/L", 0.1, 5.0, {}),
        ("measured_osmolality", "mOsm/kg", 200.0, 450.0, {}),
        ("hb", "g/dL", 3.0, 25.0, {}),
        ("spo2", None, 30.0, 100.0, {}),
        ("age", None, 0.0, 120.0, {}),
        ("temperature", "degC", 15.0, 43.0, {}),
        ("altitude", "m", -500.0, 9000.0, {}),
        ("pb", "mmHg", 150.0, 1100.0, {}),
        ("baseline_pco2", "mmHg", 20.0, 150.0, {}),
        # the optional Stewart and alveolar-gas inputs (docs/glossary/acidbase.md, optional inputs)
        ("ca_ionised", "mmol/L", 0.3, 3.0, {}),
        ("mg", "mmol/L", 0.1, 5.0, {}),
        ("normal_albumin", "g/dL", 3.0, 5.5, {}),
        ("rq", None, 0.6, 1.2, {}),
    ],
)
def test_accepted_range_of_each_blood_gas_input(field, unit, low, high, base):
    from conftest import assert_accepted_range

    assert_accepted_range(reader(unit, **base), field, low, high)


# -- decisions on both paths, wording of the report -------------------------------------------------------


def paths(inputs: dict):
    """(disorders, findings) of blood_gas.decide's scalar answer and of its answer on numpy arrays of one
    sample (element 0 of each array), through the package's own scalar views."""
    scalar, together = both_paths(inputs)

    def first(value):
        if isinstance(value, dict):
            return {k: first(v) for k, v in value.items()}
        if isinstance(value, tuple):
            return (
                type(value)(*(first(v) for v in value))
                if hasattr(value, "_fields")
                else tuple(map(first, value))
            )
        return np.asarray(value).reshape(-1)[0].item() if isinstance(value, np.ndarray) else value

    row = blood_gas.Decision(**{k: first(v) for k, v in vars(together).items()})
    return [
        ([(d["code"], d["role"]) for d in blood_gas.disorders(d)], set(blood_gas.findings(d)))
        for d in (scalar, row)
    ]


def test_tentative_alkalaemia_named_from_the_larger_contribution():
    # pH 7.46 with PCO2 36 and HCO3 inside 22-26: both lean alkalotic (PCO2 below 40, HCO3 above 24); the
    # larger contribution |log10(PCO2/40)| against |log10(24/HCO3)| names the primary
    # (acid_base_normal_ranges, common practice)
    h = hco3_of(7.46, 36)
    assert 24 < h < 26
    assert abs(math.log10(36 / 40)) > abs(math.log10(24 / h))
    for disorders, found in paths({"ph": 7.46, "pco2": q(36, "mmHg"), "hco3": q(h, "mmol/L")}):
        assert disorders[0] == ("respiratory_alkalosis", "primary")
        assert "borderline_values" in found


def test_acute_respiratory_acidosis_is_not_judged_against_a_metabolic_compensation():
    # AB-03: pH 7.25, PaCO2 60, HCO3 26: acute respiratory acidosis (narins1980); the PaCO2 compensation
    # bands of a metabolic primary do not apply
    for disorders, found in paths({"ph": 7.25, "pco2": q(60, "mmHg"), "hco3": q(26, "mmol/L")}):
        assert disorders == [("respiratory_acidosis", "primary")]
        assert not found & {"concurrent_respiratory_acidosis", "compensation_as_expected"}


def test_metabolic_acidosis_within_winters_band_on_both_paths():
    # AB-01: pH 7.28, PaCO2 26, HCO3 12: Winters 1.5 x 12 + 8 = 26 +/- 2 (albert1967), so compensated; 26 is
    # below the metabolic alkalosis band (40 + 0.7 x (12 - 24) - 5 = 26.6), which must not be used
    for disorders, found in paths({"ph": 7.28, "pco2": q(26, "mmHg"), "hco3": q(12, "mmol/L")}):
        assert disorders == [("metabolic_acidosis", "primary")]
        assert "compensation_as_expected" in found
        assert "concurrent_respiratory_alkalosis" not in found


@pytest.mark.parametrize(("pco2", "drift"), [(70.0, False), (70.1, True)])
def test_ph_rule_drift_above_a_rise_of_30_mmhg(pco2, drift):
    # the linear pH rules drift above a rise of about 30 mmHg (berend2014): the finding from PaCO2 > 70
    h = 24 + 1.0 * (pco2 - 40) / 10  # acute (narins1980)
    r = bg({"ph": ph_of(h, pco2), "pco2": q(pco2, "mmHg"), "hco3": q(h, "mmol/L")})
    assert ("ph_rule_drift" in codes(r)) is drift
    # the HCO3 rules read acute, the pH rules otherwise: the text says the pH rules drift only above 30 mmHg
    assert ("drift" in finding_text(r, "chronicity_rules_disagree")) is drift


@pytest.mark.parametrize(
    ("aa", "category"), [(8.4, "normal"), (8.6, "needs_age"), (28.9, "needs_age"), (29.1, "raised")]
)
def test_a_a_gradient_without_age_between_the_limits_at_18_and_100_years(aa, category):
    # without an age the A-a gradient reads normal up to the limit at 18 years, 18/4 + 4 = 8.5 mmHg, and
    # raised above the limit at 100 years, 100/4 + 4 = 29 mmHg, at any age (aa_gradient_age, common
    # practice); PAO2 = 0.21 x (760 - 47) - 60 / 0.8 (alveolar gas equation)
    pao2_a = 0.21 * (760 - 47) - 60 / 0.8
    r = bg(
        {"ph": ph_of(26, 60), "pco2": q(60, "mmHg"), "hco3": q(26, "mmol/L"), "po2": q(pao2_a - aa, "mmHg")}
    )
    assert r["outputs"]["a_a_category"] == category


def test_an_alveolar_po2_of_exactly_zero_is_shown():
    # PAO2 = FiO2 x (PB - 47) - PaCO2 / R (alveolar gas equation) = 0.25 x 400 - 100 / 1 = 0: shown; only a
    # negative alveolar PO2 is left out (docs/glossary/acidbase.md)
    r = bg(
        {
            "ph": ph_of(30, 100),
            "pco2": q(100, "mmHg"),
            "hco3": q(30, "mmol/L"),
            "po2": q(20, "mmHg"),
            "fio2": 0.25,
            "pb": q(447, "mmHg"),
            "rq": 1.0,
        }
    )
    assert r["outputs"]["pao2_alveolar"]["value"] == pytest.approx(0.0, abs=1e-9)


def test_oxygen_probably_given_names_an_alveolar_po2_of_zero_not_a_negative_one():
    # no FiO2 recorded, PaCO2 130: on air PAO2 = 0.21 x 713 - 130 / 0.8 = -12.8 mmHg (alveolar gas
    # equation); a partial pressure is not negative, so the text names 0
    r = bg(gas(7.10, 130, po2=q(70, "mmHg")))
    assert "(0 mmHg)" in finding_text(r, "oxygen_probably_given")


# -- more -------------------------------------------------------------------------------------------------


def test_compensation_as_expected_never_read_on_a_respiratory_primary():
    # PaCO2 34.9 with HCO3 22.5: a chronic respiratory alkalosis at a normal pH; the metabolic alkalosis band
    # 40 + 0.7 x (HCO3 - 24) +/- 5 (berend2014) holds this PaCO2 but belongs to a metabolic primary only
    h = 22.5
    for disorders, found in paths({"ph": ph_of(h, 34.9), "pco2": q(34.9, "mmHg"), "hco3": q(h, "mmol/L")}):
        assert disorders[0] == ("respiratory_alkalosis", "primary")
        assert "compensation_as_expected" not in found


def test_metabolic_alkalosis_is_the_primary_before_a_concurrent_respiratory_acidosis():
    # HCO3 36 with PaCO2 55: above 40 + 0.7 x 12 + 5 = 53.4 mmHg (berend2014): a metabolic alkalosis with a
    # concurrent respiratory acidosis; at pH 7.43 (above 7.40) the alkalotic process is primary (common
    # practice)
    assert ph_of(36, 55) > 7.40
    inputs = {"ph": ph_of(36, 55), "pco2": q(55, "mmHg"), "hco3": q(36, "mmol/L")}
    for disorders, _ in paths(inputs):
        assert disorders == [("metabolic_alkalosis", "primary"), ("respiratory_acidosis", "concurrent")]
    # the batch audit names them in the same order, the primary first
    table = f"ph,pco2[mmHg],hco3[mmol/L]\n{ph_of(36, 55)},55,36\n{ph_of(36, 47)},47,36\n"
    audit = batch.interpret_table(batch.read_table(table))
    assert audit.value("disorders", 0) == "metabolic_alkalosis respiratory_acidosis"
    assert audit.value("disorders", 1) == "metabolic_alkalosis"


def test_base_excess_differs_on_either_side():
    # pH 7.40, PaCO2 40, HCO3 24: the SBE is about 0 (CLSI, nccls1994); a reported base excess far below or
    # far above is named, one within 1 mmol/L is not
    base = {"ph": 7.40, "pco2": q(40, "mmHg"), "hco3": q(24, "mmol/L")}
    for be, differs in ((-10.0, True), (10.0, True), (-1.0, False), (1.0, False)):
        for _, found in paths({**base, "base_excess": q(be, "mmol/L")}):
            assert ("base_excess_differs" in found) is differs, be


@pytest.mark.parametrize(
    ("ph", "pco2", "ph_status", "pco2_status"),
    [
        (7.50, 30.0, "alkalaemia", "hypocapnia"),
        (7.30, 50.0, "acidaemia", "hypercapnia"),
        (7.40, 40.0, "normal", "normal"),
    ],
)
def test_ph_and_pco2_status_on_both_paths(ph, pco2, ph_status, pco2_status):
    # pH 7.35-7.45, PCO2 35-45 mmHg (acid_base_normal_ranges)
    scalar, together = both_paths(gas(ph, pco2))
    for d in (scalar, together):
        assert np.asarray(d.ph_status).reshape(-1)[0] == ph_status
        assert np.asarray(d.pco2_status).reshape(-1)[0] == pco2_status


def test_a_venous_sample_is_not_a_capillary_one():
    inputs = gas(7.35, 50, po2=q(40, "mmHg"))
    for _, found in paths({**inputs, "sample": "venous"}):
        assert "venous_sample" in found
        assert not found & {"capillary_po2", "capillary_sample"}
    for _, found in paths({**inputs, "sample": "capillary"}):
        assert {"capillary_po2", "capillary_sample"} <= found


def test_mixed_high_and_normal_gap_acidosis_beside_a_respiratory_acidosis():
    # PaCO2 80, HCO3 14, Na 140, Cl 110: AG 16; the HCO3 before the gap, 14 + (16 - 12) = 18 (wrenn1990), is
    # still below the acute expectation 24 + (80 - 40)/10 = 28 less 2 (narins1980): a normal-gap part as well
    inputs = {
        "ph": ph_of(14, 80),
        "pco2": q(80, "mmHg"),
        "hco3": q(14, "mmol/L"),
        "na": q(140, "mmol/L"),
        "cl": q(110, "mmol/L"),
    }
    assert bg(inputs)["outputs"]["metabolic_acidosis_type"] == "high_and_normal_anion_gap"


def test_the_copenhagen_paco2_rule_belongs_to_a_metabolic_primary():
    # metabolic acidosis: PaCO2 = 40 + SBE; metabolic alkalosis: 40 + 0.6 x SBE, +/- 5 (schlichtig1998)
    acid = finding_text(bg(gas(7.25, 26)), "approaches_agree")
    assert "40 + SBE" in acid and "0.6 x SBE" not in acid
    alk = bg({"ph": 7.50, "pco2": q(47, "mmHg"), "hco3": q(36, "mmol/L")})
    sbe = alk["outputs"]["standard_base_excess"]["value"]
    assert abs(47 - (40 + 0.6 * sbe)) <= 5.0
    assert "PaCO2 fits 40 + 0.6 x SBE" in finding_text(alk, "approaches_agree")
    # a respiratory primary gets no such PaCO2 rule (AB-03, acute respiratory acidosis)
    resp = finding_text(bg({"ph": 7.25, "pco2": q(60, "mmHg"), "hco3": q(26, "mmol/L")}), "approaches_agree")
    assert "fit" not in resp


STEWART = {"na": q(140, "mmol/L"), "albumin": q(4.2, "g/dL"), "lactate": q(1, "mmol/L")}


def test_the_three_readings_agree_on_a_hyperchloraemic_acidosis():
    # Na - Cl - 35 = -7 mEq/L (story2016): an acidifying effect of 5 or more, with the HCO3 and SBE readings
    r = bg(
        {
            "ph": 7.25,
            "pco2": q(26, "mmHg"),
            "hco3": q(hco3_of(7.25, 26), "mmol/L"),
            "cl": q(112, "mmol/L"),
            **STEWART,
        }
    )
    assert "approaches_agree" in codes(r)


@pytest.mark.parametrize(
    ("ph", "pco2", "cl", "albumin", "offset"),
    [
        # HCO3 reading: a metabolic acidosis; Stewart (story2016) names no effect of 5 mEq/L or more: its
        # reading says "none of them large", and nothing offsets anything
        (7.33, 37, 106, 4.2, False),
        # a normal HCO3 and SBE hiding two opposing Stewart effects: albumin 1.5 g/dL alkalinises by
        # 0.25 x (42 - 15) = +6.75 mEq/L, so the unmeasured anions are SBE - (0 + 6.75 - 1), about -6
        (7.40, 40, 105, 1.5, True),
    ],
)
def test_a_stewart_reading_that_differs_says_effects_offset_only_when_it_names_them(
    ph, pco2, cl, albumin, offset
):
    inputs = gas(ph, pco2, cl=q(cl, "mmol/L"))
    text = finding_text(bg({**inputs, **STEWART, "albumin": q(albumin, "g/dL")}), "approaches_disagree")
    assert ("none of them large" in text) is not offset
    assert ("albumin +6.8" in text) is offset
    sentence = "Stewart splits the net change into separate effects, some of which offset each other."
    assert (sentence in text) is offset


@pytest.mark.parametrize(("cl", "alkalinising"), [(98.0, True), (101.0, False)])
def test_a_na_cl_effect_of_5_or_more_is_alkalinising(cl, alkalinising):
    # Na - Cl - 35 (story2016): +7 and +4 mEq/L against the 5 mEq/L size of a process
    r = bg(
        {
            "ph": 7.25,
            "pco2": q(26, "mmHg"),
            "hco3": q(hco3_of(7.25, 26), "mmol/L"),
            "cl": q(cl, "mmol/L"),
            **STEWART,
        }
    )
    text = finding_text(r, "approaches_agree" if "approaches_agree" in codes(r) else "approaches_disagree")
    assert ("hypochloraemic (Na-Cl) alkalinising effect" in text) is alkalinising


def test_the_osmolality_formula_says_when_urea_came_from_bun():
    base = {**BASE, "na": q(140, "mmol/L"), "glucose": q(5, "mmol/L")}
    for key, said in (("bun", True), ("urea", False)):
        r = bg({**base, key: q(5, "mmol/L")})
        step = next(s for s in r["steps"] if s.get("output") == "osmolality_calculated")
        assert ("(urea from BUN)" in step["formula"]) is said
        assert r["display"]["osmolality_calculated"] == 0  # mOsm/kg whole (common practice)
    r = bg({**base, "urea": q(5, "mmol/L"), "measured_osmolality": q(300, "mOsm/kg")})
    assert r["display"]["osmolar_gap"] == 0


def test_the_stewart_partition_says_when_lactate_was_not_given():
    base = {**BASE, "na": q(140, "mmol/L"), "cl": q(104, "mmol/L"), "albumin": q(4.2, "g/dL")}
    labels = [s["label"] for s in bg(base)["steps"]]
    assert any("lactate not given: counted as 0" in label for label in labels)
    labels = [s["label"] for s in bg({**base, "lactate": q(1, "mmol/L")})["steps"]]
    assert not any("lactate not given" in label for label in labels)


def test_stewart_defaults_are_the_documented_typical_values():
    # absent ionised calcium, magnesium and phosphate are taken as 1.2, 0.9 and 1.0 mmol/L
    # (docs/glossary/acidbase.md)
    base = {
        **BASE,
        "na": q(140, "mmol/L"),
        "cl": q(104, "mmol/L"),
        "k": q(4, "mmol/L"),
        "albumin": q(4.2, "g/dL"),
    }
    given = {"ca_ionised": q(1.2, "mmol/L"), "mg": q(0.9, "mmol/L"), "phosphate": q(1.0, "mmol/L")}
    assumed = bg(base)["outputs"]
    for key, value in given.items():
        told = bg({**base, key: value})["outputs"]
        for name in ("sid_apparent", "strong_ion_gap"):
            assert told[name]["value"] == pytest.approx(assumed[name]["value"], abs=1e-9), (key, name)


def test_display_decimals_of_the_gap_with_potassium_and_the_kassirer_h():
    r = bg({**BASE, "na": q(140, "mmol/L"), "cl": q(104, "mmol/L"), "k": q(4, "mmol/L")})
    assert r["display"]["anion_gap_with_k"] == 1
    assert r["display"]["h_nmol_l_kassirer"] == 1  # nmol/L to 1 decimal (common practice)


def test_the_reading_in_words():
    normal = bg(BASE)["outputs"]["interpretation"]
    assert normal.startswith("No acid-base disorder")
    # two disorders: the primary first (metabolic acidosis, Winters 1.5 x 12 + 8 +/- 2 exceeded: albert1967)
    double = bg({"ph": ph_of(12, 50), "pco2": q(50, "mmHg"), "hco3": q(12, "mmol/L")})["outputs"][
        "interpretation"
    ]
    assert double.startswith("Metabolic acidosis with a concurrent")
    assert double.count("respiratory acidosis") == 1
    # AB-07: three disorders, each named once
    triple = bg(
        {
            "ph": 7.53,
            "pco2": q(24, "mmHg"),
            "hco3": q(20, "mmol/L"),
            "na": q(140, "mmol/L"),
            "cl": q(88, "mmol/L"),
        }
    )
    text = triple["outputs"]["interpretation"]
    assert text.startswith("Triple disorder: respiratory alkalosis with ")
    assert text.count("respiratory alkalosis") == 1


def test_compensated_as_expected_only_for_a_chronic_respiratory_acidosis_or_at_a_normal_ph():
    # chronic respiratory alkalosis: 24 - 4 x (40 - PaCO2)/10 (narins1980; berend2014)
    alkalaemic = bg({"ph": ph_of(18, 25), "pco2": q(25, "mmHg"), "hco3": q(18, "mmol/L")})["outputs"]
    assert alkalaemic["ph_status"] == "alkalaemia"
    assert "compensated as expected" not in alkalaemic["interpretation"]
    normal = bg({"ph": ph_of(20, 30), "pco2": q(30, "mmHg"), "hco3": q(20, "mmol/L")})["outputs"]
    assert normal["interpretation"].endswith(", compensated as expected.")
    # an acute respiratory acidosis (AB-03) is not called compensated
    assert (
        "compensat"
        not in bg({"ph": 7.25, "pco2": q(60, "mmHg"), "hco3": q(26, "mmol/L")})["outputs"]["interpretation"]
    )


def test_chronic_respiratory_alkalosis_at_a_normal_ph_is_not_a_single_disorder_at_normal_ph():
    inputs = {"ph": ph_of(20, 30), "pco2": q(30, "mmHg"), "hco3": q(20, "mmol/L")}
    for disorders, found in paths(inputs):
        assert disorders == [("respiratory_alkalosis", "primary")]
        assert "normal_ph_single_disorder" not in found


def test_the_summary_names_the_fraction_acute_of_the_primary_respiratory_disorder():
    # PaCO2 70 on a usual 55: fraction acute (70 - 55) / (70 - 40) = 0.5 (fraction_acute_bands), beside a
    # lactate of 5 that names a concurrent metabolic acidosis
    r = bg(gas(7.25, 70, baseline_pco2=q(55, "mmHg"), lactate=q(5, "mmol/L")))
    assert [d["code"] for d in r["outputs"]["disorders"]] == ["respiratory_acidosis", "metabolic_acidosis"]
    assert any("about 50 % of the change looks acute" in s for s in r["summary"])


def test_the_summary_says_when_the_anion_gap_is_albumin_corrected():
    base = gas(7.25, 26, na=q(140, "mmol/L"), cl=q(100, "mmol/L"))
    plain = next(s for s in bg(base)["summary"] if s.startswith("Anion gap"))
    corrected = next(
        s for s in bg({**base, "albumin": q(3.0, "g/dL")})["summary"] if s.startswith("Anion gap")
    )
    assert "albumin-corrected" not in plain
    assert "(albumin-corrected)" in corrected


def test_urgent_findings_are_in_the_summary_and_the_niv_caution_only_when_met():
    r = bg(gas(7.10, 30))
    severe = finding_text(r, "severe_acidaemia")
    assert any(severe in s for s in r["summary"])
    assert r["outputs"]["niv_criteria"] != "met"
    assert not any("NIV thresholds" in c for c in r["cautions"])
    met = bg({"ph": 7.25, "pco2": q(60, "mmHg"), "hco3": q(26, "mmol/L")})
    assert met["outputs"]["niv_criteria"] == "met"
    assert any("NIV thresholds" in c for c in met["cautions"])


def test_a_barometric_pressure_above_800_mmhg_sent_as_json_is_named_as_a_unit_slip():
    # the request as the shell sends it: JSON text (its unit words are not the module's own string objects)
    for pb, named in ((800.0, False), (800.5, True), (1000.0, True)):
        request = {"calc": "blood_gas", "inputs": {**BASE, "pb": q(pb, "mmHg")}}
        response = json.loads(handle(json.dumps(request)))
        assert response["ok"]
        assert ("possible_unit_mix_up" in codes(response)) is named, pb


@pytest.mark.parametrize(("key", "limit"), [("glucose", 100.0), ("urea", 80.0), ("lactate", 30.0)])
def test_unusual_concentrations_above_their_limit_are_named(key, limit):
    # the project's own limits for a value to check (docs/glossary/acidbase.md): at the limit not named
    at = bg({**BASE, key: q(limit, "mmol/L")})
    above = bg({**BASE, key: q(limit + 0.5, "mmol/L")})
    assert "value_unusual" not in codes(at)
    assert "value_unusual" in codes(above)


def test_no_alveolar_oxygen_refused_for_an_arterial_sample_only():
    # at FiO2 0.21, PaCO2 130: PAO2 = 0.21 x (760 - 47) - 130 / 0.8 < 0 (alveolar gas equation): an arterial
    # PO2 is then impossible on that FiO2; a venous PCO2 is not alveolar, so a venous sample is not refused
    inputs = gas(7.10, 130, po2=q(40, "mmHg"), fio2=0.21)
    assert 0.21 * (760 - 47) - 130 / 0.8 < 0
    assert ("inputs.fio2", "inconsistent") in refused(inputs)
    bg({**inputs, "sample": "venous"})


def test_a_ph_sent_without_its_decimal_point_offers_the_ph():
    # 7400 for 7.40 (a factor 1000) and 80 for 8.0 (a factor 10, 8.0 the upper end of the accepted range)
    for sent, meant in ((7400, 7.4), (80, 8.0)):
        response = handle_obj({"calc": "blood_gas", "inputs": {**BASE, "ph": sent}})
        error = next(e for e in response["errors"] if e["field"] == "inputs.ph")
        assert error["code"] == "implausible"
        assert error["suggest"]["value"] == pytest.approx(meant)


def test_gas_exchange_impaired_on_both_paths():
    # PaCO2 60 (above 6.0 kPa), age 30: the A-a gradient limit 30/4 + 4 = 11.5 mmHg (common practice); an A-a
    # of 30 is raised: hypercapnia with lung disease as well
    pao2_a = 0.21 * (760 - 47) - 60 / 0.8
    inputs = {
        "ph": 7.25,
        "pco2": q(60, "mmHg"),
        "hco3": q(26, "mmol/L"),
        "po2": q(pao2_a - 30, "mmHg"),
        "age": 30,
    }
    for _, found in paths(inputs):
        assert "gas_exchange_impaired" in found
        assert "pure_hypoventilation" not in found


@pytest.mark.parametrize(("pco2", "below"), [(45.0, False), (44.9, True)])
def test_pco2_below_baseline_more_than_5_mmhg(pco2, below):
    # a known usual PaCO2 of 50: a PaCO2 more than 5 mmHg below it, not acidaemic, reads as over-correction
    # (posthypercapnic_alkalosis, common practice)
    h = 26.0
    ph = ph_of(h, pco2)
    assert ph >= 7.35
    inputs = {"ph": ph, "pco2": q(pco2, "mmHg"), "hco3": q(h, "mmol/L"), "baseline_pco2": q(50, "mmHg")}
    for _, found in paths(inputs):
        assert ("pco2_below_baseline" in found) is below


def test_post_hypercapnic_alkalosis_named_only_when_alkalaemic():
    # usual PaCO2 60, now 50 with HCO3 30: pH 7.39, not alkalaemic: over-correction only possible; now 45 with
    # HCO3 34: pH 7.49 (above 7.45) with HCO3 above 26: fits a post-hypercapnic metabolic alkalosis
    # (posthypercapnic_alkalosis)
    base = {"baseline_pco2": q(60, "mmHg")}
    normal = bg({**base, "ph": ph_of(30, 50), "pco2": q(50, "mmHg"), "hco3": q(30, "mmol/L")})
    assert "over-correction of chronic hypercapnia is possible" in finding_text(normal, "pco2_below_baseline")
    high = bg({**base, "ph": ph_of(34, 45), "pco2": q(45, "mmHg"), "hco3": q(34, "mmol/L")})
    assert "fits a post-hypercapnic metabolic alkalosis" in finding_text(high, "pco2_below_baseline")


@pytest.mark.parametrize(("low", "at_risk"), [(94.0, False), (93.0, True)])
def test_a_prescribed_range_below_94_percent_marks_the_patient_at_risk(low, at_risk):
    # 94-98 % is the usual target, a lower prescribed range is the at-risk one (bts2017): an SpO2 above the
    # range matters (notable) only for a patient at risk
    inputs = {**BASE, "spo2_target_prescribed": {"low": low, "high": 97.0}, "spo2": 99}
    r = bg(inputs)
    severity = next(f["severity"] for f in r["findings"] if f["code"] == "spo2_above_target")
    assert severity == ("notable" if at_risk else "info")


def test_the_paco2_for_ph_7_35_is_shown_when_acidaemic():
    # P(7.35) = PaCO2 x 10^(pH - 7.35) (henderson1908, pco2_aim)
    acid = bg(gas(7.30, 60, hypercapnia_risk=True))
    assert acid["outputs"]["pco2_for_ph_7_35"]["value"] == pytest.approx(60 * 10 ** (7.30 - 7.35), rel=1e-6)
    assert "ventilation must bring the PaCO2 down" in finding_text(acid, "pco2_target")
    normal = bg(gas(7.38, 60, hypercapnia_risk=True))
    assert "pco2_for_ph_7_35" not in normal["outputs"]
    assert "ventilation must bring the PaCO2 down" not in finding_text(normal, "pco2_target")


def test_the_aim_text_names_a_known_usual_paco2_only_when_given():
    inputs = gas(7.38, 60, hypercapnia_risk=True)
    known = bg({**inputs, "baseline_pco2": q(58, "mmHg")})
    assert "the patient's known usual PaCO2: the pH is 7.38" in finding_text(known, "pco2_target")
    assert "the patient's known usual PaCO2: the pH" not in finding_text(bg(inputs), "pco2_target")


@pytest.mark.parametrize(
    ("ph", "pco2", "t"),
    [(7.40, 40.0, 36.0), (7.30, 40.0, 37.5), (7.38, 46.0, 37.5), (7.25, 60.0, 38.0), (7.40, 44.0, 37.8)],
)
def test_the_ph_stat_view_reads_the_corrected_values_against_the_reference_ranges(ph, pco2, t):
    # pH 7.35-7.45 and PCO2 35-45 mmHg (acid_base_normal_ranges): both inside "near normal", one "partly
    # outside", neither "outside"
    r = bg(gas(ph, pco2, temperature=q(t, "degC")))
    ph_t = r["outputs"]["ph_at_temperature"]
    pco2_t = r["outputs"]["pco2_at_temperature"]["value"]
    inside = (7.35 <= ph_t <= 7.45, 35.0 <= pco2_t <= 45.0)
    words = {(True, True): "near normal", (False, False): "which are outside"}.get(inside, "partly outside")
    assert words in finding_text(r, "temperature_ph_stat_view")


def test_equal_contributions_name_the_respiratory_process():
    # PaCO2 48, HCO3 20: |log10(48/40)| = |log10(24/20)| (both log10 1.2): a tie names the respiratory process
    # (Tidewell convention; common practice leaves ties open; stated in the blood_gas package docs)
    inputs = {"ph": ph_of(20, 48), "pco2": q(48, "mmHg"), "hco3": q(20, "mmol/L")}
    for disorders, _ in paths(inputs):
        assert disorders[0] == ("respiratory_acidosis", "primary")


def test_tentative_acidaemia_named_from_the_larger_contribution():
    # pH 7.34 with PCO2 41 and HCO3 22.1, both inside their ranges: the HCO3 below 24 contributes more,
    # |log10(24/22.1)| > |log10(41/40)| (acid_base_normal_ranges, common practice)
    assert abs(math.log10(24 / 22.1)) > abs(math.log10(41 / 40))
    assert ph_of(22.1, 41) < 7.35
    for disorders, found in paths({"ph": ph_of(22.1, 41), "pco2": q(41, "mmHg"), "hco3": q(22.1, "mmol/L")}):
        assert disorders[0] == ("metabolic_acidosis", "primary")
        assert "borderline_values" in found


def test_tentative_alkalaemia_named_metabolic_when_the_hco3_contributes_more():
    # pH 7.45+ with PCO2 37.5 and HCO3 25.9, both inside their ranges: |log10(25.9/24)| > |log10(40/37.5)|
    # (acid_base_normal_ranges, common practice)
    assert abs(math.log10(25.9 / 24)) > abs(math.log10(40 / 37.5))
    assert ph_of(25.9, 37.5) > 7.45
    for disorders, found in paths(
        {"ph": ph_of(25.9, 37.5), "pco2": q(37.5, "mmHg"), "hco3": q(25.9, "mmol/L")}
    ):
        assert disorders[0] == ("metabolic_alkalosis", "primary")
        assert "borderline_values" in found


def test_ph_7_35_with_every_value_in_range_names_no_disorder():
    # pH 7.35 is inside 7.35-7.45 (acid_base_normal_ranges): PCO2 44 and HCO3 24.03 inside theirs
    h = hco3_of(7.35, 44)
    assert 24 < h < 26
    for disorders, found in paths({"ph": 7.35, "pco2": q(44, "mmHg"), "hco3": q(h, "mmol/L")}):
        assert disorders == []
        assert "borderline_values" not in found


@pytest.mark.parametrize(("hco3", "named"), [(24.0, False), (23.9, True)])
def test_concurrent_metabolic_acidosis_more_than_2_below_the_acute_expectation(hco3, named):
    # PaCO2 60: acute HCO3 24 + 1 x 20/10 = 26 (narins1980); a metabolic acidosis is named below 26 - 2
    # (the margin: max(2, 0.2 x (31 - 26)) = 2 mmol/L, Tidewell convention beside fraction_acute_bands)
    inputs = {"ph": ph_of(hco3, 60), "pco2": q(60, "mmHg"), "hco3": q(hco3, "mmol/L")}
    for disorders, _ in paths(inputs):
        assert (("metabolic_acidosis", "concurrent") in disorders) is named


def test_paco2_below_the_known_baseline_reads_fraction_acute_0():
    # f = (PaCO2 - baseline) / (PaCO2 - 40), limited to 0-1 (fraction_acute_bands): PaCO2 60 on a usual 65
    r = bg(
        {"ph": ph_of(31, 60), "pco2": q(60, "mmHg"), "hco3": q(31, "mmol/L"), "baseline_pco2": q(65, "mmHg")}
    )
    assert r["outputs"]["fraction_acute_baseline"] == 0.0


def test_baseline_and_hco3_that_agree_raise_no_finding():
    # PaCO2 60, HCO3 31 = 24 + 3.5 x 2 (chronic, narins1980), usual PaCO2 60: both read chronic
    r = bg(
        {"ph": ph_of(31, 60), "pco2": q(60, "mmHg"), "hco3": q(31, "mmol/L"), "baseline_pco2": q(60, "mmHg")}
    )
    assert r["outputs"]["disorders"][0]["chronicity"] == "chronic"
    assert "baseline_and_hco3_disagree" not in codes(r)
    # with a usual PaCO2 of 40 the baseline reads acute, the HCO3 chronic: named
    r = bg(
        {"ph": ph_of(31, 60), "pco2": q(60, "mmHg"), "hco3": q(31, "mmol/L"), "baseline_pco2": q(40, "mmHg")}
    )
    assert "baseline_and_hco3_disagree" in codes(r)


def test_a_metabolic_acidosis_with_a_normal_gap_leaves_the_chronicity_indeterminate():
    # PaCO2 70, pH 7.25, lactate 5 (4 or more beside acidaemic hypercapnia: a concurrent metabolic acidosis)
    # and an anion gap below 12 (oh1977): no gap to take back, so the chronicity is not judged
    h = hco3_of(7.25, 70)
    inputs = gas(7.25, 70, lactate=q(5, "mmol/L"), na=q(140, "mmol/L"), cl=q(100, "mmol/L"))
    assert 140 - 100 - h < 12
    r = bg(inputs)
    assert "chronicity_indeterminate" in codes(r)
    assert r["outputs"]["disorders"][0]["fraction_acute"] is None


@pytest.mark.parametrize(("hco3", "fraction"), [(20.5, 0.5), (24.0, 0.0)])
def test_fraction_acute_from_the_hco3_before_the_gap(hco3, fraction):
    # PaCO2 60, AG 20 (a high-AG acidosis, Gabow 1980): HCO3 before the gap = HCO3 + (AG - 12) (wrenn1990);
    # f = (31 - before) / (31 - 26) (acute 1, chronic 3.5 per 10 mmHg: narins1980), limited to 0-1
    cl = 140 - hco3 - 20
    before = hco3 + 8
    expected = min(max((31 - before) / 5, 0.0), 1.0)
    assert expected == pytest.approx(fraction)
    r = bg(
        {
            "ph": ph_of(hco3, 60),
            "pco2": q(60, "mmHg"),
            "hco3": q(hco3, "mmol/L"),
            "na": q(140, "mmol/L"),
            "cl": q(cl, "mmol/L"),
        }
    )
    primary = r["outputs"]["disorders"][0]
    assert primary["code"] == "respiratory_acidosis"
    assert primary["fraction_acute"] == pytest.approx(fraction, abs=1e-9)


def test_concurrent_respiratory_acidosis_fraction_from_the_baseline():
    # metabolic acidosis HCO3 12, PaCO2 50 above Winters' 26 +/- 2 (albert1967); usual PaCO2 45:
    # f = (50 - 45) / (50 - 40) = 0.5 (fraction_acute_bands)
    r = bg(
        {"ph": ph_of(12, 50), "pco2": q(50, "mmHg"), "hco3": q(12, "mmol/L"), "baseline_pco2": q(45, "mmHg")}
    )
    assert r["outputs"]["fraction_acute_baseline"] == pytest.approx(0.5)
    assert r["outputs"]["disorders"][1]["fraction_acute"] == pytest.approx(0.5)
    # PaCO2 38 (above Winters' 28, but not above 41): not read from the baseline, acute by convention
    r = bg(
        {"ph": ph_of(12, 38), "pco2": q(38, "mmHg"), "hco3": q(12, "mmol/L"), "baseline_pco2": q(35, "mmHg")}
    )
    assert r["outputs"]["disorders"][1]["code"] == "respiratory_acidosis"
    assert "respiratory_chronicity_assumed" in codes(r)


def test_the_batch_refuses_a_ph_outside_6_5_to_8_0():
    # the accepted pH range (docs/glossary/acidbase.md) on the batch audit's array reader
    audit = batch.interpret_table(batch.read_table("ph,pco2[mmHg]\n6.4999,20\n6.5,20\n8.0,20\n8.0001,20\n"))
    assert [bool(audit.errors[i]) for i in range(audit.n)] == [True, False, False, True]


def test_the_batch_names_the_disorders_primary_first():
    # metabolic acidosis HCO3 12 with PaCO2 50 above Winters' 26 +/- 2 (albert1967): a concurrent respiratory
    # acidosis, named after the primary
    table = f"ph,pco2[mmHg],hco3[mmol/L]\n{ph_of(12, 50)},50,12\n"
    audit = batch.interpret_table(batch.read_table(table))
    assert audit.value("disorders", 0) == "metabolic_acidosis respiratory_acidosis"


def test_a_triple_disorder_names_the_concurrent_respiratory_one_before_the_gap_acidosis():
    # HCO3 30, PaCO2 34: a metabolic alkalosis (|log10(30/24)| > |log10(40/34)|), PaCO2 below the expected
    # 40 + 0.7 x 6 - 5 = 39.2 (berend2014): a concurrent respiratory alkalosis; AG 140 - 88 - 30 = 22, 20+
    # names a high-AG acidosis (Gabow 1980, from memory), found last
    inputs = {
        "ph": ph_of(30, 34),
        "pco2": q(34, "mmHg"),
        "hco3": q(30, "mmol/L"),
        "na": q(140, "mmol/L"),
        "cl": q(88, "mmol/L"),
    }
    for disorders, _ in paths(inputs):
        assert [c for c, _ in disorders] == [
            "metabolic_alkalosis",
            "respiratory_alkalosis",
            "metabolic_acidosis",
        ]


def test_the_text_of_a_concurrent_metabolic_acidosis_names_its_reasons():
    # pH 7.25, PaCO2 70: lactate 5 (4 or more) with an anion gap below 16 (common practice)
    inputs = gas(7.25, 70, lactate=q(5, "mmol/L"), na=q(140, "mmol/L"), cl=q(100, "mmol/L"))
    r = bg(inputs)
    text = finding_text(r, "concurrent_metabolic_acidosis")
    assert "lactate 5.0 mmol/L (4 or more)" in text
    assert "anion gap" not in text
    assert "hco3_before_anion_gap" not in r["outputs"]  # no gap above 12 to take back (wrenn1990)


def test_the_ph_rule_drift_text_names_40():
    r = bg({"ph": ph_of(28, 80), "pco2": q(80, "mmHg"), "hco3": q(28, "mmol/L")})
    assert "above 40 mmHg the linear pH rules drift" in finding_text(r, "ph_rule_drift")


@pytest.mark.parametrize(
    ("pco2", "status"), [(35.0, "normal"), (34.9, "hypocapnia"), (45.0, "normal"), (45.1, "hypercapnia")]
)
def test_pco2_status_at_the_ends_of_35_to_45(pco2, status):
    # PCO2 35-45 mmHg inclusive (acid_base_normal_ranges)
    scalar, together = both_paths({"ph": 7.40, "pco2": q(pco2, "mmHg")})
    for d in (scalar, together):
        assert np.asarray(d.pco2_status).reshape(-1)[0] == status


def test_the_zander_base_excess_takes_so2_1_without_an_spo2():
    # Zander's form with SO2 1.0 when no SpO2 is given (lang2002; docs/glossary/acidbase.md)
    base = {"ph": 7.25, "pco2": q(60, "mmHg"), "hco3": q(26, "mmol/L"), "hb": q(15, "g/dL")}
    without = bg(base)
    told = bg({**base, "spo2": 100})
    assert without["outputs"]["sbe_variants"]["zander"]["value"] == pytest.approx(
        told["outputs"]["sbe_variants"]["zander"]["value"]
    )
    label = next(s["label"] for s in without["steps"] if s["label"].startswith("BE, Zander form"))
    assert "SO2 taken as 1.0 (no SpO2 given)" in label
    label = next(s["label"] for s in told["steps"] if s["label"].startswith("BE, Zander form"))
    assert "SO2 taken as 1.0" not in label


def test_display_decimals_of_the_base_excess_and_h():
    r = bg(
        {
            "ph": 7.25,
            "pco2": q(60, "mmHg"),
            "hco3": q(26, "mmol/L"),
            "hb": q(15, "g/dL"),
            "na": q(140, "mmol/L"),
            "cl": q(100, "mmol/L"),
            "albumin": q(3.0, "g/dL"),
        }
    )
    display = r["display"]
    # mmol/L and nmol/L to 1 decimal (common practice)
    assert display["h_nmol_l_measured"] == 1
    assert display["standard_base_excess"] == 1
    assert display["sbe_variants"] == 1
    assert display["expected_sbe"] == 1
    assert display["anion_gap_corrected"] == 1
    r = bg(gas(7.25, 26, na=q(140, "mmol/L"), cl=q(100, "mmol/L")))
    assert r["display"]["na_cl_effect"] == 1  # mEq/L to 1 decimal


@pytest.mark.parametrize(
    ("measured", "raised"), [(295.0, False), (299.9, False), (300.0, True), (305.0, True)]
)
def test_osmolar_gap_raised_from_10(measured, raised):
    # calculated 2 x 140 + 5 + 5 = 290 mOsm/kg; a gap of 10 or more is raised (ccjm_osmol)
    r = bg(
        {
            **BASE,
            "na": q(140, "mmol/L"),
            "glucose": q(5, "mmol/L"),
            "urea": q(5, "mmol/L"),
            "measured_osmolality": q(measured, "mOsm/kg"),
        }
    )
    assert ("osmolar_gap_raised" in codes(r)) is raised


def test_an_anion_gap_of_20_alone_names_the_primary_on_both_paths():
    # pH 7.40, PaCO2 40, HCO3 24, AG 140 - 91 - 24 = 25: 20 or more names a high-AG metabolic acidosis
    # whatever the HCO3 (Gabow 1980, from memory); with no other disorder it is the primary
    inputs = {**BASE, "na": q(140, "mmol/L"), "cl": q(91, "mmol/L")}
    for disorders, _ in paths(inputs):
        assert disorders[0] == ("metabolic_acidosis", "primary")


def test_the_readings_agree_on_a_compensated_metabolic_acidosis_on_both_paths():
    # AB-01 (pH 7.28, PaCO2 26, HCO3 12): Winters and 40 + SBE (schlichtig1998) both fit
    for _, found in paths({"ph": 7.28, "pco2": q(26, "mmHg"), "hco3": q(12, "mmol/L")}):
        assert "approaches_agree" in found
    for _, found in paths(BASE):
        assert "approaches_agree" in found


def test_stewart_without_an_alkalinising_effect_disagrees_with_a_metabolic_alkalosis():
    # SBE +12.8 split as Na-Cl +4.9, albumin +4.9 (0.25 x (42 - 22.4)), unmeasured +3.0 (story2016): no
    # single effect of 5 mEq/L, so Stewart names no alkalosis where the HCO3 reading does
    r = bg(
        {
            "ph": 7.50,
            "pco2": q(47, "mmHg"),
            "hco3": q(36, "mmol/L"),
            "na": q(140, "mmol/L"),
            "cl": q(100.1, "mmol/L"),
            "albumin": q(2.24, "g/dL"),
            "lactate": q(0, "mmol/L"),
        }
    )
    assert "approaches_disagree" in codes(r)


def test_the_stewart_terms_without_lactate_count_it_as_0():
    # SIDa = Na + K + 2 Ca + 2 Mg - Cl - lactate (kellum1995, figge1992), Ca 1.2 and Mg 0.9 assumed
    # (docs/glossary/acidbase.md), lactate not given counted as 0
    base = {
        **BASE,
        "na": q(140, "mmol/L"),
        "cl": q(104, "mmol/L"),
        "k": q(4, "mmol/L"),
        "albumin": q(4.2, "g/dL"),
    }
    out = bg(base)["outputs"]
    assert out["sid_apparent"]["value"] == pytest.approx(140 + 4 + 2 * 1.2 + 2 * 0.9 - 104)
    assert out["base_excess_partition"]["lactate"]["value"] == 0.0


def test_low_inspired_oxygen_only_with_a_normal_a_a_gradient():
    # PaCO2 35, age 30 (A-a limit 30/4 + 4 = 11.5, common practice)
    pao2_a = 0.21 * (760 - 47) - 35 / 0.8  # alveolar gas equation
    base = gas(7.42, 35, age=30)
    raised = bg({**base, "po2": q(50, "mmHg")})  # A-a 56: lung disease
    assert pao2_a - 50 > 11.5
    assert "low_inspired_oxygen" not in codes(raised)
    # at 5000 m (ISA, icao7488) a normal A-a gradient with a PaO2 below 60: low inspired oxygen
    high = bg({**base, "altitude": q(5000, "m"), "po2": q(28, "mmHg"), "fio2": 0.21})
    assert high["outputs"]["a_a_category"] == "normal"
    assert "low_inspired_oxygen" in codes(high)


def test_a_a_needs_age_only_in_the_grey_zone_on_both_paths():
    pao2_a = 0.21 * (760 - 47) - 60 / 0.8
    base = {"ph": 7.25, "pco2": q(60, "mmHg"), "hco3": q(26, "mmol/L")}
    for _, found in paths({**base, "po2": q(pao2_a - 8.6, "mmHg")}):
        assert "a_a_needs_age" in found
    for _, found in paths({**base, "po2": q(pao2_a - 30, "mmHg"), "age": 30}):
        assert "a_a_needs_age" not in found


def test_type_1_failure_text_names_the_pao2_below_60_or_the_pf_ratio():
    # PaO2 below 8 kPa (60 mmHg), or on oxygen a P/F at or below 300 (berlin2012; bts2017)
    base = gas(7.42, 35)
    low = bg({**base, "po2": q(50, "mmHg"), "fio2": 0.21})
    assert "is below 60 mmHg" in finding_text(low, "respiratory_failure_type_1")
    at = bg({**base, "po2": q(60, "mmHg"), "fio2": 0.3})
    assert "P/F ratio is at or below" in finding_text(at, "respiratory_failure_type_1")


def test_a_range_without_both_ends_is_refused():
    for rx in ({"high": 92}, {"low": 88}, {"low": 88, "high": 92, "x": 1}):
        assert ("inputs.spo2_target_prescribed", "bad_request") in refused(
            {**BASE, "spo2_target_prescribed": rx}
        )


@pytest.mark.parametrize(
    ("urea", "bun", "accepted"),
    [(19.0, 20.0, True), (18.9, 20.0, False), (0.5, 0.54, True), (0.5, 0.58, False)],
)
def test_urea_and_bun_may_differ_by_5_percent_of_the_larger_or_of_1(urea, bun, accepted):
    # the project's rule (docs/glossary/acidbase.md): more than 5 % apart (of the larger, at least 1 mmol/L)
    inputs = {**BASE, "urea": q(urea, "mmol/L"), "bun": q(bun, "mmol/L")}
    if accepted:
        bg(inputs)
    else:
        assert ("inputs.bun", "inconsistent") in refused(inputs)


def test_a_ph_and_pco2_implying_an_hco3_below_1_are_refused():
    # pH 6.5 with PCO2 8 mmHg: HCO3 = 0.0307 x 8 x 10^0.4 = 0.62 mmol/L (henderson1908): not survivable
    assert hco3_of(6.5, 8) < 1
    errors = refused({"ph": 6.5, "pco2": q(8, "mmHg")})
    assert ("inputs.ph", "inconsistent") in errors


def test_a_pco2_below_15_mmhg_is_a_unit_slip_unless_the_triple_fits():
    # PCO2 10 mmHg: with HCO3 24 at pH 7.40 the triple does not fit (Henderson-Hasselbalch), so probably kPa;
    # with the HCO3 the triple implies, the unit is right
    assert "possible_unit_mix_up" in codes(bg({"ph": 7.40, "pco2": q(10, "mmHg"), "hco3": q(24, "mmol/L")}))
    fits = gas(7.40, 10)
    assert "possible_unit_mix_up" not in codes(bg(fits))


def test_a_baseline_in_range_is_no_unit_slip():
    for baseline in (q(50, "mmHg"), q(6.7, "kPa"), q(20, "mmHg"), q(150, "mmHg")):
        assert "possible_unit_mix_up" not in codes(bg({**BASE, "baseline_pco2": baseline}))


@pytest.mark.parametrize(
    ("po2", "named"), [(q(25, "mmHg"), False), (q(24.9, "mmHg"), True), (q(3.0, "kPa"), False)]
)
def test_an_arterial_po2_below_25_mmhg_is_a_unit_slip(po2, named):
    # the project's grey zone: below 25 mmHg sent in mmHg looks like kPa; a value sent in kPa is no slip
    assert ("possible_unit_mix_up" in codes(bg({**BASE, "po2": po2}))) is named


@pytest.mark.parametrize(("sent", "code"), [(316, "implausible"), (317, "out_of_range"), (40, "implausible")])
def test_a_ph_that_is_an_h_concentration_gets_the_ph_offered(sent, code):
    # [H+] 10-316 nmol/L is pH 8.0-6.5: pH = 9 - log10([H+] nmol/L) (kassirer1965)
    response = handle_obj({"calc": "blood_gas", "inputs": {**BASE, "ph": sent}})
    error = next(e for e in response["errors"] if e["field"] == "inputs.ph")
    assert error["code"] == code
    if sent == 40:
        assert f"the pH is {9 - math.log10(40):.2f}" in error["message"] + error.get("hint", "")


def test_beside_a_respiratory_alkalosis_the_gap_names_no_alkalosis_without_a_delta_ratio_above_2():
    # PaCO2 25, HCO3 18, AG 140 - 102 - 18 = 20 (a high-AG acidosis, Gabow 1980, from memory): delta ratio
    # (20 - 12) / (24 - 18) = 1.33, within 1-2 (brandis): no metabolic alkalosis, although the HCO3 before the
    # gap, 26, is above the acute expectation 24 - 2 x 1.5 = 21 (narins1980)
    inputs = {
        "ph": ph_of(18, 25),
        "pco2": q(25, "mmHg"),
        "hco3": q(18, "mmol/L"),
        "na": q(140, "mmol/L"),
        "cl": q(102, "mmol/L"),
    }
    for disorders, found in paths(inputs):
        assert disorders[0] == ("respiratory_alkalosis", "primary")
        assert ("metabolic_acidosis", "concurrent") in disorders
        assert "metabolic_alkalosis" not in [c for c, _ in disorders]
        assert "metabolic_alkalosis_from_gap" not in found


def test_display_decimals_of_the_computed_hco3():
    r = bg({"ph": 7.40, "pco2": q(40, "mmHg")})
    assert r["display"]["hco3_computed"] == 1  # mmol/L to 1 decimal (common practice)


def test_json_text_requests_read_as_dict_requests():
    # the shell sends JSON text: its words (units, sample site) are new string objects, never the module's own
    po2 = gas(7.35, 50, po2=q(20, "mmHg"))
    requests = [
        {**po2, "sample": "venous"},
        {**po2, "sample": "capillary"},
        {**po2, "sample": "arterial", "fio2": 0.3, "pb": q(900, "mmHg")},
        {**BASE, "lactate": q(10, "g/L")},
        {**BASE, "pco2": q(1.4, "kPa"), "hco3": q(24, "mmol/L")},
    ]
    for inputs in requests:
        request = {"calc": "blood_gas", "inputs": inputs}
        as_text = json.loads(handle(json.dumps(request)))
        as_dict = handle_obj(json.loads(json.dumps(request)))
        assert as_text == json.loads(json.dumps(as_dict)), inputs
    venous = json.loads(handle(json.dumps({"calc": "blood_gas", "inputs": {**po2, "sample": "venous"}})))
    assert "possible_unit_mix_up" not in codes(venous)
    assert "respiratory_failure_type_1" not in codes(venous)


def test_an_implausible_concentration_offers_the_unit_that_fits():
    # lactate 10 g/L = 111 mmol/L is outside 0-50; 10 mg/dL = 1.1 mmol/L fits (lactate 90.08 g/mol)
    response = handle_obj({"calc": "blood_gas", "inputs": {**BASE, "lactate": q(10, "g/L")}})
    error = next(e for e in response["errors"] if e["field"] == "inputs.lactate")
    assert error["code"] == "implausible"
    assert error["suggest"] == {"value": 10, "unit": "mg/dL"}
    # a value that fits no unit gets no suggestion
    response = handle_obj({"calc": "blood_gas", "inputs": {**BASE, "lactate": q(100000, "mmol/L")}})
    error = next(e for e in response["errors"] if e["field"] == "inputs.lactate")
    assert error["code"] == "out_of_range"


def test_a_metabolic_acidosis_above_winters_band_on_both_paths():
    # HCO3 12: Winters 26 +/- 2 (albert1967); PaCO2 32 is above it (the alkalosis band would hold it)
    for disorders, _ in paths({"ph": ph_of(12, 32), "pco2": q(32, "mmHg"), "hco3": q(12, "mmol/L")}):
        assert disorders == [("metabolic_acidosis", "primary"), ("respiratory_acidosis", "concurrent")]


def test_no_ph_rule_drift_on_a_metabolic_primary():
    # the pH rules are those of a respiratory acidosis (berend2014): a metabolic alkalosis with PaCO2 71 is
    # not read by them
    r = bg({"ph": ph_of(60, 71), "pco2": q(71, "mmHg"), "hco3": q(60, "mmol/L")})
    assert r["outputs"]["disorders"][0]["code"] == "metabolic_alkalosis"
    assert "ph_rule_drift" not in codes(r)


@pytest.mark.parametrize(("hco3", "fraction"), [(25.0, 1.0), (32.0, 0.0), (28.5, 0.5)])
def test_fraction_acute_by_the_hco3_rules_is_limited_to_0_1(hco3, fraction):
    # PaCO2 60: acute 26, chronic 31 (narins1980); f = (31 - HCO3) / 5 limited to 0-1 (fraction_acute_bands)
    r = bg({"ph": ph_of(hco3, 60), "pco2": q(60, "mmHg"), "hco3": q(hco3, "mmol/L")})
    assert r["outputs"]["disorders"][0]["fraction_acute"] == pytest.approx(fraction)


def test_the_batch_orders_gap_found_disorders_and_a_concurrent_metabolic_acidosis():
    # AB-07: respiratory alkalosis, then the gap-found metabolic acidosis and alkalosis; PaCO2 20 with
    # HCO3 13: a respiratory alkalosis (|log10(20/40)| > |log10(24/13)|) with a metabolic acidosis more than 2
    # below the chronic 24 - 4 x 2 = 16 (narins1980)
    table = (
        "ph,pco2[mmHg],hco3[mmol/L],na[mmol/L],cl[mmol/L]\n7.53,24,20,140,88\n" + f"{ph_of(13, 20)},20,13,,\n"
    )
    audit = batch.interpret_table(batch.read_table(table))
    assert audit.value("disorders", 0) == "respiratory_alkalosis metabolic_acidosis metabolic_alkalosis"
    assert audit.value("disorders", 1) == "respiratory_alkalosis metabolic_acidosis"


def test_the_alternative_winters_form_is_computed_in_its_step():
    # 1.54 x HCO3 + 8.36 (kidney360_2022): 26.84 mmHg at HCO3 12
    r = bg({"ph": 7.28, "pco2": q(26, "mmHg"), "hco3": q(12, "mmol/L")})
    label = next(s["label"] for s in r["steps"] if s.get("output") == "expected_pco2")
    assert f"gives {1.54 * 12 + 8.36:.0f} mmHg" in label


def test_display_decimals_of_the_respiratory_expectations():
    r = bg({"ph": ph_of(28.5, 60), "pco2": q(60, "mmHg"), "hco3": q(28.5, "mmol/L")})
    display = r["display"]
    assert display["expected_hco3"] == 1
    assert display["expected_hco3_centre"] == 1
    assert display["fraction_acute_hco3"] == 2
    assert display["fraction_acute_ph"] == 2
    assert (
        display["expected_ph_hh"] == 3
    )  # docs/bridge.md display: the HH pH to 3 decimals beside the rules' 2


def test_the_concurrent_acidosis_text_names_an_albumin_corrected_gap_above_16_only():
    base = {
        "ph": 7.25,
        "pco2": q(70, "mmHg"),
        "hco3": q(30.5, "mmol/L"),
        "lactate": q(5, "mmol/L"),
        "na": q(140, "mmol/L"),
    }
    at16 = finding_text(bg({**base, "cl": q(93.5, "mmol/L")}), "concurrent_metabolic_acidosis")
    assert "anion gap" not in at16  # 140 - 93.5 - 30.5 = 16: not above 16
    above = finding_text(
        bg({**base, "cl": q(90, "mmol/L"), "albumin": q(4.0, "g/dL")}), "concurrent_metabolic_acidosis"
    )
    assert "albumin-corrected anion gap" in above


def test_an_alveolar_po2_just_below_zero_is_not_shown():
    # on air PAO2 = 0.21 x 713 - 119.8 / 0.8 = -0.02 mmHg (alveolar gas equation): left out
    assert 0.21 * 713 - 119.8 / 0.8 < 0
    r = bg(gas(7.10, 119.8, po2=q(50, "mmHg")))
    assert "pao2_alveolar" not in r["outputs"]


def test_the_a_over_a_ratio_is_shown_for_a_positive_alveolar_po2():
    # a/A = PaO2 / PAO2 (gilbert1974), PAO2 = 0.21 x 713 - 40 / 0.8
    pao2_a = 0.21 * 713 - 40 / 0.8
    r = bg({**BASE, "po2": q(80, "mmHg")})
    assert r["outputs"]["a_over_A"] == pytest.approx(80 / pao2_a, rel=1e-9)
    base = {
        "ph": ph_of(30, 99.5),
        "pco2": q(99.5, "mmHg"),
        "hco3": q(30, "mmol/L"),
        "po2": q(20, "mmHg"),
        "fio2": 0.25,
        "pb": q(447, "mmHg"),
        "rq": 1.0,
    }
    assert bg(base)["outputs"]["a_over_A"] == pytest.approx(20 / 0.5)  # PAO2 = 0.25 x 400 - 99.5 = 0.5


def test_the_pf_band_is_named_unless_mild():
    # P/F at or below 100 severe, 200 moderate, 300 mild (berlin2012); PaO2 90 on FiO2 1.0: 90, severe
    base = gas(7.42, 35)
    severe = finding_text(bg({**base, "po2": q(90, "mmHg"), "fio2": 1.0}), "hypoxaemia_masked_by_oxygen")
    assert ", severe" in severe
    mild = finding_text(bg({**base, "po2": q(100, "mmHg"), "fio2": 0.4}), "hypoxaemia_masked_by_oxygen")
    assert ", mild" not in mild


def test_the_pressure_step_says_whether_pb_was_given():
    given = bg({**BASE, "po2": q(80, "mmHg"), "pb": q(700, "mmHg")})
    assert any(s["formula"] == "PB as given" for s in given["steps"])
    assumed = bg({**BASE, "po2": q(80, "mmHg")})
    assert any(s["formula"] == "PB = 760 mmHg" for s in assumed["steps"])


def test_a_prescribed_range_needs_low_below_high():
    assert ("inputs.spo2_target_prescribed", "out_of_range") in refused(
        {**BASE, "spo2_target_prescribed": {"low": 92, "high": 92}}
    )


@pytest.mark.parametrize(("po2", "accepted"), [(361.5, True), (361.6, False)])
def test_a_po2_more_than_5_above_the_inspired_po2_is_refused(po2, accepted):
    # PIO2 = 0.5 x (760 - 47) = 356.5 mmHg (alveolar_gas_1946); more than 5 above it is impossible (our rule)
    inputs = {**BASE, "po2": q(po2, "mmHg"), "fio2": 0.5}
    if accepted:
        bg(inputs)
    else:
        assert ("inputs.po2", "inconsistent") in refused(inputs)


@pytest.mark.parametrize(("hco3", "given"), [(23.5, False), (23.4, True)])
def test_the_delta_ratio_below_an_hco3_of_23_5(hco3, given):
    # the delta ratio (brandis) is computed only where the HCO3 has fallen (below 23.5, Tidewell convention)
    r = bg(
        {
            "ph": ph_of(hco3, 40),
            "pco2": q(40, "mmHg"),
            "hco3": q(hco3, "mmol/L"),
            "na": q(140, "mmol/L"),
            "cl": q(100, "mmol/L"),
        }
    )
    assert ("delta_ratio" in r["outputs"]) is given


@pytest.mark.parametrize(("cl", "low"), [(113.0, False), (113.1, True)])
def test_anion_gap_low_below_3(cl, low):
    r = bg({**BASE, "na": q(140, "mmol/L"), "cl": q(cl, "mmol/L")})
    assert ("anion_gap_low" in codes(r)) is low


@pytest.mark.parametrize(("hco3", "read"), [(61.06, True), (62.06, False)])
def test_the_copenhagen_reading_up_to_an_sbe_of_40(hco3, read):
    # SBE = HCO3 - 24.8 + 16.2 x (pH - 7.40) (nccls1994): 39.5 and 40.5 at pH 7.60
    pco2 = hco3 / (0.0307 * 10 ** (7.60 - 6.1))
    r = bg({"ph": 7.60, "pco2": q(pco2, "mmHg"), "hco3": q(hco3, "mmol/L")})
    assert bool(codes(r) & {"approaches_agree", "approaches_disagree"}) is read


def test_no_copenhagen_paco2_rule_without_a_disorder():
    assert "fit" not in finding_text(bg(BASE), "approaches_agree")


def test_a_metabolic_alkalosis_paco2_outside_the_sbe_rule_disagrees_on_both_paths():
    # HCO3 36, PaCO2 53: inside 40 + 0.7 x 12 +/- 5 (berend2014) but more than 5 from 40 + 0.6 x SBE
    # (schlichtig1998)
    for _, found in paths({"ph": ph_of(36, 53), "pco2": q(53, "mmHg"), "hco3": q(36, "mmol/L")}):
        assert "approaches_disagree" in found


def test_the_sbe_reading_uses_plus_minus_3():
    # pH 7.37, PaCO2 40, HCO3 22.4 (no disorder): SBE -2.9 (nccls1994), within +/- 3 (schlichtig1998)
    ph = 7.37
    r = bg(gas(ph, 40))
    assert "approaches_agree" in codes(r)


def test_findings_of_the_decision_are_sorted_urgent_notable_info():
    rank = {"urgent": 0, "notable": 1, "info": 2}
    inputs = gas(7.25, 70, lactate=q(5, "mmol/L"))
    for d in both_paths(inputs)[:1]:  # the scalar Decision (blood_gas.findings reads scalars)
        found = blood_gas.findings(d)
        severities = [rank[d.severity.get(c, blood_gas.SEVERITY.get(c))] for c in found]
        assert severities == sorted(severities) and len(set(severities)) == 3


def test_display_decimals_of_the_stewart_terms_and_the_hco3_before_the_gap():
    r = bg(
        {
            **BASE,
            "na": q(140, "mmol/L"),
            "cl": q(104, "mmol/L"),
            "k": q(4, "mmol/L"),
            "albumin": q(4.2, "g/dL"),
        }
    )
    assert r["display"]["sid_apparent"] == 1  # mEq/L to 1 decimal (common practice)
    gap = {
        "ph": ph_of(14, 80),
        "pco2": q(80, "mmHg"),
        "hco3": q(14, "mmol/L"),
        "na": q(140, "mmol/L"),
        "cl": q(110, "mmol/L"),
    }
    r = bg(gap)
    assert r["outputs"]["hco3_before_anion_gap"]["value"] == pytest.approx(
        14 + (140 - 110 - 14) - 12
    )  # wrenn1990
    assert r["display"]["hco3_before_anion_gap"] == 1


def test_the_triple_disorder_text_names_the_gap_type_of_the_acidosis_only():
    # AB-07 (tests/cases/reference_cases.json)
    r = bg(
        {
            "ph": 7.53,
            "pco2": q(24, "mmHg"),
            "hco3": q(20, "mmol/L"),
            "na": q(140, "mmol/L"),
            "cl": q(88, "mmol/L"),
        }
    )
    text = r["outputs"]["interpretation"]
    assert "with high anion gap metabolic acidosis and metabolic alkalosis" in text


@pytest.mark.parametrize(
    ("sent", "code", "suggest"),
    [(60, "implausible", None), (10, "implausible", None), (9.5, "out_of_range", None)],
)
def test_a_ph_hint_only_for_a_value_that_becomes_a_ph_in_range(sent, code, suggest):
    # 60 / 10 = 6.0 is outside 6.5-8.0 (no suggestion), but 60 nmol/L [H+] is pH 7.22; 10 nmol/L
    # is pH 8.0; 9.5 is neither (pH = 9 - log10 [H+], kassirer1965)
    response = handle_obj({"calc": "blood_gas", "inputs": {**BASE, "ph": sent}})
    error = next(e for e in response["errors"] if e["field"] == "inputs.ph")
    assert error["code"] == code
    assert error.get("suggest") == suggest


def test_a_normal_gas_has_only_the_always_present_findings_on_both_paths():
    # pH 7.40, PaCO2 40, HCO3 24 (acid_base_normal_ranges): no disorder, so no compensation is read
    for disorders, found in paths(BASE):
        assert disorders == []
        assert found == {"approaches_agree", "spo2_target"}
