// One calculation panel: the entry form, the request it sends, and the report of the core's answer.
// DOM only: every number shown is the core's, formatted to the core's `display` decimals.

import { formatValue, parseNumber, pfShown } from "../format.js";
import { settings } from "../settings.js";
import { drawPictures, shareBar } from "./pictures.js";
import { HOLD_MS, commaReadings, identifierWarning } from "./entry.js";
import { outputLabel, unitWord, valueWord } from "./labels.js";

export const el = (tag, props = {}, ...children) => {
  const node = document.createElement(tag);
  for (const [key, value] of Object.entries(props)) {
    if (key === "class") node.className = value;
    else if (key.startsWith("data-") || key.startsWith("aria-") || key === "for" || key === "role") {
      node.setAttribute(key, value);
    } else node[key] = value;
  }
  for (const child of children) if (child !== null && child !== undefined) node.append(child);
  return node;
};

const SEVERITY = {
  urgent: ["Act now", "sev-urgent"],
  notable: ["Worth a look", "sev-notable"],
  info: ["For the record", "sev-info"],
};

// the general caution said once for the whole app (the footer), never again in each report
const ONCE = /^Decision support only\b/;

function findingList(findings, name) {
  const list = el("ul", { class: "findings", "aria-label": name });
  for (const f of findings) {
    const [word, cls] = SEVERITY[f.severity] || [f.severity, "sev-info"];
    list.append(el("li", { class: `finding ${cls}`, "data-code": f.code, "data-severity": f.severity },
      el("span", { class: "sev-mark", "aria-hidden": "true" }),
      el("strong", { class: "sev-word" }, `${word}: `), f.text));
  }
  return list;
}

function quantityText(value, decimals) {
  if (value && typeof value === "object" && "value" in value && "unit" in value && typeof value.value === "number") {
    const unit = unitWord(value.unit);
    return unit ? `${formatValue(value.value, decimals)} ${unit}` : formatValue(value.value, decimals);
  }
  if (typeof value === "number") return formatValue(value, decimals);
  if (typeof value === "boolean") return value ? "yes" : "no";
  return valueWord(value);
}

// the P/F ratios, shown in the user's pressure unit with the other beside (format.js, pfShown)
const PF_LABELS = { pf_ratio: "P/F", pf_ratio_altitude_corrected: "P/F corrected for altitude" };
const isQuantity = (v) => v && typeof v === "object" && typeof v.value === "number" && typeof v.unit === "string";

// outputs -> [path, shown text, raw value, smaller text beside, label] rows (the last two for P/F only);
// lists of numbers (curves) are drawn, not listed
export function flatten(name, value, decimals, unit = settings.pressureUnit) {
  if (value === null || value === undefined) return [];
  if (name in PF_LABELS && isQuantity(value)) {
    const shown = pfShown(value, unit);
    return [[name, shown.text, value.value, shown.aside, `${PF_LABELS[name]} (${shown.unit})`]];
  }
  if (Array.isArray(value)) {
    if (value.every((v) => v && typeof v === "object" && "code" in v)) {
      const text = value.length === 0 ? "none" : value.map((d) =>
        [valueWord(d.code), d.role && `(${valueWord(d.role)}${d.chronicity ? `, ${valueWord(d.chronicity)}` : ""})`]
          .filter(Boolean).join(" ")).join("; ");
      return [[name, text, text]];
    }
    return [];
  }
  if (typeof value === "object" && "value" in value && "unit" in value) {
    return Array.isArray(value.value) ? [] : [[name, quantityText(value, decimals), value.value]];
  }
  if (typeof value === "object") {
    if ("low" in value && "high" in value && Object.keys(value).length === 2) {
      const low = value.low, high = value.high;
      const unit = typeof low === "object" ? ` ${unitWord(low.unit)}` : "";
      const num = (v) => formatValue(typeof v === "object" ? v.value : v, decimals);
      return [[name, `${num(low)} to ${num(high)}${unit}`, `${num(low)}..${num(high)}`]];
    }
    return Object.entries(value).flatMap(([k, v]) => flatten(`${name}.${k}`, v, decimals));
  }
  return [[name, quantityText(value, decimals), value]];
}

let panelCount = 0;

