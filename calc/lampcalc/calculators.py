"""Every calculator's declaration and the thin glue from parsed inputs to the
physics modules."""

from __future__ import annotations

import math
from collections.abc import Mapping

from . import cautions as caution_text
from .errors import InputError, NoSolutionError
from .physics import camera, harmonic_limits, light, strings, wire
from .physics import dropper as drop
from .physics import ripple as rip
from .physics.flicker import ieee1789_band
from .physics.led import DEFAULT_TEMPCO, LedModule
from .quantities.eseries import SERIES, next_down, preferred
from .quantities.regions import PRESETS
from .quantities.units import DIMENSIONS, format_value, parse
from .schema import Calculator, Output, Param, Result, Sweep, Value

V = Mapping[str, Value]


def f(v: V, name: str) -> float:
    x = v[name]
    assert isinstance(x, float), name
    return x


def opt(v: V, name: str) -> float | None:
    x = v.get(name)
    return x if isinstance(x, float) else None


# --- shared groups of inputs -------------------------------------------------


def mains_params(default_region: str = "230-50", modes: tuple[str, ...] = ()) -> tuple[Param, ...]:
    return (
        Param(
            "region",
            "Mains preset",
            "region",
            default_region,
            "Fills voltage, frequency and tolerance from a region preset; 'custom' uses the fields below.",
            modes=modes,
        ),
        Param(
            "mains_voltage",
            "Mains voltage (rms)",
            "voltage",
            None,
            "Nominal rms mains voltage; blank takes the preset's.",
            1.0,
            1000.0,
            modes=modes,
        ),
        Param(
            "frequency",
            "Mains frequency",
            "frequency",
            None,
            "Mains frequency; blank takes the preset's.",
            1.0,
            1000.0,
            modes=modes,
        ),
        Param(
            "mains_tolerance",
            "Mains tolerance (±)",
            "ratio",
            None,
            "Band around nominal for the worst cases; blank takes the preset's band.",
            0.0,
            0.5,
            modes=modes,
        ),
    )


def module_params(v0: str = "2.7 V", rd: str = "2 Ω", imax: str = "60 mA") -> tuple[Param, ...]:
    return (
        Param(
            "v0",
            "Module knee voltage V0",
            "voltage",
            v0,
            "Where the module's straight line V = V0 + Rd·I meets zero current, at 25 °C.",
            0.1,
            500.0,
            exclusive_min=True,
        ),
        Param(
            "r_dynamic",
            "Module dynamic resistance Rd",
            "resistance",
            rd,
            "Slope of the module's V-I line above the knee.",
            0.0,
            1e6,
        ),
        Param(
            "current_max",
            "Module maximum current",
            "current",
            imax,
            "The module's rated maximum current.",
            0.0,
            100.0,
            exclusive_min=True,
        ),
        Param(
            "vf_tempco",
            "Vf temperature coefficient",
            "tempco",
            f"{DEFAULT_TEMPCO * 1000:g} mV/K",
            "Per module; the default is a textbook value for one die: use the datasheet's.",
            -1.0,
            1.0,
        ),
        Param(
            "vf_spread",
            "Vf tolerance (±)",
            "ratio",
            "3 %",
            "Spread of forward voltage between modules, as a fraction of Vf at the working current.",
            0.0,
            0.4,
        ),
    )


def module_from(v: V, current_ref: float | None = None) -> LedModule:
    return LedModule(
        v0=f(v, "v0"),
        r_dynamic=f(v, "r_dynamic"),
        current_max=f(v, "current_max"),
        vf_tempco=f(v, "vf_tempco"),
        vf_spread=f(v, "vf_spread"),
        current_ref=current_ref,
    )


def mains_range(v: V) -> tuple[float, float, float, float]:
    """Nominal, low, high rms volts and the frequency."""
    vn = f(v, "mains_voltage")
    return vn, vn * (1 - f(v, "mains_minus")), vn * (1 + f(v, "mains_plus")), f(v, "frequency")


# --- quantity ---------------------------------------------------------------


def _quantity(v: V) -> Result:
    dim = str(v["dimension"])
    x = parse(str(v["text"]), dim, "text")
    return Result({"si": x, "formatted": format_value(x, dim), "exact": format_value(x, dim, None)})


QUANTITY = Calculator(
    "quantity",
    "Quantity reader",
    "Reads a value as people type it and shows it in SI.",
    (
        Param("text", "Value", "text", "22 uF", "The value with its unit, e.g. '22 uF' or '18 AWG'."),
        Param(
            "dimension",
            "Kind of quantity",
            "choice",
            "capacitance",
            "What the value measures.",
            choices=tuple(DIMENSIONS),
        ),
    ),
    (
        Output("si", "SI value", "text"),
        Output("formatted", "Reads as", "text"),
        Output("exact", "Exact", "text"),
    ),
    _quantity,
    main=("formatted",),
)


# --- LED module -------------------------------------------------------------


def _module(v: V) -> Result:
    pts = [opt(v, k) for k in ("i1", "v1", "i2", "v2")]
    kw = {"current_max": f(v, "current_max"), "vf_tempco": f(v, "vf_tempco"), "vf_spread": f(v, "vf_spread")}
    i = f(v, "current")
    notes = []
    if all(p is not None for p in pts):
        i1, v1, i2, v2 = (p for p in pts if p is not None)
        try:
            m = LedModule.from_points(i1, v1, i2, v2, current_ref=i, **kw)
        except InputError as e:
            # name the options the user typed, not the core's internal pair
            field = "v2" if "voltage" in e.expected else "i2"
            shown = f"{format_value(i1, 'current')}, {format_value(v1, 'voltage')} and "
            shown += f"{format_value(i2, 'current')}, {format_value(v2, 'voltage')}"
            raise InputError(field, shown, f"{e.expected} (from i1, v1 and i2, v2)") from None
        notes.append("V0 and Rd fitted through the two datasheet points.")
    elif any(p is not None for p in pts):
        raise InputError("i1", "partly given", "all four of i1, v1, i2, v2, or none")
    else:
        m = LedModule(v0=f(v, "v0"), r_dynamic=f(v, "r_dynamic"), current_ref=i, **kw)
    t = f(v, "temperature")
    vf = m.voltage(i, t)
    volt = opt(v, "voltage")
    warnings = []
    if i > m.current_max:
        warnings.append(
            f"{format_value(i, 'current')} is above the module's maximum {format_value(m.current_max, 'current')}."
        )
    return Result(
        {
            "v0_V": m.v0,
            "r_dynamic_ohm": m.r_dynamic,
            "vf_V": vf,
            "vf_min_V": m.voltage(i, t, -1),
            "vf_max_V": m.voltage(i, t, +1),
            "power_W": vf * i,
            "current_at_voltage_A": m.current(volt, t) if volt is not None else None,
        },
        notes=tuple(notes),
        warnings=tuple(warnings),
    )


MODULE = Calculator(
    "module",
    "LED module line",
    "Straight-line model of a module: voltage at a current, current at a voltage, tolerance band.",
    (
        *module_params(),
        Param(
            "i1",
            "Datasheet point 1: current",
            "current",
            None,
            "With v1, i2, v2: fit V0 and Rd from two points.",
            0.0,
            100.0,
        ),
        Param("v1", "Datasheet point 1: voltage", "voltage", None, "", 0.0, 1000.0),
        Param("i2", "Datasheet point 2: current", "current", None, "", 0.0, 100.0),
        Param("v2", "Datasheet point 2: voltage", "voltage", None, "", 0.0, 1000.0),
        Param(
            "current",
            "Working current",
            "current",
            "20 mA",
            "Current at which to report the voltage.",
            0.0,
            100.0,
        ),
        Param(
            "voltage",
            "Voltage to test",
            "voltage",
            None,
            "If given, the current the module draws at it.",
            0.0,
            1000.0,
        ),
        Param("temperature", "Module temperature", "temperature", "25 °C", "", -60.0, 200.0),
    ),
    (
        Output("v0_V", "Knee voltage V0", "voltage"),
        Output("r_dynamic_ohm", "Dynamic resistance Rd", "resistance"),
        Output("vf_V", "Forward voltage", "voltage"),
        Output("vf_min_V", "Forward voltage, low end", "voltage"),
        Output("vf_max_V", "Forward voltage, high end", "voltage"),
        Output("power_W", "Module power", "power"),
        Output("current_at_voltage_A", "Current at the test voltage", "current", absent="no test voltage given"),
    ),
    _module,
    main=("vf_V", "vf_min_V", "vf_max_V"),
    secondary=("current_max", "vf_tempco", "vf_spread", "i1", "v1", "i2", "v2", "voltage"),
)


