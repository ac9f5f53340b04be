"""The ``altitude`` calculation: what a cabin or destination altitude does to this patient.

====================  ==========================================================================
``altitude``          cabin/destination PB, PIO2, PAO2, FiO2 that keeps the origin's PAO2, the
                      hypoxic-challenge equivalence, predicted PaO2 (constant a/A), the highest
                      cabin altitude for a target PaO2, trapped-gas expansion
====================  ==========================================================================

The reading, defaults and decisions it shares with ``altitude_profile`` are in ``_flight``.
"""

from __future__ import annotations

from .. import units
from ..fields import Inputs
from ..report import Report
from ._flight import (
    DEFAULT_CEILING_M,
    INFLIGHT_PO2_THRESHOLD_MMHG,
    _alt_quantity,
    _alt_text,
    _altitude_outputs,
    _equation_text,
    _findings,
    _Flight,
    _g,
    _p,
    _Physiology,
    _physiology,
    _read_flight,
)

# --------------------------------------------------------------------------------------------------
# altitude


def _pressure_steps(report: Report, f: _Flight) -> None:
    if f.pb_given is not None:
        report.step(
            "Cabin or destination barometric pressure (measured)",
            "PB as given (it overrides the standard atmosphere)",
            f.pb,
            "icao7488",
            output="pb",
            pressure=True,
        )
    else:
        report.step(
            f"Barometric pressure at {_alt_text(f.cabin_m, f.unit)} (ICAO standard atmosphere)",
            f"PB = 101325 Pa x (1 - 0.0065 x {f.cabin_m:.1f} / 288.15) ^ 5.255877 (geopotential altitude)",
            f.pb,
            ("icao7488", "ussa1976"),
            output="pb",
            pressure=True,
        )
    if f.origin_pb_given is not None:
        origin_formula, origin_src = "origin PB as given", "icao7488"
    elif f.origin_altitude_m is not None:
        origin_formula = f"PB = 101325 Pa x (1 - 0.0065 x {f.origin_m:.1f} / 288.15) ^ 5.255877"
        origin_src = ("icao7488", "ussa1976")
    else:
        origin_formula, origin_src = "sea level, 101325 Pa (default origin)", ("icao7488", "ussa1976")
    report.step(
        "Barometric pressure at the origin",
        origin_formula,
        f.pb_origin,
        origin_src,
        output="pb_origin",
        pressure=True,
    )


