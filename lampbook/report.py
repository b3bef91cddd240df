"""Plain-text rendering of core answers and sheet models for the terminal."""

from __future__ import annotations

import contextlib
import textwrap
from collections.abc import Iterator, Mapping, Sequence
from typing import TYPE_CHECKING, Any

if TYPE_CHECKING:
    from lampcalc.present.model import Block, CheckItem, Sheet, Text

#: Terminal width the report keeps to unless asked for full width.
WIDTH = 80


_full_width = False


@contextlib.contextmanager
def full_width() -> Iterator[None]:
    """Within this block tables and notes use the full width (``--wide``)."""
    global _full_width
    old, _full_width = _full_width, True
    try:
        yield
    finally:
        _full_width = old


def _limit(width: int | None) -> int | None:
    return None if _full_width else width


def table(headers: Sequence[str], rows: Sequence[Sequence[str]], width: int | None = WIDTH) -> str:
    """Rows under their headers, within ``width`` columns (None: no limit): a
    long last column wraps under itself; when even that cannot fit, each row is
    stacked as one "header  value" line per column."""
    width = _limit(width)
    widths = [len(h) for h in headers]
    for r in rows:
        widths = [max(w, len(c)) for w, c in zip(widths, r)]
    if width is not None and sum(widths) + 2 * (len(widths) - 1) > width:
        lead = sum(widths[:-1]) + 2 * (len(widths) - 1)
        if len(widths) > 1 and width - lead >= 30:
            return _wrapped_last(headers, rows, widths[:-1], width - lead)
        return stacked(headers, rows, width)
    line = "  ".join(h.ljust(w) for h, w in zip(headers, widths))
    out = [line, "  ".join("-" * w for w in widths)]
    out += ["  ".join(c.ljust(w) for c, w in zip(r, widths)) for r in rows]
    return "\n".join(x.rstrip() for x in out)


def _wrapped_last(headers: Sequence[str], rows: Sequence[Sequence[str]], lead: Sequence[int], last: int) -> str:
    widths = [*lead, min(last, max(len(headers[-1]), *(len(r[-1]) for r in rows)))]
    out = ["  ".join(h.ljust(w) for h, w in zip(headers, widths)), "  ".join("-" * w for w in widths)]
    indent = " " * (sum(lead) + 2 * len(lead))
    for r in rows:
        pieces = textwrap.wrap(r[-1], last) or [""]
        out.append("  ".join(c.ljust(w) for c, w in zip(r[:-1], lead)) + "  " + pieces[0])
        out += [indent + p for p in pieces[1:]]
    return "\n".join(x.rstrip() for x in out)


def stacked(headers: Sequence[str], rows: Sequence[Sequence[str]], width: int) -> str:
    w = max((len(h) for h in headers), default=0)
    blocks = []
    for r in rows:
        lines = []
        for h, c in zip(headers, r):
            lines.append(
                textwrap.fill(c, width, initial_indent=f"{h.ljust(w)}  ", subsequent_indent=" " * (w + 2)) if c else h
            )
        blocks.append("\n".join(lines))
    return "\n\n".join(blocks)


