// The screen settings, the capture card, the walking plots and the rehearsal keys, driven
// through their hooks and checked against the command-line tool on the same scene.

import { test, before, after } from "node:test";
import assert from "node:assert/strict";
import { spawnSync } from "node:child_process";
import { readFileSync } from "node:fs";
import path from "node:path";
import { launch, openPage, setControl, readout, nextFrames, CLI, ROOT, ARTEFACTS } from "./helpers.mjs";

let browser;
before(async () => {
  browser = await launch();
});
after(async () => {
  await browser?.close();
});

function cli(verb, file, extra = [], sets = {}) {
  const args = [verb, path.join(ROOT, "scenes-demo", file), ...extra];
  for (const [k, v] of Object.entries(sets)) args.push("--set", `${k}=${v}`);
  const r = spawnSync(CLI, args, { encoding: "utf8" });
  if (r.status !== 0) throw new Error(`slicewise ${args.join(" ")}: ${r.stderr}`);
  return JSON.parse(r.stdout);
}

function cliFingerprint(file, w, h, sets) {
  const out = path.join(ARTEFACTS, `cli-tools-${file.replace(".scene.json", "")}-${w}x${h}.png`);
  return cli("render", file, ["--out", out, "--width", String(w), "--height", String(h)], sets).fingerprint_fnv1a64;
}

async function onScreen(page) {
  // Both hooks are written in the same task; read them together.
  return page.evaluate(() => ({
    size: document.querySelector("[data-readout='echo.size']").dataset.value,
    print: document.querySelector("[data-readout='echo.fingerprint']").dataset.value,
  }));
}

test("display settings reach the image; a bad value names the field and keeps the scene", async () => {
  const file = "inplane-past-vessel.scene.json";
  const { context, page, problems } = await openPage(browser);
  await setControl(page, "scene.demo", file);
  await setControl(page, "display.gain_db", 6);
  await setControl(page, "display.tgc_db[5]", 9);
  await setControl(page, "display.grey_levels", 16);
  let shown = await onScreen(page);
  const [w, h] = shown.size.split("x").map(Number);
  // The scene's own time-gain bands, with band 5 changed as the page did.
  const tgc = JSON.parse(readFileSync(path.join(ROOT, "scenes-demo", file), "utf8")).display?.tgc_db ?? [0, 0, 0, 0, 0, 0, 0, 0];
  tgc[5] = 9;
  const sets = { "display.gain_db": 6, "display.tgc_db": JSON.stringify(tgc), "display.grey_levels": 16 };
  assert.equal(shown.print, cliFingerprint(file, w, h, sets), "the page shows the CLI's image for the same settings");

  await setControl(page, "display.tgc_db[2]", 45);
  assert.match(await readout(page, "error"), /display\.tgc_db\[2\].*-30 to 30/);
  // The error strip may take room from the screen (a new size), but the scene is unchanged.
  shown = await onScreen(page);
  assert.equal(shown.print, cliFingerprint(file, ...shown.size.split("x").map(Number), sets), "a refused value leaves the scene as it was");
  await setControl(page, "display.dynamic_range_db", 500);
  assert.match(await readout(page, "error"), /display\.dynamic_range_db/);

  // Mirror and overlay change the display only, never the rendered frame.
  await setControl(page, "view.flip", true);
  await setControl(page, "view.overlay", false);
  assert.equal((await onScreen(page)).print, shown.print);
  assert.equal(await page.locator("canvas[data-layer='overlay']").evaluate((c) => getComputedStyle(c).visibility), "hidden");

  await setControl(page, "display.doppler.mode", "power");
  await setControl(page, "display.doppler.scale_cm_s", 12);
  assert.ok(Number(await readout(page, "echo.frame_rate.duplex_hz")) > 0);
  shown = await onScreen(page);
  assert.equal(shown.print, cliFingerprint(file, ...shown.size.split("x").map(Number),
    { ...sets, "display.doppler": '{"mode":"power","scale_cm_s":12}' }));
  assert.deepEqual(problems.console, []);
  await context.close();
});

