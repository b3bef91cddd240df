// @ts-check
// lampbook page glue: wires calculator forms to the engine worker.
// Answers computed at build time are already in the page; this makes them live.
// Re-initialises on every page of instant navigation (the theme's document$), never twice per form.

import { all, control, one, si } from "./lbutil.js";
import { initWorkbench } from "./workbench.js";

/** @typedef {import("./protocol").Request} Request */
/** @typedef {import("./protocol").CalculatorDecl} CalculatorDecl */
/** @typedef {import("./protocol").CalculatorBlock} CalculatorBlock */
/** @typedef {import("./protocol").ComputeAnswer} ComputeAnswer */
/** @typedef {import("./protocol").Refusal} Refusal */
/** @typedef {import("./engine").Reply} Reply */
/** @typedef {"static" | "loading" | "ready" | "failed"} EngineState */

const siteEl = document.getElementById("lb-site");
/** @type {{root: string, timeout: number, engine: boolean}} */
const site = siteEl ? JSON.parse(siteEl.textContent || "") : { root: "./", timeout: 60, engine: true };
const root = new URL(site.root, location.href);

/** @type {Worker | null} */
let worker = null;
/** @type {EngineState} */
let engineState = "static";
let offlineReady = false;
let failReason = "";
let wasReady = false; // the engine has started once (a failure after that is a stop, not a failed start)
let seq = 0;
/** @type {Map<number, {resolve: (answer: any) => void, reject: (error: Error) => void}>} */
const pending = new Map();

// Offline needs a service worker, and browsers give one only to a secure context: HTTPS, or localhost
// on the device itself. Plain http from a laptop on the shop network is not one: say so, never "offline-ready".
const secure = window.isSecureContext && "serviceWorker" in navigator && location.protocol !== "file:";
let offlineNote = secure ? "" : "offline not available: this address is plain http, and offline use needs HTTPS (or localhost)";

function setStatus() {
  const text = {
    static: "answers computed at build time",
    loading: "starting the engine…",
    ready: "live",
    failed: "engine unavailable" + (failReason ? " (" + failReason + ")" : "") + ": answers shown were computed at build time",
  }[engineState];
  const offline = offlineReady ? "offline-ready" : offlineNote;
  for (const el of all(document, ".lb-engine")) {
    el.textContent = offline ? `${text} · ${offline}` : text;
    el.dataset.state = engineState + (offlineReady ? " offline" : secure ? "" : " no-offline");
    el.title = secure ? "" : "Browsers keep a site for offline use only when it is served over HTTPS (or from localhost on this device).";
  }
}

function startEngine() {
  if (worker || !site.engine || typeof Worker === "undefined") return;
  engineState = "loading";
  setStatus();
  // started early by the page's head (the plugin writes it) when it could be; else here
  const early = window.lbEngine && !window.lbEngine.taken ? window.lbEngine : null;
  if (early) early.taken = true;
  const w = (worker = early ? early.worker : new Worker(new URL("assets/lampbook/worker.js", root), { type: "module" }));
  const timer = setTimeout(() => {
    if (engineState === "loading") {
      engineState = "failed";
      failReason = `no start within ${site.timeout} s; is .wasm served as application/wasm?`;
      setStatus();
      startOffline();
      console.error("lampbook: the engine did not start within " + site.timeout + " s (check that .wasm files are served as application/wasm)");
    }
  }, site.timeout * 1000);
  /** @param {MessageEvent<Reply>} ev */
  const onMessage = (ev) => {
    const m = ev.data;
    if (m.type === "ready") {
      clearTimeout(timer);
      engineState = "ready";
      wasReady = true;
      performance.mark("lb-engine-ready");
      setStatus();
      for (const f of all(document, ".lb-calc[data-live]")) run(f);
    } else if (m.type === "failed") {
      clearTimeout(timer);
      engineStopped(String(m.error));
      startOffline();
      console.error("lampbook engine:", m.error);
    } else if (m.type === "stored") {
      startOffline(); // the engine has handed its downloads over: the offline cache takes them as they are
    } else if (m.type === "result") {
      const p = pending.get(m.id);
      pending.delete(m.id);
      if (p) p.resolve(m.answer);
    }
  };
  /** @param {ErrorEvent} e */
  const onError = (e) => {
    clearTimeout(timer);
    engineStopped(e.message || "the engine stopped");
    console.error("lampbook engine:", e.message);
  };
  w.onmessage = onMessage;
  w.onerror = onError;
  if (early)
    for (const e of early.queue.splice(0)) {
      if (e instanceof MessageEvent) onMessage(e);
      else onError(e);
    }
}

