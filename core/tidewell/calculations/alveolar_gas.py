"""The ``alveolar_gas`` calculation: oxygenation from one gas and the inspired oxygen.

=============================  ====================================================================
``alveolar_gas``               PIO2, alveolar PO2, A-a gradient, a/A, P/F (and altitude-corrected),
                               S/F, oxygenation index, age-expected values
=============================  ====================================================================
"""

from __future__ import annotations

from ..fields import Inputs
from ..formulas import altitude as alt
from ..formulas import oxygenation as ox
from ..report import Report
from ._readings import _LOCAL, _fail_now, _read_pco2, _read_po2, _read_temperature


def _read_pressure(inputs: Inputs) -> tuple[float | None, float | None]:
    """(pb given, altitude given) in mmHg and m; each None when absent."""
    pb = inputs.quantity(
        "pb",
        unit="mmHg",
        low=150.0,
        high=1100.0,
        label="barometric pressure",
        plausible_word="is not a barometric pressure people breathe at",
    )
    altitude = inputs.quantity(
        "altitude",
        unit="m",
        low=alt.LOWEST_M,
        high=alt.TROPOPAUSE_M,
        label="altitude",
        plausible_word="is outside the standard atmosphere used here",
    )
    return pb, altitude


def _pb_from(report: Report, pb: float | None, altitude: float | None, *, output: str = "pb") -> float:
    """Barometric pressure to use, with its step: the measured PB, else ICAO ISA at the altitude, else 760."""
    if pb is not None:
        report.pressure(output, pb)
        report.step("Barometric pressure (as given)", "PB", pb, "icao7488", output=output, pressure=True)
        return pb
    if altitude is not None:
        value = alt.pressure_at_altitude_isa(altitude_m=altitude)
        report.pressure(output, value)
        report.step(
            f"Barometric pressure at {altitude:.0f} m (ICAO standard atmosphere)",
            "PB = 101325 Pa x (1 - 0.0065 h / 288.15) ^ 5.255877",
            value,
            ("icao7488", "ussa1976"),
            output=output,
            pressure=True,
        )
        return value
    report.pressure(output, 760.0)
    report.step("Barometric pressure (sea level, default)", "PB = 760 mmHg", 760.0, "icao7488", output=output)
    return 760.0


# ==================================================================================================
# alveolar_gas


