"""Quantities: the spellings people type, the errors they get, round trips."""

from __future__ import annotations

import math

import pytest
from hypothesis import example, given
from hypothesis import strategies as st
from lampcalc.errors import InputError
from lampcalc.quantities.units import DIMENSIONS, awg_area, format_value, parse


@pytest.mark.parametrize(
    ("text", "dim", "si"),
    [
        ("22 uF", "capacitance", 22e-6),
        ("22µF", "capacitance", 22e-6),
        ("22μF", "capacitance", 22e-6),
        ("0.022 mF", "capacitance", 22e-6),
        ("350 mA", "current", 0.35),
        ("230 VAC", "voltage", 230.0),
        ("12 VDC", "voltage", 12.0),
        ("3.5 ft", "length", 3.5 * 0.3048),
        ("6 in", "length", 6 * 0.0254),
        ("1.5 mm2", "area", 1.5e-6),
        ("1.5 mm²", "area", 1.5e-6),
        ("50 Hz", "frequency", 50.0),
        ("10 %", "ratio", 0.10),
        ("0.1", "ratio", 0.10),
        ("470k", "resistance", 470e3),
        ("4.7 kΩ", "resistance", 4700.0),
        ("1 Mohm", "resistance", 1e6),
        ("-3 mV/K", "tempco", -0.003),
        ("77 °F", "temperature", 25.0),
        ("298.15 K", "temperature", 25.0),
        ("2,2 uF", "capacitance", 2.2e-6),
        ("1 min", "time", 60.0),
    ],
)
def test_spellings(text: str, dim: str, si: float) -> None:
    assert parse(text, dim, "x") == pytest.approx(si, rel=1e-12)


def test_awg_spellings_ASTM_B258() -> None:
    # ASTM B258 (references.md A1/A2): 18 AWG, AWG 18, 4/0 = gauge -3
    assert parse("18 AWG", "area", "size") == pytest.approx(awg_area(18))
    assert parse("AWG 18", "area", "size") == pytest.approx(awg_area(18))
    assert parse("4/0 AWG", "area", "size") == pytest.approx(awg_area(-3))
    assert math.sqrt(4 * awg_area(-3) / math.pi) == pytest.approx(0.46 * 0.0254, rel=1e-9)


@pytest.mark.parametrize(
    ("text", "dim", "needle"),
    [
        ("22", "capacitance", "unit is missing"),
        ("22 uH", "capacitance", "capacitance such as"),
        ("230 A", "voltage", "voltage such as"),
        ("abc", "current", "current such as"),
        ("", "voltage", "voltage such as"),
        ("25", "temperature", "unit is missing"),
        ("2.5", "count", "whole number"),
    ],
)
def test_wrong_or_missing_unit_names_field_and_dimension(text: str, dim: str, needle: str) -> None:
    with pytest.raises(InputError) as e:
        parse(text, dim, "the_field")
    assert e.value.field == "the_field"
    assert needle in str(e.value)


def test_non_finite_numbers_are_refused() -> None:
    with pytest.raises(InputError):
        parse(float("nan"), "voltage", "v")
    with pytest.raises(InputError):
        parse(True, "voltage", "v")


def test_format_uses_prefixes() -> None:
    assert format_value(22e-6, "capacitance") == "22 µF"
    assert format_value(0.35, "current") == "350 mA"
    assert format_value(470e3, "resistance") == "470 kΩ"
    assert format_value(0.999995, "voltage") == "1 V"
    assert format_value(0.1, "ratio") == "10 %"


PREFIXED = [d for d in DIMENSIONS.values() if d.use_prefixes]


@given(
    x=st.floats(min_value=1e-12, max_value=1e9, allow_nan=False, allow_infinity=False),
    dim=st.sampled_from([d.name for d in DIMENSIONS.values()]),
    neg=st.booleans(),
)
@example(x=2.2e-5, dim="capacitance", neg=False)
@example(x=0.1, dim="ratio", neg=False)
@example(x=1e-12, dim="current", neg=True)
def test_parse_format_round_trip(x: float, dim: str, neg: bool) -> None:
    if dim == "count":
        x = float(round(x))
    v = -x if neg and dim in ("voltage", "tempco", "temperature", "current") else x
    assert parse(format_value(v, dim, None), dim, "x") == v
