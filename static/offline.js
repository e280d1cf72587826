// Warmstead offline: registers the service worker (static/sw.js), puts saves made with no
// connection into the outbox (static/offline-outbox.js), shows what waits in the header, asks
// before a sign-out drops waiting changes, and keeps a house's pages on request ("Take this
// house with me"). No inline script; loaded with defer. Without JavaScript none of this runs
// and every form posts as usual.
//
// Which forms wait in the outbox: every POST form whose action is under /houses/ (so a photo
// form there is included), and any other form marked data-outbox; never one marked
// data-outbox="off", nor sign-in/out. A form that builds its own body (a photo resized on the
// tablet) calls WarmsteadOutbox.queue(form, {body: formData}) when WarmsteadOffline.shouldQueue()
// says so.
(function () {
  "use strict";
  var box = window.WarmsteadOutbox;
  if (!box || !window.indexedDB) { return; }
  var waiting = 0;

  function outboxForm(form) {
    if (!form || form.tagName !== "FORM" || (form.getAttribute("method") || "get").toLowerCase() !== "post") { return false; }
    var flag = form.getAttribute("data-outbox");
    if (flag === "off") { return false; }
    var path = new URL(form.getAttribute("action") || location.pathname, location.href).pathname;
    if (path === "/logout" || path === "/login") { return false; }
    return flag !== null || path.indexOf("/houses/") === 0;
  }

  // Offline, or earlier changes still wait (a save must not overtake them).
  function shouldQueue() { return !navigator.onLine || waiting > 0; }

  function note(form, text) {
    var status = form.querySelector("#editor-status");
    if (status) { status.textContent = text; status.setAttribute("data-pending", "true"); return; }
    var p = form.querySelector(".outbox-note");
    if (!p) {
      p = document.createElement("p");
      p.className = "outbox-note";
      p.setAttribute("role", "status");
      form.appendChild(p);
    }
    p.textContent = text;
  }

  var KEPT_TEXT = "Kept on this tablet: it is sent when the connection returns.";

  function queueForm(form, submitter) {
    form.removeAttribute("data-unsaved");  // app.js's retry must not send it a second time
    note(form, "Keeping it on this tablet…");
    box.queue(form, { submitter: submitter }).then(function () {
      note(form, KEPT_TEXT);
      if (navigator.onLine) { box.flush(); }
    }, function () {
      note(form, "Could not keep this on the tablet (storage full or blocked). It is NOT saved: keep the page open and try again.");
    });
  }

  // Plain and htmx submits: in the capture phase, before htmx hears it.
  document.addEventListener("submit", function (evt) {
    var form = evt.target;
    if (form && form.matches && form.matches("form.signed-in")) { signOut(evt, form); return; }
    if (!outboxForm(form) || !shouldQueue()) { return; }
    evt.preventDefault();
    evt.stopPropagation();
    queueForm(form, evt.submitter);
  }, true);

  // Requests htmx starts on its own (autosave on change, the follow-up of app.js).
  document.addEventListener("htmx:confirm", function (evt) {
    var form = evt.detail.elt;
    if (evt.detail.verb !== "post" || !outboxForm(form) || !shouldQueue()) { return; }
    evt.preventDefault();
    var trigger = evt.detail.triggeringEvent;
    queueForm(form, trigger && trigger.submitter);
  });

  // --- the header's indicator and the choices ---------------------------------------------

  function clock(ms) { return new Date(ms).toLocaleTimeString([], { hour: "2-digit", minute: "2-digit" }); }

  function show(s) {
    waiting = s.waiting;
    var el = document.getElementById("outbox-status");
    if (el) {
      var text = "";
      if (s.waiting) {
        text = s.waiting + (s.waiting === 1 ? " change waits" : " changes wait") + " to be sent";
        if (s.conflicts.length) { text += " · " + s.conflicts.length + " need" + (s.conflicts.length === 1 ? "s" : "") + " your choice"; }
        else if (!navigator.onLine) { text += " (no connection)"; }
        else if (s.stop === "signin") { text += " · sign in again to send them"; }
      } else if (s.lastSent) {
        text = "All changes sent";
      }
      if (s.lastSent) { text += (text ? " · " : "") + "last sent " + clock(s.lastSent); }
      el.textContent = text;
      el.hidden = !text;
      el.setAttribute("data-waiting", String(s.waiting));
    }
    conflicts(s.conflicts);
  }

  function cell(row, text, tag) {
    var c = document.createElement(tag || "td");
    c.textContent = text;
    row.appendChild(c);
    return c;
  }

  function button(text, cls, onClick) {
    var b = document.createElement("button");
    b.type = "button";
    b.textContent = text;
    if (cls) { b.className = cls; }
    b.addEventListener("click", onClick);
    return b;
  }

  var SKIP = { csrf_token: true, version: true, idempotency_key: true, layer_count: true };

  function conflicts(items) {
    var main = document.getElementById("main");
    var panel = document.getElementById("outbox-choices");
    if (!items.length) { if (panel) { panel.remove(); } return; }
    if (!main) { return; }
    var fresh = !panel;
    if (fresh) {
      panel = document.createElement("section");
      panel.id = "outbox-choices";
      panel.className = "card outbox-choices";
      panel.setAttribute("aria-labelledby", "outbox-choices-h");
      main.insertBefore(panel, main.firstChild);
    }
    panel.textContent = "";
    var h = document.createElement("h2");
    h.id = "outbox-choices-h";
    h.tabIndex = -1;
    h.textContent = "A change made offline was not saved";
    panel.appendChild(h);
    var item = items[0];
    var p = document.createElement("p");
    if (item.state === "conflict") {
      p.textContent = "Someone saved this house after you made this change (" + (item.title || item.url) +
        ", made at " + clock(item.madeAt) + "). Nothing of yours was overwritten and nothing of theirs. Choose which to keep:";
    } else {
      p.textContent = "The server did not accept this change (" + (item.title || item.url) + "): " +
        ((item.problem && item.problem.messages || []).join(" ") || "status " + (item.problem && item.problem.status)) + ".";
    }
    panel.appendChild(p);
    if (item.state === "conflict") {
      var saved = (item.problem && item.problem.saved) || {};
      var table = document.createElement("table");
      table.className = "data outbox-diff";
      var head = document.createElement("tr");
      cell(head, "Field", "th"); cell(head, "You typed offline", "th"); cell(head, "Saved now", "th");
      var thead = document.createElement("thead"); thead.appendChild(head); table.appendChild(thead);
      var body = document.createElement("tbody");
      var shown = 0;
      item.entries.forEach(function (e) {
        var name = e[0];
        if (SKIP[name] || typeof e[1] !== "string") { return; }
        var now = Object.prototype.hasOwnProperty.call(saved, name) ? saved[name] : "";
        if (now === e[1] && item.problem.found) { return; }
        var row = document.createElement("tr");
        cell(row, item.labels[name] || name, "th").setAttribute("scope", "row");
        cell(row, e[1] || "(blank)");
        cell(row, item.problem.found ? (now || "(blank)") : "(not on the page now)");
        body.appendChild(row);
        shown++;
      });
      if (!shown) {
        var row = document.createElement("tr");
        var c = cell(row, "The values are the same; only the house changed meanwhile.");
        c.colSpan = 3;
        body.appendChild(row);
      }
      table.appendChild(body);
      var wrap = document.createElement("div"); wrap.className = "table-wrap"; wrap.appendChild(table);
      panel.appendChild(wrap);
    }
    var actions = document.createElement("p");
    actions.className = "outbox-actions";
    if (item.state === "conflict") {
      actions.appendChild(button("Send mine again", "primary", function () { decide(item.seq, "mine"); }));
      actions.appendChild(button("Keep the saved one", "", function () { decide(item.seq, "saved"); }));
    } else {
      actions.appendChild(button("Drop this change", "", function () { decide(item.seq, "drop"); }));
    }
    panel.appendChild(actions);
    if (fresh) { h.focus(); }
  }

  function decide(seq, choice) {
    var panel = document.getElementById("outbox-choices");
    if (panel) { Array.prototype.forEach.call(panel.querySelectorAll("button"), function (b) { b.disabled = true; }); }
    box.choose(seq, choice).then(show);
  }

  box.onChange(show);

  // A save went through: this page's forms of that house now stand on the version it made,
  // and the forms that waited say so.
  document.addEventListener("warmstead:sent", function (evt) {
    var d = evt.detail;
    if (!new RegExp("^/houses/" + d.house + "(/|$)").test(location.pathname)) { return; }
    Array.prototype.forEach.call(document.querySelectorAll("input[name=version]"), function (v) {
      if (v.value !== "" && Number(v.value) <= d.from) { v.value = String(d.version); }
    });
    Array.prototype.forEach.call(document.querySelectorAll(".outbox-note"), function (p) {
      p.textContent = "Sent at " + clock(Date.now()) + ". Reload the page to see it in place.";
    });
    var status = document.querySelector("#editor-status[data-pending]");
    if (status && status.textContent === KEPT_TEXT) { status.textContent = "Sent at " + clock(Date.now()) + "."; }
  });

  function tryFlush() { if (navigator.onLine) { box.flush().then(show); } }
  var OFFLINE_TEXT = "No connection: changes you make wait on this tablet and are sent when the connection returns.";
  function netBanner(on) {
    var b = document.getElementById("net-status");
    if (!b) { return; }
    if (on) { b.textContent = OFFLINE_TEXT; b.hidden = false; }
    else if (b.textContent === OFFLINE_TEXT) { b.hidden = true; b.textContent = ""; }
  }
  window.addEventListener("online", function () { netBanner(false); tryFlush(); });
  window.addEventListener("offline", function () { netBanner(true); box.summary().then(show); });
  document.addEventListener("visibilitychange", function () { if (!document.hidden) { tryFlush(); } });

  // --- sign-out: ask when changes still wait, then forget everything kept on this tablet ----

  var confirmed = false;
  function signOut(evt, form) {
    if (confirmed) { return; }
    evt.preventDefault();
    evt.stopPropagation();
    box.summary().then(function (s) {
      if (s.all > 0 && !document.getElementById("signout-confirm")) { askSignOut(form, s.all); return; }
      if (s.all === 0) { leave(form); }
    });
  }

  function askSignOut(form, n) {
    var panel = document.createElement("section");
    panel.id = "signout-confirm";
    panel.className = "card outbox-choices";
    panel.setAttribute("role", "alertdialog");
    panel.setAttribute("aria-labelledby", "signout-h");
    panel.setAttribute("aria-describedby", "signout-p");
    var h = document.createElement("h2");
    h.id = "signout-h";
    h.tabIndex = -1;
    h.textContent = "Sign out with changes not sent?";
    var p = document.createElement("p");
    p.id = "signout-p";
    p.textContent = n + (n === 1 ? " change made on this tablet has" : " changes made on this tablet have") +
      " not reached the server yet. Signing out deletes " + (n === 1 ? "it" : "them") +
      " from this tablet, with the pages kept for offline use.";
    var actions = document.createElement("p");
    actions.className = "outbox-actions";
    actions.appendChild(button("Keep them and stay signed in", "primary", function () { panel.remove(); tryFlush(); }));
    actions.appendChild(button("Sign out and delete them", "danger", function () { panel.remove(); leave(form); }));
    panel.appendChild(h); panel.appendChild(p); panel.appendChild(actions);
    var main = document.getElementById("main");
    main.insertBefore(panel, main.firstChild);
    h.focus();
  }

  function leave(form) {
    confirmed = true;
    box.forgetAll().then(function () { form.submit(); }, function () { form.submit(); });
  }

  // --- the service worker and "Take this house with me" -------------------------------------

  var KEEPABLE = /^\/houses(\/\d+(\/(surfaces|upgrades)\/\d+|\/compare)?)?\/?$/;

  function controlled() {
    if (navigator.serviceWorker.controller) { return Promise.resolve(); }
    return new Promise(function (resolve) {
      navigator.serviceWorker.addEventListener("controllerchange", function () { resolve(); }, { once: true });
    });
  }

  function takeHouse(btn) {
    var house = btn.getAttribute("data-take-house");
    var out = document.getElementById(btn.getAttribute("aria-describedby") || "") || btn;
    out.textContent = "Keeping this house on the tablet…";
    btn.disabled = true;
    var bytes = 0;
    function get(url) {
      return fetch(url, { credentials: "same-origin", headers: { "Accept": "text/html" } }).then(function (r) {
        if (!r.ok || r.redirected) { throw new Error("status " + r.status); }
        return r.text();
      }).then(function (t) { bytes += t.length; return t; });
    }
    controlled().then(function () { return get("/houses/" + house); }).then(function (html) {
      var doc = new DOMParser().parseFromString(html, "text/html");
      var urls = ["/houses/" + house + "/compare"];
      Array.prototype.forEach.call(doc.querySelectorAll("a[href]"), function (a) {
        var path = new URL(a.getAttribute("href"), location.href).pathname;
        if (path.indexOf("/houses/" + house + "/") === 0 && KEEPABLE.test(path) && urls.indexOf(path) < 0) { urls.push(path); }
      });
      return Promise.all(urls.map(get)).then(function () { return urls.length + 1; });
    }).then(function (n) {
      out.textContent = "Kept on this tablet for today: " + n + " pages (" + Math.round(bytes / 1024) +
        " KB). They open with no connection until you sign out.";
      btn.disabled = false;
    }, function () {
      out.textContent = "Not all of it could be kept (no connection?). Try again while online.";
      btn.disabled = false;
    });
  }

  function listKept() {
    var list = document.getElementById("kept-pages");
    if (!list || !window.caches) { return; }
    caches.open("warmstead-meta").then(function (c) { return c.match("/__warmstead/user"); }).then(function (r) {
      return r ? r.text() : "";
    }).then(function (user) {
      if (!user) { return; }
      return caches.open("warmstead-pages-" + user).then(function (c) { return c.keys(); }).then(function (reqs) {
        if (!reqs.length) { return; }
        list.textContent = "";
        reqs.forEach(function (req) {
          var path = new URL(req.url).pathname;
          var li = document.createElement("li");
          var a = document.createElement("a");
          a.className = "row-link";
          a.href = path;
          a.textContent = path === "/houses" ? "Houses list" : path.replace(/^\/houses\/(\d+)/, "House $1").replace(/\/surfaces\//, " · surface ").replace(/\/upgrades\//, " · upgrade ").replace(/\/compare$/, " · Compare");
          li.appendChild(a);
          list.appendChild(li);
        });
      });
    });
  }

  if ("serviceWorker" in navigator && window.caches) {
    navigator.serviceWorker.register("/sw.js", { scope: "/" }).then(function () {
      // The first visit was not fetched through the worker: fetch it again so it is kept.
      if (!navigator.serviceWorker.controller && box.user() && KEEPABLE.test(location.pathname) && navigator.onLine) {
        controlled().then(function () {
          // read the body to its end: an unread response through the worker stays open
          fetch(location.pathname, { credentials: "same-origin" }).then(function (r) { return r.arrayBuffer(); }, function () {});
        });
      }
    }, function () { /* no worker (private window, old browser): pages still work online */ });
    Array.prototype.forEach.call(document.querySelectorAll("[data-take-house]"), function (btn) {
      btn.hidden = false;
      btn.addEventListener("click", function () { takeHouse(btn); });
    });
  }

  if (!navigator.onLine) {
    var banner = document.getElementById("net-status");
    if (banner) {
      banner.textContent = "No connection: this is the page as kept on this tablet. Changes you make wait here and are sent when the connection returns.";
      banner.hidden = false;
    }
  }
  listKept();
  box.summary().then(show).then(tryFlush);
  window.WarmsteadOffline = { shouldQueue: shouldQueue, note: note };
})();
