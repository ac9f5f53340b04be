#!/usr/bin/env python3
"""Time the ``uncertainty`` calculation in Pyodide through the page, and in CPython, in one run.

    python3 bench/uncertainty.py [--repeats 5] [--quick] [--dist DIR] [--json FILE]

Three invented samples (not patients), from small to full:
  gas      pH, PCO2, HCO3 only;
  oxygen   the same with PO2, FiO2 and age (adds the oxygenation rules and their intervals);
  full     with electrolytes, albumin, lactate, glucose, urea, osmolality and SpO2 as well.
Each is sent as the core's default request (10,000 draws, default errors, the core's default seed). The
first calls go in that order; the repeats then go round the three samples in turn.

Pyodide: a fresh headless Chromium profile loads the built site, waits for the engine, and calls
``window.tidewell.compute`` from the page; times are ``performance.now()`` around the call, so they include
the page -> worker -> page messages. The first call of the first sample also loads numpy (the worker loads it
on first use) and imports the uncertainty code; the first call of each sample is reported on its own, then
the best and median of ``--repeats`` further calls.
CPython: the same requests through ``tidewell.bridge.handle`` in a fresh ``python3`` process, so its first
call also imports numpy.
A benchmark, not a test: it prints figures and passes no judgement on them. ``--quick`` (for CI) makes one
repeated call per sample.
"""

from __future__ import annotations

import argparse
import json
import os
import platform
import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(ROOT / "tests" / "browser"))

from harness import CHROMIUM, Browser, Server, build  # noqa: E402

_GAS = {"ph": 7.31, "pco2": {"value": 9.1, "unit": "kPa"}, "hco3": {"value": 33, "unit": "mmol/L"}}
_OXYGEN = _GAS | {"po2": {"value": 7.4, "unit": "kPa"}, "fio2": {"value": 28, "unit": "%"}, "age": 68}
_FULL = _OXYGEN | {
    "na": {"value": 138, "unit": "mmol/L"},
    "k": {"value": 4.6, "unit": "mmol/L"},
    "cl": {"value": 95, "unit": "mmol/L"},
    "albumin": {"value": 32, "unit": "g/L"},
    "lactate": {"value": 1.9, "unit": "mmol/L"},
    "glucose": {"value": 8.2, "unit": "mmol/L"},
    "urea": {"value": 9.5, "unit": "mmol/L"},
    "measured_osmolality": {"value": 301, "unit": "mOsm/kg"},
    "spo2": 88,
}
SAMPLES = {"gas": _GAS, "oxygen": _OXYGEN, "full": _FULL}
CURVE = {"calc": "oxygen_dissociation_curve", "inputs": {"ph": 7.31}}


def request(sample: dict) -> dict:
    return {"calc": "uncertainty", "inputs": {"sample": sample}, "options": {"pressure_unit": "kPa"}}


TIMED_COMPUTE = (
    "const t0 = performance.now(); const r = await window.tidewell.compute(arguments[0]);"
    "return {ms: performance.now() - t0, ok: r.ok, errors: r.errors || null,"
    "        probability: r.ok ? r.outputs.reading.probability : null};"
)

# run in a fresh interpreter: argv[1] = JSON {name: request}, argv[2] = repeats; prints JSON timings (ms)
CPYTHON = """
import json, sys, time
t = time.perf_counter()
from tidewell import bridge
import_ms = (time.perf_counter() - t) * 1000
requests, repeats = json.loads(sys.argv[1]), int(sys.argv[2])
out = {"import_ms": import_ms, "samples": {}}
times = {name: [] for name in requests}
for i in range(1 + repeats):
    for name, req in requests.items():
        t = time.perf_counter()
        answer = json.loads(bridge.handle(json.dumps(req)))
        times[name].append((time.perf_counter() - t) * 1000)
        p = answer["outputs"]["reading"]["probability"] if answer["ok"] else None
        out["samples"][name] = {"first": times[name][0], "rest": times[name][1:], "ok": answer["ok"],
                                "probability": p}
out["numpy"] = __import__("numpy").__version__
print(json.dumps(out))
"""


