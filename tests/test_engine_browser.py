"""Browser tier: a first visit sends each file once, the engine's files included
(the service worker takes the engine's own downloads over), and a second visit
starts the engine from the offline cache without asking the server for them."""

from __future__ import annotations

import functools
import http.server
import threading
from collections import Counter
from collections.abc import Iterator
from pathlib import Path
from typing import Any

import pytest
from sites import _Quiet, build, launch, write_site

pytestmark = pytest.mark.browser


class CountingServer:
    """The plain static server of the tests, counting the bodies it sends per path."""

    def __init__(self, directory: Path) -> None:
        self.bodies: Counter[str] = Counter()
        outer = self

        class Handler(_Quiet):
            def copyfile(self, source, outputfile):  # type: ignore[no-untyped-def]
                outer.bodies[self.path.split("?")[0]] += 1
                super().copyfile(source, outputfile)

        self.httpd = http.server.ThreadingHTTPServer(
            ("127.0.0.1", 0), functools.partial(Handler, directory=str(directory))
        )
        threading.Thread(target=self.httpd.serve_forever, daemon=True).start()
        self.url = f"http://127.0.0.1:{self.httpd.server_address[1]}/"

    def close(self) -> None:
        self.httpd.shutdown()
        self.httpd.server_close()


@pytest.fixture
def served(tmp_path: Path) -> Iterator[CountingServer]:
    folder = write_site(tmp_path, {"index.md": "# One\n\n```lampbook\ncalculator: dropper\n```\n"})
    r = build(folder)
    assert r.returncode == 0, r.stderr
    srv = CountingServer(folder / "site")
    yield srv
    srv.close()


def _first_visit(browser: object, url: str) -> Any:
    """A fresh browser context opens URL and waits until the page is offline-ready (engine and cache)."""
    page = browser.new_context(service_workers="allow").new_page()  # type: ignore[attr-defined]
    page.goto(url)
    page.wait_for_selector(".lb-engine[data-state*=offline]", timeout=180000)
    return page


def test_first_visit_sends_each_file_once(served: CountingServer) -> None:
    from playwright.sync_api import sync_playwright

    with sync_playwright() as p:
        b = launch(p)
        try:
            page = _first_visit(b, served.url)
            twice = {k: n for k, n in served.bodies.items() if n > 1}
            assert not twice, twice
            for f in ("pyodide.asm.wasm", "python_stdlib.zip", "pyodide.asm.mjs", "lampcalc-0.1.0-py3-none-any.whl"):
                assert served.bodies["/engine/" + f] == 1, (f, dict(served.bodies))
            # the page's search languages and source maps were not fetched for the offline cache
            assert not [k for k in served.bodies if k.endswith(".map") or "/lunr/" in k]
            # a second visit: the engine starts from the offline cache
            before = Counter(served.bodies)
            page.reload()
            page.wait_for_selector(".lb-engine[data-state^=ready]", timeout=180000)
            assert not [k for k in served.bodies if k.startswith("/engine/") and served.bodies[k] != before[k]]
            assert "lampbook-staged" not in page.evaluate("caches.keys()")  # handed over, then dropped
        finally:
            b.close()


def _phases(page: object) -> dict[str, object]:
    for w in page.workers:  # type: ignore[attr-defined]
        if w.url.endswith("worker.js"):
            return dict(w.evaluate("self.lbPhases"))
    raise AssertionError("no engine worker")


def _answers(page: object) -> list[str]:
    """The live answer of the page's calculator, row by row, once the engine has computed it."""
    page.wait_for_function(  # type: ignore[attr-defined]
        "Number(document.querySelector('#lb-dropper-1').dataset.computed || 0) > 0", timeout=60000
    )
    rows: list[str] = page.eval_on_selector_all("#lb-dropper-1 tr[data-out]", "rs => rs.map(r => r.innerText)")  # type: ignore[attr-defined]
    assert len(rows) > 5
    return rows


def test_later_visits_restore_the_engine_from_its_snapshot(served: CountingServer, tmp_path: Path) -> None:
    """The first visit starts Python and imports the core, and keeps a memory snapshot of that engine on the
    device under the digest of the engine's files; later visits restore it and answer exactly as the first.
    A snapshot that cannot be used is dropped: the engine starts afresh and makes a new one."""
    import json

    from playwright.sync_api import sync_playwright

    lock = json.loads((tmp_path / "site" / "engine" / "pyodide-lock.json").read_text())
    cache = "lampbook-snapshot-" + lock["lampbook"]["engine"]
    snapshot_size = (
        f"caches.open({json.dumps(cache)}).then(c => c.match(new URL('engine/lampbook-snapshot.bin', location.href)))"
        ".then(r => r ? r.arrayBuffer() : null).then(b => b ? b.byteLength : 0)"
    )
    with sync_playwright() as p:
        b = launch(p)
        try:
            page = _first_visit(b, served.url)
            first = _answers(page)
            ph = _phases(page)
            assert not ph.get("restored") and "snapshot" in ph, ph
            # kept by the service worker when it cleared the caches of other builds
            keys = page.evaluate("caches.keys()")
            assert cache in keys and len(keys) == 2, keys
            assert page.evaluate(snapshot_size) > 8_000_000
            page.reload()
            page.wait_for_selector(".lb-engine[data-state^=ready]", timeout=180000)
            assert _phases(page).get("restored") is True
            assert _answers(page) == first
            # a change of inputs is computed by the restored engine
            page.fill("#lb-dropper-1 [name=capacitance]", "1.5 uF")
            page.wait_for_function(
                "Number(document.querySelector('#lb-dropper-1').dataset.computed || 0) > 1", timeout=60000
            )
            assert page.eval_on_selector_all("#lb-dropper-1 tr[data-out]", "rs => rs.map(r => r.innerText)") != first
            # a broken snapshot: the engine starts afresh, answers, and keeps a good snapshot again (and a
            # snapshot another build's engine left is dropped when this one is stored)
            page.evaluate(
                f"caches.open({json.dumps(cache)}).then(c => c.put(new URL('engine/lampbook-snapshot.bin',"
                " location.href), new Response(new Uint8Array(4096))))"
            )
            page.evaluate("caches.open('lampbook-snapshot-0123456789abcdef01234567')")
            page.reload()
            page.wait_for_selector(".lb-engine[data-state^=ready]", timeout=180000)
            assert not _phases(page).get("restored")
            assert _answers(page) == first
            deadline = 60
            while page.evaluate(snapshot_size) < 8_000_000 and deadline:
                page.wait_for_timeout(500)
                deadline -= 1
            assert "lampbook-snapshot-0123456789abcdef01234567" not in page.evaluate("caches.keys()")
            page.reload()
            page.wait_for_selector(".lb-engine[data-state^=ready]", timeout=180000)
            assert _phases(page).get("restored") is True
            assert _answers(page) == first
        finally:
            b.close()
