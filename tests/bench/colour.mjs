// Browser timing script for the colour panel (run on demand, not a test):
//   node tests/bench/colour.mjs [--rounds N]
// With the panel open on the demo, edits a rotatory strength N times and
// records what the panel reports for each (chiroptic:colour events): the
// core calls for the end-on swatch with the 181-angle strip, and for the
// side view; then moves β N times (the swatch alone). Also times the input
// handler (plots redrawn) with the panel open and closed, since the panel
// must not slow the plots. Targets (issue 12): swatch + strip < 5 ms, side
// view < 50 ms.
import { startBrowser, openPage } from "../lib/harness.mjs";
import { arg, median, pct } from "../lib/stats.mjs";

const rounds = arg("--rounds", 40);
const say = (what, xs) => console.log(`${what}: median ${median(xs).toFixed(2)} ms, p90 ${pct(xs, 0.9).toFixed(2)} ms, min ${Math.min(...xs).toFixed(2)} ms (${xs.length})`);

/** In the page: N edits of band 1's R; handler time and the colour panel's reports. */
const editRounds = async (rounds) => {
  const input = document.getElementById("band-0-r");
  const out = { handler: [], endOn: [], side: [] };
  const reports = [];
  document.addEventListener("chiroptic:colour", (e) => reports.push(e.detail));
  const settle = () => new Promise((ok) => setTimeout(ok, 150));
  for (let i = 0; i < rounds; i++) {
    await settle();
    reports.length = 0;
    input.value = String(5 + (i % 7));
    const t0 = performance.now();
    input.dispatchEvent(new Event("input", { bubbles: true }));
    out.handler.push(performance.now() - t0);
    await settle();
    for (const r of reports) (r.part === "side" ? out.side : out.endOn).push(r.ms);
  }
  return out;
};

const env = await startBrowser();
try {
  const { page, log } = await openPage(env, { width: 1280, height: 800 });
  const closed = await page.evaluate(editRounds, rounds);
  await page.click("#colour-details summary");
  await page.waitForSelector("#colour-side[data-drawn]", { state: "attached", timeout: 10000 });
  const open = await page.evaluate(editRounds, rounds);
  const beta = await page.evaluate(async (rounds) => {
    const input = document.getElementById("colour-analyser");
    const ms = [];
    document.addEventListener("chiroptic:colour", (e) => e.detail.part === "end-on" && ms.push(e.detail.ms));
    for (let i = 0; i < rounds; i++) {
      input.value = String(3 * i);
      input.dispatchEvent(new Event("input", { bubbles: true }));
      await new Promise((ok) => requestAnimationFrame(() => requestAnimationFrame(ok)));
    }
    return ms;
  }, rounds);
  const size = await page.$eval("#colour-side", (c) => `${c.width} × ${c.height}`);
  console.log(`demo model, ${rounds} rounds, side view ${size} pixels`);
  say("swatch + 181-angle strip (target < 5 ms)", open.endOn);
  say("side view (target < 50 ms)", open.side);
  say("swatch alone, on a change of β", beta);
  say("input handler, plots redrawn, panel closed", closed.handler);
  say("input handler, plots redrawn, panel open", open.handler);
  if (log.errors.length) console.log(`console errors: ${log.errors.join(" | ")}`);
} finally {
  await env.close();
}
