"""Batch audit: the blood_gas interpretation of every row of a CSV file, vectorized with numpy.

==========================  ==============================================================================
``read_table``              CSV text -> ``Table``: input columns (named by the contract's input keys, units in
                            a ``pco2[kPa]`` header suffix, a units row, or in the cell: ``9.3 kPa``) and the
                            other columns, copied through
``interpret_table``         every row of a ``Table`` -> ``Audit`` (outputs, findings and errors per row)
``row_inputs``              one row as the ``inputs`` of a blood_gas request (what the bridge would be sent)
``write_csv``               every input column, then the main outputs and the findings of each row
``summary``, ``summary_text``  counts per disorder, chronicity and finding
``run``                     what ``tidewell batch IN.csv -o OUT.csv`` does
==========================  ==============================================================================

One implementation of each rule: a row is read with the blood_gas reader's own field table
(:data:`tidewell.interpret.FIELDS`: units, ranges, defaults) and its cross-field checks, and interpreted by
:func:`tidewell.interpret.decide`, the function the scalar report is written from. The batch path only runs
them on arrays. Rows the array reader cannot pass as plainly valid (any doubt at all: a bad cell, a value
out of range, a unit that needs a guess, a cross-field conflict) are read by the scalar reader itself, which
either accepts them or gives the bridge's own error messages; a row's errors go in its ``error`` column and
the batch goes on. tests/core/test_batch.py checks on thousands of generated rows that every row equals the
scalar bridge's answer for the same inputs.

Cells: empty, ``NA``, ``N/A``, ``null``, ``none``, ``nan`` and ``-`` mean "not given". Numbers use a point for
decimals. Units are matched ignoring case (``kpa`` is kPa; ``C`` and ``°C`` are degC). ``hypercapnia_risk`` is
true/false, yes/no, y/n or 1/0. FiO2 and SpO2 may be written ``28%``.
"""

from __future__ import annotations

import contextlib
import csv
import difflib
import gc
import io
import math
import re
import sys
import time
from collections import Counter
from dataclasses import dataclass, field
from itertools import compress, repeat
from types import SimpleNamespace

import numpy as np

from . import interpret, units
from .arrays import each
from .cells import (
    ABSENT,
    BAD,
    EMPTY,
    FALSE,
    IMPLIED_UNITS,
    NUMBER,
    TRUE,
    canonical_unit,
    split_cell,
    typed_value,
)
from .errors import InputErrors
from .fields import Inputs

FIELDS = {f.key: f for f in interpret.FIELDS}
#: rows interpreted at a time (the progress bar moves per chunk)
CHUNK = 10_000
_ABSENT, _OK, _BAD = ABSENT, NUMBER, BAD
_HEADER = re.compile(r"^\s*([^\[\]]*?)\s*(?:\[\s*([^\]]*?)\s*\])?\s*$")


@contextlib.contextmanager
def _no_gc():
    """The cyclic garbage collector paused: the batch makes no reference cycles, and with a whole file of
    strings in memory each collection would walk them all (a third of the time on 100,000 rows)."""
    was = gc.isenabled()
    gc.disable()
    try:
        yield
    finally:
        if was:
            gc.enable()


class TableError(ValueError):
    """A problem with the file as a whole (no row could be read); the message names what to change."""


# -- reading the file ---------------------------------------------------------------------------------------


@dataclass
class Column:
    """One input column: the cell texts, and per cell its state, number and unit (the column's by default).

    Cells are read once per distinct text: ``code[i]`` is the index of row ``i``'s text in ``distinct``, and
    the state, number and unit of each distinct text are looked up through it.
    """

    key: str
    header: str
    unit: str | None
    cells: list[str]
    state: np.ndarray = None
    number: np.ndarray = None
    own_units: dict = None  #: row -> the unit written in that cell (where it differs from none)
    unit_array: np.ndarray = None  #: per row, the cell's unit, else the column's ("" for none); str
    code: np.ndarray = None  #: per row, the index of its text in ``distinct``
    distinct: list = None  #: the distinct cell texts, in the order first seen
    typed: list = None  #: per distinct text, its value as a request carries it (filled as rows need it)


@dataclass
class Table:
    """A CSV file of samples: input columns by key, every column's text, and where each row came from."""

    header: list[str]
    columns: dict[str, Column]
    units_row: list[str] | None = None
    line: list[int] = field(default_factory=list)
    warnings: list[str] = field(default_factory=list)
    #: every column's cells (lists), as read
    by_column: list = field(default_factory=list)
    #: True when no cell can hold a comma, a quote or a line break (a comma-separated file without quotes)
    plain: bool = False
    #: for a plain file, each row's line as it was (its cells joined by commas); else None
    texts: list[str] | None = None
    n: int = 0

    def __len__(self) -> int:
        return self.n

    @property
    def rows(self) -> list[list[str]]:
        """Every row's cells (built on request: the batch itself works on columns)."""
        return [list(row) for row in zip(*self.by_column, strict=True)] if self.n else []


