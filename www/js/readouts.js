// What the page reads out after a full frame: the cost under each panel, the measured
// difference, the colour scale of the difference panel, and the pixel probe.
import { app, $, fmt, term, modeName } from "./state.js";

export function showStats() {
  const r = app.viewer.report();
  const out = (name) => document.querySelector(`[data-readout="${name}"]`);
  out("per_vertex").textContent = `${fmt(r.lighting.per_vertex)} lighting evaluations (vertices)`;
  out("per_pixel").textContent = `${fmt(r.lighting.per_pixel)} lighting evaluations (pixels)`;
  $("status").textContent =
    `${fmt(r.triangles)} triangles · panels ${r.width}×${r.height} px · ` +
    `frame ${app.lastFrameMs.toFixed(1)} ms (all panels and the comparison, CPU, WebAssembly)`;
}

export function showMetrics() {
  const r = app.viewer.report();
  const m = r.metrics;
  const [a, b] = r.pair.map(modeName);
  $("pair-label").textContent = `${a} vs ${b}`;
  const dl = $("metrics");
  dl.replaceChildren();
  const f = (x) => x.toFixed(2);
  term(dl, "dE00 mean / p95 / max", `${f(m.de00.mean)} / ${f(m.de00.p95)} / ${f(m.de00.max)}`, "de00");
  dl.lastChild.dataset.p95 = String(m.de00.p95);
  term(dl, "dE*ab mean / p95 / max", `${f(m.de76.mean)} / ${f(m.de76.p95)} / ${f(m.de76.max)}`, "de76");
  term(dl, `Pixels above ${m.threshold_de00} dE00`, `${(100 * m.share_above_threshold).toFixed(1)} % of ${fmt(m.covered_pixels)}`, "share");
  term(dl, "Silhouette mismatch", `${fmt(m.silhouette_mismatch_pixels)} pixels`, "silhouette");
  term(dl, "Peak luminance Y", `${a} ${m.peak_luminance[0].toFixed(3)} · ${b} ${m.peak_luminance[1].toFixed(3)} (ratio ${m.peak_ratio.toFixed(2)})`, "peak");
  term(dl, "Lighting evaluations", `${fmt(r.lighting.per_vertex)} per-vertex · ${fmt(r.lighting.per_pixel)} per-pixel`, "cost");
  term(dl, "Lit with", app.viewer.litWith(), "lit");
}

export function drawLegend() {
  const s = app.viewer.scene();
  const key = `${s.difference.scale_max}/${s.difference.threshold}`;
  if (key === app.legendKey) return;
  app.legendKey = key;
  const c = $("legend");
  const bytes = new Uint8ClampedArray(app.viewer.legend(c.width));
  const ctx = c.getContext("2d");
  for (let y = 0; y < c.height; y++) ctx.putImageData(new ImageData(bytes, c.width, 1), 0, y);
  const t = s.difference.threshold / s.difference.scale_max;
  if (t <= 1) {
    ctx.fillStyle = "#ffffff";
    ctx.fillRect(Math.round(t * (c.width - 1)) - 1, 0, 2, c.height);
  }
  $("legend-mark").textContent = `│ ${s.difference.threshold}${app.embed ? "" : " just noticeable"}`;
  $("legend-mark").style.left = `${Math.min(1, t) * 100}%`;
  $("legend-mark").hidden = t > 1;
  $("legend-max").textContent = `${s.difference.scale_max} dE00`;
}

const hex = (c) => "#" + c.map((v) => v.toString(16).padStart(2, "0")).join("");
const lab = (l) => `Lab(${l.l.toFixed(1)}, ${l.a.toFixed(1)}, ${l.b.toFixed(1)})`;

/** Shows both colours of the pixel under (clientX, clientY) of `canvas` and their difference. */
export function probeAt(canvas, clientX, clientY) {
  const box = canvas.getBoundingClientRect();
  const x = Math.floor(((clientX - box.left) / box.width) * canvas.width);
  const y = Math.floor(((clientY - box.top) / box.height) * canvas.height);
  const d = app.viewer.probe(x, y);
  const out = $("probe");
  if (!d) return;
  const [a, b] = app.viewer.report().pair.map(modeName);
  out.textContent =
    `Pixel (${x}, ${y}): ${a} ${hex(d.a)} ${lab(d.lab_a)} · ${b} ${hex(d.b)} ${lab(d.lab_b)} · ` +
    `dE00 ${d.de00.toFixed(3)} · dE*ab ${d.de76.toFixed(3)}`;
  out.dataset.x = String(x);
  out.dataset.y = String(y);
  out.dataset.de00 = String(d.de00);
}
