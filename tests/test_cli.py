"""The command line, run as a user would run it."""

from __future__ import annotations

import json
import os
import subprocess
import sys

import pytest

ROOT = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))
DESIGNS = os.path.join(ROOT, "docs", "designs")


def lampbook(*args: str) -> subprocess.CompletedProcess[str]:
    return subprocess.run(
        [sys.executable, "-m", "lampbook.cli", *args], capture_output=True, text=True, cwd=ROOT, timeout=120
    )


@pytest.mark.parametrize("name", ["dropper", "string", "ripple", "wire", "module", "preferred", "mains"])
def test_every_calculator_prints_a_table_and_json(name: str) -> None:
    r = lampbook(name)
    assert r.returncode == 0, r.stderr
    j = lampbook(name, "--json")
    assert j.returncode == 0
    data = json.loads(j.stdout)
    assert data["ok"] and data["calculator"] == name


def test_dropper_answer_X12_and_cautions() -> None:
    # 120 V 60 Hz, 2.2 uF, 90 V string: 42.08 mA (references.md X12, arithmetic)
    r = lampbook(
        "dropper",
        "--region",
        "120-60",
        "--capacitance",
        "2.2 uF",
        "--bus-voltage",
        "90 V",
        "--diode-drop",
        "0 V",
        "--json",
    )
    data = json.loads(r.stdout)
    assert data["values"]["led_current_avg"] == pytest.approx(0.04208, rel=1e-3)
    t = lampbook("dropper", "--region", "120-60")
    assert "CAUTION" in t.stdout and "Local codes" in t.stdout


def test_wire_answer_VD3() -> None:
    r = lampbook(
        "wire",
        "--size",
        "18 AWG",
        "--length",
        "5 m",
        "--current",
        "2 A",
        "--supply-voltage",
        "12 V",
        "--json",
    )
    assert json.loads(r.stdout)["values"]["drop"] == pytest.approx(0.419, rel=1e-3)


def test_ripple_answer_RP4() -> None:
    r = lampbook("ripple", "--load-current", "20 mA", "--capacitance", "100 uF", "--frequency", "60 Hz", "--json")
    assert json.loads(r.stdout)["values"]["ripple_pp"] == pytest.approx(1.667, rel=1e-3)


def test_string_answer_L5() -> None:
    r = lampbook(
        "string",
        "--supply",
        "cv",
        "--supply-voltage",
        "12 V",
        "--supply-tolerance",
        "0 %",
        "--v0",
        "3 V",
        "--r-dynamic",
        "0 Ω",
        "--current",
        "20 mA",
        "--series",
        "3",
        "--json",
    )
    assert json.loads(r.stdout)["values"]["ballast_exact"] == pytest.approx(150.0)


@pytest.mark.parametrize(
    ("args", "needle"),
    [
        (["dropper", "--capacitance", "2.2"], "--capacitance: got '2.2'; expected a capacitance"),
        (["wire", "--size", "banana"], "--size: got 'banana'"),
        (["ripple", "--rectifier", "quarter"], "--rectifier: got 'quarter'; expected one of full, half"),
        (["dropper", "--bogus", "1"], "unrecognized arguments"),
        (["check", "/nonexistent.toml"], "cannot read"),
    ],
)
def test_bad_input_one_line_exit_2(args: list[str], needle: str) -> None:
    r = lampbook(*args)
    assert r.returncode == 2
    assert needle in r.stderr
    assert "Traceback" not in r.stderr
    assert len(r.stderr.strip().splitlines()) == 1


def test_help_shows_units_and_defaults() -> None:
    r = lampbook("dropper", "--help")
    assert r.returncode == 0
    assert "Default: 1 µF" in r.stdout and "such as '22 µF'" in r.stdout


def test_check_json_shape() -> None:
    r = lampbook("check", os.path.join(DESIGNS, "panel-230.toml"), "--json")
    assert r.returncode in (0, 1), r.stderr
    data = json.loads(r.stdout)
    keys = {
        "led_current_avg_A",
        "led_current_max_A",
        "string_current_avg_A",
        "bus_voltage_avg_V",
        "ripple_pp_V",
        "percent_flicker",
        "flicker_index",
        "dropper_current_rms_A",
        "smoothing_ripple_current_rms_A",
        "input_power_W",
        "apparent_power_VA",
        "power_factor",
        "led_power_W",
    }
    for corner in ("nominal", "low", "high"):
        assert keys <= set(data[corner])
    assert data["low"]["led_current_avg_A"] < data["nominal"]["led_current_avg_A"] < data["high"]["led_current_avg_A"]
    assert "switch_on_peak_A" in data and "open_load_bus_V" in data


def test_check_bad_design_names_key(tmp_path: object) -> None:
    import pathlib

    p = pathlib.Path(str(tmp_path)) / "bad.toml"
    src = open(os.path.join(DESIGNS, "panel-230.toml")).read()
    p.write_text(
        src.replace('capacitance = "1000 uF"', 'capacitance = "1000 uH"').replace("[array]", "[array]\ncolour = 1")
    )
    r = lampbook("check", str(p))
    assert r.returncode == 2
    assert "smoothing.capacitance" in r.stderr and "array.colour" in r.stderr
    assert "Traceback" not in r.stderr
