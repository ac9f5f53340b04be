"""The worked cases through the page: window.tidewell.compute in Pyodide must give the CPython bridge's
answer, and the key published numbers of each case must hold in the page too.

Sources beside each number are those of tests/cases/reference_cases.json (docs/methods.md): the AB cases are
invented patients checked against Winters 1967, the Boston rules (Narins & Emmett 1980; Berend 2014), the
alveolar gas equation and Rosenthal 1948; OX/VN/TC/AL/CY cases are derived from the cited equations.
"""

from __future__ import annotations

import pytest
from screens_support import same_as_core

from casebook import AB_PATHS, case_inputs, load_cases, value

CASES = load_cases()


def q(v, unit):
    return {"value": v, "unit": unit}


# (case id, request, [(output path, expected key)]) for the non-AB cases
OTHER = [
    (
        "OX-01",
        {"calc": "alveolar_gas", "inputs": {"fio2": 0.21, "pco2": q(40, "mmHg"), "pb": q(760, "mmHg")}},
        [(("pio2", "value"), "pio2_mmHg"), (("pao2_alveolar", "value"), "pao2_alv_simple_mmHg")],
    ),
    (
        "OX-02",
        {
            "calc": "alveolar_gas",
            "inputs": {"fio2": 0.21, "pco2": q(40, "mmHg"), "po2": q(70, "mmHg"), "age": 60},
        },
        [
            (("a_a_gradient", "value"), "aa_gradient_mmHg"),
            (("a_a_expected_upper", "value"), "aa_expected_age_mmHg"),
        ],
    ),
    (
        "OX-03",
        {
            "calc": "alveolar_gas",
            "inputs": {"fio2": 0.5, "pco2": q(40, "mmHg"), "po2": q(90, "mmHg"), "pb": q(630, "mmHg")},
        },
        [
            (("pf_ratio", "value"), "pf_ratio"),
            (("pf_ratio_altitude_corrected", "value"), "pf_ratio_altitude_corrected"),
        ],
    ),
    (
        "OX-05",
        {
            "calc": "oxygen_content",
            "inputs": {
                "hb": q(15, "g/dL"),
                "spo2": 98,
                "po2": q(100, "mmHg"),
                "cardiac_output": q(5, "L/min"),
            },
        },
        [(("cao2", "value"), "cao2_1p34_mL_dL"), (("do2", "value"), "do2_1p34_mL_min")],
    ),
    (
        "TC-01",
        {
            "calc": "temperature_correction",
            "inputs": {"ph": 7.30, "pco2": q(45, "mmHg"), "po2": q(90, "mmHg"), "temperature": q(32, "degC")},
        },
        [
            (("ph",), "ph_T"),
            (("pco2", "value"), "paco2_T_mmHg"),
            (("po2", "value"), "pao2_T_integrated_mmHg"),
        ],
    ),
    (
        "VN-03",
        {
            "calc": "ventilation",
            "inputs": {
                "rr": 16,
                "vt": q(500, "mL"),
                "vd": q(150, "mL"),
                "pco2": q(60, "mmHg"),
                "target_pco2": q(45, "mmHg"),
            },
        },
        [
            (("to_target", "rr_at_same_vt"), "rr_new_fixed_vt_min"),
            (("to_target", "vt_at_same_rr", "value"), "vt_new_fixed_rr_mL"),
        ],
    ),
    (
        "AL-05",
        {"calc": "altitude", "inputs": {"altitude": q(8000, "ft"), "fio2": 0.35, "pco2": q(40, "mmHg")}},
        [(("pb", "value"), "pb_cabin_mmHg"), (("fio2_equivalent",), "fio2_cabin_water_corrected")],
    ),
    (
        "AL-06",
        {
            "calc": "altitude",
            "inputs": {"altitude": q(8000, "ft"), "fio2": 0.21, "pco2": q(40, "mmHg"), "po2": q(70, "mmHg")},
        },
        [(("po2_predicted", "value"), "pao2_cabin_predicted_mmHg")],
    ),
    (
        "AL-08",
        {
            "calc": "altitude",
            "inputs": {"altitude": q(8000, "ft"), "fio2": 0.21, "trapped_gas_volume": q(100, "mL")},
        },
        [(("trapped_gas_volume_at_altitude", "value"), "volume_wet_mL")],
    ),
    (
        "CY-02",
        {
            "calc": "oxygen_supply",
            "inputs": {
                "cylinder_water_capacity": q(2, "L"),
                "cylinder_pressure": q(230, "bar"),
                "flow": q(4, "L/min"),
                "duration": q(60, "min"),
            },
        },
        [
            (("available_litres", "value"), "free_gas_ideal_L"),
            (("required_litres", "value"), "o2_required_with_factor_L"),
        ],
    ),
]

AB_IDS = [f"AB-{n:02d}" for n in range(1, 12)]


def _requests():
    out = []
    for case_id in AB_IDS:
        request = {"calc": "blood_gas", "inputs": case_inputs(CASES[case_id])}
        checks = [(AB_PATHS[key], key) for key in CASES[case_id]["expected"] if key in AB_PATHS]
        out.append((case_id, request, checks))
    return out + OTHER


def test_worked_cases_through_the_page(browser, server):
    browser.get(server.url)
    browser.wait_engine()
    checked = 0
    for case_id, request, checks in _requests():
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
