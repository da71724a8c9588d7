// The walking card: for an advance (by default from the inserted length to 15 mm further, in
// 0.5 mm steps), where the tip lies against the slab with the probe held still, and which tilt
// keeps it in view at each step, with the re-tilts of a user who re-centres only when the tip
// is lost. While a control moves, the schedule is redone every frame when schedule and plots
// together cost under LIVE_BUDGET_MS (about 0.3 + 0.5 ms on the demo scenes), else shortly
// after the control rests; always at once after a load, a pick, a button, or letting go.

import { COLOURS } from "./palette.js";
import { showReadout } from "./readouts.js";
import { mm, inputValue } from "./format.js";
import { setupPlot, drawAxes, padRange, band, line, steps, text, PLOT } from "./plot.js";

/** Default advance to plan, mm, and step. */
const DEFAULT_ADVANCE_MM = 15;
const DEFAULT_STEP_MM = 0.5;
/** Quiet time after a scene change before the schedule is recomputed, ms. */
const DEBOUNCE_MS = 120;
/** Schedule + plots cheaper than this are redone in every frame, even while a control moves, ms. */
const LIVE_BUDGET_MS = 1.5;

const USER = "#E69F00";
const OUT = COLOURS.ghost;

/**
 * Wire the walk card under `root`. Returns { setActive(on), last() } (the last schedule, or
 * null).
 */
