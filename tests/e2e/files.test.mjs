// Files: a malformed scene shows a plain error naming the field and keeps the current scene
// (by file input and by drag-and-drop); saving gives back a file the CLI reads.

import { test, before, after } from "node:test";
import assert from "node:assert/strict";
import { readFileSync, writeFileSync } from "node:fs";
import path from "node:path";
import { launch, openPage, setControl, readout, readoutText, nextFrames, ARTEFACTS, CLI } from "./helpers.mjs";
import { spawnSync } from "node:child_process";

let browser;
before(async () => {
  browser = await launch();
});
after(async () => {
  await browser?.close();
});

const BAD = JSON.stringify({
  format: "slicewise-scene",
  version: 1,
  probe: { footprint: { kind: "linear", width_mm: 38 }, frequency_mhz: 12, depth_mm: 1000, elevation: { model: "uniform", thickness_mm: 1 } },
});

test("a malformed file shows an error naming the field and keeps the scene", async () => {
  const { context, page } = await openPage(browser);
  await setControl(page, "scene.demo", "inplane-past-vessel.scene.json");
  const title = await readoutText(page, "scene.title");
  const sig = await readout(page, "needle.signature");
  await page.setInputFiles("[data-control='scene.open']", { name: "broken.scene.json", mimeType: "application/json", buffer: Buffer.from(BAD) });
  await page.waitForFunction(() => document.querySelector("[data-readout='error']").dataset.value !== "");
  const err = await readout(page, "error");
  assert.match(err, /probe\.depth_mm/);
  assert.match(err, /5 to 300/);
  assert.ok(await page.locator("[data-readout='error']").isVisible());
  assert.equal(await readoutText(page, "scene.title"), title, "the current scene stays");
  assert.equal(await readout(page, "needle.signature"), sig);

  // Not JSON at all, dropped onto the page.
  await page.evaluate(() => {
    const dt = new DataTransfer();
    dt.items.add(new File(["this is not a scene"], "notes.txt", { type: "text/plain" }));
    for (const type of ["dragenter", "dragover", "drop"]) {
      document.body.dispatchEvent(new DragEvent(type, { bubbles: true, cancelable: true, dataTransfer: dt }));
    }
  });
  await page.waitForFunction(() => /not valid JSON/.test(document.querySelector("[data-readout='error']").dataset.value));
  assert.equal(await readoutText(page, "scene.title"), title);
  await context.close();
});

test("a good file opens; saving writes a scene the CLI reads back identically", async () => {
  const { context, page } = await openPage(browser);
  const text = readFileSync(path.join(process.env.SLICEWISE_ROOT, "scenes-demo/deep-curved-target.scene.json"));
  await page.setInputFiles("[data-control='scene.open']", { name: "deep.scene.json", mimeType: "application/json", buffer: text });
  await page.waitForFunction(() => /curved/i.test(document.querySelector("[data-readout='scene.title']").textContent));
  assert.equal(await readout(page, "error"), "");
  await setControl(page, "probe.pose.tilt_deg", 3.5);
  const [download] = await Promise.all([page.waitForEvent("download"), page.click("[data-control='scene.save']")]);
  const saved = path.join(ARTEFACTS, "saved.scene.json");
  await download.saveAs(saved);
  const r = spawnSync(CLI, ["section", saved], { encoding: "utf8" });
  assert.equal(r.status, 0, r.stderr);
  const savedScene = JSON.parse(readFileSync(saved, "utf8"));
  assert.equal(savedScene.probe.pose.tilt_deg, 3.5, "the save holds the user's change");
  assert.equal(JSON.parse(r.stdout).needle.signature, await readout(page, "needle.signature"));
  writeFileSync(path.join(ARTEFACTS, "saved.section.json"), r.stdout);
  await nextFrames(page);
  await context.close();
});
