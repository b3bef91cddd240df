"""The planner over a grid of invented modules, mains, bridge models and
module counts: every design it offers passes the whole review, its
worst-corner LED current stays within the limit and its low-corner current
above the floor; where no design exists it names the constraint. Native only:
the grid takes minutes, so the Pyodide tier runs the small cases of
``test_plan.py`` instead (see ``native_only`` in ``test_pyodide.py``)."""

from __future__ import annotations

import itertools
import json

import pytest
from lampcalc.fixture.check import check
from lampcalc.fixture.design import parse_design
from lampcalc.fixture.plan import parse_spec, plan
from test_plan import BRIDGES, COUNTS, MAINS, MODULES, spec_text

pytestmark = pytest.mark.native

GRID = [
    (m, r, b, n)
    for (m, r, b), n in itertools.product(itertools.product(MODULES, MAINS, BRIDGES), COUNTS)
    if not (b == "exponential" and n in (1, 100))
]


@pytest.mark.parametrize(("module", "region", "bridge", "count"), GRID, ids=lambda x: str(x).replace(" ", "-"))
def test_every_offered_design_passes_the_review(module: str, region: str, bridge: str, count: int) -> None:
    text = spec_text(MODULES[module], MAINS[region], count, "dropper", bridge=json.dumps(BRIDGES[bridge]))
    spec = parse_spec(text)
    result = plan(spec, limit=2)
    offered = [p for p in result.proposals if p.ok]
    if not offered:
        # no design: the planner names the constraint, and every candidate it tried says why it went
        assert result.constraint()
        assert all(p.rejected or p.failed for p in result.proposals)
        return
    imax = parse_design(offered[0].design_text).module.current_max
    for p in offered:
        d = parse_design(p.design_text)
        ans = check(d)
        assert ans["failed"] == 0, [c for c in ans["checks"] if c["status"] == "fail"]
        assert ans["worst_high"]["string_current_avg_A"] <= imax
        assert ans["low"]["string_current_avg_A"] >= 0.5 * imax * 0.97  # the default floor, low mains


def test_grid_has_at_least_50_combinations() -> None:
    assert len(GRID) >= 50


def test_suggest_offers_both_kinds() -> None:
    text = spec_text(MODULES["single-die 60 mA"], MAINS["230-50"], 24, "suggest")
    kinds = {p.supply for p in plan(parse_spec(text)).proposals}
    assert kinds == {"dropper", "cv"}


def test_stock_values_make_the_bank() -> None:
    stock = (
        '[[capacitor]]\nvalue = "1 uF"\nac_rating = "310 V"\nclass = "X2"\ncount = 3\n'
        '[[capacitor]]\nvalue = "470 nF"\nac_rating = "310 V"\nclass = "X2"\ncount = 2\n'
        '[[capacitor]]\nvalue = "10 uF"\nac_rating = "250 V"\nclass = "X2"\ncount = 2\n'  # under-rated: never used
    )
    # a stage fixture (IEC 61000-3-2 Class A): one string of 40, the only arrangement whose single faults all
    # end safe, passes its harmonics there (Class C, general lighting, refuses it)
    text = spec_text(MODULES["single-die 60 mA"], MAINS["230-50"], 40, "dropper") + '[emissions]\nclass = "A"\n'
    result = plan(parse_spec(text, stock))
    best = result.best
    assert best is not None
    d = parse_design(best.design_text)
    bank = float(d.get("dropper", "capacitance"))
    sums = {round(1e-6 * a + 0.47e-6 * b, 12) for a in range(4) for b in range(3)}
    assert round(bank, 12) in sums


def test_unreachable_target_names_the_constraint() -> None:
    text = spec_text(MODULES["single-die 60 mA"], MAINS["230-50"], 100, "dropper")
    text += '[target]\ncurrent_min = "58 mA"\ncurrent_max = "60 mA"\n'
    result = plan(parse_spec(text))
    assert result.best is None
    assert "floor" in result.constraint() or "crest" in result.constraint()
