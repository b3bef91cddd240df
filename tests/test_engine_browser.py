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


def test_first_visit_sends_each_file_once(served: CountingServer) -> None:
    from playwright.sync_api import sync_playwright

    with sync_playwright() as p:
        b = launch(p)
        try:
            ctx = b.new_context(service_workers="allow")
            page = ctx.new_page()
            page.goto(served.url)
            page.wait_for_selector(".lb-engine[data-state*=offline]", timeout=180000)
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
