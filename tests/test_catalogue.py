"""The designs as a set: the review cache, parallel review, `lampbook check` over a folder,
and the fixtures index page (unit, plugin and browser tiers)."""

from __future__ import annotations

import json
import os
import re
import shutil
import subprocess
import sys
from collections.abc import Iterator
from pathlib import Path

import pytest
from lampcalc.design_api import handle
from sites import ROOT, Server, built_and_served, launch, write_site

from lampbook.catalogue import check_design, review_sheet, run_all, summary
from lampbook.fixtureindex import IndexRow, index_markdown
from lampbook.reviewcache import ReviewCache, _tree_digest, core_fingerprint, review_key

DESIGNS = ROOT / "docs" / "designs"
DEMO = sorted(DESIGNS.glob("*.toml"))
CV = (DESIGNS / "panel-24v.toml").read_text(encoding="utf-8")


def cv_variant(k: int) -> str:
    """Another invented constant-voltage design: the demo's 24 V panel with its own name and ballast."""
    ohms = (120, 150, 180, 220)[k % 4]
    text = re.sub(r'^name = ".*"$', f'name = "Bench strip {k}"', CV, count=1, flags=re.M)
    return re.sub(r'^ballast = "[^"]*"$', f'ballast = "{ohms} Ω"', text, count=1, flags=re.M)


def lampbook(*args: str, cwd: Path = ROOT) -> subprocess.CompletedProcess[str]:
    return subprocess.run(
        [sys.executable, "-m", "lampbook.cli", *args], capture_output=True, text=True, cwd=cwd, timeout=300
    )


# --- the cache key ---------------------------------------------------------------------------


def test_key_follows_design_text_options_and_core() -> None:
    opts = {"check": {"waveforms": True}}
    k = review_key(CV, opts, core="core-a")
    assert k == review_key(CV, dict(opts), core="core-a")  # same content, same key
    assert k != review_key(CV + "\n", opts, core="core-a")  # one byte of the design
    assert k != review_key(CV, {"check": {"waveforms": False}}, core="core-a")  # an option
    assert k != review_key(CV, opts, core="core-b")  # another core
    assert review_key(CV, opts) == review_key(CV, opts, core=core_fingerprint())


def test_core_digest_changes_with_any_core_source_file(tmp_path: Path) -> None:
    import lampcalc

    src = Path(lampcalc.__file__).resolve().parent
    copy = tmp_path / "lampcalc"
    shutil.copytree(src, copy, ignore=shutil.ignore_patterns("__pycache__"))
    before = _tree_digest(copy)
    assert before == _tree_digest(src)
    target = copy / "fixture" / "check.py"
    target.write_text(target.read_text() + "\n# changed\n")
    changed = _tree_digest(copy)
    assert changed != before
    (copy / "physics" / "wire.py").unlink()
    assert _tree_digest(copy) not in (before, changed)


def test_fingerprint_names_the_core_version(monkeypatch: pytest.MonkeyPatch) -> None:
    import lampcalc

    core_fingerprint.cache_clear()
    first = core_fingerprint()
    monkeypatch.setattr(lampcalc, "__version__", lampcalc.__version__ + ".post1")
    core_fingerprint.cache_clear()
    try:
        assert core_fingerprint() != first
    finally:
        monkeypatch.undo()
        core_fingerprint.cache_clear()
    assert core_fingerprint() == first


# --- the cache folder ------------------------------------------------------------------------


