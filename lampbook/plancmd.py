"""`lampbook plan`: from modules to a reviewed design file."""

from __future__ import annotations

import argparse
import json
import sys
from collections.abc import Mapping, Sequence
from pathlib import Path
from typing import Any

from .atomic import write_atomic
from .report import bullets, table


def _fail(prefix: str, errors: Sequence[Mapping[str, object]]) -> int:
    for e in errors:
        print(f"{prefix}: {e['message']}", file=sys.stderr)
    return 2


def run_plan(args: argparse.Namespace) -> int:
    from lampcalc.errors import CalcError, InputError, InputErrors
    from lampcalc.fixture.plan import parse_spec, plan, stock_file

    prefix = f"lampbook plan {args.spec}"
    spec_path = Path(args.spec)
    try:
        text = spec_path.read_text(encoding="utf-8")
    except (OSError, UnicodeDecodeError) as e:
        print(f"lampbook plan: SPEC: cannot read '{args.spec}': {getattr(e, 'strerror', None) or e}", file=sys.stderr)
        return 2
    try:
        stock_name = stock_file(text)
        stock_text = None
        if stock_name is not None:
            stock_path = spec_path.parent / stock_name
            try:
                stock_text = stock_path.read_text(encoding="utf-8")
            except (OSError, UnicodeDecodeError) as e:
                err = getattr(e, "strerror", None) or str(e)
                raise InputError("stock.file", stock_name, f"a readable parts file ({err})") from None
        result = plan(parse_spec(text, stock_text))
    except InputErrors as e:
        return _fail(prefix, [x.as_dict() for x in e.errors])
    except InputError as e:
        return _fail(prefix, [e.as_dict()])
    except CalcError as e:
        return _fail(prefix, [{"message": str(e)}])
    best = result.best
    if args.output and best is not None:
        out = Path(args.output)
        if out.resolve() == spec_path.resolve():
            print(f"lampbook plan: -o: '{args.output}' is the spec itself; expected a new design file", file=sys.stderr)
            return 2
        try:
            write_atomic(out, best.design_text)
        except OSError as e:
            print(f"lampbook plan: -o: cannot write '{args.output}': {e.strerror}", file=sys.stderr)
            return 2
    if args.json:
        body = result.as_dict()
        if best is not None:
            body["design"] = best.design_text
        print(json.dumps(body, indent=2, sort_keys=True, ensure_ascii=False))
    else:
        print(_report(result.as_dict(), args.output if best is not None else None))
    return 0 if best is not None else 1


def _report(ans: dict[str, Any], written: str | None) -> str:
    from lampcalc.quantities.units import format_value as fv

    rows = []
    for n, p in enumerate(ans["proposals"]):
        f = p["figures"]
        verdict = "rejected" if p["rejected"] else ("fails " + ", ".join(p["failed"]) if p["failed"] else "passes")
        rows.append(
            [
                ("* " if n == ans["best"] else "  ") + f"{p['series']} x {p['parallel']} {p['supply']}",
                fv(f["string_current_worst_A"], "current") if "string_current_worst_A" in f else "-",
                fv(f["input_power_W"], "power") if "input_power_W" in f else "-",
                f"{f['power_factor']:.2f}" if "power_factor" in f else "-",
                f"{f['efficiency']:.0%}" if "efficiency" in f else "-",
                f"{f['percent_flicker_pct']:.1f} %" if "percent_flicker_pct" in f else "-",
                verdict + (f" ({len(p['warned'])} warnings)" if p["warned"] else ""),
            ]
        )
    out = [f"{ans['name']}: {ans['modules']} modules, supply {ans['supply']}", ""]
    out.append(table(["arrangement", "worst string", "input", "PF", "eff.", "flicker", "review"], rows))
    reasons = [f"{p['series']} x {p['parallel']}: {p['rejected']}" for p in ans["proposals"] if p["rejected"]]
    if reasons:
        out += ["", bullets("Rejected before review:", reasons)]
    failing = [
        f"{p['series']} x {p['parallel']}: {cid}: {why}"
        for p in ans["proposals"]
        for cid, why in p.get("failed_why", {}).items()
    ]
    if failing:
        out += ["", bullets("Failed in the review (the planner proposes, the review judges):", failing)]
    if ans["ok"]:
        best = ans["proposals"][ans["best"]]
        warned = f"; warnings: {', '.join(best['warned'])}" if best["warned"] else ""
        out += ["", f"Best: the arrangement marked *; it passed the whole review (no failing check{warned})."]
        if best["hazards"]:
            out.append(
                "Its single-fault analysis finds hazards: "
                + ", ".join(best["hazards"])
                + " (see `lampbook check`; the fuse or a protective part must end them, or change the arrangement)."
            )
        out.append(f"Written to {written}." if written else "Write it with -o DESIGN.toml, then `lampbook sheet`.")
    else:
        out += ["", f"No design: {ans['constraint']}."]
    if ans["notes"]:
        out += ["", bullets("Notes:", ans["notes"])]
    if ans["cautions"]:
        heading = "CAUTION (mains):" if any(p["supply"] == "dropper" for p in ans["proposals"]) else "Cautions:"
        out += ["", bullets(heading, ans["cautions"])]
    return "\n".join(out)


def add(sub: Any) -> None:
    p = sub.add_parser(
        "plan",
        help="propose a reviewed fixture design from modules, mains and a current target",
        description=(
            "Lay out every series/parallel arrangement of the modules, size the parts, run the whole review on "
            "each, and write the best design that passes (never one with a failing check)."
        ),
    )
    p.add_argument("spec", metavar="SPEC.toml")
    p.add_argument("-o", "--output", metavar="DESIGN.toml", help="write the best design here")
    p.add_argument("--json", action="store_true", help="print the proposals as one JSON object")
    p.set_defaults(_run=run_plan)
