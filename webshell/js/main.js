// The page: DOM only. The engine lives in core-client.js (window.tidewell); each screen is a module
// under forms/. Registers the service worker and offers updates without ever forcing one.

import { engine, markShellReady } from "./core-client.js";
import { VERSION, PYODIDE_VERSION, BUILD_LABEL } from "./build-info.js";
import * as convertScreen from "./forms/convert.js";

const $ = (selector) => document.querySelector(selector);

import { PANELS, EXAMPLES } from "./forms/specs.js";
import { Panel } from "./forms/panel.js";
import { settings, localeUnit } from "./settings.js";
import * as caselog from "./caselog.js";
import { CourseScreen, mountAddToCourse } from "./course/screen.js";
import { clearDraft, readDraft, writeDraft } from "./forms/entry.js";

// -- screens --
// The screen shown when the address names none: the blood gas, the one most people open Tidewell for.
const DEFAULT_SCREEN = "gas";
const screens = { gas: null, breathing: null, flight: null, course: null, log: null, convert: convertScreen, settings: null };
convertScreen.mount($("#convert"), engine);

// sources and cautions seen in this session, for the About part of Settings
const sources = new Map();
const cautions = new Set();
function seen(response) {
  for (const step of response.steps || []) if (step.source) sources.set(step.source, step.source_keys || []);
  for (const c of response.cautions || []) cautions.add(c);
  const list = $("#about-sources");
  list.replaceChildren(...[...sources.keys()].sort().map((s) => Object.assign(document.createElement("li"), { textContent: s })));
  $("#about-cautions").replaceChildren(...[...cautions].map((c) => Object.assign(document.createElement("li"), { textContent: c })));
}

// the curve and the profile are separate calculations: ask the core for them with the same inputs
function extraRequests(name, request) {
  const pick = (keys) => Object.fromEntries(keys.filter((k) => k in request.inputs).map((k) => [k, request.inputs[k]]));
  if (name === "blood_gas") {
    // the acid-base plane in the unit the PCO2 was typed in, so the sample always sits on it
    const unit = request.inputs.pco2 && request.inputs.pco2.unit;
    return [{ calc: "oxygen_dissociation_curve", inputs: pick(["ph", "pco2", "po2", "temperature", "base_excess"]),
      options: request.options },
    { calc: "acid_base_map", options: { pressure_unit: unit === "kPa" || unit === "mmHg" ? unit : request.options.pressure_unit } }];
  }
  if (name === "altitude") return [{ ...request, calc: "altitude_profile" }];
  return [];
}

const panels = {};
// the form is kept as a local draft as it is typed (a reload, pull to refresh or a killed tab loses nothing)
let draftTimer = 0;
let restoring = true;
function changed() {
  if (restoring) return;
  clearTimeout(draftTimer);
  draftTimer = setTimeout(() => writeDraft(panels), 300);
}
const hooks = { seen, extraRequests, save: saveCase, changed };
for (const host of document.querySelectorAll(".panel-host")) {
  const screen = host.closest(".screen").id;
  const examples = EXAMPLES.filter((e) => e.screen === screen);
  if (examples.length) {
    const box = document.createElement("div");
    box.className = "examples";
    const p = document.createElement("p");
    p.className = "muted";
    p.textContent = "Invented teaching examples (not real patients): one tap fills the form.";
    box.append(p);
    for (const ex of examples) {
      const b = document.createElement("button");
      b.type = "button";
      b.className = "example";
      b.dataset.example = ex.id;
      b.textContent = ex.title;
      b.title = ex.text;
      b.addEventListener("click", () => {
        panels[ex.panel].fill(ex.fields);
        $("#example-note-" + screen).textContent = ex.text;
      });
      box.append(b);
    }
    const note = document.createElement("p");
    note.id = "example-note-" + screen;
    note.className = "example-note";
    note.setAttribute("aria-live", "polite");
    box.append(note);
    host.before(box);
  }
  for (const name of host.dataset.panels.split(" ")) {
    panels[name] = new Panel(host, name, PANELS[name], engine, hooks);
    panels[name].screen = screen;
  }
}

// -- the course of a patient (js/course/): its screen, and "Add to course" under the blood-gas report --
const courseScreen = new CourseScreen($("#course"), engine, { seen });
mountAddToCourse(panels.blood_gas, courseScreen);

// the draft of the last visit, until New patient
const draft = readDraft();
for (const [name, values] of Object.entries(draft)) if (panels[name]) panels[name].fill(values);
restoring = false;
document.documentElement.dataset.draft = Object.keys(draft).length ? "restored" : "none";

