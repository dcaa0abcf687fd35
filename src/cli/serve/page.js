// coilwright workbench page: plain JavaScript, no framework, nothing
// fetched but this server's own /api calls.
"use strict";

const $ = (id) => document.getElementById(id);
const el = (tag, props, ...kids) => {
  const e = document.createElement(tag);
  Object.assign(e, props || {});
  for (const k of kids) e.append(k);
  return e;
};

const S = {
  gen: 0,            // the newest edit sent
  shown: 0,          // the edit whose results are on screen
  editAt: 0,         // when the newest edit was made (performance.now)
  view: "stack",     // "stack" or a layer number
  hidden: new Set(), // layers switched off in the stacked view
  box: null,         // current viewBox [x, y, w, h]
  base: null,        // the drawing's own viewBox
  last: null,        // the last "ok" view from the server
  timer: 0,
  sweepId: 0,
  best: null,
};

async function call(method, url, body) {
  const opts = { method, headers: {} };
  if (body !== undefined) {
    opts.headers["Content-Type"] = "application/json";
    opts.body = JSON.stringify(body);
  }
  const r = await fetch(url, opts);
  return r.json();
}

function setState(s, label) {
  document.body.dataset.state = s;
  $("state").textContent = label;
}

function say(text, bad) {
  const m = $("message");
  m.hidden = !text;
  m.textContent = text || "";
  m.classList.toggle("bad", !!bad);
}

// ---- edits -> server -------------------------------------------------

function edited(set) {
  S.gen += 1;
  S.editAt = performance.now();
  setState("computing", "computing…");
  document.body.dataset.copper = "stale";
  const gen = S.gen;
  clearTimeout(S.timer);
  const send = () => {
    call("POST", "/api/view", { gen, text: $("text").value, set })
      .then((v) => received(gen, v))
      .catch((e) => { if (gen === S.gen) { setState("failed", "server unreachable"); say(String(e), true); } });
  };
  if (set) send(); else S.timer = setTimeout(send, 90);
}

// The copper and rule problems arrive first; the predictions (the slow
// analysis) are asked for next, and the page says "computing" until they
// are in.
function received(gen, v) {
  if (v.status === "superseded" || gen !== S.gen) return; // stale: a newer edit is on its way
  if (v.status === "edit_refused") {
    setState("errors", "edit refused");
    say(`${v.key}: ${v.message}`, true);
    shown(gen, v);
    return;
  }
  if (typeof v.text === "string" && v.text !== $("text").value) {
    const t = $("text");
    const at = t.selectionStart;
    t.value = v.text;
    t.selectionStart = t.selectionEnd = Math.min(at, v.text.length);
  }
  if (v.form) fillForm(v.form);
  showErrors(v);
  document.body.dataset.copper = "fresh";
  if (v.status === "ok") {
    S.last = v;
    showCopper(v);
    S.copperMs = performance.now() - S.editAt;
    setState("computing", "computing predictions…");
    call("POST", "/api/predictions", { gen, text: $("text").value })
      .then((p) => predicted(gen, p))
      .catch((e) => { if (gen === S.gen) { setState("failed", "server unreachable"); say(String(e), true); } });
    return;
  }
  if (v.status === "errors") {
    setState("errors", `${v.errors.length} problem${v.errors.length === 1 ? "" : "s"} in the text`);
  } else {
    setState("failed", "failed");
    say(v.message || "the computation failed", true);
  }
  shown(gen, v);
}

function predicted(gen, v) {
  if (v.status === "superseded" || gen !== S.gen) return;
  if (v.status === "ok") {
    showFacts(v);
    const errs = S.last.problems.filter((p) => p.severity === "error").length;
    const notes = [errs ? `${errs} rule error${errs === 1 ? "" : "s"}` : "", v.limits.length ? "limit exceeded" : ""]
      .filter((x) => x);
    setState("ready", "up to date" + (notes.length ? ": " + notes.join(", ") : ""));
  } else if (v.status === "errors") {
    showErrors(v);
    setState("errors", "problems in the text");
  } else {
    setState("failed", "failed");
    say(v.message || "the analysis failed", true);
  }
  shown(gen, v);
}

