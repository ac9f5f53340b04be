"""The case log's storage under stress: exact round trips, refused imports that change nothing, writes
the browser refuses (a real quota through the DevTools protocol, and injected IndexedDB failures),
"Delete all data" that really deletes, and a console that never sees a clinical value or label.

Every import goes through the page's own file input; every export is the exact file the page offers
for download (its Blob), with the export time frozen through caselog.clock so two exports of the same
log compare byte for byte. The figures (imports refused, records lost) are written to the terminal.
"""

from __future__ import annotations

import json

import pytest
from faults_support import (
    CONVERT,
    WorkerControl,
    export_text,
    import_path,
    report_figures,
    save_case,
    stored,
)
from screens_support import answer, fill, open_screen, phone, tap, wait_report, wait_screen
from selenium.webdriver.common.by import By

FIGURES = {"refused": 0, "lost": 0, "write_failures_reported": 0}
GAS = {"ph": "7.21", "pco2": ("8.6", "kPa"), "po2": ("8.4", "kPa"), "hco3": ("24.5", "mmol/L")}
HOSTILE = "<img src=x onerror=alert(1)> bay 3 · ünïcode ✓"
SAVED = "Saved to the case log on this device."
FULL = "storage for this site is full"


@pytest.fixture(scope="module", autouse=True)
def storage_figures(request):
    yield
    report_figures(
        request,
        f"case log: {FIGURES['refused']} imports refused (log unchanged each time), "
        f"{FIGURES['write_failures_reported']} failed writes reported, {FIGURES['lost']} records lost",
    )


def go_log(browser) -> None:
    tap(browser, By.CSS_SELECTOR, '.screens-nav a[data-screen="log"]')


def delete_all(browser) -> str:
    go_log(browser)
    browser.js("window.confirm = () => true; delete document.documentElement.dataset.deleteState;")
    tap(browser, By.ID, "log-delete-all")
    return browser.wait_js(
        "const d = document.documentElement;"
        "while (!d.dataset.deleteState || d.dataset.logCount !== '0')"
        "  await new Promise((r) => setTimeout(r, 20));"
        "return [d.dataset.deleteState, document.querySelector('#log-message').textContent];"
    )


def two_cases(browser, server) -> None:
    phone(browser)
    open_screen(browser, server.url, "gas")
    browser.wait_engine()
    fill(browser, "blood_gas", GAS)
    assert wait_report(browser, "blood_gas") == "done"
    assert save_case(browser, "blood_gas", HOSTILE) == SAVED
    fill(browser, "blood_gas", {"ph": "7.33"})
    assert wait_report(browser, "blood_gas") == "done"
    assert save_case(browser, "blood_gas", 'second, with "quotes"') == SAVED


def minimal_case(i: int) -> dict:
    return {"id": f"case-bulk-{i:05d}", "time": 1_700_000_000_000 + i, "label": "", "screen": "gas",
            "calc": "blood_gas", "fields": {"ph": "7.4"}, "outputs": {}}  # fmt: skip


def test_export_import_export_is_byte_for_byte(browser, server, tmp_path):
    two_cases(browser, server)
    first = export_text(browser)
    data = json.loads(first)
    assert [c["label"] for c in data["cases"]] == ['second, with "quotes"', HOSTILE]
    assert data["exported"] == "2026-01-02T03:04:05.000Z"  # frozen by the test
    assert delete_all(browser)[0] == "done"
    assert stored(browser) == []
    path = tmp_path / "log.json"
    path.write_bytes(first.encode("utf-8"))
    state, message = import_path(browser, path)
    assert (state, message) == ("done", "Imported 2 case(s)."), message
    again = export_text(browser)
    assert again == first  # the whole file, byte for byte
    assert json.dumps(json.loads(again)["cases"]) == json.dumps(data["cases"])
    # a label with markup is kept as text: imported, then shown as text (no element made)
    shown = browser.wait_js(
        "while (document.querySelectorAll('#log-list .log-item').length !== 2)"
        "  await new Promise((r) => setTimeout(r, 20));"
        "return [...document.querySelectorAll('#log-list .log-label')].map((p) => [p.textContent,"
        " p.children.length]);"
    )
    assert shown == [['second, with "quotes"', 0], [HOSTILE, 0]]
    assert browser.js("return document.querySelectorAll('#log img').length") == 0

    # importing the same file again replaces the two cases with themselves, and says so
    state, message = import_path(browser, path)
    assert state == "done" and "2 of them replaced a saved case with the same id" in message, message
    assert export_text(browser) == first


