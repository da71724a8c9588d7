// The slice screen: what the slab shows in the image plane (lateral × depth). Three stacked
// canvases: the image layer (slice_image.js), the geometry overlay (this file; hidden by
// view.overlay) and the frame (scales, outline, orientation marker) on top.

import { COLOURS, kindStyle } from "./palette.js";
import { makeScreenMap, traceFov } from "./screen_map.js";
import { drawImageLayer, drawLayerGuides } from "./slice_image.js";
import { wantedSize } from "./echo_image.js";
import { needlePoint, toImage, add, scale } from "./frame_math.js";
import { num, signedMm } from "./format.js";
import { FONT, setupCanvas, rimmedText } from "./canvas.js";

/** On-screen extent at or below which an in-slab stretch reads as a dot (crate constant). */
const DOT_EXTENT_MM = 3.0;
const GOLDEN = Math.PI * (3 - Math.sqrt(5));

/**
 * Places labels so they do not overlap: each tries a few nudges up and down and is skipped
 * when all of them collide.
 */
function makeLabeler(ctx, cssW, cssH) {
  const boxes = [];
  const hits = (b) => boxes.some((o) => b.x0 < o.x1 && b.x1 > o.x0 && b.y0 < o.y1 && b.y1 > o.y0);
  return {
    block(x0, y0, x1, y1) { boxes.push({ x0, y0, x1, y1 }); },
    place(text, x, y, colour, align = "left", size = 11) {
      ctx.font = `${size}px ${FONT}`;
      const w = ctx.measureText(text).width;
      for (const dy of [0, 13, -13, 26, -26, 39]) {
        const left = align === "left" ? x : align === "right" ? x - w : x - w / 2;
        const b = { x0: left - 2, y0: y + dy - size / 2 - 2, x1: left + w + 2, y1: y + dy + size / 2 + 2 };
        if (b.x0 < 0 || b.x1 > cssW || b.y0 < 0 || b.y1 > cssH || hits(b)) continue;
        boxes.push(b);
        rimmedText(ctx, text, x, y + dy, colour, align, size);
        return true;
      }
      return false;
    },
  };
}

/** Canvas-space description of a structure section. */
function sectionPx(map, sec) {
  const a = (sec.angle_deg * Math.PI) / 180;
  return {
    cx: map.x(sec.lateral_mm),
    cy: map.y(sec.depth_mm),
    major: sec.semi_axes_mm[1] * map.k,
    minor: sec.semi_axes_mm[0] * map.k,
    rot: map.flip ? -a : a,
  };
}

/** Fill the current path, lightly over the echo image so its texture shows through. */
function softFill(ctx, fill, overImage) {
  ctx.fillStyle = fill;
  if (overImage) ctx.globalAlpha = 0.45;
  ctx.fill();
  ctx.globalAlpha = 1;
}

function fascicleCount(structure, minorMm) {
  const f = structure && structure.fascicles;
  if (f && f > 0) return Math.min(f, 40);
  return Math.max(3, Math.min(20, Math.round(minorMm * 2.5)));
}