export class Panel {
  constructor(host, name, spec, engine, hooks) {
    this.name = name;
    this.spec = spec;
    this.engine = engine;
    this.hooks = hooks;
    this.sequence = 0;
    this.last = null;
    this.sure = null; // the "How sure" line of the report shown (blood gas only): see showSure()
    this.sureInFlight = false; // at most one uncertainty calculation in the worker at a time
    this.surePending = null; // the newest report's sample, waiting for the one in flight
    this.inputs = {};
    const id = `p-${name}`;
    this.id = id;
    panelCount += 1;

    this.root = el("article", { class: "panel", id, "data-calc": name, "aria-labelledby": `${id}-title` });
    this.root.append(el("h3", { id: `${id}-title` }, spec.title));
    this.form = el("form", { class: "calc-form", autocomplete: "off", noValidate: true });
    const main = el("div", { class: "fields" });
    this.moreSummary = el("summary", {}, "More inputs (optional)");
    const more = el("details", { class: "more" }, this.moreSummary);
    this.more = more;
    const moreFields = el("div", { class: "fields" });
    more.append(moreFields);
    for (const field of spec.fields) (field[3] ? moreFields : main).append(this.makeField(...field));
    // once a reading is ready, its headline shows here too, next to the values being typed
    this.near = el("p", { class: "near-headline", hidden: true });
    this.form.append(main, this.near, more);
    this.form.addEventListener("submit", (e) => e.preventDefault());
    this.lastTyped = 0;
    this.form.addEventListener("input", () => { this.lastTyped = performance.now(); this.soon(); });
    // text fields recompute on input; "change" only for selectors and tick boxes (a blur is no edit)
    this.form.addEventListener("change", (e) => { if (e.target.type !== "text") this.soon(); });
    // leaving a field shows the notes held back while it was being typed
    this.form.addEventListener("focusout", () => setTimeout(() => this.releaseHeld(), 0));

    this.report = el("div", { class: "report", id: `${id}-report`, "data-state": "idle", "aria-live": "polite" });
    this.status = el("span", { class: "muted", "aria-live": "polite" }); // Copied, Copy refused
    this.root.append(this.form, this.report);
    if (spec.save) {
      const lid = `${id}-label`;
      const labelInput = el("input", { type: "text", id: lid, class: "case-label", maxLength: 200,
        placeholder: "e.g. bay 3, second gas", "aria-describedby": `${lid}-hint` });
      const save = el("button", { type: "button", class: "save", id: `${id}-save` }, "Save to case log");
      this.saveButton = save;
      this.saveStatus = el("p", { class: "save-status muted", role: "status" });
      // a soft warning (saving still works): the label looks like a name, a date or a record number
      const warn = el("p", { class: "label-warning", id: `${lid}-warn`, "aria-live": "polite" });
      labelInput.addEventListener("input", () => {
        warn.textContent = identifierWarning(labelInput.value);
        this.resetSave();
      });
      // one save per change: the button says "Saved" and waits for the next change (a double tap saves once)
      save.addEventListener("click", async () => {
        if (save.disabled) return;
        save.disabled = true;
        const saved = await this.hooks.save(this, labelInput.value, this.saveStatus);
        if (saved) {
          save.textContent = "Saved";
          save.dataset.saved = "1";
        } else save.disabled = false;
      });
      this.saveRow = el("div", { class: "save-row", hidden: true },
        el("label", { for: lid }, "Case label"),
        el("p", { class: "hint", id: `${lid}-hint` }, "No names, dates of birth or record numbers."),
        el("div", { class: "entry" }, labelInput, save), warn, this.saveStatus);
      this.root.append(this.saveRow);
    }
    host.append(this.root);
    this.renderIdle();
    engine.addEventListener("state", (event) => {
      if (event.detail.state === "ready" && this.report.dataset.state === "waiting") this.calculate();
    });
    settings.addEventListener("pressure", () => {
      for (const [key, input] of Object.entries(this.inputs)) {
        if (input.kind === "P" && input.text.value.trim() === "") input.unit.value = settings.pressureUnit;
        void key;
      }
      if (this.hasRequired()) this.calculate();
    });
  }

