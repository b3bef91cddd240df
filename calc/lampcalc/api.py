"""The one JSON entry point the browser (and anything else) calls.

``handle(text)`` takes a JSON request and returns a JSON answer; it never
raises for bad input: problems come back as ``{"ok": false, "errors": [...]}``
with the field, the value and what was expected.
"""

from __future__ import annotations

import json
import math
from collections.abc import Mapping
from typing import Any, cast

from .calculators import CALCULATORS, get
from .errors import CalcError, error_items
from .protocol import ComputeAnswer, DescribeAnswer, Refusal, SweepAnswer
from .schema import Calculator, describe, evaluate, region_presets, sweep, to_json


def compute(name: str, inputs: Mapping[str, object]) -> dict[str, Any]:
    """:func:`answer` as a plain dict, for the build-time callers that read it as one."""
    return cast(dict[str, Any], answer(name, inputs))


def answer(name: str, inputs: Mapping[str, object], html: bool = False) -> ComputeAnswer | Refusal:
    """A compute request's answer; with ``html`` (the page's requests) also its table of options as the
    page shows it (``rows_html``)."""
    try:
        calc = get(name)
        ans = to_json(calc, evaluate(calc, inputs))
    except CalcError as e:
        return {"calculator": name, "ok": False, "errors": error_items(e)}
    if html:
        ans["rows_html"] = options_table(calc, ans)
    return ans


def options_table(calc: Calculator, ans: ComputeAnswer) -> str:
    """The answer's table of options in HTML: the columns that have a value in some row, each cell as the
    answer reads it; "" when there is none."""
    cols = [c for c in calc.columns if any(r.get(c.name) is not None for r in ans["rows"])]
    if not ans["rows"] or not cols:
        return ""
    # here, not on top: a page's engine imports the presentation layer only when a table is drawn
    from .present.html import options_html
    from .present.model import Table, words

    rows = tuple(tuple(words(r[c.name]) for c in cols) for r in ans["rows_display"])
    return options_html(Table(tuple(c.label for c in cols), rows))


def plot_points(name: str, plot: str, inputs: Mapping[str, object]) -> SweepAnswer | Refusal:
    """The points of a calculator's plot in one request (see :func:`lampcalc.schema.sweep`)."""
    try:
        calc = get(name)
        centre, points = sweep(calc, plot, inputs)
    except CalcError as e:
        return {"calculator": name, "ok": False, "errors": error_items(e)}
    return {"ok": True, "calculator": name, "plot": plot, "centre": centre, "points": points}


def describe_all() -> DescribeAnswer:
    return {"ok": True, "calculators": [describe(c) for c in CALCULATORS.values()], "regions": region_presets()}


#: Largest request read (characters) and deepest nesting of arrays and objects.
MAX_REQUEST = 2_000_000
MAX_DEPTH = 64


def refusal(field: str, value: str, expected: str, message: str) -> Refusal:
    return {"ok": False, "errors": [{"field": field, "value": value, "expected": expected, "message": message}]}


def _refusal(field: str, value: str, expected: str, message: str) -> str:
    return json.dumps(refusal(field, value, expected, message))


def _too_deep(text: str) -> bool:
    """Whether brackets nest deeper than MAX_DEPTH outside strings (checked
    before parsing, so a hostile request costs one pass, not the stack)."""
    depth = 0
    in_str = esc = False
    for ch in text:
        if in_str:
            if esc:
                esc = False
            elif ch == "\\":
                esc = True
            elif ch == '"':
                in_str = False
        elif ch == '"':
            in_str = True
        elif ch in "[{":
            depth += 1
            if depth > MAX_DEPTH:
                return True
        elif ch in "]}":
            depth -= 1
    return False


