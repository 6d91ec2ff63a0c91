// Screenshots of the page for a person to look at (run on demand):
//   node tests/bench/screenshots.mjs [out-dir]
// Writes wide (1280x800) and narrow (800x1000) views, light and dark, a view
// with a bad entry, the export and share menus, a refused link, the wiki view,
// the colour panel and the single offline file opened from disk, and prints any console error
// the page logged.
import { mkdirSync } from "node:fs";
import { join } from "node:path";
import { pathToFileURL } from "node:url";
import { startBrowser, openPage, DIST } from "../lib/harness.mjs";

const out = process.argv[2] ?? "target/screenshots";
mkdirSync(out, { recursive: true });
const env = await startBrowser();
try {
  const shots = [
    ["wide-light", { width: 1280, height: 800 }],
    ["wide-dark", { width: 1280, height: 800, colorScheme: "dark" }],
    ["narrow-light", { width: 800, height: 1000 }],
    ["narrow-dark", { width: 800, height: 1000, colorScheme: "dark" }],
  ];
  for (const [name, opts] of shots) {
    const { page, context, log } = await openPage(env, opts);
    // Put the crosshair on the CD plot so the readout shows.
    const box = await page.locator(".plot[data-plot=cd] .canvas-box").boundingBox();
    await page.mouse.move(box.x + box.width * 0.45, box.y + box.height * 0.5);
    await page.screenshot({ path: join(out, `${name}.png`) });
    // A sign-convention note open (it must wrap inside the window).
    await page.hover('.plot[data-plot="ord"] .hint');
    await page.screenshot({ path: join(out, `${name}-note.png`) });
    await page.mouse.move(0, 0);
    if (name === "wide-light") {
      await page.screenshot({ path: join(out, `${name}-full.png`), fullPage: true });
      await page.fill("#band-1-width", "-5");
      await page.mouse.move(0, 0);
      await page.screenshot({ path: join(out, "bad-entry.png") });
    }
    if (name === "wide-light") {
      await page.mouse.move(0, 0);
      await page.fill("#band-1-width", "3200");
      await page.click("#export-menu summary");
      await page.screenshot({ path: join(out, "export-menu.png") });
      await page.click("#share-menu summary");
      await page.screenshot({ path: join(out, "share-menu.png") });
      await page.click("#help-menu summary");
      await page.screenshot({ path: join(out, "help.png") });
      await page.click("#share-menu summary");
      const link = await page.inputValue("#link-text");
      await page.keyboard.press("Escape");
      // The same model with a damaged link: the message, the model kept.
      await page.evaluate(() => (location.hash = "c1.eNodjDELgzAQhf-KvDmE00y9sejg4lCKS"));
      await page.waitForSelector("#notice:not([hidden])");
      await page.screenshot({ path: join(out, "bad-link.png") });
      // The wiki view of the CD plot, at a typical iframe size.
      const wiki = await openPage(env, { width: 640, height: 400, path: `/${link.slice(link.indexOf("#"))}&show=cd` });
      await wiki.page.screenshot({ path: join(out, "wiki-cd.png") });
      await wiki.context.close();
    }
    // The colour panel open, scrolled into view (after its side view is drawn).
    await page.click("#colour-details summary");
    await page.waitForSelector("#colour-side[data-drawn]", { state: "attached", timeout: 10000 });
    await page.locator("#colour").evaluate((n) => n.scrollIntoView({ block: "end" }));
    await page.screenshot({ path: join(out, `${name}-colour.png`) });
    if (log.errors.length) console.log(`${name}: console errors:\n  ${log.errors.join("\n  ")}`);
    if (log.foreign.length) console.log(`${name}: foreign requests: ${log.foreign.join(", ")}`);
    await context.close();
  }
  // The single offline file, opened from disk.
  const context = await env.browser.newContext({ viewport: { width: 1280, height: 800 } });
  const page = await context.newPage();
  const requests = [];
  page.on("request", (r) => requests.push(r.url().slice(0, 60)));
  await page.goto(pathToFileURL(join(DIST, "chiroptic.html")).href);
  await page.waitForSelector("html[data-ready=true]", { state: "attached", timeout: 20000 });
  await page.screenshot({ path: join(out, "single-file.png") });
  console.log(`single file: requests ${JSON.stringify(requests)}`);
  await context.close();
  console.log(`screenshots in ${out}/`);
} finally {
  await env.close();
}
