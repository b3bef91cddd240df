"""lampbook benchmarks: writes bench/RESULTS.md (and bench/results.json).

- per-call time of each closed-form calculator (CPython, this machine);
- the steady-state solver on the ngspice comparison designs: time, steps,
  Newton iterations, and ngspice on the same design in the same run (ratio);
- the handbook in Debian's Chromium: first paint of the prerendered answer,
  engine ready and first live result, cold and warm, with the byte-compiled
  standard library and without (ratio); bytes sent on a first visit; build time;
- handbooks of 50, 100 and 200 invented designs, cold and after one edit, and the
  parallel review beside the serial one (``catalogue.py``).
"""

from __future__ import annotations

import json
import os
import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
sys.path.insert(0, str(ROOT / "tests"))
sys.path.insert(0, str(ROOT / "bench"))

from lampcalc.api import compute  # noqa: E402
from lampcalc.calculators import CALCULATORS  # noqa: E402
from lampcalc.circuit.steady import solve  # noqa: E402


def per_call(fn, repeat: int = 7, number: int | None = None) -> float:  # type: ignore[no-untyped-def]
    if number is None:
        t0 = time.perf_counter()
        fn()
        once = time.perf_counter() - t0
        number = max(1, int(0.2 / max(once, 1e-7)))
    runs = []
    for _ in range(repeat):
        t0 = time.perf_counter()
        for _ in range(number):
            fn()
        runs.append((time.perf_counter() - t0) / number)
    return min(runs)


def bench_calculators() -> list[dict[str, object]]:
    out = []
    for name in CALCULATORS:
        t = per_call(lambda name=name: compute(name, {}))
        out.append({"calculator": name, "per_call_us": t * 1e6})
    return out


def bench_solver() -> list[dict[str, object]]:
    from spice import run
    from test_spice import DESIGNS

    out = []
    for name, c in sorted(DESIGNS.items()):
        st = solve(c)
        t = per_call(lambda c=c: solve(c), repeat=5)
        periods = 120 if c.smoothing >= 1e-3 or not c.strings else 60
        ref = run(c, periods=periods)
        out.append(
            {
                "design": name,
                "solve_ms": t * 1e3,
                "steps": st.steps,
                "newton_iterations": st.iterations,
                "ngspice_s": ref.seconds,
                "ngspice_periods": ref.periods,
                "ngspice_attempts": ref.attempts,
                "ratio": ref.seconds / t,
            }
        )
    return out


class Counting:
    def __init__(self, directory: Path) -> None:
        import functools
        import http.server
        import threading

        from sites import _Quiet

        outer = self
        self.bytes = 0

        class H(_Quiet):
            def copyfile(self, source, outputfile):  # type: ignore[no-untyped-def]
                data = source.read()
                outer.bytes += len(data)
                outputfile.write(data)

        self.httpd = http.server.ThreadingHTTPServer(("127.0.0.1", 0), functools.partial(H, directory=str(directory)))
        threading.Thread(target=self.httpd.serve_forever, daemon=True).start()
        self.url = f"http://127.0.0.1:{self.httpd.server_address[1]}/"

    def close(self) -> None:
        self.httpd.shutdown()


