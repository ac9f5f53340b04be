"""The screens people use, at a 360 x 640 viewport: each form entered by typing, and every number shown
checked against the page engine's answer for the same request, itself checked against the Python core's
(tidewell.bridge in CPython) with the shared tolerance of tests/compare.py."""

from __future__ import annotations

from screens_support import (
    PHONE,
    add_to_course,
    answer,
    check_numbers,
    core,
    fill,
    fill_flight_journey,
    go_to,
    no_horizontal_overflow,
    open_screen,
    phone,
    shell_format,
    tap,
    wait_report,
    wait_theme,
)
from selenium.webdriver.common.by import By

# An invented teaching sample (not a patient): acute-on-chronic CO2 retention on 28 % oxygen.
GAS_FIELDS = {
    "ph": "7,28",  # a decimal comma, as typed on many phones
    "pco2": ("9.1", "kPa"),
    "po2": ("7.2", "kPa"),
    "hco3": ("31", "mmol/L"),
    "fio2": ("28", "%"),
    "age": "70",
    "hypercapnia_risk": True,
}
GAS_INPUTS = {
    "ph": 7.28,
    "pco2": {"value": 9.1, "unit": "kPa"},
    "po2": {"value": 7.2, "unit": "kPa"},
    "hco3": {"value": 31, "unit": "mmol/L"},
    "fio2": {"value": 28, "unit": "%"},
    "age": 70,
    "hypercapnia_risk": True,
}


def gas(unit: str) -> dict:
    return {"calc": "blood_gas", "inputs": GAS_INPUTS, "options": {"pressure_unit": unit}}


def test_blood_gas_screen_shows_the_core_answer_and_the_unit_toggle_keeps_the_meaning(browser, server):
    phone(browser)
    open_screen(browser, server.url, "gas")
    # typed before the engine is ready: kept, and computed the moment it is
    fill(browser, "blood_gas", GAS_FIELDS)
    assert wait_report(browser, "blood_gas") == "done"
    unit = browser.js("return document.querySelector('input[name=pressure-unit]:checked').value")
    assert unit == "mmHg"  # Chromium here runs as en-US: the locale's default unit
    expected = answer(browser, gas(unit))
    n = check_numbers(
        browser,
        "blood_gas",
        expected,
        {"hco3", "standard_base_excess", "a_a_gradient", "pco2_target", "pf_ratio"},
    )
    assert n >= 15
    summary = browser.js("return document.querySelector('#p-blood_gas-report .summary').textContent")
    # the general "decision support only" is said once, in the footer, not in each report (test_report.py)
    for sentence in expected["summary"]:
        assert sentence in summary or sentence.startswith("Decision support only")
    # findings in the core's order, each with a word for its severity (not colour alone)
    findings = browser.js(
        "return [...document.querySelectorAll('#p-blood_gas-report .finding')]"
        ".map((li) => [li.dataset.code, li.querySelector('.sev-word').textContent])"
    )
    words = {"urgent": "Act now: ", "notable": "Worth a look: ", "info": "For the record: "}
    assert findings == [[f["code"], words[f["severity"]]] for f in expected["findings"]]
    cautions = browser.js(
        "return [...document.querySelectorAll('#p-blood_gas-report .cautions li')].map((li) =>"
        " li.textContent)"
    )
    assert cautions == [c for c in expected["cautions"] if not c.startswith("Decision support only")]
    # tapping a number shows its step: formula and source (in the full report, one tap away)
    browser.js("document.querySelector('#p-blood_gas-report details.full-report').open = true")
    button = browser.driver.find_element(
        By.CSS_SELECTOR, '#p-blood_gas-report button.num[data-out="hco3_computed"]'
    )
    browser.js("arguments[0].scrollIntoView({block: 'center'})", button)
    button.click()
    how = browser.wait_js(
        "const b = arguments[0]; let t;"
        "while (!(b.nextElementSibling && (t = b.nextElementSibling.innerText)))"
        "  await new Promise((r) => setTimeout(r, 20));"
        "return t;",
        button,
        timeout=10,
    )
    step = next(s for s in expected["steps"] if s["output"] == "hco3_computed")
    assert step["formula"] in how and step["source"] in how and step["label"] in how
    # pictures drawn from the core's arrays
    # (drawn in the background once numpy has loaded: wait for both, never read them at once)
    pictures = browser.wait_js(
        "let p = [];"
        "while ((p = [...document.querySelectorAll('#gas figure.picture')].map((f) => f.dataset.picture))"
        "  .length < 2) await new Promise((r) => setTimeout(r, 20));"
        "return p;",
        timeout=120,
    )
    assert pictures == ["acidbase", "odc"]
    curve = answer(
        browser,
        {
            "calc": "oxygen_dissociation_curve",
            "inputs": {k: GAS_INPUTS[k] for k in ("ph", "pco2", "po2")},
            "options": {"pressure_unit": unit},
        },
    )
    point = browser.js(
        "const c = document.querySelector('[data-picture=odc] circle'); return"
        " [c.getAttribute('cx'), c.getAttribute('cy')];"
    )
    assert point and curve["outputs"]["point"]["so2"] > 0

    # the unit toggle: the same sample, shown in kPa; what was typed keeps its unit
    open_screen(browser, server.url, "settings")
    tap(browser, By.ID, "unit-kpa")
    open_screen(browser, server.url, "gas")
    # the report is recalculated in the new unit: wait for that report, not the one in mmHg before it
    browser.wait_js(
        "const r = document.querySelector('#p-blood_gas-report');"
        "for (;;) { const b = r.querySelector('button.num[data-out=a_a_gradient]');"
        "  if (r.dataset.state === 'done' && !r.dataset.busy && b && b.textContent.endsWith(' kPa')) return;"
        "  await new Promise((ok) => setTimeout(ok, 50)); }",
        timeout=90,
    )
    check_numbers(browser, "blood_gas", answer(browser, gas("kPa")), {"hco3", "a_a_gradient", "pco2_target"})
    assert browser.js("return document.querySelector('#p-blood_gas-pco2-unit').value") == "kPa"
    assert browser.js("return document.querySelector('#p-blood_gas-ph').value") == "7,28"
    # remembered
    browser.driver.refresh()
    assert browser.js("return localStorage.getItem('tidewell:pressure-unit')") == "kPa"
    assert browser.js("return document.querySelector('#unit-kpa').checked") is True


