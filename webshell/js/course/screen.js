// The course of a patient: serial gases with their times and what was changed after each, read by the
// core's `course` calculation (docs/course.md). DOM only: every number shown is the core's, formatted to
// the core's `display` decimals; the shell keeps what was typed (IndexedDB store "courses") and asks the
// core again each time the course is shown.
//
// Two places: "Add to course" under the blood-gas report (the gas just read, with its time), and the
// Course screen (#course): what changes care first, the verdicts, the table of gases with the change and
// rate between them, the picture, the handover text, then the gases to edit and the patient's flags.

import * as caselog from "../caselog.js";
import { formatValue, parseNumber } from "../format.js";
import { PANELS } from "../forms/specs.js";
import { settings } from "../settings.js";
import { coursePicture, duration } from "./picture.js";
import { el } from "../forms/panel.js";
import { EVENTS, MAX_GASES } from "./records.js";


const SEVERITY = { urgent: ["Act now", "sev-urgent"], notable: ["Worth a look", "sev-notable"] };
const EVENT_TEXT = Object.fromEntries(EVENTS);
const VERDICT = { improving: "improving", worsening: "worsening", not_improving: "not improving" };
const DIRECTION = { improving: "improving", worsening: "worsening", unchanged: "no real change" };
const TREND = { rising: "PCO2 rising", falling: "PCO2 falling", unchanged: "PCO2 steady" };
const WARNING = 'Label it with something that identifies nobody (for example "bay 3, night"), never a name, ' +
  "date of birth or record number.";
const PATIENT = [
  ["hypercapnia_risk", "At risk of hypercapnic respiratory failure (e.g. COPD)"],
  ["previous_hypercapnic_failure", "Has needed NIV or invasive ventilation for hypercapnic failure before"],
];

// -- what was typed -> the core's request (the blood-gas panel's own rules: a word as is, a number with
// its unit, a ticked box as true) --
function inputsOf(fields) {
  const kinds = Object.fromEntries(PANELS.blood_gas.fields.map((f) => [f[0], f[2]]));
  const inputs = {};
  for (const [name, v] of Object.entries(fields)) {
    const kind = kinds[name];
    if (v === true || (typeof kind === "string" && kind.startsWith("w:"))) inputs[name] = v;
    else if (Array.isArray(v)) {
      const number = parseNumber(v[0]);
      inputs[name] = v[1] === "fraction" ? number : { value: number, unit: v[1] };
    } else inputs[name] = parseNumber(v);
  }
  return inputs;
}

export function courseRequest(course) {
  const inputs = {
    samples: course.gases.map((g) => ({ time: g.time, inputs: inputsOf(g.fields), events: g.events })),
  };
  const p = course.patient || {};
  for (const [key] of PATIENT) if (p[key] === true) inputs[key] = true;
  if (p.baseline_pco2) inputs.baseline_pco2 = { value: parseNumber(p.baseline_pco2[0]), unit: p.baseline_pco2[1] };
  return { calc: "course", inputs, options: { pressure_unit: settings.pressureUnit } };
}

// the device's clock now, as the time input shows it (local, to the minute)
export function nowText(date = new Date()) {
  const two = (n) => String(n).padStart(2, "0");
  return `${date.getFullYear()}-${two(date.getMonth() + 1)}-${two(date.getDate())}T${two(date.getHours())}:${two(date.getMinutes())}`;
}

const byTime = (a, b) => (a.time < b.time ? -1 : a.time > b.time ? 1 : 0);
const clock = (time) => time.slice(11, 16);
const day = (time) => time.slice(0, 10);
const courseName = (c) => c.label || "(no label)";

// a number of the answer, to the core's decimals for its path
function num(value, path, display) {
  const v = value && typeof value === "object" ? value.value : value;
  return formatValue(v, display[path]);
}
const signed = (text) => (text.startsWith("-") ? `−${text.slice(1)}` : `+${text}`);

export class CourseScreen {
  constructor(section, engine, hooks) {
    this.section = section;
    this.engine = engine;
    this.hooks = hooks;
    this.current = null; // the course shown
    this.sequence = 0;
    this.build();
    settings.addEventListener("pressure", () => this.showIfOpen());
    engine.addEventListener("state", (event) => {
      if (event.detail.state === "ready" && this.report.dataset.state === "waiting") this.showIfOpen();
    });
  }

