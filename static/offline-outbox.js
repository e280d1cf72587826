// Warmstead's outbox: saves made with no connection wait in IndexedDB, in the order they were
// made, and are sent in that order when the connection returns. No inline script; loaded with
// defer before offline.js, which wires it to the page. window.WarmsteadOutbox is its interface.
//
// An item: { seq (order), user (whose it is: <meta name="warmstead-user">), url (the form's
// action), page (where it was made), house (id, from the url), version (the house version the
// form was made on), idempotencyKey, entries ([name, value, filename] with value a string or
// a Blob, so a multipart photo form rides along), labels (field name -> label text), title,
// autosave, state ("waiting" | "conflict" | "refused"), problem (what the server said) }.
//
// Sending: one pass at a time; before it, GET /offline/state gives who is signed in here and the
// CSRF token of this session (the token the form was made with may be of an older sign-in).
// Only the signed-in user's items are sent. Each goes with its own version, except that a save
// that came after one of ours on the same house is moved onto the version ours produced (it was
// made on the same tablet, after ours): anyone else's save in between still meets a 409.
// A 409 stops the pass at that item and keeps it: the page shows what was typed and what is
// saved now, and the auditor chooses (resend on the saved version, or drop it). Nothing is
// ever overwritten silently.
(function () {
  "use strict";
  var DB_NAME = "warmstead-offline";
  var dbPromise = null;
  var listeners = [];
  var sending = null;

  function openDb() {
    if (dbPromise) { return dbPromise; }
    dbPromise = new Promise(function (resolve, reject) {
      var req = indexedDB.open(DB_NAME, 1);
      req.onupgradeneeded = function () {
        var db = req.result;
        if (!db.objectStoreNames.contains("outbox")) { db.createObjectStore("outbox", { keyPath: "seq", autoIncrement: true }); }
        if (!db.objectStoreNames.contains("meta")) { db.createObjectStore("meta", { keyPath: "key" }); }
      };
      req.onsuccess = function () {
        var db = req.result;
        db.onversionchange = function () { db.close(); dbPromise = null; };
        resolve(db);
      };
      req.onerror = function () { dbPromise = null; reject(req.error); };
    });
    return dbPromise;
  }

  function tx(store, mode, work) {
    return openDb().then(function (db) {
      return new Promise(function (resolve, reject) {
        var t = db.transaction(store, mode);
        var result;
        t.oncomplete = function () { resolve(result); };
        t.onerror = function () { reject(t.error); };
        t.onabort = function () { reject(t.error); };
        result = work(t.objectStore(store));
      });
    });
  }

  function all() {
    return tx("outbox", "readonly", function (s) {
      var box = { items: [] };
      s.openCursor().onsuccess = function (e) {
        var c = e.target.result;
        if (c) { box.items.push(c.value); c.continue(); }
      };
      return box;
    }).then(function (box) { return box.items; });
  }

  function putItem(item) { return tx("outbox", "readwrite", function (s) { s.put(item); }); }
  function removeItem(seq) { return tx("outbox", "readwrite", function (s) { s.delete(seq); }); }
  function getMeta(key) {
    return tx("meta", "readonly", function (s) {
      var box = {};
      s.get(key).onsuccess = function (e) { box.value = e.target.result; };
      return box;
    }).then(function (box) { return box.value ? box.value.value : null; });
  }
  function setMeta(key, value) { return tx("meta", "readwrite", function (s) { s.put({ key: key, value: value }); }); }

  function changed() {
    return summary().then(function (s) { listeners.forEach(function (fn) { fn(s); }); return s; });
  }

  function summary() {
    var user = currentUser();
    return Promise.all([all(), user ? getMeta("lastSent:" + user) : Promise.resolve(null)]).then(function (r) {
      var mine = r[0].filter(function (i) { return !user || i.user === user; });
      return {
        waiting: mine.length,
        all: r[0].length,
        conflicts: mine.filter(function (i) { return i.state !== "waiting"; }),
        lastSent: r[1],
        sending: Boolean(sending)
      };
    });
  }

  function currentUser() {
    var m = document.querySelector('meta[name="warmstead-user"]');
    return m ? m.getAttribute("content") : "";
  }

  function houseOf(url) {
    var m = /^\/houses\/(\d+)/.exec(new URL(url, location.href).pathname);
    return m ? Number(m[1]) : null;
  }

  function labelsOf(form) {
    var labels = {};
    Array.prototype.forEach.call(form.elements, function (el) {
      if (!el.name) { return; }
      var text = el.getAttribute("aria-label") || "";
      if (!text && el.id) {
        var l = document.querySelector('label[for="' + CSS.escape(el.id) + '"]');
        text = l ? l.textContent.replace(/\s+/g, " ").trim() : "";
      }
      if (text) { labels[el.name] = text; }
    });
    return labels;
  }

  function entriesOf(body) {
    var entries = [];
    body.forEach(function (value, name) {
      if (typeof value === "string") { entries.push([name, value, null]); }
      else { entries.push([name, value, value.name || "blob"]); }  // a File/Blob, kept as is
    });
    return entries;
  }

  function bodyOf(item, token, version) {
    var fd = new FormData();
    item.entries.forEach(function (e) {
      var name = e[0];
      var value = e[1];
      if (name === "csrf_token") { value = token; }
      if (name === "version" && version !== null) { value = String(version); }
      if (e[2] !== null && typeof value !== "string") { fd.append(name, value, e[2]); } else { fd.append(name, value); }
    });
    var multipart = item.entries.some(function (e) { return typeof e[1] !== "string"; }) || item.multipart;
    if (multipart) { return fd; }
    return new URLSearchParams(Array.from(fd.entries()));
  }

  // Put a form's submission in the outbox. body: a FormData (default: the form's own, with the
  // button pressed). An autosave right after the same form's autosave replaces it (the form
  // holds every field, so the newer one says it all): order is kept.
  function queue(form, opts) {
    opts = opts || {};
    var body = opts.body;
    if (!body) {
      try { body = new FormData(form, opts.submitter || null); } catch (e) {
        body = new FormData(form);
        if (opts.submitter && opts.submitter.name) { body.append(opts.submitter.name, opts.submitter.value); }
      }
    }
    if (opts.extra) { Object.keys(opts.extra).forEach(function (k) { body.set(k, opts.extra[k]); }); }
    var url = new URL(form.getAttribute("action") || location.pathname, location.href).pathname;
    var version = body.get("version");
    var heading = form.closest("section") && form.closest("section").querySelector("h2");
    var item = {
      user: currentUser(),
      url: url,
      page: location.pathname,
      house: houseOf(url),
      version: version === null || version === "" ? null : Number(version),
      idempotencyKey: body.get("idempotency_key") || null,
      entries: entriesOf(body),
      multipart: (form.getAttribute("enctype") || "").indexOf("multipart") === 0,
      labels: labelsOf(form),
      title: (document.querySelector("h1") ? document.querySelector("h1").textContent.trim() : "") +
        (heading ? " · " + heading.textContent.replace(/\s+/g, " ").trim() : ""),
      autosave: form.hasAttribute("data-autosave"),
      madeAt: Date.now(),
      state: "waiting"
    };
    return all().then(function (items) {
      var last = items[items.length - 1];
      if (item.autosave && last && last.autosave && last.url === item.url && last.user === item.user && last.state === "waiting") {
        item.seq = last.seq;
        item.version = last.version;
        item.madeAt = last.madeAt;
      }
      return putItem(item);
    }).then(changed);
  }

  function parse(html) { return new DOMParser().parseFromString(html, "text/html"); }

  function versionIn(doc) {
    var saved = doc.querySelector("[data-saved-version]");
    if (saved) { return Number(saved.getAttribute("data-saved-version")); }
    var v = doc.querySelector("input[name=version]");
    return v && v.value !== "" ? Number(v.value) : null;
  }

  function fieldsOf(form) {
    var out = {};
    if (!form) { return out; }
    Array.prototype.forEach.call(form.elements, function (el) {
      if (!el.name || el.type === "submit" || el.type === "button" || el.type === "file") { return; }
      if ((el.type === "checkbox" || el.type === "radio") && !el.checked) { return; }
      out[el.name] = el.value;
    });
    return out;
  }

  function problemsIn(doc) {
    return Array.prototype.map.call(doc.querySelectorAll("main .err, main [role=alert]"), function (p) {
      return p.textContent.replace(/\s+/g, " ").trim();
    }).filter(function (t, i, a) { return t && a.indexOf(t) === i; }).slice(0, 4);
  }

  // What is saved now for the item's form: fetch the page it was made on, read the same form.
  function savedNow(item) {
    return fetch(item.page, { credentials: "same-origin", headers: { "Accept": "text/html" } }).then(function (res) {
      return res.text().then(function (html) {
        var doc = parse(html);
        var form = null;
        Array.prototype.forEach.call(doc.querySelectorAll("form[method=post]"), function (f) {
          if (!form && new URL(f.getAttribute("action"), location.href).pathname === item.url) { form = f; }
        });
        return { version: versionIn(doc), fields: fieldsOf(form), found: Boolean(form) };
      });
    });
  }

  function state() {
    return fetch("/offline/state", { credentials: "same-origin", headers: { "Accept": "application/json" } }).then(function (res) {
      var json = (res.headers.get("Content-Type") || "").indexOf("application/json") === 0;
      if (!res.ok || res.redirected || !json) { return null; }
      return res.json();
    });
  }

  // Send what waits, in order. Resolves to a summary; never throws.
  function flush() {
    if (sending) { return sending; }
    if (!navigator.onLine) { return summary(); }
    sending = state().then(function (who) {
      if (!who) { return { stop: "signin" }; }
      return all().then(function (items) {
        var mine = items.filter(function (i) { return i.user === who.user; });
        return sendFrom(mine, 0, who.csrf_token);
      });
    }).catch(function () { return { stop: "network" }; }).then(function (outcome) {
      sending = null;
      return changed().then(function (s) { s.stop = outcome && outcome.stop; return s; });
    });
    return sending;
  }

  function sendFrom(items, i, token) {
    if (i >= items.length) { return Promise.resolve({ stop: null }); }
    var item = items[i];
    if (item.state !== "waiting") { return Promise.resolve({ stop: "choice" }); }
    return fetch(item.url, {
      method: "POST", credentials: "same-origin", body: bodyOf(item, token, item.version),
      headers: { "X-CSRF-Token": token, "Accept": "text/html" }
    }).then(function (res) {
      if (res.redirected && new URL(res.url).pathname === "/login") { return { stop: "signin" }; }
      if (res.status === 401) { return { stop: "signin" }; }
      if (res.status === 409) {
        return savedNow(item).then(function (now) {
          item.state = "conflict";
          item.problem = { saved: now.fields, version: now.version, found: now.found };
          return putItem(item).then(function () { return { stop: "choice" }; });
        });
      }
      if (res.status === 422 || res.status === 403 || res.status === 404 || res.status === 413) {
        return res.text().then(function (html) {
          item.state = "refused";
          item.problem = { status: res.status, messages: problemsIn(parse(html)) };
          return putItem(item).then(function () { return { stop: "choice" }; });
        });
      }
      if (!res.ok) { return { stop: "server" }; }
      return res.text().then(function (html) {
        var now = versionIn(parse(html));
        return afterSent(items, i, now).then(function () { return sendFrom(items, i + 1, token); });
      });
    }, function () { return { stop: "network" }; });
  }

  // One went through: drop it, note the time, and move this tablet's later saves of the same
  // house onto the version it produced.
  function afterSent(items, i, now) {
    var item = items[i];
    var work = [removeItem(item.seq), setMeta("lastSent:" + item.user, Date.now())];
    if (now !== null && item.house !== null && item.version !== null) {
      for (var k = i + 1; k < items.length; k++) {
        var later = items[k];
        if (later.house === item.house && later.version !== null && later.version <= item.version) {
          later.version = now;
          work.push(putItem(later));
        }
      }
      document.dispatchEvent(new CustomEvent("warmstead:sent", { detail: { house: item.house, from: item.version, version: now, seq: item.seq } }));
    }
    return Promise.all(work);
  }

  // The auditor's choice on a conflict: "mine" sends it again on the version saved now;
  // "saved" drops it (the saved one stays).
  function choose(seq, choice) {
    return all().then(function (items) {
      var item = items.filter(function (i) { return i.seq === seq; })[0];
      if (!item) { return null; }
      if (choice === "mine" && item.state === "conflict") {
        item.version = item.problem && item.problem.version !== null ? item.problem.version : item.version;
        item.state = "waiting";
        delete item.problem;
        return putItem(item);
      }
      return removeItem(seq);
    }).then(changed).then(flush);
  }

  // Everything on this tablet goes (sign-out): the outbox and the pages kept by the worker.
  function forgetAll() {
    var pages = window.caches ? caches.keys().then(function (names) {
      return Promise.all(names.filter(function (n) { return n.indexOf("warmstead-pages-") === 0 || n === "warmstead-meta"; })
        .map(function (n) { return caches.delete(n); }));
    }) : Promise.resolve();
    var db = openDb().then(function (d) { d.close(); dbPromise = null; }).catch(function () { return null; }).then(function () {
      return new Promise(function (resolve) {
        var req = indexedDB.deleteDatabase(DB_NAME);
        req.onsuccess = req.onerror = req.onblocked = function () { resolve(); };
      });
    });
    return Promise.all([pages, db]);
  }

  window.WarmsteadOutbox = {
    queue: queue, flush: flush, summary: summary, all: all, choose: choose, forgetAll: forgetAll,
    onChange: function (fn) { listeners.push(fn); },
    user: currentUser
  };
})();
