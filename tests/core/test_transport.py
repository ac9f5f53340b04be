"""tidewell.formulas.transport: cylinder contents, oxygen needed, minutes available (cases CY-*).

Methods and sources: docs/methods.md#cylinder-contents.

Provenance words: *published* / *derived* (from the cited equation) / *common practice* / *from memory*.
"""

from __future__ import annotations

import math

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from conftest import assert_accepted_range
from tidewell.errors import InputError
from tidewell.formulas import transport
from tidewell.units import PSI_PA

#: oxygen compressibility factor at 15 degC (CoolProp reference equation of state, coolprop2014):
#: 0.931 at 137-200 bar, 0.939 at 230 bar
Z_O2_200_BAR = 0.931
Z_O2_230_BAR = 0.939


def test_cy01_free_gas_and_duration(cases):
    case = cases["CY-01"]
    i, e, tol = case["inputs"], case["expected"], case["tolerance"]
    # Common practice (ideal gas WC x P / 1.01325; cylinder_ideal_gas, CY-01): 1973.8 L, 131.59 min at 15
    # L/min, 98.69 min after a 25 % reserve.
    free = transport.free_gas_litres(
        water_capacity_l=i["water_capacity_L"], pressure_bar=i["pressure_bar_gauge"]
    )
    assert free == pytest.approx(e["free_gas_ideal_L"], abs=tol["free_gas_ideal_L"])
    minutes = transport.minutes_available(litres=free, flow_l_min=i["flow_L_min"])
    assert minutes == pytest.approx(e["duration_ideal_min"], abs=tol["duration_ideal_min"])
    usable = transport.usable_litres(free_gas_l=free, reserve_fraction=i["reserve_fraction"])
    after = transport.minutes_available(litres=usable, flow_l_min=i["flow_L_min"])
    assert after == pytest.approx(e["duration_after_reserve_min"], abs=tol["duration_after_reserve_min"])
    # Derived (CoolProp 8.0, Z 0.931 at 200 bar, 15 degC; coolprop2014): the real content, 2118.5 L, is
    # about 7 % more than the ideal estimate, so the ideal estimate is conservative for oxygen.
    real = free / Z_O2_200_BAR
    assert real == pytest.approx(e["free_gas_real_o2_15C_L"], abs=tol["free_gas_real_o2_15C_L"])
    assert free < real


def test_cy02_required_with_safety_factor(cases):
    case = cases["CY-02"]
    i, e, tol = case["inputs"], case["expected"], case["tolerance"]
    plan = transport.oxygen_supply_plan(
        water_capacity_l=i["water_capacity_L"],
        pressure_bar=i["pressure_bar_gauge"],
        flow_l_min=i["flow_L_min"],
        duration_min=i["transfer_time_min"],
        safety_factor=i["safety_factor"],
    )
    # Common practice (cylinder_ideal_gas, transport_reserve, CY-02): 454.0 L, 113.5 min at 4 L/min, 60 min x
    # 1.5 -> 360 L, enough.
    assert plan.available_litres == pytest.approx(e["free_gas_ideal_L"], abs=tol["free_gas_ideal_L"])
    assert plan.minutes_available == pytest.approx(e["duration_ideal_min"], abs=tol["duration_ideal_min"])
    assert plan.required_litres == pytest.approx(
        e["o2_required_with_factor_L"], abs=tol["o2_required_with_factor_L"]
    )
    assert plan.sufficient is (e["sufficient"] == "yes")
    assert plan.cylinders_needed == 1
    # Derived (CoolProp, Z 0.939 at 230 bar): about 483 L real, again more than the ideal estimate.
    assert plan.available_litres / Z_O2_230_BAR == pytest.approx(483, abs=1.0)


def test_us_e_cylinder_close_to_nominal():
    # coolprop2014 (from memory): a US E cylinder, 4.7 L water capacity at about 137 bar (2000 psi): ideal 635
    # L, real about 683 L (CoolProp), close to the nominal ~680 L (nominal contents from memory).
    ideal = transport.free_gas_litres(water_capacity_l=4.7, pressure_bar=137.0)
    assert ideal == pytest.approx(635, abs=1.0)
    assert ideal / Z_O2_200_BAR == pytest.approx(683, abs=2.0)
    assert ideal < 680


