"""The ``uncertainty`` calculation (calculations.uncertainty): seeded Monte Carlo over the measurement errors.

Checks: reproducible with a seed; a sample far from every decision threshold gives probabilities near 1 and
one sitting on a threshold near 0.5; the Monte Carlo agrees with the normal distribution and with first-order
propagation through Henderson-Hasselbalch; the errors object and the sample are validated like any input
(errors come back with fields such as inputs.sample.pco2 and inputs.errors.ph.sd).
"""

from __future__ import annotations

import math
import subprocess
import sys

import pytest

import compare
from tidewell.bridge import handle_obj
from tidewell.calculations import blood_gas, uncertainty
from tidewell.calculations.blood_gas import reading


def q(value, unit):
    return {"value": value, "unit": unit}


def ask(sample, **inputs):
    response = handle_obj({"calc": "uncertainty", "inputs": {"sample": sample, **inputs}})
    assert response["ok"], response.get("errors")
    return response


def errors_of(inputs, options=None):
    request = {"calc": "uncertainty", "inputs": inputs}
    if options:
        request["options"] = options
    response = handle_obj(request)
    assert not response["ok"], response
    return {(e["field"], e["code"]): e["message"] for e in response["errors"]}


# a compensated high-anion-gap metabolic acidosis, every value far from its threshold: HCO3 10 mmol/L, PCO2
# 23 mmHg on Winters' 1.5 x 10 + 8 = 23 (band 21-25, Albert, Dell & Winters 1967), pH from
# Henderson-Hasselbalch 6.1 + log10(10 / (0.0307 x 23)) = 7.251 (derived from the cited equation)
FAR = {
    "ph": 7.251,
    "pco2": q(23, "mmHg"),
    "hco3": q(10, "mmol/L"),
    "na": q(140, "mmol/L"),
    "cl": q(104, "mmol/L"),
}
# a COPD exacerbation (worked case AB-05 of tests/cases/reference_cases.json): pH 7.24, PCO2 70 mmHg,
# HCO3 29.7 mmol/L, fraction acute 0.64 by the HCO3 rules, between the 0.2 and 0.8 chronicity bands
AB05 = {"ph": 7.24, "pco2": q(70, "mmHg"), "hco3": q(29.7, "mmol/L")}


def test_same_seed_same_answer_and_the_seed_matters():
    a = ask(AB05, seed=11, draws=2000)
    b = ask(AB05, seed=11, draws=2000)
    c = ask(AB05, seed=12, draws=2000)
    assert a["outputs"] == b["outputs"] and a["steps"] == b["steps"]
    assert a["outputs"]["probabilities"] != c["outputs"]["probabilities"]
    assert a["outputs"]["draws"] == 2000 and a["outputs"]["seed"] == 11


def test_default_seed_and_draws_are_stated_and_reproducible():
    a, b = ask(AB05), ask(AB05)
    assert a["outputs"] == b["outputs"]
    assert a["outputs"]["draws"] == uncertainty.DEFAULT_DRAWS == 10_000
    assert a["outputs"]["seed"] == uncertainty.DEFAULT_SEED
    assert any(s["output"] == "draws" and "seeded" in s["formula"] for s in a["steps"])


def test_each_input_has_its_own_stream():
    """Adding an error for one input does not move the draws of the others (same pH interval)."""
    a = ask({**FAR, "k": q(4.0, "mmol/L")}, seed=3, draws=3000)
    b = ask({**FAR, "k": q(4.0, "mmol/L")}, seed=3, draws=3000, errors={"k": {"sd": q(0.3, "mmol/L")}})
    assert a["outputs"]["intervals"]["hco3_computed"] == b["outputs"]["intervals"]["hco3_computed"]
    assert a["outputs"]["intervals"]["anion_gap"] == b["outputs"]["intervals"]["anion_gap"]


def test_far_from_every_threshold_probabilities_near_one():
    o = ask(FAR)["outputs"]
    p = o["probabilities"]
    assert p["disorders"]["metabolic_acidosis"] == 1.0
    assert (
        max(
            p["disorders"][c]
            for c in ("metabolic_alkalosis", "respiratory_acidosis", "respiratory_alkalosis")
        )
        < 0.01
    )
    assert p["findings"]["compensation_as_expected"] > 0.99
    assert o["reading"] == {
        "disorders": [{"code": "metabolic_acidosis", "chronicity": None}],
        "probability": 1.0,
    }
    assert "reading_robust" in {f["code"] for f in ask(FAR)["findings"]}


