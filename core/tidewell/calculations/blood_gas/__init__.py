"""The ``blood_gas`` calculation: a whole, sourced interpretation of one blood-gas sample.

==================  =====================================================================================
``blood_gas``       bridge calculation (docs/bridge.md ``blood_gas``): inputs -> outputs, findings, cautions,
                    steps and a plain-language summary
``decide``          every decision of the interpretation (disorders, chronicity, consistency, findings, key
                    numbers) for one sample or for numpy arrays of samples: the one implementation the
                    report, the batch audit and the uncertainty calculation share
``FIELDS``          how each input is read (kind, unit, range, default): the scalar reader and the batch's
                    array reader use this one table
``disorders``       the ``disorders`` output of a scalar Decision
``findings``        the finding codes of a scalar Decision, in the response's order
``primary_process`` the primary-process rule on its own (pH, PCO2, HCO3 -> code, tentative)
==================  =====================================================================================

Structure: ``_Sample`` reads the inputs (``FIELDS`` and the cross-field checks, written once for floats and
arrays); :func:`decide` takes every decision with the array-polymorphic rules of :mod:`formulas.acidbase` and
the helpers of :mod:`tidewell.arrays` (no numpy is imported here; with floats everything runs on ``math``);
the private narrative functions then write the report (outputs, steps, findings, cautions, summary) from the
scalar Decision. They decide nothing that the batch or the uncertainty calculation reports (only wording: for
example whether the pH-stat view reads "near normal").

What it does, in order (docs/clinical-rules.md gives the rules in words):

1. Reads and checks every input (plausibility ranges; a number that fits only in another unit is refused as
   ``implausible`` with the unit probably meant; values that are possible but look like a unit slip are kept
   and named in a ``possible_unit_mix_up`` finding).
2. Henderson-Hasselbalch (pK' 6.1, S 0.0307) consistency of the reported triple, with the Kassirer-Bleich
   [H+]. HCO3 is computed when not given (``consistency`` is then "consistent" by construction). An
   **inconsistent** triple gets an urgent finding and a provisional reading only: the physiological rules are
   applied to the measured pH and PCO2 (an analyser's HCO3 is derived from those two, so they are the pair
   least likely to be mistyped or to come from another sample) and the interpretation says it rests on
   doubtful data; the gap, base-excess and Stewart cross-checks are not used to add disorders on doubtful
   data.
3. Primary process (pH < 7.35 acidaemia, > 7.45 alkalaemia; HCO3 < 22 or > 26; PCO2 > 45 or < 35). When both
   processes point the same way, the larger contribution to [H+] (|log10(PCO2/40)| against |log10(24/HCO3)|)
   is called primary; at a normal pH the side of 7.40 chooses (common practice). With a pH outside normal but
   PCO2 and HCO3 inside their ranges the same contribution rule names a tentative primary (finding
   ``borderline_values``).
4. Compensation (Boston rules: albert1967, narins1980): Winters' formula; metabolic alkalosis 0.7 per
   mmol/L +/- 5; respiratory acidosis 1 (acute) and 3.5 (chronic) per 10 mmHg, alkalosis 2 and 4, with the
   alternative published slopes shown as the band of ``expected_hco3``. A second, metabolic, disorder is named
   only when the measured HCO3 lies beyond the acute-to-chronic range by more than max(2 mmol/L, 0.2 x the
   acute-chronic span) -- the 0.2 is the published fraction-acute band (f > 1.2 / f < -0.2), the 2 mmol/L
   floor keeps analyser scatter from naming a disorder when PaCO2 is only just abnormal (Tidewell convention).
5. Fraction acute by the HCO3 rules (used for the call) and by the pH rules (shown; they drift above a rise of
   about 30 mmHg, berend2014). With ``baseline_pco2`` the chronicity comes from the baseline instead. A
   respiratory disorder always carries a chronicity word (the contract keeps null for metabolic ones); when it
   cannot be judged (PaCO2 within 5 mmHg of 40, or a concurrent metabolic disorder moving the HCO3) the word
   is what the HCO3 rules alone say, ``fraction_acute`` is null and a finding says so; a respiratory disorder
   concurrent to a metabolic primary is "acute" by convention unless a baseline is given.
6. Anion gap (with and without K, albumin-corrected with a settable normal albumin), delta ratio (Brandis
   bands) and delta gap. An albumin-corrected gap of 20 mmol/L or more names a high-anion-gap metabolic
   acidosis whatever the HCO3 (Gabow 1980, from memory); with no other primary it becomes the primary. With a
   respiratory primary the pre-acid HCO3 (HCO3 + (AG - 12)) is compared with the respiratory expectation
   instead of 24, which is how a triple disorder is found; with a metabolic primary the Brandis delta-ratio
   bands are used as published.
7. Copenhagen (SBE, CLSI form) and Stewart (SIDa/SIDe/SIG with Figge terms; Story 2016 partition, 2004 shown)
   side by side: one finding says where the three readings of the metabolic component agree or differ; none is
   declared right. SBE readings use +/- 3 mmol/L; a Stewart effect counts as a process at 5 mEq/L or more.
8. Ventilation safety: ``pco2_target`` (known baseline; else the baseline estimated by inverting the two
   respiratory rules; else the normal upper limit 45 mmHg; in a metabolic acidosis or alkalosis with a
   concurrent respiratory acidosis, the compensating PaCO2 of that disorder), ``pco2_alkalaemia_floor`` (the
   PaCO2 at which a quick fall would bring pH to 7.45 at the present HCO3), NIV thresholds (BTS/ICS 2016) and
   the PaCO2 above which consciousness commonly falls (75 / 90 mmHg; with a known baseline, baseline + 35).
9. Oxygenation when PO2 is given (not for venous samples): alveolar PO2 (simple equation; the full one shown),
   A-a gradient against age/4 + 4, a/A, P/F, respiratory failure type, and the key reading for hypercapnia
   (normal A-a: pure hypoventilation; raised: lung disease as well).
10. Temperature (alpha-stat interprets the 37 degC values; the corrected values are shown as the pH-stat
    view); SpO2 target (BTS 2017: 88-92 % when at risk of hypercapnic failure or hypercapnic on this arterial
    or capillary sample, else 94-98 %).

The P/F ratio (PaO2 / FiO2) and a/A ratio (PaO2 / PAO2, left out when PAO2 is not positive) are computed in
:func:`decide`, so that this module calls only the oxygenation functions that are settled
(``alveolar_po2_simple``, ``alveolar_po2_full``, ``aa_gradient_upper_by_age``). Those are scalar, validated
functions of formulas.oxygenation: on arrays :func:`tidewell.arrays.each` calls them once per distinct set of
arguments.

The consciousness threshold (clinical change with the batch work): without a known baseline, chronic retention
is read from the PaCO2 and HCO3 alone (PaCO2 above 45 mmHg, the HCO3 rules reading chronic or
acute-on-chronic, no metabolic acidosis named), no longer only when respiratory acidosis is the primary call,
which flips at pH 7.40: at a fixed HCO3 the threshold now never rises as the PaCO2 rises.

Optional inputs beyond the contract: ``ca_ionised``, ``mg`` (Stewart), ``normal_albumin`` (g/dL, default 4.0),
``rq`` (default 0.8). Every output name is listed in docs/glossary/acidbase.md.
"""

from __future__ import annotations

import math
from types import SimpleNamespace
from typing import NamedTuple

from ... import units
from ...arrays import NAN, clamp, div, each, given, log10, maximum, minimum, none_if_nan, not_, where
from ...fields import Inputs
from ...formulas import acidbase as ab
from ...formulas import altitude, oxygenation, temperature
from ...report import Report, pressure_text

MET_ACID = "metabolic_acidosis"
MET_ALK = "metabolic_alkalosis"
RESP_ACID = "respiratory_acidosis"
RESP_ALK = "respiratory_alkalosis"
NAMES = {
    MET_ACID: "metabolic acidosis",
    MET_ALK: "metabolic alkalosis",
    RESP_ACID: "respiratory acidosis",
    RESP_ALK: "respiratory alkalosis",
}
SITES = ("arterial", "venous", "capillary")

# reference values (acid_base_normal_ranges, ph_severity; common practice)
PH_LOW, PH_HIGH = 7.35, 7.45
PCO2_LOW, PCO2_HIGH = 35.0, 45.0
HCO3_LOW, HCO3_HIGH = 22.0, 26.0
SEVERE_ACIDAEMIA_PH, SEVERE_ALKALAEMIA_PH = 7.20, 7.60
#: BTS/ICS 2016 NIV thresholds
NIV_PH = 7.35
NIV_PCO2_MMHG = round(units.convert(6.5, "kPa", "mmHg"), 9)  # rounded as inputs are (see _r9)
NIV_INVASIVE_PH = 7.25
#: consciousness thresholds [mmHg] (common practice)
NARCOSIS_NORMAL_MMHG, NARCOSIS_CHRONIC_MMHG = 75.0, 90.0
NARCOSIS_RISE_MMHG = NARCOSIS_NORMAL_MMHG - ab.NORMAL_PCO2_MMHG
#: PCO2 above which the SpO2 target and type 2 failure read hypercapnia: 6.0 kPa [mmHg] (BTS 2017)
HYPERCAPNIA_MMHG = round(units.convert(6.0, "kPa", "mmHg"), 9)
#: hypoxaemia threshold for respiratory failure [mmHg] (8 kPa)
HYPOXAEMIA_MMHG = 60.0
#: P/F ratio bands [mmHg]: impaired oxygenation at or below 300, more severe at or below 200 and 100 (ARDS
#: Definition Task Force 2012; named by the P/F only, as their ARDS label needs PEEP and imaging)
PF_IMPAIRED, PF_MODERATE, PF_SEVERE = 300.0, 200.0, 100.0
#: anion gap at or above which a high-AG acidosis is named whatever the HCO3 (Gabow 1980, from memory)
AG_ALWAYS_ACIDOSIS = 20.0
#: beside an acidaemic respiratory acidosis: the lactate [mmol/L] and the (albumin-corrected) anion gap
#: [mmol/L] above which a concurrent metabolic acidosis is named (common practice; Cohen & Woods 1976)
LACTATE_ACIDOSIS, AG_BESIDE_HYPERCAPNIA = 4.0, 16.0
#: lactate above the upper reference limit [mmol/L] (common practice)
LACTATE_RAISED = 2.0
#: minimum margin beyond a compensation band before a second disorder is named [mmol/L]
HCO3_MARGIN_MIN = 2.0
#: SBE tolerance for the Copenhagen reading [mmol/L]
SBE_TOLERANCE = 3.0
#: size at which a Stewart effect counts as a process [mEq/L]
STEWART_EFFECT = 5.0
#: typical values assumed when a Stewart term is missing (named in the report)
TYPICAL_CA_IONISED, TYPICAL_MG, TYPICAL_PHOSPHATE = 1.2, 0.9, 1.0
#: the alkalaemia floor: PaCO2 at which pH would reach this after a quick fall
FLOOR_PH = 7.45

_CONVENTION = "tidewell_acid_base_conventions"
INF = math.inf


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

#: every finding code of the blood_gas report, in the order the report emits them (the response then sorts
#: them by severity, keeping this order within a severity)
FINDING_ORDER = (
    "possible_unit_mix_up",
    "value_unusual",
    "pb_used_not_altitude",
    "inconsistent_triple",
    "provisional_interpretation",
    "hco3_calculated",
    "base_excess_differs",
    "borderline_values",
    "concurrent_respiratory_acidosis",
    "concurrent_respiratory_alkalosis",
    "compensation_as_expected",
    "ph_rule_drift",
    "chronicity_not_judged",
    "concurrent_metabolic_acidosis",
    "concurrent_metabolic_alkalosis",
    "chronicity_rules_disagree",
    "baseline_and_hco3_disagree",
    "anion_gap_low",
    "osmolar_gap_raised",
    "lactate_raised",
    "anion_gap_needs_electrolytes",
    "high_anion_gap_acidosis_found",
    "anion_gap_raised",
    "metabolic_alkalosis_from_gap",
    "anion_gap_reading",
    "chronicity_indeterminate",
    "respiratory_chronicity_assumed",
    "stewart_assumed_values",
    "strong_ion_gap_raised",
    "approaches_agree",
    "approaches_disagree",
    "boston_copenhagen_chronicity",
    "pco2_target",
    "baseline_estimate_unreliable",
    "pco2_below_baseline",
    "niv_criteria_need_arterial_sample",
    "niv_criteria_met",
    "ventilation_failing_to_compensate",
    "compensation_incomplete",
    "pco2_above_consciousness_threshold",
    "respiratory_failure_type_2",
    "respiratory_failure_type_1",
    "hypoxaemia_masked_by_oxygen",
    "venous_po2_not_interpreted",
    "capillary_po2",
    "oxygen_probably_given",
    "air_assumed",
    "po2_above_alveolar",
    "a_a_on_oxygen",
    "pure_hypoventilation",
    "gas_exchange_impaired",
    "low_inspired_oxygen",
    "a_a_needs_age",
    "temperature_ph_stat_view",
    "spo2_target",
    "spo2_target_needs_history",
    "hypercapnic_without_risk_flag",
    "spo2_below_target",
    "spo2_above_target",
    "severe_acidaemia",
    "severe_alkalaemia",
    "normal_ph_single_disorder",
    "venous_sample",
    "capillary_sample",
)

#: severities of the findings whose severity never changes (the others are in ``Decision.severity``)
SEVERITY = {
    "possible_unit_mix_up": "notable",
    "value_unusual": "notable",
    "pb_used_not_altitude": "info",
    "inconsistent_triple": "urgent",
    "provisional_interpretation": "notable",
    "hco3_calculated": "info",
    "base_excess_differs": "notable",
    "borderline_values": "info",
    "concurrent_respiratory_acidosis": "notable",
    "concurrent_respiratory_alkalosis": "notable",
    "compensation_as_expected": "info",
    "ph_rule_drift": "info",
    "chronicity_not_judged": "info",
    "concurrent_metabolic_acidosis": "notable",
    "concurrent_metabolic_alkalosis": "notable",
    "chronicity_rules_disagree": "info",
    "baseline_and_hco3_disagree": "info",
    "anion_gap_low": "notable",
    "osmolar_gap_raised": "notable",
    "lactate_raised": "notable",
    "anion_gap_needs_electrolytes": "info",
    "high_anion_gap_acidosis_found": "notable",
    "anion_gap_raised": "info",
    "metabolic_alkalosis_from_gap": "notable",
    "anion_gap_reading": "info",
    "chronicity_indeterminate": "info",
    "respiratory_chronicity_assumed": "info",
    "stewart_assumed_values": "info",
    "strong_ion_gap_raised": "info",
    "approaches_agree": "info",
    "boston_copenhagen_chronicity": "info",
    "baseline_estimate_unreliable": "notable",
    "pco2_target": "notable",
    "pco2_below_baseline": "notable",
    "niv_criteria_need_arterial_sample": "notable",
    "niv_criteria_met": "urgent",
    "ventilation_failing_to_compensate": "urgent",
    "compensation_incomplete": "notable",
    "pco2_above_consciousness_threshold": "urgent",
    "venous_po2_not_interpreted": "notable",
    "oxygen_probably_given": "notable",
    "air_assumed": "info",
    "po2_above_alveolar": "notable",
    "a_a_on_oxygen": "info",
    "hypoxaemia_masked_by_oxygen": "notable",
    "respiratory_failure_type_1": "notable",
    "respiratory_failure_type_2": "notable",
    "pure_hypoventilation": "notable",
    "gas_exchange_impaired": "notable",
    "low_inspired_oxygen": "notable",
    "a_a_needs_age": "info",
    "capillary_po2": "notable",
    "temperature_ph_stat_view": "info",
    "spo2_target": "info",
    "hypercapnic_without_risk_flag": "notable",
    "spo2_target_needs_history": "notable",
    "spo2_below_target": "notable",
    "severe_acidaemia": "urgent",
    "severe_alkalaemia": "urgent",
    "normal_ph_single_disorder": "info",
    "venous_sample": "notable",
    "capillary_sample": "info",
}

#: the four disorder codes, in the contract's order
DISORDER_CODES = (MET_ACID, MET_ALK, RESP_ACID, RESP_ALK)
#: "no code" in the array-polymorphic decisions (None in the report)
NONE = ""


class Decision(SimpleNamespace):
    """Everything :func:`decide` works out about one sample (scalars) or many (arrays of the same length).

    Numbers that do not apply are NaN; words that do not apply are ``""``. The main attributes:

    - ``primary`` (final primary disorder code, or ``""``), ``has`` (code -> bool), ``stage`` (code -> the
      step that named it: 0 primary, 1 compensation rules, 2 anion gap, 3 gap-based alkalosis; the order of
      the ``disorders`` list), ``chronicity`` and ``fraction_acute`` of the respiratory disorder;
    - ``consistency``, ``doubtful``, the numbers every rule used (``hco3``, ``sbe``, gaps, oxygenation ...);
    - ``finding`` (code -> bool, every code of :data:`FINDING_ORDER`) and ``severity`` (code -> severity, for
      the codes whose severity depends on the sample);
    - ``niv``, ``respiratory_failure``, ``a_a_category``, ``spo2_low``/``spo2_high``, ``pco2_target``,
      ``consciousness_threshold`` and the other key outputs.
    """


