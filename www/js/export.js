// Figures for papers and wikis: each plot as SVG or PNG (1×, 2×, 4×) at a
// size of the user's choice (or a preset such as one journal column) and a
// font size, drawn by the core's figure code in the light theme.

import { $, el } from "./dom.js";
import { state } from "./state.js";
import * as core from "./core.js";
import { setStatus } from "./messages.js";
import { download, downloadBlob, fileStem, fillCsvSteps } from "./files.js";
import { plotKeys, plotName } from "./plots.js";

/** Figure sizes in CSS pixels (96 per inch): a journal column is about 8.5 cm wide. */
const PRESETS = {
  column: { width: 321, height: 240, font: 9 },
  double: { width: 680, height: 400, font: 10 },
  slide: { width: 960, height: 540, font: 18 },
};

/** A plot's size on screen in CSS pixels; a hidden plot takes a shown one's. */
function screenSize(key) {
  const size = (k) => {
    const box = document.querySelector(`.plot[data-plot="${k}"] .canvas-box`);
    const w = Math.floor(box?.clientWidth ?? 0);
    const h = Math.floor(box?.clientHeight ?? 0);
    return w >= 64 && h >= 64 ? [w, h] : null;
  };
  return size(key) ?? plotKeys().map(size).find(Boolean) ?? [720, 450];
}

const whole = (id, lo, hi) => {
  const v = Number($(id).value);
  return Number.isInteger(v) && v >= lo && v <= hi ? v : null;
};

/** The figure asked for: { width, height, font_px, legend }, or an error sentence. */
function figureSize(key) {
  const [sw, sh] = screenSize(key);
  if ($("export-preset").value === "screen") return { width: sw, height: sh, font_px: null, legend: $("export-key").checked };
  const width = whole("export-width", 100, 4000);
  const height = whole("export-height", 100, 4000);
  const font = whole("export-font", 6, 40);
  if (width === null || height === null) return { error: "the figure size must be whole pixels from 100 to 4000" };
  if (font === null) return { error: "the font size must be a whole number of pixels from 6 to 40" };
  return { width, height, font_px: font, legend: $("export-key").checked };
}

function exportSvg(key) {
  const size = figureSize(key);
  if (size.error) return setStatus(`Cannot export: ${size.error}`, true);
  try {
    download(`${fileStem()}-${key}.svg`, core.svg(key, size), "image/svg+xml");
  } catch (e) {
    setStatus(`Cannot export the ${plotName(key)} plot: ${e.message}`, true);
  }
}

function exportPng(key, scale) {
  const size = figureSize(key);
  if (size.error) return setStatus(`Cannot export: ${size.error}`, true);
  const canvas = el("canvas", { width: Math.round(size.width * scale), height: Math.round(size.height * scale) });
  try {
    core.drawPlot(key, canvas, scale, size);
  } catch (e) {
    return setStatus(`Cannot export the ${plotName(key)} plot: ${e.message}`, true);
  }
  canvas.toBlob((blob) => {
    if (!blob) return setStatus(`The browser could not make a ${canvas.width} × ${canvas.height} picture`, true);
    downloadBlob(`${fileStem()}-${key}@${scale}x.png`, blob);
  }, "image/png");
}

/** The size fields follow the preset; "on screen" shows the plot's own size. */
function syncSize() {
  const preset = $("export-preset").value;
  const custom = preset !== "screen";
  for (const id of ["export-width", "export-height", "export-font"]) $(id).disabled = !custom;
  // The size fields only show when they apply.
  document.querySelectorAll(".export-size-grid .custom-only").forEach((node) => (node.hidden = !custom));
  if (PRESETS[preset]) {
    $("export-width").value = String(PRESETS[preset].width);
    $("export-height").value = String(PRESETS[preset].height);
    $("export-font").value = String(PRESETS[preset].font);
  }
  const [w, h] = screenSize(state.drawn?.plots?.[0] ?? "cd");
  $("export-size").textContent = custom
    ? "Light figures at this size in CSS pixels (96 per inch); PNG at 2× and 4× has that many more pixels per side."
    : `Light figures at the plot’s size on screen (${w} × ${h} px); PNG at 2× and 4× has that many more pixels per side.`;
}

export function bindExport() {
  const rows = plotKeys().map((key) => {
    const button = (text, label, id, fn) => {
      const b = el("button", { type: "button", textContent: text, id });
      b.setAttribute("aria-label", label);
      b.addEventListener("click", fn);
      return el("td", {}, b);
    };
    const name = plotName(key);
    return el(
      "tr",
      {},
      el("th", { scope: "row", textContent: name }),
      button("SVG", `${name} plot as SVG`, `export-${key}-svg`, () => exportSvg(key)),
      ...[1, 2, 4].map((k) => button(`${k}×`, `${name} plot as PNG at ${k}×`, `export-${key}-png-${k}`, () => exportPng(key, k))),
    );
  });
  $("export-rows").replaceChildren(...rows);
  $("export-preset").addEventListener("change", syncSize);
  $("export-menu").addEventListener("toggle", () => {
    if (!$("export-menu").open) return;
    syncSize();
    fillCsvSteps();
  });
  $("save-json-too").addEventListener("click", () => $("save-json").click());
}
