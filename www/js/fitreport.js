// What a fit found, as the core reported it (doc.fit.report): the figures
// of merit, estimates ± standard errors, strongly correlated pairs, per-set
// χ², warnings and why it stopped; the same as a CSV of the estimates and a
// printable report (with the CD and ORD figures); and the session's fits
// side by side (bands, χ², AIC, BIC) to judge whether a band earns its place.

import { $, el } from "./dom.js";
import { state } from "./state.js";
import * as core from "./core.js";
import { fmtText } from "./format.js";
import { setStatus } from "./messages.js";
import { download, fileStem } from "./files.js";
import { loadDocument } from "./edit.js";
import { plotTitle } from "./plots.js";

/** Fits kept side by side (page state: the session's, newest last). */
const KEPT_FITS = 8;
const fits = [];

/** Words and units for the core's parameter names (BAND.field, shift_cm1, SET.offset ...). */
const FIELD = {
  center_cm1: ["centre", "cm⁻¹"],
  fwhm_cm1: ["width (FWHM)", "cm⁻¹"],
  lorentz_fwhm_cm1: ["Lorentz part", "cm⁻¹"],
  rotatory_strength_1e40_cgs: ["R", "10⁻⁴⁰ esu² cm²"],
  dipole_strength_debye2: ["D", "debye²"],
  distance_angstrom: ["distance", "Å"],
  twist_deg: ["twist", "°"],
  offset: ["baseline offset", "set's unit"],
  scale: ["scale", ""],
};

function describe(name) {
  if (name === "shift_cm1") return { owner: "all bands", what: "shift", unit: "cm⁻¹" };
  const cut = name.lastIndexOf(".");
  const [what, unit] = FIELD[name.slice(cut + 1)] ?? [name.slice(cut + 1), ""];
  return { owner: name.slice(0, cut), what, unit };
}

/** A value with its standard error, both to the error's second significant digit. */
export function withError(v, se) {
  if (!Number.isFinite(se) || se <= 0) return fmtText(v, 6);
  const decimals = Math.max(0, 1 - Math.floor(Math.log10(se)));
  // Fixed point only while it stays short; else both in ×10ⁿ.
  if (decimals > 8 || v.toFixed(decimals).length > 12) return `${fmtText(v, 6)} ± ${fmtText(se, 2)}`;
  return `${v.toFixed(decimals)} ± ${se.toFixed(decimals)}`.replace(/(^|\s)-/g, "$1−");
}

/** The centre in nm beside a fitted centre in cm⁻¹ (converted by the core). */
function centreNm(p) {
  try {
    const nm = core.convertPosition(p.value, "cm-1", "nm");
    const se = p.standard_error ? core.convertWidth(p.standard_error, "cm-1", "nm", nm) : null;
    return `${withError(nm, se)} nm`;
  } catch {
    return "";
  }
}

const summaryItems = (r) => [
  ["χ²", fmtText(r.chi_square, 6)],
  ["reduced χ²", fmtText(r.reduced_chi_square, 4)],
  ["degrees of freedom", String(r.degrees_of_freedom)],
  ["points", String(r.points)],
  ["free parameters", String(r.free_parameters)],
  ["AIC", fmtText(r.aic, 6)],
  ["BIC", fmtText(r.bic, 6)],
  ["weights", r.weights],
  ["stopped", `${r.stop_reason}, after ${r.iterations} iterations`],
  ["starts", `${r.starts_at_best} of ${r.starts} reached the best minimum`],
];

function estimatesTable(r) {
  const head = el("tr", {}, ...["Parameter", "", "Estimate ± standard error", "Unit", "How"].map((t, i) => el("th", { scope: "col", textContent: t, className: i === 2 ? "num" : "" })));
  const rows = r.parameters.map((p) => {
    const d = describe(p.name);
    const how = p.mode === "free" ? (p.at_bound ? "free, at a bound" : "free") : p.mode;
    const extra = d.what === "centre" && d.unit === "cm⁻¹" ? el("span", { className: "unit", textContent: ` (${centreNm(p)})` }) : "";
    const tr = el("tr", {}, el("th", { scope: "row", textContent: d.owner }), el("td", { className: "text", textContent: d.what }), el("td", { className: "num-text" }, withError(p.value, p.standard_error), extra), el("td", { className: "text", textContent: d.unit }), el("td", { className: "text", textContent: how }));
    tr.dataset.parameter = p.name;
    tr.dataset.value = String(p.value);
    if (p.standard_error !== undefined) tr.dataset.se = String(p.standard_error);
    if (p.mode !== "free") tr.classList.add("muted-row");
    return tr;
  });
  return el("table", { className: "lines-table fit-estimates", id: "fit-estimates" }, el("thead", {}, head), el("tbody", {}, ...rows));
}

