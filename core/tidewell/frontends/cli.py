"""The command line: ``tidewell`` (or ``python -m tidewell``).

==================  ================================================================================
``main``            the entry point: one sample from flags, ``calc``, ``batch``, ``how-sure``
``sample_inputs``   the blood_gas inputs of the flags given (``--pco2 9.3kPa`` -> a quantity)
``parse_assignment`` ``key=value`` of ``tidewell calc`` -> (nested key path, request value)
==================  ================================================================================

Everything goes through the bridge (``tidewell.bridge.handle_obj``), exactly as the web shell does; the
command line only turns typed text into a request and a response into text. Exit codes: 0 answered, 2 bad
input (each problem on stderr with its field and hint), 1 an internal fault. The single-sample path needs no
numpy; ``batch`` and the "how sure" line do (``pip install tidewell[arrays]``).
"""

from __future__ import annotations

import argparse
import json
import os
import shutil
import sys
import textwrap

from .. import __version__, units
from ..bridge import available, handle_obj
from .cells import IMPLIED_UNITS, NUMBER, canonical_unit, split_cell, typed_value
from .text import add_output_flags, render

# -- typed values: frontends.cells (shared with the batch reader) -------------------------------------------


def parse_assignment(text: str) -> tuple[list[str], object]:
    """``key=value`` of ``tidewell calc``: the key (dots make nested objects) and the value as a request
    carries it: a number, a quantity ("8000ft", "9.3 kPa"), a percentage ("28%"), true/false, JSON ("{...}",
    "[...]") or a word.

    >>> parse_assignment("altitude=8000ft"), parse_assignment("fio2=0.21"), parse_assignment("to=mmol/L")
    ((['altitude'], {'value': 8000.0, 'unit': 'ft'}), (['fio2'], 0.21), (['to'], 'mmol/L'))
    >>> parse_assignment("errors.pco2.cv=3%")
    (['errors', 'pco2', 'cv'], {'value': 3.0, 'unit': '%'})
    """
    key, sep, raw = text.partition("=")
    if not sep or not key.strip():
        raise ValueError(f"'{text}' is not key=value (for example altitude=8000ft)")
    path = [part.strip() for part in key.split(".")]
    value = raw.strip()
    if value[:1] in ("{", "["):
        try:
            return path, json.loads(value)
        except ValueError as exc:
            raise ValueError(f"{key}: the value is not valid JSON ({exc})") from None
    folded = value.casefold()
    if folded in ("true", "false"):
        return path, folded == "true"
    if folded in ("null", "none", ""):
        return path, None
    state, number, unit = split_cell(value)
    if state == NUMBER:
        return path, number if unit is None else {"value": number, "unit": unit}
    return path, value


# -- the blood-gas flags -------------------------------------------------------------------------------------

