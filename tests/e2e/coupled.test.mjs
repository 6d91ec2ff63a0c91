// Chromophores in space (coupled systems): the couplet made on the page obeys
// the exciton chirality rule and the mirror symmetry of CD, its sliders and
// table are driven as a person does (key by key, the mouse on the thumbs and
// on the 3-D view), a bad entry is named and leaves the last good spectra,
// undo restores the geometry, and a model with a system travels in the link
// and in the model file.
import { test } from "node:test";
import assert from "node:assert/strict";
import { browserTests, openPage, canvasDigest } from "../lib/harness.mjs";
import { downloadText, parseCsv, plotHashes, typeInto, messageFor, pageLink, savedModel } from "../lib/page.mjs";

const env = browserTests();

const docOf = (page) => page.evaluate(() => window.chiroptic.document());
const field = (path) => `input[data-field="${path}"]`;
const pos = (j, k) => field(`systems[0].chromophores[${j}].position_angstrom[${k}]`);

/** A page on a new, empty model with one couplet made of a new transition. */
async function couplet() {
  const opened = await openPage(env);
  opened.page.on("dialog", (d) => d.accept());
  await opened.page.click("#new-model");
  await opened.page.click("#make-couplet");
  const doc = await docOf(opened.page);
  assert.equal(doc.systems.length, 1, "one system made");
  assert.equal(doc.systems[0].chromophores.length, 2, "of two chromophores");
  assert.equal(doc.bands.length, 0, "and no bands");
  return opened;
}

/** Δε against wavelength from the page's CSV export (Spectra as CSV). */
async function deltaEpsilon(page) {
  const { text } = await downloadText(page, "#save-csv");
  const { header, rows } = parseCsv(text);
  const x = header.indexOf("wavelength_nm");
  const y = header.indexOf("delta_epsilon_M-1_cm-1");
  assert.ok(x >= 0 && y >= 0, `CSV columns: ${header.join(",")}`);
  return rows.map((r) => [Number(r[x]), Number(r[y])]);
}

/** The signed extreme of Δε on each side of the transition's centre. */
function lobes(cd, centreNm) {
  const extreme = (pts) => pts.reduce((a, p) => (Math.abs(p[1]) > Math.abs(a) ? p[1] : a), 0);
  return { long: extreme(cd.filter(([l]) => l > centreNm)), short: extreme(cd.filter(([l]) => l < centreNm)) };
}

const peak = (cd) => Math.max(...cd.map(([, v]) => Math.abs(v)));

/** Types a twist key by key and waits for the redraw. */
async function twist(page, text) {
  await typeInto(page, "#couplet-twist", text);
  assert.equal(await messageFor(page, "#couplet-twist"), "", `twist ${text} accepted`);
}

test("a couplet follows the exciton chirality rule, θ → −θ negates its CD, θ = 0° and 180° give none", async () => {
  const { page, context } = await couplet();
  try {
    const centre = (await docOf(page)).systems[0].chromophores[0].transitions[0].center_nm;
    await twist(page, "45");
    const plus = await deltaEpsilon(page);
    // Exciton chirality rule (common practice; Harada and Nakanishi, Acc. Chem.
    // Res. 5, 257 (1972)): a positive twist between the two dipoles gives a
    // positive long-wavelength and a negative short-wavelength Cotton effect.
    const l = lobes(plus, centre);
    assert.ok(l.long > 0 && l.short < 0, `lobes at +45°: long ${l.long}, short ${l.short}`);
    assert.ok(peak(plus) > 1, `a couplet to see (peak |Δε| ${peak(plus)} M⁻¹ cm⁻¹)`);

    // The mirror image (θ → −θ is a reflection through the plane of the axis and
    // the first dipole) has the opposite CD at every wavelength (CD is odd under
    // reflection: the definition of enantiomers' CD).
    await twist(page, "-45");
    const minus = await deltaEpsilon(page);
    assert.equal(minus.length, plus.length);
    const p = peak(plus);
    minus.forEach(([lambda, v], i) => assert.ok(Math.abs(v + plus[i][1]) <= 1e-12 * p, `at ${lambda} nm: ${v} vs ${plus[i][1]}`));
    const m = lobes(minus, centre);
    assert.ok(m.long < 0 && m.short > 0, "at −45° the long-wavelength lobe is negative");

    // Coplanar dipoles (θ = 0°, 180°) have a mirror plane: an achiral pair, no CD.
    for (const t of ["0", "180"]) {
      await twist(page, t);
      const flat = await deltaEpsilon(page);
      assert.ok(peak(flat) <= 1e-12 * p, `θ = ${t}°: peak |Δε| ${peak(flat)} against ${p} at 45°`);
    }
  } finally {
    await context.close();
  }
});

