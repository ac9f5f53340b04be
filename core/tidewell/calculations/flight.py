"""The flight and transport calculations of the bridge: ``altitude``, ``altitude_profile``, ``oxygen_supply``.

====================  ==========================================================================
``altitude``          cabin/destination PB, PIO2, PAO2, FiO2 that keeps the origin's PAO2, the
                      hypoxic-challenge equivalence, predicted PaO2 (constant a/A), the highest
                      cabin altitude for a target PaO2, trapped-gas expansion
``altitude_profile``  the same physiology as lists from the origin up to a ceiling, for a plot
                      (numpy is imported inside this function only)
``oxygen_supply``     cylinder contents, oxygen needed with a margin, minutes available,
                      sufficient or not, cylinders needed
====================  ==========================================================================

Inputs beyond docs/bridge.md (all optional; the glossary docs/glossary/flight.md lists every name):

- ``altitude`` / ``altitude_profile``: ``pb`` (measured cabin or destination PB: overrides the ISA
  pressure of ``altitude``; either one is enough), ``rq`` (0.8), ``alveolar_equation`` (``simple``
  default, or ``full``), ``trapped_gas_kind`` (``wet`` default: body-cavity gas at 37 degC, or ``dry``:
  cuffs and bags); ``altitude_profile`` also ``points`` (61).
- ``oxygen_supply``: ``minute_ventilation``, ``fio2`` and ``device_allowance`` (2 L/min) to estimate the
  flow of a ventilated patient instead of giving ``flow``; ``safety_factor`` (1.5).

Defaults and decisions (each is stated in a step of the response):

- Altitude units ``m``, ``ft`` (and ``km``); the model is the ISA troposphere, -500 to 11,000 m. An altitude
  outside it is refused (``out_of_range``, or ``implausible`` with the unit probably meant). PB units
  ``mmHg``, ``kPa``, ``hPa``, within the ISA range 169.75-806.15 mmHg.
- Altitude outputs (``max_altitude``, ``cabin_altitude``, the profile's ``altitude``) are in the unit the
  user gave for ``altitude`` (``m`` when only ``pb`` was given); ``..._m`` and ``..._ft`` are given too.
- PCO2 not given: 40 mmHg is assumed and flagged. PaCO2 and R are assumed unchanged at altitude.
- ``fio2_equivalent`` uses the water-vapour-corrected ratio (keeps PIO2); the PB ratio is shown as
  ``fio2_equivalent_simple``. A value above ``fio2_max`` is reported as it is, with an urgent finding.
- ``po2_predicted`` assumes the origin's a/A ratio holds (Gilbert & Keighley 1974, from memory).
- ``max_altitude`` is solved by bisection on the ISA altitude with ``fio2_max``; when the target still holds
  at 11,000 m it is 11,000 m with ``max_altitude_status`` ``holds_at_ceiling``; when it fails even at
  -500 m it is left out and the status is ``not_reachable``.
- An alveolar PO2 that the equation puts at or below 0 is reported as 0 with an urgent finding.
- Predicted in-flight PaO2 below 6.6 kPa (49.5 mmHg, "about 50 mmHg"): urgent finding (BTS 2011 practice,
  from memory). Cabin altitude above 8,000 ft: notable finding (AsMA 2008).
- Oxygen supply: ideal gas (conservative for O2 by about 6-7 % at 137-230 bar); safety factor 1.5 on
  the planned oxygen; ``reserve_fraction`` 0 and ``residual_pressure`` 0 by default (both settable).
"""

from __future__ import annotations

import difflib
import math
from dataclasses import dataclass

from .. import units
from ..errors import is_real
from ..fields import Inputs
from ..formulas import altitude as alt
from ..formulas import transport
from ..formulas.oxygenation import alveolar_po2_full, alveolar_po2_simple, inspired_po2
from ..report import Report
from ..units import FT_M

ALTITUDE_UNITS = ("m", "ft", "km")
PB_UNITS = ("mmHg", "kPa", "hPa")
CYLINDER_PRESSURE_UNITS = ("bar", "psi", "kPa")
VOLUME_UNITS = ("mL", "L")
FLOW_UNITS = ("L/min", "mL/min")
DURATION_UNITS = ("min", "h")

