"""Input readers shared by the oxygenation, ventilation and temperature calculations.

Each calculation is ``f(inputs, report)`` (DEVELOPERS.md): it reads every input with the ``Inputs``
accessors (the PCO2, PO2 and temperature readers below are shared), calls ``inputs.finish()`` once, computes
with the formulas (oxygenation, ventilation, temperature, altitude) and fills the report. Blood-gas values
(pH, PCO2, PO2) are always the analyser's values at 37 degC unless a calculation says otherwise;
``temperature`` is always the patient's.
"""

from __future__ import annotations

from ..errors import InputError, InputErrors
from ..fields import Inputs
from ..formulas import oxygenation as ox

_LOCAL = "Use with clinical judgement and local protocols; these are estimates, not orders."
_PCO2_WORD = "is not survivable"


def _fail_now(field: str, value, problem: str, hint: str = "", code: str = "inconsistent") -> InputErrors:
    return InputErrors([InputError(f"inputs.{field}", value, problem, hint, code=code)])


#: accepted PCO2 [mmHg]: 8 keeps the lowest values seen in extreme hyperventilation (severe ketoacidosis)
#: and catches a kPa value sent as mmHg (5.3 mmHg -> "did you mean 5.3 kPa?")
PCO2_LOW_MMHG, PCO2_HIGH_MMHG = 8.0, 250.0


def _read_pco2(inputs: Inputs, *, required: bool = True) -> float | None:
    return inputs.quantity(
        "pco2",
        unit="mmHg",
        low=PCO2_LOW_MMHG,
        high=PCO2_HIGH_MMHG,
        label="PCO2",
        required=required,
        plausible_word=_PCO2_WORD,
    )


def _read_po2(inputs: Inputs, *, required: bool = False) -> float | None:
    return inputs.quantity(
        "po2", unit="mmHg", low=5.0, high=800.0, label="PO2", required=required, plausible_word=_PCO2_WORD
    )


def _read_temperature(inputs: Inputs, *, low: float, high: float, required: bool = False) -> float | None:
    return inputs.quantity(
        "temperature",
        unit="degC",
        low=low,
        high=high,
        label="temperature",
        required=required,
        plausible_word="is not a body temperature",
    )


def _shift(po2: float, *, ph, pco2, be, temperature: float = 37.0):
    """(virtual PO2, method word, source key) for the analyser or temperature-corrected values."""
    p_h = 7.40 if ph is None else ph
    if be is not None:
        v = ox.virtual_po2_base_excess(po2_mmhg=po2, temperature_c=temperature, ph=p_h, base_excess_mmol_l=be)
        return v, "base_excess", "severinghaus1966"
    v = ox.virtual_po2_kelman(
        po2_mmhg=po2, temperature_c=temperature, ph=p_h, pco2_mmhg=40.0 if pco2 is None else pco2
    )
    return v, "kelman", "kelman1966"
