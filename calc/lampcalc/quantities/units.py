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
    forms: tuple[str, ...] = ()  # more accepted spellings, shown in help and messages

    @property
    def expected(self) -> str:
        """What a message says is accepted: the example and the other forms."""
        shown = [self.example, *self.forms]
        if len(shown) == 1:
            return f"{_article(self.name)} {self.name.replace('_', ' ')} such as '{shown[0]}'"
        listed = ", ".join(f"'{x}'" for x in shown[:-1]) + f" or '{shown[-1]}'"
        return f"{_article(self.name)} {self.name.replace('_', ' ')} such as {listed}"


def _article(word: str) -> str:
    return "an" if word[:1].lower() in "aeiou" else "a"


FOOT = 0.3048
INCH = 0.0254
#: Area of one circular mil in square metres (a circle one thousandth of an inch across).
CIRCULAR_MIL = math.pi / 4 * (INCH / 1000) ** 2

DIMENSIONS: dict[str, Dimension] = {
    d.name: d
    for d in (
        Dimension(
            "voltage",
            "V",
            "230 V",
            ("V", "VAC", "Vac", "VDC", "Vdc", "Vrms", "V rms", "volt", "volts"),
            forms=("230 VAC", "12V", "3,3 V"),
        ),
        Dimension("current", "A", "350 mA", ("A", "amp", "amps"), forms=("0.35 A", "350mA")),
        Dimension("capacitance", "F", "22 µF", ("F",), forms=("22uF", "2u2", "100n", "0.1 MFD", "2,2 µF")),
        Dimension(
            "resistance",
            "Ω",
            "470 kΩ",
            ("Ω", "Ω", "ohm", "ohms", "Ohm", "R", "E"),
            forms=("470k", "4k7", "470R", "R47", "2,2 Ω"),
        ),
        Dimension("frequency", "Hz", "50 Hz", ("Hz",), forms=("60Hz",)),
        Dimension("power", "W", "1.5 W", ("W",), forms=("500 mW",)),
        Dimension("energy", "J", "50 mJ", ("J",), forms=("0.05 J",)),
        Dimension("inductance", "H", "0.8 mH", ("H",), forms=("800 uH",)),
        Dimension(
            "i2t",
            "A²s",
            "0.25 A²s",
            (),
            (("A²s", 1.0), ("A2s", 1.0), ("A^2s", 1.0), ("A^2 s", 1.0)),
            use_prefixes=False,
            forms=("0.25 A2s",),
        ),
        Dimension("time", "s", "1 s", ("s", "sec"), (("min", 60.0), ("h", 3600.0)), forms=("500 ms", "2 min")),
        Dimension(
            "length",
            "m",
            "3.5 m",
            ("m",),
            (("ft", FOOT), ("'", FOOT), ("in", INCH), ('"', INCH)),
            forms=("350 mm", "12 ft", "6 in"),
        ),
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
            forms=("0,75 mm2", "18 AWG", "4/0 AWG"),
        ),
        Dimension(
            "ratio",
            "%",
            "10 %",
            (),
            (("%", 0.01), ("ppm", 1e-6)),
            plain_ok=True,
            use_prefixes=False,
            forms=("0.1", "2,5 %"),
        ),
        Dimension(
            "temperature",
            "°C",
            "25 °C",
            (),
            (("°C", 1.0), ("degC", 1.0), ("C", 1.0)),
            use_prefixes=False,
            forms=("77 °F", "298 K"),
        ),
        Dimension("tempco", "V/K", "-3 mV/K", ("V/K", "V/°C", "V/C", "V/degC"), forms=("-0.003 V/K",)),
        Dimension(
            "thermal_resistance",
            "K/W",
            "20 K/W",
            (),
            (("K/W", 1.0), ("°C/W", 1.0), ("C/W", 1.0)),
            use_prefixes=False,
            forms=("20 °C/W",),
        ),
        Dimension("count", "", "4", (), (), plain_ok=True, use_prefixes=False),
        # light and camera
        Dimension("luminous_flux", "lm", "120 lm", ("lm",), forms=("1.2 klm", "120lm")),
        Dimension("illuminance", "lx", "500 lx", ("lx",), (("fc", 1 / FOOT**2),), forms=("50 fc", "1 klx")),
        Dimension("efficacy", "lm/W", "120 lm/W", ("lm/W",), forms=("95lm/W",)),
        Dimension("luminous_intensity", "cd", "1000 cd", ("cd",), forms=("1 kcd",)),
        Dimension(
            "angle",
            "°",
            "30°",
            (),
            (("°", 1.0), ("deg", 1.0)),
            plain_ok=True,
            use_prefixes=False,
            forms=("180 deg", "172.8°"),
        ),
        Dimension(
            "per_kelvin",
            "/K",
            "0.3 %/K",
            (),
            (("%/K", 0.01), ("%/°C", 0.01), ("/K", 1.0), ("1/K", 1.0)),
            use_prefixes=False,
            forms=("0.3 %/°C", "-0.002 /K"),
        ),
        Dimension(
            "frame_rate",
            "fps",
            "24 fps",
            (),
            (("fps", 1.0), ("Hz", 1.0)),
            plain_ok=True,
            use_prefixes=False,
            forms=("23.976 fps", "50 Hz"),
        ),
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


#: A plain number with no unit (not offered as a kind of quantity of its own).
NUMBER = Dimension("number", "", "4.7", (), (), plain_ok=True, use_prefixes=False, forms=("4700", "0,22"))

#: A quantity the trade states in percent and the JSON gives as 0-100 (keys ending ``_pct``: percent
#: flicker and its IEEE 1789 limits); only for outputs, never offered as a kind of input.
PERCENT = Dimension("percent", "%", "4 %", (), (("%", 1.0),), plain_ok=True, use_prefixes=False)


def dimension(name: str) -> Dimension:
    if name == "number":
        return NUMBER
    if name == "percent":
        return PERCENT
    try:
        return DIMENSIONS[name]
    except KeyError:
        raise KeyError(f"unknown dimension {name!r}") from None


class _Ambiguous(Exception):
    """A unit spelling with two readings; carries both (exponent, how to write it)."""

    def __init__(self, readings: tuple[tuple[int, str, str], ...]) -> None:
        super().__init__("ambiguous")
        self.readings = readings  # (exponent, what the reading is, how to write it)


#: Prefix letters whose case can be folded without a second reading (P as pico:
#: no peta is read here). m and M are kept as typed: milli and mega differ.
_FOLD = {"U": "u", "N": "n", "P": "p", "g": "G", "K": "k"}

#: Old capacitor markings: "MFD", "mfd", "uFd" are microfarads; "MF" and "mf" alone
#: are either the old microfarad marking or a millifarad (both readings refused).
_MFD = ("mfd", "mfds", "ufd", "µfd", "μfd")
_MF_AMBIGUOUS = ("MF", "mf", "Mf", "MF.", "mf.")

#: Dimensions whose symbol is all capitals, where "M" could be mega or a capitalised
#: milli and no mega value belongs on a fixture's bench.
_CAPS_MEGA = ("current", "voltage", "power", "energy")

#: Most characters a typed value may have (a hostile megabyte is refused at once).
MAX_TEXT = 100
#: Largest and smallest magnitudes (SI) any field reads; beyond them is a typing slip.
MAGNITUDE = (1e-15, 1e15)


def _unit_factor(dim: Dimension, unit: str) -> float | None:
    if dim.name == "temperature":
        return None  # handled by the caller (offsets)
    if dim.name == "capacitance" and unit in _MF_AMBIGUOUS:
        raise _Ambiguous(((-6, "the old MF marking for microfarads", "µF"), (-3, "millifarads", "mF")))
    for spelling, factor in dim.extra:
        if unit == spelling:
            return factor
    if dim.use_prefixes:
        for base in dim.prefixed:
            if unit.endswith(base):
                prefix = unit[: -len(base)].strip()
                if prefix == "M" and dim.name in _CAPS_MEGA:
                    # "350 MA" is mega by the book and caps-lock milli in practice
                    raise _Ambiguous(((-3, "milli", "m" + base), (6, "mega", "M" + base)))
                if prefix in PREFIXES:
                    return 10.0 ** PREFIXES[prefix]
        # "470k" style: a bare multiplier with the symbol left out (resistance only; "100n"
        # or "10u" are capacitor codes and are never read as ohms)
        if dim.name == "resistance" and unit in ("k", "K", "M", "G"):
            return 10.0 ** PREFIXES[unit]
    # the same spellings in any case, where that gives one reading
    low = unit.lower()
    if dim.name == "capacitance":
        if low in _MFD:
            return 1e-6
    folded = {f for s, f in dim.extra if s.lower() == low}
    if len(folded) == 1:
        return folded.pop()
    if dim.use_prefixes:
        for base in sorted(dim.prefixed, key=len, reverse=True):
            if base == "E":
                continue  # a lowercase "e" after a number is an exponent cut short, not ohms
            if low.endswith(base.lower()):
                prefix = unit[: len(unit) - len(base)].strip()
                prefix = _FOLD.get(prefix, prefix)
                if prefix == "M" and dim.name != "resistance":
                    # the symbol's case is off ("350 MA", "2 MM"), so its M may be caps-lock milli
                    raise _Ambiguous(((-3, "milli", "m" + base), (6, "mega", "M" + base)))
                if prefix in PREFIXES:
                    return 10.0 ** PREFIXES[prefix]
    return None


# IEC 60062 letter-and-digit codes: the letter stands for the decimal point and
# gives the multiplier ("4k7" = 4.7 kΩ, "R47" = 0.47 Ω, "2u2" = 2.2 µF, "1n5" = 1.5 nF).
_CODE = re.compile(r"^(\d*)([A-Za-zµμ])(\d*)$|^(\d*\.\d+|\d+\.)([A-Za-zµμ])$")
_CODE_LETTERS: dict[str, dict[str, int]] = {
    "resistance": {"R": 0, "r": 0, "E": 0, "k": 3, "K": 3, "M": 6, "G": 9},
    "capacitance": {"p": -12, "P": -12, "n": -9, "N": -9, "u": -6, "U": -6, "µ": -6, "μ": -6, "m": -3},
}
#: Letters used when writing a code, by exponent.
_CODE_WRITE: dict[str, dict[int, str]] = {
    "resistance": {0: "R", 3: "k", 6: "M", 9: "G"},
    "capacitance": {-12: "p", -9: "n", -6: "u", -3: "m"},
}


def _code(dim: Dimension, text: str) -> float | None:
    """The SI value of an IEC 60062 code such as "4k7", "470R", "R47" or "2u2"
    (an optional trailing symbol is allowed: "4k7Ω", "2u2F"), or None."""
    letters = _CODE_LETTERS.get(dim.name)
    if letters is None:
        return None
    t = text
    for tail in ("Ω", "Ω", "F"):
        if t.endswith(tail) and len(t) > 2:
            t = t[: -len(tail)]
            break
    m = _CODE.match(t)
    if not m:
        return None
    if m.group(4):  # "2.2u", "0.1u": a decimal number and a trailing multiplier letter
        letter, number = m.group(5), m.group(4)
        if letter not in letters or letter in "Ee":
            return None
        return _scale(number, letters[letter])
    if not m.group(1) and not m.group(3):
        return None
    letter = m.group(2)
    if letter not in letters or (letter in "Ee" and m.group(1) and m.group(3)):
        return None  # "4e7" is read as a power of ten, never as 4.7 Ω
    number = (m.group(1) or "0") + "." + (m.group(3) or "0")
    return _scale(number, letters[letter])


def format_code(x: float, dim_name: str) -> str:
    """Write a positive resistance or capacitance as an IEC 60062 code ("4k7",
    "R47", "2u2"), with every digit needed to read it back exactly."""
    if dim_name not in _CODE_WRITE or not (math.isfinite(x) and x > 0):
        raise ValueError(f"no IEC 60062 code for {x!r} as {dim_name}")
    table = _CODE_WRITE[dim_name]
    exp = int(math.floor(math.log10(x) / 3) * 3)
    exp = max(min(table), min(max(table), exp))
    mant = _mantissa(x, exp, None)
    letter = table[exp]
    if "." in mant:
        whole, frac = mant.split(".")
        return ("" if whole == "0" else whole) + letter + frac
    return mant + letter


def _scale(number: str, exponent: int) -> float:
    # float of a decimal string is correctly rounded, so scaling in decimal
    # keeps parse(format(x)) == x exact.
    try:
        return float(Decimal(number).scaleb(exponent))
    except ArithmeticError:
        return math.inf


_LEAD = re.compile(r"^[+-]?[\d.,]+")


def _separators(text: str, value: object, field: str, dim: Dimension) -> str:
    """Settle commas in the number: a decimal comma where it is the only
    reading ("2,2 µF", "0,500 mm²"), grouping where it is the only reading
    ("1,500,000"); refused, with both readings, where it could be either."""
    m = _LEAD.match(text)
    if not m or "," not in m.group(0):
        return text
    chunk = m.group(0)
    rest = text[len(chunk) :]
    sign = chunk[0] if chunk[0] in "+-" else ""
    digits = chunk[len(sign) :]
    if "." in digits:
        raise InputError(field, value, f"{dim.expected}, with one decimal mark and no grouping marks")
    groups = digits.split(",")
    if len(groups) > 2:
        if 1 <= len(groups[0]) <= 3 and groups[0] and all(len(g) == 3 and g.isdigit() for g in groups[1:]):
            return sign + "".join(groups) + rest
        raise InputError(field, value, f"{dim.expected}, without group separators")
    whole, frac = groups
    if not frac or not frac.isdigit():
        raise InputError(field, value, dim.expected)
    if len(frac) == 3 and whole and whole.strip("0") and len(whole) <= 3:
        decimal_text = sign + whole + "." + (frac.rstrip("0") or "0") + rest
        grouped_text = sign + whole + frac + rest
        readings = []
        for t in (decimal_text, grouped_text):
            try:
                readings.append(format_value(parse(t, dim.name, field), dim.name, None))
            except InputError:
                readings.append(t.strip())
        raise InputError(
            field,
            value,
            f"a number that reads one way: '{text.strip()}' is {readings[0]} with a decimal comma "
            f"or {readings[1]} with a thousands comma; write '{decimal_text.strip()}' or '{grouped_text.strip()}'",
        )
    return sign + (whole or "0") + "." + frac + rest


def _checked(x: float, value: object, field: str, dim: Dimension) -> float:
    lo, hi = MAGNITUDE
    if not math.isfinite(x) or abs(x) > hi or (x != 0 and abs(x) < lo):
        what = "°C" if dim.name == "temperature" else (dim.symbol or "")
        raise InputError(
            field,
            value,
            f"a finite {dim.name.replace('_', ' ')} of size between {lo:g} and {hi:g} {what}".rstrip(),
        )
    return x


def parse(value: object, dim_name: str, field: str) -> float:
    """Turn a user's value into an SI float.

    Numbers (int or float) are taken as SI already. Strings must carry a unit of
    the right dimension, except ratios and counts, which may be plain numbers.
    Resistances and capacitances also take IEC 60062 codes ("4k7", "2u2").
    """
    dim = dimension(dim_name)
    expected = dim.expected
    if isinstance(value, bool):
        raise InputError(field, value, expected)
    if isinstance(value, (int, float)):
        try:
            x = float(value)
        except OverflowError:
            x = math.inf
        return _checked(x, value, field, dim)
    if not isinstance(value, str):
        raise InputError(field, value, expected)
    if len(value) > MAX_TEXT:
        raise InputError(field, value[:20] + "…", f"{expected}, in at most {MAX_TEXT} characters")
    text = value.strip().replace("\u2212", "-")
    if not text:
        raise InputError(field, value, f"{expected} (the value is blank)")
    text = _separators(text, value, field, dim)
    if dim.name == "area":
        n = awg_number(text)
        if n is not None:
            if not -3 <= n <= 56:
                raise InputError(field, value, "a gauge from 4/0 AWG to 56 AWG")
            return awg_area(n)
    coded = _code(dim, text)
    if coded is not None:
        return _checked(coded, value, field, dim)
    m = _NUMBER.match(text)
    if not m:
        raise InputError(field, value, expected)
    number, unit = m.group(1), m.group(2).strip()
    if dim.name == "temperature":
        lowu = unit.lower()
        if unit in ("°C", "degC", "C", "℃", "c", "°c") or lowu == "degc":
            return _checked(float(number), value, field, dim)
        if unit in ("°F", "degF", "F", "℉", "f", "°f") or lowu == "degf":
            return _checked((float(number) - 32.0) * 5.0 / 9.0, value, field, dim)
        if unit == "K":
            return _checked(float(number) - 273.15, value, field, dim)
        if unit == "":
            raise InputError(field, value, f"{expected} (the unit is missing)")
        raise InputError(field, value, expected)
    if unit == "":
        if dim.plain_ok:
            x = _checked(float(number), value, field, dim)
            if dim.name == "count" and x != int(x):
                raise InputError(field, value, "a whole number such as '4'")
            return x
        raise InputError(field, value, f"{expected} (the unit is missing)")
    if dim.name == "ratio" and unit == "%":
        return _checked(_scale(number, -2), value, field, dim)
    try:
        factor = _unit_factor(dim, unit)
    except _Ambiguous as amb:
        shown = " or ".join(f"{number} {sym} ({what})" for _, what, sym in amb.readings)
        writes = " or ".join(f"'{number} {sym}'" for _, _, sym in amb.readings)
        raise InputError(field, value, f"a unit with one reading: '{unit}' could be {shown}; write {writes}") from None
    if factor is None:
        raise InputError(field, value, expected)
    if factor != 1.0 and math.log10(factor) == int(math.log10(factor)) and 10.0 ** int(math.log10(factor)) == factor:
        return _checked(_scale(number, int(math.log10(factor))), value, field, dim)
    return _checked(float(number) * factor, value, field, dim)


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
        return f"{_mantissa(x, 0, digits)} {dim.symbol}".rstrip()
    if x == 0:
        return f"0 {dim.symbol}"
    exp = int(math.floor(math.log10(abs(x)) / 3) * 3)
    # no prefix that reads two ways: farads stop at F ("MF" is the old microfarad
    # marking), volts, amps, watts and joules at k ("MA" may be caps-lock milli)
    top = 0 if dim.name == "capacitance" else 3 if dim.name in _CAPS_MEGA else 9
    exp = max(-12, min(top, exp))
    # a rounded mantissa can reach 1000: move up a prefix
    mant = _mantissa(x, exp, digits)
    if digits is not None and abs(float(mant)) >= 1000 and exp < top:
        exp += 3
        mant = _mantissa(x, exp, digits)
    if dim.name == "tempco":
        return f"{mant} {FORMAT_PREFIX[exp]}V/K"
    return f"{mant} {FORMAT_PREFIX[exp]}{dim.symbol}"
