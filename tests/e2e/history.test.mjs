// Undo and redo step through every edit (buttons, Ctrl/Cmd+Z, Ctrl/Cmd+Shift+Z,
// Ctrl+Y), typing in one box is one edit, and inside a text field Ctrl+Z is
// left to the browser. The model is autosaved in localStorage and comes back
// on reload; an unreadable autosave is reported, set aside and ignored; a
// full storage is reported once and the page goes on.
import { test } from "node:test";
import assert from "node:assert/strict";
import { readFileSync } from "node:fs";
import { browserTests, openPage, DEMO } from "../lib/harness.mjs";
import { enter, plotHashes, savedModel } from "../lib/page.mjs";

const env = browserTests();

const demo = JSON.parse(readFileSync(DEMO, "utf8"));
const docOf = (page) => page.evaluate(() => window.chiroptic.document());

test("undo and redo restore each previous document, by button and by key", async () => {
  const { page, context, log } = await openPage(env);
  try {
    const states = [await docOf(page)];
    const plots0 = await plotHashes(page);
    await enter(page, "#band-0-r", "12");
    states.push(await docOf(page));
    await page.selectOption("#band-1-shape", "gaussian");
    states.push(await docOf(page));
    await page.click("#add-band");
    states.push(await docOf(page));
    await page.selectOption("#axis-unit", "ev");
    states.push(await docOf(page));
    assert.equal(states.at(-1).bands.length, 4);

    for (let i = states.length - 2; i >= 0; i--) {
      await page.click("#undo");
      assert.deepEqual(await docOf(page), states[i], `undo to state ${i}`);
    }
    assert.equal(await page.isDisabled("#undo"), true, "nothing left to undo");
    assert.deepEqual(await plotHashes(page), plots0, "the first plots are back");
    for (let i = 1; i < states.length; i++) {
      await page.click("#redo");
      assert.deepEqual(await docOf(page), states[i], `redo to state ${i}`);
    }
    assert.equal(await page.isDisabled("#redo"), true);

    // Keys, with the focus outside any text field (on a button here).
    await page.focus("#add-band");
    await page.keyboard.press("Control+z");
    assert.deepEqual(await docOf(page), states.at(-2), "Ctrl+Z");
    await page.keyboard.press("Control+z");
    assert.deepEqual(await docOf(page), states.at(-3), "Ctrl+Z again");
    await page.keyboard.press("Control+Shift+Z");
    assert.deepEqual(await docOf(page), states.at(-2), "Ctrl+Shift+Z");
    await page.keyboard.press("Control+y");
    assert.deepEqual(await docOf(page), states.at(-1), "Ctrl+Y");
    await page.keyboard.press("Meta+z");
    assert.deepEqual(await docOf(page), states.at(-2), "Cmd+Z");
    await page.keyboard.press("Meta+Shift+z");
    assert.deepEqual(await docOf(page), states.at(-1), "Cmd+Shift+Z");

    // A new edit after an undo drops the redo branch.
    await page.click("#undo");
    await page.click("#fit-range");
    await enter(page, "#band-2-d", "3");
    assert.equal(await page.isDisabled("#redo"), true);
    assert.deepEqual(log.errors, []);
  } finally {
    await context.close();
  }
});

test("typing in one box is one edit, and Ctrl+Z in a text field is the browser's", async () => {
  const { page, context } = await openPage(env);
  try {
    await page.click("#band-0-r");
    await page.keyboard.press("Control+a");
    await page.keyboard.type("123", { delay: 30 });
    assert.equal((await docOf(page)).bands[0].rotatory_strength_1e40_cgs, 123);
    await page.focus("#add-band");
    await page.click("#undo");
    assert.equal((await docOf(page)).bands[0].rotatory_strength_1e40_cgs, demo.bands[0].rotatory_strength_1e40_cgs, "one undo undoes the typing");
    assert.equal(await page.isDisabled("#undo"), true);

    // In the title field (nothing typed there) Ctrl+Z is not the page's undo.
    await page.click("#redo");
    await page.focus("#doc-title");
    await page.keyboard.press("Control+z");
    assert.equal((await docOf(page)).bands[0].rotatory_strength_1e40_cgs, 123, "the model is not undone");
    assert.equal(await page.isDisabled("#undo"), false);
  } finally {
    await context.close();
  }
});

