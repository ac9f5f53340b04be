"""The ``course`` calculation: a series of blood gases from one patient, read as a course over time.

==================  ==========================================================================================
``course``          bridge calculation: ``samples`` (2 to 50 gases with a time and events) -> ``readings``,
                    ``intervals``, ``response``, ``niv_response`` and the course findings
``EVENTS``          the event words a sample may carry (each: the change was made just after that gas)
``PH_CHANGE``       the reference change of pH: a smaller change counts as none (0.03)
``PCO2_CHANGE``     the reference change of PCO2, as a fraction of the earlier value (0.08)
``ph_distance``     how far a pH lies outside 7.35-7.45 (0 inside)
``direction``       ``improving``, ``worsening`` or ``unchanged`` from one pH to the next
``verdict``         ``improving``, ``worsening`` or ``not_improving`` of a stretch of the course
``pco2_trend``      ``rising``, ``falling`` or ``unchanged`` from one PCO2 to the next
``parse_time``      a sample's time (minutes, or an ISO 8601 date-time text) -> its kind and value
==================  ==========================================================================================

One implementation of the rules: each sample is read by the ``blood_gas`` calculation itself
(:func:`.blood_gas.blood_gas`, the function the bridge calls for one gas), and the course only reads
that reading's outputs (``ph_status``, ``disorders``, ``hco3``, ``pco2_target``, ``spo2_target``). What the
course adds is the comparison over time; docs/course.md says how each word is decided, in full:

- A change counts only when it reaches the analysers' reference change (1.96 x sqrt(2) x the measurement
  SD; with pH SD 0.01 and PCO2 CV 3 %: 0.03 pH and 8 % PCO2). Changes are rounded to 6 decimals first, so a
  pH typed to two decimals that moves by exactly 0.03 counts.
- Venous samples are compared only with venous samples, arterial and capillary (arterialised earlobe) ones
  with each other.
- ``direction``: the pH's distance from 7.35-7.45 shrank (``improving``) or grew (``worsening``) by 0.03 or
  more, else ``unchanged``.
- ``verdict`` (``response``, ``niv_response``): ``worsening`` when the pH fell by 0.03 or more over the
  stretch or its last interval is worsening (a current deterioration is said before an earlier gain: safety
  first); else ``improving`` when the pH rose by 0.03 or more or is at or above 7.35; else ``not_improving``.
  Both are judged within the kind (venous, or arterial and earlobe) of the latest gas.
- The events mark each gas taken on NIV or while intubated; a first NIV event ``niv_changed`` means NIV was
  already running. After NIV or intubation for a respiratory acidosis, later gases are read with
  ``previous_hypercapnic_failure`` true (the BTS 2017 SpO2 target) unless a gas gives its own.
- The findings that call for action now (``niv_not_improving``, ``pco2_falling_fast``,
  ``latest_gas_meets_niv_threshold``) are judged on the latest comparable gas; ``pco2_rising_after_oxygen`` is
  judged for every rise of oxygen and is no longer urgent once a later gas shows the pH recovered.
- The summary says the urgent findings, then the notable ones, then the course; each statement once.
"""

from __future__ import annotations

import datetime as dt
import re
from functools import cache

from .. import units
from ..errors import NOTHING, InputError, InputErrors, is_real
from ..fields import Inputs
from ..report import PRESSURE_DECIMALS, Report

#: event words, each meaning the change was made at (just after) the gas that carries it
EVENTS = (
    "oxygen_increased",
    "oxygen_decreased",
    "niv_started",
    "niv_changed",
    "niv_stopped",
    "intubated",
    "extubated",
)
#: pairs of events that cannot both follow one gas
OPPOSITES = (
    ("oxygen_increased", "oxygen_decreased"),
    ("niv_started", "niv_stopped"),
    ("niv_started", "intubated"),
    ("intubated", "extubated"),
)
#: patient-level inputs that apply to every sample unless the sample gives its own
PATIENT_KEYS = ("hypercapnia_risk", "previous_hypercapnic_failure", "baseline_pco2", "age")

MIN_SAMPLES, MAX_SAMPLES = 2, 50
#: reference change of pH: 1.96 x sqrt(2) x 0.01 (analyser SD) = 0.028, used as 0.03
PH_CHANGE = 0.03
#: reference change of PCO2 (a fraction of the earlier value): 1.96 x sqrt(2) x 3 % (analyser CV) = 8.3 %
PCO2_CHANGE = 0.08
PH_LOW, PH_HIGH = 7.35, 7.45
#: the HCO3 above which an alkalaemic gas after hypercapnia reads as post-hypercapnic alkalosis [mmol/L]
HCO3_HIGH = 26.0
#: the pH from which a PCO2 below an earlier aim may be eased towards it (below it the kidneys are shedding
#: the retained HCO3 and the pH has little room left above 7.35)
EASE_PH = 7.42
#: below this pH the NIV threshold calls for ready access to invasive ventilation (BTS/ICS 2016)
NIV_INVASIVE_PH = 7.25
#: the PaCO2 above which an acidaemic gas meets the NIV threshold (BTS/ICS 2016) [kPa]
NIV_PCO2_KPA = 6.5
#: minutes on NIV before a gas without improvement is a finding; from this many minutes it is urgent
NIV_FIRST_CHECK_MIN, NIV_ESCALATION_MIN = 60.0, 240.0
#: accepted span of a time given in minutes
TIME_LIMIT_MIN = 1_000_000.0
_ROUND = 6
_ORDER = {"urgent": 0, "notable": 1, "info": 2}
_SOURCES_CHANGE = ("reference_change_value", "analyser_imprecision")

#: an ISO 8601 date-time: date, T (or a space), hours:minutes, optional seconds, optional UTC offset
DATE_TIME = re.compile(
    r"^([0-9]{4})-([0-9]{2})-([0-9]{2})[T ]([0-9]{2}):([0-9]{2})"
    r"(?::([0-9]{2})(?:\.([0-9]{1,6}))?)?(Z|[+-][0-9]{2}:?[0-9]{2})?$"
)


