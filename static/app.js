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
// Autosave forms (data-autosave, the layer editor). One save in flight per form: a change made
// meanwhile is held, and one follow-up goes after the answer with the latest values. An answer
// is swapped in only if the form still holds what that request sent; otherwise it would put
// back old values under the user's fingers, so only the house version it stored is taken
// (the follow-up must not be refused as someone else's edit). "Saved." is thus never shown
// for values other than those on the screen.
// The editor swaps with "settle:0ms" (layer_editor.html): htmx binds a swapped-in form's own
// change/submit triggers only when it settles (20 ms later by default), so a value typed and
// left in that window fired a change nobody heard: never sent, while "Saved." still showed.
(function () {
  "use strict";
  var states = {};
  var SKIP = { csrf_token: true, version: true, idempotency_key: true };
  function autosaveForm(elt) {
    return elt && elt.matches && elt.matches("form[data-autosave]") ? elt : null;
  }
  function stateOf(form) {
    var key = form.getAttribute("action") || "";
    if (!states[key]) { states[key] = { inFlight: false, sent: null, followUp: null }; }
    return states[key];
  }
  function snapshot(form) {
    var parts = [];
    Array.prototype.forEach.call(form.elements, function (el) {
      if (!el.name || el.disabled || SKIP[el.name] || el.type === "submit" || el.type === "button") { return; }
      if ((el.type === "checkbox" || el.type === "radio") && !el.checked) { return; }
      parts.push(el.name + "=" + el.value);
    });
    return parts.join("\n");
  }
  function say(form, text) {
    var status = form.querySelector("#editor-status");
    if (status) { status.textContent = text; status.setAttribute("data-pending", "true"); }
  }
  function current(key) {
    var forms = document.querySelectorAll("form[data-autosave]");
    for (var i = 0; i < forms.length; i++) { if (forms[i].getAttribute("action") === key) { return forms[i]; } }
    return null;
  }
  document.addEventListener("htmx:confirm", function (evt) {
    var form = autosaveForm(evt.detail.elt);
    if (!form) { return; }
    var st = stateOf(form);
    if (!st.inFlight) { return; }
    evt.preventDefault();
    var trigger = evt.detail.triggeringEvent;
    var button = trigger && trigger.submitter;
    var action = button && button.name === "action" ? button.value : "";
    st.followUp = { action: action || (st.followUp ? st.followUp.action : "") };
    say(form, "Saving… your latest change goes next.");
  });
  document.addEventListener("htmx:beforeRequest", function (evt) {
    var form = autosaveForm(evt.detail.elt);
    if (!form) { return; }
    var st = stateOf(form);
    st.inFlight = true;
    st.sent = snapshot(form);
    say(form, "Saving…");  // never leave an earlier answer's "Saved." over an edit not yet stored
  });
  var focusKept = null;
  document.addEventListener("htmx:beforeSwap", function (evt) {
    var config = evt.detail.requestConfig;
    var form = autosaveForm(config && config.elt);
    focusKept = null;
    if (!form || !evt.detail.shouldSwap) { return; }
    var st = stateOf(form);
    if (snapshot(form) !== st.sent) {
      evt.detail.shouldSwap = false;
      var answer = new DOMParser().parseFromString(String(evt.detail.serverResponse), "text/html");
      var sent = answer.querySelector("form[data-autosave]");
      var saved = sent && sent.getAttribute("data-saved-version");
      var version = form.querySelector("input[name=version]");
      if (saved && version) { version.value = saved; }
      say(form, st.followUp ? "Saving… your latest change goes next." : "Not saved yet: your latest entry is saved when you leave the field.");
      return;
    }
    var active = document.activeElement;
    if (active && active.id && form.contains(active) && typeof active.selectionStart === "number") {
      focusKept = { id: active.id, start: active.selectionStart, end: active.selectionEnd };
    }
  });
  document.addEventListener("htmx:afterSwap", function () {
    // htmx restores the caret only when it is not at 0, so a field entered with Tab (all of it
    // selected) would get the next key added in front of its value: restore it fully.
    if (!focusKept) { return; }
    var kept = focusKept;
    focusKept = null;
    var elt = document.getElementById(kept.id);
    if (elt && elt === document.activeElement && elt.setSelectionRange) {
      try { elt.setSelectionRange(kept.start, kept.end); } catch (e) { /* not a text field */ }
    }
  });
  document.addEventListener("htmx:afterRequest", function (evt) {
    var config = evt.detail.requestConfig;
    var form = autosaveForm(config && config.elt);
    if (!form) { return; }
    var key = form.getAttribute("action") || "";
    var st = stateOf(form);
    st.inFlight = false;
    var next = st.followUp;
    st.followUp = null;
    if (!next || (evt.detail.xhr && evt.detail.xhr.status === 0)) { return; }  // no answer: the retry sends the latest
    setTimeout(function () {
      var live = current(key);
      if (!live || !window.htmx) { return; }
      window.htmx.ajax("POST", live.getAttribute("hx-post"), {
        source: live, values: next.action ? { action: next.action } : {}
      });
    }, 0);
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
// The House page: a save in one card makes a new house version, and every other form on the
// page must carry it, or its next save is refused as someone else's edit. Each block htmx swaps
// in says the version it was rendered at (data-house-version); one that lost to another save
// is marked data-stale and never passes its newer version on. Without JS each save is a plain
// POST and redirect, and the reloaded page carries the new version everywhere.
document.addEventListener("htmx:afterSettle", function () {
  "use strict";
  var newest = -1;
  document.querySelectorAll("[data-house-version]:not([data-stale])").forEach(function (el) {
    var v = parseInt(el.getAttribute("data-house-version"), 10);
    if (v > newest) { newest = v; }
  });
  if (newest < 0) { return; }
  document.querySelectorAll("form input[name=version]").forEach(function (input) {
    var v = parseInt(input.value, 10);
    if (!isNaN(v) && v < newest) { input.value = String(newest); }
  });
});
