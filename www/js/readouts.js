// Readouts: every element with data-readout="<report path>" shows the value for people and
// keeps the raw machine value in data-value. Also the verdict line and the list of cuts.

import { raw, mm, mmAuto, signedMm, deg, signatureWords, cutWords } from "./format.js";

function distanceWords(d) {
  if (d === null || d === undefined || !Number.isFinite(d)) return "—";
  if (d < 0) return `${mmAuto(-d)} inside`;
  return mmAuto(d);
}

/** How each readout path gets its value and its words. */
const READOUTS = {
  "needle.signature": {
    get: (s) => s.report.needle.signature,
    words: (v, s) => signatureWords(s.report.needle).headline,
  },
  "needle.tip_in_slab": {
    get: (s) => s.report.needle.tip_in_slab,
    words: (v) => (v ? "yes" : "no"),
  },
  "needle.tip_offset_mm": { get: (s) => s.report.needle.tip_offset_mm, words: (v) => signedMm(v, Math.abs(v) < 1 ? 2 : 1) },
  "needle.hidden_length_mm": { get: (s) => s.report.needle.hidden_length_mm, words: (v) => mm(v) },
  "needle.apparent_to_true_tip_mm": { get: (s) => s.report.needle.apparent_to_true_tip_mm, words: (v) => mmAuto(v) },
  "needle.extent_mm": { get: (s) => s.report.needle.extent_mm, words: (v) => mmAuto(v) },
  "needle.insonation_deg": { get: (s) => s.report.needle.insonation_deg, words: (v) => deg(v) },
  "needle.plane_angle_deg": { get: (s) => s.report.needle.plane_angle_deg, words: (v) => deg(v, 1) },
  "needle.slab_thickness_at_tip_mm": { get: (s) => s.report.needle.slab_thickness_at_tip_mm, words: (v) => mm(v, 2) },
  "nearest_nerve.distance_mm": {
    get: (s) => (s.report.nearest_nerve ? s.report.nearest_nerve.distance_mm : null),
    words: (v) => distanceWords(v),
  },
  "nearest_nerve.screen_distance_mm": {
    get: (s) => (s.report.nearest_nerve ? s.report.nearest_nerve.screen_distance_mm : null),
    words: (v) => distanceWords(v),
  },
  "nearest_nerve.id": {
    get: (s) => (s.report.nearest_nerve ? s.report.nearest_nerve.id : null),
    words: (v) => (v ? v : "no nerve in the scene"),
  },
  "scene.title": { get: (s) => s.scene.title, words: (v) => v || "Untitled scene" },
};

function setText(el, text) {
  if (el.textContent !== text) el.textContent = text;
}

function setValue(el, value) {
  if (el.getAttribute("data-value") !== value) el.setAttribute("data-value", value);
}

/**
 * Show a readout kept by another module (echo, capture, walk, rehearsal): words for people,
 * the raw value (or `rawValue` when given, e.g. "lo,hi") in data-value.
 */
export function showReadout(el, value, words, rawValue) {
  if (!el) return;
  setValue(el, rawValue !== undefined ? rawValue : typeof value === "boolean" ? String(value) : raw(value));
  setText(el, words);
}

export function createReadouts(root, state) {
  const els = [...root.querySelectorAll("[data-readout]")];
  const byPath = els.filter((e) => READOUTS[e.dataset.readout]);
  const errorEls = els.filter((e) => e.dataset.readout === "error");
  const detail = root.querySelector("[data-verdict-detail]");
  const verdictBox = root.querySelector("[data-verdict]");
  const cutsList = root.querySelector("[data-cuts]");
  const notes = root.querySelector("[data-notes]");
  let cutRows = [];

  function showError(message) {
    for (const el of errorEls) {
      setValue(el, message || "");
      const box = el.closest("[data-error-box]") || el;
      setText(el, message || "");
      box.hidden = !message;
    }
  }

  function buildCuts(snap) {
    if (!cutsList) return;
    cutsList.replaceChildren();
    cutRows = snap.scene.structures.map((st) => {
      const li = document.createElement("li");
      li.className = `cut kind-${st.kind}`;
      const icon = document.createElement("span");
      icon.className = "cut-icon";
      icon.setAttribute("aria-hidden", "true");
      const name = document.createElement("span");
      name.className = "cut-name";
      name.textContent = `${st.id} (${st.kind})`;
      const how = document.createElement("span");
      how.className = "cut-how";
      const dist = document.createElement("span");
      dist.className = "cut-dist";
      li.append(icon, name, how, dist);
      cutsList.append(li);
      return { how, dist };
    });
    if (notes) notes.textContent = snap.scene.notes || "No notes in this scene.";
  }

  function update(snap) {
    for (const el of byPath) {
      const spec = READOUTS[el.dataset.readout];
      const v = spec.get(snap);
      setValue(el, typeof v === "boolean" ? String(v) : raw(v));
      setText(el, spec.words(v, snap));
    }
    const words = signatureWords(snap.report.needle);
    if (detail) setText(detail, words.detail);
    if (verdictBox) {
      const sig = snap.report.needle.signature;
      if (verdictBox.dataset.signature !== sig) verdictBox.dataset.signature = sig;
    }
    if (cutRows.length !== snap.report.structures.length) buildCuts(snap);
    snap.report.structures.forEach((st, i) => {
      const row = cutRows[i];
      if (!row) return;
      let how = cutWords(st.section);
      if (st.section && st.section.shape === "ellipse" && !st.section.in_view) how += ", off screen";
      setText(row.how, how);
      setText(row.dist, `tip ${distanceWords(st.tip_distance_mm)}`);
    });
  }

  state.onError(showError);
  state.onLoad(buildCuts);
  buildCuts(state.snap);
  showError(state.snap.error);
  state.onDraw((snap, what) => {
    if (what.has("all")) update(snap);
  });
}
