"""Planned designs against an independent reference: ngspice confirms the
worst-corner LED current of three designs the planner wrote (within 1 %)."""

from __future__ import annotations

import pytest
from lampcalc.circuit.steady import solve
from lampcalc.fixture.design import parse_design
from lampcalc.fixture.plan import parse_spec, plan
from spice import NGSPICE, run
from test_plan import MAINS, MODULES, spec_text

pytestmark = pytest.mark.spice

# the 230 V cases are stage fixtures (Class A): at Class C no dropper arrangement of them survives every
# single fault and the harmonics limits together (one string fails the harmonics, parallel strings a fault)
CASES = [
    ("single-die 60 mA", "230-50", 40, '[emissions]\nclass = "A"\n'),
    ("triple-die 20 mA", "120-60", 12, ""),
    ("two points 150 mA", "230-50", 24, '[emissions]\nclass = "A"\n'),
]


@pytest.mark.parametrize(("module", "region", "count", "extra"), CASES)
def test_worst_corner_current_against_ngspice(module: str, region: str, count: int, extra: str) -> None:
    assert NGSPICE is not None, "ngspice missing: `make test` installs it"
    best = plan(parse_spec(spec_text(MODULES[module], MAINS[region], count, "dropper") + extra), limit=2).best
    assert best is not None
    d = parse_design(best.design_text)
    _, _, vhi = d.mains_band()
    tol = float(d.get("dropper", "tolerance"))
    hot = float(d.get("module", "temperature")) + 10.0
    worst = d.circuit(mains_voltage=vhi, dropper_scale=1 + tol, vf_corner=-1, temperature=hot)
    ours = solve(worst)
    ref = run(worst, periods=120 if worst.smoothing >= 1e-3 else 60)
    assert abs(ours.led_current.avg - ref.led_current_avg) / ref.led_current_avg < 0.01
    assert ours.led_current.avg / d.circuit().strings[0].count <= d.module.current_max