  build() {
    const s = this.section;
    this.pick = el("select", { id: "course-pick", "aria-label": "Course shown" });
    this.pick.addEventListener("change", () => this.open(this.pick.value));
    this.remove = el("button", { type: "button", id: "course-delete", class: "danger" }, "Delete this course");
    this.remove.addEventListener("click", () => this.deleteCurrent());
    this.empty = el("p", { id: "course-empty", class: "muted" },
      'No course yet. Read a gas on the Blood gas screen, then use "Add to course" under its report.');
    this.head = el("div", { class: "course-head" },
      el("label", { for: "course-pick" }, "Course"), el("div", { class: "entry" }, this.pick));
    this.report = el("div", { id: "course-report", class: "course-report", "data-state": "idle", "aria-live": "polite" });
    this.gases = el("ol", { id: "course-gases", class: "course-gases", "aria-label": "Gases of the course" });
    this.patient = el("fieldset", { id: "course-patient", class: "course-patient" },
      el("legend", {}, "The patient (applies to every gas)"));
    for (const [key, text] of PATIENT) {
      const box = el("input", { type: "checkbox", id: `course-${key}`, name: key });
      box.addEventListener("change", () => this.editPatient());
      this.patient.append(el("div", { class: "field field-check" }, el("label", { for: box.id }, box, " ", text)));
    }
    this.baseline = el("input", { type: "text", id: "course-baseline_pco2", inputMode: "decimal", spellcheck: false });
    this.baselineUnit = el("select", { id: "course-baseline_pco2-unit", class: "unit", "aria-label": "Known usual PaCO2 unit" },
      new Option("kPa", "kPa"), new Option("mmHg", "mmHg"));
    this.baseline.addEventListener("change", () => this.editPatient());
    this.baselineUnit.addEventListener("change", () => this.editPatient());
    this.patient.append(el("div", { class: "field" }, el("label", { for: this.baseline.id }, "Known usual PaCO2"),
      el("div", { class: "entry" }, this.baseline, this.baselineUnit)));
    this.message = el("p", { id: "course-message", role: "status", "aria-live": "polite" });
    this.editor = el("section", { class: "course-editor", "aria-labelledby": "course-gases-title" },
      el("h3", { id: "course-gases-title" }, "Gases and what was changed after each"), this.gases, this.patient,
      el("div", { class: "row-buttons" }, this.remove));
    // what changes care comes first: the reading; the warning about labels sits with the label entry and
    // above the course's own data
    this.editor.prepend(el("p", { class: "warn-text" }, el("strong", {}, "No patient identifiers. "),
      "Courses stay on this device only, beside the case log, and are exported with it. ", WARNING));
    s.append(this.empty, this.head, this.report, this.editor, this.message);
  }

  showIfOpen() {
    if (document.documentElement.dataset.screen === "course") this.show();
  }

  async show(id) {
    let courses;
    try {
      courses = await caselog.listCourses();
    } catch (err) {
      this.message.textContent = `The courses could not be read (${err.name || "Error"}).`;
      return;
    }
    document.documentElement.dataset.courseCount = String(courses.length);
    this.empty.hidden = courses.length > 0;
    this.head.hidden = this.report.hidden = this.editor.hidden = courses.length === 0;
    const wanted = id || (this.current && this.current.id);
    const chosen = courses.find((c) => c.id === wanted) || courses[0] || null;
    this.pick.replaceChildren(...courses.map((c) =>
      new Option(`${courseName(c)} (${c.gases.length} gas${c.gases.length === 1 ? "" : "es"})`, c.id)));
    if (!chosen) {
      this.current = null;
      this.report.replaceChildren();
      this.report.dataset.state = "idle";
      return;
    }
    this.pick.value = chosen.id;
    await this.render(chosen);
  }

  open(id) {
    return this.show(id);
  }

  async save(course) {
    course.changed = Date.now();
    try {
      await caselog.putCourse(course);
      if (navigator.storage && navigator.storage.persist) navigator.storage.persist().catch(() => {});
      return true;
    } catch (err) {
      this.message.textContent = `Not saved: ${caselog.writeProblem(err)}.`;
      return false;
    }
  }

  async editPatient() {
    const c = this.current;
    if (!c) return;
    const p = {};
    for (const [key] of PATIENT) if (this.section.querySelector(`#course-${key}`).checked) p[key] = true;
    if (this.baseline.value.trim()) p.baseline_pco2 = [this.baseline.value.trim().slice(0, 40), this.baselineUnit.value];
    c.patient = p;
    if (await this.save(c)) this.show(c.id);
  }