def read_table(text: str) -> Table:
    """Parse CSV text (comma, semicolon or tab separated, detected) into a :class:`Table`.

    Raises
    ------
    TableError
        No header, a required column (``ph``, ``pco2``) missing, an input column named twice, or a
        dimensioned column with no unit anywhere.
    """
    with _no_gc():
        return _read_table(text)


def _kept(cells) -> bool:
    """The csv reader's rows worth reading: not empty and not only blanks."""
    return any(cells) and bool(cells[0].strip() or "".join(cells).strip())


#: a line that starts with a blank or a comma, or is empty (``\s`` is ``str.isspace``)
_STARTS_BLANK = re.compile(r"^[\s,]", re.MULTILINE).search


def _plain_lines(text: str, dialect):
    """(line numbers, lines) of a comma-separated text without quotes whose rows all have as many cells as
    its first; None for any other text (the csv module reads it). Each line is then its cells joined by
    commas, exactly as the csv reader would split it."""
    if dialect.delimiter != "," or dialect.skipinitialspace or '"' in text:
        return None
    if "\r" in text:
        text = text.replace("\r\n", "\n")
        if "\r" in text:
            return None
    lines = text.split("\n")
    # the rows the csv reader keeps: a line that starts with a comma or a blank is checked in full
    if _STARTS_BLANK(text):
        numbers = [
            n
            for n, line in enumerate(lines, 1)
            if line and (not (line[0] == "," or line[0].isspace()) or line.replace(",", "").strip())
        ]
    else:  # no line starts with one (nor is empty), except an end after the last line break
        numbers = list(range(1, len(lines) + (0 if lines[-1] else -1) + 1))
    if not numbers:
        return [], []
    kept = [lines[n - 1] for n in numbers]
    commas = kept[0].count(",")
    if list(map(str.count, kept, repeat(","))).count(commas) != len(kept):
        return None
    return numbers, kept


def _read_table(text: str) -> Table:
    sample = text[:20_000]
    try:
        dialect = csv.Sniffer().sniff(sample, delimiters=",;\t")
    except csv.Error:
        dialect = csv.excel
    plain_lines = _plain_lines(text, dialect)
    warnings_: list[str] = []
    if plain_lines is not None:
        numbers, kept = plain_lines
        if not kept:
            raise TableError("the file is empty: the first line must name the columns (ph, pco2[kPa], ...)")
        header_cells = kept[0].split(",")
        first = kept[1].split(",") if len(kept) > 1 else None
    else:
        reader = csv.reader(io.StringIO(text), dialect)
        try:
            lines = [(reader.line_num, row) for row in reader if _kept(row)]
        except csv.Error as exc:  # e.g. a carriage return alone inside a line
            raise TableError(
                f"line {reader.line_num} cannot be read as CSV ({exc}); save the file again as CSV"
            ) from None
        if not lines:
            raise TableError("the file is empty: the first line must name the columns (ph, pco2[kPa], ...)")
        header_cells = lines[0][1]
        first = lines[1][1] if len(lines) > 1 else None
    header = [cell.strip() for cell in header_cells]
    width = len(header)
    keys, head_units, bases, warnings = _header(header)
    units_row = None
    skip = 1
    if first is not None and _is_units_row(first, keys):
        units_row = [c.strip() for c in first]
        skip = 2
        for i, cell in enumerate(units_row):
            if i < len(keys) and keys[i] is not None and cell and head_units[i] is None:
                head_units[i] = canonical_unit(cell)
    if plain_lines is not None:
        texts = kept[skip:]
        line_numbers = numbers[skip:]
        n = len(texts)
        cells = ",".join(texts).split(",") if n else []
        by_column = [cells[j::width] for j in range(width)] if n else [[] for _ in range(width)]
    else:
        body = lines[skip:]
        texts = None
        line_numbers = [number for number, _ in body]
        n = len(body)
        rows = [row if len(row) == width else (row + [""] * (width - len(row)))[:width] for _, row in body]
        for number, row in body:
            if len(row) > width and any(c.strip() for c in row[width:]):
                warnings_.append(
                    f"line {number}: {len(row) - width} cell(s) beyond the last named column are ignored"
                )
        by_column = (
            [list(column) for column in zip(*rows, strict=True)] if rows else [[] for _ in range(width)]
        )
    warnings.extend(warnings_)
    columns = {}
    for i, key in enumerate(keys):
        if key is None:
            continue
        columns[key] = Column(key, header[i], head_units[i], by_column[i])
    for required in ("ph", "pco2"):
        if required not in columns:
            close = difflib.get_close_matches(required, bases, n=1, cutoff=0.6)
            hint = f" ('{close[0]}' looks like it: rename that column '{required}')" if close else ""
            raise TableError(
                f"the file has no '{required}' column{hint}; columns found: {', '.join(header) or 'none'}"
            )
    plain = dialect.delimiter == "," and '"' not in text
    table = Table(header, columns, units_row, line_numbers, warnings, by_column, plain, texts, n)
    for column in columns.values():
        if column.unit is None:
            column.unit = IMPLIED_UNITS.get(column.key)
        _parse_column(column)
        f = FIELDS[column.key]
        if f.kind in ("quantity", "concentration") and column.unit is None and n:
            if not column.own_units and (column.state == _OK).any():
                example = f.options.get("unit", "mmol/L")
                raise TableError(
                    f"column '{column.header}' has no unit: write it in the header "
                    f"('{column.key}[{example}]'), "
                    f"in a units row under the header, or in each cell ('{column.key}' as '7.1 {example}')"
                )
    return table


