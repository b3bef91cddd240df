"""The fixture planner, its small cases (these also run in the Pyodide tier;
the grid of module, mains, bridge and count combinations is in
``test_plan_grid.py``, native only). Every design `lampbook plan` offers passes
the whole review (the project's own check, itself tested against standards and
ngspice); where a check fails the planner names it and says why. The module
and mains data below are invented."""

from __future__ import annotations

import functools
import json
import math

import pytest
from lampcalc.errors import InputError, InputErrors
from lampcalc.fixture.check import check
from lampcalc.fixture.design import parse_design
from lampcalc.fixture.plan import Plan, arrangements, parse_spec, parse_stock, plan, plan_text

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
    for name in ("bridge", "emissions"):
        if extra.get(name):
            text += table(name, json.loads(extra[name]))
    return text


def test_cv_plan_passes_and_uses_all_modules() -> None:
    text = spec_text(MODULES["single-die 60 mA"], None, 42, "cv")
    result = plan(parse_spec(text))
    best = result.best
    assert best is not None
    d = parse_design(best.design_text)
    assert d.is_cv and best.series * best.parallel == 42
    assert check(d)["failed"] == 0


def test_arrangements_use_every_module() -> None:
    assert arrangements(12) == [(12, 1), (6, 2), (4, 3), (3, 4), (2, 6), (1, 12)]


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
    text = spec_text(MODULES["triple-die 20 mA"], MAINS["230-50"], 1, "dropper")  # one arrangement: 1 x 1
    best = plan_text(text).best
    assert best is not None
    assert parse_design(best.design_text).name == "Grid fixture"


@functools.cache
def small_plan(emissions: str = "") -> Plan:
    """One small dropper plan (the first arrangement only), shared by the tests below to keep the Pyodide tier short."""
    text = spec_text(MODULES["triple-die 20 mA"], MAINS["230-50"], 12, "dropper", emissions=emissions)
    return plan(parse_spec(text), limit=1)


def test_planned_bleeders_are_split_and_rated_for_the_worst_corner() -> None:
    """The dropper bleeder: enough resistors in series that each sees at most
    80 % of a 200 V limiting voltage at the high-mains crest (230 V + 10 %,
    crest 357.8 V: arithmetic, and the 200 V default is from memory), two
    paths each meeting IEC 60335-1 cl. 22.5's 34 V within 1 s alone (applied
    by analogy, t = R C ln(V0/34)), and a power rating at least twice what
    each resistor dissipates at its worst corner (common practice)."""
    best = small_plan().best
    assert best is not None
    d = parse_design(best.design_text)
    dr = d.dropper_or_none
    crest = math.sqrt(2) * 230 * 1.1
    assert dr.bleeder_resistors >= math.ceil(crest / 160) == 3
    assert crest / dr.bleeder_resistors <= 0.8 * dr.bleeder_voltage_rating
    assert dr.bleeder_paths == 2
    path = dr.bleeder * dr.bleeder_paths
    assert path * dr.largest * (1 + dr.tolerance) * math.log(crest / 34.0) <= 1.0
    ans = check(d)
    rating = {c["id"]: c for c in ans["checks"]}
    for cid in ("bleeder.dropper_rating", "bleeder.smoothing_rating", "bleeder.dropper", "resistor.pulse", "fuse.i2t"):
        assert rating[cid]["status"] == "pass", rating[cid]
    each = rating["bleeder.dropper_rating"]["values"]
    assert each["power_each_W"] <= 0.5 * dr.bleeder_rating
    # the single fault "one bleeder path open" leaves a path that still discharges the pins in time
    assert "bleeder.open" not in best.hazards


def test_emissions_class_reaches_the_design() -> None:
    best = small_plan(json.dumps({"class": "A"})).best
    assert best is not None
    d = parse_design(best.design_text)
    assert d.get("emissions", "class") == "A"
    harm = next(c for c in check(d)["checks"] if c["id"] == "harmonics.iec61000_3_2")
    assert "Class A" in harm["message"]
    bad = spec_text(MODULES["triple-die 20 mA"], MAINS["230-50"], 12, "dropper", emissions=json.dumps({"class": "Q"}))
    with pytest.raises((InputError, InputErrors)) as e:
        parse_spec(bad)
    errs = e.value.errors if isinstance(e.value, InputErrors) else [e.value]
    assert [x.field for x in errs] == ["emissions.class"]