  async deleteCurrent() {
    const c = this.current;
    if (!c || !confirm(`Delete the course "${courseName(c)}" and its ${c.gases.length} gas(es) from this device?`)) return;
    try {
      await caselog.removeCourse(c.id);
      this.message.textContent = "Course deleted.";
      this.current = null;
    } catch (err) {
      this.message.textContent = `Not deleted: ${caselog.writeProblem(err)}.`;
    }
    this.show();
  }

  // -- the gases, to edit --
  renderGases(c) {
    const items = [...c.gases].sort(byTime).map((g, i) => {
      const time = el("input", { type: "datetime-local", id: `course-time-${g.id}`, value: g.time, class: "course-time" });
      time.addEventListener("change", async () => {
        if (!time.value) return;
        g.time = time.value.slice(0, 16);
        if (await this.save(c)) this.show(c.id);
      });
      const events = el("fieldset", { class: "course-events" }, el("legend", {}, "Changed after this gas"));
      for (const [word, text] of EVENTS) {
        const box = el("input", { type: "checkbox", id: `course-ev-${g.id}-${word}`, checked: g.events.includes(word),
          "data-event": word });
        box.addEventListener("change", async () => {
          g.events = EVENTS.map(([w]) => w).filter((w) => (w === word ? box.checked : g.events.includes(w)));
          if (await this.save(c)) this.show(c.id);
        });
        events.append(el("label", { class: "choice", for: box.id }, box, " ", text));
      }
      const drop = el("button", { type: "button", class: "course-drop danger", "aria-label": `Remove gas ${i + 1}` },
        "Remove gas");
      drop.addEventListener("click", async () => {
        if (!confirm(`Remove gas ${i + 1} (${clock(g.time)}) from this course?`)) return;
        c.gases = c.gases.filter((x) => x !== g);
        if (c.gases.length === 0) {
          await caselog.removeCourse(c.id).catch(() => {});
          this.current = null;
          this.show();
        } else if (await this.save(c)) this.show(c.id);
      });
      const typed = [g.fields.ph && `pH ${g.fields.ph}`, Array.isArray(g.fields.pco2) && `PCO2 ${g.fields.pco2.join(" ")}`]
        .filter(Boolean).join(", ");
      return el("li", { class: "course-gas", "data-gas": g.id },
        el("p", { class: "course-gas-title" }, `Gas ${i + 1}: ${typed}`),
        el("label", { for: time.id }, "Taken at"), time, events, drop);
    });
    this.gases.replaceChildren(...items);
    for (const [key] of PATIENT) this.section.querySelector(`#course-${key}`).checked = (c.patient || {})[key] === true;
    const base = (c.patient || {}).baseline_pco2;
    this.baseline.value = base ? base[0] : "";
    this.baselineUnit.value = base ? base[1] : settings.pressureUnit;
  }

  // -- the reading --
  async render(c) {
    this.current = c;
    this.renderGases(c);
    const mine = ++this.sequence;
    const r = this.report;
    r.dataset.busy = "1";
    if (c.gases.length < 2) {
      r.dataset.state = "short";
      r.replaceChildren(el("p", { class: "muted" },
        'One gas so far. Add the next one from the Blood gas screen ("Add to course") to read the course.'));
      delete r.dataset.busy;
      return;
    }
    if (this.engine.state !== "ready") {
      r.dataset.state = "waiting";
      r.replaceChildren(el("p", { class: "muted" }, "The course is read as soon as the engine is ready."));
      if (this.engine.state === "failed") return;
    }
    const request = courseRequest(c);
    let response;
    try {
      response = await this.engine.compute(request);
    } catch (err) {
      if (mine !== this.sequence) return;
      r.dataset.state = "waiting";
      r.replaceChildren(el("p", { class: "report-engine-error", role: "alert" }, `${err.message} The course is kept.`));
      delete r.dataset.busy;
      return;
    }
    if (mine !== this.sequence) return;
    this.last = { request, response, course: c };
    if (response.ok) this.hooks.seen(response);
    r.replaceChildren(...(response.ok ? this.reading(c, response) : this.problems(c, response)));
    r.dataset.state = response.ok ? "done" : "error";
    delete r.dataset.busy;
  }