// -- New patient: every field of every screen emptied at once; a short undo instead of a confirm dialog --
const UNDO_MS = 15000;
let undoTimer = 0;
let emptied = null;
function newPatient() {
  const snapshot = {};
  for (const [name, panel] of Object.entries(panels)) {
    const label = panel.saveRow ? panel.saveRow.querySelector(".case-label").value : "";
    snapshot[name] = { values: panel.values(), label };
    panel.clear();
  }
  for (const note of document.querySelectorAll(".example-note")) note.textContent = "";
  clearTimeout(draftTimer);
  clearDraft();
  emptied = snapshot;
  $("#new-patient-text").textContent = "Every field emptied for a new patient.";
  $("#new-patient-undo").hidden = false;
  $("#new-patient-note").hidden = false;
  document.documentElement.dataset.newPatient = "emptied";
  clearTimeout(undoTimer);
  undoTimer = setTimeout(() => { $("#new-patient-note").hidden = true; emptied = null; }, UNDO_MS);
}
function undoNewPatient() {
  if (!emptied) return;
  for (const [name, { values, label }] of Object.entries(emptied)) {
    if (Object.keys(values).length) panels[name].fill(values);
    if (label && panels[name].saveRow) panels[name].saveRow.querySelector(".case-label").value = label;
  }
  emptied = null;
  clearTimeout(undoTimer);
  $("#new-patient-text").textContent = "The previous values are back.";
  $("#new-patient-undo").hidden = true;
  document.documentElement.dataset.newPatient = "undone";
  undoTimer = setTimeout(() => { $("#new-patient-note").hidden = true; }, 4000);
}
for (const b of document.querySelectorAll('[data-action="new-patient"]')) b.addEventListener("click", newPatient);
$("#new-patient-undo").addEventListener("click", undoNewPatient);

function showScreen() {
  const wanted = location.hash.slice(1);
  const name = wanted in screens ? wanted : DEFAULT_SCREEN;
  for (const section of document.querySelectorAll("#screens > .screen")) section.hidden = section.id !== name;
  for (const link of document.querySelectorAll(".screens-nav a, .bar-settings")) {
    if (link.dataset.screen === name) link.setAttribute("aria-current", "page");
    else link.removeAttribute("aria-current");
  }
  document.documentElement.dataset.screen = name;
  if (name === "log") renderLog();
  if (name === "course") courseScreen.show();
}
window.addEventListener("hashchange", showScreen);

// -- settings --
for (const radio of document.querySelectorAll('input[name="pressure-unit"]')) {
  radio.checked = radio.value === settings.pressureUnit;
  radio.addEventListener("change", () => settings.setPressureUnit(radio.value));
}
for (const radio of document.querySelectorAll('input[name="theme"]')) {
  radio.checked = radio.value === settings.theme;
  radio.addEventListener("change", () => settings.setTheme(radio.value));
}

// -- case log --
function say(text) {
  $("#log-message").textContent = text;
}

async function saveCase(panel, label, status) {
  if (!panel.last) return false;
  const record = {
    id: caselog.newId(), time: Date.now(), label: label.slice(0, 200), screen: panel.screen, calc: panel.name,
    fields: panel.values(), pressure_unit: panel.last.request.options.pressure_unit,
    outputs: panel.last.response.outputs, summary: panel.last.response.summary || [],
    engine: panel.last.response.engine,
  };
  try {
    await caselog.put(record);
    status.textContent = "Saved to the case log on this device.";
    if (navigator.storage && navigator.storage.persist) navigator.storage.persist().then(showPersist, () => {});
    return true;
  } catch (err) {
    // a full disk or refused storage is said, never swallowed; the values stay in the form
    status.textContent = `Not saved: ${caselog.writeProblem(err)}. Your values are kept in the form.`;
    return false;
  }
}

// a deleted case can be put back with one tap (no confirm dialog for a single case)
function offerUndoDelete(record) {
  const undo = document.createElement("button");
  undo.type = "button";
  undo.id = "log-undo";
  undo.textContent = "Undo";
  undo.addEventListener("click", async () => {
    try {
      await caselog.put(record);
      say("Case restored.");
    } catch (err) {
      say(`Not restored: ${caselog.writeProblem(err)}.`);
    }
    renderLog();
  });
  $("#log-message").replaceChildren(`Case "${record.label || "(no label)"}" deleted. `, undo);
}

function showPersist(granted) {
  $("#log-persist").textContent = granted
    ? "This browser has agreed to keep the case log unless you delete it."
    : "This browser may clear the case log when space runs low; export it to keep a copy.";
}

