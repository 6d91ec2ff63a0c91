// Computed excited states in the page: a transition list read through the
// file chooser gives the Boltzmann shares of a hand computation, shares by
// hand and switches are one undo step each, the exported CD integrates back
// to the population-weighted rotatory (and dipole) strengths, the comparison
// finds a known shift and tells a configuration from its mirror image, bad
// input is named and changes nothing, and the section travels in a link
// and in the model file.
import { test } from "node:test";
import assert from "node:assert/strict";
import { readFileSync } from "node:fs";
import { join } from "node:path";
import { browserTests, openPage, canvasDigest, ROOT } from "../lib/harness.mjs";
import { downloadText, parseCsv, typeInto, messageFor, pageLink, savedModel, dropBytes, assertClose } from "../lib/page.mjs";

const env = browserTests();

const EXAMPLE = join(ROOT, "fixtures", "states", "example.txt");

// CODATA 2018 exact values (SI 2019), in the CGS units of physics.md.
const GAS_CONSTANT_J_PER_MOL_K = 8.314462618; // R = N_A k_B
const JOULE_PER_KCAL = 4184; // thermochemical calorie
const PLANCK_ERG_S = 6.62607015e-27;
const LIGHT_CM_PER_S = 2.99792458e10;
const AVOGADRO_PER_MOL = 6.02214076e23;
const ERG_PER_EV = 1.602176634e-12;
// CODATA 2018 (measured): electron mass and elementary charge in esu (e = 1.602176634e-19 C × c/10).
const ELECTRON_MASS_G = 9.1093837015e-28;
const ELEMENTARY_CHARGE_ESU = 1.602176634e-19 * LIGHT_CM_PER_S / 10;
/** physics.md: C_R = 3 h c ln10 · 1000 / (32 π³ N_A), so that R = C_R ∫ Δε/ν dν (and D = 4 C_R ∫ ε/ν dν). */
const C_R = (3 * PLANCK_ERG_S * LIGHT_CM_PER_S * Math.LN10 * 1000) / (32 * Math.PI ** 3 * AVOGADRO_PER_MOL);
/** 1 eV as a wavenumber, cm⁻¹ (E = h c ν̃). */
const CM1_PER_EV = ERG_PER_EV / (PLANCK_ERG_S * LIGHT_CM_PER_S);

/**
 * The invented example list, read here by the test itself (not by the
 * page): each conformer's name, energy in kcal/mol and transitions
 * (energy in eV, f, R in the length and velocity forms).
 */
function exampleConformers() {
  const out = [];
  let header = null;
  for (const raw of readFileSync(EXAMPLE, "utf8").split("\n")) {
    const line = raw.trim();
    if (!line || line.startsWith("#")) continue;
    const m = /^conformer (\S+), energy ([\d.]+) kcal\/mol$/.exec(line);
    if (m) {
      out.push({ name: m[1], kcal: Number(m[2]), transitions: [] });
      header = null;
      continue;
    }
    const cells = line.split(/[,\s]+/);
    if (!header) {
      header = cells;
      continue;
    }
    const v = (name) => Number(cells[header.indexOf(name)]);
    out.at(-1).transitions.push({ ev: v("energy_eV"), f: v("f"), r: v("R_length"), rv: v("R_velocity") });
  }
  return out;
}

/** Boltzmann shares at T from energies in kcal/mol (p ∝ exp(−ΔE/RT)). */
function boltzmann(conformers, temperatureK = 298.15) {
  const w = conformers.map((c) => Math.exp((-c.kcal * JOULE_PER_KCAL) / (GAS_CONSTANT_J_PER_MOL_K * temperatureK)));
  const sum = w.reduce((a, b) => a + b, 0);
  return w.map((x) => x / sum);
}

const docOf = (page) => page.evaluate(() => window.chiroptic.document());

/** A page on a new, empty model with the example list read through the file chooser. */
async function withExample() {
  const opened = await openPage(env);
  const { page } = opened;
  page.on("dialog", (d) => d.accept());
  await page.click("#new-model");
  const [chooser] = await Promise.all([page.waitForEvent("filechooser"), page.click("#states-open")]);
  await chooser.setFiles(EXAMPLE);
  await page.waitForSelector("#states-body:not([hidden])");
  return opened;
}

/** The shares the table says the spectra use, in per cent (full precision). */
const sharesUsed = (page) => page.$$eval("#states-rows td.share-used", (cells) => cells.map((c) => Number(c.dataset.value)));
const sharesShown = (page) => page.$$eval("#states-rows td.share-used", (cells) => cells.map((c) => c.textContent));