#: PaCO2 assumed when none is given [mmHg]
DEFAULT_PCO2_MMHG = 40.0
#: in-flight PaO2 below which BTS 2011 advises in-flight oxygen (from memory): 6.6 kPa [mmHg]
INFLIGHT_PO2_THRESHOLD_MMHG = units.convert(6.6, "kPa", "mmHg")
#: default top of the altitude profile [m] (docs/bridge.md)
DEFAULT_CEILING_M = 3000.0
#: default number of points of the altitude profile
DEFAULT_POINTS = 61
#: ISA pressure range of the model [mmHg]
PB_LOW_MMHG = alt.pressure_at_altitude_isa(altitude_m=alt.TROPOPAUSE_M)
PB_HIGH_MMHG = alt.pressure_at_altitude_isa(altitude_m=alt.LOWEST_M)
_MODEL_TEXT = "the standard-atmosphere model covers -500 to 11,000 m (-1,640 to 36,089 ft)"


class _Nothing:
    """Shown value of a missing field (so messages carry no '(got ...)')."""

    def __repr__(self) -> str:
        return ""


_NOTHING = _Nothing()


def _g(x: float) -> str:
    return f"{x:.6g}"


# --------------------------------------------------------------------------------------------------
# reading inputs


def _read_quantity(
    inputs: Inputs,
    key: str,
    *,
    unit: str,
    allowed: tuple[str, ...],
    low: float,
    high: float,
    label: str,
    required: bool = False,
    default: float | None = None,
    missing_hint: str = "",
    range_note: str = "",
) -> float | None:
    """A ``{"value", "unit"}`` input in one of ``allowed`` units, returned in ``unit``.

    Like :meth:`Inputs.quantity`, but only the units that make sense for this input are accepted, and
    the "did you mean" guess looks only among them (a cylinder at 2000 bar probably meant psi, not mmHg).
    """
    inputs.read.add(key)
    raw = inputs.raw.get(key)
    if raw is None:
        if required:
            inputs.fail(key, _NOTHING, f"{label} is required", missing_hint, code="missing")
        return default
    accepted = "Accepted units: " + ", ".join(allowed)
    if not isinstance(raw, dict):
        if is_real(raw):
            inputs.fail(
                key,
                raw,
                f"{label} needs a unit",
                f'Send {{"value": {raw}, "unit": "{allowed[0]}"}}; ' + accepted.lower(),
                code="bad_unit",
            )
        else:
            inputs.fail(
                key, raw, f'{label} must be an object {{"value": number, "unit": text}}', code="bad_request"
            )
        return None
    extra = sorted(set(raw) - {"value", "unit"})
    if extra:
        inputs.fail(key, raw, f"{label} has unexpected keys {extra}", code="bad_request")
        return None
    value = raw.get("value")
    if value is None:
        inputs.fail(key, raw, f"{label} has no value", code="missing")
        return None
    if not is_real(value) or not math.isfinite(float(value)):
        inputs.fail(key, raw, f"{label} must be a number", code="not_a_number")
        return None
    number = float(value)
    given_unit = raw.get("unit")
    if given_unit is None:
        inputs.fail(key, raw, f"{label} needs a unit", accepted, code="bad_unit")
        return None
    if not isinstance(given_unit, str) or given_unit not in allowed:
        hint = accepted
        if isinstance(given_unit, str):
            folded = {u.lower(): u for u in allowed}.get(given_unit.strip().lower())
            close = difflib.get_close_matches(given_unit, allowed, n=1, cutoff=0.5)
            guess = folded or (close[0] if close else None)
            if guess:
                hint = f"Did you mean '{guess}'? " + hint
        inputs.fail(key, raw, f"{label}: unit {given_unit!r} is not accepted here", hint, code="bad_unit")
        return None
    converted = units.convert(number, given_unit, unit)
    if low <= converted <= high:
        return converted
    span = f"{_g(low)} to {_g(high)} {unit}" + (f"; {range_note}" if range_note else "")
    if converted < 0 <= low:
        inputs.fail(key, raw, f"{label} cannot be negative ({span})", code="out_of_range")
        return None
    for other in allowed:
        if other != given_unit and low <= units.convert(number, other, unit) <= high:
            inputs.fail(
                key,
                raw,
                f"{label} {_g(number)} {given_unit} is outside the accepted range ({span})",
                f"Did you mean {_g(number)} {other}?",
                code="implausible",
                suggest={"value": number, "unit": other},
            )
            return None
    inputs.fail(
        key,
        raw,
        f"{label} {_g(number)} {given_unit} is outside the accepted range ({span})",
        code="out_of_range",
    )
    return None


