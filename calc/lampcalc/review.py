"""Design review: a catalogue of checks on a whole fixture design.

Each check has a stable id, a status (pass / warn / fail), the numbers behind
it, one sentence of why it matters, and its source: a standard and clause, or
"common practice" where the trade's rule has no published source. Limits that
come from memory say so.
"""

from __future__ import annotations

import math
from collections.abc import Callable
from dataclasses import dataclass, field
from typing import Any

from . import dropper as drop
from . import wire as wr
from .design import Design
from .flicker import ieee1789_band
from .steady import Circuit, SteadyState, open_load, solve, switch_on
from .units import format_value as fv

PASS, WARN, FAIL = "pass", "warn", "fail"


@dataclass(frozen=True)
class Check:
    id: str
    status: str
    message: str
    why: str
    source: str
    values: dict[str, float | str] = field(default_factory=dict)

    def as_dict(self) -> dict[str, Any]:
        return {"id": self.id, "status": self.status, "message": self.message, "why": self.why, "source": self.source,
                "values": dict(sorted(self.values.items()))}  # fmt: skip


@dataclass
class Context:
    """Everything the checks read: the design and its solved corners."""

    design: Design
    nominal: SteadyState | None = None
    low: SteadyState | None = None
    high: SteadyState | None = None
    worst_high: SteadyState | None = None
    worst_circuit: Circuit | None = None
    high_circuit: Circuit | None = None
    switch_on_peak: float = 0.0
    switch_on_energy: float = 0.0
    open_load_bus: float = 0.0
    open_load_tau: float = 0.0
    cv_currents: dict[str, float] = field(default_factory=dict)

    @property
    def t_hot(self) -> float:
        t = self.design.get("review", "temperature_hot")
        return float(t) if t is not None else float(self.design.values["module"]["temperature"]) + 10.0

    @property
    def t_cold(self) -> float:
        return float(self.design.get("review", "temperature_cold"))


def prepare(d: Design, nominal: SteadyState, low: SteadyState, high: SteadyState) -> Context:
    ctx = Context(d, nominal, low, high)
    _, _, vhi = d.mains_band()
    tol = float(d.get("dropper", "tolerance") or 0.0)
    steps = d.get("dropper", "steps")
    scale = 1.0 + tol
    if steps:
        scale *= max(steps) / float(d.get("dropper", "capacitance"))
    ctx.worst_circuit = d.circuit(mains_voltage=vhi, dropper_scale=scale, vf_corner=-1, temperature=ctx.t_hot)
    ctx.worst_high = solve(ctx.worst_circuit)
    ctx.high_circuit = d.circuit(mains_voltage=vhi, dropper_scale=scale)
    ctx.switch_on_peak, ctx.switch_on_energy = switch_on(ctx.high_circuit)
    ctx.open_load_bus, ctx.open_load_tau = open_load(ctx.high_circuit)
    return ctx


def _ratio_status(value: float, limit: float, warn_at: float) -> str:
    if value > limit:
        return FAIL
    return WARN if value > warn_at * limit else PASS


# --- the catalogue ---------------------------------------------------------------------

def c_dropper_class(ctx: Context) -> Check | None:
    d = ctx.design
    if not d.has_dropper:
        return None
    cls = d.get("dropper", "class")
    ok = isinstance(cls, str) and cls.upper() in ("X1", "X2")
    return Check(
        "dropper.class", PASS if ok else FAIL,
        f"dropper capacitor class {cls or 'not declared'}" + ("" if ok else ": use an X1 or X2 safety capacitor"),
        "An X-class capacitor is made to sit across the mains and fail safely; a DC film or ceramic part is not.",
        "IEC 60384-14 (class X definitions)", {"class": str(cls)},
    )  # fmt: skip


