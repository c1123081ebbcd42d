/* Tidewaiter: the rules page. Draft from an intake, check, save as a new version.

   Every value shown comes from the API as text and is written with textContent,
   never as markup: rules and drafts carry labels from partner files. The CSRF
   header is added by security.js. */
(function () {
  "use strict";

  var root = document.getElementById("rules");
  if (!root) return;
  var supplier = root.dataset.supplier;
  var text = document.getElementById("rules-text");
  var message = document.getElementById("rules-message");
  var problems = document.getElementById("problems");
  var empty = document.getElementById("problems-empty");
  var edited = false; // typed into since the page loaded or the last draft: not to be lost

  text.addEventListener("input", function () { edited = true; });
  window.addEventListener("beforeunload", function (event) {
    if (edited && !text.readOnly) event.preventDefault();
  });

  function say(words, isError) {
    message.textContent = words;
    message.className = isError ? "error" : "muted";
  }

  function call(method, url, body) {
    var init = { method: method, headers: { Accept: "application/json" } };
    if (body !== undefined) {
      init.headers["Content-Type"] = "application/json";
      init.body = JSON.stringify(body);
    }
    return fetch(url, init).then(function (response) {
      return response.json().then(function (data) {
        if (!response.ok) throw new Error(data.detail || "the server answered " + response.status);
        return data;
      });
    });
  }

  function showProblems(list) {
    while (problems.firstChild) problems.removeChild(problems.firstChild);
    list.forEach(function (problem) {
      var item = document.createElement("li");
      var where = document.createElement("code");
      where.textContent = problem.path || "(the whole document)";
      item.appendChild(where);
      item.appendChild(document.createTextNode(" " + problem.message));
      problems.appendChild(item);
    });
    empty.textContent = list.length ? list.length + " mistake" + (list.length > 1 ? "s" : "") +
      " to fix before saving." : "No mistakes: these rules can be saved.";
    empty.className = list.length ? "error" : "muted small";
    // On a narrow screen the list sits below the editor: bring it into sight.
    var heading = document.getElementById("problems-h");
    if (list.length && heading.getBoundingClientRect().top > window.innerHeight - 80) {
      heading.scrollIntoView({ block: "start" });
    }
  }

  function check() {
    say("Checking…", false);
    return call("POST", "/api/v1/rules/validate", { document: text.value }).then(function (answer) {
      showProblems(answer.problems);
      var count = answer.problems.length;
      say(answer.valid ? "The rules are valid." : "The rules have " + count + " mistake" +
        (count > 1 ? "s" : "") + ", each listed under Mistakes.", !answer.valid);
      return answer.valid;
    });
  }

  function failed(error) { say(error.message, true); }

  var draftButton = document.getElementById("draft-button");
  if (draftButton) {
    draftButton.addEventListener("click", function () {
      var intake = document.getElementById("draft-intake").value;
      if (edited && !window.confirm("Replace your edits with a draft from intake #" + intake + "?")) {
        return;
      }
      say("Drafting from intake #" + intake + "…", false);
      call("GET", "/api/v1/intakes/" + encodeURIComponent(intake) + "/rules-draft")
        .then(function (draft) {
          text.value = draft.yaml;
          edited = false;
          showProblems([]);
          say("Drafted from intake #" + draft.intake_id + ". Edit, check, then save.", false);
        })
        .catch(failed);
    });
  }

  var checkButton = document.getElementById("check-button");
  if (checkButton) checkButton.addEventListener("click", function () { check().catch(failed); });

  var saveButton = document.getElementById("save-button");
  if (saveButton) {
    saveButton.addEventListener("click", function () {
      saveButton.disabled = true;
      check()
        .then(function (valid) {
          if (!valid) return null;
          say("Saving…", false);
          var note = document.getElementById("rules-note").value;
          return call("PUT", "/api/v1/suppliers/" + supplier + "/rules",
            { document: text.value, note: note });
        })
        .then(function (saved) {
          if (!saved) return;
          edited = false;
          var query = "?saved=" + saved.version + "&rejudged=" + saved.rejudged.join(",");
          window.location.assign("/suppliers/" + supplier + "/rules" + query);
        })
        .catch(failed)
        .then(function () { saveButton.disabled = false; });
    });
  }
})();
