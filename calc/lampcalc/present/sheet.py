"""Build sheets as data: one :class:`~lampcalc.present.model.Sheet` per fixture design,
built from the design and its review answer (``check``, and the tolerance ``study``).

Nothing here writes markup: :mod:`lampcalc.present.html` renders a sheet as HTML
(the handbook, a design opened in the page), ``lampbook.report`` as plain text.
The figures are SVG drawings with their own colours; the page's background, where
a drawing needs it, is the renderer's theme's.
"""

from __future__ import annotations

import math
from collections.abc import Callable, Mapping
from typing import Any

from ..cautions import UNVERIFIED_NOTE, citation, daggered
from ..fixture.design import Design
from ..fixture.rules import FAIL, PASS, RULES, SUPPLY_LOADING, WARN, Status
from ..physics import wire as wr
from ..physics.harmonic_limits import RULES as HARMONIC_RULES
from ..quantities.units import format_value as fv
from .figures import histogram, schematic, shutter_chart, spectrum_chart, waveform
from .model import (
    BREAK,
    Block,
    Bullets,
    Caution,
    Cell,
    CheckItem,
    CheckList,
    Paragraph,
    Section,
    Sheet,
    Span,
    Table,
    Verdict,
    code,
    em,
    num,
    status,
    strong,
    text,
    words,
)

OPERATING_ROWS: tuple[tuple[str, str, str], ...] = (
    ("Mains", "mains_voltage_V", "voltage"),
    ("LED current, average", "led_current_avg_A", "current"),
    ("LED current, peak", "led_current_max_A", "current"),
    ("String current, average", "string_current_avg_A", "current"),
    ("Bus voltage, average", "bus_voltage_avg_V", "voltage"),
    ("Bus ripple (p-p)", "ripple_pp_V", "voltage"),
    ("Percent flicker", "percent_flicker_pct", "percent"),
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


def outcome_status(outcome: str) -> Status:
    """How a single fault's outcome is shown: a hazard as a failure, a fault the
    analysis could not follow as a warning, a safe end as a pass."""
    return FAIL if outcome == "hazard" else (WARN if outcome == "unanalysed" else PASS)


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


def operating_table(ans: Mapping[str, Any]) -> Table:
    """The operating points at low, nominal and high supply, from a ``check`` answer."""
    cv = ans["kind"] == "cv"
    label = "supply" if cv else "mains"

    def shown(v: Any, kind: str) -> Cell:
        return words(cell(v, kind)) if kind == "text" else num(cell(v, kind))

    return Table(
        ("", f"low {label}", "nominal", f"high {label}"),
        tuple(
            (words(lab), *(shown(ans[c].get(key), kd) for c in ("low", "nominal", "high")))
            for lab, key, kd in (CV_ROWS if cv else OPERATING_ROWS)
        ),
        compact=True,
    )


# --- bill of materials ----------------------------------------------------------------


def switch_on(ans: dict[str, Any]) -> Paragraph | None:
    """The switch-on figures: peak, I²t, closing phase and the step relay."""
    so = ans.get("switch_on")
    if not so:
        return None
    corner = ", ".join(f"{k} {v}" for k, v in so["corner"].items())
    parts: list[str | Span] = [
        "Switch-on from the discharged state, closing at "
        f"{so['phase_deg']:g}° of the mains ({corner}), through the supply impedance "
        f"{fv(so['source_resistance_ohm'], 'resistance')} + {fv(so['source_inductance_H'], 'inductance')}: ",
        strong(fv(so["peak_A"], "current")),
        f" peak after {fv(so['time_of_peak_s'], 'time')}, I²t {so['i2t_A2s']:.3g} A²s over the first half "
        f"period, {fv(so['resistor_energy_J'], 'energy')} in the series resistor.",
    ]
    st = so.get("step_switching") or {}
    if st:
        parts += [
            f" Closing the {fv(st['added_F'], 'capacitance')} step onto the charged "
            f"{fv(st['charged_F'], 'capacitance')} ({fv(st['delta_V'], 'voltage')}): ",
            strong(fv(st["peak_A"], "current")),
            f" peak in the step relay, I²t {st['i2t_A2s']:.3g} A²s.",
        ]
    return Paragraph(text(*parts))


def fault_table(ans: dict[str, Any]) -> Table:
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
            (
                words(code(f["id"]), BREAK, f["description"]),
                status(f["outcome"].upper(), outcome_status(f["outcome"])),
                words(fuse),
                words(over or "nothing over its rating", *((BREAK, notes) if notes else ())),
                words(" → ".join(f["leads_to"]) or "—"),
            )
        )
    return Table(("fault", "outcome", "fuse", "over rating", "leads to"), tuple(rows))


