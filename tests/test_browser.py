"""Browser tier: Playwright drives Debian's Chromium (headless, fresh profile per
test) against the demo handbook built and served on 127.0.0.1; every request
to anywhere else is refused and counted."""

from __future__ import annotations

import json
import re
from collections.abc import Iterator
from pathlib import Path

import pytest
from lampcalc.api import compute
from sites import ROOT, Server, build, built_and_served, launch, write_demo, write_scaffold

pytestmark = pytest.mark.browser

ARTIFACTS = ROOT / "test-artifacts"


@pytest.fixture(scope="module")
def demo(tmp_path_factory: pytest.TempPathFactory) -> Iterator[tuple[Path, Server]]:
    folder = write_demo(tmp_path_factory.mktemp("demo"))
    with built_and_served(folder) as srv:
        yield folder, srv


class Visit:
    def __init__(self, browser: object, base: str, **ctx: object) -> None:
        self.ctx = browser.new_context(**{"service_workers": "allow", **ctx})  # type: ignore[attr-defined]
        self.foreign: list[str] = []
        self.ctx.route(re.compile(r"^(?!http://127\.0\.0\.1:).*"), self._refuse)
        self.page = self.ctx.new_page()
        self.errors: list[str] = []
        self.page.on("pageerror", lambda e: self.errors.append(str(e)))
        self.base = base

    def _refuse(self, route: object) -> None:
        self.foreign.append(route.request.url)  # type: ignore[attr-defined]
        route.abort()  # type: ignore[attr-defined]

    def open(self, path: str) -> None:
        self.page.goto(self.base + path)

    def ready(self) -> None:
        self.page.wait_for_selector(".lb-engine[data-state^=ready]", timeout=90000)

    def until(self, expr: str, timeout: float = 90.0) -> None:
        """Poll an async JavaScript expression until it is true (wait_for_function takes a promise as truthy)."""
        import time

        end = time.monotonic() + timeout
        while time.monotonic() < end:
            if self.page.evaluate(f"(async () => Boolean(await ({expr})))()"):
                return
            time.sleep(0.25)
        raise AssertionError(f"timed out waiting for {expr}")

    def offline_ready(self) -> None:
        self.until("navigator.serviceWorker.ready.then(r => r.active && r.active.state === 'activated')")
        self.until("navigator.serviceWorker.controller !== null")

    def first_visit(self, path: str = "") -> None:
        """Open a page once and wait until the engine runs and the offline cache is in place."""
        self.open(path)
        self.ready()
        self.offline_ready()

    def computed(self, box: str, before: int) -> None:
        self.page.wait_for_function(
            f"Number(document.querySelector('#{box}').dataset.computed || 0) > {before}", timeout=30000
        )

    def count(self, box: str) -> int:
        return int(self.page.evaluate(f"Number(document.querySelector('#{box}').dataset.computed || 0)"))

    def out(self, box: str, name: str) -> str:
        return self.page.locator(f"#{box} tr[data-out={name}] td").inner_text()

    def set(self, box: str, name: str, value: str) -> None:
        before = self.count(box)
        el = self.page.locator(f"#{box} [name={name}]")
        # a folded input is opened first, as a user would
        el.evaluate("e => { const d = e.closest('details.lb-more'); if (d) d.open = true; }")
        if el.evaluate("e => e.tagName") == "SELECT":
            el.select_option(value)
        else:
            el.fill(value)
        self.computed(box, before)


