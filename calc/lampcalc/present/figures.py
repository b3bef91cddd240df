"""The build sheet's figures: the schematic drawn from the design file and the plots
of its review (waveforms, tolerance histogram, harmonic spectrum, shutter sweep).

Each is a :class:`~lampcalc.present.model.Figure`: SVG elements with their own
colours and a caption. Nothing here depends on the site's theme; a capacitor's gap
is drawn in the class ``gap``, which the renderer paints in the page's background.
"""

from __future__ import annotations

import html
import math
from collections.abc import Callable
from typing import Any

from ..fixture.design import Design
from ..quantities.units import format_value as fv
from .model import Figure


def _e(x: object) -> str:
    """Escaped for SVG text and attributes."""
    return html.escape(str(x), quote=True)


def _res(x: float, y: float, vertical: bool, label: str) -> str:
    if vertical:
        return (
            f'<rect x="{x - 6}" y="{y - 16}" width="12" height="32" class="part"/>'
            f'<text x="{x + 9}" y="{y + 4}" class="lab">{_e(label)}</text>'
        )
    return (
        f'<rect x="{x - 16}" y="{y - 6}" width="32" height="12" class="part"/>'
        f'<text x="{x}" y="{y - 10}" class="lab" text-anchor="middle">{_e(label)}</text>'
    )


def _cap_h(x: float, y: float, label: str) -> str:
    return (
        f'<line x1="{x - 4}" y1="{y - 12}" x2="{x - 4}" y2="{y + 12}" class="plate"/>'
        f'<line x1="{x + 4}" y1="{y - 12}" x2="{x + 4}" y2="{y + 12}" class="plate"/>'
        f'<rect x="{x - 3}" y="{y - 12}" width="6" height="24" class="gap"/>'
        f'<text x="{x}" y="{y + 26}" class="lab" text-anchor="middle">{_e(label)}</text>'
    )


def _cap_v(x: float, y: float, label: str) -> str:
    return (
        f'<line x1="{x - 12}" y1="{y - 4}" x2="{x + 12}" y2="{y - 4}" class="plate"/>'
        f'<path d="M{x - 12} {y + 6} Q{x} {y + 1} {x + 12} {y + 6}" class="plate"/>'
        f'<rect x="{x - 12}" y="{y - 3}" width="24" height="6" class="gap"/>'
        f'<text x="{x + 16}" y="{y + 4}" class="lab">{_e(label)}</text>'
    )


def _led(x: float, y: float) -> str:
    return (
        f'<path d="M{x - 7} {y - 6} L{x + 7} {y - 6} L{x} {y + 6} Z" class="diode"/>'
        f'<line x1="{x - 7}" y1="{y + 6}" x2="{x + 7}" y2="{y + 6}" class="plate"/>'
        f'<path d="M{x + 9} {y - 2} l6 -5 M{x + 11} {y + 3} l6 -5" class="ray"/>'
    )


