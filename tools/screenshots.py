"""PNG screenshots of the main screens, from the real built app in headless Chromium at 360 x 740.

    python3 tools/screenshots.py            # builds dist/ into a temporary directory first
    python3 tools/screenshots.py --dist DIR # an existing build

Writes docs/screenshots/*.png. Uses the browser tests' harness (server and browser stopped by pid).
The examples shown are Tidewell's invented teaching scenarios, not patients.
"""

from __future__ import annotations

import argparse
import sys
import tempfile
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(ROOT / "tests" / "browser"))
sys.path.insert(0, str(ROOT / "core"))

from harness import Browser, Server, build  # noqa: E402
from screens_support import TALL_PHONE, fill, open_screen, phone, wait_report  # noqa: E402
from selenium.webdriver.common.by import By  # noqa: E402

OUT = ROOT / "docs" / "screenshots"


def scroll_to(browser, selector: str) -> None:
    browser.js(
        "const e = document.querySelector(arguments[0]); if (e) e.scrollIntoView({block: 'start'});"
        " scrollBy(0, -8);",
        selector,
    )


def open_full(browser, calc: str) -> None:
    browser.js(
        "document.querySelector('#p-' + arguments[0] + '-report details.full-report').open = true", calc
    )


def new_patient(browser) -> None:
    browser.js("document.querySelector('[data-action=new-patient]').click()")
    browser.js("document.getElementById('new-patient-note').hidden = true")


def shoot(browser, name: str) -> Path:
    path = OUT / f"{name}.png"
    browser.driver.save_screenshot(str(path))
    print(f"wrote {path.relative_to(ROOT)}")
    return path


def main() -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--dist", type=Path, help="an existing build (default: build one)")
    args = parser.parse_args()
    OUT.mkdir(parents=True, exist_ok=True)
    with tempfile.TemporaryDirectory() as tmp:
        dist = args.dist
        if dist is None:
            dist = Path(tmp) / "site"
            build(dist)
        server = Server(dist).start()
        browser = None
        try:
            browser = Browser()
            phone(browser, TALL_PHONE)
            open_screen(browser, server.url, "gas")
            browser.js(
                "localStorage.setItem('tidewell:pressure-unit', 'kPa');"
                " localStorage.setItem('tidewell:theme', 'light');"
            )
            open_screen(browser, server.url, "gas")
            browser.driver.refresh()
            browser.wait_engine()
            browser.js("scrollTo(0, 0)")
            shoot(browser, "01-blood-gas-entry")
            browser.driver.find_element(By.CSS_SELECTOR, "[data-example=ward-copd]").click()
            wait_report(browser, "blood_gas")
            scroll_to(browser, "#p-blood_gas-report")
            shoot(browser, "02-blood-gas-report")
            open_full(browser, "blood_gas")
            scroll_to(browser, "#p-blood_gas-report .pictures")
            shoot(browser, "03-blood-gas-pictures")
            new_patient(browser)
            open_screen(browser, server.url, "breathing")
            fill(
                browser,
                "ventilation",
                {"rr": "14", "vt": ("450", "mL"), "pco2": ("8.5", "kPa"), "target_pco2": ("6.5", "kPa")},
            )
            wait_report(browser, "ventilation")
            scroll_to(browser, "#p-ventilation-report")
            shoot(browser, "04-breathing")
            open_screen(browser, server.url, "flight")
            browser.driver.find_element(By.CSS_SELECTOR, "[data-example=retrieval]").click()
            wait_report(browser, "altitude")
            open_full(browser, "altitude")
            scroll_to(browser, "#p-altitude-report .pictures")
            shoot(browser, "05-flight-profile")
            open_screen(browser, server.url, "log")
            shoot(browser, "06-case-log")
            # the questions Tidewell asks instead of guessing
            new_patient(browser)
            open_screen(browser, server.url, "flight")
            fill(browser, "altitude", {"altitude": ("8,000", "ft"), "fio2": ("30", "%")})
            wait_report(browser, "altitude", states=("ask",))
            scroll_to(browser, "#p-altitude [data-input=altitude]")
            shoot(browser, "08-asks-8000")
            new_patient(browser)
            open_screen(browser, server.url, "gas")
            fill(browser, "blood_gas", {"ph": "7.10", "pco2": ("9.8", "mmHg"), "po2": ("9.0", "kPa")})
            wait_report(browser, "blood_gas")
            scroll_to(browser, "#p-blood_gas-report")
            shoot(browser, "09-check-first")
            new_patient(browser)
            browser.js("localStorage.setItem('tidewell:theme', 'dark');")
            open_screen(browser, server.url, "gas")
            browser.driver.refresh()
            browser.wait_engine()
            browser.driver.find_element(By.CSS_SELECTOR, "[data-example=ward-copd]").click()
            wait_report(browser, "blood_gas")
            scroll_to(browser, "#p-blood_gas-report")
            shoot(browser, "07-night-mode")
        finally:
            if browser is not None:
                browser.quit()
            server.stop()
    return 0


if __name__ == "__main__":
    sys.exit(main())
