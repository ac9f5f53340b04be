"""The machine-checkable contract: schema/bridge.schema.json and the check every bridge response gets.

- the schema is a valid JSON Schema (draft 2020-12) and names what the contract requires (docs/bridge.md);
- real responses of every calculation validate, in both pressure units, and deliberately wrong ones fail;
- the session hook (tests/conftest.py) is registered, runs on ``handle`` and ``handle_obj``, and its
  AssertionError reaches the test;
- the request schema knows exactly the inputs each calculation reads;
- the shortcuts that keep the hook cheap (steps and display maps validated in a normal form, curves cut to
  their extremes) agree with plain jsonschema.
"""

from __future__ import annotations

import copy
import json
from pathlib import Path

import pytest

import conftest
from conftest import check_response, known_inputs, request_problems, schema, schema_problems
from tidewell import bridge
from tidewell.fields import Inputs

SEEDS: dict[str, list[dict]] = json.loads(
    (Path(__file__).parent / "fuzz_seeds.json").read_text(encoding="utf-8")
)
AVAILABLE = bridge.available()

#: the outputs the contract requires of each calculation (docs/bridge.md)
CONTRACT_OUTPUTS = {
    "blood_gas": [
        "ph_status",
        "disorders",
        "hco3",
        "hco3_computed",
        "consistency",
        "standard_base_excess",
        "expected_pco2",
        "expected_hco3",
        "anion_gap",
        "anion_gap_corrected",
        "delta_ratio",
        "osmolar_gap",
        "strong_ion_gap",
        "pao2_alveolar",
        "a_a_gradient",
        "a_a_expected_upper",
        "pf_ratio",
        "respiratory_failure",
        "spo2_target",
        "pco2_target",
        "baseline_pco2_source",
    ],
    "alveolar_gas": [
        "pio2",
        "pao2_alveolar",
        "a_a_gradient",
        "a_over_A",
        "pf_ratio",
        "pf_ratio_altitude_corrected",
        "a_a_expected_upper",
    ],
    "oxygen_content": ["sao2", "cao2", "do2"],
    "ventilation": [
        "minute_ventilation",
        "alveolar_ventilation",
        "vd_vt",
        "vco2",
        "predicted_body_weight",
        "vt_per_kg_pbw",
        "to_target",
        "pco2_estimated_now",
        "mechanisms",
    ],
    "altitude": [
        "pb",
        "pio2",
        "pao2_alveolar",
        "fio2_equivalent",
        "po2_predicted",
        "max_altitude",
        "trapped_gas_volume_at_altitude",
    ],
    "temperature_correction": ["ph", "pco2", "po2"],
    "oxygen_supply": ["available_litres", "required_litres", "minutes_available", "sufficient"],
    "oxygen_dissociation_curve": ["po2", "so2_standard", "so2_patient", "p50_patient", "point"],
    "altitude_profile": ["altitude", "pao2_alveolar", "po2_predicted"],
    "uncertainty": ["probabilities", "intervals", "draws"],
    "convert": ["result"],
    "course": ["readings", "intervals", "response", "niv_response"],
}
#: the inputs the contract requires of each calculation (docs/bridge.md)
CONTRACT_INPUTS = {
    "blood_gas": "ph pco2 hco3 po2 fio2 sample base_excess na k cl albumin lactate glucose urea bun "
    "phosphate measured_osmolality hb spo2 age temperature altitude pb baseline_pco2 hypercapnia_risk",
    "alveolar_gas": "fio2 pco2 po2 pb altitude rq age",
    "oxygen_content": "hb spo2 po2 cardiac_output",
    "ventilation": "rr vt pco2 vd weight height sex vco2 temperature etco2 peco2 target_pco2 etco2_now",
    "altitude": "altitude fio2 pco2 po2 origin_altitude origin_pb target_po2 fio2_max trapped_gas_volume",
    "temperature_correction": "ph pco2 po2 temperature",
    "oxygen_supply": "cylinder_water_capacity cylinder_pressure cylinders flow duration reserve_fraction "
    "residual_pressure",
    "oxygen_dissociation_curve": "temperature ph pco2 base_excess po2",
    "altitude_profile": "altitude fio2 pco2 po2 origin_altitude origin_pb target_po2 fio2_max "
    "trapped_gas_volume ceiling",
    "uncertainty": "sample errors draws seed",
    "convert": "quantity to substance",
    "course": "samples hypercapnia_risk previous_hypercapnic_failure baseline_pco2 age",
}