function drawNerve(ctx, p, sec, structure, overImage) {
  const { stroke, fill } = kindStyle("nerve");
  ctx.save();
  ctx.translate(p.cx, p.cy);
  ctx.rotate(p.rot);
  if (sec.shape === "band") {
    ctx.beginPath();
    ctx.rect(-p.major, -p.minor, 2 * p.major, 2 * p.minor);
    softFill(ctx, fill, overImage);
    ctx.strokeStyle = stroke;
    ctx.lineWidth = 2;
    for (const y of [-p.minor, p.minor]) {
      ctx.beginPath(); ctx.moveTo(-p.major, y); ctx.lineTo(p.major, y); ctx.stroke();
    }
    ctx.setLineDash([7, 4]);
    ctx.lineWidth = 1;
    for (const f of [-0.45, 0, 0.45]) {
      ctx.beginPath(); ctx.moveTo(-p.major, f * p.minor); ctx.lineTo(p.major, f * p.minor); ctx.stroke();
    }
    ctx.setLineDash([]);
  } else {
    ctx.beginPath();
    ctx.ellipse(0, 0, p.major, p.minor, 0, 0, 2 * Math.PI);
    softFill(ctx, fill, overImage);
    ctx.strokeStyle = stroke;
    ctx.lineWidth = 2;
    ctx.stroke();
    // Fascicles: small rings packed inside (a honeycomb cue, not only colour); faint over the
    // image, which shows its own.
    if (overImage) ctx.globalAlpha = 0.45;
    const n = fascicleCount(structure, sec.semi_axes_mm[0]);
    const rr = Math.max(1.2, 0.62 * Math.min(p.major, p.minor) / Math.sqrt(n));
    ctx.lineWidth = 1;
    ctx.beginPath();
    for (let i = 0; i < n; i++) {
      const r = 0.78 * Math.sqrt((i + 0.5) / n);
      const t = i * GOLDEN;
      const x = r * Math.cos(t) * p.major;
      const y = r * Math.sin(t) * p.minor;
      ctx.moveTo(x + rr, y);
      ctx.arc(x, y, rr, 0, 2 * Math.PI);
    }
    ctx.stroke();
  }
  ctx.restore();
}

function drawVessel(ctx, p, sec, overImage) {
  const { stroke, fill } = kindStyle("vessel");
  ctx.save();
  ctx.translate(p.cx, p.cy);
  ctx.rotate(p.rot);
  ctx.strokeStyle = stroke;
  if (sec.shape === "band") {
    ctx.beginPath();
    ctx.rect(-p.major, -p.minor, 2 * p.major, 2 * p.minor);
    softFill(ctx, fill, overImage);
    ctx.lineWidth = 3;
    for (const y of [-p.minor, p.minor]) {
      ctx.beginPath(); ctx.moveTo(-p.major, y); ctx.lineTo(p.major, y); ctx.stroke();
    }
    ctx.lineWidth = 1;
    for (const y of [-p.minor * 0.75, p.minor * 0.75]) {
      ctx.beginPath(); ctx.moveTo(-p.major, y); ctx.lineTo(p.major, y); ctx.stroke();
    }
  } else {
    ctx.beginPath();
    ctx.ellipse(0, 0, p.major, p.minor, 0, 0, 2 * Math.PI);
    softFill(ctx, fill, overImage);
    ctx.lineWidth = overImage ? 2 : 3;
    ctx.stroke();
    // A thin inner ring: the wall (vessels have a double outline, nerves have fascicles).
    ctx.beginPath();
    ctx.ellipse(0, 0, p.major * 0.76, p.minor * 0.76, 0, 0, 2 * Math.PI);
    ctx.lineWidth = 1;
    ctx.stroke();
  }
  ctx.restore();
}

function drawFluid(ctx, p, overImage) {
  const { stroke, fill } = kindStyle("fluid");
  ctx.save();
  ctx.translate(p.cx, p.cy);
  ctx.rotate(p.rot);
  ctx.beginPath();
  ctx.ellipse(0, 0, p.major, p.minor, 0, 0, 2 * Math.PI);
  softFill(ctx, fill, overImage);
  ctx.setLineDash([5, 4]);
  ctx.lineWidth = 1.5;
  ctx.strokeStyle = stroke;
  ctx.stroke();
  ctx.setLineDash([]);
  ctx.restore();
}

