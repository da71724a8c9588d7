// A scripted rehearsal: the truth is hidden, the needle advances by key, the probe is tilted
// onto the tip (the CLI's capture solve says where), calls are made, and the page scores it and
// writes the replay plot as a PNG.

import { test, before, after } from "node:test";
import assert from "node:assert/strict";
import { readFileSync, writeFileSync, statSync } from "node:fs";
import path from "node:path";
import { spawnSync } from "node:child_process";
import { launch, openPage, setControl, readout, nextFrames, ARTEFACTS, CLI, ROOT } from "./helpers.mjs";

let browser;
before(async () => {
  browser = await launch();
});
after(async () => {
  await browser?.close();
});

function cliCapture(file, sets) {
  const args = ["capture", path.join(ROOT, "scenes-demo", file)];
  for (const [k, v] of Object.entries(sets)) args.push("--set", `${k}=${v}`);
  const r = spawnSync(CLI, args, { encoding: "utf8" });
  if (r.status !== 0) throw new Error(r.stderr);
  return JSON.parse(r.stdout);
}

async function click(page, control) {
  await page.click(`[data-control="${control}"]`);
  await nextFrames(page, 2);
}

test("scripted rehearsal completes, scores and writes the replay PNG", async () => {
  const file = "forearm-out-of-plane.scene.json";
  const { context, page, problems } = await openPage(browser);
  await setControl(page, "scene.demo", file);
  await click(page, "rehearsal.start");
  assert.equal(await readout(page, "rehearsal.state"), "running");
  // The truth is hidden: no signature or 3D view on show.
  assert.equal(await page.locator("[data-readout='needle.signature']").isVisible(), false, "the signature is hidden");

  const scene = JSON.parse(readFileSync(path.join(ROOT, "scenes-demo", file), "utf8"));
  let inserted = scene.needle.inserted_mm;
  const step = scene.rehearsal?.step_mm ?? 0.5;
  const body = page.locator("body");
  for (let i = 0; i < 8; i++) {
    // Re-centre on the tip with the tilt the CLI computes, through the tilt control.
    const cap = cliCapture(file, { "needle.inserted_mm": inserted });
    if (cap.tilt) await setControl(page, "probe.pose.tilt_deg", Math.round(cap.tilt.centre_deg * 100) / 100);
    if (i % 3 === 0) await click(page, "rehearsal.declare_tip");
    if (i === 7) await click(page, "rehearsal.declare_shaft");
    await body.press("n"); // advance
    await nextFrames(page, 2);
    inserted += step;
  }
  await click(page, "rehearsal.stop");
  await page.waitForFunction(() => document.querySelector("[data-readout='rehearsal.state']").dataset.value === "done");
  const confirmed = Number(await readout(page, "rehearsal.score.confirmed_share"));
  const inView = Number(await readout(page, "rehearsal.score.tip_in_view_share"));
  const falseCalls = Number(await readout(page, "rehearsal.score.false_tip_calls"));
  assert.ok(inView > 0.7, `re-centring on the CLI's capture tilt keeps the tip in view (${inView})`);
  assert.ok(confirmed > 0 && confirmed <= inView + 1e-9);
  assert.equal(falseCalls, 0, "every 'tip' call was made with the tip in the slab");
  assert.ok(Number.isFinite(Number(await readout(page, "rehearsal.score.final_tip_to_target_mm"))));

  const [png] = await Promise.all([page.waitForEvent("download"), page.click("[data-control='rehearsal.export_png']")]);
  const pngPath = path.join(ARTEFACTS, "rehearsal-replay.png");
  await png.saveAs(pngPath);
  const sig = readFileSync(pngPath).subarray(0, 8).toString("hex");
  assert.equal(sig, "89504e470d0a1a0a", "a PNG file");
  assert.ok(statSync(pngPath).size > 2000);
  const [json] = await Promise.all([page.waitForEvent("download"), page.click("[data-control='rehearsal.export_json']")]);
  const jsonPath = path.join(ARTEFACTS, "rehearsal.json");
  await json.saveAs(jsonPath);
  const result = JSON.parse(readFileSync(jsonPath, "utf8"));
  assert.ok(JSON.stringify(result).includes("confirmed_share"));
  await page.screenshot({ path: path.join(ARTEFACTS, "page-1366x768-rehearsal-score.png") });
  writeFileSync(path.join(ARTEFACTS, "rehearsal-score.txt"), `in view ${inView}, confirmed ${confirmed}\n`);
  assert.deepEqual(problems.console, []);
  await context.close();
});
