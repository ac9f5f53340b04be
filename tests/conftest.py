"""Shared test helpers: the worked cases, and the contract check run on every bridge response.

- ``load_cases`` / ``cases``: the worked cases of tests/cases/reference_cases.json, by id;
- ``assert_finite_everywhere``: no NaN or infinity anywhere in a value;
- ``check_response(request, response)``: the whole contract of one response (JSON Schema, no NaN or
  infinity, every error names its field, the outputs docs/bridge.md requires whenever their inputs were
  given);
  registered for the whole session in ``tidewell.bridge.RESPONSE_HOOKS``, so every test that calls
  ``handle`` or ``handle_obj`` checks every response it gets. An ``AssertionError`` from the hook
  propagates out of the bridge call into the test (hooks run outside the bridge's catch-all);
- ``schema_problems(response)``, ``request_problems(request)``, ``request_fits(request)``: the schema alone;
- ``orphan_steps(response)``: steps naming an output that is not there (checked by the fuzz tests);
- ``BRIDGE_CALLS`` / ``FUZZ_STATS``: what the hook and the fuzz tests did, printed at the end of the run.

docs/reliability.md describes the checks, the shortcuts that keep them cheap, and the figures measured.
"""

from __future__ import annotations

import itertools
import json
import math
import os
import sys
import time
import warnings
from functools import cache
from pathlib import Path

# This checkout's core first on sys.path, before anything imports tidewell: with another copy installed
# (``pip install -e`` of another clone), the tests and the doctests of core/ must test this one.
# pyproject.toml's ``pythonpath = ["core"]`` does the same for a run that does not load this file first;
# test_meta.py checks that tidewell comes from here.
ROOT = Path(__file__).resolve().parents[1]
CORE = ROOT / "core"
if str(CORE) in sys.path:
    sys.path.remove(str(CORE))
sys.path.insert(0, str(CORE))
_loaded = sys.modules.get("tidewell")
if _loaded is not None and not Path(_loaded.__file__).resolve().is_relative_to(CORE):
    raise RuntimeError(f"tidewell was imported from {_loaded.__file__} before {CORE} was put first")

import pytest  # noqa: E402

from casebook import load_cases  # noqa: E402  (the one loader of the worked cases)

# When a hypothesis test fails, its pytest plugin imports libcst (if installed) to write a patch, and that
# import raises a DeprecationWarning which CI's -W error turns into an INTERNALERROR hiding the failure.
# Importing it here once, with that warning ignored, keeps failures readable.
with warnings.catch_warnings():
    warnings.simplefilter("ignore", DeprecationWarning)
    try:
        import hypothesis.extra._patching  # noqa: F401
    except ImportError:
        pass

# subprocesses of the tests (the command line, fresh interpreters) import this checkout's core too, not a copy
# installed from another clone (pyproject.toml's pythonpath covers this process only)
os.environ["PYTHONPATH"] = os.pathsep.join(p for p in (str(ROOT / "core"), os.environ.get("PYTHONPATH")) if p)
SCHEMA_PATH = ROOT / "schema" / "bridge.schema.json"


@pytest.fixture(scope="session")
def cases() -> dict[str, dict]:
    return load_cases()


def assert_finite_everywhere(value, path="response"):
    """No NaN or infinity anywhere in a response."""
    if isinstance(value, float):
        assert math.isfinite(value), f"{path} is not finite"
    elif isinstance(value, dict):
        for key, item in value.items():
            assert_finite_everywhere(item, f"{path}.{key}")
    elif isinstance(value, list):
        for i, item in enumerate(value):
            assert_finite_everywhere(item, f"{path}[{i}]")


def assert_accepted_range(func, field: str, low, high, outside=None, **base) -> None:
    """``func(**base, field=v)`` accepts ``low`` and ``high`` and refuses a value just outside each end.

    The range is written in the test from the function's docstring ("Accepted low-high"): the project's
    plausibility limits of a domain input. Just outside is 1e-9 (relative, at least absolute) beyond the end,
    or the two values of ``outside`` (for whole numbers). The refusal is an ``InputError`` ``out_of_range``
    naming ``field``.
    """
    from tidewell.errors import InputError

    for value in (low, high):
        func(**{**base, field: value})
    beyond = outside or tuple(end + sign * max(abs(end) * 1e-9, 1e-9) for end, sign in ((low, -1), (high, 1)))
    for value in beyond:
        with pytest.raises(InputError) as refused:
            func(**{**base, field: value})
        assert (refused.value.field, refused.value.code) == (field, "out_of_range"), (field, value)


