// The populations table of the computed states panel: each conformer's
// energy as the list gave it, the share the spectra use (the core's
// Boltzmann shares with those set by hand), a share typed by hand in per
// cent (stored as a fraction), an on/off switch and the number of its
// transitions.

import { $, el } from "./dom.js";
import { state } from "./state.js";
import * as core from "./core.js";
import { bindNumber } from "./fields.js";
import { edit } from "./edit.js";
import { fmtText, shortest } from "./format.js";
import { statesCatalog, statesSection as section } from "./states.js";

/** Shares are stored as fractions and shown in per cent. */
const PERCENT = 100;

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

/** One row per conformer of the section on screen. */
export function populationRows() {
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
function populationsOf(states) {
  const key = JSON.stringify([states.temperature_k, states.conformers.map(({ transitions, ...energyShareOff }) => energyShareOff)]);
  if (populationsCache.key !== key) {
    // The shares do not depend on the transitions: one per conformer keeps the call short.
    const lean = { ...states, conformers: states.conformers.map((c) => ({ ...c, transitions: c.transitions.slice(0, 1) })) };
    populationsCache = { key, reply: core.statesPopulations({ ...core.catalog.empty_document, states: lean }) };
  }
  return populationsCache.reply;
}

/**
 * The shares the spectra use, from the core: those of the last good model,
 * so that while a typed share is refused the table still says what the
 * plots show. The section alone is sent (not the data sets).
 */
export function showPopulations() {
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

/** The switches follow the document. */
export function syncSwitches() {
  section().conformers.forEach((c, i) => {
    const box = $(`states-on-${i}`);
    if (box) box.checked = !c.off;
  });
}

