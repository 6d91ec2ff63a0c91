// The page starts offline on the invented demo, draws all four plots, logs no
// console error and asks nothing of any host but 127.0.0.1; it stays usable at
// 1280x800 and 800 px wide, in light and dark.
import { test } from "node:test";
import assert from "node:assert/strict";
import { browserTests, openPage, canvasDigest } from "../lib/harness.mjs";

const env = browserTests();

const PLOTS = ["cd", "ord", "abs", "index"];

for (const [name, opts] of [
  ["1280x800, light", { width: 1280, height: 800 }],
  ["800 px wide, dark", { width: 800, height: 900, colorScheme: "dark" }],
]) {
  test(`loads cleanly and draws four plots (${name})`, async () => {
    const { page, context, log } = await openPage(env, opts);
    try {
      assert.match(await page.inputValue("#doc-title"), /INVENTED DEMO/, "the invented demo opens on first visit");
      assert.equal(await page.locator("tr.band-row").count(), 3, "the demo's three bands are listed");
      for (const key of PLOTS) {
        const d = await canvasDigest(page, `plot-${key}`);
        assert.ok(d.width >= 250 && d.height >= 150, `${key} canvas is ${d.width}x${d.height}`);
        // Axes, ticks, labels and traces: well over 2 % of the pixels differ from the background.
        assert.ok(d.inked > 0.02 * d.width * d.height, `${key} canvas has only ${d.inked} drawn pixels`);
      }
      assert.equal(await page.locator("#lines-rows tr").count(), 7, "seven lamp lines");
      assert.match(await page.textContent(".caution"), /not a validated assay/);
      assert.match(await page.textContent(".caution"), /eyes and skin/);
      // Nothing wider than the window: every panel is readable without scrolling sideways.
      const overflow = await page.evaluate(() => document.documentElement.scrollWidth - document.documentElement.clientWidth);
      assert.ok(overflow <= 0, `page is ${overflow}px wider than the window`);
      const bandTable = await page.evaluate(() => {
        const t = document.querySelector(".table-scroll");
        return t.scrollWidth - t.clientWidth;
      });
      assert.ok(bandTable <= 0, `band list needs ${bandTable}px of sideways scrolling`);
      assert.deepEqual(log.errors, [], "console errors");
      assert.deepEqual(log.foreign, [], "requests that left 127.0.0.1");
      assert.ok(log.requests.some((u) => u.endsWith(".wasm")), "the wasm module came from the local server");
    } finally {
      await context.close();
    }
  });
}

test("every control has an accessible name", async () => {
  const { page, context } = await openPage(env);
  try {
    const unnamed = await page.evaluate(() =>
      [...document.querySelectorAll("input, select, button")]
        .filter((el) => !el.hidden && el.type !== "file")
        .filter((el) => {
          const label = el.labels?.length ? [...el.labels].map((l) => l.textContent).join("") : "";
          const name = (el.getAttribute("aria-label") ?? "") || label || (el.tagName === "BUTTON" ? el.textContent : "");
          return name.trim() === "";
        })
        .map((el) => el.outerHTML.slice(0, 80)),
    );
    assert.deepEqual(unnamed, []);
  } finally {
    await context.close();
  }
});

test("the sign conventions are one hover away", async () => {
  const { page, context } = await openPage(env);
  try {
    const tip = page.locator("#hint-ord");
    assert.equal(await tip.isVisible(), false);
    await page.hover('.plot[data-plot="ord"] .hint');
    await tip.waitFor({ state: "visible" });
    // Convention of physics.md: positive rotation is dextrorotatory.
    assert.match(await tip.textContent(), /dextrorotatory/);
    await page.hover('.plot[data-plot="cd"] .hint');
    // Left minus right, with the subscripts typeset (no "_L").
    assert.match(await page.textContent("#hint-cd"), /εₗ − εᵣ/);
  } finally {
    await context.close();
  }
});

test("print keeps the plots and tables and drops the controls", async () => {
  const { page, context } = await openPage(env, { colorScheme: "dark" });
  try {
    await page.emulateMedia({ media: "print" });
    for (const hidden of ["#window-bar", "#add-band", ".file-actions", "#readout", "input[type=range]"]) {
      assert.equal(await page.locator(hidden).first().isVisible(), false, `${hidden} is not printed`);
    }
    for (const shown of ["#plot-cd", "#plot-index", "#lines-table", "#band-table", ".caution"]) {
      assert.equal(await page.locator(shown).isVisible(), true, `${shown} is printed`);
    }
    // Plots drawn for the dark screen are turned light on paper.
    const filter = await page.$eval("#plot-cd", (c) => getComputedStyle(c).filter);
    assert.match(filter, /invert\(1\)/);
  } finally {
    await context.close();
  }
});
