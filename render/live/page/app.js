// kerrscope explore: the page's controls, the progressive view, the
// readouts. Plain JavaScript; talks only to the server that sent it.
"use strict";

const $ = (id) => document.getElementById(id);
window.addEventListener("error", (ev) => showError({ error: "page error: " + ev.message + " (" + ev.lineno + ")" }));
const client = Math.random().toString(36).slice(2) + Date.now().toString(36);

const state = {
  params: {},        // scene flag -> text, as on the command line
  initial: {},       // the starting values
  stage: null,       // the last stage drawn
  full: null,        // the last full stage
  img: null,         // its decoded image
  pin: null,         // pinned probe report
  hover: null,       // probe report under the pointer
  controller: null,  // the update in flight
};

// Plot geometry: the image sits in a box with axes around it.
const box = { left: 72, top: 46, right: 66, bottom: 56 };
let place = { x: 0, y: 0, w: 1, h: 1 }; // where the image is drawn, CSS px

// ---------------------------------------------------------------- controls

function paramInputs() { return document.querySelectorAll("[data-param]"); }

function readParams() {
  const p = {};
  for (const el of paramInputs()) {
    const name = el.dataset.param;
    if (el.type === "checkbox") {
      if (el.checked !== (state.initial[name] === "true")) p[name] = String(el.checked);
      continue;
    }
    const v = el.value.trim();
    if (v !== "") p[name] = v;
  }
  return p;
}

function settings() {
  return {
    map: $("map").value,
    size: parseInt($("size").value, 10),
    band: $("show-band").checked,
    gmin: $("gmin").value, gmax: $("gmax").value, decades: $("decades").value,
    order: $("order").value,
  };
}

function setParam(name, value) {
  const el = document.querySelector(`[data-param="${name}"]`);
  if (el) el.value = value;
}

function syncSliders() {
  const a = parseFloat(document.querySelector('[data-param="spin"]').value);
  if (isFinite(a)) {
    $("spin-slider").value = a;
    const f = Math.log10(Math.max(1e-5, 1 - Math.abs(a)));
    $("spin-fine").value = f;
    $("spin-fine-out").textContent = f.toFixed(2);
  }
  const i = parseFloat(document.querySelector('[data-param="inclination"]').value);
  if (isFinite(i)) $("inc-slider").value = i;
  const pa = parseFloat(document.querySelector('[data-param="position-angle"]').value);
  if (isFinite(pa)) $("pa-slider").value = pa;
}

function fmt(x, d) {
  if (x === null || x === undefined || !isFinite(x)) return "–";
  const a = Math.abs(x);
  if (a !== 0 && (a < 1e-3 || a >= 1e6)) return x.toExponential(Math.max(1, (d || 5) - 2));
  return Number(x.toPrecision(d || 6)).toString();
}

async function start() {
  const info = await (await fetch("/api/start")).json();
  for (const p of info.params) {
    state.initial[p.flag] = p.value;
    const el = document.querySelector(`[data-param="${p.flag}"]`);
    if (!el) continue;
    el.title = p.usage + "  [" + p.key + "]";
    if (el.type === "checkbox") el.checked = p.value === "true";
    else if (p.automatic) el.value = "";
    else el.value = p.value;
  }
  // The field's automatic value is 0; show it blank with the placeholder.
  if (state.initial["fov"] === "0") setParam("fov", "");
  for (const m of info.maps) {
    const o = document.createElement("option");
    o.textContent = m;
    $("map").appendChild(o);
  }
  $("size").value = String(info.size);
  if ($("size").value !== String(info.size)) {
    const o = document.createElement("option");
    o.textContent = info.size;
    $("size").appendChild(o);
    $("size").value = String(info.size);
  }
  fromHash();
  syncSliders();
  wire();
  update();
}

