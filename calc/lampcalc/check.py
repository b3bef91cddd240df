"""Solve a design at nominal supply and at both ends of its tolerance, and
run the design review's checks."""

from __future__ import annotations

from typing import Any

from . import cautions
from .design import Design
from .review import Context, prepare, run_checks
from .steady import SteadyState, solve


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


def _cv_point(d: Design, supply: float, corner: float, temperature: float) -> dict[str, Any]:
    mod = d.module
    arr = d.values["array"]
    s, p, rb = int(arr["series"]), int(arr["parallel"]), float(arr["ballast"])
    knee = s * mod.v0_at(temperature, corner)
    r = s * mod.r_dynamic + rb
    i = max(supply - knee, 0.0) / r if r > 0 else 0.0
    led = p * i * (knee + s * mod.r_dynamic * i)
    return {
        "supply_voltage_V": supply, "string_current_avg_A": i, "led_current_avg_A": p * i, "led_power_W": led,
        "ballast_power_W": i * i * rb, "input_power_W": supply * p * i, "efficiency": led / (supply * p * i) if i > 0 else 0.0,
        "headroom": (supply - knee - s * mod.r_dynamic * i) / supply,
    }  # fmt: skip


def check(design: Design, waveforms: bool = False) -> dict[str, Any]:
    vn, vlo, vhi = design.mains_band()
    out: dict[str, Any] = {"name": design.name, "revision": design.revision, "date": design.date,
                           "description": design.description, "kind": "cv" if design.is_cv else "mains"}  # fmt: skip
    if design.is_cv:
        t = float(design.values["module"]["temperature"])
        for label, v in (("nominal", vn), ("low", vlo), ("high", vhi)):
            out[label] = _cv_point(design, v, 0, t)
        ctx = Context(design)
        hot = _cv_point(design, vhi, -1, ctx.t_hot)
        cold = _cv_point(design, vlo, +1, ctx.t_cold)
        ctx.cv_currents = {"max": hot["string_current_avg_A"], "min": cold["string_current_avg_A"],
                           "total_max": hot["led_current_avg_A"], "headroom": out["nominal"]["headroom"]}  # fmt: skip
        out["worst_high"], out["worst_low"] = hot, cold
        out["cautions"] = list(cautions.LOW_VOLTAGE)
    else:
        states = {}
        for label, v in (("nominal", vn), ("low", vlo), ("high", vhi)):
            st = solve(design.circuit(mains_voltage=v))
            states[label] = st
            out[label] = operating_point(st)
            out[label]["mains_voltage_V"] = v
        ctx = prepare(design, states["nominal"], states["low"], states["high"])
        assert ctx.worst_high is not None
        out["worst_high"] = operating_point(ctx.worst_high)
        # worst case: high mains with the dropper at the top of its tolerance (and its highest step)
        out["switch_on_peak_A"] = ctx.switch_on_peak
        out["switch_on_energy_J"] = ctx.switch_on_energy
        out["open_load_bus_V"] = ctx.open_load_bus
        out["open_load_time_constant_s"] = ctx.open_load_tau
        steps = design.get("dropper", "steps")
        if steps:
            out["steps"] = [
                {"capacitance_F": c, "led_current_avg_A": solve(design.circuit(dropper_scale=c / float(design.get("dropper", "capacitance")))).led_current.avg}
                for c in steps
            ]  # fmt: skip
        out["cautions"] = list(cautions.MAINS)
        if waveforms:
            out["waveform"] = {k: list(v) for k, v in states["nominal"].waveform.items()}
    out["checks"] = [c.as_dict() for c in run_checks(ctx)]
    out["failed"] = sum(1 for c in out["checks"] if c["status"] == "fail")
    out["warned"] = sum(1 for c in out["checks"] if c["status"] == "warn")
    return out