def c_dropper_ac_rating(ctx: Context) -> Check | None:
    d = ctx.design
    if not d.has_dropper:
        return None
    _, _, vhi = d.mains_band()
    rating = d.get("dropper", "ac_rating")
    if rating is None:
        return Check("dropper.ac_rating", FAIL, f"no AC rating declared; it must be at least the high mains {fv(vhi, 'voltage')}",
                     "The dropper carries the full mains; an under-rated capacitor fails short.", "IEC 60384-14; margin: common practice",
                     {"high_mains_V": vhi})  # fmt: skip
    status = FAIL if rating < vhi * (1 - 1e-9) else (WARN if rating < 1.1 * vhi * (1 - 1e-9) else PASS)
    return Check(
        "dropper.ac_rating", status, f"rated {fv(rating, 'voltage')} AC against high mains {fv(vhi, 'voltage')}",
        "The dropper carries the full mains; an under-rated capacitor fails short.",
        "IEC 60384-14 (rated voltage); 10 % margin above the high mains: common practice",
        {"rating_V": rating, "high_mains_V": vhi},
    )  # fmt: skip


def c_smoothing_open_load(ctx: Context) -> Check | None:
    d = ctx.design
    rating = d.get("smoothing", "voltage_rating")
    clamp = d.get("smoothing", "clamp")
    v = ctx.open_load_bus
    vals: dict[str, float | str] = {"open_load_bus_V": v}
    if rating is None:
        return Check("smoothing.open_load", FAIL, "no voltage rating declared for the smoothing capacitor",
                     "If a string opens the bus climbs toward the mains peak.", "common practice", vals)  # fmt: skip
    vals["rating_V"] = rating
    if clamp is not None:
        vals["clamp_V"] = clamp
        st = PASS if clamp <= rating else FAIL
        return Check("smoothing.open_load", st, f"clamp at {fv(clamp, 'voltage')} against a {fv(rating, 'voltage')} rating",
                     "If a string opens the bus climbs toward the mains peak; the clamp must hold it below the rating.",
                     "common practice", vals)  # fmt: skip
    return Check(
        "smoothing.open_load", PASS if rating >= v else FAIL,
        f"open load drives the bus to {fv(v, 'voltage')} at high mains; capacitor rated {fv(rating, 'voltage')}",
        "If a string opens the smoothing capacitor charges toward the mains peak and can burst.", "common practice", vals,
    )  # fmt: skip


def c_smoothing_working(ctx: Context) -> Check | None:
    rating = ctx.design.get("smoothing", "voltage_rating")
    if rating is None or ctx.worst_high is None:
        return None
    v = ctx.worst_high.bus_voltage.max
    return Check("smoothing.working_voltage", _ratio_status(v, rating, 0.8),
                 f"bus peaks at {fv(v, 'voltage')} in service; {v / rating:.0%} of the {fv(rating, 'voltage')} rating",
                 "Electrolytics last longer run well below their rated voltage.", "common practice (work at 80 % of rating or less)",
                 {"bus_max_V": v, "rating_V": rating})  # fmt: skip


def _bleeder_check(ctx: Context, cid: str, cap: float | None, r: float | None, label: str, start: float) -> Check | None:
    if cap is None:
        return None
    vlim = float(ctx.design.get("review", "discharge_voltage"))
    tlim = float(ctx.design.get("review", "discharge_time"))
    why = "After unplugging, charge left on the capacitor can shock whoever touches the plug pins or the board."
    src = f"{fv(vlim, 'voltage')} within {tlim:g} s: IEC 60335-1 cl. 22.5 (applied by analogy; set [review] for another target)"
    vals: dict[str, float | str] = {"capacitance_F": cap, "start_V": start, "limit_V": vlim, "limit_s": tlim}
    if not r:
        return Check(cid, FAIL, f"no bleeder across the {label}", why, src, vals)
    t = drop.discharge_time(cap, r, start, vlim)
    vals.update({"bleeder_ohm": r, "time_s": t, "largest_ohm": drop.bleeder_max(cap, tlim, start, vlim)})
    return Check(cid, PASS if t <= tlim else FAIL,
                 f"{fv(r, 'resistance')} takes the {label} from {fv(start, 'voltage')} to {fv(vlim, 'voltage')} in {t:.2f} s",
                 why, src, vals)  # fmt: skip


