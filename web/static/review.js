/* Tidewaiter intake page, review side: record a decision, post and resolve comments on
   flags, choose the baseline. Each action goes through the API with the session's CSRF
   token, then the page reloads to show the stored result. */
(function () {
  "use strict";

  var csrf = (document.querySelector("meta[name=csrf-token]") || {}).content || "";

  function send(method, url, payload) {
    return fetch(url, {
      method: method,
      headers: { "Content-Type": "application/json", "X-CSRF-Token": csrf },
      body: payload === undefined ? undefined : JSON.stringify(payload),
      credentials: "same-origin",
    }).then(function (response) {
      return response.json().catch(function () { return {}; }).then(function (body) {
        if (!response.ok) throw new Error(body.detail || response.statusText);
        return body;
      });
    });
  }

  function reloadAt(anchor) {
    if (anchor) window.location.hash = anchor;
    window.location.reload();
  }

  var decision = document.getElementById("decision-form");
  if (decision) {
    decision.addEventListener("submit", function (event) {
      event.preventDefault();
      var data = new FormData(decision);
      var message = document.getElementById("decision-message");
      if (!data.get("verdict")) { message.textContent = "Choose a verdict."; return; }
      if (data.get("verdict") !== "accepted" && !String(data.get("reason") || "").trim()) {
        message.textContent = "Say why: rejecting or accepting with caveats needs a reason.";
        return;
      }
      message.textContent = "";
      send("POST", "/api/v1/intakes/" + decision.dataset.intake + "/decisions", {
        verdict: data.get("verdict"), reason: data.get("reason") || "",
      }).then(function () { reloadAt("verdict"); })
        .catch(function (error) { message.textContent = "Not recorded: " + error.message + "."; });
    });
  }

  var intakeId = (document.getElementById("decision-form") || document.getElementById("explorer") ||
                  document.getElementById("baseline-form") || { dataset: {} }).dataset.intake;
  document.querySelectorAll(".discussion").forEach(function (thread) {
    var form = thread.querySelector(".comment-form");
    if (!form) return;
    var message = thread.querySelector(".comment-message");
    var fail = function (error) { message.textContent = "Not saved: " + error.message + "."; };
    form.addEventListener("submit", function (event) {
      event.preventDefault();
      var body = form.querySelector("textarea").value.trim();
      if (!body) { message.textContent = "Write something first."; return; }
      var existing = thread.dataset.thread;
      var request = existing
        ? send("POST", "/api/v1/threads/" + existing + "/comments", { body: body })
        : send("POST", "/api/v1/intakes/" + intakeId + "/threads", {
            body: body, column: thread.dataset.column || null, flag_code: thread.dataset.flag,
          });
      request.then(function () { reloadAt("look"); }).catch(fail);
    });
    [["resolve", "resolve"], ["reopen", "reopen"]].forEach(function (pair) {
      var button = form.querySelector("." + pair[0]);
      if (!button) return;
      button.addEventListener("click", function () {
        send("POST", "/api/v1/threads/" + thread.dataset.thread + "/" + pair[1])
          .then(function () { reloadAt("look"); }).catch(fail);
      });
    });
  });

  var baseline = document.getElementById("baseline-form");
  if (baseline) {
    baseline.addEventListener("submit", function (event) {
      event.preventDefault();
      var value = document.getElementById("baseline-pick").value;
      send("PUT", "/api/v1/intakes/" + baseline.dataset.intake + "/baseline", {
        intake_id: value ? Number(value) : null,
      }).then(function () { reloadAt("changes"); })
        .catch(function (error) {
          document.getElementById("baseline-message").textContent = error.message;
        });
    });
  }
})();
