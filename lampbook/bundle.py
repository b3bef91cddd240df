"""Package the in-page engine: the core as a pure wheel, the Pyodide runtime
copied from the npm package, a trimmed lock file listing only what the site
ships, and a service worker whose cache name is the hash of everything it
precaches."""

from __future__ import annotations

import base64
import functools
import hashlib
import importlib.metadata
import json
import os
import shutil
import subprocess
import sys
import tempfile
import tomllib
import zipfile
from pathlib import Path
from typing import Any

import lampcalc

#: The one Pyodide version the site is built and tested with (package.json pins the same).
PYODIDE_VERSION = "314.0.7"
RUNTIME_FILES = ("pyodide.mjs", "pyodide.asm.mjs", "pyodide.asm.wasm", "python_stdlib.zip")
_EPOCH = (1980, 1, 1, 0, 0, 0)
_EPOCH_SECONDS = 315532800  # 1980-01-01, the earliest time a zip file can hold


class BundleError(RuntimeError):
    pass


def sha256(path: Path) -> str:
    return hashlib.sha256(path.read_bytes()).hexdigest()


def core_source() -> Path | None:
    """The folder holding the core's ``pyproject.toml`` (``calc/`` in a
    checkout or an editable install), or None when the core is installed
    from a wheel."""
    pkg = Path(lampcalc.__file__).resolve().parent
    root = pkg.parent
    meta = root / "pyproject.toml"
    if meta.is_file() and 'name = "lampcalc"' in meta.read_text(encoding="utf-8"):
        return root
    return None


def build_wheel(out_dir: Path) -> Path:
    """Build lampcalc-VERSION-py3-none-any.whl from the core's own
    ``pyproject.toml`` with its declared build backend (setuptools),
    reproducibly: a clean copy of the sources, fixed file times."""
    src = core_source()
    if src is None:
        return _repack_installed(out_dir)
    out_dir.mkdir(parents=True, exist_ok=True)
    with tempfile.TemporaryDirectory(prefix="lampcalc-build-") as tmp:
        work = Path(tmp) / "calc"
        shutil.copytree(src, work, ignore=shutil.ignore_patterns("*.egg-info", "__pycache__", "build", "*.pyc"))
        dist = Path(tmp) / "dist"
        env = dict(os.environ, SOURCE_DATE_EPOCH=str(_EPOCH_SECONDS), PYTHONDONTWRITEBYTECODE="1")
        code = "import sys; from setuptools import build_meta as b; print(b.build_wheel(sys.argv[1]))"
        proc = subprocess.run(
            [sys.executable, "-c", code, str(dist)],
            cwd=work,
            env=env,
            capture_output=True,
            text=True,
            timeout=300,
        )
        if proc.returncode != 0:
            raise BundleError("building the core's wheel failed: " + (proc.stderr or proc.stdout)[-800:])
        name = proc.stdout.strip().splitlines()[-1]
        out = out_dir / name
        shutil.copyfile(dist / name, out)
    return out


def _repack_installed(out_dir: Path) -> Path:
    """The core installed from a wheel: write the same files again from the
    installed distribution's own record."""
    dist = importlib.metadata.distribution("lampcalc")
    version = dist.version
    name = f"lampcalc-{version}-py3-none-any.whl"
    info_dir = f"lampcalc-{version}.dist-info"
    files: list[tuple[str, bytes]] = []
    for f in sorted(dist.files or [], key=str):
        arc = str(f)
        if arc.startswith("lampcalc/") and not arc.endswith(".pyc"):
            files.append((arc, Path(str(f.locate())).read_bytes()))
    if not files:
        raise BundleError("the installed lampcalc lists no files; reinstall it")
    files.append((f"{info_dir}/METADATA", f"Metadata-Version: 2.1\nName: lampcalc\nVersion: {version}\n".encode()))
    files.append(
        (
            f"{info_dir}/WHEEL",
            b"Wheel-Version: 1.0\nGenerator: lampbook\nRoot-Is-Purelib: true\nTag: py3-none-any\n",
        )
    )
    record = []
    for arc, data in files:
        digest = base64.urlsafe_b64encode(hashlib.sha256(data).digest()).rstrip(b"=").decode()
        record.append(f"{arc},sha256={digest},{len(data)}")
    record.append(f"{info_dir}/RECORD,,")
    files.append((f"{info_dir}/RECORD", ("\n".join(record) + "\n").encode()))
    out_dir.mkdir(parents=True, exist_ok=True)
    path = out_dir / name
    with zipfile.ZipFile(path, "w", zipfile.ZIP_DEFLATED) as z:
        for arc, data in files:
            zi = zipfile.ZipInfo(arc, _EPOCH)
            zi.compress_type = zipfile.ZIP_DEFLATED
            zi.external_attr = 0o644 << 16
            z.writestr(zi, data)
    return path


