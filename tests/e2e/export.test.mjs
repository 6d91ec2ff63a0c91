// Exports draw the figure of the canvas: the SVG (figures::svg through wasm)
// parses as SVG and carries exactly the text labels the canvas shows, and
// those of `chiroptic render` for the same document; the PNG at 1x is the
// canvas pixel for pixel (light, nothing emphasised), at 2x and 4x it has
// that many more pixels per side. On a HiDPI screen the live canvases have
// devicePixelRatio pixels per CSS pixel and the pointer still reads right.
import { test } from "node:test";
import assert from "node:assert/strict";
import { browserTests, openPage, DEMO } from "../lib/harness.mjs";
import { cli, docFile, downloadBytes, downloadText, enter, plotHashes, pngSize, savedModel } from "../lib/page.mjs";
import { readFileSync } from "node:fs";

const env = browserTests();

const PLOTS = ["cd", "ord", "abs", "index"];

/** The text nodes of an SVG, parsed by the browser's own XML parser. */
async function svgTexts(page, text) {
  return page.evaluate((text) => {
    const doc = new DOMParser().parseFromString(text, "image/svg+xml");
    const error = doc.querySelector("parsererror");
    const root = doc.documentElement;
    return {
      error: error ? error.textContent : null,
      root: root.localName,
      ns: root.namespaceURI,
      width: Number(root.getAttribute("width")),
      height: Number(root.getAttribute("height")),
      // The SVG backend sets each label on a line of its own inside <text>.
      texts: [...doc.querySelectorAll("text")].map((t) => t.textContent.trim()),
    };
  }, text);
}

const sorted = (xs) => [...xs].sort();
const canvasSize = (page, key) =>
  page.$eval(`.plot[data-plot="${key}"] .canvas-box`, (b) => [Math.floor(b.clientWidth), Math.floor(b.clientHeight)]);

test("SVG export parses and its labels are the canvas plot's", async () => {
  const { page, context, log } = await openPage(env);
  try {
    const bandNames = JSON.parse(readFileSync(DEMO, "utf8")).bands.map((b) => b.name);
    await page.click("#export-menu summary");
    await page.waitForFunction(() => /\d+ × \d+ px/.test(document.getElementById("export-size").textContent));
    for (const key of PLOTS) {
      const canvas = await page.evaluate((k) => window.chiroptic.drawnText(k), key);
      assert.ok(canvas.length >= 8, `${key}: ${canvas.length} labels on the canvas`);
      await page.uncheck("#export-key");
      const plain = await downloadText(page, `#export-${key}-svg`);
      assert.match(plain.name, new RegExp(`-${key}\\.svg$`));
      const svg = await svgTexts(page, plain.text);
      assert.equal(svg.error, null, `${key}: the SVG parses`);
      assert.equal(svg.root, "svg");
      assert.equal(svg.ns, "http://www.w3.org/2000/svg");
      assert.deepEqual([svg.width, svg.height], await canvasSize(page, key), `${key}: the size on screen`);
      assert.deepEqual(sorted(svg.texts), sorted(canvas), `${key}: same labels as the canvas`);

      // With the key: the canvas labels plus one name per trace.
      await page.check("#export-key");
      const keyed = await svgTexts(page, (await downloadText(page, `#export-${key}-svg`)).text);
      const extra = [...keyed.texts];
      for (const t of canvas) extra.splice(extra.indexOf(t), 1);
      // The Index plot: the bands' excess over the solvent index and Δn (issue 8, defect 9).
      const traces = key === "index" ? ["n̄ − n(solvent)", "Δn", ...bandNames] : ["sum", ...bandNames];
      assert.deepEqual(sorted(extra), sorted(traces), `${key}: the key names the traces`);
    }
    assert.deepEqual(log.errors, []);
  } finally {
    await context.close();
  }
});

