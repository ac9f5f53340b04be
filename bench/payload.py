#!/usr/bin/env python3
"""What a phone downloads to install Tidewell: the precached bytes, raw and gzip-compressed.

    python3 bench/payload.py [--dist DIR] [--quick] [--json FILE]

Compares the whole precache (what the service worker's install stores: the list in the built sw.js)
with the floor any Pyodide + numpy app pays (the runtime files as released and the numpy wheel alone),
and shows the part on the start-up path (what must arrive before the engine is ready: the runtime, the
tidewell zip and the shell; numpy, micropip and packaging are not on it). The files stored after the
engine's first start (the engine snapshot, the wheel: DEFERRED in sw.js) are shown apart: they grow
the offline copy, not the first visit's download before the engine is ready.
gzip is level 9 per file, as a static host would send it with Content-Encoding: gzip. A benchmark,
not a test: it prints figures and passes no judgement.
"""

from __future__ import annotations

import argparse
import gzip
import json
import subprocess
import sys
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(ROOT))
from build import cache_dir, fetch_runtime, read_runtime  # noqa: E402

GROUPS = (
    ("Pyodide runtime", lambda p: p.startswith("pyodide/pyodide") or p == "pyodide/python_stdlib.zip"),
    ("numpy wheel", lambda p: p.startswith("pyodide/numpy-")),
    ("micropip + packaging", lambda p: p.startswith(("pyodide/micropip-", "pyodide/packaging-"))),
    (
        "tidewell zip (imported from sys.path)",
        lambda p: p.startswith("pyodide/tidewell-") and p.endswith(".zip"),
    ),
    ("later: tidewell wheel", lambda p: p.startswith("pyodide/tidewell-") and p.endswith(".whl")),
    ("later: engine snapshot", lambda p: p.endswith(".snapshot")),
    ("shell (html, css, js, icons, manifests)", lambda p: True),
)
BASELINE = ("Pyodide runtime", "numpy wheel")
NOT_AT_START = ("numpy wheel", "micropip + packaging")
LATER = ("later: tidewell wheel", "later: engine snapshot")


def group_of(path: str) -> str:
    return next(name for name, test in GROUPS if test(path))


def measure(dist: Path) -> dict:
    released = read_runtime(fetch_runtime(cache_dir()))  # the pinned npm package's files
    manifest = json.loads((dist / "build-manifest.json").read_text())
    paths = [f["path"] for f in manifest["files"]] + ["build-manifest.json"]
    groups = {name: {"files": 0, "raw": 0, "gzip": 0} for name, _ in GROUPS}
    for path in paths:
        data = (dist / path).read_bytes()
        g = groups[group_of(path)]
        g["files"] += 1
        g["raw"] += len(data)
        g["gzip"] += len(gzip.compress(data, compresslevel=9, mtime=0))

    def total(names) -> dict:
        return {k: sum(groups[n][k] for n in names) for k in ("files", "raw", "gzip")}

    precached = [n for n in groups if n not in LATER]

    # the floor is Pyodide as released (the build ships a python_stdlib.zip with its start-up modules
    # compiled, so its own runtime group is larger than the release's) plus the numpy wheel
    stock = {"files": 0, "raw": 0, "gzip": 0}
    for path in paths:
        if group_of(path) == "Pyodide runtime":
            name = path.rsplit("/", 1)[-1]
            data = released[name] if name in released else (dist / path).read_bytes()
            stock["files"] += 1
            stock["raw"] += len(data)
            stock["gzip"] += len(gzip.compress(data, compresslevel=9, mtime=0))
    floor = {k: stock[k] + groups["numpy wheel"][k] for k in stock}
    return {
        "build_id": manifest["build_id"],
        "groups": groups,
        "precached": total(precached),
        "stored_later": total(LATER),
        "baseline_runtime_plus_numpy": floor,
        "startup_path": total([n for n in precached if n not in NOT_AT_START]),
    }


def show(result: dict) -> None:
    def row(label, d):
        print(f"{label:<42} {d['files']:>5} {d['raw']:>13,} {d['gzip']:>13,}")

    print(f"build {result['build_id']}")
    print(f"{'':<42} {'files':>5} {'raw bytes':>13} {'gzip bytes':>13}")
    for name, d in result["groups"].items():
        row(name, d)
    print("-" * 76)
    row("precached in total (the install)", result["precached"])
    row("stored after the first start", result["stored_later"])
    row("floor: released runtime + numpy alone", result["baseline_runtime_plus_numpy"])
    row("on the start-up path", result["startup_path"])
    extra = {k: result["precached"][k] - result["baseline_runtime_plus_numpy"][k] for k in ("raw", "gzip")}
    base = result["baseline_runtime_plus_numpy"]
    print(
        f"Tidewell adds {extra['raw']:,} bytes raw ({100 * extra['raw'] / base['raw']:.1f} %), "
        f"{extra['gzip']:,} gzip ({100 * extra['gzip'] / base['gzip']:.1f} %) to the runtime + numpy floor."
    )


def main() -> int:
    parser = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    parser.add_argument("--dist", type=Path, default=ROOT / "dist")
    parser.add_argument("--quick", action="store_true", help="accepted for symmetry with startup.py")
    parser.add_argument("--json", type=Path, help="also write the figures here")
    args = parser.parse_args()
    if not (args.dist / "build-manifest.json").exists():
        subprocess.run([sys.executable, str(ROOT / "build.py"), "--out", str(args.dist)], check=True)
    result = measure(args.dist)
    show(result)
    if args.json:
        args.json.parent.mkdir(parents=True, exist_ok=True)
        args.json.write_text(json.dumps(result, indent=1) + "\n")
    return 0


if __name__ == "__main__":
    sys.exit(main())