def forged(base: dict) -> dict[str, tuple[str, str]]:
    """name -> (file text, what the refusal must say)."""

    def with_case(change, index=0) -> str:
        data = json.loads(json.dumps(base))
        change(data["cases"][index])
        return json.dumps(data)

    def deep(n: int):
        node: dict = {"x": 1}
        for _ in range(n):
            node = {"x": node}
        return node

    text = json.dumps(base)
    dup = json.loads(text)
    dup["cases"].append(dict(dup["cases"][0]))
    extra_top = {**base, "script": "alert(1)"}
    return {
        "truncated": (text[: len(text) // 2], "not JSON"),
        "truncated-by-one": (text[:-1], "not JSON"),
        "time-as-text": (with_case(lambda c: c.update(time="yesterday")), '"time" must be a number'),
        "label-as-number": (with_case(lambda c: c.update(label=42)), '"label" must be a text'),
        "markup-in-a-value": (
            with_case(lambda c: c["fields"].update(ph="<img src=x onerror=alert(1)>")),
            'field "ph" must be a short typed value without markup',
        ),
        "markup-in-the-id": (with_case(lambda c: c.update(id="<b>x</b>")), '"id" must be a short text'),
        "extra-nesting": (with_case(lambda c: c["outputs"].update(deep=deep(12))), "nested more than 8"),
        "fields-nested": (with_case(lambda c: c["fields"].update(ph=[["7.2"], "kPa"])), 'field "ph"'),
        "extra-entry": (with_case(lambda c: c.update(html="<script>x</script>")), 'unknown entry "html"'),
        "duplicate-id": (json.dumps(dup), "repeats the id"),
        "calc-not-in-the-list": (with_case(lambda c: c.update(calc="convert")), '"calc" must be one of'),
        "calc-unknown": (with_case(lambda c: c.update(calc="rm -rf")), '"calc" must be one of'),
        "screen-not-its-own": (with_case(lambda c: c.update(screen="log")), '"screen" must be "gas"'),
        "field-unknown": (with_case(lambda c: c["fields"].update(dose="5")), '"dose" is not a field'),
        "unit-unknown": (with_case(lambda c: c["fields"].update(pco2=["8.6", "atm"])), 'unit "atm"'),
        "word-unknown": (with_case(lambda c: c["fields"].update(sample="cord")), 'field "sample"'),
        "wrong-format": (json.dumps({**base, "format": "another-log"}), "not a Tidewell case log"),
        "a-list": ("[]", "not a Tidewell case log"),
        "wrong-schema": (json.dumps({**base, "schema": 3}), "schema 3; this version reads schemas 1 and 2"),
        "schema-as-text": (json.dumps({**base, "schema": "1"}), 'schema "1"'),
        "extra-top-level": (json.dumps(extra_top), 'unknown entry "script"'),
        "oversized-bytes": (text + " " * (6 << 20), "MB; Tidewell imports case logs of up to 5 MB and 5,000"),
        "oversized-count": (
            json.dumps({**base, "cases": [minimal_case(i) for i in range(5_001)]}),
            "the file holds 5,001 cases; Tidewell imports case logs of up to 5 MB and 5,000 cases",
        ),
    }  # fmt: skip


def test_bad_imports_are_refused_and_change_nothing(browser, server, tmp_path):
    two_cases(browser, server)
    go_log(browser)
    before = export_text(browser)
    records = stored(browser)
    bad = forged(json.loads(before))
    for name, (text, why) in bad.items():
        path = tmp_path / f"{name}.json"
        path.write_text(text, encoding="utf-8")
        state, message = import_path(browser, path)
        assert state == "refused", (name, message)
        assert message.startswith("Nothing was imported:") and message.endswith(
            "The case log is unchanged."
        ), (
            name,
            message,
        )
        assert why in message, (name, message)
        assert export_text(browser) == before, name
        assert stored(browser) == records, name
        FIGURES["refused"] += 1
    assert browser.js("return document.querySelectorAll('#log img, #log script').length") == 0
    # the limits themselves are accepted: 5,000 small cases import
    path = tmp_path / "at-the-limit.json"
    path.write_text(json.dumps({**json.loads(before), "cases": [minimal_case(i) for i in range(5_000)]}))
    assert import_path(browser, path) == ["done", "Imported 5000 case(s)."]
    assert len(stored(browser)) == 5_002


def many_cases(before: str, tmp_path, n: int = 300):
    """A valid file of ``n`` cases (copies of the saved ones with new ids), 1 to 5 MB."""
    data = json.loads(before)
    cases = data["cases"]
    many = {**data, "cases": [{**cases[i % len(cases)], "id": f"case-many-{i:04d}"} for i in range(n)]}
    path = tmp_path / "many.json"
    path.write_text(json.dumps(many))
    assert 1_000_000 < path.stat().st_size < 5 * 1024 * 1024
    return path


def test_a_full_storage_is_reported_not_swallowed(browser, server, tmp_path):
    # A real quota, set through the DevTools protocol: the site may keep 1 byte, less than the offline
    # copy it holds already, as on a phone whose storage has filled up. Chromium reads the quota when
    # the site first writes to IndexedDB, so it is set before any case is saved.
    phone(browser)
    open_screen(browser, server.url, "gas")
    browser.wait_engine()
    browser.wait_controlled()
    origin = server.origin
    browser.driver.execute_cdp_cmd("Storage.overrideQuotaForOrigin", {"origin": origin, "quotaSize": 1})
    try:
        fill(browser, "blood_gas", GAS)
        assert wait_report(browser, "blood_gas") == "done"
        status = save_case(browser, "blood_gas", "one more")
        assert status.startswith("Not saved: the browser refused to store it because " + FULL), status
        assert "Your values are kept in the form." in status
        FIGURES["write_failures_reported"] += 1
        assert stored(browser) == []
        # an import of a valid file fails the same way, with the reason, and writes nothing
        template = json.dumps(
            {"format": "tidewell-case-log", "schema": 1, "cases": [minimal_case(i) for i in range(2)]}
        )
        path = tmp_path / "valid.json"
        path.write_text(template)
        state, message = import_path(browser, path)
        assert state == "refused" and FULL in message and message.endswith("The case log is unchanged."), (
            message
        )
        FIGURES["write_failures_reported"] += 1
        assert stored(browser) == []
        assert browser.js("return document.documentElement.dataset.logCount") == "0"
    finally:
        browser.driver.execute_cdp_cmd("Storage.overrideQuotaForOrigin", {"origin": origin})


def test_an_import_that_fails_half_way_leaves_the_log_as_it_was(browser, server, tmp_path):
    two_cases(browser, server)
    before = export_text(browser)
    records = stored(browser)
    many_path = many_cases(before, tmp_path)

    # a write that fails half way through the import (the third put throws), or a transaction
    # the browser aborts after some writes: either way none of the import's writes are kept
    faults = {
        "throw": "throw new DOMException('injected: the disk is full', 'QuotaExceededError');",
        "abort": "const r = put.apply(this, args); this.transaction.abort(); return r;",
    }
    expected = {"throw": FULL, "abort": "the browser cancelled the write before it was complete"}
    for name, body in faults.items():
        browser.js(
            "const put = IDBObjectStore.prototype.put; window.__put = put; let n = 0;"
            "IDBObjectStore.prototype.put = function (...args) {"
            f"  if (++n === 3) {{ {body} }} return put.apply(this, args); }};"
        )
        try:
            state, message = import_path(browser, many_path)
        finally:
            browser.js("IDBObjectStore.prototype.put = window.__put;")
        assert state == "refused" and expected[name] in message, (name, message)
        assert message.endswith("The case log is unchanged."), message
        assert stored(browser) == records, name
        assert export_text(browser) == before, name
        FIGURES["write_failures_reported"] += 1

    # with storage working again the same file imports whole, and nothing saved before is lost
    assert import_path(browser, many_path) == ["done", "Imported 300 case(s)."]
    now = {r["id"]: r for r in stored(browser)}
    assert len(now) == 302
    lost = [r["id"] for r in records if now.get(r["id"]) != r]
    FIGURES["lost"] += len(lost)
    assert lost == []


def test_delete_all_data_really_deletes(browser, server):
    two_cases(browser, server)
    browser.wait_controlled()
    tap(browser, By.CSS_SELECTOR, '.screens-nav a[data-screen="convert"]')
    browser.js(
        "for (const id of ['#theme-dark', '#unit-kpa', '#unit-mmhg']) document.querySelector(id).click();"
    )
    kept = browser.js("return Object.keys(localStorage).filter((k) => k.startsWith('tidewell:')).sort()")
    assert kept == ["tidewell:draft", "tidewell:pressure-unit", "tidewell:theme"]  # the form's draft too
    assert len(stored(browser)) == 2

    state, message = delete_all(browser)
    assert state == "done" and message.startswith("All data deleted"), message
    assert stored(browser) == []
    assert browser.js("return Object.keys(localStorage).concat(Object.keys(sessionStorage))") == []
    assert browser.js("return document.querySelector('#theme-auto').checked") is True

    # reopen the page: nothing comes back, but the offline copy of the app is still there
    browser.get(server.url + "#log")
    browser.wait_js(
        "while (document.documentElement.dataset.logCount === undefined)"
        "  await new Promise((r) => setTimeout(r, 20));"
    )
    assert browser.js("return document.documentElement.dataset.logCount") == "0"
    assert browser.js("return document.querySelector('#log-empty').hidden") is False
    assert stored(browser) == []
    assert browser.js("return Object.keys(localStorage).filter((k) => k.startsWith('tidewell:'))") == []
    assert browser.js("return document.querySelector('#theme-auto').checked") is True
    assert browser.wait_js("return (await caches.keys()).length;") == 1


def test_nothing_clinical_reaches_the_console(browser, server, tmp_path):
    label = "QZX-label-4417 bay nine"
    values = {"ph": "7.137", "pco2": ("9.73", "kPa"), "po2": ("7.61", "kPa"), "hco3": ("23.9", "mmol/L")}
    secrets = [label, "7.137", "9.73", "7.61", "23.9", "QZX-import-8812", "6.917"]
    browser.allow_console(r"injected engine fault")
    phone(browser)
    # a generous start-up watchdog: the restart after the crash below runs on a shared, busy machine
    open_screen(browser, server.url + "?engine-timeout=120000", "gas")
    browser.wait_engine()
    fill(browser, "blood_gas", values)
    assert wait_report(browser, "blood_gas") == "done"
    summary = browser.js("return document.querySelector('#p-blood_gas-report .summary p').textContent")
    assert save_case(browser, "blood_gas", label) == SAVED
    exported = export_text(browser)
    data = json.loads(exported)
    # an import with another distinctive label, one refused with it, then reopen a case
    data["cases"][0] = {**data["cases"][0], "id": "case-console-1", "label": "QZX-import-8812"}
    good = tmp_path / "good.json"
    good.write_text(json.dumps(data))
    assert import_path(browser, good)[0] == "done"
    bad = tmp_path / "bad.json"
    data["cases"][0]["fields"]["ph"] = "6.917<b>"
    bad.write_text(json.dumps(data))
    assert import_path(browser, bad)[0] == "refused"
    browser.js("document.querySelector('#log-list .log-open').click()")
    wait_screen(browser, "gas")
    assert wait_report(browser, "blood_gas") == "done"
    # a direct request with the same values, and a crash of the engine in the middle of it all
    request = {
        "calc": "blood_gas",
        "inputs": {
            "ph": 7.137,
            "pco2": {"value": 9.73, "unit": "kPa"},
            "po2": {"value": 7.61, "unit": "kPa"},
        },
        "options": {"pressure_unit": "kPa"},
    }
    answer(browser, request)
    control = WorkerControl(browser)
    control.log("worker console is captured 5190")
    control.crash("injected engine fault")
    browser.wait_js(
        "const e = window.tidewell.engine;"
        "while (!(e.restarts === 1 && e.state === 'ready')) await new Promise((r) => setTimeout(r, 20));",
        timeout=90,
    )
    answer(browser, request)
    answer(browser, CONVERT)

    browser.drain_console()
    messages = [e["message"] for e in browser.console]
    # the capture does see the worker's console, so its silence below means something
    assert any("worker console is captured 5190" in m for m in messages), messages
    leaks = [(s, m) for m in messages for s in [*secrets, summary] if s in m]
    assert leaks == [], leaks
    print(f"console entries checked: {len(messages)}")
