"""Conductor sizes, resistance at temperature, drop over a run, ampacity
guidance.

AWG sizes follow the ASTM B258 definition; metric sizes are the IEC 60228
nominal cross-sections. Resistance is computed for annealed copper at 100 %
IACS (58.0 MS/m at 20 °C, alpha = 0.00393 /K referred to 20 °C). Ampacity is
guidance from a named table only: the insulation, bundling, ambient and the
local code decide.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from ..errors import InputError
from ..quantities.units import awg_area, awg_diameter

#: IACS resistivity of annealed copper at 20 °C, ohm metre (1/58 ohm mm²/m).
RHO_20 = 1.0 / 58.0e6
#: Temperature coefficient of copper resistance referred to 20 °C, per kelvin.
ALPHA_20 = 0.00393

#: IEC 60228 nominal cross-sections (mm²) with the maximum DC resistance at
#: 20 °C (ohm/km) for class 5 plain copper, class 5 tinned copper and class 1/2
#: plain copper (IEC 60228:2004 Tables 1, 2 and 3).
IEC60228: dict[float, tuple[float, float, float]] = {
    0.5: (39.0, 40.1, 36.0),
    0.75: (26.0, 26.7, 24.5),
    1.0: (19.5, 20.0, 18.1),
    1.5: (13.3, 13.7, 12.1),
    2.5: (7.98, 8.21, 7.41),
    4.0: (4.95, 5.09, 4.61),
    6.0: (3.30, 3.39, 3.08),
}


@dataclass(frozen=True)
class AmpacityTable:
    key: str
    title: str
    source: str
    status: str
    system: str  # "awg" or "metric"
    ratings: dict[str, float]  # size name -> amperes


AMPACITY: dict[str, AmpacityTable] = {
    t.key: t
    for t in (
        AmpacityTable(
            "us-cord",
            "Flexible cord, two current-carrying conductors, 30 °C ambient",
            "NEC Table 400.5(A)(1), column B (10 AWG from memory)",
            "published",
            "awg",
            {"18 AWG": 10.0, "17 AWG": 12.0, "16 AWG": 13.0, "14 AWG": 18.0, "12 AWG": 25.0, "10 AWG": 30.0},
        ),
        AmpacityTable(
            "us-fixture",
            "Fixture wire (minimum size 18 AWG)",
            "NEC Table 402.5 (secondary copy; some values from memory)",
            "secondary copy",
            "awg",
            {"18 AWG": 6.0, "16 AWG": 8.0, "14 AWG": 17.0, "12 AWG": 23.0, "10 AWG": 28.0},
        ),
        AmpacityTable(
            "us-building-75C",
            "Building wire, copper, 75 °C column, up to three conductors, 30 °C ambient",
            "NEC Table 310.16",
            "published",
            "awg",
            {"14 AWG": 20.0, "12 AWG": 25.0, "10 AWG": 35.0, "8 AWG": 50.0},
        ),
        AmpacityTable(
            "iec-cord",
            "Supply cord: the rated current each cross-section may carry",
            "IEC 60335-1 Table 11 (from memory; 0.5 mm² only for cords up to 2 m)",
            "from memory",
            "metric",
            {
                "0.5 mm²": 3.0,
                "0.75 mm²": 6.0,
                "1 mm²": 10.0,
                "1.5 mm²": 16.0,
                "2.5 mm²": 25.0,
                "4 mm²": 32.0,
                "6 mm²": 40.0,
            },
        ),
    )
}

WIRE_CAUTION = (
    "Ampacity here is guidance from the named table only; insulation rating, "
    "bundling, ambient temperature, the product standard and the local code decide."
)


@dataclass(frozen=True)
class WireSize:
    name: str
    system: str  # "awg" or "metric" or "other"
    area: float  # m²
    diameter: float  # m, of a solid round conductor of that area
    awg: int | None = None

    @property
    def circular_mils(self) -> float:
        return (self.diameter / 0.0254 * 1000) ** 2


def awg_name(n: int) -> str:
    return f"{1 - n}/0 AWG" if n <= 0 else f"{n} AWG"


def awg_size(n: int) -> WireSize:
    if not -3 <= n <= 56:
        raise InputError("gauge", n, "a gauge from 4/0 (-3) to 56")
    return WireSize(awg_name(n), "awg", awg_area(n), awg_diameter(n), n)


def metric_name(mm2: float) -> str:
    return f"{mm2:g} mm²"


def metric_size(mm2: float) -> WireSize:
    area = mm2 * 1e-6
    return WireSize(metric_name(mm2), "metric", area, math.sqrt(4 * area / math.pi))


AWG_SIZES = tuple(awg_size(n) for n in range(56, -4, -1))  # thin to thick
METRIC_SIZES = tuple(metric_size(a) for a in IEC60228)


def size_from_area(area: float, field: str = "size") -> WireSize:
    """The standard size an area stands for (an AWG gauge or an IEC 60228
    size, matched within 0.1 %), else a plain size of that area."""
    if not (math.isfinite(area) and area > 0):
        raise InputError(field, area, "a positive conductor area such as '1.5 mm²' or '18 AWG'")
    for s in AWG_SIZES + METRIC_SIZES:
        if abs(s.area / area - 1) < 1e-3:
            return s
    return WireSize(f"{area * 1e6:.4g} mm²", "other", area, math.sqrt(4 * area / math.pi))


def resistance_ratio(temperature: float) -> float:
    """R_T / R_20 for copper, linear in alpha referred to 20 °C."""
    return 1 + ALPHA_20 * (temperature - 20.0)


def resistance_per_metre(area: float, temperature: float = 20.0) -> float:
    """Ohm per metre of one conductor of IACS copper."""
    return RHO_20 / area * resistance_ratio(temperature)


def iec60228_max(size: WireSize, conductor_class: str = "5") -> float | None:
    """IEC 60228 maximum resistance at 20 °C in ohm per metre, if tabulated."""
    if size.system != "metric":
        return None
    row = IEC60228.get(round(size.area * 1e6, 4))
    if row is None:
        return None
    col = {"5": 0, "5-tinned": 1, "1/2": 2}.get(conductor_class)
    if col is None:
        raise InputError("class", conductor_class, "one of 5, 5-tinned, 1/2")
    return row[col] / 1000.0


def ampacity(size: WireSize, table: str) -> float | None:
    try:
        t = AMPACITY[table]
    except KeyError:
        raise InputError("ampacity_table", table, "one of " + ", ".join(AMPACITY)) from None
    return t.ratings.get(size.name)


def default_table(size: WireSize) -> str:
    return "us-cord" if size.system == "awg" else "iec-cord"


@dataclass(frozen=True)
class Run:
    size: WireSize
    length: float  # one way, m
    current: float
    temperature: float
    resistance_per_m: float
    loop_resistance: float
    drop: float
    drop_fraction: float | None
    loss: float


def run(size: WireSize, length: float, current: float, temperature: float = 20.0, supply: float | None = None) -> Run:
    """A two-wire run out and back: drop = I x 2L x R'(T)."""
    r1 = resistance_per_metre(size.area, temperature)
    loop = 2 * length * r1
    drop = current * loop
    return Run(
        size,
        length,
        current,
        temperature,
        r1,
        loop,
        drop,
        drop / supply if supply else None,
        current**2 * loop,
    )


def smallest_size(
    current: float,
    length: float,
    supply: float,
    drop_limit: float,
    temperature: float,
    system: str,
    table: str | None,
) -> tuple[WireSize | None, str]:
    """Thinnest standard size whose drop stays within ``drop_limit`` (a
    fraction of ``supply``) and, where ``table`` rates it, whose guidance
    current covers ``current``. Returns the size (or None) and why."""
    sizes = AWG_SIZES if system == "awg" else METRIC_SIZES
    for s in sizes:
        r = run(s, length, current, temperature, supply)
        if r.drop_fraction is not None and r.drop_fraction > drop_limit:
            continue
        if table is not None:
            a = ampacity(s, table)
            if a is None or a < current:
                continue
        return s, "meets the drop limit" + (f" and the {table} table" if table else "")
    return None, "no listed size meets both the drop limit and the table"
