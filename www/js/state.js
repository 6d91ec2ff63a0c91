// Every piece of page state, declared in one place. Modules read and write
// these fields; none keeps page state of its own beyond caches.

export const state = {
  /** The document as typed: what files and links hold, valid or not. */
  doc: null,
  /** A copy of the last document that drew (what links and the autosave hold). */
  goodDoc: null,
  /** The link fragment last written to the address bar. */
  link: null,
  /** The core's reply for the last successful draw: frames, lines, range ... */
  drawn: null,
  /** The document drew at the last refresh. */
  valid: false,
  /** The core's error of the last refresh: { kind, field, message } or null. */
  coreError: null,
  /** Units of entry that are not part of the document. */
  ui: { centerUnit: "nm", widthUnit: "cm-1", concUnit: "mol/L", pathUnit: "cm" },
  /** Drawing options handed to the core (not part of the document). */
  options: { dark: false, contributions: true, highlight: null, pixel_ratio: 1, legend: false, hold_cd_range: null },
  /** Crosshair position in axis units, or null. */
  cursorX: null,
  /** Last values of each solvent kind, restored on switching back. */
  solventMemory: {},
  /** Canvas pixels per CSS pixel. */
  dpr: 1,
  /** The plot key shown alone in the wiki view, or null. */
  wiki: null,
  /** A zoom being dragged: { key, startPx, px } or null. */
  zoomDrag: null,
  /** A band being dragged by its CD peak: { i, r0, y0, px, py, pending } or null. */
  peakDrag: null,
  /** The page is printing: canvases keep their bitmaps. */
  printing: false,
  /** Whether the plots show a stale (last good) model. */
  stale: false,
  /** The colour panel's analyser angle (degrees) and light source key: page state, not the document's. */
  colour: { analyser_deg: 0, illuminant: null },
  /** The coupled system shown in its panel (an index into doc.systems): page state. */
  coupled: { shown: 0 },
  /** How the 3-D view of the chromophores is turned (degrees) and a drag of it: page state. */
  view3d: { yaw: -35, pitch: 20, drag: null },
};
