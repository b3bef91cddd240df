"""Reference tables generated from the core, for the handbook's pages.

Each table returns a title, column headers, rows of display strings and its
sources, so the page never holds a hand-typed number.
"""

from __future__ import annotations

import math
from collections.abc import Callable
from dataclasses import dataclass

from ..physics import dropper, wire
from ..physics.flicker import ieee1789_limits
from ..quantities.eseries import SERIES, TOLERANCE
from ..quantities.regions import PRESETS
from ..quantities.units import format_value as fv


@dataclass(frozen=True)
class Table:
    title: str
    headers: tuple[str, ...]
    rows: tuple[tuple[str, ...], ...]
    sources: tuple[str, ...]


def awg(temperature: float = 75.0) -> Table:
    rows = []
    for n in range(-3, 31):
        s = wire.awg_size(n)
        r20 = wire.resistance_per_metre(s.area, 20.0)
        rt = wire.resistance_per_metre(s.area, temperature)
        rows.append(
            (
                s.name,
                f"{s.diameter * 1e3:.4f}",
                f"{s.area * 1e6:.4g}",
                f"{s.circular_mils:.0f}",
                f"{r20 * 1e3:.4g}",
                f"{rt * 1e3:.4g}",
                f"{r20 * 304.8:.4g}",
            )
        )
    return Table(
        f"American Wire Gauge, solid annealed copper (resistance at 20 °C and {temperature:g} °C)",
        (
            "size",
            "diameter (mm)",
            "area (mm²)",
            "area (cmil)",
            "Ω/km at 20 °C",
            f"Ω/km at {temperature:g} °C",
            "Ω/1000 ft at 20 °C",
        ),
        tuple(rows),
        (
            "Diameter: ASTM B258, d = 0.005 in × 92^((36 − n)/39).",
            "Resistance: 100 % IACS copper, 1/58 Ω·mm²/m at 20 °C; α = 0.00393 /K referred to 20 °C.",
        ),
    )


def metric(temperature: float = 70.0) -> Table:
    rows = []
    for a, (c5, c5t, c12) in wire.IEC60228.items():
        s = wire.metric_size(a)
        r20 = wire.resistance_per_metre(s.area, 20.0)
        rows.append(
            (
                s.name,
                f"{s.diameter * 1e3:.3f}",
                f"{r20 * 1e3:.4g}",
                f"{wire.resistance_per_metre(s.area, temperature) * 1e3:.4g}",
                f"{c5:g}",
                f"{c5t:g}",
                f"{c12:g}",
            )
        )
    return Table(
        "Metric conductors, IEC 60228 sizes "
        f"(nominal IACS copper and the standard's maxima; {temperature:g} °C column nominal)",
        (
            "size",
            "solid diameter (mm)",
            "Ω/km at 20 °C (IACS)",
            f"Ω/km at {temperature:g} °C (IACS)",
            "IEC 60228 class 5 max",
            "class 5 tinned max",
            "class 1/2 max",
        ),
        tuple(rows),
        (
            "IEC 60228:2004 Tables 1-3: maximum resistance at 20 °C "
            "(a conforming conductor measures at or below them).",
            "Nominal values: 100 % IACS copper, 1/58 Ω·mm²/m at 20 °C.",
        ),
    )


def ampacity() -> Table:
    rows = []
    for t in wire.AMPACITY.values():
        for size, amps in t.ratings.items():
            rows.append((t.key, size, fv(amps, "current"), t.title))
    return Table(
        "Ampacity guidance (never a substitute for the local code)",
        ("table", "size", "current", "conditions"),
        tuple(rows),
        (*(f"{t.key}: {t.source}." for t in wire.AMPACITY.values()), wire.WIRE_CAUTION),
    )


def reactance() -> Table:
    rows = []
    for k, p in PRESETS.items():
        half_crest_bus = 0.5 * math.sqrt(2) * p.voltage
        rows.append(
            (
                p.label,
                f"{dropper.reactance(1e-6, p.frequency):.1f}",
                f"{dropper.naive_current(p.voltage, p.frequency, 1e-6) * 1e3:.2f}",
                f"{dropper.average_current(p.voltage, p.frequency, 1e-6, 0.0, 0.0) * 1e3:.2f}",
                f"{dropper.average_current(p.voltage, p.frequency, 1e-6, half_crest_bus, 0.0) * 1e3:.2f}",
                k,
            )
        )
    return Table(
        "Reactance and current per microfarad at each mains preset",
        (
            "mains",
            "Xc of 1 µF (Ω)",
            "rms mA/µF into a short",
            "average mA/µF, bus at 0 V",
            "average mA/µF, bus at half the peak",
            "preset",
        ),
        tuple(rows),
        (
            "Xc = 1/(2πfC); rms current V/Xc.",
            "Average current by charge balance, I = 4fC(Vpk − Vbus), ideal diodes and a steady bus.",
        ),
    )