def test_errors_and_hints_show_at_the_field(browser, server):
    phone(browser)
    open_screen(browser, server.url, "gas")
    browser.wait_engine()
    # 68 typed as kPa: not survivable; the core says which unit was probably meant
    fill(browser, "blood_gas", {"ph": "7.28", "pco2": ("68", "kPa")})
    assert wait_report(browser, "blood_gas") == "error"
    # a note is held back while its field is being typed in (test_entry.py): wait for the pause
    browser.wait_js("while (document.querySelector('[data-held]')) await new Promise((r) => setTimeout(r));")
    # a refusal computes nothing: its message, which echoes the value as the form sent it (a request sent
    # through WebDriver arrives with its keys reordered), is the CPython core's word for word
    expected = core(
        {
            "calc": "blood_gas",
            "inputs": {"ph": 7.28, "pco2": {"value": 68, "unit": "kPa"}},
            "options": {"pressure_unit": "mmHg"},
        },
    )
    at_field = browser.js(
        "return document.querySelector('#p-blood_gas [data-input=pco2] .field-error').textContent"
    )
    messages = [e["message"] for e in expected["errors"] if e["field"] == "inputs.pco2"]
    assert messages and at_field == " ".join(messages)
    assert "Did you mean 68 mmHg?" in at_field
    assert (
        browser.js("return document.querySelector('#p-blood_gas-pco2').getAttribute('aria-invalid')")
        == "true"
    )
    fill(browser, "blood_gas", {"ph": "abc", "pco2": ("9.1", "kPa")})
    assert wait_report(browser, "blood_gas") == "error"
    code = browser.js(
        "return document.querySelector('#p-blood_gas [data-input=ph] .field-error').dataset.code"
    )
    assert code == "not_a_number"


def test_breathing_screen_ventilation_and_alveolar_gas(browser, server):
    phone(browser)
    open_screen(browser, server.url, "breathing")
    fill(
        browser,
        "ventilation",
        {
            "rr": "14",
            "vt": ("450", "mL"),
            "pco2": ("65", "mmHg"),
            "target_pco2": ("50", "mmHg"),
            "height": ("170", "cm"),
            "sex": "female",
        },
    )
    fill(
        browser, "alveolar_gas", {"fio2": ("0.35", "fraction"), "pco2": ("65", "mmHg"), "po2": ("70", "mmHg")}
    )
    assert wait_report(browser, "ventilation") == "done"
    assert wait_report(browser, "alveolar_gas") == "done"
    mm = lambda v, u="mmHg": {"value": v, "unit": u}  # noqa: E731
    vent = answer(
        browser,
        {
            "calc": "ventilation",
            "options": {"pressure_unit": "mmHg"},
            "inputs": {
                "rr": 14,
                "vt": mm(450, "mL"),
                "pco2": mm(65),
                "target_pco2": mm(50),
                "height": mm(170, "cm"),
                "sex": "female",
            },
        },
    )
    alv = answer(
        browser,
        {
            "calc": "alveolar_gas",
            "options": {"pressure_unit": "mmHg"},
            "inputs": {"fio2": 0.35, "pco2": mm(65), "po2": mm(70)},
        },
    )
    assert (
        check_numbers(
            browser,
            "ventilation",
            vent,
            {"minute_ventilation", "alveolar_ventilation", "vd_vt", "to_target.rr_at_same_vt"},
        )
        >= 8
    )
    assert (
        check_numbers(browser, "alveolar_gas", alv, {"pio2", "pao2_alveolar", "a_a_gradient", "pf_ratio"})
        >= 5
    )


