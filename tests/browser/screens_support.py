"""Helpers for the screen tests: fill a panel through its form, read what the report shows, and format
the core's own answer the way the shell does (to the core's ``display`` decimals)."""

from __future__ import annotations

import json
from decimal import ROUND_HALF_UP, Decimal

from selenium.webdriver.common.by import By
from selenium.webdriver.support.ui import Select

import compare
from tidewell import bridge

PHONE = (360, 640)
#: the phone the entry and report tests use (360 x 740: a common phone with the browser's bars shown)
TALL_PHONE = (360, 740)


def core(request: dict) -> dict:
    return json.loads(bridge.handle(json.dumps(request)))


def same_as_core(got, request: dict, where: str = "", part=lambda response: response) -> None:
    """The page's answer (Pyodide, numpy 2.0.2 in WebAssembly), or the ``part`` of it a screen shows, is the
    CPython core's to ``request``: numbers to compare.REL_WEBASSEMBLY, words and codes exactly
    (tests/compare.py)."""
    compare.check_against(core, request, got, compare.REL_WEBASSEMBLY, where, part)


def answer(browser, request: dict, timeout: float = 90) -> dict:
    """The page engine's own answer to ``request``, checked against the CPython core's (same_as_core). What
    a screen shows is then compared with this answer exactly: it is the answer the screen got."""
    got = browser.compute(request, timeout=timeout)
    same_as_core(got, request)
    return got


def shell_format(value: float, decimals) -> str:
    """JavaScript's value.toFixed(d) (exact binary value, ties away from zero), or six significant digits."""
    if isinstance(decimals, int):
        return str(Decimal(value).quantize(Decimal(1).scaleb(-decimals), rounding=ROUND_HALF_UP))
    return f"{value:.6g}"


def phone(browser, size: tuple[int, int] = PHONE) -> None:
    """A viewport of ``size`` (360 x 640 by default; the window is sized so that the page itself is)."""
    browser.driver.set_window_size(*size)
    inner = browser.js("return [innerWidth, innerHeight]")
    browser.driver.set_window_size(size[0] * 2 - inner[0], size[1] * 2 - inner[1])


def open_screen(browser, url: str, screen: str) -> None:
    """Load ``url#screen`` (only a hash change when the page is already open) and wait until it is shown."""
    browser.get(f"{url}#{screen}")
    wait_screen(browser, screen)


def wait_screen(browser, screen: str, timeout: float = 20) -> None:
    """Wait until the page has handled the change to ``screen`` (its hashchange handler sets the
    attribute)."""
    browser.wait_js(
        "while (document.documentElement.dataset.screen !== arguments[0] ||"
        "       !document.querySelector('.panel, #log-list'))"
        "  await new Promise((r) => setTimeout(r, 20));",
        screen,
        timeout=timeout,
    )


def go_to(browser, screen: str) -> None:
    """Tap the link to ``screen`` (a tab of the bottom bar, or the gear) and wait for that screen."""
    browser.driver.find_element(By.CSS_SELECTOR, f'a[data-screen="{screen}"]').click()
    wait_screen(browser, screen)


def wait_theme(browser, theme: str, timeout: float = 10) -> None:
    """Wait until the page's theme attribute reads ``theme`` (set by the settings' change handler)."""
    browser.wait_js(
        "while (document.documentElement.dataset.theme !== arguments[0])"
        "  await new Promise((r) => setTimeout(r, 20));",
        theme,
        timeout=timeout,
    )


def fill(browser, calc: str, fields: dict) -> None:
    """Type ``fields`` into panel ``calc``: name -> text, (text, unit), True (tick) or a word."""
    d = browser.driver
    for name, value in fields.items():
        box = d.find_element(By.CSS_SELECTOR, f'#p-{calc} [data-input="{name}"]')
        details = box.find_elements(By.XPATH, "ancestor::details")
        if details and not details[0].get_attribute("open"):
            summary = details[0].find_element(By.TAG_NAME, "summary")
            browser.js("arguments[0].scrollIntoView({block: 'center'})", summary)  # clear of the bottom bar
            summary.click()
        fid = f"p-{calc}-{name}"
        if value is True:
            box_input = d.find_element(By.ID, fid)
            if not box_input.is_selected():
                box_input.click()
            continue
        if isinstance(value, tuple):
            text, unit = value
            Select(d.find_element(By.ID, f"{fid}-unit")).select_by_value(unit)
        else:
            text = value
        element = d.find_element(By.ID, fid)
        if element.tag_name == "select":
            Select(element).select_by_value(text)
        else:
            element.clear()
            element.send_keys(text)


def wait_report(browser, calc: str, timeout: float = 90, states=("done", "error")) -> str:
    """Wait until panel ``calc`` shows one of ``states`` (a reading or errors by default; ``ask`` when a
    value can be read two ways) and no newer calculation is pending."""
    return browser.wait_js(
        "const r = document.querySelector('#p-' + arguments[0] + '-report');"
        "for (;;) { await new Promise((ok) => setTimeout(ok, 50));"
        "  if (arguments[1].includes(r.dataset.state) && !r.dataset.busy) return r.dataset.state; }",
        calc,
        list(states),
        timeout=timeout,
    )


