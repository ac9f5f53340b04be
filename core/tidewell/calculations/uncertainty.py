"""The ``uncertainty`` calculation: how sure a blood-gas reading is, given the measurement error of inputs.

=====================  ===================================================================================
``uncertainty``        bridge calculation (docs/bridge.md ``uncertainty``): a blood_gas ``sample``, per-input
                       ``errors``, ``draws`` and ``seed`` -> the probability of each disorder code, each
                       chronicity and each finding, and 95 % intervals of the derived numbers
``DEFAULT_ERRORS``     the default measurement error (1 SD or CV) of each measured input, with its source
``draw_inputs``        Monte Carlo draws of one read sample: arrays for :func:`calculations.blood_gas.decide`
``simulate``           a read sample and its errors -> (the point Decision, the Decision of all draws)
=====================  ===================================================================================

Method (JCGM 101:2008, the Monte Carlo supplement to the GUM): each measured input is drawn ``draws`` times
from a normal distribution centred on the value entered, with its standard deviation (given as an SD in the
input's unit, or as a CV times the value); each draw is limited to the range the blood_gas reader accepts.
Every draw is interpreted by :func:`calculations.blood_gas.decide`, the very function the blood_gas report is
written from, so a probability here is the share of draws in which the report would say the same. The 95 %
interval of a number is the 2.5th to 97.5th percentile of its draws. The draws are seeded: the same request
gives the same answer, and each input has its own stream (adding an error for one input does not change the
draws of the others).

What the analyser derives is not drawn on its own: a reported HCO3 moves with the drawn pH and PCO2 (the
analyser computes it from them, so the reported triple stays as consistent as it was), and a reported base
excess moves with the SBE of the draw. Send an explicit error for ``hco3`` (for example a chemistry-panel
total CO2 measured separately) to draw it independently.

Only measurement error is covered, not sampling error (air bubbles, delay, venous admixture), which can be
larger; the report says so. numpy is imported here, so this module is only loaded when the calculation is
asked for (the web worker then loads numpy and asks again).
"""

from __future__ import annotations

import math

import numpy as np

from .. import units
from ..arrays import given
from ..errors import InputError, InputErrors
from ..fields import Inputs
from ..formulas import acidbase as ab
from ..report import Report
from . import blood_gas
from .blood_gas import reading

#: input key -> ("sd" or "cv", value; SD in the reader's internal unit) for the measured inputs with a
#: default (REFERENCES["analyser_imprecision"], common practice)
DEFAULT_ERRORS: dict[str, tuple[str, float]] = {
    "ph": ("sd", 0.01),
    "pco2": ("cv", 0.03),
    "po2": ("cv", 0.04),
    "na": ("sd", 1.5),
    "k": ("sd", 0.1),
    "cl": ("sd", 1.5),
    "albumin": ("cv", 0.04),
    "lactate": ("cv", 0.05),
    "glucose": ("cv", 0.03),
    "urea": ("cv", 0.04),
    "bun": ("cv", 0.04),
    "phosphate": ("cv", 0.04),
    "measured_osmolality": ("sd", 3.0),
    "hb": ("cv", 0.02),
    "spo2": ("sd", 2.0),
    "ca_ionised": ("cv", 0.02),
    "mg": ("cv", 0.04),
    "temperature": ("sd", 0.2),
}
#: measured inputs without a default error (0 unless an error is sent): the reported HCO3 and base excess
#: follow the drawn pH and PCO2; FiO2, the barometric pressure and the usual PaCO2 are taken as given
NO_DEFAULT = ("hco3", "base_excess", "fio2", "pb", "baseline_pco2")
MEASURED = tuple(f.key for f in blood_gas.FIELDS if f.key in DEFAULT_ERRORS or f.key in NO_DEFAULT)
#: blood_gas inputs that are settings or facts, not measurements: they take no error
SETTINGS = tuple(f.key for f in blood_gas.FIELDS if f.key not in MEASURED)

DEFAULT_DRAWS = 10_000
DRAWS_RANGE = (100, 100_000)
DEFAULT_SEED = 20_240_917
#: largest SD accepted, per input in its internal unit (larger is not a measurement error)
_SD_MAX = {"ph": 0.5, "fio2": 0.3, "spo2": 20.0, "temperature": 5.0}
_SD_MAX_BY_UNIT = {"mmHg": 50.0, "mmol/L": 20.0, "g/dL": 2.0, "mOsm/kg": 30.0, "degC": 5.0}
_CV_MAX = 0.5

