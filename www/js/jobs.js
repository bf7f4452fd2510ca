// Long work (sweeps, tessellation advice) runs in slices of SLICE_MS between frames, so the
// page keeps answering. One runner serves both: a button that starts and stops the job, a
// progress bar and a status line, and a body marker (data-sweep / data-advice) for tests.
// Their plots are SVG drawn by the wasm module; clicking one (or ← → on it) picks a step.
import { app, $, mark, showProblem, says } from "./state.js";
import { requestRender } from "./loop.js";
import { syncControls } from "./controls.js";

const SLICE_MS = 12;

/**
 * Calls `step` (one wasm call, one frame) until it returns false, SLICE_MS at a time with the
 * page free in between; `after(more)` runs after each slice, `failed(error)` on an error.
 * Returns a function that stops it.
 */
function runInSlices(step, after, failed) {
  let stopped = false;
  const slice = () => {
    if (stopped) return;
    const t0 = performance.now();
    let more = true;
    try {
      while (more && performance.now() - t0 < SLICE_MS) more = step();
    } catch (e) {
      stopped = true;
      failed(e);
      return;
    }
    after(more);
    if (more) setTimeout(slice, 0);
  };
  setTimeout(slice, 0);
  return () => { stopped = true; };
}

/**
 * A job the page runs in slices. `job` names: `name` (marker and key), element ids `button`,
 * `bar` (its progress element), `status`, `result`; button texts `idle` and `running`; `start()` (starts it in
 * wasm, throws on bad settings), `step()`, `progress()` ([done, total]), `counted(done,
 * total)`, `show()` (redraws its results), `finished(total)`, `stopped`, and the prefixes
 * `cannot` and `failed` of its error messages; `before()` runs before it starts.
 */
export function jobRunner(job) {
  const done = (message) => {
    delete app.jobs[job.name];
    $(job.button).textContent = job.idle;
    $(job.bar).hidden = true;
    $(job.status).textContent = message;
    mark(job.name, "done");
  };
  const shown = (more) => {
    const [n, total] = job.progress();
    $(job.bar).value = n / Math.max(1, total);
    $(job.status).textContent = job.counted(n, total);
    $(job.result).hidden = false;
    job.show();
    if (!more) {
      done(job.finished(total));
      requestRender(); // the panels show the current scene again
    }
  };
  return function toggle() {
    const running = app.jobs[job.name];
    if (running) {
      running();
      done(job.stopped);
      requestRender();
      return;
    }
    try {
      job.start();
    } catch (e) {
      showProblem(`${job.cannot}: ${says(e)}`);
      return;
    }
    showProblem("");
    job.before();
    mark(job.name, "running");
    $(job.button).textContent = job.running;
    $(job.bar).hidden = false;
    $(job.bar).value = 0;
    app.jobs[job.name] = runInSlices(job.step, shown, (e) => {
      done("");
      showProblem(`${job.failed}: ${says(e)}`);
    });
  };
}

/**
 * Picking on a plot: a click on a [data-pick] mark, or ← → while the plot has focus, shows item
 * `i` of `count()` by `jump(i)` (a wasm call that changes the scene), remembers it in
 * `app[key]` and redraws the plot with `redraw()`.
 */
export function bindPlot(box, { count, key, jump, redraw }) {
  const pick = (i) => {
    if (!(i >= 0 && i < count())) return;
    showPicked(() => {
      jump(i);
      app[key] = i;
    }, redraw);
  };
  box.addEventListener("click", (e) => {
    const hit = e.target.closest && e.target.closest("[data-pick]");
    if (hit) pick(+hit.dataset.pick);
  });
  box.addEventListener("keydown", (e) => {
    const step = { ArrowLeft: -1, ArrowRight: 1 }[e.key];
    if (step === undefined) return;
    const n = count();
    if (n) pick((Math.max(0, app[key]) + step + n) % n);
    e.preventDefault();
  });
}

/** Shows a picked sweep step or advice level: `jump` changes the scene in wasm. */
function showPicked(jump, redraw) {
  try {
    jump();
  } catch (e) {
    showProblem(says(e));
    return false;
  }
  $("preset").value = "";
  syncControls();
  redraw();
  requestRender();
  return true;
}

/** The width a plot gets in its result section. */
export function plotWidth(section) {
  return Math.max(320, Math.min(960, Math.floor($(section).getBoundingClientRect().width || 720)));
}
