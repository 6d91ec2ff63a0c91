// chiroptic page: the document (the same JSON a file or link holds) lives
// here as a plain object; every edit changes it and hands it to the wasm core,
// which validates it, evaluates the spectra and redraws the four plots. When
// the core refuses a value, its message goes next to the control at fault and
// the canvases keep the last good plots.
//
// All physics, unit factors and labels come from the core (crate/src); this
// module only converts through it.
//
// Around that loop: share links (the document in the URL fragment, kept in
// step with the model), autosave in localStorage, undo/redo over snapshots
// of the document, exports (SVG, PNG, CSV, JSON) and a wiki view that shows
// one plot alone (`#c1.…&show=cd`).

import init, * as core from "./pkg/chiroptic.js";

const $ = (id) => document.getElementById(id);
const PLOT_KEYS = ["cd", "ord", "abs", "index"];

/** Page state. `doc` is what the user has typed, valid or not. */
const state = {
  doc: null,
  catalog: null,
  wb: null,
  dead: false,
  drawn: null, // result of the last successful update (frames, lines, range ...)
  ui: { centerUnit: "nm", widthUnit: "cm-1", concUnit: "mol/L", pathUnit: "cm" },
  options: { dark: false, contributions: true, highlight: null },
  cursorX: null, // crosshair position in axis units
  solventMemory: {}, // last values of each solvent kind, restored on switching back
  dpr: 1, // canvas pixels per CSS pixel
  valid: false, // the document drew at the last refresh
  wiki: null, // the plot key shown alone in the wiki view
};

// ---------------------------------------------------------------- numbers

const NUMBER = /^[+-]?(\d+\.?\d*|\.\d+)(e[+-]?\d+)?$/i;

/** Parses what a person types: a point for decimals, an optional exponent. */
function parseNumber(text) {
  const t = text.trim().replace(/\u2212/g, "-").replace(/×\s*10\^?/g, "e");
  if (t === "") return { empty: true };
  if (/^[+-]?\d+,\d+$/.test(t)) return { error: `“${text.trim()}”: use a point for decimals` };
  if (!NUMBER.test(t)) return { error: `“${text.trim()}” is not a number` };
  const value = Number(t);
  if (!Number.isFinite(value)) return { error: `“${text.trim()}” is too large` };
  return { value };
}

/** A value for an input box: significant figures, parseable back. */
function fmtInput(v, sig = 5) {
  if (v === undefined || v === null || !Number.isFinite(v)) return "";
  if (v === 0) return "0";
  const a = Math.abs(v);
  if (a >= 1e6 || a < 1e-3) return v.toExponential(sig - 1).replace(/\.?0+e/, "e").replace("e+", "e");
  return String(Number(v.toPrecision(sig)));
}

const SUPERSCRIPT = { "-": "⁻", 0: "⁰", 1: "¹", 2: "²", 3: "³", 4: "⁴", 5: "⁵", 6: "⁶", 7: "⁷", 8: "⁸", 9: "⁹" };

/** A value for reading: significant figures, ×10ⁿ, a true minus sign. */
function fmtText(v, sig = 4) {
  if (v === undefined || v === null) return "—";
  if (!Number.isFinite(v)) return "—";
  if (v === 0) return "0";
  const a = Math.abs(v);
  let s;
  if (a >= 1e5 || a < 1e-3) {
    const [m, e] = v.toExponential(sig - 1).split("e");
    s = `${m}×10${[...String(Number(e))].map((c) => SUPERSCRIPT[c]).join("")}`;
  } else {
    s = String(Number(v.toPrecision(sig)));
  }
  return s.replace(/^-/, "−");
}

/** Rounds away binary noise after a step (0.1 + 0.2 and the like). */
const tidy = (v) => Number(v.toPrecision(12));

/** Significant digits of a value converted between units, as stored and as shown on focus. */
const CONVERTED_DIGITS = 12;
const tidyConverted = (v) => Number(v.toPrecision(CONVERTED_DIGITS));

/**
 * The shortest canonical value that still shows as what was typed: a value
 * typed in a display unit converts to a 17-digit float, which would lengthen
 * share links and files for nothing. `back` converts a canonical value to the
 * display unit; the result reads back as `typed` to CONVERTED_DIGITS
 * significant digits (the digits a focused box shows), so what the person
 * typed comes back as typed.
 */
function shortest(canonical, typed, back) {
  if (!Number.isFinite(canonical)) return canonical;
  const want = tidyConverted(typed);
  for (let p = 1; p <= 17; p++) {
    const c = Number(canonical.toPrecision(p));
    const shown = safe(() => back(c));
    if (shown !== undefined && tidyConverted(shown) === want) return c;
  }
  return canonical;
}

// ------------------------------------------------------- the core, safely

/** Calls into the module; an exception there means it can no longer be used. */
function call(fn) {
  if (state.dead) return undefined;
  try {
    return fn();
  } catch (e) {
    if (e instanceof WebAssembly.RuntimeError) {
      state.dead = true;
      const box = $("fatal");
      if (box.hidden) {
        box.textContent = `The calculation core stopped on an internal error (${e.message}). Save your model, then reload the page.`;
        box.hidden = false;
      }
      return undefined;
    }
    throw e;
  }
}

/** A conversion through the core; its error message becomes a thrown Error. */
const convert = call;

// ------------------------------------------------------- bound number fields

/** Every number control on the page, so displays can follow the document. */
let fields = [];

/**
 * Binds a text box (and an optional slider) to one number of the document.
 * spec: { input, slider, get(), set(v), unit(), step(v), range(), log, optional,
 *         integer, canonical }
 *  get/set work in the unit shown; set may throw an Error whose message is shown.
 */
function bindNumber(spec) {
  const { input, slider } = spec;
  const field = { ...spec, localError: null };
  fields.push(field);

  const commit = (value, source) => {
    try {
      spec.set(value);
      setLocalError(field, null);
    } catch (e) {
      setLocalError(field, e.message ?? String(e));
      return;
    }
    if (source !== "slider") syncSlider(field);
    refresh();
  };

  input.addEventListener("focus", () => {
    if (field.localError) return;
    // Show every digit, all selected: typing replaces the number, as it
    // would have without the swap (a click then places the caret as usual).
    const text = fullText(field);
    if (input.value !== text) {
      input.value = text;
      input.select();
    }
  });
  input.addEventListener("blur", () => {
    if (!field.localError) input.value = fmtInput(safeGet(field));
  });
  input.addEventListener("input", () => {
    const p = parseNumber(input.value);
    if (p.empty) {
      if (spec.optional) return commit(undefined, "text");
      return setLocalError(field, "enter a number");
    }
    if (p.error) return setLocalError(field, p.error);
    if (spec.integer && !Number.isInteger(p.value)) return setLocalError(field, "enter a whole number");
    commit(p.value, "text");
  });
  input.addEventListener("keydown", (e) => {
    if (e.key !== "ArrowUp" && e.key !== "ArrowDown") return;
    e.preventDefault();
    const p = parseNumber(input.value);
    const current = p.value ?? safeGet(field) ?? 0;
    const factor = e.shiftKey ? 10 : e.altKey ? 0.1 : 1;
    let step = spec.step(current) * factor;
    if (spec.integer) step = Math.max(1, Math.round(step));
    const next = tidy(current + (e.key === "ArrowUp" ? step : -step));
    input.value = String(next);
    commit(next, "key");
  });
  if (slider) {
    slider.addEventListener("input", () => {
      let v = Number(slider.value);
      if (spec.log) v = 10 ** v;
      v = Number(v.toPrecision(spec.log ? 3 : 4));
      if (spec.integer) v = Math.round(v);
      input.value = fmtInput(v);
      commit(v, "slider");
    });
  }
  show(field);
  return field;
}

function safeGet(field) {
  try {
    return field.get();
  } catch {
    return undefined;
  }
}

/**
 * The full value while a box has the focus: every digit the document holds,
 * or for a value converted to a display unit its first CONVERTED_DIGITS
 * (the conversion leaves binary noise below them).
 */
function fullText(field) {
  const v = safeGet(field);
  if (v === undefined || v === null) return "";
  return String(field.canonical ? v : tidyConverted(v));
}

function syncSlider(field) {
  const { slider } = field;
  if (!slider) return;
  const v = safeGet(field);
  const [lo, hi] = field.range();
  let min = lo, max = hi;
  if (v !== undefined && Number.isFinite(v)) {
    if (field.log) {
      if (v > 0) {
        const lv = Math.log10(v);
        min = Math.min(min, Math.floor(lv));
        max = Math.max(max, Math.ceil(lv));
      }
    } else {
      min = Math.min(min, v);
      max = Math.max(max, v);
    }
  }
  // Writes only what changed: each write costs the page a style pass.
  setIf(slider, "min", String(min));
  setIf(slider, "max", String(max));
  setIf(slider, "step", field.integer ? "1" : String((max - min) / 1000));
  if (v !== undefined && Number.isFinite(v) && (!field.log || v > 0)) {
    const target = field.log ? Math.log10(v) : v;
    if (Math.abs(Number(slider.value) - target) > (max - min) / 2000) slider.value = String(target);
  }
}

function setIf(element, prop, value) {
  if (element[prop] !== value) element[prop] = value;
}

/** Shows the document's value (unless the person is typing in the box). */
function show(field) {
  if (document.activeElement !== field.input && !field.localError) {
    setIf(field.input, "value", fmtInput(safeGet(field)));
  }
  syncSlider(field);
}

function showAll() {
  fields = fields.filter((f) => f.input.isConnected);
  fields.forEach(show);
}

// ------------------------------------------------------------------ errors

/** The error slot of a control: the element its aria-describedby names. */
function slotOf(control) {
  const ids = (control.getAttribute("aria-describedby") ?? "").split(/\s+/);
  for (const id of ids) {
    const el = id && $(id);
    if (el && el.classList.contains("field-error")) return el;
  }
  return null;
}

