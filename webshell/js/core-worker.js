// The engine: a module worker running Python (Pyodide, self-hosted under ../pyodide/) with tidewell.
//
// Protocol (only strings cross, so no PyProxy can leak to the page):
//   page -> worker  '{"type":"init","config":{...}}'           once, first
//   page -> worker  '{"id":N,"request":"<request JSON text>"}' one per calculation
//   page -> worker  '{"id":N,"type":"diagnostics"}'            answered without Python (liveness probe)
//   page -> worker  '{"id":N,"type":"environment"}'            how the engine started and what Python sees
//   worker -> page  '{"type":"progress","text":...}' / '{"type":"ready","info":{...}}' /
//                   '{"type":"failed","message":...}' / '{"id":N,"response":<response JSON>}'
// The worker calls only tidewell.bridge.handle(str) -> str. numpy and the other on-demand packages are
// loaded the first time a calculation imports them (then the calculation runs once more).
//
// Two ways to start (the "ready" info and the diagnostics say which, and why):
//   - from the snapshot: Pyodide's memory as the build left it once tidewell was imported and had
//     answered (build.py makes it under node and checks it against the worked cases). Used only when the
//     offline copy holds it and its sha256 is this build's; the random state is reseeded and LANG and
//     the time zone are set to this device's. Any failure, or no start within SNAPSHOT_TIMEOUT_MS,
//     and the worker starts the normal way instead.
//   - normally: loadPyodide, then tidewell imported from its zip on sys.path (no unpacking).
// Either way the zip is written to ZIP_PATH: modules not in the snapshot (those that need numpy) come
// from it.

import { loadPyodide } from "../pyodide/pyodide.mjs";
import {
  VERSION,
  TIDEWELL_WHEEL,
  TIDEWELL_WHEEL_SHA256,
  TIDEWELL_ZIP,
  TIDEWELL_ZIP_SHA256,
  ZIP_PATH,
  SNAPSHOT,
  SNAPSHOT_SHA256,
  LOADABLE,
  BUILD_LABEL,
} from "./build-info.js";

const INDEX_URL = new URL("../pyodide/", import.meta.url).href;
// a start from the snapshot takes well under a second here, a few seconds on a slow phone: past this
// it counts as stalled and the normal start begins (?snapshot-timeout=ms for tests)
const SNAPSHOT_TIMEOUT_MS = 15_000;
const OPTIONS = {
  indexURL: INDEX_URL,
  lockFileURL: new URL("pyodide-lock.json", INDEX_URL).href,
  stdout: () => {}, // the core prints nothing; Pyodide's banner is not news
  stderr: (line) => console.warn(`[engine] ${line}`), // Python warnings, if any, stay visible
};

// Python run once after tidewell is importable (build.py runs this same text before it takes the
// snapshot: keep it a plain template, without substitutions). A last-resort finder records imports
// nobody could satisfy, so the worker can load a shipped package (numpy) and run the calculation again.
const SETUP = `
import importlib, sys
class _TidewellMissing:
    seen = []
    @classmethod
    def find_spec(cls, name, path=None, target=None):
        cls.seen.append(name.partition(".")[0])
        return None
sys.meta_path.append(_TidewellMissing)
def _tidewell_missing():
    names = sorted(set(_TidewellMissing.seen))
    _TidewellMissing.seen.clear()
    return ",".join(names)
import tidewell, tidewell.bridge
_tidewell_handle = tidewell.bridge.handle
tidewell.__version__
`;

// Run after a start from the snapshot: what must not stay as the build machine left it. The random
// state is reseeded from this device; LANG and the time module's zone names and offsets become this
// device's (Python reads them once at start; computed as CPython does without tzname: January and July).
const RESTORED = `
def _tidewell_restored(lang):
    import os, random, time
    os.environ["LANG"] = lang
    random.seed()
    year = time.localtime().tm_year
    jan, jul = (time.localtime(time.mktime((year, m, 1, 12, 0, 0, 0, 0, -1))) for m in (1, 7))
    if -jan.tm_gmtoff < -jul.tm_gmtoff:  # the southern hemisphere: summer time in January
        jan, jul = jul, jan
    time.timezone, time.altzone = -jan.tm_gmtoff, -jul.tm_gmtoff
    time.daylight = int(jan.tm_gmtoff != jul.tm_gmtoff)
    time.tzname = (jan.tm_zone, jul.tm_zone)
_tidewell_restored
`;

// What the engine's Python sees of its surroundings (tests: a start from the snapshot must look like a
// normal start on this device, except for the random state, which must differ between starts).
const ENVIRONMENT = `
def _tidewell_environment():
    import json, os, random, sys, time
    return json.dumps({
        "environ": dict(os.environ), "tzname": list(time.tzname), "timezone": time.timezone,
        "altzone": time.altzone, "daylight": time.daylight, "random": str(random.getrandbits(64)),
        "path": [p for p in sys.path if p], "modules": len(sys.modules),
    })
_tidewell_environment
`;

