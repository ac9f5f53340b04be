"""The course of a patient on the screen (js/course/): three gases added from the blood-gas screen with the
server stopped, their events ticked on the Course screen, the table the core's own answer, and everything
still there after a reload; an upgrade from a version-1 case log that keeps every case and adds the course
store; and a course exported and imported with the case log (schema 2) exactly as it was.

The gases are the invented oxygen course of docs/examples/course-oxygen.csv (not a patient). What the screen
shows is compared with the page engine's answer to the request built here from the same typed values, and
that answer with the CPython core's (screens_support.answer, numbers to compare.REL_WEBASSEMBLY).
"""

from __future__ import annotations

import json

from faults_support import export_text, import_path
from offline_support import case_records, log_labels
from screens_support import answer, fill, go_to, open_screen, phone, shell_format, tap, wait_report
from selenium.webdriver.common.by import By

PHONE = (360, 740)
LABEL = "bay 3 <b>night</b>"  # markup in a label stays text
# docs/examples/course-oxygen.csv, as typed into the blood-gas form (kPa; FiO2 as a fraction)
GASES = [
    ("2026-12-04T02:10", {"ph": "7.36", "pco2": ("7.5", "kPa"), "po2": ("6.9", "kPa"),
                          "fio2": ("0.21", "fraction"), "sample": "arterial"}),
    ("2026-12-04T03:00", {"ph": "7.27", "pco2": ("9.5", "kPa"), "po2": ("14.8", "kPa"),
                          "fio2": ("0.6", "fraction"), "sample": "arterial"}),
    ("2026-12-04T04:00", {"ph": "7.31", "pco2": ("8.5", "kPa"), "po2": ("8.4", "kPa"),
                          "fio2": ("0.28", "fraction"), "sample": "capillary"}),
]  # fmt: skip
EVENTS = {0: "oxygen_increased", 1: "oxygen_decreased"}


def expected_request(unit: str, events: dict = EVENTS) -> dict:
    """The course request for GASES, built here from the typed values (not by the page)."""
    samples = []
    for k, (time, fields) in enumerate(GASES):
        inputs = {"ph": float(fields["ph"]), "sample": fields["sample"], "fio2": float(fields["fio2"][0])}
        for key in ("pco2", "po2"):
            inputs[key] = {"value": float(fields[key][0]), "unit": fields[key][1]}
        samples.append({"time": time, "inputs": inputs, "events": [events[k]] if k in events else []})
    return {"calc": "course", "inputs": {"samples": samples}, "options": {"pressure_unit": unit}}


def add_gas(browser, time: str, fields: dict, count: int, label: str | None = None) -> str:
    """Type a gas into the blood-gas form, wait for its report, and add it to the course (a new one with
    ``label``, else the one offered); waits until the course holds ``count`` gases."""
    fill(browser, "blood_gas", fields)
    assert wait_report(browser, "blood_gas") == "done"
    if label is not None:
        browser.js("const t = document.querySelector('#add-course-target'); t.value = '';"
                   " t.dispatchEvent(new Event('change'));")  # fmt: skip
        field = browser.driver.find_element(By.ID, "add-course-label")
        browser.js("arguments[0].scrollIntoView({block: 'center'})", field)
        field.clear()
        field.send_keys(label)
    # a datetime-local field takes its value as the picker would set it
    browser.js(
        "const t = document.querySelector('#add-course-time'); t.value = arguments[0];"
        " t.dispatchEvent(new Event('input', {bubbles: true}));",
        time,
    )
    tap(browser, By.ID, "add-course-go")
    want = f"({count} gas{'es' if count > 1 else ''})"
    return browser.wait_js(
        "const s = document.querySelector('#add-course-status');"
        "while (!s.textContent.includes(arguments[0]) && !s.textContent.startsWith('Not'))"
        "  await new Promise((r) => setTimeout(r, 20));"
        "return s.textContent;",
        want,
        timeout=30,
    )


def wait_course(browser, gases: int, timeout: float = 90) -> str:
    """Wait until the Course screen shows a finished reading (or its errors) of a course of ``gases``."""
    return browser.wait_js(
        "const r = document.querySelector('#course-report');"
        "for (;;) { await new Promise((ok) => setTimeout(ok, 50));"
        "  const n = document.querySelectorAll('#course-gases .course-gas').length;"
        "  if (document.documentElement.dataset.screen === 'course' && !r.dataset.busy"
        "      && ['done', 'error'].includes(r.dataset.state) && n === arguments[0])"
        "    return r.dataset.state; }",
        gases,
        timeout=timeout,
    )