# -- the rules ----------------------------------------------------------------------------------------------


def _r(x: float) -> float:
    return round(x, _ROUND)


def ph_distance(ph: float) -> float:
    """How far ``ph`` lies outside the normal range 7.35-7.45 (0 inside it).

    >>> ph_distance(7.25), ph_distance(7.40), ph_distance(7.50)
    (0.1, 0.0, 0.05)
    """
    return _r(max(0.0, PH_LOW - ph, ph - PH_HIGH))


def direction(ph_before: float, ph_after: float) -> str:
    """``improving`` when the distance from 7.35-7.45 shrank by 0.03 or more, ``worsening`` when it grew by as
    much, else ``unchanged``.

    >>> direction(7.25, 7.28), direction(7.25, 7.27), direction(7.30, 7.26), direction(7.44, 7.48)
    ('improving', 'unchanged', 'worsening', 'worsening')
    """
    change = _r(ph_distance(ph_after) - ph_distance(ph_before))
    if change <= -PH_CHANGE:
        return "improving"
    if change >= PH_CHANGE:
        return "worsening"
    return "unchanged"


def verdict(ph_start: float, ph_end: float, latest_direction: str | None) -> str:
    """The verdict on a stretch of the course from ``ph_start`` to ``ph_end`` whose last interval had
    ``latest_direction``: ``worsening`` first, then ``improving``, else ``not_improving``.

    >>> verdict(7.25, 7.28, "improving"), verdict(7.25, 7.27, "unchanged"), verdict(7.25, 7.36, "improving")
    ('improving', 'not_improving', 'improving')
    >>> verdict(7.25, 7.22, "worsening"), verdict(7.20, 7.26, "worsening")
    ('worsening', 'worsening')
    """
    change = _r(ph_end - ph_start)
    if change <= -PH_CHANGE or latest_direction == "worsening":
        return "worsening"
    if change >= PH_CHANGE or ph_end >= PH_LOW:
        return "improving"
    return "not_improving"


def ph_735_pco2(pco2: float, ph: float) -> float:
    """The PCO2 that would give pH 7.35 at the HCO3 of a gas with ``pco2`` and ``ph``: with the HCO3 fixed,
    Henderson-Hasselbalch gives PCO2 x 10^(pH - 7.35) (the ceiling of easing ventilation).

    >>> round(ph_735_pco2(45.0, 7.40), 2), round(ph_735_pco2(60.0, 7.35), 2)
    (50.49, 60.0)
    """
    return pco2 * 10 ** (ph - PH_LOW)


def pco2_trend(pco2_before: float, pco2_after: float) -> str:
    """``rising`` or ``falling`` when the PCO2 moved by 8 % of the earlier value or more, else ``unchanged``.

    >>> pco2_trend(60, 64.8), pco2_trend(60, 64.7), pco2_trend(60, 55.2), pco2_trend(60, 55.3)
    ('rising', 'unchanged', 'falling', 'unchanged')
    """
    relative = _r((pco2_after - pco2_before) / pco2_before)
    if relative >= PCO2_CHANGE:
        return "rising"
    if relative <= -PCO2_CHANGE:
        return "falling"
    return "unchanged"


def parse_time(value: object) -> tuple[str, object]:
    """(kind, value) of a sample's time: ``("minutes", float)``, ``("date_time", datetime)``, or
    ``("bad", reason)`` / ``("out_of_range", reason)`` when it is neither.

    >>> parse_time(45), parse_time("2026-12-04T03:10")
    (('minutes', 45.0), ('date_time', datetime.datetime(2026, 12, 4, 3, 10)))
    >>> parse_time("2026-12-04T03:10+01:00")[1].utcoffset()
    datetime.timedelta(seconds=3600)
    >>> parse_time("03:10")[0], parse_time("2026-02-30T10:00")[0], parse_time(True)[0]
    ('bad', 'out_of_range', 'bad')
    """
    if is_real(value):
        number = float(value)
        if not abs(number) <= TIME_LIMIT_MIN:  # also refuses NaN
            return "out_of_range", f"must be {-TIME_LIMIT_MIN:g} to {TIME_LIMIT_MIN:g} minutes"
        return "minutes", number
    if not isinstance(value, str):
        return "bad", "must be minutes (a number) or a date-time text"
    m = DATE_TIME.match(value)
    if not m:
        return "bad", "is neither minutes (a number) nor a date-time"
    year, month, day, hour, minute, second, fraction, offset = m.groups()
    try:
        tz = None
        if offset == "Z":
            tz = dt.UTC
        elif offset:
            digits = offset[1:].replace(":", "")
            hours, minutes = int(digits[:2]), int(digits[2:])
            if minutes > 59:
                raise ValueError("offset minutes")
            sign = -1 if offset[0] == "-" else 1
            tz = dt.timezone(sign * dt.timedelta(hours=hours, minutes=minutes))
        moment = dt.datetime(
            int(year),
            int(month),
            int(day),
            int(hour),
            int(minute),
            int(second or 0),
            int((fraction or "0").ljust(6, "0")),
            tzinfo=tz,
        )
    except ValueError:
        return "out_of_range", "is not a real date and time"
    return "date_time", moment


# -- reading the samples ------------------------------------------------------------------------------------