def _header(header: list[str]):
    """(input key or None, unit, base name, warnings) of each header cell."""
    keys, head_units, bases, warnings, seen = [], [], [], [], {}
    for i, name in enumerate(header):
        m = _HEADER.match(name)
        base, unit = (m.group(1), m.group(2)) if m else (name, None)
        key = base.strip().casefold().replace(" ", "_")
        bases.append(key)
        if key in FIELDS:
            if key in seen:
                raise TableError(f"columns {seen[key] + 1} and {i + 1} both name the input '{key}'")
            seen[key] = i
            keys.append(key)
            head_units.append(canonical_unit(unit))
        else:
            keys.append(None)
            head_units.append(None)
    for i, key in enumerate(bases):
        if keys[i] is not None:
            continue
        close = difflib.get_close_matches(key, list(FIELDS), n=1, cutoff=0.75)
        if close and close[0] not in seen:
            warnings.append(
                f"column '{header[i]}' is not an input (did you mean '{close[0]}'?); "
                "it is copied through unread"
            )
    return keys, head_units, bases, warnings


def _is_units_row(row: list[str], keys: list) -> bool:
    """True when the first data row holds units only (at least one), and no number."""
    found = False
    for i, cell in enumerate(row):
        text = cell.strip()
        if not text:
            continue
        if i < len(keys) and keys[i] is not None:
            unit = canonical_unit(text)
            if unit in units.ALL_UNITS:
                found = True
                continue
        state, _, _ = split_cell(text)
        if state == _OK:
            return False
    return found


#: header units that only restate the unit a bare-number input already has
_BARE_UNITS = {"age": {"years", "year", "yrs", "yr", "y"}}


def _factorize(cells: list[str]) -> tuple[np.ndarray, list[str]]:
    """(per cell the index of its text among the distinct texts, the distinct texts in first-seen order)."""
    index = {text: i for i, text in enumerate(dict.fromkeys(cells))}
    code = np.fromiter(map(index.__getitem__, cells), dtype=np.intp, count=len(cells))
    return code, list(index)


def _read_cell(text: str) -> tuple[int, float, str | None]:
    """(state, number or NaN, unit written in the cell or None) of one number cell."""
    if not text:
        return _ABSENT, math.nan, None
    try:
        x = float(text)
    except ValueError:
        s, x, u = split_cell(text)
        return s, (math.nan if x is None else x), u
    if math.isfinite(x):
        return _OK, x, None
    return (_ABSENT if text.strip().casefold() in EMPTY else _BAD), math.nan, None


def _parse_column(column: Column) -> None:
    """Each distinct cell text read once (a column of 100,000 gases holds a few thousand at most)."""
    kind = FIELDS[column.key].kind
    if column.unit is not None and column.unit.casefold() in _BARE_UNITS.get(column.key, ()):
        column.unit = None
    code, distinct = _factorize(column.cells)
    column.code, column.distinct = code, distinct
    default_unit = column.unit or ""
    if kind in ("choice", "flag"):
        states = [_ABSENT if text.strip().casefold() in EMPTY else _OK for text in distinct]
        numbers = [math.nan] * len(distinct)
        cell_units = [None] * len(distinct)
    else:
        read = [_read_cell(text) for text in distinct]
        states = [s for s, _, _ in read]
        numbers = [x for _, x, _ in read]
        cell_units = [u for _, _, u in read]
    column.state = np.array(states, dtype=np.int8)[code] if distinct else np.zeros(0, dtype=np.int8)
    column.number = np.array(numbers, dtype=float)[code] if distinct else np.zeros(0)
    own: dict[int, str] = {}
    with_unit = [k for k, u in enumerate(cell_units) if u is not None]
    unit_text = np.array([default_unit if u is None else u for u in cell_units] or [""], dtype=str)
    column.unit_array = unit_text[code] if distinct else np.zeros(0, dtype=str)
    if with_unit:
        rows = np.flatnonzero(np.isin(code, with_unit)).tolist()
        own = dict(zip(rows, column.unit_array[rows].tolist(), strict=True))
    column.own_units = own


# -- one row as a request ---------------------------------------------------------------------------------


def _cell_value(column: Column, i: int):
    """The value of one cell as a blood_gas request carries it (None when not given)."""
    if column.typed is None:
        column.typed = [None] * len(column.distinct)
    k = int(column.code[i])
    value = column.typed[k]
    if value is None:
        value = column.typed[k] = (typed_value(column.key, column.cells[i], column.unit),)
    value = value[0]
    return dict(value) if isinstance(value, dict) else value


def row_inputs(table: Table, i: int) -> dict:
    """Row ``i`` as the ``inputs`` of a blood_gas request (only what the row gives)."""
    out = {}
    for key, column in table.columns.items():
        value = _cell_value(column, i)
        if value is not None:
            out[key] = value
    return out


