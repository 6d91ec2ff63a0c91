// The sample panel: concentration and path length (entered in a unit of
// choice, stored in mol/L and cm), molar mass and mean residue weight
// (optional), and the solvent's index (constant, water preset, Sellmeier or
// Cauchy terms, each remembered when switching kinds).

import { $, el, safe } from "./dom.js";
import { state } from "./state.js";
import * as core from "./core.js";
import { shortest } from "./format.js";
import { bindNumber, fieldOf, show, setLocalError } from "./fields.js";
import { renderErrors, showNote } from "./messages.js";
import { edit } from "./edit.js";

/** Slider spans in decades of the stored unit. */
const LOG_SLIDER = { conc: [-6, 0], path: [-2, 1], mass: [1, 6], mrw: [1, 4] };
/** Arrow step: one unit of the second significant digit. */
const relStep = (v) => (v ? 10 ** (Math.floor(Math.log10(Math.abs(v))) - 1) : 0.1);

const sample = () => state.doc.sample;
const mass = () => sample().molar_mass_g_per_mol;

function sliderAfter(input) {
  const s = el("input", { type: "range", className: "slider span-2", tabIndex: -1 });
  s.setAttribute("aria-label", `${input.labels?.[0]?.textContent ?? "value"}, slider`);
  input.parentElement.after(s);
  return s;
}

/** A stored quantity entered in a unit of choice; `to(v, from, into)` converts. */
function unitField(id, key, uiKey, stored, to, decades) {
  const u = () => state.ui[uiKey];
  bindNumber({
    input: $(id),
    slider: sliderAfter($(id)),
    label: "",
    log: true,
    canonical: false,
    unit: u,
    get: () => to(sample()[key], stored, u()),
    set: (v) => (sample()[key] = shortest(to(v, u(), stored), v, (c) => to(c, stored, u()))),
    step: relStep,
    range: () => {
      const f = Math.log10(safe(() => to(1, stored, u())) ?? 1);
      return [Math.floor(decades[0] + f), Math.ceil(decades[1] + f)];
    },
  });
}

const isMassUnit = (key) => core.catalog.concentration.find((c) => c.key === key)?.needs_molar_mass ?? false;

/** The molar mass; a concentration entered per mass stays as entered when it changes. */
function setMass(v) {
  const u = state.ui.concUnit;
  const perMass = isMassUnit(u);
  const shown = perMass ? safe(() => core.convertConcentration(sample().concentration_mol_per_l, "mol/L", u, mass())) : undefined;
  if (v === undefined) delete sample().molar_mass_g_per_mol;
  else sample().molar_mass_g_per_mol = v;
  if (shown !== undefined && v !== undefined) {
    const mol = core.convertConcentration(shown, u, "mol/L", v);
    sample().concentration_mol_per_l = shortest(mol, shown, (c) => core.convertConcentration(c, "mol/L", u, v));
  }
  // Without a molar mass the concentration can only be shown per mole.
  if (perMass && v === undefined) {
    state.ui.concUnit = "mol/L";
    $("conc-unit").value = "mol/L";
  }
  const conc = fieldOf($("conc"));
  if (conc.localError) setLocalError(conc, null);
}

function optionalField(id, key, set, decades) {
  bindNumber({
    input: $(id),
    slider: sliderAfter($(id)),
    label: "",
    log: true,
    optional: true,
    canonical: true,
    unit: () => "g/mol",
    get: () => sample()[key],
    set,
    step: relStep,
    range: () => decades,
  });
}