  makeField(name, text, kind) {
    const fid = `${this.id}-${name}`;
    const box = el("div", { class: "field", "data-input": name });
    const entry = { kind, name };
    if (kind === "yes") {
      const check = el("input", { type: "checkbox", id: fid, name });
      box.classList.add("field-check");
      box.append(el("label", { for: fid }, check, " ", text));
      entry.check = check;
    } else if (typeof kind === "string" && kind.startsWith("w:")) {
      const select = el("select", { id: fid, name });
      select.append(new Option("not given", ""));
      for (const word of kind.slice(2).split(",")) select.append(new Option(word, word));
      box.append(el("label", { for: fid }, text), select);
      entry.select = select;
    } else {
      const row = el("div", { class: "entry" });
      const input = el("input", { id: fid, name, type: "text", inputMode: "decimal", spellcheck: false,
        "aria-describedby": `${fid}-error` });
      row.append(input);
      entry.text = input;
      let units = null;
      if (kind === "P") units = ["kPa", "mmHg"];
      else if (kind === "fio2") units = ["fraction", "%"];
      else if (Array.isArray(kind)) units = kind;
      const label = el("label", { for: fid }, text);
      if (units) {
        const select = el("select", { id: `${fid}-unit`, "aria-label": `${text} unit`, class: "unit" });
        for (const u of units) select.append(new Option(unitWord(u) || u, u));
        if (kind === "P") select.value = settings.pressureUnit;
        if (units.length === 1) select.disabled = true;
        entry.unit = select;
        // the unit sits on the label's line (or just under a long label), so the value has the
        // field's whole width: a phone column must show all of "10.25" as it is typed
        box.append(el("div", { class: "field-head" }, label, select), row);
      } else {
        box.append(label, row);
      }
    }
    // a question instead of a guess ("8,000"), and a "did you mean" to apply with one tap; the notes are
    // one block, so a row of fields lines up its labels, its values and its notes (app.css)
    entry.ask = el("div", { class: "ask", "data-ask": name, hidden: true });
    entry.offer = el("div", { class: "offer", hidden: true });
    box.append(el("div", { class: "field-notes" },
      el("p", { class: "field-error", id: `${fid}-error`, role: "alert" }), entry.ask, entry.offer));
    entry.label = text;
    this.inputs[name] = entry;
    return box;
  }

  // what the user typed, kept as text (the case log stores this, and reopens it)
  values() {
    const out = {};
    for (const [name, entry] of Object.entries(this.inputs)) {
      if (entry.check) { if (entry.check.checked) out[name] = true; }
      else if (entry.select) { if (entry.select.value) out[name] = entry.select.value; }
      else if (entry.text.value.trim() !== "") {
        out[name] = entry.unit ? [entry.text.value, entry.unit.value] : entry.text.value;
      }
    }
    return out;
  }

  // a change (a value, the label, a new reading) makes the case savable again
  resetSave() {
    if (!this.saveButton || !this.saveButton.dataset.saved) return;
    this.saveButton.disabled = false;
    this.saveButton.textContent = "Save to case log";
    delete this.saveButton.dataset.saved;
    this.saveStatus.textContent = "";
  }

  // how many optional inputs hold a value: said on the collapsed "More inputs" so none is forgotten
  updateMore() {
    const v = this.values();
    const n = this.spec.fields.filter((f) => f[3] && v[f[0]] !== undefined).length;
    this.moreSummary.textContent = n ? `More inputs (${n} set)` : "More inputs (optional)";
    this.more.dataset.set = String(n);
  }

  // empty every field (New patient): no value, no note, no answer, nothing in flight drawn later
  clear() {
    this.sequence++;
    clearTimeout(this.timer);
    clearTimeout(this.sureTimer);
    clearTimeout(this.holdTimer);
    for (const entry of Object.values(this.inputs)) {
      if (entry.check) entry.check.checked = false;
      else if (entry.select) entry.select.value = "";
      else {
        entry.text.value = "";
        if (entry.unit) entry.unit.value = entry.kind === "P" ? settings.pressureUnit : entry.unit.options[0].value;
      }
    }
    this.more.open = false;
    this.clearErrors();
    this.showAsks([]);
    this.last = null;
    this.sure = null;
    this.renderIdle();
    delete this.report.dataset.busy;
    if (this.saveRow) {
      this.saveRow.hidden = true;
      this.saveRow.querySelector(".case-label").value = "";
      this.saveRow.querySelector(".label-warning").textContent = "";
      this.resetSave();
    }
    this.status.textContent = "";
    this.updateMore();
  }

  // the typed text and unit of one field, as a "did you mean" offers them: {value, unit?}
  apply(name, suggestion) {
    const entry = this.inputs[name];
    if (!entry || !entry.text) return;
    entry.text.value = String(suggestion.value);
    if (entry.unit) {
      let unit = suggestion.unit;
      if (entry.kind === "fio2" && (unit === undefined || unit === "1")) unit = "fraction";
      if (unit && [...entry.unit.options].some((o) => o.value === unit)) entry.unit.value = unit;
    }
    if (this.hooks.changed) this.hooks.changed(this);
    this.calculate();
  }

  fill(values) {
    for (const [name, entry] of Object.entries(this.inputs)) {
      const v = values[name];
      if (entry.check) entry.check.checked = v === true;
      else if (entry.select) entry.select.value = typeof v === "string" ? v : "";
      else if (Array.isArray(v)) { entry.text.value = v[0]; if (entry.unit) entry.unit.value = v[1]; }
      else {
        entry.text.value = typeof v === "string" ? v : "";
        if (entry.kind === "P") entry.unit.value = settings.pressureUnit;
      }
    }
    const optional = this.spec.fields.some((f) => f[3] && values[f[0]] !== undefined);
    this.form.querySelector("details.more").open = optional;
    this.updateMore();
    if (this.hooks.changed) this.hooks.changed(this);
    this.calculate();
  }

