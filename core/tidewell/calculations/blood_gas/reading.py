"""Reading a blood-gas sample: the field table, the cross-field checks, one sample or arrays of samples."""

from __future__ import annotations

import math
from types import SimpleNamespace
from typing import NamedTuple

from ... import units
from ...arrays import NAN, given, maximum, not_
from ...fields import Inputs
from ...formulas import acidbase as ab
from ...formulas import altitude, oxygenation
from ...report import pressure_text
from .thresholds import SITES


def _r9(x: float | None) -> float | None:
    """Guard against float noise from unit conversion (1e-9 mmHg), so kPa and mmHg input classify alike."""
    return None if x is None else round(x, 9)


class Field(NamedTuple):
    """How one blood_gas input is read: the one table behind the scalar reader and the batch fast path."""

    key: str  #: the input key of the request
    attr: str  #: the attribute of the read sample (and of the values :func:`decide` reads)
    kind: str  #: "ph", "quantity", "concentration", "fraction", "choice", "percent", "number" or "flag"
    options: dict  #: the keyword arguments of the Inputs accessor (ranges in the target unit)
    r9: bool = False  #: rounded to 1e-9 after conversion (pressures: kPa and mmHg classify alike)


def _q(unit: str, low: float, high: float, label: str, **more) -> dict:
    return {"unit": unit, "low": low, "high": high, "label": label, **more}


#: every input of blood_gas, in the order it is read (the order of the error messages)
FIELDS: tuple[Field, ...] = (
    Field("ph", "ph", "ph", {"low": 6.5, "high": 8.0}),
    Field(
        "pco2",
        "pco2",
        "quantity",
        _q("mmHg", 8.0, 250.0, "PCO2", required=True, plausible_word="is not survivable"),
        r9=True,
    ),
    Field("hco3", "hco3", "quantity", _q("mmol/L", 1.0, 70.0, "HCO3", plausible_word="is not survivable")),
    Field(
        "po2",
        "po2",
        "quantity",
        _q("mmHg", 15.0, 800.0, "PO2", plausible_word="is not plausible in blood"),
        r9=True,
    ),
    Field("fio2", "fio2", "fraction", {"low": 0.21, "high": 1.0, "default": 0.21, "label": "FiO2"}),
    Field("sample", "site", "choice", {"choices": SITES, "default": "arterial", "label": "sample"}),
    Field("base_excess", "base_excess", "quantity", _q("mmol/L", -40.0, 40.0, "base excess")),
    Field("na", "na", "quantity", _q("mmol/L", 100.0, 190.0, "sodium", substance="sodium")),
    Field("k", "k", "quantity", _q("mmol/L", 1.0, 10.0, "potassium", substance="potassium")),
    Field("cl", "cl", "quantity", _q("mmol/L", 60.0, 150.0, "chloride", substance="chloride")),
    Field("albumin", "albumin", "quantity", _q("g/dL", 0.5, 6.0, "albumin")),
    Field("lactate", "lactate", "concentration", {"low": 0.0, "high": 50.0, "label": "lactate"}),
    Field("glucose", "glucose", "concentration", {"low": 0.0, "high": 150.0, "label": "glucose"}),
    Field("urea", "urea_given", "concentration", {"low": 0.0, "high": 100.0, "label": "urea"}),
    Field("bun", "bun", "concentration", {"low": 0.0, "high": 100.0, "label": "BUN (as urea)"}),
    Field("phosphate", "phosphate", "concentration", {"low": 0.1, "high": 5.0, "label": "phosphate"}),
    Field("measured_osmolality", "osm", "quantity", _q("mOsm/kg", 200.0, 450.0, "measured osmolality")),
    Field("hb", "hb", "quantity", _q("g/dL", 3.0, 25.0, "haemoglobin", substance="hb")),
    Field("spo2", "spo2", "percent", {"low": 30.0, "high": 100.0, "label": "SpO2"}),
    Field("age", "age", "number", {"low": 0.0, "high": 120.0, "label": "age", "what": " years"}),
    Field(
        "temperature",
        "temperature",
        "quantity",
        _q(
            "degC",
            15.0,
            43.0,
            "temperature",
            plausible_word="is outside the range the temperature corrections cover",
        ),
    ),
    Field("altitude", "altitude", "quantity", _q("m", -500.0, 9000.0, "altitude")),
    Field(
        "pb",
        "pb",
        "quantity",
        _q(
            "mmHg",
            150.0,
            1100.0,
            "barometric pressure",
            plausible_word="is outside the pressures people breathe at",
        ),
        r9=True,
    ),
    Field(
        "baseline_pco2",
        "baseline_pco2",
        "quantity",
        _q("mmHg", 20.0, 150.0, "baseline PCO2", plausible_word="is not a plausible usual PaCO2"),
        r9=True,
    ),
    Field("hypercapnia_risk", "hypercapnia_risk", "flag", {"label": "hypercapnia_risk"}),
    Field(
        "previous_hypercapnic_failure",
        "previous_failure",
        "flag",
        {"label": "previous_hypercapnic_failure", "default": None},
    ),
    Field(
        "spo2_target_prescribed",
        "spo2_prescribed",
        "range",
        {"low": 80.0, "high": 100.0, "label": "prescribed SpO2 range"},
    ),
    Field(
        "ca_ionised",
        "ca_ionised",
        "quantity",
        _q("mmol/L", 0.3, 3.0, "ionised calcium", substance="calcium"),
    ),
    Field("mg", "mg", "quantity", _q("mmol/L", 0.1, 5.0, "magnesium", substance="magnesium")),
    Field(
        "normal_albumin",
        "normal_albumin",
        "quantity",
        _q("g/dL", 3.0, 5.5, "normal albumin", default=ab.NORMAL_ALBUMIN_G_DL),
    ),
    Field("rq", "rq", "number", {"low": 0.6, "high": 1.2, "label": "respiratory quotient", "default": 0.8}),
)
INPUT_KEYS = tuple(f.key for f in FIELDS)


