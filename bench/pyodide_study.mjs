// Time the tolerance study (1,000 samples) and one steady state inside Pyodide on Node.
// usage: node pyodide_study.mjs PYODIDE_DIR LAMPCALC_WHEEL DESIGN.toml...
import { readFileSync } from "node:fs";
import { join, basename } from "node:path";
import { pathToFileURL } from "node:url";

const [, , dir, wheel, ...designs] = process.argv;
const { loadPyodide } = await import(pathToFileURL(join(dir, "pyodide.mjs")).href);
const py = await loadPyodide({ indexURL: dir.endsWith("/") ? dir : dir + "/" });
const site = py.runPython("import sysconfig; sysconfig.get_paths()['purelib']");
py.unpackArchive(new Uint8Array(readFileSync(wheel)), "wheel", { extractDir: site });
const out = {};
for (const d of designs) {
  py.globals.set("toml_text", readFileSync(d, "utf8"));
  const r = py.runPython(`
import time, json
from lampcalc.fixture.design import parse_design
from lampcalc.fixture.tolerance import study
from lampcalc.circuit.steady import solve
d = parse_design(toml_text)
best = 1e9
for _ in range(3):
    t = time.perf_counter(); s = study(d, samples=1000); best = min(best, time.perf_counter() - t)
solve_s = None
if not d.is_cv:
    solve_s = 1e9
    for _ in range(5):
        t = time.perf_counter(); solve(d.circuit()); solve_s = min(solve_s, time.perf_counter() - t)
json.dumps({"study_s": best, "samples": s["samples"], "exact_solves": s["exact_solves"], "solve_s": solve_s,
            "max_relative_error": s["reduced_model"]["max_relative_error"]})
`);
  out[basename(d)] = JSON.parse(r);
}
console.log(JSON.stringify(out));