def schematic(d: Design) -> Figure:
    """The circuit drawn from the design file; a capacitor's gap is painted in the page's background."""
    W, H = 780, 300
    top, bot = 70.0, 250.0
    parts: list[str] = []
    arr = d.values["array"]
    s, p, rb = int(arr["series"]), int(arr["parallel"]), float(arr["ballast"])
    xs = 530.0
    shown = min(p, 3)
    rail_end = (260.0 if d.is_cv else xs) + 90 + (shown - 1) * 48
    if d.is_cv:
        sup = d.values["supply"]
        parts.append(
            f'<rect x="40" y="{top + 20}" width="110" height="{bot - top - 40}" class="part"/>'
            f'<text x="95" y="{(top + bot) / 2}" class="lab" text-anchor="middle">'
            f"{_e(fv(float(sup['voltage']), 'voltage'))} DC</text>"
            f'<text x="95" y="{(top + bot) / 2 + 14}" class="lab" text-anchor="middle">CV supply</text>'
        )
        parts.append(
            f'<path d="M150 {top + 30} H180 V{top} H{rail_end}" class="wire"/>'
            f'<path d="M150 {bot - 30} H180 V{bot} H{rail_end}" class="wire"/>'
        )
        xs = 260.0
    else:
        m = d.values["mains"]
        dr = d.values.get("dropper", {})
        parts.append(
            f'<circle cx="40" cy="{(top + bot) / 2}" r="20" class="part"/>'
            f'<path d="M28 {(top + bot) / 2} q6 -10 12 0 t12 0" class="wire"/>'
            f'<text x="40" y="{(top + bot) / 2 + 36}" class="lab" text-anchor="middle">'
            f"{_e(fv(float(m['voltage']), 'voltage'))}</text>"
            f'<text x="40" y="{(top + bot) / 2 + 50}" class="lab" text-anchor="middle">'
            f"{_e(fv(float(m['frequency']), 'frequency'))}</text>"
        )
        parts.append(
            f'<path d="M40 {(top + bot) / 2 - 20} V{top} H300" class="wire"/>'
            f'<path d="M40 {(top + bot) / 2 + 20} V{bot} H300" class="wire"/>'
        )
        fuse = d.values.get("fuse")
        parts.append(
            f'<rect x="74" y="{top - 5}" width="26" height="10" rx="5" class="part"/>'
            f'<text x="87" y="{top - 10}" class="lab" text-anchor="middle">'
            f"F {_e(fv(fuse['rating'], 'current')) if fuse else 'none'}</text>"
        )
        rs = float(dr.get("series_resistance") or 0.0)
        parts.append(
            _res(140, top, False, fv(rs, "resistance"))
            if rs > 0
            else f'<text x="140" y="{top - 10}" class="lab" text-anchor="middle">no R</text>'
        )
        if dr.get("capacitance"):
            parts.append(f'<rect x="{200 - 4}" y="{top - 14}" width="8" height="28" class="gap"/>')
            parts.append(
                _cap_h(200, top, fv(float(dr["capacitance"]), "capacitance") + f" {dr.get('class') or 'class ?'}")
            )
            if dr.get("bleeder"):
                parts.append(
                    f'<path d="M180 {top} V{top - 34} H220 V{top}" class="wire"/>'
                    + _res(200, top - 34, False, fv(float(dr["bleeder"]), "resistance"))
                )
        # bridge: a diamond of four diodes
        cx, cy = 330.0, (top + bot) / 2
        parts.append(
            f'<path d="M300 {top} H{cx} V{cy - 60}" class="wire"/><path d="M300 {bot} H{cx} V{cy + 60}" class="wire"/>'
        )
        parts.append(f'<path d="M{cx} {cy - 60} L{cx + 60} {cy} L{cx} {cy + 60} L{cx - 60} {cy} Z" class="part"/>')
        for x1, y1, x2, y2 in (
            (cx - 60, cy, cx, cy - 60),
            (cx, cy + 60, cx + 60, cy),
            (cx - 60, cy, cx, cy + 60),
            (cx, cy - 60, cx + 60, cy),
        ):
            mx, my = (x1 + x2) / 2, (y1 + y2) / 2
            ang = math.degrees(math.atan2(y2 - y1, x2 - x1))
            parts.append(
                f'<g transform="translate({mx} {my}) rotate({ang})"><path d="M-6 -6 L6 0 L-6 6 Z" class="diode"/>'
                f'<line x1="6" y1="-6" x2="6" y2="6" class="plate"/></g>'
            )
        parts.append(f'<text x="{cx}" y="{cy + 4}" class="lab" text-anchor="middle">bridge</text>')
        parts.append(
            f'<path d="M{cx + 60} {cy} H{cx + 80} V{top} H{rail_end}" class="wire"/>'
            f'<path d="M{cx - 60} {cy} H{cx - 80} V{bot + 22} H{cx + 100} V{bot} H{rail_end}" class="wire"/>'
        )
        sm = d.values["smoothing"]
        parts.append(
            f'<path d="M430 {top} V{(top + bot) / 2 - 4}" class="wire"/>'
            f'<path d="M430 {(top + bot) / 2 + 6} V{bot}" class="wire"/>'
        )
        parts.append(
            _cap_v(
                430,
                (top + bot) / 2,
                fv(float(sm["capacitance"]), "capacitance")
                + (f" {fv(float(sm['voltage_rating']), 'voltage')}" if sm.get("voltage_rating") else ""),
            )
        )
        if sm.get("bleeder"):
            parts.append(
                f'<path d="M{xs + 10} {top} V{(top + bot) / 2 - 16}" class="wire"/>'
                f'<path d="M{xs + 10} {(top + bot) / 2 + 16} V{bot}" class="wire"/>'
            )
            parts.append(_res(xs + 10, (top + bot) / 2, True, fv(float(sm["bleeder"]), "resistance")))
        parts.append(f'<text x="{cx + 90}" y="{top - 8}" class="lab">+ bus</text>')
    for k in range(shown):
        x = xs + 90 + k * 48
        ys = [top + 30 + j * 30 for j in range(3)]
        parts.append(f'<path d="M{x} {top} V{bot}" class="wire"/>')
        for y in ys[:2]:
            parts.append(_led(x, y))
        parts.append(f'<text x="{x}" y="{ys[2] + 4}" class="lab" text-anchor="middle">⋮</text>')
        if rb > 0:
            parts.append(_res(x, bot - 36, True, fv(rb, "resistance") if k == shown - 1 else ""))
    parts.append(
        f'<text x="{xs + 60}" y="{bot + 20}" class="lab">'
        f"{s} modules per string × {p} string{'s' if p > 1 else ''}</text>"
    )
    return Figure(
        "schematic",
        f"Schematic of {d.name}",
        W,
        H,
        ".wire,.part,.plate,.ray{fill:none;stroke:currentColor;stroke-width:1.6}"
        ".diode{fill:currentColor}.lab{font:12px sans-serif;fill:currentColor}.ray{stroke-width:1}",
        "".join(parts),
        "Schematic drawn from the design file (line conductor on top).",
        paper=("gap",),
    )


