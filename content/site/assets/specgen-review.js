/* Review comments on a published dossier, kept in this browser until exported.
 *
 * A reviewer selects a passage (or picks a section), writes a comment with their name,
 * organisation and a category, and exports every comment of the revision as one JSON file
 * (format "specgen-review/1", documented in the format reference) which the specifier takes
 * in with `specgen comments import`.  Nothing leaves the machine: no request is made, the
 * comments live in localStorage (or in memory where the browser refuses storage) and the
 * export is a download made in the page.  Text is always set as text, never as markup.
 */
(function () {
  "use strict";
  var ctx = window.specgenReview;
  if (!ctx || !document.body) { return; }
  var CATEGORIES = ["question", "required change", "advisory"];
  var storeKey = "specgen-review/" + ctx.project + "/" + ctx.revision;
  var memory = null;  // used when localStorage is refused (some browsers on file://)
  var lastSelection = null;

  function load() {
    if (memory) { return memory; }
    try { return JSON.parse(window.localStorage.getItem(storeKey) || "[]"); }
    catch (e) { memory = []; return memory; }
  }
  function save(list) {
    try { window.localStorage.setItem(storeKey, JSON.stringify(list)); memory = null; }
    catch (e) { memory = list; }
  }
  function remembered(name) {
    try { return window.localStorage.getItem("specgen-review/" + name) || ""; }
    catch (e) { return ""; }
  }
  function remember(name, value) {
    try { window.localStorage.setItem("specgen-review/" + name, value); } catch (e) { /* memory only */ }
  }
  function el(tag, attrs, text) {
    var node = document.createElement(tag);
    Object.keys(attrs || {}).forEach(function (k) { node.setAttribute(k, attrs[k]); });
    if (text !== undefined) { node.textContent = text; }
    return node;
  }
  function pageStem() {
    var file = decodeURIComponent(window.location.pathname.split("/").pop() || "index.html");
    return file.replace(/\.html?$/, "") || "index";
  }
  function content() { return document.querySelector("article") || document.body; }
  function headings() {
    return Array.prototype.slice.call(content().querySelectorAll("h1[id], h2[id], h3[id], h4[id]"));
  }
  function words(node) { return node ? node.textContent.replace(/\s+/g, " ").trim() : ""; }
  /* The places a comment can be about without selecting text: headings and figures. */
  function places() {
    return Array.prototype.slice.call(content().querySelectorAll(
      "h1[id], h2[id], h3[id], h4[id], figure[id]"));
  }
  /* What the panel calls the element with this id: a heading's words, a figure's caption,
   * a table row's first cell. */
  function labelOf(id) {
    var e = id ? document.getElementById(id) : null;
    if (!e) { return "The selected passage"; }
    if (/^H[1-6]$/.test(e.tagName)) { return words(e).slice(0, 90); }
    if (e.tagName === "FIGURE") {
      return "Figure: " + (words(e.querySelector("figcaption")) || id).slice(0, 90);
    }
    if (e.tagName === "TR") {
      return "Table row: " + (words(e.querySelector("td, th")) || id).slice(0, 90);
    }
    return "The selected passage";
  }
  function newKey() {
    var bytes = new Uint8Array(8);
    (window.crypto || window.msCrypto).getRandomValues(bytes);
    return "r" + Array.prototype.map.call(bytes, function (b) {
      return ("0" + b.toString(16)).slice(-2);
    }).join("");
  }
  function today() { return new Date().toISOString().slice(0, 10); }

  /* The id a passage is anchored to: the closest element with an id around it, else the
   * nearest heading before it. */
  function anchorOf(node) {
    var start = node && node.nodeType === 1 ? node : node && node.parentElement;
    for (var e = start; e && e !== document.body; e = e.parentElement) {
      if (e.id && /^[A-Za-z][A-Za-z0-9_:.-]{0,119}$/.test(e.id) && content().contains(e)) {
        return e.id;
      }
    }
    var found = null;
    headings().forEach(function (h) {
      if (start && (h.compareDocumentPosition(start) & Node.DOCUMENT_POSITION_FOLLOWING)) { found = h.id; }
    });
    return found;
  }
  document.addEventListener("selectionchange", function () {
    var sel = window.getSelection();
    if (!sel || sel.isCollapsed || !sel.rangeCount) { return; }
    var range = sel.getRangeAt(0);
    if (!content().contains(range.commonAncestorContainer) || panel.contains(range.commonAncestorContainer)) { return; }
    var text = sel.toString().replace(/\s+/g, " ").trim();
    if (text) { lastSelection = {quote: text.slice(0, 2000), anchor: anchorOf(range.startContainer)}; }
  });

  /* ---- the panel ---------------------------------------------------------------- */
  var toggle = el("button", {type: "button", "class": "sg-review-toggle", "aria-expanded": "false",
                             "aria-controls": "sg-review-panel"});
  var panel = el("aside", {id: "sg-review-panel", "class": "sg-review-panel", hidden: "",
                           "aria-labelledby": "sg-review-title"});
  var title = el("h2", {id: "sg-review-title", tabindex: "-1"}, "Review comments");
  var intro = el("p", {}, "Select a passage, a table row or a figure's caption (or choose a " +
    "section or figure from the list), then write your comment. Comments stay in this " +
    "browser until you export them as a file to send to the specifier; nothing is sent anywhere.");
  var form = el("form", {"class": "sg-review-form", novalidate: ""});
  var status = el("p", {"class": "sg-review-status", role: "status", "aria-live": "polite"});
  var list = el("ol", {"class": "sg-review-list", "aria-label": "Your comments on this revision"});
  var exportButton = el("button", {type: "button", "class": "sg-review-export"});
  var closeButton = el("button", {type: "button", "class": "sg-review-close"}, "Close");

  function field(label, control, id) {
    var wrap = el("p", {"class": "sg-review-field"});
    control.id = id;
    wrap.appendChild(el("label", {"for": id}, label));
    wrap.appendChild(control);
    return wrap;
  }
  var section = el("select", {name: "anchor"});
  var quote = el("textarea", {name: "quote", rows: "3", maxlength: "2000"});
  var category = el("select", {name: "category"});
  CATEGORIES.forEach(function (c) { category.appendChild(el("option", {value: c}, c)); });
  var text = el("textarea", {name: "text", rows: "5", maxlength: "4000", required: "",
                             "aria-required": "true"});
  var author = el("input", {name: "author", type: "text", maxlength: "200", required: "",
                            "aria-required": "true", autocomplete: "name"});
  var organisation = el("input", {name: "organisation", type: "text", maxlength: "200",
                                  autocomplete: "organization"});
  var role = el("input", {name: "role", type: "text", maxlength: "200", autocomplete: "organization-title"});
  var submit = el("button", {type: "submit"}, "Save comment");
  form.appendChild(field("Place on this page (section, figure or selected row)", section, "sg-review-anchor"));
  form.appendChild(field("Quoted text (from your selection; you may shorten it)", quote, "sg-review-quote"));
  form.appendChild(field("Category", category, "sg-review-category"));
  form.appendChild(field("Comment", text, "sg-review-text"));
  form.appendChild(field("Your name", author, "sg-review-author"));
  form.appendChild(field("Organisation", organisation, "sg-review-organisation"));
  form.appendChild(field("Your role (e.g. heritage officer)", role, "sg-review-role"));
  form.appendChild(submit);
  [title, intro, form, status, list, exportButton, closeButton].forEach(function (n) { panel.appendChild(n); });
  document.body.appendChild(toggle);
  document.body.appendChild(panel);
  /* The button comes last in the page, after every link of a long chapter: a link at the
   * start, shown when it has the keyboard's focus (as "Skip to content" is), opens the panel. */
  var jump = el("a", {href: "#sg-review-panel", "class": "sg-review-skip"},
                "Skip to review comments");
  var skip = document.querySelector(".md-skip");
  if (skip) { skip.parentNode.insertBefore(jump, skip.nextSibling); }
  else { document.body.insertBefore(jump, document.body.firstChild); }

  function fillSections(selected) {
    section.textContent = "";
    section.appendChild(el("option", {value: ""}, "The whole page"));
    places().forEach(function (h) {
      var o = el("option", {value: h.id}, labelOf(h.id));
      if (h.id === selected) { o.selected = true; }
      section.appendChild(o);
    });
    if (selected && section.value !== selected) {  // a table row or another element
      var o = el("option", {value: selected}, labelOf(selected));
      o.selected = true;
      section.appendChild(o);
    }
  }
  function refresh() {
    var items = load();
    toggle.textContent = "Review comments (" + items.length + ")";
    exportButton.textContent = "Export " + items.length + " comment" + (items.length === 1 ? "" : "s") + " as a file";
    exportButton.disabled = items.length === 0;
    list.textContent = "";
    items.forEach(function (c, i) {
      var li = el("li", {});
      li.appendChild(el("p", {"class": "sg-review-where"},
        c.category + " — " + (c.label || c.page) + " — " + c.date));
      if (c.quote) { li.appendChild(el("blockquote", {}, c.quote)); }
      li.appendChild(el("p", {}, c.text));
      var del = el("button", {type: "button"}, "Delete this comment");
      del.setAttribute("aria-label", "Delete comment " + (i + 1));
      del.addEventListener("click", function () {
        var rest = load(); rest.splice(i, 1); save(rest); refresh();
        status.textContent = "Comment deleted."; toggle.focus();
      });
      li.appendChild(del);
      list.appendChild(li);
    });
  }
  function open() {
    fillSections(lastSelection ? lastSelection.anchor : null);
    quote.value = lastSelection ? lastSelection.quote : "";
    author.value = author.value || remembered("author");
    organisation.value = organisation.value || remembered("organisation");
    role.value = role.value || remembered("role");
    panel.hidden = false;
    toggle.setAttribute("aria-expanded", "true");
    title.focus();
  }
  function close() {
    panel.hidden = true;
    toggle.setAttribute("aria-expanded", "false");
    toggle.focus();
  }
  toggle.addEventListener("click", function () { if (panel.hidden) { open(); } else { close(); } });
  jump.addEventListener("click", function (e) { e.preventDefault(); open(); });
  closeButton.addEventListener("click", close);
  panel.addEventListener("keydown", function (e) { if (e.key === "Escape") { close(); } });
  form.addEventListener("submit", function (e) {
    e.preventDefault();
    if (!text.value.trim() || !author.value.trim()) {
      status.textContent = "Write a comment and your name before saving.";
      (text.value.trim() ? author : text).focus();
      return;
    }
    var items = load();
    var chosen = section.options[section.selectedIndex];
    var pageTitle = (document.querySelector("article h1") || {}).textContent || pageStem();
    items.push({key: newKey(), page: pageStem(), anchor: section.value || null,
                label: pageTitle.trim() + (section.value ? " › " + chosen.textContent : ""),
                quote: quote.value.replace(/\s+/g, " ").trim(), text: text.value.trim(),
                author: author.value.trim(), organisation: organisation.value.trim(),
                role: role.value.trim(),
                category: category.value, date: today()});
    save(items);
    remember("author", author.value.trim());
    remember("organisation", organisation.value.trim());
    remember("role", role.value.trim());
    text.value = ""; quote.value = ""; lastSelection = null;
    refresh();
    status.textContent = "Comment saved in this browser (" + items.length + " in all).";
  });
  exportButton.addEventListener("click", function () {
    var doc = {format: "specgen-review/1", project: ctx.project, revision: ctx.revision,
               exported: new Date().toISOString().slice(0, 19) + "Z",
               comments: load().map(function (c) {  // the label is for this panel only
                 var copy = {}; Object.keys(c).forEach(function (k) { if (k !== "label") { copy[k] = c[k]; } });
                 return copy; })};
    var blob = new Blob([JSON.stringify(doc, null, 2) + "\n"], {type: "application/json"});
    var a = el("a", {href: URL.createObjectURL(blob),
                     download: ctx.project + "-" + ctx.revision + "-review.json"});
    document.body.appendChild(a); a.click(); a.remove();
    status.textContent = "Exported. Send the file to the specifier; the comments stay here until you delete them.";
  });
  refresh();
})();
