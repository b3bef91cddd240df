"""Declarations: one per calculator, from which the command line, the page
form, validation and the docs tables are all generated.

A calculator declares its inputs (``Param``: name, label, dimension, default
as the user would type it, limits in SI, help) and its outputs (``Output``),
and names a pure function from the parsed inputs (SI floats, strings for
choices) to a ``Result``.
"""

from __future__ import annotations

import math
from collections.abc import Callable, Mapping
from dataclasses import dataclass, replace

from . import cautions
from .cautions import UNVERIFIED_NOTE, daggered
from .errors import CalcError, InputError, InputErrors
from .protocol import CalculatorDecl, ComputeAnswer, RegionPreset, SweepDecl
from .quantities.regions import PRESETS
from .quantities.units import dimension, format_value, parse

Value = float | str | None


@dataclass(frozen=True)
class Param:
    name: str
    label: str
    dim: str  # a units dimension, "choice", "region" or "text"
    default: str | None  # as typed; None: optional, absent unless given
    help: str
    minimum: float | None = None  # SI
    maximum: float | None = None  # SI
    choices: tuple[str, ...] = ()
    modes: tuple[str, ...] = ()  # shown only when the calculator's mode param has one of these values
    imperial: str | None = None  # default on the imperial side of the unit switch
    exclusive_min: bool = False

    @property
    def optional(self) -> bool:
        return self.default is None


@dataclass(frozen=True)
class Output:
    name: str
    label: str
    dim: str  # a units dimension, or "text"
    help: str = ""
    #: the modes whose answer includes this output (empty: every mode); in another mode it is not shown at all,
    #: while in its own mode an output with no value reads "does not apply"
    modes: tuple[str, ...] = ()
    #: why the output has no value when it has none (shown after "does not apply: ")
    absent: str = ""


@dataclass(frozen=True)
class Sweep:
    """A plot the page may draw: ``output`` against the input ``param`` swept from
    ``low`` to ``high`` times the value in the form, in ``points`` steps (evenly on
    a log scale when ``log``). The core computes the points (``{"kind": "sweep"}``);
    the page only draws them, with the value axis from zero."""

    name: str
    param: str
    output: str
    label: str  # the figure's caption
    x_title: str
    y_title: str
    low: float
    high: float
    log: bool = False
    points: int = 17

    def factors(self) -> list[float]:
        n = self.points - 1
        if self.log:
            return [self.low * (self.high / self.low) ** (k / n) for k in range(n + 1)]
        return [self.low + (self.high - self.low) * k / n for k in range(n + 1)]


@dataclass(frozen=True)
class Result:
    values: Mapping[str, Value]
    rows: tuple[Mapping[str, Value], ...] = ()
    notes: tuple[str, ...] = ()
    warnings: tuple[str, ...] = ()
    cautions: tuple[str, ...] | None = None  # None: the calculator's own
    # what to show for an output instead of its formatted value (a row that does
    # not apply says why rather than vanishing)
    display: Mapping[str, str] | None = None
    dims: Mapping[str, str] | None = None  # an output's dimension when it follows the input's
    mode: str | None = None  # the value of the calculator's mode input this answer was computed in


@dataclass(frozen=True)
class Calculator:
    name: str
    title: str
    summary: str
    params: tuple[Param, ...]
    outputs: tuple[Output, ...]
    compute: Callable[[Mapping[str, Value]], Result]
    mains: bool = False
    mode: str | None = None  # name of the param that picks a mode
    columns: tuple[Output, ...] = ()  # the table of options, if any
    plots: tuple[Sweep, ...] = ()  # the sweeps the page may draw
    mains_modes: tuple[str, ...] = ()  # values of the mode param that put the result on the mains
    main: tuple[str, ...] = ()  # presentation: the outputs a user came for, kept in view in the page
    secondary: tuple[str, ...] = ()  # presentation: inputs folded under a summary of their values in the page

    def param(self, name: str) -> Param:
        for p in self.params:
            if p.name == name:
                return p
        raise KeyError(name)

    def output(self, name: str) -> Output:
        for o in self.outputs:
            if o.name == name:
                return o
        raise KeyError(name)

    @property
    def cautions(self) -> tuple[str, ...]:
        return cautions.MAINS if self.mains else ()


def _check_range(p: Param, raw: object, x: float) -> None:
    lo, hi = p.minimum, p.maximum
    if lo is not None and (x < lo or (p.exclusive_min and x <= lo)):
        bound = format_value(lo, p.dim) if p.dim not in ("choice", "region") else str(lo)
        raise InputError(p.name, raw, f"{'more than' if p.exclusive_min else 'at least'} {bound}")
    if hi is not None and x > hi:
        raise InputError(p.name, raw, f"at most {format_value(hi, p.dim)}")