CASES = [
    ("calculators/dropper/", "lb-dropper-1", "dropper", {"capacitance": "2.2 uF"}, "led_current_avg_A"),
    ("calculators/dropper/", "lb-dropper-2", "dropper", {"stock_capacitance": "0.47 uF"}, "bank_count"),
    ("calculators/strings/", "lb-string-1", "string", {"supply_voltage": "36 V"}, "series"),
    ("calculators/strings/", "lb-string-1", "string", {"supply": "cc", "driver_current": "700 mA"}, "parallel"),
    ("calculators/ripple/", "lb-ripple-1", "ripple", {"capacitance": "470 uF"}, "ripple_pp_V"),
    ("calculators/wire/", "lb-wire-1", "wire", {"size": "14 AWG"}, "drop_V"),
    ("calculators/light/", "lb-light-1", "light", {"distance": "5 m"}, "illuminance_axis_lx"),
    ("calculators/camera/", "lb-camera-1", "camera", {"shutter_angle": "90°"}, "variation"),
    ("calculators/harmonics/", "lb-harmonics-1", "harmonics", {"h3": "40 %"}, "verdict"),
    ("calculators/module/", "lb-module-1", "module", {"current": "50 mA"}, "vf_V"),
    ("calculators/preferred/", "lb-preferred-1", "preferred", {"value": "5000"}, "nearest"),
]


def block_inputs(v: Visit, box: str) -> dict[str, str]:
    data = json.loads(v.page.evaluate(f"document.querySelector('#{box} template.lb-tpl').content.textContent"))
    return (
        {
            k: val
            for k, val in v.page.evaluate(
                f"""Object.fromEntries([...document.querySelectorAll('#{box} .lb-form [name]')]
            .filter(e => !e.closest('.lb-field').hidden).map(e => [e.name, e.value]))"""
            ).items()
        }
        if data
        else {}
    )


@pytest.mark.parametrize(("path", "box", "calc", "change", "out"), CASES, ids=[f"{c[1]}-{c[4]}" for c in CASES])
def test_calculator_computes_after_input_change(
    demo: tuple[Path, Server],
    browser: object,
    path: str,
    box: str,
    calc: str,
    change: dict[str, str],
    out: str,
) -> None:
    v = Visit(browser, demo[1].url)
    v.open(path)
    v.ready()
    v.computed(box, 0)  # the first live answer is in: a later count is the change's answer, not this one
    for k, val in change.items():
        v.set(box, k, val)
    expected = compute(calc, block_inputs(v, box))
    assert expected["ok"]
    assert v.out(box, out) == expected["display"][out]
    assert not v.foreign and not v.errors


def test_table_of_options_as_the_core_draws_it(demo: tuple[Path, Server], browser: object) -> None:
    """The page shows the core's table of options (one renderer for the sheet, the build and the page):
    each cell labelled with its column for the phone's cards, and a table the reader opened stays open
    when the answer changes."""
    v = Visit(browser, demo[1].url, viewport={"width": 390, "height": 844}, is_mobile=True)
    v.open("calculators/strings/")
    v.ready()
    box = "lb-string-1"
    v.computed(box, 0)
    v.set(box, "supply_voltage", "36 V")
    expected = compute("string", block_inputs(v, box))
    assert expected["ok"] and expected["rows"]
    details = v.page.locator(f"#{box} .lb-rows details.lb-options")
    assert details.locator("summary").inner_text() == f"Every option ({len(expected['rows'])})"
    details.locator("summary").click()
    table = details.locator("table.lb-cards[data-labelled]")
    heads = table.locator("thead th").all_inner_texts()
    cells = table.locator("tbody tr").first.locator("td")
    assert cells.evaluate_all("tds => tds.map(td => td.dataset.label)") == heads
    first = expected["rows_display"][0]
    shown = [t.replace("\u00a0", " ") for t in cells.all_inner_texts()]
    assert shown == [first[c.name] for c in _columns("string", expected)]
    v.set(box, "supply_voltage", "48 V")
    assert v.page.locator(f"#{box} .lb-rows details.lb-options[open]").count() == 1
    assert v.page.evaluate("document.documentElement.scrollWidth") <= 390
    assert not v.foreign and not v.errors


def _columns(calc: str, ans: dict[str, object]) -> list[object]:
    from lampcalc.calculators import CALCULATORS

    rows = ans["rows"]
    assert isinstance(rows, list)
    return [c for c in CALCULATORS[calc].columns if any(r[c.name] is not None for r in rows)]


