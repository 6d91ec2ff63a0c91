// The colour panel (issue 12), driven as a person does: typing key by key,
// arrow steps, dragging along the strip, the light source menu, the sample
// fields; its numbers are compared with the native CLI's `colour` verb.
import { test } from "node:test";
import assert from "node:assert/strict";
import { browserTests, openPage } from "../lib/harness.mjs";
import { typeInto, cli, docFile, assertClose } from "../lib/page.mjs";

const env = browserTests();

/** Two animation frames: the panel draws at the next frame after a change. */
const frames = (page) => page.evaluate(() => new Promise((ok) => requestAnimationFrame(() => requestAnimationFrame(ok))));

/** What the swatch shows: its hex, xy and luminance (full values, from its data attributes). */
async function swatch(page) {
  await frames(page);
  return page.$eval("#colour-swatch", (s) => ({
    hex: s.dataset.hex,
    xy: [Number(s.dataset.x), Number(s.dataset.y)],
    luminance: Number(s.dataset.luminance),
    background: getComputedStyle(s).backgroundColor,
  }));
}

/** Opens the page and the colour panel, and waits for its first side view. */
async function openColour(env) {
  const opened = await openPage(env);
  await opened.page.click("#colour-details summary");
  await opened.page.waitForSelector("#colour-side[data-drawn]", { state: "attached", timeout: 10000 });
  return opened;
}

/** The CLI's end-on colour of the page's document: hex, xy, luminance. */
async function cliColour(page, analyser, illuminant = "d65") {
  const doc = await page.evaluate(() => window.chiroptic.document());
  const out = cli("colour", docFile(doc), "--analyser", String(analyser), "--illuminant", illuminant);
  const field = (name) => out.split("\n").find((l) => l.startsWith(`${name}:`)).slice(name.length + 1).trim();
  return { hex: field("hex"), xy: field("xy").split(",").map(Number), luminance: Number(field("luminance_Y")) };
}

function assertSameColour(shown, native, what) {
  assert.equal(shown.hex, native.hex, `${what}: hex`);
  // The CLI prints six decimals.
  shown.xy.forEach((v, i) => assert.ok(Math.abs(v - native.xy[i]) <= 1e-6, `${what}: xy[${i}] ${v} vs ${native.xy[i]}`));
  assert.ok(Math.abs(shown.luminance - native.luminance) <= 1e-6, `${what}: Y ${shown.luminance} vs ${native.luminance}`);
}

/** Rotatory strengths to zero, typed into the band table: the model has no chirality left. */
async function makeAchiral(page) {
  const rows = await page.locator("tr.band-row").count();
  for (let i = 0; i < rows; i++) await typeInto(page, `#band-${i}-r`, "0");
  const doc = await page.evaluate(() => window.chiroptic.document());
  assert.ok(doc.bands.every((b) => b.rotatory_strength_1e40_cgs === 0), "every R is 0");
}

async function sideDigest(page) {
  return page.$eval("#colour-side", (c) => {
    const data = c.getContext("2d").getImageData(0, 0, c.width, c.height).data;
    let tube = 0;
    let lit = 0;
    let hash = 2166136261;
    for (let i = 0; i < data.length; i += 4) {
      if (data[i + 3] > 0) tube++;
      if (data[i + 3] > 0 && data[i] + data[i + 1] + data[i + 2] > 0) lit++;
      hash = Math.imul(hash ^ data[i] ^ (data[i + 1] << 8) ^ (data[i + 2] << 16) ^ (data[i + 3] << 24), 16777619) >>> 0;
    }
    return { width: c.width, height: c.height, pixels: data.length / 4, tube, lit, hash, drawn: Number(c.dataset.drawn) };
  });
}

