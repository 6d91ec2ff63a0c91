// The model kept outside the page: its share link in the address bar
// (rewritten a moment after an edit, without history entries) and the
// autosave in localStorage (written only for models that draw). On load: a
// link in the address, else the autosave, else the demo.

import { $ } from "./dom.js";
import { state } from "./state.js";
import * as core from "./core.js";
import { showNotice, problemText, sayDone } from "./messages.js";
import { loadDocument } from "./edit.js";
import { fillShare } from "./share.js";
import { linkFits } from "./data.js";

const AUTOSAVE_KEY = "chiroptic.autosave";
/** Where an autosave that could not be read is set aside (nothing is thrown away). */
const UNREADABLE_KEY = "chiroptic.autosave.unreadable";

/** The address fragment: the link, then page options after '&' (`&show=cd`). */
export function readFragment() {
  const raw = location.hash.replace(/^#/, "");
  const [link, ...rest] = raw.split("&");
  const options = {};
  for (const part of rest) {
    const i = part.indexOf("=");
    options[i < 0 ? part : part.slice(0, i)] = i < 0 ? "" : part.slice(i + 1);
  }
  return { link, options };
}

/** The link fragment (no '#') of the last model that drew, or null. */
export function currentLink() {
  if (!state.goodDoc) return null;
  const r = core.linkEncode(state.goodDoc);
  // A link longer than links may be would not open: none is offered (data.js says so).
  return r.ok && linkFits() ? r.link : null;
}

/** The page's address without its fragment: where links and embeds point. */
export const pageAddress = () => location.href.split("#")[0];

export function shareUrl() {
  const link = currentLink();
  return link ? `${pageAddress()}#${link}` : null;
}

/** localStorage, or null where the browser refuses it (privacy modes, sandboxed frames). */
function storage() {
  try {
    return window.localStorage ?? null;
  } catch {
    return null;
  }
}

/** The autosaved document: `{ doc }`, `{ problem }` when unreadable, or `{}`. */
export function readAutosave() {
  const st = storage();
  let text = null;
  try {
    text = st?.getItem(AUTOSAVE_KEY) ?? null;
  } catch {
    return {};
  }
  if (text === null) return {};
  const r = core.readValidDocument(text);
  if (r.ok) return { doc: r.doc };
  try {
    st.setItem(UNREADABLE_KEY, text);
    st.removeItem(AUTOSAVE_KEY);
  } catch {
    // Storage full or refused: the bad value stays and is ignored again next time.
  }
  return { problem: problemText(r.error) };
}

let autosaveFailed = false;
function writeAutosave(doc) {
  const st = storage();
  if (!st) return;
  try {
    st.setItem(AUTOSAVE_KEY, JSON.stringify(doc));
    autosaveFailed = false;
  } catch (e) {
    if (autosaveFailed) return; // said once until it works again
    autosaveFailed = true;
    const full = e?.name === "QuotaExceededError" || e?.code === 22;
    const why = full ? "this browser's storage for the page is full" : `the browser refused it (${e?.message ?? e})`;
    showNotice(`Autosave stopped: ${why}. Your model is still here; save it as a file to keep it.`);
  }
}

let persistTimer = null;
/** The address and the autosave follow the model, a moment after the last edit. */
export function persistSoon(ms = 300) {
  clearTimeout(persistTimer);
  persistTimer = setTimeout(persist, ms);
}

/**
 * Reloads the page on `doc` (after the core stopped, when links can no
 * longer be made): the autosave holds it and the address drops its link, so
 * that the new page opens the autosave.
 */
export function reloadWith(doc) {
  clearTimeout(persistTimer);
  writeAutosave(doc);
  history.replaceState(null, "", location.pathname + location.search);
  location.reload();
}

function persist() {
  if (state.wiki || !state.goodDoc) return;
  const link = currentLink();
  if (link) {
    state.link = link;
    // replaceState: no history entry per edit, and no hashchange.
    if (location.hash.slice(1) !== link) history.replaceState(null, "", `#${link}`);
    if ($("share-menu").open) fillShare();
  } else if (location.hash) {
    // The old link no longer holds this model.
    history.replaceState(null, "", location.pathname + location.search);
  }
  writeAutosave(state.goodDoc);
}

/** Opens a link that arrived while the page runs; a bad one leaves the model alone. */
function openLink(text) {
  const r = core.linkDecode(text);
  if (!r.ok) {
    showNotice(`This link cannot be opened: ${problemText(r.error)}. Your model is unchanged.`, { passing: true });
    // The address goes back to the model on screen.
    persistSoon(0);
    return;
  }
  showNotice(null);
  loadDocument(r.doc);
  sayDone("Opened the model of the link (Undo returns to the one before)");
}

function onHashChange() {
  const f = readFragment();
  // The wiki view is a page of its own.
  if (f.options.show !== undefined) return location.reload();
  // An emptied address is no link: the model stays (and its link comes back).
  if (!f.link) return persistSoon(0);
  if (f.link === state.link) return;
  openLink(f.link);
}

/**
 * The first document: a link in the address wins; else the autosave; else
 * the demo. Returns { doc, from, notes } (notes: sentences for the banner).
 */
export function firstDocument(fragment, demo) {
  const notes = [];
  if (fragment.link) {
    const r = core.linkDecode(fragment.link);
    if (r.ok) return { doc: r.doc, from: "link", notes };
    notes.push(`This link cannot be opened: ${problemText(r.error)}.`);
  }
  const saved = readAutosave();
  if (saved.problem) notes.push(`The model autosaved in this browser could not be read (${saved.problem}); it was set aside.`);
  if (notes.length) notes.push(saved.doc ? "Showing your autosaved model instead." : "Showing the invented demo instead.");
  if (saved.doc) return { doc: saved.doc, from: "autosave", notes };
  return { doc: demo, from: "demo", notes };
}

export function bindPersistence() {
  window.addEventListener("hashchange", onHashChange);
}
