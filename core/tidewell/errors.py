"""Errors raised by the core for bad input.

========================  =========================================================
``InputError``            one problem with one named input field
``InputErrors``           several ``InputError`` collected while reading a request
``require_number``        check that a value is a finite real number within a range
========================  =========================================================

Every message is short and in clinical words: it names the input by its label, says what is
wrong, shows the value as entered (``'seven'``, ``70 kPa``, never a Python or JSON repr) and, where a
likely mistake can be guessed (a unit mix-up, a percentage for a fraction), what the user probably
meant. The guess is also given as data (``suggest``: the value and unit to use) so that a screen can
offer it with one tap. The field path is in the entry's ``field``, not in the message.
"""

from __future__ import annotations

import math

#: Error codes of the bridge contract (docs/bridge.md) plus the project's own additions.
ERROR_CODES = (
    "missing",
    "not_a_number",
    "bad_unit",
    "out_of_range",
    "implausible",
    "inconsistent",
    "unknown_calc",
    "bad_request",
    "unknown_input",
    "internal_error",
)


class InputError(ValueError):
    """One problem with one input.

    Parameters
    ----------
    field : str
        Dotted path of the offending field as the user sent it, e.g. ``"inputs.pco2"``.
    value : object
        The value received (shown with ``repr`` in the message).
    problem : str
        What is wrong, in plain words.
    hint : str, optional
        What the user probably meant.
    code : str
        One of :data:`ERROR_CODES`.
    suggest : dict, optional
        The value the hint offers, as data: ``{"value": number, "unit": text}`` (``unit`` left out for
        a bare number); a screen offers it with one tap.
    """

    def __init__(
        self,
        field: str,
        value: object,
        problem: str,
        hint: str = "",
        *,
        code: str = "out_of_range",
        suggest: dict | None = None,
    ):
        if code not in ERROR_CODES:
            raise ValueError(f"unknown error code {code!r}")
        self.field = field
        self.value = value
        self.problem = problem
        self.hint = hint
        self.code = code
        self.suggest = suggest
        shown = show_value(value)
        if problem.split(" ", 1)[0] in _VERBS:  # a domain function's bare problem: name what it is about
            problem = f"{field}: {problem}"
        else:  # an input named by its key reads as words: "hypercapnia_risk must" -> "Hypercapnia risk must"
            head, space, rest = problem.partition(" ")
            if head.isidentifier() and head.islower():
                head = head.replace("_", " ")
            problem = head + space + rest
            if problem[:2].islower():  # a label at the start of a sentence ("sample" -> "Sample"; pH stays)
                problem = problem[0].upper() + problem[1:]
        text = problem + (f" (entered: {shown})" if shown and shown not in problem else "")
        super().__init__(f"{text}. {hint}" if hint else f"{text}.")

    def as_entry(self) -> dict:
        """The error as a bridge error entry ``{"field", "code", "message"}`` (and ``suggest``)."""
        entry = {"field": self.field, "code": self.code, "message": str(self)}
        if self.suggest is not None:
            entry["suggest"] = self.suggest
        return entry


#: first words of a problem that does not name its input (domain functions), which the message then prefixes
_VERBS = frozenset(("must", "is", "are", "cannot", "needs", "has", "should", "gives", "exceeds", "would"))


class InputErrors(ValueError):
    """Several input problems found in one request."""

    def __init__(self, errors: list[InputError]):
        self.errors = list(errors)
        super().__init__("; ".join(str(e) for e in self.errors))


class _Nothing:
    """Placeholder for "no value was sent": messages about it show no "(got ...)"."""

    def __repr__(self) -> str:
        return ""


#: pass as ``value`` when the problem is that nothing was sent
NOTHING = _Nothing()
_MISSING = NOTHING


def show_value(value: object) -> str:
    """A value as the user entered it, for a message: ``'seven'``, ``70 kPa``, ``7.28``, never a repr.

    >>> show_value({"value": 70, "unit": "kPa"}), show_value("seven"), show_value(True), show_value([1])
    ('70 kPa', "'seven'", 'true', 'a list')
    """
    if value is _MISSING or not repr(value):
        return ""
    if isinstance(value, bool):
        return "true" if value else "false"
    if is_real(value):
        return f"{value:g}"
    if isinstance(value, str):
        text = value if len(value) <= 40 else value[:37] + "..."
        return f"'{text}'"
    if isinstance(value, dict):
        number, unit = value.get("value"), value.get("unit")
        if "value" in value:
            shown = show_value(number) if number is not None else "no value"
            return f"{shown} {unit}" if isinstance(unit, str) else shown
        return "an object"
    if isinstance(value, (list, tuple)):
        return "a list"
    if value is None:
        return "nothing"
    return "a value of the wrong kind"


def is_real(value: object) -> bool:
    """True for an int or float that is not a bool (JSON numbers arrive as these)."""
    return isinstance(value, (int, float)) and not isinstance(value, bool)


def require_number(
    field: str, value: object, *, low: float, high: float, unit: str = "", hint: str = ""
) -> float:
    """Return ``value`` as a float if it is a finite real number in ``[low, high]``.

    Raises
    ------
    InputError
        ``not_a_number`` for bools, strings, None and other types; ``out_of_range`` for
        non-finite values or values outside the range.

    Examples
    --------
    >>> require_number("hco3_mmol_l", 24, low=2, high=60, unit="mmol/L")
    24.0
    >>> require_number("hco3_mmol_l", 600, low=2, high=60, unit="mmol/L")
    Traceback (most recent call last):
    ...
    tidewell.errors.InputError: hco3_mmol_l: must be 2 to 60 mmol/L (entered: 600).
    """
    if not is_real(value):
        raise InputError(field, value, "must be a number", code="not_a_number")
    number = float(value)
    if not math.isfinite(number):
        raise InputError(field, value, "must be a finite number", code="not_a_number")
    if not low <= number <= high:
        span = f"{low:g} to {high:g}" + (f" {unit}" if unit else "")
        raise InputError(field, value, f"must be {span}", hint, code="out_of_range")
    return number