let logRender = 0;
async function renderLog() {
  const mine = ++logRender;
  const cases = await caselog.list();
  if (mine !== logRender) return; // a newer render is on its way
  const list = $("#log-list");
  list.replaceChildren();
  $("#log-empty").hidden = cases.length > 0;
  document.documentElement.dataset.logCount = String(cases.length);
  for (const c of cases) {
    const item = document.createElement("li");
    item.className = "log-item";
    item.dataset.id = c.id;
    const title = document.createElement("p");
    title.className = "log-label";
    title.textContent = c.label || "(no label)"; // text only: a label is never markup
    const meta = document.createElement("p");
    meta.className = "muted";
    meta.textContent = `${new Date(c.time).toLocaleString()} · ${PANELS[c.calc] ? PANELS[c.calc].title : c.calc}`;
    const summary = document.createElement("p");
    summary.className = "log-summary";
    summary.textContent = (c.summary || []).slice(0, 2).join(" ");
    const reopen = document.createElement("button");
    reopen.type = "button";
    reopen.className = "log-open";
    reopen.textContent = "Reopen";
    reopen.setAttribute("aria-label", `Reopen case ${c.label || "(no label)"}`);
    reopen.addEventListener("click", () => {
      if (c.pressure_unit) {
        settings.setPressureUnit(c.pressure_unit);
        for (const r of document.querySelectorAll('input[name="pressure-unit"]')) r.checked = r.value === c.pressure_unit;
      }
      location.hash = c.screen;
      panels[c.calc].fill(c.fields);
    });
    const del = document.createElement("button");
    del.type = "button";
    del.className = "log-delete danger";
    del.textContent = "Delete";
    del.setAttribute("aria-label", `Delete case ${c.label || "(no label)"}`);
    del.addEventListener("click", async () => {
      try {
        await caselog.remove(c.id);
        offerUndoDelete(c);
      } catch (err) {
        say(`Not deleted: ${caselog.writeProblem(err)}.`);
      }
      renderLog();
    });
    const row = document.createElement("div");
    row.className = "row-buttons";
    row.append(reopen, del);
    item.append(title, meta, summary, row);
    list.append(item);
  }
}

function offerDownload(text, type, name) {
  const url = URL.createObjectURL(new Blob([text], { type }));
  const a = document.createElement("a");
  a.href = url;
  a.download = name;
  a.textContent = `Download ${name}`;
  a.className = "download";
  $("#log-download").replaceChildren(a);
  a.click();
}
const stamp = () => new Date().toISOString().slice(0, 10);
async function exportLog(make, type, name) {
  try {
    offerDownload(await make(), type, name);
  } catch (err) {
    say(`Not exported: the case log could not be read (${err.name || "Error"}).`);
  }
}
$("#log-export-json").addEventListener("click", () =>
  exportLog(caselog.exportJson, "application/json", `tidewell-cases-${stamp()}.json`),
);
$("#log-export-csv").addEventListener("click", () => exportLog(caselog.exportCsv, "text/csv", `tidewell-cases-${stamp()}.csv`));

// "Delete all data": every saved case and every setting Tidewell keeps (localStorage and
// sessionStorage entries named tidewell:*). The offline copy of the app itself stays: it holds no data.
async function deleteAllData() {
  clearTimeout(draftTimer); // the form's draft goes too, and a pending write must not bring it back
  await caselog.deleteAll();
  for (const storage of [localStorage, sessionStorage]) {
    for (const key of Object.keys(storage)) if (key.startsWith("tidewell:")) storage.removeItem(key);
  }
  // back to the defaults in this page too, without writing them down again
  settings.pressureUnit = localeUnit();
  settings.theme = "auto";
  settings.applyTheme();
  for (const r of document.querySelectorAll('input[name="pressure-unit"]')) r.checked = r.value === settings.pressureUnit;
  for (const r of document.querySelectorAll('input[name="theme"]')) r.checked = r.value === settings.theme;
  settings.dispatchEvent(new Event("pressure"));
}
$("#log-delete-all").addEventListener("click", async () => {
  const question =
    "Delete all data: every saved case and your settings (pressure unit, night mode) on this device? " +
    "The offline copy of the app stays. This cannot be undone.";
  if (!confirm(question)) return;
  try {
    await deleteAllData();
    say("All data deleted: every saved case and the settings on this device.");
    document.documentElement.dataset.deleteState = "done";
  } catch (err) {
    say(`Not everything was deleted: ${caselog.writeProblem(err)}.`);
    document.documentElement.dataset.deleteState = "failed";
  }
  renderLog();
});
$("#log-import").addEventListener("change", async (event) => {
  const file = event.target.files[0];
  event.target.value = "";
  if (!file) return;
  try {
    if (file.size > caselog.MAX_IMPORT_BYTES) {
      const mb = (file.size / 1024 / 1024).toFixed(1);
      throw new Error(`Nothing was imported: the file is ${mb} MB; ${caselog.LIMIT_TEXT}.`);
    }
    let text;
    try {
      text = await file.text();
    } catch {
      throw new Error("Nothing was imported: the file could not be read.");
    }
    const { imported, replaced, courses, replacedCourses } = await caselog.importJson(text);
    const also = replaced ? ` (${replaced} of them replaced a saved case with the same id)` : "";
    const withCourses = courses
      ? ` and ${courses} course(s)${replacedCourses ? ` (${replacedCourses} replaced a saved course with the same id)` : ""}`
      : "";
    say(`Imported ${imported} case(s)${also}${withCourses}.`);
    document.documentElement.dataset.importState = "done";
  } catch (err) {
    say(`${err.message} The case log is unchanged.`);
    document.documentElement.dataset.importState = "refused";
  }
  renderLog();
});

