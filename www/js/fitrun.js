// The fit workers' keeper on the page side: spawns workers (the compiled
// core posted to each once), hands out a fit — whole to one worker, or its
// starts split over several (start k to worker k mod n), joined by the core
// (`fitFinish`) into the same result — passes their messages on, and cancels
// by terminating them; the next fit gets fresh workers. In the single
// offline file the worker's code rides inline and runs from a blob: URL.

import * as core from "./core.js";

/** Idle or busy workers, kept between fits. */
const pool = [];
/** The fit in flight: { handlers, doc, parts, t0 }, or null. */
let running = null;

/** A module worker from the site; in the single file a classic one from the inline script (file:// pages get no module workers from blob: URLs). */
function newWorker() {
  const inline = document.getElementById("chiroptic-fitworker");
  if (inline) return new Worker(URL.createObjectURL(new Blob([inline.textContent], { type: "text/javascript" })));
  return new Worker(new URL("./fitworker.js", import.meta.url), { type: "module" });
}

function spawn(j) {
  const w = newWorker();
  w.postMessage({ module: core.compiledCore() });
  w.onmessage = (event) => {
    const run = running;
    if (!run || pool[j] !== w || j >= run.parts.length) return;
    const m = event.data;
    if (m.type === "progress") run.handlers.onProgress?.({ ...m, worker: j });
    // The curves follow the first worker, which has the given start.
    else if (m.type === "snapshot" && j === 0) run.handlers.onSnapshot?.(m);
    else if (m.type === "done") partDone(run, j, m.reply);
    else if (m.type === "failed") fail(m.message);
  };
  w.onerror = (e) => {
    e.preventDefault?.();
    if (running && pool[j] === w) fail(`the fit worker failed: ${e.message || "no message"}`);
  };
  return w;
}

function partDone(run, j, reply) {
  run.parts[j] = reply;
  if (run.parts.some((p) => p === null)) return;
  running = null;
  const ms = () => performance.now() - run.t0;
  if (run.parts.length === 1) return run.handlers.onDone(reply, ms());
  const refused = run.parts.find((p) => !p.ok);
  if (refused) return run.handlers.onDone(refused, ms());
  const joined = core.fitFinish(run.doc, run.parts.flatMap((p) => p.outcomes));
  run.handlers.onDone(joined, ms());
}

function fail(message) {
  const run = running;
  retireAll();
  running = null;
  run?.handlers.onFailed(message);
}

function retireAll() {
  for (const w of pool.splice(0)) w.terminate();
}

export const fitRunning = () => running !== null;

/**
 * Starts a fit of `doc` (a plain document) on `workers` workers. handlers:
 * onProgress({ start, iteration, chi_square, worker }), onSnapshot({ bands,
 * systems }), onDone(reply, ms) with the core's `{ ok, document, report }`
 * or error, onFailed(message). One fit at a time.
 */
export function runFit(doc, handlers, { workers = 1, snapshotMs = 150 } = {}) {
  if (running) throw new Error("a fit is already running");
  const n = Math.max(1, workers);
  for (let j = pool.length; j < n; j++) pool.push(spawn(j));
  running = { handlers, doc, parts: new Array(n).fill(null), t0: performance.now() };
  for (let j = 0; j < n; j++) pool[j].postMessage(n === 1 ? { doc, snapshotMs } : { doc, first: j, stride: n, snapshotMs });
}

/** Stops the fit in flight (the workers are terminated; nothing they found is kept). */
export function cancelFit() {
  if (!running) return false;
  running = null;
  retireAll();
  return true;
}
