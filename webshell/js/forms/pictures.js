// Pictures drawn from the core's numbers with createElementNS (never markup from data). The shell only
// maps values to pixels: every point plotted is an output of the core.

const NS = "http://www.w3.org/2000/svg";
const W = 320, H = 220, L = 44, R = 10, T = 12, B = 36;

function svg(tag, attrs = {}, text) {
  const node = document.createElementNS(NS, tag);
  for (const [k, v] of Object.entries(attrs)) node.setAttribute(k, String(v));
  if (text !== undefined) node.textContent = text;
  return node;
}

function frame(title, desc, xr, yr, xlabel, ylabel) {
  const root = svg("svg", { viewBox: `0 0 ${W} ${H}`, role: "img", class: "plot" });
  root.append(svg("title", {}, title), svg("desc", {}, desc));
  const x = (v) => L + ((v - xr[0]) / (xr[1] - xr[0])) * (W - L - R);
  const y = (v) => H - B - ((v - yr[0]) / (yr[1] - yr[0])) * (H - T - B);
  root.append(svg("rect", { x: L, y: T, width: W - L - R, height: H - T - B, class: "plot-area" }));
  for (let i = 0; i <= 4; i++) {
    const xv = xr[0] + ((xr[1] - xr[0]) * i) / 4;
    const yv = yr[0] + ((yr[1] - yr[0]) * i) / 4;
    root.append(svg("text", { x: x(xv), y: H - B + 14, class: "tick", "text-anchor": "middle" }, nice(xv)));
    root.append(svg("text", { x: L - 4, y: y(yv) + 4, class: "tick", "text-anchor": "end" }, nice(yv)));
  }
  root.append(svg("text", { x: (L + W - R) / 2, y: H - 4, class: "axis", "text-anchor": "middle" }, xlabel));
  root.append(svg("text", { x: 10, y: (T + H - B) / 2, class: "axis", "text-anchor": "middle",
    transform: `rotate(-90 10 ${(T + H - B) / 2})` }, ylabel));
  return { root, x, y };
}

const nice = (v) => (Math.abs(v) >= 100 ? String(Math.round(v)) : String(Number(v.toPrecision(3))));
const path = (xs, ys, x, y) => xs.map((v, i) => `${i ? "L" : "M"}${x(v).toFixed(1)},${y(ys[i]).toFixed(1)}`).join("");
const span = (values) => [Math.min(...values), Math.max(...values)];
const pad = ([a, b], f = 0.1) => [a - (b - a || 1) * f, b + (b - a || 1) * f];
const q = (v) => (v && typeof v === "object" ? v.value : v);

function legend(root, items) {
  items.forEach(([cls, text], i) => {
    root.append(svg("line", { x1: L + 8, x2: L + 26, y1: T + 12 + i * 14, y2: T + 12 + i * 14, class: cls }));
    root.append(svg("text", { x: L + 30, y: T + 16 + i * 14, class: "legend" }, text));
  });
}

function figure(name, node, caption) {
  const fig = document.createElement("figure");
  fig.className = "picture";
  fig.dataset.picture = name;
  const cap = document.createElement("figcaption");
  cap.textContent = caption;
  fig.append(node, cap);
  return fig;
}

// The sample on a PCO2 x HCO3 plane, with the core's expected HCO3 at this PCO2 (acute, chronic) drawn as
// two bars, and the expected PCO2 for this HCO3 as a horizontal bar when a metabolic disorder leads.
function acidBase(response, request) {
  const o = response.outputs;
  const pco2 = request.inputs.pco2;
  if (!pco2 || typeof o.hco3 !== "object") return null;
  const px = pco2.value, hy = o.hco3.value;
  const xs = [px], ys = [hy];
  const bands = [];
  if (o.expected_hco3) {
    for (const [kind, cls] of [["acute", "band-a"], ["chronic", "band-c"]]) {
      const b = o.expected_hco3[kind];
      if (b) { bands.push(["v", cls, q(b.low), q(b.high), kind]); ys.push(q(b.low), q(b.high)); }
    }
  }
  if (o.expected_pco2 && pco2.unit === response.options?.pressure_unit) {
    const b = o.expected_pco2;
    bands.push(["h", "band-m", q(b.low), q(b.high), "expected PCO2"]);
    xs.push(q(b.low), q(b.high));
  }
  const { root, x, y } = frame("Where the sample sits", "The sample's PCO2 and HCO3 with the expected ranges from the report.",
    pad(span(xs), 0.4), pad(span(ys), 0.4), `PCO2 (${pco2.unit})`, "HCO3 (mmol/L)");
  bands.forEach(([dir, cls, lo, hi, text], i) => {
    if (dir === "v") {
      const bx = x(px) + (i === 0 ? -22 : 10);
      root.append(svg("rect", { x: bx, y: y(hi), width: 12, height: Math.max(2, y(lo) - y(hi)), class: cls }));
      root.append(svg("text", { x: bx + 6, y: y(hi) - 3, class: "legend", "text-anchor": "middle" }, text));
    } else {
      root.append(svg("rect", { x: x(lo), y: y(hy) + 8, width: Math.max(2, x(hi) - x(lo)), height: 10, class: cls }));
      root.append(svg("text", { x: x(lo), y: y(hy) + 30, class: "legend" }, text));
    }
  });
  root.append(svg("path", { d: `M${x(px)},${y(hy) - 7}L${x(px) + 7},${y(hy)}L${x(px)},${y(hy) + 7}L${x(px) - 7},${y(hy)}Z`, class: "mark" }));
  return figure("acidbase", root, "Diamond: this sample. Bars: the HCO3 expected at this PCO2 if the change were acute (left) or chronic (right), from the report.");
}