// Marks edit `gen` as the one on screen and logs how long it took.
function shown(gen, v) {
  S.shown = gen;
  document.body.dataset.shownGen = String(gen);
  const ms = performance.now() - S.editAt;
  window.cwLastUpdateMs = ms;
  window.cwCopperMs = S.copperMs || ms;
  S.copperMs = 0;
  document.body.dataset.updateMs = ms.toFixed(1);
  $("footer").textContent = `last update ${ms.toFixed(0)} ms after the edit (server ${Number(v.server_ms || 0).toFixed(0)} ms for the last part)`;
}

// ---- form --------------------------------------------------------------

function buildForm(fields) {
  const f = $("form");
  for (const fd of fields) {
    const id = "f-" + fd.key.replace(/\./g, "-");
    let input;
    if (fd.choices.length && fd.key !== "rules.profile") {
      input = el("select", { id });
      input.append(el("option", { value: "", textContent: "(not set)" }));
      for (const c of fd.choices) input.append(el("option", { value: c, textContent: c }));
      input.addEventListener("change", () => edited({ key: fd.key, value: input.value }));
    } else {
      input = el("input", { id, type: "text", spellcheck: false });
      if (fd.choices.length) {
        const dl = el("datalist", { id: id + "-words" });
        for (const c of fd.choices) dl.append(el("option", { value: c }));
        f.append(dl);
        input.setAttribute("list", id + "-words");
      }
      input.addEventListener("change", () => edited({ key: fd.key, value: input.value }));
    }
    input.dataset.key = fd.key;
    input.title = fd.doc;
    f.append(el("label", { htmlFor: id, textContent: fd.key, title: fd.doc }), input);
  }
}

function fillForm(values) {
  for (const input of $("form").querySelectorAll("[data-key]")) {
    if (document.activeElement === input) continue;
    const v = values[input.dataset.key];
    input.value = v === null || v === undefined ? "" : v;
  }
}

// ---- errors ------------------------------------------------------------

function showErrors(v) {
  const list = $("error-list");
  list.textContent = "";
  for (const i of $("form").querySelectorAll(".bad")) i.classList.remove("bad");
  const errors = v.status === "errors" ? v.errors : [];
  $("errors").hidden = errors.length === 0;
  $("rendered").textContent = v.rendered || "";
  for (const e of errors) {
    const where = e.line ? `${e.line}:${e.column}` : "";
    const li = el("li", {},
      el("span", { className: "where", textContent: `${where} ${e.key}` }),
      `: ${e.message}`);
    if (e.help) li.append(el("span", { className: "help", textContent: e.help }));
    li.dataset.line = e.line || "";
    li.dataset.column = e.column || "";
    li.addEventListener("click", () => selectAt(e.line, e.column));
    list.append(li);
    const input = $("form").querySelector(`[data-key="${e.key}"]`);
    if (input) input.classList.add("bad");
  }
}

function selectAt(line, column) {
  if (!line) return;
  const t = $("text");
  const lines = t.value.split("\n");
  let at = 0;
  for (let i = 0; i < line - 1 && i < lines.length; i++) at += lines[i].length + 1;
  at += Math.max(0, (column || 1) - 1);
  const end = t.value.indexOf("\n", at);
  t.focus();
  t.setSelectionRange(at, end < 0 ? t.value.length : end);
  t.scrollTop = Math.max(0, (line - 4) * 18);
}

// ---- previews ----------------------------------------------------------

const svgUrl = (text) => "data:image/svg+xml;charset=utf-8," + encodeURIComponent(text);