def find_runtime(configured: str | None, config_dir: str) -> Path:
    root = Path(configured) if configured else Path(config_dir) / "node_modules" / "pyodide"
    missing = [f for f in RUNTIME_FILES if not (root / f).is_file()]
    if missing:
        raise BundleError(
            f"Pyodide runtime not found in {root} (missing {', '.join(missing)}); run `npm ci` (the Makefile does)"
        )
    meta = json.loads((root / "package.json").read_text())
    if meta.get("version") != PYODIDE_VERSION:
        raise BundleError(f"Pyodide {meta.get('version')} in {root}; lampbook is pinned to {PYODIDE_VERSION}")
    return root


def compiled_stdlib(runtime: Path, cache_dir: Path) -> Path:
    """The standard library byte-compiled by Pyodide itself on Node, cached
    outside the site by the digest of its inputs."""
    script = Path(__file__).resolve().parent / "assets" / "pycompile.mjs"
    src = runtime / "python_stdlib.zip"
    key = hashlib.sha256((sha256(src) + sha256(script) + PYODIDE_VERSION).encode()).hexdigest()[:20]
    out = cache_dir / f"python_stdlib-{key}.zip"
    if out.is_file():
        return out
    node = shutil.which("node")
    if node is None:
        raise BundleError(
            "node is needed to byte-compile the standard library (set compile_stdlib: false to ship it as source)"
        )
    cache_dir.mkdir(parents=True, exist_ok=True)
    tmp = out.with_suffix(".tmp")
    proc = subprocess.run(
        [node, str(script), str(runtime), str(src), str(tmp)], capture_output=True, text=True, timeout=600
    )
    if proc.returncode != 0 or not tmp.is_file():
        raise BundleError("byte-compiling the standard library failed: " + (proc.stderr or proc.stdout)[-800:])
    with zipfile.ZipFile(tmp) as z:
        names = set(z.namelist())
    if "json/__init__.pyc" not in names or "json/__init__.py" in names:
        raise BundleError("byte-compiled standard library looks wrong (json/__init__.pyc missing)")
    tmp.replace(out)
    return out


def _rewrite_record(src: Path, dest: Path) -> None:
    """Write DEST: the wheel SRC with its RECORD listing every file it holds (fixed times)."""
    with zipfile.ZipFile(src) as z:
        files = [(i.filename, z.read(i)) for i in sorted(z.infolist(), key=lambda i: i.filename)]
    record_name = next(n for n, _ in files if n.endswith(".dist-info/RECORD"))
    files = [(n, d) for n, d in files if n != record_name]
    lines = []
    for arc, data in files:
        digest = base64.urlsafe_b64encode(hashlib.sha256(data).digest()).rstrip(b"=").decode()
        lines.append(f"{arc},sha256={digest},{len(data)}")
    lines.append(f"{record_name},,")
    files.append((record_name, ("\n".join(lines) + "\n").encode()))
    with zipfile.ZipFile(dest, "w", zipfile.ZIP_DEFLATED) as out:
        for arc, data in files:
            zi = zipfile.ZipInfo(arc, _EPOCH)
            zi.compress_type = zipfile.ZIP_DEFLATED
            zi.external_attr = 0o644 << 16
            out.writestr(zi, data, compresslevel=9)  # sent as it is: no server compresses a zip again


