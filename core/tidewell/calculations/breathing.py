"""Bridge calculations for oxygenation, ventilation and temperature correction.

=============================  ====================================================================
``alveolar_gas``               PIO2, alveolar PO2, A-a gradient, a/A, P/F (and altitude-corrected),
                               S/F, oxygenation index, age-expected values
``oxygen_content``             SaO2 (measured or from the curve), CaO2, DO2
``oxygen_dissociation_curve``  the standard and the patient's curve as arrays for a plot (numpy)
``ventilation``                VE, VA, VD/VT, VCO2, PBW, to-target settings, the mechanisms of a
                               raised PaCO2, EtCO2 tracking
``temperature_correction``     pH, PCO2, PO2 between 37 degC and the patient's temperature
=============================  ====================================================================

Each function is ``f(inputs, report)`` (DEVELOPERS.md): it reads every input with the ``Inputs``
accessors, calls ``inputs.finish()`` once, computes with the domain modules (oxygenation,
ventilation, temperature, altitude) and fills the report. Blood-gas values (pH, PCO2, PO2) are
always the analyser's values at 37 degC unless a calculation says otherwise; ``temperature`` is
always the patient's. numpy is imported only inside :func:`oxygen_dissociation_curve`.
"""

from __future__ import annotations

import math

from ..errors import InputError, InputErrors, is_real
from ..fields import _ABSENT_REPR, Inputs
from ..formulas import altitude as alt
from ..formulas import oxygenation as ox
from ..formulas import temperature as tc
from ..formulas import ventilation as vn
from ..report import Report

_LOCAL = "Use with clinical judgement and local protocols; these are estimates, not orders."
_PCO2_WORD = "is not survivable"


def _fail_now(field: str, value, problem: str, hint: str = "", code: str = "inconsistent") -> InputErrors:
    return InputErrors([InputError(f"inputs.{field}", value, problem, hint, code=code)])


#: accepted PCO2 [mmHg]: 8 keeps the lowest values seen in extreme hyperventilation (severe ketoacidosis)
#: and catches a kPa value sent as mmHg (5.3 mmHg -> "did you mean 5.3 kPa?")
PCO2_LOW_MMHG, PCO2_HIGH_MMHG = 8.0, 250.0


#: accepted measured VCO2 [mL/min] (resting_vco2; common practice)
VCO2_LOW_ML_MIN, VCO2_HIGH_ML_MIN = 50.0, 1000.0


def _read_pco2(inputs: Inputs, *, required: bool = True) -> float | None:
    return inputs.quantity(
        "pco2",
        unit="mmHg",
        low=PCO2_LOW_MMHG,
        high=PCO2_HIGH_MMHG,
        label="PCO2",
        required=required,
        plausible_word=_PCO2_WORD,
    )


def _read_po2(inputs: Inputs, *, required: bool = False) -> float | None:
    return inputs.quantity(
        "po2", unit="mmHg", low=5.0, high=800.0, label="PO2", required=required, plausible_word=_PCO2_WORD
    )


def _read_temperature(inputs: Inputs, *, low: float, high: float, required: bool = False) -> float | None:
    return inputs.quantity(
        "temperature",
        unit="degC",
        low=low,
        high=high,
        label="temperature",
        required=required,
        plausible_word="is not a body temperature",
    )


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


# ==================================================================================================
# oxygen_content


def oxygen_content(inputs: Inputs, report: Report) -> None:
    """Arterial oxygen content and delivery.

    inputs: ``hb``, ``spo2?`` or ``po2?`` (at least one; with only ``po2`` the saturation comes from
    the Severinghaus 1979 curve, shifted by ``ph?``, ``pco2?`` or ``base_excess?``: analyser values
    at 37 degC), ``cardiac_output?`` (L/min); extra ``hufner?`` (mL/g, default 1.34).

    SaO2 is taken as the SpO2 when given. The dissolved part needs a PO2: without one it is left out
    (and said so), since PO2 cannot be read back from a saturation on the flat part of the curve.
    Temperature does not enter: a closed sample keeps its saturation when warmed to 37 degC.
    """
    hb = inputs.quantity(
        "hb", unit="g/dL", substance="hb", low=1.0, high=25.0, label="haemoglobin", required=True
    )
    spo2 = inputs.percent("spo2", low=20.0, high=100.0, label="SpO2")
    po2 = _read_po2(inputs)
    co = inputs.quantity("cardiac_output", unit="L/min", low=0.5, high=30.0, label="cardiac output")
    ph = inputs.number("ph", low=6.5, high=8.0, label="pH")
    pco2 = _read_pco2(inputs, required=False)
    be = inputs.quantity("base_excess", unit="mmol/L", low=-40.0, high=40.0, label="base excess")
    hufner = inputs.number("hufner", low=1.30, high=1.40, default=ox.HUFNER_ML_PER_G, label="Hufner factor")
    if not inputs.given("spo2") and not inputs.given("po2"):
        inputs.fail(
            "spo2",
            _ABSENT_REPR,
            "a saturation (spo2) or a PO2 (po2) is needed",
            "Give the SpO2 in %, or the arterial PO2 to estimate the saturation from the curve.",
            code="missing",
        )
    inputs.finish()

    so2_curve = None
    if po2 is not None:
        so2_curve = _saturation_from_po2(
            report, po2=po2, ph=ph, pco2=pco2, be=be, output="sao2" if spo2 is None else "so2_from_po2"
        )
    if spo2 is not None:
        sao2 = spo2 / 100.0
        report.step("SaO2 taken as the SpO2", "SaO2 = SpO2", spo2, "o2_content", output="sao2")
        if so2_curve is not None:
            report.put("so2_from_po2", so2_curve * 100.0, decimals=1)
            if abs(spo2 - so2_curve * 100.0) > 4.0:
                report.finding(
                    "spo2_po2_disagree",
                    "notable",
                    f"SpO2 {spo2:.0f} % and the saturation expected from the PO2 ({so2_curve * 100:.0f} %) "
                    "differ by more than 4 points: check the oximeter signal, whether the sample was "
                    "arterial, and for carbon monoxide or methaemoglobin (co-oximetry).",
                )
        elif spo2 <= ox.RICE_SPO2_MAX_PERCENT:
            est = ox.po2_from_saturation_exact(so2_fraction=sao2)
            report.computed(
                "po2_estimated",
                est,
                "PO2 on the standard curve for this SpO2 (exact inverse of Severinghaus eq 1)",
                "PO2^3 + 150 PO2 = 23400 S / (1 - S)",
                "severinghaus1979",
                pressure=True,
            )
    else:
        sao2 = so2_curve
    report.put("sao2", sao2 * 100.0, decimals=1)

    content = ox.oxygen_content(hb_g_dl=hb, so2_fraction=sao2, po2_mmhg=po2, hufner_ml_per_g=hufner)
    report.quantity("cao2", content.total_ml_dl, "mL/dL", decimals=1)
    report.quantity("cao2_bound", content.bound_ml_dl, "mL/dL", decimals=2)
    report.quantity("cao2_dissolved", content.dissolved_ml_dl, "mL/dL", decimals=2)
    formula = f"CaO2 = {hufner:g} x Hb x SaO2" + (" + 0.0031 x PaO2" if po2 is not None else "")
    report.step(
        "Arterial oxygen content",
        formula,
        content.total_ml_dl,
        ("o2_content", "dijkhuizen1977"),
        output="cao2",
        unit="mL/dL",
        inputs={"hb_g_dl": hb, "sao2_fraction": sao2, "hufner_ml_per_g": hufner},
    )
    if po2 is None:
        report.finding(
            "dissolved_o2_not_included",
            "info",
            "No PO2 was given, so dissolved oxygen (0.0031 mL/dL per mmHg: about 0.3 mL/dL on air, up to "
            f"2 mL/dL at a PaO2 of {report.pressure_text(600.0)}) is left out.",
        )
    if hufner > 1.36:
        report.finding(
            "hufner_high",
            "info",
            "A Hufner factor above about 1.37 is meant for co-oximetry (fractional) saturation; with SpO2 "
            "or a calculated saturation it overstates the content.",
        )
    if co is not None:
        do2 = ox.oxygen_delivery(cao2_ml_dl=content.total_ml_dl, cardiac_output_l_min=co)
        report.computed(
            "do2",
            do2,
            "Oxygen delivery",
            "DO2 = CaO2 x cardiac output x 10",
            "o2_content",
            unit="mL/min",
            decimals=0,
        )
    report.caution(
        "Pulse oximetry reads carboxyhaemoglobin as oxyhaemoglobin and is unreliable in methaemoglobinaemia, "
        "poor perfusion and at low saturations; the true content may then be lower. " + _LOCAL
    )
    report.say(f"Oxygen content is about {content.total_ml_dl:.1f} mL/dL at an SaO2 of {sao2 * 100:.0f} %.")