function showCopper(v) {
  const n = v.layers.length;
  if (S.view !== "stack" && S.view > n) S.view = "stack";
  for (const l of [...S.hidden]) if (l > n) S.hidden.delete(l);
  // view buttons
  const views = $("views");
  views.textContent = "";
  const vb = (label, key) => {
    const b = el("button", { type: "button", textContent: label });
    b.classList.toggle("on", S.view === key);
    b.addEventListener("click", () => { S.view = key; showCopper(S.last); });
    views.append(b);
  };
  vb("stacked", "stack");
  for (const l of v.layers) vb(`layer ${l.layer}`, l.layer);
  // layer toggles (stacked view)
  const tg = $("toggles");
  tg.textContent = "";
  if (S.view === "stack") {
    for (const l of v.layers) {
      const box = el("input", { type: "checkbox", checked: !S.hidden.has(l.layer) });
      box.dataset.layer = l.layer;
      box.addEventListener("change", () => {
        if (box.checked) S.hidden.delete(l.layer); else S.hidden.add(l.layer);
        applyToggles();
      });
      const sw = el("span", { className: "swatch" });
      sw.setAttribute("data-colour", l.colour);
      sw.style.background = l.colour;
      tg.append(el("label", {}, box, sw, `layer ${l.layer}`));
    }
  }
  // main drawing
  const doc = S.view === "stack" ? v.stack : v.layers[S.view - 1].svg;
  const p = $("preview");
  p.innerHTML = doc;
  const svg = p.querySelector("svg");
  if (svg) {
    svg.removeAttribute("width");
    svg.removeAttribute("height");
    const base = svg.getAttribute("viewBox").split(/[\s,]+/).map(Number);
    const same = S.base && base.every((x, i) => Math.abs(x - S.base[i]) < 1e-9);
    if (!same || !S.box) S.box = base.slice();
    S.base = base;
    svg.setAttribute("viewBox", S.box.join(" "));
    svg.setAttribute("preserveAspectRatio", "xMidYMid meet");
    applyToggles();
  }
  $("summary").textContent = v.summary;
  // thumbnails
  const th = $("thumbs");
  th.textContent = "";
  for (const l of v.layers) {
    const f = el("figure", {}, el("img", { src: svgUrl(l.svg), alt: `copper layer ${l.layer}` }),
      el("figcaption", { textContent: `layer ${l.layer}` }));
    f.classList.toggle("on", S.view === l.layer);
    f.addEventListener("click", () => { S.view = S.view === l.layer ? "stack" : l.layer; showCopper(S.last); });
    th.append(f);
  }
  showProblems(v.problems);
}

function showFacts(v) {
  showNumbers(v);
  showPlots(v.plots);
  const metrics = $("metrics");
  if (!metrics.children.length) {
    for (const k of Object.keys(v.report).filter((k) => typeof v.report[k] === "number")) {
      metrics.append(el("option", { value: k }));
    }
  }
}

function applyToggles() {
  const svg = $("preview").querySelector("svg");
  if (!svg || S.view !== "stack") return;
  for (const g of svg.querySelectorAll('g[id^="layer-"]')) {
    const l = Number(g.id.slice(6));
    g.setAttribute("visibility", S.hidden.has(l) ? "hidden" : "visible");
  }
}

function setBox(box) {
  S.box = box;
  const svg = $("preview").querySelector("svg");
  if (svg) svg.setAttribute("viewBox", box.join(" "));
}

function zoom(factor, cx, cy) {
  if (!S.box) return;
  const [x, y, w, h] = S.box;
  const px = cx === undefined ? x + w / 2 : cx;
  const py = cy === undefined ? y + h / 2 : cy;
  const nw = Math.min(Math.max(w * factor, S.base[2] / 200), S.base[2] * 4);
  const f = nw / w;
  setBox([px - (px - x) * f, py - (py - y) * f, w * f, h * f]);
}

function toDrawing(evt) {
  const svg = $("preview").querySelector("svg");
  const r = svg.getBoundingClientRect();
  const [x, y, w, h] = S.box;
  const s = Math.max(w / r.width, h / r.height); // "meet" scaling
  const ox = (r.width * s - w) / 2, oy = (r.height * s - h) / 2;
  return [x - ox + (evt.clientX - r.left) * s, y - oy + (evt.clientY - r.top) * s, s];
}

