// The edge-on view: depth (range from the face) downward, elevation across, with the
// elevation axis stretched so the slab's thickness profile T(range)/2 and the needle's
// crossing of it can be seen. The stretch factor is printed on the view.

import { COLOURS } from "./palette.js";
import { needlePoint, toImage, rangeOf, slabThicknessAt, dot } from "./frame_math.js";
import { num, signedMm, mmAuto } from "./format.js";
import { setupCanvas, rimmedText } from "./canvas.js";

const NICE_STRETCH = [1, 2, 3, 4, 5, 6, 8, 10, 12, 15, 20, 25, 30, 40, 50, 60, 80, 100];

function sideText(ctx, s, x, y, colour, align = "left", size = 10) {
  rimmedText(ctx, s, x, y, colour, align, size, "rgba(0,0,0,0.75)");
}

export function createSideView(canvas, state, captionEl) {
  let cssW = 0, cssH = 0;

  function draw(snap) {
    if (!snap.geometry || cssW < 20 || cssH < 20) return;
    const dpr = Math.min(2, window.devicePixelRatio || 1);
    const ctx = setupCanvas(canvas, cssW, cssH, dpr);
    const geom = snap.geometry;
    const n = snap.report.needle;
    const L = snap.scene.needle.inserted_mm;
    const M = { left: 38, right: 14, top: 16, bottom: 26 };
    const plotW = cssW - M.left - M.right, plotH = cssH - M.top - M.bottom;

    ctx.fillStyle = "#15171a";
    ctx.fillRect(0, 0, cssW, cssH);

    const depth = geom.depth_mm;
    const kr = plotH / depth;
    const tMax = geom.slab.reduce((m, r) => Math.max(m, r[1]), 0);
    const tipE = n.true_tip.elevation_mm;
    const want = Math.max(0.8 * tMax, 1.3 * Math.abs(tipE), 1.0);
    const raw = plotW / (2 * want) / kr;
    let stretch = 1;
    for (const s of NICE_STRETCH) if (s <= raw) stretch = s;
    const ke = kr * stretch;
    const E = plotW / (2 * ke);
    const xc = M.left + plotW / 2;
    const X = (e) => xc + e * ke;
    const Y = (r) => M.top + r * kr;

    ctx.save();
    ctx.beginPath();
    ctx.rect(M.left, M.top, plotW, plotH);
    ctx.clip();

    // The slab: ±T(range)/2 around the centre plane.
    const rows = geom.slab;
    ctx.beginPath();
    rows.forEach(([r, t], i) => (i ? ctx.lineTo(X(t / 2), Y(r)) : ctx.moveTo(X(t / 2), Y(r))));
    for (let i = rows.length - 1; i >= 0; i--) ctx.lineTo(X(-rows[i][1] / 2), Y(rows[i][0]));
    ctx.closePath();
    ctx.fillStyle = COLOURS.slabFillStrong;
    ctx.fill();
    ctx.strokeStyle = COLOURS.slab;
    ctx.lineWidth = 1.5;
    for (const sign of [1, -1]) {
      ctx.beginPath();
      rows.forEach(([r, t], i) => (i ? ctx.lineTo(X((sign * t) / 2), Y(r)) : ctx.moveTo(X((sign * t) / 2), Y(r))));
      ctx.stroke();
    }
    ctx.beginPath();
    ctx.moveTo(X(0), Y(0));
    ctx.lineTo(X(0), Y(depth));
    ctx.setLineDash([3, 4]);
    ctx.strokeStyle = "rgba(86, 180, 233, 0.55)";
    ctx.lineWidth = 1;
    ctx.stroke();
    ctx.setLineDash([]);

    // The needle, seen edge-on: caught stretches solid, the rest dashed.
    const at = (s) => {
      const c = toImage(geom, needlePoint(geom, s));
      return [X(c.e), Y(rangeOf(geom, c.u, c.v))];
    };
    const stretches = [];
    let s = 0;
    for (const [s0, s1] of n.in_slab_mm) {
      if (s0 > s) stretches.push([s, s0, false]);
      stretches.push([s0, s1, true]);
      s = s1;
    }
    if (s < L) stretches.push([s, L, false]);
    const curved = geom.footprint === "curved";
    // The needle's reach across the plane, r·√(1 − (d·n′)²): the band it sweeps edge-on.
    const dn = dot(geom.direction, geom.elevation);
    const reach = (n.outer_diameter_mm / 2) * Math.sqrt(Math.max(0, 1 - dn * dn)) * ke;
    for (const [a0, a1, caught] of stretches) {
      const m = curved ? 16 : 1;
      const pts = [];
      for (let i = 0; i <= m; i++) pts.push(at(a0 + ((a1 - a0) * i) / m));
      if (reach >= 1.5) {
        ctx.beginPath();
        pts.forEach(([x, y], i) => (i ? ctx.lineTo(x - reach, y) : ctx.moveTo(x - reach, y)));
        for (let i = pts.length - 1; i >= 0; i--) ctx.lineTo(pts[i][0] + reach, pts[i][1]);
        ctx.closePath();
        ctx.fillStyle = caught ? "rgba(240, 228, 66, 0.22)" : "rgba(204, 121, 167, 0.16)";
        ctx.fill();
      }
      ctx.beginPath();
      pts.forEach(([x, y], i) => (i ? ctx.lineTo(x, y) : ctx.moveTo(x, y)));
      ctx.lineCap = "round";
      if (caught) {
        ctx.strokeStyle = COLOURS.needle; ctx.lineWidth = 3; ctx.stroke();
      } else {
        ctx.setLineDash([6, 5]);
        ctx.strokeStyle = COLOURS.ghost; ctx.lineWidth = 2; ctx.stroke();
        ctx.setLineDash([]);
      }
      ctx.lineCap = "butt";
    }
    ctx.restore();

    // Tip: its offset from the centre plane, and the slab's thickness at its range.
    if (L > 0) {
      const tip = n.true_tip;
      const rTip = rangeOf(geom, tip.lateral_mm, tip.depth_mm);
      const tT = slabThicknessAt(geom, rTip);
      const ty = Y(rTip), tx = X(tip.elevation_mm);
      if (ty >= M.top - 4 && ty <= M.top + plotH + 4) {
        ctx.beginPath();
        ctx.moveTo(X(-tT / 2), ty); ctx.lineTo(X(tT / 2), ty);
        ctx.moveTo(X(-tT / 2), ty - 4); ctx.lineTo(X(-tT / 2), ty + 4);
        ctx.moveTo(X(tT / 2), ty - 4); ctx.lineTo(X(tT / 2), ty + 4);
        ctx.strokeStyle = "#ffffff";
        ctx.lineWidth = 1;
        ctx.stroke();
        if (tx >= M.left - 8 && tx <= M.left + plotW + 8) {
          ctx.beginPath();
          ctx.arc(tx, ty, 5.5, 0, 2 * Math.PI);
          ctx.strokeStyle = n.tip_in_slab ? COLOURS.needle : COLOURS.ghost;
          ctx.lineWidth = 2;
          ctx.stroke();
        }
        // Label on the tip's own side when there is room, else across the slab.
        const outerRight = Math.max(X(tT / 2), tx) + 10;
        const outerLeft = Math.min(X(-tT / 2), tx) - 10;
        const wantRight = tx >= xc;
        const onRight = wantRight ? outerRight + 105 < cssW : !(outerLeft - 105 > 0);
        const lx = onRight ? outerRight : outerLeft;
        sideText(ctx, `tip ${signedMm(tip.elevation_mm)}`, lx, ty - 8, n.tip_in_slab ? COLOURS.needle : COLOURS.ghost, onRight ? "left" : "right", 11);
        sideText(ctx, `slab ${mmAuto(tT)} thick`, lx, ty + 7, "#ffffff", onRight ? "left" : "right", 10);
      } else {
        sideText(ctx, "tip below the displayed depth", xc, M.top + plotH - 8, COLOURS.ghost, "center", 10);
      }
    }

    // Scales: range down the left; elevation across the bottom (stretched).
    ctx.strokeStyle = "rgba(236, 226, 206, 0.45)";
    ctx.lineWidth = 1;
    ctx.strokeRect(M.left + 0.5, M.top + 0.5, plotW - 1, plotH - 1);
    const rStep = [5, 10, 20, 50].find((st) => st * kr >= 24) || 100;
    for (let r = 0; r <= depth + 1e-9; r += rStep) {
      ctx.beginPath(); ctx.moveTo(M.left - 4, Y(r)); ctx.lineTo(M.left, Y(r)); ctx.stroke();
      sideText(ctx, num(r, 0), M.left - 6, Y(r), "rgba(236, 226, 206, 0.8)", "right", 10);
    }
    const eStep = [0.1, 0.2, 0.5, 1, 2, 5, 10].find((st) => st * ke >= 34) || 20;
    for (let e = -Math.floor(E / eStep) * eStep; e <= E + 1e-9; e += eStep) {
      const x = X(e);
      ctx.beginPath(); ctx.moveTo(x, M.top + plotH); ctx.lineTo(x, M.top + plotH + 4); ctx.stroke();
      const digits = eStep < 1 ? 1 : 0;
      const t = Math.abs(e) < 1e-9 ? "0" : (e > 0 ? "+" : "") + num(e, digits);
      sideText(ctx, t, x, M.top + plotH + 12, "rgba(236, 226, 206, 0.8)", "center", 10);
    }
    sideText(ctx, curved ? "range mm" : "depth mm", 4, 8, "rgba(236, 226, 206, 0.8)", "left", 10);
    sideText(ctx, "elevation mm \u2192", M.left + plotW, 8, "rgba(236, 226, 206, 0.8)", "right", 10);

    const caption = stretch === 1 ? "True scale" : `Elevation stretched \u00d7${stretch} against depth`;
    if (captionEl && captionEl.textContent !== caption) captionEl.textContent = caption;
  }

  function measure() {
    const r = canvas.getBoundingClientRect();
    const w = Math.floor(r.width), h = Math.floor(r.height);
    if (w !== cssW || h !== cssH) { cssW = w; cssH = h; return true; }
    return false;
  }
  measure();
  new ResizeObserver(() => { if (measure()) state.requestView("side"); }).observe(canvas);
  state.onDraw((snap, what) => {
    if (what.has("all") || what.has("side")) draw(snap);
  });
}
