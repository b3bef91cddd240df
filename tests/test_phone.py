"""Phone tier: every page of the demo handbook and of a scaffolded handbook, on a 390×844 touch phone.

Each page must fit the width (no sideways scroll, no element wider than the screen), show only the
inputs the current mode uses, keep the declared main answers in view while the primary input is being
edited (with the keyboard taking part of the screen), and never break a number or a check id across
lines in its tables and lists. A full-page screenshot of every page is kept in test-artifacts/phone/.
"""

from __future__ import annotations

from collections.abc import Iterator
from pathlib import Path

import pytest
from sites import ROOT, Server, built_and_served, write_demo, write_scaffold
from test_browser import Visit

pytestmark = pytest.mark.browser

SHOTS = ROOT / "test-artifacts" / "phone"
PHONE = {"viewport": {"width": 390, "height": 844}, "device_scale_factor": 2, "is_mobile": True, "has_touch": True}

# Elements outside the page's width, and the overall overflow. The theme's navigation drawer sits off
# screen by design until opened; code blocks scroll inside their own box, so their lines are not counted.
WIDTH_PROBLEMS = """() => {
  const W = document.documentElement.clientWidth, out = [];
  const sw = document.documentElement.scrollWidth;
  if (sw > W) out.push(`page scrolls sideways: ${sw} > ${W}`);
  for (const e of document.querySelectorAll(".md-main *")) {
    if ((e.closest("pre") && e.tagName !== "PRE") || e.closest(".md-sidebar")) continue;
    if (!e.getClientRects().length) continue;
    const r = e.getBoundingClientRect();
    if (r.width > W + 0.5 || r.right > W + 0.5 || r.left < -0.5)
      out.push(`${e.tagName.toLowerCase()}.${e.getAttribute("class")} ${Math.round(r.left)}..${Math.round(r.right)}: ` +
        (e.textContent || "").trim().slice(0, 50));
  }
  return out.slice(0, 8);
}"""

# A number with its unit, or a check id, must sit on one line: a Range over it has one line box.
BROKEN_TOKENS = r"""() => {
  const out = [];
  const num = /\d[\d.,]*(?:[ \u00a0](?:[pnµumkMG]?(?:VA|V|A|W|Ω|F|Hz|s|J|h)|%|°C|°F|mm²|AWG|kcmil)(?![\w]))?/g;
  const scopes = document.querySelectorAll(
    ".lb-table td, .lb-table th, .lb-out td, .lb-pin-value, .lb-checklist li, .lb-checklist code");
  // line boxes a range covers: rectangles whose tops differ by more than a few pixels
  const lines = (range) => {
    const tops = [...range.getClientRects()].filter((q) => q.width > 0).map((q) => q.top).sort((a, b) => a - b);
    return tops.filter((t, i) => i === 0 || t - tops[i - 1] > 4).length;
  };
  for (const el of scopes) {
    if (!el.getClientRects().length) continue;
    if (el.tagName === "CODE") {
      const range = document.createRange();
      range.selectNodeContents(el);
      if (lines(range) > 1) out.push(`id broken: ${el.textContent}`);
      continue;
    }
    const walker = document.createTreeWalker(el, NodeFilter.SHOW_TEXT);
    for (let n = walker.nextNode(); n; n = walker.nextNode()) {
      for (const m of n.data.matchAll(num)) {
        const range = document.createRange();
        range.setStart(n, m.index);
        range.setEnd(n, m.index + m[0].length);
        if (lines(range) > 1) out.push(`number broken: "${m[0]}" in ${el.textContent.trim().slice(0, 60)}`);
      }
    }
  }
  return out.slice(0, 8);
}"""

# For each calculator with modes: every field says which modes it serves; a field is visible exactly when
# the current mode is one of them (folded inputs are opened first, so they count).
MODE_PROBLEMS = """(box) => {
  const out = [], el = document.getElementById(box);
  const decl = JSON.parse(el.querySelector("template.lb-tpl").content.textContent).declaration;
  for (const d of el.querySelectorAll("details.lb-more")) d.open = true;
  const mode = el.querySelector(`[name="${decl.mode}"]`).value;
  for (const f of el.querySelectorAll(".lb-field")) {
    const name = f.querySelector("[name]").name;
    if (!f.dataset.modes) { out.push(`${name} carries no modes`); continue; }
    const serves = f.dataset.modes.split(" ").includes(mode);
    const seen = f.checkVisibility();
    if (seen && !serves) out.push(`${name} visible in mode ${mode}, which ignores it`);
    if (!seen && serves) out.push(`${name} hidden in mode ${mode}, which uses it`);
  }
  for (const d of el.querySelectorAll("details.lb-more")) d.open = false;
  return out;
}"""