def _ones(flag):
    """1 where ``flag`` holds, else 0 (so flags can be counted: numpy adds boolean arrays as a logical or)."""
    return where(flag, 1, 0)


def _primary_process(ph, pco2, hco3):
    """(primary code or ``""``, tentative) for the pH, PCO2 and HCO3 the rules use (see primary_process)."""
    resp_w = abs(log10(pco2 / ab.NORMAL_PCO2_MMHG))
    met_w = abs(log10(ab.NORMAL_HCO3_MMOL_L / hco3))
    resp_larger = resp_w >= met_w  # a tie names the respiratory process

    def side(resp_ok, met_ok, resp_code, met_code, resp_lean, met_lean):
        larger = where(resp_larger, resp_code, met_code)
        one = where(resp_ok, resp_code, met_code)
        nothing = not_(resp_ok | met_ok)
        # no value outside its range: the larger contribution among those on this side of 40 / 24 (tentative)
        lean = where(
            resp_lean & met_lean, larger, where(resp_lean, resp_code, where(met_lean, met_code, NONE))
        )
        return where(resp_ok & met_ok, larger, where(nothing, lean, one)), nothing

    ma, ra = hco3 < HCO3_LOW, pco2 > PCO2_HIGH
    mk, rk = hco3 > HCO3_HIGH, pco2 < PCO2_LOW
    acid_code, acid_tentative = side(
        ra, ma, RESP_ACID, MET_ACID, pco2 > ab.NORMAL_PCO2_MMHG, hco3 < ab.NORMAL_HCO3_MMOL_L
    )
    alk_code, alk_tentative = side(
        rk, mk, RESP_ALK, MET_ALK, pco2 < ab.NORMAL_PCO2_MMHG, hco3 > ab.NORMAL_HCO3_MMOL_L
    )
    any_acid, any_alk = ra | ma, rk | mk
    acid_side = where(
        ph < PH_LOW, True, where(ph > PH_HIGH, False, where(ph < ab.NORMAL_PH, any_acid, not_(any_alk)))
    )
    quiet = (ph >= PH_LOW) & (ph <= PH_HIGH) & not_(any_acid | any_alk)
    code = where(quiet, NONE, where(acid_side, acid_code, alk_code))
    tentative = where(quiet, False, where(acid_side, acid_tentative, alk_tentative))
    return code, tentative


