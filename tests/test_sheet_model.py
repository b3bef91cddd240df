"""The build sheet as data and its HTML renderer: no markup in the model, nothing of the
site's theme in the core, nothing dropped or added by the renderer, cautions and daggers kept."""

from __future__ import annotations

import functools
import html
import re
from pathlib import Path
from typing import Any

import pytest
from lampcalc.cautions import UNVERIFIED_NOTE, citation
from lampcalc.fixture.check import check
from lampcalc.fixture.design import Design, parse_design
from lampcalc.fixture.tolerance import study
from lampcalc.present import model as m
from lampcalc.present.html import HtmlTheme, keep_numbers, sheet_html, table_html
from lampcalc.present.sheet import build_sheet

ROOT = Path(__file__).resolve().parent.parent
DESIGNS = ROOT / "docs" / "designs"
PRESENT = ROOT / "calc" / "lampcalc" / "present"
NAMES = ("panel-230", "panel-24v", "unsafe-demo")


@functools.cache
def reviewed(name: str) -> tuple[Design, dict[str, Any], m.Sheet]:
    d = parse_design((DESIGNS / f"{name}.toml").read_text())
    ans = check(d, waveforms=True)
    return d, ans, build_sheet(d, ans, study(d, samples=200))


def blocks(bs: tuple[m.Block, ...]) -> list[m.Block]:
    out: list[m.Block] = []
    for b in bs:
        out.append(b)
        if isinstance(b, m.Section):
            out += blocks(b.blocks)
    return out


def words_of(sheet: m.Sheet) -> list[str]:
    """Every piece of text the model holds (figures: their label and caption)."""
    out: list[str] = []
    for b in blocks(sheet.blocks):
        if isinstance(b, m.Section):
            out.append(b.heading)
        elif isinstance(b, (m.Paragraph, m.Verdict)):
            out += [s.text for s in b.text]
        elif isinstance(b, (m.Bullets, m.Caution)):
            out += [s.text for t in b.items for s in t] + ([b.title] if isinstance(b, m.Caution) else [])
        elif isinstance(b, m.Table):
            out += list(b.headers) + [s.text for r in b.rows for c in r for s in c.text]
        elif isinstance(b, m.Figure):
            out += [b.label, b.caption]
        else:
            out += [x for c in b.items for x in (c.id, c.finding, c.why, c.source, c.would_pass or "")]
    return [w for w in out if w]


@pytest.mark.parametrize("name", NAMES)
def test_the_model_holds_words_not_markup(name: str) -> None:
    _, _, sheet = reviewed(name)
    tagged = [w for w in words_of(sheet) if re.search(r"<\s*/?\s*[a-zA-Z]|&[a-z]+;|&#", w)]
    assert not tagged, tagged[:3]


@pytest.mark.parametrize("name", NAMES)
def test_html_shows_every_word_of_the_model(name: str) -> None:
    # nothing dropped by the renderer: each text of the model is in the page's text (checks with numbers kept)
    _, _, sheet = reviewed(name)
    page = html.unescape(sheet_html(sheet))
    missing = [w for w in words_of(sheet) if w not in page and keep_numbers(w) not in page]
    assert not missing, missing[:3]


@pytest.mark.parametrize("name", NAMES)
def test_cautions_and_verdict_follow_the_review(name: str) -> None:
    d, ans, sheet = reviewed(name)
    caution = next(b for b in sheet.blocks if isinstance(b, m.Caution))
    assert [m.plain(t) for t in caution.items] == list(ans["cautions"])
    assert caution.severity == ("warning" if d.is_cv else "danger")
    verdict = next(b for b in sheet.blocks if isinstance(b, m.Verdict))
    assert verdict.status == ("fail" if ans["failed"] else "pass")
    items = next(b for b in blocks(sheet.blocks) if isinstance(b, m.CheckList)).items
    assert [(c.id, c.status) for c in items] == [(c["id"], c["status"]) for c in ans["checks"]]


@pytest.mark.parametrize("name", NAMES)
def test_daggers_mark_recalled_sources_and_the_note_explains_them(name: str) -> None:
    _, ans, sheet = reviewed(name)
    items = next(b for b in blocks(sheet.blocks) if isinstance(b, m.CheckList)).items
    recalled = [citation(str(c["source"]))[1] for c in ans["checks"]]
    assert [c.source.endswith("†") for c in items] == recalled
    notes = [b for b in blocks(sheet.blocks) if isinstance(b, m.Paragraph) and b.role == "unverified"]
    assert all(m.plain(n.text) == UNVERIFIED_NOTE for n in notes)
    assert bool(notes) >= any(recalled)
    page = sheet_html(sheet)
    assert page.count("†") >= sum(recalled) + (1 if notes else 0)


def test_the_theme_comes_from_the_caller() -> None:
    theme = HtmlTheme(danger="x-box x-red", warning="x-box x-amber", box_title="x-title", background="rgb(1, 2, 3)")
    mains = sheet_html(reviewed("panel-230")[2], theme)
    cv = sheet_html(reviewed("panel-24v")[2], theme)
    assert '<div class="x-box x-red"><p class="x-title">Cautions</p>' in mains
    assert '<div class="x-box x-amber"><p class="x-title">Cautions</p>' in cv
    assert ".gap{fill:rgb(1, 2, 3);stroke:none}" in mains
    # with no theme given, only lampbook's own names and plain colours
    plain = sheet_html(reviewed("panel-230")[2])
    assert "admonition" not in plain and "--md-" not in plain and '<div class="lb-box lb-danger">' in plain
    assert ".gap{fill:var(--lb-paper, #fff);stroke:none}" in plain
    with pytest.raises(ValueError, match="background"):
        HtmlTheme(background="#fff}</style><script>")


def test_the_core_names_nothing_of_a_site_theme() -> None:
    # the theme's class names and CSS variables are the caller's (lampbook passes mkdocs-material's)
    for path in PRESENT.glob("*.py"):
        src = path.read_text(encoding="utf-8")
        assert "admonition" not in src and "--md-" not in src and "md-typeset" not in src, path.name


def test_a_table_renders_its_cells_by_kind_and_escapes_them() -> None:
    t = m.Table(
        ("part", "value", "state"),
        (
            (m.words(m.code("R1"), m.BREAK, "<b>&"), m.num("1 kΩ"), m.status("HAZARD", "fail")),
            (m.words("C1"), m.num("100 nF"), m.status("OK", "pass")),
        ),
        compact=True,
    )
    out = table_html(t)
    assert out.startswith('<div class="lb-scroll"><table class="lb-table lb-compact"><thead><tr><th>part</th>')
    assert "<td><code>R1</code><br>&lt;b&gt;&amp;</td><td>1 kΩ</td>" in out
    assert '<td><span class="lb-st lb-fail">HAZARD</span></td>' in out
    assert '<span class="lb-st lb-pass">OK</span>' in out
    assert 'class="lb-table lb-cards"' in table_html(m.Table(("a",), ((m.words("x"),),)))


def test_design_text_is_escaped_in_every_place() -> None:
    text = (
        (DESIGNS / "panel-230.toml").read_text().replace('name = "KR flood panel 230"', 'name = "<script>x</script>"')
    )
    d = parse_design(text)
    page = sheet_html(build_sheet(d, check(d), None))
    assert "<script>" not in page and "&lt;script&gt;" in page
