"""The answer first, at 360 x 740: a headline and the few numbers that change care, then the actions, then
the rest one tap away; each caution once; every label in clinical words; breathing leads with the settings
asked for; one pressure unit; saving that says so at the button; and the page on a desktop and at 200 %
zoom. Expected sentences and numbers are the core's own (tidewell.bridge in CPython)."""

from __future__ import annotations

import re

from screens_support import (
    TALL_PHONE,
    WARD_COPD_INPUTS,
    core,
    example_in_kpa,
    fill,
    open_screen,
    pf_text,
    phone,
    tap,
    use_kpa,
    wait_report,
)
from selenium.webdriver.common.by import By

COPD = WARD_COPD_INPUTS


def key_numbers(browser, calc: str) -> list:
    return browser.js(
        "return [...document.querySelectorAll('#p-' + arguments[0] + '-report .key')]"
        ".map((k) => [k.dataset.key, k.querySelector('dt').textContent, k.querySelector('dd').textContent])",
        calc,
    )


def test_the_reading_comes_first_and_the_rest_is_one_tap_away(browser, server):
    example_in_kpa(browser, server.url, "gas", "ward-copd", "blood_gas")
    expected = core({"calc": "blood_gas", "inputs": COPD, "options": {"pressure_unit": "kPa"}})
    order = browser.js(
        "return [...document.querySelector('#p-blood_gas-report').children].map((c) => c.className)"
    )
    assert order == ["answer-first", "row-buttons actions-row", "full-report"], order
    headline = browser.js("return document.querySelector('#p-blood_gas-report [data-headline]').textContent")
    assert headline == expected["outputs"]["interpretation"]
    keys = key_numbers(browser, "blood_gas")
    assert 3 <= len(keys) <= 5, keys
    labels = dict((k, label) for k, label, _ in keys)
    assert labels["pco2_target"] == "PaCO2 to aim for" and labels["spo2_target"] == "SpO2 target (%)"
    target = expected["outputs"]["pco2_target"]
    assert dict((k, v) for k, _, v in keys)["pco2_target"] == f"{target['value']:.1f} kPa"  # kPa 1 dp
    # what must be acted on now sits with the headline, with its word
    urgent = [f["code"] for f in expected["findings"] if f["severity"] == "urgent"]
    top = browser.js(
        "return [...document.querySelectorAll('#p-blood_gas-report .answer-first .finding')]"
        ".map((f) => f.dataset.code)"
    )
    assert top == urgent
    # the rest: closed, one tap
    assert (
        browser.js("return document.querySelector('#p-blood_gas-report details.full-report').open") is False
    )
    assert not browser.driver.find_element(By.CSS_SELECTOR, "#p-blood_gas-report .summary").is_displayed()
    tap(browser, By.CSS_SELECTOR, "#p-blood_gas-report details.full-report > summary")
    assert browser.driver.find_element(By.CSS_SELECTOR, "#p-blood_gas-report .summary").is_displayed()
    # the general caution once on the page (the footer), never in the report
    report_text = browser.js("return document.querySelector('#p-blood_gas-report').textContent")
    general = [c for c in expected["cautions"] if c.startswith("Decision support only")]
    general += [t for t in expected["summary"] if t.startswith("Decision support only")]
    assert general and not [t for t in general if t in report_text]
    assert browser.driver.find_element(By.CSS_SELECTOR, "footer .caution").is_displayed()
    # every label in clinical words, from the table: no raw names, no unit codes
    page = browser.js("return document.querySelector('#gas').textContent")
    assert "(unlabelled" not in page, re.findall(r"\(unlabelled: [^)]*\)", page)
    dts = browser.js("return [...document.querySelectorAll('#gas dt')].map((d) => d.textContent)")
    assert dts and not [d for d in dts if "_" in d or ">" in d or "›" in d], dts
    for code in ("degC", "hypercapnia_risk", "van slyke hb5", "pco2 status"):
        assert code not in page, code
    units = browser.js(
        "return [...document.querySelectorAll('#p-blood_gas-temperature-unit option')].map((o) => o.text)"
    )
    assert units == ["°C", "°F"]


