// How the fit treats each band value, set in the band list itself (beside
// each value) and in the fit panel's per-band table: the two show the same
// document entries, and the fit honours what was set there. Driven as a
// person does: modes chosen with the keyboard and the mouse, bounds typed
// key by key, Fit clicked. Data: the invented fit fixtures (fixtures/fit/,
// made by make_fit_reference.py from truth.json: B1 at 305 nm, B2 262 nm,
// B3 228 nm).
import { test } from "node:test";
import assert from "node:assert/strict";
import { readFileSync } from "node:fs";
import { join } from "node:path";
import { browserTests, openPage, ROOT } from "../lib/harness.mjs";
import { typeInto, dropModelAndData } from "../lib/page.mjs";

const env = browserTests();
const FIT = join(ROOT, "fixtures", "fit");
const START = join(FIT, "start.json");
const TRUTH = JSON.parse(readFileSync(join(FIT, "truth.json"), "utf8"));

const documentOf = (page) => page.evaluate(() => window.chiroptic.document());
const R = "rotatory_strength_1e40_cgs";

/** The invented start model with its CD and ORD sets, dropped on the page. */
const loadProblem = (page) => dropModelAndData(page, START, ["cd.csv", "ord.csv"].map((f) => join(FIT, f)));

/** The text of a select's chosen option, as a person reads it. */
const shown = (page, selector) => page.$eval(selector, (s) => s.selectedOptions[0]?.textContent);

async function fitToTheEnd(page) {
  await page.click("#fit-run");
  await page.waitForSelector("#fit-report:not([hidden])", { timeout: 60000 });
  return documentOf(page);
}

test("R held from the band list (keyboard): the fit panel's table says held too, and the fit leaves R to the last digit", async () => {
  const { page } = await openPage(env);
  await loadProblem(page);
  await page.click("#fit-per-band summary");
  // Defaults: R free, D held (not free by default).
  assert.equal(await shown(page, "#band-1-R-fit-mode"), "free");
  assert.equal(await shown(page, "#fit-1-R-mode"), "free");
  assert.equal(await shown(page, "#band-1-D-fit-mode"), "held");
  // The keyboard alone: focus the control, one step down the list (free → held).
  await page.focus("#band-1-R-fit-mode");
  await page.keyboard.press("ArrowDown");
  assert.equal(await page.evaluate(() => document.activeElement.id), "band-1-R-fit-mode", "the focus stays on the control");
  assert.equal(await shown(page, "#band-1-R-fit-mode"), "held");
  assert.equal(await shown(page, "#fit-1-R-mode"), "held", "the fit panel's table follows the band list");
  const start = await documentOf(page);
  assert.deepEqual(start.fit.parameters, [{ parameter: `B2.${R}`, fixed: true }], "one entry in the document's fit settings");
  await typeInto(page, "#fit-starts", "2");

  const fitted = await fitToTheEnd(page);
  assert.equal(fitted.bands[1][R], start.bands[1][R], "held R unchanged to the last digit");
  assert.equal(fitted.fit.report.parameters.find((p) => p.name === `B2.${R}`).mode, "fixed");
  // The fit did run: the free strengths moved from the start.
  assert.notEqual(fitted.bands[0][R], start.bands[0][R]);
  assert.notEqual(fitted.bands[2][R], start.bands[2][R]);

  // And back from the fit panel's table (mouse): the band list follows.
  await page.selectOption("#fit-1-R-mode", "free");
  assert.equal(await shown(page, "#band-1-R-fit-mode"), "free", "the band list follows the fit panel's table");
  assert.equal((await documentOf(page)).fit.parameters, undefined, "free by default: no entry left");
});

test("a bound typed key by key in the band list is honoured by the fit and shown in the fit panel's table", async () => {
  const { page } = await openPage(env);
  await loadProblem(page);
  await page.click("#fit-per-band summary");
  await page.selectOption("#band-0-centre-fit-mode", "bounded");
  assert.equal(await shown(page, "#fit-0-centre-mode"), "free within");
  // B1's true centre is 305 nm (truth.json); bounds that leave it out must hold the fit inside them.
  assert.equal(TRUTH.bands[0].center_nm, 305);
  const [lo, hi] = [296, 302];
  await typeInto(page, "#band-0-centre-fit-min", String(lo));
  await typeInto(page, "#band-0-centre-fit-max", String(hi));
  const start = await documentOf(page);
  assert.deepEqual(start.fit.parameters, [{ parameter: "B1.center_nm", min: lo, max: hi }]);
  assert.equal(await page.inputValue("#fit-0-centre-min"), String(lo), "the fit panel's table shows the typed bound");
  assert.equal(await page.inputValue("#fit-0-centre-max"), String(hi));
  await typeInto(page, "#fit-starts", "2");

  const fitted = await fitToTheEnd(page);
  const centre = fitted.bands[0].center_nm;
  assert.ok(centre >= lo && centre <= hi, `fitted centre ${centre} nm inside [${lo}, ${hi}]`);
  // The data pull B1 towards 305 nm, so the bound is what stops it: near the upper end.
  assert.ok(centre > hi - 1, `fitted centre ${centre} nm pressed to the upper bound ${hi}`);
  // The bound travels with the fitted document, shown in both places.
  assert.equal(await shown(page, "#band-0-centre-fit-mode"), "free within");
  assert.equal(await page.inputValue("#band-0-centre-fit-max"), String(hi));
});

test("a text in a bound box is named beside it in the band list and changes nothing", async () => {
  const { page } = await openPage(env);
  await loadProblem(page);
  await page.selectOption("#band-2-width-fit-mode", "bounded");
  const before = await documentOf(page);
  await typeInto(page, "#band-2-width-fit-min", "wide");
  assert.match(await page.textContent("#band-2-error"), /lower bound/, "the message names the box");
  assert.deepEqual(await documentOf(page), before, "nothing changed");
});

test("a tie set in the band list (R of B3 = −R of B2) is the fit panel's, and the fit keeps it exactly", async () => {
  const { page } = await openPage(env);
  await loadProblem(page);
  await page.click("#fit-per-band summary");
  await page.selectOption("#band-2-R-fit-mode", "tied");
  await page.selectOption("#band-2-R-fit-to", `B2.${R}`);
  await typeInto(page, "#band-2-R-fit-factor", "-1");
  assert.equal(await shown(page, "#fit-2-R-mode"), "tied to");
  assert.equal(await page.inputValue("#fit-2-R-to"), `B2.${R}`);
  assert.equal(await page.inputValue("#fit-2-R-factor"), "-1");
  await typeInto(page, "#fit-starts", "1");
  const fitted = await fitToTheEnd(page);
  assert.equal(fitted.bands[2][R], -fitted.bands[1][R], "R(B3) = −R(B2) to the last bit");
});
