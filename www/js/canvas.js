// Canvas helpers shared by the views: a crisp backing store for the device pixel ratio, and
// text with a dark rim that reads over any background.

export const FONT = "system-ui, -apple-system, 'Segoe UI', Roboto, sans-serif";

/** Size the backing store to w × h CSS pixels at `dpr` and return a context in CSS pixels. */
export function setupCanvas(canvas, w, h, dpr) {
  const W = Math.max(1, Math.round(w * dpr));
  const H = Math.max(1, Math.round(h * dpr));
  if (canvas.width !== W || canvas.height !== H) {
    canvas.width = W;
    canvas.height = H;
  }
  const ctx = canvas.getContext("2d");
  ctx.setTransform(dpr, 0, 0, dpr, 0, 0);
  return ctx;
}

/** Text with a dark rim so it reads over anything. */
export function rimmedText(ctx, text, x, y, colour, align = "left", size = 11, rim = "rgba(0,0,0,0.8)") {
  ctx.font = `${size}px ${FONT}`;
  ctx.textAlign = align;
  ctx.textBaseline = "middle";
  ctx.lineJoin = "round";
  ctx.lineWidth = 3;
  ctx.strokeStyle = rim;
  ctx.strokeText(text, x, y);
  ctx.fillStyle = colour;
  ctx.fillText(text, x, y);
}
