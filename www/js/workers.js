// Every core in the page: while the mesh is dragged, each frame's two shading panels are
// drawn in horizontal bands by Web Workers, each with its own instance of the wasm module
// (band-worker.js; no SharedArrayBuffer, so any page or iframe can use them). Bands put
// together are the one-thread frame byte for byte (the library draws each band with the whole
// frame's coverage, depth and planes). The settled frame, with the comparison, is drawn by
// the page's own module as before. Each worker holds its own copy of the mesh and its
// geometry, so meshes over WORKER_TRIANGLES triangles are drawn on one thread.
import { app } from "./state.js";

/** The most workers used, whatever the machine offers. */
export const MAX_WORKERS = 4;
/** Larger meshes stay on one thread (memory: a copy of mesh and geometry per worker). */
export const WORKER_TRIANGLES = 500_000;

/** How many workers `?workers=N` asks for, else one per core (capped); 1 means none. */
export function workerCount(query) {
  const asked = query.get("workers");
  const n = asked === null ? navigator.hardwareConcurrency || 1 : Math.floor(+asked);
  return Number.isFinite(n) ? Math.max(1, Math.min(MAX_WORKERS, n)) : 1;
}

/** Starts `n` band workers (n > 1); `app.pool` is set once all have their module. */
export function startWorkers(n) {
  const workers = Array.from({ length: n }, () =>
    new Worker(new URL("./band-worker.js", import.meta.url), { type: "module" }));
  let seq = 0;
  const waiting = new Map(); // seq -> [resolve, reject]
  for (const w of workers) {
    w.onmessage = (e) => {
      const entry = waiting.get(e.data.seq);
      if (!entry) return;
      waiting.delete(e.data.seq);
      if (e.data.error) entry[1](new Error(e.data.error));
      else entry[0](e.data);
    };
    w.onerror = () => { if (app.pool) app.pool.usable = false; };
  }
  const ask = (w, msg) => new Promise((resolve, reject) => {
    const id = ++seq;
    waiting.set(id, [resolve, reject]);
    w.postMessage({ ...msg, seq: id });
  });
  const pool = {
    size: n,
    usable: true,
    busy: false,
    meshTriangles: 0,
    /** Draws rows of both panels of `scene` (JSON text) on every worker. */
    draw(scene, h) {
      pool.busy = true;
      const bands = workers.map((w, k) => [Math.floor((k * h) / n), Math.floor(((k + 1) * h) / n)]);
      return Promise.all(workers.map((w, k) => ask(w, { scene, y0: bands[k][0], y1: bands[k][1] })))
        .finally(() => { pool.busy = false; });
    },
    /** Gives every worker the mesh file the page just loaded. */
    loadMesh(name, bytes, companions, triangles) {
      pool.meshTriangles = triangles;
      if (triangles > WORKER_TRIANGLES) return;
      for (const w of workers) {
        ask(w, { mesh: { name, bytes: new Uint8Array(bytes), companions } })
          .catch(() => { pool.usable = false; });
      }
    },
    /** True when drag frames may go to the workers. */
    ready: () => pool.usable && !(pool.meshTriangles > WORKER_TRIANGLES),
  };
  app.pool = pool;
  return pool;
}
