// The comparison of the computed states' CD with a measured CD set, on
// demand (a button, not every edit): the core scores the computed
// configuration and its mirror image, each at its own best shift (and width
// factor), and words the verdict. The settings here (set, range, label) are
// page state held by the controls; the result is shown until the model or
// the data change, then marked as of an earlier model.

import { $, el } from "./dom.js";
import { state } from "./state.js";
import * as core from "./core.js";
import { flushEdits } from "./edit.js";
import { parseNumber, fmtText } from "./format.js";

/** The CD sets of the document, with their index in doc.data. */
const cdSets = () => (state.doc?.data ?? []).map((d, i) => ({ d, i })).filter(({ d }) => d.quantity === "cd");

/** The model and data the shown result was computed for (JSON), or null. */
let comparedFor = null;
/** Long point arrays stand for themselves by their length (a new set or a trim changes it; their values are never edited in place). */
const short = (key, v) => (Array.isArray(v) && v.length > 16 && typeof v[0] === "number" ? v.length : v);
const currentInputs = () => {
  const d = state.doc;
  return JSON.stringify([d?.states, d?.bands, d?.systems, d?.sample, d?.data], short);
};

function fillSets() {
  const select = $("states-compare-set");
  const keep = select.value;
  const sets = cdSets();
  select.replaceChildren(...sets.map(({ d, i }) => el("option", { value: String(i), textContent: d.name })));
  if (sets.some(({ i }) => String(i) === keep)) select.value = keep;
  const none = sets.length === 0;
  $("states-compare-controls").hidden = none;
  $("states-compare-run").disabled = none || !state.doc?.states;
  $("states-compare-none").hidden = !none;
}

/** An optional wavelength end: a number, undefined when empty, or the text of what is wrong. */
function end(id) {
  const p = parseNumber($(id).value);
  if (p.empty) return { value: undefined };
  if (p.error) return { error: p.error };
  if (!(p.value > 0)) return { error: "a wavelength is positive" };
  return { value: p.value };
}

function say(text) {
  $("states-compare-error").textContent = text ?? "";
}

function runCompare() {
  flushEdits();
  say(null);
  const from = end("states-compare-from");
  const to = end("states-compare-to");
  if (from.error) return say(`From: ${from.error}`);
  if (to.error) return say(`To: ${to.error}`);
  const i = Number($("states-compare-set").value);
  const t0 = performance.now();
  const r = core.statesCompare(state.doc, i, from.value, to.value, $("states-compare-width").checked, $("states-compare-label").value.trim());
  const ms = performance.now() - t0;
  if (!r.ok) {
    comparedFor = null;
    $("states-compare-result").hidden = true;
    return say(r.error.message);
  }
  comparedFor = currentInputs();
  showResult(r, ms);
}

function showResult(r, ms) {
  const widths = $("states-compare-width").checked;
  const row = (key, m) => {
    const tr = el(
      "tr",
      { id: `states-compare-${key}` },
      el("th", { scope: "row", textContent: key === "computed" ? "computed configuration" : "mirror image" }),
      el("td", { className: "score", textContent: m.score.toFixed(3) }),
      el("td", { className: "shift", textContent: `${m.shift_ev >= 0 ? "+" : "−"}${Math.abs(m.shift_ev).toFixed(3)}` }),
      el("td", { className: "width", textContent: widths ? `×${fmtText(m.width_factor, 3)}` : "—" }),
    );
    Object.assign(tr.dataset, { score: String(m.score), shift: String(m.shift_ev), width: String(m.width_factor) });
    return tr;
  };
  $("states-compare-rows").replaceChildren(row("computed", r.computed), row("mirror", r.mirror));
  const better = r.computed.score >= r.mirror.score ? "computed" : "mirror";
  $(`states-compare-${better}`).classList.add("best");
  const [lo, hi] = r.range_ev;
  $("states-compare-verdict").textContent = r.verdict.charAt(0).toUpperCase() + r.verdict.slice(1) + ".";
  $("states-compare-facts").textContent = `Over ${fmtText(lo)}–${fmtText(hi)} eV; without a shift S = ${r.unshifted.toFixed(3)}. Compared in ${ms.toFixed(1)} ms.`;
  $("states-compare-facts").dataset.ms = String(ms);
  $("states-compare-result").hidden = false;
  markStale();
}

/** A result of an earlier model or other data is kept, but said to be so. */
function markStale() {
  const old = comparedFor !== null && comparedFor !== currentInputs();
  $("states-compare-result").classList.toggle("stale", old);
  $("states-compare-stale").hidden = !old;
}

export function renderStatesCompare() {
  fillSets();
  if (!state.doc?.states) {
    comparedFor = null;
    $("states-compare-result").hidden = true;
  }
  markStale();
}

export function bindStatesCompare() {
  $("states-compare-run").addEventListener("click", runCompare);
  document.addEventListener("chiroptic:updated", () => {
    fillSets();
    markStale();
  });
}
