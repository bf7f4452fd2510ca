// twinshade page: controls, input and presentation. All rendering happens in the wasm module;
// this file only edits the scene, asks for a frame, and copies each panel's pixels from wasm
// memory into its canvas once per frame.
import init, { Viewer } from "./pkg/twinshade.js";

const $ = (id) => document.getElementById(id);
const canvases = [...document.querySelectorAll("canvas[data-panel]")];
// Index of each panel in the viewer (see Viewer.panelPtr).
const PANEL_INDEX = { gouraud: 0, phong: 1, difference: 2 };
const MODE_NAME = { gouraud: "Gouraud", phong: "Phong", exact: "exact surface" };
const readouts = [...document.querySelectorAll("[data-readout]")];

// Detail slider per shape: its range and how a slider value becomes shape parameters.
const SHAPES = {
  icosphere: { min: 0, max: 7, def: 2, make: (d) => ({ kind: "icosphere", level: d }), of: (s) => s.level, text: (d) => `level ${d}` },
  uv_sphere: { min: 2, max: 64, def: 8, make: (d) => ({ kind: "uv_sphere", rings: d, segments: 2 * d }), of: (s) => s.rings, text: (d) => `${d} × ${2 * d}` },
  torus: { min: 3, max: 96, def: 10, make: (d) => ({ kind: "torus", rings: 2 * d, segments: d }), of: (s) => s.segments, text: (d) => `${2 * d} × ${d}` },
  vase: { min: 2, max: 96, def: 10, make: (d) => ({ kind: "vase", rings: d, segments: 2 * d }), of: (s) => s.rings, text: (d) => `${d} × ${2 * d}` },
  quad_grid: { min: 1, max: 64, def: 6, make: (d) => ({ kind: "quad_grid", cells: d }), of: (s) => s.cells, text: (d) => `${d} × ${d} quads` },
  cube: { min: 0, max: 0, def: 0, make: () => ({ kind: "cube" }), of: () => 0, text: () => "fixed" },
};

const shininessToSlider = (n) => Math.round((100 * Math.log(n)) / Math.log(1024));
const sliderToShininess = (s) => Math.max(1, Math.round(Math.pow(1024, s / 100)));

let wasm;
let viewer;
let fitToLayout = true;
let pending = false;
let lastFrameMs = 0;

function showProblem(message) {
  const p = $("problem");
  if (message) {
    p.textContent = message;
    p.hidden = false;
  } else {
    p.textContent = "";
    p.hidden = true;
  }
}

/** Applies `edit` to a copy of the scene; the viewer keeps its scene if the result is refused. */
function editScene(edit) {
  const scene = viewer.scene();
  edit(scene);
  $("preset").value = "";
  $("preset-caption").textContent = "";
  try {
    viewer.setScene(scene);
    showProblem("");
  } catch (e) {
    showProblem(`Not applied: ${e.message || e}`);
  }
  syncControls();
  requestRender();
}

// While the mesh is being dragged only the two shading panels are rendered each frame; the
// CIEDE2000 comparison (the costliest part of a frame) follows once the drag pauses.
const SETTLE_MS = 150;
let quick = false;
let settleTimer = 0;

function requestRender(fast = false) {
  if (!pending) {
    quick = fast;
    pending = true;
    requestAnimationFrame(frame);
  } else if (!fast) {
    quick = false; // a full frame was asked for as well
  }
}

function frame() {
  pending = false;
  const fast = quick;
  quick = false;
  const t0 = performance.now();
  try {
    if (fast) {
      viewer.renderPanels();
      clearTimeout(settleTimer);
      settleTimer = setTimeout(() => requestRender(false), SETTLE_MS);
    } else {
      viewer.render();
    }
  } catch (e) {
    showProblem(`Cannot render: ${e.message || e}`);
    return;
  }
  document.body.dataset.stale = fast ? "1" : "";
  const w = viewer.width();
  const h = viewer.height();
  canvases.forEach((canvas) => {
    const i = PANEL_INDEX[canvas.dataset.panel];
    if (fast && canvas.dataset.panel === "difference") return;
    if (canvas.width !== w || canvas.height !== h) {
      canvas.width = w;
      canvas.height = h;
    }
    const bytes = new Uint8ClampedArray(wasm.memory.buffer, viewer.panelPtr(i), viewer.panelLen(i));
    canvas.getContext("2d").putImageData(new ImageData(bytes, w, h), 0, 0);
  });
  lastFrameMs = performance.now() - t0;
  if (!fast) {
    // Encoding the link (JSON + zlib in wasm) waits for the frame after a drag, too.
    updateLink();
    showStats();
    showMetrics();
    drawLegend();
  }
  document.body.dataset.ready = "1";
}

