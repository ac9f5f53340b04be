#!/usr/bin/env python3
"""Record every response of a fixed corpus of requests, to compare two versions of the core byte for byte.

    python3 tools/responses.py --out FILE        record (this checkout's core/, or PYTHONPATH's tidewell)
    python3 tools/responses.py --compare A B     byte-identical, or the first differences (exit status 1)

Made for changes that must not change behaviour (a move of modules, a split of functions): record before,
record after, compare. Every request goes through ``tidewell.bridge.handle``, the entry that does not depend
on where the calculations live. One line per request, ``{"id", "request", "response"}`` written with
``json.dumps(sort_keys=True)``, the response being the JSON text ``handle`` returned, parsed again.

The corpus (fixed, deterministic; the order is the order of the file):
- ``case``: every worked case of tests/cases/reference_cases.json as a request of the calculation that
  answers it (the blood-gas cases through tests/casebook.py's ``case_inputs``, the others through the
  mapping below), and each request of casebook's ``worked_requests`` (the tests' own mapping of the cases
  onto requests); each blood-gas case also through ``uncertainty`` (seeded: the calculation draws with
  ``numpy.random.default_rng([seed, index])`` and a default seed, so the same request gives the same answer;
  the default seed and one given seed are both recorded);
- ``sweep``: each of these requests with each optional input of its calculation toggled (taken out when it
  was given, put in with a typical value when it was not), each with ``pressure_unit`` mmHg and kPa;
- ``seed``: every fuzz seed (tests/core/fuzz_seeds.json) in mmHg and kPa, every fuzz regression's request
  text (tests/core/fuzz_regressions.json) as sent, every finding request (tests/core/finding_requests.json);
- ``cli``: the command line's output (stdout, stderr, exit status) for a few commands, and the batch audit's
  and the course command's output for each file in docs/examples, run as subprocesses with PYTHONPATH set
  to the recorded core and a fixed terminal width.
"""

from __future__ import annotations

import argparse
import json
import os
import subprocess
import sys
import tempfile
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
TESTS = ROOT / "tests"

# worked case input key -> (request input name, unit or None), beyond casebook.INPUT_MAP
EXTRA_INPUTS = {
    "pao2_mmHg": ("po2", "mmHg"),
    "ph2o_mmHg": (None, None),
    "rq": ("rq", None),
    "spo2_pct": ("spo2", None),
    "map_cmH2O": ("mean_airway_pressure", "cmH2O"),
    "hb_g_dL": ("hb", "g/dL"),
    "sao2_fraction": (None, None),  # a fraction; the request takes SpO2 in %: FILL gives one
    "cardiac_output_L_min": ("cardiac_output", "L/min"),
    "po2_mmHg": ("po2", "mmHg"),
    "temp_C": ("temperature", "degC"),
    "be_mmol_L": ("base_excess", "mmol/L"),
    "vt_mL": ("vt", "mL"),
    "rr_per_min": ("rr", None),
    "vd_mL": ("vd", "mL"),
    "vco2_mL_min": ("vco2", "mL/min"),
    "peco2_mmHg": ("peco2", "mmHg"),
    "petco2_mmHg": ("etco2", "mmHg"),
    "target_paco2_mmHg": ("target_pco2", "mmHg"),
    "ph_37": ("ph", None),
    "paco2_37_mmHg": ("pco2", "mmHg"),
    "altitude_ft": ("altitude", "ft"),
    "altitude_m": ("altitude", "m"),
    "fio2_ground": ("fio2", None),
    "pb_ground_mmHg": ("origin_pb", "mmHg"),
    "pao2_ground_mmHg": ("po2", "mmHg"),
    "volume_ground_mL": ("trapped_gas_volume", "mL"),
    "water_capacity_L": ("cylinder_water_capacity", "L"),
    "pressure_bar_gauge": ("cylinder_pressure", "bar"),
    "flow_L_min": ("flow", "L/min"),
    "reserve_fraction": ("reserve_fraction", None),
    "transfer_time_min": ("duration", "min"),
    "safety_factor": ("safety_factor", None),
    "pao2_kPa": ("po2", "kPa"),
    "paco2_kPa": ("pco2", "kPa"),
    "glucose_mmol_L": ("glucose", "mmol/L"),
    "urea_mmol_L": ("urea", "mmol/L"),
    "measured_osm_mOsm_kg": ("measured_osmolality", "mOsm/kg"),
}

