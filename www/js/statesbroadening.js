// The broadening controls of the computed states panel, bound to the
// section's `broadening` and `temperature_k` like the band list's fields
// (typed key by key, slid, stepped; a slider drag is one undo step): shape,
// FWHM (and the Lorentzian FWHM of a Voigt), shift, scale, the form of the
// rotatory strengths, and the temperature of the populations.

import { $, el } from "./dom.js";
import * as core from "./core.js";
import { bindNumber } from "./fields.js";
import { edit } from "./edit.js";
import { oneStepPerDrag } from "./history.js";
import { numberCell } from "./bands.js";
import { statesCatalog, statesSection as section, renderStates } from "./states.js";

/** Slider spans (the boxes take any value the core accepts). */
const FWHM_SLIDER_EV = [0.05, 1];
const SCALE_SLIDER = [0, 3];
const TEMPERATURE_SLIDER_K = [100, 500];

const broadening = () => section().broadening;

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

/** The controls of the section on screen. */
export function broadeningControls() {
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
  // The trade quotes a Gaussian's width as FWHM or as sigma: both boxes set the one FWHM.
  if (b().shape !== "lorentz") {
    grid.push(
      numberField("states-sigma", "or σ", "eV", {
        path: "states.broadening.fwhm_ev",
        get: () => b().fwhm_ev / k.fwhm_per_sigma,
        set: (v) => (b().fwhm_ev = v * k.fwhm_per_sigma),
        step: () => 0.005,
        range: () => FWHM_SLIDER_EV.map((w) => w / k.fwhm_per_sigma),
        sliderStep: 0.002,
      }),
    );
  }
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

/** The form menu follows the document (fields.js shows the numbers; the shape rebuilds the panel). */
export function syncBroadening() {
  $("states-form").value = broadening().velocity_form ? "velocity" : "length";
}
