// How a fit treats each band field (centre, width, Lorentz part, R, D):
// free, held, free within bounds, or tied to another band. The modes live in
// the document's `fit` section (`free`, `parameters`), so they travel in
// files and links; this module reads and writes them and builds the one
// control that shows a field's mode, used twice: in the band list beside
// each value, and in the fit panel's per-band table. A change in either
// redraws both. Field keys and defaults come from the core's fit catalog.

import { $, el } from "./dom.js";
import { state } from "./state.js";
import * as core from "./core.js";
import { bindNumber } from "./fields.js";
import { edit } from "./edit.js";
import { renderFitTable } from "./fitparams.js";

/** The core's fit catalog (fields, default free fields, caps). */
export let fitCatalog = null;

/** Bands' names and shapes and the fit settings, which the controls are built from. */
const modesKey = () => JSON.stringify([state.doc?.bands.map((b) => [b.name, b.shape]), state.doc?.fit?.free, state.doc?.fit?.parameters]);

/** Loads the catalog; from then on a band added, renamed or reshaped, or a mode set, redraws the controls. */
export function bindModes() {
  const c = core.fitCatalog();
  if (!c.ok) throw new Error(`the core's fit catalog does not load: ${c.error.message}`);
  fitCatalog = c;
  let key = "";
  document.addEventListener("chiroptic:updated", () => {
    const now = modesKey();
    // A place skipped for its focus is drawn at a later update.
    if (now !== key && renderModes()) key = now;
  });
}

/** Words for each field; the keys are the core's. */
export const FIELD_WORDS = { centre: "Centre", width: "Width", lorentz: "Lorentz part", R: "R", D: "D" };
const BOUND_UNIT = { centre: "nm", width: "cm⁻¹", lorentz: "cm⁻¹", R: "", D: "debye²" };
const MODES = [
  ["free", "free"],
  ["held", "held"],
  ["bounded", "free within"],
  ["tied", "tied to"],
];

export const settings = () => state.doc.fit ?? {};

/** The fit section to change; an edit that leaves it empty takes it out again. */
export function change(fn) {
  state.doc.fit ??= {};
  fn(state.doc.fit);
  const f = state.doc.fit;
  if (f.parameters?.length === 0) delete f.parameters;
  if (f.free?.length === 0) delete f.free;
  if (Object.keys(f).length === 0) delete state.doc.fit;
  edit();
}