def decide(x) -> Decision:
    """Every decision of the blood_gas interpretation, for one sample or for arrays of samples.

    ``x`` has the attributes of :data:`NUMERIC_FIELDS` (pressures in mmHg, concentrations in mmol/L, albumin
    and normal albumin in g/dL, temperature in degC; NaN when not given), ``site`` (word),
    ``hypercapnia_risk`` (bool) and the reading flags ``mix_up``, ``unusual`` and ``pb_and_altitude``
    (bool). Floats give a :class:`Decision` of floats, words and bools; numpy arrays (numpy loaded by the
    caller) give arrays.
    :func:`blood_gas` builds its report on the scalar answer; the batch audit and the uncertainty calculation
    use the array answer, so all three apply the same rules by construction.
    """
    d = Decision()
    ph, p, site, risk = x.ph, x.pco2, x.site, x.hypercapnia_risk
    venous, capillary = site == "venous", site == "capillary"
    arterial = not_(venous | capillary)
    # inputs of the CO2-retainer rules (absent on callers that predate them: FiO2 given, history unknown)
    fio2_given = getattr(x, "fio2_given", True)
    previous = getattr(x, "previous_failure", NAN)
    rx_low, rx_high = getattr(x, "spo2_rx_low", NAN), getattr(x, "spo2_rx_high", NAN)
    d.venous = venous
    f = {}
    sev = {}
    f["possible_unit_mix_up"] = x.mix_up
    f["value_unusual"] = x.unusual
    f["pb_used_not_altitude"] = x.pb_and_altitude

    # -- HCO3, consistency, base excess (henderson1908, nccls1994) -------------------------------------------
    hco3_given = given(x.hco3)
    d.hco3_given = hco3_given
    d.hco3_computed = ab._hco3_hh(ph, p)
    d.h_measured = ab._h_from_ph(ph)
    c = ab._consistency(ph, p, x.hco3)
    d.ph_computed, d.ph_difference, d.h_kassirer = c.ph_computed, c.ph_difference, c.h_kassirer_nmol_l
    d.doubtful = doubtful = hco3_given & not_(c.consistent)
    sound = not_(doubtful)
    d.consistency = where(doubtful, "inconsistent", "consistent")
    d.hco3_out = where(hco3_given, x.hco3, d.hco3_computed)
    d.hco3 = h = where(hco3_given & c.consistent, x.hco3, d.hco3_computed)
    f["inconsistent_triple"] = f["provisional_interpretation"] = doubtful
    f["hco3_calculated"] = not_(hco3_given)
    d.sbe = sbe = ab._sbe_clsi(ph, d.hco3_out)
    so2 = where(given(x.spo2), x.spo2 / 100.0, 1.0)
    d.sbe_siggaard = ab._sbe_siggaard(ph, d.hco3_out)
    d.sbe_van_slyke_hb5 = ab._be_van_slyke(ph, d.hco3_out, 5.0)
    d.be_blood = ab._be_van_slyke(ph, d.hco3_out, x.hb)
    d.be_zander = ab._be_zander(ph, p, x.hb, so2)
    low = minimum(minimum(sbe, d.sbe_siggaard), d.sbe_van_slyke_hb5)
    high = maximum(maximum(sbe, d.sbe_siggaard), d.sbe_van_slyke_hb5)
    with_hb = given(x.hb)
    d.be_low = where(with_hb, minimum(minimum(low, d.be_blood), d.be_zander), low)
    d.be_high = where(with_hb, maximum(maximum(high, d.be_blood), d.be_zander), high)
    be = x.base_excess
    d.be_difference = be - sbe
    f["base_excess_differs"] = given(be) & not_((d.be_low - 2.0 <= be) & (be <= d.be_high + 2.0))
    d.ph_status = where(ph < PH_LOW, "acidaemia", where(ph > PH_HIGH, "alkalaemia", "normal"))
    d.pco2_status = where(p > PCO2_HIGH, "hypercapnia", where(p < PCO2_LOW, "hypocapnia", "normal"))

    # -- primary process and compensation (albert1967, narins1980) -------------------------------------------
    primary0, tentative = _primary_process(ph, p, h)
    d.primary_classified, d.tentative = primary0, tentative
    f["borderline_values"] = tentative & (primary0 != NONE)
    met0 = (primary0 == MET_ACID) | (primary0 == MET_ALK)
    resp0 = (primary0 == RESP_ACID) | (primary0 == RESP_ALK)
    d.respiratory_primary = resp0
    winters, alkalosis = ab._winters(h), ab._metabolic_alkalosis_pco2(h)
    d.winters = winters
    # a metabolic primary: is the PaCO2 inside the band compensation explains?
    e_high = where(primary0 == MET_ACID, winters.high, alkalosis.high)
    e_low = where(primary0 == MET_ACID, winters.low, alkalosis.low)
    above, below = met0 & (p > e_high), met0 & (p < e_low)
    d.response = where(above, RESP_ACID, where(below, RESP_ALK, NONE))
    f["concurrent_respiratory_acidosis"] = above
    f["concurrent_respiratory_alkalosis"] = met0 & not_(above) & below
    f["compensation_as_expected"] = met0 & not_(above | below)
    below = f["concurrent_respiratory_alkalosis"]

    # a respiratory primary: acute and chronic expectations, fraction acute, a concurrent metabolic process
    acid = primary0 == RESP_ACID
    d.acid = acid
    e_acid, e_alk = ab._respiratory_acidosis_hco3(p), ab._respiratory_alkalosis_hco3(p)
    d.e_acid = e_acid
    d.e_acute = ab.Expected(*(where(acid, a, b) for a, b in zip(e_acid.acute, e_alk.acute, strict=True)))
    d.e_chronic = ab.Expected(
        *(where(acid, a, b) for a, b in zip(e_acid.chronic, e_alk.chronic, strict=True))
    )
    ea, ec = d.e_acute.value, d.e_chronic.value
    delta = p - ab.NORMAL_PCO2_MMHG
    d.margin = margin = maximum(HCO3_MARGIN_MIN, 0.2 * abs(ec - ea))
    d.judge = judge = abs(delta) >= 5.0
    d.f_h = f_h = where(abs(delta) >= 1.0, ab._fraction_acute_hco3(p, h), NAN)
    d.ph_rules = ab._respiratory_acidosis_ph(p)
    d.ph_hh_acute = ab._ph_hh(e_acid.acute.value, p)
    d.ph_hh_chronic = ab._ph_hh(e_acid.chronic.value, p)
    d.f_ph = f_ph = where(acid & (p >= 41.0), ab._fraction_acute_ph(ph, p), NAN)
    f["ph_rule_drift"] = acid & (delta > 30.0)
    b = x.baseline_pco2
    has_b = given(b)
    on_baseline = acid & has_b
    d.hco3_on_baseline = ab._hco3_on_baseline(p, b)
    base = maximum(b, ab.NORMAL_PCO2_MMHG)
    d.f_b = f_b = where(
        on_baseline, where((p > base) & (delta > 0), clamp(div(p - base, delta), 0.0, 1.0), 0.0), NAN
    )
    d.low_ref = low_ref = where(on_baseline, d.hco3_on_baseline, where(acid, ea, ec))
    d.high_ref = high_ref = where(on_baseline, d.hco3_on_baseline, where(acid, ec, ea))
    met_acid = resp0 & (h < low_ref - margin)
    # beside a respiratory acidosis a metabolic alkalosis is named only above the steepest published chronic
    # band (5 per 10 mmHg, Martinu 2003) with an SBE above the Copenhagen chronic expectation + 3 (Schlichtig
    # 1998): a HCO3 inside the band the report prints as expected never names one
    d.sbe_chronic_limit = 0.4 * delta + SBE_TOLERANCE
    alk_limit = where(acid, maximum(high_ref + margin, e_acid.chronic.high), high_ref + margin)
    d.alk_limit = alk_limit
    met_alk = resp0 & (h > alk_limit) & where(acid, sbe > d.sbe_chronic_limit, True)
    by_h = where(given(f_h), ab._chronicity(f_h), "acute")
    by_b = ab._chronicity(f_b)
    judged_b = judge & given(f_b)
    judged_h = judge & not_(met_acid | met_alk) & given(f_h)
    resp_chronicity = where(judged_b, by_b, where(judged_h, by_h, where(given(f_b), by_b, by_h)))
    resp_fraction = where(judged_b, f_b, where(judged_h, clamp(f_h, 0.0, 1.0), NAN))
    f["chronicity_not_judged"] = resp0 & not_(judge)
    f["concurrent_metabolic_alkalosis"] = met_alk
    d.by_ph = by_ph = ab._chronicity(f_ph)
    f["chronicity_rules_disagree"] = (
        resp0 & acid & not_(given(f_b)) & given(f_ph) & (by_ph != resp_chronicity)
    )
    f["baseline_and_hco3_disagree"] = (
        resp0
        & given(f_b)
        & given(f_h)
        & judge
        & not_(met_acid | met_alk)
        & (ab._chronicity(f_h) != resp_chronicity)
    )
    has_ma = (primary0 == MET_ACID) | met_acid
    has_mk = (primary0 == MET_ALK) | met_alk
    has_ra = (primary0 == RESP_ACID) | above
    has_rk = (primary0 == RESP_ALK) | below

    # -- gaps (kraut2007, brandis); named disorders only on consistent data ----------------------------------
    na, cl = x.na, x.cl
    d.has_gap = has_gap = given(na) & given(cl)
    d.anion_gap = ag = ab._anion_gap(na, cl, d.hco3_out)
    d.anion_gap_with_k = ag + x.k
    with_albumin = given(x.albumin)
    d.anion_gap_corrected = ab._anion_gap_corrected(ag, x.albumin, x.normal_albumin)
    d.ag_used = used = where(with_albumin, d.anion_gap_corrected, ag)
    d.dr_given = has_gap & (d.hco3_out < 23.5)
    d.delta_ratio = ab._delta_ratio(used, d.hco3_out)
    d.delta_ratio_band = band = ab._delta_ratio_band(d.delta_ratio)
    d.delta_gap = dg = ab._delta_gap(used, d.hco3_out)
    d.delta_gap_reading = ab._delta_gap_reading(dg)
    f["anion_gap_low"] = has_gap & (used < 3.0)
    d.osm_calc_given = given(na) & given(x.glucose) & given(x.urea)
    d.osmolality_calculated = ab._osmolality_calculated(na, x.glucose, x.urea)
    d.osm_gap_given = d.osm_calc_given & given(x.osm)
    d.osmolar_gap = ab._osmolar_gap(x.osm, d.osmolality_calculated)
    f["osmolar_gap_raised"] = d.osm_gap_given & (d.osmolar_gap >= 10.0)
    f["lactate_raised"] = sound & (x.lactate > LACTATE_RAISED)
    # beside an acidaemic primary respiratory acidosis, a lactate of 4 or more or an anion gap above 16
    # names a concurrent metabolic acidosis, whatever the HCO3 (lactic acidosis: Cohen & Woods 1976, from
    # memory; thresholds common practice)
    d.ma_from_lactate_or_gap = beside = (
        sound
        & (primary0 == RESP_ACID)
        & (ph < PH_LOW)
        & not_(met_acid)
        & ((x.lactate >= LACTATE_ACIDOSIS) | (has_gap & (used > AG_BESIDE_HYPERCAPNIA)))
    )
    met_acid = met_acid | beside
    has_ma = has_ma | beside
    f["concurrent_metabolic_acidosis"] = met_acid
    f["anion_gap_needs_electrolytes"] = sound & not_(has_gap) & has_ma
    gap = sound & has_gap
    found = gap & not_(has_ma) & (used >= AG_ALWAYS_ACIDOSIS)
    f["high_anion_gap_acidosis_found"] = found
    d.gap_primary = found & (primary0 == NONE)
    d.primary = primary = where(d.gap_primary, MET_ACID, primary0)
    has_ma = has_ma | found
    f["anion_gap_raised"] = gap & not_(has_ma) & (used > ab.NORMAL_ANION_GAP_MMOL_L + 4.0)
    acidosis = gap & has_ma
    d.winters_concurrent = acidosis & (primary != MET_ACID)
    d.hco3_before_gap = before = h + (used - ab.NORMAL_ANION_GAP_MMOL_L)
    normal_ag = used <= ab.NORMAL_ANION_GAP_MMOL_L
    d.before_shown = acidosis & not_(normal_ag) & resp0
    type_resp = where(before < low_ref - margin, "high_and_normal_anion_gap", "high_anion_gap")
    type_band = where(
        d.dr_given & (band == "normal_anion_gap_acidosis"),
        "normal_anion_gap",
        where(
            d.dr_given & (band == "high_and_normal_anion_gap_acidosis"),
            "high_and_normal_anion_gap",
            "high_anion_gap",
        ),
    )
    d.acidosis_type = where(
        acidosis, where(normal_ag, "normal_anion_gap", where(resp0, type_resp, type_band)), NONE
    )
    raised = acidosis & not_(normal_ag) & not_(has_mk)
    # with a respiratory primary the HCO3 before the gap is compared with the respiratory expectation (for a
    # respiratory acidosis: beyond the steepest chronic band); beside a respiratory alkalosis the delta ratio,
    # where it can be computed, must agree (above 2), so the reading never contradicts its own delta reading
    alk_after_gap = (
        raised
        & resp0
        & (before > alk_limit)
        & where((primary0 == RESP_ALK) & d.dr_given, band == "high_anion_gap_acidosis_with_raised_hco3", True)
    )
    alk_delta_gap = raised & not_(resp0) & not_(d.dr_given) & (dg > 6.0)
    alk_delta_ratio = raised & not_(resp0) & d.dr_given & (band == "high_anion_gap_acidosis_with_raised_hco3")
    d.alkalosis_from_gap = where(
        alk_after_gap,
        "hco3_before_gap",
        where(alk_delta_gap, "delta_gap", where(alk_delta_ratio, "delta_ratio", NONE)),
    )
    from_gap = alk_after_gap | alk_delta_gap | alk_delta_ratio
    f["metabolic_alkalosis_from_gap"] = from_gap
    f["anion_gap_reading"] = acidosis
    d.has_mk_before_gap = has_mk
    has_mk = has_mk | from_gap

    # -- chronicity when a metabolic disorder also moves the HCO3 --------------------------------------------
    metabolic = has_ma | has_mk
    # a high anion gap acidosis alone beside a respiratory acidosis: the HCO3 before the gap,
    # HCO3 + (AG - 12), is what the chronicity reading uses (delta gap method; Wrenn 1990, Rastegar 2007)
    d.before_gap_used = by_gap = (
        resp0 & acid & has_ma & not_(has_mk) & gap & (used > ab.NORMAL_ANION_GAP_MMOL_L) & judge
    )
    d.f_before = f_before = where(by_gap, ab._fraction_acute_hco3(p, before), NAN)
    judged_gap = by_gap & not_(given(f_b))
    resp_chronicity = where(judged_gap, ab._chronicity(f_before), resp_chronicity)
    resp_fraction = where(judged_gap, clamp(f_before, 0.0, 1.0), resp_fraction)
    indeterminate = resp0 & not_(given(f_b)) & metabolic & not_(by_gap)
    f["chronicity_indeterminate"] = indeterminate
    resp_fraction = where(indeterminate, NAN, resp_fraction)
    # a venous sample screens: its respiratory chronicity is not judged (the word is what the HCO3 rules
    # alone say, with no fraction), and it gets no PaCO2 target
    resp_fraction = where(venous, NAN, resp_fraction)
    concurrent = met0 & (above | below)
    conc_b = concurrent & has_b & above & (p > ab.NORMAL_PCO2_MMHG + 1.0)
    d.concurrent_from_baseline = conc_b
    conc_f = where(conc_b, clamp(div(p - base, p - ab.NORMAL_PCO2_MMHG), 0.0, 1.0), NAN)
    f["respiratory_chronicity_assumed"] = concurrent & not_(conc_b)
    d.chronicity = where(
        resp0, resp_chronicity, where(conc_b, ab._chronicity(conc_f), where(concurrent, "acute", NONE))
    )
    d.fraction_acute = where(resp0, resp_fraction, where(venous, NAN, conc_f))
    d.fraction_acute_baseline = where(resp0, f_b, conc_f)
    d.has = {MET_ACID: has_ma, MET_ALK: has_mk, RESP_ACID: has_ra, RESP_ALK: has_rk}
    d.stage = {
        MET_ACID: where(primary == MET_ACID, 0, where(met_acid, 1, 2)),
        MET_ALK: where(primary == MET_ALK, 0, where(met_alk, 1, 3)),
        RESP_ACID: where(primary == RESP_ACID, 0, 1),
        RESP_ALK: where(primary == RESP_ALK, 0, 1),
    }
    d.count = _ones(has_ma) + _ones(has_mk) + _ones(has_ra) + _ones(has_rk)

    # -- Copenhagen (SBE) reading ----------------------------------------------------------------------------
    sbe_ok = (-40.0 <= sbe) & (sbe <= 40.0)
    cph = sound & sbe_ok
    d.copenhagen = cph
    d.cph_pco2_given = cph & ((primary == MET_ACID) | (primary == MET_ALK))
    x_acid, x_alk = ab._pco2_sbe_acidosis(sbe), ab._pco2_sbe_alkalosis(sbe)
    d.cph_pco2 = where(primary == MET_ACID, x_acid, x_alk)
    d.cph_fits = where(primary == MET_ACID, abs(p - x_acid) <= 2.0, abs(p - x_alk) <= 5.0)
    sbe_acute, sbe_chronic = ab._sbe_respiratory(p)
    d.sbe_acute, d.sbe_chronic = sbe_acute, sbe_chronic
    lo = where(resp0, minimum(sbe_acute, sbe_chronic), 0.0)
    hi = where(resp0, maximum(sbe_acute, sbe_chronic), 0.0)
    near_a = abs(sbe - sbe_acute) <= SBE_TOLERANCE
    near_c = abs(sbe - sbe_chronic) <= SBE_TOLERANCE
    d.cph_chronicity_given = cph & resp0 & (lo - SBE_TOLERANCE <= sbe) & (sbe <= hi + SBE_TOLERANCE) & judge
    d.cph_chronicity = where(
        near_a & near_c, NONE, where(near_a, "acute", where(near_c, "chronic", "acute_on_chronic"))
    )
    d.cph_acid = sbe < lo - SBE_TOLERANCE
    d.cph_alk = sbe > hi + SBE_TOLERANCE

    # -- Stewart ---------------------------------------------------------------------------------------------
    d.stewart_full = full = with_albumin & sbe_ok
    lactate_given = given(x.lactate)
    alb_g_l = x.albumin * 10.0
    d.story2016 = ab._story2016(sbe, na, cl, alb_g_l, where(lactate_given, x.lactate, 0.0))
    d.story2004 = ab._story2004(sbe, na, cl, alb_g_l)
    d.na_cl_effect = na - cl - 35.0
    effects = {
        "na_cl": (has_gap, d.na_cl_effect),
        "albumin": (has_gap & full, d.story2016.albumin),
        "unmeasured": (has_gap & full, d.story2016.unmeasured),
        "lactate": (has_gap & lactate_given, -x.lactate),
    }
    d.effect_acidifying = {k: ok & (v <= -STEWART_EFFECT) for k, (ok, v) in effects.items()}
    d.effect_alkalinising = {k: ok & (v >= STEWART_EFFECT) for k, (ok, v) in effects.items()}
    st_acid = st_alk = False
    for k in effects:
        st_acid = st_acid | d.effect_acidifying[k]
        st_alk = st_alk | d.effect_alkalinising[k]
    d.sig_given = sig_ok = has_gap & given(x.k) & with_albumin
    d.assumed = {
        "ca": not_(given(x.ca_ionised)),
        "mg": not_(given(x.mg)),
        "phosphate": not_(given(x.phosphate)),
        "lactate": not_(lactate_given),
    }
    ca = where(given(x.ca_ionised), x.ca_ionised, TYPICAL_CA_IONISED)
    mg = where(given(x.mg), x.mg, TYPICAL_MG)
    phos = where(given(x.phosphate), x.phosphate, TYPICAL_PHOSPHATE)
    d.stewart_terms = (ca, mg, phos)
    d.sid_apparent = ab._sid_apparent(na, x.k, ca, mg, cl, where(lactate_given, x.lactate, 0.0))
    d.albumin_charge = ab._albumin_charge(alb_g_l, ph)
    d.phosphate_charge = ab._phosphate_charge(phos, ph)
    d.sid_effective = ab._sid_effective(d.hco3_out, alb_g_l, phos, ph)
    d.strong_ion_gap = ab._strong_ion_gap(d.sid_apparent, d.sid_effective)
    any_assumed = d.assumed["ca"] | d.assumed["mg"] | d.assumed["phosphate"] | d.assumed["lactate"]
    f["stewart_assumed_values"] = sound & sig_ok & any_assumed
    f["strong_ion_gap_raised"] = sound & sig_ok & (d.strong_ion_gap > 4.0)

    # -- the three readings of the metabolic component side by side ------------------------------------------
    agree_bc = (has_ma == d.cph_acid) & (has_mk == d.cph_alk)
    d.resp_differs = d.cph_pco2_given & ((has_ra | has_rk) == d.cph_fits)
    d.stewart_pair_given = has_gap & full
    stewart_agrees = (st_acid == has_ma) & (st_alk == has_mk)
    agree_all = agree_bc & not_(d.resp_differs) & (not_(d.stewart_pair_given) | stewart_agrees)
    d.agree_bc, d.stewart_acid, d.stewart_alk = agree_bc, st_acid, st_alk
    f["approaches_agree"] = cph & agree_all
    f["approaches_disagree"] = cph & not_(agree_all)
    sev["approaches_disagree"] = where(agree_bc, "info", "notable")
    f["boston_copenhagen_chronicity"] = (
        cph & d.cph_chronicity_given & (d.cph_chronicity != NONE) & (resp_chronicity != d.cph_chronicity)
    )

    # -- ventilation safety: the PaCO2 aim (P(x) = PaCO2 x 10^(pH - x), the PaCO2 giving pH x at today's
    # buffer state; Henderson-Hasselbalch), NIV thresholds (BTS/ICS 2016), consciousness -------------------
    d.target_given = target = has_ra & not_(venous)
    d.p_at_735 = p735 = p * 10.0 ** (ph - NIV_PH)
    d.floor = floor = p * 10.0 ** (ph - FLOOR_PH)
    d.met_expected = ab.Expected(
        *(where(primary == MET_ACID, a, c_) for a, c_ in zip(winters, alkalosis, strict=True))
    )
    # the usual PaCO2 estimated by inverting chronic 3.5 and acute 1 per 10 mmHg, from the HCO3 before any
    # high anion gap (its range across the published chronic slopes 5 to 3 is shown beside it)
    h_usual = where(by_gap, before, h)
    d.hco3_for_usual = h_usual
    d.baseline_estimated = ab._baseline_pco2(maximum(p, 41.0), h_usual)
    d.baseline_low = ab._baseline_pco2(maximum(p, 41.0), h_usual, 5.0)
    d.baseline_high = ab._baseline_pco2(maximum(p, 41.0), h_usual, 3.0)
    chronic_part = (d.chronicity == "chronic") | (d.chronicity == "acute_on_chronic")
    d.usual_estimated = estimated = not_(has_b) & resp0 & chronic_part & not_(indeterminate)
    # a metabolic process that moves the HCO3 beyond what the gap explains hides any chronic retention: the
    # usual PaCO2 is then unknown, and 45 mmHg would be unsafe, so the aim is P(7.35) (independent review)
    unknown = not_(has_b) & resp0 & indeterminate
    usual = where(
        has_b, b, where(estimated & not_(unknown), d.baseline_estimated, where(unknown, INF, PCO2_HIGH))
    )
    d.usual_pco2 = usual
    acidaemic = ph < PH_LOW
    metabolic_acidosis_primary = primary == MET_ACID
    aim = where(
        metabolic_acidosis_primary,
        winters.value,
        where(acidaemic, minimum(p735, usual), where(has_b, minimum(p, b), p)),
    )
    # beside a concurrent metabolic acidosis the aim is never below Winters' centre: lower would be more
    # ventilation than full compensation of the metabolic part
    winters_bound = has_ma & not_(metabolic_acidosis_primary) & (aim < winters.value)
    aim = where(winters_bound, winters.value, aim)
    basis = where(
        metabolic_acidosis_primary | winters_bound,
        "metabolic_compensation",
        where(
            acidaemic,
            where(
                p735 <= usual,
                "ph_7_35",
                where(
                    has_b, "usual_pco2_given", where(estimated, "usual_pco2_estimated", "normal_upper_limit")
                ),
            ),
            where(has_b & (b < p), "usual_pco2_given", "present_pco2"),
        ),
    )
    # never below the alkalaemia floor P(7.45), never above the present PaCO2
    lifted = aim < floor
    aim = maximum(aim, floor)
    capped = aim > p
    aim = minimum(aim, p)
    basis = where(capped, "present_pco2", where(lifted, "alkalaemia_floor", basis))
    d.pco2_target = where(target, aim, NAN)
    d.pco2_target_basis = where(target, basis, NONE)
    d.baseline_pco2_source = where(
        target, where(has_b, "given", where(estimated & acidaemic, "estimated", "none")), NONE
    )
    d.target_route = d.pco2_target_basis
    f["baseline_estimate_unreliable"] = target & unknown & acidaemic & chronic_part
    f["pco2_target"] = target
    # below the usual PaCO2 only reads as over-correction when the pH is not acidaemic (independent review)
    f["pco2_below_baseline"] = has_b & (p < b - 5.0) & (b > PCO2_HIGH) & (ph >= PH_LOW)
    meets = (ph < NIV_PH) & (p > NIV_PCO2_MMHG)
    d.niv = where(
        meets & venous,
        "not_assessable",
        where(meets & (primary == MET_ACID), "not_applicable", where(meets, "met", "not_met")),
    )
    f["niv_criteria_need_arterial_sample"] = meets & venous
    # the NIV threshold belongs to a primary respiratory acidosis; with a primary metabolic acidosis the same
    # numbers say that ventilation is failing to compensate
    f["niv_criteria_met"] = meets & not_(venous) & not_(metabolic_acidosis_primary)
    f["ventilation_failing_to_compensate"] = meets & not_(venous) & metabolic_acidosis_primary
    # pH < 7.35 with a raised PaCO2 is never "compensated as expected" (BTS/ICS 2016 definition)
    f["compensation_incomplete"] = (
        (primary == RESP_ACID) & acidaemic & (d.chronicity == "chronic") & not_(venous) & not_(has_ma)
    )
    # chronic retention, without a known baseline: the PaCO2 is raised and the HCO3 rules (before any high
    # anion gap) read it chronic or acute-on-chronic, with no other metabolic acidosis named (it would hide
    # retention). Read from the PaCO2 and HCO3 alone, not from which disorder is called primary (that call
    # flips at pH 7.40), so at a fixed HCO3 the threshold never rises as the PaCO2 rises.
    f_chronic = where(by_gap, f_before, f_h)
    d.retainer = where(
        has_b,
        b > PCO2_HIGH,
        (p > PCO2_HIGH) & given(f_chronic) & (f_chronic < ab.ACUTE_AT_LEAST) & (not_(has_ma) | by_gap),
    )
    d.consciousness_threshold = where(
        has_b,
        maximum(NARCOSIS_NORMAL_MMHG, b + NARCOSIS_RISE_MMHG),
        where(d.retainer, NARCOSIS_CHRONIC_MMHG, NARCOSIS_NORMAL_MMHG),
    )
    f["pco2_above_consciousness_threshold"] = p > d.consciousness_threshold

    # -- oxygenation (arterial PO2 only: an earlobe PO2 underestimates it, a venous one says nothing) -------
    po2, fio2 = x.po2, x.fio2
    has_po2 = given(po2)
    d.fio2_given = fio2_given
    d.fio2_source = where(fio2_given, "given", "assumed_air")
    f["venous_po2_not_interpreted"] = has_po2 & venous
    d.alveolar_given = ox = has_po2 & arterial
    d.pio2 = oxygenation._inspired(fio2, x.pb_value)
    d.pao2_alveolar = pao2_a = each(
        oxygenation.alveolar_po2_simple, ox, fio2_fraction=fio2, paco2_mmhg=p, pb_mmhg=x.pb_value, rq=x.rq
    )
    # FiO2 not recorded and a PaO2 above the alveolar PO2 on air: oxygen was probably given, so the
    # oxygenation reading is not interpretable (common practice)
    d.oxygen_probably_given = likely = ox & not_(fio2_given) & (po2 > pao2_a)
    f["oxygen_probably_given"] = likely
    d.oxygenation = readable = ox & not_(likely)
    # the alveolar PO2 is shown unless it is negative (air assumed, no alveolar oxygen left at this PaCO2)
    d.alveolar_given = ox & (pao2_a >= 0.0)
    d.a_a_gradient = aa = pao2_a - po2
    d.a_over_A = where(pao2_a > 0, div(po2, pao2_a), NAN)
    d.pf_ratio = pf = po2 / fio2
    f["po2_above_alveolar"] = readable & (aa < -10.0)
    with_age = given(x.age)
    d.a_a_expected_upper = upper = each(
        oxygenation.aa_gradient_upper_by_age, readable & with_age, age_years=x.age
    )
    adult_low = oxygenation.aa_gradient_upper_by_age(age_years=18.0)
    adult_high = oxygenation.aa_gradient_upper_by_age(age_years=100.0)
    category = where(
        with_age,
        where(aa > upper, "raised", "normal"),
        where(aa <= adult_low, "normal", where(aa > adult_high, "raised", "needs_age")),
    )
    d.a_a_category = where(readable, category, NONE)
    on_oxygen = fio2_given & (fio2 > 0.21)
    f["a_a_on_oxygen"] = readable & fio2_given & (fio2 > 0.3)
    # "above 6.0 kPa" (BTS 2017; 45.004 mmHg), so 6.0 kPa itself is not above
    hyper = p > HYPERCAPNIA_MMHG
    # respiratory failure: type 2 from the PaCO2 whenever a respiratory acidosis is named (with or without a
    # PO2); else type 1 from an arterial PaO2 below 8 kPa, or on oxygen a P/F at or below 300 mmHg, which the
    # oxygen would otherwise hide (ARDS Definition Task Force 2012 for the P/F bands; BTS 2017)
    type_2 = not_(venous) & has_ra & hyper
    low_po2 = readable & (po2 < HYPOXAEMIA_MMHG)
    d.pf_impaired = pf_low = readable & on_oxygen & (pf <= PF_IMPAIRED)
    type_1 = low_po2 | pf_low
    failure = where(type_2, "type_2", where(type_1, "type_1", "none"))
    d.rf_given = rf_given = not_(venous) & (type_2 | not_(likely))
    d.respiratory_failure = where(rf_given, failure, NONE)
    d.pf_band = where(
        pf_low,
        where(pf <= PF_SEVERE, "severe", where(pf <= PF_MODERATE, "moderate", "mild")),
        NONE,
    )
    f["hypoxaemia_masked_by_oxygen"] = pf_low & not_(low_po2)
    f["respiratory_failure_type_1"] = not_(type_2) & type_1
    f["respiratory_failure_type_2"] = type_2
    # the A-a reading of hypercapnia belongs to a respiratory acidosis (not to compensation of an alkalosis)
    f["pure_hypoventilation"] = readable & hyper & has_ra & (category == "normal")
    f["gas_exchange_impaired"] = readable & hyper & has_ra & (category == "raised")
    f["low_inspired_oxygen"] = readable & not_(hyper) & (category == "normal") & low_po2
    f["a_a_needs_age"] = readable & hyper & has_ra & (category == "needs_age")
    f["capillary_po2"] = has_po2 & capillary
    f["air_assumed"] = readable & not_(fio2_given)

    # -- temperature, oxygen target (BTS 2017), severity, sample site ---------------------------------------
    t = x.temperature
    d.temperature_given = given(t) & (abs(t - 37.0) >= 1e-9)
    f["temperature_ph_stat_view"] = d.temperature_given
    hyper_here = not_(venous) & hyper
    d.hyper_here = hyper_here
    risk = risk | (has_b & (b > PCO2_HIGH))  # a known usual PaCO2 above 45 mmHg: a chronic retainer
    prescribed = given(rx_low) & given(rx_high)
    had_failure = previous == 1.0
    history_unknown = not_(given(previous))
    # 88-92 % when the PCO2 is above 6.0 kPa (a venous one as a positive screen, pending an arterial or
    # earlobe gas) or after NIV or invasive ventilation for hypercapnic failure; an at-risk patient with a
    # normal PCO2 moves to 94-98 %; the patient's prescribed range overrides both
    d.at_risk = at_risk = where(prescribed, rx_low < 94.0, hyper | had_failure)
    d.spo2_basis = where(
        prescribed,
        "prescribed",
        where(
            hyper,
            where(venous, "venous_pco2_raised", "hypercapnic"),
            where(had_failure, "previous_hypercapnic_failure", where(risk, "at_risk_pco2_normal", "default")),
        ),
    )
    d.spo2_low = where(prescribed, rx_low, where(hyper | had_failure, 88, 94))
    d.spo2_high = where(prescribed, rx_high, where(hyper | had_failure, 92, 98))
    f["spo2_target"] = where(at_risk, True, True)
    f["hypercapnic_without_risk_flag"] = hyper_here & not_(risk) & not_(had_failure)
    f["spo2_target_needs_history"] = not_(prescribed) & risk & not_(hyper) & history_unknown
    spo2 = x.spo2
    f["spo2_below_target"] = spo2 < d.spo2_low
    f["spo2_above_target"] = spo2 > d.spo2_high
    sev["spo2_above_target"] = where(at_risk, where(hyper_here & (ph < PH_LOW), "urgent", "notable"), "info")
    f["severe_acidaemia"] = ph < SEVERE_ACIDAEMIA_PH
    f["severe_alkalaemia"] = not_(ph < SEVERE_ACIDAEMIA_PH) & (ph > SEVERE_ALKALAEMIA_PH)
    single_chronic_alkalosis = (primary == RESP_ALK) & (d.chronicity == "chronic")
    f["normal_ph_single_disorder"] = (
        (d.ph_status == "normal") & (d.count == 1) & not_(single_chronic_alkalosis)
    )
    f["venous_sample"] = venous
    f["capillary_sample"] = capillary

    d.finding = f
    d.severity = sev
    return d


