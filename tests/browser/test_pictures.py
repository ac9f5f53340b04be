"""Pictures that read at a glance, at 360 x 740 and on a desktop: round-number ticks, the legend under the
plot (never over a line), nothing clipped; the altitude picture draws the user's lowest acceptable PaO2;
the acid-base picture has fixed, familiar axes with the normal region, every compensation band across the
range (the core's acid_base_map), the sample and its target. Positions are checked against the core's
numbers (tidewell.bridge in CPython)."""

from __future__ import annotations

import itertools
import math

import pytest
from screens_support import (
    TALL_PHONE,
    WARD_COPD_INPUTS,
    core,
    example_in_kpa,
    fill,
    open_screen,
    phone,
    use_kpa,
    wait_report,
)
from selenium.webdriver.common.by import By


def open_full_report(browser, calc: str) -> None:
    browser.js(
        "document.querySelector('#p-' + arguments[0] + '-report details.full-report').open = true", calc
    )


def ticks(browser, picture: str, axis: str) -> list[float]:
    texts = browser.js(
        "const f = document.querySelector('[data-picture=' + arguments[0] + ']');"
        "return [...f.querySelectorAll('text[data-tick=' + arguments[1] + ']')].map((t) => t.textContent)",
        picture,
        axis,
    )
    return [float(t.replace("\u2009", "").replace(",", "")) for t in texts]


def assert_round(values: list[float]) -> None:
    """Evenly spaced by 1, 2 or 5 x 10^k, each a multiple of the step."""
    assert len(values) >= 3, values
    step = values[1] - values[0]
    mantissa = step / 10 ** math.floor(math.log10(step))
    assert round(mantissa, 9) in (1, 2, 5), values
    for a, b in itertools.pairwise(values):
        assert b - a == pytest.approx(step), values
    for v in values:
        assert v / step == pytest.approx(round(v / step)), values


def layout(browser, picture: str) -> dict:
    """The plot area, the picture and every text's box on the screen (rotation included), in CSS px."""
    return browser.js(
        "const svg = document.querySelector('[data-picture=' + arguments[0] + '] svg');"
        "const box = (r) => [r.left, r.top, r.right, r.bottom];"
        "const boxes = [...svg.querySelectorAll('text')].map((t) =>"
        "  [t.textContent, ...box(t.getBoundingClientRect()), t.classList.contains('legend')]);"
        "return {area: box(svg.querySelector('.plot-area').getBoundingClientRect()),"
        " view: box(svg.getBoundingClientRect()), boxes};",
        picture,
    )


def assert_readable(browser, picture: str) -> None:
    got = layout(browser, picture)
    x0, y0, x1, y1 = got["view"]
    for text, a, b, c, d, is_legend in got["boxes"]:
        assert a >= x0 - 0.5 and c <= x1 + 0.5 and b >= y0 - 0.5 and d <= y1 + 0.5, (
            picture,
            text,
            got["view"],
        )
        if is_legend:  # under the plot area: never over a line
            assert b >= got["area"][3], (picture, text)


@pytest.mark.parametrize("size", [TALL_PHONE, (1280, 800)])
def test_the_altitude_picture_uses_the_lowest_acceptable_pao2_with_round_ticks(browser, server, size):
    phone(browser, size)
    open_screen(browser, server.url, "flight")
    use_kpa(browser)
    browser.wait_engine()
    browser.driver.find_element(
        By.CSS_SELECTOR, "[data-example=retrieval]"
    ).click()  # lowest acceptable 8 kPa
    assert wait_report(browser, "altitude") == "done"
    open_full_report(browser, "altitude")
    inputs = {
        "altitude": {"value": 8000, "unit": "ft"},
        "fio2": {"value": 30, "unit": "%"},
        "po2": {"value": 9.5, "unit": "kPa"},
        "pco2": {"value": 6.2, "unit": "kPa"},
        "target_po2": {"value": 8, "unit": "kPa"},
    }
    prof = core({"calc": "altitude_profile", "inputs": inputs, "options": {"pressure_unit": "kPa"}})
    assert prof["outputs"]["po2_target"]["value"] == pytest.approx(8.0)
    drawn = browser.js(
        "return document.querySelector('[data-picture=profile] line.line-target[data-target]').dataset.target"
    )
    assert float(drawn) == pytest.approx(8.0)  # the user's, not the 6.6 kPa threshold
    xs = ticks(browser, "profile", "x")
    assert_round(xs)
    assert xs[0] == 0 and xs[-1] >= max(prof["outputs"]["altitude"]["value"])
    assert_round(ticks(browser, "profile", "y"))
    assert_readable(browser, "profile")


def test_the_acid_base_picture_has_fixed_axes_the_bands_the_sample_and_its_target(browser, server):
    example_in_kpa(browser, server.url, "gas", "ward-copd", "blood_gas")
    open_full_report(browser, "blood_gas")
    first_x, first_y = ticks(browser, "acidbase", "x"), ticks(browser, "acidbase", "y")
    assert_round(first_x)
    assert_round(first_y)
    bands = browser.js(
        "return [...document.querySelectorAll('[data-picture=acidbase] path')]"
        ".map((p) => p.getAttribute('class'))"
    )
    assert bands[:7] == ["band-normal", "band-ra", "band-rc", "band-xa", "band-xc", "band-ma", "band-mx"], (
        bands
    )
    inputs = WARD_COPD_INPUTS
    expected = core({"calc": "blood_gas", "inputs": inputs, "options": {"pressure_unit": "kPa"}})
    sample = browser.js(
        "return document.querySelector('[data-picture=acidbase] [data-sample]').dataset.sample"
    )
    assert [float(v) for v in sample.split(",")] == pytest.approx([9.1, expected["outputs"]["hco3"]["value"]])
    target = browser.js(
        "return document.querySelector('[data-picture=acidbase] [data-target]').dataset.target"
    )
    assert float(target) == pytest.approx(expected["outputs"]["pco2_target"]["value"])
    assert_readable(browser, "acidbase")
    # another sample far away: the same axes (fixed, not zoomed to the sample)
    fill(browser, "blood_gas", {"ph": "7.38", "pco2": ("4.1", "kPa"), "hco3": "18"})
    assert wait_report(browser, "blood_gas") == "done"
    open_full_report(browser, "blood_gas")
    assert ticks(browser, "acidbase", "x") == first_x and ticks(browser, "acidbase", "y") == first_y
