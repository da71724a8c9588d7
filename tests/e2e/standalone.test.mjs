// The self-contained dist/slicewise.html works from file:// with the network blocked.

import { test, before, after } from "node:test";
import assert from "node:assert/strict";
import { pathToFileURL } from "node:url";
import { launch, STANDALONE, setControl, readout } from "./helpers.mjs";

let browser;
before(async () => {
  browser = await launch();
});
after(async () => {
  await browser?.close();
});

test("standalone page from file:// with the network blocked", async () => {
  const context = await browser.newContext({ viewport: { width: 1366, height: 768 } });
  await context.setOffline(true);
  const blocked = [];
  await context.route("**/*", (route) => {
    const u = route.request().url();
    if (u.startsWith("file:") || u.startsWith("data:")) return route.continue();
    blocked.push(u);
    return route.abort();
  });
  const page = await context.newPage();
  const errors = [];
  page.on("pageerror", (e) => errors.push(String(e)));
  page.on("console", (m) => m.type() === "error" && errors.push(m.text()));
  await page.goto(pathToFileURL(STANDALONE).href);
  await page.waitForFunction(() => document.body.dataset.ready === "true", null, { timeout: 30000 });
  await setControl(page, "scene.demo", "shaft-dot-past-nerve.scene.json");
  assert.equal(await readout(page, "needle.signature"), "shaft-dot");
  await setControl(page, "needle.inserted_mm", 10);
  assert.notEqual(await readout(page, "needle.signature"), "shaft-dot");
  assert.deepEqual(blocked, [], "no request left the file");
  assert.deepEqual(errors, []);
  await context.close();
});
