"""Unit tests and properties of the closed-form calculators."""

from __future__ import annotations

import json
import math

import pytest
from hypothesis import example, given, settings
from hypothesis import strategies as st
from lampcalc.api import compute, handle
from lampcalc.calculators import CALCULATORS
from lampcalc.errors import CalcError, InputError
from lampcalc.physics import dropper
from lampcalc.physics.led import LedModule
from lampcalc.physics.wire import size_from_area
from lampcalc.quantities.units import awg_area, awg_number, format_value
from lampcalc.schema import evaluate


def test_every_calculator_answers_its_defaults() -> None:
    for name in CALCULATORS:
        ans = compute(name, {})
        assert ans["ok"], (name, ans)


def test_mains_calculators_carry_cautions() -> None:
    for name, calc in CALCULATORS.items():
        ans = compute(name, {})
        if calc.mains:
            assert any("Local codes" in c for c in ans["cautions"]), name


def test_string_planner_cautions_follow_the_supply() -> None:
    assert any("No isolation" in c for c in compute("string", {"supply": "dropper", "current": "30 mA"})["cautions"])
    cv = compute("string", {"supply": "cv"})["cautions"]
    assert cv and not any("No isolation" in c for c in cv)


def test_led_fit_from_two_points() -> None:
    m = LedModule.from_points(0.02, 2.72, 0.06, 2.80)
    assert m.r_dynamic == pytest.approx(2.0)
    assert m.v0 == pytest.approx(2.68)
    assert m.current(m.voltage(0.04)) == pytest.approx(0.04)


def test_led_band_and_tempco() -> None:
    m = LedModule(v0=2.7, r_dynamic=2.0, vf_spread=0.05, current_ref=0.02)
    assert m.voltage(0.02, corner=+1) - m.voltage(0.02) == pytest.approx(0.05 * 2.74)
    assert m.voltage(0.02, 75.0) < m.voltage(0.02, 25.0)


def test_bad_module_points_are_input_errors() -> None:
    with pytest.raises(InputError):
        LedModule.from_points(0.02, 2.9, 0.02, 3.0)
    with pytest.raises(InputError):
        LedModule.from_points(0.02, 3.0, 0.06, 2.9)


def test_unknown_input_and_all_problems_reported() -> None:
    ans = compute("dropper", {"capacitance": "1", "bus_voltage": "abc", "nonsense": "1"})
    assert not ans["ok"]
    fields = {e["field"] for e in ans["errors"]}
    assert {"capacitance", "bus_voltage", "nonsense"} <= fields


def test_range_limits() -> None:
    ans = compute("dropper", {"capacitance": "-1 uF"})
    assert ans["errors"][0]["field"] == "capacitance"
    assert "more than" in ans["errors"][0]["expected"]


def test_region_fills_mains_and_custom_requires_values() -> None:
    r = evaluate(CALCULATORS["dropper"], {"region": "120-60"})
    assert r.values["peak_voltage_V"] == pytest.approx(169.7, rel=1e-3)
    ans = compute("dropper", {"region": "custom"})
    assert not ans["ok"] and {e["field"] for e in ans["errors"]} >= {"mains_voltage", "frequency"}


def test_bus_above_crest_is_no_solution() -> None:
    ans = compute("dropper", {"bus_voltage": "400 V"})
    assert not ans["ok"] and ans["errors"][0]["field"] == "bus_voltage"


def test_dropper_bank_steps() -> None:
    r = evaluate(CALCULATORS["dropper"], {"stock_capacitance": "0.47 uF", "target_current": "40 mA"})
    assert r.values["bank_count"] == math.ceil(float(r.values["capacitance_needed_F"]) / 0.47e-6)  # type: ignore[arg-type]
    currents = [row["led_current_avg_A"] for row in r.rows]
    assert currents == sorted(currents) and len(currents) == r.values["bank_count"]


