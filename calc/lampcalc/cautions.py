"""The cautions every mains result carries. Each line says where it rests."""

from __future__ import annotations

MAINS: tuple[str, ...] = (
    "No isolation: every part of a dropper or directly rectified circuit, LED "
    "string included, sits at mains potential. Treat the whole assembly as live.",
    "Probe only through an isolation transformer; never clip a grounded oscilloscope to the bare circuit.",
    "Dropper capacitors must be X-class safety capacitors (X2, or X1 where surges "
    "are harsher) rated for the high end of the mains; an X capacitor fails short, "
    "so a fuse or fusible resistor must follow it (IEC 60384-14 classes).",
    "Stored charge: fit a bleeder so plug pins and terminals fall to a safe level "
    "quickly after unplugging, and check it with a meter before touching.",
    "Limit the switch-on surge with a fusible, pulse-rated series resistor or an NTC; fuse the line conductor.",
    "If a string opens, the smoothing capacitor charges toward the mains peak: clamp it or rate it for that voltage.",
    "Enclose fully: no accessible conductive parts, tool-only covers, strain "
    "relief, creepage and clearance as the luminaire standard requires.",
    "Feed rigs from RCD/GFCI-protected circuits; that does not make an unisolated fixture safe to touch.",
    "Design, build and testing of mains equipment need a competent person; selling "
    "or using fixtures in public may need certification or listing.",
    "Local codes, venue rules and the applicable product standard override anything calculated here.",
)

LOW_VOLTAGE: tuple[str, ...] = (
    "The supply feeding this is mains-powered: use a listed supply, fuse each "
    "output run, and follow the local code and the product standard.",
)

SHORT = "Mains voltage, no isolation, stored charge: see the safety page. Local codes and licensed practice decide."
