"""Temperature correction both ways: worked cases TC-01/TC-02, round trips, direction checks.

Provenance words beside each check: "published", "derived", "common practice", "from memory".
"""

from __future__ import annotations

import math

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from casebook import close, load_cases
from conftest import assert_accepted_range
from tidewell.errors import InputError
from tidewell.formulas import temperature as tc

CASES = load_cases()


def test_tc01_hypothermia_32():
    # rosenthal1948 (verified citation; coefficient form from memory), bradley1956 0.019 (instrument
    # convention), severinghaus1979 eq 3 read as 0.243 (PO2/100)^3.88 (docs/methods.md#temperature-correction)
    i = CASES["TC-01"]["inputs"]
    t = i["patient_temp_C"]
    close("TC-01", "ph_T", tc.ph_at_temperature_rosenthal(ph=i["ph_37"], temperature_c=t))
    close("TC-01", "paco2_T_mmHg", tc.pco2_at_temperature(pco2_mmhg=i["paco2_37_mmHg"], temperature_c=t))
    close(
        "TC-01",
        "pao2_T_single_step_mmHg",
        tc.po2_at_temperature_severinghaus(po2_mmhg=i["pao2_37_mmHg"], temperature_c=t),
    )
    close(
        "TC-01",
        "pao2_T_integrated_mmHg",
        tc.po2_at_temperature_severinghaus(po2_mmhg=i["pao2_37_mmHg"], temperature_c=t, integrate=True),
    )


def test_tc02_fever_40():
    i = CASES["TC-02"]["inputs"]
    t = i["patient_temp_C"]
    close("TC-02", "ph_T", tc.ph_at_temperature_rosenthal(ph=i["ph_37"], temperature_c=t))
    close("TC-02", "paco2_T_mmHg", tc.pco2_at_temperature(pco2_mmhg=i["paco2_37_mmHg"], temperature_c=t))
    close(
        "TC-02",
        "pao2_T_single_step_mmHg",
        tc.po2_at_temperature_severinghaus(po2_mmhg=i["pao2_37_mmHg"], temperature_c=t),
    )


def test_trade_journal_factor_table_at_32():
    # A laboratory trade-journal table (verified; docs/methods.md#temperature-correction): at 32 degC pH
    # +0.075, PCO2 x 0.815, PO2 x 0.70 for a normal sample; the equations agree within the stated tolerances
    # (derived: +0.0735, x 0.804, x 0.73)
    assert tc.ph_at_temperature_rosenthal(ph=7.40, temperature_c=32) - 7.40 == pytest.approx(0.075, abs=0.002)
    assert tc.pco2_at_temperature(pco2_mmhg=40, temperature_c=32) / 40 == pytest.approx(0.815, abs=0.015)
    assert tc.po2_at_temperature_severinghaus(po2_mmhg=90, temperature_c=32) / 90 == pytest.approx(
        0.70, abs=0.04
    )


def test_eq3_coefficient_reading():
    # severinghaus1979 eq 3 (docs/methods.md#temperature-correction): the chosen reading gives 0.0597 ln/degC
    # at PO2 100 (the other reading 0.0708); bradley1956 (verified) 0.0247 log10/degC x ln 10 = 0.057 at
    # normal tensions
    assert tc.severinghaus_po2_coefficient(po2_mmhg=100) == pytest.approx(0.0597, abs=0.0001)
    assert tc.severinghaus_po2_coefficient(po2_mmhg=100) == pytest.approx(0.0247 * math.log(10), abs=0.004)


# -- reverse direction and round trips (derived: each reverse is the inverse of its forward) -----------------
def test_reverse_of_tc01():
    i = CASES["TC-01"]["inputs"]
    t = i["patient_temp_C"]
    exp = CASES["TC-01"]["expected"]
    assert tc.ph_at_37_rosenthal(ph=exp["ph_T"], temperature_c=t) == pytest.approx(7.30, abs=0.001)
    assert tc.pco2_at_37(pco2_mmhg=exp["paco2_T_mmHg"], temperature_c=t) == pytest.approx(45.0, abs=0.05)
    assert tc.po2_at_37_severinghaus(
        po2_mmhg=exp["pao2_T_integrated_mmHg"], temperature_c=t, integrate=True
    ) == (pytest.approx(90.0, abs=0.3))