const fmt = (n) => n.toLocaleString("en-US");

/** Keeps the address in step with the scene, without adding history entries. */
let lastLink = "";
function updateLink() {
  const link = `#s=${viewer.shareFragment()}`;
  if (link !== lastLink) {
    lastLink = link;
    history.replaceState(null, "", link);
    if (document.body.dataset.embed === "1") {
      const full = new URL(location.href);
      full.searchParams.delete("embed");
      $("open-full").href = full.href;
    }
  }
}

async function copyLink() {
  const status = $("copy-status");
  try {
    await navigator.clipboard.writeText(location.href);
    status.textContent = "Link copied.";
  } catch {
    // No clipboard permission (e.g. an insecure context): offer the link to copy by hand.
    window.prompt("Copy this link:", location.href);
    status.textContent = "";
  }
}

/** Offers a file for download; nothing leaves the machine. */
function download(name, blob) {
  const a = document.createElement("a");
  a.href = URL.createObjectURL(blob);
  a.download = name;
  a.click();
  setTimeout(() => URL.revokeObjectURL(a.href), 10000);
}

/** The report sheet (panels, labels, legend, metrics, link) drawn by the wasm module. */
function sheetCanvas() {
  const s = viewer.reportSheet();
  const c = document.createElement("canvas");
  c.width = s.width;
  c.height = s.height;
  const bytes = new Uint8ClampedArray(s.rgba.buffer, s.rgba.byteOffset, s.rgba.length);
  c.getContext("2d").putImageData(new ImageData(bytes, s.width, s.height), 0, 0);
  return c;
}

function bindExports() {
  $("save-sheet").addEventListener("click", () =>
    sheetCanvas().toBlob((b) => download("twinshade-sheet.png", b), "image/png"));
  $("save-json").addEventListener("click", () => {
    const doc = { link: location.href, report: viewer.report(), scene: JSON.parse(viewer.sceneJson()) };
    download("twinshade-metrics.json", new Blob([JSON.stringify(doc, null, 2)], { type: "application/json" }));
  });
  $("save-csv").addEventListener("click", () =>
    download("twinshade-metrics.csv", new Blob([viewer.reportCsv()], { type: "text/csv" })));
}

/** Imports a mesh file's bytes; a broken file is explained and the previous scene stays. */
function loadMeshBytes(name, bytes) {
  try {
    const info = viewer.loadMesh(name, new Uint8Array(bytes));
    showProblem("");
    $("mesh-info").textContent =
      `${info.name}: ${fmt(info.vertices)} vertices, ${fmt(info.faces)} faces, ` +
      `${fmt(info.triangles)} triangles, ${fmt(info.dropped_faces)} degenerate faces dropped; ` +
      `normals ${info.authored_normals ? "in the file" : "not in the file (computed)"}.`;
    $("preset").value = "";
    $("preset-caption").textContent = "";
    syncControls();
    requestRender();
    return true;
  } catch (e) {
    showProblem(`Not loaded: ${e.message || e}. The previous scene is unchanged.`);
    return false;
  }
}

function bindMeshFiles() {
  const read = (file) => file.arrayBuffer().then((b) => loadMeshBytes(file.name, b));
  $("mesh-file").addEventListener("change", () => {
    const f = $("mesh-file").files[0];
    if (f) read(f);
  });
  const zone = $("panels");
  zone.addEventListener("dragover", (e) => { e.preventDefault(); zone.classList.add("dropping"); });
  zone.addEventListener("dragleave", () => zone.classList.remove("dropping"));
  zone.addEventListener("drop", (e) => {
    e.preventDefault();
    zone.classList.remove("dropping");
    const f = e.dataTransfer && e.dataTransfer.files[0];
    if (f) read(f);
  });
}

/** `?mesh=relative/path.obj`: a mesh that docs host beside the page (same site only). */
async function loadMeshFromQuery(path) {
  const url = new URL(path, location.href);
  if (url.origin !== location.origin) {
    showProblem("The mesh= address must be on this site; other sites are never contacted.");
    return;
  }
  try {
    const r = await fetch(url);
    if (!r.ok) throw new Error(`${r.status} ${r.statusText}`);
    loadMeshBytes(url.pathname.split("/").pop() || "mesh", await r.arrayBuffer());
  } catch (e) {
    showProblem(`Cannot fetch the mesh ${path}: ${e.message || e}`);
  }
}