# --- string planner -------------------------------------------------------------


def _string(v: V) -> Result:
    supply = str(v["supply"])
    i = f(v, "current")
    m = module_from(v, current_ref=i)
    t_cold, t_hot = f(v, "temperature_cold"), f(v, "temperature_hot")
    if t_cold > t_hot:
        raise InputError(
            "temperature_cold",
            format_value(t_cold, "temperature"),
            f"a temperature at or below temperature_hot ({format_value(t_hot, 'temperature')})",
        )
    warnings: list[str] = []
    notes: list[str] = []
    if i > m.current_max:
        warnings.append("The target current is above the module's maximum.")
    if supply == "cv":
        opts = strings.cv_options(
            m,
            f(v, "supply_voltage"),
            f(v, "supply_tolerance"),
            i,
            t_cold,
            t_hot,
            str(v["e_series"]),
            f(v, "derating"),
        )
        if not opts:
            raise NoSolutionError(
                "supply_voltage",
                format_value(f(v, "supply_voltage"), "voltage"),
                "a supply above one module's forward voltage",
                "no series count fits this supply",
            )
        want = opt(v, "series")
        pick = next((o for o in opts if o.series == want), None) if want else strings.cv_pick(opts)
        if want and pick is None:
            raise InputError("series", int(want), f"at most {opts[-1].series} modules for this supply")
        if pick is None:
            pick = opts[0]
            warnings.append("No series count keeps 10 % headroom; current will swing with Vf and temperature.")
        if pick.headroom < strings.MIN_HEADROOM:
            warnings.append(
                f"Headroom {pick.headroom:.0%} is under 10 % (common practice: keep 10-25 % across the ballast)."
            )
        if pick.current_max > m.current_max:
            warnings.append("At the worst corner the string current exceeds the module's maximum.")
        if pick.resistor_power > 3.0:
            warnings.append(
                f"The ballast would dissipate {format_value(pick.resistor_power, 'power')} at the worst corner: "
                "beyond the small resistors used for ballast (common practice: up to about 3 W). "
                "Use more modules in series or a lower supply."
            )
        notes.append("Worst-case high: high supply, low Vf, hot. Low: low supply, high Vf, cold.")
        values: dict[str, Value] = {
            "series": float(pick.series),
            "ballast_exact_ohm": pick.ballast_exact,
            "ballast_ohm": pick.ballast,
            "string_current_A": pick.current,
            "string_current_min_A": pick.current_min,
            "string_current_max_A": pick.current_max,
            "resistor_power_W": pick.resistor_power,
            "resistor_rating_W": pick.resistor_rating,
            "efficiency": pick.efficiency,
            "headroom": pick.headroom,
        }
        rows = tuple(
            {
                "series": float(o.series),
                "ballast_ohm": o.ballast,
                "string_current_A": o.current,
                "string_current_max_A": o.current_max,
                "resistor_power_W": o.resistor_power,
                "efficiency": o.efficiency,
                "headroom": o.headroom,
            }
            for o in opts
        )
        return Result(values, rows, tuple(notes), tuple(warnings), caution_text.LOW_VOLTAGE)
    if supply == "cc":
        mods = opt(v, "modules")
        if f(v, "driver_v_min") >= f(v, "driver_v_max"):
            raise InputError(
                "driver_v_min",
                format_value(f(v, "driver_v_min"), "voltage"),
                f"a voltage below driver_v_max ({format_value(f(v, 'driver_v_max'), 'voltage')})",
            )
        cc = strings.cc_options(
            m,
            f(v, "driver_current"),
            f(v, "driver_v_min"),
            f(v, "driver_v_max"),
            t_cold,
            t_hot,
            int(f(v, "series_max")),
            int(f(v, "parallel_max")),
            int(mods) if mods else None,
        )
        ok = [o for o in cc if o.within_rating]
        if not ok:
            warnings.append("No arrangement fits the driver's window with every string within the module's rating.")
        best = max(ok, key=lambda o: o.series * o.parallel) if ok else None
        values = {
            "series": float(best.series) if best else None,
            "parallel": float(best.parallel) if best else None,
            "string_current_A": best.string_current if best else None,
            "voltage_cold_V": best.voltage_cold if best else None,
            "voltage_hot_V": best.voltage_hot if best else None,
        }
        if best and best.parallel > 1:
            warnings.append(
                "Parallel strings on one driver share current by their Vf: match the modules or add ballast."
            )
        rows_cc: tuple[Mapping[str, Value], ...] = tuple(
            {
                "series": float(o.series),
                "parallel": float(o.parallel),
                "string_current_A": o.string_current,
                "voltage_cold_V": o.voltage_cold,
                "voltage_hot_V": o.voltage_hot,
                "rating": "ok" if o.within_rating else "over rating",
            }
            for o in cc
        )
        notes.append("Cold: high Vf end at the cold temperature; hot: low Vf end at the hot temperature.")
        return Result(values, rows_cc, tuple(notes), tuple(warnings), caution_text.LOW_VOLTAGE)
    # dropper bus
    vn, _, _, fr = mains_range(v)
    dopts = strings.dropper_options(m, vn, fr, f(v, "mains_plus"), i, f(v, "diode_drop"))
    if not dopts:
        raise NoSolutionError(
            "mains_voltage",
            format_value(vn, "voltage"),
            "a mains peak above one module",
            "no series count conducts",
        )
    frac = f(v, "bus_fraction")
    pick_d = min(dopts, key=lambda o: abs(o.fraction - frac))
    if pick_d.current_high_mains > m.current_max:
        warnings.append(
            f"At high mains the string current reaches {format_value(pick_d.current_high_mains, 'current')}, "
            f"above the module's maximum {format_value(m.current_max, 'current')}."
        )
    notes.append(
        "A higher bus needs a smaller dropper and wastes less in it, but the current follows the mains more "
        "steeply (sensitivity = Vpk / (Vpk - Vbus - 2 Vd)) and a low-mains dip dims it more."
    )
    values = {
        "series": float(pick_d.series),
        "bus_voltage_V": pick_d.bus,
        "bus_fraction": pick_d.fraction,
        "capacitance_F": pick_d.capacitance,
        "string_current_max_A": pick_d.current_high_mains,
        "sensitivity": pick_d.sensitivity,
    }
    rows = tuple(
        {
            "series": float(o.series),
            "bus_voltage_V": o.bus,
            "bus_fraction": o.fraction,
            "capacitance_F": o.capacitance,
            "string_current_max_A": o.current_high_mains,
            "sensitivity": o.sensitivity,
        }
        for o in dopts
    )
    return Result(values, rows, tuple(notes), tuple(warnings), caution_text.MAINS)