# ---------------------------------------------------------------------------------------------------------
# the schema, compiled once


@cache
def schema() -> dict:
    """schema/bridge.schema.json, parsed."""
    return json.loads(SCHEMA_PATH.read_text(encoding="utf-8"))


@cache
def _validators():
    """Validators for (a response, a request, one step, a display map), built once per session.

    The schema resource is crawled once into a registry and each validator's own root is a one-line
    ``$ref`` into it: jsonschema then never re-crawls the big schema when it resolves ``$dynamicRef``.
    """
    from jsonschema import Draft202012Validator
    from referencing import Registry, Resource

    contents = schema()
    Draft202012Validator.check_schema(contents)
    base = contents["$id"]
    registry = Registry().with_resource(base, Resource.from_contents(contents)).crawl()

    def at(pointer: str):
        return Draft202012Validator({"$ref": f"{base}#{pointer}"}, registry=registry)

    return {
        "response": at(""),
        "request": at("/$defs/request"),
        "step": at("/$defs/step"),
        "display": at("/$defs/success/properties/display"),
    }


def _where(error, root="response") -> str:
    return root + "".join(f"[{p!r}]" for p in error.absolute_path)


def _messages(validator, instance, root) -> list[str]:
    return [f"{_where(e, root)}: {e.message[:300]}" for e in validator.iter_errors(instance)]


# Steps are most of a response (60 in a blood gas) and jsonschema takes about 0.3 ms for each, so each
# step is validated in a normalised form, once per form: every string the step schema only requires to be
# non-empty becomes "x" (or stays ""), every number becomes 0 and ``inputs`` (only required to be an
# object) becomes {}. The schema checks nothing else about those values (NaN and infinity are checked
# separately), so a step and its normal form pass or fail together; test_schema.py holds the step schema
# this relies on, and checks that the two routes agree on broken steps.
_MEMO: dict[tuple[str, str], list[str]] = {}
_STEP_STRINGS = ("label", "formula", "source", "output")


def _is_number(x) -> bool:
    return isinstance(x, (int, float)) and not isinstance(x, bool)


def _plain(value):
    if _is_number(value):
        return 0
    if isinstance(value, str):
        return "x" if value else ""
    return value


def normalised_step(step):
    """The form of ``step`` that the step schema cannot tell apart from it (see above)."""
    if not isinstance(step, dict):
        return step
    out = dict(step)
    for key in _STEP_STRINGS:
        if isinstance(out.get(key), str):
            out[key] = _plain(out[key])
    result = out.get("result")
    if isinstance(result, dict):
        out["result"] = {k: _plain(v) for k, v in result.items()}
    elif "result" in out:
        out["result"] = _plain(result)
    if isinstance(out.get("inputs"), dict):
        out["inputs"] = {}
    return out


def _short_lists(value):
    """``value`` with every list of two or more numbers cut to [its minimum, its maximum].

    The schema bounds the numbers of a list only by ``minimum``/``maximum``-type keywords on ``items`` and
    its length only by ``minItems`` of at most 2 (test_schema.py checks this), so a curve of 151 points and
    its two extremes pass or fail together.
    """
    if isinstance(value, dict):
        return {k: _short_lists(v) for k, v in value.items()}
    if isinstance(value, list):
        if len(value) >= 2 and all(map(_is_number, value)):
            return [min(value), max(value)]
        return [_short_lists(v) for v in value]
    return value


def _memo(kind: str, instance, root: str) -> list[str]:
    key = (kind, json.dumps(instance, sort_keys=True, default=repr))
    if key not in _MEMO:
        _MEMO[key] = _messages(_validators()[kind], instance, root)
    return _MEMO[key]


