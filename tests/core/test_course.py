"""The course calculation (serial gases of one patient) through tidewell.bridge.handle_obj.

Each rule of docs/course.md on invented series, on both sides of every threshold: the reference change of pH
(0.03) and of PCO2 (8 %), 60 minutes and 4 hours on NIV, 7.35 and 7.45. Expected values are computed here from
the sources' formulas (the reference change value, the rate as change per hour, minutes between date-times),
never from calculations.course. What a single gas reads as (disorders, PaCO2 aim, SpO2 target) belongs to the
blood_gas calculation: here it is checked that the course copies that reading, and a threshold that rests on
the aim is set from the aim the blood_gas calculation gives for that gas.

Provenance beside each check: *published*, *derived* (computed from the cited equation), *common practice*,
*from memory*. Sources are keys of tidewell.references.
"""

from __future__ import annotations

import json
import math

import pytest

from tidewell.bridge import handle, handle_obj
from tidewell.calculations import course as course_module
from tidewell.references import REFERENCES

# reference_change_value (Fraser, from memory): RCV = 1.96 x sqrt(2) x SD; analyser_imprecision (common
# practice): pH SD 0.01, PCO2 CV 3 %. Derived: 0.0277 -> 0.03 pH; 8.3 % -> 8 % PCO2.
RCV_PH = 1.96 * math.sqrt(2) * 0.01
RCV_PCO2 = 1.96 * math.sqrt(2) * 0.03
PH_STEP = round(RCV_PH, 2)  # 0.03
PCO2_STEP = math.floor(RCV_PCO2 * 100) / 100  # 0.08
#: bipm2019: 1 mmHg = 133.322387415 Pa (defined), so 1 kPa = 1000 / 133.322387415 mmHg
MMHG_PER_KPA = 1000 / 133.322387415


def mmhg(x: float) -> dict:
    return {"value": x, "unit": "mmHg"}


def gas(time, ph, pco2_mmhg, events=(), **more) -> dict:
    sample = {"time": time, "inputs": {"ph": ph, "pco2": mmhg(pco2_mmhg), **more}}
    if events:
        sample["events"] = list(events)
    return sample


def run(samples, unit: str = "mmHg", **patient) -> dict:
    return handle_obj(
        {"calc": "course", "inputs": {"samples": samples, **patient}, "options": {"pressure_unit": unit}}
    )


def ok(samples, unit: str = "mmHg", **patient) -> dict:
    response = run(samples, unit, **patient)
    assert response["ok"], response.get("errors")
    return response


def one_gas(inputs: dict, unit: str = "mmHg") -> dict:
    response = handle_obj({"calc": "blood_gas", "inputs": inputs, "options": {"pressure_unit": unit}})
    assert response["ok"], response.get("errors")
    return response["outputs"]


def codes(response: dict) -> dict[str, str]:
    return {f["code"]: f["severity"] for f in response["findings"]}


def errors(response: dict) -> set[tuple[str, str]]:
    assert response["ok"] is False
    return {(e["field"], e["code"]) for e in response["errors"]}


# -- the reference change ------------------------------------------------------------------------------------


def test_reference_change_values_follow_the_formula():
    # reference_change_value (from memory) on analyser_imprecision (common practice): derived
    assert PH_STEP == 0.03 and course_module.PH_CHANGE == PH_STEP
    assert RCV_PCO2 == pytest.approx(0.083, abs=0.001) and course_module.PCO2_CHANGE == PCO2_STEP
    for key in ("reference_change_value", "analyser_imprecision", "bts_ics2016_niv_monitoring", "austin2010"):
        assert key in REFERENCES


# -- readings: each gas is its own blood_gas reading ---------------------------------------------------------


SERIES = [
    gas(0, 7.31, 66, hco3={"value": 32, "unit": "mmol/L"}, po2=mmhg(55), fio2=0.28),
    gas(50, 7.25, 75, ["niv_started"], hco3={"value": 32.2, "unit": "mmol/L"}),
    gas(140, 7.33, 62, sample="capillary"),
    gas(200, 7.38, 58, sample="venous"),
]


@pytest.mark.parametrize("unit", ["mmHg", "kPa"])
def test_each_reading_copies_the_blood_gas_reading_of_that_gas(unit):
    # one implementation of the rules: the course's reading of a gas is the blood_gas calculation's
    response = ok(SERIES, unit, hypercapnia_risk=True)
    for reading in response["outputs"]["readings"]:
        sample = SERIES[reading["index"]]
        # gases taken on NIV after a respiratory acidosis carry that history (docs/course.md)
        history = {"previous_hypercapnic_failure": True} if reading["on_niv"] else {}
        alone = one_gas({**sample["inputs"], "hypercapnia_risk": True, **history}, unit)
        for name in ("ph_status", "disorders", "hco3", "pco2_target", "spo2_target", "interpretation"):
            assert reading.get(name) == alone.get(name), name
        assert reading["ph"] == sample["inputs"]["ph"]
        expected = sample["inputs"]["pco2"]["value"] / (MMHG_PER_KPA if unit == "kPa" else 1.0)
        assert reading["pco2"] == {"value": pytest.approx(expected, rel=1e-9), "unit": unit}


def test_patient_level_inputs_apply_unless_the_gas_gives_its_own():
    samples = [gas(0, 7.30, 70), {**gas(60, 7.33, 64), "inputs": {**gas(60, 7.33, 64)["inputs"], "age": 40}}]
    response = ok(samples, age=80, baseline_pco2=mmhg(60))
    readings = response["outputs"]["readings"]
    assert (
        readings[0]["disorders"]
        == one_gas({**samples[0]["inputs"], "age": 80, "baseline_pco2": mmhg(60)})["disorders"]
    )
    own = one_gas({**samples[1]["inputs"], "baseline_pco2": mmhg(60)})
    assert readings[1]["pco2_target"] == own.get("pco2_target")
    # a gas's own flag wins over the patient's
    samples = [gas(0, 7.30, 70, hypercapnia_risk=False), gas(60, 7.33, 64)]
    readings = ok(samples, hypercapnia_risk=True)["outputs"]["readings"]
    assert readings[0]["spo2_target"] == one_gas({**samples[0]["inputs"]})["spo2_target"]
    assert (
        readings[1]["spo2_target"]
        == one_gas({**samples[1]["inputs"], "hypercapnia_risk": True})["spo2_target"]
    )