def test_flight_screen_altitude_profile_and_oxygen_supply(browser, server):
    phone(browser)
    open_screen(browser, server.url, "flight")
    browser.wait_engine()
    fill_flight_journey(browser)
    assert "Invented" in browser.js("return document.querySelector('#example-note-flight').textContent")
    q = lambda v, u: {"value": v, "unit": u}  # noqa: E731
    inputs = {
        "altitude": q(8000, "ft"),
        "fio2": q(30, "%"),
        "po2": q(9.5, "kPa"),
        "pco2": q(6.2, "kPa"),
        "target_po2": q(8, "kPa"),
    }
    alt = answer(browser, {"calc": "altitude", "inputs": inputs, "options": {"pressure_unit": "mmHg"}})
    assert (
        check_numbers(
            browser, "altitude", alt, {"pb", "pio2", "pao2_alveolar", "po2_predicted", "fio2_equivalent"}
        )
        >= 6
    )
    supply = answer(
        browser,
        {
            "calc": "oxygen_supply",
            "options": {"pressure_unit": "mmHg"},
            "inputs": {
                "cylinder_water_capacity": q(2, "L"),
                "cylinder_pressure": q(200, "bar"),
                "cylinders": 1,
                "flow": q(4, "L/min"),
                "duration": q(90, "min"),
            },
        },
    )
    assert (
        check_numbers(
            browser, "oxygen_supply", supply, {"available_litres", "required_litres", "minutes_available"}
        )
        >= 4
    )
    sufficient = browser.js(
        "return document.querySelector('#p-oxygen_supply-report button.num[data-out=sufficient]').textContent"
    )
    assert sufficient == ("yes" if supply["outputs"]["sufficient"] else "no")
    # the profile: drawn from altitude_profile's lists, with the cabin line and the target line
    prof = answer(
        browser, {"calc": "altitude_profile", "inputs": inputs, "options": {"pressure_unit": "mmHg"}}
    )
    drawn = browser.js(
        "const f = document.querySelector('[data-picture=profile]');"
        "return [f.querySelectorAll('path').length, !!f.querySelector('.line-cabin'),"
        " !!f.querySelector('.line-target'),"
        " f.querySelector('path.line-pt').getAttribute('d').split('L').length];"
    )
    assert drawn[:3] == [2, True, True]
    assert drawn[3] == len(prof["outputs"]["altitude"]["value"])


def test_every_screen_fits_the_phone_and_night_mode_toggles(browser, server):
    phone(browser)
    open_screen(browser, server.url, "gas")
    assert browser.js("return [innerWidth, innerHeight]") == list(PHONE)
    browser.wait_engine()
    browser.driver.find_element(By.CSS_SELECTOR, "[data-example=mixed]").click()
    assert wait_report(browser, "blood_gas") == "done"
    add_to_course(browser)  # the Course screen is measured with a gas in it
    for screen in ["gas", "breathing", "flight", "course", "log", "convert"]:
        go_to(browser, screen)  # waits until the page has handled the tap (the attribute reads the screen)
        width, inner = no_horizontal_overflow(browser)
        assert width <= inner, (screen, width, inner)
        # the nav is one tap away and every tab is at least 44 px square
        sizes = browser.js(
            "return [...document.querySelectorAll('.screens-nav a')].map((a) => "
            "[a.getBoundingClientRect().width, a.getBoundingClientRect().height])"
        )
        assert all(w >= 44 and h >= 44 for w, h in sizes), sizes
        small = browser.js(
            "return [...document.querySelectorAll('#' + arguments[0] + ' button, #' + arguments[0]"
            " + ' select,"
            " #' + arguments[0] + ' input[type=text]')].filter((e) => e.offsetParent)"
            ".map((e) => [e.id || e.className, e.getBoundingClientRect().height]).filter(([, h]) => h < 44)",
            screen,
        )
        assert small == [], (screen, small)
    # night mode: manual toggle, remembered, and the page really turns dark
    background = "return getComputedStyle(document.body).backgroundColor"
    day = browser.js(background)
    browser.driver.find_element(By.CSS_SELECTOR, 'a[data-screen="settings"]').click()  # the top bar gear
    tap(browser, By.ID, "theme-dark")
    wait_theme(browser, "dark")
    night = browser.js(background)
    assert night != day and night == "rgb(11, 20, 22)"
    browser.driver.refresh()
    wait_theme(browser, "dark")  # remembered: dark again after the reload, with no tap
    tap(browser, By.ID, "theme-light")
    wait_theme(browser, "light")
    assert browser.js(background) == day
    # following the device: emulate a dark preference
    tap(browser, By.ID, "theme-auto")
    browser.driver.execute_cdp_cmd(
        "Emulation.setEmulatedMedia", {"features": [{"name": "prefers-color-scheme", "value": "dark"}]}
    )
    browser.wait_js(
        "while (document.documentElement.dataset.theme !== 'dark') await new Promise((r) =>"
        " setTimeout(r, 20));",
        timeout=10,
    )


def test_formatting_matches_javascript():
    # the test's own formatter against JavaScript's toFixed on awkward values (ties, negatives)
    assert shell_format(2.675, 2) == "2.67"  # binary 2.67499999...
    assert shell_format(0.5, 0) == "1" and shell_format(-0.5, 0) == "-1" and shell_format(2.5, 0) == "3"
    assert shell_format(123.456789, None) == "123.457"