class _Gas:
    """One sample: where it came from, when, and what the blood_gas reading said about it."""

    def __init__(
        self,
        index: int,
        time,
        kind: str,
        moment,
        events: tuple[str, ...],
        raw: dict,
        own: set[str],
        reading: tuple[dict, list[dict]],
    ):
        self.index = index
        self.time = time
        self.kind = kind
        self.moment = moment
        self.minutes = 0.0
        self.events = events
        self.raw = raw  # the inputs the gas was read with (its own and the patient's)
        self.own = own  # the names of the inputs the sample gave itself
        self.site = raw.get("sample") or "arterial"
        self.group = "venous" if self.site == "venous" else "arterial"
        self.ph = float(raw["ph"])
        self.pco2 = round(Inputs(raw).quantity("pco2", unit="mmHg", low=0.0, high=1e9), 9)
        self.at_risk = raw.get("hypercapnia_risk") is True
        self.baseline_given = raw.get("baseline_pco2") is not None
        self.on_niv = False  # taken on NIV (the course's events say so)
        self.intubated = False  # taken while intubated
        self.read(*reading)

    def read(self, out: dict, findings: list[dict]) -> None:
        """Keep what the blood_gas reading ``out`` (with its ``findings``) says about this gas."""
        self.hco3 = out["hco3"]["value"]
        self.ph_status = out["ph_status"]
        self.disorders = out["disorders"]
        target = out.get("pco2_target")
        self.pco2_target = None if target is None else target["value"]
        self.spo2_target = out.get("spo2_target")
        self.interpretation = out.get("interpretation")
        self.findings = findings
        codes = {d["code"]: d for d in self.disorders}
        acid = codes.get("respiratory_acidosis")
        self.respiratory_acidosis = acid is not None
        self.chronic = acid is not None and acid.get("chronicity") in ("chronic", "acute_on_chronic")

    def codes(self) -> set[str]:
        return {f["code"] for f in self.findings}


@cache
def blood_gas_keys() -> frozenset[str]:
    """The inputs the blood_gas calculation reads (found by asking it, so a new input is passed on)."""
    from .blood_gas import blood_gas

    probe = Inputs({}, prefix="probe")
    try:
        blood_gas(probe, Report("blood_gas"))
    except (InputError, InputErrors):
        pass
    return frozenset(probe.read)


def _read_one_gas(raw: dict, prefix: str) -> tuple[dict | None, list[dict], list[InputError]]:
    """(outputs, findings, errors) of the blood_gas reading of one sample, pressures in mmHg."""
    from .blood_gas import blood_gas

    report = Report("blood_gas", pressure_unit="mmHg")
    try:
        blood_gas(Inputs(raw, prefix=prefix), report)
    except InputErrors as exc:
        return None, [], list(exc.errors)
    except InputError as exc:
        return None, [], [exc]
    findings = [{"code": f["code"], "severity": f["severity"]} for f in report.findings]
    return report.outputs, sorted(findings, key=lambda f: _ORDER[f["severity"]]), []


#: a plain gas in which a patient-level input is checked by the blood_gas reader itself
_PROBE = {"ph": 7.4, "pco2": {"value": 40.0, "unit": "mmHg"}}


def _patient_value_ok(inputs: Inputs, key: str, value: object) -> bool:
    """Check one patient-level input with the blood_gas reader's own rules; problems go to ``inputs``."""
    _, _, errors = _read_one_gas({**_PROBE, key: value}, inputs.prefix)
    own = [e for e in errors if e.field == inputs.field(key)]
    inputs.errors.extend(own)
    return not own


def _events(s: Inputs) -> tuple[str, ...]:
    s.read.add("events")
    value = s.raw.get("events")
    if value is None:
        return ()
    if not isinstance(value, list):
        s.fail(
            "events",
            value,
            "events must be a list of words",
            "Accepted: " + ", ".join(EVENTS),
            code="bad_request",
        )
        return ()
    words: list[str] = []
    for j, word in enumerate(value):
        if isinstance(word, str) and word in EVENTS:
            if word not in words:
                words.append(word)
            continue
        hint = "Accepted: " + ", ".join(EVENTS)
        if isinstance(word, str):
            import difflib

            close = difflib.get_close_matches(
                word.strip().casefold().replace(" ", "_"), EVENTS, n=1, cutoff=0.6
            )
            if close:
                hint = f"Did you mean '{close[0]}'? " + hint
        s.errors.append(
            InputError(s.field(f"events[{j}]"), word, "is not an event word", hint, code="bad_request")
        )
    for a, b in OPPOSITES:
        if a in words and b in words:
            s.fail(
                "events",
                value,
                f"{a} and {b} cannot both follow one gas",
                "Give each change at the gas it followed.",
                code="inconsistent",
            )
    return tuple(words)


def _samples(inputs: Inputs) -> list[_Gas] | None:
    """Every sample read (None when any problem was found: the problems are in ``inputs.errors``)."""
    samples = inputs.raw.get("samples")
    inputs.read.add("samples")
    patient = {}
    for key in PATIENT_KEYS:
        inputs.read.add(key)
        if inputs.given(key):
            patient[key] = inputs.raw[key]
    known = blood_gas_keys()
    for key in list(patient):
        if key not in known:  # not (yet) an input of the one-gas reading: checked here, not passed on
            inputs.flag(key)
            del patient[key]
        elif not _patient_value_ok(inputs, key, patient[key]):
            del patient[key]
    if samples is None:
        inputs.fail("samples", NOTHING, "samples (a list of 2 to 50 gases) is required", code="missing")
        return None
    if not isinstance(samples, list):
        inputs.fail("samples", samples, "samples must be a list of gases", code="bad_request")
        return None
    if not MIN_SAMPLES <= len(samples) <= MAX_SAMPLES:
        inputs.fail(
            "samples",
            NOTHING,
            f"a course needs {MIN_SAMPLES} to {MAX_SAMPLES} gases (got {len(samples)})",
            code="out_of_range",
        )
        if len(samples) > MAX_SAMPLES:
            return None
    gases: list[_Gas] = []
    times: list[tuple[int, str, object]] = []
    for i, sample in enumerate(samples):
        prefix = f"{inputs.prefix}.samples[{i}]"
        if not isinstance(sample, dict):
            inputs.errors.append(
                InputError(
                    prefix, sample, 'each gas is an object {"time", "inputs", "events"}', code="bad_request"
                )
            )
            continue
        s = Inputs(sample, prefix=prefix)
        s.read.add("time")
        time = sample.get("time")
        kind, moment = (None, None)
        if time is None:
            s.fail(
                "time",
                NOTHING,
                "time is required (minutes, or a date-time like 2026-12-04T03:10)",
                code="missing",
            )
        else:
            kind, moment = parse_time(time)
            if kind in ("bad", "out_of_range"):
                code = "bad_request" if kind == "bad" else "out_of_range"
                s.fail(
                    "time",
                    time,
                    f"time {moment}",
                    "Give minutes (45) or a date-time (2026-12-04T03:10).",
                    code=code,
                )
                kind = None
        events = _events(s)
        raw = s.mapping("inputs", required=True)
        outputs, findings = None, []
        if raw is not None:
            merged = dict(raw)
            injected = [k for k in patient if merged.get(k) is None]
            merged.update({k: patient[k] for k in injected})
            outputs, findings, errors = _read_one_gas(merged, f"{prefix}.inputs")
            s.errors.extend(errors)
        try:
            s.finish(("time", "events", "inputs"))
        except InputErrors as exc:
            inputs.errors.extend(exc.errors)
            continue
        if kind is not None:
            times.append((i, kind, moment))
        if outputs is not None and kind is not None:
            own = {k for k, v in raw.items() if v is not None}
            gases.append(_Gas(i, time, kind, moment, events, merged, own, (outputs, findings)))
    _check_times(inputs, times)
    if inputs.errors:
        return None
    return gases


