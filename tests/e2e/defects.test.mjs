// The defects a first real use of the page found (issue 8), each driven as a
// person would: typing key by key, clicking, dragging with the mouse. Each
// test names its defect; each failed on the page before the fix.
import { test } from "node:test";
import assert from "node:assert/strict";
import { browserTests, openPage } from "../lib/harness.mjs";
import { linesTable, plotHashes, messageFor, typeInto, downloadText, downloadBytes, pngSize } from "../lib/page.mjs";

const env = browserTests();

const docOf = (page) => page.evaluate(() => window.chiroptic.document());

test("1: a window end applies on Enter, never half-typed, never reordered", async () => {
  const { page, context } = await openPage(env);
  try {
    const before = await docOf(page);
    await page.click("#range-to");
    await page.keyboard.press("Control+A");
    // "3", then "30": neither is applied nor called an error while typing.
    for (const key of ["3", "0"]) {
      await page.keyboard.type(key);
      assert.equal(await messageFor(page, "#range-to"), "", `no message after "${key}"`);
      assert.deepEqual((await docOf(page)).view, before.view, `nothing applied after "${key}"`);
    }
    await page.keyboard.type("0");
    await page.keyboard.press("Enter");
    assert.deepEqual((await docOf(page)).view.range_nm, [182, 300], "182–300 nm after Enter");
    // An end below the start is named, not swapped.
    await typeInto(page, "#range-to", "150");
    assert.match(await messageFor(page, "#range-to"), /end must lie above the start \(182 nm\)/);
    assert.deepEqual((await docOf(page)).view.range_nm, [182, 300], "the window is kept");
    // Leaving the box after typing applies it too.
    await typeInto(page, "#range-to", "320", { enter: false });
    await page.keyboard.press("Tab");
    await page.waitForFunction(() => window.chiroptic.document().view.range_nm[1] === 320);
  } finally {
    await context.close();
  }
});

for (const [width, scheme] of [[1280, "light"], [800, "dark"]]) {
  test(`2: the sign-convention notes wrap inside the window (${width} px, ${scheme})`, async () => {
    const { page, context } = await openPage(env, { width, colorScheme: scheme });
    try {
      for (const key of ["cd", "ord", "abs", "index"]) {
        await page.hover(`.plot[data-plot="${key}"] .hint`);
        const tip = page.locator(`#hint-${key}`);
        await tip.waitFor({ state: "visible" });
        const box = await tip.boundingBox();
        const fits = await tip.evaluate((t) => t.scrollWidth <= t.clientWidth + 1);
        assert.ok(box.x >= 0 && box.x + box.width <= width, `${key} note inside the window (${box.x}..${box.x + box.width})`);
        assert.ok(fits, `${key} note text stays in its box`);
        assert.ok(box.height > 40, `${key} note wraps onto several lines (${box.height} px high)`);
        await page.mouse.move(0, 0);
      }
    } finally {
      await context.close();
    }
  });
}

test("3: a model file with a bad value is refused as a whole", async () => {
  const { page, context } = await openPage(env);
  try {
    const before = await docOf(page);
    const plots = await plotHashes(page);
    const lines = await linesTable(page);
    await page.setInputFiles("#file-input", {
      name: "bad-width.json",
      mimeType: "application/json",
      buffer: Buffer.from('{"chiroptic": 1, "title": "bad", "sample": {"concentration_mol_per_l": 0.001, "path_length_cm": 1, "solvent": {"constant": 1.33}}, "bands": [{"shape": "gaussian", "center_nm": 300, "fwhm_cm1": -5, "rotatory_strength_1e40_cgs": 1, "dipole_strength_debye2": 1}]}'),
    });
    await page.waitForFunction(() => /bad-width\.json/.test(document.getElementById("status").textContent));
    const status = await page.textContent("#status");
    assert.match(status, /width must be positive/);
    assert.match(status, /unchanged/);
    assert.doesNotMatch(status, /Opened/);
    assert.deepEqual(await docOf(page), before, "the band list keeps the model");
    assert.deepEqual(await plotHashes(page), plots);
    assert.deepEqual(await linesTable(page), lines);
  } finally {
    await context.close();
  }
});