def test_previous_hypercapnic_failure_is_passed_on_when_the_single_gas_reading_takes_it():
    samples = [gas(0, 7.30, 70), gas(60, 7.33, 64)]
    response = ok(samples, previous_hypercapnic_failure=True)
    if "previous_hypercapnic_failure" in course_module.blood_gas_keys():
        for reading in response["outputs"]["readings"]:
            alone = one_gas({**samples[reading["index"]]["inputs"], "previous_hypercapnic_failure": True})
            assert reading["spo2_target"] == alone["spo2_target"]
        assert not any("previous_hypercapnic_failure" in c for c in response["cautions"])
    else:  # recorded and checked, and the response says it was not used (never assumed silently)
        assert any(
            "previous_hypercapnic_failure" in c and "does not use it" in c for c in response["cautions"]
        )
    assert ("inputs.previous_hypercapnic_failure", "bad_request") in errors(
        run(samples, previous_hypercapnic_failure="yes")
    )


def test_samples_are_read_in_time_order_with_minutes_from_the_earliest():
    samples = [gas(130, 7.33, 60), gas(-20, 7.28, 70), gas(45, 7.30, 66)]
    readings = ok(samples)["outputs"]["readings"]
    assert [r["index"] for r in readings] == [1, 2, 0]
    assert [r["minutes"] for r in readings] == [0, 65, 150]  # derived: time - earliest time


@pytest.mark.parametrize(
    ("times", "minutes"),
    [
        (["2026-12-04T23:30", "2026-12-05T01:10"], 100),  # across midnight
        (["2026-12-04 03:10:30", "2026-12-04 03:40:30"], 30),  # a space for T, with seconds
        (["2026-12-04T03:10+01:00", "2026-12-04T02:40Z"], 30),  # offsets: 02:10 UTC and 02:40 UTC
        (["2026-12-04T03:10-0500", "2026-12-04T09:10+01:00"], 0.5 * 0 + 0),  # the same moment: refused
    ],
)
def test_date_times_give_minutes_between(times, minutes):
    samples = [gas(times[0], 7.30, 70), gas(times[1], 7.34, 62)]
    if minutes == 0:
        assert errors(run(samples)) == {("inputs.samples[1].time", "inconsistent")}
        return
    assert ok(samples)["outputs"]["readings"][1]["minutes"] == pytest.approx(minutes)


# -- intervals -----------------------------------------------------------------------------------------------


@pytest.mark.parametrize(
    ("ph_before", "ph_after", "expected"),
    [
        # distance from 7.35-7.45 shrinking or growing by the reference change, 0.03 (derived)
        (7.25, 7.28, "improving"),
        (7.25, 7.27, "unchanged"),
        (7.30, 7.27, "worsening"),
        (7.30, 7.28, "unchanged"),
        (7.44, 7.48, "worsening"),  # into alkalaemia: 0 -> 0.03
        (7.44, 7.47, "unchanged"),
        (7.50, 7.47, "improving"),
        (7.38, 7.42, "unchanged"),  # inside the normal range: no distance
        (
            7.33,
            7.47,
            "unchanged",
        ),  # 0.02 below to 0.02 above: the same distance (pco2_falling_fast covers it)
    ],
)
def test_direction_at_the_reference_change(ph_before, ph_after, expected):
    # PCO2 chosen so that each pair is a plausible triple (HCO3 computed by the blood_gas reading)
    response = ok([gas(0, ph_before, 60), gas(60, ph_after, 58)])
    assert response["outputs"]["intervals"][0]["direction"] == expected


@pytest.mark.parametrize(
    ("before", "after", "trend"),
    [
        (60.0, 60.0 * (1 + PCO2_STEP), "rising"),  # exactly +8 %
        (60.0, 60.0 * (1 + PCO2_STEP) - 0.1, "unchanged"),
        (60.0, 60.0 * (1 - PCO2_STEP), "falling"),
        (60.0, 60.0 * (1 - PCO2_STEP) + 0.1, "unchanged"),
    ],
)
def test_pco2_trend_at_eight_percent(before, after, trend):
    response = ok([gas(0, 7.32, before), gas(60, 7.32, after)])
    assert response["outputs"]["intervals"][0]["pco2_trend"] == trend


def test_pco2_trend_at_eight_percent_through_kpa():
    # 8.0 kPa to 8.64 kPa is exactly +8 % once converted (bipm2019 factor): the rounding keeps it a change
    samples = [
        {"time": 0, "inputs": {"ph": 7.30, "pco2": {"value": 8.0, "unit": "kPa"}}},
        {"time": 30, "inputs": {"ph": 7.30, "pco2": {"value": 8.64, "unit": "kPa"}}},
    ]
    assert ok(samples, "kPa")["outputs"]["intervals"][0]["pco2_trend"] == "rising"


@pytest.mark.parametrize("unit", ["mmHg", "kPa"])
def test_changes_and_rate_per_hour(unit):
    # derived: rate = (PCO2 later - PCO2 earlier) / hours between (tidewell_course_conventions)
    samples = [gas(0, 7.26, 80, hco3={"value": 34.6, "unit": "mmol/L"}), gas(90, 7.31, 71)]
    interval = ok(samples, unit)["outputs"]["intervals"][0]
    factor = MMHG_PER_KPA if unit == "kPa" else 1.0
    assert interval["minutes"] == 90
    assert interval["ph_change"] == pytest.approx(0.05)
    assert interval["pco2_change"] == {"value": pytest.approx(-9 / factor), "unit": unit}
    assert interval["pco2_rate"] == {"value": pytest.approx(-9 / 1.5 / factor), "unit": f"{unit}/h"}
    later_hco3 = 0.0307 * 71 * 10 ** (7.31 - 6.1)  # henderson1908 (S 0.0307, pK 6.1): HCO3 of the later gas
    assert interval["hco3_change"]["value"] == pytest.approx(later_hco3 - 34.6, abs=1e-6)


def test_venous_gases_are_compared_only_with_venous_gases():
    # sample_site_caveats: venous PCO2 runs higher and pH lower than arterial, with wide limits
    samples = [
        gas(0, 7.28, 72),
        gas(20, 7.26, 80, sample="venous"),
        gas(60, 7.31, 66, sample="capillary"),
        gas(90, 7.30, 70, sample="venous"),
    ]
    response = ok(samples)
    pairs = [(i["earlier"], i["later"]) for i in response["outputs"]["intervals"]]
    assert pairs == [(0, 2), (1, 3)]
    assert any("not compared" in c for c in response["cautions"])


