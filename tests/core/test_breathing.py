"""The breathing calculations through the bridge: worked cases, error codes and fields, the curve arrays.

Every request goes through ``tidewell.bridge.handle_obj`` (or ``handle`` for the JSON text). Provenance
words beside each check: "published", "derived", "common practice", "from memory".
"""

from __future__ import annotations

import itertools
import json
import math
import subprocess
import sys

import pytest

from casebook import close, load_cases
from tidewell.bridge import handle, handle_obj
from tidewell.formulas.altitude import altitude_at_pressure_isa

CASES = load_cases()


def mmhg(x: float) -> dict:
    return {"value": x, "unit": "mmHg"}


def q(x: float, unit: str) -> dict:
    return {"value": x, "unit": unit}


def ok(calc: str, inputs: dict, **options) -> dict:
    r = handle_obj({"calc": calc, "inputs": inputs, **({"options": options} if options else {})})
    assert r["ok"], r.get("errors")
    json.dumps(r, allow_nan=False)  # no NaN or infinity anywhere
    for step in r["steps"]:
        assert step["source"] and step["label"] and step["formula"]
    return r


def errors(calc: str, inputs: dict) -> list[dict]:
    r = handle_obj({"calc": calc, "inputs": inputs})
    assert not r["ok"], r
    assert all(e["code"] != "internal_error" for e in r["errors"])
    return r["errors"]


def has_error(errs: list[dict], field: str, code: str) -> bool:
    return any(e["field"] == field and e["code"] == code for e in errs)


def val(x):
    return x["value"] if isinstance(x, dict) else x


def codes(r: dict) -> set[str]:
    return {f["code"] for f in r["findings"]}


# ==================================================================================================
# alveolar_gas


def test_ox01_through_the_bridge():
    # alveolar_gas_1946 (equation form verified); derived values of OX-01
    o = ok("alveolar_gas", {"fio2": 0.21, "pco2": mmhg(40), "pb": mmhg(760), "rq": 0.8})["outputs"]
    close("OX-01", "pio2_mmHg", o["pio2"])
    close("OX-01", "pao2_alv_simple_mmHg", o["pao2_alveolar"])
    close("OX-01", "pao2_alv_full_mmHg", o["pao2_alveolar_full"])


def test_ox01_in_kpa():
    # bipm2019 exact factor: 149.73 mmHg = 19.962 kPa
    o = ok("alveolar_gas", {"fio2": 0.21, "pco2": q(5.333, "kPa")}, pressure_unit="kPa")["outputs"]
    assert o["pio2"]["unit"] == "kPa"
    assert o["pio2"]["value"] == pytest.approx(149.73 * 0.133322387415, abs=0.002)


def test_ox02_through_the_bridge():
    o = ok("alveolar_gas", {"fio2": 0.21, "pco2": mmhg(40), "po2": mmhg(70), "age": 60})["outputs"]
    close("OX-02", "pao2_alv_mmHg", o["pao2_alveolar"])
    close("OX-02", "aa_gradient_mmHg", o["a_a_gradient"])
    close("OX-02", "aa_expected_age_mmHg", o["a_a_expected_upper"])  # common practice age/4 + 4
    close("OX-02", "a_A_ratio", o["a_over_A"])
    close("OX-02", "pao2_expected_100_minus_age_over_3", o["pao2_expected_for_age"])
    close("OX-02", "pao2_expected_sorbini", o["pao2_expected_sorbini"])  # sorbini1968, from memory
    assert o["a_a_status"] == CASES["OX-02"]["expected"]["aa_category"]


def test_ox03_through_the_bridge_with_pb_and_with_altitude():
    # berlin2012 (verified): corrected above 1000 m; PB 630 mmHg is about 1570 m in the ISA
    base = {"fio2": 0.5, "pco2": mmhg(40), "po2": mmhg(90)}
    for extra in ({"pb": mmhg(630)}, {"altitude": q(altitude_at_pressure_isa(pb_mmhg=630.0), "m")}):
        o = ok("alveolar_gas", {**base, **extra})["outputs"]
        close("OX-03", "pf_ratio", o["pf_ratio"])
        close("OX-03", "pf_ratio_altitude_corrected", o["pf_ratio_altitude_corrected"])
        assert o["pf_band_berlin"] == CASES["OX-03"]["expected"]["berlin_category"]


def test_berlin_band_uses_uncorrected_pf_at_sea_level():
    # berlin2012: the correction applies only above 1000 m; at sea level P/F 180 is "moderate"
    o = ok("alveolar_gas", {"fio2": 0.5, "pco2": mmhg(40), "po2": mmhg(90)})["outputs"]
    assert val(o["pf_ratio_altitude_corrected"]) == pytest.approx(180.0)
    assert o["pf_band_berlin"] == "moderate"


