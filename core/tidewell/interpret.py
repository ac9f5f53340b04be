"""The ``blood_gas`` calculation: a whole, sourced interpretation of one blood-gas sample.

==================  =====================================================================================
``blood_gas``       bridge calculation (CONTRACT.md ``blood_gas``): inputs -> outputs, findings, cautions,
                    steps and a plain-language summary
==================  =====================================================================================

What it does, in order (REFERENCE.md 4.3, extended):

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
4. Compensation (Boston rules, REFERENCE.md 4.1 defaults): Winters' formula; metabolic alkalosis 0.7 per
   mmol/L +/- 5; respiratory acidosis 1 (acute) and 3.5 (chronic) per 10 mmHg, alkalosis 2 and 4, with the
   alternative published slopes shown as the band of ``expected_hco3``. A second, metabolic, disorder is named
   only when the measured HCO3 lies beyond the acute-to-chronic range by more than max(2 mmol/L, 0.2 x the
   acute-chronic span) -- the 0.2 is the published fraction-acute band (f > 1.2 / f < -0.2), the 2 mmol/L
   floor keeps analyser scatter from naming a disorder when PaCO2 is only just abnormal (Tidewell convention).
5. Fraction acute by the HCO3 rules (used for the call) and by the pH rules (shown; they drift above a rise of
   about 30 mmHg, REFERENCE.md 4.4). With ``baseline_pco2`` the chronicity comes from the baseline instead. A
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

The P/F ratio and a/A ratio are computed by small private helpers here (``_pf_ratio``, ``_a_over_A``) so that
this module calls only the oxygenation functions that are settled (``alveolar_po2_simple``,
``alveolar_po2_full``, ``aa_gradient_upper_by_age``).

Optional inputs beyond the contract: ``ca_ionised``, ``mg`` (Stewart), ``normal_albumin`` (g/dL, default 4.0),
``rq`` (default 0.8). Every output name is listed in docs/glossary/acidbase.md.
"""

from __future__ import annotations

import math

from . import acidbase as ab
from . import altitude, oxygenation, temperature, units
from .fields import Inputs
from .report import Report

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

# reference values (REFERENCE.md conventions and section 12; common practice)
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
#: hypoxaemia threshold for respiratory failure [mmHg] (8 kPa)
HYPOXAEMIA_MMHG = 60.0
#: anion gap at or above which a high-AG acidosis is named whatever the HCO3 (Gabow 1980, from memory)
AG_ALWAYS_ACIDOSIS = 20.0
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


def _clamp(x: float, low: float, high: float) -> float:
    return min(max(x, low), high)


def _r9(x: float | None) -> float | None:
    """Guard against float noise from unit conversion (1e-9 mmHg), so kPa and mmHg input classify alike."""
    return None if x is None else round(x, 9)


class _Sample:
    """The inputs, read and converted (pressures in mmHg)."""

    def __init__(self, inputs: Inputs):
        self.mix_ups: list[str] = []
        self.unusual: list[str] = []
        i = inputs
        self.ph = _read_ph(i)
        self.pco2 = _r9(
            i.quantity(
                "pco2",
                unit="mmHg",
                low=8.0,
                high=250.0,
                label="PCO2",
                required=True,
                plausible_word="is not survivable",
            )
        )
        self.hco3 = i.quantity(
            "hco3", unit="mmol/L", low=1.0, high=70.0, label="HCO3", plausible_word="is not survivable"
        )
        self.po2 = _r9(
            i.quantity(
                "po2",
                unit="mmHg",
                low=15.0,
                high=800.0,
                label="PO2",
                plausible_word="is not plausible in blood",
            )
        )
        self.fio2 = i.fraction("fio2", default=0.21, label="FiO2")
        self.site = i.choice("sample", SITES, default="arterial", label="sample")
        self.base_excess = i.quantity("base_excess", unit="mmol/L", low=-40.0, high=40.0, label="base excess")
        self.na = i.quantity("na", unit="mmol/L", low=100.0, high=190.0, label="sodium", substance="sodium")
        self.k = i.quantity("k", unit="mmol/L", low=1.0, high=10.0, label="potassium", substance="potassium")
        self.cl = i.quantity(
            "cl", unit="mmol/L", low=60.0, high=150.0, label="chloride", substance="chloride"
        )
        self.albumin = i.quantity("albumin", unit="g/dL", low=0.5, high=6.0, label="albumin")
        self.lactate = _concentration(i, "lactate", 0.0, 50.0, "lactate")
        self.glucose = _concentration(i, "glucose", 0.0, 150.0, "glucose")
        urea = _concentration(i, "urea", 0.0, 100.0, "urea")
        bun = _concentration(i, "bun", 0.0, 100.0, "BUN (as urea)")
        self.phosphate = _concentration(i, "phosphate", 0.1, 5.0, "phosphate")
        self.osm = i.quantity(
            "measured_osmolality", unit="mOsm/kg", low=200.0, high=450.0, label="measured osmolality"
        )
        self.hb = i.quantity("hb", unit="g/dL", low=3.0, high=25.0, label="haemoglobin", substance="hb")
        self.spo2 = i.percent("spo2", low=30.0, high=100.0, label="SpO2")
        self.age = i.number("age", low=0.0, high=120.0, label="age", what=" years")
        self.temperature = i.quantity(
            "temperature",
            unit="degC",
            low=15.0,
            high=43.0,
            label="temperature",
            plausible_word="is outside the range the temperature corrections cover",
        )
        self.altitude = i.quantity("altitude", unit="m", low=-500.0, high=9000.0, label="altitude")
        self.pb = _r9(
            i.quantity(
                "pb",
                unit="mmHg",
                low=150.0,
                high=1100.0,
                label="barometric pressure",
                plausible_word="is outside the pressures people breathe at",
            )
        )
        self.baseline_pco2 = _r9(
            i.quantity(
                "baseline_pco2",
                unit="mmHg",
                low=20.0,
                high=150.0,
                label="baseline PCO2",
                plausible_word="is not a plausible usual PaCO2",
            )
        )
        self.hypercapnia_risk = i.flag("hypercapnia_risk", label="hypercapnia_risk")
        self.ca_ionised = i.quantity(
            "ca_ionised", unit="mmol/L", low=0.3, high=3.0, label="ionised calcium", substance="calcium"
        )
        self.mg = i.quantity("mg", unit="mmol/L", low=0.1, high=5.0, label="magnesium", substance="magnesium")
        self.normal_albumin = i.quantity(
            "normal_albumin",
            unit="g/dL",
            low=3.0,
            high=5.5,
            label="normal albumin",
            default=ab.NORMAL_ALBUMIN_G_DL,
        )
        self.rq = i.number("rq", low=0.6, high=1.2, label="respiratory quotient", default=0.8)

        # -- cross-field checks ---------------------------------------------------------------------------
        self.urea = urea
        self.urea_from = "urea" if urea is not None else ("bun" if bun is not None else None)
        if urea is not None and bun is not None:
            if abs(urea - bun) > 0.05 * max(urea, bun, 1.0):
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
            implied = ab.CO2_SOLUBILITY * self.pco2 * 10.0 ** (self.ph - ab.PK_PRIME)
            if not 1.0 <= implied <= 70.0:
                message = (
                    f"pH {self.ph:g} with PCO2 {self.pco2:.1f} mmHg implies HCO3 {implied:.3g} mmol/L, "
                    "which is not survivable (1 to 70)"
                )
                hint = "One of pH or PCO2 is probably mistyped or sent in the wrong unit."
                i.fail("ph", i.raw.get("ph"), message, hint, code="inconsistent")
                i.fail("pco2", i.raw.get("pco2"), message, hint, code="inconsistent")
        if self.po2 is not None and self.fio2 is not None and self.site != "venous":
            pb = self.pb_value()
            pio2 = self.fio2 * (pb - oxygenation.PH2O_37_MMHG) if pb is not None else None
            if pio2 is not None and self.po2 > pio2 + 5.0:
                i.fail(
                    "po2",
                    i.raw.get("po2"),
                    f"PO2 {self.po2:.1f} mmHg is above the inspired PO2 ({pio2:.1f} mmHg at FiO2 "
                    f"{self.fio2:.2f}): impossible",
                    "Was the patient breathing oxygen? Send fio2. Otherwise check the unit of PO2.",
                    code="inconsistent",
                )
            elif pio2 is not None and self.pco2 is not None:
                alveolar = pio2 - self.pco2 / (self.rq if self.rq is not None else 0.8)
                if alveolar < 0.0:
                    i.fail(
                        "fio2",
                        i.raw.get("fio2", self.fio2),
                        f"at FiO2 {self.fio2:.2f} a PaCO2 of {self.pco2:.0f} mmHg leaves no alveolar oxygen "
                        f"(alveolar PO2 {alveolar:.0f} mmHg), yet PO2 is {self.po2:.0f} mmHg",
                        "The patient must have been breathing supplemental oxygen: send the FiO2 used.",
                        code="inconsistent",
                    )
        self._grey_zone(i)
        i.finish()

    def pb_value(self) -> float | None:
        if self.pb is not None:
            return self.pb
        if self.altitude is not None:
            return altitude.pressure_at_altitude_isa(altitude_m=self.altitude)
        return 760.0

    def _grey_zone(self, i: Inputs) -> None:
        """Values that are possible but look like a unit slip: kept, and named in a finding."""

        def unit_of(key):
            raw = i.raw.get(key)
            return raw.get("unit") if isinstance(raw, dict) else None

        for key, label, value in (
            ("pco2", "PCO2", self.pco2),
            ("baseline_pco2", "baseline PCO2", self.baseline_pco2),
        ):
            if value is None:
                continue
            if unit_of(key) == "mmHg" and value < 15.0:
                self.mix_ups.append(
                    f"{label} {value:g} mmHg is extremely low; if it was {value:g} kPa "
                    f"({units.convert(value, 'kPa', 'mmHg'):.0f} mmHg), re-enter it in kPa."
                )
            if unit_of(key) == "kPa" and value > 150.0:
                given = units.convert(value, "mmHg", "kPa")
                self.mix_ups.append(
                    f"{label} {given:.3g} kPa ({value:.0f} mmHg) is extremely high; if it was {given:.3g} "
                    "mmHg, re-enter it in mmHg."
                )
        if self.po2 is not None and unit_of("po2") == "mmHg" and self.po2 < 25.0 and self.site != "venous":
            self.mix_ups.append(
                f"PO2 {self.po2:g} mmHg is extremely low for a {self.site} sample; if it was {self.po2:g} "
                f"kPa ({units.convert(self.po2, 'kPa', 'mmHg'):.0f} mmHg), re-enter it in kPa."
            )
        if self.pb is not None and unit_of("pb") == "mmHg" and self.pb > 800.0:
            as_hpa = units.convert(self.pb, "hPa", "mmHg")
            self.mix_ups.append(
                f"Barometric pressure {self.pb:g} mmHg is above sea-level pressure; if it was {self.pb:g} "
                f"hPa ({as_hpa:.0f} mmHg), re-enter it in hPa."
            )
        if self.glucose is not None and self.glucose > 100.0:
            self.unusual.append(
                f"glucose {self.glucose:.0f} mmol/L is above 100 mmol/L: check the value and unit"
            )
        if self.urea is not None and self.urea > 80.0:
            self.unusual.append(f"urea {self.urea:.0f} mmol/L is above 80 mmol/L: check the value and unit")
        if self.lactate is not None and self.lactate > 30.0:
            self.unusual.append(
                f"lactate {self.lactate:.0f} mmol/L is above 30 mmol/L: check the value and unit"
            )