def corner_table(ans: dict[str, Any]) -> Table:
    """One row per stress: its worst value and the corner that gives it."""
    kinds = {"A": "current", "V": "voltage", "W": "power"}
    rows = []
    for c in ans.get("corners", []):
        v = float(c["value"])
        shown = f"{v:.2f} %" if c["unit"] == "%" else fv(v, kinds[c["unit"]])
        rows.append((words(c["stress"]), num(shown), words(", ".join(f"{k} {x}" for k, x in c["corner"].items()))))
    return Table(("stress", "worst value", "at"), tuple(rows))


def _need(rule: str, value: float) -> float:
    """The rating a part needs: the catalogue rule's margin applied to its worst-corner stress."""
    return RULES[rule].required(value)


def bom_table(d: Design, ans: dict[str, Any]) -> Table:
    """The parts list: part, value, what the design declares, what it needs."""
    return Table(
        ("part", "value", "declared", "required"),
        tuple((words(a), num(b), words(c), words(r)) for a, b, c, r in bom(d, ans)),
    )


def bom(d: Design, ans: dict[str, Any]) -> list[list[str]]:
    """The parts list as display strings. Its *required rating* column reads each part's stress at
    its own worst corner (``ans["corners"]``) through the rule catalogue."""
    rows: list[list[str]] = []
    arr, mod = d.array, d.module_spec
    s, p = arr.series, arr.parallel
    stress = {c["stress"]: float(c["value"]) for c in ans.get("corners", [])}
    nominal = ans["nominal"] or {}
    rows.append(
        [
            f"LED module × {s * p}",
            mod.name or "module",
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
                f"≥ {fv(ans['worst_high']['led_current_avg_A'] / SUPPLY_LOADING, 'current')} "
                f"(listed supply; {SUPPLY_LOADING * 100:g} % loading)",
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
                f"class {dr.cls or '—'}, rated {fv(dr.ac_rating, 'voltage') if dr.ac_rating else '—'} AC",
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
            f"{br.model} model",
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
            fv(d.fuse.rating, "current") + f" {d.fuse.kind}, {d.fuse.standard}" if d.fuse else "—",
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


def wiring(d: Design, ans: dict[str, Any]) -> Table | None:
    """One row per wire run: its current, drop and ampacity guidance (None when the design lists no wires)."""
    if not d.wires:
        return None
    out = []
    checks = {c["id"]: c for c in ans["checks"]}
    for k, w in enumerate(d.wires):
        size = wr.size_from_area(w.size)
        c = checks.get(f"wire.{k + 1}", {"values": {}})
        vals = c["values"]
        table = w.table or wr.default_table(size)
        amp = wr.ampacity(size, str(table)) if table in wr.AMPACITY else None
        out.append(
            (
                words(w.name),
                words(size.name),
                num(fv(w.length, "length")),
                words(w.carries),
                num(fv(vals.get("current_A", 0.0), "current")),
                num(fv(vals.get("drop_V", 0.0), "voltage")),
                num(f"{vals.get('drop_fraction', 0.0):.2%}"),
                words((fv(amp, "current") + f" ({table})") if amp else f"not rated ({table})"),
            )
        )
    return Table(("run", "size", "length", "carries", "current", "drop", "drop %", "guidance"), tuple(out))


# --- checks as a list: status and id on one line, the finding, why and source on demand -----------


def checks(ans: dict[str, Any]) -> list[Block]:
    """The checks, then the note on daggers if any source is recalled rather than read."""
    items, any_unverified = [], False
    for c in ans["checks"]:
        src, unverified = citation(str(c["source"]))
        any_unverified |= unverified
        items.append(
            CheckItem(
                str(c["id"]),
                c["status"],
                str(c["message"]),
                str(c["would_pass"]) if c.get("would_pass") else None,
                str(c["why"]),
                src + ("†" if unverified else ""),
            )
        )
    out: list[Block] = [CheckList(tuple(items))]
    if any_unverified:
        out.append(Paragraph(text(UNVERIFIED_NOTE), "unverified"))
    return out


def _some(*blocks: Block | None) -> tuple[Block, ...]:
    return tuple(b for b in blocks if b is not None)


def build_sheet(d: Design, ans: dict[str, Any], study: dict[str, Any] | None) -> Sheet:
    """The build sheet of a design from its review (``check`` with waveforms) and tolerance study."""
    out: list[Block] = [
        Paragraph(
            text(
                "Revision ",
                strong(d.revision),
                ", " + d.date if d.date else "",
                f" · {'constant-voltage supply' if d.is_cv else 'mains, no isolation'}",
            ),
            "meta",
        )
    ]
    if d.description:
        out.append(Paragraph(text(d.description)))
    out.append(Caution("warning" if d.is_cv else "danger", "Cautions", tuple(text(c) for c in ans["cautions"])))
    fails = [c for c in ans["checks"] if c["status"] == "fail"]
    verdict = f"{len(fails)} check{'s' if len(fails) != 1 else ''} failed" if fails else "no check failed"
    out.append(
        Verdict(
            text(strong(f"Review: {verdict}"), f", {ans['warned']} warning{'s' if ans['warned'] != 1 else ''}."),
            "fail" if fails else "pass",
        )
    )
    out.append(Section("Schematic", (schematic(d),)))
    operating: list[Block | None] = [operating_table(ans)]
    if ans.get("steps"):
        operating.append(
            Section(
                "Brightness steps (nominal mains)",
                (
                    Table(
                        ("dropper", "LED current"),
                        tuple(
                            (num(fv(st["capacitance_F"], "capacitance")), num(fv(st["led_current_avg_A"], "current")))
                            for st in ans["steps"]
                        ),
                        compact=True,
                    ),
                ),
                3,
            )
        )
    if ans.get("waveform"):
        operating.append(waveform(ans["waveform"]))
    if not d.is_cv:
        operating.append(switch_on(ans))
        operating.append(
            Paragraph(
                text(
                    "Every string open: the bus climbs to ",
                    strong(fv(ans["open_load_bus_V"], "voltage")),
                    f" (time constant {fv(ans['open_load_time_constant_s'], 'time')}).",
                )
            )
        )
    out.append(Section("Operating table", _some(*operating)))
    out += [mains_quality_section(d, ans), light_section(d, ans), camera_section(d, ans)]
    out.append(Section("Checks", tuple(checks(ans))))
    if ans.get("corners"):
        out.append(Section("Worst corners", (corner_table(ans),)))
    if ans.get("faults"):
        out.append(
            Section(
                "Single faults",
                (
                    Paragraph(
                        text(
                            "Each fault applied alone (IEC 60598-1 abnormal conditions, IEC 61347-1 fault "
                            "conditions: the standards decide; this is a design aid). ",
                            em("Hazard"),
                            ": a part over its rating while the fuse does not clear in time, or one failure "
                            "leading to the next.",
                        )
                    ),
                    fault_table(ans),
                ),
            )
        )
    out.append(Section("Bill of materials", (bom_table(d, ans),)))
    wires = wiring(d, ans)
    if wires is not None:
        out.append(Section("Wiring", (wires, Paragraph(text(wr.WIRE_CAUTION), "aside"))))
    if study:
        out.append(study_section(study))
    return Sheet(d.name, tuple(out))


def study_section(study: dict[str, Any]) -> Section:
    cr = study["corners"]
    li, stx = study["led_current_A"], study["stress"]
    rm = study["reduced_model"]
    return Section(
        "Tolerance study",
        (
            Paragraph(
                text(
                    f"Worst-case corners (all {2 ** len(study['variables'])} solved exactly): LED current "
                    f"{fv(cr['led_current_min_A'], 'current')} to {fv(cr['led_current_max_A'], 'current')}; "
                    "highest with " + ", ".join(f"{k} {v}" for k, v in cr["worst_corner"].items()) + "."
                )
            ),
            Table(
                ("quantity", "p1", "p50", "p99"),
                (
                    (words("LED current"), *(num(fv(li[q], "current")) for q in ("p1", "p50", "p99"))),
                    (words(stx["name"]), *(num(f"{stx[q]:.0%}") for q in ("p1", "p50", "p99"))),
                ),
                compact=True,
            ),
            histogram(study),
            Paragraph(
                text(
                    f"Monte Carlo on a {rm['kind']}; checked against the exact solver on "
                    f"{rm['checked_samples']} fresh samples: largest error {rm['max_relative_error']:.2%}. "
                    "Mains uniform over its band; "
                    "capacitance and Vf normal with the tolerance as 3σ; temperature uniform between cold and hot."
                ),
                "aside",
            ),
        ),
    )


# --- what the fixture does to the mains, its light, and how it looks on camera ---------------------


def _pct(x: float | None, digits: int = 1) -> str:
    return "—" if x is None else f"{100 * x:.{digits}f} %"


def mains_quality_section(d: Design, ans: dict[str, Any]) -> Section:
    heading = "What it draws from the mains"
    if d.is_cv:
        return Section(heading, (Paragraph(text(str(ans.get("mains_note", "")))),))
    corners = ("low", "nominal", "high")
    if not all(ans.get(c) and "thd" in ans[c] for c in corners):
        return Section(
            heading,
            (Paragraph(text("Not worked out: the strings do not conduct at every mains corner (see the checks).")),),
        )
    rows: list[tuple[str, Callable[[dict[str, Any]], str]]] = [
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
    out: list[Block | None] = [
        Table(
            ("", "low mains", "nominal", "high mains"),
            tuple((words(lab), *(num(fn(ans[c])) for c in corners)) for lab, fn in rows),
        ),
        spectrum_chart(ans["nominal"]["harmonics"]),
    ]
    notes = list(dict.fromkeys(n for c in corners for n in ans[c]["harmonic_notes"]))
    n = ans["nominal"]
    bands = list(dict.fromkeys(ans[c]["harmonic_band"] for c in corners))
    out.append(Paragraph(text(f"Judged as: {'; '.join(bands)}. {HARMONIC_RULES[n['harmonic_class']]}")))
    out.append(
        Paragraph(
            text(
                f"Spectrum from the solver's exact waveform on {n['spectrum_samples_per_period']} "
                "points per period; class from the design file's ",
                code("[emissions] class"),
                f" (here {n['harmonic_class']}). Limits: IEC 61000-3-2:2018+A1:2020 as reproduced in secondary "
                "copies; check against the standard. The review's check judges every corner and step.",
            ),
            "aside",
        )
    )
    if notes:
        marked = [daggered(x) for x in notes]
        out.append(Bullets(tuple(text(x) for x, _ in marked)))
        if any(u for _, u in marked):
            out.append(Paragraph(text(UNVERIFIED_NOTE), "unverified"))
    g = ans.get("generator")
    if g:
        out.append(
            Paragraph(
                text(
                    strong("On a generator:"),
                    f" up to {cell(g['leading_reactive_power_var'], 'power')[:-1]}var leading per fixture. {g['note']}",
                )
            )
        )
    return Section(heading, _some(*out))


def light_section(d: Design, ans: dict[str, Any]) -> Section:
    li = ans.get("light") or {}
    out: list[Block] = [Paragraph(text(f"Model: {li.get('model', '')}."), "aside")]
    if li.get("flux_lm") is None:
        return Section("Light", tuple(out))
    label = "supply" if d.is_cv else "mains"
    corners = ("low", "nominal", "high")
    out.append(
        Table(
            ("", f"low {label}", "nominal", f"high {label}"),
            (
                (words("Luminous flux"), *(num(cell(ans[c]["flux_lm"], "luminous_flux")) for c in corners)),
                (
                    words("Efficacy" + (" (at the supply output)" if d.is_cv else " (at the mains)")),
                    *(num(cell(ans[c]["efficacy_lm_per_W"], "efficacy")) for c in corners),
                ),
            ),
        )
    )
    if li.get("steps"):
        out.append(
            Section(
                "Each brightness step (nominal mains)",
                (
                    Table(
                        ("dropper", "flux", "input power", "efficacy"),
                        tuple(
                            (
                                num(fv(s["capacitance_F"], "capacitance")),
                                num(cell(s["flux_lm"], "luminous_flux")),
                                num(cell(s["input_power_W"], "power")),
                                num(cell(s["efficacy_lm_per_W"], "efficacy")),
                            )
                            for s in li["steps"]
                        ),
                    ),
                ),
                3,
            )
        )
    b = li["beam"]
    rows: list[tuple[Cell, ...]] = [
        (words("Beam (full angle)"), num(f"{b['beam_angle_deg']:g}°"), words("")),
        (words("Distance"), num(fv(b["distance_m"], "length")), num(f"{b['distance_ft']:.3g} ft")),
        (words("Intensity (uniform cone)"), num(f"{b['intensity_cd']:.4g} cd"), words("")),
        (
            words("Illuminance on axis (uniform cone)"),
            num(cell(b["illuminance_axis_lx"], "illuminance")),
            num(f"{b['illuminance_axis_fc']:.3g} fc"),
        ),
    ]
    if "field_diameter_m" in b:
        rows += [
            (
                words("Field diameter"),
                num(fv(b["field_diameter_m"], "length")),
                num(f"{b['field_diameter_ft']:.3g} ft"),
            ),
            (
                words("Average over the field (flat disc)"),
                num(cell(b["illuminance_average_lx"], "illuminance")),
                num(f"{b['illuminance_average_fc']:.3g} fc"),
            ),
        ]
    out.append(Table(("at nominal", "metric", "imperial"), tuple(rows)))
    out.append(
        Paragraph(
            text(
                "Point source, all the lumens in the beam, target square to the axis. The "
                "uniform cone gives the centre; the flat disc spreads the lumens evenly over the lit circle. Real "
                "beams fall off towards the edge: measure with a meter for anything that matters."
            ),
            "aside",
        )
    )
    return Section("Light", tuple(out))


def camera_section(d: Design, ans: dict[str, Any]) -> Section:
    c = ans.get("camera") or {}
    heading = "On camera"
    if "settings" not in c:
        return Section(heading, (Paragraph(text(str(c.get("note", "")))),))
    fps, thr = c["frame_rate_fps"], c["threshold"]

    def ok(yes: bool) -> Cell:
        return words("yes") if yes else words(strong("no"))

    ranges = ", ".join(f"{fv(a, 'time')} to {fv(b, 'time')}" for a, b in c["safe_ranges_s"]) or "none on the grid"
    mult = ", ".join(fv(t, "time") for t in c["ripple_multiples_s"])
    return Section(
        heading,
        _some(
            Paragraph(
                text(
                    f"Light ripple at {c['ripple_frequency_Hz']:g} Hz, "
                    f"percent flicker {c['percent_flicker_pct']:.1f} % "
                    f"(IEEE 1789: {c['ieee1789_band']}). Frame-to-frame exposure variation is the spread of one "
                    "frame's exposure over every phase of the mains against the camera's clock (they are not "
                    f"locked, so every phase comes round); threshold {_pct(thr)} (from the design file's ",
                    code("[camera]"),
                    ").",
                )
            ),
            Section(
                f"At {fps:g} fps",
                (
                    Table(
                        ("shutter", "time", "variation", f"≤ {_pct(thr)}"),
                        tuple(
                            (
                                words(s["shutter"]),
                                num(fv(s["shutter_time_s"], "time")),
                                num(_pct(s["variation"], 2)),
                                ok(s["ok"]),
                            )
                            for s in c["design_settings"]
                        ),
                    ),
                    Paragraph(
                        text(
                            f"Shutter times under the threshold (1/8000 s to one frame): {ranges}. Zero variation "
                            f"at whole ripple periods: {mult or 'none within one frame'}."
                        )
                    ),
                    *_some(shutter_chart(c["sweep"], thr)),
                ),
                3,
            ),
            Section(
                "Common frame rates at 180°",
                (
                    Table(
                        ("frame rate", "shutter", "variation", "shows at", f"≤ {_pct(thr)}"),
                        tuple(
                            (
                                num(f"{s['frame_rate_fps']:g} fps"),
                                words(s["shutter"]),
                                num(_pct(s["variation"], 2)),
                                num(f"{s['beat_Hz']:.3g} Hz"),
                                ok(s["ok"]),
                            )
                            for s in c["settings"]
                        ),
                    ),
                    Paragraph(
                        text(
                            "'Shows at' is the ripple folded about the nearest multiple of the frame rate: "
                            "0 Hz means the phase only drifts with the mains frequency, so the change comes slowly. "
                            "Rolling shutters also show the ripple as bands across one frame; this figure is the "
                            "whole-frame exposure."
                        ),
                        "aside",
                    ),
                ),
                3,
            ),
        ),
    )