def tick_event(browser, gas: int, word: str, gases: int) -> None:
    """Tick what was changed after gas number ``gas`` (1-based, time order) and wait for the new reading."""
    browser.js("document.querySelector('#course-report').dataset.state = 'stale'")
    box = browser.driver.find_elements(
        By.CSS_SELECTOR, f'#course-gases .course-gas input[data-event="{word}"]'
    )[gas - 1]
    browser.js("arguments[0].scrollIntoView({block: 'center'})", box)
    box.click()
    assert wait_course(browser, gases) == "done"


def shown_course(browser) -> dict:
    """What the Course screen shows: the table's cells, the verdicts, findings, events and handover."""
    return browser.js(
        "const q = (s) => [...document.querySelectorAll(s)];"
        "return {"
        " rows: q('#course-table .course-row').map((tr) => Object.fromEntries("
        "   [...tr.querySelectorAll('td[data-out]')].map((td) => [td.dataset.out, td.textContent]))),"
        " changes: q('#course-table .course-change').map((tr) => Object.fromEntries("
        "   [...tr.querySelectorAll('b[data-out]')].map((b) => [b.dataset.out, b.textContent]))),"
        " findings: q('#course-report .finding').map((li) => [li.dataset.code, li.dataset.severity]),"
        " response: (document.querySelector('#course-response') || {}).dataset?.verdict || null,"
        " summary: q('#course-report .summary > p').map((p) => p.textContent),"
        " events: q('#course-gases .course-gas').map((li) =>"
        "   [...li.querySelectorAll('input[data-event]:checked')].map((i) => i.dataset.event)),"
        " times: q('#course-gases .course-time').map((i) => i.value),"
        " picture: q('#course-report svg.course-plot rect.cv-pco2').length,"
        " flags: q('#course-report svg.course-plot .cv-flag').map((t) => t.dataset.event),"
        " handover: (document.querySelector('#course-handover-text') || {}).textContent || '',"
        " label: document.querySelector('#course-pick').selectedOptions[0].textContent,"
        "};"
    )


def signed(text: str) -> str:
    return f"−{text[1:]}" if text.startswith("-") else f"+{text}"


def check_against_answer(shown: dict, response: dict) -> None:
    """Every number in the table is the core's, to the core's display decimals; findings as the core's."""
    o, d = response["outputs"], response["display"]
    assert len(shown["rows"]) == len(o["readings"])
    for row, r in zip(shown["rows"], o["readings"], strict=True):
        assert row["ph"] == shell_format(r["ph"], d["readings.ph"])
        assert row["pco2"] == shell_format(r["pco2"]["value"], d["readings.pco2"])
        assert row["hco3"] == shell_format(r["hco3"]["value"], d["readings.hco3"])
        assert row["pco2_target"] == shell_format(r["pco2_target"]["value"], d["readings.pco2_target"])
    assert len(shown["changes"]) == len(o["intervals"])
    for change, iv in zip(shown["changes"], o["intervals"], strict=True):
        assert change["ph_change"] == signed(shell_format(iv["ph_change"], d["intervals.ph_change"]))
        assert change["pco2_change"] == signed(
            shell_format(iv["pco2_change"]["value"], d["intervals.pco2_change"])
        )
        assert change["pco2_rate"] == signed(shell_format(iv["pco2_rate"]["value"], d["intervals.pco2_rate"]))
    core_findings = [[f["code"], f["severity"]] for f in response["findings"] if f["severity"] != "info"]
    assert shown["findings"] == core_findings
    assert shown["response"] == o.get("response")
    assert shown["picture"] == len(o["readings"])


