// Measured data in the page, driven as a person does: files dropped on the
// page (the drop event is built in the page; everything else is typed key
// by key and clicked), the column picker, processing steps, Kramers-Kronig
// predictions against the CLI, lamp-line readings, undo and the share link.
// Files: fixtures/import/ (invented demo data, fixtures/import/make_fixtures.py)
// and ../shared/data/jcamp/ (public domain, read in place).
import { test } from "node:test";
import assert from "node:assert/strict";
import { existsSync, readFileSync } from "node:fs";
import { join } from "node:path";
import { browserTests, openPage, canvasDigest, ROOT } from "../lib/harness.mjs";
import { cli, docFile, pageLink, savedModel, dropFile } from "../lib/page.mjs";

const env = browserTests();
const GOOD = join(ROOT, "fixtures", "import", "good");
const BROKEN = join(ROOT, "fixtures", "import", "broken");
// The shared public-domain files beside the checkout, or where the workplace keeps them.
const JCAMP = [join(ROOT, "..", "shared", "data", "jcamp"), "/work/shared/data/jcamp"].find((d) => existsSync(d)) ?? join(ROOT, "..", "shared", "data", "jcamp");

const documentOf = (page) => page.evaluate(() => window.chiroptic.document());
const rowCount = (page) => page.$$eval("#data-rows > li", (r) => r.length);

async function typeInto(page, selector, text) {
  await page.click(selector, { clickCount: 3 });
  await page.keyboard.press("Control+A");
  await page.keyboard.type(text);
  await page.keyboard.press("Enter");
}

test("a dropped CSV is drawn as points on CD with a residual strip; undo and redo take it out and back", async () => {
  const { page } = await openPage(env);
  const before = await canvasDigest(page, "plot-cd");
  const bands = (await documentOf(page)).bands;
  await dropFile(page, join(GOOD, "bom-crlf.csv"));
  await page.waitForSelector("#data-rows > li");
  const doc = await documentOf(page);
  assert.equal(doc.data.length, 1);
  assert.equal(doc.data[0].quantity, "cd");
  assert.equal(doc.data[0].unit, "mdeg");
  assert.deepEqual(doc.bands, bands, "the model is untouched");
  // The file's first value, as written (BOM and CRLF handled).
  assert.equal(doc.data[0].y[0], 43.1932);
  const texts = await page.evaluate(() => window.chiroptic.drawnText("cd"));
  assert.ok(texts.some((t) => t.includes("residual")), `residual strip drawn: ${texts.join(" | ")}`);
  assert.notEqual((await canvasDigest(page, "plot-cd")).hash, before.hash, "the CD canvas changed");
  const info = await page.textContent("#data-rows > li .data-info");
  assert.match(info, /points/);
  assert.match(info, /residual rms/);

  await page.click("#undo");
  assert.equal((await documentOf(page)).data, undefined, "undo takes the set out");
  assert.equal(await rowCount(page), 0);
  await page.click("#redo");
  assert.equal((await documentOf(page)).data.length, 1, "redo brings it back");
  assert.equal(await rowCount(page), 1);
});

test("a broken file gives one message naming the file and line, and keeps the model and its data", async () => {
  const { page } = await openPage(env);
  await dropFile(page, join(GOOD, "descending-ht.csv"));
  await page.waitForSelector("#data-rows > li");
  const kept = await documentOf(page);
  const expected = JSON.parse(readFileSync(join(BROKEN, "expected.json"), "utf8"));
  const name = "04-short-row.txt";
  await dropFile(page, join(BROKEN, name));
  await page.waitForSelector("#notice:not([hidden])");
  const notice = await page.textContent("#notice-text");
  assert.ok(notice.includes(name), `names the file: ${notice}`);
  const want = expected[name.replace(/\.txt$/, "")];
  assert.ok(notice.includes(`line ${want.line}: ${want.contains}`), `line and expectation: ${notice}`);
  assert.equal(await page.$$eval("#notice:not([hidden])", (n) => n.length), 1, "one message");
  assert.deepEqual(await documentOf(page), kept, "model and data unchanged");
  assert.equal(await rowCount(page), 1);
});

