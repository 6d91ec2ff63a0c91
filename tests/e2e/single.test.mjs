// `./build.sh single` writes dist/chiroptic.html, the page in one file. Opened
// from disk (file://) it starts and draws with no server and no request
// beyond the file itself; a share link and the wiki view work there too.
// Every request the browser makes is recorded; anything but the file is
// refused, and a Content-Security-Policy violation would show as a console
// error.
import { test } from "node:test";
import assert from "node:assert/strict";
import { existsSync } from "node:fs";
import { join } from "node:path";
import { pathToFileURL } from "node:url";
import { browserTests, canvasDigest, DIST } from "../lib/harness.mjs";
import { pageLink } from "../lib/page.mjs";

const env = browserTests();

const FILE = join(DIST, "chiroptic.html");
const fileUrl = pathToFileURL(FILE).href;

/** Opens the single file with every request watched; only the file itself may load. */
async function openFile(suffix = "", viewport = { width: 1280, height: 800 }) {
  const context = await env.browser.newContext({ viewport, acceptDownloads: true });
  const page = await context.newPage();
  const log = { errors: [], requests: [], refused: [] };
  page.on("console", (m) => m.type() === "error" && log.errors.push(m.text()));
  page.on("pageerror", (e) => log.errors.push(`page error: ${e.message}`));
  page.on("request", (r) => log.requests.push(r.url()));
  await context.route("**/*", (route) => {
    const url = route.request().url();
    if (url.split("#")[0] === fileUrl) return route.continue();
    log.refused.push(url.slice(0, 80));
    return route.abort();
  });
  env.logs.push({ errors: log.errors, foreign: log.refused });
  await page.goto(fileUrl + suffix);
  await page.waitForSelector("html[data-ready=true]", { state: "attached", timeout: 20000 });
  return { page, context, log };
}

test("the single file renders from file:// with no request made", async () => {
  assert.ok(existsSync(FILE), `${FILE} exists (./build.sh single)`);
  const { page, context, log } = await openFile();
  try {
    assert.equal(await page.isVisible("#fatal"), false);
    for (const key of ["cd", "ord", "abs", "index"]) {
      const d = await canvasDigest(page, `plot-${key}`);
      assert.ok(d.inked > 0.02 * d.width * d.height, `${key} plot drawn (${d.inked} pixels)`);
    }
    assert.equal(await page.locator("tr.band-row").count(), 3, "the demo's bands");
    // No stylesheet, script or wasm fetched: the one request is the file.
    assert.deepEqual(log.requests.map((u) => u.split("#")[0]), [fileUrl]);
    assert.deepEqual(log.refused, []);
    assert.deepEqual(log.errors, []);
    assert.notEqual(await page.$eval("body", (b) => getComputedStyle(b).fontFamily), "", "the inline stylesheet applies");
  } finally {
    await context.close();
  }
});

test("the single file opens share links and the wiki view", async () => {
  const first = await openFile();
  let link;
  try {
    await first.page.fill("#doc-title", "INVENTED offline model");
    link = await pageLink(first.page);
    assert.ok(link.startsWith(`${fileUrl}#c1.`), link.slice(0, 60));
  } finally {
    await first.context.close();
  }
  const fragment = link.slice(link.indexOf("#"));
  const opened = await openFile(fragment);
  try {
    assert.equal(await opened.page.inputValue("#doc-title"), "INVENTED offline model");
    assert.deepEqual(opened.log.requests.map((u) => u.split("#")[0]), [fileUrl]);
    assert.deepEqual(opened.log.errors, []);
  } finally {
    await opened.context.close();
  }
  const wiki = await openFile(`${fragment}&show=cd`, { width: 600, height: 360 });
  try {
    const d = await canvasDigest(wiki.page, "plot-cd");
    assert.deepEqual([d.width, d.height], [600, 360]);
    assert.ok(d.inked > 0.02 * d.width * d.height);
    assert.deepEqual(wiki.log.requests.map((u) => u.split("#")[0]), [fileUrl]);
    assert.deepEqual(wiki.log.errors, []);
  } finally {
    await wiki.context.close();
  }
});

test("16: the embed code of the single file says it points at this computer", async () => {
  const { page, context } = await openFile();
  try {
    await page.click("#share-menu summary");
    assert.equal(await page.isVisible("#embed-file-warning"), true);
    assert.match(await page.textContent("#embed-file-warning"), /file on this computer/);
    assert.match(await page.inputValue("#embed-text"), /^<iframe src="file:\/\//);
    await page.click("#copy-embed");
    await page.waitForFunction(() => document.getElementById("embed-status").textContent !== "", null, { timeout: 5000 });
    // Copied or not (the headless clipboard may refuse), the warning stays in view.
    assert.equal(await page.isVisible("#embed-file-warning"), true);
  } finally {
    await context.close();
  }
});