def test_a_three_gas_course_built_offline_survives_a_reload(make_browser, make_server, dist):
    server = make_server(dist)
    browser = make_browser()
    phone(browser, PHONE)
    open_screen(browser, server.url + "?engine-timeout=120000", "gas")
    browser.wait_engine()
    browser.wait_controlled()
    server.stop()
    assert not server.accepting()
    browser.driver.refresh()
    browser.wait_engine()

    for k, (time, fields) in enumerate(GASES):
        status = add_gas(browser, time, fields, k + 1, LABEL if k == 0 else None)
        assert status.startswith(f'Added to "{LABEL}"'), status
    go_to(browser, "course")
    assert wait_course(browser, 3) == "done"
    for gas, word in sorted(EVENTS.items()):
        tick_event(browser, gas + 1, word, 3)

    unit = browser.js("return document.querySelector('input[name=pressure-unit]:checked').value")
    want = answer(browser, expected_request(unit))
    shown = shown_course(browser)
    check_against_answer(shown, want)
    # the oxygen course: PCO2 up, pH down after the oxygen was turned up (its severity as the core gives it:
    # notable once a later gas shows the pH recovered)
    severity = next(f["severity"] for f in want["findings"] if f["code"] == "pco2_rising_after_oxygen")
    assert ["pco2_rising_after_oxygen", severity] in shown["findings"]
    assert shown["events"] == [["oxygen_increased"], ["oxygen_decreased"], []]
    assert shown["flags"] == ["oxygen_increased", "oxygen_decreased"]
    assert shown["label"] == f"{LABEL} (3 gases)"  # as text
    assert browser.js("return document.querySelectorAll('#course b b, #course-pick b').length") == 0
    assert shown["handover"].startswith(f"Course: {LABEL} (3 gases; pressures in {unit})")
    assert "After oxygen was increased" in shown["handover"]
    assert ("ACT NOW: After oxygen was increased" in shown["handover"]) == (severity == "urgent")
    assert f"PCO2 {shown['rows'][1]['pco2']}," in shown["handover"]
    width, inner = browser.js("return [document.documentElement.scrollWidth, innerWidth]")
    assert width <= inner  # nothing wider than the phone

    # reload, still offline: the course is all there and reads the same
    browser.driver.refresh()
    browser.wait_engine()
    assert browser.js("return document.documentElement.dataset.screen") == "course"
    assert wait_course(browser, 3) == "done"
    again = shown_course(browser)
    assert again == shown
    assert again["times"] == [t for t, _ in GASES]
    assert not server.accepting()


V1_CASES = [
    {"id": "case-v1-a", "time": 1_796_165_715_217, "label": "teaching one", "screen": "gas",
     "calc": "blood_gas", "fields": {"ph": "7.28", "pco2": ["9.1", "kPa"], "hypercapnia_risk": True},
     "pressure_unit": "kPa", "outputs": {"ph_status": "acidaemia"}, "summary": ["An invented sentence."],
     "engine": "0.1.0"},
    {"id": "case-v1-b", "time": 1_796_165_800_000, "label": "teaching two", "screen": "breathing",
     "calc": "ventilation", "fields": {"rr": "14", "vt": ["450", "mL"], "pco2": ["8.5", "kPa"]},
     "outputs": {}, "summary": []},
]  # fmt: skip