/** Points around a section's outline, canvas px (ellipse, or rectangle for a band). */
function outlinePx(p, sec, n = 40) {
  const c = Math.cos(p.rot), s = Math.sin(p.rot);
  const pts = [];
  if (sec.shape === "band") {
    for (const [x, y] of [[-1, -1], [1, -1], [1, 1], [-1, 1]]) {
      const lx = x * p.major, ly = y * p.minor;
      pts.push([p.cx + lx * c - ly * s, p.cy + lx * s + ly * c]);
    }
    return pts;
  }
  for (let i = 0; i < n; i++) {
    const t = (2 * Math.PI * i) / n;
    const lx = p.major * Math.cos(t), ly = p.minor * Math.sin(t);
    pts.push([p.cx + lx * c - ly * s, p.cy + lx * s + ly * c]);
  }
  return pts;
}

function drawBone(ctx, p, sec, bottomY, overImage) {
  const pts = outlinePx(p, sec);
  let xmin = Infinity, xmax = -Infinity;
  for (const [x] of pts) { xmin = Math.min(xmin, x); xmax = Math.max(xmax, x); }
  if (overImage) {
    // The image shows the shadow and the bright surface itself: outline the cut only.
    ctx.beginPath();
    pts.forEach(([x, y], i) => (i ? ctx.lineTo(x, y) : ctx.moveTo(x, y)));
    ctx.closePath();
    ctx.setLineDash([6, 4]);
    ctx.strokeStyle = COLOURS.bone;
    ctx.lineWidth = 1.5;
    ctx.stroke();
    ctx.setLineDash([]);
    return;
  }
  // Acoustic shadow below the bone: nothing deeper is seen.
  ctx.save();
  ctx.beginPath();
  ctx.moveTo(xmin, p.cy);
  ctx.lineTo(xmax, p.cy);
  ctx.lineTo(xmax, bottomY);
  ctx.lineTo(xmin, bottomY);
  ctx.closePath();
  ctx.fillStyle = COLOURS.boneShadow;
  ctx.fill();
  ctx.clip();
  ctx.strokeStyle = "rgba(237, 230, 214, 0.10)";
  ctx.lineWidth = 1;
  ctx.beginPath();
  for (let x = xmin - (bottomY - p.cy); x < xmax; x += 9) {
    ctx.moveTo(x, p.cy);
    ctx.lineTo(x + (bottomY - p.cy), bottomY);
  }
  ctx.stroke();
  ctx.restore();
  // The cut itself, dark inside, with a bright upper surface (the strong echo).
  ctx.beginPath();
  pts.forEach(([x, y], i) => (i ? ctx.lineTo(x, y) : ctx.moveTo(x, y)));
  ctx.closePath();
  ctx.fillStyle = "rgba(20, 18, 16, 0.85)";
  ctx.fill();
  ctx.strokeStyle = "rgba(237, 230, 214, 0.45)";
  ctx.lineWidth = 1;
  ctx.stroke();
  ctx.strokeStyle = COLOURS.bone;
  ctx.lineWidth = 3.5;
  ctx.lineCap = "round";
  ctx.beginPath();
  let open = false;
  for (let i = 0; i <= pts.length; i++) {
    const [x, y] = pts[i % pts.length];
    if (y <= p.cy + 0.5) {
      if (open) ctx.lineTo(x, y); else { ctx.moveTo(x, y); open = true; }
    } else open = false;
  }
  ctx.stroke();
  ctx.lineCap = "butt";
}

function drawDot(ctx, x, y, r, overImage) {
  if (overImage) {
    // A ring around the echo, so the image's own dot stays visible inside it.
    ctx.beginPath();
    ctx.arc(x, y, r + 3.5, 0, 2 * Math.PI);
    ctx.strokeStyle = "rgba(0,0,0,0.55)";
    ctx.lineWidth = 3.5;
    ctx.stroke();
    ctx.strokeStyle = COLOURS.needle;
    ctx.lineWidth = 1.6;
    ctx.stroke();
    return;
  }
  ctx.beginPath();
  ctx.arc(x, y, r + 3, 0, 2 * Math.PI);
  ctx.fillStyle = COLOURS.needleHalo;
  ctx.fill();
  ctx.beginPath();
  ctx.arc(x, y, r, 0, 2 * Math.PI);
  ctx.fillStyle = COLOURS.needle;
  ctx.fill();
}

