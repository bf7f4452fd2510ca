// A band worker of the page: its own instance of the wasm module draws rows y0..y1 of the
// per-vertex and per-pixel panels of the scene it is sent, and sends the bytes back
// (transferred). Messages in: {seq, mesh: {name, bytes, companions}} (load a mesh file) or
// {seq, scene (JSON text), y0, y1}; out: {seq, y0, y1, bytes} (both bands, RGBA, per-vertex
// first), {seq, ok} after a mesh, or {seq, error}.
import init, { Viewer } from "../pkg/twinshade.js";

const ready = init().then((wasm) => ({ wasm, viewer: new Viewer() }));
let sceneText = "";

onmessage = async (e) => {
  const { wasm, viewer } = await ready;
  const m = e.data;
  try {
    if (m.mesh) {
      viewer.loadMesh(m.mesh.name, m.mesh.bytes, m.mesh.companions);
      sceneText = "";
      postMessage({ seq: m.seq, ok: true });
      return;
    }
    if (m.scene !== sceneText) {
      viewer.setSceneJson(m.scene);
      sceneText = m.scene;
    }
    viewer.renderPanelRows(m.y0, m.y1);
    const len = viewer.panelLen(0);
    const bytes = new Uint8Array(2 * len);
    bytes.set(new Uint8Array(wasm.memory.buffer, viewer.panelPtr(0), len), 0);
    bytes.set(new Uint8Array(wasm.memory.buffer, viewer.panelPtr(1), len), len);
    postMessage({ seq: m.seq, y0: m.y0, y1: m.y1, bytes }, [bytes.buffer]);
  } catch (err) {
    postMessage({ seq: m.seq, error: String((err && err.message) || err) });
  }
};
