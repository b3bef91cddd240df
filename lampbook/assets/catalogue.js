// lampbook fixtures index: filter and sort the table of designs in the page.
// A classic script (no modules, no fetch), so it also works from files with no server.
// The rows carry their figures as data- attributes; the table is complete without this script.
// Re-initialises on every page of instant navigation (the theme's document$), never twice per table.
(function () {
  "use strict";

  function num(row, key) {
    var v = row.getAttribute("data-" + key);
    return v === null || v === "" ? null : Number(v);
  }

  function compare(key) {
    return function (a, b) {
      if (key === "name") return a.getAttribute("data-name").localeCompare(b.getAttribute("data-name"));
      var x = num(a, key === "verdict" ? "rank" : key);
      var y = num(b, key === "verdict" ? "rank" : key);
      if (x === y) return a.getAttribute("data-name").localeCompare(b.getAttribute("data-name"));
      if (x === null) return 1; // designs without the figure go last either way
      if (y === null) return -1;
      return x - y;
    };
  }

  function setup(box) {
    if (box.dataset.ready) return;
    box.dataset.ready = "1";
    var controls = box.querySelector(".lb-fx-controls");
    var find = box.querySelector(".lb-fx-find input");
    var verdict = box.querySelector(".lb-fx-verdict");
    var sort = box.querySelector(".lb-fx-sort");
    var dir = box.querySelector(".lb-fx-dir");
    var shown = box.querySelector(".lb-fx-shown");
    var none = box.querySelector(".lb-fx-none");
    var body = box.querySelector("tbody");
    var rows = Array.prototype.slice.call(body.rows);
    var total = rows.length;
    var summary = shown.textContent;

    function apply() {
      var words = find.value.toLowerCase().split(/\s+/).filter(Boolean);
      var want = verdict.value;
      var key = sort.value;
      var reverse = dir.getAttribute("aria-pressed") === "true";
      var cmp = compare(key);
      var sorted = rows.slice().sort(function (a, b) {
        var c = cmp(a, b);
        // missing figures stay last in both directions
        if (key !== "name" && key !== "verdict" && (num(a, key) === null || num(b, key) === null)) return c;
        return reverse ? -c : c;
      });
      var n = 0;
      var frag = document.createDocumentFragment();
      sorted.forEach(function (row) {
        var text = row.getAttribute("data-find");
        var ok = (!want || row.getAttribute("data-verdict") === want) && words.every(function (w) {
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
    var boxes = document.querySelectorAll(".lb-fixtures");
    for (var i = 0; i < boxes.length; i++) setup(boxes[i]);
  }

  if (window.document$ && typeof window.document$.subscribe === "function") {
    window.document$.subscribe(init);
  } else if (document.readyState === "loading") {
    document.addEventListener("DOMContentLoaded", init);
  } else {
    init();
  }
})();
