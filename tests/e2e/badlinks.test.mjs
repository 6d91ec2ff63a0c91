// Every bad or hostile link of fixtures/bad-links/corpus.json (made by its
// make_corpus.py: truncated, wrong version, not base64, a decompression
// bomb, out-of-range values, a 1 MB fragment ...) shows one message and
// leaves the model on screen as it was, whether it arrives while the page
// runs (hashchange) or with the first load (then the autosave, else the
// demo, is shown).
import { test } from "node:test";
import assert from "node:assert/strict";
import { readFileSync } from "node:fs";
import { join } from "node:path";
import { browserTests, openPage, ROOT } from "../lib/harness.mjs";
import { enter, plotHashes, savedModel } from "../lib/page.mjs";

const env = browserTests();

const corpus = JSON.parse(readFileSync(join(ROOT, "fixtures", "bad-links", "corpus.json"), "utf8"));

/** The link text of an entry (a few are generated: the 1 MB one). */
function linkOf(entry) {
  if (entry.link !== undefined) return entry.link;
  const g = entry.generate;
  return g.prefix + g.repeat.repeat(g.count);
}

/** Closes the message (with its own button) so that the next one is seen arriving. */
const dismiss = (page) => page.evaluate(() => document.getElementById("notice-close").click());

/** What the address bar holds after '#': the page sees only this. */
const fragmentOf = (link) => (link.includes("#") ? link.slice(link.lastIndexOf("#") + 1) : link);

test("each bad link in the corpus shows a message and the model stays", async () => {
  assert.ok(corpus.bad.length >= 30, `corpus has ${corpus.bad.length} bad links`);
  const { page, context, log } = await openPage(env);
  try {
    // A model of the person's own, not the demo, so that "stays" means something.
    await enter(page, "#band-0-r", "12.5");
    await page.focus("#add-band");
    const model = await savedModel(page);
    const plots = await plotHashes(page);
    let shown = 0;
    for (const entry of corpus.bad) {
      const fragment = fragmentOf(linkOf(entry));
      await dismiss(page);
      await page.evaluate((f) => (location.hash = f), fragment);
      if (fragment === "") {
        // An empty fragment is an address with no link (as on a plain visit):
        // nothing to refuse, and nothing changes.
        await page.waitForTimeout(50);
        assert.equal(await page.isVisible("#notice"), false, `${entry.name}: no message for an empty fragment`);
      } else {
        await page.waitForSelector("#notice:not([hidden])", { timeout: 5000 }).catch(() => {
          throw new Error(`${entry.name} (${entry.why}): no message shown`);
        });
        const text = await page.textContent("#notice-text");
        assert.match(text, /^This link cannot be opened: .+\. Your model is unchanged\.$/, `${entry.name}: ${text}`);
        assert.ok(text.length < 400, `${entry.name}: one short message (${text.length} characters)`);
        shown++;
      }
      // (Read through the page's hook: headless Chromium drops every eleventh
      // scripted download of a page, so "Save model" serves once, below.)
      assert.deepEqual(await page.evaluate(() => window.chiroptic.document()), model, `${entry.name}: the model stays`);
    }
    assert.deepEqual(await savedModel(page), model, "the saved model is the one before the links");
    assert.ok(shown >= corpus.bad.length - 2, `${shown} messages`);
    assert.deepEqual(await plotHashes(page), plots, "the plots stay");
    // The address is the model's own link again.
    await page.waitForFunction(() => /^#c1\.[A-Za-z0-9_-]+$/.test(location.hash));
    assert.deepEqual(log.errors, []);
  } finally {
    await context.close();
  }
});

test("messages name what is wrong", async () => {
  const { page, context } = await openPage(env);
  try {
    const expect = {
      "future-version": /version 2 is not supported/,
      bomb: /expands to more than \d+ bytes/,
      "one-megabyte": /characters long; the limit is/,
      "negative-width": /band 1 \(fwhm_cm1\): .*positive/,
      "cut-in-half": /cut short|damaged/,
      "unknown-plot": /view\.plots\[\d\]: unknown name "pie"/,
    };
    for (const [name, pattern] of Object.entries(expect)) {
      const entry = corpus.bad.find((e) => e.name === name);
      assert.ok(entry, `corpus entry ${name}`);
      await dismiss(page);
      await page.evaluate((f) => (location.hash = f), fragmentOf(linkOf(entry)));
      await page.waitForSelector("#notice:not([hidden])");
      assert.match(await page.textContent("#notice-text"), pattern, name);
    }
  } finally {
    await context.close();
  }
});

test("a bad link on first load shows the autosaved model, else the demo", async () => {
  const demo = JSON.parse(readFileSync(join(ROOT, "fixtures", "demo", "demo.json"), "utf8"));
  const bomb = fragmentOf(linkOf(corpus.bad.find((e) => e.name === "bomb")));
  const negative = fragmentOf(linkOf(corpus.bad.find((e) => e.name === "negative-width")));

  // A fresh browser profile: no autosave, so the demo.
  const first = await openPage(env, { path: `/#${bomb}` });
  try {
    assert.match(await first.page.textContent("#notice-text"), /cannot be opened: .*Showing the invented demo instead\./);
    assert.equal((await savedModel(first.page)).title, demo.title);
    assert.equal(await first.page.locator("tr.band-row").count(), demo.bands.length);
    assert.deepEqual(first.log.errors, []);
  } finally {
    await first.context.close();
  }

  // With a model autosaved in this browser, that one.
  const { page, context, log } = await openPage(env);
  try {
    await page.fill("#doc-title", "INVENTED autosaved model");
    await enter(page, "#band-1-r", "-30");
    const mine = await savedModel(page);
    await page.waitForFunction(() => JSON.parse(localStorage.getItem("chiroptic.autosave") ?? "{}").title === "INVENTED autosaved model");
    await page.goto(`${env.origin}/?again#${negative}`);
    await page.waitForSelector("html[data-ready=true]", { state: "attached" });
    assert.match(await page.textContent("#notice-text"), /cannot be opened: band 1 .*Showing your autosaved model instead\./);
    assert.deepEqual(await savedModel(page), mine);
    assert.deepEqual(log.errors, []);
  } finally {
    await context.close();
  }
});