def _read(i: Inputs, f: Field):
    """One input through its Inputs accessor (as the scalar bridge reads it)."""
    o = f.options
    if f.kind == "ph":
        return _read_ph(i)
    if f.kind == "quantity":
        value = i.quantity(f.key, **o)
    elif f.kind == "concentration":
        value = _concentration(i, f.key, o["low"], o["high"], o["label"])
    elif f.kind == "fraction":
        value = i.fraction(f.key, **o)
    elif f.kind == "choice":
        value = i.choice(f.key, o["choices"], default=o["default"], label=o["label"])
    elif f.kind == "percent":
        value = i.percent(f.key, **o)
    elif f.kind == "range":
        value = _read_range(i, f.key, o)
    elif f.kind == "number":
        value = i.number(f.key, **o)
    else:
        value = i.flag(f.key, **o)
    return _r9(value) if f.r9 else value


def _read_range(i: Inputs, key: str, o: dict) -> tuple[float, float] | None:
    """A ``{"low", "high"}`` range of percentages (SpO2), checked ``low`` <= low < high <= ``high``."""
    raw = i.mapping(key, label=o["label"])
    if raw is None:
        return None
    label = o["label"]
    if sorted(raw) != ["high", "low"]:
        i.fail(key, raw, f"{label} needs a low and a high value, in %", code="bad_request")
        return None
    low, high = (i._check_number(key, raw[end], label) for end in ("low", "high"))
    if low is None or high is None:
        return None
    if not (o["low"] <= low < high <= o["high"]):
        i.fail(
            key,
            raw,
            f"{label} {low:g}-{high:g} % is not a range within {o['low']:g} to {o['high']:g} %",
            "Give the lower value first, for example 88 to 92 %.",
            code="out_of_range",
        )
        return None
    return (low, high)


# -- cross-field checks, written once for one sample and for arrays of samples ----------------------------


def urea_bun_disagree(urea, bun):
    """True where urea and BUN (both as mmol/L of urea) differ by more than 5 % (of the larger, >= 1)."""
    return abs(urea - bun) > 0.05 * maximum(maximum(urea, bun), 1.0)


def implied_hco3(ph, pco2):
    """The HCO3 a pH and PCO2 imply (Henderson-Hasselbalch); outside 1 to 70 mmol/L the pair is refused."""
    return ab._hco3_hh(ph, pco2)


def implied_hco3_survivable(value):
    return (1.0 <= value) & (value <= 70.0)


