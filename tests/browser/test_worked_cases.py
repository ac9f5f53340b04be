"""The worked cases through the page: window.tidewell.compute in Pyodide must give the CPython bridge's
answer, and the key published numbers of each case must hold in the page too.

Sources beside each number are those of tests/cases/reference_cases.json (docs/methods.md): the AB cases are
invented patients checked against Winters 1967, the Boston rules (Narins & Emmett 1980; Berend 2014), the
alveolar gas equation and Rosenthal 1948; OX/VN/TC/AL/CY cases are derived from the cited equations.
"""

from __future__ import annotations

import pytest
from screens_support import same_as_core

from casebook import load_cases, value, worked_requests

CASES = load_cases()


def test_worked_cases_through_the_page(browser, server):
    browser.get(server.url)
    browser.wait_engine()
    checked = 0
    for case_id, request, checks in worked_requests():
        page = browser.compute(request)
        assert page["ok"], (case_id, page.get("errors"))
        same_as_core(page, request, case_id)  # numbers to compare.REL_WEBASSEMBLY, words exactly
        case = CASES[case_id]
        for path, key in checks:
            got = value(page["outputs"], path)
            # each expectation with the tolerance its case states (published/derived, see module docstring)
            assert got == pytest.approx(case["expected"][key], abs=case["tolerance"][key]), (case_id, key)
            checked += 1
    assert checked >= 40
