"""The altitude, altitude_profile and oxygen_supply calculations through tidewell.bridge.handle_obj.

Worked cases AL-* and CY-* (tests/cases/reference_cases.json; methods: docs/methods.md#altitude) are answered
within their tolerances; unit variants give the same answers; every error path names its code and field.
Provenance words: *published* / *derived* (from the cited equation) / *common practice* / *from memory*.
"""

from __future__ import annotations

import itertools
import json
import math
import subprocess
import sys

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from conftest import assert_finite_everywhere
from tidewell.bridge import handle_obj
from tidewell.errors import ERROR_CODES
from tidewell.formulas import altitude as alt
from tidewell.formulas.oxygenation import alveolar_po2_full, alveolar_po2_simple
from tidewell.units import FT_M, MMHG_PA

KPA_PER_MMHG = MMHG_PA / 1000.0


def ft(x):
    return {"value": x, "unit": "ft"}


def m(x):
    return {"value": x, "unit": "m"}


def mmhg(x):
    return {"value": x, "unit": "mmHg"}


def run(calc: str, inputs: dict, pressure_unit: str | None = None) -> dict:
    request = {"calc": calc, "inputs": inputs}
    if pressure_unit:
        request["options"] = {"pressure_unit": pressure_unit}
    response = handle_obj(request)
    assert_finite_everywhere(response)
    json.dumps(response, allow_nan=False)
    if response["ok"]:
        for step in response["steps"]:
            assert {"label", "formula", "result", "source"} <= set(step) and step["source"]
        for finding in response["findings"]:
            assert finding["severity"] in ("info", "notable", "urgent")
    else:
        for error in response["errors"]:
            assert {"field", "code", "message"} <= set(error) <= {"field", "code", "message", "suggest"}
            assert error["code"] in ERROR_CODES
    return response


def ok(calc: str, inputs: dict, pressure_unit: str | None = None) -> dict:
    response = run(calc, inputs, pressure_unit)
    assert response["ok"], response.get("errors")
    return response


def value(response: dict, name: str) -> float:
    out = response["outputs"][name]
    return out["value"] if isinstance(out, dict) else out


def codes(response: dict) -> set[str]:
    return {f["code"] for f in response["findings"]}


def error_of(response: dict) -> list[tuple[str, str]]:
    assert response["ok"] is False
    return [(e["code"], e["field"]) for e in response["errors"]]


def numeric_outputs(outputs: dict) -> list[str]:
    """Names of outputs that carry numbers (quantities, numbers, lists or maps of them), not words/bools."""

    def has_number(v) -> bool:
        if isinstance(v, bool) or isinstance(v, str) or v is None:
            return False
        if isinstance(v, (int, float)):
            return True
        if isinstance(v, dict):
            return any(has_number(x) for x in v.values())
        if isinstance(v, list):
            return any(has_number(x) for x in v)
        return False

    return [k for k, v in outputs.items() if has_number(v)]


FULL_ALTITUDE = {
    "altitude": ft(8000),
    "fio2": 0.21,
    "pco2": mmhg(40),
    "po2": mmhg(70),
    "target_po2": mmhg(50),
    "fio2_max": 0.3,
    "trapped_gas_volume": {"value": 100, "unit": "mL"},
}
ALT_BASE = {"altitude": ft(8000), "fio2": 0.21, "pco2": mmhg(40)}
SUPPLY = {
    "cylinder_water_capacity": {"value": 2, "unit": "L"},
    "cylinder_pressure": {"value": 230, "unit": "bar"},
    "flow": {"value": 4, "unit": "L/min"},
    "duration": {"value": 60, "unit": "min"},
}


# --------------------------------------------------------------------------------------------------
# worked cases AL-01 ... AL-08


@pytest.mark.parametrize("case_id", ["AL-01", "AL-02", "AL-03"])
def test_isa_cases(cases, case_id):
    # Published formula (ICAO Doc 7488 / US Standard Atmosphere 1976; verified); values as in
    # docs/methods.md#standard-atmosphere.
    case = cases[case_id]
    i, e, tol = case["inputs"], case["expected"], case["tolerance"]
    where = ft(i["altitude_ft"]) if "altitude_ft" in i else m(i["altitude_m"])
    r = ok("altitude", {"altitude": where, "fio2": 0.21})
    assert value(r, "pb") == pytest.approx(e["pb_mmHg"], abs=tol["pb_mmHg"])
    assert value(r, "pb_hpa") == pytest.approx(e["pb_hPa"], abs=tol["pb_hPa"])
    if "altitude_m" in e:
        assert value(r, "cabin_altitude_m") == pytest.approx(e["altitude_m"], abs=tol["altitude_m"])
    r_kpa = ok("altitude", {"altitude": where, "fio2": 0.21}, pressure_unit="kPa")
    assert r_kpa["outputs"]["pb"]["unit"] == "kPa"
    assert value(r_kpa, "pb") == pytest.approx(e["pb_kPa"], abs=tol["pb_kPa"])


def test_al04_pio2_and_pao2(cases):
    case = cases["AL-04"]
    i, e, tol = case["inputs"], case["expected"], case["tolerance"]
    inputs = {
        "altitude": ft(i["altitude_ft"]),
        "fio2": i["fio2"],
        "pco2": mmhg(i["paco2_mmHg"]),
        "rq": i["rq"],
    }
    r = ok("altitude", inputs)
    # Derived (alveolar_gas_1946 with icao7488, AL-04; alveolar gas equation, verified form).
    assert value(r, "pb") == pytest.approx(e["pb_mmHg"], abs=tol["pb_mmHg"])
    assert value(r, "pio2") == pytest.approx(e["pio2_mmHg"], abs=tol["pio2_mmHg"])
    assert value(r, "pao2_alveolar") == pytest.approx(e["pao2_alv_mmHg"], abs=tol["pao2_alv_mmHg"])
    assert value(r, "pao2_alveolar_full") == pytest.approx(
        e["pao2_alv_full_mmHg"], abs=tol["pao2_alv_full_mmHg"]
    )
    full = ok("altitude", {**inputs, "alveolar_equation": "full"})
    assert value(full, "pao2_alveolar") == pytest.approx(
        e["pao2_alv_full_mmHg"], abs=tol["pao2_alv_full_mmHg"]
    )