  request() {
    const inputs = {};
    for (const [name, v] of Object.entries(this.values())) {
      const entry = this.inputs[name];
      if (v === true || entry.select) inputs[name] = v;
      else if (Array.isArray(v)) {
        const number = parseNumber(v[0]);
        inputs[name] = v[1] === "fraction" ? number : { value: number, unit: v[1] };
      } else inputs[name] = parseNumber(v);
    }
    return { calc: this.name, inputs, options: { pressure_unit: settings.pressureUnit } };
  }

  hasRequired() {
    const v = this.values();
    return this.spec.required.every((name) => v[name] !== undefined);
  }

  soon() {
    // an edit makes any calculation still in flight stale: it must neither draw its answer nor clear busy
    this.sequence++;
    this.report.dataset.busy = "1";
    clearTimeout(this.timer);
    clearTimeout(this.sureTimer); // an edit cancels the how-sure run that was about to start
    this.timer = setTimeout(() => this.calculate(), 250);
    this.updateMore();
    if (this.hooks.changed) this.hooks.changed(this);
  }

  // "8,000": which reading? Each ambiguous field shows the question and one button per reading.
  showAsks(asks) {
    const asked = new Map(asks);
    for (const [name, entry] of Object.entries(this.inputs)) {
      if (!entry.ask) continue;
      const readings = asked.get(name);
      entry.ask.hidden = !readings;
      if (!readings) { entry.ask.replaceChildren(); continue; }
      const unit = entry.unit && entry.unit.value !== "fraction" ? ` ${unitWord(entry.unit.value)}` : "";
      const typed = entry.text.value.trim();
      const buttons = readings.map((r) => {
        const b = el("button", { type: "button", class: "use", "data-reading": r }, `${r}${unit}`);
        b.addEventListener("click", () => this.apply(name, { value: r, unit: entry.unit && entry.unit.value }));
        return b;
      });
      entry.ask.replaceChildren(el("p", {}, `"${typed}" can be read two ways. Which did you mean?`), ...buttons);
    }
  }

  // a field's notes are held back while the user is still typing in it (see HOLD_MS)
  holding(name) {
    const box = this.form.querySelector(`[data-input="${CSS.escape(name)}"]`);
    return Boolean(box && box.contains(document.activeElement) && performance.now() - this.lastTyped < HOLD_MS);
  }

  releaseHeld() {
    const held = [...this.form.querySelectorAll(".field-error[data-held]")];
    const still = held.filter((p) => this.holding(p.closest("[data-input]").dataset.input));
    for (const p of held) {
      if (still.includes(p)) continue;
      delete p.dataset.held;
      p.hidden = false;
      const box = p.closest("[data-input]");
      box.querySelector("input, select:not(.unit)").setAttribute("aria-invalid", "true");
      box.querySelector(".offer").hidden = !box.querySelector(".offer").childElementCount;
    }
    const none = this.report.querySelector(".report-none");
    if (none && !still.length) none.textContent = "No reading yet: see the notes at the fields.";
    if (still.length) {
      clearTimeout(this.holdTimer);
      this.holdTimer = setTimeout(() => this.releaseHeld(), HOLD_MS - (performance.now() - this.lastTyped) + 20);
    }
  }

  showNear(headline) {
    if (!headline) { this.near.hidden = true; return; }
    const go = el("a", { href: `#${this.id}-report`, class: "near-go" }, "Report below");
    go.addEventListener("click", (e) => {
      e.preventDefault();
      this.report.scrollIntoView({ block: "start", behavior: "smooth" });
    });
    this.near.replaceChildren(el("strong", {}, "Reading: "), headline, " ", go);
    this.near.hidden = false;
    // in sight beside the field being typed: scrolled up just enough to clear a bottom bar, never so far
    // that the field itself leaves the screen
    const active = document.activeElement;
    if (!active || !this.form.contains(active)) return;
    const bar = document.querySelector(".screens-nav")?.getBoundingClientRect();
    const limit = bar && bar.top > innerHeight / 2 ? Math.min(bar.top, innerHeight) : innerHeight;
    const over = this.near.getBoundingClientRect().bottom - limit + 8;
    const room = active.getBoundingClientRect().top - 8;
    if (over > 0 && room > 0) window.scrollBy({ top: Math.min(over, room) });
  }

  renderIdle() {
    if (this.near) this.near.hidden = true;
    const names = this.spec.required.map((n) => this.spec.fields.find((f) => f[0] === n)[1]);
    this.report.dataset.state = "idle";
    this.report.replaceChildren(el("p", { class: "muted" }, `Enter ${names.join(", ")} to see the reading.`));
  }