# -- response ------------------------------------------------------------------------------------------------


@pytest.mark.parametrize(
    ("phs", "expected"),
    [
        ([7.25, 7.28], "improving"),  # rose by 0.03
        ([7.25, 7.27], "not_improving"),
        ([7.33, 7.35], "improving"),  # reached 7.35 (rise 0.02)
        ([7.33, 7.34], "not_improving"),
        ([7.25, 7.22], "worsening"),  # fell by 0.03
        ([7.25, 7.23], "not_improving"),
        ([7.20, 7.30, 7.26], "worsening"),  # overall up 0.06, but the latest interval worsened
        ([7.20, 7.30, 7.28], "improving"),  # latest interval unchanged (0.02)
        ([7.40, 7.33, 7.36], "improving"),  # from the first acidaemic gas, not the first gas
    ],
)
def test_response_from_the_first_acidaemic_gas(phs, expected):
    samples = [gas(30 * k, ph, 62) for k, ph in enumerate(phs)]
    outputs = ok(samples)["outputs"]
    assert outputs["response"] == expected
    first = next(k for k, ph in enumerate(phs) if ph < 7.35)
    assert outputs["response_span"]["earlier"] == first
    assert outputs["response_span"]["ph_change"] == pytest.approx(phs[-1] - phs[first])


def test_no_response_without_an_acidaemic_gas_or_a_later_comparable_one():
    assert "response" not in ok([gas(0, 7.36, 50), gas(30, 7.40, 46)])["outputs"]
    assert "response" not in ok([gas(0, 7.36, 50), gas(30, 7.30, 60)])["outputs"]
    # the acidaemic gas is venous; the later one arterial: nothing comparable follows
    assert "response" not in ok([gas(0, 7.30, 70, sample="venous"), gas(30, 7.36, 55)])["outputs"]


# -- NIV -----------------------------------------------------------------------------------------------------


def niv_course(minutes: float, ph_start: float, ph_end: float, *, stopped: bool = False) -> dict:
    end_events = ["niv_stopped"] if stopped else []
    return ok(
        [gas(0, ph_start, 75, ["niv_started"]), gas(minutes, ph_end, 74, end_events)],
        hypercapnia_risk=True,
    )


@pytest.mark.parametrize(
    ("minutes", "ph_end", "severity"),
    [
        # BTS/ICS 2016 (intervals from memory): from 60 min, pH < 7.35 not 0.03 above the start
        (59, 7.25, None),
        (60, 7.25, "notable"),
        (239, 7.25, "notable"),
        (240, 7.25, "urgent"),
        (120, 7.27, "notable"),  # rose 0.02
        (120, 7.28, None),  # rose 0.03
        (300, 7.28, None),
        (30, 7.22, "urgent"),  # fell 0.03: urgent at any time
        (30, 7.23, None),  # fell 0.02, under an hour
        (90, 7.23, "notable"),
    ],
)
def test_niv_not_improving_thresholds(minutes, ph_end, severity):
    response = niv_course(minutes, 7.25, ph_end)
    assert codes(response).get("niv_not_improving") == severity
    niv = response["outputs"]["niv_response"]
    assert niv["minutes_on_niv"] == minutes and niv["ph_change"] == pytest.approx(ph_end - 7.25)


def test_niv_not_improving_needs_a_ph_below_735():
    # pH 7.33 -> 7.35 after 2 h: rise 0.02 but no longer acidaemic
    assert "niv_not_improving" not in codes(niv_course(120, 7.33, 7.35))
    assert codes(niv_course(120, 7.33, 7.34)).get("niv_not_improving") == "notable"


def test_niv_response_ends_at_the_gas_after_which_niv_stopped():
    samples = [
        gas(0, 7.26, 76, ["niv_started"]),
        gas(90, 7.31, 68, ["niv_stopped"]),
        gas(200, 7.24, 78),
    ]
    outputs = ok(samples)["outputs"]
    niv = outputs["niv_response"]
    assert (niv["earlier"], niv["later"], niv["minutes_on_niv"], niv["running"]) == (0, 1, 90, False)
    assert niv["verdict"] == "improving"
    assert niv["pco2_change"]["value"] == pytest.approx(-8)
    # NIV no longer running: no NIV finding, whatever the later gas shows
    assert "niv_not_improving" not in codes(ok(samples))
    assert outputs["response"] == "worsening"  # 7.26 -> 7.24 (latest interval 7.31 -> 7.24 worsened)


def test_niv_verdicts():
    assert niv_course(120, 7.25, 7.30)["outputs"]["niv_response"]["verdict"] == "improving"
    assert niv_course(120, 7.25, 7.26)["outputs"]["niv_response"]["verdict"] == "not_improving"
    assert niv_course(120, 7.25, 7.21)["outputs"]["niv_response"]["verdict"] == "worsening"
    assert "niv_response" not in ok([gas(0, 7.30, 70), gas(60, 7.25, 75, ["niv_started"])])["outputs"]


# -- oxygen-induced hypercapnia ------------------------------------------------------------------------------


@pytest.mark.parametrize(
    ("pco2_after", "ph_after", "severity"),
    [
        # Austin 2010; BTS 2017: PCO2 up >= 8 % and pH down >= 0.03 after oxygen was increased
        (60 * (1 + PCO2_STEP), 7.31, "urgent"),
        (60 * (1 + PCO2_STEP) - 0.1, 7.31, None),  # PCO2 up just under 8 %
        (70, 7.32, None),  # pH down only 0.02
        (70, 7.20, "urgent"),
    ],
)
def test_pco2_rising_after_oxygen(pco2_after, ph_after, severity):
    samples = [gas(0, 7.34, 60, ["oxygen_increased"]), gas(45, ph_after, pco2_after)]
    assert codes(ok(samples, hypercapnia_risk=True)).get("pco2_rising_after_oxygen") == severity


def test_pco2_rising_after_oxygen_is_notable_when_the_ph_stays_normal():
    samples = [gas(0, 7.44, 45, ["oxygen_increased"]), gas(40, 7.40, 50)]
    assert codes(ok(samples)).get("pco2_rising_after_oxygen") == "notable"


