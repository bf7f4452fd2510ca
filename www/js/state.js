// The page's state, in one place, and the small helpers every module uses. Other modules
// keep no mutable state of their own; body data attributes are written from here for the
// style sheet and for tests, never read back as state.

/** Everything that changes while the page runs. */
export const app = {
  wasm: null, // the wasm module's exports (its memory holds the panels)
  Viewer: null, // the Viewer class (its static functions: vocabulary, presets, shapes)
  viewer: null, // the Viewer: scene, renderer, panels
  vocab: null, // facts from the wasm module (Viewer.vocabulary())
  canvases: null, // the panel canvases, looked up once (loop.js)
  embed: false, // ?embed: panels and legend only
  fitToLayout: true, // false with ?size=WxH
  lastFrameMs: 0,
  frame: { pending: false, quick: false, settleTimer: 0, again: false },
  pool: null, // the band workers drawing drag frames (workers.js), when there are any
  lastLink: "",
  legendKey: "",
  presets: [], // [{id, title, caption}]
  presenting: false,
  play: { on: false, clock: 0, timer: 0 },
  jobs: {}, // running sweep / advice, by name: a function that stops it
  sweepCurrent: -1,
  adviceCurrent: -1,
};

export const $ = (id) => document.getElementById(id);

/** Publishes a state marker on <body> (for the style sheet and tests). */
export function mark(name, value) {
  document.body.dataset[name] = value;
}

export const fmt = (n) => n.toLocaleString("en-US");

export function showProblem(message) {
  const p = $("problem");
  p.textContent = message || "";
  p.hidden = !message;
}

/** A JavaScript error from the wasm module as text. */
export const says = (e) => `${e.message || e}`;

/** Adds a term and its value to a description list; text only, never HTML. */
export function term(dl, name, value, key) {
  const dt = document.createElement("dt");
  dt.textContent = name;
  const dd = document.createElement("dd");
  dd.textContent = value;
  if (key) dd.dataset.metric = key;
  dl.append(dt, dd);
}

/** Offers a file for download; nothing leaves the machine. */
export function download(name, blob) {
  const a = document.createElement("a");
  a.href = URL.createObjectURL(blob);
  a.download = name;
  a.click();
  setTimeout(() => URL.revokeObjectURL(a.href), 10000);
}

export const jsonBlob = (doc) => new Blob([JSON.stringify(doc, null, 2)], { type: "application/json" });

/** The short name of a shading mode id ("per-vertex", ...), from the wasm module. */
export function modeName(id) {
  const m = app.vocab.modes.find((x) => x.id === id);
  return m ? m.short : id;
}

/** Fills a <select> with `values`, labelled by `label(value)`. */
export function fillSelect(select, values, label) {
  for (const v of values) {
    const o = document.createElement("option");
    o.value = v;
    o.textContent = label(v);
    select.append(o);
  }
}
