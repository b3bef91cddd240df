"""Commands beyond the calculators: design checks, build sheets, scaffolding."""

from __future__ import annotations

import argparse
import json
import os
import sys
from collections.abc import Mapping, Sequence
from pathlib import Path
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


def _errors(errs: Sequence[Mapping[str, object]], prefix: str) -> int:
    for e in errs:
        print(f"{prefix}: {e['message']}", file=sys.stderr)
    return 2


def run_check(args: argparse.Namespace) -> int:
    from lampcalc.design_api import review

    if len(args.design) > 1 or os.path.isdir(args.design[0]):
        return run_check_set(args)
    args.design = args.design[0]
    text = _read(args.design)
    if text is None:
        return 2
    ans = review(text, waveforms=args.waveforms)
    if ans["ok"] is False:
        rc = _errors(ans["errors"], f"lampbook check {args.design}")
        # a valid design with no periodic steady state is a finding about the design (exit 1),
        # not bad input (exit 2)
        solver = all(not e.get("field") and e["message"].startswith("steady state did not") for e in ans["errors"])
        return 1 if solver else rc
    body = {k: v for k, v in ans.items() if k != "ok"}
    if args.json:
        from lampcalc.api import dumps

        print(dumps(body, indent=2, sort_keys=True, ensure_ascii=False))
    else:
        from .designtext import check_report
        from .report import full_width

        if args.wide:
            with full_width():
                print(check_report(body))
        else:
            print(_fit(check_report(body)))
    return 1 if ans["failed"] else 0


def _design_files(paths: list[str]) -> tuple[list[str], int]:
    """The design files the arguments name (a folder gives its *.toml, in name order), and how many were refused."""
    out: list[str] = []
    bad = 0
    for p in paths:
        if os.path.isdir(p):
            found = sorted(str(x) for x in Path(p).glob("*.toml") if x.is_file())
            if not found:
                print(
                    f"lampbook check: DESIGN: got folder '{p}'; expected design files (*.toml) in it", file=sys.stderr
                )
                bad += 1
            out += found
        else:
            out.append(p)
    return out, bad


def _check_line(path: str, s: dict[str, Any]) -> list[str]:
    from lampcalc.quantities.units import format_value

    def fig(v: Any, kind: str) -> str:
        if v is None:
            return "-"
        return f"{v:.2f}" if kind == "ratio" else format_value(float(v), kind)

    return [
        path,
        str(s["name"]),
        s["verdict"].upper(),
        fig(s["led_current_avg_A"], "current"),
        fig(s["input_power_W"], "power"),
        fig(s["power_factor"], "ratio"),
        ", ".join(s["failed_checks"]) or "-",
    ]


def run_check_set(args: argparse.Namespace) -> int:
    """``lampbook check`` over several files or a folder: one summary line per design and a total."""
    from lampcalc.cautions import MAINS, SHORT

    from .catalogue import check_design, default_jobs, run_all
    from .report import bullets, table

    if args.waveforms:
        print(f"lampbook check: --waveforms: takes one design file; got {len(args.design)} paths", file=sys.stderr)
        return 2
    paths, refused = _design_files(args.design)
    texts: dict[str, str] = {}
    for p in paths:
        text = _read(p)
        if text is None:
            refused += 1
        else:
            texts[p] = text
    names = list(texts)
    results = run_all(check_design, [texts[p] for p in names], jobs=args.jobs or default_jobs())
    items: list[dict[str, Any]] = []
    rows = []
    for p, r in zip(names, results, strict=True):
        if "errors" in r:
            _errors(r["errors"], f"lampbook check {p}")
            refused += 1
            items.append({"design": p, "verdict": "error", "errors": r["errors"]})
            continue
        s = r["summary"]
        items.append({"design": p, **s, **({"caution": SHORT} if s["kind"] != "cv" else {})})
        rows.append(_check_line(p, s))
    counts = {v: sum(1 for it in items if it["verdict"] == v) for v in ("fail", "warn", "pass")}
    if args.json:
        print(json.dumps(items, indent=2, sort_keys=True, ensure_ascii=False))
    else:
        headers = ["design", "name", "verdict", "LED current", "input power", "PF", "failing checks"]
        # one line per design whatever the width: a catalogue is read down its lines
        lines = table(headers, rows, width=None).splitlines()
        # the failing-check list trails unaligned: rule it only as wide as its heading
        lines[1] = lines[1].rsplit("  ", 1)[0] + "  " + "-" * len(headers[-1])
        print("\n".join(lines))
        total = (
            f"\n{len(rows)} design{'s' if len(rows) != 1 else ''} checked: {counts['fail']} fail, "
            f"{counts['warn']} warn, {counts['pass']} pass"
        )
        if refused:
            total += f"; {refused} could not be checked (see the messages above)"
        print(total + ". Figures at nominal supply; exit code 1 when any design fails.")
        if any(it.get("kind") not in (None, "cv") for it in items):
            print("\n" + bullets("CAUTION (mains):", MAINS))
    if refused:
        return 2
    return 1 if counts["fail"] else 0


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


def _jobs(value: str) -> int:
    try:
        n = int(value)
    except ValueError:
        n = -1
    if n < 0:
        raise argparse.ArgumentTypeError(f"got '{value}'; expected a whole number of processes, 0 or more")
    return n


def add(sub: Any) -> None:
    p = sub.add_parser(
        "check",
        help="solve a fixture design at nominal, low and high mains",
        description="Solve a fixture design file (TOML) at nominal mains and at both ends of its tolerance.",
    )
    p.add_argument(
        "design",
        metavar="DESIGN",
        nargs="+",
        help="a design file (TOML); several files or a folder give one summary line per design and a total",
    )
    p.add_argument("--json", action="store_true", help="print one JSON object (a list of summaries for several)")
    p.add_argument("--waveforms", action="store_true", help="include the nominal waveforms in the JSON")
    p.add_argument(
        "--jobs",
        type=_jobs,
        default=0,
        metavar="N",
        help="worker processes for several designs (default 0: as many as the machine has cores; 1 for none)",
    )
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
    from .plancmd import add as add_plan

    add_plan(sub)