  problems(c, response) {
    const order = [...c.gases].sort(byTime);
    const ul = el("ul", { class: "errors" });
    for (const e of response.errors) {
      // inputs.samples[2].time -> "Gas 3 (03:10)": the sample's place in the request is its place in c.gases
      const m = /^inputs\.samples\[(\d+)\]/.exec(e.field || "");
      const g = m ? c.gases[Number(m[1])] : null;
      const where = g ? `Gas ${order.indexOf(g) + 1} (${clock(g.time)}): ` : "";
      ul.append(el("li", { "data-code": e.code, "data-field": e.field || "" }, where + e.message));
    }
    return [el("p", { class: "report-none" }, "No course reading: see below, and correct the gas named."), ul];
  }

  reading(c, response) {
    const o = response.outputs;
    const display = response.display || {};
    const out = [];
    // 1. what changes care first: the urgent and notable course findings, then the summary
    const findings = response.findings.filter((f) => SEVERITY[f.severity]);
    if (findings.length) {
      const list = el("ul", { class: "findings", "aria-label": "Findings of the course" });
      for (const f of findings) {
        const [word, cls] = SEVERITY[f.severity];
        list.append(el("li", { class: `finding ${cls}`, "data-code": f.code, "data-severity": f.severity },
          el("span", { class: "sev-mark", "aria-hidden": "true" }), el("strong", { class: "sev-word" }, `${word}: `), f.text));
      }
      out.push(list);
    }
    const said = new Set(findings.map((f) => f.text));
    const summary = el("section", { class: "summary", "aria-label": "Summary of the course" });
    for (const sentence of response.summary || []) if (!said.has(sentence)) summary.append(el("p", {}, sentence));
    const status = el("span", { class: "muted", role: "status" });
    const copy = el("button", { type: "button", id: "course-copy", class: "copy" }, "Copy handover");
    const text = this.handover(c, response);
    copy.addEventListener("click", async () => {
      try {
        await navigator.clipboard.writeText(text);
        status.textContent = "Copied.";
      } catch {
        status.textContent = "Copy was refused by the browser; open the handover text below and select it.";
      }
    });
    summary.append(el("div", { class: "row-buttons" }, copy, status));
    out.push(summary);

    // 2. the verdicts
    const verdicts = el("dl", { class: "course-verdicts", "aria-label": "Verdicts" });
    if (o.response) {
      const s = o.response_span;
      verdicts.append(el("dt", {}, `Since the first acidaemic gas (gas ${s.earlier + 1} to ${s.later + 1})`),
        el("dd", { "data-verdict": o.response, id: "course-response" }, VERDICT[o.response]));
    }
    if (o.niv_response) {
      const n = o.niv_response;
      verdicts.append(el("dt", {}, `On NIV (gas ${n.earlier + 1} to ${n.later + 1}, ${duration(n.minutes_on_niv)}` +
        `${n.running ? "" : ", since stopped"})`),
      el("dd", { "data-verdict": n.verdict, id: "course-niv" }, VERDICT[n.verdict]));
    }
    if (verdicts.childElementCount) out.push(verdicts);

    // 3. the table: each gas, and between comparable gases the change and its rate
    out.push(this.table(o, display));

    // 4. the picture
    const pic = coursePicture(response, display);
    if (pic) {
      out.push(el("figure", { class: "picture course-picture" }, pic, el("figcaption", {},
        "Rings: pH; squares: PCO2 (hollow when venous); lines join the gases compared. Pale shelves: the " +
        "normal pH range and each gas's PaCO2 aim (down to 8 % below it). Flags: what was changed after a gas.")));
    }

    // 5. cautions, and the handover as text
    if (response.cautions.length) {
      const ul = el("ul");
      for (const t of response.cautions) ul.append(el("li", {}, t));
      out.push(el("section", { class: "cautions", "aria-label": "Cautions" }, el("h4", {}, "Take care"), ul));
    }
    out.push(el("details", { class: "course-handover" }, el("summary", {}, "Handover text"),
      el("pre", { id: "course-handover-text" }, text)));
    return out;
  }

