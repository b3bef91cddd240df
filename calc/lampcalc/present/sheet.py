"""Build sheets: one page per fixture design, as HTML that sits inside a
Markdown page (the handbook) or is shown as is (a design opened in the page).

Everything the design file says is escaped; nothing here reads files.
"""

from __future__ import annotations

import html
import math
from typing import Any

from ..fixture.design import Design
from ..fixture.rules import RULES
from ..physics import wire as wr
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
    return (
        f'<div class="lb-scroll"><table class="lb-table {cls}"><thead><tr>{head}</tr></thead>'
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


def waveform(w: dict[str, list[float]]) -> str:
    """LED current and bus voltage over one mains period, two stacked plots with axes and units."""
    t = w["t"]
    if not t:
        return ""
    T = t[-1] + (t[1] - t[0])
    W, Hp, L, R = 360, 110, 52, 10
    out = []
    for k, (key, unit, dim, colour) in enumerate(
        (
            ("led_current_A", "LED current", "current", "#c8780a"),
            ("bus_V", "bus voltage", "voltage", "#26323a"),
        )
    ):
        ys = w[key]
        lo, hi = min(ys), max(ys)
        pad = (hi - lo) * 0.1 or abs(hi) * 0.05 or 1.0
        y0, y1 = lo - pad, hi + pad
        top = 10 + k * (Hp + 24)
        pts = " ".join(
            f"{L + (W - L - R) * ti / T:.1f},{top + Hp * (1 - (y - y0) / (y1 - y0)):.1f}" for ti, y in zip(t, ys)
        )
        out.append(
            f'<text x="{L - 4}" y="{top + 8}" class="tk" text-anchor="end">{_e(fv(y1, dim))}</text>'
            f'<text x="{L - 4}" y="{top + Hp}" class="tk" text-anchor="end">{_e(fv(y0, dim))}</text>'
            f'<line x1="{L}" y1="{top + Hp}" x2="{W - R}" y2="{top + Hp}" class="ax"/>'
            f'<line x1="{L}" y1="{top}" x2="{L}" y2="{top + Hp}" class="ax"/>'
            f'<polyline points="{pts}" fill="none" stroke="{colour}" stroke-width="1.8"/>'
            f'<text x="{W - R}" y="{top + 10}" class="tk" text-anchor="end">{_e(unit)}</text>'
        )
    Ht = 2 * (Hp + 24) + 6
    out.append(
        f'<text x="{L}" y="{Ht}" class="tk">0</text>'
        f'<text x="{W - R}" y="{Ht}" class="tk" text-anchor="end">{_e(fv(T, "time"))}</text>'
    )
    return (
        f'<figure class="lb-fig"><svg viewBox="0 0 {W} {Ht + 4}" role="img" '
        'aria-label="LED current and bus voltage over one period">'
        "<style>.ax{stroke:currentColor}.tk{font:10px sans-serif;fill:currentColor}</style>"
        + "".join(out)
        + "</svg><figcaption>One mains period at nominal mains, from the steady-state solve.</figcaption></figure>"
    )


def histogram(study: dict[str, Any]) -> str:
    h = study["histogram"]
    counts = h["counts"]
    W, Hh, L, B = 360, 160, 40, 28
    top = max(counts) or 1
    bw = (W - L - 10) / len(counts)
    bars = "".join(
        f'<rect x="{L + k * bw:.1f}" y="{Hh - B - (Hh - B - 10) * c / top:.1f}" '
        f'width="{bw - 1:.1f}" height="{(Hh - B - 10) * c / top:.1f}" class="bar"/>'
        for k, c in enumerate(counts)
    )
    lo, hi = h["low_A"], h["low_A"] + h["bin_A"] * len(counts)
    return (
        f'<figure class="lb-fig"><svg viewBox="0 0 {W} {Hh}" role="img" aria-label="Histogram of LED current">'
        "<style>.bar{fill:#c8780a}.ax{stroke:currentColor}.tk{font:10px sans-serif;fill:currentColor}</style>"
        f'<line x1="{L}" y1="{Hh - B}" x2="{W - 10}" y2="{Hh - B}" class="ax"/>{bars}'
        f'<text x="{L}" y="{Hh - 10}" class="tk">{_e(fv(lo, "current"))}</text>'
        f'<text x="{W - 10}" y="{Hh - 10}" class="tk" text-anchor="end">{_e(fv(hi, "current"))}</text>'
        f'<text x="{L - 4}" y="18" class="tk" text-anchor="end">{top}</text></svg>'
        f"<figcaption>LED current over {study['samples']} random builds (seed {study['seed']}).</figcaption></figure>"
    )


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
    out.append("<h2>Checks</h2>")
    out.append(
        _table(
            ["check", "result", "finding", "why", "source"],
            [
                [
                    f"<code>{_e(c['id'])}</code>",
                    f'<span class="lb-st lb-{_e(c["status"])}">{_e(c["status"].upper())}</span>',
                    _e(c["message"]) + (f"<br>Would pass: {_e(c['would_pass'])}" if c.get("would_pass") else ""),
                    _e(c["why"]),
                    _e(c["source"]),
                ]
                for c in ans["checks"]
            ],
            "lb-checks",
        )
    )
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
