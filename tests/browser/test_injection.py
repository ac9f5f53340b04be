"""No injection: markup typed by a user is shown as text everywhere it goes.

Case labels made of markup are saved, listed, exported, deleted and imported again; each time the log shows
exactly the label's characters, no element is created from them, no alert() runs (alert is replaced by a
recorder before any page script) and the browser reports no Content-Security-Policy violation (which is
what an inline handler that slipped into the page would cause). Markup typed into number fields comes back
as the core's field error, shown as text.
"""

from __future__ import annotations

import json
import re

from offline_support import WATCH_KEY, case_records, log_labels, save_case, show_screen, watch, watched
from screens_support import fill, tap, wait_report
from selenium.webdriver.common.by import By

GAS = {"ph": "7.21", "pco2": ("8.6", "kPa"), "po2": ("8.4", "kPa"), "hco3": ("24.5", "mmol/L")}
HOSTILE = [
    "<img src=x onerror=alert(1)>",
    "<script>alert(2)</script>",
    '"><svg onload=alert(3)>',
    "<iframe srcdoc='<script>alert(4)</script>'></iframe>",
    "' onmouseover='alert(5)' x='",
    "&lt;b&gt;not bold&lt;/b&gt; &amp; javascript:alert(6)",
]
# elements that markup in a label or an error could have created
MADE = "img, svg, script:not([src]), iframe, b, [onerror], [onload], [onmouseover]"


def made_elements(browser, scope: str) -> list[str]:
    return browser.js(
        "return [...document.querySelectorAll(arguments[0])].filter((e) => e.matches(arguments[1]))"
        ".map((e) => e.outerHTML.slice(0, 80));",
        f"{scope}, {scope} *",
        MADE,
    )


def listed_as_text(browser, labels: list[str]) -> None:
    items = log_labels(browser, len(labels))
    assert sorted(item["text"] for item in items) == sorted(labels)
    assert all(item["children"] == 0 for item in items), items
    assert made_elements(browser, "#log") == []


def exported_json(browser) -> str:
    """Press Export JSON; the text of the file it offers, read through the same function the button
    calls (the page's CSP keeps fetch() away from blob: URLs)."""
    browser.js("document.querySelector('#log-download').replaceChildren()")
    tap(browser, By.ID, "log-export-json")
    return browser.wait_js(
        "while (!document.querySelector('#log-download a[href^=blob]'))"
        "  await new Promise((r) => setTimeout(r, 20));"
        "const m = await import(new URL('js/caselog.js', document.baseURI).href);"
        "return await m.exportJson();"
    )


def test_hostile_case_labels_stay_text_through_save_list_export_import(make_browser, server, dist, tmp_path):
    browser = make_browser()
    watch(browser)
    browser.get(server.url + "#gas")
    browser.wait_engine()
    fill(browser, "blood_gas", GAS)
    assert wait_report(browser, "blood_gas") == "done"
    for label in HOSTILE:
        save_case(browser, label)
    stored = json.loads(case_records(browser))
    assert sorted(r["label"] for r in stored) == sorted(HOSTILE)  # stored exactly as typed
    listed_as_text(browser, HOSTILE)

    # export: the file carries the labels exactly; then delete everything and import the file back
    text = exported_json(browser)
    assert sorted(c["label"] for c in json.loads(text)["cases"]) == sorted(HOSTILE)
    browser.js("window.confirm = () => true;")
    tap(browser, By.ID, "log-delete-all")
    browser.wait_js(
        "while (document.documentElement.dataset.logCount !== '0')"
        "  await new Promise((r) => setTimeout(r, 20));"
    )
    assert json.loads(case_records(browser)) == []
    path = tmp_path / "hostile-cases.json"
    path.write_text(text)
    browser.js("delete document.documentElement.dataset.importState")
    browser.driver.find_element(By.ID, "log-import").send_keys(str(path))
    state = browser.wait_js(
        "while (!document.documentElement.dataset.importState) await new Promise((r) => setTimeout(r, 20));"
        "return document.documentElement.dataset.importState;"
    )
    assert state == "done"
    assert json.loads(case_records(browser)) == stored
    browser.driver.refresh()
    listed_as_text(browser, HOSTILE)
    # the log's buttons name the case in their accessible names, as plain attribute text
    names = browser.js(
        "return [...document.querySelectorAll('#log-list .log-open')]"
        ".map((b) => b.getAttribute('aria-label'))"
    )
    assert sorted(names) == sorted(f"Reopen case {label}" for label in HOSTILE)

    record = watched(browser)
    assert record["alerts"] == [], record["alerts"]
    assert record["violations"] == [], record["violations"]
    # the only scripts in the document are the built page's own, each from a file
    built = re.findall(r'<script\b[^>]*\bsrc="([^"]+)"', (dist / "index.html").read_text())
    assert built and len(built) == (dist / "index.html").read_text().count("<script")
    scripts = browser.js("return [...document.scripts].map((s) => s.getAttribute('src'))")
    assert scripts == built, scripts


