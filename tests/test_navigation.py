"""Navigation tier: the demo handbook built for the address it is served at, so the theme changes pages in
place. A walk from the home page through every navigation entry: no page reloads, one engine worker for the
whole visit, every calculator initialised exactly once per page reached and answering a changed input.

That the engine is kept is proved by the worker count and the absence of reloads; the click-to-answer
times are printed (run with -s), not asserted: speed is measured by bench/, not by a test.
"""

from __future__ import annotations

import os
import time
from collections.abc import Iterator
from pathlib import Path

import pytest
from lampcalc.api import compute
from sites import Server, build, write_demo
from test_browser import Visit, block_inputs

pytestmark = pytest.mark.browser

# a changed input per calculator (a value other than every default in the demo)
CHANGE = {
    "dropper": ("capacitance", "1.8 uF"),
    "string": ("current", "25 mA"),
    "ripple": ("capacitance", "330 uF"),
    "wire": ("length", "12 m"),
    "module": ("current", "35 mA"),
    "preferred": ("value", "6100"),
    "mains": ("region", "120-60"),
    "light": ("distance", "5 m"),
    "camera": ("frame_rate", "25 fps"),
    "harmonics": ("active_power", "60 W"),
}


@pytest.fixture(scope="module")
def served() -> Iterator[tuple[Path, Server]]:
    """The demo handbook with its site_url set to the address the test server listens on."""
    import tempfile

    with tempfile.TemporaryDirectory() as tmp:
        folder = write_demo(Path(tmp))
        srv = Server(folder / "site")  # listening first: its port goes into the build
        old = os.environ.get("LAMPBOOK_SITE_URL")
        os.environ["LAMPBOOK_SITE_URL"] = srv.url
        try:
            r = build(folder)
        finally:
            if old is None:
                del os.environ["LAMPBOOK_SITE_URL"]
            else:
                os.environ["LAMPBOOK_SITE_URL"] = old
        assert r.returncode == 0, r.stderr
        assert srv.url in (folder / "site" / "sitemap.xml").read_text()
        yield folder / "site", srv
        srv.close()


MARK = """url => {
  for (const a of document.querySelectorAll('[data-go]')) a.removeAttribute('data-go');
  const link = [...document.querySelectorAll('.md-sidebar--primary a.md-nav__link[href]')]
    .find(a => a.href.split('#')[0] === url);
  if (link) link.setAttribute('data-go', '1');
  return Boolean(link);
}"""


def click_nav(v: Visit, url: str) -> float:
    """Click the navigation entry for url (the theme may still be swapping the sidebar in: try again)."""
    from playwright.sync_api import TimeoutError as PlaywrightTimeout

    for _ in range(10):
        if v.page.evaluate(MARK, url):
            t0 = time.monotonic()
            try:
                v.page.locator("[data-go]").first.click(timeout=3000)
                return t0
            except PlaywrightTimeout:
                pass
        time.sleep(0.3)
    raise AssertionError(f"no navigation entry for {url}")


def test_walk_every_nav_entry_with_one_engine(served: tuple[Path, Server], browser: object) -> None:
    v = Visit(browser, served[1].url, viewport={"width": 1280, "height": 900})
    workers: list[str] = []
    v.page.on("worker", lambda w: workers.append(w.url))
    v.open("")
    v.page.wait_for_load_state("load")
    v.page.evaluate("window.__sameDocument = true")
    entries = v.page.eval_on_selector_all(
        ".md-sidebar--primary a.md-nav__link[href]",
        "els => [...new Set(els.map(e => e.href.split('#')[0]))]",
    )
    assert len(entries) >= 20, entries
    timings: dict[str, float] = {}
    live: dict[str, float] = {}
    calculators_seen: set[str] = set()
    for url in entries:
        if v.page.evaluate("location.href.split('#')[0]") == url:
            continue  # the page we are on
        # the theme replaces the content container: mark the old one, and wait for a new one, set up
        v.page.evaluate("document.querySelector('[data-md-component=container]').dataset.old = '1'")
        t0 = click_nav(v, url)
        v.page.wait_for_function("url => location.href.split('#')[0] === url", arg=url)
        v.page.wait_for_function(
            """() => !document.querySelector('[data-md-component=container][data-old]')
            && [...document.querySelectorAll('.lb-calc')].every(b => b.dataset.live)"""
        )
        # the theme swapped the content in place: no reload
        assert v.page.evaluate("window.__sameDocument === true"), f"{url}: the page reloaded"
        boxes = v.page.eval_on_selector_all(".lb-calc", "els => els.map(e => e.id)")
        if not boxes:
            continue
        engine_was_running = bool(calculators_seen)
        if not engine_was_running:
            v.ready()  # the first calculator page starts the engine; every later one finds it running
        for box in boxes:
            calc = v.page.get_attribute(f"#{box}", "data-calculator")
            assert calc
            calculators_seen.add(calc)
            name, value = CHANGE[calc]
            v.computed(box, 0)
            if engine_was_running and box == boxes[0]:
                live[url.removeprefix(served[1].url)] = time.monotonic() - t0
            v.set(box, name, value)
            if engine_was_running and box == boxes[0]:
                timings[url.removeprefix(served[1].url)] = time.monotonic() - t0
            answer = compute(calc, block_inputs(v, box))
            assert answer["ok"], answer
            out = v.page.evaluate(f"document.querySelector('#{box} .lb-pin-item:not([hidden])').dataset.pin")
            assert v.page.locator(f"#{box} [data-pin={out}] .lb-pin-value").inner_text() == answer["display"][out]
            # initialised once: one computation on arrival, one for the change
            assert v.count(box) == 2, (box, v.count(box))
    engines = [w for w in workers if w.endswith("/assets/lampbook/worker.js")]
    assert len(engines) == 1, engines
    assert calculators_seen >= set(CHANGE), calculators_seen
    # every calculator page after the first answered with the engine already running (one worker, no
    # reload); how fast is for bench/, not for a test on a shared machine
    assert len(timings) >= 5, timings
    assert not v.foreign and not v.errors, (v.foreign[:3], v.errors[:3])
    print("click to live (s):", {k: round(t, 3) for k, t in live.items()})
    print("click to changed answer (s):", {k: round(t, 3) for k, t in timings.items()})


def test_share_link_within_the_page_keeps_the_engine(served: tuple[Path, Server], browser: object) -> None:
    """The string planner's worked examples are links to itself with inputs: followed in place, they fill
    the form, show that mode's fields and answer without a second engine."""
    v = Visit(browser, served[1].url, viewport={"width": 390, "height": 844}, is_mobile=True, has_touch=True)
    workers: list[str] = []
    v.page.on("worker", lambda w: workers.append(w.url))
    v.open("calculators/strings/")
    v.ready()
    v.page.evaluate("window.__sameDocument = true")
    v.page.locator("a", has_text="350 mA constant-current driver").click()
    v.page.wait_for_function("new URLSearchParams(location.search).get('supply') === 'cc'")
    v.computed("lb-string-1", 0)
    assert v.page.evaluate("window.__sameDocument === true")
    assert v.page.locator("#lb-string-1 [name=supply]").input_value() == "cc"
    assert v.page.locator("#lb-string-1 [name=driver_current]").is_visible()
    assert not v.page.locator("#lb-string-1 [name=supply_voltage]").is_visible()
    expected = compute("string", block_inputs(v, "lb-string-1"))
    assert v.out("lb-string-1", "parallel") == expected["display"]["parallel"]
    assert len([w for w in workers if w.endswith("worker.js")]) == 1
