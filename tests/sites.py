"""Helpers to build small real handbook sites in temporary folders and serve them."""

from __future__ import annotations

import functools
import http.server
import os
import shutil
import subprocess
import sys
import threading
from collections.abc import Iterator
from contextlib import contextmanager
from pathlib import Path
from typing import Any

ROOT = Path(__file__).resolve().parent.parent
RUNTIME = ROOT / "node_modules" / "pyodide"
CACHE = ROOT / ".cache" / "lampbook"

# Debian's Chromium, never a downloaded browser; a fresh headless profile that calls nowhere by itself
CHROMIUM = "/usr/bin/chromium"
ARGS = [
    "--no-sandbox",
    "--disable-gpu",
    "--disable-quic",
    "--no-first-run",
    "--disable-background-networking",
    "--disable-component-update",
    "--disable-sync",
]


def launch(playwright: Any, *extra_args: str) -> Any:
    """Debian's Chromium with the project's arguments (and EXTRA_ARGS after them)."""
    return playwright.chromium.launch(executable_path=CHROMIUM, args=[*ARGS, *extra_args])


def write_site(folder: Path, pages: dict[str, str], engine: bool = True, extra: str = "") -> Path:
    docs = folder / "docs"
    for name, text in pages.items():
        p = docs / name
        p.parent.mkdir(parents=True, exist_ok=True)
        p.write_text(text, encoding="utf-8")
    (folder / "mkdocs.yml").write_text(
        "site_name: Test shop\n"
        "theme:\n  name: material\n  font: false\n"
        "plugins:\n  - search\n  - lampbook:\n"
        f"      engine: {'true' if engine else 'false'}\n"
        f"      runtime: {RUNTIME}\n"
        f"      cache_dir: {CACHE}\n" + extra,
        encoding="utf-8",
    )
    return folder


def write_demo(folder: Path, options: str = "") -> Path:
    """The demo handbook (docs/ and mkdocs.yml) copied into FOLDER, its plugin pointed at the local runtime
    and cache, with extra plugin OPTIONS (YAML lines) after them."""
    shutil.copytree(ROOT / "docs", folder / "docs")
    y = (
        (ROOT / "mkdocs.yml")
        .read_text()
        .replace(
            "  - lampbook:\n",
            f"  - lampbook:\n      runtime: {RUNTIME}\n      cache_dir: {CACHE}\n" + options,
        )
    )
    (folder / "mkdocs.yml").write_text(y)
    return folder


def write_scaffold(folder: Path) -> Path:
    """A handbook made by `lampbook new` in FOLDER, given the Pyodide package and the cache of this repository."""
    r = subprocess.run(
        [sys.executable, "-m", "lampbook.cli", "new", str(folder), "--name", "Bench book"],
        capture_output=True,
        text=True,
    )
    assert r.returncode == 0, r.stderr
    # what `npm install pyodide@VERSION` would put there: the same package this repository pins
    (folder / "node_modules").mkdir()
    (folder / "node_modules" / "pyodide").symlink_to(RUNTIME)
    y = (folder / "mkdocs.yml").read_text()
    assert "      designs: designs\n" in y
    (folder / "mkdocs.yml").write_text(
        y.replace("      designs: designs\n", f"      designs: designs\n      cache_dir: {CACHE}\n")
    )
    return folder


def build(folder: Path, strict: bool = True) -> subprocess.CompletedProcess[str]:
    args = [sys.executable, "-m", "mkdocs", "build", "-q"] + (["--strict"] if strict else [])
    env = {**os.environ, "NO_MKDOCS_2_WARNING": "1"}
    return subprocess.run(args, cwd=folder, capture_output=True, text=True, timeout=600, env=env)


class _Quiet(http.server.SimpleHTTPRequestHandler):
    extensions_map = {
        **http.server.SimpleHTTPRequestHandler.extensions_map,
        ".wasm": "application/wasm",
        ".mjs": "text/javascript",
        ".webmanifest": "application/manifest+json",
    }

    def log_message(self, *args: object) -> None:
        pass


class Server:
    """A static server on 127.0.0.1 (free port), in a thread."""

    def __init__(self, directory: Path) -> None:
        handler = functools.partial(_Quiet, directory=str(directory))
        self.httpd = http.server.ThreadingHTTPServer(("127.0.0.1", 0), handler)
        self.port = self.httpd.server_address[1]
        self.thread = threading.Thread(target=self.httpd.serve_forever, daemon=True)
        self.thread.start()

    @property
    def url(self) -> str:
        return f"http://127.0.0.1:{self.port}/"

    def close(self) -> None:
        self.httpd.shutdown()
        self.httpd.server_close()


@contextmanager
def built_and_served(folder: Path) -> Iterator[Server]:
    """Build the site in FOLDER (strict; its errors shown if it fails) and serve FOLDER/site until the end."""
    r = build(folder)
    assert r.returncode == 0, r.stderr
    srv = Server(folder / "site")
    try:
        yield srv
    finally:
        srv.close()
