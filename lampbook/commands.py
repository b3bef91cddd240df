"""Commands beyond the calculators: design checks, build sheets, scaffolding."""

from __future__ import annotations

import argparse
import os
import sys
from typing import Any

#: Largest design file read: a real design is a few kilobytes.
MAX_DESIGN_BYTES = 1_000_000


def _read(path: str) -> str | None:
    try:
        with open(path, "rb") as fh:
            data = fh.read(MAX_DESIGN_BYTES + 1)
    except OSError as e:
        print(f"lampbook: DESIGN: cannot read '{path}': {e.strerror}", file=sys.stderr)
        return None
    if len(data) > MAX_DESIGN_BYTES:
        print(
            f"lampbook: DESIGN: '{path}' is over {MAX_DESIGN_BYTES // 1000} kB; "
            "expected a design file (a few kB of TOML)",
            file=sys.stderr,
        )
        return None
    try:
        return data.decode("utf-8")
    except UnicodeDecodeError as e:
        print(
            f"lampbook: DESIGN: '{path}' is not UTF-8 text (byte {e.start}); expected a TOML design saved as UTF-8",
            file=sys.stderr,
        )
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
        rc = _errors(ans["errors"], f"lampbook check {args.design}")
        # a valid design with no periodic steady state is a finding about the design (exit 1),
        # not bad input (exit 2)
        solver = all(not e.get("field") and e["message"].startswith("steady state did not") for e in ans["errors"])
        return 1 if solver else rc
    ans.pop("ok")
    if args.json:
        from lampcalc.api import dumps

        print(dumps(ans, indent=2, sort_keys=True, ensure_ascii=False))
    else:
        from .designtext import check_report
        from .report import full_width

        if args.wide:
            with full_width():
                print(check_report(ans))
        else:
            print(_fit(check_report(ans)))
    return 1 if ans["failed"] else 0


def _fit(text: str) -> str:
    """Wrap any line still over 80 columns (tables already fit; this catches prose)."""
    import textwrap

    from .report import WIDTH

    out = []
    for line in text.splitlines():
        out.extend(textwrap.wrap(line, WIDTH, subsequent_indent="  ") if len(line) > WIDTH else [line])
    return "\n".join(out)


def run_sheet(args: argparse.Namespace) -> int:
    from .sheets import SheetError, sheet_markdown

    if args.output not in (None, "-") and _same_file(args.output, args.design):
        print(
            f"lampbook: -o: '{args.output}' is the design being read; expected another file for the page",
            file=sys.stderr,
        )
        return 2
    text = _read(args.design)
    if text is None:
        return 2
    try:
        page = sheet_markdown(text, args.design)
    except SheetError as e:
        print(f"lampbook sheet {e}", file=sys.stderr)
        return 2
    if args.output in (None, "-"):
        sys.stdout.write(page)
    else:
        from .atomic import write_atomic

        try:
            write_atomic(args.output, page)
        except OSError as e:
            print(f"lampbook: -o: cannot write '{args.output}': {e.strerror}", file=sys.stderr)
            return 2
    return 0


def _same_file(a: str, b: str) -> bool:
    try:
        return os.path.samefile(a, b)
    except OSError:
        return os.path.abspath(a) == os.path.abspath(b)


def run_new(args: argparse.Namespace) -> int:
    from .scaffold import ScaffoldError, scaffold

    try:
        made = scaffold(args.folder, args.name)
    except ScaffoldError as e:
        print(f"lampbook new: {e}", file=sys.stderr)
        return 2
    print(f"Started a handbook in {made}:")
    print(f"  cd {made} && npm install pyodide@{_pyodide()} && mkdocs build    # then serve the site/ folder")
    return 0


def _pyodide() -> str:
    from .bundle import PYODIDE_VERSION

    return PYODIDE_VERSION


def add(sub: Any) -> None:
    p = sub.add_parser(
        "check",
        help="solve a fixture design at nominal, low and high mains",
        description="Solve a fixture design file (TOML) at nominal mains and at both ends of its tolerance.",
    )
    p.add_argument("design", metavar="DESIGN.toml")
    p.add_argument("--json", action="store_true", help="print one JSON object")
    p.add_argument("--waveforms", action="store_true", help="include the nominal waveforms in the JSON")
    p.add_argument("--wide", action="store_true", help="use the full width instead of 80 columns")
    p.set_defaults(_run=run_check)
    p = sub.add_parser(
        "sheet",
        help="write the build sheet of a fixture design as a Markdown page",
        description=(
            "Write the build sheet of a fixture design (operating table, checks, bill of materials, wiring, schematic)."
        ),
    )
    p.add_argument("design", metavar="DESIGN.toml")
    p.add_argument("-o", "--output", metavar="PAGE.md", help="where to write the page (default: standard output)")
    p.set_defaults(_run=run_sheet)
    p = sub.add_parser(
        "new",
        help="start a handbook of your own",
        description="Scaffold a handbook: mkdocs.yml with the plugin, a first page, a design folder.",
    )
    p.add_argument("folder", metavar="FOLDER")
    p.add_argument("--name", default="Shop handbook", help="the handbook's title")
    p.set_defaults(_run=run_new)