def eseries() -> Table:
    rows = tuple(
        (name, f"±{TOLERANCE[name]:.0%}", "  ".join(f"{v:.1f}" for v in vals)) for name, vals in SERIES.items()
    )
    return Table(
        "Preferred values, IEC 60063",
        ("series", "usual tolerance", "values per decade"),
        rows,
        ("IEC 60063 (from the table: rounding 10^(k/n) gives wrong values such as 4.2 for 4.3).",),
    )


def mains() -> Table:
    rows = tuple(
        (p.label, fv(p.low, "voltage"), fv(p.high, "voltage"), fv(p.peak_high, "voltage"), p.source, p.status)
        for p in PRESETS.values()
    )
    return Table(
        "Mains tolerance bands by region",
        ("nominal", "low", "high", "peak at high", "band from", "status"),
        rows,
        (
            "Check the supply code where the fixture will be used; "
            "venue and generator supplies can sit outside these bands.",
        ),
    )


def flicker() -> Table:
    rows = []
    for f, what in (
        (50.0, "half-wave on 50 Hz / line frequency"),
        (60.0, "half-wave on 60 Hz"),
        (100.0, "full-wave on 50 Hz"),
        (120.0, "full-wave on 60 Hz"),
        (1000.0, "1 kHz PWM"),
    ):
        lo, ne = ieee1789_limits(f)
        rows.append((f"{f:g} Hz", what, f"{lo:.2f} %", f"{ne:.2f} %"))
    return Table(
        "Flicker risk bands (percent flicker)",
        ("flicker frequency", "typical source", "low-risk limit", "no-observable-effect limit"),
        tuple(rows),
        (
            "IEEE 1789-2015 cl. 8.1.1: below 90 Hz 0.025·f and 0.01·f; 90-1250 Hz 0.08·f; 90-3000 Hz 0.0333·f "
            "(limits from memory: check against the standard).",
            "California Title 24 JA8/JA10 'reduced flicker operation': "
            "percent flicker below 30 % for frequencies under 200 Hz.",
            "Percent flicker = 100 (max − min)/(max + min); flicker index = area above the mean / total area (IES).",
        ),
    )


def discharge() -> Table:
    limits = (
        (
            "IEC 60335-1 cl. 22.5 (appliances)",
            "plug pins ≤ 34 V, 1 s after unplugging at the crest; ≤ 0.1 µF exempt",
            "published",
        ),
        (
            "IEC 60950-1 cl. 2.1.1.7 (legacy IT)",
            "time constant ≤ 1 s (pluggable type A), ≤ 10 s (type B)",
            "published",
        ),
        (
            "IEC 62368-1 cl. 5.5.2.2",
            "plug pins measured 2 s after; within ES1 for ordinary persons",
            "secondary copy",
        ),
        ("IEC 60204-1 cl. 6.2.4 (machinery)", "≤ 60 V within 5 s; exposed plug pins within 1 s", "published"),
        (
            "IEC 60598-1 cl. 8.2.7 (luminaires)",
            "> 0.5 µF: ≤ 50 V 1 min after; portable plug-in: ≤ 34 V after 1 s",
            "from memory",
        ),
    )
    rows = [(a, b, c, "", "") for a, b, c in limits]
    for p in PRESETS.values():
        r = dropper.bleeder_max(1e-6, 1.0, p.peak_high, 34.0)
        rows.append(
            (
                f"bleeder for 1 µF, {p.label}",
                f"from the crest at high mains ({fv(p.peak_high, 'voltage')}) to 34 V in 1 s",
                "arithmetic",
                fv(r, "resistance"),
                fv(p.high**2 / r, "power"),
            )
        )
    return Table(
        "Discharge after unplugging: limits and the largest bleeder per microfarad",
        ("rule", "limit", "status", "largest bleeder (1 µF)", "its dissipation"),
        tuple(rows),
        ("R ≤ t / (C ln(V0/Vlim)); scale inversely with capacitance.",),
    )


def checks() -> Table:
    """The checks reference, generated from the rule catalogue."""
    from ..fixture.rules import RULES

    return Table(
        "Design review checks",
        ("id", "what it checks", "protects against", "source"),
        tuple((r.id, r.title, r.protects, r.source) for r in RULES.values()),
        (
            "Each stress is judged at the corner of the tolerance box that makes it worst; each check's numbers, "
            "its corner and the value that would pass appear on every build sheet.",
        ),
    )


TABLES: dict[str, Callable[[], Table]] = {
    "awg": awg,
    "metric": metric,
    "ampacity": ampacity,
    "reactance": reactance,
    "eseries": eseries,
    "mains": mains,
    "flicker": flicker,
    "discharge": discharge,
    "checks": checks,
}
