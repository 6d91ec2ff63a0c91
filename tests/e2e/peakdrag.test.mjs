// Direct manipulation (design note page.md): dragging a band's peak on the
// CD plot moves its centre across and scales its rotatory strength up and
// down, the other bands stay, all plots follow, and the drag is one edit for
// undo. The expected strength follows from CD being proportional to R
// (physics.md: Δε of a band ∝ R_j); the centre from the plot's axis.
import { test } from "node:test";
import assert from "node:assert/strict";
import { browserTests, openPage } from "../lib/harness.mjs";
import { plotHashes } from "../lib/page.mjs";

const env = browserTests();

test("dragging a band's CD peak moves its centre and strength", async () => {
  const { page, context, log } = await openPage(env);
  try {
    const before = await page.evaluate(() => window.chiroptic.document());
    const plots = await plotHashes(page);
    const handles = await page.evaluate(() => window.chiroptic.bandHandles());
    assert.equal(handles.length, 3, "a handle per band of the demo");
    const h = handles.find((x) => x.i === 0);
    const box = await page.locator('.plot[data-plot="cd"] .canvas-box').boundingBox();
    await page.mouse.move(box.x + h.px, box.y + h.py);
    assert.equal(await page.$eval('.plot[data-plot="cd"] .canvas-box', (b) => b.classList.contains("over-peak")), true, "the peak shows it can be grabbed");
    await page.mouse.down();
    // 40 px to the right and 25 px up: a longer wavelength, a larger R.
    const target = { px: h.px + 40, py: h.py - 25 };
    await page.mouse.move(box.x + target.px, box.y + target.py, { steps: 8 });
    await page.mouse.up();
    await page.waitForFunction((r) => window.chiroptic.document().bands[0].rotatory_strength_1e40_cgs !== r, before.bands[0].rotatory_strength_1e40_cgs);
    const after = await page.evaluate(() => window.chiroptic.document());
    const b0 = before.bands[0];
    const b1 = after.bands[0];
    assert.ok(b1.center_nm > b0.center_nm + 5, `centre moved right: ${b0.center_nm} → ${b1.center_nm} nm`);
    assert.ok(b1.rotatory_strength_1e40_cgs > b0.rotatory_strength_1e40_cgs, `R grew: ${b0.rotatory_strength_1e40_cgs} → ${b1.rotatory_strength_1e40_cgs}`);
    assert.deepEqual(after.bands.slice(1), before.bands.slice(1), "the other bands stay");
    assert.equal(b1.fwhm_cm1, b0.fwhm_cm1);
    // The band's peak now sits under the pointer (to the grid step and the
    // rounding of the stored numbers).
    const moved = (await page.evaluate(() => window.chiroptic.bandHandles())).find((x) => x.i === 0);
    assert.ok(Math.abs(moved.px - target.px) <= 4, `peak at x ${moved.px}, pointer at ${target.px}`);
    assert.ok(Math.abs(moved.py - target.py) <= 6, `peak at y ${moved.py}, pointer at ${target.py}`);
    // The fields show the new numbers, and every plot follows.
    assert.equal(Number(await page.inputValue("#band-0-r")), b1.rotatory_strength_1e40_cgs);
    const now = await plotHashes(page);
    for (const key of ["cd", "ord", "abs", "index"]) assert.notEqual(now[key], plots[key], `${key} redrawn`);
    // One drag, one undo.
    await page.click("#undo");
    assert.deepEqual(await page.evaluate(() => window.chiroptic.document()), before);
    assert.equal(await page.isDisabled("#undo"), true);
    assert.deepEqual(log.errors, []);
  } finally {
    await context.close();
  }
});

test("a drag that does not start on a peak still zooms", async () => {
  const { page, context } = await openPage(env);
  try {
    const box = await page.locator('.plot[data-plot="cd"] .canvas-box').boundingBox();
    const y = box.y + 12; // the top of the plot: no peak there
    await page.mouse.move(box.x + box.width * 0.5, y);
    await page.mouse.down();
    await page.mouse.move(box.x + box.width * 0.7, y, { steps: 5 });
    await page.mouse.up();
    const doc = await page.evaluate(() => window.chiroptic.document());
    assert.ok(doc.view?.range_nm, "the window was zoomed");
    assert.equal(doc.bands[0].center_nm, 300, "no band moved");
  } finally {
    await context.close();
  }
});
