// Messages in words next to what caused them: a field's own complaint
// ("is not a number"), the core's refusal of the document (named field),
// passing notes about a refused choice, the status line beside the plots and
// the notice banner. Whether the plots are stale is decided here, once, and
// kept in `state.stale`.

import { $ } from "./dom.js";
import { state } from "./state.js";
import { allFields } from "./fields.js";
import * as core from "./core.js";

/** The error slot of a control: the element its aria-describedby names. */
function slotOf(control) {
  const ids = (control.getAttribute("aria-describedby") ?? "").split(/\s+/);
  for (const id of ids) {
    const node = id && $(id);
    if (node && node.classList.contains("field-error")) return node;
  }
  return null;
}

/** Notes: messages about a refused choice, not about a value; shown for a while. */
const notes = new Map();
export function showNote(slot, text) {
  notes.set(slot, text);
  renderErrors();
  setTimeout(() => {
    if (notes.get(slot) === text) {
      notes.delete(slot);
      renderErrors();
    }
  }, 5000);
}

/** Finds the control for a document path, walking up to its parents. */
function controlFor(path) {
  const alias = { "view.range": "view.range_nm", range: "view.range_nm", grid: "view.range_nm", points: "view.points" };
  let f = alias[path] ?? path;
  while (f) {
    const node = document.querySelector(`[data-field="${CSS.escape(f)}"]`);
    if (node) return node;
    const cut = Math.max(f.lastIndexOf("."), f.lastIndexOf("["));
    f = cut > 0 ? f.slice(0, cut) : "";
  }
  return null;
}

/** A true minus sign for negative numbers (not for hyphens in names such as water-20c). */
const trueMinus = (text) => text.replace(/(^|[\s(])-(\d)/g, "$1−$2");

/** The core's sentence, said about the control the person used. */
function humanMessage(err, control) {
  let text = err.message;
  const field = control && allFields().find((f) => f.input === control);
  if (field && !field.canonical && /\(got [^)]*\)/.test(text)) {
    text = text.replace(/\(got [^)]*\)/, `(entered: ${control.value} ${field.unit()})`);
  }
  text = trueMinus(text);
  const band = /^bands\[(\d+)\]/.exec(err.field ?? "");
  if (band) {
    const i = Number(band[1]);
    const name = core.bandName(state.doc.bands[i], i);
    text = `band ${i + 1} (${name}): ${text}`;
  }
  const where = systemPlace(err.field);
  if (where) text = `${where}: ${text}`;
  return text.charAt(0).toUpperCase() + text.slice(1);
}

/** "system 1 (couplet), chromophore 2 (front)" for a field of a coupled system, else "". */
function systemPlace(field) {
  const m = /^systems\[(\d+)\](?:\.chromophores\[(\d+)\])?/.exec(field ?? "");
  if (!m) return "";
  const s = Number(m[1]);
  const system = state.doc.systems?.[s];
  let text = `system ${s + 1}${system?.name ? ` (${system.name})` : ""}`;
  if (m[2] !== undefined) {
    const j = Number(m[2]);
    const name = system?.chromophores?.[j]?.name;
    text += `, chromophore ${j + 1}${name ? ` (${name})` : ""}`;
  }
  return text;
}

/** A core error about a document, said in one line ("band 2 (fwhm_cm1): …"). */
export function problemText(err) {
  let where = "";
  const band = /^bands\[(\d+)\]\.?(.*)$/.exec(err.field ?? "");
  if (band) where = `band ${Number(band[1]) + 1}${band[2] ? ` (${band[2]})` : ""}: `;
  else if (err.field && err.field !== "link") where = `${err.field}: `;
  return trueMinus(`${where}${err.message}`.replace(/\.$/, ""));
}

/** Puts every current message in its slot and marks the plots (and lamp lines) stale. */
export function renderErrors() {
  document.querySelectorAll("[aria-invalid=true]").forEach((node) => node.removeAttribute("aria-invalid"));
  document.querySelectorAll(".field-error").forEach((node) => (node.textContent = ""));
  document.querySelectorAll(".row-error").forEach((node) => (node.hidden = true));
  const put = (control, text) => {
    if (!control) return;
    control.setAttribute("aria-invalid", "true");
    const slot = slotOf(control);
    if (!slot) return;
    slot.textContent = slot.textContent ? `${slot.textContent} ${text}` : text;
    const row = slot.closest(".row-error");
    if (row) row.hidden = false;
  };
  for (const [slot, text] of notes) slot.textContent = text;
  let first = "";
  for (const f of allFields()) {
    if (f.localError && f.input.isConnected) {
      const text = f.label ? `${f.label}: ${f.localError}` : f.localError;
      put(f.input, text);
      // A page-state field (the analyser angle) leaves the plots as they are.
      if (!f.changed) first ||= text;
    }
  }
  if (state.coreError) {
    const control = controlFor(state.coreError.field ?? "");
    const text = humanMessage(state.coreError, control);
    put(control, text);
    first ||= text;
  }
  state.stale = Boolean(first);
  $("plot-grid").classList.toggle("stale", state.stale);
  // The lamp lines are computed from the same model as the plots.
  $("lamp-lines").classList.toggle("stale", state.stale);
  $("lines-table").setAttribute("aria-describedby", state.stale ? "lines-stale" : "lines-note");
  $("lines-stale").hidden = !state.stale;
  // Said again beside the plots, since the field may be out of view.
  if (first) setStatus(`${first.replace(/\.$/, "")}. The plots show the last valid model.`, true);
}

export function setStatus(text, warn = false) {
  const box = $("status");
  box.textContent = text;
  box.title = text;
  box.classList.toggle("warn", warn);
}

/** A status line that does not hide a stale-plot warning. */
export function sayDone(text) {
  if (!state.stale) setStatus(text);
}

let noticePassing = false;

/**
 * The banner above the page. A `passing` notice (a refused link) goes away at
 * the next edit; the others stay until dismissed.
 */
export function showNotice(text, { passing = false } = {}) {
  $("notice-text").textContent = text ?? "";
  $("notice").hidden = !text;
  noticePassing = Boolean(text) && passing;
}

/** Called by every edit: a passing notice has been read by now. */
export function editMade() {
  if (noticePassing) showNotice(null);
}
