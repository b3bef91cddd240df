"""Pyodide tier: the core's unit and reference tests run again inside Pyodide
on Node (the same npm package the site ships), with the core imported from the
very wheel the site serves, in the engine the site ships: its trimmed standard
library, with the rest of the library behind it only for pytest, and a check
that the core itself imported nothing from that rest."""

from __future__ import annotations

import ast
import json
import os
import re
import shutil
import subprocess
import sys
from pathlib import Path

import pytest
from sites import CACHE, ROOT, RUNTIME

from lampbook import bundle

pytestmark = pytest.mark.pyodide

WHEELS = ROOT / ".cache" / "wheels"
# what a test file may import to count as a test of the core alone
_CORE_ONLY = {"lampcalc", "pytest", "hypothesis"}


def native_only(tree: ast.Module) -> bool:
    """A file whose module-level ``pytestmark`` names ``pytest.mark.native`` (alone or in a list) is kept
    out of this tier: a slow sweep of the core (the planner's grid) runs natively only, while a small test
    of the same code stays in a file this tier finds."""
    for node in tree.body:
        if isinstance(node, ast.Assign) and any(isinstance(t, ast.Name) and t.id == "pytestmark" for t in node.targets):
            marks = node.value.elts if isinstance(node.value, (ast.List, ast.Tuple)) else [node.value]
            if any(isinstance(m, ast.Attribute) and m.attr == "native" for m in marks):
                return True
    return False


def core_test_files() -> list[str]:
    """Every test file that tests the core alone: it imports lampcalc, and
    otherwise only the standard library, pytest and hypothesis. Found by reading the imports, so a
    new test file of the core runs here without being listed; a file marked ``native`` (see
    :func:`native_only`) is left out."""
    out = []
    for path in sorted((ROOT / "tests").glob("test_*.py")):
        tree = ast.parse(path.read_text(encoding="utf-8"))
        if native_only(tree):
            continue
        names = set()
        for node in ast.walk(tree):
            if isinstance(node, ast.Import):
                names |= {a.name.split(".")[0] for a in node.names}
            elif isinstance(node, ast.ImportFrom) and node.level == 0 and node.module:
                names.add(node.module.split(".")[0])
        if "lampcalc" in names and all(n in _CORE_ONLY or n in sys.stdlib_module_names for n in names):
            out.append(path.name)
    return out


def test_every_core_test_file_is_found() -> None:
    found = core_test_files()
    assert {"test_units.py", "test_reference.py", "test_core.py", "test_steady.py", "test_review.py"} <= set(found)
    assert "test_cli.py" not in found and "test_plugin.py" not in found
    # the planner: its small tests run in Pyodide, its grid (marked native) only natively
    assert "test_plan.py" in found and "test_plan_grid.py" not in found
    assert native_only(ast.parse((ROOT / "tests" / "test_plan_grid.py").read_text(encoding="utf-8")))
    assert not native_only(ast.parse((ROOT / "tests" / "test_plan.py").read_text(encoding="utf-8")))


@pytest.mark.parametrize("start", ["started", "restored"])
def test_core_suite_inside_the_trimmed_engine(tmp_path: Path, start: str) -> None:
    """Every core test in the engine the site ships, started as on a first visit (Python started, the
    core imported) and as on every later one (restored from the memory snapshot the first made)."""
    files = core_test_files()
    native = subprocess.run(
        [sys.executable, "-m", "pytest", "--collect-only", "-q", "-p", "no:cacheprovider", *files],
        cwd=ROOT / "tests",
        capture_output=True,
        text=True,
        timeout=300,
    )
    collected = re.search(r"(\d+) tests? collected", native.stdout)
    assert collected, native.stdout[-2000:]
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
            *(["--restored"] if start == "restored" else []),
            *files,
        ],
        capture_output=True,
        text=True,
        timeout=900,
        env={**os.environ, "LAMPBOOK_CORE_MODULES": json.dumps(bundle.exercise(wheel, [])["modules"])},
    )
    out = r.stdout + r.stderr
    assert "emscripten" in out, out[-3000:]
    if start == "restored":
        # a snapshot holds the whole memory of the started engine (tens of MB), the core in it
        m = re.search(r"restored from a snapshot of (\d+) bytes; lampcalc.api already imported: true", out)
        assert m and int(m.group(1)) > 8_000_000, out[-3000:]
    assert re.search(r"trimmed library: \d+ core modules imported, \d+ calculators answered", out), out[-3000:]
    assert "lampcalc from /lib/lampcalc-" in out, out[-3000:]  # the wheel itself, as the page imports it
    assert "core imports outside the trimmed library: []" in out, out[-3000:]
    m = re.search(r"(\d+) passed", out)
    assert r.returncode == 0 and m, out[-3000:]
    assert int(m.group(1)) == int(collected.group(1)), (
        "every test the core's files hold passes in Pyodide too\n" + out[-3000:]
    )
    assert "failed" not in out.splitlines()[-2], out[-3000:]


def test_same_test_tools_native_and_in_pyodide() -> None:
    def pins(path: Path) -> dict[str, str]:
        lines = [x.split("#")[0].strip() for x in path.read_text().splitlines()]
        return dict(x.split("==") for x in lines if "==" in x)

    native = pins(ROOT / "requirements-dev.txt")
    inside = pins(ROOT / "tests" / "pyodide" / "requirements.txt")
    assert inside == {k: native[k] for k in inside}
