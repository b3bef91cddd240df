// Time the whole design review (corners, faults, switch-on) inside Pyodide on Node.
// usage: node pyodide_review.mjs PYODIDE_DIR LAMPCALC_WHEEL DESIGN.toml...
import { timeEachDesign } from "./pyodide_node.mjs";

await timeEachDesign(`
import time, json
from lampcalc.fixture.design import parse_design
from lampcalc.fixture.check import check
d = parse_design(toml_text)
best = 1e9
for _ in range(2):
    t = time.perf_counter(); check(d); best = min(best, time.perf_counter() - t)
json.dumps({"review_s": best})
`);
