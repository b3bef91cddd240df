"""Plugin tier: what the engine ships (a measured standard library, a byte-compiled
core, precache choices, compressed siblings) on real `mkdocs build` runs."""

from __future__ import annotations

import ast
import base64
import gzip
import hashlib
import json
import re
import sys
import zipfile
from pathlib import Path

import pytest
from sites import CACHE, ROOT, RUNTIME, build, write_site

from lampbook import bundle

pytestmark = pytest.mark.plugin

PAGE = "# Bench\n\n```lampbook\ncalculator: dropper\n```\n"


@pytest.fixture(scope="module")
def site(tmp_path_factory: pytest.TempPathFactory) -> Path:
    folder = write_site(tmp_path_factory.mktemp("engine"), {"index.md": PAGE})
    r = build(folder)
    assert r.returncode == 0, r.stderr
    return folder / "site"


def precache(site: Path) -> dict[str, object]:
    m = re.search(r"const PRECACHE = (\{.*?\});", (site / "sw.js").read_text())
    assert m
    out: dict[str, object] = json.loads(m.group(1))
    return out


def core_stdlib_imports() -> set[str]:
    """Every standard-library module the core's source imports (read from its import statements)."""
    out = set()
    for p in (ROOT / "calc" / "lampcalc").rglob("*.py"):
        for node in ast.walk(ast.parse(p.read_text(encoding="utf-8"))):
            names = []
            if isinstance(node, ast.Import):
                names = [a.name for a in node.names]
            elif isinstance(node, ast.ImportFrom) and node.level == 0 and node.module:
                names = [node.module]
            out |= {n for n in names if n.partition(".")[0] in sys.stdlib_module_names and n != "__future__"}
    return out


def test_trimmed_library_holds_what_the_core_imports_and_little_else(site: Path) -> None:
    names = set(zipfile.ZipFile(site / "engine" / "python_stdlib.zip").namelist())
    full = set(zipfile.ZipFile(bundle.compiled_stdlib(RUNTIME, CACHE)).namelist())
    assert names < full
    wanted = core_stdlib_imports()
    assert {"tomllib", "random", "dataclasses", "json"} <= wanted  # the reader sees what is checked
    in_zip = 0
    for mod in wanted:
        path = mod.replace(".", "/")
        files = {f"{path}.pyc", f"{path}/__init__.pyc"} & full
        if files:  # else built into the interpreter (math, itertools)
            in_zip += 1
            assert files & names, mod
    assert in_zip >= 6
    # nothing the engine never loads: test and mail machinery, databases, a web server
    for absent in ("unittest/__init__.pyc", "email/mime/text.pyc", "sqlite3/__init__.pyc", "http/server.pyc"):
        assert absent in full and absent not in names, absent
    assert len(names) < len(full) / 3


def test_engine_wheel_carries_compiled_core(site: Path) -> None:
    eng = site / "engine"
    lock = json.loads((eng / "pyodide-lock.json").read_text())["packages"]["lampcalc"]
    wheel = eng / lock["file_name"]
    assert hashlib.sha256(wheel.read_bytes()).hexdigest() == lock["sha256"]
    with zipfile.ZipFile(wheel) as z:
        names = set(z.namelist())
        # every module of the core, compiled, and no source (the page never shows it)
        core = ROOT / "calc"
        sources = {p.relative_to(core).as_posix() for p in (core / "lampcalc").rglob("*.py")}
        assert len(sources) > 30 and {s + "c" for s in sources} <= names
        assert not {n for n in names if n.endswith(".py")}
        # a pyc header (magic number ending in CR LF) flagged hash-based and unchecked (PEP 552)
        head = z.read("lampcalc/api.pyc")[:8]
        assert head[2:4] == b"\r\n" and int.from_bytes(head[4:8], "little") == 0b01
        record = z.read(next(n for n in names if n.endswith("dist-info/RECORD"))).decode()
        for line in record.splitlines():
            arc, digest, size = line.split(",")
            if digest:
                data = z.read(arc)
                assert len(data) == int(size), arc
                want = digest.removeprefix("sha256=")
                assert base64.urlsafe_b64encode(hashlib.sha256(data).digest()).rstrip(b"=").decode() == want, arc
        assert {line.split(",")[0] for line in record.splitlines()} == names


