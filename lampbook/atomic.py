"""Files written whole or not at all: a temporary file in the same folder,
flushed to disk, then renamed over the target (a rename within one folder is
atomic), so a reader never sees half a page and a failed write leaves the old
file as it was."""

from __future__ import annotations

import contextlib
import os
import stat
import tempfile


def write_atomic(path: str | os.PathLike[str], text: str) -> None:
    """Write ``text`` (UTF-8) to ``path`` through a temporary file and a rename.
    Raises OSError as ``open`` would; the target is then untouched."""
    target = os.path.abspath(os.fspath(path))
    folder, name = os.path.split(target)
    try:
        mode = stat.S_IMODE(os.stat(target).st_mode)
    except FileNotFoundError:
        umask = os.umask(0)
        os.umask(umask)
        mode = 0o666 & ~umask
    fd, tmp = tempfile.mkstemp(prefix=f".{name}.", suffix=".tmp", dir=folder)
    try:
        with os.fdopen(fd, "w", encoding="utf-8", newline="") as fh:
            fh.write(text)
            fh.flush()
            os.fsync(fh.fileno())
        os.chmod(tmp, mode)
        os.replace(tmp, target)
    except BaseException:
        with contextlib.suppress(OSError):
            os.unlink(tmp)
        raise
