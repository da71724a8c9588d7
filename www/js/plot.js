// Small line plots on a canvas (walking schedule, rehearsal replay): sizing for the device's
// pixel ratio, nice axis ticks, axes with labels, and the shapes the plots share.

const FONT = "system-ui, -apple-system, 'Segoe UI', Roboto, sans-serif";

export const PLOT = {
  background: "#15171a",
  grid: "rgba(236, 226, 206, 0.10)",
  axis: "rgba(236, 226, 206, 0.45)",
  text: "rgba(236, 226, 206, 0.82)",
  zero: "rgba(236, 226, 206, 0.35)",
};

/**
 * Size `canvas` to its CSS box at the device pixel ratio; returns { ctx, w, h } in CSS px, or
 * null when the canvas is not laid out (hidden).
 */
export function setupPlot(canvas) {
  const r = canvas.getBoundingClientRect();
  const w = Math.floor(r.width), h = Math.floor(r.height);
  if (w < 40 || h < 40) return null;
  const dpr = Math.min(2, window.devicePixelRatio || 1);
  const W = Math.round(w * dpr), H = Math.round(h * dpr);
  if (canvas.width !== W || canvas.height !== H) {
    canvas.width = W;
    canvas.height = H;
  }
  const ctx = canvas.getContext("2d");
  ctx.setTransform(dpr, 0, 0, dpr, 0, 0);
  ctx.fillStyle = PLOT.background;
  ctx.fillRect(0, 0, w, h);
  return { ctx, w, h };
}

/** Ticks at a 1-2-5 spacing covering [lo, hi], about `count` of them. */
export function niceTicks(lo, hi, count = 5) {
  const span = Math.max(1e-9, hi - lo);
  const raw = span / Math.max(1, count);
  const mag = Math.pow(10, Math.floor(Math.log10(raw)));
  let step = mag;
  for (const m of [1, 2, 5, 10]) {
    if (m * mag >= raw) { step = m * mag; break; }
  }
  const out = [];
  for (let v = Math.ceil(lo / step - 1e-9) * step; v <= hi + step * 1e-6; v += step) {
    out.push(Math.abs(v) < step * 1e-9 ? 0 : v);
  }
  return { ticks: out, step };
}

/** Widen [lo, hi] a little and make sure it is not empty. */
export function padRange(lo, hi, pad = 0.08, minSpan = 1) {
  if (!Number.isFinite(lo) || !Number.isFinite(hi)) return [-minSpan / 2, minSpan / 2];
  if (hi - lo < minSpan) {
    const c = (lo + hi) / 2;
    lo = c - minSpan / 2;
    hi = c + minSpan / 2;
  }
  const p = (hi - lo) * pad;
  return [lo - p, hi + p];
}

export function text(ctx, s, x, y, colour = PLOT.text, align = "left", size = 10.5, baseline = "middle") {
  ctx.font = `${size}px ${FONT}`;
  ctx.textAlign = align;
  ctx.textBaseline = baseline;
  ctx.fillStyle = colour;
  ctx.fillText(s, x, y);
}

function tickText(v, step) {
  const digits = step >= 1 ? 0 : step >= 0.1 ? 1 : 2;
  const s = Math.abs(v).toFixed(digits);
  return (v < 0 && Number(s) !== 0 ? "\u2212" : "") + s;
}

/**
 * Draw axes in the box { left, top, right, bottom } (CSS px) for data ranges x: [x0, x1],
 * y: [y0, y1]; labels under the x axis and above the y axis. Returns { x(v), y(v), box }.
 */