def answer(calc: str, i: int = 0, unit: str = "mmHg") -> tuple[dict, dict]:
    request = {"calc": calc, "inputs": copy.deepcopy(SEEDS[calc][i]), "options": {"pressure_unit": unit}}
    return request, bridge.handle_obj(request)


# ---------------------------------------------------------------------------------------------------------
# the schema itself


def test_schema_is_valid_draft_2020_12():
    from jsonschema import Draft202012Validator

    contents = schema()
    assert contents["$schema"] == "https://json-schema.org/draft/2020-12/schema"
    Draft202012Validator.check_schema(contents)


@pytest.mark.parametrize("calc", sorted(CONTRACT_OUTPUTS))
def test_schema_names_every_contract_output_and_input(calc):
    outputs = schema()["$defs"]["outputs"]["$defs"][calc]["properties"]
    assert set(CONTRACT_OUTPUTS[calc]) <= set(outputs)
    assert set(CONTRACT_INPUTS[calc].split()) <= known_inputs(calc)
    assert calc in bridge.CALCULATIONS


@pytest.mark.parametrize("calc", [c for c in sorted(bridge.CALCULATIONS) if c in AVAILABLE])
def test_request_schema_knows_exactly_the_inputs_each_calculation_reads(calc, monkeypatch):
    read: set[str] = set()
    finish = Inputs.finish

    def spy(self, known=()):
        if self.prefix == "inputs":  # the request's own inputs (not a sample read inside a course)
            read.update(self.read, known)
        return finish(self, known)

    monkeypatch.setattr(Inputs, "finish", spy)
    bridge.handle_obj({"calc": calc, "inputs": {}})
    assert read == set(known_inputs(calc)), (
        sorted(read - known_inputs(calc)),
        sorted(known_inputs(calc) - read),
    )


@pytest.mark.parametrize(("calc", "i"), [(c, i) for c in sorted(SEEDS) for i in range(len(SEEDS[c]))])
def test_seed_requests_fit_the_request_schema(calc, i):
    assert (
        request_problems({"calc": calc, "inputs": SEEDS[calc][i], "options": {"pressure_unit": "kPa"}}) == []
    )


@pytest.mark.parametrize(
    "request_obj",
    [
        {"calc": "convert", "inputs": {"quantity": {"value": 1, "unit": "kPa"}, "to": "mmHg"}, "extra": 1},
        {"calc": "no_such_calc", "inputs": {}},
        {"calc": "alveolar_gas", "inputs": {"fio2": 0.21, "pco2": 40}},  # a pressure without a unit
        {"calc": "alveolar_gas", "inputs": {"fio2": 0.21, "pco2": {"value": 40, "unit": "mmHg"}, "pc02": 1}},
        {"calc": "alveolar_gas", "inputs": {"fio2": 0.21, "pco2": {"value": "40", "unit": "mmHg"}}},
        {"calc": "alveolar_gas", "inputs": {"fio2": 0.21, "pco2": {"value": 40, "unit": "mmhg"}}},
        {"calc": "alveolar_gas", "inputs": {"fio2": 0.21, "pco2": None}},  # a required input sent as null
        {"calc": "altitude", "inputs": {"fio2": 0.21}},  # neither altitude nor pb
        {"calc": "altitude", "inputs": {"altitude": {"value": 2, "unit": "cm"}, "fio2": 0.21}},
        {
            "calc": "ventilation",
            "inputs": {
                "rr": 12,
                "vt": {"value": 500, "unit": "mL"},
                "pco2": {"value": 40, "unit": "mmHg"},
                "sex": "male",
            },
        },
        {"calc": "oxygen_content", "inputs": {"hb": {"value": 12, "unit": "g/dL"}}},
        {
            "calc": "blood_gas",
            "inputs": {"ph": 7.4, "pco2": {"value": 40, "unit": "mmHg"}, "sample": "Arterial"},
        },
        {
            "calc": "blood_gas",
            "inputs": {"ph": 7.4, "pco2": {"value": 40, "unit": "mmHg"}},
            "options": {"u": 1},
        },
    ],
)
def test_requests_the_schema_refuses_are_refused_by_the_bridge(request_obj):
    assert request_problems(request_obj), "the request schema should refuse this request"
    assert bridge.handle_obj(request_obj)["ok"] is False


