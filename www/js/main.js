// The entry module: starts the core, then wires the page's parts together.
// Each part is a module with one concern (see DEVELOPERS.md, "The page").

import { $ } from "./dom.js";
import { state } from "./state.js";
import * as core from "./core.js";
import { sayDone, showNotice } from "./messages.js";
import { loadDocument } from "./edit.js";
import { bindHistory, resetHistory } from "./history.js";
import { readFragment, firstDocument, bindPersistence, reloadWith } from "./persist.js";
import { bindPlots, sizeCanvases } from "./plots.js";
import { bandHandles } from "./peakdrag.js";
import { bindWindow } from "./window.js";
import { bindSample } from "./sample.js";
import { bindBandTable } from "./bands.js";
import { bindFiles } from "./files.js";
import { bindData } from "./data.js";
import { bindReadings } from "./readings.js";
import { bindExport } from "./export.js";
import { bindShare } from "./share.js";
import { startWiki } from "./wiki.js";
import { bindColour } from "./colour.js";
import { bindCoupled } from "./coupled.js";
import { bindStates } from "./states.js";
import { bindFit } from "./fit.js";
import { bindPropose } from "./propose.js";
import { bindTheme, bindMenus, renderConventions } from "./chrome.js";

async function main() {
  await core.start((key) => $(`plot-${key}`));
  const demo = core.demoDocument();
  if (!demo.ok) throw new Error(`the built-in demo does not load: ${demo.error.message}`);
  // Read-only, for tests and scripts: the document (a copy) and the text each canvas shows.
  window.chiroptic = Object.freeze({
    document: () => JSON.parse(JSON.stringify(state.doc)),
    drawnText: (key) => core.drawnText(key),
    bandHandles: () => bandHandles().map(({ i, px, py }) => ({ i, px, py })),
    frames: () => structuredClone(state.drawn?.frames ?? []),
    // Present only when the module is the test build (feature panic-trigger).
    ...(core.panicForTests ? { panicForTests: core.panicForTests } : {}),
  });
  bindTheme();
  const fragment = readFragment();
  if (fragment.options.show !== undefined) {
    startWiki(fragment);
    document.documentElement.dataset.ready = "true";
    return;
  }
  bindWindow();
  bindSample();
  bindBandTable();
  bindCoupled();
  bindStates();
  bindFit();
  bindPropose();
  bindPlots();
  bindFiles();
  bindData();
  bindReadings();
  bindHistory();
  bindExport();
  bindShare();
  bindColour();
  bindMenus();
  renderConventions();
  sizeCanvases();

  const first = firstDocument(fragment, demo.doc);
  loadDocument(first.doc, { record: false });
  resetHistory();
  if (first.notes.length) showNotice(first.notes.join(" "), { passing: true });
  if (first.from === "autosave") sayDone("Restored the model autosaved in this browser");
  bindPersistence();
  core.whenStopped(offerReload);
  document.documentElement.dataset.ready = "true";
}

/** After a panic in the core: one click reloads the page on the last model the core accepted. */
function offerReload(box) {
  if (box.querySelector("button")) return;
  const lastGood = structuredClone(state.goodDoc ?? state.doc);
  const button = document.createElement("button");
  button.type = "button";
  button.id = "fatal-reload";
  button.textContent = "Reload with the last good model";
  button.addEventListener("click", () => reloadWith(lastGood));
  box.append(" ", button);
}

main().catch((e) => {
  const box = $("fatal");
  box.textContent = `The workbench could not start: ${e.message}`;
  box.hidden = false;
  console.error(e);
});