// The engine has stopped (failed to start, or died with requests in flight): every pending request is
// refused with the reason, so no form waits for an answer that cannot come; the forms say their answers are stale.
/** @param {string} reason */
function engineStopped(reason) {
  engineState = "failed";
  failReason = String(reason).slice(0, 120);
  setStatus();
  const waiting = [...pending.values()];
  pending.clear();
  for (const p of waiting) p.reject(new Error(`engine stopped: ${failReason}`));
}

/**
 * One request to the engine; rejects when the engine is not running or stops before it answers.
 * @template {Request} R
 * @param {R} request
 * @returns {Promise<import("./protocol").AnswerTo<R>>}
 */
function query(request) {
  const w = worker;
  if (!w || engineState === "failed") return Promise.reject(new Error(`engine unavailable: ${failReason}`));
  return new Promise((resolve, reject) => {
    const id = ++seq;
    pending.set(id, { resolve, reject });
    /** @type {import("./engine").Query} */
    const q = { type: "query", id, request };
    w.postMessage(q);
  });
}

// a form whose request the engine could not answer keeps its last answer, marked stale
/** @param {HTMLElement} box @param {unknown} error */
function markStale(box, error) {
  box.classList.add("lb-stale");
  box.dataset.engineError = String(error instanceof Error && error.message ? error.message : error);
}

// the declaration sits in a template, out of reach of the theme's script re-creation on page changes
/**
 * @param {HTMLElement} box
 * @returns {CalculatorBlock} what lampbook/blocks.py wrote beside the form
 */
function dataOf(box) {
  const tpl = /** @type {HTMLTemplateElement | null} */ (box.querySelector("template.lb-tpl"));
  return JSON.parse(one(tpl ? tpl.content : box, ".lb-data").textContent || "");
}

/** @param {HTMLElement} box @returns {Record<string, string>} */
function inputsOf(box) {
  /** @type {Record<string, string>} */
  const out = {};
  for (const el of /** @type {NodeListOf<HTMLInputElement | HTMLSelectElement>} */ (box.querySelectorAll(".lb-form [name]"))) {
    const field = /** @type {HTMLElement | null} */ (el.closest(".lb-field"));
    if (field && field.hidden) continue;
    // a blank goes to the engine as a blank: a field with a usual value is then an error, never that value
    // silently; an optional one stays unset
    out[el.name] = el.value;
  }
  return out;
}

/** @param {HTMLElement} box @param {CalculatorDecl} decl */
function showModes(box, decl) {
  if (!decl.mode) return;
  const sel = /** @type {HTMLSelectElement | null} */ (box.querySelector(`[name="${decl.mode}"]`));
  const mode = sel ? sel.value : "";
  for (const f of all(box, ".lb-field[data-modes]")) f.hidden = !(f.dataset.modes || "").split(" ").includes(mode);
}

// the folded inputs' line shows what they are set to, so nothing hides a surprise
/** @param {HTMLElement} box */
function foldSummary(box) {
  const line = box.querySelector(".lb-more-values");
  if (!line) return;
  const parts = [];
  for (const f of all(box, ".lb-more .lb-field")) {
    if (f.hidden) continue;
    const el = control(f, "[name]");
    const label = one(f, "label").textContent;
    const v = el instanceof HTMLSelectElement ? el.options[el.selectedIndex].text : el.value.trim() || (el.placeholder || "blank");
    parts.push(`${label} ${v}`);
  }
  line.textContent = parts.join(" · ");
}