#: (flag, input key, metavar, help) by group; every blood_gas input has one
SAMPLE_FLAGS = {
    "Blood gas": (
        ("--ph", "ph", "NUMBER", "pH at 37 degC, e.g. 7.24 (required)"),
        ("--pco2", "pco2", "VALUE", "PCO2 with its unit, e.g. 9.3kPa or 70mmHg (required)"),
        ("--hco3", "hco3", "VALUE", "bicarbonate as reported, e.g. 29.7 (mmol/L)"),
        ("--po2", "po2", "VALUE", "PO2 with its unit, e.g. 7.1kPa or 53mmHg"),
        ("--fio2", "fio2", "FRACTION", "inspired oxygen, 0.28 or 28%% (default 0.21, air)"),
        ("--sample", "sample", "SITE", "arterial (default), venous or capillary"),
        ("--base-excess", "base_excess", "VALUE", "base excess as reported (mmol/L)"),
    ),
    "Chemistry (Na, K, Cl need no unit; the others do, e.g. 7.2mmol/L, 130mg/dL)": (
        ("--na", "na", "VALUE", "sodium"),
        ("--k", "k", "VALUE", "potassium"),
        ("--cl", "cl", "VALUE", "chloride"),
        ("--albumin", "albumin", "VALUE", "albumin with its unit, e.g. 32g/L or 3.2g/dL"),
        ("--lactate", "lactate", "VALUE", "lactate"),
        ("--glucose", "glucose", "VALUE", "glucose"),
        ("--urea", "urea", "VALUE", "urea"),
        ("--bun", "bun", "VALUE", "blood urea nitrogen, e.g. 28mg/dL (instead of urea)"),
        ("--phosphate", "phosphate", "VALUE", "phosphate"),
        ("--osmolality", "measured_osmolality", "VALUE", "measured osmolality (mOsm/kg)"),
        ("--ca-ionised", "ca_ionised", "VALUE", "ionised calcium"),
        ("--mg", "mg", "VALUE", "magnesium"),
    ),
    "Patient and oxygen": (
        ("--hb", "hb", "VALUE", "haemoglobin with its unit, e.g. 13g/dL or 130g/L"),
        ("--spo2", "spo2", "PERCENT", "pulse oximetry saturation, e.g. 91"),
        ("--age", "age", "YEARS", "age in years (for the A-a gradient limit)"),
        ("--temperature", "temperature", "VALUE", "patient's temperature, e.g. 34degC or 93degF"),
        ("--altitude", "altitude", "VALUE", "altitude of the patient, e.g. 1500m or 8000ft"),
        ("--pb", "pb", "VALUE", "barometric pressure if measured, e.g. 1013hPa"),
        ("--baseline-pco2", "baseline_pco2", "VALUE", "the patient's usual PaCO2 when known, e.g. 6.8kPa"),
        (
            "--hypercapnia-risk",
            "hypercapnia_risk",
            None,
            "the patient is at risk of hypercapnic respiratory failure (e.g. COPD)",
        ),
        (
            "--previous-hypercapnic-failure",
            "previous_hypercapnic_failure",
            "YES|NO",
            "has needed NIV or invasive ventilation for hypercapnic failure",
        ),
        (
            "--spo2-target-prescribed",
            "spo2_target_prescribed",
            "LOW-HIGH",
            "the patient's own SpO2 range (alert card), e.g. 88-92",
        ),
    ),
    "Settings": (
        ("--normal-albumin", "normal_albumin", "VALUE", "local normal albumin (default 4.0 g/dL)"),
        ("--rq", "rq", "NUMBER", "respiratory quotient (default 0.8)"),
    ),
}
FLAG_OF = {key: flag for group in SAMPLE_FLAGS.values() for flag, key, _, _ in group}

DESCRIPTION = """\
Tidewell interprets a blood gas from the command line: acid-base disorders and their compensation,
chronicity of hypercapnia, gaps, oxygenation, safe PaCO2 and SpO2 targets, with every number sourced.
Give each value with its unit; a pressure without a unit is refused, never guessed.

Decision support only: it applies published adult rules to the numbers entered. It does not replace
clinical assessment, senior advice or local protocols."""

EXAMPLES = """\
examples:
  tidewell --ph 7.24 --pco2 9.3kPa --hco3 29.7 --po2 7.1kPa --fio2 28% --age 71
  tidewell --ph 7.31 --pco2 68mmHg --hco3 33 --baseline-pco2 55mmHg --hypercapnia-risk --json
  tidewell calc altitude altitude=8000ft fio2=0.21 pco2=5.1kPa po2=9.8kPa
  tidewell calc convert quantity=180mg/dL to=mmol/L substance=glucose
  tidewell how-sure --ph 7.34 --pco2 6.6kPa --hco3 26 --error ph=0.02
  tidewell batch gases.csv -o gases-read.csv

commands:
  (none)     one blood gas from the flags below
  calc       any calculation by name with key=value inputs (tidewell calc --help)
  how-sure   how often the reading survives the analyser's measurement error (tidewell how-sure --help)
  batch      a CSV file, one sample per row (tidewell batch --help)
  course     one patient's gases over time from a CSV file (tidewell course --help)

exit status: 0 answered, 2 bad input (each problem printed with its field), 1 internal fault."""


