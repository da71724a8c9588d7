// Small vector helpers and the image-frame projection the views share (DESIGN.md frames):
// u = (p − C)·lateral, v = (p − C)·beam, e = (p − C)·elevation, all mm.

export function add(a, b) { return [a[0] + b[0], a[1] + b[1], a[2] + b[2]]; }
export function sub(a, b) { return [a[0] - b[0], a[1] - b[1], a[2] - b[2]]; }
export function scale(a, k) { return [a[0] * k, a[1] * k, a[2] * k]; }
export function dot(a, b) { return a[0] * b[0] + a[1] * b[1] + a[2] * b[2]; }
export function cross(a, b) {
  return [a[1] * b[2] - a[2] * b[1], a[2] * b[0] - a[0] * b[2], a[0] * b[1] - a[1] * b[0]];
}
export function norm(a) { return Math.hypot(a[0], a[1], a[2]); }
export function unit(a) { const n = norm(a) || 1; return [a[0] / n, a[1] / n, a[2] / n]; }

/** World point -> image coordinates {u, v, e} for the geometry's frame. */
export function toImage(geom, p) {
  const d = sub(p, geom.origin);
  return { u: dot(d, geom.lateral), v: dot(d, geom.beam), e: dot(d, geom.elevation) };
}

/** Image coordinates -> world point. */
export function toWorld(geom, u, v, e) {
  return add(geom.origin, add(scale(geom.lateral, u), add(scale(geom.beam, v), scale(geom.elevation, e))));
}

/** The needle axis point at arc length s (mm from the skin), world. */
export function needlePoint(geom, s) {
  return add(geom.entry, scale(geom.direction, s));
}

/** Range along the scan line through (u, v): v for a flat face, radial for a curved one. */
export function rangeOf(geom, u, v) {
  if (geom.footprint !== "curved") return v;
  const r = geom.radius_mm;
  return Math.hypot(u, v + r) - r;
}

/** Sector half-angle of a curved face, radians (0 for a flat face). */
export function halfAngle(geom) {
  return geom.footprint === "curved" ? geom.width_mm / (2 * geom.radius_mm) : 0;
}

/** Full slab thickness at range r, interpolated from the geometry's profile rows. */
export function slabThicknessAt(geom, r) {
  const rows = geom.slab;
  if (r <= rows[0][0]) return rows[0][1];
  for (let i = 1; i < rows.length; i++) {
    if (r <= rows[i][0]) {
      const [r0, t0] = rows[i - 1];
      const [r1, t1] = rows[i];
      return t0 + ((t1 - t0) * (r - r0)) / (r1 - r0 || 1);
    }
  }
  return rows[rows.length - 1][1];
}

/**
 * The field of view's outline in image mm as a closed polyline [[u, v], ...]:
 * a rectangle for a flat face, a sector for a curved one.
 */
export function fovOutline(geom) {
  const D = geom.depth_mm;
  if (geom.footprint !== "curved") {
    const w = geom.width_mm / 2;
    return [[-w, 0], [w, 0], [w, D], [-w, D]];
  }
  const R = geom.radius_mm;
  const h = halfAngle(geom);
  const pts = [];
  const n = 48;
  for (let i = 0; i <= n; i++) {
    const th = -h + (2 * h * i) / n;
    pts.push([R * Math.sin(th), R * Math.cos(th) - R]);
  }
  for (let i = n; i >= 0; i--) {
    const th = -h + (2 * h * i) / n;
    pts.push([(R + D) * Math.sin(th), (R + D) * Math.cos(th) - R]);
  }
  return pts;
}

/** Bounding box of the field of view, image mm. */
export function fovBounds(geom) {
  const pts = fovOutline(geom);
  let umin = Infinity, umax = -Infinity, vmin = Infinity, vmax = -Infinity;
  for (const [u, v] of pts) {
    umin = Math.min(umin, u); umax = Math.max(umax, u);
    vmin = Math.min(vmin, v); vmax = Math.max(vmax, v);
  }
  return { umin, umax, vmin, vmax };
}
