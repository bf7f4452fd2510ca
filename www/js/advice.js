// Tessellation advice: finer and finer meshes, each swept on a turntable, until per-vertex
// lighting stays under the threshold at every angle; a plot of error against lighting
// evaluations (one point per level; picking one shows that level) and a table.
import { app, $, fmt, download, jsonBlob, fillSelect } from "./state.js";
import { bindPlot, jobRunner, plotWidth } from "./jobs.js";
import { pausePlay } from "./motion.js";

function showAdvice() {
  const a = app.viewer.advice();
  if (!a) return;
  $("advice-plot").innerHTML = app.viewer.advicePlot(plotWidth("advice-result"), 300, app.adviceCurrent);
  const table = $("advice-table");
  table.replaceChildren();
  const head = table.insertRow();
  for (const h of ["Level", "Vertices lit", "Triangles", "Worst p95 dE00", "Mean p95 dE00", "Pixels lit"]) {
    const th = document.createElement("th");
    th.textContent = h;
    head.append(th);
  }
  a.rungs.forEach((r, i) => {
    const row = table.insertRow();
    row.dataset.advised = i === a.advised ? "1" : "";
    for (const v of [r.label, fmt(r.vertices), fmt(r.triangles), r.worst_p95.toFixed(2), r.mean_p95.toFixed(2), fmt(Math.round(r.pixels))]) {
      row.insertCell().textContent = v;
    }
  });
  const answer = $("advice-answer");
  if (a.advised !== null && a.advised !== undefined) {
    const r = a.rungs[a.advised];
    answer.textContent =
      `Per-vertex lighting needs ${r.label}: ${fmt(r.vertices)} lit vertices and ${fmt(r.triangles)} triangles per frame ` +
      `keep the 95th-percentile difference under ${a.settings.threshold} dE00 at all ${a.settings.steps} angles (worst ${r.worst_p95.toFixed(2)}). ` +
      `Per-pixel lighting at this view costs ${fmt(a.current_pixels)} lighting evaluations per frame. ` +
      `${a.lit_with_text}.`;
  } else {
    answer.textContent = a.note ? `No level yet: ${a.note}.` : "Measuring…";
  }
}

const toggleAdvice = jobRunner({
  name: "advice",
  button: "advise",
  bar: "advice-progress",
  status: "advice-status",
  result: "advice-result",
  idle: "Advise",
  running: "Stop advice",
  cannot: "Cannot advise",
  failed: "Advice stopped",
  stopped: "Stopped; the table shows the levels measured so far.",
  start: () => app.viewer.startAdvice(+$("advice-steps").value, $("advice-method").value),
  before: () => {
    pausePlay();
    app.adviceCurrent = -1;
  },
  step: () => app.viewer.adviceStep(),
  progress: () => app.viewer.adviceProgress(),
  counted: (n) => `${n} frames rendered`,
  show: showAdvice,
  finished: () => "Done. Click a point of the plot to show that level.",
});

const METHOD_LABELS = {
  midpoint: "Midpoint subdivision",
  pn_triangles: "PN-triangle subdivision",
};

export function bindAdvice() {
  fillSelect($("advice-method"), app.vocab.subdivision_methods, (m) => METHOD_LABELS[m] || m);
  $("advise").addEventListener("click", toggleAdvice);
  bindPlot($("advice-plot"), {
    count: () => app.viewer.advice()?.rungs.length ?? 0,
    key: "adviceCurrent",
    jump: (i) => app.viewer.adviceJump(i),
    redraw: showAdvice,
  });
  $("save-advice").addEventListener("click", () =>
    download("twinshade-advice.json", jsonBlob({ link: location.href, advice: app.viewer.advice() })));
}
