// The bridge to the wasm core: the only module of the page that calls it
// (the fit worker, fitworker.js, is the bridge inside its worker). Every call is
// guarded (a trap inside the module means it can no longer be used, and the
// page says so once), conversions come back as numbers or throw an Error
// whose message the page shows, and everything else comes back as the
// core's reply `{ ok: true, ... }` or `{ ok: false, error: { kind, field, message } }`.

import init, * as wasm from "../pkg/chiroptic.js";
import { $ } from "./dom.js";

let dead = false;
let workbench = null;
/** Names, keys, caps and defaults, as the core knows them (see `catalog` in wasm.rs). */
export let catalog = null;

/** The compiled module: instantiated here, and posted to the fit worker (a Module is structured-cloneable). */
let compiled = null;

/** The wasm module's bytes when the single offline file carries them inline. */
function inlinedWasm() {
  const holder = document.getElementById("chiroptic-wasm");
  if (!holder) return undefined;
  const bin = atob(holder.textContent.trim());
  const bytes = new Uint8Array(bin.length);
  for (let i = 0; i < bin.length; i++) bytes[i] = bin.charCodeAt(i);
  return bytes;
}

/**
 * Strokes a trace the core hands over as one array [x0, y0, x1, y1 ...] with
 * the style it has set: one call per trace instead of one per segment.
 */
function strokePolyline(context, xy) {
  context.beginPath();
  context.moveTo(xy[0], xy[1]);
  for (let i = 2; i < xy.length; i += 2) context.lineTo(xy[i], xy[i + 1]);
  context.stroke();
}

/** Compiles the module once: from the inlined bytes (single file) or from the site. */
async function compileCore() {
  const bytes = inlinedWasm();
  if (bytes) return WebAssembly.compile(bytes);
  return WebAssembly.compileStreaming(fetch(new URL("../pkg/chiroptic_bg.wasm", import.meta.url)));
}

/** The compiled core for a worker, or null before start. */
export const compiledCore = () => compiled;

/** Loads the module; `canvasOf(key)` gives the canvas of each plot the catalog names. */
export async function start(canvasOf) {
  compiled = await compileCore();
  await init({ module_or_path: compiled });
  const c = wasm.catalog();
  if (!c.ok) throw new Error(`the core's catalog does not load: ${c.error.message}`);
  catalog = c;
  wasm.use_polyline_painter(strokePolyline);
  workbench = new wasm.Workbench(...catalog.plots.map((p) => canvasOf(p.key)));
}

/** The name the model gives band i when it has none (B1, B2, ...). */
export const bandName = (band, i) => band?.name || `${catalog.band_name_prefix}${i + 1}`;

let onStopped = null;
/** What the page does once the core has stopped (offer to reload the last good model). */
export function whenStopped(fn) {
  onStopped = fn;
}

/** Only in the test build of the module (feature panic-trigger): panics inside the core. */
export const panicForTests = wasm.panic_for_tests ? () => call(() => wasm.panic_for_tests()) : undefined;

/** Runs a call into the module; a trap there stops every later call. */
function call(fn) {
  if (dead) return undefined;
  try {
    return fn();
  } catch (e) {
    if (!(e instanceof WebAssembly.RuntimeError)) throw e;
    dead = true;
    const box = $("fatal");
    if (box.hidden) {
      box.textContent = `The calculation core stopped on an internal error (${e.message}).`;
      box.hidden = false;
    }
    onStopped?.(box);
    return undefined;
  }
}

const STOPPED = { ok: false, error: { kind: "stopped", field: "", message: "the calculation core stopped" } };

/** A call answering in the core's reply shape; a stopped core answers "stopped". */
const reply = (fn) => call(fn) ?? STOPPED;

/**
 * A panel's catalog read from the core on first use and kept: `read` is its
 * core call, `what` names it. A catalog that does not load is a broken build,
 * so it throws rather than answering.
 */
export function catalogOnce(read, what) {
  let kept = null;
  return () => {
    if (!kept) {
      const r = read();
      if (!r.ok) throw new Error(`the core's ${what} catalog does not load: ${r.error.message}`);
      kept = r;
    }
    return kept;
  };
}

