// The Share menu: the model's link, and the embed code of one plot (the wiki
// view in an iframe). Copying goes through the clipboard, or selects the text
// for Ctrl+C where the browser refuses.

import { $, el } from "./dom.js";
import { state } from "./state.js";
import { currentLink, shareUrl, pageAddress } from "./persist.js";
import { linkFits } from "./data.js";
import { plotKeys, plotTitle } from "./plots.js";

export function fillShare() {
  const url = shareUrl();
  $("link-text").value = url ?? "";
  $("link-length").textContent = url ? `${url.length} characters` : linkFits() ? "the model has an error: no link" : "too long for a link: share the document file (Save model)";
  fillEmbed();
}

function embedSize(id, fallback) {
  const v = Number($(id).value);
  return Number.isInteger(v) && v >= 100 && v <= 4000 ? v : fallback;
}

function fillEmbed() {
  const link = currentLink();
  const key = $("embed-plot").value || plotKeys()[0];
  const w = embedSize("embed-width", 640);
  const h = embedSize("embed-height", 400);
  const title = `${plotTitle(key)}: ${state.goodDoc?.title || "chiroptic model"}`.replace(/[&"<>]/g, (c) => `&#${c.charCodeAt(0)};`);
  $("embed-text").value = link
    ? `<iframe src="${pageAddress()}#${link}&show=${key}" width="${w}" height="${h}" style="border:0" loading="lazy" title="${title}"></iframe>`
    : "";
  $("embed-note").hidden = false;
  // An embed of a file on this computer shows nothing to anyone else.
  $("embed-file-warning").hidden = location.protocol !== "file:";
}

/** Copies through the clipboard API, or selects the text for Ctrl+C where the browser refuses. */
async function copyText(text, field, status) {
  field.value = text;
  const refused = () => {
    field.focus();
    field.select();
    status.textContent = "The browser did not let the page copy: the text is selected, press Ctrl+C (⌘C on a Mac).";
  };
  if (!text) return (status.textContent = "Nothing to copy: the model has an error.");
  if (!navigator.clipboard?.writeText) return refused();
  try {
    // A browser that asks for permission may never answer: give up after a moment.
    await Promise.race([
      navigator.clipboard.writeText(text),
      new Promise((_, no) => setTimeout(() => no(new Error("no answer")), 1500)),
    ]);
    const where = location.protocol === "file:" ? " It points at this file on this computer." : "";
    status.textContent = `Copied (${text.length} characters).${field.id === "embed-text" ? where : ""}`;
  } catch {
    refused();
  }
}

export function bindShare() {
  $("embed-plot").replaceChildren(...plotKeys().map((key) => el("option", { value: key, textContent: plotTitle(key) })));
  $("share-menu").addEventListener("toggle", () => {
    if (!$("share-menu").open) return;
    const shown = state.drawn?.plots ?? plotKeys();
    if (!shown.includes($("embed-plot").value)) $("embed-plot").value = shown[0] ?? plotKeys()[0];
    $("copy-status").textContent = "";
    $("embed-status").textContent = "";
    fillShare();
  });
  $("copy-link").addEventListener("click", () => {
    fillShare();
    copyText(shareUrl(), $("link-text"), $("copy-status"));
  });
  $("copy-embed").addEventListener("click", () => {
    fillEmbed();
    copyText($("embed-text").value, $("embed-text"), $("embed-status"));
  });
  for (const id of ["embed-plot", "embed-width", "embed-height"]) $(id).addEventListener("input", fillEmbed);
  // The text fields select all on focus, for copying by hand.
  for (const id of ["link-text", "embed-text"]) $(id).addEventListener("focus", () => $(id).select());
}
