"""The course's rules at their exact boundaries: mixed sample sites, HCO3 26, an unchanged PCO2, pH 7.45, and
the percentages its texts show.

Each test sits where a one-character change of tidewell/course.py (a comparison or a constant) would change
the answer, with the expected value written from the source (a references.py key beside it) and both sides
of the threshold. Gases are built with the Henderson-Hasselbalch equation (henderson1908: S 0.0307, pK 6.1),
so each triple agrees; the PaCO2 aim a threshold rests on is the one the blood_gas calculation gives for that
gas (the rule set belongs to it), never a value read from tidewell.calculations.course.

Provenance beside each check: *published*, *derived* (computed from the cited equation), *common practice*,
*from memory*. Sources are keys of tidewell.references.
"""

from __future__ import annotations

import pytest

from casebook import q
from tidewell.bridge import handle_obj
from tidewell.references import REFERENCES

#: the sources the tests below rest on
SOURCES = (
    "henderson1908",
    "acid_base_normal_ranges",
    "posthypercapnic_alkalosis",
    "sample_site_caveats",
    "venous_gas",
    "austin2010",
    "bts_ics2016_niv_monitoring",
    "reference_change_value",
    "analyser_imprecision",
)


def hh_pco2(ph: float, hco3: float) -> float:
    """henderson1908 (S 0.0307, pK 6.1): the PCO2 [mmHg] that agrees with this pH and HCO3 (derived)."""
    return hco3 / (0.0307 * 10 ** (ph - 6.1))


def hh_hco3(ph: float, pco2: float) -> float:
    """henderson1908 (S 0.0307, pK 6.1): the HCO3 [mmol/L] that agrees with this pH and PCO2 (derived)."""
    return 0.0307 * pco2 * 10 ** (ph - 6.1)


def gas(time: float, ph: float, pco2: float, events: tuple = (), **more) -> dict:
    sample = {"time": time, "inputs": {"ph": ph, "pco2": q(pco2, "mmHg"), **more}}
    if events:
        sample["events"] = list(events)
    return sample


def course(samples: list, **patient) -> dict:
    response = handle_obj(
        {"calc": "course", "inputs": {"samples": samples, **patient}, "options": {"pressure_unit": "mmHg"}}
    )
    assert response["ok"], response.get("errors")
    return response


def found(response: dict, code: str) -> dict | None:
    (hit,) = [f for f in response["findings"] if f["code"] == code] or [None]
    return hit


def aim_of(inputs: dict) -> float:
    """The PaCO2 aim [mmHg] the blood_gas calculation gives for this gas."""
    response = handle_obj({"calc": "blood_gas", "inputs": inputs, "options": {"pressure_unit": "mmHg"}})
    assert response["ok"], response.get("errors")
    return response["outputs"]["pco2_target"]["value"]


#: a chronic retainer at risk: pH 7.28, PaCO2 72 mmHg, HCO3 33 (henderson1908 agrees within 0.5 mmol/L)
RETAINER = {"ph": 7.28, "pco2": q(72, "mmHg"), "hco3": q(33, "mmol/L")}
#: a retainer's venous gas: no PaCO2 aim (venous_gas, from memory), so only the alkalaemia rule applies
VENOUS_RETAINER = gas(0, 7.30, 60.0, ["niv_started"], sample="venous")


def test_the_sources_are_listed():
    assert all(key in REFERENCES for key in SOURCES)
    assert abs(hh_hco3(7.28, 72) - 33) < 0.5  # RETAINER's triple agrees (henderson1908, derived)


# -- venous and arterial gases are never compared with each other ------------------------------------------
# sample_site_caveats (common practice), venous_gas (from memory): venous PCO2 runs 4-6 mmHg above arterial
# and venous pH lower, so a change between a venous and an arterial gas is no change of the patient.


@pytest.mark.parametrize(("second_site", "named"), [("arterial", False), ("venous", True)])
def test_an_oxygen_induced_rise_is_read_only_within_one_sample_site(second_site, named):
    # austin2010: after oxygen was increased, PCO2 56 -> 71 mmHg (+27 %) and pH 7.36 -> 7.27 (-0.09). From a
    # venous gas to an arterial one that is no rise of the patient's PCO2; between two venous gases it is.
    samples = [
        gas(0, 7.36, 56.0, ["oxygen_increased"], sample="venous"),
        gas(50, 7.27, 71.0, sample=second_site),
    ]
    assert (found(course(samples, hypercapnia_risk=True), "pco2_rising_after_oxygen") is not None) is named


