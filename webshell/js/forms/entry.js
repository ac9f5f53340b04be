// Entry safety for the forms, shell side: the questions Tidewell asks instead of guessing, errors held back
// while a value is being typed, the local draft, and "New patient". No clinical arithmetic here.

// "8,000", "1,500", "7,350": a comma followed by exactly three digits is a thousands separator in one
// convention and a decimal comma in another. Never guessed: the form asks, offering both readings.
const THOUSANDS_OR_DECIMAL = /^([+-]?\d{1,3}),(\d{3})$/;

// -> null, or the two readings [as thousands, as a decimal] as text to put back in the field
export function commaReadings(text) {
  const m = THOUSANDS_OR_DECIMAL.exec(String(text).trim());
  if (!m) return null;
  const thousands = String(Number(m[1] + m[2]));
  const decimal = `${m[1]}.${m[2]}`;
  return [thousands, decimal];
}

// Errors under a field wait until the user pauses (HOLD_MS after the last keystroke) or leaves the field:
// "PCO2 1 kPa is not survivable" must never flash up after the first digit of 10.2.
export const HOLD_MS = 1500;

// -- the draft: what is typed, kept on this device until New patient (a reload or a killed tab loses nothing)
const DRAFT_KEY = "tidewell:draft";

export function readDraft() {
  try {
    const draft = JSON.parse(localStorage.getItem(DRAFT_KEY) || "null");
    return draft && draft.v === 1 && typeof draft.panels === "object" ? draft.panels : {};
  } catch {
    return {};
  }
}

export function writeDraft(panels) {
  const kept = {};
  for (const [name, panel] of Object.entries(panels)) {
    const values = panel.values();
    if (Object.keys(values).length) kept[name] = values;
  }
  try {
    if (Object.keys(kept).length) localStorage.setItem(DRAFT_KEY, JSON.stringify({ v: 1, panels: kept }));
    else localStorage.removeItem(DRAFT_KEY);
  } catch {
    // storage refused (private mode, full): the form still works, only the draft is not kept
  }
}

export function clearDraft() {
  try {
    localStorage.removeItem(DRAFT_KEY);
  } catch {
    // nothing kept, nothing to clear
  }
}

// A case label that looks like it identifies someone: a soft warning, never a refusal (the label is free
// text, and a false alarm must not stop a save). Dates, long numbers, titles and "First Last" names.
const LOOKS_LIKE = [
  [/\b\d{1,2}\s?[/.-]\s?\d{1,2}\s?[/.-]\s?\d{2,4}\b|\b(19|20)\d{2}-\d{2}-\d{2}\b|\b(dob|d\.o\.b|born|date of birth)\b/i, "a date"],
  [/\b(mrn|nhs|hospital number|record|urn|chi)\b|\b[a-z]{0,3}\d{6,}\b|\b\d{3}\s\d{3}\s\d{4}\b/i, "a record number"],
  [/\b(mr|mrs|ms|miss|dr|mx)\.?\s+[a-z]|\b[A-Z][a-z]+\s[A-Z][a-z]+\b|\bname\b/, "a name"],
];

export function identifierWarning(label) {
  const found = LOOKS_LIKE.filter(([re]) => re.test(label)).map(([, what]) => what);
  if (!found.length) return "";
  return `This label may contain ${found.join(" and ")}. Cases must identify nobody: use something like ` +
    `"bay 3, 02:10, second gas". You can still save.`;
}