def test_al05_fio2_equivalent(cases):
    case = cases["AL-05"]
    i, e, tol = case["inputs"], case["expected"], case["tolerance"]
    r = ok(
        "altitude",
        {
            "altitude": ft(i["altitude_ft"]),
            "fio2": i["fio2_ground"],
            "origin_pb": mmhg(i["pb_ground_mmHg"]),
            "pco2": mmhg(40),
        },
    )
    # Common practice (fio2_altitude_rules; docs/methods.md#where-sources-disagree-the-defaults):
    # water-corrected ratio (default) 0.4822; PB ratio 0.4712.
    assert value(r, "pb") == pytest.approx(e["pb_cabin_mmHg"], abs=tol["pb_cabin_mmHg"])
    assert value(r, "fio2_equivalent") == pytest.approx(
        e["fio2_cabin_water_corrected"], abs=tol["fio2_cabin_water_corrected"]
    )
    assert value(r, "fio2_equivalent_simple") == pytest.approx(
        e["fio2_cabin_simple"], abs=tol["fio2_cabin_simple"]
    )
    assert r["outputs"]["fio2_equivalent_within_max"] is True


def test_al06_predicted_pao2(cases):
    case = cases["AL-06"]
    i, e, tol = case["inputs"], case["expected"], case["tolerance"]
    r = ok(
        "altitude",
        {
            "altitude": ft(i["altitude_ft"]),
            "fio2": i["fio2_ground"],
            "pco2": mmhg(i["paco2_mmHg"]),
            "po2": mmhg(i["pao2_ground_mmHg"]),
            "origin_pb": mmhg(i["pb_ground_mmHg"]),
        },
    )
    # From memory (constant a/A, Gilbert & Keighley 1974; BTS 2011 6.6 kPa threshold); AL-06 derived numbers.
    assert value(r, "pao2_alveolar_origin") == pytest.approx(
        e["pao2_alv_ground_mmHg"], abs=tol["pao2_alv_ground_mmHg"]
    )
    assert value(r, "a_over_A") == pytest.approx(e["a_A_ratio"], abs=tol["a_A_ratio"])
    assert value(r, "pao2_alveolar") == pytest.approx(
        e["pao2_alv_cabin_mmHg"], abs=tol["pao2_alv_cabin_mmHg"]
    )
    assert value(r, "po2_predicted") == pytest.approx(
        e["pao2_cabin_predicted_mmHg"], abs=tol["pao2_cabin_predicted_mmHg"]
    )
    assert value(r, "fio2_equivalent") == pytest.approx(
        e["fio2_to_restore_ground_pao2"], abs=tol["fio2_to_restore_ground_pao2"]
    )
    needed = "yes" if "predicted_po2_low" in codes(r) else "no"
    assert needed == e["inflight_o2_needed"]
    low = next(f for f in r["findings"] if f["code"] == "predicted_po2_low")
    assert low["severity"] == "urgent" and "6.6 kPa" in low["text"]
    # the predicted PaO2 in kPa (gilbert1974, worked case AL-06: 5.5 kPa)
    r_kpa = ok(
        "altitude",
        {"altitude": ft(8000), "fio2": 0.21, "pco2": mmhg(40), "po2": mmhg(70)},
        pressure_unit="kPa",
    )
    assert value(r_kpa, "po2_predicted") == pytest.approx(5.5, abs=0.05)


def test_al07_hypoxic_challenge_equivalence(cases):
    case = cases["AL-07"]
    e, tol = case["expected"], case["tolerance"]
    r = ok("altitude", {"altitude": ft(case["inputs"]["altitude_ft"]), "fio2": 0.21, "pco2": mmhg(40)})
    # Published worked values (AL-07; aviation-medicine chapter 15.1 %, HCT FiO2 0.15 Bradi 2009 / BTS 2011).
    assert value(r, "sea_level_fio2_equivalent") == pytest.approx(
        e["fio2_sea_level_equivalent_wet"], abs=tol["fio2_sea_level_equivalent_wet"]
    )
    assert value(r, "sea_level_fio2_equivalent_dry") == pytest.approx(
        e["fio2_sea_level_equivalent_dry"], abs=tol["fio2_sea_level_equivalent_dry"]
    )
    step = next(s for s in r["steps"] if s.get("output") == "sea_level_fio2_equivalent")
    assert "0.15" in step["formula"] and "8,000 ft" in step["formula"]
    assert {"bradi2009", "bts2011_air", "aviation_o2_equivalence"} <= set(step["source_keys"])
    # Derived (fio2_altitude_rules with icao7488, AL-07): FiO2 0.15 at sea level = air at ~8,330 ft ISA.
    assert value(r, "hypoxic_challenge_altitude") == pytest.approx(8330, abs=10)


def test_al08_trapped_gas(cases):
    case = cases["AL-08"]
    i, e, tol = case["inputs"], case["expected"], case["tolerance"]
    inputs = {
        "altitude": ft(i["altitude_ft"]),
        "fio2": 0.21,
        "pco2": mmhg(40),
        "origin_pb": mmhg(i["pb_ground_mmHg"]),
        "trapped_gas_volume": {"value": i["volume_ground_mL"], "unit": "mL"},
    }
    r = ok("altitude", inputs)
    # Boyle's law (verified) and the 37 degC form (from memory), AL-08.
    assert value(r, "trapped_gas_volume_dry") == pytest.approx(e["volume_dry_mL"], abs=tol["volume_dry_mL"])
    assert value(r, "trapped_gas_volume_wet") == pytest.approx(e["volume_wet_mL"], abs=tol["volume_wet_mL"])
    assert value(r, "trapped_gas_volume_at_altitude") == pytest.approx(
        e["volume_wet_mL"], abs=tol["volume_wet_mL"]
    )
    dry = ok("altitude", {**inputs, "trapped_gas_kind": "dry"})
    assert value(dry, "trapped_gas_volume_at_altitude") == pytest.approx(
        e["volume_dry_mL"], abs=tol["volume_dry_mL"]
    )
    assert "trapped_gas_expands" in codes(r)
    # Common practice cautions: cuff pressure and pneumothorax.
    text = " ".join(r["cautions"])
    assert "cuff pressure" in text and "pneumothorax" in text


