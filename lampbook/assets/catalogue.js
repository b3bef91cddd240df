// @ts-check
// lampbook fixtures index: filter and sort the table of designs in the page.
// A classic script (no modules, no fetch), so it also works from files with no server.
// The rows carry their figures as data- attributes; the table is complete without this script.
// Re-initialises on every page of instant navigation (the theme's document$), never twice per table.
(function () {
  "use strict";

  /** @param {Element} row @param {string} key @returns {number | null} */
  function num(row, key) {
    const v = row.getAttribute("data-" + key);
    return v === null || v === "" ? null : Number(v);
  }

  /** @param {Element} row */
  function nameOf(row) {
    return row.getAttribute("data-name") || "";
  }

  /** @param {string} key @returns {(a: Element, b: Element) => number} */
  function compare(key) {
    return function (a, b) {
      if (key === "name") return nameOf(a).localeCompare(nameOf(b));
      const x = num(a, key === "verdict" ? "rank" : key);
      const y = num(b, key === "verdict" ? "rank" : key);
      if (x === y) return nameOf(a).localeCompare(nameOf(b));
      if (x === null) return 1; // designs without the figure go last either way
      if (y === null) return -1;
      return x - y;
    };
  }

  /**
   * The element the index page's markup always has under box (lampbook/fixtureindex.py writes it).
   * @param {HTMLElement} box @param {string} selector @returns {HTMLElement}
   */
  function part(box, selector) {
    return /** @type {HTMLElement} */ (box.querySelector(selector));
  }

  /** @param {HTMLElement} box */
  function setup(box) {
    if (box.dataset.ready) return;
    box.dataset.ready = "1";
    const controls = part(box, ".lb-fx-controls");
    const find = /** @type {HTMLInputElement} */ (part(box, ".lb-fx-find input"));
    const verdict = /** @type {HTMLSelectElement} */ (part(box, ".lb-fx-verdict"));
    const sort = /** @type {HTMLSelectElement} */ (part(box, ".lb-fx-sort"));
    const dir = part(box, ".lb-fx-dir");
    const shown = part(box, ".lb-fx-shown");
    const none = part(box, ".lb-fx-none");
    const body = /** @type {HTMLTableSectionElement} */ (part(box, "tbody"));
    /** @type {HTMLTableRowElement[]} */
    const rows = Array.prototype.slice.call(body.rows);
    const total = rows.length;
    const summary = shown.textContent;

    function apply() {
      const words = find.value.toLowerCase().split(/\s+/).filter(Boolean);
      const want = verdict.value;
      const key = sort.value;
      const reverse = dir.getAttribute("aria-pressed") === "true";
      const cmp = compare(key);
      const sorted = rows.slice().sort(function (a, b) {
        const c = cmp(a, b);
        // missing figures stay last in both directions
        if (key !== "name" && key !== "verdict" && (num(a, key) === null || num(b, key) === null)) return c;
        return reverse ? -c : c;
      });
      let n = 0;
      const frag = document.createDocumentFragment();
      sorted.forEach(function (row) {
        const text = row.getAttribute("data-find") || "";
        const ok = (!want || row.getAttribute("data-verdict") === want) && words.every(function (w) {
          return text.indexOf(w) >= 0;
        });
        row.hidden = !ok;
        if (ok) n += 1;
        frag.appendChild(row);
      });
      body.appendChild(frag);
      shown.textContent = n === total && !words.length && !want ? summary : "Showing " + n + " of " + total + ". " + summary;
      none.hidden = n !== 0;
      box.dataset.shown = String(n);
    }

    find.addEventListener("input", apply);
    verdict.addEventListener("change", apply);
    sort.addEventListener("change", apply);
    dir.addEventListener("click", function () {
      dir.setAttribute("aria-pressed", dir.getAttribute("aria-pressed") === "true" ? "false" : "true");
      apply();
    });
    controls.hidden = false;
    apply();
  }

  function init() {
    /** @type {NodeListOf<HTMLElement>} */
    const boxes = document.querySelectorAll(".lb-fixtures");
    for (let i = 0; i < boxes.length; i++) setup(boxes[i]);
  }

  if (window.document$ && typeof window.document$.subscribe === "function") {
    window.document$.subscribe(init);
  } else if (document.readyState === "loading") {
    document.addEventListener("DOMContentLoaded", init);
  } else {
    init();
  }
})();