def _shift(po2: float, *, ph, pco2, be, temperature: float = 37.0):
    """(virtual PO2, method word, source key) for the analyser or temperature-corrected values."""
    p_h = 7.40 if ph is None else ph
    if be is not None:
        v = ox.virtual_po2_base_excess(po2_mmhg=po2, temperature_c=temperature, ph=p_h, base_excess_mmol_l=be)
        return v, "base_excess", "severinghaus1966"
    v = ox.virtual_po2_kelman(
        po2_mmhg=po2, temperature_c=temperature, ph=p_h, pco2_mmhg=40.0 if pco2 is None else pco2
    )
    return v, "kelman", "kelman1966"


def _saturation_from_po2(report: Report, *, po2: float, ph, pco2, be, output) -> float:
    v, method, key = _shift(po2, ph=ph, pco2=pco2, be=be)
    if method == "base_excess":
        formula = "x = PO2 x 10^[0.024 (37 - T) + 0.48 (pH - 7.40) - 0.0013 BE]; S = S_standard(x)"
    else:
        formula = (
            "x = PO2 x 10^[0.024 (37 - T) + 0.40 (pH - 7.40) + 0.06 log10(40 / PCO2)]; S = S_standard(x)"
        )
    # a virtual PO2 above the curve's range is clamped: the saturation there is 1.000 to 4 decimals
    s = ox.saturation_severinghaus1979(po2_mmhg=min(v.po2_mmhg, ox.PO2_CURVE_MAX_MMHG))
    if ph is None and pco2 is None and be is None:
        formula = "S = 1 / (23400 / (PO2^3 + 150 PO2) + 1) (standard curve: pH 7.40, PCO2 40, 37 degC)"
    report.step(
        "Saturation from PO2 (Severinghaus 1979 eq 1"
        + ("" if formula.startswith("S =") else ", virtual PO2 for pH/PCO2/BE")
        + ")",
        formula,
        s * 100.0,
        ("severinghaus1979", key),
        output=output,
        inputs={"virtual_po2_mmhg": v.po2_mmhg, "factor": v.factor},
    )
    return s


# ==================================================================================================
# oxygen_dissociation_curve

#: points of the plotted curves
CURVE_POINTS = 151
CURVE_PO2_MAX_MMHG = 150.0


def oxygen_dissociation_curve(inputs: Inputs, report: Report) -> None:
    """The standard curve and the patient's shifted curve, as arrays for a plot.

    inputs: ``temperature?`` (patient's), ``ph?``, ``pco2?``, ``base_excess?``, ``po2?`` (analyser
    values at 37 degC). With a temperature, pH, PCO2 and PO2 are first corrected to it (Rosenthal,
    0.019/degC, Severinghaus eq 3 integrated) and the curve is the in-vivo curve at that temperature.
    Shift: Kelman (T, pH, PCO2), or the base-excess variant (T, pH, BE) when ``base_excess`` is given.

    outputs: ``po2`` ``{"value": [...], "unit"}`` (0-150 mmHg, or up to the patient's PO2 + 10 %,
    151 points, in the request's pressure unit), ``so2_standard`` and ``so2_patient`` (lists, %),
    ``p50_patient`` and ``p50_standard``, ``shift_factor``, and with ``po2``: ``point``
    ``{"po2", "so2"}``. This is the only calculation that imports numpy.
    """
    temperature = _read_temperature(inputs, low=15.0, high=43.0)
    ph = inputs.number("ph", low=6.5, high=8.0, label="pH")
    pco2 = _read_pco2(inputs, required=False)
    be = inputs.quantity("base_excess", unit="mmol/L", low=-40.0, high=40.0, label="base excess")
    po2 = _read_po2(inputs)
    inputs.finish()

    import numpy as np  # only here: keeps numpy off the start-up path

    t = 37.0 if temperature is None else temperature
    ph_t, pco2_t, po2_t = ph, pco2, po2
    if t != 37.0:
        ph_t = tc.ph_at_temperature_rosenthal(ph=7.40 if ph is None else ph, temperature_c=t)
        pco2_t = tc.pco2_at_temperature(pco2_mmhg=40.0 if pco2 is None else pco2, temperature_c=t)
        report.step(
            f"pH at {t:.1f} degC (Rosenthal)",
            "pH_T = pH37 + (T - 37) x (-0.0147 + 0.0065 x (7.40 - pH37))",
            ph_t,
            "rosenthal1948",
        )
        report.step(
            f"PCO2 at {t:.1f} degC",
            "PCO2_T = PCO2_37 x 10^(0.019 (T - 37))",
            pco2_t,
            "bradley1956",
            pressure=True,
        )
        if po2 is not None:
            po2_t = tc.po2_at_temperature_severinghaus(po2_mmhg=po2, temperature_c=t, integrate=True)
            report.step(
                f"PO2 at {t:.1f} degC (Severinghaus eq 3, integrated)",
                "d ln PO2 / dT = 0.058 / (0.243 (PO2/100)^3.88 + 1) + 0.013",
                po2_t,
                "severinghaus1979",
                pressure=True,
            )
        report.put(
            "values_at_temperature",
            {
                "temperature": {"value": t, "unit": "degC"},
                "ph": ph_t,
                "pco2": report.pressure_value(pco2_t),
                **({"po2": report.pressure_value(po2_t)} if po2_t is not None else {}),
            },
        )
    factor_v, method, key = _shift(100.0, ph=ph_t, pco2=pco2_t, be=be, temperature=t)
    factor = factor_v.factor
    report.put("shift_factor", factor, decimals=4)
    report.put("shift_method", method)
    report.step(
        "Shift of the curve (virtual PO2 factor)",
        "10^[0.024 (37 - T) + 0.48 (pH - 7.40) - 0.0013 BE]"
        if method == "base_excess"
        else "10^[0.024 (37 - T) + 0.40 (pH - 7.40) + 0.06 log10(40 / PCO2)]",
        factor,
        ("severinghaus1979", key),
        output="shift_factor",
    )
    p50_std = ox.P50_STANDARD_MMHG
    p50 = p50_std / factor
    report.pressure("p50_standard", p50_std, decimals=1 if report.pressure_unit == "mmHg" else 2)
    report.computed(
        "p50_patient",
        p50,
        "P50 of the patient's curve",
        "P50 = P50_standard / factor (P50_standard 26.86 mmHg, eq 1 at S = 0.5)",
        "severinghaus1979",
        pressure=True,
    )

    top = CURVE_PO2_MAX_MMHG
    if po2_t is not None and po2_t * 1.1 > top:
        top = min(ox.PO2_CURVE_MAX_MMHG, math.ceil(po2_t * 1.1 / 50.0) * 50.0)
    grid = np.linspace(0.0, top, CURVE_POINTS)

    def eq1(p):
        u = p**3 + 150.0 * p
        return u / (u + 23400.0)

    standard = eq1(grid) * 100.0
    patient = eq1(grid * factor) * 100.0
    pdec = 2 if report.pressure_unit == "mmHg" else 4
    axis = [round(float(report.pressure_value(float(p))["value"]), pdec) for p in grid]
    report.put("po2", {"value": axis, "unit": report.pressure_unit})
    report.put("so2_standard", [round(float(s), 3) for s in standard])
    report.put("so2_patient", [round(float(s), 3) for s in patient])
    report.step(
        f"Standard curve (Severinghaus 1979 eq 1), {CURVE_POINTS} points from 0 to "
        f"{report.pressure_text(top)}",
        "S = 1 / (23400 / (PO2^3 + 150 PO2) + 1)",
        CURVE_POINTS,
        "severinghaus1979",
        output="so2_standard",
    )
    report.step(
        "Patient's curve", "S_patient(PO2) = S_standard(PO2 x factor)", factor, (key,), output="so2_patient"
    )
    if po2_t is not None:
        s = ox.saturation_severinghaus1979(po2_mmhg=min(po2_t * factor, ox.PO2_CURVE_MAX_MMHG)) * 100.0
        report.put("point", {"po2": report.pressure_value(po2_t), "so2": s}, decimals=1)
        report.step("The patient's point", "S = S_standard(PO2 x factor)", s, (key,), output="point")
    direction = "left (higher affinity)" if factor > 1.0 else "right (lower affinity)" if factor < 1.0 else ""
    if direction and abs(p50 - p50_std) >= 0.5:
        report.finding(
            "curve_shifted",
            "info",
            f"The curve is shifted {direction}: P50 {report.pressure_text(p50)} against the standard "
            f"{report.pressure_text(p50_std)}.",
        )
    report.caution(
        "The standard curve assumes normal 2,3-DPG and adult haemoglobin; CO, methaemoglobin, fetal "
        "haemoglobin and stored blood move it in ways not modelled here."
    )


