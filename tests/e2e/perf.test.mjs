// Per-update cost while a slider is dragged, measured in the page with performance.now() and
// written to tests/artefacts/perf.json (printed by `cargo xtask bench`; no timing assertions).

import { test, before, after } from "node:test";
import assert from "node:assert/strict";
import { writeFileSync } from "node:fs";
import path from "node:path";
import { launch, openPage, setControl, dragTimings, quantile, ARTEFACTS } from "./helpers.mjs";

let browser;
before(async () => {
  browser = await launch();
});
after(async () => {
  await browser?.close();
});

test("slider drag timings are recorded", async () => {
  const { context, page } = await openPage(browser, { width: 1366, height: 768 });
  await setControl(page, "scene.demo", "forearm-out-of-plane.scene.json");
  const samples = await dragTimings(page, "probe.pose.tilt_deg", -15, 15, 240);
  assert.ok(samples.length >= 100, `only ${samples.length} updates recorded`);
  const work = samples.map((s) => s.work);
  const result = { viewport: "1366x768", updates: work.length, median_ms: quantile(work, 0.5), p95_ms: quantile(work, 0.95) };
  writeFileSync(path.join(ARTEFACTS, "perf.json"), JSON.stringify(result, null, 2));
  await context.close();
});