temps = st.floats(min_value=tc.T_LOW_C, max_value=tc.T_HIGH_C)


@settings(max_examples=300, deadline=None)
@given(ph=st.floats(min_value=6.8, max_value=7.8), t=temps)
def test_ph_round_trip(ph, t):
    forward = tc.ph_at_temperature_rosenthal(ph=ph, temperature_c=t)
    if 6.5 <= forward <= 8.0:
        assert tc.ph_at_37_rosenthal(ph=forward, temperature_c=t) == pytest.approx(ph, abs=1e-12)


@settings(max_examples=300, deadline=None)
@given(pco2=st.floats(min_value=10.0, max_value=150.0), t=temps)
def test_pco2_round_trip(pco2, t):
    forward = tc.pco2_at_temperature(pco2_mmhg=pco2, temperature_c=t)
    assert tc.pco2_at_37(pco2_mmhg=forward, temperature_c=t) == pytest.approx(pco2, rel=1e-12)


@settings(max_examples=200, deadline=None)
@given(po2=st.floats(min_value=5.0, max_value=600.0), t=temps)
def test_po2_round_trip_single_step(po2, t):
    forward = tc.po2_at_temperature_severinghaus(po2_mmhg=po2, temperature_c=t)
    if 1.0 <= forward <= 800.0:
        assert tc.po2_at_37_severinghaus(po2_mmhg=forward, temperature_c=t) == pytest.approx(po2, rel=1e-9)


@settings(max_examples=100, deadline=None)
@given(po2=st.floats(min_value=5.0, max_value=600.0), t=temps)
def test_po2_round_trip_integrated(po2, t):
    # the integrated form is the same ODE run back; midpoint steps of 0.1 degC keep it within 1e-5
    forward = tc.po2_at_temperature_severinghaus(po2_mmhg=po2, temperature_c=t, integrate=True)
    if 1.0 <= forward <= 800.0:
        back = tc.po2_at_37_severinghaus(po2_mmhg=forward, temperature_c=t, integrate=True)
        assert back == pytest.approx(po2, rel=1e-5)


def test_directions():
    # common practice: cooling a closed sample raises pH and lowers PCO2 and PO2; warming does the opposite
    assert tc.ph_at_temperature_rosenthal(ph=7.4, temperature_c=30) > 7.4
    assert tc.pco2_at_temperature(pco2_mmhg=40, temperature_c=30) < 40
    assert tc.po2_at_temperature_severinghaus(po2_mmhg=90, temperature_c=30) < 90
    assert tc.po2_at_37_severinghaus(po2_mmhg=60, temperature_c=30) > 60
    assert tc.pco2_at_37(pco2_mmhg=40, temperature_c=40) < 40


def test_no_change_at_37():
    assert tc.ph_at_37_rosenthal(ph=7.21, temperature_c=37) == pytest.approx(7.21)
    assert tc.po2_at_37_severinghaus(po2_mmhg=77, temperature_c=37) == pytest.approx(77)
    assert tc.po2_at_37_severinghaus(po2_mmhg=77, temperature_c=37, integrate=True) == 77


@pytest.mark.parametrize("t", [14.9, 43.1, float("nan"), None, "37"])
def test_temperature_outside_range_is_refused(t):
    for fn, kw in (
        (tc.ph_at_37_rosenthal, {"ph": 7.4}),
        (tc.pco2_at_37, {"pco2_mmhg": 40}),
        (tc.po2_at_37_severinghaus, {"po2_mmhg": 90}),
    ):
        with pytest.raises(InputError, match="temperature_c"):
            fn(temperature_c=t, **kw)


# -- the accepted ranges, each end on both sides -------------------------------------------------------------
# The project's plausibility limits written in the docstrings (no published source): pH 6.5-8.0, PCO2 1-300
# mmHg, PO2 1-800 mmHg, 15-43 degC.


