/* specgen: wide tables, equations and drawings that scroll sideways.  Each scrolling region is made
   reachable from the keyboard (tabindex), named for a screen reader after its caption,
   and, while it hides columns, shows a visible cue above it. */
(function () {
  function caption(el) {
    var prev = el.previousElementSibling;
    if (prev && prev.classList.contains("sg-table-caption")) return prev.textContent.trim();
    if (el.dataset.label) return el.dataset.label;
    return el.classList.contains("sg-eq") ? "equation" : "table";
  }
  /* A batching card's tables reflow on a phone (specgen.css): each row a block, each cell
     named by its column's header (data-label), so no column is hidden off the screen.
     The roles keep a screen reader's table navigation when the rows are shown as blocks. */
  function reflow() {
    /* marked by an attribute, not a class: the theme styles only tables without a class */
    var tables = document.querySelectorAll(".sg-card table:not([data-reflow])");
    Array.prototype.forEach.call(tables, function (table) {
      var heads = Array.prototype.map.call(table.querySelectorAll("thead th"), function (th) {
        th.setAttribute("role", "columnheader");
        return th.textContent.replace(/\s+/g, " ").trim();
      });
      table.setAttribute("role", "table");
      Array.prototype.forEach.call(table.querySelectorAll("tr"), function (tr) {
        tr.setAttribute("role", "row");
        Array.prototype.forEach.call(tr.querySelectorAll("td"), function (td, i) {
          td.setAttribute("role", "cell");
          if (heads[i]) td.setAttribute("data-label", heads[i]);
          if (td.textContent.trim() === "\u2014") td.classList.add("sg-empty");
        });
      });
      table.setAttribute("data-reflow", "");
    });
  }
  function fit() {
    reflow();
    var regions = document.querySelectorAll(".md-typeset__scrollwrap, .sg-eq, .md-typeset table.sg-signoff, .sg-drawing-scroll");
    Array.prototype.forEach.call(regions, function (el) {
      var scrolls = el.scrollWidth > el.clientWidth + 1;
      el.classList.toggle("sg-scrolls", scrolls);
      if (scrolls) {
        el.setAttribute("tabindex", "0");
        el.setAttribute("role", "region");
        el.setAttribute("aria-label", caption(el) + " (scrolls sideways)");
      } else if (el.getAttribute("role") === "region") {
        el.removeAttribute("tabindex");
        el.removeAttribute("role");
        el.removeAttribute("aria-label");
      }
    });
  }
  if (window.document$ && window.document$.subscribe) window.document$.subscribe(fit);
  window.addEventListener("load", fit);
  window.addEventListener("resize", fit);
})();
