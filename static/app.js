// Warmstead: keep edits safe on a patchy connection. No inline script; loaded with defer.
(function () {
  "use strict";
  var banner = function () { return document.getElementById("net-status"); };
  var pending = null;
  function show(text) { var b = banner(); if (b) { b.textContent = text; b.hidden = false; } }
  function hide() { var b = banner(); if (b) { b.hidden = true; b.textContent = ""; } }
  document.addEventListener("htmx:sendError", function (evt) {
    // The request never reached the server: keep the form as typed and retry.
    var elt = evt.detail.elt;
    var form = elt && elt.closest ? elt.closest("form") : null;
    show("Not saved yet: no connection. Your entries are kept on this page; retrying…");
    if (form) {
      form.setAttribute("data-unsaved", "true");
      clearTimeout(pending);
      pending = setTimeout(function () { if (window.htmx) { window.htmx.trigger(form, "submit"); } }, 4000);
    }
  });
  document.addEventListener("htmx:responseError", function () {
    show("Not saved: the server had a problem. Your entries are kept on this page; try again.");
  });
  document.addEventListener("htmx:afterRequest", function (evt) {
    if (evt.detail.successful) { hide(); }
  });
  window.addEventListener("online", function () {
    var form = document.querySelector("form[data-unsaved='true']");
    if (form && window.htmx) { window.htmx.trigger(form, "submit"); }
  });
})();
// Upload progress for forms that name a <progress> element in data-progress.
document.addEventListener("htmx:xhr:progress", function (evt) {
  "use strict";
  var form = evt.target && evt.target.closest ? evt.target.closest("form[data-progress]") : null;
  if (!form || !evt.detail.lengthComputable) { return; }
  var bar = document.getElementById(form.getAttribute("data-progress"));
  if (bar) { bar.hidden = false; bar.value = Math.round(100 * evt.detail.loaded / evt.detail.total); }
});
