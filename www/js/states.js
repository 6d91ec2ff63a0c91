// The panel of computed excited states (the document's `states` section):
// a transition list loaded from a file, dropped on the panel or pasted
// becomes the section as one undo step; the broadening controls and the
// populations table are bound to it. Reading the list, the Boltzmann
// shares and the broadening all happen in the core; the comparison with a
// measured CD is statescompare.js.

import { $, el } from "./dom.js";
import { state } from "./state.js";
import * as core from "./core.js";
import { bindNumber, dropFieldsIn } from "./fields.js";
import { edit } from "./edit.js";
import { oneStepPerDrag } from "./history.js";
import { sayDone } from "./messages.js";
import { fmtText, shortest } from "./format.js";
import { numberCell } from "./bands.js";
import { viewOf } from "./window.js";
import { bindStatesCompare, renderStatesCompare } from "./statescompare.js";

let catalog = null;
/** The panel's defaults (shapes, widths, temperature, energy fields), from the core. */
export function statesCatalog() {
  if (!catalog) {
    const r = core.statesCatalog();
    if (!r.ok) throw new Error(`the core's states catalog does not load: ${r.error.message}`);
    catalog = r;
  }
  return catalog;
}

/** Shares are stored as fractions and shown in per cent. */
const PERCENT = 100;

/** Slider spans (the boxes take any value the core accepts). */
const FWHM_SLIDER_EV = [0.05, 1];
const SCALE_SLIDER = [0, 3];
const TEMPERATURE_SLIDER_K = [100, 500];

const section = () => state.doc?.states ?? null;
const broadening = () => section().broadening;

// ---------------------------------------------------------------- loading

/** One message about the list that changes nothing, or none. */
function sayProblem(text) {
  $("states-problem").textContent = text ?? "";
  $("states-problem").hidden = !text;
}

/** Reads a transition list; a good one replaces the section as one edit, a bad one changes nothing. */
export function loadList(text, source) {
  const r = core.statesFromText(text);
  if (!r.ok) {
    const text = `${source}: ${r.error.message.replace(/\.$/, "")}. The model is unchanged.`;
    sayProblem(text.charAt(0).toUpperCase() + text.slice(1));
    return false;
  }
  sayProblem(null);
  state.doc.states = r.states;
  // The window moves to the new transitions, in the same undo step.
  const frame = core.statesFrame(state.doc);
  if (frame.ok) viewOf().range_nm = frame.range_nm;
  renderStates();
  edit();
  const n = r.states.conformers.reduce((sum, c) => sum + c.transitions.length, 0);
  sayDone(`Read ${source}: ${r.states.conformers.length} conformers, ${n} transitions`);
  return true;
}

async function loadFile(file) {
  if (!file) return;
  if (file.size > core.dataCatalog().max_import_bytes) return sayProblem(`${file.name}: too large for a transition list. The model is unchanged.`);
  loadList(await file.text(), file.name);
}

function removeStates() {
  if (!section()) return;
  delete state.doc.states;
  sayProblem(null);
  renderStates();
  edit();
  $("states-open").focus();
}

// ---------------------------------------------------------------- broadening

function numberField(id, label, unit, spec) {
  const c = numberCell(id, label, `${id}-error`);
  c.input.dataset.field = spec.path;
  bindNumber({ ...c, label, canonical: true, unit: () => unit, ...spec });
  oneStepPerDrag(c.slider, c.input);
  return el(
    "div",
    { className: "states-field" },
    el("label", { htmlFor: id, textContent: label }),
    el("span", { className: "with-unit" }, c.cell, el("span", { className: "unit", textContent: unit })),
    el("span", { className: "field-error", id: `${id}-error`, role: "status" }),
  );
}

function shapeSelect() {
  const select = el("select", { id: "states-shape" });
  select.dataset.field = "states.broadening.shape";
  select.setAttribute("aria-describedby", "states-shape-error");
  const labels = new Map(core.catalog.shapes.map((s) => [s.key, s.label]));
  for (const key of statesCatalog().shapes) select.append(el("option", { value: key, textContent: labels.get(key) ?? key }));
  select.value = broadening().shape;
  select.addEventListener("change", () => {
    const b = broadening();
    b.shape = select.value;
    // Only a Voigt band has a Lorentzian part.
    if (b.shape === "voigt") b.lorentz_fwhm_ev ??= statesCatalog().voigt_lorentz_fwhm_ev;
    else delete b.lorentz_fwhm_ev;
    renderStates();
    edit();
  });
  return el(
    "div",
    { className: "states-field" },
    el("label", { htmlFor: "states-shape", textContent: "Band shape" }),
    select,
    el("span", { className: "field-error", id: "states-shape-error", role: "status" }),
  );
}

