"""IEC 61000-3-2 harmonic current limits as data, and the verdict for a class.

Source: IEC 61000-3-2:2018+A1:2020 (edition 5), tables 1 to 4 and clause 5
(classes) and clause 7 (Class C by power), as reproduced in secondary copies
(test-report excerpts and an encyclopaedia): check against the standard before
relying on a verdict. The standard covers equipment up to 16 A per phase on
public 220-240 V supplies; it sets no limits for lower voltages, so on a
120 V supply the comparison is a guide, not a requirement.

Classes (clause 5): A, anything not B, C or D, and since edition 5
professional luminaires for stage lighting and studios; B, portable tools;
C, lighting equipment; D, PCs, monitors and TV receivers up to 600 W.
"""

from __future__ import annotations

import math
from collections.abc import Callable, Sequence
from dataclasses import dataclass

from ..errors import InputError

SOURCE = "IEC 61000-3-2:2018+A1:2020 (edition 5), from secondary copies of the tables"
CLASSES = ("A", "B", "C", "D")
#: nominal supply voltages the standard is written for
VOLTAGE_RANGE = (220.0, 240.0)

#: Class A (table 1): maximum harmonic current in A rms, orders 2 to 13; the rest by formula.
CLASS_A_FIXED: dict[int, float] = {
    2: 1.08,
    3: 2.30,
    4: 0.43,
    5: 1.14,
    6: 0.30,
    7: 0.77,
    9: 0.40,
    11: 0.33,
    13: 0.21,
}
#: Class C above 25 W (table 2): percent of the fundamental; the third is 30 x the circuit power factor.
CLASS_C_PERCENT: dict[int, float] = {2: 2.0, 5: 10.0, 7: 7.0, 9: 5.0}
CLASS_C_THIRD_PER_PF = 30.0
CLASS_C_HIGH_ODD = 3.0  # orders 11 to 39, odd
#: Class D (table 3): mA per watt, orders 3 to 11; 13 to 39 odd: 3.85 / n.
CLASS_D_PER_WATT: dict[int, float] = {3: 3.4, 5: 1.9, 7: 1.0, 9: 0.5, 11: 0.35}
#: Class C 5 W to 25 W, second alternative: percent of the fundamental and the waveform's angles.
CLASS_C_LOW_PERCENT: dict[int, float] = {3: 86.0, 5: 61.0}
CLASS_C_LOW_ANGLES = (60.0, 65.0, 90.0)  # start at or before, last peak at or before, not stopping before
#: the current threshold that marks "flowing" in that alternative: 5 % of the peak (from memory)
CLASS_C_LOW_THRESHOLD = 0.05

#: the rules of each class in one sentence, for sheets and pages
RULES: dict[str, str] = {
    "A": "Class A: absolute limits in amperes whatever the power (professional stage and studio luminaires "
    "since edition 5).",
    "B": "Class B: the Class A limits times 1.5.",
    "C": "Class C (lighting): above 25 W the table of percentages of the fundamental, the 3rd at 30 % times the "
    "power factor; from 5 W to 25 W either the Class D per-watt limits or the 3rd at most 86 % and the 5th at "
    "most 61 % of the fundamental with the current flowing by 60°, its last peak by 65° and not stopping before "
    "90°; at or below 5 W no limits.",
    "D": "Class D: milliamperes per watt, capped by the Class A limits, up to 600 W.",
}

POWER_NO_LIMITS = 5.0  # W: lighting at or below this has no limits (edition 5)
POWER_CLASS_C_TABLE = 25.0  # W: above this, the table of percentages
POWER_CLASS_D_MAX = 600.0  # W: Class D covers equipment up to this


def class_a(order: int) -> float | None:
    """Class A limit in A rms, or None where the table sets none."""
    if order in CLASS_A_FIXED:
        return CLASS_A_FIXED[order]
    if order % 2 and 15 <= order <= 39:
        return 0.15 * 15 / order
    if order % 2 == 0 and 8 <= order <= 40:
        return 0.23 * 8 / order
    return None


def class_b(order: int) -> float | None:
    a = class_a(order)
    return None if a is None else 1.5 * a


def class_c_percent(order: int, power_factor: float) -> float | None:
    """Class C above 25 W, percent of the fundamental."""
    if order == 3:
        return CLASS_C_THIRD_PER_PF * power_factor
    if order in CLASS_C_PERCENT:
        return CLASS_C_PERCENT[order]
    if order % 2 and 11 <= order <= 39:
        return CLASS_C_HIGH_ODD
    return None


def class_d_per_watt(order: int) -> float | None:
    """Class D limit in mA per watt."""
    if order in CLASS_D_PER_WATT:
        return CLASS_D_PER_WATT[order]
    if order % 2 and 13 <= order <= 39:
        return 3.85 / order
    return None


def class_d(order: int, power: float) -> float | None:
    """Class D limit in A rms at an active power: per watt, capped by Class A."""
    per_w = class_d_per_watt(order)
    if per_w is None:
        return None
    cap = class_a(order)
    x = per_w * 1e-3 * power
    return x if cap is None else min(x, cap)