test("capture readouts match the CLI and the buttons put the tip in the slab", async () => {
  const file = "shaft-dot-past-nerve.scene.json";
  const { context, page, problems } = await openPage(browser);
  await setControl(page, "scene.demo", file);
  const cap = cli("capture", file);
  const centre = Number(await readout(page, "capture.tilt.centre_deg"));
  assert.ok(Math.abs(centre - cap.tilt.centre_deg) < 1e-6, `${centre} vs ${cap.tilt.centre_deg}`);
  const win = (await readout(page, "capture.tilt.window_deg")).split(",").map(Number);
  assert.ok(Math.abs(win[0] - cap.tilt.window_deg[0]) < 1e-6 && Math.abs(win[1] - cap.tilt.window_deg[1]) < 1e-6);
  assert.ok(Math.abs(Number(await readout(page, "capture.slide.centre_mm")) - cap.slide.centre_mm) < 1e-6);

  assert.equal(await readout(page, "needle.tip_in_slab"), "false");
  await page.click("[data-control='capture.apply_tilt']");
  await nextFrames(page, 2);
  assert.equal(await readout(page, "needle.tip_in_slab"), "true", "tilting onto the tip captures it");
  await setControl(page, "probe.pose.tilt_deg", 0);
  await page.click("[data-control='capture.apply_slide']");
  await nextFrames(page, 2);
  assert.equal(await readout(page, "needle.tip_in_slab"), "true", "sliding onto the tip captures it");
  assert.deepEqual(problems.console, []);
  await context.close();
});

test("the walking schedule matches the CLI's, and a bad advance names its field", async () => {
  const file = "forearm-out-of-plane.scene.json";
  const { context, page, problems } = await openPage(browser);
  await setControl(page, "scene.demo", file);
  const from = 15.3; // the scene file's inserted length: the default advance starts there
  const w = cli("walk", file, ["--from-mm", String(from), "--to-mm", String(from + 15), "--step-mm", "0.5"]);
  assert.equal(Number(await readout(page, "walk.retilts")), w.retilts);
  assert.ok(Math.abs(Number(await readout(page, "walk.blind_advance_mm")) - w.blind_advance_mm) < 1e-9);

  await setControl(page, "walk.step_mm", 1);
  await page.waitForTimeout(300);
  const w1 = cli("walk", file, ["--from-mm", String(from), "--to-mm", String(from + 15), "--step-mm", "1"]);
  assert.equal(Number(await readout(page, "walk.retilts")), w1.retilts);
  await setControl(page, "walk.to_mm", 999);
  await page.waitForTimeout(300);
  assert.match(await readout(page, "error"), /walk\.to_mm/);
  assert.deepEqual(problems.console, []);
  await context.close();
});

test("rehearsal by keyboard: calls by key, no withdrawing, overlay locked, the scene restored", async () => {
  const file = "shaft-dot-past-nerve.scene.json";
  const { context, page, problems } = await openPage(browser);
  await setControl(page, "scene.demo", file);
  const before = Number(await page.inputValue("input[type=number][data-control='needle.inserted_mm']"));
  await page.focus("[data-control='rehearsal.start']");
  await page.keyboard.press("Enter");
  await nextFrames(page, 2);
  assert.equal(await readout(page, "rehearsal.state"), "running");
  assert.equal(await page.locator("canvas[data-layer='overlay']").evaluate((c) => getComputedStyle(c).visibility), "hidden");
  assert.equal(await page.locator("#bench-canvas").isVisible(), false, "no 3D view while rehearsing");
  assert.equal(await page.locator("[data-readout='capture.tilt.centre_deg']").isVisible(), false);
  assert.ok(await page.locator("#slice-stage").isVisible(), "the screen stays");
  for (const key of ["n", "n", "b", "o", "r", "r", "t", "n", "g"]) {
    await page.locator("body").press(key);
    await nextFrames(page, 1);
  }
  assert.equal(await page.locator("canvas[data-layer='overlay']").evaluate((c) => getComputedStyle(c).visibility), "hidden", "O does not lift the overlay");
  const events = await page.evaluate(() => window.slicewise.rehearsal.events);
  assert.equal(events[events.length - 1].declared, "shaft");
  assert.ok(events.some((e) => e.declared === "tip"));
  const last = events[events.length - 1];
  assert.ok(Math.abs(last.inserted_mm - (before + 1.5)) < 1e-9, "three advances of 0.5 mm; B did not withdraw");
  assert.ok(Math.abs(last.pose.tilt_deg - 1) < 1e-9, "the probe moves are logged");

  await page.click("[data-control='rehearsal.stop']");
  await nextFrames(page, 2);
  assert.equal(await readout(page, "rehearsal.state"), "done");
  assert.ok(Number(await readout(page, "rehearsal.score.longest_blind_mm")) >= 0);
  await page.click("[data-control='rehearsal.stop']"); // back to exploring
  await nextFrames(page, 2);
  assert.equal(await readout(page, "rehearsal.state"), "idle");
  assert.equal(Number(await page.inputValue("input[type=number][data-control='needle.inserted_mm']")), before);
  assert.ok(await page.locator("#bench-canvas").isVisible(), "the 3D view is back");
  assert.equal(await readout(page, "needle.signature"), cli("section", file).needle.signature, "the scene is as before");
  assert.deepEqual(problems.console, []);
  await context.close();
});
