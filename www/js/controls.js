// The settings column: each control edits one field of the scene through the wasm module,
// which validates the whole scene (a refused edit leaves the scene as it was), and
// syncControls shows the scene's values again. Turning by drag and keys lives here too.
import { app, $, showProblem, says, fillSelect, modeName } from "./state.js";
import { canvases, requestRender } from "./loop.js";
import { probeAt } from "./readouts.js";

const shininessToSlider = (n) => Math.round((100 * Math.log(n)) / Math.log(1024));
const sliderToShininess = (s) => Math.max(1, Math.round(Math.pow(1024, s / 100)));

/** The shading pairs the difference view may compare: any two of these, in this order. */
const COMPARABLE = ["per_vertex", "per_pixel", "exact"];

/** Builds the lists whose values come from the wasm module. */
export function buildControls() {
  const v = app.vocab;
  const shapes = new Map(v.shapes.map((c) => [c.kind, c]));
  fillSelect($("shape"), v.shapes.map((c) => c.kind), (k) => shapes.get(k).label);
  const pairs = [];
  COMPARABLE.forEach((a, i) => COMPARABLE.slice(i + 1).forEach((b) => pairs.push(`${a},${b}`)));
  const cap = (t) => t.charAt(0).toUpperCase() + t.slice(1);
  fillSelect($("pair"), pairs.filter((p) => p.split(",").every((m) => v.modes.some((x) => x.id === m))),
    (p) => { const [a, b] = p.split(",").map(modeName); return `${cap(a)} vs ${b === "exact" ? "exact surface" : b}`; });
  const methods = { midpoint: "Midpoint (same flat faces)", pn_triangles: "PN triangles (smoother surface)" };
  fillSelect($("subdiv-method"), v.subdivision_methods, (m) => methods[m] || m);
  const models = new Map(v.models.map((m) => [m.id, m.label]));
  fillSelect($("model"), v.models.map((m) => m.id), (id) => models.get(id));
  $("roughness").min = String(v.min_roughness);
  [$("exposure").min, $("exposure").max] = v.exposure_ev.map(String);
  $("subdiv-levels").max = String(v.subdivision_max_levels);
  $("sweep-steps").max = String(Math.min(720, v.max_sweep_steps));
}

/** Applies `edit` to a copy of the scene; the viewer keeps its scene if the result is refused. */
export function editScene(edit) {
  const scene = app.viewer.scene();
  edit(scene);
  $("preset").value = "";
  $("preset-caption").textContent = "";
  try {
    app.viewer.setScene(scene);
    showProblem("");
  } catch (e) {
    showProblem(`Not applied: ${says(e)}`);
  }
  syncControls();
  requestRender();
}

function detailControl(kind) {
  return app.vocab.shapes.find((c) => c.kind === kind);
}

const MODEL_WORDS = { phong: "Phong", blinn_phong: "Blinn-Phong", metallic_roughness: "metallic-roughness", page: "this page's" };

/** The loaded file's materials: listed for "edit a copy", and whether Surface applies. */
function syncFileMaterials(s) {
  const list = s.mesh.file ? app.viewer.fileMaterials() : [];
  const own = list.filter((m) => m.model !== "page");
  const select = $("file-material");
  const describe = (m) => {
    const terms = m.model === "metallic_roughness"
      ? `roughness ${m.roughness.toFixed(2)}, metallic ${m.metallic.toFixed(2)}`
      : `shininess ${Math.round(m.shininess)}`;
    return [`${m.name} (${MODEL_WORDS[m.model]})`, `${m.name}: ${MODEL_WORDS[m.model]}, base ${m.base_color}, ${terms}, ${m.faces} faces`];
  };
  const wanted = own.map((m) => describe(m)[1]).join("\n");
  if (select.dataset.listed !== wanted) {
    select.replaceChildren(...list.map((m, i) => [m, i]).filter(([m]) => m.model !== "page").map(([m, i]) => {
      const o = document.createElement("option");
      o.value = String(i);
      [o.textContent, o.title] = describe(m);
      return o;
    }));
    select.dataset.listed = wanted;
  }
  $("file-material-row").hidden = own.length === 0;
  const fileLit = own.length > 0 && s.material_source === "file";
  const surface = $("surface-note").parentElement;
  surface.classList.toggle("inactive", fileLit);
  $("surface-note").hidden = !fileLit;
  $("surface-note").textContent = fileLit
    ? `The mesh is lit with its file's ${own.length === 1 ? "material" : `${own.length} materials`}; ` +
      `these settings apply only to faces without one. "Edit a copy" (Mesh) makes a file material this page's.`
    : "";
}

