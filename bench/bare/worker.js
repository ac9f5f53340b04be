// Bare Pyodide in a module worker: load the runtime as released (./pyodide/, copied there by
// bench/startup.py) with the app's engine's options, run 1+1, post the answer and how long loadPyodide took.

import { loadPyodide } from "./pyodide/pyodide.mjs";

const INDEX_URL = new URL("./pyodide/", import.meta.url).href;
const t0 = performance.now();
const pyodide = await loadPyodide({
  indexURL: INDEX_URL,
  lockFileURL: new URL("pyodide-lock.json", INDEX_URL).href,
  stdout: () => {},
  stderr: (line) => console.warn(`[bare] ${line}`),
});
const t1 = performance.now();
const result = pyodide.runPython("1+1");
self.postMessage(
  JSON.stringify({
    type: "ready",
    result,
    info: {
      time_origin: performance.timeOrigin,
      timings_ms: {
        before_start: Math.round(t0),
        runtime: Math.round(t1 - t0),
        total: Math.round(performance.now() - t0),
      },
    },
  }),
);
