// @ts-check
// lampbook engine worker: runs the calculation core in Pyodide, off the page's thread.
// Messages in:  {type: "query", id, request}    (request is what lampcalc.api.handle takes)
// Messages out: {type: "ready"} | {type: "failed", error} | {type: "result", id, answer}
//               | {type: "stored"} (the engine's files are handed to the offline cache)
// engine.d.ts declares the messages; protocol.d.ts (generated from the core) the requests and answers.
// self.lbPhases holds the start-up phases in ms from the worker's start (read by the benchmarks).
// @ts-expect-error -- the engine folder is written beside the site at build time (from node_modules/pyodide)
import { loadPyodide as loadEngine } from "../../engine/pyodide.mjs";

/** @typedef {import("./engine").Query} Query */
/** @typedef {import("./engine").Reply} Reply */
/** @typedef {import("./protocol").Answer} Answer */

/** @type {typeof import("pyodide").loadPyodide} */
const loadPyodide = loadEngine;
const base = new URL("../../engine/", import.meta.url).href;
/** @type {import("./engine").Phases} */
const phases = (self.lbPhases = { origin: performance.timeOrigin, script: performance.now() });
/** @type {{handle: (text: string) => string} | null} */
let api = null;

/** @param {Reply} reply */
const reply = (reply) => self.postMessage(reply);

// Keep a copy of every engine file this worker downloads, so that the service worker can
// take it over (after checking its digest) instead of downloading it a second time.
/** @type {{url: string, copy: Response}[]} */
const fetched = [];
const networkFetch = self.fetch.bind(self);
self.fetch = async (input, init) => {
  const url = new URL(input instanceof Request ? input.url : String(input), base).href;
  const mine = url.startsWith(base);
  // already in a cache (a later visit, served by the service worker): nothing to hand over
  const [response, cached] = await Promise.all([
    networkFetch(input, init),
    mine && self.caches ? caches.match(url).catch(() => null) : null,
  ]);
  if (mine && !cached && response.ok) fetched.push({ url, copy: response.clone() });
  return response;
};

// A memory snapshot of the started engine (Python up, the core imported), kept on the device under the
// digest of the engine's files that the build writes into the lock file. A later visit restores it instead of
// starting Python and importing the core again. The snapshot never leaves the device; the service worker keeps
// only the one of its own build's engine. Anything wrong with it (unreadable, another runtime, a restored engine
// that does not answer): it is deleted and the engine starts afresh.
const SNAPSHOT_URL = base + "lampbook-snapshot.bin";
/** @type {Uint8Array | null} made on this visit, stored once the engine has said it is ready */
let madeSnapshot = null;
/** @type {string | null} */
let snapshotCache = null;

/** @param {string} name the kept snapshot's response (its body is read while the runtime loads), or null */
async function snapshotFrom(name) {
  if (!(await caches.has(name))) return null;
  return (await (await caches.open(name)).match(SNAPSHOT_URL)) ?? null;
}

/** @param {import("pyodide").PyodideAPI} py */
async function installCore(py) {
  // the core's wheel (byte-compiled by the build) is imported as it is, a zip on sys.path:
  // no unpacking; the lock file's digest guards the download
  const entry = py.lockfile.packages.lampcalc;
  const sri = "sha256-" + btoa(String.fromCharCode(...(entry.sha256.match(/../g) ?? []).map((h) => parseInt(h, 16))));
  const response = await fetch(base + entry.file_name, { integrity: sri });
  if (!response.ok) throw new Error(entry.file_name + ": HTTP " + response.status);
  const where = "/lib/" + entry.file_name;
  py.FS.writeFile(where, new Uint8Array(await response.arrayBuffer()));
  return where;
}

