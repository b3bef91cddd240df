"""Capacitive dropper, closed forms.

The average current uses charge balance: with ideal diodes, a load held at a
constant voltage and no series resistance, the dropper capacitor's voltage
swings by 2 (Vpk - Vload) each half cycle, so the average current through the
full bridge is I_avg = 4 f C (Vpk - Vbus - 2 Vd). The naive V / Xc is the rms
current into a short circuit and overstates the LED current. The steady-state
solver gives the exact answer with the real load, diodes and smoothing.
"""

from __future__ import annotations

import math

SQRT2 = math.sqrt(2.0)


def reactance(capacitance: float, frequency: float) -> float:
    return 1.0 / (2 * math.pi * frequency * capacitance)


def naive_current(voltage: float, frequency: float, capacitance: float) -> float:
    """rms current into a short circuit, V / Xc."""
    return voltage / reactance(capacitance, frequency)


def average_current(voltage: float, frequency: float, capacitance: float, bus: float, diode_drop: float) -> float:
    """Charge-balance average current into a bus held at ``bus`` volts through
    a full bridge whose diodes drop ``diode_drop`` each (0 when the bus is above
    the crest)."""
    head = SQRT2 * voltage - bus - 2 * diode_drop
    return 4 * frequency * capacitance * max(head, 0.0)


def capacitance_for(current: float, voltage: float, frequency: float, bus: float, diode_drop: float) -> float:
    head = SQRT2 * voltage - bus - 2 * diode_drop
    if head <= 0:
        return math.inf
    return current / (4 * frequency * head)


def conduction_start(voltage: float, bus: float, diode_drop: float) -> float:
    """Phase (rad, from the zero crossing) where the bridge starts to conduct
    each half cycle; conduction lasts until the crest (pi/2)."""
    vpk = SQRT2 * voltage
    load = bus + 2 * diode_drop
    return math.asin(max(-1.0, min(1.0, (2 * load - vpk) / vpk)))


def capacitor_rms_current(voltage: float, frequency: float, capacitance: float, bus: float, diode_drop: float) -> float:
    """rms current through the dropper capacitor under the same assumptions:
    it carries C dv/dt of the mains from the start of conduction to the crest
    and nothing between."""
    vpk = SQRT2 * voltage
    if vpk <= bus + 2 * diode_drop:
        return 0.0
    th = conduction_start(voltage, bus, diode_drop)
    w = 2 * math.pi * frequency
    mean_sq = ((math.pi / 2 - th) / 2 - math.sin(2 * th) / 4) / math.pi
    return capacitance * w * vpk * math.sqrt(max(mean_sq, 0.0))


def capacitor_peak_voltage(voltage: float, bus: float, diode_drop: float) -> float:
    """Crest voltage across the dropper capacitor (it swings +/- this)."""
    return max(SQRT2 * voltage - bus - 2 * diode_drop, 0.0)


#: Limiting element voltage of a small film resistor when the design names none (from memory: typical of
#: 0.25-0.6 W film parts; a datasheet's figure replaces it); a bleeder across more than this is split into parts
SMALL_RESISTOR_LIMITING_V = 200.0


def bleeder_max(capacitance: float, time: float, start: float, limit: float) -> float:
    """Largest bleeder that discharges ``capacitance`` from ``start`` volts to
    ``limit`` volts within ``time`` seconds: R <= t / (C ln(V0 / Vlim))."""
    if start <= limit:
        return math.inf
    return time / (capacitance * math.log(start / limit))


def discharge_time(capacitance: float, resistance: float, start: float, limit: float) -> float:
    if start <= limit:
        return 0.0
    return resistance * capacitance * math.log(start / limit)


def switch_on_peak(peak_voltage: float, resistance: float) -> float:
    """Worst-case switch-on current at the crest into discharged capacitors."""
    return math.inf if resistance <= 0 else peak_voltage / resistance


def pulse_energy(capacitance: float, peak_voltage: float) -> float:
    """Energy a series resistor takes while charging ``capacitance`` from zero
    by a step of ``peak_voltage``: as much as ends up stored, C V^2 / 2."""
    return 0.5 * capacitance * peak_voltage**2