function setLocalError(field, message) {
  field.localError = message;
  renderErrors();
}

let coreError = null; // { field, message } from the last update

/** Notes: messages about a refused choice, not about a value; shown for a while. */
const notes = new Map();
function showNote(slot, text) {
  notes.set(slot, text);
  renderErrors();
  setTimeout(() => {
    if (notes.get(slot) === text) {
      notes.delete(slot);
      renderErrors();
    }
  }, 5000);
}

/** Finds the control for a document path, walking up to its parents. */
function controlFor(path) {
  const alias = { "view.range": "view.range_nm", range: "view.range_nm", grid: "view.range_nm", points: "view.points" };
  let f = alias[path] ?? path;
  while (f) {
    const el = document.querySelector(`[data-field="${CSS.escape(f)}"]`);
    if (el) return el;
    const cut = Math.max(f.lastIndexOf("."), f.lastIndexOf("["));
    f = cut > 0 ? f.slice(0, cut) : "";
  }
  return null;
}

/** The core's sentence, said about the control the person used. */
function humanMessage(err, control) {
  let text = err.message;
  const field = control && fields.find((f) => f.input === control);
  if (field && !field.canonical && /\(got [^)]*\)/.test(text)) {
    text = text.replace(/\(got [^)]*\)/, `(entered: ${control.value} ${field.unit()})`);
  }
  text = text.replace(/-(\d)/g, "−$1");
  const band = /^bands\[(\d+)\]/.exec(err.field ?? "");
  if (band) {
    const i = Number(band[1]);
    const name = state.doc.bands[i]?.name || `B${i + 1}`;
    text = `band ${i + 1} (${name}): ${text}`;
  }
  return text.charAt(0).toUpperCase() + text.slice(1);
}

function renderErrors() {
  document.querySelectorAll("[aria-invalid=true]").forEach((el) => el.removeAttribute("aria-invalid"));
  document.querySelectorAll(".field-error").forEach((el) => (el.textContent = ""));
  document.querySelectorAll(".row-error").forEach((el) => (el.hidden = true));
  const put = (control, text) => {
    if (!control) return false;
    control.setAttribute("aria-invalid", "true");
    const slot = slotOf(control);
    if (!slot) return false;
    slot.textContent = slot.textContent ? `${slot.textContent} ${text}` : text;
    const row = slot.closest(".row-error");
    if (row) row.hidden = false;
    return true;
  };
  for (const [slot, text] of notes) slot.textContent = text;
  let first = "";
  for (const f of fields) {
    if (f.localError && f.input.isConnected) {
      const text = f.label ? `${f.label}: ${f.localError}` : f.localError;
      put(f.input, text);
      first ||= text;
    }
  }
  if (coreError) {
    const control = controlFor(coreError.field ?? "");
    const text = humanMessage(coreError, control);
    put(control, text);
    first ||= text;
  }
  $("plot-grid").classList.toggle("stale", Boolean(first));
  // Said again beside the plots, since the field may be out of view.
  if (first) setStatus(`${first.replace(/\.$/, "")}. The plots show the last valid model.`, true);
}

function setStatus(text, warn = false) {
  const box = $("status");
  box.textContent = text;
  box.title = text;
  box.classList.toggle("warn", warn);
}

// ------------------------------------------------------------------ update

/** Hands the document to the core; redraws on success, marks the field otherwise. */
function refresh() {
  if (!state.wb) return;
  const t0 = performance.now();
  const result = call(() => state.wb.update(state.doc, state.options));
  const ms = performance.now() - t0;
  if (!result) return;
  state.valid = result.ok;
  if (result.ok) {
    coreError = null;
    result.frames = result.frames.map(cssFrame);
    state.drawn = result;
    showResult(result);
    renderErrors();
    if (!$("plot-grid").classList.contains("stale")) setStatus(`Redrawn in ${ms.toFixed(1)} ms · ${result.points} points`);
  } else {
    coreError = result.error;
    renderErrors();
  }
  showAll();
  edited();
  document.dispatchEvent(new CustomEvent("chiroptic:updated", { detail: { ok: result.ok, ms } }));
}

/** The core reports frames in canvas pixels; pointer and overlay work in CSS pixels. */
function cssFrame(f) {
  const k = state.dpr;
  return { ...f, left: f.left / k, top: f.top / k, right: f.right / k, bottom: f.bottom / k };
}

/** Redraws the last good model with new page options (theme, highlight, size). */
function redraw() {
  if (!state.wb || !state.drawn) return refresh();
  const result = call(() => state.wb.redraw(state.options));
  if (result && result.ok) {
    state.drawn = { ...state.drawn, frames: result.frames.map(cssFrame) };
    drawCrosshair();
  }
}

function showResult(r) {
  $("cd-unit").value = r.cd_unit;
  $("ord-unit").value = r.ord_unit;
  $("axis-unit").value = r.axis_unit;
  for (const key of PLOT_KEYS) {
    const box = document.querySelector(`#plot-toggles input[value="${key}"]`);
    if (box) box.checked = r.plots.includes(key);
  }
  renderLines(r.lines);
  for (const f of r.frames) {
    const label = f.plot === "cd" ? r.labels[0][1] : f.plot === "ord" ? r.labels[1][1] : "";
    const [a, b] = r.x_range;
    $(`plot-${f.plot}`).setAttribute(
      "aria-label",
      `${plotTitle(f.plot)} ${label} from ${fmtText(a)} to ${fmtText(b)} ${unitLabel(r.axis_unit)}`.replace(/\s+/g, " "),
    );
  }
  drawCrosshair();
}

const plotTitle = (key) => state.catalog.plots.find((p) => p.key === key)?.title ?? key;
const unitLabel = (key) => state.catalog.axis.find((u) => u.key === key)?.label ?? key;

// ------------------------------------------------------------- lamp lines

function renderLines(lines) {
  const ord = Object.fromEntries(state.catalog.ord.map((u) => [u.key, u.label]));
  const head = ["Line", "λ / nm", ord.deg, ord.specific_rotation, ord.molar_rotation];
  const headRow = $("lines-head");
  if (headRow.childElementCount === 0) {
    // "Q / unit" set as the quantity over its unit.
    const cell = (label) => {
      const [q, u] = label.split(" / ");
      const th = el("th", { scope: "col" }, el("span", { className: "th-label", textContent: q }));
      if (u) th.append(el("span", { className: "th-unit", textContent: u }));
      return th;
    };
    headRow.replaceChildren(...head.map(cell));
  }
  const rows = lines.map((l) => {
    const tr = document.createElement("tr");
    const th = Object.assign(document.createElement("th"), { scope: "row", textContent: l.name });
    tr.append(th);
    for (const [v, key] of [
      [l.wavelength_nm, "wavelength_nm"],
      [l.rotation_deg, "rotation_deg"],
      [l.specific_rotation, "specific_rotation"],
      [l.molar_rotation, "molar_rotation"],
    ]) {
      const td = document.createElement("td");
      td.textContent = key === "wavelength_nm" ? String(v) : fmtText(v);
      td.dataset.key = key;
      if (v !== null && v !== undefined) {
        td.dataset.value = String(v);
        td.title = String(v);
      }
      tr.append(td);
    }
    return tr;
  });
  $("lines-rows").replaceChildren(...rows);
  const hasMass = lines.some((l) => l.specific_rotation !== null && l.specific_rotation !== undefined);
  $("lines-note").textContent = hasMass
    ? "Rotation of the sample as set above; hover a value for all its digits."
    : "Specific rotation [α] needs the molar mass (Sample & solvent).";
}

// ------------------------------------------------------------- the band list

const SHAPES = [
  ["gaussian", "Gaussian"],
  ["lorentz", "Lorentzian"],
  ["voigt", "Voigt"],
];

/** Slider span and arrow step of each band number, in the unit shown. */
function centreRange() {
  const u = state.ui.centerUnit;
  const ends = [150, 800].map((nm) => convert(() => core.convert_position(nm, "nm", u)));
  return [Math.min(...ends), Math.max(...ends)];
}
const CENTRE_STEP = { nm: 1, "cm-1": 100, ev: 0.01 };
const WIDTH_STEP = { nm: 1, "cm-1": 100, ev: 0.01 };

function widthRange(band) {
  const u = state.ui.widthUnit;
  const ends = [200, 10000].map((w) => convert(() => core.convert_width(w, "cm-1", u, band.center_nm)));
  return [Math.min(...ends), Math.max(...ends)];
}

function el(tag, props = {}, ...children) {
  const e = Object.assign(document.createElement(tag), props);
  e.append(...children);
  return e;
}

/** A number cell: text box above a slider. */
function numberCell(id, label, errorId) {
  const input = el("input", { type: "text", inputMode: "decimal", className: "num", id, autocomplete: "off" });
  input.setAttribute("aria-label", label);
  input.setAttribute("aria-describedby", errorId);
  const slider = el("input", { type: "range", className: "slider", tabIndex: -1 });
  slider.setAttribute("aria-label", `${label}, slider`);
  return { input, slider, cell: el("div", { className: "num-cell" }, input, slider) };
}

/** Binds a width field (stored in cm⁻¹, shown in the chosen width unit). */
function bindWidth(cell, band, key, label) {
  bindNumber({
    ...cell,
    label,
    canonical: false,
    unit: () => unitLabel(state.ui.widthUnit),
    get: () => convert(() => core.convert_width(band[key], "cm-1", state.ui.widthUnit, band.center_nm)),
    set: (v) => {
      const u = state.ui.widthUnit;
      const cm1 = convert(() => core.convert_width(v, u, "cm-1", band.center_nm));
      band[key] = shortest(cm1, v, (c) => core.convert_width(c, "cm-1", u, band.center_nm));
    },
    step: () => WIDTH_STEP[state.ui.widthUnit],
    range: () => widthRange(band),
  });
}

