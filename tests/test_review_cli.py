"""The review on the command line: a design that parses is always answered
(exit 1 when a check fails, never a refusal); contradictory input gets one
clear message naming the field (exit 2). Native only (it runs the CLI)."""

from __future__ import annotations

import subprocess
import sys
from pathlib import Path

HERE = Path(__file__).resolve().parent / "designs"
ROOT = Path(__file__).resolve().parent.parent


def test_cli_exit_codes_for_no_light_and_bad_steps() -> None:
    # a design that parses is answered (exit 1 when a check fails); contradictory input is refused (exit 2)
    def run(name: str) -> subprocess.CompletedProcess[str]:
        return subprocess.run(
            [sys.executable, "-m", "lampbook.cli", "check", str(HERE / f"{name}.toml"), "--json"],
            capture_output=True,
            text=True,
            cwd=ROOT,
            timeout=300,
        )

    for name in ("knee-above-low-mains", "all-dark"):
        dark = run(name)
        assert dark.returncode == 1, dark.stderr
        assert "Traceback" not in dark.stderr
    bad = run("steps-disagree")
    assert bad.returncode == 2
    assert "dropper.capacitance" in bad.stderr and "4.7 µF" in bad.stderr and "Traceback" not in bad.stderr
