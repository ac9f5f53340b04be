"""Typed text -> request values: the one cell reader of the command line and the batch audit.

======================  ================================================================================
``split_cell``          (state, number, unit) of a typed value: "9.3kPa", " 7.24 ", "NA", "7,19"
``censored``            ("<" or ">", number, unit) of a censored result: "<0.5", "> 33.3 mmol/L"
``canonical_unit``      a unit as Tidewell spells it ("kpa" -> "kPa", "mm Hg" -> "mmHg", "°C" -> "degC")
``typed_value``         one blood_gas input typed as text, in the form a request carries it
``column_key``          the input key and unit a column header names: "pCO2 (kPa)" -> ("pco2", "kPa")
``site_word``           a sample site as written in an export ("ABG", "cap") -> arterial, venous, capillary
``role_column``         the course columns a header names: "Taken at" -> "time", "Episode ID" -> "episode"
``event_words``         an events cell -> its event words (``niv started | oxygen-increased`` -> two words)
``time_value``          a time cell as a course request carries it (minutes, or the date-time text)
``course_sample``       a row's blood_gas inputs, time and events -> one sample of a course request (the
                        one place a row becomes a sample: ``tidewell course`` and ``batch --episodes``)
======================  ================================================================================

The spellings accepted here are Tidewell's own list (docs/cli.md), written from the names the trade uses
for the quantities (pH, PCO2, PaCO2, HCO3, base excess, FiO2, SpO2, Na, K, Cl ...); nothing else is
guessed. Standard library only: the single-sample command line imports this without numpy.
"""

from __future__ import annotations

import math
import re

from .. import units

#: cell or flag texts that mean "not given"
EMPTY = frozenset({"", "na", "n/a", "null", "none", "nan", "-"})
TRUE, FALSE = frozenset({"true", "yes", "y", "1"}), frozenset({"false", "no", "n", "0"})
ABSENT, NUMBER, BAD = 0, 1, 2
_NUMBER_UNIT = re.compile(r"^\s*([+-]?(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][+-]?\d+)?)\s*([A-Za-z%°µμ].*?)?\s*$")
_DECIMAL_COMMA = re.compile(r"^(\s*[+-]?\d*),(\d+\b)")
_CENSORED = re.compile(r"^\s*(<=?|>=?|≤|≥)\s*(.+?)\s*$")
_UNIT_FOLD = {u.casefold(): u for u in units.ALL_UNITS}
_UNIT_FOLD.update({"°c": "degC", "c": "degC", "°f": "degF", "f": "degF", "torr": "mmHg", "meq/l": "mEq/L"})

#: inputs whose accepted units all give the same number (mmol/L = mEq/L for a monovalent ion; osmolality has
#: one unit), so a bare number is read in that unit without any guess. Everything else needs its unit:
#: glucose, lactate, urea, phosphate, calcium and magnesium differ between mmol/L, mEq/L and mg/dL.
IMPLIED_UNITS = {
    "hco3": "mmol/L",
    "base_excess": "mmol/L",
    "na": "mmol/L",
    "k": "mmol/L",
    "cl": "mmol/L",
    "measured_osmolality": "mOsm/kg",
}


def canonical_unit(text: str | None) -> str | None:
    """A unit as Tidewell spells it, matched ignoring case and blanks ("kpa" -> "kPa", "mm Hg" -> "mmHg",
    "°C" -> "degC"); unknown text is returned unchanged (the bridge then names the accepted units).

    >>> canonical_unit("kpa"), canonical_unit("MMOL/L"), canonical_unit(" C "), canonical_unit("stone")
    ('kPa', 'mmol/L', 'degC', 'stone')
    >>> canonical_unit("mm Hg"), canonical_unit("mmol / l")
    ('mmHg', 'mmol/L')
    """
    if text is None:
        return None
    stripped = text.strip()
    if not stripped:
        return None
    folded = stripped.casefold()
    return _UNIT_FOLD.get(folded) or _UNIT_FOLD.get("".join(folded.split()), stripped)


