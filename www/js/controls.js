// Scene controls: builds each slider + number pair from a table, keeps twins in step with the
// scene, and turns control events into scene edits. Every control carries
// data-control="<scene path>", the vocabulary the tests and the scene file share.

import { inputValue, mm } from "./format.js";

/**
 * The scene controls, by group. step: one arrow press; big: PageUp/PageDown or Shift.
 * min/max come from the crate's field limits; needle.inserted_mm stops at the needle length.
 */
export const CONTROL_GROUPS = [
  {
    id: "probe",
    controls: [
      { path: "probe.pose.x_mm", label: "Slide x", unit: "mm", step: 0.5, big: 5 },
      { path: "probe.pose.y_mm", label: "Slide y", unit: "mm", step: 0.5, big: 5 },
      { path: "probe.pose.rotate_deg", label: "Rotate", unit: "°", step: 1, big: 10 },
      { path: "probe.pose.tilt_deg", label: "Tilt", unit: "°", step: 0.5, big: 5 },
      { path: "probe.pose.rock_deg", label: "Rock", unit: "°", step: 0.5, big: 5 },
    ],
  },
  {
    id: "needle",
    controls: [
      { path: "needle.inserted_mm", label: "Inserted", unit: "mm", step: 0.5, big: 5 },
      { path: "needle.angle_deg", label: "Angle to skin", unit: "°", step: 0.5, big: 5 },
      { path: "needle.azimuth_deg", label: "Azimuth", unit: "°", step: 0.5, big: 10 },
      { path: "needle.entry.x_mm", label: "Entry x", unit: "mm", step: 0.5, big: 5 },
      { path: "needle.entry.y_mm", label: "Entry y", unit: "mm", step: 0.5, big: 5 },
      { path: "needle.gauge", label: "Gauge", kind: "gauge" },
      { path: "needle.bevel_deg", label: "Bevel angle", unit: "°", step: 1, big: 5 },
      { path: "needle.bevel_roll_deg", label: "Bevel roll", unit: "°", step: 5, big: 45 },
    ],
  },
  {
    id: "beam",
    controls: [
      { path: "probe.frequency_mhz", label: "Frequency", unit: "MHz", step: 0.5, big: 2 },
      { path: "probe.depth_mm", label: "Depth", unit: "mm", step: 1, big: 10 },
      { path: "probe.elevation.model", label: "Slab model", kind: "model" },
      { path: "probe.elevation.aperture_mm", label: "Aperture", unit: "mm", step: 0.1, big: 1, model: "focused" },
      { path: "probe.elevation.focus_mm", label: "Elevation focus", unit: "mm", step: 1, big: 5, model: "focused" },
      { path: "probe.elevation.thickness_mm", label: "Thickness", unit: "mm", step: 0.05, big: 0.5, model: "uniform" },
    ],
  },
  {
    id: "display",
    controls: [
      { path: "display.gain_db", label: "Gain", unit: "dB", step: 1, big: 5 },
      { path: "display.dynamic_range_db", label: "Dynamic range", unit: "dB", step: 1, big: 10 },
      { path: "display.grey_levels", label: "Grey levels", unit: "", step: 1, big: 16, integer: true, range: [2, 256] },
      {
        path: "display.doppler.mode", label: "Colour flow", kind: "choice",
        options: [["off", "off"], ["velocity", "velocity (direction)"], ["power", "power (no direction)"]],
      },
      { path: "display.doppler.scale_cm_s", label: "Colour scale", unit: "cm/s", step: 1, big: 10 },
    ],
  },
];

const GAUGES = [18, 19, 20, 21, 22, 23, 24, 25, 26, 27];

function el(tag, attrs = {}, text) {
  const e = document.createElement(tag);
  for (const [k, v] of Object.entries(attrs)) e.setAttribute(k, v);
  if (text !== undefined) e.textContent = text;
  return e;
}

function idFor(path) {
  return "ctl-" + path.replace(/[^a-z0-9]+/gi, "-");
}

const UNIT_WORDS = { "°": "degrees", dB: "decibels", "cm/s": "centimetres per second", "": "" };

/**
 * Build the controls into `containers` ({probe, needle, beam, display} elements) and wire them.
 * Returns { sync(), onDraw(snap), nudge(path, delta, t), set(path, value, t), steps(path),
 * setRows(container, specs) }.
 */