// --- imperial outputs: lengths, sizes and temperatures follow the unit switch -------------------
/** @param {number} n */
const AWG_D = (n) => 0.127e-3 * Math.pow(92, (36 - n) / 39);
/** @param {import("./protocol").Value | undefined} si @param {string} dim @returns {string | null} */
function imperialOf(si, dim) {
  if (si === null || si === undefined || typeof si !== "number") return null;
  if (dim === "temperature") return `${+(si * 9 / 5 + 32).toFixed(1)} °F`;
  if (dim === "length") {
    const inches = si / 0.0254;
    if (inches < 1) return `${+(inches * 1000).toPrecision(3)} mil`;
    if (inches < 36) return `${+inches.toPrecision(3)} in`;
    return `${+(si / 0.3048).toPrecision(4)} ft`;
  }
  if (dim === "area") {
    const cmil = si / (Math.PI / 4 * Math.pow(0.0254e-3, 2));
    let near = null;
    for (let n = 40; n >= -3; n--) if (Math.abs(Math.log(Math.PI / 4 * AWG_D(n) ** 2 / si)) < 0.03) near = n;
    const awg = near === null ? "" : ` (${near > 0 ? near : `${1 - near}/0`} AWG)`;
    return cmil >= 1000 ? `${+(cmil / 1000).toPrecision(3)} kcmil${awg}` : `${Math.round(cmil)} cmil${awg}`;
  }
  return null;
}

/** @param {HTMLElement} box @param {CalculatorDecl} decl @param {ComputeAnswer} ans @param {string} name */
function shown(box, decl, ans, name) {
  if (box.dataset.units === "imperial") {
    const o = decl.outputs.find((x) => x.name === name);
    const alt = o ? imperialOf(ans.values[name], o.dim) : null;
    if (alt) return alt;
  }
  return ans.display[name];
}