class _Work:
    """The report being written for one sample, with the decisions it rests on (``d``)."""

    def __init__(self, s: _Sample, report: Report, d: Decision):
        self.s = s
        self.r = report
        self.d = d
        self.primary: str | None = _code(d.primary)
        self.tentative = bool(d.tentative)
        self.hco3: float = d.hco3  # the HCO3 the rules use
        self.hco3_out: float = d.hco3_out  # the reported HCO3, else computed
        self.consistent: bool | None = (not d.doubtful) if d.hco3_given else None
        self.sbe: float = d.sbe
        self.disorders: list[dict] = disorders(d)
        self.resp: bool = bool(d.respiratory_primary)
        self.met_expected = d.met_expected if self.primary in (MET_ACID, MET_ALK) else None
        self.compensation_text = ""
        self.ag_used: float | None = None
        self.acidosis_type: str | None = _code(d.acidosis_type)
        self.oxygen: dict = {}
        self.temp: dict = {}
        self.pco2_target: float | None = None
        self.target_basis: str | None = None
        self.spo2_target: tuple[int, int] | None = None
        self.niv: str | None = None

    # -- helpers ---------------------------------------------------------------------------------------------
    def p(self, mmhg: float) -> str:
        """A pressure in the user's unit, as text."""
        return self.r.pressure_text(mmhg)

    def basis_text(self, basis: str) -> str:
        """Why the SpO2 target is what it is, thresholds in the user's unit."""
        return SPO2_BASIS[basis].format(limit=self.p(PCO2_HIGH))

    def pf(self, mmhg: float) -> str:
        """A P/F ratio in the user's pressure unit, as text (kPa to one decimal, mmHg whole)."""
        if self.r.pressure_unit == "kPa":
            return f"{units.convert(mmhg, 'mmHg', 'kPa'):.1f} kPa"
        return f"{mmhg:.0f} mmHg"

    def codes(self) -> list[str]:
        return [d["code"] for d in self.disorders]

    def has(self, code: str) -> bool:
        return bool(self.d.has[code])

    def fires(self, code: str) -> bool:
        return bool(self.d.finding[code])

    @property
    def doubtful(self) -> bool:
        return self.consistent is False


def _code(word: str) -> str | None:
    return word if word else None


def disorders(d: Decision) -> list[dict]:
    """The ``disorders`` output of a scalar :class:`Decision`: primary first, then in the order named."""
    present = sorted((d.stage[code], code) for code in DISORDER_CODES if d.has[code])
    out = []
    for i, (_, code) in enumerate(present):
        respiratory = code in (RESP_ACID, RESP_ALK)
        out.append(
            {
                "code": code,
                "role": "primary" if i == 0 else "concurrent",
                "chronicity": _code(d.chronicity) if respiratory else None,
                "fraction_acute": none_if_nan(d.fraction_acute) if respiratory else None,
            }
        )
    return out


def findings(d: Decision) -> list[str]:
    """The finding codes of a scalar :class:`Decision`, in the response's order (urgent, notable, info)."""
    order = {"urgent": 0, "notable": 1, "info": 2}
    codes = [code for code in FINDING_ORDER if d.finding[code]]
    return sorted(codes, key=lambda code: order[d.severity.get(code, SEVERITY.get(code))])


# -- the calculation -----------------------------------------------------------------------------------------


def blood_gas(inputs: Inputs, report: Report) -> None:
    """Interpret one blood-gas sample (docs/bridge.md); see the module docstring for the rules."""
    s = _Sample(inputs, pressure_unit=report.pressure_unit)
    w = _Work(s, report, decide(s.values()))
    _input_findings(w)
    _core(w)
    _classify(w)
    if not w.doubtful:
        _gaps(w)
        _finish_chronicity(w)
        _copenhagen(w)
        _stewart(w)
        _compare(w)
    else:
        _gap_outputs_only(w)
        _finish_chronicity(w)
    _ventilation(w)
    _oxygenation(w)
    _temperature(w)
    _spo2_target(w)
    _severity(w)
    _outputs(w)
    _cautions(w)
    _summary(w)


def _input_findings(w: _Work) -> None:
    s, r = w.s, w.r
    if w.fires("possible_unit_mix_up"):
        text = "Possible unit mix-up: " + " ".join(s.mix_ups)
        r.finding("possible_unit_mix_up", "notable", text, s.mix_up_suggest)
    if w.fires("value_unusual"):
        r.finding("value_unusual", "notable", "Unusual value: " + "; ".join(s.unusual) + ".")
    if w.fires("pb_used_not_altitude"):
        r.finding(
            "pb_used_not_altitude",
            "info",
            "Both barometric pressure and altitude were given: the measured pressure is used, the altitude "
            "is not.",
        )


def _core(w: _Work) -> None:
    s, r, d = w.s, w.r, w.d
    hh = ("henderson1908", "nccls1994")
    hco3_calc = d.hco3_computed
    r.computed(
        "hco3_computed",
        hco3_calc,
        "HCO3 from pH and PCO2 (Henderson-Hasselbalch)",
        "HCO3 = 0.0307 x PCO2 [mmHg] x 10^(pH - 6.1)",
        hh,
        unit="mmol/L",
        decimals=1,
    )
    h_measured = d.h_measured
    r.computed(
        "h_nmol_l_measured",
        h_measured,
        "[H+] from the pH",
        "[H+] = 10^(9 - pH)",
        "kassirer1965",
        unit="nmol/L",
        decimals=1,
    )
    if s.hco3 is not None:
        r.put("consistency", d.consistency)
        r.computed(
            "ph_computed",
            d.ph_computed,
            "pH from the reported PCO2 and HCO3",
            "pH = 6.1 + log10(HCO3 / (0.0307 x PCO2))",
            hh,
            decimals=3,
        )
        r.computed(
            "ph_difference",
            d.ph_difference,
            "Consistency: computed minus reported pH",
            "difference = pH_computed - pH_reported; consistent when |difference| <= 0.03",
            "consistency_band",
            decimals=3,
        )
        r.computed(
            "h_nmol_l_kassirer",
            d.h_kassirer,
            "[H+] by Kassirer-Bleich",
            "[H+] = 24 x PCO2 [mmHg] / HCO3 [mmol/L]",
            "kassirer1965",
            unit="nmol/L",
            decimals=1,
        )
        if w.fires("inconsistent_triple"):
            r.finding(
                "inconsistent_triple",
                "urgent",
                f"The reported values do not fit together: PCO2 {w.p(s.pco2)} with HCO3 {s.hco3:.1f} mmol/L "
                f"gives pH {d.ph_computed:.3f}, not the reported {s.ph:.2f} (difference "
                f"{d.ph_difference:+.3f}; [H+] {d.h_kassirer:.1f} by Kassirer-Bleich against "
                f"{h_measured:.1f} nmol/L measured). Recheck the sample and the transcription (typing slip, "
                "arterial and venous values mixed, or a chemistry-panel total CO2 entered as HCO3). Any "
                "reading below rests on doubtful data.",
            )
            r.finding(
                "provisional_interpretation",
                "notable",
                f"Provisional reading only, from the measured pH and PCO2 (HCO3 {hco3_calc:.1f} mmol/L as "
                "an analyser would derive it); anion-gap, base-excess and Stewart cross-checks are not "
                "used to name disorders on doubtful data.",
            )
        r.step(
            "HCO3 used in the report",
            "the reported HCO3 (checked against pH and PCO2 above)",
            s.hco3,
            "consistency_band",
            output="hco3",
            unit="mmol/L",
        )
    else:
        r.put("consistency", "consistent")
        r.finding(
            "hco3_calculated",
            "info",
            f"HCO3 was not given: {hco3_calc:.1f} mmol/L is computed from pH and PCO2, so the triple cannot "
            "be checked for consistency.",
        )
        r.step(
            "HCO3 used in the report",
            "HCO3 computed from pH and PCO2 (not given)",
            hco3_calc,
            hh,
            output="hco3",
            unit="mmol/L",
        )
    r.quantity("hco3", w.hco3_out, "mmol/L", decimals=1)

    # standard base excess (CLSI form) and the variants
    r.computed(
        "standard_base_excess",
        w.sbe,
        "Standard base excess (CLSI form, the default)",
        "SBE = HCO3 - 24.8 + 16.2 x (pH - 7.40)",
        "nccls1994",
        unit="mmol/L",
        decimals=1,
    )
    variants = {
        "clsi": {"value": d.sbe, "unit": "mmol/L"},
        "siggaard_andersen": {"value": d.sbe_siggaard, "unit": "mmol/L"},
        "van_slyke_hb5": {"value": d.sbe_van_slyke_hb5, "unit": "mmol/L"},
    }
    r.step(
        "SBE, Siggaard-Andersen form",
        "0.9287 x (HCO3 - 24.4 + 14.83 x (pH - 7.40))",
        d.sbe_siggaard,
        "siggaard1971",
        output="sbe_variants",
        unit="mmol/L",
    )
    r.step(
        "SBE, Van Slyke at Hb 5 g/dL",
        "(1 - 0.014 x 5) x [(HCO3 - 24.8) + (1.43 x 5 + 7.7) x (pH - 7.40)]",
        d.sbe_van_slyke_hb5,
        ("siggaard1971", "nccls1994"),
        output="sbe_variants",
        unit="mmol/L",
    )
    if s.hb is not None:
        variants["blood_van_slyke"] = {"value": d.be_blood, "unit": "mmol/L"}
        variants["zander"] = {"value": d.be_zander, "unit": "mmol/L"}
        r.step(
            "Whole-blood BE, Van Slyke at the patient's Hb",
            "(1 - 0.014 x Hb) x [(HCO3 - 24.8) + (1.43 x Hb + 7.7) x (pH - 7.40)]",
            d.be_blood,
            ("siggaard1971", "nccls1994"),
            output="sbe_variants",
            unit="mmol/L",
            inputs={"hb_g_dl": s.hb},
        )
        so2_note = "SpO2" if s.spo2 is not None else "SO2 taken as 1.0 (no SpO2 given)"
        r.step(
            f"BE, Zander form ({so2_note})",
            "(1 - 0.0143 Hb) x [(0.0304 x PCO2 x 10^(pH - 6.1) - 24.26) + (9.5 + 1.63 Hb)(pH - 7.4)] - 0.2 "
            "x Hb x (1 - SO2)",
            d.be_zander,
            "lang2002",
            output="sbe_variants",
            unit="mmol/L",
        )
    r.put("sbe_variants", variants, decimals=1)
    if s.base_excess is not None:
        r.computed(
            "base_excess_difference",
            d.be_difference,
            "Reported base excess minus computed SBE",
            "BE_reported - SBE_CLSI",
            "nccls1994",
            unit="mmol/L",
            decimals=1,
        )
        if w.fires("base_excess_differs"):
            r.finding(
                "base_excess_differs",
                "notable",
                f"The reported base excess ({s.base_excess:+.1f} mmol/L) differs from every published form "
                f"computed from pH and HCO3 ({d.be_low:+.1f} to {d.be_high:+.1f}): check the "
                "transcription or which base excess the analyser reports.",
            )

    # pH and PCO2 status
    w.ph_status = d.ph_status
    r.put("ph_status", w.ph_status)
    w.pco2_status = d.pco2_status
    r.put("pco2_status", w.pco2_status)


# -- classification ------------------------------------------------------------------------------------------


def primary_process(ph: float, pco2: float, hco3: float) -> tuple[str | None, bool]:
    """(primary disorder code or None, tentative) for a consistent pH/PCO2/HCO3.

    pH < 7.35 acidaemia, > 7.45 alkalaemia; HCO3 < 22 or > 26; PCO2 > 45 or < 35. When both processes point
    the same way, the larger contribution to [H+] (|log10(PCO2/40)| against |log10(24/HCO3)|) is primary; at
    a normal pH the side of 7.40 chooses; with only the pH outside its range the primary is tentative.

    >>> primary_process(7.28, 26.0, 12.0)
    ('metabolic_acidosis', False)
    >>> primary_process(7.53, 24.0, 20.0)
    ('respiratory_alkalosis', False)
    """
    code, tentative = _primary_process(ph, pco2, hco3)
    return _code(code), bool(tentative)


def _classify(w: _Work) -> None:
    r = w.r
    primary = _code(w.d.primary_classified)
    if w.fires("borderline_values"):
        r.finding(
            "borderline_values",
            "info",
            "The pH is outside its reference range while PCO2 and HCO3 are inside theirs; "
            f"{NAMES[primary]} is named from the larger contribution to [H+] and is tentative.",
        )
    if primary is None:
        return
    if primary == MET_ACID:
        _metabolic_primary(w, acidosis=True)
    elif primary == MET_ALK:
        _metabolic_primary(w, acidosis=False)
    else:
        _respiratory_primary(w, primary)


def _metabolic_primary(w: _Work, *, acidosis: bool) -> None:
    e = _metabolic_expected(w, acidosis=acidosis)
    _respiratory_response(w, e)


def _metabolic_expected(w: _Work, *, acidosis: bool):
    """Expected PaCO2 of a metabolic primary (outputs and steps); returns the Expected band."""
    r, d = w.r, w.d
    e = d.met_expected
    if acidosis:
        formula = "expected PaCO2 = 1.5 x HCO3 + 8, band +/- 2 mmHg (Winters)"
        sources = ("albert1967",)
        alt = f"alternatives: 1.54 x HCO3 + 8.36 +/- 2.2 gives {w.p(1.54 * w.hco3 + 8.36)} (Kidney360 2022)"
    else:
        a06 = ab.expected_pco2_metabolic_alkalosis(hco3_mmol_l=w.hco3, slope=0.6).value
        a075 = ab.expected_pco2_metabolic_alkalosis(hco3_mmol_l=w.hco3, slope=0.75).value
        formula = "expected PaCO2 = 40 + 0.7 x (HCO3 - 24), band +/- 5 mmHg"
        sources = ("berend2014", "kidney360_2022")
        alt = f"alternatives: slope 0.6 gives {w.p(a06)} (Narins & Emmett 1980), 0.75 gives {w.p(a075)}"
    r.pressure_range("expected_pco2", e.low, e.high)
    r.step(
        f"Expected PaCO2 ({formula}; {alt})", formula, e.value, sources, output="expected_pco2", pressure=True
    )
    r.computed(
        "expected_pco2_centre", e.value, "Expected PaCO2, centre of the band", formula, sources, pressure=True
    )
    if acidosis:
        r.computed(
            "expected_pco2_winters",
            e.value,
            "Winters' formula",
            "1.5 x HCO3 + 8",
            "albert1967",
            pressure=True,
        )
    return e


