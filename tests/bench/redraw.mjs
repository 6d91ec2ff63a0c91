// Browser timing script (run on demand, not a test):
//   node tests/bench/redraw.mjs [--rounds N]
// Builds a 10-band model on 2000 points through the page's own controls, then
// times, for N edits of a rotatory strength, the span from dispatching the
// input event to the end of the page's handler (which queues the change for
// the next animation frame), to that frame, and the core's update there
// (document validated, spectra evaluated, all four plots redrawn). Prints
// medians and the wasm file size.
import { statSync } from "node:fs";
import { join } from "node:path";
import { startBrowser, openPage, DIST } from "../lib/harness.mjs";
import { arg, median, pct } from "../lib/stats.mjs";

const rounds = arg("--rounds", 60);


const env = await startBrowser();
try {
  const { page, log } = await openPage(env, { width: 1280, height: 800 });
  // Ten bands: the demo's three plus seven added with the "Add band" button.
  while ((await page.locator("tr.band-row").count()) < 10) await page.click("#add-band");
  await page.fill("#points", "2000");
  const bands = await page.locator("tr.band-row").count();

  const result = await page.evaluate(async (rounds) => {
    const input = document.getElementById("band-0-r");
    const handler = [];
    const frame = [];
    const work = [];
    const nextFrame = () => new Promise((ok) => requestAnimationFrame(() => ok(performance.now())));
    for (let i = 0; i < rounds; i++) {
      await nextFrame();
      // A person's keystroke lands anywhere in a frame, not at its start.
      await new Promise((ok) => setTimeout(ok, (i * 7) % 15));
      input.value = String(5 + (i % 7));
      let ok = false;
      const listener = (e) => {
        ok = e.detail.ok;
        work.push(e.detail.ms);
      };
      document.addEventListener("chiroptic:updated", listener, { once: true });
      const t0 = performance.now();
      input.dispatchEvent(new Event("input", { bubbles: true }));
      const t1 = performance.now();
      const t2 = await nextFrame();
      if (!ok) throw new Error("an update failed during the benchmark");
      handler.push(t1 - t0);
      frame.push(t2 - t0);
    }
    const points = Number(document.getElementById("points").value);
    return { handler, frame, work, points };
  }, rounds);

  const wasm = statSync(join(DIST, "pkg", "chiroptic_bg.wasm")).size;
  console.log(`bands: ${bands}, points: ${result.points}, rounds: ${rounds}`);
  console.log(
    `input event -> four plots redrawn (handler): median ${median(result.handler).toFixed(2)} ms, ` +
      `p90 ${pct(result.handler, 0.9).toFixed(2)} ms, min ${Math.min(...result.handler).toFixed(2)} ms`,
  );
  console.log(`input event -> next animation frame: median ${median(result.frame).toFixed(2)} ms`);
  console.log(`the core's update (validate, evaluate, draw) in that frame: median ${median(result.work).toFixed(2)} ms`);
  console.log(`wasm: ${wasm} bytes (${(wasm / 1024).toFixed(0)} KiB) before compression`);
  if (log.errors.length) console.log(`console errors: ${log.errors.join(" | ")}`);
} finally {
  await env.close();
}