def test_on_a_threshold_probability_near_one_half():
    # pH exactly 7.35 with PaCO2 8 kPa: the BTS/ICS 2016 NIV thresholds are pH < 7.35 and PaCO2 > 6.5 kPa
    # (Davidson et al. 2016, worked case TH-02), so half the draws of a symmetric pH error meet them
    p = ask({"ph": 7.35, "pco2": q(8.0, "kPa")})["outputs"]["probabilities"]
    assert p["findings"]["niv_criteria_met"] == pytest.approx(0.5, abs=0.03)
    assert p["niv_criteria"]["met"] == p["findings"]["niv_criteria_met"]
    # PaCO2 exactly 45 mmHg, the upper reference limit (pco2_normal_range; which side the limit falls
    # on is common practice)
    p = ask({"ph": 7.40, "pco2": q(45.0, "mmHg")})["outputs"]["probabilities"]
    assert p["findings"]["hypercapnic_without_risk_flag"] == pytest.approx(0.5, abs=0.03)


def test_agrees_with_the_normal_distribution():
    """pH 7.36 with SD 0.01 lies 1 SD above 7.35: P(pH < 7.35) = Phi(-1) = 0.158655.

    Published value of the standard normal distribution (Abramowitz & Stegun 1964, table 26.1; from
    memory), checked here against math.erfc too. With 100,000 draws the standard error is 0.0012.
    """
    phi_minus_1 = 0.158655
    assert 0.5 * math.erfc(1 / math.sqrt(2)) == pytest.approx(phi_minus_1, abs=5e-7)
    o = ask({"ph": 7.36, "pco2": q(9.0, "kPa")}, draws=100_000)["outputs"]
    se = math.sqrt(phi_minus_1 * (1 - phi_minus_1) / 100_000)
    assert o["probabilities"]["findings"]["niv_criteria_met"] == pytest.approx(phi_minus_1, abs=4 * se)


def test_interval_agrees_with_first_order_propagation():
    """95 % interval of the HCO3 computed from pH (SD 0.01) and PCO2 (CV 3 %).

    ln HCO3 = ln 0.0307 + ln PCO2 + ln(10) x (pH - 6.1) (Henderson-Hasselbalch), so to first order the SD of
    ln HCO3 is sqrt((ln 10 x 0.01)^2 + 0.03^2) = 0.037817 and the interval is HCO3 x exp(+/- 1.96 x 0.037817)
    = HCO3 x [0.9286, 1.0769] (derived from the cited equation by first-order propagation, the GUM's law of
    propagation of uncertainty; the Monte Carlo of JCGM 101:2008 should agree to well within 1 %).
    """
    sample = {"ph": 7.30, "pco2": q(50, "mmHg")}
    o = ask(sample, draws=50_000)["outputs"]
    centre = 0.0307 * 50 * 10 ** (7.30 - 6.1)
    sd_log = math.sqrt((math.log(10) * 0.01) ** 2 + 0.03**2)
    assert sd_log == pytest.approx(0.037817, abs=1e-6)
    interval = o["intervals"]["hco3_computed"]
    assert interval["low"]["value"] == pytest.approx(centre * math.exp(-1.96 * sd_log), rel=0.01)
    assert interval["high"]["value"] == pytest.approx(centre * math.exp(1.96 * sd_log), rel=0.01)
    assert interval["low"]["value"] < interval["median"]["value"] < interval["high"]["value"]


def test_reported_hco3_follows_the_drawn_ph_and_pco2():
    consistent = ask(AB05)["outputs"]["probabilities"]["findings"]
    assert "inconsistent_triple" not in consistent
    # worked case AB-08: pH 7.30, PCO2 40, HCO3 28 is internally inconsistent (difference 0.158)
    inconsistent = ask({"ph": 7.30, "pco2": q(40, "mmHg"), "hco3": q(28, "mmol/L")})["outputs"]
    assert inconsistent["probabilities"]["findings"]["inconsistent_triple"] == 1.0
    # an explicit error for HCO3 (say a separately measured total CO2) draws it independently
    own = ask(AB05, errors={"hco3": {"sd": q(1.5, "mmol/L")}})["outputs"]
    assert own["probabilities"]["findings"].get("inconsistent_triple", 0.0) > 0.05


def test_no_error_no_spread_and_user_errors_widen():
    zero = {key: {"sd": 0} for key in ("ph",)}
    zero["pco2"] = {"cv": 0}
    o = ask(AB05, errors=zero)["outputs"]
    assert o["reading"]["probability"] == 1.0
    assert all(v in (0.0, 1.0) for v in o["probabilities"]["findings"].values())
    narrow = ask(AB05)["outputs"]["intervals"]["fraction_acute"]
    wide = ask(AB05, errors={"ph": 0.03, "pco2": {"cv": {"value": 6, "unit": "%"}}})["outputs"]["intervals"]
    assert wide["fraction_acute"]["high"] - wide["fraction_acute"]["low"] > narrow["high"] - narrow["low"]


