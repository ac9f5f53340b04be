"""The service worker: really offline (the server process is stopped), under a sub-path, for every
calculation of the bridge, numpy-loading ones included, and for a screen driven through its form.
(Updates: test_update.py.)

CDP network emulation does not cover service-worker fetches, so "offline" here means the server is
gone: nothing answers on the port any more.
"""

from __future__ import annotations

import json
from collections import Counter

from offline_support import precache_list, show_screen
from screens_support import answer, fill, same_as_core, wait_report
from selenium.webdriver.common.by import By
from selenium.webdriver.support.ui import Select

from tidewell import bridge

REQUEST = {"calc": "convert", "inputs": {"quantity": {"value": 12.1, "unit": "kPa"}, "to": "mmHg"}}
SUB_PATH = "/wards/night-shift/tidewell/"

q = lambda value, unit: {"value": value, "unit": unit}  # noqa: E731
# One or more requests for every calculation of tidewell.bridge.CALCULATIONS (invented values, inputs of
# docs/bridge.md); the CPython bridge must answer each one ok, so the comparison below means something.
OFFLINE_REQUESTS = [
    {"calc": "convert", "inputs": {"quantity": q(6.5, "kPa"), "to": "mmHg"}},
    {"calc": "convert", "inputs": {"quantity": q(180, "mg/dL"), "to": "mmol/L", "substance": "glucose"}},
    {
        "calc": "blood_gas",
        "inputs": {"ph": 7.28, "pco2": q(65, "mmHg"), "hco3": q(30, "mmol/L"), "po2": q(55, "mmHg")},
        "options": {"pressure_unit": "kPa"},
    },
    {
        "calc": "alveolar_gas",
        "inputs": {"fio2": 0.21, "pco2": q(60, "mmHg"), "po2": q(55, "mmHg"), "age": 60},
    },
    {"calc": "oxygen_content", "inputs": {"hb": q(12, "g/dL"), "po2": q(60, "mmHg"), "spo2": 90}},
    {"calc": "oxygen_dissociation_curve", "inputs": {"ph": 7.3, "po2": q(60, "mmHg")}},
    {"calc": "ventilation", "inputs": {"rr": 20, "vt": q(450, "mL"), "pco2": q(60, "mmHg")}},
    {
        "calc": "temperature_correction",
        "inputs": {"ph": 7.3, "pco2": q(45, "mmHg"), "po2": q(90, "mmHg"), "temperature": q(32, "degC")},
    },
    {
        "calc": "altitude",
        "inputs": {"altitude": q(8000, "ft"), "fio2": 0.21, "pco2": q(40, "mmHg"), "po2": q(70, "mmHg")},
    },
    {
        "calc": "altitude_profile",
        "inputs": {"altitude": q(2400, "m"), "fio2": 0.28, "pco2": q(45, "mmHg"), "po2": q(65, "mmHg")},
    },
    {
        "calc": "oxygen_supply",
        "inputs": {
            "cylinder_water_capacity": q(10, "L"),
            "cylinder_pressure": q(200, "bar"),
            "flow": q(15, "L/min"),
            "duration": q(60, "min"),
        },
    },
    {
        "calc": "course",
        "inputs": {
            "hypercapnia_risk": True,
            "samples": [
                {
                    "time": 0,
                    "inputs": {"ph": 7.26, "pco2": q(9.8, "kPa"), "hco3": q(32, "mmol/L")},
                    "events": ["niv_started"],
                },
                {"time": 90, "inputs": {"ph": 7.31, "pco2": q(8.9, "kPa"), "hco3": q(33, "mmol/L")}},
            ],
        },
        "options": {"pressure_unit": "kPa"},
    },
    {
        "calc": "uncertainty",
        "inputs": {
            "sample": {"ph": 7.24, "pco2": q(9.3, "kPa"), "hco3": q(29.7, "mmol/L")},
            "draws": 500,
            "seed": 1,
        },
    },
    {"calc": "acid_base_map", "options": {"pressure_unit": "kPa"}},
]
NUMPY_CALCS = {"altitude_profile", "oxygen_dissociation_curve", "uncertainty"}
GAS = {"ph": "7.21", "pco2": ("8.6", "kPa"), "po2": ("8.4", "kPa"), "hco3": ("24.5", "mmol/L")}


def expected(request: dict) -> dict:
    return json.loads(bridge.handle(json.dumps(request)))