export function createControls(state, limits, containers) {
  const pairs = new Map(); // path -> { spec, range, number, row }
  const choices = new Map(); // path -> select, for plain choice rows
  let gaugeSelect = null;
  let gaugeCustom = null; // shown only while the scene gives an outer diameter instead of a gauge
  let gaugeNote = null;
  let modelSelect = null;
  // The parameters of the slab model not in use, so switching back restores them.
  const remembered = {
    focused: { model: "focused", aperture_mm: 4, focus_mm: 15 },
    uniform: null, // first use: the focused slab's thickness at the tip, so the picture stays close
  };
  let shownModel = "";

  /** Parameters for switching to `model`: the last ones used, else a close match. */
  function modelParams(model) {
    if (remembered[model]) return { ...remembered[model] };
    const report = state.snap.report;
    const t = report ? report.needle.slab_thickness_at_tip_mm : 1;
    const thickness = Math.min(20, Math.max(0.05, Math.round(t * 20) / 20));
    return { model: "uniform", thickness_mm: thickness };
  }

  function limitOf(spec) {
    if (spec.range) return spec.range;
    if (spec.path === "needle.inserted_mm") {
      const len = state.value("needle.length_mm");
      return [0, Number.isFinite(len) ? len : 300];
    }
    return limits.get(spec.path) || [-1e6, 1e6];
  }

  function applyNumber(spec, value, t) {
    if (spec.integer) value = Math.round(value);
    const current = state.value(spec.path);
    if (spec.model && state.value("probe.elevation.model") !== spec.model) {
      // Editing a parameter of the other slab model switches to that model.
      const next = { ...modelParams(spec.model), [spec.path.split(".").pop()]: value };
      return state.apply("probe.elevation", next, t);
    }
    if (current === value) return true;
    return state.apply(spec.path, value, t);
  }

  function showValue(pair, value) {
    const text = inputValue(value);
    if (pair.range.value !== text) pair.range.value = text;
    if (document.activeElement !== pair.number || pair.number.value === "" || Number(pair.number.value) !== value) {
      if (pair.number.value !== text) pair.number.value = text;
    }
  }

  function showBoth(pair, value) {
    const text = inputValue(value);
    pair.range.value = text;
    pair.number.value = text;
  }

  function onNumberEvent(pair, source, ev) {
    // A committed change ends a movement: let deferred work (full-size image, plots) run now.
    if (ev.type === "change") queueMicrotask(() => state.settle());
    const text = source.value.trim();
    const value = Number(text);
    if (text === "" || !Number.isFinite(value)) {
      // Half-typed: wait; on commit (change) show the scene's value again.
      if (ev.type === "change") showBoth(pair, currentNumber(pair.spec));
      return;
    }
    if (applyNumber(pair.spec, value, ev.timeStamp)) {
      const shown = pair.spec.integer ? Math.round(value) : value;
      const twin = source === pair.range ? pair.number : pair.range;
      twin.value = inputValue(shown);
      if (pair.spec.integer && source === pair.number && ev.type === "change") source.value = inputValue(shown);
    } else if (ev.type === "change" || source === pair.range) {
      // Refused: show the scene's value again (the message naming the field stays on screen).
      // While typing into the number field the text is left alone until it is committed.
      showBoth(pair, currentNumber(pair.spec));
    }
  }

  function currentNumber(spec) {
    const v = state.value(spec.path);
    if (Number.isFinite(v)) return v;
    return spec.model ? modelParams(spec.model)[spec.path.split(".").pop()] : NaN;
  }

  function stepKey(pair, ev) {
    const { spec } = pair;
    const [min, max] = limitOf(spec);
    const cur = currentNumber(spec);
    let next = null;
    const step = ev.shiftKey ? spec.big : spec.step;
    switch (ev.key) {
      case "ArrowRight": case "ArrowUp": next = cur + step; break;
      case "ArrowLeft": case "ArrowDown": next = cur - step; break;
      case "PageUp": next = cur + spec.big; break;
      case "PageDown": next = cur - spec.big; break;
      case "Home": if (ev.target === pair.range) next = min; break;
      case "End": if (ev.target === pair.range) next = max; break;
      default: return;
    }
    if (next === null) return;
    // Number fields keep left/right for the text cursor.
    if (ev.target === pair.number && (ev.key === "ArrowLeft" || ev.key === "ArrowRight")) return;
    ev.preventDefault();
    next = Math.min(max, Math.max(min, Math.round(next * 1e6) / 1e6));
    if (applyNumber(spec, next, ev.timeStamp)) showValue(pair, next);
  }

  function numberRow(spec) {
    const [min, max] = limitOf(spec);
    const id = idFor(spec.path);
    const row = el("div", { class: "ctl" });
    if (spec.model) row.dataset.model = spec.model;
    const label = el("label", { for: id }, spec.label);
    const range = el("input", {
      type: "range", id, min: String(min), max: String(max), step: spec.integer ? "1" : "any",
      "data-control": spec.path,
    });
    const number = el("input", {
      type: "number", min: String(min), max: String(max), step: spec.integer ? "1" : "any",
      inputmode: spec.integer ? "numeric" : "decimal", "data-control": spec.path,
      "aria-label": spec.unit ? `${spec.label}, ${UNIT_WORDS[spec.unit] ?? spec.unit}` : spec.label,
    });
    const unit = el("span", { class: "unit", "aria-hidden": "true" }, spec.unit);
    row.append(label, range, number, unit);
    const pair = { spec, range, number, row };
    for (const src of [range, number]) {
      src.addEventListener("input", (ev) => onNumberEvent(pair, src, ev));
      src.addEventListener("change", (ev) => onNumberEvent(pair, src, ev));
      src.addEventListener("keydown", (ev) => stepKey(pair, ev));
    }
    number.addEventListener("blur", () => showValue(pair, currentNumber(spec)));
    pairs.set(spec.path, pair);
    return row;
  }

  function gaugeRow(spec) {
    const id = idFor(spec.path);
    const row = el("div", { class: "ctl ctl-select" });
    const label = el("label", { for: id }, spec.label);
    const select = el("select", { id, "data-control": spec.path });
    for (const g of GAUGES) select.append(el("option", { value: String(g) }, `${g} G`));
    gaugeCustom = el("option", { value: "", disabled: "" }, "by diameter");
    gaugeNote = el("span", { class: "note" }, "");
    row.append(label, select, gaugeNote);
    const onPick = (ev) => {
      const g = Number(select.value);
      if (!Number.isInteger(g)) return;
      const needle = state.value("needle");
      if (needle.gauge === g) return;
      let ok;
      if (needle.gauge === undefined) {
        // The scene gives an outer diameter; swap it for the gauge.
        const { outer_diameter_mm: _od, ...rest } = needle;
        ok = state.apply("needle", { ...rest, gauge: g }, ev.timeStamp);
      } else {
        ok = state.apply("needle.gauge", g, ev.timeStamp);
      }
      if (!ok) syncSelects();
    };
    select.addEventListener("input", onPick);
    select.addEventListener("change", onPick);
    gaugeSelect = select;
    return row;
  }

  function modelRow(spec) {
    const id = idFor(spec.path);
    const row = el("div", { class: "ctl ctl-select" });
    const label = el("label", { for: id }, spec.label);
    const select = el("select", { id, "data-control": spec.path });
    select.append(
      el("option", { value: "focused" }, "focused lens (hourglass)"),
      el("option", { value: "uniform" }, "uniform (teaching)"),
    );
    row.append(label, select);
    const onPick = (ev) => {
      const model = select.value;
      const cur = state.value("probe.elevation");
      if ((model !== "focused" && model !== "uniform") || cur.model === model) return;
      if (!state.apply("probe.elevation", modelParams(model), ev.timeStamp)) syncSelects();
    };
    select.addEventListener("input", onPick);
    select.addEventListener("change", onPick);
    modelSelect = select;
    return row;
  }

  function choiceRow(spec) {
    const id = idFor(spec.path);
    const row = el("div", { class: "ctl ctl-select" });
    const label = el("label", { for: id }, spec.label);
    const select = el("select", { id, "data-control": spec.path });
    for (const [value, words] of spec.options) select.append(el("option", { value }, words));
    row.append(label, select);
    const onPick = (ev) => {
      if (state.value(spec.path) === select.value) return;
      if (!state.apply(spec.path, select.value, ev.timeStamp)) select.value = state.value(spec.path);
    };
    select.addEventListener("input", onPick);
    select.addEventListener("change", onPick);
    choices.set(spec.path, select);
    return row;
  }

  function buildRow(spec) {
    if (spec.kind === "gauge") return gaugeRow(spec);
    if (spec.kind === "model") return modelRow(spec);
    if (spec.kind === "choice") return choiceRow(spec);
    return numberRow(spec);
  }

  for (const group of CONTROL_GROUPS) {
    const box = containers[group.id];
    if (!box) continue;
    for (const spec of group.controls) box.append(buildRow(spec));
  }

  // Rows built later into one container (the time-gain bank, whose count follows the scene).
  const extraRows = new Map(); // container -> [paths]

  /**
   * Replace the rows of `container` with number rows for `specs` (same fields as the table
   * above, plus `range: [min, max]`), wired like every other control.
   */
  function setRows(container, specs) {
    for (const path of extraRows.get(container) || []) pairs.delete(path);
    container.replaceChildren(...specs.map((spec) => numberRow(spec)));
    extraRows.set(container, specs.map((s) => s.path));
    for (const spec of specs) {
      const v = currentNumber(spec);
      if (Number.isFinite(v)) showBoth(pairs.get(spec.path), v);
    }
  }

  function syncSelects() {
    const needle = state.value("needle");
    if (needle.gauge !== undefined) {
      gaugeCustom.remove();
      gaugeSelect.value = String(needle.gauge);
    } else {
      if (!gaugeCustom.isConnected) gaugeSelect.append(gaugeCustom);
      gaugeSelect.value = "";
    }
    for (const [path, select] of choices) {
      const v = state.value(path);
      if (select.value !== v) select.value = v;
    }
    const elev = state.value("probe.elevation");
    modelSelect.value = elev.model;
    remembered[elev.model] = { ...elev };
    shownModel = elev.model;
    for (const pair of pairs.values()) {
      if (!pair.spec.model) continue;
      pair.row.hidden = pair.spec.model !== elev.model;
      const v = currentNumber(pair.spec);
      if (pair.row.hidden && Number.isFinite(v)) showBoth(pair, v);
    }
  }

  /** Bring every control in line with the scene (after a load or a structural edit). */
  function sync() {
    const insertedPair = pairs.get("needle.inserted_mm");
    const [, maxIns] = limitOf(insertedPair.spec);
    insertedPair.range.max = String(maxIns);
    insertedPair.number.max = String(maxIns);
    for (const pair of pairs.values()) {
      const v = currentNumber(pair.spec);
      if (Number.isFinite(v)) showBoth(pair, v);
    }
    syncSelects();
  }

  /** Per-frame touch: the outer-diameter note beside the gauge, and the model rows. */
  function onDraw(snap) {
    for (const [path, select] of choices) {
      const v = state.value(path);
      if (select.value !== v && document.activeElement !== select) select.value = v;
    }
    const od = snap.report.needle.outer_diameter_mm;
    const text = `${mm(od, 2)} OD`;
    if (gaugeNote.textContent !== text) gaugeNote.textContent = text;
    const elev = snap.scene.probe.elevation;
    if (shownModel !== elev.model) syncSelects();
    else remembered[elev.model] = { ...elev };
  }

  /** Move one numeric field by delta (keyboard shortcuts), clamped to its range. */
  function nudge(path, delta, t) {
    const pair = pairs.get(path);
    if (!pair) return;
    const [min, max] = limitOf(pair.spec);
    const next = Math.min(max, Math.max(min, Math.round((currentNumber(pair.spec) + delta) * 1e6) / 1e6));
    if (applyNumber(pair.spec, next, t)) showValue(pair, next);
  }

  /** Set one numeric field (clamped to its range) and show it in its controls. */
  function set(path, value, t) {
    const pair = pairs.get(path);
    if (!pair) return state.apply(path, value, t);
    const [min, max] = limitOf(pair.spec);
    const next = Math.min(max, Math.max(min, value));
    const ok = applyNumber(pair.spec, next, t);
    if (ok) showValue(pair, next);
    return ok;
  }

  /** Enable or disable the controls inside `container` (a rehearsal locks the needle). */
  function setEnabled(container, enabled) {
    for (const e of container.querySelectorAll("input, select")) e.disabled = !enabled;
  }

  /** The keyboard step sizes of a control, for the shortcut table. */
  function steps(path) {
    const pair = pairs.get(path);
    return pair ? { step: pair.spec.step, big: pair.spec.big } : { step: 1, big: 10 };
  }

  return { sync, onDraw, nudge, set, steps, setRows, setEnabled };
}