def _given_unit(inputs: Inputs, key: str, allowed: tuple[str, ...], default: str) -> str:
    raw = inputs.raw.get(key)
    if isinstance(raw, dict) and raw.get("unit") in allowed:
        return raw["unit"]
    return default


def _read_count(inputs: Inputs, key: str, *, low: int, high: int, default: int, label: str) -> int | None:
    value = inputs.number(key, low=low, high=high, default=default, label=label)
    if value is None:
        return None
    if value != int(value):
        inputs.fail(key, inputs.raw.get(key), f"{label} must be a whole number", code="out_of_range")
        return None
    return int(value)


def _altitude_input(inputs: Inputs, key: str, label: str, **kw) -> float | None:
    return _read_quantity(
        inputs,
        key,
        unit="m",
        allowed=ALTITUDE_UNITS,
        low=alt.LOWEST_M,
        high=alt.TROPOPAUSE_M,
        label=label,
        range_note=_MODEL_TEXT,
        **kw,
    )


def _pb_input(inputs: Inputs, key: str, label: str) -> float | None:
    return _read_quantity(
        inputs,
        key,
        unit="mmHg",
        allowed=PB_UNITS,
        low=PB_LOW_MMHG,
        high=PB_HIGH_MMHG,
        label=label,
        range_note="the ISA pressures at 11,000 m and -500 m",
    )


@dataclass
class _Flight:
    """The inputs of ``altitude`` / ``altitude_profile`` after reading, and what follows from them."""

    altitude_m: float | None
    pb_given: float | None
    origin_altitude_m: float | None
    origin_pb_given: float | None
    fio2: float
    pco2: float
    pco2_assumed: bool
    po2: float | None
    target_po2: float | None
    fio2_max: float
    volume: float | None
    volume_unit: str
    rq: float
    equation: str
    gas_kind: str
    unit: str  # the unit altitudes are reported in
    ceiling_m: float | None = None
    points: int | None = None
    # derived
    pb: float = 0.0
    cabin_m: float = 0.0
    pb_origin: float = 0.0
    origin_m: float = 0.0

    @property
    def alveolar(self):
        return alveolar_po2_full if self.equation == "full" else alveolar_po2_simple