# ==================================================================================================
# temperature_correction


def temperature_correction(inputs: Inputs, report: Report) -> None:
    """Blood gases between the analyser's 37 degC and the patient's temperature, either direction.

    inputs: ``ph``, ``pco2``, ``po2?``, ``temperature`` (patient's, 15-43 degC); extra
    ``direction?``: ``to_patient`` (default: the values are the analyser's at 37 degC) or ``to_37``
    (the values are at the patient's temperature).

    outputs: ``ph``, ``pco2``, ``po2`` at the patient's temperature (the contract's outputs, in both
    directions) and ``ph_37``, ``pco2_37``, ``po2_37`` at 37 degC. ``po2`` uses eq 3 integrated in
    0.1 degC steps (the coefficient depends on PO2); the one-step analyser approximation is given as
    ``po2_single_step`` (``po2_37_single_step`` in the reverse direction).
    """
    ph = inputs.number("ph", low=6.5, high=8.0, label="pH", required=True)
    pco2 = _read_pco2(inputs)
    po2 = _read_po2(inputs)
    t = _read_temperature(inputs, low=tc.T_LOW_C, high=tc.T_HIGH_C, required=True)
    direction = inputs.choice("direction", ("to_patient", "to_37"), default="to_patient", label="direction")
    inputs.finish()

    here = f"{t:.1f} degC"
    if direction == "to_patient":
        ph_t = tc.ph_at_temperature_rosenthal(ph=ph, temperature_c=t)
        pco2_t = tc.pco2_at_temperature(pco2_mmhg=pco2, temperature_c=t)
        ph_37, pco2_37, po2_37 = ph, pco2, po2
        report.step(
            f"pH at {here} (Rosenthal)",
            "pH_T = pH37 + (T - 37) x (-0.0147 + 0.0065 x (7.40 - pH37))",
            ph_t,
            "rosenthal1948",
            output="ph",
        )
        report.step(
            f"PCO2 at {here}",
            "PCO2_T = PCO2_37 x 10^(0.019 x (T - 37))",
            pco2_t,
            "bradley1956",
            output="pco2",
            pressure=True,
        )
        po2_t = single = None
        if po2 is not None:
            po2_t = tc.po2_at_temperature_severinghaus(po2_mmhg=po2, temperature_c=t, integrate=True)
            single = tc.po2_at_temperature_severinghaus(po2_mmhg=po2, temperature_c=t)
            report.step(
                f"PO2 at {here} (Severinghaus eq 3 integrated in 0.1 degC steps)",
                "d ln PO2 / dT = 0.058 / (0.243 (PO2/100)^3.88 + 1) + 0.013",
                po2_t,
                "severinghaus1979",
                output="po2",
                pressure=True,
            )
            report.step(
                f"PO2 at {here} (single step, analyser approximation)",
                "PO2_T = PO2_37 x exp((T - 37) x k(PO2_37))",
                single,
                "severinghaus1979",
                output="po2_single_step",
                pressure=True,
            )
            report.pressure("po2_single_step", single)
    else:
        ph_t, pco2_t, po2_t = ph, pco2, po2
        ph_37 = tc.ph_at_37_rosenthal(ph=ph, temperature_c=t)
        pco2_37 = tc.pco2_at_37(pco2_mmhg=pco2, temperature_c=t)
        report.step(
            "pH at 37 degC (Rosenthal, inverted)",
            "pH37 = (pH_T - (T - 37) x 0.0334) / (1 - 0.0065 x (T - 37))",
            ph_37,
            "rosenthal1948",
            output="ph_37",
        )
        report.step(
            "PCO2 at 37 degC",
            "PCO2_37 = PCO2_T x 10^(-0.019 x (T - 37))",
            pco2_37,
            "bradley1956",
            output="pco2_37",
            pressure=True,
        )
        po2_37 = None
        if po2 is not None:
            po2_37 = tc.po2_at_37_severinghaus(po2_mmhg=po2, temperature_c=t, integrate=True)
            single = tc.po2_at_37_severinghaus(po2_mmhg=po2, temperature_c=t)
            report.step(
                "PO2 at 37 degC (Severinghaus eq 3 integrated back from T)",
                "d ln PO2 / dT = 0.058 / (0.243 (PO2/100)^3.88 + 1) + 0.013",
                po2_37,
                "severinghaus1979",
                output="po2_37",
                pressure=True,
            )
            report.step(
                "PO2 at 37 degC (inverse of the single-step approximation)",
                "solve PO2_T = PO2_37 x exp((T - 37) x k(PO2_37))",
                single,
                "severinghaus1979",
                output="po2_37_single_step",
                pressure=True,
            )
            report.pressure("po2_37_single_step", single)
    report.put("ph", ph_t, decimals=3)
    report.pressure("pco2", pco2_t)
    report.put("ph_37", ph_37, decimals=3)
    report.pressure("pco2_37", pco2_37)
    if po2_t is not None:
        report.pressure("po2", po2_t)
        report.pressure("po2_37", po2_37)
    report.put("temperature", {"value": t, "unit": "degC"}, decimals=1)
    report.put("direction", direction)

    report.finding(
        "alpha_stat_ph_stat",
        "info",
        "Alpha-stat management interprets the uncorrected 37 degC values (usual in adult hypothermia and "
        f"cardiac surgery); pH-stat aims at pH 7.40 and PaCO2 {report.pressure_text(40.0)} at the patient's "
        "temperature, i.e. "
        "interprets the corrected values (adds CO2, raises cerebral blood flow). Say which is used.",
    )
    if po2 is not None and t < 36.0:
        report.finding(
            "po2_lower_when_cold",
            "notable",
            "At the patient's lower temperature the PO2 is lower than the 37 degC report: judge oxygenation "
            "on the corrected PO2 (and use water vapour pressure at body temperature for the alveolar PO2).",
        )
    if t < 20.0:
        report.finding(
            "temperature_extrapolated",
            "notable",
            "Below 20 degC the corrections are extrapolated beyond the data they were derived from.",
        )
    report.caution("Temperature-corrected values are model estimates. " + _LOCAL)
    report.say(
        f"At {here}: pH {ph_t:.2f}, PCO2 {report.pressure_text(pco2_t)}"
        + (f", PO2 {report.pressure_text(po2_t)}" if po2_t is not None else "")
        + f"; at 37 degC: pH {ph_37:.2f}, PCO2 {report.pressure_text(pco2_37)}"
        + (f", PO2 {report.pressure_text(po2_37)}." if po2_37 is not None else ".")
    )


