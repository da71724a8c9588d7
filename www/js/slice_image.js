// The slice screen's bottom layer: where a grey-scale simulated image will be drawn.
// Until the echo image exists it paints a plain dark field with faint tissue-layer lines.
// To plug an image in, draw it here (e.g. putImageData from wasm memory, then drawImage
// scaled with map.x/map.y); the overlay and frame layers above stay as they are.

import { COLOURS } from "./palette.js";
import { traceFov } from "./screen_map.js";

/** Where the skin (world z = 0) and a layer boundary z = zb cross the image: v at lateral u. */
function vOfDepth(geom, zb, u) {
  const az = geom.lateral[2];
  const bz = geom.beam[2];
  return (zb - u * az) / bz;
}

export function drawImageLayer(ctx, map, snap, cssWidth, cssHeight) {
  const geom = snap.geometry;
  ctx.fillStyle = COLOURS.screenOut;
  ctx.fillRect(0, 0, cssWidth, cssHeight);

  ctx.save();
  ctx.beginPath();
  traceFov(ctx, map);
  ctx.fillStyle = COLOURS.screenIn;
  ctx.fill();
  ctx.clip();

  const { umin, umax } = map.bounds;
  const u0 = umin - 5;
  const u1 = umax + 5;

  // Above the skin line (possible when the probe is rocked or tilted) is outside the body.
  ctx.beginPath();
  ctx.moveTo(map.x(u0), map.y(vOfDepth(geom, 0, u0)));
  ctx.lineTo(map.x(u1), map.y(vOfDepth(geom, 0, u1)));
  ctx.lineTo(map.x(u1), 0);
  ctx.lineTo(map.x(u0), 0);
  ctx.closePath();
  ctx.fillStyle = COLOURS.air;
  ctx.fill();

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