@pytest.mark.parametrize(
    ("value", "needle"),
    [
        ("2.2", "expected a capacitance"),  # a bare number where a unit decides
        ("", "needs a value"),  # a cleared field with a usual value must not silently compute with that value
    ],
    ids=["no-unit", "blank"],
)
def test_error_shows_beside_field(demo: tuple[Path, Server], browser: object, value: str, needle: str) -> None:
    v = Visit(browser, demo[1].url)
    v.open("calculators/dropper/")
    v.ready()
    v.set("lb-dropper-1", "capacitance", value)
    err = v.page.locator("#lb-dropper-1 .lb-field.lb-bad .lb-err").inner_text()
    assert needle in err
    assert "lb-stale" in (v.page.locator("#lb-dropper-1").get_attribute("class") or "")
    assert not v.errors


def test_prerendered_answer_without_javascript(demo: tuple[Path, Server], browser: object) -> None:
    v = Visit(browser, demo[1].url, java_script_enabled=False)
    v.open("calculators/dropper/")
    assert v.out("lb-dropper-1", "led_current_avg_A") == compute("dropper", {})["display"]["led_current_avg_A"]


def test_offline_after_one_visit(demo: tuple[Path, Server], browser: object) -> None:
    v = Visit(browser, demo[1].url)
    v.first_visit("calculators/ripple/")
    v.ctx.set_offline(True)
    v.page.reload()
    v.ready()
    v.set("lb-ripple-1", "capacitance", "1000 uF")
    assert (
        v.out("lb-ripple-1", "ripple_pp_V")
        == compute("ripple", block_inputs(v, "lb-ripple-1"))["display"]["ripple_pp_V"]
    )
    # another page, never opened, from the precache
    v.open("calculators/wire/")
    v.ready()
    v.set("lb-wire-1", "length", "20 m")
    assert v.out("lb-wire-1", "drop_V") == compute("wire", block_inputs(v, "lb-wire-1"))["display"]["drop_V"]
    assert not v.foreign


def test_share_link_restores_inputs(demo: tuple[Path, Server], browser: object) -> None:
    v = Visit(browser, demo[1].url)
    v.open("calculators/dropper/?lb=lb-dropper-1&capacitance=3.3%20uF&bus_voltage=120%20V#lb-dropper-1")
    v.ready()
    v.computed("lb-dropper-1", 0)
    expected = compute("dropper", {"capacitance": "3.3 uF", "bus_voltage": "120 V"})["display"]["led_current_avg_A"]
    assert v.out("lb-dropper-1", "led_current_avg_A") == expected
    # a hostile link: the value is escaped, validated like any input, and the error shows beside its field
    v.open("calculators/dropper/?lb=lb-dropper-1&capacitance=%3Cimg%20src%3Dx%20onerror%3Dalert(1)%3E&region=%22%3E")
    v.page.wait_for_selector("#lb-dropper-1 .lb-field.lb-bad .lb-err:has-text('expected a capacitance')", timeout=30000)
    assert v.page.locator("#lb-dropper-1 .lb-field.lb-bad").count() == 1
    assert v.page.locator("#lb-dropper-1 img").count() == 0
    assert not v.errors