def test_ox04_sf_and_oi_through_the_bridge():
    # rice2007 (verified) and chen2018_oi (verified formula)
    o = ok("alveolar_gas", {"fio2": 0.4, "pco2": mmhg(40), "spo2": 92})["outputs"]
    close("OX-04", "sf_ratio", o["sf_ratio"])
    close("OX-04", "pf_estimated_rice", o["pf_ratio_estimated_from_sf"])
    o = ok(
        "alveolar_gas",
        {"fio2": 0.6, "pco2": mmhg(40), "po2": mmhg(80), "mean_airway_pressure": q(20, "cmH2O")},
    )["outputs"]
    close("OX-04", "oxygenation_index", o["oxygenation_index"])


def test_sf_estimate_withheld_above_97_percent():
    # rice2007: the S/F-P/F relation is for SpO2 <= 97 %
    r = ok("alveolar_gas", {"fio2": 0.4, "pco2": mmhg(40), "spo2": 99})
    assert "pf_ratio_estimated_from_sf" not in r["outputs"] and "sf_estimate_not_valid" in codes(r)


def test_patient_temperature_uses_buck_water_vapour():
    # buck1981: 39 degC -> 52.5 mmHg (docs/methods.md#water-vapour-pressure), PIO2 = 0.21 x (760 - 52.5)
    o = ok("alveolar_gas", {"fio2": 0.21, "pco2": mmhg(40), "temperature": q(39, "degC")})["outputs"]
    assert val(o["ph2o"]) == pytest.approx(52.5, abs=0.05)
    assert val(o["pio2"]) == pytest.approx(0.21 * (760 - 52.49), abs=0.02)


def test_ab09_pure_hypoventilation_a_a_normal():
    # alveolar_gas_1946, aa_age_rule, AB-09 (derived): PaCO2 80, PaO2 48 on air, age 30 -> PAO2 49.73, A-a
    # 1.73 vs 11.5
    o = ok("alveolar_gas", {"fio2": 0.21, "pco2": mmhg(80), "po2": mmhg(48), "age": 30})["outputs"]
    assert val(o["pao2_alveolar"]) == pytest.approx(49.73, abs=0.01)
    assert val(o["a_a_gradient"]) == pytest.approx(1.73, abs=0.01)
    assert val(o["a_a_expected_upper"]) == pytest.approx(11.5)
    assert o["a_a_status"] == "normal"


def test_higher_altitude_lower_pio2_through_the_bridge():
    pio2 = [
        val(ok("alveolar_gas", {"fio2": 0.21, "pco2": mmhg(40), "altitude": q(h, "ft")})["outputs"]["pio2"])
        for h in range(0, 10001, 1000)
    ]
    assert all(b < a for a, b in itertools.pairwise(pio2))


@pytest.mark.parametrize(
    ("fio2", "code"), [(0.15, "out_of_range"), (1.2, "out_of_range"), (40, "implausible")]
)
def test_fio2_outside_021_to_1(fio2, code):
    errs = errors("alveolar_gas", {"fio2": fio2, "pco2": mmhg(40)})
    assert has_error(errs, "inputs.fio2", code)


def test_fio2_as_percent_is_accepted():
    o = ok("alveolar_gas", {"fio2": {"value": 21, "unit": "%"}, "pco2": mmhg(40)})["outputs"]
    assert val(o["pio2"]) == pytest.approx(149.73)


def test_pco2_in_wrong_unit_is_caught():
    errs = errors("alveolar_gas", {"fio2": 0.21, "pco2": mmhg(5.3)})
    assert has_error(errs, "inputs.pco2", "implausible")
    assert "kPa" in next(e["message"] for e in errs if e["field"] == "inputs.pco2")


def test_no_alveolar_oxygen_is_inconsistent():
    # derived: PB 300 mmHg on air: PIO2 53.1, PaCO2 60 -> PAO2 -21.9 (not survivable)
    errs = errors("alveolar_gas", {"fio2": 0.21, "pco2": mmhg(60), "pb": mmhg(300)})
    assert has_error(errs, "inputs.pco2", "inconsistent")


def test_missing_and_unknown_inputs():
    errs = errors("alveolar_gas", {"fio2": 0.21, "pcoo2": mmhg(40)})
    assert has_error(errs, "inputs.pco2", "missing") and has_error(errs, "inputs.pcoo2", "unknown_input")


def test_pao2_above_alveolar_is_flagged():
    r = ok("alveolar_gas", {"fio2": 0.21, "pco2": mmhg(40), "po2": mmhg(120)})
    assert "pao2_above_alveolar" in codes(r)


# ==================================================================================================
# oxygen_content


def test_ox05_through_the_bridge():
    # o2_content (common practice) with 1.34; dijkhuizen1977 (verified) for 1.39
    base = {"hb": q(15, "g/dL"), "spo2": 98, "po2": mmhg(100), "cardiac_output": q(5, "L/min")}
    o = ok("oxygen_content", base)["outputs"]
    close("OX-05", "cao2_1p34_mL_dL", o["cao2"])
    close("OX-05", "do2_1p34_mL_min", o["do2"])
    assert o["sao2"] == pytest.approx(98.0)
    o = ok("oxygen_content", {**base, "hufner": 1.39})["outputs"]
    close("OX-05", "cao2_1p39_mL_dL", o["cao2"])
    close("OX-05", "do2_1p39_mL_min", o["do2"])


