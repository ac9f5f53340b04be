// The case log: saved cases in IndexedDB on this device only. Export as JSON (our own format, with a
// schema version) and CSV; import JSON all-or-nothing after checking every case. Labels are text only.
//
// Import rules: at most 5 MB and 5,000 cases a file; every case is checked against the panel it came
// from (known calculation, its screen, its field names, units and words, no markup in any stored value
// but the label, which is only ever shown as text); nothing is written unless everything passes, and
// then everything is written in one transaction, so a write that fails half way leaves the log as it
// was. A failed write (a full disk, storage refused) rejects with the browser's reason: never swallowed.
//
// Export is deterministic: the same log gives the same bytes, except for `exported`, the time of the
// export (clock.now(), which a test may freeze). Export, import, export gives the file back exactly.

import { PANELS } from "./forms/specs.js";
import { courseProblem, useFieldCheck } from "./course/records.js";

export const FORMAT = "tidewell-case-log";
// schema 2 adds "courses" (serial gases of one patient, js/course/); a schema 1 file still imports
export const SCHEMA = 2;
const SCHEMAS = new Set([1, 2]);
export const MAX_IMPORT_BYTES = 5 * 1024 * 1024;
export const MAX_IMPORT_CASES = 5_000;
export const LIMIT_TEXT = "Tidewell imports case logs of up to 5 MB and 5,000 cases";
const DB = "tidewell";
const STORE = "cases";
export const COURSES = "courses";
// version 1: "cases"; version 2 adds "courses" and leaves every case as it was
const DB_VERSION = 2;
// each calculation that can be saved, and the screen that shows it (index.html)
const SCREEN_OF = {
  blood_gas: "gas",
  ventilation: "breathing",
  alveolar_gas: "breathing",
  altitude: "flight",
  oxygen_supply: "flight",
};
const CALCS = new Set(Object.keys(SCREEN_OF));
const CASE_KEYS = new Set(["id", "time", "label", "screen", "calc", "fields", "pressure_unit", "outputs", "summary", "engine"]);
const FILE_KEYS = new Set(["format", "schema", "exported", "cases", "courses"]);
const MAX_TIME = 8.64e15; // the last moment a JavaScript Date can hold
const MAX_DEPTH = 8;

// the export time; a test freezes it to compare two exports byte for byte
export const clock = { now: () => new Date() };

function open() {
  return new Promise((resolve, reject) => {
    const req = indexedDB.open(DB, DB_VERSION);
    // each store is created only where it is missing: an upgrade from version 1 keeps every case
    req.onupgradeneeded = () => {
      const db = req.result;
      if (!db.objectStoreNames.contains(STORE)) db.createObjectStore(STORE, { keyPath: "id" });
      if (!db.objectStoreNames.contains(COURSES)) db.createObjectStore(COURSES, { keyPath: "id" });
    };
    req.onsuccess = () => {
      const db = req.result;
      db.onversionchange = () => db.close(); // another tab deletes all data: let it
      resolve(db);
    };
    req.onerror = () => reject(req.error);
    req.onblocked = () => reject(new Error("another Tidewell tab is holding the case log; close it and try again"));
  });
}

// One transaction. It settles only when the browser has committed it (complete) or thrown it away
// (abort): then nothing of it was kept, and the promise rejects with the first error seen.
async function run(mode, work, stores = STORE) {
  const db = await open();
  return new Promise((resolve, reject) => {
    let tx;
    try {
      tx = db.transaction(stores, mode);
    } catch (err) {
      db.close();
      reject(err);
      return;
    }
    let result;
    let failure = null;
    const abort = (err) => {
      failure = failure || err;
      try {
        tx.abort();
      } catch {
        // already aborting: the abort event still comes
      }
    };
    tx.oncomplete = () => {
      db.close();
      resolve(result);
    };
    tx.onerror = (event) => {
      failure = failure || event.target.error; // the abort that follows rejects
    };
    tx.onabort = () => {
      db.close();
      reject(failure || tx.error || new DOMException("The browser cancelled the write.", "AbortError"));
    };
    try {
      const store = Array.isArray(stores) ? tx : tx.objectStore(stores);
      Promise.resolve(work(store)).then((r) => {
        result = r;
      }, abort);
    } catch (err) {
      abort(err); // e.g. put() threw: none of this transaction's writes are kept
    }
  });
}