def _read_flight(inputs: Inputs, report: Report, *, profile: bool) -> _Flight:
    has_pb = inputs.given("pb")
    altitude_m = _altitude_input(
        inputs,
        "altitude",
        "Altitude",
        required=not has_pb,
        missing_hint='Give the cabin or destination altitude, e.g. {"value": 8000, "unit": "ft"}, '
        "or a measured pb.",
    )
    pb_given = _pb_input(inputs, "pb", "PB")
    origin_altitude_m = _altitude_input(inputs, "origin_altitude", "Origin altitude")
    origin_pb_given = _pb_input(inputs, "origin_pb", "Origin PB")
    fio2 = inputs.fraction("fio2", label="FiO2", required=True)
    pco2 = inputs.quantity(
        "pco2", unit="mmHg", low=10.0, high=200.0, label="PCO2", plausible_word="is not survivable"
    )
    po2 = inputs.quantity(
        "po2", unit="mmHg", low=20.0, high=700.0, label="PO2", plausible_word="is not plausible"
    )
    target = inputs.quantity(
        "target_po2",
        unit="mmHg",
        low=30.0,
        high=200.0,
        label="Target PO2",
        plausible_word="is not a usual target",
    )
    fio2_max = inputs.fraction("fio2_max", label="Maximum FiO2", default=1.0)
    volume = _read_quantity(
        inputs,
        "trapped_gas_volume",
        unit="mL",
        allowed=VOLUME_UNITS,
        low=0.1,
        high=20_000.0,
        label="Trapped gas volume",
    )
    rq = inputs.number("rq", low=0.6, high=1.2, default=0.8, label="Respiratory quotient")
    equation = inputs.choice(
        "alveolar_equation", ("simple", "full"), default="simple", label="Alveolar equation"
    )
    gas_kind = inputs.choice("trapped_gas_kind", ("wet", "dry"), default="wet", label="Trapped gas kind")
    ceiling_m = points = None
    if profile:
        ceiling_m = _altitude_input(inputs, "ceiling", "Ceiling", default=DEFAULT_CEILING_M)
        points = _read_count(inputs, "points", low=2, high=401, default=DEFAULT_POINTS, label="Points")
    f = _Flight(
        altitude_m=altitude_m,
        pb_given=pb_given,
        origin_altitude_m=origin_altitude_m,
        origin_pb_given=origin_pb_given,
        fio2=fio2 if fio2 is not None else 0.21,
        pco2=pco2 if pco2 is not None else DEFAULT_PCO2_MMHG,
        pco2_assumed=not inputs.given("pco2"),
        po2=po2,
        target_po2=target,
        fio2_max=fio2_max if fio2_max is not None else 1.0,
        volume=volume,
        volume_unit=_given_unit(inputs, "trapped_gas_volume", VOLUME_UNITS, "mL"),
        rq=rq if rq is not None else 0.8,
        equation=equation or "simple",
        gas_kind=gas_kind or "wet",
        unit=_given_unit(inputs, "altitude", ALTITUDE_UNITS, "m"),
        ceiling_m=ceiling_m,
        points=points,
    )
    ok = not inputs.errors
    if ok:
        _derive_pressures(f)
        # cross-field checks, reported together with everything else
        if f.po2 is not None:
            pao2_origin = f.alveolar(fio2_fraction=f.fio2, paco2_mmhg=f.pco2, pb_mmhg=f.pb_origin, rq=f.rq)
            if f.po2 > pao2_origin:
                inputs.fail(
                    "po2",
                    inputs.raw.get("po2"),
                    f"PO2 {_p(report, f.po2)} is higher than the alveolar PO2 at the origin "
                    f"({_p(report, max(pao2_origin, 0.0))} for FiO2 {f.fio2:.2f}, PCO2 "
                    f"{_p(report, f.pco2)}): "
                    "an arterial PO2 above the alveolar PO2 is impossible",
                    "Check the FiO2 the sample was taken on, the PCO2, and the origin's altitude or "
                    "pressure.",
                    code="inconsistent",
                )
        if profile and f.ceiling_m is not None and f.ceiling_m <= f.origin_m + 1.0:
            inputs.fail(
                "ceiling",
                inputs.raw.get("ceiling"),
                f"the ceiling must be above the origin ({_alt_text(f.origin_m, f.unit)})",
                code="inconsistent",
            )
    inputs.finish()
    return f


def _derive_pressures(f: _Flight) -> None:
    if f.pb_given is not None:
        f.pb = f.pb_given
        f.cabin_m = f.altitude_m if f.altitude_m is not None else alt.altitude_at_pressure_isa(pb_mmhg=f.pb)
    else:
        f.cabin_m = f.altitude_m
        f.pb = alt.pressure_at_altitude_isa(altitude_m=f.altitude_m)
    if f.origin_pb_given is not None:
        f.pb_origin = f.origin_pb_given
        f.origin_m = (
            f.origin_altitude_m
            if f.origin_altitude_m is not None
            else alt.altitude_at_pressure_isa(pb_mmhg=f.pb_origin)
        )
    elif f.origin_altitude_m is not None:
        f.origin_m = f.origin_altitude_m
        f.pb_origin = alt.pressure_at_altitude_isa(altitude_m=f.origin_m)
    else:
        f.origin_m = 0.0
        f.pb_origin = alt.pressure_at_altitude_isa(altitude_m=0.0)


# --------------------------------------------------------------------------------------------------
# text helpers


def _alt_text(metres: float, unit: str) -> str:
    ft = f"{metres / FT_M:,.0f} ft"
    m = f"{metres:,.0f} m"
    return f"{ft} ({m})" if unit == "ft" else f"{m} ({ft})"


def _p(report: Report, mmhg: float) -> str:
    return report.pressure_text(mmhg)


def _alt_quantity(metres: float, unit: str) -> dict:
    return {"value": units.convert(metres, "m", unit), "unit": unit}