def test_hb_in_g_per_l_and_mmol():
    # units: 150 g/L = 15 g/dL; 9.3 mmol/L (monomer, 16114.5 g/mol) = 14.99 g/dL
    a = ok("oxygen_content", {"hb": q(150, "g/L"), "spo2": 98})["outputs"]["cao2"]["value"]
    b = ok("oxygen_content", {"hb": q(9.3, "mmol/L"), "spo2": 98})["outputs"]["cao2"]["value"]
    assert a == pytest.approx(1.34 * 15 * 0.98)
    assert b == pytest.approx(1.34 * 14.9865 * 0.98, abs=0.01)


def test_ox07_saturation_from_po2_through_the_bridge():
    # kelman1966 / severinghaus1966 virtual PO2 (OX-07 derived values)
    o = ok("oxygen_content", {"hb": q(15, "g/dL"), "po2": mmhg(60), "ph": 7.20, "pco2": mmhg(60)})["outputs"]
    close("OX-07", "s_sev_kelman", o["sao2"] / 100)
    o = ok(
        "oxygen_content", {"hb": q(15, "g/dL"), "po2": mmhg(60), "ph": 7.20, "base_excess": q(-5, "mmol/L")}
    )
    close("OX-07", "s_sev_be", o["outputs"]["sao2"] / 100)


def test_spo2_and_curve_disagreement_is_flagged():
    r = ok("oxygen_content", {"hb": q(14, "g/dL"), "spo2": 99, "po2": mmhg(50)})
    assert "spo2_po2_disagree" in codes(r)
    assert r["outputs"]["sao2"] == 99.0  # the measured SpO2 is used, not hidden


def test_without_po2_dissolved_left_out_and_po2_estimated():
    r = ok("oxygen_content", {"hb": q(15, "g/dL"), "spo2": 90})
    assert r["outputs"]["cao2_dissolved"]["value"] == 0.0 and "dissolved_o2_not_included" in codes(r)
    # severinghaus1979 eq 1 inverted exactly: S 0.90 -> 58.66 mmHg (OX-06)
    close("OX-06", "po2_inverse_exact_mmHg", r["outputs"]["po2_estimated"])


@pytest.mark.parametrize(
    ("inputs", "field", "code"),
    [
        ({"hb": q(15, "g/dL")}, "inputs.spo2", "missing"),
        ({"hb": q(15, "g/dL"), "spo2": 120}, "inputs.spo2", "out_of_range"),
        ({"hb": q(15, "g/dL"), "spo2": -5}, "inputs.spo2", "out_of_range"),
        ({"hb": q(15, "g/dL"), "spo2": 0.92}, "inputs.spo2", "implausible"),
        ({"hb": q(150, "g/dL"), "spo2": 92}, "inputs.hb", "implausible"),
        ({"spo2": 92}, "inputs.hb", "missing"),
        ({"hb": q(15, "g/dL"), "spo2": 92, "hufner": 1.5}, "inputs.hufner", "out_of_range"),
    ],
)
def test_oxygen_content_errors(inputs, field, code):
    assert has_error(errors("oxygen_content", inputs), field, code)


# ==================================================================================================
# oxygen_dissociation_curve


def test_importing_breathing_does_not_import_numpy():
    code = (
        "import sys, tidewell.bridge, tidewell.calculations.alveolar_gas, "
        "tidewell.calculations.oxygen_content, tidewell.calculations.oxygen_dissociation_curve, "
        "tidewell.calculations.ventilation, tidewell.calculations.temperature_correction; "
        "print('numpy' in sys.modules)"
    )
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True)
    assert out.stdout.strip() == "False"


def test_curve_loads_numpy_only_when_asked():
    code = (
        "import sys; from tidewell.bridge import handle_obj; "
        "handle_obj({'calc': 'alveolar_gas', "
        "'inputs': {'fio2': 0.21, 'pco2': {'value': 40, 'unit': 'mmHg'}}}); "
        "a = 'numpy' in sys.modules; handle_obj({'calc': 'oxygen_dissociation_curve', 'inputs': {}}); "
        "print(a, 'numpy' in sys.modules)"
    )
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True)
    assert out.stdout.strip() == "False True"


def test_standard_curve_arrays():
    o = ok("oxygen_dissociation_curve", {})["outputs"]
    po2, s_std, s_pat = o["po2"]["value"], o["so2_standard"], o["so2_patient"]
    assert o["po2"]["unit"] == "mmHg"
    assert len(po2) == len(s_std) == len(s_pat) == 151
    assert po2[0] == 0.0 and po2[-1] == 150.0
    assert s_std == s_pat  # no shift at standard conditions
    assert all(b > a for a, b in itertools.pairwise(s_std))
    # severinghaus1979 eq 1 (OX-06 derived): S(40) 0.74946, S(60) 0.90580, S(100) 0.97747
    for p, key in ((40, "s_40"), (60, "s_60"), (100, "s_100")):
        close("OX-06", key, s_std[po2.index(p)] / 100)
    close("OX-06", "p50_standard_curve_mmHg", o["p50_patient"])


