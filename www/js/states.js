// The panel of computed excited states (the document's `states` section):
// a transition list loaded from a file, dropped on the panel or pasted
// becomes the section as one undo step, and Remove states takes it out;
// the panel is rebuilt for each new section. Its parts: the broadening
// controls (statesbroadening.js), the populations table
// (statespopulations.js), the comparison with a measured CD
// (statescompare.js). Reading the list, the Boltzmann shares and the
// broadening all happen in the core.

import { $, el } from "./dom.js";
import { state } from "./state.js";
import * as core from "./core.js";
import { dropFieldsIn } from "./fields.js";
import { edit } from "./edit.js";
import { sayDone } from "./messages.js";
import { viewOf } from "./window.js";
import { broadeningControls, syncBroadening } from "./statesbroadening.js";
import { populationRows, showPopulations, syncSwitches } from "./statespopulations.js";
import { bindStatesCompare, renderStatesCompare } from "./statescompare.js";

/** The panel's defaults (shapes, widths, temperature, energy fields), from the core. */
export const statesCatalog = core.catalogOnce(core.statesCatalog, "states");

/** The document's computed states, or null. */
export const statesSection = () => state.doc?.states ?? null;
const section = statesSection;

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
  const frame = core.frameBands(state.doc);
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

// ---------------------------------------------------------------- the panel

/**
 * What the panel was built for: the section object (a new document, an undo
 * or a new list brings another) and its shape (Voigt has one more field).
 */
let builtFor = { section: undefined, shape: undefined };
const outOfDate = () => builtFor.section !== section() || builtFor.shape !== section()?.broadening.shape;

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
    if (!section()) return;
    syncBroadening();
    syncSwitches();
    showPopulations();
  });
}
