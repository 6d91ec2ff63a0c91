// Switching a unit converts the shown values in place and leaves the model
// (and so the plots) as it was; values typed in any unit land in the
// document's canonical units. Expected values come from the definitions:
// wavenumber = 1e7/λ[nm] (common practice), E = h c / λ with the exact SI
// (CODATA 2018) values of h, c and e, the specific rotation of the
// pharmacopoeias and the ellipticity factor 32.98 of the CD literature
// (physics.md; from memory).
import { test } from "node:test";
import assert from "node:assert/strict";
import { browserTests, openPage } from "../lib/harness.mjs";
import { plotHashes, enter, savedModel, assertClose } from "../lib/page.mjs";

const env = browserTests();

// CODATA 2018 exact values (SI).
const H = 6.62607015e-34;
const C = 299792458;
const E_CHARGE = 1.602176634e-19;
const EV_NM = (H * C) / E_CHARGE / 1e-9; // eV nm, about 1239.84

async function fullValue(page, selector) {
  await page.focus(selector);
  const v = Number(await page.inputValue(selector));
  await page.focus("#add-band"); // leave the box so it shows the short form again
  return v;
}

test("band centres and widths convert in place between nm, cm⁻¹ and eV", async () => {
  const { page, context, log } = await openPage(env);
  try {
    const before = await plotHashes(page);
    assert.equal(await page.inputValue("#band-0-center"), "300");
    await page.selectOption("#center-unit", "cm-1");
    assert.equal(await page.inputValue("#band-0-center"), "33333");
    // A focused box shows 12 significant digits of a converted value.
    assertClose(await fullValue(page, "#band-0-center"), 1e7 / 300, 2e-12, "300 nm in cm⁻¹");
    await page.selectOption("#center-unit", "ev");
    assert.equal(await page.inputValue("#band-0-center"), "4.1328");
    assertClose(await fullValue(page, "#band-0-center"), EV_NM / 300, 1e-9, "300 nm in eV");

    // A width in nm spans the same two half-height points as the width in cm⁻¹.
    await page.selectOption("#width-unit", "nm");
    const w = await fullValue(page, "#band-0-width");
    assertClose(1e7 / (300 - w / 2) - 1e7 / (300 + w / 2), 2600, 1e-9, "nm width spans 2600 cm⁻¹");
    await page.selectOption("#width-unit", "ev");
    assertClose(await fullValue(page, "#band-0-width"), (2600 * EV_NM) / 1e7, 1e-9, "2600 cm⁻¹ in eV");

    assert.deepEqual(await plotHashes(page), before, "changing the table's units changes no plot");
    let saved = await savedModel(page);
    assert.equal(saved.bands[0].center_nm, 300, "the document keeps its nm exactly");
    assert.equal(saved.bands[0].fwhm_cm1, 2600);

    // Typing in cm⁻¹ stores nm.
    await page.selectOption("#center-unit", "cm-1");
    await enter(page, "#band-0-center", "40000");
    saved = await savedModel(page);
    assertClose(saved.bands[0].center_nm, 250, 1e-15, "40000 cm⁻¹ stored as nm");
    assert.deepEqual(log.errors, []);
  } finally {
    await context.close();
  }
});

test("concentration and path length convert in place", async () => {
  const { page, context, log } = await openPage(env);
  try {
    const before = await plotHashes(page);
    await page.selectOption("#conc-unit", "mmol/L");
    assert.equal(await page.inputValue("#conc"), "0.5");
    await page.selectOption("#conc-unit", "mg/mL");
    // 0.5 mmol/L of M = 312.4 g/mol is 0.1562 g/L = 0.1562 mg/mL.
    assert.equal(await page.inputValue("#conc"), "0.1562");
    await page.selectOption("#conc-unit", "g/100mL");
    assert.equal(await page.inputValue("#conc"), "0.01562");
    await page.selectOption("#path-unit", "mm");
    assert.equal(await page.inputValue("#path"), "10");
    await page.selectOption("#path-unit", "dm");
    assert.equal(await page.inputValue("#path"), "0.1");
    assert.deepEqual(await plotHashes(page), before, "no plot changed");
    let saved = await savedModel(page);
    assert.equal(saved.sample.concentration_mol_per_l, 0.0005);
    assert.equal(saved.sample.path_length_cm, 1);

    await page.selectOption("#conc-unit", "mg/mL");
    await enter(page, "#conc", "0.3124");
    await enter(page, "#path", "0.5");
    saved = await savedModel(page);
    assertClose(saved.sample.concentration_mol_per_l, 0.001, 1e-12, "0.3124 mg/mL of 312.4 g/mol");
    assertClose(saved.sample.path_length_cm, 5, 1e-15, "0.5 dm");

    // Without a molar mass a mass concentration cannot be shown: the menu
    // falls back to mol/L, refuses mg/mL with a reason, and the value stays.
    await enter(page, "#molar-mass", "");
    assert.equal(await page.inputValue("#conc-unit"), "mol/L");
    await page.selectOption("#conc-unit", "mg/mL");
    assert.equal(await page.inputValue("#conc-unit"), "mol/L");
    assert.match(await page.textContent("#conc-error"), /needs the molar mass/);
    assertClose(Number(await page.inputValue("#conc")), 0.001, 1e-12, "concentration kept");
    assert.deepEqual(log.errors, []);
  } finally {
    await context.close();
  }
});

