// Warmstead photos: a photo chosen in a photo form (form[data-photo-form]) is shrunk on the
// tablet before it leaves it: drawn on a canvas with its long side at most 2,000 px and encoded
// as a JPEG (quality 0.85), and that Blob is sent in place of the camera's file. Online the card
// is swapped with the server's answer (the same fragment htmx gets); offline, or while earlier
// changes still wait, the form goes into the outbox (static/offline-outbox.js) with the shrunk
// Blob, in order with the edits. No inline script; loaded with defer. Without JavaScript the
// form posts the camera's file as it is and the server shrinks it.
(function () {
  "use strict";
  var MAX_SIDE = 2000;
  var QUALITY = 0.85;
  var KEPT_TEXT = "Photo kept on this tablet: it is sent when the connection returns.";

  // the outbox's own status line under the form (static/offline.js, loaded before this file)
  function note(form, text) { window.WarmsteadOffline.note(form, text); }

  function freshKey(form) {
    var input = form.querySelector("input[name=idempotency_key]");
    if (!input || !window.crypto || !crypto.getRandomValues) { return; }
    var bytes = new Uint8Array(16);
    crypto.getRandomValues(bytes);
    input.value = btoa(String.fromCharCode.apply(null, bytes)).replace(/\+/g, "-").replace(/\//g, "_").replace(/=+$/, "");
  }

  function decoded(file) {
    if (window.createImageBitmap) {
      return createImageBitmap(file, { imageOrientation: "from-image" }).catch(function () { return viaImage(file); });
    }
    return viaImage(file);
  }

  function viaImage(file) {
    return new Promise(function (resolve, reject) {
      var url = URL.createObjectURL(file);
      var img = new Image();
      img.onload = function () { URL.revokeObjectURL(url); resolve(img); };
      img.onerror = function () { URL.revokeObjectURL(url); reject(new Error("not an image")); };
      img.src = url;
    });
  }

  // The file as a JPEG Blob with its long side at most MAX_SIDE px (the file itself when it is
  // not an image the browser can draw: the server then says what is wrong).
  function shrink(file) {
    if (!file.type || file.type.indexOf("image/") !== 0) { return Promise.resolve(file); }
    return decoded(file).then(function (pic) {
      var w = pic.width, h = pic.height;
      var scale = Math.min(1, MAX_SIDE / Math.max(w, h));
      var canvas = document.createElement("canvas");
      canvas.width = Math.max(1, Math.round(w * scale));
      canvas.height = Math.max(1, Math.round(h * scale));
      var ctx = canvas.getContext("2d");
      ctx.fillStyle = "#fff";  // a transparent PNG on white, as the JPEG has no transparency
      ctx.fillRect(0, 0, canvas.width, canvas.height);
      ctx.drawImage(pic, 0, 0, canvas.width, canvas.height);
      if (pic.close) { pic.close(); }
      return new Promise(function (resolve) {
        canvas.toBlob(function (blob) { resolve(blob || file); }, "image/jpeg", QUALITY);
      });
    }, function () { return file; });
  }

  function jpegName(name) { return (name || "photo").replace(/\.[^.]*$/, "") + ".jpg"; }

  function keep(form, body) {
    var box = window.WarmsteadOutbox;
    note(form, "Keeping the photo on this tablet…");
    return box.queue(form, { body: body }).then(function () {
      note(form, KEPT_TEXT);
      form.reset();
      freshKey(form);  // the next photo from this form is a new one, not a resend
      if (navigator.onLine) { box.flush(); }
    }, function () {
      note(form, "Could not keep this photo on the tablet (storage full or blocked). It is NOT saved: try again.");
    });
  }

  function swap(form, html) {
    var card = form.closest("#photos");
    var tpl = document.createElement("template");
    tpl.innerHTML = html;
    var fresh = tpl.content.querySelector("#photos");
    if (!card || !fresh) { location.reload(); return; }
    card.replaceWith(fresh);
    if (window.htmx) { window.htmx.process(fresh); }
    var said = fresh.querySelector("[role=alert], [role=status]");
    if (said) { said.setAttribute("tabindex", "-1"); said.focus(); }
  }

  function send(form, body) {
    var off = window.WarmsteadOffline;
    var box = window.WarmsteadOutbox;
    if (box && off && off.shouldQueue()) { return keep(form, body); }
    note(form, "Sending the photo…");
    var token = body.get("csrf_token") || "";
    return fetch(form.getAttribute("action"), {
      method: "POST", body: body, credentials: "same-origin",
      headers: { "HX-Request": "true", "X-CSRF-Token": String(token), "Accept": "text/html" }
    }).then(function (res) {
      if (!res.ok) {
        note(form, res.status === 413 ? "The photo is too large to send." : "The photo was not taken (status " + res.status + "). Try again.");
        return;
      }
      return res.text().then(function (html) { swap(form, html); });
    }, function () {
      // the connection dropped on the way: keep it, as for any save made offline
      if (box) { return keep(form, body); }
      note(form, "No connection: the photo was not sent. Try again.");
    });
  }

  // In the capture phase on window: before offline.js (document, capture) and htmx see it.
  window.addEventListener("submit", function (evt) {
    var form = evt.target;
    if (!form || !form.matches || !form.matches("form[data-photo-form]")) { return; }
    var input = form.querySelector("input[type=file][name=photo]");
    var file = input && input.files && input.files[0];
    if (!file || !window.FormData || !window.fetch) { return; }  // the plain post, as without JS
    evt.preventDefault();
    evt.stopPropagation();
    if (form.getAttribute("data-busy") === "true") { return; }
    form.setAttribute("data-busy", "true");
    note(form, "Shrinking the photo…");
    shrink(file).then(function (blob) {
      var body = new FormData(form);
      body.set("photo", blob, blob === file ? file.name : jpegName(file.name));
      return send(form, body);
    }).then(function () { form.removeAttribute("data-busy"); }, function () { form.removeAttribute("data-busy"); });
  }, true);
})();
