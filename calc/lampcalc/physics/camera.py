"""Light ripple seen by a camera: frame-to-frame exposure variation.

The exposure of one frame is the integral of the light over the time the
shutter is open. The light repeats every period T; a frame that opens at phase
t0 gets E(t0) = integral from t0 to t0 + tau of L(t) dt. A camera's clock is
not locked to the mains, so over a take the opening phase drifts through every
value: the worst frame-to-frame change is the whole spread of E over the
phase,

    variation = (max E - min E) / mean E,  mean E = tau x mean L,

which is what is reported ("at the worst phase drift"). A shutter open for a
whole number of ripple periods sees the same light whatever the phase, so the
variation is zero there. How fast the change shows on screen is the beat
between the ripple and the frame rate: the ripple frequency folded to the
nearest multiple of the frame rate.

The light samples are one whole period on a uniform grid, without repeating
the first sample; between samples the light is taken as a straight line, and
E is integrated exactly for that line.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass

from ..errors import InputError

#: Frame rates of cinema and video (trade practice).
FRAME_RATES = (23.976, 24.0, 25.0, 29.97, 30.0, 48.0, 50.0, 59.94, 60.0, 120.0)
#: Shutter angles in common use (degrees; 172.8° is 1/50 s at 24 fps).
ANGLES = (45.0, 90.0, 144.0, 172.8, 180.0, 270.0, 360.0)
#: Shutter times in common use (seconds).
TIMES = tuple(1.0 / x for x in (24, 25, 30, 48, 50, 60, 100, 120, 250, 500, 1000, 2000, 4000))


def shutter_from_angle(angle: float, fps: float) -> float:
    """Open time (s) of a rotary-equivalent shutter: (angle / 360°) / frame rate."""
    if not 0 < angle <= 360:
        raise InputError("shutter_angle", angle, "an angle above 0° and up to 360°")
    _check_fps(fps)
    return angle / 360.0 / fps


def _check_fps(fps: float) -> None:
    if not (0 < fps <= 10000 and math.isfinite(fps)):
        raise InputError("frame_rate", fps, "a frame rate above 0 and up to 10000 frames per second")


def beat_frequency(ripple: float, fps: float) -> float:
    """Frequency (Hz) at which the exposure change repeats on screen: the ripple
    folded about the nearest multiple of the frame rate."""
    _check_fps(fps)
    k = round(ripple / fps)
    return abs(ripple - k * fps)


class Exposure:
    """Exposure of a window of any length at any phase, from one period of light samples."""

    def __init__(self, light: Sequence[float], period: float) -> None:
        n = len(light)
        if n < 4:
            raise InputError("light", f"{n} samples", "at least 4 samples over one period")
        if not (period > 0 and math.isfinite(period)):
            raise InputError("period", period, "a period above 0 s")
        if not all(math.isfinite(x) and x >= 0 for x in light):
            raise InputError("light", "a negative or non-finite sample", "light samples of 0 or more")
        self.x = list(light)
        self.n = n
        self.period = period
        self.h = period / n
        cum = [0.0]
        for k in range(n):
            cum.append(cum[-1] + self.h * (self.x[k] + self.x[(k + 1) % n]) / 2)
        self.cum = cum
        self.total = cum[-1]
        self.mean = self.total / period

    def integral_to(self, t: float) -> float:
        """Integral of the light from 0 to t (any t >= 0), exact for the straight-line interpolant."""
        whole, rest = divmod(t, self.period)
        u = rest / self.h
        k = min(int(u), self.n - 1)
        s = u - k
        x0, x1 = self.x[k], self.x[(k + 1) % self.n]
        return whole * self.total + self.cum[k] + self.h * (x0 * s + (x1 - x0) * s * s / 2)

    def window(self, start: float, tau: float) -> float:
        return self.integral_to(start + tau) - self.integral_to(start)

    def variation(self, tau: float, phases: int | None = None) -> tuple[float, float, float]:
        """(variation, lowest exposure / mean, highest exposure / mean) over
        opening phases on the sample grid (or ``phases`` equal steps)."""
        if not (tau > 0 and math.isfinite(tau)):
            raise InputError("shutter_time", tau, "a shutter time above 0 s")
        if self.mean <= 0:
            return (0.0, 1.0, 1.0)
        m = phases or self.n
        ref = tau * self.mean
        vals = [self.window(self.period * j / m, tau) / ref for j in range(m)]
        lo, hi = min(vals), max(vals)
        spread = hi - lo
        # below 1e-12 of the mean is rounding in the sums: a whole number of periods gives exactly zero
        return (spread if spread > 1e-12 else 0.0, lo, hi)


@dataclass(frozen=True)
class Setting:
    label: str
    shutter_time: float
    variation: float
    ok: bool


def settings(exp: Exposure, fps: float, threshold: float, phases: int | None = None) -> tuple[Setting, ...]:
    """The common shutter angles and times that fit the frame rate, with their
    variation and whether it stays at or under ``threshold``."""
    _check_fps(fps)
    out: list[Setting] = []
    for a in ANGLES:
        tau = shutter_from_angle(a, fps)
        v = exp.variation(tau, phases)[0]
        out.append(Setting(f"{a:g}°", tau, v, v <= threshold))
    for tau in TIMES:
        if tau <= 1.0 / fps * (1 + 1e-9):
            v = exp.variation(tau, phases)[0]
            out.append(Setting(f"1/{1 / tau:.0f} s", tau, v, v <= threshold))
    return tuple(out)


def safe_ranges(
    exp: Exposure, fps: float, threshold: float, points: int = 96, phases: int | None = 64
) -> tuple[tuple[float, float], ...]:
    """Ranges of shutter time from 1/8000 s to one frame (log grid of
    ``points``) where the variation stays at or under ``threshold``. The ends
    are grid points, so a range is as fine as the grid; the exact multiples of
    the ripple period are listed separately by :func:`ripple_multiples`."""
    _check_fps(fps)
    lo, hi = 1.0 / 8000, 1.0 / fps
    if hi <= lo:
        return ()
    grid = [lo * (hi / lo) ** (k / (points - 1)) for k in range(points)]
    ok = [exp.variation(t, phases)[0] <= threshold for t in grid]
    ranges: list[tuple[float, float]] = []
    start: float | None = None
    prev = lo
    for t, good in zip(grid, ok):
        if good and start is None:
            start = t
        if not good and start is not None:
            ranges.append((start, prev))
            start = None
        prev = t
    if start is not None:
        ranges.append((start, grid[-1]))
    return tuple(ranges)


def ripple_multiples(ripple: float, fps: float) -> tuple[float, ...]:
    """Shutter times that are whole ripple periods and fit in one frame."""
    _check_fps(fps)
    if not ripple > 0:
        return ()
    period = 1.0 / ripple
    n = math.floor((1.0 / fps) / period * (1 + 1e-9))
    return tuple(k * period for k in range(1, n + 1))


def sweep(exp: Exposure, fps: float, points: int = 48, phases: int | None = 64) -> tuple[tuple[float, float], ...]:
    """(shutter time, variation) on a log grid from 1/8000 s to one frame, for plotting."""
    _check_fps(fps)
    lo, hi = 1.0 / 8000, 1.0 / fps
    grid = [lo * (hi / lo) ** (k / (points - 1)) for k in range(points)] if hi > lo else [hi]
    return tuple((t, exp.variation(t, phases)[0]) for t in grid)