function renderBands() {
  const rows = [];
  state.doc.bands.forEach((band, i) => rows.push(...bandRows(band, i)));
  $("band-rows").replaceChildren(...rows);
  if (state.doc.bands.length === 0) {
    const td = el("td", { colSpan: 7, className: "empty" }, "No bands: add one to see a spectrum.");
    $("band-rows").append(el("tr", {}, td));
  }
}

function bandRows(band, i) {
  const n = i + 1;
  const errorId = `band-${i}-error`;
  const tr = el("tr", { className: "band-row" });
  tr.dataset.index = String(i);
  const colour = call(() => core.band_colour(i));
  tr.style.setProperty("--band", colour);

  // Name, with the band's colour.
  const swatch = el("span", { className: "swatch", title: `Colour of band ${n} in the plots` });
  const name = el("input", { type: "text", value: band.name ?? "", className: "name", id: `band-${i}-name`, maxLength: 80, spellcheck: false, autocomplete: "off" });
  name.setAttribute("aria-label", `Name of band ${n}`);
  name.dataset.field = `bands[${i}].name`;
  name.setAttribute("aria-describedby", errorId);
  name.addEventListener("input", () => {
    band.name = name.value;
    labelActions(tr, band, i);
    refresh();
  });
  tr.append(el("td", { className: "col-name" }, el("div", { className: "name-cell" }, swatch, name)));

  // Shape.
  const shape = el("select", { className: "shape", id: `band-${i}-shape` });
  shape.setAttribute("aria-label", `Shape of band ${n}`);
  shape.dataset.field = `bands[${i}].shape`;
  shape.setAttribute("aria-describedby", errorId);
  for (const [key, text] of SHAPES) shape.append(el("option", { value: key, textContent: text }));
  if (!SHAPES.some(([k]) => k === band.shape)) shape.append(el("option", { value: band.shape, textContent: band.shape }));
  shape.value = band.shape;
  shape.addEventListener("change", () => {
    band.shape = shape.value;
    if (band.shape === "voigt") band.lorentz_fwhm_cm1 ??= band._lorentz ?? band.fwhm_cm1 / 2;
    else if (band.lorentz_fwhm_cm1 !== undefined) {
      Object.defineProperty(band, "_lorentz", { value: band.lorentz_fwhm_cm1, enumerable: false, writable: true });
      delete band.lorentz_fwhm_cm1;
    }
    renderBands();
    refresh();
    $("band-rows").querySelector(`tr[data-index="${i}"] select.shape`)?.focus();
  });
  tr.append(el("td", { className: "col-shape" }, shape));

  // Centre.
  const c = numberCell(`band-${i}-center`, `Centre of band ${n}`, errorId);
  c.input.dataset.field = `bands[${i}].center_nm`;
  bindNumber({
    ...c,
    label: "",
    canonical: false,
    unit: () => unitLabel(state.ui.centerUnit),
    get: () => convert(() => core.convert_position(band.center_nm, "nm", state.ui.centerUnit)),
    set: (v) => {
      const u = state.ui.centerUnit;
      band.center_nm = shortest(convert(() => core.convert_position(v, u, "nm")), v, (c) => core.convert_position(c, "nm", u));
    },
    step: () => CENTRE_STEP[state.ui.centerUnit],
    range: centreRange,
  });
  tr.append(el("td", { className: "col-num" }, c.cell));

  // Width, and the Lorentzian part of a Voigt band.
  const w = numberCell(`band-${i}-width`, `Width of band ${n}`, errorId);
  w.input.dataset.field = `bands[${i}].fwhm_cm1`;
  bindWidth(w, band, "fwhm_cm1", "");
  const widthTd = el("td", { className: "col-num" }, w.cell);
  if (band.shape === "voigt") {
    const l = numberCell(`band-${i}-lorentz`, `Lorentzian width of band ${n}`, errorId);
    l.input.dataset.field = `bands[${i}].lorentz_fwhm_cm1`;
    l.input.placeholder = "Lorentz part";
    bindWidth(l, band, "lorentz_fwhm_cm1", "Lorentzian part");
    widthTd.append(el("div", { className: "sub-label", textContent: "Lorentzian part" }), l.cell);
  }
  tr.append(widthTd);

  // Strengths (stored in the units shown).
  const r = numberCell(`band-${i}-r`, `Rotatory strength of band ${n}`, errorId);
  r.input.dataset.field = `bands[${i}].rotatory_strength_1e40_cgs`;
  bindNumber({
    ...r,
    label: "",
    canonical: true,
    unit: () => "",
    get: () => band.rotatory_strength_1e40_cgs,
    set: (v) => (band.rotatory_strength_1e40_cgs = v),
    step: () => 1,
    range: () => [-100, 100],
  });
  tr.append(el("td", { className: "col-num" }, r.cell));

  const d = numberCell(`band-${i}-d`, `Dipole strength of band ${n}`, errorId);
  d.input.dataset.field = `bands[${i}].dipole_strength_debye2`;
  bindNumber({
    ...d,
    label: "",
    canonical: true,
    unit: () => "",
    get: () => band.dipole_strength_debye2,
    set: (v) => (band.dipole_strength_debye2 = v),
    step: () => 0.1,
    range: () => [0, 20],
  });
  tr.append(el("td", { className: "col-num" }, d.cell));

  // Row actions.
  const action = (text, verb, title, fn, disabled = false) => {
    const b = el("button", { type: "button", className: "icon", textContent: text, title, disabled });
    b.dataset.verb = verb;
    b.addEventListener("click", fn);
    return b;
  };
  const last = state.doc.bands.length - 1;
  tr.append(
    el(
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
    ),
  );
  labelActions(tr, band, i);

  const errRow = el("tr", { className: "row-error", hidden: true });
  errRow.append(el("td", { colSpan: 7 }, el("span", { className: "field-error", id: errorId, role: "status" })));
  return [tr, errRow];
}

/** Names the row's buttons after the band, so they read well when renamed. */
function labelActions(tr, band, i) {
  const who = `band ${i + 1} (${band.name || `B${i + 1}`})`;
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
  refresh();
  focusRowButton(j, `button[title="Move ${which}"]`);
}

function duplicateBand(i) {
  const copy = structuredClone(state.doc.bands[i]);
  copy.name = `${copy.name || `B${i + 1}`} copy`;
  state.doc.bands.splice(i + 1, 0, copy);
  renderBands();
  refresh();
  focusRowButton(i + 1, "input.name");
}

function deleteBand(i) {
  state.doc.bands.splice(i, 1);
  renderBands();
  refresh();
  const n = state.doc.bands.length;
  if (n) focusRowButton(Math.min(i, n - 1), "input.name");
  else $("add-band").focus();
}

function addBand() {
  const bands = state.doc.bands;
  // A new band in the middle of the window, of moderate strength.
  const [lo, hi] = state.drawn?.range_nm ?? [200, 400];
  const names = new Set(bands.map((b) => b.name));
  let k = bands.length + 1;
  while (names.has(`B${k}`)) k++;
  bands.push({
    name: `B${k}`,
    shape: "gaussian",
    center_nm: Math.round((lo + hi) / 2),
    fwhm_cm1: 3000,
    rotatory_strength_1e40_cgs: 5,
    dipole_strength_debye2: 1,
  });
  renderBands();
  refresh();
  focusRowButton(bands.length - 1, "input.name");
}

// ------------------------------------------------------------- sample panel

const SAMPLE_LOG_RANGES = { conc: [-6, 0], path: [-2, 1], mass: [1, 6] };
/** Arrow step: one unit of the second significant digit. */
const relStep = (v) => (v ? 10 ** (Math.floor(Math.log10(Math.abs(v))) - 1) : 0.1);

function sampleSlider(input) {
  const s = el("input", { type: "range", className: "slider", tabIndex: -1 });
  s.setAttribute("aria-label", `${input.labels?.[0]?.textContent ?? "value"}, slider`);
  input.parentElement.after(s);
  s.classList.add("span-2");
  return s;
}