/** The named field of a successful reply, or a thrown Error with the core's words. */
function value(fn, name = "value") {
  const r = reply(fn);
  if (!r.ok) throw Object.assign(new Error(r.error.message), { kind: r.error.kind, field: r.error.field });
  return r[name];
}

/** The named field of a successful reply, or `fallback`. */
function orElse(fn, name, fallback) {
  const r = reply(fn);
  return r.ok ? r[name] : fallback;
}

// ---------------------------------------------------------------- documents

export const demoDocument = () => reply(() => wasm.demo_document());
export const parseDocument = (text) => reply(() => wasm.parse_document(text));
export const readValidDocument = (text) => reply(() => wasm.read_valid_document(text));
export const documentJson = (doc) => value(() => wasm.document_json(doc), "text");
export const linkEncode = (doc) => reply(() => wasm.link_encode(doc));
export const linkDecode = (text) => reply(() => wasm.link_decode(text));
/** A window framing the document's bands: `{ ok, range_nm }`. */
export const frameBands = (doc) => reply(() => wasm.frame_bands(doc));

// ---------------------------------------------------------------- units

export const convertPosition = (v, from, to) => value(() => wasm.convert_position(v, from, to));
export const convertWidth = (v, from, to, centerNm) => value(() => wasm.convert_width(v, from, to, centerNm));
export const convertConcentration = (v, from, to, molarMass) => value(() => wasm.convert_concentration(v, from, to, molarMass));
export const convertPath = (v, from, to) => value(() => wasm.convert_path(v, from, to));

// ---------------------------------------------------------------- drawing

export const bandColour = (i) => orElse(() => wasm.band_colour(i), "colour", "currentColor");
/** `[background, text, muted, grid]` for the page's CSS. */
export function themeColours(dark) {
  const r = reply(() => wasm.theme_colours(dark));
  return r.ok ? [r.background, r.text, r.muted, r.grid] : [];
}

/** Validates, evaluates and redraws: the reply names the field at fault. The
 * document crosses as its JSON text, far quicker than an object when large. */
export const update = (doc, options) => reply(() => workbench.update(JSON.stringify(doc), options));
/** Redraws the last good model with new options. */
export const redraw = (options) => reply(() => workbench.redraw(options));
export const readout = (x) => {
  const r = reply(() => workbench.readout(x));
  return r.ok ? r : null;
};
export const bandPeaks = () => orElse(() => workbench.band_peaks(), "peaks", []);
/** The spectra as CSV on a round step (null: the plots' grid): `{ ok, csv }`. */
export const csv = (step) => reply(() => workbench.csv(step ?? undefined));
/** figure: { width, height, legend, font_px }. */
export const svg = (key, figure) => value(() => workbench.svg(key, figure), "svg");
export const drawPlot = (key, canvas, scale, figure) => value(() => workbench.draw_plot(key, canvas, scale, figure), "frame");
export const drawnText = (key) => orElse(() => workbench.drawn_text(key), "texts", []);

// ---------------------------------------------------------------- colour

/** Light sources, strip samples and side-view caps: `{ ok, illuminants, default_samples, max_samples, side }`. */
export const colourCatalog = () => reply(() => wasm.colour_catalog());
/** The colour seen end-on through the analyser at `analyserDeg`. */
export const colourEndOn = (doc, analyserDeg, illuminant) => reply(() => wasm.colour_end_on(doc, analyserDeg, illuminant));
/** The colours over analyser angles 0–180° at `samples` angles. */
export const colourStrip = (doc, illuminant, samples) => reply(() => wasm.colour_strip(doc, illuminant, samples));
/** The tube from the side: `{ ok, width, height, length_cm, diameter_cm, viewer_distance_cm, rgba }`. */
export const colourSideView = (doc, width, height, illuminant) => reply(() => wasm.colour_side_view(doc, width, height, illuminant, undefined));

// ---------------------------------------------------------------- measured data