def schema_problems(response) -> list[str]:
    """Where ``response`` breaks the response schema (empty when it fits)."""
    steps = response.get("steps") if isinstance(response, dict) else None
    display = response.get("display") if isinstance(response, dict) else None
    if response.get("ok") is not True or not isinstance(steps, list) or not isinstance(display, dict):
        return _messages(_validators()["response"], response, "response")
    # the display map: only its values are checked, so one entry per distinct value stands for all
    distinct = {json.dumps(v, default=repr): v for v in display.values()}
    problems = _memo("display", {str(i): v for i, v in enumerate(distinct.values())}, "response['display']")
    for i, step in enumerate(steps):
        problems = problems + _memo("step", normalised_step(step), f"response['steps'][{i}]")
    rest = {**response, "steps": [], "display": {}, "outputs": _short_lists(response.get("outputs"))}
    return _messages(_validators()["response"], rest, "response") + problems


def request_problems(request) -> list[str]:
    """Where ``request`` breaks the request schema (empty when it fits)."""
    return _messages(_validators()["request"], request, "request")


def request_fits(request) -> bool:
    """True when ``request`` fits the request schema (faster than ``request_problems``)."""
    return _validators()["request"].is_valid(request)


@cache
def known_inputs(calc: str) -> frozenset[str]:
    """The input names the request schema gives ``calc`` (empty for a name it does not know)."""
    inputs = schema()["$defs"].get(f"inputs_{calc}")
    return frozenset(inputs["properties"]) if inputs else frozenset()


# ---------------------------------------------------------------------------------------------------------
# the check of one response


def _given(inputs: dict, key: str) -> bool:
    return isinstance(inputs, dict) and inputs.get(key) is not None


def _key_forms(keys) -> set[str]:
    """How the keys of a request can appear in an error's field path."""
    from tidewell import bridge

    shown = getattr(bridge, "_key_text", str)  # the bridge's own spelling of a key (e.g. an empty one)
    forms = set()
    for key in keys:
        forms.add(str(key))
        try:
            forms.add(shown(key))
        except Exception:
            pass
    return forms


def _names_its_field(field: str, request) -> bool:
    """``field`` is a path into ``request``: a key that was sent, or an input the calculation knows."""
    if field in ("request", "calc", "inputs", "options"):
        return True
    head, dot, rest = field.partition(".")
    if not isinstance(request, dict) or not dot:
        return False
    if head == "request":
        return rest in _key_forms(request)
    if head == "options":
        options = request.get("options")
        return rest == "pressure_unit" or (isinstance(options, dict) and rest in _key_forms(options))
    if head == "inputs":
        inputs = request.get("inputs")
        calc = request.get("calc")
        known = known_inputs(calc) if isinstance(calc, str) else frozenset()
        if isinstance(calc, str) and not known:
            return True  # a test-only probe calculation: the schema does not know its inputs
        sent = _key_forms(inputs) if isinstance(inputs, dict) else set()
        return any(rest == k or rest.startswith((k + ".", k + "[")) for k in sent | known)
    return False


def _walk_quantities(value, path: str):
    """(path, quantity) for every dict with a ``unit`` key anywhere inside ``value``."""
    if isinstance(value, dict):
        if "unit" in value:
            yield path, value
            return
        for key, item in value.items():
            yield from _walk_quantities(item, f"{path}.{key}")
    elif isinstance(value, list):
        for i, item in enumerate(value):
            yield from _walk_quantities(item, f"{path}[{i}]")


def _mmhg(quantity) -> float | None:
    """A request quantity in mmHg, or None when it is not a usable pressure."""
    from tidewell import units

    try:
        return units.convert(float(quantity["value"]), quantity["unit"], "mmHg")
    except Exception:
        return None


def _check_failure(request, response: dict) -> None:
    from tidewell import bridge

    calc = request.get("calc") if isinstance(request, dict) else None
    assert response["calc"] == (calc if isinstance(calc, str) else None), "failure.calc is not the request's"
    for error in response["errors"]:
        assert _names_its_field(error["field"], request), (
            f"error does not name a field of the request: {error}"
        )
        if error["code"] == "internal_error":
            # Only the test-only probe calculations (not in the registry) may fail inside the core.
            assert isinstance(calc, str) and calc not in bridge.CALCULATIONS, (
                f"internal_error (a core bug) for {json.dumps(request)[:2000]}"
            )


