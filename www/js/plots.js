// The four plots on screen: canvas sizes (devicePixelRatio), the overlay
// (crosshair, zoom selection), the readout under the pointer, zooming by
// dragging across a plot, and what the core's reply says about each plot
// (unit menus, toggles, accessible names). Dragging a band's peak is in
// peakdrag.js; the drawing itself is the core's.

import { $, el } from "./dom.js";
import { state } from "./state.js";
import * as core from "./core.js";
import { fmtText, quantity } from "./format.js";
import { redraw, edit } from "./edit.js";
import { renderLines } from "./lines.js";
import { frameBands, viewOf } from "./window.js";
import { grabPeak, movePeak, releasePeak, overPeak } from "./peakdrag.js";

export const plotKeys = () => core.catalog.plots.map((p) => p.key);
export const plotTitle = (key) => core.catalog.plots.find((p) => p.key === key)?.title ?? key;
export const plotName = (key) => core.catalog.plots.find((p) => p.key === key)?.name ?? key;
export const unitLabel = (key) => core.catalog.axis.find((u) => u.key === key)?.label ?? key;

/** The core reports frames in canvas pixels; pointer and overlay work in CSS pixels. */
export function cssFrame(f) {
  const k = state.dpr;
  return { ...f, left: f.left / k, top: f.top / k, right: f.right / k, bottom: f.bottom / k };
}

export const frameOf = (key) => state.drawn?.frames.find((f) => f.plot === key);
export const xAt = (f, px) => f.x_range[0] + ((px - f.left) / Math.max(1, f.right - f.left)) * (f.x_range[1] - f.x_range[0]);
export const pxOf = (f, x) => f.left + ((x - f.x_range[0]) / (f.x_range[1] - f.x_range[0])) * (f.right - f.left);
export const pyOf = (f, y, range = f.y_range) => f.bottom - ((y - range[0]) / (range[1] - range[0])) * (f.bottom - f.top);
export const yAt = (f, py) => f.y_range[0] + ((f.bottom - py) / Math.max(1, f.bottom - f.top)) * (f.y_range[1] - f.y_range[0]);

/** Gives each canvas devicePixelRatio pixels per CSS pixel, so plots are sharp on HiDPI screens. */
export function sizeCanvases() {
  let changed = false;
  const dpr = Math.min(4, Math.max(1, window.devicePixelRatio || 1));
  if (dpr !== state.dpr) {
    state.dpr = dpr;
    state.options.pixel_ratio = dpr;
    changed = true;
  }
  document.querySelectorAll(".canvas-box").forEach((box) => {
    const w = Math.floor(box.clientWidth);
    const h = Math.floor(box.clientHeight);
    if (!w || !h) return;
    // Print scales the drawn bitmap at this shape (see style.css).
    box.style.setProperty("--aspect", String(w / h));
    const [pw, ph] = [Math.round(w * dpr), Math.round(h * dpr)];
    for (const c of box.querySelectorAll("canvas")) {
      if (c.width !== pw || c.height !== ph) {
        c.width = pw;
        c.height = ph;
        changed = true;
      }
    }
  });
  return changed;
}

let resizePending = false;
export function onResize() {
  // While printing, the plots keep their bitmaps and are scaled to the paper.
  if (resizePending || state.printing) return;
  resizePending = true;
  requestAnimationFrame(() => {
    resizePending = false;
    if (sizeCanvases()) redraw();
  });
}

/** Shows the chosen plots; the grid closes up around hidden ones. */
export function layoutPlots(on) {
  document.querySelectorAll(".plot").forEach((fig) => (fig.hidden = !on.includes(fig.dataset.plot)));
  $("plot-grid").dataset.count = String(on.length);
}