function setupPanZoom() {
  const p = $("preview");
  p.addEventListener("wheel", (e) => {
    if (!S.box) return;
    e.preventDefault();
    const [cx, cy] = toDrawing(e);
    zoom(e.deltaY > 0 ? 1.2 : 1 / 1.2, cx, cy);
  }, { passive: false });
  let drag = null;
  p.addEventListener("pointerdown", (e) => {
    if (!S.box) return;
    drag = { x: e.clientX, y: e.clientY, box: S.box.slice(), s: toDrawing(e)[2] };
    p.setPointerCapture(e.pointerId);
    p.classList.add("dragging");
  });
  p.addEventListener("pointermove", (e) => {
    if (!drag) return;
    const b = drag.box;
    setBox([b[0] - (e.clientX - drag.x) * drag.s, b[1] - (e.clientY - drag.y) * drag.s, b[2], b[3]]);
  });
  const end = () => { drag = null; p.classList.remove("dragging"); };
  p.addEventListener("pointerup", end);
  p.addEventListener("pointercancel", end);
  $("zoom-in").addEventListener("click", () => zoom(1 / 1.4));
  $("zoom-out").addEventListener("click", () => zoom(1.4));
  $("fit").addEventListener("click", () => S.base && setBox(S.base.slice()));
}

// ---- numbers, problems, plots -----------------------------------------

function showNumbers(v) {
  const body = $("numbers").querySelector("tbody");
  body.textContent = "";
  for (const n of v.numbers) {
    const value = el("td", { className: "v", textContent: n.shown === null ? "–" : n.shown });
    value.dataset.key = n.key;
    value.dataset.si = n.si === null ? "" : String(n.si);
    const tr = el("tr", {}, el("td", { className: "l", textContent: n.label }), value,
      el("td", { className: "u", textContent: n.shown === null ? "" : n.unit }));
    tr.classList.toggle("over", n.over);
    body.append(tr);
  }
  const c = $("cautions");
  c.textContent = "";
  for (const x of v.limits) c.append(el("li", { className: "limit", textContent: `limit exceeded (${x.id}): ${x.message}` }));
  for (const x of v.advice) c.append(el("li", { textContent: `advice (${x.id}): ${x.message}` }));
}

function showProblems(problems) {
  const list = $("problems");
  list.textContent = "";
  $("problem-count").textContent = problems.length ? `(${problems.length})` : "(none)";
  for (const p of problems) {
    const layer = p.layer ? `layer ${p.layer}, ` : "";
    const places = p.count > 1 ? `, worst of ${p.count} places` : "";
    const li = el("li", { className: p.severity },
      el("span", { className: "rule", textContent: p.rule }),
      ` ${p.severity} at ${layer}x ${fixed(p.x, 3)}, y ${fixed(p.y, 3)} mm: ${p.message} ` +
      `(measured ${fixed(p.measured, 4)} mm, needs ${fixed(p.required, 4)} mm${places})`);
    li.title = "show it on the preview";
    li.addEventListener("click", () => {
      if (p.layer && S.view !== "stack" && S.view !== p.layer) { S.view = p.layer; showCopper(S.last); }
      const w = Math.max(S.base[2] / 12, 1);
      const h = w * S.base[3] / S.base[2];
      setBox([p.x - w / 2, -p.y - h / 2, w, h]);
    });
    list.append(li);
  }
}

function showPlots(plots) {
  const box = $("plots");
  box.textContent = "";
  for (const p of plots) {
    box.append(el("figure", {}, el("img", { src: svgUrl(p.svg), alt: p.title }),
      el("figcaption", { textContent: p.title })));
  }
}

// ---- sweep ----------------------------------------------------------------

// `v` with `d` decimals, never "-0.000" (as the command line prints).
function fixed(v, d) {
  const s = v.toFixed(d);
  return /^-[0.]+$/.test(s) ? s.slice(1) : s;
}

const lines = (id) => $(id).value.split("\n").map((s) => s.trim()).filter((s) => s);

async function runSweep() {
  $("sw-state").textContent = "starting…";
  $("sw-take").disabled = true;
  const v = await call("POST", "/api/sweep", {
    text: $("text").value,
    vary: lines("sw-vary"),
    require: lines("sw-require"),
    objective: $("sw-objective").value.trim(),
    maximize: $("sw-sense").value === "max",
  });
  if (v.status !== "started") {
    const first = v.errors ? v.errors.map((e) => `${e.key}: ${e.message}`).join("\n") : v.message;
    $("sw-state").textContent = "";
    say(`sweep refused: ${first}`, true);
    return;
  }
  say("");
  S.sweepId = v.id;
  $("sw-progress").hidden = false;
  $("sw-progress").max = v.total;
  pollSweep();
}