/** The report's parts, shared by the panel and the printable report. */
function reportParts(report) {
  const r = { ...report, strong_limit: core.fitStrongCorrelation() };
  const parts = [];
  const dl = el("dl", { className: "fit-summary", id: "fit-summary" });
  for (const [k, v] of summaryItems(r)) dl.append(el("dt", { textContent: k }), el("dd", { textContent: v }));
  parts.push(dl);
  if (r.warnings.length) parts.push(el("ul", { className: "warn-text fit-warnings", id: "fit-warnings" }, ...r.warnings.map((w) => el("li", { textContent: w }))));
  parts.push(estimatesTable(r));
  const sets = r.sets.map((s) => `${s.name}: χ² ${fmtText(s.chi_square, 5)} over ${s.points} points (rms weighted residual ${fmtText(s.rms_weighted_residual, 3)})`);
  parts.push(el("p", { className: "hint-text", textContent: `Per set — ${sets.join("; ")}` }));
  const strong = r.strong_correlations.map((c) => {
    const [a, b] = [describe(c.a), describe(c.b)];
    return el("li", { textContent: `${a.owner} ${a.what} and ${b.owner} ${b.what}: r = ${fmtText(c.r, 3)}` });
  });
  const limit = fmtText(r.strong_limit ?? 0.9, 2);
  parts.push(
    strong.length
      ? el("details", { id: "fit-correlated", open: strong.length <= 4 }, el("summary", { className: "fit-note", textContent: `${strong.length} strongly correlated pair${strong.length > 1 ? "s" : ""} (|r| ≥ ${limit}: the data trade one against the other)` }), el("ul", {}, ...strong))
      : el("p", { className: "hint-text", id: "fit-correlated", textContent: `No pair of parameters correlated with |r| ≥ ${limit}.` }),
  );
  return parts;
}

/** Shows a report (null: none yet for this model). */
export function renderReport(r) {
  const box = $("fit-report");
  box.hidden = !r;
  if (!r) return box.replaceChildren();
  const actions = el("div", { className: "button-row" },
    el("button", { type: "button", id: "fit-save-csv", textContent: "Estimates as CSV" }),
    el("button", { type: "button", id: "fit-save-report", textContent: "Printable report" }));
  box.replaceChildren(el("h3", { textContent: "Last fit of this model" }), ...reportParts(r), actions);
}

/**
 * The estimates as CSV: `#` lines with the figures of merit, one row per
 * parameter (full precision), then, after a blank line, the free parameters'
 * correlation matrix.
 */
