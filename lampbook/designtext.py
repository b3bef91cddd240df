"""Readable text for design checks (the terminal twin of the build sheet).

The report is a small sheet model (:mod:`lampcalc.present.model`) built from the
check answer, with the build sheet's own operating table, rendered as plain text
by :func:`lampbook.report.sheet_text`.
"""

from __future__ import annotations

from collections.abc import Mapping
from typing import Any

from lampcalc.present.model import BREAK, Block, Caution, Paragraph, Sheet, Span, Table, status, text, words
from lampcalc.present.sheet import operating_table, outcome_status
from lampcalc.quantities.units import format_value

from .report import sheet_text


def check_report(ans: Mapping[str, Any]) -> str:
    title = f"{ans['name']} (revision {ans['revision']}{', ' + ans['date'] if ans['date'] else ''})"
    cv = ans["kind"] == "cv"
    lines = [
        f"Step {format_value(st['capacitance_F'], 'capacitance')}: "
        f"LED current {format_value(st['led_current_avg_A'], 'current')}"
        for st in ans.get("steps", [])
    ]
    if not cv:
        so = ans["switch_on"]
        lines.append(
            f"Switch-on from discharged, closing at {so['phase_deg']:g}°, high mains, through the supply impedance: "
            f"{format_value(so['peak_A'], 'current')} peak, I²t {so['i2t_A2s']:.3g} A²s"
            f" ({format_value(so['resistor_energy_J'], 'energy')} in the series resistor)"
        )
        lines.append(
            "Open load (every string open), high mains: "
            f"bus climbs to {format_value(ans['open_load_bus_V'], 'voltage')}"
            f", time constant {format_value(ans['open_load_time_constant_s'], 'time')}"
        )
    blocks: list[Block] = [operating_table(ans)]
    if lines:
        spans: list[str | Span] = []
        for line in lines:
            spans += [BREAK, line] if spans else [line]
        blocks.append(Paragraph(text(*spans)))
    blocks.append(
        Table(
            ("check", "status", "finding"),
            tuple(
                (words(c["id"]), status(c["status"].upper(), c["status"]), words(c["message"])) for c in ans["checks"]
            ),
        )
    )
    if ans.get("faults"):
        blocks.append(
            Table(
                ("single fault", "outcome", "fuse", "over rating", "leads to"),
                tuple(
                    (
                        words(f["id"]),
                        status(f["outcome"].upper(), outcome_status(f["outcome"])),
                        words(f"clears within {f['fuse_time_s']:.3g} s" if f["fuse_clears"] else "does not clear"),
                        words(", ".join(o["check"] for o in f["over_rating"]) or "-"),
                        words(", ".join(f["leads_to"]) or "-"),
                    )
                    for f in ans["faults"]
                ),
            )
        )
    blocks.append(
        Paragraph(
            text(
                f"{ans['failed']} failed, {ans['warned']} warning{'' if ans['warned'] == 1 else 's'}. "
                "Exit code 1 when any check fails."
            )
        )
    )
    blocks.append(
        Caution(
            "warning" if cv else "danger",
            "CAUTION:" if cv else "CAUTION (mains):",
            tuple(text(c) for c in ans["cautions"]),
        )
    )
    return sheet_text(Sheet(title, tuple(blocks)))
