// Model files and the title: Save model (JSON), Open… (a whole valid model
// or nothing), the demo, a new empty model, and the spectra as CSV on a
// round step of the user's choice.

import { $, el } from "./dom.js";
import { state } from "./state.js";
import * as core from "./core.js";
import { setStatus, sayDone, problemText } from "./messages.js";
import { loadDocument, noted } from "./edit.js";
import { looksLikeModel, openDataFile } from "./data.js";

export function downloadBlob(name, blob) {
  const url = URL.createObjectURL(blob);
  const a = el("a", { href: url, download: name });
  document.body.append(a);
  a.click();
  a.remove();
  setTimeout(() => URL.revokeObjectURL(url), 1000);
}

export const download = (name, text, type) => downloadBlob(name, new Blob([text], { type }));

/** A file name from the model's title. */
export function fileStem() {
  const t = (state.doc.title || "model").toLowerCase().replace(/[^a-z0-9]+/g, "-").replace(/^-|-$/g, "");
  return t.slice(0, 40) || "model";
}

/** Reads a chosen or dropped file: a model loads only when whole and valid; any other file is read as measured data. */
export async function openFile(file) {
  if (!/\.json$/i.test(file.name) && !looksLikeModel(await file.slice(0, 64).text())) return openDataFile(file);
  if (file.size > core.catalog.max_document_bytes) {
    const mib = core.catalog.max_document_bytes / (1024 * 1024);
    return setStatus(`${file.name}: larger than any model file (over ${mib} MiB); nothing was changed.`, true);
  }
  const result = core.readValidDocument(await file.text());
  if (!result.ok) return setStatus(`${file.name}: ${problemText(result.error)}. Your model is unchanged.`, true);
  loadDocument(result.doc);
  sayDone(`Opened ${file.name}`);
}

function saveCsv() {
  fillCsvSteps();
  const step = Number($("csv-step").value);
  const r = core.csv(Number.isFinite(step) && step > 0 ? step : null);
  if (!r.ok) return setStatus(`Cannot export the spectra: ${problemText(r.error)}`, true);
  download(`${fileStem()}.csv`, r.csv, "text/csv");
}

/** The CSV step menu: round steps in the axis unit of the plots. */
export function fillCsvSteps() {
  const axis = state.drawn?.axis_unit ?? "nm";
  const unit = core.catalog.axis.find((u) => u.key === axis);
  const select = $("csv-step");
  const keep = select.dataset.axis === axis ? select.value : null;
  select.replaceChildren(...unit.csv_steps.map((s) => el("option", { value: String(s), textContent: `${s} ${unit.label}` })));
  select.dataset.axis = axis;
  select.value = keep ?? String(unit.csv_step);
}

export function bindFiles() {
  $("save-json").addEventListener("click", () => {
    try {
      download(`${fileStem()}.chiroptic.json`, core.documentJson(state.doc), "application/json");
    } catch (e) {
      setStatus(`Cannot save: ${e.message}`, true);
    }
  });
  $("save-csv").addEventListener("click", saveCsv);
  $("open-file").addEventListener("click", () => $("file-input").click());
  $("file-input").addEventListener("change", async () => {
    const file = $("file-input").files[0];
    $("file-input").value = "";
    if (file) await openFile(file);
  });
  $("open-demo").addEventListener("click", () => {
    if (!window.confirm("Replace the current model with the invented demo?")) return;
    const r = core.demoDocument();
    if (r.ok) loadDocument(r.doc);
  });
  $("new-model").addEventListener("click", () => {
    if (!window.confirm("Start a new, empty model? (Undo brings this one back.)")) return;
    loadDocument(structuredClone(core.catalog.empty_document));
    sayDone("A new, empty model: add a band to see a spectrum");
  });
  $("doc-title").addEventListener("input", () => {
    state.doc.title = $("doc-title").value;
    noted({ merge: $("doc-title") });
  });
}