let pyodide = null;
let startInfo = null; // {start: "snapshot" | "normal", note}
// when the snapshot's bytes were read, checked, and first awaited by loadPyodide (worker clock)
const snapshotReadAt = [0, 0, 0];
let handle = null;
let takeMissing = null;
let engine = null; // Promise of readiness
const loaded = new Set();

const post = (obj) => self.postMessage(JSON.stringify(obj));
const progress = (text) => post({ type: "progress", text });

async function loadPackages(names) {
  const errors = [];
  await pyodide.loadPackage(names, {
    messageCallback: () => {},
    errorCallback: (message) => errors.push(String(message)),
  });
  // loadPackage logs a failed sha256 check instead of throwing: check what really arrived.
  const missing = names.filter((name) => !(name in pyodide.loadedPackages));
  if (errors.length || missing.length) {
    throw new Error(
      `could not load ${names.join(", ")} (${errors.join("; ") || `not loaded: ${missing.join(", ")}`})`,
    );
  }
  names.forEach((name) => loaded.add(name));
}

const hex = (buffer) => Array.from(new Uint8Array(buffer), (b) => b.toString(16).padStart(2, "0")).join("");

// Fetch a file of the build and check its sha256 against the build's. Started before loadPyodide, so
// it runs while the runtime loads (measured in docs/performance.md).
async function fetchChecked(name, sha256) {
  const response = await fetch(new URL(name, INDEX_URL));
  if (!response.ok) throw new Error(`${name}: HTTP ${response.status}`);
  const buffer = await response.arrayBuffer();
  const digest = hex(await crypto.subtle.digest("SHA-256", buffer));
  if (digest !== sha256) {
    throw new Error(
      `${name} failed its integrity check (sha256 ${digest.slice(0, 16)}..., ` +
        `expected ${sha256.slice(0, 16)}...); reload to fetch it again`,
    );
  }
  return buffer;
}

// The snapshot in the offline copy: promises of its bytes and of their sha256 check (rejected when they
// are not this build's), or a reason why there is none. Looking it up is quick; reading 21 MB is not, so
// that runs while loadPyodide loads the runtime (it awaits the bytes only once it needs them). The check
// runs beside the restore rather than before it: WebCrypto copies the bytes when the digest is asked
// for and hashes them off this thread, and start() awaits the check before the engine answers anything
// (docs/performance.md: on a slowed worker thread the check in line cost ~120 ms of the start).
async function storedSnapshot() {
  if (!SNAPSHOT) return { reason: "this build has no snapshot" };
  if (!self.caches) return { reason: "no offline copy here" };
  const stored = await caches.match(new URL(SNAPSHOT, INDEX_URL).href);
  if (!stored) return { reason: "not in the offline copy yet (stored after the first start)" };
  const read = stored.arrayBuffer().then((buffer) => {
    snapshotReadAt[0] = performance.now();
    return buffer;
  });
  // registered first, so the digest has its copy before loadPyodide sees the bytes
  const checked = read.then(async (buffer) => {
    const digest = hex(await crypto.subtle.digest("SHA-256", buffer));
    if (digest !== SNAPSHOT_SHA256) {
      throw new Error(`the stored copy is not this build's (sha256 ${digest.slice(0, 16)}...)`);
    }
    snapshotReadAt[1] = performance.now();
  });
  const bytes = read.then((buffer) => new Uint8Array(buffer));
  checked.catch(() => {}); // reported where start() awaits it
  bytes.catch(() => {}); // reported by loadPyodide, which awaits it
  // loadPyodide awaits this once it needs the bytes (after it has loaded pyodide.asm.js, before it
  // instantiates the WebAssembly): the read is on the start's critical path only when it ends later
  const awaited = {
    then(resolve, reject) {
      snapshotReadAt[2] ||= performance.now();
      return bytes.then(resolve, reject);
    },
  };
  return { bytes: awaited, checked };
}

const lang = () => `${((self.navigator && navigator.languages && navigator.languages[0]) || "C").replace("-", "_")}.UTF-8`;