test("the autosaved model survives a reload", async () => {
  const { page, context, log } = await openPage(env);
  try {
    await page.fill("#doc-title", "INVENTED autosave test");
    await page.selectOption("#center-unit", "cm-1");
    await enter(page, "#band-0-center", "32000");
    await page.uncheck("#show-index");
    const mine = await savedModel(page);
    await page.waitForFunction(() => JSON.parse(localStorage.getItem("chiroptic.autosave") ?? "{}").view?.plots?.length === 3);
    // No link in the address: only the autosave can bring the model back.
    await page.goto(`${env.origin}/`);
    await page.waitForSelector("html[data-ready=true]", { state: "attached" });
    assert.deepEqual(await savedModel(page), mine);
    assert.match(await page.textContent("#status"), /Restored the model autosaved/);
    assert.equal(await page.isVisible('.plot[data-plot="index"]'), false);
    assert.equal(await page.isDisabled("#undo"), true, "a reload starts a new history");
    assert.deepEqual(log.errors, []);
  } finally {
    await context.close();
  }
});

test("a corrupt autosave is reported, set aside and ignored", async () => {
  for (const [what, text, pattern] of [
    ["cut short", '{"chiroptic": 1, "sample": {"concentration_mol', /not valid JSON/],
    ["a negative width", JSON.stringify({ ...demo, bands: [{ ...demo.bands[0], fwhm_cm1: -1 }] }), /band 1 \(fwhm_cm1\): width must be positive/],
    ["not a document", "[1, 2, 3]", /JSON object/],
  ]) {
    const { page, context, log } = await openPage(env);
    try {
      // The page autosaves what it opened a moment after loading: set the
      // corrupt text after that, or the page would overwrite it.
      await page.waitForFunction(() => localStorage.getItem("chiroptic.autosave") !== null);
      await page.evaluate((t) => localStorage.setItem("chiroptic.autosave", t), text);
      await page.goto(`${env.origin}/`);
      await page.waitForSelector("html[data-ready=true]", { state: "attached" });
      const notice = await page.textContent("#notice-text");
      assert.match(notice, /autosaved in this browser could not be read/, what);
      assert.match(notice, pattern, what);
      assert.match(notice, /Showing the invented demo instead/, what);
      assert.equal((await savedModel(page)).title, demo.title, `${what}: the demo opens`);
      assert.equal(await page.evaluate(() => localStorage.getItem("chiroptic.autosave.unreadable")), text, `${what}: kept aside`);
      // The page works on, and autosaves again.
      await enter(page, "#band-0-r", "7");
      await page.waitForFunction(() => JSON.parse(localStorage.getItem("chiroptic.autosave") ?? "{}").bands?.[0]?.rotatory_strength_1e40_cgs === 7);
      assert.deepEqual(log.errors, [], what);
    } finally {
      await context.close();
    }
  }
});

test("a full storage stops autosave with one message and nothing else", async () => {
  const context = await env.browser.newContext({ viewport: { width: 1280, height: 800 }, acceptDownloads: true });
  await context.addInitScript(() => {
    Storage.prototype.setItem = function () {
      throw new DOMException("The quota has been exceeded.", "QuotaExceededError");
    };
  });
  const { page, log } = await openPage(env, { context });
  try {
    await page.waitForSelector("#notice:not([hidden])");
    assert.match(await page.textContent("#notice-text"), /Autosave stopped: this browser's storage for the page is full/);
    const before = await plotHashes(page);
    await enter(page, "#band-0-r", "-4");
    assert.notEqual((await plotHashes(page)).cd, before.cd, "edits still redraw");
    assert.equal((await savedModel(page)).bands[0].rotatory_strength_1e40_cgs, -4);
    assert.deepEqual(log.errors, []);
  } finally {
    await context.close();
  }
});