def split_cell(text: str | None, decimal_comma: bool = False) -> tuple[int, float | None, str | None]:
    """(state, number, unit) of a typed value: ABSENT, NUMBER (with its unit or None) or BAD.

    ``decimal_comma``: a comma between digits is the decimal mark ("7,19"), as in a file whose cells are
    separated by semicolons or tabs; otherwise such a cell is BAD.

    >>> split_cell("9.3kPa"), split_cell(" 7.24 "), split_cell("NA"), split_cell("7,4")
    ((1, 9.3, 'kPa'), (1, 7.24, None), (0, None, None), (2, None, None))
    >>> split_cell("7,19", decimal_comma=True), split_cell("9,3 kPa", decimal_comma=True)
    ((1, 7.19, None), (1, 9.3, 'kPa'))
    """
    if text is None or text.strip().casefold() in EMPTY:
        return ABSENT, None, None
    try:
        number = float(text)
    except ValueError:
        if decimal_comma and "," in text:
            text = _DECIMAL_COMMA.sub(r"\1.\2", text, count=1)
        m = _NUMBER_UNIT.match(text)
        if not m:
            return BAD, None, None
        number, unit = float(m.group(1)), canonical_unit(m.group(2))
    else:
        unit = None
    if not math.isfinite(number):
        return BAD, None, None
    return NUMBER, number, unit


def censored(text: str, decimal_comma: bool = False) -> tuple[str, float, str | None] | None:
    """("<" or ">", bound, unit or None) of a censored result as laboratories write it, else None.

    >>> censored("<0.5"), censored("> 33.3 mmol/L"), censored("≥ 15"), censored("haemolysed")
    (('<', 0.5, None), ('>', 33.3, 'mmol/L'), ('>', 15.0, None), None)
    """
    m = _CENSORED.match(text)
    if not m:
        return None
    state, number, unit = split_cell(m.group(2), decimal_comma)
    if state != NUMBER:
        return None
    return ("<" if m.group(1) in ("<", "<=", "≤") else ">"), number, unit


_KINDS: dict[str, str] = {}


def kinds() -> dict[str, str]:
    """input key -> how the blood_gas reader reads it (interpret.FIELDS), looked up once."""
    if not _KINDS:
        from ..calculations.blood_gas import FIELDS

        _KINDS.update({f.key: f.kind for f in FIELDS})
    return _KINDS


#: inputs whose usual values run into thousands (an altitude, a barometric pressure in hPa or Pa): "8.000" and
#: "8,000" may be a thousands separator
LARGE_VALUES = frozenset({"altitude", "pb", "origin_altitude", "ceiling", "cylinder_pressure"})
THOUSANDS = re.compile(r"^\s*(\d{1,3}[.,]\d{3})\s*([A-Za-z%°].*?)?\s*$")


def typed_value(key: str, text: str, default_unit: str | None = None, decimal_comma: bool = False):
    """One blood_gas input typed as text, in the form a request carries it (None when not given).

    Dimensioned inputs become ``{"value", "unit"}`` (the unit typed, else ``default_unit``, else none: the
    bridge then says which units it accepts); pH, age and the other bare numbers stay numbers; ``28%``
    becomes ``{"value": 28, "unit": "%"}``; flags read true/false, yes/no, y/n, 1/0; the sample site reads
    the spellings of :data:`SITE_WORDS`; other words are lower-cased. Text that is not a number is passed on
    as text, so the bridge names the problem.

    >>> typed_value("pco2", "9.3kPa"), typed_value("pco2", "70", "mmHg"), typed_value("fio2", "28%")
    ({'value': 9.3, 'unit': 'kPa'}, {'value': 70.0, 'unit': 'mmHg'}, {'value': 28.0, 'unit': '%'})
    >>> typed_value("ph", "7.24"), typed_value("hypercapnia_risk", "yes"), typed_value("sample", "ABG")
    (7.24, True, 'arterial')
    """
    kind = kinds().get(key, "quantity")
    if text is None or text.strip().casefold() in EMPTY:
        return None
    if kind == "choice":
        return site_word(text) if key == "sample" else text.strip().casefold()
    if kind == "flag":
        folded = text.strip().casefold()
        return True if folded in TRUE else False if folded in FALSE else text.strip()
    if kind == "range":
        low, _, high = text.strip().rstrip("%").partition("-")
        try:
            return {"low": float(low), "high": float(high)}
        except ValueError:
            return text.strip()
    if key in LARGE_VALUES and THOUSANDS.match(text):
        # "8.000 ft" or "8,000 ft": a thousands separator or a decimal mark? never guessed: the text goes on
        # as typed, and the bridge asks, offering both readings
        number_text, unit = THOUSANDS.match(text).group(1, 2)
        return {"value": number_text, "unit": canonical_unit(unit) or default_unit}
    state, number, unit = split_cell(text, decimal_comma)
    unit = unit if unit is not None else default_unit
    value = number if state == NUMBER else text.strip()
    if kind in ("quantity", "concentration"):
        return {"value": value, "unit": unit}
    if unit is not None and state == NUMBER:
        return {"value": value, "unit": unit}
    return value