/** Shows the scene's values in the controls. */
export function syncControls() {
  const s = app.viewer.scene();
  const shape = s.mesh.shape;
  const detail = $("detail");
  if (!shape) {
    $("shape").value = "";
    detail.disabled = true;
    $("detail-out").textContent = "";
  } else {
    const c = detailControl(shape.kind);
    $("shape").value = shape.kind;
    detail.min = c.min;
    detail.max = c.max;
    detail.disabled = c.min === c.max;
    const [value, text] = app.Viewer.shapeDetail(shape);
    detail.value = value;
    $("detail-out").textContent = text;
  }
  $("normal-source").value = s.normals.source;
  $("normal-weighting").value = s.normals.weighting;
  $("coincident").value = s.normals.coincident;
  $("vertex-colors").checked = s.vertex_colors;
  $("material-source").value = s.material_source;
  syncFileMaterials(s);
  $("gltf-normals").value = s.normals.gltf_without_normals;
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
  for (const group of document.querySelectorAll(".model-controls")) {
    group.hidden = !group.dataset.models.split(" ").includes(s.model);
  }
  $("roughness").value = m.roughness;
  $("roughness-out").textContent = m.roughness.toFixed(2);
  $("metallic").value = m.metallic;
  $("metallic-out").textContent = m.metallic.toFixed(2);
  const V = app.Viewer;
  $("model-note").textContent = s.model === "metallic_roughness"
    ? `Highlight comparable to Blinn-Phong shininess ${Math.round(V.blinnExponentForRoughness(m.roughness))} (n = 2/α² − 2, α = roughness², Walter et al. 2007).`
    : `Highlight comparable to glTF roughness ${V.roughnessForBlinnExponent(m.shininess).toFixed(2)} (Walter et al. 2007); switching models keeps it.`;
  $("shininess").value = shininessToSlider(m.shininess);
  $("shininess-out").textContent = String(m.shininess);
  $("specular").value = m.specular;
  $("specular-out").textContent = m.specular.toFixed(2);
  const light = s.lights[0];
  for (const id of ["light-kind", "light-az", "light-el", "light-color"]) $(id).disabled = !light;
  if (light) {
    $("light-kind").value = light.kind;
    $("light-az").value = light.azimuth_deg;
    $("light-az-out").textContent = `${Math.round(light.azimuth_deg)}°`;
    $("light-el").value = light.elevation_deg;
    $("light-el-out").textContent = `${Math.round(light.elevation_deg)}°`;
    $("light-color").value = light.color;
  }
  $("exposure").value = s.exposure_ev;
  $("exposure-out").textContent = `${s.exposure_ev > 0 ? "+" : s.exposure_ev < 0 ? "−" : ""}${Math.abs(s.exposure_ev)} stops (× ${Math.pow(2, s.exposure_ev).toPrecision(3).replace(/\.?0+$/, "")})`;
  $("projection").value = s.camera.projection;
  $("roll").value = s.camera.roll_deg;
  $("roll-out").textContent = `${Math.round(s.camera.roll_deg)}°`;
  $("cull").checked = s.cull_back_faces;
  $("persp").checked = s.perspective_correct;
  $("pair").value = s.difference.pair.join(",");
  $("threshold").value = s.difference.threshold;
  $("scale").value = s.difference.scale_max;
}

