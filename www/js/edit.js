// The update loop. `refresh()` hands the document to the core and shows what
// comes back; `edit()` is what every change to the document calls: refresh,
// then one explicit history step and a persisted address/autosave.
// `loadDocument()` puts a whole new document on the page.

import { $ } from "./dom.js";
import { state } from "./state.js";
import * as core from "./core.js";
import { showAll, dropFieldsIn, clearLocalErrors } from "./fields.js";
import { renderErrors, sayDone, editMade } from "./messages.js";
import { record } from "./history.js";
import { persistSoon } from "./persist.js";
import { showResult, cssFrame, sizeCanvases, layoutPlots, drawCrosshair } from "./plots.js";
import { renderBands } from "./bands.js";
import { renderSolvent } from "./sample.js";
import { renderCoupled } from "./coupled.js";
import { renderFit, stopFitForEdit } from "./fit.js";

/** Hands the document to the core; redraws on success, marks the field at fault otherwise. */
export function refresh() {
  if (!core.catalog) return false;
  const t0 = performance.now();
  const result = core.update(state.doc, state.options);
  const ms = performance.now() - t0;
  // A stopped core validates nothing: later edits are kept on screen but never become the "good" model.
  if (result.error?.kind === "stopped") {
    state.valid = false;
    return false;
  }
  state.valid = result.ok;
  if (result.ok) {
    state.coreError = null;
    result.frames = result.frames.map(cssFrame);
    state.drawn = result;
    state.goodDoc = structuredClone(state.doc);
    showResult(result);
    renderErrors();
    sayDone(`Redrawn in ${ms.toFixed(1)} ms · ${result.points} points`);
  } else {
    state.coreError = result.error;
    renderErrors();
  }
  showAll();
  document.dispatchEvent(new CustomEvent("chiroptic:updated", { detail: { ok: result.ok, ms } }));
  return result.ok;
}

/**
 * Draws a document that is not the user's (a running fit's values): the
 * plots and lamp lines follow, while `state.doc`, the last good model and
 * the history stay as they are. `refresh()` puts the user's model back.
 */
export function preview(doc) {
  const result = core.update(doc, state.options);
  if (result.ok) {
    result.frames = result.frames.map(cssFrame);
    state.drawn = result;
    showResult(result);
  }
  return result.ok;
}

/** Redraws the last good model with new page options (theme, highlight, size). */
export function redraw() {
  if (!state.drawn) return refresh();
  const result = core.redraw(state.options);
  if (result.ok) {
    state.drawn = { ...state.drawn, frames: result.frames.map(cssFrame) };
    drawCrosshair();
  }
  return result.ok;
}

/**
 * Records a change already made to `state.doc` without redrawing (the
 * title): one history step (merged with the last when `merge` names the
 * same control, typed in within a moment), then the address and autosave.
 */
export function noted({ merge = null } = {}) {
  if (state.wiki) return;
  editMade();
  if (state.valid) state.goodDoc = structuredClone(state.doc);
  record(merge);
  persistSoon();
}

/** Every edit of the document calls this once the document holds the change. */
export function edit({ merge = null } = {}) {
  flushEdits();
  stopFitForEdit();
  editMade();
  // An axis held by a peak drag is let go at the next edit.
  state.options.hold_cd_range = null;
  refresh();
  noted({ merge });
}

/** A typed or slid change waiting for the next frame: { merge } or null. */
let waiting = null;

/**
 * The edit of a keystroke or a slider step: applied once, in the next
 * animation frame, however many arrive before it, so the input handler
 * returns at once and the change is on screen in the frame after the input.
 * Changes of different controls within one frame make one undo step.
 */
export function editSoon({ merge = null } = {}) {
  if (waiting) {
    if (waiting.merge !== merge) waiting.merge = null;
    return;
  }
  waiting = { merge };
  requestAnimationFrame(flushEdits);
  // A hidden page gets no frames: apply the change anyway.
  setTimeout(flushEdits, 200);
}

/** Applies a waiting typed change now (before anything that reads the model). */
export function flushEdits() {
  if (!waiting) return;
  const { merge } = waiting;
  waiting = null;
  edit({ merge });
}

/** Puts a whole new document on the page; `record` makes it one undo step. */
export function loadDocument(doc, { record: asStep = true } = {}) {
  waiting = null;
  stopFitForEdit();
  state.doc = doc;
  state.cursorX = null;
  state.options.hold_cd_range = null;
  state.coreError = null;
  dropFieldsIn("#band-rows, #solvent-detail, #coupled");
  clearLocalErrors();
  $("doc-title").value = doc.title ?? "";
  layoutPlots(doc.view?.plots ?? core.catalog.plots.map((p) => p.key));
  renderBands();
  renderSolvent();
  renderCoupled();
  renderFit();
  sizeCanvases();
  refresh();
  if (asStep) noted();
  else persistSoon();
}
