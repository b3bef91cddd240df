"""IEC 60063 preferred values (E6, E12, E24), from the standard's table.

The lists are the table itself, not 10^(k/n) rounded: the formula gives wrong
values (2.6 instead of 2.7, 4.2 instead of 4.3 and so on).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from ..errors import InputError

SERIES: dict[str, tuple[float, ...]] = {
    "E6": (1.0, 1.5, 2.2, 3.3, 4.7, 6.8),
    "E12": (1.0, 1.2, 1.5, 1.8, 2.2, 2.7, 3.3, 3.9, 4.7, 5.6, 6.8, 8.2),
    "E24": (
        1.0,
        1.1,
        1.2,
        1.3,
        1.5,
        1.6,
        1.8,
        2.0,
        2.2,
        2.4,
        2.7,
        3.0,
        3.3,
        3.6,
        3.9,
        4.3,
        4.7,
        5.1,
        5.6,
        6.2,
        6.8,
        7.5,
        8.2,
        9.1,
    ),
}

#: Tolerance usually paired with each series.
TOLERANCE = {"E6": 0.20, "E12": 0.10, "E24": 0.05}


@dataclass(frozen=True)
class Preferred:
    value: float
    nearest: float
    up: float
    down: float
    series: str


def _check(series: str, value: float) -> tuple[float, ...]:
    if series not in SERIES:
        raise InputError("series", series, "one of " + ", ".join(SERIES))
    if not (math.isfinite(value) and value > 0):
        raise InputError("value", value, "a positive finite number")
    return SERIES[series]


def _candidates(table: tuple[float, ...], value: float) -> list[float]:
    decade = math.floor(math.log10(value))
    out: list[float] = []
    for d in (decade - 1, decade, decade + 1):
        scale = 10.0**d
        # round to 12 significant digits so 4.7e-6 reads back as 4.7e-6
        out.extend(float(f"{m * scale:.12g}") for m in table)
    return out


def next_up(value: float, series: str = "E24") -> float:
    """Smallest preferred value not below ``value``."""
    table = _check(series, value)
    return min(c for c in _candidates(table, value) if c >= value * (1 - 1e-12))


def next_down(value: float, series: str = "E24") -> float:
    """Largest preferred value not above ``value``."""
    table = _check(series, value)
    return max(c for c in _candidates(table, value) if c <= value * (1 + 1e-12))


def nearest(value: float, series: str = "E24") -> float:
    """Preferred value nearest on a log scale (the way tolerance bands sit)."""
    up, down = next_up(value, series), next_down(value, series)
    return up if math.log(up / value) < math.log(value / down) else down


def preferred(value: float, series: str = "E24") -> Preferred:
    return Preferred(value, nearest(value, series), next_up(value, series), next_down(value, series), series)
