"""Design requests of the JSON entry point (see :mod:`lampcalc.api`)."""

from __future__ import annotations

from typing import Any, cast

from .errors import CalcError, InputError, error_items
from .fixture.check import check
from .fixture.design import parse_design
from .fixture.tolerance import study
from .present.html import sheet_html
from .present.sheet import build_sheet
from .protocol import CheckAnswer, DesignAnswer, Refusal, StudyAnswer

# The review, the study and the workbench build their answers as plain dicts (the command line's --json
# writes the same ones); the casts below name the shape lampcalc.protocol declares for them, and
# tests/test_protocol.py checks real answers of every kind against those declarations.


def review(toml: str, waveforms: bool = False) -> CheckAnswer | Refusal:
    """A check request's answer: the whole review of one design file."""
    ans = handle("check", {"toml": toml, "waveforms": waveforms})
    return cast(CheckAnswer | Refusal, ans)


def handle(kind: str, req: dict[str, Any]) -> DesignAnswer:
    try:
        if kind == "check":
            d = parse_design(str(req.get("toml", "")))
            return cast(CheckAnswer, {"ok": True, **check(d, waveforms=bool(req.get("waveforms")))})
        if kind == "study":
            d = parse_design(str(req.get("toml", "")))
            return cast(StudyAnswer, {"ok": True, **study(d, samples=req.get("samples"), seed=req.get("seed"))})
        if kind == "sheet":
            d = parse_design(str(req.get("toml", "")))
            ans = check(d, waveforms=True)
            st = study(d)
            return {"ok": True, "name": d.name, "html": sheet_html(build_sheet(d, ans, st)), "failed": ans["failed"]}
        if kind in ("design_schema", "design_doc", "design_toml", "plan"):
            # "ok" says the request was answered: a plan with no passing arrangement is an answer (best is null,
            # constraint says why), not a refusal; the planner's own "ok" must not override it
            return cast(DesignAnswer, {**_workbench(kind, req), "ok": True})
        raise InputError(
            "kind",
            kind,
            "one of describe, compute, sweep, check, study, sheet, design_schema, design_doc, design_toml, plan",
        )
    except CalcError as e:
        return {"ok": False, "errors": error_items(e)}


def _workbench(kind: str, req: dict[str, Any]) -> dict[str, Any]:
    """The design workbench's requests: the schema for its form, a file as form
    values, form values as a file, and the planner on the design in the form."""
    from .fixture import workbench as wb

    if kind == "design_schema":
        return wb.design_schema()
    if kind == "design_doc":
        return {"doc": wb.to_doc(str(req.get("toml", "")))}
    doc = req.get("doc")
    if not isinstance(doc, dict):
        raise InputError("doc", str(doc)[:40], "the design form's values")
    if kind == "design_toml":
        return {"toml": wb.to_toml(doc)}
    options = req.get("options")
    return wb.plan_for(doc, options if isinstance(options, dict) else {})
