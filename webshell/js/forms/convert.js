// The unit converter screen (DOM only). It sends {"calc": "convert", ...} to the engine and shows the
// core's answer; it never converts anything itself. Values typed before the engine is ready are kept
// and calculated as soon as it is; a failed engine keeps them for the Retry.

import { formatValue, parseNumber } from "../format.js";

// Units and substances the core's units.py accepts (tests/browser checks this list against it).
export const UNIT_GROUPS = [
  ["Pressure", ["mmHg", "kPa", "hPa", "Pa", "bar", "psi", "cmH2O"]],
  ["Amount concentration", ["mmol/L", "umol/L", "mEq/L"]],
  ["Mass concentration", ["g/L", "g/dL", "mg/dL", "mg/L"]],
  ["Osmolality", ["mOsm/kg"]],
  ["Temperature", ["degC", "degF", "K"]],
  ["Length and altitude", ["m", "km", "ft", "cm", "in"]],
  ["Mass", ["kg", "g", "lb"]],
  ["Volume", ["L", "mL"]],
  ["Flow", ["L/min", "mL/min"]],
  ["Time", ["min", "s", "h"]],
  ["Fraction", ["1", "%"]],
];
export const SUBSTANCES = [
  "glucose", "urea", "bun", "lactate", "phosphate", "hb", "sodium", "potassium", "chloride",
  "bicarbonate", "calcium", "magnesium", "creatinine",
];
const SUBSTANCE_LABELS = { bun: "blood urea nitrogen (BUN)", hb: "haemoglobin (per haem)" };

function fillUnits(select, chosen) {
  for (const [label, units] of UNIT_GROUPS) {
    const group = document.createElement("optgroup");
    group.label = label;
    for (const unit of units) {
      const option = new Option(unit, unit, false, unit === chosen);
      group.append(option);
    }
    select.append(group);
  }
}

export function mount(root, engine) {
  const form = root.querySelector("#convert-form");
  const value = root.querySelector("#convert-value");
  const from = root.querySelector("#convert-from");
  const to = root.querySelector("#convert-to");
  const substance = root.querySelector("#convert-substance");
  const answer = root.querySelector("#convert-answer");
  const result = root.querySelector("#convert-result");
  const note = root.querySelector("#convert-note");
  const errors = root.querySelector("#convert-errors");
  const stepsBox = root.querySelector("#convert-steps-box");
  const steps = root.querySelector("#convert-steps");

  fillUnits(from, "kPa");
  fillUnits(to, "mmHg");
  substance.append(new Option("none", ""));
  for (const name of SUBSTANCES) substance.append(new Option(SUBSTANCE_LABELS[name] || name, name));

  let sequence = 0;
  let wanted = false; // the user has asked for an answer (typed or pressed Convert)

  function request() {
    const inputs = { quantity: { unit: from.value }, to: to.value };
    const parsed = parseNumber(value.value);
    if (parsed !== undefined) inputs.quantity.value = parsed;
    if (substance.value) inputs.substance = substance.value;
    return { calc: "convert", inputs };
  }

  function show(state, text, noteText = "") {
    answer.dataset.state = state;
    result.textContent = text;
    note.textContent = noteText;
  }

  function clearDetails() {
    errors.replaceChildren();
    steps.replaceChildren();
    stepsBox.hidden = true;
    delete result.dataset.value;
    delete result.dataset.unit;
  }

  function render(response) {
    clearDetails();
    if (!response.ok) {
      show("error", "No result", "Check the values below.");
      for (const error of response.errors) {
        const item = document.createElement("li");
        item.textContent = error.message;
        item.dataset.code = error.code;
        item.dataset.field = error.field;
        errors.append(item);
      }
      return;
    }
    const out = response.outputs.result;
    const decimals = response.display ? response.display.result : undefined;
    result.dataset.value = String(out.value);
    result.dataset.unit = out.unit;
    result.title = `${out.value} ${out.unit} (full precision)`;
    show("done", `${formatValue(out.value, decimals)} ${out.unit}`);
    for (const s of response.steps) {
      const item = document.createElement("li");
      const resultText = typeof s.result === "object" ? `${formatValue(s.result.value)} ${s.result.unit}` : formatValue(s.result);
      item.textContent = `${s.label}: ${s.formula} = ${resultText} (source: ${s.source})`;
      steps.append(item);
    }
    stepsBox.hidden = response.steps.length === 0;
  }

  async function calculate() {
    const mine = ++sequence;
    wanted = true;
    if (engine.state === "failed") {
      clearDetails();
      show("waiting", "", "The engine is not running; your values are kept. Press Retry above.");
      return;
    }
    if (engine.state !== "ready") {
      clearDetails();
      show("waiting", "", "Will calculate as soon as the engine is ready.");
    }
    try {
      const response = await engine.compute(request());
      if (mine === sequence) render(response);
    } catch (err) {
      if (mine === sequence) {
        clearDetails();
        show("waiting", "", `${err.message} Your values are kept.`);
      }
    }
  }

  let timer = 0;
  const soon = () => {
    clearTimeout(timer);
    timer = setTimeout(calculate, 150);
  };
  form.addEventListener("submit", (event) => {
    event.preventDefault();
    clearTimeout(timer);
    calculate();
  });
  value.addEventListener("input", soon);
  for (const select of [from, to, substance]) select.addEventListener("change", soon);
  engine.addEventListener("state", (event) => {
    // after a Retry, calculate what was typed while the engine was down
    if (event.detail.state === "ready" && wanted && answer.dataset.state === "waiting") calculate();
  });
}
