// Measure which files of the standard library the engine uses (build time, on Node).
// usage: node stdlib_usage.mjs ENGINE_DIR EXERCISE_JSON OUT_JSON
// ENGINE_DIR is a complete engine folder (runtime, full standard library, lock file, the
// core's wheel). The engine is started exactly as the page's worker starts it, every module
// of the core is imported and every request is answered (EXERCISE_JSON: {"modules": [...],
// "requests": [...lampcalc.api requests]}) and a Python error is carried into JavaScript (the traceback path). OUT_JSON
// gets the list of zip entries the started engine had loaded, and the engine's answers.
import { readFileSync, writeFileSync } from "node:fs";
import { join } from "node:path";
import { pathToFileURL } from "node:url";

const [, , dir, requestsFile, out] = process.argv;
const base = dir.endsWith("/") ? dir : dir + "/";
/** @type {typeof import("pyodide")} the runtime the site ships, loaded from its folder */
const { loadPyodide } = await import(pathToFileURL(join(base, "pyodide.mjs")).href);
const py = await loadPyodide({ indexURL: base, lockFileURL: base + "pyodide-lock.json", fullStdLib: false });
// as the page's worker does: the core's wheel imported as a zip on sys.path
const entry = py.lockfile.packages.lampcalc;
py.FS.writeFile("/lib/" + entry.file_name, new Uint8Array(readFileSync(join(base, entry.file_name))));
py.pyimport("sys").path.insert(0, "/lib/" + entry.file_name);
const api = py.pyimport("lampcalc.api");
/** @type {{modules: string[], requests: import("./protocol.js").Request[]}} */
const exercise = JSON.parse(readFileSync(requestsFile, "utf8"));
for (const m of exercise.modules) py.pyimport(m);
const answers = exercise.requests.map((r) => JSON.parse(api.handle(JSON.stringify(r))).ok);
try {
  py.runPython("raise ValueError('the traceback path')");
} catch (e) {
  if (!String(e).includes("the traceback path")) throw e;
}
const used = py.runPython(`
import json, sys
prefix = "/lib/python%d%d.zip/" % sys.version_info[:2]
json.dumps(sorted({
    m.__spec__.origin[len(prefix):]
    for m in list(sys.modules.values())
    if getattr(m, "__spec__", None) is not None and (m.__spec__.origin or "").startswith(prefix)
}))
`);
writeFileSync(out, JSON.stringify({ used: JSON.parse(used), answers }));
