// The four plots share one spectral window: zooming one (dragging across it)
// redraws all of them on the new window; double-click fits the bands again.
// The pointer reads values off every plot at once.
import { test } from "node:test";
import assert from "node:assert/strict";
import { browserTests, openPage } from "../lib/harness.mjs";
import { plotHashes, savedModel } from "../lib/page.mjs";

const env = browserTests();

/**
 * The window "Frame bands" promises (help panel): every centre ± 3 full
 * widths in wavenumber, whole nm outward, inside the water series' 182–1129
 * nm. Computed here on its own: λ/nm = 10⁷ / (ν̃/cm⁻¹).
 */
function framed(doc) {
  let lo = Infinity;
  let hi = -Infinity;
  for (const b of doc.bands) {
    const nu = 1e7 / b.center_nm;
    const reach = 3 * (b.fwhm_cm1 + (b.lorentz_fwhm_cm1 ?? 0));
    lo = Math.min(lo, 1e7 / (nu + reach));
    hi = Math.max(hi, 1e7 / Math.max(nu - reach, nu / 4));
  }
  return [Math.max(182, Math.floor(lo)), Math.min(1129, Math.ceil(hi))];
}

test("dragging across one plot zooms all four; double-click fits the bands", async () => {
  const { page, context, log } = await openPage(env);
  try {
    const before = await plotHashes(page);
    const box = await page.locator('.plot[data-plot="ord"] .canvas-box').boundingBox();
    const y = box.y + box.height / 2;
    await page.mouse.move(box.x + box.width * 0.3, y);
    await page.mouse.down();
    await page.mouse.move(box.x + box.width * 0.5, y, { steps: 5 });
    await page.mouse.move(box.x + box.width * 0.6, y, { steps: 5 });
    await page.mouse.up();
    const zoomed = await plotHashes(page);
    for (const key of ["cd", "ord", "abs", "index"]) assert.notEqual(zoomed[key], before[key], `${key} follows the zoom`);
    const range = (await savedModel(page)).view.range_nm;
    assert.ok(range[0] > 180 && range[1] < 650 && range[0] < range[1], `zoomed window ${range}`);
    assert.equal(Number(await page.inputValue("#range-from")), Number(range[0].toPrecision(5)));

    await page.dblclick('.plot[data-plot="cd"] .canvas-box');
    const doc = await savedModel(page);
    assert.deepEqual(doc.view.range_nm, framed(doc), "the window frames the bands again");
    assert.deepEqual(log.errors, []);
  } finally {
    await context.close();
  }
});

test("the pointer reads every plot at the same wavelength", async () => {
  const { page, context } = await openPage(env);
  try {
    const box = await page.locator('.plot[data-plot="abs"] .canvas-box').boundingBox();
    await page.mouse.move(box.x + box.width * 0.5, box.y + box.height * 0.5);
    const parts = await page.$$eval("#readout span[data-plot]", (s) => s.map((e) => e.dataset.plot));
    assert.deepEqual(parts, ["x", "cd", "ord", "abs", "index"]);
    const text = await page.textContent("#readout");
    assert.match(text, /λ [\d.]+ nm/);
    assert.match(text, /ε = .* M⁻¹ cm⁻¹/);
    await page.mouse.move(box.x - 40, box.y - 40);
    assert.match(await page.textContent("#readout"), /Point at a plot/);
  } finally {
    await context.close();
  }
});

test("hiding a plot closes the grid up and the others stay drawn", async () => {
  const { page, context } = await openPage(env);
  try {
    await page.uncheck("#show-index");
    await page.uncheck("#show-abs");
    assert.equal(await page.locator('.plot[data-plot="index"]').isVisible(), false);
    assert.deepEqual((await savedModel(page)).view.plots, ["cd", "ord"]);
    await page.waitForFunction(() => document.getElementById("plot-cd").height > 0);
    const cd = await page.$eval("#plot-cd", (c) => c.getContext("2d").getImageData(0, 0, c.width, c.height).data.some((v, i) => i % 4 === 0 && v < 128));
    assert.ok(cd, "the CD plot has dark (drawn) pixels");
  } finally {
    await context.close();
  }
});