function bindSample() {
  const sample = () => state.doc.sample;
  const mass = () => sample().molar_mass_g_per_mol;

  bindNumber({
    input: $("conc"),
    slider: sampleSlider($("conc")),
    label: "",
    log: true,
    canonical: false,
    unit: () => state.ui.concUnit,
    get: () => convert(() => core.convert_concentration(sample().concentration_mol_per_l, "mol/L", state.ui.concUnit, mass())),
    set: (v) => {
      const u = state.ui.concUnit;
      const mol = convert(() => core.convert_concentration(v, u, "mol/L", mass()));
      sample().concentration_mol_per_l = shortest(mol, v, (c) => core.convert_concentration(c, "mol/L", u, mass()));
    },
    step: relStep,
    range: () => {
      const [a, b] = SAMPLE_LOG_RANGES.conc;
      const f = safe(() => core.convert_concentration(1, "mol/L", state.ui.concUnit, mass())) ?? 1;
      return [Math.floor(a + Math.log10(f)), Math.ceil(b + Math.log10(f))];
    },
  });
  bindNumber({
    input: $("path"),
    slider: sampleSlider($("path")),
    label: "",
    log: true,
    canonical: false,
    unit: () => state.ui.pathUnit,
    get: () => convert(() => core.convert_path(sample().path_length_cm, "cm", state.ui.pathUnit)),
    set: (v) => {
      const u = state.ui.pathUnit;
      sample().path_length_cm = shortest(convert(() => core.convert_path(v, u, "cm")), v, (c) => core.convert_path(c, "cm", u));
    },
    step: relStep,
    range: () => {
      const f = convert(() => core.convert_path(1, "cm", state.ui.pathUnit));
      const [a, b] = SAMPLE_LOG_RANGES.path;
      return [Math.floor(a + Math.log10(f)), Math.ceil(b + Math.log10(f))];
    },
  });
  const concField = fields.find((f) => f.input === $("conc"));
  bindNumber({
    input: $("molar-mass"),
    slider: sampleSlider($("molar-mass")),
    label: "",
    log: true,
    optional: true,
    canonical: true,
    unit: () => "g/mol",
    get: () => mass(),
    set: (v) => {
      // A mass concentration stays as entered when the molar mass changes.
      const massUnit = state.ui.concUnit === "mg/mL" || state.ui.concUnit === "g/100mL";
      const shown = massUnit ? safe(() => core.convert_concentration(sample().concentration_mol_per_l, "mol/L", state.ui.concUnit, mass())) : undefined;
      if (v === undefined) delete sample().molar_mass_g_per_mol;
      else sample().molar_mass_g_per_mol = v;
      if (shown !== undefined && v !== undefined) {
        const u = state.ui.concUnit;
        const mol = core.convert_concentration(shown, u, "mol/L", v);
        sample().concentration_mol_per_l = shortest(mol, shown, (c) => core.convert_concentration(c, "mol/L", u, v));
      }
      // Without a molar mass the concentration can only be shown per mole.
      if (massUnit && v === undefined) {
        state.ui.concUnit = "mol/L";
        $("conc-unit").value = "mol/L";
      }
      if (concField.localError) setLocalError(concField, null);
    },
    step: relStep,
    range: () => SAMPLE_LOG_RANGES.mass,
  });
  bindNumber({
    input: $("mrw"),
    slider: sampleSlider($("mrw")),
    label: "",
    log: true,
    optional: true,
    canonical: true,
    unit: () => "g/mol",
    get: () => sample().mean_residue_weight_g_per_mol,
    set: (v) => {
      if (v === undefined) delete sample().mean_residue_weight_g_per_mol;
      else sample().mean_residue_weight_g_per_mol = v;
    },
    step: relStep,
    range: () => [1, 4],
  });

  unitSelect($("conc-unit"), state.catalog.concentration, "concUnit", $("conc"), $("conc-error"));
  unitSelect($("path-unit"), state.catalog.path, "pathUnit", $("path"), $("path-error"));
  $("solvent-kind").addEventListener("change", () => {
    const s = sample().solvent;
    const from = solventKind(s);
    state.solventMemory[from] = structuredClone(s);
    const to = $("solvent-kind").value;
    const start = state.catalog.sellmeier_start;
    const fresh = {
      constant: { constant: 1.333 },
      preset: { sellmeier: state.catalog.presets[0] },
      sellmeier: { sellmeier: { b: [...start[0]], c_um2: [...start[1]] } },
      cauchy: { cauchy: { a: 1.324, b_um2: 0.0031, c_um4: 0 } },
    };
    sample().solvent = state.solventMemory[to] ?? fresh[to];
    renderSolvent();
    refresh();
  });
}

const safe = (fn) => {
  try {
    return fn();
  } catch {
    return undefined;
  }
};

/** A unit menu whose change converts the shown value in place. */
function unitSelect(select, choices, key, input, slot) {
  select.replaceChildren(...choices.map((c) => el("option", { value: c.key, textContent: c.label })));
  select.value = state.ui[key];
  select.setAttribute("aria-describedby", slot.id);
  select.addEventListener("change", () => {
    const before = state.ui[key];
    const field = fields.find((f) => f.input === input);
    state.ui[key] = select.value;
    try {
      const v = field.get();
      if (!Number.isFinite(v)) throw new Error("cannot convert");
      field.localError = null;
    } catch (e) {
      const wanted = select.options[select.selectedIndex]?.textContent ?? select.value;
      state.ui[key] = before;
      select.value = before;
      showNote(slot, `${wanted}: ${e.message}`);
      return;
    }
    show(field);
    renderErrors();
  });
}

function solventKind(s) {
  if (s.constant !== undefined) return "constant";
  if (s.cauchy !== undefined) return "cauchy";
  if (typeof s.sellmeier === "string") return "preset";
  return "sellmeier";
}

function renderSolvent() {
  const s = state.doc.sample.solvent;
  const kind = solventKind(s);
  $("solvent-kind").value = kind;
  const box = $("solvent-detail");
  box.replaceChildren();
  const slot = "solvent-error";
  const numberRow = (label, field, get, set, step, range, unit = "") => {
    const id = `solvent-${field.replace(/[^a-z0-9]+/gi, "-")}`;
    const input = el("input", { type: "text", inputMode: "decimal", className: "num", id, autocomplete: "off" });
    input.dataset.field = field;
    input.setAttribute("aria-describedby", slot);
    const lab = el("label", { htmlFor: id, textContent: label });
    const wrap = el("span", { className: "with-unit" }, input, el("span", { className: "unit", textContent: unit }));
    const slider = el("input", { type: "range", className: "slider", tabIndex: -1 });
    slider.setAttribute("aria-label", `${label}, slider`);
    box.append(el("div", { className: "solvent-row" }, lab, wrap, slider));
    bindNumber({ input, slider, label: "", canonical: true, unit: () => unit, get, set, step: () => step, range: () => range });
  };
  if (kind === "constant") {
    numberRow("n", "sample.solvent.constant", () => s.constant, (v) => (s.constant = v), 0.001, [1, 2]);
  } else if (kind === "preset") {
    box.append(
      el("p", {
        className: "hint-text",
        textContent: "Sellmeier series for water at 20 °C (Applied Optics 46, 3811 (2007)); fitted for 182–1129 nm.",
      }),
    );
  } else if (kind === "cauchy") {
    const c = s.cauchy;
    box.append(el("p", { className: "hint-text", textContent: "n = a + b/λ² + c/λ⁴, λ in µm" }));
    numberRow("a", "sample.solvent.cauchy.a", () => c.a, (v) => (c.a = v), 0.001, [1, 2]);
    numberRow("b", "sample.solvent.cauchy.b_um2", () => c.b_um2, (v) => (c.b_um2 = v), 0.0001, [0, 0.02], "µm²");
    numberRow("c", "sample.solvent.cauchy.c_um4", () => c.c_um4, (v) => (c.c_um4 = v), 0.00001, [0, 0.001], "µm⁴");
  } else {
    const t = s.sellmeier;
    box.append(el("p", { className: "hint-text", textContent: "n² − 1 = Σ Bᵢ λ²/(λ² − Cᵢ), λ in µm" }));
    t.b.forEach((_, i) => {
      numberRow(`B${i + 1}`, `sample.solvent.sellmeier.b[${i}]`, () => t.b[i], (v) => (t.b[i] = v), 0.01, [0, 2]);
      numberRow(`C${i + 1}`, `sample.solvent.sellmeier.c_um2[${i}]`, () => t.c_um2[i], (v) => (t.c_um2[i] = v), 0.001, [0, 20], "µm²");
    });
    const add = el("button", { type: "button", textContent: "Add term", disabled: t.b.length >= 8 });
    add.addEventListener("click", () => {
      t.b.push(0);
      t.c_um2.push(0.01);
      renderSolvent();
      refresh();
    });
    const remove = el("button", { type: "button", textContent: "Remove last term", disabled: t.b.length <= 1 });
    remove.addEventListener("click", () => {
      t.b.pop();
      t.c_um2.pop();
      renderSolvent();
      refresh();
    });
    box.append(el("div", { className: "button-row" }, add, remove));
  }
}

// ------------------------------------------------------------- view controls

function view() {
  state.doc.view ??= {};
  return state.doc.view;
}

function bindWindow() {
  $("axis-unit").replaceChildren(...state.catalog.axis.map((u) => el("option", { value: u.key, textContent: u.label })));
  $("axis-unit").addEventListener("change", () => {
    view().axis_unit = $("axis-unit").value;
    state.cursorX = null;
    refresh();
  });
  for (const sel of ["center-unit", "width-unit"]) {
    $(sel).replaceChildren(...state.catalog.axis.map((u) => el("option", { value: u.key, textContent: u.label })));
  }
  $("center-unit").value = state.ui.centerUnit;
  $("width-unit").value = state.ui.widthUnit;
  // The values are converted in place: the document keeps nm and cm⁻¹.
  $("center-unit").addEventListener("change", () => {
    state.ui.centerUnit = $("center-unit").value;
    fields.forEach((f) => (f.localError = null));
    showAll();
    renderErrors();
  });
  $("width-unit").addEventListener("change", () => {
    state.ui.widthUnit = $("width-unit").value;
    fields.forEach((f) => (f.localError = null));
    showAll();
    renderErrors();
  });

  const axis = () => state.drawn?.axis_unit ?? "nm";
  // Read without creating an empty view (that would count as an edit).
  const shownNm = () => {
    const nm = state.doc.view?.range_nm ?? state.drawn?.range_nm;
    return nm ? [...nm].sort((a, b) => a - b) : undefined;
  };
  // The left end is the smaller axis value; in nm that is the shorter wavelength.
  const nmIndex = (k) => (axis() === "nm" ? k : 1 - k);
  const end = (k) => {
    const nm = shownNm();
    return nm ? safe(() => core.convert_position(nm[nmIndex(k)], "nm", axis())) : undefined;
  };
  const setEnd = (k) => (v) => {
    const a = axis();
    const typed = shortest(core.convert_position(v, a, "nm"), v, (c) => core.convert_position(c, "nm", a));
    // The other end keeps its stored wavelength exactly.
    const other = shownNm()?.[nmIndex(1 - k)] ?? typed;
    view().range_nm = [typed, other].sort((x, y) => x - y);
  };
  const rangeStep = () => ({ nm: 10, "cm-1": 1000, ev: 0.1 })[axis()];
  bindNumber({ input: $("range-from"), label: "", canonical: false, unit: () => unitLabel(axis()), get: () => end(0), set: setEnd(0), step: rangeStep, range: () => [0, 1] });
  bindNumber({ input: $("range-to"), label: "", canonical: false, unit: () => unitLabel(axis()), get: () => end(1), set: setEnd(1), step: rangeStep, range: () => [0, 1] });
  bindNumber({
    input: $("points"),
    label: "",
    canonical: true,
    integer: true,
    unit: () => "",
    get: () => state.drawn?.points ?? view().points,
    set: (v) => (view().points = v),
    step: () => 100,
    range: () => [2, state.catalog.max_points],
  });
  $("fit-range").addEventListener("click", fitRange);
  $("window-bar").addEventListener("submit", (e) => e.preventDefault());

  $("cd-unit").replaceChildren(...state.catalog.cd.map((u) => el("option", { value: u.key, textContent: u.label })));
  $("ord-unit").replaceChildren(...state.catalog.ord.map((u) => el("option", { value: u.key, textContent: u.label })));
  $("cd-unit").addEventListener("change", () => {
    view().cd_unit = $("cd-unit").value;
    refresh();
  });
  $("ord-unit").addEventListener("change", () => {
    view().ord_unit = $("ord-unit").value;
    refresh();
  });

  const toggles = $("plot-toggles");
  for (const p of state.catalog.plots) {
    const id = `show-${p.key}`;
    const box = el("input", { type: "checkbox", id, value: p.key, checked: true });
    box.addEventListener("change", () => {
      const on = PLOT_KEYS.filter((k) => document.querySelector(`#plot-toggles input[value="${k}"]`).checked);
      view().plots = on;
      layoutPlots(on);
      refresh();
    });
    toggles.append(el("span", { className: "toggle" }, box, el("label", { htmlFor: id, textContent: shortTitle(p.key) })));
  }
  $("show-contributions").addEventListener("change", () => {
    state.options.contributions = $("show-contributions").checked;
    redraw();
  });
}