let presetList = [];
function choosePreset(id) {
  const p = presetList.find((x) => x.id === id);
  if (!p) return;
  try {
    viewer.loadPreset(id);
    showProblem("");
  } catch (e) {
    showProblem(`Cannot load the preset: ${e.message || e}`);
    return;
  }
  $("preset").value = id;
  $("preset-caption").textContent = p.caption;
  $("caption").textContent = `${p.title}. ${p.caption}`;
  syncControls();
  requestRender();
}

function setPresenting(on) {
  document.body.dataset.present = on ? "1" : "";
  $("caption").hidden = !on;
  $("present").setAttribute("aria-pressed", String(on));
  if (on && !$("preset").value && presetList.length) choosePreset(presetList[0].id);
}

function bindPresets() {
  presetList = Viewer.presets().map(([id, title, caption]) => ({ id, title, caption }));
  for (const p of presetList) {
    const o = document.createElement("option");
    o.value = p.id;
    o.textContent = p.title;
    $("preset").append(o);
  }
  $("preset").addEventListener("change", () => choosePreset($("preset").value));
  $("present").addEventListener("click", () => setPresenting(document.body.dataset.present !== "1"));
  document.addEventListener("keydown", (e) => {
    if (document.body.dataset.present !== "1") return;
    if (e.target instanceof HTMLCanvasElement || e.target.closest?.("select, input")) return;
    const i = presetList.findIndex((p) => p.id === $("preset").value);
    if (e.key === "ArrowRight" || e.key === "ArrowLeft") {
      const step = e.key === "ArrowRight" ? 1 : -1;
      const next = (i + step + presetList.length) % presetList.length;
      choosePreset(presetList[next].id);
      e.preventDefault();
    } else if (e.key === "Escape") {
      setPresenting(false);
    }
  });
}

function showStats() {
  const r = viewer.report();
  readouts[0].textContent = `${fmt(r.lighting.per_vertex)} lighting evaluations (vertices)`;
  readouts[1].textContent = `${fmt(r.lighting.per_pixel)} lighting evaluations (pixels)`;
  $("status").textContent =
    `${fmt(r.triangles)} triangles · panels ${r.width}×${r.height} px · ` +
    `frame ${lastFrameMs.toFixed(1)} ms (all panels and the comparison, CPU, WebAssembly)`;
}

/** Adds a term and its value to a description list; text only, never HTML. */
function term(dl, name, value, key) {
  const dt = document.createElement("dt");
  dt.textContent = name;
  const dd = document.createElement("dd");
  dd.textContent = value;
  if (key) dd.dataset.metric = key;
  dl.append(dt, dd);
}

function showMetrics() {
  const r = viewer.report();
  const m = r.metrics;
  const [a, b] = r.pair.map((p) => MODE_NAME[p]);
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
}

let legendKey = "";
function drawLegend() {
  const s = viewer.scene();
  const key = `${s.difference.scale_max}/${s.difference.threshold}`;
  if (key === legendKey) return;
  legendKey = key;
  const c = $("legend");
  const bytes = new Uint8ClampedArray(viewer.legend(c.width));
  const ctx = c.getContext("2d");
  for (let y = 0; y < c.height; y++) ctx.putImageData(new ImageData(bytes, c.width, 1), 0, y);
  const t = s.difference.threshold / s.difference.scale_max;
  if (t <= 1) {
    ctx.fillStyle = "#ffffff";
    ctx.fillRect(Math.round(t * (c.width - 1)) - 1, 0, 2, c.height);
  }
  const embed = document.body.dataset.embed === "1";
  $("legend-mark").textContent = `│ ${s.difference.threshold}${embed ? "" : " just noticeable"}`;
  $("legend-mark").style.left = `${Math.min(1, t) * 100}%`;
  $("legend-mark").hidden = t > 1;
  $("legend-max").textContent = `${s.difference.scale_max} dE00`;
}

const hex = (c) => "#" + c.map((v) => v.toString(16).padStart(2, "0")).join("");
const lab = (l) => `Lab(${l.l.toFixed(1)}, ${l.a.toFixed(1)}, ${l.b.toFixed(1)})`;

