// Screenshots of the page at 1366×768, 1920×1080 and a narrow window, written as artefacts
// (tests/artefacts/); the layout keeps the slice view, the readouts and the caution in view.

import { test, before, after } from "node:test";
import assert from "node:assert/strict";
import path from "node:path";
import { launch, openPage, setControl, ARTEFACTS } from "./helpers.mjs";

let browser;
before(async () => {
  browser = await launch();
});
after(async () => {
  await browser?.close();
});

for (const [w, h] of [[1366, 768], [1920, 1080], [420, 900]]) {
  test(`screenshot at ${w}×${h}`, async () => {
    const { context, page, problems } = await openPage(browser, { width: w, height: h });
    for (const demo of ["shaft-dot-past-nerve.scene.json", "inplane-past-vessel.scene.json", "deep-curved-target.scene.json"]) {
      await setControl(page, "scene.demo", demo);
      await page.screenshot({ path: path.join(ARTEFACTS, `page-${w}x${h}-${demo.replace(".scene.json", "")}.png`) });
    }
    if (w >= 1366) {
      // At desktop sizes the key things are on screen without scrolling.
      for (const sel of ["[data-readout='needle.signature']", "canvas"]) {
        const box = await page.locator(sel).first().boundingBox();
        assert.ok(box && box.y + Math.min(box.height, 40) <= h, `${sel} visible at ${w}×${h}`);
      }
    }
    const overflow = await page.evaluate(() => document.documentElement.scrollWidth - document.documentElement.clientWidth);
    assert.ok(overflow <= 1, `no sideways scrolling at ${w}×${h} (${overflow}px)`);
    assert.deepEqual(problems.console, []);
    await context.close();
  });
}
