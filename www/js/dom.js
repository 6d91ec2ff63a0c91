// Small DOM helpers shared by every module.

export const $ = (id) => document.getElementById(id);

/** An element with properties and children. */
export function el(tag, props = {}, ...children) {
  const e = Object.assign(document.createElement(tag), props);
  e.append(...children);
  return e;
}

/** Writes a property only when it changes: each write costs the page a style pass. */
export function setIf(element, prop, value) {
  if (element[prop] !== value) element[prop] = value;
}

/** A text field, where Ctrl+Z is the browser's own undo of the typed text. */
export function isTextEntry(node) {
  if (!node) return false;
  if (node.isContentEditable || node.tagName === "TEXTAREA") return true;
  return node.tagName === "INPUT" && ["text", "search", "number", "url", "email", "tel", "password"].includes(node.type);
}

/** The value of `fn()`, or undefined when it throws. */
export const safe = (fn) => {
  try {
    return fn();
  } catch {
    return undefined;
  }
};