/** Shows both colours of a pixel and their difference. */
function probeAt(canvas, clientX, clientY) {
  const box = canvas.getBoundingClientRect();
  const x = Math.floor(((clientX - box.left) / box.width) * canvas.width);
  const y = Math.floor(((clientY - box.top) / box.height) * canvas.height);
  const d = viewer.probe(x, y);
  const out = $("probe");
  if (!d) return;
  const [a, b] = viewer.report().pair.map((p) => MODE_NAME[p]);
  out.textContent =
    `Pixel (${x}, ${y}): ${a} ${hex(d.a)} ${lab(d.lab_a)} · ${b} ${hex(d.b)} ${lab(d.lab_b)} · ` +
    `dE00 ${d.de00.toFixed(3)} · dE*ab ${d.de76.toFixed(3)}`;
  out.dataset.x = String(x);
  out.dataset.y = String(y);
  out.dataset.de00 = String(d.de00);
}

function shapeKind(scene) {
  return scene.mesh.shape ? scene.mesh.shape.kind : null;
}

function syncControls() {
  const s = viewer.scene();
  const kind = shapeKind(s);
  if (!kind) {
    $("shape").value = "";
    $("detail").disabled = true;
    $("detail-out").textContent = "";
  }
  if (kind) {
    const spec = SHAPES[kind];
    $("shape").value = kind;
    const detail = $("detail");
    detail.min = spec.min;
    detail.max = spec.max;
    detail.disabled = spec.min === spec.max;
    detail.value = spec.of(s.mesh.shape);
    $("detail-out").textContent = spec.text(+detail.value);
  }
  $("normal-source").value = s.normals.source;
  $("normal-weighting").value = s.normals.weighting;
  $("crease").value = s.normals.crease_deg;
  $("crease-out").textContent = s.normals.crease_deg >= 180 ? "smooth" : `${Math.round(s.normals.crease_deg)}°`;
  $("polygons").value = s.polygons;
  $("subdiv-method").value = s.subdivision.method;
  $("subdiv-levels").value = s.subdivision.levels;
  $("subdiv-levels-out").textContent = s.subdivision.levels ? `${s.subdivision.levels} (× ${4 ** s.subdivision.levels} triangles)` : "none";
  const m = s.material;
  $("base").value = m.base_color;
  $("finish").value = m.finish;
  $("model").value = s.model;
  $("shininess").value = shininessToSlider(m.shininess);
  $("shininess-out").textContent = String(m.shininess);
  $("specular").value = m.specular;
  $("specular-out").textContent = m.specular.toFixed(2);
  const light = s.lights[0];
  const hasLight = Boolean(light);
  for (const id of ["light-kind", "light-az", "light-el", "light-color"]) $(id).disabled = !hasLight;
  if (hasLight) {
    $("light-kind").value = light.kind;
    $("light-az").value = light.azimuth_deg;
    $("light-az-out").textContent = `${Math.round(light.azimuth_deg)}°`;
    $("light-el").value = light.elevation_deg;
    $("light-el-out").textContent = `${Math.round(light.elevation_deg)}°`;
    $("light-color").value = light.color;
  }
  $("projection").value = s.camera.projection;
  $("roll").value = s.camera.roll_deg;
  $("roll-out").textContent = `${Math.round(s.camera.roll_deg)}°`;
  $("cull").checked = s.cull_back_faces;
  $("persp").checked = s.perspective_correct;
  $("pair").value = s.difference.pair.join(",");
  $("threshold").value = s.difference.threshold;
  $("scale").value = s.difference.scale_max;
}

function bindControls() {
  const on = (id, event, edit) => $(id).addEventListener(event, () => editScene(edit));
  on("shape", "change", (s) => {
    const spec = SHAPES[$("shape").value];
    s.mesh = { shape: spec.make(spec.def) };
  });
  on("detail", "input", (s) => {
    const spec = SHAPES[$("shape").value];
    s.mesh = { shape: spec.make(+$("detail").value) };
  });
  on("normal-source", "change", (s) => { s.normals.source = $("normal-source").value; });
  on("normal-weighting", "change", (s) => { s.normals.weighting = $("normal-weighting").value; });
  on("crease", "input", (s) => { s.normals.crease_deg = +$("crease").value; });
  on("polygons", "change", (s) => { s.polygons = $("polygons").value; });
  on("subdiv-method", "change", (s) => { s.subdivision.method = $("subdiv-method").value; });
  on("subdiv-levels", "change", (s) => { s.subdivision.levels = +$("subdiv-levels").value; });
  on("base", "input", (s) => { s.material.base_color = $("base").value; });
  on("finish", "change", (s) => { s.material.finish = $("finish").value; });
  on("model", "change", (s) => { s.model = $("model").value; });
  on("shininess", "input", (s) => { s.material.shininess = sliderToShininess(+$("shininess").value); });
  on("specular", "input", (s) => { s.material.specular = +$("specular").value; });
  on("light-kind", "change", (s) => { s.lights[0].kind = $("light-kind").value; });
  on("light-az", "input", (s) => { s.lights[0].azimuth_deg = +$("light-az").value; });
  on("light-el", "input", (s) => { s.lights[0].elevation_deg = +$("light-el").value; });
  on("light-color", "input", (s) => { s.lights[0].color = $("light-color").value; });
  on("projection", "change", (s) => { s.camera.projection = $("projection").value; });
  on("roll", "input", (s) => { s.camera.roll_deg = +$("roll").value; });
  on("cull", "change", (s) => { s.cull_back_faces = $("cull").checked; });
  on("persp", "change", (s) => { s.perspective_correct = $("persp").checked; });
  on("reset", "click", (s) => { s.rotation = [0, 0, 0, 1]; });
  on("pair", "change", (s) => { s.difference.pair = $("pair").value.split(","); });
  on("threshold", "change", (s) => { s.difference.threshold = +$("threshold").value; });
  on("scale", "change", (s) => { s.difference.scale_max = +$("scale").value; });
}

