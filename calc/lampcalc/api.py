"""The one JSON entry point the browser (and anything else) calls.

``handle(text)`` takes a JSON request and returns a JSON answer; it never
raises for bad input: problems come back as ``{"ok": false, "errors": [...]}``
with the field, the value and what was expected.
"""

from __future__ import annotations

import json
from collections.abc import Mapping
from typing import Any

from .calculators import CALCULATORS, get
from .errors import CalcError, InputError, InputErrors, NoSolutionError
from .schema import describe, evaluate, region_presets, to_json


def _errors(e: CalcError) -> list[dict[str, str]]:
    if isinstance(e, InputErrors):
        return [x.as_dict() for x in e.errors]
    if isinstance(e, (InputError, NoSolutionError)):
        return [e.as_dict()]
    return [{"field": "", "value": "", "expected": "", "message": str(e)}]


def compute(name: str, inputs: Mapping[str, object]) -> dict[str, Any]:
    try:
        calc = get(name)
        return to_json(calc, evaluate(calc, inputs))
    except CalcError as e:
        return {"calculator": name, "ok": False, "errors": _errors(e)}


def handle(text: str) -> str:
    """Request kinds: {"kind": "compute", "calculator": ..., "inputs": {...}},
    {"kind": "describe"} and the design kinds of :mod:`lampcalc.design_api`."""
    try:
        req = json.loads(text)
    except ValueError as e:
        return json.dumps(
            {
                "ok": False,
                "errors": [{"field": "request", "value": text[:80], "expected": "JSON", "message": str(e)}],
            }
        )
    if not isinstance(req, dict):
        return json.dumps(
            {
                "ok": False,
                "errors": [
                    {
                        "field": "request",
                        "value": str(req)[:80],
                        "expected": "a JSON object",
                        "message": "request must be an object",
                    }
                ],
            }
        )
    kind = req.get("kind", "compute")
    if kind == "describe":
        return json.dumps(
            {
                "ok": True,
                "calculators": [describe(c) for c in CALCULATORS.values()],
                "regions": region_presets(),
            },
            sort_keys=True,
        )
    if kind == "compute":
        inputs = req.get("inputs", {})
        if not isinstance(inputs, dict):
            inputs = {}
        return json.dumps(compute(str(req.get("calculator", "")), inputs), sort_keys=True)
    from . import design_api

    return json.dumps(design_api.handle(kind, req), sort_keys=True)
