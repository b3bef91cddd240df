// Run the core's own tests inside Pyodide on Node, from the npm package the site ships.
// usage: node run.mjs PYODIDE_DIR WHEELS_DIR LAMPCALC_WHEEL TESTS_DIR [--engine ENGINE_DIR FULL_STDLIB [--restored]] TEST_FILE...
// (with --engine, LAMPBOOK_CORE_MODULES in the environment lists the core's modules as JSON)
// With --engine, the engine is the site's: its trimmed standard library, its core wheel
// imported as a zip on sys.path (as the page's worker does). Every module of the core is
// imported and the core answers before anything else is there; only then is the rest of
// the standard library (FULL_STDLIB) put behind it for the test machinery, and any module
// the core itself imports from that rest is reported and fails the run.
// With --restored, the engine is started as the page's worker starts it on a later visit: a first
// engine is started with snapshots allowed, the core's wheel put on sys.path and lampcalc.api imported
// (exactly as worker.js does), its memory snapshot made; the tests then run in a second engine restored
// from that snapshot (the wheel written to its place again), never in the first.
import { readFileSync, readdirSync } from "node:fs";
import { join, basename } from "node:path";
import { pathToFileURL } from "node:url";

const args = process.argv.slice(2);
const [dir, wheels, core, tests] = args.splice(0, 4);
/** @type {{engine: string, full: string} | null} the site's engine folder and the full standard library's zip */
let siteEngine = null;
if (args[0] === "--engine") {
  const [, engine, full] = args.splice(0, 3);
  siteEngine = { engine, full };
}
const restored = args[0] === "--restored";
if (restored) args.shift();
const files = args;
/** @type {typeof import("pyodide")} the runtime the site ships, loaded from its folder */
const { loadPyodide } = await import(pathToFileURL(join(dir, "pyodide.mjs")).href);
/** @type {Parameters<typeof loadPyodide>[0]} */
const opts = { indexURL: dir.endsWith("/") ? dir : dir + "/" };
if (siteEngine) opts.stdLibURL = join(siteEngine.engine, "python_stdlib.zip");
/** @type {Awaited<ReturnType<typeof loadPyodide>>} */
let py;
if (restored) {
  const first = await loadPyodide({ ...opts, _makeSnapshot: true });
  first.FS.writeFile("/lib/" + basename(core), new Uint8Array(readFileSync(core)));
  first.pyimport("sys").path.insert(0, "/lib/" + basename(core));
  first.pyimport("lampcalc.api");
  const snapshot = first.makeMemorySnapshot();
  py = await loadPyodide({ ...opts, _loadSnapshot: snapshot });
  py.FS.writeFile("/lib/" + basename(core), new Uint8Array(readFileSync(core)));
  console.log(`restored from a snapshot of ${snapshot.length} bytes; lampcalc.api already imported: ${py.runPython("import sys; 'lampcalc.api' in sys.modules")}`);
} else {
  py = await loadPyodide(opts);
}
if (siteEngine) {
  if (!restored) {
    py.FS.writeFile("/lib/" + basename(core), new Uint8Array(readFileSync(core)));
    py.pyimport("sys").path.insert(0, "/lib/" + basename(core));
  }
  // the core's module names (LAMPBOOK_CORE_MODULES, a JSON list): nothing but the core may load stdlib here
  const listed = process.env.LAMPBOOK_CORE_MODULES;
  if (!listed) throw new Error("--engine needs LAMPBOOK_CORE_MODULES: the core's modules as a JSON list");
  py.globals.set("core_modules", py.toPy(JSON.parse(listed)));
  console.log(py.runPython(`
import importlib, json, sys
for m in core_modules:
    importlib.import_module(m)
import lampcalc.api as api
from lampcalc.calculators import CALCULATORS
bad = [n for n in CALCULATORS if not json.loads(api.handle(json.dumps({"calculator": n, "inputs": {}})))["ok"]]
assert not bad, bad
"trimmed library: %d core modules imported, %d calculators answered" % (len(core_modules), len(CALCULATORS))
`));
  py.FS.writeFile("/lib/rest-of-stdlib.zip", new Uint8Array(readFileSync(siteEngine.full)));
  py.runPython(`
import sys, zipimport
REST = "/lib/rest-of-stdlib.zip"
sys.path.append(REST)

class Rest:
    """Submodules of packages the trimmed library holds only in part."""
    @staticmethod
    def find_spec(name, path=None, target=None):
        parent = name.rpartition(".")[0]
        try:
            return zipimport.zipimporter(REST + ("/" + parent.replace(".", "/") if parent else "")).find_spec(name)
        except zipimport.ZipImportError:
            return None

sys.meta_path.append(Rest)
core_imports = set()
_std = set(sys.stdlib_module_names) | {"_pyodide", "pyodide", "_frozen_importlib", "_frozen_importlib_external"}

def _who(event, args):
    if event != "import":
        return
    f = sys._getframe(1)
    while f is not None:
        top = str(f.f_globals.get("__name__", "")).partition(".")[0]
        if top == "lampcalc":
            core_imports.add(args[0])
            return
        if top not in _std:
            return
        f = f.f_back

sys.addaudithook(_who)
`);
}
const site = py.runPython("import sysconfig; sysconfig.get_paths()['purelib']");
if (!siteEngine) {
  for (const w of [core]) py.unpackArchive(new Uint8Array(readFileSync(w)), "wheel", { extractDir: site });
}
for (const w of readdirSync(wheels).filter((f) => f.endsWith(".whl")).map((f) => join(wheels, f))) {
  py.unpackArchive(new Uint8Array(readFileSync(w)), "wheel", { extractDir: site });
}
py.FS.mkdirTree("/work/tests");
for (const f of ["conftest.py", ...files]) py.FS.writeFile("/work/tests/" + basename(f), new Uint8Array(readFileSync(join(tests, basename(f)))));
// the demo designs, where the review tests read them (ROOT/docs/designs)
const designs = join(tests, "..", "docs", "designs");
py.FS.mkdirTree("/work/docs/designs");
for (const f of readdirSync(designs).filter((f) => f.endsWith(".toml"))) {
  py.FS.writeFile("/work/docs/designs/" + f, new Uint8Array(readFileSync(join(designs, f))));
}
// the review's own regression designs (tests/designs)
const ownDesigns = join(tests, "designs");
py.FS.mkdirTree("/work/tests/designs");
for (const f of readdirSync(ownDesigns).filter((f) => f.endsWith(".toml"))) {
  py.FS.writeFile("/work/tests/designs/" + f, new Uint8Array(readFileSync(join(ownDesigns, f))));
}
py.FS.writeFile("/work/tests/pytest.ini", "[pytest]\nxfail_strict = true\nmarkers =\n    reference: published references\n");
const code = await py.runPythonAsync(`
import os, sys
os.chdir("/work/tests")
import pytest
from hypothesis import settings
# no per-example deadline in here: the interpreter runs slower than natively and the machine may be
# shared; speed is measured by the benchmarks, not by timed tests
settings.register_profile("pyodide", deadline=None)
settings.load_profile("pyodide")
import lampcalc
print("lampcalc from", lampcalc.__file__, "on Python", sys.version.split()[0], sys.platform)
pytest.main(["-q", "-p", "no:cacheprovider", "--strict-markers", *${JSON.stringify(files.map((f) => basename(f)))}])
`);
if (siteEngine) {
  const outside = py.runPython(`
import json
json.dumps(sorted(m for m in core_imports if (getattr(sys.modules.get(m), "__spec__", None) is not None
    and (sys.modules[m].__spec__.origin or "").startswith(REST))))`);
  console.log("core imports outside the trimmed library:", outside);
  if (outside !== "[]") process.exit(3);
}
process.exit(Number(code));