test("a file without a header opens the column picker; the choice is made with the keyboard", async () => {
  const { page } = await openPage(env);
  const [chooser] = await Promise.all([page.waitForEvent("filechooser"), page.click("#data-open")]);
  await chooser.setFiles(join(GOOD, "no-header.csv"));
  await page.waitForSelector("#data-picker[open]");
  const preview = await page.$$eval("#data-picker tbody tr", (rows) => rows.map((r) => r.firstChild.textContent));
  assert.equal(preview[0], "190", "the preview shows the file's first rows");
  // The axis select has the focus; choose with the keys.
  await page.keyboard.press("Tab");
  await page.keyboard.press("Tab");
  await page.selectOption("#pick-quantity", "cd");
  await page.selectOption("#pick-unit", "mdeg");
  await page.click("#pick-add");
  await page.waitForSelector("#data-rows > li");
  const d = (await documentOf(page)).data[0];
  assert.equal(d.name, "no-header");
  assert.equal(d.axis_unit, "nm");
  assert.deepEqual(d.x.first !== undefined ? [d.x.first, d.x.step] : d.x.slice(0, 2), [190, 0.5], "even axis stored as first/step/count");
});

test("processing steps are typed, recorded and carried by the share link; smoothing shows what it removed", async () => {
  const { page, context } = await openPage(env);
  await dropFile(page, join(GOOD, "bom-crlf.csv"));
  await page.waitForSelector("#data-rows > li");
  await page.selectOption("#data-0-step-kind", "smooth");
  await typeInto(page, "#data-0-step-window", "9");
  await page.click("#data-0-step-order");
  await page.keyboard.type("2");
  await page.click("#data-0-step-add");
  await page.waitForFunction(() => window.chiroptic.document().data[0].processing?.length === 1);
  assert.deepEqual((await documentOf(page)).data[0].processing, [{ smooth: { window: 9, order: 2 } }]);
  assert.match(await page.textContent("#data-rows .step-text"), /window 9, order 2 \(removed: rms/);

  await page.selectOption("#data-0-step-kind", "trim");
  await page.click("#data-0-step-from");
  await page.keyboard.type("200");
  await page.click("#data-0-step-to");
  await page.keyboard.type("300");
  await page.click("#data-0-step-add");
  await page.waitForFunction(() => window.chiroptic.document().data[0].processing?.length === 2);
  assert.match(await page.textContent("#data-rows > li .data-info"), /201 points/);

  // A condition typed in its box.
  await typeInto(page, "#data-0-path_length_cm", "0.1");
  await page.waitForFunction(() => window.chiroptic.document().data[0].conditions?.path_length_cm === 0.1);

  // Hidden, then shown again: one step each.
  await page.click("#data-0-shown");
  assert.equal((await documentOf(page)).data[0].hidden, true);
  await page.click("#undo");
  assert.equal((await documentOf(page)).data[0].hidden, undefined);

  const link = await pageLink(page);
  const other = await context.newPage();
  await other.goto(link);
  await other.waitForSelector("html[data-ready=true]", { state: "attached" });
  const there = await other.evaluate(() => window.chiroptic.document());
  assert.deepEqual(there.data, (await documentOf(page)).data, "the link carries the data and their processing");
  assert.equal(await other.$$eval("#data-rows > li", (r) => r.length), 1);
  await other.close();
});

test("predict ORD from this CD draws a derived set that agrees with the CLI's kk", async () => {
  const { page } = await openPage(env);
  await dropFile(page, join(GOOD, "bom-crlf.csv"));
  await page.waitForSelector("#data-0-predict");
  await page.click("#data-0-predict");
  await page.waitForSelector("#data-rows > li:nth-child(2)");
  const doc = await documentOf(page);
  const derived = doc.data[1];
  assert.equal(derived.quantity, "ord");
  assert.equal(derived.unit, "deg");
  assert.equal(derived.name, "ORD from bom-crlf");
  // The CLI on the same file, with the same document's bands standing for the outside.
  const model = await savedModel(page);
  delete model.data;
  const rows = cli("kk", join(GOOD, "bom-crlf.csv"), "--add", docFile(model)).trim().split("\n").slice(1).map((l) => l.split(",").map(Number));
  assert.equal(rows.length, derived.y.length);
  const scale = Math.max(...rows.map((r) => Math.abs(r[1])));
  rows.forEach((r, k) => assert.ok(Math.abs(r[1] - derived.y[k]) <= 1e-5 * scale, `point ${k}: CLI ${r[1]}, page ${derived.y[k]}`));
  assert.match(await page.textContent("#data-rows > li:nth-child(2) .data-info"), /Kramers-Kronig prediction/);
  // Lamp lines from the measured CD.
  const kk = await page.$$eval("#readings-rows td[data-key=kk_deg]", (c) => c.map((td) => Number(td.dataset.value)));
  assert.equal(kk.length, 7);
  assert.ok(kk.every(Number.isFinite));
});

test("a reading typed at a lamp line is kept with its conditions and shown at the sample's", async () => {
  const { page } = await openPage(env);
  const sample = (await documentOf(page)).sample;
  await page.click("#readings-path");
  await page.keyboard.type(String(sample.path_length_cm * 2));
  await typeInto(page, "#reading-1", "0.25");
  await page.waitForFunction(() => window.chiroptic.document().readings?.length === 1);
  const r = (await documentOf(page)).readings[0];
  assert.equal(r.wavelength_nm, 589.3);
  assert.equal(r.rotation_deg, 0.25);
  assert.equal(r.conditions.path_length_cm, sample.path_length_cm * 2);
  const atSample = await page.$eval("#readings-rows tr:nth-child(2) td[data-key=reading_at_sample_deg]", (td) => Number(td.dataset.value));
  // Read through twice the path: half the rotation at the sample's path (rotation is linear in path).
  assert.ok(Math.abs(atSample - 0.125) < 1e-12, `at the sample's path: ${atSample}`);
  await page.click("#undo");
  assert.equal((await documentOf(page)).readings, undefined);
});

test("a public-domain JCAMP-DX absorbance file lands on the absorption plot", async () => {
  const { page } = await openPage(env);
  await dropFile(page, join(JCAMP, "dupinc1.jdx"));
  await page.waitForSelector("#data-rows > li");
  const d = (await documentOf(page)).data[0];
  assert.equal(d.quantity, "absorption");
  assert.equal(d.y.length, 440);
  assert.equal(d.y[0], 1.1663, "first Y as the README lists it");
  assert.equal(d.source.format, "jcamp-dx");
  // A LINK file of five blocks: the page asks which; block 5 is chosen with
  // the keyboard (its sum of Y is 11.1047322750, README of the shared files).
  await dropFile(page, join(JCAMP, "blckpac1.jdx"));
  await page.waitForSelector("#pick-block");
  assert.equal(await page.locator("#pick-block option").count(), 5);
  await page.focus("#pick-block");
  for (let i = 0; i < 4; i++) await page.keyboard.press("ArrowDown");
  assert.equal(await page.inputValue("#pick-block"), "5");
  await page.click("#pick-add");
  await page.waitForFunction(() => window.chiroptic.document().data?.length === 2);
  const b5 = (await documentOf(page)).data[1];
  assert.equal(b5.y.length, 176);
  assert.ok(Math.abs(b5.y.reduce((a, v) => a + v, 0) - 11.104732275) < 1e-8, "block 5's sum of Y");
  // Cancel leaves everything as it was.
  await dropFile(page, join(JCAMP, "blckpac1.jdx"));
  await page.waitForSelector("#pick-block");
  await page.click("#pick-cancel");
  assert.equal((await documentOf(page)).data.length, 2);
});

test("a data set too large for a link says so and keeps the address from a stale link", async () => {
  // 60,000 points of seeded pseudo-random CD (invented; it barely compresses):
  // far past the link cap, so the page offers the document file instead.
  const { page } = await openPage(env);
  const before = await page.evaluate(() => location.hash);
  let seed = 7;
  const random = () => ((seed = (seed * 1103515245 + 12345) % 2147483648) / 2147483648);
  const rows = ["wavelength_nm,ellipticity_mdeg"];
  for (let i = 0; i < 60000; i++) rows.push(`${(190 + 0.005 * i).toFixed(3)},${(100 * random() - 50).toFixed(6)}`);
  await page.evaluate((text) => {
    const dt = new DataTransfer();
    dt.items.add(new File([text], "big.csv", { type: "text/plain" }));
    const target = document.getElementById("plot-grid");
    for (const type of ["dragenter", "dragover", "drop"]) target.dispatchEvent(new DragEvent(type, { dataTransfer: dt, bubbles: true, cancelable: true }));
  }, rows.join("\n") + "\n");
  await page.waitForSelector("#data-link-note:not([hidden])");
  const note = await page.textContent("#data-link-note");
  assert.match(note, /more than the 100,000 a link may hold: share the document file instead/);
  // The set is in the model all the same, and the address holds no link of it.
  assert.equal((await documentOf(page)).data[0].y.length, 60000);
  const after = await page.evaluate(() => location.hash);
  assert.ok(after.length < 100000, `the address is not a link past the cap (${after.length} characters; before: ${before.length})`);
});