# ---------------------------------------------------------------------------------------------------------
# real responses validate; wrong ones do not


@pytest.mark.parametrize("unit", ["mmHg", "kPa"])
@pytest.mark.parametrize(("calc", "i"), [(c, i) for c in AVAILABLE for i in range(len(SEEDS[c]))])
def test_every_seed_answers_and_validates(calc, i, unit):
    request, response = answer(calc, i, unit)
    assert response["ok"], response.get("errors")
    assert schema_problems(response) == []
    check_response(request, response)  # the hook did this already; done here explicitly as well


def _set(path: str, value):
    """An edit of a response: set ``path`` (dotted, list indexes as numbers) to ``value``; KeyError deletes
    it (an output deleted from ``outputs`` loses its ``display`` entry too)."""

    def edit(response):
        target = response
        *parents, last = [int(k) if k.isdigit() else k for k in path.split(".")]
        for key in parents:
            target = target[key]
        if value is KeyError:
            del target[last]
            if parents == ["outputs"]:
                response["display"].pop(last, None)
        else:
            target[last] = value

    return edit


WRONG = [
    # (calc, seed, pressure unit, edit, what the schema or the check should say)
    ("alveolar_gas", 0, "kPa", _set("outputs.pio2.unit", "mmHg"), "'kPa' was expected"),
    ("alveolar_gas", 0, "mmHg", _set("outputs.pio2.unit", "kPa"), "'mmHg' was expected"),
    ("alveolar_gas", 0, "mmHg", _set("outputs.pao2_alveolar", KeyError), "'pao2_alveolar' is a required"),
    ("alveolar_gas", 0, "mmHg", _set("outputs.pio2", 150.0), "is not of type 'object'"),
    ("alveolar_gas", 0, "mmHg", _set("outputs.pio2.value", "150"), "is not of type 'number'"),
    ("blood_gas", 1, "kPa", _set("outputs.pf_ratio.unit", "kPa"), "'mmHg' was expected"),
    ("blood_gas", 1, "mmHg", _set("outputs.ph_status", "acidosis"), "is not one of"),
    ("blood_gas", 1, "mmHg", _set("outputs.disorders.0.code", "mixed"), "is not one of"),
    ("blood_gas", 1, "mmHg", _set("outputs.disorders.0.role", "main"), "is not one of"),
    ("blood_gas", 2, "mmHg", _set("outputs.disorders.0.chronicity", "acute"), "None was expected"),
    ("blood_gas", 1, "mmHg", _set("outputs.hco3.unit", "mEq/L"), "'mmol/L' was expected"),
    ("blood_gas", 1, "mmHg", _set("outputs.spo2_target.high", 101), "is greater than the maximum"),
    ("oxygen_content", 0, "mmHg", _set("outputs.cao2.unit", "mL/L"), "'mL/dL' was expected"),
    ("oxygen_content", 0, "mmHg", _set("outputs.sao2", 100.5), "is greater than the maximum"),
    ("ventilation", 1, "mmHg", _set("outputs.mechanisms.other", 0.0), "Additional properties"),
    ("ventilation", 1, "mmHg", _set("outputs.vd_vt", 1.2), "is greater than the maximum"),
    (
        "oxygen_dissociation_curve",
        1,
        "mmHg",
        _set("outputs.so2_patient.3", 120.0),
        "greater than the maximum",
    ),
    ("oxygen_dissociation_curve", 1, "kPa", _set("outputs.po2.unit", "mmHg"), "'kPa' was expected"),
    ("altitude_profile", 0, "mmHg", _set("outputs.altitude", [0.0, 100.0]), "is not of type 'object'"),
    (
        "altitude_profile",
        0,
        "mmHg",
        _set("outputs.pao2_alveolar.at_fio2.value.0", -1.0),
        "less than the minimum",
    ),
    ("altitude", 0, "mmHg", _set("outputs.max_altitude.unit", "mmHg"), "is not one of"),
    ("oxygen_supply", 0, "mmHg", _set("outputs.sufficient", "yes"), "is not of type 'boolean'"),
    ("convert", 0, "mmHg", _set("outputs.result.unit", ""), "should be non-empty"),
    ("temperature_correction", 0, "mmHg", _set("findings.0.severity", "high"), "is not one of"),
    ("temperature_correction", 0, "mmHg", _set("findings.0.code", "Alpha-Stat"), "does not match"),
    ("temperature_correction", 0, "mmHg", _set("steps.0.source", KeyError), "'source' is a required"),
    ("temperature_correction", 0, "mmHg", _set("steps.0.result", {"value": 1}), "is not valid under any"),
    ("temperature_correction", 0, "mmHg", _set("steps.0.label", ""), "should be non-empty"),
    ("temperature_correction", 0, "mmHg", _set("display.ph", 9), "is greater than the maximum"),
    ("temperature_correction", 0, "mmHg", _set("display.ph", 2.5), "is not of type 'integer'"),
    ("temperature_correction", 0, "mmHg", _set("options.pressure_unit", "atm"), "is not one of"),
    ("temperature_correction", 0, "mmHg", _set("summary", "text"), "is not of type 'array'"),
    ("temperature_correction", 0, "mmHg", _set("debug", True), "Additional properties"),
    ("temperature_correction", 0, "mmHg", _set("ok", "true"), "False was expected"),
]


