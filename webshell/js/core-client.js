// The page's side of the engine: owns the worker, matches answers to requests by id, runs the start-up
// watchdog, supervises the running engine, and defines window.tidewell = { ready, compute(request),
// version } (docs/bridge.md). No DOM here: the page listens to the "state" events (main.js).
//
// Performance marks: tidewell:shell-ready (markShellReady(), called by main.js once the form works),
// tidewell:engine-ready (the worker can answer), tidewell:first-result (the first successful answer).
//
// Faults of a running engine. Once the engine has been ready, each of these counts as a fault:
//   - a crash: the worker reports an uncaught error (its "error" event);
//   - a hang or a dead worker: a request has no answer within its deadline (30 s, ?request-timeout=ms)
//     and a liveness probe (the worker's "diagnostics" message, answered without Python) gets no answer
//     within 5 s either. A worker that was terminated answers nothing: postMessage to it fails silently;
//   - a dead worker while nobody asks anything: two idle heartbeat probes in a row (every 15 s while the
//     page is visible, ?heartbeat=ms, 0 turns it off) get no answer.
// A request whose probe is answered is slow, not stuck (the first numpy download and import run
// asynchronously): it gets more time, up to 4 deadlines, then it counts as a hang too.
// On a fault the client terminates the worker, rejects every pending request with an EngineError that
// says so, and starts a new engine at once. At most 3 automatic restarts (?max-restarts=n) within
// 5 minutes; one more fault and the state is "failed", with Retry.
// Requests made while the new engine starts are not refused: as at the first start they are posted to
// the new worker, which answers once Python is up, and their deadline runs from the moment it is ready
// (the start-up has its own watchdog). Only in the "failed" state is a request refused at once.

import { VERSION, PYODIDE_VERSION, BUILD_LABEL, TIDEWELL_WHEEL_SHA256 } from "./build-info.js";

// loadPyodide never settles when the wasm cannot be instantiated (wrong MIME type, a CSP without
// 'wasm-unsafe-eval'), so start-up runs under a watchdog. Served from the service worker everything is
// local and 30 s is ample; a first visit also downloads about 17 MB, so it gets longer.
const TIMEOUT_LOCAL_MS = 30_000;
const TIMEOUT_FIRST_VISIT_MS = 120_000;
const REQUEST_TIMEOUT_MS = 30_000; // no calculation of the core takes a second; 30 s is a hang
const SLOW_FACTOR = 4; // a request that keeps the engine answering probes gets up to 4 deadlines
const PROBE_TIMEOUT_MS = 5_000;
const HEARTBEAT_MS = 15_000;
const MAX_RESTARTS = 3;
const RESTART_WINDOW_MS = 5 * 60_000;

function configured(name, fallback, { zero = false } = {}) {
  // ?name=value in the address (tests, benchmarks), or data-name on <html>
  const query = new URLSearchParams(self.location.search).get(name);
  const attr = document.documentElement.dataset[name.replace(/-(\w)/g, (_, c) => c.toUpperCase())];
  const value = Number(query ?? attr);
  if ((query ?? attr) !== undefined && Number.isFinite(value) && (value > 0 || (zero && value === 0))) return value;
  return fallback;
}

function configuredTimeout() {
  const local = navigator.serviceWorker && navigator.serviceWorker.controller;
  return configured("engine-timeout", local ? TIMEOUT_LOCAL_MS : TIMEOUT_FIRST_VISIT_MS);
}

function configuredInstall() {
  // for the benchmark: ?install=unpack, micropip or loadPackage measures the other install routes
  const query = new URLSearchParams(self.location.search).get("install");
  return ["unpack", "micropip", "loadPackage"].includes(query) ? query : "zip";
}

// The engine starts from its snapshot when the offline copy holds it (core-worker.js); ?snapshot=off
// (benchmark, tests) starts it the normal way.
const snapshotWanted = () => new URLSearchParams(self.location.search).get("snapshot") !== "off";

// Once an engine is ready without the snapshot, the service worker stores the files kept out of the
// install (the snapshot among them) for the next start; a first visit never waits for them.
function storeLater() {
  if (!navigator.serviceWorker) return;
  navigator.serviceWorker.ready
    .then((registration) => registration.active && registration.active.postMessage("tidewell:store-later"))
    .catch(() => {});
}

