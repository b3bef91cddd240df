"""Plugin tier: real `mkdocs build` runs on small sites in temporary folders."""

from __future__ import annotations

import hashlib
import html
import json
import re
from pathlib import Path

import pytest
from lampcalc.api import compute, handle
from sites import build, write_site

pytestmark = pytest.mark.plugin

PAGE = """# Bench

```lampbook
calculator: dropper
region: 120-60
capacitance: 2.2 uF
bus_voltage: 90 V
lock: region
```

```lampbook
calculator: wire
```
"""


@pytest.fixture(scope="module")
def site(tmp_path_factory: pytest.TempPathFactory) -> Path:
    folder = write_site(tmp_path_factory.mktemp("site"), {"index.md": PAGE, "safety.md": "# Safety\n"})
    r = build(folder)
    assert r.returncode == 0, r.stderr
    return folder / "site"


def payloads(page: str) -> list[dict[str, object]]:
    return [
        json.loads(m) for m in re.findall(r'<script type="application/json" class="lb-data">(.*?)</script>', page, re.S)
    ]


def test_forms_generated_from_declaration(site: Path) -> None:
    page = (site / "index.html").read_text()
    assert page.count('class="lb-calc"') == 2
    assert 'name="capacitance"' in page and 'value="2.2 uF"' in page
    assert re.search(r'<select name="region"[^>]*readonly', page)
    assert "Dropper capacitance" in page  # label from the declaration


def test_prerendered_answers_equal_core(site: Path) -> None:
    page = (site / "index.html").read_text()
    data = payloads(page)
    inputs = {"region": "120-60", "capacitance": "2.2 uF", "bus_voltage": "90 V"}
    native = compute("dropper", inputs)
    # what the page's engine answers to the same inputs (with the table of options drawn by the core)
    assert data[0]["answer"] == json.loads(handle(json.dumps({"calculator": "dropper", "inputs": inputs})))
    assert {k: v for k, v in data[0]["answer"].items() if k != "rows_html"} == native
    shown = re.search(r'<tr data-out="led_current_avg_A"><th>[^<]*</th><td>([^<]*)</td>', page)
    assert shown and html.unescape(shown.group(1)) == native["display"]["led_current_avg_A"]


def test_mains_blocks_link_the_safety_page(site: Path) -> None:
    page = (site / "index.html").read_text()
    assert 'class="lb-caution"' in page and 'href="safety/"' in page


def test_no_foreign_urls_fetched(site: Path) -> None:
    pat = re.compile(
        r"""(?:src|href)\s*=\s*["'](?:https?:)?//|url\(\s*["']?(?:https?:)?//|import\s*\(?\s*["']https?://"""
    )
    for p in site.rglob("*"):
        if p.suffix in (".html", ".css", ".js", ".mjs", ".webmanifest", ".json") and p.is_file():
            text = p.read_text(errors="replace")
            hits = [m.group(0) for m in pat.finditer(text)]
            # links the reader may click are fine; nothing the browser loads by itself may leave the site
            hits = [h for h in hits if not h.startswith("href")]
            assert not hits, (p, hits[:3])


def test_engine_bundle_and_lock(site: Path) -> None:
    eng = site / "engine"
    lock = json.loads((eng / "pyodide-lock.json").read_text())
    assert list(lock["packages"]) == ["lampcalc"]
    entry = lock["packages"]["lampcalc"]
    assert (eng / entry["file_name"]).is_file()
    assert hashlib.sha256((eng / entry["file_name"]).read_bytes()).hexdigest() == entry["sha256"]
    for f in ("pyodide.mjs", "pyodide.asm.mjs", "pyodide.asm.wasm", "python_stdlib.zip"):
        assert (eng / f).is_file()
    import zipfile

    names = set(zipfile.ZipFile(eng / "python_stdlib.zip").namelist())
    assert "json/__init__.pyc" in names and "json/__init__.py" not in names


def test_service_worker_precaches_everything(site: Path) -> None:
    sw = (site / "sw.js").read_text()
    m = re.search(r"const PRECACHE = (\{.*?\});", sw)
    assert m
    pre = json.loads(m.group(1))
    for must in (
        "index.html",
        "engine/pyodide.asm.wasm",
        "engine/pyodide-lock.json",
        "assets/lampbook/worker.js",
        "offline.html",
        "manifest.webmanifest",
    ):
        assert must in pre["files"], must
    for f in pre["files"]:
        assert (site / f).is_file(), f


def test_cache_name_follows_content(tmp_path: Path) -> None:
    a = write_site(tmp_path / "a", {"index.md": PAGE})
    assert build(a).returncode == 0
    v1 = re.search(r'"version": "(\w+)"', (a / "site" / "sw.js").read_text())
    assert build(a).returncode == 0
    v2 = re.search(r'"version": "(\w+)"', (a / "site" / "sw.js").read_text())
    (a / "docs" / "index.md").write_text(PAGE + "\nMore.\n")
    assert build(a).returncode == 0
    v3 = re.search(r'"version": "(\w+)"', (a / "site" / "sw.js").read_text())
    assert v1 and v2 and v3
    assert v1.group(1) == v2.group(1) != v3.group(1)