/** Columns of the page's CSV export as numbers. */
async function exported(page) {
  const { text } = await downloadText(page, "#save-csv");
  const { header, rows } = parseCsv(text);
  const col = (name) => {
    const k = header.indexOf(name);
    assert.ok(k >= 0, `CSV column ${name} in ${header.join(",")}`);
    return rows.map((r) => Number(r[k]));
  };
  return { nm: col("wavelength_nm"), de: col("delta_epsilon_M-1_cm-1"), eps: col("epsilon_M-1_cm-1") };
}

/** ∫ y/ν dν over the wavenumbers of the points (trapezoids). */
function integralOverNu(nm, y) {
  const pts = nm.map((l, i) => [1e7 / l, y[i]]).sort((a, b) => a[0] - b[0]);
  let sum = 0;
  for (let i = 1; i < pts.length; i++) {
    const [n0, y0] = pts[i - 1];
    const [n1, y1] = pts[i];
    sum += 0.5 * (y0 / n0 + y1 / n1) * (n1 - n0);
  }
  return sum;
}

test("the example list read through the file chooser shows two conformers at their Boltzmann shares", async () => {
  const { page, context } = await withExample();
  try {
    const conformers = exampleConformers();
    const doc = await docOf(page);
    assert.deepEqual(doc.states.conformers.map((c) => c.name), ["A", "B"]);
    assert.deepEqual(doc.bands, [], "the states' bands are not in the band list");
    const expected = boltzmann(conformers).map((p) => p * 100);
    const used = await sharesUsed(page);
    used.forEach((u, i) => assertClose(u, expected[i], 1e-9, `share of ${conformers[i].name}`));
    // Rounded as the table shows them: 74.97 % and 25.03 % (from the formula above).
    assert.deepEqual(await sharesShown(page), expected.map((p) => `${p.toFixed(2)} %`));
    assert.deepEqual(await sharesShown(page), ["74.97 %", "25.03 %"]);
    const cells = await page.$$eval("#states-rows tr", (rows) => rows.map((r) => [...r.children].map((c) => c.textContent)));
    assert.equal(cells[1][1], "0.65 kcal/mol", "the energy as the list gave it");
    assert.deepEqual(cells.map((c) => c[5]), conformers.map((c) => String(c.transitions.length)), "transitions per conformer");
    assert.equal(await page.isVisible("#lines-states-note"), true, "the caution about [α]D from a truncated sum");
    assert.match(await page.textContent("#lines-states-note"), /truncated sum over computed states is a rough estimate of \[α\]D/);
    // One undo step takes the list out again.
    await page.click("#undo");
    assert.equal((await docOf(page)).states, undefined);
    assert.equal(await page.isVisible("#lines-states-note"), false);
    await page.click("#redo");
    assert.equal((await docOf(page)).states.conformers.length, 2);
    // Remove states: one undo step too.
    await page.click("#states-remove");
    assert.equal((await docOf(page)).states, undefined);
    assert.equal(await page.isVisible("#states-body"), false);
    await page.click("#undo");
    assert.equal((await docOf(page)).states.conformers.length, 2);
  } finally {
    await context.close();
  }
});

test("a list dropped on the panel is read as a transition list, not as measured data", async () => {
  const { page, context } = await openPage(env);
  try {
    page.on("dialog", (d) => d.accept());
    await page.click("#new-model");
    await dropBytes(page, "example.txt", readFileSync(EXAMPLE), "states");
    await page.waitForSelector("#states-body:not([hidden])");
    const doc = await docOf(page);
    assert.deepEqual(doc.states.conformers.map((c) => c.transitions.length), exampleConformers().map((c) => c.transitions.length));
    assert.equal(doc.data, undefined, "no data set was made of it");
    assert.deepEqual(await sharesShown(page), ["74.97 %", "25.03 %"]);
  } finally {
    await context.close();
  }
});