def _check_times(inputs: Inputs, times: list[tuple[int, str, object]]) -> None:
    """All times of one kind, date-times all with or all without a UTC offset, and no two the same."""
    if not times:
        return
    first_index, first_kind, first_moment = times[0]
    aware = first_kind == "date_time" and first_moment.tzinfo is not None
    seen: dict[object, int] = {}
    for i, kind, moment in times:
        field = f"{inputs.prefix}.samples[{i}].time"
        raw = inputs.raw["samples"][i]["time"]
        if kind != first_kind:
            inputs.errors.append(
                InputError(
                    field,
                    raw,
                    f"mixes {kind.replace('_', '-')}s with the {first_kind.replace('_', '-')}s of "
                    f"samples[{first_index}]",
                    "Give every time as minutes, or every time as a date-time.",
                    code="inconsistent",
                )
            )
            continue
        if kind == "date_time" and (moment.tzinfo is not None) != aware:
            inputs.errors.append(
                InputError(
                    field,
                    raw,
                    "some date-times carry a UTC offset and others do not",
                    "Give the offset on every time, or on none.",
                    code="inconsistent",
                )
            )
            continue
        key = moment
        if key in seen:
            inputs.errors.append(
                InputError(
                    field,
                    raw,
                    f"is the same time as samples[{seen[key]}]",
                    "Two gases cannot be taken at the same moment: check the times.",
                    code="inconsistent",
                )
            )
            continue
        seen[key] = i


# -- the calculation ----------------------------------------------------------------------------------------


def course(inputs: Inputs, report: Report) -> None:
    """Read a series of gases from one patient as a course (see the module docstring and docs/course.md)."""
    gases = _samples(inputs)
    inputs.finish()
    assert gases is not None  # finish raised otherwise
    c = _Course(gases, report)
    c.readings()
    c.intervals()
    c.response()
    c.niv()
    c.oxygen_finding()
    c.falling_fast_finding()
    c.threshold_finding()
    c.summary_and_cautions(inputs)


class _Episode:
    """One run of NIV: the gas it started after (or was already running at), the gas its change is measured
    from, the comparable gases on NIV after that one, and whether NIV was still running at the last."""

    def __init__(self, start: _Gas, known: bool, reference: _Gas, window: list[_Gas], running: bool):
        self.start = start
        self.known = known  # False: already on NIV at ``start``, the true start is earlier and not recorded
        self.reference = reference
        self.window = window
        self.running = running


