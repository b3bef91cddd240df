"""Run the steady-state circuit in ngspice (Debian's package, batch mode) as an
outside reference. The netlist is written here from the same Circuit; the
diode and LED models are matched to the core's:

- an exponential bridge diode is ngspice's own D model (IS, N, RS);
- a straight-line diode (drop + resistance) and each LED string (knee +
  resistance) are a near-ideal diode (N = 0.02, about 12 mV at working current,
  1 mΩ inside) in series with a DC source and the rest of the resistance.

Known pitfalls handled: bridge nodes get 10 pF junction capacitance and 1 GΩ
to ground so nothing floats; a run whose step control gives up is retried with a
looser relative tolerance, then from ngspice's own operating point; the maximum step is fixed; success is judged from
the data written, not the exit code; the capacitors start at the closed-form
estimate and only the last two periods are kept; averages and rms values are
integrated from the saved points resampled onto a uniform grid.
"""

from __future__ import annotations

import math
import os
import shutil
import subprocess
import tempfile
import time
from dataclasses import dataclass

import numpy as np
from lampcalc.circuit.steady import Circuit, initial_state

NGSPICE = shutil.which("ngspice")
#: Series resistance inside each near-ideal diode (taken off the resistor beside it, so the totals match):
#: without it ngspice's step control fails on the sharp turn-on of high-current designs.
RS = 1e-3


@dataclass
class SpiceResult:
    led_current_avg: float
    led_current_rms: float
    bus_voltage_avg: float
    ripple_pp: float
    percent_flicker: float
    line_current_rms: float
    dropper_current_rms: float
    smoothing_ripple_current_rms: float
    input_power: float
    power_factor: float
    seconds: float
    periods: int
    attempts: int = 1
    #: the last whole period of the line current on 20 000 equally spaced points from a rising zero of the mains
    line_current_period: np.ndarray | None = None


def netlist(c: Circuit, periods: int, points_per_period: int = 4000) -> str:
    T = 1 / c.frequency
    vpk = math.sqrt(2) * c.mains_voltage
    vcd0, vcs0 = initial_state(c)
    lines = ["* lampbook reference circuit", f"V1 in 0 SIN(0 {vpk:.9g} {c.frequency:.9g})", "Vline in a 0"]
    rs = max(c.series_resistance, 1e-4)
    lines.append(f"Rs a b {rs:.9g}")
    if c.dropper:
        lines.append(f"Cd b n {c.dropper:.9g} IC={vcd0:.9g}")
        lines.append(f"Rbd b n {c.dropper_bleeder or 1e12:.9g}")
    else:
        lines.append("Vnd b n 0")
    b = c.bridge
    if b.kind == "exponential":
        vt_model = (
            f".model DB D(IS={b.saturation_current:.6g} N={b.emission_coefficient:.6g} "
            f"RS={max(b.resistance, 1e-6):.6g} CJO=10p)"
        )
        lines += ["D1 n p DB", "D2 0 p DB", "D3 m n DB", "D4 m 0 DB", vt_model]
    else:
        # each diode: ideal-ish junction + drop source + resistance
        for k, (an, ca) in enumerate((("n", "p"), ("0", "p"), ("m", "n"), ("m", "0")), start=1):
            lines += [
                f"D{k} {an} j{k} DI",
                f"Vd{k} j{k} k{k} {b.drop:.9g}",
                f"Rd{k} k{k} {ca} {max(b.resistance - RS, 1e-6):.9g}",
            ]
        lines.append(f".model DI D(IS=1e-12 N=0.02 RS={RS} CJO=10p)")
    lines += ["Rgp p 0 1e9", "Rgm m 0 1e9", "Rgn n 0 1e9"]
    lines.append(f"Cs p x {c.smoothing:.9g} IC={vcs0:.9g}")
    lines.append("Vcs x y 0")
    lines.append(f"Resr y m {max(c.esr, 1e-6):.9g}")
    if c.bleeder:
        lines.append(f"Rb p m {c.bleeder:.9g}")
    led = []
    for k, s in enumerate(c.strings):
        lines += [
            f"DL{k} p l{k} DL{k}",
            f"VL{k} l{k} q{k} {s.knee:.9g}",
            f"RL{k} q{k} r{k} {max(s.resistance / s.count - RS, 1e-6):.9g}",
            f"VI{k} r{k} m 0",
            f".model DL{k} D(IS={1e-12 * s.count:.3g} N=0.02 RS={RS} CJO=10p)",
        ]
        led.append(f"i(VI{k})")
    tstop = periods * T
    tstart = (periods - 2) * T
    tmax = T / points_per_period
    vecs = " ".join(["v(p,m)", "i(Vline)", "v(in)", "i(Vcs)", *led])
    lines += [
        (
            ".options reltol=1e-4 abstol=1e-9 vntol=1e-6 chgtol=1e-16 method=gear itl4=100 "
            f"temp={b.temperature:.6g} tnom={b.temperature:.6g}"
        ),
        ".control",
        "set wr_singlescale",
        "set wr_vecnames",
        f"tran {tmax:.6g} {tstop:.9g} {tstart:.9g} {tmax:.6g} uic",
        f"wrdata out.txt {vecs}",
        "quit",
        ".endc",
        ".end",
    ]
    return "\n".join(lines) + "\n"