const shortTitle = (key) => ({ cd: "CD", ord: "ORD", abs: "Absorption", index: "Indices" })[key];

function fitRange() {
  if (state.doc.view) delete state.doc.view.range_nm;
  state.cursorX = null;
  refresh();
}

/** Shows the chosen plots; the grid closes up around hidden ones. */
function layoutPlots(on) {
  document.querySelectorAll(".plot").forEach((fig) => (fig.hidden = !on.includes(fig.dataset.plot)));
  $("plot-grid").dataset.count = String(on.length);
}

// ---------------------------------------------------- canvases and crosshair

/** Gives each canvas devicePixelRatio pixels per CSS pixel, so plots are sharp on HiDPI screens. */
function sizeCanvases() {
  let changed = false;
  const dpr = Math.min(4, Math.max(1, window.devicePixelRatio || 1));
  if (dpr !== state.dpr) {
    state.dpr = dpr;
    state.options.pixel_ratio = dpr;
    changed = true;
  }
  document.querySelectorAll(".canvas-box").forEach((box) => {
    const w = Math.floor(box.clientWidth);
    const h = Math.floor(box.clientHeight);
    if (!w || !h) return;
    // Print scales the drawn bitmap at this shape (see style.css).
    box.style.setProperty("--aspect", String(w / h));
    const [pw, ph] = [Math.round(w * dpr), Math.round(h * dpr)];
    for (const c of box.querySelectorAll("canvas")) {
      if (c.width !== pw || c.height !== ph) {
        c.width = pw;
        c.height = ph;
        changed = true;
      }
    }
  });
  return changed;
}

let resizePending = false;
let printing = false;
function onResize() {
  // While printing, the plots keep their bitmaps and are scaled to the paper.
  if (resizePending || printing) return;
  resizePending = true;
  requestAnimationFrame(() => {
    resizePending = false;
    if (sizeCanvases()) redraw();
  });
}

const frameOf = (key) => state.drawn?.frames.find((f) => f.plot === key);
const xAt = (f, px) => f.x_range[0] + ((px - f.left) / Math.max(1, f.right - f.left)) * (f.x_range[1] - f.x_range[0]);
const pxOf = (f, x) => f.left + ((x - f.x_range[0]) / (f.x_range[1] - f.x_range[0])) * (f.right - f.left);
const pyOf = (f, y, range = f.y_range) => f.bottom - ((y - range[0]) / (range[1] - range[0])) * (f.bottom - f.top);

const yAt = (f, py) => f.y_range[0] + ((f.bottom - py) / Math.max(1, f.bottom - f.top)) * (f.y_range[1] - f.y_range[0]);

let lastReadout = null;
let drag = null; // { key, startPx, px }

// ------------------------------------------------ dragging a band by its peak

/** A band is caught within this many CSS pixels of its CD peak. */
const GRAB_PX = 10;
let peakCache = null; // the band peaks of the drawn model, in CSS pixels

/** Each band's CD peak on screen: `[{ i, x, y, px, py }]` (inside the plot box). */
function bandHandles() {
  const f = frameOf("cd");
  if (!f) return [];
  if (peakCache?.drawn !== state.drawn) {
    const peaks = call(() => state.wb.band_peaks()) ?? [];
    peakCache = { drawn: state.drawn, peaks };
  }
  return peakCache.peaks
    .map((p, i) => p && { i, x: p.x, y: p.y, px: pxOf(f, p.x), py: pyOf(f, p.y) })
    .filter((h) => h && h.px >= f.left && h.px <= f.right && h.py >= f.top && h.py <= f.bottom);
}

function handleAt(px, py) {
  let best = null;
  for (const h of bandHandles()) {
    const d = Math.hypot(h.px - px, h.py - py);
    if (d <= GRAB_PX && (!best || d < best.d)) best = { ...h, d };
  }
  return best;
}

/**
 * Dragging a peak moves the band: across, its centre follows the pointer;
 * up and down, its rotatory strength scales so that the peak meets the
 * pointer (a band's CD is proportional to its R). The y axis rescales as
 * the band grows, so each step is taken twice, on the frame just drawn.
 * One drag is one edit.
 */
let peakDrag = null; // { i, r0, y0, px, py, pending }
function placePeak() {
  const f = frameOf("cd");
  const band = state.doc.bands[peakDrag.i];
  if (!f || !band) return;
  const x = xAt(f, Math.min(f.right, Math.max(f.left, peakDrag.px)));
  const y = yAt(f, Math.min(f.bottom, Math.max(f.top, peakDrag.py)));
  const nm = safe(() => core.convert_position(x, state.drawn.axis_unit, "nm"));
  if (!Number.isFinite(nm)) return;
  // A pixel is about a thousandth of the plot: these digits say all of it.
  band.center_nm = Number(nm.toPrecision(5));
  const r = band.rotatory_strength_1e40_cgs;
  const peak = peakCache?.drawn === state.drawn ? peakCache.peaks[peakDrag.i] : call(() => state.wb.band_peaks())?.[peakDrag.i];
  const next = peak && r ? (r * y) / peak.y : (peakDrag.r0 * y) / peakDrag.y0;
  if (Number.isFinite(next)) band.rotatory_strength_1e40_cgs = Number(next.toPrecision(4));
  refresh();
}

function movePeak(px, py) {
  Object.assign(peakDrag, { px, py });
  if (peakDrag.pending) return;
  peakDrag.pending = true;
  requestAnimationFrame(() => {
    if (!peakDrag) return;
    peakDrag.pending = false;
    placePeak();
    placePeak();
  });
}

function drawCrosshair() {
  const r = state.cursorX === null || !state.drawn ? null : call(() => state.wb.readout(state.cursorX));
  lastReadout = r;
  for (const key of PLOT_KEYS) {
    const overlay = document.querySelector(`.plot[data-plot="${key}"] canvas.overlay`);
    const ctx = overlay.getContext("2d");
    ctx.setTransform(1, 0, 0, 1, 0, 0);
    ctx.clearRect(0, 0, overlay.width, overlay.height);
    // Drawn in CSS pixels, at the canvas's resolution.
    ctx.setTransform(state.dpr, 0, 0, state.dpr, 0, 0);
    const f = frameOf(key);
    if (!f) continue;
    const ink = getComputedStyle(document.documentElement).getPropertyValue("--ink").trim() || "#000";
    if (drag && drag.key === key) {
      ctx.fillStyle = getComputedStyle(document.documentElement).getPropertyValue("--select").trim();
      const [a, b] = [drag.startPx, drag.px].sort((p, q) => p - q);
      ctx.fillRect(a, f.top, b - a, f.bottom - f.top);
    }
    if (!r) continue;
    const px = Math.round(pxOf(f, r.x)) + 0.5;
    ctx.strokeStyle = ink;
    ctx.globalAlpha = 0.55;
    ctx.lineWidth = 1;
    ctx.setLineDash([4, 3]);
    ctx.beginPath();
    ctx.moveTo(px, f.top);
    ctx.lineTo(px, f.bottom);
    ctx.stroke();
    ctx.setLineDash([]);
    ctx.globalAlpha = 1;
    const plot = r.plots.find((p) => p.plot === key);
    const sum = plot?.values.find(([name]) => name === "sum" || name === "n_L");
    if (sum && Number.isFinite(sum[1])) {
      ctx.fillStyle = ink;
      ctx.beginPath();
      ctx.arc(px, pyOf(f, sum[1]), 3.5, 0, 2 * Math.PI);
      ctx.fill();
    }
  }
  renderReadout(r);
}

/** "θ / mdeg" and a value read as "θ = 1.23 mdeg". */
function quantity(label, v) {
  const i = label.indexOf(" / ");
  if (i < 0) {
    const q = label.split(" = ")[0];
    return `${q} = ${fmtText(v)}`;
  }
  return `${label.slice(0, i)} = ${fmtText(v)} ${label.slice(i + 3)}`;
}

