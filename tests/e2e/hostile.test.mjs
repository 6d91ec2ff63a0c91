// The hostile-input corpus (fixtures/hostile/manifest.json, made by
// make_hostile.py; the links of fixtures/bad-links run in badlinks.test.mjs)
// opened in the page as a person does: model files through the file chooser,
// data files dropped on the plots. Each refused file gives one message naming
// it and leaves the model on screen as it was; nothing from a file reaches the
// DOM as markup; the page answers the next edit afterwards. (Transition lists
// have no page reader yet: the CLI runs them, crate/tests/hostile.rs.)
import { test } from "node:test";
import assert from "node:assert/strict";
import { readFileSync } from "node:fs";
import { join } from "node:path";
import { browserTests, openPage, ROOT } from "../lib/harness.mjs";
import { enter, plotHashes, dropBytes } from "../lib/page.mjs";

const env = browserTests();
const HOSTILE = join(ROOT, "fixtures", "hostile");
const manifest = JSON.parse(readFileSync(join(HOSTILE, "manifest.json"), "utf8"));
const docOf = (page) => page.evaluate(() => window.chiroptic.document());

/** Markup a hostile file might have injected: counted before and after. */
const markupCount = (page) => page.evaluate(() => document.querySelectorAll("script, img, iframe, object, embed, b").length);

/** After the corpus: no markup from a file in the page, no console error, and the next edit is drawn. */
async function assertUnharmed(page, markup, log) {
  assert.equal(await markupCount(page), markup, "no markup from a file reached the page");
  const plots = await plotHashes(page);
  await enter(page, "#band-0-r", "7.25");
  assert.notDeepEqual(await plotHashes(page), plots, "the edit is drawn");
  assert.deepEqual(log.errors, []);
}

test("every hostile model file is refused with one message naming it, or opened cleanly, and the model stays", async () => {
  const { page, context, log } = await openPage(env);
  try {
    const markup = await markupCount(page);
    let kept = await docOf(page);
    let refused = 0;
    for (const e of manifest.entries.filter((e) => e.verb === "eval" || e.verb === "render")) {
      const buffer = readFileSync(join(HOSTILE, "files", e.file));
      await page.setInputFiles("#file-input", { name: e.file, mimeType: "application/json", buffer });
      const escaped = e.file.replace(/[.]/g, "\\.");
      await page.waitForFunction((f) => new RegExp(f).test(document.getElementById("status").textContent), escaped);
      const status = await page.textContent("#status");
      const readable = e.expect === "" && e.verb === "eval";
      if (readable) {
        assert.match(status, /Opened/, `${e.file} (${e.why}): ${status}`);
        kept = await docOf(page);
      } else {
        assert.match(status, /unchanged/, `${e.file} (${e.why}): ${status}`);
        assert.ok(status.length < 600 || e.file === "doc-unknown-field.json", `${e.file}: one short message (${status.length})`);
        assert.deepEqual(await docOf(page), kept, `${e.file}: the model stays`);
        refused++;
      }
      // Clear the status so that the next file's message is seen arriving.
      await page.evaluate(() => (document.getElementById("status").textContent = ""));
    }
    assert.ok(refused >= 25, `${refused} refused`);
    await assertUnharmed(page, markup, log);
  } finally {
    await context.close();
  }
});

test("every hostile data file dropped on the plots gets one message naming it, and model and data stay", async () => {
  const { page, context, log } = await openPage(env);
  try {
    const markup = await markupCount(page);
    const kept = await docOf(page);
    // Where the CLI asks for a flag (--x-unit), the page asks in its column
    // picker instead: the file is not refused, and cancelling adds nothing.
    const asks = new Set(["jdx-unknown-units.jdx"]);
    for (const e of manifest.entries.filter((e) => e.verb === "import" && e.expect !== "")) {
      await page.evaluate(() => document.getElementById("notice-close").click());
      await dropBytes(page, e.file, readFileSync(join(HOSTILE, "files", e.file)));
      if (asks.has(e.file)) {
        await page.waitForSelector("#data-picker[open]");
        await page.keyboard.press("Escape");
        await page.waitForSelector("#data-picker:not([open])", { state: "attached" });
        assert.deepEqual(await docOf(page), kept, `${e.file}: nothing added`);
        continue;
      }
      await page.waitForSelector("#notice:not([hidden])", { timeout: 5000 }).catch(() => {
        throw new Error(`${e.file} (${e.why}): no message shown`);
      });
      const notice = await page.textContent("#notice-text");
      assert.ok(notice.includes(e.file), `${e.file}: the message names the file: ${notice}`);
      assert.equal(await page.$$eval("#notice:not([hidden])", (n) => n.length), 1, `${e.file}: one message`);
      assert.deepEqual(await docOf(page), kept, `${e.file}: model and data unchanged`);
    }
    await assertUnharmed(page, markup, log);
  } finally {
    await context.close();
  }
});
