// Byte-compile Python files in a zip with Pyodide itself (build time, on Node).
// usage: node pycompile.mjs PYODIDE_DIR IN_ZIP OUT_ZIP [--core]
// Each .py becomes a sourceless .pyc (unchecked-hash, so no timestamps) at the same path.
// The standard library's code objects name their files where the runtime keeps that library
// (/lib/python3.14/...); with --core (the core's wheel) they name them by their place in the
// zip. Files that do not compile are kept as source. The output is deterministic.
import { readFileSync, writeFileSync } from "node:fs";
import { join } from "node:path";
import { pathToFileURL } from "node:url";

const [, , dir, inZip, outZip, flag] = process.argv;
/** @type {typeof import("pyodide")} the runtime the site ships, loaded from its folder */
const { loadPyodide } = await import(pathToFileURL(join(dir, "pyodide.mjs")).href);
const py = await loadPyodide({ indexURL: dir.endsWith("/") ? dir : dir + "/" });
py.FS.writeFile("/tmp/in.zip", readFileSync(inZip));
py.globals.set("prefix", flag === "--core" ? "" : "/lib/python3.14/");
const kept = py.runPython(`
import importlib.util, importlib._bootstrap_external as ext, zipfile
kept = []
def put(out, name, data):
    z = zipfile.ZipInfo(name, (1980, 1, 1, 0, 0, 0))
    z.compress_type = zipfile.ZIP_DEFLATED
    z.external_attr = 0o644 << 16
    out.writestr(z, data)
with zipfile.ZipFile("/tmp/in.zip") as src, zipfile.ZipFile("/tmp/out.zip", "w", zipfile.ZIP_DEFLATED) as out:
    for info in sorted(src.infolist(), key=lambda i: i.filename):
        data = src.read(info)
        name = info.filename
        if name.endswith(".py"):
            where = prefix + name
            try:
                code = compile(data, where, "exec", dont_inherit=True)
            except SyntaxError:
                kept.append(name)
            else:
                data = bytes(ext._code_to_hash_pyc(code, importlib.util.source_hash(data), False))
                name = name[:-3] + ".pyc"
        put(out, name, data)
len(kept)
`);
writeFileSync(outZip, py.FS.readFile("/tmp/out.zip"));
console.log(`compiled; ${kept} files kept as source`);
