// lampbook engine worker: runs the calculation core in Pyodide, off the page's thread.
// Messages in:  {type: "query", id, request}    (request is what lampcalc.api.handle takes)
// Messages out: {type: "ready"} | {type: "failed", error} | {type: "result", id, answer}
import { loadPyodide } from "../../engine/pyodide.mjs";

const base = new URL("../../engine/", import.meta.url).href;
let api = null;

const ready = (async () => {
  const py = await loadPyodide({ indexURL: base, lockFileURL: base + "pyodide-lock.json", fullStdLib: false });
  const problems = [];
  await py.loadPackage("lampcalc", { messageCallback: () => {}, errorCallback: (m) => problems.push(m) });
  // loadPackage logs and resolves on failure: prove the import works before saying ready
  try {
    api = py.pyimport("lampcalc.api");
  } catch (e) {
    throw new Error("the core did not install: " + (problems.join("; ") || String(e)), { cause: e });
  }
  return true;
})();

ready.then(
  () => self.postMessage({ type: "ready" }),
  (e) => self.postMessage({ type: "failed", error: String(e && e.message ? e.message : e) }),
);

self.onmessage = async (ev) => {
  const msg = ev.data || {};
  if (msg.type !== "query") return;
  try {
    await ready;
    const out = api.handle(JSON.stringify(msg.request));
    self.postMessage({ type: "result", id: msg.id, answer: JSON.parse(out) });
  } catch (e) {
    self.postMessage({ type: "result", id: msg.id, answer: { ok: false, errors: [{ field: "", message: String(e) }] } });
  }
};
