// Bad entries get a message next to the control at fault, the plots and the
// lamp lines keep showing the last valid model, and fixing the entry recovers.
import { test } from "node:test";
import assert from "node:assert/strict";
import { browserTests, openPage } from "../lib/harness.mjs";
import { linesTable, plotHashes, enter, messageFor, savedModel, typeInto } from "../lib/page.mjs";

const env = browserTests();

test("a negative width is refused next to the field and the plots stay", async () => {
  const { page, context, log } = await openPage(env);
  try {
    // Focus first: the band being edited is drawn emphasised.
    await page.focus("#band-1-width");
    const before = await plotHashes(page);
    const lines = await linesTable(page);
    const result = await enter(page, "#band-1-width", "-5");
    assert.equal(result?.ok, false, "the core refused the document");
    const message = await messageFor(page, "#band-1-width");
    assert.match(message, /band 2/i);
    assert.match(message, /width must be positive/);
    assert.equal(await page.getAttribute("#band-1-width", "aria-invalid"), "true");
    assert.deepEqual(await plotHashes(page), before, "the last good plots stay");
    assert.deepEqual(await linesTable(page), lines, "the lamp lines stay");
    // What the person typed is kept, not replaced.
    assert.equal(await page.inputValue("#band-1-width"), "-5");

    const fixed = await enter(page, "#band-1-width", "2000");
    assert.equal(fixed?.ok, true);
    assert.equal(await messageFor(page, "#band-1-width"), "");
    assert.notEqual((await plotHashes(page)).cd, before.cd, "the plots follow the fixed value");
    assert.deepEqual(log.errors, []);
  } finally {
    await context.close();
  }
});

test("text in a number is refused and nothing is redrawn", async () => {
  const { page, context, log } = await openPage(env);
  try {
    // Taken with the focus outside the band list (no band emphasised), as at the end.
    const before = await plotHashes(page);
    await page.fill("#band-0-r", "abc");
    assert.match(await messageFor(page, "#band-0-r"), /“abc” is not a number/);
    await page.fill("#conc", "1,5");
    assert.match(await messageFor(page, "#conc"), /use a point for decimals/);
    assert.deepEqual(await plotHashes(page), before);
    // The document still holds the last numbers the person entered.
    const saved = await savedModel(page);
    assert.equal(saved.bands[0].rotatory_strength_1e40_cgs, 9);
    assert.equal(saved.sample.concentration_mol_per_l, 0.0005);
    await enter(page, "#band-0-r", "12");
    assert.equal(await messageFor(page, "#band-0-r"), "");
    assert.deepEqual(log.errors, []);
  } finally {
    await context.close();
  }
});

test("a unit that needs missing sample data says so at the unit menu", async () => {
  const { page, context, log } = await openPage(env);
  try {
    const before = await plotHashes(page);
    // Mean residue ellipticity needs a mean residue weight, which the demo lacks.
    await page.selectOption("#cd-unit", "mean_residue_ellipticity");
    assert.match(await messageFor(page, "#cd-unit"), /mean residue weight/);
    assert.deepEqual(await plotHashes(page), before, "no plot changed");
    await enter(page, "#mrw", "110");
    assert.equal(await messageFor(page, "#cd-unit"), "");
    assert.notEqual((await plotHashes(page)).cd, before.cd, "CD redrawn in the new unit");
    assert.deepEqual(log.errors, []);
  } finally {
    await context.close();
  }
});

test("a window with no width is refused at the window fields", async () => {
  const { page, context } = await openPage(env);
  try {
    const before = await plotHashes(page);
    // The end typed equal to the start, key by key, then Enter.
    const start = await page.inputValue("#range-from");
    await typeInto(page, "#range-to", start);
    assert.match(await messageFor(page, "#range-to"), /end must lie above the start/);
    assert.deepEqual(await plotHashes(page), before);
  } finally {
    await context.close();
  }
});

test("a malformed model file is refused with its reason and the model stays", async () => {
  const { page, context, log } = await openPage(env);
  try {
    const before = await plotHashes(page);
    await page.setInputFiles("#file-input", {
      name: "broken.json",
      mimeType: "application/json",
      buffer: Buffer.from('{"chiroptic": 1, "sample": {"concentration_mol_per_l": 0.001, "path_length_cm": 1, "solvent": {"constant": 1.33}}, "bands": [{"shape": "gaussian", "center_nm": 300, "fwhm_cm": 2000, "rotatory_strength_1e40_cgs": 1, "dipole_strength_debye2": 1}]}'),
    });
    await page.waitForFunction(() => /broken\.json/.test(document.getElementById("status").textContent));
    const status = await page.textContent("#status");
    assert.match(status, /fwhm_cm/, "the unknown field is named");
    assert.match(status, /unchanged/);
    assert.deepEqual(await plotHashes(page), before);
    assert.equal(await page.locator("tr.band-row").count(), 3);

    await page.setInputFiles("#file-input", {
      name: "good.json",
      mimeType: "application/json",
      buffer: Buffer.from('{"chiroptic": 1, "title": "one band", "sample": {"concentration_mol_per_l": 0.001, "path_length_cm": 1, "solvent": {"constant": 1.33}}, "bands": [{"shape": "gaussian", "center_nm": 300, "fwhm_cm1": 2000, "rotatory_strength_1e40_cgs": 1, "dipole_strength_debye2": 1}]}'),
    });
    await page.waitForFunction(() => document.querySelectorAll("tr.band-row").length === 1);
    assert.equal(await page.inputValue("#doc-title"), "one band");
    assert.equal(await page.inputValue("#solvent-sample-solvent-constant"), "1.33");
    assert.deepEqual(log.errors, []);
  } finally {
    await context.close();
  }
});