def c_bleeders(ctx: Context) -> list[Check | None]:
    d = ctx.design
    _, _, vhi = d.mains_band()
    tol = float(d.get("dropper", "tolerance") or 0.0)
    cap = d.get("dropper", "capacitance")
    steps = d.get("dropper", "steps")
    if cap and steps:
        cap = max(steps)
    out = [_bleeder_check(ctx, "bleeder.dropper", cap * (1 + tol) if cap else None, d.get("dropper", "bleeder"), "dropper capacitor",
                          math.sqrt(2) * vhi)]  # fmt: skip
    sm = d.get("smoothing", "capacitance")
    bus = ctx.worst_high.bus_voltage.max if ctx.worst_high else 0.0
    chk = _bleeder_check(ctx, "bleeder.smoothing", sm, d.get("smoothing", "bleeder"), "smoothing capacitor", bus)
    if chk is not None:
        # the bus is not at the plug pins: missing or slow is a warning, with its own target
        t_service = 60.0
        t = float(chk.values.get("time_s", math.inf))
        vlim = float(d.get("review", "discharge_voltage"))
        st = PASS if t <= t_service else WARN
        msg = chk.message if "time_s" in chk.values else "no bleeder across the smoothing capacitor"
        out.append(Check("bleeder.smoothing", st, msg + f" (service target: below {fv(vlim, 'voltage')} within {t_service:g} s)",
                         "The bus keeps its charge after unplugging; a bleeder makes the board safe to service.",
                         "IEC 60598-1 cl. 8.2.7, 50 V within 1 min (from memory), applied to the internal bus: common practice",
                         chk.values))  # fmt: skip
    return out


def c_bridge_surge(ctx: Context) -> Check | None:
    rating = ctx.design.get("bridge", "surge_rating")
    peak = ctx.switch_on_peak
    vals: dict[str, float | str] = {"switch_on_peak_A": peak, "energy_J": ctx.switch_on_energy}
    if rating is None:
        return Check("bridge.surge", WARN, f"switch-on at the crest reaches {fv(peak, 'current')}; no surge rating declared",
                     "Switching on at the mains crest into discharged capacitors drives a surge through the bridge.",
                     "switch-on peak I = Vpk / R; comparison with the rectifier's surge rating: common practice", vals)  # fmt: skip
    vals["rating_A"] = rating
    return Check("bridge.surge", _ratio_status(peak, rating, 0.5),
                 f"switch-on peak {fv(peak, 'current')} against a {fv(rating, 'current')} surge rating",
                 "Switching on at the mains crest into discharged capacitors drives a surge through the bridge.",
                 "switch-on peak I = Vpk / R; half the surge rating as margin: common practice", vals)  # fmt: skip


def c_bridge_vrrm(ctx: Context) -> Check | None:
    _, _, vhi = ctx.design.mains_band()
    vpk = math.sqrt(2) * vhi
    rating = ctx.design.get("bridge", "vrrm")
    vals: dict[str, float | str] = {"peak_V": vpk}
    if rating is None:
        return Check("bridge.vrrm", WARN, f"no reverse-voltage rating declared; each diode sees {fv(vpk, 'voltage')}",
                     "Each bridge diode blocks the mains crest; transients add to it.", "PIV = Vpk for a bridge; 1.5-2 × margin: common practice",
                     vals)  # fmt: skip
    vals["vrrm_V"] = rating
    st = FAIL if rating < vpk else (WARN if rating < 1.5 * vpk else PASS)
    return Check("bridge.vrrm", st, f"V_RRM {fv(rating, 'voltage')} against a {fv(vpk, 'voltage')} crest at high mains",
                 "Each bridge diode blocks the mains crest; transients add to it.",
                 "PIV = Vpk for a bridge with a capacitor; at least 1.5 × margin: common practice", vals)  # fmt: skip


def c_bridge_average(ctx: Context) -> Check | None:
    rating = ctx.design.get("bridge", "average_rating")
    if rating is None or ctx.worst_high is None:
        return None
    i = 2 * ctx.worst_high.diode_current_avg  # the bridge's DC output current
    return Check("bridge.average", _ratio_status(i, 0.8 * rating, 1.0) if i <= rating else FAIL,
                 f"average output {fv(i, 'current')} against a {fv(rating, 'current')} rating (80 % usable with a capacitor load)",
                 "Capacitor-input rectifiers run hotter than their resistive-load rating assumes.",
                 "derate the average current 20 % for a capacitive load: common practice", {"average_A": i, "rating_A": rating})  # fmt: skip


