// The page loads cleanly, offline-safe, and shows for every demo scene the signature the
// command-line tool computes for the same scene.

import { test, before, after } from "node:test";
import assert from "node:assert/strict";
import { launch, openPage, setControl, readout, readoutText, cliSection, demoFiles } from "./helpers.mjs";

let browser;
before(async () => {
  browser = await launch();
});
after(async () => {
  await browser?.close();
});

test("loads with no console error and no request to another host", async () => {
  const { context, page, problems } = await openPage(browser);
  assert.equal(await page.locator("[data-readout='error']").count(), 1);
  assert.equal(await readout(page, "error"), "", "no error shown at start");
  // The caution is visible, not tucked away.
  const caution = page.getByText(/not a guide for a real needle/i).first();
  assert.ok(await caution.isVisible(), "the caution is visible");
  assert.deepEqual(problems.console, []);
  assert.deepEqual(problems.foreign, []);
  await context.close();
});

test("every demo scene loads and shows the signature the CLI computes", async () => {
  const { context, page, problems } = await openPage(browser);
  const files = demoFiles();
  assert.ok(files.length >= 4);
  for (const file of files) {
    await setControl(page, "scene.demo", file);
    const cli = cliSection(file);
    assert.equal(await readout(page, "needle.signature"), cli.needle.signature, file);
    assert.equal(await readout(page, "needle.tip_in_slab"), String(cli.needle.tip_in_slab), file);
    const hidden = Number(await readout(page, "needle.hidden_length_mm"));
    assert.ok(Math.abs(hidden - cli.needle.hidden_length_mm) < 1e-9, `${file}: hidden ${hidden} vs ${cli.needle.hidden_length_mm}`);
    const offset = Number(await readout(page, "needle.tip_offset_mm"));
    assert.ok(Math.abs(offset - cli.needle.tip_offset_mm) < 1e-9, file);
    assert.ok((await readoutText(page, "needle.signature")).length > 3, `${file}: the signature is said in words`);
    assert.ok((await readoutText(page, "scene.title")).length > 3, `${file}: the title is shown`);
  }
  assert.deepEqual(problems.console, []);
  assert.deepEqual(problems.foreign, []);
  await context.close();
});

test("shaft-dot words say how far the tip is past the slab", async () => {
  const { context, page } = await openPage(browser);
  await setControl(page, "scene.demo", "shaft-dot-past-nerve.scene.json");
  const cli = cliSection("shaft-dot-past-nerve.scene.json");
  assert.equal(cli.needle.signature, "shaft-dot");
  const words = await readoutText(page, "needle.signature");
  const hidden = cli.needle.hidden_length_mm.toFixed(1);
  const offset = Math.abs(cli.needle.tip_offset_mm).toFixed(1);
  assert.ok(words.includes(hidden) || words.includes(offset), `"${words}" gives the distance (${hidden} or ${offset} mm)`);
  assert.match(words.toLowerCase(), /shaft/);
  await context.close();
});