def in_pyodide(dist: Path, repeats: int, split: bool) -> dict:
    server = Server(dist).start()
    try:
        browser = Browser()
    except Exception:
        server.stop()
        raise
    out: dict = {"samples": {}}
    try:
        # the converter screen sends nothing on its own, so the first call below is the page's first
        # calculation that needs numpy
        browser.get(server.url + "#convert")
        info = browser.wait_engine(timeout=180)
        out["engine_total_ms"] = info["timings_ms"]["total"]
        before = browser.wait_js("return (await window.tidewell.engine.diagnostics()).packages;")
        out["numpy_loaded_before"] = "numpy" in before
        # first calls in order, then the repeats round-robin, so warming up does not favour a later sample
        times: dict[str, list[float]] = {name: [] for name in SAMPLES}
        for _ in range(1 + repeats):
            for name, sample in SAMPLES.items():
                got = browser.wait_js(TIMED_COMPUTE, request(sample), timeout=300)
                if not got["ok"]:
                    raise RuntimeError(f"{name}: the core refused the sample: {got['errors']}")
                times[name].append(got["ms"])
                out["samples"][name] = {"first": times[name][0], "rest": times[name][1:]}
                out["samples"][name]["probability"] = got["probability"]
        after = browser.wait_js("return (await window.tidewell.engine.diagnostics()).packages;")
        out["numpy_loaded_after"] = "numpy" in after
        # a later visit: the service worker serves every file from its cache (numpy too), a new worker
        # loads numpy again on the first call
        browser.wait_controlled(timeout=180)
        browser.get(server.url + "?visit=2#convert")  # a new address: a real navigation, a new worker
        browser.wait_engine(timeout=180)
        again = browser.wait_js("return (await window.tidewell.engine.diagnostics()).packages;")
        if "numpy" in again:
            raise RuntimeError("the later visit kept the old worker: numpy was already loaded")
        got = browser.wait_js(TIMED_COMPUTE, request(SAMPLES["gas"]), timeout=300)
        out["first_later_visit"] = got["ms"]
        out["controlled_later_visit"] = browser.js("return !!navigator.serviceWorker.controller")
        if split:
            # a third visit splits that first call: the curve calculation loads numpy, then the first
            # uncertainty call pays only for its own code
            browser.get(server.url + "?visit=3#convert")
            browser.wait_engine(timeout=180)
            curve = browser.wait_js(
                TIMED_COMPUTE.replace("r.outputs.reading.probability", "null"), CURVE, timeout=300
            )
            first = browser.wait_js(TIMED_COMPUTE, request(SAMPLES["gas"]), timeout=300)
            out["split"] = {"curve_loads_numpy": curve["ms"], "uncertainty_after": first["ms"]}
        out["severe_console"] = browser.severe()
    finally:
        browser.quit()
        server.stop()
    return out


def in_cpython(repeats: int) -> dict:
    env = dict(os.environ, PYTHONPATH=str(ROOT / "core"))
    proc = subprocess.run(
        [
            sys.executable,
            "-c",
            CPYTHON,
            json.dumps({n: request(s) for n, s in SAMPLES.items()}),
            str(repeats),
        ],
        capture_output=True,
        text=True,
        env=env,
        timeout=600,
        check=True,
    )
    out = json.loads(proc.stdout)
    refused = [name for name, data in out["samples"].items() if not data["ok"]]
    if refused:
        raise RuntimeError(f"CPython: the core refused {refused}")
    return out


def loadavg() -> str:
    path = Path("/proc/loadavg")
    return " ".join(path.read_text().split()[:3]) if path.exists() else "unknown"


