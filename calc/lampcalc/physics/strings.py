"""String planner: how many modules in series and in parallel, and what they
need from a constant-voltage supply, a constant-current driver or a mains
dropper bus."""

from __future__ import annotations

import math
from dataclasses import dataclass

from ..quantities.eseries import next_up
from . import dropper as drop
from .led import LedModule

#: Headroom below which a ballasted string's current swings widely with Vf
#: spread and temperature (common practice: keep 10-25 % across the resistor).
MIN_HEADROOM = 0.10


@dataclass(frozen=True)
class CvOption:
    series: int
    ballast_exact: float
    ballast: float
    current: float
    current_min: float
    current_max: float
    resistor_power: float
    resistor_rating: float
    efficiency: float
    headroom: float


def cv_options(
    module: LedModule,
    supply: float,
    supply_tolerance: float,
    current: float,
    t_cold: float,
    t_hot: float,
    series_e: str,
    derating: float,
) -> list[CvOption]:
    """Every series count a constant-voltage supply can drive at ``current``,
    with the next higher preferred ballast and the worst-case currents
    (highest: high supply, low Vf, hot; lowest: low supply, high Vf, cold)."""
    out: list[CvOption] = []
    n = 1
    s_lo, s_hi = supply * (1 - supply_tolerance), supply * (1 + supply_tolerance)
    while True:
        vf = n * module.voltage(current)
        if vf >= supply:
            break
        exact = (supply - vf) / current
        r = next_up(exact, series_e)
        rd = n * module.r_dynamic
        i_nom = (supply - n * module.v0_at()) / (r + rd)
        i_max = max((s_hi - n * module.v0_at(t_hot, -1)) / (r + rd), 0.0)
        i_min = max((s_lo - n * module.v0_at(t_cold, +1)) / (r + rd), 0.0)
        p = i_max**2 * r
        led = n * module.voltage(i_nom) * i_nom
        out.append(
            CvOption(
                series=n,
                ballast_exact=exact,
                ballast=r,
                current=i_nom,
                current_min=i_min,
                current_max=i_max,
                resistor_power=p,
                resistor_rating=p / derating,
                efficiency=led / (supply * i_nom) if i_nom > 0 else 0.0,
                headroom=(supply - n * module.voltage(i_nom)) / supply,
            )
        )
        n += 1
    return out


def cv_pick(options: list[CvOption]) -> CvOption | None:
    """Most efficient option that still keeps the common-practice headroom."""
    good = [o for o in options if o.headroom >= MIN_HEADROOM]
    return max(good, key=lambda o: o.series) if good else None


@dataclass(frozen=True)
class CcOption:
    series: int
    parallel: int
    string_current: float
    voltage_cold: float
    voltage_hot: float
    fits: bool
    within_rating: bool


def cc_options(
    module: LedModule,
    driver_current: float,
    v_min: float,
    v_max: float,
    t_cold: float,
    t_hot: float,
    series_max: int,
    parallel_max: int,
    modules: int | None,
) -> list[CcOption]:
    """Arrangements S x P whose string voltage stays inside the driver's
    window: the highest (cold, high Vf) below v_max and the lowest (hot, low
    Vf) above v_min."""
    out = []
    for p in range(1, parallel_max + 1):
        i = driver_current / p
        for s in range(1, series_max + 1):
            if modules is not None and s * p != modules:
                continue
            v_cold = s * module.voltage(i, t_cold, +1)
            v_hot = s * module.voltage(i, t_hot, -1)
            fits = v_cold <= v_max and v_hot >= v_min
            if fits:
                out.append(CcOption(s, p, i, v_cold, v_hot, fits, i <= module.current_max))
    return out


@dataclass(frozen=True)
class DropperOption:
    series: int
    bus: float
    fraction: float
    capacitance: float
    current_high_mains: float
    sensitivity: float  # (dI/I)/(dV/V)


def dropper_options(
    module: LedModule, mains: float, frequency: float, tolerance: float, current: float, diode_drop: float
) -> list[DropperOption]:
    """Series counts for a dropper bus: the higher the bus, the smaller the
    capacitor, but the more the current moves with the mains
    (sensitivity Vpk / (Vpk - Vbus - 2 Vd))."""
    vpk = math.sqrt(2) * mains
    out = []
    n = 1
    while True:
        bus = n * module.voltage(current)
        head = vpk - bus - 2 * diode_drop
        if head <= 0:
            break
        c = drop.capacitance_for(current, mains, frequency, bus, diode_drop)
        i_hi = drop.average_current(mains * (1 + tolerance), frequency, c, bus, diode_drop)
        out.append(DropperOption(n, bus, bus / vpk, c, i_hi, vpk / head))
        n += 1
    return out