/** What a successful draw says about the view: menus, toggles, lamp lines, names. */
export function showResult(r) {
  $("cd-unit").value = r.cd_unit;
  $("ord-unit").value = r.ord_unit;
  $("axis-unit").value = r.axis_unit;
  for (const key of plotKeys()) {
    const box = document.querySelector(`#plot-toggles input[value="${key}"]`);
    if (box) box.checked = r.plots.includes(key);
  }
  renderLines(r.lines);
  renderKeys(r.keys ?? {});
  for (const f of r.frames) {
    const label = r.y_labels?.[f.plot] ?? "";
    const [a, b] = r.x_range;
    $(`plot-${f.plot}`).setAttribute(
      "aria-label",
      `${plotTitle(f.plot)} ${label} from ${fmtText(a)} to ${fmtText(b)} ${unitLabel(r.axis_unit)}`.replace(/\s+/g, " "),
    );
  }
  drawCrosshair();
}

/** The key beside each plot's title: its summed traces (bands are named by the band list). */
let shownKeys = null;
function renderKeys(keys) {
  // The keys change with the units and the theme, not with most edits.
  const text = JSON.stringify(keys);
  if (text === shownKeys) return;
  shownKeys = text;
  for (const [plot, entries] of Object.entries(keys)) {
    const box = $(`key-${plot}`);
    if (!box) continue;
    const items = entries.map((e) => {
      const item = el("span", { className: "key-item" }, el("span", { className: "key-line" }), e.right_axis ? `${e.name} (right)` : e.name);
      item.style.setProperty("--key", e.colour);
      return item;
    });
    box.replaceChildren(...items);
  }
}

/**
 * A colour of the page's theme. Reading computed style forces the browser to
 * recompute styles after each redraw's DOM changes (some 4 ms a redraw), so
 * the values are read once per theme.
 */
const themeColours = { dark: null, values: new Map() };
export function cssVar(name) {
  if (themeColours.dark !== state.options.dark) {
    themeColours.dark = state.options.dark;
    themeColours.values.clear();
  }
  if (!themeColours.values.has(name)) {
    themeColours.values.set(name, getComputedStyle(document.documentElement).getPropertyValue(name).trim());
  }
  return themeColours.values.get(name);
}

/** The overlay: the zoom selection being dragged, the crosshair and its dot on the sum. */
export function drawCrosshair() {
  const r = state.cursorX === null || !state.drawn ? null : core.readout(state.cursorX);
  for (const key of plotKeys()) {
    const overlay = document.querySelector(`.plot[data-plot="${key}"] canvas.overlay`);
    const ctx = overlay.getContext("2d");
    ctx.setTransform(1, 0, 0, 1, 0, 0);
    ctx.clearRect(0, 0, overlay.width, overlay.height);
    // Drawn in CSS pixels, at the canvas's resolution.
    ctx.setTransform(state.dpr, 0, 0, state.dpr, 0, 0);
    const f = frameOf(key);
    if (!f) continue;
    const ink = cssVar("--ink") || "#000";
    const drag = state.zoomDrag;
    if (drag && drag.key === key) {
      ctx.fillStyle = cssVar("--select");
      const [a, b] = [drag.startPx, drag.px].sort((p, q) => p - q);
      ctx.fillRect(a, f.top, b - a, f.bottom - f.top);
    }
    if (!r) continue;
    const px = Math.round(pxOf(f, r.x)) + 0.5;
    ctx.strokeStyle = ink;
    ctx.globalAlpha = 0.55;
    ctx.lineWidth = 1;
    ctx.setLineDash([4, 3]);
    ctx.beginPath();
    ctx.moveTo(px, f.top);
    ctx.lineTo(px, f.bottom);
    ctx.stroke();
    ctx.setLineDash([]);
    ctx.globalAlpha = 1;
    const plot = r.plots.find((p) => p.plot === key);
    // The first value is the plot's (first) sum, on the left axis.
    const dot = plot?.values[0];
    if (dot && Number.isFinite(dot.value)) {
      ctx.fillStyle = ink;
      ctx.beginPath();
      ctx.arc(px, pyOf(f, dot.value), 3.5, 0, 2 * Math.PI);
      ctx.fill();
    }
  }
  renderReadout(r);
}