def test_pco2_rising_after_oxygen_needs_oxygen_alone_and_comparable_gases():
    rise = [gas(0, 7.34, 60, ["oxygen_increased", "niv_started"]), gas(45, 7.28, 70)]
    assert "pco2_rising_after_oxygen" not in codes(ok(rise))
    venous_next = [gas(0, 7.34, 60, ["oxygen_increased"]), gas(45, 7.28, 75, sample="venous")]
    assert "pco2_rising_after_oxygen" not in codes(ok(venous_next))
    decreased = [gas(0, 7.34, 60, ["oxygen_decreased"]), gas(45, 7.28, 70)]
    assert "pco2_rising_after_oxygen" not in codes(ok(decreased))


# -- post-hypercapnic alkalosis ------------------------------------------------------------------------------


RETAINER = {"ph": 7.28, "pco2": mmhg(72), "hco3": {"value": 33, "unit": "mmol/L"}}


def aim_of(inputs: dict) -> float:
    """The PaCO2 aim (mmHg) the blood_gas calculation gives for this gas: the rule set belongs to it."""
    return one_gas(inputs)["pco2_target"]["value"]


@pytest.mark.parametrize(("fraction", "fires"), [(1 - PCO2_STEP, True), (1 - PCO2_STEP + 0.005, False)])
def test_pco2_falling_fast_at_eight_percent_below_the_aim(fraction, fires):
    aim = aim_of({**RETAINER, "hypercapnia_risk": True})
    later = gas(180, 7.42, aim * fraction)
    response = ok([{"time": 0, "inputs": RETAINER}, later], hypercapnia_risk=True)
    assert ("pco2_falling_fast" in codes(response)) is fires
    if fires:
        assert codes(response)["pco2_falling_fast"] == "notable"  # pH 7.42: not alkalaemic


def p735(pco2: float, ph: float) -> float:
    """henderson1908 with the HCO3 held: the PCO2 that gives pH 7.35 is PCO2 x 10^(pH - 7.35) (derived)."""
    return pco2 * 10 ** (ph - 7.35)


@pytest.mark.parametrize(("ph", "fires"), [(7.42, True), (7.41, False), (7.40, False)])
def test_pco2_falling_fast_below_the_aim_needs_a_ph_of_742(ph, fires):
    # posthypercapnic_alkalosis (common practice): below 7.42 the pH has little room left above 7.35; the
    # kidneys are already shedding the retained HCO3, and easing towards the old aim would acidify the blood
    aim = aim_of({**RETAINER, "hypercapnia_risk": True})
    later = gas(240, ph, aim * 0.75)
    response = ok([{"time": 0, "inputs": RETAINER}, later], hypercapnia_risk=True)
    assert ("pco2_falling_fast" in codes(response)) is fires


def test_a_normal_ph_with_the_hco3_falling_is_not_eased_towards_a_stale_aim():
    # an invented course: NIV from pH 7.27, PCO2 9.5 kPa, HCO3 32; at 4 h pH 7.40, PCO2 6.0 kPa, HCO3 28.
    # Letting the PCO2 rise to the first gas's aim with today's HCO3 would give (henderson1908, derived):
    first = {"ph": 7.27, "pco2": {"value": 9.5, "unit": "kPa"}, "hco3": {"value": 32, "unit": "mmol/L"}}
    later = {"ph": 7.40, "pco2": {"value": 6.0, "unit": "kPa"}, "hco3": {"value": 28, "unit": "mmol/L"}}
    aim_kpa = one_gas({**first, "hypercapnia_risk": True}, "kPa")["pco2_target"]["value"]
    ph_at_old_aim = 6.1 + math.log10(28 / (0.0307 * aim_kpa * MMHG_PER_KPA))
    assert ph_at_old_aim < 7.30  # acidaemic again
    samples = [{"time": 0, "inputs": first, "events": ["niv_started"]}, {"time": 240, "inputs": later}]
    response = ok(samples, "kPa", hypercapnia_risk=True)
    assert "pco2_falling_fast" not in codes(response)
    assert not any("ease ventilation" in s for s in response["summary"])


def test_easing_goes_no_higher_than_the_pco2_of_ph_735_today():
    # the earlier aim above P(7.35) of the latest gas: the text names P(7.35) as the goal
    aim = aim_of({**RETAINER, "hypercapnia_risk": True})
    ph, pco2, hco3 = 7.47, 44.0, 0.0307 * 44.0 * 10 ** (7.47 - 6.1)  # henderson1908
    assert p735(pco2, ph) < aim and hco3 > 26
    samples = [{"time": 0, "inputs": RETAINER}, gas(300, ph, pco2)]
    response = ok(samples, hypercapnia_risk=True)
    (text,) = [f["text"] for f in response["findings"] if f["code"] == "pco2_falling_fast"]
    assert f"towards {p735(pco2, ph):.0f} mmHg, the PCO2 that would give pH 7.35" in text
    # the earlier aim below P(7.35): eased towards the aim itself
    ph, pco2 = 7.50, aim * 0.85
    assert aim < p735(pco2, ph)
    response = ok([{"time": 0, "inputs": RETAINER}, gas(300, ph, pco2)], hypercapnia_risk=True)
    (text,) = [f["text"] for f in response["findings"] if f["code"] == "pco2_falling_fast"]
    assert f"towards the aim of {aim:.0f} mmHg" in text


def test_a_venous_falling_fast_finding_names_no_aim():
    # venous_gas (from memory): a venous gas gives no PaCO2 aim; its alkalaemia is real (arterial pH higher)
    samples = [gas(0, 7.26, 82, ["niv_started"], sample="venous"), gas(180, 7.49, 47, sample="venous")]
    response = ok(samples, hypercapnia_risk=True)
    assert codes(response)["pco2_falling_fast"] == "urgent"
    (text,) = [f["text"] for f in response["findings"] if f["code"] == "pco2_falling_fast"]
    assert "towards" not in text and "no PaCO2 aim" in text and "arterial or earlobe" in text


