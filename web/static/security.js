/* Tidewaiter: the session's CSRF token on every change the page makes.

   The token is in <meta name="csrf-token">. Every form posted by this page
   gets it as a hidden csrf_token field (multipart forms, whose bodies the
   server does not parse before checking, get it in the query instead), and
   every same-origin XMLHttpRequest or fetch that changes something sends it
   as the X-CSRF-Token header. Loaded before any other script of the page. */
(function () {
  "use strict";

  var meta = document.querySelector('meta[name="csrf-token"]');
  var token = meta ? meta.getAttribute("content") : "";
  if (!token) return;
  var SAFE = { GET: true, HEAD: true, OPTIONS: true };

  function sameOrigin(url) {
    try { return new URL(url, window.location.href).origin === window.location.origin; }
    catch (e) { return false; }
  }

  function arm(form) {
    if ((form.method || "get").toLowerCase() !== "post" || !sameOrigin(form.action)) return;
    if ((form.enctype || "").toLowerCase() === "multipart/form-data") {
      var url = new URL(form.action, window.location.href);
      url.searchParams.set("csrf_token", token);
      form.action = url.pathname + url.search;
    } else if (!form.querySelector('input[name="csrf_token"]')) {
      var input = document.createElement("input");
      input.type = "hidden";
      input.name = "csrf_token";
      input.value = token;
      form.appendChild(input);
    }
  }

  document.addEventListener("DOMContentLoaded", function () {
    Array.prototype.forEach.call(document.forms, arm);
  });
  document.addEventListener("submit", function (event) { arm(event.target); }, true);

  // A page script that sets the header itself keeps its own (set twice, the values would join).
  var open = XMLHttpRequest.prototype.open;
  var send = XMLHttpRequest.prototype.send;
  var setHeader = XMLHttpRequest.prototype.setRequestHeader;
  XMLHttpRequest.prototype.open = function (method, url) {
    this._tidewaiterArm = !SAFE[String(method).toUpperCase()] && sameOrigin(url);
    return open.apply(this, arguments);
  };
  XMLHttpRequest.prototype.setRequestHeader = function (name) {
    if (String(name).toLowerCase() === "x-csrf-token") this._tidewaiterArm = false;
    return setHeader.apply(this, arguments);
  };
  XMLHttpRequest.prototype.send = function () {
    if (this._tidewaiterArm) setHeader.call(this, "X-CSRF-Token", token);
    return send.apply(this, arguments);
  };

  if (window.fetch) {
    var originalFetch = window.fetch;
    window.fetch = function (input, init) {
      init = init || {};
      var method = (init.method || (input && input.method) || "GET").toUpperCase();
      var url = typeof input === "string" ? input : (input && input.url) || "";
      if (!SAFE[method] && sameOrigin(url)) {
        var headers = new Headers(init.headers || (input && input.headers) || {});
        if (!headers.has("X-CSRF-Token")) headers.set("X-CSRF-Token", token);
        init.headers = headers;
      }
      return originalFetch.call(this, input, init);
    };
  }
})();