// The address may carry values after '#': scene flags, map, size, band,
// critical (true/false) and pin=α,β, e.g. #spin=0.99&map=intensity&pin=-6,2.
let pinAfterLoad = null;
function fromHash() {
  const h = new URLSearchParams(location.hash.slice(1));
  for (const [k, v] of h) {
    const el = document.querySelector(`[data-param="${CSS.escape(k)}"]`);
    if (el) {
      if (el.type === "checkbox") el.checked = v === "true"; else el.value = v;
      continue;
    }
    if (["map", "size", "order", "gmin", "gmax", "decades"].includes(k)) $(k).value = v;
    if (k === "band") $("show-band").checked = v === "true";
    if (k === "critical") $("show-critical").checked = v !== "false";
    if (k === "pin") {
      const [a, b] = v.split(",").map(Number);
      if (isFinite(a) && isFinite(b)) pinAfterLoad = [a, b];
    }
  }
}

let pending = 0;
function schedule() {
  if (pending) return;
  pending = requestAnimationFrame(() => { pending = 0; update(); });
}

function wire() {
  for (const el of paramInputs()) {
    el.addEventListener(el.tagName === "SELECT" || el.type === "checkbox" ? "change" : "input", () => { syncSliders(); schedule(); });
  }
  for (const id of ["map", "order", "size", "show-band", "gmin", "gmax", "decades"]) {
    $(id).addEventListener($(id).tagName === "SELECT" || $(id).type === "checkbox" ? "change" : "input", schedule);
  }
  $("show-critical").addEventListener("change", drawOverlay);
  $("spin-slider").addEventListener("input", () => { setParam("spin", $("spin-slider").value); syncSliders(); schedule(); });
  $("spin-fine").addEventListener("input", () => {
    const cur = parseFloat(document.querySelector('[data-param="spin"]').value);
    const sign = cur < 0 ? -1 : 1;
    const a = sign * (1 - Math.pow(10, parseFloat($("spin-fine").value)));
    setParam("spin", Number(a.toPrecision(8)).toString());
    syncSliders();
    schedule();
  });
  $("inc-slider").addEventListener("input", () => { setParam("inclination", $("inc-slider").value); schedule(); });
  $("pa-slider").addEventListener("input", () => { setParam("position-angle", $("pa-slider").value); schedule(); });
  $("reset-window").addEventListener("click", () => {
    setParam("fov", ""); setParam("center-alpha", state.initial["center-alpha"] || "0"); setParam("center-beta", state.initial["center-beta"] || "0");
    if (state.initial["fov"] !== "0") setParam("fov", state.initial["fov"]);
    schedule();
  });
  $("save").addEventListener("click", save);
  $("render").addEventListener("click", render);
  wirePointer();
}

// ---------------------------------------------------------------- updates

function showError(body) {
  for (const el of document.querySelectorAll(".bad")) el.classList.remove("bad");
  if (!body) { $("error").hidden = true; return; }
  $("error").hidden = false;
  $("error").textContent = body.error;
  const f = body.field;
  if (f && f.param) {
    const el = document.querySelector(`[data-param="${f.param}"]`) || $(f.param);
    if (el) el.classList.add("bad");
  }
}

async function update() {
  if (state.controller) state.controller.abort();
  const ctl = new AbortController();
  state.controller = ctl;
  state.params = readParams();
  const body = JSON.stringify({ client, params: state.params, settings: settings() });
  let resp;
  try {
    resp = await fetch("/api/view", { method: "POST", headers: { "Content-Type": "application/json" }, body, signal: ctl.signal });
  } catch (e) { return; }
  if (!resp.ok) {
    showError(await resp.json().catch(() => ({ error: resp.statusText })));
    return;
  }
  const reader = resp.body.getReader();
  const dec = new TextDecoder();
  let buf = "";
  const times = [];
  try {
    for (;;) {
      const { value, done } = await reader.read();
      if (done) break;
      buf += dec.decode(value, { stream: true });
      let nl;
      while ((nl = buf.indexOf("\n")) >= 0) {
        const line = buf.slice(0, nl);
        buf = buf.slice(nl + 1);
        if (!line.trim()) continue;
        const st = JSON.parse(line);
        if (st.stage === "cancelled") return;
        if (st.stage === "error") { showError({ error: st.error }); return; }
        showError(null);
        times.push(`${st.stage} ${st.width}×${st.height} ${st.ms.toFixed(1)} ms`);
        $("timing").textContent = times.join(" · ");
        drawStage(st);
      }
    }
  } catch (e) { /* aborted by a newer update */ }
}

