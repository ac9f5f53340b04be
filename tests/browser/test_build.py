"""build.py: reproducible bytes, a real wheel, verified runtime wheels, a consistent precache list.

No browser here, but it needs the runtime cache build.py fills (so it sits with the browser tests).
"""

from __future__ import annotations

import base64
import csv
import hashlib
import io
import json
import re
import subprocess
import sys
import zipfile
from pathlib import Path

import pytest
from harness import BUILD_PY, ROOT, build

sys.path.insert(0, str(ROOT))
from build import cache_dir, fetch_runtime, read_runtime

# pyodide@0.27.7's own pyodide-lock.json (the build checks against the copy inside the npm tarball)
LOCK_SHA256 = {
    "numpy-2.0.2-cp312-cp312-pyodide_2024_0_wasm32.whl": (
        "ebb61241d962b98b21597d7ce43b67668a6d5bab3acec4fbe958657320d7cd08"
    ),
    "micropip-0.9.0-py3-none-any.whl": "034f22763607744f982d2911170c50b496a38b8ba0535e5a09618475b1d7b051",
    "packaging-24.2-py3-none-any.whl": "fbf6a5ace596eb8e28fe0089ecfc0bca2eb3930563e9ca06acb98ea5302b99f7",
}


def tree(root: Path) -> dict[str, bytes]:
    return {p.relative_to(root).as_posix(): p.read_bytes() for p in sorted(root.rglob("*")) if p.is_file()}


def test_two_builds_give_identical_bytes(dist, tmp_path):
    again = tmp_path / "again"
    build(again)
    first, second = tree(dist), tree(again)
    assert sorted(first) == sorted(second)
    different = [name for name in first if first[name] != second[name]]
    assert different == []
    # and the sums file says what is there
    sums = dict(reversed(line.split("  ", 1)) for line in (dist / "SHA256SUMS").read_text().splitlines())
    assert set(sums) == set(first) - {"SHA256SUMS"}
    for name, digest in sums.items():
        assert hashlib.sha256(first[name]).hexdigest() == digest, name


def test_manifest_precache_list_and_lock_agree(dist):
    manifest = json.loads((dist / "build-manifest.json").read_text())
    listed = {f["path"]: f for f in manifest["files"]}
    on_disk = tree(dist)
    assert set(on_disk) == set(listed) | {"build-manifest.json", "sw.js", "SHA256SUMS"}
    for path, entry in listed.items():
        assert (
            entry["size"] == len(on_disk[path])
            and entry["sha256"] == hashlib.sha256(on_disk[path]).hexdigest()
        )
    canonical = json.dumps(manifest["files"], sort_keys=True, separators=(",", ":")).encode()
    assert manifest["build_id"] == hashlib.sha256(canonical).hexdigest()[:16]

    sw = (dist / "sw.js").read_text()
    assert f'const BUILD_ID = "{manifest["build_id"]}";' in sw
    precache = json.loads(re.search(r"const PRECACHE = (\{.*?\});", sw, re.S).group(1))
    # stored after the engine's first start instead (test_build_snapshot.py): the snapshot and the wheel
    later = json.loads(re.search(r"const DEFERRED = (\{.*?\});", sw, re.S).group(1))
    assert sorted([*precache, *later]) == sorted(["./" + p for p in listed] + ["./build-manifest.json"])
    for url, sha256 in {**precache, **later}.items():
        assert hashlib.sha256(on_disk[url.removeprefix("./")]).hexdigest() == sha256, url
    assert "__" not in sw.replace("__proto__", "")  # no placeholder left behind

    lock = json.loads((dist / "pyodide" / "pyodide-lock.json").read_text())
    assert lock["info"]["version"] == "0.27.7"
    assert sorted(lock["packages"]) == ["micropip", "numpy", "packaging", "tidewell"]
    for package in lock["packages"].values():
        data = on_disk[f"pyodide/{package['file_name']}"]
        assert hashlib.sha256(data).hexdigest() == package["sha256"], package["name"]
        if package["file_name"] in LOCK_SHA256:
            assert package["sha256"] == LOCK_SHA256[package["file_name"]]
    shipped_runtime = sorted(
        p
        for p in listed
        if p.startswith("pyodide/") and not p.endswith((".whl", ".snapshot")) and "/tidewell-" not in p
    )
    assert shipped_runtime == [
        "pyodide/pyodide-lock.json",
        "pyodide/pyodide.asm.js",
        "pyodide/pyodide.asm.wasm",
        "pyodide/pyodide.mjs",
        "pyodide/python_stdlib.zip",
    ]
    assert not any(p.endswith(".py") for p in listed)  # make_icons.py is not shipped