# --------------------------------------------------------------------------------------------------
# cases CY-01, CY-02


def test_cy01_cylinder_duration(cases):
    case = cases["CY-01"]
    i, e, tol = case["inputs"], case["expected"], case["tolerance"]
    inputs = {
        "cylinder_water_capacity": {"value": i["water_capacity_L"], "unit": "L"},
        "cylinder_pressure": {"value": i["pressure_bar_gauge"], "unit": "bar"},
        "flow": {"value": i["flow_L_min"], "unit": "L/min"},
        # CY-01 has no planned duration; any duration leaves these outputs unchanged
        "duration": {"value": 60, "unit": "min"},
    }
    # Common practice (cylinder_ideal_gas, transport_reserve, CY-01): 1973.8 L, 131.59 min; with a 25 %
    # reserve 98.69 min.
    whole = ok("oxygen_supply", inputs)
    assert value(whole, "available_litres") == pytest.approx(
        e["free_gas_ideal_L"], abs=tol["free_gas_ideal_L"]
    )
    assert value(whole, "minutes_available") == pytest.approx(
        e["duration_ideal_min"], abs=tol["duration_ideal_min"]
    )
    reserved = ok("oxygen_supply", {**inputs, "reserve_fraction": i["reserve_fraction"]})
    assert value(reserved, "minutes_available") == pytest.approx(
        e["duration_after_reserve_min"], abs=tol["duration_after_reserve_min"]
    )
    assert value(reserved, "available_litres") == pytest.approx(
        e["free_gas_ideal_L"], abs=tol["free_gas_ideal_L"]
    )
    # the ideal estimate is below the real O2 content (CoolProp, 2118.5 L): conservative, and the step says so
    assert value(whole, "available_litres") < e["free_gas_real_o2_15C_L"]
    step = next(s for s in whole["steps"] if s.get("output") == "litres_per_cylinder")
    assert "conservative" in step["formula"]


def test_cy02_sufficient_with_safety_factor(cases):
    case = cases["CY-02"]
    i, e, tol = case["inputs"], case["expected"], case["tolerance"]
    r = ok(
        "oxygen_supply",
        {
            "cylinder_water_capacity": {"value": i["water_capacity_L"], "unit": "L"},
            "cylinder_pressure": {"value": i["pressure_bar_gauge"], "unit": "bar"},
            "flow": {"value": i["flow_L_min"], "unit": "L/min"},
            "duration": {"value": i["transfer_time_min"], "unit": "min"},
            "safety_factor": i["safety_factor"],
        },
    )
    # Common practice (cylinder_ideal_gas, transport_reserve, CY-02): 454.0 L, 113.5 min, 360 L required,
    # sufficient.
    assert value(r, "available_litres") == pytest.approx(e["free_gas_ideal_L"], abs=tol["free_gas_ideal_L"])
    assert value(r, "minutes_available") == pytest.approx(
        e["duration_ideal_min"], abs=tol["duration_ideal_min"]
    )
    assert value(r, "required_litres") == pytest.approx(
        e["o2_required_with_factor_L"], abs=tol["o2_required_with_factor_L"]
    )
    assert r["outputs"]["sufficient"] is (e["sufficient"] == "yes")
    assert r["outputs"]["cylinders_needed"] == 1
    # and with the defaults (safety factor 1.5 is the default) the answer is the same
    assert ok("oxygen_supply", SUPPLY)["outputs"]["required_litres"] == r["outputs"]["required_litres"]


def test_oxygen_insufficient_finding_and_cylinders_needed():
    r = ok(
        "oxygen_supply",
        {**SUPPLY, "flow": {"value": 15, "unit": "L/min"}, "duration": {"value": 2, "unit": "h"}},
    )
    # Derived: 15 L/min x 120 min x 1.5 = 2700 L against 454.0 L per cylinder -> 6 cylinders.
    assert value(r, "required_litres") == pytest.approx(2700.0)
    assert r["outputs"]["sufficient"] is False and r["outputs"]["cylinders_needed"] == 6
    finding = next(f for f in r["findings"] if f["code"] == "oxygen_insufficient")
    assert finding["severity"] == "urgent" and "6 cylinder" in finding["text"]
    assert any("local protocols" in c and "operator" in c for c in r["cautions"])


def test_ventilated_patient_flow_estimate():
    inputs = {**SUPPLY, "minute_ventilation": {"value": 8, "unit": "L/min"}, "fio2": 0.5}
    del inputs["flow"]
    r = ok("oxygen_supply", inputs)
    # Derived (mixing balance + 2 L/min device allowance, common practice): 8 x 0.2905 / 0.7905 + 2 = 4.94.
    assert value(r, "flow_used") == pytest.approx(8 * (0.5 - 0.2095) / 0.7905 + 2.0, abs=1e-9)
    assert r["outputs"]["flow_source"] == "estimated"
    more = ok("oxygen_supply", {**inputs, "device_allowance": {"value": 8, "unit": "L/min"}})
    assert value(more, "flow_used") == pytest.approx(value(r, "flow_used") + 6.0)
    assert any("pneumatic" in c for c in r["cautions"])


def test_residual_pressure_and_reserve_reduce_the_usable_gas():
    base = ok("oxygen_supply", SUPPLY)
    residual = ok("oxygen_supply", {**SUPPLY, "residual_pressure": {"value": 200, "unit": "psi"}})
    # Derived: 200 psi = 13.79 bar kept back: 2 x (230 - 13.79) / 1.01325 L.
    assert value(residual, "available_litres") == pytest.approx(2 * (230 - 13.7895) / 1.01325, abs=0.01)
    reserve = ok("oxygen_supply", {**SUPPLY, "reserve_fraction": {"value": 25, "unit": "%"}})
    assert value(reserve, "usable_litres") == pytest.approx(0.75 * value(base, "available_litres"))


# --------------------------------------------------------------------------------------------------
# unit variants give the same answers


def _same(a: dict, b: dict, names, rel=1e-9):
    for name in names:
        assert value(a, name) == pytest.approx(value(b, name), rel=rel), name


ALTITUDE_NUMBERS = ("pb", "pio2", "pao2_alveolar", "fio2_equivalent", "po2_predicted", "max_altitude_m")


