"""Batch audit: the blood_gas interpretation of every row of a CSV file, vectorized with numpy, in chunks.

==========================  ==============================================================================
``run``                     what ``tidewell batch IN.csv -o OUT.csv`` does: read, interpret and write a file
                            chunk by chunk (memory of one chunk), then the summary
``Reader``                  a CSV stream -> its ``Layout`` (header, units, dialect) and one ``Table`` per
                            chunk of :data:`CHUNK` rows
``read_table``              CSV text -> one ``Table``: input columns (named by the contract's input keys or
                            the names of :mod:`frontends.cells`, units in a ``pco2[kPa]`` or ``pCO2 (kPa)``
                            header, a units row, or in the cell: ``9.3 kPa``) and the other columns
``interpret_table``         every row of a ``Table`` -> ``Audit`` (outputs, findings, errors, notes per row)
``row_inputs``              one row as the ``inputs`` of a blood_gas request (what the bridge would be sent)
``Writer``, ``write_csv``   every input column, then the outputs, the findings, the error and the notes
``Tally``, ``summary``      counts per site, kind of input error, note, disorder, chronicity and finding
``summary_text``            the summary in words, each percentage of the rows its heading names
==========================  ==============================================================================

One implementation of each rule: a row is read with the blood_gas reader's own field table
(:data:`.blood_gas.FIELDS`: units, ranges, defaults) and its cross-field checks, and interpreted by
:func:`.blood_gas.decide`, the function the scalar report is written from. The batch path only runs
them on arrays. Rows the array reader cannot pass as plainly valid (any doubt at all: a bad cell, a value
out of range, a unit that needs a guess, a cross-field conflict) are read by the scalar reader itself, which
either accepts them or gives the bridge's own error messages; a row's errors go in its ``error`` column and
the batch goes on. tests/core/test_batch.py checks on thousands of generated rows that every row equals the
scalar bridge's answer for the same inputs.

Cells (:mod:`.cells`): empty, ``NA``, ``N/A``, ``null``, ``none``, ``nan`` and ``-`` mean "not given";
a decimal comma is read in a file not separated by commas. Units are matched ignoring case (``kpa`` is kPa;
``C`` and ``°C`` are degC). ``hypercapnia_risk`` is true/false, yes/no, y/n or 1/0. FiO2 and SpO2 may be
written ``28%``. A site not given is read as :data:`SITE_NOT_GIVEN`; an optional cell that cannot be read is
left out and named in the row's notes; a censored result (``<0.5``) is used at its bound only where the
reading is the same at both ends of its interval (docs/cli.md).
"""

from __future__ import annotations

import contextlib
import csv
import difflib
import gc
import io
import math
import os
import re
import sys
import time
from collections import Counter
from dataclasses import dataclass, field
from itertools import compress, repeat
from types import SimpleNamespace

import numpy as np

from .. import units
from ..arrays import each
from ..calculations import blood_gas
from ..calculations.blood_gas import reading
from ..errors import InputErrors
from ..fields import Inputs
from .cells import (
    ABSENT,
    BAD,
    EMPTY,
    FALSE,
    IMPLIED_UNITS,
    NUMBER,
    TRUE,
    canonical_unit,
    column_key,
    site_word,
    split_cell,
    typed_value,
)
from .cells import censored as censored_cell

FIELDS = {f.key: f for f in blood_gas.FIELDS}
#: rows interpreted at a time (the progress bar moves per chunk)
CHUNK = 10_000
_ABSENT, _OK, _BAD = ABSENT, NUMBER, BAD


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
    decimal_comma: bool = False  #: a comma between digits is the decimal mark (not a comma-separated file)
    #: per row, True where the cell is given but cannot be read (an optional input: the row is read without
    #: it and the cell is named in the row's notes)
    unread: np.ndarray = None
    #: row -> (direction "<" or ">", bound, unit or None) of a censored result ("<0.5"), read as not given
    censored: dict = None


@dataclass
class Layout:
    """What the head of a file says, for every chunk of it: the columns, their units, the dialect."""

    header: list[str]
    keys: list  #: per header cell, the input key it names, or None (copied through)
    units: list  #: per header cell, its unit (from the header or the units row), or None
    dialect: object
    units_row: list[str] | None = None
    warnings: list[str] = field(default_factory=list)
    decimal_comma: bool = False  #: numbers may be written with a decimal comma (not a comma-separated file)
    bom: bool = False  #: the text began with a byte-order mark (written back)


@dataclass
class Table:
    """A CSV file of samples (or a chunk of one): input columns by key, every column's text, and where each
    row came from."""

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
    layout: Layout | None = None
    #: row -> how many cells it has beyond the header's (its cells have shifted: it is not read)
    shifted: dict = field(default_factory=dict)

    def __len__(self) -> int:
        return self.n

    @property
    def rows(self) -> list[list[str]]:
        """Every row's cells (built on request: the batch itself works on columns)."""
        return [list(row) for row in zip(*self.by_column, strict=True)] if self.n else []


def read_table(text: str) -> Table:
    """Parse CSV text (comma, semicolon or tab separated, detected) into one :class:`Table`.

    Raises
    ------
    TableError
        No header, a required column (``ph``, ``pco2``) missing, an input column named twice, a
        dimensioned column with no unit anywhere, or a column whose values are in another unit than its
        header says.
    """
    with _no_gc():
        reader = Reader(io.StringIO(text), chunk=None)
        tables = list(reader)
        table = tables[0] if tables else reader.empty()
        table.warnings[:0] = reader.layout.warnings
        return table


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


def _dialect(sample: str):
    """The CSV dialect of a file from its first characters. The delimiter is the one its first line (the
    header, which holds no numbers) uses most, so decimal commas in the rows cannot pass for delimiters."""
    try:
        dialect = csv.Sniffer().sniff(sample, delimiters=",;\t")
    except csv.Error:
        dialect = csv.excel
    first = next((line for line in sample.splitlines() if line.strip()), "")
    counts = {d: first.count(d) for d in ",;\t"}
    most = max(counts, key=counts.get)
    if counts[most] and counts[most] > counts.get(dialect.delimiter, 0):
        dialect = type("dialect", (csv.excel,), {"delimiter": most})
    return dialect


#: characters read from the stream at a time
BLOCK = 1 << 22


