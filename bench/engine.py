"""Engine start-up and first-visit benchmarks (the demo handbook in Debian's Chromium).

For each site configuration and each server kind, a fresh browser context opens the
dropper page (cold), waits until the engine is ready and the first live answer is
shown, waits for the offline cache to be complete, then opens the page again (warm).
Measured per visit: engine ready and first live result (ms from navigation start),
the engine's own phases (from the worker), and for the first visit the bytes the
server sent and every file whose body was sent more than once.

Two servers: ``plain`` sends files as they are; ``gzip`` compresses text, JavaScript,
JSON and wasm on the fly as a typical static host does (zip and images as they are).
Both answer ``If-Modified-Since`` with 304 as static hosts do.

Run alone: ``.venv/bin/python bench/engine.py [RUNS]`` (prints JSON).
"""

from __future__ import annotations

import email.utils
import gzip
import http.server
import json
import os
import statistics
import sys
import tempfile
import threading
import time
from collections import Counter
from pathlib import Path
from typing import Any
from urllib.parse import unquote, urlsplit

ROOT = Path(__file__).resolve().parent.parent
sys.path.insert(0, str(ROOT / "tests"))

COMPRESSED_TYPES = ("text/", "application/javascript", "application/json", "application/wasm", "image/svg+xml")
TYPES = {
    ".html": "text/html",
    ".css": "text/css",
    ".js": "application/javascript",
    ".mjs": "application/javascript",
    ".json": "application/json",
    ".webmanifest": "application/manifest+json",
    ".wasm": "application/wasm",
    ".svg": "image/svg+xml",
    ".png": "image/png",
    ".zip": "application/zip",
    ".whl": "application/zip",
    ".xml": "application/xml",
    ".txt": "text/plain",
}


class CountingServer:
    """A static server on 127.0.0.1 that counts what it sends: bytes on the wire and
    bodies per path (a 304 answer sends no body)."""

    def __init__(self, directory: Path, compress: bool) -> None:
        self.directory = directory
        self.compress = compress
        self.bytes = 0
        self.bodies: Counter[str] = Counter()
        self.not_modified = 0
        self._gz: dict[Path, bytes] = {}
        self._lock = threading.Lock()
        outer = self

        class Handler(http.server.BaseHTTPRequestHandler):
            protocol_version = "HTTP/1.1"

            def log_message(self, *args: object) -> None:
                pass

            def do_GET(self) -> None:
                outer._answer(self)

        self.httpd = http.server.ThreadingHTTPServer(("127.0.0.1", 0), Handler)
        self.httpd.daemon_threads = True
        threading.Thread(target=self.httpd.serve_forever, daemon=True).start()
        self.url = f"http://127.0.0.1:{self.httpd.server_address[1]}/"

    def reset(self) -> None:
        with self._lock:
            self.bytes = 0
            self.bodies = Counter()
            self.not_modified = 0

    def _answer(self, h: http.server.BaseHTTPRequestHandler) -> None:
        path = unquote(urlsplit(h.path).path)
        f = (self.directory / path.lstrip("/")).resolve()
        if not str(f).startswith(str(self.directory.resolve())):
            h.send_error(403)
            return
        if f.is_dir():
            if not path.endswith("/"):
                h.send_response(301)
                h.send_header("Location", path + "/")
                h.send_header("Content-Length", "0")
                h.end_headers()
                return
            f = f / "index.html"
        if not f.is_file():
            h.send_error(404)
            return
        mtime = int(f.stat().st_mtime)
        ims = h.headers.get("If-Modified-Since")
        if ims:
            try:
                since = email.utils.parsedate_to_datetime(ims).timestamp()
            except (TypeError, ValueError):
                since = -1
            if since >= mtime:
                h.send_response(304)
                h.send_header("Last-Modified", email.utils.formatdate(mtime, usegmt=True))
                h.end_headers()
                with self._lock:
                    self.not_modified += 1
                return
        ctype = TYPES.get(f.suffix, "application/octet-stream")
        body = f.read_bytes()
        encoded = False
        if (
            self.compress
            and ctype.startswith(COMPRESSED_TYPES)
            and "gzip" in h.headers.get("Accept-Encoding", "")
            and len(body) > 256
        ):
            with self._lock:
                gz = self._gz.get(f)
            if gz is None:
                gz = gzip.compress(body, compresslevel=6, mtime=0)
                with self._lock:
                    self._gz[f] = gz
            body, encoded = gz, True
        h.send_response(200)
        h.send_header("Content-Type", ctype)
        h.send_header("Content-Length", str(len(body)))
        h.send_header("Last-Modified", email.utils.formatdate(mtime, usegmt=True))
        if encoded:
            h.send_header("Content-Encoding", "gzip")
            h.send_header("Vary", "Accept-Encoding")
        h.end_headers()
        h.wfile.write(body)
        with self._lock:
            self.bytes += len(body)
            self.bodies[path] += 1

    def close(self) -> None:
        self.httpd.shutdown()
        self.httpd.server_close()