# -- the array reader ---------------------------------------------------------------------------------------


def _read_arrays(table: Table, rows: np.ndarray):
    """Read ``rows`` with the blood_gas field table on arrays: (values, plainly valid mask, units by key)."""
    n = len(rows)
    ok = np.ones(n, dtype=bool)
    v = SimpleNamespace()
    unit_of = {}
    for f in interpret.FIELDS:
        column = table.columns.get(f.key)
        o = f.options
        if column is None:
            state = np.zeros(n, dtype=np.int8)
            number = np.full(n, np.nan)
            unit_of[f.key] = np.full(n, "", dtype=str)
            code, words = np.zeros(n, dtype=np.intp), [""]
        else:
            state, number = column.state[rows], column.number[rows]
            unit_of[f.key] = column.unit_array[rows]
            code = column.code[rows]
            if f.kind in ("choice", "flag"):
                words = [t.strip().casefold() for t in column.distinct] or [""]
        present, okcell = state != _ABSENT, state == _OK
        ok &= state != _BAD
        default = o.get("default")
        if f.kind == "choice":
            # each distinct text once, then per row through its code
            good = np.array([w in o["choices"] for w in words])[code]
            ok &= ~present | good
            value = np.where(present, np.array(words)[code], default)
        elif f.kind == "flag":
            truth = np.array([w in TRUE for w in words])[code]
            good = np.array([w in TRUE or w in FALSE for w in words])[code]
            present = np.array([w not in EMPTY for w in words])[code]
            ok &= ~present | good
            value = present & truth
        else:
            if f.kind in ("ph", "number"):
                unitless = unit_of[f.key] == ""
                converted = number
                good = okcell & unitless
            elif f.kind in ("fraction", "percent"):
                plain, percent = unit_of[f.key] == "", unit_of[f.key] == "%"
                converted = np.where(percent & (f.kind == "fraction"), number / 100.0, number)
                good = okcell & (plain | percent | ((unit_of[f.key] == "1") & (f.kind == "fraction")))
            else:
                target = o["unit"] if f.kind == "quantity" else "mmol/L"
                substance = o.get("substance") if f.kind == "quantity" else f.key
                accepted = units.units_for(target, substance=substance)
                converted = np.full(n, np.nan)
                good = np.zeros(n, dtype=bool)
                for u in set(unit_of[f.key][okcell].tolist()):
                    if u in accepted:
                        at = okcell & (unit_of[f.key] == u)
                        converted[at] = units.convert(number[at], u, target, substance=substance)
                        good |= at
            good &= (o["low"] <= converted) & (converted <= o["high"])
            ok &= ~present | good
            if f.kind in ("quantity", "ph") and o.get("required", f.kind == "ph"):
                ok &= present
            value = np.where(present, converted, np.nan if default is None else default)
            if f.r9:
                value = _round9(value)
        setattr(v, f.attr, value)
    # cross-field checks (interpret's own functions, on arrays)
    urea_given, bun = v.urea_given, v.bun
    both = ~np.isnan(urea_given) & ~np.isnan(bun)
    ok &= ~(both & interpret.urea_bun_disagree(urea_given, bun))
    v.urea = np.where(np.isnan(urea_given), bun, urea_given)
    ok &= interpret.implied_hco3_survivable(interpret.implied_hco3(v.ph, v.pco2))
    has_pb, has_alt = ~np.isnan(v.pb), ~np.isnan(v.altitude)
    isa = each(
        lambda altitude_m: interpret.pb_value(None, altitude_m),
        ok & ~has_pb & has_alt,
        altitude_m=v.altitude,
    )
    v.pb_value = np.where(has_pb, v.pb, np.where(has_alt, isa, 760.0))
    pio2 = interpret.inspired_po2(v.fio2, v.pb_value)
    oxygen = ~np.isnan(v.po2) & (v.site != "venous")
    ok &= ~(oxygen & interpret.po2_above_inspired(v.po2, pio2))
    ok &= ~(oxygen & interpret.no_alveolar_oxygen(pio2, v.pco2, v.rq))
    flags = interpret.mix_up_flags(
        pco2=v.pco2,
        pco2_unit=unit_of["pco2"],
        baseline=v.baseline_pco2,
        baseline_unit=unit_of["baseline_pco2"],
        po2=v.po2,
        po2_unit=unit_of["po2"],
        site=v.site,
        pb=v.pb,
        pb_unit=unit_of["pb"],
    )
    v.mix_up = np.logical_or.reduce(list(flags.values()))
    v.unusual = np.logical_or.reduce(
        list(interpret.unusual_flags(glucose=v.glucose, urea=v.urea, lactate=v.lactate).values())
    )
    v.pb_and_altitude = has_pb & has_alt
    return v, ok


def _round9(values: np.ndarray) -> np.ndarray:
    """Python's ``round(x, 9)`` (as the scalar reader rounds pressures), once per distinct value."""
    distinct, where_ = np.unique(values, return_inverse=True)
    rounded = np.array([round(x, 9) if x == x else x for x in distinct.tolist()])
    return rounded[where_.reshape(values.shape)] if len(distinct) else values