_CV, _CC, _DR = ("cv",), ("cc",), ("dropper",)
STRING = Calculator(
    "string",
    "String planner",
    "Series and parallel counts for a constant-voltage supply, a constant-current driver or a dropper bus.",
    (
        Param(
            "supply",
            "Supply kind",
            "choice",
            "cv",
            "cv: constant voltage with ballast; cc: constant-current driver; dropper: mains dropper bus.",
            choices=("cv", "cc", "dropper"),
        ),
        *module_params(),
        Param(
            "current",
            "Target current per string",
            "current",
            "20 mA",
            "",
            0.0,
            100.0,
            exclusive_min=True,
            modes=_CV + _DR,
        ),
        Param("temperature_cold", "Coldest module temperature", "temperature", "0 °C", "", -60.0, 200.0),
        Param("temperature_hot", "Hottest module temperature", "temperature", "70 °C", "", -60.0, 200.0),
        Param(
            "supply_voltage",
            "Supply voltage",
            "voltage",
            "24 V",
            "",
            0.0,
            1000.0,
            exclusive_min=True,
            modes=_CV,
        ),
        Param("supply_tolerance", "Supply tolerance (±)", "ratio", "5 %", "", 0.0, 0.5, modes=_CV),
        Param(
            "series",
            "Series count",
            "count",
            None,
            "Blank: the longest string that keeps 10 % headroom.",
            1,
            1000,
            modes=_CV,
        ),
        Param(
            "e_series",
            "Resistor series",
            "choice",
            "E24",
            "Preferred values for the ballast (next value up).",
            choices=tuple(SERIES),
            modes=_CV,
        ),
        Param(
            "derating",
            "Resistor derating",
            "ratio",
            "50 %",
            "Run resistors at most at this fraction of their rating (common practice).",
            0.05,
            1.0,
            modes=_CV,
        ),
        Param(
            "driver_current",
            "Driver output current",
            "current",
            "350 mA",
            "",
            0.0,
            100.0,
            exclusive_min=True,
            modes=_CC,
        ),
        Param("driver_v_min", "Driver voltage window, low", "voltage", "9 V", "", 0.0, 1000.0, modes=_CC),
        Param("driver_v_max", "Driver voltage window, high", "voltage", "36 V", "", 0.0, 1000.0, modes=_CC),
        Param("modules", "Modules to place", "count", None, "Blank: every count that fits.", 1, 10000, modes=_CC),
        Param("series_max", "Longest string to try", "count", "40", "", 1, 1000, modes=_CC),
        Param("parallel_max", "Most strings to try", "count", "8", "", 1, 100, modes=_CC),
        *mains_params(modes=_DR),
        Param("diode_drop", "Bridge diode drop (each)", "voltage", "0.9 V", "", 0.0, 5.0, modes=_DR),
        Param("bus_fraction", "Bus as a fraction of mains peak", "ratio", "50 %", "", 0.05, 0.95, modes=_DR),
    ),
    (
        Output("series", "Modules in series", "count"),
        Output("parallel", "Strings in parallel", "count", modes=("cc",)),
        Output("ballast_exact_ohm", "Ballast, exact", "resistance", modes=("cv",)),
        Output("ballast_ohm", "Ballast, preferred value", "resistance", modes=("cv",)),
        Output("string_current_A", "String current", "current", modes=("cv", "cc")),
        Output("string_current_min_A", "String current, worst low", "current", modes=("cv",)),
        Output("string_current_max_A", "String current, worst high", "current", modes=("cv", "dropper")),
        Output("resistor_power_W", "Ballast dissipation, worst", "power", modes=("cv",)),
        Output("resistor_rating_W", "Ballast rating needed", "power", modes=("cv",)),
        Output("efficiency", "Efficiency", "ratio", modes=("cv",)),
        Output("headroom", "Headroom", "ratio", modes=("cv",)),
        Output("voltage_cold_V", "String voltage, cold", "voltage", modes=("cc",)),
        Output("voltage_hot_V", "String voltage, hot", "voltage", modes=("cc",)),
        Output("bus_voltage_V", "Bus voltage", "voltage", modes=("dropper",)),
        Output("bus_fraction", "Bus / mains peak", "ratio", modes=("dropper",)),
        Output("capacitance_F", "Dropper capacitance", "capacitance", modes=("dropper",)),
        Output("sensitivity", "Current sensitivity to mains", "count", modes=("dropper",)),
    ),
    _string,
    mains=False,
    mode="supply",
    mains_modes=("dropper",),
    columns=(
        Output("series", "S", "count"),
        Output("parallel", "P", "count"),
        Output("ballast_ohm", "Ballast", "resistance"),
        Output("string_current_A", "I", "current"),
        Output("string_current_max_A", "I worst", "current"),
        Output("voltage_cold_V", "V cold", "voltage"),
        Output("voltage_hot_V", "V hot", "voltage"),
        Output("bus_voltage_V", "Bus", "voltage"),
        Output("capacitance_F", "Dropper", "capacitance"),
        Output("sensitivity", "Sensitivity", "count"),
        Output("resistor_power_W", "P ballast", "power"),
        Output("efficiency", "Efficiency", "ratio"),
        Output("headroom", "Headroom", "ratio"),
        Output("rating", "Rating", "text"),
    ),
    main=("series", "parallel", "string_current_A", "ballast_ohm"),
    secondary=(
        "v0",
        "r_dynamic",
        "current_max",
        "vf_tempco",
        "vf_spread",
        "temperature_cold",
        "temperature_hot",
        "supply_tolerance",
        "e_series",
        "derating",
        "series_max",
        "parallel_max",
        "mains_voltage",
        "frequency",
        "mains_tolerance",
        "diode_drop",
        "bus_fraction",
    ),
)


# --- dropper ------------------------------------------------------------------


