"""Helpers to build small real handbook sites in temporary folders and serve them."""

from __future__ import annotations

import functools
import http.server
import os
import subprocess
import sys
import threading
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
RUNTIME = ROOT / "node_modules" / "pyodide"
CACHE = ROOT / ".cache" / "lampbook"


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