@pytest.mark.parametrize("unit", ["mmHg", "kPa"])
def test_the_aim_band_ends_where_pco2_falling_fast_begins(unit):
    # The band a screen draws under each gas's aim: from the aim (the blood_gas reading's own) down to the
    # PCO2 reference change below it (reference_change_value, derived: 8 %), the edge that the test above
    # finds pco2_falling_fast firing at. pH range 7.35-7.45: the normal range the directions are judged by
    # (common practice).
    aim = aim_of({**RETAINER, "hypercapnia_risk": True})
    response = ok([{"time": 0, "inputs": RETAINER}, gas(60, 7.30, 70)], unit, hypercapnia_risk=True)
    factor = 1 if unit == "mmHg" else 1 / MMHG_PER_KPA
    band = response["outputs"]["readings"][0]["pco2_aim_band"]
    assert band["high"] == response["outputs"]["readings"][0]["pco2_target"]
    assert math.isclose(band["high"]["value"], aim * factor, rel_tol=1e-9)
    assert math.isclose(band["low"]["value"], aim * (1 - PCO2_STEP) * factor, rel_tol=1e-9)
    assert band["low"]["unit"] == unit
    assert response["outputs"]["ph_range"] == {"low": 7.35, "high": 7.45}
    decimals = 1 if unit == "kPa" else 0  # every pressure of the unit (kPa to one decimal, mmHg whole)
    display = response["display"]
    assert display["readings.ph"] == 2 and display["readings.hco3"] == 1
    assert display["readings.pco2"] == display["intervals.pco2_rate"] == decimals


@pytest.mark.parametrize(("ph", "severity"), [(7.46, "urgent"), (7.45, None)])
def test_pco2_falling_fast_when_alkalaemic_with_a_high_hco3(ph, severity):
    aim = aim_of({**RETAINER, "hypercapnia_risk": True})
    pco2 = aim * 0.97  # above the 8 % band below the aim, below the earlier PCO2
    hco3 = 0.0307 * pco2 * 10 ** (ph - 6.1)  # henderson1908: above 26 mmol/L here
    assert hco3 > 26
    response = ok([{"time": 0, "inputs": RETAINER}, gas(240, ph, pco2)], hypercapnia_risk=True)
    assert codes(response).get("pco2_falling_fast") == severity


def test_pco2_falling_fast_needs_a_retainer():
    # an acute respiratory acidosis in a patient with no risk and no baseline: its fall is the aim, not a risk
    acute = {"ph": 7.20, "pco2": mmhg(60)}
    reading = one_gas(acute)
    assert reading["disorders"][0]["chronicity"] == "acute"
    response = ok([{"time": 0, "inputs": acute}, gas(120, 7.40, 38)])
    assert "pco2_falling_fast" not in codes(response)
    # the same fall with a known usual PaCO2 is judged
    response = ok([{"time": 0, "inputs": acute}, gas(120, 7.43, 30)], baseline_pco2=mmhg(58))
    aim = one_gas({**acute, "baseline_pco2": mmhg(58)})["pco2_target"]["value"]
    assert ("pco2_falling_fast" in codes(response)) is (30 <= aim * (1 - PCO2_STEP))


def test_a_resolved_overcorrection_is_not_raised_again():
    aim = aim_of({**RETAINER, "hypercapnia_risk": True})
    samples = [{"time": 0, "inputs": RETAINER}, gas(120, 7.40, aim * 0.85), gas(240, 7.36, aim)]
    assert "pco2_falling_fast" not in codes(ok(samples, hypercapnia_risk=True))


# -- three invented courses ----------------------------------------------------------------------------------


def test_invented_course_oxygen_induced_rise():
    # high-flow oxygen raised on arrival, PCO2 up and pH down at 50 min (Austin 2010), oxygen titrated down
    samples = [
        gas(0, 7.36, 56, ["oxygen_increased"], hco3={"value": 30.5, "unit": "mmol/L"}),
        gas(50, 7.27, 71, ["oxygen_decreased"], hco3={"value": 31.5, "unit": "mmol/L"}),
        gas(110, 7.31, 64),
    ]
    response = ok(samples, hypercapnia_risk=True)
    # the next gas after the rise is no longer the latest, and the latest shows the pH recovering: history
    assert codes(response)["pco2_rising_after_oxygen"] == "notable"
    # the latest gas, pH 7.31 with 64 mmHg (8.5 kPa), meets the NIV threshold (bts_ics2016)
    assert codes(response)["latest_gas_meets_niv_threshold"] == "urgent"
    outputs = response["outputs"]
    assert outputs["intervals"][0]["pco2_rate"]["value"] == pytest.approx(15 / (50 / 60))  # derived
    assert outputs["intervals"][0]["direction"] == "worsening"
    assert outputs["response"] == "improving"  # from 7.27 (the first acidaemic gas) to 7.31: rose 0.04


def test_invented_course_niv_working():
    samples = [
        gas(0, 7.24, 80, ["niv_started"], hco3={"value": 33, "unit": "mmol/L"}),
        gas(90, 7.30, 69),
        gas(300, 7.36, 60),
    ]
    response = ok(samples, hypercapnia_risk=True)
    outputs = response["outputs"]
    assert outputs["response"] == "improving" and outputs["niv_response"]["verdict"] == "improving"
    assert [i["direction"] for i in outputs["intervals"]] == ["improving", "improving"]
    assert "niv_not_improving" not in codes(response)


def test_invented_course_niv_failing():
    samples = [
        gas(0, 7.26, 78, ["niv_started"], hco3={"value": 33, "unit": "mmol/L"}),
        gas(80, 7.27, 77, ["niv_changed"]),
        gas(270, 7.25, 81),
    ]
    response = ok(samples, hypercapnia_risk=True)
    assert codes(response)["niv_not_improving"] == "urgent"  # 4 h 30 min on NIV, pH not improved
    assert response["outputs"]["niv_response"]["verdict"] == "not_improving"


# -- bad input: an error naming the sample, never an exception -----------------------------------------------


GOOD = [gas(0, 7.30, 70), gas(60, 7.33, 64)]


