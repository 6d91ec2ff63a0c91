// Browser timing script (run on demand, not a test):
//   node tests/bench/states.mjs [--rounds N] [--conformers C] [--transitions T]
// Reads an INVENTED transition list (C conformers × T transitions, default
// 20 × 60, made up here from a seeded generator) into a new, empty model
// through the panel's file chooser, sets the plots' grid to 2000 points, and
// times N edits of the broadening FWHM (typed into its box): the core's
// update in the frame after the edit (validate, broaden every transition,
// evaluate, draw every plot with its sticks), and the time from the edit to
// the next frame after that draw. Then, with an invented measured CD set
// dropped on the plots, N runs of the comparison (shift search over the
// core's ±1 eV), each timed around the core's call by the panel. Prints
// medians and spreads.
import { startBrowser, openPage } from "../lib/harness.mjs";
import { dropBytes } from "../lib/page.mjs";
import { arg, median, pct } from "../lib/stats.mjs";

const rounds = arg("--rounds", 40);
const nConformers = arg("--conformers", 20);
const nTransitions = arg("--transitions", 60);
const POINTS = 2000;

/** A small seeded generator (a linear congruential one), so every run reads the same list. */
function seeded(seed) {
  let s = seed >>> 0;
  return () => ((s = (Math.imul(s, 1664525) + 1013904223) >>> 0) / 2 ** 32);
}

function inventedList() {
  const rand = seeded(11);
  const lines = ["# INVENTED benchmark list: random energies and strengths, no real computation"];
  for (let c = 0; c < nConformers; c++) {
    lines.push(`conformer C${c + 1}, energy ${(rand() * 2.5).toFixed(3)} kcal/mol`, "energy_eV f R_length R_velocity");
    for (let t = 0; t < nTransitions; t++) {
      const ev = 4 + 2.5 * rand();
      const f = 0.001 + 0.2 * rand();
      const r = (rand() - 0.5) * 80;
      lines.push(`${ev.toFixed(4)} ${f.toFixed(4)} ${r.toFixed(2)} ${(r * 0.95).toFixed(2)}`);
    }
  }
  return lines.join("\n") + "\n";
}

/** An INVENTED measured CD (three Gaussians in wavelength) for the comparison. */
function inventedCd() {
  const lines = ["# INVENTED benchmark CD", "wavelength (nm),delta epsilon (M-1 cm-1)"];
  const g = (x, c, w) => Math.exp(-0.5 * ((x - c) / w) ** 2);
  for (let nm = 190; nm <= 330; nm += 0.5) lines.push(`${nm},${(12 * g(nm, 250, 12) - 20 * g(nm, 222, 9) + 8 * g(nm, 200, 6)).toFixed(5)}`);
  return lines.join("\n") + "\n";
}

const summary = (xs) => `median ${median(xs).toFixed(2)} ms (p10 ${pct(xs, 0.1).toFixed(2)}, p90 ${pct(xs, 0.9).toFixed(2)}, min ${Math.min(...xs).toFixed(2)}, max ${Math.max(...xs).toFixed(2)})`;

const env = await startBrowser();
try {
  const { page, log } = await openPage(env, { width: 1280, height: 800 });
  page.on("dialog", (d) => d.accept());
  await page.click("#new-model");
  await page.setInputFiles("#states-file", { name: "invented-bench.txt", mimeType: "text/plain", buffer: Buffer.from(inventedList()) });
  await page.waitForSelector("#states-body:not([hidden])");
  await page.fill("#points", String(POINTS));
  await page.press("#points", "Enter");
  const grid = await page.evaluate(() => ({ points: document.getElementById("points").value, from: document.getElementById("range-from").value, to: document.getElementById("range-to").value }));
  const doc = await page.evaluate(() => window.chiroptic.document());
  const n = doc.states.conformers.reduce((s, c) => s + c.transitions.length, 0);
  console.log(`${doc.states.conformers.length} conformers, ${n} transitions; grid ${grid.points} points over ${grid.from}–${grid.to} nm`);

  const edits = await page.evaluate(async (rounds) => {
    const input = document.getElementById("states-fwhm");
    const frame = () => new Promise((ok) => requestAnimationFrame(() => ok()));
    const out = [];
    for (let i = 0; i < rounds; i++) {
      await frame();
      input.focus();
      input.value = String(0.25 + 0.01 * (i % 10));
      const updated = new Promise((ok) => document.addEventListener("chiroptic:updated", (e) => ok(e.detail), { once: true }));
      const t0 = performance.now();
      input.dispatchEvent(new Event("input", { bubbles: true }));
      const detail = await updated;
      if (!detail.ok) throw new Error("an update failed during the timing");
      await frame();
      out.push({ core: detail.ms, toFrame: performance.now() - t0 });
    }
    return out;
  }, rounds);
  console.log(`FWHM edit, the core's update (broaden ${n} transitions, evaluate, draw): ${summary(edits.map((e) => e.core))}`);
  console.log(`FWHM edit to the next frame after the draw: ${summary(edits.map((e) => e.toFrame))}`);

  await dropBytes(page, "invented-bench-cd.csv", inventedCd());
  await page.waitForFunction(() => !document.getElementById("states-compare-run").disabled);
  const compares = [];
  for (let i = 0; i < rounds; i++) {
    await page.click("#states-compare-run");
    compares.push(Number(await page.getAttribute("#states-compare-facts", "data-ms")));
  }
  const verdict = await page.textContent("#states-compare-verdict");
  console.log(`comparison (shift search over ±1 eV, computed and mirror): ${summary(compares)}`);
  console.log(`  last verdict: ${verdict}`);
  const withWidth = [];
  await page.check("#states-compare-width");
  for (let i = 0; i < Math.min(rounds, 10); i++) {
    await page.click("#states-compare-run");
    withWidth.push(Number(await page.getAttribute("#states-compare-facts", "data-ms")));
  }
  console.log(`comparison with the width fitted too: ${summary(withWidth)}`);
  if (log.errors.length) console.log(`console errors: ${log.errors.join(" | ")}`);
} finally {
  await env.close();
}
