"""The ``ventilation`` calculation.

=============================  ====================================================================
``ventilation``                VE, VA, VD/VT, VCO2, PBW, to-target settings, the mechanisms of a
                               raised PaCO2, EtCO2 tracking
=============================  ====================================================================

:func:`ventilation` runs its steps in order (reading, minute ventilation, body size, CO2 output, dead space,
alveolar ventilation, timing, settings for a target PaCO2, causes of hypercapnia, summary); each step reads
what the earlier ones left in a shared namespace and leaves what the later ones need.
"""

from __future__ import annotations

import math
from types import SimpleNamespace

from ..errors import InputError, is_real
from ..fields import _ABSENT_REPR, Inputs
from ..formulas import ventilation as vn
from ..report import Report
from ._readings import _LOCAL, _PCO2_WORD, PCO2_HIGH_MMHG, _fail_now, _read_pco2, _read_temperature

#: accepted measured VCO2 [mL/min] (resting_vco2; common practice)
VCO2_LOW_ML_MIN, VCO2_HIGH_ML_MIN = 50.0, 1000.0


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
    v = SimpleNamespace(inputs=inputs, report=report)
    _read_ventilation(v)
    _minute_ventilation(v)
    _body_size(v)
    _co2_output(v)
    _dead_space(v)
    _alveolar_ventilation(v)
    _timing(v)
    _settings_for_target(v)
    _causes_of_hypercapnia(v)
    _ventilation_summary(v)


def _read_ventilation(v: SimpleNamespace) -> None:
    """Read the inputs and check them against each other."""
    inputs, report = v.inputs, v.report
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
    (
        v.etco2,
        v.etco2_now,
        v.height,
        v.ie,
        v.obstructive,
        v.pco2,
        v.peco2,
        v.rr,
        v.sex,
        v.target,
        v.tau,
        v.temperature,
        v.vco2_measured,
        v.vd,
        v.vt,
        v.weight,
    ) = (
        etco2,
        etco2_now,
        height,
        ie,
        obstructive,
        pco2,
        peco2,
        rr,
        sex,
        target,
        tau,
        temperature,
        vco2_measured,
        vd,
        vt,
        weight,
    )


def _minute_ventilation(v: SimpleNamespace) -> None:
    """Minute ventilation."""
    report, rr, vt = v.report, v.rr, v.vt
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
    v.ve = ve


def _body_size(v: SimpleNamespace) -> None:
    """Predicted body weight, VT per kg PBW, the lung-protective band and the anatomical dead space."""
    height, report, sex, vt = v.height, v.report, v.sex, v.vt
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
    v.pbw = pbw


def _co2_output(v: SimpleNamespace) -> None:
    """CO2 output (VCO2): measured, from mixed expired gas, or estimated by body size and fever."""
    inputs, pbw, peco2, report, temperature, vco2_measured, ve, weight = (
        v.inputs,
        v.pbw,
        v.peco2,
        v.report,
        v.temperature,
        v.vco2_measured,
        v.ve,
        v.weight,
    )
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
    v.reference_formula, v.vco2, v.vco2_reference, v.vco2_source = (
        reference_formula,
        vco2,
        vco2_reference,
        vco2_source,
    )


def _dead_space(v: SimpleNamespace) -> None:
    """Dead-space fraction (Enghoff, or the alveolar ventilation equation) and the EtCO2 gradient."""
    etco2, etco2_now, inputs, pco2, peco2, report, vco2, vco2_source, ve = (
        v.etco2,
        v.etco2_now,
        v.inputs,
        v.pco2,
        v.peco2,
        v.report,
        v.vco2,
        v.vco2_source,
        v.ve,
    )
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
    v.method, v.vd_vt = method, vd_vt


def _alveolar_ventilation(v: SimpleNamespace) -> None:
    """Alveolar ventilation and the PaCO2 it predicts."""
    pco2, report, rr, vco2, vco2_source, vd, vd_vt, ve, vt = (
        v.pco2,
        v.report,
        v.rr,
        v.vco2,
        v.vco2_source,
        v.vd,
        v.vd_vt,
        v.ve,
        v.vt,
    )
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


def _timing(v: SimpleNamespace) -> None:
    """Expiratory and inspiratory time, and the risk of gas trapping."""
    ie, obstructive, report, rr, tau = v.ie, v.obstructive, v.report, v.rr, v.tau
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
    v.e_part, v.i_part, v.tau_used, v.tau_word, v.te_min = e_part, i_part, tau_used, tau_word, te_min


def _settings_for_target(v: SimpleNamespace) -> None:
    """Settings for a target PaCO2."""
    (
        e_part,
        i_part,
        ie,
        obstructive,
        pbw,
        pco2,
        report,
        rr,
        target,
        tau_used,
        tau_word,
        te_min,
        vd,
        vd_vt,
        ve,
        vt,
    ) = (
        v.e_part,
        v.i_part,
        v.ie,
        v.obstructive,
        v.pbw,
        v.pco2,
        v.report,
        v.rr,
        v.target,
        v.tau_used,
        v.tau_word,
        v.te_min,
        v.vd,
        v.vd_vt,
        v.ve,
        v.vt,
    )
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


def _causes_of_hypercapnia(v: SimpleNamespace) -> None:
    """Why the PaCO2 is high (when it is above 45 mmHg)."""
    method, pco2, reference_formula, report, vco2, vco2_reference, vco2_source, vd_vt, ve = (
        v.method,
        v.pco2,
        v.reference_formula,
        v.report,
        v.vco2,
        v.vco2_reference,
        v.vco2_source,
        v.vd_vt,
        v.ve,
    )
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


def _ventilation_summary(v: SimpleNamespace) -> None:
    """The summary sentence and the steady-state caution."""
    report, vco2, vco2_source, vd_vt, ve = v.report, v.vco2, v.vco2_source, v.vd_vt, v.ve
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
