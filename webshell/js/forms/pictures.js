// Pictures drawn from the core's numbers with createElementNS (never markup from data). The shell only
// maps values to pixels: every point plotted is an output of the core.

const NS = "http://www.w3.org/2000/svg";
const W = 320, L = 44, R = 18, T = 12, PLOT_H = 180, B = 36;

function svg(tag, attrs = {}, text) {
  const node = document.createElementNS(NS, tag);
  for (const [k, v] of Object.entries(attrs)) node.setAttribute(k, String(v));
  if (text !== undefined) node.textContent = text;
  return node;
}

// Round-number ticks (1, 2 or 5 x 10^k apart) covering [lo, hi]: the axis is widened to the outer ticks, so
// every tick is a number a person would write and the data always sit inside. (docs/screens.md: why our own)
export function niceTicks(lo, hi, most = 6) {
  if (!(hi > lo)) { const d = Math.abs(lo) || 1; lo -= d / 2; hi += d / 2; }
  const raw = (hi - lo) / Math.max(1, most - 1);
  const power = 10 ** Math.floor(Math.log10(raw));
  const step = [1, 2, 5, 10].map((m) => m * power).find((st) => st >= raw - 1e-12);
  const first = Math.floor(lo / step + 1e-9) * step;
  const last = Math.ceil(hi / step - 1e-9) * step;
  const ticks = [];
  for (let v = first; v <= last + step / 2; v += step) ticks.push(Number(v.toPrecision(12)));
  return { ticks, step, lo: ticks[0], hi: ticks[ticks.length - 1] };
}

const tickText = (v, step) => {
  const decimals = Math.max(0, -Math.floor(Math.log10(step) + 1e-9));
  return v.toLocaleString("en-GB", { minimumFractionDigits: decimals, maximumFractionDigits: decimals })
    .replaceAll(",", "\u2009");
};

// A plot with round ticks; the legend (when given) sits under the plot, never over the lines.
function frame(title, desc, xr, yr, xlabel, ylabel, legendRows = 0) {
  const H = T + PLOT_H + B + legendRows * 14 + (legendRows ? 6 : 0);
  const root = svg("svg", { viewBox: `0 0 ${W} ${H}`, role: "img", class: "plot" });
  root.append(svg("title", {}, title), svg("desc", {}, desc));
  const xt = niceTicks(xr[0], xr[1], 8);
  const yt = niceTicks(yr[0], yr[1], 8);
  const x = (v) => L + ((v - xt.lo) / (xt.hi - xt.lo)) * (W - L - R);
  const y = (v) => T + PLOT_H - ((v - yt.lo) / (yt.hi - yt.lo)) * PLOT_H;
  root.append(svg("rect", { x: L, y: T, width: W - L - R, height: PLOT_H, class: "plot-area" }));
  for (const v of xt.ticks) {
    root.append(svg("line", { x1: x(v), x2: x(v), y1: T, y2: T + PLOT_H, class: "grid" }));
    root.append(svg("text", { x: x(v), y: T + PLOT_H + 13, class: "tick", "text-anchor": "middle", "data-tick": "x" },
      tickText(v, xt.step)));
  }
  for (const v of yt.ticks) {
    root.append(svg("line", { x1: L, x2: W - R, y1: y(v), y2: y(v), class: "grid" }));
    root.append(svg("text", { x: L - 4, y: y(v) + 3, class: "tick", "text-anchor": "end", "data-tick": "y" },
      tickText(v, yt.step)));
  }
  root.append(svg("text", { x: (L + W - R) / 2, y: T + PLOT_H + 28, class: "axis", "text-anchor": "middle" }, xlabel));
  root.append(svg("text", { x: 10, y: T + PLOT_H / 2, class: "axis", "text-anchor": "middle",
    transform: `rotate(-90 10 ${T + PLOT_H / 2})` }, ylabel));
  const clip = `clip-${Math.random().toString(36).slice(2)}`;
  const defs = svg("defs");
  const cp = svg("clipPath", { id: clip });
  cp.append(svg("rect", { x: L, y: T, width: W - L - R, height: PLOT_H }));
  defs.append(cp);
  root.append(defs);
  const inside = svg("g", { "clip-path": `url(#${clip})` });
  root.append(inside);
  return { root, inside, x, y, H, xt, yt };
}

