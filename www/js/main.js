// Start-up: load the wasm core, open the first demo scene, build the controls and views,
// and mark the page ready once the first scene is drawn.

import { Session, limitsByPath, version } from "./wasm.js";
import { createState } from "./state.js";
import { createControls } from "./controls.js";
import { createSliceView } from "./slice_view.js";
import { createSceneView } from "./scene_view.js";
import { createSideView } from "./side_view.js";
import { createReadouts } from "./readouts.js";
import { createFiles, firstDemo } from "./files.js";
import { installShortcuts, renderKeyList } from "./shortcuts.js";
import { wireViewToggles } from "./view_toggles.js";

const $ = (sel) => document.querySelector(sel);

function boot() {
  const demo = firstDemo();
  const session = new Session(demo.text);
  const state = createState(session);

  const controls = createControls(state, limitsByPath(), {
    probe: $("#controls-probe"),
    needle: $("#controls-needle"),
    beam: $("#controls-beam"),
  });
  controls.sync();
  state.onLoad(() => controls.sync());
  state.onDraw((snap, what) => { if (what.has("all")) controls.onDraw(snap); });

  createReadouts(document, state);
  createSliceView($("#slice-stage"), state);
  createSceneView($("#bench-canvas"), state, $("#bench-reset"));
  createSideView($("#edge-canvas"), state, $("#edge-caption"));

  const files = createFiles({
    state,
    select: $('[data-control="scene.demo"]'),
    fileInput: $('[data-control="scene.open"]'),
    saveButton: $('[data-control="scene.save"]'),
    dropTarget: document.body,
    dropHint: $("#drop-hint"),
  });
  files.showDemo(demo.file);

  wireViewToggles(state);
  installShortcuts(controls);
  renderKeyList($("#key-list"), controls);
  const v = $("#version");
  if (v) v.textContent = `v${version()}`;

  state.drawNow();
  document.body.dataset.ready = "true";
}

try {
  boot();
} catch (e) {
  const box = document.querySelector('[data-readout="error"]');
  const msg = `Slicewise could not start: ${e && e.message ? e.message : e}`;
  if (box) {
    box.textContent = msg;
    box.setAttribute("data-value", msg);
    const holder = box.closest("[data-error-box]");
    if (holder) holder.hidden = false;
  }
  throw e;
}
