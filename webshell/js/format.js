// Text <-> number for the forms. Formatting only: no clinical arithmetic happens in the shell.

// "6.5", "6,5", " -3 ", "1e3" -> number; "" -> undefined; anything else is passed on as text so that
// the core can say what is wrong with it (not_a_number) in its own words.
export function parseNumber(text) {
  const trimmed = text.trim();
  if (trimmed === "") return undefined;
  const dotted = trimmed.includes(".") ? trimmed : trimmed.replace(",", ".");
  if (/^[+-]?(\d+\.?\d*|\.\d+)(e[+-]?\d+)?$/i.test(dotted)) {
    const n = Number(dotted);
    if (Number.isFinite(n)) return n;
  }
  return trimmed;
}

// mmHg in one kPa (1 mmHg = 133.322387415 Pa, the conventional millimetre of mercury)
export const MMHG_PER_KPA = 1000 / 133.322387415;

// A P/F ratio shown in the user's pressure unit, the other unit beside it: the contract fixes the
// blood_gas `pf_ratio` in mmHg, the alveolar_gas one follows the request's unit; either way a kPa user
// reads kPa first (1 dp) and mmHg whole beside it. Unit conversion only.
export function pfShown(quantity, unit) {
  const mmhg = quantity.unit === "kPa" ? quantity.value * MMHG_PER_KPA : quantity.value;
  const kpa = quantity.unit === "kPa" ? quantity.value : quantity.value / MMHG_PER_KPA;
  if (unit === "kPa") return { unit: "kPa", text: `${kpa.toFixed(1)} kPa`, aside: `${mmhg.toFixed(0)} mmHg` };
  return { unit: "mmHg", text: `${mmhg.toFixed(0)} mmHg`, aside: "" };
}

// The core decides display rounding (response.display); without it, six significant digits.
export function formatValue(value, decimals) {
  if (typeof value !== "number") return String(value);
  if (Number.isInteger(decimals)) return value.toFixed(decimals);
  return String(Number(value.toPrecision(6)));
}