def nice_ticks(lo: float, hi: float, n: int = 4) -> list[float]:
    """Round steps (1, 2, 2.5, 5 x 10^k) covering lo..hi."""
    if not hi > lo:
        hi = lo + (abs(lo) or 1.0)
    raw = (hi - lo) / n
    mag = 10 ** math.floor(math.log10(raw))
    step = next(k * mag for k in (1, 2, 2.5, 5, 10) if k * mag >= raw * 0.999)
    first = math.floor(lo / step + 1e-9) * step
    out, k = [], 0
    while True:
        v = round(first + k * step, 12)
        out.append(v)
        if v >= hi - 1e-12 * abs(hi):
            return out
        k += 1


def _axes(
    x0: float, x1: float, y0: float, y1: float, box: tuple[float, float, float, float]
) -> tuple[Callable[[float], float], Callable[[float], float]]:
    left, top, width, height = box

    def fx(x: float) -> float:
        return left + width * (x - x0) / (x1 - x0)

    def fy(y: float) -> float:
        return top + height * (1 - (y - y0) / (y1 - y0))

    return fx, fy


def waveform(w: dict[str, list[float]]) -> Figure | None:
    """LED current and bus voltage over one mains period: two stacked plots with axis titles, units, a
    grid of round ticks; the current axis starts at zero, the voltage axis says where it starts."""
    t = w["t"]
    if not t:
        return None
    T = t[-1] + (t[1] - t[0])
    W, Hp, L, R, gap = 360, 120, 60, 12, 58
    out = []
    xt = [T * k / 4 for k in range(5)]
    for k, (key, title, dim, colour, from_zero) in enumerate(
        (
            ("led_current_A", "LED current", "current", "#c8780a", True),
            ("bus_V", "Bus voltage", "voltage", "#26323a", False),
        )
    ):
        ys = w[key]
        lo, hi = min(ys), max(ys)
        if from_zero or lo <= 0:
            yt = nice_ticks(0.0, hi * 1.05 if hi > 0 else 1.0)
        else:
            pad = (hi - lo) * 0.15 or abs(hi) * 0.05 or 1.0
            yt = nice_ticks(lo - pad, hi + pad)
        y0, y1 = yt[0], yt[-1]
        top = 24 + k * (Hp + gap)
        fx, fy = _axes(0.0, T, y0, y1, (L, top, W - L - R, Hp))
        note = "" if y0 == 0 else f"; axis starts at {fv(y0, dim)}, not zero"
        unit = {"current": "A", "voltage": "V"}[dim]
        pts = " ".join(f"{fx(ti):.1f},{fy(y):.1f}" for ti, y in zip(t, ys))
        out.append(f'<text x="{L}" y="{top - 8}" class="ti">{_e(title)} ({unit}){_e(note)}</text>')
        for y in yt:
            out.append(
                f'<line x1="{L}" y1="{fy(y):.1f}" x2="{W - R}" y2="{fy(y):.1f}" class="gr"/>'
                f'<text x="{L - 4}" y="{fy(y) + 3:.1f}" class="tk" text-anchor="end">{_e(fv(y, dim, 3))}</text>'
            )
        for x in xt:
            out.append(
                f'<line x1="{fx(x):.1f}" y1="{top + Hp}" x2="{fx(x):.1f}" y2="{top + Hp + 4}" class="ax"/>'
                f'<text x="{fx(x):.1f}" y="{top + Hp + 15}" class="tk" '
                f'text-anchor="{"end" if x == xt[-1] else "middle"}">'
                f"{_e(fv(x, 'time', 3) if x else '0')}</text>"
            )
        out.append(
            f'<line x1="{L}" y1="{top + Hp}" x2="{W - R}" y2="{top + Hp}" class="ax"/>'
            f'<line x1="{L}" y1="{top}" x2="{L}" y2="{top + Hp}" class="ax"/>'
            f'<polyline points="{pts}" fill="none" stroke="{colour}" stroke-width="1.8"/>'
        )
    Ht = 24 + 2 * (Hp + gap) - 12
    out.append(f'<text x="{(L + W - R) / 2}" y="{Ht}" class="ti" text-anchor="middle">Time (s)</text>')
    return Figure(
        "plot",
        "LED current and bus voltage over one period",
        W,
        Ht + 6,
        ".ax{stroke:currentColor}.gr{stroke:currentColor;stroke-opacity:.15}"
        ".tk{font:10px sans-serif;fill:currentColor}.ti{font:600 11px sans-serif;fill:currentColor}",
        "".join(out),
        "One mains period at nominal mains, from the steady-state solve.",
    )