def test_default_margin_is_the_stated_common_practice():
    # Common practice (transport_reserve: "carry 1.5-2 x the oxygen calculated"): default safety factor 1.5,
    # reserve fraction 0, residual pressure 0.
    assert transport.DEFAULT_SAFETY_FACTOR == 1.5
    assert transport.DEFAULT_RESERVE_FRACTION == 0.0
    assert transport.required_litres(flow_l_min=10.0, duration_min=90.0) == pytest.approx(1350.0)
    assert transport.usable_litres(free_gas_l=1000.0) == 1000.0


def test_residual_pressure_is_not_counted():
    # Derived: a 10 L cylinder at 200 bar with 14 bar kept as residual: 10 x 186 / 1.01325 L.
    got = transport.free_gas_litres(water_capacity_l=10.0, pressure_bar=200.0, residual_bar=14.0)
    assert got == pytest.approx(10.0 * 186.0 / 1.01325, rel=1e-12)
    with pytest.raises(InputError) as err:
        transport.free_gas_litres(water_capacity_l=10.0, pressure_bar=10.0, residual_bar=14.0)
    assert err.value.code == "inconsistent"


def test_psi_and_bar_agree():
    # Derived: 2000 psi = 137.895 bar (1 psi = 6894.757 Pa, NIST SP 811).
    bar = 2000 * PSI_PA / 1e5
    assert bar == pytest.approx(137.895, abs=0.001)
    assert transport.free_gas_litres(water_capacity_l=4.7, pressure_bar=bar) == pytest.approx(
        4.7 * 137.895 / 1.01325, abs=0.01
    )


def test_cylinders_needed():
    # Derived: ceil(need / each).
    assert transport.cylinders_needed(required_l=900.0, usable_per_cylinder_l=450.0) == 2
    assert transport.cylinders_needed(required_l=901.0, usable_per_cylinder_l=450.0) == 3
    assert transport.cylinders_needed(required_l=10.0, usable_per_cylinder_l=450.0) == 1
    plan = transport.oxygen_supply_plan(
        water_capacity_l=2.0, pressure_bar=230.0, flow_l_min=15.0, duration_min=120.0, cylinders=2
    )
    # Derived: 15 x 120 x 1.5 = 2700 L; each cylinder 454.0 L -> 6 cylinders; 2 are not enough.
    assert plan.required_litres == pytest.approx(2700.0)
    assert plan.cylinders_needed == 6 and plan.sufficient is False
    assert plan.available_litres == pytest.approx(2 * plan.litres_per_cylinder)


def test_ventilator_flow_mixing_balance():
    # Derived (mixing balance, common practice): FiO2 1.0 draws all of VE; air draws nothing beyond the
    # allowance; in between the O2 share is (FiO2 - 0.2095) / 0.7905.
    assert transport.ventilator_oxygen_flow(minute_ventilation_l_min=8.0, fio2_fraction=1.0) == pytest.approx(
        10.0
    )
    assert transport.ventilator_oxygen_flow(
        minute_ventilation_l_min=8.0, fio2_fraction=0.21, device_allowance_l_min=0.0
    ) == pytest.approx(8.0 * 0.0005 / 0.7905)
    mix = transport.ventilator_oxygen_flow(
        minute_ventilation_l_min=10.0, fio2_fraction=0.6, device_allowance_l_min=0
    )
    # a mix of x L O2 and (10 - x) L air has FiO2 (x + 0.2095 (10 - x)) / 10
    assert (mix + 0.2095 * (10.0 - mix)) / 10.0 == pytest.approx(0.6, abs=1e-12)


