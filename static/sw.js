// Warmstead's service worker: keep the app shell and the house pages the auditor opened, so a
// reload with no signal shows the page as last seen. Served at /sw.js (scope "/").
//
// - App shell (CSS, scripts, htmx, the /offline page): network first, the kept copy when there
//   is no connection.
// - House pages (/houses, /houses/<id>, its surfaces, upgrades and Compare): network first; a
//   whole page that came back 200 for a signed-in user is kept in that user's own cache
//   ("warmstead-pages-<user>"), the user read from the page itself (<meta name="warmstead-user">).
//   With no connection the kept copy of the user signed in last is shown (at most 24 hours old),
//   else /offline. A page of another user, or of nobody (the sign-in page), is never shown.
// - Never kept: any request but GET, htmx fragments (HX-Request), the shared view (/s/...),
//   quotes, sign-in and account pages, the JSON API. Those go to the network untouched.
// Sign-out deletes the kept pages (static/offline.js, and the server's Clear-Site-Data).
"use strict";

var SHELL = "warmstead-shell-v1";
var META = "warmstead-meta";
var PAGES = "warmstead-pages-";
var USER_KEY = "/__warmstead/user";
var MAX_AGE_MS = 24 * 3600 * 1000;  // "for the day": a kept page older than this is not shown
var SHELL_URLS = [
  "/static/app.css",
  "/static/app.js",
  "/static/offline.js",
  "/static/offline-outbox.js",
  "/static/photos.js",
  "/static/vendor/htmx-2.0.11.min.js",
  "/offline"
];
var KEPT = /^\/houses(\/\d+(\/(surfaces|upgrades)\/\d+|\/compare)?)?\/?$/;
var USER_META = /<meta\s+name="warmstead-user"\s+content="([^"]*)"/;

self.addEventListener("install", function (event) {
  event.waitUntil(caches.open(SHELL).then(function (c) { return c.addAll(SHELL_URLS); })
    .then(function () { return self.skipWaiting(); }));
});

self.addEventListener("activate", function (event) {
  event.waitUntil(caches.keys().then(function (names) {
    return Promise.all(names.map(function (name) {
      if (name.indexOf("warmstead-shell-") === 0 && name !== SHELL) { return caches.delete(name); }
      if (name.indexOf(PAGES) === 0) { return purgeOld(name); }
      return null;
    }));
  }).then(function () { return self.clients.claim(); }));
});

function purgeOld(name) {
  return caches.open(name).then(function (cache) {
    return cache.keys().then(function (requests) {
      return Promise.all(requests.map(function (req) {
        return cache.match(req).then(function (res) { if (!fresh(res)) { return cache.delete(req); } return null; });
      }));
    });
  });
}

function fresh(res) {
  var at = res && Number(res.headers.get("X-Warmstead-Kept-At"));
  return Boolean(at) && Date.now() - at < MAX_AGE_MS;
}

function currentUser() {
  return caches.open(META).then(function (c) { return c.match(USER_KEY); })
    .then(function (res) { return res ? res.text() : ""; });
}

function setUser(user) {
  return caches.open(META).then(function (c) { return c.put(USER_KEY, new Response(user || "")); });
}

function pageKey(url) { return url.origin + url.pathname + url.search; }

function keep(url, response) {
  // Read the page's own user; keep it under that user, with the time it was kept.
  return response.clone().text().then(function (html) {
    var m = USER_META.exec(html.slice(0, 4096));
    var user = m ? m[1] : "";
    var done = setUser(user);
    if (!user) { return done; }
    var headers = new Headers(response.headers);
    headers.set("X-Warmstead-Kept-At", String(Date.now()));
    var copy = new Response(html, { status: 200, statusText: "OK", headers: headers });
    return Promise.all([done, caches.open(PAGES + user).then(function (c) { return c.put(pageKey(url), copy); })]);
  });
}

function keptPage(url) {
  return currentUser().then(function (user) {
    if (!user) { return null; }
    return caches.open(PAGES + user).then(function (c) {
      return c.match(pageKey(url), { ignoreVary: true }).then(function (res) {
        return res || c.match(url.origin + url.pathname, { ignoreVary: true });
      });
    }).then(function (res) { return fresh(res) ? res : null; });
  });
}

function offlinePage() {
  return caches.match("/offline", { cacheName: SHELL }).then(function (res) {
    return res || new Response("No connection, and this page was not kept on this tablet.",
      { status: 503, headers: { "Content-Type": "text/plain; charset=utf-8" } });
  });
}

function isHtml(response) {
  return (response.headers.get("Content-Type") || "").indexOf("text/html") === 0;
}

self.addEventListener("fetch", function (event) {
  var req = event.request;
  if (req.method !== "GET") { return; }  // never a POST: the page's outbox handles those
  var url = new URL(req.url);
  if (url.origin !== self.location.origin) { return; }
  if (req.headers.get("HX-Request")) { return; }  // fragments are never kept
  var path = url.pathname;
  if (path.indexOf("/static/") === 0 || path === "/offline") {
    event.respondWith(fetch(req).then(function (res) {
      if (res.ok && res.type === "basic" && SHELL_URLS.indexOf(path) >= 0) {
        var copy = res.clone();
        event.waitUntil(caches.open(SHELL).then(function (c) { return c.put(path, copy); }));
      }
      return res;
    }).catch(function () {
      return caches.match(path, { cacheName: SHELL, ignoreVary: true }).then(function (res) {
        return res || Response.error();
      });
    }));
    return;
  }
  var navigate = req.mode === "navigate";
  var keepable = KEPT.test(path);
  if (!keepable && !navigate) { return; }
  if (!keepable && (path === "/s" || path.indexOf("/s/") === 0)) { return; }  // the shared view
  event.respondWith(fetch(req).then(function (res) {
    if (res.status === 200 && res.type === "basic" && !res.redirected && isHtml(res)) {
      if (keepable) {
        event.waitUntil(keep(url, res));
      } else if (path === "/login") {
        event.waitUntil(setUser(""));  // nobody is signed in: show no one's kept pages
      }
    }
    return res;
  }).catch(function () {
    if (!navigate && !keepable) { return Response.error(); }
    return (keepable ? keptPage(url) : Promise.resolve(null)).then(function (res) {
      return res || (navigate ? offlinePage() : Response.error());
    });
  }));
});

self.addEventListener("message", function (event) {
  var data = event.data || {};
  if (data.type === "user") { event.waitUntil(setUser(String(data.user || ""))); }
});