# The main answers are on screen and not covered (the topmost element at their centre is their own).
PIN_PROBLEMS = """(box) => {
  const out = [], el = document.getElementById(box), H = window.innerHeight;
  const items = [...el.querySelectorAll(".lb-pin-item")].filter((i) => !i.hidden);
  if (!items.length) out.push("no main answers shown");
  for (const i of items) {
    const r = i.getBoundingClientRect();
    if (r.top < 0 || r.bottom > H) {
      out.push(`${i.dataset.pin} off screen (${Math.round(r.top)}..${Math.round(r.bottom)} of ${H})`);
      continue;
    }
    const hit = document.elementFromPoint(r.left + r.width / 2, r.top + r.height / 2);
    if (!hit || !i.contains(hit)) out.push(`${i.dataset.pin} covered by ${hit ? hit.className : "nothing"}`);
  }
  return out;
}"""


def site_pages(site: Path) -> list[str]:
    return sorted(
        "" if p.parent == site else p.parent.relative_to(site).as_posix() + "/" for p in site.rglob("index.html")
    )


def check_page(v: Visit, path: str, shot: str) -> list[str]:
    """Every phone check on one page; returns the problems found."""
    v.open(path)
    page = v.page
    page.wait_for_load_state("load")
    boxes = page.eval_on_selector_all(".lb-calc", "els => els.map(e => e.id)")
    if boxes:
        v.ready()
        for box in boxes:
            v.computed(box, 0)
    problems = [f"{path}: {p}" for p in page.evaluate(WIDTH_PROBLEMS)]
    problems += [f"{path}: {p}" for p in page.evaluate(BROKEN_TOKENS)]
    for box in boxes:
        decl = page.evaluate(f"JSON.parse(document.querySelector('#{box} template.lb-tpl').content.textContent)")
        d = decl["declaration"]
        assert d["main"], f"{d['name']} declares no main answers"
        if d["mode"]:
            sel = page.locator(f"#{box} [name={d['mode']}]")
            for mode in next(p for p in d["params"] if p["name"] == d["mode"])["choices"]:
                before = v.count(box)
                sel.select_option(mode)
                v.computed(box, before)
                problems += [f"{path} {box}: {p}" for p in page.evaluate(MODE_PROBLEMS, box)]
                problems += [f"{path} {box} ({mode}): {p}" for p in page.evaluate(BROKEN_TOKENS)]
                problems += [f"{path} {box} ({mode}): {p}" for p in page.evaluate(WIDTH_PROBLEMS)]
            before = v.count(box)
            sel.select_option(d["params"][[p["name"] for p in d["params"]].index(d["mode"])]["default"])
            v.computed(box, before)
        # the primary input: the first text input in view in the form (not folded); edited with the
        # on-screen keyboard up (the window shrinks to 390×470), once near the top and once at the bottom
        primary = page.locator(f"#{box} .lb-form > .lb-field:not([hidden]) input:not([readonly])").first
        if not primary.count():
            continue
        page.set_viewport_size({"width": 390, "height": 470})
        for where in ("start", "end"):
            primary.evaluate(f"e => e.scrollIntoView({{block: '{where}'}})")
            primary.focus()
            assert page.evaluate("document.activeElement.closest('.lb-calc').id") == box
            problems += [f"{path} {box} (input at {where}): {p}" for p in page.evaluate(PIN_PROBLEMS, box)]
        # the answer changes in view: type a new value and read it in the pinned summary
        before = v.count(box)
        primary.press("End")
        primary.type("0")
        v.computed(box, before)
        problems += [f"{path} {box} (after typing): {p}" for p in page.evaluate(PIN_PROBLEMS, box)]
        before = v.count(box)
        primary.fill(primary.get_attribute("data-default") or "")
        v.computed(box, before)
        page.set_viewport_size(PHONE["viewport"])
    page.evaluate("window.scrollTo(0, 0)")
    SHOTS.mkdir(parents=True, exist_ok=True)
    page.screenshot(path=str(SHOTS / f"{shot}.png"), full_page=True)
    return problems


