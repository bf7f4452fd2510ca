// twinshade page, the entry module. All rendering happens in the wasm module; the modules in
// js/ edit the scene, ask for frames and copy each panel's pixels from wasm memory into its
// canvas once per frame:
//   state     the page's state and small helpers     loop      render loop, panel sizing
//   readouts  costs, metrics, legend, pixel probe    link      the scene in the address
//   controls  settings column, turning by drag/keys  presets   presets, presentation mode
//   files     mesh files in, exports out             jobs      long work in slices, plots
//   motion    turntable and sweeps                   advice    tessellation advice
//   workers   drag frames drawn in bands on Web Workers (band-worker.js)
import init, { Viewer } from "./pkg/twinshade.js";
import { app, $, mark, showProblem, says } from "./js/state.js";
import { drawBanded, fitPanels, fixPanelSize, requestRender } from "./js/loop.js";
import { startWorkers, workerCount } from "./js/workers.js";
import { copyLink, fullPageAddress, openFromAddress } from "./js/link.js";
import { bindControls, bindTurning, buildControls, syncControls } from "./js/controls.js";
import { bindPresets } from "./js/presets.js";
import { bindExports, bindMeshFiles, loadMeshBytes, loadMeshFromQuery, sheetCanvas } from "./js/files.js";
import { bindMotion, reducedMotion, setPlaying, toggleSweep } from "./js/motion.js";
import { bindAdvice } from "./js/advice.js";

async function start() {
  app.wasm = await init();
  app.Viewer = Viewer;
  app.viewer = new Viewer();
  app.vocab = Viewer.vocabulary();
  const q = new URLSearchParams(location.search);
  // Drag frames on every core (?workers=N; default one per core, capped; 1: none).
  const workers = workerCount(q);
  if (workers > 1) startWorkers(workers);
  if (q.has("embed")) {
    app.embed = true;
    mark("embed", "1");
    $("open-full").href = fullPageAddress();
  }
  // ?size=WxH renders at a fixed panel size (for docs and tests) instead of fitting the layout.
  const fixed = /^(\d+)x(\d+)$/.exec(q.get("size") || "");
  if (fixed) fixPanelSize(+fixed[1], +fixed[2]);
  // A mesh hosted beside the page comes first, so a link that names it can then open.
  if (q.get("mesh")) await loadMeshFromQuery(q.get("mesh"));
  // A scene in the link (#s=...) opens as it was shared.
  openFromAddress();
  buildControls();
  bindControls();
  bindPresets();
  bindExports();
  bindMeshFiles();
  $("copy-link").addEventListener("click", copyLink);
  bindTurning();
  bindMotion();
  bindAdvice();
  syncControls();
  fitPanels();
  new ResizeObserver(fitPanels).observe($("panels"));
  requestRender();
  // ?sweep=turntable or ?sweep=roll:36 runs a sweep on opening (docs that show the plot).
  if (q.has("sweep")) {
    const asked = /^([a-z_]+)(?::(\d+))?$/.exec(q.get("sweep"));
    if (asked && app.vocab.sweep_axes.includes(asked[1])) {
      $("sweep-axis").value = asked[1];
      if (asked[2]) $("sweep-steps").value = asked[2];
      toggleSweep();
    } else {
      showProblem(`The address asks for the sweep "${q.get("sweep")}"; sweeps are ${app.vocab.sweep_axes.join(" or ")} (e.g. sweep=roll:36), so none was run.`);
    }
  }
  // ?play starts the turntable (docs and embeds), unless the reader prefers reduced motion.
  if (q.has("play") && !reducedMotion.matches) setPlaying(true);
  // For tests and the console: read-only access plus turning.
  window.twinshade = {
    sceneJson: () => app.viewer.sceneJson(),
    report: () => app.viewer.report(),
    sweepCsv: () => app.viewer.sweepCsv(),
    advice: () => app.viewer.advice(),
    loadMesh: (name, bytes, companions) => loadMeshBytes(name, bytes, companions),
    workers: () => (app.pool && app.pool.ready() ? app.pool.size : 1),
    drawBanded: () => (app.pool && app.pool.ready() ? drawBanded(performance.now(), false) : Promise.resolve()),
    sheetDataUrl: () => {
      const c = sheetCanvas();
      return [c.width, c.height, c.toDataURL("image/png")];
    },
  };
}

start().catch((e) => {
  showProblem(`twinshade could not start: ${says(e)}`);
  console.error(e);
});
