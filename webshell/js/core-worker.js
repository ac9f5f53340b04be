// The engine: a module worker running Python (Pyodide, self-hosted under ../pyodide/) with tidewell.
//
// Protocol (only strings cross, so no PyProxy can leak to the page):
//   page -> worker  '{"type":"init","config":{...}}'           once, first
//   page -> worker  '{"id":N,"request":"<request JSON text>"}' one per calculation
//   worker -> page  '{"type":"progress","text":...}' / '{"type":"ready","info":{...}}' /
//                   '{"type":"failed","message":...}' / '{"id":N,"response":<response JSON>}'
// The worker calls only tidewell.bridge.handle(str) -> str. numpy and the other on-demand packages are
// loaded the first time a calculation imports them (then the calculation runs once more).

import { loadPyodide } from "../pyodide/pyodide.mjs";
import { VERSION, TIDEWELL_WHEEL, TIDEWELL_WHEEL_SHA256, LOADABLE, BUILD_LABEL } from "./build-info.js";

const INDEX_URL = new URL("../pyodide/", import.meta.url).href;

// Python run once after tidewell is installed. A last-resort finder records imports nobody could
// satisfy, so the worker can load a shipped package (numpy) and run the calculation again.
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

let pyodide = null;
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

// Fetch the wheel and check its sha256 against the build's. Started before loadPyodide, so it runs
// while the runtime loads (measured in docs/performance.md).
async function fetchTidewell() {
  const response = await fetch(new URL(TIDEWELL_WHEEL, INDEX_URL));
  if (!response.ok) throw new Error(`${TIDEWELL_WHEEL}: HTTP ${response.status}`);
  const buffer = await response.arrayBuffer();
  const digest = hex(await crypto.subtle.digest("SHA-256", buffer));
  if (digest !== TIDEWELL_WHEEL_SHA256) {
    throw new Error(
      `${TIDEWELL_WHEEL} failed its integrity check (sha256 ${digest.slice(0, 16)}..., ` +
        `expected ${TIDEWELL_WHEEL_SHA256.slice(0, 16)}...); reload to fetch it again`,
    );
  }
  return buffer;
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

// Three measured routes (docs/hosting.md): "unpack" (the default, fastest), "loadPackage" through the
// trimmed lock file, "micropip" from the local wheel.
async function installTidewell(method, wheel) {
  if (method === "unpack") {
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
  let method = ["micropip", "loadPackage"].includes(config.install) ? config.install : "unpack";
  if (method === "unpack" && !(self.crypto && crypto.subtle)) method = "loadPackage"; // not a secure context
  const wheel = method === "unpack" ? fetchTidewell() : null;
  wheel?.catch(() => {}); // a failure is reported where the wheel is awaited, not as unhandled
  progress("Loading the Python runtime");
  pyodide = await loadPyodide({
    indexURL: INDEX_URL,
    lockFileURL: new URL("pyodide-lock.json", INDEX_URL).href,
    stdout: () => {}, // the core prints nothing; Pyodide's banner is not news
    stderr: (line) => console.warn(`[engine] ${line}`), // Python warnings, if any, stay visible
  });
  const t1 = performance.now();
  progress("Installing tidewell");
  await installTidewell(method, wheel);
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
  return {
    engine: pyVersion,
    // which build the worker's own files came from: the page compares it with its own (never a mixed state)
    label: BUILD_LABEL,
    wheel_sha256: TIDEWELL_WHEEL_SHA256,
    pyodide: pyodide.version,
    python: pyodide.runPython("import sys; sys.version.split()[0]"),
    install: method,
    // the worker's clock starts when the page creates it: the benchmark places it on the page's clock
    time_origin: performance.timeOrigin,
    timings_ms: {
      before_start: Math.round(t0), // loading this module and its imports, and the init message
      runtime: Math.round(t1 - t0),
      install: Math.round(t2 - t1),
      import: Math.round(t3 - t2),
      total: Math.round(t3 - t0),
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
  self.postMessage(JSON.stringify({ id, diagnostics: { resources, packages } }));
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
  } else if (Number.isInteger(message.id) && typeof message.request === "string") {
    answer(message.id, message.request).catch((err) =>
      post({ id: message.id, error: String((err && err.message) || err) }),
    );
  }
};