def inspired_po2(fio2, pb_mmhg):
    """PIO2 = FiO2 x (PB - 47), as the PO2 plausibility checks use it [mmHg]."""
    return oxygenation._inspired(fio2, pb_mmhg)


def po2_above_inspired(po2, pio2):
    """A PO2 more than 5 mmHg above the inspired PO2 is impossible."""
    return po2 > pio2 + 5.0


def no_alveolar_oxygen(pio2, pco2, rq):
    """True where PIO2 - PaCO2 / R is below 0: no alveolar oxygen at this FiO2 although a PO2 was measured."""
    return pio2 - pco2 / rq < 0.0


def mix_up_flags(
    *, pco2, pco2_unit, baseline, baseline_unit, po2, po2_unit, site, pb, pb_unit, ph=NAN, hco3=NAN
):
    """Values that are possible but look like a unit slip (kept, and named in ``possible_unit_mix_up``).

    A dict of flags, arrays for arrays of samples; each unit is the unit the value was sent in. A PCO2 that
    fits the reported pH and HCO3 as entered (Henderson-Hasselbalch, within the 0.03 consistency band) is
    not called a slip: the triple itself says the unit is right.
    """
    fits = given(hco3) & (abs(ab._ph_hh(hco3, pco2) - ph) <= 0.03)
    return {
        "pco2_low": (pco2_unit == "mmHg") & (pco2 < 15.0) & not_(fits),
        "pco2_high": (pco2_unit == "kPa") & (pco2 > 150.0) & not_(fits),
        "baseline_low": (baseline_unit == "mmHg") & (baseline < 15.0),
        "baseline_high": (baseline_unit == "kPa") & (baseline > 150.0),
        "po2_low": (po2_unit == "mmHg") & (po2 < 25.0) & (site != "venous"),
        "pb_high": (pb_unit == "mmHg") & (pb > 800.0),
    }


def unusual_flags(*, glucose, urea, lactate):
    """Which concentrations are possible but unusual enough to check (dict of flags)."""
    return {"glucose": glucose > 100.0, "urea": urea > 80.0, "lactate": lactate > 30.0}


