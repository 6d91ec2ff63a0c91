// Undo and redo over snapshots of the document. Each edit records itself
// (edit.js calls `record`); typing or sliding in one control within a moment
// is one step, a peak drag is one step. Inside a text box Ctrl+Z is the
// browser's own undo of the typed text.

import { $, isTextEntry } from "./dom.js";
import { state } from "./state.js";
import { sayDone } from "./messages.js";
import { loadDocument, flushEdits } from "./edit.js";

/** Snapshots of the document (JSON); `at` is the one on screen. */
const edits = { stack: [], at: -1, lastTime: 0, lastMerge: null, held: null };
const MAX_UNDO = 200;
/** Typing or dragging in one control within this time is one edit. */
const BURST_MS = 1000;

/** Adds the document as it is now; `merge` (a control) folds a burst of edits into one step. */
export function record(merge = null) {
  const snap = JSON.stringify(state.doc);
  if (edits.at >= 0 && snap === edits.stack[edits.at]) return;
  const now = performance.now();
  const burst = merge !== null && merge === edits.lastMerge && (merge === edits.held || now - edits.lastTime < BURST_MS);
  if (burst && edits.at > 0) {
    edits.stack[edits.at] = snap;
  } else {
    edits.stack.splice(edits.at + 1);
    edits.stack.push(snap);
    if (edits.stack.length > MAX_UNDO) edits.stack.shift();
    edits.at = edits.stack.length - 1;
  }
  Object.assign(edits, { lastTime: now, lastMerge: merge });
  syncButtons();
}

/** Starts the history at the document on screen. */
export function resetHistory() {
  Object.assign(edits, { stack: [JSON.stringify(state.doc)], at: 0, lastMerge: null });
  syncButtons();
}

/** The next edit starts a step of its own (after a drag ends). */
export function closeStep() {
  edits.lastMerge = null;
  edits.held = null;
}

/**
 * A slider whose every drag is one step, however long it pauses: the drag
 * starts a step of its own and folds the edits of `merge` (the control its
 * edits name) into it until the pointer is let go.
 */
export function oneStepPerDrag(slider, merge) {
  slider.addEventListener("pointerdown", () => {
    edits.lastMerge = null;
    edits.held = merge;
    window.addEventListener("pointerup", closeStep, { once: true });
  });
}

function syncButtons() {
  $("undo").disabled = edits.at <= 0;
  $("redo").disabled = edits.at >= edits.stack.length - 1;
}

function step(by) {
  // A change typed in this very frame is recorded first, so undo undoes it.
  flushEdits();
  const j = edits.at + by;
  if (j < 0 || j >= edits.stack.length) return;
  edits.at = j;
  edits.lastMerge = null;
  const focused = document.activeElement?.id;
  loadDocument(JSON.parse(edits.stack[j]), { record: false });
  syncButtons();
  if (focused && $(focused) && document.activeElement !== $(focused)) $(focused).focus();
  sayDone(by < 0 ? "Undone" : "Redone");
}

export function bindHistory() {
  $("undo").addEventListener("click", () => step(-1));
  $("redo").addEventListener("click", () => step(1));
  document.addEventListener("keydown", (e) => {
    if (!(e.ctrlKey || e.metaKey) || e.altKey) return;
    const k = e.key.toLowerCase();
    const undo = k === "z" && !e.shiftKey;
    const redo = (k === "z" && e.shiftKey) || (k === "y" && e.ctrlKey && !e.shiftKey);
    if (!undo && !redo) return;
    if (isTextEntry(e.target)) return;
    e.preventDefault();
    step(undo ? -1 : 1);
  });
}