def _dropper(v: V) -> Result:
    vn, vlo, vhi, fr = mains_range(v)
    vbus, vd, rs = f(v, "bus_voltage"), f(v, "diode_drop"), f(v, "series_resistance")
    c = f(v, "capacitance")
    ctol = f(v, "cap_tolerance")
    warnings: list[str] = []
    if math.sqrt(2) * vlo <= vbus + 2 * vd:
        warnings.append("At low mains the crest does not reach the bus plus two diode drops: no current flows.")
    i_avg = drop.average_current(vn, fr, c, vbus, vd)
    if i_avg == 0:
        raise NoSolutionError(
            "bus_voltage",
            format_value(vbus, "voltage"),
            f"a bus below the mains peak {format_value(math.sqrt(2) * vn, 'voltage')} less two diode drops",
            "the bridge never conducts",
        )
    other = 60.0 if fr == 50.0 else 50.0
    target = opt(v, "target_current")
    c_need = drop.capacitance_for(target, vn, fr, vbus, vd) if target else None
    stock = opt(v, "stock_capacitance")
    rows: list[dict[str, Value]] = []
    bank = None
    notes_bank: list[str] = []
    if stock:
        need = c_need if c_need else c
        if need / stock > 1000:
            raise InputError(
                "stock_capacitance",
                format_value(stock, "capacitance"),
                f"at least 1/1000 of the {format_value(need, 'capacitance')} needed",
            )
        bank = float(max(1, math.ceil(need / stock - 1e-9)))
        for k in range(1, int(bank) + 1):
            rows.append(
                {
                    "step": float(k),
                    "capacitance_F": k * stock,
                    "led_current_avg_A": drop.average_current(vn, fr, k * stock, vbus, vd),
                }
            )
        # every row below is for the bank that will be built, not the capacitance typed
        c = bank * stock
        i_avg = drop.average_current(vn, fr, c, vbus, vd)
        notes_bank.append(
            f"Every value above is for the bank: {int(bank)} × {format_value(stock, 'capacitance')} = "
            f"{format_value(c, 'capacitance')}."
        )
    elif c_need:
        notes_bank.append(
            f"The values above are for the {format_value(c, 'capacitance')} entered; the target needs "
            f"{format_value(c_need, 'capacitance')} (give a stock value to see the bank)."
        )
    c_hi = c * (1 + ctol)
    pk_hi = math.sqrt(2) * vhi
    t_dis, v_lim = f(v, "discharge_time"), f(v, "discharge_voltage")
    r_max = drop.bleeder_max(c_hi, t_dis, pk_hi, v_lim)
    bleeder = opt(v, "bleeder")
    r_b = bleeder if bleeder else next_down(r_max, "E12")
    t_b = drop.discharge_time(c_hi, r_b, pk_hi, v_lim)
    if bleeder and t_b > t_dis:
        warnings.append(
            f"The {format_value(bleeder, 'resistance')} bleeder takes {t_b:.2f} s, over the {t_dis:g} s target."
        )
    i_cap_hi = drop.capacitor_rms_current(vhi, fr, c_hi, vbus, vd)
    i_led_hi = drop.average_current(vhi, fr, c_hi, vbus, vd)
    p_series = i_cap_hi**2 * rs
    shown: dict[str, str] = {}
    if rs == 0:
        shown["switch_on_peak_A"] = "not limited (no series resistor)"
        shown["pulse_energy_J"] = "does not apply (no series resistor)"
        warnings.append(
            "With no series resistor nothing but the wiring limits the switch-on current: "
            "the capacitor, bridge and switch take the full mains crest. Fit a surge resistor."
        )
    if p_series > 2.0:
        warnings.append(
            f"The series resistor would dissipate {format_value(p_series, 'power')} at high mains: far beyond "
            "the small resistors used here (common practice: under 1 W). Check the capacitance."
        )
    if i_led_hi > 0.2:
        warnings.append(
            f"{format_value(i_led_hi, 'current')} into the LEDs at high mains is beyond what a dropper feeds "
            "loose LED modules (common practice: tens of mA). Check the capacitance against the modules' maximum."
        )
    notes = (
        "Average LED current by charge balance: I = 4·f·C·(Vpk − Vbus − 2·Vd); assumes ideal diodes, a bus held "
        "steady by a large smoothing capacitor and no series resistance. The naive V/Xc is the rms current into a "
        "short circuit. `lampbook check` solves the real circuit.",
        "Discharge default: 34 V within 1 s after unplugging at the crest (IEC 60335-1 cl. 22.5, applied by analogy).",
        "Small film resistors are often limited to about 200-250 V working voltage: "
        "split the bleeder in series (common practice).",
    )
    vals: dict[str, Value] = {
        "peak_voltage_V": math.sqrt(2) * vn,
        "reactance_ohm": drop.reactance(c, fr),
        "current_naive_A": drop.naive_current(vn, fr, c),
        "led_current_avg_A": i_avg,
        "led_current_low_A": drop.average_current(vlo, fr, c * (1 - ctol), vbus, vd),
        "led_current_high_A": drop.average_current(vhi, fr, c_hi, vbus, vd),
        "led_current_other_frequency_A": drop.average_current(vn, other, c, vbus, vd),
        "capacitor_current_rms_A": drop.capacitor_rms_current(vn, fr, c, vbus, vd),
        "capacitor_current_rms_high_A": i_cap_hi,
        "capacitor_peak_voltage_V": drop.capacitor_peak_voltage(vhi, vbus, vd),
        "capacitor_ac_rating_V": vhi,
        "capacitance_needed_F": c_need,
        "bank_count": bank,
        "bleeder_max_ohm": r_max,
        "bleeder_ohm": r_b,
        "bleeder_discharge_time_s": t_b,
        "bleeder_power_W": vhi**2 / r_b,
        "bleeder_working_voltage_V": pk_hi,
        "bleeder_parts": float(max(1, math.ceil(pk_hi / drop.SMALL_RESISTOR_LIMITING_V))),
        "switch_on_peak_A": drop.switch_on_peak(pk_hi, rs) if rs > 0 else None,
        "pulse_energy_J": drop.pulse_energy(c_hi, pk_hi) if rs > 0 else None,
        "series_resistor_power_W": p_series,
    }
    return Result(vals, tuple(rows), (*notes, *notes_bank), tuple(warnings), display=shown)


DROPPER = Calculator(
    "dropper",
    "Dropper capacitor",
    "Capacitor, current, bank steps, bleeder and surge for a capacitive dropper feeding a bridge.",
    (
        *mains_params(),
        Param(
            "capacitance",
            "Dropper capacitance",
            "capacitance",
            "1 µF",
            "The X2 capacitor (or bank) in series with the line.",
            1e-12,
            1e-2,
            exclusive_min=True,
        ),
        Param("cap_tolerance", "Capacitor tolerance (±)", "ratio", "10 %", "", 0.0, 0.5),
        Param(
            "bus_voltage",
            "Bus (LED string) voltage",
            "voltage",
            "100 V",
            "Voltage the smoothing capacitor holds: the string voltage.",
            0.0,
            1000.0,
        ),
        Param(
            "diode_drop",
            "Bridge diode drop (each)",
            "voltage",
            "0.9 V",
            "Two diodes conduct at a time.",
            0.0,
            5.0,
        ),
        Param(
            "series_resistance",
            "Series resistor",
            "resistance",
            "100 Ω",
            "Surge limiter in the line.",
            0.0,
            1e5,
        ),
        Param(
            "target_current",
            "Target LED current",
            "current",
            None,
            "If given, the capacitance that delivers it.",
            0.0,
            10.0,
            exclusive_min=True,
        ),
        Param(
            "stock_capacitance",
            "Stock capacitor value",
            "capacitance",
            None,
            "If given, how many in parallel, and the current at each step of the bank.",
            1e-12,
            1e-2,
            exclusive_min=True,
        ),
        Param("discharge_time", "Discharge time target", "time", "1 s", "", 0.0, 600.0, exclusive_min=True),
        Param(
            "discharge_voltage",
            "Discharge voltage target",
            "voltage",
            "34 V",
            "",
            0.0,
            1000.0,
            exclusive_min=True,
        ),
        Param(
            "bleeder",
            "Bleeder resistor",
            "resistance",
            None,
            "Blank: the next E12 value below the largest that meets the target.",
            0.0,
            1e9,
            exclusive_min=True,
        ),
    ),
    (
        Output("peak_voltage_V", "Mains peak", "voltage"),
        Output("reactance_ohm", "Reactance Xc", "resistance"),
        Output("current_naive_A", "Naive current V/Xc (rms)", "current"),
        Output(
            "led_current_avg_A",
            "LED current, average",
            "current",
            "Charge balance, nominal mains and capacitance.",
        ),
        Output("led_current_low_A", "LED current, low mains and low C", "current"),
        Output("led_current_high_A", "LED current, high mains and high C", "current"),
        Output("led_current_other_frequency_A", "LED current on the other mains frequency", "current"),
        Output("capacitor_current_rms_A", "Capacitor current (rms)", "current"),
        Output("capacitor_current_rms_high_A", "Capacitor current (rms), high mains", "current"),
        Output("capacitor_peak_voltage_V", "Capacitor peak voltage, high mains", "voltage"),
        Output("capacitor_ac_rating_V", "Capacitor AC rating at least", "voltage"),
        Output("capacitance_needed_F", "Capacitance for the target", "capacitance", absent="no target current given"),
        Output("bank_count", "Stock capacitors in parallel", "count", absent="no stock capacitor given"),
        Output("bleeder_max_ohm", "Bleeder, largest allowed", "resistance"),
        Output("bleeder_ohm", "Bleeder", "resistance"),
        Output("bleeder_discharge_time_s", "Bleeder discharge time", "time"),
        Output("bleeder_power_W", "Bleeder dissipation, high mains", "power"),
        Output("bleeder_working_voltage_V", "Bleeder working voltage", "voltage"),
        Output("bleeder_parts", "Bleeder resistors in series", "count"),
        Output("switch_on_peak_A", "Switch-on peak current", "current"),
        Output("pulse_energy_J", "Switch-on pulse energy in the resistor", "energy"),
        Output("series_resistor_power_W", "Series resistor dissipation", "power"),
    ),
    _dropper,
    mains=True,
    columns=(
        Output("step", "Capacitors", "count"),
        Output("capacitance_F", "C", "capacitance"),
        Output("led_current_avg_A", "LED current", "current"),
    ),
    plots=(
        Sweep(
            "current_vs_mains",
            "mains_voltage",
            "led_current_avg_A",
            "LED current against mains voltage",
            "Mains voltage",
            "LED current",
            0.85,
            1.15,
        ),
    ),
    main=("led_current_avg_A", "led_current_low_A", "led_current_high_A"),
    secondary=(
        "mains_voltage",
        "frequency",
        "mains_tolerance",
        "cap_tolerance",
        "diode_drop",
        "discharge_time",
        "discharge_voltage",
        "bleeder",
    ),
)


