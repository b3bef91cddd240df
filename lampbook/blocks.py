"""Calculator blocks: find them in Markdown, check them, render their forms."""

from __future__ import annotations

import html
import json
import re
from dataclasses import dataclass, field

from lampcalc.api import answer
from lampcalc.calculators import CALCULATORS
from lampcalc.protocol import CalculatorBlock, ComputeAnswer
from lampcalc.schema import Param, describe, region_presets

from .workbench import WorkbenchError, render_workbench

# An opening fence as Markdown reads one: at most three spaces of indent (four make an
# indented code block), three or more backticks or tildes, then the info word.
_OPEN = re.compile(r"^(?P<indent> {0,3})(?P<mark>`{3,}|~{3,})[ \t]*(?P<word>[^\s`]*)[^`]*$")


def fenced_blocks(markdown: str) -> list[tuple[int, int, str, str]]:
    """Top-level fenced code blocks as ``(first_line, end_line, word, body)``
    (end exclusive). A fence inside another fence or inside an indented code
    block is content, not a block: an example of a calculator block in a page
    stays an example."""
    lines = markdown.split("\n")
    out = []
    i = 0
    while i < len(lines):
        line = lines[i]
        m = _OPEN.match(line)
        if m is None:
            i += 1
            continue
        mark = m.group("mark")
        close = re.compile(rf"^ {{0,3}}{re.escape(mark[0])}{{{len(mark)},}}[ \t]*$")
        j = i + 1
        while j < len(lines) and not close.match(lines[j]):
            j += 1
        if j < len(lines):
            out.append((i, j + 1, m.group("word"), "\n".join(lines[i + 1 : j]) + "\n"))
        i = j + 1
    return out


class BlockError(ValueError):
    def __init__(self, index: int, key: str, message: str) -> None:
        self.index, self.key = index, key
        super().__init__(f"calculator block {index}: {key}: {message}")


@dataclass
class Block:
    index: int
    calculator: str
    inputs: dict[str, str] = field(default_factory=dict)
    locked: tuple[str, ...] = ()
    title: str | None = None


def parse_block(index: int, body: str) -> Block:
    calc = None
    inputs: dict[str, str] = {}
    locked: tuple[str, ...] = ()
    title = None
    for n, raw in enumerate(body.splitlines(), 1):
        line = raw.strip()
        if not line or line.startswith("#"):
            continue
        if ":" not in line:
            raise BlockError(index, f"line {n}", f"expected 'key: value', got {line!r}")
        key, value = (p.strip() for p in line.split(":", 1))
        if key == "calculator":
            calc = value
        elif key == "lock":
            locked = tuple(v.strip() for v in value.split(",") if v.strip())
        elif key == "title":
            title = value
        else:
            inputs[key] = value
    if calc is None:
        raise BlockError(index, "calculator", "missing; expected one of " + ", ".join(CALCULATORS))
    if calc not in CALCULATORS:
        raise BlockError(index, "calculator", f"got {calc!r}; expected one of " + ", ".join(CALCULATORS))
    known = {p.name for p in CALCULATORS[calc].params}
    for k in (*inputs, *locked):
        if k not in known:
            raise BlockError(index, k, f"not an input of {calc}; expected one of " + ", ".join(sorted(known)))
    _answer(index, calc, inputs)
    return Block(index, calc, inputs, locked, title)


def _answer(index: int, calc: str, inputs: dict[str, str]) -> ComputeAnswer:
    """The block's answer from the core's typed entry point; a refusal is the block's error."""
    ans = answer(calc, inputs, html=True)
    if not ans["ok"]:
        e = ans["errors"][0]
        raise BlockError(
            index,
            e["field"] or "inputs",
            f"got {e['value']}; expected {e['expected']}" if e["expected"] else e["message"],
        )
    return ans


def _esc(s: object) -> str:
    return html.escape(str(s), quote=True)


