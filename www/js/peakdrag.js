// Dragging a band by its CD peak: across, the centre follows the pointer; up
// and down, the rotatory strength scales so that the peak meets the pointer
// (a band's CD is proportional to its R). The CD axis is held still from the
// grab to the next edit, so the pointer and the peak stay in one frame of
// reference (a rescaling axis made the strength run away).
// One drag is one undo step.

import { state } from "./state.js";
import * as core from "./core.js";
import { safe } from "./dom.js";
import { fmtText } from "./format.js";
import { refresh, noted } from "./edit.js";
import { closeStep } from "./history.js";
import { sayDone } from "./messages.js";
import { frameOf, xAt, yAt, pxOf, pyOf } from "./plots.js";

/** A band is caught within this many CSS pixels of its CD peak. */
const GRAB_PX = 10;
let peakCache = null; // the band peaks of the drawn model

function peaks() {
  if (peakCache?.drawn !== state.drawn) peakCache = { drawn: state.drawn, peaks: core.bandPeaks() };
  return peakCache.peaks;
}

/** Each band's CD peak on screen: `[{ i, x, y, px, py }]` (inside the plot box). */
export function bandHandles() {
  const f = frameOf("cd");
  if (!f) return [];
  return peaks()
    .map((p, i) => p && { i, x: p.x, y: p.y, px: pxOf(f, p.x), py: pyOf(f, p.y) })
    .filter((h) => h && h.px >= f.left && h.px <= f.right && h.py >= f.top && h.py <= f.bottom);
}

function handleAt(px, py) {
  let best = null;
  for (const h of bandHandles()) {
    const d = Math.hypot(h.px - px, h.py - py);
    if (d <= GRAB_PX && (!best || d < best.d)) best = { ...h, d };
  }
  return best;
}

export const overPeak = (px, py) => Boolean(handleAt(px, py));

/** Starts a drag when (px, py) is on a band's peak; true if it is. */
export function grabPeak(px, py) {
  const grab = handleAt(px, py);
  if (!grab) return false;
  const r0 = state.doc.bands[grab.i]?.rotatory_strength_1e40_cgs;
  if (!Number.isFinite(r0) || r0 === 0) return false;
  state.peakDrag = { i: grab.i, r0, y0: grab.y, px, py, pending: false };
  // The CD axis stays as it is until the drag ends.
  state.options.hold_cd_range = frameOf("cd").y_range;
  return true;
}

/** Moves the band so that its peak sits under (px, py) on the held axis. */
function placePeak() {
  const drag = state.peakDrag;
  const f = frameOf("cd");
  const band = state.doc.bands[drag.i];
  if (!f || !band) return;
  const x = xAt(f, Math.min(f.right, Math.max(f.left, drag.px)));
  const y = yAt(f, Math.min(f.bottom, Math.max(f.top, drag.py)));
  const nm = safe(() => core.convertPosition(x, state.drawn.axis_unit, "nm"));
  if (!Number.isFinite(nm)) return;
  // A pixel is about a thousandth of the plot: these digits say all of it.
  band.center_nm = Number(nm.toPrecision(5));
  const r = band.rotatory_strength_1e40_cgs;
  const peak = peaks()[drag.i];
  const next = peak && r ? (r * y) / peak.y : (drag.r0 * y) / drag.y0;
  if (Number.isFinite(next)) band.rotatory_strength_1e40_cgs = Number(next.toPrecision(4));
  refresh();
}

export function movePeak(px, py) {
  Object.assign(state.peakDrag, { px, py });
  if (state.peakDrag.pending) return;
  state.peakDrag.pending = true;
  requestAnimationFrame(() => {
    if (!state.peakDrag) return;
    state.peakDrag.pending = false;
    // The peak's height in the new place is known after one draw.
    placePeak();
    placePeak();
  });
}

/** Settles on the release point and makes the drag one edit. */
export function releasePeak(px, py) {
  const { i } = state.peakDrag;
  Object.assign(state.peakDrag, { px, py });
  for (let k = 0; k < 3; k++) placePeak();
  state.peakDrag = null;
  // The axis stays as it was until the next edit, so the peak stays under
  // the pointer that let it go.
  closeStep();
  noted();
  const b = state.doc.bands[i];
  if (b) sayDone(`Band ${i + 1} (${core.bandName(b, i)}): centre ${fmtText(b.center_nm, 5)} nm, R ${fmtText(b.rotatory_strength_1e40_cgs)}`);
}
