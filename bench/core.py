#!/usr/bin/env python3
"""CPython requests per second through ``tidewell.bridge.handle`` (JSON text in and out), per calculation.

    python3 bench/core.py [--seconds 1.0] [--quick] [--json FILE]

For every calculation in ``tidewell.bridge.CALCULATIONS``, one representative valid request (invented
values; the blood gas is the worked case AB-01 of tests/cases/reference_cases.json) is sent through
``handle`` after one warm-up call (which imports the calculation's module and, where used, numpy), then
repeated for about ``--seconds``; the rate is the best of three such rounds (the machine is shared).
The benchmark stops with an error if a request is not answered ``ok`` (a figure for an error answer
would mean nothing). A benchmark, not a test: it prints figures and passes no judgement.
"""

from __future__ import annotations

import argparse
import json
import os
import platform
import sys
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(ROOT / "core"))
sys.path.insert(0, str(ROOT / "tests"))

from casebook import case_inputs, load_cases  # noqa: E402
from tidewell import bridge  # noqa: E402


def q(value: float, unit: str) -> dict:
    return {"value": value, "unit": unit}


def requests() -> dict[str, dict]:
    """calc name -> one valid request (invented values unless a worked case is named)."""
    ab01 = load_cases()["AB-01"]
    gas = {"ph": 7.31, "pco2": q(9.1, "kPa"), "hco3": q(33, "mmol/L"), "po2": q(7.4, "kPa"), "fio2": 0.28}
    return {
        "convert": {"calc": "convert", "inputs": {"quantity": q(6.5, "kPa"), "to": "mmHg"}},
        "blood_gas": {"calc": "blood_gas", "inputs": case_inputs(ab01)},
        "alveolar_gas": {
            "calc": "alveolar_gas",
            "inputs": {"fio2": 0.28, "pco2": q(9.1, "kPa"), "po2": q(7.4, "kPa"), "age": 68},
        },
        "oxygen_content": {
            "calc": "oxygen_content",
            "inputs": {"hb": q(13.5, "g/dL"), "spo2": 88, "po2": q(7.4, "kPa")},
        },
        "oxygen_dissociation_curve": {
            "calc": "oxygen_dissociation_curve",
            "inputs": {"ph": 7.31, "pco2": q(9.1, "kPa"), "po2": q(7.4, "kPa")},
        },
        "ventilation": {
            "calc": "ventilation",
            "inputs": {"rr": 18, "vt": q(420, "mL"), "pco2": q(9.1, "kPa"), "target_pco2": q(7.0, "kPa")},
        },
        "temperature_correction": {
            "calc": "temperature_correction",
            "inputs": {"ph": 7.31, "pco2": q(9.1, "kPa"), "po2": q(7.4, "kPa"), "temperature": q(34, "degC")},
        },
        "altitude": {"calc": "altitude", "inputs": {"altitude": q(8000, "ft"), "fio2": 0.21}},
        "altitude_profile": {"calc": "altitude_profile", "inputs": {"altitude": q(8000, "ft"), "fio2": 0.21}},
        "oxygen_supply": {
            "calc": "oxygen_supply",
            "inputs": {
                "flow": q(2, "L/min"),
                "duration": q(3, "h"),
                "cylinder_water_capacity": q(2, "L"),
                "cylinder_pressure": q(200, "bar"),
            },
        },
        "uncertainty": {"calc": "uncertainty", "inputs": {"sample": gas}},
        "acid_base_map": {"calc": "acid_base_map", "inputs": {}},
        "course": {
            "calc": "course",
            "inputs": {
                "hypercapnia_risk": True,
                "samples": [
                    {"time": 0, "inputs": gas, "events": ["niv_started"]},
                    {"time": 90, "inputs": {**gas, "ph": 7.35, "pco2": q(8.0, "kPa")}},
                    {"time": 300, "inputs": {**gas, "ph": 7.38, "pco2": q(7.4, "kPa")}},
                ],
            },
        },
    }


def rate(text: str, seconds: float) -> float:
    """Requests per second: the best of three rounds of about ``seconds`` each."""
    best = 0.0
    for _ in range(3):
        n, t0 = 0, time.perf_counter()
        while True:
            bridge.handle(text)
            n += 1
            elapsed = time.perf_counter() - t0
            if elapsed >= seconds:
                break
        best = max(best, n / elapsed)
    return best


def main() -> int:
    parser = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    parser.add_argument("--seconds", type=float, default=1.0, help="length of each timed round")
    parser.add_argument("--quick", action="store_true", help="rounds of 0.05 s (for CI)")
    parser.add_argument("--json", type=Path, help="also write the rates here")
    args = parser.parse_args()
    seconds = 0.05 if args.quick else args.seconds
    reqs = requests()
    missing = set(bridge.CALCULATIONS) - set(reqs)
    if missing:
        print(f"no request written for {sorted(missing)}: add one to bench/core.py", file=sys.stderr)
        return 1
    load = os.getloadavg()[0] if hasattr(os, "getloadavg") else float("nan")
    print(f"CPython {platform.python_version()}, {os.cpu_count()} CPUs, load average {load:.2f}")
    print(f"{'calculation':<28} {'requests/s':>11} {'ms each':>8}")
    out = {}
    for name in bridge.CALCULATIONS:
        text = json.dumps(reqs[name])
        first = json.loads(bridge.handle(text))
        if not first.get("ok"):
            print(f"{name}: the benchmark's request is refused: {first.get('errors')}", file=sys.stderr)
            return 1
        out[name] = rate(text, seconds)
        print(f"{name:<28} {out[name]:>11,.0f} {1000 / out[name]:>8.3f}", flush=True)
    if args.json:
        args.json.parent.mkdir(parents=True, exist_ok=True)
        args.json.write_text(json.dumps(out, indent=1) + "\n")
    return 0


if __name__ == "__main__":
    sys.exit(main())
