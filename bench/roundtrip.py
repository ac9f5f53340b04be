#!/usr/bin/env python3
"""Round trip of one calculation through the page: ``window.tidewell.compute`` -> worker -> Python -> page.

    python3 bench/roundtrip.py [--requests 500] [--quick] [--dist DIR] [--json FILE]

One headless Chromium (unthrottled), the app served from the build, a warm visit (service worker in
control); after engine-ready, one warm-up ``blood_gas`` call (it imports the interpretation modules),
then ``--requests`` different ``blood_gas`` requests, one after another, each timed in the page from
the call of ``compute`` to its promise settling (JSON encoding, the message to the worker, the bridge
in Python, the answer back and its parsing). The inputs are invented (seeded), spread over the ranges a
gas takes, with and without electrolytes and oxygenation. Prints p50, p95 and max in ms.
A benchmark, not a test: it prints figures and passes no judgement.
"""

from __future__ import annotations

import argparse
import json
import math
import os
import random
import statistics
import subprocess
import sys
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(ROOT / "tests" / "browser"))

from harness import CHROMIUM, Browser, Server, build  # noqa: E402

RUN = (
    "while (!window.tidewell) await new Promise((r) => setTimeout(r, 5));"
    "const engine = window.tidewell.engine;"
    "await Promise.race([window.tidewell.ready, new Promise((_, reject) => {"
    "  const check = () => engine.state === 'failed' && reject(new Error(engine.failure));"
    "  check(); engine.addEventListener('state', check); })]);"
    "const [warmup, requests] = arguments;"
    "let t = performance.now(); const first = await window.tidewell.compute(warmup);"
    "const firstMs = performance.now() - t;"
    "const ms = []; let ok = 0;"
    "for (const request of requests) {"
    "  t = performance.now(); const r = await window.tidewell.compute(request);"
    "  ms.push(performance.now() - t); if (r.ok) ok++; }"
    "return {first_ms: firstMs, first_ok: first.ok, ms, ok};"
)


def q(value: float, unit: str) -> dict:
    return {"value": value, "unit": unit}


def invented_requests(n: int, seed: int = 7) -> list[dict]:
    """``n`` blood_gas requests with invented values (not patients), in kPa or mmHg."""
    rng = random.Random(seed)
    out = []
    for i in range(n):
        kpa = i % 2 == 0
        pco2_mmhg = rng.uniform(25, 95)
        hco3 = rng.uniform(14, 44)
        # a pH near the one Henderson-Hasselbalch gives (pK 6.1, CO2 solubility 0.0307 mmol/L/mmHg;
        # common practice), with a small measuring discrepancy, so most gases are self-consistent
        ph = 6.1 + math.log10(hco3 / (0.0307 * pco2_mmhg)) + rng.uniform(-0.02, 0.02)
        inputs = {
            "ph": round(ph, 2),
            "pco2": q(round(pco2_mmhg / 7.50062, 1), "kPa") if kpa else q(round(pco2_mmhg), "mmHg"),
            "hco3": q(round(hco3), "mmol/L"),
        }
        if i % 3:
            po2_kpa = rng.uniform(6.0, 16.0)
            inputs["po2"] = q(round(po2_kpa, 1), "kPa") if kpa else q(round(po2_kpa * 7.50062), "mmHg")
            inputs["fio2"] = round(rng.choice([0.21, 0.24, 0.28, 0.35, 0.4, 0.6]), 2)
        if i % 4 == 1:
            inputs["na"] = q(round(rng.uniform(128, 148)), "mmol/L")
            inputs["cl"] = q(round(rng.uniform(88, 112)), "mmol/L")
        out.append({"calc": "blood_gas", "inputs": inputs})
    return out


def percentile(values: list[float], p: float) -> float:
    """The nearest-rank percentile (p in 0-100)."""
    ordered = sorted(values)
    rank = max(1, min(len(ordered), round(p / 100 * len(ordered) + 0.5)))
    return ordered[rank - 1]


def main() -> int:
    parser = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    parser.add_argument("--requests", type=int, default=500)
    parser.add_argument("--quick", action="store_true", help="20 requests (for CI)")
    parser.add_argument("--dist", type=Path, default=ROOT / "dist")
    parser.add_argument("--json", type=Path, help="also write the times here")
    args = parser.parse_args()
    n = 20 if args.quick else args.requests
    if not (args.dist / "build-manifest.json").exists():
        build(args.dist)
    build_id = json.loads((args.dist / "build-manifest.json").read_text())["build_id"]
    chromium = subprocess.run([CHROMIUM, "--version"], capture_output=True, text=True).stdout.strip()
    load = Path("/proc/loadavg").read_text().split()[0] if Path("/proc/loadavg").exists() else "?"
    print(f"build {build_id}; {chromium}; {os.cpu_count()} CPUs; load average {load}")
    requests = invented_requests(n + 1)
    server = Server(args.dist).start()
    browser = Browser()
    browser.driver.command_executor.client_config.timeout = 900  # 500 requests can outlast Selenium's 120 s
    try:
        browser.get(server.url)
        browser.wait_engine(timeout=300)
        browser.wait_controlled(timeout=300)
        # a warm visit, as a returning user has; the app's 30 s start-up watchdog is for people, not for
        # a loaded machine: a long one, so a slow start is measured, not failed
        browser.get(server.url + "?engine-timeout=900000")
        got = browser.wait_js(RUN, requests[0], requests[1:], timeout=600)
        problems = browser.severe()
    finally:
        browser.quit()
        server.stop()
    ms = got["ms"]
    print(f"{n} blood_gas requests through window.tidewell.compute, one at a time, unthrottled:")
    print(f"  answered ok: {got['ok']} of {n}; warm-up call (imports the modules): {got['first_ms']:.1f} ms")
    print(
        f"  p50 {percentile(ms, 50):.1f} ms, p95 {percentile(ms, 95):.1f} ms, max {max(ms):.1f} ms, "
        f"mean {statistics.fmean(ms):.1f} ms"
    )
    if problems:
        print("SEVERE console entries:\n  " + "\n  ".join(problems))
    if args.json:
        args.json.parent.mkdir(parents=True, exist_ok=True)
        summary = {"p50": percentile(ms, 50), "p95": percentile(ms, 95), "max": max(ms)}
        args.json.write_text(json.dumps({"build_id": build_id, **got, **summary}, indent=1) + "\n")
    return 0


if __name__ == "__main__":
    sys.exit(main())
