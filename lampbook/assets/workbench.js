// @ts-check
// lampbook design workbench: start a fixture design from a demo, a file on this device or the planner,
// edit it in a form generated from the design file's schema, and see the whole review change as you type.
// The calculation core does every parse, check and file write (through the engine worker); nothing
// leaves the device. A shared link carries the design itself, so it works offline too.

import { all, b64decode, b64encode, control, esc, messageOf, one, si } from "./lbutil.js";

/** @typedef {import("./protocol").Request} Request */
/** @typedef {import("./protocol").DesignDoc} DesignDoc */
/** @typedef {import("./protocol").DesignSchemaAnswer} DesignSchema */
/** @typedef {import("./protocol").DesignKey} DesignKey */
/** @typedef {import("./protocol").CheckAnswer} CheckAnswer */
/** @typedef {import("./protocol").ErrorItem} ErrorItem */
/** @typedef {import("./protocol").Proposal} Proposal */
/**
 * The engine as the page hands it over: query() answers one request, and rejects when the engine has stopped.
 * @typedef {{query: <R extends Request>(request: R) => Promise<import("./protocol").AnswerTo<R> | import("./protocol").Refusal>, root: URL}} Engine
 */

const SHARE_LIMIT = 8000; // characters of a shared link's design (base64url): phones refuse longer URLs
const DELAY = 350; // ms after the last keystroke

/** @type {Record<string, string>} */
const TITLES = {
  "": "Fixture", mains: "Mains", supply: "Constant-voltage supply", module: "LED module", array: "Array",
  dropper: "Dropper", bridge: "Bridge rectifier", smoothing: "Smoothing capacitor", fuse: "Fuse", switch: "Switch",
  review: "Review settings", emissions: "Harmonics class", light: "Light output", camera: "Camera",
};

/**
 * @param {HTMLElement} box  the .lb-bench element the plugin wrote
 * @param {Engine} engine
 */