async function startFromSnapshot(stored, archive) {
  // a failed check ends the wait at once, whatever the restore of damaged bytes would do
  const refused = stored.checked.then(() => new Promise(() => {}));
  const py = await Promise.race([loadPyodide({ ...OPTIONS, _loadSnapshot: stored.bytes }), refused]);
  py.FS.writeFile(ZIP_PATH, new Uint8Array(await archive));
  if (py.globals.get("_tidewell_label") !== BUILD_LABEL) {
    throw new Error("it was made for another build");
  }
  // the C library's zone (offset, summer time, names) as the runtime sets it at its own start, now from
  // this device's clock; the snapshot holds the build machine's
  const m = py._module;
  const names = m.HEAPU32.subarray(m._tzname >>> 2, (m._tzname >>> 2) + 2);
  m.__tzset_js(m._timezone, m._daylight, names[0], names[1]);
  py.runPython(RESTORED)(lang());
  await stored.checked; // nothing is answered from bytes that are not this build's
  return py;
}

function withTimeout(promise, ms, what) {
  let timer;
  const timeout = new Promise((_, reject) => {
    timer = setTimeout(() => reject(new Error(`${what} did not finish within ${ms} ms`)), ms);
  });
  return Promise.race([promise, timeout]).finally(() => clearTimeout(timer));
}

// Unpack the checked wheel into site-packages.
async function unpackTidewell(wheel) {
  const buffer = await wheel;
  const site = pyodide.runPython("import site; site.getsitepackages()[0]");
  pyodide.unpackArchive(buffer, "wheel", { extractDir: site });
  // Only site-packages' finder needs to see the new files. importlib.invalidate_caches() would do it
  // too, but it imports importlib.metadata on the way: ~0.4 s of the start-up, measured.
  pyodide.runPython(
    `import sys\nfinder = sys.path_importer_cache.get(${JSON.stringify(site)})\n` +
      "if finder is not None:\n    finder.invalidate_caches()\ndel finder",
  );

}

// Four measured routes (docs/hosting.md, docs/performance.md): "zip" (the default, fastest: the archive
// on sys.path), "unpack" (the wheel into site-packages), "loadPackage" through the trimmed lock file,
// "micropip" from the local wheel.
async function installTidewell(method, wheel) {
  if (method === "zip") {
    pyodide.FS.writeFile(ZIP_PATH, new Uint8Array(await wheel));
    pyodide.runPython(`import sys\nsys.path.insert(0, ${JSON.stringify(ZIP_PATH)})`);
  } else if (method === "unpack") {
    await unpackTidewell(wheel);
  } else if (method === "micropip") {
    await loadPackages(["micropip"]);
    const micropip = pyodide.pyimport("micropip");
    try {
      await micropip.install(new URL(TIDEWELL_WHEEL, INDEX_URL).href);
    } finally {
      micropip.destroy();
    }
  } else {
    await loadPackages(["tidewell"]);
  }
}

async function start(config) {
  const t0 = performance.now();
  let method = ["micropip", "loadPackage", "unpack"].includes(config.install) ? config.install : "zip";
  if (!(self.crypto && crypto.subtle) && ["zip", "unpack"].includes(method)) method = "loadPackage"; // not a secure context
  const archive =
    method === "zip"
      ? fetchChecked(TIDEWELL_ZIP, TIDEWELL_ZIP_SHA256)
      : method === "unpack"
        ? fetchChecked(TIDEWELL_WHEEL, TIDEWELL_WHEEL_SHA256)
        : null;
  archive?.catch(() => {}); // a failure is reported where the archive is awaited, not as unhandled
  startInfo = { start: "normal", note: "" };
  let snapshotMs = 0;
  if (method === "zip" && config.snapshot !== false) {
    try {
      const stored = await storedSnapshot();
      if (stored.bytes) {
        // the page's watchdog knows: if this wedges the worker, the next attempt starts the normal way
        post({ type: "progress", text: "Starting from the copy on this device", snapshot: true });
        const timeout = Number(config.snapshotTimeout) > 0 ? Number(config.snapshotTimeout) : SNAPSHOT_TIMEOUT_MS;
        pyodide = await withTimeout(startFromSnapshot(stored, archive), timeout, "the start from it");
        startInfo = { start: "snapshot", note: "" };
      } else {
        startInfo.note = `snapshot not used: ${stored.reason}`;
      }
    } catch (err) {
      pyodide = null;
      startInfo.note = `snapshot not used: ${String((err && err.message) || err).split("\n")[0]}`;
    }
    snapshotMs = performance.now() - t0;
  } else if (method === "zip") {
    startInfo.note = "snapshot not used: turned off for this start";
  } else {
    startInfo.note = `snapshot not used: install route ${method}`;
  }
  if (startInfo.start === "snapshot") {
    const t1 = performance.now();
    handle = pyodide.globals.get("_tidewell_handle");
    takeMissing = pyodide.globals.get("_tidewell_missing");
    takeMissing();
    const engineVersion = pyodide.runPython("import tidewell; tidewell.__version__");
    if (engineVersion !== VERSION) {
      throw new Error(`the engine is tidewell ${engineVersion} but this page is ${VERSION}`);
    }
    return readyInfo(engineVersion, method, t0, {
      snapshot_read: Math.round(snapshotReadAt[0] - t0), // its bytes read from the offline copy
      snapshot_checked: Math.round(snapshotReadAt[1] - t0), // and their sha256 checked (both from t0)
      snapshot_awaited: Math.round(snapshotReadAt[2] - t0), // when loadPyodide first needed the bytes
      runtime: Math.round(t1 - t0),
      install: 0,
      import: Math.round(performance.now() - t1),
    });
  }
  progress("Loading the calculator");
  const tr = performance.now();
  pyodide = await loadPyodide(OPTIONS);
  const t1 = performance.now();
  progress("Preparing the calculations");
  await installTidewell(method, archive);
  const t2 = performance.now();
  let pyVersion;
  try {
    pyVersion = pyodide.runPython(SETUP);
  } catch (err) {
    throw new Error(`tidewell did not import: ${String(err.message || err).split("\n").slice(-2).join(" ")}`);
  }
  if (pyVersion !== VERSION) {
    throw new Error(`the engine is tidewell ${pyVersion} but this page is ${VERSION}`);
  }
  handle = pyodide.globals.get("_tidewell_handle");
  takeMissing = pyodide.globals.get("_tidewell_missing");
  takeMissing(); // forget lookups made while importing tidewell itself
  const t3 = performance.now();
  return readyInfo(pyVersion, method, t0, {
    snapshot_tried: Math.round(snapshotMs),
    runtime: Math.round(t1 - tr),
    install: Math.round(t2 - t1),
    import: Math.round(t3 - t2),
  });
}