export function createWalkView(root, state) {
  const q = (sel) => root.querySelector(sel);
  const fromEl = q('[data-control="walk.from_mm"]');
  const toEl = q('[data-control="walk.to_mm"]');
  const stepEl = q('[data-control="walk.step_mm"]');
  const followButton = q("[data-walk-follow]");
  const offsetCanvas = q("#walk-offset");
  const tiltCanvas = q("#walk-tilt");
  const retiltsEl = q('[data-readout="walk.retilts"]');
  const blindEl = q('[data-readout="walk.blind_advance_mm"]');

  let follow = true; // the fields follow the needle until the user edits them
  let schedule = null;
  let computedFor = -1;
  let timer = 0;
  let active = true;
  let lastCost = 0;
  let fieldError = "";

  function defaults(snap) {
    const n = snap.scene.needle;
    const from = n.inserted_mm;
    return { from, to: Math.min(n.length_mm, from + DEFAULT_ADVANCE_MM), step: DEFAULT_STEP_MM };
  }

  function fields(snap) {
    if (follow) {
      const d = defaults(snap);
      for (const [el, v] of [[fromEl, d.from], [toEl, d.to], [stepEl, d.step]]) {
        if (document.activeElement !== el) el.value = inputValue(v);
      }
      return d;
    }
    return { from: Number(fromEl.value), to: Number(toEl.value), step: Number(stepEl.value) };
  }

  function compute() {
    timer = 0;
    const snap = state.snap;
    const f = fields(snap);
    const t0 = performance.now();
    try {
      schedule = state.session.walk(f.from, f.to, f.step);
      if (fieldError) {
        if (snap.error === fieldError) state.setError("");
        fieldError = "";
      }
    } catch (e) {
      schedule = null;
      fieldError = e && e.message ? e.message : String(e);
      state.setError(fieldError);
    }
    const t1 = performance.now();
    state.notePerf({ compute_ms: t1 - t0 }); // counted when it runs inside a redraw
    computedFor = snap.sceneSerial;
    draw();
    lastCost = performance.now() - t0;
  }

  function request(now = false) {
    clearTimeout(timer);
    if (!active) return;
    timer = setTimeout(compute, now ? 0 : DEBOUNCE_MS);
  }

  function draw() {
    const snap = state.snap;
    showReadout(retiltsEl, schedule ? schedule.retilts : null, schedule ? String(schedule.retilts) : "—");
    showReadout(blindEl, schedule ? schedule.blind_advance_mm : null, schedule ? mm(schedule.blind_advance_mm) : "—");
    followButton.hidden = follow;
    drawOffset(snap);
    drawTilt(snap);
  }

  function xRange(st) {
    const a = st[0].inserted_mm, b = st[st.length - 1].inserted_mm;
    return a === b ? [a - 0.5, b + 0.5] : [Math.min(a, b), Math.max(a, b)];
  }

  function nowLine(ctx, ax, snap) {
    const L = snap.scene.needle.inserted_mm;
    const [x0, x1] = [ax.box.left, ax.box.right];
    const x = ax.x(L);
    if (x < x0 - 0.5 || x > x1 + 0.5) return;
    ctx.strokeStyle = "rgba(255,255,255,0.55)";
    ctx.setLineDash([2, 3]);
    ctx.lineWidth = 1;
    ctx.beginPath();
    ctx.moveTo(x, ax.box.top);
    ctx.lineTo(x, ax.box.bottom);
    ctx.stroke();
    ctx.setLineDash([]);
  }

  function empty(p, words) {
    text(p.ctx, words, p.w / 2, p.h / 2, PLOT.text, "center", 12);
  }

  function drawOffset(snap) {
    const p = setupPlot(offsetCanvas);
    if (!p) return;
    const { ctx, w, h } = p;
    if (!schedule || schedule.steps.length === 0) return empty(p, fieldError ? "Check the advance fields" : "…");
    const st = schedule.steps;
    let lo = Infinity, hi = -Infinity;
    for (const s of st) {
      lo = Math.min(lo, s.tip_offset_mm, -s.half_band_mm);
      hi = Math.max(hi, s.tip_offset_mm, s.half_band_mm);
    }
    const ax = drawAxes(ctx, { left: 40, top: 16, right: w - 10, bottom: h - 30 }, xRange(st), padRange(lo, hi, 0.08, 1),
      { xLabel: "inserted, mm", yLabel: "tip off the centre plane, mm (probe held still)", zeroLine: true });
    const n = st.length;
    const X = (i) => ax.x(st[i].inserted_mm);
    band(ctx, n, X, (i) => ax.y(-st[i].half_band_mm), (i) => ax.y(st[i].half_band_mm), COLOURS.slabFillStrong);
    // The offset, step by step: solid while the slab holds the tip, dashed once it has left.
    const inside = (i) => Math.abs(st[i].tip_offset_mm) <= st[i].half_band_mm;
    for (const holds of [false, true]) {
      ctx.beginPath();
      for (let i = 1; i < n; i++) {
        if ((inside(i - 1) && inside(i)) !== holds) continue;
        ctx.moveTo(X(i - 1), ax.y(st[i - 1].tip_offset_mm));
        ctx.lineTo(X(i), ax.y(st[i].tip_offset_mm));
      }
      ctx.strokeStyle = holds ? COLOURS.needle : OUT;
      ctx.lineWidth = 2;
      ctx.setLineDash(holds ? [] : [5, 4]);
      ctx.stroke();
    }
    ctx.setLineDash([]);
    nowLine(ctx, ax, snap);
    text(ctx, "slab catches", ax.box.left + 4, ax.y(0), "#cfe8f7", "left", 10);
  }

  function drawTilt(snap) {
    const p = setupPlot(tiltCanvas);
    if (!p) return;
    const { ctx, w } = p;
    if (!schedule || schedule.steps.length === 0) return empty(p, fieldError ? "Check the advance fields" : "…");
    const st = schedule.steps;
    let lo = Infinity, hi = -Infinity;
    for (const s of st) {
      for (const v of [s.tilt_centre_deg, s.user_tilt_deg, ...(s.tilt_window_deg || [])]) {
        if (v !== null && v !== undefined) { lo = Math.min(lo, v); hi = Math.max(hi, v); }
      }
    }
    const nowTilt = snap.scene.probe.pose.tilt_deg;
    lo = Math.min(lo, nowTilt);
    hi = Math.max(hi, nowTilt);
    const ax = drawAxes(ctx, { left: 40, top: 16, right: w - 10, bottom: p.h - 30 }, xRange(st), padRange(lo, hi, 0.08, 2),
      { xLabel: "inserted, mm", yLabel: "tilt, \u00b0", zeroLine: true });
    const n = st.length;
    const X = (i) => ax.x(st[i].inserted_mm);
    band(ctx, n, X,
      (i) => (st[i].tilt_window_deg ? ax.y(st[i].tilt_window_deg[0]) : null),
      (i) => (st[i].tilt_window_deg ? ax.y(st[i].tilt_window_deg[1]) : null),
      COLOURS.slabFillStrong);
    line(ctx, n, X, (i) => (st[i].tilt_centre_deg === null ? null : ax.y(st[i].tilt_centre_deg)), COLOURS.slab, 1.6, [5, 3]);
    steps(ctx, n, X, (i) => (st[i].user_tilt_deg === null ? null : ax.y(st[i].user_tilt_deg)), USER, 2.2);
    // The probe's tilt now, for comparison.
    ctx.strokeStyle = "rgba(255,255,255,0.5)";
    ctx.lineWidth = 1;
    ctx.setLineDash([1, 3]);
    ctx.beginPath();
    ctx.moveTo(ax.box.left, ax.y(nowTilt));
    ctx.lineTo(ax.box.right, ax.y(nowTilt));
    ctx.stroke();
    ctx.setLineDash([]);
    nowLine(ctx, ax, snap);
    // Key on the title row, right-aligned: "centre, window" then the user's steps.
    ctx.font = "10px system-ui, sans-serif";
    const keyA = "centre, window";
    const wA = ctx.measureText(keyA).width;
    text(ctx, keyA, ax.box.right, ax.box.top - 9, COLOURS.slab, "right", 10);
    text(ctx, "re-centre when lost \u00b7", ax.box.right - wA - 4, ax.box.top - 9, USER, "right", 10);
  }

  function onFieldEdit() {
    follow = false;
    request(true);
  }
  for (const el of [fromEl, toEl, stepEl]) {
    el.addEventListener("change", onFieldEdit);
    el.addEventListener("input", () => { follow = false; request(); });
  }
  followButton.addEventListener("click", () => {
    follow = true;
    request(true);
  });

  state.onLoad(() => { follow = true; });
  state.onDraw((snap, what) => {
    if (snap.sceneSerial === computedFor) return;
    // A load, a pick or a control let go: now. A control still moving: once it rests.
    const live = lastCost > 0 && lastCost < LIVE_BUDGET_MS;
    if (what.has("settle") || (what.has("all") && (snap.editKind !== "number" || live))) {
      if (active) {
        clearTimeout(timer);
        compute();
      }
    } else if (what.has("all")) {
      request(computedFor < 0);
    }
  });
  // The plots size to their card: redraw when it changes width (or comes back into view).
  const ro = new ResizeObserver(() => { if (schedule || fieldError) draw(); });
  ro.observe(offsetCanvas);

  return {
    setActive(on) {
      active = on;
      if (on && computedFor !== state.snap.sceneSerial) request(true);
    },
    last: () => schedule,
    cost: () => lastCost,
  };
}
