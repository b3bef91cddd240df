"""The cautions every mains result carries. Each line says where it rests.

Also how a limit not yet read against its published standard is shown to a
reader: once, as a dagger on the citation and one note, not "(from memory)"
in every line (:func:`citation`, :data:`UNVERIFIED_NOTE`).
"""

from __future__ import annotations

import re

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


#: The one explanation of the dagger, shown once wherever a † appears.
UNVERIFIED_NOTE = (
    "† A limit or value marked so was recalled, not yet read against its published source: "
    "check it there before relying on it; local codes and licensed practice decide."
)

_UNVERIFIED = re.compile(r"\s*\(([^()]*\bfrom memory\b[^()]*)\)|[,;]?\s*\bfrom memory\b", re.I)


def citation(source: str) -> tuple[str, bool]:
    """A source as a reader's citation, and whether its limit is still unverified against the published text
    (the caller marks it with a dagger and shows :data:`UNVERIFIED_NOTE` once)."""
    unverified = bool(_UNVERIFIED.search(source))

    def keep(m: re.Match[str]) -> str:
        parts = re.split(r"[;:]", m.group(1) or "")
        rest = [x.strip() for x in parts if x.strip() and "memory" not in x and "check against" not in x]
        return f" ({'; '.join(rest)})" if rest else ""

    return _UNVERIFIED.sub(keep, source).strip(" ,;"), unverified


def daggered(text: str) -> tuple[str, bool]:
    """``text`` with its "from memory" remarks replaced by a dagger after the sentence they sat in."""
    clean, unverified = citation(text)
    if not unverified:
        return text, False
    tail = clean[-1:] if clean[-1:] in ".!?" else ""
    return (clean[: len(clean) - len(tail)] + "†" + tail), True