class _Sample:
    """The inputs, read and converted (pressures in mmHg)."""

    def __init__(self, inputs: Inputs, *, pressure_unit: str = "mmHg"):
        self.unit = pressure_unit  # of the messages that refuse an input (the readings stay in mmHg)
        self.mix_ups: list[str] = []
        self.mix_up_suggest: list[dict] = []  # the value each mix-up offers instead, as data (one tap)
        self.unusual: list[str] = []
        i = inputs
        self.fio2_given = i.given("fio2")
        for f in FIELDS:
            setattr(self, f.attr, _read(i, f))

        # -- cross-field checks ---------------------------------------------------------------------------
        urea, bun = self.urea_given, self.bun
        self.urea = urea
        self.urea_from = "urea" if urea is not None else ("bun" if bun is not None else None)
        if urea is not None and bun is not None:
            if urea_bun_disagree(urea, bun):
                i.fail(
                    "bun",
                    i.raw.get("bun"),
                    f"urea ({urea:.1f} mmol/L) and BUN ({bun:.1f} mmol/L as urea) disagree",
                    "Send one of urea or bun.",
                    code="inconsistent",
                )
        elif bun is not None:
            self.urea = bun
        self.pb_and_altitude = self.pb is not None and self.altitude is not None
        if self.ph is not None and self.pco2 is not None:
            implied = implied_hco3(self.ph, self.pco2)
            if not implied_hco3_survivable(implied):
                message = (
                    f"pH {self.ph:g} with PCO2 {self._p(self.pco2)} implies HCO3 {implied:.3g} mmol/L, "
                    "which is not survivable (1 to 70)"
                )
                hint = "One of pH or PCO2 is probably mistyped or sent in the wrong unit."
                i.fail("ph", i.raw.get("ph"), message, hint, code="inconsistent")
                i.fail("pco2", i.raw.get("pco2"), message, hint, code="inconsistent")
        # a PO2 that breathing air cannot give is refused only when the FiO2 was given; without it the
        # reading says that oxygen was probably given (decide: ``oxygen_probably_given``)
        if self.po2 is not None and self.fio2_given and self.fio2 is not None and self.site != "venous":
            pb = self.pb_value()
            pio2 = inspired_po2(self.fio2, pb) if pb is not None else None
            if pio2 is not None and po2_above_inspired(self.po2, pio2):
                i.fail(
                    "po2",
                    i.raw.get("po2"),
                    f"PO2 {self._p(self.po2)} is above the inspired PO2 ({self._p(pio2)} at FiO2 "
                    f"{self.fio2:.2f}): impossible",
                    "Check the FiO2 given and the unit of PO2.",
                    code="inconsistent",
                )
            elif pio2 is not None and self.pco2 is not None:
                rq = self.rq if self.rq is not None else 0.8
                if no_alveolar_oxygen(pio2, self.pco2, rq):
                    alveolar = pio2 - self.pco2 / rq
                    i.fail(
                        "fio2",
                        i.raw.get("fio2", self.fio2),
                        f"at FiO2 {self.fio2:.2f} a PaCO2 of {self._p(self.pco2)} leaves no alveolar oxygen "
                        f"(alveolar PO2 {self._p(alveolar)}), yet PO2 is {self._p(self.po2)}",
                        "The patient must have been breathing supplemental oxygen: send the FiO2 used.",
                        code="inconsistent",
                    )
        self._grey_zone(i)
        i.finish()

    def _p(self, mmhg: float) -> str:
        return pressure_text(mmhg, self.unit)

    def values(self) -> SimpleNamespace:
        """The sample in the terms of :func:`decide`: NaN for what was not given."""
        v = SimpleNamespace(**{name: _nan(getattr(self, name, None)) for name in NUMERIC_FIELDS})
        v.pb_value = self.pb_value()
        v.site, v.hypercapnia_risk = self.site, self.hypercapnia_risk
        v.fio2_given = self.fio2_given
        v.previous_failure = NAN if self.previous_failure is None else float(self.previous_failure)
        rx = self.spo2_prescribed
        v.spo2_rx_low, v.spo2_rx_high = (NAN, NAN) if rx is None else rx
        v.mix_up, v.unusual, v.pb_and_altitude = bool(self.mix_ups), bool(self.unusual), self.pb_and_altitude
        return v

    def pb_value(self) -> float | None:
        return pb_value(self.pb, self.altitude)

    def _grey_zone(self, i: Inputs) -> None:
        """Values that are possible but look like a unit slip: kept, and named in a finding."""

        def unit_of(key):
            raw = i.raw.get(key)
            return raw.get("unit") if isinstance(raw, dict) else None

        flags = mix_up_flags(
            ph=_nan(self.ph),
            hco3=_nan(self.hco3),
            pco2=_nan(self.pco2),
            pco2_unit=unit_of("pco2"),
            baseline=_nan(self.baseline_pco2),
            baseline_unit=unit_of("baseline_pco2"),
            po2=_nan(self.po2),
            po2_unit=unit_of("po2"),
            site=self.site,
            pb=_nan(self.pb),
            pb_unit=unit_of("pb"),
        )
        for key, label, value in (
            ("pco2", "PCO2", self.pco2),
            ("baseline", "baseline PCO2", self.baseline_pco2),
        ):
            field = "inputs.pco2" if key == "pco2" else "inputs.baseline_pco2"
            if flags[f"{key}_low"]:
                self.mix_up_suggest.append({"field": field, "value": value, "unit": "kPa"})
                self.mix_ups.append(
                    f"{label} {value:g} mmHg is extremely low; if it was {value:g} kPa "
                    f"({units.convert(value, 'kPa', 'mmHg'):.0f} mmHg), re-enter it in kPa."
                )
            if flags[f"{key}_high"]:
                given_kpa = units.convert(value, "mmHg", "kPa")
                typed = float(f"{given_kpa:.6g}")
                self.mix_up_suggest.append({"field": field, "value": typed, "unit": "mmHg"})
                self.mix_ups.append(
                    f"{label} {given_kpa:.3g} kPa ({value:.0f} mmHg) is extremely high; if it was "
                    f"{given_kpa:.3g} mmHg, re-enter it in mmHg."
                )
        if flags["po2_low"]:
            self.mix_up_suggest.append({"field": "inputs.po2", "value": self.po2, "unit": "kPa"})
            self.mix_ups.append(
                f"PO2 {self.po2:g} mmHg is extremely low for a {self.site} sample; if it was {self.po2:g} "
                f"kPa ({units.convert(self.po2, 'kPa', 'mmHg'):.0f} mmHg), re-enter it in kPa."
            )
        if flags["pb_high"]:
            self.mix_up_suggest.append({"field": "inputs.pb", "value": self.pb, "unit": "hPa"})
            as_hpa = units.convert(self.pb, "hPa", "mmHg")
            self.mix_ups.append(
                f"Barometric pressure {self.pb:g} mmHg is above sea-level pressure; if it was {self.pb:g} "
                f"hPa ({as_hpa:.0f} mmHg), re-enter it in hPa."
            )
        odd = unusual_flags(glucose=_nan(self.glucose), urea=_nan(self.urea), lactate=_nan(self.lactate))
        if odd["glucose"]:
            self.unusual.append(
                f"glucose {self.glucose:.0f} mmol/L is above 100 mmol/L: check the value and unit"
            )
        if odd["urea"]:
            self.unusual.append(f"urea {self.urea:.0f} mmol/L is above 80 mmol/L: check the value and unit")
        if odd["lactate"]:
            self.unusual.append(
                f"lactate {self.lactate:.0f} mmol/L is above 30 mmol/L: check the value and unit"
            )


