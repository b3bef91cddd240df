"""Quantities: the spellings people type, the errors they get, round trips."""

from __future__ import annotations

import math

import pytest
from hypothesis import assume, example, given
from hypothesis import strategies as st
from lampcalc.errors import InputError
from lampcalc.quantities.units import DIMENSIONS, awg_area, format_code, format_value, parse


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


# --- spellings the trade writes (issue 14) --------------------------------------------------
# Letter-and-digit codes: IEC 60062 (letter in place of the decimal point; R for ohms,
# k/M/G multipliers; p/n/u/m for farads); the letter table is quoted from memory.
# "MFD" on older capacitors and "E" for ohms are common practice.

ACCEPTED = [
    ("4k7", "resistance", 4700.0),
    ("4K7", "resistance", 4700.0),
    ("470R", "resistance", 470.0),
    ("4R7", "resistance", 4.7),
    ("R47", "resistance", 0.47),
    ("1M0", "resistance", 1e6),
    ("2M2", "resistance", 2.2e6),
    ("470E", "resistance", 470.0),
    ("4k7Ω", "resistance", 4700.0),
    ("1e3Ω", "resistance", 1000.0),
    ("2,2 Ω", "resistance", 2.2),
    ("1,500,000 Ω", "resistance", 1.5e6),
    ("10 OHM", "resistance", 10.0),
    ("1 MOHM", "resistance", 1e6),
    ("2u2", "capacitance", 2.2e-6),
    ("1n5", "capacitance", 1.5e-9),
    ("4p7", "capacitance", 4.7e-12),
    ("n47", "capacitance", 0.47e-9),
    ("100n", "capacitance", 100e-9),
    ("2.2u", "capacitance", 2.2e-6),
    ("0.47u", "capacitance", 0.47e-6),
    ("4.7k", "resistance", 4700.0),
    ("2.2R", "resistance", 2.2),
    ("2m2", "capacitance", 2.2e-3),
    ("2u2F", "capacitance", 2.2e-6),
    ("1uf", "capacitance", 1e-6),
    ("1 UF", "capacitance", 1e-6),
    ("4.7 PF", "capacitance", 4.7e-12),
    ("100 NF", "capacitance", 100e-9),
    ("0.1 MFD", "capacitance", 0.1e-6),
    ("0.47 mfd", "capacitance", 0.47e-6),
    ("10 uFd", "capacitance", 10e-6),
    ("1 mF", "capacitance", 1e-3),
    ("2,2 µF", "capacitance", 2.2e-6),
    ("0,47 uF", "capacitance", 0.47e-6),
    ("0,500 uF", "capacitance", 0.5e-6),
    ("230 v", "voltage", 230.0),
    ("230 vac", "voltage", 230.0),
    ("1 KV", "voltage", 1000.0),
    ("3,3 V", "voltage", 3.3),
    ("350 ma", "current", 0.35),
    ("50 hz", "frequency", 50.0),
    ("60 HZ", "frequency", 60.0),
    ("0,5 mm²", "area", 0.5e-6),
    ("1.5 MM2", "area", 1.5e-6),
    ("2,5 %", "ratio", 0.025),
    ("25,5 °C", "temperature", 25.5),
    ("500 ms", "time", 0.5),
    ("1,000,000", "count", 1e6),
]


@pytest.mark.parametrize(("text", "dim", "si"), ACCEPTED)
def test_trade_spellings_IEC60062(text: str, dim: str, si: float) -> None:
    assert parse(text, dim, "x") == pytest.approx(si, rel=1e-12)


REFUSED = [
    # a comma that could be a decimal comma or a thousands comma: both readings named
    ("2,200 uF", "capacitance", ["2.2 µF", "2.2 mF", "'2.2 uF'", "'2200 uF'"]),
    ("1,500 V", "voltage", ["1.5 V", "1.5 kV", "'1.5 V'", "'1500 V'"]),
    ("4,700 Ω", "resistance", ["4.7 Ω", "4.7 kΩ"]),
    # mF against the old MF marking: both readings named
    ("1 MF", "capacitance", ["µF", "mF", "old MF marking"]),
    ("10 mf", "capacitance", ["10 µF", "10 mF"]),
    # capitals throughout: M may be caps-lock milli or mega
    ("350 MA", "current", ["350 mA", "350 MA", "milli", "mega"]),
    ("2 MM", "length", ["2 mm", "2 Mm"]),
    # mixed marks, broken grouping
    ("1,234.5 V", "voltage", ["one decimal mark"]),
    ("1,23,456 V", "voltage", ["without group separators"]),
    # a power of ten is never read as a code
    ("4e7", "resistance", ["unit is missing"]),
    ("1.5e", "resistance", ["resistance such as"]),
    ("470e", "resistance", ["resistance such as"]),
    ("4m7", "resistance", ["resistance such as", "4k7"]),
    ("100n", "resistance", ["resistance such as"]),
    ("470m", "resistance", ["resistance such as"]),
    # beyond anything physical, non-finite, blank, too long
    ("1e999 V", "voltage", ["finite voltage"]),
    ("1e-300 Ω", "resistance", ["finite resistance"]),
    ("1e40 V", "voltage", ["finite voltage"]),
    (" ", "voltage", ["blank"]),
    ("1" * 500 + " V", "voltage", ["at most 100 characters"]),
    ("2u2", "resistance", ["resistance such as"]),
    ("4k7", "capacitance", ["capacitance such as", "2u2"]),
]


@pytest.mark.parametrize(("text", "dim", "needles"), REFUSED)
def test_refused_spellings_say_why(text: str, dim: str, needles: list[str]) -> None:
    with pytest.raises(InputError) as e:
        parse(text, dim, "the_field")
    assert e.value.field == "the_field"
    for n in needles:
        assert n in str(e.value), (n, str(e.value))


def test_every_dimension_names_its_forms() -> None:
    for d in DIMENSIONS.values():
        if d.name != "count":
            assert d.forms, d.name
        for form in (d.example, *d.forms):
            parse(form, d.name, "x")  # every advertised form is accepted


@given(
    digits=st.integers(min_value=1, max_value=999_999),
    shift=st.integers(min_value=-6, max_value=0),
    dim=st.sampled_from(["resistance", "capacitance"]),
    decade=st.integers(min_value=0, max_value=3),
)
@example(digits=47, shift=-1, dim="resistance", decade=3)  # 4k7
@example(digits=47, shift=-2, dim="resistance", decade=0)  # R47
@example(digits=22, shift=-1, dim="capacitance", decade=1)  # 2u2
def test_iec60062_code_round_trip(digits: int, shift: int, dim: str, decade: int) -> None:
    base = {"resistance": 1.0, "capacitance": 1e-12}[dim]
    x = float(f"{digits}e{shift}") * base * 1000.0**decade
    assume(x >= 1e-13)  # below a tenth of a picofarad is no part
    code = format_code(x, dim)
    assert code.strip() and " " not in code
    assert parse(code, dim, "x") == x