/** An outline around the segment a → b at `radius` px (a stadium), needle-coloured. */
function drawCapsule(ctx, ax, ay, bx, by, radius) {
  const ang = Math.atan2(by - ay, bx - ax);
  ctx.beginPath();
  ctx.arc(ax, ay, radius, ang + Math.PI / 2, ang + (3 * Math.PI) / 2);
  ctx.arc(bx, by, radius, ang - Math.PI / 2, ang + Math.PI / 2);
  ctx.closePath();
  ctx.strokeStyle = "rgba(0,0,0,0.55)";
  ctx.lineWidth = 3.5;
  ctx.stroke();
  ctx.strokeStyle = COLOURS.needle;
  ctx.lineWidth = 1.6;
  ctx.stroke();
}

/**
 * The in-slab stretch a → b (canvas px) as two rails either side of the needle's echo, so the
 * image's bright line shows between them.
 */
function drawRails(ctx, ax, ay, bx, by, halfPx) {
  const len = Math.hypot(bx - ax, by - ay) || 1;
  const nx = -(by - ay) / len, ny = (bx - ax) / len;
  ctx.beginPath();
  for (const side of [-1, 1]) {
    const ox = side * nx * halfPx, oy = side * ny * halfPx;
    ctx.moveTo(ax + ox, ay + oy);
    ctx.lineTo(bx + ox, by + oy);
  }
  ctx.lineCap = "butt";
  ctx.strokeStyle = "rgba(0,0,0,0.55)";
  ctx.lineWidth = 3.5;
  ctx.stroke();
  ctx.strokeStyle = COLOURS.needle;
  ctx.lineWidth = 1.6;
  ctx.stroke();
}

/** Where a point of the bevel lies on screen: the axis at s, pushed across by `across` mm along the bevel facing. */
function bevelPoint(geom, s, across) {
  return toImage(geom, add(needlePoint(geom, s), scale(geom.bevel_facing, across)));
}

/** [0, L] without the in-slab intervals: the stretches the screen does not show. */
function hiddenStretches(L, inSlab) {
  const out = [];
  let s = 0;
  for (const [s0, s1] of [...inSlab].sort((a, b) => a[0] - b[0])) {
    if (s0 > s) out.push([s, s0]);
    s = Math.max(s, s1);
  }
  if (L > s) out.push([s, L]);
  return out;
}