def test_frequency_mismatch_60_over_50_is_20_percent() -> None:
    r = evaluate(CALCULATORS["dropper"], {})
    assert r.values["led_current_other_frequency_A"] / r.values["led_current_avg_A"] == pytest.approx(1.2)  # type: ignore[operator]


def test_string_cv_pick_keeps_headroom() -> None:
    r = evaluate(CALCULATORS["string"], {"supply": "cv", "supply_voltage": "24 V", "current": "20 mA"})
    assert float(r.values["headroom"]) >= 0.10  # type: ignore[arg-type]
    assert r.values["string_current_min_A"] <= r.values["string_current_A"] <= r.values["string_current_max_A"]  # type: ignore[operator]


def test_string_cc_fits_window() -> None:
    r = evaluate(CALCULATORS["string"], {"supply": "cc", "driver_current": "350 mA", "current_max": "120 mA"})
    assert 9 <= float(r.values["voltage_hot_V"]) and float(r.values["voltage_cold_V"]) <= 36  # type: ignore[arg-type]
    assert float(r.values["string_current_A"]) <= 0.120  # type: ignore[arg-type]


def test_string_dropper_sensitivity_rises_with_bus() -> None:
    r = evaluate(CALCULATORS["string"], {"supply": "dropper", "current": "30 mA"})
    sens = [row["sensitivity"] for row in r.rows]
    assert sens == sorted(sens)
    caps = [row["capacitance_F"] for row in r.rows]
    assert caps == sorted(caps)


def test_wire_smallest_size_meets_limit() -> None:
    r = evaluate(
        CALCULATORS["wire"],
        {"size": "18 AWG", "length": "10 m", "current": "2 A", "supply_voltage": "12 V", "drop_limit": "3 %"},
    )
    best = str(r.values["smallest_size"])
    n = awg_number(best)
    assert n is not None
    r2 = evaluate(CALCULATORS["wire"], {"size": best, "length": "10 m", "current": "2 A", "supply_voltage": "12 V"})
    assert float(r2.values["drop_fraction"]) <= 0.03  # type: ignore[arg-type]
    r3 = evaluate(
        CALCULATORS["wire"],
        {"size": f"{n + 1} AWG", "length": "10 m", "current": "2 A", "supply_voltage": "12 V"},
    )
    assert float(r3.values["drop_fraction"]) > 0.03  # type: ignore[arg-type]


def test_recalled_limits_marked_once_with_a_dagger() -> None:
    # A value recalled rather than read against its standard (the IEC 60335-1 cord table and the IEEE 1789
    # band are marked so in the core's data) reaches the reader as a dagger and one explanatory note.
    from lampcalc.cautions import UNVERIFIED_NOTE

    marked = 0
    for name in CALCULATORS:
        ans = compute(name, {"ampacity_table": "iec-cord"} if name == "wire" else {})
        shown = [*ans["display"].values(), *ans["notes"], *ans["warnings"]]
        assert not [t for t in shown if "from memory" in str(t)], name
        daggers = sum(str(t).count("†") for t in shown if t != UNVERIFIED_NOTE)
        assert ans["notes"].count(UNVERIFIED_NOTE) == (1 if daggers else 0), name
        marked += daggers > 0
    assert marked >= 3  # wire (cord table), ripple and camera (flicker band)
    assert "†" in compute("wire", {"ampacity_table": "iec-cord"})["display"]["ampacity_table"]


