// The case log: saved cases in IndexedDB on this device only. Export as JSON (our own format, with a
// schema version) and CSV; import JSON all-or-nothing after checking every case. Labels are text only.

export const FORMAT = "tidewell-case-log";
export const SCHEMA = 1;
const DB = "tidewell";
const STORE = "cases";
const CALCS = new Set(["blood_gas", "ventilation", "alveolar_gas", "altitude", "oxygen_supply"]);

function open() {
  return new Promise((resolve, reject) => {
    const req = indexedDB.open(DB, 1);
    req.onupgradeneeded = () => req.result.createObjectStore(STORE, { keyPath: "id" });
    req.onsuccess = () => resolve(req.result);
    req.onerror = () => reject(req.error);
  });
}

async function run(mode, work) {
  const db = await open();
  return new Promise((resolve, reject) => {
    const tx = db.transaction(STORE, mode);
    const store = tx.objectStore(STORE);
    let result;
    Promise.resolve(work(store)).then((r) => { result = r; });
    tx.oncomplete = () => { db.close(); resolve(result); };
    tx.onerror = () => { db.close(); reject(tx.error); };
    tx.onabort = () => { db.close(); reject(tx.error || new Error("aborted")); };
  });
}

const asPromise = (req) => new Promise((resolve, reject) => {
  req.onsuccess = () => resolve(req.result);
  req.onerror = () => reject(req.error);
});

export async function list() {
  const all = await run("readonly", (store) => asPromise(store.getAll()));
  return all.sort((a, b) => b.time - a.time || (a.id < b.id ? -1 : 1));
}

export const put = (record) => run("readwrite", (store) => { store.put(record); });
export const remove = (id) => run("readwrite", (store) => { store.delete(id); });
export const clear = () => run("readwrite", (store) => { store.clear(); });

export function newId() {
  const bytes = crypto.getRandomValues(new Uint8Array(8));
  return `case-${Date.now().toString(36)}-${Array.from(bytes, (b) => b.toString(16).padStart(2, "0")).join("")}`;
}

export async function exportJson() {
  return JSON.stringify({ format: FORMAT, schema: SCHEMA, exported: new Date().toISOString(), cases: await list() }, null, 1);
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

// Why a case is not acceptable, or "" when it is.
export function problem(c, index) {
  const at = `case ${index + 1}`;
  if (!c || typeof c !== "object" || Array.isArray(c)) return `${at} is not an object`;
  if (typeof c.id !== "string" || !/^[\w-]{1,80}$/.test(c.id)) return `${at}: "id" must be a short text of letters, digits and dashes`;
  if (!Number.isFinite(c.time) || c.time < 0) return `${at}: "time" must be a number (milliseconds since 1970)`;
  if (typeof c.label !== "string" || c.label.length > 200) return `${at}: "label" must be a text of at most 200 characters`;
  if (!CALCS.has(c.calc)) return `${at}: "calc" must be one of ${[...CALCS].join(", ")}`;
  if (typeof c.screen !== "string") return `${at}: "screen" is missing`;
  if (!c.fields || typeof c.fields !== "object" || Array.isArray(c.fields)) return `${at}: "fields" must be an object`;
  for (const [k, v] of Object.entries(c.fields)) {
    const ok = v === true || typeof v === "string" || (Array.isArray(v) && v.length === 2 && v.every((x) => typeof x === "string"));
    if (!ok || !/^[a-z0-9_]{1,40}$/.test(k)) return `${at}: field "${k.slice(0, 40)}" is not a typed value`;
  }
  if (!c.outputs || typeof c.outputs !== "object") return `${at}: "outputs" must be an object`;
  if (c.summary !== undefined && !(Array.isArray(c.summary) && c.summary.every((s) => typeof s === "string"))) {
    return `${at}: "summary" must be a list of texts`;
  }
  return "";
}

// Import: parse and check everything first; only then write, in one transaction. Returns the count.
export async function importJson(text) {
  let data;
  try {
    data = JSON.parse(text);
  } catch {
    throw new Error("The file is not JSON.");
  }
  if (!data || data.format !== FORMAT) throw new Error(`The file is not a Tidewell case log (format should be "${FORMAT}").`);
  if (data.schema !== SCHEMA) throw new Error(`The file uses schema ${JSON.stringify(data.schema)}; this version reads schema ${SCHEMA}.`);
  if (!Array.isArray(data.cases)) throw new Error('The file has no list of "cases".');
  const ids = new Set();
  for (const [i, c] of data.cases.entries()) {
    const why = problem(c, i);
    if (why) throw new Error(`Nothing was imported: ${why}.`);
    if (ids.has(c.id)) throw new Error(`Nothing was imported: case ${i + 1} repeats the id ${c.id}.`);
    ids.add(c.id);
  }
  await run("readwrite", (store) => { for (const c of data.cases) store.put(c); });
  return data.cases.length;
}
