// The 3D bench view: skin, probe, the slab as a translucent hourglass, the needle (its in-slab
// part highlighted) and the structures, projected on a 2D canvas. Drag to turn, wheel to zoom,
// Shift-drag to pan; on the focused canvas arrows turn, + / − zoom, 0 resets.

import { COLOURS, kindStyle } from "./palette.js";
import { add, sub, scale, dot, cross, unit, toWorld, needlePoint, halfAngle, slabThicknessAt } from "./frame_math.js";
import { FONT, setupCanvas } from "./canvas.js";

const DEG = Math.PI / 180;

/** Clip segment a-b to the square |x − cx|, |y − cy| ≤ half (Liang–Barsky on x and y). */
function clipToSquare(a, b, cx, cy, half) {
  let t0 = 0, t1 = 1;
  const d = sub(b, a);
  const tests = [
    [-d[0], a[0] - (cx - half)], [d[0], cx + half - a[0]],
    [-d[1], a[1] - (cy - half)], [d[1], cy + half - a[1]],
  ];
  for (const [p, q] of tests) {
    if (Math.abs(p) < 1e-12) { if (q < 0) return null; continue; }
    const r = q / p;
    if (p < 0) { if (r > t1) return null; if (r > t0) t0 = r; } else { if (r < t0) return null; if (r < t1) t1 = r; }
  }
  return [add(a, scale(d, t0)), add(a, scale(d, t1))];
}

/** Split segment a-b where the signed side function `side` changes sign. */
function splitAtPlane(a, b, side) {
  const ea = side(a), eb = side(b);
  if (ea * eb >= 0) return [[a, b]];
  const t = ea / (ea - eb);
  const m = add(a, scale(sub(b, a), t));
  return [[a, m], [m, b]];
}

/** Image-frame (u, v) of a scan-line point at angle th (rad) and range r, for the geometry. */
function fanPoint(geom, th, r) {
  if (geom.footprint !== "curved") return [th, r]; // flat: th is u directly
  const R = geom.radius_mm;
  return [(R + r) * Math.sin(th), (R + r) * Math.cos(th) - R];
}