def bench_browser() -> dict[str, object]:
    from engine import build_demo
    from playwright.sync_api import sync_playwright
    from sites import launch

    res: dict[str, object] = {}
    with tempfile.TemporaryDirectory() as d, sync_playwright() as p:
        browser = launch(p)
        for compiled in (True, False):
            folder = Path(d) / ("compiled" if compiled else "source")
            build_s = build_demo(folder, f"      compile_stdlib: {'true' if compiled else 'false'}\n")
            srv = Counting(folder / "site")
            rows = {"cold": [], "warm": []}  # type: dict[str, list[dict[str, float]]]
            first_bytes = []
            for _ in range(3):
                ctx = browser.new_context()
                page = ctx.new_page()
                for visit in ("cold", "warm"):
                    before = srv.bytes
                    page.goto(srv.url + "calculators/dropper/")
                    page.wait_for_selector(".lb-engine[data-state^=ready]", timeout=120000)
                    page.fill("#lb-dropper-1-capacitance", "2.2 uF")
                    page.wait_for_function("performance.getEntriesByName('lb-first-live').length > 0", timeout=60000)
                    m = page.evaluate("""() => ({
                        fcp: (performance.getEntriesByName('first-contentful-paint')[0] || {}).startTime,
                        ready: performance.getEntriesByName('lb-engine-ready')[0].startTime,
                        live: performance.getEntriesByName('lb-first-live')[0].startTime })""")
                    rows[visit].append(m)
                    if visit == "cold":
                        # let the service worker finish its precache, then count the whole first visit
                        page.wait_for_function("navigator.serviceWorker.controller !== null", timeout=120000)
                        time.sleep(1.0)
                        first_bytes.append(srv.bytes - before)
                ctx.close()
            srv.close()
            key = "compiled_stdlib" if compiled else "source_stdlib"
            res[key] = {
                visit: {k: statistics.median(r[k] for r in rows[visit]) for k in ("fcp", "ready", "live")}
                for visit in rows
            } | {
                "first_visit_bytes": statistics.median(first_bytes),
                "build_s": build_s,
                "site_bytes": sum(f.stat().st_size for f in (folder / "site").rglob("*") if f.is_file()),
            }
        browser.close()
    c, s = res["compiled_stdlib"], res["source_stdlib"]  # type: ignore[index]
    res["ready_ratio_source_over_compiled"] = {v: s[v]["ready"] / c[v]["ready"] for v in ("cold", "warm")}  # type: ignore[index]
    return res


def bench_pyodide_study() -> dict[str, object]:
    from lampbook.bundle import build_wheel

    with tempfile.TemporaryDirectory() as d:
        wheel = build_wheel(Path(d))
        designs = [str(p) for p in sorted((ROOT / "docs" / "designs").glob("*.toml")) if p.stem != "unsafe-demo"]
        r = subprocess.run(
            [
                "node",
                str(ROOT / "bench" / "pyodide_study.mjs"),
                str(ROOT / "node_modules" / "pyodide"),
                str(wheel),
                *designs,
            ],
            capture_output=True,
            text=True,
            timeout=900,
        )
        if r.returncode:
            raise SystemExit(r.stderr[-2000:])
        return json.loads(r.stdout.strip().splitlines()[-1])


def bench_native_study() -> dict[str, float]:
    from lampcalc.fixture.design import parse_design
    from lampcalc.fixture.tolerance import study

    out = {}
    for p in sorted((ROOT / "docs" / "designs").glob("*.toml")):
        if p.stem == "unsafe-demo":
            continue
        d = parse_design(p.read_text())
        out[p.name] = per_call(lambda d=d: study(d, samples=1000), repeat=3, number=1)
    return out