def test_patient_curve_and_point_ox07():
    o = ok("oxygen_dissociation_curve", {"ph": 7.20, "pco2": mmhg(60), "po2": mmhg(60)})["outputs"]
    close("OX-07", "virtual_factor_kelman", o["shift_factor"])
    # derived: P50 = 26.857 / 0.81177 = 33.08 mmHg (right shift)
    assert val(o["p50_patient"]) == pytest.approx(26.857 / 0.81177, abs=0.02)
    close("OX-07", "s_sev_kelman", o["point"]["so2"] / 100)
    assert val(o["point"]["po2"]) == 60.0
    assert all(p <= s + 1e-9 for p, s in zip(o["so2_patient"], o["so2_standard"], strict=False))


def test_base_excess_variant_on_the_curve():
    o = ok("oxygen_dissociation_curve", {"ph": 7.20, "base_excess": q(-5, "mmol/L"), "po2": mmhg(60)})[
        "outputs"
    ]
    assert o["shift_method"] == "base_excess"
    close("OX-07", "virtual_factor_sev_be", o["shift_factor"])
    close("OX-07", "s_sev_be", o["point"]["so2"] / 100)


def test_hypothermia_shifts_the_in_vivo_curve_left():
    # kelman1966 temperature term 0.024 (37 - T) plus Rosenthal pH and 0.019 PCO2 corrections: P50 falls
    o = ok("oxygen_dissociation_curve", {"temperature": q(32, "degC"), "ph": 7.40, "pco2": mmhg(40)})[
        "outputs"
    ]
    assert val(o["p50_patient"]) < 26.857 and o["shift_factor"] > 1.0
    assert o["values_at_temperature"]["ph"] == pytest.approx(7.4735, abs=1e-4)  # Rosenthal at 32 degC


def test_curve_extends_for_a_high_po2_and_stays_small():
    req = {
        "calc": "oxygen_dissociation_curve",
        "inputs": {"po2": mmhg(300)},
        "options": {"pressure_unit": "kPa"},
    }
    text = handle(json.dumps(req))
    r = json.loads(text)
    assert r["ok"] and len(text) < 12_000
    axis = r["outputs"]["po2"]
    assert axis["unit"] == "kPa" and axis["value"][-1] == pytest.approx(350 * 0.133322387415, abs=1e-3)
    assert len(axis["value"]) == 151


def test_curve_errors():
    errs = errors("oxygen_dissociation_curve", {"ph": 9.1, "po2": mmhg(-3)})
    assert has_error(errs, "inputs.ph", "out_of_range") and has_error(errs, "inputs.po2", "out_of_range")


# ==================================================================================================
# temperature_correction


def tc_inputs(case_id):
    i = CASES[case_id]["inputs"]
    return {
        "ph": i["ph_37"],
        "pco2": mmhg(i["paco2_37_mmHg"]),
        "po2": mmhg(i["pao2_37_mmHg"]),
        "temperature": q(i["patient_temp_C"], "degC"),
    }


def test_tc01_through_the_bridge():
    r = ok("temperature_correction", tc_inputs("TC-01"))
    o = r["outputs"]
    close("TC-01", "ph_T", o["ph"])  # rosenthal1948
    close("TC-01", "paco2_T_mmHg", o["pco2"])  # bradley1956, 0.019
    close("TC-01", "pao2_T_integrated_mmHg", o["po2"])  # severinghaus1979 eq 3 integrated
    close("TC-01", "pao2_T_single_step_mmHg", o["po2_single_step"])
    assert "alpha_stat_ph_stat" in codes(r)


def test_tc02_through_the_bridge():
    o = ok("temperature_correction", tc_inputs("TC-02"))["outputs"]
    close("TC-02", "ph_T", o["ph"])
    close("TC-02", "paco2_T_mmHg", o["pco2"])
    close("TC-02", "pao2_T_single_step_mmHg", o["po2_single_step"])


@pytest.mark.parametrize("case_id", ["TC-01", "TC-02"])
def test_temperature_there_and_back_through_the_bridge(case_id):
    there = ok("temperature_correction", tc_inputs(case_id))["outputs"]
    t = CASES[case_id]["inputs"]["patient_temp_C"]
    back = ok(
        "temperature_correction",
        {
            "ph": there["ph"],
            "pco2": there["pco2"],
            "po2": there["po2"],
            "temperature": q(t, "degC"),
            "direction": "to_37",
        },
    )["outputs"]
    i = CASES[case_id]["inputs"]
    assert back["ph_37"] == pytest.approx(i["ph_37"], abs=1e-9)
    assert val(back["pco2_37"]) == pytest.approx(i["paco2_37_mmHg"], rel=1e-9)
    assert val(back["po2_37"]) == pytest.approx(i["pao2_37_mmHg"], rel=1e-5)
    # the contract's outputs stay "at the patient's temperature" in the reverse direction
    assert back["ph"] == there["ph"]


