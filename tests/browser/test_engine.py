"""The engine in the page: start-up, window.tidewell, the converter form, bad input.

Every expected number is the Python core's own answer (tidewell.bridge in CPython): the page must show
exactly what the core computed, whatever the core computes.
"""

from __future__ import annotations

import json
import re
import subprocess
import sys
import tomllib

from harness import ROOT
from screens_support import core, same_as_core
from selenium.webdriver.common.by import By
from selenium.webdriver.support.ui import Select

from tidewell import units

VERSION = tomllib.loads((ROOT / "pyproject.toml").read_text())["project"]["version"]

CONVERSIONS = [
    {"calc": "convert", "inputs": {"quantity": {"value": 6.5, "unit": "kPa"}, "to": "mmHg"}},
    {
        "calc": "convert",
        "inputs": {"quantity": {"value": 5.4, "unit": "mmol/L"}, "to": "mg/dL", "substance": "glucose"},
    },
    {"calc": "convert", "inputs": {"quantity": {"value": 38.5, "unit": "degC"}, "to": "degF"}},
    {"calc": "convert", "inputs": {"quantity": {"value": 8000, "unit": "ft"}, "to": "m"}},
]


def form_result(response: dict) -> list:
    """[value, unit] of a conversion's result, as the form shows them."""
    result = response["outputs"]["result"]
    return [result["value"], result["unit"]]


def six_significant(value: float) -> str:
    # the shell's rule when the core gives no display decimals: six significant digits, zeros trimmed
    # (the same text as JavaScript's String(Number(v.toPrecision(6))) for values between 1e-4 and 1e6)
    return f"{value:.6g}"


def test_engine_ready_marks_and_compute(browser, server):
    browser.get(server.url + "#convert")
    info = browser.wait_engine()
    assert info["engine"] == VERSION
    assert info["pyodide"] == "0.27.7"
    assert info["python"].startswith("3.12")
    assert browser.js("return document.documentElement.dataset.engine") == "ready"
    assert browser.js("return window.tidewell.version") == VERSION
    assert "Engine: ready" in browser.js("return document.querySelector('#engine-text').textContent")

    for request in CONVERSIONS:
        assert browser.compute(request) == core(request), request["inputs"]

    marks = dict(browser.js("return performance.getEntriesByType('mark').map((m) => [m.name, m.startTime])"))
    assert set(marks) >= {"tidewell:shell-ready", "tidewell:engine-ready", "tidewell:first-result"}
    assert marks["tidewell:shell-ready"] < marks["tidewell:engine-ready"] < marks["tidewell:first-result"]

    # numpy stays off the start-up path: only tidewell itself is installed at start
    diagnostics = browser.wait_js("return await window.tidewell.engine.diagnostics();")
    assert "numpy" not in diagnostics["packages"]
    assert not any("numpy" in r["name"] for r in diagnostics["resources"])


def test_form_keeps_early_values_and_shows_the_core_answer(browser, server):
    browser.get(server.url + "#convert")
    # the form works before Python does: type while the engine is still loading
    state_when_typed = browser.js("return document.documentElement.dataset.engine")
    value = browser.driver.find_element(By.ID, "convert-value")
    value.send_keys("6,5")  # a decimal comma is read as a decimal point
    Select(browser.driver.find_element(By.ID, "convert-from")).select_by_value("kPa")
    Select(browser.driver.find_element(By.ID, "convert-to")).select_by_value("mmHg")
    browser.driver.find_element(By.ID, "convert-go").click()
    assert state_when_typed == "loading", "the engine was ready before the test typed: nothing was queued"
    assert browser.js("return document.querySelector('#convert-answer').dataset.state") == "waiting"
    # the form offers exactly the units and substances the core accepts
    offered = browser.js("return [...document.querySelectorAll('#convert-from option')].map((o) => o.value)")
    substances = browser.js(
        "return [...document.querySelectorAll('#convert-substance option')]"
        "  .map((o) => o.value).filter(Boolean)"
    )
    assert sorted(offered) == sorted(units.ALL_UNITS)
    assert sorted(substances) == sorted(units.SUBSTANCES)

    browser.wait_engine()
    shown = browser.wait_js(
        "const box = document.querySelector('#convert-answer');"
        "while (box.dataset.state !== 'done') await new Promise((r) => setTimeout(r, 20));"
        "const out = document.querySelector('#convert-result');"
        "return [out.textContent, out.dataset.value, out.dataset.unit];"
    )
    expected = core(CONVERSIONS[0])["outputs"]["result"]
    same_as_core([float(shown[1]), shown[2]], CONVERSIONS[0], "convert form", form_result)
    assert shown[2] == expected["unit"]
    # the text is the page's own number to six significant digits
    assert shown[0] == f"{six_significant(float(shown[1]))} {expected['unit']}"

    # the same through the form for a substance conversion, then a value that is not a number
    value.clear()
    value.send_keys("5.4")
    Select(browser.driver.find_element(By.ID, "convert-from")).select_by_value("mmol/L")
    Select(browser.driver.find_element(By.ID, "convert-to")).select_by_value("mg/dL")
    Select(browser.driver.find_element(By.ID, "convert-substance")).select_by_value("glucose")
    browser.driver.find_element(By.ID, "convert-go").click()
    expected = core(CONVERSIONS[1])["outputs"]["result"]
    shown = browser.wait_js(
        "const out = document.querySelector('#convert-result');"
        "while (out.dataset.unit !== 'mg/dL') await new Promise((r) => setTimeout(r, 20));"
        "return [out.textContent, Number(out.dataset.value)];"
    )
    assert shown[0] == f"{six_significant(shown[1])} mg/dL"
    same_as_core(shown[1], CONVERSIONS[1], "convert form", lambda r: r["outputs"]["result"]["value"])
    steps = browser.js("return document.querySelector('#convert-steps').textContent")
    assert "glucose" in steps and "source:" in steps

    value.clear()
    value.send_keys("six")
    browser.driver.find_element(By.ID, "convert-go").click()
    errors = browser.wait_js(
        "const box = document.querySelector('#convert-answer');"
        "while (box.dataset.state !== 'error') await new Promise((r) => setTimeout(r, 20));"
        "return [...document.querySelectorAll('#convert-errors li')]"
        "  .map((li) => [li.dataset.code, li.textContent]);"
    )
    bad = {
        "calc": "convert",
        "inputs": {"quantity": {"value": "six", "unit": "mmol/L"}, "to": "mg/dL", "substance": "glucose"},
    }
    assert errors == [[e["code"], e["message"]] for e in core(bad)["errors"]]
    assert errors[0][0] == "not_a_number"


