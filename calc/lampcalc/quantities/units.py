"""Quantities at the edges: parse what people type, format what they read.

Inside the core every value is a float in SI units (temperatures in degrees
Celsius, ratios as plain fractions). This module is the only place that knows
unit spellings; every alias lives in the tables below.
"""

from __future__ import annotations

import math
import re
from dataclasses import dataclass
from decimal import Decimal

from ..errors import InputError

#: SI prefixes people type, including the spellings of micro.
PREFIXES: dict[str, int] = {
    "p": -12,
    "n": -9,
    "u": -6,
    "µ": -6,  # micro sign U+00B5
    "μ": -6,  # Greek mu U+03BC
    "m": -3,
    "": 0,
    "k": 3,
    "K": 3,
    "M": 6,
    "G": 9,
}

#: Prefixes used when formatting, by exponent.
FORMAT_PREFIX: dict[int, str] = {-12: "p", -9: "n", -6: "µ", -3: "m", 0: "", 3: "k", 6: "M", 9: "G"}


@dataclass(frozen=True)
class Dimension:
    """One kind of quantity: its SI symbol, the base spellings that take an SI
    prefix, and extra spellings with their own factor to SI."""

    name: str
    symbol: str
    example: str
    prefixed: tuple[str, ...] = ()
    extra: tuple[tuple[str, float], ...] = ()
    plain_ok: bool = False
    use_prefixes: bool = True


FOOT = 0.3048
INCH = 0.0254
#: Area of one circular mil in square metres (a circle one thousandth of an inch across).
CIRCULAR_MIL = math.pi / 4 * (INCH / 1000) ** 2

DIMENSIONS: dict[str, Dimension] = {
    d.name: d
    for d in (
        Dimension("voltage", "V", "230 V", ("V", "VAC", "Vac", "VDC", "Vdc", "Vrms", "V rms", "volt", "volts")),
        Dimension("current", "A", "350 mA", ("A", "amp", "amps")),
        Dimension("capacitance", "F", "22 µF", ("F",)),
        Dimension("resistance", "Ω", "470 kΩ", ("Ω", "Ω", "ohm", "ohms", "Ohm", "R")),
        Dimension("frequency", "Hz", "50 Hz", ("Hz",)),
        Dimension("power", "W", "1.5 W", ("W",)),
        Dimension("energy", "J", "50 mJ", ("J",)),
        Dimension("inductance", "H", "0.8 mH", ("H",)),
        Dimension(
            "i2t",
            "A²s",
            "0.25 A²s",
            (),
            (("A²s", 1.0), ("A2s", 1.0), ("A^2s", 1.0), ("A^2 s", 1.0)),
            use_prefixes=False,
        ),
        Dimension("time", "s", "1 s", ("s", "sec"), (("min", 60.0), ("h", 3600.0))),
        Dimension("length", "m", "3.5 m", ("m",), (("ft", FOOT), ("'", FOOT), ("in", INCH), ('"', INCH))),
        Dimension(
            "area",
            "m²",
            "1.5 mm²",
            (),
            (
                ("mm2", 1e-6),
                ("mm²", 1e-6),
                ("mm^2", 1e-6),
                ("sq mm", 1e-6),
                ("m2", 1.0),
                ("m²", 1.0),
                ("cmil", CIRCULAR_MIL),
                ("kcmil", 1000 * CIRCULAR_MIL),
            ),
            use_prefixes=False,
        ),
        Dimension("ratio", "%", "10 %", (), (("%", 0.01), ("ppm", 1e-6)), plain_ok=True, use_prefixes=False),
        Dimension("temperature", "°C", "25 °C", (), (("°C", 1.0), ("degC", 1.0), ("C", 1.0)), use_prefixes=False),
        Dimension(
            "tempco",
            "V/K",
            "-3 mV/K",
            ("V/K", "V/°C", "V/C", "V/degC"),
        ),
        Dimension(
            "thermal_resistance",
            "K/W",
            "20 K/W",
            (),
            (("K/W", 1.0), ("°C/W", 1.0), ("C/W", 1.0)),
            use_prefixes=False,
        ),
        Dimension("count", "", "4", (), (), plain_ok=True, use_prefixes=False),
    )
}

_NUMBER = re.compile(r"^\s*([+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?)\s*(.*?)\s*$")
_AWG = re.compile(
    r"^\s*(?:#\s*)?(\d{1,2}|[1-4]/0|0{1,4})\s*(?:AWG|awg|ga|gauge)\s*$|^\s*(?:AWG|awg)\s*(\d{1,2}|[1-4]/0)\s*$"
)


def awg_number(text: str) -> int | None:
    """The gauge number in a spelling like "18 AWG", "AWG 18" or "4/0 AWG"
    (m/0 is returned as 1 - m), or None when the text is not a gauge."""
    m = _AWG.match(text)
    if not m:
        return None
    g = m.group(1) or m.group(2)
    if "/" in g:
        return 1 - int(g.split("/")[0])
    if set(g) == {"0"}:
        return 1 - len(g)
    return int(g)


def awg_diameter(n: int) -> float:
    """Diameter in metres of gauge n by the ASTM B258 definition:
    0.005 in x 92^((36 - n)/39)."""
    return 0.005 * INCH * math.pow(92.0, (36 - n) / 39)