function renderReadout(r) {
  const out = $("readout");
  if (!r) {
    out.textContent = "Point at a plot (or focus it and use ←/→) for values; drag to zoom; drag a band’s CD peak to move it.";
    return;
  }
  // Each part carries its number in full (data-value) for copying and checks.
  const part = (text, plot, value) => {
    const span = el("span", { textContent: text });
    if (plot) span.dataset.plot = plot;
    if (value !== undefined) span.dataset.value = String(value);
    return span;
  };
  const parts = [part(`λ ${fmtText(r.nm, 5)} nm (${fmtText(r.cm1, 5)} cm⁻¹, ${fmtText(r.ev, 4)} eV)`, "x", r.x)];
  for (const p of r.plots) {
    const v = Object.fromEntries(p.values);
    if (p.plot === "index") parts.push(part(`n_L ${v.n_L?.toFixed(6)}, Δn ${fmtText(v["Δn"])}`, p.plot, v["Δn"]));
    else parts.push(part(quantity(p.label, v.sum), p.plot, v.sum));
  }
  out.replaceChildren(...parts.flatMap((s, i) => (i ? [el("span", { className: "sep", textContent: " │ " }), s] : [s])));
}

function bindPlots() {
  document.querySelectorAll(".plot").forEach((fig) => {
    const key = fig.dataset.plot;
    const box = fig.querySelector(".canvas-box");
    const pxFromEvent = (e) => e.clientX - box.getBoundingClientRect().left;
    const pyFromEvent = (e) => e.clientY - box.getBoundingClientRect().top;
    box.addEventListener("pointermove", (e) => {
      const f = frameOf(key);
      if (!f) return;
      if (peakDrag) return movePeak(pxFromEvent(e), pyFromEvent(e));
      if (key === "cd") box.classList.toggle("over-peak", Boolean(handleAt(pxFromEvent(e), pyFromEvent(e))));
      const px = Math.min(f.right, Math.max(f.left, pxFromEvent(e)));
      if (drag) drag.px = px;
      state.cursorX = xAt(f, px);
      drawCrosshair();
    });
    box.addEventListener("pointerleave", () => {
      if (drag) return;
      state.cursorX = null;
      drawCrosshair();
    });
    box.addEventListener("pointerdown", (e) => {
      const f = frameOf(key);
      if (!f || e.button !== 0) return;
      const px = pxFromEvent(e);
      if (px < f.left || px > f.right) return;
      const grab = key === "cd" ? handleAt(px, pyFromEvent(e)) : null;
      if (grab) {
        const r0 = state.doc.bands[grab.i]?.rotatory_strength_1e40_cgs;
        if (!Number.isFinite(r0) || r0 === 0) return;
        peakDrag = { i: grab.i, r0, y0: grab.y, px, py: pyFromEvent(e), pending: false };
        box.classList.add("dragging-peak");
        box.setPointerCapture(e.pointerId);
        return;
      }
      drag = { key, startPx: px, px };
      box.setPointerCapture(e.pointerId);
    });
    box.addEventListener("pointerup", (e) => {
      if (peakDrag) {
        const { i } = peakDrag;
        // Settle on the release point.
        Object.assign(peakDrag, { px: pxFromEvent(e), py: pyFromEvent(e) });
        for (let k = 0; k < 3; k++) placePeak();
        peakDrag = null;
        edits.open = false; // the next edit is a new one
        box.classList.remove("dragging-peak");
        refresh();
        const b = state.doc.bands[i];
        if (b && !$("plot-grid").classList.contains("stale")) {
          setStatus(`Band ${i + 1} (${b.name || `B${i + 1}`}): centre ${fmtText(b.center_nm, 5)} nm, R ${fmtText(b.rotatory_strength_1e40_cgs)}`);
        }
        return;
      }
      const d = drag;
      drag = null;
      const f = frameOf(key);
      if (!d || !f) return drawCrosshair();
      if (Math.abs(d.px - d.startPx) < 6) return drawCrosshair();
      const axis = state.drawn.axis_unit;
      // A pixel is about a thousandth of the window: six digits say all of it.
      const nm = [xAt(f, d.startPx), xAt(f, d.px)].map((x) => Number(core.convert_position(x, axis, "nm").toPrecision(6)));
      view().range_nm = nm.sort((a, b) => a - b);
      refresh();
    });
    box.addEventListener("dblclick", fitRange);
    box.addEventListener("keydown", (e) => {
      const f = frameOf(key);
      if (!f) return;
      if (e.key === "0") return fitRange();
      if (e.key !== "ArrowLeft" && e.key !== "ArrowRight") return;
      e.preventDefault();
      const n = state.drawn.points;
      const dx = ((f.x_range[1] - f.x_range[0]) / Math.max(1, n - 1)) * (e.shiftKey ? 20 : 1) * (e.key === "ArrowLeft" ? -1 : 1);
      const mid = (f.x_range[0] + f.x_range[1]) / 2;
      const x = state.cursorX === null ? mid : state.cursorX + dx;
      state.cursorX = Math.min(f.x_range[1], Math.max(f.x_range[0], x));
      drawCrosshair();
    });
    box.addEventListener("blur", () => {
      state.cursorX = null;
      drawCrosshair();
    });
  });
}

// ------------------------------------------------------------------- files

function download(name, text, type) {
  downloadBlob(name, new Blob([text], { type }));
}

function downloadBlob(name, blob) {
  const url = URL.createObjectURL(blob);
  const a = el("a", { href: url, download: name });
  document.body.append(a);
  a.click();
  a.remove();
  setTimeout(() => URL.revokeObjectURL(url), 1000);
}

function fileStem() {
  const t = (state.doc.title || "model").toLowerCase().replace(/[^a-z0-9]+/g, "-").replace(/^-|-$/g, "");
  return t.slice(0, 40) || "model";
}

function bindFiles() {
  $("save-json").addEventListener("click", () => {
    try {
      download(`${fileStem()}.chiroptic.json`, core.document_json(state.doc), "application/json");
    } catch (e) {
      setStatus(`Cannot save: ${e.message}`, true);
    }
  });
  $("save-csv").addEventListener("click", () => {
    const text = call(() => state.wb.csv());
    if (text) download(`${fileStem()}.csv`, text, "text/csv");
  });
  $("open-file").addEventListener("click", () => $("file-input").click());
  $("notice-close").addEventListener("click", () => showNotice(null));
  $("file-input").addEventListener("change", async () => {
    const file = $("file-input").files[0];
    $("file-input").value = "";
    if (!file) return;
    if (file.size > 2 * 1024 * 1024) return setStatus(`${file.name}: larger than any model file (over 2 MB); nothing was changed.`, true);
    const text = await file.text();
    const result = call(() => core.parse_document(text));
    if (!result) return;
    if (!result.ok) {
      const where = result.error.field ? ` (${result.error.field})` : "";
      return setStatus(`${file.name}${where}: ${result.error.message}. Your model is unchanged.`, true);
    }
    loadDocument(result.doc);
    setStatus(`Opened ${file.name}`);
  });
  $("open-demo").addEventListener("click", () => {
    if (!window.confirm("Replace the current model with the invented demo?")) return;
    loadDocument(call(() => core.demo_document()));
  });
  $("doc-title").addEventListener("input", () => {
    state.doc.title = $("doc-title").value;
    edited();
  });
}

/** Puts a whole new document on the page. */
function loadDocument(doc) {
  state.doc = doc;
  state.cursorX = null;
  coreError = null;
  fields = fields.filter((f) => !f.input.closest("#band-rows, #solvent-detail"));
  fields.forEach((f) => (f.localError = null));
  $("doc-title").value = doc.title ?? "";
  layoutPlots(doc.view?.plots ?? PLOT_KEYS);
  renderBands();
  renderSolvent();
  sizeCanvases();
  refresh();
}

// ---------------------------------------------------------- conventions

function renderConventions() {
  const k = fmtText(state.catalog.mdeg_per_delta_a, 5);
  $("hint-cd").textContent =
    `Δε = ε_L − ε_R and ΔA = A_L − A_R: positive when left-circular light is absorbed more. ` +
    `θ / mdeg = ${k} × ΔA. A band with R > 0 gives positive CD.`;
  $("hint-ord").textContent =
    "φ = π l Δn / λ with Δn = n_L − n_R. Positive φ is dextrorotatory (clockwise as seen facing the light source). " +
    "R > 0 gives a positive Cotton effect: the rotation peaks on the long-wavelength side of the band and dips on the short side.";
  const items = [
    "Δn = n_L − n_R, Δε = ε_L − ε_R, ΔA = A_L − A_R (left minus right throughout).",
    `Ellipticity as CD instruments report it: θ / mdeg = ${k} × ΔA; [θ] = 100 θ/(c l) per mole.`,
    "Rotation φ > 0: dextrorotatory, clockwise as seen by an observer facing the light source.",
    "R > 0: positive CD band and positive Cotton effect (rotation peak on the long-wavelength side).",
    "[α] = φ / (l/dm · c/(g/mL)); [Φ] = [α] M / 100.",
  ];
  $("conventions-list").replaceChildren(...items.map((t) => el("li", { textContent: t })));
}

// ------------------------------------------------------------------- theme