test("the SVG export has the labels of `chiroptic render` for the same document", async () => {
  const { page, context } = await openPage(env);
  try {
    // The CLI's defaults differ from the page's (Δε, 1200 points): name them in the view.
    await page.selectOption("#cd-unit", "delta_epsilon");
    await enter(page, "#points", "1500");
    const path = docFile(await savedModel(page));
    for (const key of ["cd", "index"]) {
      const [w, h] = await canvasSize(page, key);
      const web = await svgTexts(page, (await downloadText(page, `#export-${key}-svg`)).text);
      const native = await svgTexts(page, cli("render", path, "--plot", key, "--width", String(w), "--height", String(h), "-o", "-"));
      assert.equal(native.error, null);
      assert.deepEqual(sorted(web.texts), sorted(native.texts), `${key}: page and CLI label alike`);
    }
  } finally {
    await context.close();
  }
});

test("PNG export: 1x is the canvas pixel for pixel, 2x and 4x scale it", async () => {
  const { page, context, log } = await openPage(env);
  try {
    await page.click("#export-menu summary");
    await page.uncheck("#export-key");
    const [w, h] = await canvasSize(page, "ord");
    const one = await downloadBytes(page, "#export-ord-png-1");
    assert.match(one.name, /-ord@1x\.png$/);
    assert.deepEqual(pngSize(one.bytes), [w, h]);
    const digest = await page.evaluate(async (b64) => {
      const bytes = Uint8Array.from(atob(b64), (c) => c.charCodeAt(0));
      const image = await createImageBitmap(new Blob([bytes], { type: "image/png" }));
      const c = Object.assign(document.createElement("canvas"), { width: image.width, height: image.height });
      const ctx = c.getContext("2d");
      ctx.drawImage(image, 0, 0);
      const data = ctx.getImageData(0, 0, c.width, c.height).data;
      let hash = 2166136261;
      for (let i = 0; i < data.length; i++) hash = Math.imul(hash ^ data[i], 16777619) >>> 0;
      return hash;
    }, one.bytes.toString("base64"));
    assert.equal(digest, (await plotHashes(page)).ord, "the 1x picture is the canvas");
    for (const k of [2, 4]) {
      const png = await downloadBytes(page, `#export-ord-png-${k}`);
      assert.deepEqual(pngSize(png.bytes), [w * k, h * k], `${k}x`);
      assert.ok(png.bytes.length > one.bytes.length, `${k}x has more detail`);
    }
    assert.deepEqual(log.errors, []);
  } finally {
    await context.close();
  }
});

test("on a HiDPI screen the canvases are drawn at devicePixelRatio and read right", async () => {
  const readAt = async (page) => {
    const box = await page.locator('.plot[data-plot="cd"] .canvas-box').boundingBox();
    await page.mouse.move(box.x + box.width * 0.5, box.y + box.height * 0.5);
    return page.$eval('#readout span[data-plot="x"]', (s) => Number(s.dataset.value));
  };
  const normal = await openPage(env);
  const sharp = await openPage(env, { deviceScaleFactor: 2 });
  try {
    const [w, h] = await canvasSize(sharp.page, "cd");
    const d = await sharp.page.$eval("#plot-cd", (c) => [c.width, c.height]);
    assert.deepEqual(d, [2 * w, 2 * h], "two canvas pixels per CSS pixel");
    // Same window, same pointer position: the same wavelength under it, to
    // the pixel (the frame's edges round to device pixels).
    const [a, b] = [await readAt(sharp.page), await readAt(normal.page)];
    const perPixel = (650 - 180) / w;
    assert.ok(Math.abs(a - b) <= 1.5 * perPixel, `${a} nm vs ${b} nm at 2x and 1x`);
    // Text is as large (in CSS pixels) as at 1x: the same labels fit.
    assert.deepEqual(
      await sharp.page.evaluate(() => window.chiroptic.drawnText("cd")),
      await normal.page.evaluate(() => window.chiroptic.drawnText("cd")),
    );
    assert.deepEqual(sharp.log.errors, []);
  } finally {
    await normal.context.close();
    await sharp.context.close();
  }
});