def render(block: Block, safety_url: str | None) -> str:
    """The form, its prerendered answer and its declaration as JSON."""
    calc = CALCULATORS[block.calculator]
    desc = describe(calc)
    ans = _answer(block.index, calc.name, block.inputs)
    bid = f"lb-{block.calculator}-{block.index}"
    mode_value = block.inputs.get(calc.mode, calc.param(calc.mode).default) if calc.mode else None
    all_modes = " ".join(calc.param(calc.mode).choices) if calc.mode else ""
    rows: list[tuple[Param, str, bool, str]] = []
    folded: list[tuple[Param, str, bool, str]] = []
    for p in calc.params:
        value = block.inputs.get(p.name, p.default or "")
        attrs = f'name="{_esc(p.name)}" id="{bid}-{_esc(p.name)}" data-default="{_esc(value)}"'
        if p.imperial:
            attrs += f' data-imperial="{_esc(p.imperial)}"'
        if p.name in block.locked:
            attrs += " readonly"
        hidden = bool(p.modes) and mode_value not in p.modes
        if p.dim in ("choice", "region"):
            presets = region_presets()
            opts = p.choices if p.dim == "choice" else (*presets, "custom")
            label = {k: str(v["label"]) for k, v in presets.items()} if p.dim == "region" else {}
            ctl = (
                f"<select {attrs}>"
                + "".join(
                    f'<option value="{_esc(o)}"{" selected" if o == value else ""}>{_esc(label.get(o, o))}</option>'
                    for o in opts
                )
                + "</select>"
            )
        else:
            ph = (
                "from preset"
                if p.name in ("mains_voltage", "frequency", "mains_tolerance")
                else ("optional" if p.optional else "")
            )
            ctl = (
                '<input type="text" inputmode="text" autocomplete="off" spellcheck="false" '
                f'{attrs} value="{_esc(value)}" placeholder="{ph}">'
            )
        # every field of a calculator with modes carries the modes it serves
        serves = " ".join(p.modes) if p.modes else all_modes
        modes = f' data-modes="{_esc(serves)}"' if serves else ""
        html_field = (
            f'<div class="lb-field"{modes}{" hidden" if hidden else ""}>'
            f'<label for="{bid}-{_esc(p.name)}">{_esc(p.label)}</label>'
            f'{ctl}<small class="lb-help">{_esc(p.help)}</small><small class="lb-err" role="alert"></small></div>'
        )
        (folded if p.name in calc.secondary else rows).append((p, value, hidden, html_field))
    form_html = "".join(h for *_, h in rows)
    if folded:
        shown = [f"{p.label} {v or 'blank'}" for p, v, hid, _ in folded if not hid]
        form_html += (
            '<details class="lb-more"><summary><span class="lb-more-title">More inputs</span> '
            f'<span class="lb-more-values">{_esc(" · ".join(shown))}</span></summary>'
            f'<div class="lb-more-body">{"".join(h for *_, h in folded)}</div></details>'
        )
    main = [o for o in calc.outputs if o.name in calc.main]
    pin = "".join(
        f'<div class="lb-pin-item" data-pin="{_esc(o.name)}"{"" if o.name in ans["applies"] else " hidden"}>'
        f'<span class="lb-pin-label">{_esc(o.label)}</span>'
        f'<span class="lb-pin-value">{_esc(ans["display"][o.name])}</span></div>'
        for o in main
    )
    outs = []
    for o in calc.outputs:
        reads = ans["display"][o.name]
        outs.append(
            f'<tr data-out="{_esc(o.name)}"{"" if o.name in ans["applies"] else " hidden"}'
            # words wrap; a number with its unit never does
            + (
                ' class="lb-text">'
                if o.dim == "text"
                else (' class="lb-na">' if ans["values"].get(o.name) is None else ">")
            )
            + f"<th>{_esc(o.label)}</th><td>{_esc(reads)}</td></tr>"
        )
    has_imperial = any(p.imperial for p in calc.params)
    caution = ""
    if calc.mains or calc.mains_modes:
        link = f' <a href="{_esc(safety_url)}">Read the safety page.</a>' if safety_url else ""
        when = "" if calc.mains else f" (when {calc.mode} is {' or '.join(calc.mains_modes)})"
        caution = (
            f'<p class="lb-caution"><strong>Mains{_esc(when)}:</strong> no isolation, stored charge. '
            f"Local codes and licensed practice decide.{link}</p>"
        )
    title = block.title or calc.title
    data: CalculatorBlock = {"id": bid, "calculator": calc.name, "declaration": desc, "answer": ans}
    payload = json.dumps(data, sort_keys=True, ensure_ascii=False)
    payload = payload.replace("</", "<\\/")
    return (
        f'<div class="lb-calc" id="{bid}" data-calculator="{_esc(calc.name)}">\n'
        f'<div class="lb-head"><h3 class="lb-title">{_esc(title)}</h3>'
        '<span class="lb-engine" aria-live="polite">answers computed at build time</span></div>\n'
        f'<p class="lb-summary">{_esc(calc.summary)}</p>\n'
        + (f'<div class="lb-pin" aria-live="polite">{pin}</div>\n' if pin else "")
        + f'<form class="lb-form" autocomplete="off" onsubmit="return false">{form_html}'
        + (
            '<div class="lb-tools"><button type="button" class="lb-units" data-system="metric">'
            "Imperial units</button></div>"
            if has_imperial
            else ""
        )
        + "</form>\n"
        f'<div class="lb-result"><table class="lb-out"><tbody>{"".join(outs)}</tbody></table>'
        f'<div class="lb-rows">{ans.get("rows_html", "")}</div><div class="lb-plot"></div>'
        f'<ul class="lb-warn">{"".join(f"<li>{_esc(w)}</li>" for w in ans["warnings"])}</ul>'
        '<details class="lb-notes"><summary>How this is worked out</summary>'
        f"<ul>{''.join(f'<li>{_esc(n)}</li>' for n in ans['notes'])}</ul></details>"
        f'<p class="lb-share"><a class="lb-link" href="?lb={bid}#{bid}">Link to these inputs</a></p></div>\n'
        f"{caution}\n"
        # inside a template: the theme's page changes re-create every script in the content as plain JavaScript
        f'<template class="lb-tpl"><script type="application/json" class="lb-data">{payload}</script></template>\n'
        "</div>\n"
    )


