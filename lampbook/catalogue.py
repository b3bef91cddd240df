"""A handbook's designs as a set: reviewed once per content, in worker processes.

The review itself (``check`` and ``study`` in the core) is a black box here.
This module runs it for many designs, in parallel when asked, and reduces each
answer to a summary (verdict, failing checks, key figures at nominal supply)
for the command line and the fixtures index page. Every function a worker runs
is a plain top-level function of plain data, so a parallel run returns exactly
what the serial run does, in the same order.
"""

from __future__ import annotations

import os
import time
from collections.abc import Callable, Mapping, Sequence
from typing import Any

REVIEW_OPTIONS: dict[str, Any] = {"check": {"waveforms": True}, "study": {}}
"""The options the sheet review passes to the core; part of the cache key."""

VERDICTS = ("fail", "warn", "pass")

SHEET_THEME: dict[str, str] = {
    "danger": "admonition danger",
    "warning": "admonition warning",
    "box_title": "admonition-title",
    "background": "var(--md-default-bg-color,#fff)",
}
"""What a build sheet takes from the site's theme (mkdocs-material): its admonition kinds for the
cautions and its page colour behind the schematic. Part of the cached page, so part of the cache key."""


class ReviewError(ValueError):
    """A design that cannot be reviewed (bad input, or no solution); the message names the file."""


def default_jobs() -> int:
    """How many worker processes 'as many as the machine has cores' means here."""
    try:
        return max(1, len(os.sched_getaffinity(0)))
    except AttributeError:  # pragma: no cover - not Linux
        return max(1, os.cpu_count() or 1)


def verdict(ans: Mapping[str, Any]) -> str:
    if ans.get("failed"):
        return "fail"
    if ans.get("warned"):
        return "warn"
    return "pass"


def summary(ans: Mapping[str, Any]) -> dict[str, Any]:
    """One design's line in the catalogue: verdict, check ids by status, key figures at nominal supply."""
    nominal = ans.get("nominal") or {}
    checks = ans.get("checks") or []
    cv = ans.get("kind") == "cv"
    supply_v = nominal.get("supply_voltage_V") if cv else nominal.get("mains_voltage_V")
    return {
        "name": ans.get("name", ""),
        "revision": ans.get("revision", ""),
        "kind": ans.get("kind", ""),
        "verdict": verdict(ans),
        "failed": int(ans.get("failed") or 0),
        "warned": int(ans.get("warned") or 0),
        "failed_checks": [c["id"] for c in checks if c.get("status") == "fail"],
        "warned_checks": [c["id"] for c in checks if c.get("status") == "warn"],
        "supply_voltage_V": supply_v,
        "led_current_avg_A": nominal.get("led_current_avg_A"),
        "input_power_W": nominal.get("input_power_W"),
        "power_factor": nominal.get("power_factor"),
    }


def _errors_text(e: Exception) -> str:
    from lampcalc.errors import InputErrors

    if isinstance(e, InputErrors):
        return "; ".join(x.message for x in e.errors)
    return str(e)


# --- the work one design needs (run in a worker or in the build process) -------------------


def review_sheet(text: str) -> dict[str, Any]:
    """Review a design for its build sheet: the page body (Markdown) and the summary.

    Returns ``{"page", "summary", "seconds"}``, or ``{"error": message}`` for a design
    the core refuses, so that a worker hands back plain data in every case.
    """
    from lampcalc.errors import CalcError
    from lampcalc.fixture.check import check
    from lampcalc.fixture.design import parse_design
    from lampcalc.fixture.tolerance import study
    from lampcalc.present.html import HtmlTheme, markdown_page
    from lampcalc.present.sheet import build_sheet

    t0 = time.perf_counter()
    try:
        d = parse_design(text)
        ans = check(d, **REVIEW_OPTIONS["check"])
        st = study(d, **REVIEW_OPTIONS["study"])
    except CalcError as e:
        return {"error": _errors_text(e)}
    page = markdown_page(build_sheet(d, ans, st), HtmlTheme(**SHEET_THEME))
    return {"page": page, "summary": summary(ans), "seconds": time.perf_counter() - t0}


def check_design(text: str) -> dict[str, Any]:
    """The command line's review of one design in a set: its summary, or its errors as data."""
    from lampcalc.design_api import handle

    t0 = time.perf_counter()
    ans = handle("check", {"toml": text})
    if not ans["ok"]:
        return {"errors": ans["errors"]}
    return {"summary": summary(ans), "seconds": time.perf_counter() - t0}


Progress = Callable[[int, int, float], None]
"""Called as ``progress(done, total, seconds_so_far)`` while a set is reviewed."""


def run_all(
    work: Callable[[str], dict[str, Any]],
    texts: Sequence[str],
    jobs: int = 1,
    progress: Progress | None = None,
    every: float = 5.0,
) -> list[dict[str, Any]]:
    """``[work(t) for t in texts]``, in ``jobs`` worker processes when there is more than one to do.

    ``work`` must be a top-level function of this module (workers import it by name).
    Progress is reported at most every ``every`` seconds, and once at the end.
    """
    n = len(texts)
    t0 = time.perf_counter()
    last = t0
    out: list[dict[str, Any] | None] = [None] * n
    workers = max(1, min(jobs, n))

    def tick(done: int) -> None:
        nonlocal last
        now = time.perf_counter()
        if progress is not None and (done == n or now - last >= every):
            last = now
            progress(done, n, now - t0)

    if workers == 1:
        for i, t in enumerate(texts):
            out[i] = work(t)
            tick(i + 1)
    else:
        import concurrent.futures as cf
        import multiprocessing

        # fresh interpreters: the build process may run threads (mkdocs serve), which fork does not mix with
        ctx = multiprocessing.get_context("spawn")
        done = 0
        try:
            with cf.ProcessPoolExecutor(max_workers=workers, mp_context=ctx) as pool:
                futures = {pool.submit(work, t): i for i, t in enumerate(texts)}
                for f in cf.as_completed(futures):
                    out[futures[f]] = f.result()
                    done += 1
                    tick(done)
        except (OSError, cf.process.BrokenProcessPool):
            # no worker processes here (or one died): the rest in this process, the same answers
            for i, t in enumerate(texts):
                if out[i] is None:
                    out[i] = work(t)
                    done += 1
                    tick(done)
    missing = [i for i, r in enumerate(out) if r is None]
    if missing:  # pragma: no cover - every future either answers or raises
        raise RuntimeError(f"review: no result for {len(missing)} designs")
    return [r for r in out if r is not None]