def _altitude_outputs(
    report: Report, name: str, metres: float, unit: str, label: str, formula: str, source
) -> None:
    """``name`` in the user's altitude unit, with ``name_m`` and ``name_ft`` alongside, each with a step."""
    report.put(name, _alt_quantity(metres, unit), decimals=0)
    report.step(label, formula, units.convert(metres, "m", unit), source, output=name, unit=unit)
    for u in ("m", "ft"):
        report.quantity(f"{name}_{u}", units.convert(metres, "m", u), u, decimals=0)
        report.step(
            f"{label}, in {u}",
            "1 ft = 0.3048 m (exact)",
            units.convert(metres, "m", u),
            "nist811",
            output=f"{name}_{u}",
            unit=u,
        )


# --------------------------------------------------------------------------------------------------
# the shared physiology


@dataclass
class _Physiology:
    pio2_origin: float
    pio2: float
    pao2_origin_raw: float
    pao2_raw: float
    pao2_simple_raw: float
    pao2_full_raw: float
    fio2_equivalent: float
    fio2_equivalent_simple: float
    sea_level_equivalent: float
    sea_level_equivalent_dry: float
    hct_altitude_m: float
    a_over_a: float | None = None
    po2_predicted: float | None = None
    fio2_for_target: float | None = None
    max_altitude: alt.MaxAltitude | None = None
    max_altitude_on_fio2: alt.MaxAltitude | None = None
    volume_dry: float | None = None
    volume_wet: float | None = None

    @property
    def pao2_origin(self) -> float:
        return max(self.pao2_origin_raw, 0.0)

    @property
    def pao2(self) -> float:
        return max(self.pao2_raw, 0.0)


def _physiology(f: _Flight) -> _Physiology:
    eq = f.alveolar
    common = {"paco2_mmhg": f.pco2, "rq": f.rq}
    ph = _Physiology(
        pio2_origin=inspired_po2(fio2_fraction=f.fio2, pb_mmhg=f.pb_origin),
        pio2=inspired_po2(fio2_fraction=f.fio2, pb_mmhg=f.pb),
        pao2_origin_raw=eq(fio2_fraction=f.fio2, pb_mmhg=f.pb_origin, **common),
        pao2_raw=eq(fio2_fraction=f.fio2, pb_mmhg=f.pb, **common),
        pao2_simple_raw=alveolar_po2_simple(fio2_fraction=f.fio2, pb_mmhg=f.pb, **common),
        pao2_full_raw=alveolar_po2_full(fio2_fraction=f.fio2, pb_mmhg=f.pb, **common),
        fio2_equivalent=alt.fio2_at_altitude_water_corrected(
            fio2_fraction=f.fio2, pb_origin_mmhg=f.pb_origin, pb_destination_mmhg=f.pb
        ),
        fio2_equivalent_simple=alt.fio2_at_altitude_pb_ratio(
            fio2_fraction=f.fio2, pb_origin_mmhg=f.pb_origin, pb_destination_mmhg=f.pb
        ),
        sea_level_equivalent=alt.sea_level_fio2_equivalent(pb_mmhg=f.pb),
        sea_level_equivalent_dry=alt.sea_level_fio2_equivalent_dry(pb_mmhg=f.pb),
        hct_altitude_m=alt.altitude_of_sea_level_fio2(fio2_sea_level=alt.HYPOXIC_CHALLENGE_FIO2),
    )
    if f.po2 is not None:
        ph.a_over_a = f.po2 / ph.pao2_origin_raw
        ph.po2_predicted = alt.pao2_at_altitude_gilbert1974(
            pao2_origin_mmhg=f.po2,
            pao2_alveolar_origin_mmhg=ph.pao2_origin_raw,
            pao2_alveolar_destination_mmhg=ph.pao2_raw,
        )
        if f.target_po2 is not None:
            ph.fio2_for_target = alt.fio2_for_alveolar_po2(
                pao2_alveolar_mmhg=f.target_po2 / ph.a_over_a, pb_mmhg=f.pb, alveolar=eq, **common
            )
            ph.max_altitude = alt.max_altitude_for_target_pao2(
                target_pao2_mmhg=f.target_po2,
                a_a_ratio=ph.a_over_a,
                fio2_fraction=f.fio2_max,
                alveolar=eq,
                **common,
            )
            ph.max_altitude_on_fio2 = alt.max_altitude_for_target_pao2(
                target_pao2_mmhg=f.target_po2,
                a_a_ratio=ph.a_over_a,
                fio2_fraction=f.fio2,
                alveolar=eq,
                **common,
            )
    if f.volume is not None:
        pressures = {"pb_origin_mmhg": f.pb_origin, "pb_destination_mmhg": f.pb}
        ph.volume_dry = alt.trapped_gas_volume_dry(volume_ml=f.volume, **pressures)
        ph.volume_wet = alt.trapped_gas_volume_saturated_37c(volume_ml=f.volume, **pressures)
    return ph


