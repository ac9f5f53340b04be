#!/usr/bin/env python3
"""Start-up import time of two checkouts side by side: ``import tidewell.bridge`` and the first answer.

    python3 bench/imports.py [A [B]] [--runs 21] [--quick] [--json FILE]

A and B are checkouts (folders holding core/tidewell/); both default to this one, so the benchmark also
runs alone (CI runs it with --quick). Each run starts a fresh interpreter (``python3 -X importtime`` is not
used: it slows the imports it measures) with PYTHONPATH set to the checkout's core/ and nothing else, and
times inside it, with ``time.perf_counter``:

  import   ``import tidewell.bridge``;
  first    then the first ``blood_gas`` answer through ``bridge.handle`` (imports the calculation's modules
           and computes one report);
  total    both (interpreter start-up itself is not counted).

Runs alternate A, B, A, B ... (B first on odd pairs) so drift in the machine's load hits both alike; each
row gives the medians and the ratio B / A of the medians, and the load average (1 min) before and after.
The child also reports whether numpy was imported (it must not be, on this path).
A benchmark, not a test: it prints figures and passes no judgement.
"""

from __future__ import annotations

import argparse
import json
import os
import statistics
import subprocess
import sys
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent

CHILD = r"""
import json, sys, time
t0 = time.perf_counter()
import tidewell.bridge as bridge
t1 = time.perf_counter()
answer = bridge.handle(json.dumps({"calc": "blood_gas", "inputs": {
    "ph": 7.24, "pco2": {"value": 9.3, "unit": "kPa"}, "hco3": {"value": 29.7, "unit": "mmol/L"},
    "po2": {"value": 7.1, "unit": "kPa"}, "fio2": 0.28, "age": 71}}))
t2 = time.perf_counter()
assert json.loads(answer)["ok"], answer[:300]
print(json.dumps({"import": t1 - t0, "first": t2 - t1, "total": t2 - t0, "numpy": "numpy" in sys.modules,
                  "file": bridge.__file__}))
"""


def loadavg() -> float:
    return os.getloadavg()[0] if hasattr(os, "getloadavg") else float("nan")


def one(checkout: Path) -> dict:
    env = {k: v for k, v in os.environ.items() if not k.startswith("PYTHON")}
    env["PYTHONPATH"] = str(checkout / "core")
    env["PYTHONDONTWRITEBYTECODE"] = "1"  # the .pyc files written by the warm-up are read, none is rewritten
    done = subprocess.run(
        [sys.executable, "-c", CHILD], env=env, capture_output=True, text=True, check=True, timeout=120
    )
    result = json.loads(done.stdout)
    expected = (checkout / "core").resolve()
    if not Path(result["file"]).resolve().is_relative_to(expected):
        raise SystemExit(f"{checkout}: tidewell came from {result['file']}, not from {expected}")
    return result


def main() -> int:
    parser = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    parser.add_argument("a", nargs="?", type=Path, default=ROOT, help="checkout A (default: this one)")
    parser.add_argument("b", nargs="?", type=Path, default=None, help="checkout B (default: A)")
    parser.add_argument("--runs", type=int, default=21, help="runs of each checkout")
    parser.add_argument("--quick", action="store_true", help="3 runs each (for CI)")
    parser.add_argument("--json", type=Path, help="also write every run and the medians here")
    args = parser.parse_args()
    a, b = args.a.resolve(), (args.b or args.a).resolve()
    runs = 3 if args.quick else args.runs
    for checkout in (a, b):  # warm-up: compiles the .pyc files once, outside the timed runs
        subprocess.run([sys.executable, "-m", "compileall", "-q", str(checkout / "core")], check=True)
        one(checkout)
    load_before = loadavg()
    times: dict[str, list[dict]] = {"A": [], "B": []}
    for index in range(runs):
        order = (("A", a), ("B", b)) if index % 2 == 0 else (("B", b), ("A", a))
        for label, checkout in order:
            times[label].append(one(checkout))
    load_after = loadavg()
    print(f"CPython {sys.version.split()[0]}, {os.cpu_count()} CPUs; {runs} runs each, alternating")
    print(f"A = {a}\nB = {b}")
    print(f"load average (1 min): {load_before:.2f} before, {load_after:.2f} after")
    print(f"{'ms (median)':<12} {'A':>8} {'B':>8} {'B / A':>7}")
    medians = {}
    for key in ("import", "first", "total"):
        ma = statistics.median(t[key] for t in times["A"]) * 1000
        mb = statistics.median(t[key] for t in times["B"]) * 1000
        medians[key] = {"A": ma, "B": mb, "ratio": mb / ma}
        print(f"{key:<12} {ma:>8.2f} {mb:>8.2f} {mb / ma:>7.3f}")
    numpy = {label: any(t["numpy"] for t in runs_) for label, runs_ in times.items()}
    print(f"numpy imported on this path: A {numpy['A']}, B {numpy['B']}")
    if args.json:
        args.json.parent.mkdir(parents=True, exist_ok=True)
        record = {
            "a": str(a),
            "b": str(b),
            "runs": times,
            "medians": medians,
            "load": [load_before, load_after],
        }
        args.json.write_text(json.dumps(record, indent=1) + "\n")
    return 0


if __name__ == "__main__":
    sys.exit(main())
