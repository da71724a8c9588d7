// The rehearsal replay: over the advance, the user's probe tilt against the tilt that centres
// the tip and the window that keeps it in the slab, a strip marking where the tip was in the
// slab, and every call ("tip" / "shaft") marked by shape: a disc when right, a cross when wrong.

import { COLOURS } from "./palette.js";
import { drawAxes, padRange, band, line, steps, text, markRight, markWrong, PLOT } from "./plot.js";

const USER = "#E69F00";
const RIGHT = "#009E73";
const WRONG = "#D55E00";

/**
 * Draw the replay of `score` (from session.scoreRehearsal) on `ctx`, w × h CSS px, background
 * already painted. `title` (optional) is written above the plot.
 */
export function drawReplay(ctx, w, h, score, { title = "", big = false } = {}) {
  const rows = score ? score.replay : [];
  const f = big ? 1.5 : 1;
  if (rows.length === 0) {
    text(ctx, "Nothing was logged.", w / 2, h / 2, PLOT.text, "center", 12 * f);
    return;
  }
  let lo = Infinity, hi = -Infinity, x0 = Infinity, x1 = -Infinity;
  for (const r of rows) {
    x0 = Math.min(x0, r.inserted_mm);
    x1 = Math.max(x1, r.inserted_mm);
    for (const v of [r.user_tilt_deg, r.solver_tilt_deg, ...(r.solver_window_deg || [])]) {
      if (v !== null && v !== undefined && Number.isFinite(v)) { lo = Math.min(lo, v); hi = Math.max(hi, v); }
    }
  }
  if (x1 - x0 < 1) { x0 -= 0.5; x1 += 0.5; }
  const top = (title ? 30 : 18) * f;
  const strip = 9 * f;
  const box = { left: 40 * f, top, right: w - 10 * f, bottom: h - 34 * f - strip };
  if (title) text(ctx, title, box.left - 30 * f, 12 * f, "#ffffff", "left", 13 * f);
  ctx.save();
  if (big) ctx.lineWidth = 1.5;
  const ax = drawAxes(ctx, box, [x0, x1], padRange(lo, hi, 0.1, 2), { xLabel: "", yLabel: "tilt, \u00b0", zeroLine: true });
  const n = rows.length;
  const X = (i) => ax.x(rows[i].inserted_mm);
  band(ctx, n, X,
    (i) => (rows[i].solver_window_deg ? ax.y(rows[i].solver_window_deg[0]) : null),
    (i) => (rows[i].solver_window_deg ? ax.y(rows[i].solver_window_deg[1]) : null),
    COLOURS.slabFillStrong);
  line(ctx, n, X, (i) => (rows[i].solver_tilt_deg === null ? null : ax.y(rows[i].solver_tilt_deg)), COLOURS.slab, 1.6 * f, [5, 3]);
  steps(ctx, n, X, (i) => ax.y(rows[i].user_tilt_deg), USER, 2.2 * f);

  // Where the tip was in the slab, judged at each logged moment (held until the next).
  const sy = box.bottom + 20 * f;
  ctx.fillStyle = "rgba(236, 226, 206, 0.10)";
  ctx.fillRect(box.left, sy, box.right - box.left, strip);
  ctx.fillStyle = COLOURS.slab;
  for (let i = 0; i < n; i++) {
    if (!rows[i].tip_in_slab) continue;
    const a = X(i);
    const b = i + 1 < n ? X(i + 1) : a + 2;
    ctx.fillRect(Math.min(a, b), sy, Math.max(2, Math.abs(b - a)), strip);
  }
  text(ctx, "\u25b2 tip in the slab", box.left, sy + strip + 3 * f, PLOT.text, "left", 10 * f, "top");
  text(ctx, "inserted, mm", box.right, sy + strip + 3 * f, PLOT.text, "right", 10.5 * f, "top");

  // The calls, on the user's tilt line; letter above: T for "tip", S for "shaft".
  for (let i = 0; i < n; i++) {
    const r = rows[i];
    if (!r.declared) continue;
    const x = X(i), y = ax.y(r.user_tilt_deg);
    ctx.save();
    if (big) { ctx.translate(x, y); ctx.scale(1.4, 1.4); ctx.translate(-x, -y); }
    if (r.declaration_correct) markRight(ctx, x, y, RIGHT); else markWrong(ctx, x, y, WRONG);
    ctx.restore();
    const letter = r.declared === "tip" ? "T" : "S";
    ctx.font = `600 ${10 * f}px system-ui, sans-serif`;
    ctx.lineJoin = "round";
    ctx.lineWidth = 3;
    ctx.strokeStyle = "rgba(0,0,0,0.8)";
    ctx.textAlign = "center";
    ctx.textBaseline = "bottom";
    ctx.strokeText(letter, x, y - 7 * f);
    ctx.fillStyle = r.declaration_correct ? "#bff0dc" : "#ffd0b0";
    ctx.fillText(letter, x, y - 7 * f);
  }
  ctx.restore();
}