#: derived numbers given a 95 % interval: output name -> (Decision attribute, kind, shown when)
_INTERVALS = (
    ("hco3", "hco3_out", "mmol/L"),
    ("hco3_computed", "hco3_computed", "mmol/L"),
    ("standard_base_excess", "sbe", "mmol/L"),
    ("anion_gap", "anion_gap", "mmol/L"),
    ("anion_gap_corrected", "anion_gap_corrected", "mmol/L"),
    ("delta_ratio", "delta_ratio", None),
    ("osmolar_gap", "osmolar_gap", "mOsm/kg"),
    ("strong_ion_gap", "strong_ion_gap", "mEq/L"),
    ("pao2_alveolar", "pao2_alveolar", "pressure"),
    ("a_a_gradient", "a_a_gradient", "pressure"),
    ("pf_ratio", "pf_ratio", "pressure"),
    ("fraction_acute", "fraction_acute", None),
    ("pco2_target", "pco2_target", "pressure"),
)
CHRONICITIES = ("acute", "acute_on_chronic", "chronic")
_LABELS = {f.key: f.options.get("label", f.key) for f in blood_gas.FIELDS} | {"ph": "pH"}
#: the findings that change care, named in the "how sure" summary when they are unsettled
KEY_FINDINGS = (
    "inconsistent_triple",
    "concurrent_respiratory_acidosis",
    "concurrent_respiratory_alkalosis",
    "concurrent_metabolic_acidosis",
    "concurrent_metabolic_alkalosis",
    "high_anion_gap_acidosis_found",
    "metabolic_alkalosis_from_gap",
    "lactate_raised",
    "osmolar_gap_raised",
    "strong_ion_gap_raised",
    "baseline_estimate_unreliable",
    "niv_criteria_met",
    "niv_criteria_need_arterial_sample",
    "pco2_above_consciousness_threshold",
    "hypoxaemia_masked_by_oxygen",
    "respiratory_failure_type_1",
    "respiratory_failure_type_2",
    "pure_hypoventilation",
    "gas_exchange_impaired",
    "hypercapnic_without_risk_flag",
    "spo2_below_target",
    "spo2_above_target",
    "severe_acidaemia",
    "severe_alkalaemia",
)


# -- reading -------------------------------------------------------------------------------------------------


def _internal_unit(key: str) -> str | None:
    f = next(f for f in blood_gas.FIELDS if f.key == key)
    if f.kind == "quantity":
        return f.options["unit"]
    if f.kind == "concentration":
        return "mmol/L"
    return None


def _substance(key: str) -> str | None:
    f = next(f for f in blood_gas.FIELDS if f.key == key)
    return (
        f.options.get("substance") if f.kind == "quantity" else (key if f.kind == "concentration" else None)
    )


def read_errors(raw: dict | None, problems: list[InputError]) -> dict[str, tuple[str, float, str]]:
    """The errors object -> input key -> ("sd" or "cv", value in the internal unit, "given").

    Each entry is ``{"sd": ...}`` or ``{"cv": ...}``; an SD is a quantity in any unit of the input
    (``{"value": 0.2, "unit": "kPa"}``) or, for a bare-number input (pH, FiO2, SpO2), a number; a CV is a
    fraction (0.03) or a percentage (``{"value": 3, "unit": "%"}``). A bare quantity or number is an SD.
    """
    out: dict[str, tuple[str, float, str]] = {}
    if raw is None:
        return out
    reader = Inputs(raw, prefix="inputs.errors")
    for key in raw:
        if key not in MEASURED:
            continue
        unit = _internal_unit(key)
        value = raw.get(key)
        if value is None:
            reader.read.add(key)
            continue
        if isinstance(value, dict) and ("sd" in value or "cv" in value):
            entry = Inputs(value, prefix=f"inputs.errors.{key}")
            if "sd" in value and "cv" in value and value["sd"] is not None and value["cv"] is not None:
                entry.fail("cv", value["cv"], "give either sd or cv, not both", code="inconsistent")
            sd = _read_sd(entry, "sd", key, unit)
            cv = entry.fraction("cv", low=0.0, high=_CV_MAX, label=f"CV of {key}")
            try:
                entry.finish()
            except InputErrors as exc:
                problems.extend(exc.errors)
                reader.read.add(key)
                continue
            reader.read.add(key)
            if sd is not None:
                out[key] = ("sd", sd, "given")
            elif cv is not None:
                out[key] = ("cv", cv, "given")
            else:
                problems.append(
                    InputError(
                        f"inputs.errors.{key}",
                        value,
                        "needs sd or cv",
                        'e.g. {"sd": 0.01} or {"cv": 0.03}',
                        code="missing",
                    )
                )
            continue
        # a bare quantity or number is the SD
        sd = _read_sd(reader, key, key, unit)
        if sd is not None:
            out[key] = ("sd", sd, "given")
    for key in raw:
        if key in SETTINGS:
            reader.read.add(key)
            reader.fail(
                key,
                raw[key],
                f"{key} is a setting or a fact about the patient, not a measurement: it takes no error",
                "Errors apply to: " + ", ".join(MEASURED),
                code="bad_request",
            )
    try:
        reader.finish(known=MEASURED)
    except InputErrors as exc:
        problems.extend(exc.errors)
    return out