const seconds = (ms) => `${Math.round(ms / 100) / 10} s`;

class EngineError extends Error {
  constructor(message) {
    super(message);
    this.name = "EngineError";
  }
}

class Engine extends EventTarget {
  constructor() {
    super();
    this.state = "loading"; // loading | ready | failed
    this.info = null;
    this.failure = "";
    this.progress = "";
    this.nextId = 1;
    this.pending = new Map(); // id -> {resolve, reject, probe, timer, started}
    this.worker = null;
    this.watchdog = 0;
    this.heartbeat = 0;
    this.firstResult = false;
    this.everReady = false;
    this.attempt = 0;
    this.restarts = 0; // automatic restarts after a fault, for the status line and tests
    this.restarting = false;
    this.begun = false;
    this.snapshotOff = !snapshotWanted(); // after a start with the snapshot stalled: normal starts only
    this.lastFault = "";
    this.faultTimes = [];
    this.requestTimeout = configured("request-timeout", REQUEST_TIMEOUT_MS);
    this.probeTimeout = Math.min(PROBE_TIMEOUT_MS, this.requestTimeout);
    this.heartbeatMs = configured("heartbeat", HEARTBEAT_MS, { zero: true });
    this.maxRestarts = configured("max-restarts", MAX_RESTARTS, { zero: true });
    this.ready = new Promise((resolve) => {
      this.resolveReady = resolve;
    });
    document.addEventListener("visibilitychange", () => {
      if (!document.hidden) this.scheduleHeartbeat(0); // back to the page: check at once
    });
  }

  start(text = "Starting the engine") {
    this.stop();
    this.setState("loading", text);
    // each Retry waits twice as long as the attempt before (a slow network deserves more time)
    const timeout = configuredTimeout() * 2 ** this.attempt++;
    const worker = new Worker(new URL("./core-worker.js", import.meta.url), { type: "module" });
    this.worker = worker;
    worker.onmessage = (event) => this.receive(worker, event.data);
    worker.onerror = (event) => {
      event.preventDefault();
      if (worker !== this.worker) return;
      const what = event.message || "the worker script failed to load";
      if (this.state === "ready") this.fault(`the engine crashed (${what})`);
      else this.fail(`The engine could not start (${what}).`);
    };
    worker.onmessageerror = () => {
      if (worker !== this.worker) return;
      if (this.state === "ready") this.fault("the engine sent a message the page could not read");
      else this.fail("The engine sent a message the page could not read.");
    };
    const snapshot = !this.snapshotOff;
    this.snapshotInUse = false; // set when the worker says it is starting from the snapshot
    this.watchdog = setTimeout(() => {
      if (this.snapshotInUse && !this.snapshotOff) {
        // the worker's own fallback did not come through (a start from the snapshot wedged the worker):
        // once more, the normal way, with the same time
        this.snapshotOff = true;
        this.attempt -= 1;
        this.start(text);
        return;
      }
      this.fail(
        `The engine did not start within ${Math.round(timeout / 1000)} s. The Python runtime may have ` +
          "failed to load (a slow or broken connection, or a server sending the wrong type for .wasm files).",
      );
    }, timeout);
    const config = {
      install: configuredInstall(),
      snapshot,
      snapshotTimeout: configured("snapshot-timeout", 0),
    };
    worker.postMessage(JSON.stringify({ type: "init", config }));
  }

  terminate() {
    clearTimeout(this.watchdog);
    clearTimeout(this.heartbeat);
    if (this.worker) {
      this.worker.onmessage = this.worker.onerror = this.worker.onmessageerror = null;
      this.worker.terminate();
      this.worker = null;
    }
  }

  stop() {
    this.terminate();
    this.rejectPending("The engine stopped before it answered.");
  }

  // the first start, once (later starts are restarts and retries)
  begin() {
    if (!this.begun) {
      this.begun = true;
      this.start();
    }
  }

  retry() {
    if (this.state === "ready") return;
    this.faultTimes = []; // the user asked: the automatic restarts start counting again
    this.start();
  }

  rejectPending(message) {
    const pending = [...this.pending.values()];
    this.pending.clear();
    for (const entry of pending) {
      clearTimeout(entry.timer);
      entry.reject(new EngineError(message));
    }
  }