function renderReadout(r) {
  const out = $("readout");
  if (!r) {
    out.textContent = "Point at a plot (or focus it and use ←/→) for values; drag to zoom; drag a band’s CD peak to move it.";
    return;
  }
  // Each part carries its number in full (data-value) for copying and checks.
  const part = (text, plot, value) => {
    const span = el("span", { textContent: text });
    if (plot) span.dataset.plot = plot;
    if (value !== undefined) span.dataset.value = String(value);
    return span;
  };
  const parts = [part(`λ ${fmtText(r.nm, 5)} nm (${fmtText(r.cm1, 5)} cm⁻¹, ${fmtText(r.ev, 4)} eV)`, "x", r.x)];
  for (const p of r.plots) {
    if (p.plot === "index") {
      const [mean, dn] = p.values;
      parts.push(part(`${mean.name} ${fmtText(mean.value)}, ${dn.name} ${fmtText(dn.value)}`, p.plot, dn.value));
    } else parts.push(part(quantity(p.label, p.values[0].value), p.plot, p.values[0].value));
  }
  out.replaceChildren(...parts.flatMap((s, i) => (i ? [el("span", { className: "sep", textContent: " │ " }), s] : [s])));
}

/** Pointer and keyboard on one plot: readout, zoom by dragging, peak drag on CD. */
function bindPlot(fig) {
  const key = fig.dataset.plot;
  const box = fig.querySelector(".canvas-box");
  const at = (e) => {
    const b = box.getBoundingClientRect();
    return [e.clientX - b.left, e.clientY - b.top];
  };
  box.addEventListener("pointermove", (e) => {
    const f = frameOf(key);
    if (!f) return;
    const [x, y] = at(e);
    if (state.peakDrag) return movePeak(x, y);
    if (key === "cd") box.classList.toggle("over-peak", overPeak(x, y));
    const px = Math.min(f.right, Math.max(f.left, x));
    if (state.zoomDrag) state.zoomDrag.px = px;
    state.cursorX = xAt(f, px);
    drawCrosshair();
  });
  box.addEventListener("pointerleave", () => {
    if (state.zoomDrag) return;
    state.cursorX = null;
    drawCrosshair();
  });
  box.addEventListener("pointerdown", (e) => {
    const f = frameOf(key);
    if (!f || e.button !== 0) return;
    const [x, y] = at(e);
    if (x < f.left || x > f.right) return;
    if (key === "cd" && grabPeak(x, y)) {
      box.classList.add("dragging-peak");
      box.setPointerCapture(e.pointerId);
      return;
    }
    state.zoomDrag = { key, startPx: x, px: x };
    box.setPointerCapture(e.pointerId);
  });
  box.addEventListener("pointerup", (e) => {
    if (state.peakDrag) {
      box.classList.remove("dragging-peak");
      return releasePeak(...at(e));
    }
    const d = state.zoomDrag;
    state.zoomDrag = null;
    const f = frameOf(key);
    if (!d || !f || Math.abs(d.px - d.startPx) < 6) return drawCrosshair();
    const axis = state.drawn.axis_unit;
    // A pixel is about a thousandth of the window: six digits say all of it.
    const nm = [xAt(f, d.startPx), xAt(f, d.px)].map((x) => Number(core.convertPosition(x, axis, "nm").toPrecision(6)));
    viewOf().range_nm = nm.sort((a, b) => a - b);
    edit();
  });
  box.addEventListener("dblclick", frameBands);
  box.addEventListener("keydown", (e) => {
    const f = frameOf(key);
    if (!f) return;
    if (e.key === "0") return frameBands();
    if (e.key !== "ArrowLeft" && e.key !== "ArrowRight") return;
    e.preventDefault();
    const n = state.drawn.points;
    const dx = ((f.x_range[1] - f.x_range[0]) / Math.max(1, n - 1)) * (e.shiftKey ? 20 : 1) * (e.key === "ArrowLeft" ? -1 : 1);
    const mid = (f.x_range[0] + f.x_range[1]) / 2;
    const x = state.cursorX === null ? mid : state.cursorX + dx;
    state.cursorX = Math.min(f.x_range[1], Math.max(f.x_range[0], x));
    drawCrosshair();
  });
  box.addEventListener("blur", () => {
    state.cursorX = null;
    drawCrosshair();
  });
}

export function bindPlots() {
  document.querySelectorAll(".plot").forEach(bindPlot);
  new ResizeObserver(onResize).observe($("plot-grid"));
}