def test_markup_in_number_fields_is_an_error_text(make_browser, server):
    browser = make_browser()
    watch(browser)
    browser.get(server.url + "#gas")
    browser.wait_engine()
    typed = {"ph": "<img src=x onerror=alert(7)>", "pco2": ("<b>40</b>", "kPa")}
    fill(browser, "blood_gas", typed)
    assert wait_report(browser, "blood_gas") == "error"
    for name, value in typed.items():
        text = value[0] if isinstance(value, tuple) else value
        error = browser.js(
            "const p = document.querySelector('#p-blood_gas-' + arguments[0] + '-error');"
            "return [p.textContent, p.children.length, p.dataset.code];",
            name,
        )
        assert error[1:] == [0, "not_a_number"], error
        assert f"(entered: '{text}')" in error[0], error
    assert made_elements(browser, "#gas") == []

    # the converter's value field: the error list shows the core's message as text
    show_screen(browser, "convert")
    field = browser.driver.find_element(By.ID, "convert-value")
    field.clear()
    field.send_keys('"><svg onload=alert(8)>')
    browser.driver.find_element(By.ID, "convert-go").click()
    errors = browser.wait_js(
        "const box = document.querySelector('#convert-answer');"
        "while (box.dataset.state !== 'error') await new Promise((r) => setTimeout(r, 20));"
        "return [...document.querySelectorAll('#convert-errors li')].map((li) =>"
        " [li.textContent, li.children.length]);"
    )
    assert errors and all(children == 0 for _, children in errors), errors
    assert any('"><svg onload=alert(8)>' in text for text, _ in errors), errors
    assert made_elements(browser, "#convert") == []

    record = watched(browser)
    assert record["alerts"] == [] and record["violations"] == [], record

    # the detectors themselves work: an inline script the page did not ship is blocked and reported,
    # and an alert() call is recorded (so the empty records above mean something)
    browser.allow_console(r"Executing inline script violates the following Content Security Policy")
    browser.js(
        "const s = document.createElement('script'); s.textContent = 'window.probeRan = true;';"
        "document.body.append(s); alert('probe');"
    )
    browser.wait_js(
        "while (!(JSON.parse(sessionStorage.getItem(arguments[0]) || '{}').violations || []).length)"
        "  await new Promise((r) => setTimeout(r, 20));",
        WATCH_KEY,
        timeout=10,
    )
    record = watched(browser)
    assert record["alerts"] == ["probe"]
    # (Chromium reports this one blocked script twice, console too: the page carries the policy twice,
    # as the server's header and as the meta tag)
    assert {(v["directive"], v["blocked"]) for v in record["violations"]} == {("script-src-elem", "inline")}
    assert browser.js("return window.probeRan === undefined") is True
