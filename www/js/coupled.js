// The panel of chromophores in space (coupled systems, DeVoe's polarisability
// model in the core): which system is shown, its switches (screened by the
// solvent, coupling off), a pair's distance and twist (sliders that rebuild
// the pair through the core's couplet helper), making a couplet and adding
// chromophores. The table is chromophores.js, the 3-D view view3d.js; every
// geometry (angles, vectors, a pair's twist) comes from the core.

import { $, el } from "./dom.js";
import { state } from "./state.js";
import * as core from "./core.js";
import { bindNumber, dropFieldsIn } from "./fields.js";
import { edit } from "./edit.js";
import { oneStepPerDrag } from "./history.js";
import { setStatus, problemText } from "./messages.js";
import { numberCell } from "./bands.js";
import { renderChromophores, showVectors } from "./chromophores.js";
import { bindView3d, drawView3dSoon } from "./view3d.js";

/** The panel's defaults and caps, from the core. */
export const coupledCatalog = core.catalogOnce(core.coupledCatalog, "coupled");

export const shownSystem = () => state.doc?.systems?.[state.coupled.shown] ?? null;

/** The shown system alone in an empty model: what the core reads for it (no bands or data). */
const alone = (system) => ({ ...core.catalog.empty_document, systems: [system] });

let cache = { key: null, value: null };
/** The core's geometry of the shown system (directions, a pair's distance and twist), kept until it changes. */
export function geometry() {
  const system = shownSystem();
  if (!system) return null;
  const key = JSON.stringify(system);
  if (cache.key !== key) {
    const r = core.systemGeometry(alone(system), 0);
    cache = { key, value: r.ok ? r : null };
  }
  return cache.value;
}

const pair = () => geometry()?.pair ?? null;

/** Puts the shown pair where the core's couplet helper puts a pair at distance d and twist t (names, transitions and switches stay). */
function rebuildPair(d, t) {
  const r = core.coupletSystem(d, t, coupledCatalog().new_transition);
  if (!r.ok) throw new Error(r.error.message);
  // In place: the table's fields hold these objects.
  shownSystem().chromophores.forEach((c, j) => {
    c.position_angstrom.splice(0, 3, ...r.system.chromophores[j].position_angstrom);
    c.direction = r.system.chromophores[j].direction;
  });
}

function pairField(id, label, unit, spec) {
  const c = numberCell(id, label, "system-error");
  bindNumber({ ...c, label, canonical: false, unit: () => unit, ...spec });
  oneStepPerDrag(c.slider, c.input);
  return [el("label", { htmlFor: id, textContent: label }), el("span", { className: "with-unit" }, c.cell, el("span", { className: "unit", textContent: unit }))];
}

function pairControls() {
  const k = coupledCatalog();
  return [
    ...pairField("couplet-distance", "Distance d", "Å", {
      get: () => pair()?.distance_angstrom,
      set: (v) => rebuildPair(v, pair()?.twist_deg ?? coupledCatalog().couplet.twist_deg),
      step: () => 0.5,
      range: () => k.distance_slider_angstrom,
      sliderStep: 0.1,
    }),
    ...pairField("couplet-twist", "Twist θ", "°", {
      get: () => pair()?.twist_deg,
      set: (v) => rebuildPair(pair()?.distance_angstrom ?? k.couplet.distance_angstrom, v),
      step: () => 5,
      range: () => k.twist_slider_deg,
      sliderStep: 1,
    }),
  ];
}

function checkbox(id, text, title, on, set) {
  const box = el("input", { type: "checkbox", id, checked: on, title });
  box.addEventListener("change", () => {
    set(box.checked);
    edit();
  });
  return el("span", { className: "check-row" }, box, el("label", { htmlFor: id, textContent: text, title }));
}

/** Sets or drops a flag (the core writes a false flag as no flag at all). */
const flag = (system, key, on) => (on ? (system[key] = true) : delete system[key]);

function systemControls() {
  const systems = state.doc.systems;
  const s = state.coupled.shown;
  const system = systems[s];
  const out = [];
  if (systems.length > 1) {
    const pick = el("select", { id: "coupled-shown" });
    systems.forEach((x, i) => pick.append(el("option", { value: String(i), textContent: `${i + 1}: ${x.name || `system ${i + 1}`}` })));
    pick.value = String(s);
    // Page state: which system the panel shows is not part of the document.
    pick.addEventListener("change", () => {
      state.coupled.shown = Number(pick.value);
      renderCoupled();
    });
    out.push(el("label", { htmlFor: "coupled-shown", textContent: "Shown" }), pick);
  }
  const name = el("input", { type: "text", id: "system-name", value: system.name ?? "", maxLength: 80, spellcheck: false, autocomplete: "off" });
  name.dataset.field = `systems[${s}].name`;
  name.setAttribute("aria-describedby", "system-error");
  name.addEventListener("input", () => {
    system.name = name.value;
    edit({ merge: name });
  });
  out.push(el("label", { htmlFor: "system-name", textContent: "System" }), name);
  const n = system.chromophores.length;
  if (n === 2) out.push(...pairControls());
  else out.push(el("p", { className: "hint-text span-2", textContent: `Distance and twist sliders: for a system of two chromophores (this one has ${n}).` }));
  out.push(
    el(
      "div",
      { className: "span-2 coupled-switches" },
      checkbox("system-screened", "Screened by the solvent", "Divide the dipole–dipole coupling by the solvent’s n²", Boolean(system.screened), (on) => flag(system, "screened", on)),
      checkbox("system-uncoupled", "Coupling off", "The transitions act as plain bands, without the dipole–dipole coupling", Boolean(system.uncoupled), (on) => flag(system, "uncoupled", on)),
    ),
  );
  const remove = el("button", { type: "button", id: "remove-system", textContent: "Remove system" });
  remove.addEventListener("click", removeSystem);
  out.push(el("div", { className: "span-2 button-row" }, remove));
  // The core names the system itself for faults of the whole (too many transitions).
  const slot = el("span", { className: "field-error span-2", id: "system-error", role: "status" });
  const holder = el("div", { className: "form-grid system-grid" }, ...out, slot);
  holder.dataset.field = `systems[${s}]`;
  holder.setAttribute("aria-describedby", "system-error");
  return holder;
}

