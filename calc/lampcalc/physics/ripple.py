"""Smoothing-capacitor ripple, closed forms.

Full wave: dV = I / (2 f C) peak to peak (half wave: I / (f C)), assuming the
capacitor alone carries the load for the whole ripple period; it overstates
the ripple when the conduction angle is large. The LED current ripple follows
through the strings' resistance: dI = dV / (n Rd + R_ballast) per string.
"""

from __future__ import annotations

import math


def ripple_pp(current: float, frequency: float, capacitance: float, full_wave: bool = True) -> float:
    return current / ((2 if full_wave else 1) * frequency * capacitance)


def capacitance_for_ripple(current: float, frequency: float, ripple: float, full_wave: bool = True) -> float:
    return current / ((2 if full_wave else 1) * frequency * ripple)


def sawtooth_rms(pp: float) -> float:
    """rms of a linear ramp of ``pp`` peak to peak about its mean."""
    return pp / (2 * math.sqrt(3))


def current_ripple(voltage_ripple: float, string_resistance: float, parallel: int = 1) -> float:
    if string_resistance <= 0:
        return math.inf
    return voltage_ripple / string_resistance * parallel


def percent_flicker_from_ripple(mean_current: float, ripple: float) -> float:
    """Percent flicker of a light proportional to a current of this mean and
    peak-to-peak ripple; the current bottoms at zero when the ripple is large."""
    if mean_current <= 0:
        return 0.0
    if not math.isfinite(ripple) or ripple >= 2 * mean_current:
        return 100.0
    hi = mean_current + ripple / 2
    lo = max(mean_current - ripple / 2, 0.0)
    return 100.0 * (hi - lo) / (hi + lo)