/** @param {unknown} s */
function esc(s) {
  return String(s).replace(/[&<>"']/g, (c) => /** @type {Record<string, string>} */ ({ "&": "&amp;", "<": "&lt;", ">": "&gt;", '"': "&quot;", "'": "&#39;" })[c]);
}

/** @param {HTMLElement} box @param {CalculatorDecl} decl @param {ComputeAnswer | Refusal} ans */
function render(box, decl, ans) {
  for (const el of all(box, ".lb-err")) el.textContent = "";
  for (const el of all(box, ".lb-field")) el.classList.remove("lb-bad");
  const warn = one(box, ".lb-warn");
  if (!ans.ok) {
    const loose = [];
    for (const e of ans.errors) {
      const input = /** @type {HTMLInputElement | HTMLSelectElement | null} */ (box.querySelector(`.lb-form [name="${CSS.escape(e.field || "")}"]`));
      const f = input && /** @type {HTMLElement | null} */ (input.closest(".lb-field"));
      if (input && f) {
        const fold = /** @type {HTMLDetailsElement | null} */ (f.closest(".lb-more"));
        if (fold) fold.open = true;
        f.classList.add("lb-bad");
        const blank = input.value.trim() === "" && input.dataset.default;
        one(f, ".lb-err").textContent = blank
          ? `needs a value: a blank is not read as ${input.dataset.default}`
          : e.expected ? `expected ${e.expected}` : e.message;
      } else loose.push(e.message);
    }
    warn.innerHTML = loose.map((m) => `<li>${esc(m)}</li>`).join("");
    box.classList.add("lb-stale");
    return;
  }
  box.classList.remove("lb-stale");
  for (const tr of all(box, "tr[data-out]")) {
    const k = tr.dataset.out || "";
    tr.hidden = !ans.applies.includes(k); // another mode's output; one of this mode with no value says so
    tr.classList.toggle("lb-na", ans.values[k] === null || ans.values[k] === undefined);
    one(tr, "td").textContent = shown(box, decl, ans, k);
    if (tr.classList.contains("lb-text")) keepNumbers(tr);
  }
  for (const item of all(box, ".lb-pin-item")) {
    const k = item.dataset.pin || "";
    item.hidden = !ans.applies.includes(k);
    one(item, ".lb-pin-value").textContent = shown(box, decl, ans, k);
  }
  warn.innerHTML = ans.warnings.map((m) => `<li>${esc(m)}</li>`).join("");
  one(box, ".lb-notes ul").innerHTML = ans.notes.map((m) => `<li>${esc(m)}</li>`).join("");
  // the table of options comes drawn by the core (its one table renderer); it folds away, the chosen
  // option being in the answers above, and stays open if the reader opened it
  const rowsHost = one(box, ".lb-rows");
  const wasOpen = Boolean(rowsHost.querySelector("details[open]"));
  rowsHost.innerHTML = ans.rows_html ?? "";
  const options = rowsHost.querySelector("details");
  if (options && wasOpen) options.open = true;
  labelTables(rowsHost);
}

// --- plots: the core's sweeps (lampcalc.schema.Sweep) drawn as SVG, axes with units ---------------------
// the points come from the core in one request ({"kind": "sweep"}); the page only draws them
/** @param {HTMLElement} box @param {CalculatorDecl} decl @param {ComputeAnswer | Refusal} ans */
async function plot(box, decl, ans) {
  const host = one(box, ".lb-plot");
  const sw = decl.plots[0];
  if (!sw || !ans.ok) { host.innerHTML = ""; return; }
  const swept = await query({ kind: "sweep", calculator: decl.name, plot: sw.name, inputs: inputsOf(box) });
  if (!swept.ok || !swept.centre) { host.innerHTML = ""; return; }
  const centre = swept.centre;
  const pts = swept.points;
  if (pts.length < 2) { host.innerHTML = ""; return; }
  const unit = sw.y_unit;
  const W = 340, H = 220, L = 58, B = 44, T = 10, R = 12;
  const xs = pts.map((p) => p[0]), ys = pts.map((p) => p[1]);
  const x0 = Math.min(...xs), x1 = Math.max(...xs);
  // the value axis starts at zero, so a small change looks small
  const yt = ticks(0, Math.max(...ys) * 1.05 || 1, 5), y0 = 0, y1 = yt[yt.length - 1];
  /** @param {number} x */
  const fx = (x) => sw.log ? L + (W - L - R) * Math.log(x / x0) / Math.log(x1 / x0) : L + (W - L - R) * (x - x0) / (x1 - x0);
  /** @param {number} y */
  const fy = (y) => H - B - (H - B - T) * (y - y0) / (y1 - y0);
  const xt = sw.log ? logTicks(x0, x1) : ticks(x0, x1, 4).filter((x) => x >= x0 && x <= x1);
  const line = pts.map((p) => `${fx(p[0]).toFixed(1)},${fy(p[1]).toFixed(1)}`).join(" ");
  const here = ans.values[sw.output];
  const cx = fx(centre), cy = fy(typeof here === "number" ? here : 0);
  const grid = yt.map((y) => `<line x1="${L}" y1="${fy(y).toFixed(1)}" x2="${W - R}" y2="${fy(y).toFixed(1)}" class="gr"/>` +
    `<text x="${L - 4}" y="${(fy(y) + 3).toFixed(1)}" class="tk" text-anchor="end">${esc(si(y, unit))}</text>`).join("") +
    xt.map((x) => `<line x1="${fx(x).toFixed(1)}" y1="${H - B}" x2="${fx(x).toFixed(1)}" y2="${H - B + 4}" class="ax"/>` +
    `<text x="${fx(x).toFixed(1)}" y="${H - B + 15}" class="tk" text-anchor="middle">${esc(si(x, sw.x_unit))}</text>`).join("");
  host.innerHTML = `<figure class="lb-fig"><svg viewBox="0 0 ${W} ${H}" role="img" aria-label="${esc(sw.label)}">${grid}
<line x1="${L}" y1="${H - B}" x2="${W - R}" y2="${H - B}" class="ax"/><line x1="${L}" y1="${T}" x2="${L}" y2="${H - B}" class="ax"/>
<text x="${(L + W - R) / 2}" y="${H - 6}" class="ti" text-anchor="middle">${esc(sw.x_title)} (${esc(sw.x_unit)})${sw.log ? ", log scale" : ""}</text>
<text transform="translate(12 ${(T + H - B) / 2}) rotate(-90)" class="ti" text-anchor="middle">${esc(sw.y_title)} (${esc(unit)})</text>
<polyline points="${line}" class="ln"/><circle cx="${cx.toFixed(1)}" cy="${cy.toFixed(1)}" r="4" class="pt"/></svg>
<figcaption>${esc(sw.label)}; the dot is the current input.</figcaption></figure>`;
}

// round steps (1, 2, 5 × 10^k) from lo to at least hi
/** @param {number} lo @param {number} hi @param {number} n @returns {number[]} */
function ticks(lo, hi, n) {
  const raw = (hi - lo) / n, mag = Math.pow(10, Math.floor(Math.log10(raw)));
  const step = [1, 2, 2.5, 5, 10].map((k) => k * mag).find((k) => k >= raw) ?? 10 * mag;
  const out = [];
  for (let v = Math.floor(lo / step) * step; v < hi + step * 0.999; v += step) out.push(+v.toPrecision(12));
  return out;
}
/** @param {number} lo @param {number} hi @returns {number[]} */
function logTicks(lo, hi) {
  const out = [];
  for (let e = Math.floor(Math.log10(lo)); e <= Math.ceil(Math.log10(hi)); e++)
    for (const k of [1, 2, 5]) { const v = k * Math.pow(10, e); if (v >= lo * 0.999 && v <= hi * 1.001) out.push(+v.toPrecision(6)); }
  return out;
}

// --- share links: page/?lb=ID&input=value#ID (a query, not the hash: the theme owns the hash) --------
/** @param {HTMLElement} box */
function linkFor(box) {
  const p = new URLSearchParams({ lb: box.id, ...inputsOf(box) });
  return `${location.pathname}?${p.toString()}#${box.id}`;
}

/** @param {HTMLElement} box */
function fromQuery(box) {
  const params = new URLSearchParams(location.search);
  if (params.get("lb") !== box.id) return false;
  for (const [k, v] of params) {
    if (k === "lb") continue;
    const el = /** @type {HTMLInputElement | HTMLSelectElement | null} */ (box.querySelector(`.lb-form [name="${CSS.escape(k)}"]`));
    if (!el || (el instanceof HTMLInputElement && el.readOnly)) continue;
    if (el instanceof HTMLSelectElement && ![...el.options].some((o) => o.value === v)) continue;
    el.value = v.slice(0, 200);
  }
  return true;
}

/** @type {WeakMap<HTMLElement, ReturnType<typeof setTimeout>>} */
const timers = new WeakMap();
/** @param {HTMLElement} box */
async function run(box) {
  if (engineState !== "ready") return;
  const decl = dataOf(box).declaration;
  showModes(box, decl);
  foldSummary(box);
  let ans;
  try {
    ans = await query({ kind: "compute", calculator: decl.name, inputs: inputsOf(box) });
  } catch (e) {
    markStale(box, e);
    return;
  }
  render(box, decl, ans);
  one(box, ".lb-link").setAttribute("href", linkFor(box));
  box.dataset.computed = String(Number(box.dataset.computed || 0) + 1);
  if (!performance.getEntriesByName("lb-first-live").length) performance.mark("lb-first-live");
  if (decl.plots.length) plot(box, decl, ans).catch(() => { one(box, ".lb-plot").innerHTML = ""; });
}

// --- a design file opened from the device: read here, solved in the worker, never uploaded ---------
function initOpen() {
  for (const box of all(document, ".lb-open:not([data-live])")) {
    box.dataset.live = "1";
    startEngine();
    const input = /** @type {HTMLInputElement} */ (control(box, ".lb-open-file"));
    input.addEventListener("change", async () => {
      const file = input.files && input.files[0];
      if (!file) return;
      const errs = one(box, ".lb-open-err");
      const out = one(box, ".lb-open-out");
      errs.innerHTML = "";
      if (file.size > 200000) { errs.innerHTML = "<li>file: over 200 kB; expected a design file (.toml)</li>"; return; }
      const text = await file.text();
      out.innerHTML = "<p>Solving…</p>";
      await /** @type {Promise<void>} */ (new Promise((resolve) => {
        const wait = () => (engineState === "ready" ? resolve() : engineState === "failed" ? resolve() : setTimeout(wait, 100));
        wait();
      }));
      if (engineState !== "ready") { out.innerHTML = ""; errs.innerHTML = "<li>the engine could not start in this browser</li>"; return; }
      let ans;
      try {
        ans = await query({ kind: "sheet", toml: text });
      } catch (e) {
        out.innerHTML = "";
        errs.innerHTML = `<li>${esc(e instanceof Error ? e.message : e)}</li>`;
        return;
      }
      if (!ans.ok) {
        out.innerHTML = "";
        errs.innerHTML = ans.errors.map((e) => `<li>${esc(e.message)}</li>`).join("");
        return;
      }
      // the sheet is built by the core, which escapes everything the file says
      out.innerHTML = `<h2>${esc(ans.name)}</h2>` + ans.html;
      labelTables(out);
      initSheets();
      box.dataset.computed = String(Number(box.dataset.computed || 0) + 1);
    });
  }
}

// the engine once it is up: true, or false when it could not start (or has stopped)
/** @returns {Promise<boolean>} */
function whenReady() {
  return new Promise((resolve) => {
    const wait = () => (engineState === "ready" ? resolve(true) : engineState === "failed" ? resolve(false) : setTimeout(wait, 50));
    wait();
  });
}

// An engine that never started gets a refusal the workbench shows; one that stopped after starting rejects,
// as a request in flight does (engineStopped), and the workbench says the engine stopped.
function initBenches() {
  for (const box of all(document, ".lb-bench:not([data-live])")) {
    box.dataset.live = "1";
    startEngine();
    /** @type {import("./workbench.js").Engine} */
    const engine = {
      root,
      query: async (request) => {
        if (await whenReady()) return query(request);
        if (wasReady) throw new Error(`engine stopped: ${failReason}`);
        return { ok: false, errors: [{ field: "", value: "", expected: "", message: "the engine could not start in this browser" }] };
      },
    };
    initWorkbench(box, engine).catch((e) => console.error("lampbook workbench:", e));
  }
}

// in running text a number keeps its unit on its line (a no-break space joins them)
const NUMBER_UNIT = /(\d) (?=(?:[pnµumkMG]?(?:VA|V|A|W|Ω|F|Hz|s|J|h)|%|°C|°F|mm²|AWG|kcmil)(?![\w]))/g;
/** @param {Node} el */
function keepNumbers(el) {
  const walker = document.createTreeWalker(el, NodeFilter.SHOW_TEXT);
  for (let n = /** @type {Text | null} */ (walker.nextNode()); n; n = /** @type {Text | null} */ (walker.nextNode()))
  {
    const joined = n.data.replace(NUMBER_UNIT, "$1\u00a0");
    if (joined !== n.data) n.data = joined;
  }
}

// narrow screens show long tables as stacked label/value cards: each cell learns its column's label
/** @param {ParentNode} scope */
function labelTables(scope) {
  for (const td of all(scope, ".lb-out tr.lb-text td, .lb-table td")) keepNumbers(td);
  for (const t of all(scope, "table.lb-cards:not([data-labelled])")) {
    const heads = [...all(t, "thead th")].map((th) => (th.textContent || "").trim());
    for (const tr of all(t, "tbody tr"))
      [.../** @type {HTMLCollectionOf<HTMLElement>} */ (tr.children)].forEach((td, i) => {
        td.dataset.label = heads[i] || "";
        if ((td.textContent || "").trim().length <= 14) td.classList.add("lb-num");
        else td.classList.add("lb-wide");
      });
    t.dataset.labelled = "1";
  }
}

// a schematic opens full screen, where it can be scrolled and pinched to read every label
function initSheets() {
  for (const fig of all(document, ".lb-schematic:not([data-live])")) {
    fig.dataset.live = "1";
    const b = document.createElement("button");
    b.type = "button";
    b.className = "lb-zoom";
    b.textContent = "Open full screen";
    b.addEventListener("click", () => {
      const full = fig.classList.toggle("lb-full");
      b.textContent = full ? "Close" : "Open full screen";
      if (!full) fig.scrollIntoView({ block: "center" });
    });
    fig.prepend(b);
  }
}
// on paper every check shows its reason and source
window.addEventListener("beforeprint", () => {
  for (const d of /** @type {NodeListOf<HTMLDetailsElement>} */ (document.querySelectorAll(".lb-checklist details"))) d.open = true;
});

function init() {
  initOpen();
  initBenches();
  initSheets();
  labelTables(document);
  const boxes = all(document, ".lb-calc:not([data-live])");
  if (!boxes.length) { setStatus(); if (!worker) startOffline(); return; }
  setStatus();
  startEngine();
  for (const box of boxes) {
    box.dataset.live = "1";
    const decl = dataOf(box).declaration;
    const shared = fromQuery(box);
    showModes(box, decl);
    foldSummary(box);
    const later = () => {
      clearTimeout(timers.get(box));
      timers.set(box, setTimeout(() => run(box), 120));
    };
    const form = one(box, ".lb-form");
    form.addEventListener("input", later);
    form.addEventListener("change", later);
    // the mode's fields show at once, engine or not
    const onEdit = () => { showModes(box, decl); foldSummary(box); };
    form.addEventListener("input", onEdit);
    form.addEventListener("change", onEdit);
    const units = /** @type {HTMLElement | null} */ (box.querySelector(".lb-units"));
    if (units) units.addEventListener("click", () => {
      const imperial = units.dataset.system === "metric";
      for (const el of /** @type {NodeListOf<HTMLInputElement>} */ (box.querySelectorAll("[data-imperial]")))
        el.value = String(imperial ? el.dataset.imperial : el.dataset.default);
      units.dataset.system = imperial ? "imperial" : "metric";
      box.dataset.units = units.dataset.system;
      units.textContent = imperial ? "Metric units" : "Imperial units";
      later();
    });
    one(box, ".lb-link").addEventListener("click", (ev) => {
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
  if (swStarted || !secure || !site.engine) return;
  swStarted = true;
  navigator.serviceWorker.register(new URL("sw.js", root).href, { scope: root.href }).then(
    async () => {
      await navigator.serviceWorker.ready;
      if (!navigator.serviceWorker.controller)
        await new Promise((resolve) => navigator.serviceWorker.addEventListener("controllerchange", resolve, { once: true }));
      offlineReady = await precacheComplete();
      if (!offlineReady) offlineNote = "offline copy incomplete";
      setStatus();
      if (navigator.storage && navigator.storage.persist) navigator.storage.persist().catch(() => {});
    },
    (e) => {
      offlineNote = "offline unavailable (" + String(e instanceof Error && e.message ? e.message : e).slice(0, 80) + ")";
      setStatus();
      console.warn("lampbook: offline cache unavailable:", e);
    },
  );
}

// "offline-ready" is a claim: the service worker controls this page and its cache holds the whole build.
// The cache is filled all or nothing at install, so this build's cache holding the engine glue proves it.
async function precacheComplete() {
  const sw = navigator.serviceWorker.controller;
  if (!sw || !("caches" in window)) return false;
  /** @type {string | null} */
  const version = await new Promise((resolve) => {
    const t = setTimeout(() => resolve(null), 3000);
    /** @param {MessageEvent} ev */
    const onMsg = (ev) => {
      if (ev.data && ev.data.type === "version") {
        clearTimeout(t);
        navigator.serviceWorker.removeEventListener("message", onMsg);
        resolve(ev.data.version);
      }
    };
    navigator.serviceWorker.addEventListener("message", onMsg);
    sw.postMessage("version");
  });
  if (!version || !(await caches.has("lampbook-" + version))) return false;
  const cache = await caches.open("lampbook-" + version);
  return Boolean(await cache.match(new URL("assets/lampbook/worker.js", root).href));
}
if (secure && navigator.serviceWorker.controller) startOffline();

if (typeof document$ !== "undefined" && document$.subscribe) document$.subscribe(init);
else if (document.readyState === "loading") document.addEventListener("DOMContentLoaded", init);
else init();