// toCanvas puts a stage's base64 RGBA pixels on a canvas of their size.
function toCanvas(text, w, h, c) {
  const raw = atob(text);
  const px = new Uint8ClampedArray(raw.length);
  for (let i = 0; i < raw.length; i++) px[i] = raw.charCodeAt(i);
  c = c || document.createElement("canvas");
  c.width = w; c.height = h;
  c.getContext("2d").putImageData(new ImageData(px, w, h), 0, 0);
  return c;
}

function drawStage(st) {
  if (st.stage === "full") state.full = st;
  state.stage = st;
  $("caption").textContent = st.caption + (st.uas_per_m ? `   ·   1 M = ${fmt(st.uas_per_m, 4)} µas` : "");
  layout(st);
  toCanvas(st.image, st.width, st.height, $("image"));
  drawAxes(st);
  if (st.stage === "full") {
    drawKey(st.legend);
    drawSpectrum(st.spectrum);
    drawBand(st);
    state.bandImg = st.band_image ? toCanvas(st.band_image, st.width, st.height) : null;
  }
  drawOverlay();
  if (st.stage === "full" && pinAfterLoad) {
    const [a, b] = pinAfterLoad;
    pinAfterLoad = null;
    pin(a, b);
    probe(a, b, 3).then((rep) => { if (rep) $("hover").innerHTML = crossings(rep, false); });
  }
}

function layout(st) {
  const W = 720 - box.left - box.right, H = 660 - box.top - box.bottom;
  const k = Math.min(W / st.width, H / st.height);
  const w = st.width * k, h = st.height * k;
  place = { x: box.left + (W - w) / 2, y: box.top + (H - h) / 2, w, h };
  for (const id of ["image"]) {
    const c = $(id);
    c.style.left = place.x + "px"; c.style.top = place.y + "px";
    c.style.width = w + "px"; c.style.height = h + "px";
  }
  const o = $("overlay");
  o.width = 720; o.height = 660;
}

// ---------------------------------------------------------------- axes

function niceTicks(lo, hi, n) {
  const span = hi - lo;
  if (!(span > 0)) return [];
  const raw = span / n, p = Math.pow(10, Math.floor(Math.log10(raw)));
  const step = [1, 2, 5, 10].map((m) => m * p).find((s) => s >= raw);
  const out = [];
  for (let v = Math.ceil(lo / step) * step; v <= hi + step * 1e-9; v += step) out.push(Math.abs(v) < step * 1e-9 ? 0 : v);
  return out;
}

function toScreen(alpha, beta) {
  const [a0, a1, b0, b1] = state.stage.edges;
  return [place.x + (alpha - a0) / (a1 - a0) * place.w, place.y + (b1 - beta) / (b1 - b0) * place.h];
}

function fromScreen(x, y) {
  const [a0, a1, b0, b1] = state.stage.edges;
  return [a0 + (x - place.x) / place.w * (a1 - a0), b1 - (y - place.y) / place.h * (b1 - b0)];
}