# ==================================================================================================
# ventilation


def _read_ie(inputs: Inputs) -> tuple[float, float] | None:
    inputs.read.add("ie_ratio")
    raw = inputs.raw.get("ie_ratio")
    if raw is None:
        return None
    if is_real(raw):
        if 0.1 <= raw <= 10.0:
            return 1.0, float(raw)
        inputs.fail(
            "ie_ratio", raw, "a bare I:E number is E for I = 1 and must be 0.1-10", code="out_of_range"
        )
        return None
    try:
        return vn.parse_ie_ratio(raw)
    except InputError as exc:
        inputs.fail("ie_ratio", raw, exc.problem, exc.hint, code=exc.code)
        return None


def ventilation(inputs: Inputs, report: Report) -> None:
    """Ventilation, dead space, CO2 output, settings for a target PaCO2 and the causes of hypercapnia.

    inputs (docs/bridge.md): ``rr``, ``vt``, ``pco2``, ``vd?``, ``weight?``, ``height?`` and ``sex?``,
    ``vco2?`` (measured), ``temperature?``, ``etco2?`` (paired with ``pco2``), ``peco2?`` (mixed
    expired), ``target_pco2?``, ``etco2_now?``; extras: ``ie_ratio?`` ("1:2" or E for I = 1),
    ``obstructive?`` (COPD/asthma: gas-trapping cautions), ``expiratory_time_constant?`` (s).

    Decisions, each also stated in a step:

    - VCO2: the measured ``vco2``; else from ``peco2`` (VE x PECO2 / 0.863); else estimated by body
      size (2.8 mL/kg/min x actual weight, else x PBW, else 200 mL/min) and raised 10 %/degC above
      37 degC (band 10-13 %, shown as ``vco2_band``).
    - ``vd_vt`` (physiological): Enghoff with ``peco2``; else the alveolar ventilation equation
      1 - 0.863 VCO2 / (PaCO2 VE) with the measured or estimated VCO2 (an estimate's error then
      lands in VD/VT). An entered ``vd`` is the dead-space volume for VA = (VT - VD) x RR, the
      predicted PaCO2 and the fixed-VD targets, and is reported as ``vd_vt_entered``.
    - to_target fixed-VD forms use the entered ``vd``, else VD = VD/VT x VT.
    - Gas trapping: Te < 3 expiratory time constants; the constant is the given one, else an assumed
      0.5 s (1.0 s with ``obstructive``); I:E 1:2 assumed when not given.
    - mechanisms: see :func:`tidewell.formulas.ventilation.co2_mechanisms`; present when PaCO2 > 45 mmHg.
    """
    rr = inputs.number("rr", low=vn.RR_RANGE[0], high=vn.RR_RANGE[1], label="respiratory rate", required=True)
    vt = inputs.quantity(
        "vt", unit="mL", low=vn.VT_RANGE_ML[0], high=vn.VT_RANGE_ML[1], label="tidal volume", required=True
    )
    pco2 = _read_pco2(inputs)
    vd = inputs.quantity("vd", unit="mL", low=10.0, high=1000.0, label="dead space")
    weight = inputs.quantity("weight", unit="kg", low=20.0, high=350.0, label="weight")
    height = inputs.quantity("height", unit="cm", low=120.0, high=230.0, label="height")
    sex = inputs.choice("sex", ("female", "male"), label="sex")
    vco2_measured = inputs.quantity(
        "vco2", unit="mL/min", low=VCO2_LOW_ML_MIN, high=VCO2_HIGH_ML_MIN, label="VCO2"
    )
    temperature = _read_temperature(inputs, low=25.0, high=43.0)
    etco2 = inputs.quantity(
        "etco2", unit="mmHg", low=1.0, high=200.0, label="EtCO2", plausible_word=_PCO2_WORD
    )
    peco2 = inputs.quantity("peco2", unit="mmHg", low=0.5, high=200.0, label="mixed expired PCO2")
    target = inputs.quantity(
        "target_pco2", unit="mmHg", low=20.0, high=120.0, label="target PCO2", plausible_word=_PCO2_WORD
    )
    etco2_now = inputs.quantity(
        "etco2_now", unit="mmHg", low=1.0, high=200.0, label="current EtCO2", plausible_word=_PCO2_WORD
    )
    ie = _read_ie(inputs)
    obstructive = inputs.flag("obstructive", label="obstructive")
    tau = inputs.quantity(
        "expiratory_time_constant", unit="s", low=0.05, high=5.0, label="expiratory time constant"
    )
    if vd is not None and vt is not None and vd >= vt:
        inputs.fail(
            "vd",
            inputs.raw.get("vd"),
            f"dead space must be smaller than the tidal volume ({vt:g} mL)",
            "VD >= VT leaves no alveolar ventilation; check that VD and VT are in mL.",
            code="inconsistent",
        )
    if peco2 is not None and pco2 is not None and peco2 >= pco2:
        inputs.fail(
            "peco2",
            inputs.raw.get("peco2"),
            f"mixed expired PCO2 must be below the arterial PCO2 ({report.pressure_text(pco2)})",
            "Expired gas is diluted by dead space; check the values and units.",
            code="inconsistent",
        )
    if inputs.given("etco2_now") and not inputs.given("etco2"):
        inputs.fail(
            "etco2",
            _ABSENT_REPR,
            "is needed with etco2_now: the EtCO2 measured with the PCO2 sample gives the gradient",
            code="missing",
        )
    if inputs.given("sex") and not inputs.given("height"):
        inputs.fail(
            "height", _ABSENT_REPR, "is needed with sex for the predicted body weight", code="missing"
        )
    inputs.finish()

    ve = vn.minute_ventilation(vt_ml=vt, rr_per_min=rr)
    report.computed(
        "minute_ventilation",
        ve,
        "Minute ventilation",
        "VE = VT x RR",
        "alveolar_ventilation",
        unit="L/min",
        decimals=1,
    )

    # -- body size ---------------------------------------------------------------------------------
    pbw = None
    if height is not None and sex is not None:
        pbw = vn.predicted_body_weight_ardsnet(height_cm=height, sex=sex)
        report.computed(
            "predicted_body_weight",
            pbw,
            "Predicted body weight (ARDSNet)",
            ("50" if sex == "male" else "45.5") + " + 0.91 x (height cm - 152.4)",
            "ardsnet2000",
            unit="kg",
            decimals=1,
        )
        if height < 152.4:
            report.finding(
                "pbw_short_stature",
                "info",
                "The PBW formula is not validated below about 150 cm or in children.",
            )
        per_kg = vn.vt_per_kg(vt_ml=vt, pbw_kg=pbw)
        report.computed(
            "vt_per_kg_pbw", per_kg, "VT per kg PBW", "VT / PBW", "ardsnet2000", unit="mL/kg", decimals=1
        )
        band = vn.lung_protective_vt(pbw_kg=pbw)
        report.put(
            "vt_lung_protective",
            {
                "low": {"value": band.low_ml, "unit": "mL"},
                "target": {"value": band.target_ml, "unit": "mL"},
                "high": {"value": band.high_ml, "unit": "mL"},
            },
            decimals=0,
        )
        report.step(
            "Lung-protective VT (4-8 mL/kg PBW, target 6)",
            "6 (4-8) mL/kg x PBW",
            band.target_ml,
            "ardsnet2000",
            output="vt_lung_protective",
            unit="mL",
        )
        if per_kg > vn.LUNG_PROTECTIVE_ML_PER_KG[2]:
            report.finding(
                "vt_above_protective",
                "notable",
                f"VT is {per_kg:.1f} mL/kg PBW, above the 8 mL/kg limit of lung-protective ventilation.",
            )
        elif per_kg < vn.LUNG_PROTECTIVE_ML_PER_KG[0]:
            report.finding(
                "vt_below_protective",
                "info",
                f"VT is {per_kg:.1f} mL/kg PBW, below 4 mL/kg: dead-space fraction and PaCO2 rise.",
            )
        anat = vn.anatomical_dead_space(pbw_kg=pbw)
        report.computed(
            "anatomical_dead_space",
            anat,
            "Anatomical dead space (estimate)",
            "2.2 mL/kg PBW",
            "numa1996",
            unit="mL",
            decimals=0,
        )
    elif height is not None:
        report.finding(
            "pbw_needs_sex", "notable", "Predicted body weight needs sex (female or male) as well as height."
        )

    # -- VCO2 ------------------------------------------------------------------------------------------
    size_weight, size_word = (
        (weight, "actual weight") if weight is not None else (pbw, "predicted body weight")
    )
    vco2_reference = vn.vco2_resting_estimate(weight_kg=size_weight)
    reference_formula = (
        f"2.8 mL/kg/min x {size_word} (1 MET 3.5 mL O2/kg/min x R 0.8)"
        if size_weight is not None
        else "standard resting adult, no body size given"
    )
    if vco2_measured is not None:
        vco2, vco2_source = vco2_measured, "measured"
        report.step("VCO2 (measured)", "VCO2", vco2, "alveolar_ventilation", output="vco2", unit="mL/min")
        if temperature is not None and temperature > 37.0:
            report.finding(
                "vco2_measured_includes_fever",
                "info",
                "A measured VCO2 already includes the effect of fever.",
            )
    elif peco2 is not None:
        vco2 = vn.vco2_from_expired_co2(ve_l_min=ve, peco2_mmhg=peco2)
        vco2_source = "expired_gas"
        if not 10.0 <= vco2 <= VCO2_HIGH_ML_MIN:
            raise _fail_now(
                "peco2",
                inputs.raw.get("peco2"),
                f"gives a CO2 output of {vco2:.0f} mL/min at a VE of {ve:.1f} L/min (outside 10-1000 mL/min)",
                "Check the mixed expired PCO2 (not end-tidal) and its unit, and VT and RR.",
            )
        report.step(
            "VCO2 from mixed expired PCO2",
            "VCO2 = VE x PECO2 / 0.863",
            vco2,
            "alveolar_ventilation",
            output="vco2",
            unit="mL/min",
        )
    else:
        vco2_source = "estimated"
        report.step(
            "Resting VCO2 estimated by body size",
            reference_formula,
            vco2_reference,
            ("jette1990_met", "resting_vco2"),
            output="vco2",
            unit="mL/min",
        )
        vco2 = vco2_reference
        if temperature is not None and temperature > 37.0:
            vco2 = vn.vco2_with_fever(vco2_ml_min=vco2_reference, temperature_c=temperature)
            low = vn.vco2_with_fever(
                vco2_ml_min=vco2_reference, temperature_c=temperature, rate_per_degc=vn.FEVER_RATE_BAND[0]
            )
            high = vn.vco2_with_fever(
                vco2_ml_min=vco2_reference, temperature_c=temperature, rate_per_degc=vn.FEVER_RATE_BAND[1]
            )
            report.step(
                f"VCO2 raised for fever ({temperature:.1f} degC)",
                "VCO2 x (1 + 0.10 x (T - 37)), linear; band 10-13 %/degC",
                vco2,
                "fever_vco2",
                output="vco2",
                unit="mL/min",
            )
            report.put(
                "vco2_band",
                {"low": {"value": low, "unit": "mL/min"}, "high": {"value": high, "unit": "mL/min"}},
                decimals=0,
            )
        elif temperature is not None and temperature < 36.0:
            report.finding(
                "vco2_hypothermia_not_modelled",
                "info",
                "Hypothermia lowers CO2 production (about 7-8 % per degC, from memory); the estimate is not "
                "lowered, so it is probably high and the dead-space estimate low.",
            )
        if weight is not None and pbw is not None and weight > 1.3 * pbw:
            report.finding(
                "vco2_estimate_obesity",
                "info",
                "The per-kg VCO2 estimate uses actual weight, which overstates CO2 output in obesity.",
            )
        if size_weight is not None and size_weight < 40.0:
            report.finding(
                "vco2_estimate_small", "info", "The per-kg VCO2 estimate is an adult rule; children differ."
            )
    report.quantity("vco2", vco2, "mL/min", decimals=0)
    report.put("vco2_source", vco2_source)

    # -- dead space ----------------------------------------------------------------------------------
    vd_vt = None
    if peco2 is not None:
        vd_vt = vn.vd_vt_enghoff(paco2_mmhg=pco2, peco2_mmhg=peco2)
        method = "enghoff"
        report.step(
            "VD/VT (Enghoff: arterial and mixed expired PCO2)",
            "VD/VT = (PaCO2 - PECO2) / PaCO2",
            vd_vt,
            ("enghoff1938", "tusman2012"),
            output="vd_vt",
        )
    else:
        method = "equation_measured_vco2" if vco2_source == "measured" else "equation_estimated_vco2"
        try:
            vd_vt = vn.vd_vt_from_vco2(paco2_mmhg=pco2, vco2_ml_min=vco2, ve_l_min=ve)
        except InputError as exc:
            if vco2_source == "measured":
                raise _fail_now("vco2", inputs.raw.get("vco2"), exc.problem, exc.hint) from None
            report.finding(
                "vco2_estimate_does_not_fit",
                "notable",
                f"The estimated VCO2 ({vco2:.0f} mL/min) does not fit a VE of {ve:.1f} L/min at this PaCO2 "
                f"(VD/VT would be outside 0-1), so VD/VT, VA and the mechanisms are not given. The patient's "
                "CO2 output is probably lower than the estimate, or VT/RR differ from those entered; a "
                "measured VCO2 or PECO2 would settle it.",
            )
            vd_vt = None
        if vd_vt is not None:
            report.step(
                "VD/VT from the alveolar ventilation equation ("
                + ("measured" if vco2_source == "measured" else "estimated")
                + " VCO2)",
                "VD/VT = 1 - 0.863 x VCO2 / (PaCO2 x VE)",
                vd_vt,
                "alveolar_ventilation",
                output="vd_vt",
            )
    if vd_vt is not None:
        report.put("vd_vt", vd_vt, decimals=2)
        report.put("vd_vt_method", method)
        if vd_vt > 0.6:
            report.finding(
                "dead_space_high",
                "notable",
                f"VD/VT {vd_vt:.2f} is well above normal (0.2-0.35)"
                + (
                    "; with an estimated VCO2 this may partly be an error of the estimate."
                    if method == "equation_estimated_vco2"
                    else "."
                ),
            )
        elif vd_vt < 0.15 and method == "equation_estimated_vco2":
            report.finding(
                "dead_space_implausibly_low",
                "info",
                f"VD/VT {vd_vt:.2f} is below anatomical dead space alone: the VCO2 estimate is likely high.",
            )
    if etco2 is not None:
        adsf = vn.alveolar_dead_space_fraction(paco2_mmhg=pco2, etco2_mmhg=etco2)
        report.computed(
            "pco2_etco2_gradient",
            pco2 - etco2,
            "Arterial to end-tidal PCO2 gradient",
            "PaCO2 - EtCO2",
            "etco2_gradient",
            pressure=True,
        )
        if adsf >= 0.0:
            report.computed(
                "alveolar_dead_space_fraction",
                adsf,
                "Alveolar dead-space fraction (from EtCO2)",
                "(PaCO2 - EtCO2) / PaCO2",
                ("tusman2012", "nunn1960"),
                decimals=2,
            )
        else:
            report.finding(
                "etco2_above_pco2",
                "notable",
                "EtCO2 is above the arterial PCO2: check that they were measured together; it can occur "
                "with large tidal volumes and low rates.",
            )
        if peco2 is not None:
            if peco2 < etco2:
                bohr = vn.vd_vt_bohr(paco2_alveolar_mmhg=etco2, peco2_mmhg=peco2)
                report.computed(
                    "vd_vt_bohr",
                    bohr,
                    "VD/VT (Bohr, end-tidal PCO2 as alveolar)",
                    "VD/VT = (PetCO2 - PECO2) / PetCO2",
                    ("bohr1891", "tusman2012"),
                    decimals=2,
                )
            else:
                report.finding(
                    "peco2_above_etco2", "notable", "Mixed expired PCO2 is not below EtCO2: check the values."
                )
    if etco2 is not None and etco2_now is not None:
        track = vn.pco2_from_etco2(paco2_mmhg=pco2, etco2_mmhg=etco2, etco2_now_mmhg=etco2_now)
        report.computed(
            "pco2_estimated_now",
            track.paco2_now_mmhg,
            "Current PaCO2 tracked from EtCO2 (gradient assumed constant)",
            "PaCO2_now = EtCO2_now + (PaCO2 - EtCO2)",
            "etco2_gradient",
            pressure=True,
        )
        report.caution(
            "EtCO2 tracking assumes the arterial to end-tidal gradient is unchanged; it changes with dead "
            "space, cardiac output, position and ventilator settings. Confirm with a blood gas."
        )

    # -- alveolar ventilation ------------------------------------------------------------------------
    va_effective = ve * (1.0 - vd_vt) if vd_vt is not None else None
    if vd is not None:
        va = vn.alveolar_ventilation(vt_ml=vt, vd_ml=vd, rr_per_min=rr)
        report.computed(
            "alveolar_ventilation",
            va,
            "Alveolar ventilation (entered dead space)",
            "VA = (VT - VD) x RR",
            "alveolar_ventilation",
            unit="L/min",
            decimals=2,
        )
        report.put("vd_vt_entered", vd / vt, decimals=2)
        predicted = vn.paco2_from_alveolar_ventilation(vco2_ml_min=vco2, va_l_min=va)
        report.computed(
            "pco2_predicted",
            predicted,
            f"PaCO2 predicted from VA and the {vco2_source.replace('_', ' ')} VCO2",
            "PaCO2 = 0.863 x VCO2 / VA",
            "alveolar_ventilation",
            pressure=True,
            inputs={"k": vn.K_CO2},
        )
        if predicted > PCO2_HIGH_MMHG:
            report.finding(
                "pco2_predicted_not_survivable",
                "urgent",
                f"With the entered VT, VD and RR the predicted PaCO2 is {report.pressure_text(predicted)}: "
                "these settings "
                "could not sustain life; check the dead space and the tidal volume.",
            )
        elif pco2 - predicted > 5.0:
            report.finding(
                "pco2_above_predicted",
                "info",
                f"The PaCO2 is {report.pressure_text(pco2 - predicted)} above the value predicted from the "
                "entered dead "
                "space: the physiological dead space is probably larger than entered"
                + (", or CO2 output higher than estimated." if vco2_source == "estimated" else "."),
            )
        if va_effective is not None:
            report.quantity("alveolar_ventilation_effective", va_effective, "L/min", decimals=2)
    elif va_effective is not None:
        report.computed(
            "alveolar_ventilation",
            va_effective,
            "Alveolar ventilation (effective, from VD/VT)",
            "VA = VE x (1 - VD/VT)",
            "alveolar_ventilation",
            unit="L/min",
            decimals=2,
        )

    # -- timing ----------------------------------------------------------------------------------------
    i_part, e_part = ie if ie is not None else (1.0, 2.0)
    tau_used = tau if tau is not None else (1.0 if obstructive else 0.5)
    te_min = 3.0 * tau_used
    tau_word = "given" if tau is not None else ("assumed, obstructive" if obstructive else "assumed")
    if ie is not None:
        timing = vn.respiratory_timing(rr_per_min=rr, i_part=i_part, e_part=e_part)
        report.quantity("expiratory_time", timing.te_s, "s", decimals=2)
        report.quantity("inspiratory_time", timing.ti_s, "s", decimals=2)
        report.step(
            "Expiratory time",
            "Te = (60 / RR) x E / (I + E)",
            timing.te_s,
            "expiratory_time",
            output="expiratory_time",
            unit="s",
        )
        report.step(
            "Inspiratory time",
            "Ti = 60 / RR - Te",
            timing.ti_s,
            "expiratory_time",
            output="inspiratory_time",
            unit="s",
        )
        if timing.te_s < te_min:
            report.finding(
                "expiratory_time_short",
                "urgent" if obstructive else "notable",
                f"Te {timing.te_s:.2f} s is under 3 expiratory time constants ({te_min:.1f} s, time constant "
                f"{tau_used:g} s {tau_word}): risk of gas trapping and auto-PEEP.",
            )
    if obstructive:
        report.caution(
            "Obstructive disease: prefer a low rate and a long expiratory time; check that expiratory flow "
            "returns to zero and measure auto-PEEP before raising the rate. " + _LOCAL
        )

    # -- to target -------------------------------------------------------------------------------------
    if target is not None:
        _to_target(
            report,
            vt=vt,
            rr=rr,
            ve=ve,
            pco2=pco2,
            target=target,
            vd=vd,
            vd_vt=vd_vt,
            pbw=pbw,
            ie=(i_part, e_part),
            ie_given=ie is not None,
            te_min=te_min,
            tau_used=tau_used,
            tau_word=tau_word,
            obstructive=obstructive,
        )

    # -- mechanisms ------------------------------------------------------------------------------------
    if pco2 > vn.PACO2_NORMAL_HIGH_MMHG:
        if vd_vt is None:
            report.finding(
                "mechanisms_not_computed",
                "info",
                "The causes of the raised PaCO2 cannot be split without a usable VD/VT.",
            )
        else:
            _mechanisms(
                report,
                pco2=pco2,
                ve=ve,
                vd_vt=vd_vt,
                vco2=vco2,
                vco2_reference=vco2_reference,
                vco2_source=vco2_source,
                vd_vt_method=method,
                reference_formula=reference_formula,
            )
    report.say(
        f"VE {ve:.1f} L/min"
        + (f", VD/VT {vd_vt:.2f}" if vd_vt is not None else "")
        + f", VCO2 {vco2:.0f} mL/min ({vco2_source.replace('_', ' ')})."
    )
    report.caution("Ventilation estimates assume a steady state. " + _LOCAL)