  clearErrors() {
    for (const p of this.form.querySelectorAll(".field-error")) {
      p.textContent = "";
      p.hidden = false;
      delete p.dataset.held;
      delete p.dataset.code;
    }
    for (const o of this.form.querySelectorAll(".offer")) { o.replaceChildren(); o.hidden = true; }
    for (const i of this.form.querySelectorAll("[aria-invalid]")) i.removeAttribute("aria-invalid");
  }

  async calculate() {
    clearTimeout(this.timer);
    clearTimeout(this.sureTimer);
    const mine = ++this.sequence;
    this.report.dataset.busy = "1";

    // a comma before exactly three digits is never guessed: ask, and send nothing until answered
    const asks = [];
    for (const [name, entry] of Object.entries(this.inputs)) {
      const readings = entry.text && commaReadings(entry.text.value);
      if (readings) asks.push([name, readings]);
    }
    this.showAsks(asks);
    if (asks.length) {
      this.clearErrors();
      this.last = null;
      if (this.saveRow) this.saveRow.hidden = true;
      const names = asks.map(([n]) => this.inputs[n].label).join(", ");
      this.report.dataset.state = "ask";
      this.report.replaceChildren(el("p", { class: "report-ask" },
        `No reading yet: ${names} can be read two ways. Tap the value you meant at the field.`));
      delete this.report.dataset.busy;
      return;
    }

    if (!this.hasRequired()) {
      this.clearErrors();
      this.last = null;
      this.renderIdle();
      delete this.report.dataset.busy;
      return;
    }
    const request = this.request();
    if (this.engine.state !== "ready") {
      this.report.dataset.state = "waiting";
      this.report.replaceChildren(el("p", { class: "muted" }, this.engine.state === "failed"
        ? "The engine is not running; your values are kept. Press Retry above."
        : "Your values are kept; the reading appears as soon as the engine is ready."));
      if (this.engine.state === "failed") return;
    }
    let response;
    try {
      response = await this.engine.compute(request);
    } catch (err) {
      if (mine !== this.sequence) return;
      this.report.dataset.state = "waiting";
      this.report.dataset.engineError = "1"; // an engine fault, not the ordinary wait for start-up
      delete this.report.dataset.busy;
      this.report.replaceChildren(el("p", { class: "report-engine-error", role: "alert" },
        `${err.message} Your values are kept.`));
      return;
    }
    if (mine !== this.sequence) return;
    // The main report is shown first, alone. The pictures' calculations (the curve, the profile) and the
    // how-sure line need numpy, which the worker loads on first use: they are only asked for in a later
    // task, once this report is on the screen, so numpy never sits on the path to the first reading.
    this.render(request, response);
    if (this.saveRow) this.saveRow.hidden = !response.ok;
    if (!response.ok) {
      delete this.report.dataset.busy;
      return;
    }
    await new Promise((resolve) => setTimeout(resolve, 0));
    if (mine !== this.sequence) return;
    const extra = this.hooks.extraRequests ? this.hooks.extraRequests(this.name, request) : [];
    if (extra.length) {
      // a picture that cannot be drawn is left out; it never takes the report down with it
      const more = await Promise.all(extra.map((r) => this.engine.compute(r).catch(() => null)));
      if (mine !== this.sequence) return;
      this.showPictures(request, response, more);
    }
    delete this.report.dataset.busy;
    if (this.spec.howSure) {
      this.sureTimer = setTimeout(() => this.askSure(mine, request), this.spec.howSure.delayMs);
    }
  }

  // -- the "How sure" line (blood gas) --
  // Decision (docs/screens.md, "How sure"): run automatically, in the background, after each report,
  // rather than behind a button. Why: the line matters most exactly when nobody thinks to ask (a reading
  // near a threshold), and it costs no extra download: the curve picture has loaded numpy by then. What
  // keeps it from slowing the report: (1) it is asked for only after the report and its pictures are
  // shown, so numpy is never loaded before the first reading; (2) it waits a further quiet spell
  // (spec.howSure.delayMs) that any edit cancels, so typing does not queue Monte Carlo runs in the
  // worker; (3) at most one runs at a time (0.15 to 0.6 s of worker time in Pyodide, measured): a newer
  // report's request waits for it and only the newest is sent; (4) an answer whose report has been
  // replaced is dropped (the panel's sequence counter), so a stale line never overwrites a newer one.
  askSure(mine, request) {
    if (mine !== this.sequence || !this.sure) return;
    if (this.sureInFlight) {
      this.surePending = { mine, request };
      return;
    }
    this.sureInFlight = true;
    const spec = this.spec.howSure;
    // the uncertainty calculation takes the blood_gas inputs object unchanged as its `sample`; draws and
    // seed are left to the core's defaults (10,000 draws, a fixed seed), so the same sample always gives
    // the same line
    const sureRequest = { calc: spec.calc, inputs: { sample: request.inputs }, options: request.options };
    this.showSure(mine, "working");
    this.engine.compute(sureRequest).then(
      (answer) => this.showSure(mine, answer.ok ? "done" : "error", answer),
      (err) => this.showSure(mine, "error", { errors: [{ message: err.message }] }),
    ).catch((err) => {
      // a response the line cannot show: a quiet line, never a broken report
      this.showSure(mine, "error", { errors: [{ message: String((err && err.message) || err) }] });
    }).finally(() => {
      this.sureInFlight = false;
      const next = this.surePending;
      this.surePending = null;
      if (next) this.askSure(next.mine, next.request);
    });
  }

