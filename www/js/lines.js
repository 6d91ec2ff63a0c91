// The lamp-line table: rotation φ, [α] and [Φ] at the polarimeter lines, from
// the core's reply. Each column shares one notation (one power of ten in its
// header when the values need one); every cell keeps its full value.

import { $, el } from "./dom.js";
import * as core from "./core.js";
import { fmtColumn } from "./format.js";

const COLUMNS = ["rotation_deg", "specific_rotation", "molar_rotation"];

/** "Q / unit" as the quantity over its unit; a column scale goes with the unit. */
function headCell(label, scale = "") {
  const [q, u] = label.split(" / ");
  const th = el("th", { scope: "col" }, el("span", { className: "th-label", textContent: q }));
  const unit = [scale.replace(/^×/, ""), u ?? ""].filter(Boolean).join(" ");
  if (unit) th.append(el("span", { className: "th-unit", textContent: unit }));
  return th;
}

export function renderLines(lines) {
  const ord = Object.fromEntries(core.catalog.ord.map((u) => [u.key, u.label]));
  const labels = { rotation_deg: ord.deg, specific_rotation: ord.specific_rotation, molar_rotation: ord.molar_rotation };
  const columns = Object.fromEntries(COLUMNS.map((key) => [key, fmtColumn(lines.map((l) => l[key] ?? NaN))]));
  $("lines-head").replaceChildren(
    headCell("Line"),
    headCell("λ (air) / nm"),
    ...COLUMNS.map((key) => headCell(labels[key], columns[key].scale)),
  );
  const rows = lines.map((l, row) => {
    const tr = el("tr", {}, el("th", { scope: "row", textContent: l.name }));
    const cell = (key, text, v) => {
      const td = el("td", { textContent: text });
      td.dataset.key = key;
      if (v !== null && v !== undefined) {
        td.dataset.value = String(v);
        td.title = String(v);
      }
      return td;
    };
    tr.append(cell("wavelength_nm", String(l.wavelength_nm), l.wavelength_nm));
    for (const key of COLUMNS) tr.append(cell(key, columns[key].texts[row], l[key]));
    return tr;
  });
  $("lines-rows").replaceChildren(...rows);
  const hasMass = lines.some((l) => l.specific_rotation !== null && l.specific_rotation !== undefined);
  // Polarimeters quote lamp lines in air; the model takes them as given.
  const air = "Lamp lines are air wavelengths, as polarimeters quote them.";
  $("lines-note").textContent = hasMass
    ? `Rotation of the sample as set above; hover a value for all its digits. ${air}`
    : `Specific rotation [α] needs the molar mass (Sample & solvent). ${air}`;
}
