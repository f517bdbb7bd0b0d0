/* specgen: marks that depend on revisions issued after this one was built.  The output
   folder's revisions.js (written after every build) lists every revision; a script tag
   reads it from a web server and from a folder alike.  An older issued revision then says
   which one superseded it; the latest issued one names the draft in preparation beside it. */
(function () {
  var parts = location.pathname.split("/");
  var here = decodeURIComponent(parts[parts.length - 2] || "");
  function link(rev) {
    var a = document.createElement("a");
    a.href = "../" + encodeURIComponent(rev) + "/index.html";
    a.textContent = rev;
    return a;
  }
  function show() {
    var revs = window.specgenRevisions || [], me = null, draft = null;
    revs.forEach(function (r) {
      if (r.version === here) me = r;
      if (r.aliases.indexOf("draft") >= 0) draft = r;
    });
    var box = document.querySelector(".md-content__inner");
    if (!me || !box) return;
    var note = document.createElement("div");
    note.setAttribute("role", "note");
    if (me.status === "issued" && me.superseded_by) {
      if (document.querySelector(".sg-mark-superseded")) return;
      note.className = "sg-mark sg-mark-superseded";
      var strong = document.createElement("strong");
      strong.append("Superseded by ", link(me.superseded_by), " — do not use for the works");
      note.appendChild(strong);
    } else if (me.aliases.indexOf("current") >= 0 && draft) {
      note.className = "sg-mark sg-mark-beside";
      note.append("Latest issued revision. A draft, ", link(draft.version),
                  ", is in preparation beside it (not for construction).");
    } else {
      return;
    }
    var h1 = box.querySelector("h1");
    if (h1) h1.after(note); else box.prepend(note);
  }
  var s = document.createElement("script");
  s.src = "../revisions.js";
  s.onload = function () {
    if (document.readyState === "loading") document.addEventListener("DOMContentLoaded", show);
    else show();
  };
  document.head.appendChild(s);
})();
