// The fit's settings, all kept in the document's `fit` section (so they
// travel in files and links): the fields free by default, shift / offsets /
// scales, the number of starts and the iteration limit, and per band and
// field a mode: free, held, within bounds, or tied to another band. The
// field keys and defaults come from the core's fit catalog.

import { $, el } from "./dom.js";
import { state } from "./state.js";
import * as core from "./core.js";
import { bindNumber } from "./fields.js";
import { edit } from "./edit.js";

/** The core's fit catalog (fields, default free fields, caps). */
export let fitCatalog = null;

/** Words for each field's column; the keys are the core's. */
const FIELD_WORDS = { centre: "Centre", width: "Width", lorentz: "Lorentz part", R: "R", D: "D" };
const BOUND_UNIT = { centre: "nm", width: "cm⁻¹", lorentz: "cm⁻¹", R: "", D: "debye²" };
const MODES = [
  ["free", "free"],
  ["held", "held"],
  ["bounded", "free within"],
  ["tied", "tied to"],
];

const settings = () => state.doc.fit ?? {};
/** The fit section to change; an edit that leaves it empty takes it out again. */
function change(fn) {
  state.doc.fit ??= {};
  fn(state.doc.fit);
  const f = state.doc.fit;
  if (f.parameters?.length === 0) delete f.parameters;
  if (f.free?.length === 0) delete f.free;
  if (Object.keys(f).length === 0) delete state.doc.fit;
  edit();
}

/** The fields free unless a band says otherwise (the core's default when the list is empty). */
function defaultFree() {
  const free = settings().free ?? [];
  const keys = free.map((f) => fitCatalog.fields.find((c) => c.key === f || c.short === f)?.key ?? f);
  return keys.length ? keys : fitCatalog.default_free;
}

const entryOf = (name, key) => (settings().parameters ?? []).find((p) => p.parameter === `${name}.${key}`);

/** The mode shown for a band's field. */
function modeOf(name, key) {
  const p = entryOf(name, key);
  if (!p) return defaultFree().includes(key) ? "free" : "held";
  if (p.link) return "tied";
  if (p.fixed) return "held";
  return p.min !== undefined || p.max !== undefined ? "bounded" : "free";
}

/** Sets a band field's entry (null: none, the default applies). */
function setEntry(name, key, entry) {
  change((f) => {
    const list = (f.parameters ?? []).filter((p) => p.parameter !== `${name}.${key}`);
    if (entry) list.push({ parameter: `${name}.${key}`, ...entry });
    f.parameters = list;
  });
}

function chooseMode(band, i, field, mode) {
  const name = band.name;
  const isDefault = defaultFree().includes(field.key);
  const others = state.doc.bands.filter((b, j) => j !== i && b.name);
  if (mode === "free") setEntry(name, field.key, isDefault ? null : {});
  else if (mode === "held") setEntry(name, field.key, isDefault ? { fixed: true } : null);
  else if (mode === "bounded") {
    // A first span of ±10 % around the value, to be typed over.
    const v = band[field.key] ?? 0;
    const round = (x) => Number(x.toPrecision(4));
    setEntry(name, field.key, { min: round(v - 0.1 * Math.abs(v)), max: round(v + 0.1 * Math.abs(v)) });
  }
  else if (mode === "tied") {
    if (!others.length) return;
    setEntry(name, field.key, { link: { to: `${others[0].name}.${field.key}`, factor: 1, offset: 0 } });
  }
  renderFitTable();
  $(`fit-${i}-${field.short}-mode`)?.focus();
}

/** A typed number of an entry (a bound, a factor, an offset); empty takes it out when `optional`. */
function entryNumber(id, label, band, field, get, put, { optional = true, unit = "" } = {}) {
  const input = el("input", { type: "text", inputMode: "decimal", className: "num short", id, autocomplete: "off" });
  input.setAttribute("aria-label", `${label} of ${band.name} ${FIELD_WORDS[field.short]}`);
  input.setAttribute("aria-describedby", "fit-table-error");
  input.dataset.field = "fit.parameters";
  bindNumber({
    input,
    slider: null,
    label: `${band.name} ${FIELD_WORDS[field.short]} ${label}`,
    canonical: true,
    optional,
    deferred: true,
    unit: () => unit,
    get: () => get(entryOf(band.name, field.key)),
    set: (v) => {
      if (v === undefined && !optional) throw new Error("enter a number");
      const p = structuredClone(entryOf(band.name, field.key) ?? {});
      put(p, v);
      delete p.parameter;
      state.doc.fit.parameters = (state.doc.fit.parameters ?? []).filter((q) => q.parameter !== `${band.name}.${field.key}`);
      state.doc.fit.parameters.push({ parameter: `${band.name}.${field.key}`, ...p });
    },
    step: () => 1,
    range: () => [0, 1],
  });
  return unit ? el("span", { className: "with-unit" }, input, el("span", { className: "unit", textContent: unit })) : input;
}

