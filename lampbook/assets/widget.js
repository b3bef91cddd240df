// lampbook page glue: wires calculator forms to the engine worker.
// Answers computed at build time are already in the page; this makes them live.
// Re-initialises on every page of instant navigation (the theme's document$), never twice per form.

const siteEl = document.getElementById("lb-site");
const site = siteEl ? JSON.parse(siteEl.textContent) : { root: "./", timeout: 60, engine: true };
const root = new URL(site.root, location.href);

let worker = null;
let engineState = "static"; // static | loading | ready | failed
let offlineReady = false;
let failReason = "";
let seq = 0;
const pending = new Map();

function setStatus() {
  const text = {
    static: "answers computed at build time",
    loading: "starting the engine…",
    ready: offlineReady ? "live · offline-ready" : "live",
    failed: "engine unavailable" + (failReason ? " (" + failReason + ")" : "") + ": answers shown were computed at build time",
  }[engineState];
  for (const el of document.querySelectorAll(".lb-engine")) {
    el.textContent = text;
    el.dataset.state = engineState + (offlineReady ? " offline" : "");
  }
}

function startEngine() {
  if (worker || !site.engine || typeof Worker === "undefined") return;
  engineState = "loading";
  setStatus();
  // started early by the page's head (the plugin writes it) when it could be; else here
  const early = window.lbEngine && !window.lbEngine.taken ? window.lbEngine : null;
  if (early) early.taken = true;
  worker = early ? early.worker : new Worker(new URL("assets/lampbook/worker.js", root), { type: "module" });
  const timer = setTimeout(() => {
    if (engineState === "loading") {
      engineState = "failed";
      failReason = `no start within ${site.timeout} s; is .wasm served as application/wasm?`;
      setStatus();
      startOffline();
      console.error("lampbook: the engine did not start within " + site.timeout + " s (check that .wasm files are served as application/wasm)");
    }
  }, site.timeout * 1000);
  worker.onmessage = (ev) => {
    const m = ev.data;
    if (m.type === "ready") {
      clearTimeout(timer);
      engineState = "ready";
      performance.mark("lb-engine-ready");
      setStatus();
      for (const f of document.querySelectorAll(".lb-calc[data-live]")) run(f);
    } else if (m.type === "failed") {
      clearTimeout(timer);
      engineState = "failed";
      failReason = String(m.error).slice(0, 120);
      setStatus();
      startOffline();
      console.error("lampbook engine:", m.error);
    } else if (m.type === "stored") {
      startOffline(); // the engine has handed its downloads over: the offline cache takes them as they are
    } else if (m.type === "result") {
      const cb = pending.get(m.id);
      pending.delete(m.id);
      if (cb) cb(m.answer);
    }
  };
  worker.onerror = (e) => {
    engineState = "failed";
    setStatus();
    console.error("lampbook engine:", e.message);
  };
  if (early) for (const e of early.queue.splice(0)) (e.type === "error" ? worker.onerror : worker.onmessage)(e);
}

function query(request) {
  return new Promise((resolve) => {
    const id = ++seq;
    pending.set(id, resolve);
    worker.postMessage({ type: "query", id, request });
  });
}

function inputsOf(box) {
  const out = {};
  for (const el of box.querySelectorAll(".lb-form [name]")) {
    const field = el.closest(".lb-field");
    if (field && field.hidden) continue;
    if (el.value.trim() !== "") out[el.name] = el.value;
  }
  return out;
}

function showModes(box, decl) {
  if (!decl.mode) return;
  const sel = box.querySelector(`[name="${decl.mode}"]`);
  const mode = sel ? sel.value : "";
  for (const f of box.querySelectorAll(".lb-field[data-modes]")) f.hidden = !f.dataset.modes.split(" ").includes(mode);
}