def histogram(study: dict[str, Any]) -> Figure:
    h = study["histogram"]
    counts = h["counts"]
    W, Hh, L, B, R, T = 360, 200, 48, 46, 12, 12
    lo, hi = h["low_A"], h["low_A"] + h["bin_A"] * len(counts)
    yt = nice_ticks(0.0, float(max(counts) or 1), 4)
    fx, fy = _axes(lo, hi, 0.0, yt[-1], (L, T, W - L - R, Hh - B - T))
    bw = (W - L - R) / len(counts)
    parts = [
        f'<line x1="{L}" y1="{fy(y):.1f}" x2="{W - R}" y2="{fy(y):.1f}" class="gr"/>'
        f'<text x="{L - 4}" y="{fy(y) + 3:.1f}" class="tk" text-anchor="end">{y:g}</text>'
        for y in yt
    ]
    parts += [
        f'<rect x="{L + k * bw:.1f}" y="{fy(c):.1f}" width="{max(bw - 1, 0.5):.1f}" height="{fy(0) - fy(c):.1f}" '
        'class="bar"/>'
        for k, c in enumerate(counts)
    ]
    xt = [x for x in nice_ticks(lo, hi, 4) if lo - 1e-12 <= x <= hi + 1e-12]
    parts += [
        f'<line x1="{fx(x):.1f}" y1="{Hh - B}" x2="{fx(x):.1f}" y2="{Hh - B + 4}" class="ax"/>'
        f'<text x="{fx(x):.1f}" y="{Hh - B + 15}" class="tk" text-anchor="middle">{_e(fv(x, "current", 3))}</text>'
        for x in xt
    ]
    return Figure(
        "plot",
        "Histogram of LED current",
        W,
        Hh,
        ".bar{fill:#c8780a}.ax{stroke:currentColor}.gr{stroke:currentColor;stroke-opacity:.15}"
        ".tk{font:10px sans-serif;fill:currentColor}.ti{font:600 11px sans-serif;fill:currentColor}",
        "".join(parts) + f'<line x1="{L}" y1="{Hh - B}" x2="{W - R}" y2="{Hh - B}" class="ax"/>'
        f'<line x1="{L}" y1="{T}" x2="{L}" y2="{Hh - B}" class="ax"/>'
        f'<text x="{(L + W - R) / 2}" y="{Hh - 8}" class="ti" text-anchor="middle">LED current (A); '
        "the axis spans the builds' range</text>"
        f'<text transform="translate(12 {(T + Hh - B) / 2}) rotate(-90)" class="ti" text-anchor="middle">Builds</text>',
        f"LED current over {study['samples']} random builds (seed {study['seed']}).",
    )