def main() -> int:
    parser = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    parser.add_argument("--repeats", type=int, default=5, help="timed calls after the first (default 5)")
    parser.add_argument("--quick", action="store_true", help="one repeated call per sample (for CI)")
    parser.add_argument("--dist", type=Path, help="a built site to use (default: build one afresh)")
    parser.add_argument("--json", type=Path, help="also write the figures here")
    args = parser.parse_args()
    repeats = 1 if args.quick else max(1, args.repeats)
    with tempfile.TemporaryDirectory(prefix="tidewell-bench-") as tmp:
        dist = args.dist
        if dist is None:
            dist = Path(tmp) / "site"
            build(dist)
        build_id = json.loads((dist / "build-manifest.json").read_text())["build_id"]
        chromium = subprocess.run([CHROMIUM, "--version"], capture_output=True, text=True).stdout.strip()
        started = time.strftime("%Y-%m-%d %H:%M UTC", time.gmtime())
        print(f"{started}; build {build_id}; {chromium}; {platform.machine()}, {os.cpu_count()} CPUs")
        print(f"uncertainty, 10,000 draws; first call, then best and median of {repeats} call(s)")
        print(f"(load average at the start: {loadavg()})", flush=True)
        t = time.monotonic()
        pyodide = in_pyodide(dist, repeats, split=not args.quick)
        page_s = time.monotonic() - t
    cpython = in_cpython(repeats)
    print(f"(load average at the end: {loadavg()}: other work on the machine slows every figure)")
    print(f"(browser part {page_s:.0f} s; engine start-up {pyodide['engine_total_ms']} ms; numpy loaded")
    print(
        f" before the first call: {pyodide['numpy_loaded_before']}, after: {pyodide['numpy_loaded_after']};"
    )
    print(f" CPython {platform.python_version()} with numpy {cpython['numpy']})")
    print(f"\n{'ms per call':<10} {'':<8} {'first':>8} {'best':>8} {'median':>8}   reading holds in")
    figures = {}
    for name in SAMPLES:
        for where, data in (("Pyodide", pyodide["samples"][name]), ("CPython", cpython["samples"][name])):
            rest = data["rest"]
            row = {
                "first": data["first"],
                "best": min(rest),
                "median": statistics.median(rest),
                "n": len(rest),
            }
            figures[f"{name}:{where}"] = row
            print(
                f"{name:<10} {where:<8} {row['first']:>8.0f} {row['best']:>8.0f} {row['median']:>8.0f}"
                f"   {100 * data['probability']:.1f} %"
            )
        ratio = figures[f"{name}:Pyodide"]["median"] / figures[f"{name}:CPython"]["median"]
        print(f"{'':<10} {'ratio':<8} {'':>8} {'':>8} {ratio:>7.1f}x  (Pyodide median / CPython median)")
    print(
        "\nfirst call of 'gas' includes loading numpy and the uncertainty code (Pyodide: in the worker, on a"
    )
    print("first visit, while the service worker is still filling its cache; CPython: importing numpy in a")
    print(f"fresh process). On a later visit (files from the cache): {pyodide['first_later_visit']:.0f} ms.")
    if "split" in pyodide:
        split = pyodide["split"]
        print(
            f"A third visit, split: the curve calculation first ({split['curve_loads_numpy']:.0f} ms, "
            f"loads numpy), then the first uncertainty call {split['uncertainty_after']:.0f} ms."
        )
    if pyodide["severe_console"]:
        print("\nSEVERE console entries:\n  " + "\n  ".join(pyodide["severe_console"]))
    if args.json:
        args.json.parent.mkdir(parents=True, exist_ok=True)
        args.json.write_text(
            json.dumps(
                {
                    "build_id": build_id,
                    "when": started,
                    "figures": figures,
                    "first_later_visit": pyodide["first_later_visit"],
                    "split": pyodide.get("split"),
                },
                indent=1,
            )
        )
    return 0


if __name__ == "__main__":
    sys.exit(main())
