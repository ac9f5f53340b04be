"""The only module the web shell (and the command line) calls: JSON in, JSON out.

==================  =====================================================================
``handle``          ``handle(request_json: str) -> str``; never raises
``handle_obj``      ``handle_obj(request: dict) -> dict``; never raises
``CALCULATIONS``    the allow-list: calculation name -> ``"module:function"``
``available``       the calculations this build can answer
==================  =====================================================================

Shapes are those of the contract (docs/bridge.md, schema/bridge.schema.json). Each calculation is a
function ``f(inputs: Inputs, report: Report) -> None`` imported only when first asked for, so
``import tidewell.bridge`` stays cheap and imports no numpy.
"""

from __future__ import annotations

import importlib
import importlib.util
import json
import math
import sys

from . import __version__
from .errors import InputError, InputErrors
from .fields import Inputs
from .report import Report

ENGINE = __version__

#: calculation name -> "module:function" (an allow-list; nothing else is reachable).
CALCULATIONS: dict[str, str] = {
    "convert": "tidewell.calculations.convert:convert",
    "blood_gas": "tidewell.calculations.blood_gas:blood_gas",
    "alveolar_gas": "tidewell.calculations.alveolar_gas:alveolar_gas",
    "oxygen_content": "tidewell.calculations.oxygen_content:oxygen_content",
    "oxygen_dissociation_curve": "tidewell.calculations.oxygen_dissociation_curve:oxygen_dissociation_curve",
    "ventilation": "tidewell.calculations.ventilation:ventilation",
    "temperature_correction": "tidewell.calculations.temperature_correction:temperature_correction",
    "altitude": "tidewell.calculations.altitude:altitude",
    "altitude_profile": "tidewell.calculations.altitude_profile:altitude_profile",
    "oxygen_supply": "tidewell.calculations.oxygen_supply:oxygen_supply",
    "uncertainty": "tidewell.calculations.uncertainty:uncertainty",
    "course": "tidewell.calculations.course:course",
    "acid_base_map": "tidewell.calculations.acid_base_map:acid_base_map",
}

PRESSURE_UNITS = ("mmHg", "kPa")
_REQUEST_KEYS = ("calc", "inputs", "options")
_OPTION_KEYS = ("pressure_unit",)
MAX_REQUEST_CHARS = 1_000_000


def _resolve(name: str):
    """The calculation function for ``name``, or None when this build does not have it."""
    target = CALCULATIONS.get(name)
    if target is None:
        return None
    module_name, func_name = target.split(":")
    try:
        module = importlib.import_module(module_name)
    except ModuleNotFoundError as exc:
        if exc.name == module_name:
            return None
        raise
    return getattr(module, func_name, None)


def available() -> list[str]:
    """Names of the calculations this build can answer.

    Found without importing the modules: an error message must not load numpy (uncertainty needs it).
    """
    present = {}
    for target in CALCULATIONS.values():
        module_name = target.partition(":")[0]
        if module_name not in present:
            present[module_name] = importlib.util.find_spec(module_name) is not None
    return [name for name, target in CALCULATIONS.items() if present[target.partition(":")[0]]]


def _failure(calc, errors: list[dict]) -> dict:
    return {"ok": False, "calc": calc, "engine": ENGINE, "errors": errors}


def _err(field: str, code: str, message: str) -> dict:
    return {"field": field, "code": code, "message": message}


#: callables ``hook(request, response)`` run on every response (the test suite validates each response
#: against the JSON Schema this way); empty in normal use.
RESPONSE_HOOKS: list = []


def handle_obj(request: object) -> dict:
    """Answer one request object (see docs/bridge.md). Never raises (response hooks aside)."""
    response = _handle_safely(request)
    for hook in RESPONSE_HOOKS:
        hook(request, response)
    return response


def _handle_safely(request: object) -> dict:
    try:
        return _handle(request)
    except Exception:  # a core bug: say so without a traceback
        calc = (
            request.get("calc")
            if isinstance(request, dict) and isinstance(request.get("calc"), str)
            else None
        )
        return _failure(
            calc,
            [
                _err(
                    "request",
                    "internal_error",
                    "Tidewell could not complete this calculation (an internal error). "
                    "Nothing was computed; please check the inputs and report the problem.",
                )
            ],
        )