def _respiratory_response(w: _Work, e) -> None:
    """Compare the measured PaCO2 with the expected band of a metabolic primary."""
    s, r = w.s, w.r
    band = f"{w.p(e.low)} to {w.p(e.high)}"
    if w.fires("concurrent_respiratory_acidosis"):
        text = (
            f"PaCO2 {w.p(s.pco2)} is above the {band} expected from compensation: the respiratory response "
            "is inadequate (concurrent respiratory acidosis)."
        )
        r.finding("concurrent_respiratory_acidosis", "notable", text)
        w.compensation_text = "inadequate respiratory compensation (concurrent respiratory acidosis)"
    elif w.fires("concurrent_respiratory_alkalosis"):
        text = (
            f"PaCO2 {w.p(s.pco2)} is below the {band} expected from compensation: the patient is "
            "ventilating more than compensation explains (concurrent respiratory alkalosis)."
        )
        r.finding("concurrent_respiratory_alkalosis", "notable", text)
        w.compensation_text = "PaCO2 lower than compensation explains (concurrent respiratory alkalosis)"
    else:
        r.finding(
            "compensation_as_expected",
            "info",
            f"PaCO2 {w.p(s.pco2)} lies within the {band} expected from respiratory compensation.",
        )
        w.compensation_text = "appropriate respiratory compensation"


def _respiratory_primary(w: _Work, code: str) -> None:
    s, r, d = w.s, w.r, w.d
    acid = code == RESP_ACID
    p, h = s.pco2, w.hco3
    delta = p - ab.NORMAL_PCO2_MMHG
    e = ab.RespiratoryExpectation(d.e_acute, d.e_chronic)
    if acid:
        acute_f = "HCO3 = 24 + 1 x (PaCO2 - 40)/10 (band: 1-2 per 10 mmHg)"
        chronic_f = "HCO3 = 24 + 3.5 x (PaCO2 - 40)/10 (band: 3 [some texts], 4 [Brandis], 5 [Martinu 2003])"
    else:
        acute_f = "HCO3 = 24 - 2 x (40 - PaCO2)/10 (band: 2-2.5 per 10 mmHg)"
        chronic_f = "HCO3 = 24 - 4 x (40 - PaCO2)/10 (band: 4-5 per 10 mmHg, Narins & Emmett; Brandis)"
    rules = ("narins1980", "berend2014", "kidney360_2022", "brandis") + (("martinu2003",) if acid else ())

    def q(x):
        return {"value": x, "unit": "mmol/L"}

    r.put(
        "expected_hco3",
        {
            "acute": {"low": q(e.acute.low), "high": q(e.acute.high)},
            "chronic": {"low": q(e.chronic.low), "high": q(e.chronic.high)},
        },
        decimals=1,
    )
    r.put("expected_hco3_centre", {"acute": q(e.acute.value), "chronic": q(e.chronic.value)}, decimals=1)
    for label, f, x in (("acute", acute_f, e.acute), ("chronic", chronic_f, e.chronic)):
        r.step(
            f"Expected HCO3 if {label} (band {x.low:.1f}-{x.high:.1f} mmol/L)",
            f,
            x.value,
            rules,
            output="expected_hco3",
            unit="mmol/L",
        )
        r.step(
            f"Expected HCO3 if {label}, default slope",
            f,
            x.value,
            rules,
            output="expected_hco3_centre",
            unit="mmol/L",
        )
    margin = d.margin
    f_h, f_ph, f_b = none_if_nan(d.f_h), none_if_nan(d.f_ph), none_if_nan(d.f_b)
    if f_h is not None:
        r.computed(
            "fraction_acute_hco3",
            f_h,
            "Fraction acute by the HCO3 rules",
            "f = (HCO3_chronic - HCO3) / (HCO3_chronic - HCO3_acute), default slopes",
            ("fraction_acute_bands", "narins1980"),
            decimals=2,
        )
    if acid:
        pr = d.ph_rules
        r.put("expected_ph", {"acute": pr.acute, "chronic": pr.chronic}, decimals=2)
        r.step(
            "Expected pH if acute",
            "pH = 7.40 - 0.008 x (PaCO2 - 40)",
            pr.acute,
            "berend2014",
            output="expected_ph",
        )
        r.step(
            "Expected pH if chronic",
            "pH = 7.40 - 0.003 x (PaCO2 - 40)",
            pr.chronic,
            "berend2014",
            output="expected_ph",
        )
        ph_hh = {"acute": d.ph_hh_acute, "chronic": d.ph_hh_chronic}
        r.put("expected_ph_hh", ph_hh, decimals=3)
        for label in ("acute", "chronic"):
            r.step(
                f"pH from the expected {label} HCO3 (Henderson-Hasselbalch)",
                "pH = 6.1 + log10(HCO3_expected / (0.0307 x PaCO2))",
                ph_hh[label],
                "henderson1908",
                output="expected_ph_hh",
            )
        if f_ph is not None:
            r.computed(
                "fraction_acute_ph",
                f_ph,
                "Fraction acute by the pH rules",
                "f = [(7.40 - pH) - 0.003 x dPaCO2] / [(0.008 - 0.003) x dPaCO2]",
                ("fraction_acute_bands", "berend2014"),
                decimals=2,
            )
        if w.fires("ph_rule_drift"):
            r.finding(
                "ph_rule_drift",
                "info",
                f"With PaCO2 {w.p(delta)} above {w.p(40.0)} the linear pH rules drift: the acute rule "
                "predicts "
                f"pH {pr.acute:.2f}, while Henderson-Hasselbalch with the acute HCO3 gives "
                f"{ph_hh['acute']:.3f}. The chronicity call uses the HCO3 rules.",
            )
    if f_b is not None:
        exp_b = d.hco3_on_baseline
        r.computed(
            "expected_hco3_on_baseline",
            exp_b,
            "HCO3 expected on the known baseline",
            "24 + 3.5 x (baseline - 40)/10 + 1 x (PaCO2 - baseline)/10 (or - 2 x (baseline - PaCO2)/10 "
            "below it)",
            ("narins1980", "berend2014"),
            unit="mmol/L",
            decimals=1,
        )
        r.computed(
            "fraction_acute_baseline",
            f_b,
            "Fraction acute from the known baseline",
            "f = (PaCO2 - baseline) / (PaCO2 - 40), limited to 0-1",
            "fraction_acute_bands",
            decimals=2,
        )
    low_ref, high_ref = d.low_ref, d.high_ref
    chronicity = _code(d.chronicity)
    if d.before_gap_used and given(d.f_before):
        r.computed(
            "fraction_acute_before_gap",
            d.f_before,
            f"Fraction acute by the HCO3 rules, from the HCO3 before the anion gap ({d.hco3_before_gap:.1f})",
            "f = (HCO3_chronic - (HCO3 + AG - 12)) / (HCO3_chronic - HCO3_acute)",
            ("fraction_acute_bands", "wrenn1990"),
            decimals=2,
        )
    if w.fires("chronicity_not_judged"):
        r.finding(
            "chronicity_not_judged",
            "info",
            f"PaCO2 {w.p(p)} is too close to normal for the acute and chronic rules to be told apart; the "
            "chronicity shown is provisional.",
        )
    if w.fires("concurrent_metabolic_acidosis"):
        if d.ma_from_lactate_or_gap:
            why = []
            if s.lactate is not None and s.lactate >= LACTATE_ACIDOSIS:
                why.append(f"lactate {s.lactate:.1f} mmol/L (4 or more)")
            if d.has_gap and d.ag_used > AG_BESIDE_HYPERCAPNIA:
                corrected = " albumin-corrected" if s.albumin is not None else ""
                why.append(f"{corrected} anion gap {d.ag_used:.1f} mmol/L (above 16)".strip())
            text = (
                f"With pH {s.ph:.2f} below 7.35, {' and '.join(why)}: a concurrent metabolic acidosis "
                "beside the respiratory acidosis. Its acid consumes HCO3, so a HCO3 that looks acute can "
                "hide chronic retention."
            )
        else:
            text = (
                f"HCO3 {h:.1f} mmol/L is more than {margin:.1f} below the {low_ref:.1f} expected "
                f"{'even for an acute change' if not f_b and acid else 'for this PaCO2'}: a concurrent "
                "metabolic acidosis."
            )
        r.finding("concurrent_metabolic_acidosis", "notable", text)
    if w.fires("concurrent_metabolic_alkalosis"):
        if acid:
            text = (
                f"HCO3 {h:.1f} mmol/L is above {d.alk_limit:.1f}, beyond the steepest published chronic "
                f"band (5 per 10 mmHg), and SBE {w.sbe:+.1f} is above {d.sbe_chronic_limit:+.1f} "
                "(Copenhagen chronic expectation + 3): a concurrent metabolic alkalosis."
            )
        else:
            text = (
                f"HCO3 {h:.1f} mmol/L is more than {margin:.1f} above the {high_ref:.1f} expected for this "
                "PaCO2: a concurrent metabolic alkalosis."
            )
        r.finding("concurrent_metabolic_alkalosis", "notable", text)
    if w.fires("chronicity_rules_disagree"):
        by_ph = d.by_ph
        r.finding(
            "chronicity_rules_disagree",
            "info",
            f"The HCO3 rules read {chronicity.replace('_', '-')} (f {f_h:.2f}), the pH rules "
            f"{by_ph.replace('_', '-')} (f {f_ph:.2f})"
            + (
                "; at this rise the pH rules drift, so the HCO3 reading is used."
                if delta > 30
                else "; the HCO3 reading is used."
            ),
        )
    if w.fires("baseline_and_hco3_disagree"):
        by_h = ab.chronicity_from_fraction(fraction_acute=f_h)
        r.finding(
            "baseline_and_hco3_disagree",
            "info",
            f"The known baseline reads {chronicity.replace('_', '-')}, the HCO3 alone "
            f"{by_h.replace('_', '-')}: the baseline may be out of date, or a metabolic process moves "
            "the HCO3.",
        )


def _finish_chronicity(w: _Work) -> None:
    """Respiratory chronicity when a metabolic disorder also moves the HCO3 (always a word, never null)."""
    r = w.r
    if w.fires("chronicity_indeterminate"):
        primary = w.disorders[0]
        r.finding(
            "chronicity_indeterminate",
            "info",
            f"A concurrent metabolic disorder also moves the HCO3, so whether the {NAMES[primary['code']]} "
            f"is acute or chronic cannot be read from it: the '{primary['chronicity'].replace('_', '-')}' "
            "shown is what the HCO3 rules alone would say, and the fraction acute is left out. A known "
            "usual PaCO2 (baseline_pco2) would settle it.",
        )
    if w.primary in (MET_ACID, MET_ALK):
        for d in w.disorders[1:]:
            if d["code"] in (RESP_ACID, RESP_ALK):
                _concurrent_respiratory_chronicity(w, d)


def _concurrent_respiratory_chronicity(w: _Work, d: dict) -> None:
    r = w.r
    if w.d.concurrent_from_baseline:
        f = d["fraction_acute"]
        if f is None:  # a venous sample: not judged
            return
        r.computed(
            "fraction_acute_baseline",
            f,
            "Fraction acute of the concurrent respiratory acidosis, from the known baseline",
            "f = (PaCO2 - baseline) / (PaCO2 - 40), limited to 0-1",
            "fraction_acute_bands",
            decimals=2,
        )
        return
    r.finding(
        "respiratory_chronicity_assumed",
        "info",
        f"The {NAMES[d['code']]} is judged against the compensation the {NAMES[w.primary]} calls for, so "
        "its chronicity cannot be read from the HCO3; it is shown as acute by convention (a respiratory "
        "response that fails or overshoots is usually a current event). A known usual PaCO2 would settle "
        "it.",
    )


# -- gaps ---------------------------------------------------------------------------------------------------


def _gap_values(w: _Work) -> dict | None:
    s, r, d = w.s, w.r, w.d
    if not d.has_gap:
        return None
    out = {}
    ag = d.anion_gap
    r.computed(
        "anion_gap",
        ag,
        "Anion gap",
        "AG = Na - (Cl + HCO3); normal about 12",
        ("oh1977", "kraut2007"),
        unit="mmol/L",
        decimals=1,
    )
    out["ag"] = ag
    if s.k is not None:
        agk = d.anion_gap_with_k
        r.computed(
            "anion_gap_with_k",
            agk,
            "Anion gap with potassium",
            "AG_K = Na + K - (Cl + HCO3); normal about 16",
            ("oh1977", "kraut2007"),
            unit="mmol/L",
            decimals=1,
        )
    if s.albumin is not None:
        agc = d.anion_gap_corrected
        r.computed(
            "anion_gap_corrected",
            agc,
            f"Anion gap corrected for albumin (normal albumin {s.normal_albumin:.1f} g/dL)",
            "AG_corr = AG + 2.5 x (normal albumin - albumin) [g/dL]",
            ("figge1998", "kraut2007"),
            unit="mmol/L",
            decimals=1,
        )
    used = d.ag_used
    out["used"] = used
    which = "albumin-corrected AG" if s.albumin is not None else "AG"
    if d.dr_given:
        dr = d.delta_ratio
        r.computed(
            "delta_ratio",
            dr,
            f"Delta ratio (from the {which})",
            "delta ratio = (AG - 12) / (24 - HCO3)",
            "brandis",
            decimals=2,
        )
        r.put("delta_ratio_band", d.delta_ratio_band)
        out["dr"], out["band"] = dr, d.delta_ratio_band
    dg = d.delta_gap
    r.computed(
        "delta_gap",
        dg,
        f"Delta gap (from the {which})",
        "delta gap = (AG - 12) - (24 - HCO3)",
        "brandis",
        unit="mmol/L",
        decimals=1,
    )
    r.put("delta_gap_reading", d.delta_gap_reading)
    out["dg"] = dg
    if w.fires("anion_gap_low"):
        r.finding(
            "anion_gap_low",
            "notable",
            f"The {which} is {used:.1f} mmol/L, unusually low: check the Na, Cl and HCO3 entered (a "
            "laboratory or transcription error is the usual cause); low albumin, lithium, bromide and IgG "
            "paraproteins also lower it.",
        )
    return out


def _osmolality(w: _Work) -> None:
    s, r, d = w.s, w.r, w.d
    if not d.osm_calc_given:
        return
    calc = d.osmolality_calculated
    r.computed(
        "osmolality_calculated",
        calc,
        "Calculated osmolality (SI)",
        "2 x Na + glucose + urea (mmol/L)" + (" (urea from BUN)" if s.urea_from == "bun" else ""),
        "ccjm_osmol",
        unit="mOsm/kg",
        decimals=0,
    )
    if not d.osm_gap_given:
        return
    gap = d.osmolar_gap
    r.computed(
        "osmolar_gap",
        gap,
        "Osmolar gap",
        "measured - calculated osmolality; normal below 10",
        "ccjm_osmol",
        unit="mOsm/kg",
        decimals=0,
    )
    if w.fires("osmolar_gap_raised"):
        r.finding(
            "osmolar_gap_raised",
            "notable",
            f"Osmolar gap {gap:.0f} mOsm/kg (normal below 10): unmeasured osmoles such as a toxic alcohol "
            "are possible; the gap needs osmolality measured by freezing-point depression.",
        )


def _gap_outputs_only(w: _Work) -> None:
    """Inconsistent triple: the gaps are shown with the reported HCO3 but name no disorder."""
    _gap_values(w)
    _osmolality(w)