def test_the_headline_is_kept_next_to_the_values_being_typed(browser, server):
    phone(browser, TALL_PHONE)
    open_screen(browser, server.url, "gas")
    use_kpa(browser)
    browser.wait_engine()
    fill(browser, "blood_gas", {"ph": "7.28", "pco2": ("9.1", "kPa"), "po2": ("7.2", "kPa"), "hco3": "31"})
    fill(browser, "blood_gas", {"fio2": ("28", "%")})  # the fifth value
    assert wait_report(browser, "blood_gas") == "done"
    near = browser.driver.find_element(By.CSS_SELECTOR, "#p-blood_gas .near-headline")
    headline = browser.js("return document.querySelector('#p-blood_gas-report [data-headline]').textContent")
    assert near.is_displayed() and headline in near.text
    # on screen with the field just typed, above the bottom bar
    box = browser.js(
        "const n = document.querySelector('#p-blood_gas .near-headline').getBoundingClientRect();"
        "const bar = document.querySelector('.screens-nav').getBoundingClientRect();"
        "const f = document.getElementById('p-blood_gas-fio2').getBoundingClientRect();"
        "return [n.top, n.bottom, bar.top, f.top, innerHeight];"
    )
    _, bottom, bar_top, field_top, height = box
    assert 0 <= field_top and bottom <= bar_top <= height, box


def test_breathing_leads_with_the_settings_asked_for(browser, server):
    phone(browser, TALL_PHONE)
    open_screen(browser, server.url, "breathing")
    use_kpa(browser)
    browser.wait_engine()
    fill(
        browser,
        "ventilation",
        {"rr": "18", "vt": ("450", "mL"), "pco2": ("7.5", "kPa"), "target_pco2": ("6.0", "kPa")},
    )
    assert wait_report(browser, "ventilation") == "done"
    inputs = {
        "rr": 18,
        "vt": {"value": 450, "unit": "mL"},
        "pco2": {"value": 7.5, "unit": "kPa"},
        "target_pco2": {"value": 6.0, "unit": "kPa"},
    }
    expected = core({"calc": "ventilation", "inputs": inputs, "options": {"pressure_unit": "kPa"}})
    headline = browser.js(
        "return document.querySelector('#p-ventilation-report [data-headline]').textContent"
    )
    assert headline == expected["summary"][0] and headline.startswith("To reach PaCO2 6.0 kPa: rate ")
    settings = expected["outputs"]["settings"]
    keys = key_numbers(browser, "ventilation")
    assert keys[:2] == [
        ["settings.rr", "Rate at the same tidal volume", f"{settings['rr']['value']} /min"],
        ["settings.vt", "Tidal volume at the same rate", f"{settings['vt']['value']:.0f} mL"],
    ], keys


def test_saving_says_so_at_the_button_once_per_change_with_undo_and_a_soft_warning(browser, server):
    phone(browser, TALL_PHONE)
    open_screen(browser, server.url, "gas")
    browser.wait_engine()
    browser.driver.find_element(By.CSS_SELECTOR, "[data-example=sedative]").click()
    assert wait_report(browser, "blood_gas") == "done"
    label = browser.driver.find_element(By.ID, "p-blood_gas-label")
    browser.js("arguments[0].scrollIntoView({block: 'center'})", label)
    label.send_keys("John Smith DOB 01/02/1950")
    warning = browser.driver.find_element(By.ID, "p-blood_gas-label-warn")
    assert "a date" in warning.text and "a name" in warning.text and "still save" in warning.text
    label.clear()
    label.send_keys("bay 3, second gas")
    assert browser.js("return document.getElementById('p-blood_gas-label-warn').textContent") == ""
    # a double tap saves once
    browser.js("const b = document.getElementById('p-blood_gas-save'); b.click(); b.click();")
    browser.wait_js(
        "const b = document.getElementById('p-blood_gas-save');"
        "while (b.textContent !== 'Saved') await new Promise((r) => setTimeout(r, 20));"
    )
    assert browser.js("return document.getElementById('p-blood_gas-save').disabled") is True
    browser.js("document.getElementById('p-blood_gas-save').click()")
    # a change makes it savable again
    label.send_keys(" (repeat)")
    assert browser.js("return document.getElementById('p-blood_gas-save').textContent") == "Save to case log"
    browser.js("location.hash = 'log'")
    count = browser.wait_js(
        "while (document.documentElement.dataset.logCount === undefined)"
        "  await new Promise((r) => setTimeout(r, 20));"
        "return document.documentElement.dataset.logCount;"
    )
    assert count == "1"
    tap(browser, By.CSS_SELECTOR, "#log-list .log-delete")
    browser.wait_js(
        "while (document.documentElement.dataset.logCount !== '0') await new Promise((r) => setTimeout(r));"
    )
    tap(browser, By.ID, "log-undo")
    browser.wait_js(
        "while (document.documentElement.dataset.logCount !== '1') await new Promise((r) => setTimeout(r));"
    )
    assert (
        browser.js("return document.querySelector('#log-list .log-label').textContent") == "bay 3, second gas"
    )


