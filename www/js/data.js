// Measured data sets: a file dropped on the page or opened, the column
// picker where the header does not tell, and the data list (conditions,
// processing steps, show/hide, remove, Kramers-Kronig predictions). Every
// change goes through edit(), so history and the link follow. The numbers
// (import, processing, conversions, residuals) all come from the core.

import { $, el } from "./dom.js";
import { state } from "./state.js";
import * as core from "./core.js";
import { edit } from "./edit.js";
import { showNotice, sayDone } from "./messages.js";
import { fmtText as fmt, parseNumber } from "./format.js";
import { renderReadings } from "./readings.js";
import { openFile } from "./files.js";

let limits = null;
const dataLimits = () => (limits ??= core.dataCatalog());

/** A model file is a JSON object; anything else is read as a data file. */
export const looksLikeModel = (text) => /^\s*\{/.test(text.replace(/^\uFEFF/, ""));

/** One message, naming the file (and line), that changes nothing. */
function refuse(text) {
  showNotice(`${text.replace(/\.$/, "")}. The model and its data are unchanged.`, { passing: true });
}

/** Reads a data file: a table the header explains goes straight in; else the picker. */
export async function openDataFile(file) {
  const max = dataLimits().max_import_bytes;
  if (file.size > max) return refuse(`${file.name}: ${(file.size / 2 ** 20).toFixed(0)} MiB is larger than the ${max / 2 ** 20} MiB a data file may be`);
  importText(file.name, await file.text());
}

export function importText(name, text, block) {
  // A JCAMP-DX file of several blocks (a LINK file): the user picks one.
  if (block === undefined && /^\s*##/.test(text.replace(/^\uFEFF/, ""))) {
    const b = core.jcampBlocks(text, name);
    if (b.ok && b.blocks.length > 1) return showBlockPicker(name, text, b.blocks);
  }
  const p = core.importPreview(text, name, block);
  if (!p.ok) return refuse(p.error.message);
  if (p.recognised) return addSet(name, text, null, block);
  showPicker(name, text, p, block);
}

/** Which block of a JCAMP-DX file: its number, title, points and units. */
function showBlockPicker(name, text, blocks) {
  const dialog = $("data-picker");
  const pick = el(
    "select",
    { id: "pick-block" },
    ...blocks.map((b) => option(String(b.number), `${b.number}: ${b.title || "(untitled)"} — ${b.points} points${b.y_units ? `, ${b.y_units}` : ""}`)),
  );
  const add = el("button", { type: "button", id: "pick-add", textContent: "Read this block" });
  const cancel = el("button", { type: "button", id: "pick-cancel", textContent: "Cancel" });
  dialog.replaceChildren(
    el("h2", { textContent: `Which block? ${name}` }),
    el("p", { className: "hint-text", textContent: `The file holds ${blocks.length} data blocks; one data set is read from one block.` }),
    el("div", { className: "form-grid" }, el("label", { htmlFor: "pick-block", textContent: "Block" }), pick),
    el("div", { className: "button-row" }, add, cancel),
  );
  add.addEventListener("click", () => {
    dialog.close();
    importText(name, text, Number(pick.value));
  });
  cancel.addEventListener("click", () => dialog.close());
  dialog.showModal();
  pick.focus();
}

function addSet(name, text, choice, block) {
  const r = core.importDataSet(state.doc, text, name, choice, block);
  if (!r.ok) return refuse(r.error.message);
  state.doc.data = [...(state.doc.data ?? []), r.set];
  edit();
  sayDone(`Imported ${name} as “${r.set.name}” (${r.set.y.length} points)`);
  return true;
}

// ---------------------------------------------------------------- picker

const option = (value, text, selected = false) => el("option", { value, textContent: text, selected });

function showPicker(name, text, p, block) {
  const dialog = $("data-picker");
  const axis = el("select", { id: "pick-axis" }, ...p.units.axis.map((u) => option(u.key, u.label, u.key === p.axis)));
  const firstMeasured = Math.max(0, p.columns.findIndex((c) => c.kind?.role === "measured"));
  const column = el("select", { id: "pick-column" }, ...p.columns.map((c, k) => option(String(k), `${k + 1}: ${c.label || "(no header)"}`, k === firstMeasured)));
  const quantity = el("select", { id: "pick-quantity" }, option("cd", "CD"), option("ord", "ORD"), option("absorption", "absorption"));
  const unit = el("select", { id: "pick-unit" });
  const fillUnits = () => unit.replaceChildren(...p.units[quantity.value].map((u) => option(u.key, u.label)));
  const known = p.columns[firstMeasured]?.kind;
  if (known?.role === "measured") quantity.value = known.quantity;
  fillUnits();
  if (known?.role === "measured") unit.value = known.unit;
  quantity.addEventListener("change", fillUnits);
  const head = el("tr", {}, el("th", { textContent: p.x_label || "axis" }), ...p.columns.map((c, k) => el("th", { textContent: c.label || `column ${k + 1}` })));
  const rows = p.rows.map((r) => el("tr", {}, ...r.map((v) => el("td", { textContent: fmt(v) }))));
  const add = el("button", { type: "button", id: "pick-add", textContent: "Add data set" });
  const cancel = el("button", { type: "button", id: "pick-cancel", textContent: "Cancel" });
  const labelled = (id, text, control) => [el("label", { htmlFor: id, textContent: text }), control];
  dialog.replaceChildren(
    el("h2", { textContent: `Which columns? ${name}` }),
    el("p", { className: "hint-text", textContent: `The header does not say what every column holds (${p.points} rows, ${p.format}). Name them:` }),
    el("div", { className: "form-grid" }, ...labelled("pick-axis", "Axis unit", axis), ...labelled("pick-column", "Measured column", column), ...labelled("pick-quantity", "Quantity", quantity), ...labelled("pick-unit", "Unit", unit)),
    el("table", { className: "lines-table pick-preview" }, el("thead", {}, head), el("tbody", {}, ...rows)),
    ...(p.metadata.length ? [el("pre", { className: "pick-meta", textContent: p.metadata.slice(0, 8).join("\n") })] : []),
    el("div", { className: "button-row" }, add, cancel),
  );
  add.addEventListener("click", () => {
    const choice = { axis: axis.value, column: Number(column.value), quantity: quantity.value, unit: unit.value };
    dialog.close();
    addSet(name, text, choice, block);
  });
  cancel.addEventListener("click", () => dialog.close());
  dialog.showModal();
  axis.focus();
}

// ---------------------------------------------------------------- the list

const STEP_KINDS = [
  ["subtract_blank", "Subtract a blank"],
  ["zero_at", "Zero over a range"],
  ["smooth", "Savitzky-Golay smoothing"],
  ["drop_above_ht", "Drop points above an HT limit"],
  ["trim", "Trim to a range"],
];
const STEP_PARAMS = { zero_at: ["from", "to"], smooth: ["window", "order"], drop_above_ht: ["limit_v"], trim: ["from", "to"], subtract_blank: ["blank"] };

function stepText(step, axisUnit, info) {
  const [kind, p] = Object.entries(step)[0];
  switch (kind) {
    case "subtract_blank": return `blank “${p.blank}” subtracted`;
    case "zero_at": return `zeroed over ${fmt(p.from)}–${fmt(p.to)} ${axisUnit}`;
    case "smooth": return `Savitzky-Golay, window ${p.window}, order ${p.order}${info?.smoothed_rms != null ? ` (removed: rms ${fmt(info.smoothed_rms)} ${info.unit})` : ""}`;
    case "drop_above_ht": return `points above ${fmt(p.limit_v)} V dropped`;
    case "trim": return `trimmed to ${fmt(p.from)}–${fmt(p.to)} ${axisUnit}`;
    default: return kind;
  }
}

const sets = () => state.doc?.data ?? [];
/** What the core said of each set at the last good draw (points, residual, smoothing). */
let info = [];
let shape = null;

function changeSet(i, change) {
  change(state.doc.data[i]);
  edit();
}

function numberInput(id, value, label, field, slot, onValue) {
  const input = el("input", { id, type: "text", className: "num short", inputMode: "decimal", value: value ?? "", autocomplete: "off" });
  input.dataset.field = field;
  input.setAttribute("aria-describedby", slot);
  input.setAttribute("aria-label", label);
  input.addEventListener("change", () => {
    const n = parseNumber(input.value);
    if (n.error) {
      $(slot).textContent = `${label}: ${n.error}`;
      return;
    }
    onValue(n.empty ? null : n.value);
  });
  return input;
}

function conditionsRow(i, d, slot) {
  const c = d.conditions ?? {};
  const put = (key) => (v) =>
    changeSet(i, (set) => {
      const next = { ...(set.conditions ?? {}) };
      if (v === null) delete next[key];
      else next[key] = v;
      set.conditions = Object.keys(next).length ? next : undefined;
      if (!set.conditions) delete set.conditions;
    });
  const field = (key, label, unit) => [
    numberInput(`data-${i}-${key}`, c[key], `${label} of ${d.name}`, `data[${i}].conditions.${key}`, slot, put(key)),
    el("span", { className: "unit", textContent: unit }),
  ];
  return el("div", { className: "data-conditions" },
    el("span", { textContent: "c" }), ...field("concentration_mol_per_l", "Concentration", "mol/L"),
    el("span", { textContent: "l" }), ...field("path_length_cm", "Path length", "cm"),
    el("span", { textContent: "T" }), ...field("temperature_c", "Temperature", "°C"),
  );
}

function addStepRow(i, d, slot) {
  const kind = el("select", { id: `data-${i}-step-kind`, ariaLabel: `Processing step to add to ${d.name}` }, ...STEP_KINDS.map(([k, t]) => option(k, t)));
  const params = el("span", { className: "step-params" });
  const inputs = {};
  const fill = () => {
    params.replaceChildren();
    for (const p of STEP_PARAMS[kind.value]) {
      const id = `data-${i}-step-${p}`;
      inputs[p] = p === "blank"
        ? el("select", { id }, ...sets().filter((_, j) => j !== i).map((b) => option(b.name, b.name)))
        : el("input", { id, type: "text", className: "num short", inputMode: "decimal", autocomplete: "off" });
      params.append(el("label", { htmlFor: id, textContent: p === "limit_v" ? "limit / V" : p }), inputs[p]);
    }
  };
  kind.addEventListener("change", fill);
  fill();
  const add = el("button", { type: "button", id: `data-${i}-step-add`, textContent: "Add step" });
  add.addEventListener("click", () => {
    const p = {};
    for (const name of STEP_PARAMS[kind.value]) {
      const raw = inputs[name].value.trim();
      if (name === "blank") {
        if (!raw) return ($(slot).textContent = "There is no other data set to use as a blank");
        p.blank = raw;
        continue;
      }
      const n = parseNumber(raw);
      if (n.empty || n.error) return ($(slot).textContent = `${name}: ${n.error ?? "a value is needed"}`);
      p[name] = n.value;
    }
    changeSet(i, (set) => (set.processing = [...(set.processing ?? []), { [kind.value]: p }]));
  });
  return el("div", { className: "data-add-step" }, kind, params, add);
}

function setRow(i, d) {
  const slot = `data-${i}-error`;
  const row = el("li", { className: "data-set" });
  row.dataset.field = `data[${i}]`;
  row.setAttribute("aria-describedby", slot);
  const shown = el("input", { type: "checkbox", id: `data-${i}-shown`, checked: !d.hidden });
  shown.addEventListener("change", () => changeSet(i, (set) => (shown.checked ? delete set.hidden : (set.hidden = true))));
  const remove = el("button", { type: "button", className: "icon", id: `data-${i}-remove`, textContent: "✕", ariaLabel: `Remove data set ${d.name}` });
  remove.addEventListener("click", () => {
    state.doc.data.splice(i, 1);
    if (!state.doc.data.length) delete state.doc.data;
    edit();
  });
  const steps = (d.processing ?? []).map((s, k) => {
    const drop = el("button", { type: "button", className: "icon", textContent: "✕", ariaLabel: `Remove step ${k + 1} of ${d.name}` });
    drop.addEventListener("click", () => changeSet(i, (set) => set.processing.splice(k, 1)));
    const li = el("li", {}, el("span", { className: "step-text" }), drop);
    li.dataset.field = `data[${i}].processing[${k}]`;
    li.setAttribute("aria-describedby", slot);
    return li;
  });
  const other = d.quantity === "cd" ? "ORD" : "CD";
  const actions = el("div", { className: "button-row" });
  if (d.quantity !== "absorption") {
    const predict = el("button", { type: "button", id: `data-${i}-predict`, textContent: `Predict ${other} from this ${d.quantity.toUpperCase()}` });
    predict.addEventListener("click", () => {
      const r = core.kkPredict(state.doc, i);
      if (!r.ok) return ($(slot).textContent = r.error.message);
      state.doc.data.push(r.set);
      edit();
    });
    actions.append(predict);
  }
  row.append(
    el("div", { className: "data-head" }, shown, el("label", { htmlFor: `data-${i}-shown`, className: "data-name", textContent: d.name }), el("span", { className: "data-info" }), remove),
    conditionsRow(i, d, slot),
    el("ol", { className: "data-steps" }, ...steps),
    addStepRow(i, d, slot),
    actions,
    el("span", { id: slot, className: "field-error", role: "status" }),
  );
  return row;
}

/** The facts of each row (points, range, residual) and the step texts, from the last draw. */
function fillInfo() {
  document.querySelectorAll("#data-rows > li").forEach((row, i) => {
    const d = sets()[i];
    const s = info[i];
    if (!d) return;
    const facts = [`${d.quantity} · ${d.unit}`];
    if (s) facts.push(`${s.points} points`, `${fmt(s.x_range[0])}–${fmt(s.x_range[1])} ${d.axis_unit}`);
    if (s?.residual_rms != null) facts.push(`residual rms ${fmt(s.residual_rms)}`);
    if (s?.derived) facts.push("Kramers-Kronig prediction");
    row.querySelector(".data-info").textContent = facts.join(" · ");
    row.querySelectorAll(".step-text").forEach((t, k) => (t.textContent = stepText(d.processing[k], d.axis_unit, s)));
  });
}

export function renderData() {
  if (state.valid) {
    const r = core.dataRows(state.doc);
    info = r.ok ? r.sets : info;
  }
  const now = JSON.stringify(sets().map((d) => [d.name, d.quantity, d.unit, d.conditions, d.processing, d.hidden]));
  if (now !== shape) {
    shape = now;
    const focus = document.activeElement?.id;
    $("data-rows").replaceChildren(...sets().map((d, i) => setRow(i, d)));
    if (focus && $(focus)) $(focus).focus();
  }
  $("data-empty").hidden = sets().length > 0;
  fillInfo();
  linkNote();
  renderReadings(info);
}

/** Whether the share link can carry the document; said plainly when it cannot. */
let linkTooLong = false;
export const linkFits = () => !linkTooLong;
function linkNote() {
  linkTooLong = false;
  if (state.goodDoc?.data?.length) {
    const r = core.linkSize(state.goodDoc);
    linkTooLong = r.ok && !r.fits;
    if (linkTooLong) {
      $("data-link-note").textContent = `The data make the share link ${r.chars.toLocaleString("en")} characters long, more than the ${r.limit.toLocaleString("en")} a link may hold: share the document file instead (Save model).`;
    }
  }
  $("data-link-note").hidden = !linkTooLong;
}

export function bindData() {
  $("data-picker").addEventListener("cancel", () => $("data-picker").close());
  document.addEventListener("chiroptic:updated", renderData);
  // A file dropped anywhere on the page: a model opens, data are added.
  document.addEventListener("dragover", (e) => {
    if ([...(e.dataTransfer?.types ?? [])].includes("Files")) e.preventDefault();
  });
  document.addEventListener("drop", async (e) => {
    const files = [...(e.dataTransfer?.files ?? [])];
    if (!files.length) return;
    e.preventDefault();
    for (const f of files) await openFile(f);
  });
  $("data-open").addEventListener("click", () => $("file-input").click());
}
