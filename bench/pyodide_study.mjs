// Time the tolerance study (1,000 samples) and one steady state inside Pyodide on Node.
// usage: node pyodide_study.mjs PYODIDE_DIR LAMPCALC_WHEEL DESIGN.toml...
import { timeEachDesign } from "./pyodide_node.mjs";

await timeEachDesign(`
import time, json
from lampcalc.fixture.design import parse_design
from lampcalc.fixture.tolerance import study
from lampcalc.circuit.steady import solve
d = parse_design(toml_text)
best = 1e9
for _ in range(3):
    t = time.perf_counter(); s = study(d, samples=1000); best = min(best, time.perf_counter() - t)
solve_s = None
if not d.is_cv:
    solve_s = 1e9
    for _ in range(5):
        t = time.perf_counter(); solve(d.circuit()); solve_s = min(solve_s, time.perf_counter() - t)
json.dumps({"study_s": best, "samples": s["samples"], "exact_solves": s["exact_solves"], "solve_s": solve_s,
            "max_relative_error": s["reduced_model"]["max_relative_error"]})
`);