/** The transitions a couplet can be made of: a new one, or any band's (without its rotatory strength). */
function fillCoupletFrom() {
  const select = $("couplet-from");
  if (document.activeElement === select) return;
  const keep = select.value;
  const options = [el("option", { value: "new", textContent: "a new transition" })];
  state.doc.bands.forEach((b, i) => options.push(el("option", { value: String(i), textContent: `band ${i + 1} (${core.bandName(b, i)})` })));
  select.replaceChildren(...options);
  select.value = options.some((o) => o.value === keep) ? keep : "new";
}

function transitionFrom(choice) {
  const band = state.doc.bands[Number(choice)];
  if (choice === "new" || !band) {
    const [lo, hi] = state.drawn?.range_nm ?? core.catalog.new_band_window_nm;
    return { ...structuredClone(coupledCatalog().new_transition), center_nm: Math.round((lo + hi) / 2) };
  }
  const { shape, center_nm, fwhm_cm1, lorentz_fwhm_cm1, dipole_strength_debye2 } = band;
  return { shape, center_nm, fwhm_cm1, ...(lorentz_fwhm_cm1 !== undefined ? { lorentz_fwhm_cm1 } : {}), dipole_strength_debye2 };
}

/** A name not yet taken: `base`, else `base 2`, `base 3` ... */
function freeName(base, taken) {
  if (!taken.has(base)) return base;
  let k = 2;
  while (taken.has(`${base} ${k}`)) k++;
  return `${base} ${k}`;
}

function makeCouplet() {
  const k = coupledCatalog();
  const r = core.coupletSystem(k.couplet.distance_angstrom, k.couplet.twist_deg, transitionFrom($("couplet-from").value));
  if (!r.ok) return setStatus(`Cannot make a couplet: ${problemText(r.error)}`, true);
  state.doc.systems ??= [];
  r.system.name = freeName(r.system.name, new Set(state.doc.systems.map((x) => x.name)));
  state.doc.systems.push(r.system);
  state.coupled.shown = state.doc.systems.length - 1;
  renderCoupled();
  edit();
  $("couplet-twist")?.focus();
}

function addChromophore() {
  const k = coupledCatalog();
  state.doc.systems ??= [];
  if (!shownSystem()) {
    state.doc.systems.push({ name: freeName("system", new Set(state.doc.systems.map((x) => x.name))), chromophores: [] });
    state.coupled.shown = state.doc.systems.length - 1;
  }
  const list = shownSystem().chromophores;
  const last = list.at(-1);
  const c = structuredClone(last ?? k.new_chromophore);
  if (!last) c.transitions = [transitionFrom("new")];
  // Beyond the last along z, so that no two start too close.
  if (last) c.position_angstrom[2] = Math.max(...list.map((x) => x.position_angstrom[2])) + k.new_chromophore_step_angstrom;
  c.name = freeName(`${k.chromophore_name_prefix}${list.length + 1}`, new Set(list.map((x) => x.name)));
  list.push(c);
  renderCoupled();
  edit();
  $("chromophore-rows").querySelector(`tr[data-index="${list.length - 1}"] input.name`)?.focus();
}

function removeSystem() {
  state.doc.systems.splice(state.coupled.shown, 1);
  if (state.doc.systems.length === 0) delete state.doc.systems;
  renderCoupled();
  edit();
  $("make-couplet").focus();
}

/** Rebuilds the panel for the document on screen (a new document, a system added or removed). */
export function renderCoupled() {
  dropFieldsIn("#coupled");
  const systems = state.doc.systems ?? [];
  const k = coupledCatalog();
  state.coupled.shown = Math.max(0, Math.min(state.coupled.shown, systems.length - 1));
  $("coupled-empty").hidden = systems.length > 0;
  $("coupled-body").hidden = systems.length === 0;
  $("make-couplet").disabled = systems.length >= k.max_systems;
  const system = shownSystem();
  $("add-chromophore").disabled = system ? system.chromophores.length >= k.max_chromophores : systems.length >= k.max_systems;
  fillCoupletFrom();
  $("coupled-system").replaceChildren(...(system ? [systemControls()] : []));
  renderChromophores();
  drawView3dSoon();
}

export function bindCoupled() {
  $("make-couplet").addEventListener("click", makeCouplet);
  $("add-chromophore").addEventListener("click", addChromophore);
  bindView3d();
  // After every redraw: the vector forms, the view and the band choices follow the document.
  document.addEventListener("chiroptic:updated", () => {
    showVectors();
    fillCoupletFrom();
    drawView3dSoon();
  });
}