@pytest.mark.parametrize(
    ("calc", "i", "unit", "edit", "phrase"), WRONG, ids=[f"{w[0]}-{w[4][:24]}" for w in WRONG]
)
def test_wrong_responses_break_the_schema(calc, i, unit, edit, phrase):
    request, response = answer(calc, i, unit)
    wrong = copy.deepcopy(response)
    edit(wrong)
    problems = schema_problems(wrong)
    assert any(phrase in p for p in problems), problems
    with pytest.raises(AssertionError):
        check_response(request, wrong)


FAILURE = {"ok": False, "calc": "blood_gas", "engine": bridge.ENGINE}
REQUEST = {"calc": "blood_gas", "inputs": {"ph": 7.4}}


@pytest.mark.parametrize(
    ("errors", "phrase"),
    [
        ([], "should be non-empty"),
        ([{"field": "ph", "code": "missing", "message": "x"}], "does not match"),
        ([{"field": "inputs.ph", "code": "wrong", "message": "x"}], "is not one of"),
        ([{"field": "inputs.ph", "code": "missing"}], "'message' is a required"),
        ([{"field": "inputs.ph", "code": "missing", "message": ""}], "should be non-empty"),
    ],
)
def test_wrong_failures_break_the_schema(errors, phrase):
    response = {**FAILURE, "errors": errors}
    assert any(phrase in p for p in schema_problems(response)), schema_problems(response)
    with pytest.raises(AssertionError):
        check_response(REQUEST, response)


@pytest.mark.parametrize(
    ("response", "request_obj", "phrase"),
    [
        # a field that is no path into the request
        (
            {**FAILURE, "errors": [{"field": "inputs.phh", "code": "missing", "message": "x"}]},
            REQUEST,
            "name a field",
        ),
        (
            {**FAILURE, "errors": [{"field": "options.x", "code": "bad_request", "message": "x"}]},
            REQUEST,
            "name",
        ),
        # internal_error from a calculation of the registry is a core bug
        (
            {**FAILURE, "errors": [{"field": "request", "code": "internal_error", "message": "x"}]},
            REQUEST,
            "core bug",
        ),
        # failure.calc must be the request's
        (
            {**FAILURE, "calc": "convert", "errors": [{"field": "calc", "code": "missing", "message": "x"}]},
            REQUEST,
            "calc",
        ),
    ],
)
def test_the_check_goes_beyond_the_schema_for_failures(response, request_obj, phrase):
    assert schema_problems(response) == []
    with pytest.raises(AssertionError, match=phrase):
        check_response(request_obj, response)


