"""A bridge response as text, and the output flags every command shares.

==================  ================================================================================
``render``          a bridge response as readable text: summary, findings by severity, key numbers,
                    cautions
``format_value``    one output value as text (numbers, quantities, ranges, lists, nested objects)
``add_output_flags`` ``--json``, ``--kpa``, ``--mmhg`` (and ``--no-how-sure``) on a command's parser
==================  ================================================================================

Used by the single-sample command (cli.py) and ``tidewell course`` (coursefile.py). Standard library only.
"""

from __future__ import annotations

import argparse
import shutil
import textwrap

from .. import __version__


def add_output_flags(parser: argparse.ArgumentParser, *, how_sure: bool = False) -> None:
    out = parser.add_argument_group("Output")
    if how_sure:
        out.add_argument(
            "--no-how-sure", action="store_true", help="skip the 'how sure' line (10,000 draws, needs numpy)"
        )
    out.add_argument("--json", action="store_true", help="print the bridge response as JSON instead of text")
    units_ = out.add_mutually_exclusive_group()
    units_.add_argument(
        "--kpa", dest="pressure_unit", action="store_const", const="kPa", help="pressures in kPa"
    )
    units_.add_argument(
        "--mmhg", dest="pressure_unit", action="store_const", const="mmHg", help="pressures in mmHg"
    )


# -- text output ---------------------------------------------------------------------------------------------

#: the blood_gas outputs shown as key numbers, with their labels
_KEY_NUMBERS = {
    "ph_status": "pH status",
    "disorders": "Disorders",
    "consistency": "pH/PCO2/HCO3",
    "hco3": "HCO3",
    "hco3_computed": "HCO3 from pH and PCO2",
    "standard_base_excess": "Standard base excess",
    "expected_pco2": "Expected PaCO2",
    "expected_hco3": "Expected HCO3",
    "anion_gap": "Anion gap",
    "anion_gap_corrected": "Anion gap, albumin-corrected",
    "delta_ratio": "Delta ratio",
    "metabolic_acidosis_type": "Metabolic acidosis",
    "osmolar_gap": "Osmolar gap",
    "strong_ion_gap": "Strong ion gap",
    "pao2_alveolar": "Alveolar PO2",
    "a_a_gradient": "A-a gradient",
    "a_a_expected_upper": "A-a upper limit for age",
    "pf_ratio": "P/F ratio",
    "respiratory_failure": "Respiratory failure",
    "spo2_target": "SpO2 target (%)",
    "niv_criteria": "NIV criteria (BTS/ICS 2016)",
    "pco2_target": "PaCO2 target",
    "baseline_pco2_source": "Usual PaCO2",
    "pco2_alkalaemia_floor": "PaCO2 alkalaemia floor",
    "pco2_consciousness_threshold": "PaCO2 consciousness threshold",
}


def _width() -> int:
    return max(60, min(shutil.get_terminal_size((100, 24)).columns, 110))


def _number(x, decimals: int | None) -> str:
    if isinstance(x, bool):
        return "yes" if x else "no"
    if isinstance(x, int):
        return str(x)
    if decimals is None:
        return f"{x:.4g}"
    return f"{x:.{decimals}f}"


def format_value(value, decimals: int | None = None) -> str:
    """An output value as text: numbers, quantities, ranges, lists, nested objects.

    >>> format_value({"value": 29.74, "unit": "mmol/L"}, 1), format_value({"low": 88, "high": 92}, 0)
    ('29.7 mmol/L', '88 to 92')
    """
    if isinstance(value, dict):
        if set(value) == {"value", "unit"}:
            v = value["value"]
            if isinstance(v, list):
                return _list_text(v, decimals) + f" {value['unit']}"
            return f"{_number(v, decimals)} {value['unit']}"
        if set(value) >= {"low", "high"} and len(value) <= 3:
            lo, hi = value["low"], value["high"]
            if (
                isinstance(lo, dict)
                and isinstance(hi, dict)
                and "value" in lo
                and lo.get("unit") == hi.get("unit")
            ):
                return f"{_number(lo['value'], decimals)} to {_number(hi['value'], decimals)} {lo['unit']}"
            return f"{format_value(lo, decimals)} to {format_value(hi, decimals)}"
        return "; ".join(f"{k.replace('_', ' ')} {format_value(v, decimals)}" for k, v in value.items())
    if isinstance(value, list):
        if value and all(isinstance(x, dict) and "code" in x for x in value):
            return ", ".join(_disorder_text(x) for x in value)
        return _list_text(value, decimals)
    if isinstance(value, str):
        return value.replace("_", " ")
    if value is None:
        return "-"
    return _number(value, decimals)


def _list_text(values: list, decimals) -> str:
    if len(values) <= 6:
        return ", ".join(format_value(x, decimals) for x in values)
    return (
        f"{len(values)} values, {format_value(values[0], decimals)} to {format_value(values[-1], decimals)}"
    )


def _disorder_text(d: dict) -> str:
    text = d["code"].replace("_", " ")
    if d.get("chronicity"):
        text = d["chronicity"].replace("_", "-") + " " + text
        if d.get("fraction_acute") is not None:
            text += f" (fraction acute {d['fraction_acute']:.2f})"
    return text + (" [primary]" if d.get("role") == "primary" else "")


def render(response: dict, *, width: int | None = None, how_sure: str | None = None) -> str:
    """A success response as text: summary, findings by severity, key numbers, cautions."""
    width = width or _width()
    wrap = textwrap.TextWrapper(width=width, initial_indent="  ", subsequent_indent="    ")
    lines = [f"Tidewell {response.get('engine', __version__)}: {response['calc'].replace('_', ' ')}", ""]
    if response.get("summary"):
        lines.append("Summary")
        for sentence in response["summary"]:
            lines.extend(wrap.wrap(sentence))
        lines.append("")
    if how_sure:
        lines.append("How sure")
        lines.extend(wrap.wrap(how_sure))
        lines.append("")
    if response.get("findings"):
        lines.append("Findings (most urgent first)")
        for severity in ("urgent", "notable", "info"):
            for f in response["findings"]:
                if f["severity"] == severity:
                    lines.extend(
                        textwrap.wrap(
                            f"{f['text']} [{f['code']}]",
                            width=width,
                            initial_indent=f"  {severity.upper():<9}",
                            subsequent_indent=" " * 11,
                        )
                    )
        lines.append("")
    outputs, display = response.get("outputs", {}), response.get("display", {})
    names = [n for n in _KEY_NUMBERS if n in outputs] if response["calc"] == "blood_gas" else list(outputs)
    if names:
        lines.append("Key numbers" if response["calc"] == "blood_gas" else "Results")
        labels = {n: _KEY_NUMBERS.get(n, n.replace("_", " ")) for n in names}
        label_width = min(max(len(v) for v in labels.values()) + 2, 34)
        for name in names:
            text = format_value(outputs[name], display.get(name))
            label = labels[name]
            first, *rest = textwrap.wrap(text, width=max(20, width - label_width - 4)) or [""]
            lines.append(f"  {label:<{label_width}}{first}")
            lines.extend(" " * (label_width + 2) + r for r in rest)
        if response["calc"] == "blood_gas":
            lines.append(f"  ({len(outputs)} outputs in all, each with its source: --json shows every step)")
        lines.append("")
    if response.get("cautions"):
        lines.append("Cautions")
        for text in response["cautions"]:
            lines.extend(textwrap.wrap(text, width=width, initial_indent="  - ", subsequent_indent="    "))
    return "\n".join(lines).rstrip() + "\n"
