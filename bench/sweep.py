"""Seeded sweep of random valid mains designs through `check` (issue 14).

Ranges: both bridge models, 100-240 V, 50/60 Hz, 0.5-200 µF droppers,
10 µF-10 mF smoothing, 1-60 modules in series, 1-12 strings in parallel.
Every design must converge or be refused with a plain reason; a converged
one must draw at least the LED power from the mains, keep its bus below the
mains peak, have a power factor in (0, 1], and give strict JSON.
"""

from __future__ import annotations

import json
import math
import random
import time
from collections import Counter
from typing import Any

from lampcalc.api import dumps
from lampcalc.design_api import handle


def random_design(rng: random.Random) -> str:
    """One random design in the sweep's ranges (log-uniform capacitances)."""
    volts = rng.choice([100, 110, 115, 120, 127, 200, 220, 230, 240])
    freq = rng.choice([50, 60])
    c_drop = math.exp(rng.uniform(math.log(0.5e-6), math.log(200e-6)))
    c_smooth = math.exp(rng.uniform(math.log(10e-6), math.log(10e-3)))
    series = rng.randint(1, 60)
    parallel = rng.randint(1, 12)
    model = rng.choice(["line", "exponential"])
    bridge = (
        'model = "line"\ndrop = "0.9 V"\nresistance = "0.05 Ω"'
        if model == "line"
        else 'model = "exponential"\nsaturation_current = "5 nA"\nemission_coefficient = 1.9\nresistance = "0.05 Ω"'
    )
    return f"""name = "sweep"
revision = "A"
date = "2026-12-03"
description = "random sweep design"

[mains]
voltage = "{volts} V"
frequency = "{freq} Hz"
tolerance = "10 %"

[module]
v0 = "2.7 V"
r_dynamic = "{rng.uniform(0.5, 5):.3f} Ω"
current_max = "60 mA"
vf_spread = "3 %"
temperature = "50 °C"

[array]
series = {series}
parallel = {parallel}
ballast = "{rng.choice([0, 10, 33, 100])} Ω"

[dropper]
capacitance = "{c_drop * 1e6:.4g} uF"
class = "X2"
ac_rating = "310 V"
series_resistance = "{rng.choice([10, 47, 100, 220])} Ω"

[bridge]
{bridge}

[smoothing]
capacitance = "{c_smooth * 1e6:.4g} uF"
esr = "0.2 Ω"
voltage_rating = "450 V"
"""


def _bad_values(obj: Any) -> bool:
    try:
        json.loads(dumps(obj), parse_constant=lambda s: (_ for _ in ()).throw(ValueError(s)))
    except ValueError:
        return True
    return False


def sweep(n: int = 2000, seed: int = 20261203) -> dict[str, Any]:
    """Run ``n`` seeded random designs; count outcomes and every violation."""
    rng = random.Random(seed)
    out: dict[str, Any] = {"designs": n, "seed": seed, "converged": 0, "refused": 0, "tracebacks": 0}
    reasons: Counter[str] = Counter()
    violations: list[str] = []
    nonfinite = 0
    slowest = 0.0
    times = []
    for k in range(n):
        text = random_design(rng)
        t0 = time.process_time()
        try:
            ans = handle("check", {"toml": text})
        except Exception as e:  # counted, the sweep goes on
            out["tracebacks"] += 1
            violations.append(f"design {k}: {type(e).__name__}: {e}")
            continue
        dt = time.process_time() - t0
        times.append(dt)
        slowest = max(slowest, dt)
        raw = json.dumps(ans)  # default json allows NaN/Infinity: count them before cleaning
        if "NaN" in raw or "Infinity" in raw:
            nonfinite += 1
        if _bad_values(ans):
            violations.append(f"design {k}: strict JSON fails")
        if not ans["ok"]:
            out["refused"] += 1
            for e in ans["errors"]:
                reasons[e.get("field") or e["message"][:60]] += 1
                if not e.get("message"):
                    violations.append(f"design {k}: a refusal with no message")
            continue
        out["converged"] += 1
        for corner in ("nominal", "low", "high", "worst_high"):
            op = ans.get(corner)
            if not isinstance(op, dict) or op.get("ieee1789_band") == "no light":
                continue  # a point where nothing conducts is answered with zeros (the review fails it as led.light)
            pin, pled = op.get("input_power_W"), op.get("led_power_W")
            volts = op.get("mains_voltage_V") or (ans.get("high") or {}).get("mains_voltage_V") or 0.0
            peak = math.sqrt(2) * volts
            pf = op.get("power_factor")
            if isinstance(pin, float) and isinstance(pled, float) and pin < pled * (1 - 1e-6):
                violations.append(f"design {k} {corner}: input power {pin:.4g} W below LED power {pled:.4g} W")
            bus = op.get("bus_voltage_max_V")
            if isinstance(bus, float) and bus >= peak:
                violations.append(f"design {k} {corner}: bus {bus:.4g} V not below the mains peak {peak:.4g} V")
            if not (isinstance(pf, float) and 0 < pf <= 1 + 1e-9):
                violations.append(f"design {k} {corner}: power factor {pf!r} outside (0, 1]")
    times.sort()
    out.update(
        {
            "nonfinite_in_raw_answer": nonfinite,
            "refusal_reasons": dict(reasons.most_common()),
            "violations": violations,
            "slowest_s": slowest,
            "median_s": times[len(times) // 2] if times else 0.0,
            "over_1s": sum(1 for t in times if t > 1.0),
        }
    )
    return out


def markdown(s: dict[str, Any]) -> list[str]:
    lines = [
        "",
        f"## Random design sweep ({s['designs']} designs, seed {s['seed']})",
        "",
        "`bench/sweep.py`: both bridge models, 100-240 V, 50/60 Hz, 0.5-200 µF droppers, 10 µF-10 mF smoothing, "
        "1-60 modules in series, 1-12 in parallel, through `check`.",
        "",
        "| converged | refused | tracebacks | non-finite in the raw answer (null in the JSON) | violations | "
        "median CPU | slowest CPU | over 1 s |",
        "|---|---|---|---|---|---|---|---|",
        f"| {s['converged']} | {s['refused']} | {s['tracebacks']} | {s['nonfinite_in_raw_answer']} | "
        f"{len(s['violations'])} | {s['median_s'] * 1000:.0f} ms | {s['slowest_s'] * 1000:.0f} ms | {s['over_1s']} |",
        "",
    ]
    if s["refusal_reasons"]:
        lines += ["Refused, by field or reason:", ""]
        lines += [f"- `{k}`: {v}" for k, v in s["refusal_reasons"].items()]
        lines.append("")
    if s["violations"]:
        lines += ["Violations (first 20):", ""]
        lines += [f"- {v}" for v in s["violations"][:20]]
        lines.append("")
    return lines


if __name__ == "__main__":
    import sys

    result = sweep(int(sys.argv[1]) if len(sys.argv) > 1 else 2000)
    print("\n".join(markdown(result)))