def compile_wheel(wheel: Path, runtime: Path, cache_dir: Path) -> None:
    """Replace each .py of the core's WHEEL (in place) by its .pyc, compiled by Pyodide
    itself, so the engine imports the core without compiling it and the first visit
    carries no source (the page never shows it: a traceback names file and line). The
    wheel is the engine's alone; the core's own distribution is built from calc/."""
    script = Path(__file__).resolve().parent / "assets" / "pycompile.mjs"
    # the wheel as written here (sourceless, deflate level 9): a change of that form is a new key
    key = hashlib.sha256((sha256(wheel) + sha256(script) + PYODIDE_VERSION + "sourceless-z9").encode()).hexdigest()[:20]
    cached = cache_dir / f"core-{key}.whl"
    if not cached.is_file():
        node = shutil.which("node")
        if node is None:
            raise BundleError("node is needed to byte-compile the core (set compile_stdlib: false)")
        cache_dir.mkdir(parents=True, exist_ok=True)
        tmp = cached.with_suffix(".tmp")
        proc = subprocess.run(
            [node, str(script), str(runtime), str(wheel), str(tmp), "--core"],
            capture_output=True,
            text=True,
            timeout=600,
        )
        if proc.returncode != 0 or not tmp.is_file():
            raise BundleError("byte-compiling the core failed: " + (proc.stderr or proc.stdout)[-800:])
        _rewrite_record(tmp, cached.with_suffix(".part"))
        tmp.unlink()
        cached.with_suffix(".part").replace(cached)
    shutil.copyfile(cached, wheel)


def install_engine(
    site_dir: Path, runtime: Path, stdlib: Path | None = None, cache_dir: Path | None = None
) -> dict[str, str]:
    """Copy the runtime and the wheel into SITE/engine/, write the trimmed
    lock file; return the file digests. ``stdlib`` replaces the runtime's
    standard library zip (the byte-compiled one); with ``cache_dir`` the
    core's wheel gets byte-compiled modules beside its sources."""
    eng = site_dir / "engine"
    eng.mkdir(parents=True, exist_ok=True)
    for f in RUNTIME_FILES:
        shutil.copyfile(stdlib if (stdlib and f == "python_stdlib.zip") else runtime / f, eng / f)
    wheel = build_wheel(eng)
    if cache_dir is not None:
        compile_wheel(wheel, runtime, cache_dir)
    full = json.loads((runtime / "pyodide-lock.json").read_text())
    lock = {
        "info": full["info"],
        "packages": {
            "lampcalc": {
                "name": "lampcalc",
                "version": lampcalc.__version__,
                "file_name": wheel.name,
                "install_dir": "site",
                "sha256": sha256(wheel),
                "package_type": "package",
                "imports": ["lampcalc"],
                "depends": [],
                "unvendored_tests": False,
                "tool": {},
            }
        },
    }
    (eng / "pyodide-lock.json").write_text(json.dumps(lock, indent=1, sort_keys=True))
    return {p.name: sha256(p) for p in sorted(eng.iterdir())}


def stamp_engine(site_dir: Path, snapshot: bool = True) -> str | None:
    """Write into SITE/engine/pyodide-lock.json (key ``lampbook.engine``) a digest of the
    engine as shipped (the runtime's files, the standard library as trimmed, the core's
    wheel, and the worker script that starts it) and return it; with ``snapshot`` false,
    remove it and return None.

    The page's worker keeps, on the device, a memory snapshot of the engine it started
    (Python up, the core imported) under this digest, and restores it on later visits
    instead of starting Python again; the service worker keeps only the snapshot of its
    own build's engine. Call after the standard library is trimmed."""
    eng = site_dir / "engine"
    lock_file = eng / "pyodide-lock.json"
    lock = json.loads(lock_file.read_text())
    key = None
    if snapshot:
        h = hashlib.sha256(PYODIDE_VERSION.encode())
        wheel = lock["packages"]["lampcalc"]["file_name"]
        for name in (*RUNTIME_FILES, wheel):
            h.update(name.encode() + b"\0" + bytes.fromhex(sha256(eng / name)))
        # how the worker starts the engine is part of the state a snapshot holds
        h.update(b"worker.js\0" + bytes.fromhex(sha256(Path(__file__).resolve().parent / "assets" / "worker.js")))
        key = h.hexdigest()[:24]
        lock["lampbook"] = {"engine": key}
    else:
        lock.pop("lampbook", None)
    lock_file.write_text(json.dumps(lock, indent=1, sort_keys=True))
    return key


SEARCH_BUNDLES = "assets/javascripts/lunr/"


def search_bundles(languages: list[str]) -> set[str]:
    """The theme's search-language files (under ``assets/javascripts/lunr/``) that its
    search worker loads for LANGUAGES: a stemmer per language other than English, the
    support file when there is any, the multi-language file for more than one, and the
    word splitters of Japanese (tinyseg) and of Hindi and Thai (wordcut)."""
    out: set[str] = set()
    for lang in languages:
        if lang == "ja":
            out.add("tinyseg.js")
        if lang in ("hi", "th"):
            out.add("wordcut.js")
        if lang != "en":
            out.add(f"min/lunr.{lang}.min.js")
    if len(languages) > 1:
        out.add("min/lunr.multi.min.js")
    if out:
        out.add("min/lunr.stemmer.support.min.js")
    return {SEARCH_BUNDLES + f for f in out}