test("a share typed by hand and a conformer switched off are one undo step each", async () => {
  const { page, context } = await withExample();
  try {
    const loaded = await docOf(page);
    const boltz = await sharesUsed(page);
    await typeInto(page, "#states-share-0", "40");
    assert.equal((await docOf(page)).states.conformers[0].share, 0.4, "stored as a fraction");
    assert.deepEqual(await sharesShown(page), ["40.00 %", "60.00 %"]);
    await page.click("#undo");
    assert.deepEqual(await docOf(page), loaded, "one undo step back to the list as read");
    assert.deepEqual(await sharesUsed(page), boltz);

    // Another temperature: the shares follow Boltzmann's formula at it.
    await typeInto(page, "#states-temperature", "350");
    assert.equal((await docOf(page)).states.temperature_k, 350);
    const at350 = boltzmann(exampleConformers(), 350).map((x) => x * 100);
    (await sharesUsed(page)).forEach((u, i) => assertClose(u, at350[i], 1e-9, `share at 350 K of conformer ${i + 1}`));
    await page.click("#undo");
    assert.deepEqual(await docOf(page), loaded, "typing 3, 35, 350 was one undo step");

    await page.click("#states-on-0");
    assert.equal((await docOf(page)).states.conformers[0].off, true);
    assert.deepEqual(await sharesShown(page), ["0.00 %", "100.00 %"]);
    await page.click("#undo");
    assert.deepEqual(await docOf(page), loaded);
    assert.equal(await page.isChecked("#states-on-0"), true, "the switch follows the undo");
    assert.deepEqual(await sharesUsed(page), boltz);
  } finally {
    await context.close();
  }
});

test("dragging the FWHM slider is one undo step, even with a pause; ↑ steps the shift", async () => {
  const { page, context } = await withExample();
  try {
    const loaded = await docOf(page);
    const slider = page.locator(".num-cell:has(#states-fwhm) .slider");
    const box = await slider.boundingBox();
    const y = box.y + box.height / 2;
    await page.mouse.move(box.x + box.width * 0.25, y);
    await page.mouse.down();
    for (let k = 1; k <= 8; k++) {
      await page.mouse.move(box.x + box.width * (0.25 + 0.05 * k), y);
      // A pause longer than the history's burst of typing (1 s): still one drag.
      if (k === 4) await page.waitForTimeout(1200);
    }
    await page.mouse.up();
    const dragged = (await docOf(page)).states.broadening.fwhm_ev;
    assert.ok(dragged > loaded.states.broadening.fwhm_ev + 0.1, `the drag widened the bands to ${dragged} eV`);
    await page.click("#undo");
    assert.deepEqual(await docOf(page), loaded, "the whole drag was one step");

    await page.click("#states-shift");
    await page.keyboard.press("ArrowUp");
    assert.equal((await docOf(page)).states.broadening.shift_ev, 0.01, "one step of 0.01 eV");
    await page.keyboard.press("Shift+ArrowUp");
    assert.equal((await docOf(page)).states.broadening.shift_ev, 0.11, "Shift: ten steps");
  } finally {
    await context.close();
  }
});

test("a width typed as σ sets the FWHM by FWHM = 2√(2 ln 2) σ", async () => {
  // The Gaussian relation (common practice), computed here, not read from the page.
  const { page, context } = await withExample();
  try {
    await typeInto(page, "#states-sigma", "0.1");
    const fwhm = (await docOf(page)).states.broadening.fwhm_ev;
    assertClose(fwhm, 0.1 * 2 * Math.sqrt(2 * Math.LN2), 1e-12, "FWHM from σ");
    assertClose(Number(await page.inputValue("#states-fwhm")), fwhm, 1e-4, "the FWHM box follows (5 digits shown)");
    await typeInto(page, "#states-fwhm", "0.5");
    assertClose(Number(await page.inputValue("#states-sigma")), 0.5 / (2 * Math.sqrt(2 * Math.LN2)), 1e-4, "and σ follows the FWHM");
  } finally {
    await context.close();
  }
});