def altitude(inputs: Inputs, report: Report) -> None:
    """The ``altitude`` calculation (docs/bridge.md): what a cabin or destination altitude does to a patient.

    Inputs: ``altitude`` (m/ft/km) or ``pb``, ``fio2``, ``pco2?``, ``po2?``, ``origin_altitude?`` or
    ``origin_pb?``, ``target_po2?``, ``fio2_max?`` (1.0), ``trapped_gas_volume?``, ``rq?`` (0.8),
    ``alveolar_equation?`` (``simple``), ``trapped_gas_kind?`` (``wet``).
    """
    f = _read_flight(inputs, report, profile=False)
    ph = _physiology(f)
    eq_src = ("alveolar_gas_1946",)
    assumptions = "PaCO2 and R as at the origin"

    _pressure_steps(report, f)
    report.pressure("pb", f.pb)
    report.pressure("pb_origin", f.pb_origin)
    report.computed(
        "pb_hpa",
        units.convert(f.pb, "mmHg", "hPa"),
        "Barometric pressure in hPa",
        "1 mmHg = 1.33322387415 hPa",
        "bipm2019",
        unit="hPa",
        decimals=1,
    )
    cabin_formula = (
        "as given"
        if f.altitude_m is not None
        else "ISA pressure altitude h = (288.15 / 0.0065) x (1 - (PB / 101325 Pa) ^ (1 / 5.255877))"
    )
    _altitude_outputs(
        report, "cabin_altitude", f.cabin_m, f.unit, "Cabin altitude", cabin_formula, "icao7488"
    )

    report.computed(
        "pio2",
        ph.pio2,
        "Inspired PO2 at the cabin altitude",
        f"PIO2 = FiO2 x (PB - 47) = {f.fio2:.3g} x ({f.pb:.1f} - 47) mmHg",
        eq_src,
        pressure=True,
    )
    report.computed(
        "pio2_origin",
        ph.pio2_origin,
        "Inspired PO2 at the origin",
        "PIO2 = FiO2 x (PB_origin - 47)",
        eq_src,
        pressure=True,
    )

    report.computed(
        "pao2_alveolar",
        ph.pao2,
        f"Alveolar PO2 at the cabin altitude ({f.equation} alveolar gas equation)",
        _equation_text(f)
        + f", R {f.rq:g}, PaCO2 {f.pco2:.1f} mmHg"
        + (" (assumed)" if f.pco2_assumed else "")
        + f"; {assumptions}; shown as 0 if the equation gives 0 or less",
        eq_src,
        pressure=True,
    )
    report.computed(
        "pao2_alveolar_origin",
        ph.pao2_origin,
        "Alveolar PO2 at the origin",
        _equation_text(f, pb="PB_origin"),
        eq_src,
        pressure=True,
    )
    report.computed(
        "pao2_alveolar_simple",
        max(ph.pao2_simple_raw, 0.0),
        "Alveolar PO2 at the cabin altitude, simple equation",
        "PAO2 = FiO2 x (PB - 47) - PaCO2 / R",
        eq_src,
        pressure=True,
    )
    report.computed(
        "pao2_alveolar_full",
        max(ph.pao2_full_raw, 0.0),
        "Alveolar PO2 at the cabin altitude, full equation",
        "PAO2 = FiO2 x (PB - 47) - PaCO2 x (FiO2 + (1 - FiO2) / R)",
        eq_src,
        pressure=True,
    )

    report.computed(
        "fio2_equivalent",
        ph.fio2_equivalent,
        "FiO2 that keeps the origin's alveolar PO2 (water-vapour corrected; default)",
        f"FiO2_cabin = FiO2 x (PB_origin - 47) / (PB - 47) = {f.fio2:.3g} x ({f.pb_origin:.1f} - 47) / "
        f"({f.pb:.1f} - 47)"
        " (keeps PIO2, hence PAO2 at the same PaCO2 and R)",
        ("fio2_altitude_rules", "alveolar_gas_1946"),
        decimals=3,
    )
    report.put("fio2_equivalent_within_max", ph.fio2_equivalent <= f.fio2_max + 1e-9)
    report.computed(
        "fio2_equivalent_simple",
        ph.fio2_equivalent_simple,
        "FiO2 by the simple pressure ratio (comparison; under-doses slightly)",
        "FiO2_cabin = FiO2 x PB_origin / PB",
        "fio2_altitude_rules",
        decimals=3,
    )

    report.computed(
        "sea_level_fio2_equivalent",
        ph.sea_level_equivalent,
        "Hypoxic-challenge equivalence: air at this cabin altitude",
        "FiO2_sea-level = 0.2095 x (PB - 47) / (760 - 47); 8,000 ft gives about 0.15, the FiO2 of the "
        "hypoxic "
        "challenge test (FiO2 0.15 at sea level has the PIO2 of air at "
        f"{_alt_text(ph.hct_altitude_m, 'ft')})",
        ("aviation_o2_equivalence", "bradi2009", "bts2011_air", "air_o2_fraction"),
        decimals=3,
    )
    report.computed(
        "sea_level_fio2_equivalent_dry",
        ph.sea_level_equivalent_dry,
        "Sea-level FiO2 equivalent on dry pressures (comparison)",
        "FiO2_sea-level = 0.2095 x PB / 760",
        ("aviation_o2_equivalence", "air_o2_fraction"),
        decimals=3,
    )
    report.computed(
        "hypoxic_challenge_altitude",
        units.convert(ph.hct_altitude_m, "m", f.unit),
        "Cabin altitude whose air matches the hypoxic challenge (FiO2 0.15 at sea level)",
        "PB = 47 + 0.15 x (760 - 47) / 0.2095, then the ISA pressure altitude",
        ("bradi2009", "icao7488"),
        unit=f.unit,
        decimals=0,
    )

    if ph.a_over_a is not None:
        report.computed(
            "a_over_A",
            ph.a_over_a,
            "a/A ratio at the origin",
            f"a/A = PaO2 / PAO2_origin = {f.po2:.1f} / {ph.pao2_origin:.1f}",
            ("gilbert1974", "alveolar_gas_1946"),
            decimals=2,
        )
        report.computed(
            "po2_predicted",
            ph.po2_predicted,
            "Predicted PaO2 at the cabin altitude (constant a/A)",
            "PaO2_cabin = a/A x PAO2_cabin; assumes the origin's a/A ratio, PaCO2 and R hold at altitude "
            "(a planning estimate: the real PaO2 can be lower)",
            "gilbert1974",
            pressure=True,
        )
        report.computed(
            "po2_threshold",
            INFLIGHT_PO2_THRESHOLD_MMHG,
            "In-flight PaO2 below which in-flight oxygen is advised",
            "6.6 kPa (49.5 mmHg, 'about 50 mmHg')",
            "bts2011_inflight_threshold",
            pressure=True,
        )
    if ph.max_altitude is not None:
        _max_altitude_outputs(report, f, ph)
    if ph.volume_wet is not None:
        _trapped_gas_outputs(report, f, ph)

    _findings(report, f, ph)
    _summary(report, f, ph)


