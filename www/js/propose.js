// Starting bands from a measured CD set: the core proposes one band per lobe
// (centre at its extremum, width at half height, R from the integral of
// Δε/ν), and the page puts them in place of the bands or after them as one
// undo step, saying what was proposed and that it is a start for a fit.
// The number of bands asked for is page state, not part of the model.

import { $, el } from "./dom.js";
import { state } from "./state.js";
import * as core from "./core.js";
import { bindNumber } from "./fields.js";
import { edit, flushEdits } from "./edit.js";
import { problemText, setStatus } from "./messages.js";
import { fmtText } from "./format.js";
import { renderBands } from "./bands.js";
import { fitCatalog, forgetInFitSettings } from "./fitmodes.js";

/** At most this many bands are proposed (the catalog's default until typed). */
let maxBands = null;

const QUANTITY_WORDS = { cd: "CD", ord: "ORD", absorption: "absorption" };

/** The bands a message was said about: it goes when they change (an edit, a fit, an undo). */
let saidAbout = null;

function say(text, problem = false) {
  $("propose-note").textContent = text;
  $("propose-note").classList.toggle("warn-text", problem);
  saidAbout = JSON.stringify(state.doc.bands);
}

/** The data sets to choose from, the chosen one kept by name; the first CD set chosen otherwise. */
function renderSets() {
  const select = $("propose-set");
  const sets = state.doc?.data ?? [];
  const chosen = sets.findIndex((d) => d.name === select.dataset.name);
  const options = sets.map((d, k) => el("option", { value: String(k), textContent: `${d.name} (${QUANTITY_WORDS[d.quantity] ?? d.quantity})` }));
  if (!options.length) options.push(el("option", { value: "", textContent: "no data set loaded" }));
  select.replaceChildren(...options);
  const k = chosen >= 0 ? chosen : Math.max(0, sets.findIndex((d) => d.quantity === "cd"));
  select.value = sets.length ? String(k) : "";
  select.dataset.name = sets[k]?.name ?? "";
}

/** "B1 at 305 nm (R +12.3)", for the message. */
const described = (b) => `${b.name} at ${fmtText(b.center_nm, 4)} nm (R ${b.rotatory_strength_1e40_cgs > 0 ? "+" : ""}${fmtText(b.rotatory_strength_1e40_cgs, 3)})`;

function propose() {
  // A value typed just before the click counts.
  flushEdits();
  const sets = state.doc.data ?? [];
  if (!sets.length) return say("No data set is loaded: drop a measured CD file on the plots (or Add data…) to propose bands from its lobes. The bands are unchanged.", true);
  const add = $("propose-how").value === "add";
  const r = core.proposeBands(state.doc, Number($("propose-set").value), maxBands, add);
  // A fault in the model names its band; the set's own faults are said as the core says them.
  const why = (e) => (/^bands\[/.test(e.field) ? problemText(e) : e.message.replace(/\.$/, ""));
  if (!r.ok) return say(`Cannot propose bands: ${why(r.error)}. The bands are unchanged.`, true);
  const replaced = add ? [] : state.doc.bands.map((b) => b.name).filter(Boolean);
  // Per-band fit settings name bands: those of replaced bands must not pass to new bands of the same name.
  forgetInFitSettings(replaced);
  state.doc.bands = r.bands;
  renderBands();
  edit();
  const fresh = r.bands.slice(r.bands.length - r.proposed);
  const where = add ? "added after the bands" : "in place of the bands";
  say(
    `Proposed ${r.proposed} band${r.proposed === 1 ? "" : "s"} from “${r.set}”, one per lobe of its CD, ${where}: ${fresh.map(described).join("; ")}. ` +
      "They are a start for a fit, not a result: press Fit to refine them. Undo takes them back in one step.",
  );
  setStatus(`Proposed ${r.proposed} starting band${r.proposed === 1 ? "" : "s"} from “${r.set}”`);
}

export function bindPropose() {
  maxBands = fitCatalog.propose_default_bands;
  bindNumber({
    input: $("propose-max"),
    slider: null,
    label: "",
    canonical: true,
    integer: true,
    deferred: true,
    unit: () => "",
    get: () => maxBands,
    set: (v) => {
      if (!(v >= 1 && v <= core.catalog.max_bands)) throw new Error(`the number of bands must be a whole number from 1 to ${core.catalog.max_bands}`);
      maxBands = v;
    },
    // Page state: no undo step, no redraw.
    changed: () => {},
    step: () => 1,
    range: () => [1, core.catalog.max_bands],
  });
  $("propose-set").addEventListener("change", (e) => (e.target.dataset.name = state.doc.data?.[Number(e.target.value)]?.name ?? ""));
  $("propose-run").addEventListener("click", propose);
  // A data set added, renamed or removed changes the choice.
  let key = "";
  document.addEventListener("chiroptic:updated", () => {
    const now = JSON.stringify((state.doc.data ?? []).map((d) => [d.name, d.quantity]));
    if (now !== key) {
      key = now;
      renderSets();
    }
    if (saidAbout !== null && saidAbout !== JSON.stringify(state.doc.bands)) {
      saidAbout = null;
      $("propose-note").textContent = "";
    }
  });
}
