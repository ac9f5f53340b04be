"""``tidewell course FILE.csv``: a CSV file of one patient's gases, read as a course.

==================  ==========================================================================================
``read_course``     CSV text -> (the ``inputs`` of a course request, the file's line of each sample, warnings)
``render_course``   a course response as text: summary, findings, the gases, the changes, the verdicts
``run``             what ``tidewell course FILE.csv`` does (cli.py registers it)
==================  ==========================================================================================

One row per gas. The blood-gas columns are the batch's (frontends.batch reads them: ``ph``, ``pco2[kPa]``, a
units row or units in the cells, every blood_gas input); two columns are the course's own:

- ``time``: minutes (``0``, ``45``) or a date-time (``2026-12-04T03:10``, ``2026-12-04 03:10``);
- ``events``: what was changed just after that gas, words separated by ``|`` or ``;`` (``niv_started |
  oxygen_decreased``); case, spaces and hyphens inside a word do not matter (``NIV started``).

The course calculation then checks everything (times, events, each gas) and names each problem; here a
problem's sample is shown as its line in the file.
"""

from __future__ import annotations

import argparse
import json
import re
import sys
import textwrap

from ..bridge import handle_obj
from .cells import course_sample, typed_value
from .text import add_output_flags, render

TIME_COLUMN, EVENTS_COLUMN = "time", "events"
_SAMPLE = re.compile(r"^inputs\.samples\[(\d+)\]")


def read_course(text: str) -> tuple[dict, list[int], list[str]]:
    """(``{"samples": [...]}``, the file's line of each sample, warnings) of a CSV text.

    Raises ``batch.TableError`` when the file as a whole cannot be read (no header, no ph or pco2 column, no
    time column).
    """
    from . import batch

    table = batch.read_table(text)
    names = [cell.strip().casefold() for cell in table.header]
    if TIME_COLUMN not in names:
        raise batch.TableError(
            f"the file has no '{TIME_COLUMN}' column (minutes, or a date-time such as 2026-12-04T03:10); "
            f"columns found: {', '.join(table.header) or 'none'}"
        )
    times = table.by_column[names.index(TIME_COLUMN)]
    events = table.by_column[names.index(EVENTS_COLUMN)] if EVENTS_COLUMN in names else [""] * len(table)
    samples = []
    no_site = []
    for i in range(len(table)):
        # one patient's bedside series: a gas without a site is read as the blood_gas default (arterial),
        # and the output says so
        row = batch.row_inputs(table, i, site_default="")
        sample, site_given = course_sample(row, times[i], events[i], "arterial")
        if not site_given:
            no_site.append(str(table.line[i]))
        samples.append(sample)
    warnings = [w for w in table.warnings if f"'{TIME_COLUMN}'" not in w and f"'{EVENTS_COLUMN}'" not in w]
    if no_site:
        warnings.append(
            f"no sample site on line{'s' if len(no_site) > 1 else ''} {', '.join(no_site)}: read as arterial "
            "(add a 'sample' column: arterial, capillary or venous)"
        )
    return {"samples": samples}, list(table.line), warnings


# -- text ----------------------------------------------------------------------------------------------------


def _pressure(q: dict) -> str:
    return f"{q['value']:.2f}" if q["unit"] in ("kPa", "kPa/h") else f"{q['value']:.1f}"


def _signed(q: dict) -> str:
    text = _pressure(q)
    return text if text.startswith("-") else "+" + text


def _when(reading: dict) -> str:
    """A gas's time: minutes from the first gas, after the date-time when one was given."""
    since = _duration(reading["minutes"])
    return since if isinstance(reading["time"], (int, float)) else f"{reading['time']} ({since})"


def render_course(response: dict, width: int = 100) -> str:
    """A course response as text: summary, findings (most urgent first), gases, changes, cautions."""
    out = response["outputs"]
    unit = response["options"]["pressure_unit"]
    readings = out["readings"]
    # the heading, summary and findings as every command prints them
    lines = [render({**response, "outputs": {}, "cautions": []}, width=width).rstrip(), ""]
    lines.append(f"Gases ({len(readings)}; pressures in {unit})")
    when = [_when(r) for r in readings]
    tw = max(len(w) for w in when) + 2
    head = f"  {'#':>2}  {'time':<{tw}}{'site':<10}{'pH':>6}{'PCO2':>8}{'HCO3':>7}{'aim':>8}  reading"
    lines.append(head)
    for k, r in enumerate(readings):
        aim = _pressure(r["pco2_target"]) if "pco2_target" in r else "-"
        urgent = [f["code"] for f in r.get("findings", []) if f["severity"] == "urgent"]
        reading = r.get("interpretation", "")
        if urgent:
            reading += " [urgent: " + ", ".join(urgent) + "]"
        if r["events"]:
            reading += " -> then " + ", ".join(e.replace("_", " ") for e in r["events"])
        row = (
            f"  {k + 1:>2}  {when[k]:<{tw}}{r['site']:<10}{r['ph']:>6.2f}{_pressure(r['pco2']):>8}"
            f"{r['hco3']['value']:>7.1f}{aim:>8}  "
        )
        first, *rest = textwrap.wrap(reading, width=max(30, width - len(row))) or [""]
        lines.append(row + first)
        lines.extend(" " * len(row) + more for more in rest)
    lines.append("")
    if out["intervals"]:
        lines.append("Changes between comparable gases")
        for i in out["intervals"]:
            rate = i["pco2_rate"]
            lines.append(
                f"  {i['earlier'] + 1:>2} -> {i['later'] + 1:<3}{_duration(i['minutes']):>10}  "
                f"pH {i['ph_change']:+.2f}  PCO2 {_signed(i['pco2_change'])} {unit} "
                f"({_signed(rate)} {rate['unit']})  {i['direction']}, PCO2 {i['pco2_trend']}"
            )
        lines.append("")
    verdicts = []
    if "response" in out:
        span = out["response_span"]
        verdicts.append(
            f"  Response since the first acidaemic gas (#{span['earlier'] + 1} to #{span['later'] + 1}): "
            f"{out['response'].replace('_', ' ')}"
        )
    if "niv_response" in out:
        niv = out["niv_response"]
        verdicts.append(
            f"  On NIV (#{niv['earlier'] + 1} to #{niv['later'] + 1}, {_duration(niv['minutes_on_niv'])}): "
            f"{niv['verdict'].replace('_', ' ')}" + ("" if niv["running"] else " (NIV since stopped)")
        )
    if verdicts:
        lines.extend(["Verdicts", *verdicts, ""])
    lines.append("Cautions")
    for text in response["cautions"]:
        lines.extend(textwrap.wrap(text, width=width, initial_indent="  - ", subsequent_indent="    "))
    return "\n".join(lines).rstrip() + "\n"