def pair_lines(pairs: Sequence[tuple[str, str]], width: int | None = None) -> str:
    w = max((len(a) for a, _ in pairs), default=0)
    if width is None:
        return "\n".join(f"{a.ljust(w)}  {b}" for a, b in pairs)
    if w + 2 + 20 > width:
        w = min(w, width // 2)
    out = []
    for a, b in pairs:
        head = a.ljust(w) + "  "
        if len(head) > width // 2 + 2:
            out.append(textwrap.fill(a, width))
            head = " " * 4
        out.append(textwrap.fill(b, width, initial_indent=head, subsequent_indent=" " * len(head)))
    return "\n".join(out)


def bullets(title: str, items: Sequence[str], width: int = WIDTH - 2) -> str:
    if not items:
        return ""
    if _full_width:
        width = 10_000
    lines = [title]
    for it in items:
        lines.append(textwrap.fill(it, width, initial_indent="  - ", subsequent_indent="    "))
    return "\n".join(lines)


def answer(desc: Mapping[str, Any], ans: Mapping[str, Any], wide: bool = False) -> str:
    """Text for a core answer (``lampcalc.schema.to_json``) given its
    declaration (``lampcalc.schema.describe``); within 80 columns unless ``wide``."""
    width = None if wide else WIDTH
    parts = [desc["title"], "=" * len(desc["title"])]
    pairs = [(o["label"], ans["display"][o["name"]]) for o in desc["outputs"] if o["name"] in ans["applies"]]
    parts.append(pair_lines(pairs, width))
    cols = [c for c in desc["columns"] if any(r.get(c["name"]) is not None for r in ans["rows"])]
    if ans["rows"] and cols:
        parts.append("")
        parts.append(
            table([c["label"] for c in cols], [[r[c["name"]] for c in cols] for r in ans["rows_display"]], width)
        )
    from lampcalc.cautions import MAINS

    mains = list(ans["cautions"]) == list(MAINS)
    for title, key in (
        ("Warnings:", "warnings"),
        ("Notes:", "notes"),
        ("CAUTION (mains):" if mains else "CAUTION:", "cautions"),
    ):
        block = bullets(title, ans[key], (width or 10_000) - 2)
        if block:
            parts += ["", block]
    return "\n".join(parts)


# --- sheet models (lampcalc.present.model) as plain text ------------------------------------


def _words(t: Text) -> str:
    from lampcalc.present.model import plain

    return plain(t)


def _para(t: Text) -> str:
    """A paragraph: each of its lines kept within the width, wrapped lines indented under it."""
    width = _limit(WIDTH)
    out = []
    for line in _words(t).split("\n"):
        out.extend(textwrap.wrap(line, width, subsequent_indent="  ") if width and len(line) > width else [line])
    return "\n".join(out)


def block_text(b: Block) -> str:
    """One block of a sheet model as plain text."""
    from lampcalc.present import model as m

    if isinstance(b, m.Section):
        return _titled(b.heading, "-" if b.level == 2 else "~", b.blocks)
    if isinstance(b, (m.Paragraph, m.Verdict)):
        return _para(b.text)
    if isinstance(b, m.Caution):
        return bullets(b.title, [_words(x) for x in b.items])
    if isinstance(b, m.Bullets):
        return "\n".join(
            textwrap.fill(_words(x), _limit(WIDTH - 2) or 10_000, initial_indent="  - ", subsequent_indent="    ")
            for x in b.items
        )
    if isinstance(b, m.Table):
        return table(b.headers, [[_words(c.text).replace("\n", "; ") for c in r] for r in b.rows])
    if isinstance(b, m.Figure):
        return _para(m.text(f"[{b.kind}: {b.caption}]"))
    return "\n\n".join(_check_text(c) for c in b.items)


def _check_text(c: CheckItem) -> str:
    """A check: status and id, then its finding, what would pass, why and its source, indented."""
    width = _limit(WIDTH) or 10_000
    lines = [f"{c.status.upper()}  {c.id}"]
    for head, body in (("", c.finding), ("Would pass: ", c.would_pass), ("Why: ", c.why), ("Source: ", c.source)):
        if body:
            lines.append(textwrap.fill(head + body, width, initial_indent="  ", subsequent_indent="    "))
    return "\n".join(lines)


def _titled(title: str, rule: str, blocks: Sequence[Block]) -> str:
    """A title underlined, its blocks under it, a blank line between blocks."""
    return f"{title}\n{rule * len(title)}\n" + "\n\n".join(block_text(b) for b in blocks)


def sheet_text(sheet: Sheet) -> str:
    """A sheet model as plain text: its title underlined, its blocks apart by a blank line,
    within 80 columns unless full width was asked for."""
    return _titled(sheet.title, "=", sheet.blocks)
