/* specgen: when the site is opened straight from a folder (file://), the browser refuses
   to read ../versions.json, so the revision selector answers with an empty list instead of
   a failed request.  The static revisions page (../revisions.html) lists every revision. */
(function () {
  if (location.protocol !== "file:") return;
  var open = XMLHttpRequest.prototype.open;
  XMLHttpRequest.prototype.open = function (method, url) {
    var args = Array.prototype.slice.call(arguments);
    if (typeof url === "string" && /versions\.json(\?|$)/.test(url)) {
      args[1] = "data:application/json,%5B%5D";
    }
    return open.apply(this, args);
  };
})();