export function createSceneView(canvas, state, resetButton) {
  const cam = { yaw: 0, pitch: 28, zoom: 1, pan: [0, 0], userMoved: false };
  let cssW = 0, cssH = 0;
  let last = null;

  function resetCamera(snap) {
    const rot = snap ? snap.scene.probe.pose.rotate_deg : 0;
    cam.yaw = rot - 90 + 28;
    cam.pitch = 24;
    cam.zoom = 1;
    cam.pan = [0, 0];
  }

  function basis() {
    const y = cam.yaw * DEG, p = cam.pitch * DEG;
    // Toward the eye from the target; the eye sits above the skin (negative z) for p > 0.
    const c = [Math.cos(p) * Math.cos(y), Math.cos(p) * Math.sin(y), -Math.sin(p)];
    const right = [-Math.sin(y), Math.cos(y), 0];
    const up = cross(right, c);
    return { c, right, up };
  }

  function draw(snap) {
    if (!snap.geometry || cssW < 20 || cssH < 20) return;
    last = snap;
    const dpr = Math.min(2, window.devicePixelRatio || 1);
    const ctx = setupCanvas(canvas, cssW, cssH, dpr);
    const geom = snap.geometry;
    const report = snap.report;

    ctx.fillStyle = "#221f1b";
    ctx.fillRect(0, 0, cssW, cssH);

    const size = Math.max(geom.width_mm, geom.depth_mm, 20);
    const target = toWorld(geom, 0, geom.depth_mm * 0.38, 0);
    const { c, right, up } = basis();
    const k = (Math.min(cssW, cssH * 1.3) / (2.3 * size)) * cam.zoom;
    const camDist = size * 3.2;
    const cx0 = cssW / 2 + cam.pan[0], cy0 = cssH * 0.5 + cam.pan[1];
    const n = geom.elevation;

    const P = (p) => {
      const d = sub(p, target);
      const depth = dot(d, c);
      const f = camDist / Math.max(camDist * 0.2, camDist - depth);
      return [cx0 + dot(d, right) * k * f, cy0 - dot(d, up) * k * f, f, depth];
    };
    const poly = (pts) => {
      ctx.beginPath();
      pts.forEach((p, i) => { const q = P(p); if (i) ctx.lineTo(q[0], q[1]); else ctx.moveTo(q[0], q[1]); });
      ctx.closePath();
    };

    // Skin patch with a 10 mm grid.
    const reach = Math.max(size * 0.95, Math.hypot(geom.entry[0] - geom.origin[0], geom.entry[1] - geom.origin[1]) + 8);
    const half = Math.ceil(reach / 10) * 10;
    const sx = Math.round(target[0] / 10) * 10, sy = Math.round(target[1] / 10) * 10;
    poly([[sx - half, sy - half, 0], [sx + half, sy - half, 0], [sx + half, sy + half, 0], [sx - half, sy + half, 0]]);
    ctx.fillStyle = COLOURS.skin;
    ctx.fill();
    ctx.strokeStyle = COLOURS.skinLine;
    ctx.lineWidth = 1;
    ctx.stroke();
    ctx.beginPath();
    for (let g = -half + 10; g < half; g += 10) {
      for (const [a, b] of [[[sx + g, sy - half, 0], [sx + g, sy + half, 0]], [[sx - half, sy + g, 0], [sx + half, sy + g, 0]]]) {
        const pa = P(a), pb = P(b);
        ctx.moveTo(pa[0], pa[1]); ctx.lineTo(pb[0], pb[1]);
      }
    }
    ctx.strokeStyle = "rgba(233, 214, 186, 0.12)";
    ctx.stroke();

    // Structures, farthest first; pieces beyond the slab (seen from the eye) go under it.
    const eyeSide = Math.sign(dot(c, n)) || 1;
    const elev = (p) => dot(sub(p, geom.origin), n) * eyeSide; // > 0: on the eye's side
    const far = [], near = [];
    const file = (depth, e, drawFn) => (e > 0 ? near : far).push({ depth, draw: drawFn });
    geom.structures.forEach((st) => {
      if (st.path_mm.length >= 2) {
        for (let i = 0; i + 1 < st.path_mm.length; i++) {
          const seg = clipToSquare(st.path_mm[i], st.path_mm[i + 1], sx, sy, half);
          if (!seg) continue;
          for (const piece of splitAtPlane(seg[0], seg[1], elev)) {
            const depth = (P(piece[0])[3] + P(piece[1])[3]) / 2;
            file(depth, elev(scale(add(piece[0], piece[1]), 0.5)), () => drawTube(piece, st));
          }
        }
      } else {
        file(P(st.centre_mm)[3], elev(st.centre_mm), () => drawPocket(st));
      }
    });
    far.sort((a, b) => a.depth - b.depth);
    near.sort((a, b) => a.depth - b.depth);

    function drawTube(seg, st) {
      const a = P(seg[0]), b = P(seg[1]);
      const w = Math.max(2, 2 * st.radius_mm * k * (a[2] + b[2]) / 2);
      const { stroke } = kindStyle(st.kind);
      ctx.lineCap = "round";
      ctx.globalAlpha = st.kind === "bone" ? 0.6 : 0.85;
      ctx.beginPath(); ctx.moveTo(a[0], a[1]); ctx.lineTo(b[0], b[1]);
      ctx.strokeStyle = stroke; ctx.lineWidth = w; ctx.stroke();
      ctx.globalAlpha = 0.35;
      ctx.strokeStyle = "#ffffff"; ctx.lineWidth = Math.max(1, w * 0.25); ctx.stroke();
      if (st.kind === "nerve") {
        // Dotted core: nerves read as bundles, vessels as plain tubes.
        ctx.globalAlpha = 0.7;
        ctx.setLineDash([2, 5]);
        ctx.strokeStyle = "#0b3d2e";
        ctx.lineWidth = Math.max(1.5, w * 0.3);
        ctx.stroke();
        ctx.setLineDash([]);
      }
      ctx.globalAlpha = 1;
      ctx.lineCap = "butt";
    }

    function drawPocket(st) {
      // Orthographic silhouette of the ellipsoid: the image of the unit ball under M = P·Rz·S.
      const yaw = st.yaw_deg * DEG;
      const axes = [[Math.cos(yaw), Math.sin(yaw), 0], [-Math.sin(yaw), Math.cos(yaw), 0], [0, 0, 1]];
      const cols = axes.map((ax, i) => {
        const d = scale(ax, st.semi_axes_mm[i]);
        return [dot(d, right), dot(d, up)];
      });
      let sxx = 0, sxy = 0, syy = 0;
      for (const [x, y] of cols) { sxx += x * x; sxy += x * y; syy += y * y; }
      const mean = (sxx + syy) / 2, diff = Math.sqrt(((sxx - syy) / 2) ** 2 + sxy * sxy);
      const l1 = mean + diff, l2 = Math.max(0, mean - diff);
      const ang = Math.atan2(l1 - sxx, sxy || 1e-12);
      const ctr = P(st.centre_mm);
      const f = ctr[2] * k;
      ctx.beginPath();
      ctx.ellipse(ctr[0], ctr[1], Math.sqrt(l1) * f, Math.sqrt(l2) * f, -ang, 0, 2 * Math.PI);
      const { stroke } = kindStyle(st.kind);
      ctx.fillStyle = st.kind === "fluid" ? "rgba(74, 163, 223, 0.5)" : "rgba(200, 200, 200, 0.4)";
      ctx.fill();
      ctx.setLineDash([4, 3]); ctx.strokeStyle = stroke; ctx.lineWidth = 1.5; ctx.stroke(); ctx.setLineDash([]);
    }

    // The needle's pieces, split the same way (caught vs not, then by side of the plane).
    const L = snap.scene.needle.inserted_mm;
    const od = report.needle.outer_diameter_mm;
    const stretches = [];
    let s = 0;
    for (const [s0, s1] of report.needle.in_slab_mm) {
      if (s0 > s) stretches.push([s, s0, false]);
      stretches.push([s0, s1, true]);
      s = s1;
    }
    if (s < L) stretches.push([s, L, false]);
    const needleFar = [], needleNear = [];
    for (const [a0, a1, caught] of stretches) {
      for (const [p0, p1] of splitAtPlane(needlePoint(geom, a0), needlePoint(geom, a1), elev)) {
        // The caught part is the point of the picture: always drawn over the slab.
        (caught || elev(scale(add(p0, p1), 0.5)) > 0 ? needleNear : needleFar).push([p0, p1, caught]);
      }
    }
    const drawNeedlePiece = ([p0, p1, caught]) => {
      const a = P(p0), b = P(p1);
      const w = Math.max(caught ? 3 : 2, od * k * (a[2] + b[2]) / 2);
      ctx.lineCap = "round";
      ctx.beginPath(); ctx.moveTo(a[0], a[1]); ctx.lineTo(b[0], b[1]);
      if (caught) {
        ctx.strokeStyle = COLOURS.needleHalo; ctx.lineWidth = w + 6; ctx.stroke();
        ctx.strokeStyle = COLOURS.needle; ctx.lineWidth = w; ctx.stroke();
      } else {
        ctx.strokeStyle = COLOURS.ghost; ctx.lineWidth = w; ctx.stroke();
      }
      ctx.lineCap = "butt";
    };

    for (const it of far) it.draw();
    needleFar.forEach(drawNeedlePiece);

    // The slab: two faces at e = ±T/2 over the field of view, and its hourglass ends.
    const rows = geom.slab;
    const h = halfAngle(geom);
    const curved = geom.footprint === "curved";
    const uEdge = curved ? h : geom.width_mm / 2;
    const edge = (side, sign) => rows.map(([r, t]) => {
      const [u, v] = fanPoint(geom, side * uEdge, r);
      return toWorld(geom, u, v, (sign * t) / 2);
    });
    const across = (r, sign) => {
      const t = slabThicknessAt(geom, r);
      const pts = [];
      const m = curved ? 24 : 1;
      for (let i = 0; i <= m; i++) {
        const th = -uEdge + (2 * uEdge * i) / m;
        const [u, v] = fanPoint(geom, th, r);
        pts.push(toWorld(geom, u, v, (sign * t) / 2));
      }
      return pts;
    };
    const D = geom.depth_mm;
    for (const sign of [-1, 1]) {
      const face = [...across(0, sign), ...edge(1, sign), ...across(D, sign).reverse(), ...edge(-1, sign).reverse()];
      poly(face);
      ctx.fillStyle = COLOURS.slabFill;
      ctx.fill();
      ctx.strokeStyle = "rgba(86, 180, 233, 0.55)";
      ctx.lineWidth = 1;
      ctx.stroke();
    }
    for (const side of [-1, 1]) {
      poly([...edge(side, 1), ...edge(side, -1).reverse()]);
      ctx.fillStyle = COLOURS.slabFillStrong;
      ctx.fill();
      ctx.strokeStyle = COLOURS.slab;
      ctx.lineWidth = 1.2;
      ctx.stroke();
    }

    for (const it of near) it.draw();
    needleNear.forEach(drawNeedlePiece);

    // The hub outside the skin, and the tip.
    const hubA = P(needlePoint(geom, -14)), hubB = P(needlePoint(geom, 0));
    ctx.lineCap = "round";
    ctx.beginPath(); ctx.moveTo(hubA[0], hubA[1]); ctx.lineTo(hubB[0], hubB[1]);
    ctx.strokeStyle = "#d9d0bf"; ctx.lineWidth = Math.max(4, 2.2 * od * k * hubA[2]); ctx.stroke();
    if (L > 0) {
      const t = P(geom.tip);
      ctx.beginPath(); ctx.arc(t[0], t[1], 5, 0, 2 * Math.PI);
      ctx.strokeStyle = report.needle.tip_in_slab ? COLOURS.needle : COLOURS.ghost;
      ctx.lineWidth = 2; ctx.stroke();
    }

    // Probe body on the skin: a box over the face, the marker on its +lateral end.
    const a = geom.lateral, b = geom.beam;
    const halfW = curved ? geom.radius_mm * Math.sin(Math.min(h, Math.PI / 2)) : geom.width_mm / 2;
    const halfE = 5, tall = 12;
    const corner = (i, j, l) => add(geom.origin, add(scale(a, i * halfW), add(scale(n, j * halfE), scale(b, -l * tall))));
    const faces = [
      [[1, -1, 0], [1, 1, 0], [1, 1, 1], [1, -1, 1], [1, 0, 0]],
      [[-1, -1, 0], [-1, -1, 1], [-1, 1, 1], [-1, 1, 0], [-1, 0, 0]],
      [[-1, 1, 0], [-1, 1, 1], [1, 1, 1], [1, 1, 0], [0, 1, 0]],
      [[-1, -1, 0], [1, -1, 0], [1, -1, 1], [-1, -1, 1], [0, -1, 0]],
      [[-1, -1, 1], [1, -1, 1], [1, 1, 1], [-1, 1, 1], [0, 0, -1]],
      [[-1, -1, 0], [-1, 1, 0], [1, 1, 0], [1, -1, 0], [0, 0, 1]],
    ].map((f) => {
      const pts = f.slice(0, 4).map(([i, j, l]) => corner(i, j, l));
      const [ni, nj, nl] = f[4];
      const normal = add(scale(a, ni), add(scale(n, nj), scale(b, nl)));
      const centre = scale(pts.reduce((acc, p) => add(acc, p), [0, 0, 0]), 0.25);
      return { pts, facing: dot(unit(normal), c), depth: P(centre)[3] };
    }).filter((f) => f.facing > 0).sort((p, q) => p.depth - q.depth);
    for (const f of faces) {
      poly(f.pts);
      ctx.fillStyle = `rgba(201, 191, 174, ${0.35 + 0.3 * f.facing})`;
      ctx.fill();
      ctx.strokeStyle = COLOURS.probeEdge;
      ctx.lineWidth = 1;
      ctx.stroke();
    }
    const mk = P(add(geom.origin, add(scale(a, halfW - 3), scale(b, -tall * 0.75))));
    ctx.beginPath(); ctx.arc(mk[0], mk[1], 4, 0, 2 * Math.PI); ctx.fillStyle = COLOURS.marker; ctx.fill();

    // Axes: world x, y and depth.
    const ox = 34, oy = cssH - 30;
    const axes = [[[1, 0, 0], "x"], [[0, 1, 0], "y"], [[0, 0, 1], "depth"]];
    ctx.font = `10px ${FONT}`;
    ctx.textAlign = "center";
    ctx.textBaseline = "middle";
    for (const [v, name] of axes) {
      const ex = ox + dot(v, right) * 20, ey = oy - dot(v, up) * 20;
      ctx.beginPath(); ctx.moveTo(ox, oy); ctx.lineTo(ex, ey);
      ctx.strokeStyle = "rgba(236, 226, 206, 0.7)"; ctx.lineWidth = 1.2; ctx.stroke();
      ctx.fillStyle = "rgba(236, 226, 206, 0.85)";
      ctx.fillText(name, ox + dot(v, right) * 30, oy - dot(v, up) * 30);
    }
  }

  function measure() {
    const r = canvas.getBoundingClientRect();
    const w = Math.floor(r.width), hh = Math.floor(r.height);
    if (w !== cssW || hh !== cssH) { cssW = w; cssH = hh; return true; }
    return false;
  }

  function redraw() { state.requestView("scene3d"); }

  // Pointer: drag turns, Shift-drag pans.
  let drag = null;
  canvas.addEventListener("pointerdown", (ev) => {
    canvas.setPointerCapture(ev.pointerId);
    drag = { x: ev.clientX, y: ev.clientY, pan: ev.shiftKey || ev.button === 1 || ev.button === 2 };
  });
  canvas.addEventListener("pointermove", (ev) => {
    if (!drag) return;
    const dx = ev.clientX - drag.x, dy = ev.clientY - drag.y;
    drag.x = ev.clientX; drag.y = ev.clientY;
    if (drag.pan) { cam.pan[0] += dx; cam.pan[1] += dy; }
    else { cam.yaw -= dx * 0.45; cam.pitch = Math.max(-85, Math.min(89, cam.pitch + dy * 0.45)); }
    redraw();
  });
  const endDrag = () => { drag = null; };
  canvas.addEventListener("pointerup", endDrag);
  canvas.addEventListener("pointercancel", endDrag);
  canvas.addEventListener("contextmenu", (ev) => ev.preventDefault());
  canvas.addEventListener("wheel", (ev) => {
    ev.preventDefault();
    cam.zoom = Math.max(0.3, Math.min(12, cam.zoom * Math.exp(-ev.deltaY * 0.0015)));
    redraw();
  }, { passive: false });
  canvas.addEventListener("dblclick", () => { resetCamera(last); redraw(); });
  canvas.addEventListener("keydown", (ev) => {
    if (ev.ctrlKey || ev.metaKey || ev.altKey) return;
    const step = ev.shiftKey ? 15 : 5;
    switch (ev.key) {
      case "ArrowLeft": cam.yaw += step; break;
      case "ArrowRight": cam.yaw -= step; break;
      case "ArrowUp": cam.pitch = Math.min(89, cam.pitch + step); break;
      case "ArrowDown": cam.pitch = Math.max(-85, cam.pitch - step); break;
      case "+": case "=": cam.zoom = Math.min(12, cam.zoom * 1.2); break;
      case "-": case "_": cam.zoom = Math.max(0.3, cam.zoom / 1.2); break;
      case "0": resetCamera(last); break;
      default: return;
    }
    ev.preventDefault();
    redraw();
  });
  if (resetButton) resetButton.addEventListener("click", () => { resetCamera(last); redraw(); });

  measure();
  new ResizeObserver(() => { if (measure()) redraw(); }).observe(canvas);
  state.onLoad((snap) => resetCamera(snap));
  resetCamera(state.snap);
  state.onDraw((snap, what) => {
    if (what.has("all") || what.has("scene3d")) draw(snap);
  });

  return { reset: () => { resetCamera(last); redraw(); } };
}