def c_bridge_thermal(ctx: Context) -> Check | None:
    d = ctx.design
    if ctx.worst_high is None:
        return None
    p = ctx.worst_high.losses.get("bridge", 0.0)
    ta = float(d.values[""]["ambient"])
    tj = float(d.get("bridge", "tj_max"))
    ja, jc, cs = d.get("bridge", "theta_ja"), d.get("bridge", "theta_jc"), float(d.get("bridge", "theta_cs"))
    vals: dict[str, float | str] = {"dissipation_W": p, "ambient_C": ta, "tj_max_C": tj}
    src = "T_j = T_a + P (θjc + θcs + θsa); heatsink θsa ≤ (T_j,max − T_a)/P − θjc − θcs"
    why = "The rectifier's junction must stay below its maximum at the highest ambient."
    if ja is not None:
        t = ta + p * ja
        vals.update({"theta_ja": ja, "tj_C": t})
        return Check("bridge.thermal", FAIL if t > tj else (WARN if t > tj - 25 else PASS),
                     f"{fv(p, 'power')} in the bridge: junction at {t:.0f} °C free-standing (max {tj:.0f} °C)", why, src, vals)  # fmt: skip
    if jc is not None:
        need = (tj - ta) / p - jc - cs if p > 0 else math.inf
        vals.update({"theta_jc": jc, "theta_sa_needed": need})
        st = FAIL if need <= 0 else PASS
        return Check("bridge.thermal", st, f"{fv(p, 'power')} in the bridge needs a heatsink of θsa ≤ {need:.3g} K/W" if need > 0 else
                     "no heatsink can keep the junction below its maximum", why, src, vals)  # fmt: skip
    return Check("bridge.thermal", PASS if p < 0.5 else WARN, f"{fv(p, 'power')} in the bridge; no thermal data declared",
                 why, src + "; under 0.5 W needs no heatsink for small bridges: common practice", vals)  # fmt: skip


def c_fuse(ctx: Context) -> Check | None:
    d = ctx.design
    rating = d.get("fuse", "rating")
    st = ctx.high
    i = st.line_current_rms if st else 0.0
    vals: dict[str, float | str] = {"line_rms_A": i}
    if rating is None:
        return Check("fuse.rating", FAIL, "no fuse declared in the line", "A shorted dropper or bridge must open the line.",
                     "fuse in the line conductor: common practice; product standards require one", vals)  # fmt: skip
    vals["rating_A"] = rating
    return Check("fuse.rating", FAIL if i > rating else (WARN if i > 0.75 * rating else PASS),
                 f"line current {fv(i, 'current')} rms at high mains against a {fv(rating, 'current')} fuse",
                 "A fuse run near its rating ages and opens in service; one far above it protects nothing.",
                 "run at 75 % of rating or less at 25 °C (fuse-selection guidance, secondary copy)", vals)  # fmt: skip


def c_switch(ctx: Context) -> Check | None:
    d = ctx.design
    rating = d.get("switch", "rating")
    if rating is None:
        return None
    i = ctx.high.line_current_rms if ctx.high else 0.0
    surge = d.get("switch", "surge_rating")
    vals: dict[str, float | str] = {"line_rms_A": i, "rating_A": rating, "switch_on_peak_A": ctx.switch_on_peak}
    st = FAIL if i > rating else PASS
    msg = f"{fv(i, 'current')} rms against a {fv(rating, 'current')} contact rating"
    if surge is not None:
        vals["surge_rating_A"] = surge
        if ctx.switch_on_peak > surge:
            st, msg = FAIL, msg + f"; switch-on peak {fv(ctx.switch_on_peak, 'current')} exceeds its {fv(surge, 'current')} inrush rating"
    elif st == PASS:
        st, msg = WARN, msg + f"; no inrush rating declared for a {fv(ctx.switch_on_peak, 'current')} switch-on peak"
    return Check("switch.rating", st, msg, "Capacitive loads weld contacts on the switch-on surge.",
                 "contact rating for capacitive load: common practice", vals)  # fmt: skip