function fieldCell(band, i, field) {
  const mode = modeOf(band.name, field.key);
  const select = el("select", { id: `fit-${i}-${field.short}-mode`, className: "fit-mode" });
  select.setAttribute("aria-label", `How the fit treats ${FIELD_WORDS[field.short]} of ${band.name || `band ${i + 1}`}`);
  const others = state.doc.bands.filter((b, j) => j !== i && b.name);
  for (const [key, words] of MODES) {
    if (key === "tied" && !others.length) continue;
    select.append(el("option", { value: key, textContent: words }));
  }
  select.value = mode;
  select.disabled = !band.name;
  select.addEventListener("change", () => chooseMode(band, i, field, select.value));
  const cell = el("td", { className: "fit-cell" }, select);
  const id = (what) => `fit-${i}-${field.short}-${what}`;
  const unit = BOUND_UNIT[field.short];
  if (mode === "bounded") {
    cell.append(
      el("div", { className: "fit-sub" }, entryNumber(id("min"), "lower bound", band, field, (p) => p?.min, (p, v) => (v === undefined ? delete p.min : (p.min = v)), { unit })),
      el("div", { className: "fit-sub" }, entryNumber(id("max"), "upper bound", band, field, (p) => p?.max, (p, v) => (v === undefined ? delete p.max : (p.max = v)), { unit })),
    );
  } else if (mode === "tied") {
    const to = el("select", { id: id("to"), className: "fit-to" });
    to.setAttribute("aria-label", `Band that ${FIELD_WORDS[field.short]} of ${band.name} is tied to`);
    for (const b of others) to.append(el("option", { value: `${b.name}.${field.key}`, textContent: b.name }));
    to.value = entryOf(band.name, field.key)?.link?.to;
    to.addEventListener("change", () => {
      const p = entryOf(band.name, field.key);
      change(() => (p.link.to = to.value));
    });
    const link = (p) => p?.link ?? { factor: 1, offset: 0 };
    cell.append(
      el("div", { className: "fit-sub" }, to),
      el("div", { className: "fit-sub" }, el("span", { className: "unit", textContent: "× " }),
        entryNumber(id("factor"), "tie factor", band, field, (p) => link(p).factor ?? 1, (p, v) => (p.link = { ...link(p), factor: v }), { optional: false })),
      el("div", { className: "fit-sub" }, el("span", { className: "unit", textContent: "+ " }),
        entryNumber(id("offset"), "tie offset", band, field, (p) => link(p).offset ?? 0, (p, v) => (p.link = { ...link(p), offset: v ?? 0 }), { unit: field.short === "centre" ? "cm⁻¹" : unit })),
    );
  }
  return cell;
}

/** The per-band table: one row per band, one column per field a fit can set. */
export function renderFitTable() {
  if (!fitCatalog || !state.doc) return;
  const voigt = state.doc.bands.some((b) => b.shape === "voigt");
  const fields = fitCatalog.fields.filter((f) => f.short !== "lorentz" || voigt);
  const head = el("tr", {}, el("th", { scope: "col", textContent: "Band" }), ...fields.map((f) => el("th", { scope: "col", textContent: FIELD_WORDS[f.short] })));
  $("fit-table-head").replaceChildren(head);
  const rows = state.doc.bands.map((band, i) => {
    const swatch = el("span", { className: "swatch" });
    swatch.style.background = core.bandColour(i);
    const cells = fields.map((f) => (f.short === "lorentz" && band.shape !== "voigt" ? el("td", { className: "fit-cell", textContent: "—" }) : fieldCell(band, i, f)));
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
  renderFitTable();
}

export function bindFitSettings() {
  const c = core.fitCatalog();
  if (!c.ok) throw new Error(`the core's fit catalog does not load: ${c.error.message}`);
  fitCatalog = c;
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
      renderFitTable();
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
