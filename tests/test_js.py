"""The page helpers' unit tests, run under Node's own test runner."""

from __future__ import annotations

import shutil
import subprocess

from sites import ROOT


def test_page_helpers_under_node() -> None:
    node = shutil.which("node")
    assert node, "node is needed (the machine image has it)"
    files = sorted(str(p) for p in (ROOT / "tests" / "js").glob("*.test.mjs"))
    assert files
    r = subprocess.run([node, "--test", *files], capture_output=True, text=True, timeout=120, cwd=ROOT)
    assert r.returncode == 0, r.stdout[-3000:] + r.stderr[-2000:]
    assert "# fail 0" in r.stdout
