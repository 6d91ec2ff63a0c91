// Browser timing script (run on demand, not a test):
//   node tests/bench/coupled.mjs [--rounds N]
// Opens the invented helix demo (fixtures/demo/helix.json: 20 chromophores x
// 2 transitions, DeVoe's coupled response) in the page on 2000 points, then
// times, for N edits of the concentration, the core's update in the frame
// after the edit (document validated, spectra evaluated with the coupled
// system, all plots redrawn). The same document without its system is timed in the same run,
// so the difference is the coupled response in the page. Prints medians.
import { readFileSync } from "node:fs";
import { startBrowser, openPage, DEMO } from "../lib/harness.mjs";
import { join, dirname } from "node:path";
import { arg, median } from "../lib/stats.mjs";

const rounds = arg("--rounds", 40);

const helix = JSON.parse(readFileSync(join(dirname(DEMO), "helix.json"), "utf8"));
const bare = { ...helix, systems: undefined };

async function time(env, doc, label) {
  const { page, log } = await openPage(env, { width: 1280, height: 800 });
  await page.setInputFiles("#file-input", { name: "model.json", mimeType: "application/json", buffer: Buffer.from(JSON.stringify(doc)) });
  await page.waitForFunction(() => document.getElementById("conc").value !== "");
  await page.fill("#points", "2000");
  await page.press("#points", "Enter");
  const times = await page.evaluate(async (rounds) => {
    const input = document.getElementById("conc");
    const out = [];
    const nextFrame = () => new Promise((ok) => requestAnimationFrame(() => ok()));
    for (let i = 0; i < rounds; i++) {
      await nextFrame();
      input.value = String(1e-5 * (1 + (i % 5) / 10));
      // The page applies the change in the next animation frame; the core's
      // update there (validate, evaluate, draw) is what is timed.
      const updated = new Promise((ok) => document.addEventListener("chiroptic:updated", (e) => ok(e.detail), { once: true }));
      input.dispatchEvent(new Event("input", { bubbles: true }));
      const detail = await updated;
      if (!detail.ok) throw new Error("an update failed during the timing");
      out.push(detail.ms);
    }
    return out;
  }, rounds);
  const handler = times;
  if (log.errors.length) console.log(`console errors: ${log.errors.join(" | ")}`);
  console.log(`${label}: the core's update median ${median(handler).toFixed(2)} ms, min ${Math.min(...handler).toFixed(2)} ms (${rounds} edits)`);
  await page.close();
  return median(handler);
}

const env = await startBrowser();
try {
  const with_ = await time(env, helix, "helix 20 x 2 on 2000 points");
  const without = await time(env, bare, "the same document without its system");
  console.log(`coupled response in the page: about ${(with_ - without).toFixed(2)} ms per edit`);
} finally {
  await env.close();
}
