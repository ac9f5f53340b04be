"""The bridge contract (docs/bridge.md): shapes, every error code, never raising, never NaN."""

from __future__ import annotations

import json
import subprocess
import sys

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from conftest import assert_finite_everywhere
from tidewell import bridge
from tidewell.errors import ERROR_CODES, InputError
from tidewell.fields import Inputs
from tidewell.report import Report

CONVERT = {"calc": "convert", "inputs": {"quantity": {"value": 6.5, "unit": "kPa"}, "to": "mmHg"}}


def check_shape(response: dict) -> None:
    """The success/failure shapes of the contract (docs/bridge.md)."""
    assert isinstance(response["ok"], bool)
    assert response["engine"] == bridge.ENGINE
    assert "calc" in response
    if response["ok"]:
        for key in ("outputs", "findings", "cautions", "steps"):
            assert key in response
        for finding in response["findings"]:
            assert {"code", "severity", "text"} <= set(finding) <= {"code", "severity", "text", "suggest"}
            assert finding["severity"] in ("info", "notable", "urgent")
        for step in response["steps"]:
            assert {"label", "formula", "result", "source"} <= set(step)
            assert step["source"]
    else:
        assert response["errors"], "a failure names at least one error"
        for error in response["errors"]:
            assert {"field", "code", "message"} <= set(error) <= {"field", "code", "message", "suggest"}
            assert error["code"] in ERROR_CODES
            assert error["field"] and error["message"]
    assert_finite_everywhere(response)
    json.dumps(response, allow_nan=False)


def codes(response: dict) -> list[str]:
    return [e["code"] for e in response["errors"]]


def test_convert_success_shape():
    response = bridge.handle_obj(CONVERT)
    check_shape(response)
    assert response["ok"] is True and response["calc"] == "convert"
    # Worked example UC-01: 6.5 kPa = 48.7540 mmHg (exact conventional mmHg).
    assert response["outputs"]["result"] == {"value": pytest.approx(48.754, abs=1e-3), "unit": "mmHg"}
    assert response["steps"][0]["output"] == "result"


def test_handle_text_round_trip():
    text = bridge.handle(json.dumps(CONVERT))
    assert json.loads(text) == bridge.handle_obj(CONVERT)


def test_convert_with_substance():
    request = {
        "calc": "convert",
        "inputs": {"quantity": {"value": 180, "unit": "mg/dL"}, "to": "mmol/L", "substance": "glucose"},
    }
    response = bridge.handle_obj(request)
    # Worked example UC-02: glucose 180 mg/dL = 9.9913 mmol/L (molar mass 180.156, common practice).
    assert response["outputs"]["result"]["value"] == pytest.approx(9.9913, abs=1e-3)


@pytest.mark.parametrize(
    ("request_obj", "code", "field"),
    [
        ({"calc": "convert", "inputs": {"to": "mmHg"}}, "missing", "inputs.quantity"),
        (
            {"calc": "convert", "inputs": {"quantity": {"value": "6.5", "unit": "kPa"}, "to": "mmHg"}},
            "not_a_number",
            "inputs.quantity.value",
        ),
        (
            {"calc": "convert", "inputs": {"quantity": {"value": 6.5, "unit": "kpa!"}, "to": "mmHg"}},
            "bad_unit",
            "inputs.quantity.unit",
        ),
        (
            {"calc": "convert", "inputs": {"quantity": {"value": 6.5, "unit": "kPa"}, "to": "degC"}},
            "bad_unit",
            "inputs.to",
        ),
        (
            {"calc": "convert", "inputs": {"quantity": {"value": 100, "unit": "mg/dL"}, "to": "mmol/L"}},
            "missing",
            "inputs.substance",
        ),
        ({"calc": "no_such_thing", "inputs": {}}, "unknown_calc", "calc"),
        ({"inputs": {}}, "missing", "calc"),
        ({"calc": 7, "inputs": {}}, "bad_request", "calc"),
        ({"calc": "convert", "inputs": []}, "bad_request", "inputs"),
        (
            {"calc": "convert", "inputs": {}, "options": {"pressure_unit": "atm"}},
            "bad_unit",
            "options.pressure_unit",
        ),
        ({"calc": "convert", "inputs": {}, "options": {"colour": "red"}}, "bad_request", "options.colour"),
        ({"calc": "convert", "inputs": {}, "extra": 1}, "bad_request", "request.extra"),
        (
            {"calc": "convert", "inputs": {**CONVERT["inputs"], "quantiy": 1}},
            "unknown_input",
            "inputs.quantiy",
        ),
    ],
)
def test_error_codes_name_their_field(request_obj, code, field):
    response = bridge.handle_obj(request_obj)
    check_shape(response)
    assert response["ok"] is False
    assert (code, field) in [(e["code"], e["field"]) for e in response["errors"]], response["errors"]