function drawAxes(st) {
  const c = $("axes"), g = c.getContext("2d");
  g.clearRect(0, 0, c.width, c.height);
  const [a0, a1, b0, b1] = st.edges;
  g.strokeStyle = "#5a5a5a"; g.fillStyle = "#333"; g.lineWidth = 1;
  g.strokeRect(place.x - 0.5, place.y - 0.5, place.w + 1, place.h + 1);
  g.font = "12px 'kerrscope mono', monospace";
  const tick = (x0, y0, x1, y1) => { g.beginPath(); g.moveTo(x0, y0); g.lineTo(x1, y1); g.stroke(); };
  g.textAlign = "center"; g.textBaseline = "top";
  for (const v of niceTicks(a0, a1, 7)) {
    const [x] = toScreen(v, 0);
    tick(x, place.y + place.h, x, place.y + place.h + 5);
    g.fillText(fmt(v, 4), x, place.y + place.h + 8);
  }
  g.textAlign = "right"; g.textBaseline = "middle";
  for (const v of niceTicks(b0, b1, 7)) {
    const [, y] = toScreen(0, v);
    tick(place.x - 5, y, place.x, y);
    g.fillText(fmt(v, 4), place.x - 8, y);
  }
  g.font = "13px kerrscope, sans-serif";
  g.textAlign = "center"; g.textBaseline = "alphabetic";
  g.fillText("α [M]", place.x + place.w / 2, place.y + place.h + 42);
  g.save(); g.translate(place.x - 52, place.y + place.h / 2); g.rotate(-Math.PI / 2);
  g.fillText("β [M]", 0, 0); g.restore();
  if (st.uas_per_m > 0) {
    const u = st.uas_per_m;
    g.font = "12px 'kerrscope mono', monospace";
    g.textAlign = "center"; g.textBaseline = "bottom";
    for (const v of niceTicks(a0 * u, a1 * u, 7)) {
      const [x] = toScreen(v / u, 0);
      tick(x, place.y - 5, x, place.y);
      g.fillText(fmt(v, 4), x, place.y - 7);
    }
    g.textAlign = "left"; g.textBaseline = "middle";
    for (const v of niceTicks(b0 * u, b1 * u, 7)) {
      const [, y] = toScreen(0, v / u);
      tick(place.x + place.w, y, place.x + place.w + 5, y);
      g.fillText(fmt(v, 4), place.x + place.w + 8, y);
    }
    g.font = "13px kerrscope, sans-serif";
    g.textAlign = "center"; g.textBaseline = "alphabetic";
    g.fillText("α [µas]", place.x + place.w / 2, place.y - 24);
    g.save(); g.translate(place.x + place.w + 58, place.y + place.h / 2); g.rotate(-Math.PI / 2);
    g.fillText("β [µas]", 0, 0); g.restore();
  }
}

// ---------------------------------------------------------------- overlay

let drag = null, hoverAt = null;

function drawOverlay() {
  const c = $("overlay"), g = c.getContext("2d");
  g.clearRect(0, 0, c.width, c.height);
  if (!state.stage) return;
  g.save();
  g.beginPath(); g.rect(place.x, place.y, place.w, place.h); g.clip();
  if (state.bandImg && $("show-band").checked) {
    g.imageSmoothingEnabled = false;
    g.drawImage(state.bandImg, place.x, place.y, place.w, place.h);
  }
  const full = state.full;
  if (full && full.critical && $("show-critical").checked) {
    g.strokeStyle = "#124ed8"; g.lineWidth = 2; g.setLineDash([7, 4]);
    g.beginPath();
    full.critical.forEach(([a, b], i) => { const [x, y] = toScreen(a, b); i ? g.lineTo(x, y) : g.moveTo(x, y); });
    g.closePath(); g.stroke(); g.setLineDash([]);
  }
  if (state.pin) {
    const [x, y] = toScreen(state.pin.alpha, state.pin.beta);
    g.strokeStyle = "#fff"; g.lineWidth = 3; cross(g, x, y, 7);
    g.strokeStyle = "#111"; g.lineWidth = 1.5; cross(g, x, y, 7);
  }
  if (drag && drag.moved) {
    g.fillStyle = "rgba(255,255,255,0.18)"; g.strokeStyle = "#fff"; g.lineWidth = 1; g.setLineDash([4, 3]);
    const x = Math.min(drag.x0, drag.x1), y = Math.min(drag.y0, drag.y1);
    g.fillRect(x, y, Math.abs(drag.x1 - drag.x0), Math.abs(drag.y1 - drag.y0));
    g.strokeRect(x + 0.5, y + 0.5, Math.abs(drag.x1 - drag.x0), Math.abs(drag.y1 - drag.y0));
  }
  g.restore();
  if (full && full.critical && $("show-critical").checked) {
    g.font = "12px kerrscope, sans-serif"; g.fillStyle = "#124ed8"; g.textAlign = "left"; g.textBaseline = "alphabetic";
    g.fillText("– – critical curve (Bardeen 1973)", place.x, 660 - 6);
  }
  if (state.bandImg && $("show-band").checked) {
    g.fillStyle = "#00a06a"; g.textAlign = "right";
    g.fillText("■ band of source radii", place.x + place.w, 660 - 6);
  }
}

function cross(g, x, y, r) {
  g.beginPath(); g.moveTo(x - r, y); g.lineTo(x + r, y); g.moveTo(x, y - r); g.lineTo(x, y + r); g.stroke();
}