def test_altitude_units_ft_m_km_give_the_same_answers():
    base = {k: v for k, v in FULL_ALTITUDE.items() if k != "altitude"}
    in_ft = ok("altitude", {**base, "altitude": ft(8000)})
    in_m = ok("altitude", {**base, "altitude": m(2438.4)})
    in_km = ok("altitude", {**base, "altitude": {"value": 2.4384, "unit": "km"}})
    _same(in_ft, in_m, ALTITUDE_NUMBERS)
    _same(in_ft, in_km, ALTITUDE_NUMBERS)
    # max_altitude is in the unit of the altitude input, ft alongside
    assert in_ft["outputs"]["max_altitude"]["unit"] == "ft" and in_m["outputs"]["max_altitude"]["unit"] == "m"
    assert value(in_ft, "max_altitude") == pytest.approx(value(in_m, "max_altitude") / FT_M)
    assert value(in_m, "max_altitude_ft") == pytest.approx(value(in_m, "max_altitude_m") / FT_M)


def test_pb_units_and_pb_instead_of_altitude():
    base = {k: v for k, v in FULL_ALTITUDE.items() if k != "altitude"}
    pb = alt.pressure_at_altitude_isa(altitude_m=2438.4)
    by_altitude = ok("altitude", FULL_ALTITUDE)
    by_mmhg = ok("altitude", {**base, "pb": mmhg(pb)})
    by_kpa = ok("altitude", {**base, "pb": {"value": pb * KPA_PER_MMHG, "unit": "kPa"}})
    by_hpa = ok("altitude", {**base, "pb": {"value": pb * MMHG_PA / 100, "unit": "hPa"}})
    for other in (by_mmhg, by_kpa, by_hpa):
        _same(by_altitude, other, ALTITUDE_NUMBERS, rel=1e-7)
        # with only a pb, altitudes are reported in m, and the cabin altitude is the ISA pressure altitude
        assert other["outputs"]["max_altitude"]["unit"] == "m"
        assert value(other, "cabin_altitude_m") == pytest.approx(2438.4, abs=1e-6)


def test_measured_pb_overrides_the_altitude():
    r = ok("altitude", {"altitude": ft(8000), "pb": mmhg(580.0), "fio2": 0.21, "pco2": mmhg(40)})
    assert value(r, "pb") == pytest.approx(580.0)
    assert "pb_overrides_altitude" in codes(r)
    assert value(r, "cabin_altitude_ft") == pytest.approx(8000.0)


def test_origin_altitude_and_origin_pb_agree():
    pb0 = alt.pressure_at_altitude_isa(altitude_m=1600.0)
    a = ok("altitude", {**FULL_ALTITUDE, "origin_altitude": m(1600)})
    b = ok("altitude", {**FULL_ALTITUDE, "origin_pb": {"value": pb0 * KPA_PER_MMHG, "unit": "kPa"}})
    _same(
        a,
        b,
        ("pb_origin", "pio2_origin", "pao2_alveolar_origin", "fio2_equivalent", "po2_predicted"),
        rel=1e-9,
    )


def test_fio2_percent_and_fraction_agree():
    a = ok("altitude", {**FULL_ALTITUDE, "fio2": 0.28, "fio2_max": 0.4})
    b = ok(
        "altitude",
        {**FULL_ALTITUDE, "fio2": {"value": 28, "unit": "%"}, "fio2_max": {"value": 40, "unit": "%"}},
    )
    _same(a, b, ALTITUDE_NUMBERS)


def test_pressure_options_convert_every_pressure():
    a = ok("altitude", FULL_ALTITUDE)
    b = ok("altitude", FULL_ALTITUDE, pressure_unit="kPa")
    for name in ("pb", "pio2", "pao2_alveolar", "po2_predicted", "max_altitude_pb"):
        assert b["outputs"][name]["unit"] == "kPa"
        assert value(b, name) == pytest.approx(value(a, name) * KPA_PER_MMHG, rel=1e-12)
    # inputs in kPa give the same result as in mmHg
    c = ok(
        "altitude",
        {
            **FULL_ALTITUDE,
            "pco2": {"value": 40 * KPA_PER_MMHG, "unit": "kPa"},
            "po2": {"value": 70 * KPA_PER_MMHG, "unit": "kPa"},
        },
    )
    _same(a, c, ALTITUDE_NUMBERS)


def test_trapped_gas_volume_units():
    a = ok("altitude", {**FULL_ALTITUDE, "trapped_gas_volume": {"value": 250, "unit": "mL"}})
    b = ok("altitude", {**FULL_ALTITUDE, "trapped_gas_volume": {"value": 0.25, "unit": "L"}})
    assert b["outputs"]["trapped_gas_volume_at_altitude"]["unit"] == "L"
    assert value(a, "trapped_gas_volume_at_altitude") == pytest.approx(
        1000 * value(b, "trapped_gas_volume_at_altitude")
    )


def test_cylinder_pressure_bar_psi_kpa_agree():
    # 200 bar = 20000 kPa = 2900.755 psi (1 psi = 6894.757 Pa, NIST SP 811).
    psi = 200e5 / 6894.757293168361
    runs = [
        ok("oxygen_supply", {**SUPPLY, "cylinder_pressure": {"value": 200, "unit": "bar"}}),
        ok("oxygen_supply", {**SUPPLY, "cylinder_pressure": {"value": 20000, "unit": "kPa"}}),
        ok("oxygen_supply", {**SUPPLY, "cylinder_pressure": {"value": psi, "unit": "psi"}}),
    ]
    for other in runs[1:]:
        _same(
            runs[0], other, ("available_litres", "required_litres", "minutes_available", "cylinders_needed")
        )


def test_supply_volume_flow_duration_units_agree():
    a = ok("oxygen_supply", SUPPLY)
    b = ok(
        "oxygen_supply",
        {
            "cylinder_water_capacity": {"value": 2000, "unit": "mL"},
            "cylinder_pressure": {"value": 230, "unit": "bar"},
            "flow": {"value": 4000, "unit": "mL/min"},
            "duration": {"value": 1, "unit": "h"},
        },
    )
    _same(a, b, ("available_litres", "required_litres", "minutes_available", "margin_litres"))


# --------------------------------------------------------------------------------------------------
# the highest cabin altitude, checked by substituting it back