# -- names in exports ----------------------------------------------------------------------------------------

#: the sample sites as exports and people write them (matched ignoring case, blanks and dots)
SITE_WORDS = {
    "arterial": ("arterial", "art", "a", "abg", "arterial blood", "arterial blood gas", "arterial line"),
    "venous": (
        "venous",
        "ven",
        "v",
        "vbg",
        "venous blood",
        "venous blood gas",
        "peripheral venous",
        "central venous",
        "mixed venous",
    ),
    "capillary": (
        "capillary",
        "cap",
        "c",
        "cbg",
        "capillary blood",
        "capillary blood gas",
        "arterialised capillary",
        "arterialized capillary",
        "arterialised capillary blood",
        "arterialized capillary blood",
        "earlobe",
        "ear lobe",
        "earlobe capillary",
        "ear lobe capillary",
    ),
}


def _fold_words(text: str) -> str:
    return " ".join(text.casefold().replace(".", " ").replace("_", " ").replace("-", " ").split())


_SITES = {_fold_words(word): site for site, words in SITE_WORDS.items() for word in words}


def site_word(text: str) -> str:
    """The site a cell names ("ABG" -> "arterial", "arterialised capillary" -> "capillary"); other text is
    returned lower-cased, so the reader names it as a problem.

    >>> site_word("VBG"), site_word(" Art. "), site_word("Arterialised capillary"), site_word("foot")
    ('venous', 'arterial', 'capillary', 'foot')
    """
    return _SITES.get(_fold_words(text), text.strip().casefold())


#: other names of the inputs as column headers (matched with case, blanks, "_", "-", "." and an ion's
#: trailing charge ignored: "HCO3-", "Na+", "Ca2+"); every input key is also its own name
HEADER_NAMES = {
    "pco2": ("paco2", "pvco2"),
    "po2": ("pao2", "pvo2"),
    "hco3": ("bicarbonate", "bicarb", "hco3 act", "actual bicarbonate", "actual hco3"),
    "base_excess": ("be", "base excess", "be ecf", "beecf", "be b", "abe", "sbe", "be(ecf)", "be(b)"),
    "fio2": ("inspired oxygen", "inspired o2", "fi o2"),
    "sample": ("site", "sample site", "sample type", "specimen", "specimen type"),
    "na": ("sodium",),
    "k": ("potassium",),
    "cl": ("chloride",),
    "albumin": ("alb",),
    "lactate": ("lac", "lactic acid"),
    "glucose": ("glu", "gluc", "blood glucose"),
    "phosphate": ("phos", "po4", "phosphorus"),
    "measured_osmolality": ("osmolality", "osm", "osmo", "measured osm", "serum osmolality"),
    "hb": ("haemoglobin", "hemoglobin", "hgb", "thb", "total hb"),
    "spo2": ("sats", "pulse oximetry", "oxygen saturation by pulse oximetry"),
    "age": ("age years", "age in years"),
    "temperature": ("temp", "body temperature", "patient temperature"),
    "pb": ("barometric pressure", "baro", "atmospheric pressure"),
    "baseline_pco2": ("usual pco2", "usual paco2", "baseline paco2"),
    "ca_ionised": ("ionised calcium", "ionized calcium", "ica", "ca ionised", "ca ionized", "ca ion"),
    "mg": ("magnesium",),
}
_CHARGE = re.compile(r"(?<=[a-z0-9])\s*(?:\d?\+\+?|--?)$")
_UNIT_PART = re.compile(r"^(.*?)\s*(?:\[\s*([^\]]*?)\s*\]|\(\s*([^)]*?)\s*\))\s*$")


def _fold_name(text: str) -> str:
    folded = text.casefold().strip()
    folded = _CHARGE.sub("", folded)
    return re.sub(r"[\s_\-.]", "", folded)


_NAMES: dict[str, str] = {}


