// The page around the workbench: the light or dark theme (and print), the
// menus (one open at a time, Escape closes), the sign conventions, the help
// panel and its "?" key.

import { $, el, isTextEntry } from "./dom.js";
import { state } from "./state.js";
import * as core from "./core.js";
import { fmtText } from "./format.js";
import { redraw } from "./edit.js";
import { onResize } from "./plots.js";
import { showNotice } from "./messages.js";

export function bindTheme() {
  const mq = window.matchMedia("(prefers-color-scheme: dark)");
  const apply = () => {
    state.options.dark = mq.matches;
    document.documentElement.classList.toggle("dark", mq.matches);
    const [bg, ink, muted, grid] = core.themeColours(mq.matches);
    const root = document.documentElement.style;
    root.setProperty("--plot-bg", bg);
    root.setProperty("--plot-ink", ink);
    root.setProperty("--plot-muted", muted);
    root.setProperty("--plot-grid", grid);
  };
  apply();
  mq.addEventListener("change", () => {
    apply();
    redraw();
  });
  // Paper is white whatever the screen shows. Chromium prints the last
  // frame a canvas presented (a redraw in "beforeprint" comes out blank), so
  // dark plots are turned light by the print stylesheet instead (html.dark).
  // While printing, the canvases keep their bitmaps, scaled to the paper.
  window.addEventListener("beforeprint", () => (state.printing = true));
  window.addEventListener("afterprint", () => {
    state.printing = false;
    onResize();
  });
}

/** Menus close on Escape and on a click elsewhere; one is open at a time. */
export function bindMenus() {
  const menus = [...document.querySelectorAll("details.menu")];
  document.addEventListener("pointerdown", (e) => {
    for (const m of menus) if (m.open && !m.contains(e.target)) m.open = false;
  });
  document.addEventListener("keydown", (e) => {
    if (e.key === "?" && !isTextEntry(e.target) && e.target.tagName !== "SELECT") {
      e.preventDefault();
      $("help-menu").open = !$("help-menu").open;
      if ($("help-menu").open) $("help-menu").querySelector("summary").focus();
      return;
    }
    if (e.key !== "Escape") return;
    for (const m of menus) {
      if (m.open) {
        m.open = false;
        m.querySelector("summary").focus();
      }
    }
  });
  for (const m of menus) {
    m.addEventListener("toggle", () => {
      if (m.open) for (const other of menus) if (other !== m) other.open = false;
    });
  }
  $("notice-close").addEventListener("click", () => showNotice(null));
}

export function renderConventions() {
  const k = fmtText(core.catalog.mdeg_per_delta_a, 5);
  $("hint-cd").textContent =
    `Δε = εₗ − εᵣ and ΔA = Aₗ − Aᵣ: positive when left-circular light is absorbed more. ` +
    `θ / mdeg = ${k} × ΔA. A band with R > 0 gives positive CD.`;
  $("hint-ord").textContent =
    "φ = π l Δn / λ with Δn = nₗ − nᵣ. Positive φ is dextrorotatory (clockwise as seen facing the light source). " +
    "R > 0 gives a positive Cotton effect: the rotation peaks on the long-wavelength side of the band and dips on the short side.";
  const items = [
    "Δn = nₗ − nᵣ, Δε = εₗ − εᵣ, ΔA = Aₗ − Aᵣ (left minus right throughout).",
    `Ellipticity as CD instruments report it: θ / mdeg = ${k} × ΔA; [θ] = 100 θ/(c l) per mole.`,
    "Rotation φ > 0: dextrorotatory, clockwise as seen by an observer facing the light source.",
    "R > 0: positive CD band and positive Cotton effect (rotation peak on the long-wavelength side).",
    "[α] = φ / (l/dm · c/(g/mL)); [Φ] = [α] M / 100.",
  ];
  $("conventions-list").replaceChildren(...items.map((t) => el("li", { textContent: t })));
}
