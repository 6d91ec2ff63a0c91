// The wiki view (`#c1.…&show=cd`): one plot filling its frame, with a key,
// no controls, nothing saved; it redraws when the frame is resized.

import { $ } from "./dom.js";
import { state } from "./state.js";
import * as core from "./core.js";
import { showNotice, problemText } from "./messages.js";
import { refresh } from "./edit.js";
import { layoutPlots, sizeCanvases, onResize, plotKeys, plotTitle } from "./plots.js";

export function startWiki(fragment) {
  const key = fragment.options.show;
  state.wiki = key;
  document.documentElement.classList.add("wiki");
  // A picture, not a workbench: the plots take no focus.
  document.querySelectorAll(".canvas-box").forEach((box) => box.removeAttribute("tabindex"));
  const fail = (text) => {
    $("plots").hidden = true;
    showNotice(text);
  };
  window.addEventListener("hashchange", () => location.reload());
  const keys = plotKeys();
  if (!keys.includes(key)) {
    const known = `${keys.slice(0, -1).join(", ")} or ${keys.at(-1)}`;
    return fail(`This view cannot be shown: unknown plot “${key}” after “&show=” (use ${known}).`);
  }
  if (!fragment.link) return fail("This view cannot be shown: the address holds no share link before “&show=”.");
  const r = core.linkDecode(fragment.link);
  if (!r.ok) return fail(`This plot cannot be shown: ${problemText(r.error)}.`);
  const doc = r.doc;
  doc.view = { ...(doc.view ?? {}), plots: [key] };
  if (doc.title) document.title = `${plotTitle(key)} · ${doc.title}`;
  state.options.legend = true;
  state.doc = doc;
  layoutPlots([key]);
  sizeCanvases();
  refresh();
  new ResizeObserver(onResize).observe($("plot-grid"));
}
