// Share links carry the whole document, view included, bit for bit: a link
// made by the command line opens in the page with the same numbers, the
// page's link opens in the command line as the same document, and a second
// page opened from the link draws pixel-identical plots. The link format is
// crate/src/link.rs; the Python-made links of fixtures/bad-links/corpus.json
// ("good") check it from outside the crate.
import { test } from "node:test";
import assert from "node:assert/strict";
import { readFileSync } from "node:fs";
import { join } from "node:path";
import { browserTests, openPage, ROOT } from "../lib/harness.mjs";
import { cli, docFile, enter, pageLink, plotHashes, savedModel } from "../lib/page.mjs";

const env = browserTests();

/** The part of a link after the origin: what openPage takes as its path. */
const pathOf = (url) => url.slice(env.origin.length);

// Invented test model whose numbers have no short decimal form: each must
// come back as the same double (0.1 + 0.2 and friends).
const AWKWARD = {
  chiroptic: 1,
  title: "INVENTED round-trip model (no real compound)",
  sample: {
    concentration_mol_per_l: (0.1 + 0.2) / 1000,
    path_length_cm: 1 / 3,
    molar_mass_g_per_mol: 312.40000000000003,
    solvent: { cauchy: { a: 1.3240000000000001, b_um2: 0.0031, c_um4: 1e-7 } },
  },
  bands: [
    { name: "A ↑", shape: "gaussian", center_nm: 1e7 / 33333, fwhm_cm1: 2600.0000000000005, rotatory_strength_1e40_cgs: -28.000000000000004, dipole_strength_debye2: 0.45 },
    { name: "B", shape: "voigt", center_nm: 212.34567890123457, fwhm_cm1: 3000, lorentz_fwhm_cm1: 1200.1, rotatory_strength_1e40_cgs: 22, dipole_strength_debye2: 9 },
  ],
  view: {
    axis_unit: "cm-1",
    range_nm: [190.12345678901234, 449.99999999999994],
    points: 1234,
    cd_unit: "delta_epsilon",
    ord_unit: "specific_rotation",
    plots: ["cd", "ord", "index"],
  },
};

test("a link made by the CLI opens in the page with the same numbers and view", async () => {
  const url = cli("link", docFile(AWKWARD), "--base", `${env.origin}/`).trim();
  assert.ok(url.startsWith(`${env.origin}/#c1.`), url.slice(0, 60));
  const { page, context, log } = await openPage(env, { path: pathOf(url) });
  try {
    // deepEqual compares numbers with Object.is: the same doubles, bit for bit.
    assert.deepEqual(await savedModel(page), AWKWARD);
    assert.equal(await page.inputValue("#axis-unit"), "cm-1");
    assert.equal(await page.inputValue("#cd-unit"), "delta_epsilon");
    assert.equal(await page.inputValue("#points"), "1234");
    const shown = await page.$$eval(".plot", (figs) => figs.filter((f) => !f.hidden).map((f) => f.dataset.plot));
    assert.deepEqual(shown, ["cd", "ord", "index"]);
    assert.equal(await page.isVisible("#notice"), false, "no message");
    assert.deepEqual(log.errors, []);
  } finally {
    await context.close();
  }
});

test("the page's link opens in the CLI as the same document, and in a new page as the same plots", async () => {
  const { page, context, log } = await openPage(env);
  let link;
  let first;
  let doc;
  try {
    // Edits through the controls: a centre typed in cm⁻¹, a unit, a window, a hidden plot.
    await page.selectOption("#center-unit", "cm-1");
    await enter(page, "#band-0-center", "33333");
    await page.selectOption("#ord-unit", "specific_rotation");
    await enter(page, "#range-from", "190");
    await page.uncheck("#show-abs");
    link = await pageLink(page);
    doc = await savedModel(page);
    first = await plotHashes(page);
    assert.deepEqual(doc.view.plots, ["cd", "ord", "index"]);
    assert.match(await page.textContent("#link-length"), new RegExp(`^${link.length} characters`));
    // The address follows the model too (a moment after the last edit).
    await page.waitForFunction((l) => location.href === l, link);
    assert.deepEqual(log.errors, []);
  } finally {
    await context.close();
  }
  assert.deepEqual(JSON.parse(cli("open", link)), doc, "chiroptic open gives the page's document");

  const second = await openPage(env, { path: pathOf(link) });
  try {
    assert.deepEqual(await savedModel(second.page), doc);
    const hashes = await plotHashes(second.page);
    for (const key of ["cd", "ord", "index"]) assert.equal(hashes[key], first[key], `${key} plot is pixel-identical`);
    assert.deepEqual(second.log.errors, []);
  } finally {
    await second.context.close();
  }
});