def _check_success(request, response: dict) -> None:
    from tidewell import __version__
    from tidewell.references import REFERENCES

    assert isinstance(request, dict) and response["calc"] == request.get("calc")
    asked = (request.get("options") or {}).get("pressure_unit", "mmHg")
    assert response["options"]["pressure_unit"] == asked, "options.pressure_unit is not the request's"
    assert response["engine"] == __version__
    outputs = response["outputs"]
    # a display key is an output's name, or a path into a list or mapping output (readings.ph)
    named = {key.split(".")[0] for key in response["display"]}
    assert named <= set(outputs), "display names outputs that are not there"
    codes = [f["code"] for f in response["findings"]]
    assert len(codes) == len(set(codes)), f"a finding code is repeated: {codes}"
    order = {"urgent": 0, "notable": 1, "info": 2}
    ranks = [order[f["severity"]] for f in response["findings"]]
    assert ranks == sorted(ranks), "findings are not sorted urgent, notable, info"
    for step in response["steps"]:
        for key in step.get("source_keys", ()):
            assert key in REFERENCES, f"step {step['label']!r}: {key!r} is not in the bibliography"
    for path, q in _walk_quantities({"outputs": outputs, "steps": response["steps"]}, "response"):
        assert set(q) == {"value", "unit"}, f"{path} is not a quantity {{value, unit}}: {q}"
        assert isinstance(q["unit"], str) and q["unit"] and q["unit"] == q["unit"].strip(), f"{path}: unit"
        value = q["value"]
        assert _is_number(value) or (isinstance(value, list) and all(map(_is_number, value))), (
            f"{path}: value"
        )
        if path.startswith("response.outputs") and q["unit"] in ("mmHg", "kPa"):
            exempt = request["calc"] == "convert" or (request["calc"], path) == (
                "blood_gas",
                "response.outputs.pf_ratio",
            )
            assert exempt or q["unit"] == asked, f"{path} is in {q['unit']}, the request asked for {asked}"
    check = _CONDITIONAL.get(request["calc"])
    if check is not None:
        check(request.get("inputs") or {}, outputs, response)


def orphan_steps(response: dict) -> list[str]:
    """Steps whose ``output`` names no output of the response (docs/bridge.md: "the output this step
    explains"). Checked by the fuzz tests, not by the session hook: a minor inconsistency that other
    property tests should not trip over at random."""
    if not response.get("ok"):
        return []
    names = ("", *response["outputs"])
    return [
        f"{s['label']!r} -> {s['output']!r}" for s in response["steps"] if s.get("output", "") not in names
    ]


def check_response(request, response) -> None:
    """Assert everything the contract says about ``response``, the answer to ``request``.

    ``request`` is what the bridge answered: the object given to ``handle_obj``, or the parsed JSON given
    to ``handle`` (None when the text did not parse).
    """
    assert isinstance(response, dict), f"a response must be a dict, got {type(response).__name__}"
    problems = schema_problems(response)
    assert not problems, "response breaks schema/bridge.schema.json:\n" + "\n".join(problems[:10])
    try:
        json.dumps(response, allow_nan=False)  # fast: raises at the first NaN or infinity
    except ValueError:
        assert_finite_everywhere(response)  # says where
        raise
    if response["ok"]:
        _check_success(request, response)
    else:
        _check_failure(request, response)


# ---------------------------------------------------------------------------------------------------------
# outputs present whenever their inputs were given (docs/bridge.md), and relations between values


def _need(outputs: dict, *names: str, why: str) -> None:
    missing = [n for n in names if n not in outputs]
    assert not missing, f"outputs {missing} missing ({why})"