def bench_review(pyodide: bool = True) -> dict[str, dict[str, float]]:
    """The whole worst-case review of each demo design (corners x steps, faults,
    switch-on) in CPython, its parts, and the same review in Pyodide on Node;
    and what the corner survey's reduced quadrature costs in accuracy."""
    from lampcalc.circuit import transient
    from lampcalc.fixture import corners, faults
    from lampcalc.fixture.check import check
    from lampcalc.fixture.design import parse_design

    out: dict[str, dict[str, float]] = {}
    paths = sorted((ROOT / "docs" / "designs").glob("*.toml"))
    for p in paths:
        d = parse_design(p.read_text())
        row: dict[str, float] = {"review_s": per_call(lambda d=d: check(d), repeat=3, number=1)}
        if not d.is_cv:
            row["corners"] = float(len(corners.corner_list(d)))
            row["corners_s"] = per_call(lambda d=d: corners.worst(d, corners.solve_corners(d)), repeat=3, number=1)
            row["faults_s"] = per_call(lambda d=d: faults.analyse(d), repeat=3, number=1)
            _, _, vhi = d.mains_band()
            c = d.circuit(mains_voltage=vhi)
            row["switch_on_s"] = per_call(
                lambda c=c: transient.worst_switch_on(c, transient.Supply()), repeat=3, number=1
            )
            # the survey's cost in accuracy: the worst value of every stress, survey against full resolution
            fast = corners.worst(d, corners.solve_corners(d), refine=False)
            full = corners.worst(d, corners.solve_corners(d, points=600), refine=False)
            row["survey_max_rel_error"] = max(abs(fast[k].value / full[k].value - 1) for k in full if full[k].value)
            row["survey_same_corners"] = float(all(fast[k].solved.corner == full[k].solved.corner for k in full))
        out[p.name] = row
    if pyodide:
        from lampbook.bundle import build_wheel

        with tempfile.TemporaryDirectory() as tmp:
            wheel = build_wheel(Path(tmp))
            r = subprocess.run(
                ["node", str(ROOT / "bench" / "pyodide_review.mjs"), str(ROOT / "node_modules" / "pyodide"), str(wheel)]
                + [str(p) for p in paths],
                capture_output=True,
                text=True,
                timeout=1800,
            )
            if r.returncode:
                raise SystemExit(r.stderr[-2000:])
            for name, v in json.loads(r.stdout.strip().splitlines()[-1]).items():
                out[name]["pyodide_review_s"] = float(v["review_s"])
    return out


def review_lines(rev: dict[str, dict[str, float]]) -> list[str]:
    lines = [
        "",
        "## Worst-case review (corners x steps, single faults, switch-on), best of 3",
        "",
        "| design | whole review, CPython | corners | of which corner survey | faults | switch-on (phase search) "
        "| Pyodide on Node | survey error | same corners |",
        "|---|---|---|---|---|---|---|---|---|",
    ]
    for name, r in rev.items():
        if "corners" not in r:
            lines.append(
                f"| {name} | {r['review_s'] * 1e3:.0f} ms | — (CV, closed form) | | | | "
                f"{r.get('pyodide_review_s', float('nan')):.2f} s | | |"
            )
            continue
        lines.append(
            f"| {name} | {r['review_s']:.2f} s | {r['corners']:.0f} | {r['corners_s']:.2f} s | {r['faults_s']:.2f} s "
            f"| {r['switch_on_s']:.2f} s | {r.get('pyodide_review_s', float('nan')):.2f} s "
            f"| {r['survey_max_rel_error']:.1e} | {'yes' if r['survey_same_corners'] else 'no'} |"
        )
    return lines


def bench_sweep() -> dict[str, object]:
    """The seeded 2,000-design random sweep through `check` (bench/sweep.py)."""
    sys.path.insert(0, str(ROOT / "bench"))
    from sweep import sweep

    return sweep(2000)


