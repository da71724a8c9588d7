// The slice screen's mapping between image millimetres (lateral u, depth v) and canvas
// pixels, shared by the screen's layers. A flip mirrors u on the display only.

import { fovBounds, fovOutline } from "./frame_math.js";

/** Margins around the field of view, CSS px: room for the depth scale, ruler, scale bar and marker. */
export const MARGIN = { left: 46, right: 22, top: 30, bottom: 44 };

/**
 * A mapping for a canvas of cssWidth × cssHeight showing the geometry's field of view.
 * Returns { k (px per mm), flip, x(u), y(v), u(x), v(y), bounds, outline }.
 */
export function makeScreenMap(geom, cssWidth, cssHeight, flip) {
  const bounds = fovBounds(geom);
  const availW = Math.max(10, cssWidth - MARGIN.left - MARGIN.right);
  const availH = Math.max(10, cssHeight - MARGIN.top - MARGIN.bottom);
  const spanU = bounds.umax - bounds.umin;
  const spanV = bounds.vmax - bounds.vmin;
  const k = Math.min(availW / spanU, availH / spanV);
  const cx = MARGIN.left + availW / 2 - ((bounds.umax + bounds.umin) / 2) * k * (flip ? -1 : 1);
  const top = MARGIN.top + Math.max(0, (availH - spanV * k) * 0.25);
  const sign = flip ? -1 : 1;
  return {
    k,
    flip,
    bounds,
    outline: fovOutline(geom),
    x: (u) => cx + sign * u * k,
    y: (v) => top + (v - bounds.vmin) * k,
    u: (x) => (x - cx) / (sign * k),
    v: (y) => (y - top) / k + bounds.vmin,
  };
}

/** Add the field-of-view outline to the current path of ctx. */
export function traceFov(ctx, map) {
  const pts = map.outline;
  ctx.moveTo(map.x(pts[0][0]), map.y(pts[0][1]));
  for (let i = 1; i < pts.length; i++) ctx.lineTo(map.x(pts[i][0]), map.y(pts[i][1]));
  ctx.closePath();
}