def test_tidewell_wheel_is_a_valid_installable_wheel(dist, tmp_path):
    wheel = next((dist / "pyodide").glob("tidewell-*-py3-none-any.whl"))
    with zipfile.ZipFile(wheel) as z:
        names = z.namelist()
        assert names[:-1] == sorted(names[:-1]) and names[-1].endswith(".dist-info/RECORD")
        assert all(i.date_time == (1980, 1, 1, 0, 0, 0) for i in z.infolist())
        dist_info = next(n.split("/")[0] for n in names if n.endswith(".dist-info/RECORD"))
        record = list(csv.reader(io.StringIO(z.read(f"{dist_info}/RECORD").decode())))
        for name, digest, size in record:
            if name.endswith("RECORD"):
                assert digest == size == ""
                continue
            data = z.read(name)
            expected = (
                "sha256=" + base64.urlsafe_b64encode(hashlib.sha256(data).digest()).rstrip(b"=").decode()
            )
            assert (digest, int(size)) == (expected, len(data)), name
        assert {r[0] for r in record} == set(names)
        modules = {n for n in names if n.endswith(".py")}
    source = {p.relative_to(ROOT / "core").as_posix() for p in (ROOT / "core" / "tidewell").rglob("*.py")}
    assert modules == source

    target = tmp_path / "site"
    subprocess.run(
        [
            sys.executable,
            "-m",
            "pip",
            "install",
            "--quiet",
            "--no-deps",
            "--no-index",
            "--disable-pip-version-check",
            "--target",
            str(target),
            str(wheel),
        ],
        check=True,
        capture_output=True,
    )
    code = (
        "import json, sys, tidewell, tidewell.bridge as b;"
        "assert tidewell.__file__.startswith(sys.argv[1]), tidewell.__file__;"
        "print(b.handle(json.dumps({'calc': 'convert', 'inputs': {'quantity': {'value': 1, 'unit': 'kPa'},"
        " 'to': 'mmHg'}})))"
    )
    out = subprocess.run(
        [sys.executable, "-c", code, str(target)], capture_output=True, text=True, check=True, cwd=target
    )
    assert json.loads(out.stdout)["ok"] is True


@pytest.mark.parametrize("damage", ["corrupt", "missing"])
def test_wheels_that_fail_the_lock_are_refused(tmp_path, damage):
    # a --wheels directory with one bad copy: the build must stop and name the file
    wheels = tmp_path / "wheels"
    wheels.mkdir()
    cache = Path(
        subprocess.run(
            [sys.executable, "-c", "import build; print(build.cache_dir())"],
            cwd=ROOT,
            capture_output=True,
            text=True,
            check=True,
        ).stdout.strip()
    )
    store = cache / "pyodide-0.27.7-wheels"
    for name in LOCK_SHA256:
        (wheels / name).write_bytes((store / name).read_bytes())
    victim = wheels / "micropip-0.9.0-py3-none-any.whl"
    if damage == "corrupt":
        data = bytearray(victim.read_bytes())
        data[100] ^= 0x01
        victim.write_bytes(bytes(data))
    else:
        victim.unlink()
    proc = subprocess.run(
        [sys.executable, str(BUILD_PY), "--out", str(tmp_path / "site"), "--wheels", str(wheels)],
        capture_output=True,
        text=True,
    )
    assert proc.returncode == 1
    assert "micropip-0.9.0-py3-none-any.whl" in proc.stderr
    assert ("sha256" in proc.stderr) if damage == "corrupt" else ("missing" in proc.stderr)
    assert not (tmp_path / "site").exists()


# CPython's magic number for 3.12 bytecode (Lib/importlib/_bootstrap_external.py: "Python 3.12b1 3531"),
# the version Pyodide 0.27.7 runs (pyodide-lock.json info.python = 3.12.7)
MAGIC_312 = (3531).to_bytes(2, "little") + b"\r\n"

