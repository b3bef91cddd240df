"""The build sheet as data: what a sheet says, with no markup in it.

A :class:`Sheet` is a title and a sequence of blocks; sections hold blocks of
their own. Text is a tuple of :class:`Span`\\ s (plain, strong, emphasis, code or
a line break), so a renderer decides how each is shown. Tables carry a kind per
cell (a number, running text, or a status). Figures are SVG drawings whose
colours are their own; a class listed in :attr:`Figure.paper` is painted in the
page's background colour, which the renderer takes from its theme.

Renderers: :mod:`lampcalc.present.html` (HTML for the handbook and the page)
and the terminal's plain text in ``lampbook.report``.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Literal, TypeAlias

Style = Literal["plain", "strong", "em", "code", "break"]
Status = Literal["pass", "warn", "fail"]
CellKind = Literal["number", "text", "status"]
Severity = Literal["danger", "warning"]
Role = Literal["body", "meta", "aside", "unverified"]
"""A paragraph's part in the sheet: running text, the revision line, fine print
(method and sources), or the note that explains the daggers."""


@dataclass(frozen=True)
class Span:
    text: str
    style: Style = "plain"


Text: TypeAlias = tuple[Span, ...]

BREAK = Span("", "break")
"""A line break inside a paragraph or a cell."""


def text(*parts: str | Span) -> Text:
    """Text from strings (plain) and spans; empty strings are dropped."""
    return tuple(p if isinstance(p, Span) else Span(p) for p in parts if not (isinstance(p, str) and not p))


def strong(s: str) -> Span:
    return Span(s, "strong")


def em(s: str) -> Span:
    return Span(s, "em")


def code(s: str) -> Span:
    return Span(s, "code")


def plain(t: Text) -> str:
    """The words of a text, a line break as a newline."""
    return "".join("\n" if s.style == "break" else s.text for s in t)


@dataclass(frozen=True)
class Cell:
    text: Text
    kind: CellKind = "text"
    status: Status | None = None
    """For a status cell: how it is judged."""


def num(s: str) -> Cell:
    """A number with its unit."""
    return Cell(text(s), "number")


def words(*parts: str | Span) -> Cell:
    return Cell(text(*parts), "text")


def status(label: str, judged: Status) -> Cell:
    return Cell(text(label), "status", judged)


@dataclass(frozen=True)
class Table:
    headers: tuple[str, ...]
    rows: tuple[tuple[Cell, ...], ...]
    compact: bool = False
    """Short cells only: a narrow screen keeps it a grid rather than cards."""


@dataclass(frozen=True)
class Paragraph:
    text: Text
    role: Role = "body"


@dataclass(frozen=True)
class Verdict:
    """The review's outcome in one line."""

    text: Text
    status: Status


@dataclass(frozen=True)
class Caution:
    severity: Severity
    title: str
    items: tuple[Text, ...]


@dataclass(frozen=True)
class Bullets:
    items: tuple[Text, ...]


@dataclass(frozen=True)
class Figure:
    kind: Literal["schematic", "plot"]
    label: str
    """What the drawing shows, for a reader who cannot see it."""
    width: float
    height: float
    style: str
    """CSS for the drawing's own classes (its colours are its own, never the theme's)."""
    svg: str
    """The drawing's SVG elements (everything inside ``<svg>``)."""
    caption: str
    paper: tuple[str, ...] = ()
    """Classes filled with the page's background colour (gaps drawn over a wire)."""


@dataclass(frozen=True)
class CheckItem:
    id: str
    status: Status
    finding: str
    would_pass: str | None
    why: str
    source: str
    """The citation as shown, with a dagger when the limit is recalled rather than read."""


@dataclass(frozen=True)
class CheckList:
    items: tuple[CheckItem, ...]


@dataclass(frozen=True)
class Section:
    heading: str
    blocks: tuple[Block, ...]
    level: Literal[2, 3] = 2


Block: TypeAlias = Paragraph | Verdict | Caution | Bullets | Table | Figure | CheckList | Section


@dataclass(frozen=True)
class Sheet:
    title: str
    blocks: tuple[Block, ...]