def _read_sd(reader: Inputs, name: str, key: str, unit: str | None) -> float | None:
    label = f"SD of {key}" if name != key else f"error of {key} (an SD)"
    high = _SD_MAX.get(key, _SD_MAX_BY_UNIT.get(unit, 50.0))
    if unit is None:
        return reader.number(name, low=0.0, high=high, label=label)
    if unit == "degC":
        # an SD of temperature is a difference: converted by the size of a degree, never with the offset
        raw = reader.raw.get(name)
        if (
            isinstance(raw, dict)
            and raw.get("unit") in ("degF", "K")
            and not isinstance(raw.get("value"), bool)
        ):
            number = raw.get("value")
            if isinstance(number, (int, float)):
                factor = 5.0 / 9.0 if raw["unit"] == "degF" else 1.0
                reader.raw = dict(reader.raw, **{name: dict(raw, value=number * factor, unit="degC")})
        return reader.quantity(name, unit="degC", low=0.0, high=high, label=label)
    return reader.quantity(name, unit=unit, low=0.0, high=high, label=label, substance=_substance(key))


# -- the draws -----------------------------------------------------------------------------------------------


def sd_of(key: str, kind: str, value: float, point: float) -> float:
    """The SD in the internal unit: an SD as given, or CV x |point value|."""
    return value if kind == "sd" else value * abs(point)


def draw_inputs(sample, errors: dict[str, tuple[str, float, str]], draws: int, seed: int):
    """The values of ``draws`` draws of ``sample`` (a read blood_gas sample) for blood_gas.decide.

    Returns (values namespace of arrays, {key: SD used}). ``errors`` holds the errors to apply (defaults
    already merged): input key -> (kind, value, origin).
    """
    point = sample.values()
    v = {name: np.full(draws, getattr(point, name), dtype=float) for name in blood_gas.NUMERIC_FIELDS}
    used: dict[str, float] = {}
    attr_of = {f.key: f.attr for f in blood_gas.FIELDS}
    attr_of["urea"] = attr_of["bun"] = "urea"
    bounds = {f.key: (f.options.get("low"), f.options.get("high")) for f in blood_gas.FIELDS}
    for index, f in enumerate(blood_gas.FIELDS):
        key = f.key
        if key not in errors:
            continue
        if (key == "bun" and sample.urea_from != "bun") or (key == "urea" and sample.urea_from != "urea"):
            continue
        if key == "pb":
            name, centre = "pb_value", (point.pb_value if sample.pb is not None else math.nan)
        else:
            name = attr_of[key]
            centre = getattr(point, name)
        if not given(centre):
            continue
        kind, value, _ = errors[key]
        sd = sd_of(key, kind, value, centre)
        used[key] = sd
        if sd <= 0.0:
            continue
        rng = np.random.default_rng([seed, index])
        low, high = bounds[key]
        drawn = centre + sd * rng.standard_normal(draws)
        v[name] = np.clip(drawn, low, high) if low is not None else drawn
    ph0, pco20 = point.ph, point.pco2
    if given(point.hco3) and "hco3" not in used:
        # the analyser's HCO3 is computed from its pH and PCO2: it moves with them
        ratio = ab._hco3_hh(v["ph"], v["pco2"]) / ab._hco3_hh(ph0, pco20)
        v["hco3"] = point.hco3 * ratio
    if given(point.base_excess) and "base_excess" not in used:
        hco3_out = np.where(np.isnan(v["hco3"]), ab._hco3_hh(v["ph"], v["pco2"]), v["hco3"])
        sbe0 = ab._sbe_clsi(ph0, point.hco3 if given(point.hco3) else ab._hco3_hh(ph0, pco20))
        v["base_excess"] = point.base_excess + (ab._sbe_clsi(v["ph"], hco3_out) - sbe0)
    ns = type(point)(**v)
    ns.site = np.full(draws, point.site)
    ns.hypercapnia_risk = np.full(draws, bool(point.hypercapnia_risk))
    ns.mix_up = np.full(draws, bool(point.mix_up))
    ns.unusual = np.full(draws, bool(point.unusual))
    ns.pb_and_altitude = np.full(draws, bool(point.pb_and_altitude))
    ns.fio2_given = np.full(draws, bool(point.fio2_given))
    return ns, used