@pytest.mark.parametrize("equation", ["simple", "full"])
def test_max_altitude_substitutes_back(equation):
    inputs = {
        **FULL_ALTITUDE,
        "pco2": mmhg(52),
        "po2": mmhg(62),
        "target_po2": mmhg(55),
        "fio2": 0.24,
        "fio2_max": 0.35,
        "alveolar_equation": equation,
    }
    r = ok("altitude", inputs)
    assert r["outputs"]["max_altitude_status"] == "solved"
    alveolar = alveolar_po2_full if equation == "full" else alveolar_po2_simple
    ratio = value(r, "a_over_A")
    h = value(r, "max_altitude_m")

    def predicted(metres, fio2):
        pb = alt.pressure_at_altitude_isa(altitude_m=metres)
        return ratio * alveolar(fio2_fraction=fio2, paco2_mmhg=52.0, pb_mmhg=pb)

    assert predicted(h, 0.35) == pytest.approx(55.0, abs=1e-3)
    assert predicted(h + 5, 0.35) < 55.0 < predicted(h - 5, 0.35)
    assert value(r, "max_altitude_pb") == pytest.approx(alt.pressure_at_altitude_isa(altitude_m=h), rel=1e-12)
    # on the current FiO2 the limit is lower, and also substitutes back
    h_now = value(r, "max_altitude_on_fio2") * FT_M
    assert h_now < h and predicted(h_now, 0.24) == pytest.approx(55.0, abs=1e-3)
    # FiO2 for the target at the cabin altitude substitutes back too
    f_target = value(r, "fio2_for_target")
    assert predicted(8000 * FT_M, f_target) == pytest.approx(55.0, abs=1e-6)


def test_max_altitude_simple_form_equals_closed_form():
    r = ok("altitude", {**FULL_ALTITUDE, "altitude": m(2000)})
    ratio = value(r, "a_over_A")
    # Derived (gilbert1974 and alveolar_gas_1946, rearranged): lowest PB = 47 + (target / (a/A) + PaCO2 / R) /
    # FiO2_max.
    pb = 47.0 + (50.0 / ratio + 40.0 / 0.8) / 0.3
    assert value(r, "max_altitude_pb") == pytest.approx(pb, abs=1e-3)
    assert value(r, "max_altitude") == pytest.approx(alt.altitude_at_pressure_isa(pb_mmhg=pb), abs=1e-3)


def test_target_that_holds_at_the_model_ceiling():
    r = ok("altitude", {**FULL_ALTITUDE, "fio2_max": 1.0, "target_po2": mmhg(45)})
    assert r["outputs"]["max_altitude_status"] == "holds_at_ceiling"
    assert value(r, "max_altitude_m") == 11_000.0
    assert "max_altitude_at_model_ceiling" in codes(r)


def test_target_not_reachable_anywhere():
    r = ok("altitude", {**FULL_ALTITUDE, "po2": mmhg(40), "target_po2": mmhg(90), "fio2_max": 0.3})
    assert r["outputs"]["max_altitude_status"] == "not_reachable"
    assert "max_altitude" not in r["outputs"]
    assert {"max_altitude_not_reachable", "target_po2_not_reachable"} <= codes(r)
    assert value(r, "fio2_for_target") > 0.3


def test_no_fio2_up_to_max_keeps_the_origin_pao2():
    r = ok("altitude", {"altitude": ft(10000), "fio2": 0.8, "pco2": mmhg(40), "fio2_max": 1.0})
    # Derived: 0.8 x 713 / (522.66 - 47) = 1.20 > 1.0
    assert value(r, "fio2_equivalent") == pytest.approx(0.8 * 713 / (522.66 - 47), abs=1e-3)
    assert r["outputs"]["fio2_equivalent_within_max"] is False
    assert "fio2_max_insufficient" in codes(r)


def test_max_altitude_below_origin():
    r = ok(
        "altitude",
        {
            "altitude": m(3000),
            "origin_altitude": m(2500),
            "fio2": 0.21,
            "pco2": mmhg(40),
            "po2": mmhg(50),
            "target_po2": mmhg(60),
            "fio2_max": 0.21,
        },
    )
    assert r["outputs"]["max_altitude_status"] == "solved"
    assert value(r, "max_altitude_m") < 2500
    assert "max_altitude_below_origin" in codes(r)


# --------------------------------------------------------------------------------------------------
# findings and cautions


def test_cabin_above_8000_ft_finding():
    # Published (AsMA 2008, verified): 8,000 ft is the usual upper limit of a pressurised cabin.
    at_limit = ok("altitude", {"altitude": ft(8000), "fio2": 0.21, "pco2": mmhg(40)})
    above = ok("altitude", {"altitude": ft(8500), "fio2": 0.21, "pco2": mmhg(40)})
    assert "cabin_altitude_above_8000_ft" not in codes(at_limit)
    assert "cabin_altitude_above_8000_ft" in codes(above)


def test_pco2_assumed_and_hypercapnia_caution():
    assumed = ok("altitude", {"altitude": ft(6000), "fio2": 0.28})
    assert "pco2_assumed" in codes(assumed)
    step = next(s for s in assumed["steps"] if s.get("output") == "pao2_alveolar")
    assert "40.0 mmHg (assumed)" in step["formula"]
    retained = ok("altitude", {"altitude": ft(6000), "fio2": 0.28, "pco2": mmhg(65)})
    assert "pco2_assumed" not in codes(retained)
    assert any("88-92 %" in c for c in retained["cautions"])
    assert all("local protocols" in c for c in retained["cautions"][:1])


def test_no_alveolar_oxygen_is_zero_with_urgent_finding():
    r = ok("altitude", {"altitude": m(9000), "fio2": 0.21, "pco2": mmhg(60)})
    assert value(r, "pao2_alveolar") == 0.0
    assert any(f["code"] == "no_alveolar_oxygen" and f["severity"] == "urgent" for f in r["findings"])


def test_descent_gives_lower_fio2_and_contracting_gas():
    r = ok(
        "altitude",
        {
            "altitude": m(0),
            "origin_altitude": m(2000),
            "fio2": 0.3,
            "pco2": mmhg(40),
            "trapped_gas_volume": {"value": 10, "unit": "mL"},
        },
    )
    assert value(r, "fio2_equivalent") < 0.3
    assert {"descent_lowers_fio2_need", "trapped_gas_contracts"} <= codes(r)