def test_intervals_in_the_pressure_unit_asked_for():
    sample = {**AB05, "po2": q(7.1, "kPa"), "fio2": 0.28, "age": 70}
    response = handle_obj(
        {"calc": "uncertainty", "inputs": {"sample": sample}, "options": {"pressure_unit": "kPa"}}
    )
    intervals = response["outputs"]["intervals"]
    assert (
        intervals["a_a_gradient"]["low"]["unit"] == "kPa"
        and intervals["pco2_target"]["high"]["unit"] == "kPa"
    )
    point = handle_obj({"calc": "blood_gas", "inputs": sample, "options": {"pressure_unit": "kPa"}})[
        "outputs"
    ]
    aa = point["a_a_gradient"]["value"]
    assert intervals["a_a_gradient"]["low"]["value"] < aa < intervals["a_a_gradient"]["high"]["value"]
    assert response["outputs"]["errors_used"]["pco2"]["sd"]["unit"] == "kPa"


def test_probabilities_cover_every_code_and_chronicity():
    o = ask(AB05)["outputs"]
    assert set(o["probabilities"]["disorders"]) == set(blood_gas.DISORDER_CODES)
    assert set(o["probabilities"]["chronicity"]) == {"acute", "acute_on_chronic", "chronic"}
    point = handle_obj({"calc": "blood_gas", "inputs": AB05})
    assert {f["code"] for f in point["findings"]} <= set(o["probabilities"]["findings"])
    assert o["reading"]["disorders"] == [
        {"code": d["code"], "chronicity": d["chronicity"]} for d in point["outputs"]["disorders"]
    ]
    # the chronicity of AB-05 (fraction acute 0.64) is acute-on-chronic in most draws, not all
    assert 0.6 < o["probabilities"]["chronicity"]["acute_on_chronic"] < 1.0
    assert o["how_sure"].startswith("How sure: the reading (acute-on-chronic respiratory acidosis) holds in")


def test_sample_errors_carry_their_field():
    errors = errors_of({"sample": {"ph": 7.3, "pco2": q(5.3, "mmHg")}})
    assert ("inputs.sample.pco2", "implausible") in errors
    assert "Did you mean 5.3 kPa?" in errors[("inputs.sample.pco2", "implausible")]
    assert ("inputs.sample", "missing") in errors_of({})
    assert ("inputs.sample.pH", "unknown_input") in errors_of(
        {"sample": {"pH": 7.3, "ph": 7.3, "pco2": q(8, "kPa")}}
    )
    assert ("inputs.sample", "bad_request") in errors_of({"sample": [7.3]})


def test_errors_object_is_validated():
    base = {"sample": AB05}
    assert ("inputs.errors.ph.sd", "out_of_range") in errors_of({**base, "errors": {"ph": {"sd": 3}}})
    assert ("inputs.errors.pco2", "bad_unit") in errors_of({**base, "errors": {"pco2": 2}})
    found = errors_of({**base, "errors": {"pco2": {"cv": 3}}})
    assert "Did you mean 3 %" in found[("inputs.errors.pco2.cv", "implausible")]
    assert ("inputs.errors.pco2.cv", "inconsistent") in errors_of(
        {**base, "errors": {"pco2": {"sd": q(1, "mmHg"), "cv": 0.03}}}
    )
    assert ("inputs.errors.age", "bad_request") in errors_of({**base, "errors": {"age": 1}})
    found = errors_of({**base, "errors": {"pc02": {"cv": 0.03}}})
    assert "Did you mean 'pco2'?" in found[("inputs.errors.pc02", "unknown_input")]
    assert ("inputs.errors", "bad_request") in errors_of({**base, "errors": [1]})


def test_draws_and_seed_are_validated():
    base = {"sample": AB05}
    assert ("inputs.draws", "out_of_range") in errors_of({**base, "draws": 10})
    assert ("inputs.draws", "out_of_range") in errors_of({**base, "draws": 1000.5})
    assert ("inputs.draws", "out_of_range") in errors_of({**base, "draws": 1e9})
    assert ("inputs.seed", "out_of_range") in errors_of({**base, "seed": -1})
    assert ("inputs.draws", "not_a_number") in errors_of({**base, "draws": "many"})


def test_every_problem_at_once():
    errors = errors_of({"sample": {"ph": 9.1}, "errors": {"ph": {"sd": -1}}, "draws": 5})
    fields = {field for field, _ in errors}
    assert {"inputs.sample.ph", "inputs.sample.pco2", "inputs.errors.ph.sd", "inputs.draws"} <= fields


def test_errors_for_inputs_the_sample_lacks_are_named():
    response = ask(AB05, errors={"na": {"sd": q(2, "mmol/L")}})
    assert "errors_for_absent_inputs" in {f["code"] for f in response["findings"]}