class HelpFormatter(argparse.RawDescriptionHelpFormatter):
    """Help at most 80 columns wide: running text refilled, indented lines (examples) kept, and wrapped
    with a deeper indent only when longer than the width."""

    def __init__(self, prog: str, **kwargs):
        kwargs.setdefault("width", min(HELP_WIDTH, shutil.get_terminal_size((HELP_WIDTH, 24)).columns) - 2)
        super().__init__(prog, **kwargs)

    def _fill_text(self, text: str, width: int, indent: str) -> str:
        width = max(width, 40)
        out: list[str] = []
        running: list[str] = []

        def flush() -> None:
            if running:
                out.extend(textwrap.wrap(" ".join(running), width))
                running.clear()

        for line in text.splitlines():
            if not line.strip() or line[0].isspace() or line.rstrip().endswith(":"):
                flush()
                lead = line[: len(line) - len(line.lstrip())]
                out.extend(
                    textwrap.wrap(line, width, subsequent_indent=lead + "    ", break_on_hyphens=False)
                    or [""]
                )
            else:
                running.append(line.strip())
        flush()
        return "\n".join(indent + line if line else line for line in out)


#: the widest line of any --help text
HELP_WIDTH = 80


def _add_sample_flags(parser: argparse.ArgumentParser) -> None:
    for title, flags in SAMPLE_FLAGS.items():
        group = parser.add_argument_group(title)
        for flag, key, metavar, text in flags:
            if metavar is None:
                group.add_argument(flag, dest=key, action="store_const", const="true", help=text)
            else:
                group.add_argument(flag, dest=key, metavar=metavar, help=text)


def sample_inputs(args: argparse.Namespace) -> dict:
    """The blood_gas inputs of the sample flags that were given."""
    inputs = {}
    for key in FLAG_OF:
        text = getattr(args, key, None)
        if text is None:
            continue
        value = typed_value(key, text, IMPLIED_UNITS.get(key))
        if value is not None:
            inputs[key] = value
    return inputs


def _pressure_unit(args, inputs: dict) -> str:
    """Pressures are shown in the unit asked for, else in the unit the PCO2 was typed in (else mmHg)."""
    if getattr(args, "pressure_unit", None):
        return args.pressure_unit
    pco2 = inputs.get("pco2")
    if isinstance(pco2, dict) and pco2.get("unit") == "kPa":
        return "kPa"
    return "mmHg"


def _errors_text(response: dict, *, flags: bool) -> str:
    out = []
    for e in response.get("errors", []):
        field = e.get("field", "")
        message = e.get("message", "")
        key = field.removeprefix("inputs.")
        if flags and key in FLAG_OF:
            message = f"{FLAG_OF[key]}: " + message.removeprefix(field + ": ")
        out.append(f"tidewell: {message} [{e.get('code')}]")
    return "\n".join(out) + "\n"


def _finish(response: dict, args, *, flags: bool, how_sure: str | None = None) -> int:
    if not response.get("ok"):
        sys.stderr.write(_errors_text(response, flags=flags))
        if getattr(args, "json", False):  # a script reads the same JSON on stdout, ok or not
            sys.stdout.write(json.dumps(response, indent=2, ensure_ascii=False) + "\n")
        internal = any(e.get("code") == "internal_error" for e in response.get("errors", []))
        return 1 if internal else 2
    if getattr(args, "json", False):
        sys.stdout.write(json.dumps(response, indent=2, ensure_ascii=False) + "\n")
    else:
        sys.stdout.write(render(response, how_sure=how_sure))
    return 0


# -- the commands --------------------------------------------------------------------------------------------


def _sample_parser(
    prog: str, description: str, epilog: str, *, how_sure: bool = False
) -> argparse.ArgumentParser:
    parser = argparse.ArgumentParser(
        prog=prog,
        description=description,
        epilog=epilog,
        formatter_class=HelpFormatter,
        allow_abbrev=False,
    )
    parser.add_argument("--version", action="version", version=f"tidewell {__version__}")
    _add_sample_flags(parser)
    add_output_flags(parser, how_sure=how_sure)
    return parser


