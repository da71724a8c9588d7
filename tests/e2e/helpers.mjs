// Shared helpers for the end-to-end suite: launch Debian's Chromium headless through
// playwright-core, open the page, watch the console and the network, drive controls through
// their data-control hooks and read readouts through data-readout.

import { chromium } from "playwright-core";
import { spawnSync } from "node:child_process";
import { mkdirSync } from "node:fs";
import path from "node:path";

export const URL_ = process.env.SLICEWISE_URL;
export const STANDALONE = process.env.SLICEWISE_STANDALONE;
export const CLI = process.env.SLICEWISE_CLI;
export const ROOT = process.env.SLICEWISE_ROOT;
export const ARTEFACTS = process.env.SLICEWISE_ARTEFACTS ?? "artefacts";
mkdirSync(ARTEFACTS, { recursive: true });

if (!URL_ || !CLI || !ROOT) {
  throw new Error("run the end-to-end suite through `cargo xtask test` (it sets SLICEWISE_URL, SLICEWISE_CLI, SLICEWISE_ROOT)");
}

export async function launch() {
  return chromium.launch({
    executablePath: process.env.SLICEWISE_CHROMIUM ?? "/usr/bin/chromium",
    headless: true,
    args: [
      "--no-sandbox",
      "--disable-gpu",
      "--no-first-run",
      "--disable-background-networking",
      "--disable-component-update",
      "--disable-sync",
      "--disable-dev-shm-usage",
    ],
  });
}

/// Open the page in a fresh context; collect console errors, page errors and requests to other hosts.
export async function openPage(browser, { width = 1366, height = 768, url = URL_ } = {}) {
  const context = await browser.newContext({ viewport: { width, height }, acceptDownloads: true });
  const page = await context.newPage();
  const problems = { console: [], foreign: [] };
  page.on("console", (m) => {
    if (m.type() === "error") problems.console.push(m.text());
  });
  page.on("pageerror", (e) => problems.console.push(String(e)));
  const own = url.startsWith("file:") ? null : new URL(url).host;
  page.on("request", (r) => {
    const u = r.url();
    if (u.startsWith("data:") || u.startsWith("blob:") || u.startsWith("file:")) return;
    if (own && new URL(u).host === own) return;
    problems.foreign.push(u);
  });
  await page.goto(url);
  await page.waitForFunction(() => document.body.dataset.ready === "true", null, { timeout: 30000 });
  return { context, page, problems };
}

/// Set a scene control through its hook (the number field when there is one) and wait a frame.
export async function setControl(page, pathName, value) {
  await page.evaluate(
    ({ pathName, value }) => {
      const els = [...document.querySelectorAll(`[data-control="${pathName}"]`)];
      if (els.length === 0) throw new Error(`no control ${pathName}`);
      const el = els.find((e) => e.type === "number") ?? els[0];
      if (el.type === "checkbox") el.checked = Boolean(value);
      else el.value = String(value);
      el.dispatchEvent(new Event("input", { bubbles: true }));
      el.dispatchEvent(new Event("change", { bubbles: true }));
    },
    { pathName, value },
  );
  await nextFrames(page, 2);
}

export async function nextFrames(page, n = 1) {
  await page.evaluate(async (n) => {
    for (let i = 0; i < n; i++) await new Promise((r) => requestAnimationFrame(() => r()));
  }, n);
}

/// The raw value of a readout (its data-value attribute).
export async function readout(page, pathName) {
  return page.getAttribute(`[data-readout="${pathName}"]`, "data-value");
}

export async function readoutText(page, pathName) {
  return (await page.textContent(`[data-readout="${pathName}"]`))?.trim() ?? "";
}

/// Ask the command-line tool for the section of a scene file, with optional --set overrides.
export function cliSection(sceneFile, sets = {}) {
  const args = ["section", path.join(ROOT, "scenes-demo", sceneFile)];
  for (const [k, v] of Object.entries(sets)) args.push("--set", `${k}=${v}`);
  const r = spawnSync(CLI, args, { encoding: "utf8" });
  if (r.status !== 0) throw new Error(`slicewise ${args.join(" ")}: ${r.stderr}`);
  return JSON.parse(r.stdout);
}

export function demoFiles() {
  const r = spawnSync("ls", [path.join(ROOT, "scenes-demo")], { encoding: "utf8" });
  return r.stdout.split("\n").filter((f) => f.endsWith(".scene.json")).sort();
}

export function quantile(values, q) {
  const v = [...values].sort((a, b) => a - b);
  if (v.length === 0) return NaN;
  const i = Math.min(v.length - 1, Math.max(0, Math.round(q * (v.length - 1))));
  return v[i];
}

/// Drag a slider through many values, one per animation frame, and return the page's own
/// per-update work (compute + draw, ms) as recorded in window.slicewise.perf.
export async function dragTimings(page, control, from, to, steps) {
  return page.evaluate(
    async ({ control, from, to, steps }) => {
      const el = document.querySelector(`input[type=range][data-control="${control}"]`);
      if (!el) throw new Error(`no slider ${control}`);
      window.slicewise.perf.length = 0;
      for (let i = 0; i <= steps; i++) {
        el.value = String(from + ((to - from) * i) / steps);
        el.dispatchEvent(new Event("input", { bubbles: true }));
        await new Promise((r) => requestAnimationFrame(() => r()));
      }
      await new Promise((r) => requestAnimationFrame(() => requestAnimationFrame(() => r())));
      return window.slicewise.perf.map((p) => ({ work: p.compute_ms + p.draw_ms, total: p.total_ms, echo: p.echo_ms ?? 0 }));
    },
    { control, from, to, steps },
  );
}
