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
})();