def spectrum_chart(h: list[dict[str, Any]]) -> Figure | None:
    """Bars: orders 2 to 40 as a percentage of the fundamental; ticks: the limits."""
    i1 = h[0]["current_A"]
    if i1 <= 0:
        return None
    rows = h[1:]
    vals = [100 * r["current_A"] / i1 for r in rows]
    lims = [None if r["limit_A"] is None else 100 * r["limit_A"] / i1 for r in rows]
    biggest = max(vals)
    near = [x for x in lims if x is not None and x <= 2.5 * biggest]
    top = max([biggest, *near]) * 1.1 or 1.0
    W, H, L, B, T, R = 360, 170, 40, 26, 10, 8
    bw = (W - L - R) / len(rows)

    def y(v: float) -> float:
        return H - B - (H - B - T) * min(v, top) / top

    parts = []
    for k, (r, v, lim) in enumerate(zip(rows, vals, lims)):
        x = L + k * bw
        cls = "over" if r["status"] == "fail" else "bar"
        parts.append(
            f'<rect x="{x + 1:.1f}" y="{y(v):.1f}" width="{bw - 2:.1f}" height="{H - B - y(v):.1f}" class="{cls}"/>'
        )
        if lim is not None and lim <= top:
            ly = y(lim)
            parts.append(f'<line x1="{x:.1f}" y1="{ly:.1f}" x2="{x + bw:.1f}" y2="{ly:.1f}" class="lim"/>')
        elif lim is not None:  # off the scale: a small arrow at the top
            cx = x + bw / 2
            parts.append(f'<path d="M{cx - 3:.1f} {T + 5} L{cx:.1f} {T} L{cx + 3:.1f} {T + 5}" class="lim up"/>')
        if r["order"] in (3, 5, 7, 9, 15, 21, 29, 39):
            parts.append(
                f'<text x="{x + bw / 2:.1f}" y="{H - B + 12}" class="tk" text-anchor="middle">{r["order"]}</text>'
            )
    parts.append(
        f'<line x1="{L}" y1="{H - B}" x2="{W - R}" y2="{H - B}" class="ax"/>'
        f'<line x1="{L}" y1="{T}" x2="{L}" y2="{H - B}" class="ax"/>'
        f'<text x="{L - 4}" y="{T + 8}" class="tk" text-anchor="end">{top:.0f} %</text>'
        f'<text x="{L - 4}" y="{H - B}" class="tk" text-anchor="end">0</text>'
        f'<text x="{(L + W) / 2:.0f}" y="{H - 2}" class="tk" text-anchor="middle">harmonic order</text>'
    )
    return Figure(
        "plot",
        "Line-current harmonics against the limits",
        W,
        H,
        ".ax{stroke:currentColor}.tk{font:10px sans-serif;fill:currentColor}.bar{fill:#c8780a}"
        ".over{fill:#b3261e}.lim{stroke:#26323a;stroke-width:2;fill:none}.up{stroke-width:1.5}",
        "".join(parts),
        "Line current at nominal mains, orders 2 to 40 as % of the fundamental (bars; red: over "
        "its limit); dark ticks: the IEC 61000-3-2 limit for the declared class (an arrow at the top where "
        "it is off the scale; no tick: no limit).",
    )


def shutter_chart(sweep: list[list[float]], threshold: float) -> Figure | None:
    """Exposure variation against shutter time, log time axis."""
    if len(sweep) < 2:
        return None
    W, H, L, B, T, R = 360, 170, 44, 28, 10, 8
    t0, t1 = sweep[0][0], sweep[-1][0]
    top = max(max(v for _, v in sweep), threshold) * 1.1 or 0.01

    def x(t: float) -> float:
        return L + (W - L - R) * math.log(t / t0) / math.log(t1 / t0) if t1 > t0 else L

    def y(v: float) -> float:
        return H - B - (H - B - T) * v / top

    pts = " ".join(f"{x(t):.1f},{y(v):.1f}" for t, v in sweep)
    ty = y(threshold)
    return Figure(
        "plot",
        "Frame-to-frame exposure variation against shutter time",
        W,
        H,
        ".ax{stroke:currentColor}.tk{font:10px sans-serif;fill:currentColor}.th{stroke:#b3261e;stroke-dasharray:4 3}",
        f'<line x1="{L}" y1="{H - B}" x2="{W - R}" y2="{H - B}" class="ax"/>'
        f'<line x1="{L}" y1="{T}" x2="{L}" y2="{H - B}" class="ax"/>'
        f'<line x1="{L}" y1="{ty:.1f}" x2="{W - R}" y2="{ty:.1f}" class="th"/>'
        f'<polyline points="{pts}" fill="none" stroke="#c8780a" stroke-width="1.8"/>'
        f'<text x="{L - 4}" y="{T + 8}" class="tk" text-anchor="end">{100 * top:.3g} %</text>'
        f'<text x="{L - 4}" y="{H - B}" class="tk" text-anchor="end">0</text>'
        f'<text x="{L}" y="{H - B + 12}" class="tk">1/{1 / t0:.0f} s</text>'
        f'<text x="{W - R}" y="{H - B + 12}" class="tk" text-anchor="end">1/{1 / t1:.4g} s</text>'
        f'<text x="{(L + W) / 2:.0f}" y="{H - 2}" class="tk" text-anchor="middle">shutter time (log scale)</text>',
        "Frame-to-frame exposure variation at the worst phase against shutter time, at "
        "nominal mains; dashed: the threshold. It falls to zero at whole ripple periods.",
    )