function pointer(ev) {
  const r = $("overlay").getBoundingClientRect();
  return [ev.clientX - r.left, ev.clientY - r.top];
}

function insideImage(x, y) {
  return x >= place.x && x <= place.x + place.w && y >= place.y && y <= place.y + place.h;
}

function wirePointer() {
  const o = $("overlay");
  o.addEventListener("mousedown", (ev) => {
    const [x, y] = pointer(ev);
    if (!state.stage || !insideImage(x, y)) return;
    drag = { x0: x, y0: y, x1: x, y1: y, moved: false };
  });
  window.addEventListener("mousemove", (ev) => {
    const [x, y] = pointer(ev);
    if (drag) {
      drag.x1 = Math.max(place.x, Math.min(place.x + place.w, x));
      drag.y1 = Math.max(place.y, Math.min(place.y + place.h, y));
      drag.moved = drag.moved || Math.hypot(drag.x1 - drag.x0, drag.y1 - drag.y0) > 5;
      drawOverlay();
    }
    if (state.stage && insideImage(x, y) && ev.target === o) {
      const [a, b] = fromScreen(x, y);
      hoverAt = { alpha: a, beta: b };
      probeHover();
    }
  });
  window.addEventListener("mouseup", (ev) => {
    if (!drag) return;
    const d = drag;
    drag = null;
    if (d.moved) {
      const [a0, b1] = fromScreen(Math.min(d.x0, d.x1), Math.min(d.y0, d.y1));
      const [a1, b0] = fromScreen(Math.max(d.x0, d.x1), Math.max(d.y0, d.y1));
      const st = state.stage;
      const aspect = st.width / st.height;
      const field = Math.max(a1 - a0, (b1 - b0) * aspect);
      setWindow(field, (a0 + a1) / 2, (b0 + b1) / 2);
    } else {
      const [a, b] = fromScreen(d.x0, d.y0);
      pin(a, b);
    }
    drawOverlay();
  });
  o.addEventListener("wheel", (ev) => {
    const [x, y] = pointer(ev);
    if (!state.stage || !insideImage(x, y)) return;
    ev.preventDefault();
    const k = Math.pow(1.2, Math.sign(ev.deltaY));
    const [a, b] = fromScreen(x, y);
    const w = state.stage.window;
    setWindow(w.field * k, a + (w.center_alpha - a) * k, b + (w.center_beta - b) * k);
  }, { passive: false });
  o.addEventListener("mouseleave", () => { hoverAt = null; });
}

function setWindow(field, ca, cb) {
  setParam("fov", Number(field.toPrecision(6)).toString());
  setParam("center-alpha", Number(ca.toPrecision(6)).toString());
  setParam("center-beta", Number(cb.toPrecision(6)).toString());
  schedule();
}

// ---------------------------------------------------------------- probes

let probing = false;
async function probeHover() {
  if (probing || !hoverAt) return;
  probing = true;
  const at = hoverAt;
  hoverAt = null;
  try {
    const rep = await probe(at.alpha, at.beta, 3);
    if (rep) {
      state.hover = rep;
      $("hover").innerHTML = crossings(rep, false);
    }
  } finally {
    probing = false;
    if (hoverAt) probeHover();
  }
}

async function probe(alpha, beta, orders) {
  const resp = await fetch("/api/probe", { method: "POST", headers: { "Content-Type": "application/json" },
    body: JSON.stringify({ params: state.params, alpha, beta, orders }) });
  const body = await resp.json();
  if (!resp.ok) { showError(body); return null; }
  return body;
}

async function pin(alpha, beta) {
  const rep = await probe(alpha, beta, 8);
  if (!rep) return;
  state.pin = rep;
  $("pinned").innerHTML = crossings(rep, true) +
    `<p class="hint">The same numbers as <code>kerrscope probe --json --alpha ${fmt(alpha, 8)} --beta ${fmt(beta, 8)} --orders 8</code> with this view's spin, inclination and disk.</p>`;
  drawOverlay();
}