/** The screen x of a range input's thumb at `value` (Chromium's thumb is about 16 px wide). */
async function thumbX(page, selector, value) {
  const box = await page.locator(selector).boundingBox();
  const [min, max] = await page.$eval(selector, (s) => [Number(s.min), Number(s.max)]);
  const inner = box.width - 16;
  return { x: box.x + 8 + ((value - min) / (max - min)) * inner, y: box.y + box.height / 2 };
}

test("dragging the twist slider redraws live, flips the couplet through 0°, and is one undo step", async () => {
  const { page, context } = await couplet();
  try {
    const slider = "#couplet-twist + .slider";
    const centre = (await docOf(page)).systems[0].chromophores[0].transitions[0].center_nm;
    await twist(page, "60");
    const before = await docOf(page);
    const cdBefore = lobes(await deltaEpsilon(page), centre);
    assert.ok(cdBefore.long > 0, "positive couplet at +60°");

    const from = await thumbX(page, slider, 60);
    const to = await thumbX(page, slider, -60);
    let redraws = 0;
    await page.exposeFunction("countRedraw", () => redraws++);
    await page.evaluate(() => document.addEventListener("chiroptic:updated", () => window.countRedraw()));
    await page.mouse.move(from.x, from.y);
    await page.mouse.down();
    await page.mouse.move((from.x + to.x) / 2, from.y, { steps: 8 });
    // A pause longer than the 1 s in which typing merges: still the same drag.
    await page.waitForTimeout(1300);
    await page.mouse.move(to.x, to.y, { steps: 8 });
    await page.mouse.up();
    assert.ok(redraws >= 4, `redrawn while dragging (${redraws} times)`);
    const shown = Number(await page.inputValue("#couplet-twist"));
    assert.ok(shown < -40 && shown > -80, `the twist box follows the thumb (${shown})`);
    const after = lobes(await deltaEpsilon(page), centre);
    assert.ok(after.long < 0 && after.short > 0, `negative couplet after the drag to ${shown}° (exciton chirality rule, as above)`);

    await page.click("#undo");
    assert.deepEqual(await docOf(page), before, "one undo restores the geometry before the drag");
    assert.equal(Number(await page.inputValue("#couplet-twist")), 60);
  } finally {
    await context.close();
  }
});

test("dragging the 3-D view turns it and leaves the model and the spectra as they are", async () => {
  const { page, context } = await couplet();
  try {
    const doc = await docOf(page);
    const plots = await plotHashes(page);
    const undoable = await page.isEnabled("#undo");
    const view0 = await canvasDigest(page, "chromophore-view");
    assert.ok(view0.inked > 500, `the view shows something (${view0.inked} pixels)`);
    const box = await page.locator("#chromophore-view").boundingBox();
    await page.mouse.move(box.x + box.width * 0.3, box.y + box.height * 0.5);
    await page.mouse.down();
    await page.mouse.move(box.x + box.width * 0.7, box.y + box.height * 0.35, { steps: 10 });
    await page.mouse.up();
    await page.evaluate(() => new Promise((ok) => requestAnimationFrame(() => requestAnimationFrame(ok))));
    const view1 = await canvasDigest(page, "chromophore-view");
    assert.notEqual(view1.hash, view0.hash, "the view turned");
    assert.deepEqual(await docOf(page), doc, "the document is unchanged");
    assert.deepEqual(await plotHashes(page), plots, "the spectra are unchanged");
    assert.equal(await page.isEnabled("#undo"), undoable, "no undo step for turning the view");
  } finally {
    await context.close();
  }
});

test("the table takes typing key by key, directions as angles, and undo restores the geometry", async () => {
  const { page, context } = await couplet();
  try {
    const start = await docOf(page);
    const z = pos(1, 2);
    await page.click(z);
    await page.keyboard.press("Control+A");
    await page.keyboard.type("-1.5", { delay: 20 });
    // Half-typed "-" was a complaint, not a loss: the box holds every key typed.
    assert.equal(await page.inputValue(z), "-1.5");
    assert.deepEqual((await docOf(page)).systems[0].chromophores[1].position_angstrom, [0, 0, -1.5]);
    await page.keyboard.press("Tab");
    // The pair's distance follows the positions: |−1.5 − (−4)| = 2.5 Å.
    assert.equal(Number(await page.inputValue("#couplet-distance")), 2.5);

    // An angle typed into a direction held as a vector makes it two angles.
    await typeInto(page, field("systems[0].chromophores[1].direction.azimuth_deg"), "30");
    const d = (await docOf(page)).systems[0].chromophores[1].direction;
    assert.deepEqual(d, { polar_deg: 90, azimuth_deg: 30 });
    // The vector shown is (sin θ cos φ, sin θ sin φ, cos θ) (ISO 80000-2 spherical angles).
    const vector = await page.textContent('#chromophore-rows [data-vector="1"]');
    assert.equal(vector, "→ (0.866, 0.5, 0)");
    assert.equal(Number(await page.inputValue("#couplet-twist")), 30, "the twist read back from the angles");

    await page.focus("#add-chromophore");
    await page.click("#undo");
    await page.click("#undo");
    assert.deepEqual(await docOf(page), start, "two undos: the couplet as made");
    assert.equal(await page.inputValue(z), "4");
  } finally {
    await context.close();
  }
});

