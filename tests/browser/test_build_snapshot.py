"""build.py's importable archive and engine snapshot: what they hold, and where the build records them.

No browser here (test_snapshot.py starts engines from the snapshot in Chromium), but the archive is
imported by Pyodide under node, as in the engine.
"""

from __future__ import annotations

import hashlib
import json
import re
import subprocess
import zipfile

from harness import ROOT
from test_build import MAGIC_312

SNAPSHOT = "pyodide/engine.snapshot"


def built_constants(dist) -> dict:
    text = (dist / "js" / "build-info.js").read_text()
    return {k: json.loads(v) for k, v in re.findall(r"^export const (\w+) = (\".*?\");$", text, re.M)}


def test_the_zip_holds_each_module_compiled_without_its_source(dist):
    constants = built_constants(dist)
    archive = dist / "pyodide" / constants["TIDEWELL_ZIP"]
    assert hashlib.sha256(archive.read_bytes()).hexdigest() == constants["TIDEWELL_ZIP_SHA256"]
    wheel = dist / "pyodide" / constants["TIDEWELL_WHEEL"]
    source_tree = {
        p.relative_to(ROOT / "core").as_posix() for p in (ROOT / "core" / "tidewell").rglob("*.py")
    }
    with zipfile.ZipFile(archive) as z, zipfile.ZipFile(wheel) as w:
        names = z.namelist()
        assert names == sorted(names) and all(i.date_time == (1980, 1, 1, 0, 0, 0) for i in z.infolist())
        # zipimport finds name.pyc standing alone (never in __pycache__/); no source beside it
        assert set(names) == {n + "c" for n in source_tree}
        for name in sorted(source_tree):
            folder, _, module = name.rpartition("/")
            compiled = z.read(name + "c")
            assert compiled == w.read(f"{folder}/__pycache__/{module[:-3]}.cpython-312.pyc"), name
            assert compiled[:4] == MAGIC_312 and int.from_bytes(compiled[4:8], "little") == 0b01, name


IMPORT_FROM_ZIP = r"""
import { readFileSync } from "fs";
const [pyodideDir, zipPath, target] = process.argv.slice(2);
const { loadPyodide } = await import(pyodideDir + "/pyodide.mjs");
const pyodide = await loadPyodide({ indexURL: pyodideDir + "/", stdout: () => {} });
pyodide.FS.writeFile(target, new Uint8Array(readFileSync(zipPath)));
process.stdout.write(pyodide.runPython(`
import json, sys
sys.path.insert(0, ${JSON.stringify(target)})
import tidewell.bridge, tidewell.calculations.blood_gas
gas = {"ph": 7.31, "pco2": {"value": 9.1, "unit": "kPa"}, "hco3": {"value": 33, "unit": "mmol/L"}}
json.dumps({"ok": json.loads(tidewell.bridge.handle(json.dumps({"calc": "blood_gas", "inputs": gas})))["ok"],
            "files": sorted({m.__file__ for n, m in sys.modules.items() if n.startswith("tidewell")})})
`));
"""


def test_pyodide_imports_tidewell_from_the_zip_compiled(dist, tmp_path):
    constants = built_constants(dist)
    script = tmp_path / "zip.mjs"
    script.write_text(IMPORT_FROM_ZIP)
    proc = subprocess.run(
        [
            "node",
            str(script),
            str(dist / "pyodide"),
            str(dist / "pyodide" / constants["TIDEWELL_ZIP"]),
            constants["ZIP_PATH"],
        ],
        capture_output=True,
        text=True,
        timeout=600,
    )
    assert proc.returncode == 0, proc.stderr[-2000:]
    out = json.loads(proc.stdout)
    assert out["ok"] is True
    assert out["files"] and all(f.startswith(constants["ZIP_PATH"] + "/tidewell/") for f in out["files"])
    assert all(f.endswith(".pyc") for f in out["files"]), out["files"]  # no module compiled at start


def test_the_manifest_records_the_snapshot_and_the_service_worker_stores_it_after_the_start(dist):
    manifest = json.loads((dist / "build-manifest.json").read_text())
    data = (dist / SNAPSHOT).read_bytes()
    entry = {"path": SNAPSHOT, "size": len(data), "sha256": hashlib.sha256(data).hexdigest()}
    assert manifest["snapshot"] == entry and entry in manifest["files"]  # so the build id covers it
    assert built_constants(dist)["SNAPSHOT_SHA256"] == entry["sha256"]
    # Pyodide's own header (its snapshot magic number), then the heap: at least Pyodide's 20 MiB start
    assert int.from_bytes(data[:4], "little") == 1886286592 and len(data) >= 20 * 2**20
    sw = (dist / "sw.js").read_text()
    later = json.loads(re.search(r"const DEFERRED = (\{.*?\});", sw, re.S).group(1))
    precache = json.loads(re.search(r"const PRECACHE = (\{.*?\});", sw, re.S).group(1))
    wheel = "./pyodide/" + built_constants(dist)["TIDEWELL_WHEEL"]
    assert later == {
        f"./{SNAPSHOT}": entry["sha256"],
        wheel: hashlib.sha256((dist / wheel).read_bytes()).hexdigest(),
    }
    assert not set(later) & set(precache)  # a first visit's install never waits for them
    assert "./pyodide/" + built_constants(dist)["TIDEWELL_ZIP"] in precache