def run(c: Circuit, periods: int = 60, points_per_period: int = 4000) -> SpiceResult:
    if NGSPICE is None:
        raise RuntimeError("ngspice is not installed (the Makefile installs Debian's package)")
    T = 1 / c.frequency
    with tempfile.TemporaryDirectory() as d:
        path = os.path.join(d, "c.cir")
        t0 = time.perf_counter()
        out = os.path.join(d, "out.txt")
        text = netlist(c, periods, points_per_period)
        # ngspice's step control can give up on the sharp turn-on of stiff, high-current designs: retry with
        # a looser relative tolerance (the step stays bounded by T/points), then from its own t = 0 operating point
        tries = [
            text,
            text.replace("reltol=1e-4", "reltol=1e-3"),
            netlist(c, 3 * periods, points_per_period).replace(" uic", ""),
        ]
        n_try = 0
        for attempt in tries:
            n_try += 1
            with open(path, "w") as fh:
                fh.write(attempt)
            proc = subprocess.run([NGSPICE, "-b", path], cwd=d, capture_output=True, text=True, timeout=600)
            if os.path.exists(out) and os.path.getsize(out) > 0:
                break
            if "Timestep too small" not in proc.stdout + proc.stderr:
                break
        if "uic" not in attempt:
            periods *= 3
        seconds = time.perf_counter() - t0
        if not os.path.exists(out) or os.path.getsize(out) == 0:
            raise RuntimeError("ngspice wrote no data:\n" + proc.stdout[-2000:] + proc.stderr[-2000:])
        data = np.loadtxt(out, skiprows=1)
    t = data[:, 0]
    cols = data[:, 1:]
    grid = np.linspace(t[-1] - 2 * T, t[-1], 40000, endpoint=False)

    def res(k: int) -> np.ndarray:
        return np.interp(grid, t, cols[:, k])

    vbus, iline, vin, ics = res(0), res(1), res(2), res(3)
    led = sum((res(4 + k) for k in range(len(c.strings))), np.zeros_like(grid))
    p_in = float(np.mean(vin * iline))
    i_rms = float(np.sqrt(np.mean(iline**2)))
    return SpiceResult(
        led_current_avg=float(np.mean(led)),
        led_current_rms=float(np.sqrt(np.mean(led**2))),
        bus_voltage_avg=float(np.mean(vbus)),
        ripple_pp=float(vbus.max() - vbus.min()),
        percent_flicker=float(100 * (led.max() - led.min()) / (led.max() + led.min())) if led.max() > 0 else 0.0,
        line_current_rms=i_rms,
        dropper_current_rms=i_rms,
        smoothing_ripple_current_rms=float(np.sqrt(np.mean((ics - ics.mean()) ** 2))),
        input_power=p_in,
        power_factor=p_in / (c.mains_voltage * i_rms) if i_rms > 0 else 0.0,
        seconds=seconds,
        periods=periods,
        attempts=n_try,
        line_current_period=iline[len(grid) // 2 :],
    )


# --- switch-on and faults -----------------------------------------------------------------------


@dataclass
class SurgeResult:
    peak: float
    i2t: float
    seconds: float


def switch_on_netlist(c: Circuit, r_src: float, l_src: float, phase_deg: float, step: float) -> str:
    """The same circuit from the discharged state, closing at ``phase_deg`` of
    the mains (0 at the positive-going zero crossing), the source impedance in
    series, for one half period. Diodes and strings as in :func:`netlist`."""
    half = 0.5 / c.frequency
    vpk = math.sqrt(2) * c.mains_voltage
    text = netlist(c, 2)
    lines = [ln for ln in text.splitlines() if not ln.startswith(("V1 ", "Vline ", ".control", "tran ", "wrdata "))]
    lines = [ln for ln in lines if ln not in ("set wr_singlescale", "set wr_vecnames", "quit", ".endc", ".end")]
    # every capacitor discharged
    lines = [ln.split(" IC=")[0] + " IC=0" if ln.startswith(("Cd ", "Cs ")) else ln for ln in lines]
    lines = [ln.replace("Rs a b", "Rs a2 b") for ln in lines]
    lines += [
        f"V1 in 0 SIN(0 {vpk:.9g} {c.frequency:.9g} 0 0 {phase_deg:.9g})",
        "Vline in a 0",
        f"Rsrc a a1 {max(r_src, 1e-6):.9g}",
        f"Lsrc a1 a2 {l_src:.9g} IC=0",
        ".control",
        "set wr_singlescale",
        "set wr_vecnames",
        f"tran {step:.6g} {half:.9g} 0 {step:.6g} uic",
        "wrdata out.txt i(Vline)",
        "quit",
        ".endc",
        ".end",
    ]
    return "\n".join(lines) + "\n"


def run_switch_on(c: Circuit, r_src: float, l_src: float, phase_deg: float, step: float = 2e-8) -> SurgeResult:
    if NGSPICE is None:
        raise RuntimeError("ngspice is not installed (the Makefile installs Debian's package)")
    with tempfile.TemporaryDirectory() as d:
        path = os.path.join(d, "c.cir")
        out = os.path.join(d, "out.txt")
        t0 = time.perf_counter()
        with open(path, "w") as fh:
            fh.write(switch_on_netlist(c, r_src, l_src, phase_deg, step))
        proc = subprocess.run([NGSPICE, "-b", path], cwd=d, capture_output=True, text=True, timeout=600)
        if not os.path.exists(out) or os.path.getsize(out) == 0:
            raise RuntimeError("ngspice wrote no data:\n" + proc.stdout[-2000:] + proc.stderr[-2000:])
        data = np.loadtxt(out, skiprows=1)
    t, i = data[:, 0], data[:, 1]
    return SurgeResult(float(np.max(np.abs(i))), float(np.trapezoid(i * i, t)), time.perf_counter() - t0)


def run_edited(c: Circuit, edit: dict[str, str], periods: int = 60) -> SpiceResult:
    """:func:`run` on a netlist with whole lines replaced (by their first word):
    a fault the Circuit cannot express, such as a shorted capacitor."""
    original = netlist

    def patched(cc: Circuit, p: int, points_per_period: int = 4000) -> str:
        lines = original(cc, p, points_per_period).splitlines()
        return "\n".join(edit.get(ln.split(" ")[0], ln) for ln in lines) + "\n"

    globals()["netlist"] = patched
    try:
        return run(c, periods=periods)
    finally:
        globals()["netlist"] = original
