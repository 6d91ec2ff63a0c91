// Changing a band's rotatory strength changes the CD, ORD and index plots and
// the lamp-line table, and leaves the absorption alone; the page's table
// matches the native command line (`chiroptic lines`) on the same document.
import { test } from "node:test";
import assert from "node:assert/strict";
import { readFileSync } from "node:fs";
import { browserTests, openPage, DEMO } from "../lib/harness.mjs";
import { linesTable, cliLines, docFile, assertLinesMatch, plotHashes, enter, savedModel } from "../lib/page.mjs";

const env = browserTests();

test("the demo's lamp lines equal the CLI's", async () => {
  const { page, context, log } = await openPage(env);
  try {
    assertLinesMatch(await linesTable(page), cliLines(DEMO));
    assert.deepEqual(log.errors, []);
  } finally {
    await context.close();
  }
});

test("a new rotatory strength redraws CD, ORD and Δn, and the lines follow the CLI", async () => {
  const { page, context, log } = await openPage(env);
  try {
    // Focus first: the band being edited is drawn emphasised.
    await page.focus("#band-0-r");
    const before = await plotHashes(page);
    const linesBefore = await linesTable(page);
    const done = await enter(page, "#band-0-r", "20");
    assert.equal(done?.ok, true, "the update succeeded");
    const after = await plotHashes(page);
    assert.notEqual(after.cd, before.cd, "CD plot redrawn");
    assert.notEqual(after.ord, before.ord, "ORD plot redrawn");
    assert.notEqual(after.index, before.index, "Δn on the index plot redrawn");
    // R does not enter ε (physics.md: ε comes from the dipole strengths only).
    assert.equal(after.abs, before.abs, "absorption plot unchanged");

    const lines = await linesTable(page);
    assert.notEqual(lines[1].rotation_deg, linesBefore[1].rotation_deg, "Na D rotation changed");
    const demo = JSON.parse(readFileSync(DEMO, "utf8"));
    demo.bands[0].rotatory_strength_1e40_cgs = 20;
    assertLinesMatch(lines, cliLines(docFile(demo)));

    // The page's own saved document gives the CLI the same numbers too.
    const saved = await savedModel(page);
    assert.equal(saved.bands[0].rotatory_strength_1e40_cgs, 20);
    assertLinesMatch(lines, cliLines(docFile(saved)));
    assert.deepEqual(log.errors, []);
  } finally {
    await context.close();
  }
});

test("the plots follow every keystroke", async () => {
  const { page, context } = await openPage(env);
  try {
    await page.click("#band-1-r", { clickCount: 3 });
    await page.evaluate(() => {
      window.__updates = 0;
      document.addEventListener("chiroptic:updated", () => window.__updates++);
    });
    // At a person's pace (a key every 60 ms, several frames apart): "-" is
    // not yet a number; "-3" and "-35" each redraw, in the frame after the key.
    await page.keyboard.type("-35", { delay: 60 });
    const frames = () => page.evaluate(() => new Promise((ok) => requestAnimationFrame(() => requestAnimationFrame(ok))));
    await frames();
    const count = await page.evaluate(() => window.__updates);
    assert.equal(count, 2, `updates while typing: ${count}`);
    // Keys faster than the frames are drawn once per frame, the last one included.
    await page.keyboard.press("Control+A");
    await page.evaluate(() => (window.__updates = 0));
    await page.keyboard.type("-123456");
    await frames();
    const fast = await page.evaluate(() => window.__updates);
    assert.ok(fast >= 1 && fast <= 6, `updates for six fast keys: ${fast}`);
    assert.equal((await savedModel(page)).bands[1].rotatory_strength_1e40_cgs, -123456);
    await page.keyboard.press("Control+A");
    await page.keyboard.type("-35", { delay: 60 });
    await frames();
    const saved = await savedModel(page);
    assert.equal(saved.bands[1].rotatory_strength_1e40_cgs, -35);
  } finally {
    await context.close();
  }
});

test("adding, duplicating, reordering, renaming and deleting bands match the CLI", async () => {
  const { page, context, log } = await openPage(env);
  try {
    const demo = JSON.parse(readFileSync(DEMO, "utf8"));
    // Duplicate band 1: its contribution counts twice.
    await page.click('button[aria-label^="Duplicate band 1"]');
    assert.equal(await page.locator("tr.band-row").count(), 4);
    let saved = await savedModel(page);
    assert.equal(saved.bands[1].name, `${demo.bands[0].name} copy`);
    assertLinesMatch(await linesTable(page), cliLines(docFile(saved)));
    const doubled = structuredClone(demo);
    doubled.bands.splice(1, 0, { ...demo.bands[0], name: "twin" });
    assertLinesMatch(await linesTable(page), cliLines(docFile(doubled)));

    // Move the copy to the end, rename it, then delete band 1.
    await page.click('button[aria-label^="Move band 2"][title="Move down"]');
    await page.click('button[aria-label^="Move band 3"][title="Move down"]');
    saved = await savedModel(page);
    assert.deepEqual(saved.bands.map((b) => b.name), [demo.bands[0].name, demo.bands[1].name, demo.bands[2].name, `${demo.bands[0].name} copy`]);
    await enter(page, "#band-3-name", "renamed");
    await page.click('button[aria-label^="Delete band 1"]');
    saved = await savedModel(page);
    assert.deepEqual(saved.bands.map((b) => b.name), [demo.bands[1].name, demo.bands[2].name, "renamed"]);
    assertLinesMatch(await linesTable(page), cliLines(docFile(saved)));

    // A new band appears with its own colour swatch and a row of controls.
    await page.click("#add-band");
    assert.equal(await page.locator("tr.band-row").count(), 4);
    const colours = await page.$$eval("tr.band-row", (rows) => rows.map((r) => r.style.getPropertyValue("--band")));
    assert.equal(new Set(colours).size, 4, `distinct band colours: ${colours}`);
    saved = await savedModel(page);
    assertLinesMatch(await linesTable(page), cliLines(docFile(saved)));
    assert.deepEqual(log.errors, []);
  } finally {
    await context.close();
  }
});
