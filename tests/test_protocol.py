"""The page protocol (lampcalc/protocol.py) against real answers: every request
kind is sent through ``lampcalc.api.handle`` as the page sends it, and its answer
must have exactly the shape declared (every required field, no undeclared one,
each of the declared type). The TypeScript the page is checked against is what
the generator writes from those declarations now. The plot sweep computed in
the core is checked against the calculator's own answers point by point and its
spacing against numpy."""

from __future__ import annotations

import json
import types
import typing
from pathlib import Path

import numpy as np
import pytest
from lampcalc import protocol
from lampcalc.api import handle
from lampcalc.calculators import CALCULATORS
from lampcalc.fixture.workbench import to_doc
from sites import ROOT

from lampbook import protocoltypes
from lampbook.catalogue import check_design

DESIGNS = ROOT / "docs" / "designs"

# declarations that name only part of what the core writes (the review's corners and the operating points carry
# more figures than the page reads; see lampcalc/protocol.py); every other shape is closed
PARTIAL = {protocol.CheckAnswer, protocol.OperatingPoint}


def conforms(value: object, tp: object, path: str = "answer") -> list[str]:
    """Where ``value`` departs from the declared type ``tp`` (empty: it conforms)."""
    if tp in (typing.Any, object):
        return []
    if tp is type(None):
        return [] if value is None else [f"{path}: {value!r} is not null"]
    if tp is bool:
        return [] if isinstance(value, bool) else [f"{path}: {value!r} is not a boolean"]
    if tp in (int, float):
        ok = isinstance(value, (int, float)) and not isinstance(value, bool)
        if tp is int:
            ok = ok and float(value).is_integer()  # type: ignore[arg-type]
        return [] if ok else [f"{path}: {value!r} is not {'a whole number' if tp is int else 'a number'}"]
    if tp is str:
        return [] if isinstance(value, str) else [f"{path}: {value!r} is not text"]
    if isinstance(tp, type) and typing.is_typeddict(tp):
        if not isinstance(value, dict):
            return [f"{path}: {type(value).__name__} is not an object ({tp.__name__})"]
        hints = typing.get_type_hints(tp, include_extras=True)
        out = []
        for key, kt in hints.items():
            optional = typing.get_origin(kt) is typing.NotRequired
            if optional:
                kt = typing.get_args(kt)[0]
            if key not in value:
                if not optional:
                    out.append(f"{path}.{key}: missing ({tp.__name__})")
                continue
            out += conforms(value[key], kt, f"{path}.{key}")
        if tp not in PARTIAL:
            out += [f"{path}.{k}: not declared in {tp.__name__}" for k in value if k not in hints]
        return out
    origin, args = typing.get_origin(tp), typing.get_args(tp)
    if origin is typing.Literal:
        return [] if any(value == a and type(value) is type(a) for a in args) else [f"{path}: {value!r} not in {args}"]
    if origin in (typing.Union, types.UnionType):
        tries = [conforms(value, a, path) for a in args]
        if any(not t for t in tries):
            return []
        # a request or answer of a kind: say what departs from that kind's declaration
        kind = value.get("kind") if isinstance(value, dict) else None
        named = [t for a, t in zip(args, tries, strict=True) if kind and f"{path}.kind:" not in " ".join(t)]
        names = [getattr(a, "__name__", str(a)) for a in args]
        return [f"{path}: matches none of {names}: " + (named or tries)[0][0]]
    if origin is list:
        if not isinstance(value, list):
            return [f"{path}: {value!r} is not a list"]
        return [e for i, v in enumerate(value) for e in conforms(v, args[0], f"{path}[{i}]")]
    if origin is tuple:
        if not isinstance(value, list) or len(value) != len(args):
            return [f"{path}: {value!r} is not a list of {len(args)}"]
        return [e for i, (v, a) in enumerate(zip(value, args)) for e in conforms(v, a, f"{path}[{i}]")]
    if origin is dict:
        if not isinstance(value, dict):
            return [f"{path}: {value!r} is not an object"]
        return [e for k, v in value.items() for e in conforms(v, args[1], f"{path}.{k}")]
    raise AssertionError(f"the test cannot check {tp!r}")


