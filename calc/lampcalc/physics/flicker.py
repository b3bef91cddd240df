"""Flicker metrics of a light waveform and the IEEE 1789 risk bands.

Percent flicker and flicker index follow the IES definitions (percent flicker
= 100 (A - B)/(A + B); flicker index = area above the mean over the total area,
over whole periods). The samples given must span whole periods, equally spaced,
without repeating the first sample at the end.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass

from ..errors import InputError


def percent_flicker(samples: Sequence[float]) -> float:
    if not samples:
        raise InputError("samples", "[]", "at least one sample")
    a, b = max(samples), min(samples)
    if a + b <= 0:
        return 0.0
    return 100.0 * (a - b) / (a + b)


def flicker_index(samples: Sequence[float]) -> float:
    """Area above the mean over total area, for equally spaced samples over
    whole periods (rectangle rule, exact for periodic trapezoid sampling)."""
    if not samples:
        raise InputError("samples", "[]", "at least one sample")
    total = sum(samples)
    if total <= 0:
        return 0.0
    mean = total / len(samples)
    above = sum(s - mean for s in samples if s > mean)
    return above / total


@dataclass(frozen=True)
class Band:
    name: str  # "no observable effect", "low risk" or "above low risk"
    low_risk_limit: float  # percent flicker
    no_effect_limit: float  # percent flicker
    source: str = "IEEE 1789-2015 cl. 8.1.1 (limits from memory: check against the standard)"


def ieee1789_limits(frequency: float) -> tuple[float, float]:
    """(low-risk limit, no-observable-effect limit) in percent flicker at a
    flicker frequency; infinity where the recommendation sets no limit."""
    if frequency <= 0:
        raise InputError("frequency", frequency, "a positive flicker frequency")
    low = 0.025 * frequency if frequency < 90 else (0.08 * frequency if frequency <= 1250 else float("inf"))
    noe = 0.01 * frequency if frequency < 90 else (0.0333 * frequency if frequency <= 3000 else float("inf"))
    return low, noe


def ieee1789_band(percent: float, frequency: float) -> Band:
    low, noe = ieee1789_limits(frequency)
    if percent < noe:
        name = "no observable effect"
    elif percent < low:
        name = "low risk"
    else:
        name = "above low risk"
    return Band(name, low, noe)
