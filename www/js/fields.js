// Number fields: a text box (and an optional slider) bound to one number of
// the document. Typed, slid or stepped with the arrow keys (Shift ×10, Alt
// ×0.1); shown with a few significant figures, in full while focused. A
// value the box cannot read is named beside it; a value the core refuses is
// named by the core (messages.js).

import { setIf } from "./dom.js";
import { parseNumber, fmtInput, tidy, tidyConverted } from "./format.js";
import { renderErrors } from "./messages.js";
import { edit, editSoon } from "./edit.js";

/** Every bound field on the page, so displays can follow the document. */
let fields = [];

/** A pause in typing after which a deferred field applies what it holds. */
const SETTLE_MS = 800;

export const allFields = () => fields;
export const fieldOf = (input) => fields.find((f) => f.input === input);

/** Forgets the fields inside `container` (their rows are about to be rebuilt). */
export function dropFieldsIn(selector) {
  fields = fields.filter((f) => !f.input.closest(selector));
}

/**
 * Binds a text box (and an optional slider) to one number of the document.
 * spec: { input, slider, get(), set(v), unit(), step(v), range(), log, optional,
 *         integer, canonical, label, deferred, changed(source), sliderStep }
 * get/set work in the unit shown; set may throw an Error whose message is shown.
 * A `deferred` field (the window ends) applies typing on Enter, on leaving the
 * box or after a pause, so a half-typed number is never applied.
 * A field with `changed` holds page state, not the document: it calls that
 * instead of edit(), so it makes no history step and no redraw.
 */
export function bindNumber(spec) {
  const { input, slider } = spec;
  const field = { ...spec, localError: null, pending: null };
  fields.push(field);

  const commit = (value, source) => {
    try {
      spec.set(value);
      field.localError = null;
    } catch (e) {
      setLocalError(field, e.message ?? String(e));
      return;
    }
    if (source !== "slider") syncSlider(field);
    if (spec.changed) return spec.changed(source);
    // Typing and sliding in one box is one undo step; a key step is its own.
    // Typing and sliding apply in the next frame (coalesced), a key step at once.
    if (source === "key") edit({ merge: null });
    else editSoon({ merge: input });
  };

  /** Reads the box: applies a number, or names what is wrong with the text. */
  const apply = () => {
    clearTimeout(field.pending);
    field.pending = null;
    const p = parseNumber(input.value);
    if (p.empty) {
      if (spec.optional) return commit(undefined, "text");
      return setLocalError(field, "enter a number");
    }
    if (p.error) return setLocalError(field, p.error);
    if (spec.integer && !Number.isInteger(p.value)) return setLocalError(field, "enter a whole number");
    commit(p.value, "text");
  };

  input.addEventListener("focus", () => {
    if (field.localError) return;
    // Every digit, all selected: typing replaces the number (a click then
    // places the caret as usual).
    const text = fullText(field);
    if (input.value !== text) {
      input.value = text;
      input.select();
    }
  });
  input.addEventListener("blur", () => {
    if (field.pending !== null) apply();
    if (!field.localError) input.value = fmtInput(safeGet(field));
  });
  input.addEventListener("input", () => {
    if (!spec.deferred) return apply();
    // A half-typed value is not an error: wait for Enter, blur or a pause.
    if (field.localError) setLocalError(field, null);
    clearTimeout(field.pending);
    field.pending = setTimeout(apply, SETTLE_MS);
  });
  input.addEventListener("keydown", (e) => {
    if (e.key === "Enter" && spec.deferred) {
      e.preventDefault();
      return apply();
    }
    if (e.key !== "ArrowUp" && e.key !== "ArrowDown") return;
    e.preventDefault();
    clearTimeout(field.pending);
    field.pending = null;
    const p = parseNumber(input.value);
    const current = p.value ?? safeGet(field) ?? 0;
    const factor = e.shiftKey ? 10 : e.altKey ? 0.1 : 1;
    let step = spec.step(current) * factor;
    if (spec.integer) step = Math.max(1, Math.round(step));
    const next = tidy(current + (e.key === "ArrowUp" ? step : -step));
    input.value = String(next);
    commit(next, "key");
  });
  if (slider) {
    slider.addEventListener("input", () => {
      let v = Number(slider.value);
      if (spec.log) v = 10 ** v;
      v = Number(v.toPrecision(spec.log ? 3 : 4));
      if (spec.integer) v = Math.round(v);
      input.value = fmtInput(v);
      commit(v, "slider");
    });
  }
  show(field);
  return field;
}

function safeGet(field) {
  try {
    return field.get();
  } catch {
    return undefined;
  }
}

/**
 * The full value while a box has the focus: every digit the document holds,
 * or for a value converted to a display unit its first CONVERTED_DIGITS
 * (the conversion leaves binary noise below them).
 */
function fullText(field) {
  const v = safeGet(field);
  if (v === undefined || v === null) return "";
  return String(field.canonical ? v : tidyConverted(v));
}

function syncSlider(field) {
  const { slider } = field;
  if (!slider) return;
  const v = safeGet(field);
  const [lo, hi] = field.range();
  let min = lo;
  let max = hi;
  const has = v !== undefined && v !== null && Number.isFinite(v);
  if (has) {
    if (field.log) {
      if (v > 0) {
        const lv = Math.log10(v);
        min = Math.min(min, Math.floor(lv));
        max = Math.max(max, Math.ceil(lv));
      }
    } else {
      min = Math.min(min, v);
      max = Math.max(max, v);
    }
  }
  setIf(slider, "min", String(min));
  setIf(slider, "max", String(max));
  setIf(slider, "step", field.integer ? "1" : String(field.sliderStep ?? (max - min) / 1000));
  // An empty optional field leaves its slider at the low end, not at its maximum.
  slider.classList.toggle("unset", !has);
  if (!has) {
    setIf(slider, "value", String(min));
    return;
  }
  if (!field.log || v > 0) {
    const target = field.log ? Math.log10(v) : v;
    if (Math.abs(Number(slider.value) - target) > (max - min) / 2000) slider.value = String(target);
  }
}

/** Shows the document's value (unless the person is typing in the box). */
export function show(field) {
  if (document.activeElement !== field.input && !field.localError && field.pending === null) {
    setIf(field.input, "value", fmtInput(safeGet(field)));
  }
  syncSlider(field);
}

export function showAll() {
  fields = fields.filter((f) => f.input.isConnected);
  fields.forEach(show);
}

export function setLocalError(field, message) {
  field.localError = message;
  renderErrors();
}

export function clearLocalErrors() {
  fields.forEach((f) => (f.localError = null));
}
