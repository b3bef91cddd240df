"""Pyodide tier: the core's unit and reference tests run again inside Pyodide
on Node (the same npm package the site ships), with the core imported from the
very wheel the site serves, in the engine the site ships: its trimmed standard
library, with the rest of the library behind it only for pytest, and a check
that the core itself imported nothing from that rest."""

from __future__ import annotations

import json
import os
import re
import shutil
import subprocess
from pathlib import Path

import pytest
from sites import CACHE, ROOT, RUNTIME

from lampbook import bundle

pytestmark = pytest.mark.pyodide

WHEELS = ROOT / ".cache" / "wheels"
FILES = ["test_units.py", "test_reference.py", "test_core.py", "test_steady.py"]


def test_core_suite_inside_the_trimmed_engine(tmp_path: Path) -> None:
    node = shutil.which("node")
    assert node, "node is needed (the machine image has it)"
    assert any(WHEELS.glob("pytest-*.whl")), "pytest wheels missing: `make test` downloads them"
    # the engine as the plugin builds it for a site without design files
    full = bundle.compiled_stdlib(RUNTIME, CACHE)
    bundle.install_engine(tmp_path, RUNTIME, full, CACHE)
    trim = bundle.trim_engine_stdlib(tmp_path, CACHE, [], [])
    assert trim["files"] < trim["of"] / 2, trim
    wheel = next((tmp_path / "engine").glob("lampcalc-*.whl"))
    r = subprocess.run(
        [
            node,
            str(ROOT / "tests" / "pyodide" / "run.mjs"),
            str(RUNTIME),
            str(WHEELS),
            str(wheel),
            str(ROOT / "tests"),
            "--engine",
            str(tmp_path / "engine"),
            str(full),
            *FILES,
        ],
        capture_output=True,
        text=True,
        timeout=900,
        env={**os.environ, "LAMPBOOK_CORE_MODULES": json.dumps(bundle.exercise(wheel, [])["modules"])},
    )
    out = r.stdout + r.stderr
    assert "emscripten" in out, out[-3000:]
    assert re.search(r"trimmed library: \d+ core modules imported, \d+ calculators answered", out), out[-3000:]
    assert "lampcalc from /lib/lampcalc-" in out, out[-3000:]  # the wheel itself, as the page imports it
    assert "core imports outside the trimmed library: []" in out, out[-3000:]
    m = re.search(r"(\d+) passed", out)
    assert r.returncode == 0 and m and int(m.group(1)) > 100, out[-3000:]
    assert "failed" not in out.splitlines()[-2], out[-3000:]