def _gaps(w: _Work) -> None:
    s, r, d = w.s, w.r, w.d
    g = _gap_values(w)
    _osmolality(w)
    if w.fires("lactate_raised"):
        r.finding(
            "lactate_raised",
            "notable",
            f"Lactate {s.lactate:.1f} mmol/L is raised (above 2 mmol/L) and adds to the anion gap.",
        )
    if g is None:
        if w.fires("anion_gap_needs_electrolytes"):
            r.finding(
                "anion_gap_needs_electrolytes",
                "info",
                "Add Na and Cl (and albumin) to tell a high from a normal anion gap acidosis.",
            )
        return
    used = g["used"]
    w.ag_used = used
    if w.fires("high_anion_gap_acidosis_found"):
        if d.gap_primary:  # the gap alone reveals it: it is the primary disorder
            _metabolic_expected(w, acidosis=True)
        r.finding(
            "high_anion_gap_acidosis_found",
            "notable",
            f"An anion gap of {used:.0f} mmol/L points to a high anion gap metabolic acidosis although the "
            f"HCO3 ({w.hco3:.1f} mmol/L) does not show it on its own (opposing processes).",
        )
    if not w.has(MET_ACID):
        if w.fires("anion_gap_raised"):
            r.finding(
                "anion_gap_raised",
                "info",
                f"The anion gap ({used:.1f} mmol/L) is above the usual 12 without a metabolic acidosis "
                "being evident.",
            )
        return
    if d.winters_concurrent:
        e = d.winters
        r.computed(
            "expected_pco2_winters",
            e.value,
            f"Winters' formula for the concurrent metabolic acidosis (band {w.p(e.low)} to {w.p(e.high)})",
            "1.5 x HCO3 + 8 +/- 2",
            "albert1967",
            pressure=True,
        )
    before = d.hco3_before_gap
    if d.before_shown:
        r.computed(
            "hco3_before_anion_gap",
            before,
            "HCO3 before the unmeasured acid",
            "HCO3 + (AG - 12)",
            "brandis",
            unit="mmol/L",
            decimals=1,
        )
    kind = d.alkalosis_from_gap
    if kind == "hco3_before_gap":
        r.finding(
            "metabolic_alkalosis_from_gap",
            "notable",
            f"Adding back the anion-gap acid gives an HCO3 of {before:.1f} mmol/L, above the "
            f"{d.high_ref:.1f} the {NAMES[w.primary]} explains: a concurrent metabolic "
            "alkalosis (triple disorder).",
        )
    elif kind == "delta_gap":
        r.finding(
            "metabolic_alkalosis_from_gap",
            "notable",
            f"The delta gap is {g['dg']:+.1f} mmol/L (above +6): a concurrent metabolic alkalosis.",
        )
    elif kind == "delta_ratio":
        r.finding(
            "metabolic_alkalosis_from_gap",
            "notable",
            f"Delta ratio {g['dr']:.2f} (above 2): the HCO3 has fallen far less than the anion gap "
            "rose, so a raised HCO3 was there before: a concurrent metabolic alkalosis (or "
            "compensation of a chronic respiratory acidosis).",
        )
    r.put("metabolic_acidosis_type", w.acidosis_type)
    words = {
        "normal_anion_gap": "a normal anion gap (hyperchloraemic) metabolic acidosis",
        "high_anion_gap": "a high anion gap metabolic acidosis",
        "high_and_normal_anion_gap": "a high anion gap and a normal anion gap metabolic acidosis together",
    }
    dr_text = f", delta ratio {g['dr']:.2f}" if "dr" in g else ""
    if w.resp and g.get("dr", 0.0) > 2.0 and not w.has(MET_ALK):
        dr_text += (
            f" (above 2, but the HCO3 before the anion-gap acid, {before:.1f} mmol/L, is within what the "
            f"{NAMES[w.primary]} explains)"
        )
    r.finding("anion_gap_reading", "info", f"Anion gap {used:.1f} mmol/L{dr_text}: {words[w.acidosis_type]}.")


# -- Copenhagen and Stewart ----------------------------------------------------------------------------------


def _copenhagen(w: _Work) -> None:
    r, d = w.r, w.d
    if not d.copenhagen:
        return
    if w.primary == MET_ACID:
        r.computed(
            "expected_pco2_copenhagen",
            d.cph_pco2,
            "Expected PaCO2 by the SBE rule (metabolic acidosis)",
            "PaCO2 = 40 + SBE",
            ("schlichtig1998", "berend2018"),
            pressure=True,
        )
    elif w.primary == MET_ALK:
        r.computed(
            "expected_pco2_copenhagen",
            d.cph_pco2,
            "Expected PaCO2 by the SBE rule (metabolic alkalosis)",
            "PaCO2 = 40 + 0.6 x SBE",
            ("schlichtig1998", "berend2018"),
            pressure=True,
        )
    if w.resp:
        acute, chronic = d.sbe_acute, d.sbe_chronic
        r.put(
            "expected_sbe",
            {"acute": {"value": acute, "unit": "mmol/L"}, "chronic": {"value": chronic, "unit": "mmol/L"}},
            decimals=1,
        )
        r.step(
            "Expected SBE if acute (respiratory)",
            "SBE = 0 (+/- 3)",
            acute,
            ("schlichtig1998", "berend2018"),
            output="expected_sbe",
            unit="mmol/L",
        )
        r.step(
            "Expected SBE if chronic (respiratory)",
            "SBE = 0.4 x (PaCO2 - 40)",
            chronic,
            ("schlichtig1998", "berend2018"),
            output="expected_sbe",
            unit="mmol/L",
        )


def _stewart(w: _Work) -> None:
    s, r, d = w.s, w.r, w.d
    if not d.has_gap:
        return
    mq = "mEq/L"
    if d.stewart_full:
        p16, p04 = d.story2016, d.story2004
        r.put(
            "base_excess_partition",
            {k: {"value": v, "unit": mq} for k, v in p16._asdict().items()},
            decimals=1,
        )
        r.put(
            "base_excess_partition_2004",
            {k: {"value": v, "unit": mq} for k, v in p04._asdict().items()},
            decimals=1,
        )
        for label, formula, value in (
            ("Na-Cl effect (Story 2016)", "Na - Cl - 35", p16.na_cl),
            ("Albumin effect", "0.25 x (42 - albumin g/L)", p16.albumin),
            (
                "Lactate effect" + ("" if s.lactate is not None else " (lactate not given: counted as 0)"),
                "- lactate",
                p16.lactate,
            ),
            ("Unmeasured ions (Story 2016)", "SBE - (Na-Cl + albumin + lactate effects)", p16.unmeasured),
        ):
            r.step(label, formula, value, "story2016", output="base_excess_partition", unit=mq)
        r.step(
            "Na-Cl effect (Story 2004)",
            "Na - Cl - 38",
            p04.na_cl,
            "story2004",
            output="base_excess_partition_2004",
            unit=mq,
        )
        r.step(
            "Albumin effect (Story 2004)",
            "0.25 x (42 - albumin g/L)",
            p04.albumin,
            "story2004",
            output="base_excess_partition_2004",
            unit=mq,
        )
        r.step(
            "Unmeasured ions including lactate (Story 2004)",
            "SBE - (Na-Cl + albumin effects)",
            p04.unmeasured_including_lactate,
            "story2004",
            output="base_excess_partition_2004",
            unit=mq,
        )
    else:
        na_cl = d.na_cl_effect
        r.computed(
            "na_cl_effect",
            na_cl,
            "Na-Cl effect (Story 2016; albumin not given, so no full partition)",
            "Na - Cl - 35",
            "story2016",
            unit=mq,
            decimals=1,
        )
        if s.lactate is not None:
            r.computed(
                "lactate_effect",
                -s.lactate,
                "Lactate effect (Story 2016)",
                "- lactate",
                "story2016",
                unit=mq,
                decimals=1,
            )
    if d.sig_given:
        assumed = []
        ca, mg, phos = d.stewart_terms
        for name, key, value in (
            ("ionised calcium", "ca", ca),
            ("magnesium", "mg", mg),
            ("phosphate", "phosphate", phos),
        ):
            if d.assumed[key]:
                assumed.append(f"{name} {value:g} mmol/L")
        sig = d.strong_ion_gap
        sources = ("stewart1983", "figge1992", "kellum1995")
        for name, value, formula, src in (
            ("sid_apparent", d.sid_apparent, "Na + K + 2 x Ca(ionised) + 2 x Mg - Cl - lactate", sources),
            ("albumin_charge", d.albumin_charge, "albumin g/L x (0.123 x pH - 0.631)", "figge1992"),
            ("phosphate_charge", d.phosphate_charge, "phosphate mmol/L x (0.309 x pH - 0.469)", "figge1992"),
            ("sid_effective", d.sid_effective, "HCO3 + albumin charge + phosphate charge", sources),
            ("strong_ion_gap", sig, "SIG = SIDa - SIDe", ("kellum1995", "figge1992")),
        ):
            r.quantity(name, value, mq, decimals=1)
            r.step(name.replace("_", " ").replace("sid", "SID"), formula, value, src, output=name, unit=mq)
        if d.assumed["lactate"]:
            assumed.append("lactate not given (any lactate is counted in the SIG)")
        if w.fires("stewart_assumed_values"):
            r.finding(
                "stewart_assumed_values",
                "info",
                "Strong ion gap computed with typical values for what was not measured: "
                + "; ".join(assumed)
                + ". Measure them for a firmer SIG.",
            )
            r.step(
                "Typical values assumed for the Stewart terms",
                "; ".join(assumed),
                sig,
                "stewart_typical_values",
                output="strong_ion_gap",
                unit=mq,
            )
        if w.fires("strong_ion_gap_raised"):
            r.finding(
                "strong_ion_gap_raised",
                "info",
                f"Strong ion gap {sig:.1f} mEq/L is above the 2-4 mEq/L above which unmeasured anions are "
                "usually suspected; its normal value depends on the laboratory and on the terms included"
                + (" (typical values were assumed for some terms)." if assumed else "."),
            )


_EFFECT_WORDS = {
    "na_cl": ("a hyperchloraemic (Na-Cl) acidifying effect", "a hypochloraemic (Na-Cl) alkalinising effect"),
    "albumin": ("a high-albumin acidifying effect", "a hypoalbuminaemic alkalinising effect"),
    "lactate": ("lactate", "lactate"),
    "unmeasured": ("unmeasured anions", "an unmeasured-cation (alkalinising) residual"),
}


def _compare(w: _Work) -> None:
    """Physiological, base-excess and physicochemical readings of the metabolic component, side by side."""
    s, r, d = w.s, w.r, w.d
    if not d.copenhagen:
        return
    boston = (w.has(MET_ACID), w.has(MET_ALK))

    def words(acid: bool, alk: bool) -> str:
        if acid and alk:
            return "a metabolic acidosis and a metabolic alkalosis"
        return "a metabolic acidosis" if acid else "a metabolic alkalosis" if alk else "no metabolic disorder"

    parts = [f"Physiological (HCO3) reading: {words(*boston)}."]
    cph_pair = (bool(d.cph_acid), bool(d.cph_alk))
    beyond = " beyond what the respiratory disorder explains" if w.resp and any(cph_pair) else ""
    resp_note = ""
    if d.cph_pco2_given:
        rule = "SBE" if w.primary == MET_ACID else "0.6 x SBE"
        resp_note = f"; PaCO2 {'fits' if d.cph_fits else 'does not fit'} 40 + {rule} = {w.p(d.cph_pco2)}"
    parts.append(
        f"Base-excess (Copenhagen) reading: SBE {d.sbe:+.1f} mmol/L, {words(*cph_pair)}{beyond}{resp_note}."
    )
    if d.resp_differs:
        parts.append(
            "The two readings differ on the respiratory response: "
            + (
                "Winters' formula finds it appropriate while the SBE rule does not."
                if not d.cph_fits
                else "the SBE rule finds it appropriate while the HCO3 rule does not."
            )
        )
    if d.has_gap:
        shown_keys = ["na_cl"] + (["albumin", "unmeasured"] if d.stewart_full else [])
        if s.lactate is not None:
            shown_keys.append("lactate")
        values = {
            "na_cl": d.na_cl_effect,
            "albumin": d.story2016.albumin,
            "unmeasured": d.story2016.unmeasured,
            "lactate": -s.lactate if s.lactate is not None else None,
        }
        acidifying = [k for k in shown_keys if d.effect_acidifying[k]]
        alkalinising = [k for k in shown_keys if d.effect_alkalinising[k]]
        shown = ", ".join(f"{k.replace('_', '-')} {values[k]:+.1f}" for k in shown_keys)
        named = [_EFFECT_WORDS[k][0] for k in acidifying] + [_EFFECT_WORDS[k][1] for k in alkalinising]
        text = f"Physicochemical (Stewart) reading: effects {shown} mEq/L" + (
            f", showing {', '.join(named)}" if named else ", none of them large"
        )
        if d.stewart_full:
            text += "."
        else:
            text += (
                " (albumin not given, so the unmeasured-ion effect is unknown and this reading is partial)."
            )
        parts.append(text)
        if w.has(RESP_ACID) and d.effect_alkalinising["na_cl"]:
            parts.append(
                "With a respiratory acidosis, a low chloride (a raised Na-Cl effect) is also how renal "
                "compensation appears in Stewart terms."
            )
    if w.fires("approaches_agree"):
        parts.append("The readings agree.")
        r.finding("approaches_agree", "info", " ".join(parts))
    else:
        if boston[0] and boston[1] and not any(cph_pair):
            parts.append(
                "Opposing metabolic processes cancel in the SBE, which measures only their net effect."
            )
        if d.stewart_pair_given and (bool(d.stewart_acid), bool(d.stewart_alk)) != boston:
            parts.append(
                "Stewart splits the net change into separate effects, some of which offset each other."
            )
        parts.append(
            "Each approach measures the metabolic component its own way; none is taken as the reference here."
        )
        r.finding("approaches_disagree", d.severity["approaches_disagree"], " ".join(parts))
    # the chronic respiratory rules (Boston 3.5 per 10 against Copenhagen 0.4 x dPaCO2)
    if w.fires("boston_copenhagen_chronicity"):
        boston_ch = w.disorders[0]["chronicity"]
        r.finding(
            "boston_copenhagen_chronicity",
            "info",
            f"The HCO3 rules read {boston_ch.replace('_', '-')}, the SBE rules "
            f"{d.cph_chronicity.replace('_', '-')} (SBE {d.sbe:+.1f}; acute 0, chronic "
            f"{d.sbe_chronic:+.1f} +/- 3 mmol/L). The chronic SBE rule corresponds to a steeper HCO3 "
            "rise than 3.5 per 10 mmHg, so the two rules differ most for chronic hypercapnia.",
        )


# -- ventilation safety --------------------------------------------------------------------------------------


def _ventilation(w: _Work) -> None:
    s, r, d = w.s, w.r, w.d
    p = s.pco2
    if d.target_given:
        _pco2_target(w)
    else:
        _below_baseline(w)
    # NIV thresholds (BTS/ICS 2016)
    w.niv = d.niv
    kpa = "" if w.r.pressure_unit == "kPa" else f" ({units.convert(p, 'mmHg', 'kPa'):.1f} kPa)"
    kpa_above = f" ({units.convert(p, 'mmHg', 'kPa'):.1f} kPa, above 6.5 kPa)" if kpa else " (above 6.5 kPa)"
    if w.fires("niv_criteria_need_arterial_sample"):
        r.finding(
            "niv_criteria_need_arterial_sample",
            "notable",
            f"This venous sample shows pH {s.ph:.2f} with PCO2 {w.p(p)}. The BTS/ICS 2016 NIV thresholds "
            f"(pH < 7.35 and PaCO2 > {w.p(NIV_PCO2_MMHG)}) are defined on arterial (or arterialised earlobe) "
            "values: "
            "confirm with one.",
        )
    elif w.fires("niv_criteria_met"):
        invasive = (
            f" pH below {NIV_INVASIVE_PH:.2f}: the guideline calls for a setting with ready access to "
            "invasive ventilation."
            if s.ph < NIV_INVASIVE_PH
            else ""
        )
        r.finding(
            "niv_criteria_met",
            "urgent",
            f"NIV threshold met: pH {s.ph:.2f} (below 7.35) with PaCO2 {w.p(p)}{kpa_above}: the acidaemia "
            "marks decompensated hypercapnic respiratory failure, whatever the HCO3. BTS/ICS 2016 recommends "
            "NIV when it persists after optimal medical treatment (in COPD, neuromuscular or chest-wall "
            "disease and obesity hypoventilation)." + invasive,
        )
    elif w.fires("ventilation_failing_to_compensate"):
        r.finding(
            "ventilation_failing_to_compensate",
            "urgent",
            f"Ventilation is failing to compensate: pH {s.ph:.2f} with PaCO2 {w.p(p)}{kpa}, above the "
            f"{w.p(d.winters.high)} that compensation for the metabolic acidosis would give. The acidaemia "
            "is mainly metabolic; a rising PaCO2 here signals tiring respiratory effort.",
        )
    if w.fires("compensation_incomplete"):
        r.finding(
            "compensation_incomplete",
            "notable",
            f"The HCO3 fits chronic retention, but pH {s.ph:.2f} is below 7.35: compensation is incomplete "
            "(an acute component, or failing compensation). It is not read as compensated.",
        )
    r.put("niv_criteria", w.niv)
    # consciousness
    retainer = bool(d.retainer)
    threshold = d.consciousness_threshold
    if s.baseline_pco2 is not None:
        formula = "max(75 mmHg, baseline PaCO2 + 35 mmHg)"
    else:
        # chronic retention is read from the PaCO2 and HCO3 alone (decide: d.retainer)
        formula = (
            "about 90 mmHg in chronic retainers (chronic compensation seen in the HCO3)"
            if retainer
            else "about 75 mmHg in previously normal people (no chronic retention evident)"
        )
    r.computed(
        "pco2_consciousness_threshold",
        threshold,
        "PaCO2 above which consciousness commonly falls",
        formula,
        "co2_narcosis",
        pressure=True,
    )
    if w.fires("pco2_above_consciousness_threshold"):
        who = (
            "for this patient's usual PaCO2"
            if s.baseline_pco2 is not None
            else "in chronic retainers"
            if retainer
            else "in previously normal people"
        )
        r.finding(
            "pco2_above_consciousness_threshold",
            "urgent",
            f"PaCO2 {w.p(p)} is above the level ({w.p(threshold)}) at which consciousness commonly falls "
            f"{who} (CO2 narcosis; common practice).",
        )


