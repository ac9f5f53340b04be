// The course picture: pH (upper strip) and PCO2 (lower strip) against time since the first gas, one SVG
// built with createElementNS (never markup from data). Every value placed is the core's: the readings'
// pH, PCO2 and `pco2_aim_band`, `ph_range`, and the intervals (only the gases the core compares are joined,
// so a venous gas is never joined to an arterial one). The shell maps values to pixels and nothing more.
//
// Drawing style (ours): two strips sharing one time axis; the pH range and each gas's aim band as pale
// shelves; pH as open rings, PCO2 as filled squares; what was changed after a gas as a flag on a thin
// upright line through both strips, labelled with a short word.

const NS = "http://www.w3.org/2000/svg";
const W = 340, L = 46, R = 14, TOP = 40, STRIP = 104, GAP = 30, BOTTOM = 34;
const H = TOP + STRIP + GAP + STRIP + BOTTOM;

// short flag words for the events (the table and the handover use the long ones)
export const FLAG = {
  oxygen_increased: "O2 up",
  oxygen_decreased: "O2 down",
  niv_started: "NIV on",
  niv_changed: "NIV adj",
  niv_stopped: "NIV off",
  intubated: "tube",
  extubated: "extub",
};

function svg(tag, attrs = {}, text) {
  const node = document.createElementNS(NS, tag);
  for (const [k, v] of Object.entries(attrs)) node.setAttribute(k, String(v));
  if (text !== undefined) node.textContent = text;
  return node;
}

const q = (v) => (v && typeof v === "object" ? v.value : v);
const short = (v) => String(Number(v.toFixed(6)));

// axis ticks at round values (1, 2, 2.5 or 5 times a power of ten), at most five: pixels only
function ticks(lo, hi) {
  const raw = (hi - lo) / 4;
  const power = 10 ** Math.floor(Math.log10(raw));
  const step = [1, 2, 2.5, 5, 10].map((m) => m * power).find((st) => st >= raw);
  const out = [];
  for (let v = Math.ceil(lo / step) * step; v <= hi + step * 1e-9; v += step) out.push(v);
  return out;
}
// time ticks at round durations, at most five
const TIME_STEPS = [10, 15, 30, 60, 120, 180, 240, 360, 480, 720, 1440, 2880];
function timeTicks(last) {
  const step = TIME_STEPS.find((st) => last / st <= 4) || Math.ceil(last / 4);
  const out = [];
  for (let m = 0; m <= last + 1e-9; m += step) out.push(m);
  return out;
}

// the smallest and largest of the values, widened a little so nothing sits on the frame
function extent(values) {
  const lo = Math.min(...values), hi = Math.max(...values);
  const pad = (hi - lo || Math.abs(hi) * 0.05 || 1) * 0.12;
  return [lo - pad, hi + pad];
}

export function duration(minutes) {
  const m = Math.round(minutes);
  if (m < 60) return `${m} min`;
  const h = Math.floor(m / 60), rest = m % 60;
  return rest ? `${h} h ${rest} min` : `${h} h`;
}

// One strip: its frame, ticks on the left, a label, and y() for its values.
function strip(root, top, range, label) {
  const y = (v) => top + STRIP - ((v - range[0]) / (range[1] - range[0])) * STRIP;
  root.append(svg("rect", { x: L, y: top, width: W - L - R, height: STRIP, class: "cv-frame" }));
  for (const v of ticks(range[0], range[1])) {
    root.append(svg("line", { x1: L - 3, x2: L, y1: y(v), y2: y(v), class: "cv-tick" }));
    root.append(svg("text", { x: L - 5, y: y(v) + 3, class: "cv-num", "text-anchor": "end" }, short(v)));
  }
  root.append(svg("text", { x: L, y: top - 4, class: "cv-label" }, label));
  return y;
}

