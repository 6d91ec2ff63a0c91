// In-page timing of fitting (not a test): six Gaussian bands (18 free
// parameters) jointly to one CD and one ORD set of 1000 points each, from a
// start 20 % off (fixtures/fit/bench_*, invented, made by bench_fit.py), as
// a person runs it: files dropped, starts typed, Fit clicked. Times one local
// Levenberg-Marquardt run (1 start, one worker) and the default fit (8 starts
// split over as many workers as the machine has cores, at most 4), each
// measured in the page from handing the fit to the workers to the joined
// result, and from the click to the report on screen; prints medians.
// The native figures come from `cargo bench -p chiroptic --bench fit`
// (crate/benches/fit.rs); `--native` runs it after the page for a same-run ratio.
// Run after ./build.sh:   node tests/bench/fit.mjs [--native]
import { execFileSync } from "node:child_process";
import { readFileSync } from "node:fs";
import { join } from "node:path";
import { startBrowser, openPage, ROOT } from "../lib/harness.mjs";

const FIT = join(ROOT, "fixtures", "fit");
const RUNS = { 1: 11, 8: 5 };
const median = (v) => [...v].sort((a, b) => a - b)[Math.floor(v.length / 2)];

async function drop(page, name) {
  const text = readFileSync(join(FIT, name), "utf8");
  await page.evaluate(({ name, text }) => {
    const dt = new DataTransfer();
    dt.items.add(new File([text], name, { type: "text/plain" }));
    for (const type of ["dragenter", "dragover", "drop"]) document.getElementById("plot-grid").dispatchEvent(new DragEvent(type, { dataTransfer: dt, bubbles: true, cancelable: true }));
  }, { name, text });
}

const env = await startBrowser();
const { page } = await openPage(env);
await drop(page, "bench_start.json");
await page.waitForFunction(() => /fit benchmark/.test(window.chiroptic.document().title));
await drop(page, "bench_cd.csv");
await page.waitForFunction(() => (window.chiroptic.document().data ?? []).length === 1);
await drop(page, "bench_ord.csv");
await page.waitForFunction(() => (window.chiroptic.document().data ?? []).length === 2);

for (const starts of [1, 8]) {
  await page.click("#fit-starts");
  await page.keyboard.press("Control+A");
  await page.keyboard.type(String(starts));
  await page.keyboard.press("Enter");
  await page.waitForTimeout(400);
  const worker = [];
  const wall = [];
  let chi = NaN;
  let atBest = 0;
  for (let k = 0; k < RUNS[starts]; k++) {
    const t0 = Date.now();
    await page.click("#fit-run");
    await page.waitForSelector("#fit-report:not([hidden])", { timeout: 120000 });
    wall.push(Date.now() - t0);
    worker.push(Number(await page.getAttribute("#fit-progress", "data-ms")));
    const r = await page.evaluate(() => window.chiroptic.document().fit.report);
    chi = r.chi_square;
    atBest = r.starts_at_best;
    // Back to the start model (one undo step) for the next run.
    await page.click("#undo");
    await page.waitForSelector("#fit-report", { state: "hidden" });
    // A person's pause before the next click: the undo's redraw is over, so
    // the fit is not timed against it for the machine's cores.
    await page.waitForTimeout(400);
  }
  console.log(
    `in-page fit, ${starts} start${starts > 1 ? "s" : ""}: median ${median(worker).toFixed(1)} ms in the workers ` +
      `(${Math.min(...worker).toFixed(1)}–${Math.max(...worker).toFixed(1)}), ${median(wall)} ms click to report; ` +
      `χ² ${chi.toFixed(6)}, ${atBest} of ${starts} starts at the best (${RUNS[starts]} runs)`,
  );
}
await env.close();

if (process.argv.includes("--native")) {
  const out = execFileSync("cargo", ["bench", "-q", "-p", "chiroptic", "--bench", "fit"], { cwd: ROOT, encoding: "utf8", maxBuffer: 1 << 24 });
  console.log(out.split("\n").filter((l) => /fit_6_gaussians|scipy|ratio/i.test(l)).join("\n"));
}
