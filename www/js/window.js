// The view controls above the plots: the spectral window (typed ends,
// "Frame bands"), the axis unit, points, the CD and ORD units, which plots
// show, and whether band lines are drawn. All of it lives in the document's
// `view` (except "band lines", a drawing option).

import { $, el, safe } from "./dom.js";
import { state } from "./state.js";
import * as core from "./core.js";
import { shortest } from "./format.js";
import { bindNumber, showAll, clearLocalErrors } from "./fields.js";
import { renderErrors, setStatus } from "./messages.js";
import { edit, redraw } from "./edit.js";
import { layoutPlots, plotKeys, plotName, unitLabel } from "./plots.js";

/** The document's view, created when first written. */
export function viewOf() {
  state.doc.view ??= {};
  return state.doc.view;
}

const options = (choices) => choices.map((u) => el("option", { value: u.key, textContent: u.label }));

/** Frames the bands: the core picks a window around their centres and widths. */
export function frameBands() {
  const r = core.frameBands(state.doc);
  state.cursorX = null;
  if (!r.ok) return setStatus(`Cannot frame the bands: ${r.error.message}`, true);
  viewOf().range_nm = r.range_nm;
  edit();
}

/** Arrow-key step of a window end, per axis unit. */
const WINDOW_STEP = { nm: 10, "cm-1": 1000, ev: 0.1 };

/** The two window ends, typed in the axis unit, applied on Enter, blur or a pause. */
function bindRange() {
  const axis = () => state.drawn?.axis_unit ?? "nm";
  // Read without creating an empty view (that would count as an edit).
  const shownNm = () => {
    const nm = state.doc.view?.range_nm ?? state.drawn?.range_nm;
    return nm ? [...nm].sort((a, b) => a - b) : undefined;
  };
  // The left end is the smaller axis value; in nm that is the shorter wavelength.
  const nmIndex = (k) => (axis() === "nm" ? k : 1 - k);
  const end = (k) => {
    const nm = shownNm();
    return nm ? safe(() => core.convertPosition(nm[nmIndex(k)], "nm", axis())) : undefined;
  };
  const setEnd = (k) => (v) => {
    const a = axis();
    const other = end(1 - k);
    if (other !== undefined && (k === 0 ? v >= other : v <= other)) {
      const which = k === 0 ? "start must lie below the end" : "end must lie above the start";
      throw new Error(`the window's ${which} (${other} ${unitLabel(a)})`);
    }
    const typed = shortest(core.convertPosition(v, a, "nm"), v, (c) => core.convertPosition(c, "nm", a));
    // The other end keeps its stored wavelength exactly.
    const kept = shownNm()?.[nmIndex(1 - k)] ?? typed;
    viewOf().range_nm = [typed, kept].sort((x, y) => x - y);
  };
  const rangeStep = () => WINDOW_STEP[axis()] ?? 1;
  for (const [id, k] of [["range-from", 0], ["range-to", 1]]) {
    bindNumber({
      input: $(id),
      label: "",
      canonical: false,
      deferred: true,
      unit: () => unitLabel(axis()),
      get: () => end(k),
      set: setEnd(k),
      step: rangeStep,
      range: () => [0, 1],
    });
  }
}

/** Unit menus for band centres and widths: the values convert in place. */
function bindEntryUnits() {
  for (const [id, key] of [["center-unit", "centerUnit"], ["width-unit", "widthUnit"]]) {
    $(id).replaceChildren(...options(core.catalog.axis));
    $(id).value = state.ui[key];
    // Paper shows the unit chosen, not the menu.
    const printed = () => ($(`${id}-print`).textContent = unitLabel(state.ui[key]));
    printed();
    $(id).addEventListener("change", () => {
      state.ui[key] = $(id).value;
      printed();
      clearLocalErrors();
      showAll();
      renderErrors();
    });
  }
}

function bindPlotChoices() {
  for (const [id, key, choices] of [["cd-unit", "cd_unit", core.catalog.cd], ["ord-unit", "ord_unit", core.catalog.ord], ["axis-unit", "axis_unit", core.catalog.axis]]) {
    $(id).replaceChildren(...options(choices));
    $(id).addEventListener("change", () => {
      viewOf()[key] = $(id).value;
      if (key === "axis_unit") state.cursorX = null;
      edit();
    });
  }
  const toggles = $("plot-toggles");
  for (const key of plotKeys()) {
    const id = `show-${key}`;
    const box = el("input", { type: "checkbox", id, value: key, checked: true });
    box.addEventListener("change", () => {
      const on = plotKeys().filter((k) => $(`show-${k}`).checked);
      viewOf().plots = on;
      layoutPlots(on);
      edit();
    });
    toggles.append(el("span", { className: "toggle" }, box, el("label", { htmlFor: id, textContent: plotName(key) })));
  }
  $("show-contributions").addEventListener("change", () => {
    state.options.contributions = $("show-contributions").checked;
    redraw();
  });
}

export function bindWindow() {
  bindRange();
  bindNumber({
    input: $("points"),
    label: "",
    canonical: true,
    integer: true,
    unit: () => "",
    get: () => state.drawn?.points ?? viewOf().points,
    set: (v) => (viewOf().points = v),
    step: () => 100,
    range: () => [2, core.catalog.max_points],
  });
  bindEntryUnits();
  bindPlotChoices();
  $("fit-range").addEventListener("click", frameBands);
  $("window-bar").addEventListener("submit", (e) => e.preventDefault());
}