class _Course:
    def __init__(self, gases: list[_Gas], report: Report):
        self.r = report
        self.unit = report.pressure_unit
        if gases[0].kind == "minutes":
            start = min(g.moment for g in gases)
            for g in gases:
                g.minutes = g.moment - start
        else:
            start = min(g.moment for g in gases)
            for g in gases:
                g.minutes = (g.moment - start).total_seconds() / 60.0
        self.gases = sorted(gases, key=lambda g: (g.minutes, g.index))
        self.position = {id(g): k for k, g in enumerate(self.gases)}
        self.pairs: list[tuple[_Gas, _Gas, dict]] = []
        self.ending: dict[int, dict] = {}  # id(later gas) -> its interval
        self.runs: list[tuple[_Gas, bool]] = []  # (gas, start known) of each NIV run
        self.history_from: _Gas | None = None  # the first gas whose SpO2 target the course's history changed
        self.response_span = None
        self.niv_episode: _Episode | None = None
        self.support()
        self.history()

    # -- helpers --------------------------------------------------------------------------------------------
    def p(self, mmhg: float) -> str:
        return self.r.pressure_text(mmhg)

    def when(self, g: _Gas) -> str:
        return f"{g.minutes:g} min" if g.kind == "minutes" else f"{g.time} ({_duration(g.minutes)} in)"

    def rate(self, mmhg_per_h: float) -> dict:
        return {"value": units.convert(mmhg_per_h, "mmHg", self.unit), "unit": f"{self.unit}/h"}

    def decimals(self, output: str, **parts: int | None) -> None:
        """Display decimals of the numbers inside a list or mapping output, by path (``readings.ph``);
        None: as every pressure of the request's unit."""
        for part, decimals in parts.items():
            pressure = PRESSURE_DECIMALS[self.unit]
            self.r.display[f"{output}.{part}"] = pressure if decimals is None else decimals

    def later_in_group(self, g: _Gas) -> list[_Gas]:
        k = self.position[id(g)]
        return [x for x in self.gases[k + 1 :] if x.group == g.group]

    # -- what the events say about each gas -----------------------------------------------------------------
    def support(self) -> None:
        """Mark each gas taken on NIV or while intubated, and find the runs of NIV.

        An event follows its gas. A course whose first NIV event is ``niv_changed`` or ``niv_stopped``
        (no ``niv_started`` before it) was already on NIV at that gas: the run starts there, its true start
        unrecorded."""
        on = intubated = seen = False
        for g in self.gases:
            niv_events = {"niv_started", "niv_changed", "niv_stopped"} & set(g.events)
            if niv_events and not seen and "niv_started" not in niv_events:
                on = True
                self.runs.append((g, False))
            seen = seen or bool(niv_events)
            g.on_niv, g.intubated = on, intubated
            if "niv_started" in g.events:
                on = True
                self.runs.append((g, True))
            if "niv_stopped" in g.events or "intubated" in g.events:
                on = False
            if "intubated" in g.events:
                intubated = True
            if "extubated" in g.events:
                intubated = False

    def history(self) -> None:
        """Read the gases after NIV or intubation in this course as after ventilation for hypercapnic failure.

        From the first gas taken on NIV or while intubated (or after either), when a gas at or before it reads
        a respiratory acidosis, each gas that does not give its own ``previous_hypercapnic_failure`` is read
        with it true: BTS 2017 keeps 88-92 % for a patient who has needed NIV or invasive ventilation for
        hypercapnic failure."""
        key = "previous_hypercapnic_failure"
        if key not in blood_gas_keys():
            return
        ventilated = [k for k, g in enumerate(self.gases) if g.on_niv or g.intubated]
        if not ventilated:
            return
        first = ventilated[0]
        if not any(g.respiratory_acidosis for g in self.gases[: first + 1]):
            return
        for g in self.gases[first:]:
            if key in g.own or g.raw.get(key) is True:
                continue
            g.raw = {**g.raw, key: True}
            outputs, findings, errors = _read_one_gas(g.raw, "course")
            assert outputs is not None and not errors, errors  # the same gas read without it was valid
            before = g.spo2_target
            g.read(outputs, findings)
            if self.history_from is None and g.spo2_target != before:
                self.history_from = g  # the first gas whose target it changed: the summary says so

    # -- outputs --------------------------------------------------------------------------------------------
    def readings(self) -> None:
        out = []
        for g in self.gases:
            findings = g.findings
            if g.intubated:  # the NIV threshold does not apply to a gas taken while intubated
                findings = [
                    {**f, "severity": "info"} if f["code"] == "niv_criteria_met" else f for f in findings
                ]
            reading = {
                "index": g.index,
                "time": g.time,
                "minutes": g.minutes,
                "site": g.site,
                "events": list(g.events),
                "on_niv": g.on_niv,
                "intubated": g.intubated,
                "ph": g.ph,
                "pco2": self.r.pressure_value(g.pco2),
                "hco3": {"value": g.hco3, "unit": "mmol/L"},
                "ph_status": g.ph_status,
                "disorders": g.disorders,
            }
            if g.pco2_target is not None:
                reading["pco2_target"] = self.r.pressure_value(g.pco2_target)
                # from the aim down to the reference change below it: lower is what pco2_falling_fast flags
                reading["pco2_aim_band"] = {
                    "low": self.r.pressure_value(g.pco2_target * (1 - PCO2_CHANGE)),
                    "high": self.r.pressure_value(g.pco2_target),
                }
            if g.spo2_target is not None:
                reading["spo2_target"] = g.spo2_target
            if g.interpretation:
                reading["interpretation"] = g.interpretation
            reading["findings"] = sorted(findings, key=lambda f: _ORDER[f["severity"]])
            out.append(reading)
        self.r.put("readings", out)
        self.r.put("ph_range", {"low": PH_LOW, "high": PH_HIGH})
        self.decimals("readings", ph=2, pco2=None, hco3=1, pco2_target=None, pco2_aim_band=None)
        self.r.display["ph_range"] = 2
        self.r.step(
            "Reference change of pH: a smaller change between two gases counts as none",
            "1.96 x sqrt(2) x SD, SD 0.01 (analyser) = 0.028, used as 0.03",
            PH_CHANGE,
            _SOURCES_CHANGE,
        )
        self.r.step(
            "Reference change of PCO2, a percentage of the earlier value",
            "1.96 x sqrt(2) x CV, CV 3 % (analyser) = 8.3 %, used as 8 %",
            PCO2_CHANGE * 100,
            _SOURCES_CHANGE,
        )

    def intervals(self) -> None:
        last: dict[str, _Gas] = {}
        out = []
        for g in self.gases:
            before = last.get(g.group)
            last[g.group] = g
            if before is None:
                continue
            minutes = g.minutes - before.minutes
            change = g.pco2 - before.pco2
            per_hour = change / (minutes / 60.0)
            interval = {
                "earlier": self.position[id(before)],
                "later": self.position[id(g)],
                "minutes": minutes,
                "ph_change": _r(g.ph - before.ph),
                "pco2_change": self.r.pressure_value(change),
                "pco2_rate": self.rate(per_hour),
                "hco3_change": {"value": g.hco3 - before.hco3, "unit": "mmol/L"},
                "direction": direction(before.ph, g.ph),
                "pco2_trend": pco2_trend(before.pco2, g.pco2),
            }
            out.append(interval)
            self.pairs.append((before, g, interval))
            self.ending[id(g)] = interval
            self.r.step(
                f"PCO2 rate from {self.when(before)} to {self.when(g)}",
                "(PCO2 later - PCO2 earlier) / hours between",
                interval["pco2_rate"]["value"],
                "tidewell_course_conventions",
                output="intervals",
                unit=interval["pco2_rate"]["unit"],
            )
        if len({g.group for g in self.gases}) > 1:
            self.r.caution(
                "Venous and arterial (or earlobe) gases are not compared with each other: venous PCO2 runs "
                "higher and venous pH lower, with wide limits."
            )
        self.r.put("intervals", out)
        self.decimals("intervals", ph_change=2, pco2_change=None, pco2_rate=None, hco3_change=1)

    def _stretch(self, start: _Gas, end: _Gas) -> dict:
        latest = self.ending.get(id(end))
        word = verdict(start.ph, end.ph, latest["direction"] if latest else None)
        return {
            "earlier": self.position[id(start)],
            "later": self.position[id(end)],
            "minutes": end.minutes - start.minutes,
            "ph_change": _r(end.ph - start.ph),
            "pco2_change": self.r.pressure_value(end.pco2 - start.pco2),
            "verdict": word,
        }

    def response(self) -> None:
        """From the first acidaemic gas of the latest gas's kind (venous, or arterial and earlobe)."""
        latest = self.gases[-1]
        first = next((g for g in self.gases if g.group == latest.group and g.ph_status == "acidaemia"), None)
        if first is None or first is latest:
            return
        span = self._stretch(first, latest)
        self.response_span = (first, latest, span)
        self.r.put("response", span["verdict"])
        self.r.put("response_span", span)
        self.decimals("response_span", ph_change=2, pco2_change=None)
        self.r.step(
            f"pH change from the first acidaemic gas ({self.when(first)}) to the latest comparable one",
            "worsening: fell >= 0.03 or latest interval worsening; improving: rose >= 0.03 or pH >= 7.35; "
            "else not improving",
            span["ph_change"],
            ("tidewell_course_conventions", "reference_change_value"),
            output="response",
        )

    def _niv_episode(self) -> _Episode | None:
        """The latest run of NIV that can be judged: the comparable gases are those of the kind of the last
        gas on NIV (else of the other kind); the change is measured from the gas NIV started after, or from
        the first gas of that kind on NIV when the start gas is of the other kind."""
        best = None
        for start, known in self.runs:
            k = self.position[id(start)]
            on = [] if known else [start]
            running = True
            # NIV already running at a first gas that it was stopped after (or intubated): the run ends there
            later = (
                [] if not known and {"niv_stopped", "intubated"} & set(start.events) else self.gases[k + 1 :]
            )
            if not known and not later:
                running = False
            for x in later:
                on.append(x)
                if "niv_stopped" in x.events or "intubated" in x.events:
                    running = False
                    break
            if not on:
                continue
            other = "venous" if on[-1].group == "arterial" else "arterial"
            for group in (on[-1].group, other):
                pool = [start] if start.group == group else []
                pool += [x for x in on if x.group == group and x is not start]
                if len(pool) >= 2:
                    best = _Episode(start, known, pool[0], pool[1:], running)
                    break
        return best

    def niv(self) -> None:
        episode = self._niv_episode()
        self.niv_episode = episode
        if episode is None:
            return
        start, ref, end = episode.start, episode.reference, episode.window[-1]
        span = self._stretch(ref, end)
        t = end.minutes - start.minutes
        out = {
            "minutes_on_niv": t,
            "ph_change": span["ph_change"],
            "pco2_change": span["pco2_change"],
            "verdict": span["verdict"],
            "earlier": span["earlier"],
            "later": span["later"],
            "started": self.position[id(start)],
            "start_known": episode.known,
            "running": episode.running,
        }
        self.r.put("niv_response", out)
        self.decimals("niv_response", ph_change=2, pco2_change=None)
        self.r.step(
            f"pH change on NIV from {self.when(ref)} to {self.when(end)}",
            "as for the response, from the gas at the start of NIV (or the first comparable gas on NIV)",
            span["ph_change"],
            ("bts_ics2016_niv_monitoring", "reference_change_value"),
            output="niv_response",
        )
        if not episode.running:
            return
        change = span["ph_change"]
        base = self._niv_base(episode, t)
        latest = self.ending.get(id(end))
        fell_lately = (
            latest is not None
            and latest["earlier"] >= self.position[id(ref)]
            and latest["direction"] == "worsening"
            and end.ph < PH_LOW
        )
        if change <= -PH_CHANGE and end.ph >= PH_LOW:
            self.r.finding(
                "niv_not_improving",
                "notable",
                base + f"the pH has fallen by {-change:.2f} but is not acidaemic. Check mask, leak, settings "
                "and synchrony, and repeat the gas, following local protocols and senior advice "
                "(BTS/ICS 2016).",
            )
        elif change <= -PH_CHANGE:
            self.r.finding(
                "niv_not_improving",
                "urgent",
                base
                + f"the pH has fallen by {-change:.2f}. A falling pH on NIV calls for the senior team now: "
                "check mask, leak, settings and synchrony, and consider escalation within the agreed ceiling "
                "of treatment, following local protocols (BTS/ICS 2016).",
            )
        elif fell_lately:
            before = self.gases[latest["earlier"]]
            self.r.finding(
                "niv_not_improving",
                "urgent",
                base + f"the pH has fallen since the gas at {self.when(before)} on NIV (pH {before.ph:.2f}, "
                f"PCO2 {self.p(before.pco2)}): a deterioration on NIV after an earlier gain calls for the "
                "senior team now: check mask, leak, settings and synchrony, and consider escalation within "
                "the agreed ceiling of treatment, following local protocols (BTS/ICS 2016).",
            )
        elif t >= NIV_FIRST_CHECK_MIN - 1e-9 and end.ph < PH_LOW and change < PH_CHANGE:
            if t >= NIV_ESCALATION_MIN - 1e-9:
                self.r.finding(
                    "niv_not_improving",
                    "urgent",
                    base
                    + "no improvement in pH after 4 hours or more of NIV. The guideline expects the team to "
                    "consider escalation within the agreed ceiling of treatment at this point; decide with "
                    "senior advice and local protocols (BTS/ICS 2016).",
                )
            else:
                self.r.finding(
                    "niv_not_improving",
                    "notable",
                    base + "the pH has not yet improved by 0.03. Check mask fit, leak, settings and "
                    "synchrony, and repeat the gas (about an hour after any change of settings), following "
                    "local protocols and senior advice (BTS/ICS 2016).",
                )

    def _niv_base(self, episode: _Episode, t: float) -> str:
        """The opening of an NIV finding: since when, compared with which gas, what the latest gas shows."""
        start, ref, end = episode.start, episode.reference, episode.window[-1]
        values = f"pH {ref.ph:.2f}, PCO2 {self.p(ref.pco2)}"
        if not episode.known:
            since = f"Already on NIV at {self.when(start)}, its start not recorded"
        else:
            since = f"On NIV since {self.when(start)}"
        if ref is start:
            opening = f"{since} ({values}), the gas at "
        else:
            kind = "venous" if ref.group == "venous" else "arterial or earlobe"
            opening = f"{since}; from the first {kind} gas on NIV ({self.when(ref)}, {values}) the gas at "
        length = _duration(t) if episode.known else f"at least {_duration(t)} on NIV"
        return f"{opening}{self.when(end)} shows pH {end.ph:.2f} and PCO2 {self.p(end.pco2)} after {length}: "

    def oxygen_finding(self) -> None:
        fired = None
        for k, g in enumerate(self.gases[:-1]):
            if set(g.events) != {"oxygen_increased"}:
                continue
            nxt = self.gases[k + 1]
            if nxt.group != g.group:
                continue
            if pco2_trend(g.pco2, nxt.pco2) == "rising" and _r(nxt.ph - g.ph) <= -PH_CHANGE:
                fired = (g, nxt)
        if fired is None:
            return
        g, nxt = fired
        rise = (nxt.pco2 / g.pco2 - 1) * 100
        target = nxt.spo2_target
        aim = (
            f" (the reading of that gas: SpO2 target {target['low']:g}-{target['high']:g} %)"
            if target
            else ""
        )
        later = self.later_in_group(nxt)
        last = later[-1] if later else None
        recovered = last is not None and (last.ph >= PH_LOW or _r(last.ph - nxt.ph) >= PH_CHANGE)
        since = ""
        if recovered:
            since = (
                f" Since then the pH has {'recovered' if last.ph >= PH_LOW else 'risen'} to {last.ph:.2f} "
                f"(PCO2 {self.p(last.pco2)}) at {self.when(last)}."
            )
        self.r.finding(
            "pco2_rising_after_oxygen",
            "urgent" if nxt.ph < PH_LOW and not recovered else "notable",
            f"After oxygen was increased at {self.when(g)}, the next gas ({self.when(nxt)}) shows PCO2 up "
            f"from {self.p(g.pco2)} to {self.p(nxt.pco2)} (+{rise:.0f} %) and pH down from {g.ph:.2f} to "
            f"{nxt.ph:.2f}: oxygen-induced hypercapnia is possible (Austin 2010; BTS 2017). Check the oxygen "
            f"given against the target saturation range{aim}, adjust it with senior advice and local "
            "protocols, and repeat the gas 30-60 minutes after any change." + since,
        )

    def falling_fast_finding(self) -> None:
        fired = None
        latest_group = self.gases[-1].group
        for group in sorted(("arterial", "venous"), key=lambda x: x == latest_group):  # the latest's last
            members = [g for g in self.gases if g.group == group]
            if len(members) < 2:
                continue
            latest = members[-1]
            earlier = [
                g
                for g in members[:-1]
                if g.respiratory_acidosis and (g.chronic or g.at_risk or g.baseline_given)
            ]
            if not earlier:
                continue
            a = earlier[-1]
            below_aim = (
                a.pco2_target is not None
                and latest.ph >= EASE_PH
                and _r(latest.pco2 / a.pco2_target - 1) <= -PCO2_CHANGE
            )
            alkalaemic = latest.ph > PH_HIGH and latest.hco3 > HCO3_HIGH and latest.pco2 < a.pco2
            if below_aim or alkalaemic:
                fired = (a, latest, below_aim)
        if fired is None:
            return
        a, b, below_aim = fired
        said = []
        if below_aim:
            said.append(
                f"PCO2 {self.p(b.pco2)} at {self.when(b)} is {(1 - b.pco2 / a.pco2_target) * 100:.0f} % "
                f"below the aim of {self.p(a.pco2_target)} read from the gas at {self.when(a)}"
            )
        if b.ph > PH_HIGH:
            said.append(f"pH {b.ph:.2f} with HCO3 {b.hco3:.1f} mmol/L at {self.when(b)}")
        if b.group == "venous":
            ease = (
                "The team may ease ventilation; a venous gas gives no PaCO2 aim, so confirm on an arterial "
                "or earlobe gas before setting one"
            )
        else:
            floor = ph_735_pco2(b.pco2, b.ph)
            if a.pco2_target is not None and a.pco2_target <= floor:
                towards = f"the aim of {self.p(a.pco2_target)}"
            else:
                towards = (
                    f"{self.p(floor)}, the PCO2 that would give pH 7.35 with today's HCO3 (Henderson-"
                    "Hasselbalch): letting it rise further would make the blood acidaemic again"
                )
                if a.pco2_target is not None:
                    towards += f" (the earlier aim of {self.p(a.pco2_target)} no longer fits)"
            ease = f"The team may ease ventilation towards {towards}"
        self.r.finding(
            "pco2_falling_fast",
            "urgent" if b.ph > PH_HIGH else "notable",
            "; ".join(said)
            + ". The CO2 is coming down faster than the kidneys can shed the HCO3 they retained: "
            f"post-hypercapnic alkalosis. {ease}, with senior advice and local protocols.",
        )

    def threshold_finding(self) -> None:
        """The latest arterial or earlobe gas meets the NIV threshold (its reading's ``niv_criteria_met``)."""
        last = self.gases[-1]
        if last.intubated or "niv_criteria_met" not in last.codes():
            return
        limit = self.p(units.convert(NIV_PCO2_KPA, "kPa", "mmHg"))
        values = f"pH {last.ph:.2f} (below 7.35) with PaCO2 {self.p(last.pco2)} (above {limit})"
        if last.on_niv:
            if "niv_not_improving" in {f["code"] for f in self.r.findings}:
                return  # that finding already says it
            self.r.finding(
                "latest_gas_meets_niv_threshold",
                "notable",
                f"The latest gas ({self.when(last)}), taken on NIV, still meets the NIV threshold: {values}. "
                "Repeat the gas 1-2 hours after NIV starts and at 4-6 hours, and act on the NIV verdict "
                "(BTS/ICS 2016).",
            )
            return
        then = [e for e in ("niv_started", "intubated") if e in last.events]
        if then:
            self.r.finding(
                "latest_gas_meets_niv_threshold",
                "notable",
                f"The latest gas ({self.when(last)}) meets the NIV threshold: {values}; "
                f"{then[0].replace('_', ' ').replace('niv', 'NIV')} after it. Repeat the gas 1-2 hours later "
                "(BTS/ICS 2016).",
            )
            return
        before = [(g, e) for g in self.gases[:-1] for e in ("niv_stopped", "extubated") if e in g.events]
        if before:
            g, event = before[-1]
            what = "NIV was stopped" if event == "niv_stopped" else "extubation"
            opening = (
                f"Relapse after {what} at {self.when(g)}: the latest gas ({self.when(last)}) meets the NIV "
                f"threshold: {values}. "
            )
        else:
            opening = f"The latest gas ({self.when(last)}) meets the NIV threshold: {values}. "
        invasive = (
            f" pH below {NIV_INVASIVE_PH:.2f}: the guideline calls for a setting with ready access to "
            "invasive ventilation."
            if last.ph < NIV_INVASIVE_PH
            else ""
        )
        self.r.finding(
            "latest_gas_meets_niv_threshold",
            "urgent",
            opening + "BTS/ICS 2016 recommends NIV when this persists after optimal medical treatment "
            "(controlled oxygen included); decide with senior advice and local protocols." + invasive,
        )

    def summary_and_cautions(self, inputs: Inputs) -> None:
        gases, r = self.gases, self.r
        first, last = gases[0], gases[-1]
        said = r.summary

        def say(sentence: str) -> None:
            if sentence not in said:
                r.say(sentence)

        codes = set()
        for severity in ("urgent", "notable"):  # what changes care first, each statement once
            for f in r.findings:
                if f["severity"] == severity:
                    say(f["text"])
                    codes.add(f["code"])
        say(
            f"{len(gases)} gases over {_duration(last.minutes)}: pH {first.ph:.2f} to {last.ph:.2f}, PCO2 "
            f"{self.p(first.pco2)} to {self.p(last.pco2)}, HCO3 {first.hco3:.1f} to {last.hco3:.1f} mmol/L."
        )
        niv = r.outputs.get("niv_response")
        niv_said = "niv_not_improving" in codes
        same = (
            niv is not None
            and self.response_span is not None
            and (niv["earlier"], niv["later"])
            == (self.response_span[2]["earlier"], self.response_span[2]["later"])
        )
        if self.response_span is not None and not (same and niv_said):
            start, end, span = self.response_span
            on_niv = f", on NIV for {_niv_length(niv)}" if same else ""
            say(
                f"Since the first acidaemic gas ({self.when(start)}, pH {start.ph:.2f}){on_niv}: "
                f"{span['verdict'].replace('_', ' ')} (pH {end.ph:.2f} at {self.when(end)})"
                + ("; NIV since stopped." if same and not niv["running"] else ".")
            )
        elif self.response_span is None and any(
            g.ph_status == "acidaemia" and g.group != last.group for g in gases
        ):
            say(
                "No verdict since the first acidaemic gas: it was "
                + ("venous" if last.group == "arterial" else "arterial or earlobe")
                + " and venous gases are not compared with arterial or earlobe ones."
            )
        if niv is not None and not niv_said and not same:
            say(
                f"On NIV for {_niv_length(niv)}: pH change {niv['ph_change']:+.2f}, "
                f"{niv['verdict'].replace('_', ' ')}" + ("." if niv["running"] else " (NIV since stopped).")
            )
        if last.interpretation:
            aim = f"; PaCO2 aim {self.p(last.pco2_target)}" if last.pco2_target is not None else ""
            say(f"Latest gas ({self.when(last)}): {last.interpretation.rstrip('.')}{aim}.")
        if self.history_from is not None:
            say(
                f"From the gas at {self.when(self.history_from)} on, the SpO2 target is that after NIV or "
                "intubation for hypercapnic failure, which this course shows: 88-92 % unless a range is "
                "prescribed (BTS 2017)."
            )
        for key in PATIENT_KEYS:
            if inputs.given(key) and key not in blood_gas_keys():
                r.caution(
                    f"{key} was recorded, but this version's reading of a single gas does not use it yet."
                )
        r.caution(
            "Decision support only: the verdicts compare gases with fixed thresholds (a change under 0.03 pH "
            "or 8 % PCO2 counts as none). They do not replace assessing the patient, senior advice or local "
            "protocols."
        )


def _niv_length(niv: dict) -> str:
    """How long on NIV, from the ``niv_response`` output (``at least`` when the start was not recorded)."""
    return ("" if niv["start_known"] else "at least ") + _duration(niv["minutes_on_niv"])


def _duration(minutes: float) -> str:
    """Minutes as text: ``45 min``, ``2 h 10 min``.

    >>> _duration(45), _duration(130), _duration(240)
    ('45 min', '2 h 10 min', '4 h')
    """
    total = round(minutes)
    if abs(total) < 60:
        return f"{total} min"
    hours, rest = divmod(total, 60)
    return f"{hours} h" + (f" {rest} min" if rest else "")