def nav_lines(browser) -> list:
    """For each tab label: how many lines its text takes (1 = never broken)."""
    return browser.js(
        "return [...document.querySelectorAll('.screens-nav a')].map((a) => {"
        "  const t = [...a.childNodes].find((n) => n.nodeType === 3);"
        "  const r = document.createRange(); r.selectNodeContents(t);"
        "  const tops = new Set([...r.getClientRects()].map((x) => Math.round(x.top)));"
        "  return [t.textContent, tops.size]; });"
    )


def test_desktop_and_200_percent_zoom(browser, server):
    open_screen(browser, server.url, "gas")
    browser.wait_engine()
    # a desktop: the tabs are pills on one line, words whole
    phone(browser, (1280, 800))
    assert all(lines == 1 for _, lines in nav_lines(browser)), nav_lines(browser)
    # 200 % zoom on a 360 x 740 phone is a 180 x 370 layout: a slim bar, no word broken
    # (a window that narrow is refused by the driver: the page's viewport is emulated instead)
    browser.driver.execute_cdp_cmd(
        "Emulation.setDeviceMetricsOverride",
        {"width": 180, "height": 370, "deviceScaleFactor": 1, "mobile": False},
    )
    assert browser.js("return [innerWidth, innerHeight]") == [180, 370]
    assert all(lines == 1 for _, lines in nav_lines(browser)), nav_lines(browser)
    bar, height = browser.js("return [document.querySelector('.screens-nav').offsetHeight, innerHeight]")
    assert bar <= height / 5 * 0.75, (bar, height)
    browser.driver.execute_cdp_cmd("Emulation.clearDeviceMetricsOverride", {})
    phone(browser, TALL_PHONE)
    # every expandable section shows a marker that turns when open
    marker = browser.js(
        "const s = document.querySelector('#p-blood_gas details.more > summary');"
        "return getComputedStyle(s, '::before').content;"
    )
    assert marker == '"▸"', marker
    # the converter is its own screen; the settings are behind the gear
    browser.js("location.hash = 'convert'")
    assert browser.driver.find_element(By.ID, "convert-form").is_displayed()
    assert not browser.driver.find_element(By.ID, "unit-kpa").is_displayed()
    browser.driver.find_element(By.CSS_SELECTOR, "a.bar-settings").click()
    assert browser.driver.find_element(By.ID, "unit-kpa").is_displayed()
    # the iPhone storage note only on iPhone and iPad (this is desktop Chromium)
    assert not browser.driver.find_element(By.ID, "ios-note").is_displayed()
    # the status line in plain words (the offline copy may still be storing: test_first_load.py)
    text = browser.js("return document.getElementById('engine-text').textContent")
    assert re.fullmatch(
        r"Ready( offline)?\. Every calculation runs on this device\."
        r"|Ready\. Storing for offline use: \d+\.\d MB of \d+\.\d MB stored\.",
        text,
    ), text


def _pf_shown(browser, calc: str) -> list:
    """[label, button text, smaller text, its font size over the figure's] of panel ``calc``'s P/F."""
    return browser.js(
        "const b = document.querySelector('#p-' + arguments[0] + '-report button.num[data-out=pf_ratio]');"
        "if (!b) return null;"
        "const small = b.querySelector('small.aside');"
        "const ratio = small ? parseFloat(getComputedStyle(small).fontSize)"
        "  / parseFloat(getComputedStyle(b).fontSize) : null;"
        "return [b.closest('dd').previousElementSibling.textContent, b.textContent,"
        "  small ? small.textContent : '', ratio];",
        calc,
    )