def c_ripple_current(ctx: Context) -> Check | None:
    rating = ctx.design.get("smoothing", "ripple_rating")
    if ctx.worst_high is None:
        return None
    i = ctx.worst_high.smoothing_ripple_current_rms
    if rating is None:
        return Check("smoothing.ripple_current", WARN, f"ripple current {fv(i, 'current')} rms; no rating declared",
                     "Ripple current heats an electrolytic from inside.", "capacitor datasheet rating", {"ripple_rms_A": i})  # fmt: skip
    return Check("smoothing.ripple_current", _ratio_status(i, rating, 0.8),
                 f"ripple current {fv(i, 'current')} rms against a {fv(rating, 'current')} rating",
                 "Ripple current heats an electrolytic from inside.", "capacitor datasheet rating; 80 % margin: common practice",
                 {"ripple_rms_A": i, "rating_A": rating})  # fmt: skip


def capacitor_life(rated_h: float, rated_t: float, t: float) -> float:
    """Life by the 10 °C rule: L = L0 x 2^((T_rated - T)/10)."""
    return rated_h * 2 ** ((rated_t - t) / 10.0)


def c_life(ctx: Context) -> Check | None:
    d = ctx.design
    life = d.get("smoothing", "rated_life")
    if life is None or ctx.worst_high is None:
        return None
    ta = float(d.values[""]["ambient"])
    rating = d.get("smoothing", "ripple_rating")
    i = ctx.worst_high.smoothing_ripple_current_rms
    rise = 5.0 * (i / rating) ** 2 if rating else 5.0
    t = ta + rise
    hours = capacitor_life(life / 3600.0, float(d.get("smoothing", "rated_temperature")), t)
    target = float(d.get("review", "life_target")) / 3600.0
    # the rule is only trusted within limits: beyond 100,000 h (about 11 years) other ageing takes over
    shown = f"about {hours:,.0f} h" if hours < 100_000 else "100,000 h or more (the rule is not trusted further)"
    return Check("smoothing.life", PASS if hours >= target else (WARN if hours >= target / 4 else FAIL),
                 f"{shown} at {t:.0f} °C core (ambient {ta:.0f} °C + {rise:.1f} K ripple heating) against a {target:,.0f} h target",
                 "Electrolytic life halves for every 10 K hotter; a dried-out capacitor raises ripple and flicker.",
                 "10 °C rule L = L0·2^((T_rated − T)/10) (secondary copies; common practice); self-heating 5 K at rated ripple "
                 "and the 100,000 h ceiling: common practice",
                 {"life_h": hours, "core_C": t, "target_h": target})  # fmt: skip


def c_led_current(ctx: Context) -> Check | None:
    d = ctx.design
    imax = float(d.values["module"]["current_max"])
    if d.is_cv:
        i = ctx.cv_currents["max"]
        src_corner = "high supply, low Vf, hot"
    else:
        assert ctx.worst_high is not None
        i = max(s.avg for s in ctx.worst_high.string_current)
        src_corner = "high mains, high capacitance, low Vf, hot"
    return Check("led.current", FAIL if i > imax else (WARN if i > 0.9 * imax else PASS),
                 f"string current {fv(i, 'current')} at the worst corner ({src_corner}) against the module's {fv(imax, 'current')}",
                 "Over-driven modules lose light fast and fail early.", "module datasheet maximum; 90 % margin: common practice",
                 {"string_current_A": i, "current_max_A": imax})  # fmt: skip


def c_flicker(ctx: Context) -> Check | None:
    if ctx.nominal is None:
        return None
    st = ctx.nominal
    band = ieee1789_band(st.percent_flicker, st.flicker_frequency)
    status = {"no observable effect": PASS, "low risk": WARN}.get(band.name, FAIL)
    return Check("flicker.ieee1789", status,
                 f"percent flicker {st.percent_flicker:.1f} % at {st.flicker_frequency:g} Hz: {band.name} "
                 f"(low-risk limit {band.low_risk_limit:.2f} %, no-effect {band.no_effect_limit:.2f} %)",
                 "Visible or subliminal flicker causes headaches and stroboscopic effects on moving machinery and cameras.",
                 band.source, {"percent_flicker": st.percent_flicker, "frequency_Hz": st.flicker_frequency})  # fmt: skip