const path = (xs, ys, x, y) => xs.map((v, i) => `${i ? "L" : "M"}${x(v).toFixed(1)},${y(ys[i]).toFixed(1)}`).join("");
const span = (values) => [Math.min(...values), Math.max(...values)];

// the legend under the plot: one row per item, a swatch (line or area) and its words
function legend(root, items, top) {
  items.forEach(([cls, text, kind], i) => {
    const yy = top + 10 + i * 14;
    if (kind === "area") root.append(svg("rect", { x: L, y: yy - 6, width: 18, height: 8, class: cls }));
    else root.append(svg("line", { x1: L, x2: L + 18, y1: yy - 2, y2: yy - 2, class: cls }));
    root.append(svg("text", { x: L + 24, y: yy + 1, class: "legend" }, text));
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

// The acid-base plane with fixed, familiar axes (the core's acid_base_map): the normal region, every
// compensation band across the range, the sample and the PaCO2 target.
const BAND_STYLE = [
  ["respiratory_acidosis_acute", "band-ra", "Respiratory acidosis, acute"],
  ["respiratory_acidosis_chronic", "band-rc", "Respiratory acidosis, chronic"],
  ["respiratory_alkalosis_acute", "band-xa", "Respiratory alkalosis, acute"],
  ["respiratory_alkalosis_chronic", "band-xc", "Respiratory alkalosis, chronic"],
  ["metabolic_acidosis", "band-ma", "Metabolic acidosis (Winters)"],
  ["metabolic_alkalosis", "band-mx", "Metabolic alkalosis"],
];

function polygon(outline, x, y, cls) {
  const xs = outline.pco2.value, ys = outline.hco3.value;
  return svg("path", { d: `${path(xs, ys, x, y)}Z`, class: cls });
}

function acidBase(response, request, map) {
  const o = response.outputs;
  const pco2 = request.inputs.pco2;
  if (!map || !map.ok || !pco2 || typeof o.hco3 !== "object") return null;
  const m = map.outputs;
  const unit = m.axes.pco2.low.unit;
  const px = pco2.unit === unit ? pco2.value : null;
  if (px === null) return null;
  const hy = o.hco3.value;
  const xr = [Math.min(m.axes.pco2.low.value, px), Math.max(m.axes.pco2.high.value, px)];
  const yr = [Math.min(m.axes.hco3.low.value, hy), Math.max(m.axes.hco3.high.value, hy)];
  const items = [["band-normal", "Normal", "area"], ...BAND_STYLE.map(([, cls, text]) => [cls, text, "area"])];
  const target = o.pco2_target && o.pco2_target.unit === unit ? o.pco2_target.value : null;
  if (target !== null) items.push(["line-target", "PaCO2 to aim for", "line"]);
  const { root, inside, x, y, H } = frame("Where the sample sits",
    "The sample on the PCO2 and HCO3 plane with the normal region and the compensation bands of the published rules.",
    xr, yr, `PCO2 (${unit})`, "HCO3 (mmol/L)", items.length);
  inside.append(polygon(m.normal, x, y, "band-normal"));
  for (const [name, cls] of BAND_STYLE) if (m.bands[name]) inside.append(polygon(m.bands[name], x, y, cls));
  if (target !== null) {
    inside.append(svg("line", { x1: x(target), x2: x(target), y1: T, y2: T + PLOT_H, class: "line-target",
      "data-target": String(target) }));
  }
  inside.append(svg("path", { d: `M${x(px)},${y(hy) - 7}L${x(px) + 7},${y(hy)}L${x(px)},${y(hy) + 7}L${x(px) - 7},${y(hy)}Z`,
    class: "mark", "data-sample": `${px},${hy}` }));
  legend(root, items, H - items.length * 14 - 6);
  return figure("acidbase", root, "Diamond: this sample. Shaded: the normal region and the bands of the published " +
    "compensation rules across the range" + (target !== null ? "; dotted upright line: the PaCO2 to aim for." : "."));
}

function odc(curve) {
  if (!curve || !curve.ok) return null;
  const o = curve.outputs;
  const xs = o.po2.value;
  const items = [["line-std", "Standard curve", "line"], ["line-pt", "This patient", "line"]];
  const { root, inside, x, y, H } = frame("Oxygen dissociation curve", "Saturation against PO2, standard and for this patient.",
    [0, Math.max(...xs)], [0, 100], `PO2 (${o.po2.unit})`, "SO2 (%)", items.length);
  inside.append(svg("path", { d: path(xs, o.so2_standard, x, y), class: "line-std" }));
  inside.append(svg("path", { d: path(xs, o.so2_patient, x, y), class: "line-pt" }));
  if (o.point) {
    const px = x(o.point.po2.value), py = y(o.point.so2);
    inside.append(svg("circle", { cx: px, cy: py, r: 5, class: "mark" }));
  }
  legend(root, items, H - items.length * 14 - 6);
  return figure("odc", root, "Dashed: the standard curve. Solid: shifted for this patient's pH, PCO2 and temperature. Dot: the measured PO2.");
}

function profile(prof) {
  if (!prof || !prof.ok) return null;
  const o = prof.outputs;
  const xs = o.altitude.value;
  const series = o.po2_predicted || o.pao2_alveolar;
  const which = o.po2_predicted ? "predicted PaO2" : "alveolar PO2";
  const unit = series.at_fio2.unit;
  const ys = [...series.at_fio2.value];
  const lines = [["line-pt", series.at_fio2.value, "On the FiO2 now"]];
  if (series.at_fio2_equivalent) {
    lines.push(["line-std", series.at_fio2_equivalent.value, "On the FiO2 that keeps today's level"]);
    ys.push(...series.at_fio2_equivalent.value);
  }
  // the user's own lowest acceptable PaO2 when given, else the usual in-flight threshold
  const target = o.po2_target || o.po2_threshold;
  const targetText = o.po2_target ? "Lowest acceptable PaO2 (yours)" : "In-flight threshold";
  if (target) ys.push(target.value);
  const items = lines.map(([cls, , text]) => [cls, text, "line"]);
  if (target) items.push(["line-target", targetText, "line"]);
  if (o.cabin_altitude && o.cabin_altitude.unit === o.altitude.unit) items.push(["line-cabin", "Cabin altitude", "line"]);
  const { root, inside, x, y, H } = frame("PO2 against altitude", `The ${which} from ground to the ceiling.`,
    [Math.min(...xs), Math.max(...xs)], [0, Math.max(...ys)], `Altitude (${o.altitude.unit})`, `${which} (${unit})`,
    items.length);
  for (const [cls, values] of lines) inside.append(svg("path", { d: path(xs, values, x, y), class: cls }));
  if (target) {
    inside.append(svg("line", { x1: L, x2: W - R, y1: y(target.value), y2: y(target.value), class: "line-target",
      "data-target": String(target.value) }));
  }
  if (o.cabin_altitude && o.cabin_altitude.unit === o.altitude.unit) {
    const cx = x(o.cabin_altitude.value);
    inside.append(svg("line", { x1: cx, x2: cx, y1: T, y2: T + PLOT_H, class: "line-cabin" }));
  }
  legend(root, items, H - items.length * 14 - 6);
  return figure("profile", root, `Solid: ${which} on the FiO2 now; dashed: on the FiO2 that keeps today's alveolar PO2. ` +
    `Dotted: ${o.po2_target ? "your lowest acceptable PaO2" : "the in-flight threshold"}; upright line: the cabin altitude.`);
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
    if (name === "acidbase") fig = acidBase(response, request, more[1]);
    if (name === "odc") fig = odc(more[0]);
    if (name === "profile") fig = profile(more[0]);
    if (fig) figs.push(fig);
  }
  if (!figs.length) return null;
  const box = document.createElement("section");
  box.className = "pictures";
  box.setAttribute("aria-label", "Pictures");
  box.append(...figs);
  return box;
}