@dataclass(frozen=True)
class Verdict:
    """Limits (A rms, None: no limit) and status per order 1 .. 40."""

    cls: str
    band: str
    limits: tuple[float | None, ...]  # index = order; index 0 unused
    status: tuple[str, ...]  # "pass", "fail" or "no limit"; index 0 unused
    passed: bool
    applies: bool  # False off the 220-240 V supplies the standard is written for
    notes: tuple[str, ...]
    worst_ratio: float = 0.0  # largest current / limit over the orders with a limit (0 when none)
    source: str = SOURCE

    @property
    def failures(self) -> tuple[int, ...]:
        return tuple(n for n, s in enumerate(self.status) if n and s == "fail")


def _per_order(fn: Callable[[int], float | None]) -> list[float | None]:
    """[None, fn(1), ..., fn(40)]."""
    out: list[float | None] = [None]
    out += [fn(n) for n in range(1, 41)]
    return out


def _status(currents: Sequence[float], limits: Sequence[float | None]) -> tuple[tuple[str, ...], float]:
    out = ["no limit"]
    worst = 0.0
    for n in range(1, len(currents)):
        lim = limits[n]
        if lim is None:
            out.append("no limit")
        else:
            out.append("pass" if currents[n] <= lim else "fail")
            worst = max(worst, currents[n] / lim if lim > 0 else math.inf)
    return tuple(out), worst


def verdict(
    cls: str,
    currents: Sequence[float],
    power: float,
    power_factor: float,
    voltage: float,
    angles: tuple[float, float, float] | None = None,
) -> Verdict:
    """Judge a spectrum. ``currents[n]`` is the rms current of order n (index 0
    the mean, unused) up to order 40; ``power`` the active input power (W),
    ``power_factor`` the circuit power factor, ``voltage`` the nominal rms
    supply; ``angles`` the (start, last peak, stop) angles of the current in
    degrees, for Class C between 5 W and 25 W."""
    if cls not in CLASSES:
        raise InputError("emissions.class", cls, "one of the standard's classes: " + ", ".join(CLASSES))
    if len(currents) < 41:
        raise InputError("currents", f"{len(currents) - 1} orders", "orders 1 to 40")
    if not (power >= 0 and math.isfinite(power)):
        raise InputError("power", power, "an active power of 0 W or more")
    i1 = currents[1]
    notes: list[str] = []
    applies = VOLTAGE_RANGE[0] <= voltage <= VOLTAGE_RANGE[1]
    if not applies:
        notes.append(
            f"The standard is written for 220-240 V public supplies and sets no limits at {voltage:.0f} V: "
            "this comparison is a guide, not a requirement. At a lower voltage the same power draws more "
            "current, so its harmonic currents load neutrals and generators more than the amperes suggest."
        )
    orders = range(41)
    limits: list[float | None]
    if cls == "A" or (cls == "D" and power > POWER_CLASS_D_MAX):
        if cls == "D":
            notes.append("Class D covers equipment up to 600 W; above it Class A applies (from memory).")
        limits = _per_order(lambda n: class_a(n))
        band = "Class A, absolute limits"
    elif cls == "B":
        limits = _per_order(lambda n: class_b(n))
        band = "Class B, Class A × 1.5"
    elif cls == "D":
        limits = _per_order(lambda n: class_d(n, power))
        band = "Class D, per watt"
    elif power <= POWER_NO_LIMITS:
        limits = [None for _ in orders]
        band = "Class C ≤ 5 W: no limits"
    elif power > POWER_CLASS_C_TABLE:
        pct = _per_order(lambda n: class_c_percent(n, power_factor))
        limits = [None if p is None else p / 100 * i1 for p in pct]
        band = "Class C over 25 W (% of I₁)"
    else:
        # 5 W < P <= 25 W: either the Class D per-watt limits, or the 3rd and 5th
        # against the fundamental with the waveform's angles
        d_limits = _per_order(lambda n: class_d(n, power))
        d_status, _ = _status(currents, d_limits)
        alt: list[float | None] = [None for _ in orders]
        for n, p in CLASS_C_LOW_PERCENT.items():
            alt[n] = p / 100 * i1
        alt_status, _ = _status(currents, alt)
        shape_ok = False
        if angles is not None and all(math.isfinite(a) for a in angles):
            start, peak, stop = angles
            a0, a1, a2 = CLASS_C_LOW_ANGLES
            shape_ok = start <= a0 and peak <= a1 and stop >= a2
            notes.append(
                f"Current waveform: flows from {start:.0f}°, last peak at {peak:.0f}°, stops at {stop:.0f}° "
                f"(the alternative asks for at or before {a0:.0f}°, at or before {a1:.0f}°, not before {a2:.0f}°; "
                f"'flowing' taken as above {CLASS_C_LOW_THRESHOLD:.0%} of the peak, from memory)."
            )
        d_pass = "fail" not in d_status
        alt_pass = "fail" not in alt_status and shape_ok
        if d_pass or not alt_pass:
            limits = d_limits
            band = "Class C 5-25 W, per watt"
            if not d_pass and not alt_pass:
                notes.append(
                    "Neither alternative for 5-25 W lighting is met: "
                    + (
                        "the 3rd/5th percentages pass but the waveform's angles do not."
                        if "fail" not in alt_status
                        else "the 3rd or 5th is also over its percentage of the fundamental."
                    )
                )
        else:
            limits = alt
            band = "Class C 5-25 W, 3rd/5th+angles"
    status, worst = _status(currents, limits)
    passed = "fail" not in status
    return Verdict(cls, band, tuple(limits), status, passed, applies, tuple(notes), worst)