/** A unit menu whose change converts the shown value in place. */
function unitSelect(select, choices, key, input, slot) {
  select.replaceChildren(...choices.map((c) => el("option", { value: c.key, textContent: c.label })));
  select.value = state.ui[key];
  select.setAttribute("aria-describedby", slot.id);
  select.addEventListener("change", () => {
    const before = state.ui[key];
    const field = fieldOf(input);
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

export function solventKind(s) {
  if (s.constant !== undefined) return "constant";
  if (s.cauchy !== undefined) return "cauchy";
  if (typeof s.sellmeier === "string") return "preset";
  return "sellmeier";
}

export function bindSample() {
  const conc = (v, from, into) => core.convertConcentration(v, from, into, mass());
  unitField("conc", "concentration_mol_per_l", "concUnit", "mol/L", conc, LOG_SLIDER.conc);
  unitField("path", "path_length_cm", "pathUnit", "cm", core.convertPath, LOG_SLIDER.path);
  optionalField("molar-mass", "molar_mass_g_per_mol", setMass, LOG_SLIDER.mass);
  optionalField("mrw", "mean_residue_weight_g_per_mol", (v) => {
    if (v === undefined) delete sample().mean_residue_weight_g_per_mol;
    else sample().mean_residue_weight_g_per_mol = v;
  }, LOG_SLIDER.mrw);
  unitSelect($("conc-unit"), core.catalog.concentration, "concUnit", $("conc"), $("conc-error"));
  unitSelect($("path-unit"), core.catalog.path, "pathUnit", $("path"), $("path-error"));
  $("solvent-kind").addEventListener("change", () => {
    const s = sample().solvent;
    state.solventMemory[solventKind(s)] = structuredClone(s);
    const to = $("solvent-kind").value;
    sample().solvent = state.solventMemory[to] ?? structuredClone(core.catalog.solvent_start[to]);
    renderSolvent();
    edit();
  });
}

/** One number row of the solvent detail, bound to a document path. */
function solventRow(box, label, field, get, set, step, range, unit = "") {
  const id = `solvent-${field.replace(/[^a-z0-9]+/gi, "-")}`;
  const input = el("input", { type: "text", inputMode: "decimal", className: "num", id, autocomplete: "off" });
  input.dataset.field = field;
  input.setAttribute("aria-describedby", "solvent-error");
  const lab = el("label", { htmlFor: id, textContent: label });
  const wrap = el("span", { className: "with-unit" }, input, el("span", { className: "unit", textContent: unit }));
  const slider = el("input", { type: "range", className: "slider", tabIndex: -1 });
  slider.setAttribute("aria-label", `${label}, slider`);
  box.append(el("div", { className: "solvent-row" }, lab, wrap, slider));
  bindNumber({ input, slider, label: "", canonical: true, unit: () => unit, get, set, step: () => step, range: () => range });
}

const hint = (text) => el("p", { className: "hint-text", textContent: text });

function sellmeierRows(box, t) {
  box.append(hint("n² − 1 = Σ Bᵢ λ²/(λ² − Cᵢ), λ in µm"));
  t.b.forEach((_, i) => {
    solventRow(box, `B${i + 1}`, `sample.solvent.sellmeier.b[${i}]`, () => t.b[i], (v) => (t.b[i] = v), 0.01, [0, 2]);
    solventRow(box, `C${i + 1}`, `sample.solvent.sellmeier.c_um2[${i}]`, () => t.c_um2[i], (v) => (t.c_um2[i] = v), 0.001, [0, 20], "µm²");
  });
  const termButton = (text, disabled, change) => {
    const b = el("button", { type: "button", textContent: text, disabled });
    b.addEventListener("click", () => {
      change();
      renderSolvent();
      edit();
    });
    return b;
  };
  const add = termButton("Add term", t.b.length >= core.catalog.max_sellmeier_terms, () => {
    t.b.push(0);
    t.c_um2.push(0.01);
  });
  const remove = termButton("Remove last term", t.b.length <= 1, () => {
    t.b.pop();
    t.c_um2.pop();
  });
  box.append(el("div", { className: "button-row" }, add, remove));
}

export function renderSolvent() {
  const s = state.doc.sample.solvent;
  const kind = solventKind(s);
  $("solvent-kind").value = kind;
  const box = $("solvent-detail");
  box.replaceChildren();
  if (kind === "constant") {
    solventRow(box, "n", "sample.solvent.constant", () => s.constant, (v) => (s.constant = v), 0.001, [1, 2]);
  } else if (kind === "preset") {
    box.append(hint("Sellmeier series for water at 20 °C (Applied Optics 46, 3811 (2007)); fitted for 182–1129 nm."));
  } else if (kind === "cauchy") {
    const c = s.cauchy;
    box.append(hint("n = a + b/λ² + c/λ⁴, λ in µm"));
    solventRow(box, "a", "sample.solvent.cauchy.a", () => c.a, (v) => (c.a = v), 0.001, [1, 2]);
    solventRow(box, "b", "sample.solvent.cauchy.b_um2", () => c.b_um2, (v) => (c.b_um2 = v), 0.0001, [0, 0.02], "µm²");
    solventRow(box, "c", "sample.solvent.cauchy.c_um4", () => c.c_um4, (v) => (c.c_um4 = v), 0.00001, [0, 0.001], "µm⁴");
  } else {
    sellmeierRows(box, s.sellmeier);
  }
}