class Reader:
    """A CSV stream read in chunks of at most ``chunk`` rows (all of it when None): the header and a units
    row once (:attr:`layout`), then one :class:`Table` per chunk, so memory stays constant however long the
    file is. The first chunk is read when the reader is made: file-level problems (no ``ph`` column, a
    column with no unit, a column in another unit than its header says) are raised before anything is
    written.
    """

    def __init__(self, stream, chunk: int | None):
        self.stream, self.chunk = stream, chunk
        self._lines: list[str] = []  #: complete lines read and not yet handed out
        self._at = 0  #: index of the next line to hand out in ``_lines``
        self._rest = ""  #: text after the last line break read
        self._eof = False
        self._line = 0  #: physical lines handed out so far
        self._fill()
        while not self._eof and sum(map(len, self._lines)) + len(self._rest) < 20_001:
            self._fill()  # enough for the dialect to be sniffed from the file's first 20,000 characters
        bom = self._lines[0].startswith("\ufeff") if self._lines else self._rest.startswith("\ufeff")
        if bom:
            if self._lines:
                self._lines[0] = self._lines[0][1:]
            else:
                self._rest = self._rest[1:]
        sample = ""
        for line in self._lines:
            sample += line + "\n"
            if len(sample) > 20_000:
                break
        sample = (sample + self._rest)[:20_000]
        self._dialect = dialect = _dialect(sample)
        # the header: the first row kept
        while True:
            numbers, kept, parsed = self._block()
            if kept or parsed or self._done():
                break
        if kept:
            cells = [line.split(",") for line in kept[:2]]
        else:
            cells = parsed or []
        if not cells:
            raise TableError("the file is empty: the first line must name the columns (ph, pco2[kPa], ...)")
        header = [cell.strip() for cell in cells[0]]
        keys, head_units, warnings = _header(header)
        layout = Layout(header, keys, head_units, dialect, None, warnings, dialect.delimiter != ",", bom)
        skip = 1
        if len(cells) > 1 and _is_units_row(cells[1], keys, layout.decimal_comma):
            layout.units_row = [c.strip() for c in cells[1]]
            skip = 2
            for i, cell in enumerate(layout.units_row):
                if i < len(keys) and keys[i] is not None and cell and head_units[i] is None:
                    head_units[i] = canonical_unit(cell)
        for i, key in enumerate(keys):
            if key is not None and head_units[i] is None:
                head_units[i] = IMPLIED_UNITS.get(key)
        self.layout = layout
        rows = parsed[skip:] if parsed is not None else None
        self._first = self._table(numbers[skip:], kept[skip:] if kept is not None else None, rows)
        _check_columns(self._first)

    # -- lines -----------------------------------------------------------------------------------------------

    def _fill(self) -> None:
        """Read one block of text into complete lines."""
        text = self.stream.read(BLOCK)
        if not text:
            self._eof = True
            if self._rest:
                self._lines.append(self._rest)
                self._rest = ""
            return
        lines = (self._rest + text).split("\n")
        self._rest = lines.pop()
        if self._at:
            del self._lines[: self._at]
            self._at = 0
        self._lines.extend(lines)

    def _done(self) -> bool:
        return self._eof and self._at >= len(self._lines)

    def _take(self, count: int | None) -> tuple[int, str]:
        """(number of the first line, text of up to ``count`` lines) with its quotes closed: a quoted cell
        that holds a line break is never cut in two."""
        while not self._eof and (count is None or len(self._lines) - self._at < count):
            self._fill()
        end = len(self._lines) if count is None else min(self._at + count, len(self._lines))
        taken = self._lines[self._at : end]
        self._at = end
        text = "\n".join(taken) + "\n" if taken else ""
        if '"' in text:
            while text.count('"') % 2 and not self._done():
                if self._at >= len(self._lines):
                    self._fill()
                    continue
                text += self._lines[self._at] + "\n"
                self._at += 1
                taken.append(None)
        first = self._line + 1
        self._line += len(taken)
        return first, text

    def _block(self):
        """(line numbers, lines of a plain block or None, rows of cells of any other block or None)."""
        first, text = self._take(self.chunk)
        if not text:
            return [], [], None
        dialect = self._dialect
        plain = _plain_lines(text, dialect)
        if plain is not None:
            numbers, kept = plain
            return [first - 1 + n for n in numbers], kept, None
        reader = csv.reader(io.StringIO(text), dialect)
        try:
            lines = [(first - 1 + reader.line_num, row) for row in reader if _kept(row)]
        except csv.Error as exc:  # e.g. a carriage return alone inside a line
            raise TableError(
                f"line {first - 1 + reader.line_num} cannot be read as CSV ({exc}); "
                "save the file again as CSV"
            ) from None
        return [number for number, _ in lines], None, [row for _, row in lines]

    # -- tables ----------------------------------------------------------------------------------------------

    def __iter__(self):
        first, self._first = self._first, None
        if first is not None and len(first):
            yield first
        while not self._done():
            numbers, kept, rows = self._block()
            if numbers:
                yield self._table(numbers, kept, rows)

    def empty(self) -> Table:
        """A table of no rows, with the file's header."""
        return self._table([], [], None)

    def _table(self, numbers: list[int], kept: list[str] | None, rows: list | None) -> Table:
        layout = self.layout
        header, width = layout.header, len(layout.header)
        warnings: list[str] = []
        shifted: dict[int, int] = {}
        if kept is not None:
            texts = kept
            n = len(texts)
            cells = ",".join(texts).split(",") if n else []
            by_column = [cells[j::width] for j in range(width)] if n else [[] for _ in range(width)]
            plain = True
        else:
            texts = None
            n = len(rows)
            fitted = [row if len(row) == width else (row + [""] * (width - len(row)))[:width] for row in rows]
            for j, (number, row) in enumerate(zip(numbers, rows, strict=True)):
                if len(row) > width and any(c.strip() for c in row[width:]):
                    extra = len(row) - width
                    warnings.append(
                        f"line {number}: {extra} cell(s) beyond the last named column: the row is not read"
                    )
                    shifted[j] = extra
            by_column = (
                [list(column) for column in zip(*fitted, strict=True)]
                if fitted
                else [[] for _ in range(width)]
            )
            plain = False  # the writer quotes the cells that need it
        columns = {}
        for i, key in enumerate(layout.keys):
            if key is not None:
                column = Column(
                    key, header[i], layout.units[i], by_column[i], decimal_comma=layout.decimal_comma
                )
                _parse_column(column)
                columns[key] = column
        table = Table(
            header, columns, layout.units_row, numbers, warnings, by_column, plain, texts, n, layout
        )
        table.shifted = shifted
        return table


def _check_columns(table: Table) -> None:
    """File-level problems seen in the first chunk: a dimensioned column with no unit anywhere, and a
    pressure column whose values are in the other pressure unit than its header says (said once, for the
    file, instead of row by row)."""
    n = len(table)
    for column in table.columns.values():
        f = FIELDS[column.key]
        if f.kind in ("quantity", "concentration") and column.unit is None and n:
            if not column.own_units and (column.state == _OK).any():
                example = f.options.get("unit", "mmol/L")
                raise TableError(
                    f"column '{column.header}' has no unit: write it in the header "
                    f"('{column.key}[{example}]'), "
                    f"in a units row under the header, or in each cell ('{column.key}' as '7.1 {example}')"
                )
        _check_pressure_unit(column)


#: per pressure column, (header unit, the other unit, median beyond which the values are in the other unit)
#: A population of gases has a median PCO2 of 35-60 mmHg (4.7-8 kPa) and a median PO2 of 40-110 mmHg
#: (5-15 kPa) (common practice): a median PCO2 below 15 "mmHg" or above 25 "kPa", or a median PO2 below
#: 20 "mmHg" or above 40 "kPa", is a column in the other unit.
_COLUMN_UNIT_SLIPS = {
    "pco2": (("mmHg", "kPa", lambda m: m < 15.0), ("kPa", "mmHg", lambda m: m > 25.0)),
    "baseline_pco2": (("mmHg", "kPa", lambda m: m < 15.0), ("kPa", "mmHg", lambda m: m > 25.0)),
    "po2": (("mmHg", "kPa", lambda m: m < 20.0), ("kPa", "mmHg", lambda m: m > 40.0)),
}
#: values needed before a column's unit is judged from their median
_SLIP_MIN_VALUES = 5


def _check_pressure_unit(column: Column) -> None:
    for unit, other, slipped in _COLUMN_UNIT_SLIPS.get(column.key, ()):
        if column.unit != unit:
            continue
        at = (column.state == _OK) & (column.unit_array == unit)
        for row in column.own_units:
            at[row] = False
        values = column.number[at]
        if len(values) < _SLIP_MIN_VALUES:
            continue
        median = float(np.median(values))
        if slipped(median):
            raise TableError(
                f"column '{column.header}' looks like {other}, not {unit}: the median of its "
                f"{len(values):,} values is {median:g} (a usual {FIELDS[column.key].options['label']} in "
                f"{other}, not in {unit}). Nothing was read: check the export and write the unit the "
                f"values are in ('{column.key}[{other}]' if they are {other})"
            )