def test_rebuilt_site_replaces_the_cache(tmp_path: Path, browser: object) -> None:
    folder = tmp_path / "s"
    from sites import write_site

    write_site(folder, {"index.md": "# One\n\n```lampbook\ncalculator: preferred\n```\n"})
    with built_and_served(folder) as srv:
        v = Visit(browser, srv.url)
        v.first_visit()
        # the site's cache, and the snapshot of its engine (kept while the engine's files stay the same)
        snapshot = (
            "lampbook-snapshot-"
            + json.loads((folder / "site" / "engine" / "pyodide-lock.json").read_text())["lampbook"]["engine"]
        )
        v.until(f"caches.keys().then(k => k.length === 2 && k.includes({json.dumps(snapshot)}))")
        first = [k for k in v.page.evaluate("caches.keys()") if k != snapshot]
        (folder / "docs" / "index.md").write_text("# Two\n\n```lampbook\ncalculator: preferred\nvalue: 330\n```\n")
        assert build(folder).returncode == 0
        v.page.evaluate("navigator.serviceWorker.getRegistration().then(r => r.update())")
        v.until(
            f"caches.keys().then(k => k.length === 2 && k.includes({json.dumps(snapshot)})"
            f" && !k.includes({json.dumps(first[0])}))"
        )
        v.page.reload()
        assert v.page.locator("h1").inner_text() == "Two"
        v.ctx.set_offline(True)
        v.page.reload()
        assert v.page.locator("h1").inner_text() == "Two"
        v.ctx.set_offline(False)
        # a build whose engine keeps no snapshot: the old snapshot goes with the old cache, and none is made
        write_site(
            folder,
            {"index.md": "# Three\n\n```lampbook\ncalculator: preferred\n```\n"},
            extra="      engine_snapshot: false\n",
        )
        assert build(folder).returncode == 0
        assert "lampbook" not in json.loads((folder / "site" / "engine" / "pyodide-lock.json").read_text())
        v.page.evaluate("navigator.serviceWorker.getRegistration().then(r => r.update())")
        v.until(f"caches.keys().then(k => k.length === 1 && !k.includes({json.dumps(snapshot)}))")
        v.page.reload()
        assert v.page.locator("h1").inner_text() == "Three"
        v.ready()
        phases = next(w for w in v.page.workers if w.url.endswith("worker.js")).evaluate("self.lbPhases")
        assert "snapshot" not in phases and not phases.get("restored"), phases
        assert v.page.evaluate("caches.keys()") == [k for k in v.page.evaluate("caches.keys()") if "snapshot" not in k]


def test_open_design_from_device(demo: tuple[Path, Server], browser: object) -> None:
    v = Visit(browser, demo[1].url, viewport={"width": 390, "height": 844}, is_mobile=True)
    v.open("designs/open/")
    v.page.wait_for_selector(".lb-open[data-live]")
    v.page.set_input_files(".lb-open-file", str(ROOT / "docs" / "designs" / "worklight-120.toml"))
    v.page.wait_for_selector(".lb-open-out .lb-verdict", timeout=90000)
    from lampcalc.fixture.check import check
    from lampcalc.fixture.design import parse_design
    from lampcalc.present.sheet import cell

    ans = check(parse_design((ROOT / "docs" / "designs" / "worklight-120.toml").read_text()))
    text = v.page.locator(".lb-open-out").inner_text().replace("\xa0", " ")  # numbers keep their units
    assert cell(ans["nominal"]["led_current_avg_A"], "current") in text
    assert "no check failed" in text
    # a bad file: the error names the key, nothing else breaks
    bad = demo[0] / "bad.toml"
    bad.write_text('name = "x"\n[mains]\nvoltage = "230"\n')
    v.page.set_input_files(".lb-open-file", str(bad))
    v.page.wait_for_selector(".lb-open-err li", timeout=30000)
    assert "mains.voltage" in v.page.locator(".lb-open-err").inner_text()
    assert not v.foreign and not v.errors


def test_demo_pages_fetch_nothing_foreign(demo: tuple[Path, Server], browser: object) -> None:
    v = Visit(browser, demo[1].url)
    site = demo[0] / "site"
    pages = sorted(p.parent.relative_to(site).as_posix() + "/" for p in site.rglob("index.html"))
    for path in pages:
        v.open("" if path == "./" else path)
        v.page.wait_for_load_state("load")
    assert not v.foreign, v.foreign[:5]
    assert not v.errors


def test_scaffolded_handbook_works_offline(tmp_path: Path, browser: object) -> None:
    folder = write_scaffold(tmp_path / "mine")
    with built_and_served(folder) as srv:
        assert (folder / "site" / "designs" / "first-fixture" / "index.html").is_file()
        v = Visit(browser, srv.url)
        v.first_visit()
        v.ctx.set_offline(True)
        v.page.reload()
        v.ready()
        box = v.page.locator(".lb-calc").first.get_attribute("id")
        assert box
        v.set(box, "capacitance", "0.47 uF")
        assert (
            v.out(box, "led_current_avg_A") == compute("dropper", block_inputs(v, box))["display"]["led_current_avg_A"]
        )
        assert not v.foreign


