"""The fixtures index page: every design of the handbook with its verdict and key figures.

The page is complete HTML at build time (worst verdict first, then by name), so it
reads with scripts off and from files with no server. ``catalogue.js`` adds a
filter box, a verdict choice and a sort choice; it reads the figures from the
rows' ``data-`` attributes (plain numbers in SI units), never from generated code.
"""

from __future__ import annotations

import html
from collections.abc import Mapping, Sequence
from dataclasses import dataclass
from typing import Any

from lampcalc.quantities.units import format_value

RANK = {"fail": 0, "warn": 1, "pass": 2}
SORTS = (
    ("verdict", "Verdict, worst first"),
    ("name", "Name"),
    ("led", "LED current"),
    ("power", "Input power"),
    ("pf", "Power factor"),
    ("supply", "Supply voltage"),
)
COLUMNS = ("Fixture", "Verdict", "Checks failing", "LED current", "Input power", "PF", "Supply")


@dataclass(frozen=True)
class IndexRow:
    summary: Mapping[str, Any]
    href: str
    """The sheet, relative to the index page."""
    design: str
    """The design file's name."""


def _e(x: object) -> str:
    return html.escape(str(x), quote=True)


def _num(v: Any) -> str:
    return "" if v is None else repr(float(v))


def _figure(v: Any, kind: str) -> str:
    if v is None:
        return "—"
    if kind == "ratio":
        return f"{float(v):.2f}"
    return format_value(float(v), kind)


def order(rows: Sequence[IndexRow]) -> list[IndexRow]:
    """Worst verdict first, then by name, then by file."""
    return sorted(rows, key=lambda r: (RANK[r.summary["verdict"]], str(r.summary["name"]).casefold(), r.design))


def _row(r: IndexRow) -> str:
    s = r.summary
    v = s["verdict"]
    failing = s["failed_checks"]
    checks = " ".join(f"<code>{_e(c)}</code>" for c in failing) if failing else '<span class="lb-fx-ok">none</span>'
    if s["warned"]:
        checks += f' <span class="lb-fx-warned">· {s["warned"]} warning{"s" if s["warned"] != 1 else ""}</span>'
    supply = _figure(s["supply_voltage_V"], "voltage") + (" DC" if s["kind"] == "cv" else " mains")
    if s["supply_voltage_V"] is None:
        supply = "—"
    find = " ".join([str(s["name"]), r.design, v, *failing, *s["warned_checks"], supply]).casefold()
    attrs = {
        "data-name": str(s["name"]).casefold(),
        "data-verdict": v,
        "data-rank": str(RANK[v]),
        "data-led": _num(s["led_current_avg_A"]),
        "data-power": _num(s["input_power_W"]),
        "data-pf": _num(s["power_factor"]),
        "data-supply": _num(s["supply_voltage_V"]),
        "data-find": find,
    }
    cells = [
        (
            "Fixture",
            f'<a href="{_e(r.href)}">{_e(s["name"])}</a>'
            f'<span class="lb-fx-file">{_e(r.design)}'
            + (f" · rev {_e(s['revision'])}" if s["revision"] else "")
            + "</span>",
        ),
        ("Verdict", f'<span class="lb-st lb-{v}">{v.upper()}</span>'),
        ("Checks failing", checks),
        ("LED current", _figure(s["led_current_avg_A"], "current")),
        ("Input power", _figure(s["input_power_W"], "power")),
        ("PF", _figure(s["power_factor"], "ratio")),
        ("Supply", _e(supply)),
    ]
    a = "".join(f' {k}="{_e(x)}"' for k, x in attrs.items())
    tds = "".join(f'<td data-label="{_e(lab)}">{c}</td>' for lab, c in cells)
    return f"<tr{a}>{tds}</tr>"


def index_markdown(rows: Sequence[IndexRow], title: str = "Fixtures", safety_href: str | None = None) -> str:
    counts = {v: sum(1 for r in rows if r.summary["verdict"] == v) for v in RANK}
    n = len(rows)
    total = (
        f"{n} design{'s' if n != 1 else ''}: {counts['fail']} failing, "
        f"{counts['warn']} with warnings, {counts['pass']} passing."
    )
    link = f' <a href="{_e(safety_href)}">Read the safety page.</a>' if safety_href else ""
    mains = any(r.summary["kind"] != "cv" for r in rows)
    caution = (
        '<p class="lb-caution"><strong>Mains:</strong> no isolation, stored charge. '
        f"Each sheet carries its cautions. Local codes and licensed practice decide.{link}</p>"
        if mains
        else ""
    )
    sort_opts = "".join(f'<option value="{k}">{_e(lab)}</option>' for k, lab in SORTS)
    verdict_opts = (
        '<option value="">All</option><option value="fail">Failing</option>'
        '<option value="warn">Warnings</option><option value="pass">Passing</option>'
    )
    head = "".join(f'<th scope="col">{_e(c)}</th>' for c in COLUMNS)
    body = "".join(_row(r) for r in order(rows))
    controls = (
        '<div class="lb-fx-controls" hidden>'
        '<label class="lb-fx-find">Find <input type="search" placeholder="name, file, check id" '
        'autocomplete="off"></label>'
        f'<label>Verdict <select class="lb-fx-verdict">{verdict_opts}</select></label>'
        f'<label>Sort <select class="lb-fx-sort">{sort_opts}</select></label>'
        '<button type="button" class="lb-fx-dir" aria-pressed="false" title="Reverse the order">'
        "Reverse</button>"
        "</div>"
    )
    table = (
        f'<div class="lb-fixtures" data-total="{n}">{controls}'
        f'<p class="lb-fx-shown" aria-live="polite">{_e(total)}</p>'
        f'<div class="lb-scroll"><table class="lb-fx-table"><thead><tr>{head}</tr></thead>'
        f"<tbody>{body}</tbody></table></div>"
        '<p class="lb-fx-none" hidden>No design matches.</p></div>'
    )
    intro = (
        "Every fixture design in this handbook, reviewed when it was built. The verdict is the worst status "
        "among a design's checks; figures are at nominal supply. Each sheet judges every check at its worst corner."
    )
    return f"# {title}\n\n{intro}\n\n{caution}\n\n{table}\n"
