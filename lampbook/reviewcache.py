"""A review cache on disk: one file per reviewed design, keyed by content.

The key is a digest of everything that decides a review's outcome: the design
text, the core's version and the bytes of its source files, the lampbook code
that shapes a cached entry, the Python version and the review options. Any
change to one of them gives another key, so an entry is never served stale;
old entries are simply never read again. Entries are written to a temporary
file and renamed into place, so a reader sees a whole entry or none, and the
folder is safe to delete at any time.
"""

from __future__ import annotations

import functools
import hashlib
import json
import os
import sys
import tempfile
from collections.abc import Mapping
from pathlib import Path
from typing import Any

FORMAT = 1
"""Bumped when the layout of an entry changes."""


def _tree_digest(folder: Path) -> str:
    h = hashlib.sha256()
    for p in sorted(folder.rglob("*.py")):
        if "__pycache__" in p.parts:
            continue
        h.update(p.relative_to(folder).as_posix().encode() + b"\0")
        h.update(hashlib.sha256(p.read_bytes()).digest())
    return h.hexdigest()


@functools.cache
def core_fingerprint() -> str:
    """The core's version and a digest of its source files (and of the lampbook code that shapes an entry)."""
    import lampcalc

    here = Path(__file__).resolve().parent
    h = hashlib.sha256()
    h.update(f"lampcalc {lampcalc.__version__}\0".encode())
    h.update(_tree_digest(Path(lampcalc.__file__).resolve().parent).encode())
    for name in ("catalogue.py", "reviewcache.py"):
        h.update(hashlib.sha256((here / name).read_bytes()).digest())
    h.update(f"python {sys.version_info[0]}.{sys.version_info[1]} {sys.implementation.name}".encode())
    return h.hexdigest()


def review_key(text: str, options: Mapping[str, Any], core: str | None = None) -> str:
    """The cache key of one design's review."""
    material = {
        "format": FORMAT,
        "core": core if core is not None else core_fingerprint(),
        "options": dict(options),
        "design": hashlib.sha256(text.encode("utf-8")).hexdigest(),
    }
    return hashlib.sha256(json.dumps(material, sort_keys=True).encode()).hexdigest()


class ReviewCache:
    """Entries under ``folder``: ``<key[:2]>/<key>.json`` holding ``{"key": ..., "entry": {...}}``."""

    def __init__(self, folder: Path) -> None:
        self.folder = Path(folder)

    def _path(self, key: str) -> Path:
        return self.folder / key[:2] / f"{key}.json"

    def get(self, key: str) -> dict[str, Any] | None:
        """The entry stored under ``key``, or None (missing, unreadable, or not what it claims to be)."""
        try:
            with open(self._path(key), encoding="utf-8") as fh:
                data = json.load(fh)
        except (OSError, ValueError):
            return None
        if not isinstance(data, dict) or data.get("key") != key or not isinstance(data.get("entry"), dict):
            return None
        entry: dict[str, Any] = data["entry"]
        return entry

    def put(self, key: str, entry: Mapping[str, Any]) -> None:
        """Store an entry atomically: a temporary file in the same folder, renamed into place."""
        path = self._path(key)
        path.parent.mkdir(parents=True, exist_ok=True)
        fd, tmp = tempfile.mkstemp(dir=path.parent, prefix=".tmp-", suffix=".json")
        try:
            with os.fdopen(fd, "w", encoding="utf-8") as fh:
                json.dump({"key": key, "entry": dict(entry)}, fh, sort_keys=True, ensure_ascii=False)
            os.replace(tmp, path)
        except BaseException:
            try:
                os.unlink(tmp)
            except OSError:
                pass
            raise