test("typing an analyser angle key by key changes the swatch, as the CLI says; arrows step it", async () => {
  const { page } = await openColour(env);
  const start = await swatch(page);
  await page.click("#colour-analyser");
  await page.keyboard.press("Control+A");
  const seen = [];
  for (const key of "45") {
    await page.keyboard.type(key);
    seen.push(await swatch(page));
  }
  assertSameColour(seen[0], await cliColour(page, 4), "β = 4° after the first key");
  assertSameColour(seen[1], await cliColour(page, 45), "β = 45° after the second key");
  assert.notEqual(seen[1].hex, start.hex, "45° is not the colour at 0°");
  assert.ok(seen[1].luminance < start.luminance, "turning the analyser away from parallel dims the light");
  const mark = await page.$eval("#colour-strip-mark", (m) => m.style.left);
  assert.ok(Math.abs(parseFloat(mark) - 25) < 1e-9, `strip mark at 45/180 of the strip: ${mark}`);

  await page.keyboard.press("ArrowUp");
  assert.equal(await page.inputValue("#colour-analyser"), "46");
  await page.keyboard.press("Shift+ArrowUp");
  assert.equal(await page.inputValue("#colour-analyser"), "56");
  await page.keyboard.press("Alt+ArrowDown");
  assert.equal(await page.inputValue("#colour-analyser"), "55.9");
  assertSameColour(await swatch(page), await cliColour(page, 55.9), "β = 55.9° after the arrow steps");
});

test("no chiral bands: crossed polarisers are dark, parallel ones pass the light's white", async () => {
  const { page } = await openColour(env);
  await makeAchiral(page);
  await typeInto(page, "#colour-analyser", "90");
  const crossed = await swatch(page);
  // cos 90° in floating point leaves ~1e-33.
  assert.ok(crossed.luminance < 1e-12, `crossed: no light (Y = ${crossed.luminance})`);
  assert.equal(crossed.hex, "#000000");
  assert.equal(await page.textContent("#colour-xy"), "— (no light)");
  await typeInto(page, "#colour-analyser", "0");
  const parallel = await swatch(page);
  // The bands absorb in the UV; the visible passes nearly whole, at D65's white point (CIE).
  assert.ok(parallel.luminance > 0.9, `parallel: bright (Y = ${parallel.luminance})`);
  assert.ok(Math.abs(parallel.xy[0] - 0.3127) < 0.002 && Math.abs(parallel.xy[1] - 0.329) < 0.002, `near D65 white: ${parallel.xy}`);
  assertSameColour(parallel, await cliColour(page, 0), "parallel, achiral");
});

test("dragging along the strip moves β with the pointer", async () => {
  const { page } = await openColour(env);
  await page.locator("#colour-strip").scrollIntoViewIfNeeded();
  const strip = await page.locator("#colour-strip").boundingBox();
  const y = strip.y + strip.height / 2;
  await page.mouse.move(strip.x + 0.1 * strip.width, y);
  await page.mouse.down();
  assert.ok(Math.abs(Number(await page.inputValue("#colour-analyser")) - 18) <= 0.5, "the click sets β at 10 % of 180°");
  await page.mouse.move(strip.x + 0.4 * strip.width, y, { steps: 5 });
  const middle = Number(await page.inputValue("#colour-analyser"));
  assert.ok(Math.abs(middle - 72) <= 0.5, `β follows during the drag: ${middle}`);
  await page.mouse.move(strip.x + 0.75 * strip.width, y, { steps: 8 });
  await page.mouse.up();
  const beta = Number(await page.inputValue("#colour-analyser"));
  assert.ok(Math.abs(beta - 135) <= 0.5, `β at 75 % of the strip: ${beta}`);
  assertSameColour(await swatch(page), await cliColour(page, beta), `swatch after the drag (β = ${beta})`);
  const mark = await page.$eval("#colour-strip-mark", (m) => parseFloat(m.style.left));
  assert.ok(Math.abs(mark - (100 * beta) / 180) < 1e-9, "the mark sits at β");
  // The strip is a slider for the keyboard too.
  await page.keyboard.press("ArrowLeft");
  assert.equal(Number(await page.inputValue("#colour-analyser")), beta - 1);
  // The strip's own value is set when the panel draws (the next frame).
  await frames(page);
  assert.equal(await page.getAttribute("#colour-strip", "aria-valuenow"), String(beta - 1));
});

