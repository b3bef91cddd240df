"""Build sheets: one page per fixture design, as HTML that sits inside a
Markdown page (the handbook) or is shown as is (a design opened in the page).

Everything the design file says is escaped; nothing here reads files.
"""

from __future__ import annotations

import html
import math
import re
from typing import Any

from ..cautions import UNVERIFIED_NOTE, citation, daggered
from ..fixture.design import Design
from ..fixture.rules import RULES
from ..physics import wire as wr
from ..physics.harmonic_limits import RULES as HARMONIC_RULES
from ..quantities.units import format_value as fv

OPERATING_ROWS: tuple[tuple[str, str, str], ...] = (
    ("Mains", "mains_voltage_V", "voltage"),
    ("LED current, average", "led_current_avg_A", "current"),
    ("LED current, peak", "led_current_max_A", "current"),
    ("String current, average", "string_current_avg_A", "current"),
    ("Bus voltage, average", "bus_voltage_avg_V", "voltage"),
    ("Bus ripple (p-p)", "ripple_pp_V", "voltage"),
    ("Percent flicker", "percent_flicker", "percent"),
    ("Flicker index", "flicker_index", "number"),
    ("IEEE 1789 band", "ieee1789_band", "text"),
    ("Dropper current (rms)", "dropper_current_rms_A", "current"),
    ("Dropper voltage, peak", "dropper_voltage_peak_V", "voltage"),
    ("Smoothing ripple current (rms)", "smoothing_ripple_current_rms_A", "current"),
    ("Diode current, peak", "diode_current_peak_A", "current"),
    ("Input power", "input_power_W", "power"),
    ("Apparent power", "apparent_power_VA", "va"),
    ("Power factor", "power_factor", "number"),
    ("LED power", "led_power_W", "power"),
)
CV_ROWS: tuple[tuple[str, str, str], ...] = (
    ("Supply", "supply_voltage_V", "voltage"),
    ("String current", "string_current_avg_A", "current"),
    ("LED current, total", "led_current_avg_A", "current"),
    ("LED power", "led_power_W", "power"),
    ("Ballast dissipation, each", "ballast_power_W", "power"),
    ("Input power", "input_power_W", "power"),
    ("Efficiency", "efficiency", "ratio"),
)


def cell(v: Any, kind: str) -> str:
    if v is None:
        return "—"
    if kind == "text":
        return str(v)
    if kind == "percent":
        return f"{v:.1f} %"
    if kind == "number":
        return f"{v:.3g}"
    if kind == "va":
        return fv(float(v), "power")[:-1] + "VA"
    return fv(float(v), kind)


def _e(x: object) -> str:
    return html.escape(str(x), quote=True)


def _table(headers: list[str], rows: list[list[str]], cls: str = "") -> str:
    head = "".join(f"<th>{_e(h)}</th>" for h in headers)
    body = "".join("<tr>" + "".join(f"<td>{c}</td>" for c in r) + "</tr>" for r in rows)
    # a table too wide for a phone becomes labelled cards there; a compact one (short numbers) stays a grid
    kind = "lb-table" if "lb-compact" in cls else "lb-table lb-cards"
    return (
        f'<div class="lb-scroll"><table class="{kind} {cls}"><thead><tr>{head}</tr></thead>'
        f"<tbody>{body}</tbody></table></div>"
    )


# --- bill of materials ----------------------------------------------------------------


def switch_on_html(ans: dict[str, Any]) -> str:
    """The switch-on figures: peak, I²t, closing phase and the step relay."""
    so = ans.get("switch_on")
    if not so:
        return ""
    corner = ", ".join(f"{k} {v}" for k, v in so["corner"].items())
    text = (
        "<p>Switch-on from the discharged state, closing at "
        f"{so['phase_deg']:g}° of the mains ({_e(corner)}), through the supply impedance "
        f"{_e(fv(so['source_resistance_ohm'], 'resistance'))} + {_e(fv(so['source_inductance_H'], 'inductance'))}: "
        f"<strong>{_e(fv(so['peak_A'], 'current'))}</strong> peak after "
        f"{_e(fv(so['time_of_peak_s'], 'time'))}, I²t {so['i2t_A2s']:.3g} A²s over the first half period, "
        f"{_e(fv(so['resistor_energy_J'], 'energy'))} in the series resistor."
    )
    st = so.get("step_switching") or {}
    if st:
        text += (
            f" Closing the {_e(fv(st['added_F'], 'capacitance'))} step onto the charged "
            f"{_e(fv(st['charged_F'], 'capacitance'))} ({_e(fv(st['delta_V'], 'voltage'))}): "
            f"<strong>{_e(fv(st['peak_A'], 'current'))}</strong> peak in the step relay, "
            f"I²t {st['i2t_A2s']:.3g} A²s."
        )
    return text + "</p>"