test("4: the lamp-line table is marked stale with the plots", async () => {
  const { page, context } = await openPage(env);
  try {
    assert.equal(await page.$eval("#lamp-lines", (s) => s.classList.contains("stale")), false);
    await typeInto(page, "#band-1-width", "-5", { enter: false });
    assert.equal(await page.$eval("#lamp-lines", (s) => s.classList.contains("stale")), true, "stale with a refused width");
    assert.equal(await page.isVisible("#lines-stale"), true, "said in words");
    const opacity = await page.$eval("#lines-rows td", (td) => Number(getComputedStyle(td).opacity));
    assert.ok(opacity < 1, "the stale values are dimmed");
    await typeInto(page, "#band-1-width", "3000", { enter: false });
    assert.equal(await page.$eval("#lamp-lines", (s) => s.classList.contains("stale")), false);
    // Clearing the molar mass the [α] column and the mass unit need: the same.
    await page.selectOption("#cd-unit", "specific_ellipticity").catch(() => {});
  } finally {
    await context.close();
  }
});

test("5: dragging a CD peak holds the axis still and keeps the sign", async () => {
  const { page, context } = await openPage(env);
  try {
    const r0 = (await docOf(page)).bands[0].rotatory_strength_1e40_cgs;
    assert.ok(r0 > 0, "the demo's first band has R > 0");
    const cd = async () => (await page.evaluate(() => window.chiroptic.frames())).find((f) => f.plot === "cd");
    const axis = (await cd()).y_range;
    const h = (await page.evaluate(() => window.chiroptic.bandHandles())).find((x) => x.i === 0);
    const box = await page.locator('.plot[data-plot="cd"] .canvas-box').boundingBox();
    await page.mouse.move(box.x + h.px, box.y + h.py);
    await page.mouse.down();
    // 32 px up in small steps, as a hand moves.
    for (let k = 1; k <= 8; k++) {
      await page.mouse.move(box.x + h.px, box.y + h.py - 4 * k);
      assert.deepEqual((await cd()).y_range, axis, `the CD axis holds at step ${k}`);
    }
    await page.mouse.up();
    const r1 = (await docOf(page)).bands[0].rotatory_strength_1e40_cgs;
    assert.ok(r1 > r0, `R grew and kept its sign: ${r0} → ${r1}`);
    // The peak sits under the pointer on the held axis: R scales with the height.
    const peak = (await page.evaluate(() => window.chiroptic.bandHandles())).find((x) => x.i === 0);
    assert.ok(Math.abs(peak.py - (h.py - 32)) <= 4, `peak at ${peak.py}, pointer at ${h.py - 32}`);
  } finally {
    await context.close();
  }
});

test("6: an impossible |g| is refused with its limit; g has gaps where there is no absorption", async () => {
  const { page, context } = await openPage(env);
  try {
    const plots = await plotHashes(page);
    // The example: R = 300 with D = 0.01 would give g = 12.
    await typeInto(page, "#band-0-r", "300", { enter: false });
    const drawn = await plotHashes(page);
    await typeInto(page, "#band-0-d", "0.01", { enter: false });
    const message = await messageFor(page, "#band-0-d");
    assert.match(message, /band 1/i);
    assert.match(message, /4\|R\|\/D would exceed 2/);
    assert.deepEqual(await plotHashes(page), drawn, "the last good plots stay");
    await page.click("#undo");
    await page.click("#undo");
    assert.notDeepEqual(await plotHashes(page), drawn);
    assert.deepEqual(await plotHashes(page), plots, "back to the demo");
    // g: the readout far from every band (ε below 1e-3 of its maximum) has no value.
    await page.selectOption("#cd-unit", "g");
    const box = await page.locator('.plot[data-plot="cd"] .canvas-box').boundingBox();
    const f = (await page.evaluate(() => window.chiroptic.frames())).find((x) => x.plot === "cd");
    await page.mouse.move(box.x + f.right - 3, box.y + (f.top + f.bottom) / 2);
    const g = await page.textContent('#readout span[data-plot="cd"]');
    assert.match(g, /= —/, `no g value at the long-wavelength end: ${g}`);
  } finally {
    await context.close();
  }
});