# --- ripple ---------------------------------------------------------------------


def _ripple(v: V) -> Result:
    i, c, fr = f(v, "load_current"), f(v, "capacitance"), f(v, "frequency")
    full = v["rectifier"] == "full"
    pp = rip.ripple_pp(i, fr, c, full)
    s, p = int(f(v, "series")), int(f(v, "parallel"))
    r_string = s * f(v, "r_dynamic") + f(v, "ballast")
    if r_string <= 0:
        raise InputError(
            "r_dynamic",
            format_value(f(v, "r_dynamic"), "resistance"),
            "a module Rd or a ballast above 0 Ω (with neither, the current ripple is unbounded)",
        )
    di = rip.current_ripple(pp, r_string, p)
    pf = rip.percent_flicker_from_ripple(i, di)
    ripple_f = (2 if full else 1) * fr
    band = ieee1789_band(pf, ripple_f)
    notes = [
        "ΔV ≈ I/(2·f·C) assumes the capacitor alone carries the load for the whole ripple period; "
        "it overstates the ripple."
    ]
    warnings = []
    bus = opt(v, "bus_voltage")
    if bus and pp > 0.1 * bus:
        warnings.append(
            "Ripple is over 10 % of the bus: the closed form is a rough upper bound here; solve the steady state."
        )
    if di >= 2 * i:
        warnings.append(
            "Current ripple reaches zero each cycle: the LEDs go dark between peaks "
            "and the closed form no longer holds."
        )
    elif di > 0.2 * i:
        warnings.append(
            "Current ripple is large against the mean: the straight-line estimate is rough; solve the steady state."
        )
    notes.append(f"Flicker band: {band.source}.")
    target = opt(v, "target_ripple")
    return Result(
        {
            "ripple_pp_V": pp,
            "ripple_rms_V": rip.sawtooth_rms(pp),
            "ripple_frequency_Hz": ripple_f,
            "capacitance_for_target_F": rip.capacitance_for_ripple(i, fr, target, full) if target else None,
            "led_ripple_pp_A": di,
            "percent_flicker_pct": pf,
            "flicker_band": band.name,
            "low_risk_limit_pct": band.low_risk_limit,
            "no_effect_limit_pct": band.no_effect_limit,
        },
        notes=tuple(notes),
        warnings=tuple(warnings),
    )


RIPPLE = Calculator(
    "ripple",
    "Smoothing ripple",
    "Bus ripple, LED current ripple and flicker from the smoothing capacitor, closed form.",
    (
        Param("load_current", "LED (load) current", "current", "20 mA", "", 0.0, 100.0, exclusive_min=True),
        Param(
            "capacitance",
            "Smoothing capacitance",
            "capacitance",
            "100 µF",
            "",
            1e-12,
            10.0,
            exclusive_min=True,
        ),
        Param("frequency", "Mains frequency", "frequency", "50 Hz", "", 1.0, 1000.0),
        Param(
            "rectifier",
            "Rectifier",
            "choice",
            "full",
            "full: bridge (ripple at twice mains); half: one diode.",
            choices=("full", "half"),
        ),
        Param("series", "Modules per string", "count", "36", "", 1, 1000),
        Param("parallel", "Strings in parallel", "count", "1", "", 1, 1000),
        Param("r_dynamic", "Module dynamic resistance", "resistance", "2 Ω", "", 0.0, 1e6),
        Param("ballast", "Ballast per string", "resistance", "0 Ω", "", 0.0, 1e6),
        Param("bus_voltage", "Bus voltage", "voltage", "100 V", "For the validity check.", 0.0, 1000.0),
        Param(
            "target_ripple",
            "Target ripple (p-p)",
            "voltage",
            None,
            "If given, the capacitance that meets it.",
            0.0,
            1000.0,
            exclusive_min=True,
        ),
    ),
    (
        Output("ripple_pp_V", "Bus ripple (p-p)", "voltage"),
        Output("ripple_rms_V", "Bus ripple (rms, sawtooth)", "voltage"),
        Output("ripple_frequency_Hz", "Ripple frequency", "frequency"),
        Output(
            "capacitance_for_target_F", "Capacitance for the target", "capacitance", absent="no target ripple given"
        ),
        Output("led_ripple_pp_A", "LED current ripple (p-p)", "current"),
        Output("percent_flicker_pct", "Percent flicker", "percent"),
        Output("flicker_band", "IEEE 1789 band", "text"),
        Output("low_risk_limit_pct", "Low-risk limit", "percent"),
        Output("no_effect_limit_pct", "No-observable-effect limit", "percent"),
    ),
    _ripple,
    mains=True,
    plots=(
        Sweep(
            "ripple_vs_capacitance",
            "capacitance",
            "ripple_pp_V",
            "Bus ripple against smoothing capacitance",
            "Smoothing capacitance",
            "Bus ripple, peak to peak",
            0.25,
            4.0,
            log=True,
        ),
    ),
    main=("ripple_pp_V", "percent_flicker_pct", "flicker_band"),
    secondary=("r_dynamic", "ballast", "bus_voltage", "target_ripple"),
)


# --- wire ------------------------------------------------------------------------


def _wire(v: V) -> Result:
    area = f(v, "size")
    size = wire.size_from_area(area)
    length, i, t = f(v, "length"), f(v, "current"), f(v, "temperature")
    supply = f(v, "supply_voltage")
    r = wire.run(size, length, i, t, supply)
    table = str(v["ampacity_table"])
    table = wire.default_table(size) if table == "auto" else table
    tab = wire.AMPACITY[table]
    amp = wire.ampacity(size, table)
    limit = f(v, "drop_limit")
    best, why = wire.smallest_size(i, length, supply, limit, t, "awg" if size.system == "awg" else "metric", table)
    warnings = [wire.WIRE_CAUTION]
    if r.drop_fraction is not None and r.drop_fraction > limit:
        warnings.append(f"Drop {r.drop_fraction:.1%} is over the {limit:.0%} limit.")
    if amp is not None and i > amp:
        warnings.append(
            f"{format_value(i, 'current')} is over the {format_value(amp, 'current')} the table gives this size."
        )
    iec = wire.iec60228_max(size)
    notes = [
        "Resistance: annealed copper at 100 % IACS (1/58 Ω·mm²/m at 20 °C), α = 0.00393 /K referred to 20 °C.",
        f"Ampacity table: {tab.title} — {tab.source}.",
        "Drop over a two-wire run: ΔV = I × 2L × R′.",
    ]
    return Result(
        {
            "size_name": size.name,
            "diameter_m": size.diameter,
            "area_m2": size.area,
            "resistance_20_ohm_per_m": wire.resistance_per_metre(size.area, 20.0),
            "resistance_ohm_per_m": r.resistance_per_m,
            "iec60228_max_ohm_per_m": iec,
            "loop_resistance_ohm": r.loop_resistance,
            "drop_V": r.drop,
            "drop_fraction": r.drop_fraction,
            "loss_W": r.loss,
            "ampacity_A": amp,
            "ampacity_table": f"{table}: {tab.source}",
            "smallest_size": best.name if best else why,
        },
        notes=tuple(notes),
        warnings=tuple(warnings),
    )