def _to_target(
    report: Report,
    *,
    vt,
    rr,
    ve,
    pco2,
    target,
    vd,
    vd_vt,
    pbw,
    ie,
    ie_given,
    te_min,
    tau_used,
    tau_word,
    obstructive,
) -> None:
    out: dict = {}
    ve_new = ve * pco2 / target
    out["minute_ventilation"] = {"value": ve_new, "unit": "L/min"}
    report.step(
        "VE for the target PaCO2 (VD/VT and VCO2 unchanged)",
        "VE_new = VE x PaCO2 / PaCO2_target",
        ve_new,
        "to_target_pco2",
        output="to_target",
        unit="L/min",
    )
    vd_fixed = vd if vd is not None else (vd_vt * vt if vd_vt is not None else None)
    if vd_fixed is None:
        report.finding(
            "to_target_needs_dead_space",
            "info",
            "RR and VT for the target need a dead space (vd, peco2 or a usable VD/VT); only VE is given.",
        )
    else:
        r = vn.to_target(vt_ml=vt, rr_per_min=rr, vd_ml=vd_fixed, paco2_mmhg=pco2, target_paco2_mmhg=target)
        out["rr_at_same_vt"] = r.rr_at_same_vt
        out["vt_at_same_rr"] = {"value": r.vt_at_same_rr_ml, "unit": "mL"}
        out["alveolar_ventilation"] = {"value": r.va_new_l_min, "unit": "L/min"}
        out["dead_space_used"] = {"value": vd_fixed, "unit": "mL"}
        vd_word = "entered VD" if vd is not None else "VD = VD/VT x VT"
        report.step(
            f"Alveolar ventilation for the target (fixed dead space, {vd_word} {vd_fixed:.0f} mL)",
            "VA_new = (VT - VD) x RR x PaCO2 / PaCO2_target",
            r.va_new_l_min,
            "to_target_pco2",
            output="to_target",
            unit="L/min",
        )
        report.step(
            "RR at the same VT",
            "RR_new = VA_new / (VT - VD)",
            r.rr_at_same_vt,
            "to_target_pco2",
            output="to_target",
        )
        report.step(
            "VT at the same RR",
            "VT_new = VA_new / RR + VD",
            r.vt_at_same_rr_ml,
            "to_target_pco2",
            output="to_target",
            unit="mL",
        )
        if pbw is not None:
            per_kg = r.vt_at_same_rr_ml / pbw
            out["vt_at_same_rr_per_kg_pbw"] = {"value": per_kg, "unit": "mL/kg"}
            if per_kg > vn.LUNG_PROTECTIVE_ML_PER_KG[2]:
                report.finding(
                    "target_vt_above_protective",
                    "notable",
                    f"Reaching the target at the same RR needs VT {r.vt_at_same_rr_ml:.0f} mL ({per_kg:.1f} "
                    "mL/kg PBW), above the 8 mL/kg lung-protective limit: prefer a higher rate if expiratory "
                    "time allows, or accept a higher PaCO2.",
                )
        else:
            report.finding(
                "target_vt_unchecked",
                "info",
                "Give height and sex to check the VT for the target against 6-8 mL/kg PBW.",
            )
        if r.rr_at_same_vt > vn.RR_RANGE[1]:
            report.finding(
                "target_rr_unreachable",
                "urgent",
                f"The target needs a rate of {r.rr_at_same_vt:.0f}/min at this VT, beyond any safe setting.",
            )
        te_new = vn.respiratory_timing(
            rr_per_min=min(max(r.rr_at_same_vt, 0.1), 150.0), i_part=ie[0], e_part=ie[1]
        ).te_s
        out["expiratory_time_at_new_rr"] = {"value": te_new, "unit": "s"}
        if te_new < te_min:
            report.finding(
                "target_rr_short_expiration",
                "urgent" if obstructive else "notable",
                f"At {r.rr_at_same_vt:.0f}/min the expiratory time would be {te_new:.2f} s "
                f"(I:E {ie[0]:g}:{ie[1]:g}{'' if ie_given else ' assumed'}), under 3 time constants "
                f"({te_min:.1f} s, {tau_used:g} s {tau_word}): risk of gas trapping and auto-PEEP.",
            )
    report.put("to_target", out, decimals=1)
    _settings(report, out, rr=rr, vt=vt, target=target, pbw=pbw, ie=ie, te_min=te_min)
    if target < pco2:
        report.caution(
            "If the patient has chronic hypercapnia, aim for their usual PaCO2 rather than "
            f"{report.pressure_text(40.0)} and "
            "lower it gradually: fast correction causes post-hypercapnic alkalosis. " + _LOCAL
        )
    report.caution(
        "Target settings assume CO2 output stays the same; recheck a blood gas once a change has settled "
        "(commonly 15-30 minutes)."
    )


