// Moving the probe's tilt changes the page's signature exactly as `slicewise section` predicts
// for the same scene and tilt.

import { test, before, after } from "node:test";
import assert from "node:assert/strict";
import { launch, openPage, setControl, readout, cliSection } from "./helpers.mjs";

let browser;
before(async () => {
  browser = await launch();
});
after(async () => {
  await browser?.close();
});

test("tilt sweep matches the CLI, including the capture of the tip", async () => {
  const file = "shaft-dot-past-nerve.scene.json";
  const { context, page, problems } = await openPage(browser);
  await setControl(page, "scene.demo", file);
  const seen = [];
  for (let i = 0; i <= 40; i++) {
    const tilt = Math.round((-2 + i * 0.5) * 100) / 100;
    await setControl(page, "probe.pose.tilt_deg", tilt);
    const cli = cliSection(file, { "probe.pose.tilt_deg": tilt });
    const page_sig = await readout(page, "needle.signature");
    assert.equal(page_sig, cli.needle.signature, `tilt ${tilt}`);
    const hidden = Number(await readout(page, "needle.hidden_length_mm"));
    assert.ok(Math.abs(hidden - cli.needle.hidden_length_mm) < 1e-9, `tilt ${tilt}: hidden ${hidden} vs ${cli.needle.hidden_length_mm}`);
    seen.push(cli.needle.signature);
  }
  // The sweep must pass from the shaft dot to the tip, as the CLI says it does.
  const first = seen.indexOf("shaft-dot");
  const tip = seen.findIndex((s, i) => i > first && (s === "tip-double-dot" || s === "line-with-tip"));
  assert.ok(first >= 0 && tip > first, `sweep ${seen.join(",")}`);
  assert.deepEqual(problems.console, []);
  await context.close();
});
