"""The ``oxygen_content`` calculation.

=============================  ====================================================================
``oxygen_content``             SaO2 (measured or from the curve), CaO2, DO2
=============================  ====================================================================
"""

from __future__ import annotations

from ..fields import _ABSENT_REPR, Inputs
from ..formulas import oxygenation as ox
from ..report import Report
from ._readings import _LOCAL, _read_pco2, _read_po2, _shift

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