@pytest.mark.parametrize(("last_site", "named"), [("arterial", False), ("venous", True)])
def test_post_hypercapnic_alkalosis_is_read_only_within_one_sample_site(last_site, named):
    # posthypercapnic_alkalosis (common practice): a retainer's later gas alkalaemic (pH 7.49 > 7.45,
    # acid_base_normal_ranges) with HCO3 above 26 and a lower PCO2. The retainer's gas is venous: an arterial
    # gas after it has no earlier arterial gas to be judged against, a venous one has.
    ph, pco2 = 7.49, 47.0
    assert ph > 7.45 and hh_hco3(ph, pco2) > 26 and pco2 < 60.0  # every condition met (derived)
    samples = [VENOUS_RETAINER, gas(180, ph, pco2, sample=last_site)]
    assert (found(course(samples, hypercapnia_risk=True), "pco2_falling_fast") is not None) is named


@pytest.mark.parametrize("latest", ["venous", "arterial"])
def test_each_sample_site_is_judged_against_its_own_gases(latest):
    # Two courses in one: an arterial retainer (7.28/72) that becomes alkalaemic (7.48/44) and a venous one
    # (7.30/60) that becomes alkalaemic (7.49/47). The finding speaks of the site of the latest gas: a venous
    # gas names no PaCO2 aim (venous_gas), an arterial one eases towards a PCO2 (posthypercapnic_alkalosis).
    last_arterial, last_venous = gas(120, 7.48, 44.0), gas(180, 7.49, 47.0, sample="venous")
    if latest == "arterial":
        last_arterial["time"], last_venous["time"] = 180, 120
    samples = [{"time": 0, "inputs": RETAINER}, {**VENOUS_RETAINER, "time": 30}, last_arterial, last_venous]
    for last in (last_arterial, last_venous):
        ph, pco2 = last["inputs"]["ph"], last["inputs"]["pco2"]["value"]
        assert ph > 7.45 and hh_hco3(ph, pco2) > 26  # alkalaemic with a high HCO3 (derived)
    hit = found(course(samples, hypercapnia_risk=True), "pco2_falling_fast")
    assert hit is not None and hit["severity"] == "urgent"  # alkalaemic: pH above 7.45
    named = last_venous if latest == "venous" else last_arterial
    assert f"pH {named['inputs']['ph']:.2f} with HCO3" in hit["text"]
    assert ("no PaCO2 aim" in hit["text"]) is (latest == "venous")
    assert ("towards" in hit["text"]) is (latest == "arterial")


# -- the alkalaemia rule: pH above 7.45, HCO3 above 26, PCO2 below the retainer's ---------------------------
# acid_base_normal_ranges (common practice): pH 7.35-7.45, HCO3 22-26 mmol/L; posthypercapnic_alkalosis
# (common practice): the PCO2 lowered below the retainer's while the retained HCO3 stays. Venous gases, so
# that no PaCO2 aim (venous_gas) can fire the finding on its own.


@pytest.mark.parametrize(("hco3", "named"), [(25.0, False), (26.0, False), (26.1, True)])
def test_the_alkalaemia_rule_needs_an_hco3_above_26(hco3, named):
    ph = 7.46  # above 7.45
    pco2 = hh_pco2(ph, hco3)  # derived: 35.6-37.1 mmHg, below the retainer's 60
    samples = [VENOUS_RETAINER, gas(180, ph, pco2, sample="venous", hco3=q(hco3, "mmol/L"))]
    response = course(samples, hypercapnia_risk=True)
    assert response["outputs"]["readings"][-1]["hco3"]["value"] == hco3  # the measured HCO3 is read
    assert (found(response, "pco2_falling_fast") is not None) is named


@pytest.mark.parametrize(("pco2", "named"), [(61.0, False), (60.0, False), (59.0, True)])
def test_the_alkalaemia_rule_needs_a_pco2_below_the_retainers(pco2, named):
    # the retainer's venous PCO2 is 60 mmHg; pH 7.46 at 59-61 needs HCO3 41-43 (derived: a metabolic
    # alkalosis on top): alkalaemic with a high HCO3 each time, only a PCO2 below 60 is a fall
    ph = 7.46
    assert hh_hco3(ph, pco2) > 26
    samples = [VENOUS_RETAINER, gas(180, ph, pco2, sample="venous")]
    assert (found(course(samples, hypercapnia_risk=True), "pco2_falling_fast") is not None) is named


