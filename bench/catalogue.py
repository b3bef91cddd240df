"""Catalogue benchmark: handbooks of many invented designs, built cold and after one edit.

Every design is an invented variant of a demo design (another name, another
ballast, one module more or fewer per string), written to a temporary folder
and never kept. Measured in one run on this machine:

- the build time of handbooks of 50, 100 and 200 designs, with an empty review
  cache (cold), after editing one design, and with nothing changed;
- each demo design's review time (check and study, in this process);
- serial review beside the parallel review of the same designs (their ratio),
  and whether the two give identical results.

Run alone: ``.venv/bin/python bench/catalogue.py [SIZES...]``; ``bench/run.py`` calls
:func:`bench_catalogue` and adds the table to RESULTS.md.
"""

from __future__ import annotations

import os
import re
import resource
import shutil
import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
DEMO = ROOT / "docs" / "designs"
SIZES = (50, 100, 200)
BALLASTS = ("33 Ω", "39 Ω", "47 Ω", "56 Ω", "68 Ω", "82 Ω")


def base_designs() -> list[tuple[str, str]]:
    return [(p.stem, p.read_text(encoding="utf-8")) for p in sorted(DEMO.glob("*.toml"))]


def variant(stem: str, text: str, k: int) -> str:
    """The k-th invented variant of a demo design: its own name, a ballast and a string length of its own."""
    out = re.sub(r'^name = "(.*)"$', lambda m: f'name = "{m.group(1)} — variant {k}"', text, count=1, flags=re.M)
    out = re.sub(r'^ballast = "[^"]*"$', f'ballast = "{BALLASTS[k % len(BALLASTS)]}"', out, count=1, flags=re.M)
    step = (k // len(BALLASTS)) % 3 - 1  # -1, 0, +1 module per string
    out = re.sub(r"^series = (\d+)$", lambda m: f"series = {int(m.group(1)) + step}", out, count=1, flags=re.M)
    return out


def write_designs(folder: Path, n: int) -> list[Path]:
    folder.mkdir(parents=True, exist_ok=True)
    bases = base_designs()
    paths = []
    for i in range(n):
        stem, text = bases[i % len(bases)]
        p = folder / f"{stem}-{i:03d}.toml"
        p.write_text(variant(stem, text, i // len(bases)), encoding="utf-8")
        paths.append(p)
    return paths


def write_handbook(folder: Path, n: int, jobs: int = 0) -> Path:
    """A handbook of n invented designs with the demo's home and safety pages; its own review cache."""
    docs = folder / "docs"
    docs.mkdir(parents=True)
    (docs / "index.md").write_text(f"# Bench shop\n\n{n} invented fixtures: see [the index](designs/index.md).\n")
    (docs / "safety.md").write_text("# Safety first\n\nMains voltage can kill. Local codes decide.\n")
    write_designs(docs / "designs", n)
    cache = folder / "cache"
    cache.mkdir()
    # the byte-compiled standard library, the measurement of what the engine uses of it and the compressed
    # siblings of the runtime's files (kept by content digest) are one-time products of the core's and the
    # runtime's versions (the measurement also of the design shapes, which these variants share with the demo
    # handbook's designs), there after any earlier build on the machine; the review cache starts empty
    for pattern in ("python_stdlib-*.zip", "stdlib-usage-*.json"):
        for p in (ROOT / ".cache" / "lampbook").glob(pattern):
            shutil.copyfile(p, cache / p.name)
    if (ROOT / ".cache" / "lampbook" / "compressed").is_dir():
        shutil.copytree(ROOT / ".cache" / "lampbook" / "compressed", cache / "compressed")
    (folder / "mkdocs.yml").write_text(
        "site_name: Bench shop\n"
        "theme:\n  name: material\n  font: false\n"
        "plugins:\n  - search\n  - lampbook:\n"
        "      designs: designs\n"
        f"      runtime: {ROOT / 'node_modules' / 'pyodide'}\n"
        f"      cache_dir: {cache}\n"
        f"      review_jobs: {jobs}\n"
        # hundreds of sheets are reached through the fixtures index, not listed one by one in the nav
        "nav:\n  - Home: index.md\n  - Safety first: safety.md\n  - Fixtures: designs/index.md\n",
        encoding="utf-8",
    )
    return folder


def _children_cpu() -> float:
    ru = resource.getrusage(resource.RUSAGE_CHILDREN)
    return ru.ru_utime + ru.ru_stime


def timed_build(folder: Path) -> tuple[float, str, float]:
    """Wall time, build log, and CPU time of the build and its review workers."""
    cpu0 = _children_cpu()
    t0 = time.perf_counter()
    r = subprocess.run(
        [sys.executable, "-m", "mkdocs", "build", "--strict"],
        cwd=folder,
        capture_output=True,
        text=True,
        timeout=3600,
        env={**os.environ, "NO_MKDOCS_2_WARNING": "1"},
    )
    seconds = time.perf_counter() - t0
    if r.returncode:
        raise SystemExit(r.stderr[-3000:])
    return seconds, r.stderr, _children_cpu() - cpu0


def _counts(log: str) -> dict[str, float]:
    m = re.search(
        r"designs: (\d+) sheets, (\d+) reviewed \(([\d.]+) s of review\), (\d+) from the cache; ([\d.]+) s", log
    )
    if not m:
        raise SystemExit("no review summary in the build log:\n" + log[-2000:])
    sheets, reviewed, review_s, cached, design_s = m.groups()
    return {
        "sheets": int(sheets),
        "reviewed": int(reviewed),
        "review_s": float(review_s),
        "cached": int(cached),
        "designs_s": float(design_s),
    }


def bench_handbook(n: int) -> dict[str, object]:
    with tempfile.TemporaryDirectory(prefix="lampbook-catalogue-") as d:
        folder = write_handbook(Path(d), n)
        cold, log, cold_cpu = timed_build(folder)
        cold_counts = _counts(log)
        unchanged, log, unchanged_cpu = timed_build(folder)
        unchanged_counts = _counts(log)
        edited = folder / "docs" / "designs" / sorted(p.name for p in (folder / "docs" / "designs").glob("*.toml"))[0]
        edited.write_text(edited.read_text(encoding="utf-8").replace("— variant 0", "— variant 0, revised"))
        one_edit, log, one_edit_cpu = timed_build(folder)
        edit_counts = _counts(log)
        assert edit_counts["reviewed"] == 1 and edit_counts["cached"] == n - 1, edit_counts
        assert cold_counts["reviewed"] == n and unchanged_counts["cached"] == n, (cold_counts, unchanged_counts)
        index = (folder / "site" / "designs" / "index.html").read_text(encoding="utf-8")
        assert index.count("<tr data-name=") == n
    return {
        "designs": n,
        "cold_s": cold,
        "cold_cpu_s": cold_cpu,
        "cold": cold_counts,
        "unchanged_s": unchanged,
        "unchanged_cpu_s": unchanged_cpu,
        "one_edit_s": one_edit,
        "one_edit_cpu_s": one_edit_cpu,
        "one_edit": edit_counts,
    }


def bench_review_each() -> dict[str, float]:
    from lampbook.catalogue import review_sheet

    out = {}
    for stem, text in base_designs():
        times = []
        for _ in range(3):
            r = review_sheet(text)
            assert "page" in r, r
            times.append(float(r["seconds"]))
        out[stem] = min(times)
    return out


def bench_parallel(n: int = 16) -> dict[str, object]:
    from lampbook.catalogue import default_jobs, review_sheet, run_all

    bases = base_designs()
    texts = [variant(*bases[i % len(bases)], k=100 + i // len(bases)) for i in range(n)]
    jobs = default_jobs()
    t0 = time.perf_counter()
    serial = run_all(review_sheet, texts, jobs=1)
    serial_s = time.perf_counter() - t0
    t0 = time.perf_counter()
    parallel = run_all(review_sheet, texts, jobs=jobs)
    parallel_s = time.perf_counter() - t0

    def strip(rs: list[dict[str, object]]) -> list[tuple[object, object]]:
        return [(r["page"], r["summary"]) for r in rs]

    return {
        "designs": n,
        "jobs": jobs,
        "serial_s": serial_s,
        "parallel_s": parallel_s,
        "speedup": serial_s / parallel_s,
        "identical": strip(serial) == strip(parallel),
    }


def load() -> str:
    try:
        return Path("/proc/loadavg").read_text().split()[0]
    except OSError:  # pragma: no cover
        return "?"


def bench_catalogue(sizes: tuple[int, ...] = SIZES) -> dict[str, object]:
    res: dict[str, object] = {"load_before": load()}
    res["review_each_s"] = bench_review_each()
    res["parallel"] = bench_parallel()
    res["handbooks"] = [bench_handbook(n) for n in sizes]
    res["load_after"] = load()
    return res


def lines(res: dict[str, object]) -> list[str]:
    each = res["review_each_s"]
    par = res["parallel"]
    out = [
        "## A handbook that grows: many designs (catalogue)",
        "",
        "Handbooks of invented variants of the demo designs, built with `mkdocs build --strict` in a fresh process",
        "(engine bundled; the compiled standard library, its usage measurement and the runtime's compressed",
        "siblings already cached, as after any build of the same core and runtime). Cold: empty review cache.",
        "One edit: one design file changed. Reviews run in as many worker processes as the machine has cores.",
        f"Machine load (1-min average, the benchmark's own work included) {res['load_before']} before and "
        f"{res['load_after']} after, on {par['jobs']} cores.",  # type: ignore[index]
        "",
        "Each time is wall-clock; in brackets the CPU time the build and its workers used (user + system), which",
        "other work on the machine inflates far less than wall-clock time.",
        "",
        "| designs | cold build | reviewed (sum of review times) | nothing changed | one edit | "
        "reviewed after the edit |",
        "|---|---|---|---|---|---|",
    ]
    for h in res["handbooks"]:  # type: ignore[attr-defined]
        out.append(
            f"| {h['designs']} | {h['cold_s']:.1f} s (CPU {h['cold_cpu_s']:.1f} s) | "
            f"{h['cold']['reviewed']} ({h['cold']['review_s']:.0f} s) | "
            f"{h['unchanged_s']:.1f} s (CPU {h['unchanged_cpu_s']:.1f} s) | "
            f"{h['one_edit_s']:.1f} s (CPU {h['one_edit_cpu_s']:.1f} s) | "
            f"{h['one_edit']['reviewed']} of {h['designs']} |"
        )
    big = [h for h in res["handbooks"] if h["designs"] == 200]  # type: ignore[attr-defined]
    if big:
        h = big[0]
        met = {"cold": h["cold_s"] <= 60, "edit": h["one_edit_s"] <= 5}
        out += [
            "",
            f"Targets for 200 designs: cold build ≤ 60 s {'met' if met['cold'] else 'not met'} "
            f"({h['cold_s']:.0f} s), rebuild after one edit ≤ 5 s {'met' if met['edit'] else 'not met'} "
            f"({h['one_edit_s']:.1f} s), wall-clock in this run.",
        ]
    out += [
        "",
        "Review time of each demo design (check and study, one process, best of 3): "
        + ", ".join(f"{k} {v:.2f} s" for k, v in each.items())  # type: ignore[attr-defined]
        + f"; mean {statistics.mean(each.values()):.2f} s.",  # type: ignore[attr-defined]
        "",
        f"Parallel review of {par['designs']} designs: serial {par['serial_s']:.1f} s, "  # type: ignore[index]
        f"{par['jobs']} workers {par['parallel_s']:.1f} s, speed-up {par['speedup']:.2f}× "  # type: ignore[index]
        f"(results identical: {'yes' if par['identical'] else 'NO'}).",  # type: ignore[index]
    ]
    return out


def main() -> None:
    sizes = tuple(int(a) for a in sys.argv[1:]) or SIZES
    res = bench_catalogue(sizes)
    print("\n".join(lines(res)))


if __name__ == "__main__":
    main()