function drawNeedle(ctx, map, snap, overImage) {
  const geom = snap.geometry;
  const n = snap.report.needle;
  const L = snap.scene.needle.inserted_mm;
  const k = map.k;
  const proj = (s) => toImage(geom, needlePoint(geom, s));
  const widthPx = Math.max(2.5, n.outer_diameter_mm * k);
  const bevelStart = L - n.bevel_length_mm;

  if (snap.view.ghost && L > 0) {
    // Over the image, the hidden stretches only: the in-slab part is the image's own echo.
    const stretches = overImage ? hiddenStretches(L, n.in_slab_mm) : [[0, L]];
    ctx.beginPath();
    for (const [s0, s1] of stretches) {
      const a = proj(s0), b = proj(s1);
      ctx.moveTo(map.x(a.u), map.y(a.v));
      ctx.lineTo(map.x(b.u), map.y(b.v));
    }
    ctx.strokeStyle = COLOURS.ghost;
    ctx.globalAlpha = 0.8;
    ctx.lineWidth = Math.max(1.5, widthPx * 0.5);
    ctx.setLineDash([7, 6]);
    ctx.stroke();
    ctx.setLineDash([]);
    ctx.globalAlpha = 1;
  }

  for (const [s0, s1] of n.in_slab_mm) {
    const a = proj(s0), b = proj(s1);
    const extent = Math.hypot(b.u - a.u, b.v - a.v);
    const withTip = s1 >= bevelStart - 1e-9;
    if (extent <= DOT_EXTENT_MM) {
      if (withTip) {
        // Heel and point of the bevel: two echoes close together.
        const r = n.outer_diameter_mm / 2;
        const point = bevelPoint(geom, L, -r);
        const heel = bevelPoint(geom, Math.max(s0, bevelStart), r);
        let hx = map.x(heel.u), hy = map.y(heel.v), px = map.x(point.u), py = map.y(point.v);
        const dotR = Math.max(3, r * k * 0.85);
        if (overImage) {
          // Over the image: one capsule around the true heel and point, not spread apart.
          drawCapsule(ctx, hx, hy, px, py, dotR + 3.5);
          continue;
        }
        const gap = Math.hypot(px - hx, py - hy);
        const need = 2 * dotR + (overImage ? 9 : 3);
        if (gap < need) {
          const mx = (hx + px) / 2, my = (hy + py) / 2;
          const ux = gap > 0.5 ? (px - hx) / gap : 0, uy = gap > 0.5 ? (py - hy) / gap : 1;
          hx = mx - (ux * need) / 2; hy = my - (uy * need) / 2;
          px = mx + (ux * need) / 2; py = my + (uy * need) / 2;
        }
        drawDot(ctx, hx, hy, dotR, overImage);
        drawDot(ctx, px, py, dotR, overImage);
      } else {
        const m = proj((s0 + s1) / 2);
        drawDot(ctx, map.x(m.u), map.y(m.v), Math.max(3.5, widthPx / 2), overImage);
      }
    } else if (overImage) {
      drawRails(ctx, map.x(a.u), map.y(a.v), map.x(b.u), map.y(b.v), widthPx / 2 + 4);
      if (withTip) {
        const t = proj(L);
        ctx.beginPath();
        ctx.arc(map.x(t.u), map.y(t.v), widthPx / 2 + 4, 0, 2 * Math.PI);
        ctx.strokeStyle = "#ffffff";
        ctx.lineWidth = 1.6;
        ctx.stroke();
      }
    } else {
      ctx.lineCap = "round";
      ctx.beginPath();
      ctx.moveTo(map.x(a.u), map.y(a.v));
      ctx.lineTo(map.x(b.u), map.y(b.v));
      ctx.strokeStyle = COLOURS.needleHalo;
      ctx.lineWidth = widthPx + 4;
      ctx.stroke();
      ctx.strokeStyle = COLOURS.needle;
      ctx.lineWidth = widthPx;
      ctx.stroke();
      ctx.lineCap = "butt";
      if (withTip) {
        const t = proj(L);
        ctx.beginPath();
        ctx.arc(map.x(t.u), map.y(t.v), Math.max(2, widthPx * 0.35), 0, 2 * Math.PI);
        ctx.fillStyle = "#ffffff";
        ctx.fill();
      }
    }
  }
}

