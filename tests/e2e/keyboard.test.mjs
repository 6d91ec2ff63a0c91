// Everything on the band list can be done from the keyboard alone: reach a
// field with Tab, step it with the arrow keys (Shift coarse, Alt fine), add,
// move and delete bands with Enter and Space, and read the plots with ←/→.
import { test } from "node:test";
import assert from "node:assert/strict";
import { browserTests, openPage } from "../lib/harness.mjs";
import { plotHashes, savedModel } from "../lib/page.mjs";

const env = browserTests();

async function tabTo(page, id, limit = 80) {
  for (let i = 0; i < limit; i++) {
    if ((await page.evaluate(() => document.activeElement?.id)) === id) return i;
    await page.keyboard.press("Tab");
  }
  throw new Error(`#${id} not reached in ${limit} Tab presses`);
}

test("Tab reaches a band field, arrow keys step it and redraw", async () => {
  const { page, context, log } = await openPage(env);
  try {
    await page.locator("body").click({ position: { x: 2, y: 2 } });
    const presses = await tabTo(page, "band-0-r");
    assert.ok(presses > 0);
    const before = await plotHashes(page);
    await page.keyboard.press("ArrowUp"); // 9 -> 10
    await page.keyboard.press("Shift+ArrowUp"); // -> 20
    await page.keyboard.press("Alt+ArrowDown"); // -> 19.9
    assert.equal(await page.inputValue("#band-0-r"), "19.9");
    assert.notEqual((await plotHashes(page)).cd, before.cd);
    const saved = await savedModel(page);
    assert.equal(saved.bands[0].rotatory_strength_1e40_cgs, 19.9);

    // Back to the centre with Shift+Tab; it steps by 1 nm.
    for (let i = 0; i < 10 && (await page.evaluate(() => document.activeElement?.id)) !== "band-0-center"; i++) {
      await page.keyboard.press("Shift+Tab");
    }
    assert.equal(await page.evaluate(() => document.activeElement?.id), "band-0-center");
    await page.keyboard.press("ArrowDown");
    assert.equal((await savedModel(page)).bands[0].center_nm, 299);
    assert.deepEqual(log.errors, []);
  } finally {
    await context.close();
  }
});

test("bands are added, moved and deleted with the keyboard", async () => {
  const { page, context, log } = await openPage(env);
  try {
    await page.focus("#add-band");
    await page.keyboard.press("Enter");
    assert.equal(await page.locator("tr.band-row").count(), 4);
    // The new band's name has the focus: rename it by typing.
    assert.equal(await page.evaluate(() => document.activeElement?.classList.contains("name")), true);
    await page.keyboard.press("Control+A");
    await page.keyboard.type("K1");
    // Move it up twice with its own buttons.
    await page.focus('button[aria-label="Move band 4 (K1) up"]');
    await page.keyboard.press("Enter");
    await page.keyboard.press("Space");
    let names = (await savedModel(page)).bands.map((b) => b.name);
    assert.equal(names[1], "K1", `order: ${names}`);
    // The focus follows the moved band.
    assert.match(await page.evaluate(() => document.activeElement?.getAttribute("aria-label") ?? ""), /K1/);
    await page.focus('button[aria-label="Delete band 2 (K1)"]');
    await page.keyboard.press("Enter");
    names = (await savedModel(page)).bands.map((b) => b.name);
    assert.equal(names.includes("K1"), false);
    assert.equal(names.length, 3);
    // The shape menu works from the keyboard too.
    await page.focus("#band-0-shape");
    await page.keyboard.press("ArrowDown");
    assert.notEqual((await savedModel(page)).bands[0].shape, "gaussian");
    assert.deepEqual(log.errors, []);
  } finally {
    await context.close();
  }
});

test("a focused plot reads out values under a keyboard crosshair", async () => {
  const { page, context } = await openPage(env);
  try {
    await page.focus('.plot[data-plot="ord"] .canvas-box');
    await page.keyboard.press("ArrowRight");
    const first = await page.getAttribute('#readout span[data-plot="x"]', "data-value");
    await page.keyboard.press("Shift+ArrowRight");
    const second = await page.getAttribute('#readout span[data-plot="x"]', "data-value");
    assert.ok(Number(second) > Number(first), `${first} -> ${second}`);
    assert.match(await page.textContent("#readout"), /φ = .* deg/);
  } finally {
    await context.close();
  }
});