  showSure(mine, state, answer) {
    const box = this.sure;
    if (mine !== this.sequence || !box) return; // a newer report has replaced this one: drop the answer
    const spec = this.spec.howSure;
    box.dataset.state = state;
    delete box.dataset.probability;
    const parts = [];
    if (state === "working") {
      parts.push(el("p", { class: "sure-line muted" }, spec.working));
    } else if (state === "error") {
      const first = (answer.errors || [])[0];
      parts.push(el("p", { class: "sure-line muted" },
        `${spec.unavailable}${first && first.message ? ` (${first.message})` : ""}. ${spec.unaffected}`));
    } else {
      const o = answer.outputs;
      const reading = o.reading || {};
      if (typeof reading.probability === "number") {
        box.dataset.probability = String(reading.probability);
        parts.push(shareBar(reading.probability));
      }
      parts.push(el("p", { class: "sure-line" }, String(o.how_sure || `${spec.unavailable}.`)));
      for (const f of answer.findings || []) {
        if (!spec.findings.includes(f.code)) continue;
        const [word, cls] = SEVERITY[f.severity] || [f.severity, "sev-info"];
        parts.push(el("p", { class: `sure-flag ${cls}`, "data-code": f.code, "data-severity": f.severity },
          el("strong", {}, `${word}: `), f.text));
      }
      parts.push(el("p", { class: "sure-note muted" }, spec.note));
      if ((answer.cautions || []).length) {
        const more = el("details", { class: "sure-more" }, el("summary", {}, spec.moreTitle));
        const ul = el("ul");
        for (const c of answer.cautions) ul.append(el("li", {}, c));
        more.append(ul);
        parts.push(more);
      }
    }
    box.replaceChildren(...parts);
  }

  showPictures(request, response, more) {
    const pics = drawPictures(this.spec.pictures || [], response, more, request);
    const old = this.report.querySelector(".pictures, .pictures-slot");
    if (!old) return;
    old.replaceWith(pics || el("div", { class: "pictures-slot", hidden: true }));
  }

