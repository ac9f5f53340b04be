// A course as stored on the device (IndexedDB store "courses", beside the case log) and in the exported
// file (schema 2). What was typed is kept as typed; the course's reading is asked of the core afresh each
// time it is shown, so a stored course never holds a clinical number the core did not just compute.
//
// {id, label, created, changed, patient: {hypercapnia_risk?, previous_hypercapnic_failure?, baseline_pco2?},
//  gases: [{id, time: "YYYY-MM-DDTHH:MM" (the device's local clock, no offset), fields: the blood-gas
//  form's typed fields, events: [event words]}]}

// the core's event words (docs/glossary/course.md), in the order the screen offers them, in clinical words
export const EVENTS = [
  ["oxygen_increased", "Oxygen turned up"],
  ["oxygen_decreased", "Oxygen turned down"],
  ["niv_started", "NIV started"],
  ["niv_changed", "NIV settings changed"],
  ["niv_stopped", "NIV stopped"],
  ["intubated", "Intubated"],
  ["extubated", "Extubated"],
];
const EVENT_WORDS = new Set(EVENTS.map(([w]) => w));
export const MAX_GASES = 50; // the core reads 2 to 50 gases
export const TIME = /^\d{4}-\d{2}-\d{2}T\d{2}:\d{2}$/;
const KEYS = new Set(["id", "label", "created", "changed", "patient", "gases"]);
const GAS_KEYS = new Set(["id", "time", "fields", "events"]);
const PATIENT_KEYS = new Set(["hypercapnia_risk", "previous_hypercapnic_failure", "baseline_pco2"]);
const ID = /^[\w-]{1,80}$/;
const TYPED = /^[^<>&"'`\u0000-\u001f\u007f]{1,40}$/;
const MAX_TIME = 8.64e15;
const isObject = (v) => v !== null && typeof v === "object" && !Array.isArray(v);

// a field of the blood-gas form: the case log's own check (caselog.js), passed in to avoid an import cycle
let fieldCheck = () => "fields cannot be checked yet";
export function useFieldCheck(check) {
  fieldCheck = check;
}

function patientProblem(p) {
  if (!isObject(p)) return '"patient" must be an object';
  for (const [k, v] of Object.entries(p)) {
    if (!PATIENT_KEYS.has(k)) return `"patient" has an unknown entry "${k.slice(0, 40)}"`;
    if (k === "baseline_pco2") {
      const ok = Array.isArray(v) && v.length === 2 && typeof v[0] === "string" && TYPED.test(v[0]) && ["kPa", "mmHg"].includes(v[1]);
      if (!ok) return '"patient.baseline_pco2" must be a typed pressure in kPa or mmHg';
    } else if (v !== true) return `"patient.${k}" must be true (a ticked box)`;
  }
  return "";
}

function gasProblem(g, j) {
  const at = `gas ${j + 1}`;
  if (!isObject(g)) return `${at} is not an object`;
  const extra = Object.keys(g).find((k) => !GAS_KEYS.has(k));
  if (extra !== undefined) return `${at} has an unknown entry "${extra.slice(0, 40)}"`;
  if (typeof g.id !== "string" || !ID.test(g.id)) return `${at}: "id" must be a short text of letters, digits and dashes`;
  if (typeof g.time !== "string" || !TIME.test(g.time)) return `${at}: "time" must be a date and time (YYYY-MM-DDTHH:MM)`;
  if (!isObject(g.fields)) return `${at}: "fields" must be an object`;
  for (const [k, v] of Object.entries(g.fields)) {
    const why = fieldCheck("blood_gas", k, v);
    if (why) return `${at}: ${why}`;
  }
  if (!Array.isArray(g.events) || g.events.length > EVENTS.length || !g.events.every((e) => EVENT_WORDS.has(e))) {
    return `${at}: "events" must be a list of ${[...EVENT_WORDS].join(", ")}`;
  }
  if (new Set(g.events).size !== g.events.length) return `${at}: "events" repeats a word`;
  return "";
}

// Why a course is not acceptable, or "" when it is.
export function courseProblem(c, index) {
  const at = `course ${index + 1}`;
  if (!isObject(c)) return `${at} is not an object`;
  const extra = Object.keys(c).find((k) => !KEYS.has(k));
  if (extra !== undefined) return `${at} has an unknown entry "${extra.slice(0, 40)}"`;
  if (typeof c.id !== "string" || !ID.test(c.id)) return `${at}: "id" must be a short text of letters, digits and dashes`;
  if (typeof c.label !== "string" || c.label.length > 200) return `${at}: "label" must be a text of at most 200 characters`;
  for (const k of ["created", "changed"]) {
    if (!Number.isFinite(c[k]) || c[k] < 0 || c[k] > MAX_TIME) return `${at}: "${k}" must be a number (milliseconds since 1970)`;
  }
  const why = patientProblem(c.patient);
  if (why) return `${at}: ${why}`;
  if (!Array.isArray(c.gases) || c.gases.length > MAX_GASES) return `${at}: "gases" must be a list of at most ${MAX_GASES}`;
  const ids = new Set();
  for (const [j, g] of c.gases.entries()) {
    const problem = gasProblem(g, j);
    if (problem) return `${at}: ${problem}`;
    if (ids.has(g.id)) return `${at}: gas ${j + 1} repeats the id ${g.id}`;
    ids.add(g.id);
  }
  return "";
}
