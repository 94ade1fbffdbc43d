// Sorting of the flagged-rows table: click (or Enter on) a heading with a sort key.
// Each flagged row is one <tbody> (its cells and its note), sorted by the tbody's data-* value.
(function () {
  "use strict";
  var table = document.querySelector("table.flagged");
  if (!table || !table.tHead) { return; }
  var heads = Array.prototype.slice.call(table.tHead.rows[0].cells);
  function sortBy(th) {
    var key = th.getAttribute("data-key");
    var numeric = th.getAttribute("data-type") === "num";
    var dir = th.getAttribute("aria-sort") === "ascending" ? "descending" : "ascending";
    heads.forEach(function (h) { if (h.hasAttribute("data-key")) { h.setAttribute("aria-sort", "none"); } });
    th.setAttribute("aria-sort", dir);
    var bodies = Array.prototype.slice.call(table.tBodies);
    bodies.sort(function (a, b) {
      var x = a.getAttribute("data-" + key) || "", y = b.getAttribute("data-" + key) || "";
      var c;
      if (numeric) {
        var u = x === "" ? Infinity : parseFloat(x), v = y === "" ? Infinity : parseFloat(y);
        c = u === v ? 0 : (u < v ? -1 : 1);
      } else {
        c = x.localeCompare(y);
      }
      if (c === 0) { c = parseFloat(a.getAttribute("data-row")) - parseFloat(b.getAttribute("data-row")); }
      return dir === "ascending" ? c : -c;
    });
    bodies.forEach(function (b) { table.appendChild(b); });
  }
  heads.forEach(function (th) {
    if (!th.hasAttribute("data-key")) { return; }
    th.setAttribute("aria-sort", "none");
    th.setAttribute("tabindex", "0");
    th.classList.add("sortable");
    th.addEventListener("click", function () { sortBy(th); });
    th.addEventListener("keydown", function (e) {
      if (e.key === "Enter" || e.key === " ") { e.preventDefault(); sortBy(th); }
    });
  });
}());
