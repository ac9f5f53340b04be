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