def _concentration(i: Inputs, key: str, low: float, high: float, label: str) -> float | None:
    """A substance concentration in mmol/L whose implausible-unit hint tries mg/dL first (the usual slip)."""
    value = i.quantity(key, unit="mmol/L", low=-math.inf, high=math.inf, label=label, substance=key)
    if value is None or low <= value <= high:
        return value
    raw = i.raw.get(key)
    number, given = raw["value"], raw["unit"]
    hint = ""
    for other in ("mg/dL", "mmol/L", "mg/L", "g/L", "umol/L"):
        if other != given and low <= units.convert(number, other, "mmol/L", substance=key) <= high:
            hint = f"Did you mean {number:g} {other}?"
            break
    i.fail(
        key,
        raw,
        f"{label} {number:g} {given} is outside the accepted range ({low:g} to {high:g} mmol/L)",
        hint,
        code="implausible" if hint else "out_of_range",
    )
    return None


def _read_ph(i: Inputs) -> float | None:
    """pH with hints for the usual slips (a missing decimal point, [H+] in nmol/L sent as pH)."""
    value = i.number("ph", low=-math.inf, high=math.inf, label="pH", required=True)
    if value is None or 6.5 <= value <= 8.0:
        return value
    hints = []
    for factor in (10.0, 100.0, 1000.0):
        if 6.5 <= value / factor <= 8.0:
            hints.append(f"Did you mean {value / factor:g}?")
            break
    if 10.0 <= value <= 316.0:
        hints.append(f"If {value:g} is [H+] in nmol/L, the pH is {9.0 - math.log10(value):.2f}.")
    i.fail(
        "ph",
        value,
        f"pH {value:g} is outside 6.5 to 8.0 (not survivable, and outside the range of the rules used)",
        " ".join(hints),
        code="implausible" if hints else "out_of_range",
    )
    return None


class _Work:
    """Everything derived while interpreting one sample."""

    def __init__(self, s: _Sample, report: Report):
        self.s = s
        self.r = report
        self.disorders: list[dict] = []
        self.primary: str | None = None
        self.tentative = False
        self.hco3: float = 0.0  # the HCO3 the rules use
        self.hco3_out: float = 0.0  # the reported HCO3, else computed
        self.consistent: bool | None = None
        self.sbe: float = 0.0
        self.resp: dict | None = None  # details of a respiratory primary
        self.met_expected = None  # Expected of a metabolic primary's PCO2 rule
        self.compensation_text = ""
        self.ag_used: float | None = None
        self.acidosis_type: str | None = None
        self.copenhagen: dict = {}
        self.stewart: dict = {}
        self.oxygen: dict = {}
        self.temp: dict = {}
        self.pco2_target: float | None = None
        self.target_basis: str | None = None
        self.spo2_target: tuple[int, int] | None = None
        self.niv: str | None = None

    # -- helpers ---------------------------------------------------------------------------------------------
    def p(self, mmhg: float) -> str:
        """A pressure in the user's unit, as text."""
        unit = self.r.pressure_unit
        value = units.convert(mmhg, "mmHg", unit)
        return f"{value:.2f} kPa" if unit == "kPa" else f"{value:.1f} mmHg"

    def codes(self) -> list[str]:
        return [d["code"] for d in self.disorders]

    def add(self, code: str, *, chronicity: str | None = None, fraction: float | None = None) -> dict:
        for d in self.disorders:
            if d["code"] == code:
                return d
        entry = {
            "code": code,
            "role": "primary" if not self.disorders else "concurrent",
            "chronicity": chronicity,
            "fraction_acute": fraction,
        }
        self.disorders.append(entry)
        return entry

    @property
    def doubtful(self) -> bool:
        return self.consistent is False


# -- the calculation -----------------------------------------------------------------------------------------


def blood_gas(inputs: Inputs, report: Report) -> None:
    """Interpret one blood-gas sample (CONTRACT.md ``blood_gas``); see the module docstring for the rules."""
    s = _Sample(inputs)
    w = _Work(s, report)
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
    if s.mix_ups:
        r.finding("possible_unit_mix_up", "notable", "Possible unit mix-up: " + " ".join(s.mix_ups))
    if s.unusual:
        r.finding("value_unusual", "notable", "Unusual value: " + "; ".join(s.unusual) + ".")
    if s.pb_and_altitude:
        r.finding(
            "pb_used_not_altitude",
            "info",
            "Both barometric pressure and altitude were given: the measured pressure is used, the altitude "
            "is not.",
        )