def test_temperature_sd_in_fahrenheit_is_a_difference():
    sample = {**AB05, "temperature": q(34, "degC")}
    degf = ask(sample, errors={"temperature": {"sd": q(0.9, "degF")}})["outputs"]["errors_used"]
    assert degf["temperature"]["sd"]["value"] == pytest.approx(0.5)  # 0.9 degF is 0.5 degC (a 5/9 degree)


def test_defaults_are_stated_with_their_source():
    response = ask({**FAR, "k": q(4, "mmol/L"), "spo2": 95})
    steps = [s for s in response["steps"] if s.get("output") == "errors_used"]
    used = response["outputs"]["errors_used"]
    assert {"ph", "pco2", "na", "k", "cl", "spo2"} <= set(used) and "hco3" not in used
    assert all(s["source_keys"] == ["analyser_imprecision"] for s in steps if "default" in s["label"])
    assert used["ph"] == {"sd": 0.01, "origin": "default"}
    assert used["pco2"]["cv"] == 0.03 and used["pco2"]["sd"]["value"] == pytest.approx(0.69)
    assert response["cautions"] and "sampling errors" in response["cautions"][0]


def test_blood_gas_path_never_imports_numpy():
    """import tidewell, its acid-base formulas and the blood_gas calculation, and an answer: no numpy."""
    code = (
        "import sys, tidewell, tidewell.formulas.acidbase, tidewell.calculations.blood_gas, tidewell.arrays\n"
        "import tidewell.frontends.cli\n"
        "from tidewell.bridge import handle_obj\n"
        "r = handle_obj({'calc': 'blood_gas', 'inputs': {'ph': 7.24, 'pco2': {'value': 9.3, 'unit': 'kPa'}, "
        "'hco3': {'value': 29.7, 'unit': 'mmol/L'}, 'na': {'value': 140, 'unit': 'mmol/L'}, "
        "'cl': {'value': 98, 'unit': 'mmol/L'}, 'po2': {'value': 7.1, 'unit': 'kPa'}, 'age': 70}})\n"
        "assert r['ok'], r\n"
        "assert 'numpy' not in sys.modules, 'numpy was imported'\n"
        "print('ok')\n"
    )
    done = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, timeout=60)
    assert done.returncode == 0 and done.stdout.strip() == "ok", done.stderr


def test_uncertainty_needs_numpy_only_when_asked():
    code = (
        "import sys\n"
        "from tidewell.bridge import handle_obj\n"
        "r = handle_obj({'calc': 'uncertainty', 'inputs': {'sample': {'ph': 7.3, "
        "'pco2': {'value': 8, 'unit': 'kPa'}}, 'draws': 200}})\n"
        "assert r['ok'] and 'numpy' in sys.modules\n"
        "print('ok')\n"
    )
    done = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, timeout=60)
    assert done.returncode == 0 and done.stdout.strip() == "ok", done.stderr


def test_every_draw_gets_the_scalar_alveolar_gas_and_a_a_limit():
    # derived: the draws go through the same alveolar gas equation (alveolar_gas_1946) and age rule (common
    # practice) as one sample; on arrays, in one call, each draw's number is the scalar function's, to
    # compare.REL_SAME_ENGINE (numpy's kernels may differ from CPython's in the last place)
    import numpy as np

    from tidewell.fields import Inputs
    from tidewell.formulas import oxygenation

    raw = {**AB05, "po2": q(7.1, "kPa"), "fio2": 0.28, "age": 71}
    sample = reading._Sample(Inputs(raw))
    errors = {key: (kind, value, "default") for key, (kind, value) in uncertainty.DEFAULT_ERRORS.items()}
    values, _ = uncertainty.draw_inputs(sample, errors, 500, 5)
    _, cloud, _ = uncertainty.simulate(sample, errors, 500, 5)
    alveolar = [
        oxygenation.alveolar_po2_simple(fio2_fraction=f, paco2_mmhg=p, pb_mmhg=b, rq=r)
        for f, p, b, r in zip(
            values.fio2.tolist(),
            values.pco2.tolist(),
            values.pb_value.tolist(),
            values.rq.tolist(),
            strict=True,
        )
    ]
    assert len(set(alveolar)) > 100  # the draws really differ
    same = compare.tally(compare.REL_SAME_ENGINE)
    for k, (got, want) in enumerate(zip(np.asarray(cloud.pao2_alveolar).tolist(), alveolar, strict=True)):
        same.check(got, want, f"draw {k}: alveolar PO2")
    limits = [oxygenation.aa_gradient_upper_by_age(age_years=a) for a in values.age.tolist()]
    upper = np.broadcast_to(cloud.a_a_expected_upper, (500,)).tolist()
    for k, (got, want) in enumerate(zip(upper, limits, strict=True)):
        same.check(got, want, f"draw {k}: A-a limit")