@pytest.mark.parametrize(
    ("samples", "expected"),
    [
        (None, ("inputs.samples", "missing")),
        ("x", ("inputs.samples", "bad_request")),
        ([gas(0, 7.30, 70)], ("inputs.samples", "out_of_range")),
        ([gas(k, 7.30, 70) for k in range(51)], ("inputs.samples", "out_of_range")),
        ([GOOD[0], {"inputs": GOOD[1]["inputs"]}], ("inputs.samples[1].time", "missing")),
        ([GOOD[0], {"time": 60, "inputs": {"pco2": mmhg(64)}}], ("inputs.samples[1].inputs.ph", "missing")),
        ([{"time": 0, "inputs": {"ph": 7.3}}, GOOD[1]], ("inputs.samples[0].inputs.pco2", "missing")),
        ([GOOD[0], {"time": 60}], ("inputs.samples[1].inputs", "missing")),
        ([GOOD[0], GOOD[1], gas(0, 7.31, 66)], ("inputs.samples[2].time", "inconsistent")),
        ([GOOD[0], gas("2026-12-04T03:10", 7.31, 66)], ("inputs.samples[1].time", "inconsistent")),
        (
            [gas("2026-12-04T03:10Z", 7.3, 70), gas("2026-12-04T04:10", 7.31, 66)],
            ("inputs.samples[1].time", "inconsistent"),
        ),
        ([GOOD[0], gas("03:10", 7.31, 66)], ("inputs.samples[1].time", "bad_request")),
        ([GOOD[0], gas(True, 7.31, 66)], ("inputs.samples[1].time", "bad_request")),
        ([GOOD[0], gas("2026-02-30T10:00", 7.31, 66)], ("inputs.samples[1].time", "out_of_range")),
        ([GOOD[0], gas(2e6, 7.31, 66)], ("inputs.samples[1].time", "out_of_range")),
        ([gas(0, 7.30, 70, ["oxygen_up"]), GOOD[1]], ("inputs.samples[0].events[0]", "bad_request")),
        (
            [gas(0, 7.30, 70, ["niv_started", "niv_stopped"]), GOOD[1]],
            ("inputs.samples[0].events", "inconsistent"),
        ),
        ([{**GOOD[0], "events": "niv_started"}, GOOD[1]], ("inputs.samples[0].events", "bad_request")),
        ([GOOD[0], {**GOOD[1], "colour": "red"}], ("inputs.samples[1].colour", "unknown_input")),
        ([GOOD[0], 7.3], ("inputs.samples[1]", "bad_request")),
        (
            [GOOD[0], {"time": 60, "inputs": {"ph": 7.33, "pco2": 64}}],
            ("inputs.samples[1].inputs.pco2", "bad_unit"),
        ),
        ([GOOD[0], gas(60, 73.3, 64)], ("inputs.samples[1].inputs.ph", "implausible")),
    ],
)
def test_bad_samples_name_their_field(samples, expected):
    inputs = {} if samples is None else {"samples": samples}
    response = handle_obj({"calc": "course", "inputs": inputs})
    assert expected in errors(response)


def test_an_unknown_event_word_suggests_the_nearest():
    response = run([gas(0, 7.30, 70, ["niv_start"]), GOOD[1]])
    (error,) = response["errors"]
    assert "Did you mean 'niv_started'?" in error["message"]


@pytest.mark.parametrize(
    ("patient", "expected"),
    [
        ({"baseline_pco2": 55}, ("inputs.baseline_pco2", "bad_unit")),
        ({"hypercapnia_risk": "yes"}, ("inputs.hypercapnia_risk", "bad_request")),
        ({"age": 300}, ("inputs.age", "out_of_range")),
        ({"weight": {"value": 70, "unit": "kg"}}, ("inputs.weight", "unknown_input")),
    ],
)
def test_bad_patient_inputs_are_named_once_at_their_own_place(patient, expected):
    response = run(GOOD, **patient)
    assert errors(response) == {expected}


def test_every_problem_at_once():
    samples = [gas(0, 7.30, 70, ["oxygen_up"]), {"time": "03:10", "inputs": {"ph": 7.3}}]
    found = errors(run(samples, age=-4))
    assert {
        ("inputs.samples[0].events[0]", "bad_request"),
        ("inputs.samples[1].time", "bad_request"),
        ("inputs.samples[1].inputs.pco2", "missing"),
        ("inputs.age", "out_of_range"),
    } <= found


@pytest.mark.parametrize(
    "text",
    [
        '{"calc": "course", "inputs": {"samples": [{"time": NaN, "inputs": {}}]}}',
        '{"calc": "course", "inputs": {"samples": [[], [], {}]}}',
        '{"calc": "course", "inputs": {"samples": [{"time": {"a": 1}, "inputs": [1], "events": [null]}]}}',
        '{"calc": "course", "inputs": {"samples": {"0": {}}, "age": true}}',
    ],
)
def test_junk_never_raises(text):
    response = json.loads(handle(text))
    assert response["ok"] is False
    assert all(e["code"] != "internal_error" for e in response["errors"])


# -- NIV: a deterioration after an early gain, a fall that leaves the pH normal, already on NIV --------------


def hh_pco2(ph: float, hco3: float) -> float:
    """henderson1908 (S 0.0307, pK 6.1): the PCO2 [mmHg] of a plausible triple with this pH and HCO3."""
    return hco3 / (0.0307 * 10 ** (ph - 6.1))


@pytest.mark.parametrize(("ph_last", "severity"), [(7.26, "urgent"), (7.28, None)])
def test_niv_deterioration_after_an_early_gain_is_urgent(ph_last, severity):
    # BTS/ICS 2016 (bts_ics2016_niv_monitoring): 7.22 -> 7.30 at 90 min, then 7.26 at 5 h is a fall of 0.04
    # since the previous gas on NIV (the reference change is 0.03), though still 0.04 above the start
    samples = [
        gas(0, 7.22, hh_pco2(7.22, 33), ["niv_started"]),
        gas(90, 7.30, hh_pco2(7.30, 33)),
        gas(300, ph_last, hh_pco2(ph_last, 33)),
    ]
    response = ok(samples, hypercapnia_risk=True)
    assert codes(response).get("niv_not_improving") == severity
    if severity:
        (text,) = [f["text"] for f in response["findings"] if f["code"] == "niv_not_improving"]
        assert "fallen since the gas at 90 min" in text


@pytest.mark.parametrize(
    ("ph_end", "severity"),
    [
        (7.37, "notable"),  # fell 0.03 (the reference change), still >= 7.35
        (7.35, "notable"),
        (7.34, "urgent"),  # fell 0.06 into acidaemia
        (7.38, None),  # fell 0.02: no change
    ],
)
def test_a_ph_fall_on_niv_is_urgent_only_into_acidaemia(ph_end, severity):
    samples = [gas(0, 7.40, hh_pco2(7.40, 31), ["niv_started"]), gas(120, ph_end, hh_pco2(ph_end, 31))]
    assert codes(ok(samples, hypercapnia_risk=True)).get("niv_not_improving") == severity