/** Import limits, the link cap, the largest smoothing order. */
export const dataCatalog = () => reply(() => wasm.data_catalog());
/** A file's table for the column picker: `{ ok, format, columns, rows, recognised, problem, units, ... }`. */
export const importPreview = (text, name, block) => reply(() => wasm.import_preview(text, name, block));
/** The data blocks of a JCAMP-DX file (numbered from 1). */
export const jcampBlocks = (text, name) => reply(() => wasm.jcamp_blocks(text, name));
/** The data-set entry of a file with the user's column choice: `{ ok, set }`. */
export const importDataSet = (doc, text, name, choice, block) => reply(() => wasm.import_data_set(doc, text, name, block, choice ?? null));
/** Each set after its processing, for the data list: `{ ok, sets }`. */
export const dataRows = (doc) => reply(() => wasm.data_rows(doc));
/** A derived set by Kramers-Kronig from set `i`: `{ ok, set }`. */
export const kkPredict = (doc, i) => reply(() => wasm.kk_predict(doc, i));
/** Rotation at the lamp lines from CD set `i`: `{ ok, lines }`. */
export const kkLines = (doc, i) => reply(() => wasm.kk_lines(doc, i));
/** Typed readings at the sample's conditions: `{ ok, readings }`. */
export const readingRows = (doc) => reply(() => wasm.reading_rows(doc));
/** The share link's length and whether links may hold it: `{ ok, chars, limit, fits }`. */
export const linkSize = (doc) => reply(() => wasm.link_size(doc));

// ---------------------------------------------------------------- coupled chromophores

/** The coupled panel's defaults and caps: `{ ok, new_transition, couplet, ... }`. */
export const coupledCatalog = () => reply(() => wasm.coupled_catalog());
/** Two chromophores of transition `t` at distance and twist, checked: `{ ok, system }`. */
export const coupletSystem = (distanceAngstrom, twistDeg, t) =>
  reply(() => wasm.couplet_system(distanceAngstrom, twistDeg, t.shape, t.center_nm, t.fwhm_cm1, t.lorentz_fwhm_cm1, t.dipole_strength_debye2));
/** System `i` of a document: directions as vectors and angles, a pair's distance and twist: `{ ok, chromophores, pair }`. */
export const systemGeometry = (doc, i) => reply(() => wasm.system_geometry(doc, i));

// ---------------------------------------------------------------- fitting (the fit itself runs in fitworker.js)

/** The fit panel's fields, defaults and caps: `{ ok, fields, default_free, default_starts, max_starts, ... }`. */
export const fitCatalog = () => reply(() => wasm.fit_catalog());
/** The fit from every start's outcome, as the fit workers found them: `{ ok, document, report }`. */
export const fitFinish = (doc, outcomes) => reply(() => wasm.fit_finish(doc, outcomes));
/** |r| from which the core names a pair strongly correlated. */
export const fitStrongCorrelation = () => orElse(() => wasm.fit_catalog(), "strong_correlation", null);
/** Bands proposed from data set `index` (CD), at most `maxBands`, in place of the bands or `add`ed: `{ ok, bands, proposed, set }`. */
export const proposeBands = (doc, index, maxBands, add) => reply(() => wasm.propose_bands(doc, index, maxBands, add));

// ---------------------------------------------------------------- computed states

/** The states panel's defaults: `{ ok, shapes, temperature_k, fwhm_ev, shift_ev, scale, voigt_lorentz_fwhm_ev, max_shift_ev, max_transitions, energy_fields }`. */
export const statesCatalog = () => reply(() => wasm.states_catalog());
/** A transition list (chiroptic's plain format) as a document's `states` section: `{ ok, states }`, or the line at fault. */
export const statesFromText = (text) => reply(() => wasm.states_from_text(text));
/** Each conformer's share as the spectra use it (0 when off): `{ ok, populations }`. */
export const statesPopulations = (doc) => reply(() => wasm.states_populations(doc));
/** The model's CD and its mirror image against CD set `i` (nm ends optional): `{ ok, unshifted, computed, mirror, range_ev, verdict }`. */
export const statesCompare = (doc, i, fromNm, toNm, fitWidth, label) => reply(() => wasm.states_compare(doc, i, fromNm, toNm, fitWidth, label));