def _whole(x: float, step: float) -> float:
    """``x`` rounded to the nearest multiple of ``step``, halves away from zero (22.5 -> 23)."""
    return math.floor(x / step + 0.5) * step


#: the rates a summary offers as a setting [/min]: 6 to 35 (35 is the ARDSNet protocol's maximum, ardsnet2000;
#: below 6 a ventilator rate is no plan; common practice)
SETTING_RR_RANGE = (6.0, 35.0)


def _settings(
    report: Report,
    out: dict,
    *,
    rr: float,
    vt: float,
    target: float,
    pbw: float | None,
    ie: tuple[float, float],
    te_min: float | None,
) -> None:
    """The settings asked for, as a ventilator is set (common practice): a rate in whole breaths per
    minute and a tidal volume to 10 mL; the first sentence of the summary. Each rounded option is checked
    against safe limits before it is worded (rate 6-35/min, VT at most 8 mL/kg PBW when height and sex are
    given, an expiratory time of at least 3 time constants when known): an option outside them is said to be
    not reachable safely, in the same sentence, never offered."""
    aim = f"To reach PaCO2 {report.pressure_text(target)}"
    if "rr_at_same_vt" not in out:
        ve_new = out["minute_ventilation"]["value"]
        report.say(f"{aim}: minute ventilation about {ve_new:.1f} L/min (no dead space to split it by).")
        return
    rr_set = int(_whole(out["rr_at_same_vt"], 1.0))
    vt_exact = out["vt_at_same_rr"]["value"]
    vt_set = _whole(vt_exact, 10.0)
    limit = vn.LUNG_PROTECTIVE_ML_PER_KG[2]
    if pbw is not None and vt_set / pbw > limit >= vt_exact / pbw:
        vt_set -= 10.0  # rounding must not carry the VT over 8 mL/kg
    report.put(
        "settings",
        {"rr": {"value": rr_set, "unit": "/min"}, "vt": {"value": vt_set, "unit": "mL"}},
        decimals=0,
    )
    report.step(
        "Settings as a ventilator takes them",
        "rate to whole breaths per minute, tidal volume to 10 mL",
        rr_set,
        "to_target_pco2",
        output="settings",
        inputs={"rr_exact_per_min": out["rr_at_same_vt"], "vt_exact_ml": vt_exact},
    )
    # each option checked as rounded
    te_set = vn.respiratory_timing(
        rr_per_min=min(max(float(rr_set), 0.1), 150.0), i_part=ie[0], e_part=ie[1]
    ).te_s
    rate_why = []
    if not SETTING_RR_RANGE[0] <= rr_set <= SETTING_RR_RANGE[1]:
        rate_why.append(
            f"a rate of {rr_set}/min is outside {SETTING_RR_RANGE[0]:.0f}-{SETTING_RR_RANGE[1]:.0f}/min"
        )
    elif te_min is not None and te_set < te_min:
        rate_why.append(f"at {rr_set}/min the expiration would be shorter than 3 time constants")
    vt_why = []
    if pbw is not None and vt_set / pbw > limit:
        vt_why.append(f"VT {vt_set:.0f} mL is {vt_set / pbw:.1f} mL/kg PBW, above {limit:g}")
    rate = (
        f"rate {rr_set}/min at VT {vt:.0f} mL"
        if not rate_why
        else f"not reachable safely by rate alone ({rate_why[0]})"
    )
    volume = (
        f"VT {vt_set:.0f} mL at rate {rr:g}/min"
        if not vt_why
        else f"not reachable safely by VT alone ({vt_why[0]})"
    )
    if rate_why and vt_why:
        report.say(
            f"{aim}: {rate}; {volume}. Consider a combination, or accepting a higher PaCO2, with senior "
            "advice."
        )
    else:
        report.say(
            f"{aim}: {rate}, or {volume} (minute ventilation {out['minute_ventilation']['value']:.1f} L/min)."
        )