function bindTheme() {
  const mq = window.matchMedia("(prefers-color-scheme: dark)");
  const apply = () => {
    state.options.dark = mq.matches;
    document.documentElement.classList.toggle("dark", mq.matches);
    const [bg, ink, muted, grid] = call(() => core.theme_colours(mq.matches)) ?? [];
    const root = document.documentElement.style;
    root.setProperty("--plot-bg", bg);
    root.setProperty("--plot-ink", ink);
    root.setProperty("--plot-muted", muted);
    root.setProperty("--plot-grid", grid);
  };
  apply();
  mq.addEventListener("change", () => {
    apply();
    redraw();
  });
  // Paper is white whatever the screen shows. Chromium prints the last
  // frame a canvas presented (a redraw in "beforeprint" comes out blank), so
  // dark plots are turned light by the print stylesheet instead (html.dark).
  // While printing, the canvases keep their bitmaps, scaled to the paper.
  window.addEventListener("beforeprint", () => (printing = true));
  window.addEventListener("afterprint", () => {
    printing = false;
    onResize();
  });
}

// -------------------------------------------------------------- band table

function bindBandTable() {
  $("add-band").addEventListener("click", addBand);
  const rows = $("band-rows");
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

// ------------------------------------------------------------- share links

/** The address fragment: the link, then page options after '&' (`&show=cd`). */
function readFragment() {
  const raw = location.hash.replace(/^#/, "");
  const [link, ...rest] = raw.split("&");
  const options = {};
  for (const part of rest) {
    const i = part.indexOf("=");
    options[i < 0 ? part : part.slice(0, i)] = i < 0 ? "" : part.slice(i + 1);
  }
  return { link, options };
}

/** A core error about a document, said in one line ("band 2 (fwhm_cm1): …"). */
function problemText(err) {
  let where = "";
  const band = /^bands\[(\d+)\]\.?(.*)$/.exec(err.field ?? "");
  if (band) where = `band ${Number(band[1]) + 1}${band[2] ? ` (${band[2]})` : ""}: `;
  else if (err.field && err.field !== "link") where = `${err.field}: `;
  // A true minus sign for negative numbers (not for hyphens in names such as water-20c).
  return `${where}${err.message}`.replace(/\.$/, "").replace(/(^|[\s(])-(\d)/g, "$1−$2");
}

/** The link fragment (no '#') of the last model that drew, or null. */
function currentLink() {
  if (!state.goodDoc) return null;
  const r = call(() => core.link_encode(state.goodDoc));
  return r?.ok ? r.link : null;
}

/** The page's address without its fragment: where links and embeds point. */
const pageAddress = () => location.href.split("#")[0];

function shareUrl() {
  const link = currentLink();
  return link ? `${pageAddress()}#${link}` : null;
}

/** Opens a link that arrived while the page runs; a bad one leaves the model alone. */
function openLink(text) {
  const r = call(() => core.link_decode(text));
  if (!r) return;
  if (!r.ok) {
    showNotice(`This link cannot be opened: ${problemText(r.error)}. Your model is unchanged.`);
    // The address goes back to the model on screen.
    persistSoon(0);
    return;
  }
  showNotice(null);
  loadDocument(r.doc);
  setStatus("Opened the model of the link (Undo returns to the one before)");
}

function onHashChange() {
  const f = readFragment();
  // The wiki view is a page of its own.
  if (f.options.show !== undefined) return location.reload();
  // An emptied address is no link: the model stays (and its link comes back).
  if (!f.link) return persistSoon(0);
  if (f.link === state.link) return;
  openLink(f.link);
}

function showNotice(text) {
  $("notice-text").textContent = text ?? "";
  $("notice").hidden = !text;
}

// --------------------------------------------------------------- autosave

const AUTOSAVE_KEY = "chiroptic.autosave";
/** Where an autosave that could not be read is set aside (nothing is thrown away). */
const UNREADABLE_KEY = "chiroptic.autosave.unreadable";

/** localStorage, or null where the browser refuses it (privacy modes, sandboxed frames). */
function storage() {
  try {
    return window.localStorage ?? null;
  } catch {
    return null;
  }
}

/** The autosaved document: `{ doc }`, `{ problem }` when unreadable, or `{}`. */
function readAutosave() {
  const st = storage();
  let text = null;
  try {
    text = st?.getItem(AUTOSAVE_KEY) ?? null;
  } catch {
    return {};
  }
  if (text === null) return {};
  const r = call(() => core.read_valid_document(text));
  if (r?.ok) return { doc: r.doc };
  try {
    st.setItem(UNREADABLE_KEY, text);
    st.removeItem(AUTOSAVE_KEY);
  } catch {
    // Storage full or refused: the bad value stays and is ignored again next time.
  }
  return { problem: r ? problemText(r.error) : "the calculation core stopped" };
}

let autosaveFailed = false;
function writeAutosave(doc) {
  const st = storage();
  if (!st) return;
  try {
    st.setItem(AUTOSAVE_KEY, JSON.stringify(doc));
    autosaveFailed = false;
  } catch (e) {
    if (autosaveFailed) return; // said once until it works again
    autosaveFailed = true;
    const full = e?.name === "QuotaExceededError" || e?.code === 22;
    const why = full ? "this browser's storage for the page is full" : `the browser refused it (${e?.message ?? e})`;
    showNotice(`Autosave stopped: ${why}. Your model is still here; save it as a file to keep it.`);
  }
}

// The address and the autosave follow the model, a moment after the last edit.
let persistTimer = null;
function persistSoon(ms = 300) {
  clearTimeout(persistTimer);
  persistTimer = setTimeout(persist, ms);
}

function persist() {
  if (state.wiki || !state.goodDoc) return;
  const link = currentLink();
  if (link) {
    state.link = link;
    // replaceState: no history entry per edit, and no hashchange.
    if (location.hash.slice(1) !== link) history.replaceState(null, "", `#${link}`);
    if ($("share-menu").open) fillShare();
  }
  writeAutosave(state.goodDoc);
}

// ------------------------------------------------------------ undo / redo

/** Snapshots of the document (JSON); `at` is the one on screen. */
const edits = { stack: [], at: -1, lastTime: 0, lastTarget: null, open: false };
const MAX_UNDO = 200;
/** Typing or dragging in one control within this time is one edit. */
const BURST_MS = 1000;

/** Called after every change to the document: history, address, autosave. */
function edited() {
  if (state.wiki || !state.doc) return;
  if (state.valid) state.goodDoc = structuredClone(state.doc);
  noteEdit();
  persistSoon();
}

function noteEdit() {
  const snap = JSON.stringify(state.doc);
  if (edits.at >= 0 && snap === edits.stack[edits.at]) return;
  const now = performance.now();
  const target = peakDrag ?? document.activeElement;
  const continuous = peakDrag !== null || (target?.tagName === "INPUT" && (isTextEntry(target) || target.type === "range"));
  const recent = now - edits.lastTime < BURST_MS || peakDrag !== null;
  if (edits.open && edits.at > 0 && continuous && target === edits.lastTarget && recent) {
    edits.stack[edits.at] = snap;
  } else {
    edits.stack.splice(edits.at + 1);
    edits.stack.push(snap);
    if (edits.stack.length > MAX_UNDO) edits.stack.shift();
    edits.at = edits.stack.length - 1;
  }
  Object.assign(edits, { lastTime: now, lastTarget: target, open: true });
  syncUndoButtons();
}

function resetEdits() {
  Object.assign(edits, { stack: [JSON.stringify(state.doc)], at: 0, open: false });
  syncUndoButtons();
}

function syncUndoButtons() {
  $("undo").disabled = edits.at <= 0;
  $("redo").disabled = edits.at >= edits.stack.length - 1;
}

function stepEdit(by) {
  const j = edits.at + by;
  if (j < 0 || j >= edits.stack.length) return;
  edits.at = j;
  edits.open = false;
  const focused = document.activeElement?.id;
  loadDocument(JSON.parse(edits.stack[j]));
  syncUndoButtons();
  if (focused && $(focused) && document.activeElement !== $(focused)) $(focused).focus();
  if (!$("plot-grid").classList.contains("stale")) setStatus(by < 0 ? "Undone" : "Redone");
}

/** A text field, where Ctrl+Z is the browser's own undo of the typed text. */
function isTextEntry(el) {
  if (!el) return false;
  if (el.isContentEditable || el.tagName === "TEXTAREA") return true;
  return el.tagName === "INPUT" && ["text", "search", "number", "url", "email", "tel", "password"].includes(el.type);
}

function bindHistory() {
  $("undo").addEventListener("click", () => stepEdit(-1));
  $("redo").addEventListener("click", () => stepEdit(1));
  document.addEventListener("keydown", (e) => {
    if (!(e.ctrlKey || e.metaKey) || e.altKey) return;
    const k = e.key.toLowerCase();
    const undo = k === "z" && !e.shiftKey;
    const redo = (k === "z" && e.shiftKey) || (k === "y" && e.ctrlKey && !e.shiftKey);
    if (!undo && !redo) return;
    if (isTextEntry(e.target)) return;
    e.preventDefault();
    stepEdit(undo ? -1 : 1);
  });
}

// ------------------------------------------------------------------ export

/** A plot's size on screen in CSS pixels; a hidden plot takes a shown one's. */
function plotCssSize(key) {
  const size = (k) => {
    const box = document.querySelector(`.plot[data-plot="${k}"] .canvas-box`);
    const w = Math.floor(box?.clientWidth ?? 0);
    const h = Math.floor(box?.clientHeight ?? 0);
    return w >= 64 && h >= 64 ? [w, h] : null;
  };
  return size(key) ?? PLOT_KEYS.map(size).find(Boolean) ?? [720, 450];
}

const exportKey = () => $("export-key").checked;

function exportSvg(key) {
  const [w, h] = plotCssSize(key);
  let text;
  try {
    text = call(() => state.wb.svg(key, w, h, exportKey()));
  } catch (e) {
    return setStatus(`Cannot export the ${shortTitle(key)} plot: ${e.message}`, true);
  }
  if (text) download(`${fileStem()}-${key}.svg`, text, "image/svg+xml");
}

function exportPng(key, scale) {
  const [w, h] = plotCssSize(key);
  const canvas = el("canvas", { width: Math.round(w * scale), height: Math.round(h * scale) });
  try {
    call(() => state.wb.draw_plot(key, canvas, scale, exportKey()));
  } catch (e) {
    return setStatus(`Cannot export the ${shortTitle(key)} plot: ${e.message}`, true);
  }
  canvas.toBlob((blob) => {
    if (!blob) return setStatus(`The browser could not make a ${canvas.width} × ${canvas.height} picture`, true);
    downloadBlob(`${fileStem()}-${key}@${scale}x.png`, blob);
  }, "image/png");
}

function bindExport() {
  const rows = state.catalog.plots.map((p) => {
    const button = (text, label, id, fn) => {
      const b = el("button", { type: "button", textContent: text, id });
      b.setAttribute("aria-label", label);
      b.addEventListener("click", fn);
      return el("td", {}, b);
    };
    const name = shortTitle(p.key);
    return el(
      "tr",
      {},
      el("th", { scope: "row", textContent: name }),
      button("SVG", `${name} plot as SVG`, `export-${p.key}-svg`, () => exportSvg(p.key)),
      ...[1, 2, 4].map((k) => button(`${k}×`, `${name} plot as PNG at ${k}×`, `export-${p.key}-png-${k}`, () => exportPng(p.key, k))),
    );
  });
  $("export-rows").replaceChildren(...rows);
  $("export-menu").addEventListener("toggle", () => {
    if (!$("export-menu").open) return;
    const [w, h] = plotCssSize(state.drawn?.plots?.[0] ?? "cd");
    $("export-size").textContent = `Light figures at the plot’s size on screen (${w} × ${h} px); PNG at 2× and 4× has that many more pixels per side.`;
  });
  $("save-json-too").addEventListener("click", () => $("save-json").click());
}

// ------------------------------------------------------------ share panel

function fillShare() {
  const url = shareUrl();
  $("link-text").value = url ?? "";
  $("link-length").textContent = url ? `${url.length} characters` : "the model has an error: no link";
  fillEmbed();
}

function embedSize(id, fallback) {
  const v = Number($(id).value);
  return Number.isInteger(v) && v >= 100 && v <= 4000 ? v : fallback;
}

function fillEmbed() {
  const link = currentLink();
  const key = $("embed-plot").value || "cd";
  const w = embedSize("embed-width", 640);
  const h = embedSize("embed-height", 400);
  const title = `${plotTitle(key)}: ${state.goodDoc?.title || "chiroptic model"}`.replace(/[&"<>]/g, (c) => `&#${c.charCodeAt(0)};`);
  $("embed-text").value = link
    ? `<iframe src="${pageAddress()}#${link}&show=${key}" width="${w}" height="${h}" style="border:0" loading="lazy" title="${title}"></iframe>`
    : "";
  $("embed-note").hidden = false;
  if (location.protocol === "file:") {
    $("embed-status").textContent = "This page is opened from a file: the embed code points at that file. Put the page on your wiki’s server for others to see it.";
  }
}

/** Copies through the clipboard API, or selects the text for Ctrl+C where the browser refuses. */
async function copyText(text, field, status) {
  field.value = text;
  const refused = () => {
    field.focus();
    field.select();
    status.textContent = "The browser did not let the page copy: the text is selected, press Ctrl+C (⌘C on a Mac).";
  };
  if (!text) return (status.textContent = "Nothing to copy: the model has an error.");
  if (!navigator.clipboard?.writeText) return refused();
  try {
    // A browser that asks for permission may never answer: give up after a moment.
    await Promise.race([
      navigator.clipboard.writeText(text),
      new Promise((_, no) => setTimeout(() => no(new Error("no answer")), 1500)),
    ]);
    status.textContent = `Copied (${text.length} characters).`;
  } catch {
    refused();
  }
}

function bindShare() {
  $("embed-plot").replaceChildren(...state.catalog.plots.map((p) => el("option", { value: p.key, textContent: p.title })));
  $("share-menu").addEventListener("toggle", () => {
    if (!$("share-menu").open) return;
    const shown = state.drawn?.plots ?? PLOT_KEYS;
    if (!shown.includes($("embed-plot").value)) $("embed-plot").value = shown[0] ?? "cd";
    $("copy-status").textContent = "";
    $("embed-status").textContent = "";
    fillShare();
  });
  $("copy-link").addEventListener("click", () => {
    fillShare();
    copyText(shareUrl(), $("link-text"), $("copy-status"));
  });
  $("copy-embed").addEventListener("click", () => {
    fillEmbed();
    copyText($("embed-text").value, $("embed-text"), $("embed-status"));
  });
  for (const id of ["embed-plot", "embed-width", "embed-height"]) $(id).addEventListener("input", fillEmbed);
  // The text fields select all on focus, for copying by hand.
  for (const id of ["link-text", "embed-text"]) $(id).addEventListener("focus", () => $(id).select());
}

/** Menus close on Escape and on a click elsewhere. */
function bindMenus() {
  const menus = [...document.querySelectorAll("details.menu")];
  document.addEventListener("pointerdown", (e) => {
    for (const m of menus) if (m.open && !m.contains(e.target)) m.open = false;
  });
  document.addEventListener("keydown", (e) => {
    if (e.key !== "Escape") return;
    for (const m of menus) {
      if (m.open) {
        m.open = false;
        m.querySelector("summary").focus();
      }
    }
  });
  // One menu open at a time.
  for (const m of menus) {
    m.addEventListener("toggle", () => {
      if (m.open) for (const other of menus) if (other !== m) other.open = false;
    });
  }
}

// --------------------------------------------------------------- wiki view

/** `#c1.…&show=cd`: one plot filling the frame, no controls, nothing saved. */
function startWiki(fragment) {
  const key = fragment.options.show;
  state.wiki = key;
  document.documentElement.classList.add("wiki");
  // A picture, not a workbench: the plots take no focus.
  document.querySelectorAll(".canvas-box").forEach((box) => box.removeAttribute("tabindex"));
  const fail = (text) => {
    $("plots").hidden = true;
    showNotice(text);
  };
  window.addEventListener("hashchange", () => location.reload());
  if (!PLOT_KEYS.includes(key)) return fail(`This view cannot be shown: unknown plot “${key}” after “&show=” (use cd, ord, abs or index).`);
  if (!fragment.link) return fail("This view cannot be shown: the address holds no share link before “&show=”.");
  const r = call(() => core.link_decode(fragment.link));
  if (!r) return;
  if (!r.ok) return fail(`This plot cannot be shown: ${problemText(r.error)}.`);
  const doc = r.doc;
  doc.view = { ...(doc.view ?? {}), plots: [key] };
  if (doc.title) document.title = `${plotTitle(key)} · ${doc.title}`;
  state.options.legend = true;
  state.doc = doc;
  layoutPlots([key]);
  sizeCanvases();
  refresh();
  new ResizeObserver(onResize).observe($("plot-grid"));
}

// ------------------------------------------------------------------- start

/** The wasm module's bytes when the single offline file carries them inline. */
function inlinedWasm() {
  const holder = document.getElementById("chiroptic-wasm");
  if (!holder) return undefined;
  const bin = atob(holder.textContent.trim());
  const bytes = new Uint8Array(bin.length);
  for (let i = 0; i < bin.length; i++) bytes[i] = bin.charCodeAt(i);
  return { module_or_path: bytes };
}

async function main() {
  await init(inlinedWasm());
  state.catalog = core.catalog();
  const demo = core.demo_document();
  if (demo.ok === false) throw new Error(`the built-in demo does not load: ${demo.error.message}`);
  const canvases = PLOT_KEYS.map((k) => $(`plot-${k}`));
  state.wb = new core.Workbench(...canvases);
  // Read-only, for tests and scripts: the document (a copy) and the text each canvas shows.
  window.chiroptic = Object.freeze({
    document: () => JSON.parse(JSON.stringify(state.doc)),
    drawnText: (key) => call(() => state.wb.drawn_text(key)) ?? [],
    bandHandles: () => bandHandles().map(({ i, px, py }) => ({ i, px, py })),
  });
  bindTheme();
  const fragment = readFragment();
  if (fragment.options.show !== undefined) {
    startWiki(fragment);
    document.documentElement.dataset.ready = "true";
    return;
  }
  bindWindow();
  bindSample();
  bindBandTable();
  bindPlots();
  bindFiles();
  bindHistory();
  bindExport();
  bindShare();
  bindMenus();
  renderConventions();
  new ResizeObserver(onResize).observe($("plot-grid"));

  // A link in the address wins; else the autosave; else the demo.
  const notes = [];
  let doc = null;
  let from = "demo";
  if (fragment.link) {
    const r = call(() => core.link_decode(fragment.link));
    if (r?.ok) [doc, from] = [r.doc, "link"];
    else if (r) notes.push(`This link cannot be opened: ${problemText(r.error)}.`);
  }
  if (!doc) {
    const saved = readAutosave();
    if (saved.doc) [doc, from] = [saved.doc, "autosave"];
    if (saved.problem) notes.push(`The model autosaved in this browser could not be read (${saved.problem}); it was set aside.`);
    if (notes.length) notes.push(saved.doc ? "Showing your autosaved model instead." : "Showing the invented demo instead.");
  }
  loadDocument(doc ?? demo);
  resetEdits();
  if (notes.length) showNotice(notes.join(" "));
  if (from === "autosave" && !$("plot-grid").classList.contains("stale")) setStatus("Restored the model autosaved in this browser");
  window.addEventListener("hashchange", onHashChange);
  document.documentElement.dataset.ready = "true";
}

main().catch((e) => {
  const box = $("fatal");
  box.textContent = `The workbench could not start: ${e.message}`;
  box.hidden = false;
  console.error(e);
});