@pytest.mark.parametrize(
    ("block", "needle"),
    [
        ("calculator: toaster", "calculator block 1: calculator: got 'toaster'"),
        ("calculator: dropper\nflavour: 3", "calculator block 1: flavour: not an input of dropper"),
        (
            "calculator: dropper\ncapacitance: 2.2",
            "calculator block 1: capacitance: got 2.2; expected a capacitance",
        ),
        ("region: 230-50", "calculator block 1: calculator: missing"),
        ("calculator: dropper\njust words", "calculator block 1: line 2"),
    ],
)
def test_bad_blocks_fail_the_build_naming_page_block_key(tmp_path: Path, block: str, needle: str) -> None:
    folder = write_site(tmp_path, {"bench/page.md": f"# P\n\n```lampbook\n{block}\n```\n"}, engine=False)
    r = build(folder)
    assert r.returncode != 0
    assert "bench/page.md" in r.stderr and needle in r.stderr, r.stderr


def test_disabled_plugin_leaves_code(tmp_path: Path) -> None:
    folder = write_site(tmp_path, {"index.md": PAGE}, engine=False)
    y = (folder / "mkdocs.yml").read_text().replace("      engine: false", "      enabled: false\n      engine: false")
    (folder / "mkdocs.yml").write_text(y)
    r = build(folder)
    assert r.returncode == 0, r.stderr
    assert 'class="lb-calc"' not in (folder / "site" / "index.html").read_text()


def test_design_folder_becomes_sheet_pages(tmp_path: Path) -> None:
    from sites import ROOT

    folder = write_site(tmp_path, {"index.md": "# Home\n"}, engine=False)
    (folder / "docs" / "designs").mkdir()
    for name in ("panel-230.toml", "panel-24v.toml"):
        (folder / "docs" / "designs" / name).write_text((ROOT / "docs" / "designs" / name).read_text())
    y = (
        (folder / "mkdocs.yml")
        .read_text()
        .replace("      engine: false", "      engine: false\n      designs: designs")
    )
    (folder / "mkdocs.yml").write_text(y)
    r = build(folder, strict=False)
    assert r.returncode == 0, r.stderr
    page = (folder / "site" / "designs" / "panel-230" / "index.html").read_text()
    assert "Operating table" in page and "Bill of materials" in page and "<svg" in page and "dropper.ac_rating" in page
    assert (folder / "site" / "designs" / "panel-24v" / "index.html").is_file()
    # the written page has the whole body; the search index has the sheet's words without its tables
    assert "data-lb-sheet-start" not in page and "data-lb-sheet-end" not in page
    index = json.loads((folder / "site" / "search" / "search_index.json").read_text())
    sheet_docs = [d for d in index["docs"] if d["location"].startswith("designs/panel-230/")]
    text = " ".join(d["title"] + " " + d["text"] for d in sheet_docs)
    assert "Operating table" in text and "Bill of materials" in text  # the headings are searchable
    assert "dropper.ac_rating" in text  # the checks list (words, not a table) is searchable
    # no table's cells and no drawing's labels: words found only inside a table or a figure are not indexed
    outside = re.sub(r"<(table|figure)\b.*?</\1>", "", page, flags=re.S)
    only_inside = {
        w
        for m in re.findall(r"<(?:td|th|text)\b[^>]*>([^<]{6,})<", page)
        for w in [m.strip()]
        if w and w not in outside
    }
    assert len(only_inside) > 20
    assert not [w for w in only_inside if w in text]
    # a broken design fails the build, naming the file and the key
    (folder / "docs" / "designs" / "broken.toml").write_text(
        'name = "b"\n[supply]\nkind = "cv"\nvoltage = "24"\n[module]\n'
    )
    r = build(folder, strict=False)
    assert r.returncode != 0 and "designs/broken.toml" in r.stderr and "supply.voltage" in r.stderr


def test_reference_tables_equal_core(tmp_path: Path) -> None:
    # cells as the core gives them, a number kept with its unit, a recalled limit shown as a dagger
    from lampcalc.cautions import UNVERIFIED_NOTE, daggered
    from lampcalc.present.html import keep_numbers
    from lampcalc.present.tables import TABLES

    def shown(text: str) -> str:
        return keep_numbers(daggered(text)[0])

    body = "".join(f"```lampbook-table\ntable: {name}\n```\n\n" for name in TABLES)
    folder = write_site(tmp_path, {"index.md": "# Tables\n\n" + body}, engine=False)
    r = build(folder)
    assert r.returncode == 0, r.stderr
    page = (folder / "site" / "index.html").read_text()
    for name, fn in TABLES.items():
        t = fn()
        m = re.search(rf'<div class="lb-reftable" data-table="{name}">(.*?)</ul></div>', page, re.S)
        assert m, name
        cells = [html.unescape(c) for c in re.findall(r"<td>(.*?)</td>", m.group(1), re.S)]
        assert cells == [shown(c) for row in t.rows for c in row], name
        for src in t.sources:
            assert shown(src) in html.unescape(page), src
        recalled = any(daggered(c)[1] for row in t.rows for c in row) or any(daggered(x)[1] for x in t.sources)
        assert html.unescape(m.group(1)).count(UNVERIFIED_NOTE) == (1 if recalled else 0), name
    assert "from memory" not in page


def test_bad_table_block_fails(tmp_path: Path) -> None:
    folder = write_site(tmp_path, {"t.md": "# T\n\n```lampbook-table\ntable: nope\n```\n"}, engine=False)
    r = build(folder)
    assert r.returncode != 0 and "t.md" in r.stderr and "table: got 'nope'" in r.stderr
