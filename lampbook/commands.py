"""Commands beyond the calculators: design checks, build sheets, scaffolding."""

from __future__ import annotations

import argparse
import json
import sys
from typing import Any


def _read(path: str) -> str | None:
    try:
        with open(path, encoding="utf-8") as fh:
            return fh.read()
    except OSError as e:
        print(f"lampbook: DESIGN: cannot read '{path}': {e.strerror}", file=sys.stderr)
        return None


def _errors(errs: list[dict[str, str]], prefix: str) -> int:
    for e in errs:
        print(f"{prefix}: {e['message']}", file=sys.stderr)
    return 2


def run_check(args: argparse.Namespace) -> int:
    from lampcalc.design_api import handle

    text = _read(args.design)
    if text is None:
        return 2
    ans = handle("check", {"toml": text, "waveforms": args.waveforms})
    if not ans["ok"]:
        return _errors(ans["errors"], f"lampbook check {args.design}")
    ans.pop("ok")
    if args.json:
        print(json.dumps(ans, indent=2, sort_keys=True, ensure_ascii=False))
    else:
        from .designtext import check_report

        print(check_report(ans))
    return 0


def add(sub: Any) -> None:
    p = sub.add_parser("check", help="solve a fixture design at nominal, low and high mains",
                       description="Solve a fixture design file (TOML) at nominal mains and at both ends of its tolerance.")  # fmt: skip
    p.add_argument("design", metavar="DESIGN.toml")
    p.add_argument("--json", action="store_true", help="print one JSON object")
    p.add_argument("--waveforms", action="store_true", help="include the nominal waveforms in the JSON")
    p.set_defaults(_run=run_check)