test("changing the light source changes the white", async () => {
  const { page } = await openColour(env);
  await makeAchiral(page);
  const d65 = await swatch(page);
  const before = (await sideDigest(page)).drawn;
  const keys = await page.$$eval("#colour-illuminant option", (os) => os.map((o) => o.value));
  assert.ok(keys.includes("a"), `illuminant A offered: ${keys}`);
  await page.selectOption("#colour-illuminant", "a");
  const a = await swatch(page);
  // Illuminant A's white point x = 0.4476 (CIE 15; common practice): far redder than D65's.
  assert.ok(a.xy[0] > 0.44 && a.xy[0] < 0.455, `white under A: x = ${a.xy[0]}`);
  assert.notEqual(a.hex, d65.hex);
  assertSameColour(a, await cliColour(page, 0, "a"), "parallel under A");
  await page.waitForFunction((n) => Number(document.getElementById("colour-side").dataset.drawn) > n, before);
});

test("the side view shows the tube, and follows the path length typed in the panel (undo too)", async () => {
  const { page } = await openColour(env);
  const first = await sideDigest(page);
  assert.ok(first.width > 0 && first.height > 0);
  assert.ok(first.tube > 0.5 * first.pixels, `tube pixels: ${first.tube} of ${first.pixels}`);
  assert.ok(first.lit > 0.5 * first.tube, `lit tube pixels: ${first.lit} of ${first.tube}`);
  assert.match(await page.textContent("#colour-side-note"), /^Tube 1 cm long/);
  await page.waitForFunction(() => location.hash.length > 1);
  const link = await page.evaluate(() => location.hash);

  await typeInto(page, "#colour-path", "10");
  assert.equal((await page.evaluate(() => window.chiroptic.document())).sample.path_length_cm, 10, "the document's path length");
  await page.locator("#path").waitFor();
  assert.equal(await page.inputValue("#path"), "10", "the sample panel shows the same path length");
  await page.waitForFunction((n) => Number(document.getElementById("colour-side").dataset.drawn) > n, first.drawn);
  const longer = await sideDigest(page);
  await page.waitForFunction((l) => location.hash !== l, link);
  assert.notEqual(longer.hash, first.hash, "a longer tube looks different");
  assert.match(await page.textContent("#colour-side-note"), /^Tube 10 cm long/);

  await page.click("#undo");
  assert.equal((await page.evaluate(() => window.chiroptic.document())).sample.path_length_cm, 1, "undone");
  assert.equal(await page.inputValue("#colour-path"), "1");
  // The address bar's link follows the edit and its undo.
  await page.waitForFunction((l) => location.hash === l, link);
});

test("the swatch equals the CLI's colour for a tinted sample; a bad angle is named and keeps the plots", async () => {
  const { page } = await openColour(env);
  await typeInto(page, "#colour-conc", "0.002");
  await typeInto(page, "#colour-path", "10");
  await typeInto(page, "#colour-analyser", "37.5");
  const shown = await swatch(page);
  assertSameColour(shown, await cliColour(page, 37.5), "β = 37.5°, 2 mM, 10 cm");
  const [r, g, b] = shown.hex.match(/[0-9a-f]{2}/g).map((h) => parseInt(h, 16));
  assert.equal(shown.background, `rgb(${r}, ${g}, ${b})`, "the swatch is painted in that colour");
  assert.equal(await page.textContent("#colour-srgb"), `${r}, ${g}, ${b} · ${shown.hex}`);

  await typeInto(page, "#colour-analyser", "4x");
  assert.match(await page.textContent("#colour-analyser-error"), /not a number/);
  assert.equal(await page.getAttribute("#colour-analyser", "aria-invalid"), "true");
  assert.equal(await page.$eval("#plot-grid", (g) => g.classList.contains("stale")), false, "the plots are not stale");
  // Key by key, "4" applied before "x" made the text unreadable.
  assertSameColour(await swatch(page), await cliColour(page, 4), "the swatch keeps the last good angle");
  await typeInto(page, "#colour-analyser", "40");
  assert.equal(await page.textContent("#colour-analyser-error"), "");
  assertSameColour(await swatch(page), await cliColour(page, 40), "β = 40° after the correction");
});