def test_unknown_input_suggests_the_near_name():
    response = bridge.handle_obj({"calc": "convert", "inputs": {**CONVERT["inputs"], "quantiy": 1}})
    assert "Did you mean 'quantity'?" in response["errors"][0]["message"]


@pytest.mark.parametrize(
    "text",
    [
        "",
        "[1",
        "{",
        "nul",
        '{"calc": "convert", "inputs": {"q": NaN}}',
        '{"calc": "convert", "inputs": {"q": Infinity}}',
    ],
)
def test_bad_json_is_a_bad_request(text):
    response = json.loads(bridge.handle(text))
    check_shape(response)
    assert codes(response) == ["bad_request"]


def test_non_object_requests():
    for obj in (None, 3, "convert", [CONVERT]):
        response = bridge.handle_obj(obj)
        check_shape(response)
        assert codes(response) == ["bad_request"]
    assert codes(json.loads(bridge.handle(None))) == ["bad_request"]  # type: ignore[arg-type]


def test_huge_request_is_refused_without_parsing():
    text = json.dumps({"calc": "convert", "inputs": {"junk": "x" * (bridge.MAX_REQUEST_CHARS + 1)}})
    response = json.loads(bridge.handle(text))
    assert codes(response) == ["bad_request"] and "too large" in response["errors"][0]["message"]


def test_deeply_nested_junk_does_not_raise():
    text = "[" * 100_000 + "]" * 100_000
    response = json.loads(bridge.handle(text))
    assert codes(response) == ["bad_request"]


# A probe calculation exercising every accessor, wired in through the resolver for these tests only.
def _probe(inputs: Inputs, report: Report) -> None:
    pco2 = inputs.quantity(
        "pco2", unit="mmHg", low=10, high=250, label="PCO2", required=True, plausible_word="is not survivable"
    )
    fio2 = inputs.fraction("fio2", default=0.21, label="FiO2")
    spo2 = inputs.percent("spo2", low=50, high=100, label="SpO2")
    ph = inputs.number("ph", low=6.5, high=8.0, label="pH")
    inputs.choice("sample", ("arterial", "venous"), default="arterial")
    inputs.flag("risk")
    if inputs.given("boom"):
        inputs.read.add("boom")
    inputs.finish()
    if inputs.raw.get("boom") == "inconsistent":
        raise InputError("inputs.boom", "inconsistent", "disagrees with pco2", code="inconsistent")
    if inputs.raw.get("boom") == "crash":
        raise RuntimeError("a bug")
    if inputs.raw.get("boom") == "nan":
        report.put("bad", float("nan"))
    report.pressure("pco2", pco2)
    report.put("fio2", fio2)
    if spo2 is not None:
        report.put("spo2", spo2)
    if ph is not None:
        report.put("ph", ph)


@pytest.fixture
def probe(monkeypatch):
    real = bridge._resolve
    monkeypatch.setattr(bridge, "_resolve", lambda name: _probe if name == "probe" else real(name))

    def call(inputs, **options):
        request = {"calc": "probe", "inputs": inputs}
        if options:
            request["options"] = options
        response = bridge.handle_obj(request)
        check_shape(response)
        return response

    return call


def test_probe_reads_and_converts(probe):
    response = probe({"pco2": {"value": 6.0, "unit": "kPa"}, "fio2": {"value": 40, "unit": "%"}, "spo2": 92})
    assert response["ok"]
    # 6.0 kPa = 45.0037 mmHg (bipm2019, derived from the exact mmHg)
    assert response["outputs"]["pco2"]["value"] == pytest.approx(45.0037, abs=1e-4)
    assert response["outputs"]["fio2"] == pytest.approx(0.40)
    response = probe({"pco2": {"value": 45, "unit": "mmHg"}}, pressure_unit="kPa")
    assert response["outputs"]["pco2"] == {"value": pytest.approx(5.9995, abs=1e-4), "unit": "kPa"}
    assert response["display"]["pco2"] == 1  # kPa to one decimal (docs/bridge.md, display)


