// The baseline's service worker: the same shape as the app's (webshell/sw.js): precache on install,
// awaited; activate takes control; fetch answers cache first, navigations get ./index.html. It stores
// only what bare Pyodide needs: this page and the runtime as released.

const CACHE = "bare-pyodide";
const PRECACHE = [
  "./",
  "./index.html",
  "./bare.js",
  "./worker.js",
  "../icons/icon-192.png",
  "./pyodide/pyodide.mjs",
  "./pyodide/pyodide.asm.js",
  "./pyodide/pyodide.asm.wasm",
  "./pyodide/python_stdlib.zip",
  "./pyodide/pyodide-lock.json",
];

self.addEventListener("install", (event) => {
  event.waitUntil(caches.open(CACHE).then((cache) => cache.addAll(PRECACHE)));
});

self.addEventListener("activate", (event) => {
  event.waitUntil(self.clients.claim());
});

self.addEventListener("fetch", (event) => {
  const request = event.request;
  if (request.method !== "GET" || new URL(request.url).origin !== self.location.origin) return;
  event.respondWith(
    (async () => {
      const cache = await caches.open(CACHE);
      const key = request.mode === "navigate" ? new URL("./index.html", self.location.href).href : request;
      return (await cache.match(key)) || fetch(request);
    })(),
  );
});
