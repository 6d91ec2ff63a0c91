// The band list: one row per band (name, shape, centre, width, R, D, row
// actions), each with the band's plot colour, and beside each value how the
// fit treats it (fitmodes.js). Shapes, the new band's values and its name
// come from the core's catalog.

import { $, el } from "./dom.js";
import { state } from "./state.js";
import * as core from "./core.js";
import { shortest } from "./format.js";
import { bindNumber } from "./fields.js";
import { edit, redraw } from "./edit.js";
import { unitLabel } from "./plots.js";
import { bandSlot, renameInFitSettings } from "./fitmodes.js";

/** Arrow-key step of band centres and widths, per unit shown. */
const BAND_STEP = { nm: 1, "cm-1": 100, ev: 0.01 };
/** Slider spans (the box takes any value the core accepts). */
const CENTRE_SLIDER_NM = [150, 800];
const WIDTH_SLIDER_CM1 = [200, 10000];
const R_SLIDER = [-100, 100];
const D_SLIDER = [0, 20];

const spanOf = (ends) => [Math.min(...ends), Math.max(...ends)];

/** A number cell: text box above a slider. */
export function numberCell(id, label, errorId) {
  const input = el("input", { type: "text", inputMode: "decimal", className: "num", id, autocomplete: "off" });
  input.setAttribute("aria-label", label);
  input.setAttribute("aria-describedby", errorId);
  const slider = el("input", { type: "range", className: "slider", tabIndex: -1 });
  slider.setAttribute("aria-label", `${label}, slider`);
  return { input, slider, cell: el("div", { className: "num-cell" }, input, slider) };
}

/** A number of band i: its cell, bound to `key` of the band. */
function bandNumber(i, what, key, label, spec) {
  const c = numberCell(`band-${i}-${what}`, `${label} of band ${i + 1}`, `band-${i}-error`);
  c.input.dataset.field = `bands[${i}].${key}`;
  bindNumber({ ...c, label: "", ...spec });
  return c;
}

/** A width (stored in cm⁻¹, shown in the chosen width unit). */
function widthSpec(band, key, label) {
  const u = () => state.ui.widthUnit;
  const to = (w, from, into) => core.convertWidth(w, from, into, band.center_nm);
  return {
    label,
    canonical: false,
    unit: () => unitLabel(u()),
    get: () => to(band[key], "cm-1", u()),
    set: (v) => (band[key] = shortest(to(v, u(), "cm-1"), v, (c) => to(c, "cm-1", u()))),
    step: () => BAND_STEP[u()],
    range: () => spanOf(WIDTH_SLIDER_CM1.map((w) => to(w, "cm-1", u()))),
  };
}

function centreSpec(band) {
  const u = () => state.ui.centerUnit;
  return {
    canonical: false,
    unit: () => unitLabel(u()),
    get: () => core.convertPosition(band.center_nm, "nm", u()),
    set: (v) => (band.center_nm = shortest(core.convertPosition(v, u(), "nm"), v, (c) => core.convertPosition(c, "nm", u()))),
    step: () => BAND_STEP[u()],
    range: () => spanOf(CENTRE_SLIDER_NM.map((nm) => core.convertPosition(nm, "nm", u()))),
  };
}

const strengthSpec = (band, key, step, range) => ({
  canonical: true,
  unit: () => "",
  get: () => band[key],
  set: (v) => (band[key] = v),
  step: () => step,
  range: () => range,
});

function nameCell(tr, band, i) {
  const swatch = el("span", { className: "swatch", title: `Colour of band ${i + 1} in the plots` });
  const name = el("input", { type: "text", value: band.name ?? "", className: "name", id: `band-${i}-name`, maxLength: 80, spellcheck: false, autocomplete: "off" });
  name.setAttribute("aria-label", `Name of band ${i + 1}`);
  name.dataset.field = `bands[${i}].name`;
  name.setAttribute("aria-describedby", `band-${i}-error`);
  name.addEventListener("input", () => {
    renameInFitSettings(band.name ?? "", name.value);
    band.name = name.value;
    labelActions(tr, band, i);
    edit({ merge: name });
  });
  return el("td", { className: "col-name" }, el("div", { className: "name-cell" }, swatch, name));
}

function shapeCell(band, i) {
  const shape = el("select", { className: "shape", id: `band-${i}-shape` });
  shape.setAttribute("aria-label", `Shape of band ${i + 1}`);
  shape.dataset.field = `bands[${i}].shape`;
  shape.setAttribute("aria-describedby", `band-${i}-error`);
  const shapes = core.catalog.shapes;
  for (const s of shapes) shape.append(el("option", { value: s.key, textContent: s.label }));
  if (!shapes.some((s) => s.key === band.shape)) shape.append(el("option", { value: band.shape, textContent: band.shape }));
  shape.value = band.shape;
  shape.addEventListener("change", () => {
    band.shape = shape.value;
    // The Lorentzian part of a Voigt band is kept aside while another shape is chosen.
    if (band.shape === "voigt") band.lorentz_fwhm_cm1 ??= band._lorentz ?? band.fwhm_cm1 / 2;
    else if (band.lorentz_fwhm_cm1 !== undefined) {
      Object.defineProperty(band, "_lorentz", { value: band.lorentz_fwhm_cm1, enumerable: false, writable: true });
      delete band.lorentz_fwhm_cm1;
    }
    renderBands();
    edit();
    $("band-rows").querySelector(`tr[data-index="${i}"] select.shape`)?.focus();
  });
  return el("td", { className: "col-shape" }, shape);
}

