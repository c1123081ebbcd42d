/* An intake being profiled: poll its status and show the progress until it is done. */
(function () {
  "use strict";
  var node = document.querySelector("[data-poll-intake]");
  if (!node) return;
  var id = node.getAttribute("data-poll-intake");
  (function poll() {
    fetch("/api/v1/intakes/" + encodeURIComponent(id)).then(function (r) { return r.json(); })
      .then(function (body) {
        if (body.status === "ready" || body.status === "failed") { window.location.reload(); return; }
        document.getElementById("intake-status").textContent = body.status;
        document.getElementById("intake-progress").value = body.progress;
        document.getElementById("intake-stage").textContent =
          body.stage + " · " + Math.round(100 * body.progress) + " %";
        setTimeout(poll, 1000);
      }).catch(function () { setTimeout(poll, 3000); });
  })();
})();
