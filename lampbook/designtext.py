"""Readable text for design checks (the terminal twin of the build sheet)."""

from __future__ import annotations

from collections.abc import Mapping
from typing import Any

from lampcalc.present.sheet import CV_ROWS, OPERATING_ROWS, cell
from lampcalc.quantities.units import format_value

from .report import bullets, table


def check_report(ans: Mapping[str, Any]) -> str:
    title = f"{ans['name']} (revision {ans['revision']}{', ' + ans['date'] if ans['date'] else ''})"
    cv = ans["kind"] == "cv"
    rows = CV_ROWS if cv else OPERATING_ROWS
    label = "supply" if cv else "mains"
    parts = [title, "=" * len(title)]
    parts.append(
        table(
            ["", f"low {label}", "nominal", f"high {label}"],
            [[lab] + [cell(ans[c].get(key), kd) for c in ("low", "nominal", "high")] for lab, key, kd in rows],
        )
    )
    parts.append("")
    for st in ans.get("steps", []):
        parts.append(
            f"Step {format_value(st['capacitance_F'], 'capacitance')}: "
            f"LED current {format_value(st['led_current_avg_A'], 'current')}"
        )
    if not cv:
        so = ans["switch_on"]
        parts.append(
            f"Switch-on from discharged, closing at {so['phase_deg']:g}°, high mains, through the supply impedance: "
            f"{format_value(so['peak_A'], 'current')} peak, I²t {so['i2t_A2s']:.3g} A²s"
            f" ({format_value(so['resistor_energy_J'], 'energy')} in the series resistor)"
        )
        parts.append(
            "Open load (every string open), high mains: "
            f"bus climbs to {format_value(ans['open_load_bus_V'], 'voltage')}"
            f", time constant {format_value(ans['open_load_time_constant_s'], 'time')}"
        )
    parts += [
        "",
        table(
            ["check", "status", "finding"],
            [[c["id"], c["status"].upper(), c["message"]] for c in ans["checks"]],
        ),
    ]
    if ans.get("faults"):
        parts += [
            "",
            table(
                ["single fault", "outcome", "fuse", "over rating", "leads to"],
                [
                    [
                        f["id"],
                        f["outcome"].upper(),
                        f"clears within {f['fuse_time_s']:.3g} s" if f["fuse_clears"] else "does not clear",
                        ", ".join(o["check"] for o in f["over_rating"]) or "-",
                        ", ".join(f["leads_to"]) or "-",
                    ]
                    for f in ans["faults"]
                ],
            ),
        ]
    parts.append(
        f"\n{ans['failed']} failed, {ans['warned']} warning{'' if ans['warned'] == 1 else 's'}. "
        "Exit code 1 when any check fails."
    )
    parts += ["", bullets("CAUTION (mains):" if not cv else "CAUTION:", ans["cautions"])]
    return "\n".join(parts)
