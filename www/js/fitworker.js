// The fit worker: the wasm core's bridge inside a worker, so that a fit (a
// synchronous loop in the core) never blocks the page. The page posts the
// compiled module once ({ module }), then a fit: { doc, snapshotMs } for the
// whole fit, or { doc, first, stride, snapshotMs } for this worker's share of
// the starts when several workers split them. Messages back: progress
// (start, iteration, χ² after each accepted step), snapshot (the bands
// reached, at most every snapshotMs, the first after snapshotMs), done (the
// core's reply) or failed (the core trapped; this worker is spent). Cancel is the page terminating the
// worker: the loop cannot read messages.

import init, { fit_document, fit_starts } from "../pkg/chiroptic.js";

let ready = null;

self.onmessage = async (event) => {
  const { module, doc, first, stride, snapshotMs = 150 } = event.data;
  if (module) ready = init({ module_or_path: module });
  if (!doc) return;
  try {
    await ready;
  } catch (e) {
    self.postMessage({ type: "failed", message: `the core did not load in the fit worker: ${e?.message ?? e}` });
    return;
  }
  // The first snapshot only after snapshotMs: a fit quicker than that
  // draws nothing midway, since the page's redraw would take time from it.
  let last = performance.now();
  const progress = (start, iteration, chi_square) => {
    self.postMessage({ type: "progress", start, iteration, chi_square });
    const now = performance.now();
    if (now - last < snapshotMs) return false;
    last = now;
    return true;
  };
  const snapshot = (s) => self.postMessage({ type: "snapshot", bands: s.bands, systems: s.systems });
  try {
    const reply = stride === undefined ? fit_document(doc, progress, snapshot) : fit_starts(doc, first, stride, progress, snapshot);
    self.postMessage({ type: "done", reply });
  } catch (e) {
    self.postMessage({ type: "failed", message: `the calculation core stopped on an internal error (${e?.message ?? e})` });
  }
};