def _how_sure_line(inputs: dict, pressure_unit: str) -> str | None:
    """The one-line "how sure" of the uncertainty calculation (None without numpy, or on bad input)."""
    try:
        import numpy  # noqa: F401
    except ModuleNotFoundError:
        return "How sure: not computed (numpy is not installed: pip install tidewell[arrays])."
    response = handle_obj(
        {"calc": "uncertainty", "inputs": {"sample": inputs}, "options": {"pressure_unit": pressure_unit}}
    )
    return response["outputs"].get("how_sure") if response.get("ok") else None


def join_units(argv: list[str]) -> list[str]:
    """A value flag's number and a unit written apart (``--po2 55 mmHg``) joined into one value.

    >>> join_units(["--po2", "55", "mmHg", "--ph", "7.3", "--fio2", "28", "%"])
    ['--po2', '55 mmHg', '--ph', '7.3', '--fio2', '28 %']
    """
    out: list[str] = []
    i = 0
    while i < len(argv):
        out.append(argv[i])
        flag, eq, value = argv[i].partition("=")
        if flag in _VALUE_FLAGS:
            number, unit_at = (value, i + 1) if eq else (argv[i + 1] if i + 1 < len(argv) else "", i + 2)
            unit = argv[unit_at] if unit_at < len(argv) else ""
            if _is_float(number) and not _is_float(unit) and canonical_unit(unit) in units.ALL_UNITS:
                if not eq:
                    out.append(number)
                out[-1] = f"{out[-1]} {unit}"
                i = unit_at + 1
                continue
        i += 1
    return out


def _is_float(text: str) -> bool:
    try:
        float(text)
    except ValueError:
        return False
    return True


#: the sample flags that take a value (a number and its unit may be written apart)
_VALUE_FLAGS = frozenset(
    flag for group in SAMPLE_FLAGS.values() for flag, _, metavar, _ in group if metavar is not None
)


def run_sample(argv: list[str]) -> int:
    parser = _sample_parser("tidewell", DESCRIPTION, EXAMPLES, how_sure=True)
    args = parser.parse_args(join_units(argv))
    inputs = sample_inputs(args)
    if not inputs:
        parser.print_help()
        return 2
    unit = _pressure_unit(args, inputs)
    response = handle_obj({"calc": "blood_gas", "inputs": inputs, "options": {"pressure_unit": unit}})
    how = None
    if response.get("ok") and not args.json and not args.no_how_sure:
        how = _how_sure_line(inputs, unit)
    return _finish(response, args, flags=True, how_sure=how)