def ask(request: dict[str, object]) -> dict[str, typing.Any]:
    problems = conforms(request, protocol.Request, "request")
    assert not problems, problems
    answer = json.loads(handle(json.dumps(request)))
    assert isinstance(answer, dict)
    return answer


def assert_answer(request: dict[str, object], answer: dict[str, typing.Any]) -> None:
    kind = str(request.get("kind", "compute"))
    _, declared = protocol.ANSWERS[kind]
    problems = conforms(answer, declared if answer.get("ok") else protocol.Refusal)
    assert not problems, f"{kind}: " + "; ".join(problems[:10])


def text(name: str) -> str:
    return (DESIGNS / f"{name}.toml").read_text(encoding="utf-8")


def test_the_checker_catches_departures() -> None:
    good = {"field": "a", "value": "b", "expected": "c", "message": "d"}
    assert conforms(good, protocol.ErrorItem) == []
    assert conforms({**good, "extra": 1}, protocol.ErrorItem) == ["answer.extra: not declared in ErrorItem"]
    assert conforms({k: v for k, v in good.items() if k != "value"}, protocol.ErrorItem)
    assert conforms({"ok": True, "errors": []}, protocol.Refusal)
    assert conforms(1.5, int) and not conforms(2, float) and conforms(True, float)


def _requests() -> list[tuple[str, dict[str, object]]]:
    doc = to_doc(text("panel-230"))
    return [
        ("describe", {"kind": "describe"}),
        ("compute", {"kind": "compute", "calculator": "dropper", "inputs": {}}),
        ("compute-default-kind", {"calculator": "ripple", "inputs": {"capacitance": "22 uF"}}),
        ("compute-refused", {"kind": "compute", "calculator": "ripple", "inputs": {"capacitance": "lots"}}),
        ("sweep", {"kind": "sweep", "calculator": "ripple", "plot": "ripple_vs_capacitance", "inputs": {}}),
        ("sweep-refused", {"kind": "sweep", "calculator": "ripple", "plot": "nothing", "inputs": {}}),
        ("check-mains", {"kind": "check", "toml": text("panel-230"), "waveforms": True}),
        ("check-cv", {"kind": "check", "toml": text("panel-24v")}),
        ("check-unsafe", {"kind": "check", "toml": text("unsafe-demo")}),
        ("check-refused", {"kind": "check", "toml": "name = 3"}),
        ("study", {"kind": "study", "toml": text("worklight-120"), "samples": 200, "seed": 3}),
        ("sheet", {"kind": "sheet", "toml": text("panel-24v")}),
        ("design_schema", {"kind": "design_schema"}),
        ("design_doc", {"kind": "design_doc", "toml": text("panel-230")}),
        ("design_toml", {"kind": "design_toml", "doc": doc}),
        ("plan", {"kind": "plan", "doc": doc, "options": {"modules": "24", "supply": "dropper"}}),
        ("plan-refused", {"kind": "plan", "doc": doc, "options": {"modules": "many"}}),
    ]


@pytest.mark.parametrize(("name", "request_"), _requests(), ids=[n for n, _ in _requests()])
def test_every_answer_has_its_declared_shape(name: str, request_: dict[str, object]) -> None:
    answer = ask(request_)
    assert answer["ok"] is not name.endswith("-refused"), answer
    assert_answer(request_, answer)


def test_a_plan_with_no_passing_arrangement_is_an_answer() -> None:
    """The planner's own verdict is ``best`` (null: nothing passes, ``constraint`` says why); the answer's ``ok``
    says the request was answered, so the page shows the reason instead of looking for errors that are not
    there. all-dark.toml's module cannot light 200 of them on a dropper (the review fails every arrangement)."""
    doc = to_doc((ROOT / "tests" / "designs" / "all-dark.toml").read_text(encoding="utf-8"))
    req: dict[str, object] = {"kind": "plan", "doc": doc, "options": {"modules": "200", "supply": "dropper"}}
    answer = ask(req)
    assert_answer(req, answer)
    assert answer["ok"] is True and answer["best"] is None
    assert answer["constraint"].startswith("no arrangement passes the review")
    assert all(not p["ok"] for p in answer["proposals"])