def simulate(sample, errors, draws: int, seed: int):
    """(point Decision, Decision of the draws, SDs used) for a read sample."""
    point = blood_gas.decide(sample.values())
    values, used = draw_inputs(sample, errors, draws, seed)
    with np.errstate(all="ignore"):
        cloud = blood_gas.decide(values)
    return point, cloud, used


# -- the calculation -----------------------------------------------------------------------------------------


def _mean(mask, n: int) -> float:
    return float(np.count_nonzero(np.broadcast_to(np.asarray(mask, dtype=bool), (n,)))) / n


_CHRONICITY_INDEX = {"": 0, "acute": 1, "acute_on_chronic": 2, "chronic": 3}


def _reading_key(d, n: int | None = None):
    """The reading (disorders in order, with the respiratory chronicity) as one integer per draw."""
    if n is None:
        key = _CHRONICITY_INDEX[d.chronicity] * 5**4
        for i, code in enumerate(blood_gas.DISORDER_CODES):
            key += (d.stage[code] + 1 if d.has[code] else 0) * 5**i
        return key
    chron = np.broadcast_to(np.asarray(d.chronicity), (n,))
    key = np.zeros(n, dtype=np.int64)
    for word, index in _CHRONICITY_INDEX.items():
        key += np.where(chron == word, index * 5**4, 0)
    for i, code in enumerate(blood_gas.DISORDER_CODES):
        has = np.broadcast_to(np.asarray(d.has[code], dtype=bool), (n,))
        stage = np.broadcast_to(np.asarray(d.stage[code]), (n,))
        key += np.where(has, stage + 1, 0) * 5**i
    return key


def uncertainty(inputs: Inputs, report: Report) -> None:
    """How sure is a blood-gas reading (docs/bridge.md ``uncertainty``); see the module docstring."""
    problems: list[InputError] = []
    sample_raw = inputs.mapping("sample", label="sample", required=True)
    errors_raw = inputs.mapping("errors", label="errors")
    draws_f = inputs.number(
        "draws", low=DRAWS_RANGE[0], high=DRAWS_RANGE[1], label="draws", default=float(DEFAULT_DRAWS)
    )
    seed_f = inputs.number("seed", low=0.0, high=2.0**32 - 1, label="seed", default=float(DEFAULT_SEED))
    for key, number in (("draws", draws_f), ("seed", seed_f)):
        if number is not None and number != int(number):
            inputs.fail(key, inputs.raw.get(key), f"{key} must be a whole number", code="out_of_range")
    try:
        inputs.finish()
    except InputErrors as exc:
        problems.extend(exc.errors)
    sample = None
    if sample_raw is not None:
        try:
            sample = reading._Sample(
                Inputs(sample_raw, prefix="inputs.sample"), pressure_unit=report.pressure_unit
            )
        except InputErrors as exc:
            problems.extend(exc.errors)
    given_errors = read_errors(errors_raw, problems)
    if problems:
        raise InputErrors(problems)
    draws, seed = int(draws_f), int(seed_f)
    errors = {key: (kind, value, "default") for key, (kind, value) in DEFAULT_ERRORS.items()}
    errors.update(given_errors)
    point, cloud, used = simulate(sample, errors, draws, seed)
    _report(report, sample, point, cloud, used, errors, given_errors, errors_raw, draws, seed)


