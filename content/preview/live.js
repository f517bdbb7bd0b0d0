// The live preview's pages (specgen serve, specgen/preview_bar.py): asks the server every
// 1.5 s which figures and formulas of this page are drawn, puts each in its place as it
// lands and says so in the preview bar (a polite live region); reloads the page when a new
// build is shown, when this page (said to be being built) is laid out, or when one of its
// figures could not be drawn (the page then carries the notice).  Same origin only.
(function () {
  "use strict";
  var d = JSON.parse(document.getElementById("sg-preview-data").textContent);

  function say(n) {
    var e = document.getElementById("sg-preview-figures");
    if (e) e.textContent = n > 1 ? d.words[2].replace(/\d+/, n) : d.words[n];
  }

  function swap(figure) {
    document.querySelectorAll("img").forEach(function (img) {
      var src = (img.getAttribute("src") || "").split("?")[0];
      if (src === figure || src.endsWith("/" + figure)) img.src = src + "?drawn=" + Date.now();
    });
  }

  function tick() {
    fetch(d.url + "?page=" + encodeURIComponent(d.page), {cache: "no-store"})
      .then(function (r) { return r.json(); })
      .then(function (s) {
        var failed = s.failed.some(function (f) { return d.left.indexOf(f) >= 0; });
        if (s.generation !== d.generation || s.building !== d.building || failed) {
          location.reload();
          return;
        }
        d.left = d.left.filter(function (f) {
          if (s.drawing.indexOf(f) >= 0) return true;
          swap(f);
          return false;
        });
        say(d.left.length);
        if (d.left.length || d.building) setTimeout(tick, 1500);
      })
      .catch(function () { setTimeout(tick, 3000); });
  }

  setTimeout(tick, 1500);
})();
