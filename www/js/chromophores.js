// The chromophore table of the shown coupled system: one row per transition,
// the chromophore's own cells (name, position, direction) on its first row.
// Directions are typed as two angles; a direction the document holds as a
// vector is shown as angles (from the core) and becomes angles once edited.

import { $, el } from "./dom.js";
import { state } from "./state.js";
import * as core from "./core.js";
import { fmtText, tidyConverted } from "./format.js";
import { bindNumber } from "./fields.js";
import { edit } from "./edit.js";
import { numberCell } from "./bands.js";
import { coupledCatalog, geometry, shownSystem, renderCoupled } from "./coupled.js";

/** Slider spans and arrow-key steps (the boxes take any value the core accepts). */
const POSITION_SLIDER = [-20, 20];
const POLAR_SLIDER = [0, 180];
const AZIMUTH_SLIDER = [-180, 180];
const CENTRE_SLIDER_NM = [150, 800];
const WIDTH_SLIDER_CM1 = [200, 10000];
const D_SLIDER = [0, 50];
const R_SLIDER = [-100, 100];
const COLUMNS = 12;

/** A number of the document: a text box over a slider, bound to `path`. */
function cell(path, label, errorId, spec) {
  const c = numberCell(`c-${path.replace(/[^a-z0-9]+/gi, "-").replace(/-$/, "")}`, label, errorId);
  c.input.dataset.field = path;
  bindNumber({ ...c, label: "", canonical: false, unit: () => "", ...spec });
  return el("td", { className: "col-num" }, c.cell);
}

const plain = (obj, key, step, range) => ({
  get: () => obj[key],
  set: (v) => (obj[key] = v),
  step: () => step,
  range: () => range,
});

/** An angle of chromophore j's direction: the document's own, or the one the core finds for a vector. */
function angleSpec(c, j, key, range, step) {
  const of = (k) => (Array.isArray(c.direction) ? geometry()?.chromophores[j]?.[k] : c.direction[k]);
  return {
    unit: () => "°",
    get: () => of(key),
    set: (v) => {
      const other = key === "polar_deg" ? "azimuth_deg" : "polar_deg";
      const keep = of(other);
      c.direction = { polar_deg: 0, azimuth_deg: 0, [other]: Number.isFinite(keep) ? tidyConverted(keep) : 0, [key]: v };
    },
    step: () => step,
    range: () => range,
  };
}

function nameCell(c, at, label, errorId) {
  const name = el("input", { type: "text", value: c.name ?? "", className: "name", maxLength: 80, spellcheck: false, autocomplete: "off" });
  name.setAttribute("aria-label", `Name of ${label}`);
  name.setAttribute("aria-describedby", errorId);
  name.dataset.field = `${at}.name`;
  name.addEventListener("input", () => {
    c.name = name.value;
    edit({ merge: name });
  });
  return el("td", { className: "col-name" }, name);
}

function shapeCell(t, at, label, errorId) {
  const shape = el("select", { className: "shape" });
  shape.setAttribute("aria-label", `Shape of ${label}`);
  shape.setAttribute("aria-describedby", errorId);
  shape.dataset.field = `${at}.shape`;
  for (const s of core.catalog.shapes) shape.append(el("option", { value: s.key, textContent: s.label }));
  shape.value = t.shape;
  shape.addEventListener("change", () => {
    t.shape = shape.value;
    // A Voigt transition needs its Lorentzian part; the others carry none.
    if (t.shape === "voigt") t.lorentz_fwhm_cm1 ??= t.fwhm_cm1 / 2;
    else delete t.lorentz_fwhm_cm1;
    renderChromophores();
    edit();
  });
  return el("td", { className: "col-shape" }, shape);
}

const button = (text, title, fn, disabled = false) => {
  const b = el("button", { type: "button", className: "icon", textContent: text, title, disabled });
  b.setAttribute("aria-label", title);
  b.addEventListener("click", fn);
  return b;
};

/** The transition cells of transition k of chromophore j. */
function transitionCells(t, at, who, errorId) {
  const width = cell(`${at}.fwhm_cm1`, `Width of ${who}`, errorId, plain(t, "fwhm_cm1", 100, WIDTH_SLIDER_CM1));
  if (t.shape === "voigt") {
    const l = numberCell(`c-${at.replace(/[^a-z0-9]+/gi, "-")}-lorentz`, `Lorentzian width of ${who}`, errorId);
    l.input.dataset.field = `${at}.lorentz_fwhm_cm1`;
    bindNumber({ ...l, label: "", canonical: false, unit: () => "", ...plain(t, "lorentz_fwhm_cm1", 100, WIDTH_SLIDER_CM1) });
    width.firstChild.append(el("div", { className: "sub-label", textContent: "Lorentzian part" }), l.cell);
  }
  return [
    shapeCell(t, at, who, errorId),
    cell(`${at}.center_nm`, `Centre of ${who}`, errorId, plain(t, "center_nm", 1, CENTRE_SLIDER_NM)),
    width,
    cell(`${at}.dipole_strength_debye2`, `Dipole strength of ${who}`, errorId, plain(t, "dipole_strength_debye2", 1, D_SLIDER)),
    cell(`${at}.rotatory_strength_1e40_cgs`, `Intrinsic rotatory strength of ${who}`, errorId, {
      ...plain(t, "rotatory_strength_1e40_cgs", 1, R_SLIDER),
      get: () => t.rotatory_strength_1e40_cgs ?? 0,
    }),
  ];
}