def _equation_text(f: _Flight, fio2: str = "FiO2", pb: str = "PB") -> str:
    if f.equation == "full":
        return f"PAO2 = {fio2} x ({pb} - 47) - PaCO2 x ({fio2} + (1 - {fio2}) / R)"
    return f"PAO2 = {fio2} x ({pb} - 47) - PaCO2 / R"


def _findings(report: Report, f: _Flight, ph: _Physiology) -> None:
    """Findings and cautions shared by ``altitude`` and ``altitude_profile``."""
    cabin = _alt_text(f.cabin_m, f.unit)
    if f.pb_given is not None and f.altitude_m is not None:
        isa = alt.pressure_at_altitude_isa(altitude_m=f.altitude_m)
        report.finding(
            "pb_overrides_altitude",
            "info",
            f"The measured PB {_p(report, f.pb)} was used; the standard atmosphere gives {_p(report, isa)} "
            f"at {cabin}.",
        )
    if f.origin_pb_given is not None and f.origin_altitude_m is not None:
        isa = alt.pressure_at_altitude_isa(altitude_m=f.origin_altitude_m)
        report.finding(
            "origin_pb_overrides_altitude",
            "info",
            f"The measured origin PB {_p(report, f.pb_origin)} was used; the standard atmosphere gives "
            f"{_p(report, isa)} at {_alt_text(f.origin_altitude_m, f.unit)}.",
        )
    if f.pco2_assumed:
        report.finding(
            "pco2_assumed",
            "notable",
            f"No PCO2 was given: {_p(report, DEFAULT_PCO2_MMHG)} was assumed. In a patient who retains CO2 "
            "the alveolar PO2 is lower than shown; enter the measured PCO2.",
        )
    if f.cabin_m > alt.CABIN_LIMIT_M + 0.5:
        report.finding(
            "cabin_altitude_above_8000_ft",
            "notable",
            f"The cabin altitude {cabin} is above 8,000 ft, the usual upper limit for pressurised "
            "passenger cabins (Aerospace Medical Association 2008).",
        )
    if ph.pao2_raw <= 0.0 or ph.pao2_origin_raw <= 0.0:
        where = "at the origin" if ph.pao2_origin_raw <= 0.0 else f"at {cabin}"
        report.finding(
            "no_alveolar_oxygen",
            "urgent",
            f"On FiO2 {f.fio2:.2f} with PCO2 {_p(report, f.pco2)} the alveolar gas equation leaves no "
            "alveolar "
            f"oxygen {where} (shown as 0). This is not survivable without more oxygen or a lower altitude.",
        )
    if f.fio2_max < f.fio2 - 1e-9:
        report.finding(
            "fio2_max_below_fio2",
            "notable",
            f"The maximum FiO2 available ({f.fio2_max:.2f}) is below the patient's current FiO2 "
            f"({f.fio2:.2f}).",
        )
    if ph.fio2_equivalent > f.fio2_max + 1e-9:
        report.finding(
            "fio2_max_insufficient",
            "urgent",
            f"Keeping the origin's alveolar PO2 at {cabin} needs FiO2 {ph.fio2_equivalent:.2f}, more than "
            "the "
            f"maximum available ({f.fio2_max:.2f}). A lower cabin altitude, or a measured plan with the "
            "aircraft operator, is needed.",
        )
    elif f.pb > f.pb_origin and ph.fio2_equivalent < f.fio2:
        report.finding(
            "descent_lowers_fio2_need",
            "info",
            f"The destination is lower than the origin: FiO2 {max(ph.fio2_equivalent, 0.21):.2f} keeps the "
            "origin's alveolar PO2" + (" (air is enough)." if ph.fio2_equivalent <= 0.21 else "."),
        )
    if ph.po2_predicted is not None and ph.po2_predicted < INFLIGHT_PO2_THRESHOLD_MMHG:
        report.finding(
            "predicted_po2_low",
            "urgent",
            f"The predicted PaO2 at {cabin} on FiO2 {f.fio2:.2f} is {_p(report, ph.po2_predicted)}, below "
            f"6.6 kPa (about 50 mmHg), the level below which BTS 2011 advice (recalled from memory) "
            f"recommends in-flight oxygen. FiO2 {ph.fio2_equivalent:.2f} would keep the origin's alveolar "
            "PO2.",
        )
    if f.target_po2 is not None and f.po2 is None:
        report.finding(
            "target_needs_po2",
            "info",
            "A target PO2 was given without the measured PO2 at the origin: the highest cabin altitude "
            "for the target needs that PO2 (for the a/A ratio).",
        )
    if ph.max_altitude is not None:
        mx = ph.max_altitude
        target = _p(report, f.target_po2)
        if ph.fio2_for_target is not None and ph.fio2_for_target > f.fio2_max + 1e-9:
            report.finding(
                "target_po2_not_reachable",
                "urgent",
                f"No FiO2 up to {f.fio2_max:.2f} keeps the predicted PaO2 at or above {target} at {cabin} "
                f"(it would need FiO2 {ph.fio2_for_target:.2f})."
                + (
                    f" The highest cabin altitude for the target is {_alt_text(mx.altitude_m, f.unit)}."
                    if mx.altitude_m is not None
                    else ""
                ),
            )
        if mx.status == "not_reachable":
            report.finding(
                "max_altitude_not_reachable",
                "urgent",
                f"Even at the lowest altitude of the model (-500 m) FiO2 {f.fio2_max:.2f} does not give a "
                f"predicted PaO2 of {target}: there is no cabin altitude at which the target holds.",
            )
        elif mx.status == "holds_at_ceiling":
            report.finding(
                "max_altitude_at_model_ceiling",
                "info",
                f"On FiO2 {f.fio2_max:.2f} the predicted PaO2 stays at or above {target} even at 11,000 m "
                "(36,089 ft), the top of the standard-atmosphere model: the limit is at least that high.",
            )
        elif mx.altitude_m < f.origin_m - 0.5:
            report.finding(
                "max_altitude_below_origin",
                "notable",
                f"The target {target} is not met even at the origin on FiO2 {f.fio2_max:.2f}: the highest "
                f"altitude for it is {_alt_text(mx.altitude_m, f.unit)}, below the origin.",
            )
    if ph.volume_wet is not None:
        v2 = ph.volume_wet if f.gas_kind == "wet" else ph.volume_dry
        ratio = v2 / f.volume
        if ratio > 1.0 + 1e-9:
            report.finding(
                "trapped_gas_expands",
                "notable",
                f"Trapped gas expands by {100 * (ratio - 1):.0f} % at {cabin} ({f.gas_kind} gas): a closed "
                "space "
                "that cannot stretch gains pressure instead (tube cuffs, pneumothorax, bowel, gas in the "
                "eye or "
                "skull).",
            )
        elif ratio < 1.0 - 1e-9:
            report.finding(
                "trapped_gas_contracts",
                "info",
                f"Trapped gas shrinks by {100 * (1 - ratio):.0f} % at the destination: tube cuffs can lose "
                "their "
                "seal on descent; recheck cuff pressure.",
            )
    report.caution(
        "These are model estimates (standard atmosphere, PaCO2 unchanged, constant a/A ratio): they do not "
        "replace a hypoxic challenge test or SpO2 monitoring in flight. Follow local protocols, the "
        "retrieval "
        "service's procedures and the aircraft operator's medical requirements."
    )
    if f.pb < f.pb_origin:
        report.caution(
            "Gas in closed spaces expands as the cabin climbs: check endotracheal and tracheostomy cuff "
            "pressures "
            "after the climb and again on descent (or fill cuffs with saline where local practice does); an "
            "undrained pneumothorax can enlarge at altitude, so agree drainage before flight with the "
            "receiving team."
        )
    if f.pco2 > 45.0 and not f.pco2_assumed:
        report.caution(
            "With a raised PaCO2, give oxygen to the prescribed saturation range (often 88-92 % in those at "
            "risk of hypercapnic respiratory failure) and watch for a rising PaCO2: the FiO2 shown keeps the "
            "alveolar PO2 of the origin, it is not a target in itself."
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
    import numpy as np  # only here: ``import tidewell.calculations.flight`` must stay numpy-free

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
