"""`lampbook plan` on the command line: it writes a design that `check`
passes, never overwrites its own spec, and refuses bad input in one line."""

from __future__ import annotations

import json
import subprocess
import sys
from pathlib import Path

from test_plan import MAINS, MODULES, spec_text


def test_command_writes_a_design_that_checks(tmp_path: Path) -> None:
    spec = tmp_path / "spec.toml"
    spec.write_text(spec_text(MODULES["single-die 60 mA"], MAINS["120-60"], 24, "dropper"), encoding="utf-8")
    out = tmp_path / "fixture.toml"
    cli = [sys.executable, "-m", "lampbook.cli"]
    r = subprocess.run([*cli, "plan", str(spec), "-o", str(out)], capture_output=True, text=True)
    assert r.returncode == 0, r.stderr
    assert "passed the whole review" in r.stdout and "CAUTION" not in r.stderr
    r = subprocess.run([*cli, "check", str(out)], capture_output=True, text=True)
    assert r.returncode == 0, r.stdout[-2000:]
    r = subprocess.run([*cli, "plan", str(spec), "--json"], capture_output=True, text=True)
    body = json.loads(r.stdout)
    assert body["ok"] and body["design"] == out.read_text(encoding="utf-8")
    assert body["cautions"]


def test_command_refuses_to_overwrite_the_spec(tmp_path: Path) -> None:
    spec = tmp_path / "spec.toml"
    spec.write_text(spec_text(MODULES["single-die 60 mA"], MAINS["230-50"], 24, "dropper"), encoding="utf-8")
    before = spec.read_text(encoding="utf-8")
    r = subprocess.run(
        [sys.executable, "-m", "lampbook.cli", "plan", str(spec), "-o", str(spec)], capture_output=True, text=True
    )
    assert r.returncode == 2 and "spec itself" in r.stderr
    assert spec.read_text(encoding="utf-8") == before


def test_command_bad_input_one_line_exit_2(tmp_path: Path) -> None:
    spec = tmp_path / "spec.toml"
    spec.write_text(
        'modules = "many"\nsupply = "cv"\n[module]\ncurrent_max = "60 mA"\nv0 = "2.7 V"\nr_dynamic = "2 Ω"\n'
    )
    r = subprocess.run([sys.executable, "-m", "lampbook.cli", "plan", str(spec)], capture_output=True, text=True)
    assert r.returncode == 2
    assert "modules" in r.stderr and "Traceback" not in r.stderr
    assert len(r.stderr.strip().splitlines()) == 1