test("7: exports take a size and a font size", async () => {
  const { page, context } = await openPage(env);
  try {
    await page.click("#export-menu summary");
    await page.selectOption("#export-preset", "column");
    const { text } = await downloadText(page, "#export-cd-svg");
    assert.match(text, /^<svg width="321" height="240"/, "one journal column");
    const fontOf = (svg) => Math.max(...[...svg.matchAll(/font-size="([\d.]+)"/g)].map((m) => Number(m[1])));
    const { bytes } = await downloadBytes(page, "#export-cd-png-2");
    assert.deepEqual(pngSize(bytes), [642, 480]);
    await page.selectOption("#export-preset", "custom");
    await typeInto(page, "#export-width", "500", { enter: false });
    await typeInto(page, "#export-height", "300", { enter: false });
    await typeInto(page, "#export-font", "18", { enter: false });
    const custom = await downloadText(page, "#export-cd-svg");
    assert.match(custom.text, /^<svg width="500" height="300"/);
    const ratio = fontOf(custom.text) / fontOf(text);
    assert.ok(Math.abs(ratio - 2) < 0.01, `18 px text is twice the 9 px text (${ratio})`);
  } finally {
    await context.close();
  }
});

test("8: subscripts are typeset everywhere, and the longest CD unit fits its menu", async () => {
  const { page, context } = await openPage(env);
  try {
    for (const key of ["cd", "ord", "abs", "index"]) {
      const texts = await page.evaluate((k) => window.chiroptic.drawnText(k), key);
      assert.deepEqual(texts.filter((t) => t.includes("_")), [], `${key}: no "_" on the canvas`);
    }
    const box = await page.locator('.plot[data-plot="index"] .canvas-box').boundingBox();
    await page.mouse.move(box.x + box.width / 2, box.y + box.height / 2);
    const words = [await page.textContent("#readout"), await page.textContent("#conventions-list")];
    for (const id of ["hint-cd", "hint-ord", "hint-abs", "hint-index"]) words.push(await page.textContent(`#${id}`));
    for (const w of words) assert.doesNotMatch(w, /[nεA]_[LR]/, w.slice(0, 60));
    assert.match(await page.textContent("#hint-cd"), /εₗ − εᵣ/);
    // The mean residue ellipticity needs its weight; then its label shows whole.
    await typeInto(page, "#mrw", "110", { enter: false });
    await page.selectOption("#cd-unit", "mean_residue_ellipticity");
    const [text, room] = await page.$eval("#cd-unit", (sel) => {
      const ctx = document.createElement("canvas").getContext("2d");
      ctx.font = getComputedStyle(sel).font;
      return [ctx.measureText(sel.options[sel.selectedIndex].text).width, sel.clientWidth - 24];
    });
    assert.ok(text <= room, `"[θ]MRW / deg cm² dmol⁻¹" fits: ${text.toFixed(0)} px of ${room} px`);
  } finally {
    await context.close();
  }
});

test("9: the Indices plot shows the bands' index and Δn on their own axes, with a key", async () => {
  const { page, context } = await openPage(env);
  try {
    const texts = await page.evaluate(() => window.chiroptic.drawnText("index"));
    assert.ok(texts.some((t) => t.startsWith("n̄ − n(solvent)")), `left axis: ${texts}`);
    assert.ok(texts.some((t) => t.startsWith("Δn / 10")), `right axis: ${texts}`);
    const key = await page.$$eval("#key-index .key-item", (items) => items.map((i) => i.textContent));
    assert.deepEqual(key, ["n̄ − n(solvent)", "Δn (right)"]);
    const frame = (await page.evaluate(() => window.chiroptic.frames())).find((f) => f.plot === "index");
    // One zero line for both axes: zero at the same height on each.
    const at = ([a, b]) => -a / (b - a);
    assert.ok(Math.abs(at(frame.y_range) - at(frame.y2_range)) < 1e-9, `zero at ${at(frame.y_range)} and ${at(frame.y2_range)}`);
    for (const plot of ["cd", "ord", "abs"]) {
      assert.deepEqual(await page.$$eval(`#key-${plot} .key-item`, (items) => items.map((i) => i.textContent)), ["sum"]);
    }
  } finally {
    await context.close();
  }
});