@pytest.mark.parametrize("calc", [c for c in CALCULATORS.values() if c.plots], ids=lambda c: c.name)
def test_sweep_points_are_the_calculators_own_answers(calc: typing.Any) -> None:
    """Each point of the one-request sweep equals a compute request at that input, and the inputs are spaced
    as numpy's linspace / geomspace space them between the declared factors of the value in the form."""
    s = calc.plots[0]
    ans = ask({"kind": "sweep", "calculator": calc.name, "plot": s.name, "inputs": {}})
    assert ans["ok"], ans
    centre = ans["centre"]
    xs = [p[0] for p in ans["points"]]
    space = np.geomspace if s.log else np.linspace
    expected = space(s.low * centre, s.high * centre, s.points)
    # a point the calculator refuses is left out; the others sit where numpy puts them
    assert len(xs) >= 2
    for x in xs:
        assert np.min(np.abs(expected - x)) <= 1e-9 * centre, (x, expected)
    unit = {"mains_voltage": "V", "capacitance": "F"}[s.param]
    for x, y in ans["points"]:
        one = ask({"kind": "compute", "calculator": calc.name, "inputs": {s.param: f"{x!r} {unit}"}})
        assert one["ok"] and one["values"][s.output] == pytest.approx(y, rel=1e-12)
    # the value in the form is the default's, and the sweep passes through its answer
    default = ask({"kind": "compute", "calculator": calc.name, "inputs": {}})
    mid = [y for x, y in ans["points"] if abs(x - centre) <= 1e-9 * centre]
    assert mid == [pytest.approx(default["values"][s.output], rel=1e-9)]


def test_sweep_names_a_bad_input_once() -> None:
    ans = ask(
        {"kind": "sweep", "calculator": "ripple", "plot": "ripple_vs_capacitance", "inputs": {"capacitance": "x"}}
    )
    assert not ans["ok"] and [e["field"] for e in ans["errors"]] == ["capacitance"]
    ans = ask({"kind": "sweep", "calculator": "wire", "plot": "ripple_vs_capacitance", "inputs": {}})
    assert [e["field"] for e in ans["errors"]] == ["plot"] and "has none" in ans["errors"][0]["expected"]


def test_typescript_declarations_are_generated_from_the_protocol() -> None:
    written = (ROOT / "lampbook" / "assets" / "protocol.d.ts").read_text(encoding="utf-8")
    assert written == protocoltypes.declarations(), (
        "lampbook/assets/protocol.d.ts is out of date: run .venv/bin/python -m lampbook.protocoltypes"
    )
    # every declared shape and request kind reaches the TypeScript
    for name, value in vars(protocol).items():
        if isinstance(value, type) and typing.is_typeddict(value):
            assert f"export interface {name} {{" in written
    for kind in protocol.ANSWERS:
        assert f"  {kind}: " in written


def test_generator_spells_each_annotation() -> None:
    assert protocoltypes.ts_type(list[tuple[float, float]]) == "[number, number][]"
    assert protocoltypes.ts_type(dict[str, float | str | None]) == "Record<string, number | string | null>"
    assert protocoltypes.ts_type(list[str | None]) == "(string | null)[]"
    assert protocoltypes.ts_type(typing.Literal["a", "b"]) == '"a" | "b"'
    with pytest.raises(protocoltypes.ProtocolTypeError):
        protocoltypes.ts_type(set[str])