def test_offline_search(demo: tuple[Path, Server], browser: object) -> None:
    v = Visit(browser, demo[1].url)
    v.first_visit("calculators/wire/")
    v.ctx.set_offline(True)
    v.open("")
    v.page.locator(".md-search__input").first.focus()
    v.page.keyboard.type("bleeder")
    v.page.wait_for_selector(".md-search-result__item", timeout=30000)
    assert v.page.locator(".md-search-result__item").count() > 0
    assert not v.foreign


def test_print_stylesheet_gives_a_clean_sheet(demo: tuple[Path, Server], browser: object) -> None:
    v = Visit(browser, demo[1].url)
    v.open("designs/panel-230/")
    v.page.emulate_media(media="print")
    hidden = v.page.evaluate("""() => ['.md-header', '.md-sidebar--primary', '.md-footer']
        .map(s => document.querySelector(s)).filter(Boolean).map(e => getComputedStyle(e).display)""")
    assert hidden and all(d == "none" for d in hidden)
    assert v.page.locator(".lb-sheet").is_visible() and v.page.locator(".lb-schematic svg").is_visible()
    # on paper every check shows why it matters and its source, and the pinned summary does not float
    why = v.page.locator(".lb-checklist details p")
    assert why.count() > 10 and all(why.nth(k).is_visible() for k in range(why.count()))
    assert v.page.locator(".lb-zoom").first.is_hidden()
    ARTIFACTS.mkdir(exist_ok=True)
    pdf = v.page.pdf(path=str(ARTIFACTS / "panel-230-sheet.pdf"))
    assert len(pdf) > 10000


def test_engine_timeout_is_shown(tmp_path: Path, browser: object) -> None:
    # a server that sends .wasm with the wrong type makes Pyodide hang:
    # the page must say so, keep the prerendered answer
    from sites import write_site

    folder = write_site(
        tmp_path / "t",
        {"index.md": "# T\n\n```lampbook\ncalculator: preferred\n```\n"},
        extra="      load_timeout: 3\n",
    )
    with built_and_served(folder) as srv:
        v = Visit(browser, srv.url)
        v.ctx.route(re.compile(r".*pyodide[.]asm[.]wasm$"), lambda route: None)  # never answered
        v.open("")
        v.page.wait_for_selector(".lb-engine[data-state^=failed]", timeout=30000)
        assert "application/wasm" in v.page.locator(".lb-engine").first.inner_text()
        assert v.out("lb-preferred-1", "nearest") == compute("preferred", {})["display"]["nearest"]


# A worker that starts, leaves its first request unanswered (a long computation) and dies on the second
# (an uncaught error inside it).
DYING_WORKER = """self.postMessage({ type: "ready" });
let queries = 0;
self.onmessage = (e) => {
  if (e.data && e.data.type === "query" && ++queries === 2) setTimeout(() => { throw new Error("engine crashed"); });
};
"""


def test_worker_death_refuses_pending_requests(tmp_path: Path, browser: object) -> None:
    # a request in flight when the engine dies is refused with the reason: the form is marked stale and the
    # status says why, instead of waiting for an answer that cannot come
    from sites import write_site

    folder = write_site(tmp_path / "w", {"index.md": "# W\n\n```lampbook\ncalculator: preferred\n```\n"})
    with built_and_served(folder) as srv:
        v = Visit(browser, srv.url)
        v.ctx.route(
            re.compile(r".*assets/lampbook/worker[.]js$"),
            lambda route: route.fulfill(status=200, content_type="text/javascript", body=DYING_WORKER),
        )
        v.open("")
        v.ready()
        v.page.locator("#lb-preferred-1 [name=value]").fill("47k")
        v.page.wait_for_selector("#lb-preferred-1.lb-stale", timeout=30000)
        assert "engine stopped" in (v.page.get_attribute("#lb-preferred-1", "data-engine-error") or "")
        assert "engine crashed" in v.page.locator(".lb-engine").first.inner_text()
        assert v.page.locator(".lb-engine").first.get_attribute("data-state", timeout=1000).startswith("failed")


# --- offline status: "offline-ready" is a claim, made only when it is true ---------------------------------