@settings(max_examples=150, deadline=None)
@given(
    wc=st.floats(min_value=0.5, max_value=50.0),
    p=st.floats(min_value=20.0, max_value=300.0),
    flow=st.floats(min_value=0.5, max_value=60.0),
    minutes=st.floats(min_value=5.0, max_value=600.0),
    n=st.integers(min_value=1, max_value=6),
)
def test_plan_properties(wc, p, flow, minutes, n):
    plan = transport.oxygen_supply_plan(
        water_capacity_l=wc, pressure_bar=p, flow_l_min=flow, duration_min=minutes, cylinders=n
    )
    # computed here from the sources' formulas, not the module's (away from exact ties, where float rounding
    # decides): free gas n x WC x P / 1.01325 (cylinder_ideal_gas, derived: Boyle, gauge bar to atm), need
    # flow x minutes x the default safety factor 1.5 (transport_reserve, common practice), no reserve
    litres = n * wc * p / 1.01325
    need = flow * minutes * 1.5
    assert plan.available_litres == pytest.approx(litres, rel=1e-12)
    assert plan.required_litres == pytest.approx(need, rel=1e-12)
    if abs(litres - need) > 1e-6 * need:
        assert plan.sufficient is (litres >= need)
        assert plan.sufficient is (n >= math.ceil(need / (wc * p / 1.01325) - 1e-12))
    k = plan.cylinders_needed
    assert k * plan.litres_per_cylinder >= plan.required_litres - 1e-6
    assert k == 1 or (k - 1) * plan.litres_per_cylinder < plan.required_litres
    # more pressure never means fewer minutes
    more = transport.oxygen_supply_plan(
        water_capacity_l=wc,
        pressure_bar=min(p + 10, 350.0),
        flow_l_min=flow,
        duration_min=minutes,
        cylinders=n,
    )
    assert more.minutes_available > plan.minutes_available


@pytest.mark.parametrize(
    ("func", "kwargs", "field"),
    [
        (transport.required_litres, {"flow_l_min": 4.0, "duration_min": -30.0}, "duration_min"),
        (transport.required_litres, {"flow_l_min": -4.0, "duration_min": 30.0}, "flow_l_min"),
        (
            transport.required_litres,
            {"flow_l_min": 4.0, "duration_min": 30.0, "safety_factor": 0.5},
            "safety_factor",
        ),
        (transport.free_gas_litres, {"water_capacity_l": 10.0, "pressure_bar": 2000.0}, "pressure_bar"),
        (
            transport.free_gas_litres,
            {"water_capacity_l": float("nan"), "pressure_bar": 200.0},
            "water_capacity_l",
        ),
        (transport.usable_litres, {"free_gas_l": 100.0, "reserve_fraction": 1.0}, "reserve_fraction"),
        (
            transport.ventilator_oxygen_flow,
            {"minute_ventilation_l_min": 8.0, "fio2_fraction": 1.2},
            "fio2_fraction",
        ),
    ],
)
def test_domain_rejects_bad_values(func, kwargs, field):
    with pytest.raises(InputError) as err:
        func(**kwargs)
    assert err.value.field == field


def test_plan_rejects_fractional_cylinder_count():
    with pytest.raises(InputError, match="cylinders"):
        transport.oxygen_supply_plan(
            water_capacity_l=2.0, pressure_bar=200.0, flow_l_min=2.0, duration_min=30.0, cylinders=1.5
        )


# -- the accepted ranges and the boundaries of the plan (each end on both sides) ---------------------------
# The accepted ranges are the project's plausibility limits written in each function's docstring (no published
# source): a cylinder of 0.1-100 L water capacity at 1-350 bar, flows of 0.1-200 L/min, 1 min to 72 h.


@pytest.mark.parametrize(
    ("func", "field", "low", "high", "base"),
    [
        (transport.free_gas_litres, "water_capacity_l", 0.1, 100.0, {"pressure_bar": 200.0}),
        (transport.free_gas_litres, "pressure_bar", 1.0, 350.0, {"water_capacity_l": 10.0}),
        (transport.usable_litres, "free_gas_l", 0.0, 1e7, {}),
        (transport.usable_litres, "reserve_fraction", 0.0, 0.9, {"free_gas_l": 100.0}),
        (transport.required_litres, "flow_l_min", 0.1, 200.0, {"duration_min": 60.0}),
        (transport.required_litres, "duration_min", 1.0, 4320.0, {"flow_l_min": 2.0}),
        (transport.required_litres, "safety_factor", 1.0, 3.0, {"flow_l_min": 2.0, "duration_min": 60.0}),
        (transport.minutes_available, "litres", 0.0, 1e7, {"flow_l_min": 2.0}),
        (transport.minutes_available, "flow_l_min", 0.1, 200.0, {"litres": 100.0}),
        (transport.cylinders_needed, "required_l", 0.0, 1e7, {"usable_per_cylinder_l": 400.0}),
        (transport.cylinders_needed, "usable_per_cylinder_l", 1e-9, 1e6, {"required_l": 400.0}),
        (transport.ventilator_oxygen_flow, "minute_ventilation_l_min", 0.5, 60.0, {"fio2_fraction": 0.5}),
        (transport.ventilator_oxygen_flow, "fio2_fraction", 0.21, 1.0, {"minute_ventilation_l_min": 8.0}),
        (
            transport.ventilator_oxygen_flow,
            "device_allowance_l_min",
            0.0,
            60.0,
            {"minute_ventilation_l_min": 8.0, "fio2_fraction": 0.5},
        ),
    ],
)
def test_each_domain_input_is_accepted_exactly_over_its_documented_range(func, field, low, high, base):
    assert_accepted_range(func, field, low, high, **base)