/** Dragging a panel turns the mesh; works for mouse, pen and touch. */
function bindTurning() {
  const DEG_PER_PX = 0.5;
  for (const canvas of canvases) {
    let last = null;
    let travelled = 0;
    canvas.addEventListener("pointerdown", (e) => {
      last = [e.clientX, e.clientY];
      travelled = 0;
      canvas.setPointerCapture(e.pointerId);
      e.preventDefault();
    });
    canvas.addEventListener("pointermove", (e) => {
      if (!last) return;
      const dx = e.clientX - last[0];
      const dy = e.clientY - last[1];
      last = [e.clientX, e.clientY];
      travelled += Math.abs(dx) + Math.abs(dy);
      if (dx || dy) {
        viewer.turn(dx * DEG_PER_PX, dy * DEG_PER_PX);
        requestRender(true);
      }
    });
    canvas.addEventListener("pointerup", (e) => {
      // A click without a drag probes the pixel under the pointer.
      if (last && travelled < 3) probeAt(canvas, e.clientX, e.clientY);
      last = null;
    });
    canvas.addEventListener("pointercancel", () => { last = null; });
    canvas.addEventListener("keydown", (e) => {
      const step = e.shiftKey ? 15 : 5;
      const turns = { ArrowLeft: [-step, 0], ArrowRight: [step, 0], ArrowUp: [0, -step], ArrowDown: [0, step] };
      const t = turns[e.key];
      if (t) {
        viewer.turn(t[0], t[1]);
        requestRender();
        e.preventDefault();
      }
    });
  }
}

// Turntable play: the mesh turns about its own up axis at TURN_DEG_PER_S. With
// prefers-reduced-motion the page never starts it by itself (?play is ignored) and, when the
// user presses Play, it moves in discrete 15-degree steps once a second instead of gliding.
const TURN_DEG_PER_S = 40;
const reducedMotion = matchMedia("(prefers-reduced-motion: reduce)");
let playing = false;
let playClock = 0;
let playTimer = 0;

function playTick(now) {
  if (!playing) return;
  const dt = Math.min(0.1, (now - playClock) / 1000);
  playClock = now;
  viewer.spin(TURN_DEG_PER_S * dt);
  requestRender(true);
  requestAnimationFrame(playTick);
}

function setPlaying(on) {
  playing = on;
  $("play").setAttribute("aria-pressed", String(on));
  $("play").textContent = on ? "Pause turntable" : "Play turntable";
  clearInterval(playTimer);
  if (!on) {
    requestRender();
    return;
  }
  if (reducedMotion.matches) {
    $("play-note").textContent = "Reduced motion is on: the mesh steps 15° each second.";
    playTimer = setInterval(() => {
      viewer.spin(15);
      requestRender();
    }, 1000);
  } else {
    playClock = performance.now();
    requestAnimationFrame(playTick);
  }
}

// Sweeps and advice run in slices of SLICE_MS between frames, so the page keeps answering;
// their plots are SVG drawn by the wasm module, and clicking one (or ← → on it) shows a step
// or level.
const SLICE_MS = 12;

/**
 * Calls `step` (one wasm call, one frame) until it returns false, SLICE_MS at a time with the
 * page free in between; `after(more)` runs after each slice, `failed(error)` on an error.
 * Returns a function that stops it.
 */
