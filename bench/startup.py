#!/usr/bin/env python3
"""Time from navigation to ``tidewell:engine-ready``: cold, warm and offline starts (medians).

    python3 bench/startup.py [--runs 5] [--quick] [--dist DIR] [--json FILE] [--no-install-routes]

Each run uses a fresh headless Chromium profile and one server:
  cold     first visit (empty profile: nothing cached, no service worker);
  warm     the same profile loads the page again, served by the service worker's cache (2nd visit);
  warm+    a 3rd visit: Chromium now also has V8's compiled code for pyodide.asm.wasm (it caches a
           wasm module's code only when the module is seen a second time), the steady state;
  offline  the server process is stopped, and the page is loaded again (a later visit).
Then, while still warm, each install route of the worker is timed (unpack, the default; loadPackage;
micropip), and the first and second call of a calculation that needs numpy (loaded on demand).
Times are the mark's ``startTime`` (ms after navigation start), so browser launch is not counted.
A benchmark, not a test: it prints figures (medians, min and max) and passes no judgement.
"""

from __future__ import annotations

import argparse
import json
import os
import platform
import statistics
import subprocess
import sys
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(ROOT / "tests" / "browser"))

from harness import CHROMIUM, Browser, Server, build  # noqa: E402

ENGINE_READY = (
    "while (!window.tidewell) await new Promise((r) => setTimeout(r, 20));"
    "await window.tidewell.ready;"
    "return {ready: performance.getEntriesByName('tidewell:engine-ready')[0].startTime,"
    "        shell: performance.getEntriesByName('tidewell:shell-ready')[0].startTime,"
    "        info: window.tidewell.engine.info};"
)
TIMED_COMPUTE = (
    "const t0 = performance.now(); const r = await window.tidewell.compute(arguments[0]);"
    "return {ms: performance.now() - t0, ok: r.ok};"
)
NUMPY_REQUEST = {"calc": "oxygen_dissociation_curve", "inputs": {"ph": 7.3}}
ROUTES = ("unpack", "loadPackage", "micropip")


def one_run(dist: Path, routes: bool) -> dict:
    server = Server(dist).start()
    browser = Browser()
    sample: dict = {}
    try:
        browser.get(server.url)
        cold = browser.wait_js(ENGINE_READY, timeout=180)
        sample["cold"], sample["shell_cold"] = cold["ready"], cold["shell"]
        browser.wait_controlled(timeout=180)
        browser.get(server.url)
        warm = browser.wait_js(ENGINE_READY, timeout=120)
        sample["warm"], sample["shell_warm"] = warm["ready"], warm["shell"]
        sample["warm_runtime"] = warm["info"]["timings_ms"]["runtime"]
        browser.get(server.url)
        hot = browser.wait_js(ENGINE_READY, timeout=120)
        sample["warm+"], sample["shell_warm+"] = hot["ready"], hot["shell"]
        sample["warm+_runtime"] = hot["info"]["timings_ms"]["runtime"]
        sample["warm+_install_import"] = (
            hot["info"]["timings_ms"]["install"] + hot["info"]["timings_ms"]["import"]
        )
        if routes:
            for route in ROUTES:
                browser.get(f"{server.url}?install={route}")
                got = browser.wait_js(ENGINE_READY, timeout=120)
                assert got["info"]["install"] == route, got["info"]
                sample[f"install:{route}"] = got["info"]["timings_ms"]["install"]
                sample[f"ready:{route}"] = got["ready"]
            first = browser.wait_js(TIMED_COMPUTE, NUMPY_REQUEST, timeout=120)
            second = browser.wait_js(TIMED_COMPUTE, NUMPY_REQUEST, timeout=120)
            if first["ok"]:
                sample["numpy_first_call"], sample["numpy_second_call"] = first["ms"], second["ms"]
        server.stop()
        browser.get(server.url)
        offline = browser.wait_js(ENGINE_READY, timeout=120)
        sample["offline"] = offline["ready"]
        problems = browser.severe()
        if problems:
            sample["severe_console"] = problems
    finally:
        browser.quit()
        server.stop()
    return sample


LABELS = {
    "cold": "cold start -> engine-ready",
    "warm": "warm start (2nd visit) -> engine-ready",
    "warm+": "warm+ start (3rd visit) -> engine-ready",
    "offline": "offline start -> engine-ready",
    "shell_cold": "cold start -> shell-ready",
    "shell_warm": "warm start -> shell-ready",
    "shell_warm+": "warm+ start -> shell-ready",
    "warm_runtime": "warm: loadPyodide in the worker",
    "warm+_runtime": "warm+: loadPyodide in the worker",
    "warm+_install_import": "warm+: install + import tidewell",
    **{f"install:{r}": f"install tidewell via {r} (warm+)" for r in ROUTES},
    **{f"ready:{r}": f"engine-ready, {r} route (warm+)" for r in ROUTES},
    "numpy_first_call": "curve calc, 1st call (loads numpy)",
    "numpy_second_call": "curve calc, 2nd call",
}


def loadavg() -> str:
    path = Path("/proc/loadavg")
    return path.read_text().split()[0] if path.exists() else "unknown"


def main() -> int:
    parser = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    parser.add_argument("--runs", type=int, default=5)
    parser.add_argument("--quick", action="store_true", help="one run of each (for CI)")
    parser.add_argument("--dist", type=Path, default=ROOT / "dist")
    parser.add_argument("--no-install-routes", action="store_true", help="skip the install-route timings")
    parser.add_argument("--json", type=Path, help="also write the samples and medians here")
    args = parser.parse_args()
    runs = 1 if args.quick else args.runs
    if not (args.dist / "build-manifest.json").exists():
        build(args.dist)
    build_id = json.loads((args.dist / "build-manifest.json").read_text())["build_id"]
    chromium = subprocess.run([CHROMIUM, "--version"], capture_output=True, text=True).stdout.strip()
    print(f"build {build_id}; {chromium}; {platform.machine()}, {os.cpu_count()} CPUs; {runs} run(s)")
    print(f"(load average at the start: {loadavg()})")
    samples = []
    for i in range(runs):
        t = time.monotonic()
        samples.append(one_run(args.dist, routes=not args.no_install_routes))
        print(
            f"  run {i + 1}/{runs}: cold {samples[-1]['cold']:.0f} ms, warm {samples[-1]['warm']:.0f} ms, "
            f"warm+ {samples[-1]['warm+']:.0f} ms, offline {samples[-1]['offline']:.0f} ms "
            f"({time.monotonic() - t:.0f} s)",
            flush=True,
        )
    print(f"(load average at the end: {loadavg()}: other work on the machine slows every figure)")
    print(f"\n{'ms after navigation start':<42} {'median':>8} {'min':>8} {'max':>8}  n")
    medians = {}
    for key, label in LABELS.items():
        values = [s[key] for s in samples if key in s]
        if not values:
            continue
        medians[key] = statistics.median(values)
        print(f"{label:<42} {medians[key]:>8.0f} {min(values):>8.0f} {max(values):>8.0f}  {len(values)}")
    severe = [p for s in samples for p in s.get("severe_console", [])]
    if severe:
        print("\nSEVERE console entries during the runs:\n  " + "\n  ".join(severe))
    if args.json:
        args.json.parent.mkdir(parents=True, exist_ok=True)
        args.json.write_text(
            json.dumps({"build_id": build_id, "samples": samples, "medians": medians}, indent=1)
        )
    return 0


if __name__ == "__main__":
    sys.exit(main())