def test_a_row_that_does_not_apply_says_so() -> None:
    # An output of the answer's own mode with no value reads "does not apply" instead of vanishing; an output
    # of another mode is not part of the answer (issue of consistency, no outside reference needed: the rule is
    # about what is shown, and each case is checked against the value the calculator returns).
    dropper = compute("dropper", {})
    assert "capacitance_needed_F" in dropper["applies"] and dropper["values"]["capacitance_needed_F"] is None
    assert dropper["display"]["capacitance_needed_F"] == "does not apply: no target current given"
    cv = compute("string", {"supply": "cv"})
    assert "ballast_ohm" in cv["applies"] and cv["values"]["ballast_ohm"] is not None
    assert "capacitance_F" not in cv["applies"] and "voltage_cold_V" not in cv["applies"]
    feed = compute("string", {"supply": "dropper", "current": "30 mA"})
    assert "capacitance_F" in feed["applies"] and feed["values"]["capacitance_F"] is not None
    assert "ballast_ohm" not in feed["applies"]
    for name in CALCULATORS:
        calc = CALCULATORS[name]
        for mode in calc.param(calc.mode).choices if calc.mode else (None,):
            ans = compute(name, {calc.mode: mode} if mode else {})
            # every output a mode leaves without a value belongs to another mode, or says it does not apply
            for o in calc.outputs:
                if ans["values"][o.name] is None and o.name in ans["applies"]:
                    assert ans["display"][o.name] not in ("", "—"), (name, mode, o.name)


def test_api_handle_json_round_trip() -> None:
    import json

    out = json.loads(
        handle(json.dumps({"kind": "compute", "calculator": "ripple", "inputs": {"capacitance": "220 uF"}}))
    )
    assert out["ok"] and out["display"]["ripple_pp_V"].endswith("V")
    bad = json.loads(handle("not json"))
    assert not bad["ok"]
    desc = json.loads(handle('{"kind": "describe"}'))
    assert {c["name"] for c in desc["calculators"]} == set(CALCULATORS)


# --- properties ----------------------------------------------------------------------


@given(c1=st.floats(1e-8, 1e-4), k=st.floats(1.001, 10), v=st.floats(80, 280), bus=st.floats(0, 300))
def test_more_capacitance_more_current(c1: float, k: float, v: float, bus: float) -> None:
    a = dropper.average_current(v, 50, c1, bus, 0.9)
    b = dropper.average_current(v, 50, c1 * k, bus, 0.9)
    assert b >= a
    if a > 0:
        assert b > a


@given(v=st.floats(80, 280), c=st.floats(1e-8, 1e-4), bus=st.floats(0, 390))
def test_capacitor_rms_at_least_average(v: float, c: float, bus: float) -> None:
    # the rms of |i| is never below its mean
    assert dropper.capacitor_rms_current(v, 50, c, bus, 0.9) >= dropper.average_current(v, 50, c, bus, 0.9) * (
        1 - 1e-12
    )


@given(n=st.integers(-3, 56))
@example(n=-3)
@example(n=56)
def test_awg_diameter_round_trip(n: int) -> None:
    assert awg_number(size_from_area(awg_area(n)).name) == n


@given(vs=st.floats(5, 60), i=st.floats(1e-3, 1.0), v0=st.floats(1.5, 4.0), rd=st.floats(0, 5))
def test_cv_power_in_equals_led_plus_ballast(vs: float, i: float, v0: float, rd: float) -> None:
    from lampcalc.physics.strings import cv_options

    m = LedModule(v0=v0, r_dynamic=rd)
    for o in cv_options(m, vs, 0.0, i, 25.0, 25.0, "E24", 0.5):
        led = o.series * m.voltage(o.current) * o.current
        assert vs * o.current == pytest.approx(led + o.current**2 * o.ballast, rel=1e-9)


def _value_for(p: object, draw: st.DrawFn) -> object:
    from lampcalc.schema import Param

    assert isinstance(p, Param)
    if p.dim in ("choice", "region"):
        from lampcalc.quantities.regions import PRESETS

        return draw(st.sampled_from(p.choices or tuple(PRESETS)))
    if p.dim == "text":
        return draw(st.sampled_from(["22 uF", "1 V", "x"]))
    lo = p.minimum if p.minimum is not None else -1e3
    hi = p.maximum if p.maximum is not None else 1e3
    x = draw(st.floats(lo, hi, allow_nan=False))
    if p.dim == "count":
        x = float(round(x))
    return format_value(x, p.dim, None)


