/* cutplan page: live preview, messages beside fields, play and trim without leaving the page.
   The form works without this file: every button is a plain submit. */
(function () {
  "use strict";
  var form = document.getElementById("design");
  if (!form || !window.fetch || !window.FormData) { return; }
  document.documentElement.classList.add("js");
  var preview = document.getElementById("preview");
  var seq = 0, timer = null, player = null, inflight = null;

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

  /* While a preview plans, ask the server how far it has got (arched bars solved) and say so. */
  var progressBox = document.getElementById("progress"), watching = null;

  function jobId() {
    var a = new Uint8Array(12);
    (window.crypto || {getRandomValues: function (x) {
      for (var i = 0; i < x.length; i++) { x[i] = Math.floor(Math.random() * 256); } return x; }}).getRandomValues(a);
    return Array.prototype.map.call(a, function (b) { return ("0" + b.toString(16)).slice(-2); }).join("");
  }

  function watchProgress(job, mine) {
    clearTimeout(watching);
    if (!progressBox) { return; }
    function ask() {
      fetch("/progress?job=" + job, {headers: {"Accept": "application/json"}})
        .then(function (r) { return r.json(); })
        .then(function (p) {
          if (mine !== seq) { return; }
          if (p.total > 0) {
            progressBox.textContent = "planning: " + p.done + " of " + p.total + " arched bars solved";
            progressBox.hidden = false;
          }
        })
        .catch(function () { /* the preview itself reports a lost server */ })
        .then(function () { if (mine === seq && form.classList.contains("busy")) { watching = setTimeout(ask, 500); } });
    }
    watching = setTimeout(ask, 300);
  }

  function stopProgress() {
    clearTimeout(watching);
    if (progressBox) { progressBox.hidden = true; progressBox.textContent = ""; }
  }

  function refresh() {
    var mine = ++seq, job = jobId();
    form.classList.add("busy");
    // a newer edit makes the last preview stale: abort it, so the server stops planning it
    if (inflight && window.AbortController) { inflight.abort(); }
    inflight = window.AbortController ? new AbortController() : null;
    watchProgress(job, mine);
    fetch("/preview", {method: "POST", body: designData(),
                       headers: {"Accept": "application/json", "X-Cutplan-Job": job},
                       signal: inflight ? inflight.signal : undefined})
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
      .then(function () { if (mine === seq) { form.classList.remove("busy"); stopProgress(); } });
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

  form.addEventListener("keydown", function (ev) {
    /* Enter in a text field plans now instead of submitting (the page is already live) */
    if (ev.key === "Enter" && ev.target.tagName === "INPUT" && ev.target.type === "text") {
      ev.preventDefault();
      if ((ev.target.name || "").indexOf("trim.") === 0) { sendTrim(null); return; }
      clearTimeout(timer);
      refresh();
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
      sendTrim(null);
    }
  });

  /* Trim from the microphone: record a few seconds of raw samples, make a 16-bit WAV, and send
     it as the recording. Only where the browser allows capture (this machine, or https). */
  var RECORD_SECONDS = 3;
  var CAPTURE_URL = document.currentScript ? new URL("capture.js", document.currentScript.src).href : "/static/capture.js";

  function wavBlob(chunks, rate) {
    var n = chunks.reduce(function (a, c) { return a + c.length; }, 0);
    var buf = new ArrayBuffer(44 + 2 * n), v = new DataView(buf), o = 0;
    function str(s) { for (var i = 0; i < s.length; i++) { v.setUint8(o++, s.charCodeAt(i)); } }
    function u32(x) { v.setUint32(o, x, true); o += 4; }
    function u16(x) { v.setUint16(o, x, true); o += 2; }
    str("RIFF"); u32(36 + 2 * n); str("WAVE"); str("fmt "); u32(16); u16(1); u16(1);
    u32(rate); u32(2 * rate); u16(2); u16(16); str("data"); u32(2 * n);
    chunks.forEach(function (c) {
      for (var i = 0; i < c.length; i++) {
        var x = Math.max(-1, Math.min(1, c[i]));
        v.setInt16(o, x < 0 ? x * 32768 : x * 32767, true); o += 2;
      }
    });
    return new Blob([buf], {type: "audio/wav"});
  }

  function sendTrim(recording) {
    var td = new FormData(form);
    td.delete("design_file");
    if (recording) { td.set("trim.recording", recording, "microphone.wav"); td.set("trim.measured", ""); }
    var answer = document.getElementById("trim-answer");
    return fetch("/api/trim", {method: "POST", body: td, headers: {"Accept": "application/json"}})
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
        if (t.drawing) {
          /* the server's own SVG text (numbers and escaped labels only, no external assets) */
          var fig = document.createElement("div");
          fig.className = "trim-drawing"; fig.innerHTML = t.drawing; box.appendChild(fig);
        }
        answer.appendChild(box);
        var st = document.getElementById("trim.state"), done = document.getElementById("trim.done");
        if (st) { st.value = t.state || ""; }
        if (done) { done.checked = false; }
      });
  }

  /* Capture a fixed count of frames (RECORD_SECONDS at the context's rate), placed by the frame
     the audio thread took them at: the same samples on a quiet or a busy machine. */
  function capture(ctx, src) {
    var need = Math.round(RECORD_SECONDS * ctx.sampleRate), samples = new Float32Array(need);
    return ctx.audioWorklet.addModule(CAPTURE_URL).then(function () {
      var node = new AudioWorkletNode(ctx, "cutplan-capture", {numberOfInputs: 1, numberOfOutputs: 1});
      var first = null;
      src.connect(node); node.connect(ctx.destination);
      return new Promise(function (done) {
        node.port.onmessage = function (e) {
          if (first === null) { first = e.data.frame; }
          var at = e.data.frame - first, part = e.data.samples;
          if (at < need) { samples.set(part.subarray(0, need - at), at); }
          if (at + part.length >= need) {
            node.port.onmessage = null; src.disconnect(); node.disconnect();
            done(samples);
          }
        };
      });
    });
  }

  function record(button) {
    var state = document.getElementById("record-state");
    button.disabled = true;
    state.textContent = "listening...";
    navigator.mediaDevices.getUserMedia({audio: {echoCancellation: false, noiseSuppression: false, autoGainControl: false}})
      .then(function (stream) {
        var Ctx = window.AudioContext || window.webkitAudioContext, ctx = new Ctx();
        if (!ctx.audioWorklet) { throw {name: "this browser has no audio worklets"}; }
        return capture(ctx, ctx.createMediaStreamSource(stream)).then(function (samples) {
          stream.getTracks().forEach(function (t) { t.stop(); });
          var rate = ctx.sampleRate;
          ctx.close();
          state.textContent = "measuring...";
          return sendTrim(wavBlob([samples], rate));
        });
      })
      .then(function () { state.textContent = ""; })
      .catch(function (err) { state.textContent = "no microphone: " + (err && err.name ? err.name : err); })
      .then(function () { button.disabled = false; });
  }

  var mic = form.querySelector(".mic");
  if (mic && navigator.mediaDevices && navigator.mediaDevices.getUserMedia && window.isSecureContext) {
    mic.hidden = false;
    document.getElementById("record-button").addEventListener("click", function (ev) { record(ev.target); });
  }

  showKinds();
}());
