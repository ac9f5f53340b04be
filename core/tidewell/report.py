"""Building a calculation's answer: outputs, findings, cautions, steps and a summary.

===================  ============================================================================
``Report``           collects what a calculation says and turns it into the bridge's success shape
``Report.put``       an output (number, word, bool, list or mapping)
``Report.pressure``  a pressure output, given in mmHg and sent in the request's pressure unit
``Report.quantity``  a ``{"value", "unit"}`` output in a fixed unit
``Report.step``      how one number was obtained: label, formula, result, source
``Report.finding``   a coded observation with a severity (``info``, ``notable``, ``urgent``)
``Report.caution``   a plain-language caution shown wherever care could change
``Report.say``       one sentence of the plain-language summary
===================  ============================================================================

Pressures are computed in mmHg everywhere inside the core; only here are they converted to the
unit the user chose. Display rounding is a clinical choice made in the core: ``decimals`` per
output travels in the response's ``display`` map (kPa 1 dp, mmHg whole unless said otherwise).
"""

from __future__ import annotations

import math
import re

from . import units
from .references import REFERENCES

SEVERITIES = ("info", "notable", "urgent")
_CODE = re.compile(r"^[a-z][a-z0-9_]*$")
#: pressures as clinicians write them: kPa to one decimal, mmHg whole
PRESSURE_DECIMALS = {"mmHg": 0, "kPa": 1}
#: units in the words of the report (sentences, findings, cautions): degrees as °C, not the unit code
_DEGREES = re.compile(r"(?:(\d) ?)?\bdeg([CF])\b")


def in_words(text: str) -> str:
    """A sentence with its unit codes as people write them.

    >>> in_words("Arterial blood gas at 37 degC, patient 38.0 degF; degC")
    'Arterial blood gas at 37 °C, patient 38.0 °F; °C'
    """
    return _DEGREES.sub(lambda m: f"{m.group(1) + ' ' if m.group(1) else ''}°{m.group(2)}", text)


def compared(value: float, limit: float, decimals: int, *, most: int = 3) -> tuple[str, str]:
    """``value`` and ``limit`` as text for a sentence that says one is above or below the other, so that the
    two never read the same: the value to ``decimals`` places, or to more (up to ``most``) where that many
    would show it equal to the limit; the limit to as many as the value where the usual ``decimals`` would
    round it to another number (75 mmHg is 9.999 kPa, not 10.0), else to ``decimals``.

    >>> compared(7.349, 7.35, 2), compared(6.51, 6.5, 1), compared(75.1, 75.0, 0), compared(10.0, 9.99918, 1)
    (('7.349', '7.35'), ('6.51', '6.5'), ('75.1', '75'), ('10.000', '9.999'))
    >>> compared(7.31, 7.35, 2), compared(7.35, 7.35, 2)
    (('7.31', '7.35'), ('7.35', '7.35'))
    """
    n = decimals
    while n < most and f"{value:.{n}f}" == f"{limit:.{n}f}":
        n += 1
    if f"{value:.{n}f}" == f"{limit:.{n}f}":
        n = decimals  # equal to every shown place: as usual
    limit_n = n if float(f"{limit:.{n}f}") != float(f"{limit:.{decimals}f}") else decimals
    return f"{value:.{n}f}", f"{limit:.{limit_n}f}"


def pressure_text(mmhg: float, unit: str, *, against: float | None = None) -> str:
    """A pressure (given in mmHg) as text in ``unit``, as clinicians write it; ``against`` (mmHg): a limit
    the sentence compares it with, so that the two never read the same (``compared``).

    >>> pressure_text(45.0, "kPa"), pressure_text(45.0, "mmHg"), pressure_text(48.83, "kPa", against=48.754)
    ('6.0 kPa', '45 mmHg', '6.51 kPa')
    """
    value = units.convert(mmhg, "mmHg", unit)
    if against is None:
        return f"{value:.{PRESSURE_DECIMALS[unit]}f} {unit}"
    return f"{compared(value, units.convert(against, 'mmHg', unit), PRESSURE_DECIMALS[unit])[0]} {unit}"