def awg_area(n: int) -> float:
    return math.pi / 4 * awg_diameter(n) ** 2


def dimension(name: str) -> Dimension:
    try:
        return DIMENSIONS[name]
    except KeyError:
        raise KeyError(f"unknown dimension {name!r}") from None


def _unit_factor(dim: Dimension, unit: str) -> float | None:
    if dim.name == "temperature":
        return None  # handled by the caller (offsets)
    for spelling, factor in dim.extra:
        if unit == spelling:
            return factor
    if dim.use_prefixes:
        for base in dim.prefixed:
            if unit.endswith(base):
                prefix = unit[: -len(base)].strip()
                if prefix in PREFIXES:
                    return 10.0 ** PREFIXES[prefix]
        # "470k" style: a bare prefix with the symbol left out (resistance only)
        if dim.name == "resistance" and unit in PREFIXES:
            return 10.0 ** PREFIXES[unit]
    return None


def _scale(number: str, exponent: int) -> float:
    # float of a decimal string is correctly rounded, so scaling in decimal
    # keeps parse(format(x)) == x exact.
    return float(Decimal(number).scaleb(exponent))


def parse(value: object, dim_name: str, field: str) -> float:
    """Turn a user's value into an SI float.

    Numbers (int or float) are taken as SI already. Strings must carry a unit of
    the right dimension, except ratios and counts, which may be plain numbers.
    """
    dim = dimension(dim_name)
    if isinstance(value, bool):
        raise InputError(field, value, f"a {dim.name} such as '{dim.example}'")
    if isinstance(value, (int, float)):
        x = float(value)
        if not math.isfinite(x):
            raise InputError(field, value, f"a finite {dim.name} such as '{dim.example}'")
        return x
    if not isinstance(value, str):
        raise InputError(field, value, f"a {dim.name} such as '{dim.example}'")
    text = value.strip().replace("\u2212", "-")
    if text.count(",") == 1 and "." not in text:
        text = text.replace(",", ".")  # a decimal comma: "2,2 µF"
    expected = f"a {dim.name} such as '{dim.example}'"
    if dim.name == "area":
        n = awg_number(text)
        if n is not None:
            if not -3 <= n <= 56:
                raise InputError(field, value, "a gauge from 4/0 AWG to 56 AWG")
            return awg_area(n)
    m = _NUMBER.match(text)
    if not m:
        raise InputError(field, value, expected)
    number, unit = m.group(1), m.group(2).strip()
    if dim.name == "temperature":
        if unit in ("°C", "degC", "C", "℃"):
            return float(number)
        if unit in ("°F", "degF", "F", "℉"):
            return (float(number) - 32.0) * 5.0 / 9.0
        if unit == "K":
            return float(number) - 273.15
        if unit == "":
            raise InputError(field, value, f"{expected} (the unit is missing)")
        raise InputError(field, value, expected)
    if unit == "":
        if dim.plain_ok:
            x = float(number)
            if dim.name == "count" and x != int(x):
                raise InputError(field, value, "a whole number such as '4'")
            return x
        raise InputError(field, value, f"{expected} (the unit is missing)")
    if dim.name == "ratio" and unit == "%":
        return _scale(number, -2)
    factor = _unit_factor(dim, unit)
    if factor is None:
        raise InputError(field, value, expected)
    if factor != 1.0 and math.log10(factor) == int(math.log10(factor)) and 10.0 ** int(math.log10(factor)) == factor:
        return _scale(number, int(math.log10(factor)))
    return float(number) * factor


def _mantissa(x: float, exp: int, digits: int | None) -> str:
    d = Decimal(repr(x)).scaleb(-exp)
    if digits is None:
        s = format(d.normalize(), "f")
    else:
        mag = d.adjusted()
        q = Decimal(1).scaleb(mag - digits + 1)
        s = format(d.quantize(q) if mag - digits + 1 < 0 else d.quantize(Decimal(1)), "f")
        if "." in s:
            s = s.rstrip("0").rstrip(".")
    if s in ("-0",):
        s = "0"
    return s


def format_value(x: float, dim_name: str, digits: int | None = 4) -> str:
    """Format an SI float for reading, with an SI prefix chosen so the number
    sits between 1 and 1000. ``digits=None`` gives every digit needed to read
    the value back exactly."""
    dim = dimension(dim_name)
    if not math.isfinite(x):
        return f"{x} {dim.symbol}".strip()
    if dim.name == "ratio":
        return f"{_mantissa(x, -2, digits)} %"
    if dim.name == "area":
        return f"{_mantissa(x, -6, digits)} mm²"
    if dim.name == "count":
        return _mantissa(x, 0, digits)
    if not dim.use_prefixes:
        return f"{_mantissa(x, 0, digits)} {dim.symbol}"
    if x == 0:
        return f"0 {dim.symbol}"
    exp = int(math.floor(math.log10(abs(x)) / 3) * 3)
    exp = max(-12, min(9, exp))
    # a rounded mantissa can reach 1000: move up a prefix
    mant = _mantissa(x, exp, digits)
    if digits is not None and abs(float(mant)) >= 1000 and exp < 9:
        exp += 3
        mant = _mantissa(x, exp, digits)
    if dim.name == "tempco":
        return f"{mant} {FORMAT_PREFIX[exp]}V/K"
    return f"{mant} {FORMAT_PREFIX[exp]}{dim.symbol}"