def test_cache_round_trip_and_refusals(tmp_path: Path) -> None:
    cache = ReviewCache(tmp_path / "reviews")
    key = review_key(CV, {}, core="x")
    assert cache.get(key) is None
    cache.put(key, {"page": "# P\n", "summary": {"verdict": "pass"}})
    assert cache.get(key) == {"page": "# P\n", "summary": {"verdict": "pass"}}
    files = [p for p in (tmp_path / "reviews").rglob("*") if p.is_file()]
    assert [p.name for p in files] == [f"{key}.json"]  # no temporary file left behind
    path = files[0]
    # an entry that claims another key, a torn write, and rubbish are all misses
    other = review_key(CV + " ", {}, core="x")
    (path.parent.parent / other[:2]).mkdir(exist_ok=True)
    shutil.copyfile(path, path.parent.parent / other[:2] / f"{other}.json")
    assert cache.get(other) is None
    text = path.read_text()
    path.write_text(text[: len(text) // 2])
    assert cache.get(key) is None
    path.write_text("[1, 2]")
    assert cache.get(key) is None
    # safe to delete
    shutil.rmtree(tmp_path / "reviews")
    assert cache.get(key) is None
    cache.put(key, {"page": "again"})
    assert cache.get(key) == {"page": "again"}


def test_failed_write_leaves_nothing(tmp_path: Path) -> None:
    cache = ReviewCache(tmp_path)
    key = review_key(CV, {}, core="y")
    with pytest.raises(TypeError):
        cache.put(key, {"page": object()})  # not JSON: the write fails halfway
    assert [p for p in tmp_path.rglob("*") if p.is_file()] == []
    assert cache.get(key) is None


# --- summaries and parallel review -------------------------------------------------------


@pytest.mark.parametrize("path", DEMO, ids=[p.stem for p in DEMO])
def test_summary_is_the_check_reduced(path: Path) -> None:
    ans = handle("check", {"toml": path.read_text(encoding="utf-8")})
    s = summary(ans)
    statuses = {c["id"]: c["status"] for c in ans["checks"]}
    assert s["failed_checks"] == [i for i, st in statuses.items() if st == "fail"]
    assert s["warned_checks"] == [i for i, st in statuses.items() if st == "warn"]
    worst = "fail" if "fail" in statuses.values() else "warn" if "warn" in statuses.values() else "pass"
    assert s["verdict"] == worst
    for k in ("led_current_avg_A", "input_power_W"):
        assert s[k] == ans["nominal"][k]
    assert s["power_factor"] == ans["nominal"].get("power_factor")


def test_parallel_check_equals_serial() -> None:
    texts = [p.read_text(encoding="utf-8") for p in DEMO] + [cv_variant(k) for k in range(3)]
    seen: list[tuple[int, int]] = []
    serial = run_all(check_design, texts, jobs=1, progress=lambda d, n, s: seen.append((d, n)), every=0.0)
    parallel = run_all(check_design, texts, jobs=2)

    def strip(rs: list[dict[str, object]]) -> list[object]:
        return [r["summary"] for r in rs]

    assert strip(parallel) == strip(serial)
    assert [s["name"] for s in strip(serial)] == [handle("check", {"toml": t})["name"] for t in texts]  # type: ignore[index]
    assert seen == [(i + 1, len(texts)) for i in range(len(texts))]


def test_no_worker_processes_falls_back_to_this_process(monkeypatch: pytest.MonkeyPatch) -> None:
    import concurrent.futures

    def refuse(*args: object, **kw: object) -> None:
        raise OSError(38, "Function not implemented")  # e.g. no shared memory for process locks

    texts = [cv_variant(k) for k in range(3)]
    serial = run_all(check_design, texts, jobs=1)
    monkeypatch.setattr(concurrent.futures, "ProcessPoolExecutor", refuse)
    assert [r["summary"] for r in run_all(check_design, texts, jobs=2)] == [r["summary"] for r in serial]


def test_parallel_sheets_equal_serial() -> None:
    texts = [cv_variant(k) for k in range(3)] + ['name = "x"\n[supply]\nkind = "cv"\nvoltage = "24"\n']
    serial = run_all(review_sheet, texts, jobs=1)
    parallel = run_all(review_sheet, texts, jobs=2)
    assert [(r.get("page"), r.get("summary"), r.get("error")) for r in serial] == [
        (r.get("page"), r.get("summary"), r.get("error")) for r in parallel
    ]
    assert "supply.voltage" in str(serial[-1]["error"])
    assert "Bench strip 1" in str(serial[1]["page"])


# --- lampbook check over a folder --------------------------------------------------------------


def test_check_folder_one_line_per_design_and_total() -> None:
    r = lampbook("check", "docs/designs")
    singles = {p: handle("check", {"toml": p.read_text(encoding="utf-8")}) for p in DEMO}
    assert r.returncode == (1 if any(a["failed"] for a in singles.values()) else 0), r.stderr
    lines = r.stdout.splitlines()
    for p, a in singles.items():
        (line,) = [x for x in lines if x.startswith(f"docs/designs/{p.name} ")]
        assert a["name"] in line
        verdict = "FAIL" if a["failed"] else "WARN" if a["warned"] else "PASS"
        assert f"  {verdict}  " in line
        for c in a["checks"]:
            assert (c["id"] in line.split("  ")[-1]) == (c["status"] == "fail"), (p.name, c["id"])
    fails = sum(1 for a in singles.values() if a["failed"])
    assert f"{len(DEMO)} designs checked: {fails} fail," in r.stdout
    assert "CAUTION (mains)" in r.stdout and "Local codes" in r.stdout


def test_check_json_list_matches_single_checks() -> None:
    r = lampbook("check", *[str(p) for p in DEMO], "--json", "--jobs", "1")
    items = json.loads(r.stdout)
    assert [it["design"] for it in items] == [str(p) for p in DEMO]
    for it, p in zip(items, DEMO, strict=True):
        single = json.loads(lampbook("check", str(p), "--json").stdout)
        assert it["failed_checks"] == [c["id"] for c in single["checks"] if c["status"] == "fail"]
        assert it["led_current_avg_A"] == single["nominal"]["led_current_avg_A"]
        assert it["input_power_W"] == single["nominal"]["input_power_W"]
        assert it["power_factor"] == single["nominal"].get("power_factor")


def test_check_set_exit_codes(tmp_path: Path) -> None:
    (tmp_path / "strip.toml").write_text(cv_variant(2), encoding="utf-8")
    ok = [str(DESIGNS / "panel-24v.toml"), str(tmp_path / "strip.toml")]
    r = lampbook("check", *ok, "--jobs", "1")
    assert r.returncode == 0, r.stdout + r.stderr  # warnings only
    assert "2 designs checked: 0 fail" in r.stdout
    bad = tmp_path / "bad.toml"
    bad.write_text('name = "b"\n[supply]\nkind = "cv"\nvoltage = "24"\n')
    r = lampbook("check", str(bad), *ok, "--jobs", "1")
    assert r.returncode == 2
    assert f"lampbook check {bad}: " in r.stderr and "supply.voltage" in r.stderr and "got 24;" in r.stderr
    assert "1 could not be checked" in r.stdout
    (tmp_path / "empty").mkdir()
    r = lampbook("check", str(tmp_path / "empty"))
    assert r.returncode == 2 and "expected design files (*.toml)" in r.stderr
    r = lampbook("check", *ok, "--waveforms")
    assert r.returncode == 2 and "--waveforms" in r.stderr
    r = lampbook("check", *ok, "--jobs", "-2")
    assert r.returncode == 2 and "--jobs" in r.stderr and "'-2'" in r.stderr and "Traceback" not in r.stderr


def test_single_file_check_keeps_its_report() -> None:
    r = lampbook("check", "docs/designs/panel-230.toml")
    assert "Exit code 1 when any check fails." in r.stdout
    assert "designs checked" not in r.stdout
    assert r.stdout.splitlines()[0].startswith("KR flood panel 230 (revision")


# --- the index page as written -------------------------------------------------------------


def _summary(name: str, verdict: str, kind: str = "mains", power: float | None = 5.0) -> dict[str, object]:
    return {
        "name": name,
        "revision": "A",
        "kind": kind,
        "verdict": verdict,
        "failed": 1 if verdict == "fail" else 0,
        "warned": 1 if verdict == "warn" else 0,
        "failed_checks": ["fuse.rating"] if verdict == "fail" else [],
        "warned_checks": ["flicker.ieee1789"] if verdict == "warn" else [],
        "supply_voltage_V": 230.0,
        "led_current_avg_A": 0.05,
        "input_power_W": power,
        "power_factor": None if kind == "cv" else 0.4,
    }


def test_index_orders_worst_first_and_escapes() -> None:
    rows = [
        IndexRow(_summary("b pass", "pass"), "b/", "b.toml"),
        IndexRow(_summary('<a> & "c"', "fail"), "c/", "c.toml"),
        IndexRow(_summary("a warn", "warn", kind="cv", power=None), "a/", "a.toml"),
    ]
    page = index_markdown(rows, safety_href="../safety/")
    order = re.findall(r'data-verdict="(\w+)"', page)
    assert order == ["fail", "warn", "pass"]
    assert "&lt;a&gt; &amp; &quot;c&quot;" in page and '<a> & "c"' not in page
    assert 'href="../safety/"' in page and 'class="lb-caution"' in page
    assert "3 designs: 1 failing, 1 with warnings, 1 passing." in page
    assert 'data-power=""' in page  # a missing figure is empty, not zero
    assert "\n\n" not in page.split('<div class="lb-fixtures"', 1)[1]  # one raw HTML block for Markdown
    cv_only = index_markdown([rows[2]])
    assert "lb-caution" not in cv_only


# --- plugin tier: real builds ---------------------------------------------------------------


def _designs_site(folder: Path, designs: dict[str, str], extra: str = "", own_cache: bool = True) -> Path:
    """A small handbook of these designs; its own (empty) cache folder unless told to share the tests' one."""
    site = write_site(folder, {"index.md": "# Home\n", "safety.md": "# Safety\n"}, engine=False)
    (site / "docs" / "designs").mkdir()
    for name, text in designs.items():
        (site / "docs" / "designs" / name).write_text(text, encoding="utf-8")
    y = (site / "mkdocs.yml").read_text()
    y = y.replace("      engine: false", "      engine: false\n      designs: designs")
    if own_cache:
        y = re.sub(r"      cache_dir: .*\n", f"      cache_dir: {folder / 'cache'}\n", y)
    (site / "mkdocs.yml").write_text(y + extra)
    return site


def _article(page: str) -> str:
    """A page's own content (the navigation around it lists every page's title)."""
    m = re.search(r"<article\b.*?</article>", page, re.S)
    assert m
    return m.group(0)


def _sheets(site: Path) -> dict[str, str]:
    out = {}
    for p in sorted((site / "site" / "designs").glob("*/index.html")):
        out[p.parent.name] = _article(p.read_text(encoding="utf-8"))
    return out


def _counts(stderr: str) -> tuple[int, int]:
    m = re.search(r"designs: \d+ sheets, (\d+) reviewed .*?, (\d+) from the cache", stderr)
    assert m, stderr
    return int(m.group(1)), int(m.group(2))


def _build(site: Path) -> subprocess.CompletedProcess[str]:
    args = [sys.executable, "-m", "mkdocs", "build", "--strict"]
    env = {**os.environ, "NO_MKDOCS_2_WARNING": "1"}
    return subprocess.run(args, cwd=site, capture_output=True, text=True, timeout=600, env=env)


@pytest.mark.plugin
def test_build_reviews_once_per_content(tmp_path: Path) -> None:
    designs = {f"strip-{k}.toml": cv_variant(k) for k in range(3)}
    site = _designs_site(tmp_path, designs, "      review_jobs: 2\n")
    r = _build(site)
    assert r.returncode == 0, r.stderr
    assert _counts(r.stderr) == (3, 0)
    assert "reviewing 3 designs in 2 worker processes" in r.stderr
    first = _sheets(site)
    assert set(first) == {"strip-0", "strip-1", "strip-2"}
    r = _build(site)
    assert _counts(r.stderr) == (0, 3)
    assert _sheets(site) == first  # taken from the cache, the same pages
    # one edit: only that design is reviewed again
    (site / "docs" / "designs" / "strip-1.toml").write_text(cv_variant(5), encoding="utf-8")
    r = _build(site)
    assert _counts(r.stderr) == (1, 2)
    again = _sheets(site)
    assert again["strip-0"] == first["strip-0"] and again["strip-1"] != first["strip-1"]
    assert "Bench strip 5" in again["strip-1"]
    # the cache is safe to delete
    shutil.rmtree(tmp_path / "cache" / "reviews")
    r = _build(site)
    assert r.returncode == 0 and _counts(r.stderr) == (3, 0)
    assert _sheets(site) == again


@pytest.mark.plugin
def test_cached_serial_and_parallel_builds_are_identical(tmp_path: Path) -> None:
    designs = {f"strip-{k}.toml": cv_variant(k) for k in range(3)}
    pages = []
    for i, extra in enumerate(("      review_jobs: 1\n      review_cache: false\n", "      review_jobs: 2\n", "")):
        site = _designs_site(tmp_path / str(i), designs, extra)
        r = _build(site)
        assert r.returncode == 0, r.stderr
        if i == 2:
            # same content as the run before, but its own cache folder; then from the cache
            r = _build(site)
            assert _counts(r.stderr) == (0, 3)
        pages.append(_sheets(site) | {"index": _article((site / "site" / "designs" / "index.html").read_text())})
    assert pages[0] == pages[1] == pages[2]
    assert not (tmp_path / "0" / "cache" / "reviews").exists()


@pytest.mark.plugin
def test_sheet_bodies_without_markdown_pass_are_the_same_pages(tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> None:
    from mkdocs.commands.build import build as mkdocs_build
    from mkdocs.config import load_config

    from lampbook.plugin.plugin import LampbookPlugin
    from lampbook.sheets import SHEET_SLOT

    designs = {"panel-230.toml": (DESIGNS / "panel-230.toml").read_text(encoding="utf-8"), "strip.toml": cv_variant(2)}
    site = _designs_site(tmp_path, designs, own_cache=False)
    original = LampbookPlugin.on_page_content
    slots: list[str] = []

    def spy(self: LampbookPlugin, html: str, /, **kw: object) -> str:
        if SHEET_SLOT in html:
            slots.append(kw["page"].file.src_uri)  # type: ignore[attr-defined]
        return original(self, html, **kw)  # type: ignore[arg-type]

    monkeypatch.setattr(LampbookPlugin, "on_page_content", spy)
    pages, filled = [], []
    for bypass in (False, True):
        monkeypatch.setattr(LampbookPlugin, "BYPASS_MARKDOWN", bypass)
        out = tmp_path / f"out-{bypass}"
        slots.clear()
        mkdocs_build(load_config(str(site / "mkdocs.yml"), site_dir=str(out)))
        filled.append(sorted(slots))
        pages.append({p.relative_to(out).as_posix(): p.read_bytes() for p in (out / "designs").rglob("*.html")})
    assert filled == [[], ["designs/panel-230.md", "designs/strip.md"]]  # the second build did skip Markdown
    assert len(pages[0]) == 3 and pages[0] == pages[1]
    assert SHEET_SLOT.encode() not in pages[1]["designs/strip/index.html"]


@pytest.mark.plugin
def test_cache_entry_is_what_the_build_serves(tmp_path: Path) -> None:
    """The build reads its pages from the cache: an entry changed on disk under its key shows up."""
    site = _designs_site(tmp_path, {"strip.toml": cv_variant(1)})
    assert _build(site).returncode == 0
    (entry,) = (tmp_path / "cache" / "reviews").rglob("*.json")
    data = json.loads(entry.read_text())
    data["entry"]["page"] = data["entry"]["page"].replace("Bench strip 1", "Marked from the cache")
    entry.write_text(json.dumps(data))
    assert _build(site).returncode == 0
    assert "Marked from the cache" in _sheets(site)["strip"]


@pytest.mark.plugin
def test_index_links_every_sheet_and_bad_jobs_refused(tmp_path: Path) -> None:
    designs = {p.name: p.read_text(encoding="utf-8") for p in DEMO}
    site = _designs_site(tmp_path, designs, own_cache=False)
    r = _build(site)
    assert r.returncode == 0, r.stderr
    index = (site / "site" / "designs" / "index.html").read_text()
    hrefs = re.findall(r'<td data-label="Fixture"><a href="([^"]+)">', index)
    assert len(hrefs) == len(DEMO)
    for h in hrefs:
        assert (site / "site" / "designs" / h / "index.html").is_file(), h
    for p in DEMO:
        s = summary(handle("check", {"toml": p.read_text(encoding="utf-8")}))
        row = re.search(rf'<tr data-name="[^"]*"[^>]*>(?:(?!</tr>).)*{re.escape(p.name)}', index, re.S)
        assert row and f'data-verdict="{s["verdict"]}"' in row.group(0)
    assert (site / "site" / "assets" / "lampbook" / "catalogue.js").is_file()
    assert "assets/lampbook/catalogue.js" in index and "assets/lampbook/catalogue.css" in index
    y = (site / "mkdocs.yml").read_text() + "      review_jobs: -1\n"
    (site / "mkdocs.yml").write_text(y)
    r = _build(site)
    assert r.returncode != 0 and "review_jobs: got -1" in r.stderr and "Traceback" not in r.stderr


# --- browser tier: the index on a phone ------------------------------------------------------


@pytest.fixture(scope="module")
def index_site(tmp_path_factory: pytest.TempPathFactory) -> Iterator[tuple[Path, Server]]:
    folder = tmp_path_factory.mktemp("fixtures")
    site = write_site(folder, {"index.md": "# Home\n", "safety.md": "# Safety\n"}, engine=False)
    shutil.copytree(DESIGNS, site / "docs" / "designs", ignore=shutil.ignore_patterns("*.md"))
    for k in range(4):
        (site / "docs" / "designs" / f"strip-{k}.toml").write_text(cv_variant(k), encoding="utf-8")
    y = (site / "mkdocs.yml").read_text().replace("      engine: false", "      engine: false\n      designs: designs")
    (site / "mkdocs.yml").write_text(y)
    with built_and_served(site) as srv:
        yield site / "site", srv


@pytest.mark.browser
def test_index_on_a_phone(index_site: tuple[Path, Server]) -> None:
    from playwright.sync_api import sync_playwright

    site, srv = index_site
    foreign: list[str] = []
    with sync_playwright() as p:
        b = launch(p)
        ctx = b.new_context(viewport={"width": 390, "height": 844})
        ctx.route(
            re.compile(r"^(?!http://127\.0\.0\.1:|file://).*"),  # the site's server and its own files only
            lambda route: (foreign.append(route.request.url), route.abort()),
        )
        page = ctx.new_page()
        errors: list[str] = []
        page.on("pageerror", lambda e: errors.append(str(e)))
        page.goto(srv.url + "designs/")
        page.wait_for_selector(".lb-fx-controls:not([hidden])")
        n = len(list((site / "designs").glob("*.toml")))
        visible = "() => [...document.querySelectorAll('.lb-fx-table tbody tr')].filter(r => !r.hidden)"
        assert page.evaluate(f"({visible})().length") == n
        assert page.evaluate("document.scrollingElement.scrollWidth") <= 390  # nothing wider than the phone
        ARTIFACTS = ROOT / "test-artifacts"
        ARTIFACTS.mkdir(exist_ok=True)
        page.screenshot(path=str(ARTIFACTS / "fixtures-index-390.png"))
        # filter by verdict
        page.select_option(".lb-fx-verdict", "fail")
        fails = page.evaluate(f"({visible})().map(r => r.dataset.verdict)")
        assert fails and set(fails) == {"fail"}
        assert page.locator(".lb-fx-shown").inner_text().startswith(f"Showing {len(fails)} of {n}.")
        # find by text, sort by input power: shown in increasing order
        page.select_option(".lb-fx-verdict", "")
        page.fill(".lb-fx-find input", "strip")
        page.select_option(".lb-fx-sort", "power")
        powers = page.evaluate(f"({visible})().map(r => Number(r.dataset.power))")
        assert len(powers) == 4 and powers == sorted(powers) and len(set(powers)) > 1
        page.click(".lb-fx-dir")
        assert page.evaluate(f"({visible})().map(r => Number(r.dataset.power))") == sorted(powers, reverse=True)
        page.fill(".lb-fx-find input", "no such fixture")
        assert page.locator(".lb-fx-none").is_visible()
        page.fill(".lb-fx-find input", "")
        # every link opens its sheet
        page.select_option(".lb-fx-verdict", "fail")
        page.locator(".lb-fx-table tbody tr:not([hidden]) a").first.click()
        page.wait_for_selector(".lb-st.lb-fail")
        assert "/designs/" in page.url and page.url != srv.url + "designs/"
        # from the files themselves, with no server at all
        page.goto((site / "designs" / "index.html").as_uri())
        page.wait_for_selector(".lb-fx-controls:not([hidden])")
        page.select_option(".lb-fx-verdict", "pass")
        page.select_option(".lb-fx-verdict", "warn")
        warns = page.evaluate(f"({visible})().map(r => r.dataset.verdict)")
        assert warns and set(warns) == {"warn"}
        ctx.close()
        b.close()
    assert not errors, errors
    assert not foreign, foreign