def precache_list(site_dir: Path, languages: list[str] | None = None, source_maps: bool = False) -> list[str]:
    """The files the service worker caches: the whole site except itself, compressed
    siblings, source maps (unless SOURCE_MAPS) and search-language bundles other than
    those LANGUAGES need (None: all of them)."""
    keep_search = search_bundles(languages) if languages is not None else None
    out = []
    for root, _, files in os.walk(site_dir):
        for f in files:
            p = Path(root) / f
            rel = p.relative_to(site_dir).as_posix()
            if rel == "sw.js" or rel.endswith((".gz", ".br")) or (rel.endswith(".map") and not source_maps):
                continue
            if keep_search is not None and rel.startswith(SEARCH_BUNDLES) and rel not in keep_search:
                continue
            out.append(rel)
    return sorted(out)


def write_service_worker(
    site_dir: Path,
    template: str,
    languages: list[str] | None = None,
    source_maps: bool = False,
    engine: str | None = None,
) -> str:
    """Write SITE/sw.js: the precache list, the build's version (a digest of every
    precached file), the digests of the engine's files, by which the service
    worker takes over the copies the engine has just downloaded instead of fetching
    them again, and ``engine``, the engine's digest (:func:`stamp_engine`), whose
    snapshot it keeps when it clears older builds' caches."""
    files = precache_list(site_dir, languages, source_maps)
    h = hashlib.sha256()
    digests = {}
    for rel in files:
        d = hashlib.sha256((site_dir / rel).read_bytes())
        h.update(rel.encode())
        h.update(d.digest())
        if rel.startswith("engine/"):
            digests[rel] = d.hexdigest()
    version = h.hexdigest()[:16]
    manifest = json.dumps({"version": version, "files": files, "digests": digests, "engine": engine}, sort_keys=True)
    (site_dir / "sw.js").write_text(template.replace("/*LAMPBOOK_PRECACHE*/null", manifest))
    return version


#: what a static host would compress: text, scripts, JSON, wasm, SVG (zip, wheels and images are compressed already)
COMPRESSIBLE = (".html", ".css", ".js", ".mjs", ".json", ".wasm", ".svg", ".xml", ".txt", ".webmanifest", ".map")


def _compressed(data: bytes, kind: str, cache_dir: Path | None, best: bool = True) -> bytes:
    """DATA compressed by KIND ("gz": gzip level 9 with no name or time in its header;
    "br": brotli quality 11 where ``best``, else 9), kept in CACHE_DIR by the digest of
    DATA (the runtime's files are the same build after build, and brotli at its best is
    slow: about 0.15 s for a build sheet, against a few milliseconds at quality 9 for a
    file a few per cent larger, or smaller)."""
    quality = 11 if best else 9
    name = f"{hashlib.sha256(data).hexdigest()}.{kind}" + ("" if kind == "gz" or best else f"{quality}")
    key = cache_dir / "compressed" / name if cache_dir else None
    if key is not None and key.is_file():
        return key.read_bytes()
    if kind == "gz":
        import gzip

        out = gzip.compress(data, compresslevel=9, mtime=0)
    else:
        import brotli  # type: ignore[import-untyped,import-not-found,unused-ignore]

        out = bytes(brotli.compress(data, quality=quality))
    if key is not None:
        key.parent.mkdir(parents=True, exist_ok=True)
        key.with_suffix(".part").write_bytes(out)
        key.with_suffix(".part").replace(key)
    return out


def brotli_available() -> bool:
    try:
        import brotli  # type: ignore[import-untyped,import-not-found,unused-ignore]  # noqa: F401
    except ImportError:
        return False
    return True


