"""Pyodide tier: the core's unit and reference tests run again inside Pyodide
on Node (the same npm package the site ships), with the core installed from
the very wheel the site serves and pytest from its pure wheels."""

from __future__ import annotations

import re
import shutil
import subprocess
from pathlib import Path

import pytest
from sites import ROOT

from lampbook.bundle import build_wheel

pytestmark = pytest.mark.pyodide

WHEELS = ROOT / ".cache" / "wheels"
FILES = ["test_units.py", "test_reference.py", "test_core.py", "test_steady.py"]


def test_core_suite_inside_pyodide(tmp_path: Path) -> None:
    node = shutil.which("node")
    assert node, "node is needed (the machine image has it)"
    assert any(WHEELS.glob("pytest-*.whl")), "pytest wheels missing: `make test` downloads them"
    wheel = build_wheel(tmp_path)
    r = subprocess.run(
        [
            node,
            str(ROOT / "tests" / "pyodide" / "run.mjs"),
            str(ROOT / "node_modules" / "pyodide"),
            str(WHEELS),
            str(wheel),
            str(ROOT / "tests"),
            *FILES,
        ],
        capture_output=True,
        text=True,
        timeout=900,
    )
    out = r.stdout + r.stderr
    assert "emscripten" in out, out[-3000:]
    m = re.search(r"(\d+) passed", out)
    assert r.returncode == 0 and m and int(m.group(1)) > 100, out[-3000:]
    assert "failed" not in out.splitlines()[-1], out[-3000:]