def test_temperature_in_fahrenheit_and_implausible_celsius():
    o = ok("temperature_correction", {"ph": 7.3, "pco2": mmhg(45), "temperature": q(89.6, "degF")})["outputs"]
    close("TC-01", "ph_T", o["ph"])  # 89.6 degF = 32 degC
    errs = errors("temperature_correction", {"ph": 7.3, "pco2": mmhg(45), "temperature": q(98.6, "degC")})
    assert has_error(errs, "inputs.temperature", "implausible")


def test_temperature_correction_errors():
    errs = errors("temperature_correction", {"ph": 7.3, "pco2": mmhg(45), "direction": "backwards"})
    assert has_error(errs, "inputs.temperature", "missing") and has_error(
        errs, "inputs.direction", "bad_request"
    )


# ==================================================================================================
# ventilation


def vent(**inputs):
    return ok("ventilation", inputs)


def test_vn01_through_the_bridge():
    # alveolar_ventilation (0.863 derived); measured PaCO2 given as the value the settings predict
    o = vent(rr=12, vt=q(500, "mL"), vd=q(150, "mL"), vco2=q(200, "mL/min"), pco2=mmhg(41.09))["outputs"]
    close("VN-01", "ve_L_min", o["minute_ventilation"])
    close("VN-01", "va_L_min", o["alveolar_ventilation"])
    close("VN-01", "paco2_predicted_mmHg", o["pco2_predicted"])
    assert o["vco2_source"] == "measured" and o["vd_vt_method"] == "equation_measured_vco2"
    assert o["vd_vt"] == pytest.approx(0.3, abs=0.001)


def test_vn02_through_the_bridge():
    # tusman2012 (verified): Enghoff 0.50; EtCO2 35 -> alveolar dead-space fraction 0.30
    o = vent(rr=12, vt=q(500, "mL"), pco2=mmhg(50), peco2=mmhg(25), etco2=mmhg(35))["outputs"]
    close("VN-02", "vd_vt_enghoff", o["vd_vt"])
    assert o["vd_vt_method"] == "enghoff" and o["vco2_source"] == "expired_gas"
    r = vent(rr=12, vt=q(500, "mL"), pco2=mmhg(50), peco2=mmhg(25))
    assert any(st["output"] == "vd_vt" and "Enghoff" in st["label"] for st in r["steps"] if "output" in st)
    close("VN-02", "vdalv_fraction_from_petco2", o["alveolar_dead_space_fraction"])
    o = vent(rr=12, vt=q(500, "mL"), pco2=mmhg(50), peco2=mmhg(25), etco2=mmhg(40))["outputs"]
    close("VN-02", "vd_vt_bohr", o["vd_vt_bohr"])  # Bohr with PetCO2 as alveolar PCO2


def test_vn03_through_the_bridge():
    o = vent(rr=16, vt=q(500, "mL"), vd=q(150, "mL"), pco2=mmhg(60), target_pco2=mmhg(45))["outputs"]
    t = o["to_target"]
    close("VN-03", "ve_new_L_min", t["minute_ventilation"])
    close("VN-03", "rr_new_fixed_vt_min", t["rr_at_same_vt"])
    close("VN-03", "vt_new_fixed_rr_mL", t["vt_at_same_rr"])
    close("VN-03", "va_new_L_min", t["alveolar_ventilation"])
    close("VN-03", "va_now_L_min", o["alveolar_ventilation"])


def test_vn04_through_the_bridge():
    o = vent(rr=14, vt=q(450, "mL"), pco2=mmhg(40), height=q(175, "cm"), sex="male")["outputs"]
    close("VN-04", "pbw_male_kg", o["predicted_body_weight"])
    close("VN-04", "vt6_male_mL", o["vt_lung_protective"]["target"])
    close("VN-04", "vt8_male_mL", o["vt_lung_protective"]["high"])
    close("VN-04", "anatomic_vd_male_mL", o["anatomical_dead_space"])
    assert val(o["vt_per_kg_pbw"]) == pytest.approx(450 / 70.566, abs=0.01)
    o = vent(rr=14, vt=q(400, "mL"), pco2=mmhg(40), height=q(63, "in"), sex="female")["outputs"]
    assert val(o["predicted_body_weight"]) == pytest.approx(45.5 + 0.91 * (160.02 - 152.4), abs=0.01)


def test_vn05_through_the_bridge():
    o = vent(rr=20, vt=q(500, "mL"), pco2=mmhg(40), ie_ratio="1:2")["outputs"]
    close("VN-05", "te_s", o["expiratory_time"])
    close("VN-05", "ti_s", o["inspiratory_time"])
    o = vent(rr=12, vt=q(500, "mL"), pco2=mmhg(40), ie_ratio=3)["outputs"]
    close("VN-05", "te2_s", o["expiratory_time"])


