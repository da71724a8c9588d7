// The capture card: the tilt that puts the needle tip on the slab's centre plane and the tilts
// that keep it in the slab, the slide that does the same, buttons that apply either, and the
// solver's reason when one cannot be found.

import { showReadout } from "./readouts.js";
import { deg, signed, signedMm } from "./format.js";

function windowWords(w, unit) {
  const fmt = unit === "deg" ? (v) => `${signed(v, 1)}\u00b0` : (v) => signedMm(v, 2);
  return `${fmt(w[0])} to ${fmt(w[1])}`;
}

/**
 * Wire the capture card (elements found by their hooks under `root`). The solve runs with every
 * scene change; it is cheap (well under a millisecond on the demo scenes).
 */
export function createCaptureView(root, state, controls) {
  const q = (sel) => root.querySelector(sel);
  const centreEl = q('[data-readout="capture.tilt.centre_deg"]');
  const windowEl = q('[data-readout="capture.tilt.window_deg"]');
  const slideEl = q('[data-readout="capture.slide.centre_mm"]');
  const reasonEl = q("[data-capture-reason]");
  const nowEl = q("[data-capture-now]");
  const tiltButton = q('[data-control="capture.apply_tilt"]');
  const slideButton = q('[data-control="capture.apply_slide"]');
  let capture = null;
  let active = true;

  function solve(snap) {
    const t0 = performance.now();
    try {
      capture = state.session.capture();
    } catch (e) {
      capture = { tilt: null, slide: null, reason: e && e.message ? e.message : String(e) };
    }
    state.notePerf({ compute_ms: performance.now() - t0 });
    show(snap);
  }

  function show(snap) {
    const c = capture;
    const tilt = c.tilt;
    const slide = c.slide;
    showReadout(centreEl, tilt ? tilt.centre_deg : null, tilt ? deg(tilt.centre_deg, 1) : "—");
    showReadout(windowEl, null, tilt ? windowWords(tilt.window_deg, "deg") : "—",
      tilt ? `${tilt.window_deg[0]},${tilt.window_deg[1]}` : "");
    showReadout(slideEl, slide ? slide.centre_mm : null, slide ? signedMm(slide.centre_mm, 2) : "—");
    if (slide) {
      slideEl.title = `Face centre at x ${signedMm(slide.centre_pose_mm[0], 2)}, y ${signedMm(slide.centre_pose_mm[1], 2)}; tip in the slab from ${windowWords(slide.window_mm, "mm")}`;
    }
    reasonEl.hidden = !c.reason;
    reasonEl.textContent = c.reason || "";
    tiltButton.disabled = !tilt || !active;
    slideButton.disabled = !slide || !active;
    const nowTilt = snap.scene.probe.pose.tilt_deg;
    nowEl.textContent = deg(nowTilt, 1);
    const inWindow = tilt && nowTilt >= tilt.window_deg[0] && nowTilt <= tilt.window_deg[1];
    windowEl.dataset.inside = inWindow ? "true" : "false";
  }

  tiltButton.addEventListener("click", (ev) => {
    const tilt = capture && capture.tilt;
    if (!tilt) return;
    // The centre, or the nearest reachable tilt when the centre is beyond reach.
    const target = Math.min(tilt.window_deg[1], Math.max(tilt.window_deg[0], tilt.centre_deg));
    controls.set("probe.pose.tilt_deg", target, ev.timeStamp);
  });

  slideButton.addEventListener("click", (ev) => {
    const slide = capture && capture.slide;
    if (!slide) return;
    const pose = { ...state.value("probe.pose"), x_mm: slide.centre_pose_mm[0], y_mm: slide.centre_pose_mm[1] };
    if (state.apply("probe.pose", pose, ev.timeStamp)) controls.sync();
  });

  state.onDraw((snap, what) => {
    if (what.has("all")) solve(snap);
  });

  return {
    /** Buttons off while a rehearsal hides the truth. */
    setActive(on) {
      active = on;
      if (capture) show(state.snap);
    },
  };
}
