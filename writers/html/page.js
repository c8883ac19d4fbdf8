(function () {
  "use strict";
  var d = document, body = d.body, errors = 0;
  window.addEventListener("error", function () { body.setAttribute("data-errors", ++errors); });
  function all(sel, root) { return Array.prototype.slice.call((root || d).querySelectorAll(sel)); }
  // A mark's state: its data-s, else its symbol's name (g-built: built).
  function state(e) { return e.getAttribute("data-s") || (e.getAttribute("href") || "").slice(3); }
  // A mark id's joint: the id less its view, '_' escapes read back.
  function joint(id) {
    try { return decodeURIComponent(id.replace(/^[a-z]+-/, "").replace(/_/g, "%")); } catch (e) { return ""; }
  }

  // Marks per state in the axonometric view (a compact path counts its
  // data-n marks), written on the body for readers and tests.
  var counts = {};
  all("#view-axo .mk > path, #view-axo .mk > use:not([href='#g-at'])").forEach(function (e) {
    var s = state(e);
    counts[s] = (counts[s] || 0) + (Number(e.getAttribute("data-n")) || 1);
  });
  Object.keys(counts).forEach(function (s) { body.setAttribute("data-marks-" + s, counts[s]); });

  // A large findings table comes as data (see writeFindingsData): its
  // rows are drawn here, as the page would have held them.
  var data = d.getElementById("findings-data");
  if (data) {
    var fd = JSON.parse(data.textContent), out = [];
    var esc = function (s) {
      return s.replace(/&/g, "&amp;").replace(/</g, "&lt;").replace(/>/g, "&gt;").replace(/"/g, "&quot;");
    };
    fd.rows.forEach(function (r, i) {
      var msg = r[5];
      if (r[4] >= 0) {
        var n = r[5].split(" "), k = 0;
        msg = fd.text[r[4]].replace(/~/g, function () { return n[k++]; });
      }
      var j = r[2], to = r[7] === "=" ? "axo-" + j : r[7], label = j === null ? "location" : j;
      var cell = to ? '<a href="#' + esc(to) + '">' + esc(label) + "</a>" : (j === null ? "-" : esc(j));
      out.push('<tr id="' + "f-" + (i + 1) + '"' + (fd.sev[r[0]] === "error" ? ' class="e"' : "") + "><td>" +
        esc(fd.sev[r[0]]) + "</td><td>" + esc(fd.code[r[1]]) + "</td><td>" + cell + "</td><td>" + r[3] +
        "</td><td>" + esc(msg) + "</td><td>" + (r[6] || "-") + "</td></tr>");
    });
    d.querySelector("#findings-table tbody").innerHTML = out.join("");
  }

  // The findings table: filter by code (second cell) and part (fourth).
  // Of the matching rows the first 500 are shown until "show all" is
  // pressed, so that a run with tens of thousands of findings opens fast.
  var rows = all("#findings-table tbody tr"), limit = 500, every = /^#f-/.test(location.hash);
  var code = d.getElementById("f-code"), part = d.getElementById("f-part");
  var shown = d.getElementById("f-shown"), more = d.getElementById("f-more");
  function filter() {
    var c = code.value, p = part.value, n = 0, vis = 0;
    rows.forEach(function (r) {
      var ok = (!c || r.cells[1].textContent === c) &&
        (!p || (" " + r.cells[3].textContent + " ").indexOf(" " + p + " ") >= 0);
      if (ok) n++;
      var show = ok && (every || vis < limit);
      if (show) vis++;
      if (r.hidden === show) r.hidden = !show;
    });
    shown.textContent = n + " of " + rows.length + " match" + (vis < n ? ", the first " + vis + " shown" : "");
    more.hidden = vis >= n;
  }
  if (code && part && shown && more) {
    code.addEventListener("change", filter);
    part.addEventListener("change", filter);
    more.addEventListener("click", function () { every = true; filter(); });
    // A link to a finding shows it, whatever the filters.
    d.addEventListener("click", function (ev) {
      var a = ev.target.closest && ev.target.closest("a[href^='#f-']");
      var r = a && d.getElementById(a.getAttribute("href").slice(1));
      if (r && r.hidden) { code.value = ""; part.value = ""; every = true; filter(); }
    });
    filter();
    var at = /^#f-/.test(location.hash) && d.getElementById(location.hash.slice(1));
    if (data && at) at.scrollIntoView();
  }
  body.setAttribute("data-rows", rows.length);

  // A link to a mark rings the joint's marks in every picture and lights
  // its rows in the part-pair tables.
  var rings = [];
  function ringAt(e) {
    var c = d.createElementNS("http://www.w3.org/2000/svg", "circle");
    c.setAttribute("class", "ring");
    c.setAttribute("cx", e.getAttribute("x"));
    c.setAttribute("cy", e.getAttribute("y"));
    c.setAttribute("r", "80");
    e.parentNode.appendChild(c);
    rings.push(c);
  }
  function show(target) {
    rings.forEach(function (r) { r.remove(); });
    rings = [];
    all("tr.hl").forEach(function (r) { r.classList.remove("hl"); });
    var anchor = target.replace(/^axo-/, "");
    ["axo", "xy", "xz", "yz"].forEach(function (v) {
      var e = d.getElementById(v + "-" + anchor);
      if (e) ringAt(e);
    });
    if (anchor.indexOf("at-f") === 0) return;
    var j = joint(target);
    all('[data-j="' + CSS.escape(j) + '"]').forEach(ringAt);
    all("table.conns tbody tr").forEach(function (r) {
      if (r.cells[0].textContent === j) r.classList.add("hl");
    });
  }
  d.addEventListener("click", function (ev) {
    var a = ev.target.closest && ev.target.closest("a[href^='#axo-']");
    if (a) show(a.getAttribute("href").slice(1));
  });

  // Hovering a mark names its joint.
  d.addEventListener("mouseover", function (ev) {
    var e = ev.target;
    if (e.tagName !== "use" || e.firstChild) return;
    var j = e.getAttribute("data-j") || (e.id ? joint(e.id) : "");
    if (!j) return;
    var t = d.createElementNS("http://www.w3.org/2000/svg", "title");
    t.textContent = j + ", " + state(e);
    e.appendChild(t);
  });

  // Click an orthographic view to enlarge it.
  all("figure.view:not(.axo)").forEach(function (f) {
    f.addEventListener("click", function () { f.classList.toggle("wide"); });
  });
  body.setAttribute("data-script-ms", Math.round(performance.now()));
  window.addEventListener("load", function () { body.setAttribute("data-load-ms", Math.round(performance.now())); });
  body.setAttribute("data-ready", "1");
})();