WIRE = Calculator(
    "wire",
    "Wire run",
    "Resistance, drop and loss of a two-wire run, the smallest size for a limit, and ampacity guidance.",
    (
        Param(
            "size",
            "Conductor size",
            "area",
            "0.75 mm²",
            "An AWG gauge ('18 AWG') or a metric area ('0.75 mm²').",
            1e-9,
            1e-3,
            imperial="18 AWG",
        ),
        Param("length", "Run length (one way)", "length", "5 m", "", 0.0, 1e5, imperial="15 ft"),
        Param("current", "Current", "current", "1 A", "", 0.0, 1000.0),
        Param(
            "supply_voltage",
            "Supply voltage",
            "voltage",
            "24 V",
            "For the drop as a fraction.",
            0.0,
            1e5,
            exclusive_min=True,
        ),
        Param("temperature", "Conductor temperature", "temperature", "20 °C", "", -60.0, 250.0),
        Param(
            "drop_limit",
            "Drop limit",
            "ratio",
            "3 %",
            "3 % is a common limit for lighting; low-voltage LED feeds 3-5 % (common practice).",
            0.001,
            0.5,
        ),
        Param(
            "ampacity_table",
            "Ampacity table",
            "choice",
            "auto",
            "auto: US cord table for AWG, IEC 60335-1 cord table for metric.",
            choices=("auto", *wire.AMPACITY),
        ),
    ),
    (
        Output("size_name", "Size", "text"),
        Output("diameter_m", "Diameter (solid)", "length"),
        Output("area_m2", "Area", "area"),
        Output("resistance_20_ohm_per_m", "Resistance per metre at 20 °C", "resistance"),
        Output("resistance_ohm_per_m", "Resistance per metre at temperature", "resistance"),
        Output("iec60228_max_ohm_per_m", "IEC 60228 class 5 maximum per metre", "resistance"),
        Output("loop_resistance_ohm", "Loop resistance (out and back)", "resistance"),
        Output("drop_V", "Voltage drop", "voltage"),
        Output("drop_fraction", "Drop (fraction of supply)", "ratio"),
        Output("loss_W", "Power lost in the run", "power"),
        Output("ampacity_A", "Guidance current for this size", "current"),
        Output("ampacity_table", "From table", "text"),
        Output("smallest_size", "Smallest size for the current and limit", "text"),
    ),
    _wire,
    main=("drop_V", "drop_fraction", "ampacity_A"),
    secondary=("temperature", "drop_limit", "ampacity_table"),
)


# --- preferred values ---------------------------------------------------------------


_PREFERRED_EXPECTED = (
    "a resistance or capacitance above zero, with or without its unit, such as '4200', '4.7k', '4k7', "
    "'4.7 kΩ', '0.22', '220 nF' or '2u2'"
)


def read_preferred(text: str) -> tuple[float, str]:
    """A value for the preferred-values lookup and the kind it was written as:
    a plain number, a resistance or a capacitance."""
    for kind in ("number", "resistance", "capacitance"):
        try:
            x = parse(text, kind, "value")
        except InputError as e:
            if kind == "number" and "reads one way" in e.expected:
                raise  # an ambiguous comma is refused, never guessed at as another kind
            continue
        if not x > 0:
            raise InputError("value", text, _PREFERRED_EXPECTED)
        return x, kind
    raise InputError("value", text, _PREFERRED_EXPECTED)


def _preferred(v: V) -> Result:
    x, kind = read_preferred(str(v["value"]))
    p = preferred(x, str(v["series"]))
    dims = {"nearest": kind, "up": kind, "down": kind}
    return Result({"nearest": p.nearest, "up": p.up, "down": p.down, "error": p.nearest / x - 1}, dims=dims)


PREFERRED = Calculator(
    "preferred",
    "Preferred values",
    "IEC 60063 E6/E12/E24: nearest, next up, next down.",
    (
        Param(
            "value",
            "Value",
            "text",
            "4200",
            "A resistance or capacitance, with or without its unit: '4200', '4.7k', '4k7', '4.7 kΩ', '220 nF', "
            "'2u2'. The answer is in the same unit.",
        ),
        Param("series", "Series", "choice", "E24", "", choices=tuple(SERIES)),
    ),
    (
        Output("nearest", "Nearest", "count"),
        Output("up", "Next up", "count"),
        Output("down", "Next down", "count"),
        Output("error", "Nearest is off by", "ratio"),
    ),
    _preferred,
    main=("nearest", "up", "down"),
)


# --- mains presets -------------------------------------------------------------------


def _mains(v: V) -> Result:
    rows: tuple[Mapping[str, Value], ...] = tuple(
        {
            "preset": k,
            "voltage_V": p.voltage,
            "frequency_Hz": p.frequency,
            "low_V": p.low,
            "high_V": p.high,
            "peak_high_V": p.peak_high,
            "source": p.source,
        }
        for k, p in PRESETS.items()
    )
    p = PRESETS[str(v["region"])] if v["region"] != "custom" else None
    vals: dict[str, Value] = {"voltage_V": f(v, "mains_voltage"), "frequency_Hz": f(v, "frequency")}
    vn, lo, hi, _ = mains_range(v)
    vals.update(
        {
            "low_V": lo,
            "high_V": hi,
            "peak_V": math.sqrt(2) * vn,
            "peak_high_V": math.sqrt(2) * hi,
            "source": p.source if p else "custom values",
        }
    )
    return Result(vals, rows)


MAINS = Calculator(
    "mains",
    "Mains presets",
    "Regional mains voltage, frequency and tolerance bands with their sources.",
    mains_params(),
    (
        Output("voltage_V", "Nominal", "voltage"),
        Output("frequency_Hz", "Frequency", "frequency"),
        Output("low_V", "Low end", "voltage"),
        Output("high_V", "High end", "voltage"),
        Output("peak_V", "Peak at nominal", "voltage"),
        Output("peak_high_V", "Peak at high end", "voltage"),
        Output("source", "Band from", "text"),
    ),
    _mains,
    mains=True,
    columns=(
        Output("preset", "Preset", "text"),
        Output("voltage_V", "Nominal", "voltage"),
        Output("frequency_Hz", "f", "frequency"),
        Output("low_V", "Low", "voltage"),
        Output("high_V", "High", "voltage"),
        Output("peak_high_V", "Peak, high", "voltage"),
        Output("source", "Source", "text"),
    ),
    main=("voltage_V", "low_V", "high_V"),
    secondary=("mains_voltage", "frequency", "mains_tolerance"),
)


# --- light ------------------------------------------------------------------------


def _light(v: V) -> Result:
    m = light.FluxModel(
        f(v, "flux"), f(v, "test_current"), f(v, "test_temperature"), f(v, "current_droop"), f(v, "thermal_droop")
    )
    i, t = f(v, "current"), f(v, "temperature")
    n = int(f(v, "modules"))
    beam = math.radians(f(v, "beam_angle"))
    dist = f(v, "distance")
    one = m.at(i, t)
    flux = n * one * f(v, "optics")
    warnings: list[str] = []
    x = i / m.test_current
    if x > 2 or x < 0.25:
        warnings.append(
            f"The working current is {x:.2g}× the test current: the straight-line droop model is rough this far "
            "from the datasheet's point; read the flux off its curve instead."
        )
    if abs(t - m.test_temperature) > 60:
        warnings.append("The module temperature is far from the test temperature: the linear thermal droop is rough.")
    power = opt(v, "input_power")
    vals: dict[str, Value] = {
        "module_flux_lm": one,
        "relative": one / m.flux,
        "fixture_flux_lm": flux,
        "efficacy_lm_per_W": flux / power if power else None,
        "intensity_cd": light.cone_intensity(flux, beam),
        "illuminance_axis_lx": light.cone_illuminance(flux, beam, dist),
        "illuminance_axis_fc": f"{light.footcandles(light.cone_illuminance(flux, beam, dist)):.4g} fc",
        "distance_ft": f"{light.feet(dist):.4g} ft",
    }
    if beam < math.pi * 0.999:
        dia = light.field_diameter(beam, dist)
        e = light.disc_illuminance(flux, beam, dist)
        vals.update(
            {
                "field_diameter_m": dia,
                "field_diameter_ft": f"{light.feet(dia):.4g} ft",
                "illuminance_average_lx": e,
                "illuminance_average_fc": f"{light.footcandles(e):.4g} fc",
            }
        )
    rows: list[dict[str, Value]] = []
    for k in (0.5, 1.0, 2.0, 4.0):
        dd = dist * k
        e_ax = light.cone_illuminance(flux, beam, dd)
        row: dict[str, Value] = {
            "distance_m": dd,
            "distance_ft": f"{light.feet(dd):.3g} ft",
            "illuminance_axis_lx": e_ax,
            "illuminance_axis_fc": f"{light.footcandles(e_ax):.3g} fc",
        }
        if beam < math.pi * 0.999:
            row["field_diameter_m"] = light.field_diameter(beam, dd)
            row["illuminance_average_lx"] = light.disc_illuminance(flux, beam, dd)
        rows.append(row)
    notes = (
        "Flux model: flux = Φt·(I/It)·(1 − d·(I/It − 1))·(1 − k·(T − Tt)), with Φt, It, Tt, d and k from the "
        "module's datasheet (d from its relative-flux curve, k from its flux at a second temperature).",
        "Uniform cone: all the lumens spread evenly over the cone's solid angle Ω = 2π(1 − cos(β/2)); on-axis "
        "E = (Φ/Ω)/d². Flat disc: the same lumens spread evenly over the lit circle of radius d·tan(β/2). "
        "Real beams are brighter in the centre than the disc average; a meter settles it.",
        "1 fc = 1 lm/ft² = 10.764 lx.",
    )
    return Result(vals, tuple(rows), notes, tuple(warnings), cautions=())