#: the words of ``pco2_target_basis`` and what each says
TARGET_BASIS = {
    "ph_7_35": "the PaCO2 that would bring the pH to 7.35 with today's HCO3",
    "usual_pco2_given": "the patient's known usual PaCO2",
    "usual_pco2_estimated": "the usual PaCO2 estimated from the HCO3",
    "normal_upper_limit": "the upper limit of normal (no chronic retention shows)",
    "present_pco2": "the present PaCO2 (hold it; do not lower it)",
    "metabolic_compensation": "the centre of Winters' compensation for the metabolic acidosis",
    "alkalaemia_floor": "the PaCO2 below which the pH would pass 7.45 with today's HCO3",
}


def _pco2_target(w: _Work) -> None:
    s, r, d = w.s, w.r, w.d
    p = s.pco2
    ph_x = "PaCO2 x 10^(pH - {x})"
    r.computed(
        "pco2_alkalaemia_floor",
        d.floor,
        "PaCO2 that would give pH 7.45 with today's HCO3 (the aim never goes below it)",
        ph_x.format(x="7.45"),
        ("henderson1908", "posthypercapnic_alkalosis"),
        pressure=True,
    )
    target, basis, source = d.pco2_target, d.pco2_target_basis, d.baseline_pco2_source
    if s.ph < PH_LOW and basis != "metabolic_compensation":
        r.computed(
            "pco2_for_ph_7_35",
            d.p_at_735,
            "PaCO2 that would give pH 7.35 with today's HCO3",
            ph_x.format(x="7.35"),
            ("henderson1908", "pco2_aim"),
            pressure=True,
        )
    if source == "estimated":
        est, lo, hi = d.baseline_estimated, d.baseline_low, d.baseline_high
        gap = " before the anion gap" if d.before_gap_used else ""
        r.computed(
            "baseline_pco2_estimated",
            est,
            f"Usual (chronic) PaCO2 estimated from the HCO3{gap} (an estimate)",
            "B = 40 + (HCO3 - 24 - (PaCO2 - 40)/10) / 0.25, limited to 40..PaCO2 (chronic 3.5 and acute 1 "
            "per 10 mmHg inverted)",
            ("narins1980", "fraction_acute_bands"),
            pressure=True,
        )
        r.pressure_range("baseline_pco2_range", lo, hi)
        r.step(
            "Estimated usual PaCO2 with the chronic slope 5 (low) to 3 (high) per 10 mmHg",
            "B = 40 + (HCO3 - 24 - (PaCO2 - 40)/10) / ((slope - 1)/10)",
            lo,
            ("narins1980", "martinu2003"),
            output="baseline_pco2_range",
            pressure=True,
        )
    if basis == "metabolic_compensation":
        formula = "aim = 1.5 x HCO3 + 8 (Winters' centre), not below P(7.45)"
        src = ("albert1967", "pco2_aim")
    else:
        formula = (
            "pH < 7.35: aim = min(P(7.35), usual PaCO2); pH >= 7.35: aim = present PaCO2 (or a lower known "
            "usual); never below P(7.45) = " + ph_x.format(x="7.45") + ", never above the present PaCO2"
        )
        src = ("pco2_aim", "henderson1908", "posthypercapnic_alkalosis", "bts_ics2016")
    w.pco2_target, w.target_basis = target, basis
    r.computed("pco2_target", target, "PaCO2 to aim for", formula, src, pressure=True)
    r.put("baseline_pco2_source", source)
    r.put("pco2_target_basis", basis)
    if s.ph < PH_LOW:
        why = f"below the present {w.p(p)}: the pH is {s.ph:.2f}, so ventilation must bring the PaCO2 down. "
    elif basis == "usual_pco2_given":
        why = (
            f"the patient's known usual PaCO2: the pH is {s.ph:.2f}, not acidaemic, so there is no need to "
            "lower the PaCO2 quickly, and not below the usual level. "
        )
    else:
        why = "the pH is not acidaemic, so the PaCO2 need not be lowered. "
    usual = ""
    if source == "given":
        usual = f"The known usual PaCO2 is {w.p(s.baseline_pco2)}. "
    elif source == "estimated":
        usual = (
            f"The usual PaCO2 estimated from the HCO3 is {w.p(d.baseline_estimated)} ({w.p(d.baseline_low)} "
            f"to {w.p(d.baseline_high)} across the published chronic slopes). "
        )
    chronic_note = (
        "Ventilating a chronic retainer below the usual level leaves the retained HCO3 unopposed "
        "(post-hypercapnic metabolic alkalosis). "
        if bool(d.retainer) and basis != "metabolic_compensation"
        else ""
    )
    r.finding(
        "pco2_target",
        "notable",
        f"PaCO2 aim {w.p(target)} ({TARGET_BASIS[basis]}), "
        + why
        + usual
        + chronic_note
        + "Reach it gradually and recheck with a repeat gas.",
    )
    if w.fires("baseline_estimate_unreliable"):
        r.finding(
            "baseline_estimate_unreliable",
            "notable",
            "The usual PaCO2 cannot be estimated from the HCO3 here: a concurrent metabolic disorder moves "
            "the HCO3 by an amount the anion gap does not show, and chronic retention may be hidden. The aim "
            f"is therefore the PaCO2 that would bring the pH to 7.35, not the normal {w.p(PCO2_HIGH)}. Use a "
            "known "
            "usual PaCO2 (an earlier stable gas) where there is one.",
        )
    _below_baseline(w)


def _below_baseline(w: _Work) -> None:
    s, r, h = w.s, w.r, w.hco3
    if w.fires("pco2_below_baseline"):
        r.finding(
            "pco2_below_baseline",
            "notable",
            f"PaCO2 {w.p(s.pco2)} is below the patient's usual {w.p(s.baseline_pco2)}"
            + (
                f" and HCO3 is {h:.1f} mmol/L with pH {s.ph:.2f}: this fits a post-hypercapnic metabolic "
                "alkalosis (over-correction of chronic hypercapnia)."
                if h > HCO3_HIGH and s.ph > PH_HIGH
                else ": over-correction of chronic hypercapnia is possible."
            ),
        )


# -- oxygenation ---------------------------------------------------------------------------------------------


def _oxygenation(w: _Work) -> None:
    s, r, d = w.s, w.r, w.d
    r.put("fio2_source", d.fio2_source)
    if s.site != "venous" and (d.rf_given or s.po2 is not None):
        _respiratory_failure(w)
    if s.po2 is None:
        return
    if w.fires("venous_po2_not_interpreted"):
        r.finding(
            "venous_po2_not_interpreted",
            "notable",
            "A venous PO2 says nothing about arterial oxygenation: no alveolar gas, A-a gradient or "
            "respiratory failure type is computed from it. Use SpO2 or an arterial sample.",
        )
        return
    if w.fires("capillary_po2"):
        r.finding(
            "capillary_po2",
            "notable",
            "An earlobe (capillary) PO2 underestimates the arterial PO2: no A-a gradient, P/F ratio or "
            "type 1 failure is read from it (BTS/ICS 2016). Use SpO2 for oxygenation.",
        )
        return
    fio2_words = f"FiO2 {s.fio2:.2f}" if s.fio2_given else "air (FiO2 0.21 assumed: none was recorded)"
    pb = s.pb_value()
    source = (
        "measured"
        if s.pb is not None
        else ("ISA at the altitude given" if s.altitude is not None else "sea level")
    )
    r.pressure("pb", pb)
    if s.pb is None and s.altitude is not None:
        r.step(
            "Barometric pressure at the altitude given (ICAO standard atmosphere)",
            "PB = 101325 Pa x (1 - 0.0065 h / 288.15)^5.255877",
            pb,
            ("icao7488", "ussa1976"),
            output="pb",
            pressure=True,
        )
    else:
        r.step(
            f"Barometric pressure ({source})",
            "PB as given" if s.pb is not None else "PB = 760 mmHg",
            pb,
            "icao7488",
            output="pb",
            pressure=True,
        )
    if not d.alveolar_given:
        _oxygen_probably_given(w)
        return
    assumed = "" if s.fio2_given else " (air assumed)"
    src_air = () if s.fio2_given else ("fio2_assumed_air",)
    pio2 = d.pio2
    r.computed(
        "pio2",
        pio2,
        f"Inspired PO2{assumed}",
        "PIO2 = FiO2 x (PB - 47)",
        ("alveolar_gas_1946", *src_air),
        pressure=True,
    )
    pao2_a = d.pao2_alveolar
    pao2_full = oxygenation.alveolar_po2_full(fio2_fraction=s.fio2, paco2_mmhg=s.pco2, pb_mmhg=pb, rq=s.rq)
    r.computed(
        "pao2_alveolar",
        pao2_a,
        f"Alveolar PO2 (simplified equation, R {s.rq:g}){assumed}",
        "PAO2 = FiO2 x (PB - 47) - PaCO2 / R",
        ("alveolar_gas_1946", *src_air),
        pressure=True,
    )
    r.computed(
        "pao2_alveolar_full",
        pao2_full,
        f"Alveolar PO2 (full equation){assumed}",
        "PAO2 = PIO2 - PaCO2 x (FiO2 + (1 - FiO2) / R)",
        ("alveolar_gas_1946", *src_air),
        pressure=True,
    )
    if w.fires("oxygen_probably_given"):
        _oxygen_probably_given(w)
        return
    aa = d.a_a_gradient
    r.computed(
        "a_a_gradient",
        aa,
        f"A-a gradient{assumed}",
        "A-a = PAO2 - PaO2",
        ("alveolar_gas_1946", *src_air),
        pressure=True,
    )
    ratio = none_if_nan(d.a_over_A)
    if ratio is not None:
        r.computed(
            "a_over_A", ratio, "a/A ratio", "PaO2 / PAO2 (normal above 0.75)", "gilbert1974", decimals=2
        )
    pf = d.pf_ratio
    r.computed(
        "pf_ratio",
        pf,
        f"P/F ratio{assumed}",
        "PaO2 [mmHg] / FiO2",
        ("berlin2012", *src_air),
        unit="mmHg",
        decimals=0,
    )
    if w.fires("air_assumed"):
        r.finding(
            "air_assumed",
            "info",
            "No FiO2 was recorded: the oxygenation reading assumes the patient was breathing air "
            "(FiO2 0.21). If oxygen was given, enter the FiO2.",
        )
    if w.fires("po2_above_alveolar"):
        r.finding(
            "po2_above_alveolar",
            "notable",
            f"PO2 {w.p(s.po2)} is above the alveolar PO2 computed for FiO2 {s.fio2:.2f} ({w.p(pao2_a)}): "
            "check the FiO2, the barometric pressure and the unit of PO2.",
        )
    # age-expected upper limit and category
    if s.age is not None:
        upper = d.a_a_expected_upper
        r.computed(
            "a_a_expected_upper",
            upper,
            "Upper limit of the A-a gradient for age (breathing air)",
            "age / 4 + 4 mmHg",
            "aa_age_rule",
            pressure=True,
        )
    category = d.a_a_category
    r.put("a_a_category", category)
    if w.fires("a_a_on_oxygen"):
        r.finding(
            "a_a_on_oxygen",
            "info",
            "The age rule for the A-a gradient applies breathing air; on supplemental oxygen the normal "
            "gradient is wider, so a 'raised' reading is less specific.",
        )
    reading = None
    if w.fires("pure_hypoventilation"):
        reading = "pure_hypoventilation"
        r.finding(
            "pure_hypoventilation",
            "notable",
            f"Hypercapnia with a normal A-a gradient ({w.p(aa)}, {fio2_words}): the raised PaCO2 comes from "
            "hypoventilation alone (reduced drive, neuromuscular weakness or a chest-wall problem), not "
            "from lung disease.",
        )
    elif w.fires("gas_exchange_impaired"):
        reading = "lung_disease_and_hypoventilation"
        r.finding(
            "gas_exchange_impaired",
            "notable",
            f"Hypercapnia with a raised A-a gradient ({w.p(aa)}, {fio2_words}): lung disease (V/Q mismatch, "
            "shunt or dead space) as well as hypoventilation.",
        )
    elif w.fires("low_inspired_oxygen"):
        r.finding(
            "low_inspired_oxygen",
            "notable",
            f"Hypoxaemia with a normal A-a gradient and no hypercapnia ({fio2_words}) points to a low "
            "inspired PO2 (altitude, low FiO2).",
        )
    elif w.fires("a_a_needs_age"):
        r.finding(
            "a_a_needs_age",
            "info",
            "Give the age to judge the A-a gradient: it separates pure hypoventilation from lung disease.",
        )
    w.oxygen = {"readable": True, "category": category, "reading": reading, "aa": aa, "pf": pf}


def _oxygen_probably_given(w: _Work) -> None:
    s, d = w.s, w.d
    alveolar = max(d.pao2_alveolar, 0.0)
    w.r.finding(
        "oxygen_probably_given",
        "notable",
        f"No FiO2 was recorded, and PaO2 {w.p(s.po2)} is above the alveolar PO2 breathing air "
        f"({w.p(alveolar)}): the patient was probably on oxygen. The oxygenation is not read (no A-a "
        "gradient, P/F ratio or type 1 failure); enter the FiO2 to read it.",
    )
    w.oxygen = {"readable": False}


def _respiratory_failure(w: _Work) -> None:
    """``respiratory_failure``: type 2 from the PaCO2, type 1 from an arterial PaO2 or, on oxygen, the P/F."""
    s, r, d = w.s, w.r, w.d
    if not d.rf_given:
        return
    failure = d.respiratory_failure
    r.put("respiratory_failure", failure)
    fio2_words = f"FiO2 {s.fio2:.2f}" if s.fio2_given else "air (assumed)"
    if w.fires("respiratory_failure_type_2"):
        po2 = f" PaO2 {w.p(s.po2)} on {fio2_words}." if s.po2 is not None and d.oxygenation else ""
        r.finding(
            "respiratory_failure_type_2",
            "notable",
            f"Type 2 (hypercapnic) respiratory failure: PaCO2 {w.p(s.pco2)} is above {w.p(PCO2_HIGH)} with a "
            "respiratory acidosis (named from the PaCO2, with or without hypoxaemia)." + po2,
        )
    if w.fires("respiratory_failure_type_1"):
        r.finding(
            "respiratory_failure_type_1",
            "notable",
            "Type 1 (hypoxaemic) respiratory failure: "
            + (
                f"PaO2 {w.p(s.po2)} is below {w.p(HYPOXAEMIA_MMHG)} on {fio2_words}."
                if s.po2 < HYPOXAEMIA_MMHG
                else f"on FiO2 {s.fio2:.2f} the P/F ratio is at or below {w.pf(PF_IMPAIRED)}."
            ),
        )
    if w.fires("hypoxaemia_masked_by_oxygen"):
        limit = {"mild": PF_IMPAIRED, "moderate": PF_MODERATE, "severe": PF_SEVERE}[d.pf_band]
        r.finding(
            "hypoxaemia_masked_by_oxygen",
            "notable",
            f"PaO2 {w.p(s.po2)} looks adequate only because of the oxygen: P/F ratio {w.pf(d.pf_ratio)} on "
            f"FiO2 {s.fio2:.2f} is at or below {w.pf(limit)} (impaired oxygenation"
            + ("" if d.pf_band == "mild" else ", " + d.pf_band)
            + ").",
        )


# -- temperature ---------------------------------------------------------------------------------------------


