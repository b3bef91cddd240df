"""Fuzz tier: hostile input everywhere a user or a script can reach.

Every command-line calculator and option, the design loader (mutated demo
designs: missing keys, wrong types and units, duplicate tables, binary junk,
huge files) and ``lampcalc.api.handle`` with random JSON. The contract
(issue 14): exit 0 or 2 (1 only for a failed check) or a JSON error reply;
never a traceback, never a non-finite number in JSON, never a hang.
"""

from __future__ import annotations

import contextlib
import io
import json
import os
import signal
import sys
import threading
from collections.abc import Iterator
from pathlib import Path
from typing import Any

import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st
from lampcalc.api import handle
from lampcalc.calculators import CALCULATORS

from lampbook.atomic import write_atomic
from lampbook.cli import main

pytestmark = pytest.mark.fuzz

ROOT = Path(__file__).resolve().parent.parent
DEMOS = sorted((ROOT / "docs" / "designs").glob("*.toml"))
HANG_S = 10


@contextlib.contextmanager
def no_hang(what: object) -> Iterator[None]:
    """Fails the work after HANG_S seconds of this process's CPU time: a loop that never ends burns CPU and
    trips it, while other jobs on a busy machine do not stretch a bounded case into a false hang."""

    def boom(*_: object) -> None:
        raise AssertionError(f"over {HANG_S} s of CPU: {what!r}")

    old = signal.signal(signal.SIGPROF, boom)
    signal.setitimer(signal.ITIMER_PROF, HANG_S)
    try:
        yield
    finally:
        signal.setitimer(signal.ITIMER_PROF, 0)
        signal.signal(signal.SIGPROF, old)


def run_cli(argv: list[str]) -> tuple[int, str, str]:
    out, err = io.StringIO(), io.StringIO()
    with no_hang(argv), contextlib.redirect_stdout(out), contextlib.redirect_stderr(err):
        try:
            rc = main(argv)
        except SystemExit as e:
            rc = int(e.code or 0)
    return rc, out.getvalue(), err.getvalue()


def strict(text: str) -> Any:
    """Parse as a strict JSON reader would: NaN and Infinity are refused."""

    def refuse(name: str) -> Any:
        raise AssertionError(f"non-finite {name} in JSON")

    return json.loads(text, parse_constant=refuse)


def assert_clean_failure(rc: int, err: str, argv: object) -> None:
    assert rc == 2, (rc, argv, err)
    assert err.strip(), argv
    assert "Traceback" not in err and "internal error" not in err, (argv, err)


HOSTILE = [
    "",
    " ",
    "0",
    "-1",
    "1e999",
    "-1e999",
    "nan",
    "inf",
    "1e-300",
    "1e-300 Ω",
    "1e40 V",
    "-24 V",
    "0 V",
    "0 Ω",
    "0 A",
    "0 F",
    "2,200 uF",
    "1,500 V",
    "1 MF",
    "4k7",
    "2u2",
    "R47",
    "100 %",
    "-5 %",
    "1e15",
    "5e-324",
    "\x00",
    "x" * 300,
    "18 AWG",
    "4/0 AWG",
    "-40 °C",
    "250 °C",
    "custom",
    "230-60",
    "E6",
    "1000",
    "1",
]
PLAUSIBLE = ["10", "5 V", "230 V", "10 mA", "100 Ω", "1 uF", "20 °C", "50 %", "1 m", "1 mm2", "50 Hz", "1 s", "2 W"]


@st.composite
def calculator_argv(draw: st.DrawFn) -> list[str]:
    calc = draw(st.sampled_from(sorted(CALCULATORS)))
    params = CALCULATORS[calc].params
    argv = [calc]
    for p in draw(st.lists(st.sampled_from(params), max_size=4, unique_by=lambda p: p.name)):
        value = draw(
            st.one_of(
                st.sampled_from(HOSTILE),
                st.sampled_from([*PLAUSIBLE, *p.choices, p.default or "1"]),
                st.text(max_size=12),
                st.floats(allow_nan=True, allow_infinity=True).map(lambda x, unit=p.dim[:1]: f"{x!r} {unit}"),
            )
        )
        argv.append("--" + p.name.replace("_", "-") + "=" + value)  # "=": values may start with "-"
    if draw(st.booleans()):
        argv.append("--json")
    return argv


