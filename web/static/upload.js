/* Tidewaiter upload page: choose or create the supplier, drop a file, send it with a
   progress bar by bytes sent, then follow the worker's progress until the scorecard
   is there. Every message is set with textContent. */
(function () {
  "use strict";

  var form = document.getElementById("upload-form");
  if (!form) return;
  var csrf = (document.querySelector("meta[name=csrf-token]") || {}).content || "";
  var limit = Number(form.dataset.limit);
  var supplierSelect = document.getElementById("up-supplier");
  var newField = document.getElementById("new-supplier-field");
  var newName = document.getElementById("up-new-supplier");
  var input = document.getElementById("up-file");
  var zone = document.getElementById("dropzone");
  var chosen = document.getElementById("chosen-file");
  var message = document.getElementById("upload-message");
  var sendButton = document.getElementById("up-send");
  var file = null;

  function $(id) { return document.getElementById(id); }

  function say(text) {
    message.hidden = !text;
    message.textContent = text || "";
  }

  function humanSize(bytes) {
    var units = ["bytes", "KiB", "MiB", "GiB"], i = 0;
    while (bytes >= 1024 && i < units.length - 1) { bytes /= 1024; i++; }
    return (i === 0 ? bytes : bytes.toFixed(1)) + " " + units[i];
  }

  function pick(f) {
    file = f || null;
    chosen.textContent = file ? file.name + " (" + humanSize(file.size) + ")" : "";
    say("");
    if (file && file.size > limit) {
      say("This file is " + humanSize(file.size) + ", over the limit of " + humanSize(limit) +
          ". Split it, or compress it with gzip or zip, and try again.");
    }
  }

  supplierSelect.addEventListener("change", function () {
    newField.hidden = supplierSelect.value !== "new";
    if (!newField.hidden) newName.focus();
  });
  // A real button: Enter and Space press it like a click, which may open the file chooser.
  zone.addEventListener("click", function () { input.click(); });
  input.addEventListener("change", function () { pick(input.files[0]); });
  ["dragenter", "dragover"].forEach(function (name) {
    zone.addEventListener(name, function (e) { e.preventDefault(); zone.classList.add("over"); });
  });
  ["dragleave", "drop"].forEach(function (name) {
    zone.addEventListener(name, function (e) { e.preventDefault(); zone.classList.remove("over"); });
  });
  zone.addEventListener("drop", function (e) {
    if (e.dataTransfer && e.dataTransfer.files.length) pick(e.dataTransfer.files[0]);
  });

  function errorText(status, body) {
    var detail = (body && body.detail) || "";
    if (status === 413) return "Too large: " + detail + ". Split or compress the file and try again.";
    if (status === 401) return "Your session has ended: sign in again, then upload the file.";
    if (status === 403) return detail || "You may not upload files; ask an admin for the reviewer role.";
    if (status === 422) return "Not accepted: " + detail + ".";
    if (status === 0) return "The connection was lost while sending. Check the network and try again.";
    return "The server refused the file (" + status + "): " + (detail || "no reason given") + ".";
  }

  function json(method, url, payload) {
    return fetch(url, {
      method: method,
      headers: { "Content-Type": "application/json", "X-CSRF-Token": csrf },
      body: payload ? JSON.stringify(payload) : undefined,
      credentials: "same-origin",
    }).then(function (response) {
      return response.json().catch(function () { return {}; }).then(function (body) {
        if (!response.ok) throw new Error(errorText(response.status, body));
        return body;
      });
    });
  }

  function supplierRef() {
    if (supplierSelect.value !== "new") return Promise.resolve(supplierSelect.value);
    var name = newName.value.trim();
    if (!name) return Promise.reject(new Error("Give the new supplier a name."));
    return json("POST", "/api/v1/suppliers", { name: name }).then(function (s) { return String(s.id); });
  }

  function send(supplier) {
    return new Promise(function (resolve, reject) {
      var data = new FormData();
      data.append("supplier", supplier);
      data.append("file", file, file.name);
      var request = new XMLHttpRequest();
      request.open("POST", "/api/v1/intakes");
      request.setRequestHeader("X-CSRF-Token", csrf);
      $("send-step").hidden = false;
      request.upload.addEventListener("progress", function (e) {
        if (!e.lengthComputable) return;
        $("send-progress").value = e.loaded / e.total;
        $("send-text").textContent = humanSize(e.loaded) + " of " + humanSize(e.total) + " sent";
      });
      request.addEventListener("load", function () {
        var body = {};
        try { body = JSON.parse(request.responseText); } catch (err) { body = {}; }
        if (request.status === 201) {
          $("send-progress").value = 1;
          $("send-text").textContent = "stored (" + humanSize(file.size) + ")";
          resolve(body);
        } else {
          reject(new Error(errorText(request.status, body)));
        }
      });
      request.addEventListener("error", function () { reject(new Error(errorText(0))); });
      request.send(data);
    });
  }

  function follow(intake) {
    $("profile-step").hidden = false;
    return new Promise(function (resolve, reject) {
      function poll() {
        fetch("/api/v1/intakes/" + intake.id, { credentials: "same-origin" })
          .then(function (r) { return r.json(); })
          .then(function (body) {
            $("profile-progress").value = body.progress || 0;
            $("profile-text").textContent = body.status + " · " + body.stage + " · " +
              Math.round(100 * (body.progress || 0)) + " % of the file read";
            if (body.status === "ready") return resolve(body);
            if (body.status === "failed") {
              return reject(new Error("The file was stored but could not be read: " + body.error +
                " Check that it is a CSV, Excel, Parquet or JSON lines file, then upload it again."));
            }
            setTimeout(poll, 500);
          })
          .catch(function () { setTimeout(poll, 2000); });
      }
      poll();
    });
  }

  function show(intake) {
    var head = intake.headline || {};
    var score = $("result-score");
    $("result-name").textContent = intake.original_name;
    score.textContent = head.overall_score == null ? "–" : Math.floor(head.overall_score);
    score.className = "score " + (head.overall_score == null ? "" :
      head.overall_score >= 90 ? "good" : head.overall_score >= 70 ? "fair" : "poor");
    $("result-rows").textContent = head.rows == null ? "–" : head.rows.toLocaleString("en");
    $("result-columns").textContent = head.columns == null ? "–" : String(head.columns);
    $("result-link").href = "/intakes/" + intake.id;
    $("upload-result").hidden = false;
    $("result-link").focus();
    judgement(intake.id, 20);
  }

  function badge(text, kind) {
    var span = document.createElement("span");
    span.className = "badge " + kind;
    span.textContent = text;
    return span;
  }

  function judgement(id, tries) {
    // The judgement (rules and baseline included) is stored right after profiling.
    fetch("/api/v1/intakes/" + id + "/judgement", { credentials: "same-origin" })
      .then(function (r) { return r.ok ? r.json() : null; })
      .then(function (body) {
        if (!body) {
          if (tries > 0) setTimeout(function () { judgement(id, tries - 1); }, 500);
          return;
        }
        var line = $("result-judgement");
        line.replaceChildren(document.createTextNode("suggested: "));
        line.append(badge(body.suggested_verdict, body.suggested_verdict), " · flags: ");
        ["critical", "warning", "info"].forEach(function (severity) {
          line.append(badge((body.counts[severity] || 0) + " " + severity, severity), " ");
        });
        var score = $("result-score");
        if (body.overall_score != null) score.textContent = String(body.overall_score);
      })
      .catch(function () { return null; });
  }

  $("upload-another").addEventListener("click", function () { window.location.reload(); });

  form.addEventListener("submit", function (event) {
    event.preventDefault();
    say("");
    if (!supplierSelect.value) return say("Choose the supplier that sent the file.");
    if (!file) return say("Choose or drop a file first.");
    if (file.size === 0) return say("This file is empty: there is nothing to profile.");
    if (file.size > limit) return pick(file);
    sendButton.disabled = true;
    supplierRef()
      .then(send)
      .then(follow)
      .then(show)
      .catch(function (error) { say(error.message); })
      .then(function () { sendButton.disabled = false; });
  });
})();