export async function initWorkbench(box, engine) {
  const app = one(box, ".lb-bench-app");
  // the data sits in a template, out of reach of the theme's script re-creation on page changes
  const tpl = /** @type {HTMLTemplateElement | null} */ (box.querySelector("template.lb-bench-tpl"));
  /** @type {{starts: {path: string, label: string}[]}} */
  const data = JSON.parse(one(tpl ? tpl.content : box, ".lb-bench-data").textContent || "");
  app.innerHTML = `
    <div class="lb-bench-start">
      <label>Start from <select class="lb-bench-from">
        <option value="">choose…</option>
        ${data.starts.map((s, i) => `<option value="s${i}">${esc(s.label)}</option>`).join("")}
        <option value="file">a design file on this device…</option>
      </select></label>
      <input type="file" class="lb-bench-file" accept=".toml,text/plain" hidden>
    </div>
    <details class="lb-bench-plan"><summary>Plan from the modules of this design</summary>
      <div class="lb-form">
        <div class="lb-field"><label>Modules</label><input name="modules" inputmode="numeric" value="40"><span class="lb-err"></span></div>
        <div class="lb-field"><label>Supply</label><select name="supply"><option>dropper</option><option>cv</option><option>suggest</option></select></div>
        <div class="lb-field"><label>Current at the worst corner, per string</label><input name="current_max" placeholder="module maximum"><span class="lb-err"></span></div>
        <div class="lb-field"><label>Current floor at the low corner</label><input name="current_min" placeholder="half the maximum"><span class="lb-err"></span></div>
        <div class="lb-field"><label>Brightness steps</label><input name="steps" placeholder="60 %; 100 %"><span class="lb-err"></span></div>
        <div class="lb-tools"><button type="button" class="lb-bench-run-plan">Plan</button></div>
      </div>
      <ul class="lb-warn lb-bench-plan-out"></ul>
    </details>
    <form class="lb-bench-form" autocomplete="off"></form>
    <div class="lb-bench-pin" aria-live="polite"><span class="lb-bench-verdict">open or start a design</span></div>
    <p class="lb-bench-engine" role="alert" hidden></p>
    <ul class="lb-warn lb-bench-errors"></ul>
    <div class="lb-bench-review"></div>
    <div class="lb-tools lb-bench-tools">
      <button type="button" class="lb-bench-save">Save .toml</button>
      <button type="button" class="lb-bench-share">Share link</button>
      <button type="button" class="lb-bench-print">Print sheet</button>
      <span class="lb-bench-note"></span>
    </div>
    <div class="lb-bench-sheet"></div>`;
  const form = /** @type {HTMLFormElement} */ (one(app, ".lb-bench-form"));
  const note = one(app, ".lb-bench-note");
  const errs = one(app, ".lb-bench-errors");
  const pin = one(app, ".lb-bench-pin");
  const stoppedNote = one(app, ".lb-bench-engine");
  /** @type {DesignSchema | null} */
  let schema = null;
  /** @type {DesignDoc | null} */
  let doc = null;
  /** @type {ReturnType<typeof setTimeout> | undefined} */
  let timer;
  let generation = 0;

  /**
   * The engine stopped (it died with requests in flight, or is not running): the workbench says so beside the
   * form and draws nothing new, so every value the user typed stays in the form as it is.
   * @param {unknown} e
   */
  function engineStopped(e) {
    clearTimeout(timer);
    generation++; // a review still waiting is dropped
    stoppedNote.hidden = false;
    stoppedNote.textContent = `The engine stopped (${messageOf(e).replace(/^engine (stopped|unavailable): /, "")}): ` +
      "the review below is from before, and nothing can be checked, saved or planned until the page is reloaded. " +
      "Your entries are still in the form; copy any you need first, since reloading starts the form afresh.";
    pin.dataset.status = "error";
    one(app, ".lb-bench-verdict").textContent = "engine stopped: review not updated";
    box.classList.add("lb-stale");
  }

  /**
   * One request to the engine: its answer, or null when the engine has stopped (engineStopped() has said so).
   * @template {Request} R
   * @param {R} request
   * @returns {Promise<import("./protocol").AnswerTo<R> | import("./protocol").Refusal | null>}
   */
  const ask = async (request) => {
    let ans;
    try {
      ans = await engine.query(request);
    } catch (e) {
      engineStopped(e);
      return null;
    }
    if (!ans || ans.ok === undefined) return { ok: false, errors: [{ field: "", value: "", expected: "", message: "no answer from the engine" }] };
    return ans;
  };
  // asked once, as soon as the engine is up; every form waits for it
  const schemaReady = ask({ kind: "design_schema" });

  function cvDesign() {
    return !!(doc && doc.tables.supply && Object.keys(doc.tables.supply).length);
  }

  /**
   * @param {string} table
   * @param {string} key
   * @param {DesignKey} spec
   * @param {string | number | undefined} value
   * @param {number} [wire]
   */
  function field(table, key, spec, value, wire) {
    const id = `lb-b${box.dataset.block}-${wire === undefined ? "" : "w" + wire + "-"}${table || "top"}-${key}`;
    const req = spec.required ? " *" : "";
    const hint = spec.default !== null && spec.default !== undefined ? `default ${spec.default}` : `e.g. ${spec.example}`;
    return `<div class="lb-field" data-table="${esc(table)}" data-key="${esc(key)}"${wire === undefined ? "" : ` data-wire="${wire}"`}>
      <label for="${id}">${esc(key.replace(/_/g, " "))}${req}</label>
      <input id="${id}" value="${esc(value ?? "")}" placeholder="${esc(hint)}" spellcheck="false">
      <span class="lb-err"></span></div>`;
  }

  /** @param {DesignSchema} schema @param {DesignDoc} doc */
  function drawForm(schema, doc) {
    const cv = cvDesign();
    let out = "";
    for (const t of schema.tables) {
      if ((t.kind === "mains" && cv) || (t.kind === "cv" && !cv)) continue;
      const values = doc.tables[t.name] || {};
      const filled = t.keys.filter((k) => values[k.name] !== undefined && values[k.name] !== "").length;
      const open = t.name === "" || t.name === "array" || t.name === "dropper" || t.name === "supply";
      out += `<details class="lb-bench-table"${open ? " open" : ""}><summary>${esc(TITLES[t.name] || t.name)}
        <span class="lb-small">${filled} of ${t.keys.length} set</span></summary><div class="lb-form">`;
      for (const k of t.keys) out += field(t.name, k.name, k, values[k.name]);
      out += "</div></details>";
    }
    out += `<details class="lb-bench-table"><summary>Wire runs <span class="lb-small">${doc.wires.length}</span></summary>`;
    doc.wires.forEach((w, i) => {
      out += `<fieldset class="lb-bench-wire"><legend>Run ${i + 1}</legend><div class="lb-form">`;
      for (const k of schema.wire) out += field("wire", k.name, k, w[k.name], i);
      out += `<div class="lb-tools"><button type="button" data-remove-wire="${i}">Remove run ${i + 1}</button></div></div></fieldset>`;
    });
    out += `<div class="lb-tools"><button type="button" class="lb-bench-add-wire">Add a wire run</button></div></details>`;
    form.innerHTML = out;
  }

  /** @param {DesignDoc} doc @returns {DesignDoc} */
  function readForm(doc) {
    /** @type {DesignDoc["tables"]} */
    const tables = {};
    /** @type {DesignDoc["wires"]} */
    const wires = doc.wires.map(() => ({}));
    for (const f of all(form, ".lb-field")) {
      const v = control(f, "input").value.trim();
      if (v === "") continue;
      const table = f.dataset.table || "", key = f.dataset.key || "";
      if (f.dataset.wire !== undefined) wires[Number(f.dataset.wire)][key] = v;
      else (tables[table] ||= {})[key] = v;
    }
    // keys and tables the form does not show (unknown to the schema, or of the other supply kind) are kept
    for (const [t, values] of Object.entries(doc.tables)) {
      const shown = form.querySelector(`.lb-field[data-table="${CSS.escape(t)}"]`);
      if (!shown) tables[t] = { ...values };
      else for (const [k, v] of Object.entries(values)) {
        if (!form.querySelector(`.lb-field[data-table="${CSS.escape(t)}"][data-key="${CSS.escape(k)}"]`)) (tables[t] ||= {})[k] = v;
      }
    }
    return { tables, wires };
  }

  /** @param {ErrorItem[]} list */
  function showErrors(list) {
    for (const f of all(form, ".lb-field")) {
      f.classList.remove("lb-bad");
      one(f, ".lb-err").textContent = "";
    }
    const loose = [];
    for (const e of list) {
      const name = String(e.field || "");
      let m = name.match(/^wire\[(\d+)\]\.(\w+)$/);
      let el = m ? form.querySelector(`.lb-field[data-wire="${m[1]}"][data-key="${m[2]}"]`) : null;
      if (!el && (m = name.match(/^(?:(\w+)\.)?(\w+)$/))) {
        el = form.querySelector(`.lb-field[data-table="${m[1] || ""}"][data-key="${m[2]}"]:not([data-wire])`);
      }
      if (el) {
        el.classList.add("lb-bad");
        one(el, ".lb-err").textContent = e.expected ? `got ${e.value}; expected ${e.expected}` : e.message;
        const fold = el.closest("details");
        if (fold) fold.open = true;
      } else loose.push(e.message);
    }
    errs.innerHTML = loose.map((m) => `<li>${esc(m)}</li>`).join("");
  }

  /** @param {CheckAnswer} ans */
  function drawReview(ans) {
    const nom = ans.nominal;
    const worst = ans.worst_high;
    const verdict = ans.failed ? `${ans.failed} failed` : ans.warned ? `passes, ${ans.warned} warned` : "passes";
    pin.dataset.status = ans.failed ? "fail" : ans.warned ? "warn" : "pass";
    pin.innerHTML = `<span class="lb-bench-verdict">${esc(verdict)}</span>
      <span>LED ${si(nom.led_current_avg_A, "A")}</span>
      <span>worst string ${si(worst.string_current_avg_A, "A")}</span>
      <span>${si(nom.input_power_W, "W")}</span>
      ${nom.power_factor !== undefined ? `<span>PF ${nom.power_factor.toFixed(2)}</span>` : ""}`;
    const rank = { fail: 0, warn: 1, pass: 2 };
    const checks = (ans.checks || []).slice().sort((a, b) => rank[a.status] - rank[b.status]);
    one(app, ".lb-bench-review").innerHTML = `<ul class="lb-bench-checks">${checks
      .map((c) => `<li data-status="${esc(c.status)}"><span class="lb-bench-st">${esc(c.status)}</span> <code>${esc(c.id)}</code> ${esc(c.message)}</li>`)
      .join("")}</ul>${(ans.cautions || []).length ? `<details class="lb-caution"><summary>Cautions</summary><ul>${ans.cautions.map((c) => `<li>${esc(c)}</li>`).join("")}</ul></details>` : ""}`;
  }

  /** The design in the form as a file, or null (the marked fields, or the engine, say why). */
  async function toml() {
    if (!doc) return null;
    const ans = await ask({ kind: "design_toml", doc: readForm(doc) });
    if (!ans) return null;
    if (!ans.ok) { showErrors(ans.errors); return null; }
    return ans.toml;
  }

  async function review() {
    const mine = ++generation;
    const text = await toml();
    if (text === null || mine !== generation) return;
    const ans = await ask({ kind: "check", toml: text });
    if (!ans || mine !== generation) return;
    box.dataset.reviewed = String(Number(box.dataset.reviewed || 0) + 1);
    if (!ans.ok) {
      showErrors(ans.errors);
      pin.dataset.status = "error";
      one(app, ".lb-bench-verdict").textContent = "fix the marked fields";
      return;
    }
    showErrors([]);
    drawReview(ans);
  }

  function later() {
    clearTimeout(timer);
    timer = setTimeout(review, DELAY);
  }

  /** @param {string} text @param {string} source */
  async function load(text, source) {
    const got = await schemaReady;
    if (!got || !got.ok) { note.textContent = "the engine could not start: the workbench needs it"; return false; }
    schema = got;
    const ans = await ask({ kind: "design_doc", toml: text });
    if (!ans) return false;
    if (!ans.ok) { showErrors(ans.errors); note.textContent = `${source}: not a design file`; return false; }
    doc = ans.doc;
    doc.wires ||= [];
    drawForm(schema, doc);
    note.textContent = `opened ${source}`;
    await review();
    return true;
  }

  /** @param {DesignDoc} doc @param {string} text */
  function save(doc, text) {
    const name = String((doc.tables[""] || {}).name || "fixture").replace(/[^\w.-]+/g, "-").toLowerCase() + ".toml";
    const url = URL.createObjectURL(new Blob([text], { type: "text/plain" }));
    const a = document.createElement("a");
    a.href = url;
    a.download = name;
    document.body.append(a);
    a.click();
    a.remove();
    setTimeout(() => URL.revokeObjectURL(url), 1000);
    note.textContent = `saved ${name}`;
  }

  form.addEventListener("input", later);
  form.addEventListener("click", (ev) => {
    const t = ev.target;
    if (!(t instanceof HTMLElement)) return;
    if (!doc || !schema) return;
    if (t.classList.contains("lb-bench-add-wire")) {
      doc = readForm(doc);
      doc.wires.push({ name: `run ${doc.wires.length + 1}`, carries: "line" });
      drawForm(schema, doc);
      later();
    } else if (t.dataset.removeWire !== undefined) {
      doc = readForm(doc);
      doc.wires.splice(Number(t.dataset.removeWire), 1);
      drawForm(schema, doc);
      later();
    }
  });
  const from = control(app, ".lb-bench-from");
  const fileInput = /** @type {HTMLInputElement} */ (control(app, ".lb-bench-file"));
  from.addEventListener("change", async () => {
    const v = from.value;
    if (v === "file") { fileInput.click(); return; }
    if (!v) return;
    const start = data.starts[Number(v.slice(1))];
    try {
      const r = await fetch(new URL(start.path, engine.root));
      if (!r.ok) throw new Error(`${r.status}`);
      await load(await r.text(), start.label);
    } catch (e) {
      note.textContent = `could not open ${start.label} (${messageOf(e)})`;
    }
  });
  fileInput.addEventListener("change", async () => {
    const file = fileInput.files && fileInput.files[0];
    if (!file) return;
    if (file.size > 200000) { note.textContent = "file: over 200 kB; expected a design file (.toml)"; return; }
    await load(await file.text(), file.name);
  });
  one(app, ".lb-bench-save").addEventListener("click", async () => {
    if (!doc) { note.textContent = "nothing to save yet"; return; }
    const text = await toml(); // the form stays as it is whatever happens
    if (text === null) { note.textContent = stoppedNote.hidden ? "not saved: fix the marked fields first" : "not saved: the engine stopped"; return; }
    save(doc, text);
  });
  one(app, ".lb-bench-share").addEventListener("click", async () => {
    if (!doc) { note.textContent = "nothing to share yet"; return; }
    const text = await toml();
    if (text === null) return;
    const enc = b64encode(text);
    if (enc.length > SHARE_LIMIT) {
      note.textContent = `too large for a link (${enc.length} characters, limit ${SHARE_LIMIT}): save the file and send it instead`;
      return;
    }
    const url = new URL(location.href);
    url.search = "?design=" + enc;
    url.hash = "";
    history.replaceState(null, "", url);
    try { await navigator.clipboard.writeText(url.href); note.textContent = "link copied"; }
    catch { note.textContent = "link in the address bar"; }
  });
  one(app, ".lb-bench-print").addEventListener("click", async () => {
    if (!doc) { note.textContent = "nothing to print yet"; return; }
    const text = await toml();
    if (text === null) return;
    const ans = await ask({ kind: "sheet", toml: text });
    if (!ans) return;
    if (!ans.ok) { showErrors(ans.errors); return; }
    // the sheet is built by the core, which escapes everything the file says
    one(app, ".lb-bench-sheet").innerHTML = `<h2>${esc(ans.name)}</h2>` + ans.html;
    window.print();
  });
  one(app, ".lb-bench-run-plan").addEventListener("click", async () => {
    const out = one(app, ".lb-bench-plan-out");
    if (!doc || !schema) { out.innerHTML = "<li>start from a design first: the planner uses its module and mains</li>"; return; }
    /** @type {Record<string, string>} */
    const values = {};
    for (const el of /** @type {NodeListOf<HTMLInputElement | HTMLSelectElement>} */ (app.querySelectorAll(".lb-bench-plan [name]")))
      values[el.name] = el.value;
    // the plan form has every option's field (modules among them)
    const options = /** @type {import("./protocol").PlanOptions} */ (/** @type {unknown} */ (values));
    out.innerHTML = "<li>planning…</li>";
    const ans = await ask({ kind: "plan", doc: readForm(doc), options });
    for (const el of all(app, ".lb-bench-plan .lb-err")) el.textContent = "";
    if (!ans) { out.innerHTML = ""; return; }
    if (!ans.ok) {
      out.innerHTML = "";
      for (const e of ans.errors) {
        const input = app.querySelector(`.lb-bench-plan [name="${CSS.escape(String(e.field || "").replace(/^target\./, ""))}"]`);
        if (input && input.parentElement) one(input.parentElement, ".lb-err").textContent = e.expected ? `expected ${e.expected}` : e.message;
        else out.innerHTML += `<li>${esc(e.message)}</li>`;
      }
      return;
    }
    /** @param {Proposal} q */
    const why = (q) => Object.entries(q.failed_why || {})
      .map(([id, m]) => `<li>${q.series} × ${q.parallel}: ${esc(id)}: ${esc(m)}</li>`).join("");
    if (!ans.doc || ans.best === null) { // a design comes with the proposal it is
      out.innerHTML = `<li>no design: ${esc(ans.constraint)}</li>` + ans.proposals.map(why).join("");
      return;
    }
    const p = ans.proposals[ans.best];
    out.innerHTML = `<li>planned ${p.series} × ${p.parallel} on ${esc(p.supply)}; it passed the review (no failing check)`
      + (p.warned.length ? `; warnings: ${esc(p.warned.join(", "))}` : "") + "</li>"
      + (p.hazards.length ? `<li>single-fault hazards the review finds: ${esc(p.hazards.join(", "))}</li>` : "")
      + ans.notes.map((n) => `<li>${esc(n)}</li>`).join("");
    doc = ans.doc;
    doc.wires ||= [];
    drawForm(schema, doc);
    await review();
  });

  const shared = new URLSearchParams(location.search).get("design");
  if (shared) {
    let text;
    try { text = shared.length <= SHARE_LIMIT ? b64decode(shared) : null; } catch { text = null; }
    if (text === null) note.textContent = "the shared link does not hold a design";
    else await load(text, "the shared link");
  }
}