/** The rows of chromophore j of system s. */
function chromophoreRows(s, c, j) {
  const at = `systems[${s}].chromophores[${j}]`;
  const label = `chromophore ${j + 1}`;
  const errorId = `chromophore-${j}-error`;
  const max = coupledCatalog().max_transitions_per_chromophore;
  const rows = c.transitions.map((t, k) => {
    const tr = el("tr", { className: k === 0 ? "band-row chromophore-row" : "band-row transition-row" });
    tr.dataset.index = String(j);
    const who = c.transitions.length > 1 ? `transition ${k + 1} of ${label}` : label;
    if (k === 0) {
      const where = c.position_angstrom.map((_, i) =>
        cell(`${at}.position_angstrom[${i}]`, `${"xyz"[i]} of ${label}`, errorId, plain(c.position_angstrom, i, 0.5, POSITION_SLIDER)),
      );
      // The whole position and the whole direction are where the core names "too close" or "not a unit vector".
      const posGroup = el("td", { className: "group-cell", colSpan: 3 }, el("div", { className: "triple" }, ...where.map((w) => w.firstChild)));
      posGroup.firstChild.dataset.field = `${at}.position_angstrom`;
      posGroup.firstChild.setAttribute("aria-describedby", errorId);
      const polar = cell(`${at}.direction.polar_deg`, `Polar angle of ${label}`, errorId, angleSpec(c, j, "polar_deg", POLAR_SLIDER, 5));
      const azimuth = cell(`${at}.direction.azimuth_deg`, `Azimuth of ${label}`, errorId, angleSpec(c, j, "azimuth_deg", AZIMUTH_SLIDER, 5));
      const vector = el("div", { className: "vector-text", title: "The direction as a unit vector (x, y, z)" });
      vector.dataset.vector = String(j);
      const dirGroup = el("td", { className: "group-cell", colSpan: 2 }, el("div", { className: "pair" }, polar.firstChild, azimuth.firstChild), vector);
      dirGroup.firstChild.dataset.field = `${at}.direction`;
      dirGroup.firstChild.setAttribute("aria-describedby", errorId);
      tr.append(nameCell(c, at, label, errorId), posGroup, dirGroup);
    } else {
      tr.append(el("td", { colSpan: 6, className: "sub-label transition-of", textContent: `transition ${k + 1}` }));
    }
    tr.append(...transitionCells(c.transitions[k], `${at}.transitions[${k}]`, who, errorId));
    const actions = el("div", { className: "actions" });
    if (k === 0) {
      actions.append(
        button("+", `Add a transition to ${label}`, () => addTransition(c, j), c.transitions.length >= max),
        button("✕", `Remove ${label}`, () => removeChromophore(j)),
      );
    } else {
      actions.append(button("−", `Remove ${who}`, () => removeTransition(c, j, k)));
    }
    tr.append(el("td", { className: "col-actions" }, actions));
    return tr;
  });
  const errRow = el("tr", { className: "row-error", hidden: true });
  errRow.append(el("td", { colSpan: COLUMNS }, el("span", { className: "field-error", id: errorId, role: "status" })));
  return [...rows, errRow];
}

/** Rebuilds the table of the shown system (after a structural change or a new document). */
export function renderChromophores() {
  const system = shownSystem();
  const s = state.coupled.shown;
  const rows = system ? system.chromophores.flatMap((c, j) => chromophoreRows(s, c, j)) : [];
  $("chromophore-rows").replaceChildren(...rows);
  if (system && system.chromophores.length === 0) {
    $("chromophore-rows").append(el("tr", {}, el("td", { colSpan: COLUMNS, className: "empty" }, "No chromophores in this system: add one.")));
  }
  showVectors();
}

/** The read-only vector form under each direction, from the core's geometry. */
export function showVectors() {
  const g = geometry();
  document.querySelectorAll("#chromophore-rows [data-vector]").forEach((node) => {
    const v = g?.chromophores[Number(node.dataset.vector)]?.direction;
    node.textContent = v ? `→ (${v.map((x) => fmtText(Math.abs(x) < 5e-13 ? 0 : x, 3)).join(", ")})` : "→ (no direction)";
  });
}

function addTransition(c, j) {
  c.transitions.push(structuredClone(c.transitions.at(-1)));
  renderChromophores();
  edit();
  $("chromophore-rows").querySelectorAll(`tr[data-index="${j}"]`)[c.transitions.length - 1]?.querySelector("select")?.focus();
}

function removeTransition(c, j, k) {
  c.transitions.splice(k, 1);
  renderChromophores();
  edit();
  $("chromophore-rows").querySelector(`tr[data-index="${j}"] input.name`)?.focus();
}

function removeChromophore(j) {
  shownSystem().chromophores.splice(j, 1);
  renderCoupled();
  edit();
  $("add-chromophore").focus();
}