def render_table(index: int, body: str) -> str:
    from lampcalc.cautions import UNVERIFIED_NOTE, daggered
    from lampcalc.present.html import keep_numbers, table_html
    from lampcalc.present.model import Table, words
    from lampcalc.present.tables import TABLES

    opts = {}
    for raw in body.splitlines():
        if raw.strip() and ":" in raw:
            k, v = (p.strip() for p in raw.split(":", 1))
            opts[k] = v
    name = opts.pop("table", None)
    if name not in TABLES:
        raise BlockError(index, "table", f"got {name!r}; expected one of " + ", ".join(TABLES))
    if opts:
        raise BlockError(index, next(iter(opts)), "tables take only 'table'")
    t = TABLES[name]()
    # a limit recalled rather than read against its standard: a dagger in its cell or source, one note below
    marked: list[bool] = []

    def shown(text: str) -> str:
        out, unverified = daggered(text)
        marked.append(unverified)
        return keep_numbers(out)

    grid = Table(t.headers, tuple(tuple(words(shown(c)) for c in r) for r in t.rows))
    src = "".join(f"<li>{_esc(shown(x))}</li>" for x in t.sources)
    if any(marked):
        src += f'<li class="lb-unverified">{_esc(UNVERIFIED_NOTE)}</li>'
    return (
        f'<div class="lb-reftable" data-table="{_esc(name)}">'
        f'<p class="lb-tabletitle"><strong>{_esc(t.title)}</strong></p>'
        f"{table_html(grid)}"
        f'<ul class="lb-sources">{src}</ul></div>'
    )


OPEN_DESIGN = (
    '<div class="lb-open"><p><label>Open a design file (.toml) from this device: '
    '<input type="file" class="lb-open-file" accept=".toml,text/plain"></label></p>'
    '<p class="lb-small">The file is read here in the page and stays on this device; nothing is uploaded.</p>'
    '<ul class="lb-open-err lb-warn"></ul><div class="lb-open-out"></div></div>'
)


def replace_blocks(markdown: str, fence: str, safety_url: str | None) -> tuple[str, int]:
    count = 0
    lines = markdown.split("\n")
    out: list[str] = []
    pos = 0
    for start, end, word, body in fenced_blocks(markdown):
        if word not in (fence, fence + "-table", fence + "-open", fence + "-workbench"):
            continue
        count += 1
        if word == fence + "-table":
            html = render_table(count, body)
        elif word == fence + "-open":
            html = OPEN_DESIGN
        elif word == fence + "-workbench":
            try:
                html = render_workbench(count, body)
            except WorkbenchError as e:
                raise BlockError(count, "workbench", str(e)) from None
        else:
            html = render(parse_block(count, body), safety_url)
        out += lines[pos:start]
        out += ["", html, ""]
        pos = end
    out += lines[pos:]
    return "\n".join(out), count
