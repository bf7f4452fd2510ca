// Files in and out, all inside the page: mesh files picked, dropped or hosted beside the page
// (same site only), and the exports (report sheet PNG, metrics JSON and CSV).
import { app, $, fmt, showProblem, says, download, jsonBlob } from "./state.js";
import { requestRender } from "./loop.js";
import { syncControls } from "./controls.js";
import { leavePreset } from "./presets.js";

/** Mesh files among several picked or dropped; the rest travel with them (an OBJ's `.mtl`). */
const MESH_EXT = /\.(obj|stl|ply|gltf|glb)$/i;

/** Imports a mesh file's bytes with its companions `[[name, bytes], ...]`; a broken file is
 * explained and the previous scene stays. */
export function loadMeshBytes(name, bytes, companions = []) {
  try {
    const given = companions.map(([n, b]) => [n, new Uint8Array(b)]);
    const info = app.viewer.loadMesh(name, new Uint8Array(bytes), given);
    if (app.pool) app.pool.loadMesh(name, bytes, given, info.triangles);
    showProblem("");
    const notes = info.notes.length ? ` Note: ${info.notes.join("; ")}.` : "";
    $("mesh-info").textContent =
      `${info.name}: ${fmt(info.vertices)} vertices, ${fmt(info.faces)} faces, ` +
      `${fmt(info.triangles)} triangles, ${fmt(info.dropped_faces)} degenerate faces dropped; ` +
      `normals ${info.authored_normals ? "in the file" : "not in the file (computed)"}; ` +
      `${info.vertex_colors ? "vertex colours in the file" : "no vertex colours"}; ` +
      `${info.materials ? `${fmt(info.materials)} material${info.materials > 1 ? "s" : ""} in the file` : "no materials in the file"}.` +
      notes;
    leavePreset();
    syncControls();
    requestRender();
    return true;
  } catch (e) {
    showProblem(`Not loaded: ${says(e)}. The previous scene is unchanged.`);
    return false;
  }
}

/** Reads picked or dropped files: the first mesh file, with every other file as a companion. */
async function readFiles(list) {
  const files = Array.from(list || []);
  const mesh = files.find((f) => MESH_EXT.test(f.name)) || files[0];
  if (!mesh) return;
  const others = files.filter((f) => f !== mesh);
  const companions = await Promise.all(others.map(async (f) => [f.name, await f.arrayBuffer()]));
  loadMeshBytes(mesh.name, await mesh.arrayBuffer(), companions);
}

export function bindMeshFiles() {
  $("mesh-file").addEventListener("change", () => {
    const picked = $("mesh-file");
    // Read what was picked, then empty the picker so picking the same file again reloads it.
    readFiles(picked.files).finally(() => { picked.value = ""; });
  });
  const zone = $("panels");
  zone.addEventListener("dragover", (e) => { e.preventDefault(); zone.classList.add("dropping"); });
  zone.addEventListener("dragleave", () => zone.classList.remove("dropping"));
  zone.addEventListener("drop", (e) => {
    e.preventDefault();
    zone.classList.remove("dropping");
    if (e.dataTransfer) readFiles(e.dataTransfer.files);
  });
}

/** `?mesh=relative/path.obj`: a mesh that docs host beside the page (same site only), with
 * the files it names (an OBJ's material libraries) fetched from beside it. */
export async function loadMeshFromQuery(path) {
  const url = new URL(path, location.href);
  if (url.origin !== location.origin) {
    showProblem("The mesh= address must be on this site; other sites are never contacted.");
    return;
  }
  try {
    const r = await fetch(url);
    if (!r.ok) throw new Error(`${r.status} ${r.statusText}`);
    const bytes = await r.arrayBuffer();
    const name = url.pathname.split("/").pop() || "mesh";
    const wanted = app.Viewer.meshCompanions(name, new Uint8Array(bytes));
    const companions = [];
    for (const w of wanted) {
      const c = new URL(w.replaceAll("\\", "/"), url);
      if (c.origin !== location.origin) continue;
      const got = await fetch(c).catch(() => null);
      if (got && got.ok) companions.push([w, await got.arrayBuffer()]);
    }
    loadMeshBytes(name, bytes, companions);
  } catch (e) {
    showProblem(`Cannot fetch the mesh ${path}: ${says(e)}`);
  }
}

/** The report sheet (panels, labels, legend, metrics, link) drawn by the wasm module. */
export function sheetCanvas() {
  const s = app.viewer.reportSheet();
  const c = document.createElement("canvas");
  c.width = s.width;
  c.height = s.height;
  const bytes = new Uint8ClampedArray(s.rgba.buffer, s.rgba.byteOffset, s.rgba.length);
  c.getContext("2d").putImageData(new ImageData(bytes, s.width, s.height), 0, 0);
  return c;
}

export function bindExports() {
  const v = app.viewer;
  $("save-sheet").addEventListener("click", () =>
    sheetCanvas().toBlob((b) => download("twinshade-sheet.png", b), "image/png"));
  $("save-json").addEventListener("click", () =>
    download("twinshade-metrics.json", jsonBlob({ link: location.href, report: v.report(), scene: JSON.parse(v.sceneJson()) })));
  $("save-csv").addEventListener("click", () =>
    download("twinshade-metrics.csv", new Blob([v.reportCsv()], { type: "text/csv" })));
}
