// The fit worker's keeper on the page side: spawns the worker (the compiled
// core posted to it once), hands it a fit, passes its messages on, and
// cancels by terminating it; the next fit gets a fresh worker. In the single
// offline file the worker's code rides inline and runs from a blob: URL.

import * as core from "./core.js";

let worker = null;
/** The fit in flight: its handlers, or null. */
let running = null;

/** A module worker from the site; in the single file a classic one from the inline script (file:// pages get no module workers from blob: URLs). */
function newWorker() {
  const inline = document.getElementById("chiroptic-fitworker");
  if (inline) return new Worker(URL.createObjectURL(new Blob([inline.textContent], { type: "text/javascript" })));
  return new Worker(new URL("./fitworker.js", import.meta.url), { type: "module" });
}

function spawn() {
  const w = newWorker();
  w.postMessage({ module: core.compiledCore() });
  w.onmessage = (event) => {
    const m = event.data;
    const h = running;
    if (!h || w !== worker) return;
    if (m.type === "progress") h.onProgress?.(m);
    else if (m.type === "snapshot") h.onSnapshot?.(m);
    else if (m.type === "done") finish(() => h.onDone(m.reply, m.ms));
    else if (m.type === "failed") {
      retire();
      finish(() => h.onFailed(m.message));
    }
  };
  w.onerror = (e) => {
    e.preventDefault?.();
    const h = running;
    retire();
    if (h) finish(() => h.onFailed(`the fit worker failed: ${e.message || "no message"}`));
  };
  return w;
}

function finish(then) {
  running = null;
  then();
}

function retire() {
  worker?.terminate();
  worker = null;
}

export const fitRunning = () => running !== null;

/**
 * Starts a fit of `doc` (a plain document). handlers: onProgress({ start,
 * iteration, chi_square }), onSnapshot({ bands, systems }), onDone(reply, ms),
 * onFailed(message). One fit at a time.
 */
export function runFit(doc, handlers, { snapshotMs = 150 } = {}) {
  if (running) throw new Error("a fit is already running");
  worker ??= spawn();
  running = handlers;
  worker.postMessage({ doc, snapshotMs });
}

/** Stops the fit in flight (the worker is terminated; nothing it found is kept). */
export function cancelFit() {
  if (!running) return false;
  running = null;
  retire();
  return true;
}