def c_sharing(ctx: Context) -> Check | None:
    d = ctx.design
    arr = d.values["array"]
    p = int(arr["parallel"])
    if p < 2:
        return None
    spread = float(d.values["module"]["vf_spread"])
    ballast = float(arr["ballast"])
    if d.is_cv:
        return None
    base = d.circuit()
    knee, res = base.strings[0].knee, base.strings[0].resistance
    # independent modules: a string's knee strays by the module spread over the root of its length
    dv = spread * knee / math.sqrt(int(arr["series"]))
    from dataclasses import replace

    from .steady import StringLoad

    c = replace(base, strings=(StringLoad(knee - dv, res, 1, ballast), StringLoad(knee + dv, res, p - 1, ballast)))
    st = solve(c)
    hi, lo = st.string_current[0].avg, st.string_current[1].avg
    imbalance = hi / lo - 1 if lo > 0 else math.inf
    imax = float(d.values["module"]["current_max"])
    status = FAIL if hi > imax else (WARN if imbalance > 0.10 else PASS)
    return Check("strings.sharing", status,
                 f"with a ±{spread:.0%} module Vf spread (±{dv:.2f} V on a string) the low-Vf string takes {fv(hi, 'current')} against {fv(lo, 'current')} "
                 f"({imbalance:.0%} more)" + (" with no ballast" if ballast == 0 else f" with {fv(ballast, 'resistance')} ballast"),
                 "Parallel strings share by their Vf; the lowest takes more current, heats, drops further and runs away.",
                 "current hogging of paralleled LEDs (secondary copy); string spread = module spread/√S and 10 % imbalance: common practice",
                 {"hot_string_A": hi, "other_string_A": lo, "imbalance": imbalance})  # fmt: skip


def c_frequency(ctx: Context) -> Check | None:
    d = ctx.design
    region = d.get("mains", "region")
    if not region or d.is_cv:
        return None
    from .regions import PRESETS

    pr = PRESETS.get(str(region))
    if pr is None:
        return Check("mains.region", FAIL, f"unknown region {region!r}", "The region says what mains the fixture will meet.",
                     "lampbook region presets", {"region": str(region)})  # fmt: skip
    f0 = float(d.values["mains"]["frequency"])
    v0 = float(d.values["mains"]["voltage"])
    if pr.frequency == f0 and pr.voltage == v0:
        return Check("mains.region", PASS, f"designed for {pr.label}, the declared region's mains",
                     "A dropper passes current in proportion to frequency and voltage.", pr.source, {"region": str(region)})  # fmt: skip
    st = solve(d.circuit(mains_voltage=pr.voltage, frequency=pr.frequency))
    assert ctx.nominal is not None
    ratio = st.led_current.avg / ctx.nominal.led_current.avg
    return Check("mains.region", FAIL,
                 f"designed for {v0:g} V / {f0:g} Hz but the region is {pr.label}: LED current becomes "
                 f"{fv(st.led_current.avg, 'current')} ({ratio - 1:+.0%})",
                 "A dropper passes current in proportion to frequency and voltage: a 50 Hz design runs about 20 % hot on 60 Hz.",
                 pr.source, {"led_current_region_A": st.led_current.avg, "ratio": ratio})  # fmt: skip


