"""Errors raised by the core for bad input.

========================  =========================================================
``InputError``            one problem with one named input field
``InputErrors``           several ``InputError`` collected while reading a request
``require_number``        check that a value is a finite real number within a range
========================  =========================================================

Every message names the field, says what is wrong, gives the value received and, where a
likely mistake can be guessed (a unit mix-up, a percentage for a fraction), what the user
probably meant.
"""

from __future__ import annotations

import math

#: Error codes of the bridge contract (CONTRACT.md) plus the project's own additions.
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
    """

    def __init__(
        self, field: str, value: object, problem: str, hint: str = "", *, code: str = "out_of_range"
    ):
        if code not in ERROR_CODES:
            raise ValueError(f"unknown error code {code!r}")
        self.field = field
        self.value = value
        self.problem = problem
        self.hint = hint
        self.code = code
        shown = _show(value)
        text = f"{field}: {problem}" + (f" (got {shown})" if shown else "")
        super().__init__(f"{text}. {hint}" if hint else text)

    def as_entry(self) -> dict:
        """The error as a bridge error entry ``{"field", "code", "message"}``."""
        return {"field": self.field, "code": self.code, "message": str(self)}


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


def _show(value: object) -> str:
    if value is _MISSING:
        return ""
    text = repr(value)
    if not text:
        return ""
    return text if len(text) <= 60 else text[:57] + "..."


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
    tidewell.errors.InputError: hco3_mmol_l: must be 2 to 60 mmol/L (got 600)
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
