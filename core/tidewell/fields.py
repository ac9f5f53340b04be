"""Reading the ``inputs`` object of a bridge request.

==============================  ================================================================
``Inputs``                      typed, unit-converting accessors that collect every problem found
``Inputs.number``               a bare number (pH, ratios, ages, breaths per minute)
``Inputs.quantity``             a ``{"value", "unit"}`` quantity returned in the unit asked for
``Inputs.fraction``             a fraction 0-1 given bare or as ``{"value": 40, "unit": "%"}``
``Inputs.percent``              a percentage 0-100 (saturations) given bare or with unit ``%``
``Inputs.choice``, ``flag``     a word from a fixed list; a true/false value
``Inputs.finish``               raise ``InputErrors`` for everything found, unknown keys included
==============================  ================================================================

Accessors never raise: each problem is recorded with its field, and the calculation calls
:meth:`Inputs.finish` once it has read everything, so the user sees all problems at once.
``null`` is read as "not given". A value outside its accepted range is ``out_of_range``; when the
same number in another unit of the same kind would be in range, the error is ``implausible`` and
says which unit the user probably meant.
"""

from __future__ import annotations

import difflib
import math
import re

from . import units
from .errors import InputError, InputErrors, is_real

_ABSENT = object()


def _fmt(x: float) -> str:
    return f"{x:.4g}"


def _readable(key: str) -> str:
    """An input without a label of its own, in words: ``hypercapnia_risk`` -> ``hypercapnia risk``."""
    return key.replace("_", " ")


def _span(low: float, high: float, unit: str, shown_unit: str, substance: str | None) -> str:
    """``low`` to ``high`` (in ``unit``) said in ``shown_unit``, the unit the user chose."""
    if shown_unit == unit or not all(map(math.isfinite, (low, high))):
        return f"{_fmt(low)} to {_fmt(high)} {unit}"
    lo = units.convert(low, unit, shown_unit, substance=substance)
    hi = units.convert(high, unit, shown_unit, substance=substance)
    lo, hi = min(lo, hi), max(lo, hi)
    return f"{float(f'{lo:.3g}'):g} to {float(f'{hi:.3g}'):g} {shown_unit}"


