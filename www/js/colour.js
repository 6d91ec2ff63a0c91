// The colour panel: what the eye sees through the sample between polariser
// and analyser (crate::colour). The end-on swatch at the analyser angle β,
// the strip of colours over β = 0–180° (click or drag it to set β), the
// light source, path length and concentration (the document's own sample
// fields, so history and the link follow), and the tube seen from the side.
// Nothing here runs inside an input handler: the swatch and strip are drawn
// at the next animation frame after the plots, the side view (tens of ms)
// after that frame has been painted, at most once per frame, and not while a
// pointer is down (a slider or a drag in progress).

import { $, el, setIf } from "./dom.js";
import { state } from "./state.js";
import * as core from "./core.js";
import { bindNumber, show, fieldOf } from "./fields.js";
import { renderErrors } from "./messages.js";
import { fmtText, tidy } from "./format.js";

/** The side view is computed at most this wide (its cost grows with the pixel count); CSS scales it. */
const SIDE_WIDTH = 600;
/** Height over width of the side view: the tube's diameter over its length. */
const SIDE_ASPECT = 0.15;
const LOG_SLIDER = { conc: [-6, 0], path: [-2, 1] };
const relStep = (v) => (v ? 10 ** (Math.floor(Math.log10(Math.abs(v))) - 1) : 0.1);

let catalog = null;
const pending = { frame: 0, side: false, sideTimer: 0, strip: true };
/** A pointer is held down: a drag or a slide is in progress. */
let pointerHeld = false;

const panelOpen = () => $("colour-details").open;
/** The last document that drew: the panel shows what the plots show. */
const shownDoc = () => state.goodDoc ?? state.doc;
/** β folded into the strip's half turn (the colours repeat every 180°). */
const folded = (b) => ((b % 180) + 180) % 180;

export function bindColour() {
  const c = core.colourCatalog();
  if (!c.ok) {
    $("colour-problem").textContent = `The colour panel is unavailable: ${c.error.message}`;
    return;
  }
  catalog = c;
  state.colour.illuminant ??= catalog.illuminants[0].key;
  const select = $("colour-illuminant");
  select.replaceChildren(...catalog.illuminants.map((i) => el("option", { value: i.key, textContent: i.label })));
  select.value = state.colour.illuminant;
  select.addEventListener("change", () => {
    state.colour.illuminant = select.value;
    schedule({ strip: true, side: true });
  });

  bindNumber({
    input: $("colour-analyser"),
    slider: $("colour-analyser-slider"),
    label: "",
    canonical: true,
    unit: () => "°",
    get: () => state.colour.analyser_deg,
    set: (v) => (state.colour.analyser_deg = v),
    step: () => 1,
    range: () => [0, 180],
    changed: analyserMoved,
  });
  const sampleField = (id, key, decades) =>
    bindNumber({
      input: $(id),
      slider: $(`${id}-slider`),
      label: "",
      log: true,
      canonical: true,
      unit: () => $(`${id}-unit`).textContent,
      get: () => state.doc.sample[key],
      set: (v) => (state.doc.sample[key] = v),
      step: relStep,
      range: () => decades,
    });
  const label = (list, key) => list.find((u) => u.key === key)?.label ?? key;
  $("colour-path-unit").textContent = label(core.catalog.path, "cm");
  $("colour-conc-unit").textContent = label(core.catalog.concentration, "mol/L");
  sampleField("colour-path", "path_length_cm", LOG_SLIDER.path);
  sampleField("colour-conc", "concentration_mol_per_l", LOG_SLIDER.conc);

  bindStrip($("colour-strip"));
  $("colour-details").addEventListener("toggle", () => panelOpen() && schedule({ strip: true, side: true }));
  document.addEventListener("chiroptic:updated", (e) => e.detail.ok && schedule({ strip: true, side: true }));
  // The side view waits for the end of a drag or a slide.
  document.addEventListener("pointerdown", () => (pointerHeld = true), true);
  const up = () => {
    pointerHeld = false;
    if (pending.side) schedule({});
  };
  document.addEventListener("pointerup", up, true);
  document.addEventListener("pointercancel", up, true);
  // A button let go outside the window sends no pointerup.
  document.addEventListener("pointermove", (e) => pointerHeld && e.buttons === 0 && up(), true);
}

/** After β changed in its box, on its slider, or on the strip. */
function analyserMoved() {
  const f = fieldOf($("colour-analyser"));
  if (f.localError) f.localError = null;
  renderErrors();
  schedule({});
}

function setAnalyser(deg) {
  state.colour.analyser_deg = tidy(deg);
  const f = fieldOf($("colour-analyser"));
  f.localError = null;
  show(f);
  analyserMoved();
}

/** Asks for a redraw at the next frame; `strip` and `side` say what changed besides β. */
function schedule({ strip = false, side = false }) {
  pending.strip ||= strip;
  pending.side ||= side;
  if (!catalog || !panelOpen() || pending.frame) return;
  pending.frame = requestAnimationFrame(() => {
    pending.frame = 0;
    drawEndOn();
    // A timer set inside a frame runs once that frame is on screen.
    if (pending.side && !pending.sideTimer) pending.sideTimer = setTimeout(drawSide, 0);
  });
}

function problem(text) {
  $("colour-problem").textContent = text ?? "";
  $("colour-problem").hidden = !text;
}