function runInSlices(step, after, failed) {
  let stopped = false;
  const slice = () => {
    if (stopped) return;
    const t0 = performance.now();
    let more = true;
    try {
      while (more && performance.now() - t0 < SLICE_MS) more = step();
    } catch (e) {
      stopped = true;
      failed(e);
      return;
    }
    after(more);
    if (more) setTimeout(slice, 0);
  };
  setTimeout(slice, 0);
  return () => { stopped = true; };
}

/** Clicks on a plot's [data-pick] marks, and ← → while it has focus, pick item `i` of `count()`. */
function bindPlot(box, count, current, pick) {
  box.addEventListener("click", (e) => {
    const hit = e.target.closest && e.target.closest("[data-pick]");
    if (hit) pick(+hit.dataset.pick);
  });
  box.addEventListener("keydown", (e) => {
    const step = { ArrowLeft: -1, ArrowRight: 1 }[e.key];
    if (step === undefined) return;
    const n = count();
    if (n) pick((Math.max(0, current()) + step + n) % n);
    e.preventDefault();
  });
}

let stopSweep = null;
let sweepCurrent = -1;

function showSweepPlot() {
  const box = $("sweep-plot");
  const width = Math.max(320, Math.min(960, Math.floor($("sweep-result").getBoundingClientRect().width || 720)));
  box.innerHTML = viewer.sweepPlot($("sweep-metric").value, width, 300, sweepCurrent);
  const svg = box.querySelector("svg");
  if (svg) svg.dataset.current = String(sweepCurrent);
}

function showSweepSummary() {
  const s = viewer.sweepSummary();
  const dl = $("sweep-summary");
  dl.replaceChildren();
  if (!s) return;
  const f = (x, d = 4) => x.toFixed(d);
  term(dl, "Steps", `${s.steps_done} of ${s.settings.steps} (${s.settings.axis})`, "steps");
  term(dl, "Highlight stability (CoV of the peak)", `Gouraud ${f(s.highlight_cov[0])} · Phong ${f(s.highlight_cov[1])}`, "cov");
  term(dl, "Peak luminance range", `Gouraud ${f(s.peak_min[0], 3)}–${f(s.peak_max[0], 3)} · Phong ${f(s.peak_min[1], 3)}–${f(s.peak_max[1], 3)}`, "peak-range");
  term(dl, "dE00 between the panels", `mean ${f(s.de00_mean, 2)} · worst p95 ${f(s.de00_p95_max, 2)}`, "sweep-de00");
  if (s.orientation_variance) {
    const v = s.orientation_variance;
    term(dl, "Orientation variance (largest change of Y at a fixed point)",
      `Gouraud ${f(v[0], 5)} · Phong ${f(v[1], 5)} over ${s.probes_tracked} points (1/255 = 0.00392)`, "orientation");
  }
}

function sweepDone(message) {
  stopSweep = null;
  $("sweep").textContent = "Run sweep";
  $("sweep-progress").hidden = true;
  $("sweep-status").textContent = message;
  document.body.dataset.sweep = "done";
}

function sweepProgressShown(more) {
  const [done, total] = viewer.sweepProgress();
  $("sweep-progress").value = done / Math.max(1, total);
  $("sweep-status").textContent = `${done} of ${total} steps`;
  $("sweep-result").hidden = false;
  showSweepPlot();
  showSweepSummary();
  if (!more) {
    sweepDone(`${total} steps measured. Click the plot to show an angle.`);
    requestRender(); // the panels show the current scene again
  }
}

function startSweep() {
  if (stopSweep) {
    stopSweep();
    sweepDone("Stopped; the plot shows the steps measured so far.");
    requestRender();
    return;
  }
  const steps = Math.round(+$("sweep-steps").value);
  try {
    viewer.startSweep($("sweep-axis").value, steps);
  } catch (e) {
    showProblem(`Cannot sweep: ${e.message || e}`);
    return;
  }
  showProblem("");
  if (playing) setPlaying(false);
  sweepCurrent = -1;
  document.body.dataset.sweep = "running";
  $("sweep").textContent = "Stop sweep";
  $("sweep-progress").hidden = false;
  $("sweep-progress").value = 0;
  if ($("sweep-axis").value === "roll") $("sweep-metric").value = "probe_change";
  else if ($("sweep-metric").value === "probe_change") $("sweep-metric").value = "peak_luminance";
  stopSweep = runInSlices(() => viewer.sweepStep(), sweepProgressShown, (e) => {
    sweepDone("");
    showProblem(`Sweep stopped: ${e.message || e}`);
  });
}