@pytest.mark.parametrize(("minutes", "severity"), [(59, None), (60, "notable"), (240, "urgent")])
def test_already_on_niv_at_the_first_gas(minutes, severity):
    # the first NIV event is niv_changed: NIV was running at that gas; thresholds count from it (a minimum)
    samples = [gas(0, 7.27, hh_pco2(7.27, 32), ["niv_changed"]), gas(minutes, 7.27, hh_pco2(7.27, 32))]
    response = ok(samples, hypercapnia_risk=True)
    niv = response["outputs"]["niv_response"]
    assert (niv["earlier"], niv["later"], niv["started"]) == (0, 1, 0)
    assert niv["start_known"] is False and niv["minutes_on_niv"] == minutes and niv["running"] is True
    assert codes(response).get("niv_not_improving") == severity
    assert [r["on_niv"] for r in response["outputs"]["readings"]] == [True, True]
    if severity:
        (text,) = [f["text"] for f in response["findings"] if f["code"] == "niv_not_improving"]
        assert "start not recorded" in text and "at least" in text


def test_a_later_niv_changed_does_not_start_a_run():
    samples = [gas(0, 7.27, 71), gas(60, 7.27, 71, ["niv_started"]), gas(300, 7.27, 70, ["niv_changed"])]
    samples.append(gas(400, 7.27, 70))
    niv = ok(samples)["outputs"]["niv_response"]
    assert (niv["started"], niv["earlier"], niv["start_known"]) == (1, 1, True)
    assert "niv_response" not in ok([gas(0, 7.27, 71), gas(300, 7.27, 70)])["outputs"]


# -- the latest gas meets the NIV threshold -----------------------------------------------------------------

#: bts_ics2016: pH below 7.35 with PaCO2 above 6.5 kPa (bipm2019: 6.5 kPa = 48.75 mmHg)
NIV_PCO2_MMHG = 6.5 * MMHG_PER_KPA


def threshold(response: dict) -> tuple[str | None, str]:
    found = [f for f in response["findings"] if f["code"] == "latest_gas_meets_niv_threshold"]
    return (found[0]["severity"], found[0]["text"]) if found else (None, "")


@pytest.mark.parametrize(
    ("ph", "pco2", "severity"),
    [
        (7.30, 66, "urgent"),
        (7.35, 66, None),  # not below 7.35
        (7.34, NIV_PCO2_MMHG + 0.5, "urgent"),
        (7.34, NIV_PCO2_MMHG - 0.5, None),  # not above 6.5 kPa
    ],
)
def test_the_latest_gas_meeting_the_niv_threshold_is_a_course_finding(ph, pco2, severity):
    response = ok([gas(0, 7.38, 55), gas(60, ph, pco2)], hypercapnia_risk=True)
    found, text = threshold(response)
    assert found == severity
    if severity:
        assert text in response["summary"] and response["summary"].index(text) == 0


def test_the_threshold_after_niv_stopped_or_extubation_is_a_relapse():
    stopped = [
        gas(0, 7.27, 71, ["niv_started"]),
        gas(120, 7.33, 62),
        gas(720, 7.38, 56, ["niv_stopped"]),
        gas(900, 7.30, 67),
    ]
    found, text = threshold(ok(stopped, hypercapnia_risk=True))
    assert found == "urgent" and text.startswith("Relapse after NIV was stopped at 720 min")
    extubated = [gas(0, 7.40, 51, ["extubated"]), gas(120, 7.31, 65)]
    found, text = threshold(ok(extubated, hypercapnia_risk=True))
    assert found == "urgent" and text.startswith("Relapse after extubation at 0 min")


def test_the_threshold_is_not_urgent_while_intubated_or_on_niv():
    intubated = [
        gas(0, 7.24, 79, ["niv_started"]),
        gas(90, 7.20, 86, ["intubated"]),
        gas(150, 7.30, 67),
    ]
    response = ok(intubated, hypercapnia_risk=True)
    assert threshold(response)[0] is None
    readings = response["outputs"]["readings"]
    assert [r["intubated"] for r in readings] == [False, False, True]
    # the intubated gas's own reading meets the threshold, but the course shows it as information only
    assert one_gas({**intubated[2]["inputs"], "hypercapnia_risk": True}) is not None
    assert {"code": "niv_criteria_met", "severity": "info"} in readings[2]["findings"]
    assert {"code": "niv_criteria_met", "severity": "urgent"} in readings[1]["findings"]
    # extubated later: the threshold counts again, as a relapse
    extubated = [*intubated[:2], gas(150, 7.36, 58, ["extubated"]), gas(300, 7.30, 67)]
    found, text = threshold(ok(extubated, hypercapnia_risk=True))
    assert found == "urgent" and "extubation" in text
    # on NIV and improving: said, but not urgent (the NIV checks decide)
    on_niv = [gas(0, 7.26, 74, ["niv_started"]), gas(90, 7.30, 67)]
    assert threshold(ok(on_niv, hypercapnia_risk=True))[0] == "notable"
    # NIV started just after the latest gas
    started = [gas(0, 7.38, 55), gas(60, 7.30, 67, ["niv_started"])]
    assert threshold(ok(started, hypercapnia_risk=True))[0] == "notable"
    # a venous latest gas: the threshold is not read from it
    venous = [gas(0, 7.38, 55), gas(60, 7.28, 75, sample="venous")]
    assert threshold(ok(venous, hypercapnia_risk=True))[0] is None


# -- the history of this course: NIV or intubation for hypercapnic failure -----------------------------------


OVERVENTILATED = [
    gas(0, 7.25, hh_pco2(7.25, 34), ["niv_started"], hco3={"value": 34, "unit": "mmol/L"}),
    gas(120, 7.38, hh_pco2(7.38, 33)),
    gas(360, 7.50, hh_pco2(7.50, 33)),
]


