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

// The core decides display rounding (response.display); without it, six significant digits.
export function formatValue(value, decimals) {
  if (typeof value !== "number") return String(value);
  if (Number.isInteger(decimals)) return value.toFixed(decimals);
  return String(Number(value.toPrecision(6)));
}