function readyInfo(engineVersion, method, t0, timings) {
  return {
    engine: engineVersion,
    // which build the worker's own files came from: the page compares it with its own (never a mixed state)
    label: BUILD_LABEL,
    wheel_sha256: TIDEWELL_WHEEL_SHA256,
    pyodide: pyodide.version,
    python: pyodide.runPython("import sys; sys.version.split()[0]"),
    install: method,
    // "snapshot" or "normal", and why the snapshot was not used
    start: startInfo.start,
    start_note: startInfo.note,
    // the worker's clock starts when the page creates it: the benchmark places it on the page's clock
    time_origin: performance.timeOrigin,
    timings_ms: {
      before_start: Math.round(t0), // loading this module and its imports, and the init message
      ...timings,
      total: Math.round(performance.now() - t0),
    },
  };
}

async function answer(id, requestText) {
  await engine;
  // No list of "numpy calculations" to keep in step with the core: a calculation that imports a
  // shipped package that is not loaded yet fails at once; load the package and run it once more.
  let text = handle(requestText);
  const wanted = takeMissing()
    .split(",")
    .filter((name) => name in LOADABLE && !loaded.has(LOADABLE[name]))
    .map((name) => LOADABLE[name]);
  if (wanted.length) {
    await loadPackages(wanted);
    pyodide.runPython("import importlib; importlib.invalidate_caches()");
    text = handle(requestText);
    takeMissing();
  }
  // text is the bridge's JSON; splice it in rather than parse and re-encode it
  self.postMessage(`{"id":${id},"response":${text}}`);
}

function diagnostics(id) {
  const resources = performance.getEntriesByType("resource").map((e) => ({
    name: e.name,
    start_ms: Math.round(e.startTime),
    duration_ms: Math.round(e.duration),
  }));
  const packages = pyodide ? Object.keys(pyodide.loadedPackages).sort() : [];
  self.postMessage(JSON.stringify({ id, diagnostics: { resources, packages, start: startInfo } }));
}

async function environment(id) {
  await engine;
  const text = pyodide.runPython(ENVIRONMENT)();
  self.postMessage(`{"id":${id},"diagnostics":{"start":${JSON.stringify(startInfo)},"python":${text}}}`);
}

self.onmessage = (event) => {
  let message;
  try {
    message = JSON.parse(event.data);
  } catch {
    return; // not ours: only JSON strings are part of the protocol
  }
  if (message.type === "init") {
    engine = start(message.config || {});
    engine.then(
      (info) => post({ type: "ready", info }),
      (err) => post({ type: "failed", message: String((err && err.message) || err) }),
    );
  } else if (message.type === "diagnostics") {
    diagnostics(message.id);
  } else if (message.type === "environment") {
    environment(message.id).catch((err) => post({ id: message.id, error: String((err && err.message) || err) }));
  } else if (Number.isInteger(message.id) && typeof message.request === "string") {
    answer(message.id, message.request).catch((err) =>
      post({ id: message.id, error: String((err && err.message) || err) }),
    );
  }
};