function esc(s) {
  return String(s).replace(/[&<>"']/g, (c) => ({ "&": "&amp;", "<": "&lt;", ">": "&gt;", '"': "&quot;", "'": "&#39;" })[c]);
}

function render(box, decl, ans) {
  for (const el of box.querySelectorAll(".lb-err")) el.textContent = "";
  for (const el of box.querySelectorAll(".lb-field")) el.classList.remove("lb-bad");
  const warn = box.querySelector(".lb-warn");
  if (!ans.ok) {
    const loose = [];
    for (const e of ans.errors) {
      const input = box.querySelector(`.lb-form [name="${CSS.escape(e.field || "")}"]`);
      if (input) {
        const f = input.closest(".lb-field");
        f.classList.add("lb-bad");
        f.querySelector(".lb-err").textContent = e.expected ? `expected ${e.expected}` : e.message;
      } else loose.push(e.message);
    }
    warn.innerHTML = loose.map((m) => `<li>${esc(m)}</li>`).join("");
    box.classList.add("lb-stale");
    return;
  }
  box.classList.remove("lb-stale");
  for (const tr of box.querySelectorAll("tr[data-out]")) {
    const k = tr.dataset.out;
    tr.hidden = ans.values[k] === null || ans.values[k] === undefined;
    tr.querySelector("td").textContent = ans.display[k];
  }
  warn.innerHTML = ans.warnings.map((m) => `<li>${esc(m)}</li>`).join("");
  box.querySelector(".lb-notes ul").innerHTML = ans.notes.map((m) => `<li>${esc(m)}</li>`).join("");
  const cols = decl.columns.filter((c) => ans.rows.some((r) => r[c.name] !== null && r[c.name] !== undefined));
  box.querySelector(".lb-rows").innerHTML = ans.rows.length && cols.length
    ? `<div class="lb-scroll"><table class="lb-table"><thead><tr>${cols.map((c) => `<th>${esc(c.label)}</th>`).join("")}</tr></thead><tbody>` +
      ans.rows_display.map((r) => `<tr>${cols.map((c) => `<td>${esc(r[c.name])}</td>`).join("")}</tr>`).join("") + "</tbody></table></div>"
    : "";
}

// --- plots: sweeps drawn as SVG, axes with units ------------------------------------
const SWEEPS = {
  current_vs_mains: { param: "mains_voltage", dim: "V", out: "led_current_avg", label: "LED current against mains voltage", scale: [0.85, 1.15] },
  ripple_vs_capacitance: { param: "capacitance", dim: "F", out: "ripple_pp", label: "Bus ripple against smoothing capacitance", scale: [0.25, 4], log: true },
};
const SI = [[1e-12, "p"], [1e-9, "n"], [1e-6, "µ"], [1e-3, "m"], [1, ""], [1e3, "k"], [1e6, "M"]];
function si(x, unit) {
  if (x === 0) return "0 " + unit;
  let best = SI[4];
  for (const p of SI) if (Math.abs(x) >= p[0]) best = p;
  return `${+(x / best[0]).toPrecision(3)} ${best[1]}${unit}`;
}

async function plot(box, decl, ans) {
  const host = box.querySelector(".lb-plot");
  const name = decl.plots[0];
  if (!name || !ans.ok) { host.innerHTML = ""; return; }
  const sw = SWEEPS[name];
  const base = decl.params.find((p) => p.name === sw.param);
  const inputs = inputsOf(box);
  let centre;
  if (sw.param === "mains_voltage") {
    const r = await query({ kind: "compute", calculator: "mains", inputs: { region: inputs.region || "230-50", ...(inputs.mains_voltage ? { mains_voltage: inputs.mains_voltage } : {}) } });
    centre = r.ok ? r.values.voltage : 230;
  } else {
    const r = await query({ kind: "compute", calculator: "quantity", inputs: { text: inputs[sw.param] || base.default, dimension: base.dim } });
    centre = r.ok ? Number(r.values.si) : null;
  }
  if (!centre) { host.innerHTML = ""; return; }
  const pts = [];
  for (let k = 0; k <= 16; k++) {
    const f = sw.log ? sw.scale[0] * Math.pow(sw.scale[1] / sw.scale[0], k / 16) : sw.scale[0] + (sw.scale[1] - sw.scale[0]) * k / 16;
    const x = centre * f;
    const r = await query({ kind: "compute", calculator: decl.name, inputs: { ...inputs, [sw.param]: `${x} ${sw.dim}` } });
    if (r.ok && r.values[sw.out] !== null) pts.push([x, r.values[sw.out]]);
  }
  if (pts.length < 2) { host.innerHTML = ""; return; }
  const outDecl = decl.outputs.find((o) => o.name === sw.out);
  const unit = { current: "A", voltage: "V" }[outDecl.dim] || "";
  const W = 320, H = 180, L = 52, B = 30, T = 10, R = 10;
  const xs = pts.map((p) => p[0]), ys = pts.map((p) => p[1]);
  const x0 = Math.min(...xs), x1 = Math.max(...xs), y0 = 0, y1 = Math.max(...ys) * 1.1 || 1;
  const fx = (x) => sw.log ? L + (W - L - R) * Math.log(x / x0) / Math.log(x1 / x0) : L + (W - L - R) * (x - x0) / (x1 - x0);
  const fy = (y) => H - B - (H - B - T) * (y - y0) / (y1 - y0);
  const line = pts.map((p) => `${fx(p[0]).toFixed(1)},${fy(p[1]).toFixed(1)}`).join(" ");
  const cx = fx(centre), cy = fy(ans.values[sw.out] ?? 0);
  host.innerHTML = `<figure class="lb-fig"><svg viewBox="0 0 ${W} ${H}" role="img" aria-label="${esc(sw.label)}">
<line x1="${L}" y1="${H - B}" x2="${W - R}" y2="${H - B}" class="ax"/><line x1="${L}" y1="${T}" x2="${L}" y2="${H - B}" class="ax"/>
<text x="${L}" y="${H - 8}" class="tk">${esc(si(x0, sw.dim))}</text><text x="${W - R}" y="${H - 8}" class="tk" text-anchor="end">${esc(si(x1, sw.dim))}</text>
<text x="${L - 4}" y="${T + 8}" class="tk" text-anchor="end">${esc(si(y1, unit))}</text><text x="${L - 4}" y="${H - B}" class="tk" text-anchor="end">0</text>
<polyline points="${line}" class="ln"/><circle cx="${cx.toFixed(1)}" cy="${cy.toFixed(1)}" r="4" class="pt"/></svg>
<figcaption>${esc(sw.label)}; the dot is the current input.</figcaption></figure>`;
}

// --- share links: page/?lb=ID&input=value#ID (a query, not the hash: the theme owns the hash) --------
function linkFor(box) {
  const p = new URLSearchParams({ lb: box.id, ...inputsOf(box) });
  return `${location.pathname}?${p.toString()}#${box.id}`;
}

function fromQuery(box) {
  const params = new URLSearchParams(location.search);
  if (params.get("lb") !== box.id) return false;
  for (const [k, v] of params) {
    if (k === "lb") continue;
    const el = box.querySelector(`.lb-form [name="${CSS.escape(k)}"]`);
    if (!el || el.readOnly) continue;
    if (el.tagName === "SELECT" && ![...el.options].some((o) => o.value === v)) continue;
    el.value = v.slice(0, 200);
  }
  return true;
}

const timers = new WeakMap();
async function run(box) {
  if (engineState !== "ready") return;
  const data = JSON.parse(box.querySelector(".lb-data").textContent);
  const decl = data.declaration;
  showModes(box, decl);
  const ans = await query({ kind: "compute", calculator: decl.name, inputs: inputsOf(box) });
  render(box, decl, ans);
  box.querySelector(".lb-link").setAttribute("href", linkFor(box));
  box.dataset.computed = String(Number(box.dataset.computed || 0) + 1);
  if (!performance.getEntriesByName("lb-first-live").length) performance.mark("lb-first-live");
  if (decl.plots.length) plot(box, decl, ans);
}

// --- a design file opened from the device: read here, solved in the worker, never uploaded ---------
function initOpen() {
  for (const box of document.querySelectorAll(".lb-open:not([data-live])")) {
    box.dataset.live = "1";
    startEngine();
    const input = box.querySelector(".lb-open-file");
    input.addEventListener("change", async () => {
      const file = input.files && input.files[0];
      if (!file) return;
      const errs = box.querySelector(".lb-open-err");
      const out = box.querySelector(".lb-open-out");
      errs.innerHTML = "";
      if (file.size > 200000) { errs.innerHTML = "<li>file: over 200 kB; expected a design file (.toml)</li>"; return; }
      const text = await file.text();
      out.innerHTML = "<p>Solving…</p>";
      await new Promise((resolve) => {
        const wait = () => (engineState === "ready" ? resolve() : engineState === "failed" ? resolve() : setTimeout(wait, 100));
        wait();
      });
      if (engineState !== "ready") { out.innerHTML = ""; errs.innerHTML = "<li>the engine could not start in this browser</li>"; return; }
      const ans = await query({ kind: "sheet", toml: text });
      if (!ans.ok) {
        out.innerHTML = "";
        errs.innerHTML = ans.errors.map((e) => `<li>${esc(e.message)}</li>`).join("");
        return;
      }
      // the sheet is built by the core, which escapes everything the file says
      out.innerHTML = `<h2>${esc(ans.name)}</h2>` + ans.html;
      box.dataset.computed = String(Number(box.dataset.computed || 0) + 1);
    });
  }
}

function init() {
  initOpen();
  const boxes = document.querySelectorAll(".lb-calc:not([data-live])");
  if (!boxes.length) { setStatus(); if (!worker) startOffline(); return; }
  setStatus();
  startEngine();
  for (const box of boxes) {
    box.dataset.live = "1";
    const decl = JSON.parse(box.querySelector(".lb-data").textContent).declaration;
    const shared = fromQuery(box);
    showModes(box, decl);
    const later = () => {
      clearTimeout(timers.get(box));
      timers.set(box, setTimeout(() => run(box), 120));
    };
    box.querySelector(".lb-form").addEventListener("input", later);
    box.querySelector(".lb-form").addEventListener("change", later);
    const units = box.querySelector(".lb-units");
    if (units) units.addEventListener("click", () => {
      const imperial = units.dataset.system === "metric";
      for (const el of box.querySelectorAll("[data-imperial]")) el.value = imperial ? el.dataset.imperial : el.dataset.default;
      units.dataset.system = imperial ? "imperial" : "metric";
      units.textContent = imperial ? "Metric units" : "Imperial units";
      later();
    });
    box.querySelector(".lb-link").addEventListener("click", (ev) => {
      ev.preventDefault();
      history.replaceState(null, "", linkFor(box));
    });
    if (engineState === "ready" || shared) run(box);
  }
  setStatus();
}

// The offline cache is filled once the engine is up (or there is none on the page), so the
// precache revalidates files the page has just loaded instead of downloading them twice.
let swStarted = false;
function startOffline() {
  if (swStarted || !("serviceWorker" in navigator) || location.protocol === "file:") return;
  swStarted = true;
  navigator.serviceWorker.register(new URL("sw.js", root).href, { scope: root.href }).then(
    async () => {
      await navigator.serviceWorker.ready;
      offlineReady = true;
      setStatus();
      if (navigator.storage && navigator.storage.persist) navigator.storage.persist().catch(() => {});
    },
    (e) => console.warn("lampbook: offline cache unavailable:", e),
  );
}
if ("serviceWorker" in navigator && navigator.serviceWorker.controller) startOffline();

if (typeof document$ !== "undefined" && document$.subscribe) document$.subscribe(init);
else if (document.readyState === "loading") document.addEventListener("DOMContentLoaded", init);
else init();
