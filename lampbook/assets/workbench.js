// lampbook design workbench: start a fixture design from a demo, a file on this device or the planner,
// edit it in a form generated from the design file's schema, and see the whole review change as you type.
// The calculation core does every parse, check and file write (through the engine worker); nothing
// leaves the device. A shared link carries the design itself, so it works offline too.

import { b64decode, b64encode, esc, si } from "./lbutil.js";

const SHARE_LIMIT = 8000; // characters of a shared link's design (base64url): phones refuse longer URLs
const DELAY = 350; // ms after the last keystroke

const TITLES = {
  "": "Fixture", mains: "Mains", supply: "Constant-voltage supply", module: "LED module", array: "Array",
  dropper: "Dropper", bridge: "Bridge rectifier", smoothing: "Smoothing capacitor", fuse: "Fuse", switch: "Switch",
  review: "Review settings", emissions: "Harmonics class", light: "Light output", camera: "Camera",
};

/**
 * @param {HTMLElement} box  the .lb-bench element the plugin wrote
 * @param {{query: (request: object) => Promise<any>, root: URL}} engine
 */
export async function initWorkbench(box, engine) {
  const app = box.querySelector(".lb-bench-app");
  // the data sits in a template, out of reach of the theme's script re-creation on page changes
  const tpl = box.querySelector("template.lb-bench-tpl");
  const data = JSON.parse((tpl ? tpl.content : box).querySelector(".lb-bench-data").textContent);
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
    <ul class="lb-warn lb-bench-errors"></ul>
    <div class="lb-bench-review"></div>
    <div class="lb-tools lb-bench-tools">
      <button type="button" class="lb-bench-save">Save .toml</button>
      <button type="button" class="lb-bench-share">Share link</button>
      <button type="button" class="lb-bench-print">Print sheet</button>
      <span class="lb-bench-note"></span>
    </div>
    <div class="lb-bench-sheet"></div>`;
  const form = app.querySelector(".lb-bench-form");
  const note = app.querySelector(".lb-bench-note");
  const errs = app.querySelector(".lb-bench-errors");
  let schema = null;
  let doc = null; // {tables: {table: {key: text}}, wires: [{key: text}]}
  let timer = 0;
  let generation = 0;

  const ask = async (request) => {
    const ans = await engine.query(request);
    if (!ans || ans.ok === undefined) return { ok: false, errors: [{ field: "", message: "no answer from the engine" }] };
    return ans;
  };
  // asked once, as soon as the engine is up; every form waits for it
  const schemaReady = ask({ kind: "design_schema" });

  function cvDesign() {
    return !!(doc && doc.tables.supply && Object.keys(doc.tables.supply).length);
  }

  function field(table, key, spec, value, wire) {
    const id = `lb-b${box.dataset.block}-${wire === undefined ? "" : "w" + wire + "-"}${table || "top"}-${key}`;
    const req = spec.required ? " *" : "";
    const hint = spec.default !== null && spec.default !== undefined ? `default ${spec.default}` : `e.g. ${spec.example}`;
    return `<div class="lb-field" data-table="${esc(table)}" data-key="${esc(key)}"${wire === undefined ? "" : ` data-wire="${wire}"`}>
      <label for="${id}">${esc(key.replace(/_/g, " "))}${req}</label>
      <input id="${id}" value="${esc(value ?? "")}" placeholder="${esc(hint)}" spellcheck="false">
      <span class="lb-err"></span></div>`;
  }

  function drawForm() {
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

  function readForm() {
    const tables = {};
    const wires = doc.wires.map(() => ({}));
    for (const f of form.querySelectorAll(".lb-field")) {
      const v = f.querySelector("input").value.trim();
      if (v === "") continue;
      if (f.dataset.wire !== undefined) wires[Number(f.dataset.wire)][f.dataset.key] = v;
      else (tables[f.dataset.table] ||= {})[f.dataset.key] = v;
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

  function showErrors(list) {
    for (const f of form.querySelectorAll(".lb-field")) {
      f.classList.remove("lb-bad");
      f.querySelector(".lb-err").textContent = "";
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
        el.querySelector(".lb-err").textContent = e.expected ? `got ${e.value}; expected ${e.expected}` : e.message;
        el.closest("details").open = true;
      } else loose.push(e.message);
    }
    errs.innerHTML = loose.map((m) => `<li>${esc(m)}</li>`).join("");
  }

  function drawReview(ans) {
    const pin = app.querySelector(".lb-bench-pin");
    const nom = ans.nominal || {};
    const worst = ans.worst_high || {};
    const verdict = ans.failed ? `${ans.failed} failed` : ans.warned ? `passes, ${ans.warned} warned` : "passes";
    pin.dataset.status = ans.failed ? "fail" : ans.warned ? "warn" : "pass";
    pin.innerHTML = `<span class="lb-bench-verdict">${esc(verdict)}</span>
      <span>LED ${si(nom.led_current_avg_A, "A")}</span>
      <span>worst string ${si(worst.string_current_avg_A, "A")}</span>
      <span>${si(nom.input_power_W, "W")}</span>
      ${nom.power_factor !== undefined ? `<span>PF ${nom.power_factor.toFixed(2)}</span>` : ""}`;
    const checks = (ans.checks || []).slice().sort((a, b) => ({ fail: 0, warn: 1, pass: 2 })[a.status] - ({ fail: 0, warn: 1, pass: 2 })[b.status]);
    app.querySelector(".lb-bench-review").innerHTML = `<ul class="lb-bench-checks">${checks
      .map((c) => `<li data-status="${esc(c.status)}"><span class="lb-bench-st">${esc(c.status)}</span> <code>${esc(c.id)}</code> ${esc(c.message)}</li>`)
      .join("")}</ul>${(ans.cautions || []).length ? `<details class="lb-caution"><summary>Cautions</summary><ul>${ans.cautions.map((c) => `<li>${esc(c)}</li>`).join("")}</ul></details>` : ""}`;
  }

  async function toml() {
    const ans = await ask({ kind: "design_toml", doc: readForm() });
    if (!ans.ok) { showErrors(ans.errors); return null; }
    return ans.toml;
  }

  async function review() {
    const mine = ++generation;
    const text = await toml();
    if (text === null || mine !== generation) return;
    const ans = await ask({ kind: "check", toml: text });
    if (mine !== generation) return;
    box.dataset.reviewed = String(Number(box.dataset.reviewed || 0) + 1);
    if (!ans.ok) {
      showErrors(ans.errors);
      app.querySelector(".lb-bench-pin").dataset.status = "error";
      app.querySelector(".lb-bench-verdict").textContent = "fix the marked fields";
      return;
    }
    showErrors([]);
    drawReview(ans);
  }

  function later() {
    clearTimeout(timer);
    timer = setTimeout(review, DELAY);
  }

  async function load(text, source) {
    schema = await schemaReady;
    if (!schema.ok) { note.textContent = "the engine could not start: the workbench needs it"; return false; }
    const ans = await ask({ kind: "design_doc", toml: text });
    if (!ans.ok) { showErrors(ans.errors); note.textContent = `${source}: not a design file`; return false; }
    doc = ans.doc;
    doc.wires ||= [];
    drawForm();
    note.textContent = `opened ${source}`;
    await review();
    return true;
  }

  function save(text) {
    const name = ((doc.tables[""] || {}).name || "fixture").replace(/[^\w.-]+/g, "-").toLowerCase() + ".toml";
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
    if (t.classList.contains("lb-bench-add-wire")) {
      doc = readForm();
      doc.wires.push({ name: `run ${doc.wires.length + 1}`, carries: "line" });
      drawForm();
      later();
    } else if (t.dataset.removeWire !== undefined) {
      doc = readForm();
      doc.wires.splice(Number(t.dataset.removeWire), 1);
      drawForm();
      later();
    }
  });
  app.querySelector(".lb-bench-from").addEventListener("change", async (ev) => {
    const v = ev.target.value;
    if (v === "file") { app.querySelector(".lb-bench-file").click(); return; }
    if (!v) return;
    const start = data.starts[Number(v.slice(1))];
    try {
      const r = await fetch(new URL(start.path, engine.root));
      if (!r.ok) throw new Error(`${r.status}`);
      await load(await r.text(), start.label);
    } catch (e) {
      note.textContent = `could not open ${start.label} (${e.message})`;
    }
  });
  app.querySelector(".lb-bench-file").addEventListener("change", async (ev) => {
    const file = ev.target.files && ev.target.files[0];
    if (!file) return;
    if (file.size > 200000) { note.textContent = "file: over 200 kB; expected a design file (.toml)"; return; }
    await load(await file.text(), file.name);
  });
  app.querySelector(".lb-bench-save").addEventListener("click", async () => {
    if (!doc) { note.textContent = "nothing to save yet"; return; }
    const text = await toml(); // the form stays as it is whatever happens
    if (text === null) { note.textContent = "not saved: fix the marked fields first"; return; }
    save(text);
  });
  app.querySelector(".lb-bench-share").addEventListener("click", async () => {
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
  app.querySelector(".lb-bench-print").addEventListener("click", async () => {
    if (!doc) { note.textContent = "nothing to print yet"; return; }
    const text = await toml();
    if (text === null) return;
    const ans = await ask({ kind: "sheet", toml: text });
    if (!ans.ok) { showErrors(ans.errors); return; }
    // the sheet is built by the core, which escapes everything the file says
    app.querySelector(".lb-bench-sheet").innerHTML = `<h2>${esc(ans.name)}</h2>` + ans.html;
    window.print();
  });
  app.querySelector(".lb-bench-run-plan").addEventListener("click", async () => {
    const out = app.querySelector(".lb-bench-plan-out");
    if (!doc) { out.innerHTML = "<li>start from a design first: the planner uses its module and mains</li>"; return; }
    const options = {};
    for (const el of app.querySelectorAll(".lb-bench-plan [name]")) options[el.name] = el.value;
    out.innerHTML = "<li>planning…</li>";
    const ans = await ask({ kind: "plan", doc: readForm(), options });
    for (const el of app.querySelectorAll(".lb-bench-plan .lb-err")) el.textContent = "";
    if (!ans.ok) {
      out.innerHTML = "";
      for (const e of ans.errors) {
        const input = app.querySelector(`.lb-bench-plan [name="${CSS.escape(String(e.field || "").replace(/^target\./, ""))}"]`);
        if (input) input.parentElement.querySelector(".lb-err").textContent = e.expected ? `expected ${e.expected}` : e.message;
        else out.innerHTML += `<li>${esc(e.message)}</li>`;
      }
      return;
    }
    const why = (q) => Object.entries(q.failed_why || {})
      .map(([id, m]) => `<li>${q.series} × ${q.parallel}: ${esc(id)}: ${esc(m)}</li>`).join("");
    if (!ans.doc) {
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
    drawForm();
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