export function coursePicture(response, display) {
  const o = response.outputs;
  const readings = o.readings || [];
  if (readings.length < 2) return null;
  const minutes = readings.map((r) => r.minutes);
  const last = Math.max(...minutes) || 1;
  const x = (m) => L + 8 + (m / last) * (W - L - R - 16);
  const unit = readings[0].pco2.unit;

  const root = svg("svg", { viewBox: `0 0 ${W} ${H}`, role: "img", class: "course-plot", "data-picture": "course" });
  root.append(
    svg("title", {}, "pH and PCO2 against time"),
    svg("desc", {}, `The ${readings.length} gases of the course: pH above, PCO2 in ${unit} below, with the normal ` +
      "pH range, each gas's PaCO2 aim band and what was changed after each gas. The table gives the same numbers."),
  );

  // pH strip, with the normal range the verdicts use
  const phs = readings.map((r) => r.ph);
  const band = o.ph_range;
  const yPh = strip(root, TOP, extent([...phs, band.low, band.high]), "pH");
  root.append(svg("rect", { x: L, y: yPh(band.high), width: W - L - R, height: yPh(band.low) - yPh(band.high),
    class: "cv-shelf" }));
  root.append(svg("text", { x: W - R - 3, y: yPh(band.high) + 10, class: "cv-note", "text-anchor": "end" },
    `${band.low.toFixed(display.ph_range ?? 2)}-${band.high.toFixed(display.ph_range ?? 2)}`));

  // PCO2 strip, with each gas's aim band as a shelf from that gas to the next
  const top2 = TOP + STRIP + GAP;
  const pco2s = readings.map((r) => q(r.pco2));
  const aims = readings.flatMap((r) => (r.pco2_aim_band ? [q(r.pco2_aim_band.low), q(r.pco2_aim_band.high)] : []));
  const yP = strip(root, top2, extent([...pco2s, ...aims]), `PCO2 (${unit}); shelf: the PaCO2 aim`);
  readings.forEach((r, i) => {
    if (!r.pco2_aim_band) return;
    const x0 = x(r.minutes) - (i === 0 ? 8 : 0);
    const x1 = i + 1 < readings.length ? x(readings[i + 1].minutes) : W - R;
    const hi = yP(q(r.pco2_aim_band.high)), lo = yP(q(r.pco2_aim_band.low));
    root.append(svg("rect", { x: x0, y: hi, width: Math.max(2, x1 - x0), height: Math.max(2, lo - hi),
      class: "cv-aim", "data-gas": i }));
  });

  // time axis: four ticks, labelled as time since the first gas
  const axisY = top2 + STRIP;
  for (const m of timeTicks(last)) {
    const anchor = x(m) > W - R - 24 ? "end" : x(m) < L + 20 ? "start" : "middle";
    root.append(svg("line", { x1: x(m), x2: x(m), y1: axisY, y2: axisY + 3, class: "cv-tick" }));
    root.append(svg("text", { x: x(m), y: axisY + 13, class: "cv-num", "text-anchor": anchor }, duration(m)));
  }
  root.append(svg("text", { x: (L + W - R) / 2, y: H - 4, class: "cv-label", "text-anchor": "middle" },
    "time since the first gas"));

  // what was changed after each gas: a flag through both strips
  readings.forEach((r, i) => {
    if (!r.events.length) return;
    const ex = x(r.minutes);
    root.append(svg("line", { x1: ex, x2: ex, y1: TOP - 16 - (r.events.length - 1) * 10, y2: axisY, class: "cv-event",
      "data-gas": i }));
    r.events.forEach((e, k) => {
      const right = ex > W - R - 40;
      root.append(svg("text", { x: right ? ex - 3 : ex + 3, y: TOP - 18 - k * 10, class: "cv-flag", "data-event": e,
        "text-anchor": right ? "end" : "start" },
        FLAG[e] || e));
    });
  });

  // the comparable pairs, joined; then the points on top
  for (const iv of o.intervals || []) {
    const a = readings[iv.earlier], b = readings[iv.later];
    root.append(svg("line", { x1: x(a.minutes), x2: x(b.minutes), y1: yPh(a.ph), y2: yPh(b.ph), class: "cv-join" }));
    root.append(svg("line", { x1: x(a.minutes), x2: x(b.minutes), y1: yP(q(a.pco2)), y2: yP(q(b.pco2)),
      class: "cv-join" }));
  }
  readings.forEach((r, i) => {
    const venous = r.site === "venous" ? " cv-venous" : "";
    root.append(svg("circle", { cx: x(r.minutes), cy: yPh(r.ph), r: 4.5, class: `cv-ph${venous}`, "data-gas": i }));
    const s = 8, px = x(r.minutes), py = yP(q(r.pco2));
    root.append(svg("rect", { x: px - s / 2, y: py - s / 2, width: s, height: s, class: `cv-pco2${venous}`,
      "data-gas": i }));
    root.append(svg("text", { x: px, y: TOP + STRIP + 12, class: "cv-num", "text-anchor": "middle" }, String(i + 1)));
  });
  return root;
}
