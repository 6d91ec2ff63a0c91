// Measured readings at the lamp lines: the rotation a person read on a
// polarimeter, typed per line with the conditions it was read at, shown
// beside the model's value and beside what a measured CD set predicts by
// Kramers-Kronig. Readings live in `doc.readings`; conversions to the
// sample's conditions come from the core.

import { $, el } from "./dom.js";
import { state } from "./state.js";
import * as core from "./core.js";
import { edit } from "./edit.js";
import { fmtText, fmtInput, parseNumber } from "./format.js";

const readings = () => state.doc?.readings ?? [];
const near = (a, b) => Math.abs(a - b) < 1e-6;

/** The conditions typed for the readings (empty: the sample's). */
function typedConditions() {
  const out = {};
  for (const [id, key] of [["readings-conc", "concentration_mol_per_l"], ["readings-path", "path_length_cm"]]) {
    const n = parseNumber($(id).value);
    if (n.value !== undefined) out[key] = n.value;
  }
  return Object.keys(out).length ? out : undefined;
}

function setReading(nm, v) {
  const rest = readings().filter((r) => !near(r.wavelength_nm, nm));
  if (v !== null) {
    const reading = { wavelength_nm: nm, rotation_deg: v };
    const c = typedConditions();
    if (c) reading.conditions = c;
    rest.push(reading);
    rest.sort((a, b) => b.wavelength_nm - a.wavelength_nm);
  }
  if (rest.length) state.doc.readings = rest;
  else delete state.doc.readings;
  edit();
}

/** The table: line, the model's φ, the typed reading, it at the sample's conditions, CD's prediction. */
export function renderReadings(dataInfo) {
  const lines = state.drawn?.lines ?? [];
  const rows = state.valid ? core.readingRows(state.doc) : null;
  const at = rows?.ok ? rows.readings : [];
  const cd = dataInfo.findIndex((s, i) => s.quantity === "cd" && !s.derived && !state.doc.data?.[i]?.hidden);
  const predicted = cd >= 0 && state.valid ? core.kkLines(state.doc, cd) : null;
  $("readings-cd-head").textContent = cd >= 0 ? `from CD “${dataInfo[cd].name}”` : "from CD data";
  const focus = document.activeElement?.id;
  const body = lines.map((l, k) => {
    const typed = readings().find((r) => near(r.wavelength_nm, l.wavelength_nm));
    const id = `reading-${k}`;
    const input = el("input", { id, type: "text", className: "num short", inputMode: "decimal", autocomplete: "off", value: typed ? fmtInput(typed.rotation_deg, 12) : "" });
    input.ariaLabel = `Measured rotation at ${l.name}, degrees`;
    input.dataset.field = `readings`;
    input.setAttribute("aria-describedby", "readings-error");
    input.addEventListener("change", () => {
      const n = parseNumber(input.value);
      if (n.error) return ($("readings-error").textContent = `${l.name}: ${n.error}`);
      setReading(l.wavelength_nm, n.empty ? null : n.value);
    });
    const atSample = at.find((r) => near(r.wavelength_nm, l.wavelength_nm));
    const kk = predicted?.ok ? predicted.lines.find((p) => near(p.wavelength_nm, l.wavelength_nm)) : null;
    const cell = (key, v) => {
      const td = el("td", { textContent: v === undefined ? "" : fmtText(v) });
      td.dataset.key = key;
      if (v !== undefined) td.dataset.value = String(v);
      return td;
    };
    return el("tr", {}, el("th", { scope: "row", textContent: l.name }), cell("model_deg", l.rotation_deg), el("td", {}, input), cell("reading_at_sample_deg", atSample?.at_sample_deg), cell("kk_deg", kk?.rotation_deg));
  });
  $("readings-rows").replaceChildren(...body);
  if (focus && $(focus)) $(focus).focus();
  $("readings-kk-note").textContent = predicted && !predicted.ok ? `From CD: ${predicted.error.message}` : "";
}

export function bindReadings() {
  for (const id of ["readings-conc", "readings-path"]) {
    $(id).addEventListener("change", () => {
      if (!readings().length) return;
      const c = typedConditions();
      state.doc.readings = readings().map((r) => {
        const next = { ...r };
        if (c) next.conditions = c;
        else delete next.conditions;
        return next;
      });
      edit();
    });
  }
}
