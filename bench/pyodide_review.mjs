// Time the whole design review (corners, faults, switch-on) inside Pyodide on Node.
// usage: node pyodide_review.mjs PYODIDE_DIR LAMPCALC_WHEEL DESIGN.toml...
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
from lampcalc.fixture.check import check
d = parse_design(toml_text)
best = 1e9
for _ in range(2):
    t = time.perf_counter(); check(d); best = min(best, time.perf_counter() - t)
json.dumps({"review_s": best})
`);
  out[basename(d)] = JSON.parse(r);
}
console.log(JSON.stringify(out));