def _report(report, sample, point, cloud, used, errors, given_errors, errors_raw, draws, seed) -> None:
    r, n = report, draws
    # -- probabilities --------------------------------------------------------------------------------------
    disorders = {code: _mean(cloud.has[code], n) for code in blood_gas.DISORDER_CODES}
    chron = np.broadcast_to(np.asarray(cloud.chronicity), (n,))
    chronicity = {word: _mean(chron == word, n) for word in CHRONICITIES}
    point_codes = set(blood_gas.findings(point))
    findings = {}
    for code in blood_gas.FINDING_ORDER:
        p = _mean(cloud.finding[code], n)
        if p > 0.0 or code in point_codes:
            findings[code] = p
    primary = np.broadcast_to(np.asarray(cloud.primary), (n,))
    by_primary = {code: _mean(primary == code, n) for code in blood_gas.DISORDER_CODES}
    by_primary["none"] = _mean(primary == "", n)

    def words(values, choices):
        arr = np.broadcast_to(np.asarray(values), (n,))
        return {w: _mean(arr == w, n) for w in choices if _mean(arr == w, n) > 0.0}

    probabilities = {
        "disorders": disorders,
        "chronicity": chronicity,
        "findings": findings,
        "primary": by_primary,
        "niv_criteria": words(cloud.niv, ("met", "not_met", "not_assessable", "not_applicable")),
    }
    if point.rf_given:
        probabilities["respiratory_failure"] = words(cloud.respiratory_failure, ("none", "type_1", "type_2"))
    same = _mean(_reading_key(cloud, n) == _reading_key(point), n)
    point_list = blood_gas.disorders(point)
    r.put("probabilities", probabilities, decimals=3)
    r.put(
        "reading",
        {
            "disorders": [{"code": d["code"], "chronicity": d["chronicity"]} for d in point_list],
            "probability": same,
        },
        decimals=3,
    )
    r.step(
        "Share of draws giving the same reading (disorders and chronicity)",
        "count of draws whose disorders and chronicity equal those of the values entered / draws",
        same,
        "jcgm101_2008",
        output="reading",
    )
    # -- intervals -------------------------------------------------------------------------------------------
    intervals = {}
    shown_point = _shown(point)
    for name, attr, kind in _INTERVALS:
        if not shown_point.get(name):
            continue
        values = np.broadcast_to(np.asarray(getattr(cloud, attr), dtype=float), (n,))
        mask = _shown(cloud, n).get(name)
        mask = np.broadcast_to(np.asarray(mask, dtype=bool), (n,)) & np.isfinite(values)
        if not mask.any():
            continue
        low, median, high = np.percentile(values[mask], [2.5, 50.0, 97.5]).tolist()
        entry = {"low": _q(r, low, kind), "high": _q(r, high, kind), "median": _q(r, median, kind)}
        share = float(mask.mean())
        if share < 1.0:
            entry["share_of_draws"] = share
        intervals[name] = entry
    r.put("intervals", intervals)
    r.put("draws", n)
    r.put("seed", seed)
    errors_used = {}
    for key in MEASURED:
        if key not in used:
            continue
        kind, value, origin = errors[key]
        unit = _internal_unit(key)
        sd = used[key]
        shown_sd = units.convert(sd, "mmHg", r.pressure_unit) if unit == "mmHg" else sd
        shown_unit = r.pressure_unit if unit == "mmHg" else unit
        entry = {"sd": {"value": shown_sd, "unit": shown_unit} if shown_unit else shown_sd, "origin": origin}
        if kind == "cv":
            entry["cv"] = value
        errors_used[key] = entry
        label = _LABELS.get(key, key)
        shown = f"{shown_sd:.4g}{' ' + shown_unit if shown_unit else ''}"
        how = f"SD = CV {100 * value:g} % x the value = {shown}" if kind == "cv" else f"SD {shown}"
        r.step(
            f"Measurement error of {label} ({'default' if origin == 'default' else 'as sent'})",
            f"normal distribution around the value entered, {how}; draws limited to the accepted range",
            shown_sd,
            "analyser_imprecision" if origin == "default" else "jcgm101_2008",
            output="errors_used",
            unit=shown_unit,
        )
    r.put("errors_used", errors_used)
    if sample.hco3 is not None and "hco3" not in given_errors:
        r.step(
            "Reported HCO3 follows the drawn pH and PCO2",
            "HCO3_draw = HCO3_reported x HCO3(pH_draw, PCO2_draw) / HCO3(pH, PCO2) (an analyser derives HCO3 "
            "from pH and PCO2)",
            sample.hco3,
            ("henderson1908", "nccls1994"),
            output="errors_used",
            unit="mmol/L",
        )
    r.step(
        "Monte Carlo propagation of the measurement errors",
        f"{n} seeded draws (seed {seed}) of every measured input, each interpreted by the blood_gas rules; "
        "probability = share of draws; 95 % interval = 2.5th to 97.5th percentile",
        n,
        "jcgm101_2008",
        output="draws",
    )
    # -- findings, cautions, summary -----------------------------------------------------------------------
    ignored = sorted(k for k in given_errors if k not in used)
    if ignored:
        r.finding(
            "errors_for_absent_inputs",
            "info",
            "Errors were given for inputs the sample does not have (not used): " + ", ".join(ignored) + ".",
        )
    names = ", ".join(
        f"{x['chronicity'].replace('_', '-') + ' ' if x['chronicity'] else ''}{x['code'].replace('_', ' ')}"
        for x in point_list
    )
    names = names or "no acid-base disorder"
    if same >= 0.95:
        r.finding(
            "reading_robust",
            "info",
            f"The reading ({names}) holds in {100 * same:.0f} % of {n:,} draws within the measurement error.",
        )
    else:
        r.finding(
            "reading_uncertain",
            "notable" if same < 0.8 else "info",
            f"The reading ({names}) holds in only {100 * same:.0f} % of {n:,} draws within the measurement "
            "error: it sits near a decision threshold. Repeat or confirm the measurement before relying on "
            "the calls that change.",
        )
    shaky = []
    for code, p in findings.items():
        in_point = code in point_codes
        if 0.05 <= p <= 0.95 and code in KEY_FINDINGS:
            shaky.append((code, p, in_point))
    shaky.sort(key=lambda x: abs(x[1] - 0.5))
    how = _how_sure(names, same, n, chronicity, point_list, shaky)
    r.put("how_sure", how)
    r.say(how)
    if shaky:
        r.say(
            "Findings that change within measurement error: "
            + "; ".join(f"{code.replace('_', ' ')} {100 * p:.0f} %" for code, p, _ in shaky[:6])
            + "."
        )
    r.caution(
        "Measurement error only: the draws vary each value within an analyser's usual imprecision. They do "
        "not cover sampling errors (air in the syringe, delay, venous admixture, a wrong FiO2), which can be "
        "larger. The default errors are typical values; use your laboratory's own where known."
    )
    r.caution(
        "Decision support only: a probability here says how stable the rule-based reading is, not how likely "
        "a diagnosis is. Interpret with the clinical picture and local protocols."
    )


