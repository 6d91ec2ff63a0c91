// Starting bands proposed from a measured CD set, in the page: the set and
// the number of bands chosen, Propose clicked, the bands replaced or added
// to as one undo step, with a message that says what was proposed. The CD
// set is INVENTED at test time: the native CLI (`chiroptic eval`, the same
// core) evaluates a known two-band model, and its Δε column is written as a
// data file that is dropped on the page.
import { test } from "node:test";
import assert from "node:assert/strict";
import { readFileSync, writeFileSync, mkdtempSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { browserTests, openPage, ROOT } from "../lib/harness.mjs";
import { cli, docFile, parseCsv, typeInto, dropFile, messageFor, dropModelAndData } from "../lib/page.mjs";

const env = browserTests();
const FIT = join(ROOT, "fixtures", "fit");
const START = join(FIT, "start.json");
const R = "rotatory_strength_1e40_cgs";

/** The invented model the CD set comes from: a positive lobe at 290 nm and a larger negative one at 235 nm. */
const KNOWN = {
  chiroptic: 1,
  title: "INVENTED: two well separated Gaussian bands",
  sample: JSON.parse(readFileSync(START, "utf8")).sample,
  bands: [
    { name: "P", shape: "gaussian", center_nm: 290, fwhm_cm1: 3000, rotatory_strength_1e40_cgs: 10, dipole_strength_debye2: 1 },
    { name: "N", shape: "gaussian", center_nm: 235, fwhm_cm1: 3500, rotatory_strength_1e40_cgs: -15, dipole_strength_debye2: 2 },
  ],
};

/** The known model's Δε from 190 to 400 nm every 0.5 nm, as a data file marked invented. */
function inventedCdFile() {
  const { header, rows } = parseCsv(cli("eval", docFile(KNOWN), "--from", "190", "--to", "400", "--step", "0.5"));
  const [x, y] = ["wavelength_nm", "delta_epsilon_M-1_cm-1"].map((h) => header.indexOf(h));
  assert.ok(x >= 0 && y >= 0, "eval gives wavelength and Δε columns");
  const lines = ["# INVENTED: De of two Gaussian bands (290 nm, R +10; 235 nm, R -15) from chiroptic eval", "wavelength_nm,delta_epsilon_M-1_cm-1"];
  for (const r of rows) lines.push(`${r[x]},${r[y]}`);
  const path = join(mkdtempSync(join(tmpdir(), "chiroptic-propose-")), "invented_cd.csv");
  writeFileSync(path, lines.join("\n") + "\n");
  return path;
}

const documentOf = (page) => page.evaluate(() => window.chiroptic.document());

test("bands proposed from an invented CD set lie at its lobes, replace or join the bands as one undo step, and are said to be a start", async () => {
  const { page } = await openPage(env);
  await dropModelAndData(page, START, [inventedCdFile()]);
  assert.equal(await page.$eval("#propose-set", (s) => s.selectedOptions[0].textContent), "invented_cd (CD)", "the CD set is chosen");
  // A per-band fit setting of the start model, which one undo must bring back too.
  await page.selectOption("#band-0-R-fit-mode", "held");
  const before = await documentOf(page);

  // At most one band, added to the three: the largest lobe (the negative one at 235 nm), under a free name.
  await typeInto(page, "#propose-max", "1");
  await page.selectOption("#propose-how", "add");
  await page.click("#propose-run");
  const added = await documentOf(page);
  assert.deepEqual(added.bands.slice(0, 3), before.bands, "the bands kept as they were");
  assert.equal(added.bands.length, 4);
  assert.equal(added.bands[3].name, "B4");
  assert.ok(Math.abs(added.bands[3].center_nm - 235) < 1.5 && added.bands[3][R] < 0, JSON.stringify(added.bands[3]));
  assert.match(await page.textContent("#propose-note"), /^Proposed 1 band from “invented_cd”.*added after the bands: B4 at [\d.]+ nm \(R −[\d.]+\)\./);
  assert.deepEqual(added.fit, before.fit, "the kept bands keep their fit settings");
  await page.click("#undo");
  assert.deepEqual(await documentOf(page), before, "one undo: the bands as before, exactly");
  assert.equal(await page.textContent("#propose-note"), "", "the message goes with the bands it spoke of");

  // Up to six, in place of the bands: one band per lobe, two lobes.
  await typeInto(page, "#propose-max", "6");
  await page.selectOption("#propose-how", "replace");
  await page.click("#propose-run");
  const proposed = await documentOf(page);
  assert.deepEqual(proposed.bands.map((b) => b.name), ["B1", "B2"], "named long wavelength first");
  // Tolerances, from the physics of the set: the extremum of a Gaussian band's Δε (∝ ν·G(ν)) lies
  // σ²/ν₀ above its centre in wavenumber (0.4 nm at 290 nm, 0.5 nm at 235 nm) and the set's grid
  // is 0.5 nm, so centres within 1.5 nm. R from the lobe's integral of Δε/ν is the band's own R
  // (the other band's tail, 7σ away, adds nothing measurable), less the trapezoid's error on the
  // grid: within 1 %. The width at half height is read between grid points: within 5 %.
  KNOWN.bands.forEach((k, i) => {
    const b = proposed.bands[i];
    assert.ok(Math.abs(b.center_nm - k.center_nm) < 1.5, `${b.name} at ${b.center_nm} nm, the lobe at ${k.center_nm} nm`);
    assert.ok(Math.abs(b[R] - k[R]) < 0.01 * Math.abs(k[R]), `${b.name}: R ${b[R]} against ${k[R]}`);
    assert.ok(Math.abs(b.fwhm_cm1 - k.fwhm_cm1) < 0.05 * k.fwhm_cm1, `${b.name}: width ${b.fwhm_cm1} against ${k.fwhm_cm1}`);
  });
  assert.equal(proposed.fit, undefined, "the replaced bands' fit settings do not pass to the new bands of the same name");
  const note = await page.textContent("#propose-note");
  assert.match(note, /^Proposed 2 bands from “invented_cd”, one per lobe of its CD, in place of the bands: B1 at [\d.]+ nm \(R \+[\d.]+\); B2 at [\d.]+ nm \(R −[\d.]+\)\./);
  assert.match(note, /a start for a fit, not a result/);
  assert.deepEqual(proposed.data, before.data, "the data set stays");
  // The band list shows the new bands, and the plots were redrawn from them.
  assert.equal(await page.locator("#band-rows tr.band-row").count(), 2);
  assert.equal(await page.inputValue("#band-1-center"), String(proposed.bands[1].center_nm));

  await page.click("#undo");
  assert.deepEqual(await documentOf(page), before, "one undo: the three bands and their fit settings, exactly");
  await page.click("#redo");
  assert.deepEqual((await documentOf(page)).bands, proposed.bands, "redo brings the proposal back");
});

test("proposing from a set without CD, or with nothing loaded, or for zero bands, says why in one message and changes nothing", async () => {
  const { page } = await openPage(env);
  await dropModelAndData(page, START);
  // Nothing loaded.
  const bare = await documentOf(page);
  await page.click("#propose-run");
  assert.match(await page.textContent("#propose-note"), /^No data set is loaded: drop a measured CD file.*The bands are unchanged\.$/);
  assert.deepEqual(await documentOf(page), bare);

  // An ORD set (the invented fit fixture's).
  await dropFile(page, join(FIT, "ord.csv"));
  await page.waitForFunction(() => (window.chiroptic.document().data ?? []).length === 1);
  assert.equal(await page.$eval("#propose-set", (s) => s.selectedOptions[0].textContent), "ord (ORD)");
  const before = await documentOf(page);
  await page.click("#propose-run");
  assert.equal(await page.textContent("#propose-note"), "Cannot propose bands: \"ord\" is ord data, not CD. The bands are unchanged.");
  assert.deepEqual(await documentOf(page), before, "nothing changed");
  // No undo step was made: one undo takes back the ORD set's drop.
  await page.click("#undo");
  assert.equal((await documentOf(page)).data, undefined);
  await page.click("#redo");

  // Zero bands: named beside the box.
  await typeInto(page, "#propose-max", "0");
  assert.match(await messageFor(page, "#propose-max"), /the number of bands must be a whole number from 1 to 500/);
  assert.deepEqual(await documentOf(page), before, "nothing changed");
});
