// dampfront job page: sort the solutions table, show a solution's damper
// curves, follow a running job's progress. Plain JavaScript, no library;
// without it the page still works through links and a meta refresh.
"use strict";

// Sort a table by a column when its header button is pressed: numbers by
// value (the SI value in data-sort), other columns as text; pressing again
// reverses the order.
function sortable(table) {
  table.querySelectorAll("thead th").forEach(function (th) {
    th.querySelector("button").addEventListener("click", function () {
      var col = Number(th.dataset.col);
      var numeric = th.dataset.type === "num";
      var dir = th.getAttribute("aria-sort") === "ascending" ? -1 : 1;
      table.querySelectorAll("thead th").forEach(function (o) { o.setAttribute("aria-sort", "none"); });
      th.setAttribute("aria-sort", dir > 0 ? "ascending" : "descending");
      var body = table.tBodies[0];
      var rows = Array.prototype.slice.call(body.rows);
      rows.sort(function (a, b) {
        var x = a.cells[col].dataset.sort, y = b.cells[col].dataset.sort;
        if (numeric) {
          // Empty cells sort last either way.
          if (x === "" || y === "") { return (x === "") - (y === ""); }
          return dir * (Number(x) - Number(y));
        }
        return dir * x.localeCompare(y);
      });
      rows.forEach(function (r) { body.appendChild(r); });
    });
  });
}

// The car-at-speed section holds the figures of the solution the page was
// loaded with; when another row is shown, say so and link its page.
function atSpeedOf(index) {
  var section = document.getElementById("at-speed");
  var note = document.getElementById("at-speed-other");
  if (!section || !note) { return; }
  var other = section.dataset.solution !== index;
  note.hidden = !other;
  if (other) {
    var link = document.getElementById("at-speed-link");
    link.href = "?solution=" + index + "#at-speed";
    link.textContent = "show solution " + index + "'s car at speed";
  }
}

// Fetch an SVG chart of the page's own and return it as an element of
// this document; a refusal rejects with the server's words.
function fetchSVG(url) {
  return fetch(url, { credentials: "same-origin" }).then(function (res) {
    return res.text().then(function (body) {
      if (!res.ok) { throw new Error(body.trim() || res.statusText); }
      return body;
    });
  }).then(function (body) {
    var doc = new DOMParser().parseFromString(body, "image/svg+xml");
    if (doc.querySelector("parsererror")) { throw new Error("the chart did not arrive whole"); }
    return document.importNode(doc.documentElement, true);
  });
}