test("the exported CD follows the width and integrates back to the population-weighted R and D", async () => {
  const { page, context } = await withExample();
  try {
    const at03 = await exported(page);
    const step = Math.abs(at03.nm[1] - at03.nm[0]);
    assert.ok(step <= 1, `a CSV step of ${step} nm resolves bands 0.3 eV wide`);
    const conformers = exampleConformers();
    const p = boltzmann(conformers);
    // Σ p_c Σ R (length form, 10⁻⁴⁰ esu² cm²), and Σ p_c Σ D with D from f
    // through f = 8π² m_e c ν̃ D / (3 h e²) (the oscillator strength's definition).
    const rSum = conformers.reduce((s, c, i) => s + p[i] * c.transitions.reduce((a, t) => a + t.r, 0), 0);
    const dOf = (t) => (3 * PLANCK_ERG_S * ELEMENTARY_CHARGE_ESU ** 2 * t.f) / (8 * Math.PI ** 2 * ELECTRON_MASS_G * LIGHT_CM_PER_S * t.ev * CM1_PER_EV);
    const dSum = conformers.reduce((s, c, i) => s + p[i] * c.transitions.reduce((a, t) => a + dOf(t), 0), 0);
    assertClose((C_R * integralOverNu(at03.nm, at03.de)) / 1e-40, rSum, 0.01, "C_R ∫ Δε/ν dν against Σ p R");
    assertClose(4 * C_R * integralOverNu(at03.nm, at03.eps), dSum, 0.01, "C_D ∫ ε/ν dν against Σ p D");

    await typeInto(page, "#states-fwhm", "0.2");
    assert.equal((await docOf(page)).states.broadening.fwhm_ev, 0.2);
    const at02 = await exported(page);
    assert.equal(at02.nm.length, at03.nm.length);
    const peak = (de) => Math.max(...de.map(Math.abs));
    assert.ok(peak(at02.de) > 1.2 * peak(at03.de), `narrower bands peak higher: ${peak(at02.de)} vs ${peak(at03.de)}`);
    // The area stays: the same strengths in narrower bands.
    assertClose((C_R * integralOverNu(at02.nm, at02.de)) / 1e-40, rSum, 0.01, "C_R ∫ Δε/ν dν at 0.2 eV");

    // The velocity form, scaled by 2: twice the weighted sum of the velocity-form R.
    await page.selectOption("#states-form", "velocity");
    await typeInto(page, "#states-scale", "2");
    const rVelocity = conformers.reduce((s, c, i) => s + p[i] * c.transitions.reduce((a, t) => a + t.rv, 0), 0);
    assert.ok(Math.abs(rVelocity - rSum) > 0.05 * Math.abs(rSum), "the two forms differ enough to tell apart");
    const velocity = await exported(page);
    assertClose((C_R * integralOverNu(velocity.nm, velocity.de)) / 1e-40, 2 * rVelocity, 0.01, "C_R ∫ Δε/ν dν, velocity form × 2");
  } finally {
    await context.close();
  }
});

/**
 * An INVENTED "measured" CD: the example's transitions as Gaussians 0.3 eV
 * wide (FWHM) in wavenumber, weighted by their Boltzmann shares, moved by
 * `shiftEv`, times `sign`; Δε = ν R / C_R · G(ν), which integrates to R
 * (physics.md). Written by the test, not by the page.
 */
function inventedCd(shiftEv, sign) {
  const conformers = exampleConformers();
  const p = boltzmann(conformers);
  const sigma = (0.3 * CM1_PER_EV) / (2 * Math.sqrt(2 * Math.LN2));
  const lines = ["# INVENTED test spectrum: the example list broadened and shifted by the test", "wavelength (nm),delta epsilon (M-1 cm-1)"];
  for (let nm = 190; nm <= 330; nm += 0.5) {
    const nu = 1e7 / nm;
    let de = 0;
    conformers.forEach((c, i) =>
      c.transitions.forEach((t) => {
        const centre = (t.ev + shiftEv) * CM1_PER_EV;
        const g = Math.exp(-0.5 * ((nu - centre) / sigma) ** 2) / (sigma * Math.sqrt(2 * Math.PI));
        de += (sign * p[i] * t.r * 1e-40 * nu * g) / C_R;
      }),
    );
    lines.push(`${nm.toFixed(1)},${de.toPrecision(8)}`);
  }
  return lines.join("\n") + "\n";
}