function odc(curve) {
  if (!curve || !curve.ok) return null;
  const o = curve.outputs;
  const xs = o.po2.value;
  const { root, x, y } = frame("Oxygen dissociation curve", "Saturation against PO2, standard and for this patient.",
    [0, Math.max(...xs)], [0, 100], `PO2 (${o.po2.unit})`, "SO2 (%)");
  root.append(svg("path", { d: path(xs, o.so2_standard, x, y), class: "line-std" }));
  root.append(svg("path", { d: path(xs, o.so2_patient, x, y), class: "line-pt" }));
  if (o.point) {
    const px = x(o.point.po2.value), py = y(o.point.so2);
    root.append(svg("circle", { cx: px, cy: py, r: 5, class: "mark" }));
  }
  legend(root, [["line-std", "standard"], ["line-pt", "this patient"]]);
  return figure("odc", root, "Dashed: the standard curve. Solid: shifted for this patient's pH, PCO2 and temperature. Dot: the measured PO2.");
}

function profile(prof, response) {
  if (!prof || !prof.ok) return null;
  const o = prof.outputs;
  const xs = o.altitude.value;
  const lines = [];
  const series = o.po2_predicted || o.pao2_alveolar;
  const which = o.po2_predicted ? "predicted PaO2" : "alveolar PO2";
  const unit = series.at_fio2.unit;
  const ys = [...series.at_fio2.value];
  lines.push(["line-pt", series.at_fio2.value, "on the FiO2 now"]);
  if (series.at_fio2_equivalent) {
    lines.push(["line-std", series.at_fio2_equivalent.value, "on the FiO2 that keeps today's level"]);
    ys.push(...series.at_fio2_equivalent.value);
  }
  const target = response.outputs.po2_threshold || o.po2_threshold;
  if (target) ys.push(target.value);
  const { root, x, y } = frame("PO2 against altitude", `The ${which} from ground to the ceiling.`,
    [Math.min(...xs), Math.max(...xs)], pad(span(ys), 0.05), `Altitude (${o.altitude.unit})`, `${which} (${unit})`);
  for (const [cls, values] of lines) root.append(svg("path", { d: path(xs, values, x, y), class: cls }));
  if (target) root.append(svg("line", { x1: L, x2: W - R, y1: y(target.value), y2: y(target.value), class: "line-target" }));
  if (o.cabin_altitude && o.cabin_altitude.unit === o.altitude.unit) {
    const cx = x(o.cabin_altitude.value);
    root.append(svg("line", { x1: cx, x2: cx, y1: T, y2: H - B, class: "line-cabin" }));
    root.append(svg("text", { x: cx + 3, y: H - B - 4, class: "legend" }, "cabin"));
  }
  legend(root, lines.map(([cls, , text]) => [cls, text]));
  return figure("profile", root, `Solid: ${which} on the FiO2 now; dashed: on the FiO2 that keeps today's alveolar PO2. Dotted line: the lowest acceptable PaO2; upright line: the cabin altitude.`);
}

// A thin bar for the "How sure" line: the filled part is the core's share of draws (0 to 1) that give the
// same reading. Decorative (aria-hidden): the sentence beside it says the same in words and numbers.
export function shareBar(share) {
  const BW = 320, BH = 14;
  const root = svg("svg", { viewBox: `0 0 ${BW} ${BH}`, class: "share-bar", "aria-hidden": "true",
    focusable: "false", preserveAspectRatio: "none" });
  const part = Math.min(1, Math.max(0, share));
  root.append(svg("rect", { x: 0, y: 0, width: BW, height: BH, rx: 3, class: "share-track" }));
  root.append(svg("rect", { x: 0, y: 0, width: (BW * part).toFixed(1), height: BH, rx: 3, class: "share-fill" }));
  // a tick at half way, so "about half" reads at a glance
  root.append(svg("line", { x1: BW / 2, x2: BW / 2, y1: 0, y2: BH, class: "share-tick" }));
  return root;
}

export function drawPictures(names, response, more, request) {
  const figs = [];
  for (const name of names) {
    let fig = null;
    if (name === "acidbase") fig = acidBase(response, request);
    if (name === "odc") fig = odc(more[0]);
    if (name === "profile") fig = profile(more[0], response);
    if (fig) figs.push(fig);
  }
  if (!figs.length) return null;
  const box = document.createElement("section");
  box.className = "pictures";
  box.setAttribute("aria-label", "Pictures");
  box.append(...figs);
  return box;
}