def _header(header: list[str]):
    """(input key or None, unit, warnings) of each header cell."""
    keys, head_units, folded, warnings, seen = [], [], [], [], {}
    for i, name in enumerate(header):
        key, unit, base = column_key(name)
        folded.append(base)
        if key is not None:
            if key in seen:
                raise TableError(
                    f"columns {seen[key] + 1} ('{header[seen[key]]}') and {i + 1} ('{name}') both name "
                    f"the input '{key}'"
                )
            seen[key] = i
        keys.append(key)
        head_units.append(unit if key is not None else None)
    for required in ("ph", "pco2"):
        if required not in seen:
            close = difflib.get_close_matches(required, folded, n=1, cutoff=0.6)
            hint = ""
            if close:
                hint = f" ('{header[folded.index(close[0])]}' looks like it: rename that column '{required}')"
            raise TableError(
                f"the file has no '{required}' column{hint}; columns found: {', '.join(header) or 'none'}"
            )
    for i, base in enumerate(folded):
        if keys[i] is not None:
            continue
        close = difflib.get_close_matches(base, [k.replace("_", "") for k in FIELDS], n=1, cutoff=0.75)
        if close:
            key = next(k for k in FIELDS if k.replace("_", "") == close[0])
            if key not in seen:
                warnings.append(
                    f"column '{header[i]}' is not an input (did you mean '{key}'?); "
                    "it is copied through unread"
                )
    return keys, head_units, warnings


def _is_units_row(row: list[str], keys: list, decimal_comma: bool = False) -> bool:
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
        state, _, _ = split_cell(text, decimal_comma)
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


def _read_cell(text: str, decimal_comma: bool = False) -> tuple[int, float, str | None]:
    """(state, number or NaN, unit written in the cell or None) of one number cell."""
    if not text:
        return _ABSENT, math.nan, None
    try:
        x = float(text)
    except ValueError:
        s, x, u = split_cell(text, decimal_comma)
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
    censored: dict[int, tuple] = {}
    if kind in ("choice", "flag"):
        states = [_ABSENT if text.strip().casefold() in EMPTY else _OK for text in distinct]
        numbers = [math.nan] * len(distinct)
        cell_units = [None] * len(distinct)
    else:
        read = [_read_cell(text, column.decimal_comma) for text in distinct]
        states = [s for s, _, _ in read]
        numbers = [x for _, x, _ in read]
        cell_units = [u for _, _, u in read]
        for k, state in enumerate(states):
            if state == _BAD and column.key not in REQUIRED:
                bound = censored_cell(distinct[k], column.decimal_comma)
                if bound is not None:
                    censored[k] = bound
    column.state = np.array(states, dtype=np.int8)[code] if distinct else np.zeros(0, dtype=np.int8)
    column.number = np.array(numbers, dtype=float)[code] if distinct else np.zeros(0)
    column.unread = np.array(_unread(column.key, kind, distinct, states) or [False], dtype=bool)[code]
    own: dict[int, str] = {}
    with_unit = [k for k, u in enumerate(cell_units) if u is not None]
    unit_text = np.array([default_unit if u is None else u for u in cell_units] or [""], dtype=str)
    column.unit_array = unit_text[code] if distinct else np.zeros(0, dtype=str)
    if with_unit:
        rows = np.flatnonzero(np.isin(code, with_unit)).tolist()
        own = dict(zip(rows, column.unit_array[rows].tolist(), strict=True))
    column.own_units = own
    column.censored = {}
    if censored:
        rows = np.flatnonzero(np.isin(code, list(censored))).tolist()
        column.censored = {row: censored[int(code[row])] for row in rows}


#: inputs without which no reading is made: a bad cell in them is the row's error, never a note
REQUIRED = frozenset({"ph", "pco2"})
#: how a row whose sample site is not given (or not readable) is read: as a venous sample would be, the
#: reading that claims least (no oxygenation outputs, NIV criteria not assessed), and said in its notes
SITE_NOT_GIVEN = "venous"


#: the note of a row whose site is not given
SITE_NOTE = f"site not given: read as {SITE_NOT_GIVEN} (no oxygenation outputs, NIV not assessed)"


def choice_word(key: str, text: str) -> str:
    """The word a choice cell gives (a sample site through :func:`tidewell.frontends.cells.site_word`)."""
    return site_word(text) if key == "sample" else text.strip().casefold()


#: optional inputs that change the reading of the others (the oxygenation at an altitude or pressure, the
#: FiO2): a cell that cannot be read refuses the row, which is never read as if it were not given
#: (independent review: "8,000" ft read at sea level)
READ_OR_REFUSE = frozenset({"altitude", "pb", "fio2"})


def _unread(key: str, kind: str, distinct: list[str], states: list[int]) -> list[bool]:
    """Per distinct text of an optional column, True when it is given but cannot be read: not a number (a
    number with a bad unit or out of range is read, and refused by the reader with its own message), not one
    of the words of a choice, not a yes/no of a flag."""
    if key in REQUIRED or key in READ_OR_REFUSE:
        return [False] * len(distinct)
    if kind == "choice":
        choices = FIELDS[key].options["choices"]
        return [choice_word(key, t) not in choices and t.strip().casefold() not in EMPTY for t in distinct]
    if kind == "flag":
        return [t.strip().casefold() not in TRUE | FALSE | EMPTY for t in distinct]
    return [state == _BAD for state in states]


# -- one row as a request ---------------------------------------------------------------------------------


def _cell_value(column: Column, i: int):
    """The value of one cell as a blood_gas request carries it (None when not given or not readable)."""
    if column.unread[i]:
        return None
    if column.typed is None:
        column.typed = [None] * len(column.distinct)
    k = int(column.code[i])
    value = column.typed[k]
    if value is None:
        value = column.typed[k] = (
            typed_value(column.key, column.cells[i], column.unit, decimal_comma=column.decimal_comma),
        )
    value = value[0]
    return dict(value) if isinstance(value, dict) else value


def row_inputs(table: Table, i: int, site_default: str = SITE_NOT_GIVEN) -> dict:
    """Row ``i`` as the ``inputs`` of a blood_gas request: what the row gives and can be read, and the
    sample site read as ``site_default`` (:data:`SITE_NOT_GIVEN` in the audit) when the row gives none."""
    out = {}
    for key, column in table.columns.items():
        value = _cell_value(column, i)
        if value is not None:
            out[key] = value
    out.setdefault("sample", site_default)
    return out


# -- the array reader ---------------------------------------------------------------------------------------