def _duration(minutes: float) -> str:
    hours, rest = divmod(round(minutes), 60)
    return f"{rest} min" if not hours else f"{hours} h" + (f" {rest} min" if rest else "")


# -- the command ---------------------------------------------------------------------------------------------


def run(argv: list[str]) -> int:
    """``tidewell course FILE.csv [--json] [--kpa|--mmhg] [patient flags]``; returns the exit status."""
    parser = argparse.ArgumentParser(
        prog="tidewell course",
        description="Read a CSV file of one patient's blood gases, one row per gas, as a course: the change\n"
        "and rate between gases, whether the pH is improving, the response to NIV, and the findings\n"
        "about oxygen-induced CO2 rise, NIV not working and CO2 falling too fast. Columns: time (minutes\n"
        "or a date-time like 2026-12-04T03:10), the blood-gas columns of 'tidewell batch' (ph,\n"
        "pco2[kPa], hco3, po2, fio2, sample, ...) and events: words separated by | or ; from\n"
        "oxygen_increased, oxygen_decreased, niv_started, niv_changed, niv_stopped, intubated, extubated\n"
        "(each: the change made just after that gas). docs/course.md states every rule.",
        epilog="example:\n  tidewell course gases.csv --hypercapnia-risk\n\n"
        "exit status: 0 answered, 2 bad input (each problem with its line), 1 internal fault.",
        formatter_class=argparse.RawDescriptionHelpFormatter,
        allow_abbrev=False,
    )
    parser.add_argument("source", metavar="FILE.csv", help="the gases ('-' reads standard input)")
    patient = parser.add_argument_group("Patient (for every gas that does not give its own)")
    patient.add_argument("--hypercapnia-risk", action="store_true", help="at risk of hypercapnic failure")
    patient.add_argument(
        "--previous-hypercapnic-failure",
        action="store_true",
        help="has needed NIV or invasive ventilation for hypercapnic failure before",
    )
    patient.add_argument("--baseline-pco2", metavar="VALUE", help="the usual PaCO2 when known, e.g. 7.2kPa")
    patient.add_argument("--age", metavar="YEARS", type=float, help="age in years")
    add_output_flags(parser)  # --json, --kpa, --mmhg as every command has them
    args = parser.parse_args(argv)
    try:
        from . import batch
    except ModuleNotFoundError as exc:
        sys.stderr.write(f"tidewell: course reads CSV with the batch reader, which needs numpy ({exc})\n")
        return 1
    try:
        if args.source == "-":
            text = sys.stdin.read()
        else:
            with open(args.source, encoding="utf-8-sig") as f:
                text = f.read()
        inputs, lines, warnings = read_course(text)
    except (OSError, UnicodeDecodeError) as exc:
        sys.stderr.write(f"tidewell: cannot read the file: {exc}\n")
        return 2
    except batch.TableError as exc:
        sys.stderr.write(f"tidewell: {args.source}: {exc}\n")
        return 2
    for warning in warnings:
        sys.stderr.write(f"tidewell: {args.source}: {warning}\n")
    if args.hypercapnia_risk:
        inputs["hypercapnia_risk"] = True
    if args.previous_hypercapnic_failure:
        inputs["previous_hypercapnic_failure"] = True
    if args.baseline_pco2 is not None:
        inputs["baseline_pco2"] = typed_value("baseline_pco2", args.baseline_pco2)
    if args.age is not None:
        inputs["age"] = args.age
    unit = args.pressure_unit or _unit_typed(inputs)
    response = handle_obj({"calc": "course", "inputs": inputs, "options": {"pressure_unit": unit}})
    if not response.get("ok"):
        for e in response.get("errors", []):
            m = _SAMPLE.match(e["field"])
            where = f"line {lines[int(m.group(1))]}: " if m and int(m.group(1)) < len(lines) else ""
            sys.stderr.write(f"tidewell: {args.source}: {where}{e['message']} [{e['code']}]\n")
        return 1 if any(e["code"] == "internal_error" for e in response["errors"]) else 2
    if args.json:
        sys.stdout.write(json.dumps(response, indent=2, ensure_ascii=False) + "\n")
    else:
        sys.stdout.write(render_course(response))
    return 0


def _unit_typed(inputs: dict) -> str:
    """kPa when the first gas's PCO2 was written in kPa, else mmHg (as the one-gas command does)."""
    samples = inputs["samples"]
    pco2 = samples[0]["inputs"].get("pco2") if samples else None
    unit = pco2.get("unit") if isinstance(pco2, dict) else None
    return "kPa" if unit == "kPa" else "mmHg"