def form_convert(browser, value: str, source: str, target: str) -> list:
    field = browser.driver.find_element(By.ID, "convert-value")
    field.clear()
    field.send_keys(value)
    Select(browser.driver.find_element(By.ID, "convert-from")).select_by_value(source)
    Select(browser.driver.find_element(By.ID, "convert-to")).select_by_value(target)
    browser.driver.find_element(By.ID, "convert-go").click()
    return browser.wait_js(
        "const box = document.querySelector('#convert-answer');"
        "const out = document.querySelector('#convert-result');"
        "while (box.dataset.state !== 'done' || out.dataset.unit !== arguments[0])"
        "  await new Promise((r) => setTimeout(r, 20));"
        "return [Number(out.dataset.value), out.dataset.unit];",
        target,
    )


def test_offline_after_the_server_is_stopped(make_browser, make_server, dist):
    server = make_server(dist, prefix=SUB_PATH)
    browser = make_browser()
    # the start-up watchdog at 120 s (the default 30 s is for phones, not for a loaded 2-core CI box)
    browser.get(server.url + "?engine-timeout=120000#convert")
    browser.wait_engine()
    scope_script = browser.wait_controlled()
    assert scope_script == server.url + "sw.js"  # registered under the sub-path, relative URLs only
    assert browser.js("return document.querySelector('#offline-status').dataset.offline") == "ready"
    # the offline copy did not download the site a second time: the service worker's requests were
    # revalidations of what the page had just fetched (304), so no file came in full twice
    full = Counter(path for method, path, status in server.requests() if method == "GET" and status == 200)
    assert full[SUB_PATH + "pyodide/pyodide.asm.wasm"] == 1
    assert [path for path, n in full.items() if n > 1] == []
    precached = precache_list(dist)  # the files stored after the first start may still be on their way
    assert {SUB_PATH + url[2:] for url in precached} <= {p for _, p, _ in server.requests()}

    server.stop()
    assert not server.accepting()
    browser.driver.refresh()
    info = browser.wait_engine()
    assert info["engine"] == expected(REQUEST)["engine"]
    want = answer(browser, REQUEST)["outputs"]["result"]  # the page's answer, checked against CPython's
    assert form_convert(browser, "12.1", "kPa", "mmHg") == [want["value"], want["unit"]]
    # the About line still knows the build it runs
    build_id = json.loads((dist / "build-manifest.json").read_text())["build_id"]
    assert browser.js("return document.querySelector('#about-build').textContent") == build_id

    # every calculation of the contract, answered with the server stopped, equal to the CPython bridge
    # (numbers to compare.REL_WEBASSEMBLY: Pyodide's numpy 2.0.2 in WebAssembly is not the desktop's numpy;
    # words and codes exactly); numpy is loaded for the first time in this worker now, so it can only come
    # from the offline copy
    assert "numpy" not in browser.wait_js("return (await window.tidewell.engine.diagnostics()).packages;")
    assert {r["calc"] for r in OFFLINE_REQUESTS} == set(bridge.CALCULATIONS)
    for request in OFFLINE_REQUESTS:
        want = bridge.handle_obj(json.loads(json.dumps(request)))
        assert want["ok"] is True, (request["calc"], want.get("errors"))
        got = browser.compute(request, timeout=120)
        assert got["ok"] is True, (request["calc"], got.get("errors"))
        same_as_core(got, request)
    diagnostics = browser.wait_js("return await window.tidewell.engine.diagnostics();")
    assert "numpy" in diagnostics["packages"]
    assert any("/pyodide/numpy-" in r["name"] for r in diagnostics["resources"])
    assert not server.accepting()

    # a screen driven through its form offline: a blood gas typed in gives a report, the core's own
    show_screen(browser, "gas")
    fill(browser, "blood_gas", GAS)
    assert wait_report(browser, "blood_gas") == "done"
    unit = browser.js("return document.querySelector('input[name=pressure-unit]:checked').value")
    want = answer(
        browser,
        {
            "calc": "blood_gas",
            "options": {"pressure_unit": unit},
            "inputs": {"ph": 7.21, "pco2": q(8.6, "kPa"), "po2": q(8.4, "kPa"), "hco3": q(24.5, "mmol/L")},
        },
    )
    shown = browser.js(
        "return [...document.querySelectorAll('#p-blood_gas-report .summary > p')].map((p) => p.textContent)"
    )
    # the screen adds the inputs it used ("From: ...") to the core's summary
    assert [p for p in shown if not p.startswith("From: ")] == want["summary"]
    # the dissociation curve beside it (a second, numpy-using request) was drawn too
    assert browser.js("return !!document.querySelector('#p-blood_gas-report [data-picture=odc] path')")

    # a page of the app never visited before is still served (navigations get ./index.html)
    browser.get(server.url + "?screen=later&engine-timeout=120000#convert")
    browser.wait_engine()
    assert browser.compute(REQUEST)["ok"] is True
