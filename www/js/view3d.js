// The 3-D view of the shown coupled system on a 2-D canvas: an orthographic
// projection with z up, chromophores as dots, each transition dipole as an
// arrow through its chromophore, the x, y, z directions from the centroid. Drag
// (or the arrow keys) turns it; how it is turned is page state. It is drawn
// only when something changed, once per animation frame.

import { $ } from "./dom.js";
import { state } from "./state.js";
import { geometry, shownSystem } from "./coupled.js";
import { cssVar } from "./plots.js";

const HEIGHT_PX = 220;
/** Degrees turned per pixel dragged, and per arrow key. */
const DEG_PER_PX = 0.5;
const DEG_PER_KEY = 10;

let pending = false;
export function drawView3dSoon() {
  if (pending) return;
  pending = true;
  requestAnimationFrame(() => {
    pending = false;
    draw();
  });
}

/** Turns a point (Å) to the screen frame: [right, up, depth (away from the eye)]. */
function turn([x, y, z]) {
  const a = (state.view3d.yaw * Math.PI) / 180;
  const b = (state.view3d.pitch * Math.PI) / 180;
  const u = x * Math.cos(a) - y * Math.sin(a);
  const w = x * Math.sin(a) + y * Math.cos(a);
  return [u, z * Math.cos(b) + w * Math.sin(b), w * Math.cos(b) - z * Math.sin(b)];
}

function line(ctx, [x0, y0], [x1, y1]) {
  ctx.beginPath();
  ctx.moveTo(x0, y0);
  ctx.lineTo(x1, y1);
  ctx.stroke();
}

/** An arrow head at (x1, y1), pointing away from (x0, y0). */
function head(ctx, [x0, y0], [x1, y1], size) {
  if (Math.hypot(x1 - x0, y1 - y0) < size) return;
  const a = Math.atan2(y1 - y0, x1 - x0);
  ctx.beginPath();
  ctx.moveTo(x1, y1);
  ctx.lineTo(x1 - size * Math.cos(a - 0.45), y1 - size * Math.sin(a - 0.45));
  ctx.lineTo(x1 - size * Math.cos(a + 0.45), y1 - size * Math.sin(a + 0.45));
  ctx.closePath();
  ctx.fill();
}

