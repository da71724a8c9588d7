// The simulated screen in the page is the same image as `slicewise render` computes natively:
// identical bytes (FNV-1a 64 fingerprints) for every demo scene, grey scale and colour.

import { test, before, after } from "node:test";
import assert from "node:assert/strict";
import { spawnSync } from "node:child_process";
import path from "node:path";
import { launch, openPage, setControl, readout, demoFiles, CLI, ROOT, ARTEFACTS } from "./helpers.mjs";

let browser;
before(async () => {
  browser = await launch();
});
after(async () => {
  await browser?.close();
});

function cliFingerprint(file, width, height, sets = {}) {
  const out = path.join(ARTEFACTS, `cli-${file.replace(".scene.json", "")}-${width}x${height}.png`);
  const args = ["render", path.join(ROOT, "scenes-demo", file), "--out", out, "--width", String(width), "--height", String(height)];
  for (const [k, v] of Object.entries(sets)) args.push("--set", `${k}=${v}`);
  const r = spawnSync(CLI, args, { encoding: "utf8" });
  if (r.status !== 0) throw new Error(r.stderr);
  return JSON.parse(r.stdout).fingerprint_fnv1a64;
}

test("wasm in Chromium renders the same bytes as the native CLI", async () => {
  const { context, page, problems } = await openPage(browser);
  for (const file of demoFiles()) {
    await setControl(page, "scene.demo", file);
    const wasm = await page.evaluate(() => window.slicewise.renderFingerprint(256, 192));
    assert.equal(wasm, cliFingerprint(file, 256, 192), `${file} at 256x192`);
    // The frame the page is showing right now, at whatever size the layout gave it.
    const [w, h] = (await readout(page, "echo.size")).split("x").map(Number);
    assert.ok(w >= 16 && h >= 16);
    assert.equal(await readout(page, "echo.fingerprint"), cliFingerprint(file, w, h), `${file} on screen at ${w}x${h}`);
  }
  // Colour Doppler too.
  await setControl(page, "scene.demo", "inplane-past-vessel.scene.json");
  await setControl(page, "display.doppler.mode", "velocity");
  const wasm = await page.evaluate(() => window.slicewise.renderFingerprint(300, 240));
  assert.equal(wasm, cliFingerprint("inplane-past-vessel.scene.json", 300, 240, { "display.doppler.mode": '"velocity"' }));
  assert.ok(Number(await readout(page, "echo.frame_rate.duplex_hz")) > 0, "the duplex frame rate is shown while colour is on");
  assert.ok(
    Number(await readout(page, "echo.frame_rate.duplex_hz")) < Number(await readout(page, "echo.frame_rate.b_mode_hz")),
    "colour costs frame rate",
  );
  assert.deepEqual(problems.console, []);
  await context.close();
});