_CAUSE_WORDS = {
    "ventilation": "low minute ventilation",
    "dead_space": "high dead-space fraction",
    "co2_production": "high CO2 production",
}


def _mechanisms(
    report: Report,
    *,
    pco2,
    ve,
    vd_vt,
    vco2,
    vco2_reference,
    vco2_source,
    vd_vt_method,
    reference_formula,
) -> None:
    m = vn.co2_mechanisms(
        paco2_mmhg=pco2, ve_l_min=ve, vd_vt=vd_vt, vco2_ml_min=vco2, vco2_reference_ml_min=vco2_reference
    )
    ref = vn.PACO2_REFERENCE_MMHG
    report.step(
        f"Reference VE (gives {report.pressure_text(ref)} with the reference VCO2 and VD/VT 0.30)",
        "VE_ref = 0.863 x VCO2_ref / (40 x (1 - 0.30))",
        m.ve_reference_l_min,
        ("co2_log_shares", "normal_ventilation"),
        output="mechanisms_detail",
        unit="L/min",
        inputs={"vco2_ref_ml_min": vco2_reference, "vco2_ref_rule": reference_formula},
    )
    for cause in vn.CAUSES:
        formula = {
            "ventilation": "ln(VE_ref / VE)",
            "dead_space": "ln((1 - 0.30) / (1 - VD/VT))",
            "co2_production": "ln(VCO2 / VCO2_ref)",
        }[cause]
        report.step(
            f"Log contribution: {_CAUSE_WORDS[cause]}",
            formula,
            m.log_terms[cause],
            "co2_log_shares",
            output="mechanisms_detail",
        )
    sources = {
        "minute_ventilation": "measured",
        "vco2": vco2_source,
        "vd_vt": vd_vt_method,
    }
    detail = {
        "reference": {
            "pco2": report.pressure_value(ref),
            "minute_ventilation": {"value": m.ve_reference_l_min, "unit": "L/min"},
            "vd_vt": vn.VD_VT_REFERENCE,
            "vco2": {"value": vco2_reference, "unit": "mL/min"},
        },
        "log_terms": dict(m.log_terms),
        "residual_log": m.residual_log,
        "raising": list(m.raising),
        "lowering": list(m.lowering),
        "pco2_if_normal": {c: report.pressure_value(v) for c, v in m.paco2_if_normal_mmhg.items()},
        "sources": sources,
    }
    report.put("mechanisms_detail", detail, decimals=2)
    if abs(m.residual_log) > 1e-9:
        report.step(
            "Unexplained part (measured values do not close the equation)",
            "ln(PaCO2 / (0.863 VCO2 / (VE (1 - VD/VT))))",
            m.residual_log,
            "co2_log_shares",
            output="mechanisms_detail",
        )
        if abs(m.residual_log) > math.log(1.1):
            report.finding(
                "mechanisms_residual",
                "notable",
                "The measured VCO2, VE and VD/VT predict a PaCO2 of "
                f"{report.pressure_text(m.paco2_model_mmhg)} against "
                f"{report.pressure_text(pco2)} measured; the shares describe the predicted part. Check that "
                "the values "
                "were measured together.",
            )
    if m.shares is None:
        report.finding(
            "mechanisms_unexplained",
            "notable",
            "None of the three causes is above its reference, yet the PaCO2 is raised: the measured values "
            "disagree with each other.",
        )
        return
    report.put("mechanisms", m.shares, decimals=2)
    for cause in vn.CAUSES:
        report.step(
            f"Share of the CO2 excess: {_CAUSE_WORDS[cause]}",
            "term / sum of the positive terms (0 for a cause that lowers PaCO2)",
            m.shares[cause],
            "co2_log_shares",
            output="mechanisms",
        )
    main = max(m.raising, key=lambda c: m.shares[c])
    parts = ", ".join(f"{_CAUSE_WORDS[c]} {m.shares[c] * 100:.0f} %" for c in m.raising)
    text = (
        f"Against a reference of PaCO2 {report.pressure_text(ref)}, VE {m.ve_reference_l_min:.1f} L/min, "
        "VD/VT 0.30 and VCO2 "
        f"{vco2_reference:.0f} mL/min, the raised PaCO2 is attributed to: {parts}."
    )
    if m.lowering:
        text += (
            " Offsetting (lowering PaCO2): "
            + ", ".join(
                f"{c.replace('_', ' ')} (PaCO2 would be {report.pressure_text(m.paco2_if_normal_mmhg[c])} if "
                "it were at "
                "reference)"
                for c in m.lowering
            )
            + "."
        )
    report.finding("hypercapnia_mechanisms", "notable", text)
    if vco2_source == "estimated":
        report.finding(
            "mechanisms_vco2_estimated",
            "info",
            "VCO2 was estimated, not measured, and VD/VT was derived from it: any error of the estimate "
            "moves into the dead-space share (a VCO2 higher than estimated shows up as less dead space). "
            "VE was measured (VT x RR as entered).",
        )
    elif vco2_source == "expired_gas":
        report.finding(
            "mechanisms_from_expired_gas",
            "info",
            "VCO2 and VD/VT both come from the mixed expired PCO2 (measured); VE as entered.",
        )
    else:
        report.finding(
            "mechanisms_measured",
            "info",
            "VCO2 was measured and VD/VT derived from it, PaCO2 and VE: the shares rest on measurements.",
        )
    rough = " (a rough split: VCO2 was estimated, not measured)" if vco2_source == "estimated" else ""
    share = m.shares[main] * 100
    report.say(f"The raised PaCO2 is mostly due to {_CAUSE_WORDS[main]} ({share:.0f} %){rough}.")