def finite_json(obj: Any, path: str = "", found: list[str] | None = None) -> Any:
    """``obj`` with every NaN or infinite float replaced by None; the paths of
    the replaced values are appended to ``found``. Strict JSON parsers read the
    result."""
    if isinstance(obj, float) and not math.isfinite(obj):
        if found is not None:
            found.append(path or "(value)")
        return None
    if isinstance(obj, dict):
        return {k: finite_json(v, f"{path}.{k}" if path else str(k), found) for k, v in obj.items()}
    if isinstance(obj, (list, tuple)):
        return [finite_json(v, f"{path}[{i}]", found) for i, v in enumerate(obj)]
    return obj


def dumps(obj: Mapping[str, Any], **kw: Any) -> str:
    """Strict JSON: an unbounded or undefined number becomes null, and its path
    is listed under "unbounded" with a note saying what null means there."""
    found: list[str] = []
    clean = finite_json(obj, "", found)
    if found:
        clean["unbounded"] = found
        notes = clean.get("notes")
        note = "null in the JSON marks a quantity that is unbounded or not defined here: " + ", ".join(found[:8])
        if isinstance(notes, list):
            notes.append(note)
        else:
            clean.setdefault("json_note", note)
    return json.dumps(clean, allow_nan=False, **kw)


def handle(text: str) -> str:
    """Request kinds: {"kind": "compute", "calculator": ..., "inputs": {...}},
    {"kind": "sweep", "calculator": ..., "plot": ..., "inputs": {...}},
    {"kind": "describe"} and the design kinds of :mod:`lampcalc.design_api`.
    :mod:`lampcalc.protocol` declares every request and answer."""
    if not isinstance(text, str):
        return _refusal("request", type(text).__name__, "JSON text", "request must be JSON text")
    if len(text) > MAX_REQUEST:
        return _refusal(
            "request", f"{len(text)} characters", f"at most {MAX_REQUEST} characters", "request is too large"
        )
    if _too_deep(text):
        return _refusal("request", text[:80], f"JSON nested at most {MAX_DEPTH} deep", "request is nested too deeply")
    try:
        return _handle(text)
    except RecursionError:
        return _refusal("request", text[:80], f"JSON nested at most {MAX_DEPTH} deep", "request is nested too deeply")
    except Exception as e:  # the page must get an answer, never a dead worker
        return _refusal(
            "",
            "",
            "",
            f"internal error, please report it with the inputs that caused it: {type(e).__name__}: {e}",
        )


def _handle(text: str) -> str:
    try:
        req = json.loads(text, parse_constant=_no_constant)
    except ValueError as e:
        return json.dumps(refusal("request", text[:80], "JSON", str(e)))
    if not isinstance(req, dict):
        return json.dumps(refusal("request", str(req)[:80], "a JSON object", "request must be an object"))
    kind = req.get("kind", "compute")
    if kind == "describe":
        return dumps(describe_all(), sort_keys=True)
    if kind in ("compute", "sweep"):
        inputs = req.get("inputs", {})
        if not isinstance(inputs, dict):
            inputs = {}
        name = str(req.get("calculator", ""))
        if kind == "sweep":
            return dumps(plot_points(name, str(req.get("plot", "")), inputs), sort_keys=True)
        return dumps(answer(name, inputs, html=True), sort_keys=True)
    from . import design_api

    bad = _study_options(req)
    if bad:
        return bad
    return dumps(design_api.handle(str(kind), req), sort_keys=True)


def _study_options(req: Mapping[str, Any]) -> str | None:
    """``samples`` and ``seed`` of a study request: whole numbers in bounds, or
    one refusal naming the field (the work a request may ask for is bounded)."""
    from .fixture.design import MAX_SAMPLES

    for name, lo, hi in (("samples", 1, MAX_SAMPLES), ("seed", 0, 2**63 - 1)):
        x = req.get(name)
        if x is None:
            continue
        if isinstance(x, bool) or not isinstance(x, int) or not lo <= x <= hi:
            shown = str(x)[:40]
            expected = f"a whole number from {lo} to {hi}"
            return dumps(refusal(name, shown, expected, f"{name}: got {shown}; expected {expected}"))
    return None


def _no_constant(name: str) -> float:
    raise ValueError(f"{name} is not a number JSON allows")