# worked case id prefix -> the calculations that answer it (AB: through casebook.case_inputs)
CASE_CALCS = {
    "HH": ("blood_gas",),
    "BE": ("blood_gas", "oxygen_content"),
    "CP": ("blood_gas",),
    "AG": ("blood_gas",),
    "ST": ("blood_gas",),
    "TH": ("blood_gas",),
    "OX": ("alveolar_gas", "oxygen_content", "oxygen_dissociation_curve"),
    "VN": ("ventilation",),
    "TC": ("temperature_correction",),
    "AL": ("altitude", "altitude_profile"),
    "CY": ("oxygen_supply",),
}

# a unit conversion case's key suffix -> (unit, unit to convert to)
CONVERT_UNITS = {
    "kPa": ("kPa", "mmHg"),
    "mmHg": ("mmHg", "kPa"),
    "C": ("degC", "degF"),
    "F": ("degF", "degC"),
    "ft": ("ft", "m"),
    "m": ("m", "ft"),
    "mg_dL": ("mg/dL", "mmol/L"),
    "g_dL": ("g/dL", "g/L"),
}

# inputs a calculation needs that a worked case may lack (so the case reaches the calculation proper)
FILL = {
    "blood_gas": {"ph": 7.4, "pco2": {"value": 40, "unit": "mmHg"}},
    "alveolar_gas": {"fio2": 0.21, "pco2": {"value": 40, "unit": "mmHg"}},
    "oxygen_content": {"hb": {"value": 15, "unit": "g/dL"}, "spo2": 98},
    "ventilation": {"rr": 14, "vt": {"value": 450, "unit": "mL"}, "pco2": {"value": 40, "unit": "mmHg"}},
    "temperature_correction": {"ph": 7.4, "pco2": {"value": 40, "unit": "mmHg"}},
    "altitude": {"fio2": 0.21},
    "altitude_profile": {"fio2": 0.21},
    "oxygen_supply": {"duration": {"value": 60, "unit": "min"}},
}

# a typical value for optional inputs that no worked case or fuzz seed gives
TYPICAL = {
    "sample": "arterial",
    "direction": "to_patient",
    "sex": "female",
    "obstructive": True,
    "hypercapnia_risk": True,
    "previous_hypercapnic_failure": True,
    "normal_albumin": {"value": 40, "unit": "g/L"},
    "alveolar_equation": "full",
}

CLI_COMMANDS = (
    ["--ph", "7.24", "--pco2", "9.3kPa", "--hco3", "29.7", "--po2", "7.1kPa", "--fio2", "28%", "--age", "71"],
    ["--ph", "7.24", "--pco2", "9.3kPa", "--hco3", "29.7", "--json", "--no-how-sure"],
    ["--ph", "7.31", "--pco2", "70 mmHg", "--hypercapnia-risk", "--mmhg"],
    ["--ph", "7.4", "--pco2", "5.3"],
    ["calc"],
    ["calc", "altitude", "altitude=8000ft", "fio2=0.21", "pco2=5.1kPa", "po2=9.8kPa"],
    ["calc", "oxygen_supply", "cylinder_water_capacity=10L", "cylinder_pressure=200bar", "flow=15L/min",
     "duration=60min"],
    ["calc", "convert", "quantity=180mg/dL", "to=mmol/L", "substance=glucose"],
    ["calc", "uncertainty", "sample.ph=7.34", "sample.pco2=6.6kPa", "sample.hco3=26mmol/L", "seed=7"],
    ["how-sure", "--ph", "7.34", "--pco2", "6.6kPa", "--hco3", "26", "--error", "ph=0.02", "--seed", "3"],
    ["--help"],
)  # fmt: skip


def _casebook():
    sys.path.insert(0, str(TESTS))
    import casebook

    return casebook


def _quantity(raw, unit):
    return raw if unit is None else {"value": raw, "unit": unit}


