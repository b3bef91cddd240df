// Run the core's own tests inside Pyodide on Node, from the npm package the site ships.
// usage: node run.mjs PYODIDE_DIR WHEELS_DIR LAMPCALC_WHEEL TESTS_DIR TEST_FILE...
import { readFileSync, readdirSync } from "node:fs";
import { join, basename } from "node:path";
import { pathToFileURL } from "node:url";

const [, , dir, wheels, core, tests, ...files] = process.argv;
const { loadPyodide } = await import(pathToFileURL(join(dir, "pyodide.mjs")).href);
const py = await loadPyodide({ indexURL: dir.endsWith("/") ? dir : dir + "/" });
const site = py.runPython("import sysconfig; sysconfig.get_paths()['purelib']");
for (const w of [...readdirSync(wheels).filter((f) => f.endsWith(".whl")).map((f) => join(wheels, f)), core]) {
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
import lampcalc
print("lampcalc from", lampcalc.__file__, "on Python", sys.version.split()[0], sys.platform)
pytest.main(["-q", "-p", "no:cacheprovider", "--strict-markers", *${JSON.stringify(files.map((f) => basename(f)))}])
`);
process.exit(Number(code));
