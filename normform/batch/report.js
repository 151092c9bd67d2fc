// Filters, search and keyboard moves for the records table. No network, no libraries.
(function () {
  "use strict";
  var table = document.getElementById("table");
  if (!table) return;
  var rows = Array.prototype.slice.call(table.tBodies[0].rows);
  var review = document.getElementById("f-review"), badid = document.getElementById("f-badid");
  var kind = document.getElementById("f-kind"), text = document.getElementById("f-text");
  var count = document.getElementById("f-count");
  var clusterOf = JSON.parse(document.getElementById("cluster-of").textContent || "{}");
  rows.forEach(function (row) {
    var n = clusterOf[row.id.slice(1)];
    if (n !== undefined) {
      var link = document.createElement("a");
      link.href = "#c" + n; link.className = "dup"; link.textContent = "duplicate: cluster " + n;
      row.cells[0].appendChild(link);
    }
  });
  function apply() {
    var needle = text.value.trim().toLowerCase(), shown = 0;
    rows.forEach(function (row) {
      var ok = (!review.checked || row.dataset.review === "1") &&
               (!badid.checked || row.dataset.badid === "1") &&
               (!kind.value || row.dataset.kind === kind.value) &&
               (!needle || row.textContent.toLowerCase().indexOf(needle) >= 0);
      row.hidden = !ok;
      if (ok) shown++;
    });
    count.value = shown + " of " + rows.length + " rows";
  }
  [review, badid, kind].forEach(function (el) { el.addEventListener("change", apply); });
  text.addEventListener("input", apply);
  var current = -1;
  function move(step) {
    var visible = rows.filter(function (r) { return !r.hidden; });
    if (!visible.length) return;
    var at = visible.indexOf(rows[current]);
    at = Math.max(0, Math.min(visible.length - 1, at + step));
    if (rows[current]) rows[current].classList.remove("current");
    current = rows.indexOf(visible[at]);
    visible[at].classList.add("current");
    visible[at].querySelector("a").focus();
  }
  document.addEventListener("keydown", function (ev) {
    var typing = /^(INPUT|SELECT|TEXTAREA)$/.test(document.activeElement.tagName);
    if (ev.key === "/" && !typing) { ev.preventDefault(); text.focus(); }
    else if (ev.key === "Escape" && typing) { document.activeElement.blur(); }
    else if ((ev.key === "j" || ev.key === "k") && !typing && !ev.ctrlKey && !ev.metaKey) {
      ev.preventDefault(); move(ev.key === "j" ? 1 : -1);
    }
  });
  apply();
})();
