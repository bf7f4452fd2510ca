// Presets (scenes of our own that show one artifact each) and presentation mode, in which
// ← and → step through them with their captions large.
import { app, $, mark, showProblem, says, fillSelect } from "./state.js";
import { requestRender } from "./loop.js";
import { syncControls } from "./controls.js";

export function choosePreset(id) {
  const p = app.presets.find((x) => x.id === id);
  if (!p) return;
  try {
    app.viewer.loadPreset(id);
    showProblem("");
  } catch (e) {
    showProblem(`Cannot load the preset: ${says(e)}`);
    return;
  }
  $("preset").value = id;
  $("preset-caption").textContent = p.caption;
  $("caption").textContent = `${p.title}. ${p.caption}`;
  syncControls();
  requestRender();
}

/** Forgets the chosen preset after the scene was changed by hand. */
export function leavePreset() {
  $("preset").value = "";
  $("preset-caption").textContent = "";
}

function setPresenting(on) {
  app.presenting = on;
  mark("present", on ? "1" : "");
  $("caption").hidden = !on;
  $("present").setAttribute("aria-pressed", String(on));
  if (on && !$("preset").value && app.presets.length) choosePreset(app.presets[0].id);
}

export function bindPresets() {
  app.presets = app.Viewer.presets().map(([id, title, caption]) => ({ id, title, caption }));
  const titles = new Map(app.presets.map((p) => [p.id, p.title]));
  fillSelect($("preset"), app.presets.map((p) => p.id), (id) => titles.get(id));
  $("preset").addEventListener("change", () => choosePreset($("preset").value));
  $("present").addEventListener("click", () => setPresenting(!app.presenting));
  document.addEventListener("keydown", (e) => {
    if (!app.presenting) return;
    if (e.target instanceof HTMLCanvasElement || e.target.closest?.("select, input")) return;
    const list = app.presets;
    const i = list.findIndex((p) => p.id === $("preset").value);
    if (e.key === "ArrowRight" || e.key === "ArrowLeft") {
      const step = e.key === "ArrowRight" ? 1 : -1;
      choosePreset(list[(i + step + list.length) % list.length].id);
      e.preventDefault();
    } else if (e.key === "Escape") {
      setPresenting(false);
    }
  });
}
