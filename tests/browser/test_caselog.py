"""The case log: save, a hostile label stays text, offline reload keeps and recomputes the case,
export then import round-trips exactly, and a bad import changes nothing."""

from __future__ import annotations

import json

from offline_support import log_labels
from screens_support import answer, fill, open_screen, phone, tap, wait_report, wait_screen
from selenium.webdriver.common.by import By

SAMPLE = {"ph": "7.21", "pco2": ("8.6", "kPa"), "po2": ("8.4", "kPa"), "hco3": ("24.5", "mmol/L")}
HOSTILE = "<img src=x onerror=alert(1)> bay 3"


def save(browser, label: str) -> None:
    field = browser.driver.find_element(By.ID, "p-blood_gas-label")
    browser.js("arguments[0].scrollIntoView({block: 'center'})", field)
    field.clear()
    field.send_keys(label)
    tap(browser, By.CSS_SELECTOR, "#p-blood_gas-save")
    assert (
        browser.wait_js(
            "const s = document.querySelector('#p-blood_gas [role=status]');"
            "while (!s.textContent.startsWith('Saved') && !s.textContent.startsWith('Not')) await"
            " new Promise((r) => setTimeout(r, 20));"
            "return s.textContent;",
            timeout=20,
        )
        == "Saved to the case log on this device."
    )


def log_items(browser, count: int) -> list:
    """Open the case log and wait until it lists ``count`` cases: [label text, elements in the label]."""
    return [[item["text"], item["children"]] for item in log_labels(browser, count)]


def exported(browser, button: str, ending: str) -> str:
    """Press an export button; the file it offers, read through the same function the button calls (the
    page's CSP keeps fetch() away from blob: URLs)."""
    browser.js("document.querySelector('#log-download').replaceChildren()")
    tap(browser, By.ID, button)
    return browser.wait_js(
        "let a; while (!(a = document.querySelector('#log-download a[href^=blob]')) ||"
        " !a.download.endsWith(arguments[0]))"
        "  await new Promise((r) => setTimeout(r, 20));"
        "const m = await import(new URL('js/caselog.js', document.baseURI).href);"
        "return arguments[0] === '.json' ? await m.exportJson() : await m.exportCsv();",
        ending,
    )


def export_json(browser) -> dict:
    return json.loads(exported(browser, "log-export-json", ".json"))


def import_file(browser, path) -> str:
    browser.js("delete document.documentElement.dataset.importState")
    browser.driver.find_element(By.ID, "log-import").send_keys(str(path))
    return browser.wait_js(
        "while (!document.documentElement.dataset.importState) await new Promise((r) => setTimeout(r, 20));"
        "await new Promise((r) => setTimeout(r, 300));"
        "return [document.documentElement.dataset.importState,"
        " document.querySelector('#log-message').textContent];"
    )


def test_save_survives_offline_reload_and_reopens(make_browser, make_server, dist):
    server = make_server(dist)
    browser = make_browser()
    phone(browser)
    open_screen(browser, server.url, "gas")
    browser.wait_engine()
    browser.wait_controlled()
    fill(browser, "blood_gas", SAMPLE)
    assert wait_report(browser, "blood_gas") == "done"
    save(browser, HOSTILE)
    items = log_items(browser, 1)
    assert items == [[HOSTILE, 0]]  # shown as text: no <img> element was made
    assert browser.js("return document.querySelectorAll('#log img').length") == 0

    server.stop()
    assert not server.accepting()
    browser.driver.refresh()
    browser.wait_engine()
    assert log_items(browser, 1) == [[HOSTILE, 0]]
    browser.js("document.querySelector('#log-list .log-open').click()")
    wait_screen(browser, "gas")
    assert wait_report(browser, "blood_gas") == "done"
    unit = browser.js("return document.querySelector('input[name=pressure-unit]:checked').value")
    expected = answer(
        browser,
        {
            "calc": "blood_gas",
            "options": {"pressure_unit": unit},
            "inputs": {
                "ph": 7.21,
                "pco2": {"value": 8.6, "unit": "kPa"},
                "po2": {"value": 8.4, "unit": "kPa"},
                "hco3": {"value": 24.5, "unit": "mmol/L"},
            },
        },
    )
    shown = browser.js("return document.querySelector('#p-blood_gas-report .summary p').textContent")
    assert shown == expected["summary"][0]


def test_export_import_round_trip_and_bad_import(browser, server, tmp_path):
    phone(browser)
    open_screen(browser, server.url, "gas")
    browser.wait_engine()
    fill(browser, "blood_gas", SAMPLE)
    assert wait_report(browser, "blood_gas") == "done"
    save(browser, "=1+1 teaching case")  # a label a spreadsheet would read as a formula
    fill(browser, "blood_gas", {"ph": "7.33"})
    assert wait_report(browser, "blood_gas") == "done"
    save(browser, 'second, with "quotes"')
    assert len(log_items(browser, 2)) == 2
    first = export_json(browser)
    assert first["format"] == "tidewell-case-log" and first["schema"] == 2 and len(first["cases"]) == 2
    assert first["courses"] == []  # schema 2: the courses beside the cases

    # CSV: one header and one row per case
    csv_text = exported(browser, "log-export-csv", ".csv")
    assert csv_text.startswith("id,saved_utc,label,calculation,inputs,summary\r\n")
    assert '"second, with ""quotes"""' in csv_text
    # formula escaping: the label's cell starts with an apostrophe, never with "="
    assert ",'=1+1 teaching case," in csv_text and ",=1+1" not in csv_text

    # delete all, import the export: exactly the same cases come back
    browser.js("window.confirm = () => true;")
    tap(browser, By.ID, "log-delete-all")
    browser.wait_js(
        "while (document.documentElement.dataset.logCount !== '0') await new Promise((r) =>"
        " setTimeout(r, 20));"
    )
    good = tmp_path / "cases.json"
    good.write_text(json.dumps(first))
    assert import_file(browser, good)[0] == "done"
    again = export_json(browser)
    assert again["cases"] == first["cases"]
    assert log_items(browser, 2) == [[c["label"], 0] for c in first["cases"]]

    # bad files: nothing changes, and the message says why
    bad_case = json.loads(json.dumps(first))
    bad_case["cases"].append({**first["cases"][0], "id": "case-new", "calc": "rm -rf"})
    bads = {
        "not-json.json": ("{oops", "not JSON"),
        "other.json": (json.dumps({"format": "something-else", "cases": []}), "not a Tidewell case log"),
        "schema.json": (json.dumps({**first, "schema": 99}), "schema 99"),
        "one-bad.json": (json.dumps(bad_case), "case 3"),
    }
    for name, (content, why) in bads.items():
        path = tmp_path / name
        path.write_text(content)
        state, message = import_file(browser, path)
        assert state == "refused" and why in message and "unchanged" in message, (name, message)
        assert export_json(browser)["cases"] == first["cases"], name