def build_demo(folder: Path, options: str = "") -> float:
    """Build the demo handbook into FOLDER/site with extra plugin OPTIONS (YAML lines)."""
    from sites import build, write_demo

    write_demo(folder, options)
    t0 = time.perf_counter()
    r = build(folder)
    if r.returncode:
        raise SystemExit(r.stderr)
    return time.perf_counter() - t0


PAGE = "calculators/dropper/"
MEASURE = """() => ({
    fcp: (performance.getEntriesByName('first-contentful-paint')[0] || {}).startTime,
    ready: performance.getEntriesByName('lb-engine-ready')[0].startTime,
    live: performance.getEntriesByName('lb-first-live')[0].startTime })"""


# bytes of the engine's memory snapshot the page keeps on the device (0 if none)
SNAPSHOT_BYTES = """async () => {
    for (const k of await caches.keys()) if (k.startsWith('lampbook-snapshot-')) {
        const r = await (await caches.open(k)).match(new URL('/engine/lampbook-snapshot.bin', location.href));
        if (r) return (await r.arrayBuffer()).byteLength;
    }
    return 0; }"""


def _visit(page: Any, url: str) -> dict[str, Any]:
    page.goto(url)
    page.wait_for_selector(".lb-engine[data-state^=ready]", timeout=120000)
    page.fill("#lb-dropper-1-capacitance", "2.2 uF")
    page.wait_for_function("performance.getEntriesByName('lb-first-live').length > 0", timeout=60000)
    m: dict[str, Any] = page.evaluate(MEASURE)
    phases = None
    for w in page.workers:
        if w.url.endswith("worker.js"):
            phases = w.evaluate("self.lbPhases || null")
    if phases:
        # ms from the page's navigation start, like the page's own marks
        shift = phases.pop("origin") - page.evaluate("performance.timeOrigin")
        phases = {
            "spawn": shift,
            **{k: v if isinstance(v, bool) else v + shift for k, v in phases.items() if k != "stored"},
        }
    m["phases"] = phases
    return m


def measure_site(browser: Any, site: Path, compress: bool, runs: int) -> dict[str, Any]:
    srv = CountingServer(site, compress)
    rows: dict[str, list[dict[str, Any]]] = {"cold": [], "warm": []}
    first: list[int] = []
    snapshots: list[int] = []
    twice: Counter[str] = Counter()
    revalidated: list[int] = []
    try:
        for _ in range(runs):
            ctx = browser.new_context(viewport={"width": 390, "height": 844})
            page = ctx.new_page()
            srv.reset()
            rows["cold"].append(_visit(page, srv.url + PAGE))
            # the whole first visit: the page, the engine and the offline cache made complete
            page.wait_for_selector(".lb-engine[data-state*=offline]", timeout=120000)
            time.sleep(0.5)
            snapshots.append(page.evaluate(SNAPSHOT_BYTES))
            first.append(srv.bytes)
            revalidated.append(srv.not_modified)
            for p, n in srv.bodies.items():
                if n > 1:
                    twice[p] += 1
            rows["warm"].append(_visit(page, srv.url + PAGE))
            ctx.close()
    finally:
        srv.close()
    out: dict[str, Any] = {"runs": runs, "first_visit_bytes": statistics.median(first)}
    out["files_sent_twice"] = sorted(twice)
    out["revalidated_304"] = statistics.median(revalidated)
    out["snapshot_bytes"] = statistics.median(snapshots)
    for visit, rs in rows.items():
        v: dict[str, Any] = {k: statistics.median(r[k] for r in rs) for k in ("fcp", "ready", "live")}
        ph = [r["phases"] for r in rs if r["phases"]]
        if ph:
            v["restored"] = sum(1 for p in ph if p.get("restored") is True)
            common = set.intersection(*(set(p) for p in ph)) - {"restored"}
            v["phases"] = {k: statistics.median(p[k] for p in ph) for k in sorted(common)}
        out[visit] = v
    return out


def site_bytes(site: Path, suffixes: tuple[str, ...] = (".gz", ".br")) -> dict[str, int]:
    files = [f for f in site.rglob("*") if f.is_file()]
    return {
        "site_bytes": sum(f.stat().st_size for f in files if not f.name.endswith(suffixes)),
        "sibling_bytes": sum(f.stat().st_size for f in files if f.name.endswith(suffixes)),
        "engine_bytes": sum(f.stat().st_size for f in (site / "engine").iterdir()),
    }


def load() -> float:
    return os.getloadavg()[0]