def _max_altitude_outputs(report: Report, f: _Flight, ph: _Physiology) -> None:
    eq = _equation_text(f, fio2="FiO2_max", pb="PB(h)")
    report.computed(
        "fio2_for_target",
        ph.fio2_for_target,
        "FiO2 that keeps the predicted PaO2 at the target at the cabin altitude",
        f"solve a/A x PAO2(FiO2, PB) = {_p(report, f.target_po2)} for FiO2 (exact: PAO2 is linear in FiO2); "
        "above 1.0 means no FiO2 suffices",
        ("alveolar_gas_1946", "gilbert1974"),
        decimals=3,
    )
    mx = ph.max_altitude
    report.put("max_altitude_status", mx.status)
    if mx.altitude_m is not None:
        report.pressure("max_altitude_pb", mx.pb_mmhg)
        note = {
            "solved": f"bisection on the ISA altitude, -500 to 11,000 m, to 0.1 mm ({mx.iterations} steps)",
            "holds_at_ceiling": "the target holds at 11,000 m, the model ceiling: the limit is higher",
        }[mx.status]
        _altitude_outputs(
            report,
            "max_altitude",
            mx.altitude_m,
            f.unit,
            f"Highest cabin altitude with predicted PaO2 >= {_p(report, f.target_po2)} on FiO2 "
            f"{f.fio2_max:.2f}",
            f"solve a/A x [{eq}] = target for h; {note}",
            ("icao7488", "alveolar_gas_1946", "gilbert1974"),
        )
        report.step(
            "Lowest barometric pressure at which the target holds",
            "PB(h_max) from the ISA equation",
            mx.pb_mmhg,
            "icao7488",
            output="max_altitude_pb",
            pressure=True,
        )
    now = ph.max_altitude_on_fio2
    report.put("max_altitude_on_fio2_status", now.status)
    if now.altitude_m is not None:
        report.put("max_altitude_on_fio2", _alt_quantity(now.altitude_m, f.unit), decimals=0)
        report.step(
            f"Highest cabin altitude for the target on the current FiO2 {f.fio2:.2f}",
            "as above with the current FiO2",
            units.convert(now.altitude_m, "m", f.unit),
            ("icao7488", "alveolar_gas_1946", "gilbert1974"),
            output="max_altitude_on_fio2",
            unit=f.unit,
        )