export function drawAxes(ctx, box, [x0, x1], [y0, y1], { xLabel = "", yLabel = "", zeroLine = false } = {}) {
  const X = (v) => box.left + ((v - x0) / (x1 - x0 || 1)) * (box.right - box.left);
  const Y = (v) => box.bottom - ((v - y0) / (y1 - y0 || 1)) * (box.bottom - box.top);
  const xt = niceTicks(x0, x1, Math.max(2, Math.floor((box.right - box.left) / 55)));
  const yt = niceTicks(y0, y1, Math.max(2, Math.floor((box.bottom - box.top) / 28)));
  ctx.lineWidth = 1;
  ctx.strokeStyle = PLOT.grid;
  ctx.beginPath();
  for (const v of yt.ticks) { ctx.moveTo(box.left, Y(v)); ctx.lineTo(box.right, Y(v)); }
  for (const v of xt.ticks) { ctx.moveTo(X(v), box.top); ctx.lineTo(X(v), box.bottom); }
  ctx.stroke();
  if (zeroLine && y0 < 0 && y1 > 0) {
    ctx.strokeStyle = PLOT.zero;
    ctx.beginPath();
    ctx.moveTo(box.left, Y(0));
    ctx.lineTo(box.right, Y(0));
    ctx.stroke();
  }
  ctx.strokeStyle = PLOT.axis;
  ctx.beginPath();
  ctx.moveTo(box.left, box.top);
  ctx.lineTo(box.left, box.bottom);
  ctx.lineTo(box.right, box.bottom);
  ctx.stroke();
  for (const v of yt.ticks) text(ctx, tickText(v, yt.step), box.left - 4, Y(v), PLOT.text, "right");
  for (const v of xt.ticks) text(ctx, tickText(v, xt.step), X(v), box.bottom + 4, PLOT.text, "center", 10.5, "top");
  if (xLabel) text(ctx, xLabel, box.right, box.bottom + 17, PLOT.text, "right", 10.5, "top");
  if (yLabel) text(ctx, yLabel, box.left - 30, box.top - 9, PLOT.text, "left", 10.5);
  return { x: X, y: Y, box };
}

/** A filled band between lower(i) and upper(i) over x(i), i in 0..n−1; gaps where null. */
export function band(ctx, n, xOf, lowOf, highOf, fill) {
  ctx.fillStyle = fill;
  let i = 0;
  while (i < n) {
    while (i < n && (lowOf(i) === null || highOf(i) === null)) i++;
    const start = i;
    while (i < n && lowOf(i) !== null && highOf(i) !== null) i++;
    if (i - start < 1) continue;
    ctx.beginPath();
    for (let j = start; j < i; j++) {
      const x = xOf(j), y = highOf(j);
      if (j === start) ctx.moveTo(x, y); else ctx.lineTo(x, y);
    }
    for (let j = i - 1; j >= start; j--) ctx.lineTo(xOf(j), lowOf(j));
    ctx.closePath();
    ctx.fill();
    if (i - start === 1) {
      // A single point: a thin vertical mark so it is not lost.
      ctx.fillRect(xOf(start) - 1, highOf(start), 2, lowOf(start) - highOf(start));
    }
  }
}

/** A polyline through (x(i), y(i)), broken where y is null. */
export function line(ctx, n, xOf, yOf, stroke, width = 1.5, dash = []) {
  ctx.strokeStyle = stroke;
  ctx.lineWidth = width;
  ctx.setLineDash(dash);
  ctx.beginPath();
  let pen = false;
  for (let i = 0; i < n; i++) {
    const y = yOf(i);
    if (y === null) { pen = false; continue; }
    if (pen) ctx.lineTo(xOf(i), y); else { ctx.moveTo(xOf(i), y); pen = true; }
  }
  ctx.stroke();
  ctx.setLineDash([]);
}

/** A step line: holds each value until the next x. */
export function steps(ctx, n, xOf, yOf, stroke, width = 2) {
  ctx.strokeStyle = stroke;
  ctx.lineWidth = width;
  ctx.beginPath();
  let pen = false;
  let lastY = null;
  for (let i = 0; i < n; i++) {
    const y = yOf(i);
    if (y === null) { pen = false; lastY = null; continue; }
    const x = xOf(i);
    if (!pen) { ctx.moveTo(x, y); pen = true; } else { ctx.lineTo(x, lastY); ctx.lineTo(x, y); }
    lastY = y;
  }
  ctx.stroke();
}

/** A marker for a call that was right: a filled disc with a light rim. */
export function markRight(ctx, x, y, fill) {
  ctx.beginPath();
  ctx.arc(x, y, 5, 0, 2 * Math.PI);
  ctx.fillStyle = fill;
  ctx.fill();
  ctx.lineWidth = 1.5;
  ctx.strokeStyle = "#ffffff";
  ctx.stroke();
}

/** A marker for a call that was wrong: a cross. */
export function markWrong(ctx, x, y, stroke) {
  ctx.lineCap = "round";
  ctx.beginPath();
  ctx.moveTo(x - 5, y - 5); ctx.lineTo(x + 5, y + 5);
  ctx.moveTo(x + 5, y - 5); ctx.lineTo(x - 5, y + 5);
  ctx.lineWidth = 4.5;
  ctx.strokeStyle = "rgba(0,0,0,0.7)";
  ctx.stroke();
  ctx.lineWidth = 2.5;
  ctx.strokeStyle = stroke;
  ctx.stroke();
  ctx.lineCap = "butt";
}