def _temperature(w: _Work) -> None:
    s, r = w.s, w.r
    if not w.fires("temperature_ph_stat_view"):
        return
    t = s.temperature
    ph_t = temperature.ph_at_temperature_rosenthal(ph=s.ph, temperature_c=t)
    pco2_t = temperature.pco2_at_temperature(pco2_mmhg=s.pco2, temperature_c=t)
    r.computed(
        "ph_at_temperature",
        ph_t,
        f"pH at {t:.1f} °C (Rosenthal)",
        "pH_T = pH37 + (T - 37) x (-0.0147 + 0.0065 x (7.40 - pH37))",
        "rosenthal1948",
        decimals=2,
    )
    r.computed(
        "pco2_at_temperature",
        pco2_t,
        f"PCO2 at {t:.1f} °C",
        "PCO2_T = PCO2_37 x 10^(0.019 x (T - 37))",
        "bradley1956",
        pressure=True,
    )
    po2_t = None
    if s.po2 is not None:
        po2_t = temperature.po2_at_temperature_severinghaus(po2_mmhg=s.po2, temperature_c=t)
        r.computed(
            "po2_at_temperature",
            po2_t,
            f"PO2 at {t:.1f} °C (Severinghaus 1979 eq 3, single step)",
            "PO2_T = PO2_37 x exp((T - 37) x (0.058 / (0.243 x (PO2/100)^3.88 + 1) + 0.013))",
            "severinghaus1979",
            pressure=True,
        )
    ph_ok = PH_LOW <= ph_t <= PH_HIGH
    pco2_ok = PCO2_LOW <= pco2_t <= PCO2_HIGH
    near = ph_ok and pco2_ok
    text = (
        f"The analyser measured at 37 °C; the patient is at {t:.1f} °C. Alpha-stat (used for this "
        "interpretation) reads the 37 °C values. The pH-stat view reads the corrected values: pH "
        f"{ph_t:.2f}, PCO2 {w.p(pco2_t)}"
        + (f", PO2 {w.p(po2_t)}" if po2_t is not None else "")
        + (
            ", which are near normal."
            if near
            else ", which are "
            + ("outside" if not (ph_ok or pco2_ok) else "partly outside")
            + " the reference ranges."
        )
    )
    r.finding("temperature_ph_stat_view", "info", text)
    w.temp = {"t": t, "ph": ph_t, "pco2": pco2_t, "near_normal": near}


# -- oxygen target, severity ---------------------------------------------------------------------------------


#: why the SpO2 target is what it is (``spo2_target_basis``)
SPO2_BASIS = {
    "prescribed": "the patient's prescribed range",
    "hypercapnic": "PCO2 above {limit} on this sample",
    "venous_pco2_raised": "venous PCO2 above {limit}: a positive screen until an arterial or earlobe gas",
    "previous_hypercapnic_failure": "NIV or invasive ventilation for hypercapnic failure before",
    "at_risk_pco2_normal": "at risk of hypercapnic failure, but the PCO2 is normal",
    "default": "not hypercapnic",
}


def _spo2_target(w: _Work) -> None:
    s, r, d = w.s, w.r, w.d
    at_risk = bool(d.at_risk)
    low, high = d.spo2_low, d.spo2_high
    basis = d.spo2_basis
    w.spo2_target = (low, high)
    r.put("spo2_target", {"low": low, "high": high}, decimals=0)
    r.put("spo2_target_basis", basis)
    r.step(
        f"SpO2 target range {low:g}-{high:g} % ({w.basis_text(basis)})",
        "a prescribed range overrides; else 88-92 % when the PCO2 is above 6.0 kPa or after NIV or invasive "
        "ventilation for hypercapnic failure; else 94-98 % (an at-risk patient with a normal PCO2 too)",
        low,
        "bts2017_o2",
        output="spo2_target",
    )
    r.finding(
        "spo2_target",
        "info",
        f"SpO2 target {low:g}-{high:g} % ({w.basis_text(basis)}; BTS 2017). Recheck the gas 30-60 minutes "
        "after a change of oxygen.",
    )
    if w.fires("spo2_target_needs_history"):
        r.finding(
            "spo2_target_needs_history",
            "notable",
            "At risk of hypercapnic failure with a normal PCO2: 94-98 % applies, but 88-92 % applies if the "
            "patient has needed NIV or invasive ventilation for hypercapnic failure before "
            "(previous_hypercapnic_failure was not given).",
        )
    if w.fires("hypercapnic_without_risk_flag"):
        r.finding(
            "hypercapnic_without_risk_flag",
            "notable",
            f"PaCO2 {w.p(s.pco2)} is raised although the patient was not marked at risk of hypercapnic "
            "failure: the 88-92 % range applies.",
        )
    if w.fires("spo2_below_target"):
        r.finding(
            "spo2_below_target", "notable", f"SpO2 {s.spo2:g} % is below the {low:g}-{high:g} % target."
        )
    elif w.fires("spo2_above_target"):
        r.finding(
            "spo2_above_target",
            d.severity["spo2_above_target"],
            f"SpO2 {s.spo2:g} % is above the {low:g}-{high:g} % target"
            + (
                ": in patients at risk of hypercapnic failure excess oxygen can raise the PaCO2."
                if at_risk
                else "."
            ),
        )


def _severity(w: _Work) -> None:
    s, r = w.s, w.r
    if w.fires("severe_acidaemia"):
        r.finding(
            "severe_acidaemia",
            "urgent",
            f"pH {s.ph:.2f} is below {SEVERE_ACIDAEMIA_PH:.2f}: severe acidaemia.",
        )
    elif w.fires("severe_alkalaemia"):
        r.finding(
            "severe_alkalaemia",
            "urgent",
            f"pH {s.ph:.2f} is above {SEVERE_ALKALAEMIA_PH:.2f}: severe alkalaemia.",
        )
    if w.fires("normal_ph_single_disorder"):
        d = w.disorders[0]
        r.finding(
            "normal_ph_single_disorder",
            "info",
            f"The pH is normal with a single {NAMES[d['code']]}: compensation rarely returns the pH to "
            "normal, so an opposing second process is possible.",
        )


# -- outputs, cautions, summary ------------------------------------------------------------------------------


def _disorder_phrase(w: _Work, d: dict) -> str:
    name = NAMES[d["code"]]
    if d["code"] == MET_ACID and w.acidosis_type and not w.doubtful:
        name = {
            "high_anion_gap": "high anion gap metabolic acidosis",
            "normal_anion_gap": "normal anion gap (hyperchloraemic) metabolic acidosis",
            "high_and_normal_anion_gap": "mixed high and normal anion gap metabolic acidosis",
        }[w.acidosis_type]
    if d["chronicity"] is not None and d["fraction_acute"] is not None:  # judged, not provisional
        name = d["chronicity"].replace("_", "-") + " " + name
    return name


def _reading(w: _Work, *, temperature: bool = True) -> str:
    """The reading in words (without the inconsistency preamble), lower case, no final stop."""
    ds = w.disorders
    if not ds:
        if w.ph_status == "normal":
            text = "no acid-base disorder: pH, PCO2 and HCO3 are within their reference ranges"
        else:
            text = f"{w.ph_status} without a disorder that the rules can name"
    else:
        phrases = [_disorder_phrase(w, d) for d in ds]
        if len(ds) >= 3:
            text = "triple disorder: " + phrases[0] + " with " + " and ".join(phrases[1:])
        elif len(ds) == 2:
            text = phrases[0] + " with a concurrent " + phrases[1]
        else:
            text = phrases[0]
            if ds[0]["code"] in (MET_ACID, MET_ALK) and w.compensation_text:
                text += " with " + w.compensation_text
            elif ds[0]["chronicity"] == "chronic" and ds[0]["fraction_acute"] is not None:
                if w.fires("compensation_incomplete"):
                    text += " with acidaemia: compensation incomplete"
                elif ds[0]["code"] == RESP_ACID or w.ph_status == "normal":
                    text += ", compensated as expected"
    if w.s.site == "venous" and ds:
        text = (
            "venous gas, a screen only: "
            + text
            + " (confirm on an arterial or earlobe gas before judging chronicity or setting a PaCO2 aim)"
        )
    ox = w.oxygen.get("reading")
    if ox == "pure_hypoventilation":
        text += "; normal A-a gradient: pure hypoventilation"
    elif ox == "lung_disease_and_hypoventilation":
        text += "; raised A-a gradient: lung disease as well as hypoventilation"
    if w.temp and temperature:
        text = (
            f"at 37 °C (alpha-stat): {text}; corrected to {w.temp['t']:.1f} °C (pH-stat) the values are "
            + ("near normal" if w.temp["near_normal"] else "outside the reference ranges")
        )
    if w.tentative:
        text += " (tentative: borderline values)"
    return text


def _interpretation(w: _Work) -> str:
    text = _reading(w)
    if w.doubtful:
        text = (
            "The reported pH, PCO2 and HCO3 are internally inconsistent: recheck the sample and its "
            "transcription. Provisional reading from pH and PCO2 only, resting on doubtful data: " + text
        )
    return text[0].upper() + text[1:] + "."


def _outputs(w: _Work) -> None:
    r = w.r
    for d in w.disorders:
        if d["fraction_acute"] is not None:
            from_baseline = w.resp and given(w.d.f_b)
            r.step(
                f"Fraction acute of the {NAMES[d['code']]} used for the chronicity call",
                ">= 0.8 acute, <= 0.2 chronic, between acute-on-chronic"
                + (" (from the known baseline)" if from_baseline else " (HCO3 rules, limited to 0-1)"),
                d["fraction_acute"],
                "fraction_acute_bands",
                output="disorders",
            )
    r.put("disorders", [dict(d) for d in w.disorders])
    w.interpretation = _interpretation(w)
    r.put("interpretation", w.interpretation)


def _cautions(w: _Work) -> None:
    s, r = w.s, w.r
    r.caution(
        "Decision support only: this reading applies published adult rules to the numbers entered. It does "
        "not replace clinical assessment, senior advice or your local protocols; check the inputs against "
        "the original report."
    )
    r.caution(
        "The compensation rules assume a steady state (respiratory compensation takes 12-24 hours, renal "
        "compensation 3-5 days) and are not validated in pregnancy, in children or in neonates."
    )
    if s.age is not None and s.age < 18:
        r.caution("The patient is under 18: these rules and the A-a limits by age were derived in adults.")
    if s.site == "venous":
        r.caution(
            "Venous sample: pH and HCO3 track arterial values closely, but a venous PCO2 only screens for "
            "arterial hypercapnia (a normal value makes it unlikely; a raised one does not measure it), and "
            "a venous PO2 says nothing about oxygenation. Confirm hypercapnia with an arterial or "
            "arterialised capillary sample."
        )
        raised = s.pco2 > PCO2_HIGH
        r.finding(
            "venous_sample",
            "notable",
            (
                f"Venous PCO2 {w.p(s.pco2)} is above {w.p(PCO2_HIGH)}: arterial hypercapnia is possible "
                "(venous "
                f"PCO2 runs about {w.p(4.0)} to {w.p(6.0)} above arterial, with wide limits). Confirm with "
                "an arterial or "
                "arterialised earlobe gas before judging chronicity or setting a PaCO2 aim; meanwhile the "
                "88-92 % SpO2 range applies."
                if raised
                else f"Venous PCO2 {w.p(s.pco2)} is not above {w.p(PCO2_HIGH)}: arterial hypercapnia is "
                "unlikely "
                f"(venous PCO2 runs about {w.p(4.0)} to {w.p(6.0)} above arterial)."
            ),
        )
    elif s.site == "capillary":
        r.caution(
            "Capillary sample: arterialised capillary pH and PCO2 approximate arterial values when the site "
            "is well perfused; capillary PO2 underestimates arterial PO2."
        )
        r.finding(
            "capillary_sample",
            "info",
            "Arterialised capillary sample: pH and PCO2 approximate arterial values; PO2 underestimates "
            "arterial PO2.",
        )
    if w.pco2_target is not None:
        r.caution(
            "The PaCO2 target is an aim for the treating team, not a ventilator setting: change ventilation "
            "according to local protocols, gradually, and recheck the blood gas after each change."
        )
    if w.niv == "met":
        r.caution(
            "NIV thresholds are one part of a clinical decision made by the treating team with the whole "
            "clinical picture and local protocols."
        )
    r.caution(
        "Use the patient's prescribed SpO2 range where one exists (for example an oxygen alert card) and "
        "follow local oxygen policy."
    )


def _temperature_line(w: _Work) -> str:
    t = w.temp
    return f"Read at 37 °C (alpha-stat); corrected to {t['t']:.1f} °C (pH-stat) the values are " + (
        "near normal." if t["near_normal"] else "outside the reference ranges."
    )


def _summary(w: _Work) -> None:
    """The summary, what changes care first: a provisional mark, the reading, a threshold met, the aims."""
    s, r = w.s, w.r
    said: set[str] = set()
    if w.doubtful:
        r.say(
            "PROVISIONAL: the reported pH, PCO2 and HCO3 do not fit together; recheck the sample and its "
            "transcription before acting on this reading."
        )
    elif s.mix_ups:
        r.say("PROVISIONAL: possible unit mix-up. " + " ".join(s.mix_ups))
    reading = _reading(w, temperature=False)
    r.say(reading[0].upper() + reading[1:] + ".")
    found = {f["code"]: f for f in r.findings}
    extra = {
        "spo2_below_target": " Adjust the oxygen to reach the target range.",
        "pco2_below_baseline": " Do not lower it further; review the ventilation.",
    }
    if bool(w.d.at_risk):
        extra["spo2_above_target"] = (
            " Reduce the oxygen to the target range; recheck the gas in 30-60 minutes."
        )
    if "hypoxaemia_masked_by_oxygen" in found:
        said.add("respiratory_failure_type_1")  # the masked-hypoxaemia sentence says it, with the P/F

    def say(code: str) -> None:
        if code in found and code not in said:
            r.say(found[code]["text"] + extra.get(code, ""))
            said.add(code)

    # a threshold met, then anything else urgent
    for code in (
        "niv_criteria_met",
        "ventilation_failing_to_compensate",
        "niv_criteria_need_arterial_sample",
    ):
        say(code)
    for f in r.findings:
        if f["severity"] == "urgent" and f["code"] != "inconsistent_triple":
            say(f["code"])
    # oxygen that changes care: hypoxaemia, oxygen above or below the target, oxygen not recorded
    for code in ("respiratory_failure_type_1", "hypoxaemia_masked_by_oxygen", "oxygen_probably_given"):
        say(code)
    low, high = w.spo2_target
    if bool(w.d.at_risk):
        say("spo2_above_target")
    say("spo2_below_target")
    # the aims
    if w.pco2_target is not None:
        r.say(f"PaCO2 aim {w.p(w.pco2_target)}: {TARGET_BASIS[w.target_basis]}.")
    say("pco2_below_baseline")
    history = (
        " If the patient has ever needed NIV or invasive ventilation for hypercapnic failure: 88-92 % "
        "(history not given)."
        if w.fires("spo2_target_needs_history")
        else ""
    )
    r.say(f"SpO2 target {low:g}-{high:g} % ({w.basis_text(w.d.spo2_basis)}).{history}")
    if w.temp:
        r.say(_temperature_line(w))
    hco3_note = (
        "reported, consistent"
        if w.consistent
        else "reported, inconsistent with pH and PCO2"
        if w.consistent is False
        else "computed"
    )
    temp = f" at 37 °C, patient {s.temperature:.1f} °C" if w.temp else ""
    r.say(
        f"{s.site.capitalize()} gas{temp}: pH {s.ph:.2f}, PCO2 {w.p(s.pco2)}, HCO3 {w.hco3_out:.1f} "
        f"mmol/L ({hco3_note}), SBE {w.sbe:+.1f} mmol/L."
    )
    if w.resp:
        e = ab.RespiratoryExpectation(w.d.e_acute, w.d.e_chronic)
        d = w.disorders[0]
        line = (
            f"Expected HCO3 for this PCO2: {e.acute.value:.1f} if acute, {e.chronic.value:.1f} if chronic "
            f"(published slopes {e.chronic.low:.1f}-{e.chronic.high:.1f}); "
            f"{'measured' if s.hco3 is not None and not w.doubtful else 'computed'} {w.hco3:.1f}"
        )
        if d["fraction_acute"] is not None:
            line += f"; about {100 * d['fraction_acute']:.0f} % of the change looks acute"
        r.say(line + ".")
    elif w.met_expected is not None:
        e = w.met_expected
        r.say(f"Expected PaCO2 {w.p(e.low)} to {w.p(e.high)}; measured {w.p(s.pco2)}.")
    if w.ag_used is not None:
        r.say(
            f"Anion gap {w.ag_used:.1f} mmol/L"
            + (" (albumin-corrected)" if s.albumin is not None else "")
            + (f", {w.acidosis_type.replace('_', ' ')} acidosis" if w.acidosis_type else "")
            + "."
        )
    failure = w.d.respiratory_failure
    failure_words = {"type_1": "type 1", "type_2": "type 2", "none": "none named", "": ""}
    if w.oxygen.get("readable"):
        o = w.oxygen
        fio2 = f"FiO2 {s.fio2:.2f}" if s.fio2_given else "air (assumed: no FiO2 recorded)"
        category = (
            "below zero: check the FiO2, the barometric pressure and the unit of PO2"
            if w.fires("po2_above_alveolar")
            else o["category"].replace("_", " ")
        )
        r.say(
            f"PaO2 {w.p(s.po2)} on {fio2}: A-a gradient {w.p(o['aa'])} ({category}), P/F {w.pf(o['pf'])}; "
            f"respiratory failure: {failure_words[failure]}."
        )
    elif failure:
        r.say(f"Respiratory failure: {failure_words[failure]} (oxygenation not assessed from this sample).")