def test_vn06_fever_through_the_bridge():
    # fever_vco2 (verified 10-13 %/degC), linear; no body size -> 200 mL/min (resting_vco2, from memory)
    o = vent(rr=12, vt=q(500, "mL"), pco2=mmhg(50), temperature=q(39.5, "degC"))["outputs"]
    close("VN-06", "vco2_10pct_mL_min", o["vco2"])
    close("VN-06", "vco2_13pct_mL_min", o["vco2_band"]["high"])
    assert o["vco2_source"] == "estimated"


def test_gas_trapping_warning_in_obstructive_disease():
    # expiratory_time (common practice): Te 2.0 s < 3 x 1.0 s assumed obstructive time constant
    r = vent(rr=20, vt=q(500, "mL"), pco2=mmhg(55), ie_ratio="1:2", obstructive=True)
    f = {x["code"]: x for x in r["findings"]}
    assert f["expiratory_time_short"]["severity"] == "urgent"
    assert any("auto-PEEP" in c for c in r["cautions"])
    r = vent(rr=20, vt=q(500, "mL"), pco2=mmhg(55), ie_ratio="1:2", expiratory_time_constant=q(0.4, "s"))
    assert "expiratory_time_short" not in codes(r)


def test_to_target_warnings_vt_and_expiratory_time():
    # VN-03 settings with PBW 52.4 kg (female 160 cm): VT 617 mL = 11.8 mL/kg > 8; RR 21.3 at I:E 1:2
    # gives Te 1.88 s, under 3 s for an obstructive patient
    r = vent(
        rr=16,
        vt=q(500, "mL"),
        vd=q(150, "mL"),
        pco2=mmhg(60),
        target_pco2=mmhg(45),
        height=q(160, "cm"),
        sex="female",
        obstructive=True,
    )
    assert {"target_vt_above_protective", "target_rr_short_expiration", "vt_above_protective"} <= codes(r)
    assert any("chronic hypercapnia" in c for c in r["cautions"])


def test_etco2_tracking():
    # etco2_gradient (common practice): gradient 10 mmHg kept -> 42 + 10 = 52
    r = vent(rr=12, vt=q(500, "mL"), pco2=mmhg(60), etco2=mmhg(50), etco2_now=mmhg(42))
    assert val(r["outputs"]["pco2_estimated_now"]) == pytest.approx(52.0)
    assert any("gradient" in c for c in r["cautions"])


@pytest.mark.parametrize(
    ("inputs", "field", "code"),
    [
        ({"vd": q(500, "mL")}, "inputs.vd", "inconsistent"),  # VD = VT
        ({"vd": q(0.6, "L")}, "inputs.vd", "inconsistent"),  # VD > VT, other unit
        ({"peco2": mmhg(60)}, "inputs.peco2", "inconsistent"),  # PECO2 >= PaCO2
        ({"etco2_now": mmhg(40)}, "inputs.etco2", "missing"),
        ({"ie_ratio": "1-2"}, "inputs.ie_ratio", "bad_request"),
        ({"sex": "male"}, "inputs.height", "missing"),
        ({"vt": q(5, "L")}, "inputs.vt", "out_of_range"),
        ({"rr": 0}, "inputs.rr", "out_of_range"),
        ({"vco2": q(2000, "mL/min")}, "inputs.vco2", "out_of_range"),
        ({"pco2": q(55, "kPa")}, "inputs.pco2", "implausible"),
        ({"tidal": 500}, "inputs.tidal", "unknown_input"),
    ],
)
def test_ventilation_errors(inputs, field, code):
    base = {"rr": 12, "vt": q(500, "mL"), "pco2": mmhg(55)}
    assert has_error(errors("ventilation", {**base, **inputs}), field, code)


def test_measured_vco2_that_cannot_be_cleared_is_an_error():
    # derived: VE 3 L/min at PaCO2 30 mmHg clears at most 104 mL/min of CO2
    errs = errors("ventilation", {"rr": 10, "vt": q(300, "mL"), "pco2": mmhg(30), "vco2": q(200, "mL/min")})
    assert has_error(errs, "inputs.vco2", "inconsistent")


def test_estimated_vco2_that_does_not_fit_is_said_not_hidden():
    r = vent(rr=10, vt=q(300, "mL"), pco2=mmhg(30))
    assert "vd_vt" not in r["outputs"] and "vco2_estimate_does_not_fit" in codes(r)


def test_more_ventilation_lowers_predicted_paco2_through_the_bridge():
    preds = [
        val(vent(rr=rr, vt=q(500, "mL"), vd=q(150, "mL"), pco2=mmhg(50))["outputs"]["pco2_predicted"])
        for rr in range(6, 40, 2)
    ]
    assert all(b < a for a, b in itertools.pairwise(preds))


