// The station's few behaviours: the verdict of each reading as it is typed (judged by the server,
// which holds the Design's limits and the one DCR correction), and a back button.
"use strict";
(function () {
  var csrf = document.body.getAttribute("data-csrf");
  document.querySelectorAll("[data-back]").forEach(function (a) {
    a.addEventListener("click", function (ev) { ev.preventDefault(); history.back(); });
  });
  var form = document.querySelector("form.readings[data-check]");
  if (!form || !csrf) { return; }
  var timer = null;
  function show(result) {
    form.querySelectorAll("tr[data-key]").forEach(function (row) {
      var key = row.getAttribute("data-key");
      var cell = row.querySelector("[data-verdict]");
      var input = row.querySelector("input");
      if (!input || !input.value.trim()) { return; }
      var v = result.verdicts[key];
      row.classList.remove("pass", "fail");
      cell.textContent = "";
      if (v) {
        row.classList.add(v.verdict);
        cell.textContent = v.judged + " ";
        var b = document.createElement("b");
        b.textContent = v.verdict.toUpperCase();
        cell.appendChild(b);
      } else if (result.errors[key]) {
        cell.textContent = result.errors[key];
      }
    });
  }
  function check() {
    var body = new FormData(form);
    fetch(form.getAttribute("data-check"), { method: "POST", body: body, headers: { "X-CSRF-Token": csrf },
      credentials: "same-origin" })
      .then(function (r) { return r.ok ? r.json() : null; })
      .then(function (result) { if (result) { show(result); } })
      .catch(function () {});
  }
  form.addEventListener("input", function () { clearTimeout(timer); timer = setTimeout(check, 150); });
  // A row pasted from a meter's or a spreadsheet's export fills this input and the ones after it, in
  // the order of the table.
  var inputs = Array.prototype.slice.call(form.querySelectorAll("tr[data-key] input"));
  inputs.forEach(function (input, at) {
    input.addEventListener("paste", function (ev) {
      var text = (ev.clipboardData || window.clipboardData).getData("text");
      // tabs, new lines or semicolons separate values; commas only where none of those is used (a
      // comma may be a decimal mark: "105,7<tab>3,10")
      var separator = /[\t\r\n;]/.test(text) ? /[\t\r\n;]+/ : /,/;
      var values = text.split(separator).map(function (v) { return v.trim(); })
        .filter(function (v) { return v !== ""; });
      if (values.length < 2) { return; }
      ev.preventDefault();
      values.forEach(function (v, i) { if (inputs[at + i]) { inputs[at + i].value = v; } });
      check();
    });
  });
})();
