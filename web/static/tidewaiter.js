/* Tidewaiter: figures drawn from JSON embedded in the page, as they scroll into view.

   A figure is an element whose data-figure attribute names the id of a script
   element of type application/json holding the figure; it is read with
   JSON.parse (never evaluated, never inserted as HTML). A select element with
   data-choose=GROUP shows the element of GROUP whose data-choice equals the
   selected value and hides the others. */
(function () {
  "use strict";

  var CONFIG = {
    responsive: true,
    displaylogo: false,
    modeBarButtonsToRemove: ["select2d", "lasso2d", "autoScale2d", "toggleSpikelines"],
  };

  function readJson(id) {
    var node = document.getElementById(id);
    return node ? JSON.parse(node.textContent) : null;
  }

  // plotly.js may load after this script (pages load it with async, so the page is
  // usable before the 4 MB bundle is parsed): drawing waits for it.
  var waiting = [];
  function whenPlotly(task) {
    if (window.Plotly) task();
    else waiting.push(task);
  }
  var bundle = document.getElementById("plotly-js");
  if (bundle) {
    bundle.addEventListener("load", function () {
      waiting.splice(0).forEach(function (task) { task(); });
    });
  }

  function plot(element, figure) {
    element.dataset.state = "drawn";
    whenPlotly(function () {
      window.Plotly.newPlot(element, figure.data, figure.layout, CONFIG);
    });
  }

  var BATCH = 25;
  var fetched = {};

  function nothing(element) {
    element.dataset.state = "none";
    element.classList.add("figure-none");
    element.textContent = "Nothing to draw.";
  }

  function drawLater(element) {
    // A lazy card: fetch the figures of its run of columns once, then draw it.
    var start = Math.floor(Number(element.dataset.position) / BATCH) * BATCH;
    var url = element.dataset.batch + "?start=" + start + "&count=" + BATCH;
    fetched[url] = fetched[url] || fetch(url, { credentials: "same-origin" }).then(function (r) {
      if (!r.ok) throw new Error("figures not available (" + r.status + ")");
      return r.json();
    });
    element.dataset.state = "loading";
    fetched[url].then(function (figures) {
      var figure = figures[element.dataset.figure];
      if (figure) plot(element, figure);
      else nothing(element);
    }).catch(function (error) {
      element.dataset.state = "failed";
      element.textContent = error.message;
    });
  }

  function draw(element) {
    if (element.dataset.state === "drawn" || element.dataset.state === "loading") return;
    var figure = readJson(element.dataset.figure);
    if (figure) {
      plot(element, figure);
    } else if (element.dataset.batch) {
      drawLater(element);
    } else {
      element.dataset.state = "missing";
    }
  }

  var observer = null;
  if ("IntersectionObserver" in window) {
    observer = new IntersectionObserver(
      function (entries) {
        entries.forEach(function (entry) {
          if (entry.isIntersecting) {
            observer.unobserve(entry.target);
            draw(entry.target);
          }
        });
      },
      { rootMargin: "400px 0px" }
    );
  }

  function watch(root) {
    (root || document).querySelectorAll("[data-figure]").forEach(function (element) {
      if (element.dataset.state === "drawn") return;
      element.dataset.state = "waiting";
      if (observer) observer.observe(element);
      else draw(element);
    });
  }

  function choose(select) {
    var group = select.dataset.choose;
    document.querySelectorAll("[data-choice-group]").forEach(function (element) {
      if (element.dataset.choiceGroup !== group) return;
      element.hidden = element.dataset.choice !== select.value;
      if (!element.hidden) {
        element.querySelectorAll("[data-figure][data-state='drawn']").forEach(function (fig) {
          whenPlotly(function () { window.Plotly.Plots.resize(fig); });
        });
      }
    });
  }

  function start() {
    document.querySelectorAll("select[data-choose]").forEach(function (select) {
      select.addEventListener("change", function () { choose(select); });
      choose(select);
    });
    watch(document);
  }

  window.Tidewaiter = { readJson: readJson, plot: plot, draw: draw, watch: watch };

  if (document.readyState === "loading") document.addEventListener("DOMContentLoaded", start);
  else start();
})();
