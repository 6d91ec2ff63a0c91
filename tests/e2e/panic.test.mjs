// A panic inside the wasm core kills the module. The page must notice, say
// so, and offer to reload the last good model without losing it. The trigger
// exists only in the test build of the module (cargo feature panic-trigger,
// built by build.sh test into target/page-panic); the shipped page has none,
// which the last test checks.
import { test } from "node:test";
import assert from "node:assert/strict";

const PANIC_DIST = process.env.CHIROPTIC_PANIC_DIST;
const SHIPPED_DIST = process.env.CHIROPTIC_DIST;
// The harness serves CHIROPTIC_DIST: this file serves the test build.
if (PANIC_DIST) process.env.CHIROPTIC_DIST = PANIC_DIST;
const { browserTests, openPage } = await import("../lib/harness.mjs");
const { enter } = await import("../lib/page.mjs");

const env = browserTests();
const docOf = (page) => page.evaluate(() => window.chiroptic.document());

test("after a panic in the core the page says so and reloads the last good model", async () => {
  assert.ok(PANIC_DIST, "CHIROPTIC_PANIC_DIST names the test build of the page (build.sh test makes it)");
  const { page, context, log } = await openPage(env);
  try {
    await enter(page, "#band-0-r", "12.5");
    await page.waitForFunction(() => window.chiroptic.document().bands[0].rotatory_strength_1e40_cgs === 12.5);
    const model = await docOf(page);
    assert.equal(await page.evaluate(() => typeof window.chiroptic.panicForTests), "function");
    await page.evaluate(() => window.chiroptic.panicForTests());
    await page.waitForSelector("#fatal:not([hidden]) #fatal-reload");
    const text = await page.textContent("#fatal");
    assert.match(text, /stopped on an internal error/, text);
    assert.match(text, /last good model is kept/, text);
    // The core's own report of the panic, and only that, reached the console.
    assert.ok(log.errors.length >= 1 && log.errors.every((e) => /internal error|panic|unreachable/i.test(e)), log.errors.join(" | "));
    log.errors.length = 0;
    // Edits after the panic do not reach the dead core and break nothing.
    await page.focus("#band-0-r");
    await page.keyboard.type("3");
    await Promise.all([page.waitForNavigation(), page.click("#fatal-reload")]);
    await page.waitForSelector("html[data-ready=true]", { state: "attached" });
    assert.deepEqual(await docOf(page), model, "the model of before the panic is back");
    assert.equal(await page.isVisible("#fatal"), false);
    // And the reloaded page computes again.
    await enter(page, "#band-0-r", "4");
    await page.waitForFunction(() => window.chiroptic.document().bands[0].rotatory_strength_1e40_cgs === 4);
    log.errors.length = 0; // the dead page's errors before the reload, if any
  } finally {
    await context.close();
  }
});

test("the shipped page has no panic trigger", async () => {
  const { readFileSync } = await import("node:fs");
  const { join } = await import("node:path");
  assert.ok(SHIPPED_DIST, "CHIROPTIC_DIST names the shipped page");
  const glue = readFileSync(join(SHIPPED_DIST, "pkg", "chiroptic.js"), "utf8");
  assert.doesNotMatch(glue, /panic_for_tests/);
  const testGlue = readFileSync(join(PANIC_DIST, "pkg", "chiroptic.js"), "utf8");
  assert.match(testGlue, /panic_for_tests/, "the test build has it (so the check above can fail)");
});
