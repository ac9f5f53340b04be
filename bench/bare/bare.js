// The baseline page of bench/startup.py: start a module worker that loads Pyodide as released
// (./pyodide/) and runs 1+1; mark bare:engine-ready when the answer comes back. Registers a
// service worker of the same shape as the app's (precache, cache first), so warm and offline visits
// are served from the Cache API exactly as the app's are.

const state = document.querySelector("#state");
const worker = new Worker(new URL("./worker.js", import.meta.url), { type: "module" });
window.bare = {
  ready: new Promise((resolve, reject) => {
    worker.onmessage = (event) => {
      const message = JSON.parse(event.data);
      if (message.type === "ready" && message.result === 2) {
        performance.mark("bare:engine-ready");
        state.textContent = state.dataset.state = "ready";
        resolve(message.info);
      } else {
        state.textContent = state.dataset.state = "failed";
        reject(new Error(event.data));
      }
    };
    worker.onerror = (event) => reject(new Error(event.message || "worker failed"));
  }),
};
if ("serviceWorker" in navigator) navigator.serviceWorker.register("./sw.js", { scope: "./" });
