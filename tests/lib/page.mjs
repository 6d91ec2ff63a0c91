// Helpers the browser tests share: reading the page's tables and downloads,
// and running the native command line on the same document.
import { execFileSync } from "node:child_process";
import { mkdtempSync, writeFileSync, readFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import assert from "node:assert/strict";
import { CLI } from "./harness.mjs";

/** The lamp-line table as numbers (full precision, from the cells' data-value). */
export async function linesTable(page) {
  return page.$$eval("#lines-rows tr", (rows) =>
    rows.map((tr) => {
      const cell = (key) => {
        const td = tr.querySelector(`td[data-key="${key}"]`);
        return td && td.dataset.value !== undefined ? Number(td.dataset.value) : null;
      };
      return {
        name: tr.querySelector("th").textContent,
        wavelength_nm: cell("wavelength_nm"),
        rotation_deg: cell("rotation_deg"),
        specific_rotation: cell("specific_rotation"),
        molar_rotation: cell("molar_rotation"),
        shown: [...tr.querySelectorAll("td")].map((td) => td.textContent),
      };
    }),
  );
}

/**
 * Clicks a control that downloads a file and returns the file's text. The
 * click is dispatched, not made with the mouse, so the focus stays where the
 * test put it.
 */
export async function downloadText(page, selector) {
  const [download] = await Promise.all([page.waitForEvent("download"), page.dispatchEvent(selector, "click")]);
  const path = await download.path();
  return { name: download.suggestedFilename(), text: readFileSync(path, "utf8") };
}

/** Like downloadText, for binary files: the name and a Buffer. */
export async function downloadBytes(page, selector) {
  const [download] = await Promise.all([page.waitForEvent("download"), page.dispatchEvent(selector, "click")]);
  return { name: download.suggestedFilename(), bytes: readFileSync(await download.path()) };
}

/** Width and height from a PNG's IHDR chunk (PNG specification, ISO/IEC 15948, 11.2.2). */
export function pngSize(bytes) {
  assert.equal(bytes.subarray(1, 4).toString("latin1"), "PNG", "PNG signature");
  assert.equal(bytes.subarray(12, 16).toString("latin1"), "IHDR", "first chunk is IHDR");
  return [bytes.readUInt32BE(16), bytes.readUInt32BE(20)];
}

/** The share link the page offers (its Share panel's text field). */
export async function pageLink(page) {
  if (!(await page.$eval("#share-menu", (d) => d.open))) await page.click("#share-menu summary");
  await page.click("#copy-link");
  const link = await page.inputValue("#link-text");
  await page.keyboard.press("Escape");
  return link;
}

/** The document as the page holds it, through its "Save model" control. */
export async function savedModel(page) {
  const { text } = await downloadText(page, "#save-json");
  return JSON.parse(text);
}

/** Runs the native CLI; returns stdout. */
export function cli(...args) {
  return execFileSync(CLI, args, { encoding: "utf8", stdio: ["ignore", "pipe", "pipe"] });
}

/** Writes a document to a temporary file for the CLI. */
export function docFile(doc) {
  const dir = mkdtempSync(join(tmpdir(), "chiroptic-doc-"));
  const path = join(dir, "model.json");
  writeFileSync(path, JSON.stringify(doc, null, 2));
  return path;
}

/** Parses the CLI's and the page's CSV: header names and rows of numbers. */
export function parseCsv(text) {
  // A header block of "#" lines may come first (the page's export).
  const lines = text.trim().split("\n").filter((l) => !l.startsWith("#"));
  const header = lines[0].split(",");
  const rows = lines.slice(1).map((l) => l.split(","));
  return { header, rows };
}

/** The CLI's `lines` output as objects keyed like the page's table. */
export function cliLines(path) {
  const { header, rows } = parseCsv(cli("lines", path));
  assert.equal(header[0], "line");
  return rows.map((r) => ({
    name: r[0],
    wavelength_nm: Number(r[1]),
    rotation_deg: Number(r[2]),
    specific_rotation: r[3] === "" ? null : Number(r[3]),
    molar_rotation: Number(r[4]),
  }));
}

/** |a - b| <= rel * max(|a|, |b|): equal to `rel` relative (0 == 0). */
export function assertClose(a, b, rel, what) {
  if (a === b) return;
  const scale = Math.max(Math.abs(a), Math.abs(b));
  assert.ok(Math.abs(a - b) <= rel * scale, `${what}: ${a} vs ${b} (relative ${Math.abs(a - b) / scale}, allowed ${rel})`);
}

/** The page's lamp lines equal the CLI's for the same document. */
export function assertLinesMatch(pageLines, cliRows, rel = 1e-12) {
  assert.equal(pageLines.length, cliRows.length, "number of lamp lines");
  pageLines.forEach((p, i) => {
    const c = cliRows[i];
    assert.equal(p.name, c.name);
    assertClose(p.wavelength_nm, c.wavelength_nm, rel, `${c.name} wavelength`);
    assertClose(p.rotation_deg, c.rotation_deg, rel, `${c.name} rotation`);
    assertClose(p.molar_rotation, c.molar_rotation, rel, `${c.name} molar rotation`);
    if (c.specific_rotation === null) assert.equal(p.specific_rotation, null, `${c.name} specific rotation`);
    else assertClose(p.specific_rotation, c.specific_rotation, rel, `${c.name} specific rotation`);
  });
}

/** Hashes of the four plot canvases. */
export async function plotHashes(page) {
  return page.evaluate(() => {
    const out = {};
    for (const key of ["cd", "ord", "abs", "index"]) {
      const c = document.getElementById(`plot-${key}`);
      const data = c.getContext("2d").getImageData(0, 0, c.width, c.height).data;
      let h = 2166136261;
      for (let i = 0; i < data.length; i++) h = Math.imul(h ^ data[i], 16777619) >>> 0;
      out[key] = h;
    }
    return out;
  });
}

/**
 * Types into a text box as a person does: a click, Ctrl+A to select what is
 * there, the text key by key, then Enter (unless `enter` is false).
 */
export async function typeInto(page, selector, text, { enter = true } = {}) {
  await page.click(selector);
  await page.keyboard.press("Control+A");
  await page.keyboard.type(text);
  if (enter) await page.keyboard.press("Enter");
}

/** Fills a text box the way typing does (one input event) and waits for the update. */
export async function enter(page, selector, text) {
  const updated = page.evaluate(
    () => new Promise((ok) => document.addEventListener("chiroptic:updated", (e) => ok(e.detail), { once: true })),
  );
  await page.fill(selector, text);
  return Promise.race([updated, new Promise((ok) => setTimeout(() => ok(null), 1000))]);
}

/** The message shown for a control (its aria-describedby slot). */
export async function messageFor(page, selector) {
  return page.$eval(selector, (el) => {
    const ids = (el.getAttribute("aria-describedby") ?? "").split(/\s+/).filter(Boolean);
    return ids.map((id) => document.getElementById(id)?.textContent ?? "").join(" ").trim();
  });
}

/**
 * Drops a file on the plots (or on the element `targetId`) as a person drags
 * one from the desktop (dragenter, dragover, drop with a DataTransfer
 * holding the file). `content` is text or bytes.
 */
export async function dropBytes(page, name, content, targetId = "plot-grid") {
  const bytes = typeof content === "string" ? [...new TextEncoder().encode(content)] : [...content];
  await page.evaluate(
    ({ name, bytes, targetId }) => {
      const dt = new DataTransfer();
      dt.items.add(new File([new Uint8Array(bytes)], name, { type: "text/plain" }));
      const target = document.getElementById(targetId);
      for (const type of ["dragenter", "dragover", "drop"]) {
        target.dispatchEvent(new DragEvent(type, { dataTransfer: dt, bubbles: true, cancelable: true }));
      }
    },
    { name, bytes, targetId },
  );
}

/** Drops the file at `path` on the plots (see `dropBytes`). */
export async function dropFile(page, path, name = path.split("/").pop()) {
  await dropBytes(page, name, readFileSync(path));
}

/** Drops a model file, then data files one after the other, each waited for until the document holds it. */
export async function dropModelAndData(page, modelPath, dataPaths = []) {
  await dropFile(page, modelPath);
  const title = JSON.parse(readFileSync(modelPath, "utf8")).title;
  await page.waitForFunction((t) => window.chiroptic.document().title === t, title);
  for (const [k, path] of dataPaths.entries()) {
    await dropFile(page, path);
    await page.waitForFunction((n) => (window.chiroptic.document().data ?? []).length === n, k + 1);
  }
}