def _how_sure(names: str, same: float, n: int, chronicity: dict, point_list: list, shaky: list) -> str:
    text = (
        f"How sure: the reading ({names}) holds in {100 * same:.0f} % of {n:,} draws within measurement error"
    )
    respiratory = [d for d in point_list if d["chronicity"]]
    if respiratory:
        word = respiratory[0]["chronicity"]
        text += f"; {word.replace('_', '-')} in {100 * chronicity.get(word, 0.0):.0f} %"
    if shaky:
        code, p, _ = shaky[0]
        text += f"; least settled: {code.replace('_', ' ')} ({100 * p:.0f} %)"
    return text + " (this counts measurement error only, not whether the reading fits the patient)."


def _q(report: Report, value: float, kind: str | None):
    if kind == "pressure":
        return report.pressure_value(value)
    if kind is None:
        return value
    return {"value": value, "unit": kind}


def _shown(d, n: int | None = None) -> dict:
    """Where each interval's number is an output of the blood_gas report (mirrors its rules for outputs)."""
    primary_resp = d.chronicity != ""
    return {
        "hco3": True,
        "hco3_computed": True,
        "standard_base_excess": True,
        "anion_gap": d.has_gap,
        "anion_gap_corrected": d.has_gap & given(d.anion_gap_corrected),
        "delta_ratio": d.dr_given,
        "osmolar_gap": d.osm_gap_given,
        "strong_ion_gap": d.sig_given & ~np.asarray(d.doubtful)
        if n
        else bool(d.sig_given and not d.doubtful),
        "pao2_alveolar": d.alveolar_given,
        "a_a_gradient": d.oxygenation,
        "pf_ratio": d.oxygenation,
        "fraction_acute": primary_resp & given(d.fraction_acute),
        "pco2_target": d.target_given,
    }
