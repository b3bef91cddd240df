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


def test_command_names_each_failing_check_and_why(tmp_path: Path) -> None:
    """One module on 230 V: the planner cannot hold flicker within the review's
    limits (the bus capacitor's ESR, not its capacitance, sets the ripple on so
    short a string), so it writes nothing, exits 1 and prints the failing
    check with the review's own message."""
    spec = tmp_path / "spec.toml"
    spec.write_text(spec_text(MODULES["single-die 60 mA"], MAINS["230-50"], 1, "dropper"), encoding="utf-8")
    out = tmp_path / "fixture.toml"
    r = subprocess.run(
        [sys.executable, "-m", "lampbook.cli", "plan", str(spec), "-o", str(out)], capture_output=True, text=True
    )
    assert r.returncode == 1, r.stdout + r.stderr
    assert "Failed in the review" in r.stdout and "flicker.ieee1789: percent flicker" in r.stdout, r.stdout
    assert "No design:" in r.stdout and not out.exists()
    r = subprocess.run(
        [sys.executable, "-m", "lampbook.cli", "plan", str(spec), "--json"], capture_output=True, text=True
    )
    body = json.loads(r.stdout)
    assert not body["ok"] and "design" not in body
    why = body["proposals"][0]["failed_why"]
    assert set(why) == set(body["proposals"][0]["failed"]) and all(why.values())