def fault_rows(ans: dict[str, Any]) -> list[list[str]]:
    """One row per single fault."""
    rows = []
    for f in ans.get("faults", []):
        over = "; ".join(
            f"{o['part']} ({o['check']}): {o['value']:.3g} against {o['rating']:.3g} {o['unit']}, {o['consequence']}"
            for o in f["over_rating"]
        )
        fuse = f"clears within {f['fuse_time_s']:.3g} s" if f["fuse_clears"] else "does not clear"
        notes = " ".join(f.get("notes", []))
        rows.append(
            [
                f"<code>{_e(f['id'])}</code><br>{_e(f['description'])}",
                f'<span class="lb-st lb-{"fail" if f["outcome"] == "hazard" else "pass"}">'
                f"{_e(f['outcome'].upper())}</span>",
                _e(fuse),
                _e(over or "nothing over its rating") + (f"<br>{_e(notes)}" if notes else ""),
                _e(" → ".join(f["leads_to"])) or "—",
            ]
        )
    return rows


def corner_rows(ans: dict[str, Any]) -> list[list[str]]:
    """One row per stress: its worst value and the corner that gives it."""
    kinds = {"A": "current", "V": "voltage", "W": "power"}
    rows = []
    for c in ans.get("corners", []):
        v = float(c["value"])
        shown = f"{v:.2f} %" if c["unit"] == "%" else fv(v, kinds[c["unit"]])
        rows.append([_e(c["stress"]), _e(shown), _e(", ".join(f"{k} {x}" for k, x in c["corner"].items()))])
    return rows


def _need(rule: str, value: float) -> float:
    """The rating a part needs: the catalogue rule's margin applied to its worst-corner stress."""
    return RULES[rule].required(value)