def test_generator_check_mode(tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> None:
    target = tmp_path / "protocol.d.ts"
    monkeypatch.setattr(protocoltypes, "TARGET", target)
    assert protocoltypes.main([]) == 0 and protocoltypes.main(["--check"]) == 0
    target.write_text(target.read_text(encoding="utf-8") + "// edited\n", encoding="utf-8")
    assert protocoltypes.main(["--check"]) == 1


# --- every number named with its unit --------------------------------------------------------------------------
# A numeric key ends with its unit, one scale per quantity across every command and page (README, "JSON output").
UNIT_SUFFIXES = (
    "_V", "_A", "_F", "_ohm", "_ohm_per_m", "_W", "_VA", "_var", "_Hz", "_s", "_h", "_J", "_H", "_C",
    "_K_per_W", "_lm", "_lx", "_cd", "_lm_per_W", "_m", "_m2", "_A2s", "_deg", "_fps", "_pct",
    "_ft", "_fc",  # imperial twins of a figure also given in SI (distance_m / distance_ft)
)  # fmt: skip
#: the suffix a calculator output of each dimension carries
DIM_SUFFIX = {
    "voltage": ("_V",), "current": ("_A",), "capacitance": ("_F",), "resistance": ("_ohm", "_ohm_per_m"),
    "power": ("_W",), "frequency": ("_Hz",), "time": ("_s",), "energy": ("_J",), "length": ("_m",),
    "area": ("_m2",), "percent": ("_pct",), "luminous_flux": ("_lm",), "illuminance": ("_lx",),
    "luminous_intensity": ("_cd",), "efficacy": ("_lm_per_W",),
    "ratio": ("",), "count": ("",),
}  # fmt: skip
#: dimensionless fractions (0-1, a ratio of two like quantities) and counts: the only numbers with no unit
DIMENSIONLESS = {
    # fractions
    "power_factor", "displacement_pf", "distortion_pf", "thd", "flicker_index", "harmonic_worst_ratio",
    "worst_ratio", "ratio", "floor", "imbalance", "drop_fraction", "efficiency", "headroom", "bus_fraction",
    "variation", "exposure_low", "exposure_high", "threshold", "relative", "error", "sensitivity", "limit_ratio",
    "max_relative_error",
    # counts
    "failed", "warned", "cases", "resistors", "order", "newton_iterations", "steps", "spectrum_samples_per_period",
    "series", "parallel", "bank_count", "bleeder_parts", "step", "parts", "modules", "best", "samples", "seed",
    "exact_solves", "checked_samples", "counts",
}  # fmt: skip
#: numbers whose unit is not one: given beside them in a ``unit`` field (corners, fault over-ratings), the
#: input's own kind (the preferred-value and quantity readers), or one per variable listed beside them (the study's
#: sampling box, its stress named in ``name``, the camera sweep's (shutter s, variation) pairs)
UNIT_BESIDE = {"value", "rating", "nearest", "up", "down", "si", "low", "high", "max", "p1", "p50", "p99", "sweep"}
#: quantities the trade states in percent: given 0-100, always with ``_pct``
PERCENT = (
    "percent_flicker",
    "low_risk_limit",
    "no_effect_limit",
    "ieee1789_low_risk_limit",
    "ieee1789_no_effect_limit",
)


def _suffix(key: str) -> str | None:
    return max((s for s in UNIT_SUFFIXES if key.endswith(s)), key=len, default=None)


def numeric_keys(value: object, key: str = "", parent: str = "", path: str = "answer") -> list[tuple[str, str, str]]:
    """Every numeric leaf as (its key, the key of the object holding it, its path); a list's items take the
    list's key."""
    if isinstance(value, dict):
        return [x for k, v in value.items() for x in numeric_keys(v, k, key, f"{path}.{k}")]
    if isinstance(value, list):
        return [x for v in value for x in numeric_keys(v, key, parent, f"{path}[]")]
    if isinstance(value, (int, float)) and not isinstance(value, bool):
        return [(key, parent, path)]
    return []


def _calculator_answers() -> list[tuple[str, dict[str, typing.Any]]]:
    out = []
    for calc in CALCULATORS.values():
        modes = [{}] + [{calc.mode: m} for m in calc.param(calc.mode).choices] if calc.mode else [{}]
        for inputs in modes:
            if calc.name == "string" and inputs.get("supply") == "dropper":
                inputs = {**inputs, "current": "30 mA"}
            out.append((f"{calc.name} {inputs}", ask({"kind": "compute", "calculator": calc.name, "inputs": inputs})))
    return out


@pytest.fixture(scope="module")
def every_answer() -> list[tuple[str, dict[str, typing.Any]]]:
    """Every calculator in each of its modes, the review of every design in docs/designs and tests/designs, a
    study, a plan and the catalogue summary of the demo designs, as the page and ``--json`` give them."""
    answers = _calculator_answers()
    for path in sorted([*DESIGNS.glob("*.toml"), *(ROOT / "tests" / "designs").glob("*.toml")]):
        answers.append((f"check {path.name}", ask({"kind": "check", "toml": path.read_text(encoding="utf-8")})))
    answers.append(("study", ask({"kind": "study", "toml": text("worklight-120"), "samples": 200, "seed": 3})))
    doc = to_doc(text("panel-230"))
    plan = ask({"kind": "plan", "doc": doc, "options": {"modules": "24", "supply": "dropper"}})
    plan.pop("doc")  # the proposed design file as form values: its keys are the design file's, inputs, not outputs
    answers.append(("plan", plan))
    for path in sorted(DESIGNS.glob("*.toml")):  # what `lampbook check FOLDER --json` lists
        answers.append((f"catalogue {path.name}", check_design(path.read_text(encoding="utf-8"))["summary"]))
    return [(n, a) for n, a in answers if a.get("ok", True)]


def test_every_number_carries_its_unit(every_answer: list[tuple[str, dict[str, typing.Any]]]) -> None:
    bare = set()
    for name, answer in every_answer:
        for key, parent, path in numeric_keys(answer):
            if _suffix(key) or key in DIMENSIONLESS or key in UNIT_BESIDE or _suffix(parent):
                continue  # a figure in a table named with its unit (losses_W: {"bridge": ...}) has it too
            bare.add(f"{name}: {path}")
    assert not bare, sorted(bare)[:20]
    # the test sees what it should: the calculators, the review's corners and the plan
    seen = {key for _, answer in every_answer for key, _, _ in numeric_keys(answer)}
    assert {"ripple_pp_V", "led_current_avg_A", "area_m2", "percent_flicker_pct", "limit_ratio"} <= seen


def test_one_scale_per_quantity(every_answer: list[tuple[str, dict[str, typing.Any]]]) -> None:
    """A quantity keeps one name and one scale wherever it appears: no key given bare (a fraction or a count) in
    one answer and with a unit in another, percent quantities only as ``_pct`` (0-100), and the same figure
    from two commands reads the same."""
    suffixes: dict[str, set[str]] = {}
    for _, answer in every_answer:
        for key, parent, _ in numeric_keys(answer):
            if key in UNIT_BESIDE or _suffix(parent):
                continue
            s = _suffix(key) or ""
            suffixes.setdefault(key.removesuffix(s) if s else key, set()).add(s)
    both = {k: v for k, v in suffixes.items() if "" in v and len(v) > 1}
    assert not both, both
    for stem in PERCENT:
        assert suffixes.get(stem, {"_pct"}) == {"_pct"}, (stem, suffixes[stem])
    assert {"percent_flicker", "ieee1789_low_risk_limit", "low_risk_limit"} <= set(suffixes)
    # the same figure from two commands reads the same: the IEEE 1789 low-risk limit at 100 Hz is 8 % both in
    # the ripple calculator and in the review (IEEE 1789-2015 cl. 8.1.1, 0.08 x 100 Hz, from memory)
    ripple = ask({"kind": "compute", "calculator": "ripple", "inputs": {"frequency": "50 Hz", "rectifier": "full"}})
    review = ask({"kind": "check", "toml": text("panel-230")})
    assert ripple["values"]["low_risk_limit_pct"] == pytest.approx(8.0)
    assert review["nominal"]["ieee1789_low_risk_limit_pct"] == pytest.approx(8.0)
    # percent flicker from a calculator is 0-100 as in the review: 100 * (ΔI/2) / I at the default 20 mA load
    # (IEEE 1789-2015 definition, (max - min) / (max + min))
    v = ripple["values"]
    assert v["percent_flicker_pct"] == pytest.approx(100 * (v["led_ripple_pp_A"] / 2) / 0.020, rel=1e-9)


@pytest.mark.parametrize("calc", list(CALCULATORS.values()), ids=lambda c: c.name)
def test_each_output_is_named_for_its_dimension(calc: typing.Any) -> None:
    """The declaration itself: a numeric output's name ends with its dimension's unit, a ratio or count has none."""
    for o in (*calc.outputs, *calc.columns):
        if o.dim == "text":
            continue  # text outputs keep their names ("… in feet" reads illuminance_axis_fc)
        want = DIM_SUFFIX[o.dim]
        got = _suffix(o.name) or ""
        assert got in want, f"{calc.name}.{o.name}: {o.dim} wants {' or '.join(want) or 'no suffix'}"
        if got == "" and o.dim in ("ratio", "count"):
            assert o.name in DIMENSIONLESS | UNIT_BESIDE, f"{calc.name}.{o.name}: not declared dimensionless"


def test_a_calculator_block_carries_its_declared_data() -> None:
    """The JSON a calculator block puts beside its form (lampbook/blocks.py) is the declared CalculatorBlock: the
    page builds the form from ``declaration`` and shows ``answer`` until the engine answers."""
    import re

    from lampbook.blocks import parse_block, render

    page = render(parse_block(1, "calculator: ripple\ncapacitance: 220 uF\n"), None)
    found = re.search(r'<script type="application/json" class="lb-data">(.*?)</script>', page, re.S)
    assert found
    data = json.loads(found.group(1))
    assert conforms(data, protocol.CalculatorBlock) == []
    assert data["answer"] == ask({"calculator": "ripple", "inputs": {"capacitance": "220 uF"}})


class _TableReader:
    """Headers and cell texts of the tables in a piece of HTML, read with the standard library's parser
    (not our renderer), with the summary line of a folded table."""

    def __init__(self, text: str) -> None:
        from html.parser import HTMLParser

        self.headers: list[str] = []
        self.rows: list[list[str]] = []
        self.summary = ""
        out = self
        where: list[str] = []

        class P(HTMLParser):
            def handle_starttag(self, tag: str, attrs: list[tuple[str, str | None]]) -> None:
                where.append(tag)
                if tag == "tr" and "tbody" in where:
                    out.rows.append([])
                if tag in ("th", "td"):
                    (out.headers if tag == "th" else out.rows[-1]).append("")

            def handle_endtag(self, tag: str) -> None:
                while where and where.pop() != tag:
                    pass

            def handle_data(self, data: str) -> None:
                if where and where[-1] == "summary":
                    out.summary += data
                elif where and where[-1] == "th":
                    out.headers[-1] += data
                elif where and where[-1] == "td":
                    out.rows[-1][-1] += data

        P().feed(text)


@pytest.mark.parametrize(
    ("name", "inputs"),
    [
        ("string", {"supply": "cv", "supply_voltage": "36 V"}),
        ("string", {"supply": "cc", "driver_current": "700 mA"}),
        ("dropper", {"stock_capacitance": "0.47 uF"}),
    ],
)
def test_the_page_gets_the_table_of_options_drawn_by_the_core(name: str, inputs: dict[str, str]) -> None:
    """One table renderer: the page's answer carries the table of options as the core draws it, with a
    column for each declared column that has a value and each cell as the answer reads it; scripts
    (the command line's JSON) get the numbers without the markup."""
    ans = json.loads(handle(json.dumps({"kind": "compute", "calculator": name, "inputs": inputs})))
    assert ans["ok"] and ans["rows"], ans
    cols = [c for c in CALCULATORS[name].columns if any(r[c.name] is not None for r in ans["rows"])]
    t = _TableReader(ans["rows_html"])
    assert t.summary == f"Every option ({len(ans['rows'])})"
    assert t.headers == [c.label for c in cols]
    assert t.rows == [[r[c.name] for c in cols] for r in ans["rows_display"]]
    assert ans["rows_html"].startswith('<details class="lb-options">')
    from lampcalc.api import compute

    assert "rows_html" not in compute(name, inputs)


def test_no_table_of_options_where_there_are_none() -> None:
    ans = json.loads(handle(json.dumps({"kind": "compute", "calculator": "ripple", "inputs": {}})))
    assert ans["ok"] and not ans["rows"] and ans["rows_html"] == ""