LIGHT = Calculator(
    "light",
    "Light output and illuminance",
    "Lumens from the module datasheet at the working current and temperature, efficacy, and the light on a "
    "target at a distance for a beam angle.",
    (
        Param(
            "flux",
            "Module flux at the test point",
            "luminous_flux",
            "26 lm",
            "Datasheet flux of one module.",
            0.0,
            1e7,
            exclusive_min=True,
        ),
        Param(
            "test_current",
            "Test current",
            "current",
            "60 mA",
            "The datasheet's test current for that flux.",
            0.0,
            100.0,
            exclusive_min=True,
        ),
        Param(
            "test_temperature",
            "Test temperature",
            "temperature",
            "25 °C",
            "The datasheet's test temperature.",
            -60.0,
            200.0,
        ),
        Param(
            "current_droop",
            "Current droop d",
            "ratio",
            "8 %",
            "Efficacy lost per test current of extra current (datasheet curve).",
            0.0,
            0.99,
        ),
        Param(
            "thermal_droop",
            "Thermal droop k",
            "per_kelvin",
            "0.3 %/K",
            "Flux lost per kelvin above the test temperature.",
            0.0,
            0.05,
        ),
        Param("current", "Working current per module (average)", "current", "50 mA", "", 0.0, 100.0),
        Param("temperature", "Module temperature in use", "temperature", "55 °C", "", -60.0, 200.0),
        Param("modules", "Modules in the fixture", "count", "68", "", 1, 100000),
        Param(
            "input_power",
            "Input power at the mains",
            "power",
            None,
            "If given, the efficacy at the mains.",
            0.0,
            1e6,
            exclusive_min=True,
        ),
        Param(
            "optics",
            "Share of the lumens in the beam",
            "ratio",
            "100 %",
            "Optics and reflector losses.",
            0.0,
            1.0,
            exclusive_min=True,
        ),
        Param(
            "beam_angle",
            "Beam angle (full)",
            "angle",
            "110°",
            "Full cone angle of the beam.",
            0.1,
            360.0,
        ),
        Param("distance", "Distance to the target", "length", "3 m", "", 0.01, 1e5, imperial="10 ft"),
    ),
    (
        Output("module_flux_lm", "Flux per module", "luminous_flux"),
        Output("relative", "Against the datasheet's flux", "ratio"),
        Output("fixture_flux_lm", "Fixture flux (in the beam)", "luminous_flux"),
        Output("efficacy_lm_per_W", "Efficacy at the mains", "efficacy", absent="no input power given"),
        Output("intensity_cd", "Intensity (uniform cone)", "luminous_intensity"),
        Output("illuminance_axis_lx", "Illuminance on axis (uniform cone)", "illuminance"),
        Output("illuminance_axis_fc", "… in foot-candles", "text"),
        Output("field_diameter_m", "Field diameter", "length"),
        Output("field_diameter_ft", "… in feet", "text"),
        Output("illuminance_average_lx", "Average over the field (flat disc)", "illuminance"),
        Output("illuminance_average_fc", "… in foot-candles", "text"),
        Output("distance_ft", "Distance in feet", "text"),
    ),
    _light,
    columns=(
        Output("distance_m", "Distance", "length"),
        Output("distance_ft", "", "text"),
        Output("illuminance_axis_lx", "On axis", "illuminance"),
        Output("illuminance_average_lx", "Average", "illuminance"),
        Output("field_diameter_m", "Field", "length"),
    ),
    main=("fixture_flux_lm", "illuminance_axis_lx", "field_diameter_m"),
    secondary=("test_current", "test_temperature", "current_droop", "thermal_droop", "input_power", "optics"),
)


# --- camera -----------------------------------------------------------------------


def _light_shape(shape: str, m: float, n: int = 512) -> list[float]:
    """One ripple period of relative light with percent flicker 100·m."""
    if shape == "sine":
        return [max(1 + m * math.sin(2 * math.pi * k / n), 0.0) for k in range(n)]
    if shape == "sawtooth":
        return [1 + m - 2 * m * k / n for k in range(n)]
    # rectified sine riding on a floor a: min a, max a + 1
    a = (1 - m) / (2 * m) if m > 0 else 1e9
    return [a + abs(math.sin(math.pi * k / n)) for k in range(n)]


def _camera(v: V) -> Result:
    fr = f(v, "frequency")
    ripple = (2 if v["rectifier"] == "full" else 1) * fr
    m = f(v, "percent_flicker")
    fps = f(v, "frame_rate")
    if v["shutter"] == "angle":
        tau = camera.shutter_from_angle(f(v, "shutter_angle"), fps)
    else:
        tau = f(v, "shutter_time")
        if tau > 1 / fps * (1 + 1e-9):
            raise InputError(
                "shutter_time", format_value(tau, "time"), f"at most one frame ({format_value(1 / fps, 'time')})"
            )
    thr = f(v, "threshold")
    exp = camera.Exposure(_light_shape(str(v["shape"]), m), 1 / ripple)
    var, lo, hi = exp.variation(tau)
    band = ieee1789_band(100 * m, ripple)
    rows: tuple[Mapping[str, Value], ...] = tuple(
        {
            "setting": s.label,
            "time_s": s.shutter_time,
            "variation": s.variation,
            "ok": "yes" if s.ok else "no",
        }
        for s in camera.settings(exp, fps, thr, 256)
    )
    ranges = camera.safe_ranges(exp, fps, thr)
    zero = camera.ripple_multiples(ripple, fps)
    ok = var <= thr
    warnings = (
        []
        if ok
        else [f"Exposure varies {var:.1%} from frame to frame at the worst phase: over the {thr:.1%} threshold."]
    )
    return Result(
        {
            "shutter_time_s": tau,
            "ripple_frequency_Hz": ripple,
            "variation": var,
            "exposure_low": lo,
            "exposure_high": hi,
            "beat_Hz": camera.beat_frequency(ripple, fps),
            "verdict": "under the threshold" if ok else "over the threshold",
            "safe": "; ".join(f"{format_value(a, 'time', 3)}–{format_value(b, 'time', 3)}" for a, b in ranges)
            or "none",
            "zero": ", ".join(format_value(t, "time", 3) for t in zero) or "none within one frame",
            "flicker_band": band.name,
        },
        rows,
        (
            "Exposure of a frame = the light integrated over the open shutter. The camera's clock is not locked "
            "to the mains, so over a take every phase comes round: the variation is the spread between the "
            "brightest and darkest frame, over the mean.",
            "A shutter open for a whole number of ripple periods sees no change at all.",
            "'Shows at': the ripple folded about the nearest multiple of the frame rate; near 0 Hz the change "
            "drifts slowly with the mains frequency.",
            f"Flicker band: {band.source}.",
        ),
        tuple(warnings),
        cautions=(),
    )


