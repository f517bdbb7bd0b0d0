/* specgen: wide tables and equations that scroll sideways.  Each scrolling region is made
   reachable from the keyboard (tabindex), named for a screen reader after its caption,
   and, while it hides columns, shows a visible cue above it. */
(function () {
  function caption(el) {
    var prev = el.previousElementSibling;
    if (prev && prev.classList.contains("sg-table-caption")) return prev.textContent.trim();
    return el.classList.contains("sg-eq") ? "equation" : "table";
  }
  function fit() {
    var regions = document.querySelectorAll(".md-typeset__scrollwrap, .sg-eq, .md-typeset table.sg-signoff");
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
