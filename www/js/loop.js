// The render loop: one requestAnimationFrame per change (no busy loop), panels copied from
// wasm memory into their canvases with one putImageData each, and panel sizing.
import { app, $, mark, showProblem, says } from "./state.js";
import { drawLegend, showMetrics, showStats } from "./readouts.js";
import { updateLink } from "./link.js";

// While the mesh is being dragged only the two shading panels are rendered each frame; the
// CIEDE2000 comparison (the costliest part of a frame) follows once the drag pauses.
const SETTLE_MS = 150;

/** The panel canvases (the page's markup holds them from the start; looked up once). */
export const canvases = () => (app.canvases ??= [...document.querySelectorAll("canvas[data-panel]")]);

/** Asks for a frame; `fast` renders only the shading panels (during a drag). */
export function requestRender(fast = false) {
  const f = app.frame;
  if (!f.pending) {
    f.quick = fast;
    f.pending = true;
    requestAnimationFrame(frame);
  } else if (!fast) {
    f.quick = false; // a full frame was asked for as well
  }
}

function frame() {
  const f = app.frame;
  const v = app.viewer;
  f.pending = false;
  const fast = f.quick;
  f.quick = false;
  const t0 = performance.now();
  if (fast && app.pool && app.pool.ready()) {
    drawBanded(t0);
    return;
  }
  try {
    if (fast) {
      v.renderPanels();
      clearTimeout(f.settleTimer);
      f.settleTimer = setTimeout(() => requestRender(false), SETTLE_MS);
    } else {
      v.render();
    }
  } catch (e) {
    showProblem(`Cannot render: ${says(e)}`);
    return;
  }
  mark("stale", fast ? "1" : "");
  const w = v.width();
  const h = v.height();
  for (const canvas of canvases()) {
    if (fast && canvas.dataset.panel === "difference") continue;
    const i = app.vocab.panels.indexOf(canvas.dataset.panel);
    if (canvas.width !== w || canvas.height !== h) {
      canvas.width = w;
      canvas.height = h;
    }
    const bytes = new Uint8ClampedArray(app.wasm.memory.buffer, v.panelPtr(i), v.panelLen(i));
    canvas.getContext("2d").putImageData(new ImageData(bytes, w, h), 0, 0);
  }
  app.lastFrameMs = performance.now() - t0;
  if (!fast) {
    // Encoding the link (JSON + zlib in wasm) waits for the frame after a drag, too.
    updateLink();
    showStats();
    showMetrics();
    drawLegend();
  }
  mark("ready", "1");
}

/** A drag frame drawn in bands by the workers (workers.js); one frame at a time: a frame
 * asked for meanwhile follows when the bands are in. `settle` schedules the full frame
 * (with the comparison) that follows a drag; tests leave it out to read the banded frame. */
export function drawBanded(t0 = performance.now(), settle = true) {
  const f = app.frame;
  const pool = app.pool;
  if (settle) {
    clearTimeout(f.settleTimer);
    f.settleTimer = setTimeout(() => requestRender(false), SETTLE_MS);
  }
  if (pool.busy) {
    f.again = true;
    return Promise.resolve();
  }
  const v = app.viewer;
  const w = v.width();
  const h = v.height();
  return pool.draw(v.sceneJson(), h).then((bands) => {
    for (const canvas of canvases()) {
      const k = ["per_vertex", "per_pixel"].indexOf(canvas.dataset.panel);
      if (k < 0) continue;
      if (canvas.width !== w || canvas.height !== h) {
        canvas.width = w;
        canvas.height = h;
      }
      const ctx = canvas.getContext("2d");
      for (const b of bands) {
        const len = b.bytes.length / 2;
        const px = new Uint8ClampedArray(b.bytes.buffer, k * len, len);
        ctx.putImageData(new ImageData(px, w, b.y1 - b.y0), 0, b.y0);
      }
    }
    mark("stale", "1");
    app.lastFrameMs = performance.now() - t0;
    mark("ready", "1");
  }, () => {
    pool.usable = false; // a worker failed: one thread from now on
  }).finally(() => {
    if (f.again) {
      f.again = false;
      requestRender(true);
    }
  });
}

/** Sizes the panels to the layout, in device pixels so they stay sharp on high-DPI screens. */
export function fitPanels() {
  if (!app.fitToLayout) return;
  const box = $("panels").getBoundingClientRect();
  const gap = app.embed ? 4 : 16;
  const all = canvases();
  const n = all.length;
  let cssW = Math.max(16, Math.floor((box.width - gap * (n - 1)) / n));
  if (app.embed) {
    // The frame's height bounds the panels too: leave room for captions, legend and link.
    const spare = window.innerHeight - 70;
    cssW = Math.max(16, Math.min(cssW, Math.floor((spare * 4) / 3)));
  }
  const cssH = Math.max(12, Math.round((cssW * 3) / 4));
  const dpr = window.devicePixelRatio || 1;
  const side = app.vocab.max_panel_side;
  const w = Math.min(side, Math.round(cssW * dpr));
  const h = Math.min(side, Math.round(cssH * dpr));
  for (const c of all) {
    c.style.width = `${cssW}px`;
    c.style.height = `${cssH}px`;
  }
  const s = app.viewer.scene();
  if (s.panel.width !== w || s.panel.height !== h) {
    try {
      app.viewer.setPanelSize(w, h);
    } catch (e) {
      showProblem(`Cannot size the panels: ${says(e)}`);
    }
    requestRender();
  }
}

/** `?size=WxH`: panels of a fixed size in device pixels (for docs and tests). */
export function fixPanelSize(w, h) {
  app.fitToLayout = false;
  app.viewer.setPanelSize(w, h);
  for (const c of canvases()) c.style.width = `${w / (window.devicePixelRatio || 1)}px`;
}