@settings(max_examples=400, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(argv=calculator_argv())
def test_every_calculator_option_answers_or_refuses(argv: list[str]) -> None:
    rc, out, err = run_cli(argv)
    if rc != 0:
        assert_clean_failure(rc, err, argv)
        assert all(line.startswith(f"lampbook {argv[0]}: --") for line in err.strip().splitlines()), err
        return
    if "--json" in argv:
        data = strict(out)
        assert data["ok"] is True
    else:
        assert all(len(line) <= 80 for line in out.splitlines()), argv


@pytest.mark.parametrize(
    ("calc", "option"), [(c.name, p.name) for c in CALCULATORS.values() for p in c.params if p.dim != "text"]
)
def test_one_bad_option_gives_one_line_naming_it(calc: str, option: str) -> None:
    flag = "--" + option.replace("_", "-")
    rc, _, err = run_cli([calc, flag, "banana"])
    assert_clean_failure(rc, err, (calc, flag))
    lines = err.strip().splitlines()
    assert len(lines) == 1, lines
    assert flag in lines[0] and "banana" in lines[0] and "expected" in lines[0]


def test_unknown_region_is_one_problem() -> None:
    rc, _, err = run_cli(["dropper", "--region", "230-60"])
    assert_clean_failure(rc, err, "region")
    assert err.strip().splitlines() == [
        "lampbook dropper: --region: got '230-60'; expected one of 120-60, 230-50, 240-50, 100-50, 100-60, "
        "127-60, 220-60, custom"
    ]


@pytest.mark.parametrize(
    "argv",
    [
        ["string", "--series", "1e999"],
        ["dropper", "--series-resistance", "1e-300 Ω"],
        ["quantity", "--dimension", "voltage", "--text", "1e40 V"],
        ["dropper", "--capacitance", " "],
        ["ripple", "--capacitance", "2,200 uF"],
    ],
)
def test_reported_hostile_values_are_refused(argv: list[str]) -> None:
    rc, _, err = run_cli(argv)
    assert_clean_failure(rc, err, argv)
    assert len(err.strip().splitlines()) == 1


# --- the design loader ---------------------------------------------------------------------

VALUES = [
    '"0 uF"',
    '"0 V"',
    '"-24 V"',
    "0",
    "-1",
    '"abc"',
    "1e999",
    "nan",
    "inf",
    '"1e-300 Ω"',
    "true",
    "[]",
    "{}",
    '"1,500 V"',
    '"2,200 uF"',
    '"1 MF"',
    '"4k7"',
    '" "',
    '""',
    "1000000000",
    '"-5 m"',
    '"-20 K/W"',
    '["0 uF", "1 uF"]',
    '"-100 °C"',
    '"100 A"',
    '"0 Ω"',
    '"exponential"',
]
EXTRA = [
    "[review]\nsamples = {v}",
    "[dropper]\nsteps = {v}",
    "[smoothing]\nvoltage_rating = {v}",
    "[review]\ndischarge_voltage = {v}",
    "[review]\ntemperature_hot = {v}",
    "[array]\nseries = {v}",
    "[[wire]]\nname = 'x'\nsize = {v}\nlength = {v}",
]


@st.composite
def mutated_design(draw: st.DrawFn) -> str:
    lines = draw(st.sampled_from(DEMOS)).read_text(encoding="utf-8").splitlines()
    for _ in range(draw(st.integers(1, 4))):
        i = draw(st.integers(0, len(lines) - 1))
        op = draw(st.sampled_from(["value", "value", "delete", "duplicate", "extra", "junk"]))
        if op == "value" and "=" in lines[i]:
            lines[i] = lines[i].split("=", 1)[0] + "= " + draw(st.sampled_from(VALUES))
        elif op == "delete":
            del lines[i]
        elif op == "duplicate":
            lines.append(lines[i])
        elif op == "extra":
            lines.append(draw(st.sampled_from(EXTRA)).format(v=draw(st.sampled_from(VALUES))))
        else:
            lines.insert(i, draw(st.text(max_size=20)))
        if not lines:
            lines = [""]
    return "\n".join(lines)


def assert_json_reply(reply: str, what: object) -> dict[str, Any]:
    data = strict(reply)
    assert isinstance(data, dict) and isinstance(data.get("ok"), bool), what
    if not data["ok"]:
        assert data["errors"], what
        for e in data["errors"]:
            assert e["message"] and "internal error" not in e["message"], (what, e)
    return data


@settings(max_examples=120, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(text=mutated_design(), kind=st.sampled_from(["check", "check", "check", "study"]))
def test_mutated_designs_answer_or_refuse(text: str, kind: str) -> None:
    req: dict[str, Any] = {"kind": kind, "toml": text}
    if kind == "study":
        req["samples"] = 50
    with no_hang(text[:200]):
        assert_json_reply(handle(json.dumps(req)), text)


@pytest.mark.parametrize(
    ("name", "content"),
    [
        ("binary", b"\xff\xfe\x00junk\x80"),
        ("huge", b"# " + b"x" * 2_000_000 + b"\n"),
        ("nested", b"a = " + b"{b = " * 5000 + b"1" + b"}" * 5000 + b"\n"),
        ("deep-arrays", b"a = " + b"[" * 5000 + b"]" * 5000 + b"\n"),
        ("empty", b""),
    ],
)
def test_hostile_design_files_exit_2(tmp_path: Path, name: str, content: bytes) -> None:
    p = tmp_path / f"{name}.toml"
    p.write_bytes(content)
    for cmd in (["check", str(p)], ["check", str(p), "--json"], ["sheet", str(p)]):
        rc, _, err = run_cli(cmd)
        assert_clean_failure(rc, err, (name, cmd))


def test_check_json_is_strict_on_every_demo() -> None:
    for p in DEMOS:
        rc, out, err = run_cli(["check", str(p), "--json"])
        assert rc in (0, 1), err
        strict(out)


# --- the JSON entry point ------------------------------------------------------------------

json_leaf = st.one_of(
    st.none(),
    st.booleans(),
    st.integers(min_value=-(10**30), max_value=10**30),
    st.floats(allow_nan=False, allow_infinity=False),
    st.text(max_size=20),
    st.sampled_from(HOSTILE),
)
json_value = st.recursive(
    json_leaf,
    lambda inner: st.lists(inner, max_size=4) | st.dictionaries(st.text(max_size=8), inner, max_size=4),
    max_leaves=12,
)


@st.composite
def request(draw: st.DrawFn) -> str:
    kind = draw(st.sampled_from(["compute", "describe", "check", "study", "sheet", "nonsense", None]))
    req: dict[str, Any] = {} if kind is None else {"kind": kind}
    calc = draw(st.sampled_from([*CALCULATORS, "toaster"]))
    req["calculator"] = calc
    names = [p.name for p in CALCULATORS[calc].params] if calc in CALCULATORS else ["x"]
    req["inputs"] = draw(st.one_of(st.dictionaries(st.sampled_from(names), json_value, max_size=4), json_value))
    if kind in ("check", "study", "sheet"):
        req["toml"] = draw(st.one_of(st.text(max_size=40), st.sampled_from(DEMOS).map(lambda p: p.read_text())))
        if kind == "sheet":
            req["kind"] = "check"  # a sheet runs a full study: the study kind covers it with few samples
    if kind == "study":
        req["samples"] = draw(st.one_of(json_value, st.integers(1, 30)))
        req["seed"] = draw(st.one_of(st.none(), json_value))
    text = json.dumps(req)
    if draw(st.booleans()) and draw(st.booleans()):
        text = draw(st.sampled_from(["[" * 100_000, '{"a": NaN}', "Infinity", "", "{", text[: len(text) // 2]]))
    return text


@settings(max_examples=300, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(text=request())
def test_handle_answers_random_json(text: str) -> None:
    with no_hang(text[:200]):
        assert_json_reply(handle(text), text[:200])


@pytest.mark.parametrize("samples", ["abc", 0, -5, 10**7, 2.5, True])
def test_study_samples_out_of_bounds_is_refused(samples: object) -> None:
    req = {"kind": "study", "toml": DEMOS[0].read_text(), "samples": samples}
    data = assert_json_reply(handle(json.dumps(req)), samples)
    assert data["ok"] is False and data["errors"][0]["field"] == "samples"


def test_nan_in_a_request_is_refused_as_json() -> None:
    data = assert_json_reply(handle('{"kind": "study", "samples": NaN}'), "NaN")
    assert data["ok"] is False and data["errors"][0]["field"] == "request"


# --- files ---------------------------------------------------------------------------------


def test_sheet_refuses_to_overwrite_its_design(tmp_path: Path) -> None:
    design = tmp_path / "d.toml"
    design.write_text(DEMOS[0].read_text(encoding="utf-8"), encoding="utf-8")
    before = design.read_bytes()
    rc, _, err = run_cli(["sheet", str(design), "-o", str(design)])
    assert_clean_failure(rc, err, "sheet -o design")
    assert "design being read" in err and design.read_bytes() == before


def test_failed_write_keeps_the_old_file(tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> None:
    target = tmp_path / "page.md"
    target.write_text("old page\n", encoding="utf-8")

    def broken(*_: object) -> None:
        raise OSError(28, "No space left on device")

    monkeypatch.setattr(os, "replace", broken)
    with pytest.raises(OSError):
        write_atomic(target, "new page\n")
    assert target.read_text(encoding="utf-8") == "old page\n"
    assert [p.name for p in tmp_path.iterdir()] == ["page.md"]  # no temporary left behind


def test_concurrent_writers_leave_one_whole_page(tmp_path: Path) -> None:
    target = tmp_path / "page.md"
    pages = [f"# page {k}\n" + f"line of page {k}\n" * 20_000 + f"footer {k}\n" for k in range(8)]
    for _ in range(5):
        threads = [threading.Thread(target=write_atomic, args=(target, p)) for p in pages]
        for t in threads:
            t.start()
        for t in threads:
            t.join()
        text = target.read_text(encoding="utf-8")
        assert text in pages and text.count("footer") == 1
    assert [p.name for p in tmp_path.iterdir()] == ["page.md"]


def test_sheet_output_written_whole(tmp_path: Path) -> None:
    out = tmp_path / "sheet.md"
    out.write_text("old\n", encoding="utf-8")
    rc, _, err = run_cli(["sheet", str(DEMOS[0]), "-o", str(out)])
    assert rc == 0, err
    _, page, _ = run_cli(["sheet", str(DEMOS[0])])
    assert out.read_text(encoding="utf-8") == page


# --- the random-design sweep, small and seeded -------------------------------------------------


def test_small_random_sweep_converges_or_refuses() -> None:
    sys.path.insert(0, str(ROOT / "bench"))
    from sweep import sweep

    s = sweep(24, seed=7)
    assert s["tracebacks"] == 0
    assert s["violations"] == []
    assert s["converged"] + s["refused"] == 24
    assert s["converged"] >= 12  # the ranges are mostly buildable: a sweep that refuses all proves nothing


UNITS = {
    "voltage": "V",
    "current": "A",
    "capacitance": "F",
    "resistance": "Ω",
    "power": "W",
    "time": "s",
    "temperature": "°C",
    "ratio": "",
    "thermal_resistance": "K/W",
    "tempco": "V/K",
    "count": "",
    "area": "mm2",
    "length": "m",
    "frequency": "Hz",
}


def _design_keys() -> list[tuple[str, str, str]]:
    from lampcalc.fixture.design import SCHEMA

    out = []
    for table, spec in SCHEMA.items():
        for key, (dim, _, _) in spec.items():
            if dim in UNITS and table:
                out.append((table, key, UNITS[dim]))
    return out


def _set_key(text: str, table: str, key: str, value: str) -> str:
    """The design with ``[table] key`` set to ``value`` (the table is added if absent)."""
    lines, out, inside, done = text.splitlines(), [], False, False
    for line in lines:
        if line.startswith("["):
            if inside and not done:
                out.append(f"{key} = {value}")
                done = True
            inside = line.strip() == f"[{table}]"
        elif inside and line.split("=")[0].strip() == key:
            continue
        out.append(line)
    if not done:
        out += ([] if inside else ["", f"[{table}]"]) + [f"{key} = {value}"]
    return "\n".join(out)


@pytest.mark.parametrize(("table", "key", "unit"), _design_keys())
def test_every_design_key_at_zero_negative_and_huge(table: str, key: str, unit: str) -> None:
    base = (ROOT / "docs" / "designs" / ("panel-24v.toml" if table == "supply" else "panel-230.toml")).read_text()
    for number in ("0", "-1", "1e6", "1e-9"):
        value = f'"{number} {unit}"' if unit else number
        text = _set_key(base, table, key, value)
        with no_hang((table, key, value)):
            data = assert_json_reply(handle(json.dumps({"kind": "check", "toml": text})), (table, key, value))
        if data["ok"]:
            strict(json.dumps(data))


def test_check_exits_1_with_a_reason_when_there_is_no_steady_state(monkeypatch: pytest.MonkeyPatch) -> None:
    import lampcalc.design_api as design_api
    from lampcalc.errors import ConvergenceError

    def no_steady_state(kind: str, req: dict[str, Any]) -> dict[str, Any]:
        e = ConvergenceError("events", "too many switching events in one half period")
        return {"ok": False, "errors": [{"field": "", "value": "", "expected": "", "message": str(e)}]}

    monkeypatch.setattr(design_api, "handle", no_steady_state)
    rc, _, err = run_cli(["check", str(DEMOS[0])])
    assert rc == 1 and "steady state did not converge" in err and "Traceback" not in err