  render(request, response, more = []) {
    delete this.report.dataset.engineError;
    this.near.hidden = true;
    this.clearErrors();
    const out = [];
    this.sure = null;
    if (!response.ok) {
      this.last = null;
      const loose = el("ul", { class: "errors" });
      for (const error of response.errors) {
        const name = (error.field || "").startsWith("inputs.") ? error.field.slice(7).split(".")[0] : "";
        const box = name && this.form.querySelector(`[data-input="${CSS.escape(name)}"]`);
        if (box) {
          const p = box.querySelector(".field-error");
          p.textContent = p.textContent ? `${p.textContent} ${error.message}` : error.message;
          p.dataset.code = error.code;
          const offer = box.querySelector(".offer");
          if (error.suggest && typeof error.suggest.value === "number" && this.inputs[name].text) {
            const b = el("button", { type: "button", class: "use", "data-action": "use-suggestion" },
              `Use ${suggestionText(error.suggest, this.inputs[name])}`);
            b.addEventListener("click", () => this.apply(name, error.suggest));
            offer.replaceChildren(b);
          }
          if (this.holding(name)) {
            // still being typed: say nothing yet (released on a pause or when the field is left)
            p.hidden = true;
            p.dataset.held = "1";
            offer.hidden = true;
          } else {
            box.querySelector("input, select:not(.unit)").setAttribute("aria-invalid", "true");
            offer.hidden = !offer.childElementCount;
          }
          const details = box.closest("details");
          if (details) details.open = true;
        } else {
          loose.append(el("li", { "data-code": error.code }, error.message));
        }
      }
      const held = this.form.querySelector(".field-error[data-held]");
      out.push(el("p", { class: "report-none" }, held && !loose.childElementCount
        ? "No reading yet: finish the value you are typing."
        : "No reading yet: see the notes at the fields."));
      if (loose.childElementCount) out.push(loose);
      this.report.dataset.state = "error";
      this.report.replaceChildren(...out);
      if (held) {
        clearTimeout(this.holdTimer);
        this.holdTimer = setTimeout(() => this.releaseHeld(), HOLD_MS - (performance.now() - this.lastTyped) + 20);
      }
      return;
    }
    this.last = { request, response };
    this.resetSave();
    this.hooks.seen(response);
    const display = response.display || {};

    // 0. a likely slip (a unit mix-up) leads the report, with its value to use in one tap
    const offered = response.findings.filter((f) => Array.isArray(f.suggest) && f.suggest.length);
    if (offered.length) {
      const lead = el("section", { class: "check-first", "aria-label": "Check first" });
      for (const f of offered) {
        const row = el("div", { class: "row-buttons" });
        for (const s of f.suggest) {
          const name = String(s.field || "").replace(/^inputs\./, "");
          const entry = this.inputs[name];
          if (!entry || !entry.text) continue;
          const b = el("button", { type: "button", class: "use", "data-action": "use-suggestion", "data-field": name },
            `Use ${suggestionText(s, entry)}`);
          b.addEventListener("click", () => this.apply(name, s));
          row.append(b);
        }
        lead.append(el("p", { "data-code": f.code }, el("strong", {}, "Check first: "), f.text), row);
      }
      out.push(lead);
    }

    // 1. the answer first: a headline, the numbers that matter, what must be acted on now
    const shownFindings = response.findings.filter((f) => !offered.includes(f));
    const urgent = shownFindings.filter((f) => f.severity === "urgent");
    const headline = (this.spec.headline ? this.spec.headline(response) : (response.summary || [])[0]) || "";
    const first = el("section", { class: "answer-first", "aria-label": "Answer" },
      el("p", { class: "headline", "data-headline": "" }, headline));
    const unit = request.options.pressure_unit;
    const keyRows = (this.spec.key || []).filter((k) => k in response.outputs)
      .flatMap((k) => flatten(k, response.outputs[k], display[k], unit)).slice(0, 5);
    if (keyRows.length) {
      const dl = el("dl", { class: "key-numbers" });
      for (const [path, text, , aside, label] of keyRows) {
        dl.append(el("div", { class: "key", "data-key": path }, el("dt", {}, label || outputLabel(path)),
          el("dd", {}, text, ...asideText(aside))));
      }
      first.append(dl);
    }
    if (urgent.length) first.append(findingList(urgent, "Act now"));
    out.push(first);
    this.showNear(headline);

    // 2. actions: copy or share the summary (saving is under the report)
    const usedLine = usedText(request, this.inputs);
    const summaryText = [...(response.summary || []), usedLine].join(" ");
    const tools = el("div", { class: "row-buttons actions-row" });
    const copy = el("button", { type: "button", class: "copy" }, "Copy summary");
    const status = this.status;
    copy.addEventListener("click", async () => {
      const text = `${summaryText}\n(Tidewell ${window.tidewell.version}, engine ${response.engine}, build ${document.documentElement.dataset.buildId || "unknown"})`;
      try {
        await navigator.clipboard.writeText(text);
        status.textContent = "Copied.";
      } catch {
        status.textContent = "Copy was refused by the browser; select the text above instead.";
      }
    });
    tools.append(copy);
    if (navigator.share) {
      const share = el("button", { type: "button" }, "Share");
      share.addEventListener("click", () => navigator.share({ title: "Tidewell summary", text: summaryText }).catch(() => {}));
      tools.append(share);
    }
    tools.append(status);
    out.push(tools);

    // 3. the rest, one tap away: the summary, how sure, the other findings, cautions, pictures, every number
    const restBox = el("details", { class: "full-report" },
      el("summary", {}, "Full report: summary, findings, pictures and every number with its source"));
    const rest = [];
    const summary = el("section", { class: "summary", "aria-label": "Summary" });
    // the general "decision support only" is said once for the whole app (the footer), not in every report
    for (const sentence of response.summary || []) {
      if (!ONCE.test(sentence)) summary.append(el("p", {}, sentence));
    }
    summary.append(el("p", { class: "used", "data-used": "" }, usedLine));
    rest.push(summary);

    // how sure the reading is, filled in later by showSure(); its own polite live region, read whole
    if (this.spec.howSure) {
      this.sure = el("section", { class: "how-sure", "data-state": "waiting", "aria-label": this.spec.howSure.title,
        "aria-live": "polite", "aria-atomic": "true" },
      el("p", { class: "sure-line muted" }, this.spec.howSure.working));
      rest.push(this.sure);
    }

    // findings by severity: a word and a shape, never colour alone (the urgent ones are above)
    const others = shownFindings.filter((f) => f.severity !== "urgent");
    if (others.length) rest.push(findingList(others, "Findings"));

    // cautions: each once; the general one is in the footer
    const cautionsShown = response.cautions.filter((c) => !ONCE.test(c));
    if (cautionsShown.length) {
      const cautions = el("section", { class: "cautions", "aria-label": "Cautions" }, el("h4", {}, "Take care"));
      const ul = el("ul");
      for (const c of cautionsShown) ul.append(el("li", {}, c));
      cautions.append(ul);
      rest.push(cautions);
    }

    // pictures drawn from the core's arrays
    // (those from other calculations come in later through showPictures(), into this slot)
    const pics = drawPictures(this.spec.pictures || [], response, more, request);
    rest.push(pics || el("div", { class: "pictures-slot", hidden: true }));

    // the numbers, in sections; a tap shows the step behind each
    const used = new Set();
    const sections = [...(this.spec.sections || [])];
    const leftover = Object.keys(response.outputs).filter((k) => !sections.some(([, keys]) => keys.includes(k)));
    sections.push(["More numbers", leftover]);
    for (const [title, keys] of sections) {
      const rows = keys.filter((k) => k in response.outputs && !used.has(k))
        .flatMap((k) => { used.add(k); return flatten(k, response.outputs[k], display[k], unit); });
      if (!rows.length) continue;
      const box = title === "More numbers"
        ? el("details", { class: "numbers" }, el("summary", {}, "More numbers"))
        : el("section", { class: "numbers" }, el("h4", {}, title));
      const dl = el("dl");
      for (const [path, text, raw, aside, label] of rows) {
        const top = path.split(".")[0];
        const steps = response.steps.filter((s) => s.output === top);
        const dd = el("dd");
        const name = label || outputLabel(path);
        const said = aside ? `${text} (${aside})` : text;
        const button = el("button", { type: "button", class: "num", "data-out": path, "data-raw": String(raw),
          "aria-expanded": "false", "aria-label": `${name}: ${said}. Show how it was worked out` }, text,
        ...asideText(aside));
        if (!steps.length) button.disabled = true;
        const how = el("div", { class: "how", hidden: true });
        button.addEventListener("click", () => {
          if (!how.childElementCount) {
            for (const s of steps) how.append(stepView(s, display[top], unit));
          }
          how.hidden = !how.hidden;
          button.setAttribute("aria-expanded", String(!how.hidden));
        });
        dd.append(button, how);
        dl.append(el("dt", {}, name), dd);
      }
      box.append(dl);
      rest.push(box);
    }
    restBox.append(...rest);
    out.push(restBox);
    this.report.dataset.state = "done";
    this.report.replaceChildren(...out);
  }
}

