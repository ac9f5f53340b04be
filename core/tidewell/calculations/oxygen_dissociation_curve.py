"""The ``oxygen_dissociation_curve`` calculation.

=============================  ====================================================================
``oxygen_dissociation_curve``  the standard and the patient's curve as arrays for a plot (numpy)
=============================  ====================================================================

numpy is imported only inside :func:`oxygen_dissociation_curve`.
"""

from __future__ import annotations

import math

from ..fields import Inputs
from ..formulas import oxygenation as ox
from ..formulas import temperature as tc
from ..report import Report
from ._readings import _read_pco2, _read_po2, _read_temperature, _shift

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