def c_wires(ctx: Context) -> list[Check | None]:
    d = ctx.design
    out: list[Check | None] = []
    limit = float(d.get("review", "drop_limit"))
    for k, w in enumerate(d.wires):
        size = wr.size_from_area(float(w["size"]), f"wire[{k}].size")
        carries = w["carries"]
        if d.is_cv:
            i = ctx.cv_currents["total_max"] if carries in ("supply", "line", "bus") else ctx.cv_currents["max"]
            v = float(d.values["supply"]["voltage"])
        else:
            assert ctx.high is not None
            st = ctx.worst_high or ctx.high
            i = {"line": ctx.high.line_current_rms, "bus": st.led_current.rms,
                 "string": max(s.rms for s in st.string_current)}.get(carries, ctx.high.line_current_rms)  # fmt: skip
            v = float(d.values["mains"]["voltage"]) if carries == "line" else st.bus_voltage.avg
        run = wr.run(size, float(w["length"]), i, float(w["temperature"]), v)
        table = w.get("table") or wr.default_table(size)
        amp = wr.ampacity(size, str(table)) if table in wr.AMPACITY else None
        status = PASS
        bits = [f"{w['name']}: {size.name}, {fv(float(w['length']), 'length')} carrying {fv(i, 'current')}; drop {fv(run.drop, 'voltage')}"
                f" ({(run.drop_fraction or 0):.1%})"]  # fmt: skip
        if run.drop_fraction is not None and run.drop_fraction > limit:
            status = WARN
            bits.append(f"over the {limit:.0%} limit")
        if amp is not None and i > amp:
            status = FAIL
            bits.append(f"over the {fv(amp, 'current')} the {table} table gives")
        elif amp is None:
            bits.append(f"the {table} table does not rate {size.name}")
        src = (wr.AMPACITY[str(table)].source if table in wr.AMPACITY else "no table") + "; drop limit: common practice; local code decides"
        out.append(Check(f"wire.{k + 1}", status, "; ".join(bits), "An undersized run heats and drops voltage; the local code decides.",
                         src, {"current_A": i, "drop_V": run.drop, "drop_fraction": run.drop_fraction or 0.0}))  # fmt: skip
    return out


def c_cv_ballast(ctx: Context) -> Check | None:
    d = ctx.design
    if not d.is_cv:
        return None
    rating = d.values["array"].get("ballast_rating")
    p = ctx.cv_currents["max"] ** 2 * float(d.values["array"]["ballast"])
    if rating is None:
        return Check("ballast.power", WARN, f"ballast dissipates {fv(p, 'power')} at the worst corner; no rating declared",
                     "Resistors run hot at their rating.", "run at 50 % of rating: common practice", {"power_W": p})  # fmt: skip
    return Check("ballast.power", _ratio_status(p, rating, 0.5), f"ballast dissipates {fv(p, 'power')} against a {fv(rating, 'power')} rating",
                 "Resistors run hot at their rating.", "run at 50 % of rating: common practice", {"power_W": p, "rating_W": rating})  # fmt: skip


def c_cv_headroom(ctx: Context) -> Check | None:
    d = ctx.design
    if not d.is_cv:
        return None
    h = ctx.cv_currents["headroom"]
    return Check("ballast.headroom", PASS if h >= 0.10 else WARN, f"{h:.0%} of the supply across the ballast",
                 "Too little headroom lets Vf spread and temperature swing the current widely.",
                 "keep 10-25 % across the ballast: common practice", {"headroom": h})  # fmt: skip


MAINS_CHECKS: tuple[Callable[[Context], Check | list[Check | None] | None], ...] = (
    c_dropper_class, c_dropper_ac_rating, c_smoothing_open_load, c_smoothing_working, c_bleeders, c_bridge_surge, c_bridge_vrrm,
    c_bridge_average, c_bridge_thermal, c_fuse, c_switch, c_ripple_current, c_life, c_led_current, c_flicker, c_sharing, c_frequency,
    c_wires,
)  # fmt: skip
CV_CHECKS: tuple[Callable[[Context], Check | list[Check | None] | None], ...] = (c_led_current, c_cv_ballast, c_cv_headroom, c_wires)

#: Every check id, for the docs.
CHECK_IDS = (
    "dropper.class", "dropper.ac_rating", "smoothing.open_load", "smoothing.working_voltage", "bleeder.dropper", "bleeder.smoothing",
    "bridge.surge", "bridge.vrrm", "bridge.average", "bridge.thermal", "fuse.rating", "switch.rating", "smoothing.ripple_current",
    "smoothing.life", "led.current", "flicker.ieee1789", "strings.sharing", "mains.region", "wire.N", "ballast.power", "ballast.headroom",
)  # fmt: skip


def run_checks(ctx: Context) -> list[Check]:
    out: list[Check] = []
    for fn in CV_CHECKS if ctx.design.is_cv else MAINS_CHECKS:
        r = fn(ctx)
        for c in r if isinstance(r, list) else [r]:
            if c is not None:
                out.append(c)
    return out
