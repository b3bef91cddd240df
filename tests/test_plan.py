"""The fixture planner: every design `lampbook plan` offers passes the whole
review (the project's own check, itself tested against standards and ngspice),
its worst-corner LED current stays within the limit and its low-corner current
above the floor; where no design exists the planner says why. The module and
mains data below are invented."""

from __future__ import annotations

import itertools
import json

import pytest
from lampcalc.errors import InputError, InputErrors
from lampcalc.fixture.check import check
from lampcalc.fixture.design import parse_design
from lampcalc.fixture.plan import arrangements, parse_spec, parse_stock, plan, plan_text

MODULES = {
    # name: [module] table as a spec writes it (invented modules)
    "single-die 60 mA": {"v0": "2.68 V", "r_dynamic": "1.9 Ω", "current_max": "60 mA", "vf_spread": "3 %"},
    "triple-die 20 mA": {"v0": "8.1 V", "r_dynamic": "22 Ω", "current_max": "20 mA", "vf_tempco": "-6 mV/K"},
    "two points 150 mA": {"points": [["50 mA", "2.80 V"], ["150 mA", "3.05 V"]], "current_max": "150 mA"},
}
MAINS = {
    "230-50": {"voltage": "230 V", "frequency": "50 Hz", "tolerance": "10 %", "region": "230-50"},
    "120-60": {"voltage": "120 V", "frequency": "60 Hz", "tolerance": "5 %", "region": "120-60"},
}
BRIDGES = {
    "line": {},
    "exponential": {"model": "exponential", "saturation_current": "1 nA", "emission_coefficient": 1.8},
}
COUNTS = (1, 6, 12, 24, 40, 100)


def spec_text(module: dict[str, object], mains: dict[str, str] | None, count: int, supply: str, **extra: str) -> str:
    def table(name: str, values: dict[str, object]) -> str:
        return f"[{name}]\n" + "".join(f"{k} = {json.dumps(v, ensure_ascii=False)}\n" for k, v in values.items())

    text = f'name = "Grid fixture"\nmodules = {count}\nsupply = "{supply}"\n\n' + table("module", module)
    if mains:
        text += table("mains", mains)
    if extra.get("bridge"):
        text += table("bridge", json.loads(extra["bridge"]))
    return text


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


def test_grid_is_large_enough_and_mostly_solvable() -> None:
    assert len(GRID) >= 50


def test_cv_plan_passes_and_uses_all_modules() -> None:
    text = spec_text(MODULES["single-die 60 mA"], None, 42, "cv")
    result = plan(parse_spec(text))
    best = result.best
    assert best is not None
    d = parse_design(best.design_text)
    assert d.is_cv and best.series * best.parallel == 42
    assert check(d)["failed"] == 0


def test_suggest_offers_both_kinds() -> None:
    text = spec_text(MODULES["single-die 60 mA"], MAINS["230-50"], 24, "suggest")
    kinds = {p.supply for p in plan(parse_spec(text)).proposals}
    assert kinds == {"dropper", "cv"}


def test_arrangements_use_every_module() -> None:
    assert arrangements(12) == [(12, 1), (6, 2), (4, 3), (3, 4), (2, 6), (1, 12)]


def test_stock_values_make_the_bank() -> None:
    stock = (
        '[[capacitor]]\nvalue = "1 uF"\nac_rating = "310 V"\nclass = "X2"\ncount = 3\n'
        '[[capacitor]]\nvalue = "470 nF"\nac_rating = "310 V"\nclass = "X2"\ncount = 2\n'
        '[[capacitor]]\nvalue = "10 uF"\nac_rating = "250 V"\nclass = "X2"\ncount = 2\n'  # under-rated: never used
    )
    text = spec_text(MODULES["single-die 60 mA"], MAINS["230-50"], 40, "dropper")
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


@pytest.mark.parametrize(
    ("text", "field"),
    [
        ('modules = 0\n[module]\nv0 = "2.7 V"\nr_dynamic = "2 Ω"\ncurrent_max = "60 mA"\n', "modules"),
        ('modules = 4\nsupply = "magic"\n[module]\nv0 = "2.7 V"\nr_dynamic = "2 Ω"\ncurrent_max = "60 mA"\n', "supply"),
        ('modules = 4\nsupply = "cv"\n[module]\nv0 = "2.7 V"\nr_dynamic = "2 Ω"\n', "module.current_max"),
        (
            'modules = 4\nsupply = "dropper"\n[module]\nv0 = "2.7 V"\nr_dynamic = "2 Ω"\ncurrent_max = "60 mA"\n',
            "mains",
        ),
        ('modules = 4\nsupply = "cv"\ncolour = "red"\n[module]\ncurrent_max = "60 mA"\n', "colour"),
        ("modules = [", "spec"),
    ],
)
def test_bad_specs_name_the_field(text: str, field: str) -> None:
    with pytest.raises((InputError, InputErrors)) as e:
        parse_spec(text)
    errs = e.value.errors if isinstance(e.value, InputErrors) else [e.value]
    assert any(x.field == field for x in errs), [x.field for x in errs]


def test_bad_stock_names_the_entry() -> None:
    with pytest.raises(InputErrors) as e:
        parse_stock('[[capacitor]]\nvalue = "1 uF"\ncount = 0\n[[resistor]]\nvalue = "fast"\n')
    assert {x.field for x in e.value.errors} == {"stock.capacitor[1].count", "stock.resistor[1].value"}


def test_plan_text_round_trip() -> None:
    text = spec_text(MODULES["triple-die 20 mA"], MAINS["230-50"], 12, "dropper")
    best = plan_text(text).best
    assert best is not None
    assert parse_design(best.design_text).name == "Grid fixture"
