"""What the flight and transport calculations share: reading the inputs, defaults and decisions.

The calculations, one module each (altitude.py, altitude_profile.py, oxygen_supply.py):

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
from ..formulas.oxygenation import alveolar_po2_full, alveolar_po2_simple, inspired_po2
from ..report import Report
from ..units import FT_M

ALTITUDE_UNITS = ("m", "ft", "km")
PB_UNITS = ("mmHg", "kPa", "hPa")
VOLUME_UNITS = ("mL", "L")

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