const ready = (async () => {
  const lockResponse = await fetch(base + "pyodide-lock.json");
  if (!lockResponse.ok) throw new Error("pyodide-lock.json: HTTP " + lockResponse.status);
  /** @type {import("pyodide").Lockfile & {lampbook?: {engine?: string}}} */
  const lock = await lockResponse.json();
  const options = { indexURL: base, lockFileContents: lock, packageBaseUrl: base, fullStdLib: false };
  snapshotCache = lock.lampbook?.engine && self.caches ? "lampbook-snapshot-" + lock.lampbook.engine : null;
  const saved = snapshotCache ? await snapshotFrom(snapshotCache).catch(() => null) : null;
  /** @type {import("pyodide").PyodideAPI | null} */
  let py = null;
  if (saved) {
    try {
      py = await loadPyodide({ ...options, _loadSnapshot: saved.arrayBuffer().then((b) => new Uint8Array(b)) });
      phases.runtime = performance.now();
      await installCore(py); // the snapshot's sys.path names the wheel's place: it must be there again
      phases.package = performance.now();
      api = py.pyimport("lampcalc.api"); // imported in the snapshot: this only looks it up
      if (py.pyimport("lampcalc").__version__ !== lock.packages.lampcalc.version)
        throw new Error("the snapshot holds another core");
      phases.restored = true;
    } catch (e) {
      console.warn("lampbook: the engine's snapshot was not usable; starting afresh:", e);
      py = api = null;
      if (snapshotCache) await caches.delete(snapshotCache).catch(() => false);
    }
  }
  if (!py) {
    py = await loadPyodide({ ...options, _makeSnapshot: Boolean(snapshotCache) });
    phases.runtime = performance.now(); // wasm fetched and compiled, standard library mounted, Python started
    try {
      const where = await installCore(py);
      py.pyimport("sys").path.insert(0, where);
      phases.package = performance.now();
      api = py.pyimport("lampcalc.api");
      phases.core = performance.now();
    } catch (e) {
      throw new Error("the core did not install: " + String(e instanceof Error && e.message ? e.message : e), { cause: e });
    }
    if (snapshotCache) {
      // taken here, before any request has run, so every later visit starts from exactly this state
      try {
        madeSnapshot = py.makeMemorySnapshot();
      } catch (e) {
        console.warn("lampbook: no snapshot of the engine:", e);
      }
      phases.snapshot = performance.now();
    }
  }
  phases.imported = performance.now();
  return true;
})();

async function store() {
  try {
    const snapshot = madeSnapshot;
    madeSnapshot = null;
    if (snapshot && snapshotCache) {
      // one snapshot on the device: one left by another build's engine goes (a page that a newer build's
      // service worker took over while its engine started could otherwise leave one behind)
      for (const k of await caches.keys())
        if (k.startsWith("lampbook-snapshot-") && k !== snapshotCache) await caches.delete(k);
      await (await caches.open(snapshotCache)).put(SNAPSHOT_URL, new Response(/** @type {Uint8Array<ArrayBuffer>} */ (snapshot)));
    }
  } catch (e) {
    // no room: later visits start the engine afresh
  }
  try {
    if (!self.caches || !fetched.length) return;
    const staged = await caches.open("lampbook-staged");
    for (const { url, copy } of fetched.splice(0)) await staged.put(url, copy);
  } catch (e) {
    // no room or no cache storage: the service worker downloads the files itself
  } finally {
    phases.stored = performance.now();
    reply({ type: "stored" });
  }
}

ready.then(
  () => {
    reply({ type: "ready" });
    store();
  },
  (e) => {
    reply({ type: "failed", error: String(e && e.message ? e.message : e) });
    store();
  },
);

/** @param {MessageEvent<Query | undefined>} ev */
self.onmessage = async (ev) => {
  const msg = ev.data;
  if (!msg || msg.type !== "query") return;
  try {
    await ready;
    if (!api) throw new Error("the core is not loaded");
    /** @type {Answer} */
    const answer = JSON.parse(api.handle(JSON.stringify(msg.request)));
    reply({ type: "result", id: msg.id, answer });
  } catch (e) {
    reply({ type: "result", id: msg.id, answer: { ok: false, errors: [{ field: "", value: "", expected: "", message: String(e) }] } });
  }
};