export function reportCsv(doc, r) {
  const lines = [`# chiroptic fit report: ${doc.title ?? ""}`];
  for (const k of ["chi_square", "reduced_chi_square", "degrees_of_freedom", "points", "free_parameters", "aic", "bic", "iterations", "stop", "starts", "starts_at_best"]) lines.push(`# ${k}: ${r[k]}`);
  for (const w of r.warnings) lines.push(`# warning: ${w}`);
  lines.push("parameter,value,standard_error,mode,at_bound");
  const quote = (t) => (/[",\n]/.test(t) ? `"${t.replace(/"/g, '""')}"` : t);
  for (const p of r.parameters) lines.push([quote(p.name), String(p.value), p.standard_error === undefined ? "" : String(p.standard_error), p.mode, String(Boolean(p.at_bound))].join(","));
  // After a blank line, the correlation matrix of the free parameters.
  const names = r.correlation_names ?? [];
  if (names.length) {
    lines.push("", ["correlation", ...names.map(quote)].join(","));
    names.forEach((n, i) => lines.push([quote(n), ...names.map((_, j) => String(r.correlations[i * names.length + j]))].join(",")));
  }
  return `${lines.join("\n")}\n`;
}

/** A self-contained HTML report to print: figures of merit, estimates, the CD and ORD figures. */
function printableReport(doc, r) {
  const body = el("body", {}, el("h1", { textContent: doc.title || "Fit report" }), el("p", { textContent: `chiroptic fit report, ${new Date().toISOString().slice(0, 10)}; bands: ${doc.bands.length}` }), ...reportParts(r));
  // On paper every part is shown.
  body.querySelectorAll("details").forEach((d) => (d.open = true));
  for (const key of ["cd", "ord"]) {
    try {
      const fig = el("figure", {});
      fig.innerHTML = core.svg(key, { width: 640, height: 360, font_px: null, legend: true });
      fig.append(el("figcaption", { textContent: `${plotTitle(key)}: the fitted model (lines) and the data (points), residuals below` }));
      body.append(fig);
    } catch {
      // A plot the model cannot draw (no ORD data, a unit lacking sample data) is left out.
    }
  }
  const style = "body{font:13px system-ui,sans-serif;max-width:760px;margin:2em auto;color:#111}table{border-collapse:collapse}th,td{padding:2px 8px;text-align:left;border-bottom:1px solid #ccc}dl{display:grid;grid-template-columns:auto 1fr;gap:2px 12px}dd{margin:0}.unit{color:#555}.warn-text{color:#a00}figure{margin:1em 0;break-inside:avoid}figcaption{color:#555}th.num,td.num-text{text-align:right}";
  return `<!doctype html>\n<html lang="en"><head><meta charset="utf-8"><title>${el("i", { textContent: doc.title || "Fit report" }).innerHTML}</title><style>${style}</style></head>${body.outerHTML}</html>\n`;
}

/** A finished fit joins the comparison (its fitted document kept, to go back to). */
export function addComparison(doc, r) {
  fits.push({ doc: structuredClone(doc), r, bands: doc.bands.length, title: doc.title ?? "" });
  if (fits.length > KEPT_FITS) fits.shift();
  renderComparison();
}

function renderComparison() {
  $("fit-compare-box").hidden = fits.length === 0;
  const best = (k) => Math.min(...fits.map((f) => f.r[k]));
  const head = el("tr", {}, ...["Fit", "Bands", "Free", "Points", "χ²", "reduced χ²", "AIC", "BIC", ""].map((t) => el("th", { scope: "col", textContent: t })));
  const rows = fits.map((f, i) => {
    const mark = (k) => el("td", { className: f.r[k] === best(k) ? "best" : "", textContent: `${fmtText(f.r[k], 6)}${f.r[k] === best(k) ? " ◀" : ""}` });
    const use = el("button", { type: "button", className: "small", textContent: "Use", title: "Put this fit's model back (one undo step)" });
    use.addEventListener("click", () => {
      loadDocument(structuredClone(f.doc));
      setStatus(`Fit ${i + 1} of the session is the model again`);
    });
    return el("tr", {}, el("th", { scope: "row", textContent: String(i + 1) }), el("td", { textContent: String(f.bands) }), el("td", { textContent: String(f.r.free_parameters) }), el("td", { textContent: String(f.r.points) }), el("td", { textContent: fmtText(f.r.chi_square, 6) }), el("td", { textContent: fmtText(f.r.reduced_chi_square, 4) }), mark("aic"), mark("bic"), el("td", {}, use));
  });
  $("fit-compare").replaceChildren(el("thead", {}, head), el("tbody", {}, ...rows));
}

export function bindReport() {
  $("fit-report").addEventListener("click", (e) => {
    const r = state.doc.fit?.report;
    if (!r) return;
    if (e.target.id === "fit-save-csv") download(`${fileStem()}-fit.csv`, reportCsv(state.doc, r), "text/csv");
    if (e.target.id === "fit-save-report") download(`${fileStem()}-fit-report.html`, printableReport(state.doc, r), "text/html");
  });
}
