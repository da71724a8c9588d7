// Start-up: load the wasm core, open the first demo scene, build the controls and views,
// and mark the page ready once the first scene is drawn.

import { Session, limitsByPath, version } from "./wasm.js";
import { createState } from "./state.js";
import { createControls } from "./controls.js";
import { createSliceView } from "./slice_view.js";
import { createEchoImage } from "./echo_image.js";
import { createScreenSettings } from "./screen_settings.js";
import { createCaptureView } from "./capture_view.js";
import { createWalkView } from "./walk_view.js";
import { createRehearsal } from "./rehearsal.js";
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

  const limits = limitsByPath();
  const controls = createControls(state, limits, {
    probe: $("#controls-probe"),
    needle: $("#controls-needle"),
    beam: $("#controls-beam"),
    display: $("#controls-display"),
  });
  controls.sync();
  state.onLoad(() => controls.sync());
  state.onDraw((snap, what) => { if (what.has("all")) controls.onDraw(snap); });

  createReadouts(document, state);
  const echo = createEchoImage(state);
  createScreenSettings(state, controls, limits, echo, {
    tgc: $("#controls-tgc"),
    tgcLevel: $("#tgc-level"),
    key: $("[data-colour-key]"),
  });
  createSliceView($("#slice-stage"), state, echo);
  // Off-screen renders of the current scene for tests and `cargo xtask bench`.
  globalThis.slicewise.renderFingerprint = (width, height) => echo.renderFingerprint(width, height);
  globalThis.slicewise.benchEcho = (width, height, repeats) => echo.benchEcho(width, height, repeats);
  globalThis.slicewise.echoLearnt = () => echo.learnt();
  createSceneView($("#bench-canvas"), state, $("#bench-reset"));
  createSideView($("#edge-canvas"), state, $("#edge-caption"));
  const capture = createCaptureView($("[aria-labelledby='capture-heading']"), state, controls);
  const walk = createWalkView($("[aria-labelledby='walk-heading']"), state);

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
  createRehearsal({
    state,
    controls,
    files,
    capture,
    walk,
    needleControls: $("#controls-needle"),
    overlayBox: $('input[type="checkbox"][data-control="view.overlay"]'),
  });
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