def _handle(request: object) -> dict:
    if not isinstance(request, dict):
        return _failure(None, [_err("request", "bad_request", "a request must be a JSON object")])
    calc = request.get("calc")
    errors = []
    for key in request:
        if key not in _REQUEST_KEYS:
            errors.append(
                _err(
                    f"request.{key}",
                    "bad_request",
                    f"request.{key}: unknown request key; a request has calc, inputs and options",
                )
            )
    if calc is None:
        errors.append(_err("calc", "missing", "calc: the calculation name is required"))
    elif not isinstance(calc, str):
        errors.append(_err("calc", "bad_request", "calc: must be a calculation name (text)"))
        calc = None
    inputs_raw = request.get("inputs", {})
    if not isinstance(inputs_raw, dict):
        errors.append(_err("inputs", "bad_request", "inputs: must be a JSON object"))
    options = request.get("options", {})
    if options is None:
        options = {}
    pressure_unit = "mmHg"
    if not isinstance(options, dict):
        errors.append(_err("options", "bad_request", "options: must be a JSON object"))
    else:
        for key in options:
            if key not in _OPTION_KEYS:
                errors.append(
                    _err(
                        f"options.{key}",
                        "bad_request",
                        f"options.{key}: unknown option",
                    )
                )
        unit = options.get("pressure_unit", "mmHg")
        if unit not in PRESSURE_UNITS:
            errors.append(
                _err(
                    "options.pressure_unit",
                    "bad_unit",
                    f"options.pressure_unit: must be 'mmHg' or 'kPa' (got {unit!r})",
                )
            )
        else:
            pressure_unit = unit
    func = None
    if isinstance(calc, str):
        func = _resolve(calc)
        if func is None:
            known = ", ".join(available())
            errors.append(
                _err(
                    "calc",
                    "unknown_calc",
                    f"calc: {calc[:60]!r} is not a calculation of this "
                    f"version of Tidewell; available: {known}",
                )
            )
    if errors:
        return _failure(calc, errors)
    inputs = Inputs(_huge_integers_as_infinity(inputs_raw))
    report = Report(calc, pressure_unit=pressure_unit)
    try:
        func(inputs, report)
    except InputErrors as exc:
        return _failure(calc, [e.as_entry() for e in exc.errors])
    except InputError as exc:
        return _failure(calc, [exc.as_entry()])
    return report.to_response(ENGINE)


def _is_huge(item) -> bool:
    return isinstance(item, int) and not isinstance(item, bool) and abs(item) > _FLOAT_MAX


def _has_huge_integer(value) -> bool:
    """True when an integer too large for a float is anywhere inside ``value`` (no recursion; cycles safe)."""
    stack, seen = [value], set()
    while stack:
        item = stack.pop()
        if _is_huge(item):
            return True
        if isinstance(item, (dict, list)) and id(item) not in seen:
            seen.add(id(item))
            stack.extend(item.values() if isinstance(item, dict) else item)
    return False


def _huge_integers_as_infinity(value):
    """``value`` with every integer beyond the float range replaced by an infinity of its sign.

    JSON allows integers of any length and Python parses them exactly, but the core computes in floats:
    ``float(10**400)`` raises OverflowError (and ``repr`` of an integer of 4,300 digits or more raises
    ValueError). Such a number is refused like ``1e999``, which JSON parsing already turns into infinity:
    ``not_a_number`` from the field's own reader, with its field. The request itself is not changed: the
    containers on the way are copied, without recursion, so any depth and any cycle is safe.
    """
    if not _has_huge_integer(value):
        return value
    copies: dict[int, object] = {}

    def copy(item):
        if _is_huge(item):
            return math.inf if item > 0 else -math.inf
        if not isinstance(item, (dict, list)):
            return item
        if id(item) not in copies:
            copies[id(item)] = dict(item) if isinstance(item, dict) else list(item)
            stack.append(copies[id(item)])
        return copies[id(item)]

    stack: list = []
    root = copy(value)
    while stack:
        container = stack.pop()
        keys = container.keys() if isinstance(container, dict) else range(len(container))
        for key in list(keys):
            container[key] = copy(container[key])
    return root


_FLOAT_MAX = int(sys.float_info.max)


def handle(request: str) -> str:
    """Answer one JSON request text with one JSON response text. Never raises (response hooks aside)."""
    obj = None
    if not isinstance(request, str):
        response = _failure(None, [_err("request", "bad_request", "a request must be JSON text")])
    elif len(request) > MAX_REQUEST_CHARS:
        message = f"request is too large ({len(request)} characters; the limit is {MAX_REQUEST_CHARS})"
        response = _failure(None, [_err("request", "bad_request", message)])
    else:
        try:
            obj = json.loads(request, parse_constant=_reject_constant)
        except (ValueError, RecursionError) as exc:
            message = f"request is not valid JSON: {exc}"[:300]
            response = _failure(None, [_err("request", "bad_request", message)])
        else:
            response = _handle_safely(obj)
    try:
        text = json.dumps(response, allow_nan=False, ensure_ascii=False)
    except (ValueError, TypeError, RecursionError):
        response = _failure(None, [_err("request", "internal_error", _INTERNAL)])
        text = json.dumps(response)
    for hook in RESPONSE_HOOKS:
        hook(obj, response)
    return text


_INTERNAL = "Tidewell could not answer this request (an internal error)."


def _reject_constant(name: str):
    raise ValueError(f"{name} is not allowed in a request (numbers must be finite)")


def _finite(value) -> bool:  # used by tests
    return not (isinstance(value, float) and not math.isfinite(value))