@pytest.mark.parametrize(
    ("calc", "inputs"),
    [
        ("altitude", FULL_ALTITUDE),
        ("altitude", {**FULL_ALTITUDE, "fio2_max": 1.0, "target_po2": mmhg(45)}),
        ("altitude_profile", {**FULL_ALTITUDE, "ceiling": ft(10000)}),
        ("oxygen_supply", SUPPLY),
        (
            "oxygen_supply",
            {**SUPPLY, "flow": None, "minute_ventilation": {"value": 9, "unit": "L/min"}, "fio2": 0.6},
        ),
    ],
)
def test_every_number_output_has_a_step(calc, inputs):
    r = ok(calc, inputs)
    explained = {s.get("output") for s in r["steps"]}
    missing = [name for name in numeric_outputs(r["outputs"]) if name not in explained]
    assert not missing, missing
    from tidewell.references import REFERENCES

    for step in r["steps"]:
        assert all(key in REFERENCES for key in step["source_keys"])


def test_contract_outputs_present():
    # the contract's altitude outputs (docs/bridge.md)
    r = ok("altitude", FULL_ALTITUDE)
    for name in (
        "pb",
        "pio2",
        "pao2_alveolar",
        "fio2_equivalent",
        "po2_predicted",
        "max_altitude",
        "trapped_gas_volume_at_altitude",
    ):
        assert name in r["outputs"], name
    s = ok("oxygen_supply", SUPPLY)
    for name in (
        "available_litres",
        "required_litres",
        "minutes_available",
        "sufficient",
        "cylinders_needed",
    ):
        assert name in s["outputs"], name
    assert isinstance(s["outputs"]["sufficient"], bool)


# --------------------------------------------------------------------------------------------------
# altitude_profile


def test_profile_shapes_and_default_ceiling():
    r = ok("altitude_profile", {"altitude": ft(8000), "fio2": 0.21, "pco2": mmhg(40), "po2": mmhg(70)})
    out = r["outputs"]
    heights = out["altitude"]["value"]
    assert out["altitude"]["unit"] == "ft" and len(heights) == 61
    # default ceiling 3,000 m (docs/bridge.md) from the origin (sea level)
    assert heights[0] == 0.0 and heights[-1] == pytest.approx(3000 / FT_M)
    for name in ("pao2_alveolar", "po2_predicted"):
        for curve in ("at_fio2", "at_fio2_equivalent"):
            values = out[name][curve]["value"]
            assert len(values) == 61 and out[name][curve]["unit"] == "mmHg"
            assert all(a > b for a, b in itertools.pairwise(values)), "falls with altitude"
    assert len(out["pb"]["value"]) == 61 and len(out["fio2_needed"]) == 61


def test_profile_points_agree_with_the_altitude_calculation():
    inputs = {
        "altitude": ft(8000),
        "fio2": 0.21,
        "pco2": mmhg(40),
        "po2": mmhg(70),
        "ceiling": ft(8000),
        "points": 9,
    }
    prof = ok("altitude_profile", inputs)["outputs"]
    scalar = ok("altitude", {k: v for k, v in inputs.items() if k not in ("ceiling", "points")})
    assert prof["pao2_alveolar"]["at_fio2"]["value"][-1] == pytest.approx(
        value(scalar, "pao2_alveolar"), rel=1e-12
    )
    assert prof["po2_predicted"]["at_fio2"]["value"][-1] == pytest.approx(
        value(scalar, "po2_predicted"), rel=1e-12
    )
    assert prof["pb"]["value"][-1] == pytest.approx(value(scalar, "pb"), rel=1e-12)
    # on the FiO2 that keeps the origin's PAO2 at the cabin altitude, the curve ends at the origin's PAO2
    assert prof["pao2_alveolar"]["at_fio2_equivalent"]["value"][-1] == pytest.approx(
        value(scalar, "pao2_alveolar_origin"), rel=1e-9
    )
    assert prof["fio2_needed"][-1] == pytest.approx(value(scalar, "fio2_equivalent"), rel=1e-12)
    # each point of the profile equals the domain function at that altitude
    for h_ft, pao2 in zip(prof["altitude"]["value"], prof["pao2_alveolar"]["at_fio2"]["value"], strict=True):
        assert pao2 == pytest.approx(
            alt.alveolar_po2_at_altitude(fio2_fraction=0.21, paco2_mmhg=40.0, altitude_m=h_ft * FT_M),
            rel=1e-12,
        )


def test_profile_in_kpa_and_from_a_high_origin():
    r = ok(
        "altitude_profile",
        {
            "altitude": m(2500),
            "origin_altitude": m(1500),
            "fio2": 0.3,
            "pco2": mmhg(45),
            "ceiling": m(4000),
            "points": 11,
        },
        pressure_unit="kPa",
    )
    out = r["outputs"]
    assert out["altitude"]["unit"] == "m" and out["altitude"]["value"][0] == pytest.approx(1500.0)
    assert out["altitude"]["value"][-1] == pytest.approx(4000.0)
    assert out["pao2_alveolar"]["at_fio2"]["unit"] == "kPa"
    assert "po2_predicted" not in out  # no measured PO2
    assert out["fio2_profile"]["at_fio2"] == 0.3


def test_profile_equivalent_curve_is_limited_to_fio2_max():
    r = ok("altitude_profile", {"altitude": ft(10000), "fio2": 0.8, "pco2": mmhg(40), "fio2_max": 1.0})
    assert r["outputs"]["fio2_profile"]["at_fio2_equivalent"] == 1.0
    assert "fio2_max_insufficient" in codes(r)


def test_profile_below_cabin_altitude_is_said():
    r = ok("altitude_profile", {"altitude": ft(12000), "fio2": 0.21, "pco2": mmhg(40)})
    assert "profile_below_cabin_altitude" in codes(r)