def test_the_residual_pressure_is_accepted_from_0_up_to_below_the_gauge_pressure():
    # docstring: residual accepted 0 to below the gauge pressure; at the gauge pressure there is no usable
    # gas (cylinder_ideal_gas: V = WC x (P - P_residual) / 1.01325 would be 0), so it is refused
    assert transport.free_gas_litres(water_capacity_l=1.01325, pressure_bar=200.0, residual_bar=0.0) == 200.0
    assert transport.free_gas_litres(water_capacity_l=1.01325, pressure_bar=350.0, residual_bar=349.0) > 0
    with pytest.raises(InputError) as refused:
        transport.free_gas_litres(water_capacity_l=10.0, pressure_bar=200.0, residual_bar=-1e-9)
    assert (refused.value.field, refused.value.code) == ("residual_bar", "out_of_range")
    with pytest.raises(InputError) as refused:
        transport.free_gas_litres(water_capacity_l=10.0, pressure_bar=200.0, residual_bar=200.0)
    assert (refused.value.field, refused.value.code) == ("residual_bar", "inconsistent")


@pytest.mark.parametrize(("n", "accepted"), [(0, False), (1, True), (100, True), (101, False)])
def test_the_plan_takes_1_to_100_cylinders(n, accepted):
    # docstring: 1-100 identical cylinders (a plausibility limit of the project)
    plan = dict(water_capacity_l=2.0, pressure_bar=200.0, flow_l_min=2.0, duration_min=30.0)
    if accepted:
        assert transport.oxygen_supply_plan(**plan, cylinders=n).available_litres == pytest.approx(
            n * 2.0 * 200.0 / 1.01325,
            rel=1e-12,  # cylinder_ideal_gas: n x WC x P / 1.01325 (derived)
        )
    else:
        with pytest.raises(InputError) as refused:
            transport.oxygen_supply_plan(**plan, cylinders=n)
        assert (refused.value.field, refused.value.code) == ("cylinders", "out_of_range")


def test_no_requirement_still_needs_one_cylinder():
    # the docstring: ceil(need / each), at least 1 (common practice: a journey takes at least one cylinder)
    assert transport.cylinders_needed(required_l=0.0, usable_per_cylinder_l=400.0) == 1
    assert transport.cylinders_needed(required_l=400.0, usable_per_cylinder_l=400.0) == 1
    assert transport.cylinders_needed(required_l=400.1, usable_per_cylinder_l=400.0) == 2


@pytest.mark.parametrize(("minutes", "sufficient"), [(100.0, True), (101.0, False)])
def test_a_plan_is_sufficient_when_the_usable_oxygen_equals_the_requirement(minutes, sufficient):
    # cylinder_ideal_gas: 1.01325 L x 200 bar / 1.01325 = 200 L of free gas (exact in binary floating point:
    # checked below); transport_reserve: 2 L/min for 100 min with no safety factor needs 200 L, so the plan
    # is just sufficient ("sufficient when usable >= required"); 101 min needs 202 L and is not
    assert 1.01325 * 200.0 / 1.01325 == 200.0
    plan = transport.oxygen_supply_plan(
        water_capacity_l=1.01325, pressure_bar=200.0, flow_l_min=2.0, duration_min=minutes, safety_factor=1.0
    )
    assert plan.usable_litres == 200.0 and plan.required_litres == 2.0 * minutes
    assert plan.sufficient is sufficient


def test_the_planned_oxygen_has_no_safety_factor_and_the_required_has():
    # transport_reserve: planned = flow x duration (4 L/min x 90 min = 360 L); required = planned x 1.5
    plan = transport.oxygen_supply_plan(
        water_capacity_l=2.0, pressure_bar=200.0, flow_l_min=4.0, duration_min=90.0, safety_factor=1.5
    )
    assert plan.planned_litres == 360.0 and plan.required_litres == 540.0
