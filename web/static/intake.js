/* Tidewaiter intake page: follows profiling until the result is there, and runs the
   crosstab explorer (two label columns, optionally only the rows where a third has one
   label) against the on-demand query API. Values from files are set with textContent,
   and escaped before plotly draws them (plotly reads a little HTML in its texts). */
(function () {
  "use strict";

  var csrf = (document.querySelector("meta[name=csrf-token]") || {}).content || "";
  var CAP = 4; // adjusted residuals beyond ±4 take the end colour, as in the profile's figures

  function $(id) { return document.getElementById(id); }

  function plotlyText(value) {
    var text = value === null || value === undefined ? "(missing)" : String(value);
    return text.replace(/&/g, "&amp;").replace(/</g, "&lt;").replace(/>/g, "&gt;");
  }

  function getJson(url) {
    return fetch(url, { credentials: "same-origin" }).then(function (response) {
      return response.json().catch(function () { return {}; }).then(function (body) {
        if (!response.ok) throw new Error(body.detail || response.statusText);
        return body;
      });
    });
  }

  /* ---- progress while queued or profiling ---------------------------------------- */
  var progress = $("progress");
  if (progress && progress.dataset.status !== "failed") {
    var id = progress.dataset.intake;
    var poll = function () {
      getJson("/api/v1/intakes/" + id).then(function (body) {
        if (body.status === "ready" || body.status === "failed") {
          window.location.reload();
          return;
        }
        $("job-progress").value = body.progress || 0;
        $("job-text").textContent = body.status + " · " + body.stage + " · " +
          Math.round(100 * (body.progress || 0)) + " %";
        setTimeout(poll, 700);
      }).catch(function () { setTimeout(poll, 2500); });
    };
    setTimeout(poll, 500);
  }
  var again = $("reprofile");
  if (again) {
    again.addEventListener("click", function () {
      again.disabled = true;
      fetch("/api/v1/intakes/" + again.dataset.intake + "/reprofile", {
        method: "POST", headers: { "X-CSRF-Token": csrf }, credentials: "same-origin",
      }).then(function (response) {
        if (response.ok) { window.location.reload(); return; }
        return response.json().then(function (body) {
          var message = $("progress-message");
          message.hidden = false;
          message.textContent = body.detail || "The intake could not be queued again.";
          again.disabled = false;
        });
      });
    });
  }

  /* ---- crosstab explorer ------------------------------------------------------------ */
  var explorer = $("explorer");
  if (!explorer) return;
  var intakeId = explorer.dataset.intake;
  var whereColumn = $("xt-where-column");
  var whereValue = $("xt-where-value");
  var summary = $("explorer-summary");
  var scale = window.Tidewaiter.readJson("explorer-scale");

  whereColumn.addEventListener("change", function () {
    whereValue.replaceChildren();
    whereValue.disabled = !whereColumn.value;
    if (!whereColumn.value) {
      whereValue.append(new Option("–", ""));
      return;
    }
    var url = "/api/v1/intakes/" + intakeId + "/labels?limit=200&column=" +
      encodeURIComponent(whereColumn.value);
    getJson(url).then(function (labels) {
      labels.forEach(function (item) {
        if (item.other) return;
        var text = item.value === null ? "(missing)" : item.value;
        whereValue.append(new Option(text + " (" + item.count + ")", item.value === null ? "" : item.value));
      });
    }).catch(function (error) { summary.textContent = error.message; });
  });

  function table(doc) {
    var element = $("explorer-table");
    var rows = doc.counts.a_labels, cols = doc.counts.b_labels, matrix = doc.counts.matrix;
    element.replaceChildren();
    var head = element.createTHead().insertRow();
    var corner = document.createElement("th");
    corner.textContent = doc.a + " \\ " + doc.b;
    head.append(corner);
    cols.forEach(function (c) {
      var th = document.createElement("th");
      th.scope = "col";
      th.textContent = c === null ? "(missing)" : c;
      head.append(th);
    });
    var body = element.createTBody();
    rows.forEach(function (r, i) {
      var tr = body.insertRow();
      var th = document.createElement("th");
      th.scope = "row";
      th.textContent = r === null ? "(missing)" : r;
      tr.append(th);
      matrix[i].forEach(function (count, j) {
        var td = tr.insertCell();
        td.textContent = String(count);
        td.dataset.row = String(i);
        td.dataset.col = String(j);
        if (doc.residuals) td.title = "adjusted residual " + doc.residuals[i][j].toFixed(2);
      });
    });
    element.hidden = false;
  }

  function figure(doc) {
    var rows = doc.counts.a_labels, cols = doc.counts.b_labels;
    var residuals = doc.residuals || doc.counts.matrix.map(function (row) {
      return row.map(function () { return 0; });
    });
    var capped = residuals.map(function (row) {
      return row.map(function (r) { return Math.max(-CAP, Math.min(CAP, r)); });
    });
    var element = $("explorer-figure");
    element.hidden = false;
    var positionsX = cols.map(function (_, j) { return j; });
    var positionsY = rows.map(function (_, i) { return i; });
    window.Tidewaiter.plot(element, {
      data: [{
        type: "heatmap", z: capped, x: positionsX, y: positionsY,
        zmin: -CAP, zmax: CAP, zmid: 0, colorscale: scale, xgap: 1, ygap: 1,
        text: doc.counts.matrix.map(function (row) { return row.map(String); }),
        texttemplate: rows.length <= 24 && cols.length <= 24 ? "%{text}" : "",
        hovertemplate: "%{text} rows<br>adjusted residual %{z:.2f}<extra></extra>",
        colorbar: { title: { text: "adjusted<br>residual" }, thickness: 12 },
      }],
      layout: {
        height: Math.max(220, 110 + 30 * rows.length), margin: { l: 56, r: 16, t: 56, b: 20 },
        font: { family: "system-ui, sans-serif" }, paper_bgcolor: "#FFFFFF", plot_bgcolor: "#FFFFFF",
        xaxis: { tickmode: "array", tickvals: positionsX, ticktext: cols.map(plotlyText), side: "top",
                 automargin: true, showgrid: false },
        yaxis: { tickmode: "array", tickvals: positionsY, ticktext: rows.map(plotlyText),
                 autorange: "reversed", automargin: true, showgrid: false },
      },
    });
  }

  explorer.addEventListener("submit", function (event) {
    event.preventDefault();
    var data = new FormData(explorer);
    if (data.get("a") === data.get("b")) {
      summary.textContent = "Choose two different columns.";
      return;
    }
    var params = new URLSearchParams({ a: data.get("a"), b: data.get("b") });
    if (whereColumn.value) {
      params.set("where_column", whereColumn.value);
      params.set("where_value", whereValue.value);
    }
    summary.textContent = "Counting…";
    getJson("/api/v1/intakes/" + intakeId + "/crosstab?" + params.toString())
      .then(function (doc) {
        var text = doc.n + " rows";
        if (whereColumn.value) {
          text += " where " + whereColumn.value + " is " +
            (whereValue.value === "" ? "missing" : whereValue.value);
        }
        if (doc.chi2 !== null && doc.chi2 !== undefined) {
          text += " · χ² = " + doc.chi2.toFixed(2) + ", " + doc.dof + " degrees of freedom, p = " +
            doc.p_value.toPrecision(3);
          if (doc.cochran_ok === false) text += " · too few rows per cell for the test to be trusted";
        } else {
          text += " · fewer than two labels on a side: no test";
        }
        summary.textContent = text;
        table(doc);
        figure(doc);
      })
      .catch(function (error) { summary.textContent = "Not answered: " + error.message; });
  });
})();