function drawEndOn() {
  const doc = shownDoc();
  if (!doc) return;
  $("colour").classList.toggle("stale", state.stale);
  const t0 = performance.now();
  const sw = core.colourEndOn(doc, state.colour.analyser_deg, state.colour.illuminant);
  const strip = pending.strip ? core.colourStrip(doc, state.colour.illuminant, catalog.default_samples) : null;
  const ms = performance.now() - t0;
  if (!sw.ok) return problem(`Colour: ${sw.error.message}`);
  if (strip && !strip.ok) return problem(`Colour strip: ${strip.error.message}`);
  problem(null);
  showSwatch(sw);
  if (strip) {
    pending.strip = false;
    paintStrip(strip);
  }
  markStrip();
  $("colour-timing-end").textContent = `swatch${strip ? " and strip" : ""} ${ms.toFixed(2)} ms`;
  document.dispatchEvent(new CustomEvent("chiroptic:colour", { detail: { part: strip ? "end-on+strip" : "end-on", ms } }));
}

function showSwatch(sw) {
  const box = $("colour-swatch");
  box.style.background = sw.hex;
  Object.assign(box.dataset, { hex: sw.hex, x: sw.xy[0], y: sw.xy[1], luminance: sw.luminance });
  const beta = fmtText(state.colour.analyser_deg);
  box.setAttribute("aria-label", `Colour seen through the analyser at ${beta}°: ${sw.hex}`);
  // Below this share of the white, float rounding (cos 90°) decides xy.
  const black = sw.luminance < 1e-9;
  $("colour-xy").textContent = black ? "— (no light)" : `${fmtText(sw.xy[0])}, ${fmtText(sw.xy[1])}`;
  $("colour-luminance").textContent = fmtText(sw.luminance);
  $("colour-srgb").textContent = `${sw.srgb_8bit.join(", ")} · ${sw.hex}`;
  $("colour-clipped").hidden = !sw.clipped;
}

function paintStrip(strip) {
  const n = strip.hex.length;
  const canvas = $("colour-strip-canvas");
  setIf(canvas, "width", n);
  setIf(canvas, "height", 1);
  // Sample i sits at β_i = 180 i/(n-1): the canvas reaches half a sample past each end.
  canvas.style.width = `${(100 * n) / (n - 1)}%`;
  canvas.style.left = `${-50 / (n - 1)}%`;
  const img = new ImageData(n, 1);
  for (let i = 0; i < n; i++) {
    img.data.set(strip.srgb_8bit.slice(3 * i, 3 * i + 3), 4 * i);
    img.data[4 * i + 3] = 255;
  }
  canvas.getContext("2d").putImageData(img, 0, 0);
}

function markStrip() {
  const b = state.colour.analyser_deg;
  $("colour-strip-mark").style.left = `${(100 * folded(b)) / 180}%`;
  const strip = $("colour-strip");
  strip.setAttribute("aria-valuenow", String(folded(b)));
  strip.setAttribute("aria-valuetext", `${fmtText(b)}°`);
}

/** The strip as a control: click or drag sets β; arrows step it (Shift ×10, Alt ×0.1). */
function bindStrip(strip) {
  const at = (e) => {
    const r = strip.getBoundingClientRect();
    const f = Math.min(1, Math.max(0, (e.clientX - r.left) / r.width));
    setAnalyser(Math.round(1800 * f) / 10);
  };
  strip.addEventListener("pointerdown", (e) => {
    if (e.button !== 0) return;
    strip.setPointerCapture(e.pointerId);
    strip.focus();
    at(e);
  });
  strip.addEventListener("pointermove", (e) => strip.hasPointerCapture(e.pointerId) && at(e));
  strip.addEventListener("keydown", (e) => {
    const dir = { ArrowRight: 1, ArrowUp: 1, ArrowLeft: -1, ArrowDown: -1 }[e.key];
    const b = state.colour.analyser_deg;
    if (dir) setAnalyser(b + dir * (e.shiftKey ? 10 : e.altKey ? 0.1 : 1));
    else if (e.key === "Home") setAnalyser(0);
    else if (e.key === "End") setAnalyser(180);
    else return;
    e.preventDefault();
  });
}

function drawSide() {
  pending.sideTimer = 0;
  if (!panelOpen()) return;
  if (pointerHeld) return; // redone when the pointer is let go
  pending.side = false;
  const doc = shownDoc();
  const canvas = $("colour-side");
  const cssWidth = canvas.parentElement.clientWidth || SIDE_WIDTH;
  const width = Math.max(1, Math.min(SIDE_WIDTH, catalog.side.max_width, Math.round(cssWidth)));
  const height = Math.max(1, Math.min(catalog.side.max_height, Math.round(width * SIDE_ASPECT)));
  const t0 = performance.now();
  const view = core.colourSideView(doc, width, height, state.colour.illuminant);
  const ms = performance.now() - t0;
  if (!view.ok) {
    $("colour-side-note").textContent = `Side view: ${view.error.message}`;
    return;
  }
  setIf(canvas, "width", view.width);
  setIf(canvas, "height", view.height);
  canvas.getContext("2d").putImageData(new ImageData(view.rgba, view.width, view.height), 0, 0);
  canvas.dataset.drawn = String(Number(canvas.dataset.drawn ?? 0) + 1);
  $("colour-side-note").textContent =
    `Tube ${fmtText(view.length_cm)} cm long and ${fmtText(view.diameter_cm)} cm across, ` +
    `seen from ${fmtText(view.viewer_distance_cm)} cm; the light enters at the left.`;
  $("colour-timing-side").textContent = `side view ${view.width} × ${view.height} in ${ms.toFixed(0)} ms`;
  document.dispatchEvent(new CustomEvent("chiroptic:colour", { detail: { part: "side", ms } }));
}