# -- interpreting --------------------------------------------------------------------------------------------


@dataclass
class Audit:
    """The interpretation of every row.

    ``values[name]`` and ``present[name]`` are arrays over the rows for each output column (a value counts
    only where ``present``); the ``findings`` column holds each row's finding codes in the response's order
    (space separated) and ``errors`` each row's error messages (a row with errors has no outputs).
    """

    n: int
    pressure_unit: str
    values: dict[str, np.ndarray]
    present: dict[str, np.ndarray]
    errors: list[list[str]]
    scalar_rows: int = 0

    def value(self, name: str, i: int):
        """Output ``name`` of row ``i`` (None when the row does not have it)."""
        if not self.present[name][i]:
            return None
        value = self.values[name][i]
        return value.item() if isinstance(value, np.generic) else value

    def findings(self, i: int) -> list[str]:
        """The finding codes of row ``i`` in the order of the bridge response."""
        text = self.value("findings", i)
        return text.split() if text else []


#: output columns: (name, unit or "pressure", decimals shown; None for words) in the order they are written
OUTPUT_COLUMNS = (
    ("ph_status", None, None),
    ("pco2_status", None, None),
    ("consistency", None, None),
    ("primary_disorder", None, None),
    ("disorders", None, None),
    ("respiratory_chronicity", None, None),
    ("fraction_acute", "1", 2),
    ("hco3", "mmol/L", 1),
    ("hco3_computed", "mmol/L", 1),
    ("standard_base_excess", "mmol/L", 1),
    ("expected_pco2_low", "pressure", None),
    ("expected_pco2_high", "pressure", None),
    ("anion_gap", "mmol/L", 1),
    ("anion_gap_corrected", "mmol/L", 1),
    ("delta_ratio", "1", 2),
    ("metabolic_acidosis_type", None, None),
    ("osmolar_gap", "mOsm/kg", 0),
    ("strong_ion_gap", "mEq/L", 1),
    ("pao2_alveolar", "pressure", None),
    ("a_a_gradient", "pressure", None),
    ("a_a_category", None, None),
    ("pf_ratio", "mmHg", 0),
    ("respiratory_failure", None, None),
    ("spo2_target", None, None),
    ("spo2_on_target", None, None),
    ("niv_criteria", None, None),
    ("pco2_target", "pressure", None),
    ("pco2_target_basis", None, None),
    ("pco2_consciousness_threshold", "pressure", None),
    ("findings", None, None),
    ("urgent_findings", None, None),
)
OUTPUT_NAMES = tuple(name for name, _, _ in OUTPUT_COLUMNS)


def interpret_rows(table: Table, rows: np.ndarray, pressure_unit: str = "mmHg") -> Audit:
    """Interpret ``rows`` of ``table`` (indices) with the blood_gas rules on arrays."""
    n = len(rows)
    with np.errstate(all="ignore"):
        v, fast = _read_arrays(table, rows)
    errors: list[list[str]] = [[] for _ in range(n)]
    slow = np.flatnonzero(~fast)
    good = fast.copy()
    for name in ("site",):
        setattr(v, name, getattr(v, name).astype(object))
    for j in slow.tolist():
        raw = row_inputs(table, int(rows[j]))
        try:
            s = interpret._Sample(Inputs(raw))
        except InputErrors as exc:
            errors[j] = [_csv_message(e.as_entry()["message"]) for e in exc.errors]
            continue
        good[j] = True
        for name, value in vars(s.values()).items():
            getattr(v, name)[j] = value
    idx = np.flatnonzero(good)
    x = SimpleNamespace(**{name: np.asarray(value)[idx] for name, value in vars(v).items()})
    x.site = x.site.astype(str)
    x.hypercapnia_risk = x.hypercapnia_risk.astype(bool)
    for name in ("mix_up", "unusual", "pb_and_altitude"):
        setattr(x, name, getattr(x, name).astype(bool))
    values = {name: np.full(n, None, dtype=object) for name in OUTPUT_NAMES}
    present = {name: np.zeros(n, dtype=bool) for name in OUTPUT_NAMES}
    if len(idx):
        with np.errstate(all="ignore"):
            d = interpret.decide(x)
        _outputs(d, x, idx, values, present, pressure_unit)
    return Audit(n, pressure_unit, values, present, errors, scalar_rows=len(slow))


def _csv_message(message: str) -> str:
    return message.replace(
        "Send numbers as JSON numbers, not text.", "Write a plain number (a point for decimals)."
    )