test("a 10-band model typed partly in cm⁻¹ makes a link under 600 characters", async () => {
  const { page, context } = await openPage(env);
  try {
    while ((await page.locator("tr.band-row").count()) < 10) await page.click("#add-band");
    // Centres and widths typed in display units convert to nm and cm⁻¹ in place.
    await page.selectOption("#center-unit", "cm-1");
    await page.selectOption("#width-unit", "nm");
    const typed = [41234, 38765, 36111, 47321, 44444, 39999, 35123];
    for (const [k, cm1] of typed.entries()) {
      await enter(page, `#band-${k + 3}-center`, String(cm1));
      await enter(page, `#band-${k + 3}-width`, String(20 + k));
      await enter(page, `#band-${k + 3}-r`, String(-3.5 + k));
    }
    const doc = await savedModel(page);
    assert.equal(doc.bands.length, 10);
    for (const [k, cm1] of typed.entries()) {
      const nm = doc.bands[k + 3].center_nm;
      // The shortest stored value that reads back as the typed number to the
      // 12 digits a focused box shows (1e7 / λ: common practice).
      assert.equal(Number((1e7 / nm).toPrecision(12)), cm1, `band ${k + 4} centre reads back as typed`);
      assert.ok(String(nm).replace(/^0\.0*|[-.]|e.*$/g, "").length <= 13, `band ${k + 4} centre stored short: ${nm}`);
    }
    // The demo's title alone (85 characters of prose) takes about 100 characters
    // of link; a model is named more briefly in practice.
    const demoTitled = await pageLink(page);
    await page.fill("#doc-title", "INVENTED 10-band test model");
    const link = await pageLink(page);
    const fragment = link.slice(link.indexOf("#") + 1);
    console.log(
      `# 10-band link: ${link.length} characters (fragment ${fragment.length}, address ${link.length - fragment.length}); ` +
        `with the demo's long title ${demoTitled.length}`,
    );
    assert.ok(link.length < 600, `the link is ${link.length} characters`);
    assert.deepEqual(JSON.parse(cli("open", link)), { ...doc, title: "INVENTED 10-band test model" });
  } finally {
    await context.close();
  }
});

test("links made by Python (corpus 'good') open as their documents", async () => {
  const corpus = JSON.parse(readFileSync(join(ROOT, "fixtures", "bad-links", "corpus.json"), "utf8"));
  assert.ok(corpus.good.length >= 2);
  const { page, context, log } = await openPage(env);
  try {
    for (const good of corpus.good) {
      const fragment = good.link.slice(good.link.indexOf("#") + 1);
      await page.evaluate((f) => (location.hash = f), fragment);
      await page.waitForFunction((t) => document.getElementById("doc-title").value === t, good.document.title);
      // The Python document spells whole numbers as floats; JSON numbers are equal either way.
      assert.deepEqual(await savedModel(page), good.document, good.name);
      assert.equal(await page.isVisible("#notice"), false, `${good.name}: no message`);
    }
    // Opening a link is an edit like any other: undo returns to the model before.
    const titles = corpus.good.map((g) => g.document.title);
    const earlier = [...titles].reverse().find((t) => t !== titles.at(-1));
    await page.click("#undo");
    assert.equal((await savedModel(page)).title, earlier);
    assert.deepEqual(log.errors, []);
  } finally {
    await context.close();
  }
});
