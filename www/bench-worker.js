// One band worker of the benchmark: its own instance of the wasm module renders rows y0..y1 of
// both panels of the bench scene and sends the bytes back (transferred, not copied).
// Messages in: {level, w, h} (set up), {frame, y0, y1} (render a band); out: {y0, y1, bytes, ms}
// (Gouraud band then Phong band, RGBA; ms: the band's render time) or {error}.
import init, { Viewer } from "./pkg/twinshade.js";

const ready = init().then((wasm) => ({ wasm, viewer: new Viewer() }));

onmessage = async (e) => {
  const { wasm, viewer } = await ready;
  const m = e.data;
  try {
    if (m.level !== undefined) {
      viewer.loadBenchmarkScene(m.level, m.w, m.h);
      postMessage({ ready: true });
      return;
    }
    const t0 = performance.now();
    viewer.setTurntable(m.frame);
    viewer.renderPanelRows(m.y0, m.y1);
    const ms = performance.now() - t0;
    const len = viewer.panelLen(0);
    const bytes = new Uint8Array(2 * len);
    bytes.set(new Uint8Array(wasm.memory.buffer, viewer.panelPtr(0), len), 0);
    bytes.set(new Uint8Array(wasm.memory.buffer, viewer.panelPtr(1), len), len);
    postMessage({ y0: m.y0, y1: m.y1, bytes, ms }, [bytes.buffer]);
  } catch (err) {
    postMessage({ error: String((err && err.message) || err) });
  }
};
