// Screenshots of the page for a person to look at (run on demand):
//   node tests/bench/screenshots.mjs [out-dir]
// Writes wide (1280x800) and narrow (800x1000) views, light and dark, plus a
// view with a bad entry, and prints any console error the page logged.
import { mkdirSync } from "node:fs";
import { join } from "node:path";
import { startBrowser, openPage } from "../lib/harness.mjs";

const out = process.argv[2] ?? "target/screenshots";
mkdirSync(out, { recursive: true });
const env = await startBrowser();
try {
  const shots = [
    ["wide-light", { width: 1280, height: 800 }],
    ["wide-dark", { width: 1280, height: 800, colorScheme: "dark" }],
    ["narrow-light", { width: 800, height: 1000 }],
  ];
  for (const [name, opts] of shots) {
    const { page, context, log } = await openPage(env, opts);
    // Put the crosshair on the CD plot so the readout shows.
    const box = await page.locator(".plot[data-plot=cd] .canvas-box").boundingBox();
    await page.mouse.move(box.x + box.width * 0.45, box.y + box.height * 0.5);
    await page.screenshot({ path: join(out, `${name}.png`) });
    if (name === "wide-light") {
      await page.screenshot({ path: join(out, `${name}-full.png`), fullPage: true });
      await page.fill("#band-1-width", "-5");
      await page.mouse.move(0, 0);
      await page.screenshot({ path: join(out, "bad-entry.png") });
    }
    if (log.errors.length) console.log(`${name}: console errors:\n  ${log.errors.join("\n  ")}`);
    if (log.foreign.length) console.log(`${name}: foreign requests: ${log.foreign.join(", ")}`);
    await context.close();
  }
  console.log(`screenshots in ${out}/`);
} finally {
  await env.close();
}
