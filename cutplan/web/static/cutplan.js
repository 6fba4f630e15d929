/* cutplan page: live preview, messages beside fields, play and trim without leaving the page.
   The form works without this file: every button is a plain submit. */
(function () {
  "use strict";
  var form = document.getElementById("design");
  if (!form || !window.fetch || !window.FormData) { return; }
  document.documentElement.classList.add("js");
  var preview = document.getElementById("preview");
  var seq = 0, timer = null, player = null;

  function designData() {
    var data = new FormData(form);
    ["design_file", "trim.recording"].forEach(function (k) { data.delete(k); });
    return data;
  }

  function showKinds() {
    form.querySelectorAll("fieldset.set").forEach(function (fs) {
      var kindField = fs.querySelector("select[name$='.kind']");
      var kind = kindField ? kindField.value : "";
      fs.querySelectorAll("[data-kinds]").forEach(function (el) {
        var on = el.getAttribute("data-kinds").split(" ").indexOf(kind) >= 0;
        el.hidden = !on;
        el.querySelectorAll("input, select").forEach(function (i) { i.disabled = !on; });
      });
      var shape = fs.querySelector("select[name$='.section.shape']");
      var stock = fs.querySelector("input[name$='.section.stock']");
      fs.querySelectorAll("[data-shapes]").forEach(function (el) {
        var s = shape ? shape.value : "";
        el.hidden = s ? el.getAttribute("data-shapes") !== s : !!(stock && stock.value.trim());
      });
    });
  }

  function fillMessages(errors, warnings) {
    var slots = {};
    form.querySelectorAll(".msgs[data-slot]").forEach(function (box) {
      slots[box.getAttribute("data-slot")] = box;
      box.textContent = "";
    });
    form.querySelectorAll("[aria-invalid]").forEach(function (el) { el.removeAttribute("aria-invalid"); });
    function put(map, cls) {
      Object.keys(map || {}).forEach(function (slot) {
        var box = slots[slot] || slots.form;
        map[slot].forEach(function (text) {
          var p = document.createElement("p");
          p.className = "msg " + cls;
          if (cls === "error") { p.setAttribute("role", "alert"); }
          p.textContent = text;
          box.appendChild(p);
        });
        var input = document.getElementById(slot);
        if (input && cls === "error") { input.setAttribute("aria-invalid", "true"); }
      });
    }
    put(errors, "error");
    put(warnings, "warning");
  }

  function updateTrimPieces(labels) {
    var sel = document.getElementById("trim.piece");
    if (!sel || !labels) { return; }
    var keep = sel.value;
    sel.textContent = "";
    labels.forEach(function (l) {
      var o = document.createElement("option");
      o.value = l; o.textContent = l; o.selected = (l === keep);
      sel.appendChild(o);
    });
  }

  function refresh() {
    var mine = ++seq;
    form.classList.add("busy");
    fetch("/preview", {method: "POST", body: designData(), headers: {"Accept": "application/json"}})
      .then(function (r) { return r.json(); })
      .then(function (res) {
        if (mine !== seq) { return; }
        fillMessages(res.errors, res.warnings);
        if (res.ok) {
          preview.innerHTML = res.html;
          preview.classList.remove("stale");
          updateTrimPieces(res.labels);
        } else {
          preview.classList.add("stale");
        }
      })
      .catch(function () { if (mine === seq) { preview.classList.add("stale"); } })
      .then(function () { if (mine === seq) { form.classList.remove("busy"); } });
  }

  function later() {
    clearTimeout(timer);
    timer = setTimeout(refresh, 350);
  }

  form.addEventListener("input", function (ev) {
    var n = ev.target.name || "";
    if (ev.target.type === "file" || n.indexOf("trim.") === 0) { return; }
    if (/\.(kind|section\.stock|section\.shape)$/.test(n)) { showKinds(); }
    later();
  });
  form.addEventListener("change", function (ev) {
    if (ev.target.tagName === "SELECT" && (ev.target.name || "").indexOf("trim.") !== 0) {
      if (/\.(kind|section\.shape)$/.test(ev.target.name)) { showKinds(); }
      later();
    }
  });

  form.addEventListener("click", function (ev) {
    var b = ev.target.closest ? ev.target.closest("button") : null;
    if (!b) { return; }
    if (b.name === "listen") {
      ev.preventDefault();
      var data = designData();
      data.set("listen", b.value);
      b.disabled = true;
      fetch("/listen", {method: "POST", body: data})
        .then(function (r) { if (!r.ok) { throw new Error("no sound"); } return r.blob(); })
        .then(function (blob) {
          if (player) { player.pause(); URL.revokeObjectURL(player.src); }
          player = new Audio(URL.createObjectURL(blob));
          return player.play();
        })
        .catch(function () { /* the preview shows the design's errors */ })
        .then(function () { b.disabled = false; });
    } else if (b.id === "trim-button") {
      ev.preventDefault();
      var td = new FormData(form);
      td.delete("design_file");
      var answer = document.getElementById("trim-answer");
      fetch("/api/trim", {method: "POST", body: td, headers: {"Accept": "application/json"}})
        .then(function (r) { return r.json(); })
        .then(function (res) {
          answer.textContent = "";
          if (!res.ok) { fillMessages(res.errors, {}); return; }
          fillMessages({}, {});
          var t = res.trim, head = document.createElement("p"), ul = document.createElement("ul");
          head.className = "trim-head";
          head.textContent = t.label + ": " + t.measured_hz + " Hz (" + t.note + " " +
            (t.cents >= 0 ? "+" : "") + t.cents.toFixed(1) + " cents)";
          t.lines.forEach(function (line) { var li = document.createElement("li"); li.textContent = line; ul.appendChild(li); });
          var box = document.createElement("div");
          box.className = "trim-answer";
          box.appendChild(head); box.appendChild(ul);
          answer.appendChild(box);
        });
    }
  });

  showKinds();
}());