export function bindControls() {
  const on = (id, event, edit) => $(id).addEventListener(event, () => editScene(edit));
  const shapeAt = (kind, d) => app.Viewer.shapeFromDetail(kind, d);
  on("shape", "change", (s) => {
    const kind = $("shape").value;
    s.mesh = { shape: shapeAt(kind, detailControl(kind).default) };
  });
  on("detail", "input", (s) => { s.mesh = { shape: shapeAt($("shape").value, +$("detail").value) }; });
  on("normal-source", "change", (s) => { s.normals.source = $("normal-source").value; });
  on("normal-weighting", "change", (s) => { s.normals.weighting = $("normal-weighting").value; });
  on("crease", "input", (s) => { s.normals.crease_deg = +$("crease").value; });
  on("polygons", "change", (s) => { s.polygons = $("polygons").value; });
  on("subdiv-method", "change", (s) => { s.subdivision.method = $("subdiv-method").value; });
  on("subdiv-levels", "change", (s) => { s.subdivision.levels = +$("subdiv-levels").value; });
  on("base", "input", (s) => { s.material.base_color = $("base").value; });
  on("finish", "change", (s) => { s.material.finish = $("finish").value; });
  on("model", "change", (s) => {
    // Moving between the Phong models and metallic-roughness keeps a comparable highlight.
    const next = $("model").value;
    const V = app.Viewer;
    if (next === "metallic_roughness" && s.model !== next) {
      s.material.roughness = +V.roughnessForBlinnExponent(s.material.shininess).toFixed(2);
    } else if (next !== "metallic_roughness" && s.model === "metallic_roughness") {
      s.material.shininess = Math.round(V.blinnExponentForRoughness(s.material.roughness));
    }
    s.model = next;
  });
  on("roughness", "input", (s) => { s.material.roughness = +$("roughness").value; });
  on("metallic", "input", (s) => { s.material.metallic = +$("metallic").value; });
  on("material-source", "change", (s) => { s.material_source = $("material-source").value; });
  $("copy-material").addEventListener("click", () => {
    try {
      app.viewer.copyFileMaterial(+$("file-material").value);
      showProblem("");
    } catch (e) {
      showProblem(`Not copied: ${says(e)}`);
    }
    $("preset").value = "";
    syncControls();
    requestRender();
  });
  on("vertex-colors", "change", (s) => { s.vertex_colors = $("vertex-colors").checked; });
  on("coincident", "change", (s) => { s.normals.coincident = $("coincident").value; });
  on("gltf-normals", "change", (s) => { s.normals.gltf_without_normals = $("gltf-normals").value; });
  on("shininess", "input", (s) => { s.material.shininess = sliderToShininess(+$("shininess").value); });
  on("specular", "input", (s) => { s.material.specular = +$("specular").value; });
  on("light-kind", "change", (s) => { s.lights[0].kind = $("light-kind").value; });
  on("light-az", "input", (s) => { s.lights[0].azimuth_deg = +$("light-az").value; });
  on("light-el", "input", (s) => { s.lights[0].elevation_deg = +$("light-el").value; });
  on("light-color", "input", (s) => { s.lights[0].color = $("light-color").value; });
  on("exposure", "input", (s) => { s.exposure_ev = +$("exposure").value; });
  on("projection", "change", (s) => { s.camera.projection = $("projection").value; });
  on("roll", "input", (s) => { s.camera.roll_deg = +$("roll").value; });
  on("cull", "change", (s) => { s.cull_back_faces = $("cull").checked; });
  on("persp", "change", (s) => { s.perspective_correct = $("persp").checked; });
  on("reset", "click", (s) => { s.rotation = [0, 0, 0, 1]; });
  on("pair", "change", (s) => { s.difference.pair = $("pair").value.split(","); });
  on("threshold", "change", (s) => { s.difference.threshold = +$("threshold").value; });
  on("scale", "change", (s) => { s.difference.scale_max = +$("scale").value; });
}

/** Dragging a panel turns the mesh (mouse, pen and touch); a click probes a pixel. */
export function bindTurning() {
  const DEG_PER_PX = 0.5;
  for (const canvas of canvases()) {
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
        app.viewer.turn(dx * DEG_PER_PX, dy * DEG_PER_PX);
        requestRender(true);
      }
    });
    canvas.addEventListener("pointerup", (e) => {
      if (last && travelled < 3) probeAt(canvas, e.clientX, e.clientY);
      last = null;
    });
    canvas.addEventListener("pointercancel", () => { last = null; });
    canvas.addEventListener("keydown", (e) => {
      const step = e.shiftKey ? 15 : 5;
      const turns = { ArrowLeft: [-step, 0], ArrowRight: [step, 0], ArrowUp: [0, -step], ArrowDown: [0, step] };
      const t = turns[e.key];
      if (t) {
        app.viewer.turn(t[0], t[1]);
        requestRender();
        e.preventDefault();
      }
    });
  }
}
