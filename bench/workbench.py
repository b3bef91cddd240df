"""Workbench benchmark: how long after the last keystroke the page shows the new review.

The demo handbook's workbench in Debian's Chromium at 390×844: each demo design is
opened, then a value is typed into a field one key at a time (the bleeder, as a
person edits it) and the time from the last key to the review drawn on the page is
read in the page itself (``performance.now()`` at the last ``input`` event and at
the change of the workbench's review counter). The time includes the workbench's
wait for typing to stop (``DELAY`` in workbench.js), writing the form as a design
file and the whole worst-case review in the engine.

Run alone: ``.venv/bin/python bench/workbench.py [RUNS]`` (prints JSON).
"""

from __future__ import annotations

import json
import statistics
import sys
import tempfile
from pathlib import Path
from typing import Any

ROOT = Path(__file__).resolve().parent.parent
sys.path.insert(0, str(ROOT / "tests"))

PHONE = {"viewport": {"width": 390, "height": 844}, "is_mobile": True, "has_touch": True}

#: in the page: remember when the last input event came and when the review counter next moves
WATCH = """() => {
  const box = document.querySelector('.lb-bench');
  window.__lb = { last: 0, drawn: 0, count: Number(box.dataset.reviewed || 0) };
  document.addEventListener('input', () => { window.__lb.last = performance.now(); }, true);
  new MutationObserver(() => {
    const n = Number(box.dataset.reviewed || 0);
    if (n !== window.__lb.count) { window.__lb.count = n; window.__lb.drawn = performance.now(); }
  }).observe(box, { attributes: true, attributeFilter: ['data-reviewed'] });
}"""


def _designs(page: Any) -> list[tuple[str, str]]:
    return page.evaluate(
        "[...document.querySelectorAll('.lb-bench-from option')]"
        r".filter(o => /^s\d+$/.test(o.value)).map(o => [o.value, o.text])"
    )


def measure(url: str, runs: int) -> dict[str, dict[str, float]]:
    from playwright.sync_api import sync_playwright
    from sites import launch

    out: dict[str, dict[str, float]] = {}
    with sync_playwright() as p:
        b = launch(p)
        ctx = b.new_context(**PHONE)
        pg = ctx.new_page()
        pg.goto(url + "workbench/")
        pg.wait_for_selector(".lb-bench-from")
        for value, label in _designs(pg):
            count = pg.evaluate("Number(document.querySelector('.lb-bench').dataset.reviewed || 0)")
            pg.select_option(".lb-bench-from", value)
            pg.wait_for_function(
                f"Number(document.querySelector('.lb-bench').dataset.reviewed || 0) > {count}", timeout=120000
            )
            # the dropper's bleeder where there is a dropper; the ballast of a constant-voltage design
            field = pg.locator(".lb-field[data-table=dropper][data-key=bleeder]:not([data-wire]) input")
            typed = "{} kΩ", 470
            if not field.count():
                field = pg.locator(".lb-field[data-table=array][data-key=ballast]:not([data-wire]) input")
                typed = "{} Ω", 10
            times = []
            for k in range(runs):
                pg.evaluate(WATCH)
                field.first.fill("")
                field.first.press_sequentially(typed[0].format(typed[1] + k), delay=40)
                pg.wait_for_function("window.__lb.drawn > window.__lb.last && window.__lb.last > 0", timeout=120000)
                # a review started by an earlier keystroke may land first: wait for the one after the last key
                pg.wait_for_timeout(50)
                t = pg.evaluate("window.__lb.drawn - window.__lb.last")
                times.append(float(t))
            out[label] = {"median_ms": statistics.median(times), "max_ms": max(times), "runs": float(runs)}
        b.close()
    return out


def bench_workbench(runs: int = 5) -> dict[str, Any]:
    """Build the demo handbook, serve it and measure each demo design's edit-to-review time."""
    from sites import Server, build, write_demo

    with tempfile.TemporaryDirectory(prefix="lampbook-workbench-") as d:
        folder = write_demo(Path(d))
        r = build(folder)
        if r.returncode:
            raise SystemExit(r.stderr[-3000:])
        srv = Server(folder / "site")
        try:
            designs = measure(srv.url, runs)
        finally:
            srv.close()
    return {"designs": designs, "delay_ms": 350.0}


def lines(res: dict[str, Any]) -> list[str]:
    out = [
        "## Workbench: last keystroke to the new review on the page (Chromium 390×844)",
        "",
        f"Each demo design opened in the workbench, a value typed into a field key by key; time from the last "
        f"key to the review drawn, measured in the page. It includes the {res['delay_ms']:.0f} ms the workbench "
        "waits for typing to stop and the whole worst-case review in the engine. Target: within 1 s.",
        "",
        "| design | median | slowest |",
        "|---|---|---|",
    ]
    for name, r in res["designs"].items():
        out.append(f"| {name} | {r['median_ms']:.0f} ms | {r['max_ms']:.0f} ms |")
    return out


if __name__ == "__main__":
    print(json.dumps(bench_workbench(int(sys.argv[1]) if len(sys.argv) > 1 else 5), indent=1))