@pytest.mark.parametrize(
    ("calc", "i", "unit", "edit", "phrase"),
    [
        ("alveolar_gas", 0, "mmHg", _set("outputs.pb.value", float("nan")), "not finite"),
        ("alveolar_gas", 0, "mmHg", _set("steps.0.result", float("inf")), "not finite"),
        ("alveolar_gas", 0, "mmHg", _set("outputs.a_a_gradient", KeyError), "po2 given"),
        ("alveolar_gas", 0, "mmHg", _set("outputs.a_a_expected_upper", KeyError), "age given"),
        ("alveolar_gas", 0, "kPa", _set("outputs.pao2_alveolar_full.unit", "mmHg"), "asked for kPa"),
        ("alveolar_gas", 0, "mmHg", _set("outputs.pb", {"value": 1, "unit": "mmHg", "sd": 1}), "quantity"),
        ("alveolar_gas", 0, "mmHg", _set("display.not_an_output", 1), "display"),
        ("alveolar_gas", 0, "mmHg", _set("steps.0.source_keys", ["no_such_reference"]), "bibliography"),
        ("blood_gas", 1, "mmHg", _set("outputs.ph_status", "normal"), "ph_status"),
        ("blood_gas", 1, "mmHg", _set("outputs.anion_gap", KeyError), "na and cl given"),
        ("blood_gas", 1, "mmHg", _set("outputs.pco2_target", KeyError), "respiratory acidosis"),
        ("blood_gas", 1, "mmHg", _set("outputs.disorders.0.role", "concurrent"), "roles"),
        ("oxygen_content", 0, "mmHg", _set("outputs.do2", KeyError), "cardiac_output given"),
        ("oxygen_dissociation_curve", 1, "mmHg", _set("outputs.point", KeyError), "po2 given"),
        ("oxygen_dissociation_curve", 1, "mmHg", _set("outputs.so2_patient", [1.0, 2.0]), "lengths"),
        ("ventilation", 1, "mmHg", _set("outputs.to_target", KeyError), "target_pco2 given"),
        ("ventilation", 1, "mmHg", _set("outputs.mechanisms.ventilation", 0.9), "sum to 1"),
        ("ventilation", 1, "mmHg", _set("outputs.pco2_estimated_now", KeyError), "etco2_now"),
        ("temperature_correction", 0, "mmHg", _set("outputs.po2", KeyError), "po2 given"),
        (
            "altitude",
            0,
            "mmHg",
            _set("outputs.trapped_gas_volume_at_altitude", KeyError),
            "trapped_gas_volume",
        ),
        ("altitude", 0, "mmHg", _set("outputs.max_altitude", KeyError), "target_po2"),
        ("altitude_profile", 1, "mmHg", _set("outputs.altitude.value", [0.0, 1.0]), "length"),
        ("convert", 0, "mmHg", _set("outputs.result.unit", "kPa"), "unit asked for"),
        ("convert", 0, "kPa", _set("options.pressure_unit", "mmHg"), "pressure_unit"),
        (
            "temperature_correction",
            0,
            "mmHg",
            _set("findings", [{"code": "a", "severity": "info", "text": "t"}] * 2),
            "repeated",
        ),
    ],
)
def test_the_check_goes_beyond_the_schema_for_successes(calc, i, unit, edit, phrase):
    request, response = answer(calc, i, unit)
    wrong = copy.deepcopy(response)
    edit(wrong)
    with pytest.raises(AssertionError, match=phrase):
        check_response(request, wrong)


# ---------------------------------------------------------------------------------------------------------
# the session hook


def test_the_hook_is_registered_and_counts():
    assert conftest._hook in bridge.RESPONSE_HOOKS
    before = conftest.BRIDGE_CALLS["checked"]
    bridge.handle_obj({"calc": "convert", "inputs": {}})
    bridge.handle('{"calc": "convert"')
    assert conftest.BRIDGE_CALLS["checked"] == before + 2


def _broken_calc(inputs, report):
    """A calculation that answers blood_gas with a wrong output type (only reachable in this test)."""
    inputs.finish(known=tuple(inputs.raw))
    report.put("ph_status", 7.1)


@pytest.mark.parametrize("via", ["handle_obj", "handle"])
def test_a_wrong_response_fails_the_test_that_made_it(via, monkeypatch):
    real = bridge._resolve
    monkeypatch.setattr(bridge, "_resolve", lambda name: _broken_calc if name == "blood_gas" else real(name))
    request = {"calc": "blood_gas", "inputs": {"ph": 7.1}}
    with pytest.raises(AssertionError, match="breaks schema"):
        if via == "handle":
            bridge.handle(json.dumps(request))
        else:
            bridge.handle_obj(request)


def test_an_internal_error_of_a_real_calculation_fails_the_test(monkeypatch):
    def crash(inputs, report):
        raise ZeroDivisionError("a core bug")

    real = bridge._resolve
    monkeypatch.setattr(bridge, "_resolve", lambda name: crash if name == "convert" else real(name))
    with pytest.raises(AssertionError, match="internal_error"):
        bridge.handle_obj({"calc": "convert", "inputs": {}})


# ---------------------------------------------------------------------------------------------------------
# the shortcuts of the hook agree with plain jsonschema

