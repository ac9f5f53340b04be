"""The ``temperature_correction`` calculation.

=============================  ====================================================================
``temperature_correction``     pH, PCO2, PO2 between 37 degC and the patient's temperature
=============================  ====================================================================
"""

from __future__ import annotations

from ..fields import Inputs
from ..formulas import temperature as tc
from ..report import Report
from ._readings import _LOCAL, _read_pco2, _read_po2, _read_temperature

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
