// Byte-compile Pyodide's standard library with Pyodide itself (build time, on Node).
// usage: node pycompile.mjs PYODIDE_DIR IN_ZIP OUT_ZIP
// Each .py becomes a sourceless .pyc (unchecked-hash, so no timestamps) at the same path;
// files that do not compile are kept as source. The output is deterministic.
import { readFileSync, writeFileSync } from "node:fs";
import { join } from "node:path";
import { pathToFileURL } from "node:url";

const [, , dir, inZip, outZip] = process.argv;
const { loadPyodide } = await import(pathToFileURL(join(dir, "pyodide.mjs")).href);
const py = await loadPyodide({ indexURL: dir.endsWith("/") ? dir : dir + "/" });
py.FS.writeFile("/tmp/in.zip", readFileSync(inZip));
const kept = py.runPython(`
import importlib.util, importlib._bootstrap_external as ext, zipfile
kept = []
with zipfile.ZipFile("/tmp/in.zip") as src, zipfile.ZipFile("/tmp/out.zip", "w", zipfile.ZIP_DEFLATED) as out:
    for info in sorted(src.infolist(), key=lambda i: i.filename):
        data = src.read(info)
        name = info.filename
        if name.endswith(".py"):
            try:
                code = compile(data, "/lib/python3.14/" + name, "exec", dont_inherit=True)
            except SyntaxError:
                kept.append(name)
            else:
                data = bytes(ext._code_to_hash_pyc(code, importlib.util.source_hash(data), False))
                name = name[:-3] + ".pyc"
        z = zipfile.ZipInfo(name, (1980, 1, 1, 0, 0, 0))
        z.compress_type = zipfile.ZIP_DEFLATED
        out.writestr(z, data)
len(kept)
`);
writeFileSync(outZip, py.FS.readFile("/tmp/out.zip"));
console.log(`compiled; ${kept} files kept as source`);