  setState(state, text = "") {
    this.state = state;
    if (state === "failed") this.failure = text;
    else this.progress = text;
    this.dispatchEvent(new CustomEvent("state", { detail: { state, text, info: this.info } }));
  }

  fail(message) {
    if (this.state === "failed") return;
    this.terminate();
    this.state = "failed";
    this.restarting = false;
    this.rejectPending(`The engine is not available: ${message}`);
    this.setState("failed", message);
  }

  // A running engine crashed, hung or died: reject what it owed, then start a new one (bounded).
  fault(reason) {
    if (this.state !== "ready") return;
    const now = performance.now();
    this.faultTimes = this.faultTimes.filter((t) => now - t < RESTART_WINDOW_MS);
    this.faultTimes.push(now);
    this.lastFault = reason;
    this.terminate();
    if (this.faultTimes.length > this.maxRestarts) {
      const minutes = Math.round(RESTART_WINDOW_MS / 60_000);
      this.fail(
        `${reason[0].toUpperCase()}${reason.slice(1)}. It stopped ${this.faultTimes.length} times within ` +
          `${minutes} minutes, so it was not restarted again.`,
      );
      return;
    }
    this.rejectPending(`The engine stopped before it answered: ${reason}. It is being restarted.`);
    this.restarts += 1;
    this.restarting = true;
    this.start(`Restarting the engine: ${reason}`);
  }

  // Does the worker still answer? Its "diagnostics" message is answered without running Python.
  probe() {
    if (this.probing) return this.probing;
    const worker = this.worker;
    if (!worker) return Promise.resolve(false);
    const id = this.nextId++;
    const probing = new Promise((resolve) => {
      const timer = setTimeout(() => {
        this.pending.delete(id);
        resolve(false);
      }, this.probeTimeout);
      const settle = (alive) => () => {
        clearTimeout(timer);
        resolve(alive);
      };
      this.pending.set(id, { probe: true, resolve: settle(true), reject: settle(false) });
      worker.postMessage(JSON.stringify({ id, type: "diagnostics" }));
    });
    this.probing = probing;
    probing.then(() => {
      if (this.probing === probing) this.probing = null;
    });
    return probing;
  }

  // the deadline of one request, from the moment the engine is ready
  arm(id) {
    const entry = this.pending.get(id);
    if (!entry || entry.probe || entry.timer || this.state !== "ready") return;
    entry.started = performance.now();
    entry.timer = setTimeout(() => this.overdue(id), this.requestTimeout);
  }

  async overdue(id) {
    const entry = this.pending.get(id);
    const worker = this.worker;
    if (!entry || this.state !== "ready") return;
    const alive = await this.probe();
    if (worker !== this.worker || this.pending.get(id) !== entry || this.state !== "ready") return;
    const waited = performance.now() - entry.started;
    const limit = this.requestTimeout * SLOW_FACTOR;
    if (alive && waited < limit) {
      entry.timer = setTimeout(() => this.overdue(id), Math.min(this.requestTimeout, limit - waited));
      return;
    }
    this.fault(
      alive
        ? `a calculation took longer than ${seconds(limit)}`
        : `the engine stopped answering (no answer within ${seconds(waited)})`,
    );
  }

  scheduleHeartbeat(delay = this.heartbeatMs) {
    clearTimeout(this.heartbeat);
    if (this.state !== "ready" || !this.heartbeatMs) return;
    this.heartbeat = setTimeout(async () => {
      const worker = this.worker;
      const requests = [...this.pending.values()].some((entry) => !entry.probe);
      // pending requests have their own deadline; a hidden page spends no battery on checks
      if (this.state !== "ready" || document.hidden || requests) {
        this.scheduleHeartbeat();
        return;
      }
      // two unanswered checks in a row, so that a moment of a busy phone is not taken for a death
      const alive = (await this.probe()) || (worker === this.worker && (await this.probe()));
      if (worker !== this.worker || this.state !== "ready") return;
      if (alive) this.scheduleHeartbeat();
      else this.fault(`the engine stopped (it did not answer two checks of ${seconds(this.probeTimeout)})`);
    }, delay);
  }

