// The wasm module in the browser and the native command line compute the same
// spectra for the demo: the page's CSV export and `chiroptic eval` on the same
// grid agree to 1e-12 relative in every column.
import { test } from "node:test";
import assert from "node:assert/strict";
import { browserTests, openPage, DEMO } from "../lib/harness.mjs";
import { cli, downloadText, parseCsv, assertClose, typeInto } from "../lib/page.mjs";

const env = browserTests();

test("wasm and native spectra of the demo agree within 1e-12", async () => {
  const { page, context } = await openPage(env);
  try {
    // The window 190–650 nm typed key by key; the CSV on a 1 nm step is the CLI's grid.
    await typeInto(page, "#range-from", "190");
    await typeInto(page, "#range-to", "650");
    await page.click("#export-menu summary");
    await page.selectOption("#csv-step", "1");
    const { name, text } = await downloadText(page, "#save-csv");
    assert.match(name, /\.csv$/);
    // The header block names the model and the sample (demo.json's values).
    assert.match(text, /^# chiroptic spectra/);
    assert.match(text, /^# title: INVENTED DEMO/m);
    assert.match(text, /^# concentration_mol_per_l: 0\.0005$/m);
    assert.match(text, /^# grid: 190 to 650 nm in steps of 1 nm/m);
    const web = parseCsv(text);
    const native = parseCsv(cli("eval", DEMO, "--from", "190", "--to", "650", "--step", "1", "--unit", "nm"));
    assert.deepEqual(web.header, native.header);
    assert.equal(web.rows.length, 461);
    assert.equal(native.rows.length, 461);
    let compared = 0;
    native.rows.forEach((row, i) => {
      assert.equal(web.rows[i][0], row[0], `wavelength of row ${i} is the round grid value`);
      row.forEach((cell, j) => {
        // An empty cell (g where there is no absorption) is empty in both.
        if (cell === "") assert.equal(web.rows[i][j], "", `${native.header[j]} at row ${i}`);
        else assertClose(Number(web.rows[i][j]), Number(cell), 1e-12, `${native.header[j]} at row ${i}`);
        compared++;
      });
    });
    assert.equal(compared, 461 * native.header.length);
  } finally {
    await context.close();
  }
});
