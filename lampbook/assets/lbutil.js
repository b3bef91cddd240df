// @ts-check
// Small pure helpers shared by the page scripts; unit-tested under Node (tests/js/).

/** Escape text for HTML. @param {unknown} s @returns {string} */
export function esc(s) {
  return String(s).replace(/[&<>"']/g, (c) => ({ "&": "&amp;", "<": "&lt;", ">": "&gt;", '"': "&quot;", "'": "&#39;" })[c] ?? c);
}

/** UTF-8 text as base64url (no padding), for a design carried in a link. @param {string} text */
export function b64encode(text) {
  const bytes = new TextEncoder().encode(text);
  let bin = "";
  for (const b of bytes) bin += String.fromCharCode(b);
  return btoa(bin).replace(/\+/g, "-").replace(/\//g, "_").replace(/=+$/, "");
}

/** The inverse of b64encode; throws on text that is not base64url or not UTF-8. @param {string} s */
export function b64decode(s) {
  if (!/^[A-Za-z0-9_-]*$/.test(s)) throw new Error("not base64url");
  const bin = atob(s.replace(/-/g, "+").replace(/_/g, "/"));
  return new TextDecoder("utf-8", { fatal: true }).decode(Uint8Array.from(bin, (c) => c.charCodeAt(0)));
}

/**
 * A number with an SI prefix and unit, three significant figures; "–" when not finite.
 * @param {number | null | undefined} x
 * @param {string} unit
 * @returns {string}
 */
export function si(x, unit) {
  if (x === null || x === undefined || !Number.isFinite(x)) return "–";
  if (x === 0) return "0 " + unit;
  /** @type {[number, string][]} */
  const P = [[1e-12, "p"], [1e-9, "n"], [1e-6, "µ"], [1e-3, "m"], [1, ""], [1e3, "k"], [1e6, "M"]];
  let best = P[0];
  for (const p of P) if (Math.abs(x) >= p[0]) best = p;
  return `${+(x / best[0]).toPrecision(3)} ${best[1]}${unit}`;
}

/**
 * The element `selector` finds under `root`: one the page's own markup always has (the plugin or the script
 * wrote it). Throws, naming the selector, when it is missing, rather than failing later on a null.
 * @param {ParentNode} root
 * @param {string} selector
 * @returns {HTMLElement}
 */
export function one(root, selector) {
  const found = root.querySelector(selector);
  if (!found) throw new Error(`lampbook: no ${selector} in the page`);
  return /** @type {HTMLElement} */ (found);
}

/**
 * The form control `selector` finds under `root` (an input, a select or a text area), as one() finds it.
 * @param {ParentNode} root
 * @param {string} selector
 * @returns {HTMLInputElement | HTMLSelectElement | HTMLTextAreaElement}
 */
export function control(root, selector) {
  return /** @type {HTMLInputElement | HTMLSelectElement | HTMLTextAreaElement} */ (one(root, selector));
}

/**
 * Every element `selector` finds under `root` (the page's own markup: HTML elements).
 * @param {ParentNode} root
 * @param {string} selector
 * @returns {NodeListOf<HTMLElement>}
 */
export function all(root, selector) {
  return root.querySelectorAll(selector);
}

/** The message of whatever was thrown. @param {unknown} e @returns {string} */
export function messageOf(e) {
  return String(e instanceof Error ? e.message : e);
}
