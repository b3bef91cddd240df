"""Readable text for design checks."""

from __future__ import annotations

from collections.abc import Mapping
from typing import Any

from lampcalc.units import format_value

from .report import bullets, table

ROWS = (
    ("Mains", "mains_voltage_V", "voltage"),
    ("LED current, average", "led_current_avg_A", "current"),
    ("LED current, peak", "led_current_max_A", "current"),
    ("String current, average", "string_current_avg_A", "current"),
    ("Bus voltage, average", "bus_voltage_avg_V", "voltage"),
    ("Bus ripple (p-p)", "ripple_pp_V", "voltage"),
    ("Percent flicker", "percent_flicker", "count"),
    ("Flicker index", "flicker_index", "count"),
    ("IEEE 1789 band", "ieee1789_band", "text"),
    ("Dropper current (rms)", "dropper_current_rms_A", "current"),
    ("Dropper voltage, peak", "dropper_voltage_peak_V", "voltage"),
    ("Smoothing ripple current (rms)", "smoothing_ripple_current_rms_A", "current"),
    ("Diode current, peak", "diode_current_peak_A", "current"),
    ("Input power", "input_power_W", "power"),
    ("Apparent power", "apparent_power_VA", "power"),
    ("Power factor", "power_factor", "count"),
    ("LED power", "led_power_W", "power"),
)


def _fmt(v: Any, dim: str) -> str:
    if isinstance(v, str):
        return v
    if dim == "count":
        return f"{v:.3g}"
    if dim == "power" and v is not None:
        return format_value(v, "power").replace("W", "W")
    return format_value(v, dim)


def operating_table(ans: Mapping[str, Any]) -> list[list[str]]:
    return [[label] + [_fmt(ans[c][key], dim) for c in ("low", "nominal", "high")] for label, key, dim in ROWS]


def check_report(ans: Mapping[str, Any]) -> str:
    title = f"{ans['name']} (revision {ans['revision']}{', ' + ans['date'] if ans['date'] else ''})"
    parts = [title, "=" * len(title), table(["", "low mains", "nominal", "high mains"], operating_table(ans)), ""]
    parts.append(f"Switch-on peak at the crest, high mains: {format_value(ans['switch_on_peak_A'], 'current')}"
                 f" ({format_value(ans['switch_on_energy_J'], 'energy')} in the series resistor)")  # fmt: skip
    parts.append(f"Open load (every string open), high mains: bus climbs to {format_value(ans['open_load_bus_V'], 'voltage')}"
                 f", time constant {format_value(ans['open_load_time_constant_s'], 'time')}")  # fmt: skip
    if "checks" in ans:
        parts += ["", table(["check", "status", "finding"], [[c["id"], c["status"].upper(), c["message"]] for c in ans["checks"]])]
    parts += ["", bullets("CAUTION (mains):", ans["cautions"])]
    return "\n".join(parts)