def run_how_sure(argv: list[str]) -> int:
    parser = _sample_parser(
        "tidewell how-sure",
        "How sure is the reading? Each measured value is drawn 10,000 times within the analyser's usual\n"
        "measurement error (defaults: typical analyser imprecision; set your own with --error), every draw\n"
        "is interpreted with the same rules, and the share of draws giving each disorder, chronicity and\n"
        "finding is reported, with 95 % intervals of the derived numbers. Measurement error only: sampling\n"
        "errors (air, delay, venous admixture) are not covered.",
        "examples:\n"
        "  tidewell how-sure --ph 7.34 --pco2 6.6kPa --hco3 26\n"
        "  tidewell how-sure --ph 7.34 --pco2 6.6kPa --error ph=0.02 --error pco2=cv:5% --draws 20000\n\n"
        "--error KEY=ERROR: sd:VALUE or cv:PERCENT; without a prefix a value ending in % is a CV and any\n"
        "other value an SD in the input's unit (0.02 for pH, 0.3kPa for PCO2). For SpO2 write sd:2.",
    )
    draws = parser.add_argument_group("Draws")
    draws.add_argument(
        "--draws", type=int, default=None, metavar="N", help="number of draws (default 10,000)"
    )
    draws.add_argument(
        "--seed", type=int, default=None, metavar="N", help="seed of the draws (same seed, same answer)"
    )
    draws.add_argument(
        "--error", action="append", default=[], metavar="KEY=ERROR", help="measurement error of one input"
    )
    args = parser.parse_args(join_units(argv))
    inputs = sample_inputs(args)
    request_inputs: dict = {"sample": inputs}
    errors: dict = {}
    for item in args.error:
        key, sep, text = item.partition("=")
        key = key.strip().replace("-", "_")
        if not sep:
            parser.error(f"--error {item}: write KEY=ERROR, for example ph=0.02 or pco2=cv:5%")
        kind, colon, rest = text.partition(":")
        if colon and kind.strip().casefold() in ("sd", "cv"):
            kind, text = kind.strip().casefold(), rest
        else:
            kind = "cv" if text.strip().endswith("%") else "sd"
        state, number, unit = split_cell(text)
        if state != NUMBER:
            parser.error(f"--error {item}: '{text}' is not a number")
        if kind == "cv":
            errors[key] = {"cv": {"value": number, "unit": "%"} if unit == "%" else number}
        else:
            default = IMPLIED_UNITS.get(key)
            unit = unit if unit is not None else default
            errors[key] = {"sd": number if unit is None else {"value": number, "unit": unit}}
    if errors:
        request_inputs["errors"] = errors
    if args.draws is not None:
        request_inputs["draws"] = args.draws
    if args.seed is not None:
        request_inputs["seed"] = args.seed
    unit = _pressure_unit(args, inputs)
    response = handle_obj(
        {"calc": "uncertainty", "inputs": request_inputs, "options": {"pressure_unit": unit}}
    )
    if not response.get("ok"):
        for e in response.get("errors", []):
            key = e["field"].removeprefix("inputs.sample.")
            if key in FLAG_OF:
                e["message"] = f"{FLAG_OF[key]}: " + e["message"].removeprefix(e["field"] + ": ")
    return _finish(response, args, flags=False)


def run_calc(argv: list[str]) -> int:
    parser = argparse.ArgumentParser(
        prog="tidewell calc",
        description="Run any calculation of the bridge contract by name with key=value inputs. Values with\n"
        "units are written together (8000ft, 9.3kPa, 180mg/dL), percentages with % (28%), flags as\n"
        "true/false, objects as JSON or with dotted keys (sample.ph=7.3). docs/bridge.md lists the inputs.",
        epilog="examples:\n"
        "  tidewell calc altitude altitude=8000ft fio2=0.21\n"
        "  tidewell calc alveolar_gas fio2=0.4 pco2=6.2kPa po2=11kPa age=60\n"
        "  tidewell calc oxygen_supply cylinder_water_capacity=10L cylinder_pressure=200bar flow=15L/min "
        "duration=60min\n"
        "  tidewell calc uncertainty sample.ph=7.34 sample.pco2=6.6kPa sample.hco3=26mmol/L seed=7\n\n"
        "calculations: " + ", ".join(available()),
        formatter_class=HelpFormatter,
        allow_abbrev=False,
    )
    parser.add_argument("name", nargs="?", help="the calculation, e.g. altitude or blood_gas")
    parser.add_argument("inputs", nargs="*", metavar="key=value", help="its inputs")
    add_output_flags(parser)
    args = parser.parse_args(argv)
    if not args.name:
        sys.stdout.write("calculations: " + ", ".join(available()) + "\n")
        return 0
    inputs: dict = {}
    for item in args.inputs:
        try:
            path, value = parse_assignment(item)
        except ValueError as exc:
            sys.stderr.write(f"tidewell: {exc}\n")
            return 2
        target = inputs
        for part in path[:-1]:
            existing = target.get(part)
            if not isinstance(existing, dict):
                existing = target[part] = {}
            target = existing
        target[path[-1]] = value
    request = {"calc": args.name, "inputs": inputs}
    if args.pressure_unit:
        request["options"] = {"pressure_unit": args.pressure_unit}
    response = handle_obj(request)
    return _finish(response, args, flags=False)


