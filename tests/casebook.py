"""Worked cases turned into bridge requests, shared by the core tests and the browser tests.

The AB-xx cases of tests/cases/reference_cases.json name their inputs with units in the key
(``paco2_mmHg``); ``case_inputs`` turns them into a blood_gas ``inputs`` object and ``AB_PATHS`` says
where each expected number sits in the response's outputs (pressures asked for in mmHg).
"""

from __future__ import annotations

import json
from functools import cache
from pathlib import Path

CASES_PATH = Path(__file__).parent / "cases" / "reference_cases.json"


def load_cases() -> dict[str, dict]:
    """The worked cases of tests/cases/reference_cases.json (sources: docs/methods.md), by id."""
    return {case["id"]: case for case in json.loads(CASES_PATH.read_text(encoding="utf-8"))}


def close(case_id: str, key: str, got) -> None:
    """Assert that ``got`` (a number, or a quantity ``{value, unit}``) is worked case ``case_id``'s
    expected ``key`` within the tolerance the case gives for it."""
    import pytest

    case = _cached_cases()[case_id]
    number = got["value"] if isinstance(got, dict) else got
    assert number == pytest.approx(case["expected"][key], abs=case["tolerance"][key]), (case_id, key)


@cache
def _cached_cases() -> dict[str, dict]:
    return load_cases()


def q(value, unit):
    return {"value": value, "unit": unit}


def value(outputs: dict, path: tuple):
    node = outputs
    for key in path:
        node = node[key]
    return node


# -- worked cases -> bridge inputs ---------------------------------------------------------------------------

INPUT_MAP = {
    "ph": ("ph", None),
    "paco2_mmHg": ("pco2", "mmHg"),
    "hco3_mmol_L": ("hco3", "mmol/L"),
    "na_mmol_L": ("na", "mmol/L"),
    "cl_mmol_L": ("cl", "mmol/L"),
    "k_mmol_L": ("k", "mmol/L"),
    "albumin_g_dL": ("albumin", "g/dL"),
    "albumin_g_L": ("albumin", "g/L"),
    "pao2_mmHg": ("po2", "mmHg"),
    "pao2_37_mmHg": ("po2", "mmHg"),
    "fio2": ("fio2", None),
    "pb_mmHg": ("pb", "mmHg"),
    "age_y": ("age", None),
    "patient_temp_C": ("temperature", "degC"),
    "ca_ionized_mmol_L": ("ca_ionised", "mmol/L"),
    "mg_mmol_L": ("mg", "mmol/L"),
    "lactate_mmol_L": ("lactate", "mmol/L"),
    "phosphate_mmol_L": ("phosphate", "mmol/L"),
}


def case_inputs(case: dict) -> dict:
    out = {}
    for key, raw in case["inputs"].items():
        if key == "history":  # narrative only; not an input
            continue
        name, unit = INPUT_MAP[key]
        out[name] = raw if unit is None else q(raw, unit)
    return out


# expected key of an AB case -> output path (pressures asked for in mmHg)
AB_PATHS = {
    "ph_calc": ("ph_computed",),
    "sbe_clsi_mmol_L": ("standard_base_excess", "value"),
    "ag_mmol_L": ("anion_gap", "value"),
    "winters_expected_mmHg": ("expected_pco2_winters", "value"),
    "winters_high_mmHg": ("expected_pco2", "high", "value"),
    "delta_ratio": ("delta_ratio",),
    "delta_gap_mmol_L": ("delta_gap", "value"),
    "sbe_rule_expected_paco2_mmHg": ("expected_pco2_copenhagen", "value"),
    "expected_hco3_acute_mmol_L": ("expected_hco3_centre", "acute", "value"),
    "expected_hco3_chronic_3p5_mmol_L": ("expected_hco3_centre", "chronic", "value"),
    "ph_acute_rule": ("expected_ph", "acute"),
    "ph_chronic_rule": ("expected_ph", "chronic"),
    "fraction_acute_ph_rule": ("fraction_acute_ph",),
    "fraction_acute_hco3_rule": ("fraction_acute_hco3",),
    "expected_sbe_schlichtig_mmol_L": ("expected_sbe", "chronic", "value"),
    "expected_paco2_mmHg": ("expected_pco2_centre", "value"),
    "expected_low_mmHg": ("expected_pco2", "low", "value"),
    "expected_high_mmHg": ("expected_pco2", "high", "value"),
    "ph_difference": ("ph_difference",),
    "h_kb_nmol_L": ("h_nmol_l_kassirer", "value"),
    "h_measured_nmol_L": ("h_nmol_l_measured", "value"),
    "pco2_target_mmHg": ("pco2_target", "value"),
    "pao2_alv_mmHg": ("pao2_alveolar", "value"),
    "aa_gradient_mmHg": ("a_a_gradient", "value"),
    "aa_expected_age_mmHg": ("a_a_expected_upper", "value"),
    "ph_T": ("ph_at_temperature",),
    "paco2_T_mmHg": ("pco2_at_temperature", "value"),
    "pao2_T_mmHg": ("po2_at_temperature", "value"),
}


# -- worked cases as whole requests (the page test and the unit-wording test) ---------------------------

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


def worked_requests() -> list[tuple[str, dict, list[tuple[tuple, str]]]]:
    """Every worked case that maps onto one bridge request: (case id, request, [(output path, expected
    key)]), the AB cases as blood_gas requests (pressures in mmHg, as the cases give them), then ``OTHER``."""
    cases = _cached_cases()
    out = []
    for case_id in AB_IDS:
        request = {"calc": "blood_gas", "inputs": case_inputs(cases[case_id])}
        checks = [(AB_PATHS[key], key) for key in cases[case_id]["expected"] if key in AB_PATHS]
        out.append((case_id, request, checks))
    return out + OTHER
