// Motion: the turntable (play / pause) and rotation sweeps with their plot and summary.
import { app, $, term, download, fillSelect } from "./state.js";
import { requestRender } from "./loop.js";
import { bindPlot, jobRunner, plotWidth } from "./jobs.js";

// Turntable play: the mesh turns about its own up axis at TURN_DEG_PER_S. With
// prefers-reduced-motion the page never starts it by itself (?play is ignored) and, when the
// user presses Play, it moves in discrete 15-degree steps once a second instead of gliding.
const TURN_DEG_PER_S = 40;
export const reducedMotion = matchMedia("(prefers-reduced-motion: reduce)");

function playTick(now) {
  const p = app.play;
  if (!p.on) return;
  const dt = Math.min(0.1, (now - p.clock) / 1000);
  p.clock = now;
  app.viewer.spin(TURN_DEG_PER_S * dt);
  requestRender(true);
  requestAnimationFrame(playTick);
}

export function setPlaying(on) {
  const p = app.play;
  p.on = on;
  $("play").setAttribute("aria-pressed", String(on));
  $("play").textContent = on ? "Pause turntable" : "Play turntable";
  clearInterval(p.timer);
  if (!on) {
    requestRender();
    return;
  }
  if (reducedMotion.matches) {
    $("play-note").textContent = "Reduced motion is on: the mesh steps 15° each second.";
    p.timer = setInterval(() => {
      app.viewer.spin(15);
      requestRender();
    }, 1000);
  } else {
    p.clock = performance.now();
    requestAnimationFrame(playTick);
  }
}

/** Stops the turntable before a job takes over the workbench. */
export function pausePlay() {
  if (app.play.on) setPlaying(false);
}

function showSweepPlot() {
  const box = $("sweep-plot");
  box.innerHTML = app.viewer.sweepPlot($("sweep-metric").value, plotWidth("sweep-result"), 300, app.sweepCurrent);
  const svg = box.querySelector("svg");
  if (svg) svg.dataset.current = String(app.sweepCurrent);
}

function showSweepSummary() {
  const s = app.viewer.sweepSummary();
  const dl = $("sweep-summary");
  dl.replaceChildren();
  if (!s) return;
  const f = (x, d = 4) => x.toFixed(d);
  const both = (v, d) => `per-vertex ${f(v[0], d)} · per-pixel ${f(v[1], d)}`;
  term(dl, "Steps", `${s.steps_done} of ${s.settings.steps} (${s.settings.axis})`, "steps");
  term(dl, "Highlight stability (CoV of the peak)", both(s.highlight_cov), "cov");
  term(dl, "Peak luminance range",
    `per-vertex ${f(s.peak_min[0], 3)}–${f(s.peak_max[0], 3)} · per-pixel ${f(s.peak_min[1], 3)}–${f(s.peak_max[1], 3)}`, "peak-range");
  term(dl, "dE00 between the panels", `mean ${f(s.de00_mean, 2)} · worst p95 ${f(s.de00_p95_max, 2)}`, "sweep-de00");
  if (s.orientation_variance) {
    term(dl, "Orientation variance (largest change of Y at a fixed point)",
      `${both(s.orientation_variance, 5)} over ${s.probes_tracked} points (1/255 = 0.00392)`, "orientation");
  }
}

export const toggleSweep = jobRunner({
  name: "sweep",
  button: "sweep",
  bar: "sweep-progress",
  status: "sweep-status",
  result: "sweep-result",
  idle: "Run sweep",
  running: "Stop sweep",
  cannot: "Cannot sweep",
  failed: "Sweep stopped",
  stopped: "Stopped; the plot shows the steps measured so far.",
  start: () => app.viewer.startSweep($("sweep-axis").value, Math.round(+$("sweep-steps").value)),
  before: () => {
    pausePlay();
    app.sweepCurrent = -1;
    if ($("sweep-axis").value === "roll") $("sweep-metric").value = "probe_change";
    else if ($("sweep-metric").value === "probe_change") $("sweep-metric").value = "peak_luminance";
  },
  step: () => app.viewer.sweepStep(),
  progress: () => app.viewer.sweepProgress(),
  counted: (n, total) => `${n} of ${total} steps`,
  show: () => { showSweepPlot(); showSweepSummary(); },
  finished: (total) => `${total} steps measured. Click the plot to show an angle.`,
});

const SWEEP_LABELS = {
  turntable: "Turntable (mesh turns, lights fixed)",
  roll: "Roll of the view (lighting unchanged)",
  peak_luminance: "Highlight peak per panel",
  de00: "dE00 between the panels",
  probe_change: "Change at fixed surface points (roll)",
};

export function bindMotion() {
  const label = (v) => SWEEP_LABELS[v] || v;
  fillSelect($("sweep-axis"), app.vocab.sweep_axes, label);
  fillSelect($("sweep-metric"), app.vocab.sweep_metrics, label);
  $("play").addEventListener("click", () => setPlaying(!app.play.on));
  $("sweep").addEventListener("click", toggleSweep);
  $("sweep-metric").addEventListener("change", showSweepPlot);
  bindPlot($("sweep-plot"), {
    count: () => app.viewer.sweepProgress()[0],
    key: "sweepCurrent",
    jump: (i) => app.viewer.sweepJump(i),
    redraw: showSweepPlot,
  });
  $("save-sweep").addEventListener("click", () =>
    download("twinshade-sweep.csv", new Blob([app.viewer.sweepCsv()], { type: "text/csv" })));
}