def alveolar_gas(inputs: Inputs, report: Report) -> None:
    """PIO2, alveolar PO2 and the oxygenation indices.

    inputs: ``fio2``, ``pco2``, ``po2?``, ``pb?`` or ``altitude?`` (default sea level; a given PB is
    used for the arithmetic, a given altitude decides the Berlin > 1000 m rule), ``rq?`` (0.8),
    ``age?``; extras: ``temperature?`` (patient's: water vapour pressure by Buck 1981 instead of the
    conventional 47 mmHg), ``spo2?`` (S/F and the Rice P/F estimate), ``mean_airway_pressure?``
    (cmH2O; oxygenation index with ``po2``).

    ``pao2_alveolar`` is the simplified alveolar gas equation (PaCO2 / R), the form the bedside
    norms and the worked cases use; the full form is given as ``pao2_alveolar_full``.
    """
    fio2 = inputs.fraction("fio2", required=True, label="FiO2")
    pco2 = _read_pco2(inputs)
    po2 = _read_po2(inputs)
    pb_given, altitude = _read_pressure(inputs)
    rq = inputs.number("rq", low=0.5, high=1.5, default=0.8, label="respiratory quotient R")
    age = inputs.number("age", low=0.0, high=120.0, label="age", what=" years")
    temperature = _read_temperature(inputs, low=25.0, high=43.0)
    spo2 = inputs.percent("spo2", low=20.0, high=100.0, label="SpO2")
    paw = inputs.quantity(
        "mean_airway_pressure", unit="cmH2O", low=1.0, high=60.0, label="mean airway pressure"
    )
    inputs.finish()

    pb = _pb_from(report, pb_given, altitude)
    if temperature is None:
        ph2o = ox.PH2O_37_MMHG
        report.step(
            "Water vapour pressure (37 degC convention)", "PH2O = 47 mmHg", ph2o, "buck1981", output="ph2o"
        )
    else:
        ph2o = ox.water_vapour_pressure_buck1981(temperature_c=temperature)
        report.step(
            f"Water vapour pressure at {temperature:.1f} degC",
            "PH2O = 6.1121 x exp(17.502 T / (240.97 + T)) hPa",
            ph2o,
            "buck1981",
            output="ph2o",
            pressure=True,
        )
    report.pressure("ph2o", ph2o)
    if pb_given is not None and altitude is not None:
        isa = alt.pressure_at_altitude_isa(altitude_m=altitude)
        report.finding(
            "pb_and_altitude",
            "info",
            f"The barometric pressure given ({report.pressure_text(pb_given)}) is used; the standard "
            "atmosphere "
            f"at {altitude:.0f} m would give {report.pressure_text(isa)}. The altitude decides the Berlin "
            "1000 m rule.",
        )

    pio2 = ox.inspired_po2(fio2_fraction=fio2, pb_mmhg=pb, ph2o_mmhg=ph2o)
    report.computed(
        "pio2", pio2, "Inspired PO2", "PIO2 = FiO2 x (PB - PH2O)", "alveolar_gas_1946", pressure=True
    )
    simple = ox.alveolar_po2_simple(fio2_fraction=fio2, paco2_mmhg=pco2, pb_mmhg=pb, rq=rq, ph2o_mmhg=ph2o)
    full = ox.alveolar_po2_full(fio2_fraction=fio2, paco2_mmhg=pco2, pb_mmhg=pb, rq=rq, ph2o_mmhg=ph2o)
    if simple <= 1.0:
        raise _fail_now(
            "pco2",
            inputs.raw.get("pco2"),
            f"leaves no alveolar oxygen at this inspired PO2 ({report.pressure_text(pio2)}): alveolar PO2 "
            f"would be {report.pressure_text(simple)}",
            "Check FiO2, PB/altitude and PCO2 (units); such values are not survivable.",
        )
    report.computed(
        "pao2_alveolar",
        simple,
        "Alveolar PO2 (simplified alveolar gas equation)",
        "PAO2 = PIO2 - PaCO2 / R",
        "alveolar_gas_1946",
        pressure=True,
        inputs={"R": rq},
    )
    report.computed(
        "pao2_alveolar_full",
        full,
        "Alveolar PO2 (full alveolar gas equation)",
        "PAO2 = PIO2 - PaCO2 x (FiO2 + (1 - FiO2) / R)",
        "alveolar_gas_1946",
        pressure=True,
    )
    if not 0.7 <= rq <= 1.0:
        report.finding(
            "rq_unusual", "info", f"R {rq:g} is outside the usual 0.7-1.0; the alveolar PO2 depends on it."
        )

    on_air = fio2 <= 0.2101
    if age is not None:
        upper = ox.aa_gradient_upper_by_age(age_years=age)
        report.computed(
            "a_a_expected_upper",
            upper,
            "Upper limit of the A-a gradient for age (breathing air)",
            "age / 4 + 4",
            "aa_age_rule",
            pressure=True,
        )
        expected = ox.expected_pao2_by_age(age_years=age)
        sorbini = ox.expected_pao2_sorbini1968(age_years=age)
        report.computed(
            "pao2_expected_for_age",
            expected,
            "Expected PaO2 for age (air, sea level)",
            "100 - age / 3",
            "aa_age_rule",
            pressure=True,
        )
        report.computed(
            "pao2_expected_sorbini",
            sorbini,
            "Expected PaO2 for age, Sorbini (air, sea level)",
            "109 - 0.43 x age",
            "sorbini1968",
            pressure=True,
        )
        if age >= 75:
            report.finding(
                "pao2_age_plateau",
                "info",
                "From about 75 years PaO2 stops falling with age (Cerveri 1995); the age rules may "
                "underestimate the expected PaO2.",
            )

    if po2 is not None:
        _alveolar_po2_indices(report, fio2=fio2, po2=po2, pao2_alv=simple, pb=pb, altitude=altitude, age=age)
        if age is not None and on_air:
            raised = po2 < simple and (simple - po2) > ox.aa_gradient_upper_by_age(age_years=age)
            report.put("a_a_status", "raised" if raised else "normal")
            if raised:
                report.finding(
                    "a_a_gradient_raised",
                    "notable",
                    "The A-a gradient is above the upper limit for age: a gas-exchange problem (V/Q "
                    "mismatch, shunt or diffusion), not hypoventilation alone.",
                )
        elif age is not None:
            report.finding(
                "a_a_age_rule_needs_air",
                "info",
                "The age limit of the A-a gradient applies breathing air; on added oxygen the gradient "
                "is normally larger, so compare the a/A ratio instead (normal above 0.75).",
            )
        if paw is not None:
            oi = ox.oxygenation_index(fio2_fraction=fio2, mean_airway_pressure_cmh2o=paw, pao2_mmhg=po2)
            report.computed(
                "oxygenation_index",
                oi,
                "Oxygenation index",
                "OI = FiO2 x mean airway pressure (cmH2O) x 100 / PaO2 (mmHg)",
                "chen2018_oi",
                decimals=1,
            )
    elif paw is not None:
        report.finding("oi_needs_po2", "info", "The oxygenation index needs a PaO2 (po2).")

    if spo2 is not None:
        sf = ox.sf_ratio(spo2_percent=spo2, fio2_fraction=fio2)
        report.computed("sf_ratio", sf, "SpO2/FiO2 ratio", "S/F = SpO2 (%) / FiO2", "rice2007", decimals=0)
        if spo2 <= ox.RICE_SPO2_MAX_PERCENT and sf > 64.0:
            est = ox.pf_from_sf_rice2007(sf=sf)
            report.computed(
                "pf_ratio_estimated_from_sf",
                est,
                "P/F ratio estimated from S/F (Rice)",
                "P/F = (S/F - 64) / 0.84",
                "rice2007",
                pressure=True,
            )
        else:
            report.finding(
                "sf_estimate_not_valid",
                "info",
                "P/F is not estimated from S/F above an SpO2 of 97 %: the curve is too flat there.",
            )

    report.caution(
        "Alveolar PO2 assumes a steady state, the stated R and a known FiO2; FiO2 from masks and nasal "
        "cannulae is uncertain. " + _LOCAL
    )
    report.say(
        f"Breathing FiO2 {fio2:.2f} at PB {report.pressure_text(pb)} the inspired PO2 is "
        f"{report.pressure_text(pio2)} and the alveolar PO2 about {report.pressure_text(simple)}."
    )