def test_an_upgrade_from_a_version_1_log_keeps_every_case(browser, server, tmp_path):
    # a version-1 database as the previous release left it, made on the site's origin before the app opens it
    browser.allow_console(r"favicon\.ico")  # the JSON document the database is made from has no icon
    browser.get(server.url + "build-manifest.json")
    browser.wait_js(
        "await new Promise((ok, no) => { const r = indexedDB.open('tidewell', 1);"
        "  r.onupgradeneeded = () => r.result.createObjectStore('cases', {keyPath: 'id'});"
        "  r.onsuccess = () => { const db = r.result; const tx = db.transaction('cases', 'readwrite');"
        "    for (const c of arguments[0]) tx.objectStore('cases').put(c);"
        "    tx.oncomplete = () => { db.close(); ok(); }; tx.onerror = () => no(tx.error); };"
        "  r.onerror = () => no(r.error); });",
        V1_CASES,
    )
    before = case_records(browser)
    assert json.loads(before) == V1_CASES
    phone(browser, PHONE)
    open_screen(browser, server.url, "log")
    browser.wait_engine()
    browser.wait_controlled()  # the offline copy stored: nothing of the page's start is still in flight
    assert [i["text"] for i in log_labels(browser, 2)] == ["teaching two", "teaching one"]
    # the app opened it at version 2: the cases are exactly as they were, and the course store is there
    assert json.loads(case_records(browser)) == json.loads(before)
    stores = browser.wait_js(
        "const db = await new Promise((ok, no) => { const r = indexedDB.open('tidewell');"
        "  r.onsuccess = () => ok(r.result); r.onerror = () => no(r.error); });"
        "try { return [db.version, [...db.objectStoreNames].sort()]; } finally { db.close(); }"
    )
    assert stores == [2, ["cases", "courses"]]
    # the export is schema 2, with the same cases and an empty list of courses
    data = json.loads(export_text(browser))
    assert data["schema"] == 2 and data["courses"] == []
    assert sorted(data["cases"], key=lambda c: c["id"]) == V1_CASES
    # a version-1 file still imports; one that claims courses in schema 1, or a later schema, does not
    v1 = tmp_path / "v1.json"
    v1.write_text(json.dumps({"format": "tidewell-case-log", "schema": 1, "cases": V1_CASES[:1]}))
    assert import_path(browser, v1) == [
        "done",
        "Imported 1 case(s) (1 of them replaced a saved case with the same id).",
    ]
    for name, content, why in [
        ("v1-courses.json", {"schema": 1, "courses": []}, 'a schema 1 file has no "courses"'),
        ("v3.json", {"schema": 3, "courses": []}, "schema 3; this version reads schemas 1 and 2"),
        ("v2-no-courses.json", {"schema": 2}, 'no list of "courses"'),
    ]:
        path = tmp_path / name
        path.write_text(json.dumps({"format": "tidewell-case-log", "cases": V1_CASES, **content}))
        state, message = import_path(browser, path)
        assert state == "refused" and why in message, (name, message)
    assert json.loads(case_records(browser)) == json.loads(before)


def test_a_course_exports_and_imports_with_the_case_log(browser, server, tmp_path):
    phone(browser, PHONE)
    open_screen(browser, server.url, "gas")
    browser.wait_engine()
    for k, (time, fields) in enumerate(GASES[:2]):
        add_gas(browser, time, fields, k + 1, "export check" if k == 0 else None)
    go_to(browser, "course")
    assert wait_course(browser, 2) == "done"
    tick_event(browser, 1, "oxygen_increased", 2)
    browser.js("document.querySelector('#course-baseline_pco2').value = '7.2';"
               " document.querySelector('#course-baseline_pco2-unit').value = 'kPa';"
               " document.querySelector('#course-report').dataset.state = 'stale';"
               " document.querySelector('#course-baseline_pco2')"
               "   .dispatchEvent(new Event('change'));")  # fmt: skip
    assert wait_course(browser, 2) == "done"
    shown = shown_course(browser)

    first = export_text(browser)
    data = json.loads(first)
    assert data["schema"] == 2 and len(data["courses"]) == 1
    course = data["courses"][0]
    assert course["label"] == "export check" and course["patient"]["baseline_pco2"] == ["7.2", "kPa"]
    assert [g["events"] for g in course["gases"]] == [["oxygen_increased"], []]

    # delete all data, import the file: the same course comes back and reads the same
    go_to(browser, "log")
    browser.js("window.confirm = () => true; delete document.documentElement.dataset.deleteState;")
    tap(browser, By.ID, "log-delete-all")
    browser.wait_js(
        "while (document.documentElement.dataset.deleteState !== 'done')"
        "  await new Promise((r) => setTimeout(r, 20));"
    )
    path = tmp_path / "with-course.json"
    path.write_text(first)
    assert import_path(browser, path) == ["done", "Imported 0 case(s) and 1 course(s)."]
    assert export_text(browser) == first  # byte for byte (the export time is frozen)
    go_to(browser, "course")
    assert wait_course(browser, 2) == "done"
    assert shown_course(browser) == shown

    # a course with a bad gas is refused whole, and nothing changes
    bad = json.loads(first)
    bad["courses"][0]["gases"][1]["events"] = ["oxygen_doubled"]
    path = tmp_path / "bad-course.json"
    path.write_text(json.dumps(bad))
    state, message = import_path(browser, path)
    assert state == "refused" and 'course 1: gas 2: "events" must be a list' in message, message
    assert export_text(browser) == first