/** Marks drawn outside the field-of-view clip: where the screen's needle ends, the true tip. */
function drawTipMarks(ctx, map, snap, cssW, cssH, labeler) {
  const n = snap.report.needle;
  const geom = snap.geometry;
  const L = snap.scene.needle.inserted_mm;
  const app = n.apparent_tip;
  const isLine = n.signature === "line-without-tip" || n.signature === "line-with-tip";
  if (app && isLine && n.signature === "line-without-tip") {
    // A short bar across the needle where the screen's line stops.
    const d = toImage(geom, add(geom.origin, geom.direction));
    const dl = Math.hypot(d.u, d.v) || 1;
    const sx = (map.flip ? -1 : 1) * d.u / dl, sy = d.v / dl;
    const x = map.x(app.lateral_mm), y = map.y(app.depth_mm);
    ctx.beginPath();
    ctx.moveTo(x - sy * 9, y + sx * 9);
    ctx.lineTo(x + sy * 9, y - sx * 9);
    ctx.strokeStyle = COLOURS.needle;
    ctx.lineWidth = 2;
    ctx.stroke();
    labeler.place("line ends", x + sy * 12, y - sx * 12 - 8, COLOURS.needle, "center");
  }
  if (!snap.view.ghost || L <= 0) return;
  const t = n.true_tip;
  const x = map.x(t.lateral_mm), y = map.y(t.depth_mm);
  if (app && (n.apparent_to_true_tip_mm || 0) > 0.2) {
    ctx.beginPath();
    ctx.moveTo(map.x(app.lateral_mm), map.y(app.depth_mm));
    ctx.lineTo(x, y);
    ctx.setLineDash([2, 3]);
    ctx.strokeStyle = "rgba(255,255,255,0.6)";
    ctx.lineWidth = 1;
    ctx.stroke();
    ctx.setLineDash([]);
  }
  if (x < -10 || x > cssW + 10 || y < -10 || y > cssH + 10) return;
  // A tip inside the slab is where the screen shows it: no separate mark needed.
  if (n.tip_in_slab && (n.apparent_to_true_tip_mm || 0) <= 0.5) return;
  ctx.beginPath();
  ctx.arc(x, y, 7, 0, 2 * Math.PI);
  ctx.moveTo(x - 5, y - 5); ctx.lineTo(x + 5, y + 5);
  ctx.moveTo(x + 5, y - 5); ctx.lineTo(x - 5, y + 5);
  ctx.strokeStyle = COLOURS.ghost;
  ctx.lineWidth = 2;
  ctx.stroke();
  labeler.block(x - 8, y - 8, x + 8, y + 8);
  const words = `true tip, ${signedMm(n.tip_offset_mm)} off plane`;
  const right = x < cssW - 170;
  labeler.place(words, right ? x + 11 : x - 11, y + 13, COLOURS.ghost, right ? "left" : "right");
}

function drawOverlay(ctx, map, snap, cssW, cssH, overImage = false) {
  const { report, scene } = snap;
  const bottomY = map.y(map.bounds.vmax) + 2;
  ctx.save();
  ctx.beginPath();
  traceFov(ctx, map);
  ctx.clip();
  // Bone and fluid first, then vessels and nerves, so small structures stay on top.
  const order = { bone: 0, fluid: 1, vessel: 2, nerve: 3 };
  const items = report.structures
    .map((st, i) => ({ st, structure: scene.structures[i] }))
    .sort((a, b) => (order[a.st.kind] ?? 4) - (order[b.st.kind] ?? 4));
  const labels = [];
  for (const { st, structure } of items) {
    st.sections.forEach((sec, j) => {
      const p = sectionPx(map, sec);
      // Over the image, fills are lighter so the echo texture inside shows through.
      if (st.kind === "nerve") drawNerve(ctx, p, sec, structure, overImage);
      else if (st.kind === "vessel") drawVessel(ctx, p, sec, overImage);
      else if (st.kind === "fluid") drawFluid(ctx, p, overImage);
      else if (st.kind === "bone") drawBone(ctx, p, sec, bottomY, overImage);
      if (j === 0 || sec.in_view) labels.push({ st, p, sec });
    });
  }
  drawNeedle(ctx, map, snap, overImage);
  ctx.restore();

  const labeler = makeLabeler(ctx, cssW, cssH);
  drawTipMarks(ctx, map, snap, cssW, cssH, labeler);
  const seen = new Set();
  for (const { st, p, sec } of labels) {
    if (seen.has(st.id)) continue;
    const anchor = labelAnchor(map, p, sec);
    if (!anchor) continue;
    seen.add(st.id);
    const [x, y] = anchor;
    const left = x + 4 < cssW - 90;
    labeler.place(st.id, left ? x + 4 : x - 4, Math.max(10, y - 8), kindStyle(st.kind).stroke, left ? "left" : "right");
  }
}