def write_compressed(site_dir: Path, cache_dir: Path | None = None, min_size: int = 1024) -> dict[str, int]:
    """Write FILE.gz (and FILE.br where the brotli package is installed) beside every
    compressible file of at least MIN_SIZE bytes, where it is smaller; reproducible.
    Returns the count and the bytes before and after."""
    use_br = brotli_available()
    totals = {"files": 0, "bytes": 0, "gzip": 0, "brotli": 0}
    for p in sorted(site_dir.rglob("*")):
        if not p.is_file() or p.suffix not in COMPRESSIBLE or p.stat().st_size < min_size:
            continue
        data = p.read_bytes()
        gz = _compressed(data, "gz", cache_dir)
        if len(gz) >= len(data):
            continue
        totals["files"] += 1
        totals["bytes"] += len(data)
        p.with_name(p.name + ".gz").write_bytes(gz)
        totals["gzip"] += len(gz)
        if use_br:
            # the runtime and the theme's assets are the same build after build (cached at the best
            # quality once); pages, sheets and the search index change with every edit
            fixed = p.relative_to(site_dir).parts[0] in ("engine", "assets")
            br = _compressed(data, "br", cache_dir, best=fixed)
            p.with_name(p.name + ".br").write_bytes(br)
            totals["brotli"] += len(br)
    return totals


# --- the standard library trimmed to what the engine uses (found by measurement) -------------


def _wheel_modules(wheel: Path) -> list[str]:
    with zipfile.ZipFile(wheel) as z:
        names = [n for n in z.namelist() if n.startswith("lampcalc/") and n.endswith((".py", ".pyc"))]
    return sorted({n.removesuffix("c")[:-3].replace("/", ".").removesuffix(".__init__") for n in names})


@functools.lru_cache(maxsize=4096)
def design_shape(text: str) -> str:
    """A design file's shape: every key path it sets with the type of its value
    (the code paths a review takes follow the tables and keys a file uses and the
    form its values take, not the numbers). Two files of one shape exercise the
    same modules; a file that does not parse is its own shape."""
    try:
        doc = tomllib.loads(text)
    except (tomllib.TOMLDecodeError, UnicodeError):
        return "unparsed:" + hashlib.sha256(text.encode("utf-8", "replace")).hexdigest()[:16]
    paths: list[str] = []

    def walk(node: object, at: str) -> None:
        if isinstance(node, dict):
            for k, v in node.items():
                walk(v, f"{at}.{k}" if at else str(k))
        elif isinstance(node, list):
            paths.append(f"{at}:list")
            for v in node:
                walk(v, at + "[]")
        else:
            paths.append(f"{at}:{type(node).__name__}")

    walk(doc, "")
    # the choices that pick a different model or rule set, by value
    for table, key in (("bridge", "model"), ("dropper", "class"), ("emissions", "class"), ("supply", "kind")):
        v = doc.get(table, {}).get(key) if isinstance(doc.get(table), dict) else None
        if v is not None:
            paths.append(f"{table}.{key}={v}")
    return hashlib.sha256("\n".join(sorted(set(paths))).encode()).hexdigest()[:16]


def exercise(wheel: Path, designs: list[Path], texts: bool = True) -> dict[str, Any]:
    """What the measuring run does besides starting the engine: import every module of
    the core, describe, compute every calculator with its defaults and with a bad value
    in each field, answer bad requests, and check, study and sheet the starter design
    (any page may open a design file) and one design of each shape among DESIGNS (the
    first by file name: a handbook of hundreds of variants of a few designs is measured
    on those few). With ``texts`` false the designs are named by their shapes: the key
    of the measurement, which editing a design's numbers leaves alone."""
    from lampcalc.calculators import CALCULATORS

    from .scaffold import DESIGN

    requests: list[dict[str, Any]] = [{"kind": "describe"}, {"kind": "no such kind"}]
    for name, calc in CALCULATORS.items():
        requests.append({"kind": "compute", "calculator": name, "inputs": {}})
        for p in calc.params:
            requests.append({"kind": "compute", "calculator": name, "inputs": {p.name: "1e999 zz"}})
    shapes: dict[str, str] = {}
    for toml in [DESIGN, *(d.read_text(encoding="utf-8") for d in sorted(designs))]:
        shapes.setdefault(design_shape(toml), toml)
    for shape, toml in shapes.items():
        doc = toml if texts else "shape:" + shape
        requests.append({"kind": "check", "toml": doc, "waveforms": True})
        requests.append({"kind": "study", "toml": doc, "samples": 8, "seed": 1})
        requests.append({"kind": "sheet", "toml": doc})
    requests.append({"kind": "check", "toml": "[not toml"})
    return {"modules": _wheel_modules(wheel), "requests": requests}


