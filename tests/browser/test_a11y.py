"""Accessibility audit: axe-core (from npm, fetched once into ~/.cache/tidewell/axe with ``npm pack``,
the way build.py fetches Pyodide; never a CDN) is injected into each screen of the built app, in day and
night mode, at 360 x 640. No serious or critical violation is allowed."""

from __future__ import annotations

import hashlib
import shutil
import subprocess
import tarfile
from pathlib import Path

import pytest
from screens_support import add_to_course, go_to, open_screen, phone, tap, wait_report, wait_theme
from selenium.webdriver.common.by import By

AXE_VERSION = "4.10.2"
# sha256 of the npm registry tarball axe-core-4.10.2.tgz (as fetched by npm pack on 2026-12-01)
AXE_SHA256 = "9ea2d2d6917da998122bdacfd3b473e31ead53f4b87146c716a12edf89158100"
CACHE = Path.home() / ".cache" / "tidewell" / "axe"


@pytest.fixture(scope="session")
def axe_source() -> str:
    tgz = CACHE / f"axe-core-{AXE_VERSION}.tgz"
    if not tgz.exists():
        npm = shutil.which("npm")
        if npm is None:
            pytest.fail("npm is needed once to fetch axe-core")
        CACHE.mkdir(parents=True, exist_ok=True)
        subprocess.run(
            [npm, "pack", f"axe-core@{AXE_VERSION}", "--silent"],
            cwd=CACHE,
            check=True,
            timeout=300,
            capture_output=True,
        )
    digest = hashlib.sha256(tgz.read_bytes()).hexdigest()
    assert digest == AXE_SHA256, f"{tgz} has sha256 {digest}, expected {AXE_SHA256}"
    with tarfile.open(tgz) as archive:
        return archive.extractfile("package/axe.min.js").read().decode()


def audit(browser, axe_source: str) -> list:
    if not browser.js("return !!window.axe"):
        browser.js(axe_source + "\n;window.axe = axe;")
    results = browser.wait_js(
        "const r = await axe.run(document);"
        "return [r.passes.length, r.violations.map((v) => [v.id, v.impact, v.nodes.slice(0,"
        " 3).map((n) => n.target.join(' '))])];",
        timeout=60,
    )
    passes, violations = results
    assert passes > 10  # the audit really ran its rules (colour contrast, names, labels...)
    return [v for v in violations if v[1] in ("serious", "critical")]


def test_no_serious_or_critical_violations(browser, server, axe_source):
    # the page's CSP allows only its own scripts; the audit script is added through WebDriver instead
    phone(browser)
    open_screen(browser, server.url, "gas")
    browser.wait_engine()
    browser.driver.find_element(By.CSS_SELECTOR, "[data-example=ward-copd]").click()
    assert wait_report(browser, "blood_gas") == "done"
    add_to_course(browser)  # the Course screen is audited with a gas in it (its editor), not only empty
    found = {}
    for theme in ["light", "dark"]:
        go_to(browser, "settings")
        tap(browser, By.ID, f"theme-{theme}")
        wait_theme(browser, theme)
        for screen in ["gas", "breathing", "flight", "course", "log", "convert", "settings"]:
            go_to(browser, screen)  # audit the screen once the page has shown it
            bad = audit(browser, axe_source)
            if bad:
                found[(theme, screen)] = bad
    assert found == {}