  receive(worker, data) {
    if (worker !== this.worker || typeof data !== "string") return;
    let message;
    try {
      message = JSON.parse(data);
    } catch {
      if (this.state === "ready") this.fault("the engine sent a message the page could not read");
      else this.fail("The engine sent a message the page could not read.");
      return;
    }
    if (message.type === "progress") {
      if (message.snapshot) this.snapshotInUse = true;
      if (this.state === "loading") this.setState("loading", message.text);
    } else if (message.type === "ready") {
      clearTimeout(this.watchdog);
      // The worker's files must be this page's build. After an update accepted in another tab the service
      // worker serves the new build, and a restarted engine would be new under an old page: refuse it.
      const info = message.info || {};
      if (info.label !== BUILD_LABEL || info.wheel_sha256 !== TIDEWELL_WHEEL_SHA256) {
        this.fail(
          "Tidewell was updated in another tab or window. Reload this page to use the new version; " +
            "what you typed stays in the form until then.",
        );
        return;
      }
      this.info = message.info;
      if (info.start !== "snapshot" && !this.snapshotOff) storeLater();
      if (!this.everReady) performance.mark("tidewell:engine-ready");
      this.everReady = true;
      this.attempt = 0;
      const restarted = this.restarting;
      this.restarting = false;
      this.state = "ready";
      for (const id of this.pending.keys()) this.arm(id);
      this.scheduleHeartbeat();
      this.setState("ready", restarted ? "Engine ready again" : "Engine ready");
      this.resolveReady(true);
    } else if (message.type === "failed") {
      this.fail(`The engine could not start: ${message.message}`);
    } else if (Number.isInteger(message.id) && this.pending.has(message.id)) {
      const { resolve, reject, timer } = this.pending.get(message.id);
      clearTimeout(timer);
      this.pending.delete(message.id);
      if ("response" in message) {
        if (!this.firstResult && message.response && message.response.ok) {
          this.firstResult = true;
          performance.mark("tidewell:first-result");
        }
        resolve(message.response);
      } else if ("diagnostics" in message) {
        resolve(message.diagnostics);
      } else {
        reject(new EngineError(`The engine could not answer: ${message.error}`));
      }
    }
  }

  send(envelope) {
    this.begin();
    if (this.state === "failed" || !this.worker) {
      return Promise.reject(new EngineError(`The engine is not available: ${this.failure || "not started"}`));
    }
    const id = this.nextId++;
    return new Promise((resolve, reject) => {
      this.pending.set(id, { resolve, reject });
      this.worker.postMessage(JSON.stringify({ id, ...envelope }));
      this.arm(id); // while the engine starts, the deadline waits for it to be ready
    });
  }

  compute(request) {
    let text;
    try {
      text = JSON.stringify(request);
    } catch (err) {
      return Promise.reject(new TypeError(`compute(request): the request is not JSON (${err.message})`));
    }
    if (typeof text !== "string") {
      return Promise.reject(new TypeError("compute(request): the request must be an object"));
    }
    // Sent at once even while loading (or restarting): the worker answers as soon as Python is up.
    return this.send({ request: text });
  }

  diagnostics() {
    return this.send({ type: "diagnostics" });
  }

  // how the engine started ("snapshot" or "normal", and why) and what its Python sees (tests, About)
  environment() {
    return this.send({ type: "environment" });
  }
}

export const engine = new Engine();

export function markShellReady() {
  if (performance.getEntriesByName("tidewell:shell-ready", "mark").length === 0) {
    performance.mark("tidewell:shell-ready");
  }
  engine.begin();
}

window.tidewell = Object.freeze({
  ready: engine.ready,
  compute: (request) => engine.compute(request),
  version: VERSION,
  // beyond the contract: for the About panel, tests and benchmarks
  pyodideVersion: PYODIDE_VERSION,
  label: BUILD_LABEL,
  engine,
});

// The engine starts once the shell works (main.js calls markShellReady()), so that building the screens
// does not share the CPU with Python's start: started from the first script instead, the shell was ready
// later (docs/performance.md). A page that never calls it starts the engine when the document has loaded,
// and a request made before then starts it at once.
if (document.readyState === "complete") engine.begin();
else window.addEventListener("load", () => engine.begin(), { once: true });
