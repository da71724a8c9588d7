// `cargo xtask bench` runs this: drag sliders in headless Chromium and print the page's
// per-update cost (median and 95th percentile, ms), at 1366×768 and 1920×1080.

import { launch, openPage, setControl, dragTimings, quantile } from "./helpers.mjs";

const browser = await launch();
try {
  for (const [w, h] of [[1366, 768], [1920, 1080]]) {
    const { context, page } = await openPage(browser, { width: w, height: h });
    for (const [demo, control, from, to] of [
      ["forearm-out-of-plane.scene.json", "probe.pose.tilt_deg", -15, 15],
      ["deep-curved-target.scene.json", "needle.inserted_mm", 20, 90],
    ]) {
      await setControl(page, "scene.demo", demo);
      await dragTimings(page, control, from, to, 30); // warm up
      const s = await dragTimings(page, control, from, to, 300);
      const work = s.map((x) => x.work);
      console.log(
        `page update at ${w}x${h}, dragging ${control} (${demo}): median ${quantile(work, 0.5).toFixed(2)} ms, ` +
          `p95 ${quantile(work, 0.95).toFixed(2)} ms over ${work.length} updates (target: median <= 4 ms)`,
      );
    }
    await context.close();
  }
} finally {
  await browser.close();
}