/** The fields free unless a band says otherwise (the core's default when the list is empty). */
export function defaultFree() {
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

/** The band a parameter name "BAND.field" (or a tie's target) names, else null. */
function bandPart(text) {
  const dot = text?.lastIndexOf(".") ?? -1;
  return dot > 0 ? text.slice(0, dot) : null;
}

/**
 * A renamed band takes its settings (its own and the ties to it) along, so
 * the next fit still finds them.
 */
export function renameInFitSettings(from, to) {
  const list = state.doc.fit?.parameters;
  if (!from || !list) return;
  const renamed = (text) => (bandPart(text) === from ? `${to}${text.slice(from.length)}` : text);
  for (const p of list) {
    p.parameter = renamed(p.parameter);
    if (p.link) p.link.to = renamed(p.link.to);
  }
}

/** Takes out the settings of bands that are gone (and ties to them), so no new band inherits them by name. */
export function forgetInFitSettings(names) {
  const f = state.doc.fit;
  if (!f?.parameters) return;
  const gone = (text) => names.includes(bandPart(text));
  f.parameters = f.parameters.filter((p) => !gone(p.parameter) && !gone(p.link?.to));
  if (!f.parameters.length) delete f.parameters;
  if (!Object.keys(f).length) delete state.doc.fit;
}

const othersThan = (i) => state.doc.bands.filter((b, j) => j !== i && b.name);

function chooseMode(band, i, field, mode, focusId) {
  const name = band.name;
  const isDefault = defaultFree().includes(field.key);
  if (mode === "free") setEntry(name, field.key, isDefault ? null : {});
  else if (mode === "held") setEntry(name, field.key, isDefault ? { fixed: true } : null);
  else if (mode === "bounded") {
    // A first span of ±10 % around the value, to be typed over.
    const v = band[field.key] ?? 0;
    const round = (x) => Number(x.toPrecision(4));
    setEntry(name, field.key, { min: round(v - 0.1 * Math.abs(v)), max: round(v + 0.1 * Math.abs(v)) });
  } else if (mode === "tied") {
    const others = othersThan(i);
    if (!others.length) return;
    setEntry(name, field.key, { link: { to: `${others[0].name}.${field.key}`, factor: 1, offset: 0 } });
  }
  renderModes({ all: true });
  $(focusId)?.focus();
}

/** A typed number of an entry (a bound, a factor, an offset); empty takes it out when `optional`. */
function entryNumber(id, label, band, field, where, get, put, { optional = true, unit = "" } = {}) {
  const input = el("input", { type: "text", inputMode: "decimal", className: "num short", id, autocomplete: "off" });
  input.setAttribute("aria-label", `${label} of ${band.name} ${FIELD_WORDS[field.short]}`);
  input.setAttribute("aria-describedby", where.errorId);
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

/**
 * The control of band i's `field`: the mode, and under it the bounds or the
 * tie. `where` = { prefix (of the ids), errorId (the message slot) }.
 */
function modeControl(band, i, field, where) {
  const id = (what) => `${where.prefix}-${what}`;
  const mode = modeOf(band.name, field.key);
  const select = el("select", { id: id("mode"), className: "fit-mode" });
  select.setAttribute("aria-label", `How the fit treats ${FIELD_WORDS[field.short]} of ${band.name || `band ${i + 1}`}`);
  const others = othersThan(i);
  for (const [key, words] of MODES) {
    if (key === "tied" && !others.length) continue;
    select.append(el("option", { value: key, textContent: words }));
  }
  select.value = mode;
  // Settings name bands: an unnamed band has none.
  select.disabled = !band.name;
  if (!band.name) select.title = "Name the band to set how the fit treats it";
  select.addEventListener("change", () => chooseMode(band, i, field, select.value, select.id));
  const parts = [select];
  const unit = BOUND_UNIT[field.short];
  const number = (what, label, get, put, opts) => entryNumber(id(what), label, band, field, where, get, put, opts);
  if (mode === "bounded") {
    parts.push(
      el("div", { className: "fit-sub" }, number("min", "lower bound", (p) => p?.min, (p, v) => (v === undefined ? delete p.min : (p.min = v)), { unit })),
      el("div", { className: "fit-sub" }, number("max", "upper bound", (p) => p?.max, (p, v) => (v === undefined ? delete p.max : (p.max = v)), { unit })),
    );
  } else if (mode === "tied") {
    const to = el("select", { id: id("to"), className: "fit-to" });
    to.setAttribute("aria-label", `Band that ${FIELD_WORDS[field.short]} of ${band.name} is tied to`);
    for (const b of others) to.append(el("option", { value: `${b.name}.${field.key}`, textContent: b.name }));
    to.value = entryOf(band.name, field.key)?.link?.to;
    to.addEventListener("change", () => {
      const p = entryOf(band.name, field.key);
      change(() => (p.link.to = to.value));
      renderModes();
    });
    const link = (p) => p?.link ?? { factor: 1, offset: 0 };
    parts.push(
      el("div", { className: "fit-sub" }, to),
      el("div", { className: "fit-sub" }, el("span", { className: "unit", textContent: "× " }),
        number("factor", "tie factor", (p) => link(p).factor ?? 1, (p, v) => (p.link = { ...link(p), factor: v }), { optional: false })),
      el("div", { className: "fit-sub" }, el("span", { className: "unit", textContent: "+ " }),
        number("offset", "tie offset", (p) => link(p).offset ?? 0, (p, v) => (p.link = { ...link(p), offset: v ?? 0 }), { unit: field.short === "centre" ? "cm⁻¹" : unit })),
    );
  }
  return parts;
}

/** The fields a fit can set that the table shows (the Lorentz part only when a band is Voigt). */
export function shownFields() {
  const voigt = state.doc.bands.some((b) => b.shape === "voigt");
  return fitCatalog.fields.filter((f) => f.short !== "lorentz" || voigt);
}

/** The fit panel table's cell of band i's field. */
export function tableCell(band, i, field) {
  return el("td", { className: "fit-cell" }, ...modeControl(band, i, field, { prefix: `fit-${i}-${field.short}`, errorId: "fit-table-error" }));
}

/** The band list's place for band i's mode of the field `short` (filled by `renderModes`). */
export function bandSlot(i, short) {
  const slot = el("div", { className: "fit-slot" });
  Object.assign(slot.dataset, { index: String(i), short });
  fillSlot(slot);
  return slot;
}

function fillSlot(slot) {
  const i = Number(slot.dataset.index);
  const band = state.doc.bands[i];
  const field = fitCatalog?.fields.find((f) => f.short === slot.dataset.short);
  if (!band || !field) return slot.replaceChildren();
  const tag = el("span", { className: "fit-tag", textContent: "fit", title: "How the fit treats this value (the same as in the fit panel's per-band table)" });
  const [select, ...subs] = modeControl(band, i, field, { prefix: `band-${i}-${field.short}-fit`, errorId: `band-${i}-error` });
  slot.replaceChildren(el("div", { className: "fit-sub" }, tag, select), ...subs);
}

/**
 * Shows the document's modes in both places. Unless `all`, a place holding
 * the focus is left as it is (its boxes show the document's values anyway),
 * so typing in it is not interrupted. True when nothing was left.
 */
export function renderModes({ all = false } = {}) {
  if (!fitCatalog || !state.doc) return false;
  let left = false;
  const busy = (node) => !all && node.contains(document.activeElement) && (left = true);
  if (!busy($("fit-rows"))) renderFitTable();
  for (const slot of $("band-rows").querySelectorAll(".fit-slot")) if (!busy(slot)) fillSlot(slot);
  return !left;
}
