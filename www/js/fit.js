// The fit panel: the Fit and Cancel buttons, the live readout (start,
// iteration, χ²), the curves following the fit, and what happens after:
// the fitted document replaces the model as one undo step, its report is
// shown (fitreport.js), and the fit joins the session's comparison. The fit
// itself runs in a worker (fitrun.js); an edit of the model during a fit
// stops it, since its start is gone.

import { $ } from "./dom.js";
import { state } from "./state.js";
import { fmtText } from "./format.js";
import { setStatus } from "./messages.js";
import { loadDocument, refresh, preview, flushEdits } from "./edit.js";
import { runFit, cancelFit, fitRunning } from "./fitrun.js";
import { bindFitSettings, renderFitSettings } from "./fitparams.js";
import { fitCatalog } from "./fitmodes.js";
import { renderReport, addComparison, bindReport } from "./fitreport.js";

/** The fit in flight: the document it started from, the latest progress, the readout's timer, its starts and workers. */
const run = { start: null, latest: null, timer: 0, starts: 0, workers: 1 };
/**
 * The readout changes at most this often (ms): each change is a layout and
 * a paint on the page's thread, which on a machine of few cores takes time
 * from the workers (a change every frame slowed a 50 ms fit by a fifth).
 */
const READOUT_MS = 100;
/** Workers a fit's starts are split over, at most. */
const MAX_FIT_WORKERS = 4;

function setRunning(on) {
  $("fit-run").hidden = on;
  $("fit-cancel").hidden = !on;
  $("fit-settings").disabled = on;
  $("fitting").classList.toggle("running", on);
}

function say(text) {
  $("fit-progress").textContent = text;
}

function problem(text) {
  $("fit-problem").textContent = text ?? "";
  $("fit-problem").hidden = !text;
}

/** The readout, at most every READOUT_MS however fast the worker reports. */
function showProgress() {
  run.timer = 0;
  const m = run.latest;
  if (!m || !fitRunning()) return;
  const on = run.workers > 1 ? ` (${run.workers} workers)` : "";
  const text = `Fitting: start ${m.start + 1} of ${run.starts} · iteration ${m.iteration} · χ² ${fmtText(m.chi_square, 6)}${on}`;
  say(text);
  // Also beside the plots, which the panel may be scrolled away from.
  setStatus(text);
}

/** The fit's name for a field of the core's error, in the panel's words. */
function refusal(err) {
  const where = err.field && !["fit", "data"].includes(err.field) ? ` (${err.field})` : "";
  return `Cannot fit${where}: ${err.message}. The model is unchanged.`;
}

function startFit() {
  if (fitRunning()) return;
  // A change typed just before the click is applied now, not after the fit has started (which would stop it).
  flushEdits();
  problem(null);
  const start = structuredClone(state.doc);
  Object.assign(run, { start, latest: null, starts: start.fit?.starts ?? fitCatalog.default_starts });
  // The starts split over as many workers as the machine has cores (a few at most).
  run.workers = Math.max(1, Math.min(navigator.hardwareConcurrency || 1, MAX_FIT_WORKERS, run.starts));
  setRunning(true);
  say("Fitting: starting…");
  runFit(start, {
    onProgress(m) {
      run.latest = m;
      if (!run.timer) run.timer = setTimeout(showProgress, READOUT_MS);
    },
    onSnapshot(s) {
      const now = structuredClone(run.start);
      now.bands = s.bands;
      if (now.systems) now.systems = s.systems;
      preview(now);
    },
    onDone(reply, ms) {
      setRunning(false);
      if (!reply.ok) {
        refresh();
        say("");
        problem(refusal(reply.error));
        return;
      }
      const r = reply.report;
      addComparison(reply.document, r);
      loadDocument(reply.document);
      $("fit-progress").dataset.ms = String(ms);
      const on = run.workers > 1 ? ` on ${run.workers} workers` : "";
      say(`Fitted in ${(ms / 1000).toFixed(2)} s${on}: χ² ${fmtText(r.chi_square, 6)}, ${r.starts_at_best} of ${r.starts} starts reached the best minimum.`);
      setStatus("Fitted: one undo step takes the fit back");
    },
    onFailed(message) {
      setRunning(false);
      refresh();
      say("");
      problem(`The fit stopped: ${message}. The model is unchanged; the next fit starts fresh workers.`);
    },
  }, { workers: run.workers });
}

/** Cancel: the worker goes, the start model is drawn again. */
function stopFit(why) {
  if (!cancelFit()) return;
  clearTimeout(run.timer);
  run.timer = 0;
  setRunning(false);
  say(why);
  setStatus(why);
}

/** An edit of the model while a fit runs (edit.js calls this): the fit's start is gone. */
export function stopFitForEdit() {
  if (fitRunning()) stopFit("Fit stopped: the model was edited while it ran.");
}

/** Shows the document's fit settings and report (after a new document or an undo). */
export function renderFit() {
  renderFitSettings();
  renderReport(state.doc.fit?.report ?? null);
}

export function bindFit() {
  bindFitSettings();
  bindReport();
  $("fit-run").addEventListener("click", startFit);
  $("fit-cancel").addEventListener("click", () => {
    stopFit("Fit cancelled: the model is as it was.");
    refresh();
  });
}