function formSelect() {
  const select = el("select", { id: "states-form" }, el("option", { value: "length", textContent: "length form" }), el("option", { value: "velocity", textContent: "velocity form" }));
  select.dataset.field = "states.broadening.velocity_form";
  select.value = broadening().velocity_form ? "velocity" : "length";
  select.addEventListener("change", () => {
    // The core writes the default (length) as no flag at all.
    if (select.value === "velocity") broadening().velocity_form = true;
    else delete broadening().velocity_form;
    edit();
  });
  return el("div", { className: "states-field" }, el("label", { htmlFor: "states-form", textContent: "Rotatory strengths" }), select);
}

function broadeningControls() {
  const k = statesCatalog();
  const b = () => broadening();
  const grid = [
    shapeSelect(),
    numberField("states-fwhm", b().shape === "voigt" ? "Gaussian FWHM" : "FWHM", "eV", {
      path: "states.broadening.fwhm_ev",
      get: () => b().fwhm_ev,
      set: (v) => (b().fwhm_ev = v),
      step: () => 0.01,
      range: () => FWHM_SLIDER_EV,
      sliderStep: 0.005,
    }),
  ];
  if (b().shape === "voigt") {
    grid.push(
      numberField("states-lorentz", "Lorentzian FWHM", "eV", {
        path: "states.broadening.lorentz_fwhm_ev",
        get: () => b().lorentz_fwhm_ev,
        set: (v) => (b().lorentz_fwhm_ev = v),
        step: () => 0.01,
        range: () => FWHM_SLIDER_EV,
        sliderStep: 0.005,
      }),
    );
  }
  grid.push(
    numberField("states-shift", "Shift", "eV", {
      path: "states.broadening.shift_ev",
      get: () => b().shift_ev ?? k.shift_ev,
      set: (v) => (b().shift_ev = v),
      step: () => 0.01,
      range: () => [-k.max_shift_ev, k.max_shift_ev],
      sliderStep: 0.005,
    }),
    numberField("states-scale", "Scale", "×", {
      path: "states.broadening.scale",
      get: () => b().scale ?? k.scale,
      set: (v) => (b().scale = v),
      step: () => 0.1,
      range: () => SCALE_SLIDER,
      sliderStep: 0.01,
    }),
    formSelect(),
    numberField("states-temperature", "Temperature", "K", {
      path: "states.temperature_k",
      get: () => section().temperature_k ?? k.temperature_k,
      set: (v) => (section().temperature_k = v),
      step: () => 5,
      range: () => TEMPERATURE_SLIDER_K,
      sliderStep: 1,
    }),
  );
  const group = el("div", { className: "states-broadening", role: "group", ariaLabel: "Broadening" }, ...grid, el("span", { className: "field-error states-whole", id: "states-broadening-error", role: "status" }));
  // The core names the broadening as a whole for faults of no one field.
  group.dataset.field = "states.broadening";
  group.setAttribute("aria-describedby", "states-broadening-error");
  return group;
}

// ---------------------------------------------------------------- populations

/** A conformer's energy as the list gave it: "0.65 kcal/mol", or its given population. */
function energyText(c) {
  const f = statesCatalog().energy_fields.find((e) => c[e.key] !== undefined);
  if (f) return `${fmtText(c[f.key])} ${f.unit}`;
  if (c.population !== undefined) return `population ${fmtText(c.population)}`;
  return "—";
}

function shareField(c, i) {
  const id = `states-share-${i}`;
  const input = el("input", { type: "text", inputMode: "decimal", className: "num short", id, autocomplete: "off", placeholder: "auto" });
  input.dataset.field = `states.conformers[${i}].share`;
  input.setAttribute("aria-label", `Share of ${c.name} set by hand, per cent (empty: from its energy)`);
  input.setAttribute("aria-describedby", "states-table-error");
  const conformer = () => section().conformers[i];
  bindNumber({
    input,
    label: `Share of ${c.name}`,
    optional: true,
    canonical: false,
    unit: () => "%",
    get: () => (conformer().share === undefined ? undefined : conformer().share * PERCENT),
    set: (v) => {
      if (v === undefined) delete conformer().share;
      else conformer().share = shortest(v / PERCENT, v, (s) => s * PERCENT);
    },
    step: () => 1,
    range: () => [0, PERCENT],
  });
  return input;
}

function onSwitch(c, i) {
  const box = el("input", { type: "checkbox", id: `states-on-${i}`, checked: !c.off });
  box.dataset.field = `states.conformers[${i}].off`;
  box.setAttribute("aria-label", `${c.name} counted in the spectra`);
  box.addEventListener("change", () => {
    // The core writes "on" as no flag at all.
    if (box.checked) delete section().conformers[i].off;
    else section().conformers[i].off = true;
    edit();
  });
  return box;
}

function populationRows() {
  return section().conformers.map((c, i) => {
    const tr = el(
      "tr",
      { className: c.off ? "off" : "" },
      el("th", { scope: "row", textContent: c.name }),
      el("td", { textContent: energyText(c) }),
      el("td", { className: "share-used", id: `states-used-${i}` }),
      el("td", {}, el("span", { className: "with-unit" }, shareField(c, i), el("span", { className: "unit", textContent: "%" }))),
      el("td", { className: "center" }, onSwitch(c, i)),
      el("td", { textContent: String(c.transitions.length) }),
    );
    tr.dataset.index = String(i);
    return tr;
  });
}