def _wait_pf(browser, calc: str, text: str) -> None:
    """Wait until panel ``calc`` shows the P/F ``text`` (a report of the last value typed, not an earlier
    one: the report of the first required fields can be "done" while the rest is still being typed)."""
    browser.wait_js(
        "const sel = '#p-' + arguments[0] + '-report button.num[data-out=pf_ratio]';"
        "while ((document.querySelector(sel) || {}).textContent !== arguments[1])"
        "  await new Promise((r) => setTimeout(r, 50));",
        calc,
        text,
    )


def test_pf_ratio_in_the_users_unit_on_every_screen(browser, server):
    """P/F: the contract fixes blood_gas's in mmHg, alveolar_gas's follows the request; a kPa user reads kPa
    (1 dp, "P/F (kPa)") with the mmHg figure beside it in smaller type, the same on both screens."""
    example_in_kpa(browser, server.url, "gas", "ward-copd", "blood_gas")
    expected = core({"calc": "blood_gas", "inputs": COPD, "options": {"pressure_unit": "kPa"}})
    pf = expected["outputs"]["pf_ratio"]
    assert pf["unit"] == "mmHg"  # fixed by the contract, whatever the unit asked for
    tap(browser, By.CSS_SELECTOR, "#p-blood_gas-report details.full-report > summary")
    label, text, aside, ratio = _pf_shown(browser, "blood_gas")
    # PO2 7.2 kPa on FiO2 0.28: 7.2 / 0.28 = 25.7 kPa = 193 mmHg (1 kPa = 7.50062 mmHg)
    assert label == "P/F (kPa)"
    assert text == pf_text(pf, "kPa") == "25.7 kPa 193 mmHg"
    assert aside == "193 mmHg" and ratio < 0.9
    # the step behind it says the same
    tap(browser, By.CSS_SELECTOR, "#p-blood_gas-report button.num[data-out=pf_ratio]")
    step = browser.js(
        "return document.querySelector('#p-blood_gas-report [data-out=pf_ratio] + .how').textContent"
    )
    assert "= 25.7 kPa (193 mmHg)" in step, step
    assert browser.js("return document.documentElement.scrollWidth") <= 360

    # the breathing screen: the alveolar gas panel's P/F (in the request's unit) reads the same way
    open_screen(browser, server.url, "breathing")
    fill(browser, "alveolar_gas", {"fio2": ("28", "%"), "pco2": ("9.1", "kPa"), "po2": ("7.2", "kPa")})
    _wait_pf(browser, "alveolar_gas", "25.7 kPa 193 mmHg")
    alveolar = core(
        {
            "calc": "alveolar_gas",
            "inputs": {"fio2": {"value": 28, "unit": "%"}, "pco2": COPD["pco2"], "po2": COPD["po2"]},
            "options": {"pressure_unit": "kPa"},
        }
    )
    assert alveolar["outputs"]["pf_ratio"]["unit"] == "kPa"
    keys = {k: (label, value) for k, label, value in key_numbers(browser, "alveolar_gas")}
    assert keys["pf_ratio"] == ("P/F (kPa)", "25.7 kPa 193 mmHg"), keys
    shown = _pf_shown(browser, "alveolar_gas")
    assert shown[1:3] == [pf_text(alveolar["outputs"]["pf_ratio"], "kPa"), "193 mmHg"]

    # an mmHg user reads mmHg only, on both screens (the draft, written 300 ms after typing, refills the form)
    browser.wait_js(
        "const po2 = () => ((JSON.parse(localStorage.getItem('tidewell:draft') || '{}').panels || {})"
        "  .alveolar_gas || {}).po2;"
        "while (!po2()) await new Promise((r) => setTimeout(r, 50));"
    )
    browser.js("localStorage.setItem('tidewell:pressure-unit', 'mmHg')")
    browser.driver.refresh()
    browser.wait_engine()
    _wait_pf(browser, "alveolar_gas", "193 mmHg")  # the draft is filled back in and read again
    keys = {k: (label, value) for k, label, value in key_numbers(browser, "alveolar_gas")}
    assert keys["pf_ratio"] == ("P/F (mmHg)", "193 mmHg"), keys
    open_screen(browser, server.url, "gas")
    _wait_pf(browser, "blood_gas", "193 mmHg")
    tap(browser, By.CSS_SELECTOR, "#p-blood_gas-report details.full-report > summary")
    assert _pf_shown(browser, "blood_gas")[:3] == ["P/F (mmHg)", "193 mmHg", ""]