# -- mechanisms through the bridge (co2_log_shares: derived from the alveolar ventilation equation) ---------
W = 70.0  # kg: reference VCO2 2.8 x 70 = 196 mL/min (jette1990_met, from memory: 3.5 mL O2/kg/min x R 0.8)
VCO2_REF = 3.5 * 0.8 * W
# K written from its definition, not the module's constant: 760 x 310.15 / 273.15 / 1000 (STPD -> BTPS;
# alveolar_ventilation, common practice: 0.863)
K_BTPS = 760.0 * 310.15 / 273.15 / 1000.0
VE_REF = K_BTPS * VCO2_REF / (40.0 * 0.7)


def hand_built(ve: float, d: float, vco2: float) -> dict:
    """A measured-VCO2 request whose PaCO2 is what ve, d and vco2 give (RR 10, VT = VE / 10)."""
    paco2 = K_BTPS * vco2 / (ve * (1.0 - d))
    return vent(rr=10, vt=q(ve * 100.0, "mL"), pco2=mmhg(paco2), vco2=q(vco2, "mL/min"), weight=q(W, "kg"))


@pytest.mark.parametrize(
    ("ve", "d", "vco2", "cause"),
    [
        (VE_REF / 2, 0.3, VCO2_REF, "ventilation"),
        (VE_REF, 0.65, VCO2_REF, "dead_space"),
        (VE_REF, 0.3, 1.5 * VCO2_REF, "co2_production"),
    ],
)
def test_hand_built_single_cause_through_the_bridge(ve, d, vco2, cause):
    r = hand_built(ve, d, vco2)
    shares = r["outputs"]["mechanisms"]
    assert shares[cause] == pytest.approx(1.0, abs=1e-6)
    assert sum(shares.values()) == pytest.approx(1.0)
    assert r["outputs"]["mechanisms_detail"]["sources"]["vco2"] == "measured"
    assert "hypercapnia_mechanisms" in codes(r)


def test_mechanisms_only_above_the_normal_range():
    # pco2_normal_range (verified): 35-45 mmHg; mechanisms are present only above 45
    for pco2, present in ((40, False), (45, False), (45.5, True), (70, True)):
        o = vent(rr=12, vt=q(500, "mL"), pco2=mmhg(pco2), weight=q(70, "kg"))["outputs"]
        assert ("mechanisms" in o) is present, pco2


def test_estimated_vco2_puts_the_rise_in_dead_space_and_says_so():
    # no VCO2 measured, afebrile: the CO2 term is 0 by construction; the finding names the consequence
    r = vent(rr=12, vt=q(450, "mL"), pco2=mmhg(65), weight=q(80, "kg"))
    m = r["outputs"]["mechanisms"]
    assert m["co2_production"] == 0.0 and sum(m.values()) == pytest.approx(1.0)
    assert "mechanisms_vco2_estimated" in codes(r)
    assert r["outputs"]["mechanisms_detail"]["sources"] == {
        "minute_ventilation": "measured",
        "vco2": "estimated",
        "vd_vt": "equation_estimated_vco2",
    }


def test_fever_gives_a_co2_production_share():
    r = vent(rr=12, vt=q(450, "mL"), pco2=mmhg(65), weight=q(80, "kg"), temperature=q(39.5, "degC"))
    m = r["outputs"]["mechanisms"]
    log_fever = math.log(1.25)  # derived: +10 %/degC x 2.5 degC
    assert r["outputs"]["mechanisms_detail"]["log_terms"]["co2_production"] == pytest.approx(log_fever)
    assert 0.0 < m["co2_production"] < 1.0 and sum(m.values()) == pytest.approx(1.0)


def test_residual_reported_when_all_measured_values_disagree():
    # VCO2 measured and PECO2 measured: VCO2 and VD/VT are both fixed, the mismatch is not shared out
    r = vent(rr=10, vt=q(400, "mL"), pco2=mmhg(70), peco2=mmhg(20), vco2=q(300, "mL/min"), weight=q(70, "kg"))
    detail = r["outputs"]["mechanisms_detail"]
    model = K_BTPS * 300 / (4.0 * (20 / 70))  # alveolar ventilation equation, Enghoff VD/VT 20/70
    assert detail["residual_log"] == pytest.approx(math.log(70 / model))
    assert "mechanisms_residual" in codes(r)
    assert sum(r["outputs"]["mechanisms"].values()) == pytest.approx(1.0)


def test_ventilation_in_kpa():
    o = ok(
        "ventilation",
        {"rr": 12, "vt": q(500, "mL"), "vd": q(150, "mL"), "pco2": q(8.0, "kPa")},
        pressure_unit="kPa",
    )["outputs"]
    assert o["pco2_predicted"]["unit"] == "kPa"
    assert o["mechanisms_detail"]["reference"]["pco2"]["value"] == pytest.approx(5.333, abs=0.001)


# ==================================================================================================
# robustness: any in-range request answers ok or with errors naming request fields, never internal_error

from hypothesis import HealthCheck, given, settings  # noqa: E402
from hypothesis import strategies as st  # noqa: E402