def _outputs(d, x, idx: np.ndarray, values: dict, present: dict, pressure_unit: str) -> None:
    """Fill the output columns of rows ``idx`` from the array Decision ``d`` of those rows."""
    m = len(idx)

    def arr(value, dtype=None):
        return np.broadcast_to(np.asarray(value, dtype=dtype), (m,))

    def put(name, value, shown=True):
        shown = arr(shown, bool)
        values[name][idx[shown]] = arr(value)[shown]
        present[name][idx[shown]] = True

    def pressure(value):
        return units.convert(arr(value, float), "mmHg", pressure_unit)

    put("ph_status", d.ph_status)
    put("pco2_status", d.pco2_status)
    put("consistency", d.consistency)
    put("primary_disorder", d.primary, arr(d.primary) != "")
    # the disorders in the order the report names them (by stage), one text per combination
    key = np.zeros(m, dtype=np.int64)
    for i, code in enumerate(interpret.DISORDER_CODES):
        key += np.where(arr(d.has[code], bool), arr(d.stage[code]) + 1, 0) * 5**i
    combos, which = np.unique(key, return_inverse=True)
    texts = []
    for combo in combos.tolist():
        stages = {code: (combo // 5**i) % 5 for i, code in enumerate(interpret.DISORDER_CODES)}
        texts.append(" ".join(sorted((c for c in stages if stages[c]), key=lambda c: stages[c])))
    put("disorders", np.array(texts, dtype=object)[which.reshape(-1)])
    respiratory = arr(d.chronicity) != ""
    put("respiratory_chronicity", d.chronicity, respiratory)
    put("fraction_acute", d.fraction_acute, respiratory & ~np.isnan(arr(d.fraction_acute, float)))
    put("hco3", d.hco3_out)
    put("hco3_computed", d.hco3_computed)
    put("standard_base_excess", d.sbe)
    metabolic = (arr(d.primary) == interpret.MET_ACID) | (arr(d.primary) == interpret.MET_ALK)
    put("expected_pco2_low", pressure(d.met_expected.low), metabolic)
    put("expected_pco2_high", pressure(d.met_expected.high), metabolic)
    put("anion_gap", d.anion_gap, d.has_gap)
    put("anion_gap_corrected", d.anion_gap_corrected, arr(d.has_gap, bool) & ~np.isnan(x.albumin))
    put("delta_ratio", d.delta_ratio, d.dr_given)
    put("metabolic_acidosis_type", d.acidosis_type, arr(d.acidosis_type) != "")
    put("osmolar_gap", d.osmolar_gap, d.osm_gap_given)
    put("strong_ion_gap", d.strong_ion_gap, ~arr(d.doubtful, bool) & arr(d.sig_given, bool))
    put("pao2_alveolar", pressure(d.pao2_alveolar), d.oxygenation)
    put("a_a_gradient", pressure(d.a_a_gradient), d.oxygenation)
    put("a_a_category", d.a_a_category, d.oxygenation)
    put("pf_ratio", d.pf_ratio, d.oxygenation)
    put("respiratory_failure", d.respiratory_failure, d.oxygenation)
    low, high = arr(d.spo2_low).astype(str), arr(d.spo2_high).astype(str)
    put("spo2_target", np.char.add(np.char.add(low, "-"), high).astype(object))
    below, above = arr(d.finding["spo2_below_target"], bool), arr(d.finding["spo2_above_target"], bool)
    put("spo2_on_target", np.where(below, "below", np.where(above, "above", "within")), ~np.isnan(x.spo2))
    put("niv_criteria", d.niv)
    put("pco2_target", pressure(d.pco2_target), d.target_given)
    put("pco2_target_basis", d.pco2_target_basis, d.target_given)
    put("pco2_consciousness_threshold", pressure(d.consciousness_threshold))
    # findings in the response's order: by severity, then in the order the report emits them
    codes = interpret.FINDING_ORDER
    slots = []  # (code, is urgent, mask) in the response's order
    for severity in ("urgent", "notable", "info"):
        for code in codes:
            level = d.severity.get(code, interpret.SEVERITY.get(code))
            at = arr(d.finding[code], bool) & (arr(level) == severity)
            if at.any():
                slots.append((code, severity == "urgent", at))
    listed = np.full(m, "", dtype=object)
    urgent = np.full(m, "", dtype=object)
    if slots:
        matrix = np.stack([at for _, _, at in slots], axis=1)  # rows x slots
        listed[:] = _joined(matrix, [code for code, _, _ in slots])
        chosen = [k for k, (_, is_urgent, _) in enumerate(slots) if is_urgent]
        if chosen:
            urgent[:] = _joined(matrix[:, chosen], [slots[k][0] for k in chosen])
    put("findings", listed)
    put("urgent_findings", urgent)


def _joined(matrix: np.ndarray, names: list[str], group: int = 16) -> list[str]:
    """Per row of the boolean ``matrix`` (rows x names), the names it marks, space separated, in order.

    Rows rarely share a whole combination, but within a group of 16 names they do: each group's distinct
    combinations are joined once (keyed by their bits), then each row joins its few group texts.
    """
    m, k = matrix.shape
    if not m:
        return []
    parts = []
    for start in range(0, k, group):
        block = np.zeros((m, 64), dtype=bool)
        block[:, : min(group, k - start)] = matrix[:, start : start + group]
        key = np.packbits(block, axis=1, bitorder="little").view(np.uint64).reshape(-1)
        _, first, which = np.unique(key, return_index=True, return_inverse=True)
        chunk = names[start : start + group]
        texts = [" ".join(compress(chunk, row)) for row in matrix[first, start : start + group].tolist()]
        parts.append(np.array(texts, dtype=object)[which.reshape(-1)].tolist())
    if len(parts) == 1:
        return parts[0]
    return [" ".join(filter(None, texts)) for texts in zip(*parts, strict=True)]


def interpret_table(table: Table, *, pressure_unit: str = "mmHg", progress=None) -> Audit:
    """The blood_gas interpretation of every row of ``table``, in chunks of :data:`CHUNK` rows."""
    with _no_gc():
        return _interpret_table(table, pressure_unit, progress)


def _interpret_table(table: Table, pressure_unit: str, progress) -> Audit:
    n = len(table)
    parts = []
    for start in range(0, n, CHUNK):
        rows = np.arange(start, min(start + CHUNK, n))
        parts.append(interpret_rows(table, rows, pressure_unit))
        if progress is not None:
            progress(min(start + CHUNK, n), n)
    if not parts:
        empty = {name: np.zeros(0, dtype=object) for name in OUTPUT_NAMES}
        return Audit(0, pressure_unit, empty, {k: np.zeros(0, dtype=bool) for k in empty}, [])
    return Audit(
        n,
        pressure_unit,
        {name: np.concatenate([p.values[name] for p in parts]) for name in OUTPUT_NAMES},
        {name: np.concatenate([p.present[name] for p in parts]) for name in OUTPUT_NAMES},
        [e for p in parts for e in p.errors],
        sum(p.scalar_rows for p in parts),
    )


# -- writing -------------------------------------------------------------------------------------------------


def _unit_label(unit: str | None, pressure_unit: str) -> str | None:
    return pressure_unit if unit == "pressure" else unit


def _format(values: np.ndarray, present: np.ndarray, unit, decimals, pressure_unit: str, full: bool) -> list:
    if unit == "pressure" and decimals is None:
        decimals = 2 if pressure_unit == "kPa" else 1
    if decimals is None:  # words: the value where present, else an empty cell
        return np.where(present, values, "").tolist()
    out = np.full(len(values), "", dtype=object)
    at = np.flatnonzero(present)
    if not len(at):
        return out.tolist()
    shown = values[at]
    numbers = shown.astype(float)
    # ``"%.1f" % x`` is ``f"{x:.1f}"`` (the same float formatting), and quicker; each distinct value once
    # when the values repeat (inputs copied through, values of a few categories)
    text = repr if full else f"%.{decimals}f".__mod__
    distinct, which = np.unique(numbers, return_inverse=True)
    signed_zero = np.signbit(numbers[numbers == 0.0]).any()  # np.unique takes -0.0 for 0.0
    if len(distinct) * 2 < len(numbers) and not signed_zero:
        out[at] = np.array(list(map(text, distinct.tolist())), dtype=object)[which.reshape(-1)]
    else:
        out[at] = list(map(text, numbers.tolist()))
    return out.tolist()


def write_csv(table: Table, audit: Audit, stream, *, full_precision: bool = False) -> None:
    """Every column of the input as it was, then the outputs, the findings and the error of each row."""
    with _no_gc():
        _write_csv(table, audit, stream, full_precision)


def _write_csv(table: Table, audit: Audit, stream, full_precision: bool) -> None:
    writer = csv.writer(stream, lineterminator="\n")
    pu = audit.pressure_unit
    names = []
    for name, unit, _ in OUTPUT_COLUMNS:
        label = _unit_label(unit, pu)
        names.append(name if table.units_row is not None or label in (None, "1") else f"{name}[{label}]")
    writer.writerow([*table.header, *names, "error"])
    if table.units_row is not None:
        units_out = [_unit_label(unit, pu) or "" for _, unit, _ in OUTPUT_COLUMNS]
        writer.writerow([*table.units_row, *("" if u == "1" else u for u in units_out), ""])
    if not len(table):
        return
    if table.texts is not None:  # a plain file: each row's cells are its line as read
        inputs = [table.texts]
    elif table.plain:
        inputs = table.by_column
    else:
        inputs = [_quoted(list(column)) for column in table.by_column]
    # the output columns hold codes, words and numbers: only the error messages can need quotes
    outputs = [
        _format(audit.values[name], audit.present[name], unit, decimals, pu, full_precision)
        for name, unit, decimals in OUTPUT_COLUMNS
    ]
    errors = _quoted([" | ".join(e) for e in audit.errors])
    columns = [*inputs, *outputs, errors]
    stream.write("\n".join(map(",".join, zip(*columns, strict=False))) + "\n")


_SPECIAL = (",", '"', "\n", "\r")
_NEEDS_QUOTES = re.compile(r'[,"\n\r]').search


def _quoted(column: list[str]) -> list[str]:
    """A column's cells as csv.writer writes them (quoted only where a comma, quote or line break is)."""
    if not _NEEDS_QUOTES("\x00".join(column)):
        return column
    return ['"' + cell.replace('"', '""') + '"' if _NEEDS_QUOTES(cell) else cell for cell in column]


# -- summary -------------------------------------------------------------------------------------------------


def _count(values: np.ndarray, present: np.ndarray) -> dict:
    words = values[present].tolist()
    return dict(Counter(words).most_common())


def _count_words(texts: list[str]) -> Counter:
    """``Counter(" ".join(texts).split())``, counted once per distinct text (the same counts, and the words
    in the same first-seen order)."""
    counts: Counter = Counter()
    for text, k in Counter(texts).items():
        for word in text.split():
            counts[word] += k
    return counts


def summary(audit: Audit) -> dict:
    """Counts over the rows: rows, rows with errors, per disorder (and as primary), per chronicity of the
    respiratory disorder, per finding code, NIV criteria and SpO2 against its target."""
    ok = np.array([not e for e in audit.errors], dtype=bool)
    v, p = audit.values, audit.present
    listed = v["disorders"][ok].tolist()
    disorders = _count_words(listed)
    if "" in listed:
        disorders["none"] = listed.count("")
    primary = Counter()
    for name, count in Counter(
        np.where(p["primary_disorder"][ok], v["primary_disorder"][ok], "none").tolist()
    ).items():
        primary[name or "none"] += count
    findings = _count_words(v["findings"][ok & p["findings"]].tolist())
    return {
        "rows": audit.n,
        "interpreted": int(ok.sum()),
        "with_errors": int(audit.n - ok.sum()),
        "disorders": dict(disorders.most_common()),
        "primary": dict(primary.most_common()),
        "chronicity": _count(v["respiratory_chronicity"], p["respiratory_chronicity"]),
        "niv_criteria": _count(v["niv_criteria"], p["niv_criteria"]),
        "spo2_on_target": _count(v["spo2_on_target"], p["spo2_on_target"]),
        "findings": dict(findings.most_common()),
    }


def summary_text(counts: dict) -> str:
    """The summary as aligned plain text."""
    lines = [
        f"Rows: {counts['rows']}; interpreted: {counts['interpreted']}; with errors: {counts['with_errors']}"
    ]
    total = max(counts["interpreted"], 1)

    def block(title: str, items: dict) -> None:
        if not items:
            return
        lines.append("")
        lines.append(title)
        width = max(len(k) for k in items)
        for key, count in items.items():
            lines.append(f"  {key:<{width}}  {count:>8}  {100.0 * count / total:5.1f} %")

    block("Disorders (rows naming each; 'none' = no acid-base disorder):", counts["disorders"])
    block("Primary disorder:", counts["primary"])
    block("Chronicity of the respiratory disorder:", counts["chronicity"])
    block("NIV criteria (BTS/ICS 2016 thresholds):", counts["niv_criteria"])
    block("SpO2 against its target range (rows with an SpO2):", counts["spo2_on_target"])
    block("Findings:", counts["findings"])
    return "\n".join(lines)


# -- the command ---------------------------------------------------------------------------------------------


class Progress:
    """A progress bar on a stream (stderr): rows done out of all, rate and time left."""

    def __init__(self, stream, label: str = "interpreting"):
        self.stream, self.label, self.start, self.last = stream, label, time.perf_counter(), 0.0

    def __call__(self, done: int, total: int) -> None:
        now = time.perf_counter()
        if done < total and now - self.last < 0.2:
            return
        self.last = now
        width = 30
        filled = int(width * done / total) if total else width
        rate = done / max(now - self.start, 1e-9)
        left = (total - done) / rate if rate > 0 else 0.0
        bar = "#" * filled + "." * (width - filled)
        text = f"\r{self.label} [{bar}] {done:,}/{total:,} rows, {rate:,.0f} rows/s, {left:4.0f} s left"
        self.stream.write(text + ("\n" if done >= total else ""))
        self.stream.flush()


def run(
    source: str,
    output: str | None,
    *,
    pressure_unit: str = "mmHg",
    progress: bool | None = None,
    full_precision: bool = False,
    stdout=None,
    stderr=None,
) -> dict:
    """Read ``source`` (a path, or "-" for stdin), write the audit to ``output`` (a path, or "-"/None for
    stdout) and the summary to stdout (to stderr when the CSV goes to stdout). Returns the counts.

    ``progress``: None shows the bar only when stderr is a terminal; True always; False never.
    """
    stdout = stdout or sys.stdout
    stderr = stderr or sys.stderr
    if source == "-":
        text = sys.stdin.read()
    else:
        with open(source, encoding="utf-8-sig", newline="") as f:
            text = f.read()
    table = read_table(text)
    for warning in table.warnings:
        stderr.write(f"warning: {warning}\n")
    show = stderr.isatty() if progress is None else progress
    audit = interpret_table(table, pressure_unit=pressure_unit, progress=Progress(stderr) if show else None)
    to_stdout = output in (None, "-")
    if to_stdout:
        write_csv(table, audit, stdout, full_precision=full_precision)
    else:
        with open(output, "w", encoding="utf-8", newline="") as f:
            write_csv(table, audit, f, full_precision=full_precision)
    counts = summary(audit)
    (stderr if to_stdout else stdout).write(summary_text(counts) + "\n")
    return counts