// Show the time history of solution index on the case chosen in the
// section's form: fetch its chart and put it in place of the one shown.
function showHistory(index) {
  var section = document.getElementById("history");
  if (!section) { return; }
  var select = document.getElementById("history-case");
  var problem = document.getElementById("history-problem");
  var base = section.dataset.chart.replace(/\/solutions\/\d+\//, "/solutions/" + index + "/");
  var url = base + "?case=" + encodeURIComponent(select.value);
  fetchSVG(url).then(function (svg) {
    document.getElementById("history-chart").replaceChildren(svg);
    problem.hidden = true;
    section.dataset.solution = index;
    section.dataset.chart = base;
    document.getElementById("history-index").textContent = index;
    document.getElementById("history-solution").value = index;
    document.getElementById("history-download").href = url + "&download=1";
    history.replaceState(null, "", "?solution=" + index + "&case=" + encodeURIComponent(select.value));
  }).catch(function (err) {
    problem.textContent = "The time history could not be shown: " + err.message;
    problem.hidden = false;
  });
}

// Show the damper curves of a row's solution: fetch its chart and put it
// in place of the one shown.
function selectable(table, panel) {
  var chart = document.getElementById("curves-chart");
  var problem = document.getElementById("curves-problem");
  function show(row) {
    var url = row.dataset.curves;
    fetchSVG(url).then(function (svg) {
      chart.replaceChildren(svg);
      problem.hidden = true;
      table.querySelectorAll("tbody tr.selected").forEach(function (r) {
        r.classList.remove("selected");
        r.removeAttribute("aria-selected");
      });
      row.classList.add("selected");
      row.setAttribute("aria-selected", "true");
      panel.dataset.solution = row.dataset.index;
      document.getElementById("curves-index").textContent = row.dataset.index;
      document.getElementById("curves-download").href = url + "?download=1";
      history.replaceState(null, "", "?solution=" + row.dataset.index);
      showModes(row);
      atSpeedOf(row.dataset.index);
      showHistory(row.dataset.index);
    }).catch(function (err) {
      problem.textContent = "The damper curves could not be shown: " + err.message;
      problem.hidden = false;
    });
  }
  table.tBodies[0].addEventListener("click", function (ev) {
    if (ev.target.closest("a.sheet-link")) { return; } // the sheet opens as a page
    var row = ev.target.closest("tr");
    if (!row) { return; }
    ev.preventDefault();
    show(row);
  });
  table.tBodies[0].addEventListener("keydown", function (ev) {
    if (ev.key === "Enter" && ev.target.matches("tr")) { ev.preventDefault(); show(ev.target); }
  });
}

// Show the modes of a row's solution: fetch its table and put it in
// place of the one shown.
function showModes(row) {
  var section = document.getElementById("modes");
  if (!section || !row.dataset.modes) { return; }
  fetch(row.dataset.modes, { credentials: "same-origin" }).then(function (res) {
    if (!res.ok) { throw new Error(res.statusText); }
    return res.text();
  }).then(function (body) {
    var doc = new DOMParser().parseFromString(body, "text/html");
    section.replaceChildren.apply(section, Array.prototype.map.call(doc.body.childNodes, function (n) { return document.importNode(n, true); }));
    section.dataset.solution = row.dataset.index;
  }).catch(function (err) {
    section.dataset.solution = "";
    section.querySelector("h2").textContent = "Modes: the table of solution " + row.dataset.index + " could not be shown (" + err.message + ")";
  });
}

// Follow a queued or running job: poll its progress and reload the page
// once the job has finished, to show its front.
function follow(section) {
  var bar = document.getElementById("progress-bar");
  var text = document.getElementById("progress-text");
  var state = document.getElementById("state");
  var wait = Number(section.dataset.pollMs) || 1000;
  function poll() {
    fetch(section.dataset.url, { credentials: "same-origin", cache: "no-store" }).then(function (res) {
      if (!res.ok) { throw new Error(res.statusText); }
      return res.json();
    }).then(function (p) {
      bar.value = p.percent;
      text.textContent = p.text;
      state.textContent = p.state;
      state.className = "state state-" + p.state;
      if (p.terminal) { location.reload(); return; }
      setTimeout(poll, wait);
    }).catch(function () {
      setTimeout(poll, 5 * wait); // the server may be restarting; try again later
    });
  }
  setTimeout(poll, wait);
}

// Reload a page listing unfinished jobs, unless the reader is typing.
function reloadEvery(seconds) {
  setInterval(function () {
    var a = document.activeElement;
    if (a && (a.tagName === "INPUT" || a.tagName === "TEXTAREA")) { return; }
    location.reload();
  }, seconds * 1000);
}

document.addEventListener("DOMContentLoaded", function () {
  var table = document.getElementById("solutions-table");
  if (table) {
    sortable(table);
    var panel = document.getElementById("curves");
    if (panel) { selectable(table, panel); }
  }
  var historyForm = document.querySelector("#history form");
  if (historyForm) {
    var pick = function (ev) {
      ev.preventDefault();
      showHistory(document.getElementById("history").dataset.solution);
    };
    historyForm.addEventListener("submit", pick);
    document.getElementById("history-case").addEventListener("change", pick);
  }
  var progress = document.getElementById("progress");
  if (progress && progress.dataset.terminal !== "true") { follow(progress); }
  if (document.body.dataset.reload) { reloadEvery(Number(document.body.dataset.reload)); }
});