CAMERA = Calculator(
    "camera",
    "Flicker on camera",
    "Frame-to-frame exposure variation from the light ripple for a frame rate and shutter, and the shutter "
    "settings that keep it under a threshold.",
    (
        Param("frequency", "Mains frequency", "frequency", "50 Hz", "", 1.0, 1000.0),
        Param(
            "rectifier",
            "Rectifier",
            "choice",
            "full",
            "full: ripple at twice mains; half: at mains.",
            choices=("full", "half"),
        ),
        Param(
            "percent_flicker",
            "Percent flicker of the light",
            "ratio",
            "10 %",
            "From the ripple calculator or a design's sheet.",
            0.0,
            1.0,
            exclusive_min=True,
        ),
        Param(
            "shape",
            "Ripple shape",
            "choice",
            "sawtooth",
            "sawtooth: smoothing capacitor; sine: gentle ripple; rectified: little or no smoothing.",
            choices=("sawtooth", "sine", "rectified"),
        ),
        Param("frame_rate", "Frame rate", "frame_rate", "24 fps", "Frames per second.", 1.0, 10000.0),
        Param("shutter", "Shutter given as", "choice", "angle", "", choices=("angle", "time")),
        Param("shutter_angle", "Shutter angle", "angle", "180°", "", 0.1, 360.0, modes=("angle",)),
        Param(
            "shutter_time",
            "Shutter time",
            "time",
            "10 ms",
            "1/100 s is 10 ms.",
            1e-6,
            10.0,
            modes=("time",),
        ),
        Param(
            "threshold", "Largest variation you accept", "ratio", "2 %", "Your own limit.", 0.0, 1.0, exclusive_min=True
        ),
    ),
    (
        Output("shutter_time_s", "Shutter time", "time"),
        Output("ripple_frequency_Hz", "Ripple frequency", "frequency"),
        Output("variation", "Exposure variation, worst phase", "ratio"),
        Output("exposure_low", "Darkest frame / mean", "ratio"),
        Output("exposure_high", "Brightest frame / mean", "ratio"),
        Output("beat_Hz", "Shows at", "frequency"),
        Output("verdict", "Against your threshold", "text"),
        Output("safe", "Shutter times under it", "text"),
        Output("zero", "No variation at", "text"),
        Output("flicker_band", "IEEE 1789 band", "text"),
    ),
    _camera,
    mode="shutter",
    columns=(
        Output("setting", "Shutter", "text"),
        Output("time_s", "Time", "time"),
        Output("variation", "Variation", "ratio"),
        Output("ok", "Under", "text"),
    ),
    main=("variation", "verdict", "safe"),
    secondary=("rectifier", "shape", "threshold"),
)


# --- harmonic limits ---------------------------------------------------------------


def _harmonics(v: V) -> Result:
    cls = str(v["emission_class"])
    p, pf, vn = f(v, "active_power"), f(v, "power_factor"), f(v, "mains_voltage")
    i1 = opt(v, "fundamental")
    if i1 is None:
        i1 = p / (vn * pf)  # a rough stand-in: the whole current taken as fundamental
    measured = {n: opt(v, f"h{n}") for n in (3, 5, 7, 9, 11, 13)}
    currents = [0.0, i1] + [0.0] * 39
    for n, x in measured.items():
        if x is not None:
            currents[n] = x * i1
    angles = None
    if all(opt(v, k) is not None for k in ("angle_start", "angle_peak", "angle_stop")):
        angles = (f(v, "angle_start"), f(v, "angle_peak"), f(v, "angle_stop"))
    verdict = harmonic_limits.verdict(cls, currents, p, pf, vn, angles)
    rows: list[dict[str, Value]] = []
    for n in range(2, 41):
        lim = verdict.limits[n]
        if lim is None:
            continue
        given = measured.get(n)
        rows.append(
            {
                "order": float(n),
                "limit_A": lim,
                "limit_ratio": lim / i1 if i1 > 0 else None,
                "measured_A": given * i1 if given is not None else None,
                "status": verdict.status[n] if given is not None else "",
            }
        )
    some = any(x is not None for x in measured.values())
    notes = [
        f"Limits: {harmonic_limits.SOURCE}; check against the standard before relying on a verdict.",
        harmonic_limits.RULES[cls],
        *verdict.notes,
    ]
    if opt(v, "fundamental") is None:
        notes.append(
            "No fundamental current given: taken as P / (V x PF), which is close only when the current is nearly "
            "sinusoidal. Type the measured fundamental for percentage limits you can rely on."
        )
    return Result(
        {
            "band": verdict.band,
            "fundamental_A": i1,
            "verdict": ("pass" if verdict.passed else "over a limit") if some else "no harmonics typed",
            "applies": "yes" if verdict.applies else "guide only (not 220-240 V)",
        },
        tuple(rows),
        tuple(notes),
        () if verdict.passed or not some else (f"Over the limit at order {', '.join(map(str, verdict.failures))}.",),
    )


HARMONICS = Calculator(
    "harmonics",
    "Harmonic current limits",
    "The IEC 61000-3-2 limits for a fixture's class and power, and measured harmonics against them.",
    (
        Param(
            "emission_class",
            "Class",
            "choice",
            "C",
            "C: lighting equipment; A: professional stage and studio luminaires.",
            choices=harmonic_limits.CLASSES,
        ),
        Param(
            "mains_voltage",
            "Mains voltage (rms)",
            "voltage",
            "230 V",
            "The standard is written for 220-240 V.",
            1.0,
            1000.0,
        ),
        Param("active_power", "Active input power", "power", "40 W", "", 0.0, 1e5),
        Param("power_factor", "Power factor", "ratio", "0.5", "Circuit power factor (P / S).", 0.01, 1.0),
        Param(
            "fundamental",
            "Fundamental current (rms)",
            "current",
            None,
            "Measured or from a design's sheet.",
            0.0,
            1000.0,
            exclusive_min=True,
        ),
        Param("h3", "3rd harmonic", "ratio", None, "Percent of the fundamental.", 0.0, 10.0),
        Param("h5", "5th harmonic", "ratio", None, "", 0.0, 10.0),
        Param("h7", "7th harmonic", "ratio", None, "", 0.0, 10.0),
        Param("h9", "9th harmonic", "ratio", None, "", 0.0, 10.0),
        Param("h11", "11th harmonic", "ratio", None, "", 0.0, 10.0),
        Param("h13", "13th harmonic", "ratio", None, "", 0.0, 10.0),
        Param(
            "angle_start",
            "Current starts at",
            "angle",
            None,
            "5-25 W lighting: degrees from the voltage zero.",
            -180.0,
            180.0,
        ),
        Param("angle_peak", "Current's last peak at", "angle", None, "", -180.0, 180.0),
        Param("angle_stop", "Current stops at", "angle", None, "", -180.0, 270.0),
    ),
    (
        Output("band", "Rules that apply", "text"),
        Output("fundamental_A", "Fundamental used", "current"),
        Output("verdict", "Typed harmonics", "text"),
        Output("applies", "Binding at this voltage", "text"),
    ),
    _harmonics,
    mains=True,
    columns=(
        Output("order", "Order", "count"),
        Output("limit_A", "Limit", "current"),
        Output("limit_ratio", "of I₁", "ratio"),
        Output("measured_A", "Typed", "current"),
        Output("status", "", "text"),
    ),
    main=("verdict", "band", "applies"),
    secondary=("fundamental", "h9", "h11", "h13", "angle_start", "angle_peak", "angle_stop"),
)


CALCULATORS: dict[str, Calculator] = {
    c.name: c for c in (DROPPER, STRING, RIPPLE, WIRE, MODULE, PREFERRED, MAINS, QUANTITY, LIGHT, CAMERA, HARMONICS)
}


def get(name: str) -> Calculator:
    try:
        return CALCULATORS[name]
    except KeyError:
        raise InputError("calculator", name, "one of " + ", ".join(CALCULATORS)) from None
