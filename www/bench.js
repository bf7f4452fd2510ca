// In-browser benchmark: the fixed bench scene (docs/REFERENCES.md, "The benchmark scene") rendered by the real
// twinshade wasm module, both panels plus putImageData per frame, reported like the WebGL
// peer page (POST /result/NAME.json), so one driver times both in one run.
// Query: ?configs=5x800x600,7x800x600&warm=10&frames=100&name=twinshade
import init, { Viewer } from "./pkg/twinshade.js";

const Q = new URLSearchParams(location.search);
const NAME = Q.get("name") || "twinshade";
const WARM = +(Q.get("warm") || 10);
const FRAMES = +(Q.get("frames") || 100);
const CONFIGS = (Q.get("configs") || "5x800x600,7x800x600,5x400x300,7x400x300")
  .split(",").map((s) => s.split("x").map(Number));

const post = (path, body) => fetch(path, { method: "POST", body });
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
  const out = { impl: "twinshade-wasm", warm: WARM, frames: FRAMES, userAgent: navigator.userAgent, results: [] };
  for (const [level, w, h] of CONFIGS) {
    viewer.loadBenchmarkScene(level, w, h);
    const canvases = [0, 1].map(() => {
      const c = document.createElement("canvas");
      c.width = w;
      c.height = h;
      $panels.appendChild(c);
      return c.getContext("2d");
    });
    const frame = (f) => {
      viewer.setTurntable(f);
      const t0 = performance.now();
      viewer.renderPanels();
      const t1 = performance.now();
      for (let i = 0; i < 2; i++) {
        const bytes = new Uint8ClampedArray(wasm.memory.buffer, viewer.panelPtr(i), viewer.panelLen(i));
        canvases[i].putImageData(new ImageData(bytes, w, h), 0, 0);
      }
      return [t1 - t0, performance.now() - t0];
    };
    for (let f = 0; f < WARM; f++) frame(f);
    const render = [];
    const total = [];
    for (let i = 0; i < FRAMES; i++) {
      const [r, t] = frame(WARM + i);
      render.push(r);
      total.push(t);
    }
    viewer.render(); // fills the report (triangles, pixels shaded)
    const report = viewer.report();
    out.results.push({
      level, w, h, tris: report.triangles,
      ...stats(total),
      render_only: stats(render),
      covered_b: report.lighting.per_pixel,
      ms: total.map((x) => +x.toFixed(2)),
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