def _read_arrays(table: Table, rows: np.ndarray):
    """Read ``rows`` with the blood_gas field table on arrays: (values, plainly valid mask, units by key)."""
    n = len(rows)
    ok = np.ones(n, dtype=bool)
    v = SimpleNamespace()
    unit_of = {}
    for f in blood_gas.FIELDS:
        column = table.columns.get(f.key)
        o = f.options
        if column is None:
            state = np.zeros(n, dtype=np.int8)
            number = np.full(n, np.nan)
            unit_of[f.key] = np.full(n, "", dtype=str)
            code, words = np.zeros(n, dtype=np.intp), [""]
            unread = np.zeros(n, dtype=bool)
        else:
            state, number = column.state[rows], column.number[rows]
            unit_of[f.key] = column.unit_array[rows]
            code = column.code[rows]
            unread = column.unread[rows]
            if f.kind in ("choice", "flag"):
                words = [choice_word(f.key, t) for t in column.distinct] or [""]
        # a cell that cannot be read in an optional column is not given (and named in the row's notes)
        present, okcell = (state != _ABSENT) & ~unread, state == _OK
        ok &= (state != _BAD) | unread
        default = SITE_NOT_GIVEN if f.key == "sample" else o.get("default")
        if f.key == "fio2":
            v.fio2_given = present
        if f.kind == "range":
            # a prescribed SpO2 range has no column form: such a row is read by the scalar path
            ok &= ~present
            v.spo2_rx_low = v.spo2_rx_high = np.full(n, np.nan)
            continue
        if f.kind == "choice":
            # each distinct text once, then per row through its code
            good = np.array([w in o["choices"] for w in words])[code]
            ok &= ~present | good
            value = np.where(present, np.array(words)[code], default)
            if f.key == "sample":
                v.site_given = present
        elif f.kind == "flag":
            truth = np.array([w in TRUE for w in words])[code]
            good = np.array([w in TRUE or w in FALSE for w in words])[code]
            present = np.array([w not in EMPTY for w in words])[code] & ~unread
            ok &= ~present | good
            value = present & truth
            if "default" in o:  # a flag that may be unknown: 1.0 true, 0.0 false, NaN not given
                value = np.where(present, truth.astype(float), np.nan)
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
    ok &= ~(both & reading.urea_bun_disagree(urea_given, bun))
    v.urea = np.where(np.isnan(urea_given), bun, urea_given)
    ok &= reading.implied_hco3_survivable(reading.implied_hco3(v.ph, v.pco2))
    has_pb, has_alt = ~np.isnan(v.pb), ~np.isnan(v.altitude)
    isa = each(
        lambda altitude_m: reading.pb_value(None, altitude_m),
        ok & ~has_pb & has_alt,
        altitude_m=v.altitude,
    )
    v.pb_value = np.where(has_pb, v.pb, np.where(has_alt, isa, 760.0))
    pio2 = reading.inspired_po2(v.fio2, v.pb_value)
    oxygen = ~np.isnan(v.po2) & (v.site != "venous") & v.fio2_given
    ok &= ~(oxygen & reading.po2_above_inspired(v.po2, pio2))
    ok &= ~(oxygen & reading.no_alveolar_oxygen(pio2, v.pco2, v.rq))
    flags = reading.mix_up_flags(
        ph=v.ph,
        hco3=v.hco3,
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
        list(reading.unusual_flags(glucose=v.glucose, urea=v.urea, lactate=v.lactate).values())
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
    #: per row, what was not read or not assumed (a cell that cannot be read, a site not given)
    notes: list[list[str]] = None
    #: per row, the kinds of its notes and of its errors, for the summary ("lactate: not read")
    note_kinds: list[list[str]] = None
    error_kinds: list[list[str]] = None
    #: per row, the sample site read, or "not given"
    sites: np.ndarray = None

    def __post_init__(self):
        for name in ("notes", "note_kinds", "error_kinds"):
            if getattr(self, name) is None:
                setattr(self, name, [[] for _ in range(self.n)])
        if self.sites is None:
            self.sites = np.full(self.n, NOT_GIVEN, dtype=object)

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
    ("pf_ratio", "pressure", {"mmHg": 0, "kPa": 1}),
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
    site_given = v.__dict__.pop("site_given")
    errors: list[list[str]] = [[] for _ in range(n)]
    error_kinds: list[list[str]] = [[] for _ in range(n)]
    shifted = [j for j, row in enumerate(rows.tolist()) if row in table.shifted] if table.shifted else []
    for j in shifted:
        fast[j] = False
        errors[j] = [
            f"the row has {table.shifted[int(rows[j])]} cell(s) more than the header names: a decimal comma "
            "or a delimiter inside a cell has shifted its cells, so none of them is read"
        ]
        error_kinds[j] = ["row: cells shifted"]
    slow = np.flatnonzero(~fast)
    good = fast.copy()
    for name in ("site",):
        setattr(v, name, getattr(v, name).astype(object))
    for j in slow.tolist():
        if errors[j]:
            continue
        raw = row_inputs(table, int(rows[j]))
        try:
            s = reading._Sample(Inputs(raw), pressure_unit=pressure_unit)
        except InputErrors as exc:
            errors[j] = [_csv_message(e.as_entry()["message"]) for e in exc.errors]
            error_kinds[j] = list(dict.fromkeys(_error_kind(e) for e in exc.errors))
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
            d = blood_gas.decide(x)
        _outputs(d, x, idx, values, present, pressure_unit)
    sites = np.where(site_given, np.asarray(v.site, dtype=object), NOT_GIVEN)
    notes, note_kinds = _notes(table, rows, site_given)
    for j, error in enumerate(errors):
        if error:  # a row not read has its errors, not notes about how it was read
            notes[j], note_kinds[j] = [], []
    return Audit(
        n,
        pressure_unit,
        values,
        present,
        errors,
        scalar_rows=len(slow),
        notes=notes,
        note_kinds=note_kinds,
        error_kinds=error_kinds,
        sites=sites,
    )


#: the site of a row that does not give one, as the summary counts it
NOT_GIVEN = "not given"
#: the error codes of the reader (tidewell.errors.ERROR_CODES) in words, for the summary
CODE_WORDS = {
    "missing": "missing",
    "not_a_number": "not a number",
    "bad_unit": "unit missing or not accepted",
    "out_of_range": "out of range",
    "implausible": "not plausible (a unit slip?)",
    "inconsistent": "in conflict with another value",
    "unknown_input": "not an input",
}


def _label(key: str) -> str:
    if key == "ph":
        return "pH"
    return FIELDS[key].options.get("label", key) if key in FIELDS else key


def _error_kind(error) -> str:
    """One input error as its kind: the input's name and the problem in words ("pH: not a number")."""
    key = error.field.removeprefix("inputs.")
    return f"{_label(key)}: {CODE_WORDS.get(error.code, error.code.replace('_', ' '))}"


def _notes(table: Table, rows: np.ndarray, site_given: np.ndarray) -> tuple[list, list]:
    """Per row, what was not read or not assumed (texts for the ``notes`` column) and its kinds."""
    n = len(rows)
    notes: list[list[str]] = [[] for _ in range(n)]
    kinds: list[list[str]] = [[] for _ in range(n)]
    for key, column in table.columns.items():
        unread = column.unread[rows]
        if not unread.any():
            continue
        label = _label(key)
        for j in np.flatnonzero(unread).tolist():
            text = column.cells[int(rows[j])].strip()
            if key == "sample":
                close = difflib.get_close_matches(text.casefold(), blood_gas.SITES, n=1, cutoff=0.6)
                hint = f" (did you mean '{close[0]}'?)" if close else ""
                notes[j].append(f"sample '{text}' not read{hint}")
                kinds[j].append("sample site not read")
            elif int(rows[j]) in column.censored:
                notes[j].append(f"{label} '{text}' is a censored result: read without it")
                kinds[j].append(f"{label}: censored, not used")
            else:
                notes[j].append(f"{label} '{text}' not read: read without it")
                kinds[j].append(f"{label}: not read")
    for j in np.flatnonzero(~np.asarray(site_given, dtype=bool)).tolist():
        notes[j].append(SITE_NOTE)
        kinds[j].append("site not given")
    return notes, kinds


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
    for i, code in enumerate(blood_gas.DISORDER_CODES):
        key += np.where(arr(d.has[code], bool), arr(d.stage[code]) + 1, 0) * 5**i
    combos, which = np.unique(key, return_inverse=True)
    texts = []
    for combo in combos.tolist():
        stages = {code: (combo // 5**i) % 5 for i, code in enumerate(blood_gas.DISORDER_CODES)}
        texts.append(" ".join(sorted((c for c in stages if stages[c]), key=lambda c: stages[c])))
    put("disorders", np.array(texts, dtype=object)[which.reshape(-1)])
    respiratory = arr(d.chronicity) != ""
    put("respiratory_chronicity", d.chronicity, respiratory)
    put("fraction_acute", d.fraction_acute, respiratory & ~np.isnan(arr(d.fraction_acute, float)))
    put("hco3", d.hco3_out)
    put("hco3_computed", d.hco3_computed)
    put("standard_base_excess", d.sbe)
    metabolic = (arr(d.primary) == blood_gas.MET_ACID) | (arr(d.primary) == blood_gas.MET_ALK)
    put("expected_pco2_low", pressure(d.met_expected.low), metabolic)
    put("expected_pco2_high", pressure(d.met_expected.high), metabolic)
    put("anion_gap", d.anion_gap, d.has_gap)
    put("anion_gap_corrected", d.anion_gap_corrected, arr(d.has_gap, bool) & ~np.isnan(x.albumin))
    put("delta_ratio", d.delta_ratio, d.dr_given)
    put("metabolic_acidosis_type", d.acidosis_type, arr(d.acidosis_type) != "")
    put("osmolar_gap", d.osmolar_gap, d.osm_gap_given)
    put("strong_ion_gap", d.strong_ion_gap, ~arr(d.doubtful, bool) & arr(d.sig_given, bool))
    put("pao2_alveolar", pressure(d.pao2_alveolar), d.alveolar_given)
    put("a_a_gradient", pressure(d.a_a_gradient), d.oxygenation)
    put("a_a_category", d.a_a_category, d.oxygenation)
    # the P/F ratio in the pressure unit of the output (PaO2 / FiO2; the report gives it in mmHg)
    put("pf_ratio", d.pf_ratio if pressure_unit == "mmHg" else pressure(d.pf_ratio), d.oxygenation)
    put("respiratory_failure", d.respiratory_failure, d.rf_given)
    low, high = (np.array([f"{v:g}" for v in arr(x, float).tolist()]) for x in (d.spo2_low, d.spo2_high))
    put("spo2_target", np.char.add(np.char.add(low, "-"), high).astype(object))
    below, above = arr(d.finding["spo2_below_target"], bool), arr(d.finding["spo2_above_target"], bool)
    put("spo2_on_target", np.where(below, "below", np.where(above, "above", "within")), ~np.isnan(x.spo2))
    put("niv_criteria", d.niv)
    put("pco2_target", pressure(d.pco2_target), d.target_given)
    put("pco2_target_basis", d.pco2_target_basis, d.target_given)
    put("pco2_consciousness_threshold", pressure(d.consciousness_threshold))
    # findings in the response's order: by severity, then in the order the report emits them
    codes = blood_gas.FINDING_ORDER
    slots = []  # (code, is urgent, mask) in the response's order
    for severity in ("urgent", "notable", "info"):
        for code in codes:
            level = d.severity.get(code, blood_gas.SEVERITY.get(code))
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
        part = interpret_rows(table, rows, pressure_unit)
        _use_censored(table, rows, part, pressure_unit)
        parts.append(part)
        if progress is not None:
            progress(min(start + CHUNK, n), n)
    if not parts:
        empty = {name: np.zeros(0, dtype=object) for name in OUTPUT_NAMES}
        return Audit(0, pressure_unit, empty, {k: np.zeros(0, dtype=bool) for k in empty}, [])
    if len(parts) == 1:
        return parts[0]
    return Audit(
        n,
        pressure_unit,
        {name: np.concatenate([p.values[name] for p in parts]) for name in OUTPUT_NAMES},
        {name: np.concatenate([p.present[name] for p in parts]) for name in OUTPUT_NAMES},
        [e for p in parts for e in p.errors],
        sum(p.scalar_rows for p in parts),
        notes=[e for p in parts for e in p.notes],
        note_kinds=[e for p in parts for e in p.note_kinds],
        error_kinds=[e for p in parts for e in p.error_kinds],
        sites=np.concatenate([p.sites for p in parts]),
    )


# -- censored results ----------------------------------------------------------------------------------------


def _censored_variant(table: Table, rows: list[int], end: str, key: str, used: set) -> Table:
    """``table`` with censored cells written as numbers: those of column ``key`` in ``rows`` at their bound
    (``end="bound"``) or at the far end of the reader's range on the censored side (``end="far"``), and the
    cells of ``used`` ((key, row) pairs already found usable) at their bound."""
    columns = dict(table.columns)
    chosen = set(rows)
    for name, column in table.columns.items():
        picked = {
            row: bound
            for row, bound in column.censored.items()
            if (name == key and row in chosen) or (name, row) in used
        }
        if not picked:
            continue
        f = FIELDS[name]
        cells = list(column.cells)
        for row, (direction, bound, unit) in picked.items():
            unit = unit or column.unit
            value = bound
            if name == key and end == "far":
                value = f.options["low"] if direction == "<" else f.options["high"]
                if f.kind in ("quantity", "concentration") and unit:
                    target = f.options["unit"] if f.kind == "quantity" else "mmol/L"
                    substance = f.options.get("substance") if f.kind == "quantity" else name
                    try:
                        value = units.convert(value, target, unit, substance=substance)
                    except (ValueError, KeyError):
                        value = math.nan  # no far end in this unit: the bound is not used
            cells[row] = f"{value!r} {unit}" if unit else repr(value)
        variant = Column(name, column.header, column.unit, cells, decimal_comma=False)
        _parse_column(variant)
        columns[name] = variant
    return Table(
        table.header, columns, table.units_row, table.line, [], [], False, None, table.n, table.layout
    )


def _use_censored(table: Table, rows: np.ndarray, part: Audit, pressure_unit: str) -> None:
    """Read a censored result ("<0.5", ">33.3") where a rule can use it: when the row's reading (every
    output and finding) is the same with the value at the bound and at the far end of the reader's range
    on the censored side, the bound is used and the note says so; otherwise the row stays read without it.
    Columns are taken one after another, each with the bounds already found usable in place.
    """
    position = {int(row): j for j, row in enumerate(rows.tolist())}
    used: set = set()
    for key, column in table.columns.items():
        mine = sorted(row for row in column.censored if row in position and not part.errors[position[row]])
        if not mine:
            continue
        at = np.array(mine)
        with_bound = interpret_rows(_censored_variant(table, mine, "bound", key, used), at, pressure_unit)
        at_far = interpret_rows(_censored_variant(table, mine, "far", key, used), at, pressure_unit)
        label = _label(key)
        for k, row in enumerate(mine):
            same = not with_bound.errors[k] and not at_far.errors[k]
            same = same and all(
                with_bound.present[name][k] == at_far.present[name][k]
                and with_bound.value(name, k) == at_far.value(name, k)
                for name in OUTPUT_NAMES
            )
            if not same:
                continue
            used.add((key, row))
            j = position[row]
            for name in OUTPUT_NAMES:
                part.values[name][j] = with_bound.values[name][k]
                part.present[name][j] = with_bound.present[name][k]
            direction, bound, unit = column.censored[row]
            text = column.cells[row].strip()
            old = f"{label} '{text}' is a censored result: read without it"
            unit = unit or column.unit
            shown = f"{bound:g}" + (f" {unit}" if unit else "")
            new = f"{label} '{text}' read as {shown} (the same reading anywhere {direction} {bound:g})"
            part.notes[j] = [new if note == old else note for note in part.notes[j]]
            kind = f"{label}: censored, not used"
            part.note_kinds[j] = [
                f"{label}: censored, bound used" if x == kind else x for x in part.note_kinds[j]
            ]


# -- writing -------------------------------------------------------------------------------------------------


def _unit_label(unit: str | None, pressure_unit: str) -> str | None:
    return pressure_unit if unit == "pressure" else unit


def _format(values: np.ndarray, present: np.ndarray, unit, decimals, pressure_unit: str, full: bool) -> list:
    if unit == "pressure" and decimals is None:
        decimals = 2 if pressure_unit == "kPa" else 1
    elif isinstance(decimals, dict):
        decimals = decimals[pressure_unit]
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
    """Every column of the input as it was, then the outputs, the findings, the error and the notes of each
    row (the header first)."""
    with _no_gc():
        writer = Writer(stream, table.layout, audit.pressure_unit, full_precision=full_precision)
        writer.write(table, audit)


def output_names(layout: Layout, pressure_unit: str) -> list[str]:
    """The names of the columns written after the input's: each output with its unit, then ``error`` and
    ``notes``. An output named like an input column (``hco3``) gets ``_read`` appended, so no two columns
    share a name."""
    taken = {column_key(name)[2] for name in layout.header} | {name.casefold() for name in layout.header}
    names = []
    for name, unit, _ in (*OUTPUT_COLUMNS, ("error", None, None), ("notes", None, None)):
        while name.casefold() in taken or name.replace("_", "") in taken:
            name += "_read"
        label = _unit_label(unit, pressure_unit)
        names.append(name if layout.units_row is not None or label in (None, "1") else f"{name}[{label}]")
    return names


class Writer:
    """Writes the audit of a file chunk by chunk: the header once, then each chunk's rows, in the input's
    delimiter (a byte-order mark first when the input had one); numbers with a decimal comma when the input
    wrote its numbers so."""

    def __init__(self, stream, layout: Layout, pressure_unit: str, *, full_precision: bool = False):
        self.stream, self.layout, self.pressure_unit, self.full = (
            stream,
            layout,
            pressure_unit,
            full_precision,
        )
        self.delimiter = layout.dialect.delimiter
        self.comma_decimals = False
        self._started = False

    def _start(self, table: Table) -> None:
        layout, pu = self.layout, self.pressure_unit
        self.comma_decimals = layout.decimal_comma and _writes_decimal_commas(table)
        writer = csv.writer(self.stream, delimiter=self.delimiter, lineterminator="\n")
        if layout.bom:
            self.stream.write("\ufeff")
        writer.writerow([*layout.header, *output_names(layout, pu)])
        if layout.units_row is not None:
            units_out = [_unit_label(unit, pu) or "" for _, unit, _ in OUTPUT_COLUMNS]
            writer.writerow([*layout.units_row, *("" if u == "1" else u for u in units_out), "", ""])
        self._started = True

    def write(self, table: Table, audit: Audit) -> None:
        if not self._started:
            self._start(table)
        if not len(table):
            return
        d = self.delimiter
        if table.texts is not None and d == ",":  # a plain file: each row's cells are its line as read
            inputs = [table.texts]
        elif table.plain and d == ",":
            inputs = table.by_column
        else:
            inputs = [_quoted(list(column), d) for column in table.by_column]
        # the output columns hold codes, words and numbers: only the messages can need quotes
        outputs = [
            _format(audit.values[name], audit.present[name], unit, decimals, self.pressure_unit, self.full)
            for name, unit, decimals in OUTPUT_COLUMNS
        ]
        if self.comma_decimals:
            outputs = [
                [cell.replace(".", ",") for cell in column] if unit is not None else column
                for column, (_, unit, _) in zip(outputs, OUTPUT_COLUMNS, strict=True)
            ]
        errors = _quoted([" | ".join(e) for e in audit.errors], d)
        notes = _quoted([" | ".join(e) for e in audit.notes], d)
        columns = [*inputs, *outputs, errors, notes]
        self.stream.write("\n".join(map(d.join, zip(*columns, strict=False))) + "\n")


def _writes_decimal_commas(table: Table) -> bool:
    """True when the input columns write numbers with a decimal comma ("7,19") and none with a point."""
    comma = point = False
    for column in table.columns.values():
        if FIELDS[column.key].kind in ("choice", "flag"):
            continue
        for text in column.distinct:
            if _DECIMAL_COMMA_CELL(text):
                comma = True
            elif _DECIMAL_POINT_CELL(text):
                point = True
    return comma and not point


_DECIMAL_COMMA_CELL = re.compile(r"^\s*[+-]?\d*,\d").search
_DECIMAL_POINT_CELL = re.compile(r"^\s*[+-]?\d*\.\d").search
_NEEDS_QUOTES = {d: re.compile(f'[{re.escape(d)}"\\n\\r]').search for d in (",", ";", "\t")}


def _quoted(column: list[str], delimiter: str = ",") -> list[str]:
    """A column's cells as csv.writer writes them (quoted only where a delimiter, quote or line break is)."""
    needs = _NEEDS_QUOTES.get(delimiter) or re.compile(f'[{re.escape(delimiter)}"\\n\\r]').search
    if not needs("\x00".join(column)):
        return column
    return ['"' + cell.replace('"', '""') + '"' if needs(cell) else cell for cell in column]


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


class Tally:
    """The summary of a file, added up chunk by chunk (:meth:`add`), so it needs no more memory for 10^7
    rows than for 10."""

    def __init__(self):
        self.rows = self.interpreted = self.with_notes = 0
        self.sites: dict[str, Counter] = {}
        self.errors_by_kind: Counter = Counter()
        self.notes_by_kind: Counter = Counter()
        self.disorders: Counter = Counter()
        self.no_disorder = 0
        self.primary: Counter = Counter()
        self.chronicity: Counter = Counter()
        self.niv: Counter = Counter()
        self.spo2: Counter = Counter()
        self.findings: Counter = Counter()
        self.example_error: dict[str, str] = {}  #: per error kind, its first message

    def add(self, audit: Audit, lines: list[int] | None = None) -> None:
        ok = np.array([not e for e in audit.errors], dtype=bool)
        v, p = audit.values, audit.present
        self.rows += audit.n
        self.interpreted += int(ok.sum())
        sites = audit.sites
        for site in dict.fromkeys(sites.tolist()):
            at = sites == site
            counts = self.sites.setdefault(site, Counter())
            counts["rows"] += int(at.sum())
            counts["interpreted"] += int((at & ok).sum())
        for j in np.flatnonzero(~ok).tolist():
            for kind in audit.error_kinds[j]:
                self.errors_by_kind[kind] += 1
                if kind not in self.example_error:
                    where = f"line {lines[j]}: " if lines else ""
                    self.example_error[kind] = where + audit.errors[j][0]
        for kinds, good in zip(audit.note_kinds, ok.tolist(), strict=True):
            if kinds and good:
                self.with_notes += 1
                self.notes_by_kind.update(dict.fromkeys(kinds, 1))
        listed = v["disorders"][ok].tolist()
        self.disorders.update(_count_words(listed))
        self.no_disorder += listed.count("")
        primary = np.where(p["primary_disorder"][ok], v["primary_disorder"][ok], "none").tolist()
        for name, count in Counter(primary).items():
            self.primary[name or "none"] += count
        self.chronicity.update(_count(v["respiratory_chronicity"], p["respiratory_chronicity"]))
        self.niv.update(_count(v["niv_criteria"], p["niv_criteria"]))
        self.spo2.update(_count(v["spo2_on_target"], p["spo2_on_target"]))
        self.findings.update(_count_words(v["findings"][ok & p["findings"]].tolist()))

    def counts(self) -> dict:
        """The summary as a dict (what ``--summary-json`` writes)."""
        disorders = Counter(self.disorders)
        if self.no_disorder:
            disorders["none"] = self.no_disorder
        chronicity = dict(self.chronicity.most_common())
        spo2 = dict(self.spo2.most_common())
        return {
            "rows": self.rows,
            "interpreted": self.interpreted,
            "with_errors": self.rows - self.interpreted,
            "with_notes": self.with_notes,
            "sites": {site: dict(c) for site, c in sorted(self.sites.items(), key=_site_order)},
            "errors_by_kind": dict(self.errors_by_kind.most_common()),
            "notes_by_kind": dict(self.notes_by_kind.most_common()),
            "disorders": dict(disorders.most_common()),
            "primary": dict(self.primary.most_common()),
            "chronicity": chronicity,
            "niv_criteria": dict(self.niv.most_common()),
            "spo2_on_target": spo2,
            "findings": dict(self.findings.most_common()),
            # what each block's percentages are of
            "denominators": {
                "disorders": self.interpreted,
                "primary": self.interpreted,
                "chronicity": sum(chronicity.values()),
                "niv_criteria": self.interpreted,
                "spo2_on_target": sum(spo2.values()),
                "findings": self.interpreted,
                "errors_by_kind": self.rows,
                "notes_by_kind": self.interpreted,
            },
            "example_errors": dict(self.example_error),
        }


def _site_order(item) -> int:
    order = (*blood_gas.SITES, NOT_GIVEN)
    return order.index(item[0]) if item[0] in order else len(order)


def summary(audit: Audit) -> dict:
    """Counts over the rows: rows, rows with errors and with notes, rows per sample site, per kind of input
    error, per disorder (and as primary), per chronicity of the respiratory disorder, per finding code, NIV
    criteria and SpO2 against its target; with each block's denominator."""
    tally = Tally()
    tally.add(audit)
    return tally.counts()


#: the finding codes in words, for the summary (the codes themselves are in the findings column)
FINDING_WORDS = {
    "possible_unit_mix_up": "a value looks like a unit slip",
    "value_unusual": "a value is unusual enough to check",
    "pb_used_not_altitude": "barometric pressure used rather than altitude",
    "inconsistent_triple": "pH, PCO2 and HCO3 do not agree",
    "provisional_interpretation": "reading provisional",
    "hco3_calculated": "HCO3 calculated from pH and PCO2",
    "base_excess_differs": "reported base excess differs from the calculated one",
    "borderline_values": "values at a decision threshold",
    "concurrent_respiratory_acidosis": "a respiratory acidosis as well",
    "concurrent_respiratory_alkalosis": "a respiratory alkalosis as well",
    "compensation_as_expected": "compensation as expected",
    "ph_rule_drift": "the pH rule drifts at this PCO2",
    "chronicity_not_judged": "chronicity not judged",
    "concurrent_metabolic_acidosis": "a metabolic acidosis as well",
    "concurrent_metabolic_alkalosis": "a metabolic alkalosis as well",
    "chronic_slope_uncertain": "chronic compensation slope uncertain",
    "chronicity_rules_disagree": "the chronicity rules disagree",
    "baseline_and_hco3_disagree": "usual PaCO2 and HCO3 disagree",
    "anion_gap_low": "low anion gap",
    "osmolar_gap_raised": "raised osmolar gap",
    "lactate_raised": "raised lactate",
    "anion_gap_needs_electrolytes": "anion gap needs Na and Cl",
    "high_anion_gap_acidosis_found": "high anion gap acidosis found",
    "anion_gap_raised": "raised anion gap",
    "metabolic_alkalosis_from_gap": "metabolic alkalosis shown by the gap",
    "anion_gap_reading": "anion gap reading",
    "chronicity_indeterminate": "chronicity indeterminate",
    "respiratory_chronicity_assumed": "respiratory chronicity assumed",
    "stewart_assumed_values": "Stewart terms with typical values assumed",
    "strong_ion_gap_raised": "raised strong ion gap",
    "approaches_agree": "Boston and Copenhagen readings agree",
    "approaches_disagree": "Boston and Copenhagen readings disagree",
    "boston_copenhagen_chronicity": "chronicity by Boston and Copenhagen rules",
    "baseline_estimate_unreliable": "usual PaCO2 estimate unreliable",
    "pco2_target": "PaCO2 target given",
    "target_below_alkalaemia_floor": "PaCO2 target below the alkalaemia floor",
    "pco2_below_baseline": "PaCO2 below the usual value",
    "niv_criteria_need_arterial_sample": "NIV criteria need an arterial or capillary gas",
    "niv_criteria_met": "NIV criteria met",
    "pco2_above_consciousness_threshold": "PaCO2 above the consciousness threshold",
    "venous_po2_not_interpreted": "venous PO2 not interpreted",
    "po2_above_alveolar": "PO2 above the alveolar PO2",
    "a_a_on_oxygen": "A-a gradient on supplemental oxygen",
    "hypoxaemia_masked_by_oxygen": "hypoxaemia masked by oxygen",
    "respiratory_failure_type_1": "type 1 respiratory failure",
    "respiratory_failure_type_2": "type 2 respiratory failure",
    "pure_hypoventilation": "hypoventilation alone (normal A-a gradient)",
    "gas_exchange_impaired": "hypercapnia with impaired gas exchange",
    "low_inspired_oxygen": "low inspired oxygen",
    "a_a_needs_age": "A-a gradient needs the age",
    "capillary_po2": "capillary PO2",
    "temperature_ph_stat_view": "temperature-corrected values shown",
    "spo2_target": "SpO2 target given",
    "hypercapnic_without_risk_flag": "hypercapnic without the risk flag",
    "risk_flag_with_normal_pco2": "risk flag with a normal PCO2",
    "spo2_below_target": "SpO2 below target",
    "spo2_above_target": "SpO2 above target",
    "severe_acidaemia": "severe acidaemia (pH < 7.20)",
    "severe_alkalaemia": "severe alkalaemia (pH > 7.60)",
    "normal_ph_single_disorder": "normal pH with a single disorder",
    "venous_sample": "venous sample",
    "capillary_sample": "capillary sample",
}
#: the other codes of the summary in words
WORDS = {
    **{code: name for code, name in blood_gas.NAMES.items()},
    "none": "none",
    "acute": "acute",
    "chronic": "chronic",
    "acute_on_chronic": "acute-on-chronic",
    "met": "met",
    "not_met": "not met",
    "not_assessable": "not assessable (venous sample, or site not given)",
    "below": "below the target",
    "within": "within the target",
    "above": "above the target",
}


def _words(code: str) -> str:
    return FINDING_WORDS.get(code) or WORDS.get(code) or code.replace("_", " ")


def summary_text(counts: dict) -> str:
    """The summary in words, each percentage of the rows its heading names."""
    rows, interpreted = counts["rows"], counts["interpreted"]
    lines = [
        f"Rows: {rows:,}; interpreted: {interpreted:,}; with errors (not read): {counts['with_errors']:,}; "
        f"read with notes: {counts.get('with_notes', 0):,}"
    ]

    def block(title: str, items: dict, of: int, rows_are: str, *, code: bool = False) -> None:
        if not items:
            return
        lines.append("")
        lines.append(f"{title} (of {of:,} {rows_are}):")
        shown = {
            (f"{_words(k)} [{k}]" if code and _words(k) != k else _words(k)): n for k, n in items.items()
        }
        width = max(len(k) for k in shown)
        for key, count in shown.items():
            lines.append(f"  {key:<{width}}  {count:>8,}  {100.0 * count / max(of, 1):5.1f} %")

    sites = counts.get("sites", {})
    if sites:
        lines.append("")
        lines.append(f"By sample site (of {rows:,} rows):")
        names = {site: site + (f" (read as {SITE_NOT_GIVEN})" if site == NOT_GIVEN else "") for site in sites}
        width = max(len(name) for name in names.values())
        for site, c in sites.items():
            lines.append(
                f"  {names[site]:<{width}}  {c['rows']:>8,}  {100.0 * c['rows'] / max(rows, 1):5.1f} %   "
                f"({c['interpreted']:,} interpreted, {c['rows'] - c['interpreted']:,} with errors)"
            )
    d = counts.get("denominators", {})
    read = "rows interpreted"
    block(
        "Input errors, rows with each kind",
        counts.get("errors_by_kind", {}),
        rows,
        "rows; a row may have several",
    )
    block("Notes, rows read with each kind", counts.get("notes_by_kind", {}), interpreted, read)
    block("Disorders, rows naming each", counts["disorders"], d.get("disorders", interpreted), read)
    block("Primary disorder", counts["primary"], d.get("primary", interpreted), read)
    chronicity = counts["chronicity"]
    of = d.get("chronicity", sum(chronicity.values()))
    block("Chronicity of the respiratory disorder", chronicity, of, "rows naming one")
    block(
        "NIV criteria, BTS/ICS 2016 thresholds",
        counts["niv_criteria"],
        d.get("niv_criteria", interpreted),
        read,
    )
    spo2 = counts["spo2_on_target"]
    of = d.get("spo2_on_target", sum(spo2.values()))
    block("SpO2 against its target range", spo2, of, "rows with an SpO2")
    block("Findings", counts["findings"], d.get("findings", interpreted), read, code=True)
    return "\n".join(lines)


# -- the command ---------------------------------------------------------------------------------------------


class Progress:
    """A progress bar on a stream (stderr): rows done, rate, and the share of the file read and time left
    when the size of the file is known."""

    def __init__(self, stream, label: str = "interpreting"):
        self.stream, self.label, self.start, self.last = stream, label, time.perf_counter(), 0.0

    def __call__(self, done: int, total: int | None, fraction: float | None = None) -> None:
        now = time.perf_counter()
        finished = (fraction is not None and fraction >= 1.0) or (total is not None and done >= total)
        if not finished and now - self.last < 0.2:
            return
        self.last = now
        if fraction is None and total:
            fraction = done / total
        width = 30
        filled = int(width * min(fraction or 0.0, 1.0))
        rate = done / max(now - self.start, 1e-9)
        elapsed = now - self.start
        bar = "#" * filled + "." * (width - filled)
        of = f"/{total:,}" if total is not None else ""
        text = f"\r{self.label} [{bar}] {done:,}{of} rows, {rate:,.0f} rows/s"
        if fraction:  # the time left only when the share done is known (not for a stream of unknown size)
            text += f", {elapsed * (1.0 - min(fraction, 1.0)) / fraction:4.0f} s left"
        self.stream.write(text + ("\n" if finished else ""))
        self.stream.flush()


class NoRowRead(TableError):
    """Every row of the file had an error: nothing was interpreted (the output and the summary are written
    all the same; ``counts`` is the summary)."""

    def __init__(self, message: str, counts: dict):
        super().__init__(message)
        self.counts = counts


def run(
    source: str,
    output: str | None,
    *,
    pressure_unit: str | None = None,
    progress: bool | None = None,
    full_precision: bool = False,
    episodes: str | None = None,
    stdout=None,
    stderr=None,
) -> dict:
    """Read ``source`` (a path, or "-" for stdin) chunk by chunk, write the audit to ``output`` (a path, or
    "-"/None for stdout) as each chunk is read, and the summary to stdout (to stderr when the CSV goes to
    stdout). Returns the counts. Memory stays that of one chunk (:data:`CHUNK` rows), however long the file.

    ``pressure_unit``: None follows the input (the unit of the PCO2 column, else of most of its cells in the
    first chunk; mmHg when there is none). ``progress``: None shows the bar only when stderr is a terminal;
    True always; False never. ``episodes``: a path; each episode (an episode and a time column) is read as a
    course and written there, one row each (:mod:`frontends.episodes`), and its summary follows the batch's.

    Raises
    ------
    TableError
        The file cannot be read as a whole (nothing written).
    NoRowRead
        No row could be read (the output is written, the summary printed, then this is raised).
    """
    stdout = stdout or sys.stdout
    stderr = stderr or sys.stderr
    with contextlib.ExitStack() as stack, _no_gc():
        if source == "-":
            stream = sys.stdin
            size = None
        else:
            stream = stack.enter_context(open(source, encoding="utf-8", newline=""))
            size = os.fstat(stream.fileno()).st_size or None
        reader = Reader(stream, CHUNK)
        layout = reader.layout
        collector = None
        if episodes is not None:
            from . import episodes as episode_file

            try:
                collector = episode_file.Collector(layout.header, SITE_NOT_GIVEN, row_inputs)
            except episode_file.MissingColumns as exc:
                raise TableError(str(exc)) from None
            stack.callback(collector.close)
        for warning in layout.warnings:
            stderr.write(f"warning: {warning}\n")
        unit = pressure_unit or _input_pressure_unit(reader._first)
        show = stderr.isatty() if progress is None else progress
        bar = Progress(stderr) if show else None
        to_stdout = output in (None, "-")
        target = stdout if to_stdout else stack.enter_context(open(output, "w", encoding="utf-8", newline=""))
        writer = Writer(target, layout, unit, full_precision=full_precision)
        tally = Tally()
        done = 0
        comma_slips = 0
        for table in reader:
            for warning in table.warnings:
                stderr.write(f"warning: {warning}\n")
            audit = interpret_rows(table, np.arange(len(table)), unit)
            _use_censored(table, np.arange(len(table)), audit, unit)
            writer.write(table, audit)
            tally.add(audit, table.line)
            if collector is not None:
                collector.add(table, audit.errors)
            comma_slips += _decimal_comma_slips(table)
            done += len(table)
            if bar is not None:
                bar(done, None, _fraction_read(stream, size))
        if bar is not None and done:
            bar(done, done, 1.0)
        if not writer._started:
            writer.write(reader.empty(), Audit(0, unit, {}, {}, []))
        if collector is not None:
            episode_counts = episode_file.write(
                collector, episodes, delimiter=layout.dialect.delimiter, bom=layout.bom
            )
    counts = tally.counts()
    counts["pressure_unit"] = unit
    file_notes = _file_notes(layout, counts, comma_slips)
    counts["file_notes"] = file_notes
    out = stderr if to_stdout else stdout
    for note in file_notes:
        out.write(f"note: {note}\n")
    out.write(summary_text(counts) + "\n")
    if collector is not None:
        counts["episodes"] = episode_counts
        out.write("\n" + episode_file.summary_text(episode_counts, collector.no_key) + "\n")
    if counts["rows"] and not counts["interpreted"]:
        raise NoRowRead(_no_row_message(counts, comma_slips), counts)
    return counts


def _fraction_read(stream, size: int | None) -> float | None:
    """The share of the file read so far (by bytes, from the stream's position), when its size is known."""
    if not size:
        return None
    try:
        return min(stream.buffer.tell() / size, 1.0)
    except (AttributeError, OSError, ValueError):
        return None


def _input_pressure_unit(table: Table) -> str:
    """The pressure unit of the input: the PCO2 column's, else the unit most of its cells are written in
    (of the first chunk), else mmHg."""
    column = table.columns.get("pco2")
    if column is None:
        return "mmHg"
    if column.unit in ("kPa", "mmHg"):
        return column.unit
    written = Counter(u for u in column.own_units.values() if u in ("kPa", "mmHg"))
    return written.most_common(1)[0][0] if written else "mmHg"


def _decimal_comma_slips(table: Table) -> int:
    """Cells of a comma-separated file that hold a decimal comma ("7,19", quoted): not read as numbers."""
    if table.layout.decimal_comma:
        return 0
    slips = 0
    for column in table.columns.values():
        bad = [t for t in column.distinct if _DECIMAL_COMMA_CELL(t)]
        if bad:
            slips += int(np.isin(column.code, [column.distinct.index(t) for t in bad]).sum())
    return slips


def _file_notes(layout: Layout, counts: dict, comma_slips: int) -> list[str]:
    """What the summary says once for the whole file."""
    notes = []
    if "sample" not in layout.keys:
        notes.append(
            f"the file has no sample site column: every row is read as a {SITE_NOT_GIVEN} sample would be "
            "(no oxygenation outputs, NIV criteria not assessed); add a column 'sample' (arterial, venous "
            "or capillary) to read them fully"
        )
    if layout.decimal_comma and any(key is not None for key in layout.keys):
        notes.append(
            f"cells are separated by '{_delimiter_name(layout.dialect.delimiter)}': numbers are read with a "
            "decimal comma or a decimal point"
        )
    if comma_slips:
        notes.append(
            f"{comma_slips:,} cells hold a decimal comma (such as '7,19') in a comma-separated file and were "
            "not read as numbers: write decimal points, or save the file separated by semicolons"
        )
    return notes


def _delimiter_name(delimiter: str) -> str:
    return {"\t": "tab", ";": ";", ",": ","}.get(delimiter, delimiter)


def _no_row_message(counts: dict, comma_slips: int) -> str:
    kinds = counts["errors_by_kind"]
    kind, rows = next(iter(kinds.items())) if kinds else ("", 0)
    example = counts["example_errors"].get(kind, "")
    text = f"no row could be read ({counts['rows']:,} rows, all with errors)"
    if kind:
        text += f"; the commonest problem, in {rows:,} rows: {kind} (e.g. {example})"
    if comma_slips:
        text += "; the numbers look written with decimal commas in a comma-separated file"
    return text