test("10: Frame bands, double-click and 0 frame the bands, not a fixed span", async () => {
  const { page, context } = await openPage(env);
  try {
    const framedBy = async (act) => {
      await typeInto(page, "#range-to", "640");
      await act();
      return (await docOf(page)).view.range_nm;
    };
    const byButton = await framedBy(() => page.click("#fit-range"));
    assert.ok(byButton[1] < 640, `the bands' window ends short of 650 nm: ${byButton}`);
    const byKey = await framedBy(async () => {
      await page.focus('.plot[data-plot="ord"] .canvas-box');
      await page.keyboard.press("0");
    });
    assert.deepEqual(byKey, byButton);
  } finally {
    await context.close();
  }
});

test("11: print shows the band units and no 'optional' in empty fields", async () => {
  const { page, context } = await openPage(env);
  try {
    await page.emulateMedia({ media: "print" });
    assert.equal(await page.textContent("#center-unit-print"), "nm");
    assert.equal(await page.isVisible("#center-unit-print"), true);
    assert.equal(await page.textContent("#width-unit-print"), "cm⁻¹");
    const colour = await page.$eval("#mrw", (i) => getComputedStyle(i, "::placeholder").color);
    assert.match(colour, /rgba\(0, 0, 0, 0\)|transparent/, "the placeholder prints as nothing");
  } finally {
    await context.close();
  }
});

test("13: a bad-link notice goes at the next edit", async () => {
  const { page, context } = await openPage(env);
  try {
    await page.evaluate(() => (location.hash = "c1.eNodjDELgzAQhf-KvDmE00y9sejg4lCKS"));
    await page.waitForSelector("#notice:not([hidden])");
    await typeInto(page, "#band-0-name", "renamed", { enter: false });
    assert.equal(await page.isVisible("#notice"), false);
  } finally {
    await context.close();
  }
});

test("14: New starts an empty model; empty optional sliders sit at their low end", async () => {
  const { page, context } = await openPage(env);
  try {
    page.on("dialog", (d) => d.accept());
    await page.click("#new-model");
    const doc = await docOf(page);
    assert.deepEqual(doc.bands, []);
    assert.equal(doc.title ?? "", "");
    assert.equal(doc.sample.molar_mass_g_per_mol, undefined, "no molar mass");
    assert.equal(await page.inputValue("#doc-title"), "");
    for (const id of ["#molar-mass", "#mrw"]) {
      const [value, min] = await page.$eval(id, (i) => {
        const s = i.closest(".with-unit").nextElementSibling;
        return [s.value, s.min];
      });
      assert.equal(Number(value), Number(min), `${id} slider at its low end`);
    }
    await page.click("#undo");
    assert.equal((await docOf(page)).bands.length, 3, "Undo brings the model back");
  } finally {
    await context.close();
  }
});

test("15: each lamp-line column is in one notation; headers stay short", async () => {
  const { page, context } = await openPage(env);
  try {
    const rows = await linesTable(page);
    for (const col of [1, 2, 3]) {
      const texts = rows.map((r) => r.shown[col]);
      const powers = texts.filter((t) => t.includes("×10")).length;
      assert.ok(powers === 0 || powers === texts.length, `column ${col} is not mixed: ${texts}`);
    }
    const heights = await page.$$eval("#lines-head th", (ths) => ths.map((th) => th.getBoundingClientRect().height / parseFloat(getComputedStyle(th).lineHeight || "16")));
    assert.ok(Math.max(...heights) <= 3.2, `headers at most three short lines (${heights.map((h) => h.toFixed(1))})`);
  } finally {
    await context.close();
  }
});

test("17: ? opens a help panel of keys and gestures", async () => {
  const { page, context } = await openPage(env);
  try {
    await page.click("h1");
    await page.keyboard.press("?");
    assert.equal(await page.isVisible("#help-menu .help-panel"), true);
    const text = await page.textContent("#help-menu");
    for (const what of ["Ctrl+Z", "Drag a CD peak", "Double-click", "Shift"]) assert.ok(text.includes(what), `lists ${what}`);
    await page.keyboard.press("Escape");
    assert.equal(await page.isVisible("#help-menu .help-panel"), false);
    await page.click("#help-menu summary");
    assert.equal(await page.isVisible("#help-menu .help-panel"), true);
  } finally {
    await context.close();
  }
});
