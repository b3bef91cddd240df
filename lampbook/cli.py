"""The ``lampbook`` command line.

Every calculator's options come from its declaration in the core. The work
lives elsewhere; this module only declares options, calls, and prints.
Bad input: one line naming the field, the value and what is expected, exit 2.
"""

from __future__ import annotations

import argparse
import json
import sys
from collections.abc import Sequence
from typing import Any, NoReturn

from . import __version__


class _Parser(argparse.ArgumentParser):
    def error(self, message: str) -> NoReturn:
        self.exit(2, f"lampbook: {message}\n")


def _option(name: str) -> str:
    return "--" + name.replace("_", "-")


def _add_calculators(sub: Any) -> None:
    from lampcalc.calculators import CALCULATORS

    for calc in CALCULATORS.values():
        p = sub.add_parser(calc.name, help=calc.summary, description=calc.summary)
        for prm in calc.params:
            bits = [prm.label + "."]
            if prm.help:
                bits.append(prm.help)
            if prm.dim in ("choice", "region"):
                from lampcalc.quantities.regions import PRESETS

                choices = prm.choices if prm.dim == "choice" else (*PRESETS, "custom")
                bits.append("One of: " + ", ".join(choices) + ".")
            elif prm.dim not in ("text", "count"):
                from lampcalc.quantities.units import dimension

                expected = dimension(prm.dim).expected
                bits.append(expected[0].upper() + expected[1:] + ".")
            if prm.modes:
                bits.append(f"For {calc.mode} {'/'.join(prm.modes)}.")
            bits.append(f"Default: {prm.default}." if prm.default is not None else "Optional.")
            p.add_argument(
                _option(prm.name),
                dest=prm.name,
                metavar=prm.dim.upper(),
                help=" ".join(bits).replace("%", "%%"),
            )
        p.add_argument("--json", action="store_true", help="print one JSON object instead of the table")
        p.add_argument("--wide", action="store_true", help="use the full width instead of 80 columns")
        p.set_defaults(_run=_run_calculator, _calc=calc.name)


def _run_calculator(args: argparse.Namespace) -> int:
    from lampcalc.api import compute
    from lampcalc.calculators import get
    from lampcalc.schema import describe

    calc = get(args._calc)
    inputs = {p.name: getattr(args, p.name) for p in calc.params if getattr(args, p.name) is not None}
    ans = compute(calc.name, inputs)
    if not ans["ok"]:
        for e in ans["errors"]:
            print(f"lampbook {calc.name}: {_flag_message(e)}", file=sys.stderr)
        return 2
    if args.json:
        print(json.dumps(ans, indent=2, sort_keys=True, ensure_ascii=False))
    else:
        from .report import answer

        print(answer(describe(calc), ans, wide=args.wide))
    return 0


def _flag_message(e: dict[str, str]) -> str:
    field = e.get("field") or ""
    if field and e.get("expected"):
        from lampcalc.errors import printable

        return f"{_option(field)}: got '{printable(e['value'])}'; expected {e['expected']}"
    return e.get("message", "")


def build_parser() -> argparse.ArgumentParser:
    parser = _Parser(
        prog="lampbook",
        description="Calculators for mains-powered LED fixtures built from loose modules. "
        "Values take units: '22 uF', '230 V', '18 AWG', '3.5 ft'.",
    )
    parser.add_argument("--version", action="version", version=f"lampbook {__version__}")
    sub = parser.add_subparsers(dest="command", metavar="COMMAND", parser_class=_Parser)
    _add_calculators(sub)
    from . import commands

    commands.add(sub)
    return parser


def main(argv: Sequence[str] | None = None) -> int:
    parser = build_parser()
    args = parser.parse_args(argv)
    if not getattr(args, "_run", None):
        parser.print_help()
        return 2
    try:
        return int(args._run(args))
    except BrokenPipeError:
        return 0
    except RecursionError:
        print(f"lampbook {args.command}: input nested too deeply to read; expected a flat design file", file=sys.stderr)
        return 2
    except Exception as e:  # one plain line, never a traceback
        print(
            f"lampbook {args.command}: internal error, please report it with the inputs that caused it: "
            f"{type(e).__name__}: {e}",
            file=sys.stderr,
        )
        return 70


if __name__ == "__main__":  # pragma: no cover
    sys.exit(main())