def stdlib_usage(engine_dir: Path, cache_dir: Path, designs: list[Path]) -> list[str]:
    """The zip entries of ENGINE_DIR's standard library that the started engine loads
    while it imports every module of the core and answers every kind of request
    (measured with Pyodide on Node, cached by the digest of everything it depends on)."""
    script = Path(__file__).resolve().parent / "assets" / "stdlib_usage.mjs"
    wheel = next(engine_dir.glob("lampcalc-*.whl"))
    ex = json.dumps(exercise(wheel, designs), sort_keys=True)
    shapes = json.dumps(exercise(wheel, designs, texts=False), sort_keys=True)
    parts = [sha256(engine_dir / f) for f in ("python_stdlib.zip", "pyodide.asm.wasm", "pyodide-lock.json")]
    parts += [sha256(wheel), sha256(script), hashlib.sha256(shapes.encode()).hexdigest()]
    key = hashlib.sha256("".join(parts).encode()).hexdigest()[:20]
    out = cache_dir / f"stdlib-usage-{key}.json"
    if not out.is_file():
        node = shutil.which("node")
        if node is None:
            raise BundleError("node is needed to measure the standard library (set trim_stdlib: false)")
        cache_dir.mkdir(parents=True, exist_ok=True)
        with tempfile.TemporaryDirectory(prefix="lampbook-usage-") as tmp:
            ex_file = Path(tmp) / "exercise.json"
            ex_file.write_text(ex, encoding="utf-8")
            res = Path(tmp) / "usage.json"
            proc = subprocess.run(
                [node, str(script), str(engine_dir), str(ex_file), str(res)],
                capture_output=True,
                text=True,
                timeout=600,
            )
            if proc.returncode != 0 or not res.is_file():
                raise BundleError("measuring the standard library failed: " + (proc.stderr or proc.stdout)[-800:])
            shutil.copyfile(res, out)
    used: list[str] = json.loads(out.read_text(encoding="utf-8"))["used"]
    if "encodings/__init__.pyc" not in used and "encodings/__init__.py" not in used:
        raise BundleError("the standard library measurement looks wrong (encodings not loaded)")
    return used


def trim_stdlib(src: Path, dest: Path, used: list[str], keep: list[str]) -> dict[str, int]:
    """Write DEST: the entries of the zip SRC that were USED, and every module or package
    named in KEEP (dotted names, from the plugin's ``stdlib_modules``)."""
    wanted = set(used)
    with zipfile.ZipFile(src) as z:
        infos = sorted(z.infolist(), key=lambda i: i.filename)
        names = {i.filename for i in infos}
        for mod in keep:
            path = mod.strip().replace(".", "/")
            hits = {n for n in names if n.startswith(path + "/") or n in (path + ".py", path + ".pyc")}
            if not mod.strip() or not hits:
                raise BundleError(
                    f"stdlib_modules: {mod!r} is not a module of Pyodide's standard library "
                    "(expected a dotted module or package name such as 'statistics' or 'email.mime')"
                )
            wanted |= hits
            # the packages above a kept module
            parts = path.split("/")
            for i in range(1, len(parts)):
                wanted |= {
                    n
                    for n in names
                    if n in ("/".join(parts[:i]) + "/__init__.py", "/".join(parts[:i]) + "/__init__.pyc")
                }
        # a frozen module (the import system itself) names a source file the zip need not hold
        wanted = {n if n in names or n + "c" not in names else n + "c" for n in wanted} & names
        tmp = dest.with_suffix(".tmp")
        with zipfile.ZipFile(tmp, "w", zipfile.ZIP_DEFLATED) as out:
            for info in infos:
                if info.filename in wanted:
                    zi = zipfile.ZipInfo(info.filename, _EPOCH)
                    zi.compress_type = zipfile.ZIP_DEFLATED
                    out.writestr(zi, z.read(info), compresslevel=9)  # sent as it is
    tmp.replace(dest)
    return {"files": len(wanted), "of": len(names), "bytes": dest.stat().st_size, "before": src.stat().st_size}


def trim_engine_stdlib(site_dir: Path, cache_dir: Path, keep: list[str], designs: list[Path]) -> dict[str, int]:
    """Replace SITE/engine/python_stdlib.zip by the part the engine was measured to use."""
    eng = site_dir / "engine"
    used = stdlib_usage(eng, cache_dir, designs)
    full = eng / "python_stdlib.zip"
    with tempfile.TemporaryDirectory(prefix="lampbook-trim-") as tmp:
        whole = Path(tmp) / "python_stdlib.zip"
        shutil.copyfile(full, whole)
        return trim_stdlib(whole, full, used, keep)