function suggestionText(s, entry) {
  const unit = s.unit !== undefined ? s.unit : entry && entry.unit ? entry.unit.value : "";
  const word = unitWord(unit);
  return word ? `${s.value} ${word}` : String(s.value);
}

// "From: pH 7.28, PCO2 9.1 kPa, ...": every input the report used, with its unit, as sent
function usedText(request, inputs) {
  const parts = [];
  for (const [name, v] of Object.entries(request.inputs)) {
    const label = inputs[name] ? inputs[name].label : name;
    if (v === true) parts.push(label);
    else if (v && typeof v === "object") parts.push(`${label} ${v.value}${unitWord(v.unit) === "%" ? "" : " "}${unitWord(v.unit)}`);
    else if (typeof v === "string" && inputs[name] && inputs[name].select) parts.push(`${label}: ${v}`);
    else parts.push(`${label} ${v}`);
  }
  return `From: ${parts.join(", ")}.`;
}

// the other unit of a P/F figure, in smaller type beside it
function asideText(aside) {
  return aside ? [" ", el("small", { class: "aside", "data-aside": "" }, aside)] : [];
}

function stepView(s, decimals, unit) {
  const pf = s.output in PF_LABELS && isQuantity(s.result) ? pfShown(s.result, unit) : null;
  const result = pf ? (pf.aside ? `${pf.text} (${pf.aside})` : pf.text) : quantityText(s.result, decimals);
  const box = el("div", { class: "step" },
    el("p", { class: "step-label" }, s.label),
    el("p", { class: "step-formula" }, el("code", {}, s.formula), ` = ${result}`));
  if (s.inputs && typeof s.inputs === "object") {
    const parts = Object.entries(s.inputs).map(([k, v]) => `${k.replaceAll("_", " ")} ${quantityText(v)}`);
    box.append(el("p", { class: "step-inputs" }, `Using: ${parts.join(", ")}`));
  }
  box.append(el("p", { class: "step-source" }, `Source: ${s.source}`));
  return box;
}