/** Where to label a section: its upper-right-most outline point inside the field of view. */
function labelAnchor(map, p, sec) {
  const c = Math.cos(p.rot), s = Math.sin(p.rot);
  const pts = [];
  const n = 32;
  if (sec.shape === "band") {
    for (const y of [-1, 1]) {
      for (let i = 0; i <= n; i++) {
        const lx = p.major * (-1 + (2 * i) / n), ly = y * p.minor;
        pts.push([p.cx + lx * c - ly * s, p.cy + lx * s + ly * c]);
      }
    }
  } else {
    pts.push(...outlinePx(p, sec, n));
  }
  const { umin, umax, vmin, vmax } = map.bounds;
  let best = null;
  for (const [x, y] of pts) {
    const u = map.u(x), v = map.v(y);
    if (u < umin + 1 || u > umax - 1 || v < Math.max(vmin, 0) + 1 || v > vmax - 1) continue;
    const score = x * 0.35 - y; // prefer high, then right
    if (!best || score > best[2]) best = [x, y, score];
  }
  return best;
}

function niceStep(pxPerMm, minPx) {
  for (const s of [1, 2, 5, 10, 20, 50, 100]) if (s * pxPerMm >= minPx) return s;
  return 100;
}

function drawFrame(ctx, map, snap, cssW, cssH) {
  ctx.clearRect(0, 0, cssW, cssH);
  const geom = snap.geometry;
  const { umin, umax, vmin, vmax } = map.bounds;
  ctx.beginPath();
  traceFov(ctx, map);
  ctx.strokeStyle = COLOURS.frameLine;
  ctx.lineWidth = 1;
  ctx.stroke();

  // Depth scale on the left (depth along the centre scan line).
  const xl = Math.min(map.x(umin), map.x(umax)) - 6;
  const labelStep = niceStep(map.k, 60);
  const minor = labelStep / (labelStep * map.k / 5 >= 9 ? 5 : 2);
  ctx.strokeStyle = COLOURS.frameTick;
  ctx.beginPath();
  for (let v = 0; v <= geom.depth_mm + 1e-9; v += minor) {
    const y = map.y(v);
    const major = Math.abs(v / labelStep - Math.round(v / labelStep)) < 1e-6;
    ctx.moveTo(xl, y);
    ctx.lineTo(xl - (major ? 7 : 3.5), y);
  }
  ctx.stroke();
  for (let v = 0; v <= geom.depth_mm + 1e-9; v += labelStep) {
    rimmedText(ctx, num(v, 0), xl - 10, map.y(v), COLOURS.frameText, "right", 11);
  }
  // The caption moves down a line when a mirrored screen puts the marker in its place.
  const markerLeft = map.flip && map.x(umax) < 70;
  rimmedText(ctx, "depth mm", 6, markerY(map, vmin) + (markerLeft ? 14 : 0), COLOURS.frameText, "left", 10);

  // Lateral ruler under the field of view; + is the marker side.
  const yb = map.y(vmax) + 6;
  const latStep = niceStep(map.k, 50);
  ctx.beginPath();
  const latMinor = latStep / (latStep >= 10 ? 2 : 1);
  const start = Math.ceil(umin / latMinor) * latMinor;
  for (let u = start; u <= umax + 1e-9; u += latMinor) {
    const major = Math.abs(u / latStep - Math.round(u / latStep)) < 1e-6;
    ctx.moveTo(map.x(u), yb);
    ctx.lineTo(map.x(u), yb + (major ? 6 : 3));
  }
  ctx.stroke();
  rimmedText(ctx, "lateral mm", 6, yb + 15, COLOURS.frameText, "left", 10);
  for (let u = Math.ceil(umin / latStep) * latStep; u <= umax + 1e-9; u += latStep) {
    const t = Math.abs(u) < 1e-9 ? "0" : (u > 0 ? "+" : "") + num(u, 0);
    if (map.x(u) < 80) continue; // keep clear of the caption
    rimmedText(ctx, t, map.x(u), yb + 15, COLOURS.frameText, "center", 10);
  }

  // Scale bar under the ruler, at the right end of the field of view.
  const barMm = niceStep(map.k, 36);
  const barPx = barMm * map.k;
  const xr = Math.max(map.x(umin), map.x(umax));
  const yBar = yb + 30;
  ctx.beginPath();
  ctx.moveTo(xr - barPx, yBar - 4);
  ctx.lineTo(xr - barPx, yBar + 4);
  ctx.moveTo(xr - barPx, yBar);
  ctx.lineTo(xr, yBar);
  ctx.moveTo(xr, yBar - 4);
  ctx.lineTo(xr, yBar + 4);
  ctx.lineWidth = 4;
  ctx.strokeStyle = "rgba(0,0,0,0.7)";
  ctx.stroke();
  ctx.lineWidth = 2;
  ctx.strokeStyle = COLOURS.frameText;
  ctx.stroke();
  rimmedText(ctx, `${barMm} mm`, xr - barPx - 7, yBar, COLOURS.frameText, "right", 11);
  ctx.lineWidth = 1;

  // Orientation marker: the +lateral side of the probe.
  const mx = map.x(umax);
  const my = markerY(map, vmin);
  ctx.beginPath();
  ctx.arc(mx, my, 5.5, 0, 2 * Math.PI);
  ctx.fillStyle = COLOURS.marker;
  ctx.fill();
  rimmedText(ctx, "marker side", map.flip ? mx + 11 : mx - 11, my, COLOURS.marker, map.flip ? "left" : "right", 11);
  if (map.flip) rimmedText(ctx, "screen mirrored", map.x(0), my, COLOURS.frameText, "center", 11);
}