def bom(d: Design, ans: dict[str, Any]) -> list[list[str]]:
    """The parts list. Its *required rating* column reads each part's stress at
    its own worst corner (``ans["corners"]``) through the rule catalogue."""
    rows: list[list[str]] = []
    arr, mod = d.array, d.module_spec
    s, p = arr.series, arr.parallel
    stress = {c["stress"]: float(c["value"]) for c in ans.get("corners", [])}
    nominal = ans["nominal"] or {}
    rows.append(
        [
            f"LED module × {s * p}",
            _e(mod.name or "module"),
            f"{s} in series × {p} strings",
            (f"{fv(mod.current_max, 'current')} max; runs {fv(nominal.get('string_current_avg_A', 0.0), 'current')}"),
        ]
    )
    if arr.ballast > 0:
        if d.is_cv:
            i = ans["worst_high"]["string_current_avg_A"]
            pw = i * i * arr.ballast
        else:
            pw = stress.get("ballast_power_W", 0.0)
        rows.append(
            [
                f"Ballast resistor × {p}",
                fv(arr.ballast, "resistance"),
                fv(arr.ballast_rating, "power") if arr.ballast_rating else "one per string",
                f"≥ {fv(_need('ballast.power', pw), 'power')} (dissipates {fv(pw, 'power')} worst case)",
            ]
        )
    if d.supply is not None:
        sup = d.supply
        rows.append(
            [
                "Constant-voltage supply",
                fv(sup.voltage, "voltage"),
                f"±{sup.tolerance:.0%}",
                f"≥ {fv(ans['worst_high']['led_current_avg_A'] / 0.8, 'current')} (listed supply; 80 % loading)",
            ]
        )
        return rows
    _, _, vhi = d.mains_band()
    vpk = math.sqrt(2) * vhi
    dr = d.dropper_or_none
    if dr.capacitance:
        val = " / ".join(fv(c, "capacitance") for c in dr.steps) if dr.steps else fv(dr.capacitance, "capacitance")
        rows.append(
            [
                "Dropper capacitor",
                val + f" ±{dr.tolerance:.0%}",
                f"class {_e(dr.cls or '—')}, rated {fv(dr.ac_rating, 'voltage') if dr.ac_rating else '—'} AC",
                f"X1/X2, ≥ {fv(_need('dropper.ac_rating', vhi), 'voltage')} AC; carries "
                f"{fv(stress.get('dropper_current_rms_A', 0.0), 'current')} rms at its worst corner",
            ]
        )
    so = ans.get("switch_on") or {}
    pulse = float(so.get("resistor_energy_J", ans.get("switch_on_energy_J", 0.0)))
    i2t = float(so.get("i2t_A2s", 0.0))
    if dr.series_resistance > 0:
        p_rs = stress.get("series_resistor_power_W", 0.0)
        rows.append(
            [
                "Series resistor (surge limit)",
                fv(dr.series_resistance, "resistance"),
                f"{fv(dr.resistor_rating, 'power') if dr.resistor_rating else '—'}",
                f"fusible, pulse-rated; ≥ {fv(_need('resistor.power', p_rs), 'power')}; "
                f"pulse rating ≥ {fv(_need('resistor.pulse', pulse), 'energy')}",
            ]
        )
    if dr.bleeder:
        n = max(dr.bleeder_resistors, math.ceil(stress.get("dropper_voltage_peak_V", vpk) / dr.bleeder_voltage_rating))
        pw = stress.get("dropper_bleeder_power_W", 0.0) / n / dr.bleeder_paths
        rows.append(
            [
                "Dropper bleeder",
                fv(dr.bleeder, "resistance"),
                (f"{n} in series" if n > 1 else "one part")
                + (f" × {dr.bleeder_paths} paths" if dr.bleeder_paths > 1 else ""),
                f"≥ {fv(_need('bleeder.dropper_rating', pw), 'power')} each; "
                f"limiting voltage ≥ {fv(stress.get('dropper_voltage_peak_V', vpk) / n, 'voltage')} each",
            ]
        )
    br = d.bridge_or()
    rows.append(
        [
            "Bridge rectifier",
            f"{_e(br.model)} model",
            f"V_RRM {fv(br.vrrm, 'voltage') if br.vrrm else '—'}",
            f"V_RRM ≥ {fv(_need('bridge.vrrm', vpk), 'voltage')}; "
            f"I_F(AV) ≥ {fv(_need('bridge.average', stress.get('bridge_current_avg_A', 0.0)), 'current')}; "
            f"I_FSM ≥ {fv(_need('bridge.surge', ans['switch_on_peak_A']), 'current')}; "
            f"I²t ≥ {_need('bridge.i2t', i2t):.3g} A²s",
        ]
    )
    sm = d.smoothing_or()
    need_v = max(
        sm.clamp if sm.clamp else ans["open_load_bus_V"],
        _need("smoothing.working_voltage", stress.get("bus_voltage_max_V", 0.0)),
    )
    rows.append(
        [
            "Smoothing capacitor",
            fv(sm.capacitance, "capacitance") + f" ±{sm.tolerance:.0%}",
            f"{fv(sm.voltage_rating, 'voltage') if sm.voltage_rating else '—'}",
            f"≥ {fv(need_v, 'voltage')} ({'clamp' if sm.clamp else 'open load'} and working margin); ripple ≥ "
            f"{fv(_need('smoothing.ripple_current', stress.get('smoothing_ripple_current_rms_A', 0.0)), 'current')}"
            " rms; 105 °C grade",
        ]
    )
    if sm.bleeder:
        v = stress.get("bus_voltage_max_V", 0.0)
        n = max(sm.bleeder_resistors, math.ceil(v / sm.bleeder_voltage_rating))
        rows.append(
            [
                "Bus bleeder",
                fv(sm.bleeder, "resistance"),
                f"{n} in series" if n > 1 else "one part",
                f"≥ {fv(_need('bleeder.smoothing_rating', stress.get('bus_bleeder_power_W', 0.0) / n), 'power')} each",
            ]
        )
    line = stress.get("line_current_rms_A", 0.0)
    rows.append(
        [
            "Fuse (line)",
            fv(d.fuse.rating, "current") + f" {_e(d.fuse.kind)}, {_e(d.fuse.standard)}" if d.fuse else "—",
            "",
            f"≥ {fv(_need('fuse.rating', line), 'current')}; pre-arcing I²t ≥ {_need('fuse.i2t', i2t):.3g} A²s; "
            "breaking capacity for the supply",
        ]
    )
    if d.switch is not None:
        sw = d.switch
        rows.append(
            [
                "Switch",
                fv(sw.rating, "current"),
                f"inrush {fv(sw.surge_rating, 'current') if sw.surge_rating else '—'}",
                f"≥ {fv(_need('switch.rating', line), 'current')} rms; "
                f"inrush ≥ {fv(ans['switch_on_peak_A'], 'current')}",
            ]
        )
    return rows


def wiring(d: Design, ans: dict[str, Any]) -> list[list[str]]:
    out = []
    checks = {c["id"]: c for c in ans["checks"]}
    for k, w in enumerate(d.wires):
        size = wr.size_from_area(w.size)
        c = checks.get(f"wire.{k + 1}", {"values": {}})
        vals = c["values"]
        table = w.table or wr.default_table(size)
        amp = wr.ampacity(size, str(table)) if table in wr.AMPACITY else None
        out.append(
            [
                _e(w.name),
                _e(size.name),
                fv(w.length, "length"),
                _e(w.carries),
                fv(vals.get("current_A", 0.0), "current"),
                fv(vals.get("drop_V", 0.0), "voltage"),
                f"{vals.get('drop_fraction', 0.0):.2%}",
                (fv(amp, "current") + f" ({_e(table)})") if amp else f"not rated ({_e(table)})",
            ]
        )
    return out