const asPromise = (req) =>
  new Promise((resolve, reject) => {
    req.onsuccess = () => resolve(req.result);
    req.onerror = () => reject(req.error);
  });

export async function list() {
  const all = await run("readonly", (store) => asPromise(store.getAll()));
  return all.sort((a, b) => b.time - a.time || (a.id < b.id ? -1 : 1));
}

export const count = () => run("readonly", (store) => asPromise(store.count()));
export const put = (record) => run("readwrite", (store) => void store.put(record));
export const remove = (id) => run("readwrite", (store) => void store.delete(id));
export const clear = () =>
  run("readwrite", (tx) => { tx.objectStore(STORE).clear(); tx.objectStore(COURSES).clear(); }, [STORE, COURSES]);

// courses (js/course/): one record each, newest change first
export async function listCourses() {
  const all = await run("readonly", (store) => asPromise(store.getAll()), COURSES);
  return all.sort((a, b) => b.changed - a.changed || (a.id < b.id ? -1 : 1));
}
export const getCourse = (id) => run("readonly", (store) => asPromise(store.get(id)), COURSES);
export const putCourse = (record) => run("readwrite", (store) => void store.put(record), COURSES);
export const removeCourse = (id) => run("readwrite", (store) => void store.delete(id), COURSES);

// "Delete all data": empty the store, then delete the database itself.
export async function deleteAll() {
  await clear(); // empty even if another tab keeps the database open
  await new Promise((resolve) => {
    const req = indexedDB.deleteDatabase(DB);
    // blocked: another tab has it open; the store is already empty and the deletion waits for that tab
    req.onsuccess = req.onerror = req.onblocked = () => resolve();
  });
}

// What to tell the user when the browser refused to store something.
export function writeProblem(err) {
  const name = (err && err.name) || "Error";
  if (name === "QuotaExceededError") {
    return "the browser refused to store it because storage for this site is full (export the log and delete old cases, or free space on the device)";
  }
  if (name === "AbortError" || name === "TransactionInactiveError") {
    return `the browser cancelled the write before it was complete (${name})`;
  }
  const detail = err && err.message ? `: ${err.message}` : "";
  return `the browser refused to store it (${name}${detail})`;
}

export function newId(kind = "case") {
  const bytes = crypto.getRandomValues(new Uint8Array(8));
  return `${kind}-${Date.now().toString(36)}-${Array.from(bytes, (b) => b.toString(16).padStart(2, "0")).join("")}`;
}

export async function exportJson() {
  const cases = await list();
  const courses = await listCourses();
  return JSON.stringify({ format: FORMAT, schema: SCHEMA, exported: clock.now().toISOString(), cases, courses }, null, 1);
}