def bench_engine(runs: int = 5, configs: dict[str, str] | None = None) -> dict[str, Any]:
    """Every configuration (name -> plugin options) over both servers."""
    from playwright.sync_api import sync_playwright
    from sites import launch

    configs = configs if configs is not None else {"shipped": ""}
    res: dict[str, Any] = {"load_before": load()}
    with tempfile.TemporaryDirectory() as d, sync_playwright() as p:
        browser = launch(p)
        for name, options in configs.items():
            folder = Path(d) / name
            build_s = build_demo(folder, options)
            row: dict[str, Any] = {"build_s": build_s, **site_bytes(folder / "site")}
            # the other configurations are compared with the shipped one over the compressing server only
            for kind in ("gzip", "plain") if name == "shipped" else ("gzip",):
                row[kind] = measure_site(browser, folder / "site", kind == "gzip", runs)
            res[name] = row
        browser.close()
    res["load_after"] = load()
    return res


BEFORE = Path(__file__).resolve().parent / "engine_before.json"
CONFIGS = {
    "shipped": "",
    "untrimmed": "      trim_stdlib: false\n",
    "no snapshot": "      engine_snapshot: false\n",
}


def _mb(n: float) -> str:
    return f"{n / 1e6:.2f} MB"


def report_lines(res: dict[str, Any]) -> list[str]:
    """The RESULTS.md section: this run beside the figures recorded before the engine work
    (``engine_before.json``: the same benchmark on the code before it, 5 runs)."""
    before = json.loads(BEFORE.read_text())["shipped"] if BEFORE.is_file() else None
    now = res["shipped"]
    lines = [
        "",
        "## Engine: first visit and start-up (demo handbook, dropper page, Chromium 390×844)",
        "",
        f"Medians of {now['gzip']['runs']} fresh browser contexts per server; machine load (1-min average) "
        f"{res['load_before']:.1f} before and {res['load_after']:.1f} after on {os.cpu_count()} cores, "
        "so times are stretched by whatever else runs: compare within one run. "
        "`gzip` compresses text, JavaScript, JSON and wasm on the fly as typical static hosts do; "
        "`plain` sends files as they are.",
        "",
        "| | before | now | now, untrimmed stdlib | now, no snapshot |",
        "|---|---|---|---|---|",
    ]
    others = [res.get("untrimmed"), res.get("no snapshot")]

    def row(label: str, get: Any) -> None:
        def cell(r: Any) -> str:
            try:
                return str(get(r)) if r else "—"
            except KeyError:  # a configuration measured over the compressing server only
                return "—"

        lines.append(f"| {label} | {cell(before)} | {cell(now)} | {' | '.join(cell(o) for o in others)} |")

    for kind in ("gzip", "plain"):
        row(f"first visit, {kind} server", lambda r, k=kind: _mb(r[k]["first_visit_bytes"]))
        row(
            f"files sent twice, {kind} server",
            lambda r, k=kind: (
                str(len(r[k]["files_sent_twice"]))
                + (f" ({', '.join(r[k]['files_sent_twice'])})" if r[k]["files_sent_twice"] else "")
            ),
        )
    row("site size (without .gz/.br siblings)", lambda r: _mb(r["site_bytes"]))
    row("compressed siblings", lambda r: _mb(r["sibling_bytes"]))
    for visit in ("cold", "warm"):
        row(f"engine ready, {visit} (gzip server)", lambda r, v=visit: f"{r['gzip'][v]['ready']:.0f} ms")
        row(f"first live result, {visit}", lambda r, v=visit: f"{r['gzip'][v]['live']:.0f} ms")
    row(
        "warm visits restored from the snapshot",
        lambda r: f"{r['gzip']['warm']['restored']} of {r['gzip']['runs']}" if "restored" in r["gzip"]["warm"] else "—",
    )
    row(
        "snapshot kept on the device (not sent)",
        lambda r: _mb(r["gzip"]["snapshot_bytes"]) if "snapshot_bytes" in r["gzip"] else "—",
    )
    lines += [
        "",
        "Start-up phases now (gzip server, ms from navigation start): worker created, its script running, "
        "runtime started (cold: wasm fetched and compiled, standard library mounted, Python up; warm: the same "
        "with the snapshot's memory restored instead of Python started), core wheel in place, core imported "
        "(cold; warm: in the snapshot), snapshot made (cold).",
        "",
        "| visit | worker created | script | runtime | wheel | core imported | snapshot made | engine ready |",
        "|---|---|---|---|---|---|---|---|",
    ]
    for visit in ("cold", "warm"):
        p = now["gzip"][visit].get("phases") or {}
        if p:
            core = f"{p['core']:.0f}" if "core" in p else "—"
            snap = f"{p['snapshot']:.0f}" if "snapshot" in p else "—"
            lines.append(
                f"| {visit} | {p['spawn']:.0f} | {p['script']:.0f} | {p['runtime']:.0f} | {p['package']:.0f} | "
                f"{core} | {snap} | {now['gzip'][visit]['ready']:.0f} |"
            )
    return lines


if __name__ == "__main__":
    n = int(sys.argv[1]) if len(sys.argv) > 1 else 5
    r = bench_engine(n, CONFIGS if "--all" in sys.argv else None)
    print(json.dumps(r, indent=1, sort_keys=True))
    print("\n".join(report_lines(r)))