/** The core's populations of a section, asked again only when what they depend on changes (not the widths). */
let populationsCache = { key: null, reply: null };
function populationsOf(section) {
  const key = JSON.stringify([section.temperature_k, section.conformers.map(({ transitions, ...energyShareOff }) => energyShareOff)]);
  if (populationsCache.key !== key) {
    // The shares do not depend on the transitions: one per conformer keeps the call short.
    const lean = { ...section, conformers: section.conformers.map((c) => ({ ...c, transitions: c.transitions.slice(0, 1) })) };
    populationsCache = { key, reply: core.statesPopulations({ ...core.catalog.empty_document, states: lean }) };
  }
  return populationsCache.reply;
}

/**
 * The shares the spectra use, from the core: those of the last good model,
 * so that while a typed share is refused the table still says what the
 * plots show. The section alone is sent (not the data sets).
 */
function showPopulations() {
  const shown = section();
  if (!shown) return;
  const good = state.goodDoc?.states;
  const r = good && good.conformers.length === shown.conformers.length ? populationsOf(good) : null;
  shown.conformers.forEach((c, i) => {
    const cell = $(`states-used-${i}`);
    if (!cell) return;
    const p = r?.ok ? r.populations[i] : undefined;
    cell.textContent = p === undefined ? "—" : `${(p * PERCENT).toFixed(2)} %`;
    if (p !== undefined) cell.dataset.value = String(p * PERCENT);
    else delete cell.dataset.value;
    cell.closest("tr").classList.toggle("off", Boolean(c.off));
  });
  $("states-table").classList.toggle("stale", state.stale);
}

// ---------------------------------------------------------------- the panel

/**
 * What the panel was built for: the section object (a new document, an undo
 * or a new list brings another) and its shape (Voigt has one more field).
 */
let builtFor = { section: undefined, shape: undefined };
const outOfDate = () => builtFor.section !== section() || builtFor.shape !== section()?.broadening.shape;

/** The controls that are not number fields follow the document (fields.js shows the numbers). */
function syncControls() {
  const s = section();
  if (!s) return;
  $("states-form").value = s.broadening.velocity_form ? "velocity" : "length";
  s.conformers.forEach((c, i) => {
    const box = $(`states-on-${i}`);
    if (box) box.checked = !c.off;
  });
}

/** Rebuilds the panel for the document on screen. */
export function renderStates() {
  dropFieldsIn("#states-body");
  const s = section();
  builtFor = { section: s, shape: s?.broadening.shape };
  $("states-empty").hidden = Boolean(s);
  $("states-body").hidden = !s;
  $("states-remove").disabled = !s;
  $("lines-states-note").hidden = !s;
  $("states-broadening").replaceChildren(...(s ? [broadeningControls()] : []));
  $("states-rows").replaceChildren(...(s ? populationRows() : []));
  if (s) {
    const n = s.conformers.reduce((sum, c) => sum + c.transitions.length, 0);
    $("states-summary").textContent = `${s.conformers.length} conformer${s.conformers.length === 1 ? "" : "s"}, ${n} transitions, each broadened into a band of the spectra (not listed in the band list); sticks on the CD and absorption plots.`;
  }
  showPopulations();
  renderStatesCompare();
}

/** The core's caution about the lamp lines, with "[α]_D" typeset as [α] and a subscript D. */
function showCaution() {
  const [before, ...after] = statesCatalog().caution.split("_D");
  const text = `With computed states in the model: ${before}`;
  $("lines-states-note").replaceChildren(text, ...(after.length ? [el("sub", { textContent: "D" }), after.join("_D")] : []), ".");
}

export function bindStates() {
  showCaution();
  $("states-open").addEventListener("click", () => $("states-file").click());
  $("states-file").addEventListener("change", async () => {
    const file = $("states-file").files[0];
    $("states-file").value = "";
    await loadFile(file);
  });
  $("states-read").addEventListener("click", () => loadList($("states-text").value, "the pasted list"));
  $("states-remove").addEventListener("click", removeStates);
  // A list dropped on the panel is read here, not as measured data (data.js listens on the document).
  const panel = $("states");
  panel.addEventListener("dragover", (e) => {
    if (![...(e.dataTransfer?.types ?? [])].includes("Files")) return;
    e.preventDefault();
    panel.classList.add("drop-here");
  });
  panel.addEventListener("dragleave", () => panel.classList.remove("drop-here"));
  panel.addEventListener("drop", async (e) => {
    const file = e.dataTransfer?.files?.[0];
    panel.classList.remove("drop-here");
    if (!file) return;
    e.preventDefault();
    e.stopPropagation();
    await loadFile(file);
  });
  bindStatesCompare();
  // After every redraw (an edit, undo, a new document): the panel follows the document.
  document.addEventListener("chiroptic:updated", () => {
    if (outOfDate()) return renderStates();
    syncControls();
    showPopulations();
  });
}