async function pollSweep() {
  const v = await call("GET", "/api/sweep");
  if (v.id !== S.sweepId) return;
  $("sw-progress").value = v.done;
  $("sw-state").textContent = `${v.done} of ${v.total} candidates, ${v.elapsed_s.toFixed(1)} s`;
  if (v.state !== "done") { setTimeout(pollSweep, 250); return; }
  $("sw-progress").hidden = true;
  showSweep(v.result);
}

function showSweep(r) {
  if (r.failed) { $("sw-state").textContent = ""; say(`sweep failed: ${r.failed}`, true); return; }
  $("sw-result").hidden = false;
  document.body.dataset.sweep = "done";
  $("sw-plot").src = svgUrl(r.plot);
  $("sw-summary").textContent = r.summary + (r.cut_short ? "\n(stopped at the time limit)" : "");
  const head = $("sw-table").querySelector("thead");
  const body = $("sw-table").querySelector("tbody");
  head.textContent = body.textContent = "";
  const keys = r.rows.length ? r.rows[0].params.map((p) => p[0]) : [];
  head.append(el("tr", {}, el("th", { textContent: "rank" }), el("th", { textContent: r.objective }),
    el("th", { textContent: r.versus }), ...keys.map((k) => el("th", { textContent: k }))));
  const fmt = (x) => (typeof x === "number" ? Number(x.toPrecision(5)).toString() : "–");
  for (const row of r.rows) {
    body.append(el("tr", {}, el("td", { textContent: row.rank }), el("td", { textContent: fmt(row.objective) }),
      el("td", { textContent: fmt(row.versus) }), ...row.params.map((p) => el("td", { textContent: p[1] }))));
  }
  S.best = r.best && r.best.text;
  $("sw-take").disabled = !S.best;
  $("sw-state").textContent = r.best ? `best: ${r.best.params.map((p) => p.join(" = ")).join(", ")}` : "no candidate meets every requirement";
}

// ---- files ---------------------------------------------------------------

async function writeFiles(replace, allow) {
  const v = await call("POST", "/api/write", { text: $("text").value, replace: !!replace, allow_over_limits: !!allow });
  if (v.status === "exists") {
    if (confirm(v.message)) writeFiles(true, allow);
    return;
  }
  if (v.status === "over_limits") {
    say(v.message, true);
    if (confirm("The prediction exceeds the design's own limits. Write the files anyway?")) writeFiles(replace, true);
    return;
  }
  if (v.status === "errors") { say(v.rendered, true); return; }
  say(v.message, v.status !== "written");
  document.body.dataset.written = v.status;
}

async function saveDesign() {
  const v = await call("POST", "/api/save", { text: $("text").value });
  say(v.message, v.status !== "saved");
  document.body.dataset.saved = v.status;
}

// ---- start ------------------------------------------------------------------

async function start() {
  const s = await call("GET", "/api/session");
  $("file").textContent = s.design ? s.design + (s.design_exists ? "" : " (new)") : "(no design file: Save is off)";
  $("save").disabled = !s.design;
  $("write").disabled = !s.out;
  $("write").title = s.out ? `Write build's files into ${s.out}` : "start the workbench with -o DIR to write files";
  buildForm(s.form);
  $("text").value = s.text;
  $("text").addEventListener("input", () => edited(null));
  $("save").addEventListener("click", saveDesign);
  $("write").addEventListener("click", () => writeFiles(false, false));
  $("sw-run").addEventListener("click", runSweep);
  $("sw-take").addEventListener("click", () => {
    if (!S.best) return;
    $("text").value = S.best;
    edited(null);
  });
  document.addEventListener("keydown", (e) => {
    if ((e.ctrlKey || e.metaKey) && e.key === "s" && s.design) { e.preventDefault(); saveDesign(); }
  });
  setupPanZoom();
  edited(null);
}

start();