/** The readout's value for a plot after moving the crosshair near 300 nm. */
async function readout(page, plot) {
  return Number(await page.getAttribute(`#readout span[data-plot="${plot}"]`, "data-value"));
}

test("CD and ORD unit menus rescale the plotted values as the definitions say", async () => {
  const { page, context, log } = await openPage(env);
  try {
    // Put the crosshair on the n-π* band of the demo, near 300 nm.
    await page.focus('.plot[data-plot="cd"] .canvas-box');
    await page.keyboard.press("ArrowRight");
    for (let i = 0; i < 25; i++) await page.keyboard.press("Shift+ArrowLeft");
    const x = Number(await page.getAttribute('#readout span[data-plot="x"]', "data-value"));
    assert.ok(x > 280 && x < 320, `crosshair at ${x} nm`);

    const mdeg = await readout(page, "cd");
    await page.selectOption("#cd-unit", "delta_epsilon");
    const de = await readout(page, "cd");
    // θ/mdeg = 32980 ΔA = 32980 Δε c l, c = 5e-4 mol/L, l = 1 cm (Kelly, Jess and Price 2005; from memory).
    assertClose(mdeg / de, 32980 * 5e-4 * 1, 2e-4, "mdeg per Δε");
    await page.selectOption("#cd-unit", "molar_ellipticity");
    // [θ] = 3298.2 Δε (same source).
    assertClose((await readout(page, "cd")) / de, 3298.2, 2e-4, "[θ] per Δε");

    const deg = await readout(page, "ord");
    await page.selectOption("#ord-unit", "specific_rotation");
    const alpha = await readout(page, "ord");
    // [α] = α / (l/dm × c/(g/mL)) (pharmacopoeial definition): l = 0.1 dm, c = 5e-4 × 312.4 / 1000 g/mL.
    assertClose(alpha / deg, 1 / (0.1 * ((5e-4 * 312.4) / 1000)), 1e-12, "[α] per degree");
    await page.selectOption("#ord-unit", "molar_rotation");
    // [Φ] = [α] M / 100.
    assertClose((await readout(page, "ord")) / alpha, 312.4 / 100, 1e-12, "[Φ] per [α]");
    assert.deepEqual(log.errors, []);
  } finally {
    await context.close();
  }
});

test("the spectral axis unit converts the window in place", async () => {
  const { page, context } = await openPage(env);
  try {
    // The demo's default window: 180–650 nm kept inside the water series' 182–1129 nm.
    assert.equal(await page.inputValue("#range-from"), "182");
    assert.equal(await page.inputValue("#range-to"), "650");
    const before = await plotHashes(page);
    await page.selectOption("#axis-unit", "ev");
    // The left end is the smaller energy: 650 nm.
    assertClose(await fullValue(page, "#range-from"), EV_NM / 650, 1e-9, "650 nm in eV");
    assertClose(await fullValue(page, "#range-to"), EV_NM / 182, 1e-9, "182 nm in eV");
    assert.notEqual((await plotHashes(page)).cd, before.cd, "the plots are redrawn on an eV axis");
    await page.selectOption("#axis-unit", "cm-1");
    assert.equal(await page.inputValue("#range-from"), "15385");
    assert.equal(await page.inputValue("#range-to"), "54945");
  } finally {
    await context.close();
  }
});