def test_offline_status_in_a_secure_context(demo: tuple[Path, Server], browser: object) -> None:
    v = Visit(browser, demo[1].url)
    v.open("calculators/ripple/")
    v.ready()
    status = v.page.locator(".lb-engine").first
    # 127.0.0.1 is a secure context: the service worker installs, takes control, and only then is it claimed
    v.page.wait_for_selector(".lb-engine[data-state~=offline]", timeout=120000)
    assert v.page.evaluate("navigator.serviceWorker.controller !== null")
    assert status.inner_text() == "live · offline-ready"
    # the claim holds: cut the network and the next page, never opened, computes
    v.ctx.set_offline(True)
    v.open("calculators/module/")
    v.ready()
    v.set("lb-module-1", "current", "30 mA")
    assert v.out("lb-module-1", "vf_V") == compute("module", block_inputs(v, "lb-module-1"))["display"]["vf_V"]
    assert not v.foreign


def test_offline_status_in_a_plain_http_context(demo: tuple[Path, Server]) -> None:
    """A bench laptop serving plain http on the shop network: the phone has no secure context, so no service
    worker; the page must say offline is not available and why, never "offline-ready"."""
    from playwright.sync_api import sync_playwright

    host = "bench-laptop.test"  # resolved to 127.0.0.1 by the browser only: not a secure origin
    url = demo[1].url.replace("127.0.0.1", host)
    with sync_playwright() as p:
        b = launch(p, f"--host-resolver-rules=MAP {host} 127.0.0.1")
        try:
            ctx = b.new_context(service_workers="allow", viewport={"width": 390, "height": 844}, is_mobile=True)
            foreign: list[str] = []
            pattern = re.compile(rf"^(?!http://{re.escape(host)}:).*")
            ctx.route(pattern, lambda route: (foreign.append(route.request.url), route.abort()))
            page = ctx.new_page()
            page.goto(url + "calculators/ripple/")
            page.wait_for_selector(".lb-engine[data-state^=ready]", timeout=90000)
            assert page.evaluate("window.isSecureContext") is False
            text = page.locator(".lb-engine").first.inner_text()
            assert "offline-ready" not in text
            assert "offline not available" in text and "HTTPS" in text and "localhost" in text
            assert "no-offline" in (page.locator(".lb-engine").first.get_attribute("data-state") or "")
            ARTIFACTS.mkdir(exist_ok=True)
            page.screenshot(path=str(ARTIFACTS / "phone-status-plain-http.png"))
            assert not foreign
        finally:
            b.close()


def test_outputs_follow_the_unit_switch(demo: tuple[Path, Server], browser: object) -> None:
    v = Visit(browser, demo[1].url)
    v.open("calculators/wire/")
    v.ready()
    box = "lb-wire-1"
    before = v.count(box)
    v.page.locator(f"#{box} .lb-units").click()
    v.computed(box, before)
    inputs = block_inputs(v, box)
    assert inputs["size"] == "18 AWG", inputs
    ans = compute("wire", inputs)
    area, diameter = v.out(box, "area_m2"), v.out(box, "diameter_m")
    # NEC Chapter 9 Table 8: 18 AWG solid is 1620 circular mils, 0.040 in across
    assert area.endswith("kcmil (18 AWG)"), area
    assert float(area.split()[0]) == pytest.approx(1.62, abs=0.01)
    assert float(area.split()[0]) * 1000 == pytest.approx(
        ans["values"]["area_m2"] / (3.141592653589793 / 4 * 0.0254e-3**2), rel=0.005
    )
    assert diameter.endswith(" mil"), diameter
    assert float(diameter.split()[0]) == pytest.approx(40.3, abs=0.1)
    assert v.page.locator(f"#{box} [data-pin=drop_V] .lb-pin-value").inner_text() == ans["display"]["drop_V"]
    # and back
    before = v.count(box)
    v.page.locator(f"#{box} .lb-units").click()
    v.computed(box, before)
    assert v.out(box, "area_m2") == compute("wire", block_inputs(v, box))["display"]["area_m2"]
