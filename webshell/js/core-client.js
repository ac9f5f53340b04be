// The page's side of the engine: owns the worker, matches answers to requests by id, runs the start-up
// watchdog, and defines window.tidewell = { ready, compute(request), version } (CONTRACT.md).
// No DOM here: the page listens to the "state" events (main.js).
//
// Performance marks: tidewell:shell-ready (markShellReady(), called by main.js once the form works),
// tidewell:engine-ready (the worker can answer), tidewell:first-result (the first successful answer).

import { VERSION, PYODIDE_VERSION, BUILD_LABEL } from "./build-info.js";

// loadPyodide never settles when the wasm cannot be instantiated (wrong MIME type, a CSP without
// 'wasm-unsafe-eval'), so start-up runs under a watchdog. Served from the service worker everything is
// local and 30 s is ample; a first visit also downloads about 17 MB, so it gets longer.
const TIMEOUT_LOCAL_MS = 30_000;
const TIMEOUT_FIRST_VISIT_MS = 120_000;

function configuredTimeout() {
  const query = new URLSearchParams(self.location.search).get("engine-timeout");
  const attr = document.documentElement.dataset.engineTimeout;
  const value = Number(query ?? attr);
  if (Number.isFinite(value) && value > 0) return value;
  return navigator.serviceWorker && navigator.serviceWorker.controller ? TIMEOUT_LOCAL_MS : TIMEOUT_FIRST_VISIT_MS;
}

function configuredInstall() {
  // for the benchmark: ?install=micropip or ?install=loadPackage measures the other install routes
  const query = new URLSearchParams(self.location.search).get("install");
  return ["micropip", "loadPackage"].includes(query) ? query : "unpack";
}

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
    this.pending = new Map(); // id -> {resolve, reject}
    this.worker = null;
    this.watchdog = 0;
    this.firstResult = false;
    this.attempt = 0;
    this.ready = new Promise((resolve) => {
      this.resolveReady = resolve;
    });
  }

  start() {
    this.stop();
    this.setState("loading", "Starting the engine");
    // each Retry waits twice as long as the attempt before (a slow network deserves more time)
    const timeout = configuredTimeout() * 2 ** this.attempt++;
    const worker = new Worker(new URL("./core-worker.js", import.meta.url), { type: "module" });
    this.worker = worker;
    worker.onmessage = (event) => this.receive(worker, event.data);
    worker.onerror = (event) => {
      event.preventDefault();
      this.fail(`The engine could not start (${event.message || "the worker script failed to load"}).`);
    };
    worker.onmessageerror = () => this.fail("The engine sent a message the page could not read.");
    this.watchdog = setTimeout(() => {
      this.fail(
        `The engine did not start within ${Math.round(timeout / 1000)} s. The Python runtime may have ` +
          "failed to load (a slow or broken connection, or a server sending the wrong type for .wasm files).",
      );
    }, timeout);
    worker.postMessage(JSON.stringify({ type: "init", config: { install: configuredInstall() } }));
  }

  stop() {
    clearTimeout(this.watchdog);
    if (this.worker) {
      this.worker.terminate();
      this.worker = null;
    }
    this.rejectPending("The engine stopped before it answered.");
  }

  retry() {
    if (this.state !== "ready") this.start();
  }

  rejectPending(message) {
    const pending = [...this.pending.values()];
    this.pending.clear();
    pending.forEach(({ reject }) => reject(new EngineError(message)));
  }

  setState(state, text = "") {
    this.state = state;
    if (state === "failed") this.failure = text;
    else this.progress = text;
    this.dispatchEvent(new CustomEvent("state", { detail: { state, text, info: this.info } }));
  }

  fail(message) {
    if (this.state === "failed") return;
    clearTimeout(this.watchdog);
    if (this.worker) {
      this.worker.terminate();
      this.worker = null;
    }
    this.state = "failed";
    this.rejectPending(`The engine is not available: ${message}`);
    this.setState("failed", message);
  }

  receive(worker, data) {
    if (worker !== this.worker || typeof data !== "string") return;
    let message;
    try {
      message = JSON.parse(data);
    } catch {
      this.fail("The engine sent a message the page could not read.");
      return;
    }
    if (message.type === "progress") {
      if (this.state === "loading") this.setState("loading", message.text);
    } else if (message.type === "ready") {
      clearTimeout(this.watchdog);
      this.info = message.info;
      performance.mark("tidewell:engine-ready");
      this.setState("ready", "Engine ready");
      this.resolveReady(true);
    } else if (message.type === "failed") {
      this.fail(`The engine could not start: ${message.message}`);
    } else if (Number.isInteger(message.id) && this.pending.has(message.id)) {
      const { resolve, reject } = this.pending.get(message.id);
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
    if (this.state === "failed" || !this.worker) {
      return Promise.reject(new EngineError(`The engine is not available: ${this.failure || "not started"}`));
    }
    const id = this.nextId++;
    return new Promise((resolve, reject) => {
      this.pending.set(id, { resolve, reject });
      this.worker.postMessage(JSON.stringify({ id, ...envelope }));
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
    // Sent at once even while loading: the worker answers as soon as Python is up.
    return this.send({ request: text });
  }

  diagnostics() {
    return this.send({ type: "diagnostics" });
  }
}

export const engine = new Engine();

export function markShellReady() {
  if (performance.getEntriesByName("tidewell:shell-ready", "mark").length === 0) {
    performance.mark("tidewell:shell-ready");
  }
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

engine.start();