def test_precache_leaves_out_search_languages_and_source_maps(site: Path) -> None:
    files = precache(site)["files"]
    assert isinstance(files, list)
    on_disk = {p.relative_to(site).as_posix() for p in site.rglob("*") if p.is_file()}
    assert "assets/javascripts/lunr/wordcut.js" in on_disk and "assets/javascripts/lunr/wordcut.js" not in files
    assert any(f.endswith(".map") for f in on_disk)
    assert not [f for f in files if f.endswith((".map", ".gz", ".br")) or f.startswith("assets/javascripts/lunr/")]
    # everything else is there: the site still works offline
    rest = {f for f in on_disk if not f.endswith((".map", ".gz", ".br")) and "/lunr/" not in f and f != "sw.js"}
    assert rest == set(files)


def test_service_worker_knows_the_engine_digests(site: Path) -> None:
    digests = precache(site)["digests"]
    assert isinstance(digests, dict)
    assert set(digests) == {f"engine/{p.name}" for p in (site / "engine").iterdir() if p.suffix not in (".gz", ".br")}
    for rel, want in digests.items():
        assert hashlib.sha256((site / rel).read_bytes()).hexdigest() == want, rel


def test_compressed_siblings_match_their_files(site: Path) -> None:
    wasm = site / "engine" / "pyodide.asm.wasm"
    gz = wasm.with_name(wasm.name + ".gz")
    assert gz.is_file() and gz.stat().st_size < wasm.stat().st_size / 2
    assert gzip.decompress(gz.read_bytes()) == wasm.read_bytes()
    page = site / "index.html"
    assert gzip.decompress(page.with_name("index.html.gz").read_bytes()) == page.read_bytes()
    # already compressed: no sibling
    assert not (site / "engine" / "python_stdlib.zip.gz").exists()


def test_options_keep_languages_maps_modules_and_skip_compression(tmp_path: Path) -> None:
    folder = write_site(
        tmp_path,
        {"index.md": PAGE},
        extra=(
            "      precache_search_languages: [de, ja]\n"
            "      precache_source_maps: true\n"
            "      stdlib_modules: [statistics, email.mime]\n"
            "      compress: false\n"
        ),
    )
    r = build(folder)
    assert r.returncode == 0, r.stderr
    s = folder / "site"
    files = precache(s)["files"]
    assert isinstance(files, list)
    lunr = {f.removeprefix("assets/javascripts/lunr/") for f in files if f.startswith("assets/javascripts/lunr/")}
    assert lunr == {
        "min/lunr.de.min.js",
        "min/lunr.ja.min.js",
        "tinyseg.js",
        "min/lunr.multi.min.js",
        "min/lunr.stemmer.support.min.js",
    }
    assert any(f.endswith(".map") for f in files)
    names = set(zipfile.ZipFile(s / "engine" / "python_stdlib.zip").namelist())
    assert {"statistics.pyc", "email/__init__.pyc", "email/mime/__init__.pyc", "email/mime/text.pyc"} <= names
    assert not [p for p in s.rglob("*.gz") if p.name != "sitemap.xml.gz"]  # MkDocs writes that one itself


def test_unknown_stdlib_module_fails_the_build_naming_it(tmp_path: Path) -> None:
    folder = write_site(tmp_path, {"index.md": PAGE}, extra="      stdlib_modules: [toaster]\n")
    r = build(folder)
    assert r.returncode != 0
    assert "stdlib_modules: 'toaster' is not a module of Pyodide's standard library" in r.stderr
    assert "Traceback" not in r.stderr


def test_untrimmed_library_on_request(tmp_path: Path) -> None:
    folder = write_site(tmp_path, {"index.md": PAGE}, extra="      trim_stdlib: false\n")
    r = build(folder)
    assert r.returncode == 0, r.stderr
    shipped = folder / "site" / "engine" / "python_stdlib.zip"
    assert shipped.read_bytes() == bundle.compiled_stdlib(RUNTIME, CACHE).read_bytes()


def test_search_bundles_per_language() -> None:
    # which files the theme's search worker loads per language (read from its worker script)
    assert bundle.search_bundles(["en"]) == set()
    assert bundle.search_bundles(["th"]) == {
        "assets/javascripts/lunr/wordcut.js",
        "assets/javascripts/lunr/min/lunr.th.min.js",
        "assets/javascripts/lunr/min/lunr.stemmer.support.min.js",
    }