function draw() {
  const canvas = $("chromophore-view");
  const system = shownSystem();
  if (!canvas || !system || canvas.closest("[hidden]")) return;
  const dpr = window.devicePixelRatio || 1;
  const w = canvas.clientWidth;
  const h = HEIGHT_PX;
  if (canvas.width !== Math.round(w * dpr) || canvas.height !== Math.round(h * dpr)) {
    canvas.width = Math.round(w * dpr);
    canvas.height = Math.round(h * dpr);
  }
  const ctx = canvas.getContext("2d");
  ctx.setTransform(dpr, 0, 0, dpr, 0, 0);
  // The theme's colours, read once per theme (see plots.js).
  const ink = cssVar("--ink") || "#000";
  const muted = cssVar("--muted") || "#666";
  const accent = cssVar("--accent") || "#06c";
  ctx.clearRect(0, 0, w, h);

  const g = geometry();
  const items = (g?.chromophores ?? []).map((c, j) => ({ ...c, name: system.chromophores[j]?.name || String(j + 1) }));
  // Centred on the chromophores' centroid and scaled so that all of them,
  // their arrows and the axes fit; arrows scale with the closest pair, so a
  // long stack is not drawn as a bundle of overlapping arrows.
  const centre = [0, 1, 2].map((k) => items.reduce((a, c) => a + c.position[k], 0) / Math.max(1, items.length));
  const spread = Math.max(1, ...items.map((c) => Math.hypot(...c.position.map((x, k) => x - centre[k]))));
  let closest = Infinity;
  for (let a = 0; a < items.length; a++)
    for (let b = a + 1; b < items.length; b++)
      closest = Math.min(closest, Math.hypot(...items[a].position.map((x, k) => x - items[b].position[k])));
  const half = Math.max(1.0, Math.min(0.45 * spread, Number.isFinite(closest) ? 0.4 * closest : 0.45 * spread));
  const reach = spread + half;
  const scale = (Math.min(w, h) / 2 - 16) / reach;
  // An arrow at least 12 px each side of its dot, so that it shows beside it.
  const arrow = Math.max(half, 12 / scale);
  const screen = (p) => {
    const [u, v, d] = turn(p.map((x, k) => x - centre[k]));
    return { x: w / 2 + u * scale, y: h / 2 - v * scale, d };
  };

  ctx.lineWidth = 1;
  ctx.font = "11px system-ui, sans-serif";
  ctx.strokeStyle = muted;
  ctx.fillStyle = muted;
  for (const [k, name] of ["x", "y", "z"].entries()) {
    const end = [...centre];
    end[k] += reach * 0.95;
    const o = screen(centre);
    const e = screen(end);
    ctx.setLineDash([3, 3]);
    line(ctx, [o.x, o.y], [e.x, e.y]);
    ctx.setLineDash([]);
    head(ctx, [o.x, o.y], [e.x, e.y], 6);
    ctx.fillText(name, e.x + 4, e.y - 3);
  }

  // Far things first, so that near ones are drawn over them; far ones paler.
  const depth = items.map((c) => turn(c.position.map((x, k) => x - centre[k]))[2]);
  const span = Math.max(1e-9, Math.max(...depth) - Math.min(...depth));
  const order = items.map((_, j) => j).sort((a, b) => depth[b] - depth[a]);
  for (const j of order) {
    const c = items[j];
    const p = screen(c.position);
    ctx.globalAlpha = items.length > 1 ? 1 - (0.45 * (depth[j] - Math.min(...depth))) / span : 1;
    ctx.strokeStyle = accent;
    ctx.fillStyle = accent;
    ctx.lineWidth = 2.5;
    for (const e of c.transitions) {
      if (!e) continue;
      const a = screen(c.position.map((x, k) => x - arrow * e[k]));
      const b = screen(c.position.map((x, k) => x + arrow * e[k]));
      line(ctx, [a.x, a.y], [b.x, b.y]);
      head(ctx, [a.x, a.y], [b.x, b.y], 9);
    }
    ctx.fillStyle = ink;
    ctx.beginPath();
    ctx.arc(p.x, p.y, 4.5, 0, 2 * Math.PI);
    ctx.fill();
    // Names only where they can be read.
    if (items.length <= 8) ctx.fillText(c.name, p.x + 7, p.y + 13);
  }
  ctx.globalAlpha = 1;
}

export function bindView3d() {
  const canvas = $("chromophore-view");
  canvas.addEventListener("pointerdown", (e) => {
    canvas.setPointerCapture(e.pointerId);
    state.view3d.drag = { x: e.clientX, y: e.clientY, yaw: state.view3d.yaw, pitch: state.view3d.pitch };
    canvas.classList.add("turning");
  });
  canvas.addEventListener("pointermove", (e) => {
    const d = state.view3d.drag;
    if (!d) return;
    state.view3d.yaw = d.yaw + (e.clientX - d.x) * DEG_PER_PX;
    state.view3d.pitch = Math.max(-90, Math.min(90, d.pitch + (e.clientY - d.y) * DEG_PER_PX));
    drawView3dSoon();
  });
  const end = () => {
    state.view3d.drag = null;
    canvas.classList.remove("turning");
  };
  canvas.addEventListener("pointerup", end);
  canvas.addEventListener("pointercancel", end);
  canvas.addEventListener("keydown", (e) => {
    const by = { ArrowLeft: [-1, 0], ArrowRight: [1, 0], ArrowUp: [0, -1], ArrowDown: [0, 1] }[e.key];
    if (!by) return;
    e.preventDefault();
    state.view3d.yaw += by[0] * DEG_PER_KEY;
    state.view3d.pitch = Math.max(-90, Math.min(90, state.view3d.pitch + by[1] * DEG_PER_KEY));
    drawView3dSoon();
  });
  window.addEventListener("resize", drawView3dSoon);
  window.matchMedia?.("(prefers-color-scheme: dark)").addEventListener?.("change", drawView3dSoon);
}