def parse_inputs(calc: Calculator, raw: Mapping[str, object]) -> dict[str, Value]:
    """Parse and check every input; collect every problem before raising."""
    errors: list[InputError] = []
    known = {p.name for p in calc.params}
    for key in raw:
        if key not in known:
            errors.append(
                InputError(key, raw[key], "one of the inputs of " + calc.name + ": " + ", ".join(sorted(known)))
            )
    out: dict[str, Value] = {}
    region_key = None
    for p in calc.params:
        given = raw.get(p.name)
        if isinstance(given, str) and given.strip() == "":
            if p.default is not None:
                errors.append(InputError(p.name, given, _blank_expected(p)))
                continue
            given = None
        if given is None:
            given = p.default
        if given is None:
            out[p.name] = None
            continue
        try:
            if p.dim == "text":
                out[p.name] = str(given)
                continue
            if p.dim in ("choice", "region"):
                text = str(given).strip()
                allowed = p.choices if p.dim == "choice" else (*PRESETS, "custom")
                if text not in allowed:
                    raise InputError(p.name, given, "one of " + ", ".join(allowed))
                out[p.name] = text
                if p.dim == "region":
                    region_key = text
                continue
            x = parse(given, p.dim, p.name)
            if not math.isfinite(x):
                raise InputError(p.name, given, "a finite value")
            _check_range(p, given, x)
            if p.dim == "count" and x != int(x):
                raise InputError(p.name, given, "a whole number")
            out[p.name] = x
        except InputError as e:
            errors.append(e)
    if region_key and region_key != "custom":
        preset = PRESETS[region_key]
        for name, value in (("mains_voltage", preset.voltage), ("frequency", preset.frequency)):
            if name in known and _blank(raw.get(name)):
                out[name] = value
        if "mains_tolerance" in known and _blank(raw.get("mains_tolerance")):
            out["mains_tolerance"] = max(preset.plus, preset.minus)
            out["mains_plus"] = preset.plus
            out["mains_minus"] = preset.minus
    region_failed = any(e.field == "region" for e in errors)
    for name in ("mains_voltage", "frequency"):
        if region_failed:
            break  # one problem, one line: the region is what is wrong
        if name in known and out.get(name) is None and not any(e.field == name for e in errors):
            errors.append(InputError(name, "", "a value, or a region preset other than custom"))
    if "mains_tolerance" in known and out.get("mains_tolerance") is not None and "mains_plus" not in out:
        out["mains_plus"] = out["mains_minus"] = out["mains_tolerance"]
    if errors:
        raise errors[0] if len(errors) == 1 else InputErrors(errors)
    return out


def _blank(x: object) -> bool:
    return x is None or (isinstance(x, str) and not x.strip())


def _blank_expected(p: Param) -> str:
    if p.dim in ("choice", "region"):
        allowed = p.choices if p.dim == "choice" else (*PRESETS, "custom")
        what = "one of " + ", ".join(allowed)
    elif p.dim == "text":
        what = f"a value such as '{p.default}'"
    else:
        what = dimension(p.dim).expected
    return f"{what}; a blank is not read as the default ('{p.default}': leave the option out for that)"


def evaluate(calc: Calculator, raw: Mapping[str, object]) -> Result:
    inputs = parse_inputs(calc, raw)
    result = calc.compute(inputs)
    if calc.mode and result.mode is None:
        result = replace(result, mode=str(inputs.get(calc.mode)))
    return result


def format_output(o: Output, v: Value, digits: int | None = 4) -> str:
    if v is None:
        return "—"
    if isinstance(v, str) or o.dim == "text":
        return str(v)
    if isinstance(v, float) and math.isinf(v):
        return "unbounded"
    return format_value(float(v), o.dim, digits)