const csvCell = (v) => {
  const text = v === undefined || v === null ? "" : String(v);
  // a leading = + - @ would be read as a formula by spreadsheets: prefix it with an apostrophe
  const safe = /^[=+\-@\t\r]/.test(text) ? `'${text}` : text;
  return /[",\n\r]/.test(safe) ? `"${safe.replaceAll('"', '""')}"` : safe;
};

export async function exportCsv() {
  const rows = [["id", "saved_utc", "label", "calculation", "inputs", "summary"]];
  for (const c of await list()) {
    const inputs = Object.entries(c.fields).map(([k, v]) => `${k}=${Array.isArray(v) ? v.join(" ") : v}`).join("; ");
    rows.push([c.id, new Date(c.time).toISOString(), c.label, c.calc, inputs, (c.summary || []).join(" ")]);
  }
  return rows.map((r) => r.map(csvCell).join(",")).join("\r\n") + "\r\n";
}

// typed text of a field: short, no markup, no control characters
const TYPED = /^[^<>&"'`\u0000-\u001f\u007f]{1,40}$/;
const isObject = (v) => v !== null && typeof v === "object" && !Array.isArray(v);

export function fieldProblem(calc, name, value) {
  const spec = PANELS[calc].fields.find((f) => f[0] === name);
  if (!spec) return `"${name.slice(0, 40)}" is not a field of ${calc}`;
  const kind = spec[2];
  if (kind === "yes") return value === true ? "" : `field "${name}" must be true (a ticked box)`;
  if (typeof kind === "string" && kind.startsWith("w:")) {
    return kind.slice(2).split(",").includes(value) ? "" : `field "${name}" must be one of ${kind.slice(2)}`;
  }
  const units = kind === "P" ? ["kPa", "mmHg"] : kind === "fio2" ? ["fraction", "%"] : Array.isArray(kind) ? kind : null;
  if (typeof value === "string") return TYPED.test(value) ? "" : `field "${name}" must be a short typed value without markup`;
  if (units && Array.isArray(value) && value.length === 2 && typeof value[0] === "string" && TYPED.test(value[0])) {
    return units.includes(value[1]) ? "" : `field "${name}" has the unit ${JSON.stringify(String(value[1]).slice(0, 20))}, not one of ${units.join(", ")}`;
  }
  return `field "${name}" is not a typed value`;
}

useFieldCheck(fieldProblem);

// stored outputs: plain JSON, at most MAX_DEPTH deep, keys of letters, digits and underscores
function outputsProblem(value, depth = 0) {
  if (depth > MAX_DEPTH) return `"outputs" is nested more than ${MAX_DEPTH} levels deep`;
  if (value === null || typeof value === "boolean" || Number.isFinite(value)) return "";
  // texts of the core (never shown from the log, and only ever as text)
  if (typeof value === "string") return value.length <= 2_000 ? "" : '"outputs" holds a text longer than 2,000 characters';
  if (Array.isArray(value)) {
    for (const v of value) {
      const why = outputsProblem(v, depth + 1);
      if (why) return why;
    }
    return "";
  }
  if (isObject(value)) {
    for (const [k, v] of Object.entries(value)) {
      if (!/^\w{1,80}$/.test(k)) return `"outputs" has a key that is not a name (${JSON.stringify(k.slice(0, 20))})`;
      const why = outputsProblem(v, depth + 1);
      if (why) return why;
    }
    return "";
  }
  return '"outputs" holds something that is not a number, text or list';
}

// Why a case is not acceptable, or "" when it is.
export function problem(c, index) {
  const at = `case ${index + 1}`;
  if (!isObject(c)) return `${at} is not an object`;
  const extra = Object.keys(c).find((k) => !CASE_KEYS.has(k));
  if (extra !== undefined) return `${at} has an unknown entry "${extra.slice(0, 40)}"`;
  if (typeof c.id !== "string" || !/^[\w-]{1,80}$/.test(c.id)) return `${at}: "id" must be a short text of letters, digits and dashes`;
  if (!Number.isFinite(c.time) || c.time < 0 || c.time > MAX_TIME) return `${at}: "time" must be a number (milliseconds since 1970)`;
  if (typeof c.label !== "string" || c.label.length > 200) return `${at}: "label" must be a text of at most 200 characters`;
  if (!CALCS.has(c.calc)) return `${at}: "calc" must be one of ${[...CALCS].join(", ")}`;
  if (c.screen !== SCREEN_OF[c.calc]) return `${at}: "screen" must be "${SCREEN_OF[c.calc]}" for ${c.calc}`;
  if (!isObject(c.fields)) return `${at}: "fields" must be an object`;
  for (const [k, v] of Object.entries(c.fields)) {
    const why = fieldProblem(c.calc, k, v);
    if (why) return `${at}: ${why}`;
  }
  if (c.pressure_unit !== undefined && c.pressure_unit !== "kPa" && c.pressure_unit !== "mmHg") {
    return `${at}: "pressure_unit" must be kPa or mmHg`;
  }
  if (!isObject(c.outputs)) return `${at}: "outputs" must be an object`;
  const why = outputsProblem(c.outputs);
  if (why) return `${at}: ${why}`;
  if (c.summary !== undefined && !(Array.isArray(c.summary) && c.summary.length <= 50 && c.summary.every((s) => typeof s === "string" && s.length <= 2_000))) {
    return `${at}: "summary" must be a list of texts`;
  }
  if (c.engine !== undefined && !(typeof c.engine === "string" && /^[\w.+-]{1,40}$/.test(c.engine))) {
    return `${at}: "engine" must be a version number`;
  }
  return "";
}

const megabytes = (n) => `${(n / 1024 / 1024).toFixed(1)} MB`;

// Import: parse and check everything first; only then write, in one transaction. Returns
// {imported, replaced}: how many cases the file held, and how many of them replaced a saved case with
// the same id. Throws an Error whose message says why nothing was imported.
export async function importJson(text) {
  if (typeof text !== "string") throw new Error("Nothing was imported: the file could not be read.");
  if (text.length > MAX_IMPORT_BYTES) {
    throw new Error(`Nothing was imported: the file is larger than ${megabytes(MAX_IMPORT_BYTES)}; ${LIMIT_TEXT}.`);
  }
  let data;
  try {
    data = JSON.parse(text);
  } catch {
    throw new Error("Nothing was imported: the file is not JSON (it may be cut short).");
  }
  if (!isObject(data) || data.format !== FORMAT) {
    throw new Error(`Nothing was imported: the file is not a Tidewell case log (format should be "${FORMAT}").`);
  }
  if (!SCHEMAS.has(data.schema)) {
    throw new Error(`Nothing was imported: the file uses schema ${JSON.stringify(data.schema)}; this version reads schemas 1 and ${SCHEMA}.`);
  }
  const extra = Object.keys(data).find((k) => !FILE_KEYS.has(k));
  if (extra !== undefined) throw new Error(`Nothing was imported: the file has an unknown entry "${extra.slice(0, 40)}".`);
  if (data.exported !== undefined && typeof data.exported !== "string") {
    throw new Error('Nothing was imported: "exported" must be a date text.');
  }
  if (!Array.isArray(data.cases)) throw new Error('Nothing was imported: the file has no list of "cases".');
  if (data.cases.length > MAX_IMPORT_CASES) {
    throw new Error(`Nothing was imported: the file holds ${data.cases.length.toLocaleString("en")} cases; ${LIMIT_TEXT}.`);
  }
  const ids = new Set();
  for (const [i, c] of data.cases.entries()) {
    const why = problem(c, i);
    if (why) throw new Error(`Nothing was imported: ${why}.`);
    if (ids.has(c.id)) throw new Error(`Nothing was imported: case ${i + 1} repeats the id ${c.id}.`);
    ids.add(c.id);
  }
  // schema 1 has no courses; in schema 2 the list is required
  const courses = data.schema === 1 ? [] : data.courses;
  if (data.schema === 1 && data.courses !== undefined) {
    throw new Error('Nothing was imported: a schema 1 file has no "courses".');
  }
  if (!Array.isArray(courses)) throw new Error('Nothing was imported: the file has no list of "courses".');
  if (courses.length > MAX_IMPORT_CASES) {
    throw new Error(`Nothing was imported: the file holds ${courses.length.toLocaleString("en")} courses; ${LIMIT_TEXT}.`);
  }
  const courseIds = new Set();
  for (const [i, c] of courses.entries()) {
    const why = courseProblem(c, i);
    if (why) throw new Error(`Nothing was imported: ${why}.`);
    if (courseIds.has(c.id)) throw new Error(`Nothing was imported: course ${i + 1} repeats the id ${c.id}.`);
    courseIds.add(c.id);
  }
  let replaced;
  try {
    // cases and courses in one transaction: all of the file is kept, or none of it
    replaced = await run("readwrite", (tx) => {
      const cs = tx.objectStore(STORE);
      const co = tx.objectStore(COURSES);
      return Promise.all([asPromise(cs.getAllKeys()), asPromise(co.getAllKeys())]).then(([keys, courseKeys]) => {
        for (const c of data.cases) cs.put(c);
        for (const c of courses) co.put(c);
        return [keys.filter((k) => ids.has(k)).length, courseKeys.filter((k) => courseIds.has(k)).length];
      });
    }, [STORE, COURSES]);
  } catch (err) {
    throw new Error(`Nothing was imported: ${writeProblem(err)}.`);
  }
  return { imported: data.cases.length, replaced: replaced[0], courses: courses.length, replacedCourses: replaced[1] };
}