@pytest.fixture(scope="module")
def demo_site(tmp_path_factory: pytest.TempPathFactory) -> Iterator[tuple[Path, Server]]:
    folder = write_demo(tmp_path_factory.mktemp("demo"))
    with built_and_served(folder) as srv:
        yield folder / "site", srv


@pytest.fixture(scope="module")
def scaffold_site(tmp_path_factory: pytest.TempPathFactory) -> Iterator[tuple[Path, Server]]:
    folder = write_scaffold(tmp_path_factory.mktemp("mine") / "book")
    with built_and_served(folder) as srv:
        yield folder / "site", srv


def run_tier(browser: object, site: tuple[Path, Server], prefix: str) -> None:
    pages = site_pages(site[0])
    assert len(pages) > 1
    v = Visit(browser, site[1].url, service_workers="block", **PHONE)
    problems: list[str] = []
    for path in pages:
        problems += check_page(v, path, prefix + ("-" + path.strip("/").replace("/", "-") if path else "-home"))
    assert not problems, "\n".join(problems[:30])
    assert not v.foreign and not v.errors, (v.foreign[:3], v.errors[:3])


def test_every_demo_page_on_a_phone(demo_site: tuple[Path, Server], browser: object) -> None:
    run_tier(browser, demo_site, "demo")


def test_every_scaffold_page_on_a_phone(scaffold_site: tuple[Path, Server], browser: object) -> None:
    run_tier(browser, scaffold_site, "scaffold")


def test_the_checks_find_what_they_look_for(demo_site: tuple[Path, Server], browser: object) -> None:
    """The phone checks are not blind: a page spoiled on purpose fails each of them."""
    v = Visit(browser, demo_site[1].url, service_workers="block", **PHONE)
    v.open("calculators/strings/")
    v.ready()
    v.computed("lb-string-1", 0)
    page = v.page
    # a field the mode ignores, shown (the old display:flex bug), and a field with no modes
    page.evaluate("""() => {
        const f = document.querySelector('#lb-string-1 [name=driver_current]').closest('.lb-field');
        f.hidden = false; f.style.display = 'flex'; }""")
    assert any("driver_current visible in mode cv" in p for p in page.evaluate(MODE_PROBLEMS, "lb-string-1"))
    page.evaluate(
        "document.querySelector('#lb-string-1 [name=current]').closest('.lb-field').removeAttribute('data-modes')"
    )
    assert any("current carries no modes" in p for p in page.evaluate(MODE_PROBLEMS, "lb-string-1"))
    # a value split from its unit, an id broken into pieces
    page.evaluate("""() => { const td = document.querySelector('#lb-string-1 tr[data-out=string_current_A] td');
        td.style.whiteSpace = 'normal'; td.style.display = 'inline-block'; td.style.width = '1.5em'; }""")
    assert any("number broken" in p for p in page.evaluate(BROKEN_TOKENS))
    # something wider than the screen
    page.evaluate("document.querySelector('.md-content h1').style.width = '600px'")
    assert any("page scrolls sideways" in p or "h1" in p for p in page.evaluate(WIDTH_PROBLEMS))
    # the main answers scrolled away with the pin unpinned (keyboard up: a short window)
    page.evaluate("document.querySelector('.md-content h1').style.width = ''")
    page.set_viewport_size({"width": 390, "height": 470})
    page.evaluate("window.scrollTo(0, document.documentElement.scrollHeight)")
    assert not page.evaluate(PIN_PROBLEMS, "lb-string-1")  # pinned: still in view at the bottom of the page
    page.evaluate("document.querySelector('#lb-string-1 .lb-pin').style.position = 'static'")
    page.evaluate("window.scrollTo(0, document.documentElement.scrollHeight)")
    assert page.evaluate(PIN_PROBLEMS, "lb-string-1")