class Inputs:
    """Accessors over one request's ``inputs`` mapping."""

    def __init__(self, raw: dict, *, prefix: str = "inputs"):
        self.raw = raw
        self.prefix = prefix
        self.errors: list[InputError] = []
        self.read: set[str] = set()

    # -- plumbing ---------------------------------------------------------------------------
    def field(self, key: str) -> str:
        return f"{self.prefix}.{key}"

    def given(self, key: str) -> bool:
        """True when ``key`` is present and not null."""
        return self.raw.get(key) is not None

    def fail(
        self, key: str, value: object, problem: str, hint: str = "", *, code: str, suggest: dict | None = None
    ) -> None:
        self.errors.append(InputError(self.field(key), value, problem, hint, code=code, suggest=suggest))

    def _take(self, key: str, required: bool, label: str):
        self.read.add(key)
        value = self.raw.get(key)
        if value is None:
            if required:
                self.fail(key, _ABSENT_REPR, f"{label} is required", code="missing")
            return _ABSENT
        return value

    def _check_number(self, key: str, value: object, label: str) -> float | None:
        if not is_real(value):
            hint = ""
            if isinstance(value, str) and re.fullmatch(r"\s*\d{1,3}[.,]\d{3}\s*", value):
                # "8,000" or "8.000": a thousands separator or a decimal mark; never guessed (ask)
                whole, part = re.split(r"[.,]", value.strip())
                hint = f"Did you mean {whole}{part} or {float(whole + '.' + part):g}?"
            self.fail(key, value, f"{label} must be a number", hint, code="not_a_number")
            return None
        number = float(value)
        if not math.isfinite(number):
            self.fail(key, value, f"{label} must be a finite number", code="not_a_number")
            return None
        return number

    # -- accessors --------------------------------------------------------------------------
    def number(
        self,
        key: str,
        *,
        low: float,
        high: float,
        label: str | None = None,
        required: bool = False,
        default: float | None = None,
        what: str = "",
    ) -> float | None:
        """A bare number in ``[low, high]`` (``default`` when absent)."""
        label = label or _readable(key)
        value = self._take(key, required, label)
        if value is _ABSENT:
            return default
        if isinstance(value, dict):
            self.fail(key, value, f"{label} is a plain number without a unit", code="bad_unit")
            return None
        number = self._check_number(key, value, label)
        if number is None:
            return None
        if not low <= number <= high:
            self.fail(key, value, f"{label} must be {_fmt(low)} to {_fmt(high)}{what}", code="out_of_range")
            return None
        return number

    def quantity(
        self,
        key: str,
        *,
        unit: str,
        low: float,
        high: float,
        label: str | None = None,
        substance: str | None = None,
        required: bool = False,
        default: float | None = None,
        plausible_word: str = "is outside the accepted range",
    ) -> float | None:
        """A ``{"value", "unit"}`` quantity converted to ``unit`` and checked against ``[low, high]``.

        ``low`` and ``high`` are in ``unit``. ``default`` (also in ``unit``) is returned when absent.
        """
        label = label or _readable(key)
        value = self._take(key, required, label)
        if value is _ABSENT:
            return default
        accepted = units.units_for(unit, substance=substance)
        if not isinstance(value, dict):
            if is_real(value):
                self.fail(key, value, f"{label} needs a unit: " + " or ".join(accepted), code="bad_unit")
            else:
                self.fail(key, value, f"{label} must be a number with its unit", code="bad_request")
            return None
        extra = sorted(set(value) - {"value", "unit"})
        if extra:
            self.fail(key, value, f"{label} has unexpected parts: " + ", ".join(extra), code="bad_request")
            return None
        if "value" not in value:
            self.fail(key, value, f"{label} has no value", code="missing")
            return None
        number = self._check_number(key, value.get("value"), label)
        if number is None:
            return None
        given_unit = value.get("unit")
        if given_unit is None:
            self.fail(key, value, f"{label} needs a unit: " + " or ".join(accepted), code="bad_unit")
            return None
        if not isinstance(given_unit, str) or given_unit not in accepted:
            hint = "Accepted units: " + ", ".join(accepted)
            if isinstance(given_unit, str):
                close = difflib.get_close_matches(given_unit, accepted, n=1, cutoff=0.5)
                folded = {u.lower(): u for u in accepted}.get(given_unit.strip().lower())
                guess = folded or (close[0] if close else None)
                if guess:
                    hint = f"Did you mean '{guess}'? " + hint
            self.fail(
                key, value, f"{label}: the unit {given_unit!r} is not accepted here", hint, code="bad_unit"
            )
            return None
        converted = units.convert(number, given_unit, unit, substance=substance)
        if low <= converted <= high:
            return converted
        # the accepted range in the unit the user chose (a kPa entry is told its range in kPa)
        span = _span(low, high, unit, given_unit, substance)
        # outside: would the same number in another accepted unit be in range? (common mix-ups first)
        for other in sorted(accepted, key=_hint_rank):
            if other == given_unit or other in _NO_GUESS:
                continue
            alt = units.convert(number, other, unit, substance=substance)
            if low <= alt <= high:
                self.fail(
                    key,
                    value,
                    f"{label} {_fmt(number)} {given_unit} {plausible_word} ({span})",
                    f"Did you mean {_fmt(number)} {other}?",
                    code="implausible",
                    suggest={"value": number, "unit": other},
                )
                return None
        self.fail(
            key, value, f"{label} {_fmt(number)} {given_unit} {plausible_word} ({span})", code="out_of_range"
        )
        return None

    def fraction(
        self,
        key: str,
        *,
        low: float = 0.21,
        high: float = 1.0,
        label: str | None = None,
        required: bool = False,
        default: float | None = None,
    ) -> float | None:
        """A fraction given bare (0.4) or as a percentage ``{"value": 40, "unit": "%"}``."""
        label = label or _readable(key)
        value = self._take(key, required, label)
        if value is _ABSENT:
            return default
        if isinstance(value, dict):
            extra = sorted(set(value) - {"value", "unit"})
            if extra or value.get("unit") not in ("%", "1"):
                self.fail(
                    key,
                    value,
                    f'{label} is a fraction (0.4) or {{"value": 40, "unit": "%"}}',
                    code="bad_unit",
                )
                return None
            number = self._check_number(key, value.get("value"), label)
            if number is None:
                return None
            number = number / 100.0 if value["unit"] == "%" else number
            shown = f"{_fmt(value['value'])} {value['unit']}"
        else:
            number = self._check_number(key, value, label)
            if number is None:
                return None
            shown = _fmt(number)
        if low <= number <= high:
            return number
        if low <= number / 100.0 <= high and not isinstance(value, dict):
            self.fail(
                key,
                value,
                f"{label} {shown} is not a fraction ({_fmt(low)} to {_fmt(high)})",
                f"Did you mean {_fmt(number)} % ({number / 100:.2f})?",
                code="implausible",
                suggest={"value": number, "unit": "%"},
            )
            return None
        if isinstance(value, dict) and value["unit"] == "%":
            typed = value["value"]
            span = f"{_fmt(low * 100)} to {_fmt(high * 100)} %"
            if low <= typed <= high:  # "0.28" typed with the unit on %: a fraction
                self.fail(
                    key,
                    value,
                    f"{label} {shown} is not a percentage ({span})",
                    f"Did you mean {_fmt(typed * 100)} %?",
                    code="implausible",
                    suggest={"value": float(f"{typed * 100:.6g}"), "unit": "%"},
                )
                return None
            self.fail(key, value, f"{label} {shown} is outside {span}", code="out_of_range")
            return None
        self.fail(key, value, f"{label} {shown} is outside {_fmt(low)} to {_fmt(high)}", code="out_of_range")
        return None

    def percent(
        self,
        key: str,
        *,
        low: float = 0.0,
        high: float = 100.0,
        label: str | None = None,
        required: bool = False,
        default: float | None = None,
    ) -> float | None:
        """A percentage (saturation) given bare (92) or as ``{"value": 92, "unit": "%"}``."""
        label = label or _readable(key)
        value = self._take(key, required, label)
        if value is _ABSENT:
            return default
        if isinstance(value, dict):
            if sorted(value) != ["unit", "value"] or value.get("unit") != "%":
                self.fail(
                    key,
                    value,
                    f'{label} is a percentage (92) or {{"value": 92, "unit": "%"}}',
                    code="bad_unit",
                )
                return None
            value = value["value"]
        number = self._check_number(key, value, label)
        if number is None:
            return None
        if low <= number <= high:
            return number
        if 0 < number <= 1 and low <= number * 100 <= high:
            self.fail(
                key,
                value,
                f"{label} {_fmt(number)} is a percentage ({_fmt(low)} to {_fmt(high)} %)",
                f"Did you mean {_fmt(number * 100)} %?",
                code="implausible",
                suggest={"value": float(f"{number * 100:.6g}")},
            )
            return None
        self.fail(
            key,
            value,
            f"{label} {_fmt(number)} % is outside {_fmt(low)} to {_fmt(high)} %",
            code="out_of_range",
        )
        return None

    def choice(
        self,
        key: str,
        choices: tuple[str, ...],
        *,
        default: str | None = None,
        label: str | None = None,
        required: bool = False,
    ) -> str | None:
        """One word of ``choices``."""
        label = label or _readable(key)
        value = self._take(key, required, label)
        if value is _ABSENT:
            return default
        if isinstance(value, str) and value in choices:
            return value
        hint = "Choose one of: " + ", ".join(choices)
        if isinstance(value, str):
            close = difflib.get_close_matches(value.strip().lower(), choices, n=1, cutoff=0.5)
            if close:
                hint = f"Did you mean '{close[0]}'? " + hint
        self.fail(key, value, f"{label} is not one of the accepted words", hint, code="bad_request")
        return None

    def flag(self, key: str, *, default: bool = False, label: str | None = None) -> bool:
        """A JSON true/false."""
        label = label or _readable(key)
        value = self._take(key, False, label)
        if value is _ABSENT:
            return default
        if isinstance(value, bool):
            return value
        self.fail(key, value, f"{label} must be true or false", code="bad_request")
        return default

    def mapping(self, key: str, *, label: str | None = None, required: bool = False) -> dict | None:
        """A nested JSON object, returned as is (its own reader checks it)."""
        label = label or _readable(key)
        value = self._take(key, required, label)
        if value is _ABSENT:
            return None
        if isinstance(value, dict):
            return value
        self.fail(key, value, f"{label} must be an object", code="bad_request")
        return None

    # -- end ---------------------------------------------------------------------------------
    def finish(self, known: tuple[str, ...] = ()) -> None:
        """Record unknown keys, then raise ``InputErrors`` if anything was wrong."""
        names = sorted(self.read | set(known))
        for key in self.raw:
            if key not in self.read and key not in known:
                close = difflib.get_close_matches(str(key), names, n=1, cutoff=0.6)
                hint = f"Did you mean '{close[0]}'?" if close else "Accepted: " + ", ".join(names)
                if not names:
                    hint = "This calculation takes no inputs."
                self.errors.append(
                    InputError(
                        self.field(str(key)),
                        _ABSENT_REPR,
                        f"'{key}' is not an input of this calculation",
                        hint,
                        code="unknown_input",
                    )
                )
        if self.errors:
            raise InputErrors(self.errors)


#: units tried first when guessing what the user meant (the everyday mix-ups)
_HINT_ORDER = (
    "mmHg",
    "kPa",
    "hPa",
    "mmol/L",
    "mg/dL",
    "g/dL",
    "g/L",
    "degC",
    "degF",
    "ft",
    "m",
    "cm",
    "in",
    "kg",
    "lb",
    "mL",
    "L",
    "L/min",
    "mL/min",
    "min",
    "h",
    "bar",
    "psi",
)


#: units never offered as "did you mean" for a value in another unit: nobody types a blood gas in them
_NO_GUESS = frozenset(("hPa", "Pa", "bar", "psi", "cmH2O"))


def _hint_rank(unit: str) -> int:
    return _HINT_ORDER.index(unit) if unit in _HINT_ORDER else len(_HINT_ORDER)


class _AbsentRepr:
    """Placeholder value so messages about missing/unknown fields show no '(got ...)'."""

    def __repr__(self) -> str:
        return ""


_ABSENT_REPR = _AbsentRepr()