def _blood_gas(inputs, outputs, response) -> None:
    ph = inputs.get("ph")
    # pH below 7.35 acidaemia, above 7.45 alkalaemia (common practice; interpret.py, rule 3)
    expected = "acidaemia" if ph < 7.35 else "alkalaemia" if ph > 7.45 else "normal"
    assert outputs["ph_status"] == expected, f"ph_status {outputs['ph_status']} for pH {ph}"
    disorders = outputs["disorders"]
    roles = [d["role"] for d in disorders]
    assert roles[:1] in ([], ["primary"]) and "primary" not in roles[1:], f"disorder roles {roles}"
    codes = [d["code"] for d in disorders]
    assert len(codes) == len(set(codes)), f"a disorder is named twice: {codes}"
    assert not {"respiratory_acidosis", "respiratory_alkalosis"} <= set(codes), "both respiratory disorders"
    spo2 = outputs["spo2_target"]
    assert spo2["low"] < spo2["high"], f"spo2_target {spo2}"
    if disorders and codes[0].startswith("metabolic_"):
        _need(outputs, "expected_pco2", why="a metabolic disorder is primary")
    if disorders and codes[0].startswith("respiratory_"):
        _need(outputs, "expected_hco3", why="a respiratory disorder is primary")
    site = inputs.get("sample") or "arterial"
    if "respiratory_acidosis" in codes and site != "venous":
        _need(
            outputs,
            "pco2_target",
            "pco2_target_basis",
            "baseline_pco2_source",
            "pco2_alkalaemia_floor",
            why="respiratory acidosis on an arterial or capillary sample",
        )
        # the PaCO2 aim (references.py pco2_aim, common practice on Henderson-Hasselbalch): with
        # P(x) = PaCO2 x 10^(pH - x), never below P(7.45) nor above the present PaCO2; below it while
        # pH < 7.35
        paco2 = _mmhg(inputs["pco2"])
        aim = _mmhg(outputs["pco2_target"])
        floor = paco2 * 10 ** (ph - 7.45)
        low = min(floor, paco2)  # alkalaemic already (pH > 7.45): hold the present PaCO2
        assert low * (1 - 1e-9) <= aim <= paco2 * (1 + 1e-9), f"aim {aim} outside {low}..{paco2}"
        if ph < 7.35:
            assert aim < paco2, f"aim {aim} not below the present PaCO2 {paco2} at pH {ph}"
    if site == "venous":
        assert "pco2_target" not in outputs, "a venous sample gives no PaCO2 aim"
        assert "respiratory_failure" not in outputs, "no respiratory failure type from a venous sample"
    if _given(inputs, "baseline_pco2") and "baseline_pco2_source" in outputs:
        assert outputs["baseline_pco2_source"] == "given"
    assert outputs["fio2_source"] == ("given" if _given(inputs, "fio2") else "assumed_air")
    if _given(inputs, "na") and _given(inputs, "cl"):
        _need(outputs, "anion_gap", why="na and cl given")
        if _given(inputs, "albumin"):
            _need(outputs, "anion_gap_corrected", why="na, cl and albumin given")
        if outputs["hco3"]["value"] < 23.5:
            _need(outputs, "delta_ratio", why="anion gap with HCO3 below 24")
        if _given(inputs, "k") and _given(inputs, "albumin") and outputs["consistency"] == "consistent":
            _need(outputs, "strong_ion_gap", why="na, cl, k and albumin given")
    urea = _given(inputs, "urea") or _given(inputs, "bun")
    if all(_given(inputs, k) for k in ("measured_osmolality", "na", "glucose")) and urea:
        _need(outputs, "osmolar_gap", why="measured osmolality, na, glucose and urea given")
    findings = {f["code"] for f in response["findings"]}
    if _given(inputs, "po2") and site == "arterial":
        if "oxygen_probably_given" not in findings:
            _need(outputs, "pao2_alveolar", why="arterial po2 given")
        if "oxygen_probably_given" in findings:
            # FiO2 not recorded and PaO2 above the alveolar PO2 on air: not interpretable
            assert not _given(inputs, "fio2")
            if "pao2_alveolar" in outputs:
                assert _mmhg(outputs["pao2_alveolar"]) < _mmhg(inputs["po2"])
            for name in ("a_a_gradient", "pf_ratio", "a_a_category"):
                assert name not in outputs, f"{name} although the oxygenation is not interpretable"
        else:
            _need(outputs, "a_a_gradient", "pf_ratio", "respiratory_failure", why="arterial po2 given")
            if _given(inputs, "age"):
                _need(outputs, "a_a_expected_upper", why="po2 and age given")
    if site == "capillary":
        for name in ("a_a_gradient", "pf_ratio"):
            assert name not in outputs, f"{name} from an earlobe PO2"
    if site != "venous" and "oxygen_probably_given" not in findings:
        _need(outputs, "respiratory_failure", why="arterial or capillary sample")
    if "respiratory_failure" in outputs:
        # type 2 whenever a respiratory acidosis is named with PCO2 above 6.0 kPa (BTS 2017 clarification)
        type_2 = "respiratory_acidosis" in codes and _mmhg(inputs["pco2"]) > 6.0 * 1000 / 133.322387415
        assert (outputs["respiratory_failure"] == "type_2") == type_2, outputs["respiratory_failure"]