CHECK_PYC_IN_PYODIDE = r"""
import { readFileSync } from "fs";
const [pyodideDir, wheelPath] = process.argv.slice(2);
const { loadPyodide } = await import(pyodideDir + "/pyodide.mjs");
const pyodide = await loadPyodide({ indexURL: pyodideDir + "/", stdout: () => {} });
// the standard-library modules Pyodide's own start loaded, and whether each came from a .pyc
const started = JSON.parse(pyodide.runPython(`
import json, sys
prefix = next(p for p in sys.path if p.endswith(".zip")) + "/"
files = [getattr(m, "__file__", None) or "" for m in list(sys.modules.values())]
json.dumps([f for f in files if f.startswith(prefix)])
`));
const site = pyodide.runPython("import site; site.getsitepackages()[0]");
pyodide.unpackArchive(new Uint8Array(readFileSync(wheelPath)), "wheel", { extractDir: site });
process.stdout.write(pyodide.runPython(`
import importlib, json, pathlib, site
importlib.invalidate_caches()
# every source now fails if it is read: the import must come from the compiled files alone
for path in pathlib.Path(site.getsitepackages()[0], "tidewell").rglob("*.py"):
    path.write_text("raise ImportError('the source was compiled at start-up')\\n")
import sys, tidewell.bridge, tidewell.calculations.blood_gas
json.dumps({"convert": json.loads(tidewell.bridge.handle(json.dumps(
    {"calc": "convert", "inputs": {"quantity": {"value": 1, "unit": "kPa"}, "to": "mmHg"}})))["ok"],
    "json": sys.modules["json"].__file__, "difflib": sys.modules["difflib"].__file__})
`));
const sources = started.filter((file) => !file.endsWith(".pyc"));
console.error(JSON.stringify({ started: started.length, from_source: sources }));
if (sources.length || started.length < 50) process.exitCode = 3;
"""


def test_wheel_carries_modules_compiled_for_the_runtime(dist):
    wheel = next((dist / "pyodide").glob("tidewell-*-py3-none-any.whl"))
    with zipfile.ZipFile(wheel) as z:
        names = set(z.namelist())
        sources = {n for n in names if n.endswith(".py")}
        compiled = {n for n in names if n.endswith(".pyc")}
        expected = {
            f"{n.rpartition('/')[0]}/__pycache__/{n.rpartition('/')[2][:-3]}.cpython-312.pyc" for n in sources
        }
        assert compiled == expected
        for name in sorted(compiled):
            header = z.read(name)[:16]
            # PEP 552: magic, flags = 0b01 (hash-based, source not checked), then the source hash
            assert header[:4] == MAGIC_312, name
            assert int.from_bytes(header[4:8], "little") == 0b01, name


def test_runtime_imports_the_compiled_modules_without_reading_sources(dist, tmp_path):
    wheel = next((dist / "pyodide").glob("tidewell-*-py3-none-any.whl"))
    script = tmp_path / "check.mjs"
    script.write_text(CHECK_PYC_IN_PYODIDE)
    proc = subprocess.run(
        ["node", str(script), str(dist / "pyodide"), str(wheel)],
        capture_output=True,
        text=True,
        timeout=600,
    )
    # every standard-library module of Pyodide's own start came from a compiled file (stderr says which
    # did not), and so did json and difflib, which tidewell imports
    assert proc.returncode == 0, proc.stderr[-2000:]
    assert json.loads(proc.stdout) == {
        "convert": True,
        "json": "/lib/python312.zip/json/__init__.pyc",
        "difflib": "/lib/python312.zip/difflib.pyc",
    }


def test_standard_library_differs_from_the_release_only_by_compiled_modules(dist):
    # the build's python_stdlib.zip against the pinned npm package's: the same members but for some
    # name.py replaced by name.pyc, each an unchecked-hash .pyc for Python 3.12 (PEP 552)
    released = read_runtime(fetch_runtime(cache_dir()))["python_stdlib.zip"]
    with zipfile.ZipFile(io.BytesIO(released)) as z:
        stock = {i.filename: z.read(i) for i in z.infolist() if not i.is_dir()}
    with zipfile.ZipFile(dist / "pyodide" / "python_stdlib.zip") as z:
        ours = {i.filename: z.read(i) for i in z.infolist()}
    compiled = {name for name in ours if name.endswith(".pyc")}
    assert len(compiled) >= 50
    assert {name[:-1] for name in compiled} <= stock.keys()
    assert not {name[:-1] for name in compiled} & ours.keys()  # the source is not shipped beside it
    assert {name: data for name, data in ours.items() if name not in compiled} == {
        name: data for name, data in stock.items() if name + "c" not in compiled
    }
    for name in sorted(compiled):
        header = ours[name][:16]
        assert header[:4] == MAGIC_312, name
        assert int.from_bytes(header[4:8], "little") == 0b01, name
