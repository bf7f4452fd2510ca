// In-browser benchmark: the fixed bench scene (docs/REFERENCES.md, "The benchmark scene") rendered by the real
// twinshade wasm module, both panels plus putImageData per frame, reported like the WebGL
// peer page (POST /result/NAME.json), so one driver times both in one run.
// Query: ?configs=5x800x600,7x800x600&warm=10&frames=100&name=twinshade&workers=1
// workers=N (N > 1): each frame is drawn in N horizontal bands by N Web Workers, each with its
// own instance of the module (bench-worker.js), and put together here; the pixels are those of
// one thread (the result JSON gives "workers" and a hash of the last frame's panels).
import init, { Viewer } from "./pkg/twinshade.js";

const Q = new URLSearchParams(location.search);
const NAME = Q.get("name") || "twinshade";
const WARM = +(Q.get("warm") || 10);
const FRAMES = +(Q.get("frames") || 100);
const CONFIGS = (Q.get("configs") || "5x800x600,7x800x600,5x400x300,7x400x300")
  .split(",").map((s) => s.split("x").map(Number));

const WORKERS = Math.max(1, Math.min(16, +(Q.get("workers") || 1)));

const post = (path, body) => fetch(path, { method: "POST", body });

/** FNV-1a over bytes, as a hex string: the last frame's panels, to compare runs. */
function fnv1a(bytes, h = 0x811c9dc5) {
  for (let i = 0; i < bytes.length; i++) h = Math.imul(h ^ bytes[i], 0x01000193) >>> 0;
  return h;
}

/** N band workers: `frame(f)` resolves once every band of frame f is in `panels`. */
async function bandWorkers(n, level, w, h, panels, bandMs) {
  const workers = Array.from({ length: n }, () => new Worker("bench-worker.js", { type: "module" }));
  const once = (wk) => new Promise((resolve, reject) => {
    wk.onmessage = (e) => (e.data.error ? reject(new Error(e.data.error)) : resolve(e.data));
  });
  await Promise.all(workers.map((wk) => { const p = once(wk); wk.postMessage({ level, w, h }); return p; }));
  const bands = workers.map((_, k) => [Math.floor((k * h) / n), Math.floor(((k + 1) * h) / n)]);
  return {
    frame: (f) => Promise.all(workers.map((wk, k) => {
      const p = once(wk).then(({ y0, bytes, ms }) => {
        bandMs.push(ms);
        const len = bytes.length / 2;
        panels[0].set(bytes.subarray(0, len), y0 * w * 4);
        panels[1].set(bytes.subarray(len), y0 * w * 4);
      });
      wk.postMessage({ frame: f, y0: bands[k][0], y1: bands[k][1] });
      return p;
    })),
    stop: () => workers.forEach((wk) => wk.terminate()),
  };
}
addEventListener("error", (e) => post(`/result/${NAME}.err`, `${e.message} @${e.lineno}`));

function stats(ms) {
  const s = ms.slice().sort((a, b) => a - b);
  const n = s.length;
  const med = n % 2 ? s[(n - 1) / 2] : 0.5 * (s[n / 2 - 1] + s[n / 2]);
  return { median_ms: +med.toFixed(3), min_ms: +s[0].toFixed(3), max_ms: +s[n - 1].toFixed(3) };
}

async function bench() {
  const wasm = await init();
  const viewer = new Viewer();
  const out = { impl: "twinshade-wasm", workers: WORKERS, warm: WARM, frames: FRAMES, hardwareConcurrency: navigator.hardwareConcurrency, userAgent: navigator.userAgent, results: [] };
  for (const [level, w, h] of CONFIGS) {
    viewer.loadBenchmarkScene(level, w, h);
    const canvases = [0, 1].map(() => {
      const c = document.createElement("canvas");
      c.width = w;
      c.height = h;
      $panels.appendChild(c);
      return c.getContext("2d");
    });
    // One thread: the module's own panels. N workers: bands put together in these.
    const panels = [0, 1].map(() => new Uint8ClampedArray(w * h * 4));
    const bandMs = [];
    const pool = WORKERS > 1 ? await bandWorkers(WORKERS, level, w, h, panels, bandMs) : null;
    const frame = async (f) => {
      const t0 = performance.now();
      let views;
      if (pool) {
        await pool.frame(f);
        views = panels;
      } else {
        viewer.setTurntable(f);
        viewer.renderPanels();
        views = [0, 1].map((i) => new Uint8ClampedArray(wasm.memory.buffer, viewer.panelPtr(i), viewer.panelLen(i)));
      }
      const t1 = performance.now();
      for (let i = 0; i < 2; i++) canvases[i].putImageData(new ImageData(views[i], w, h), 0, 0);
      return [t1 - t0, performance.now() - t0, views];
    };
    for (let f = 0; f < WARM; f++) await frame(f);
    const render = [];
    const total = [];
    let last = null;
    for (let i = 0; i < FRAMES; i++) {
      const [r, t, views] = await frame(WARM + i);
      render.push(r);
      total.push(t);
      last = views;
    }
    const hash = fnv1a(last[1], fnv1a(last[0])).toString(16);
    if (pool) pool.stop();
    viewer.setTurntable(WARM + FRAMES - 1);
    viewer.render(); // fills the report (triangles, pixels shaded)
    const report = viewer.report();
    out.results.push({
      level, w, h, tris: report.triangles, workers: WORKERS, panels_fnv1a: hash,
      ...stats(total),
      render_only: stats(render),
      covered_b: report.lighting.per_pixel,
      ms: total.map((x) => +x.toFixed(2)),
      ...(pool ? { band_render: stats(bandMs.slice(WARM * WORKERS)) } : {}),
    });
    $results.textContent = JSON.stringify(out, null, 1);
    $panels.replaceChildren();
    await new Promise((r) => setTimeout(r, 50));
  }
  await post(`/result/${NAME}.json`, JSON.stringify(out));
}

const $panels = document.getElementById("panels");
const $results = document.getElementById("results");
bench().catch((e) => post(`/result/${NAME}.err`, String((e && e.stack) || e)));
