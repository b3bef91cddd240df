"""Package the in-page engine: the core as a pure wheel, the Pyodide runtime
copied from the npm package, a trimmed lock file listing only what the site
ships, and a service worker whose cache name is the hash of everything it
precaches."""

from __future__ import annotations

import base64
import hashlib
import importlib.metadata
import json
import os
import shutil
import subprocess
import sys
import tempfile
import zipfile
from pathlib import Path

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


def install_engine(site_dir: Path, runtime: Path, stdlib: Path | None = None) -> dict[str, str]:
    """Copy the runtime and the wheel into SITE/engine/, write the trimmed
    lock file; return the file digests. ``stdlib`` replaces the runtime's
    standard library zip (the byte-compiled one)."""
    eng = site_dir / "engine"
    eng.mkdir(parents=True, exist_ok=True)
    for f in RUNTIME_FILES:
        shutil.copyfile(stdlib if (stdlib and f == "python_stdlib.zip") else runtime / f, eng / f)
    wheel = build_wheel(eng)
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


def precache_list(site_dir: Path) -> list[str]:
    out = []
    for root, _, files in os.walk(site_dir):
        for f in files:
            p = Path(root) / f
            rel = p.relative_to(site_dir).as_posix()
            if rel == "sw.js" or rel.endswith((".map", ".gz")):
                continue
            out.append(rel)
    return sorted(out)


def write_service_worker(site_dir: Path, template: str) -> str:
    files = precache_list(site_dir)
    h = hashlib.sha256()
    for rel in files:
        h.update(rel.encode())
        h.update(hashlib.sha256((site_dir / rel).read_bytes()).digest())
    version = h.hexdigest()[:16]
    manifest = json.dumps({"version": version, "files": files}, sort_keys=True)
    (site_dir / "sw.js").write_text(template.replace("/*LAMPBOOK_PRECACHE*/null", manifest))
    return version