@pytest.mark.parametrize(("ph", "severity", "ph_named"), [(7.45, "notable", False), (7.46, "urgent", True)])
def test_a_fall_below_the_aim_is_urgent_and_names_the_ph_only_above_745(ph, severity, ph_named):
    # The PaCO2 15 % below the aim (the 8 % reference change is crossed, ph >= 7.42): the finding fires
    # either way; above 7.45 (acid_base_normal_ranges) the blood is alkalaemic, the finding urgent, and the
    # text names the pH and HCO3 (posthypercapnic_alkalosis); at 7.45 exactly it is neither.
    aim = aim_of({**RETAINER, "hypercapnia_risk": True})
    pco2 = aim * 0.85
    response = course([{"time": 0, "inputs": RETAINER}, gas(240, ph, pco2)], hypercapnia_risk=True)
    hit = found(response, "pco2_falling_fast")
    assert hit is not None and hit["severity"] == severity
    assert " is 15 % below the aim of " in hit["text"]  # (1 - 0.85) x 100 (derived)
    hco3 = response["outputs"]["readings"][-1]["hco3"]["value"]
    assert hco3 == pytest.approx(hh_hco3(ph, pco2), abs=0.05)
    assert (f"pH {ph:.2f} with HCO3 {hco3:.1f} mmol/L" in hit["text"]) is ph_named


# -- the percentages the texts show ----------------------------------------------------------------------
# A change in percent of the earlier value is (later / earlier - 1) x 100 (common practice), shown whole.


@pytest.mark.parametrize(("share", "shown"), [(0.204, "20 %"), (0.206, "21 %")])
def test_the_share_below_the_aim_is_shown_in_whole_percent(share, shown):
    # PaCO2 20.4 % and 20.6 % below the aim: shown as 20 and 21 % (derived: (1 - PaCO2 / aim) x 100)
    aim = aim_of({**RETAINER, "hypercapnia_risk": True})
    response = course(
        [{"time": 0, "inputs": RETAINER}, gas(240, 7.43, aim * (1 - share))], hypercapnia_risk=True
    )
    hit = found(response, "pco2_falling_fast")
    assert hit is not None and f" is {shown} below the aim of {aim:.0f} mmHg" in hit["text"]


@pytest.mark.parametrize(("pco2_after", "shown"), [(96.0, "(+60 %)"), (87.6, "(+46 %)")])
def test_the_rise_after_oxygen_is_shown_in_whole_percent(pco2_after, shown):
    # austin2010: PCO2 60 mmHg before, 96 after is (96 / 60 - 1) x 100 = +60 % (derived), 87.6 after
    # +46 %; the pH falls 7.34 -> 7.20 (0.14). Scaled by 0.99 or 1.01 the first would read 59 or 61 %.
    samples = [gas(0, 7.34, 60.0, ["oxygen_increased"]), gas(45, 7.20, pco2_after)]
    hit = found(course(samples, hypercapnia_risk=True), "pco2_rising_after_oxygen")
    assert hit is not None and shown in hit["text"]


# -- NIV: a fall of exactly the reference change, its display ------------------------------------------------
# bts_ics2016_niv_monitoring: a pH that falls on NIV calls for the senior team now, before the first hour;
# reference_change_value (from memory) on analyser_imprecision (common practice): a change of 0.03 or more
# is a change (derived: 1.96 x sqrt(2) x 0.01 = 0.028, used as 0.03).


@pytest.mark.parametrize(("ph_after", "severity"), [(7.27, "urgent"), (7.28, None)])
def test_a_fall_of_exactly_003_on_niv_is_urgent_at_once(ph_after, severity):
    samples = [gas(0, 7.30, 75.0, ["niv_started"]), gas(30, ph_after, 78.0)]
    response = course(samples, hypercapnia_risk=True)
    hit = found(response, "niv_not_improving")
    assert (hit and hit["severity"]) == severity
    if hit:
        assert "the pH has fallen by 0.03. A falling pH on NIV calls for the senior team now" in hit["text"]
    niv = response["outputs"]["niv_response"]
    assert niv["ph_change"] == pytest.approx(ph_after - 7.30, abs=1e-9)
    assert response["display"]["niv_response.ph_change"] == 2  # a pH is shown to 2 decimals (common practice)


# -- the texts: a pH recovered above 7.35, an earlier aim that no longer fits --------------------------------


def test_an_oxygen_induced_rise_then_a_ph_above_735_reads_recovered():
    # austin2010: PCO2 up and pH 7.36 -> 7.27 after oxygen; a later pH of 7.38 is back in the normal range
    # (acid_base_normal_ranges: 7.35-7.45), "recovered" rather than "risen"
    samples = [
        gas(0, 7.36, hh_pco2(7.36, 30.5), ["oxygen_increased"]),
        gas(50, 7.27, hh_pco2(7.27, 31.5), ["oxygen_decreased"]),
        gas(110, 7.38, hh_pco2(7.38, 31.5)),
    ]
    hit = found(course(samples, hypercapnia_risk=True), "pco2_rising_after_oxygen")
    assert hit is not None and hit["severity"] == "notable"
    assert "Since then the pH has recovered to 7.38" in hit["text"]