def test_import_flight_is_numpy_free_and_profile_loads_numpy():
    code = "\n".join(
        [
            "import sys, tidewell.calculations.altitude, tidewell.calculations.altitude_profile, "
            "tidewell.calculations.oxygen_supply, tidewell.formulas.altitude, tidewell.formulas.transport",
            "print('numpy' in sys.modules)",
            "from tidewell.bridge import handle_obj",
            f"handle_obj({{'calc': 'altitude', 'inputs': {ALT_BASE!r}}})",
            f"handle_obj({{'calc': 'oxygen_supply', 'inputs': {SUPPLY!r}}})",
            "print('numpy' in sys.modules)",
            f"r = handle_obj({{'calc': 'altitude_profile', 'inputs': {ALT_BASE!r}}})",
            "print(r['ok'], 'numpy' in sys.modules)",
        ]
    )
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True)
    assert out.stdout.split() == ["False", "False", "True", "True"]


# --------------------------------------------------------------------------------------------------
# error paths: code and field through the bridge


@pytest.mark.parametrize(
    ("calc", "inputs", "code", "field"),
    [
        # altitude beyond the model's range (ISA troposphere, -500 to 11,000 m)
        ("altitude", {**ALT_BASE, "altitude": ft(40000)}, "out_of_range", "inputs.altitude"),
        ("altitude", {**ALT_BASE, "altitude": m(12000)}, "implausible", "inputs.altitude"),  # 12,000 ft fits
        ("altitude", {**ALT_BASE, "altitude": m(40000)}, "out_of_range", "inputs.altitude"),
        ("altitude", {**ALT_BASE, "altitude": m(30000)}, "implausible", "inputs.altitude"),  # meant ft
        ("altitude", {**ALT_BASE, "altitude": m(-800)}, "implausible", "inputs.altitude"),  # -800 ft fits
        ("altitude", {**ALT_BASE, "altitude": m(-2000)}, "out_of_range", "inputs.altitude"),
        ("altitude", {**ALT_BASE, "altitude": 8000}, "bad_unit", "inputs.altitude"),
        (
            "altitude",
            {**ALT_BASE, "altitude": {"value": 8000, "unit": "feet"}},
            "bad_unit",
            "inputs.altitude",
        ),
        ("altitude", {**ALT_BASE, "altitude": {"value": 8000, "unit": "cm"}}, "bad_unit", "inputs.altitude"),
        (
            "altitude",
            {**ALT_BASE, "altitude": {"value": "8000", "unit": "ft"}},
            "not_a_number",
            "inputs.altitude",
        ),
        ("altitude", {**ALT_BASE, "altitude": {"unit": "ft"}}, "missing", "inputs.altitude"),
        (
            "altitude",
            {**ALT_BASE, "altitude": {"value": 1, "unit": "ft", "x": 1}},
            "bad_request",
            "inputs.altitude",
        ),
        ("altitude", {"fio2": 0.21}, "missing", "inputs.altitude"),
        ("altitude", {**ALT_BASE, "origin_altitude": ft(50000)}, "out_of_range", "inputs.origin_altitude"),
        ("altitude", {**ALT_BASE, "pb": mmhg(75.3)}, "implausible", "inputs.pb"),  # meant kPa
        ("altitude", {**ALT_BASE, "pb": mmhg(1200)}, "out_of_range", "inputs.pb"),
        (
            "altitude",
            {**ALT_BASE, "origin_pb": {"value": 760, "unit": "bar"}},
            "bad_unit",
            "inputs.origin_pb",
        ),
        # FiO2 > 1 and other FiO2 problems
        ("altitude", {**ALT_BASE, "fio2": 1.2}, "out_of_range", "inputs.fio2"),
        ("altitude", {**ALT_BASE, "fio2": 40}, "implausible", "inputs.fio2"),
        ("altitude", {**ALT_BASE, "fio2": None}, "missing", "inputs.fio2"),
        ("altitude", {**ALT_BASE, "fio2_max": 1.5}, "out_of_range", "inputs.fio2_max"),
        ("altitude", {**ALT_BASE, "fio2": {"value": 120, "unit": "%"}}, "out_of_range", "inputs.fio2"),
        # blood gas values
        ("altitude", {**ALT_BASE, "pco2": mmhg(5.3)}, "implausible", "inputs.pco2"),
        ("altitude", {**ALT_BASE, "po2": mmhg(200)}, "inconsistent", "inputs.po2"),  # above PAO2 on air
        ("altitude", {**ALT_BASE, "target_po2": mmhg(8)}, "implausible", "inputs.target_po2"),  # meant kPa
        (
            "altitude",
            {**ALT_BASE, "trapped_gas_volume": {"value": -5, "unit": "mL"}},
            "out_of_range",
            "inputs.trapped_gas_volume",
        ),
        ("altitude", {**ALT_BASE, "alveolar_equation": "fancy"}, "bad_request", "inputs.alveolar_equation"),
        ("altitude", {**ALT_BASE, "trapped_gas_kind": "moist"}, "bad_request", "inputs.trapped_gas_kind"),
        ("altitude", {**ALT_BASE, "rq": 2.0}, "out_of_range", "inputs.rq"),
        ("altitude", {**ALT_BASE, "altitud": ft(1)}, "unknown_input", "inputs.altitud"),
        ("altitude", {**ALT_BASE, "ceiling": ft(10000)}, "unknown_input", "inputs.ceiling"),
        # profile
        (
            "altitude_profile",
            {**ALT_BASE, "ceiling": ft(5000), "origin_altitude": ft(6000)},
            "inconsistent",
            "inputs.ceiling",
        ),
        ("altitude_profile", {**ALT_BASE, "ceiling": ft(60000)}, "out_of_range", "inputs.ceiling"),
        ("altitude_profile", {**ALT_BASE, "points": 1}, "out_of_range", "inputs.points"),
        ("altitude_profile", {**ALT_BASE, "points": 10.5}, "out_of_range", "inputs.points"),
        # oxygen supply: negative durations and friends
        (
            "oxygen_supply",
            {**SUPPLY, "duration": {"value": -30, "unit": "min"}},
            "out_of_range",
            "inputs.duration",
        ),
        (
            "oxygen_supply",
            {**SUPPLY, "duration": {"value": 0, "unit": "min"}},
            "out_of_range",
            "inputs.duration",
        ),
        ("oxygen_supply", {**SUPPLY, "duration": 60}, "bad_unit", "inputs.duration"),
        ("oxygen_supply", {**SUPPLY, "duration": None}, "missing", "inputs.duration"),
        ("oxygen_supply", {**SUPPLY, "flow": {"value": -2, "unit": "L/min"}}, "out_of_range", "inputs.flow"),
        ("oxygen_supply", {**SUPPLY, "flow": None}, "missing", "inputs.flow"),
        (
            "oxygen_supply",
            {**SUPPLY, "cylinder_pressure": {"value": 2000, "unit": "bar"}},
            "implausible",
            "inputs.cylinder_pressure",
        ),  # meant psi
        (
            "oxygen_supply",
            {**SUPPLY, "cylinder_pressure": {"value": 150000, "unit": "mmHg"}},
            "bad_unit",
            "inputs.cylinder_pressure",
        ),
        (
            "oxygen_supply",
            {**SUPPLY, "cylinder_water_capacity": None},
            "missing",
            "inputs.cylinder_water_capacity",
        ),
        ("oxygen_supply", {**SUPPLY, "cylinders": 0}, "out_of_range", "inputs.cylinders"),
        ("oxygen_supply", {**SUPPLY, "cylinders": 1.5}, "out_of_range", "inputs.cylinders"),
        ("oxygen_supply", {**SUPPLY, "reserve_fraction": 25}, "implausible", "inputs.reserve_fraction"),
        ("oxygen_supply", {**SUPPLY, "reserve_fraction": -0.1}, "out_of_range", "inputs.reserve_fraction"),
        ("oxygen_supply", {**SUPPLY, "safety_factor": 0.5}, "out_of_range", "inputs.safety_factor"),
        (
            "oxygen_supply",
            {**SUPPLY, "residual_pressure": {"value": 300, "unit": "bar"}},
            "inconsistent",
            "inputs.residual_pressure",
        ),
        (
            "oxygen_supply",
            {**SUPPLY, "minute_ventilation": {"value": 8, "unit": "L/min"}, "fio2": 0.5},
            "inconsistent",
            "inputs.minute_ventilation",
        ),
        (
            "oxygen_supply",
            {**SUPPLY, "flow": None, "minute_ventilation": {"value": 8, "unit": "L/min"}},
            "missing",
            "inputs.fio2",
        ),
        (
            "oxygen_supply",
            {**SUPPLY, "flow": None, "minute_ventilation": {"value": 8, "unit": "L/min"}, "fio2": 1.2},
            "out_of_range",
            "inputs.fio2",
        ),
    ],
)
def test_error_paths(calc, inputs, code, field):
    response = run(calc, inputs)
    assert (code, field) in error_of(response), response["errors"]