  table(o, display) {
    const unit = o.readings[0].pco2.unit;
    const table = el("table", { class: "course-table", id: "course-table" });
    table.append(el("caption", {}, `Gases in time order (pressures in ${unit})`));
    table.append(el("thead", {}, el("tr", {}, ...["#", "Time", "pH", "PCO2", "HCO3", "Aim"].map((h) => el("th", { scope: "col" }, h)))));
    const body = el("tbody");
    const after = new Map((o.intervals || []).map((iv) => [iv.later, iv]));
    o.readings.forEach((r, i) => {
      const iv = after.get(i);
      if (iv) {
        const ph = signed(num(iv.ph_change, "intervals.ph_change", display));
        const pc = signed(num(iv.pco2_change, "intervals.pco2_change", display));
        const rate = signed(num(iv.pco2_rate, "intervals.pco2_rate", display));
        const from = iv.earlier === i - 1 ? "" : ` (from gas ${iv.earlier + 1})`;
        body.append(el("tr", { class: `course-change dir-${iv.direction}`, "data-earlier": iv.earlier, "data-later": iv.later },
          el("td", { colSpan: 6 },
            el("span", { class: "course-arrow", "aria-hidden": "true" }, "↓ "),
            `${duration(iv.minutes)}${from}: pH `, el("b", { "data-out": "ph_change" }, ph), ", PCO2 ",
            el("b", { "data-out": "pco2_change" }, pc), " (", el("b", { "data-out": "pco2_rate" }, rate), ` ${iv.pco2_rate.unit})`,
            `: ${DIRECTION[iv.direction]}, ${TREND[iv.pco2_trend]}`)));
      }
      const when = r.time && typeof r.time === "string" && r.time.length >= 16 ? clock(r.time) : `${r.minutes} min`;
      const dayNote = typeof r.time === "string" && i > 0 && day(r.time) !== day(o.readings[0].time) ? ` ${day(r.time).slice(5)}` : "";
      const events = r.events.map((e) => EVENT_TEXT[e] || e).join("; ");
      const row = el("tr", { class: `course-row site-${r.site}`, "data-gas": i },
        el("th", { scope: "row" }, String(i + 1)),
        el("td", {}, `${when}${dayNote}`, el("small", {}, i ? `+${duration(r.minutes)}` : "first"),
          r.site !== "arterial" ? el("small", {}, r.site) : null),
        el("td", { "data-out": "ph" }, num(r.ph, "readings.ph", display)),
        el("td", { "data-out": "pco2" }, num(r.pco2, "readings.pco2", display)),
        el("td", { "data-out": "hco3" }, num(r.hco3, "readings.hco3", display)),
        el("td", { "data-out": "pco2_target" }, r.pco2_target ? num(r.pco2_target, "readings.pco2_target", display) : "-"));
      body.append(row);
      if (r.interpretation || events) {
        body.append(el("tr", { class: "course-note", "data-gas": i }, el("td", {}),
          el("td", { colSpan: 5 }, r.interpretation || "", events ? el("span", { class: "course-then" }, ` Then: ${events}.`) : null)));
      }
    });
    table.append(body);
    return el("div", { class: "course-table-wrap" }, table);
  }

  handover(c, response) {
    const o = response.outputs;
    const d = response.display || {};
    const unit = o.readings[0].pco2.unit;
    const lines = [`Course: ${courseName(c)} (${o.readings.length} gases; pressures in ${unit})`];
    const findings = response.findings.filter((f) => SEVERITY[f.severity]);
    for (const f of findings) lines.push(`${SEVERITY[f.severity][0].toUpperCase()}: ${f.text}`);
    const said = new Set(findings.map((f) => f.text));
    for (const s of response.summary || []) if (!said.has(s)) lines.push(s);
    lines.push("Gases:");
    const after = new Map((o.intervals || []).map((iv) => [iv.later, iv]));
    o.readings.forEach((r, i) => {
      const iv = after.get(i);
      if (iv) {
        lines.push(`  change ${iv.earlier + 1}->${iv.later + 1} over ${duration(iv.minutes)}: pH ` +
          `${signed(num(iv.ph_change, "intervals.ph_change", d))}, PCO2 ${signed(num(iv.pco2_change, "intervals.pco2_change", d))} ` +
          `(${signed(num(iv.pco2_rate, "intervals.pco2_rate", d))} ${iv.pco2_rate.unit}), ${DIRECTION[iv.direction]}`);
      }
      const then = r.events.length ? `; then ${r.events.map((e) => EVENT_TEXT[e].toLowerCase()).join(", ")}` : "";
      const aim = r.pco2_target ? `, aim ${num(r.pco2_target, "readings.pco2_target", d)}` : "";
      lines.push(`  ${i + 1}. ${String(r.time).replace("T", " ")} ${r.site}: pH ${num(r.ph, "readings.ph", d)}, ` +
        `PCO2 ${num(r.pco2, "readings.pco2", d)}, HCO3 ${num(r.hco3, "readings.hco3", d)}${aim}${then}`);
    });
    lines.push(`(Tidewell ${window.tidewell.version}, engine ${response.engine}, build ` +
      `${document.documentElement.dataset.buildId || "unknown"}; decision support only)`);
    return lines.join("\n");
  }
}

