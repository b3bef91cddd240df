"""Plain-text rendering of core answers for the terminal."""

from __future__ import annotations

import textwrap
from collections.abc import Mapping, Sequence
from typing import Any


def table(headers: Sequence[str], rows: Sequence[Sequence[str]]) -> str:
    widths = [len(h) for h in headers]
    for r in rows:
        widths = [max(w, len(c)) for w, c in zip(widths, r)]
    line = "  ".join(h.ljust(w) for h, w in zip(headers, widths))
    out = [line, "  ".join("-" * w for w in widths)]
    out += ["  ".join(c.ljust(w) for c, w in zip(r, widths)) for r in rows]
    return "\n".join(x.rstrip() for x in out)


def bullets(title: str, items: Sequence[str], width: int = 88) -> str:
    if not items:
        return ""
    lines = [title]
    for it in items:
        lines.append(textwrap.fill(it, width, initial_indent="  - ", subsequent_indent="    "))
    return "\n".join(lines)


def answer(desc: Mapping[str, Any], ans: Mapping[str, Any]) -> str:
    """Text for a core answer (``lampcalc.schema.to_json``) given its
    declaration (``lampcalc.schema.describe``)."""
    parts = [desc["title"], "=" * len(desc["title"])]
    pairs = [
        (o["label"], ans["display"][o["name"]]) for o in desc["outputs"] if ans["values"].get(o["name"]) is not None
    ]
    w = max((len(a) for a, _ in pairs), default=0)
    parts.append("\n".join(f"{a.ljust(w)}  {b}" for a, b in pairs))
    cols = [c for c in desc["columns"] if any(r.get(c["name"]) is not None for r in ans["rows"])]
    if ans["rows"] and cols:
        parts.append("")
        parts.append(table([c["label"] for c in cols], [[r[c["name"]] for c in cols] for r in ans["rows_display"]]))
    from lampcalc.cautions import MAINS

    mains = list(ans["cautions"]) == list(MAINS)
    for title, key in (
        ("Warnings:", "warnings"),
        ("Notes:", "notes"),
        ("CAUTION (mains):" if mains else "CAUTION:", "cautions"),
    ):
        block = bullets(title, ans[key])
        if block:
            parts += ["", block]
    return "\n".join(parts)