/** Shows a picked sweep step or advice level: `jump` changes the scene in wasm. */
function showPicked(jump, redraw) {
  try {
    jump();
  } catch (e) {
    showProblem(`${e.message || e}`);
    return false;
  }
  $("preset").value = "";
  syncControls();
  redraw();
  requestRender();
  return true;
}

function jumpToStep(step) {
  const [done] = viewer.sweepProgress();
  if (!(step >= 0 && step < done)) return;
  showPicked(() => {
    viewer.sweepJump(step);
    sweepCurrent = step;
  }, showSweepPlot);
}

function bindMotion() {
  $("play").addEventListener("click", () => setPlaying(!playing));
  $("sweep").addEventListener("click", startSweep);
  $("sweep-metric").addEventListener("change", showSweepPlot);
  bindPlot($("sweep-plot"), () => viewer.sweepProgress()[0], () => sweepCurrent, jumpToStep);
  $("save-sweep").addEventListener("click", () =>
    download("twinshade-sweep.csv", new Blob([viewer.sweepCsv()], { type: "text/csv" })));
}

// Advice runs like a sweep: in slices between frames, then a plot of error against lighting
// evaluations (one point per level; clicking one shows that level) and a table.
let stopAdvice = null;
let adviceCurrent = -1;

function showAdvice() {
  const a = viewer.advice();
  if (!a) return;
  const box = $("advice-plot");
  const width = Math.max(320, Math.min(960, Math.floor($("advice-result").getBoundingClientRect().width || 720)));
  box.innerHTML = viewer.advicePlot(width, 300, adviceCurrent);
  const table = $("advice-table");
  table.replaceChildren();
  const head = table.insertRow();
  for (const h of ["Level", "Vertices lit", "Triangles", "Worst p95 dE00", "Mean p95 dE00", "Pixels lit"]) {
    const th = document.createElement("th");
    th.textContent = h;
    head.append(th);
  }
  a.rungs.forEach((r, i) => {
    const row = table.insertRow();
    row.dataset.advised = i === a.advised ? "1" : "";
    for (const v of [r.label, fmt(r.vertices), fmt(r.triangles), r.worst_p95.toFixed(2), r.mean_p95.toFixed(2), fmt(Math.round(r.pixels))]) {
      row.insertCell().textContent = v;
    }
  });
  const answer = $("advice-answer");
  if (a.advised !== null && a.advised !== undefined) {
    const r = a.rungs[a.advised];
    answer.textContent =
      `Per-vertex lighting needs ${r.label}: ${fmt(r.vertices)} lit vertices and ${fmt(r.triangles)} triangles per frame ` +
      `keep the 95th-percentile difference under ${a.settings.threshold} dE00 at all ${a.settings.steps} angles (worst ${r.worst_p95.toFixed(2)}). ` +
      `Per-pixel lighting at this view costs ${fmt(a.current_pixels)} lighting evaluations per frame.`;
  } else {
    answer.textContent = a.note ? `No level yet: ${a.note}.` : "Measuring…";
  }
}

function adviceDone(message) {
  stopAdvice = null;
  $("advise").textContent = "Advise";
  $("advice-progress").hidden = true;
  $("advice-status").textContent = message;
  document.body.dataset.advice = "done";
}

function adviceProgressShown(more) {
  const [done, total] = viewer.adviceProgress();
  $("advice-progress").value = done / Math.max(1, total);
  $("advice-status").textContent = `${done} frames rendered`;
  $("advice-result").hidden = false;
  showAdvice();
  if (!more) {
    adviceDone("Done. Click a point of the plot to show that level.");
    requestRender();
  }
}

function startAdvice() {
  if (stopAdvice) {
    stopAdvice();
    adviceDone("Stopped; the table shows the levels measured so far.");
    requestRender();
    return;
  }
  try {
    viewer.startAdvice(+$("advice-steps").value, $("advice-method").value);
  } catch (e) {
    showProblem(`Cannot advise: ${e.message || e}`);
    return;
  }
  showProblem("");
  if (playing) setPlaying(false);
  adviceCurrent = -1;
  document.body.dataset.advice = "running";
  $("advise").textContent = "Stop advice";
  $("advice-progress").hidden = false;
  $("advice-progress").value = 0;
  stopAdvice = runInSlices(() => viewer.adviceStep(), adviceProgressShown, (e) => {
    adviceDone("");
    showProblem(`Advice stopped: ${e.message || e}`);
  });
}

function jumpToLevel(i) {
  const a = viewer.advice();
  if (!a || !(i >= 0 && i < a.rungs.length)) return;
  showPicked(() => {
    viewer.adviceJump(i);
    adviceCurrent = i;
  }, showAdvice);
}