// -- "Add to course" under the blood-gas report --
export function mountAddToCourse(panel, screen) {
  const host = panel.saveRow;
  if (!host) return;
  const id = "add-course";
  const target = el("select", { id: `${id}-target` });
  const label = el("input", { type: "text", id: `${id}-label`, maxLength: 200, placeholder: "e.g. bay 3, night",
    "aria-describedby": `${id}-hint` });
  const time = el("input", { type: "datetime-local", id: `${id}-time` });
  const button = el("button", { type: "button", id: `${id}-go` }, "Add to course");
  const status = el("p", { id: `${id}-status`, class: "muted", role: "status" });
  const labelBox = el("div", { class: "field" }, el("label", { for: label.id }, "New course label"),
    el("p", { class: "hint", id: `${id}-hint` }, "No names, dates of birth or record numbers."), label);
  const box = el("section", { class: "add-course", "aria-labelledby": `${id}-title` },
    el("h4", { id: `${id}-title` }, "Add this gas to a course"),
    el("div", { class: "fields" },
      el("div", { class: "field" }, el("label", { for: target.id }, "Course"), target), labelBox,
      el("div", { class: "field" }, el("label", { for: time.id }, "Taken at"), time)),
    el("div", { class: "row-buttons" }, button), status);
  host.append(box);

  let edited = false;
  time.addEventListener("input", () => { edited = true; });
  target.addEventListener("change", () => { labelBox.hidden = target.value !== ""; });
  async function refresh() {
    if (!edited) time.value = nowText();
    let courses = [];
    try {
      courses = await caselog.listCourses();
    } catch {
      // the list stays empty: a new course can still be started
    }
    const keep = target.value;
    target.replaceChildren(new Option("A new course", ""),
      ...courses.map((c) => new Option(`${courseName(c)} (${c.gases.length})`, c.id)));
    target.value = courses.some((c) => c.id === keep) ? keep : courses.length ? courses[0].id : "";
    labelBox.hidden = target.value !== "";
  }
  // a new report: the time goes back to now unless the user set one, and the course list is read again
  new MutationObserver(() => {
    if (panel.report.dataset.state === "done" && !panel.report.dataset.busy) refresh();
  }).observe(panel.report, { attributes: true, attributeFilter: ["data-state", "data-busy"] });

  button.addEventListener("click", async () => {
    if (!panel.last) return;
    const when = (time.value || nowText()).slice(0, 16);
    let course;
    try {
      course = target.value ? await caselog.getCourse(target.value) : null;
    } catch (err) {
      status.textContent = `Not added: the courses could not be read (${err.name || "Error"}).`;
      return;
    }
    if (!course) {
      const now = Date.now();
      course = { id: caselog.newId("course"), label: label.value.slice(0, 200), created: now, changed: now, patient: {},
        gases: [] };
      const fields = panel.values();
      if (fields.hypercapnia_risk === true) course.patient.hypercapnia_risk = true;
      if (fields.baseline_pco2) course.patient.baseline_pco2 = fields.baseline_pco2;
    }
    if (course.gases.some((g) => g.time === when)) {
      status.textContent = `Not added: "${courseName(course)}" already has a gas at ${when.replace("T", " ")}. Change the time.`;
      return;
    }
    if (course.gases.length >= MAX_GASES) {
      status.textContent = `Not added: a course holds at most ${MAX_GASES} gases.`;
      return;
    }
    course.gases.push({ id: caselog.newId("gas"), time: when, fields: panel.values(), events: [] });
    course.changed = Date.now();
    try {
      await caselog.putCourse(course);
    } catch (err) {
      status.textContent = `Not added: ${caselog.writeProblem(err)}. Your values are kept in the form.`;
      return;
    }
    if (navigator.storage && navigator.storage.persist) navigator.storage.persist().catch(() => {});
    status.replaceChildren(`Added to "${courseName(course)}" (${course.gases.length} gas${course.gases.length === 1 ? "" : "es"}). `,
      el("a", { href: "#course", id: `${id}-open`, onclick: () => { screen.current = course; } }, "Open the course"));
    edited = false;
    label.value = "";
    await refresh();
    target.value = course.id;
    labelBox.hidden = true;
  });
  refresh();
}