function markerY(map, vmin) {
  return Math.max(9, map.y(vmin) - 15);
}

/**
 * Create the slice screen inside `stage` (a positioned element holding three canvases);
 * `echo` (echo_image.js) supplies the simulated image for the bottom layer.
 */
export function createSliceView(stage, state, echo) {
  const [imageCanvas, overlayCanvas, frameCanvas] = ["image", "overlay", "frame"].map((name) =>
    stage.querySelector(`canvas[data-layer="${name}"]`));
  let cssW = 0, cssH = 0;

  function measure() {
    const r = stage.getBoundingClientRect();
    const w = Math.floor(r.width), h = Math.floor(r.height);
    if (w !== cssW || h !== cssH) {
      cssW = w; cssH = h;
      return true;
    }
    return false;
  }

  function draw(snap, settle) {
    if (!snap.geometry || cssW < 20 || cssH < 20) return;
    const dpr = Math.min(2, window.devicePixelRatio || 1);
    const map = makeScreenMap(snap.geometry, cssW, cssH, snap.view.flip);
    const [fw, fh] = wantedSize(map, dpr);
    const frame = echo ? echo.frameFor(snap, fw, fh, settle) : null;
    const ictx = setupCanvas(imageCanvas, cssW, cssH, dpr);
    drawImageLayer(ictx, map, snap, cssW, cssH, frame, dpr);
    const octx = setupCanvas(overlayCanvas, cssW, cssH, dpr);
    octx.clearRect(0, 0, cssW, cssH);
    overlayCanvas.style.visibility = snap.view.overlay ? "visible" : "hidden";
    if (snap.view.overlay) {
      drawLayerGuides(octx, map, snap, frame ? 0.8 : 1);
      drawOverlay(octx, map, snap, cssW, cssH, Boolean(frame));
    }
    const fctx = setupCanvas(frameCanvas, cssW, cssH, dpr);
    drawFrame(fctx, map, snap, cssW, cssH);
  }

  measure();
  new ResizeObserver(() => { if (measure()) state.requestView("slice"); }).observe(stage);
  state.onDraw((snap, what) => {
    if (what.has("all") || what.has("slice") || what.has("echo") || what.has("settle")) draw(snap, what.has("settle"));
  });
}
