"""Solve a design at nominal mains and at both ends of its tolerance."""

from __future__ import annotations

from typing import Any

from . import cautions
from .design import Design
from .steady import SteadyState, open_load, solve, switch_on


def operating_point(st: SteadyState) -> dict[str, Any]:
    return {
        "led_current_avg_A": st.led_current.avg,
        "led_current_rms_A": st.led_current.rms,
        "led_current_min_A": st.led_current.min,
        "led_current_max_A": st.led_current.max,
        "string_current_avg_A": max(s.avg for s in st.string_current),
        "string_current_max_A": max(s.max for s in st.string_current),
        "string_currents_avg_A": [s.avg for s in st.string_current],
        "bus_voltage_avg_V": st.bus_voltage.avg,
        "bus_voltage_max_V": st.bus_voltage.max,
        "ripple_pp_V": st.ripple_pp,
        "percent_flicker": st.percent_flicker,
        "flicker_index": st.flicker_index,
        "flicker_frequency_Hz": st.flicker_frequency,
        "ieee1789_band": st.flicker_band,
        "ieee1789_low_risk_limit": st.low_risk_limit,
        "ieee1789_no_effect_limit": st.no_effect_limit,
        "dropper_current_rms_A": st.dropper_current_rms,
        "dropper_voltage_peak_V": st.dropper_voltage_peak,
        "smoothing_ripple_current_rms_A": st.smoothing_ripple_current_rms,
        "diode_current_avg_A": st.diode_current_avg,
        "diode_current_rms_A": st.diode_current_rms,
        "diode_current_peak_A": st.diode_current_peak,
        "line_current_rms_A": st.line_current_rms,
        "input_power_W": st.input_power,
        "apparent_power_VA": st.apparent_power,
        "power_factor": st.power_factor,
        "led_power_W": st.led_power,
        "losses_W": dict(sorted(st.losses.items())),
        "solver": {"newton_iterations": st.iterations, "steps": st.steps},
    }


def check(design: Design, waveforms: bool = False) -> dict[str, Any]:
    vn, vlo, vhi = design.mains_band()
    out: dict[str, Any] = {"name": design.name, "revision": design.revision, "date": design.date}
    states = {}
    for label, v in (("nominal", vn), ("low", vlo), ("high", vhi)):
        st = solve(design.circuit(mains_voltage=v))
        states[label] = st
        out[label] = operating_point(st)
        out[label]["mains_voltage_V"] = v
    hi = design.circuit(mains_voltage=vhi)
    peak, energy = switch_on(hi)
    ol_v, ol_tau = open_load(hi)
    out["switch_on_peak_A"] = peak
    out["switch_on_energy_J"] = energy
    out["open_load_bus_V"] = ol_v
    out["open_load_time_constant_s"] = ol_tau
    out["cautions"] = list(cautions.MAINS)
    if waveforms:
        out["waveform"] = {k: list(v) for k, v in states["nominal"].waveform.items()}
    return out