def test_gases_after_niv_are_read_with_the_history_of_hypercapnic_failure():
    # bts2017_o2 (verified): 88-92 % once the patient has needed NIV or IMV for hypercapnic failure
    response = ok(OVERVENTILATED, hypercapnia_risk=True)
    last = OVERVENTILATED[2]["inputs"]
    alone = one_gas({**last, "hypercapnia_risk": True})
    with_history = one_gas({**last, "hypercapnia_risk": True, "previous_hypercapnic_failure": True})
    assert (alone["spo2_target"]["low"], with_history["spo2_target"]["low"]) == (94, 88)  # the premise
    readings = response["outputs"]["readings"]
    assert readings[2]["spo2_target"] == with_history["spo2_target"]
    assert any("BTS 2017" in s and "360 min" in s for s in response["summary"])
    # patient-level false is this course's past, not its present: still 88-92 % after the NIV
    readings = ok(OVERVENTILATED, hypercapnia_risk=True, previous_hypercapnic_failure=False)["outputs"][
        "readings"
    ]
    assert readings[2]["spo2_target"] == with_history["spo2_target"]
    # the gas's own value wins
    own = [
        *OVERVENTILATED[:2],
        {**OVERVENTILATED[2], "inputs": {**last, "previous_hypercapnic_failure": False}},
    ]
    readings = ok(own, hypercapnia_risk=True)["outputs"]["readings"]
    assert readings[2]["spo2_target"] == alone["spo2_target"]


def test_no_history_without_niv_or_intubation_after_hypercapnia():
    no_niv = [{**g, "events": []} for g in OVERVENTILATED]
    last = OVERVENTILATED[2]["inputs"]
    alone = one_gas({**last, "hypercapnia_risk": True})
    response = ok(no_niv, hypercapnia_risk=True)
    assert response["outputs"]["readings"][2]["spo2_target"] == alone["spo2_target"]
    assert not any("BTS 2017" in s for s in response["summary"])
    # intubated without any respiratory acidosis in the course: not for hypercapnic failure
    normocapnic = [gas(0, 7.40, 40, ["intubated"]), gas(60, 7.42, 38)]
    readings = ok(normocapnic, hypercapnia_risk=True)["outputs"]["readings"]
    assert (
        readings[1]["spo2_target"]
        == one_gas({**normocapnic[1]["inputs"], "hypercapnia_risk": True})["spo2_target"]
    )


# -- the comparison group of the latest gas -----------------------------------------------------------------


def test_a_venous_first_gas_leaves_the_arterial_course_judged():
    samples = [
        gas(0, 7.25, hh_pco2(7.25, 33), ["niv_started"], sample="venous"),
        gas(60, 7.29, hh_pco2(7.29, 33)),
        gas(150, 7.33, hh_pco2(7.33, 33)),
    ]
    outputs = ok(samples, hypercapnia_risk=True)["outputs"]
    assert outputs["response"] == "improving"  # 7.29 -> 7.33: rose 0.04 (derived)
    assert (outputs["response_span"]["earlier"], outputs["response_span"]["later"]) == (1, 2)
    niv = outputs["niv_response"]
    assert (niv["started"], niv["earlier"], niv["later"], niv["minutes_on_niv"]) == (0, 1, 2, 150)
    assert niv["ph_change"] == pytest.approx(0.04) and niv["verdict"] == "improving"


def test_a_verdict_left_out_across_kinds_says_why():
    response = ok([gas(0, 7.30, 70, sample="venous"), gas(30, 7.36, 55)])
    assert "response" not in response["outputs"]
    assert any("not compared" in s for s in response["summary"])


# -- an oxygen-induced rise that has since recovered -------------------------------------------------------


@pytest.mark.parametrize(
    ("ph_last", "severity"),
    [
        (None, "urgent"),  # the gas after the rise is the latest, acidaemic
        (7.30, "notable"),  # rose 0.03 since: recovering (history)
        (7.29, "urgent"),  # rose 0.02: not recovered, still acidaemic
        (7.35, "notable"),  # no longer acidaemic
    ],
)
def test_an_oxygen_induced_rise_becomes_history_once_the_ph_recovers(ph_last, severity):
    samples = [
        gas(0, 7.36, hh_pco2(7.36, 30.5), ["oxygen_increased"]),
        gas(50, 7.27, hh_pco2(7.27, 31.5), ["oxygen_decreased"]),
    ]
    if ph_last is not None:
        samples.append(gas(110, ph_last, hh_pco2(ph_last, 31.5)))
    response = ok(samples, hypercapnia_risk=True)
    assert codes(response)["pco2_rising_after_oxygen"] == severity
    (text,) = [f["text"] for f in response["findings"] if f["code"] == "pco2_rising_after_oxygen"]
    assert ("Since then the pH has" in text) is (severity == "notable")
    if ph_last is not None and severity == "notable":
        assert ("recovered" if ph_last >= 7.35 else "risen") in text


# -- the summary: urgent first, then notable, each statement once ------------------------------------------


COURSES = {
    "oxygen then threshold": [gas(0, 7.36, 56, ["oxygen_increased"]), gas(50, 7.27, 71)],
    "niv failing": [
        gas(0, 7.26, 74, ["niv_started"]),
        gas(90, 7.27, 72, ["niv_changed"]),
        gas(300, 7.27, 71),
    ],
    "niv falling back": [
        gas(0, 7.22, hh_pco2(7.22, 33), ["niv_started"]),
        gas(90, 7.30, hh_pco2(7.30, 33)),
        gas(300, 7.26, hh_pco2(7.26, 33)),
    ],
    "overventilated": OVERVENTILATED,
    "oxygen history": [
        gas(0, 7.36, 56, ["oxygen_increased"]),
        gas(45, 7.28, 70, ["oxygen_decreased"]),
        gas(100, 7.33, 61),
    ],
    "metabolic alkalosis, oxygen": [gas(0, 7.47, 46.5, ["oxygen_increased"]), gas(45, 7.40, 55.5)],
}


@pytest.mark.parametrize("name", sorted(COURSES))
def test_the_summary_leads_with_urgent_then_notable_findings_each_once(name):
    response = ok(COURSES[name], hypercapnia_risk=True)
    urgent = [f["text"] for f in response["findings"] if f["severity"] == "urgent"]
    notable = [f["text"] for f in response["findings"] if f["severity"] == "notable"]
    summary = response["summary"]
    assert summary[: len(urgent) + len(notable)] == urgent + notable
    sentences = [s.strip() for item in summary for s in item.split(". ") if s.strip()]
    assert len(sentences) == len(set(sentences)), sentences
    if "niv_not_improving" in codes(response):  # the NIV verdict is not said a second time
        assert not any(s.startswith("On NIV for") for s in summary)