def _alveolar_gas(inputs, outputs, response) -> None:
    if _given(inputs, "po2"):
        _need(outputs, "a_a_gradient", "a_over_A", "pf_ratio", "pf_ratio_altitude_corrected", why="po2 given")
    if _given(inputs, "age"):
        _need(outputs, "a_a_expected_upper", why="age given")


def _oxygen_content(inputs, outputs, response) -> None:
    if _given(inputs, "cardiac_output"):
        _need(outputs, "do2", why="cardiac_output given")
    spo2 = inputs.get("spo2")
    if _is_number(spo2):
        assert outputs["sao2"] == pytest.approx(spo2), "sao2 is not the SpO2 given"


def _oxygen_dissociation_curve(inputs, outputs, response) -> None:
    axis = outputs["po2"]["value"]
    assert len(axis) == len(outputs["so2_standard"]) == len(outputs["so2_patient"]), "curve lengths differ"
    assert all(a < b for a, b in itertools.pairwise(axis)), "the PO2 axis is not increasing"
    if _given(inputs, "po2"):
        _need(outputs, "point", why="po2 given")


def _ventilation(inputs, outputs, response) -> None:
    codes = {f["code"] for f in response["findings"]}
    if _given(inputs, "height") and _given(inputs, "sex"):
        _need(outputs, "predicted_body_weight", "vt_per_kg_pbw", why="height and sex given")
    if "vco2_estimate_does_not_fit" not in codes:
        _need(outputs, "vd_vt", why="VD/VT is computable")
    if "vd_vt" in outputs or _given(inputs, "vd"):
        _need(outputs, "alveolar_ventilation", why="a dead space is known")
    if _given(inputs, "target_pco2"):
        _need(outputs, "to_target", why="target_pco2 given")
        if "vd_vt" in outputs or _given(inputs, "vd"):
            _need(outputs["to_target"], "rr_at_same_vt", "vt_at_same_rr", why="target_pco2 and a dead space")
    if _given(inputs, "etco2") and _given(inputs, "etco2_now"):
        _need(outputs, "pco2_estimated_now", why="etco2 and etco2_now given")
    pco2 = _mmhg(inputs["pco2"])
    if pco2 is not None and pco2 > 45.0 and "vd_vt" in outputs and "mechanisms_unexplained" not in codes:
        _need(outputs, "mechanisms", why="PaCO2 above 45 mmHg")
    if "mechanisms" in outputs:
        assert sum(outputs["mechanisms"].values()) == pytest.approx(1.0, abs=1e-9), "shares do not sum to 1"


def _temperature_correction(inputs, outputs, response) -> None:
    if _given(inputs, "po2"):
        _need(outputs, "po2", why="po2 given")


def _altitude(inputs, outputs, response) -> None:
    if _given(inputs, "po2"):
        _need(outputs, "po2_predicted", why="po2 given")
        if _given(inputs, "target_po2") and outputs.get("max_altitude_status") != "not_reachable":
            _need(outputs, "max_altitude", why="po2 and target_po2 given")
    if _given(inputs, "trapped_gas_volume"):
        _need(outputs, "trapped_gas_volume_at_altitude", why="trapped_gas_volume given")


def _altitude_profile(inputs, outputs, response) -> None:
    n = len(outputs["altitude"]["value"])
    curves = [outputs["pao2_alveolar"]]
    if _given(inputs, "po2"):
        _need(outputs, "po2_predicted", why="po2 given")
        curves.append(outputs["po2_predicted"])
    for curve in curves:
        assert {len(q["value"]) for q in curve.values()} == {n}, "profile lists differ in length"
    if _is_number(inputs.get("points")):
        assert n == inputs["points"]


def _uncertainty(inputs, outputs, response) -> None:
    probabilities = outputs["probabilities"]
    assert set(probabilities["disorders"]) <= {
        "metabolic_acidosis",
        "metabolic_alkalosis",
        "respiratory_acidosis",
        "respiratory_alkalosis",
    }
    assert set(probabilities["chronicity"]) <= {"acute", "chronic", "acute_on_chronic"}
    for name, interval in outputs["intervals"].items():
        low, high = (v["value"] if isinstance(v, dict) else v for v in (interval["low"], interval["high"]))
        assert low <= high, f"interval of {name}: low {low} above high {high}"
    if _is_number(inputs.get("draws")):
        assert outputs["draws"] == inputs["draws"]