showScreen();

// -- status line: plain words for a clinician, never the parts' names --
// the offline copy as the service worker reports it: its state and, while it stores, bytes stored of all
const offline = { state: "pending", stored: 0, total: 0 };
const megabytes = (bytes) => (bytes / 1e6).toFixed(1);

function renderEngine() {
  const { state } = engine;
  document.documentElement.dataset.engine = state;
  $("#engine-status").dataset.engine = state;
  $("#engine-retry").hidden = state !== "failed";
  let text;
  if (state === "ready") {
    const info = engine.info;
    // plain words here; the versions are in the About line at the foot of the page
    if (offline.state === "ready") text = "Ready offline. Every calculation runs on this device.";
    else if (offline.state === "pending" && offline.total > 0) {
      text = `Ready. Storing for offline use: ${megabytes(offline.stored)} MB of ${megabytes(offline.total)} MB stored.`;
    } else text = "Ready. Every calculation runs on this device.";
    $("#engine-text").title = `tidewell ${info.engine}, Python ${info.python}, Pyodide ${info.pyodide}; ` +
      `started in ${(info.timings_ms.total / 1000).toFixed(1)} s`;
    if (engine.restarts) {
      const times = engine.restarts === 1 ? "once" : `${engine.restarts} times`;
      text += ` Restarted ${times} after a fault (last: ${engine.lastFault}).`;
    }
  } else if (state === "failed") {
    text = `Not working: ${engine.failure}`;
  } else if (engine.restarting) {
    text = `Restarting (${engine.lastFault}). Your values are kept; results follow when it is back.`;
  } else {
    text = `Getting ready (${(engine.progress || "starting").toLowerCase()}). You can type values now.`;
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
// the note is shown on iPhone and iPad only (css: html[data-ios]); elsewhere it does not apply
if (ios) document.documentElement.dataset.ios = "1";
if (ios && !navigator.standalone) $("#ios-note").classList.add("ios-note-urgent");
if (navigator.standalone) $("#ios-note").hidden = true;

markShellReady();

// -- service worker: offline copy and updates --
function setOffline(state, text) {
  offline.state = state;
  $("#offline-status").dataset.offline = state;
  $("#offline-status").textContent = text;
  renderEngine();
}

// "tidewell:stored:<bytes>:<bytes in all>" from the installing service worker (sw.js, announce)
function storedProgress(event) {
  const match = /^tidewell:stored:(\d+):(\d+)$/.exec(typeof event.data === "string" ? event.data : "");
  if (!match || offline.state !== "pending") return;
  offline.stored = Number(match[1]);
  offline.total = Number(match[2]);
  $("#offline-status").textContent = "Offline use: storing this version on the device " +
    `(${megabytes(offline.stored)} MB of ${megabytes(offline.total)} MB stored).`;
  $("#offline-status").dataset.stored = `${offline.stored}/${offline.total}`;
  renderEngine();
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
  navigator.serviceWorker.addEventListener("message", storedProgress);
  navigator.serviceWorker.startMessages();
  // read before register(): on a first visit there is no controller, and the first controllerchange is the
  // offline copy becoming ready
  const hadController = Boolean(navigator.serviceWorker.controller);
  navigator.serviceWorker.addEventListener("controllerchange", () => {
    if (sessionStorage.getItem("tidewell:update-accepted") && !accepted) {
      accepted = true;
      sessionStorage.removeItem("tidewell:update-accepted");
      location.reload();
    } else if (hadController) {
      // another tab accepted an update: this page is the old version under the new service worker
      $("#update").hidden = false;
      $("#update span").textContent = "Tidewell was updated in another tab - reload to use the new version.";
      $("#update-reload").onclick = () => location.reload();
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