def run_batch(argv: list[str]) -> int:
    parser = argparse.ArgumentParser(
        prog="tidewell batch",
        description="Interpret a CSV file of blood gases, one sample per row, and write every input column\n"
        "followed by the main outputs and the findings of each row. Columns are named by the input keys\n"
        "(ph, pco2, hco3, po2, fio2, sample, na, cl, albumin, lactate, age, hypercapnia_risk, ...); give\n"
        "units in the header (pco2[kPa]), in a second row of units, or in a cell (7.1 kPa). Other columns\n"
        "(an id, a date) are copied through. A row's problems go in its 'error' column and the batch goes\n"
        "on; a summary of counts per disorder, chronicity and finding is printed at the end.",
        epilog="example:\n  tidewell batch gases.csv -o gases-read.csv --kpa\n\n"
        "exit status: 0 done (rows with errors included), 2 the file cannot be read or no row\n"
        "could be, 1 internal fault.",
        formatter_class=HelpFormatter,
        allow_abbrev=False,
    )
    parser.add_argument("source", metavar="IN.csv", help="the samples ('-' reads standard input)")
    parser.add_argument("-o", "--output", metavar="OUT.csv", help="where to write (default: standard output)")
    units_ = parser.add_mutually_exclusive_group()
    units_.add_argument(
        "--kpa", dest="pressure_unit", action="store_const", const="kPa", help="pressures in kPa"
    )
    units_.add_argument(
        "--mmhg", dest="pressure_unit", action="store_const", const="mmHg", help="pressures in mmHg (default)"
    )
    shown = parser.add_mutually_exclusive_group()
    shown.add_argument(
        "--progress", dest="progress", action="store_const", const=True, help="always show progress"
    )
    shown.add_argument(
        "--no-progress", dest="progress", action="store_const", const=False, help="never show it"
    )
    parser.add_argument("--full-precision", action="store_true", help="write numbers unrounded")
    parser.add_argument("--summary-json", metavar="FILE", help="also write the summary counts as JSON")
    parser.add_argument(
        "--episodes",
        metavar="EP.csv",
        help="read each episode (episode and time columns) as a course; one row each",
    )
    args = parser.parse_args(argv)
    try:
        from . import batch
    except ModuleNotFoundError as exc:
        sys.stderr.write(f"tidewell: batch needs numpy ({exc}); pip install tidewell[arrays]\n")
        return 1
    try:
        counts = batch.run(
            args.source,
            args.output,
            pressure_unit=args.pressure_unit,
            progress=args.progress,
            full_precision=args.full_precision,
            episodes=args.episodes,
        )
    except (OSError, UnicodeDecodeError) as exc:
        sys.stderr.write(f"tidewell: cannot read or write the file: {exc}\n")
        return 2
    except batch.TableError as exc:
        sys.stderr.write(f"tidewell: {args.source}: {exc}\n")
        counts = getattr(exc, "counts", None)  # no row read: the summary was made all the same
        if counts is None:
            return 2
    if args.summary_json:
        with open(args.summary_json, "w", encoding="utf-8") as f:
            json.dump(counts, f, indent=2, ensure_ascii=False)
    return 2 if counts["rows"] and not counts["interpreted"] else 0


def run_course(argv: list[str]) -> int:
    from .coursefile import run

    return run(argv)


COMMANDS = {"calc": run_calc, "batch": run_batch, "how-sure": run_how_sure, "course": run_course}


def main(argv: list[str] | None = None) -> int:
    """Run the command line with ``argv`` (default: the process's arguments); returns the exit status."""
    argv = list(sys.argv[1:] if argv is None else argv)
    try:
        if argv and argv[0] in COMMANDS:
            return COMMANDS[argv[0]](argv[1:])
        return run_sample(argv)
    except SystemExit as exc:  # argparse: --help (0) and usage errors (2)
        return exc.code if isinstance(exc.code, int) else (0 if exc.code is None else 2)
    except KeyboardInterrupt:
        sys.stderr.write("tidewell: interrupted\n")
        return 1
    except BrokenPipeError:
        devnull = os.open(os.devnull, os.O_WRONLY)
        os.dup2(devnull, sys.stdout.fileno())
        return 0
    except Exception as exc:  # a fault inside Tidewell: say so, without a traceback
        sys.stderr.write(f"tidewell: internal error ({type(exc).__name__}); nothing was written. {exc}\n")
        return 1