def use_kpa(browser) -> None:
    """The pressure unit on kPa (remembered), the page reloaded."""
    browser.js("localStorage.setItem('tidewell:pressure-unit', 'kPa')")
    browser.driver.refresh()


def example_in_kpa(browser, url: str, screen: str, example: str, calc: str) -> None:
    """At 360 x 740 with the pressure unit on kPa: tap an invented example and wait for its report."""
    phone(browser, TALL_PHONE)
    open_screen(browser, url, screen)
    use_kpa(browser)
    browser.wait_engine()
    browser.driver.find_element(By.CSS_SELECTOR, f"[data-example={example}]").click()
    assert wait_report(browser, calc) == "done"


# The "ward exacerbation" example's inputs as the shell sends them (an invented scenario, not a patient)
WARD_COPD_INPUTS = {
    "ph": 7.28,
    "pco2": {"value": 9.1, "unit": "kPa"},
    "po2": {"value": 7.2, "unit": "kPa"},
    "hco3": {"value": 31, "unit": "mmol/L"},
    "fio2": {"value": 28, "unit": "%"},
    "hypercapnia_risk": True,
    "age": 71,
}


# An invented retrieval journey (not a patient): the flight screen's "retrieval" example, and a small
# cylinder for the oxygen supply. Used by the screen test and the whole-session network test.
JOURNEY_SUPPLY = {
    "cylinder_water_capacity": ("2", "L"),
    "cylinder_pressure": ("200", "bar"),
    "cylinders": "1",
    "flow": ("4", "L/min"),
    "duration": ("90", "min"),
}


def fill_flight_journey(browser) -> None:
    """On the flight screen: tap the retrieval example, fill the oxygen supply, wait for both reports."""
    browser.driver.find_element(By.CSS_SELECTOR, "[data-example=retrieval]").click()
    fill(browser, "oxygen_supply", JOURNEY_SUPPLY)
    assert wait_report(browser, "altitude") == "done"
    assert wait_report(browser, "oxygen_supply") == "done"


def shown_numbers(browser, calc: str) -> dict:
    """data-out path -> [text shown, raw value] for every number button of the panel's report."""
    return dict(
        browser.js(
            "return [...document.querySelectorAll('#p-' + arguments[0] + '-report button.num')]"
            ".map((b) => [b.dataset.out, [b.textContent, b.dataset.raw]]);",
            calc,
        )
    )


def resolve(outputs: dict, path: str):
    value = outputs
    for part in path.split("."):
        value = value[part]
    return value


#: mmHg in one kPa from the definitions (1 mmHg = 133.322387415 Pa, units.py), not the shell's constant
MMHG_PER_KPA = 1000 / 133.322387415
PF_NAMES = {"pf_ratio", "pf_ratio_altitude_corrected"}


def pf_text(quantity: dict, unit: str) -> str:
    """A P/F ratio as the shell shows it in ``unit``: kPa 1 dp with the mmHg figure beside, or mmHg whole
    (the textContent of its button: the figure, a space, the smaller figure)."""
    mmhg = quantity["value"] * (MMHG_PER_KPA if quantity["unit"] == "kPa" else 1)
    if unit == "kPa":
        return f"{shell_format(mmhg / MMHG_PER_KPA, 1)} kPa {shell_format(mmhg, 0)} mmHg"
    return f"{shell_format(mmhg, 0)} mmHg"


def check_numbers(browser, calc: str, response: dict, must: set[str]) -> int:
    """Every number the panel shows equals the core's answer, formatted to display; returns how many."""
    shown = shown_numbers(browser, calc)
    assert must <= set(shown), sorted(must - set(shown))
    checked = 0
    for path, (text, raw) in shown.items():
        value = resolve(response["outputs"], path)
        if path in PF_NAMES:  # in the user's unit, the other beside it (test_report.py, the P/F test)
            assert text == pf_text(value, response["options"]["pressure_unit"]), (path, text)
            checked += 1
            continue
        decimals = response["display"].get(path.split(".")[0])
        if isinstance(value, dict) and isinstance(value.get("value"), (int, float)):
            assert text == f"{shell_format(value['value'], decimals)} {value['unit']}", path
            assert float(raw) == value["value"], path
            checked += 1
        elif isinstance(value, (int, float)) and not isinstance(value, bool):
            assert text == shell_format(value, decimals), path
            assert float(raw) == value, path
            checked += 1
    return checked


def no_horizontal_overflow(browser) -> tuple[int, int]:
    return tuple(browser.js("return [document.documentElement.scrollWidth, window.innerWidth]"))


def tap(browser, by: str, selector: str) -> None:
    """Scroll the element to the middle of the screen (clear of the bottom navigation) and click it."""
    element = browser.driver.find_element(by, selector)
    browser.js("arguments[0].scrollIntoView({block: 'center'})", element)
    element.click()


def add_to_course(browser) -> str:
    """Under the blood-gas report shown: "Add to course" (a new course, the time now); its status line."""
    tap(browser, By.ID, "add-course-go")
    return browser.wait_js(
        "const s = document.querySelector('#add-course-status');"
        "while (!/^(Added|Not added)/.test(s.textContent)) await new Promise((r) => setTimeout(r, 20));"
        "return s.textContent;",
        timeout=20,
    )