test("the comparison finds a known shift and tells the configuration from its mirror image", async () => {
  const { page, context } = await withExample();
  try {
    assert.equal(await page.isDisabled("#states-compare-run"), true, "nothing to compare with yet");
    await dropBytes(page, "invented-shifted.csv", inventedCd(0.2, 1));
    await page.waitForFunction(() => document.querySelectorAll("#states-compare-set option").length === 1);
    await page.click("#states-compare-run");
    await page.waitForSelector("#states-compare-result:not([hidden])");
    const row = (key) => page.$eval(`#states-compare-${key}`, (tr) => ({ score: Number(tr.dataset.score), shift: Number(tr.dataset.shift) }));
    const computed = await row("computed");
    const mirror = await row("mirror");
    assert.ok(Math.abs(computed.shift - 0.2) <= 0.01, `best shift ${computed.shift} eV (the data were made 0.2 eV higher)`);
    assert.ok(computed.score > 0.99, `S of the same spectrum at its shift: ${computed.score}`);
    assert.ok(mirror.score < computed.score);
    assert.match(await page.textContent("#states-compare-verdict"), /^The computed configuration matches/);

    await dropBytes(page, "invented-mirrored.csv", inventedCd(0.2, -1));
    await page.waitForFunction(() => document.querySelectorAll("#states-compare-set option").length === 2);
    assert.equal(await page.isVisible("#states-compare-stale"), true, "the shown result is of other data now");
    await page.selectOption("#states-compare-set", { label: (await docOf(page)).data[1].name });
    await page.click("#states-compare-run");
    const mirrored = await row("mirror");
    assert.ok(Math.abs(mirrored.shift - 0.2) <= 0.01, `the mirror's best shift ${mirrored.shift} eV`);
    assert.ok(mirrored.score > 0.99);
    assert.match(await page.textContent("#states-compare-verdict"), /^The mirror image of the computed configuration matches/);
    assert.equal(await page.isVisible("#states-compare-stale"), false);

    // A range that is no number is named and nothing is computed.
    await typeInto(page, "#states-compare-from", "2x0");
    await page.click("#states-compare-run");
    assert.match(await messageFor(page, "#states-compare-from"), /From: “2x0” is not a number/);
  } finally {
    await context.close();
  }
});

test("a bad list is named by its line and changes nothing; a share of 150 % is refused and the last good spectra stay", async () => {
  const { page, context } = await withExample();
  try {
    const before = await docOf(page);
    await page.click("#states-paste summary");
    await page.click("#states-text");
    await page.keyboard.insertText("conformer A, energy 0.65\nenergy_eV f R\n4.5 0.1 5\n");
    await page.click("#states-read");
    const problem = await page.textContent("#states-problem");
    assert.match(problem, /line 1\b/, problem);
    assert.match(problem, /unit/, problem);
    assert.match(problem, /The model is unchanged/);
    assert.deepEqual(await docOf(page), before, "the model is as it was");

    await typeInto(page, "#states-share-0", "15", { enter: false });
    assert.deepEqual(await sharesShown(page), ["15.00 %", "85.00 %"]);
    const good = await canvasDigest(page, "plot-cd");
    await page.keyboard.type("0");
    assert.equal((await docOf(page)).states.conformers[0].share, 1.5, "the page keeps what was typed");
    const message = await messageFor(page, "#states-share-0");
    assert.match(message, /share of A/i, message);
    assert.match(message, /150 %/, message);
    assert.equal(await page.$eval("#plot-grid", (g) => g.classList.contains("stale")), true, "the plots say they are the last good model");
    assert.deepEqual(await canvasDigest(page, "plot-cd"), good, "the CD plot still shows 15 %");
    assert.deepEqual(await sharesShown(page), ["15.00 %", "85.00 %"], "the table says what the plots use");
  } finally {
    await context.close();
  }
});

test("the states section travels in the share link and in the model file", async () => {
  const { page, context } = await withExample();
  try {
    await typeInto(page, "#states-fwhm", "0.25");
    await typeInto(page, "#states-share-1", "30");
    await page.selectOption("#states-shape", "voigt");
    await page.selectOption("#states-form", "velocity");
    const doc = await docOf(page);
    assert.equal(doc.states.broadening.shape, "voigt");
    assert.equal(doc.states.broadening.velocity_form, true);
    const link = await pageLink(page);
    const other = await openPage(env, { path: link.slice(env.origin.length), context });
    assert.deepEqual((await docOf(other.page)).states, doc.states, "the section after the link's round trip");
    assert.deepEqual(await sharesShown(other.page), ["70.00 %", "30.00 %"]);
    assert.equal(await other.page.inputValue("#states-form"), "velocity");
    assert.equal(await other.page.inputValue("#states-lorentz") !== "", true, "the Voigt's Lorentzian width is shown");

    // And in the model file: saved, then opened in a new, empty model.
    const saved = await savedModel(page);
    other.page.on("dialog", (d) => d.accept());
    await other.page.click("#new-model");
    assert.equal((await docOf(other.page)).states, undefined);
    await other.page.setInputFiles("#file-input", { name: "states.chiroptic.json", mimeType: "application/json", buffer: Buffer.from(JSON.stringify(saved)) });
    await other.page.waitForSelector("#states-body:not([hidden])");
    assert.deepEqual((await docOf(other.page)).states, doc.states, "the section after the file's round trip");
  } finally {
    await context.close();
  }
});
