// Shared by the Pyodide bench scripts: load Pyodide on Node with the core's wheel installed, then run one
// Python snippet per design file (its text in the global `toml_text`; the snippet's last line a JSON string)
// and print one JSON object, design file name -> the snippet's answer.
// usage of a script built on it: node SCRIPT.mjs PYODIDE_DIR LAMPCALC_WHEEL DESIGN.toml...
import { readFileSync } from "node:fs";
import { join, basename } from "node:path";
import { pathToFileURL } from "node:url";

/** @param {string} code the Python snippet; its last expression is a JSON string */
export async function timeEachDesign(code) {
  const [, , dir, wheel, ...designs] = process.argv;
  /** @type {typeof import("pyodide")} the runtime the site ships, loaded from its folder */
  const { loadPyodide } = await import(pathToFileURL(join(dir, "pyodide.mjs")).href);
  const py = await loadPyodide({ indexURL: dir.endsWith("/") ? dir : dir + "/" });
  const site = py.runPython("import sysconfig; sysconfig.get_paths()['purelib']");
  py.unpackArchive(new Uint8Array(readFileSync(wheel)), "wheel", { extractDir: site });
  /** @type {Record<string, unknown>} */
  const out = {};
  for (const d of designs) {
    py.globals.set("toml_text", readFileSync(d, "utf8"));
    out[basename(d)] = JSON.parse(py.runPython(code));
  }
  console.log(JSON.stringify(out));
}
