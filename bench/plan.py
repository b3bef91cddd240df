"""Planner benchmark: `lampbook plan` on the demo spec (40 modules, a stock list
of 20 values), CPython on this machine; writes bench/PLAN.md."""

from __future__ import annotations

import statistics
import time
from pathlib import Path

from lampcalc.fixture.plan import parse_spec, plan, stock_file

ROOT = Path(__file__).resolve().parent.parent


def main() -> None:
    spec_path = ROOT / "docs" / "plans" / "bench-strip.spec.toml"
    text = spec_path.read_text(encoding="utf-8")
    stock_name = stock_file(text)
    assert stock_name is not None
    stock = (spec_path.parent / stock_name).read_text(encoding="utf-8")
    spec = parse_spec(text, stock)
    runs = []
    result = None
    for _ in range(5):
        t0 = time.perf_counter()
        result = plan(spec)
        runs.append(time.perf_counter() - t0)
    assert result is not None and result.best is not None
    lines = [
        "# Planner benchmark",
        "",
        f"`lampbook plan docs/plans/bench-strip.spec.toml`: {spec.modules} modules, "
        f"{len(spec.stock)} stock values, {len(result.proposals)} arrangements each run through the whole review.",
        "",
        "| runs | min | median | max |",
        "|---|---|---|---|",
        f"| {len(runs)} | {min(runs):.2f} s | {statistics.median(runs):.2f} s | {max(runs):.2f} s |",
        "",
        f"Best: {result.best.series} x {result.best.parallel}, target ≤ 2 s.",
    ]
    (ROOT / "bench" / "PLAN.md").write_text("\n".join(lines) + "\n", encoding="utf-8")
    print("\n".join(lines))


if __name__ == "__main__":
    main()
