"""The ``convert`` calculation: one quantity to another unit.

==========  ===============================================================
``convert``  bridge calculation: ``quantity``, ``to``, ``substance?`` -> ``result``
==========  ===============================================================
"""

from __future__ import annotations

from .. import units
from ..errors import InputError, InputErrors, is_real
from ..fields import Inputs
from ..report import Report


def convert(inputs: Inputs, report: Report) -> None:
    """Convert ``inputs.quantity`` (``{"value", "unit"}``) to ``inputs.to``.

    Mass/molar conversions (glucose, urea, bun, lactate, phosphate, hb...) need ``substance``.
    """
    raw_q = inputs.mapping("quantity", required=True, label="quantity")
    to = inputs.raw.get("to")
    inputs.read.add("to")
    substance = inputs.choice("substance", tuple(units.SUBSTANCES), label="substance")
    if to is None:
        inputs.fail("to", None, "the unit to convert to is required", code="missing")
    elif not isinstance(to, str) or to not in units.ALL_UNITS:
        inputs.fail("to", to, "is not a unit Tidewell knows", _hint(to), code="bad_unit")
    value = unit = None
    if raw_q is not None:
        extra = sorted(set(raw_q) - {"value", "unit"})
        value, unit = raw_q.get("value"), raw_q.get("unit")
        if extra:
            inputs.fail("quantity", raw_q, f"has unexpected keys {extra}", code="bad_request")
        elif value is None:
            inputs.fail("quantity.value", None, "is required", code="missing")
        elif not is_real(value) or value != value or value in (float("inf"), float("-inf")):
            inputs.fail("quantity.value", value, "must be a finite number", code="not_a_number")
        if unit is None:
            inputs.fail("quantity.unit", None, "is required", code="missing")
        elif not isinstance(unit, str) or unit not in units.ALL_UNITS:
            inputs.fail("quantity.unit", unit, "is not a unit Tidewell knows", _hint(unit), code="bad_unit")
    inputs.finish()
    try:
        result = units.convert(float(value), unit, to, substance=substance)
    except InputError as exc:
        field = "inputs.substance" if exc.field == "substance" else "inputs.to"
        raise InputErrors([InputError(field, exc.value, exc.problem, exc.hint, code=exc.code)]) from None
    if abs(result) > 1e300:
        raise InputErrors(
            [InputError("inputs.quantity.value", value, "is too large to convert", code="out_of_range")]
        )
    report.quantity("result", result, to)
    source = "bipm2019" if units.unit_family(to) == "pressure" else "nist811"
    if substance is not None and units.unit_family(unit) != units.unit_family(to):
        source = "iupac_masses"
    formula = f"{unit} -> {to}" + (
        f" (molar mass of {substance}: {units.SUBSTANCES[substance][0]} g/mol)"
        if source == "iupac_masses"
        else ""
    )
    report.step(f"{value:g} {unit} in {to}", formula, result, source, output="result", unit=to)


def _hint(unit: object) -> str:
    try:
        units.unit_family(unit)  # type: ignore[arg-type]
    except InputError as exc:
        return exc.hint
    return ""