function widthCell(band, i) {
  const w = bandNumber(i, "width", "fwhm_cm1", "Width", widthSpec(band, "fwhm_cm1", ""));
  const td = el("td", { className: "col-num" }, w.cell, bandSlot(i, "width"));
  if (band.shape === "voigt") {
    const l = bandNumber(i, "lorentz", "lorentz_fwhm_cm1", "Lorentzian width", widthSpec(band, "lorentz_fwhm_cm1", "Lorentzian part"));
    l.input.placeholder = "Lorentz part";
    td.append(el("div", { className: "sub-label", textContent: "Lorentzian part" }), l.cell, bandSlot(i, "lorentz"));
  }
  return td;
}

function actionsCell(i) {
  const action = (text, verb, title, fn, disabled = false) => {
    const b = el("button", { type: "button", className: "icon", textContent: text, title, disabled });
    b.dataset.verb = verb;
    b.addEventListener("click", fn);
    return b;
  };
  const last = state.doc.bands.length - 1;
  return el(
    "td",
    { className: "col-actions" },
    el(
      "div",
      { className: "actions" },
      action("▲", "Move {} up", "Move up", () => moveBand(i, -1, "up"), i === 0),
      action("▼", "Move {} down", "Move down", () => moveBand(i, 1, "down"), i === last),
      action("❐", "Duplicate {}", "Duplicate", () => duplicateBand(i)),
      action("✕", "Delete {}", "Delete", () => deleteBand(i)),
    ),
  );
}

function bandRows(band, i) {
  const tr = el("tr", { className: "band-row" });
  tr.dataset.index = String(i);
  tr.style.setProperty("--band", core.bandColour(i));
  tr.append(nameCell(tr, band, i), shapeCell(band, i));
  // A value's cell, with how the fit treats it under it.
  const value = (c, short) => el("td", { className: "col-num" }, c.cell, bandSlot(i, short));
  tr.append(value(bandNumber(i, "center", "center_nm", "Centre", centreSpec(band)), "centre"));
  tr.append(widthCell(band, i));
  tr.append(value(bandNumber(i, "r", "rotatory_strength_1e40_cgs", "Rotatory strength", strengthSpec(band, "rotatory_strength_1e40_cgs", 1, R_SLIDER)), "R"));
  tr.append(value(bandNumber(i, "d", "dipole_strength_debye2", "Dipole strength", strengthSpec(band, "dipole_strength_debye2", 0.1, D_SLIDER)), "D"));
  tr.append(actionsCell(i));
  labelActions(tr, band, i);
  const errRow = el("tr", { className: "row-error", hidden: true });
  errRow.append(el("td", { colSpan: 7 }, el("span", { className: "field-error", id: `band-${i}-error`, role: "status" })));
  return [tr, errRow];
}

export function renderBands() {
  const rows = state.doc.bands.flatMap(bandRows);
  $("band-rows").replaceChildren(...rows);
  if (state.doc.bands.length === 0) {
    const td = el("td", { colSpan: 7, className: "empty" }, "No bands: add one to see a spectrum.");
    $("band-rows").append(el("tr", {}, td));
  }
}

/** Names the row's buttons after the band, so they read well when renamed. */
function labelActions(tr, band, i) {
  const who = `band ${i + 1} (${core.bandName(band, i)})`;
  tr.querySelectorAll("button[data-verb]").forEach((b) => b.setAttribute("aria-label", b.dataset.verb.replace("{}", who)));
}

function focusRowButton(i, selector) {
  const row = $("band-rows").querySelector(`tr[data-index="${i}"]`);
  const target = row?.querySelector(selector);
  (target && !target.disabled ? target : row?.querySelector("input.name"))?.focus();
}

function moveBand(i, by, which) {
  const j = i + by;
  const bands = state.doc.bands;
  if (j < 0 || j >= bands.length) return;
  [bands[i], bands[j]] = [bands[j], bands[i]];
  renderBands();
  edit();
  focusRowButton(j, `button[title="Move ${which}"]`);
}

function duplicateBand(i) {
  const copy = structuredClone(state.doc.bands[i]);
  copy.name = `${core.bandName(copy, i)} copy`;
  state.doc.bands.splice(i + 1, 0, copy);
  renderBands();
  edit();
  focusRowButton(i + 1, "input.name");
}

function deleteBand(i) {
  state.doc.bands.splice(i, 1);
  renderBands();
  edit();
  const n = state.doc.bands.length;
  if (n) focusRowButton(Math.min(i, n - 1), "input.name");
  else $("add-band").focus();
}

/** A new band (the core's starting values) in the middle of the window, with a free name. */
function addBand() {
  const bands = state.doc.bands;
  const [lo, hi] = state.drawn?.range_nm ?? core.catalog.new_band_window_nm;
  const names = new Set(bands.map((b) => b.name));
  const prefix = core.catalog.band_name_prefix;
  let k = bands.length + 1;
  while (names.has(`${prefix}${k}`)) k++;
  bands.push({ ...structuredClone(core.catalog.new_band), name: `${prefix}${k}`, center_nm: Math.round((lo + hi) / 2) });
  renderBands();
  edit();
  focusRowButton(bands.length - 1, "input.name");
}

export function bindBandTable() {
  $("add-band").addEventListener("click", addBand);
  const rows = $("band-rows");
  // The band whose row has the focus is drawn emphasised.
  rows.addEventListener("focusin", (e) => {
    const i = Number(e.target.closest("tr.band-row")?.dataset.index);
    if (Number.isInteger(i) && state.options.highlight !== i) {
      state.options.highlight = i;
      redraw();
    }
  });
  rows.addEventListener("focusout", (e) => {
    if (!rows.contains(e.relatedTarget) && state.options.highlight !== null) {
      state.options.highlight = null;
      redraw();
    }
  });
}
