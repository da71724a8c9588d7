// The simulated echo image: the wasm EchoView renders the scene at the screen's backing-store
// size for the field of view, and the pixels are read in place from wasm memory into a canvas
// that the slice screen's bottom layer draws (mirrored when the screen is). A frame is rendered
// only when the scene or the size changed. While a control moves faster than a full-size frame
// can follow, frames are rendered smaller; the full-size frame follows once the control rests.

import { EchoView, Session, wasmMemory } from "./wasm.js";

/** Longest side of a rendered frame, pixels (larger screens scale the frame up). */
export const MAX_SIDE_PX = 900;
/** The renderer's smallest frame side, pixels. */
const MIN_SIDE_PX = 16;
/** Echo work allowed per update while a control is moving, ms. */
const MOVING_BUDGET_MS = 6;
/** Scene edits closer together than this count as one movement, ms. */
const MOVING_GAP_MS = 120;
/** Quiet time after the last edit before a reduced frame is replaced by a full-size one, ms. */
const SETTLE_MS = 150;
/**
 * Linear scales a frame may take while a control moves. A few fixed steps, not a continuous
 * scale: a renderer keeps tables per frame size (a curved face's scan conversion), so the size
 * should stay put during a movement.
 */
const SCALES = [1, 0.75, 0.55, 0.4];

function clampSide(v) {
  return Math.max(MIN_SIDE_PX, Math.min(4096, Math.round(v)));
}

/**
 * The full-size frame for a screen mapping: the field of view's bounding box at the canvas's
 * backing-store resolution, capped at MAX_SIDE_PX on the long side. Returns [width, height].
 */
export function wantedSize(map, dpr) {
  const { umin, umax, vmin, vmax } = map.bounds;
  const w = (umax - umin) * map.k * dpr;
  const h = (vmax - vmin) * map.k * dpr;
  const s = Math.min(1, MAX_SIDE_PX / Math.max(w, h, 1));
  return [clampSide(w * s), clampSide(h * s)];
}

/** Copy the EchoView's last frame from wasm memory into `ctx` (a canvas of the frame's size). */
function putFrame(echo, ctx, width, height) {
  // View the bytes in place; made right after the render because memory may have grown.
  const px = new Uint8ClampedArray(wasmMemory().buffer, echo.rgbaPtr(), echo.rgbaLen());
  ctx.putImageData(new ImageData(px, width, height), 0, 0);
}

/**
 * Create the echo image source. Returns { frameFor(snap, width, height, settle) → frame | null,
 * last() → frame | null, onFrame(fn) (called after every render), renderFingerprint(width,
 * height), benchEcho(width, height, repeats) }. A frame is
 * { canvas, meta, width, height, fingerprint, reduced, serial }.
 */