def _alveolar_po2_indices(
    report: Report, *, fio2: float, po2: float, pao2_alv: float, pb: float, altitude: float | None, age
) -> None:
    aa = pao2_alv - po2
    report.computed("a_a_gradient", aa, "A-a gradient", "PAO2 - PaO2", "alveolar_gas_1946", pressure=True)
    ratio = ox.a_over_a_ratio(pao2_mmhg=po2, pao2_alveolar_mmhg=pao2_alv)
    report.computed(
        "a_over_A", ratio, "a/A ratio", "PaO2 / PAO2 (normal above 0.75)", "gilbert1974", decimals=2
    )
    if aa < -5.0:
        report.finding(
            "pao2_above_alveolar",
            "notable",
            f"The PaO2 is {report.pressure_text(-aa)} above the calculated alveolar PO2, which cannot "
            "happen: check the "
            "FiO2 actually delivered, the barometric pressure, R, and that the sample is arterial.",
        )
    elif ratio < 0.75:
        report.finding("a_over_a_low", "notable", "The a/A ratio is below 0.75: impaired gas exchange.")
    pf = ox.pf_ratio(pao2_mmhg=po2, fio2_fraction=fio2)
    report.computed("pf_ratio", pf, "P/F ratio", "PaO2 / FiO2", "berlin2012", pressure=True)
    corrected = ox.pf_ratio_altitude_corrected_berlin(pao2_mmhg=po2, fio2_fraction=fio2, pb_mmhg=pb)
    report.computed(
        "pf_ratio_altitude_corrected",
        corrected,
        "P/F ratio corrected for barometric pressure",
        "PaO2 / FiO2 x PB / 760",
        "berlin2012",
        pressure=True,
    )
    above_1000 = (
        (altitude > 1000.0) if altitude is not None else pb < alt.pressure_at_altitude_isa(altitude_m=1000.0)
    )
    banded = corrected if above_1000 else pf
    band = ox.berlin_pf_band(pf_mmhg=banded)
    report.put("pf_band_berlin", band)
    report.step(
        "Berlin oxygenation band ("
        + ("corrected P/F: above 1000 m" if above_1000 else "uncorrected P/F: at or below 1000 m")
        + ")",
        f"severe <= 100 < moderate <= 200 < mild <= 300 mmHg: {band}",
        banded,
        "berlin2012",
        output="pf_band_berlin",
        pressure=True,
    )
    if band != "above_ards_range":
        report.finding(
            f"pf_band_{band}",
            "notable" if band != "severe" else "urgent",
            f"P/F in the Berlin '{band}' band. ARDS also needs PEEP or CPAP of at least 5 cmH2O, onset "
            "within a week, bilateral opacities and a cause other than heart failure or fluid overload.",
        )
    if above_1000:
        report.finding(
            "pf_altitude_correction",
            "info",
            "Above 1000 m the Berlin definition uses P/F x PB/760; its authors note the exact adjustment is "
            "unknown.",
        )
