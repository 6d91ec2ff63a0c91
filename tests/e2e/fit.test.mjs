// Fitting in the page, driven as a person does: the invented fit fixtures
// (fixtures/fit/, made by make_fit_reference.py and bench_fit.py) dropped on
// the page, settings typed key by key and chosen with the mouse, Fit and
// Cancel clicked. Results are checked against the native CLI
// (`chiroptic fit`, tests/lib/page.mjs `cli`) on the same document and files.
import { test } from "node:test";
import assert from "node:assert/strict";
import { readFileSync, writeFileSync, mkdtempSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { pathToFileURL } from "node:url";
import { browserTests, openPage, canvasDigest, ROOT, DIST } from "../lib/harness.mjs";
import { cli, docFile, downloadText, parseCsv, pageLink, savedModel, typeInto, assertClose, dropModelAndData } from "../lib/page.mjs";

const env = browserTests();
const FIT = join(ROOT, "fixtures", "fit");
const START = join(FIT, "start.json");
const CD = join(FIT, "cd.csv");
const ORD = join(FIT, "ord.csv");

const documentOf = (page) => page.evaluate(() => window.chiroptic.document());

/** The start model and its two data sets, dropped one after the other. */
const loadProblem = (page, start = START, data = [CD, ORD]) => dropModelAndData(page, start, data);

/** Every text the fit readout shows from now on. */
async function watchReadout(page) {
  await page.evaluate(() => {
    window.__readouts = [];
    new MutationObserver(() => window.__readouts.push(document.getElementById("fit-progress").textContent)).observe(document.getElementById("fit-progress"), {
      childList: true,
      characterData: true,
      subtree: true,
    });
  });
  return () => page.evaluate(() => window.__readouts.slice());
}

/** The CLI's fit of a start document (the page's, data taken out) and the data files: the fitted document. */
function cliFit(startDoc, files = [CD, ORD]) {
  const start = structuredClone(startDoc);
  delete start.data;
  const out = join(mkdtempSync(join(tmpdir(), "chiroptic-fit-")), "fitted.json");
  cli("fit", docFile(start), ...files, "-o", out);
  return JSON.parse(readFileSync(out, "utf8"));
}

/** Page and CLI reports agree: χ² within 1e-9 relative, every estimate within 1e-3 of its standard error (the 1e-10 relative χ² stop leaves about that much play) (or 1e-9 relative when held). */
function assertSameFit(pageReport, cliReport) {
  assertClose(pageReport.chi_square, cliReport.chi_square, 1e-9, "χ² page vs CLI");
  assert.equal(pageReport.degrees_of_freedom, cliReport.degrees_of_freedom, "degrees of freedom");
  assert.equal(pageReport.parameters.length, cliReport.parameters.length);
  pageReport.parameters.forEach((p, i) => {
    const c = cliReport.parameters[i];
    assert.equal(p.name, c.name);
    assert.equal(p.mode, c.mode, `${p.name} mode`);
    if (c.standard_error) assert.ok(Math.abs(p.value - c.value) <= 1e-3 * c.standard_error, `${p.name}: ${p.value} vs CLI ${c.value} (se ${c.standard_error})`);
    else assertClose(p.value, c.value, 1e-9, p.name);
  });
}

test("a fit run to the end gives the CLI's χ² and estimates; one undo step restores the start; the CSV and printable report hold the estimates", async () => {
  const { page } = await openPage(env);
  await loadProblem(page);
  await typeInto(page, "#fit-starts", "4");
  const before = await documentOf(page);
  assert.equal(before.fit.starts, 4, "the typed number of starts is in the document");
  await page.click("#fit-run");
  await page.waitForSelector("#fit-report:not([hidden])", { timeout: 60000 });
  const after = await documentOf(page);
  const report = after.fit.report;
  // Source: the native CLI on the same start document (settings included) and the same files.
  const native = cliFit(before);
  assertSameFit(report, native.fit.report);
  after.bands.forEach((b, i) => {
    const c = native.bands[i];
    for (const k of ["center_nm", "fwhm_cm1", "rotatory_strength_1e40_cgs", "dipole_strength_debye2"]) assertClose(b[k], c[k], 1e-6, `${b.name}.${k} page vs CLI`);
  });
  assert.equal(report.starts, 4);
  // With two cores or more the 4 starts were split over workers and joined by the core (fit_finish).
  const cores = await page.evaluate(() => navigator.hardwareConcurrency);
  if (cores >= 2) assert.match(await page.textContent("#fit-progress"), new RegExp(`on ${Math.min(cores, 4)} workers`));
  assert.match(await page.textContent("#fit-progress"), /4 starts reached the best minimum|of 4 starts/);
  // No absorption data: D is held and the report says why (fit/mod.rs's warning).
  assert.match(await page.textContent("#fit-warnings"), /D is not determined by CD and ORD alone/);
  assert.ok(report.parameters.filter((p) => p.name.endsWith("dipole_strength_debye2")).every((p) => p.mode === "fixed"));

  // The estimates as CSV: one row per parameter with the report's numbers in full.
  const { name, text } = await downloadText(page, "#fit-save-csv");
  assert.match(name, /fit\.csv$/);
  const [estimates, matrix] = text.split("\n\n");
  const { header, rows } = parseCsv(estimates);
  assert.deepEqual(header, ["parameter", "value", "standard_error", "mode", "at_bound"]);
  // The correlation matrix after the estimates: the CLI's, row by row.
  const corr = parseCsv(matrix);
  const names = native.fit.report.correlation_names;
  assert.deepEqual(corr.header, ["correlation", ...names]);
  corr.rows.forEach((r, i) => {
    assert.equal(r[0], names[i]);
    assert.equal(Number(r[i + 1]), 1, "a parameter's correlation with itself");
    names.forEach((_, j) => assert.ok(Math.abs(Number(r[j + 1]) - native.fit.report.correlations[i * names.length + j]) < 1e-4, `r(${i},${j})`));
  });
  assert.equal(rows.length, native.fit.report.parameters.length);
  rows.forEach((r, i) => {
    const c = native.fit.report.parameters[i];
    assert.equal(r[0], c.name);
    if (c.standard_error) assert.ok(Math.abs(Number(r[1]) - c.value) <= 1e-3 * c.standard_error, `CSV ${r[0]}`);
    if (c.standard_error) assertClose(Number(r[2]), c.standard_error, 1e-4, `CSV ${r[0]} standard error`);
  });
  assert.match(text, new RegExp(`# chi_square: ${String(report.chi_square).replace(".", "\\.")}`));
  const printable = await downloadText(page, "#fit-save-report");
  assert.match(printable.text, /<svg/, "the printable report carries the figures");
  assert.match(printable.text, /reduced χ²/);
  assert.ok(printable.text.includes(String(report.degrees_of_freedom)));

  // The session's comparison holds this fit with the CLI's AIC and BIC.
  const cells = await page.$$eval("#fit-compare tbody tr td", (tds) => tds.map((td) => td.textContent));
  assert.equal(cells[0], "3", "bands");
  assert.match(cells[5], /◀/, "the only fit has the lowest AIC");

  // One undo step puts the start model back, data and settings kept.
  await page.click("#undo");
  const undone = await documentOf(page);
  assert.deepEqual(undone.bands, before.bands, "undo restores the start bands");
  assert.deepEqual(undone.data, before.data);
  assert.equal(undone.fit.report, undefined);
  assert.equal(await page.isHidden("#fit-report"), true, "no report for the start model");
  await page.click("#redo");
  assert.deepEqual((await documentOf(page)).bands, after.bands, "redo brings the fit back");
});

test("Cancel during a long fit keeps the model; the readout and curves move while it runs; the page answers; the next fit runs", async () => {
  const { page } = await openPage(env);
  // 6 overlapping Gaussian bands, CD + ORD 2 × 1000 points, 20 % off (fixtures/fit/bench_fit.py), from 200 starts.
  await loadProblem(page, join(FIT, "bench_start.json"), [join(FIT, "bench_cd.csv"), join(FIT, "bench_ord.csv")]);
  await typeInto(page, "#fit-starts", "200");
  const before = await documentOf(page);
  const cdBefore = await canvasDigest(page, "plot-cd");
  const readouts = await watchReadout(page);
  await page.click("#fit-run");
  await page.waitForFunction(() => new Set(window.__readouts.filter((t) => /iteration/.test(t))).size >= 3, null, { timeout: 30000 });
  // The curves follow the fit (snapshots drawn), the document does not.
  await page.waitForFunction((h) => {
    const c = document.getElementById("plot-cd");
    const d = c.getContext("2d").getImageData(0, 0, c.width, c.height).data;
    let hash = 2166136261;
    for (let i = 0; i < d.length; i += 4) hash = Math.imul(hash ^ d[i] ^ (d[i + 1] << 8) ^ (d[i + 2] << 16), 16777619) >>> 0;
    return hash !== h;
  }, cdBefore.hash, { timeout: 10000 });
  assert.deepEqual((await documentOf(page)).bands, before.bands, "the model is untouched while the fit runs");
  // Other controls answer while the fit runs: the help panel opens, the band lines switch off and on.
  await page.click("#help-menu summary");
  assert.equal(await page.$eval("#help-menu", (d) => d.open), true, "help opened during the fit");
  await page.keyboard.press("Escape");
  await page.click("#show-contributions");
  assert.equal(await page.isChecked("#show-contributions"), false);
  await page.click("#show-contributions");
  assert.equal(await page.isChecked("#show-contributions"), true);
  assert.equal(await page.isVisible("#fit-cancel"), true, "still fitting");
  const seen = (await readouts()).filter((t) => /iteration/.test(t));
  assert.match(seen.at(-1), /^Fitting: start \d+ of 200 · iteration \d+ · χ² /);
  await page.click("#fit-cancel");
  assert.match(await page.textContent("#fit-progress"), /cancelled/);
  assert.equal(await page.isVisible("#fit-run"), true);
  assert.deepEqual(await documentOf(page), before, "the model is as it was");
  assert.equal((await canvasDigest(page, "plot-cd")).hash, cdBefore.hash, "the start model is drawn again");
  assert.equal(await page.isHidden("#fit-report"), true);

  // A fresh worker runs the next fit: one start, to the end.
  await typeInto(page, "#fit-starts", "1");
  await page.click("#fit-run");
  await page.waitForSelector("#fit-report:not([hidden])", { timeout: 60000 });
  const fitted = await documentOf(page);
  assert.equal(fitted.fit.report.starts, 1);
  // Source: the CLI on the same problem (fixtures/fit/bench_*.csv), one start.
  assertSameFit(fitted.fit.report, cliFit({ ...before, fit: { starts: 1 } }, [join(FIT, "bench_cd.csv"), join(FIT, "bench_ord.csv")]).fit.report);
});

test("a fit that cannot run gives one clear message and loses nothing", async () => {
  const { page } = await openPage(env);
  // The demo has no data: nothing to fit (the core's message, fit/mod.rs).
  const demo = await documentOf(page);
  await page.click("#fit-run");
  await page.waitForSelector("#fit-problem:not([hidden])");
  assert.match(await page.textContent("#fit-problem"), /^Cannot fit: nothing to fit: the document has no shown data set and no reading\. The model is unchanged\.$/);
  assert.deepEqual(await documentOf(page), demo);
  assert.equal(await page.isHidden("#fit-report"), true);

  // With data but nothing free: D alone free, and D is held without absorption data.
  await loadProblem(page);
  await page.check("#fit-free-D");
  for (const f of ["centre", "width", "R"]) await page.uncheck(`#fit-free-${f}`);
  const held = await documentOf(page);
  assert.deepEqual(held.fit.free, ["dipole_strength_debye2"]);
  await page.click("#fit-run");
  await page.waitForFunction(() => /no parameter is free/.test(document.getElementById("fit-problem").textContent));
  assert.deepEqual(await documentOf(page), held, "nothing lost");
  // Source: the CLI refuses the same document in the same words.
  const start = structuredClone(held);
  delete start.data;
  assert.throws(() => cli("fit", docFile(start), CD, ORD, "-o", join(tmpdir(), "never.json")), (e) => /no parameter is free/.test(e.stderr) && e.status === 2);

  // A number of starts the core does not take is named beside the box and not stored.
  await typeInto(page, "#fit-starts", "0");
  assert.match(await page.textContent("#fit-starts-error"), /the number of starts must be a whole number from 1 to 256/);
  assert.equal((await documentOf(page)).fit.starts, undefined);
});

test("a couplet tie R(B2) = −R(B3) holds to the last bit, matches the CLI, and travels in the link", async () => {
  const { page, context } = await openPage(env);
  await loadProblem(page);
  await page.click("#fit-per-band summary");
  await page.selectOption("#fit-1-R-mode", "tied");
  await page.selectOption("#fit-1-R-to", "B3.rotatory_strength_1e40_cgs");
  await typeInto(page, "#fit-1-R-factor", "-1");
  await typeInto(page, "#fit-starts", "2");
  const before = await documentOf(page);
  assert.deepEqual(before.fit.parameters, [{ parameter: "B2.rotatory_strength_1e40_cgs", link: { to: "B3.rotatory_strength_1e40_cgs", factor: -1, offset: 0 } }]);
  // The settings travel in the share link: a new page opened on it shows the tie.
  const link = await pageLink(page);
  const other = await context.newPage();
  await other.goto(link);
  await other.waitForSelector("html[data-ready=true]", { state: "attached" });
  await other.click("#fit-per-band summary");
  assert.equal(await other.inputValue("#fit-1-R-mode"), "tied");
  assert.equal(await other.inputValue("#fit-1-R-factor"), "-1");
  await other.close();

  await page.click("#fit-run");
  await page.waitForSelector("#fit-report:not([hidden])", { timeout: 60000 });
  const fitted = await documentOf(page);
  assert.equal(fitted.bands[1].rotatory_strength_1e40_cgs, -fitted.bands[2].rotatory_strength_1e40_cgs, "R2 = −R3 exactly");
  assert.notEqual(fitted.bands[2].rotatory_strength_1e40_cgs, before.bands[2].rotatory_strength_1e40_cgs, "R3 was fitted");
  assertSameFit(fitted.fit.report, cliFit(before).fit.report);
});

test("the single offline file fits through its inline worker with no request made", async () => {
  const file = pathToFileURL(join(DIST, "chiroptic.html")).href;
  const context = await env.browser.newContext({ viewport: { width: 1280, height: 800 } });
  const page = await context.newPage();
  const log = { errors: [], foreign: [] };
  page.on("console", (m) => m.type() === "error" && log.errors.push(m.text()));
  page.on("pageerror", (e) => log.errors.push(`page error: ${e.message}`));
  await context.route("**/*", (route) => {
    const url = route.request().url();
    if (url.split("#")[0] === file || url.startsWith("blob:")) return route.continue();
    log.foreign.push(url.slice(0, 80));
    return route.abort();
  });
  env.logs.push(log);
  try {
    await page.goto(file);
    await page.waitForSelector("html[data-ready=true]", { state: "attached", timeout: 20000 });
    await loadProblem(page);
    await typeInto(page, "#fit-starts", "2");
    const before = await documentOf(page);
    await page.click("#fit-run");
    await page.waitForSelector("#fit-report:not([hidden])", { timeout: 60000 });
    assertSameFit((await documentOf(page)).fit.report, cliFit(before).fit.report);
  } finally {
    await context.close();
  }
});

test("an edit of the model while a fit runs stops the fit and keeps the edit", async () => {
  const { page } = await openPage(env);
  await loadProblem(page, join(FIT, "bench_start.json"), [join(FIT, "bench_cd.csv"), join(FIT, "bench_ord.csv")]);
  await typeInto(page, "#fit-starts", "200");
  await watchReadout(page);
  await page.click("#fit-run");
  await page.waitForFunction(() => window.__readouts.some((t) => /iteration/.test(t)), null, { timeout: 30000 });
  await typeInto(page, "#band-0-width", "3000");
  await page.waitForSelector("#fit-run:not([hidden])");
  assert.match(await page.textContent("#fit-progress"), /Fit stopped: the model was edited while it ran/);
  const doc = await documentOf(page);
  assert.equal(doc.bands[0].fwhm_cm1, 3000, "the typed width is the model's");
  assert.equal(doc.fit.report, undefined, "no fit result arrived");
  // Source: fixtures/fit/bench_start.json, the other bands as they were.
  const start = JSON.parse(readFileSync(join(FIT, "bench_start.json"), "utf8"));
  assert.deepEqual(doc.bands.slice(1), start.bands.slice(1));
});

test("a band renamed after its fit settings were made takes them along, and the next fit finds them", async () => {
  const { page } = await openPage(env);
  await loadProblem(page);
  await page.click("#fit-per-band summary");
  await page.selectOption("#fit-1-R-mode", "tied");
  await page.selectOption("#fit-1-R-to", "B3.rotatory_strength_1e40_cgs");
  await typeInto(page, "#fit-1-R-factor", "-1");
  await typeInto(page, "#fit-starts", "1");
  // Renamed key by key: every intermediate name carries the tie along.
  await typeInto(page, "#band-2-name", "far", { enter: false });
  const doc = await documentOf(page);
  assert.equal(doc.bands[2].name, "far");
  assert.deepEqual(doc.fit.parameters, [{ parameter: "B2.rotatory_strength_1e40_cgs", link: { to: "far.rotatory_strength_1e40_cgs", factor: -1, offset: 0 } }]);
  await page.click("#fit-run");
  await page.waitForSelector("#fit-report:not([hidden])", { timeout: 60000 });
  const fitted = await documentOf(page);
  assert.equal(fitted.bands[1].rotatory_strength_1e40_cgs, -fitted.bands[2].rotatory_strength_1e40_cgs, "the tie to the renamed band held");
  // The same document through the CLI (an independent run of the core) gives the same fit.
  assertSameFit(fitted.fit.report, cliFit(doc).fit.report);
});