def main() -> None:
    t0 = time.time()
    design_sweep = bench_sweep()
    calcs = bench_calculators()
    studies = bench_pyodide_study()
    native = bench_native_study()
    solver = bench_solver()
    browser = bench_browser()
    review = bench_review()
    from engine import CONFIGS, bench_engine, report_lines

    engine = bench_engine(5, CONFIGS)
    from catalogue import bench_catalogue
    from catalogue import lines as catalogue_lines

    catalogue = bench_catalogue()
    from workbench import bench_workbench
    from workbench import lines as workbench_lines

    workbench = bench_workbench()
    data = {
        "machine": {"python": sys.version.split()[0], "cpus": os.cpu_count()},
        "calculators": calcs,
        "solver": solver,
        "browser": browser,
        "study_pyodide": studies,
        "study_native_s": native,
        "review": review,
        "engine": engine,
        "catalogue": catalogue,
        "workbench": workbench,
        "sweep": design_sweep,
    }
    (ROOT / "bench" / "results.json").write_text(json.dumps(data, indent=1, sort_keys=True))
    lines = [
        "# Benchmark results",
        "",
        f"Written by `make bench` ({time.strftime('%Y-%m-%d')}, {time.time() - t0:.0f} s run, "
        f"Python {data['machine']['python']}, {data['machine']['cpus']} cores).",
        "",
        "## Closed-form calculators (CPython, default inputs)",
        "",
        "| calculator | per call |",
        "|---|---|",
    ]
    lines += [f"| {c['calculator']} | {c['per_call_us']:.0f} µs |" for c in calcs]
    lines += [
        "",
        "## Steady-state solver beside ngspice (same circuit, same run)",
        "",
        (
            "ngspice starts from the same closed-form estimate and runs until the last two periods are kept; "
            "its time includes any"
        ),
        "retry its step control needed (looser tolerance, then from its own operating point).",
        "",
        (
            "| design | solve | steps | Newton iterations | ngspice | periods simulated | "
            "ngspice runs | ngspice / lampbook |"
        ),
        "|---|---|---|---|---|---|---|---|",
    ]
    lines += [
        f"| {s['design']} | {s['solve_ms']:.1f} ms | {s['steps']} | {s['newton_iterations']} | "
        f"{s['ngspice_s']:.2f} s | {s['ngspice_periods']} | {s['ngspice_attempts']} | {s['ratio']:.0f}× |"
        for s in solver
    ]
    lines += [
        "",
        "## Tolerance study, 1,000 Monte Carlo samples (reduced model, 25 + 12 exact solves)",
        "",
        "| design | Pyodide on Node | CPython | one steady state in Pyodide | reduced-model error |",
        "|---|---|---|---|---|",
    ]
    for name, st in studies.items():  # type: ignore[union-attr]
        solve_txt = f"{st['solve_s'] * 1e3:.1f} ms" if st["solve_s"] is not None else "— (CV design, closed form)"
        lines.append(
            f"| {name} | {st['study_s']:.2f} s | {native[name]:.2f} s | {solve_txt} | {st['max_relative_error']:.2e} |"
        )
    lines += [
        "",
        "## Handbook in Chromium (dropper page, medians of 3, ms from navigation start)",
        "",
        "| standard library | visit | first paint (prerendered answer) | engine ready | first live result |",
        "|---|---|---|---|---|",
    ]
    for key in ("compiled_stdlib", "source_stdlib"):
        b = browser[key]  # type: ignore[index]
        for v in ("cold", "warm"):
            lines.append(
                f"| {key.split('_')[0]} | {v} | {b[v]['fcp']:.0f} | {b[v]['ready']:.0f} | {b[v]['live']:.0f} |"
            )
    r = browser["ready_ratio_source_over_compiled"]  # type: ignore[index]
    c = browser["compiled_stdlib"]  # type: ignore[index]
    lines += [
        "",
        f"Engine-ready time, source stdlib / compiled stdlib: cold {r['cold']:.2f}×, warm {r['warm']:.2f}×.",
        "",
        "First visit (page plus the service worker's precache of the whole site): "
        f"{c['first_visit_bytes'] / 1e6:.1f} MB sent (counted in detail below); "
        f"site size {c['site_bytes'] / 1e6:.1f} MB. Build time {c['build_s']:.1f} s (compiled stdlib from the cache), "
        f"{browser['source_stdlib']['build_s']:.1f} s without compiling.",
    ]  # type: ignore[index]
    lines += review_lines(review)
    lines += report_lines(engine)
    lines += ["", *catalogue_lines(catalogue)]
    lines += ["", *workbench_lines(workbench)]
    from sweep import markdown

    lines += markdown(design_sweep)
    (ROOT / "bench" / "RESULTS.md").write_text("\n".join(lines) + "\n")
    print("\n".join(lines))


if __name__ == "__main__":
    main()