@st.composite
def calculator_inputs(draw: st.DrawFn) -> tuple[str, dict[str, object]]:
    name = draw(st.sampled_from(sorted(CALCULATORS)))
    calc = CALCULATORS[name]
    chosen = draw(st.lists(st.sampled_from([p.name for p in calc.params]), unique=True, max_size=6))
    return name, {k: _value_for(calc.param(k), draw) for k in chosen}


@settings(max_examples=400, deadline=None)
@given(calculator_inputs())
def test_accepted_inputs_give_finite_results_rejected_raise_input_error(
    case: tuple[str, dict[str, object]],
) -> None:
    name, inputs = case
    try:
        r = evaluate(CALCULATORS[name], inputs)
    except CalcError:
        return
    for k, v in r.values.items():
        if isinstance(v, float):
            assert not math.isnan(v), k


@settings(max_examples=200, deadline=None)
@given(
    name=st.sampled_from(sorted(CALCULATORS)),
    junk=st.dictionaries(
        st.text(max_size=8),
        st.one_of(st.text(max_size=12), st.floats(), st.integers(), st.none()),
        max_size=4,
    ),
)
def test_junk_never_raises_other_exceptions(name: str, junk: dict[str, object]) -> None:
    ans = compute(name, junk)
    assert isinstance(ans["ok"], bool)


# --- issue 14: one state per answer, rows that say why, strict JSON ----------------------------


def _strict(text: str) -> object:
    def refuse(name: str) -> object:
        raise AssertionError(f"{name} in JSON")

    return json.loads(text, parse_constant=refuse)


def test_dropper_rows_follow_the_bank_X8_X1() -> None:
    # 230 V 50 Hz, 20 mA target, 0.1 µF stock: the bank is 5 × 0.1 µF = 0.5 µF and every
    # row is for it. Charge balance I = 4 f C (Vpk - Vbus - 2 Vd) (references.md X8);
    # Xc = 1 / (2 π f C) (references.md X1); RC discharge t = R C ln(V0 / V) (circuit theory).
    ans = compute(
        "dropper",
        {"region": "230-50", "target_current": "20 mA", "stock_capacitance": "0.1 uF", "bus_voltage": "100 V"},
    )
    assert ans["ok"], ans
    v = ans["values"]
    c = 5 * 0.1e-6
    assert v["bank_count"] == 5
    assert v["led_current_avg_A"] == pytest.approx(4 * 50 * c * (230 * math.sqrt(2) - 100 - 1.8), rel=1e-9)
    assert v["led_current_avg_A"] == pytest.approx(ans["rows"][-1]["led_current_avg_A"], rel=1e-12)
    assert v["reactance_ohm"] == pytest.approx(1 / (2 * math.pi * 50 * c), rel=1e-9)
    c_hi, pk_hi = c * 1.1, 253 * math.sqrt(2)
    assert v["bleeder_discharge_time_s"] == pytest.approx(v["bleeder_ohm"] * c_hi * math.log(pk_hi / 34), rel=1e-9)
    assert v["bleeder_discharge_time_s"] <= 1.0
    assert any("for the bank" in n for n in ans["notes"])


def test_dropper_without_series_resistor_says_so() -> None:
    ans = compute("dropper", {"series_resistance": "0 Ω"})
    assert ans["ok"]
    assert ans["values"]["switch_on_peak_A"] is None and ans["values"]["pulse_energy_J"] is None
    assert "not limited" in ans["display"]["switch_on_peak_A"]
    assert "does not apply" in ans["display"]["pulse_energy_J"]
    assert any("no series resistor" in w for w in ans["warnings"])


