// `cargo xtask bench` runs this: drag sliders in headless Chromium and print the page's
// per-update cost (median and 95th percentile, ms) at 1366×768 and 1920×1080, and time the wasm
// echo renderer at 256², 512² and 1024² against the native figures xtask passes in.

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
      const geometry = s.map((x) => x.work - x.echo);
      console.log(
        `page update at ${w}x${h}, dragging ${control} (${demo}): median ${quantile(work, 0.5).toFixed(2)} ms, ` +
          `p95 ${quantile(work, 0.95).toFixed(2)} ms over ${work.length} updates with the image (target: within one frame, 16.7 ms); ` +
          `geometry and drawing alone median ${quantile(geometry, 0.5).toFixed(2)} ms, p95 ${quantile(geometry, 0.95).toFixed(2)} ms (target: median <= 4 ms)`,
      );
    }
    await context.close();
  }

  // The echo renderer alone, in wasm, on the linear demo the native benchmark uses.
  const native = process.env.SLICEWISE_NATIVE_ECHO_MS ? JSON.parse(process.env.SLICEWISE_NATIVE_ECHO_MS) : {};
  const { context, page } = await openPage(browser, { width: 1366, height: 768 });
  await setControl(page, "scene.demo", "inplane-past-vessel.scene.json");
  for (const n of [256, 512, 1024]) {
    const ms = await page.evaluate(async (n) => window.slicewise.benchEcho(n, n, n >= 1024 ? 9 : 21), n);
    const nat = native[String(n)];
    const ratio = nat ? ` — native ${nat.toFixed(2)} ms, wasm/native ${(ms / nat).toFixed(2)}` : "";
    console.log(`echo frame ${n}x${n} in wasm (headless Chromium): median ${ms.toFixed(2)} ms${ratio}`);
  }
  await context.close();
} finally {
  await browser.close();
}