def test_bad_requests_answer_with_errors_not_hangs(browser, server):
    browser.get(server.url + "#convert")
    browser.wait_engine()
    bad_requests = [
        {"calc": "no_such_calculation", "inputs": {}},
        {"calc": "convert", "inputs": {"quantity": {"value": 5, "unit": "furlong"}, "to": "mmHg"}},
        {"calc": "convert", "inputs": {"quantity": {"value": 5, "unit": "kPa"}, "to": "degC"}},
        {"calc": "convert", "inputs": {"quantity": {"value": 5, "unit": "kPa"}}},
        {"inputs": {}},
        {"calc": "convert", "inputs": [], "options": {"pressure_unit": "atm"}},
    ]
    for request in bad_requests:
        answer = browser.compute(request, timeout=20)
        assert answer == core(request)
        assert answer["ok"] is False and answer["errors"], request
    codes = {e["code"] for request in bad_requests for e in browser.compute(request)["errors"]}
    assert {"unknown_calc", "bad_unit", "missing", "bad_request"} <= codes
    # a request that is not JSON at all is refused in the page, with a clear error
    refused = browser.wait_js(
        "const r = {}; r.self = r;"
        "try { await window.tidewell.compute(r); return 'resolved'; } catch (e) { return e.message; }"
    )
    assert refused.startswith("compute(request): the request is not JSON")
    # and the engine still answers afterwards
    assert browser.compute(CONVERSIONS[2]) == core(CONVERSIONS[2])


NUMPY_CALCS = {
    # a calculation known to need numpy, and a small request for it (inputs of docs/bridge.md)
    "oxygen_dissociation_curve": {
        "calc": "oxygen_dissociation_curve",
        "inputs": {"ph": 7.3, "po2": {"value": 60, "unit": "mmHg"}},
    },
    "altitude_profile": {
        "calc": "altitude_profile",
        "inputs": {"altitude": {"value": 2400, "unit": "m"}, "fio2": 0.21},
    },
}


def _cpython_imports_numpy(request: dict) -> tuple[dict, bool]:
    code = (
        "import json, sys; from tidewell import bridge;"
        f"r = json.loads(bridge.handle({json.dumps(json.dumps(request))}));"
        "print(json.dumps([r, 'numpy' in sys.modules]))"
    )
    out = subprocess.run(
        [sys.executable, "-c", code], capture_output=True, text=True, check=True, cwd=ROOT / "core"
    )
    response, used = json.loads(out.stdout)
    return response, used


def test_numpy_is_loaded_only_when_a_calculation_needs_it(browser, server):
    runnable = {}
    for name, request in NUMPY_CALCS.items():
        response, used = _cpython_imports_numpy(request)
        if not (response["ok"] is False and response["errors"][0]["code"] == "unknown_calc"):
            runnable[name] = (request, response, used)
    # every calculation listed exists in the core: none may drop out of the check unseen
    assert set(runnable) == set(NUMPY_CALCS), sorted(set(NUMPY_CALCS) - set(runnable))
    browser.get(server.url + "#convert")
    browser.wait_engine()
    before = browser.wait_js("return (await window.tidewell.engine.diagnostics()).packages;")
    assert "numpy" not in before
    for name, (request, response, _used) in runnable.items():
        answer = browser.compute(request, timeout=90)
        assert answer["ok"] == response["ok"], (name, answer.get("errors"))
        same_as_core(answer, request, name)  # numbers to compare.REL_WEBASSEMBLY, words exactly
        assert not any(e.get("code") == "internal_error" for e in answer.get("errors", [])), name
    after = browser.wait_js("return (await window.tidewell.engine.diagnostics()).packages;")
    assert ("numpy" in after) == any(used for _, _, used in runnable.values())
    assert re.search(
        r"Engine: ready", browser.js("return document.querySelector('#engine-text').textContent")
    )