def case_requests(casebook) -> list[tuple[str, dict]]:
    """(id, request) for every worked case (inputs the calculation does not take are left out)."""
    known = schema_inputs(optional_only=False)
    out = []
    for case_id, case in casebook.load_cases().items():
        prefix = case_id.split("-")[0]
        if prefix == "AB":
            inputs = casebook.case_inputs(case)
            out.append((f"case:{case_id}:blood_gas", {"calc": "blood_gas", "inputs": inputs}))
            out.append((f"case:{case_id}:uncertainty", {"calc": "uncertainty", "inputs": {"sample": inputs}}))
            seeded = {"sample": inputs, "seed": 11, "draws": 500}
            out.append((f"case:{case_id}:uncertainty-seed", {"calc": "uncertainty", "inputs": seeded}))
            continue
        if prefix == "UC":
            for key, raw in case["inputs"].items():
                substance, _, suffix = key.partition("_")
                unit, to = CONVERT_UNITS[suffix]
                inputs = {"quantity": {"value": raw, "unit": unit}, "to": to}
                if unit == "mg/dL":
                    inputs["substance"] = substance
                out.append((f"case:{case_id}:{key}:convert", {"calc": "convert", "inputs": inputs}))
            continue
        for calc in CASE_CALCS[prefix]:
            inputs = {}
            for key, raw in case["inputs"].items():
                name, unit = EXTRA_INPUTS.get(key) or casebook.INPUT_MAP.get(key, (None, None))
                if name not in known[calc] or name in inputs or isinstance(raw, (list, bool, str)):
                    continue
                inputs[name] = _quantity(raw, unit)
            for name, value in FILL.get(calc, {}).items():
                inputs.setdefault(name, value)
            out.append((f"case:{case_id}:{calc}", {"calc": calc, "inputs": inputs}))
    if hasattr(casebook, "worked_requests"):  # the test suite's own mapping of the worked cases
        for case_id, request, _ in casebook.worked_requests():
            out.append((f"case:{case_id}:tests", request))
    return out


def _load(name: str):
    return json.loads((TESTS / "core" / name).read_text(encoding="utf-8"))


def optional_values(seeds: dict, requests: list[tuple[str, dict]]) -> dict[str, dict]:
    """calc -> input name -> the first value given for it by a worked case or a fuzz seed."""
    values: dict[str, dict] = {}
    for calc, items in seeds.items():
        for inputs in items:
            for key, value in inputs.items():
                values.setdefault(calc, {}).setdefault(key, value)
    for _, request in requests:
        for key, value in request["inputs"].items():
            values.setdefault(request["calc"], {}).setdefault(key, value)
    return values


def schema_inputs(optional_only: bool = True) -> dict[str, list[str]]:
    """calc -> its input names (the optional ones only, by default), from the contract's JSON Schema."""
    schema = json.loads((ROOT / "schema" / "bridge.schema.json").read_text(encoding="utf-8"))
    out = {}
    for name, spec in schema["$defs"].items():
        if name.startswith("inputs_"):
            required = spec.get("required", ()) if optional_only else ()
            out[name.removeprefix("inputs_")] = [k for k in spec.get("properties", {}) if k not in required]
    return out


def sweeps(requests, seeds) -> list[tuple[str, dict]]:
    optional = schema_inputs()
    values = optional_values(seeds, requests)
    out = []
    for rid, request in requests:
        calc = request["calc"]
        for key in optional.get(calc, ()):
            inputs = dict(request["inputs"])
            if key in inputs:
                del inputs[key]
                tag = "absent"
            else:
                value = values.get(calc, {}).get(key, TYPICAL.get(key))
                if value is None:
                    continue
                inputs[key] = value
                tag = "present"
            out.append((f"sweep:{rid}:{key}-{tag}", {"calc": calc, "inputs": inputs}))
    return out


def bridge_lines(handle) -> list[str]:
    casebook = _casebook()
    seeds = _load("fuzz_seeds.json")
    cases = case_requests(casebook)
    lines = []

    def record(rid: str, request, text: str | None = None) -> None:
        sent = json.dumps(request) if text is None else text
        response = json.loads(handle(sent))
        lines.append(json.dumps({"id": rid, "request": sent, "response": response}, sort_keys=True))

    for rid, request in cases + sweeps(cases, seeds):
        for unit in ("mmHg", "kPa"):
            record(f"{rid}:{unit}", {**request, "options": {"pressure_unit": unit}})
    for calc, items in seeds.items():
        for index, inputs in enumerate(items):
            for unit in ("mmHg", "kPa"):
                request = {"calc": calc, "inputs": inputs, "options": {"pressure_unit": unit}}
                record(f"seed:{calc}:{index}:{unit}", request)
    for entry in _load("fuzz_regressions.json"):
        text = entry.get("text")
        record(f"regression:{entry['id']}", None, text if text is not None else json.dumps(entry["request"]))
    for code, entry in _load("finding_requests.json").items():
        for key, request in entry.items():
            if isinstance(request, dict) and "calc" in request:
                record(f"finding:{code}:{key}", request)
    return lines