def test_error_messages_say_what_was_probably_meant():
    r = run("altitude", {**ALT_BASE, "altitude": m(30000)})
    assert "Did you mean 30000 ft?" in r["errors"][0]["message"]
    r = run("oxygen_supply", {**SUPPLY, "cylinder_pressure": {"value": 2000, "unit": "bar"}})
    assert "Did you mean 2000 psi?" in r["errors"][0]["message"]
    r = run("altitude", {**ALT_BASE, "altitude": {"value": 8000, "unit": "feet"}})
    assert "Did you mean 'ft'?" in r["errors"][0]["message"]
    r = run("oxygen_supply", {**SUPPLY, "duration": {"value": -30, "unit": "min"}})
    assert "cannot be negative" in r["errors"][0]["message"]
    r = run("altitude", {**ALT_BASE, "altitude": ft(40000)})
    assert "36,089 ft" in r["errors"][0]["message"]


def test_all_problems_reported_at_once():
    r = run(
        "oxygen_supply",
        {"cylinder_pressure": {"value": 2000, "unit": "bar"}, "duration": {"value": -1, "unit": "h"}},
    )
    fields = {f for _, f in error_of(r)}
    assert {
        "inputs.cylinder_water_capacity",
        "inputs.cylinder_pressure",
        "inputs.duration",
        "inputs.flow",
    } <= fields


def test_unused_inputs_are_said_not_silently_dropped():
    r = ok("oxygen_supply", {**SUPPLY, "fio2": 0.4})
    assert "inputs_not_used" in codes(r)


# --------------------------------------------------------------------------------------------------
# never NaN, never an internal error, over valid inputs


@settings(max_examples=150, deadline=None)
@given(
    h=st.floats(min_value=-500, max_value=11_000),
    h0=st.floats(min_value=-500, max_value=4000),
    fio2=st.floats(min_value=0.21, max_value=1.0),
    pco2=st.floats(min_value=10, max_value=200),
    po2=st.floats(min_value=20, max_value=700),
    target=st.floats(min_value=30, max_value=200),
    fmax=st.floats(min_value=0.21, max_value=1.0),
    volume=st.floats(min_value=0.1, max_value=20_000),
    full=st.booleans(),
)
def test_altitude_never_fails_inside(h, h0, fio2, pco2, po2, target, fmax, volume, full):
    inputs = {
        "altitude": m(h),
        "origin_altitude": m(h0),
        "fio2": fio2,
        "pco2": mmhg(pco2),
        "po2": mmhg(po2),
        "target_po2": mmhg(target),
        "fio2_max": fmax,
        "trapped_gas_volume": {"value": volume, "unit": "mL"},
        "alveolar_equation": "full" if full else "simple",
    }
    r = run("altitude", inputs)
    if not r["ok"]:
        assert error_of(r) == [("inconsistent", "inputs.po2")]
    else:
        assert math.isfinite(value(r, "po2_predicted")) and value(r, "po2_predicted") >= 0.0


@settings(max_examples=100, deadline=None)
@given(
    wc=st.floats(min_value=0.1, max_value=100),
    p=st.floats(min_value=1, max_value=350),
    flow=st.floats(min_value=0.1, max_value=200),
    minutes=st.floats(min_value=1, max_value=4320),
    n=st.integers(min_value=1, max_value=100),
    reserve=st.floats(min_value=0, max_value=0.9),
)
def test_oxygen_supply_never_fails_inside(wc, p, flow, minutes, n, reserve):
    r = ok(
        "oxygen_supply",
        {
            "cylinder_water_capacity": {"value": wc, "unit": "L"},
            "cylinder_pressure": {"value": p, "unit": "bar"},
            "flow": {"value": flow, "unit": "L/min"},
            "duration": {"value": minutes, "unit": "min"},
            "cylinders": n,
            "reserve_fraction": reserve,
        },
    )
    assert r["outputs"]["cylinders_needed"] >= 1
