// The wiki view (`#<link>&show=<plot>`) shows one plot filling its frame,
// with no controls, redrawn when the frame changes size; the Share panel
// copies an iframe snippet that opens exactly that view.
import { test } from "node:test";
import assert from "node:assert/strict";
import { browserTests, openPage, canvasDigest } from "../lib/harness.mjs";
import { pageLink } from "../lib/page.mjs";

const env = browserTests();

/** Visible things a person could operate, and the visible canvases. */
async function visibleParts(page) {
  return page.evaluate(() => {
    const shown = (el) => el.checkVisibility() && el.getBoundingClientRect().width > 0;
    const controls = [...document.querySelectorAll("button, input, select, textarea, summary, a[href], [tabindex]:not([tabindex='-1'])")]
      .filter(shown)
      .map((el) => el.outerHTML.slice(0, 60));
    const canvases = [...document.querySelectorAll("canvas")].filter(shown).map((c) => c.id || c.className);
    return { controls, canvases };
  });
}

async function demoLink() {
  const { page, context } = await openPage(env);
  try {
    return (await pageLink(page)).slice(env.origin.length);
  } finally {
    await context.close();
  }
}

test("the wiki view shows one plot filling the frame and no controls", async () => {
  const link = await demoLink();
  const { page, context, log } = await openPage(env, { width: 640, height: 400, path: `${link}&show=ord` });
  try {
    const parts = await visibleParts(page);
    assert.deepEqual(parts.controls, [], "no controls");
    assert.deepEqual(parts.canvases, ["plot-ord", "overlay"], "the ORD plot (and its pointer overlay) only");
    const box = await page.locator('.plot[data-plot="ord"] .canvas-box').boundingBox();
    assert.deepEqual([box.x, box.y, box.width, box.height], [0, 0, 640, 400], "the plot fills the frame");
    let d = await canvasDigest(page, "plot-ord");
    assert.deepEqual([d.width, d.height], [640, 400]);
    assert.ok(d.inked > 0.02 * d.width * d.height, `${d.inked} drawn pixels`);
    // The key names the traces, since the band list is not there.
    const text = await page.evaluate(() => window.chiroptic.drawnText("ord"));
    assert.ok(text.includes("sum") && text.includes("n→π* 300"), `key in ${JSON.stringify(text)}`);

    // A smaller frame: the plot follows it.
    const before = d.hash;
    await page.setViewportSize({ width: 420, height: 260 });
    await page.waitForFunction(() => document.getElementById("plot-ord").width === 420);
    await page.waitForTimeout(100);
    d = await canvasDigest(page, "plot-ord");
    assert.deepEqual([d.width, d.height], [420, 260]);
    assert.notEqual(d.hash, before);
    assert.ok(d.inked > 0.02 * d.width * d.height);
    // Nothing is saved from a wiki frame: it must not overwrite the person's own model.
    assert.equal(await page.evaluate(() => localStorage.getItem("chiroptic.autosave")), null);
    assert.deepEqual(log.errors, []);
  } finally {
    await context.close();
  }
});

test("a wiki view with a bad link or plot name says so, and nothing else", async () => {
  const link = await demoLink();
  for (const [path, pattern] of [
    [`${link}&show=pie`, /unknown plot “pie”/],
    [`/#c1.AAAA&show=cd`, /This plot cannot be shown: the link is/],
    [`/#&show=cd`, /holds no share link/],
  ]) {
    const { page, context, log } = await openPage(env, { width: 500, height: 300, path });
    try {
      assert.match(await page.textContent("#notice-text"), pattern, path.slice(-30));
      assert.deepEqual((await visibleParts(page)).controls, [], "no controls");
      assert.deepEqual(log.errors, []);
    } finally {
      await context.close();
    }
  }
});

test("the embed control copies an iframe snippet that opens the wiki view", async () => {
  const { page, context } = await openPage(env);
  let snippet;
  try {
    await page.uncheck("#show-cd");
    await page.click("#share-menu summary");
    // The menu offers a shown plot first (set as the panel opens: its toggle event).
    await page.waitForFunction(() => document.getElementById("embed-plot").value === "ord");
    await page.selectOption("#embed-plot", "abs");
    await page.fill("#embed-width", "500");
    await page.fill("#embed-height", "320");
    await page.click("#copy-embed");
    snippet = await page.inputValue("#embed-text");
    // The copy answers asynchronously (the clipboard, or its 1.5 s time-out).
    await page.waitForFunction(() => document.getElementById("embed-status").textContent !== "", null, { timeout: 5000 });
    assert.match(await page.textContent("#embed-status"), /Copied|press Ctrl\+C/);
  } finally {
    await context.close();
  }
  const m = /^<iframe src="([^"]+)" width="500" height="320" style="border:0" loading="lazy" title="Absorption: [^"]*"><\/iframe>$/.exec(snippet);
  assert.ok(m, snippet);
  const src = m[1];
  assert.ok(src.startsWith(`${env.origin}/#c1.`) && src.endsWith("&show=abs"), src.slice(0, 50));
  const frame = await openPage(env, { width: 500, height: 320, path: src.slice(env.origin.length) });
  try {
    assert.deepEqual((await visibleParts(frame.page)).canvases, ["plot-abs", "overlay"]);
    const d = await canvasDigest(frame.page, "plot-abs");
    assert.ok(d.inked > 0.02 * d.width * d.height);
  } finally {
    await frame.context.close();
  }
});