function bindAdvice() {
  $("advise").addEventListener("click", startAdvice);
  bindPlot($("advice-plot"), () => (viewer.advice()?.rungs.length ?? 0), () => adviceCurrent, jumpToLevel);
  $("save-advice").addEventListener("click", () => {
    const doc = { link: location.href, advice: viewer.advice() };
    download("twinshade-advice.json", new Blob([JSON.stringify(doc, null, 2)], { type: "application/json" }));
  });
}

/** Sizes the panels to the layout, in device pixels so they stay sharp on high-DPI screens. */
function fitPanels() {
  if (!fitToLayout) return;
  const box = $("panels").getBoundingClientRect();
  const embed = document.body.dataset.embed === "1";
  const gap = embed ? 4 : 16;
  const n = canvases.length;
  let cssW = Math.max(16, Math.floor((box.width - gap * (n - 1)) / n));
  if (embed) {
    // The frame's height bounds the panels too: leave room for captions, legend and link.
    const spare = window.innerHeight - 70;
    cssW = Math.max(16, Math.min(cssW, Math.floor((spare * 4) / 3)));
  }
  const cssH = Math.max(12, Math.round((cssW * 3) / 4));
  const dpr = window.devicePixelRatio || 1;
  const w = Math.min(4096, Math.round(cssW * dpr));
  const h = Math.min(4096, Math.round(cssH * dpr));
  for (const c of canvases) {
    c.style.width = `${cssW}px`;
    c.style.height = `${cssH}px`;
  }
  const s = viewer.scene();
  if (s.panel.width !== w || s.panel.height !== h) {
    try {
      viewer.setPanelSize(w, h);
    } catch (e) {
      showProblem(`Cannot size the panels: ${e.message || e}`);
    }
    requestRender();
  }
}

async function start() {
  wasm = await init();
  viewer = new Viewer();
  const q = new URLSearchParams(location.search);
  if (q.has("embed")) {
    document.body.dataset.embed = "1";
    const full = new URL(location.href);
    full.searchParams.delete("embed");
    $("open-full").href = full.href;
  }
  // ?size=WxH renders at a fixed panel size (for docs and tests) instead of fitting the layout.
  const fixed = /^(\d+)x(\d+)$/.exec(q.get("size") || "");
  if (fixed) {
    fitToLayout = false;
    viewer.setPanelSize(+fixed[1], +fixed[2]);
    for (const c of canvases) {
      c.style.width = `${+fixed[1] / (window.devicePixelRatio || 1)}px`;
    }
  }
  // A mesh hosted beside the page comes first, so a link that names it can then open.
  if (q.get("mesh")) await loadMeshFromQuery(q.get("mesh"));
  // A scene in the link (#s=...) opens as it was shared; a damaged one is explained and the
  // default scene shown instead.
  if (location.hash.startsWith("#s=")) {
    try {
      viewer.setSceneFromLink(location.hash.slice(3));
    } catch (e) {
      showProblem(`${e.message || e}. Showing the default scene.`);
    }
  }
  bindControls();
  bindPresets();
  bindExports();
  bindMeshFiles();
  $("copy-link").addEventListener("click", copyLink);
  bindTurning();
  bindMotion();
  bindAdvice();
  syncControls();
  fitPanels();
  new ResizeObserver(fitPanels).observe($("panels"));
  requestRender();
  // ?sweep=turntable or ?sweep=roll:36 runs a sweep on opening (docs that show the plot).
  const sweepQuery = /^(turntable|roll)(?::(\d+))?$/.exec(q.get("sweep") || "");
  if (sweepQuery) {
    $("sweep-axis").value = sweepQuery[1];
    if (sweepQuery[2]) $("sweep-steps").value = sweepQuery[2];
    startSweep();
  }
  // ?play starts the turntable (docs and embeds), unless the reader prefers reduced motion.
  if (q.has("play") && !reducedMotion.matches) setPlaying(true);
  // For tests and the console: read-only access plus turning.
  window.twinshade = {
    sceneJson: () => viewer.sceneJson(),
    report: () => viewer.report(),
    sweepCsv: () => viewer.sweepCsv(),
    advice: () => viewer.advice(),
    loadMesh: (name, bytes) => loadMeshBytes(name, bytes),
    sheetDataUrl: () => {
      const c = sheetCanvas();
      return [c.width, c.height, c.toDataURL("image/png")];
    },
  };
}

start().catch((e) => {
  showProblem(`twinshade could not start: ${e.message || e}`);
  console.error(e);
});
