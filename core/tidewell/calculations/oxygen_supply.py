"""The ``oxygen_supply`` calculation: is the oxygen on board enough, with a margin?

====================  ==========================================================================
``oxygen_supply``     cylinder contents, oxygen needed with a margin, minutes available,
                      sufficient or not, cylinders needed
====================  ==========================================================================

Defaults and decisions: see ``_flight`` (the quantity readers are shared) and ``formulas.transport``.
"""

from __future__ import annotations

from ..fields import Inputs
from ..formulas import transport
from ..report import Report
from ._flight import VOLUME_UNITS, _read_count, _read_quantity

CYLINDER_PRESSURE_UNITS = ("bar", "psi", "kPa")
FLOW_UNITS = ("L/min", "mL/min")
DURATION_UNITS = ("min", "h")


# --------------------------------------------------------------------------------------------------
# oxygen_supply


def oxygen_supply(inputs: Inputs, report: Report) -> None:
    """The ``oxygen_supply`` calculation (docs/bridge.md): is the oxygen on board enough, with a margin?

    Inputs: ``cylinder_water_capacity`` (L), ``cylinder_pressure`` (bar/psi/kPa), ``cylinders?`` (1),
    ``flow`` (L/min) *or* ``minute_ventilation`` + ``fio2`` (+ ``device_allowance?``, 2 L/min),
    ``duration`` (min/h), ``reserve_fraction?`` (0), ``safety_factor?`` (1.5), ``residual_pressure?`` (0).
    """
    wc = _read_quantity(
        inputs,
        "cylinder_water_capacity",
        unit="L",
        allowed=VOLUME_UNITS[::-1],
        low=0.1,
        high=100.0,
        label="Cylinder water capacity",
        required=True,
        missing_hint="The water capacity is stamped on the cylinder (e.g. 2 L, 10 L).",
    )
    pressure = _read_quantity(
        inputs,
        "cylinder_pressure",
        unit="bar",
        allowed=CYLINDER_PRESSURE_UNITS,
        low=transport.PRESSURE_LOW_BAR,
        high=transport.PRESSURE_HIGH_BAR,
        label="Cylinder pressure",
        required=True,
        missing_hint="Read the gauge (bar, psi or kPa).",
    )
    n = _read_count(inputs, "cylinders", low=1, high=100, default=1, label="Number of cylinders")
    has_ve = inputs.given("minute_ventilation")
    flow = _read_quantity(
        inputs,
        "flow",
        unit="L/min",
        allowed=FLOW_UNITS,
        low=0.1,
        high=200.0,
        label="Flow",
        required=not has_ve,
        missing_hint="Give the oxygen flow, or minute_ventilation and fio2 for a ventilated patient.",
    )
    ve = _read_quantity(
        inputs,
        "minute_ventilation",
        unit="L/min",
        allowed=FLOW_UNITS,
        low=0.5,
        high=60.0,
        label="Minute ventilation",
    )
    fio2 = inputs.fraction("fio2", label="FiO2", required=has_ve)
    allowance = _read_quantity(
        inputs,
        "device_allowance",
        unit="L/min",
        allowed=FLOW_UNITS,
        low=0.0,
        high=60.0,
        label="Device allowance",
        default=transport.DEFAULT_DEVICE_ALLOWANCE_L_MIN,
    )
    duration = _read_quantity(
        inputs,
        "duration",
        unit="min",
        allowed=DURATION_UNITS,
        low=1.0,
        high=4320.0,
        label="Duration",
        required=True,
        missing_hint="The planned time door to door, including delays on the ground.",
        range_note="up to 72 h",
    )
    reserve = inputs.fraction(
        "reserve_fraction",
        low=0.0,
        high=0.9,
        default=transport.DEFAULT_RESERVE_FRACTION,
        label="Reserve fraction",
    )
    safety = inputs.number(
        "safety_factor", low=1.0, high=3.0, default=transport.DEFAULT_SAFETY_FACTOR, label="Safety factor"
    )
    residual = _read_quantity(
        inputs,
        "residual_pressure",
        unit="bar",
        allowed=CYLINDER_PRESSURE_UNITS,
        low=0.0,
        high=transport.PRESSURE_HIGH_BAR,
        label="Residual pressure",
        default=0.0,
    )
    if flow is not None and ve is not None:
        inputs.fail(
            "minute_ventilation",
            inputs.raw.get("minute_ventilation"),
            "give either flow or minute_ventilation (with fio2), not both",
            "Remove one: flow is used as given; minute_ventilation estimates the flow of a ventilator.",
            code="inconsistent",
        )
    if pressure is not None and residual is not None and residual >= pressure:
        inputs.fail(
            "residual_pressure",
            inputs.raw.get("residual_pressure"),
            f"must be below the cylinder pressure ({pressure:.0f} bar): no gas would be usable",
            code="inconsistent",
        )
    inputs.finish()

    unused = [k for k in ("fio2", "device_allowance") if inputs.given(k) and ve is None]
    if unused:
        report.finding(
            "inputs_not_used",
            "info",
            f"{' and '.join(unused)} {'are' if len(unused) > 1 else 'is'} used only with "
            "minute_ventilation; the "
            "flow was used as given.",
        )
    if ve is not None:
        flow = transport.ventilator_oxygen_flow(
            minute_ventilation_l_min=ve, fio2_fraction=fio2, device_allowance_l_min=allowance
        )
        report.step(
            "Oxygen flow of the ventilated patient (estimated)",
            f"O2 = VE x (FiO2 - 0.2095) / (1 - 0.2095) + allowance = {ve:.1f} x ({fio2:.2f} - 0.2095) / "
            "0.7905 + "
            f"{allowance:g} L/min (allowance for bias flow and leaks; add driving gas of pneumatic "
            "ventilators)",
            flow,
            ("ventilator_o2_estimate", "air_o2_fraction"),
            output="flow_used",
            unit="L/min",
        )
        report.put("flow_source", "estimated")
    else:
        report.step("Oxygen flow", "as given", flow, "transport_reserve", output="flow_used", unit="L/min")
        report.put("flow_source", "given")
    report.quantity("flow_used", flow, "L/min", decimals=1)

    # every value is inside the domain's ranges here (the estimated flow is at most 60 + 60 L/min)
    plan = transport.oxygen_supply_plan(
        water_capacity_l=wc,
        pressure_bar=pressure,
        flow_l_min=flow,
        duration_min=duration,
        cylinders=n,
        safety_factor=safety,
        reserve_fraction=reserve,
        residual_bar=residual,
    )

    report.computed(
        "litres_per_cylinder",
        plan.litres_per_cylinder,
        "Free oxygen in one cylinder (ideal gas)",
        f"V = water capacity x (P - P_residual) / 1.01325 = {wc:g} L x ({pressure:.1f} - {residual:.1f}) "
        "bar / "
        "1.01325 bar; real O2 holds about 6-7 % more at 137-230 bar (Z about 0.93), so this is conservative",
        ("cylinder_ideal_gas", "coolprop2014"),
        unit="L",
        decimals=0,
    )
    report.computed(
        "available_litres",
        plan.available_litres,
        "Oxygen available",
        f"{n} cylinder(s) x {plan.litres_per_cylinder:.0f} L",
        "cylinder_ideal_gas",
        unit="L",
        decimals=0,
    )
    report.computed(
        "reserve_fraction",
        reserve,
        "Reserve fraction of the contents held back",
        "as given"
        if inputs.given("reserve_fraction")
        else "default 0 (the safety factor is the default margin)",
        "transport_reserve",
        decimals=2,
    )
    report.computed(
        "usable_litres",
        plan.usable_litres,
        "Oxygen usable after the reserve",
        f"available x (1 - reserve fraction {reserve:g}); default 0: the margin is the safety factor "
        "(e.g. 0.25 keeps a quarter of the contents)",
        "transport_reserve",
        unit="L",
        decimals=0,
    )
    report.computed(
        "planned_litres",
        plan.planned_litres,
        "Oxygen for the planned time",
        f"flow x duration = {flow:.2f} L/min x {duration:g} min",
        "transport_reserve",
        unit="L",
        decimals=0,
    )
    report.computed(
        "safety_factor",
        safety,
        "Safety factor on the planned oxygen",
        "as given" if inputs.given("safety_factor") else "default 1.5 (common practice: carry 1.5-2 x)",
        "transport_reserve",
        decimals=2,
    )
    report.computed(
        "required_litres",
        plan.required_litres,
        "Oxygen required with the safety factor",
        f"flow x duration x safety factor {safety:g} (default 1.5; common practice 1.5-2)",
        "transport_reserve",
        unit="L",
        decimals=0,
    )
    report.computed(
        "minutes_available",
        plan.minutes_available,
        "Minutes of oxygen available",
        f"usable / flow = {plan.usable_litres:.0f} L / {flow:.2f} L/min",
        "cylinder_ideal_gas",
        unit="min",
        decimals=0,
    )
    report.put("sufficient", plan.sufficient)
    margin = plan.usable_litres - plan.required_litres
    report.computed(
        "margin_litres",
        margin,
        "Sufficient when usable >= required",
        "margin = usable - required; sufficient when the margin is 0 or more",
        "transport_reserve",
        unit="L",
        decimals=0,
    )
    report.computed(
        "cylinders_needed",
        plan.cylinders_needed,
        "Cylinders of this size and pressure needed",
        f"ceil(required / usable per cylinder) = ceil({plan.required_litres:.0f} / "
        f"{plan.usable_litres / n:.0f})",
        "transport_reserve",
    )

    if not plan.sufficient:
        report.finding(
            "oxygen_insufficient",
            "urgent",
            f"The oxygen on board is not enough: {plan.usable_litres:.0f} L usable against "
            f"{plan.required_litres:.0f} L "
            f"required ({flow:.1f} L/min for {duration:g} min x {safety:g}). {plan.cylinders_needed} "
            "cylinder(s) of "
            f"this size and pressure are needed; the supply lasts about {plan.minutes_available:.0f} min.",
        )
    if pressure < 0.5 * 137.0:
        report.finding(
            "cylinder_pressure_low",
            "notable",
            f"The cylinder pressure ({pressure:.0f} bar) is below half of a usual full fill (137-230 bar): "
            "check "
            "the gauge reading and consider a full cylinder.",
        )
    report.caution(
        "Cylinder contents are an ideal-gas estimate from the gauge (conservative for oxygen); read gauges "
        "at "
        "the temperature of use, check every cylinder, regulator and connection before departure, and never "
        "plan to run a cylinder empty. Follow local protocols and the aircraft operator's oxygen "
        "requirements."
    )
    if ve is not None:
        report.caution(
            "The ventilator's own oxygen use depends on the device: gas-driven (pneumatic) ventilators also "
            "consume driving gas. Check the manual and set device_allowance accordingly."
        )
    verdict = "enough" if plan.sufficient else "NOT enough"
    report.say(
        f"{n} cylinder(s) of {wc:g} L at {pressure:.0f} bar hold about {plan.available_litres:.0f} L of "
        "oxygen "
        f"({plan.usable_litres:.0f} L usable), about {plan.minutes_available:.0f} min at {flow:.1f} L/min."
    )
    report.say(
        f"{duration:g} min x {safety:g} needs {plan.required_litres:.0f} L: the supply is {verdict}"
        + ("." if plan.sufficient else f"; {plan.cylinders_needed} cylinder(s) of this kind would be.")
    )
