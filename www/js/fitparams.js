// The fit's settings, all kept in the document's `fit` section (so they
// travel in files and links): the fields free by default, shift / offsets /
// scales, the number of starts and the iteration limit, and the per-band
// table of modes (free, held, within bounds, tied: fitmodes.js, which the
// band list shares).

import { $, el } from "./dom.js";
import { state } from "./state.js";
import * as core from "./core.js";
import { bindNumber } from "./fields.js";
import { fitCatalog, bindModes, FIELD_WORDS, settings, change, defaultFree, shownFields, tableCell, renderModes } from "./fitmodes.js";

/** The per-band table: one row per band, one column per field a fit can set. */
export function renderFitTable() {
  if (!fitCatalog || !state.doc) return;
  const fields = shownFields();
  const head = el("tr", {}, el("th", { scope: "col", textContent: "Band" }), ...fields.map((f) => el("th", { scope: "col", textContent: FIELD_WORDS[f.short] })));
  $("fit-table-head").replaceChildren(head);
  const rows = state.doc.bands.map((band, i) => {
    const swatch = el("span", { className: "swatch" });
    swatch.style.background = core.bandColour(i);
    const cells = fields.map((f) => (f.short === "lorentz" && band.shape !== "voigt" ? el("td", { className: "fit-cell", textContent: "—" }) : tableCell(band, i, f)));
    return el("tr", {}, el("th", { scope: "row" }, el("span", { className: "name-cell" }, swatch, band.name || `band ${i + 1} (unnamed)`)), ...cells);
  });
  const note = el("tr", {}, el("td", { colSpan: fields.length + 1 }, el("span", { id: "fit-table-error", className: "field-error", role: "status" })));
  $("fit-rows").replaceChildren(...rows, note);
}

/** The controls that show the document's fit settings. */
export function renderFitSettings() {
  if (!fitCatalog || !state.doc) return;
  const free = defaultFree();
  for (const f of fitCatalog.fields) {
    const box = $(`fit-free-${f.short}`);
    if (box) box.checked = free.includes(f.key);
  }
  for (const key of ["shift", "offsets", "scales"]) $(`fit-${key}`).checked = Boolean(settings()[key]);
  renderModes({ all: true });
}

export function bindFitSettings() {
  bindModes();
  const free = $("fit-free");
  for (const f of fitCatalog.fields) {
    const box = el("input", { type: "checkbox", id: `fit-free-${f.short}` });
    box.dataset.field = "fit.free";
    box.addEventListener("change", () => {
      const now = new Set(defaultFree());
      if (box.checked) now.add(f.key);
      else now.delete(f.key);
      // Keys in the catalog's order; the default list is written as no list at all.
      const list = fitCatalog.fields.map((g) => g.key).filter((k) => now.has(k));
      const same = list.length === fitCatalog.default_free.length && list.every((k) => fitCatalog.default_free.includes(k));
      // An empty list would mean the default, so the last field cannot be unticked.
      if (!list.length) {
        box.checked = true;
        return;
      }
      change((s) => (s.free = same ? [] : list));
      renderModes({ all: true });
    });
    free.append(el("span", { className: "check-row" }, box, el("label", { htmlFor: box.id, textContent: FIELD_WORDS[f.short] })));
  }
  for (const key of ["shift", "offsets", "scales"]) {
    $(`fit-${key}`).addEventListener("change", (e) => change((s) => (e.target.checked ? (s[key] = true) : delete s[key])));
  }
  const whole = (id, key, fallback, max, what) =>
    bindNumber({
      input: $(id),
      slider: null,
      label: "",
      canonical: true,
      optional: true,
      integer: true,
      deferred: true,
      unit: () => "",
      get: () => settings()[key] ?? fitCatalog[fallback],
      set: (v) => {
        if (v !== undefined && (v < 1 || v > fitCatalog[max])) throw new Error(`${what} must be a whole number from 1 to ${fitCatalog[max]}`);
        state.doc.fit ??= {};
        if (v === undefined || v === fitCatalog[fallback]) delete state.doc.fit[key];
        else state.doc.fit[key] = v;
        if (Object.keys(state.doc.fit).length === 0) delete state.doc.fit;
      },
      step: () => 1,
      range: () => [1, fitCatalog[max]],
    });
  whole("fit-starts", "starts", "default_starts", "max_starts", "the number of starts");
  whole("fit-iterations", "max_iterations", "default_max_iterations", "max_iterations", "the iteration limit");
}