class Report:
    """The answer of one calculation."""

    def __init__(self, calc: str, *, pressure_unit: str = "mmHg"):
        self.calc = calc
        self.pressure_unit = pressure_unit
        self.outputs: dict = {}
        self.display: dict[str, int] = {}
        self.findings: list[dict] = []
        self.cautions: list[str] = []
        self.steps: list[dict] = []
        self.summary: list[str] = []

    # -- values ------------------------------------------------------------------------------
    def pressure_value(self, mmhg: float) -> dict:
        """A pressure (given in mmHg) as a quantity in the request's pressure unit."""
        return {"value": units.convert(mmhg, "mmHg", self.pressure_unit), "unit": self.pressure_unit}

    def pressure_text(self, mmhg: float, *, against: float | None = None) -> str:
        """A pressure (given in mmHg) as text in the request's unit: ``7.6 kPa``, ``57 mmHg``."""
        return pressure_text(mmhg, self.pressure_unit, against=against)

    def put(self, name: str, value, *, decimals: int | None = None) -> None:
        _check_finite(name, value)
        self.outputs[name] = value
        if decimals is not None:
            self.display[name] = decimals

    def pressure(self, name: str, mmhg: float, *, decimals: int | None = None) -> None:
        self.put(name, self.pressure_value(mmhg))
        self.display[name] = PRESSURE_DECIMALS[self.pressure_unit] if decimals is None else decimals

    def pressure_range(self, name: str, low_mmhg: float, high_mmhg: float) -> None:
        self.put(name, {"low": self.pressure_value(low_mmhg), "high": self.pressure_value(high_mmhg)})
        self.display[name] = PRESSURE_DECIMALS[self.pressure_unit]

    def quantity(self, name: str, value: float, unit: str, *, decimals: int | None = None) -> None:
        self.put(name, {"value": value, "unit": unit}, decimals=decimals)

    # -- explanation -------------------------------------------------------------------------
    def step(
        self,
        label: str,
        formula: str,
        result,
        source: str | tuple[str, ...],
        *,
        output: str | None = None,
        pressure: bool = False,
        unit: str | None = None,
        inputs: dict | None = None,
    ) -> None:
        """Record a step. ``source`` is a reference key (or several); ``pressure=True`` means
        ``result`` is a pressure in mmHg to be shown in the user's unit; ``unit`` makes it a quantity."""
        keys = (source,) if isinstance(source, str) else tuple(source)
        for key in keys:
            if key not in REFERENCES:
                raise KeyError(f"step {label!r}: unknown reference key {key!r}")
        if pressure:
            result = self.pressure_value(result)
        elif unit is not None:
            result = {"value": result, "unit": unit}
        _check_finite(label, result)
        entry = {
            "label": label,
            "formula": formula,
            "result": result,
            "source": "; ".join(REFERENCES[k].short for k in keys),
            "source_keys": list(keys),
        }
        if output is not None:
            entry["output"] = output
        if inputs:
            _check_finite(label, inputs)
            entry["inputs"] = inputs
        self.steps.append(entry)

    def computed(
        self,
        name: str,
        value,
        label: str,
        formula: str,
        source: str | tuple[str, ...],
        *,
        unit: str | None = None,
        pressure: bool = False,
        decimals: int | None = None,
        inputs: dict | None = None,
    ) -> None:
        """Put output ``name`` and the step that explains it, the usual pair: a pressure in mmHg
        (``pressure=True``), a quantity (``unit``) or a plain value."""
        if pressure:
            self.pressure(name, value, decimals=decimals)
        elif unit is not None:
            self.quantity(name, value, unit, decimals=decimals)
        else:
            self.put(name, value, decimals=decimals)
        self.step(label, formula, value, source, output=name, pressure=pressure, unit=unit, inputs=inputs)

    def finding(self, code: str, severity: str, text: str, suggest: list[dict] | None = None) -> None:
        """A finding; ``suggest``: values to use instead (``{"field", "value", "unit"}``), one tap each."""
        if not _CODE.match(code):
            raise ValueError(f"finding code {code!r} is not snake_case")
        if severity not in SEVERITIES:
            raise ValueError(f"finding severity {severity!r}")
        if any(f["code"] == code for f in self.findings):
            return
        entry = {"code": code, "severity": severity, "text": text}
        if suggest:
            entry["suggest"] = suggest
        self.findings.append(entry)

    def caution(self, text: str) -> None:
        if text not in self.cautions:
            self.cautions.append(text)

    def say(self, sentence: str) -> None:
        self.summary.append(sentence)

    # -- out ---------------------------------------------------------------------------------
    def to_response(self, engine: str) -> dict:
        order = {s: i for i, s in enumerate(("urgent", "notable", "info"))}
        findings = sorted(self.findings, key=lambda f: order[f["severity"]])
        return {
            "ok": True,
            "calc": self.calc,
            "engine": engine,
            "outputs": self.outputs,
            "findings": [{**f, "text": in_words(f["text"])} for f in findings],
            "cautions": [in_words(c) for c in self.cautions],
            "steps": self.steps,
            "summary": [in_words(t) for t in self.summary],
            "display": self.display,
            "options": {"pressure_unit": self.pressure_unit},
        }


def _check_finite(name: str, value) -> None:
    """Refuse NaN and infinities anywhere inside ``value`` (a core bug, never a user error)."""
    if isinstance(value, float):
        if not math.isfinite(value):
            raise ArithmeticError(f"{name}: non-finite value")
    elif isinstance(value, dict):
        for k, v in value.items():
            _check_finite(f"{name}.{k}", v)
    elif isinstance(value, (list, tuple)):
        for i, v in enumerate(value):
            _check_finite(f"{name}[{i}]", v)
