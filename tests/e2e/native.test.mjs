// The wasm module in the browser and the native command line compute the same
// spectra for the demo: the page's CSV export and `chiroptic eval` on the same
// grid agree to 1e-12 relative in every column.
import { test, before, after } from "node:test";
import assert from "node:assert/strict";
import { startBrowser, openPage, DEMO } from "../lib/harness.mjs";
import { cli, downloadText, enter, parseCsv, assertClose } from "../lib/page.mjs";

let env;
before(async () => (env = await startBrowser()));
after(async () => env && (await env.close()));

test("wasm and native spectra of the demo agree within 1e-12", async () => {
  const { page, context, log } = await openPage(env);
  try {
    // 180..650 nm with 471 points is the CLI's 1 nm step.
    await enter(page, "#range-from", "180");
    await enter(page, "#range-to", "650");
    await enter(page, "#points", "471");
    const { name, text } = await downloadText(page, "#save-csv");
    assert.match(name, /\.csv$/);
    const web = parseCsv(text);
    const native = parseCsv(cli("eval", DEMO, "--from", "180", "--to", "650", "--step", "1", "--unit", "nm"));
    assert.deepEqual(web.header, native.header);
    assert.equal(web.rows.length, 471);
    assert.equal(native.rows.length, 471);
    let compared = 0;
    native.rows.forEach((row, i) => {
      row.forEach((cell, j) => {
        assertClose(Number(web.rows[i][j]), Number(cell), 1e-12, `${native.header[j]} at row ${i}`);
        compared++;
      });
    });
    assert.equal(compared, 471 * native.header.length);
    assert.deepEqual(log.errors, []);
  } finally {
    await context.close();
  }
});