def _names() -> dict[str, str]:
    if not _NAMES:
        for key in kinds():
            _NAMES[_fold_name(key)] = key
        for key, names in HEADER_NAMES.items():
            for name in names:
                _NAMES.setdefault(_fold_name(name), key)
    return _NAMES


def column_key(header: str) -> tuple[str | None, str | None, str]:
    """(input key or None, unit written in the header or None, the header's name part folded).

    The unit goes in brackets or parentheses after the name (``pco2[kPa]``, ``pCO2 (kPa)``) or follows it
    after a blank (``PaCO2 kPa``) when it is a unit Tidewell knows.

    >>> column_key("pCO2 (kPa)"), column_key("PaCO2[kPa]"), column_key("HCO3- (mmol/L)")
    (('pco2', 'kPa', 'pco2'), ('pco2', 'kPa', 'paco2'), ('hco3', 'mmol/L', 'hco3'))
    >>> column_key("Na+"), column_key("Sample type"), column_key("FiO2 (%)"), column_key("ward")
    (('na', None, 'na'), ('sample', None, 'sampletype'), ('fio2', '%', 'fio2'), (None, None, 'ward'))
    """
    names = _names()
    text = header.strip()
    unit = None
    m = _UNIT_PART.match(text)
    if m and m.group(1):
        written = m.group(2) if m.group(2) is not None else m.group(3)
        canonical = canonical_unit(written)
        if m.group(2) is not None or canonical in units.ALL_UNITS:
            text, unit = m.group(1), canonical
    folded = _fold_name(text)
    if folded not in names and unit is None and " " in text:
        name, _, last = text.rpartition(" ")
        if canonical_unit(last) in units.ALL_UNITS and _fold_name(name) in names:
            text, unit = name, canonical_unit(last)
            folded = _fold_name(text)
    return names.get(folded), unit, folded


#: the columns of a course that are not blood_gas inputs: the episode key (which patient's stay a gas
#: belongs to), when the gas was taken and what was changed just after it (Tidewell's own list)
ROLE_NAMES = {
    "episode": (
        "episode",
        "episode id",
        "episode key",
        "episode number",
        "episode no",
        "encounter",
        "encounter id",
        "admission id",
        "stay id",
    ),
    "time": (
        "time",
        "taken at",
        "sampled at",
        "sample time",
        "time taken",
        "collected at",
        "collection time",
        "date time",
        "datetime",
    ),
    "events": ("events", "event", "changes", "change made", "interventions"),
}
_ROLES = {_fold_name(name): role for role, names in ROLE_NAMES.items() for name in names}


def role_column(header: str) -> str | None:
    """``episode``, ``time`` or ``events`` when a header names that course column (matched as the input
    names are: case, blanks, "_", "-" and "." ignored), else None.

    >>> role_column("Episode"), role_column("Taken at"), role_column("EVENTS"), role_column("pH")
    ('episode', 'time', 'events', None)
    """
    return _ROLES.get(_fold_name(header))


# -- course rows ---------------------------------------------------------------------------------------------

_SEPARATORS = re.compile(r"[|;]")


def event_words(cell: str | None) -> list[str]:
    """The event words of an events cell (unknown words are kept: the bridge names them).

    >>> event_words("niv started | Oxygen-Decreased"), event_words(""), event_words("intubated;")
    (['niv_started', 'oxygen_decreased'], [], ['intubated'])
    """
    if not cell:
        return []
    words = []
    for part in _SEPARATORS.split(cell):
        word = "_".join(part.strip().casefold().replace("-", " ").split())
        if word:
            words.append(word)
    return words


def time_value(cell: str):
    """A time cell as the request carries it: a number of minutes, else the text (None when empty)."""
    text = cell.strip()
    if not text:
        return None
    try:
        return float(text) if "." in text or "e" in text.casefold() else int(text)
    except ValueError:
        return text


def course_sample(inputs: dict, time_cell: str, events_cell: str, site_default: str) -> tuple[dict, bool]:
    """(a row as one sample of a course request, whether the row gave its site): ``inputs`` are the row's
    blood_gas inputs as the batch's reader gives them (``batch.row_inputs(table, i, site_default="")``), with
    its time and its event words; a row without a site is read as ``site_default``."""
    site_given = bool(inputs.get("sample"))
    if not site_given:
        inputs["sample"] = site_default
    sample = {"time": time_value(time_cell), "inputs": inputs}
    words = event_words(events_cell)
    if words:
        sample["events"] = words
    return sample, site_given
