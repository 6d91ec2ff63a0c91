// Numbers as people type and read them. No unit factor lives here: every
// conversion goes through the core (core.js).

import { safe } from "./dom.js";

const NUMBER = /^[+-]?(\d+\.?\d*|\.\d+)(e[+-]?\d+)?$/i;

/** Parses what a person types: a point for decimals, an optional exponent. */
export function parseNumber(text) {
  const t = text.trim().replace(/\u2212/g, "-").replace(/×\s*10\^?/g, "e");
  if (t === "") return { empty: true };
  if (/^[+-]?\d+,\d+$/.test(t)) return { error: `“${text.trim()}”: use a point for decimals` };
  if (!NUMBER.test(t)) return { error: `“${text.trim()}” is not a number` };
  const value = Number(t);
  if (!Number.isFinite(value)) return { error: `“${text.trim()}” is too large` };
  return { value };
}

/** A value for an input box: significant figures, parseable back. */
export function fmtInput(v, sig = 5) {
  if (v === undefined || v === null || !Number.isFinite(v)) return "";
  if (v === 0) return "0";
  const a = Math.abs(v);
  if (a >= 1e6 || a < 1e-3) return v.toExponential(sig - 1).replace(/\.?0+e/, "e").replace("e+", "e");
  return String(Number(v.toPrecision(sig)));
}

const SUPERSCRIPT = { "-": "⁻", 0: "⁰", 1: "¹", 2: "²", 3: "³", 4: "⁴", 5: "⁵", 6: "⁶", 7: "⁷", 8: "⁸", 9: "⁹" };

/** ×10ⁿ with superscript digits. */
const powerOfTen = (e) => `×10${[...String(e)].map((c) => SUPERSCRIPT[c]).join("")}`;

/** A value for reading: significant figures, ×10ⁿ, a true minus sign. */
export function fmtText(v, sig = 4) {
  if (v === undefined || v === null) return "—";
  if (!Number.isFinite(v)) return "—";
  if (v === 0) return "0";
  const a = Math.abs(v);
  let s;
  if (a >= 1e5 || a < 1e-3) {
    const [m, e] = v.toExponential(sig - 1).split("e");
    s = `${m}${powerOfTen(Number(e))}`;
  } else {
    s = String(Number(v.toPrecision(sig)));
  }
  return s.replace(/^-/, "−");
}

/**
 * Values of one table column in one notation: the mantissas at `sig`
 * significant figures times one shared power of ten, when the column spans
 * values that would otherwise mix "2.7×10⁻⁴" and "0.0012".
 * Returns { scale: "×10⁻⁴" | "", texts: [...] }.
 */
export function fmtColumn(values, sig = 4) {
  const plain = { scale: "", texts: values.map((v) => fmtText(v, sig)) };
  const finite = values.filter((v) => Number.isFinite(v) && v !== 0).map(Math.abs);
  // fmtText writes plain numbers in [1e-3, 1e5) and ×10ⁿ outside.
  if (finite.every((a) => a >= 1e-3 && a < 1e5)) return plain;
  const e = Math.floor(Math.log10(Math.max(...finite)));
  const k = 10 ** e;
  const texts = values.map((v) => (Number.isFinite(v) ? fmtText(Number((v / k).toPrecision(sig)), sig) : "—"));
  return { scale: powerOfTen(e), texts };
}

/** Rounds away binary noise after a step (0.1 + 0.2 and the like). */
export const tidy = (v) => Number(v.toPrecision(12));

/** Significant digits of a value converted between units, as stored and as shown on focus. */
export const CONVERTED_DIGITS = 12;
export const tidyConverted = (v) => Number(v.toPrecision(CONVERTED_DIGITS));

/**
 * The shortest canonical value that still shows as what was typed: a value
 * typed in a display unit converts to a 17-digit float, which would lengthen
 * share links and files for nothing. `back` converts a canonical value to the
 * display unit; the result reads back as `typed` to CONVERTED_DIGITS
 * significant digits (the digits a focused box shows).
 */
export function shortest(canonical, typed, back) {
  if (!Number.isFinite(canonical)) return canonical;
  const want = tidyConverted(typed);
  for (let p = 1; p <= 17; p++) {
    const c = Number(canonical.toPrecision(p));
    const shown = safe(() => back(c));
    if (shown !== undefined && tidyConverted(shown) === want) return c;
  }
  return canonical;
}

/** "θ / mdeg" and a value read as "θ = 1.23 mdeg". */
export function quantity(label, v) {
  const i = label.indexOf(" / ");
  if (i < 0) return `${label.split(" = ")[0]} = ${fmtText(v)}`;
  return `${label.slice(0, i)} = ${fmtText(v)} ${label.slice(i + 3)}`;
}
