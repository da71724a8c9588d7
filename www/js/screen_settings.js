// Screen settings: the time-gain bank (one row per depth band, as many as the scene has), the
// colour-flow key under the screen (palette, ± scale, toward / away) with the estimated frame
// rate, and the last frame's size and fingerprint. Gain, dynamic range, grey levels and the
// colour settings themselves are ordinary rows of controls.js.

import { showReadout } from "./readouts.js";
import { num } from "./format.js";

const MINUS = "\u2212";

function bandLabel(i, n, depthMm) {
  const a = (i * depthMm) / n;
  const b = ((i + 1) * depthMm) / n;
  const digits = depthMm / n < 5 ? 1 : 0;
  return `${num(a, a === 0 ? 0 : digits)}\u2013${num(b, digits)} mm`;
}

function rgb(c) {
  return `rgb(${c[0]}, ${c[1]}, ${c[2]})`;
}

/**
 * Wire the screen settings. `els`: { tgc (container for the bank), tgcLevel (button),
 * key (the colour-key strip) }.
 */
export function createScreenSettings(state, controls, limits, echo, els) {
  const tgcRange = limits.get("display.tgc_db[]") || [-30, 30];
  let bankKey = "";

  function buildBank(snap) {
    const bands = snap.scene.display.tgc_db.length;
    const depth = snap.scene.probe.depth_mm;
    const key = `${bands}@${depth}`;
    if (key === bankKey) return;
    // Rebuilding while a bank slider is being dragged would drop its focus; only the labels
    // change with depth, and the count only on a load.
    const focused = document.activeElement;
    const focusedPath = focused && els.tgc.contains(focused) ? focused.dataset.control : null;
    const focusedType = focused ? focused.type : null;
    bankKey = key;
    const specs = [];
    for (let i = 0; i < bands; i++) {
      specs.push({
        path: `display.tgc_db[${i}]`,
        label: bandLabel(i, bands, depth),
        unit: "dB",
        step: 1,
        big: 5,
        range: tgcRange,
      });
    }
    controls.setRows(els.tgc, specs);
    if (focusedPath) {
      const again = els.tgc.querySelector(`[data-control="${focusedPath}"][type="${focusedType}"]`);
      if (again) again.focus();
    }
  }

  els.tgcLevel.addEventListener("click", (ev) => {
    const n = state.value("display.tgc_db").length;
    if (state.apply("display.tgc_db", new Array(n).fill(0), ev.timeStamp)) controls.sync();
  });

  // ---- colour key and frame rate ----
  const key = els.key;
  const bar = key.querySelector("[data-ck-bar]");
  const left = key.querySelector("[data-ck-left]");
  const right = key.querySelector("[data-ck-right]");
  const note = key.querySelector("[data-ck-note]");
  const colourPart = key.querySelector("[data-ck-colour]");
  const rateOn = key.querySelector("[data-ck-rate-on]");
  const rateOff = key.querySelector("[data-ck-rate-off]");
  const duplexEl = key.querySelector('[data-readout="echo.frame_rate.duplex_hz"]');
  const bmodeEl = key.querySelector('[data-readout="echo.frame_rate.b_mode_hz"]');
  const bmodeOffEl = key.querySelector("[data-ck-bmode-off]");
  const sizeEl = document.querySelector('[data-readout="echo.size"]');
  const printEl = document.querySelector('[data-readout="echo.fingerprint"]');
  let barKey = "";

  function showKey(meta) {
    const d = meta.doppler;
    const fr = meta.frame_rate;
    showReadout(bmodeEl, fr.b_mode_hz, num(fr.b_mode_hz, 0));
    bmodeOffEl.textContent = num(fr.b_mode_hz, 0);
    showReadout(duplexEl, fr.duplex_hz, fr.duplex_hz === null ? "—" : num(fr.duplex_hz, 0));
    key.dataset.mode = d ? d.mode : "off";
    colourPart.hidden = !d;
    rateOn.hidden = !d;
    rateOff.hidden = Boolean(d);
    if (!d) return;
    const k = d.colours.map(rgb).join(",");
    if (k !== barKey) {
      barKey = k;
      bar.style.background = `linear-gradient(to right, ${k})`;
    }
    const scale = num(d.scale_cm_s, d.scale_cm_s < 10 ? 1 : 0);
    if (d.mode === "velocity") {
      left.textContent = `away ${MINUS}${scale}`;
      right.textContent = `+${scale} cm/s toward`;
    } else {
      left.textContent = "weak";
      right.textContent = `strong (scale ${scale} cm/s)`;
    }
    const alias = d.aliasing_velocity_cm_s;
    // Only when the depth, not the scale, sets where colour wraps round: worth saying.
    note.textContent = d.prf_limited_by_depth
      ? `At this depth colour wraps at \u00b1${num(alias, 1)} cm/s.`
      : "";
    key.title = `Pulse rate ${num(d.prf_hz, 0)} Hz; flow slower than ${num(d.wall_filter_cm_s, 1)} cm/s along the beam shows no colour.`;
  }

  echo.onFrame((frame) => {
    showReadout(sizeEl, `${frame.width}x${frame.height}`, `${frame.width} \u00d7 ${frame.height} px${frame.reduced ? " (moving: reduced)" : ""}`);
    showReadout(printEl, frame.fingerprint, frame.fingerprint);
    showKey(frame.meta);
  });

  state.onDraw((snap, what) => {
    if (what.has("all")) buildBank(snap);
  });
  buildBank(state.snap);
}
