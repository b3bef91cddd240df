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


def test_rows_of_the_mode_only_and_does_not_apply_said() -> None:
    r = lampbook("dropper")
    assert r.returncode == 0, r.stderr
    assert "does not apply" in r.stdout  # no target given: the capacitance for a target does not apply
    cv = lampbook("string", "--supply", "cv")
    assert cv.returncode == 0, cv.stderr
    assert "Ballast" in cv.stdout and "Dropper capacitance" not in cv.stdout


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
    assert data["values"]["led_current_avg_A"] == pytest.approx(0.04208, rel=1e-3)
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
    assert json.loads(r.stdout)["values"]["drop_V"] == pytest.approx(0.419, rel=1e-3)


def test_ripple_answer_RP4() -> None:
    r = lampbook("ripple", "--load-current", "20 mA", "--capacitance", "100 uF", "--frequency", "60 Hz", "--json")
    assert json.loads(r.stdout)["values"]["ripple_pp_V"] == pytest.approx(1.667, rel=1e-3)


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
    assert json.loads(r.stdout)["values"]["ballast_exact_ohm"] == pytest.approx(150.0)


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
    text = " ".join(r.stdout.split())  # argparse wraps the help
    assert "Default: 1 µF" in text and "such as '22 µF'" in text
    assert "'2u2'" in text and "'0.1 MFD'" in text and "'4k7'" in text  # the forms each dimension takes


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
        "percent_flicker_pct",
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


# --- issue 14 ------------------------------------------------------------------------------


@pytest.mark.parametrize(
    ("args", "field", "si"),
    [
        # IEC 60062 codes and trade markings on the command line (IEC 60062, from memory)
        (["ripple", "--capacitance", "2u2", "--json"], None, None),
        (["dropper", "--bleeder", "4k7", "--json"], "bleeder_ohm", 4700.0),
        (
            ["dropper", "--capacitance", "0.47 MFD", "--json"],
            "reactance_ohm",
            1 / (2 * 3.141592653589793 * 50 * 0.47e-6),
        ),
        (
            ["dropper", "--capacitance", "0,47 uF", "--json"],
            "reactance_ohm",
            1 / (2 * 3.141592653589793 * 50 * 0.47e-6),
        ),
    ],
)
def test_trade_spellings_on_the_command_line_X1(args: list[str], field: str | None, si: float | None) -> None:
    # Xc = 1 / (2 π f C) (references.md X1)
    r = lampbook(*args)
    assert r.returncode == 0, r.stderr
    data = json.loads(r.stdout)
    if field:
        assert data["values"][field] == pytest.approx(si, rel=1e-9)


def test_ambiguous_comma_refused_with_both_readings() -> None:
    r = lampbook("ripple", "--capacitance", "2,200 uF")
    assert r.returncode == 2 and len(r.stderr.strip().splitlines()) == 1
    assert "2.2 µF" in r.stderr and "2.2 mF" in r.stderr and "--capacitance" in r.stderr


def test_preferred_takes_units() -> None:
    r = lampbook("preferred", "--value", "4.7 kΩ", "--series", "E12")
    assert r.returncode == 0, r.stderr
    assert "Nearest            4.7 kΩ" in r.stdout
    r = lampbook("preferred", "--value", "100n", "--json")
    assert json.loads(r.stdout)["display"]["nearest"] == "100 nF"


@pytest.mark.parametrize("name", ["dropper", "string", "ripple", "wire", "module", "preferred", "mains", "quantity"])
def test_reports_fit_80_columns_unless_wide(name: str) -> None:
    r = lampbook(name)
    assert r.returncode == 0
    assert max(len(line) for line in r.stdout.splitlines()) <= 80
    assert lampbook(name, "--wide").returncode == 0


def test_check_report_fits_80_columns_and_counts_right() -> None:
    r = lampbook("check", os.path.join(DESIGNS, "unsafe-demo.toml"))
    lines = r.stdout.splitlines()
    assert max(len(line) for line in lines) <= 80
    assert not any(" 1 warnings" in line for line in lines)
    wide = lampbook("check", os.path.join(DESIGNS, "unsafe-demo.toml"), "--wide")
    assert max(len(line) for line in wide.stdout.splitlines()) > 80


def test_new_refuses_a_file_and_quotes_the_name(tmp_path: object) -> None:
    import pathlib

    import yaml

    base = pathlib.Path(str(tmp_path))
    (base / "taken").write_text("x")
    r = lampbook("new", str(base / "taken"))
    assert r.returncode == 2 and "is a file" in r.stderr and "Traceback" not in r.stderr
    name = 'Crew: "Stage #2" lights'
    r = lampbook("new", str(base / "hb"), "--name", name)
    assert r.returncode == 0, r.stderr
    text = (base / "hb" / "mkdocs.yml").read_text(encoding="utf-8")
    loader = yaml.SafeLoader
    loader.add_multi_constructor("", lambda *_: None)  # other tags are not under test
    assert yaml.load(text, Loader=loader)["site_name"] == name
    assert not [p for p in base.iterdir() if p.name.startswith(".")]  # no temporary folder left