export function createEchoImage(state) {
  const frameListeners = [];
  const echo = new EchoView();
  const canvas = document.createElement("canvas");
  const ctx = canvas.getContext("2d", { willReadFrequently: false });
  let frame = null;
  let wantKey = "";
  // Render cost, ms (smoothed): of a full-size frame, and of the current step while a control
  // moves (not counting the first render at a step, which also builds the renderer's tables).
  let fullCost = null;
  let stepCost = null;
  let seenEditTime = 0;
  let moving = false;
  let level = 0; // the step of SCALES used while a control moves
  let framesAtLevel = 0;
  let movingBefore = false;
  let lastSize = "";
  let settleTimer = 0;
  let failed = "";
  let spare = null; // a second EchoView for off-screen fingerprints

  function armSettle() {
    clearTimeout(settleTimer);
    const wait = Math.max(20, SETTLE_MS - (performance.now() - state.snap.editTime));
    settleTimer = setTimeout(() => state.requestView("echo"), wait);
  }

  function render(snap, width, height, scale) {
    const W = clampSide(width * scale);
    const H = clampSide(height * scale);
    const t0 = performance.now();
    let meta;
    try {
      meta = echo.render(state.session, W, H);
    } catch (e) {
      // Only a size outside 16..4096 can fail; keep the plain screen rather than a stale frame.
      failed = e && e.message ? e.message : String(e);
      frame = null;
      return null;
    }
    const t1 = performance.now();
    if (canvas.width !== W || canvas.height !== H) {
      canvas.width = W;
      canvas.height = H;
    }
    putFrame(echo, ctx, W, H);
    const t2 = performance.now();
    state.notePerf({ compute_ms: t1 - t0, echo_ms: t2 - t0 });
    const size = `${W}x${H}`;
    const ms = t1 - t0;
    if (scale === 1) {
      // Back at full size after a movement the renderer may rebuild its tables: an upper
      // bound, which errs toward smaller frames next time.
      fullCost = fullCost === null ? ms : 0.6 * fullCost + 0.4 * ms;
    } else if (size === lastSize) {
      stepCost = stepCost === null ? ms : 0.6 * stepCost + 0.4 * ms;
    }
    lastSize = size;
    failed = "";
    frame = {
      canvas,
      meta,
      width: W,
      height: H,
      fingerprint: echo.fingerprint(),
      reduced: scale < 1,
      serial: snap.sceneSerial,
    };
    for (const l of frameListeners) l(frame);
    return frame;
  }

  /**
   * The frame for the current scene at (about) width × height, rendering only if needed.
   * `settle`: the controls have come to rest, render full size now.
   */
  function frameFor(snap, width, height, settle = false) {
    const key = `${width}x${height}`;
    if (snap.editTime !== seenEditTime) {
      // A control is moving when numeric edits follow each other quickly; a scene load or a
      // pick from a list always gets a full-size frame at once.
      moving = snap.editKind === "number" && snap.editTime - seenEditTime < MOVING_GAP_MS;
      seenEditTime = snap.editTime;
    }
    const stale = !frame || frame.serial !== snap.sceneSerial || wantKey !== key;
    if (!stale && !frame.reduced) return frame;
    if (!stale) {
      // A reduced frame: replace it once the controls have rested.
      if (!settle && performance.now() - snap.editTime < SETTLE_MS * 0.9) {
        armSettle();
        return frame;
      }
      wantKey = key;
      movingBefore = false;
      return render(snap, width, height, 1);
    }
    if (wantKey !== key) fullCost = null; // another screen size: learn again
    wantKey = key;
    let scale = 1;
    const movingNow = moving && !settle && frame !== null;
    if (movingNow) {
      if (!movingBefore) startLevel();
      else nextLevel();
      scale = SCALES[level];
    }
    movingBefore = movingNow;
    const out = render(snap, width, height, scale);
    if (out && out.reduced) armSettle();
    return out;
  }

  /** The first step of a movement: the largest whose share of the full-size cost fits. */
  function startLevel() {
    level = SCALES.length - 1;
    if (fullCost !== null) {
      for (let i = 0; i < SCALES.length; i++) {
        if (fullCost * SCALES[i] ** 2 <= MOVING_BUDGET_MS) { level = i; break; }
      }
    }
    framesAtLevel = 0;
    stepCost = null;
  }

  /**
   * Later frames of a movement: one step smaller when this step keeps costing over the budget,
   * one step larger when this step's cost, scaled by the area, leaves room (a renderer that
   * reuses work, say when only the needle moves, gets cheap). Slow to change either way:
   * timings are noisy (other work shares the processor) and each new size costs new tables.
   */
  function nextLevel() {
    framesAtLevel++;
    if (stepCost === null) return;
    let next = level;
    if (framesAtLevel >= 3 && stepCost > 1.3 * MOVING_BUDGET_MS && level < SCALES.length - 1) next = level + 1;
    else if (framesAtLevel >= 6 && level > 0 && stepCost * (SCALES[level - 1] / SCALES[level]) ** 2 <= 0.8 * MOVING_BUDGET_MS) next = level - 1;
    if (next !== level) {
      level = next;
      framesAtLevel = 0;
      stepCost = null;
    }
  }

  /** Render the current scene off-screen at exactly width × height; its fingerprint. */
  function renderFingerprint(width, height) {
    if (!spare) spare = new EchoView();
    spare.render(state.session, width, height);
    return spare.fingerprint();
  }

  /**
   * Time the renderer alone on the current scene at width × height: the median of `repeats`
   * renders after one warm-up, ms (for `cargo xtask bench`).
   */
  /**
   * Median time (ms) of a frame with the probe moved before each one, so every frame rebuilds
   * the scene echo (as the native benchmark's "probe" frames do); uses a copy of the session.
   */
  function benchEcho(width, height, repeats = 9) {
    if (!spare) spare = new EchoView();
    const copy = new Session(state.session.save());
    const x0 = copy.scene().probe.pose.x_mm;
    spare.render(copy, width, height);
    const times = [];
    for (let i = 0; i < Math.max(1, repeats); i++) {
      copy.setNumber("probe.pose.x_mm", x0 + 0.01 * (i + 1));
      const t0 = performance.now();
      spare.render(copy, width, height);
      times.push(performance.now() - t0);
    }
    copy.free();
    times.sort((a, b) => a - b);
    return times[Math.floor(times.length / 2)];
  }

  state.onLoad(() => {
    // A new scene may cost differently; measure afresh.
    fullCost = null;
  });

  return {
    frameFor,
    last: () => frame,
    onFrame: (fn) => frameListeners.push(fn),
    error: () => failed,
    renderFingerprint,
    benchEcho,
    /** What the movement logic has learnt (for tuning): cost per step, ms, and the step. */
    learnt: () => ({ scales: SCALES, fullCost, stepCost, level }),
  };
}