def _trapped_gas_outputs(report: Report, f: _Flight, ph: _Physiology) -> None:
    u = f.volume_unit
    dry, wet = (units.convert(v, "mL", u) for v in (ph.volume_dry, ph.volume_wet))
    decimals = 0 if u == "mL" else 3
    chosen = wet if f.gas_kind == "wet" else dry
    report.computed(
        "trapped_gas_volume_at_altitude",
        chosen,
        f"Trapped gas volume at the cabin altitude ({f.gas_kind} gas; free expansion)",
        "V2 = V1 x (PB_origin - 47) / (PB - 47) (saturated at 37 degC)"
        if f.gas_kind == "wet"
        else "V2 = V1 x PB_origin / PB",
        ("boyle", "trapped_gas_practice"),
        unit=u,
        decimals=decimals,
    )
    report.computed(
        "trapped_gas_volume_dry",
        dry,
        "Dry gas (cuffs, bags): Boyle's law",
        "V2 = V1 x PB_origin / PB",
        "boyle",
        unit=u,
        decimals=decimals,
    )
    report.computed(
        "trapped_gas_volume_wet",
        wet,
        "Body-cavity gas (saturated with water vapour at 37 degC)",
        "V2 = V1 x (PB_origin - 47) / (PB - 47)",
        "boyle",
        unit=u,
        decimals=decimals,
    )
    ratio = chosen / units.convert(f.volume, "mL", u)
    report.computed("trapped_gas_expansion", ratio, "Expansion ratio", "V2 / V1", "boyle", decimals=2)


#: the highest cabin altitude the summary speaks of [m] (the altitude profile's default ceiling, 3,000 m:
#: above commercial cabins, AsMA 2008 <= 8,000 ft)
CABIN_SUMMARY_CEILING_M = DEFAULT_CEILING_M


def _summary(report: Report, f: _Flight, ph: _Physiology) -> None:
    change = "falls" if f.pb <= f.pb_origin else "rises"
    report.say(
        f"At a cabin altitude of {_alt_text(f.cabin_m, f.unit)} (PB {_p(report, f.pb)}), on FiO2 "
        f"{f.fio2:.2f} the alveolar PO2 {change} from {_p(report, ph.pao2_origin)} to {_p(report, ph.pao2)}."
    )
    report.say(f"FiO2 {ph.fio2_equivalent:.2f} would keep the origin's alveolar PO2 (PaCO2 and R unchanged).")
    if ph.po2_predicted is not None:
        report.say(
            f"With the origin's a/A ratio ({ph.a_over_a:.2f}) the predicted PaO2 there is "
            f"{_p(report, ph.po2_predicted)}."
        )
    if ph.max_altitude is not None and ph.max_altitude.altitude_m is not None:
        lead = "at least " if ph.max_altitude.status == "holds_at_ceiling" else ""
        target = _p(report, f.target_po2)
        if ph.max_altitude.altitude_m < f.origin_m - 0.5:
            report.say(
                f"On FiO2 {f.fio2_max:.2f} the predicted PaO2 does not reach {target} even at the origin: "
                "no cabin altitude meets the target."
            )
        elif ph.max_altitude.altitude_m > CABIN_SUMMARY_CEILING_M:
            # a cabin far above any pressurised cabin is no plan: the summary stops at the highest cabin
            # altitude considered (the profile's default ceiling); max_altitude keeps the number
            report.say(
                f"On FiO2 {f.fio2_max:.2f} the predicted PaO2 stays at or above {target} at "
                f"every cabin altitude up to {_alt_text(CABIN_SUMMARY_CEILING_M, f.unit)}, the highest "
                "considered here."
            )
        else:
            report.say(
                f"On FiO2 {f.fio2_max:.2f} the predicted PaO2 stays at or above {target} up "
                f"to {lead}{_alt_text(ph.max_altitude.altitude_m, f.unit)}."
            )
    if ph.volume_wet is not None:
        report.say(
            f"Trapped gas of {_g(units.convert(f.volume, 'mL', f.volume_unit))} {f.volume_unit} becomes "
            f"{units.convert(ph.volume_dry, 'mL', f.volume_unit):.3g} {f.volume_unit} (dry) or "
            f"{units.convert(ph.volume_wet, 'mL', f.volume_unit):.3g} {f.volume_unit} (body gas at 37 degC)."
        )
