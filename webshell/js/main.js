// The page: DOM only. The engine lives in core-client.js (window.tidewell); each screen is a module
// under forms/. Registers the service worker and offers updates without ever forcing one.

import { engine, markShellReady } from "./core-client.js";
import { VERSION, PYODIDE_VERSION, BUILD_LABEL } from "./build-info.js";
import * as convertScreen from "./forms/convert.js";

const $ = (selector) => document.querySelector(selector);

// -- screens (one for now; clinical screens join the nav later) --
const screens = { convert: convertScreen };
for (const [name, screen] of Object.entries(screens)) screen.mount($(`#${name}`), engine);

function showScreen() {
  const name = location.hash.slice(1) in screens ? location.hash.slice(1) : "convert";
  for (const section of document.querySelectorAll("#screens > .screen")) section.hidden = section.id !== name;
  for (const link of document.querySelectorAll(".screens-nav a")) {
    if (link.dataset.screen === name) link.setAttribute("aria-current", "page");
    else link.removeAttribute("aria-current");
  }
}
window.addEventListener("hashchange", showScreen);
showScreen();

// -- engine status line --
function renderEngine() {
  const { state } = engine;
  document.documentElement.dataset.engine = state;
  $("#engine-status").dataset.engine = state;
  $("#engine-retry").hidden = state !== "failed";
  let text;
  if (state === "ready") {
    const info = engine.info;
    text =
      `Engine: ready (tidewell ${info.engine}, Python ${info.python}, Pyodide ${info.pyodide}; ` +
      `started in ${(info.timings_ms.total / 1000).toFixed(1)} s).`;
  } else if (state === "failed") {
    text = `Engine: failed. ${engine.failure}`;
  } else {
    text = `Engine: loading (${engine.progress || "starting"}). The form below already takes values.`;
  }
  $("#engine-text").textContent = text;
}
engine.addEventListener("state", renderEngine);
$("#engine-retry").addEventListener("click", () => engine.retry());
renderEngine();

// -- about line --
$("#about-version").textContent = BUILD_LABEL ? `${VERSION} (${BUILD_LABEL})` : VERSION;
$("#about-pyodide").textContent = PYODIDE_VERSION;
fetch("./build-manifest.json")
  .then((response) => (response.ok ? response.json() : Promise.reject(new Error(response.status))))
  .then((manifest) => {
    $("#about-build").textContent = manifest.build_id;
    document.documentElement.dataset.buildId = manifest.build_id;
  })
  .catch(() => {
    $("#about-build").textContent = "unknown";
  });

// -- iOS: storage is deleted after 7 days unused unless installed to the Home Screen --
const ios = /iPhone|iPad|iPod/.test(navigator.userAgent) || (navigator.platform === "MacIntel" && navigator.maxTouchPoints > 1);
if (ios && !navigator.standalone) $("#ios-note").classList.add("ios-note-urgent");
if (navigator.standalone) $("#ios-note").hidden = true;

markShellReady();

// -- service worker: offline copy and updates --
function setOffline(state, text) {
  $("#offline-status").dataset.offline = state;
  $("#offline-status").textContent = text;
}

function offerUpdate(waiting) {
  $("#update").hidden = false;
  $("#update-reload").onclick = () => {
    sessionStorage.setItem("tidewell:update-accepted", "1");
    waiting.postMessage("tidewell:skip-waiting");
  };
}

async function registerServiceWorker() {
  if (!("serviceWorker" in navigator)) {
    setOffline("unsupported", "Offline use: not available in this browser.");
    return;
  }
  let accepted = false;
  navigator.serviceWorker.addEventListener("controllerchange", () => {
    if (sessionStorage.getItem("tidewell:update-accepted") && !accepted) {
      accepted = true;
      sessionStorage.removeItem("tidewell:update-accepted");
      location.reload();
    } else {
      setOffline("ready", "Offline use: ready. This version is stored on this device.");
    }
  });
  try {
    const registration = await navigator.serviceWorker.register("./sw.js", { scope: "./" });
    const track = (worker) => {
      worker.addEventListener("statechange", () => {
        if (worker.state === "installed" && navigator.serviceWorker.controller) offerUpdate(worker);
        if (worker.state === "redundant" && !navigator.serviceWorker.controller) {
          setOffline("failed", "Offline use: the download did not complete; it will be tried again next visit.");
        }
      });
    };
    if (registration.waiting && navigator.serviceWorker.controller) offerUpdate(registration.waiting);
    if (registration.installing) track(registration.installing);
    registration.addEventListener("updatefound", () => track(registration.installing));
    if (navigator.serviceWorker.controller) {
      setOffline("ready", "Offline use: ready. This version is stored on this device.");
    } else {
      setOffline("pending", "Offline use: storing this version on the device.");
    }
  } catch (err) {
    setOffline("failed", `Offline use: not available (${err.message}).`);
  }
}
// A first visit stores the offline copy only after the engine has started: the engine's downloads go
// first, and the service worker then finds them in the HTTP cache (revalidated, not downloaded twice).
// A returning visit (already controlled) registers at once, so an update is noticed early.
if (navigator.serviceWorker && navigator.serviceWorker.controller) {
  registerServiceWorker();
} else if (engine.state !== "loading") {
  registerServiceWorker();
} else {
  const settled = (event) => {
    if (event.detail.state === "loading") return;
    engine.removeEventListener("state", settled);
    registerServiceWorker();
  };
  engine.addEventListener("state", settled);
}