def _run(core: Path, args: list[str], cwd: Path) -> dict:
    env = {k: v for k, v in os.environ.items() if not k.startswith(("PYTHON", "COLUMNS", "LINES"))}
    env.update(
        PYTHONPATH=str(core), COLUMNS="100", LINES="40", PYTHONHASHSEED="0", LC_ALL="C.UTF-8", TZ="UTC"
    )
    done = subprocess.run(
        [sys.executable, "-m", "tidewell", *args],
        cwd=cwd,
        env=env,
        capture_output=True,
        text=True,
        timeout=600,
    )
    return {"stdout": done.stdout, "stderr": done.stderr, "status": done.returncode}


def cli_lines(core: Path) -> list[str]:
    lines = []
    with tempfile.TemporaryDirectory(prefix="tidewell-responses-") as tmp:
        cwd = Path(tmp)

        def record(rid: str, args: list[str], outputs: tuple[str, ...] = ()) -> None:
            result = _run(core, args, cwd)
            for name in outputs:
                path = cwd / name
                result[name] = path.read_text(encoding="utf-8") if path.exists() else None
                path.unlink(missing_ok=True)
            text = json.dumps({"id": rid, "args": args, "result": result}, sort_keys=True)
            lines.append(text.replace(tmp, "<tmp>"))

        for index, args in enumerate(CLI_COMMANDS):
            record(f"cli:{index}", args)
        for example in sorted((ROOT / "docs" / "examples").glob("*.csv")):
            (cwd / example.name).write_bytes(example.read_bytes())
            record(f"batch:{example.name}", ["batch", example.name, "-o", "out.csv"], ("out.csv",))
            args = ["batch", example.name, "-o", "out.csv", "--kpa", "--summary-json", "summary.json"]
            record(f"batch-kpa:{example.name}", args, ("out.csv", "summary.json"))
            record(f"course:{example.name}", ["course", example.name])
            record(f"course-json:{example.name}", ["course", example.name, "--json"])
    return lines


def record(out: Path) -> int:
    import tidewell
    from tidewell.bridge import handle

    core = Path(tidewell.__file__).resolve().parent.parent
    print(f"recording tidewell from {core}", file=sys.stderr)
    lines = bridge_lines(handle) + cli_lines(core)
    out.write_text("\n".join(lines) + "\n", encoding="utf-8")
    print(f"{len(lines)} responses written to {out}", file=sys.stderr)
    return 0


def compare(a: Path, b: Path, show: int = 10) -> int:
    left = a.read_text(encoding="utf-8").splitlines()
    right = b.read_text(encoding="utf-8").splitlines()
    ids_a = [json.loads(line)["id"] for line in left]
    ids_b = [json.loads(line)["id"] for line in right]
    same = sum(x == y for x, y in zip(left, right, strict=False))
    print(f"{a}: {len(left)} lines; {b}: {len(right)} lines; {same} identical")
    if ids_a != ids_b:
        print("the two files do not hold the same requests in the same order")
    if left == right and a.read_bytes() == b.read_bytes():
        print("byte-identical")
        return 0
    shown = 0
    for index, (x, y) in enumerate(zip(left, right, strict=False)):
        if x != y and shown < show:
            shown += 1
            print(f"line {index + 1}: {json.loads(x)['id']}")
            cut = next((i for i, (p, q) in enumerate(zip(x, y, strict=False)) if p != q), min(len(x), len(y)))
            print(f"  A: ...{x[max(0, cut - 120) : cut + 200]}")
            print(f"  B: ...{y[max(0, cut - 120) : cut + 200]}")
    print(f"{len(left) - same if len(left) == len(right) else 'some'} lines differ")
    return 1


def main(argv: list[str] | None = None) -> int:
    parser = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    group = parser.add_mutually_exclusive_group(required=True)
    group.add_argument("--out", type=Path, help="record the responses to this file")
    group.add_argument("--compare", nargs=2, type=Path, metavar=("A", "B"), help="compare two recordings")
    args = parser.parse_args(argv)
    if args.out:
        return record(args.out)
    return compare(*args.compare)


if __name__ == "__main__":
    sys.exit(main())