@pytest.mark.parametrize(
    ("inputs", "code", "field", "phrase"),
    [
        ({}, "missing", "inputs.pco2", "required"),
        ({"pco2": 45}, "bad_unit", "inputs.pco2", "needs a unit"),
        ({"pco2": {"value": 45}}, "bad_unit", "inputs.pco2", "needs a unit"),
        ({"pco2": {"unit": "mmHg"}}, "missing", "inputs.pco2", "no value"),
        ({"pco2": {"value": True, "unit": "mmHg"}}, "not_a_number", "inputs.pco2", "number"),
        ({"pco2": {"value": 45, "unit": "mmHg", "x": 1}}, "bad_request", "inputs.pco2", "unexpected"),
        ({"pco2": {"value": 45, "unit": "mmhg"}}, "bad_unit", "inputs.pco2", "Did you mean 'mmHg'?"),
        ({"pco2": {"value": 5.3, "unit": "mmHg"}}, "implausible", "inputs.pco2", "did you mean 5.3 kPa?"),
        ({"pco2": {"value": 45, "unit": "kPa"}}, "implausible", "inputs.pco2", "did you mean 45 mmHg?"),
        ({"pco2": {"value": 900, "unit": "mmHg"}}, "out_of_range", "inputs.pco2", "not survivable"),
        ({"pco2": {"value": 40, "unit": "mmHg"}, "fio2": 40}, "implausible", "inputs.fio2", "40 %"),
        ({"pco2": {"value": 40, "unit": "mmHg"}, "fio2": 0.1}, "out_of_range", "inputs.fio2", "0.21"),
        ({"pco2": {"value": 40, "unit": "mmHg"}, "spo2": 0.92}, "implausible", "inputs.spo2", "92 %"),
        ({"pco2": {"value": 40, "unit": "mmHg"}, "ph": 74}, "out_of_range", "inputs.ph", "6.5"),
        ({"pco2": {"value": 40, "unit": "mmHg"}, "ph": "7.4"}, "not_a_number", "inputs.ph", "'7.4'"),
        (
            {"pco2": {"value": 40, "unit": "mmHg"}, "sample": "Venous"},
            "bad_request",
            "inputs.sample",
            "'venous'",
        ),
        (
            {"pco2": {"value": 40, "unit": "mmHg"}, "risk": "yes"},
            "bad_request",
            "inputs.risk",
            "true or false",
        ),
        (
            {"pco2": {"value": 40, "unit": "mmHg"}, "boom": "inconsistent"},
            "inconsistent",
            "inputs.boom",
            "disagrees",
        ),
        ({"pco2": {"value": 40, "unit": "mmHg"}, "boom": "crash"}, "internal_error", "request", "internal"),
        ({"pco2": {"value": 40, "unit": "mmHg"}, "boom": "nan"}, "internal_error", "request", "internal"),
    ],
)
def test_every_error_code(probe, inputs, code, field, phrase):
    response = probe(inputs)
    assert response["ok"] is False
    matching = [e for e in response["errors"] if e["code"] == code and e["field"] == field]
    assert matching, response["errors"]
    assert phrase.lower() in matching[0]["message"].lower()


def test_all_problems_reported_at_once(probe):
    response = probe({"pco2": {"value": 5.3, "unit": "mmHg"}, "fio2": 40, "ph": "x", "bogus": 1})
    assert sorted(codes(response)) == ["implausible", "implausible", "not_a_number", "unknown_input"]


def test_null_means_not_given(probe):
    response = probe({"pco2": {"value": 40, "unit": "mmHg"}, "fio2": None, "spo2": None})
    assert response["ok"] and response["outputs"]["fio2"] == 0.21


def test_every_contract_error_code_is_known():
    # docs/bridge.md: error codes at least these.
    for code in (
        "missing",
        "not_a_number",
        "bad_unit",
        "out_of_range",
        "implausible",
        "inconsistent",
        "unknown_calc",
        "bad_request",
    ):
        assert code in ERROR_CODES


def test_registry_names_every_contract_calculation():
    # docs/bridge.md: the calculations the contract requires.
    required = {
        "blood_gas",
        "alveolar_gas",
        "oxygen_content",
        "ventilation",
        "altitude",
        "temperature_correction",
        "oxygen_supply",
        "oxygen_dissociation_curve",
        "altitude_profile",
        "uncertainty",
        "convert",
    }
    assert required <= set(bridge.CALCULATIONS)


def test_import_is_cheap_and_numpy_free():
    code = "import sys, tidewell, tidewell.bridge; print('numpy' in sys.modules)"
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True)
    assert out.stdout.strip() == "False"


def test_an_unknown_calculation_lists_every_name_without_loading_numpy():
    # the message lists the calculations found, without importing their modules (the uncertainty module
    # would load numpy: seconds in the browser, for an error message)
    code = (
        "import sys, json, tidewell.bridge as b;"
        "r = b.handle_obj({'calc': 'nope', 'inputs': {}});"
        "print(json.dumps([r['errors'][0]['message'], 'numpy' in sys.modules]))"
    )
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True)
    message, numpy_loaded = json.loads(out.stdout)
    assert numpy_loaded is False
    assert all(name in message for name in bridge.CALCULATIONS), message
    assert bridge.available() == list(bridge.CALCULATIONS)


json_leaf = st.one_of(st.none(), st.booleans(), st.integers(), st.floats(), st.text(max_size=20))
json_value = st.recursive(
    json_leaf,
    lambda inner: st.one_of(
        st.lists(inner, max_size=4), st.dictionaries(st.text(max_size=8), inner, max_size=4)
    ),
    max_leaves=12,
)


@settings(max_examples=300, deadline=None)
@given(calc=st.sampled_from([*bridge.CALCULATIONS, "x", ""]), inputs=json_value, options=json_value)
def test_bridge_never_raises_and_never_emits_nan(calc, inputs, options):
    response = bridge.handle_obj({"calc": calc, "inputs": inputs, "options": options})
    check_shape(response)
