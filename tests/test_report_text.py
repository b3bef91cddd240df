"""The terminal's renderer of sheet models (lampbook.report.sheet_text): every word of a build
sheet in plain text, within 80 columns unless full width is asked for."""

from __future__ import annotations

from pathlib import Path

import pytest
from lampcalc.fixture.check import check
from lampcalc.fixture.design import parse_design
from lampcalc.fixture.tolerance import study
from lampcalc.present import model as m
from lampcalc.present.sheet import build_sheet
from test_sheet_model import words_of

from lampbook.report import full_width, sheet_text

DESIGNS = Path(__file__).resolve().parent.parent / "docs" / "designs"


def sheet(name: str) -> m.Sheet:
    d = parse_design((DESIGNS / f"{name}.toml").read_text())
    return build_sheet(d, check(d, waveforms=True), study(d, samples=200))


@pytest.mark.parametrize("name", ["panel-230", "panel-24v"])
def test_every_word_of_a_sheet_in_plain_text(name: str) -> None:
    s = sheet(name)
    with full_width():
        out = sheet_text(s)
    assert not any(tag in out for tag in ("<strong>", "<code>", "<br>", "<p", "<td"))  # no markup
    missing = [w for w in words_of(s) if w.strip() not in out]
    # a figure is its caption in the terminal; its label is for a reader of the drawing
    labels = {b.label for b in _figures(s.blocks)}
    assert not [w for w in missing if w not in labels], missing[:3]
    narrow = sheet_text(s)
    assert max(len(line) for line in narrow.splitlines()) <= 80
    assert "CAUTION" not in out and "Cautions\n  - " in out


def _figures(bs: tuple[m.Block, ...]) -> list[m.Figure]:
    out: list[m.Figure] = []
    for b in bs:
        if isinstance(b, m.Figure):
            out.append(b)
        elif isinstance(b, m.Section):
            out += _figures(b.blocks)
    return out


def test_a_small_sheet_in_plain_text() -> None:
    s = m.Sheet(
        "T",
        (
            m.Table(("a", "b"), ((m.words("x"), m.status("FAIL", "fail")),)),
            m.Paragraph(m.text("one", m.BREAK, m.strong("two"))),
            m.Caution("danger", "CAUTION (mains):", (m.text("c1"),)),
        ),
    )
    assert sheet_text(s) == "T\n=\na  b\n-  ----\nx  FAIL\n\none\ntwo\n\nCAUTION (mains):\n  - c1"