# what an in-range request may be refused for: the values' combination, never the request's shape
_INPUT_REFUSALS = {"out_of_range", "implausible", "inconsistent"}


def _answer_is_clean(calc: str, inputs: dict) -> None:
    r = json.loads(handle(json.dumps({"calc": calc, "inputs": inputs})))
    if r["ok"]:
        # an answer: outputs and the steps that explain them
        assert r["outputs"] and r["steps"], (calc, inputs)
        return
    assert r["errors"], (calc, inputs)
    for e in r["errors"]:
        assert e["code"] in _INPUT_REFUSALS, (calc, inputs, e)
        assert e["field"].startswith("inputs."), (calc, inputs, e)


def _maybe(strategy):
    return st.one_of(st.none(), strategy)


@settings(max_examples=300, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(
    rr=st.floats(4, 60),
    vt=st.floats(50, 2000),
    pco2=st.floats(8, 250),
    vd=_maybe(st.floats(10, 1000)),
    weight=_maybe(st.floats(20, 350)),
    height=_maybe(st.floats(120, 230)),
    vco2=_maybe(st.floats(50, 1000)),
    temperature=_maybe(st.floats(25, 43)),
    etco2=_maybe(st.floats(1, 200)),
    peco2=_maybe(st.floats(0.5, 200)),
    target=_maybe(st.floats(20, 120)),
    etco2_now=_maybe(st.floats(1, 200)),
    obstructive=st.booleans(),
)
def test_ventilation_never_fails_internally(
    rr, vt, pco2, vd, weight, height, vco2, temperature, etco2, peco2, target, etco2_now, obstructive
):
    inputs = {"rr": rr, "vt": q(vt, "mL"), "pco2": mmhg(pco2), "obstructive": obstructive, "ie_ratio": "1:2"}
    for key, value, unit in (
        ("vd", vd, "mL"),
        ("weight", weight, "kg"),
        ("height", height, "cm"),
        ("vco2", vco2, "mL/min"),
        ("temperature", temperature, "degC"),
        ("etco2", etco2, "mmHg"),
        ("peco2", peco2, "mmHg"),
        ("target_pco2", target, "mmHg"),
    ):
        if value is not None:
            inputs[key] = q(value, unit)
    if height is not None:
        inputs["sex"] = "female"
    if etco2 is not None and etco2_now is not None:
        inputs["etco2_now"] = mmhg(etco2_now)
    _answer_is_clean("ventilation", inputs)
    r = handle_obj({"calc": "ventilation", "inputs": inputs})
    if r["ok"] and "mechanisms" in r["outputs"]:
        assert sum(r["outputs"]["mechanisms"].values()) == pytest.approx(1.0)


@settings(max_examples=200, deadline=None)
@given(
    fio2=st.floats(0.21, 1.0),
    pco2=st.floats(8, 250),
    po2=_maybe(st.floats(5, 800)),
    altitude=_maybe(st.floats(-500, 11000)),
    age=_maybe(st.floats(0, 120)),
    temperature=_maybe(st.floats(25, 43)),
    spo2=_maybe(st.floats(20, 100)),
)
def test_alveolar_gas_never_fails_internally(fio2, pco2, po2, altitude, age, temperature, spo2):
    inputs = {"fio2": fio2, "pco2": mmhg(pco2), "age": age, "spo2": spo2}
    if po2 is not None:
        inputs["po2"] = mmhg(po2)
    if altitude is not None:
        inputs["altitude"] = q(altitude, "m")
    if temperature is not None:
        inputs["temperature"] = q(temperature, "degC")
    _answer_is_clean("alveolar_gas", inputs)


@settings(max_examples=200, deadline=None)
@given(
    hb=st.floats(1, 25),
    spo2=_maybe(st.floats(20, 100)),
    po2=st.floats(5, 800),
    ph=_maybe(st.floats(6.5, 8.0)),
    pco2=_maybe(st.floats(8, 250)),
    be=_maybe(st.floats(-40, 40)),
    temperature=_maybe(st.floats(15, 43)),
)
def test_content_and_curve_never_fail_internally(hb, spo2, po2, ph, pco2, be, temperature):
    common = {"ph": ph}
    if pco2 is not None:
        common["pco2"] = mmhg(pco2)
    if be is not None:
        common["base_excess"] = q(be, "mmol/L")
    _answer_is_clean("oxygen_content", {"hb": q(hb, "g/dL"), "spo2": spo2, "po2": mmhg(po2), **common})
    curve = {"po2": mmhg(po2), **common}
    if temperature is not None:
        curve["temperature"] = q(temperature, "degC")
    _answer_is_clean("oxygen_dissociation_curve", curve)
    _answer_is_clean(
        "temperature_correction",
        {
            "ph": 7.4 if ph is None else ph,
            "pco2": mmhg(40 if pco2 is None else pco2),
            "po2": mmhg(po2),
            "temperature": q(15 if temperature is None else temperature, "degC"),
            "direction": "to_37",
        },
    )