def _core(w: _Work) -> None:
    s, r = w.s, w.r
    hh = ("henderson1908", "nccls1994")
    hco3_calc = ab.hco3_henderson_hasselbalch(ph=s.ph, pco2_mmhg=s.pco2)
    r.quantity("hco3_computed", hco3_calc, "mmol/L", decimals=1)
    r.step(
        "HCO3 from pH and PCO2 (Henderson-Hasselbalch)",
        "HCO3 = 0.0307 x PCO2 [mmHg] x 10^(pH - 6.1)",
        hco3_calc,
        hh,
        output="hco3_computed",
        unit="mmol/L",
    )
    h_measured = ab.hydrogen_ion_from_ph(ph=s.ph)
    r.quantity("h_nmol_l_measured", h_measured, "nmol/L", decimals=1)
    r.step(
        "[H+] from the pH",
        "[H+] = 10^(9 - pH)",
        h_measured,
        "kassirer1965",
        output="h_nmol_l_measured",
        unit="nmol/L",
    )
    if s.hco3 is not None:
        c = ab.check_consistency(ph=s.ph, pco2_mmhg=s.pco2, hco3_mmol_l=s.hco3)
        w.consistent = c.consistent
        r.put("consistency", "consistent" if c.consistent else "inconsistent")
        r.put("ph_computed", c.ph_computed, decimals=3)
        r.step(
            "pH from the reported PCO2 and HCO3",
            "pH = 6.1 + log10(HCO3 / (0.0307 x PCO2))",
            c.ph_computed,
            hh,
            output="ph_computed",
        )
        r.put("ph_difference", c.ph_difference, decimals=3)
        r.step(
            "Consistency: computed minus reported pH",
            "difference = pH_computed - pH_reported; consistent when |difference| <= 0.03",
            c.ph_difference,
            "consistency_band",
            output="ph_difference",
        )
        r.quantity("h_nmol_l_kassirer", c.h_kassirer_nmol_l, "nmol/L", decimals=1)
        r.step(
            "[H+] by Kassirer-Bleich",
            "[H+] = 24 x PCO2 [mmHg] / HCO3 [mmol/L]",
            c.h_kassirer_nmol_l,
            "kassirer1965",
            output="h_nmol_l_kassirer",
            unit="nmol/L",
        )
        w.hco3_out = s.hco3
        if c.consistent:
            w.hco3 = s.hco3
        else:
            w.hco3 = hco3_calc
            r.finding(
                "inconsistent_triple",
                "urgent",
                f"The reported values do not fit together: PCO2 {w.p(s.pco2)} with HCO3 {s.hco3:.1f} mmol/L "
                f"gives pH {c.ph_computed:.3f}, not the reported {s.ph:.2f} (difference "
                f"{c.ph_difference:+.3f}; [H+] {c.h_kassirer_nmol_l:.1f} by Kassirer-Bleich against "
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
        w.hco3 = w.hco3_out = hco3_calc
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
    w.sbe = ab.standard_base_excess_clsi2009(ph=s.ph, hco3_mmol_l=w.hco3_out)
    r.quantity("standard_base_excess", w.sbe, "mmol/L", decimals=1)
    r.step(
        "Standard base excess (CLSI form, the default)",
        "SBE = HCO3 - 24.8 + 16.2 x (pH - 7.40)",
        w.sbe,
        "nccls1994",
        output="standard_base_excess",
        unit="mmol/L",
    )
    so2 = s.spo2 / 100.0 if s.spo2 is not None else 1.0
    v = ab.sbe_variants(ph=s.ph, hco3_mmol_l=w.hco3_out, pco2_mmhg=s.pco2, hb_g_dl=s.hb, so2_fraction=so2)
    variants = {
        "clsi": {"value": v.clsi, "unit": "mmol/L"},
        "siggaard_andersen": {"value": v.siggaard_andersen, "unit": "mmol/L"},
        "van_slyke_hb5": {"value": v.van_slyke_hb5, "unit": "mmol/L"},
    }
    r.step(
        "SBE, Siggaard-Andersen form",
        "0.9287 x (HCO3 - 24.4 + 14.83 x (pH - 7.40))",
        v.siggaard_andersen,
        "siggaard1971",
        output="sbe_variants",
        unit="mmol/L",
    )
    r.step(
        "SBE, Van Slyke at Hb 5 g/dL",
        "(1 - 0.014 x 5) x [(HCO3 - 24.8) + (1.43 x 5 + 7.7) x (pH - 7.40)]",
        v.van_slyke_hb5,
        ("siggaard1971", "nccls1994"),
        output="sbe_variants",
        unit="mmol/L",
    )
    if v.blood_van_slyke is not None and v.zander is not None:
        variants["blood_van_slyke"] = {"value": v.blood_van_slyke, "unit": "mmol/L"}
        variants["zander"] = {"value": v.zander, "unit": "mmol/L"}
        r.step(
            "Whole-blood BE, Van Slyke at the patient's Hb",
            "(1 - 0.014 x Hb) x [(HCO3 - 24.8) + (1.43 x Hb + 7.7) x (pH - 7.40)]",
            v.blood_van_slyke,
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
            v.zander,
            "lang2002",
            output="sbe_variants",
            unit="mmol/L",
        )
    r.put("sbe_variants", variants, decimals=1)
    if s.base_excess is not None:
        values = [x for x in v if x is not None]
        diff = s.base_excess - w.sbe
        r.quantity("base_excess_difference", diff, "mmol/L", decimals=1)
        r.step(
            "Reported base excess minus computed SBE",
            "BE_reported - SBE_CLSI",
            diff,
            "nccls1994",
            output="base_excess_difference",
            unit="mmol/L",
        )
        if not min(values) - 2.0 <= s.base_excess <= max(values) + 2.0:
            r.finding(
                "base_excess_differs",
                "notable",
                f"The reported base excess ({s.base_excess:+.1f} mmol/L) differs from every published form "
                f"computed from pH and HCO3 ({min(values):+.1f} to {max(values):+.1f}): check the "
                "transcription or which base excess the analyser reports.",
            )

    # pH and PCO2 status
    w.ph_status = "acidaemia" if s.ph < PH_LOW else ("alkalaemia" if s.ph > PH_HIGH else "normal")
    r.put("ph_status", w.ph_status)
    w.pco2_status = "hypercapnia" if s.pco2 > PCO2_HIGH else ("hypocapnia" if s.pco2 < PCO2_LOW else "normal")
    r.put("pco2_status", w.pco2_status)


# -- classification ------------------------------------------------------------------------------------------


def _weights(pco2: float, hco3: float) -> tuple[float, float]:
    """Contributions to [H+] = 24 x PCO2 / HCO3 relative to 40/24: (respiratory, metabolic), as |log10|."""
    return abs(math.log10(pco2 / ab.NORMAL_PCO2_MMHG)), abs(math.log10(ab.NORMAL_HCO3_MMOL_L / hco3))


def primary_process(ph: float, pco2: float, hco3: float) -> tuple[str | None, bool]:
    """(primary disorder code or None, tentative) for a consistent pH/PCO2/HCO3.

    >>> primary_process(7.28, 26.0, 12.0)
    ('metabolic_acidosis', False)
    >>> primary_process(7.53, 24.0, 20.0)
    ('respiratory_alkalosis', False)
    """
    resp_w, met_w = _weights(pco2, hco3)
    acid = [c for c, ok in ((MET_ACID, hco3 < HCO3_LOW), (RESP_ACID, pco2 > PCO2_HIGH)) if ok]
    alk = [c for c, ok in ((MET_ALK, hco3 > HCO3_HIGH), (RESP_ALK, pco2 < PCO2_LOW)) if ok]

    def larger(resp_code: str, met_code: str) -> str:
        return resp_code if resp_w >= met_w else met_code

    def pick(cands: list[str], side: str) -> tuple[str | None, bool]:
        if len(cands) == 1:
            return cands[0], False
        if len(cands) == 2:
            return (larger(RESP_ACID, MET_ACID) if side == "acid" else larger(RESP_ALK, MET_ALK)), False
        options = []
        if side == "acid":
            if pco2 > ab.NORMAL_PCO2_MMHG:
                options.append((resp_w, RESP_ACID))
            if hco3 < ab.NORMAL_HCO3_MMOL_L:
                options.append((met_w, MET_ACID))
        else:
            if pco2 < ab.NORMAL_PCO2_MMHG:
                options.append((resp_w, RESP_ALK))
            if hco3 > ab.NORMAL_HCO3_MMOL_L:
                options.append((met_w, MET_ALK))
        if not options:
            return None, True
        return max(options)[1], True

    if ph < PH_LOW:
        return pick(acid, "acid")
    if ph > PH_HIGH:
        return pick(alk, "alk")
    if not acid and not alk:
        return None, False
    if ph < ab.NORMAL_PH:
        cands, side = (acid, "acid") if acid else (alk, "alk")
    else:
        cands, side = (alk, "alk") if alk else (acid, "acid")
    return pick(cands, side)


def _classify(w: _Work) -> None:
    s, r = w.s, w.r
    w.primary, w.tentative = primary_process(s.ph, s.pco2, w.hco3)
    if w.tentative and w.primary is not None:
        r.finding(
            "borderline_values",
            "info",
            "The pH is outside its reference range while PCO2 and HCO3 are inside theirs; "
            f"{NAMES[w.primary]} is named from the larger contribution to [H+] and is tentative.",
        )
    if w.primary is None:
        return
    if w.primary == MET_ACID:
        _metabolic_primary(w, acidosis=True)
    elif w.primary == MET_ALK:
        _metabolic_primary(w, acidosis=False)
    else:
        _respiratory_primary(w, w.primary)


def _metabolic_primary(w: _Work, *, acidosis: bool) -> None:
    w.add(w.primary)
    e = _metabolic_expected(w, acidosis=acidosis)
    _respiratory_response(w, e)


def _metabolic_expected(w: _Work, *, acidosis: bool):
    """Expected PaCO2 of a metabolic primary (outputs and steps); returns the Expected band."""
    r = w.r
    if acidosis:
        e = ab.expected_pco2_winters(hco3_mmol_l=w.hco3)
        formula = "expected PaCO2 = 1.5 x HCO3 + 8, band +/- 2 mmHg (Winters)"
        sources = ("albert1967",)
        alt = (
            f"alternatives: 1.54 x HCO3 + 8.36 +/- 2.2 gives {1.54 * w.hco3 + 8.36:.1f} mmHg (Kidney360 2022)"
        )
    else:
        e = ab.expected_pco2_metabolic_alkalosis(hco3_mmol_l=w.hco3)
        a06 = ab.expected_pco2_metabolic_alkalosis(hco3_mmol_l=w.hco3, slope=0.6).value
        a075 = ab.expected_pco2_metabolic_alkalosis(hco3_mmol_l=w.hco3, slope=0.75).value
        formula = "expected PaCO2 = 40 + 0.7 x (HCO3 - 24), band +/- 5 mmHg"
        sources = ("berend2014", "kidney360_2022")
        alt = (
            f"alternatives: slope 0.6 gives {a06:.1f} mmHg (Narins & Emmett 1980), 0.75 gives {a075:.1f} mmHg"
        )
    w.met_expected = e
    r.pressure_range("expected_pco2", e.low, e.high)
    r.step(
        f"Expected PaCO2 ({formula}; {alt})", formula, e.value, sources, output="expected_pco2", pressure=True
    )
    r.pressure("expected_pco2_centre", e.value)
    r.step(
        "Expected PaCO2, centre of the band",
        formula,
        e.value,
        sources,
        output="expected_pco2_centre",
        pressure=True,
    )
    if acidosis:
        r.pressure("expected_pco2_winters", e.value)
        r.step(
            "Winters' formula",
            "1.5 x HCO3 + 8",
            e.value,
            "albert1967",
            output="expected_pco2_winters",
            pressure=True,
        )
    return e


def _respiratory_response(w: _Work, e) -> None:
    """Compare the measured PaCO2 with the expected band of a metabolic primary."""
    s, r = w.s, w.r
    band = f"{w.p(e.low)} to {w.p(e.high)}"
    if s.pco2 > e.high:
        w.add(RESP_ACID)
        text = (
            f"PaCO2 {w.p(s.pco2)} is above the {band} expected from compensation: the respiratory response "
            "is inadequate (concurrent respiratory acidosis)."
        )
        r.finding("concurrent_respiratory_acidosis", "notable", text)
        w.compensation_text = "inadequate respiratory compensation (concurrent respiratory acidosis)"
    elif s.pco2 < e.low:
        w.add(RESP_ALK)
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
    s, r = w.s, w.r
    acid = code == RESP_ACID
    p, h = s.pco2, w.hco3
    delta = p - ab.NORMAL_PCO2_MMHG
    if acid:
        e = ab.expected_hco3_respiratory_acidosis(paco2_mmhg=p)
        acute_f = "HCO3 = 24 + 1 x (PaCO2 - 40)/10 (band: 1-2 per 10 mmHg)"
        chronic_f = "HCO3 = 24 + 3.5 x (PaCO2 - 40)/10 (band: 3 [some texts], 4 [Brandis], 5 [Martinu 2003])"
    else:
        e = ab.expected_hco3_respiratory_alkalosis(paco2_mmhg=p)
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
    span = abs(e.chronic.value - e.acute.value)
    margin = max(HCO3_MARGIN_MIN, 0.2 * span)
    judge = abs(delta) >= 5.0
    info = {"acid": acid, "e": e, "margin": margin, "judge": judge, "f_h": None, "f_ph": None, "f_b": None}
    if abs(delta) >= 1.0:
        f_h = ab.fraction_acute_hco3(paco2_mmhg=p, hco3_mmol_l=h)
        info["f_h"] = f_h
        r.put("fraction_acute_hco3", f_h, decimals=2)
        r.step(
            "Fraction acute by the HCO3 rules",
            "f = (HCO3_chronic - HCO3) / (HCO3_chronic - HCO3_acute), default slopes",
            f_h,
            ("fraction_acute_bands", "narins1980"),
            output="fraction_acute_hco3",
        )
    if acid:
        pr = ab.expected_ph_respiratory_acidosis(paco2_mmhg=p)
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
        # a pH that cannot be computed (expected HCO3 beyond the Henderson-Hasselbalch domain at an extreme
        # PaCO2) is left out, as the contract says
        ph_hh = {
            label: ab.ph_henderson_hasselbalch(hco3_mmol_l=expected.value, pco2_mmhg=p)
            for label, expected in (("acute", e.acute), ("chronic", e.chronic))
            if ab._HCO3[0] <= expected.value <= ab._HCO3[1]
        }
        r.put("expected_ph_hh", ph_hh, decimals=3)
        for label in ph_hh:
            r.step(
                f"pH from the expected {label} HCO3 (Henderson-Hasselbalch)",
                "pH = 6.1 + log10(HCO3_expected / (0.0307 x PaCO2))",
                ph_hh[label],
                "henderson1908",
                output="expected_ph_hh",
            )
        if p >= 41.0:
            f_ph = ab.fraction_acute_ph(ph=s.ph, paco2_mmhg=p)
            info["f_ph"] = f_ph
            r.put("fraction_acute_ph", f_ph, decimals=2)
            r.step(
                "Fraction acute by the pH rules",
                "f = [(7.40 - pH) - 0.003 x dPaCO2] / [(0.008 - 0.003) x dPaCO2]",
                f_ph,
                ("fraction_acute_bands", "berend2014"),
                output="fraction_acute_ph",
            )
        if delta > 30.0:
            r.finding(
                "ph_rule_drift",
                "info",
                f"With PaCO2 {delta:.0f} mmHg above 40 the linear pH rules drift: the acute rule predicts "
                f"pH {pr.acute:.2f}, while Henderson-Hasselbalch with the acute HCO3 gives "
                f"{ph_hh['acute']:.3f}. The chronicity call uses the HCO3 rules.",
            )
    if acid and s.baseline_pco2 is not None:
        b = s.baseline_pco2
        exp_b = ab.expected_hco3_with_baseline(paco2_mmhg=p, baseline_pco2_mmhg=b)
        r.quantity("expected_hco3_on_baseline", exp_b, "mmol/L", decimals=1)
        r.step(
            "HCO3 expected on the known baseline",
            "24 + 3.5 x (baseline - 40)/10 + 1 x (PaCO2 - baseline)/10 (or - 2 x (baseline - PaCO2)/10 "
            "below it)",
            exp_b,
            ("narins1980", "berend2014"),
            output="expected_hco3_on_baseline",
            unit="mmol/L",
        )
        base = max(b, ab.NORMAL_PCO2_MMHG)
        f_b = _clamp((p - base) / delta, 0.0, 1.0) if p > base and delta > 0 else 0.0
        info["f_b"] = f_b
        r.put("fraction_acute_baseline", f_b, decimals=2)
        r.step(
            "Fraction acute from the known baseline",
            "f = (PaCO2 - baseline) / (PaCO2 - 40), limited to 0-1",
            f_b,
            "fraction_acute_bands",
            output="fraction_acute_baseline",
        )
        low_ref = high_ref = exp_b
    else:
        low_ref = e.acute.value if acid else e.chronic.value
        high_ref = e.chronic.value if acid else e.acute.value
    info["low_ref"], info["high_ref"] = low_ref, high_ref
    met_acid = h < low_ref - margin
    met_alk = h > high_ref + margin
    chronicity = fraction = None
    hco3_reading = (
        ab.chronicity_from_fraction(fraction_acute=info["f_h"]) if info["f_h"] is not None else "acute"
    )
    if not judge:
        r.finding(
            "chronicity_not_judged",
            "info",
            f"PaCO2 {w.p(p)} is too close to normal for the acute and chronic rules to be told apart; the "
            "chronicity shown is provisional.",
        )
    if judge and info["f_b"] is not None:
        fraction = info["f_b"]
        chronicity = ab.chronicity_from_fraction(fraction_acute=fraction)
    elif judge and not (met_acid or met_alk) and info["f_h"] is not None:
        fraction = _clamp(info["f_h"], 0.0, 1.0)
        chronicity = hco3_reading
    elif info["f_b"] is not None:
        chronicity = ab.chronicity_from_fraction(fraction_acute=info["f_b"])
    else:
        chronicity = hco3_reading  # provisional: fraction_acute stays null
    w.add(code, chronicity=chronicity, fraction=fraction)
    if met_acid:
        w.add(MET_ACID)
        r.finding(
            "concurrent_metabolic_acidosis",
            "notable",
            f"HCO3 {h:.1f} mmol/L is more than {margin:.1f} below the {low_ref:.1f} expected "
            f"{'even for an acute change' if not info['f_b'] and acid else 'for this PaCO2'}: a concurrent "
            "metabolic acidosis.",
        )
    if met_alk:
        w.add(MET_ALK)
        r.finding(
            "concurrent_metabolic_alkalosis",
            "notable",
            f"HCO3 {h:.1f} mmol/L is more than {margin:.1f} above the {high_ref:.1f} expected "
            f"{'even for full chronic compensation' if acid and info['f_b'] is None else 'for this PaCO2'}: "
            "a concurrent metabolic alkalosis.",
        )
        if acid and info["f_b"] is None and h <= e.chronic.high + margin:
            r.finding(
                "chronic_slope_uncertain",
                "info",
                "With the steeper chronic slopes reported (up to about 5 mmol/L per 10 mmHg in stable "
                f"COPD, Martinu 2003; expected {e.chronic.high:.1f}) this HCO3 could be compensation alone.",
            )
    if acid and chronicity is not None and info["f_b"] is None and info["f_ph"] is not None:
        by_ph = ab.chronicity_from_fraction(fraction_acute=info["f_ph"])
        if by_ph != chronicity:
            r.finding(
                "chronicity_rules_disagree",
                "info",
                f"The HCO3 rules read {chronicity.replace('_', '-')} (f {info['f_h']:.2f}), the pH rules "
                f"{by_ph.replace('_', '-')} (f {info['f_ph']:.2f})"
                + (
                    "; at this rise the pH rules drift, so the HCO3 reading is used."
                    if delta > 30
                    else "; the HCO3 reading is used."
                ),
            )
    if info["f_b"] is not None and info["f_h"] is not None and judge and not (met_acid or met_alk):
        by_h = ab.chronicity_from_fraction(fraction_acute=info["f_h"])
        if by_h != chronicity:
            r.finding(
                "baseline_and_hco3_disagree",
                "info",
                f"The known baseline reads {chronicity.replace('_', '-')}, the HCO3 alone "
                f"{by_h.replace('_', '-')}: the baseline may be out of date, or a metabolic process moves "
                "the HCO3.",
            )
    w.resp = info


def _finish_chronicity(w: _Work) -> None:
    """Respiratory chronicity when a metabolic disorder also moves the HCO3 (always a word, never null)."""
    r = w.r
    metabolic = MET_ACID in w.codes() or MET_ALK in w.codes()
    if w.resp is not None and w.resp["f_b"] is None and metabolic:
        primary = w.disorders[0]
        primary["fraction_acute"] = None
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
            if d["code"] in (RESP_ACID, RESP_ALK) and d["chronicity"] is None:
                _concurrent_respiratory_chronicity(w, d)


def _concurrent_respiratory_chronicity(w: _Work, d: dict) -> None:
    s, r = w.s, w.r
    b = s.baseline_pco2
    if b is not None and d["code"] == RESP_ACID and s.pco2 > ab.NORMAL_PCO2_MMHG + 1.0:
        base = max(b, ab.NORMAL_PCO2_MMHG)
        f = _clamp((s.pco2 - base) / (s.pco2 - ab.NORMAL_PCO2_MMHG), 0.0, 1.0)
        d["chronicity"] = ab.chronicity_from_fraction(fraction_acute=f)
        d["fraction_acute"] = f
        r.put("fraction_acute_baseline", f, decimals=2)
        r.step(
            "Fraction acute of the concurrent respiratory acidosis, from the known baseline",
            "f = (PaCO2 - baseline) / (PaCO2 - 40), limited to 0-1",
            f,
            "fraction_acute_bands",
            output="fraction_acute_baseline",
        )
        return
    d["chronicity"] = "acute"
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
    s, r = w.s, w.r
    if s.na is None or s.cl is None:
        return None
    out = {}
    ag = ab.anion_gap(na_mmol_l=s.na, cl_mmol_l=s.cl, hco3_mmol_l=w.hco3_out)
    r.quantity("anion_gap", ag, "mmol/L", decimals=1)
    r.step(
        "Anion gap",
        "AG = Na - (Cl + HCO3); normal about 12",
        ag,
        ("oh1977", "kraut2007"),
        output="anion_gap",
        unit="mmol/L",
    )
    out["ag"] = ag
    if s.k is not None:
        agk = ab.anion_gap_with_potassium(
            na_mmol_l=s.na, k_mmol_l=s.k, cl_mmol_l=s.cl, hco3_mmol_l=w.hco3_out
        )
        r.quantity("anion_gap_with_k", agk, "mmol/L", decimals=1)
        r.step(
            "Anion gap with potassium",
            "AG_K = Na + K - (Cl + HCO3); normal about 16",
            agk,
            ("oh1977", "kraut2007"),
            output="anion_gap_with_k",
            unit="mmol/L",
        )
    used = ag
    if s.albumin is not None:
        agc = ab.anion_gap_albumin_corrected_figge1998(
            anion_gap_mmol_l=ag, albumin_g_dl=s.albumin, normal_albumin_g_dl=s.normal_albumin
        )
        r.quantity("anion_gap_corrected", agc, "mmol/L", decimals=1)
        r.step(
            f"Anion gap corrected for albumin (normal albumin {s.normal_albumin:.1f} g/dL)",
            "AG_corr = AG + 2.5 x (normal albumin - albumin) [g/dL]",
            agc,
            ("figge1998", "kraut2007"),
            output="anion_gap_corrected",
            unit="mmol/L",
        )
        used = agc
    out["used"] = used
    which = "albumin-corrected AG" if s.albumin is not None else "AG"
    if w.hco3_out < 23.5:
        dr = ab.delta_ratio(anion_gap_mmol_l=used, hco3_mmol_l=w.hco3_out)
        r.put("delta_ratio", dr, decimals=2)
        r.step(
            f"Delta ratio (from the {which})",
            "delta ratio = (AG - 12) / (24 - HCO3)",
            dr,
            "brandis",
            output="delta_ratio",
        )
        band = ab.delta_ratio_band_brandis(delta_ratio_value=dr)
        r.put("delta_ratio_band", band)
        out["dr"], out["band"] = dr, band
    dg = ab.delta_gap(anion_gap_mmol_l=used, hco3_mmol_l=w.hco3_out)
    r.quantity("delta_gap", dg, "mmol/L", decimals=1)
    r.step(
        f"Delta gap (from the {which})",
        "delta gap = (AG - 12) - (24 - HCO3)",
        dg,
        "brandis",
        output="delta_gap",
        unit="mmol/L",
    )
    r.put("delta_gap_reading", ab.delta_gap_reading(delta_gap_mmol_l=dg))
    out["dg"] = dg
    if used < 3.0:
        r.finding(
            "anion_gap_low",
            "notable",
            f"The {which} is {used:.1f} mmol/L, unusually low: check the Na, Cl and HCO3 entered (a "
            "laboratory or transcription error is the usual cause); low albumin, lithium, bromide and IgG "
            "paraproteins also lower it.",
        )
    return out


def _osmolality(w: _Work) -> None:
    s, r = w.s, w.r
    if s.na is None or s.glucose is None or s.urea is None:
        return
    calc = ab.osmolality_calculated_si(na_mmol_l=s.na, glucose_mmol_l=s.glucose, urea_mmol_l=s.urea)
    r.quantity("osmolality_calculated", calc, "mOsm/kg", decimals=0)
    r.step(
        "Calculated osmolality (SI)",
        "2 x Na + glucose + urea (mmol/L)" + (" (urea from BUN)" if s.urea_from == "bun" else ""),
        calc,
        "ccjm_osmol",
        output="osmolality_calculated",
        unit="mOsm/kg",
    )
    if s.osm is None:
        return
    gap = ab.osmolar_gap(measured_mosm_kg=s.osm, calculated_mosm_kg=calc)
    r.quantity("osmolar_gap", gap, "mOsm/kg", decimals=0)
    r.step(
        "Osmolar gap",
        "measured - calculated osmolality; normal below 10",
        gap,
        "ccjm_osmol",
        output="osmolar_gap",
        unit="mOsm/kg",
    )
    if gap >= 10.0:
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
    s, r = w.s, w.r
    g = _gap_values(w)
    _osmolality(w)
    if s.lactate is not None and s.lactate > 2.0:
        r.finding(
            "lactate_raised",
            "notable",
            f"Lactate {s.lactate:.1f} mmol/L is raised (above 2 mmol/L) and adds to the anion gap.",
        )
    if g is None:
        if MET_ACID in w.codes():
            r.finding(
                "anion_gap_needs_electrolytes",
                "info",
                "Add Na and Cl (and albumin) to tell a high from a normal anion gap acidosis.",
            )
        return
    used = g["used"]
    w.ag_used = used
    resp_primary = w.resp is not None
    if MET_ACID not in w.codes() and used >= AG_ALWAYS_ACIDOSIS:
        w.add(MET_ACID)
        if w.primary is None:  # the gap alone reveals it: it is the primary disorder
            w.primary = MET_ACID
            _metabolic_expected(w, acidosis=True)
        r.finding(
            "high_anion_gap_acidosis_found",
            "notable",
            f"An anion gap of {used:.0f} mmol/L points to a high anion gap metabolic acidosis although the "
            f"HCO3 ({w.hco3:.1f} mmol/L) does not show it on its own (opposing processes).",
        )
    if MET_ACID not in w.codes():
        if used > ab.NORMAL_ANION_GAP_MMOL_L + 4.0:
            r.finding(
                "anion_gap_raised",
                "info",
                f"The anion gap ({used:.1f} mmol/L) is above the usual 12 without a metabolic acidosis "
                "being evident.",
            )
        return
    if w.primary != MET_ACID:
        e = ab.expected_pco2_winters(hco3_mmol_l=w.hco3)
        r.pressure("expected_pco2_winters", e.value)
        r.step(
            f"Winters' formula for the concurrent metabolic acidosis (band {w.p(e.low)} to {w.p(e.high)})",
            "1.5 x HCO3 + 8 +/- 2",
            e.value,
            "albert1967",
            output="expected_pco2_winters",
            pressure=True,
        )
    before = w.hco3 + (used - ab.NORMAL_ANION_GAP_MMOL_L)
    if used <= ab.NORMAL_ANION_GAP_MMOL_L:
        w.acidosis_type = "normal_anion_gap"
    elif resp_primary:
        r.quantity("hco3_before_anion_gap", before, "mmol/L", decimals=1)
        r.step(
            "HCO3 before the unmeasured acid",
            "HCO3 + (AG - 12)",
            before,
            "brandis",
            output="hco3_before_anion_gap",
            unit="mmol/L",
        )
        w.acidosis_type = "high_anion_gap"
        if before < w.resp["low_ref"] - w.resp["margin"]:
            w.acidosis_type = "high_and_normal_anion_gap"
        if before > w.resp["high_ref"] + w.resp["margin"] and MET_ALK not in w.codes():
            w.add(MET_ALK)
            r.finding(
                "metabolic_alkalosis_from_gap",
                "notable",
                f"Adding back the anion-gap acid gives an HCO3 of {before:.1f} mmol/L, above the "
                f"{w.resp['high_ref']:.1f} the {NAMES[w.primary]} explains: a concurrent metabolic "
                "alkalosis (triple disorder).",
            )
    else:
        band = g.get("band")
        if band is None:  # HCO3 at or above 24: the delta gap decides
            w.acidosis_type = "high_anion_gap"
            if g["dg"] > 6.0 and MET_ALK not in w.codes():
                w.add(MET_ALK)
                r.finding(
                    "metabolic_alkalosis_from_gap",
                    "notable",
                    f"The delta gap is {g['dg']:+.1f} mmol/L (above +6): a concurrent metabolic alkalosis.",
                )
        elif band == "normal_anion_gap_acidosis":
            w.acidosis_type = "normal_anion_gap"
        elif band == "high_and_normal_anion_gap_acidosis":
            w.acidosis_type = "high_and_normal_anion_gap"
        else:
            w.acidosis_type = "high_anion_gap"
            if band == "high_anion_gap_acidosis_with_raised_hco3" and MET_ALK not in w.codes():
                w.add(MET_ALK)
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
    if resp_primary and g.get("dr", 0.0) > 2.0 and MET_ALK not in w.codes():
        dr_text += (
            f" (above 2, but the HCO3 before the anion-gap acid, {before:.1f} mmol/L, is within what the "
            f"{NAMES[w.primary]} explains)"
        )
    r.finding("anion_gap_reading", "info", f"Anion gap {used:.1f} mmol/L{dr_text}: {words[w.acidosis_type]}.")


# -- Copenhagen and Stewart ----------------------------------------------------------------------------------


def _copenhagen(w: _Work) -> None:
    s, r = w.s, w.r
    sbe = w.sbe
    cph: dict = {"sbe": sbe}
    if not -40.0 <= sbe <= 40.0:
        w.copenhagen = cph
        return
    if w.primary == MET_ACID:
        x = ab.expected_pco2_sbe_metabolic_acidosis(sbe_mmol_l=sbe)
        cph["pco2"], cph["fits"] = x, abs(s.pco2 - x) <= 2.0
        r.pressure("expected_pco2_copenhagen", x)
        r.step(
            "Expected PaCO2 by the SBE rule (metabolic acidosis)",
            "PaCO2 = 40 + SBE",
            x,
            ("schlichtig1998", "berend2018"),
            output="expected_pco2_copenhagen",
            pressure=True,
        )
    elif w.primary == MET_ALK:
        x = ab.expected_pco2_sbe_metabolic_alkalosis(sbe_mmol_l=sbe)
        cph["pco2"], cph["fits"] = x, abs(s.pco2 - x) <= 5.0
        r.pressure("expected_pco2_copenhagen", x)
        r.step(
            "Expected PaCO2 by the SBE rule (metabolic alkalosis)",
            "PaCO2 = 40 + 0.6 x SBE",
            x,
            ("schlichtig1998", "berend2018"),
            output="expected_pco2_copenhagen",
            pressure=True,
        )
    lo = hi = 0.0
    if w.resp is not None:
        acute, chronic = ab.expected_sbe_respiratory(paco2_mmhg=s.pco2)
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
        lo, hi = min(acute, chronic), max(acute, chronic)
        cph["acute"], cph["chronic"] = acute, chronic
        near_a, near_c = abs(sbe - acute) <= SBE_TOLERANCE, abs(sbe - chronic) <= SBE_TOLERANCE
        if lo - SBE_TOLERANCE <= sbe <= hi + SBE_TOLERANCE and w.resp["judge"]:
            cph["chronicity"] = (
                None
                if near_a and near_c
                else "acute"
                if near_a
                else "chronic"
                if near_c
                else "acute_on_chronic"
            )
    cph["acid"] = sbe < lo - SBE_TOLERANCE
    cph["alk"] = sbe > hi + SBE_TOLERANCE
    w.copenhagen = cph


def _stewart(w: _Work) -> None:
    s, r = w.s, w.r
    st: dict = {}
    w.stewart = st
    if s.na is None or s.cl is None:
        return
    mq = "mEq/L"
    sbe_ok = -40.0 <= w.sbe <= 40.0
    if s.albumin is not None and sbe_ok:
        alb_g_l = s.albumin * 10.0
        lactate = s.lactate if s.lactate is not None else 0.0
        p16 = ab.base_excess_partition_story2016(
            sbe_mmol_l=w.sbe, na_mmol_l=s.na, cl_mmol_l=s.cl, albumin_g_l=alb_g_l, lactate_mmol_l=lactate
        )
        p04 = ab.base_excess_partition_story2004(
            sbe_mmol_l=w.sbe, na_mmol_l=s.na, cl_mmol_l=s.cl, albumin_g_l=alb_g_l
        )
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
        effects = {"na_cl": p16.na_cl, "albumin": p16.albumin, "unmeasured": p16.unmeasured}
        if s.lactate is not None:
            effects["lactate"] = p16.lactate
    else:
        na_cl = s.na - s.cl - 35.0
        r.quantity("na_cl_effect", na_cl, mq, decimals=1)
        r.step(
            "Na-Cl effect (Story 2016; albumin not given, so no full partition)",
            "Na - Cl - 35",
            na_cl,
            "story2016",
            output="na_cl_effect",
            unit=mq,
        )
        effects = {"na_cl": na_cl}
        if s.lactate is not None:
            effects["lactate"] = -s.lactate
            r.quantity("lactate_effect", -s.lactate, mq, decimals=1)
            r.step(
                "Lactate effect (Story 2016)",
                "- lactate",
                -s.lactate,
                "story2016",
                output="lactate_effect",
                unit=mq,
            )
    st["effects"] = effects
    st["full"] = s.albumin is not None and sbe_ok
    if s.k is not None and s.albumin is not None:
        assumed = []
        ca = s.ca_ionised if s.ca_ionised is not None else TYPICAL_CA_IONISED
        mg = s.mg if s.mg is not None else TYPICAL_MG
        phos = s.phosphate if s.phosphate is not None else TYPICAL_PHOSPHATE
        lactate = s.lactate if s.lactate is not None else 0.0
        for name, given, value in (
            ("ionised calcium", s.ca_ionised, ca),
            ("magnesium", s.mg, mg),
            ("phosphate", s.phosphate, phos),
        ):
            if given is None:
                assumed.append(f"{name} {value:g} mmol/L")
        alb_g_l = s.albumin * 10.0
        sida = ab.strong_ion_difference_apparent(
            na_mmol_l=s.na,
            k_mmol_l=s.k,
            ca_ionised_mmol_l=ca,
            mg_mmol_l=mg,
            cl_mmol_l=s.cl,
            lactate_mmol_l=lactate,
        )
        alb_q = ab.albumin_charge_figge(albumin_g_l=alb_g_l, ph=s.ph)
        phos_q = ab.phosphate_charge_figge(phosphate_mmol_l=phos, ph=s.ph)
        side = ab.strong_ion_difference_effective(
            hco3_mmol_l=w.hco3_out, albumin_g_l=alb_g_l, phosphate_mmol_l=phos, ph=s.ph
        )
        sig = ab.strong_ion_gap(sid_apparent_meq_l=sida, sid_effective_meq_l=side)
        sources = ("stewart1983", "figge1992", "kellum1995")
        for name, value, formula, src in (
            ("sid_apparent", sida, "Na + K + 2 x Ca(ionised) + 2 x Mg - Cl - lactate", sources),
            ("albumin_charge", alb_q, "albumin g/L x (0.123 x pH - 0.631)", "figge1992"),
            ("phosphate_charge", phos_q, "phosphate mmol/L x (0.309 x pH - 0.469)", "figge1992"),
            ("sid_effective", side, "HCO3 + albumin charge + phosphate charge", sources),
            ("strong_ion_gap", sig, "SIG = SIDa - SIDe", ("kellum1995", "figge1992")),
        ):
            r.quantity(name, value, mq, decimals=1)
            r.step(name.replace("_", " ").replace("sid", "SID"), formula, value, src, output=name, unit=mq)
        if s.lactate is None:
            assumed.append("lactate not given (any lactate is counted in the SIG)")
        if assumed:
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
        st["sig"] = sig
        if sig > 4.0:
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
    r = w.r
    codes = w.codes()
    boston = (MET_ACID in codes, MET_ALK in codes)
    cph = w.copenhagen
    if "acid" not in cph:
        return

    def words(acid: bool, alk: bool) -> str:
        if acid and alk:
            return "a metabolic acidosis and a metabolic alkalosis"
        return "a metabolic acidosis" if acid else "a metabolic alkalosis" if alk else "no metabolic disorder"

    parts = [f"Physiological (HCO3) reading: {words(*boston)}."]
    cph_pair = (cph["acid"], cph["alk"])
    beyond = " beyond what the respiratory disorder explains" if w.resp is not None and any(cph_pair) else ""
    resp_note = ""
    resp_differs = False
    if "pco2" in cph:
        rule = "SBE" if w.primary == MET_ACID else "0.6 x SBE"
        resp_note = f"; PaCO2 {'fits' if cph['fits'] else 'does not fit'} 40 + {rule} = {w.p(cph['pco2'])}"
        boston_resp = RESP_ACID in codes or RESP_ALK in codes
        resp_differs = boston_resp == cph["fits"]
    parts.append(
        f"Base-excess (Copenhagen) reading: SBE {cph['sbe']:+.1f} mmol/L, "
        f"{words(*cph_pair)}{beyond}{resp_note}."
    )
    if resp_differs:
        parts.append(
            "The two readings differ on the respiratory response: "
            + (
                "Winters' formula finds it appropriate while the SBE rule does not."
                if cph["fits"] is False
                else "the SBE rule finds it appropriate while the HCO3 rule does not."
            )
        )
    st = w.stewart.get("effects")
    stewart_pair = None
    if st:
        acidifying = [k for k, v in st.items() if v <= -STEWART_EFFECT]
        alkalinising = [k for k, v in st.items() if v >= STEWART_EFFECT]
        shown = ", ".join(f"{k.replace('_', '-')} {v:+.1f}" for k, v in st.items())
        named = [_EFFECT_WORDS[k][0] for k in acidifying] + [_EFFECT_WORDS[k][1] for k in alkalinising]
        text = f"Physicochemical (Stewart) reading: effects {shown} mEq/L" + (
            f", showing {', '.join(named)}" if named else ", none of them large"
        )
        if w.stewart.get("full"):
            stewart_pair = (bool(acidifying), bool(alkalinising))
            text += "."
        else:
            text += (
                " (albumin not given, so the unmeasured-ion effect is unknown and this reading is partial)."
            )
        parts.append(text)
        if RESP_ACID in codes and "na_cl" in alkalinising:
            parts.append(
                "With a respiratory acidosis, a low chloride (a raised Na-Cl effect) is also how renal "
                "compensation appears in Stewart terms."
            )
    agree_bc = boston == cph_pair
    agree_all = agree_bc and not resp_differs and (stewart_pair is None or stewart_pair == boston)
    if agree_all:
        parts.append("The readings agree.")
        r.finding("approaches_agree", "info", " ".join(parts))
    else:
        if boston[0] and boston[1] and not any(cph_pair):
            parts.append(
                "Opposing metabolic processes cancel in the SBE, which measures only their net effect."
            )
        if stewart_pair is not None and stewart_pair != boston:
            parts.append(
                "Stewart splits the net change into separate effects, some of which offset each other."
            )
        parts.append(
            "Each approach measures the metabolic component its own way; none is taken as the reference here."
        )
        r.finding("approaches_disagree", "info" if agree_bc else "notable", " ".join(parts))
    # the chronic respiratory rules (Boston 3.5 per 10 against Copenhagen 0.4 x dPaCO2)
    if w.resp is not None and "chronicity" in cph:
        boston_ch = w.disorders[0]["chronicity"]
        if boston_ch is not None and cph["chronicity"] is not None and boston_ch != cph["chronicity"]:
            r.finding(
                "boston_copenhagen_chronicity",
                "info",
                f"The HCO3 rules read {boston_ch.replace('_', '-')}, the SBE rules "
                f"{cph['chronicity'].replace('_', '-')} (SBE {cph['sbe']:+.1f}; acute 0, chronic "
                f"{cph['chronic']:+.1f} +/- 3 mmol/L). The chronic SBE rule corresponds to a steeper HCO3 "
                "rise than 3.5 per 10 mmHg, so the two rules differ most for chronic hypercapnia.",
            )


# -- ventilation safety --------------------------------------------------------------------------------------


def _ventilation(w: _Work) -> None:
    s, r = w.s, w.r
    codes = w.codes()
    p = s.pco2
    resp_acid = RESP_ACID in codes
    if resp_acid or s.baseline_pco2 is not None:
        _pco2_target(w, resp_acid)
    # NIV thresholds (BTS/ICS 2016)
    meets = s.ph < NIV_PH and p > NIV_PCO2_MMHG
    if meets and s.site == "venous":
        w.niv = "not_assessable"
        r.finding(
            "niv_criteria_need_arterial_sample",
            "notable",
            f"This venous sample shows pH {s.ph:.2f} with PCO2 {w.p(p)}. The BTS/ICS 2016 NIV thresholds "
            "(pH < 7.35 and PaCO2 > 6.5 kPa) are defined on arterial (or arterialised capillary) values: "
            "confirm with one.",
        )
    elif meets:
        w.niv = "met"
        notes = []
        if s.ph < NIV_INVASIVE_PH:
            notes.append(
                f"The guideline treats pH below {NIV_INVASIVE_PH:.2f} as a level at which invasive "
                "ventilation should be considered."
            )
        first = w.disorders[0] if w.disorders else None
        chronic = bool(
            first
            and first["code"] == RESP_ACID
            and first["chronicity"] == "chronic"
            and first["fraction_acute"] is not None
        )
        if chronic:
            notes.append(
                "The HCO3 here fits chronic, compensated hypercapnia, while the guideline addresses acute "
                "(or acute-on-chronic) hypercapnic respiratory failure."
            )
        if first and first["code"] in (MET_ACID, MET_ALK):
            notes.append("Here the acidaemia is mainly metabolic.")
        kpa = "" if w.r.pressure_unit == "kPa" else f" ({units.convert(p, 'mmHg', 'kPa'):.2f} kPa)"
        r.finding(
            "niv_criteria_met",
            "notable" if chronic else "urgent",
            f"pH {s.ph:.2f} with PaCO2 {w.p(p)}{kpa} is below 7.35 and above 6.5 kPa: the thresholds at "
            "which the BTS/ICS 2016 guideline recommends considering acute NIV for hypercapnic respiratory "
            "failure that persists after optimal medical treatment. "
            + " ".join(notes)
            + (" " if notes else "")
            + "This is a threshold for the treating team to weigh, not an instruction.",
        )
    else:
        w.niv = "not_met"
    r.put("niv_criteria", w.niv)
    # consciousness
    retainer = False
    if s.baseline_pco2 is not None:
        threshold = max(NARCOSIS_NORMAL_MMHG, s.baseline_pco2 + NARCOSIS_RISE_MMHG)
        formula = "max(75 mmHg, baseline PaCO2 + 35 mmHg)"
        retainer = s.baseline_pco2 > PCO2_HIGH
    else:
        first = w.disorders[0] if w.disorders else None
        # chronic retention = the HCO3 rules read chronic or acute-on-chronic and no metabolic acidosis is
        # named (a metabolic acidosis would hide retention). Reading it from the HCO3 alone keeps the
        # threshold non-increasing as PaCO2 rises at a fixed HCO3.
        f_h = w.resp.get("f_h") if w.resp is not None else None
        retainer = bool(
            first
            and first["code"] == RESP_ACID
            and f_h is not None
            and f_h < ab.ACUTE_AT_LEAST
            and MET_ACID not in w.codes()
        )
        threshold = NARCOSIS_CHRONIC_MMHG if retainer else NARCOSIS_NORMAL_MMHG
        formula = (
            "about 90 mmHg in chronic retainers (chronic compensation seen in the HCO3)"
            if retainer
            else "about 75 mmHg in previously normal people (no chronic retention evident)"
        )
    r.pressure("pco2_consciousness_threshold", threshold)
    r.step(
        "PaCO2 above which consciousness commonly falls",
        formula,
        threshold,
        "co2_narcosis",
        output="pco2_consciousness_threshold",
        pressure=True,
    )
    if p > threshold:
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


def _pco2_target(w: _Work, resp_acid: bool) -> None:
    s, r = w.s, w.r
    p, h = s.pco2, w.hco3
    codes = w.codes()
    metabolic = MET_ACID in codes or MET_ALK in codes
    floor = None
    if resp_acid:
        f = ab.pco2_for_ph_acute(ph_target=FLOOR_PH, paco2_mmhg=p, hco3_mmol_l=h)
        if f is not None and 8.0 <= f < p:
            floor = f
            r.pressure("pco2_alkalaemia_floor", f)
            r.step(
                "PaCO2 at which a quick fall would bring the pH to 7.45 (present HCO3, acute rule)",
                "P = (HCO3 - 0.1 x PaCO2) / (0.0307 x 10^(7.45 - 6.1) - 0.1)",
                f,
                ("henderson1908", "narins1980", "posthypercapnic_alkalosis"),
                output="pco2_alkalaemia_floor",
                pressure=True,
            )
    reason = ""
    if s.baseline_pco2 is not None:
        source = "given"
        b = s.baseline_pco2
        if b > PCO2_HIGH:
            target, basis = b, "chronic_baseline"
            reason = (
                f"the patient's known usual PaCO2 ({w.p(b)}). Ventilating below it leaves the kidneys' "
                "retained HCO3 unopposed: post-hypercapnic metabolic alkalosis."
            )
        else:
            target, basis = PCO2_HIGH, "normal_upper_limit"
            reason = "the upper limit of normal, because the known usual PaCO2 is normal."
        formula = "target = known baseline PaCO2 if above 45 mmHg, else 45 mmHg"
        src = ("posthypercapnic_alkalosis", "acid_base_normal_ranges")
    elif w.primary in (MET_ACID, MET_ALK) and w.met_expected is not None:
        source, basis = "estimated", "metabolic_compensation"
        target = w.met_expected.value
        rule = "Winters' formula" if w.primary == MET_ACID else "the metabolic alkalosis rule"
        reason = (
            f"the PaCO2 that compensation for the {NAMES[w.primary]} would give ({rule}); aiming for a "
            "'normal' PaCO2 would "
            + ("deepen the acidaemia." if w.primary == MET_ACID else "worsen the alkalaemia.")
        )
        formula = "target = centre of the expected compensating PaCO2"
        src = ("albert1967",) if w.primary == MET_ACID else ("berend2014",)
    else:
        source = "estimated"
        est = ab.baseline_pco2_from_hco3(paco2_mmhg=max(p, 41.0), hco3_mmol_l=h)
        lo = ab.baseline_pco2_from_hco3(paco2_mmhg=max(p, 41.0), hco3_mmol_l=h, chronic_mmol_per_10_mmhg=5.0)
        hi = ab.baseline_pco2_from_hco3(paco2_mmhg=max(p, 41.0), hco3_mmol_l=h, chronic_mmol_per_10_mmhg=3.0)
        r.pressure("baseline_pco2_estimated", est)
        r.step(
            "Usual (chronic) PaCO2 estimated from the HCO3 (an estimate)",
            "B = 40 + (HCO3 - 24 - (PaCO2 - 40)/10) / 0.25, limited to 40..PaCO2 (chronic 3.5 and acute 1 "
            "per 10 mmHg inverted)",
            est,
            ("narins1980", "fraction_acute_bands"),
            output="baseline_pco2_estimated",
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
        if metabolic:
            target = max(PCO2_HIGH, floor or 0.0)
            basis = "alkalaemia_floor"
            reason = (
                "the higher of 45 mmHg and the PaCO2 at which the present HCO3 would make the blood "
                "alkalaemic: a concurrent metabolic disorder moves the HCO3, so the usual PaCO2 cannot be "
                "estimated from it."
            )
            formula = "target = max(45 mmHg, alkalaemia floor)"
            r.finding(
                "baseline_estimate_unreliable",
                "notable",
                f"The usual PaCO2 estimated from the HCO3 ({w.p(est)}) is unreliable here: a concurrent "
                "metabolic acidosis makes such an estimate too low (risking over-correction), a metabolic "
                "alkalosis too high. A known usual PaCO2 (an earlier stable gas) should be used where "
                "there is one.",
            )
        elif est > PCO2_HIGH:
            target, basis = est, "chronic_baseline"
            reason = (
                f"the usual PaCO2 estimated from the HCO3 ({w.p(est)}; {w.p(lo)} to {w.p(hi)} across the "
                "published chronic slopes). The HCO3 shows chronic CO2 retention: ventilating below the "
                "usual level leaves the retained HCO3 unopposed, causing post-hypercapnic metabolic "
                "alkalosis."
            )
            formula = "target = estimated usual PaCO2"
        else:
            target, basis = PCO2_HIGH, "normal_upper_limit"
            reason = (
                "the upper limit of normal: the HCO3 shows no chronic CO2 retention (estimated usual PaCO2 "
                f"{w.p(est)})."
            )
            formula = "target = 45 mmHg (no chronic retention evident)"
        src = ("posthypercapnic_alkalosis", "narins1980")
    w.pco2_target, w.target_basis = target, basis
    r.pressure("pco2_target", target)
    r.step("Safe PaCO2 target for ventilation", formula, target, src, output="pco2_target", pressure=True)
    r.put("baseline_pco2_source", source)
    r.put("pco2_target_basis", basis)
    label = "estimated" if source == "estimated" and basis != "metabolic_compensation" else ""
    r.finding(
        "pco2_target",
        "notable",
        f"PaCO2 target {w.p(target)}{' (' + label + ')' if label else ''}: "
        + reason
        + " A target for the treating team to weigh, reached gradually and rechecked with a repeat gas.",
    )
    if floor is not None and target < floor - 0.5:
        r.finding(
            "target_below_alkalaemia_floor",
            "notable",
            f"Lowering PaCO2 quickly to {w.p(target)} would, with the present HCO3 ({h:.1f} mmol/L), bring "
            f"the pH above 7.45 (that happens below about {w.p(floor)}); the HCO3 falls only over days.",
        )
    if s.baseline_pco2 is not None and p < s.baseline_pco2 - 5.0 and s.baseline_pco2 > PCO2_HIGH:
        r.finding(
            "pco2_below_baseline",
            "notable",
            f"PaCO2 {w.p(p)} is below the patient's usual {w.p(s.baseline_pco2)}"
            + (
                f" and HCO3 is {h:.1f} mmol/L: this fits a post-hypercapnic metabolic alkalosis "
                "(over-correction of chronic hypercapnia)."
                if h > HCO3_HIGH
                else "."
            ),
        )


# -- oxygenation ---------------------------------------------------------------------------------------------


def _pf_ratio(pao2_mmhg: float, fio2: float) -> float:
    """PaO2 / FiO2 [mmHg] (private helper; the oxygenation module's own version is not relied on here)."""
    return pao2_mmhg / fio2


def _a_over_A(pao2_mmhg: float, alveolar_mmhg: float) -> float | None:
    """a/A ratio (private helper); None when the alveolar PO2 is not positive."""
    return pao2_mmhg / alveolar_mmhg if alveolar_mmhg > 0 else None


def _oxygenation(w: _Work) -> None:
    s, r = w.s, w.r
    if s.po2 is None:
        return
    if s.site == "venous":
        r.finding(
            "venous_po2_not_interpreted",
            "notable",
            "A venous PO2 says nothing about arterial oxygenation: no alveolar gas, A-a gradient or "
            "respiratory failure type is computed from it. Use SpO2 or an arterial sample.",
        )
        return
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
    pio2 = s.fio2 * (pb - oxygenation.PH2O_37_MMHG)
    r.pressure("pio2", pio2)
    r.step("Inspired PO2", "PIO2 = FiO2 x (PB - 47)", pio2, "alveolar_gas_1946", output="pio2", pressure=True)
    pao2_a = oxygenation.alveolar_po2_simple(fio2_fraction=s.fio2, paco2_mmhg=s.pco2, pb_mmhg=pb, rq=s.rq)
    pao2_full = oxygenation.alveolar_po2_full(fio2_fraction=s.fio2, paco2_mmhg=s.pco2, pb_mmhg=pb, rq=s.rq)
    r.pressure("pao2_alveolar", pao2_a)
    r.step(
        f"Alveolar PO2 (simplified equation, R {s.rq:g})",
        "PAO2 = FiO2 x (PB - 47) - PaCO2 / R",
        pao2_a,
        "alveolar_gas_1946",
        output="pao2_alveolar",
        pressure=True,
    )
    r.pressure("pao2_alveolar_full", pao2_full)
    r.step(
        "Alveolar PO2 (full equation)",
        "PAO2 = PIO2 - PaCO2 x (FiO2 + (1 - FiO2) / R)",
        pao2_full,
        "alveolar_gas_1946",
        output="pao2_alveolar_full",
        pressure=True,
    )
    aa = pao2_a - s.po2
    r.pressure("a_a_gradient", aa)
    r.step("A-a gradient", "A-a = PAO2 - PaO2", aa, "alveolar_gas_1946", output="a_a_gradient", pressure=True)
    ratio = _a_over_A(s.po2, pao2_a)
    if ratio is not None:
        r.put("a_over_A", ratio, decimals=2)
        r.step("a/A ratio", "PaO2 / PAO2 (normal above 0.75)", ratio, "gilbert1974", output="a_over_A")
    pf = _pf_ratio(s.po2, s.fio2)
    r.quantity("pf_ratio", pf, "mmHg", decimals=0)
    r.step("P/F ratio", "PaO2 [mmHg] / FiO2", pf, "berlin2012", output="pf_ratio", unit="mmHg")
    if aa < -10.0:
        r.finding(
            "po2_above_alveolar",
            "notable",
            f"PO2 {w.p(s.po2)} is above the alveolar PO2 computed for FiO2 {s.fio2:.2f} ({w.p(pao2_a)}): "
            "check the FiO2, the barometric pressure and the unit of PO2.",
        )
    # age-expected upper limit and category
    if s.age is not None:
        upper = oxygenation.aa_gradient_upper_by_age(age_years=s.age)
        r.pressure("a_a_expected_upper", upper)
        r.step(
            "Upper limit of the A-a gradient for age (breathing air)",
            "age / 4 + 4 mmHg",
            upper,
            "aa_age_rule",
            output="a_a_expected_upper",
            pressure=True,
        )
        category = "raised" if aa > upper else "normal"
    else:
        adult_low = oxygenation.aa_gradient_upper_by_age(age_years=18.0)
        adult_high = oxygenation.aa_gradient_upper_by_age(age_years=100.0)
        category = "normal" if aa <= adult_low else ("raised" if aa > adult_high else "needs_age")
    r.put("a_a_category", category)
    if s.fio2 > 0.3:
        r.finding(
            "a_a_on_oxygen",
            "info",
            "The age rule for the A-a gradient applies breathing air; on supplemental oxygen the normal "
            "gradient is wider, so a 'raised' reading is less specific.",
        )
    # respiratory failure
    hyper = s.pco2 > PCO2_HIGH
    if hyper and (s.po2 < HYPOXAEMIA_MMHG or s.fio2 > 0.21):
        failure = "type_2"
    elif s.po2 < HYPOXAEMIA_MMHG:
        failure = "type_1"
    else:
        failure = "none"
    r.put("respiratory_failure", failure)
    if failure == "type_2" and s.po2 >= HYPOXAEMIA_MMHG:
        r.finding(
            "hypoxaemia_masked_by_oxygen",
            "notable",
            f"PaO2 {w.p(s.po2)} is not low, but on FiO2 {s.fio2:.2f} with PaCO2 {w.p(s.pco2)} this is "
            "hypercapnic (type 2) respiratory failure: supplemental oxygen masks the hypoxaemia.",
        )
    elif failure != "none":
        r.finding(
            f"respiratory_failure_{failure}",
            "notable",
            f"PaO2 {w.p(s.po2)} is below 8 kPa (60 mmHg) with PaCO2 {w.p(s.pco2)}: "
            + (
                "type 2 (hypercapnic) respiratory failure."
                if failure == "type_2"
                else "type 1 (hypoxaemic) respiratory failure."
            ),
        )
    reading = None
    if hyper and category == "normal":
        reading = "pure_hypoventilation"
        r.finding(
            "pure_hypoventilation",
            "notable",
            f"Hypercapnia with a normal A-a gradient ({w.p(aa)}): the raised PaCO2 comes from "
            "hypoventilation alone (reduced drive, neuromuscular weakness or a chest-wall problem), not "
            "from lung disease.",
        )
    elif hyper and category == "raised":
        reading = "lung_disease_and_hypoventilation"
        r.finding(
            "gas_exchange_impaired",
            "notable",
            f"Hypercapnia with a raised A-a gradient ({w.p(aa)}): lung disease (V/Q mismatch, shunt or dead "
            "space) as well as hypoventilation.",
        )
    elif not hyper and category == "normal" and s.po2 < HYPOXAEMIA_MMHG:
        r.finding(
            "low_inspired_oxygen",
            "notable",
            "Hypoxaemia with a normal A-a gradient and no hypercapnia points to a low inspired PO2 "
            "(altitude, low FiO2).",
        )
    elif category == "needs_age" and hyper:
        r.finding(
            "a_a_needs_age",
            "info",
            "Give the age to judge the A-a gradient: it separates pure hypoventilation from lung disease.",
        )
    if s.site == "capillary":
        r.finding(
            "capillary_po2",
            "notable",
            "Capillary PO2 underestimates arterial PO2: the A-a gradient is overestimated and hypoxaemia "
            "may be overcalled here.",
        )
    w.oxygen = {"category": category, "failure": failure, "reading": reading, "aa": aa}


# -- temperature ---------------------------------------------------------------------------------------------


def _temperature(w: _Work) -> None:
    s, r = w.s, w.r
    t = s.temperature
    if t is None or abs(t - 37.0) < 1e-9:
        return
    ph_t = temperature.ph_at_temperature_rosenthal(ph=s.ph, temperature_c=t)
    pco2_t = temperature.pco2_at_temperature(pco2_mmhg=s.pco2, temperature_c=t)
    r.put("ph_at_temperature", ph_t, decimals=2)
    r.step(
        f"pH at {t:.1f} degC (Rosenthal)",
        "pH_T = pH37 + (T - 37) x (-0.0147 + 0.0065 x (7.40 - pH37))",
        ph_t,
        "rosenthal1948",
        output="ph_at_temperature",
    )
    r.pressure("pco2_at_temperature", pco2_t)
    r.step(
        f"PCO2 at {t:.1f} degC",
        "PCO2_T = PCO2_37 x 10^(0.019 x (T - 37))",
        pco2_t,
        "bradley1956",
        output="pco2_at_temperature",
        pressure=True,
    )
    po2_t = None
    if s.po2 is not None:
        po2_t = temperature.po2_at_temperature_severinghaus(po2_mmhg=s.po2, temperature_c=t)
        r.pressure("po2_at_temperature", po2_t)
        r.step(
            f"PO2 at {t:.1f} degC (Severinghaus 1979 eq 3, single step)",
            "PO2_T = PO2_37 x exp((T - 37) x (0.058 / (0.243 x (PO2/100)^3.88 + 1) + 0.013))",
            po2_t,
            "severinghaus1979",
            output="po2_at_temperature",
            pressure=True,
        )
    ph_ok = PH_LOW <= ph_t <= PH_HIGH
    pco2_ok = PCO2_LOW <= pco2_t <= PCO2_HIGH
    near = ph_ok and pco2_ok
    text = (
        f"The analyser measured at 37 degC; the patient is at {t:.1f} degC. Alpha-stat (used for this "
        "interpretation) reads the 37 degC values. The pH-stat view reads the corrected values: pH "
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


def _spo2_target(w: _Work) -> None:
    s, r = w.s, w.r
    hyper_here = s.site != "venous" and s.pco2 > PCO2_HIGH
    at_risk = s.hypercapnia_risk or hyper_here
    low, high = (88, 92) if at_risk else (94, 98)
    w.spo2_target = (low, high)
    r.put("spo2_target", {"low": low, "high": high}, decimals=0)
    why = (
        "at risk of hypercapnic respiratory failure"
        if s.hypercapnia_risk
        else "hypercapnic on this sample"
        if hyper_here
        else "not marked at risk of hypercapnic failure"
    )
    r.step(
        f"SpO2 target range {low}-{high} % ({why})",
        "88-92 % when at risk of hypercapnic respiratory failure (or hypercapnic on an arterial or "
        "capillary sample), else 94-98 %",
        low,
        "bts2017_o2",
        output="spo2_target",
    )
    r.finding(
        "spo2_target",
        "info",
        f"SpO2 target {low}-{high} % ({why}; BTS 2017). Use the patient's own prescribed range where one "
        "exists.",
    )
    if hyper_here and not s.hypercapnia_risk:
        r.finding(
            "hypercapnic_without_risk_flag",
            "notable",
            f"PaCO2 {w.p(s.pco2)} is raised although hypercapnia_risk was not set: the lower 88-92 % range "
            "of the BTS 2017 guideline is shown.",
        )
    if s.hypercapnia_risk and s.site != "venous" and s.pco2 <= PCO2_HIGH:
        r.finding(
            "risk_flag_with_normal_pco2",
            "info",
            "PaCO2 is normal on this sample: the guideline allows 94-98 % when PaCO2 is normal and there is "
            "no history of NIV or invasive ventilation for hypercapnic failure; the 88-92 % range is kept "
            "because hypercapnia_risk was set.",
        )
    if s.spo2 is not None:
        if s.spo2 < low:
            r.finding(
                "spo2_below_target", "notable", f"SpO2 {s.spo2:g} % is below the {low}-{high} % target."
            )
        elif s.spo2 > high:
            r.finding(
                "spo2_above_target",
                "notable" if at_risk else "info",
                f"SpO2 {s.spo2:g} % is above the {low}-{high} % target"
                + (
                    ": in patients at risk of hypercapnic failure excess oxygen can raise the PaCO2."
                    if at_risk
                    else "."
                ),
            )


def _severity(w: _Work) -> None:
    s, r = w.s, w.r
    if s.ph < SEVERE_ACIDAEMIA_PH:
        r.finding(
            "severe_acidaemia",
            "urgent",
            f"pH {s.ph:.2f} is below {SEVERE_ACIDAEMIA_PH:.2f}: severe acidaemia.",
        )
    elif s.ph > SEVERE_ALKALAEMIA_PH:
        r.finding(
            "severe_alkalaemia",
            "urgent",
            f"pH {s.ph:.2f} is above {SEVERE_ALKALAEMIA_PH:.2f}: severe alkalaemia.",
        )
    if w.ph_status == "normal" and len(w.disorders) == 1:
        d = w.disorders[0]
        if not (d["code"] == RESP_ALK and d["chronicity"] == "chronic"):
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


def _interpretation(w: _Work) -> str:
    ds = w.disorders
    if not ds:
        if w.ph_status == "normal":
            core = "no acid-base disorder: pH, PCO2 and HCO3 are within their reference ranges"
        else:
            core = f"{w.ph_status} without a disorder that the rules can name"
        text = core
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
            elif ds[0]["chronicity"] == "chronic":
                text += ", compensated as expected"
    ox = w.oxygen.get("reading")
    if ox == "pure_hypoventilation":
        text += "; normal A-a gradient: pure hypoventilation"
    elif ox == "lung_disease_and_hypoventilation":
        text += "; raised A-a gradient: lung disease as well as hypoventilation"
    if w.temp:
        text = (
            f"at 37 degC (alpha-stat): {text}; corrected to {w.temp['t']:.1f} degC (pH-stat) the values are "
            + ("near normal" if w.temp["near_normal"] else "still abnormal")
        )
    if w.tentative:
        text += " (tentative: borderline values)"
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
            from_baseline = w.resp is not None and w.resp["f_b"] is not None
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
        w.r.finding(
            "venous_sample",
            "notable",
            "Venous sample: the rules were derived on arterial blood; a raised venous PCO2 screens for, but "
            "does not measure, arterial hypercapnia.",
        )
    elif s.site == "capillary":
        r.caution(
            "Capillary sample: arterialised capillary pH and PCO2 approximate arterial values when the site "
            "is well perfused; capillary PO2 underestimates arterial PO2."
        )
        w.r.finding(
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


def _summary(w: _Work) -> None:
    s, r = w.s, w.r
    hco3_note = (
        "reported, consistent"
        if w.consistent
        else "reported, INCONSISTENT with pH and PCO2"
        if w.consistent is False
        else "computed"
    )
    temp = f" at 37 degC, patient {s.temperature:.1f} degC" if w.temp else ""
    r.say(
        f"{s.site.capitalize()} blood gas{temp}: pH {s.ph:.2f}, PCO2 {w.p(s.pco2)}, HCO3 {w.hco3_out:.1f} "
        f"mmol/L ({hco3_note}), SBE {w.sbe:+.1f} mmol/L."
    )
    r.say(w.interpretation)
    if w.resp is not None:
        e = w.resp["e"]
        d = w.disorders[0]
        line = (
            f"Expected HCO3 for this PCO2: {e.acute.value:.1f} if acute, {e.chronic.value:.1f} if chronic "
            f"(published slopes {e.chronic.low:.1f}-{e.chronic.high:.1f}); measured {w.hco3:.1f}"
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
    if w.oxygen:
        o = w.oxygen
        r.say(
            f"PaO2 {w.p(s.po2)} on FiO2 {s.fio2:.2f}: A-a gradient {w.p(o['aa'])} "
            f"({o['category'].replace('_', ' ')}); respiratory failure: {o['failure'].replace('_', ' ')}."
        )
    if w.pco2_target is not None:
        r.say(f"PaCO2 target {w.p(w.pco2_target)} ({w.target_basis.replace('_', ' ')}).")
    low, high = w.spo2_target
    r.say(f"SpO2 target {low}-{high} % (BTS 2017).")
    urgent = [f["text"] for f in r.findings if f["severity"] == "urgent"]
    for text in urgent:
        r.say(text)
    r.say("Decision support only; interpret with the clinical picture and local protocols.")
