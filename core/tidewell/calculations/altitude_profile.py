"""The ``altitude_profile`` calculation.

====================  ==========================================================================
``altitude_profile``  the physiology of ``altitude`` as lists from the origin up to a ceiling, for a
                      plot (numpy is imported inside this function only)
====================  ==========================================================================

The reading, defaults and decisions it shares with ``altitude`` are in ``_flight``.
"""

from __future__ import annotations

from .. import units
from ..fields import Inputs
from ..formulas import altitude as alt
from ..report import Report
from ._flight import (
    INFLIGHT_PO2_THRESHOLD_MMHG,
    _alt_text,
    _altitude_outputs,
    _equation_text,
    _findings,
    _p,
    _physiology,
    _read_flight,
)

# --------------------------------------------------------------------------------------------------
# altitude_profile


def altitude_profile(inputs: Inputs, report: Report) -> None:
    """The ``altitude_profile`` calculation: PAO2 and predicted PaO2 from the origin up to ``ceiling``.

    Inputs as ``altitude`` plus ``ceiling?`` (default 3,000 m) and ``points?`` (default 61, 2-401).
    Outputs ``altitude`` ``{"value": [...], "unit"}`` (the unit of the ``altitude`` input, else m),
    ``pb``, ``fio2_needed`` and, each as ``{"at_fio2": Q, "at_fio2_equivalent": Q}`` with Q a pressure
    ``{"value": [...], "unit"}``, ``pao2_alveolar`` and (with ``po2``) ``po2_predicted``; the curve "at
    fio2_equivalent" uses ``fio2_equivalent`` for the cabin altitude, limited to 0.21-``fio2_max``
    (``fio2_profile`` says which FiO2 each curve used).
    """
    import numpy as np  # only here: importing the flight calculations stays numpy-free

    f = _read_flight(inputs, report, profile=True)
    ph = _physiology(f)
    eq = f.alveolar
    f_eq_used = min(max(ph.fio2_equivalent, 0.21), f.fio2_max)

    heights = np.linspace(f.origin_m, f.ceiling_m, f.points)
    pb = np.array([alt.pressure_at_altitude_isa(altitude_m=float(h)) for h in heights])

    def curve(fio2: float) -> np.ndarray:
        values = [eq(fio2_fraction=fio2, paco2_mmhg=f.pco2, pb_mmhg=float(p), rq=f.rq) for p in pb]
        return np.maximum(np.array(values), 0.0)

    pao2_now, pao2_eq = curve(f.fio2), curve(f_eq_used)
    fio2_needed = f.fio2 * (f.pb_origin - 47.0) / (pb - 47.0)
    to_user = units.convert(1.0, "mmHg", report.pressure_unit)
    pdec = 2 if report.pressure_unit == "kPa" else 1

    def plist(arr: np.ndarray) -> dict:
        return {"value": (arr * to_user).tolist(), "unit": report.pressure_unit}

    report.put(
        "altitude",
        {"value": [units.convert(float(h), "m", f.unit) for h in heights], "unit": f.unit},
        decimals=0,
    )
    report.step(
        "Altitudes of the profile",
        f"{f.points} evenly spaced ISA altitudes from the origin to the ceiling",
        units.convert(f.ceiling_m, "m", f.unit),
        "icao7488",
        output="altitude",
        unit=f.unit,
    )
    report.put("pb", plist(pb), decimals=pdec)
    report.step(
        "Barometric pressure along the profile (ICAO standard atmosphere)",
        "PB(h) = 101325 Pa x (1 - 0.0065 h / 288.15) ^ 5.255877; result shown at the ceiling",
        float(pb[-1]),
        ("icao7488", "ussa1976"),
        output="pb",
        pressure=True,
    )
    report.computed(
        "fio2_equivalent",
        ph.fio2_equivalent,
        f"FiO2 that keeps the origin's alveolar PO2 at the cabin altitude {_alt_text(f.cabin_m, f.unit)}",
        "FiO2 x (PB_origin - 47) / (PB - 47)",
        ("fio2_altitude_rules", "alveolar_gas_1946"),
        decimals=3,
    )
    report.put("fio2_profile", {"at_fio2": f.fio2, "at_fio2_equivalent": f_eq_used}, decimals=3)
    report.step(
        "FiO2 of the second curve",
        f"fio2_equivalent limited to 0.21-{f.fio2_max:.2f} (fio2_max)",
        f_eq_used,
        "alveolar_gas_1946",
        output="fio2_profile",
    )
    report.put("fio2_needed", fio2_needed.tolist(), decimals=3)
    report.step(
        "FiO2 that keeps the origin's alveolar PO2 at each altitude (above 1 means none can)",
        "FiO2 x (PB_origin - 47) / (PB(h) - 47); result shown at the ceiling",
        float(fio2_needed[-1]),
        "fio2_altitude_rules",
        output="fio2_needed",
    )
    report.put(
        "pao2_alveolar", {"at_fio2": plist(pao2_now), "at_fio2_equivalent": plist(pao2_eq)}, decimals=pdec
    )
    report.step(
        f"Alveolar PO2 along the profile ({f.equation} equation), PaCO2 {_p(report, f.pco2)}"
        + (" (assumed)" if f.pco2_assumed else "")
        + ", R unchanged",
        _equation_text(f, pb="PB(h)") + "; 0 where the equation gives 0 or less; result shown at the ceiling",
        float(pao2_now[-1]),
        "alveolar_gas_1946",
        output="pao2_alveolar",
        pressure=True,
    )
    if ph.a_over_a is not None:
        report.put(
            "po2_predicted",
            {"at_fio2": plist(ph.a_over_a * pao2_now), "at_fio2_equivalent": plist(ph.a_over_a * pao2_eq)},
            decimals=pdec,
        )
        report.step(
            f"Predicted PaO2 along the profile (constant a/A {ph.a_over_a:.2f})",
            "PaO2(h) = a/A x PAO2(h); result shown at the ceiling on the current FiO2",
            float(ph.a_over_a * pao2_now[-1]),
            "gilbert1974",
            output="po2_predicted",
            pressure=True,
        )
        report.computed(
            "po2_threshold",
            INFLIGHT_PO2_THRESHOLD_MMHG,
            "Line on the plot: in-flight PaO2 below which in-flight oxygen is advised",
            "6.6 kPa (49.5 mmHg)",
            "bts2011_inflight_threshold",
            pressure=True,
        )
        if f.target_po2 is not None:
            # the user's own lowest acceptable PaO2 (the line the picture draws when it is given)
            report.computed(
                "po2_target",
                f.target_po2,
                "Line on the plot: the lowest acceptable PaO2 entered",
                "as entered",
                "bts2011_inflight_threshold",
                pressure=True,
            )
    _altitude_outputs(
        report,
        "cabin_altitude",
        f.cabin_m,
        f.unit,
        "Cabin altitude (marker)",
        "as given, or the ISA pressure altitude of PB",
        "icao7488",
    )
    if ph.max_altitude is not None and ph.max_altitude.altitude_m is not None:
        report.put("max_altitude_status", ph.max_altitude.status)
        _altitude_outputs(
            report,
            "max_altitude",
            ph.max_altitude.altitude_m,
            f.unit,
            f"Highest cabin altitude with predicted PaO2 >= {_p(report, f.target_po2)} on FiO2 "
            f"{f.fio2_max:.2f} (marker)",
            "bisection on the ISA altitude (as in the altitude calculation)",
            ("icao7488", "alveolar_gas_1946", "gilbert1974"),
        )
    elif ph.max_altitude is not None:
        report.put("max_altitude_status", ph.max_altitude.status)
    if f.cabin_m > f.ceiling_m + 0.5:
        report.finding(
            "profile_below_cabin_altitude",
            "info",
            f"The profile stops at {_alt_text(f.ceiling_m, f.unit)}, below the cabin altitude "
            f"{_alt_text(f.cabin_m, f.unit)}: raise the ceiling to see it.",
        )
    _findings(report, f, ph)
    report.say(
        f"Profile of {f.points} points from {_alt_text(f.origin_m, f.unit)} to "
        f"{_alt_text(f.ceiling_m, f.unit)} on "
        f"FiO2 {f.fio2:.2f} and {f_eq_used:.2f}."
    )