function esc(s) { return String(s).replace(/[&<>"]/g, (c) => ({ "&": "&amp;", "<": "&lt;", ">": "&gt;", '"': "&quot;" }[c])); }

function crossings(rep, all) {
  const u = state.stage ? state.stage.uas_per_m : 0;
  let h = `<div class="coords"><b>α</b><span>${fmt(rep.alpha, 6)} M${u ? "   " + fmt(rep.alpha * u, 5) + " µas" : ""}</span>` +
    `<b>β</b><span>${fmt(rep.beta, 6)} M${u ? "   " + fmt(rep.beta * u, 5) + " µas" : ""}</span>`;
  if (all) h += `<b>λ, η</b><span>${fmt(rep.lambda, 7)} M, ${fmt(rep.eta, 7)} M²</span>`;
  h += `</div>`;
  const lit = rep.crossings.find((c) => c.g !== null);
  h += lit
    ? `<div class="fate">light from the disk at n = ${lit.order} (r = ${fmt(lit.r, 5)} M); traced on, the path ends at <b>${esc(rep.fate)}</b></div>`
    : `<div class="fate">no disk here; traced back, the photon comes from <b>${esc(rep.fate)}</b></div>`;
  if (!rep.crossings.length) return h + `<p class="hint">It never crosses the equatorial plane.</p>`;
  h += `<table><tr><th class="l">n</th><th>r [M]</th><th>g</th>` +
    (all ? `<th>delay [M]</th><th>Δφ [rad]</th><th class="l">moving</th>` : `<th class="l">lands</th>`) + `</tr>`;
  for (const c of rep.crossings) {
    const on = c.g !== null;
    h += `<tr class="${on ? "" : "off"}"><td class="l">${c.order}</td><td>${fmt(c.r, 6)}</td><td>${on ? c.g.toFixed(5) : "–"}</td>`;
    h += all ? `<td>${fmt(c.time_delay, 6)}</td><td>${fmt(c.delta_phi, 5)}</td><td class="l">${c.outbound ? "outward" : "inward"}</td>`
      : `<td class="l">${on ? "on disk" : "off disk"}</td>`;
    h += `</tr>`;
  }
  return h + `</table>`;
}

// ---------------------------------------------------------------- keys and plots

function drawKey(l) {
  $("key-label").textContent = l ? l.label : "";
  const body = $("key-body");
  body.innerHTML = "";
  body.className = "key-body";
  if (!l) return;
  if (l.ramp) {
    const r = document.createElement("canvas");
    r.className = "ramp"; r.width = l.ramp.length; r.height = 1;
    r.style.width = "100%"; r.style.display = "block";
    const g = r.getContext("2d");
    l.ramp.forEach((c, i) => { g.fillStyle = c; g.fillRect(i, 0, 1, 1); });
    body.appendChild(r);
    for (const t of l.ticks || []) {
      const d = document.createElement("span");
      d.className = "tick"; d.style.left = (t.t * 100) + "%"; d.textContent = t.label;
      body.appendChild(d);
    }
    return;
  }
  body.className = "key-body swatches";
  for (const s of l.swatches) {
    const d = document.createElement("span");
    d.className = "swatch";
    const sw = document.createElement("i");
    sw.style.background = s.color;
    d.appendChild(sw);
    d.appendChild(document.createTextNode(s.label));
    body.appendChild(d);
  }
}

function drawSpectrum(s) {
  const c = $("spectrum"), g = c.getContext("2d");
  g.clearRect(0, 0, c.width, c.height);
  if (!s) return;
  const L = 48, R = 10, T = 10, B = 34, W = c.width - L - R, H = c.height - T - B;
  const e0 = s.energy_kev[0], e1 = s.energy_kev[s.energy_kev.length - 1];
  let top = 0;
  for (const v of s.total) top = Math.max(top, v);
  if (!(top > 0)) top = 1;
  const X = (e) => L + (e - e0) / (e1 - e0) * W, Y = (v) => T + H - v / top * H;
  g.strokeStyle = "#5a5a5a"; g.lineWidth = 1; g.strokeRect(L - 0.5, T - 0.5, W + 1, H + 1);
  g.fillStyle = "#333"; g.font = "11px 'kerrscope mono', monospace"; g.textAlign = "center"; g.textBaseline = "top";
  for (const e of niceTicks(e0, e1, 6)) { g.fillRect(X(e), T + H, 1, 4); g.fillText(fmt(e, 3), X(e), T + H + 6); }
  g.font = "12px kerrscope, sans-serif"; g.fillText("observed energy E [keV]", L + W / 2, T + H + 19);
  g.save(); g.translate(11, T + H / 2); g.rotate(-Math.PI / 2); g.textBaseline = "middle";
  g.fillText(s.physical ? "photons cm⁻² s⁻¹ keV⁻¹" : "flux per keV (relative)", 0, 0); g.restore();
  // rest energy of the line
  g.strokeStyle = "#999"; g.setLineDash([3, 3]);
  g.beginPath(); g.moveTo(X(s.line_kev), T); g.lineTo(X(s.line_kev), T + H); g.stroke(); g.setLineDash([]);
  const line = (v, color, width) => {
    g.strokeStyle = color; g.lineWidth = width; g.beginPath();
    v.forEach((y, i) => { const x = X(s.energy_kev[i]); i ? g.lineTo(x, Y(y)) : g.moveTo(x, Y(y)); });
    g.stroke();
  };
  if (s.orders.length > 1) s.orders.forEach((o, n) => { if (n > 0) line(o, s.order_colors[n], 1.2); });
  line(s.total, "#222", 1.6);
  const key = $("spectrum-key");
  key.innerHTML = "";
  const item = (color, label, dashed) => {
    const d = document.createElement("span");
    const i = document.createElement("i");
    i.style.borderTopColor = color;
    if (dashed) i.className = "dashed";
    d.appendChild(i); d.appendChild(document.createTextNode(label));
    key.appendChild(d);
  };
  item("#222", "all orders");
  for (let n = 1; n < s.orders.length; n++) item(s.order_colors[n], `n = ${n}`);
  item("#999", `rest energy ${fmt(s.line_kev, 4)} keV`, true);
}

function drawBand(st) {
  const p = $("band-panel");
  if (!st.band) { p.hidden = true; return; }
  p.hidden = false;
  const b = st.band;
  let h = `<div class="coords"><b>radii</b><span>${fmt(b.r_min, 5)} – ${fmt(b.r_max, 5)} M</span>` +
    `<b>flux</b><span>${fmt(100 * b.flux_fraction, 4)} % of the view's line flux</span>` +
    `<b>area</b><span>${fmt(b.area_m2, 5)} M²</span></div>`;
  h += `<table><tr><th class="l">n</th><th>pixels</th><th>flux %</th><th>escaping M²</th><th>captured M²</th></tr>`;
  for (const o of b.orders) {
    h += `<tr><td class="l">${o.order}</td><td>${o.pixels}</td><td>${fmt(100 * b.flux_fraction_per_order[o.order], 4)}</td>` +
      `<td>${fmt(o.escaping.area_m2, 4)}</td><td>${fmt(o.captured.area_m2, 4)}</td></tr>`;
  }
  $("band").innerHTML = h + `</table>`;
}

// ---------------------------------------------------------------- keeping views

async function post(url, body) {
  const resp = await fetch(url, { method: "POST", headers: { "Content-Type": "application/json" }, body: JSON.stringify(body) });
  return [resp.ok, await resp.json()];
}

function fileNote(text, bad) {
  $("files").className = bad ? "files bad" : "files";
  $("files").textContent = text;
}

async function save() {
  const [ok, body] = await post("/api/save", { params: readParams(), name: $("name").value });
  if (!ok) { fileNote(body.error, true); return; }
  fileNote("wrote " + body.path, false);
}

async function render() {
  const [ok, body] = await post("/api/render", { params: readParams(), name: $("name").value });
  if (!ok) { fileNote(body.error, true); return; }
  $("render").disabled = true;
  $("progress").hidden = false;
  fileNote("rendering into " + body.folder + " …", false);
  const poll = async () => {
    const st = await (await fetch("/api/render")).json();
    $("progress-fill").style.width = (st.total ? 100 * st.rows / st.total : 0) + "%";
    if (st.state === "running") { setTimeout(poll, 250); return; }
    $("render").disabled = false;
    if (st.state === "failed") { fileNote(st.error, true); return; }
    fileNote(`${st.folder}  (${st.photons.toLocaleString("en")} photons, ${st.seconds.toFixed(1)} s)\n` + st.files.join("\n"), false);
  };
  poll();
}

start();