def to_json(calc: Calculator, result: Result) -> ComputeAnswer:
    """The JSON shape every front end reads: raw SI values, the same values
    formatted for reading, the option table, notes, warnings and cautions."""

    def clean(v: Value) -> Value:
        if isinstance(v, float) and not math.isfinite(v):
            return None
        return v

    shown = dict(result.display or {})
    dims = dict(result.dims or {})
    notes = list(result.notes)
    for o in calc.outputs:
        v = result.values.get(o.name)
        if isinstance(v, float) and not math.isfinite(v) and o.name not in shown:
            shown[o.name] = "unbounded" if v > 0 else "not defined"
            notes.append(f"{o.label}: {shown[o.name]} here (given as null in the JSON).")

    def display(o: Output, v: Value) -> str:
        if o.name in shown:
            return shown[o.name]
        if v is None:
            return f"does not apply: {o.absent}" if o.absent else "does not apply"
        return format_output(Output(o.name, o.label, dims.get(o.name, o.dim)), v)

    # a limit recalled rather than read against its standard: a dagger where it is used, one note saying so
    unverified = False

    def mark(text: str) -> str:
        nonlocal unverified
        out, u = daggered(text)
        unverified |= u
        return out

    shown_all = {o.name: mark(display(o, result.values.get(o.name))) for o in calc.outputs}
    notes = [mark(n) for n in notes]
    warnings = [mark(w) for w in result.warnings]
    if unverified:
        notes.append(UNVERIFIED_NOTE)
    return {
        "calculator": calc.name,
        "ok": True,
        "values": {o.name: clean(result.values.get(o.name)) for o in calc.outputs},
        "display": shown_all,
        "rows": [{c.name: clean(r.get(c.name)) for c in calc.columns} for r in result.rows],
        "rows_display": [
            {
                c.name: format_output(Output(c.name, c.label, dims.get(c.name, c.dim)), r.get(c.name))
                for c in calc.columns
            }
            for r in result.rows
        ],
        # the outputs this answer includes: those of its mode (an output with no value among them reads
        # "does not apply"); the others belong to another mode and are not shown
        "applies": [o.name for o in calc.outputs if not o.modes or result.mode in o.modes],
        "notes": notes,
        "warnings": warnings,
        "cautions": list(calc.cautions if result.cautions is None else result.cautions),
    }


def sweep(calc: Calculator, plot: str, raw: Mapping[str, object]) -> tuple[float, list[tuple[float, float]]]:
    """The points of the calculator's sweep ``plot`` about the inputs ``raw``: the
    swept input's value (SI) and the (input, output) pairs that have an answer.
    Raises the input errors of ``raw`` itself; a point the calculator refuses
    (out of an input's limits, no solution) is left out, as is one with no value."""
    s = next((x for x in calc.plots if x.name == plot), None)
    if s is None:
        names = ", ".join(x.name for x in calc.plots)
        raise InputError(
            "plot", plot, f"one of {names}" if names else f"a calculator with a plot ({calc.name} has none)"
        )
    param = calc.param(s.param)
    centre = parse_inputs(calc, raw).get(s.param)
    if not isinstance(centre, float) or centre == 0:
        return 0.0, []
    unit = dimension(param.dim).symbol
    points = []
    for f in s.factors():
        x = centre * f
        try:
            y = evaluate(calc, {**raw, s.param: f"{x!r} {unit}"}).values.get(s.output)
        except CalcError:
            continue
        if isinstance(y, (int, float)) and math.isfinite(y):
            points.append((x, float(y)))
    return centre, points


def _sweep_json(calc: Calculator, s: Sweep) -> SweepDecl:
    return {
        "name": s.name,
        "param": s.param,
        "output": s.output,
        "label": s.label,
        "x_title": s.x_title,
        "y_title": s.y_title,
        "x_unit": dimension(calc.param(s.param).dim).symbol,
        "y_unit": dimension(calc.output(s.output).dim).symbol,
        "low": s.low,
        "high": s.high,
        "log": s.log,
        "points": s.points,
    }


def describe(calc: Calculator) -> CalculatorDecl:
    """The declaration as JSON, for the page form and the docs table."""
    return {
        "name": calc.name,
        "title": calc.title,
        "summary": calc.summary,
        "mains": calc.mains,
        "mains_modes": list(calc.mains_modes),
        "mode": calc.mode,
        "params": [
            {
                "name": p.name,
                "label": p.label,
                "dim": p.dim,
                "default": p.default,
                "imperial": p.imperial,
                "help": p.help,
                "choices": list(p.choices)
                if p.dim == "choice"
                else ([*PRESETS, "custom"] if p.dim == "region" else []),
                "modes": list(p.modes),
                "minimum": p.minimum,
                "maximum": p.maximum,
                "secondary": p.name in calc.secondary,
            }
            for p in calc.params
        ],
        "outputs": [
            {"name": o.name, "label": o.label, "dim": o.dim, "help": o.help, "modes": list(o.modes)}
            for o in calc.outputs
        ],
        "columns": [{"name": o.name, "label": o.label, "dim": o.dim} for o in calc.columns],
        "plots": [_sweep_json(calc, s) for s in calc.plots],
        "main": list(calc.main),
    }


def region_presets() -> dict[str, RegionPreset]:
    return {
        k: {
            "voltage": format_value(p.voltage, "voltage"),
            "frequency": format_value(p.frequency, "frequency"),
            "tolerance": format_value(max(p.plus, p.minus), "ratio"),
            "label": p.label,
            "source": p.source,
        }
        for k, p in PRESETS.items()
    }