def test_easing_towards_ph_735_names_the_earlier_aim_that_no_longer_fits():
    # posthypercapnic_alkalosis: pH 7.47 at PCO2 44 after the retainer; the PCO2 giving pH 7.35 with today's
    # HCO3 is 44 x 10^(7.47 - 7.35) = 58 mmHg (henderson1908, derived), below the earlier aim: the text eases
    # towards 58 and says the earlier aim no longer fits
    aim = aim_of({**RETAINER, "hypercapnia_risk": True})
    floor = 44.0 * 10 ** (7.47 - 7.35)
    assert floor < aim
    hit = found(
        course([{"time": 0, "inputs": RETAINER}, gas(300, 7.47, 44.0)], hypercapnia_risk=True),
        "pco2_falling_fast",
    )
    assert hit is not None and f"towards {floor:.0f} mmHg, the PCO2 that would give pH 7.35" in hit["text"]
    assert f"(the earlier aim of {aim:.0f} mmHg no longer fits)" in hit["text"]


def test_an_alkalaemic_overshoot_on_niv_is_no_failing_niv():
    # bts_ics2016_niv_monitoring: "not improving" is about a pH that stays or falls back below 7.35; a pH
    # that rose from 7.30 past the normal range to 7.50 (acid_base_normal_ranges: 7.35-7.45) is over-
    # ventilation (pco2_falling_fast's business), not a failing NIV, though its last step moved away from
    # the normal range
    samples = [
        gas(0, 7.30, hh_pco2(7.30, 33), ["niv_started"]),
        gas(90, 7.40, hh_pco2(7.40, 33)),
        gas(180, 7.50, hh_pco2(7.50, 33)),
    ]
    response = course(samples, hypercapnia_risk=True)
    assert found(response, "niv_not_improving") is None
    assert response["outputs"]["intervals"][-1]["direction"] == "worsening"  # 7.40 -> 7.50: 0 -> 0.05 away


@pytest.mark.parametrize(
    ("later_phs", "severity", "said"),
    [
        ((7.28, 7.36), "notable", "recovered to 7.36"),  # the latest gas decides, not the first after
        ((7.36, 7.28), "urgent", None),
    ],
)
def test_an_oxygen_induced_rise_is_judged_by_the_latest_gas_since(later_phs, severity, said):
    # austin2010: after the rise (pH 7.36 -> 7.27) the latest comparable gas says whether the pH recovered
    # (7.35 or more, acid_base_normal_ranges, or up by 0.03, reference_change_value)
    samples = [
        gas(0, 7.36, hh_pco2(7.36, 30.5), ["oxygen_increased"]),
        gas(50, 7.27, hh_pco2(7.27, 31.5), ["oxygen_decreased"]),
    ] + [gas(100 + 50 * k, ph, hh_pco2(ph, 31.5)) for k, ph in enumerate(later_phs)]
    hit = found(course(samples, hypercapnia_risk=True), "pco2_rising_after_oxygen")
    assert hit is not None and hit["severity"] == severity
    assert (said is not None and said in hit["text"]) or (said is None and "Since then" not in hit["text"])


@pytest.mark.parametrize("ph_last", [7.35, 7.36])
def test_a_ph_back_at_735_or_above_after_an_oxygen_induced_rise_has_recovered(ph_last):
    # austin2010: pH 7.38 -> 7.34 with the PCO2 up after oxygen; a later 7.35 or 7.36 has risen less than the
    # reference change (0.01, 0.02 < 0.03) but is back in the normal range (acid_base_normal_ranges:
    # 7.35-7.45): recovered, notable (urgent would need an acidaemic, unrecovered pH)
    samples = [
        gas(0, 7.38, hh_pco2(7.38, 30.5), ["oxygen_increased"]),
        gas(50, 7.34, hh_pco2(7.34, 31.5), ["oxygen_decreased"]),
        gas(110, ph_last, hh_pco2(ph_last, 31.5)),
    ]
    hit = found(course(samples, hypercapnia_risk=True), "pco2_rising_after_oxygen")
    assert hit is not None and hit["severity"] == "notable"
    assert f"Since then the pH has recovered to {ph_last:.2f}" in hit["text"]