test("a bad entry is named where it was made and the last good spectra stay", async () => {
  const { page, context } = await couplet();
  try {
    const doc = await docOf(page);
    const plots = await plotHashes(page);

    // A distance that puts the two chromophores under 0.1 Å apart (the core's
    // limit for point dipoles), typed key by key.
    await typeInto(page, "#couplet-distance", "0.05");
    const said = await messageFor(page, "#couplet-distance");
    assert.match(said, /Distance/, said);
    assert.match(said, /at least 0\.1 Å apart \(got 0\.05 Å\)/, said);
    assert.equal(await page.inputValue("#couplet-distance"), "0.05", "what was typed stays");
    assert.deepEqual(await docOf(page), doc, "the document keeps the last good geometry");
    assert.deepEqual(await plotHashes(page), plots, "the last good spectra stay");
    assert.ok(await page.$eval("#plot-grid", (g) => g.classList.contains("stale")), "the plots are marked stale");
    await typeInto(page, "#couplet-distance", "8");
    assert.equal(await messageFor(page, "#couplet-distance"), "");

    // The same fault through the table: the front chromophore moved next to the back one.
    // Key by key, "-3.9" still draws (0.1 Å apart); the last key makes it 0.05 Å.
    await typeInto(page, pos(1, 2), "-3.9", { enter: false });
    assert.equal(await page.textContent("#chromophore-1-error"), "");
    const lastGood = await plotHashes(page);
    assert.notDeepEqual(lastGood, plots, "the pair at 0.1 Å drew");
    await page.keyboard.type("5");
    const row = await page.textContent("#chromophore-1-error");
    assert.match(row, /chromophore 2 \(front\)/, row);
    assert.match(row, /at least 0\.1 Å apart/, row);
    assert.equal(await page.inputValue(pos(1, 2)), "-3.95", "what was typed stays");
    assert.deepEqual(await plotHashes(page), lastGood, "the last good spectra stay");
    assert.match(await page.textContent("#status"), /last valid model/);
    await typeInto(page, pos(1, 2), "4");
    assert.equal(await page.textContent("#chromophore-1-error"), "");
    assert.deepEqual(await plotHashes(page), plots, "the couplet as made draws again");

    // Not a number.
    const centre = field("systems[0].chromophores[0].transitions[0].center_nm");
    await typeInto(page, centre, "NaN");
    assert.match(await messageFor(page, centre), /“NaN” is not a number/);
    assert.equal(await page.inputValue(centre), "NaN");
    assert.deepEqual(await plotHashes(page), plots);
  } finally {
    await context.close();
  }
});

test("a model with a coupled system travels in the share link and in the model file", async () => {
  const { page, context } = await couplet();
  try {
    await twist(page, "-30");
    await page.click("#system-screened");
    await typeInto(page, field("systems[0].chromophores[0].transitions[0].rotatory_strength_1e40_cgs"), "2");
    const doc = await docOf(page);
    assert.equal(doc.systems[0].screened, true);
    const cd = await deltaEpsilon(page);

    const link = await pageLink(page);
    const viaLink = await openPage(env, { path: `/${link.slice(link.indexOf("#"))}` });
    try {
      assert.deepEqual(await docOf(viaLink.page), doc, "the link holds the system");
      assert.deepEqual(await deltaEpsilon(viaLink.page), cd, "and draws the same CD");
      assert.equal(Number(await viaLink.page.inputValue("#couplet-twist")), -30);
    } finally {
      await viaLink.context.close();
    }

    const saved = await savedModel(page);
    assert.deepEqual(saved.systems, doc.systems, "the file holds the system");
    const fresh = await openPage(env);
    try {
      await fresh.page.setInputFiles("#file-input", { name: "couplet.json", mimeType: "application/json", buffer: Buffer.from(JSON.stringify(saved)) });
      await fresh.page.waitForFunction(() => (window.chiroptic.document().systems ?? []).length === 1);
      assert.deepEqual(await docOf(fresh.page), doc, "the file opens as the same model");
      assert.deepEqual(await deltaEpsilon(fresh.page), cd);
    } finally {
      await fresh.context.close();
    }
  } finally {
    await context.close();
  }
});