def _course(inputs, outputs, response) -> None:
    readings, intervals = outputs["readings"], outputs["intervals"]
    samples = inputs["samples"]
    assert len(readings) == len(samples), "one reading per sample"
    assert sorted(r["index"] for r in readings) == list(range(len(samples))), "every sample read once"
    minutes = [r["minutes"] for r in readings]
    assert minutes[0] == 0 and minutes == sorted(minutes), f"readings not in time order from 0: {minutes}"
    for r in readings:
        # pH below 7.35 acidaemia, above 7.45 alkalaemia (common practice), as each gas's own reading says
        expected = "acidaemia" if r["ph"] < 7.35 else "alkalaemia" if r["ph"] > 7.45 else "normal"
        assert r["ph_status"] == expected, f"ph_status {r['ph_status']} for pH {r['ph']}"
    assert len(intervals) <= len(readings) - 1, "more intervals than consecutive pairs"
    for i in intervals:
        assert i["earlier"] < i["later"], f"interval {i} runs backwards"
        venous = [readings[k]["site"] == "venous" for k in (i["earlier"], i["later"])]
        assert venous[0] == venous[1], "a venous gas compared with an arterial or capillary one"
    if not any(r["ph_status"] == "acidaemia" for r in readings):
        assert "response" not in outputs, "a response without any acidaemic gas"


def _convert(inputs, outputs, response) -> None:
    assert outputs["result"]["unit"] == inputs["to"], "result is not in the unit asked for"


_CONDITIONAL = {
    "blood_gas": _blood_gas,
    "alveolar_gas": _alveolar_gas,
    "oxygen_content": _oxygen_content,
    "oxygen_dissociation_curve": _oxygen_dissociation_curve,
    "ventilation": _ventilation,
    "temperature_correction": _temperature_correction,
    "altitude": _altitude,
    "altitude_profile": _altitude_profile,
    "convert": _convert,
    "uncertainty": _uncertainty,
    "course": _course,
}


# ---------------------------------------------------------------------------------------------------------
# the session-wide hook

BRIDGE_CALLS = {"checked": 0, "seconds": 0.0}
#: filled by tests/core/test_fuzz.py: requests sent and seconds spent
FUZZ_STATS = {"requests": 0, "examples": 0, "seconds": 0.0}


def _hook(request, response) -> None:
    start = time.perf_counter()
    BRIDGE_CALLS["checked"] += 1
    try:
        check_response(request, response)
    finally:
        BRIDGE_CALLS["seconds"] += time.perf_counter() - start


def pytest_configure(config):
    """Every response of ``handle`` and ``handle_obj`` in this session goes through ``check_response``
    (not with TIDEWELL_NO_RESPONSE_CHECK=1: tools/mutation.sh only, where it is half of each mutant's time
    and the run's own tests decide; docs/testing.md)."""
    from tidewell import bridge

    if os.environ.get("TIDEWELL_NO_RESPONSE_CHECK") == "1":
        return
    if _hook not in bridge.RESPONSE_HOOKS:
        bridge.RESPONSE_HOOKS.append(_hook)


def pytest_unconfigure(config):
    from tidewell import bridge

    if _hook in bridge.RESPONSE_HOOKS:
        bridge.RESPONSE_HOOKS.remove(_hook)


def pytest_terminal_summary(terminalreporter):
    if BRIDGE_CALLS["checked"]:
        terminalreporter.write_line(
            f"tidewell: {BRIDGE_CALLS['checked']} bridge responses checked against schema/bridge.schema.json "
            f"in {BRIDGE_CALLS['seconds']:.1f} s"
        )
    if FUZZ_STATS["requests"]:
        terminalreporter.write_line(
            f"tidewell: fuzzed {FUZZ_STATS['requests']} requests ({FUZZ_STATS['examples']} hypothesis "
            f"examples) in {FUZZ_STATS['seconds']:.1f} s"
        )
    from compare import numpy_dispatch_line, report_lines

    lines = report_lines()
    for line in lines:
        terminalreporter.write_line(f"tidewell: {line}")
    if lines:
        terminalreporter.write_line(f"tidewell: {numpy_dispatch_line()}")