def pb_value(pb, altitude_m):
    """Barometric pressure used [mmHg]: the measured one, else the ISA pressure at the altitude, else 760."""
    if pb is not None:
        return pb
    if altitude_m is not None:
        return altitude.pressure_at_altitude_isa(altitude_m=altitude_m)
    return 760.0


def _nan(value: float | None) -> float:
    return NAN if value is None else value


def _concentration(i: Inputs, key: str, low: float, high: float, label: str) -> float | None:
    """A substance concentration in mmol/L whose implausible-unit hint tries mg/dL first (the usual slip)."""
    value = i.quantity(key, unit="mmol/L", low=-math.inf, high=math.inf, label=label, substance=key)
    if value is None or low <= value <= high:
        return value
    raw = i.raw.get(key)
    number, given = raw["value"], raw["unit"]
    hint, suggest = "", None
    for other in ("mg/dL", "mmol/L", "mg/L", "g/L", "umol/L"):
        if other != given and low <= units.convert(number, other, "mmol/L", substance=key) <= high:
            hint, suggest = f"Did you mean {number:g} {other}?", {"value": number, "unit": other}
            break
    i.fail(
        key,
        raw,
        f"{label} {number:g} {given} is outside the accepted range ({low:g} to {high:g} mmol/L)",
        hint,
        code="implausible" if hint else "out_of_range",
        suggest=suggest,
    )
    return None


def _read_ph(i: Inputs) -> float | None:
    """pH with hints for the usual slips (a missing decimal point, [H+] in nmol/L sent as pH)."""
    value = i.number("ph", low=-math.inf, high=math.inf, label="pH", required=True)
    if value is None or 6.5 <= value <= 8.0:
        return value
    hints, suggest = [], None
    for factor in (10.0, 100.0, 1000.0):
        if 6.5 <= value / factor <= 8.0:
            hints.append(f"Did you mean {value / factor:g}?")
            suggest = {"value": float(f"{value / factor:g}")}
            break
    if 10.0 <= value <= 316.0:
        hints.append(f"If {value:g} is [H+] in nmol/L, the pH is {9.0 - math.log10(value):.2f}.")
    i.fail(
        "ph",
        value,
        f"pH {value:g} is outside 6.5 to 8.0 (not survivable, and outside the range of the rules used)",
        " ".join(hints),
        code="implausible" if hints else "out_of_range",
        suggest=suggest,
    )
    return None


# -- the decisions: one implementation for the scalar report, the batch audit and the Monte Carlo ------------

#: the numeric inputs ``decide`` reads (NaN when not given), besides ``site``, ``hypercapnia_risk`` and the
#: three reading flags
NUMERIC_FIELDS = (
    "ph",
    "pco2",
    "hco3",
    "po2",
    "fio2",
    "base_excess",
    "na",
    "k",
    "cl",
    "albumin",
    "lactate",
    "glucose",
    "urea",
    "phosphate",
    "osm",
    "hb",
    "spo2",
    "age",
    "temperature",
    "pb_value",
    "baseline_pco2",
    "ca_ionised",
    "mg",
    "normal_albumin",
    "rq",
)
