// The slice screen's bottom layer: the simulated echo image (echo_image.js renders it), placed
// by its own meta (mm per pixel, centre of the first pixel) through the screen map, so it lines
// up with the overlay and mirrors with the screen. Without a frame it paints a plain dark field.
// The tissue-layer guides are truth, not image: the overlay draws them (drawLayerGuides).

import { COLOURS } from "./palette.js";
import { traceFov } from "./screen_map.js";

/** Where the skin (world z = 0) and a layer boundary z = zb cross the image: v at lateral u. */
function vOfDepth(geom, zb, u) {
  const az = geom.lateral[2];
  const bz = geom.beam[2];
  return (zb - u * az) / bz;
}

/**
 * Paint the bottom layer: the echo frame when there is one, else a plain field of view.
 * `dpr` is the canvas's device-pixel ratio (the frame's origin is snapped to device pixels).
 */
export function drawImageLayer(ctx, map, snap, cssWidth, cssHeight, frame, dpr = 1) {
  ctx.fillStyle = COLOURS.screenOut;
  ctx.fillRect(0, 0, cssWidth, cssHeight);
  if (frame) {
    drawEchoFrame(ctx, map, frame, dpr);
    return;
  }
  const geom = snap.geometry;
  ctx.save();
  ctx.beginPath();
  traceFov(ctx, map);
  ctx.fillStyle = COLOURS.screenIn;
  ctx.fill();
  ctx.clip();
  const { umin, umax } = map.bounds;
  const u0 = umin - 5;
  const u1 = umax + 5;
  ctx.beginPath();
  ctx.moveTo(map.x(u0), map.y(vOfDepth(geom, 0, u0)));
  ctx.lineTo(map.x(u1), map.y(vOfDepth(geom, 0, u1)));
  ctx.lineTo(map.x(u1), 0);
  ctx.lineTo(map.x(u0), 0);
  ctx.closePath();
  ctx.fillStyle = COLOURS.air;
  ctx.fill();
  ctx.restore();
}

/**
 * The echo frame in image mm: pixel (0, 0) is centred at meta.top_left_mm, pixels are
 * meta.mm_per_px apart; so its outer edge starts half a pixel before. Clipped to the field of
 * view (a curved face's frame is the rectangle around the sector).
 */
function drawEchoFrame(ctx, map, frame, dpr) {
  const m = frame.meta;
  const su = m.mm_per_px.lateral;
  const sv = m.mm_per_px.depth;
  const uEdge = m.top_left_mm.lateral_mm - su / 2;
  const vEdge = m.top_left_mm.depth_mm - sv / 2;
  // Snap the origin to a device pixel: at one frame pixel per device pixel this keeps the image
  // sharp, and it moves it by under half a device pixel.
  const x0 = Math.round(map.x(uEdge) * dpr) / dpr;
  const y0 = Math.round(map.y(vEdge) * dpr) / dpr;
  ctx.save();
  ctx.beginPath();
  traceFov(ctx, map);
  ctx.clip();
  ctx.translate(x0, y0);
  ctx.scale((map.flip ? -1 : 1) * map.k * su, map.k * sv);
  ctx.imageSmoothingEnabled = true;
  ctx.drawImage(frame.canvas, 0, 0);
  ctx.restore();
}

/** Tissue-layer boundaries as faint dashed lines, labelled with the layer below each line. */
export function drawLayerGuides(ctx, map, snap, alpha = 1) {
  const geom = snap.geometry;
  ctx.save();
  ctx.globalAlpha = alpha;
  ctx.beginPath();
  traceFov(ctx, map);
  ctx.clip();

  const { umin, umax } = map.bounds;
  const u0 = umin - 5;
  const u1 = umax + 5;

  // Tissue-layer boundaries, labelled with the layer below each line.
  const layers = (snap.scene.tissue && snap.scene.tissue.layers) || [];
  const bounds = geom.layer_boundaries_mm;
  ctx.strokeStyle = COLOURS.layerLine;
  ctx.lineWidth = 1;
  ctx.setLineDash([6, 5]);
  for (const zb of bounds) {
    ctx.beginPath();
    ctx.moveTo(map.x(u0), map.y(vOfDepth(geom, zb, u0)));
    ctx.lineTo(map.x(u1), map.y(vOfDepth(geom, zb, u1)));
    ctx.stroke();
  }
  ctx.setLineDash([]);
  ctx.fillStyle = COLOURS.layerText;
  ctx.font = "11px system-ui, sans-serif";
  ctx.textBaseline = "middle";
  ctx.textAlign = "left";
  let top = 0;
  const px = map.k;
  const curved = geom.footprint === "curved";
  const tanH = curved ? Math.tan(geom.width_mm / (2 * geom.radius_mm)) : 0;
  for (let i = 0; i < layers.length; i++) {
    const bottom = i < bounds.length ? bounds[i] : top + 6;
    const thickPx = (bottom - top) * px;
    if (thickPx >= 13) {
      const zMid = (top + bottom) / 2;
      // The screen's left edge at that depth (a sector widens with depth).
      const vGuess = vOfDepth(geom, zMid, 0);
      const edge = curved ? (vGuess + geom.radius_mm) * tanH : umax;
      const labelU = (map.flip ? 1 : -1) * (edge - 1.5);
      const v = vOfDepth(geom, zMid, labelU);
      ctx.fillText(layers[i].kind, map.x(labelU) + 2, map.y(v));
    }
    top = bottom;
    if (i >= bounds.length) break;
  }
  ctx.restore();
}