#: the step schema the normal form of conftest.normalised_step relies on; change both together
STEP_SCHEMA = {
    "type": "object",
    "required": ["label", "formula", "result", "source"],
    "additionalProperties": False,
    "properties": {
        "label": {"type": "string", "minLength": 1},
        "formula": {"type": "string"},
        "result": {"anyOf": [{"type": ["number", "string", "boolean"]}, {"$ref": "#/$defs/quantity"}]},
        "source": {"type": "string", "minLength": 1},
        "source_keys": {
            "type": "array",
            "items": {"type": "string", "pattern": "^[a-z0-9_]+$"},
            "minItems": 1,
        },
        "output": {"type": "string", "minLength": 1},
        "inputs": {"type": "object"},
    },
}
DISPLAY_SCHEMA = {"type": "object", "additionalProperties": {"type": "integer", "minimum": 0, "maximum": 6}}


def test_the_step_and_display_schemas_are_the_ones_the_hook_normalises():
    defs = schema()["$defs"]
    assert defs["step"] == STEP_SCHEMA
    assert defs["quantity"]["properties"] == {
        "value": {"type": "number"},
        "unit": {"type": "string", "minLength": 1},
    }
    assert defs["success"]["properties"]["display"] == DISPLAY_SCHEMA


def test_number_lists_are_bounded_only_by_item_limits():
    # conftest._short_lists cuts a list of numbers to [min, max]: sound only while no array keyword but
    # type, items and minItems <= 2 appears anywhere in the schema
    seen = []

    def walk(node):
        if isinstance(node, dict):
            for key in ("maxItems", "uniqueItems", "contains", "prefixItems", "minContains", "maxContains"):
                assert key not in node, node
            if "minItems" in node:
                seen.append(node["minItems"])
            for value in node.values():
                walk(value)
        elif isinstance(node, list):
            for value in node:
                walk(value)

    walk(schema())
    assert seen and max(seen) <= 2


STEPS = [
    {"label": "a", "formula": "f", "result": 1.5, "source": "s"},
    {
        "label": "a",
        "formula": "",
        "result": {"value": 2, "unit": "mmHg"},
        "source": "s",
        "source_keys": ["k"],
    },
    {"label": "", "formula": "f", "result": 1.5, "source": "s"},
    {"label": "a", "formula": 3, "result": 1.5, "source": "s"},
    {"label": "a", "formula": "f", "result": None, "source": "s"},
    {"label": "a", "formula": "f", "result": [1], "source": "s"},
    {"label": "a", "formula": "f", "result": {"value": "2", "unit": "mmHg"}, "source": "s"},
    {"label": "a", "formula": "f", "result": {"value": 2, "unit": ""}, "source": "s"},
    {"label": "a", "formula": "f", "result": {"value": 2}, "source": "s"},
    {"label": "a", "formula": "f", "result": {"value": 2, "unit": "x", "sd": 1}, "source": "s"},
    {"label": "a", "formula": "f", "result": True, "source": "s", "output": ""},
    {"label": "a", "formula": "f", "result": "word", "source": "s", "inputs": []},
    {"label": "a", "formula": "f", "result": 1, "source": "s", "inputs": {"x": float("nan")}},
    {"label": "a", "formula": "f", "result": 1, "source": "s", "source_keys": ["Bad Key"]},
    {"label": "a", "formula": "f", "result": 1, "source": "s", "source_keys": []},
    {"label": "a", "formula": "f", "result": 1, "source": ""},
    {"label": "a", "formula": "f", "result": 1},
    {"label": "a", "formula": "f", "result": 1, "source": "s", "extra": 1},
    "not a step",
]


@pytest.mark.parametrize("step", STEPS)
def test_a_step_and_its_normal_form_pass_or_fail_together(step):
    validator = conftest._validators()["step"]
    assert validator.is_valid(step) == validator.is_valid(conftest.normalised_step(step))


@pytest.mark.parametrize(
    "calc", ["oxygen_dissociation_curve", "altitude_profile", "blood_gas", "ventilation"]
)
def test_the_shortcuts_agree_with_plain_validation_on_real_and_broken_responses(calc):
    _, response = answer(calc, 1)
    full = conftest._validators()["response"]
    assert full.is_valid(response) and schema_problems(response) == []
    broken = copy.deepcopy(response)
    broken["steps"][0]["label"] = ""
    broken["display"][next(iter(broken["display"]))] = -1
    assert not full.is_valid(broken)
    assert len(schema_problems(broken)) == len(list(full.iter_errors(broken))) == 2