def test_dropper_impossible_operating_point_is_warned() -> None:
    # 22 µF on 230 V into a 100 V bus: about 1 A and hundreds of watts in a 100 Ω resistor (X8, I²R)
    ans = compute("dropper", {"capacitance": "22 uF", "series_resistance": "100 Ω"})
    assert ans["ok"]
    assert ans["values"]["series_resistor_power_W"] > 100
    assert any("series resistor would dissipate" in w for w in ans["warnings"])
    assert any("into the LEDs" in w for w in ans["warnings"])
    quiet = compute("dropper", {})
    assert not any("would dissipate" in w for w in quiet["warnings"])


@pytest.mark.parametrize(
    ("value", "series", "nearest", "up", "down"),
    [
        # IEC 60063 tables (references.md E1-E3)
        ("4.7k", "E24", "4.7 kΩ", "4.7 kΩ", "4.7 kΩ"),
        ("4.7 kΩ", "E24", "4.7 kΩ", "4.7 kΩ", "4.7 kΩ"),
        ("4k3", "E12", "4.7 kΩ", "4.7 kΩ", "3.9 kΩ"),
        ("220 nF", "E6", "220 nF", "220 nF", "220 nF"),
        ("2u5", "E6", "2.2 µF", "3.3 µF", "2.2 µF"),
        ("0.22", "E24", "0.22", "0.22", "0.22"),
        ("4200", "E24", "4300", "4300", "3900"),
    ],
)
def test_preferred_answers_in_the_unit_given_IEC60063(
    value: str, series: str, nearest: str, up: str, down: str
) -> None:
    ans = compute("preferred", {"value": value, "series": series})
    assert ans["ok"], ans
    assert (ans["display"]["nearest"], ans["display"]["up"], ans["display"]["down"]) == (nearest, up, down)


@pytest.mark.parametrize(
    ("value", "needle"), [("2,200", "thousands comma"), ("0", "above zero"), ("banana", "such as")]
)
def test_preferred_refusals(value: str, needle: str) -> None:
    ans = compute("preferred", {"value": value})
    assert not ans["ok"] and ans["errors"][0]["field"] == "value"
    assert needle in ans["errors"][0]["message"]


def test_blank_required_value_is_an_error_not_the_default() -> None:
    ans = compute("dropper", {"capacitance": " "})
    assert not ans["ok"]
    assert [e["field"] for e in ans["errors"]] == ["capacitance"]
    assert "blank" in ans["errors"][0]["message"]
    assert [e["field"] for e in compute("quantity", {"text": " "})["errors"]] == ["text"]
    assert [e["field"] for e in compute("preferred", {"value": ""})["errors"]] == ["value"]
    # an optional field left blank is simply absent; a mains field takes the preset
    assert compute("dropper", {"bleeder": "", "mains_tolerance": " "})["ok"]


def test_unknown_region_is_one_error() -> None:
    ans = compute("dropper", {"region": "230-60"})
    assert [e["field"] for e in ans["errors"]] == ["region"]


def test_cross_field_bounds() -> None:
    hot_cold = compute("string", {"temperature_cold": "80 °C", "temperature_hot": "20 °C"})
    assert [e["field"] for e in hot_cold["errors"]] == ["temperature_cold"]
    window = compute("string", {"supply": "cc", "driver_v_min": "40 V", "driver_v_max": "9 V"})
    assert [e["field"] for e in window["errors"]] == ["driver_v_min"]
    pts = compute("module", {"i1": "20 mA", "v1": "2.9 V", "i2": "20 mA", "v2": "3 V"})
    assert [e["field"] for e in pts["errors"]] == ["i2"]


def test_handle_gives_strict_json_with_null_and_a_note() -> None:
    from lampcalc.api import finite_json

    found: list[str] = []
    assert finite_json({"a": math.inf, "b": [1.0, math.nan]}, "", found) == {"a": None, "b": [1.0, None]}
    assert found == ["a", "b[1]"]
    data = _strict(handle(json.dumps({"kind": "compute", "calculator": "dropper", "inputs": {"series_resistance": 0}})))
    assert isinstance(data, dict) and data["ok"]