# --- schematic -----------------------------------------------------------------------------


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


def schematic(d: Design) -> str:
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
    style = (
        "<style>.wire,.part,.plate,.ray{fill:none;stroke:currentColor;stroke-width:1.6}.gap{fill:var(--md-default-bg-color,#fff);stroke:none}"
        ".diode{fill:currentColor}.lab{font:12px sans-serif;fill:currentColor}.ray{stroke-width:1}</style>"
    )
    return (
        f'<figure class="lb-schematic"><svg viewBox="0 0 {W} {H}" role="img" '
        f'aria-label="Schematic of {_e(d.name)}">{style}'
        + "".join(parts)
        + "</svg><figcaption>Schematic drawn from the design file (line conductor on top).</figcaption></figure>"
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


def _axes(x0: float, x1: float, y0: float, y1: float, box: tuple[float, float, float, float]) -> tuple[Any, Any]:
    left, top, width, height = box

    def fx(x: float) -> float:
        return left + width * (x - x0) / (x1 - x0)

    def fy(y: float) -> float:
        return top + height * (1 - (y - y0) / (y1 - y0))

    return fx, fy


def waveform(w: dict[str, list[float]]) -> str:
    """LED current and bus voltage over one mains period: two stacked plots with axis titles, units, a
    grid of round ticks; the current axis starts at zero, the voltage axis says where it starts."""
    t = w["t"]
    if not t:
        return ""
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
    return (
        f'<figure class="lb-fig"><svg viewBox="0 0 {W} {Ht + 6}" role="img" '
        'aria-label="LED current and bus voltage over one period">'
        "<style>.ax{stroke:currentColor}.gr{stroke:currentColor;stroke-opacity:.15}"
        ".tk{font:10px sans-serif;fill:currentColor}.ti{font:600 11px sans-serif;fill:currentColor}</style>"
        + "".join(out)
        + "</svg><figcaption>One mains period at nominal mains, from the steady-state solve.</figcaption></figure>"
    )


def histogram(study: dict[str, Any]) -> str:
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
    return (
        f'<figure class="lb-fig"><svg viewBox="0 0 {W} {Hh}" role="img" aria-label="Histogram of LED current">'
        "<style>.bar{fill:#c8780a}.ax{stroke:currentColor}.gr{stroke:currentColor;stroke-opacity:.15}"
        ".tk{font:10px sans-serif;fill:currentColor}.ti{font:600 11px sans-serif;fill:currentColor}</style>"
        + "".join(parts)
        + f'<line x1="{L}" y1="{Hh - B}" x2="{W - R}" y2="{Hh - B}" class="ax"/>'
        f'<line x1="{L}" y1="{T}" x2="{L}" y2="{Hh - B}" class="ax"/>'
        f'<text x="{(L + W - R) / 2}" y="{Hh - 8}" class="ti" text-anchor="middle">LED current (A); '
        "the axis spans the builds' range</text>"
        f'<text transform="translate(12 {(T + Hh - B) / 2}) rotate(-90)" class="ti" text-anchor="middle">Builds</text>'
        "</svg>"
        f"<figcaption>LED current over {study['samples']} random builds (seed {study['seed']}).</figcaption></figure>"
    )


# --- checks as a list: status and id on one line, the finding, why and source on demand -----------

_NUMBER_UNIT = re.compile(r"(\d) (?=(?:[pnµumkMG]?(?:VA|V|A|W|Ω|F|Hz|s|J|h)|%|°C|°F|mm²|AWG)(?![\w]))")


def keep_numbers(text: str) -> str:
    """A number and its unit are joined by a no-break space, so a narrow line never splits them."""
    return _NUMBER_UNIT.sub("\\1\u00a0", text)


def checks_list(checks: list[dict[str, Any]]) -> str:
    items, any_unverified = [], False
    for c in checks:
        src, unverified = citation(str(c["source"]))
        any_unverified |= unverified
        items.append(
            f'<li class="lb-check lb-{_e(c["status"])}"><div class="lb-check-head">'
            f'<span class="lb-st lb-{_e(c["status"])}">{_e(c["status"].upper())}</span> '
            f"<code>{_e(c['id'])}</code></div>"
            f'<p class="lb-check-finding">{_e(keep_numbers(str(c["message"])))}'
            + (f"<br>Would pass: {_e(keep_numbers(str(c['would_pass'])))}" if c.get("would_pass") else "")
            + "</p>"
            f"<details><summary>Why and source</summary><p>{_e(keep_numbers(str(c['why'])))}</p>"
            f'<p class="lb-cite">Source: {_e(keep_numbers(src))}{"†" if unverified else ""}</p></details></li>'
        )
    note = f'<p class="lb-unverified">{_e(UNVERIFIED_NOTE)}</p>' if any_unverified else ""
    return '<ul class="lb-checklist">' + "".join(items) + "</ul>" + note


def render(d: Design, ans: dict[str, Any], study: dict[str, Any] | None) -> str:
    """The sheet body (everything below the page title)."""
    out = ['<div class="lb-sheet" markdown="0">']
    out.append(
        f'<p class="lb-meta">Revision <strong>{_e(d.revision)}</strong>{", " + _e(d.date) if d.date else ""}'
        f" · {'constant-voltage supply' if d.is_cv else 'mains, no isolation'}</p>"
    )
    if d.description:
        out.append(f"<p>{_e(d.description)}</p>")
    kind = "danger" if not d.is_cv else "warning"
    out.append(
        f'<div class="admonition {kind}"><p class="admonition-title">Cautions</p><ul>'
        + "".join(f"<li>{_e(c)}</li>" for c in ans["cautions"])
        + "</ul></div>"
    )
    fails = [c for c in ans["checks"] if c["status"] == "fail"]
    verdict = f"{len(fails)} check{'s' if len(fails) != 1 else ''} failed" if fails else "no check failed"
    out.append(
        f'<p class="lb-verdict lb-{"fail" if fails else "pass"}"><strong>Review: {verdict}</strong>, '
        f"{ans['warned']} warning{'s' if ans['warned'] != 1 else ''}.</p>"
    )
    out.append("<h2>Schematic</h2>" + schematic(d))
    rows_def = CV_ROWS if d.is_cv else OPERATING_ROWS
    out.append("<h2>Operating table</h2>")
    label = "supply" if d.is_cv else "mains"
    out.append(
        _table(
            ["", f"low {label}", "nominal", f"high {label}"],
            [
                [_e(lab)] + [_e(cell(ans[c].get(key), kd)) for c in ("low", "nominal", "high")]
                for lab, key, kd in rows_def
            ],
            "lb-compact",
        )
    )
    if ans.get("steps"):
        out.append("<h3>Brightness steps (nominal mains)</h3>")
        out.append(
            _table(
                ["dropper", "LED current"],
                [
                    [fv(st["capacitance_F"], "capacitance"), fv(st["led_current_avg_A"], "current")]
                    for st in ans["steps"]
                ],
                "lb-compact",
            )
        )
    if ans.get("waveform"):
        out.append(waveform(ans["waveform"]))
    if not d.is_cv:
        out.append(switch_on_html(ans))
        out.append(
            "<p>Every string open: the bus climbs to "
            f"<strong>{_e(fv(ans['open_load_bus_V'], 'voltage'))}</strong> "
            f"(time constant {_e(fv(ans['open_load_time_constant_s'], 'time'))}).</p>"
        )
    out.append(mains_quality_section(d, ans))
    out.append(light_section(d, ans))
    out.append(camera_section(d, ans))
    out.append("<h2>Checks</h2>")
    out.append(checks_list(ans["checks"]))
    if ans.get("corners"):
        out.append("<h2>Worst corners</h2>")
        out.append(_table(["stress", "worst value", "at"], corner_rows(ans)))
    if ans.get("faults"):
        out.append("<h2>Single faults</h2>")
        out.append(
            "<p>Each fault applied alone (IEC 60598-1 abnormal conditions, IEC 61347-1 fault conditions: the "
            "standards decide; this is a design aid). <em>Hazard</em>: a part over its rating while the fuse does "
            "not clear in time, or one failure leading to the next.</p>"
        )
        out.append(_table(["fault", "outcome", "fuse", "over rating", "leads to"], fault_rows(ans)))
    out.append("<h2>Bill of materials</h2>")
    out.append(_table(["part", "value", "declared", "required"], bom(d, ans)))
    wires = wiring(d, ans)
    if wires:
        out.append("<h2>Wiring</h2>")
        out.append(_table(["run", "size", "length", "carries", "current", "drop", "drop %", "guidance"], wires))
        out.append(f"<p class='lb-small'>{_e(wr.WIRE_CAUTION)}</p>")
    if study:
        out.append("<h2>Tolerance study</h2>")
        cr = study["corners"]
        li, stx = study["led_current_A"], study["stress"]
        out.append(
            f"<p>Worst-case corners (all {2 ** len(study['variables'])} solved exactly): LED current "
            f"{_e(fv(cr['led_current_min_A'], 'current'))} to "
            f"{_e(fv(cr['led_current_max_A'], 'current'))}; highest with "
            + _e(", ".join(f"{k} {v}" for k, v in cr["worst_corner"].items()))
            + ".</p>"
        )
        out.append(
            _table(
                ["quantity", "p1", "p50", "p99"],
                [
                    [
                        "LED current",
                        fv(li["p1"], "current"),
                        fv(li["p50"], "current"),
                        fv(li["p99"], "current"),
                    ],
                    [_e(stx["name"]), f"{stx['p1']:.0%}", f"{stx['p50']:.0%}", f"{stx['p99']:.0%}"],
                ],
                "lb-compact",
            )
        )
        out.append(histogram(study))
        rm = study["reduced_model"]
        out.append(
            f"<p class='lb-small'>Monte Carlo on a {_e(rm['kind'])}; checked against the exact solver on "
            f"{rm['checked_samples']} fresh samples: largest error {rm['max_relative_error']:.2%}. "
            "Mains uniform over its band; "
            "capacitance and Vf normal with the tolerance as 3σ; temperature uniform between cold and hot.</p>"
        )
    out.append("</div>")
    return "\n".join(out)


def markdown_page(d: Design, ans: dict[str, Any], study: dict[str, Any] | None) -> str:
    return f"# {d.name}\n\n" + render(d, ans, study) + "\n"


# --- what the fixture does to the mains, its light, and how it looks on camera ---------------------


def _pct(x: float | None, digits: int = 1) -> str:
    return "—" if x is None else f"{100 * x:.{digits}f} %"


def spectrum_chart(h: list[dict[str, Any]]) -> str:
    """Bars: orders 2 to 40 as a percentage of the fundamental; ticks: the limits."""
    i1 = h[0]["current_A"]
    if i1 <= 0:
        return ""
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
    return (
        f'<figure class="lb-fig"><svg viewBox="0 0 {W} {H}" role="img" '
        'aria-label="Line-current harmonics against the limits">'
        "<style>.ax{stroke:currentColor}.tk{font:10px sans-serif;fill:currentColor}.bar{fill:#c8780a}"
        ".over{fill:#b3261e}.lim{stroke:#26323a;stroke-width:2;fill:none}.up{stroke-width:1.5}</style>"
        + "".join(parts)
        + "</svg><figcaption>Line current at nominal mains, orders 2 to 40 as % of the fundamental (bars; red: over "
        "its limit); dark ticks: the IEC 61000-3-2 limit for the declared class (an arrow at the top where "
        "it is off the scale; no tick: no limit).</figcaption></figure>"
    )


def mains_quality_section(d: Design, ans: dict[str, Any]) -> str:
    out = ["<h2>What it draws from the mains</h2>"]
    if d.is_cv:
        out.append(f"<p>{_e(ans.get('mains_note', ''))}</p>")
        return "\n".join(out)
    corners = ("low", "nominal", "high")
    if not all(ans.get(c) and "thd" in ans[c] for c in corners):
        out.append("<p>Not worked out: the strings do not conduct at every mains corner (see the checks).</p>")
        return "\n".join(out)
    rows: list[tuple[str, Any]] = [
        ("THD (orders 2-40)", lambda p: _pct(p["thd"])),
        ("Displacement power factor", lambda p: f"{p['displacement_pf']:.3f}"),
        ("Distortion power factor", lambda p: f"{p['distortion_pf']:.3f}"),
        ("Power factor", lambda p: f"{p['power_factor']:.3f}"),
        ("Active power", lambda p: cell(p["input_power_W"], "power")),
        ("Apparent power", lambda p: cell(p["apparent_power_VA"], "va")),
        (
            "Reactive power (fundamental)",
            lambda p: (
                cell(abs(p["reactive_power_var"]), "power")[:-1]
                + "var "
                + ("leading" if p["reactive_leading"] else "lagging")
            ),
        ),
        ("3rd harmonic", lambda p: _pct(p["harmonics"][2]["current_A"] / p["harmonics"][0]["current_A"])),
        ("5th harmonic", lambda p: _pct(p["harmonics"][4]["current_A"] / p["harmonics"][0]["current_A"])),
        ("IEC 61000-3-2", lambda p: "pass" if p["harmonic_pass"] else "over a limit"),
    ]
    out.append(
        _table(
            ["", "low mains", "nominal", "high mains"],
            [[_e(lab)] + [_e(fn(ans[c])) for c in corners] for lab, fn in rows],
        )
    )
    out.append(spectrum_chart(ans["nominal"]["harmonics"]))
    notes = list(dict.fromkeys(n for c in corners for n in ans[c]["harmonic_notes"]))
    n = ans["nominal"]
    bands = list(dict.fromkeys(ans[c]["harmonic_band"] for c in corners))
    out.append(f"<p>Judged as: {_e('; '.join(bands))}. {_e(HARMONIC_RULES[n['harmonic_class']])}</p>")
    out.append(
        f"<p class='lb-small'>Spectrum from the solver's exact waveform on {n['spectrum_samples_per_period']} "
        "points per period; class from the design file's <code>[emissions] class</code> "
        f"(here {_e(n['harmonic_class'])}). Limits: IEC 61000-3-2:2018+A1:2020 as reproduced in secondary "
        "copies; check against the standard. The review's check judges every corner and step.</p>"
    )
    if notes:
        marked = [daggered(x) for x in notes]
        out.append("<ul>" + "".join(f"<li>{_e(x)}</li>" for x, _ in marked) + "</ul>")
        if any(u for _, u in marked):
            out.append(f'<p class="lb-unverified">{_e(UNVERIFIED_NOTE)}</p>')
    g = ans.get("generator")
    if g:
        out.append(
            f"<p><strong>On a generator:</strong> up to "
            f"{_e(cell(g['leading_reactive_power_var'], 'power')[:-1])}var leading per fixture. {_e(g['note'])}</p>"
        )
    return "\n".join(out)


def light_section(d: Design, ans: dict[str, Any]) -> str:
    li = ans.get("light") or {}
    out = ["<h2>Light</h2>", f"<p class='lb-small'>Model: {_e(li.get('model', ''))}.</p>"]
    if li.get("flux_lm") is None:
        return "\n".join(out)
    label = "supply" if d.is_cv else "mains"
    out.append(
        _table(
            ["", f"low {label}", "nominal", f"high {label}"],
            [
                ["Luminous flux"] + [_e(cell(ans[c]["flux_lm"], "luminous_flux")) for c in ("low", "nominal", "high")],
                ["Efficacy" + (" (at the supply output)" if d.is_cv else " (at the mains)")]
                + [_e(cell(ans[c]["efficacy_lm_per_W"], "efficacy")) for c in ("low", "nominal", "high")],
            ],
        )
    )
    if li.get("steps"):
        out.append("<h3>Each brightness step (nominal mains)</h3>")
        out.append(
            _table(
                ["dropper", "flux", "input power", "efficacy"],
                [
                    [
                        _e(fv(s["capacitance_F"], "capacitance")),
                        _e(cell(s["flux_lm"], "luminous_flux")),
                        _e(cell(s["input_power_W"], "power")),
                        _e(cell(s["efficacy_lm_per_W"], "efficacy")),
                    ]
                    for s in li["steps"]
                ],
            )
        )
    b = li["beam"]
    rows = [
        ["Beam (full angle)", _e(f"{b['beam_angle_deg']:g}°"), ""],
        ["Distance", _e(fv(b["distance_m"], "length")), _e(f"{b['distance_ft']:.3g} ft")],
        ["Intensity (uniform cone)", _e(f"{b['intensity_cd']:.4g} cd"), ""],
        [
            "Illuminance on axis (uniform cone)",
            _e(cell(b["illuminance_axis_lx"], "illuminance")),
            _e(f"{b['illuminance_axis_fc']:.3g} fc"),
        ],
    ]
    if "field_diameter_m" in b:
        rows += [
            [
                "Field diameter",
                _e(fv(b["field_diameter_m"], "length")),
                _e(f"{b['field_diameter_ft']:.3g} ft"),
            ],
            [
                "Average over the field (flat disc)",
                _e(cell(b["illuminance_average_lx"], "illuminance")),
                _e(f"{b['illuminance_average_fc']:.3g} fc"),
            ],
        ]
    out.append(_table(["at nominal", "metric", "imperial"], rows))
    out.append(
        "<p class='lb-small'>Point source, all the lumens in the beam, target square to the axis. The "
        "uniform cone gives the centre; the flat disc spreads the lumens evenly over the lit circle. Real "
        "beams fall off towards the edge: measure with a meter for anything that matters.</p>"
    )
    return "\n".join(out)


def shutter_chart(sweep: list[list[float]], threshold: float) -> str:
    """Exposure variation against shutter time, log time axis."""
    if len(sweep) < 2:
        return ""
    W, H, L, B, T, R = 360, 170, 44, 28, 10, 8
    t0, t1 = sweep[0][0], sweep[-1][0]
    top = max(max(v for _, v in sweep), threshold) * 1.1 or 0.01

    def x(t: float) -> float:
        return L + (W - L - R) * math.log(t / t0) / math.log(t1 / t0) if t1 > t0 else L

    def y(v: float) -> float:
        return H - B - (H - B - T) * v / top

    pts = " ".join(f"{x(t):.1f},{y(v):.1f}" for t, v in sweep)
    ty = y(threshold)
    return (
        f'<figure class="lb-fig"><svg viewBox="0 0 {W} {H}" role="img" '
        'aria-label="Frame-to-frame exposure variation against shutter time">'
        "<style>.ax{stroke:currentColor}.tk{font:10px sans-serif;fill:currentColor}"
        ".th{stroke:#b3261e;stroke-dasharray:4 3}</style>"
        f'<line x1="{L}" y1="{H - B}" x2="{W - R}" y2="{H - B}" class="ax"/>'
        f'<line x1="{L}" y1="{T}" x2="{L}" y2="{H - B}" class="ax"/>'
        f'<line x1="{L}" y1="{ty:.1f}" x2="{W - R}" y2="{ty:.1f}" class="th"/>'
        f'<polyline points="{pts}" fill="none" stroke="#c8780a" stroke-width="1.8"/>'
        f'<text x="{L - 4}" y="{T + 8}" class="tk" text-anchor="end">{100 * top:.3g} %</text>'
        f'<text x="{L - 4}" y="{H - B}" class="tk" text-anchor="end">0</text>'
        f'<text x="{L}" y="{H - B + 12}" class="tk">1/{1 / t0:.0f} s</text>'
        f'<text x="{W - R}" y="{H - B + 12}" class="tk" text-anchor="end">1/{1 / t1:.4g} s</text>'
        f'<text x="{(L + W) / 2:.0f}" y="{H - 2}" class="tk" text-anchor="middle">shutter time (log scale)</text>'
        "</svg><figcaption>Frame-to-frame exposure variation at the worst phase against shutter time, at "
        "nominal mains; dashed: the threshold. It falls to zero at whole ripple periods.</figcaption></figure>"
    )


def camera_section(d: Design, ans: dict[str, Any]) -> str:
    c = ans.get("camera") or {}
    out = ["<h2>On camera</h2>"]
    if "settings" not in c:
        out.append(f"<p>{_e(c.get('note', ''))}</p>")
        return "\n".join(out)
    fps, thr = c["frame_rate_fps"], c["threshold"]
    out.append(
        f"<p>Light ripple at {c['ripple_frequency_Hz']:g} Hz, percent flicker {c['percent_flicker']:.1f} % "
        f"(IEEE 1789: {_e(c['ieee1789_band'])}). Frame-to-frame exposure variation is the spread of one frame's "
        "exposure over every phase of the mains against the camera's clock (they are not locked, so every "
        f"phase comes round); threshold {_pct(thr)} (from the design file's <code>[camera]</code>).</p>"
    )
    out.append(f"<h3>At {fps:g} fps</h3>")
    out.append(
        _table(
            ["shutter", "time", "variation", f"≤ {_pct(thr)}"],
            [
                [
                    _e(s["shutter"]),
                    _e(fv(s["shutter_time_s"], "time")),
                    _e(_pct(s["variation"], 2)),
                    "yes" if s["ok"] else "<strong>no</strong>",
                ]
                for s in c["design_settings"]
            ],
        )
    )
    ranges = ", ".join(f"{fv(a, 'time')} to {fv(b, 'time')}" for a, b in c["safe_ranges_s"]) or "none on the grid"
    mult = ", ".join(fv(t, "time") for t in c["ripple_multiples_s"])
    out.append(
        f"<p>Shutter times under the threshold (1/8000 s to one frame): {_e(ranges)}. Zero variation at whole "
        f"ripple periods: {_e(mult) or 'none within one frame'}.</p>"
    )
    out.append(shutter_chart(c["sweep"], thr))
    out.append("<h3>Common frame rates at 180°</h3>")
    out.append(
        _table(
            ["frame rate", "shutter", "variation", "shows at", f"≤ {_pct(thr)}"],
            [
                [
                    _e(f"{s['frame_rate_fps']:g} fps"),
                    _e(s["shutter"]),
                    _e(_pct(s["variation"], 2)),
                    _e(f"{s['beat_Hz']:.3g} Hz"),
                    "yes" if s["ok"] else "<strong>no</strong>",
                ]
                for s in c["settings"]
            ],
        )
    )
    out.append(
        "<p class='lb-small'>'Shows at' is the ripple folded about the nearest multiple of the frame rate: "
        "0 Hz means the phase only drifts with the mains frequency, so the change comes slowly. Rolling "
        "shutters also show the ripple as bands across one frame; this figure is the whole-frame exposure.</p>"
    )
    return "\n".join(out)