@pytest.mark.parametrize(
    ("func", "field", "low", "high", "base"),
    [
        (tc.ph_at_temperature_rosenthal, "ph", 6.5, 8.0, {"temperature_c": 32.0}),
        (tc.ph_at_temperature_rosenthal, "temperature_c", 15.0, 43.0, {"ph": 7.4}),
        (tc.ph_at_37_rosenthal, "ph", 6.5, 8.0, {"temperature_c": 32.0}),
        (tc.pco2_at_temperature, "pco2_mmhg", 1.0, 300.0, {"temperature_c": 32.0}),
        (tc.pco2_at_temperature, "temperature_c", 15.0, 43.0, {"pco2_mmhg": 40.0}),
        (tc.pco2_at_37, "pco2_mmhg", 1.0, 300.0, {"temperature_c": 32.0}),
        (tc.po2_at_temperature_severinghaus, "po2_mmhg", 1.0, 800.0, {"temperature_c": 32.0}),
        (tc.po2_at_temperature_severinghaus, "temperature_c", 15.0, 43.0, {"po2_mmhg": 90.0}),
        (tc.severinghaus_po2_coefficient, "po2_mmhg", 1.0, 800.0, {}),
        (tc.po2_at_37_severinghaus, "po2_mmhg", 1.0, 800.0, {"temperature_c": 32.0}),
        (tc.po2_at_37_severinghaus, "temperature_c", 15.0, 43.0, {"po2_mmhg": 90.0}),
    ],
)
def test_each_input_is_accepted_exactly_over_its_documented_range(func, field, low, high, base):
    assert_accepted_range(func, field, low, high, **base)


# -- the integrated PO2 form: midpoint steps of step_c, written here from eq 3 -----------------------------


def k_eq3(po2: float) -> float:
    """severinghaus1979 eq 3 as read in docs (0.243 x (PO2/100)^3.88): d ln PO2 / dT [1/degC]."""
    return 0.058 / (0.243 * (po2 / 100.0) ** 3.88 + 1.0) + 0.013


def midpoint(po2: float, t_from: float, t_to: float, steps: int) -> float:
    """The midpoint rule for d ln PO2 / dT = k(PO2), in ``steps`` equal steps (derived)."""
    dt = (t_to - t_from) / steps
    for _ in range(steps):
        half = po2 * math.exp(0.5 * dt * k_eq3(po2))
        po2 *= math.exp(dt * k_eq3(half))
    return po2


@pytest.mark.parametrize(
    ("t", "step_c", "steps"),
    [
        (32.0, 1.0, 5),
        (32.0, 5.0, 1),
        (32.0, 10.0, 1),
        (41.0, 1.0, 4),
        (36.95, 0.1, 1),
        (42.0, 2.0, 3),
        (37.0, 0.1, 1),
    ],
)
def test_the_integrated_form_takes_whole_steps_of_step_c(t, step_c, steps):
    # the docstring: eq 3 integrated in steps of step_c degC (at least one step); |T - 37| / step_c rounded up
    assert steps == max(1, math.ceil(abs(t - 37.0) / step_c))
    forward = tc.po2_at_temperature_severinghaus(
        po2_mmhg=90.0, temperature_c=t, integrate=True, step_c=step_c
    )
    assert forward == pytest.approx(midpoint(90.0, 37.0, t, steps), rel=1e-12)
    back = tc.po2_at_37_severinghaus(po2_mmhg=70.0, temperature_c=t, integrate=True, step_c=step_c)
    assert back == pytest.approx(midpoint(70.0, t, 37.0, steps), rel=1e-12)
    # one step more gives a result 10 times further off than the tolerance: a wrong step count shows
    if steps < 5 and t != 37.0:  # at 37 degC there is nothing to integrate: the PO2 itself
        assert abs(midpoint(90.0, 37.0, t, steps) / midpoint(90.0, 37.0, t, steps + 1) - 1) > 1e-11
