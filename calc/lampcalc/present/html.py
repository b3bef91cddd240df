"""HTML for sheet models (:mod:`lampcalc.present.model`), and the one table renderer.

The classes named ``lb-*`` are lampbook's own (its stylesheet styles them). What
belongs to the site's theme (the boxes cautions sit in, the page's background
colour) comes from the caller as an :class:`HtmlTheme`; the default names only
lampbook's own classes and plain colours. Everything is escaped here: a model's
text is words, never markup.
"""

from __future__ import annotations

import html
import re
from dataclasses import dataclass

from .model import (
    Block,
    Bullets,
    Caution,
    Cell,
    CheckList,
    Figure,
    Paragraph,
    Section,
    Severity,
    Sheet,
    Table,
    Text,
    Verdict,
)


@dataclass(frozen=True)
class HtmlTheme:
    """The theme's names the sheet uses, from the caller."""

    danger: str = "lb-box lb-danger"
    """Classes of the box for a mains caution."""
    warning: str = "lb-box lb-warning"
    """Classes of the box for a caution short of mains."""
    box_title: str = "lb-box-title"
    """Class of a caution box's title."""
    background: str = "var(--lb-paper, #fff)"
    """CSS colour of the page behind a figure (a CSS variable of the theme, with a fallback, is fine).
    The default is lampbook's own variable, which its stylesheet sets from the theme."""

    def __post_init__(self) -> None:
        # the colour goes into a <style> element: a value that could close the rule or the element is refused
        if any(ch in self.background for ch in '<>{};"'):
            raise ValueError(
                f"background: got {self.background!r}; expected a CSS colour such as #fff or var(--x, #fff)"
            )

    def caution(self, severity: Severity) -> str:
        return self.danger if severity == "danger" else self.warning


_NUMBER_UNIT = re.compile(r"(\d) (?=(?:[pnµumkMG]?(?:VA|V|A|W|Ω|F|Hz|s|J|h)|%|°C|°F|mm²|AWG)(?![\w]))")


def keep_numbers(text: str) -> str:
    """A number and its unit are joined by a no-break space, so a narrow line never splits them."""
    return _NUMBER_UNIT.sub("\\1\u00a0", text)


def _e(x: object) -> str:
    """Escaped for an attribute value."""
    return html.escape(str(x), quote=True)


def _t(x: object) -> str:
    """Escaped for text between tags (quotes may stay as they are there)."""
    return html.escape(str(x), quote=False)


_TAGS = {"strong": "strong", "em": "em", "code": "code"}


def inline(t: Text) -> str:
    out = []
    for s in t:
        if s.style == "break":
            out.append("<br>")
        elif s.style in _TAGS:
            out.append(f"<{_TAGS[s.style]}>{_t(s.text)}</{_TAGS[s.style]}>")
        else:
            out.append(_t(s.text))
    return "".join(out)


def cell_html(c: Cell) -> str:
    if c.kind == "status" and c.status is not None:
        return f'<span class="lb-st lb-{c.status}">{inline(c.text)}</span>'
    return inline(c.text)


def table_html(t: Table) -> str:
    """A table; too wide for a phone it becomes labelled cards there (the page labels each cell with its
    column), while a compact one (short numbers) stays a grid."""
    head = "".join(f"<th>{_t(h)}</th>" for h in t.headers)
    body = "".join("<tr>" + "".join(f"<td>{cell_html(c)}</td>" for c in r) + "</tr>" for r in t.rows)
    kind = "lb-table lb-compact" if t.compact else "lb-table lb-cards"
    return (
        f'<div class="lb-scroll"><table class="{kind}"><thead><tr>{head}</tr></thead>'
        f"<tbody>{body}</tbody></table></div>"
    )


def options_html(t: Table) -> str:
    """A calculator's table of options, folded away (the chosen option is in the answers above it); the
    page inserts it as the engine sends it."""
    return f'<details class="lb-options"><summary>Every option ({len(t.rows)})</summary>{table_html(t)}</details>'


def figure_html(f: Figure, theme: HtmlTheme) -> str:
    paper = "".join(f".{c}{{fill:{theme.background};stroke:none}}" for c in f.paper)
    cls = "lb-schematic" if f.kind == "schematic" else "lb-fig"
    return (
        f'<figure class="{cls}"><svg viewBox="0 0 {f.width:g} {f.height:g}" role="img" aria-label="{_e(f.label)}">'
        f"<style>{f.style}{paper}</style>{f.svg}</svg><figcaption>{_t(f.caption)}</figcaption></figure>"
    )


def checks_html(cl: CheckList) -> str:
    """Checks as a list: status and id on one line, the finding, why and source on demand."""
    items = []
    for c in cl.items:
        items.append(
            f'<li class="lb-check lb-{c.status}"><div class="lb-check-head">'
            f'<span class="lb-st lb-{c.status}">{_t(c.status.upper())}</span> '
            f"<code>{_t(c.id)}</code></div>"
            f'<p class="lb-check-finding">{_t(keep_numbers(c.finding))}'
            + (f"<br>Would pass: {_t(keep_numbers(c.would_pass))}" if c.would_pass else "")
            + "</p>"
            f"<details><summary>Why and source</summary><p>{_t(keep_numbers(c.why))}</p>"
            f'<p class="lb-cite">Source: {_t(keep_numbers(c.source))}</p></details></li>'
        )
    return '<ul class="lb-checklist">' + "".join(items) + "</ul>"


_ROLE = {"body": "", "meta": ' class="lb-meta"', "aside": ' class="lb-small"', "unverified": ' class="lb-unverified"'}


def block_html(b: Block, theme: HtmlTheme) -> str:
    if isinstance(b, Section):
        return "\n".join([f"<h{b.level}>{_t(b.heading)}</h{b.level}>", *(block_html(x, theme) for x in b.blocks)])
    if isinstance(b, Paragraph):
        return f"<p{_ROLE[b.role]}>{inline(b.text)}</p>"
    if isinstance(b, Verdict):
        return f'<p class="lb-verdict lb-{b.status}">{inline(b.text)}</p>'
    if isinstance(b, Caution):
        return (
            f'<div class="{_e(theme.caution(b.severity))}"><p class="{_e(theme.box_title)}">{_t(b.title)}</p><ul>'
            + "".join(f"<li>{inline(x)}</li>" for x in b.items)
            + "</ul></div>"
        )
    if isinstance(b, Bullets):
        return "<ul>" + "".join(f"<li>{inline(x)}</li>" for x in b.items) + "</ul>"
    if isinstance(b, Table):
        return table_html(b)
    if isinstance(b, Figure):
        return figure_html(b, theme)
    return checks_html(b)


def sheet_html(sheet: Sheet, theme: HtmlTheme | None = None) -> str:
    """The sheet body (everything below its title), one element per line."""
    theme = theme or HtmlTheme()
    return "\n".join(['<div class="lb-sheet" markdown="0">', *(block_html(b, theme) for b in sheet.blocks), "</div>"])


def markdown_page(sheet: Sheet, theme: HtmlTheme | None = None) -> str:
    """A Markdown page: the title as its heading, the body as HTML that Markdown passes through."""
    return f"# {sheet.title}\n\n" + sheet_html(sheet, theme) + "\n"
